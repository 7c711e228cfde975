"""Readings taken on measured points: sections normal to the associated axis, axis readings
(median line and feature axis), envelopes, bonus, straightness increases, least squares."""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from .. import fitting as F
from ..analysis import term, tolerance_allowed_derived
from ..boundaries import bonus_max as _bonus_max
from ..model import (
    Characteristic, Feature, Kind, Material, Scene, Standard, Units, Zone, envelope_applies,
)
from ..pointsfile import PointCloud
from .results import SLACK, AxisReading, Envelope, LeastSquaresResult, SectionResult

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
