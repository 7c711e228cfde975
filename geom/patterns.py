"""Patterns of holes or pins sharing one position requirement: basic locations, per-member zones,
the best fit within the datum shift (the right way), the per-hole bonus (the wrong way),
functional gauges and the worst-case mating of two patterns.

The frame is a :class:`geom.datums.DatumFrame`: the basic locations (x, y) are measured from
the secondary datum axis at (0, 0). With the secondary datum feature at MMB, the whole pattern
may move as one body relative to that axis, by at most the radial datum shift; without a
tertiary datum it may also turn about the axis. That movement is shared by all members: it is
not extra tolerance for each hole (ASME Y14.5-2009 4.11.6 / 2018 7.11.6 "datum feature shift",
from memory; ISO 2692 MMR applied to a datum feature).

>>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
>>> from geom.datums import DatumRef, frame
>>> pilot = Feature("pilot", Kind.HOLE, (40.0, 40.05), 8.0)
>>> fr = frame(DatumRef("A"), DatumRef("B", pilot, "MMB"))
>>> pos = Tolerance(Characteristic.POSITION, 0.2, material=Material.MMC, datums=("A", "B"))
>>> p = Pattern("bolts", Feature("h", Kind.HOLE, (6.6, 6.8), 8.0, tolerance=pos), bolt_circle(4, 60.0, 45.0), fr)
>>> [tuple(round(c, 3) for c in xy) for xy in p.locations][:2]
[(21.213, 21.213), (-21.213, 21.213)]
>>> g = gauge(p)
>>> round(g.pins[0].diameter.value, 6), round(g.simulators[1].diameter.value, 6)
(6.4, 40.0)
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from . import boundaries as B
from .analysis import Derived, analyse_fastener, fits, required_hole_fixed, tolerance_allowed_derived
from .datums import DatumDerived, DatumFrame, DatumShift, Simulator, pilot_clearance, shift_of, simulators
from .model import Characteristic, Fastener, Feature, Kind, Standard, Zone

REQUIREMENTS = ("simultaneous", "separate")


def bolt_circle(count: int, diameter: float, start_angle_deg: float = 0.0,
                centre: tuple[float, float] = (0.0, 0.0)) -> tuple[tuple[float, float], ...]:
    """Basic locations of ``count`` members equally spaced on a circle, the first at
    ``start_angle_deg`` from +x, counter-clockwise.

    >>> [(round(x, 6), round(y, 6)) for x, y in bolt_circle(3, 20.0, 90.0)]
    [(0.0, 10.0), (-8.660254, -5.0), (8.660254, -5.0)]
    """
    if isinstance(count, bool) or not isinstance(count, int) or count < 1:
        raise ValueError(f"bolt circle: count must be a whole number of at least 1, got {count!r}")
    d, a0 = float(diameter), float(start_angle_deg)
    if not (math.isfinite(d) and d > 0):
        raise ValueError(f"bolt circle: diameter must be a positive number, got {diameter!r}")
    if not math.isfinite(a0):
        raise ValueError(f"bolt circle: start angle must be a finite number, got {start_angle_deg!r}")
    r = d / 2.0
    out = []
    for k in range(count):
        a = math.radians(a0 + 360.0 * k / count)
        out.append((centre[0] + r * math.cos(a) + 0.0, centre[1] + r * math.sin(a) + 0.0))
    return tuple(out)


def default_requirement(standard: Standard) -> str:
    """ASME: patterns located by the same datums in the same order with the same modifiers are a
    simultaneous requirement by default (Y14.5-2009 4.19, from memory); ISO: independent zones
    unless a combined zone (CZ) is indicated (ISO 5458:2018, from memory)."""
    return "separate" if standard is Standard.ISO else "simultaneous"


@dataclass(frozen=True)
class Pattern:
    """Members of one feature (same size and position tolerance) at basic locations in a frame."""

    id: str
    feature: Feature
    locations: tuple[tuple[float, float], ...]
    frame: DatumFrame
    requirement: str = "simultaneous"

    def __post_init__(self):
        tol = self.feature.tolerance
        if tol is None or tol.characteristic is not Characteristic.POSITION or tol.zone is not Zone.DIAMETER:
            raise ValueError(f"pattern {self.id!r}: its feature needs a diameter position tolerance")
        if tuple(tol.datums) != self.frame.letters:
            raise ValueError(f"pattern {self.id!r}: the tolerance's datums {'|'.join(tol.datums) or '-'} "
                             f"differ from the frame {'|'.join(self.frame.letters)}")
        if self.frame.rotation == "none":
            raise ValueError(f"pattern {self.id!r}: the frame {'|'.join(self.frame.letters)} does not locate "
                             "the pattern in x and y; add a datum feature of size or a tertiary datum")
        sec, ter = self.frame.secondary, self.frame.tertiary
        if sec.is_plane and ter is not None and not ter.is_plane:
            raise ValueError(f"pattern {self.id!r}: a tertiary datum feature of size after a secondary plane "
                             "is not supported")
        if self.requirement not in REQUIREMENTS:
            raise ValueError(f"pattern {self.id!r}: requirement must be one of {', '.join(REQUIREMENTS)}")
        locs = tuple((float(x), float(y)) for x, y in self.locations)
        if not locs or not all(math.isfinite(c) for xy in locs for c in xy):
            raise ValueError(f"pattern {self.id!r}: needs at least one finite basic location")
        if len(set(locs)) != len(locs):
            raise ValueError(f"pattern {self.id!r}: two members share a basic location")
        object.__setattr__(self, "locations", locs)

    @property
    def count(self) -> int:
        return len(self.locations)


@dataclass(frozen=True)
class Member:
    """One member at its produced size: the zone (diameter ``allowed``) at its basic location."""

    index: int
    basic: tuple[float, float]
    size: float
    allowed: Derived  # t + bonus
    vc: float | None


def _sizes(p: Pattern, sizes: Sequence[float]) -> tuple[float, ...]:
    sizes = tuple(sizes)
    if len(sizes) != p.count:
        raise ValueError(f"pattern {p.id!r}: {p.count} members but {len(sizes)} sizes")
    try:
        return tuple(B.check_size(p.feature, float(s)) for s in sizes)
    except (TypeError, ValueError) as e:
        raise ValueError(f"pattern {p.id!r}: {e}") from None


def members(p: Pattern, sizes: Sequence[float]) -> tuple[Member, ...]:
    """Per member: tolerance allowed = t + bonus at its produced size, and the VC."""
    vc = B.virtual_condition(p.feature)
    return tuple(Member(i, b, s, tolerance_allowed_derived(p.feature, B.bonus(p.feature, s)), vc)
                 for i, (b, s) in enumerate(zip(p.locations, _sizes(p, sizes))))


# ---------------------------------------------------------------- the best fit


def _rot(theta: float, xy):
    c, s = math.cos(theta), math.sin(theta)
    xy = list(xy)
    return [(c * x - s * y, s * x + c * y) for x, y in xy]


def _excess(m, b, a, d, theta):
    return [2.0 * math.hypot(px + d[0] - bx, py + d[1] - by) - ai
            for (px, py), (bx, by), ai in zip(_rot(theta, m), b, a)]


def _tert_ok(tert, d, theta, slack=1e-12):
    if tert is None:
        return True
    (c3,), b3, s3 = _rot(theta, [tert[0]]), tert[1], tert[2]
    return math.hypot(c3[0] + d[0] - b3[0], c3[1] + d[1] - b3[1]) <= s3 + slack


def best_fit(m, b, a, radius: float, rotation: str, tert=None):
    """Minimise max_i 2|R(theta) m_i + d - b_i| - a_i over |d| <= radius and theta (free,
    fixed at 0, or limited by a tertiary feature: |R c3 + d - b3| <= s3, ``tert`` = (c3, b3, s3)).
    Returns (worst excess, d, theta). SLSQP on scaled variables (d = radius u, theta = scale v)
    and the smooth form (z + a_i)^2 >= 4|e_i|^2, from several starts; the best feasible point is
    kept (checked against a brute-force grid in tests/test_datums_patterns.py).

    >>> w, d, th = best_fit([(10.1, 0.0), (-9.9, 0.0)], [(10.0, 0.0), (-10.0, 0.0)], [0.1, 0.1], 0.2, "fixed")
    >>> round(w, 6), round(d[0], 6), th
    (-0.1, -0.1, 0.0)
    """
    from scipy.optimize import minimize

    n = len(m)
    rmax = max(math.hypot(*p) for p in m) or 1.0
    if rotation == "limited" and tert is not None:
        reach = math.hypot(*tert[0]) or 1.0
        tscale = min(math.pi, (tert[2] + radius) / reach) if tert[2] + radius > 1e-15 else 0.0
    elif rotation == "free":
        tscale = max(math.hypot(mx - bx, my - by) + ai for (mx, my), (bx, by), ai in zip(m, b, a)) / rmax
        tscale = min(math.pi, tscale) or 1e-6
    else:
        tscale = 0.0
    use_d, use_t = radius > 1e-15, tscale > 0.0
    zs = max(max(abs(ai) for ai in a), 2.0 * max(math.hypot(mx - bx, my - by) for (mx, my), (bx, by) in zip(m, b)),
             1e-12)

    def unpack(x):
        d, k = ((radius * x[0], radius * x[1]), 2) if use_d else ((0.0, 0.0), 0)
        return d, (tscale * x[k] if use_t else 0.0)

    def worst(d, th):
        return max(_excess(m, b, a, d, th))

    starts = [((0.0, 0.0), 0.0)]
    if use_t:  # the rotation that best aligns measured with basic locations (Procrustes)
        sxy = sum(mx * by - my * bx for (mx, my), (bx, by) in zip(m, b))
        sxx = sum(mx * bx + my * by for (mx, my), (bx, by) in zip(m, b))
        th = math.atan2(sxy, sxx) if (sxy or sxx) else 0.0
        starts += [((0.0, 0.0), max(-tscale, min(tscale, th)))]
    if use_d:
        cx = sum(bx - mx for (mx, _), (bx, _) in zip(m, b)) / n
        cy = sum(by - my for (_, my), (_, by) in zip(m, b)) / n
        k = min(1.0, radius / math.hypot(cx, cy)) if (cx or cy) else 0.0
        starts += [((cx * k, cy * k), th) for _, th in list(starts)]
    best = None
    for d0, th0 in starts:
        if _tert_ok(tert, d0, th0):
            w = worst(d0, th0)
            if best is None or w < best[0]:
                best = (w, d0, th0)
    if not (use_d or use_t):
        return best if best is not None else (worst((0.0, 0.0), 0.0), (0.0, 0.0), 0.0)

    def _e2(x, i):
        d, th = unpack(x)
        (px, py), = _rot(th, [m[i]])
        return ((px + d[0] - b[i][0]) ** 2 + (py + d[1] - b[i][1]) ** 2) / zs ** 2

    cons = [{"type": "ineq", "fun": lambda x, i=i: (x[-1] + a[i] / zs) ** 2 - 4.0 * _e2(x, i)} for i in range(n)]
    cons += [{"type": "ineq", "fun": lambda x, i=i: x[-1] + a[i] / zs} for i in range(n)]
    if use_d:
        cons.append({"type": "ineq", "fun": lambda x: 1.0 - x[0] ** 2 - x[1] ** 2})
    if tert is not None and use_t:
        def _t(x):
            d, th = unpack(x)
            (c3,), b3 = _rot(th, [tert[0]]), tert[1]
            return 1.0 - ((c3[0] + d[0] - b3[0]) ** 2 + (c3[1] + d[1] - b3[1]) ** 2) / max(tert[2], 1e-15) ** 2
        cons.append({"type": "ineq", "fun": _t})
    bounds = ([(-1.0, 1.0)] * 2 if use_d else []) + ([(-1.0, 1.0)] if use_t else []) + [(None, None)]
    for d0, th0 in starts:
        x0 = ([d0[0] / radius, d0[1] / radius] if use_d else []) + ([th0 / tscale] if use_t else [])
        x0.append(worst(d0, th0) / zs + 1e-6)
        res = minimize(lambda x: x[-1], x0, method="SLSQP", constraints=cons, bounds=bounds,
                       options={"ftol": 1e-15, "maxiter": 500})
        d, th = unpack(res.x)
        r = math.hypot(*d)
        if r > radius:  # pull back onto the disc (SLSQP may overstep by a rounding)
            d = (d[0] * radius / r, d[1] * radius / r)
        if _tert_ok(tert, d, th, slack=1e-9):
            w = worst(d, th)
            if best is None or w < best[0]:
                best = (w, (float(d[0]), float(d[1])), float(th))
    if best is None:
        raise ValueError("no placement satisfies the tertiary datum's shift")
    return best


# ---------------------------------------------------------------- judging a measured pattern


@dataclass(frozen=True)
class Reading:
    """One member after the fit: its diametral position in the shifted frame, allowed, margin."""

    index: int
    basic: tuple[float, float]
    measured: tuple[float, float]
    fitted: tuple[float, float]
    size: float
    position: float
    allowed: float
    margin: float  # allowed - position
    shift: tuple[float, float]  # the frame translation used for this member
    rotation_deg: float

    @property
    def conforms(self) -> bool:
        return self.margin >= -B.SLACK


@dataclass(frozen=True)
class PatternCheck:
    way: str  # "right" (best fit within the datum shift) | "wrong" (shift added to each hole)
    requirement: str
    readings: tuple[Reading, ...]
    governs: int  # index of the member with the least margin
    shift: tuple[float, float]
    rotation_deg: float
    datum: DatumShift | None  # the secondary datum's shift at its produced size
    added: float  # wrong way: diametral shift added to each member's tolerance; right way 0
    conforms: bool


def _datum_sizes(p: Pattern, given) -> dict:
    fr = p.frame
    if given is None or isinstance(given, Mapping):
        out = dict(given or {})
    else:
        out = {fr.secondary.letter: given}
    unknown = set(out) - set(fr.letters)
    if unknown:
        raise ValueError(f"pattern {p.id!r}: datum sizes given for {sorted(unknown)}, not in the frame")
    return out


def _freedom(p: Pattern, datum_produced_size):
    """(secondary shift, radius, rotation mode, tertiary constraint) of a pattern's frame."""
    fr, sizes = p.frame, _datum_sizes(p, datum_produced_size)
    sec, ter = fr.secondary, fr.tertiary
    s2 = shift_of(fr, sec.letter, sizes.get(sec.letter))
    radius = s2.radial.value if s2 is not None else 0.0
    tert = None
    if fr.rotation == "limited":
        s3 = shift_of(fr, ter.letter, sizes.get(ter.letter))
        c3 = ter.feature.at  # the tertiary feature's axis measured at its basic location
        tert = (c3, ter.feature.at, s3.radial.value)
    return s2, radius, fr.rotation, tert


def _judge(p, measured_xy, sizes, datum_produced_size, wrong: bool) -> PatternCheck:
    mem = members(p, sizes)
    meas = [tuple(map(float, xy)) for xy in measured_xy]
    if len(meas) != p.count or not all(len(xy) == 2 and all(map(math.isfinite, xy)) for xy in meas):
        raise ValueError(f"pattern {p.id!r}: {p.count} measured (x, y) locations expected")
    s2, radius, rotation, tert = _freedom(p, datum_produced_size)
    added = 2.0 * radius if wrong else 0.0
    if wrong:  # the shift granted to each hole as bonus; the frame itself is not moved
        tert = None if tert is None else (tert[0], tert[1], tert[2] + radius)
        radius = 0.0
    allowed = [mb.allowed.value + added for mb in mem]
    basic = [mb.basic for mb in mem]
    groups = [list(range(p.count))] if p.requirement == "simultaneous" else [[i] for i in range(p.count)]
    readings = [None] * p.count
    for g in groups:
        _, d, th = best_fit([meas[i] for i in g], [basic[i] for i in g], [allowed[i] for i in g],
                            radius, rotation, tert)
        for i, (fx, fy) in zip(g, _rot(th, [meas[i] for i in g])):
            fit = (fx + d[0], fy + d[1])
            pos = 2.0 * math.hypot(fit[0] - basic[i][0], fit[1] - basic[i][1])
            readings[i] = Reading(i, basic[i], meas[i], fit, mem[i].size, pos, allowed[i], allowed[i] - pos,
                                  d, math.degrees(th))
    gov = min(readings, key=lambda r: r.margin)
    return PatternCheck("wrong" if wrong else "right", p.requirement, tuple(readings), gov.index, gov.shift,
                        gov.rotation_deg, s2, added, all(r.conforms for r in readings))


def pattern_conforms(pattern: Pattern, measured_xy, sizes, datum_produced_size=None) -> PatternCheck:
    """The right way: the best fit of the pattern within the datum shift (a translation of at
    most the radial shift, a rotation where the frame leaves it free), judged against each
    member's own t + bonus.

    ``measured_xy``: member axes measured from the datum feature's actual axis; ``sizes``: their
    produced sizes; ``datum_produced_size``: the secondary datum feature's size, or a mapping
    letter -> size.

    >>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
    >>> from geom.datums import DatumRef, frame
    >>> pilot = Feature("pilot", Kind.HOLE, (40.0, 40.1), 8.0)
    >>> fr = frame(DatumRef("A"), DatumRef("B", pilot, "MMB"), DatumRef("C"))
    >>> pos = Tolerance(Characteristic.POSITION, 0.1, material=Material.MMC, datums=("A", "B", "C"))
    >>> p = Pattern("p", Feature("h", Kind.HOLE, (6.6, 6.8), 8.0, tolerance=pos), ((30.0, 0.0), (-30.0, 0.0)), fr)
    >>> xy = ((30.08, 0.0), (-29.92, 0.0))       # both 0.08 off in +x: 0.16 > 0.1 each
    >>> pattern_conforms(p, xy, (6.6, 6.6), 40.0).conforms     # datum at MMB: no shift
    False
    >>> c = pattern_conforms(p, xy, (6.6, 6.6), 40.1)          # 0.05 radial shift available
    >>> c.conforms, round(c.shift[0], 3), [round(r.position, 3) for r in c.readings]
    (True, -0.05, [0.06, 0.06])
    """
    return _judge(pattern, measured_xy, sizes, datum_produced_size, wrong=False)


def wrong_way(pattern: Pattern, measured_xy, sizes, datum_produced_size=None) -> PatternCheck:
    """The wrong way, for teaching: the diametral datum shift added to each member's own
    tolerance as if it were bonus, the frame not moved (rotation as the frame allows)."""
    return _judge(pattern, measured_xy, sizes, datum_produced_size, wrong=True)


# ---------------------------------------------------------------- gauge


@dataclass(frozen=True)
class GaugeElement:
    index: int
    basic: tuple[float, float]
    kind: str  # "pin" (gauging a hole pattern) | "hole" (gauging a pin pattern)
    diameter: Derived  # the member's VC (MMC -/+ t@MMC)


@dataclass(frozen=True)
class Gauge:
    pattern: str
    pins: tuple[GaugeElement, ...]
    simulators: tuple[Simulator, ...]


def gauge(pattern: Pattern, frame: DatumFrame | None = None) -> Gauge:
    """A functional gauge: each member's VC at its basic location (hole: MMC - t, a gauge pin;
    pin: MMC + t, a gauge hole), each datum feature's simulator at its MMB."""
    from .analysis import analyse_feature
    fr = frame or pattern.frame
    f = pattern.feature
    vc = analyse_feature(f).virtual_condition
    if vc.value is None:  # RFS: a gauge checks the MMC-side boundary
        s = "-" if f.kind is Kind.HOLE else "+"
        vc = Derived("inner" if f.kind is Kind.HOLE else "outer", B.perfect_form_boundary(f),
                     "{mmc} " + s + " {t_mmc}", "{} " + s + " {}", (f.mmc, B.tolerance_at_mmc(f)),
                     note="RFS: no VC; the MMC-side boundary")
    kind = "pin" if f.kind is Kind.HOLE else "hole"
    pins = tuple(GaugeElement(i, b, kind, vc) for i, b in enumerate(pattern.locations))
    return Gauge(pattern.id, pins, simulators(fr))


# ---------------------------------------------------------------- two patterns mated


@dataclass(frozen=True)
class PairClearance:
    index: int
    basic: tuple[float, float]
    hole_boundary: float
    pin_boundary: float
    clearance_min: DatumDerived


@dataclass(frozen=True)
class FastenerCase:
    kind: str  # "fixed" | "floating"
    fastener: float  # F
    holes: tuple[float, ...]  # H of the clearance hole(s)
    tolerances: tuple[float, float]  # T1 (part 1), T2 (part 2)
    limits: tuple[Derived, ...]  # floating: T = H - F per part; fixed: the required H
    assembles: bool


@dataclass(frozen=True)
class PatternMate:
    pairs: tuple[PairClearance, ...]
    pilot: DatumDerived | None
    tightest: int
    assembles: bool
    fastener: FastenerCase | None
    assumptions: tuple[str, ...]


def _boundary(f: Feature) -> float:
    """The MMC-side worst-case boundary: VC (MMC -/+ t@MMC)."""
    return B.perfect_form_boundary(f)


def mate_patterns(part1: Pattern, part2: Pattern, fastener: float | None = None) -> PatternMate:
    """Worst-case mating: part 1's holes (and its pilot) onto part 2's pins, studs or threaded
    holes (and its pilot), basic locations matched.

    Per pair clearance_min = hole VC - pin VC at the same basic location; pilot clearance = bore
    MMB - boss MMB. Both parts at their gauge boundaries with the gauges aligned: every part that
    fits its gauge then assembles when all are >= 0 (ASME Y14.5 functional gauging, from memory).
    Part 2 holes: threaded (projected zone), a fixed fastener of MMC ``fastener``; plain, floating.
    """
    h, q = part1.feature, part2.feature
    if h.kind is not Kind.HOLE:
        raise ValueError(f"pattern {part1.id!r}: part 1 must carry the clearance holes")
    key = lambda b: (round(b[0], 9), round(b[1], 9))
    if sorted(map(key, part1.locations)) != sorted(map(key, part2.locations)):
        raise ValueError(f"patterns {part1.id!r} and {part2.id!r}: their basic locations differ")
    notes = ["both parts seat on datum A; their datum frames coincide in assembly (gauge principle)"]
    t1, t2 = B.tolerance_at_mmc(h), B.tolerance_at_mmc(q)
    hb = _boundary(h)
    sym = "hole VC - pin VC"
    case = None
    if q.kind is Kind.PIN:
        pb = _boundary(q)
        F = q.mmc
        hreq = required_hole_fixed(F, t1, t2, 0.0, q.length)
        lim = DatumDerived("h_req", hreq, "F + T1 + T2", "{} + {} + {}", (F, t1, t2))
        case = FastenerCase("fixed", F, (h.mmc,), (t1, t2), (lim,), fits(h.mmc - hreq))
    elif fastener is None:
        raise ValueError(f"pattern {part2.id!r} is holes: give the fastener's MMC size F")
    elif q.tolerance.projected:
        F = float(fastener)
        pb = F + t2  # the fastener's axis within the projected zone over part 1's thickness
        if q.tolerance.projected + B.SLACK < h.length:
            notes.append(f"the projected height {q.tolerance.projected:g} is less than part 1's thickness "
                         f"{h.length:g}: the result holds over the projected height only")
        hreq = required_hole_fixed(F, t1, t2, 0.0, q.length)
        lim = DatumDerived("h_req", hreq, "F + T1 + T2 (projected zone)", "{} + {} + {}", (F, t1, t2))
        sym = "hole VC - (F + T2)"
        case = FastenerCase("fixed", F, (h.mmc,), (t1, t2), (lim,), fits(h.mmc - hreq))
        notes.append("threaded holes: the fastener (MMC F) is taken as centred on the thread axis")
    else:
        F = float(fastener)
        lims = tuple(analyse_fastener(Fastener(f"{p.id}", "floating", F, p.feature.mmc)).position_tolerance
                     for p in (part1, part2))
        ok = all(fits(lim.value - B.tolerance_at_mmc(p.feature)) for lim, p in zip(lims, (part1, part2)))
        case = FastenerCase("floating", F, (h.mmc, q.mmc), (t1, t2), lims, ok)
        pb = F
        sym = "smaller hole VC - F"
        hb = min(hb, _boundary(q))  # the fastener passes both clearance holes
        notes.append("floating fastener: each part's holes must clear the fastener (MMC F) alone")
    pairs = [PairClearance(i, b, hb, pb, DatumDerived("clearance", hb - pb, sym, "{} - {}", (hb, pb)))
             for i, b in enumerate(part1.locations)]
    pilot = pilot_clearance(part1.frame, part2.frame)
    if pilot is not None and "RMB" in (part1.frame.secondary.boundary, part2.frame.secondary.boundary):
        notes.append("a pilot at RMB: the pattern is held to the pilot's actual axis; the pilot "
                     "clearance shown is at the MMB sizes")
    tight = min(pairs, key=lambda pc: pc.clearance_min.value)
    ok = all(fits(pc.clearance_min.value) for pc in pairs) and (pilot is None or fits(pilot.value))
    return PatternMate(tuple(pairs), pilot, tight.index, ok, case, tuple(notes))


__all__ = ["FastenerCase", "Gauge", "GaugeElement", "Member", "PairClearance", "Pattern", "PatternCheck",
    "PatternMate", "Reading", "best_fit", "bolt_circle", "default_requirement", "gauge", "mate_patterns",
    "members", "pattern_conforms", "wrong_way"]
