"""Scene files, continued: the ``[[datum]]``, ``[[pattern]]`` and ``[[interface]]`` tables.

Read by :func:`geom.scenefile.parse` (through :func:`parse_frames`) and written back by
:func:`geom.scenefile.dumps` (through :func:`dump_frames`); every problem is a
:class:`geom.scenefile.SceneError` naming the file and the field, e.g.
``cover.toml: pattern[1].locations[2][0]: expected a number, got the string '30'``.

Datum A is always the plane z = 0 (primary) and takes no table; a ``[[datum]]`` adds B, C... in
precedence order, a plane or a feature of size of the scene (at RMB, MMB or LMB). A pattern is
several members of one scene feature (its size and its diameter position tolerance, whose
datums are the frame) at basic locations; an interface puts a pattern of holes (part 1) over a
pattern of pins, studs or threaded holes (part 2). The values are checked with the computations
they feed (:mod:`geom.datums`, :mod:`geom.patterns`): :func:`frame_of` and :func:`pattern_of`
build them from a scene.

>>> from geom.scenefile import loads, dumps
>>> s = loads('''units = "mm"
... [[feature]]
... id = "pilot"
... kind = "hole"
... limits = [40.0, 40.05]
... length = 8
... [[feature]]
... id = "bolt"
... kind = "hole"
... limits = [6.6, 6.8]
... length = 8
... [feature.tolerance]
... characteristic = "position"
... value = 0.2
... material = "MMC"
... datums = ["A", "B"]
... [[datum]]
... letter = "B"
... feature = "pilot"
... boundary = "MMB"
... [[pattern]]
... id = "bolts"
... feature = "bolt"
... bolt_circle = { count = 4, diameter = 60.0, start = 45.0 }
... ''')
>>> [tuple(round(c, 3) for c in xy) for xy in s.patterns[0].locations][:2]
[(21.213, 21.213), (-21.213, 21.213)]
>>> pattern_of(s, s.patterns[0]).frame.rotation, loads(dumps(s)) == s
('free', True)
"""

from __future__ import annotations

import difflib

from .frames import frame_of, pattern_of
from .model import Characteristic, DatumSpec, InterfaceSpec, Kind, PatternSpec, Scene, Zone
from .scenefile import MAX_ID, SceneError, _Ctx, _join, _show, _v

DATUM_KEYS = ("letter", "feature", "boundary")
PATTERN_KEYS = ("id", "feature", "locations", "bolt_circle", "requirement", "measured", "datum_sizes", "lower",
                "points", "datum_points")
LOWER_KEYS = ("value", "datums", "form")
LOWER_FORMS = ("composite", "two_segment")  # geom.composite.FORMS
BOLT_CIRCLE_KEYS = ("count", "diameter", "start")
INTERFACE_KEYS = ("holes", "pins", "fastener")
BOUNDARIES = ("RMB", "MMB", "LMB")  # geom.datums.BOUNDARIES (not imported: loading stays light)
REQUIREMENTS = ("simultaneous", "separate")  # geom.patterns.REQUIREMENTS
MAX_MEMBERS = 360  # members of one pattern (the bolt circle's count limit too)


# ---------------------------------------------------------------- building the computations


# ---------------------------------------------------------------- reading


def _ref(c: _Ctx, v, path: str, ids, what: str) -> str:
    ref = c.string(v, path, what="an id", max_len=MAX_ID)
    if ref not in ids:
        near = difflib.get_close_matches(ref, list(ids), n=1)
        hint = f" (did you mean {near[0]!r}?)" if near else ""
        c.fail(path, f"expected the id of {what}, got {ref!r}, which none has{hint}")
    return ref


def _datums(c: _Ctx, data: dict, by_id: dict) -> tuple[DatumSpec, ...]:
    out: list[DatumSpec] = []
    used: dict[str, str] = {}
    for i, v in enumerate(c.array_of_tables(data.get("datum", []), "datum")):
        path = f"datum[{i}]"
        c.table(v, path, DATUM_KEYS, required=("letter",))
        letter = c.string(v["letter"], _join(path, "letter"), what="a datum letter", max_len=8)
        if len(letter) != 1 or not "A" <= letter <= "Z":
            c.fail(_join(path, "letter"), f"expected one capital letter such as \"B\", got {letter!r}")
        if letter == "A":
            c.fail(_join(path, "letter"), "expected a letter other than \"A\": datum A is always the plane "
                                          "z = 0 (primary) and takes no [[datum]] table")
        if any(d.letter == letter for d in out):
            c.fail(_join(path, "letter"), f"expected each datum letter once, got {letter!r} again")
        feat = None
        if "feature" in v:
            feat = _ref(c, v["feature"], _join(path, "feature"), by_id, "a [[feature]] (a hole or a pin)")
            if feat in used:
                c.fail(_join(path, "feature"), f"expected each datum feature once; {feat!r} is already "
                                               f"datum {used[feat]}")
            used[feat] = letter
        boundary = c.string(v.get("boundary", "RMB"), _join(path, "boundary"), BOUNDARIES)
        if feat is None and boundary != "RMB":
            c.fail(_join(path, "boundary"), f"expected \"RMB\" for a datum plane (it has no size), got "
                                            f"{boundary!r}; {boundary} needs a datum feature of size (feature = ...)")
        out.append(DatumSpec(letter, feat, boundary))
    return tuple(out)


def _count(c: _Ctx, v, path: str) -> int:
    if isinstance(v, bool) or not isinstance(v, int):
        c.fail(path, f"expected a whole number of members, got {_show(v)}")
    if not 1 <= v <= MAX_MEMBERS:
        c.fail(path, f"expected a whole number of members from 1 to {MAX_MEMBERS}, got {v}")
    return v


def _locations(c: _Ctx, v: dict, path: str) -> tuple[tuple[float, float], ...]:
    if "locations" in v and "bolt_circle" in v:
        c.fail(_join(path, "bolt_circle"), "expected either locations or bolt_circle, not both")
    if "bolt_circle" in v:
        bp = _join(path, "bolt_circle")
        bc = c.table(v["bolt_circle"], bp, BOLT_CIRCLE_KEYS, required=("count", "diameter"))
        n = _count(c, bc["count"], _join(bp, "count"))
        d = c.number(bc["diameter"], _join(bp, "diameter"), positive=True)
        start = c.number(bc["start"], _join(bp, "start")) if "start" in bc else 0.0
        if abs(start) > 360.0:
            c.fail(_join(bp, "start"), f"expected a start angle from -360 to 360 degrees, got {start:g}")
        from .patterns import bolt_circle

        return bolt_circle(n, d, start)
    if "locations" not in v:
        c.fail(_join(path, "locations"), "missing; give the basic locations [[x, y], ...] or a bolt_circle")
    lp = _join(path, "locations")
    locs = v["locations"]
    if not isinstance(locs, list) or not locs:
        c.fail(lp, f"expected a list of basic locations [[x, y], ...], got {_show(locs)}")
    if len(locs) > MAX_MEMBERS:
        c.fail(lp, f"expected at most {MAX_MEMBERS} members, got {len(locs)}")
    out = tuple(c.pair(xy, f"{lp}[{k}]", "a basic location [x, y]") for k, xy in enumerate(locs))
    for k, xy in enumerate(out):
        if xy in out[:k]:
            c.fail(f"{lp}[{k}]", f"expected a location of its own, got {list(xy)!r} again (first at "
                                 f"{lp}[{out.index(xy)}])")
    return out


def _measured(c: _Ctx, v, path: str, count: int) -> tuple[tuple[float, float, float], ...]:
    if not isinstance(v, list) or len(v) != count:
        c.fail(path, f"expected one row [x, y, size] per member ({count}), got {_show(v)}")
    rows = []
    for k, row in enumerate(v):
        rp = f"{path}[{k}]"
        if not isinstance(row, list) or len(row) != 3:
            c.fail(rp, f"expected [x, y, produced size], got {_show(row)}")
        rows.append((c.number(row[0], f"{rp}[0]"), c.number(row[1], f"{rp}[1]"),
                     c.number(row[2], f"{rp}[2]", positive=True)))
    return tuple(rows)


def _pattern(c: _Ctx, v, i: int, scene: Scene, by_id: dict) -> PatternSpec:
    path = f"pattern[{i}]"
    c.table(v, path, PATTERN_KEYS, required=("id", "feature"))
    pid = c.string(v["id"], _join(path, "id"), what="an id", max_len=MAX_ID)
    if "=" in pid or pid != pid.strip():
        c.fail(_join(path, "id"), f"expected an id without '=' and without surrounding spaces, got {pid!r}")
    fp = _join(path, "feature")
    fid = _ref(c, v["feature"], fp, by_id, "a [[feature]]")
    tol = by_id[fid].tolerance
    if tol is None or tol.characteristic is not Characteristic.POSITION or tol.zone is not Zone.DIAMETER:
        has = "no tolerance" if tol is None else f"a {tol.zone.value} {tol.characteristic.value} tolerance"
        c.fail(fp, f"expected a feature with a diameter position tolerance (the members' zone), but {fid!r} "
                   f"has {has}")
    letters = [d.letter for d in scene.datums]
    extra = [d for d in tol.datums[1:] if d not in letters]
    if extra:
        c.fail(fp, f"expected a feature whose tolerance datums are A followed by the scene's [[datum]] letters "
                   f"({', '.join(letters) or 'none defined'}); {fid!r} references {', '.join(extra)}")
    order = [letters.index(d) for d in tol.datums[1:]]
    if order != sorted(order):
        c.fail(fp, f"expected {fid!r}'s tolerance datums in the scene's order of precedence "
                   f"(A, {', '.join(letters)}), got {'|'.join(tol.datums)}")
    locs = _locations(c, v, path)
    req = c.string(v["requirement"], _join(path, "requirement"), REQUIREMENTS) if "requirement" in v else None
    meas = _measured(c, v["measured"], _join(path, "measured"), len(locs)) if "measured" in v else ()
    spec = PatternSpec(pid, fid, locs, req, meas)
    try:
        pat = pattern_of(scene, spec)
    except ValueError as e:
        c.fail(fp, f"expected a pattern the datum frame can hold: {e}")
    sizes = []
    if "datum_sizes" in v:
        dp = _join(path, "datum_sizes")
        dv = v["datum_sizes"]
        if not isinstance(dv, dict):
            c.fail(dp, f"expected a table of datum letter = produced size, e.g. {{ B = 40.03 }}, got {_show(dv)}")
        for letter, size in dv.items():
            if not (len(letter) == 1 and "A" <= letter <= "Z"):
                c.fail(dp, f"expected datum letters as keys, e.g. {{ B = 40.03 }}, got the key {_show(letter)}")
            if letter not in pat.frame.letters or pat.frame.ref(letter).is_plane:
                sized = [r.letter for r in pat.frame.refs if not r.is_plane]
                c.fail(_join(dp, letter), f"expected a datum feature of size of the frame "
                                          f"{'|'.join(pat.frame.letters)} ({', '.join(sized) or 'none'})")
            sizes.append((letter, c.number(size, _join(dp, letter), positive=True)))
    if meas:
        given = {k for k, _ in sizes}
        need = [r.letter for r in pat.frame.refs if not r.is_plane and r.boundary != "RMB" and r.letter not in given]
        if need:
            c.fail(_join(path, "datum_sizes"), f"missing {', '.join(need)}: with measured members, a datum "
                                               f"feature at MMB or LMB needs its produced size")
    lower = _lower(c, v["lower"], _join(path, "lower"), pat) if "lower" in v else None
    pts, dpts = _point_files(c, v, path, pat, len(locs), sizes)
    if pts and lower is not None:
        c.fail(_join(path, "lower"), "expected no lower tier with points: a lower tier is judged on typed "
                                     "measured members only")
    return PatternSpec(pid, fid, locs, req, meas, tuple(sizes), lower, pts, dpts)


def _csv(c: _Ctx, v, path: str) -> str:
    f = c.string(v, path, what="a points CSV file name (relative to the scene file)", max_len=4096)
    if not f.strip():
        c.fail(path, "expected a points CSV file name, got an empty string")
    return f


def _point_files(c: _Ctx, v: dict, path: str, pat, count: int, sizes) -> tuple[tuple[str, ...], tuple]:
    """``points = ["h1.csv", ...]`` (one per member) and ``datum_points = { B = "pilot.csv" }``."""
    pts: tuple[str, ...] = ()
    if "points" in v:
        pp = _join(path, "points")
        if "measured" in v:
            c.fail(pp, "expected either measured (typed x, y, size) or points (CSV files), not both")
        pv = v["points"]
        if not isinstance(pv, list) or len(pv) != count:
            c.fail(pp, f"expected one points CSV file per member ({count}), in member order, got {_show(pv)}")
        pts = tuple(_csv(c, f, f"{pp}[{k}]") for k, f in enumerate(pv))
    dpts = []
    if "datum_points" in v:
        dp = _join(path, "datum_points")
        dv = v["datum_points"]
        if not isinstance(dv, dict):
            c.fail(dp, f"expected a table of datum letter = points CSV, e.g. {{ B = \"pilot.csv\" }}, got {_show(dv)}")
        if not pts:
            c.fail(dp, "expected datum_points only with points (one CSV per member)")
        given = {k for k, _ in sizes}
        for letter, f in dv.items():
            lp = _join(dp, letter)
            if letter not in pat.frame.letters or pat.frame.ref(letter).is_plane:
                sized = [r.letter for r in pat.frame.refs if not r.is_plane]
                c.fail(lp, f"expected a datum feature of size of the frame {'|'.join(pat.frame.letters)} "
                           f"({', '.join(sized) or 'none'})")
            if letter in given:
                c.fail(lp, f"expected either datum_sizes.{letter} or datum_points.{letter}, not both")
            dpts.append((letter, _csv(c, f, lp)))
    if pts:
        have = {k for k, _ in sizes} | {k for k, _ in dpts}
        need = [r.letter for r in pat.frame.refs if not r.is_plane and r.boundary != "RMB" and r.letter not in have]
        if need:
            c.fail(_join(path, "datum_points"), f"missing {', '.join(need)}: with points, a datum feature at MMB "
                                                f"or LMB needs its points (datum_points) or its size (datum_sizes)")
    return pts, tuple(dpts)


def _lower(c: _Ctx, v, path: str, pat) -> tuple[float, tuple[str, ...], str]:
    """``lower = { value = 0.05, datums = ["A"], form = "composite" }``: the second tier."""
    from .composite import _lower_located, lower_feature

    c.table(v, path, LOWER_KEYS, required=("value", "datums"))
    t2 = c.number(v["value"], _join(path, "value"), positive=True)
    dp = _join(path, "datums")
    ds = v["datums"]
    if not isinstance(ds, list) or not ds or not all(isinstance(d, str) for d in ds):
        c.fail(dp, f"expected a list of datum letters starting with A, e.g. [\"A\"], got {_show(ds)}")
    form = c.string(v["form"], _join(path, "form"), LOWER_FORMS) if "form" in v else "composite"
    try:
        feat = lower_feature(pat, t2, tuple(ds))
        if form == "two_segment":
            _lower_located(pat, feat)
    except ValueError as e:
        c.fail(_join(path, "value") if "below the upper" in str(e) else dp, str(e).split(": ", 1)[-1])
    return (t2, tuple(ds), form)


def _interface(c: _Ctx, v, i: int, scene: Scene, pats: dict) -> InterfaceSpec:
    path = f"interface[{i}]"
    c.table(v, path, INTERFACE_KEYS, required=("holes", "pins"))
    holes = _ref(c, v["holes"], _join(path, "holes"), pats, "a [[pattern]]")
    pins = _ref(c, v["pins"], _join(path, "pins"), pats, "a [[pattern]]")
    hf, pf = scene.feature(pats[holes].feature), scene.feature(pats[pins].feature)
    if hf.kind is not Kind.HOLE:
        c.fail(_join(path, "holes"), f"expected a pattern of holes (part 1's clearance holes), but {holes!r} "
                                     f"is of {hf.kind.value}s")
    if pins == holes:
        c.fail(_join(path, "pins"), f"expected the other part's pattern, got {pins!r} twice")
    F = c.number(v["fastener"], _join(path, "fastener"), positive=True) if "fastener" in v else None
    if pf.kind is Kind.PIN and F is not None:
        c.fail(_join(path, "fastener"), f"expected no fastener: the pins of {pins!r} are the fasteners "
                                        f"(F is their MMC)")
    if pf.kind is Kind.HOLE and F is None:
        c.fail(_join(path, "fastener"), f"missing; {pins!r} is a pattern of holes (threaded or clearance), "
                                        f"so the fastener's MMC size F is needed")
    if F is not None and F >= hf.mmc:
        c.fail(_join(path, "fastener"), f"expected a fastener smaller than the clearance holes' MMC "
                                        f"({hf.mmc:g}), got {F:g}")
    a, b = pats[holes].locations, pats[pins].locations
    if len(a) != len(b):
        c.fail(_join(path, "pins"), f"expected as many members as {holes!r} ({len(a)}), got {len(b)}")
    key = lambda xy: (round(xy[0], 9), round(xy[1], 9))  # noqa: E731 (geom.patterns.mate_patterns' key)
    if sorted(map(key, a)) != sorted(map(key, b)):
        c.fail(_join(path, "pins"), f"expected the same basic locations as {holes!r}")
    spec = InterfaceSpec(holes, pins, F)
    from .patterns import mate_patterns

    try:
        mate_patterns(pattern_of(scene, pats[holes]), pattern_of(scene, pats[pins]), F)
    except ValueError as e:
        c.fail(path, f"expected two patterns that can be mated: {e}")
    return spec


def parse_frames(c: _Ctx, data: dict, scene: Scene) -> Scene:
    """``scene`` (already holding the features) with its datums, patterns and interfaces."""
    by_id = {f.id: f for f in scene.features}
    scene = scene.with_(datums=_datums(c, data, by_id))
    pats: dict[str, PatternSpec] = {}
    for i, v in enumerate(c.array_of_tables(data.get("pattern", []), "pattern")):
        p = _pattern(c, v, i, scene, by_id)
        if p.id in pats:
            c.fail(f"pattern[{i}].id", f"expected a unique id among patterns, got {p.id!r} again")
        pats[p.id] = p
    scene = scene.with_(patterns=tuple(pats.values()))
    ifaces: list[InterfaceSpec] = []
    for i, v in enumerate(c.array_of_tables(data.get("interface", []), "interface")):
        s = _interface(c, v, i, scene, pats)
        if any((x.holes, x.pins) == (s.holes, s.pins) for x in ifaces):
            c.fail(f"interface[{i}]", f"expected each interface once; {s.holes!r} over {s.pins!r} is given twice")
        ifaces.append(s)
    return scene.with_(interfaces=tuple(ifaces))


# ---------------------------------------------------------------- writing


def _key(k: str) -> str:
    return k if k.isascii() and k.isalnum() else _v(k)


def dump_frames(scene: Scene) -> list[str]:
    """TOML lines of the scene's datums, patterns and interfaces (bolt circles as locations)."""
    out: list[str] = []
    for d in scene.datums:
        out += ["", "[[datum]]", f"letter = {_v(d.letter)}"]
        if d.feature is not None:
            out.append(f"feature = {_v(d.feature)}")
        out.append(f"boundary = {_v(d.boundary)}")
    for p in scene.patterns:
        out += ["", "[[pattern]]", f"id = {_v(p.id)}", f"feature = {_v(p.feature)}",
                f"locations = {_v([list(xy) for xy in p.locations])}"]
        if p.requirement is not None:
            out.append(f"requirement = {_v(p.requirement)}")
        if p.measured:
            out.append(f"measured = {_v([list(r) for r in p.measured])}")
        if p.datum_sizes:
            out.append("datum_sizes = { " + ", ".join(f"{_key(k)} = {_v(float(s))}" for k, s in p.datum_sizes) + " }")
        if p.points:
            out.append(f"points = {_v(list(p.points))}")
        if p.datum_points:
            out.append("datum_points = { " + ", ".join(f"{_key(k)} = {_v(f)}" for k, f in p.datum_points) + " }")
        if p.lower is not None:
            t2, ds, form = p.lower
            out.append(f"lower = {{ value = {_v(t2)}, datums = {_v(list(ds))}, form = {_v(form)} }}")
    for s in scene.interfaces:
        out += ["", "[[interface]]", f"holes = {_v(s.holes)}", f"pins = {_v(s.pins)}"]
        if s.fastener is not None:
            out.append(f"fastener = {_v(s.fastener)}")
    return out


__all__ = ["dump_frames", "frame_of", "parse_frames", "pattern_of", "SceneError"]
