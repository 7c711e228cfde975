"""Composite position of a pattern, and its two-single-segment form.

A composite frame has two tiers:

- the pattern-locating tier (upper): ⌀t1 to the full frame (e.g. A|B|C), exactly as a single
  position requirement (:func:`geom.patterns.pattern_conforms`, datum shift included);
- the feature-relating tier (lower): ⌀t2 < t1, its zones at the basic locations relative to each
  other. The datums repeated in the lower tier refine orientation only: the zone framework may
  translate freely, and turn unless a repeated datum plane after A fixes its rotation
  (ASME Y14.5-2009 7.5.1 / 2018 10.5.1, from memory).

Two single segments (two frames, each with its own position symbol) differ: the lower segment's
datums locate as well as orient, so its zones move only within what those datums allow (the
datum shift of a repeated datum feature at MMB; none at RMB).

Each tier gives each member its own bonus (t + bonus at the produced size); the member conforms
only if it meets both tiers.

>>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
>>> from geom.datums import DatumRef, frame
>>> from geom.patterns import Pattern
>>> fr = frame(DatumRef("A"), DatumRef("B"), DatumRef("C"))
>>> pos = Tolerance(Characteristic.POSITION, 0.5, material=Material.MMC, datums=("A", "B", "C"))
>>> p = Pattern("p", Feature("h", Kind.HOLE, (6.6, 6.8), 8.0, tolerance=pos), ((20.0, 0.0), (-20.0, 0.0)), fr)
>>> xy = ((20.2, 0.01), (-19.8, -0.01))     # the whole pattern 0.2 off in x: 0.4 each to A|B|C
>>> c = composite_conforms(p, 0.1, ("A",), xy, (6.6, 6.6))
>>> c.upper.conforms, c.lower.conforms, [round(r.position, 3) for r in c.lower.readings]
(True, True, [0.0, 0.0])
>>> composite_conforms(p, 0.1, ("A", "B", "C"), xy, (6.6, 6.6), form="two_segment").lower.conforms
False
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from .patterns import Pattern, PatternCheck, Reading, _rot, best_fit, members, pattern_conforms

FORMS = ("composite", "two_segment")


@dataclass(frozen=True)
class CompositeCheck:
    """Both tiers of a measured pattern: ``upper`` (pattern-locating, to the full frame) and
    ``lower`` (feature-relating, ⌀t2 to the repeated datums); ``conforms`` only if both do."""

    form: str
    lower_value: float
    lower_datums: tuple[str, ...]
    upper: PatternCheck
    lower: PatternCheck

    @property
    def conforms(self) -> bool:
        return self.upper.conforms and self.lower.conforms

    @property
    def governs(self) -> str:
        """The tier with the least margin ("upper" or "lower")."""
        up = min(r.margin for r in self.upper.readings)
        low = min(r.margin for r in self.lower.readings)
        return "lower" if low < up else "upper"


def _lower_rotation(p: Pattern, datums: tuple[str, ...]) -> str:
    """Whether the lower tier's zones may turn: a repeated datum plane after A fixes rotation, a
    repeated datum axis (a feature of size) does not (an axis has no direction in the plane)."""
    for letter in datums[1:]:
        ref = p.frame.ref(letter)
        if ref.is_plane:
            return "fixed"
    return "free"


def lower_feature(p: Pattern, t2: float, datums: tuple[str, ...]):
    """The member feature as the lower tier sees it: ⌀t2 (same material modifier) to the
    repeated datums, which must be the upper tier's in their order, starting at A."""
    tol = p.feature.tolerance
    if not (0 < t2 < tol.value):
        raise ValueError(f"pattern {p.id!r}: the lower tier's tolerance must be above 0 and below the "
                         f"upper tier's {tol.value:g}, got {t2!r}")
    datums = tuple(datums)
    if not datums or datums[0] != "A" or list(datums) != [d for d in tol.datums if d in datums]:
        raise ValueError(f"pattern {p.id!r}: the lower tier repeats datums of {'|'.join(tol.datums)} in their "
                         f"order, starting at A; got {'|'.join(datums) or 'none'}")
    return p.feature.with_(tolerance=replace(tol, value=float(t2), datums=datums))


def _lower_located(p: Pattern, feat) -> Pattern | None:
    """Two single segments: the lower segment as a pattern located by its own datums, or None
    where they only orient (A alone)."""
    from .datums import frame

    letters = feat.tolerance.datums
    if len(letters) < 2:
        return None
    try:
        return Pattern(p.id, feat, p.locations, frame(*[p.frame.ref(d) for d in letters]), p.requirement)
    except ValueError:
        raise ValueError(f"pattern {p.id!r}: a lower segment to {'|'.join(letters)} orients the pattern and "
                         "locates it in one direction only; that case is not computed yet (a full frame, or "
                         "A alone, or A with a datum feature of size, is)") from None


def composite_conforms(p: Pattern, t2: float, lower_datums, measured_xy, sizes, datum_produced_size=None,
                       form: str = "composite") -> CompositeCheck:
    """Judge a measured pattern against a composite (``form`` "composite") or two-single-segment
    ("two_segment") position: the upper tier is ``p``'s own requirement, the lower ⌀``t2`` to
    ``lower_datums``. Each member earns its bonus in both tiers from its produced size."""
    if form not in FORMS:
        raise ValueError(f"form must be one of {', '.join(FORMS)}, got {form!r}")
    upper = pattern_conforms(p, measured_xy, sizes, datum_produced_size)
    feat = lower_feature(p, t2, tuple(lower_datums))
    located = _lower_located(p, feat) if form == "two_segment" else None
    if located is not None:  # a single segment: located by its datums too
        lower = pattern_conforms(located, measured_xy, sizes, datum_produced_size)
    else:  # the feature-relating tier: the framework translates freely (and turns where nothing fixes it)
        lower = _free_fit(p, feat, measured_xy, sizes, _lower_rotation(p, tuple(lower_datums)))
    return CompositeCheck(form, float(t2), tuple(lower_datums), upper, lower)


def _free_fit(p: Pattern, feat, measured_xy, sizes, rotation: str) -> PatternCheck:
    """The members against zones of their own t + bonus (``feat``'s tolerance) at the basic
    locations, the zone framework free to translate (and to turn where ``rotation`` is "free")."""
    from . import boundaries as B
    from .analysis import tolerance_allowed_derived

    sizes = [m.size for m in members(p, sizes)]  # checked against the limits there
    meas = [tuple(map(float, xy)) for xy in measured_xy]
    if len(meas) != p.count:
        raise ValueError(f"pattern {p.id!r}: {p.count} measured (x, y) locations expected")
    basic = list(p.locations)
    allowed = [tolerance_allowed_derived(feat, B.bonus(feat, s)).value for s in sizes]
    # the best translation lies within the deviations' spread, plus what a turn about the datum
    # origin moves the pattern's centre: bound it generously by both
    spread = max(math.hypot(mx - bx, my - by) for (mx, my), (bx, by) in zip(meas, basic))
    cx = sum(b[0] for b in basic) / len(basic)
    cy = sum(b[1] for b in basic) / len(basic)
    reach = max(math.hypot(*b) for b in basic) or 1.0
    turn = (spread / reach) * math.hypot(cx, cy) * 4.0 if rotation == "free" else 0.0
    radius = 2.0 * spread + max(allowed) + turn + 1e-9
    _, d, th = best_fit(meas, basic, allowed, radius, rotation)
    readings = []
    for i, (fx, fy) in enumerate(_rot(th, meas)):
        fit = (fx + d[0], fy + d[1])
        pos = 2.0 * math.hypot(fit[0] - basic[i][0], fit[1] - basic[i][1])
        readings.append(Reading(i, basic[i], meas[i], fit, sizes[i], pos, allowed[i], allowed[i] - pos, d,
                                math.degrees(th)))
    gov = min(readings, key=lambda r: r.margin)
    return PatternCheck("right", p.requirement, tuple(readings), gov.index, gov.shift, gov.rotation_deg, None, 0.0,
                        all(r.conforms for r in readings))
