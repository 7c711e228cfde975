"""Scene files: TOML in, TOML out, with strict validation.

Every problem raises :class:`SceneError` naming the file, the field path and what was expected,
e.g. ``pump.toml: feature[0] "bore" .tolerance.value: expected a number >= 0, got -0.02``.

>>> s = loads('units = "mm"\\n[[feature]]\\nid = "b"\\nkind = "hole"\\nlimits = [10, 10.015]\\nlength = 15')
>>> s.features[0].mmc
10.0
>>> loads(dumps(s)) == s
True
"""

from __future__ import annotations

import difflib
import json
import math
import os
import tempfile
import tomllib
from pathlib import Path
from typing import Any

from .textfile import clip, file_slug, read_text, text_problem
from .model import (
    Characteristic,
    Fastener,
    Feature,
    Kind,
    Mate,
    Material,
    Measured,
    Scene,
    Standard,
    Tolerance,
    Units,
    Zone,
    axis_direction,
    datum_problem,
)

TOP_KEYS = ("title", "units", "standard", "feature", "mate", "fastener", "datum", "pattern", "interface", "report",
            "process", "yield")
FEATURE_KEYS = ("id", "kind", "limits", "length", "at", "name", "envelope", "tolerance", "measured", "refinement")
TOLERANCE_KEYS = ("characteristic", "zone", "value", "material", "datums", "projected", "angle")
MEASURED_KEYS = ("size", "related_size", "axis_deviation", "axis_bottom", "axis_top", "local_sizes",
                 "uncertainty", "points")
MATE_KEYS = ("hole", "pin")
FASTENER_KEYS = ("id", "kind", "fastener", "hole", "thread_depth", "projection")
REPORT_KEYS = ("part", "revision", "part_name", "drawing", "sheet", "lot", "serial", "quantity",
               "quantity_inspected", "quantity_rejected", "report_number", "requirement", "drawing_zone",
               "customer", "order", "method", "equipment", "calibration", "found_by", "inspector",
               "prepared_by", "disposition_by", "containment", "corrective_action", "date", "supplier",
               "remarks")
COUNT_KEYS = ("quantity", "quantity_inspected", "quantity_rejected")  # whole numbers of parts


MAX_MAGNITUDE = 1e6  # largest length, location or tolerance accepted (scene units): 1 km in mm
MIN_LENGTH = 1e-6  # smallest size or length accepted (scene units)
MAX_ID = 64  # characters of an id


class SceneError(ValueError):
    """A scene that cannot be used, with file, field path and what was expected."""

    def __init__(self, file: str, path: str, message: str):
        self.file, self.path, self.detail = file, path, message
        where = f"{file}: {path}: " if path else f"{file}: "
        super().__init__(where + message)


class _Ctx:
    def __init__(self, file: str):
        self.file = file

    def fail(self, path: str, msg: str):
        raise SceneError(self.file, path, msg)

    def table(self, v, path, keys, required=()):
        if not isinstance(v, dict):
            self.fail(path, f"expected a table, got {_show(v)}")
        for k in v:
            if k not in keys:
                near = difflib.get_close_matches(k, keys, n=1)
                hint = f" (did you mean {near[0]!r}?)" if near else ""
                self.fail(_join(path, k), f"unknown key{hint}; expected one of: {', '.join(keys)}")
        for k in required:
            if k not in v:
                self.fail(_join(path, k), "missing; this key is required")
        return v

    def string(self, v, path, choices=None, what="a text", max_len=200, newlines=False):
        if not isinstance(v, str) or not v.strip():
            self.fail(path, f"expected a non-empty string, got {_show(v)}")
        why = text_problem(v, what, max_len, newlines)
        if why:
            self.fail(path, why)
        if choices is not None and v not in choices:
            near = difflib.get_close_matches(v, choices, n=1)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            self.fail(path, f"expected one of {', '.join(repr(c) for c in choices)}, got {v!r}{hint}")
        return v

    def number(self, v, path, positive=False, nonneg=False):
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            self.fail(path, f"expected a number, got {_show(v)}")
        try:
            v = float(v)
        except OverflowError:
            self.fail(path, f"expected a number of sensible size, got an integer with {len(str(v))} digits")
        if not math.isfinite(v):
            self.fail(path, f"expected a finite number, got {v}")
        if abs(v) > MAX_MAGNITUDE:
            self.fail(path, f"expected a number of magnitude at most {MAX_MAGNITUDE:g} (scene units), got {v:g}")
        if positive and v <= 0:
            self.fail(path, f"expected a number > 0, got {v:g}")
        if positive and v < MIN_LENGTH:
            self.fail(path, f"expected a length of at least {MIN_LENGTH:g} (scene units), got {v:g}")
        if nonneg and v < 0:
            self.fail(path, f"expected a number >= 0, got {v:g}")
        return v

    def pair(self, v, path, what="a list of two numbers"):
        if not isinstance(v, list) or len(v) != 2:
            self.fail(path, f"expected {what}, got {_show(v)}")
        return (self.number(v[0], f"{path}[0]"), self.number(v[1], f"{path}[1]"))

    def array_of_tables(self, v, path):
        if isinstance(v, dict):
            self.fail(path, f"expected an array of tables ([[{path}]]), got a single table ([{path}])")
        if not isinstance(v, list) or not all(isinstance(x, dict) for x in v):
            self.fail(path, f"expected an array of tables ([[{path}]]), got {_show(v)}")
        return v


def _join(path: str, key: str) -> str:
    """``path.key``; a key that is not a plain name (a quoted TOML key with spaces, control or
    bidirectional characters) is shown quoted and clipped, so a message stays one line."""
    if any(not (ch.isascii() and ch.isprintable()) or ch.isspace() or ch in "'\"" for ch in key):
        key = clip(repr(key), 40)
    return f"{path}.{key}" if path else key


def _show(v: Any) -> str:
    if isinstance(v, bool):
        return f"the boolean {str(v).lower()}"
    if isinstance(v, str):
        return f"the string {clip(repr(v), 80)}"
    if isinstance(v, (int, float)):
        return f"the number {v!r}"
    if isinstance(v, list):
        return f"a list of {len(v)}"
    if isinstance(v, dict):
        return "a table"
    if hasattr(v, "isoformat"):
        return f"the date/time {v.isoformat()} (quote it if you meant text)"
    return type(v).__name__


def _tolerance(c: _Ctx, v, path) -> Tolerance:
    c.table(v, path, TOLERANCE_KEYS, required=("characteristic", "value"))
    ch = Characteristic(c.string(v["characteristic"], _join(path, "characteristic"), [x.value for x in Characteristic]))
    zone = Zone(c.string(v.get("zone", "diameter"), _join(path, "zone"), [x.value for x in Zone]))
    mat = Material(c.string(v.get("material", "RFS"), _join(path, "material"), [x.value for x in Material]))
    value = c.number(v["value"], _join(path, "value"), nonneg=True)
    if value == 0 and mat is Material.RFS:
        c.fail(_join(path, "value"), "expected a number > 0: a zero tolerance needs material = \"MMC\" or \"LMC\"")
    datums = v.get("datums", [])
    if not isinstance(datums, list) or not all(isinstance(d, str) and d.strip() and len(d) <= 8
                                               and text_problem(d, "a datum", 8) is None for d in datums):
        c.fail(_join(path, "datums"), f"expected a list of datum letters such as [\"A\"], got {_show(datums)}")
    if len(set(datums)) != len(datums):
        c.fail(_join(path, "datums"), "expected each datum once, got a repeated letter")
    if (ch is Characteristic.STRAIGHTNESS) == bool(datums):  # straightness takes none, the others some
        c.fail(_join(path, "datums"), "expected no datums: straightness is a form tolerance and takes none" if datums
               else f"expected at least one datum ({ch.value} is related to datum A)")
    if datums and datums[0] != "A":
        c.fail(_join(path, "datums"), f"expected datum A first (matezone's frame takes A as the primary "
                                      f"datum plane, z = 0), got {datums!r}")
    projected = c.number(v["projected"], _join(path, "projected"), positive=True) if "projected" in v else None
    if projected is not None and ch is Characteristic.STRAIGHTNESS:
        c.fail(_join(path, "projected"), "expected no projected zone on a straightness tolerance")
    angle = None
    if ch is Characteristic.ANGULARITY:
        if "angle" not in v:
            c.fail(_join(path, "angle"), "missing; angularity needs its basic angle to datum A in degrees")
        angle = c.number(v["angle"], _join(path, "angle"))
        if not 0 < angle < 90:
            c.fail(_join(path, "angle"), f"expected a basic angle between 0 and 90 degrees (exclusive), got {angle:g}")
    elif "angle" in v:
        c.fail(_join(path, "angle"), f"expected no angle: only angularity takes a basic angle, this is {ch.value}")
    tol = Tolerance(ch, value, zone, mat, tuple(datums), projected, angle)
    if why := datum_problem(tol):
        c.fail(_join(path, "datums"), "expected datums that fix the zone: " + why)
    return tol


def _measured(c: _Ctx, v, path) -> Measured:
    c.table(v, path, MEASURED_KEYS)
    kw: dict[str, Any] = {}
    for k in ("size", "related_size", "uncertainty", "axis_deviation"):
        if k in v:
            kw[k] = c.number(v[k], _join(path, k), positive=k in ("size", "related_size"), nonneg=True)
    for k in ("axis_bottom", "axis_top"):
        if k in v:
            kw[k] = c.pair(v[k], _join(path, k), "a list of two coordinates [x, y]")
    if ("axis_bottom" in kw) != ("axis_top" in kw):
        c.fail(_join(path, "axis_top" if "axis_bottom" in kw else "axis_bottom"),
               "missing; axis end points come as a pair (axis_bottom and axis_top)")
    if "local_sizes" in v:
        lo, hi = c.pair(v["local_sizes"], _join(path, "local_sizes"), "[smallest, largest] local size")
        if lo <= 0 or lo > hi:
            c.fail(_join(path, "local_sizes"), f"expected 0 < smallest <= largest, got [{lo:g}, {hi:g}]")
        kw["local_sizes"] = (lo, hi)
    if "points" in v:
        kw["points"] = c.string(v["points"], _join(path, "points"))
    return Measured(**kw)


def _feature(c: _Ctx, v, i: int) -> Feature:
    path = f"feature[{i}]"
    c.table(v, path, FEATURE_KEYS, required=("id", "kind", "limits", "length"))
    fid = c.string(v["id"], _join(path, "id"), what="an id", max_len=MAX_ID)
    path = f'feature[{i}] "{fid}"'
    if "=" in fid or fid != fid.strip():
        c.fail(_join(path, "id"), f"expected an id without '=' and without surrounding spaces (the command line "
                                  f"writes ID=VALUE), got {fid!r}")
    kind = Kind(c.string(v["kind"], _join(path, "kind"), [x.value for x in Kind]))
    lim = v["limits"]
    if not isinstance(lim, list) or len(lim) != 2:
        c.fail(_join(path, "limits"), f"expected [smallest, largest] size, got {_show(lim)}")
    lo = c.number(lim[0], _join(path, "limits[0]"), positive=True)
    hi = c.number(lim[1], _join(path, "limits[1]"), positive=True)
    if lo >= hi:
        what = "reversed" if lo > hi else "a single size"
        c.fail(_join(path, "limits"), f"expected [smallest, largest] with smallest < largest, got [{lo:g}, {hi:g}] ({what})")
    length = c.number(v["length"], _join(path, "length"), positive=True)
    at = c.pair(v["at"], _join(path, "at"), "a basic location [x, y] on datum A") if "at" in v else (0.0, 0.0)
    name = c.string(v["name"], _join(path, "name"), what="a name") if "name" in v else ""
    env = None
    if "envelope" in v:
        if not isinstance(v["envelope"], bool):
            c.fail(_join(path, "envelope"), f"expected true or false, got {_show(v['envelope'])}")
        env = v["envelope"]
    tol = _tolerance(c, v["tolerance"], _join(path, "tolerance")) if "tolerance" in v else None
    meas = _measured(c, v["measured"], _join(path, "measured")) if "measured" in v else None
    feat = Feature(fid, kind, (lo, hi), length, at, tol, env, meas, name)
    if tol is not None:
        from .boundaries import worst_case_boundaries

        sizes = [b for b in worst_case_boundaries(feat) if b is not None]
        if sizes and min(sizes) <= 0:
            c.fail(_join(path, "tolerance.value"), f"expected a tolerance that leaves a boundary > 0; with "
                                                   f"{tol.value:g} the smallest worst-case boundary is {min(sizes):g}")
    if "refinement" in v:  # tighter controls on the same feature (geom.refinement)
        from .refinement import parse_refinements

        feat = feat.with_(refinements=parse_refinements(c, v["refinement"], path, feat))
    return feat


def _fastener(c: _Ctx, v, i: int) -> Fastener:
    path = f"fastener[{i}]"
    c.table(v, path, FASTENER_KEYS, required=("id", "kind", "fastener", "hole"))
    fid = c.string(v["id"], _join(path, "id"), what="an id", max_len=MAX_ID)
    path = f'fastener[{i}] "{fid}"'
    kind = c.string(v["kind"], _join(path, "kind"), ["floating", "fixed"])
    F = c.number(v["fastener"], _join(path, "fastener"), positive=True)
    H = c.number(v["hole"], _join(path, "hole"), positive=True)
    if F >= H:
        c.fail(_join(path, "hole"), f"expected a clearance hole larger than the fastener ({F:g}), got {H:g}")
    D = P = None
    if kind == "fixed":
        for k in ("thread_depth", "projection"):
            if k not in v:
                c.fail(_join(path, k), "missing; a fixed fastener needs thread_depth (D) and projection (P)")
        D = c.number(v["thread_depth"], _join(path, "thread_depth"), positive=True)
        P = c.number(v["projection"], _join(path, "projection"), positive=True)
    else:
        for k in ("thread_depth", "projection"):
            if k in v:
                c.fail(_join(path, k), "expected no such key: only a fixed fastener has a threaded part")
    return Fastener(fid, kind, F, H, D, P)


def _orient(f: Feature) -> str:
    t = f.tolerance
    if t is None or t.characteristic not in (Characteristic.PARALLELISM, Characteristic.ANGULARITY):
        return "normal to datum A"
    if t.characteristic is Characteristic.PARALLELISM:
        return "parallel to datum A"
    return f"at {t.angle:g} deg to datum A"


def parse(data: dict, file: str = "<scene>", source: str | None = None) -> Scene:
    """Validate a decoded TOML document and build the scene."""
    c = _Ctx(file)
    c.table(data, "", TOP_KEYS, required=("units",))
    title = c.string(data["title"], "title", what="a title") if "title" in data else (Path(file).stem if source else "Untitled")
    units = Units(c.string(data["units"], "units", [u.value for u in Units]))
    standard = Standard(c.string(data.get("standard", "asme"), "standard", [s.value for s in Standard]))
    feats = []
    ids: dict[str, int] = {}
    slugs: dict[str, str] = {}
    for i, fv in enumerate(c.array_of_tables(data.get("feature", []), "feature")):
        f = _feature(c, fv, i)
        if f.id in ids:
            c.fail(f"feature[{i}].id", f"expected a unique id, got {f.id!r} again (first at feature[{ids[f.id]}])")
        key = file_slug(f.id).casefold()
        if key in slugs:
            c.fail(f"feature[{i}].id", f"expected an id that names its own output files; {f.id!r} and "
                                       f"{slugs[key]!r} both become {file_slug(f.id)!r} in file names")
        slugs[key] = f.id
        ids[f.id] = i
        feats.append(f)
    by_id = {f.id: f for f in feats}
    mates = []
    for i, mv in enumerate(c.array_of_tables(data.get("mate", []), "mate")):
        path = f"mate[{i}]"
        c.table(mv, path, MATE_KEYS, required=MATE_KEYS)
        ends = {}
        for role in ("hole", "pin"):
            ref = c.string(mv[role], _join(path, role))
            if ref not in by_id:
                near = difflib.get_close_matches(ref, list(by_id), n=1)
                hint = f" (did you mean {near[0]!r}?)" if near else ""
                c.fail(_join(path, role), f"expected the id of a feature, got {ref!r}, which no feature has{hint}")
            if by_id[ref].kind.value != role:
                c.fail(_join(path, role), f"expected a {role} feature, but {ref!r} is a {by_id[ref].kind.value}")
            ends[role] = ref
        h, pn = by_id[ends["hole"]], by_id[ends["pin"]]
        dh, dp = axis_direction(h.tolerance), axis_direction(pn.tolerance)
        if max(abs(a - b) for a, b in zip(dh, dp)) > 1e-12:
            c.fail(_join(path, "pin"), f"expected a pin whose axis runs the same way as the hole's; "
                   f"{h.id!r} is {_orient(h)} but {pn.id!r} is {_orient(pn)}")
        mate = Mate(ends["hole"], ends["pin"])
        if mate in mates:
            c.fail(path, f"expected each mate once; hole {mate.hole!r} with pin {mate.pin!r} is already "
                         f"mate[{mates.index(mate)}]")
        mates.append(mate)
    fasteners = []
    fids: set[str] = set()
    for i, fv in enumerate(c.array_of_tables(data.get("fastener", []), "fastener")):
        fa = _fastener(c, fv, i)
        if fa.id in fids:
            c.fail(f"fastener[{i}].id", f"expected a unique id, got {fa.id!r} again")
        key = file_slug(fa.id).casefold()
        if key in slugs:
            c.fail(f"fastener[{i}].id", f"expected an id that names its own output files; {fa.id!r} and "
                                        f"{slugs[key]!r} both become {file_slug(fa.id)!r} in file names")
        slugs[key] = fa.id
        fids.add(fa.id)
        fasteners.append(fa)
    if not feats and not fasteners:
        c.fail("feature", "expected at least one [[feature]] or [[fastener]]")
    report = ()
    if "report" in data:
        rv = c.table(data["report"], "report", REPORT_KEYS)
        items = []
        for k in REPORT_KEYS:
            if k in rv:
                val = rv[k]
                if isinstance(val, bool) or not isinstance(val, (str, int, float)):
                    c.fail(_join("report", k), f"expected text or a number, got {_show(val)}")
                if k in COUNT_KEYS:
                    if isinstance(val, str) or isinstance(val, float) and not (math.isfinite(val) and val.is_integer()):
                        c.fail(_join("report", k), f"expected a whole number of parts, got {_show(val)}")
                    if not 0 <= val <= 10**9:
                        c.fail(_join("report", k), f"expected a whole number of parts from 0 to 1e9, got {val!r}")
                    val = int(val)
                elif isinstance(val, float) and not math.isfinite(val):
                    c.fail(_join("report", k), f"expected text or a finite number, got {val}")
                elif isinstance(val, str):
                    why = text_problem(val, "text", 2000, newlines=True)
                    if why:
                        c.fail(_join("report", k), why)
                items.append((k, str(val)))
        counts = {k: int(v) for k, v in items if k in COUNT_KEYS}
        if counts.get("quantity_rejected", 0) > counts.get("quantity_inspected", counts.get("quantity_rejected", 0)):
            c.fail("report.quantity_rejected", f"expected at most report.quantity_inspected = "
                                               f"{counts['quantity_inspected']} parts, got {counts['quantity_rejected']}")
        report = tuple(items)
    scene = Scene(title, units, standard, tuple(feats), tuple(mates), tuple(fasteners), report, source=source)
    if any(k in data for k in ("datum", "pattern", "interface")):
        from .scenefile_frames import parse_frames  # the [[datum]], [[pattern]], [[interface]] tables

        scene = parse_frames(c, data, scene)
    if any(k in data for k in ("process", "yield")):
        from .scenefile_stats import parse_stats  # the [[process]] and [yield] tables

        scene = parse_stats(c, data, scene)
    return scene


def loads(text: str, file: str = "<scene>", source: str | None = None) -> Scene:
    text = text.removeprefix("\ufeff")  # a byte-order mark some editors write
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise SceneError(file, "", f"not valid TOML: {clip(str(e), 160)}") from None
    except RecursionError:
        raise SceneError(file, "", "not a usable TOML scene: arrays or tables nested too deeply") from None
    except (ValueError, MemoryError, OverflowError) as e:  # e.g. an integer of more than 4300 digits
        raise SceneError(file, "", f"not a usable TOML scene: {clip(str(e), 160)}") from None
    return parse(data, file, source)


def load(path: str | os.PathLike) -> Scene:
    """Read and validate a scene file."""

    def fail(message: str):
        raise SceneError(str(path), "", message)

    text = read_text(path, "a .toml scene file", fail)
    return loads(text, str(path), str(Path(path).resolve()))


# ---------------------------------------------------------------- writing


def _v(x) -> str:
    if isinstance(x, bool):
        return "true" if x else "false"
    if isinstance(x, float):
        return repr(x)
    if isinstance(x, int):
        return repr(x)
    if isinstance(x, str):
        return json.dumps(x, ensure_ascii=False)
    if isinstance(x, (list, tuple)):
        return "[" + ", ".join(_v(e) for e in x) + "]"
    raise TypeError(x)


def dumps(scene: Scene) -> str:
    """TOML text that :func:`loads` reads back to an equal scene."""
    out = [f"title = {_v(scene.title)}", f"units = {_v(scene.units.value)}",
           f"standard = {_v(scene.standard.value)}"]
    for f in scene.features:
        out += ["", "[[feature]]", f"id = {_v(f.id)}"]
        if f.name:
            out.append(f"name = {_v(f.name)}")
        out += [f"kind = {_v(f.kind.value)}", f"limits = {_v(list(f.limits))}", f"length = {_v(f.length)}",
                f"at = {_v(list(f.at))}"]
        if f.envelope is not None:
            out.append(f"envelope = {_v(f.envelope)}")
        tols = [("[feature.tolerance]", f.tolerance)] * (f.tolerance is not None)
        for head, t in tols + [("[[feature.refinement]]", r) for r in f.refinements]:
            out += [head, f"characteristic = {_v(t.characteristic.value)}", f"zone = {_v(t.zone.value)}",
                           f"value = {_v(t.value)}", f"material = {_v(t.material.value)}",
                           f"datums = {_v(list(t.datums))}"]
            out += [f"{k} = {_v(getattr(t, k))}" for k in ("projected", "angle") if getattr(t, k) is not None]
        m = f.measured
        if m is not None:
            out.append("[feature.measured]")
            for k in MEASURED_KEYS:
                val = getattr(m, k)
                if val is not None:
                    out.append(f"{k} = {_v(list(val) if isinstance(val, tuple) else val)}")
    for m in scene.mates:
        out += ["", "[[mate]]", f"hole = {_v(m.hole)}", f"pin = {_v(m.pin)}"]
    for fa in scene.fasteners:
        out += ["", "[[fastener]]", f"id = {_v(fa.id)}", f"kind = {_v(fa.kind)}",
                f"fastener = {_v(fa.fastener)}", f"hole = {_v(fa.hole)}"]
        if fa.thread_depth is not None:
            out.append(f"thread_depth = {_v(fa.thread_depth)}")
        if fa.projection is not None:
            out.append(f"projection = {_v(fa.projection)}")
    if scene.datums or scene.patterns or scene.interfaces:
        from .scenefile_frames import dump_frames

        out += dump_frames(scene)
    if scene.statistics is not None:
        from .scenefile_stats import dump_stats

        out += dump_stats(scene)
    if scene.report:
        out += ["", "[report]"] + [f"{k} = {v if k in COUNT_KEYS and v.isdigit() else _v(v)}"
                                   for k, v in scene.report]
    return "\n".join(out) + "\n"


def save(scene: Scene, path: str | os.PathLike) -> None:
    """Write atomically: a temporary file in the same folder, flushed, then renamed over.

    A symbolic link is saved through to its target (the link stays a link); an existing file
    keeps its permission bits; a path that is not a regular file (a folder, device or pipe) is
    refused with a :class:`SceneError`. A failed write raises its OSError and leaves the file as
    it was.
    """
    p = Path(path)
    if p.is_symlink():
        p = p.resolve()
    if p.exists() and not p.is_file():
        raise SceneError(str(path), "", "is not a regular file (a folder, device or pipe); cannot save a scene there")
    mode = None
    if p.exists():
        import stat as _stat

        mode = _stat.S_IMODE(os.stat(p).st_mode)
    text = dumps(scene)
    fd, tmp = tempfile.mkstemp(prefix=f".{p.name}.", suffix=".tmp", dir=p.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        if mode is None:
            umask = os.umask(0)
            os.umask(umask)
            mode = 0o666 & ~umask
        os.chmod(tmp, mode)
        os.replace(tmp, p)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
