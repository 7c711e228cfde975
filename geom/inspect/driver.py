"""The inspection driver: points or typed values in, :class:`InspectionResult` out."""

from __future__ import annotations

import math
import os
from dataclasses import replace
from pathlib import Path

import numpy as np

from .. import fitting as F
from ..model import (
    Characteristic, Feature, Kind, Material, Scene, Standard, Zone, datum_problem,
)
from ..pointsfile import PointCloud, PointsError, read_points
from .judge import _Fit, _finish
from .readings import (
    _axis_frame, _axis_reading, _envelope, _least_squares, _line_through, _related, _section,
    envelope_name, group_sections,
)
from .results import BONUS_BASES, AxisReading, Envelope, InspectError, InspectionResult

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
        notes.append(f"{'LMC' if std is Standard.ASME else '(L)'} modifier: the typed size and related_size are read as "
                     + ("actual minimum material envelopes" if std is Standard.ASME else
                        "minimum material side associated cylinders"))
    return _finish(scene, feature, bonus_basis, _Fit(
        "values", scene.source, median_line=None if axis is None or not len(axis.line) else axis.line,
        # under LMC the typed sizes are minimum material envelopes, not mating envelopes: the
        # envelope (which needs the mating envelope) is then not evaluated rather than judged on
        # the wrong size
        unrelated=None if lm_un is not None else unrelated, related=None if lm_rel is not None else related,
        lm_un=lm_un, lm_rel=lm_rel, local=m.local_sizes, axis=axis, U=m.uncertainty, notes=tuple(notes)))
