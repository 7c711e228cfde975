"""Turn what was measured into checks, the governing readings and the one part verdict."""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from ..analysis import analyse_feature, term, tolerance_allowed_derived
from ..boundaries import bonus_max as _bonus_max
from ..boundaries import virtual_condition
from ..conformance import (
    combine, decide, not_evaluated, part_verdict, readings_disagree, with_detail,
)
from ..model import (
    Characteristic, Feature, Kind, Material, Scene, Standard, envelope_applies,
)
from .explain import _explain
from .readings import (
    _bonus, _line_reading, _local_increases, envelope_abbr, envelope_name, governing_axis,
    straightness_needed,
)
from .results import AxisReading, Envelope, InspectionResult, LeastSquaresResult

@dataclass(frozen=True)
class _Fit:
    """What a driver measured, handed to :func:`_finish`."""

    source: str
    source_file: str | None
    points: np.ndarray | None = None
    point_section: np.ndarray | None = None
    radial: np.ndarray | None = None
    sections: tuple = ()
    median_line: np.ndarray | None = None
    unrelated: Envelope | None = None
    related: Envelope | None = None
    lm_un: Envelope | None = None
    lm_rel: Envelope | None = None
    local: tuple[float, float] | None = None
    axis: AxisReading | None = None  # median-line reading (points), or the typed reading
    U: float | None = None
    ls: LeastSquaresResult | None = None
    notes: tuple[str, ...] = ()
    warnings: tuple[str, ...] = ()


@dataclass
class _Job:
    """Working state of one judgement (not a result value): what was measured, the envelopes the
    modifier uses, and the formulas and notes gathered on the way."""

    scene: Scene
    feature: Feature
    bonus_basis: str
    m: _Fit
    formulas: list = field(default_factory=list)
    notes: list = field(default_factory=list)

    def __post_init__(self):
        tol = self.feature.tolerance
        self.units, self.std, self.tol = self.scene.units, self.scene.standard, tol
        self.hole = self.feature.kind is Kind.HOLE
        self.iso = self.std is Standard.ISO
        self.B = term("bonus", self.std)[0]
        self.lmc = tol is not None and tol.material is Material.LMC
        self.un_env = self.m.lm_un if self.lmc else self.m.unrelated
        rel = self.m.lm_rel if self.lmc else self.m.related
        if tol is not None and (tol.characteristic is Characteristic.STRAIGHTNESS or not tol.datums):
            rel = self.un_env
        self.rel_env = rel
        self.notes = list(self.m.notes)
        fr = analyse_feature(self.feature, self.std)
        self.vc = virtual_condition(self.feature)
        self.vc_formula = fr.virtual_condition.formula(self.units, self.std) if self.vc is not None else ""
        self.vcn = term(fr.virtual_condition.key, self.std)[0]


@dataclass(frozen=True)
class _Allowance:
    bonus: float | None
    allowed: float | None
    increases: np.ndarray | None = None  # straightness at a modifier: per section
    needed: float | None = None  # ... and the stated tolerance the median line needs


@dataclass(frozen=True)
class _Readings:
    governing: AxisReading | None
    median: AxisReading | None
    feature_axis: AxisReading | None
    other: AxisReading | None
    why: str


def _allowance(j: _Job) -> _Allowance:
    """Bonus (ISO: increase) and tolerance allowed, with their formulas."""
    feature, tol, m, fmt, B, std = j.feature, j.tol, j.m, j.units.fmt, j.B, j.std
    if tol is not None and not tol.datums and j.bonus_basis == "related":
        j.notes.append("straightness has no datum: the related envelope is the unrelated one")
    straight_local = (tol is not None and tol.characteristic is Characteristic.STRAIGHTNESS
                      and tol.material is not Material.RFS)
    ref_key = "mmc" if tol is not None and tol.material is Material.MMC else "lmc"
    if straight_local and m.sections:
        inc = _local_increases(feature, m.sections)
        needed, g, _ = straightness_needed(m.median_line, inc)
        bonus = float(inc[g])
        sec = m.sections[g]
        d = tolerance_allowed_derived(feature, bonus)
        j.formulas += [
            f"{B} per section = departure from {term(ref_key, std)[0]} of the local size nearest it: "
            f"{fmt(float(inc.min()))} .. {fmt(float(inc.max()))}; governing section {sec.label}: {B} {fmt(bonus)}",
            d.formula(j.units, std) + f" (section {sec.label})",
            f"median line against a straight line, each section with its own {B}: "
            f"t needed = max(2 r_i - {B}_i) = {fmt(needed)}"]
        return _Allowance(bonus, d.value, inc, needed)
    if straight_local and m.local is not None:
        # typed local sizes: the local size nearest the limit earns the smallest increase
        ref = feature.mmc if ref_key == "mmc" else feature.lmc
        near = min(m.local, key=lambda v: abs(v - ref))
        bonus = float(np.clip(abs(near - ref), 0.0, _bonus_max(feature)))
        rn = term(ref_key, std)[0]
        j.formulas.append(f"{B} = |local size nearest {rn} - {rn}| = |{fmt(near)} - {fmt(ref)}| = {fmt(bonus)} "
                          "(straightness: the increase comes from the actual local sizes)")
    elif straight_local:
        j.notes.append("straightness at a modifier: no local sizes, so no increase is evaluated")
        bonus = None
    else:
        related = j.bonus_basis == "related"
        basis_env = j.rel_env if related else j.un_env
        basis_name = envelope_name(std, j.hole, related, j.lmc,
                                   tol is not None and tol.characteristic is Characteristic.POSITION)
        bonus, bform, bnote = _bonus(feature, None if basis_env is None else basis_env.diameter, std, j.units,
                                     basis_name, envelope_abbr(std, j.hole, j.lmc), unrelated=not related)
        if bform:
            j.formulas.append(bform + (f"  ({basis_name})" if tol.material is not Material.RFS else ""))
        if bnote:
            j.notes.append(bnote)
    if tol is None or bonus is None:
        return _Allowance(bonus, None)
    d = tolerance_allowed_derived(feature, bonus)
    j.formulas.append(d.formula(j.units, std))
    return _Allowance(bonus, d.value)


def _size_checks(j: _Job):
    """(size, local sizes, envelope) checks."""
    feature, m, units, std = j.feature, j.m, j.units, j.std
    lo, hi = feature.limits
    if m.local is not None:
        local_check = decide("local sizes", m.local, lo, hi, m.U, units)
    else:
        local_check = not_evaluated("local sizes", "no local sizes")
    env_check = None
    if envelope_applies(feature, std):
        ename = "envelope (Rule #1)" if std is Standard.ASME else "envelope (E)"
        if m.unrelated is None:
            env_check = not_evaluated(ename, f"no unrelated mating size ({'GX/GN' if j.iso else 'AME'})")
        else:
            c = decide(ename, (m.unrelated.diameter,), feature.mmc if j.hole else None,
                       None if j.hole else feature.mmc, m.U, units)
            what = ("GX" if j.hole else "GN") if j.iso else "unrelated AME"
            env_check = with_detail(c, f"{what} {c.detail} ({term('mmc', std)[0]})")
    return combine("size", [local_check, env_check]), local_check, env_check


def _readings(j: _Job) -> _Readings:
    """Both axis readings, and the one the standard applies the tolerance to."""
    feature, tol, m, std = j.feature, j.tol, j.m, j.std
    median = m.axis
    feature_axis = None
    if m.points is not None and j.un_env is not None and tol is not None and tol.datums:
        feature_axis = _line_reading(feature, j.un_env, "feature axis",
                                     f"feature axis: the axis of the {envelope_name(std, j.hole, False, j.lmc)}")
    basis, why = governing_axis(feature, std) if tol is not None else ("median line", "")
    if m.source == "values":
        governing = None if median is None else replace(median, basis=basis)
        if median is not None and tol is not None and tol.characteristic is not Characteristic.STRAIGHTNESS:
            j.notes.append(f"the typed axis reading is taken as the {basis} reading, which governs here ({why})")
    else:
        governing = feature_axis if basis == "feature axis" else median
    other = None
    if m.source == "points" and tol is not None and tol.characteristic is not Characteristic.STRAIGHTNESS:
        other = median if governing is feature_axis else feature_axis
    return _Readings(governing, median if m.source == "points" else None, feature_axis, other, why)


def _axis_checks(j: _Job, a: _Allowance, r: _Readings):
    """(axis check on the governing reading, the same check on the other reading or None)."""
    tol, U, units, B = j.tol, j.m.U, j.units, j.B
    g = r.governing
    if tol is None:
        axis = not_evaluated("axis", "no geometric tolerance")
    elif a.increases is not None:
        c = decide("axis", (a.needed,), None, tol.value, U, units)
        axis = with_detail(c, f"t needed after each section's {B} {c.detail} (t)")
    elif g is None or g.deviation is None:
        axis = not_evaluated("axis", "no axis deviation")
    elif a.allowed is None:
        axis = not_evaluated("axis", f"no tolerance allowed (no envelope size for the {B})")
    else:
        c = decide("axis", (g.deviation,), None, a.allowed, U, units)
        axis = with_detail(c, f"{g.basis} {c.detail}")
    other = None
    o = r.other
    if o is not None and o.deviation is not None and a.allowed is not None:
        c = decide("axis", (o.deviation,), None, a.allowed, U, units)
        other = with_detail(c, f"{o.basis} {c.detail}", name=f"{o.basis} (does not govern)")
    return axis, other


def _surface_check(j: _Job, a: _Allowance, r: _Readings):
    """The related envelope against the virtual condition: what a functional gauge checks."""
    tol, m, U, units, std, hole, lmc = j.tol, j.m, j.m.U, j.units, j.std, j.hole, j.lmc
    g = r.governing
    if tol is None:
        return not_evaluated("surface", "no geometric tolerance")
    if tol.material is Material.RFS:
        mod = term("rfs", std)[0]
        return not_evaluated("surface", f"{mod}: no virtual condition; the tolerance applies to the axis only")
    if tol.projected and m.points is None and g is not None and g.basis == "feature axis" \
            and g.deviation is not None and a.allowed is not None:
        # typed values under ASME: the typed reading is the feature axis, the axis of the gauge pin
        # that fits, over the projected height: the same check as the surface reading from points
        c = decide("surface", (g.deviation,), None, a.allowed, U, units)
        return with_detail(c, f"typed feature-axis reading (the axis of the gauge pin that fits) over "
                              f"the projected height: {c.detail}")
    if tol.projected:
        if j.un_env is None or m.points is None or a.allowed is None:
            return not_evaluated("surface", "projected zone: needs points or a typed feature-axis reading")
        line = _line_reading(j.feature, j.un_env, "feature axis", "")
        c = decide("surface", (line.deviation,), None, a.allowed, U, units)
        j.notes.append("projected zone: the surface reading takes the axis of the pin that fits the feature "
                       "through the projected height (common practice, no source)")
        return with_detail(c, f"axis of the {envelope_name(std, hole, False, lmc)} (the gauge pin that "
                              f"fits) extended over the projected height: {c.detail}")
    if j.rel_env is None:
        return not_evaluated("surface", "no related envelope size")
    low_side = hole != lmc
    vc = j.vc
    c = decide("surface", (j.rel_env.diameter,), vc if low_side else None, None if low_side else vc, U, units)
    straight = tol.characteristic is Characteristic.STRAIGHTNESS
    if j.iso:
        what = ("GX" if hole != lmc else "GN") + (" (unconstrained)" if straight else " (constrained to A)")
    else:
        what = ("unrelated" if straight else "related") + (" AMME" if lmc else " AME")
    return with_detail(c, f"{what} {c.detail} ({j.vcn})")


def _verdict(j: _Job, size, axis, surface, other, r: _Readings):
    """The one part verdict: size and surface with a modifier, size and axis without."""
    tol = j.tol
    if tol is None:
        gov, why = ("size",), "no geometric tolerance: size only"
    elif tol.material is Material.RFS:
        gov = ("size", "axis")
        why = f"no modifier: the tolerance applies to the axis ({r.why})" if r.why else "no modifier"
    else:
        gov = ("size", "surface")
        mod = {Material.MMC: "(M)", Material.LMC: "(L)"}[tol.material]
        if j.iso:
            why = (f"{mod}: ISO 2692 states the requirement on the surface, which must not violate the {j.vcn}; "
                   "the median-line reading with its increase is shown beside it")
        else:
            why = (f"{mod}: the surface must not violate the virtual condition; where the axis and surface "
                   "interpretations differ, ASME Y14.5 gives the surface interpretation precedence")
    notes = []
    if readings_disagree(axis, surface):
        notes.append(f"Axis and surface readings disagree: axis {axis.detail} ({axis.outcome_text}); surface "
                     f"{surface.detail} ({surface.outcome_text}). The {'surface' if 'surface' in gov else 'axis'} "
                     "reading governs.")
    if other is not None and readings_disagree(other, axis):
        notes.append(f"The {r.other.basis} reading ({other.detail}) does not govern here: {r.why}.")
    return part_verdict(size, axis, surface, gov, why, notes), gov


def _finish(scene: Scene, feature: Feature, bonus_basis: str, m: _Fit) -> InspectionResult:
    j = _Job(scene, feature, bonus_basis, m)
    a = _allowance(j)
    if j.vc is not None:
        j.formulas.append(j.vc_formula)
    size_check, local_check, env_check = _size_checks(j)
    r = _readings(j)
    axis_check, other_check = _axis_checks(j, a, r)
    surface_check = _surface_check(j, a, r)
    verdict, gov = _verdict(j, size_check, axis_check, surface_check, other_check, r)
    explanation = _explain(feature, j.std, j.units, axis_check, surface_check, m.sections, j.un_env, m.ls,
                           a.allowed, r.governing, other_check, gov)
    return InspectionResult(
        feature=feature, units=j.units, standard=j.std, source=m.source, source_file=m.source_file,
        points=m.points, point_section=m.point_section, radial_deviation=m.radial, sections=m.sections,
        median_line=m.median_line, unrelated=m.unrelated, related=m.related, least_material=m.lm_un,
        least_material_related=m.lm_rel,
        unrelated_ame=None if m.unrelated is None else m.unrelated.diameter,
        related_ame=None if m.related is None else m.related.diameter,
        local_sizes=None if m.local is None else (float(m.local[0]), float(m.local[1])),
        axis=r.governing, bonus_basis=bonus_basis, bonus=a.bonus, tolerance_allowed=a.allowed,
        virtual_condition=j.vc, uncertainty=m.U, formulas=tuple(j.formulas), size_check=size_check,
        local_check=local_check, envelope_check=env_check, axis_check=axis_check, surface_check=surface_check,
        least_squares=m.ls, explanation=tuple(explanation), notes=tuple(j.notes), warnings=tuple(m.warnings),
        feature_axis=r.feature_axis, median_axis=r.median, other_axis_check=other_check, axis_governs=r.why,
        verdict=verdict,
        section_increases=None if a.increases is None else tuple(float(v) for v in a.increases))
