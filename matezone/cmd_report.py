"""``matezone report SCENE --out DIR [--size ID=VALUE ...] [--view NAME] [--points ID=CSV ...]
[--bonus-basis unrelated|related] [--animate gif|mp4]``: write the pictures, the PDF evidence report and results.json
without a display. Every feature with ``[feature.measured]`` data (or ``--points``) gets an
inspection page; fasteners get a page of their own."""

from __future__ import annotations

import math
import os
import signal
import sys
from pathlib import Path

from matezone.cli import UserError


def _id_pairs(specs: list[str], scene, option: str, example: str):
    """Yield ``(spec, id, value)`` from ``ID=VALUE`` options, each id a feature of the scene and
    given once; anything else is one clear message."""
    ids = [f.id for f in scene.features]
    seen: set[str] = set()
    for spec in specs:
        fid, sep, val = spec.partition("=")
        fid, val = fid.strip(), val.strip()
        if not ids:  # a scene of fastener tables only
            raise UserError(f"{option} {spec!r}: the scene has no features (only fasteners)")
        if not sep or not fid or not val:
            what = "VALUE" if option == "--size" else "CSV"
            raise UserError(f"{option} {spec!r}: expected ID={what}, e.g. {option} {ids[0]}={example}")
        if fid not in ids:
            raise UserError(f"{option} {spec!r}: no feature has the id {fid!r}; the scene's features are: "
                            + ", ".join(ids))
        if fid in seen:
            raise UserError(f"{option} {spec!r}: {fid!r} is given twice")
        seen.add(fid)
        yield spec, fid, val


def parse_sizes(specs: list[str], scene) -> dict[str, float]:
    """``["id=6.010", ...]`` -> {id: size}, each checked against the feature's limits."""
    from geom.boundaries import SizeOutOfLimits, check_size

    sizes: dict[str, float] = {}
    example = f"{scene.features[0].mmc:g}" if scene.features else "6.0"
    for spec, fid, val in _id_pairs(specs, scene, "--size", example):
        try:
            v = float(val)
        except ValueError:
            raise UserError(f"--size {spec!r}: expected a number after '=', got {val!r}") from None
        if not math.isfinite(v):
            raise UserError(f"--size {spec!r}: expected a finite number, got {val!r}")
        f = scene.feature(fid)
        try:
            check_size(f, v)
        except SizeOutOfLimits:
            u = scene.units
            raise UserError(f"--size {spec!r}: {v:g} is outside the limits of {fid!r}, "
                            f"{u.fmt(f.limits[0])} .. {u.fmt(f.limits[1])} {u.value}") from None
        sizes[fid] = v
    return sizes


def parse_points(specs: list[str], scene) -> dict[str, str]:
    """``["id=scan.csv", ...]`` -> {id: path}; the files themselves are read by geom.pointsfile."""
    return {fid: path for _, fid, path in _id_pairs(specs, scene, "--points", "scan.csv")}


def inspect_all(scene, points: dict[str, str], bonus_basis: str) -> dict:
    """Inspect every measured feature before anything is written; bad input -> one message."""
    from geom.fitting import FitError
    from geom.inspect import InspectError
    from geom.pointsfile import PointsError
    from viewer.report import scene_inspections

    try:
        return scene_inspections(scene, points, bonus_basis)
    except (InspectError, PointsError, FitError) as e:
        raise UserError(str(e)) from None


def run(args, load) -> int:
    if not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY"):
        # no display: let VTK render through EGL directly instead of trying an X server first
        # (which prints a "bad X server connection" warning on stderr)
        os.environ.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")
    scene = load(args.scene)
    sizes = parse_sizes(list(args.size or []), scene)
    points = parse_points(list(getattr(args, "points", None) or []), scene)
    from geom.inspect import BONUS_BASES

    basis = getattr(args, "bonus_basis", None) or "unrelated"
    if basis not in BONUS_BASES:
        raise UserError(f"--bonus-basis {basis!r}: expected one of {', '.join(BONUS_BASES)}")
    from viewer.scene3d import VIEWS

    if args.view not in VIEWS:
        raise UserError(f"--view {args.view!r}: expected one of {', '.join(VIEWS)}")
    animate = []
    for fmt in getattr(args, "animate", None) or []:
        f = str(fmt).strip().lower().lstrip(".")
        if f not in ("gif", "mp4"):
            raise UserError(f"--animate {fmt!r}: expected gif or mp4")
        if f".{f}" not in animate:
            animate.append(f".{f}")
    inspections = inspect_all(scene, points, basis)
    from viewer.reportdir import ReportDirError, check_target, write_report_atomic

    out = Path(args.out)
    try:
        check_target(out)
    except ReportDirError as e:
        raise UserError(str(e)) from None
    from geom.analysis import analyse_scene

    res = analyse_scene(scene)
    previous = signal.getsignal(signal.SIGTERM)

    def _terminate(signum, frame):  # the window's Cancel, or `kill`: clean up like Ctrl-C
        raise KeyboardInterrupt

    try:
        signal.signal(signal.SIGTERM, _terminate)
    except ValueError:  # not the main thread
        previous = None
    try:
        written = write_report_atomic(res, out, sizes=sizes, view=args.view,
                                      progress=lambda s: print(s, flush=True), inspections=inspections,
                                      animate=tuple(animate))
    except ReportDirError as e:
        raise UserError(str(e)) from None
    except KeyboardInterrupt:
        print(f"matezone: report interrupted; nothing was written to {str(out)!r} "
              "(a previous report there is unchanged)", file=sys.stderr)
        return 130
    finally:
        if previous is not None:
            signal.signal(signal.SIGTERM, previous)
    print(f"wrote {len(written)} files to {out}")
    return 0
