"""Judge a produced part: from inspection values typed into the scene or from measured points.

For one feature of size it gives the actual mating envelopes (unrelated: any orientation;
related: held to datum A as the tolerance requires), both axis readings (the feature axis, i.e.
the axis of the unrelated envelope, and the derived / extracted median line: the centres of
sections normal to the associated least-squares axis), the bonus and tolerance allowed, and
three readings, each with its ISO 14253-1 outcome (:mod:`geom.conformance`) when an expanded
uncertainty U (k = 2) is given:

* size: local two-point sizes within the limits and, where the envelope applies (ASME Rule #1
  or ISO (E)), the unrelated mating envelope not beyond MMC;
* axis: the governing axis reading within the tolerance allowed (t + bonus). Under ASME,
  position and orientation apply to the feature axis; the median line governs straightness
  only. Under ISO the extracted median line governs (ISO 1101);
* surface: the related envelope does not violate the virtual condition (what a functional
  gauge checks).

One overall verdict (:func:`geom.conformance.part_verdict`) combines the readings that govern:
size and surface where a modifier (MMC/LMC) applies, size and axis otherwise. A reading that
does not govern and disagrees is a labelled note.

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
... local_sizes = [8.005, 8.012]
... ''')
>>> r = inspect_feature(sc, "b")
>>> round(r.tolerance_allowed, 6), r.axis_conforms, r.surface_conforms, r.size_conforms
(0.019, True, True, True)
>>> r.verdict.headline
'PART CONFORMS: size and surface readings conform'
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from . import fitting as F
from .analysis import analyse_feature, term, tolerance_allowed_derived
from .conformance import (
    Check, Outcome, PartVerdict, combine, decide, not_evaluated, part_verdict, readings_disagree, verdict_word,
    with_detail,
)
from .boundaries import bonus_max as _bonus_max
from .boundaries import virtual_condition
from .model import (
    Characteristic, Feature, Kind, Material, Scene, Standard, Units, Zone, datum_problem, envelope_applies,
)
from .pointsfile import PointCloud, PointsError, read_points

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
class AxisReading:
    """How much zone the derived median line needs."""

    deviation: float | None  # reading for the tolerance's own zone shape
    diameter_reading: float | None
    width_reading: float | None
    method: str  # what was measured and how
    line: np.ndarray  # (k, 3) points the reading was taken on
    basis: str = "median line"  # "median line" (derived / extracted median line) or "feature axis"


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
    # both axis readings: the axis of the unrelated envelope (ASME's "feature axis") and the
    # derived / extracted median line; ``axis`` is the one that governs (``axis_governs`` says why)
    feature_axis: AxisReading | None = None
    median_axis: AxisReading | None = None
    other_axis_check: Check | None = None  # the reading that does not govern, judged the same way
    axis_governs: str = ""
    verdict: PartVerdict | None = None  # the one overall verdict of the feature
    section_increases: tuple[float, ...] | None = None  # straightness at a modifier: per section

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


def _axis_reading(feature: Feature, centres: np.ndarray, line_fit, standard: Standard = Standard.ASME
                  ) -> AxisReading | None:
    """Zone the derived median line needs: diameter and width readings; the tolerance's own
    zone shape gives ``deviation``."""
    tol = feature.tolerance
    if tol is None:
        return None
    ch = tol.characteristic
    at = np.asarray(feature.at, float)
    pts = centres
    dml = "extracted median line" if standard is Standard.ISO else "derived median line"
    how = f"{dml}: least-squares centres of {len(centres)} sections (normal to the associated axis)"
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


def _axis_frame(x, z0: float) -> tuple[np.ndarray, np.ndarray]:
    """Rotation R (rows: e1, e2, axis direction) and origin of the frame of the axis
    ``x = (a, b, u, v)``: datum-frame points P have axis-frame coordinates (P - p0) @ R.T."""
    d = F.axis_direction_unit(x)
    e1 = np.array([1.0, 0.0, 0.0]) - d[0] * d
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(d, e1)
    p0 = np.array([float(x[0]), float(x[1]), z0])
    return np.vstack([e1, e2, d]), p0


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
    return _envelope(what, x, z0, r, cons)


# ---------------------------------------------------------------- main entry


def _load_points(scene: Scene, feature: Feature, points, sections) -> PointCloud | None:
    if points is None:
        m = feature.measured
        if m is None or m.points is None:
            return None
        base = (Path(scene.source).parent if scene.source else Path.cwd()).resolve()
        path = Path(m.points)
        full = (path if path.is_absolute() else base / path).resolve()
        where = f'{scene.source or "scene"}: feature "{feature.id}".measured.points'
        if not full.is_relative_to(base):
            # a scene must not make the program read (and echo lines of) an arbitrary file
            raise InspectError(f"{where}: expected a CSV file inside the scene's folder {base}, got "
                               f"{m.points!r}; give a file elsewhere explicitly with --points")
        try:
            return read_points(full)
        except PointsError as e:
            raise InspectError(f"{where}: {e}") from None
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
    why = datum_problem(feature.tolerance)
    if why:
        raise InspectError(f"{scene.source or 'scene'}: feature {feature.id!r}: cannot judge the tolerance: {why}")
    pc = _load_points(scene, feature, points, sections)
    if pc is not None:
        try:
            return _from_points(scene, feature, pc, bonus_basis)
        except (np.linalg.LinAlgError, FloatingPointError, OverflowError) as e:
            raise InspectError(f"{pc.file}: the points do not determine a cylinder ({e}); expected rings of "
                               "points around the feature at several heights") from None
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
    # a first least-squares line through the centres of the rings as measured starts the fits
    try:
        rough = np.array([[*F.ls_circle(P[g, :2], iterations=4)[:2], z] for g, z in zip(groups, zs)])
    except F.FitError as e:
        raise InspectError(f"{file}: {e}") from None
    z0 = float(P[:, 2].mean())
    x_ls, r_ls = F.ls_cylinder(P, _line_through(rough, z0), z0)
    # sections normal to the axis of the associated (least-squares) cylinder (ISO 14405-1 local
    # sizes, ISO 17450-3 / ISO 1101 median line): each ring is taken in that axis's frame, so a
    # perfect cylinder gives its true diameter however it is tilted
    R, p0 = _axis_frame(x_ls, z0)
    Q = (P - p0) @ R.T
    secs = []
    for g, lab, z in zip(groups, labels, zs):
        try:
            sq = _section(Q[g, :2], float(Q[g, 2].mean()), lab, hole)
        except F.FitError as e:
            raise InspectError(f"{file}: section {lab} (z = {units.fmt(z)}): {e}") from None
        c3 = np.array([*sq.ls_centre, sq.z]) @ R + p0
        m3 = np.array([*sq.mating_centre, sq.z]) @ R + p0
        secs.append(replace(sq, z=float(c3[2]), ls_centre=(float(c3[0]), float(c3[1])),
                            mating_centre=(float(m3[0]), float(m3[1]))))
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
    centres = np.array([[*s.ls_centre, s.z] for s in secs])

    # cylinders: least squares, unrelated and related envelopes
    ls_env = _envelope("least-squares cylinder", x_ls, z0, r_ls, "any orientation (Gaussian fit)")
    radial = F.axis_distances(P, x_ls, z0) - r_ls
    std = scene.standard
    pos = tol is not None and tol.characteristic is Characteristic.POSITION
    x_un, r_un = F.minimax_cylinder(P, x_ls, z0, inscribed=hole)
    unrelated = _envelope(envelope_name(std, hole, False, False), x_un, z0, r_un, "any orientation")
    related = _related(feature, P, x_un, z0, hole, envelope_name(std, hole, True, False, pos))
    lm_un = lm_rel = None
    if tol is not None and tol.material is Material.LMC:
        x_lm, r_lm = F.minimax_cylinder(P, x_ls, z0, inscribed=not hole)
        lm_un = _envelope(envelope_name(std, hole, False, True), x_lm, z0, r_lm, "any orientation")
        lm_rel = _related(feature, P, x_lm, z0, not hole, envelope_name(std, hole, True, True, pos))
    axis = _axis_reading(feature, centres, _line_through(centres, 0.0), scene.standard)
    local = (min(s.local_min for s in secs), max(s.local_max for s in secs))
    U = feature.measured.uncertainty if feature.measured else None
    if feature.measured is not None and any(
            getattr(feature.measured, k) is not None for k in ("size", "related_size", "axis_deviation", "axis_bottom")):
        notes.append("typed [feature.measured] values are not used: the results come from the points")
    ls = _least_squares(scene, feature, ls_env, centres, axis)
    return _finish(scene, feature, bonus_basis, _Fit(
        "points", file, points=P, point_section=sec_index, radial=radial, sections=tuple(secs),
        median_line=centres, unrelated=unrelated, related=related, lm_un=lm_un, lm_rel=lm_rel, local=local,
        axis=axis, U=U, ls=ls, notes=tuple(notes), warnings=tuple(warnings)))


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
            axis = _axis_reading(feature, ends, fit, scene.standard)
            if axis is not None:
                axis = AxisReading(axis.deviation, axis.diameter_reading, axis.width_reading,
                                   axis.method.replace("least-squares centres of 2 sections (normal to the associated axis)",
                                                       "typed axis end points")
                                   .replace("the 2 section centres", "the typed axis end points"), axis.line)
    un = m.size
    rel = m.related_size
    hole = feature.kind is Kind.HOLE
    if (rel is None and un is not None and axis is not None and axis.deviation is not None and tol is not None
            and tol.material is Material.MMC and tol.datums and not tol.projected):
        rel = un - axis.deviation if hole else un + axis.deviation
        notes.append("no related_size typed: related envelope estimated as size " + ("-" if hole else "+")
                     + " axis deviation (perfect form assumed), so axis and surface readings agree by construction")
    std = scene.standard
    pos = tol is not None and tol.characteristic is Characteristic.POSITION
    mk = lambda name, d: None if d is None else Envelope(name, d, (*feature.at, 0.0), (0.0, 0.0, 1.0), "typed value")
    unrelated = mk(envelope_name(std, hole, False, False), un)
    related = mk(envelope_name(std, hole, True, False, pos), rel)
    lm_un = lm_rel = None
    if tol is not None and tol.material is Material.LMC:
        # typed sizes are read as the envelopes the modifier uses
        lm_un, lm_rel = mk(envelope_name(std, hole, False, True), un), mk(envelope_name(std, hole, True, True, pos), rel)
        notes.append("LMC modifier: the typed size and related_size are read as "
                     + ("actual minimum material envelopes" if std is Standard.ASME else
                        "minimum material side associated cylinders"))
    return _finish(scene, feature, bonus_basis, _Fit(
        "values", scene.source, median_line=None if axis is None or not len(axis.line) else axis.line,
        # under LMC the typed sizes are minimum material envelopes, not mating envelopes: the
        # envelope (which needs the mating envelope) is then not evaluated rather than judged on
        # the wrong size
        unrelated=None if lm_un is not None else unrelated, related=None if lm_rel is not None else related,
        lm_un=lm_un, lm_rel=lm_rel, local=m.local_sizes, axis=axis, U=m.uncertainty, notes=tuple(notes)))


def envelope_name(standard: Standard, hole: bool, related: bool, minimum_material: bool,
                  position: bool = False) -> str:
    """Name of a fitted envelope in the standard's own terms.

    ASME Y14.5: (un)related actual mating / minimum material envelope. ISO 14405-1 / ISO 5459:
    the associated cylinder, maximum inscribed (GX) or minimum circumscribed (GN), unconstrained
    or constrained in orientation (and location) by the datum."""
    if standard is Standard.ASME:
        return (f"{'related' if related else 'unrelated'} actual "
                f"{'minimum material' if minimum_material else 'mating'} envelope")
    inscribed = hole != minimum_material
    kind = "maximum inscribed (GX)" if inscribed else "minimum circumscribed (GN)"
    side = "minimum material side, " if minimum_material else ""
    held = ("located at the true position, normal to A" if position else "orientation constrained to A") \
        if related else "unconstrained"
    return f"associated cylinder, {side}{kind}, {held}"


def envelope_abbr(standard: Standard, hole: bool, minimum_material: bool) -> str:
    """Short symbol of the envelope size used in formulas: AME / AMME (ASME), GX / GN (ISO)."""
    if standard is Standard.ASME:
        return "AMME" if minimum_material else "AME"
    return "GX" if hole != minimum_material else "GN"


def _bonus(feature: Feature, env: float | None, standard: Standard, units: Units, basis_name: str,
           abbr: str = "AME", unrelated: bool = False):
    """(bonus, formula, note) earned by an envelope size; clamped to 0 .. bonus_max."""
    tol = feature.tolerance
    if tol is None:
        return None, "", None
    B = term("bonus", standard)[0]
    if tol.material is Material.RFS:
        return 0.0, f"{B} = 0 ({term('rfs', standard)[0]}: no modifier)", None
    if env is None:
        return None, "", f"no {basis_name} size: {B} not evaluated"
    hole = feature.kind is Kind.HOLE
    if tol.material is Material.MMC:
        ref, rn = feature.mmc, term("mmc", standard)[0]
        raw = env - ref if hole else ref - env
        sym = f"{abbr} - {rn}" if hole else f"{rn} - {abbr}"
        nums = (env, ref) if hole else (ref, env)
    else:
        ref, rn = feature.lmc, term("lmc", standard)[0]
        raw = ref - env if hole else env - ref
        sym = f"{rn} - {abbr}" if hole else f"{abbr} - {rn}"
        nums = (ref, env) if hole else (env, ref)
    bmax = _bonus_max(feature)
    val = min(max(raw, 0.0), bmax)
    note = None
    if raw < -SLACK:
        env_applies = envelope_applies(feature, standard) and tol.material is Material.MMC
        note = f"the {basis_name} is beyond the {rn} size: no {B}" + (
            f" (and the size violates the envelope at {rn})" if env_applies and unrelated else "")
    elif raw > bmax + SLACK:
        note = f"the {basis_name} is beyond the other size limit: {B} capped at {units.fmt(bmax)}"
    formula = f"{B} = {sym} = {units.fmt(nums[0])} - {units.fmt(nums[1])} = {units.fmt(raw)}"
    if abs(val - raw) > SLACK:
        formula += f" -> {units.fmt(val)}"
    return val, formula, note


def _local_increases(feature: Feature, sections) -> np.ndarray:
    """Per section, the increase its actual local sizes earn for straightness of the derived
    median line at MMC (LMC): the departure from MMC (LMC) of the local size nearest to it,
    clamped to 0 .. the size tolerance (ASME Y14.5, straightness of a derived median line at
    MMC: "as each actual local size departs from MMC an increase in the local tolerance equal to
    the amount of such departure is allowed", from memory). The local size nearest the limit
    gives the smallest increase, so the reading is on the safe side."""
    tol = feature.tolerance
    hole = feature.kind is Kind.HOLE
    lo = np.array([s.local_min for s in sections])
    hi = np.array([s.local_max for s in sections])
    if tol.material is Material.MMC:
        dep = lo - feature.mmc if hole else feature.mmc - hi
    else:
        dep = feature.lmc - hi if hole else lo - feature.lmc
    return np.clip(dep, 0.0, _bonus_max(feature))


def straightness_needed(centres: np.ndarray, increases: np.ndarray) -> tuple[float, int, np.ndarray]:
    """Smallest stated tolerance the median line needs when each section earns its own increase:
    min over straight lines L of max_i (2 dist(c_i, L) - increase_i). Returns (that value, the
    governing section, the line (a, b, u, v) at z = mean height)."""
    z0 = float(centres[:, 2].mean())
    x0 = _line_through(centres, z0)
    x, r = F.minimax_cylinder(centres, x0, z0, inscribed=False, offsets=0.5 * np.asarray(increases, float))
    d = F.axis_distances(centres, x, z0)
    k = int(np.argmax(2 * d - increases))
    return 2.0 * r, k, x


def _least_squares(scene: Scene, feature: Feature, cyl: Envelope, centres, axis: AxisReading | None):
    units, std = scene.units, scene.standard
    tol = feature.tolerance
    lo, hi = feature.limits
    size = cyl.diameter
    formulas = [f"least-squares cylinder ⌀{units.fmt(size)}, axis tilt {cyl.tilt_deg:.5f} deg"]
    dev = b = allowed = None
    axis_ok = None
    if tol is not None and axis is not None:
        if tol.characteristic is Characteristic.STRAIGHTNESS:
            # the usual printout: section centres against their least-squares line (not the
            # minimum zone): twice the largest distance of a centre from that line
            z0 = float(centres[:, 2].mean())
            xl = _line_through(centres, z0)
            dev = 2.0 * float(F.axis_distances(centres, xl, z0).max())
            how = f"section centres against their least-squares line: {units.fmt(dev)}"
        else:
            # the CMM evaluates the LS cylinder's axis over the feature (or the projected height)
            zz = np.array([-tol.projected, 0.0]) if tol.projected else np.array([0.0, feature.length])
            line = np.c_[[cyl.at_z(z) for z in zz], zz]
            r = _axis_reading(feature.with_(tolerance=replace(tol, projected=None)), line, None)
            dev = r.deviation
            how = f"axis of the least-squares cylinder: {units.fmt(dev)} over z = {units.fmt(zz[0])} .. {units.fmt(zz[1])}"
        b, bf, _ = _bonus(feature, size, std, units, "least-squares size", abbr="LS")
        allowed_d = tolerance_allowed_derived(feature, b or 0.0)
        allowed = allowed_d.value
        formulas += [how, bf, allowed_d.formula(units, std)]
        axis_ok = dev <= allowed + SLACK
    return LeastSquaresResult(cyl, size, dev, b, allowed, lo - SLACK <= size <= hi + SLACK, axis_ok, tuple(formulas))


def _line_reading(feature: Feature, env: Envelope, basis: str, method: str) -> AxisReading | None:
    """Zone reading of the straight axis of an envelope over the feature (or the projected height)."""
    tol = feature.tolerance
    zz = np.array([-tol.projected, 0.0]) if tol.projected else np.array([0.0, feature.length])
    line = np.c_[[env.at_z(z) for z in zz], zz]
    r = _axis_reading(feature, line, _line_through(line, 0.0))
    if r is None:
        return None
    return AxisReading(r.deviation, r.diameter_reading, r.width_reading,
                       f"{method} over z = {zz[0]:g} .. {zz[1]:g}", r.line, basis)


def governing_axis(feature: Feature, standard: Standard) -> tuple[str, str]:
    """(basis, why): which axis reading a tolerance applies to, by standard.

    ASME Y14.5 (definitions of feature axis and derived median line, from memory): position and
    orientation of a feature of size apply to its feature axis, the axis of the unrelated actual
    mating envelope (for LMC, of the actual minimum material envelope); the derived median line
    is toleranced only by straightness of a derived median line. ISO 1101: the tolerance applies
    to the extracted median line (centres of the sections normal to the associated axis)."""
    tol = feature.tolerance
    if tol is not None and tol.characteristic is Characteristic.STRAIGHTNESS:
        name = "derived median line" if standard is Standard.ASME else "extracted median line"
        return "median line", (f"straightness of the {name}: the tolerance applies to the section centres "
                               f"({'ASME Y14.5' if standard is Standard.ASME else 'ISO 1101'})")
    if standard is Standard.ASME:
        env = "actual minimum material envelope" if tol is not None and tol.material is Material.LMC \
            else "unrelated actual mating envelope"
        return "feature axis", ("ASME Y14.5: position and orientation of a feature of size apply to its feature "
                                f"axis, the axis of the {env}; the derived median line is toleranced only by "
                                "straightness of a derived median line")
    return "median line", ("ISO 1101: the tolerance applies to the extracted median line, the centres of "
                           "the sections normal to the associated cylinder's axis")


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


def _finish(scene: Scene, feature: Feature, bonus_basis: str, m: _Fit) -> InspectionResult:
    units, std = scene.units, scene.standard
    fmt = units.fmt
    tol = feature.tolerance
    hole = feature.kind is Kind.HOLE
    lo, hi = feature.limits
    U = m.U
    formulas: list[str] = []
    notes = list(m.notes)
    iso = std is Standard.ISO
    B = term("bonus", std)[0]
    if tol is not None and not tol.datums and bonus_basis == "related":
        notes.append("straightness has no datum: the related envelope is the unrelated one")
    lmc = tol is not None and tol.material is Material.LMC
    un_env = m.lm_un if lmc else m.unrelated
    rel_env = m.lm_rel if lmc else m.related
    if tol is not None and (tol.characteristic is Characteristic.STRAIGHTNESS or not tol.datums):
        rel_env = un_env
    basis_env = un_env if bonus_basis == "unrelated" else rel_env
    basis_name = envelope_name(std, hole, bonus_basis == "related", lmc,
                               tol is not None and tol.characteristic is Characteristic.POSITION)
    abbr = envelope_abbr(std, hole, lmc)
    straight_local = (tol is not None and tol.characteristic is Characteristic.STRAIGHTNESS
                      and tol.material is not Material.RFS)

    # ------------------------------------------------------------ bonus and tolerance allowed
    increases = None
    if straight_local and m.sections:
        increases = _local_increases(feature, m.sections)
        bonus = bform = bnote = None
    elif straight_local and m.local is not None:
        # typed local sizes: the local size nearest the limit earns the smallest increase
        ref = feature.mmc if tol.material is Material.MMC else feature.lmc
        near = min(m.local, key=lambda v: abs(v - ref))
        bonus = float(np.clip(abs(near - ref), 0.0, _bonus_max(feature)))
        rn = term("mmc" if tol.material is Material.MMC else "lmc", std)[0]
        bform = (f"{B} = |local size nearest {rn} - {rn}| = |{fmt(near)} - {fmt(ref)}| = {fmt(bonus)} "
                 "(straightness: the increase comes from the actual local sizes)")
        bnote = None
    elif straight_local:
        bonus, bform, bnote = None, "", "straightness at a modifier: no local sizes, so no increase is evaluated"
    else:
        bonus, bform, bnote = _bonus(feature, None if basis_env is None else basis_env.diameter, std, units,
                                     basis_name, abbr, unrelated=bonus_basis == "unrelated")
        if bform and tol.material is not Material.RFS:
            bform += f"  ({basis_name})"
    if bform:
        formulas.append(bform)
    if bnote:
        notes.append(bnote)
    allowed = None
    if increases is not None:
        needed, g, _ = straightness_needed(m.median_line, increases)
        bonus = float(increases[g])
        sec = m.sections[g]
        formulas.append(
            f"{B} per section = departure from {term('mmc' if tol.material is Material.MMC else 'lmc', std)[0]} of "
            f"the local size nearest it: {fmt(float(increases.min()))} .. {fmt(float(increases.max()))}; "
            f"governing section {sec.label}: {B} {fmt(bonus)}")
        d_allowed = tolerance_allowed_derived(feature, bonus)
        allowed = d_allowed.value
        formulas.append(d_allowed.formula(units, std) + f" (section {sec.label})")
        formulas.append(f"median line against a straight line, each section with its own {B}: "
                        f"t needed = max(2 r_i - {B}_i) = {fmt(needed)}")
    elif tol is not None and bonus is not None:
        d_allowed = tolerance_allowed_derived(feature, bonus)
        allowed = d_allowed.value
        formulas.append(d_allowed.formula(units, std))
    vc = virtual_condition(feature)
    fr = analyse_feature(feature, std)
    if vc is not None:
        formulas.append(fr.virtual_condition.formula(units, std))
    vcn = term(fr.virtual_condition.key, std)[0]

    # ------------------------------------------------------------ size
    if m.local is not None:
        local_check = decide("local sizes", m.local, lo, hi, U, units)
    else:
        local_check = not_evaluated("local sizes", "no local sizes")
    env_check = None
    if envelope_applies(feature, std):
        ename = "envelope (Rule #1)" if std is Standard.ASME else "envelope (E)"
        mm = term("mmc", std)[0]
        if m.unrelated is None:
            env_check = not_evaluated(ename, f"no unrelated mating size ({'AME' if not iso else 'GX/GN'})")
        else:
            c = decide(ename, (m.unrelated.diameter,), feature.mmc if hole else None,
                       None if hole else feature.mmc, U, units)
            what = "unrelated AME" if not iso else ("GX" if hole else "GN")
            env_check = with_detail(c, f"{what} {c.detail} ({mm})")
    size_check = combine("size", [local_check, env_check])

    # ------------------------------------------------------------ axis readings
    median = m.axis
    feature_axis = None
    if m.points is not None and un_env is not None and tol is not None and tol.datums:
        feature_axis = _line_reading(feature, un_env, "feature axis",
                                     f"feature axis: the axis of the {envelope_name(std, hole, False, lmc)}")
    basis, why_axis = governing_axis(feature, std) if tol is not None else ("median line", "")
    if m.source == "values":
        governing = None if median is None else replace(median, basis=basis)
        if median is not None and tol is not None and tol.characteristic is not Characteristic.STRAIGHTNESS:
            notes.append(f"the typed axis reading is taken as the {basis} reading, which governs here ({why_axis})")
    else:
        governing = feature_axis if basis == "feature axis" else median
    other = None
    if m.source == "points" and tol is not None and tol.characteristic is not Characteristic.STRAIGHTNESS:
        other = median if governing is feature_axis else feature_axis

    if tol is None:
        axis_check = not_evaluated("axis", "no geometric tolerance")
    elif increases is not None:
        c = decide("axis", (needed,), None, tol.value, U, units)
        axis_check = with_detail(c, f"t needed after each section's {B} {c.detail} (t)")
    elif governing is None or governing.deviation is None:
        axis_check = not_evaluated("axis", "no axis deviation")
    elif allowed is None:
        axis_check = not_evaluated("axis", f"no tolerance allowed (no envelope size for the {B})")
    else:
        c = decide("axis", (governing.deviation,), None, allowed, U, units)
        axis_check = with_detail(c, f"{governing.basis} {c.detail}")
    other_check = None
    if other is not None and other.deviation is not None and allowed is not None:
        c = decide("axis", (other.deviation,), None, allowed, U, units)
        other_check = with_detail(c, f"{other.basis} {c.detail}", name=f"{other.basis} (does not govern)")

    # ------------------------------------------------------------ surface (functional gauge)
    if tol is None:
        surface_check = not_evaluated("surface", "no geometric tolerance")
    elif tol.material is Material.RFS:
        mod = term("rfs", std)[0]
        surface_check = not_evaluated("surface", f"{mod}: no virtual condition; the tolerance applies to the axis only")
    elif tol.projected and m.points is None and governing is not None and governing.basis == "feature axis" \
            and governing.deviation is not None and allowed is not None:
        # typed values under ASME: the typed reading is the feature axis, the axis of the gauge pin
        # that fits, over the projected height: the same check as the surface reading from points
        c = decide("surface", (governing.deviation,), None, allowed, U, units)
        surface_check = with_detail(c, f"typed feature-axis reading (the axis of the gauge pin that fits) over "
                                       f"the projected height: {c.detail}")
    elif tol.projected:
        if un_env is None or m.points is None or allowed is None:
            surface_check = not_evaluated("surface", "projected zone: needs points or a typed feature-axis reading")
        else:
            r = _line_reading(feature, un_env, "feature axis", "")
            c = decide("surface", (r.deviation,), None, allowed, U, units)
            surface_check = with_detail(c, f"axis of the {envelope_name(std, hole, False, lmc)} (the gauge pin that "
                                           f"fits) extended over the projected height: {c.detail}")
            notes.append("projected zone: the surface reading takes the axis of the pin that fits the feature "
                         "through the projected height (common practice, no source)")
    elif rel_env is None:
        surface_check = not_evaluated("surface", "no related envelope size")
    else:
        low_side = (hole and not lmc) or (not hole and lmc)
        c = decide("surface", (rel_env.diameter,), vc if low_side else None, None if low_side else vc, U, units)
        if iso:
            what = "GX" if hole != lmc else "GN"
            what += " (unconstrained)" if tol.characteristic is Characteristic.STRAIGHTNESS else " (constrained to A)"
        else:
            what = "related AMME" if lmc else "related AME"
            if tol.characteristic is Characteristic.STRAIGHTNESS:
                what = what.replace("related", "unrelated")
        surface_check = with_detail(c, f"{what} {c.detail} ({vcn})")

    # ------------------------------------------------------------ the one verdict
    if tol is None:
        gov = ("size",)
        why = "no geometric tolerance: size only"
    elif tol.material is Material.RFS:
        gov = ("size", "axis")
        why = f"no modifier: the tolerance applies to the axis ({why_axis})" if why_axis else "no modifier"
    else:
        gov = ("size", "surface")
        mod = {Material.MMC: "(M)", Material.LMC: "(L)"}[tol.material]
        if iso:
            why = (f"{mod}: ISO 2692 states the requirement on the surface, which must not violate the {vcn}; "
                   "the median-line reading with its increase is shown beside it")
        else:
            why = (f"{mod}: the surface must not violate the virtual condition; where the axis and surface "
                   "interpretations differ, ASME Y14.5 gives the surface interpretation precedence")
    vnotes = []
    if readings_disagree(axis_check, surface_check):
        vnotes.append(f"Axis and surface readings disagree: axis {axis_check.detail} "
                      f"({axis_check.outcome_text}); surface {surface_check.detail} ({surface_check.outcome_text}). "
                      f"The {'surface' if 'surface' in gov else 'axis'} reading governs.")
    if other_check is not None and readings_disagree(other_check, axis_check):
        vnotes.append(f"The {other.basis} reading ({other_check.detail}) does not govern here: {why_axis}.")
    verdict = part_verdict(size_check, axis_check, surface_check, gov, why, vnotes)

    explanation = _explain(feature, std, units, axis_check, surface_check, m.sections, un_env, m.ls, allowed,
                           governing, other_check, gov)
    return InspectionResult(
        feature=feature, units=units, standard=std, source=m.source, source_file=m.source_file,
        points=m.points, point_section=m.point_section, radial_deviation=m.radial, sections=m.sections,
        median_line=m.median_line, unrelated=m.unrelated, related=m.related, least_material=m.lm_un,
        least_material_related=m.lm_rel,
        unrelated_ame=None if m.unrelated is None else m.unrelated.diameter,
        related_ame=None if m.related is None else m.related.diameter,
        local_sizes=None if m.local is None else (float(m.local[0]), float(m.local[1])),
        axis=governing, bonus_basis=bonus_basis, bonus=bonus, tolerance_allowed=allowed, virtual_condition=vc,
        uncertainty=U, formulas=tuple(formulas), size_check=size_check, local_check=local_check,
        envelope_check=env_check, axis_check=axis_check, surface_check=surface_check, least_squares=m.ls,
        explanation=tuple(explanation), notes=tuple(notes), warnings=tuple(m.warnings), feature_axis=feature_axis,
        median_axis=median if m.source == "points" else None, other_axis_check=other_check, axis_governs=why_axis, verdict=verdict,
        section_increases=None if increases is None else tuple(float(v) for v in increases))


def _axis_difference(ls_axis, dml_axis, units: Units) -> str:
    """Mention the axis readings only where they differ (with the digits that tell them apart)."""
    if ls_axis is None or dml_axis is None or abs(ls_axis - dml_axis) <= SLACK:
        return ""
    a, b = units.fmt_cmp(ls_axis, dml_axis)
    if a == b:
        return ""
    return f", and reads the axis of the fitted cylinder ({a}) instead of the governing axis reading ({b})"


def _spread(units: Units, what: str, vals) -> str:
    """"the X run from a to b" where a and b differ on paper, else "the X are all a"."""
    lo, hi = units.fmt_cmp(min(vals), max(vals))
    return f"{what} are all ⌀{lo}" if lo == hi else f"{what} run from ⌀{lo} to ⌀{hi}"


def _explain(feature, std, units, axis_check, surface_check, sections, un_env, ls, allowed, governing,
             other_check, gov):
    out: list[str] = []
    hole = feature.kind is Kind.HOLE
    B = term("bonus", std)[0]
    tol = feature.tolerance
    rel_word = "related envelope" if std is Standard.ASME else "orientation-constrained associated cylinder"
    if readings_disagree(axis_check, surface_check):
        form = ""
        if sections:
            rnd = units.fmt(max(s.roundness for s in sections))
            form = (f" The sections' least-squares diameters {_spread(units, '', [s.ls_diameter for s in sections]).strip()}"
                    f" (roundness up to {rnd}): the surface is not a perfect cylinder.")
            form = form.replace("diameters are all", "diameters are all").replace("diameters run", "diameters run")
        basis = governing.basis if governing is not None else "axis"
        if not axis_check.conforms:
            out.append(
                f"The axis and surface readings disagree: the {basis} needs more zone than t + {B} "
                f"({axis_check.detail}), yet the {rel_word} clears the {term('vc_MMC', std)[0] if tol.material is Material.MMC else term('vc_LMC', std)[0]} "
                f"({surface_check.detail}). The {B} is taken from the {'narrowest' if hole else 'widest'} "
                f"place ({'the envelope' if std is Standard.ASME else 'the associated cylinder'}), while the axis follows the form error; a functional gauge "
                "feels only the surface." + form)
        else:
            out.append(
                f"The axis and surface readings disagree: the {basis} stays within t + {B} "
                f"({axis_check.detail}), yet the {rel_word} violates the boundary "
                f"({surface_check.detail}). Form error (bend, lobing, taper) narrows the datum-held "
                "envelope more than the axis shows." + form)
        out.append(GOVERNS_ASME if std is Standard.ASME else GOVERNS_ISO)
        if std is Standard.ASME and tol.characteristic is not Characteristic.POSITION:
            out.append(f"ASME words that precedence for position; applying it to {tol.characteristic.value} "
                       "at a modifier is an extension by analogy (the virtual condition is the same kind of boundary).")
    if other_check is not None and readings_disagree(other_check, axis_check):
        what = "derived median line" if std is Standard.ASME else "extracted median line"
        if other_check.name.startswith("median"):
            out.append(
                f"A printout of the {what} (the section centres) would say the axis "
                f"{'conforms' if other_check.conforms else 'does not conform'} ({other_check.detail}); "
                f"under ASME Y14.5 that line is toleranced only by straightness, while "
                f"{tol.characteristic.value} applies to the feature axis ({axis_check.detail}).")
        else:
            out.append(
                f"The feature axis (axis of the unconstrained associated cylinder) would say the axis "
                f"{'conforms' if other_check.conforms else 'does not conform'} ({other_check.detail}); under ISO 1101 "
                f"the extracted median line governs ({axis_check.detail}).")
    if ls is not None and ls.axis_conforms is not None and axis_check.conforms is not None:
        env_word = ("mating" if tol.material is not Material.LMC else "minimum material") if std is Standard.ASME \
            else "associated cylinder"
        if std is Standard.ASME:
            env_word += " envelope"
        if ls.axis_conforms != axis_check.conforms or (surface_check.conforms is not None
                                                      and ls.axis_conforms != surface_check.conforms):
            env_d = None if un_env is None else un_env.diameter
            src = ("the least-squares size" if tol.characteristic is not Characteristic.STRAIGHTNESS
                   else "the least-squares size (not each local size)")
            out.append(
                f"A least-squares printout would say the axis {'conforms' if ls.axis_conforms else 'does not conform'}: "
                f"it takes the {B} from {src} {units.fmt(ls.size)} (an average through the form "
                f"error) instead of the {env_word} {units.fmt(env_d)}, giving tolerance allowed "
                f"{units.fmt(ls.tolerance_allowed)} against {units.fmt(allowed)}"
                + _axis_difference(ls.axis_deviation, None if governing is None else governing.deviation, units)
                + ". That is why a gauge and a CMM printout can disagree.")
    return out


GOVERNS_ASME = ("ASME Y14.5 (position, surface interpretation): where the axis and surface interpretations of a "
                "tolerance at MMC differ, the surface interpretation takes precedence. The surface (gauge) reading "
                "governs.")
GOVERNS_ISO = ("ISO 2692 states the maximum/least material requirement as a virtual size the surface must not "
               "violate, so the surface (gauge) reading is the requirement.")


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
    """A check: ``conforms`` is true/false only where proven (null otherwise), ``outcome`` one of
    the three ISO 14253-1 outcomes, ``evaluated`` false where the check could not be made."""
    if c is None:
        return None
    return {"conforms": c.conforms, "outcome": c.outcome.value, "evaluated": c.evaluated, "rule": c.rule,
            "outcome_text": c.outcome_text, "detail": c.detail,
            "values": [_r(v) for v in c.values], "low": _r(c.low), "high": _r(c.high)}


def _axis_json(a: AxisReading | None):
    if a is None:
        return None
    return {"basis": a.basis, "deviation": _r(a.deviation), "diameter_reading": _r(a.diameter_reading),
            "width_reading": _r(a.width_reading), "method": a.method}


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
        "median_line_deviation": None if res.median_axis is None else _r(res.median_axis.deviation),
        "axis_readings": {
            "governing": None if res.axis is None else res.axis.basis,
            "why": res.axis_governs,
            "feature_axis": _axis_json(res.feature_axis),
            "median_line": _axis_json(res.median_axis),
            "not_governing_check": _check_json(res.other_axis_check),
        },
        "verdict": None if res.verdict is None else {
            "outcome": None if res.verdict.outcome is None else res.verdict.outcome.value,
            "word": res.verdict.word, "headline": res.verdict.headline,
            "governing_checks": list(res.verdict.governing), "why": res.verdict.why,
            "notes": list(res.verdict.notes),
        },
        "section_increases": None if res.section_increases is None else [_r(v) for v in res.section_increases],
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
    readings = [a for a in (res.axis, res.median_axis if res.median_axis is not res.axis else None,
                            res.feature_axis if res.feature_axis is not res.axis else None) if a is not None]
    if readings:
        out.append("axis readings")
        zone = f.tolerance.zone.value if f.tolerance else ""
        for a in readings:
            parts = []
            if a.diameter_reading is not None:
                parts.append(f"⌀ reading {fmt(a.diameter_reading)}")
            if a.width_reading is not None:
                parts.append(f"width reading {fmt(a.width_reading)}")
            role = "GOVERNS" if a is res.axis else "shown, does not govern"
            out.append(f"  {a.basis} ({role}): {a.method}")
            out.append(f"    {', '.join(parts)}; the tolerance's {zone} zone uses {fmt(a.deviation)}")
        if res.axis_governs:
            out.append(f"  why: {res.axis_governs}")
        out.append("")
    if res.formulas:
        B = term("bonus", res.standard)[0]
        env = "envelope" if res.standard is Standard.ASME else "associated cylinder"
        out.append(f"{B} basis: {res.bonus_basis} {env}"
                   + (" (the default)" if res.bonus_basis == "unrelated" else " (datum-related; option)"))
        out += [f"  {x}" for x in res.formulas]
        out.append("")
    dec = (f"U = {fmt(res.uncertainty)} (k = 2), ISO 14253-1 decision rule" if res.uncertainty is not None
           else "no uncertainty U given: decided on the measured values alone")
    out.append(f"readings ({dec})")
    for c in (res.size_check, res.axis_check, res.surface_check):
        gov = "*" if res.verdict is not None and c.name in res.verdict.governing else " "
        out.append(f"  {gov}{c.name:<8} {verdict_word(c)[0]:<16} {c.detail}   [{c.outcome_text}]")
    if res.other_axis_check is not None:
        c = res.other_axis_check
        out.append(f"   {'':<8} {verdict_word(c)[0]:<16} {c.detail}   [{c.outcome_text}; does not govern]")
    if res.envelope_check is not None and res.size_check.evaluated:
        out.append(f"            size = {res.local_check.name} and {res.envelope_check.name}")
    if res.verdict is not None:
        v = res.verdict
        out.append(f"  (* governs: {v.why})")
        out.append("")
        out.append(f"VERDICT: {v.headline}")
        out += [f"  note: {n}" for n in v.notes]
    out.append("")
    ls = res.least_squares
    if ls is not None:
        out.append("least squares (the usual CMM default), side by side")
        out.append(f"  size: LS ⌀{fmt(ls.size)} vs {'mating envelope' if res.standard is Standard.ASME else 'associated cylinder'} "
                   f"⌀{fmt(res.unrelated_ame)}; {'within' if ls.size_conforms else 'outside'} the limits")
        out += [f"  {x}" for x in ls.formulas[1:]]
        if ls.axis_conforms is not None:
            a, b = u.fmt_cmp(ls.axis_deviation, ls.tolerance_allowed)
            out.append(f"  LS axis reading: {'within' if ls.axis_conforms else 'beyond'} the tolerance allowed "
                       f"({a} {'<=' if ls.axis_conforms else '>'} {b}); not a verdict")
        out.append("")
    for e in res.explanation:
        out.append(e)
    if res.explanation:
        out.append("")
    out += [f"note: {n}" for n in res.notes]
    out += [f"warning: {w}" for w in res.warnings]
    return "\n".join(out).rstrip() + "\n"
