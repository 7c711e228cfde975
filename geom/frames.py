"""A scene's datum frame, patterns and interfaces analysed: each datum feature's MMB and the
shift it allows, each pattern's members, functional gauge and (where the scene gives measured
members) the best fit within the datum shift beside the shift wrongly added to each hole, and
each interface's per-pair worst-case clearance. Numbers from :mod:`geom.datums` and
:mod:`geom.patterns`; this module builds their values from the scene's specs and words the
results (text and JSON).

>>> from geom.model import Scene, Units, Feature, Kind, Tolerance, Characteristic, Material
>>> from geom.model import DatumSpec, PatternSpec
>>> pos = Tolerance(Characteristic.POSITION, 0.1, material=Material.MMC, datums=("A", "B"))
>>> sc = Scene("cover", Units.MM, features=(Feature("pilot", Kind.HOLE, (40.0, 40.05), 8.0),
...            Feature("h", Kind.HOLE, (6.6, 6.8), 8.0, tolerance=pos)),
...            datums=(DatumSpec("B", "pilot", "MMB"),),
...            patterns=(PatternSpec("bolts", "h", ((30.0, 0.0), (-30.0, 0.0))),))
>>> fr = analyse_frames(sc)
>>> fr.datums[0].mmb.formula(Units.MM), fr.datums[0].shift_max.diametral.formula(Units.MM)
('MMB = MMC (no geometric tolerance to higher datums) = 40.000', 'datum shift = size - MMB = 40.050 - 40.000 = 0.050')
>>> [round(p.diameter.value, 3) for p in fr.patterns[0].gauge.pins]
[6.5, 6.5]
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import lru_cache

from .datums import DatumFrame, DatumRef, DatumShift, datum_shift, frame, lmb, mmb
from .model import Kind, PatternSpec, Scene

# ---------------------------------------------------------------- scene specs into values


def frame_of(scene: Scene, letters) -> DatumFrame:
    """The datum frame of ``letters`` ("A" first) from the scene's datums (A: the plane z = 0).
    Raises ValueError naming what is wrong."""
    letters = tuple(letters)
    if not letters or letters[0] != "A":
        raise ValueError(f"a frame starts at datum A, not {'|'.join(letters) or 'nothing'}")
    specs = {d.letter: d for d in scene.datums}
    refs = [DatumRef("A")]
    for ltr in letters[1:]:
        if ltr not in specs:
            raise ValueError(f"datum {ltr} is referenced but the scene defines no [[datum]] {ltr}")
        d = specs[ltr]
        feat = None
        if d.feature is not None:
            try:
                feat = scene.feature(d.feature)
            except KeyError:
                raise ValueError(f"datum {ltr}: no feature {d.feature!r} in the scene") from None
        refs.append(DatumRef(ltr, feat, d.boundary))
    return frame(*refs)


def pattern_of(scene: Scene, spec: PatternSpec):
    """The :class:`geom.patterns.Pattern` of a scene's pattern spec (its frame from the member
    feature's datums). Raises ValueError naming what is wrong."""
    from .patterns import Pattern, default_requirement

    try:
        feat = scene.feature(spec.feature)
    except KeyError:
        raise ValueError(f"pattern {spec.id!r}: no feature {spec.feature!r} in the scene") from None
    if feat.tolerance is None:
        raise ValueError(f"pattern {spec.id!r}: feature {feat.id!r} has no position tolerance")
    fr = frame_of(scene, feat.tolerance.datums)
    return Pattern(spec.id, feat, spec.locations, fr, spec.requirement or default_requirement(scene.standard))


# ---------------------------------------------------------------- results


@dataclass(frozen=True)
class DatumResult:
    """A datum feature of size: its MMB (and LMB) relative to the higher datums, and the shift
    it allows at its least material size (the most a produced part can have)."""

    letter: str
    feature: str
    boundary: str
    mmb: object  # DatumDerived
    lmb: object
    shift_max: DatumShift | None  # at the feature's LMC (MMB) or MMC (LMB); None at RMB


@dataclass(frozen=True)
class PatternResult:
    spec: PatternSpec
    pattern: object  # geom.patterns.Pattern
    members: tuple  # geom.patterns.Member at MMC
    gauge: object  # geom.patterns.Gauge
    right: object | None = None  # PatternCheck of the measured members (best fit within the shift)
    wrong: object | None = None  # the same with the shift added to each member (for teaching)
    composite: object | None = None  # geom.composite.CompositeCheck where the pattern has a lower tier
    points: object | None = None  # geom.patternpoints.PointsFit where the members come from CMM points
    points_error: str | None = None  # why the points could not be used (names the file)

    @property
    def conforms(self) -> bool | None:
        """The measured pattern's verdict: every tier (None where nothing was measured)."""
        if self.right is None:
            return None
        return self.right.conforms and (self.composite is None or self.composite.lower.conforms)


@dataclass(frozen=True)
class InterfaceResult:
    holes: str
    pins: str
    mate: object  # geom.patterns.PatternMate


@dataclass(frozen=True)
class FramesResult:
    datums: tuple[DatumResult, ...] = ()
    patterns: tuple[PatternResult, ...] = ()
    interfaces: tuple[InterfaceResult, ...] = ()


def _datum(scene: Scene, spec) -> DatumResult | None:
    if spec.feature is None:
        return None
    f = scene.feature(spec.feature)
    letters = [d.letter for d in scene.datums]
    higher = ("A", *letters[:letters.index(spec.letter)])
    worst = None
    if spec.boundary in ("MMB", "LMB"):  # the most shift a produced part can have: at the far limit
        far = f.lmc if spec.boundary == "MMB" else f.mmc
        worst = datum_shift(f, far, spec.boundary, higher=higher)
    return DatumResult(spec.letter, f.id, spec.boundary, mmb(f, higher=higher), lmb(f, higher=higher), worst)


def analyse_frames(scene: Scene) -> FramesResult:
    """Datums, patterns (members at MMC, gauge, measured fit) and interfaces of ``scene``;
    empty when it has none."""
    if not (scene.datums or scene.patterns or scene.interfaces):
        return FramesResult()
    from .patterns import gauge, mate_patterns, members

    datums = tuple(r for r in (_datum(scene, d) for d in scene.datums) if r is not None)
    pats = []
    by_id = {}
    for spec in scene.patterns:
        p = pattern_of(scene, spec)
        by_id[spec.id] = p
        mem = members(p, [p.feature.mmc] * p.count)
        right = wrong = comp = pts = err = None
        if spec.measured:
            right, wrong, comp = _judged(p, spec, tuple(sorted(spec.datum_sizes)))
        elif spec.points:
            from .patternpoints import judged_from_points

            try:
                right, wrong, pts = judged_from_points(scene, spec, p, _shifts(p))
            except ValueError as e:  # PatternPointsError and sizes beyond the limits: a message
                err = f"pattern {spec.id!r}: {e}"
        pats.append(PatternResult(spec, p, mem, gauge(p), right, wrong, comp, pts, err))
    inter = tuple(InterfaceResult(i.holes, i.pins, mate_patterns(by_id[i.holes], by_id[i.pins], i.fastener))
                  for i in scene.interfaces)
    return FramesResult(datums, tuple(pats), inter)


@lru_cache(maxsize=64)
def _judged(pattern, spec: PatternSpec, sizes: tuple[tuple[str, float], ...]):
    """(right way, wrong way, both tiers or None) of a measured pattern at datum ``sizes``."""
    from .patterns import pattern_conforms, wrong_way

    xy = [(x, y) for x, y, _s in spec.measured]
    member_sizes = [s for _x, _y, s in spec.measured]
    dsz = dict(sizes) or None
    comp = None
    if spec.lower is not None:
        from .composite import composite_conforms

        t2, datums, form = spec.lower
        comp = composite_conforms(pattern, t2, datums, xy, member_sizes, dsz, form=form)
    wrong = wrong_way(pattern, xy, member_sizes, dsz)
    # the wrong way only where there is a datum shift to misuse (a datum feature at MMB or LMB)
    return pattern_conforms(pattern, xy, member_sizes, dsz), (wrong if _shifts(pattern) else None), comp


def _shifts(pattern) -> bool:
    """Does the pattern's frame hold a datum feature of size at MMB or LMB (a datum shift)?"""
    return any(not r.is_plane and r.boundary in ("MMB", "LMB") for r in pattern.frame.refs)


def pattern_at(pr: PatternResult, datum_sizes: dict[str, float] | None) -> PatternResult:
    """The measured pattern ``pr`` judged again with its datum features' produced sizes
    ``datum_sizes`` (letter -> size) in place of the scene's (a what-if of the datum feature's
    size: the shift it allows changes, the members' own zones do not); ``pr`` itself when the
    pattern was not measured or nothing differs. Remembered: a slider going back is free."""
    if pr.right is None or not datum_sizes or pr.points is not None:
        return pr
    sizes = dict(pr.spec.datum_sizes)
    sizes.update({k: float(v) for k, v in datum_sizes.items()})
    if sizes == dict(pr.spec.datum_sizes):
        return pr
    right, wrong, comp = _judged(pr.pattern, pr.spec, tuple(sorted(sizes.items())))
    return replace(pr, right=right, wrong=wrong, composite=comp)


# ---------------------------------------------------------------- words


def _member_lines(chk, u) -> list[str]:
    """A check's readings, one line per member, the governing one marked."""
    return [f"    member {r.index + 1}: position {u.fmt(r.position)} / allowed {u.fmt(r.allowed)}, "
            f"margin {u.fmt(r.margin, signed=True)}" + ("  <- governs" if r.index == chk.governs else "")
            for r in chk.readings]


def frames_text(fr: FramesResult, scene: Scene) -> list[str]:
    """The lines ``matezone analyze`` prints for the datums, patterns and interfaces."""
    u, st = scene.units, scene.standard
    out: list[str] = []
    for d in fr.datums:
        out.append(f"datum {d.letter}: feature '{d.feature}' referenced at {d.boundary}")
        out.append(f"  {d.mmb.formula(u, st)}")
        if d.shift_max is not None:
            out.append(f"  most shift (at the far limit of size): {d.shift_max.diametral.formula(u, st)}, "
                       f"radial {u.fmt(d.shift_max.radial.value)}")
            out.append("  the shift moves the pattern's zones together, as one body; it adds nothing to each hole")
        out.append("")
    for pr in fr.patterns:
        p = pr.pattern
        kind = "holes" if p.feature.kind is Kind.HOLE else "pins"
        out.append(f"pattern '{p.id}': {p.count} {kind} '{p.feature.id}' to {'|'.join(p.frame.letters)}, "
                   f"{p.requirement} requirement")
        m0 = pr.members[0]
        out.append(f"  each at MMC: {m0.allowed.formula(u, st)}")
        out.append("  gauge: " + ", ".join(f"{g.kind} {u.fmt(g.diameter.value)} at ({u.fmt(g.basic[0])}, "
                                           f"{u.fmt(g.basic[1])})" for g in pr.gauge.pins))
        for s in pr.gauge.simulators:
            if s.diameter is not None:
                out.append(f"  datum {s.letter} simulator: {s.kind} {s.diameter.formula(u, st)}")
        if pr.points_error is not None:
            out.append(f"  measured points not used: {pr.points_error}")
        if pr.points is not None:
            out += _points_lines(pr, u)
        for chk in (pr.right, pr.wrong):
            if chk is None:
                continue
            head = ("measured, best fit within the datum shift" if chk.way == "right"
                    else "the wrong way, shift added to each hole as if bonus (not a verdict)")
            word = ("CONFORMS" if chk.conforms else "DOES NOT CONFORM") if chk.way == "right" else \
                ("would pass" if chk.conforms else "would fail")
            out.append(f"  {head}: {word}"
                       f" (shift used ({u.fmt(chk.shift[0])}, {u.fmt(chk.shift[1])}), rotation {chk.rotation_deg:.4f} deg)")
            out += _member_lines(chk, u)
        if pr.composite is not None:
            c = pr.composite
            t2, datums, form = pr.spec.lower
            kind = "composite, feature-relating tier" if form == "composite" else "lower single segment"
            out.append(f"  {kind}: ⌀{u.fmt(t2)} to {'|'.join(datums)} "
                       f"({'orienting only, free to translate' if form == 'composite' else 'located by its datums'}): "
                       f"{'CONFORMS' if c.lower.conforms else 'DOES NOT CONFORM'}")
            out += _member_lines(c.lower, u)
            out.append(f"  both tiers: {'CONFORMS' if pr.conforms else 'DOES NOT CONFORM'} ({c.governs} tier governs)")
        out.append("")
    for it in fr.interfaces:
        m = it.mate
        out.append(f"interface '{it.holes}' over '{it.pins}': "
                   f"{'ASSEMBLES' if m.assembles else 'DOES NOT ASSEMBLE'} in the worst case")
        for pc in m.pairs:
            mark = "  <- tightest" if pc.index == m.tightest else ""
            out.append(f"  pair {pc.index + 1} at ({u.fmt(pc.basic[0])}, {u.fmt(pc.basic[1])}): "
                       f"{pc.clearance_min.formula(u, st)}{mark}")
        if m.pilot is not None:
            out.append(f"  pilots: {m.pilot.formula(u, st)}")
        out += [f"  assumes {a}" for a in m.assumptions]
        out.append("")
    return out


def _points_lines(pr, u) -> list[str]:
    pf = pr.points
    out = ["  from CMM points (each member's unrelated actual mating envelope; its axis judged at both ends):"]
    for lt, f in pf.datums:
        out.append(f"    datum {lt}: {f.file}: related actual mating envelope {u.fmt(f.diameter)}, axis at A "
                   f"({u.fmt(f.bottom[0])}, {u.fmt(f.bottom[1])})")
    for m in pf.members:
        f = m.fit
        mark = "  <- governs" if m.index == pr.right.governs else ""
        out.append(f"    member {m.index + 1}: {f.file}: size {u.fmt(f.diameter)}, axis bottom "
                   f"({u.fmt(f.bottom[0])}, {u.fmt(f.bottom[1])}), top ({u.fmt(f.top[0])}, {u.fmt(f.top[1])}), "
                   f"reading {u.fmt(m.reading)} at the {m.governing_end}{mark}")
    out += [f"    assumes {a}" for a in pf.assumptions]
    return out


def _r(v):
    return None if v is None else round(float(v), 9) + 0.0


def frames_to_json(fr: FramesResult, scene: Scene) -> dict:
    """The ``datums``, ``patterns`` and ``interfaces`` keys of ``analyze --json``; per interface
    the pairs carry ``clearance_min`` as the single mates do."""
    u, st = scene.units, scene.standard
    out: dict = {"datums": {}, "patterns": {}, "interfaces": []}
    for d in fr.datums:
        out["datums"][d.letter] = {
            "feature": d.feature, "boundary": d.boundary, "mmb": _r(d.mmb.value), "lmb": _r(d.lmb.value),
            "shift_diametral": None if d.shift_max is None else _r(d.shift_max.diametral.value),
            "shift_radial": None if d.shift_max is None else _r(d.shift_max.radial.value),
            "formula": d.mmb.formula(u, st),
        }
    for pr in fr.patterns:
        p = pr.pattern
        entry = {
            "feature": p.feature.id, "frame": list(p.frame.letters), "requirement": p.requirement,
            "locations": [list(xy) for xy in p.locations],
            "tolerance_at_mmc": _r(pr.members[0].allowed.value),
            "gauge": {"pins": [{"basic": list(g.basic), "diameter": _r(g.diameter.value), "kind": g.kind}
                               for g in pr.gauge.pins],
                      "simulators": [{"datum": s.letter, "kind": s.kind,
                                      "diameter": None if s.diameter is None else _r(s.diameter.value)}
                                     for s in pr.gauge.simulators]},
        }
        for name, chk in (("measured", pr.right), ("shift_as_bonus", pr.wrong)):
            if chk is not None:
                entry[name] = {
                    "conforms": chk.conforms, "governs": chk.governs, "shift": [_r(v) for v in chk.shift],
                    "rotation_deg": _r(chk.rotation_deg),
                    "members": [{"position": _r(r.position), "allowed": _r(r.allowed), "margin": _r(r.margin)}
                                for r in chk.readings],
                }
        if pr.points_error is not None:
            entry["points_error"] = pr.points_error
        if pr.points is not None:
            pf = pr.points
            entry["from_points"] = {
                "origin": [_r(v) for v in pf.origin], "assumptions": list(pf.assumptions),
                "datums": {lt: {"file": f.file, "size": _r(f.diameter), "axis": [_r(v) for v in f.bottom]}
                           for lt, f in pf.datums},
                "members": [{"file": m.fit.file, "size": _r(m.fit.diameter),
                             "axis_bottom": [_r(v) for v in m.fit.bottom], "axis_top": [_r(v) for v in m.fit.top],
                             "reading": _r(m.reading), "governing_end": m.governing_end} for m in pf.members]}
        if pr.composite is not None:
            t2, datums, form = pr.spec.lower
            lo = pr.composite.lower
            entry["lower"] = {"value": t2, "datums": list(datums), "form": form, "conforms": lo.conforms,
                              "members": [{"position": _r(r.position), "allowed": _r(r.allowed),
                                           "margin": _r(r.margin)} for r in lo.readings]}
            entry["conforms"] = pr.conforms
        out["patterns"][p.id] = entry
    for it in fr.interfaces:
        m = it.mate
        out["interfaces"].append({
            "holes": it.holes, "pins": it.pins, "assembles": m.assembles, "tightest": m.tightest,
            "pilot_clearance": None if m.pilot is None else _r(m.pilot.value),
            "pairs": [{"basic": list(pc.basic), "clearance_min": _r(pc.clearance_min.value),
                       "formula": pc.clearance_min.formula(u, st)} for pc in m.pairs],
            "assumptions": list(m.assumptions),
        })
    return out
