"""Judge a produced part: from inspection values typed into the scene or from measured points.

For one feature of size it gives the actual mating envelopes (unrelated: any orientation;
related: held to datum A as the tolerance requires), the derived median line and its zone
reading, the bonus and tolerance allowed, and three verdicts, each under the ISO 14253-1
decision rule when an expanded uncertainty U (k = 2) is given:

* size: local two-point sizes within the limits and, where the envelope applies (ASME Rule #1
  or ISO (E)), the unrelated mating envelope not beyond MMC;
* axis reading: the derived median line within the tolerance allowed (t + bonus);
* surface reading: the related envelope does not violate the virtual condition (what a
  functional gauge checks).

The least-squares results a CMM usually prints are carried alongside, so a reader can see why a
gauge and a printout disagree. Definitions (ASME Y14.5-2018 §§1.3, 5.8 and Y14.5.1, from
memory): the unrelated actual mating envelope (AME) of a hole is the largest perfect cylinder,
in any orientation, that contains none of its surface; of a pin the smallest that contains it;
the related AME is the same held normal to datum A (and at the true position for position).

>>> from geom.scenefile import loads
>>> sc = loads('''units = "mm"
... [[feature]]
... id = "b"
... kind = "hole"
... limits = [8.0, 8.015]
... length = 12
... [feature.tolerance]
... characteristic = "perpendicularity"
... value = 0.015
... material = "MMC"
... datums = ["A"]
... [feature.measured]
... size = 8.004
... related_size = 7.990
... axis_deviation = 0.012
... ''')
>>> r = inspect_feature(sc, "b")
>>> round(r.tolerance_allowed, 6), r.axis_conforms, r.surface_conforms, r.size_conforms
(0.019, True, True, True)
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from . import fitting as F
from .analysis import analyse_feature, term
from .boundaries import bonus_max as _bonus_max
from .boundaries import virtual_condition
from .model import (
    Characteristic, Feature, Kind, Material, Scene, Standard, Units, Zone, envelope_applies,
)
from .pointsfile import PointCloud, read_points

SLACK = 1e-9  # numeric slack when comparing with a limit (scene units)
BONUS_BASES = ("unrelated", "related")


class InspectError(ValueError):
    """Inspection input that cannot be used (message names the file and what was expected)."""


# ---------------------------------------------------------------- result values


@dataclass(frozen=True)
class SectionResult:
    """One section (ring) of points: least-squares circle, mating circle, local sizes."""

    label: str
    z: float  # mean height of its points
    n: int
    ls_centre: tuple[float, float]
    ls_diameter: float
    mating_centre: tuple[float, float]  # maximum inscribed (hole) / minimum circumscribed (pin)
    mating_diameter: float
    local_min: float  # smallest and largest two-point size
    local_max: float
    roundness: float  # radial range about the least-squares centre
    largest_gap_deg: float  # largest angular gap between points seen from the LS centre


@dataclass(frozen=True)
class Envelope:
    """A perfect cylinder fitted to the points: its axis point at z = 0, unit direction, diameter."""

    name: str
    diameter: float
    point: tuple[float, float, float]
    direction: tuple[float, float, float]
    constraint: str

    def at_z(self, z: float) -> tuple[float, float]:
        p, d = self.point, self.direction
        s = (z - p[2]) / d[2]
        return (p[0] + s * d[0], p[1] + s * d[1])

    @property
    def tilt_deg(self) -> float:
        return math.degrees(math.acos(max(-1.0, min(1.0, abs(self.direction[2])))))


@dataclass(frozen=True)
class Check:
    """One verdict: measured value(s) against a limit, with the ISO 14253-1 outcome."""

    name: str
    conforms: bool | None  # on the measured values alone (None: not evaluated)
    outcome: str  # "conformance proven" | "nonconformance proven" | "not proven" | ...
    detail: str  # e.g. "0.024 > 0.022"
    values: tuple[float, ...] = ()
    low: float | None = None
    high: float | None = None


@dataclass(frozen=True)
class AxisReading:
    """How much zone the derived median line needs."""

    deviation: float | None  # reading for the tolerance's own zone shape
    diameter_reading: float | None
    width_reading: float | None
    method: str  # what was measured and how
    line: np.ndarray  # (k, 3) points the reading was taken on


@dataclass(frozen=True)
class LeastSquaresResult:
    """The usual CMM printout: least-squares cylinder size and axis."""

    cylinder: Envelope | None
    size: float
    axis_deviation: float | None
    bonus: float | None
    tolerance_allowed: float | None
    size_conforms: bool
    axis_conforms: bool | None
    formulas: tuple[str, ...]


@dataclass(frozen=True)
class InspectionResult:
    feature: Feature
    units: Units
    standard: Standard
    source: str  # "points" or "values"
    source_file: str | None
    points: np.ndarray | None  # (n, 3) measured points, datum frame
    point_section: np.ndarray | None  # (n,) index into ``sections``
    radial_deviation: np.ndarray | None  # (n,) distance from the LS cylinder's surface (+ outward)
    sections: tuple[SectionResult, ...]
    median_line: np.ndarray | None  # (k, 3) LS centres of the sections
    unrelated: Envelope | None
    related: Envelope | None
    least_material: Envelope | None  # unrelated minimum-material envelope (LMC modifier only)
    least_material_related: Envelope | None
    unrelated_ame: float | None
    related_ame: float | None
    local_sizes: tuple[float, float] | None
    axis: AxisReading | None
    bonus_basis: str
    bonus: float | None
    tolerance_allowed: float | None
    virtual_condition: float | None
    uncertainty: float | None
    formulas: tuple[str, ...]
    size_check: Check
    local_check: Check
    envelope_check: Check | None
    axis_check: Check
    surface_check: Check
    least_squares: LeastSquaresResult | None
    explanation: tuple[str, ...]
    notes: tuple[str, ...] = ()
    warnings: tuple[str, ...] = field(default=())
    # the same reading taken on the axis of the unrelated envelope (ASME's "feature axis"),
    # shown beside the derived-median-line reading the verdict uses
    feature_axis: AxisReading | None = None

    @property
    def size_conforms(self) -> bool | None:
        return self.size_check.conforms

    @property
    def axis_conforms(self) -> bool | None:
        return self.axis_check.conforms

    @property
    def surface_conforms(self) -> bool | None:
        return self.surface_check.conforms

    @property
    def axis_deviation(self) -> float | None:
        return None if self.axis is None else self.axis.deviation


# ---------------------------------------------------------------- decisions


def decide(name: str, values, low: float | None, high: float | None, U: float | None,
           fmt=lambda v: f"{v:g}") -> Check:
    """ISO 14253-1 decision rule (from memory): conformance is proven when every value lies in
    the specification zone shrunk by U on each side, nonconformance when one lies outside it
    grown by U; otherwise neither is proven. Without U the measured values decide alone."""
    vals = tuple(float(v) for v in values)
    lo = -math.inf if low is None else low
    hi = math.inf if high is None else high
    u = U or 0.0
    inside = all(lo - SLACK <= v <= hi + SLACK for v in vals)
    if U is None:
        outcome = "conforms (no U given)" if inside else "does not conform (no U given)"
    elif all(lo + u - SLACK <= v <= hi - u + SLACK for v in vals):
        outcome = "conformance proven"
    elif any(v < lo - u - SLACK or v > hi + u + SLACK for v in vals):
        outcome = "nonconformance proven"
    else:
        outcome = "not proven either way (within U of a limit)"
    shown = " .. ".join(fmt(v) for v in vals)
    if low is not None and high is not None:
        rel = "within" if inside else "outside"
        detail = f"{shown} {rel} {fmt(low)} .. {fmt(high)}"
    elif high is not None:
        detail = f"{shown} {'<=' if inside else '>'} {fmt(high)}"
    else:
        detail = f"{shown} {'>=' if inside else '<'} {fmt(low)}"
    return Check(name, inside, outcome, detail, vals, low, high)


def _not_evaluated(name: str, why: str) -> Check:
    return Check(name, None, "not evaluated", why)


def _combine(name: str, checks: list[Check]) -> Check:
    done = [c for c in checks if c.conforms is not None]
    if not done:
        return _not_evaluated(name, "; ".join(c.detail for c in checks))
    ok = all(c.conforms for c in done)
    outs = [c.outcome for c in done]
    if any(o.startswith("nonconformance") or o.startswith("does not") for o in outs):
        outcome = next(o for o in outs if o.startswith("nonconformance") or o.startswith("does not"))
    elif all(o.startswith("conformance") or o.startswith("conforms") for o in outs):
        outcome = outs[0]
    else:
        outcome = next(o for o in outs if o.startswith("not proven"))
    return Check(name, ok, outcome, "; ".join(c.detail for c in checks))


# ---------------------------------------------------------------- sections


def group_sections(pc: PointCloud, length: float) -> tuple[list[np.ndarray], list[str]]:
    """Indices of the points of each section, ordered by height, and the section labels.

    With a ``section`` column the labels group the points; otherwise points whose heights differ
    by less than 1/1000 of the feature length form one ring (rings at constant z)."""
    z = pc.xyz[:, 2]
    if pc.sections is not None:
        labs, inv = np.unique(pc.sections, return_inverse=True)
        groups = [np.flatnonzero(inv == i) for i in range(len(labs))]
        names = [_label(v) for v in labs]
    else:
        order = np.argsort(z, kind="stable")
        zs = z[order]
        cut = np.flatnonzero(np.diff(zs) > 1e-3 * length) + 1
        groups = np.split(order, cut)
        names = [str(i + 1) for i in range(len(groups))]
    zmean = [float(z[g].mean()) for g in groups]
    order = np.argsort(zmean, kind="stable")
    return [groups[i] for i in order], [names[i] for i in order]


def _label(v) -> str:
    if isinstance(v, (float, np.floating)) and float(v).is_integer():
        return str(int(v))
    return str(v)


def _section(xy: np.ndarray, z: float, label: str, hole: bool) -> SectionResult:
    cx, cy, r = F.ls_circle(xy)
    if hole:
        mx, my, mr = F.inscribed_circle(xy, centre_hint=(cx, cy))
    else:
        mx, my, mr = F.circumscribed_circle(xy)
    loc = F.local_sizes(xy, (cx, cy))
    rad = np.hypot(xy[:, 0] - cx, xy[:, 1] - cy)
    gap = F.largest_angular_gap(xy, (cx, cy))
    return SectionResult(label, z, len(xy), (cx, cy), 2 * r, (mx, my), 2 * mr, float(loc.min()),
                         float(loc.max()), float(np.ptp(rad)), math.degrees(gap))


# ---------------------------------------------------------------- axis readings


def _axis_reading(feature: Feature, centres: np.ndarray, line_fit) -> AxisReading | None:
    """Zone the derived median line needs: diameter and width readings; the tolerance's own
    zone shape gives ``deviation``."""
    tol = feature.tolerance
    if tol is None:
        return None
    ch = tol.characteristic
    at = np.asarray(feature.at, float)
    pts = centres
    how = f"derived median line: least-squares centres of {len(centres)} sections"
    if tol.projected:
        P = tol.projected
        zz = np.array([-P, 0.0])
        a, b, u, v = line_fit
        pts = np.c_[a + u * zz, b + v * zz, zz]
        how = (f"projected zone: least-squares line through the {len(centres)} section centres, "
               f"extended to z = -{P:g} .. 0 (the far side of datum A)")
    xy = pts[:, :2]
    if ch is Characteristic.PERPENDICULARITY:
        c = F.circumscribed_circle(xy) if len(xy) >= 2 else (0, 0, 0.0)
        dia = 2 * c[2]
        width = float(np.ptp(xy[:, 0]))
        how += "; ⌀: smallest circle holding the centres projected on A; width: their spread along x"
    elif ch is Characteristic.POSITION:
        dia = 2 * float(np.hypot(*(xy - at).T).max())
        width = 2 * float(np.abs(xy[:, 0] - at[0]).max())
        how += ("; ⌀: twice the largest distance of a centre from the true position; width: twice "
                "the largest x distance")
    elif ch is Characteristic.STRAIGHTNESS:
        z0 = float(pts[:, 2].mean())
        x0 = _line_through(pts, z0)
        _, rr = F.minimax_cylinder(pts, x0, z0, inscribed=False)
        dia = 2 * rr
        width = F.min_width_along_x(pts[:, 2], pts[:, 0], tilt_free=True)
        how += ("; ⌀: smallest cylinder in any orientation holding the centres; width: closest "
                "planes normal to x (tilt free) holding them")
    else:  # parallelism / angularity: refused earlier for points
        return None
    dev = dia if tol.zone is Zone.DIAMETER else width
    return AxisReading(dev, dia, width, how, np.asarray(pts, float))


def _line_through(pts: np.ndarray, z0: float) -> np.ndarray:
    """Least-squares line x(z), y(z) through points: axis parameters (a, b, u, v) at z0."""
    z = pts[:, 2] - z0
    if np.ptp(z) == 0:
        m = pts[:, :2].mean(axis=0)
        return np.array([m[0], m[1], 0.0, 0.0])
    A = np.c_[np.ones(len(z)), z]
    (a, u), *_ = np.linalg.lstsq(A, pts[:, 0], rcond=None)
    (b, v), *_ = np.linalg.lstsq(A, pts[:, 1], rcond=None)
    return np.array([a, b, u, v])


def _envelope(name: str, x, z0: float, radius: float, constraint: str) -> Envelope:
    p0 = F.axis_point(x, z0, 0.0)
    d = F.axis_direction_unit(x)
    return Envelope(name, 2 * radius, (float(p0[0]), float(p0[1]), 0.0), tuple(float(t) for t in d), constraint)


def _related(feature: Feature, P: np.ndarray, x_start, z0: float, inscribed: bool, what: str):
    """Envelope held by the datum: axis normal to A (location free for orientation, at the true
    position for position); width zones (planes normal to x) leave tilt about x free."""
    tol = feature.tolerance
    at = feature.at
    if tol is None or tol.characteristic is Characteristic.STRAIGHTNESS or not tol.datums:
        return None
    width = tol.zone is Zone.WIDTH
    x0 = np.array(x_start, float)
    if tol.characteristic is Characteristic.POSITION:
        x0[0] = at[0]
        x0[2] = 0.0
        if width:
            free = (False, True, False, True)
            cons = "normal to A across the zone (tilt along y free), x at the true position, y free"
        else:
            x0[1] = at[1]
            x0[3] = 0.0
            free = (False, False, False, False)
            cons = "normal to A, at the true position"
    else:
        x0[2] = 0.0
        if width:
            free = (True, True, False, True)
            cons = "normal to A across the zone (tilt along y free), location free"
        else:
            x0[3] = 0.0
            free = (True, True, False, False)
            cons = "normal to A, location free"
    x, r = F.minimax_cylinder(P, x0, z0, inscribed=inscribed, free=free)
    return _envelope(f"related {what}", x, z0, r, cons)


# ---------------------------------------------------------------- main entry


def _load_points(scene: Scene, feature: Feature, points, sections) -> PointCloud | None:
    if points is None:
        m = feature.measured
        if m is None or m.points is None:
            return None
        base = Path(scene.source).parent if scene.source else Path.cwd()
        path = Path(m.points)
        return read_points(path if path.is_absolute() else base / path)
    if isinstance(points, PointCloud):
        return points
    if isinstance(points, (str, os.PathLike)):
        return read_points(points)
    arr = np.asarray(points, float)
    if arr.ndim != 2 or arr.shape[1] != 3:
        raise InspectError(f"<points>: expected an array of shape (n, 3), got {arr.shape}")
    if not np.isfinite(arr).all():
        row = int(np.flatnonzero(~np.isfinite(arr).all(axis=1))[0])
        raise InspectError(f"<points>: row {row}: expected finite coordinates, got {arr[row].tolist()}")
    return PointCloud(arr, None if sections is None else np.asarray(sections), "<points>")


def inspect_feature(scene: Scene, feature_id: str, points=None, bonus_basis: str = "unrelated",
                    sections=None) -> InspectionResult:
    """Inspect one feature of ``scene``.

    ``points``: None (use the ``[feature.measured]`` table: its ``points`` file, relative to the
    scene file, or the typed values), a CSV path, a :class:`PointCloud` or an (n, 3) array in the
    datum frame (with optional ``sections`` labels). ``bonus_basis``: ``"unrelated"`` (ASME
    Y14.5-2009 and later, from memory) or ``"related"`` (datum-related envelope).
    """
    if bonus_basis not in BONUS_BASES:
        raise InspectError(f"bonus basis: expected one of {', '.join(BONUS_BASES)}, got {bonus_basis!r}")
    try:
        feature = scene.feature(feature_id)
    except KeyError:
        import difflib

        ids = [f.id for f in scene.features]
        near = difflib.get_close_matches(feature_id, ids, n=1)
        hint = f" (did you mean {near[0]!r}?)" if near else ""
        raise InspectError(f"{scene.source or 'scene'}: no feature {feature_id!r}{hint}; "
                           f"features: {', '.join(ids)}") from None
    pc = _load_points(scene, feature, points, sections)
    if pc is not None:
        return _from_points(scene, feature, pc, bonus_basis)
    if feature.measured is None:
        raise InspectError(f"{scene.source or 'scene'}: feature {feature.id!r} has no [feature.measured] "
                           "values and no points were given (use --points FILE.csv)")
    return _from_values(scene, feature, bonus_basis)


def _from_points(scene: Scene, feature: Feature, pc: PointCloud, bonus_basis: str) -> InspectionResult:
    file = pc.file
    tol = feature.tolerance
    if tol is not None and tol.characteristic in (Characteristic.PARALLELISM, Characteristic.ANGULARITY):
        raise InspectError(f"{file}: inspecting {tol.characteristic.value} from points is not supported: "
                           "the points' frame assumes the nominal axis along +z (normal to datum A)")
    hole = feature.kind is Kind.HOLE
    units = scene.units
    P = pc.xyz
    groups, labels = group_sections(pc, feature.length)
    warnings: list[str] = []
    notes: list[str] = []
    for g, lab in zip(groups, labels):
        if len(g) < 3:
            raise InspectError(f"{file}: section {lab} (z = {units.fmt(float(P[g, 2].mean()))}) has "
                               f"{len(g)} point{'s' if len(g) != 1 else ''}; a section needs at least 3")
    if len(groups) < 2:
        how = "section labels" if pc.sections is not None else "heights (z)"
        raise InspectError(f"{file}: the points form {len(groups)} section by their {how}; "
                           "an axis needs at least 2 sections at different heights")
    zs = np.array([float(P[g, 2].mean()) for g in groups])
    if np.ptp(zs) <= 1e-3 * feature.length:
        raise InspectError(f"{file}: all sections lie at the same height (z = {units.fmt(zs[0])}); "
                           "an axis needs sections at different heights")
    # do the sections surround the nominal axis?
    for g, lab, z in zip(groups, labels, zs):
        gap = F.largest_angular_gap(P[g, :2], feature.at)
        if gap >= math.pi:
            raise InspectError(
                f"{file}: the points of section {lab} (z = {units.fmt(z)}) do not surround the nominal "
                f"axis at ({units.fmt(feature.at[0])}, {units.fmt(feature.at[1])}): seen from it they "
                f"leave a gap of {math.degrees(gap):.0f} degrees. Expected points in the datum frame, "
                "around the feature's basic location")
    # sections: least squares, mating circle, local sizes
    secs = []
    for g, lab, z in zip(groups, labels, zs):
        try:
            secs.append(_section(P[g, :2], z, lab, hole))
        except F.FitError as e:
            raise InspectError(f"{file}: section {lab} (z = {units.fmt(z)}): {e}") from None
    dia_mean = float(np.mean([s.ls_diameter for s in secs]))
    lo, hi = feature.limits
    nominal = 0.5 * (lo + hi)
    if not 0.5 < dia_mean / nominal < 2.0:
        ratio = dia_mean / nominal
        hint = ""
        for f, what in ((25.4, "mm values in an inch scene"), (1 / 25.4, "inch values in a mm scene")):
            if abs(ratio / f - 1) < 0.1:
                hint = f" (about x{ratio:.3g}: {what}?)"
        raise InspectError(f"{file}: the points give a diameter of {dia_mean:.6g}, far from the feature's size "
                           f"{units.fmt(lo)} - {units.fmt(hi)} {units.value}: wrong units or wrong feature?{hint}")
    if not lo - 10 * (hi - lo) <= dia_mean <= hi + 10 * (hi - lo):
        warnings.append(f"{file}: the mean section diameter {units.fmt(dia_mean)} is far outside the limits "
                        f"{units.fmt(lo)} - {units.fmt(hi)} {units.value}; check the units and the feature")
    for s in secs:
        if s.largest_gap_deg > 90:
            warnings.append(f"section {s.label}: the points leave a {s.largest_gap_deg:.0f} degree gap; "
                            "envelopes of a partial arc are not reliable")
    zlo, zhi = float(P[:, 2].min()), float(P[:, 2].max())
    if zlo < -0.01 * feature.length or zhi > 1.01 * feature.length:
        warnings.append(f"points span z = {units.fmt(zlo)} .. {units.fmt(zhi)}, beyond the feature "
                        f"(0 .. {units.fmt(feature.length)}); check the datum frame")
    sec_index = np.empty(len(P), int)
    for i, g in enumerate(groups):
        sec_index[g] = i
    centres = np.c_[[s.ls_centre for s in secs], zs]

    # cylinders: least squares, unrelated and related envelopes
    z0 = float(P[:, 2].mean())
    x_line = _line_through(centres, z0)
    x_ls, r_ls = F.ls_cylinder(P, x_line, z0)
    ls_env = _envelope("least-squares cylinder", x_ls, z0, r_ls, "any orientation (Gaussian fit)")
    radial = F.axis_distances(P, x_ls, z0) - r_ls
    mate = "actual mating envelope"
    x_un, r_un = F.minimax_cylinder(P, x_ls, z0, inscribed=hole)
    unrelated = _envelope(f"unrelated {mate}", x_un, z0, r_un, "any orientation")
    related = _related(feature, P, x_un, z0, hole, mate)
    lm_un = lm_rel = None
    if tol is not None and tol.material is Material.LMC:
        mm = "minimum material envelope"
        x_lm, r_lm = F.minimax_cylinder(P, x_ls, z0, inscribed=not hole)
        lm_un = _envelope(f"unrelated actual {mm}", x_lm, z0, r_lm, "any orientation")
        lm_rel = _related(feature, P, x_lm, z0, not hole, f"actual {mm}")
    axis = _axis_reading(feature, centres, _line_through(centres, 0.0))
    local = (min(s.local_min for s in secs), max(s.local_max for s in secs))
    U = feature.measured.uncertainty if feature.measured else None
    if feature.measured is not None and any(
            getattr(feature.measured, k) is not None for k in ("size", "related_size", "axis_deviation", "axis_bottom")):
        notes.append("typed [feature.measured] values are not used: the results come from the points")
    ls = _least_squares(scene, feature, ls_env, centres, axis)
    return _finish(
        scene, feature, bonus_basis, source="points", source_file=file, points=P, point_section=sec_index,
        radial=radial, sections=tuple(secs), median_line=centres, unrelated=unrelated, related=related,
        lm_un=lm_un, lm_rel=lm_rel, local=local, axis=axis, U=U, ls=ls, notes=notes, warnings=warnings)


def _from_values(scene: Scene, feature: Feature, bonus_basis: str) -> InspectionResult:
    m = feature.measured
    tol = feature.tolerance
    notes: list[str] = []
    axis = None
    if tol is not None:
        if m.axis_deviation is not None:
            axis = AxisReading(m.axis_deviation, m.axis_deviation if tol.zone is Zone.DIAMETER else None,
                               m.axis_deviation if tol.zone is Zone.WIDTH else None,
                               "typed axis deviation", np.zeros((0, 3)))
        elif m.axis_bottom is not None:
            ends = np.array([[*m.axis_bottom, 0.0], [*m.axis_top, feature.length]])
            fit = _line_through(ends, 0.0)
            axis = _axis_reading(feature, ends, fit)
            if axis is not None:
                axis = AxisReading(axis.deviation, axis.diameter_reading, axis.width_reading,
                                   axis.method.replace("least-squares centres of 2 sections", "typed axis end points")
                                   .replace("the 2 section centres", "the typed axis end points"), axis.line)
    un = m.size
    rel = m.related_size
    hole = feature.kind is Kind.HOLE
    if (rel is None and un is not None and axis is not None and axis.deviation is not None and tol is not None
            and tol.material is Material.MMC and tol.datums and not tol.projected):
        rel = un - axis.deviation if hole else un + axis.deviation
        notes.append("no related_size typed: related envelope estimated as size " + ("-" if hole else "+")
                     + " axis deviation (perfect form assumed), so axis and surface readings agree by construction")
    mk = lambda name, d: None if d is None else Envelope(name, d, (*feature.at, 0.0), (0.0, 0.0, 1.0), "typed value")
    unrelated = mk("unrelated actual mating envelope", un)
    related = mk("related actual mating envelope", rel)
    lm_un = lm_rel = None
    if tol is not None and tol.material is Material.LMC:
        # typed sizes are read as the envelopes the modifier uses
        lm_un, lm_rel = mk("unrelated actual minimum material envelope", un), mk(
            "related actual minimum material envelope", rel)
        notes.append("LMC modifier: the typed size and related_size are read as minimum material envelopes")
    return _finish(
        scene, feature, bonus_basis, source="values", source_file=scene.source, points=None, point_section=None,
        radial=None, sections=(), median_line=None if axis is None or not len(axis.line) else axis.line,
        # under LMC the typed sizes are minimum material envelopes, not mating envelopes: Rule #1
        # (which needs the mating envelope) is then not evaluated rather than judged on the wrong size
        unrelated=None if lm_un is not None else unrelated, related=None if lm_rel is not None else related,
        lm_un=lm_un, lm_rel=lm_rel, local=m.local_sizes, axis=axis,
        U=m.uncertainty, ls=None, notes=notes, warnings=[])


def _bonus(feature: Feature, env: float | None, standard: Standard, units: Units, basis_name: str):
    """(bonus, formula, note) earned by an envelope size; clamped to 0 .. bonus_max."""
    tol = feature.tolerance
    if tol is None:
        return None, "", None
    if tol.material is Material.RFS:
        return 0.0, f"{term('bonus', standard)[0]} = 0 ({term('rfs', standard)[0]}: no modifier)", None
    if env is None:
        return None, "", f"no {basis_name} size: bonus not evaluated"
    hole = feature.kind is Kind.HOLE
    B = term("bonus", standard)[0]
    if tol.material is Material.MMC:
        ref, rn = feature.mmc, term("mmc", standard)[0]
        raw = env - ref if hole else ref - env
        sym = f"AME - {rn}" if hole else f"{rn} - AME"
        nums = (env, ref) if hole else (ref, env)
    else:
        ref, rn = feature.lmc, term("lmc", standard)[0]
        raw = ref - env if hole else env - ref
        sym = f"{rn} - AMME" if hole else f"AMME - {rn}"
        nums = (ref, env) if hole else (env, ref)
    bmax = _bonus_max(feature)
    val = min(max(raw, 0.0), bmax)
    note = None
    if raw < -SLACK:
        note = f"the {basis_name} is beyond the {rn} size: no {B}" + (
            " (and the size fails the envelope)" if basis_name.startswith("unrelated") else "")
    elif raw > bmax + SLACK:
        note = f"the {basis_name} is beyond the other size limit: {B} capped at {units.fmt(bmax)}"
    formula = f"{B} = {sym} = {units.fmt(nums[0])} - {units.fmt(nums[1])} = {units.fmt(raw)}"
    if abs(val - raw) > SLACK:
        formula += f" -> {units.fmt(val)}"
    return val, formula, note


def _least_squares(scene: Scene, feature: Feature, cyl: Envelope, centres, axis: AxisReading | None):
    units, std = scene.units, scene.standard
    tol = feature.tolerance
    lo, hi = feature.limits
    size = cyl.diameter
    formulas = [f"least-squares cylinder ⌀{units.fmt(size)}, axis tilt {cyl.tilt_deg:.5f} deg"]
    dev = b = allowed = None
    axis_ok = None
    if tol is not None and axis is not None:
        # the CMM evaluates the LS cylinder's axis over the feature (or the projected height)
        if tol.projected:
            zz = np.array([-tol.projected, 0.0])
        else:
            zz = np.array([0.0, feature.length])
        line = np.c_[[cyl.at_z(z) for z in zz], zz]
        if tol.characteristic is Characteristic.STRAIGHTNESS:
            dev = 0.0  # a straight cylinder axis has no straightness error
        else:
            r = _axis_reading(feature.with_(tolerance=replace(tol, projected=None)), line, None)
            dev = r.deviation
        b, bf, _ = _bonus(feature, size, std, units, "least-squares size")
        bf = bf.replace("AMME", "LS").replace("AME", "LS")
        allowed = tol.value + (b or 0.0)
        formulas += [f"axis of the least-squares cylinder: {units.fmt(dev)} over z = {units.fmt(zz[0])} .. {units.fmt(zz[1])}",
                     bf, f"tolerance allowed = t + {term('bonus', std)[0]} = {units.fmt(tol.value)} + "
                         f"{units.fmt(b or 0.0)} = {units.fmt(allowed)}"]
        axis_ok = dev <= allowed + SLACK
    return LeastSquaresResult(cyl, size, dev, b, allowed, lo - SLACK <= size <= hi + SLACK, axis_ok, tuple(formulas))


def _finish(scene, feature, bonus_basis, *, source, source_file, points, point_section, radial, sections,
            median_line, unrelated, related, lm_un, lm_rel, local, axis, U, ls, notes, warnings):
    units, std = scene.units, scene.standard
    fmt = units.fmt
    tol = feature.tolerance
    hole = feature.kind is Kind.HOLE
    lo, hi = feature.limits
    formulas: list[str] = []
    notes = list(notes)
    if tol is not None and not tol.datums and bonus_basis == "related":
        notes.append("straightness has no datum: the related envelope is the unrelated one")
    lmc = tol is not None and tol.material is Material.LMC
    un_env = lm_un if lmc else unrelated
    rel_env = (lm_rel if lmc else related)
    if tol is not None and (tol.characteristic is Characteristic.STRAIGHTNESS or not tol.datums):
        rel_env = un_env
    basis_env = un_env if bonus_basis == "unrelated" else rel_env
    basis_name = ("unrelated " if bonus_basis == "unrelated" else "related ") + (
        "actual minimum material envelope" if lmc else "actual mating envelope")
    bonus, bform, bnote = _bonus(feature, None if basis_env is None else basis_env.diameter, std, units, basis_name)
    if bform:
        formulas.append(bform + (f"  ({basis_name})" if tol.material is not Material.RFS else ""))
    if bnote:
        notes.append(bnote)
    allowed = None
    if tol is not None and bonus is not None:
        allowed = tol.value + bonus
        formulas.append(f"tolerance allowed = t + {term('bonus', std)[0]} = {fmt(tol.value)} + {fmt(bonus)} = {fmt(allowed)}")
    vc = virtual_condition(feature)
    fr = analyse_feature(feature, std)
    if vc is not None:
        formulas.append(fr.virtual_condition.formula(units, std))

    # size
    if local is not None:
        local_check = decide("local sizes", local, lo, hi, U, fmt)
    else:
        local_check = _not_evaluated("local sizes", "no local sizes")
    env_check = None
    if envelope_applies(feature, std):
        ename = "envelope (Rule #1)" if std is Standard.ASME else "envelope (E)"
        if unrelated is None:
            env_check = _not_evaluated(ename, "no unrelated mating size")
        else:
            mm = term("mmc", std)[0]
            c = decide(ename, (unrelated.diameter,), feature.mmc if hole else None,
                       None if hole else feature.mmc, U, fmt)
            env_check = Check(c.name, c.conforms, c.outcome, f"unrelated AME {c.detail} ({mm})", c.values, c.low, c.high)
    size_check = _combine("size", [local_check] + ([env_check] if env_check else []))

    # axis
    if tol is None:
        axis_check = _not_evaluated("axis", "no geometric tolerance")
    elif axis is None or axis.deviation is None:
        axis_check = _not_evaluated("axis", "no axis deviation")
    elif allowed is None:
        axis_check = _not_evaluated("axis", "no tolerance allowed (no envelope size for the bonus)")
    else:
        axis_check = decide("axis", (axis.deviation,), None, allowed, U, fmt)

    # surface (functional gauge)
    if tol is None:
        surface_check = _not_evaluated("surface", "no geometric tolerance")
    elif tol.material is Material.RFS:
        surface_check = _not_evaluated("surface", "RFS: no virtual condition; the tolerance applies to the axis only")
    elif tol.projected:
        if un_env is None or points is None or allowed is None:
            surface_check = _not_evaluated("surface", "projected zone: needs points (the envelope's axis)")
        else:
            zz = np.array([-tol.projected, 0.0])
            line = np.c_[[un_env.at_z(z) for z in zz], zz]
            r = _axis_reading(feature, line, _line_through(line, 0.0))
            c = decide("surface", (r.deviation,), None, allowed, U, fmt)
            surface_check = Check("surface", c.conforms, c.outcome,
                                  f"axis of the unrelated envelope (the gauge pin that fits) extended over the "
                                  f"projected height: {c.detail}", c.values, c.low, c.high)
            notes.append("projected zone: the surface reading takes the axis of the pin that fits the feature "
                         "(the unrelated envelope) through the projected height (common practice, no source)")
    elif rel_env is None:
        surface_check = _not_evaluated("surface", "no related envelope size")
    else:
        vcn = term(fr.virtual_condition.key, std)[0]
        low_side = (hole and not lmc) or (not hole and lmc)
        c = decide("surface", (rel_env.diameter,), vc if low_side else None, None if low_side else vc, U, fmt)
        what = "related AMME" if lmc else "related AME"
        if tol.characteristic is Characteristic.STRAIGHTNESS:
            what = what.replace("related", "unrelated")
        surface_check = Check("surface", c.conforms, c.outcome, f"{what} {c.detail} ({vcn})", c.values, c.low, c.high)

    feature_axis = None
    if points is not None and un_env is not None and tol is not None and tol.datums:
        zz = np.array([-tol.projected, 0.0]) if tol.projected else np.array([0.0, feature.length])
        line = np.c_[[un_env.at_z(z) for z in zz], zz]
        r = _axis_reading(feature, line, _line_through(line, 0.0))
        if r is not None:
            feature_axis = AxisReading(r.deviation, r.diameter_reading, r.width_reading,
                                       "feature axis: the axis of the unrelated envelope over "
                                       f"z = {zz[0]:g} .. {zz[1]:g} (ASME Y14.5-2009 §1.3 'feature axis', from memory)",
                                       r.line)
            if (axis is not None and axis.deviation is not None and allowed is not None
                    and (axis.deviation <= allowed) != (r.deviation <= allowed)):
                notes.append(
                    f"the feature axis (axis of the unrelated envelope) needs {fmt(r.deviation)}, the derived "
                    f"median line {fmt(axis.deviation)}: they fall on opposite sides of the tolerance allowed "
                    f"{fmt(allowed)}. The axis verdict follows the derived median line (ISO 1101's extracted "
                    "median line; the section centres); an ASME reading on the feature axis would differ, "
                    "and the surface (gauge) reading is the functional check either way.")

    explanation = _explain(feature, std, units, axis_check, surface_check, sections, un_env, rel_env, ls, bonus,
                           allowed, axis)
    return InspectionResult(
        feature=feature, units=units, standard=std, source=source, source_file=source_file,
        points=points, point_section=point_section, radial_deviation=radial, sections=sections,
        median_line=median_line, unrelated=unrelated, related=related, least_material=lm_un,
        least_material_related=lm_rel,
        unrelated_ame=None if unrelated is None else unrelated.diameter,
        related_ame=None if related is None else related.diameter,
        local_sizes=None if local is None else (float(local[0]), float(local[1])),
        axis=axis, bonus_basis=bonus_basis, bonus=bonus, tolerance_allowed=allowed, virtual_condition=vc,
        uncertainty=U, formulas=tuple(formulas), size_check=size_check, local_check=local_check,
        envelope_check=env_check, axis_check=axis_check, surface_check=surface_check, least_squares=ls,
        explanation=tuple(explanation), notes=tuple(notes), warnings=tuple(warnings), feature_axis=feature_axis)


GOVERNS_ASME = ("ASME Y14.5-2009 §7.3.3.1 (from memory; the same words carry into Y14.5-2018's position "
                "section): where the axis and surface interpretations of a tolerance at MMC differ, the "
                "surface interpretation takes precedence. The surface (gauge) reading governs.")
GOVERNS_ISO = ("ISO 2692:2021 (from memory) states the maximum/least material requirement as a virtual "
               "condition the surface must not violate, so the surface (gauge) reading is the requirement.")


def _axis_difference(ls_axis, dml_axis, units: Units) -> str:
    """Mention the axis readings only where they differ, with a digit more if the usual
    precision would print them equal."""
    if ls_axis is None or dml_axis is None:
        return ""
    fmt = units.fmt
    if fmt(ls_axis) == fmt(dml_axis):
        if round(ls_axis, units.decimals + 1) == round(dml_axis, units.decimals + 1):
            return ""
        d = units.decimals + 1
        a, b = f"{ls_axis:.{d}f}", f"{dml_axis:.{d}f}"
    else:
        a, b = fmt(ls_axis), fmt(dml_axis)
    return f", and reads the axis of the fitted cylinder ({a}) instead of the section centres ({b})"


def _explain(feature, std, units, axis_check, surface_check, sections, un_env, rel_env, ls, bonus, allowed, axis):
    fmt = units.fmt
    out: list[str] = []
    hole = feature.kind is Kind.HOLE
    if axis_check.conforms is not None and surface_check.conforms is not None \
            and axis_check.conforms != surface_check.conforms:
        form = ""
        if sections:
            ds = [s.ls_diameter for s in sections]
            form = (f" The sections' least-squares diameters run from {fmt(min(ds))} to {fmt(max(ds))} "
                    f"(roundness up to {fmt(max(s.roundness for s in sections))}): the surface is not a "
                    "perfect cylinder.")
        if not axis_check.conforms:
            out.append(
                "The axis and surface readings disagree: the derived median line needs more zone than "
                f"t + bonus ({axis_check.detail}), yet the related envelope clears the virtual condition "
                f"({surface_check.detail}). The bonus is taken from the {'narrowest' if hole else 'widest'} "
                "place (the envelope), while the section centres follow the form error; a functional gauge "
                "feels only the surface." + form)
        else:
            out.append(
                "The axis and surface readings disagree: the derived median line stays within t + bonus "
                f"({axis_check.detail}), yet the related envelope violates the virtual condition "
                f"({surface_check.detail}). Form error (bend, lobing, taper) narrows the datum-held "
                "envelope more than the section centres show." + form)
        out.append(GOVERNS_ASME if std is Standard.ASME else GOVERNS_ISO)
        if std is Standard.ASME and feature.tolerance.characteristic is not Characteristic.POSITION:
            out.append(f"That clause is written for position; applying it to {feature.tolerance.characteristic.value} "
                       "at MMC is an extension by analogy (the virtual condition is the same kind of boundary).")
    if ls is not None and ls.axis_conforms is not None and axis_check.conforms is not None:
        basis = "mating" if feature.tolerance.material is not Material.LMC else "minimum material"
        if ls.axis_conforms != axis_check.conforms or (surface_check.conforms is not None
                                                      and ls.axis_conforms != surface_check.conforms):
            env_d = None if un_env is None else un_env.diameter
            out.append(
                f"A least-squares printout would say the axis {'conforms' if ls.axis_conforms else 'does not conform'}: "
                f"it takes the bonus from the least-squares size {fmt(ls.size)} (an average through the form "
                f"error) instead of the {basis} envelope {fmt(env_d)}, giving tolerance allowed "
                f"{fmt(ls.tolerance_allowed)} against {fmt(allowed)}"
                + _axis_difference(ls.axis_deviation, None if axis is None else axis.deviation, units)
                + ". That is why a gauge and a CMM printout can disagree.")
    return out


# ---------------------------------------------------------------- output


def _r(v):
    if v is None:
        return None
    return round(float(v), 9) + 0.0


def _env_json(e: Envelope | None):
    if e is None:
        return None
    return {"name": e.name, "diameter": _r(e.diameter), "axis_point_at_A": [_r(v) for v in e.point],
            "direction": [_r(v) for v in e.direction], "tilt_deg": _r(e.tilt_deg), "constraint": e.constraint}


def _check_json(c: Check | None):
    if c is None:
        return None
    return {"conforms": c.conforms, "outcome": c.outcome, "detail": c.detail,
            "values": [_r(v) for v in c.values], "low": _r(c.low), "high": _r(c.high)}


def inspection_to_json(res: InspectionResult) -> dict:
    """The ``inspect --json`` object (numbers in scene units; None where not evaluated)."""
    f = res.feature
    tol = f.tolerance
    ls = res.least_squares
    return {
        "feature": f.id,
        "kind": f.kind.value,
        "units": res.units.value,
        "standard": res.standard.value,
        "limits": list(f.limits),
        "tolerance": None if tol is None else tol.symbol(res.units),
        "source": res.source,
        "source_file": res.source_file,
        "n_points": None if res.points is None else int(len(res.points)),
        "unrelated_ame": _r(res.unrelated_ame),
        "related_ame": _r(res.related_ame),
        "unrelated_amme": None if res.least_material is None else _r(res.least_material.diameter),
        "related_amme": None if res.least_material_related is None else _r(res.least_material_related.diameter),
        "local_sizes": None if res.local_sizes is None else [_r(v) for v in res.local_sizes],
        "axis_deviation": _r(res.axis_deviation),
        "axis_diameter_reading": None if res.axis is None else _r(res.axis.diameter_reading),
        "axis_width_reading": None if res.axis is None else _r(res.axis.width_reading),
        "axis_method": None if res.axis is None else res.axis.method,
        "feature_axis_deviation": None if res.feature_axis is None else _r(res.feature_axis.deviation),
        "bonus_basis": res.bonus_basis,
        "bonus": _r(res.bonus),
        "tolerance_allowed": _r(res.tolerance_allowed),
        "virtual_condition": _r(res.virtual_condition),
        "uncertainty": _r(res.uncertainty),
        "decision_rule": ("ISO 14253-1 (U, k = 2)" if res.uncertainty is not None
                          else "measured values only (no U given)"),
        "size_conforms": res.size_conforms,
        "axis_conforms": res.axis_conforms,
        "surface_conforms": res.surface_conforms,
        "decisions": {
            "size": _check_json(res.size_check),
            "local_sizes": _check_json(res.local_check),
            "envelope": _check_json(res.envelope_check),
            "axis": _check_json(res.axis_check),
            "surface": _check_json(res.surface_check),
        },
        "envelopes": {
            "unrelated": _env_json(res.unrelated),
            "related": _env_json(res.related),
            "unrelated_minimum_material": _env_json(res.least_material),
            "related_minimum_material": _env_json(res.least_material_related),
        },
        "median_line": None if res.median_line is None else [[_r(v) for v in p] for p in res.median_line],
        "sections": [
            {"label": s.label, "z": _r(s.z), "n": s.n, "ls_centre": [_r(v) for v in s.ls_centre],
             "ls_diameter": _r(s.ls_diameter), "mating_centre": [_r(v) for v in s.mating_centre],
             "mating_diameter": _r(s.mating_diameter), "local_min": _r(s.local_min),
             "local_max": _r(s.local_max), "roundness": _r(s.roundness)}
            for s in res.sections
        ],
        "least_squares": None if ls is None else {
            "size": _r(ls.size), "cylinder": _env_json(ls.cylinder), "axis_deviation": _r(ls.axis_deviation),
            "bonus": _r(ls.bonus), "tolerance_allowed": _r(ls.tolerance_allowed),
            "size_conforms": ls.size_conforms, "axis_conforms": ls.axis_conforms, "formulas": list(ls.formulas),
        },
        "formulas": list(res.formulas),
        "explanation": list(res.explanation),
        "notes": list(res.notes),
        "warnings": list(res.warnings),
    }


def _word(c: Check) -> str:
    return {True: "CONFORMS", False: "FAILS", None: "n/a"}[c.conforms]


def render_inspection(res: InspectionResult, title: str = "") -> str:
    """Readable summary of an inspection (what ``matezone inspect`` prints, without the caution)."""
    from .readout import STANDARD_NAME, feature_heading

    u = res.units
    fmt = u.fmt
    f = res.feature
    out = []
    if title:
        out.append(title)
    out.append(f"units: {u.value}   standard: {STANDARD_NAME[res.standard]}")
    out.append(feature_heading(analyse_feature(f, res.standard), u))
    if res.source == "points":
        P = res.points
        out.append(f"measured: {len(P)} points in {len(res.sections)} sections from {res.source_file}, "
                   f"z = {fmt(P[:, 2].min())} .. {fmt(P[:, 2].max())}")
    else:
        out.append(f"measured: values typed in [feature.measured] of {res.source_file or 'the scene'}")
    out.append("")
    if res.sections:
        rows = [("section", "z", "LS ⌀", "mating ⌀" if True else "", "local min", "local max", "roundness")]
        for s in res.sections:
            rows.append((s.label, fmt(s.z), fmt(s.ls_diameter), fmt(s.mating_diameter), fmt(s.local_min),
                         fmt(s.local_max), fmt(s.roundness)))
        w = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
        for r in rows:
            out.append("  " + "  ".join(c.rjust(w[i]) if i else c.ljust(w[i]) for i, c in enumerate(r)))
        out.append(f"  (mating circle: {'largest inscribed' if f.kind is Kind.HOLE else 'smallest circumscribed'};"
                   " local sizes: two-point, through the LS centre)")
        out.append("")
    envs = [e for e in (res.unrelated, res.related, res.least_material, res.least_material_related) if e is not None]
    if res.least_squares is not None and res.least_squares.cylinder is not None:
        envs.append(res.least_squares.cylinder)
    if envs:
        out.append("envelopes")
        w = max(len(e.name) for e in envs)
        for e in envs:
            ax = "" if e.constraint == "typed value" else (
                f"   axis at A ({fmt(e.point[0])}, {fmt(e.point[1])}), tilt {e.tilt_deg:.5f} deg; {e.constraint}")
            out.append(f"  {e.name:<{w}}  ⌀{fmt(e.diameter)}{ax}")
        out.append("")
    if res.axis is not None:
        a = res.axis
        out.append("axis")
        out.append(f"  {a.method}")
        parts = []
        if a.diameter_reading is not None:
            parts.append(f"⌀ reading {fmt(a.diameter_reading)}")
        if a.width_reading is not None:
            parts.append(f"width reading {fmt(a.width_reading)}")
        zone = f.tolerance.zone.value if f.tolerance else ""
        out.append(f"  {', '.join(parts)}; the tolerance's {zone} zone uses {fmt(a.deviation)}")
        fa = res.feature_axis
        if fa is not None and fa.deviation is not None:
            out.append(f"  beside it, {fa.method}: {zone} zone {fmt(fa.deviation)} (shown, not used for the verdict)")
        out.append("")
    if res.formulas:
        out.append(f"bonus basis: {res.bonus_basis} envelope"
                   + (" (ASME Y14.5-2009 and later, from memory)" if res.bonus_basis == "unrelated" else
                      " (datum-related; option)"))
        out += [f"  {x}" for x in res.formulas]
        out.append("")
    dec = (f"U = {fmt(res.uncertainty)} (k = 2), ISO 14253-1 decision rule" if res.uncertainty is not None
           else "no uncertainty U given: decided on the measured values alone")
    out.append(f"verdicts ({dec})")
    for c in (res.size_check, res.axis_check, res.surface_check):
        out.append(f"  {c.name:<8} {_word(c):<9} {c.detail}   [{c.outcome}]")
    if res.envelope_check is not None and res.size_check.conforms is not None:
        out.append(f"           size = {res.local_check.name} and {res.envelope_check.name}")
    out.append("")
    ls = res.least_squares
    if ls is not None:
        out.append("least squares (the usual CMM default), side by side")
        out.append(f"  size: LS ⌀{fmt(ls.size)} vs {'mating' if res.unrelated else ''} envelope "
                   f"⌀{fmt(res.unrelated_ame)}; {'within' if ls.size_conforms else 'outside'} the limits")
        out += [f"  {x}" for x in ls.formulas[1:]]
        if ls.axis_conforms is not None:
            out.append(f"  LS axis verdict: {'CONFORMS' if ls.axis_conforms else 'FAILS'} "
                       f"({fmt(ls.axis_deviation)} {'<=' if ls.axis_conforms else '>'} {fmt(ls.tolerance_allowed)})")
        out.append("")
    for e in res.explanation:
        out.append(e)
    if res.explanation:
        out.append("")
    out += [f"note: {n}" for n in res.notes]
    out += [f"warning: {w}" for w in res.warnings]
    return "\n".join(out).rstrip() + "\n"
