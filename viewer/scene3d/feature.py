"""One toleranced feature drawn in the datum frame: its zone, zone axis, worst-case actual axis,
surface at the produced size and boundaries (:func:`_feature_geometry`, which hands the mate and
clearance steps a :class:`FeatureGeometry`), the part round it, datum A with its symbol, and the
boundary labels. The feature and the datum are replayed pieces (:func:`.assemble.replayed`).

Surfaces round an axis are right circular cylinders about that axis cut by planes parallel to A
(so their ends sit on the part's faces); radii and lateral deviations are drawn exaggerated by
k about R0 (:class:`.values._Ex`), lengths along the axis are true.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pyvista as pv

from geom.analysis import SceneResult
from geom.boundaries import FeatureState
from geom.model import Characteristic, Feature, Kind
from geom.placement import AxisPlacement, worst_case_axis

from .. import style as S
from .assemble import _Built, replayed
from .primitives import _block_with_hole, _cage, _datum_plane, _plate, _points, _polyline, _tube
from .rings import _axis_at, _rings
from .text import _boundary_terms
from .values import N_PHI, Label, _Ex, _line, _surf


def _read_only(a: np.ndarray) -> np.ndarray:
    a.flags.writeable = False
    return a


@dataclass(frozen=True)
class FeatureGeometry:
    """What the later steps need of a drawn feature (shared between replays: read-only)."""

    place: AxisPlacement  # geom's worst-case axis of the state
    pts_true: np.ndarray  # its axis points, moved to the drawing centre (true)
    axis_true: np.ndarray  # the axis sampled over the feature's length (true)
    axis_draw: np.ndarray  # the same, drawn (lateral offsets x k)
    r_true: float  # produced radius
    r_draw: float  # produced radius as drawn
    rings_draw: np.ndarray  # the drawn surface's rings
    z: tuple[float, float]  # the feature's z range
    mname: str  # the mating-side boundary's name and size (None: there is none)
    mval: float | None
    oname: str  # the opposite boundary's name and size (None: there is none)
    oval: float | None
    tag: str  # "hole" or "pin"


@replayed
def _feature_geometry(b: _Built, res: SceneResult, f: Feature, st: FeatureState, ex: _Ex, centre,
                      primary: bool) -> FeatureGeometry:
    """Zone, zone axis, actual axis, surface, boundaries of one feature at the state ``st``,
    drawn about ``centre``; ``primary``: the feature the picture is about (its zone stronger,
    its surface drawn, its legend rows and notes given)."""
    u = res.scene.units
    tol = f.tolerance
    place: AxisPlacement = worst_case_axis(f, st, samples=2)
    # shift to the drawing centre (a mating pin is drawn in its hole, on the hole's true position)
    shift = np.array([centre[0] - f.at[0], centre[1] - f.at[1], 0.0])
    pts_true = place.points + shift
    z0, z1 = 0.0, f.length
    zs = np.linspace(z0, z1, 33 if place.bowed else 2)
    axis_true = _axis_at(pts_true, zs)
    axis_draw = ex.pts(axis_true)
    r_true = st.size / 2.0
    r_draw = ex.r(r_true)
    zc = (centre[0], centre[1])
    is_hole = f.kind is Kind.HOLE
    tag = "hole" if is_hole else "pin"

    # tolerance zone at the produced size
    if tol is not None and place.zone_size > 0:
        zz0, zz1 = place.zone_z
        if place.width_zone:
            w = ex.k * place.zone_size / 2.0
            half_y = max(r_draw, ex.R0) * 1.15
            mesh = pv.Box(bounds=(zc[0] - w, zc[0] + w, zc[1] - half_y, zc[1] + half_y, zz0, zz1))
            shape = f"slab {u.fmt(place.zone_size)} wide"
        else:
            ring = _rings(np.array([[zc[0], zc[1], zz0], [zc[0], zc[1], zz1]]), ex.k * place.zone_size / 2.0, N_PHI)
            mesh = _tube(ring, caps=True)
            shape = f"\u00d8{u.fmt(place.zone_size)}"
        proj = bool(tol.projected)
        colour = S.PROJECTED if proj else S.ZONE
        b.add("zone", f"{tag} zone", mesh, _surf(colour, S.PROJECTED_OPACITY if proj else
                                                  (S.ZONE_OPACITY if primary else S.ZONE_OPACITY * 0.6),
                                                  smooth_shading=not place.width_zone))  # a slab is flat
        where = "floating (orientation only), drawn at the basic location" if tol.characteristic in (
            Characteristic.PERPENDICULARITY, Characteristic.PARALLELISM, Characteristic.ANGULARITY,
            Characteristic.STRAIGHTNESS) else "at the true position"
        if primary:
            b.key("tolerance zone at the produced size" + (" (projected)" if proj else ""), colour, "zone")
            b.notes.append(f"{tag} zone {shape}: {where}")
        # zone axis, a little beyond both ends
        ext = 0.08 * (zz1 - zz0 if not proj else f.length + tol.projected)
        lo, hi = min(zz0, 0.0) - ext, max(zz1, f.length) + ext
        b.add("zone_axis", f"{tag} zone axis", _polyline(np.array([[zc[0], zc[1], lo], [zc[0], zc[1], hi]])),
              _line(S.ZONE_AXIS, 1.5))
        if primary:
            b.key("zone axis (true position / basic location)", S.ZONE_AXIS, "zone_axis")

    # the actual axis: inside the feature, and (projected zone) extended through the zone
    axis_colour = S.AXIS if is_hole else S.MATE_AXIS
    full = ex.pts(_axis_at(pts_true, np.linspace(min(place.zone_z[0], 0.0), max(place.zone_z[1], f.length),
                                                   33 if place.bowed else 2)))
    b.add("axis", f"{tag} axis", _polyline(ex.pts(_axis_at(pts_true, np.linspace(z0, z1, len(zs))))),
          _line(axis_colour, 4.0))
    if tol is not None and tol.projected:
        below = ex.pts(_axis_at(pts_true, np.array([-tol.projected, 0.0])))
        b.add("projected", f"{tag} axis extension", _polyline(below), _line(axis_colour, 4.0))
    ends = full[[0, -1]] if not place.bowed else ex.pts(_axis_at(pts_true, np.array([0.0, f.length / 2, f.length])))
    b.add("axis", f"{tag} axis ends", _points(ends), dict(color=axis_colour, point_size=11,
                                                               render_points_as_spheres=True, lighting=False))
    b.key(f"{tag} axis, worst case" + (" (bowed)" if place.bowed else " (tilted)"), axis_colour, "axis")

    # the surface at the produced size around the actual axis
    rings_draw = _rings(axis_draw, r_draw)
    if primary:
        b.add("surface", f"{tag} surface", _tube(rings_draw), _surf(S.SURFACE, S.SURFACE_OPACITY))
        b.key(f"{tag} surface at produced size \u00d8{u.fmt(st.size)}", S.SURFACE, "surface")

    # boundaries: perfect cylinders normal to A
    (mname, mval), (oname, oval) = _boundary_terms(res, f)
    phase = math.radians(st.direction_deg)  # generators in the plane of the tilt: the section's lines
    if mval is not None:
        cage = _cage(zc, ex.r(mval / 2.0), z0, z1, n_rings=3 if is_hole else 2, phase=phase,
                     n_gen=8 if is_hole else 4)
        b.add("vc", f"{tag} {mname}", cage, _line(S.VC, 2.5 if is_hole else 1.8))
        b.key(f"{mname}: worst-case mating boundary (perfect, normal to A)", S.VC, "vc")
    if oval is not None:
        cage = _cage(zc, ex.r(oval / 2.0), z0, z1, n_rings=2, phase=phase)
        b.add("rc", f"{tag} {oname}", cage, _line(S.RC, 2.0))
        b.key(f"{oname}: opposite worst-case boundary", S.RC, "rc")

    return FeatureGeometry(place=place, pts_true=_read_only(pts_true), axis_true=_read_only(axis_true),
                           axis_draw=_read_only(axis_draw), r_true=r_true, r_draw=r_draw,
                           rings_draw=_read_only(rings_draw), z=(z0, z1), mname=mname, mval=mval,
                           oname=oname, oval=oval, tag=tag)


def _part(b: _Built, f: Feature, g: FeatureGeometry, ex: _Ex, centre, primary: bool) -> float:
    """Block around a hole (its hole walls are the surface layer) or a plate under a pin."""
    half = 1.3 * max(ex.R0, g.r_draw) + 0.45 * ex.R0
    if f.kind is Kind.HOLE:
        rings = g.rings_draw
        mesh = _block_with_hole(rings[0], rings[-1], centre, half, g.z[0], g.z[1])
        b.add("part", "hole part", mesh, _surf(S.PART, S.PART_OPACITY, smooth_shading=False))
        b.key("part (translucent)", S.PART, "part")
    else:
        t = 0.22 * f.length
        b.add("part", "pin part", _plate(centre, half, -t, 0.0),
              _surf(S.PART, S.PART_OPACITY * (1.0 if primary else 0.7), smooth_shading=False))
        b.key("part (translucent)", S.PART, "part")
    return half


def _symbol_side(direction_deg: float) -> np.ndarray:
    """Where the datum feature symbol stands: along the tilt direction, a little towards the
    cameras (so the section and iso views both show it beside the part)."""
    phi = math.radians(direction_deg)
    return -np.array([math.cos(phi), math.sin(phi), 0.0]) - 0.3 * np.array([-math.sin(phi), math.cos(phi), 0.0])


@replayed
def _datum(b: _Built, f: Feature, centre, half: float, length: float, view_side: np.ndarray) -> None:
    """Datum plane A (z = 0 in the drawing frame) and the datum feature symbol."""
    tol = f.tolerance
    letter = tol.datums[0] if tol is not None and tol.datums else "A"
    size = 1.55 * half
    dz = -0.004 * length  # just under the part's face, so the two do not fight for the pixels
    plane = _datum_plane(float(centre[0]), float(centre[1]), dz, size)
    b.add("datum", "datum plane", plane, _surf(S.DATUM, S.DATUM_OPACITY, smooth_shading=False, specular=0.0))
    # datum feature symbol: a filled triangle on the plane, a leader, the letter in a frame
    d = view_side / np.linalg.norm(view_side)
    p = np.array([centre[0], centre[1], dz]) + d * (half + 0.45 * (size - half))
    side = np.array([-d[1], d[0], 0.0])
    tri_h = 0.10 * size
    tri = np.array([p - side * tri_h * 0.6, p + side * tri_h * 0.6, p + np.array([0, 0, tri_h])])
    b.add("datum", "datum triangle", pv.PolyData(tri, faces=[3, 0, 1, 2]),
          dict(color=S.DATUM, lighting=False))
    top = p + np.array([0, 0, 0.22 * max(length, size)])
    b.add("datum", "datum leader", _polyline(np.array([p + np.array([0, 0, tri_h]), top])), _line(S.DATUM, 2.0))
    b.labels.append(Label(tuple(top), f" {letter} ", S.TEXT, 22, layer="datum"))
    b.key(f"datum plane {letter}", S.DATUM, "datum")


def _boundary_labels(b: _Built, res: SceneResult, g: FeatureGeometry, ex: _Ex, centre, direction_deg: float,
                     frac: float) -> None:
    """The boundary cages' names and sizes, at ``frac`` of the length (the opposite one higher),
    on the far side of the tilt plane."""
    u = res.scene.units
    phi = math.radians(direction_deg)
    v = np.array([-math.sin(phi), math.cos(phi), 0.0])
    zlen = g.z[1]
    if g.mval is not None:
        r = ex.r(g.mval / 2.0)
        p = np.array([centre[0], centre[1], zlen * frac]) + v * r
        b.labels.append(Label(tuple(p), f"{g.tag} {g.mname} \u00d8{u.fmt(g.mval)}", S.VC, 14, layer="vc"))
    if g.oval is not None:
        r = ex.r(g.oval / 2.0)
        p = np.array([centre[0], centre[1], zlen * 0.85]) + v * r
        b.labels.append(Label(tuple(p), f"{g.tag} {g.oname} \u00d8{u.fmt(g.oval)}", S.RC, 14, layer="rc"))
