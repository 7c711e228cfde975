"""Bonus, tolerance allowed, virtual/resultant condition and inner/outer boundaries.

Formulas (ASME Y14.5-2018 §§1.3, 2.11-2.13 and Y14.5-2009 §2.11, from memory; the same
sizes are called MMVS/LMVS in ISO 2692:2021):

============ ============================ ============================
modifier     hole (internal)              pin (external)
============ ============================ ============================
MMC          VC = MMC - t   (inner)       VC = MMC + t   (outer)
             RC = LMC + t + bonus_max     RC = LMC - t - bonus_max
LMC          VC = LMC + t   (outer)       VC = LMC - t   (inner)
             RC = MMC - t - bonus_max     RC = MMC + t + bonus_max
RFS          IB = MMC - t, OB = LMC + t   OB = MMC + t, IB = LMC - t
============ ============================ ============================

bonus_max = |LMC - MMC| (the size tolerance) for MMC and LMC, zero for RFS.

>>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
>>> t = Tolerance(Characteristic.PERPENDICULARITY, 0.020, material=Material.MMC, datums=("A",))
>>> bore = Feature("bore", Kind.HOLE, (10.000, 10.015), 15.0, tolerance=t)
>>> round(virtual_condition(bore), 6)
9.98
>>> round(tolerance_allowed(bore, 10.010), 6)
0.03
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .model import Characteristic, Feature, Kind, Material, Standard, envelope_applies

SLACK = 1e-9  # numeric slack when checking a size against its limits (scene units)


class SizeOutOfLimits(ValueError):
    """A produced size outside the feature's size limits."""


def check_size(feature: Feature, size: float) -> float:
    lo, hi = feature.limits
    if not (math.isfinite(size) and lo - SLACK <= size <= hi + SLACK):
        raise SizeOutOfLimits(
            f"feature {feature.id!r}: produced size {size!r} is outside its limits {lo:g} .. {hi:g}"
        )
    return min(max(size, lo), hi)


def bonus(feature: Feature, size: float) -> float:
    """Bonus tolerance earned by a produced (actual mating) size.

    MMC: departure of the size from MMC; LMC: departure from LMC; RFS: none.
    """
    size = check_size(feature, size)
    tol = feature.tolerance
    if tol is None or tol.material is Material.RFS:
        return 0.0
    ref = feature.mmc if tol.material is Material.MMC else feature.lmc
    return abs(size - ref)


def tolerance_allowed(feature: Feature, size: float) -> float:
    """Stated tolerance plus the bonus at the produced size (0 if the feature has no tolerance)."""
    if feature.tolerance is None:
        check_size(feature, size)
        return 0.0
    return feature.tolerance.value + bonus(feature, size)


def bonus_max(feature: Feature) -> float | None:
    tol = feature.tolerance
    if tol is None:
        return None
    return 0.0 if tol.material is Material.RFS else feature.size_tolerance


def tolerance_max(feature: Feature) -> float:
    """The largest tolerance the feature can be allowed within its size limits: the stated
    tolerance plus the largest bonus (0 without a tolerance)."""
    if feature.tolerance is None:
        return 0.0
    return max(tolerance_allowed(feature, feature.mmc), tolerance_allowed(feature, feature.lmc))


def tolerance_at_mmc(feature: Feature) -> float | None:
    return None if feature.tolerance is None else tolerance_allowed(feature, feature.mmc)


def tolerance_at_lmc(feature: Feature) -> float | None:
    return None if feature.tolerance is None else tolerance_allowed(feature, feature.lmc)


def _sign(feature: Feature) -> int:
    """+1 for a pin (material grows outward), -1 for a hole."""
    return 1 if feature.kind is Kind.PIN else -1


def virtual_condition(feature: Feature) -> float | None:
    """MMC or LMC virtual condition; None for RFS or no tolerance (none is defined)."""
    tol = feature.tolerance
    if tol is None or tol.material is Material.RFS:
        return None
    s = _sign(feature)
    if tol.material is Material.MMC:
        return feature.mmc + s * tol.value
    return feature.lmc - s * tol.value


def resultant_condition(feature: Feature) -> float | None:
    """Resultant condition: the opposite worst-case boundary; None for RFS or no tolerance."""
    tol = feature.tolerance
    if tol is None or tol.material is Material.RFS:
        return None
    s = _sign(feature)
    if tol.material is Material.MMC:
        return feature.lmc - s * tolerance_at_lmc(feature)
    return feature.mmc + s * tolerance_at_mmc(feature)


def worst_case_boundaries(feature: Feature, standard: Standard = Standard.ASME):
    """(inner, outer) boundary: the worst-case boundaries of the feature's surface.

    With a tolerance: the MMC-side boundary is MMC -/+ the tolerance at MMC, the LMC-side one
    LMC +/- the tolerance at LMC (for every modifier; ASME Y14.5-2009 §2.11, from memory).
    Exceptions, each None where no boundary exists:

    - no tolerance: only the envelope (Rule #1 / ISO (E)) bounds the MMC side, at MMC;
      nothing relates the LMC side to a datum;
    - ASME, straightness of the derived median line: Rule #1 does not apply, yet the local
      sizes and the straightness zone bound both sides: OB = MMC + t, IB = LMC - t for a pin
      (hole: IB = MMC - t, OB = LMC + t) for RFS as for a modifier (ASME Y14.5, derived
      median line straightness, from memory);
    - ASME, no modifier and ``envelope = false``: the size does not limit form, no boundary;
    - ISO (ISO 8015 independency): a side is bounded only by what ISO itself states there:
      the MMS side by the MMVS of (M) or by the envelope (E); the LMS side by the LMVS of (L).
      Elsewhere the size does not limit form (two-point sizes, ISO 14405-1), so no boundary
      is computed on a perfect-form assumption;
    - envelope together with straightness: the envelope at MMC is the tighter MMC-side boundary.
    """
    s = _sign(feature)
    tol = feature.tolerance
    env = envelope_applies(feature, standard)
    if tol is None:
        mm_side = feature.mmc if env else None
        lm_side = None
    else:
        mm_side = feature.mmc + s * tolerance_at_mmc(feature)
        lm_side = feature.lmc - s * tolerance_at_lmc(feature)
        straight = tol.characteristic is Characteristic.STRAIGHTNESS
        if standard is Standard.ISO:
            if not (env or tol.material is Material.MMC):
                mm_side = None
            if tol.material is not Material.LMC:
                lm_side = None
        elif tol.material is Material.RFS and not env and not straight:
            mm_side = lm_side = None
        if env and straight and mm_side is not None:
            mm_side = feature.mmc
    if feature.kind is Kind.HOLE:
        return mm_side, lm_side
    return lm_side, mm_side


def perfect_form_boundary(feature: Feature) -> float:
    """The MMC-side boundary if the feature had perfect form: MMC -/+ the tolerance at MMC."""
    t = tolerance_at_mmc(feature) or 0.0
    return feature.mmc + _sign(feature) * t


def tilt_length(feature: Feature) -> float:
    """Length over which the zone constrains the axis: the projected height if given."""
    tol = feature.tolerance
    if tol is not None and tol.projected:
        return tol.projected
    return feature.length


def tilt_angle_deg(feature: Feature, tol_allowed: float) -> float | None:
    """Angle of an axis that crosses a zone of size ``tol_allowed`` corner to corner.

    None for straightness (it limits the bend of the axis, not its tilt) and for no tolerance.
    """
    tol = feature.tolerance
    if tol is None or tol.characteristic is Characteristic.STRAIGHTNESS:
        return None
    return math.degrees(math.atan2(tol_allowed, tilt_length(feature)))


@dataclass(frozen=True)
class FeatureState:
    """A what-if state: produced size, share (0..1) of the allowed tolerance used, tilt direction."""

    size: float
    share: float = 1.0
    direction_deg: float = 0.0


def worst_case_state(feature: Feature, role_in_mate: bool = False) -> FeatureState:
    """The default what-if state, the worst case: at MMC with the whole allowed tolerance used,
    tilted in direction 0; a pin in a mate tilts the opposite way (180 deg), the adverse
    combination.

    >>> from geom.model import Feature, Kind
    >>> pin = Feature("p", Kind.PIN, (7.99, 8.0), 10.0)
    >>> worst_case_state(pin, role_in_mate=True)
    FeatureState(size=8.0, share=1.0, direction_deg=180.0)
    """
    direction = 180.0 if (role_in_mate and feature.kind is Kind.PIN) else 0.0
    return FeatureState(feature.mmc, 1.0, direction)


def effective_size(feature: Feature, state: FeatureState) -> float:
    """The perfect-cylinder boundary normal to A that a part in this state presents to its mate.

    Hole: produced size minus the used share of the allowed tolerance (the clear opening);
    pin: produced size plus it (the envelope it sweeps).
    """
    used = state.share * tolerance_allowed(feature, state.size)
    return state.size + _sign(feature) * used
