"""The layers of a measured feature (:func:`.inspection.build_inspection_scene` calls them in
turn): the points coloured by radial deviation, the median line and the governing feature
axis, the fitted envelopes, the zone at the tolerance allowed, the virtual-condition boundary
and datum A under it all; and :class:`_Readings`, how the axis readings are worded.

A point's radial deviation is drawn x k about the drawn least-squares axis; axes, centres and
offsets x k laterally; lengths along the axis true. Every number shown is geom.inspect's.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pyvista as pv

from geom.analysis import SceneResult, term, tolerance_allowed_derived
from geom.model import Characteristic, Feature, Kind, Material, Standard, Zone

from .. import style as S
from .assemble import _Built
from .feature import _datum, _symbol_side
from .primitives import _cage, _dashed_cage, _points, _polyline, _tube
from .rings import _axis_at, _rings
from .text import _envelope_names
from .values import N_PHI, Label, _Ex, _line, _surf


def _frame(d) -> tuple[np.ndarray, np.ndarray]:
    """Unit vectors e1, e2 normal to the unit direction d (e1 from +x, as :func:`_rings`)."""
    ref = np.array([1.0, 0.0, 0.0])
    e1 = ref - (ref @ d) * d
    e1 /= np.linalg.norm(e1)
    return e1, np.cross(d, e1)


def _drawn_direction(ex: _Ex, d) -> np.ndarray:
    q = np.array([ex.k * d[0], ex.k * d[1], d[2]], dtype=float)
    return q / np.linalg.norm(q)


def _draw_points(ex: _Ex, P: np.ndarray, p0, d) -> np.ndarray:
    """Measured points drawn with the radial exaggeration about the axis (p0, unit d) they were
    fitted to (the least-squares cylinder's): each point's foot on that axis is drawn as the
    axis is (lateral offsets x k), its distance rho from the axis as R0 + k (rho - R0), its angle
    round the axis kept. So the drawn distance from the drawn axis exceeds the drawn cylinder's
    radius by exactly k x the radial deviation. k = 1 returns the points themselves."""
    p0 = np.asarray(p0, float)
    d = np.asarray(d, float)
    w = P - p0
    s = w @ d
    radial = w - s[:, None] * d
    rho = np.linalg.norm(radial, axis=1)
    e1, e2 = _frame(d)
    c, sn = radial @ e1, radial @ e2
    if ex.k == 1.0:
        return np.array(P, dtype=float, copy=True)
    foot = ex.pts(p0 + s[:, None] * d)
    dd = _drawn_direction(ex, d)
    f1, f2 = _frame(dd)
    scale = (ex.R0 + ex.k * (rho - ex.R0)) / np.where(rho > 0, rho, 1.0)
    return foot + (scale * c)[:, None] * f1 + (scale * sn)[:, None] * f2


def _env_axis(env, z: np.ndarray) -> np.ndarray:
    return np.array([[*env.at_z(float(t)), float(t)] for t in z])


def _side(phi: float, angle_deg: float) -> np.ndarray:
    """Unit vector on A at ``angle_deg`` from the tilt direction ``phi`` (radians) towards the
    kept half: label anchors on the walls near the cut plane, apart from each other in the top
    view."""
    a = phi + math.radians(angle_deg)
    return np.array([math.cos(a), math.sin(a), 0.0])


def _points_layer(b: _Built, insp, ex: _Ex, centre, u) -> dict | None:
    """The measured points, coloured by their true radial deviation; returns the scalar bar."""
    if insp.points is None or not len(insp.points):
        return None
    ls_cyl = insp.least_squares.cylinder if insp.least_squares is not None else None
    P = np.asarray(insp.points, float)
    if ls_cyl is not None:
        drawn = _draw_points(ex, P, ls_cyl.point, ls_cyl.direction)
    else:  # no fitted cylinder: exaggerate about the basic location, normal to A
        drawn = _draw_points(ex, P, (*centre, 0.0), (0.0, 0.0, 1.0))
    mesh = pv.PolyData(drawn)
    dev = np.asarray(insp.radial_deviation, float)
    mesh.point_data["radial_deviation"] = dev
    mesh.set_active_scalars("radial_deviation")
    m = float(np.abs(dev).max()) or 10.0 ** -(u.decimals + 1)
    title = f"radial deviation, {u.value}"
    style = dict(scalars="radial_deviation", cmap=S.deviation_colormap(), clim=(-m, m), point_size=7,
                 render_points_as_spheres=True, ambient=0.35, diffuse=0.75, specular=0.0,
                 show_scalar_bar=False, interpolate_before_map=True)
    b.add("points", "measured points", mesh, style)
    b.key(f"measured points: radial deviation from the LS cylinder (true, {u.value}; + outward)",
          S.DEVIATION_COLORS[-1], "points")
    return dict(title=title, clim=(-m, m), fmt=f"%+.{u.decimals + 1}f", n_labels=5)


@dataclass(frozen=True)
class _Readings:
    """The axis readings of an inspection as the picture words them: the governing one (geom's
    ``insp.axis``), the other one where it is shown ("does not govern"), and the readings and
    the tolerance allowed formatted together (``Units.fmt_cmp``: they are read against each
    other)."""

    governing: object
    other: object
    median: object  # the median-line reading (the governing one where it governs)
    shape: str  # "\u00d8" or "width "
    mline: str  # "derived median line" (ASME) or "extracted median line" (ISO)
    shown: dict  # "governing" / "other" / "allowed" -> text
    fmt: object

    @property
    def gov_basis(self) -> str | None:
        return None if self.governing is None else self.governing.basis

    def needs(self, r) -> str:
        key = "governing" if r is self.governing else "other" if r is self.other else None
        return f"needs {self.shape}{self.shown[key] if key in self.shown else self.fmt(r.deviation)}"

    def role_of(self, basis: str) -> str:
        if self.other is None:
            return ""
        return " (governs)" if basis == self.gov_basis else " (does not govern)"


def _readings(insp, std, u) -> _Readings:
    tol = insp.feature.tolerance
    governing = insp.axis
    gov_basis = None if governing is None else governing.basis
    other = None
    if gov_basis == "feature axis":
        other = insp.median_axis
    elif gov_basis == "median line":
        other = insp.feature_axis
    if other is not None and (other is governing or other.deviation is None):
        other = None
    dia = tol is not None and tol.zone is Zone.DIAMETER
    mline = ("extracted" if std is Standard.ISO else "derived") + " median line"
    compared = {"governing": None if governing is None else governing.deviation,
                "other": None if other is None else other.deviation, "allowed": insp.tolerance_allowed}
    compared = {key: val for key, val in compared.items() if val is not None}
    median = governing if gov_basis == "median line" else insp.median_axis
    return _Readings(governing=governing, other=other, median=median, shape="\u00d8" if dia else "width ",
                     mline=mline, shown=dict(zip(compared, u.fmt_cmp(*compared.values()))), fmt=u.fmt)


def _axis_layers(b: _Built, insp, ex: _Ex, rd: _Readings, v: np.ndarray) -> None:
    """The median line (always: section centres, a polyline with its points) and, where it
    governs (ASME position and orientation), the feature axis: the axis of the unrelated
    envelope, drawn and labelled as the governing axis."""
    f = insp.feature
    tol = f.tolerance
    z0, z1 = 0.0, f.length
    line = insp.median_line
    governing, median = rd.governing, rd.median
    if line is not None and len(line):
        dl = ex.pts(np.asarray(line, float))
        mcol = S.AXIS_NOT_GOVERNING if rd.gov_basis == "feature axis" else S.MEDIAN_LINE
        b.add("median_line", "median line", _polyline(dl), _line(mcol, 1.6))
        b.add("median_line", "median line points", pv.PolyData(dl.copy()),
              dict(color=mcol, point_size=6, render_points_as_spheres=True, lighting=False))
        b.key(f"{rd.mline} (section centres)" + rd.role_of("median line").replace(" (", ": ").rstrip(")"), mcol,
              "median_line")
        ax_line = None if median is None else np.asarray(median.line, float)
        if tol is not None and tol.projected and ax_line is not None and len(ax_line) >= 2:
            b.add("median_line", "median line extended into the projected zone", _polyline(ex.pts(ax_line)),
                  _line(S.MEDIAN_LINE, 2.0))
        top = dl[-1]
        txt = "median line"
        if median is not None and median.deviation is not None:
            txt += f": {rd.needs(median)}{rd.role_of('median line')}"
        b.labels.append(Label(tuple(top + np.array([0, 0, 0.05 * f.length]) + 0.08 * ex.R0 * v), txt,
                              S.TEXT if mcol == S.AXIS_NOT_GOVERNING else mcol, 14, layer="median_line"))
    if rd.gov_basis == "feature axis" and governing.line is not None and len(governing.line) >= 2:
        fl = np.asarray(governing.line, float)
        fl = fl[np.argsort(fl[:, 2])]
        zz = np.array([min(fl[0, 2], z0), max(fl[-1, 2], z1)])  # over the feature (and the projected zone)
        fa = ex.pts(_axis_at(fl, zz))
        b.add("axis", "feature axis", _polyline(fa), _line(S.FEATURE_AXIS, 5.0))
        b.add("axis", "feature axis ends", _points(fa), dict(color=S.FEATURE_AXIS, point_size=11,
                                                             render_points_as_spheres=True, lighting=False))
        env = insp.least_material if tol is not None and tol.material is Material.LMC and \
            insp.least_material is not None else insp.unrelated
        of = f" (axis of the {env.name})" if env is not None else ""
        b.key(f"feature axis{of}: governs", S.FEATURE_AXIS, "axis")
        txt = "feature axis" + (f": {rd.needs(governing)}" if governing.deviation is not None else "") + " (governs)"
        p = ex.pts(_axis_at(fl, np.array([0.12 * f.length])))[0]
        b.labels.append(Label(tuple(p + 0.10 * ex.R0 * v), txt, S.FEATURE_AXIS, 14, layer="axis"))


def _envelope_layers(b: _Built, insp, ex: _Ex, u, std, phi: float, labels_at) -> None:
    """The unrelated envelope (translucent surface) and the related one (dashed wireframe),
    named in the standard's terms; their labels take the next places of ``labels_at``
    ((height / length, angle from the tilt) pairs)."""
    f = insp.feature
    fmt = u.fmt
    hole = f.kind is Kind.HOLE
    zs = np.array([0.0, f.length])
    if insp.unrelated is not None:
        e = insp.unrelated
        long, short = _envelope_names(e, std, hole)
        rings = _rings(ex.pts(_env_axis(e, zs)), ex.r(e.diameter / 2.0))
        b.add("envelopes", "unrelated envelope", _tube(rings), _surf(S.ENVELOPE, 0.22, specular=0.0))
        b.key(f"{long} \u00d8{fmt(e.diameter)}", S.ENVELOPE, "envelopes")
        h, a = next(labels_at)
        p = ex.pts(np.array([[*e.at_z(h * f.length), h * f.length]]))[0] + _side(phi, a) * ex.r(e.diameter / 2.0)
        b.labels.append(Label(tuple(p), f"{short} \u00d8{fmt(e.diameter)}", S.TEXT, 14, layer="envelopes"))
    if insp.related is not None:
        e = insp.related
        long, short = _envelope_names(e, std, hole)
        axis_d = ex.pts(_env_axis(e, zs))
        b.add("envelopes", "related envelope", _dashed_cage(axis_d, ex.r(e.diameter / 2.0), phase=phi),
              _line(S.ENVELOPE_RELATED, 2.5))
        b.key(f"{long} \u00d8{fmt(e.diameter)}, dashed", S.ENVELOPE_RELATED, "envelopes")
        h, a = next(labels_at)
        p = ex.pts(np.array([[*e.at_z(h * f.length), h * f.length]]))[0] + _side(phi, a) * ex.r(e.diameter / 2.0)
        b.labels.append(Label(tuple(p), f"{short} \u00d8{fmt(e.diameter)}", S.ENVELOPE_RELATED, 14,
                              layer="envelopes"))


def _zone_layer(b: _Built, insp, ex: _Ex, u, std, zone_axis: np.ndarray, zone_where: str,
                v: np.ndarray) -> None:
    """The tolerance zone at the tolerance allowed, about ``zone_axis`` (:func:`_zone_placement`),
    with its axis and label."""
    f = insp.feature
    tol = f.tolerance
    fmt = u.fmt
    t = insp.tolerance_allowed
    proj = bool(tol.projected)
    colour = S.PROJECTED if proj else S.ZONE
    ad = ex.pts(zone_axis)
    if tol.zone is Zone.WIDTH:
        w = ex.k * t / 2.0
        half_y = ex.R0 * 1.15
        cx, cy = ad[0, 0], ad[0, 1]
        mesh = pv.Box(bounds=(cx - w, cx + w, cy - half_y, cy + half_y, ad[0, 2], ad[1, 2]))
        zshape = f"{fmt(t)} wide"
    else:
        mesh = _tube(_rings(ad, max(ex.k * t / 2.0, 1e-12), N_PHI), caps=True)
        zshape = f"\u00d8{fmt(t)}"
    b.add("zone", "zone (tolerance allowed)", mesh, _surf(colour, S.ZONE_OPACITY,
                                                           smooth_shading=tol.zone is not Zone.WIDTH))
    formula = (tolerance_allowed_derived(f, insp.bonus).formula(u, std) if insp.bonus is not None
               else f"tolerance allowed {fmt(t)}")
    b.key(f"tolerance zone {zshape}: {formula}" + (" (projected)" if proj else ""), colour, "zone")
    b.notes.append(f"zone {zshape}: {zone_where}")
    ext = 0.08 * (ad[1, 2] - ad[0, 2])
    za = _axis_at(ad, np.array([min(ad[0, 2], 0.0) - ext, max(ad[1, 2], f.length) + ext]))
    b.add("zone_axis", "zone axis", _polyline(za), _line(S.ZONE_AXIS, 1.5))
    b.key("zone axis (" + ("true position" if tol.characteristic is Characteristic.POSITION else "floating")
          + ")", S.ZONE_AXIS, "zone_axis")
    b.labels.append(Label(tuple(za[0] - v * (ex.k * t / 2.0 + 0.08 * ex.R0)), f"zone {zshape} allowed",
                          S.ZONE_AXIS, 14, layer="zone"))


def _vc_layer(b: _Built, res: SceneResult, insp, ex: _Ex, phi: float, labels_at) -> None:
    """The virtual condition boundary (the gauge), coaxial with the related envelope (normal to
    A; at the true position for position), else at the basic location."""
    f = insp.feature
    fmt = res.scene.units.fmt
    vc = insp.virtual_condition
    vname = term(res.features[f.id].virtual_condition.key, res.scene.standard)[0]
    ac = insp.related.at_z(0.0) if insp.related is not None else f.at
    ac = tuple(ex.pts(np.array([[ac[0], ac[1], 0.0]]))[0, :2])
    b.add("vc", f"{vname}", _cage(ac, ex.r(vc / 2.0), 0.0, f.length, n_rings=3, n_gen=8, phase=phi),
          _line(S.VC, 2.5))
    b.key(f"{vname} \u00d8{fmt(vc)}: the boundary a gauge checks (perfect, normal to A)", S.VC, "vc")
    h, a = next(labels_at)
    p = np.array([ac[0], ac[1], h * f.length]) + _side(phi, a) * ex.r(vc / 2.0)
    b.labels.append(Label(tuple(p), f"{vname} \u00d8{fmt(vc)}", S.VC, 14, layer="vc"))


def _datum_beyond(b: _Built, insp, ex: _Ex, direction_deg: float) -> None:
    """Datum A, drawn a little beyond the largest drawn radius (envelopes, points)."""
    f = insp.feature
    centre = f.at
    r_big = max([ex.R0] + [ex.r(e.diameter / 2) for e in (insp.unrelated, insp.related) if e is not None])
    if insp.points is not None and len(insp.points):
        r_big = max(r_big, float(np.hypot(*(b.layers["points"][0].mesh.points[:, :2] - np.array(centre)).T).max()))
    half = 1.1 * r_big + 0.2 * ex.R0
    _datum(b, f, centre, half, f.length, _symbol_side(direction_deg))


OUTSIDE = "median line outside the zone"
"""The name (layer "median_line") of the portions of the median line that leave the zone."""


def outside_runs(line: np.ndarray, zone_axis: np.ndarray, t: float, width: bool = False,
                 sub: int = 16) -> list[np.ndarray]:
    """The portions of the polyline ``line`` (k, 3) outside a zone of size ``t`` about
    ``zone_axis`` (2, 3): a cylinder of diameter ``t``, or with ``width`` the slab of width
    ``t`` normal to x. Each segment is sampled ``sub`` times, so a run starts and ends within
    1/sub of a segment of where the line crosses the zone's boundary; true coordinates.

    >>> ax = np.array([[0.0, 0, 0], [0, 0, 10]])
    >>> runs = outside_runs(np.array([[0.0, 0, 0], [0.02, 0, 10]]), ax, 0.02, sub=10)
    >>> [round(float(r[0, 2]), 3) for r in runs], round(float(runs[0][-1, 0]), 3)
    ([5.0], 0.02)
    """
    line = np.asarray(line, float)
    if len(line) < 2:
        return []
    s = np.linspace(0.0, 1.0, sub + 1)[:-1]
    pts = np.vstack([line[i] + np.outer(s, line[i + 1] - line[i]) for i in range(len(line) - 1)] + [line[-1:]])
    a, d = zone_axis[0], zone_axis[1] - zone_axis[0]
    d = d / np.linalg.norm(d)
    rel = pts - a
    if width:
        dist = np.abs(rel[:, 0])
    else:
        dist = np.linalg.norm(rel - np.outer(rel @ d, d), axis=1)
    h = t / 2.0
    out = dist > h * (1 + 1e-9)

    def cross(m: int, n: int) -> np.ndarray:  # where the line meets the boundary between samples m, n
        w = (h - dist[m]) / (dist[n] - dist[m])
        return pts[m] + w * (pts[n] - pts[m])

    runs, i = [], 0
    while i < len(pts):
        if not out[i]:
            i += 1
            continue
        j = i
        while j + 1 < len(pts) and out[j + 1]:
            j += 1
        run = ([cross(i - 1, i)] if i > 0 else []) + list(pts[i:j + 1]) + ([cross(j + 1, j)] if j + 1 < len(pts) else [])
        runs.append(np.array(run))
        i = j + 1
    return runs


def _outside_layer(b: _Built, insp, ex: _Ex, zone_axis: np.ndarray) -> None:
    """The portions of the median line outside the zone at the tolerance allowed, in the
    nonconformance colour over the (thin) median line, so the picture shows where it leaves."""
    tol = insp.feature.tolerance
    line = insp.median_line
    if tol is None or tol.projected or line is None or insp.tolerance_allowed is None:
        return
    runs = outside_runs(line, zone_axis, insp.tolerance_allowed, width=tol.zone is Zone.WIDTH)
    for r in runs:
        dr = ex.pts(r)
        if len(dr) >= 2:
            b.add("median_line", OUTSIDE, _polyline(dr), _line(S.ROLE_COLOUR["fail"], 5.0))
        else:
            b.add("median_line", OUTSIDE, pv.PolyData(dr.copy()),
                  dict(color=S.ROLE_COLOUR["fail"], point_size=9, render_points_as_spheres=True, lighting=False))
    if runs:
        b.key(OUTSIDE, S.ROLE_COLOUR["fail"], "median_line")


def _zone_placement(f: Feature, insp) -> tuple[np.ndarray | None, str]:
    """Axis (2, 3) of the tolerance zone (end points in the zone's z range) and where it is:
    at the true position for position; floating for orientation and straightness, placed where
    the axis reading put it (the smallest zone holding the points the reading was taken on)."""
    from geom import fitting as F

    tol = f.tolerance
    zz = (-tol.projected, 0.0) if tol.projected else (0.0, f.length)
    at = np.array(f.at, float)
    line = None if insp.axis is None or not len(insp.axis.line) else np.asarray(insp.axis.line, float)
    what = "median line" if insp.axis is None else insp.axis.basis  # the governing axis reading
    if tol.characteristic is Characteristic.POSITION or line is None:
        where = "at the true position" if tol.characteristic is Characteristic.POSITION else \
            "floating; drawn at the basic location (no median line)"
        return np.array([[*at, zz[0]], [*at, zz[1]]]), where
    if tol.characteristic is Characteristic.STRAIGHTNESS and tol.zone is Zone.DIAMETER and len(line) >= 3:
        z0 = float(line[:, 2].mean())
        A = np.c_[np.ones(len(line)), line[:, 2] - z0]
        (a, u), *_ = np.linalg.lstsq(A, line[:, 0], rcond=None)
        (b, v), *_ = np.linalg.lstsq(A, line[:, 1], rcond=None)
        x, _ = F.minimax_cylinder(line, np.array([a, b, u, v]), z0, inscribed=False)
        ends = np.c_[F.axis_point(x, z0, np.array(zz)), zz]
        return ends, "floating in any orientation, about the smallest cylinder holding the section centres"
    if tol.zone is Zone.WIDTH:
        cx = 0.5 * (line[:, 0].min() + line[:, 0].max())
        cy = float(line[:, 1].mean())
        normal = "normal to A" if tol.characteristic is not Characteristic.STRAIGHTNESS else "normal to A (drawn)"
        return np.array([[cx, cy, zz[0]], [cx, cy, zz[1]]]), f"floating, {normal}, centred on the {what}'s x range"
    cx, cy, _ = F.circumscribed_circle(line[:, :2]) if len(line) >= 2 else (*line[0, :2], 0.0)
    return (np.array([[cx, cy, zz[0]], [cx, cy, zz[1]]]),
            f"floating, normal to A, centred on the smallest circle holding the {what} seen along the axis")
