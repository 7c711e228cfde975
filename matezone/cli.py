"""Command line: ``matezone analyze|report|inspect|yield|view``.

Thin on purpose: ``analyze`` imports only :mod:`geom` (no VTK, no Qt, no matplotlib); the
heavy layers are imported inside the commands that need them.
Exit codes: 0 done, 1 the scene does not assemble (``analyze --strict`` only),
2 bad input (a message naming the file, the field and what was expected).
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

EXIT_BAD_INPUT = 2


DEMO_SCENE = "gearbox_endcap_dowel.toml"


def bundled_scenes() -> Path:
    """The folder of the demo scenes shipped with matezone: the package ``matezone.scenes``,
    which is the top-level ``scenes/`` folder of a source checkout (mapped in pyproject.toml) and
    ``matezone/scenes/`` in an installed wheel. Found through the import system, so it works from
    either."""
    from importlib.resources import files

    return Path(str(files("matezone.scenes")))


def demo_scene() -> Path:
    """The bundled demo scene (opened by ``matezone`` with no arguments)."""
    return bundled_scenes() / DEMO_SCENE


class UserError(Exception):
    """Bad input: printed as one message, exit status 2."""


def _load(path: str):
    from geom.scenefile import SceneError, load

    try:
        return load(path)
    except SceneError as e:
        raise UserError(str(e)) from None


def cmd_analyze(args) -> int:
    from geom.analysis import analyse_scene
    from geom.jsonout import result_to_json
    from geom.readout import CAUTION, render_text

    scene = _load(args.scene)
    res = analyse_scene(scene)
    if args.json:
        out = result_to_json(res)
        out["caution"] = CAUTION
        print(json.dumps(out, indent=2, ensure_ascii=False))
    else:
        sys.stdout.write(render_text(res))
    if args.strict and any(not m.assembles for m in res.mates):
        return 1
    return 0


def cmd_report(args) -> int:
    from matezone.cmd_report import run

    return run(args, _load)


def cmd_inspect(args) -> int:
    from matezone.cmd_inspect import run

    return run(args, _load)


def cmd_view(args) -> int:
    from matezone.cmd_view import run

    return run(args, _load)


def cmd_yield(args) -> int:
    from matezone.cmd_yield import run

    return run(args, _load)


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="matezone",
        description="Worst-case fit of toleranced holes and pins: MMC/LMC, bonus, virtual condition, "
        "clearance, with 3D and 2D pictures. With no command, opens the viewer on the demo scene.",
    )
    sub = p.add_subparsers(dest="command")

    a = sub.add_parser("analyze", help="print sizes, boundaries with formulas, and fit verdicts")
    a.add_argument("scene", help="scene file (.toml)")
    a.add_argument("--json", action="store_true", help="print one JSON object instead of tables")
    a.add_argument("--strict", action="store_true", help="exit 1 when a mate does not assemble")
    a.set_defaults(func=cmd_analyze)

    r = sub.add_parser("report", help="write PNG/SVG pictures, a PDF report and results.json (no display needed)")
    r.add_argument("scene", help="scene file (.toml)")
    r.add_argument("--out", required=True, help="output folder (created if missing)")
    r.add_argument("--size", action="append", default=[], metavar="ID=VALUE",
                   help="produced size of a feature for the what-if pictures (default: worst case)")
    r.add_argument("--view", default="iso", help="camera of the 3D picture: iso, top, section (default iso)")
    r.add_argument("--points", action="append", default=[], metavar="ID=CSV",
                   help="measured points of a feature (CSV x,y,z[,section]); adds or replaces its inspection page")
    r.add_argument("--bonus-basis", default="unrelated", metavar="unrelated|related",
                   help="envelope the inspection bonus is taken from (default: unrelated)")
    r.add_argument("--animate", action="append", default=[], metavar="gif|mp4",
                   help="also write a teaching sweep (the hole's size from MMC to LMC at one locked scale) "
                        "per mate as an animated GIF or MP4; repeat for both")
    r.set_defaults(func=cmd_report)

    i = sub.add_parser("inspect", help="judge a produced part from inspection values or CMM points")
    i.add_argument("scene", help="scene file (.toml)")
    i.add_argument("--feature", required=True, help="id of the feature measured")
    i.add_argument("--points", help="CSV of surface points x,y,z[,section] in the datum frame")
    i.add_argument("--json", action="store_true", help="print one JSON object")
    i.add_argument("--bonus-basis", choices=["unrelated", "related"], default="unrelated",
                   help="envelope the bonus is taken from (default: unrelated, ASME Y14.5-2009 and later)")
    i.set_defaults(func=cmd_inspect)

    y = sub.add_parser("yield", help="statistical fit: Monte Carlo of every mate and interface, P(interference)")
    y.add_argument("scene", help="scene file (.toml)")
    y.add_argument("--samples", type=int, help="assemblies per run (default: the scene's [yield] samples, or 100000)")
    y.add_argument("--seed", type=int, help="random seed (default: the scene's [yield] seed, or 1)")
    y.add_argument("--json", action="store_true", help="print one JSON object")
    y.set_defaults(func=cmd_yield)

    v = sub.add_parser("view", help="open the desktop viewer")
    v.add_argument("scene", nargs="?", help="scene file (.toml); default: the demo scene")
    v.add_argument("--screenshot", metavar="PNG", help="save a picture of the window once shown, then exit")
    v.set_defaults(func=cmd_view)
    return p


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    parser = build_parser()
    if not argv:
        argv = ["view"]
    args = parser.parse_args(argv)
    if not getattr(args, "func", None):
        parser.print_help()
        return EXIT_BAD_INPUT
    try:
        return args.func(args)
    except UserError as e:
        print(f"matezone: {e}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:  # output piped into `head` and the like: stop quietly
        import os

        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0


if __name__ == "__main__":
    # Run through the package module, not this __main__ copy, so that the UserError raised by
    # the commands (imported from matezone.cli) is the class caught in main().
    from matezone.cli import main as _main

    sys.exit(_main())
