"""The 3D scene: a geom result plus a what-if state in, named meshes out; headless rendering.

Pure builders (no Qt): :func:`build_mate_scene`, :func:`build_feature_scene` and
:func:`build_inspection_scene` (a measured feature: points coloured by radial deviation, median
line, actual mating envelopes, zone at the tolerance allowed, virtual condition) return a frozen
:class:`Scene3D` of layers of PyVista meshes with their ``add_mesh`` styles, 3D labels, the
readouts printed on the picture, a legend and three cameras. :func:`add_to_plotter` puts a scene
into any ``pyvista.Plotter`` (the Qt window's ``QtInteractor`` is one); :func:`render_image`
writes an off-screen PNG.

Geometry (the datum frame of :mod:`geom.placement`): datum A is z = 0, the part occupies
0 <= z <= length, a projected zone lies at -projected <= z <= 0. Surfaces around an axis are
right circular cylinders about that axis, cut by planes parallel to A (so their ends sit on the
part's faces). Tolerances are far too small to see at true scale, so the drawing applies a
*radial exaggeration* k about the reference radius R0 (the hole's MMC radius): a lateral
deviation e of an axis from the zone axis is drawn as k*e and a radius r as R0 + k*(r - R0).
Zones, gaps, tilts and size differences all grow by k together and stay in proportion; lengths
along the axis are true. k = 1 draws true geometry. The clearance colouring is always computed
on the TRUE geometry (k = 1), whatever k the picture uses.

Clearance scalars: ``gap`` is the true local radial gap from each point of the mating pin's
surface to the hole's surface (negative: material overlap); ``clearance`` = 2 * gap, the
diametral clearance a uniform gap of that size would give, so its minimum over the surface is
the fit's worst-case clearance as :func:`geom.analysis.clearance_at` states it (hole opening
minus pin envelope, both normal to A), to second order in the tilt angle.
"""

from __future__ import annotations

import math
from collections import OrderedDict
from dataclasses import dataclass, field, replace
from functools import lru_cache
from typing import Any

import numpy as np
import pyvista as pv
from vtkmodules.util.numpy_support import numpy_to_vtk, numpy_to_vtkIdTypeArray, vtk_to_numpy
from vtkmodules.vtkCommonCore import vtkPoints
from vtkmodules.vtkCommonDataModel import vtkCellArray

from geom.analysis import (
    SceneResult, clearance_at, fits, mate_formula, mate_verdict, term, tolerance_allowed_derived,
)
from geom.boundaries import (
    FeatureState, bonus, effective_size, tolerance_allowed, tolerance_max, worst_case_state,
)
from geom.conformance import Outcome, readings_disagree, verdict_word
from geom.inspect import envelope_abbr
from geom.model import Characteristic, Feature, Kind, Material, Standard, Units, Zone
from geom.placement import AxisPlacement, worst_case_axis

from . import style as S
from .exaggeration import NICE, auto_exaggeration, nice_floor  # noqa: F401  (re-exported)

LAYERS = (
    "part",  # the part around the hole (block with the hole through it) / under the pin, translucent
    "datum",  # datum plane A and the datum feature symbol
    "zone",  # tolerance zone at the produced size
    "zone_axis",  # axis of the zone (true position, or the floating zone's axis)
    "axis",  # worst-case actual axes (and their entry/exit points); a measured feature's feature axis
    "surface",  # the feature's surface at the produced size around its actual axis
    "vc",  # the mating-side worst-case boundary: VC (MMVS) at MMC, IB/OB for RFS
    "rc",  # the opposite boundary: RC (hidden by default)
    "mate",  # the mating pin (or hole) at its own worst case, coloured by clearance
    "clearance",  # the tightest spot(s) and the gap there
    "projected",  # projected tolerance zone region: axis extension, mating part, fastener
    "points",  # measured points, coloured by radial deviation (inspection scenes)
    "median_line",  # derived median line: section centres, as a polyline with its points
    "envelopes",  # unrelated and related actual mating envelopes of the measured feature
    "labels",  # 3D text labels
    "readouts",  # numbers on the picture and the exaggeration caption
    "legend",  # colour legend and the clearance scalar bar
)
HIDDEN_BY_DEFAULT = frozenset({"rc"})
VIEWS = ("iso", "top", "section")

N_PHI = 96  # vertices round a surface (divisible by 8: vertices on +-x, +-y and the diagonals)
N_PHI_CAGE = 96  # vertices round a boundary ring (wireframe)
N_Z_MATE = 13  # rings along the mating surface (clearance colouring)
N_FINE = 2048  # samples round the ends when locating the tightest spot


# --------------------------------------------------------------------------- data


@dataclass(frozen=True)
class Layer:
    """One mesh of a layer, with the keyword arguments for ``Plotter.add_mesh``."""

    name: str
    mesh: pv.PolyData
    style: dict = field(default_factory=dict)


@dataclass(frozen=True)
class Label:
    """A 3D text label: anchor point (drawn coordinates), text, colour, size."""

    point: tuple[float, float, float]
    text: str
    colour: str = S.TEXT
    size: int = 15
    layer: str = "labels"
    justify: str = "left"  # which way the text runs from the point: "left" (text to the right) or "right"


Camera = tuple[tuple[float, float, float], tuple[float, float, float], tuple[float, float, float]]


@dataclass(frozen=True)
class Scene3D:
    title: str
    layers: dict[str, tuple[Layer, ...]]  # layer name -> meshes (only layers with content)
    labels: tuple[Label, ...]
    readouts: tuple[str, ...]  # the numbers on the picture, one line each
    legend: tuple[tuple[str, str], ...]  # (what it means, colour)
    cameras: dict[str, Camera]  # view -> (position, focal point, view up)
    exaggeration: float  # radial exaggeration k (1.0: true geometry)
    units: Units
    caption: str = ""  # "radial deviations x k" statement
    verdict: str = ""
    verdict_colour: str = S.TEXT
    clearance: float | None = None  # what-if worst clearance (true, diametral) in scene units
    tightest: float | None = None  # smallest 'clearance' scalar found on the surface (true)
    scalar_bar: dict | None = None  # title, clim of the clearance colouring
    legend_layers: tuple[str, ...] = ()  # layer each legend row belongs to
    parallel_scale: dict[str, float] = field(default_factory=dict)  # views drawn in parallel projection
    section: tuple[tuple[float, float, float], tuple[float, float, float]] = ((0, 0, 0), (0, 1, 0))  # origin, normal
    kind: str = "mate"  # "mate", "feature" or "inspection"
    feature_ids: tuple[str, ...] = ()
    states: dict[str, FeatureState] = field(default_factory=dict)
    notes: tuple[str, ...] = ()
    window_centre: tuple[float, float] = (0.26, 0.27)  # camera window centre: picture shifted left/down
    verdicts: tuple[tuple[str, str], ...] = ()  # (text, colour): verdict lines drawn under the readouts

    def meshes(self, layer: str) -> tuple[pv.PolyData, ...]:
        return tuple(item.mesh for item in self.layers.get(layer, ()))

    def find(self, layer: str, name: str) -> Layer:
        for item in self.layers.get(layer, ()):
            if item.name == name:
                return item
        raise KeyError(f"{layer}/{name}")


# --------------------------------------------------------------------------- exaggeration


@dataclass(frozen=True)
class _Ex:
    """The drawing transform: lateral deviations and radii exaggerated by k about (c, R0)."""

    k: float
    c: tuple[float, float]
    R0: float

    def pts(self, p: np.ndarray) -> np.ndarray:
        q = np.array(p, dtype=float, copy=True)
        q[..., 0] = self.c[0] + self.k * (q[..., 0] - self.c[0])
        q[..., 1] = self.c[1] + self.k * (q[..., 1] - self.c[1])
        return q

    def r(self, radius: float) -> float:
        return max(self.R0 + self.k * (radius - self.R0), 0.02 * self.R0)


# --------------------------------------------------------------------------- mesh helpers


def _axis_at(points: np.ndarray, z: np.ndarray) -> np.ndarray:
    """Axis points at heights z (linear interpolation / extrapolation of the polyline)."""
    zp = points[:, 2]
    out = np.empty((len(z), 3))
    for i in (0, 1):
        if len(zp) == 2:
            a, b = points[0, i], points[1, i]
            out[:, i] = a + (b - a) * (z - zp[0]) / (zp[1] - zp[0])
        else:
            out[:, i] = np.interp(z, zp, points[:, i])
    out[:, 2] = z
    return out


def _unit_circle(n_phi: int) -> np.ndarray:
    """(n_phi, 2) read-only array of (cos phi, sin phi), phi = 2 pi j / n_phi."""
    cs = _UNIT_CIRCLES.get(n_phi)
    if cs is None:
        phi = 2.0 * np.pi * np.arange(n_phi) / n_phi
        cs = np.column_stack((np.cos(phi), np.sin(phi)))
        cs.flags.writeable = False
        _UNIT_CIRCLES[n_phi] = cs
    return cs


_UNIT_CIRCLES: dict[int, np.ndarray] = {}


def _ring_frame(axis: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(U, V), each (nz, 3): the point at angle phi of the unit-radius ring of :func:`_rings` at
    ``axis[i]`` is ``axis[i] + cos(phi) U[i] + sin(phi) V[i]``. U and V are the unit vectors e1, e2
    normal to the axis (e1 from +x), each slid along the axis back into the plane z = axis z."""
    T = np.gradient(axis, axis=0) if len(axis) > 2 else np.repeat((axis[1] - axis[0])[None], len(axis), 0)
    T = T / np.linalg.norm(T, axis=1)[:, None]
    e1 = -T[:, 0:1] * T  # ref - (T . ref) T with ref = +x
    e1[:, 0] += 1.0
    e1 /= np.linalg.norm(e1, axis=1)[:, None]
    e2 = np.empty_like(T)  # T x e1
    e2[:, 0] = T[:, 1] * e1[:, 2] - T[:, 2] * e1[:, 1]
    e2[:, 1] = T[:, 2] * e1[:, 0] - T[:, 0] * e1[:, 2]
    e2[:, 2] = T[:, 0] * e1[:, 1] - T[:, 1] * e1[:, 0]
    inv_tz = 1.0 / T[:, 2:3]
    return e1 - (e1[:, 2:3] * inv_tz) * T, e2 - (e2[:, 2:3] * inv_tz) * T


def _rings(axis: np.ndarray, radius: float, n_phi: int = N_PHI, frame=None) -> np.ndarray:
    """(nz, n_phi, 3) points of a right circular cylinder of ``radius`` about the polyline
    ``axis`` (points at increasing z), cut by the planes z = axis z: each ring is the section
    of the cylinder in the plane parallel to A at that height (an ellipse for a tilted axis)."""
    U, V = _ring_frame(axis) if frame is None else frame
    return axis[:, None, :] + radius * (_unit_circle(n_phi) @ np.stack((U, V), axis=1))


def _ring_dist(axis: np.ndarray, radius: float, line: np.ndarray, n_phi: int) -> np.ndarray:
    """(nz, n_phi) distances of the points ``_rings(axis, radius, n_phi)`` to the polyline
    ``line`` (its end segments extended), as :func:`_dist_to_polyline` gives them, without
    forming the points. On a ring p - a = W0 + cos(phi) U + sin(phi) V is linear in (cos, sin),
    so its part across a segment is D0 + cos D1 + sin D2 and the squared length of that is a
    quadratic form in (cos, sin): six coefficients per ring against the basis
    (1, cos, sin, cos^2, sin^2, 2 sin cos) of the n_phi angles. Past an inner end of a segment
    the part along it beyond the end is added (Pythagoras)."""
    U, V = _ring_frame(axis)
    UV = radius * np.stack((U, V), axis=1)  # (nz, 2, 3)
    basis = _quadratic_basis(n_phi)  # (6, n_phi)
    nseg = len(line) - 1
    best = None
    for i in range(nseg):
        a, ab = line[i], line[i + 1] - line[i]
        L2 = float(ab @ ab)
        W0 = axis - a
        t0 = W0 @ ab / L2  # (nz,)
        t12 = UV @ ab / L2  # (nz, 2)
        D0 = W0 - t0[:, None] * ab
        D1 = UV[:, 0] - t12[:, 0:1] * ab
        D2 = UV[:, 1] - t12[:, 1:2] * ab
        coef = np.column_stack((np.einsum("ij,ij->i", D0, D0), 2.0 * np.einsum("ij,ij->i", D0, D1),
                                2.0 * np.einsum("ij,ij->i", D0, D2), np.einsum("ij,ij->i", D1, D1),
                                np.einsum("ij,ij->i", D2, D2), np.einsum("ij,ij->i", D1, D2)))
        d2 = coef @ basis
        if nseg > 1:  # inner segment ends: add the part along the segment beyond them
            t = t0[:, None] + t12 @ basis[1:3]
            lo = -np.inf if i == 0 else 0.0
            hi = np.inf if i == nseg - 1 else 1.0
            over = t - np.clip(t, lo, hi)
            d2 += over * over * L2
        best = d2 if best is None else np.minimum(best, d2)
    return np.sqrt(np.maximum(best, 0.0))


def _quadratic_basis(n_phi: int) -> np.ndarray:
    """(6, n_phi) read-only rows 1, cos, sin, cos^2, sin^2, 2 sin cos of phi = 2 pi j / n_phi."""
    q = _QUADRATIC_BASES.get(n_phi)
    if q is None:
        c, s = _unit_circle(n_phi).T
        q = np.vstack((np.ones(n_phi), c, s, c * c, s * s, 2.0 * s * c))
        q.flags.writeable = False
        _QUADRATIC_BASES[n_phi] = q
    return q


_QUADRATIC_BASES: dict[int, np.ndarray] = {}


def _ring_point(axis: np.ndarray, frame, radius: float, i: int, j: int, n_phi: int) -> np.ndarray:
    """The point ``_rings(axis, radius, n_phi, frame)[i, j]`` alone."""
    U, V = frame
    c, s = _unit_circle(n_phi)[j]
    return axis[i] + radius * (c * U[i] + s * V[i])


@lru_cache(maxsize=64)
def _quad_conn(nz: int, n: int, caps: bool) -> tuple[np.ndarray, np.ndarray]:
    """(offsets, connectivity) of the quads of a tube of nz rings of n points, and with ``caps``
    its two end polygons on their own copies of the end rings (points nz n .. nz n + 2n - 1, so
    that a cap's points carry the cap's normal, not the wall's)."""
    i, j = np.meshgrid(np.arange(nz - 1), np.arange(n), indexing="ij")
    a = i * n + j
    b = i * n + (j + 1) % n
    conn = [np.stack([a, b, b + n, a + n], -1).reshape(-1)]
    sizes = [np.full(a.size, 4)]
    if caps:
        conn += [nz * n + np.arange(n)[::-1], (nz + 1) * n + np.arange(n)]
        sizes += [[n], [n]]
    offsets = np.concatenate([[0], np.cumsum(np.concatenate(sizes))])
    out = (offsets.astype(np.int64), np.concatenate(conn).astype(np.int64))
    for arr in out:
        arr.flags.writeable = False
    return out


def _quad_faces(nz: int, n: int, offset: int = 0) -> np.ndarray:
    i, j = np.meshgrid(np.arange(nz - 1), np.arange(n), indexing="ij")
    a = i * n + j
    b = i * n + (j + 1) % n
    c = (i + 1) * n + (j + 1) % n
    d = (i + 1) * n + j
    q = np.stack([np.full(a.shape, 4), a + offset, b + offset, c + offset, d + offset], -1)
    return q.reshape(-1)


def _cell_array(offsets: np.ndarray, conn: np.ndarray) -> vtkCellArray:
    ca = vtkCellArray()
    if len(conn) <= 16:  # a few points: cell by cell is 5x quicker than going through numpy arrays
        for a, b in zip(offsets[:-1], offsets[1:]):
            ca.InsertNextCell(int(b - a))
            for i in conn[a:b]:
                ca.InsertCellPoint(int(i))
        return ca
    ca.SetData(numpy_to_vtkIdTypeArray(np.array(offsets, dtype=np.int64), deep=True),
               numpy_to_vtkIdTypeArray(np.array(conn, dtype=np.int64), deep=True))
    return ca


def _legacy_cells(cells: np.ndarray) -> vtkCellArray:
    """A vtkCellArray from the flat [n, i0, .., n, j0, ..] form ``pv.PolyData`` takes."""
    ca = vtkCellArray()
    ca.ImportLegacyFormat(numpy_to_vtkIdTypeArray(np.ascontiguousarray(cells, dtype=np.int64), deep=True))
    return ca


def _mesh(points: np.ndarray, polys: vtkCellArray | None = None, lines: vtkCellArray | None = None,
          dtype=np.float64) -> pv.PolyData:
    """The PolyData ``pv.PolyData(points, faces=..., lines=...)`` builds (float64 points, no
    arrays), assembled directly: the mesh builders run on every what-if move."""
    mesh = pv.PolyData()
    vp = vtkPoints()
    vp.SetData(numpy_to_vtk(np.array(points, dtype=dtype, order="C").reshape(-1, 3), deep=True))
    mesh.SetPoints(vp)
    if polys is not None:
        mesh.SetPolys(polys)
    if lines is not None:
        mesh.SetLines(lines)
    return mesh


_INTERNED: OrderedDict = OrderedDict()  # (kind, shape, point bytes) -> mesh
_INTERN_SIZE = 256


def _interned(kind: tuple, points: np.ndarray, make) -> pv.PolyData:
    """The mesh ``make()`` builds from ``points`` (float64) and a topology named by ``kind``,
    shared with every earlier call that had exactly the same points: a what-if move leaves
    most of the picture as it was, and an unchanged mesh handed back as the same object is
    neither rebuilt, nor cut again by :func:`section_cut`, nor uploaded again by a renderer.
    Interned meshes are shared: callers must not modify them."""
    points = np.ascontiguousarray(points, dtype=float)
    key = (kind, points.shape, points.tobytes())
    mesh = _INTERNED.get(key)
    if mesh is None:
        mesh = _INTERNED[key] = make(points)
        if len(_INTERNED) > _INTERN_SIZE:
            _INTERNED.popitem(last=False)
    else:
        _INTERNED.move_to_end(key)
    return mesh


def _tube_normals(rings: np.ndarray) -> np.ndarray:
    """(nz, n, 3) unit normals of the wall through the rings (nz, n, 3), pointing away from each
    ring's centre: the cross product of the tangents round the ring (central difference) and
    along the tube (central difference inside, one-sided at the ends). For the rings of
    :func:`_rings` this is the exact normal of the cylinder, up to the O(h^2) of the central
    difference; a degenerate (zero-radius) ring gets the radial direction, or +x. Written out
    component by component: it runs on every what-if move."""
    nz, n, _ = rings.shape
    j = np.arange(n)
    d_phi = rings[:, (j + 1) % n] - rings[:, (j - 1) % n]
    d_z = np.empty_like(rings)
    d_z[0] = rings[1] - rings[0]
    d_z[-1] = rings[-1] - rings[-2]
    if nz > 2:
        d_z[1:-1] = 0.5 * (rings[2:] - rings[:-2])
    a0, a1, a2 = d_phi[..., 0], d_phi[..., 1], d_phi[..., 2]
    b0, b1, b2 = d_z[..., 0], d_z[..., 1], d_z[..., 2]
    nrm = np.stack((a1 * b2 - a2 * b1, a2 * b0 - a0 * b2, a0 * b1 - a1 * b0), axis=-1)
    out = rings - rings.mean(axis=1, keepdims=True)
    flip = (nrm * out).sum(axis=-1) < 0.0
    nrm[flip] *= -1.0
    length = np.sqrt((nrm * nrm).sum(axis=-1))
    bad = ~(length > 1e-300)
    if bad.any():
        nrm[bad] = out[bad]
        nrm[bad & ~(np.sqrt((out * out).sum(axis=-1)) > 1e-300)] = (1.0, 0.0, 0.0)
        length = np.sqrt((nrm * nrm).sum(axis=-1))
    return nrm / length[..., None]


def _tube(rings: np.ndarray, caps: bool = False, shared: bool = True) -> pv.PolyData:
    """The quads round the rings (nz, n, 3), and with ``caps`` the two end polygons, with point
    normals (the wall's from :func:`_tube_normals`, the caps' along the tube), so that a renderer
    shades it smooth without computing normals of its own. ``shared=False`` returns a mesh of
    its own (to carry point data)."""
    nz, n, _ = rings.shape

    def make(pts):
        mesh = _mesh(pts, polys=_cell_array(*_quad_conn(nz, n, caps)))
        nrm = _tube_normals(rings).reshape(-1, 3)
        if caps:
            along = rings[-1].mean(axis=0) - rings[0].mean(axis=0)
            along = along / np.linalg.norm(along) if np.linalg.norm(along) > 0 else np.array([0.0, 0.0, 1.0])
            nrm = np.concatenate((nrm, np.tile(-along, (n, 1)), np.tile(along, (n, 1))))
        arr = numpy_to_vtk(np.ascontiguousarray(nrm, dtype=float), deep=True)
        arr.SetName("Normals")
        mesh.GetPointData().SetNormals(arr)
        return mesh

    pts = rings.reshape(-1, 3)
    if caps:
        pts = np.concatenate((pts, rings[0], rings[-1]))
    return _interned(("tube", caps), pts, make) if shared else make(pts)


def _points(points: np.ndarray) -> pv.PolyData:
    """The points as ``pv.PolyData(points)`` makes them: one vertex cell per point."""
    points = np.asarray(points, dtype=float).reshape(-1, 3)
    n = len(points)
    mesh = _mesh(points)
    mesh.SetVerts(_cell_array(np.arange(n + 1), np.arange(n)))
    return mesh


def _polygon(ring: np.ndarray) -> pv.PolyData:
    """One polygon through the points of ``ring`` (shared)."""
    n = len(ring)
    return _interned(("polygon",), ring, lambda pts: _mesh(pts, polys=_cell_array(np.array([0, n]), np.arange(n))))


@lru_cache(maxsize=128)
def _cage(centre: tuple[float, float], radius: float, z0: float, z1: float, n_rings: int = 3,
          n_gen: int = 8, n_phi: int = N_PHI_CAGE, phase: float = 0.0) -> pv.PolyData:
    """Wireframe of a perfect cylinder normal to A: rings and generator lines. Cached (it depends
    on its arguments only): the mesh is shared, callers must not modify it."""
    cs = _unit_circle(n_phi)
    zs = np.linspace(z0, z1, n_rings)
    ring = np.column_stack((centre[0] + radius * cs[:, 0], centre[1] + radius * cs[:, 1]))
    rings = np.concatenate([np.column_stack((ring, np.full(n_phi, z))) for z in zs])
    p = phase + 2 * np.pi * np.arange(n_gen) / n_gen
    gxy = np.column_stack((centre[0] + radius * np.cos(p), centre[1] + radius * np.sin(p)))
    gen = np.empty((n_gen, 2, 3))
    gen[:, :, :2] = gxy[:, None, :]
    gen[:, 0, 2], gen[:, 1, 2] = z0, z1
    pts = np.concatenate([rings, gen.reshape(-1, 3)])
    base = n_rings * n_phi
    conn = np.concatenate([np.concatenate([r * n_phi + np.arange(n_phi), [r * n_phi]]) for r in range(n_rings)]
                          + [base + np.arange(2 * n_gen)])
    offsets = np.concatenate([np.arange(n_rings + 1) * (n_phi + 1),
                              n_rings * (n_phi + 1) + 2 * np.arange(1, n_gen + 1)])
    return _mesh(pts, lines=_cell_array(offsets, conn))


def _segments(ends: np.ndarray) -> pv.PolyData:
    """Separate straight segments, ``ends`` (k, 2, 3): one line cell each."""
    k = len(ends)
    return _mesh(ends.reshape(-1, 3), lines=_cell_array(2 * np.arange(k + 1), np.arange(2 * k)))


def _polyline(points: np.ndarray) -> pv.PolyData:
    """One line through the points (shared)."""
    n = len(points)
    return _interned(("polyline",), points, lambda pts: _mesh(pts, lines=_cell_array(np.array([0, n]), np.arange(n))))


@lru_cache(maxsize=16)
def _block_conn(n: int) -> tuple[np.ndarray, np.ndarray]:
    """(offsets, connectivity) of :func:`_block_with_hole`'s quads for rings of n points."""
    j = np.arange(n)
    k = (j + 1) % n

    def annulus(o):  # inner ring o..o+n -> outer ring o+n..o+2n
        return np.stack([o + j, o + k, o + n + k, o + n + j], -1)

    walls = np.stack([n + j, n + k, 3 * n + k, 3 * n + j], -1)  # outer bottom (n..2n) -> outer top (3n..4n)
    conn = np.concatenate([annulus(0), annulus(2 * n), walls]).reshape(-1).astype(np.int64)
    offsets = 4 * np.arange(3 * n + 1, dtype=np.int64)
    for arr in (offsets, conn):
        arr.flags.writeable = False
    return offsets, conn


@lru_cache(maxsize=64)
def _square_ring(centre: tuple[float, float], half: float, n: int) -> np.ndarray:
    """(n, 2) points of the square of side 2*half, at the angles of an n-point ring."""
    cs = _unit_circle(n)
    c, s = cs[:, 0], cs[:, 1]
    sq = half / np.maximum(np.abs(c), np.abs(s))
    out = np.column_stack((centre[0] + sq * c, centre[1] + sq * s))
    out.flags.writeable = False
    return out


def _block_with_hole(hole_bottom: np.ndarray, hole_top: np.ndarray, centre, half: float, z0: float,
                     z1: float) -> pv.PolyData:
    """A square block (side 2*half) with a hole whose end sections are the given rings: the
    bottom annulus (hole_bottom -> outer bottom), the top annulus and the outer walls."""
    n = hole_bottom.shape[0]
    outer = _square_ring((float(centre[0]), float(centre[1])), float(half), n)
    pts = np.empty((4 * n, 3))
    pts[:n] = hole_bottom
    pts[n:2 * n, :2] = outer
    pts[n:2 * n, 2] = z0
    pts[2 * n:3 * n] = hole_top
    pts[3 * n:, :2] = outer
    pts[3 * n:, 2] = z1
    return _interned(("block",), pts, lambda q: _mesh(q, polys=_cell_array(*_block_conn(n))))


@lru_cache(maxsize=32)
def _plate(centre, half: float, z0: float, z1: float) -> pv.PolyData:
    """The box under a pin. Cached: the mesh is shared, callers must not modify it."""
    return pv.Box(bounds=(centre[0] - half, centre[0] + half, centre[1] - half, centre[1] + half, z0, z1))


def _dist_to_polyline(p: np.ndarray, axis: np.ndarray) -> np.ndarray:
    """Distance of points p (m, 3) to the polyline ``axis``, its end segments extended."""
    best = np.full(len(p), np.inf)
    nseg = len(axis) - 1
    for i in range(nseg):
        a, b = axis[i], axis[i + 1]
        ab = b - a
        t = (p - a) @ ab / (ab @ ab)
        lo = -np.inf if i == 0 else 0.0
        hi = np.inf if i == nseg - 1 else 1.0
        t = np.clip(t, lo, hi)
        d = np.linalg.norm(p - (a + t[:, None] * ab), axis=1)
        best = np.minimum(best, d)
    return best


# --------------------------------------------------------------------------- state and text


_CHAR = {
    Characteristic.POSITION: "position",
    Characteristic.PERPENDICULARITY: "perpendicularity",
    Characteristic.PARALLELISM: "parallelism",
    Characteristic.ANGULARITY: "angularity",
    Characteristic.STRAIGHTNESS: "straightness",
}


def _frame_text(f: Feature, u: Units) -> str:
    """Feature control frame in characters every renderer has (Latin-1)."""
    tol = f.tolerance
    if tol is None:
        return "no geometric tolerance"
    dia = "\u00d8" if tol.zone is Zone.DIAMETER else ""
    mod = {Material.MMC: " (M)", Material.LMC: " (L)", Material.RFS: ""}[tol.material]
    proj = f" (P){u.fmt(tol.projected)}" if tol.projected else ""
    dat = (" to " + ", ".join(tol.datums)) if tol.datums else ""  # VTK fonts drop '|' 
    ang = f" at {tol.angle:g} deg" if tol.characteristic is Characteristic.ANGULARITY and tol.angle is not None else ""
    return f"{_CHAR[tol.characteristic]} {dia}{u.fmt(tol.value)}{mod}{proj}{dat}{ang}"


def _size_name(f: Feature, size: float, std) -> str:
    if abs(size - f.mmc) <= 1e-12:
        return term("mmc", std)[0]
    if abs(size - f.lmc) <= 1e-12:
        return term("lmc", std)[0]
    return "between"


def _boundary_terms(res: SceneResult, f: Feature) -> tuple[tuple[str, float | None], tuple[str, float | None]]:
    """((name, size) of the mating-side boundary, (name, size) of the opposite one)."""
    fr = res.features[f.id]
    std = res.scene.standard
    tol = f.tolerance
    hole = f.kind is Kind.HOLE
    mm_side = fr.inner_boundary if hole else fr.outer_boundary
    lm_side = fr.outer_boundary if hole else fr.inner_boundary
    if tol is None:
        return (("envelope at " + term("mmc", std)[0], mm_side.value), ("", None))
    vc = fr.virtual_condition
    rc = fr.resultant_condition
    vc_name = vc.abbr(std)
    # a value is None where no boundary exists (ISO independency on a side no modifier or
    # envelope bounds): nothing is drawn there
    if tol.material is Material.MMC:
        return ((vc_name, vc.value), (rc.abbr(std), rc.value))
    if tol.material is Material.LMC:  # the VC sits on the LMC side; the mate sees the RC side
        mname = f"{mm_side.abbr(std)} = {rc.abbr(std)}" if rc.value is not None else mm_side.abbr(std)
        return ((mname, mm_side.value), (vc_name, vc.value))
    return ((mm_side.abbr(std), mm_side.value), (lm_side.abbr(std), lm_side.value))


def _feature_lines(res: SceneResult, f: Feature, st: FeatureState, role: str) -> list[str]:
    u, std = res.scene.units, res.scene.standard
    lines = [f"{role.upper()} '{f.id}'" + (f" ({f.name})" if f.name else ""),
             f"  {_frame_text(f, u)}",
             f"  limits {u.fmt(f.limits[0])} - {u.fmt(f.limits[1])} {u.value}"]
    if f.tolerance is None:
        lines.append(f"  produced {u.fmt(st.size)} ({_size_name(f, st.size, std)})")
    else:
        b = bonus(f, st.size)
        lines.append(f"  produced {u.fmt(st.size)} ({_size_name(f, st.size, std)}),  {term('bonus', std)[0]} {u.fmt(b)}")
        lines.append("  " + tolerance_allowed_derived(f, b).formula(u, std)
                     + ("" if st.share >= 1.0 else f",  {st.share:.0%} used"))
    fr = res.features[f.id]
    vc = fr.virtual_condition
    if vc.value is not None and f.tolerance is not None and f.tolerance.material is Material.MMC:
        lines.append("  " + vc.formula(u, std))
    else:  # the mating-side boundary (or why there is none), and the VC where it lies elsewhere
        d = fr.inner_boundary if f.kind is Kind.HOLE else fr.outer_boundary
        lines.append("  " + d.formula(u, std))
        if vc.value is not None:
            lines.append("  (" + vc.formula(u, std) + ")")
    return lines


# --------------------------------------------------------------------------- styles


def _surf(colour: str, opacity: float, **kw) -> dict:
    d = dict(color=colour, opacity=opacity, smooth_shading=True, specular=0.2, ambient=0.25,
             show_edges=False)
    d.update(kw)
    return d


def _line(colour: str, width: float) -> dict:
    return dict(color=colour, line_width=width, render_lines_as_tubes=False, lighting=False)


# --------------------------------------------------------------------------- feature pieces


@dataclass
class _Built:
    """Layers being assembled."""

    layers: dict[str, list[Layer]] = field(default_factory=dict)
    labels: list[Label] = field(default_factory=list)
    legend: list[tuple[str, str, str]] = field(default_factory=list)  # (label, colour, layer)
    notes: list[str] = field(default_factory=list)

    def add(self, layer: str, name: str, mesh: pv.PolyData, style: dict) -> None:
        self.layers.setdefault(layer, []).append(Layer(name, mesh, style))

    def key(self, label: str, colour: str, layer: str) -> None:
        if not any(lbl == label for lbl, _, _ in self.legend):
            self.legend.append((label, colour, layer))


_REPLAYS: OrderedDict = OrderedDict()  # (piece, key) -> (objects held by id, what it added, what it returned)
_REPLAYS_SIZE = 64


def _replayed(piece: str, key: tuple, held: tuple, b: _Built, make):
    """``make(rec)`` run on an empty :class:`_Built`, what it added (layers, labels, legend,
    notes) then added to ``b`` in the same order, and its result returned (a dict is copied).
    Remembered under (piece, key): a later call with the same key adds the very same items
    (the same mesh objects) without building them again, so a what-if move that leaves a
    feature as it was leaves its meshes as they were: not rebuilt, not cut again, not
    uploaded again. ``key`` holds everything the piece reads; ``held`` are objects the key
    names by id (kept alive by the entry, and checked to be the same objects)."""
    hit = _REPLAYS.get((piece, key))
    if hit is None or any(x is not y for x, y in zip(hit[0], held)):
        rec = _Built()
        hit = _REPLAYS[(piece, key)] = (held, rec, make(rec))
        if len(_REPLAYS) > _REPLAYS_SIZE:
            _REPLAYS.popitem(last=False)
    else:
        _REPLAYS.move_to_end((piece, key))
    _held, rec, out = hit
    for layer, items in rec.layers.items():
        b.layers.setdefault(layer, []).extend(items)
    b.labels.extend(rec.labels)
    for label, colour, layer in rec.legend:
        b.key(label, colour, layer)
    b.notes.extend(rec.notes)
    return dict(out) if isinstance(out, dict) else out


def _feature_geometry(res: SceneResult, f: Feature, st: FeatureState, ex: _Ex, centre, role: str,
                      b: _Built, primary: bool) -> dict[str, Any]:
    """:func:`_feature_geometry_built`, remembered (:func:`_replayed`): it depends on the
    result, the feature, its state, the drawing transform, the centre, the role and primary."""
    key = (id(res), f, st, ex, tuple(float(c) for c in centre), role, primary)
    return _replayed("feature", key, (res,), b,
                     lambda rec: _feature_geometry_built(res, f, st, ex, centre, role, rec, primary))


def _feature_geometry_built(res: SceneResult, f: Feature, st: FeatureState, ex: _Ex, centre, role: str,
                            b: _Built, primary: bool) -> dict[str, Any]:
    """Zone, zone axis, actual axis, surface, boundaries of one feature. Returns what the mate
    and clearance steps need (true and drawn axis, radii, z range)."""
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

    return dict(place=place, pts_true=pts_true, axis_true=axis_true, axis_draw=axis_draw, r_true=r_true,
                r_draw=r_draw, rings_draw=rings_draw, z=(z0, z1), mname=mname, mval=mval, oname=oname,
                oval=oval, tag=tag)


def _part(b: _Built, f: Feature, g: dict, ex: _Ex, centre, primary: bool) -> float:
    """Block around a hole (its hole walls are the surface layer) or a plate under a pin."""
    half = 1.3 * max(ex.R0, g["r_draw"]) + 0.45 * ex.R0
    if f.kind is Kind.HOLE:
        rings = g["rings_draw"]
        mesh = _block_with_hole(rings[0], rings[-1], centre, half, g["z"][0], g["z"][1])
        b.add("part", "hole part", mesh, _surf(S.PART, S.PART_OPACITY, smooth_shading=False))
        b.key("part (translucent)", S.PART, "part")
    else:
        t = 0.22 * f.length
        b.add("part", "pin part", _plate(centre, half, -t, 0.0), _surf(S.PART, S.PART_OPACITY * (1.0 if primary else 0.7),
                                                                         smooth_shading=False))
        b.key("part (translucent)", S.PART, "part")
    return half


def _symbol_side(direction_deg: float) -> np.ndarray:
    """Where the datum feature symbol stands: along the tilt direction, a little towards the
    cameras (so the section and iso views both show it beside the part)."""
    phi = math.radians(direction_deg)
    return -np.array([math.cos(phi), math.sin(phi), 0.0]) - 0.3 * np.array([-math.sin(phi), math.cos(phi), 0.0])


_PLANE_TCOORDS = np.array([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0], [1.0, 1.0]], dtype=np.float32)
_PLANE_NORMALS = np.array([[0.0, 0.0, 1.0]] * 4, dtype=np.float32)


def _datum_plane(cx: float, cy: float, z: float, size: float) -> pv.PolyData:
    """The square ``pv.Plane(center=(cx, cy, z), direction=(0, 0, 1), i_size=2*size,
    j_size=2*size, i_resolution=1, j_resolution=1)`` makes (float32 points, one quad, its
    texture coordinates and normals), built directly: the VTK source and its transforms cost
    ~2 ms and the size follows the hole on every what-if move. The corners are computed in
    double precision and rounded once to float32 (the source's own rounding differs from it
    by a float32 unit in the last place at most)."""
    pts = np.array([[cx - size, cy - size, z], [cx + size, cy - size, z],
                    [cx - size, cy + size, z], [cx + size, cy + size, z]])
    mesh = _mesh(pts, polys=_cell_array(np.array([0, 4]), np.array([0, 1, 3, 2])), dtype=np.float32)
    pd = mesh.GetPointData()
    tc = numpy_to_vtk(_PLANE_TCOORDS, deep=True)
    tc.SetName("TextureCoordinates")
    pd.SetTCoords(tc)
    nm = numpy_to_vtk(_PLANE_NORMALS, deep=True)
    nm.SetName("Normals")
    pd.SetNormals(nm)
    return mesh


def _datum(b: _Built, f: Feature, centre, half: float, length: float, view_side: np.ndarray) -> None:
    """:func:`_datum_built`, remembered (:func:`_replayed`)."""
    key = (f, tuple(float(c) for c in centre), float(half), float(length), tuple(float(v) for v in view_side))
    _replayed("datum", key, (), b, lambda rec: _datum_built(rec, f, centre, half, length, view_side))


def _datum_built(b: _Built, f: Feature, centre, half: float, length: float, view_side: np.ndarray) -> None:
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


# --------------------------------------------------------------------------- clearance


def _mate_surface(b: _Built, hole_g: dict, pin: Feature, pin_g: dict, ex: _Ex, units: Units,
                  hole_radius_true: float, label_colour_ok: str, tag_hole="hole", tag_pin="pin",
                  mate_layer: str = "mate", span: tuple[float, float] | None = None) -> tuple[float, float, dict]:
    """The mating pin's surface coloured by the TRUE signed clearance to the hole surface.
    ``span``: the range of clearances the colour scale covers whatever the state (see
    :func:`_clearance_span`), widened if this state's values fall outside it; None: this
    state's own range. Returns (smallest clearance scalar, clearance at the finely sampled
    tightest spot, scalar bar)."""
    hz0, hz1 = hole_g["z"]
    pz0, pz1 = pin_g["z"]
    e0, e1 = max(hz0, pz0), min(hz1, pz1)
    zs = np.linspace(e0, e1, N_Z_MATE)
    axis_true = _axis_at(pin_g["pts_true"], zs)
    axis_draw = ex.pts(axis_true)
    frame_draw = _ring_frame(axis_draw)
    rings_draw = _rings(axis_draw, pin_g["r_draw"], frame=frame_draw)
    hole_axis = np.asarray(hole_g["axis_true_line"], dtype=float)
    # true local gap at the mesh's vertices (the rings about the true axis at the true radius)
    gap = (hole_radius_true - _ring_dist(axis_true, pin_g["r_true"], hole_axis, N_PHI)).reshape(-1)
    mesh = pv.PolyData()  # the shared tube's points, cells and normals, with this state's colours
    mesh.ShallowCopy(_tube(rings_draw))
    clearance = 2.0 * gap
    pd = mesh.GetPointData()
    for name, values in (("gap", gap), ("clearance", clearance)):
        arr = numpy_to_vtk(values, deep=True)
        arr.SetName(name)
        pd.AddArray(arr)
    pd.SetActiveScalars("clearance")
    cmin, cmax = float(clearance.min()), float(clearance.max())

    # tightest spot: finely sampled round every ring of the engagement
    fgap = hole_radius_true - _ring_dist(axis_true, pin_g["r_true"], hole_axis, N_FINE)
    gmin = float(fgap.min())
    spots = []
    decimals = units.decimals + 1
    for zi in range(len(zs)):  # every ring where the minimum is reached (to display precision)
        j = int(np.argmin(fgap[zi]))
        if round(fgap[zi, j] - gmin, decimals) == 0 and (zi in (0, len(zs) - 1) or fgap[zi, j] < min(
                fgap[max(zi - 1, 0)].min(), fgap[min(zi + 1, len(zs) - 1)].min()) + 1e-15):
            spots.append((zi, j))
    if not spots:
        spots = [np.unravel_index(int(np.argmin(fgap)), fgap.shape)]
    spots = spots[:2] if len(spots) <= 2 else [spots[0], spots[-1]]
    c_tight = 2.0 * gmin
    interferes = not fits(c_tight)
    lo, hi = (cmin, cmax) if span is None else (min(span[0], cmin), max(span[1], cmax))
    lo = min(0.0, lo)
    hi = max(hi, lo + abs(lo) * 0.25, 1e-12)
    cmap = _clearance_colormap(lo, hi)
    title = f"clearance, {units.value}"
    style = dict(scalars="clearance", cmap=cmap, clim=(lo, hi), smooth_shading=True, ambient=0.35,
                 diffuse=0.75, specular=0.1, show_scalar_bar=False, interpolate_before_map=True)
    b.add(mate_layer, f"{tag_pin} surface (clearance)", mesh, style)
    for end in (0, -1):  # the pin's end faces (no clearance there: plain colour)
        ring = rings_draw[end]
        b.add(mate_layer, f"{tag_pin} end", _polygon(ring),
              _surf(S.MATE, 1.0, smooth_shading=False))
    b.key(f"{tag_pin} surface: clearance to the {tag_hole} (true; 2 x local gap)", S.CLEARANCE_COLORS[1], mate_layer)
    if interferes:
        b.key(f"interference: {tag_pin} and {tag_hole} overlap", S.INTERFERENCE, mate_layer)

    # markers: the tightest spots, and the gap drawn as a short segment across to the hole surface
    hole_r_draw = hole_g["r_draw_surface"]
    colour = S.INTERFERENCE if interferes else S.TIGHT
    spot_pts = [_ring_point(axis_draw, frame_draw, pin_g["r_draw"], zi, j, N_FINE) for zi, j in spots]
    ends = []
    for p in spot_pts:
        # outward direction on A at that spot: the gap runs across to the hole surface
        centre_d = ex.pts(_axis_at(hole_g["axis_true_line"], np.array([p[2]])))[0]
        out = p - centre_d
        out[2] = 0.0
        nrm = np.linalg.norm(out)
        out = out / nrm if nrm > 0 else np.array([1.0, 0, 0])
        ends.append((p, centre_d + out * hole_r_draw))
    # one mesh for the spots and one for the gaps (one or two of each): fewer actors, and the
    # same ones whether the tightest fit is reached at one end or at both
    b.add("clearance", "tightest spot", _points(np.array(spot_pts)),
          dict(color=colour, point_size=16, render_points_as_spheres=True, lighting=False))
    b.add("clearance", "gap at tightest spot", _segments(np.array(ends)), _line(colour, 3.0))
    txt = ("interference " if interferes else "tightest ") + units.fmt(c_tight, signed=True) + f" {units.value}"
    txt += f" ({_per_side(units, c_tight)} a side)"
    cx = ex.c
    for p in spot_pts:
        right = (p[0] - cx[0]) * math.cos(math.radians(0)) > 0  # spot on the +x side: text runs left
        b.labels.append(Label(tuple(p), txt, S.INTERFERENCE if interferes else S.TEXT, 16, layer="clearance",
                              justify="right" if right else "left"))
    ticks = _clearance_ticks(lo, hi)
    # the tick labels with the digits each tick needs (Units.digits: a 0.0025 step is not shown as 0.003)
    bar = dict(title=title, clim=(lo, hi), ticks=ticks, fmt=f"%.{max(units.digits(t) for t in ticks)}f")
    return cmin, c_tight, bar


def _per_side(units: Units, clearance: float) -> str:
    """Half of a diametral clearance as it is shown (``Units.fmt`` keeps the digit a half needs:
    0.005 gives 0.0025), so that twice the per-side value reads as the diametral one."""
    return units.fmt(abs(float(units.fmt(clearance))) / 2.0)


def _clearance_ticks(lo: float, hi: float) -> tuple[float, ...]:
    """Colour-bar ticks: zero (where fit turns into interference), round steps (1, 2, 2.5, 5
    x 10^n, at most four) up to ``hi``, and ``lo`` when it is below zero and not crowding the
    zero tick.

    >>> _clearance_ticks(-0.030, 0.094)
    (-0.03, 0.0, 0.025, 0.05, 0.075)
    """
    x = max(hi, -lo, 1e-12) / 4.0
    e = 10.0 ** math.floor(math.log10(x))
    step = min(m * e for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * e >= x * (1 - 1e-12))
    n = int(math.floor(hi / step + 1e-9)) if hi > 0 else 0
    ticks = [round(k * step, 12) for k in range(n + 1)]
    if lo < 0 and -lo >= 0.5 * step:
        ticks.insert(0, lo)
    return tuple(ticks)


def _reach(f: Feature, size: float) -> float:
    """Twice the largest distance of the drawn axis from the zone axis within the feature, at a
    produced size: the tolerance allowed; with a projected zone P the axis crosses the zone and
    runs on into the part over its length L with the same lean, reaching t (1/2 + L/P) from the
    zone axis (geom's projected boundary MMC -/+ t (1 + 2L/P) is the same reach)."""
    if f.tolerance is None:
        return 0.0
    t = tolerance_allowed(f, size)
    P = f.tolerance.projected
    return t * (1.0 + 2.0 * f.length / P) if P else t


def _lean(f: Feature) -> float:
    """The largest slope (tan of the angle to the normal to A) of the drawn axis over the
    states: tilted across its zone (T/L), across a projected zone (T/P), or bowed by
    straightness (4T/L at the ends of the arc, as drawn)."""
    if f.tolerance is None:
        return 0.0
    t = max(tolerance_allowed(f, f.mmc), tolerance_allowed(f, f.lmc))
    if f.tolerance.characteristic is Characteristic.STRAIGHTNESS:
        return 4.0 * t / f.length
    return t / (f.tolerance.projected or f.length)


def _clearance_span(hole: Feature, pin: Feature) -> tuple[float, float]:
    """(lo, hi) bounds of the local diametral clearance 2 (R - dist) between the pin's surface
    and the hole's over every state the what-if controls reach (sizes within limits, any share
    of the tolerance, any tilt direction). Each axis stays within reach r(size) of the common
    zone axis (:func:`_reach`: the tolerance allowed, more with a projected zone), so at sizes D
    (hole) and d (pin) the local clearance lies within D - d -/+ (r_hole(D) + r_pin(d)), plus a
    second-order term from the lean of the surfaces: a level section of a pin leaning by angle
    a is d sec(a) across, and the hole's clearance is taken square to its own leaning axis
    (D cos(b)). Reach is linear in the size, so the extremes are at the limits:
    lo = min(D - r_hole(D)) - max(d + r_pin(d)) - d_max (sec a - 1) (without a lean and a
    projected zone: VC - VC at MMC, geom's worst case), hi = max(D + r_hole(D)) - min(d -
    r_pin(d)) + D_max (1 - cos b). The colour scale spans this, so colours mean the same
    clearance as the sizes are swept, the scale does not jump under the user's eyes, and it
    shows red only where interference can happen (or within the lean term of it)."""
    def r(f: Feature, size: float) -> float:
        return _reach(f, size)

    lean_pin, lean_hole = math.atan(_lean(pin)), math.atan(_lean(hole))
    lo = min(D - r(hole, D) for D in hole.limits) - max(d + r(pin, d) for d in pin.limits)
    hi = max(D + r(hole, D) for D in hole.limits) - min(d - r(pin, d) for d in pin.limits)
    lo -= max(pin.limits) * (1.0 / math.cos(lean_pin) - 1.0)
    hi += max(hole.limits) * (1.0 - math.cos(lean_hole))
    return lo, hi


@lru_cache(maxsize=32)
def _clearance_colormap(lo: float, hi: float):
    """``style.clearance_colormap(lo, hi)``, cached (shared: callers must not modify it). With
    lo = 0 the colours do not depend on hi (the ramp runs from 0 to hi), so every such call
    shares the map made for (0, 1)."""
    if lo == 0.0 and hi > 0.0:
        return _clearance_colormap_zero()
    return S.clearance_colormap(lo, hi)


@lru_cache(maxsize=1)
def _clearance_colormap_zero():
    return S.clearance_colormap(0.0, 1.0)


# --------------------------------------------------------------------------- cameras


def _cameras(bounds, direction_deg: float, centre) -> tuple[dict, dict, tuple]:
    """Cameras round the drawn geometry ``bounds`` (datum plane excluded): iso (oblique, from
    the side the section cut opens towards), top (normal to A, tilt direction to the right),
    section (normal to the plane of the tilt, A at the bottom)."""
    x0, x1, y0, y1, z0, z1 = bounds
    c = np.array([(x0 + x1) / 2, (y0 + y1) / 2, (z0 + z1) / 2])
    R = 0.5 * math.sqrt((x1 - x0) ** 2 + (y1 - y0) ** 2 + (z1 - z0) ** 2)
    phi = math.radians(direction_deg)
    u = np.array([math.cos(phi), math.sin(phi), 0.0])
    v = np.array([-u[1], u[0], 0.0])
    z = np.array([0.0, 0.0, 1.0])
    dist = R / math.sin(math.radians(15.0)) * 1.55
    iso = 0.45 * u - 1.0 * v + 0.55 * z
    iso /= np.linalg.norm(iso)

    def t(a):
        return tuple(float(x) for x in a)

    cams = {
        "iso": (t(c + dist * iso), t(c), t(z)),
        "top": (t(c + dist * z), t(c), t(v)),
        "section": (t(c - dist * v), t(c), t(z)),
    }
    wide = max(abs(np.dot([x1 - x0, y1 - y0, 0], u)), 1e-9)
    # the picture keeps the lower-left ~60 % of the frame (readouts above, legend to the right)
    scale = {"top": max(x1 - x0, y1 - y0) / 2 / 0.58,
             "section": max((z1 - z0) / 2 / 0.60, wide / 1.6)}
    return cams, scale, (t((centre[0], centre[1], 0.0)), t(v))


# --------------------------------------------------------------------------- builders


def _finish(res: SceneResult, b: _Built, ex: _Ex, title: str, readouts: list[str], verdict: str,
            verdict_colour: str, direction_deg: float, kind: str, ids: tuple[str, ...], states: dict,
            clearance=None, tightest=None, bar=None) -> Scene3D:
    layers = {name: tuple(b.layers[name]) for name in LAYERS if b.layers.get(name)}
    meshes = [it.mesh for name, items in layers.items() if name != "datum" for it in items]
    bounds = np.array([m.bounds for m in meshes])
    box = (bounds[:, 0].min(), bounds[:, 1].max(), bounds[:, 2].min(), bounds[:, 3].max(),
           bounds[:, 4].min(), bounds[:, 5].max())
    cams, scale, section = _cameras(box, direction_deg, ex.c)
    u = res.scene.units
    if ex.k == 1.0:
        caption = "TRUE SCALE: radial deviations x 1 (no exaggeration)"
    else:
        caption = (f"RADIAL DEVIATIONS x {ex.k:g}\nzones, gaps, tilts, size differences drawn x {ex.k:g} "
                   f"about \u00d8{u.fmt(2 * ex.R0)}; lengths true")
    return Scene3D(
        title=title,
        layers=layers,
        labels=tuple(b.labels),
        readouts=tuple(readouts),
        legend=tuple((lbl, col) for lbl, col, _ in b.legend),
        legend_layers=tuple(layer for _, _, layer in b.legend),
        cameras=cams,
        exaggeration=ex.k,
        units=u,
        caption=caption,
        verdict=verdict,
        verdict_colour=verdict_colour,
        clearance=clearance,
        tightest=tightest,
        scalar_bar=bar,
        parallel_scale=scale,
        section=section,
        kind=kind,
        feature_ids=ids,
        states=dict(states),
        notes=tuple(b.notes),
    )


def _exaggeration(value, auto) -> float:
    """The exaggeration asked for, or ``auto()``; a positive finite number."""
    k = float(value) if value is not None else auto()
    if not (k > 0 and math.isfinite(k)):
        raise ValueError(f"exaggeration must be a positive number, got {value!r}")
    return k


def build_mate_scene(res: SceneResult, mate_index: int, states: dict[str, FeatureState] | None = None,
                     exaggeration: float | None = None) -> Scene3D:
    """The hole of mate ``mate_index`` with its part, zone, actual axis, surface and boundaries,
    and the mating pin at its own worst case placed in it, coloured by the true clearance.

    ``states`` maps feature id -> FeatureState; missing features take the worst case: at MMC,
    all the tolerance allowed used, the hole tilted at 0 deg and the pin at 180 deg (adverse).
    """
    sc = res.scene
    m = sc.mates[mate_index]
    hole, pin = sc.feature(m.hole), sc.feature(m.pin)
    states = dict(states or {})
    hs = states.get(hole.id) or worst_case_state(hole, True)
    ps = states.get(pin.id) or worst_case_state(pin, True)
    worst = hs == worst_case_state(hole, True) and ps == worst_case_state(pin, True)
    k = _exaggeration(exaggeration, lambda: auto_exaggeration(res, mate_index=mate_index))
    centre = hole.at
    ex = _Ex(k, centre, hole.mmc / 2.0)
    b = _Built()
    u, std = sc.units, sc.standard

    hg = _feature_geometry(res, hole, hs, ex, centre, "hole", b, primary=True)
    pg = _feature_geometry(res, pin, ps, ex, centre, "pin", b, primary=False)
    hg["axis_true_line"] = hg["axis_true"]
    hg["r_draw_surface"] = hg["r_draw"]
    half = _part(b, hole, hg, ex, centre, True)
    _part(b, pin, pg, ex, centre, False)
    _datum(b, hole, centre, half, max(hole.length, pin.length), _symbol_side(hs.direction_deg))
    if hole.tolerance is not None and hole.tolerance.projected:
        _projected_note(b, res, hole, hs, ex, centre)

    cmin, c_tight, bar = _mate_surface(b, hg, pin, pg, ex, u, hs.size / 2.0, S.TEXT,
                                       span=_clearance_span(hole, pin))
    mr = res.mates[mate_index]
    if worst:  # geom's worst case, as the readout and `analyze` give it (a projected hole included)
        c_formula, assembles = mr.clearance_min, mr.assembles
    else:
        c_formula = clearance_at(hole, pin, hs, ps)
        assembles = fits(c_formula)
    verdict = mate_verdict(c_formula, assembles, u)
    if not worst:
        verdict = "what-if: " + verdict.replace(" in the worst case", "")
    verdict_colour = S.INTERFERENCE if not assembles else S.OK

    # boundary labels at mid-height on the far side of the tilt plane
    _boundary_labels(b, res, hole, hg, ex, centre, hs.direction_deg, 0.62)
    _boundary_labels(b, res, pin, pg, ex, centre, hs.direction_deg, 0.38)

    lines = _feature_lines(res, hole, hs, "hole")
    lines += _feature_lines(res, pin, ps, "pin")
    if worst:
        lines.append(mate_formula(mr, u, std) + f" {u.value}")
    else:
        lines.append(f"clearance = opening(hole) - envelope(pin) = {u.fmt(effective_size(hole, hs))} - "
                     f"{u.fmt(effective_size(pin, ps))} = {u.fmt(c_formula, signed=True)} {u.value}")
    if abs(c_tight - c_formula) >= 0.5 * 10 ** -u.decimals:
        lines.append(f"tightest on the picture (tilts as set): {u.fmt(c_tight, signed=True)} {u.value}")
    mmc = term("mmc", std)[0]
    lines.append(f"(from sizes alone: {u.fmt(mr.clearance_min_size, signed=True)} {u.value}, hole {mmc} - pin {mmc})")
    for f, side in ((hole, res.features[hole.id].inner_boundary), (pin, res.features[pin.id].outer_boundary)):
        if side.value is None:  # geom's fit takes perfect form there (MateResult.assumptions)
            lines.append(f"('{f.id}': no {side.abbr(std)} on the {mmc} side; the fit assumes perfect form)")
    b.notes.append("pin drawn on the hole's true position; both seat on datum A")
    return _finish(res, b, ex, sc.title, lines, verdict, verdict_colour, hs.direction_deg, "mate",
                   (hole.id, pin.id), {hole.id: hs, pin.id: ps}, clearance=c_formula,
                   tightest=cmin, bar=bar)


def _boundary_labels(b: _Built, res: SceneResult, f: Feature, g: dict, ex: _Ex, centre, direction_deg: float,
                     frac: float) -> None:
    u = res.scene.units
    phi = math.radians(direction_deg)
    v = np.array([-math.sin(phi), math.cos(phi), 0.0])
    zlen = g["z"][1]
    if g["mval"] is not None:
        r = ex.r(g["mval"] / 2.0)
        p = np.array([centre[0], centre[1], zlen * frac]) + v * r
        b.labels.append(Label(tuple(p), f"{g['tag']} {g['mname']} \u00d8{u.fmt(g['mval'])}", S.VC, 14, layer="vc"))
    if g["oval"] is not None:
        r = ex.r(g["oval"] / 2.0)
        p = np.array([centre[0], centre[1], zlen * 0.85]) + v * r
        b.labels.append(Label(tuple(p), f"{g['tag']} {g['oname']} \u00d8{u.fmt(g['oval'])}", S.RC, 14, layer="rc"))


def _fastener_for(res: SceneResult, f: Feature):
    """The fixed-fastener pattern that goes with a projected zone: the one whose projection P
    equals the zone height, else the only fixed one; None if there is none."""
    tol = f.tolerance
    fixed = [fr for fr in res.fasteners.values() if fr.fastener.kind == "fixed"]
    same = [fr for fr in fixed if fr.fastener.projection is not None and tol is not None
            and abs(fr.fastener.projection - (tol.projected or 0)) <= 1e-9]
    if same:
        return same[0]
    return fixed[0] if len(fixed) == 1 else None


def _projected_note(b: _Built, res: SceneResult, f: Feature, st: FeatureState, ex: _Ex, centre) -> dict | None:
    """Projected zone: the mating part on the far side of A, with its clearance hole, and the
    fastener along the extended axis, coloured by its clearance to that hole."""
    u, std = res.scene.units, res.scene.standard
    tol = f.tolerance
    P = tol.projected
    vcn = term("vc_MMC", std)[0]
    place = worst_case_axis(f, st, samples=2)
    shift = np.array([centre[0] - f.at[0], centre[1] - f.at[1], 0.0])
    pts_true = place.points + shift
    # what the axis would do if the same zone applied over the thread length only
    L = f.length
    off = place.offset
    uvec = np.array([*place.direction, 0.0])
    ghost = np.array([np.array([*centre, 0.0]) + uvec * (-off / 2 + off * z / L) + np.array([0, 0, z])
                      for z in (-P, L)])
    b.add("projected", "axis if the zone were not projected", _polyline(ex.pts(ghost)),
          _line(S.PART, 2.0) | dict(color="#8E959C"))
    miss = off / 2 + off * P / L - off / 2
    b.notes.append(f"same zone over the thread only: the extended axis would leave it by "
                   f"{u.fmt(miss)} at the mating part's far face")
    b.labels.append(Label(tuple(ex.pts(ghost[0:1])[0]), "axis if not projected", "#5C636A", 13, layer="projected"))
    fr = _fastener_for(res, f)
    if fr is None:
        b.notes.append("no fixed fastener in the scene: the mating part is not drawn")
        b.key("projected zone region", S.PROJECTED, "projected")
        return None
    fa = fr.fastener
    T = fr.position_tolerance.value
    vc_hole = fa.hole - T  # the mating clearance hole's virtual condition H - T
    rc_true = vc_hole / 2.0
    half = 1.3 * max(ex.R0, ex.r(rc_true)) + 0.45 * ex.R0
    rings = _rings(np.array([[centre[0], centre[1], -P], [centre[0], centre[1], 0.0]]), ex.r(rc_true))
    b.add("projected", "mating part", _block_with_hole(rings[0], rings[-1], centre, half, -P, 0.0),
          _surf(S.PROJECTED, 0.10, smooth_shading=False))
    b.add("projected", "mating clearance hole VC", _tube(rings), _surf(S.PROJECTED, 0.22))
    b.key(f"mating part: clearance hole at its {vcn} (H - T)", S.PROJECTED, "projected")
    # fastener of size F about the extended axis, through the mating part
    fast = Feature(f"{fa.id}", Kind.PIN, (fa.fastener, fa.fastener), P)
    hole_g = dict(z=(-P, 0.0), axis_true_line=np.array([[centre[0], centre[1], -P], [centre[0], centre[1], 0.0]]),
                  r_draw_surface=ex.r(rc_true), r_draw=ex.r(rc_true))
    zs = np.array([-P, 0.0])
    pin_g = dict(z=(-P, 0.0), pts_true=_axis_at(pts_true, zs), r_true=fa.fastener / 2.0,
                 r_draw=ex.r(fa.fastener / 2.0))
    t_max = tolerance_max(f)  # the fastener follows the hole's axis, within its zone
    cmin, c_tight, bar = _mate_surface(b, hole_g, fast, pin_g, ex, u, rc_true, S.TEXT,
                                       tag_hole="mating hole", tag_pin="fastener", mate_layer="projected",
                                       span=(vc_hole - fa.fastener - t_max, vc_hole - fa.fastener + t_max))
    c = vc_hole - (fa.fastener + place.offset)
    b.notes.append(f"fastener F {u.fmt(fa.fastener)} in the projected zone: envelope F + t = "
                   f"{u.fmt(fa.fastener + place.offset)}; mating hole {vcn} = H - T = {u.fmt(fa.hole)} - {u.fmt(T)} = "
                   f"{u.fmt(vc_hole)}; clearance {u.fmt(c, signed=True)} {u.value}")
    return dict(clearance=c, tight=c_tight, bar=bar, fastener=fa.id)


def build_feature_scene(res: SceneResult, feature_id: str, state: FeatureState | None = None,
                        exaggeration: float | None = None) -> Scene3D:
    """One feature alone: its part, datum A, zone, actual axis, surface and boundaries; with a
    projected zone also the mating part and fastener on the far side of A (if the scene has a
    fixed-fastener pattern to take them from)."""
    sc = res.scene
    f = sc.feature(feature_id)
    st = state or worst_case_state(f)
    worst = st == worst_case_state(f)
    k = _exaggeration(exaggeration, lambda: auto_exaggeration(res, feature_id=feature_id))
    centre = f.at
    ex = _Ex(k, centre, f.mmc / 2.0)
    b = _Built()
    u, std = sc.units, sc.standard
    g = _feature_geometry(res, f, st, ex, centre, f.kind.value, b, primary=True)
    half = _part(b, f, g, ex, centre, True)
    _datum(b, f, centre, half, f.length, _symbol_side(st.direction_deg))
    _boundary_labels(b, res, f, g, ex, centre, st.direction_deg, 0.5)
    lines = _feature_lines(res, f, st, f.kind.value)
    eff = effective_size(f, st)
    what = "clear opening" if f.kind is Kind.HOLE else "envelope"
    lines.append(f"{what} normal to A at this state: {u.fmt(eff)} {u.value}")
    verdict, colour, clearance, bar, tight = "", S.TEXT, None, None, None
    if f.tolerance is not None and f.tolerance.projected:
        out = _projected_note(b, res, f, st, ex, centre)
        if out is not None:
            clearance, tight, bar = out["clearance"], out["tight"], out["bar"]
            ok = fits(clearance)
            verdict = (("fastener CLEARS the mating hole by " if ok else "fastener JAMS in the mating hole by ")
                       + f"{u.fmt(abs(clearance))} {u.value}" + ("" if worst else " (what-if)"))
            colour = S.OK if ok else S.INTERFERENCE
    if not verdict:
        (mname, mval), _ = _boundary_terms(res, f)
        if mval is not None:
            verdict = f"worst-case mating boundary {mname} \u00d8{u.fmt(mval)} {u.value}"
        else:  # no boundary on the mating side: say why (geom's note)
            fr = res.features[f.id]
            verdict = (fr.inner_boundary if f.kind is Kind.HOLE else fr.outer_boundary).formula(u, std)
    return _finish(res, b, ex, sc.title, lines, verdict, colour, st.direction_deg, "feature", (f.id,),
                   {f.id: st}, clearance=clearance, tightest=tight, bar=bar)


# --------------------------------------------------------------------------- inspection


def _word(check) -> tuple[str, str]:
    """(word, colour) of a check: geom.conformance.verdict_word, the one mapping of a check to
    its word and colour role, in the picture's colours (style.ROLE_COLOUR)."""
    word, role = verdict_word(check)
    return word, S.ROLE_COLOUR[role]


def _envelope_names(e, std, hole: bool) -> tuple[str, str]:
    """(long, short) name of a fitted envelope in the standard's own terms: the long one is
    geom's name (geom.inspect.envelope_name) with its symbol, the short one for 3D labels."""
    mm = "minimum material" in e.name
    abbr = envelope_abbr(std, hole, mm)
    if std is Standard.ISO:  # "associated cylinder, maximum inscribed (GX), unconstrained"
        return e.name, f"{abbr}, {e.name.rsplit(', ', 1)[-1]}"
    related = e.name.startswith("related")
    return f"{e.name} ({abbr})", f"{'related' if related else 'unrelated'} {abbr}"


def _latin(text: str) -> str:
    """Characters VTK's fonts draw: the diameter sign as the Latin-1 O-slash."""
    return (text.replace("\u2300", "\u00d8").replace("\u2264", "<=").replace("\u2265", ">=")
            .replace("\u2212", "-").replace("\u00a7", "sec. "))


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


def _dashed_cage(axis: np.ndarray, radius: float, n_rings: int = 3, n_gen: int = 8, dashes: int = 12,
                 n_phi: int = N_PHI_CAGE, phase: float = 0.0) -> pv.PolyData:
    """Dashed wireframe of the right circular cylinder of ``radius`` about the straight axis
    (2, 3) (end points at increasing z): rings cut by planes parallel to A (as :func:`_rings`)
    and generator lines, every other dash left out."""
    zs = np.linspace(axis[0, 2], axis[1, 2], max(n_rings, 2))
    rings = _rings(_axis_at(axis, zs), radius, n_phi)
    pts, lines = [], []
    per = max(2, n_phi // (2 * dashes))
    for ring in rings:
        for j0 in range(0, n_phi, 2 * per):
            idx = [(j0 + j) % n_phi for j in range(per + 1)]
            base = len(pts)
            pts += [ring[i] for i in idx]
            lines.append([len(idx), *range(base, base + len(idx))])
    gz = np.linspace(axis[0, 2], axis[1, 2], 2 * dashes + 1)
    gen = _rings(_axis_at(axis, gz), radius, n_gen * 4)[:, ::4]  # n_gen generators
    if phase:
        gen = np.roll(gen, int(round(phase / (2 * np.pi) * n_gen)), axis=1)
    for g in range(gen.shape[1]):
        for i in range(0, len(gz) - 1, 2):
            base = len(pts)
            pts += [gen[i, g], gen[i + 1, g]]
            lines.append([2, base, base + 1])
    return pv.PolyData(np.array(pts), lines=np.concatenate(lines))


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


def _inspection_exaggeration(res: SceneResult, insp) -> float:
    """The feature's usual exaggeration (:func:`auto_exaggeration`), lowered (to a round number)
    if the measured part departs so far that a drawn point, envelope or median-line offset would
    move more than half the reference radius."""
    f = insp.feature
    k = auto_exaggeration(res, feature_id=f.id)
    R0 = f.mmc / 2.0
    c = np.array(f.at, float)
    far = []
    if insp.points is not None and len(insp.points):
        far.append(float(np.abs(np.hypot(*(insp.points[:, :2] - c).T) - R0).max()))
    for e in (insp.unrelated, insp.related):
        if e is not None:
            off = max(math.hypot(*(np.array(e.at_z(z)) - c)) for z in (0.0, f.length))
            far.append(abs(e.diameter / 2 - R0) + off)
    if insp.median_line is not None and len(insp.median_line):
        far.append(float(np.hypot(*(insp.median_line[:, :2] - c).T).max()))
    if insp.tolerance_allowed is not None:
        far.append(insp.tolerance_allowed)
    if insp.virtual_condition is not None:
        far.append(abs(insp.virtual_condition / 2 - R0))
    m = max(far, default=0.0)
    if m > 0 and k * m > 0.5 * R0:
        k = nice_floor(0.5 * R0 / m)
    return k


def build_inspection_scene(res: SceneResult, insp, exaggeration: float | None = None) -> Scene3D:
    """A measured feature in 3D, in the datum frame with datum A (z = 0).

    ``insp`` is the :class:`geom.inspect.InspectionResult` of one feature of ``res.scene``.
    Layers: "points" (the measured points, scalars ``radial_deviation``: their true distance from
    the least-squares cylinder, + outward, shown with a diverging colour map symmetric about 0
    and a scalar bar), "median_line" (the section centres as a polyline with its points, and for
    a projected zone the line the reading was taken on), "axis" (where it governs, ASME position
    and orientation: the feature axis, the axis of the unrelated envelope), "envelopes" (the
    unrelated envelope as a translucent surface, the related one as a dashed wireframe, named in
    the standard's terms by geom.inspect), "zone" (the tolerance zone at the tolerance allowed:
    t + the bonus / increase earned; at the true position for position, floating where the
    governing axis reading places it for orientation), "zone_axis", "vc" (the virtual-condition
    boundary, coaxial with the related envelope: the gauge pin that must enter), "datum".

    Text: ``verdict`` is geom's one overall verdict, ``insp.verdict.headline`` word for word, in
    the colour of its role (style.ROLE_COLOUR); ``verdicts`` are the size, axis and surface checks
    (word and colour role from geom.conformance.verdict_word) and, where there is one, the axis
    reading that does not govern (labelled so, in a neutral colour); the readouts give both axis
    readings and which governs (``insp.axis.basis``).

    The radial exaggeration k works as in the rest of the module: radii r are drawn as
    R0 + k (r - R0) about R0 = MMC / 2, lateral offsets of axes and centres x k, lengths along
    the axis true; a point's radial deviation is drawn x k about the drawn least-squares axis.
    ``exaggeration=None`` picks k (:func:`_inspection_exaggeration`); 1.0 draws true geometry.
    Scalars, readouts and verdicts are always the true values of ``insp``.
    """
    sc = res.scene
    f = insp.feature
    u, std = sc.units, sc.standard
    tol = f.tolerance
    k = float(exaggeration) if exaggeration is not None else _inspection_exaggeration(res, insp)
    if not (k > 0 and math.isfinite(k)):
        raise ValueError(f"exaggeration must be a positive number, got {exaggeration!r}")
    centre = f.at
    ex = _Ex(k, centre, f.mmc / 2.0)
    b = _Built()
    hole = f.kind is Kind.HOLE
    z0, z1 = 0.0, f.length
    fmt = u.fmt
    ls_cyl = insp.least_squares.cylinder if insp.least_squares is not None else None

    # the tilt plane of the pictures: towards the median line's largest departure from the zone axis
    zone_axis, zone_where = (None, "")
    if tol is not None and insp.tolerance_allowed is not None:
        zone_axis, zone_where = _zone_placement(f, insp)
    direction_deg = 0.0
    line = insp.median_line
    if line is not None and len(line):
        ref = zone_axis[0, :2] if zone_axis is not None else np.array(centre, float)
        if zone_axis is not None and zone_axis[0, 2] != zone_axis[1, 2]:
            ref = _axis_at(zone_axis, line[:, 2])[:, :2]
        off = line[:, :2] - ref
        i = int(np.argmax(np.hypot(off[:, 0], off[:, 1])))
        if np.hypot(*off[i]) > 1e-12:
            direction_deg = math.degrees(math.atan2(off[i, 1], off[i, 0]))
    phi = math.radians(direction_deg)
    v = np.array([-math.sin(phi), math.cos(phi), 0.0])  # normal to the cut plane, towards the half it keeps

    def side(angle_deg: float) -> np.ndarray:
        """Unit vector on A at ``angle_deg`` from the tilt direction towards the kept half: label
        anchors on the walls near the cut plane, apart from each other in the top view."""
        a = phi + math.radians(angle_deg)
        return np.array([math.cos(a), math.sin(a), 0.0])

    # measured points, coloured by their true radial deviation
    bar = None
    if insp.points is not None and len(insp.points):
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
        bar = dict(title=title, clim=(-m, m), fmt=f"%+.{u.decimals + 1}f", n_labels=5)
        b.key(f"measured points: radial deviation from the LS cylinder (true, {u.value}; + outward)",
              S.DEVIATION_COLORS[-1], "points")

    # the axis readings: the median line (section centres) is always drawn; where the feature
    # axis (the axis of the unrelated envelope) governs (ASME position and orientation) it is
    # drawn and labelled as the governing axis. insp.axis is the governing reading.
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
    shape = "\u00d8" if dia else "width "
    iso = std is Standard.ISO
    mline = ("extracted" if iso else "derived") + " median line"
    # the readings and the tolerance allowed are read against each other: formatted together
    compared = {"governing": None if governing is None else governing.deviation,
                "other": None if other is None else other.deviation, "allowed": insp.tolerance_allowed}
    compared = {key: val for key, val in compared.items() if val is not None}
    shown = dict(zip(compared, u.fmt_cmp(*compared.values())))

    def needs(r) -> str:
        key = "governing" if r is governing else "other" if r is other else None
        return f"needs {shape}{shown[key] if key in shown else fmt(r.deviation)}"

    def role_of(basis: str) -> str:
        if other is None:
            return ""
        return " (governs)" if basis == gov_basis else " (does not govern)"

    median = governing if gov_basis == "median line" else insp.median_axis
    if line is not None and len(line):
        dl = ex.pts(np.asarray(line, float))
        mcol = S.AXIS_NOT_GOVERNING if gov_basis == "feature axis" else S.MEDIAN_LINE
        b.add("median_line", "median line", _polyline(dl), _line(mcol, 3.0))
        b.add("median_line", "median line points", pv.PolyData(dl.copy()),
              dict(color=mcol, point_size=10, render_points_as_spheres=True, lighting=False))
        b.key(f"{mline} (section centres)" + role_of("median line").replace(" (", ": ").rstrip(")"), mcol,
              "median_line")
        ax_line = None if median is None else np.asarray(median.line, float)
        if tol is not None and tol.projected and ax_line is not None and len(ax_line) >= 2:
            b.add("median_line", "median line extended into the projected zone", _polyline(ex.pts(ax_line)),
                  _line(S.MEDIAN_LINE, 2.0))
        top = dl[-1]
        txt = "median line"
        if median is not None and median.deviation is not None:
            txt += f": {needs(median)}{role_of('median line')}"
        b.labels.append(Label(tuple(top + np.array([0, 0, 0.05 * f.length]) + 0.08 * ex.R0 * v), txt,
                              S.TEXT if mcol == S.AXIS_NOT_GOVERNING else mcol, 14, layer="median_line"))
    if gov_basis == "feature axis" and governing.line is not None and len(governing.line) >= 2:
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
        txt = "feature axis" + (f": {needs(governing)}" if governing.deviation is not None else "") + " (governs)"
        p = ex.pts(_axis_at(fl, np.array([0.12 * f.length])))[0]
        b.labels.append(Label(tuple(p + 0.10 * ex.R0 * v), txt, S.FEATURE_AXIS, 14, layer="axis"))

    # the envelopes
    zs = np.array([z0, z1])
    labels_at = iter(((0.30, 28.0), (0.55, 0.0), (0.80, -28.0)))  # (height / length, angle from the tilt)
    if insp.unrelated is not None:
        e = insp.unrelated
        long, short = _envelope_names(e, std, hole)
        rings = _rings(ex.pts(_env_axis(e, zs)), ex.r(e.diameter / 2.0))
        b.add("envelopes", "unrelated envelope", _tube(rings), _surf(S.ENVELOPE, 0.22, specular=0.0))
        b.key(f"{long} \u00d8{fmt(e.diameter)}", S.ENVELOPE, "envelopes")
        h, a = next(labels_at)
        p = ex.pts(np.array([[*e.at_z(h * f.length), h * f.length]]))[0] + side(a) * ex.r(e.diameter / 2.0)
        b.labels.append(Label(tuple(p), f"{short} \u00d8{fmt(e.diameter)}", S.TEXT, 14, layer="envelopes"))
    if insp.related is not None:
        e = insp.related
        long, short = _envelope_names(e, std, hole)
        axis_d = ex.pts(_env_axis(e, zs))
        b.add("envelopes", "related envelope", _dashed_cage(axis_d, ex.r(e.diameter / 2.0), phase=phi),
              _line(S.ENVELOPE_RELATED, 2.5))
        b.key(f"{long} \u00d8{fmt(e.diameter)}, dashed", S.ENVELOPE_RELATED, "envelopes")
        h, a = next(labels_at)
        p = ex.pts(np.array([[*e.at_z(h * f.length), h * f.length]]))[0] + side(a) * ex.r(e.diameter / 2.0)
        b.labels.append(Label(tuple(p), f"{short} \u00d8{fmt(e.diameter)}", S.ENVELOPE_RELATED, 14,
                              layer="envelopes"))

    # the tolerance zone at the tolerance allowed
    if zone_axis is not None:
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

    # the virtual condition boundary (the gauge), where the related envelope sits
    if insp.virtual_condition is not None:
        vc = insp.virtual_condition
        vname = term(res.features[f.id].virtual_condition.key, std)[0]
        # coaxial with the related envelope (normal to A; at the true position for position), else
        # at the basic location
        ac = insp.related.at_z(0.0) if insp.related is not None else centre
        ac = tuple(ex.pts(np.array([[ac[0], ac[1], 0.0]]))[0, :2])
        b.add("vc", f"{vname}", _cage(ac, ex.r(vc / 2.0), z0, z1, n_rings=3, n_gen=8, phase=phi),
              _line(S.VC, 2.5))
        b.key(f"{vname} \u00d8{fmt(vc)}: the boundary a gauge checks (perfect, normal to A)", S.VC, "vc")
        h, a = next(labels_at)
        p = np.array([ac[0], ac[1], h * f.length]) + side(a) * ex.r(vc / 2.0)
        b.labels.append(Label(tuple(p), f"{vname} \u00d8{fmt(vc)}", S.VC, 14, layer="vc"))

    # datum A (drawn a little beyond the largest drawn radius)
    r_big = max([ex.R0] + [ex.r(e.diameter / 2) for e in (insp.unrelated, insp.related) if e is not None])
    if insp.points is not None and len(insp.points):
        r_big = max(r_big, float(np.hypot(*(b.layers["points"][0].mesh.points[:, :2] - np.array(centre)).T).max()))
    half = 1.1 * r_big + 0.2 * ex.R0
    _datum(b, f, centre, half, f.length, _symbol_side(direction_deg))

    # readouts
    role = "HOLE" if hole else "PIN"
    lines = [f"{role} '{f.id}' as measured",
             f"  {_frame_text(f, u)}",
             f"  limits {fmt(f.limits[0])} - {fmt(f.limits[1])} {u.value}"]
    if insp.source == "points" and insp.points is not None:
        lines.append(f"  {len(insp.points)} points in {len(insp.sections)} sections"
                     + (f", U = {fmt(insp.uncertainty)} (k = 2)" if insp.uncertainty is not None else ", no U given"))
    else:
        lines.append("  typed values" + (f", U = {fmt(insp.uncertainty)} (k = 2)" if insp.uncertainty is not None else ""))
    for e in (insp.unrelated, insp.related):
        if e is not None:
            how = f"tilt {e.tilt_deg:.3f} deg" if e.constraint != "typed value" else "typed"
            if e.constraint.startswith("normal to A"):
                how = e.constraint.split(";")[0]
            lines.append(f"  {_envelope_names(e, std, hole)[1]} \u00d8{fmt(e.diameter)}  ({how})")
    if insp.bonus is not None:
        B = term("bonus", std)[0]
        basis = insp.bonus_basis
        if iso:
            basis = {"unrelated": "unconstrained", "related": "constrained"}.get(basis, basis) + " associated cylinder"
        else:
            basis += " envelope"
        lines.append(f"  {B} basis: {basis}")
    lines += [f"  {_latin(x)}" for x in insp.formulas]
    allowed = shown.get("allowed", "")
    if governing is not None and governing.deviation is not None:
        if other is None:
            lines.append(f"  axis reading: {governing.basis} {needs(governing)}"
                         + (f" (tolerance allowed {allowed})" if allowed else ""))
        else:
            lines.append("  axis readings" + (f" (tolerance allowed {allowed})" if allowed else "") + ":")
            lines.append(f"    {governing.basis} {needs(governing)} (governs)")
            lines.append(f"    {other.basis} {needs(other)} (does not govern)")
    checks = [(insp.size_check, None), (insp.axis_check, None), (insp.surface_check, None)]
    if insp.other_axis_check is not None:
        checks.append((insp.other_axis_check, "does not govern"))
    wide = max(len(_word(c)[0]) for c, _ in checks) + 2
    verdicts = []
    for c, tag in checks:
        word, colour = _word(c)
        name = "axis" if tag else c.name
        text = f"{name:<8}{word:<{wide}}{c.detail}"
        if c.evaluated and (c.uncertainty is None or c.outcome is Outcome.NOT_PROVEN):
            # with U stated, CONFORMS / DOES NOT CONFORM already say "proven"
            text += f"  [{c.outcome_text if c.uncertainty is not None else c.rule}]"
        if tag:  # the reading that does not govern: shown for information, in a neutral colour
            text += f"  {tag}"
            colour = S.NEUTRAL
        verdicts.append((_latin(text), colour))
    pv_ = insp.verdict
    headline, head_colour = ("", S.TEXT) if pv_ is None else (_latin(pv_.headline), S.ROLE_COLOUR[pv_.role])
    if pv_ is not None:
        if pv_.why:  # which readings decide the headline, and why
            verdicts.append((_latin(pv_.why), S.TEXT))
        b.notes += [_latin(n) for n in pv_.notes]
    if insp.axis_governs:
        b.notes.append(_latin(insp.axis_governs))
    if insp.explanation and readings_disagree(insp.axis_check, insp.surface_check):
        b.notes.append(_latin(insp.explanation[0]))
    sc3 = _finish(res, b, ex, sc.title, lines, headline, head_colour, direction_deg, "inspection", (f.id,), {},
                  bar=bar)
    if k == 1.0:
        caption = "TRUE SCALE\nradial deviations x 1 (no exaggeration)"
    else:
        caption = (f"RADIAL DEVIATIONS x {k:g}\ndeviations, sizes, offsets drawn x {k:g} about "
                   f"\u00d8{fmt(2 * ex.R0)}; lengths, colours, numbers true")
    return replace(sc3, caption=caption, verdicts=tuple(verdicts))


# --------------------------------------------------------------------------- plotting

_UNCUT = frozenset({"datum", "axis", "zone_axis", "clearance", "median_line"})  # lines/points in the cut plane
_OUTLINED = {"part": ("#6B737B", 2.0), "surface": (S.SURFACE, 5.0), "zone": (S.ZONE, 2.5), "mate": (None, 6.0),
             "projected": (S.PROJECTED, 3.0), "envelopes": (None, 3.0)}


_CUTS: OrderedDict = OrderedDict()  # (id(mesh), plane, outline) -> (mesh, cut, line)
_CUTS_SIZE = 128


def _cells_of(ca) -> tuple[np.ndarray, np.ndarray]:
    """(offsets, connectivity) of a vtkCellArray as int64 numpy arrays."""
    return (vtk_to_numpy(ca.GetOffsetsArray()).astype(np.int64, copy=False),
            vtk_to_numpy(ca.GetConnectivityArray()).astype(np.int64, copy=False))


def _fan(offsets: np.ndarray, conn: np.ndarray, first: int) -> np.ndarray:
    """(m, first + 1) vertex ids: with first=2 each polygon of k >= 3 points as the k - 2
    triangles of a fan from its first point (exact for the convex polygons built here: quads,
    caps, faces); with first=1 each polyline of k >= 2 points as its k - 1 segments."""
    sizes = np.diff(offsets)
    count = np.maximum(sizes - first, 0)
    total = int(count.sum())
    if total == 0:
        return np.empty((0, first + 1), dtype=np.int64)
    cell = np.repeat(np.arange(len(sizes)), count)
    i = np.arange(total) - np.repeat(np.cumsum(count) - count, count)
    start = offsets[:-1][cell]
    if first == 2:
        return np.stack([conn[start], conn[start + 1 + i], conn[start + 2 + i]], axis=1)
    return np.stack([conn[start + i], conn[start + i + 1]], axis=1)


class _Cutter:
    """Points and signed distances to a plane of one mesh, collecting the points made on its
    edges where they cross the plane (point data is interpolated linearly along the edge, as
    VTK's clip and cut filters do, when a :class:`_CutPlan` is applied)."""

    def __init__(self, mesh: pv.PolyData, o: np.ndarray, n: np.ndarray):
        self.P = np.asarray(mesh.points, dtype=float)
        self.s = (self.P - o) @ n
        self.new_a: list[np.ndarray] = []
        self.new_b: list[np.ndarray] = []
        self.count = len(self.P)

    def edge(self, a: np.ndarray, b: np.ndarray) -> np.ndarray:
        """Ids of the points where the edges a -> b (a inside, b outside) cross the plane."""
        ids = self.count + np.arange(len(a))
        self.count += len(a)
        self.new_a.append(a)
        self.new_b.append(b)
        return ids

    def plan(self, tris=None, segs=None, verts=None) -> _CutPlan:
        """The plan of the mesh of these cells over the original and the edge points (unused
        points dropped)."""
        a = np.concatenate(self.new_a) if self.new_a else np.empty(0, dtype=np.int64)
        b = np.concatenate(self.new_b) if self.new_b else np.empty(0, dtype=np.int64)
        t = self.s[a] / (self.s[a] - self.s[b]) if len(a) else np.empty(0)
        parts = [x.reshape(-1) for x in (tris, segs, verts) if x is not None and x.size]
        used = np.unique(np.concatenate(parts)) if parts else np.empty(0, dtype=np.int64)
        remap = np.full(self.count, -1, dtype=np.int64)
        remap[used] = np.arange(len(used))
        old, new = used[used < len(self.P)], used[used >= len(self.P)] - len(self.P)
        cells = tuple(None if x is None or not x.size else remap[x].reshape(-1) for x in (tris, segs, verts))
        return _CutPlan(old, a[new], b[new], t[new], *cells)


@dataclass(frozen=True)
class _CutPlan:
    """How a clip or a section of one mesh by one plane is made from the mesh: the original
    points kept (``old``), the points made on edges (from ``a`` towards ``b`` by ``t``) and
    the cells over them (triangles, segments, vertices; ids in that point order). It depends
    on the mesh's points and cells only, so a mesh with the same geometry and new point data
    (the pin's clearance colouring on a move of the hole) is cut by applying it again."""

    old: np.ndarray
    a: np.ndarray
    b: np.ndarray
    t: np.ndarray
    tris: np.ndarray | None
    segs: np.ndarray | None
    verts: np.ndarray | None
    cells: dict = field(default_factory=dict, compare=False)  # the vtkCellArrays, made once, shared

    def _cells(self) -> dict:
        if not self.cells:
            if self.tris is not None:
                self.cells["polys"] = _cell_array(3 * np.arange(len(self.tris) // 3 + 1), self.tris)
            if self.segs is not None:
                self.cells["lines"] = _cell_array(2 * np.arange(len(self.segs) // 2 + 1), self.segs)
            if self.verts is not None:
                self.cells["verts"] = _cell_array(np.arange(len(self.verts) + 1), self.verts)
        return self.cells

    def _take(self, v: np.ndarray) -> np.ndarray:
        w = self.t.reshape((-1,) + (1,) * (v.ndim - 1))
        made = v[self.a] + w * (v[self.b] - v[self.a])
        if np.issubdtype(v.dtype, np.integer):
            made = np.rint(made)  # as VTK rounds interpolated integers
        return np.concatenate([v[self.old], made]).astype(v.dtype, copy=False)

    def apply(self, mesh: pv.PolyData) -> pv.PolyData:
        n_out = len(self.old) + len(self.a)
        out = _mesh(self._take(np.asarray(mesh.points, dtype=float)) if n_out else np.empty((0, 3)))
        cells = self._cells()  # shared by every mesh cut to this plan: nothing writes to them
        if "polys" in cells:
            out.SetPolys(cells["polys"])
        if "lines" in cells:
            out.SetLines(cells["lines"])
        if "verts" in cells:
            out.SetVerts(cells["verts"])
        src, dst = mesh.GetPointData(), out.GetPointData()
        normals, scalars, tcoords = src.GetNormals(), src.GetScalars(), src.GetTCoords()
        for i in range(src.GetNumberOfArrays()):
            arr_in = src.GetArray(i)
            if arr_in is None:
                continue
            name, v = arr_in.GetName(), vtk_to_numpy(arr_in)
            arr = numpy_to_vtk(np.ascontiguousarray(self._take(v)) if n_out else v[:0], deep=True)
            arr.SetName(name)
            if normals is not None and name == normals.GetName():
                dst.SetNormals(arr)
            elif tcoords is not None and name == tcoords.GetName():
                dst.SetTCoords(arr)
            else:
                dst.AddArray(arr)
                if scalars is not None and name == scalars.GetName():
                    dst.SetActiveScalars(name)
        return out


_PLANS: OrderedDict = OrderedDict()  # (kind, plane, geometry bytes) -> _CutPlan
_PLANS_SIZE = 64


def _geometry_key(mesh: pv.PolyData) -> tuple:
    """The bytes of a mesh's points and cells: equal keys, equal geometry."""
    pts = vtk_to_numpy(mesh.GetPoints().GetData()) if mesh.GetPoints() is not None else np.empty((0, 3))
    parts = [pts.dtype.str, pts.shape, pts.tobytes()]
    for cells in (mesh.GetPolys(), mesh.GetLines(), mesh.GetVerts()):
        off, conn = _cells_of(cells)
        parts += [off.tobytes(), conn.tobytes()]
    return tuple(parts)


def _planned(kind: str, mesh: pv.PolyData, o: np.ndarray, n: np.ndarray, make) -> pv.PolyData:
    """``make()``'s cut of ``mesh``, or the remembered plan for a mesh of the same geometry
    cut by the same plane, applied to this mesh's point data. Triangle strips (none of the
    builders makes them) are split into triangles first."""
    if mesh.GetNumberOfStrips():
        mesh = mesh.triangulate()
        make = {"clip": lambda: _clip_plan(mesh, o, n), "section": lambda: _section_plan(mesh, o, n)}[kind]
    key = (kind, np.asarray(o, dtype=float).tobytes(), np.asarray(n, dtype=float).tobytes(), _geometry_key(mesh))
    plan = _PLANS.get(key)
    if plan is None:
        plan = _PLANS[key] = make()
        if len(_PLANS) > _PLANS_SIZE:
            _PLANS.popitem(last=False)
    else:
        _PLANS.move_to_end(key)
    return plan.apply(mesh)


def _split_by_plane(mesh: pv.PolyData, inside: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """``mesh``'s faces as triangles (:func:`_fan`), sorted by how many of their vertices are
    ``inside``: (all three, exactly one, exactly two). A triangle with one in is turned so that
    vertex is first; with two in, so that the one outside is last (turns keep orientation)."""
    tris = _fan(*_cells_of(mesh.GetPolys()), first=2)
    ins = inside[tris]
    k = ins.sum(axis=1)
    roll = np.arange(3)
    t1, t2 = tris[k == 1], tris[k == 2]
    t1 = np.take_along_axis(t1, (np.argmax(ins[k == 1], axis=1)[:, None] + roll) % 3, axis=1)
    t2 = np.take_along_axis(t2, (np.argmin(ins[k == 2], axis=1)[:, None] + 1 + roll) % 3, axis=1)
    return tris[k == 3], t1, t2


def _clip_behind(mesh: pv.PolyData, o: np.ndarray, n: np.ndarray) -> pv.PolyData:
    """The part of ``mesh`` on the side of the plane (o, n) that n points to, faces and lines
    cut exactly at the plane (point data interpolated), as triangles, segments and vertices:
    what VTK's ``vtkClipPolyData`` keeps with the plane (o, -n) and InsideOut (the tests check
    it against VTK), done in numpy: it runs for every changed mesh on a what-if move, and
    VTK's filter costs about 1 ms per mesh here, ten times this."""
    return _planned("clip", mesh, o, n, lambda: _clip_plan(mesh, o, n))


def _clip_plan(mesh: pv.PolyData, o: np.ndarray, n: np.ndarray) -> _CutPlan:
    c = _Cutter(mesh, o, n)
    inside = c.s >= 0.0
    whole, t1, t2 = _split_by_plane(mesh, inside)
    keep = [whole]
    if len(t1):  # one vertex in: the triangle (v0, v0->v1, v0->v2), v0 the one inside
        keep.append(np.stack([t1[:, 0], c.edge(t1[:, 0], t1[:, 1]), c.edge(t1[:, 0], t1[:, 2])], axis=1))
    if len(t2):  # two in: the quad (v0, v1, v1->v2, v0->v2), v2 the one outside
        e12, e02 = c.edge(t2[:, 1], t2[:, 2]), c.edge(t2[:, 0], t2[:, 2])
        keep += [np.stack([t2[:, 0], t2[:, 1], e12], axis=1), np.stack([t2[:, 0], e12, e02], axis=1)]
    segs = _fan(*_cells_of(mesh.GetLines()), first=1)
    si = inside[segs]
    seg_keep = [segs[si.all(axis=1)]]
    for a_in in (0, 1):  # one end in: from it to the crossing, in the segment's direction
        one = segs[si[:, a_in] & ~si[:, 1 - a_in]]
        if len(one):
            e = c.edge(one[:, a_in], one[:, 1 - a_in])
            seg_keep.append(np.stack([one[:, 0], e], axis=1) if a_in == 0 else np.stack([e, one[:, 1]], axis=1))
    _v_off, v_conn = _cells_of(mesh.GetVerts())
    verts = v_conn[inside[v_conn]] if len(v_conn) else None
    return c.plan(np.concatenate(keep), np.concatenate(seg_keep), verts)


def _plane_section(mesh: pv.PolyData, origin: np.ndarray, n: np.ndarray) -> pv.PolyData:
    """The segments where the plane (origin, n) cuts ``mesh``'s faces, point data interpolated:
    the lines VTK's ``vtkCutter`` gives (the tests compare them), in numpy. Faces meeting the
    plane in a vertex only give nothing; a face edge lying in the plane is given once (by the
    face on the side n does not point to)."""
    return _planned("section", mesh, origin, n, lambda: _section_plan(mesh, origin, n))


def _section_plan(mesh: pv.PolyData, origin: np.ndarray, n: np.ndarray) -> _CutPlan:
    c = _Cutter(mesh, origin, n)
    _whole, t1, t2 = _split_by_plane(mesh, c.s >= 0.0)
    segs = []  # the two crossed edges of each triangle the plane cuts
    if len(t1):
        segs.append((t1[:, 0], t1[:, 1], t1[:, 0], t1[:, 2]))
    if len(t2):
        segs.append((t2[:, 1], t2[:, 2], t2[:, 0], t2[:, 2]))
    out = []
    for a0, b0, a1, b1 in segs:
        p0 = c.P[a0] + (c.s[a0] / (c.s[a0] - c.s[b0]))[:, None] * (c.P[b0] - c.P[a0])
        p1 = c.P[a1] + (c.s[a1] / (c.s[a1] - c.s[b1]))[:, None] * (c.P[b1] - c.P[a1])
        real = np.any(p0 != p1, axis=1)  # a face touching the plane at a vertex gives a point: none
        if real.any():
            out.append(np.stack([c.edge(a0[real], b0[real]), c.edge(a1[real], b1[real])], axis=1))
    return c.plan(segs=np.concatenate(out) if out else None)


def _cut(mesh: pv.PolyData, o: np.ndarray, n: np.ndarray, origin: np.ndarray, outline: bool):
    """(the half of ``mesh`` behind the plane (o, n), its outline in the plane through
    ``origin`` or None). Remembered for the shared meshes a what-if move hands back unchanged
    (the entry keeps the mesh alive, so its id stays its own); the results are shared too."""
    key = (id(mesh), o.tobytes(), n.tobytes(), origin.tobytes(), outline)
    hit = _CUTS.get(key)
    if hit is not None and hit[0] is mesh:
        _CUTS.move_to_end(key)
        return hit[1], hit[2]
    cut = _clip_behind(mesh, o, n)
    line = None
    if outline and mesh.n_cells and mesh.n_lines == 0:
        line = _plane_section(mesh, origin, n)
    _CUTS[key] = (mesh, cut, line)
    if len(_CUTS) > _CUTS_SIZE:
        _CUTS.popitem(last=False)
    return cut, line


def section_cut(scene: Scene3D) -> Scene3D:
    """The scene cut by the plane of the tilt (through the zone axis, normal to A), keeping the
    half away from the iso and section cameras, with the cut outlines drawn as thick lines:
    the hole's walls, the pin's walls (coloured by clearance), the zone's sides and the part.
    (Clipping in the renderer instead draws the same picture, but a frame of the whole meshes
    costs a quarter more here than a frame of the halves: the cut is made on the meshes.)"""
    origin, normal = scene.section
    n = np.asarray(normal, dtype=float)
    o = np.asarray(origin, dtype=float) - 1e-7 * max(1.0, scene.exaggeration) * n  # keep lines in the plane
    layers: dict[str, tuple[Layer, ...]] = {}
    for name, items in scene.layers.items():
        if name in _UNCUT:
            layers[name] = items
            continue
        out: list[Layer] = []
        for it in items:
            mesh = it.mesh
            outline = name in _OUTLINED and it.style.get("opacity", 1.0) > 0.05
            cut, line = _cut(mesh, o, n, np.asarray(origin, dtype=float), outline)
            if cut.n_points:
                out.append(replace(it, mesh=cut))
            if line is not None and line.n_points:
                colour, width = _OUTLINED[name]
                st = {k: v for k, v in it.style.items() if k in ("scalars", "cmap", "clim", "show_scalar_bar",
                                                                 "interpolate_before_map")}
                if "scalars" not in st:
                    st["color"] = colour or it.style.get("color", S.TEXT)
                st.update(line_width=width, lighting=False)
                out.append(Layer(it.name + " (cut)", line, st))
        if out:
            layers[name] = tuple(out)
    return replace(scene, layers=layers)


def view_scene(scene: Scene3D, view: str) -> Scene3D:
    """The scene as ``render_image`` draws it from ``view``: cut open at the plane of the tilt
    for "iso" and "section" (so the axes, the zone and the tight spots inside are visible),
    whole for "top" (the through-view normal to A)."""
    if view not in VIEWS:
        raise ValueError(f"unknown view {view!r}; choose one of {', '.join(VIEWS)}")
    return scene if view == "top" else section_cut(scene)


def _visible(scene: Scene3D, visible: set[str] | None) -> set[str]:
    return set(LAYERS) - HIDDEN_BY_DEFAULT if visible is None else set(visible)


def _icon(colour: str):
    """A small solid image: the legend swatch (so the legend text itself stays TEXT-coloured)."""
    import vtk
    from vtk.util.numpy_support import numpy_to_vtk

    img = vtk.vtkImageData()
    img.SetDimensions(12, 12, 1)
    arr = np.tile(np.array(S.rgb255(colour), dtype=np.uint8), (144, 1))
    img.GetPointData().SetScalars(numpy_to_vtk(arr, deep=True, array_type=vtk.VTK_UNSIGNED_CHAR))
    return img


def _text_box(text: str, prop) -> tuple[int, int]:
    """(width, height) in pixels of ``text`` drawn with the text property ``prop``."""
    import vtk

    bb = [0, 0, 0, 0]
    vtk.vtkTextRenderer().GetBoundingBox(prop, text, bb, 72)
    return int(bb[1] - bb[0] + 1), int(bb[3] - bb[2] + 1)


def _text_width(text: str, prop) -> int:
    return _text_box(text, prop)[0]


def _font_px(plotter) -> int:
    w, h = plotter.window_size
    return max(7, int(round(min(w, 1.333 * h) / 165)))


def _colour_by_name(actor, mesh: pv.PolyData, name: str) -> None:
    """Feed ``mesh`` straight to the actor's mapper, coloured by its point array ``name``
    (field-data scalar mode), in place of the active-scalars filter PyVista puts in between:
    that filter runs Python on every render after its input changes, i.e. on every what-if
    move. The picture is the same; the mapper's colour map and range are untouched."""
    mapper = actor.GetMapper()
    if name not in mesh.point_data or mapper.GetNumberOfInputConnections(0) == 0:
        return
    up = mapper.GetInputAlgorithm(0, 0)
    if up is None or not up.IsA("vtkPythonAlgorithm"):
        return
    mapper.SetInputDataObject(0, mesh)
    mapper.SetScalarModeToUsePointFieldData()
    mapper.SelectColorArray(name)


def add_to_plotter(plotter, scene: Scene3D, visible: set[str] | None = None) -> dict[str, list]:
    """Add the scene's layers to ``plotter`` (any ``pyvista.Plotter``, e.g. a pyvistaqt
    ``QtInteractor``); returns layer name -> actors. ``visible=None`` shows every layer but
    those in HIDDEN_BY_DEFAULT ("rc"). Overlays: "readouts" (title, numbers, exaggeration
    caption, verdict), "legend" (legend box, clearance scalar bar)."""
    show = _visible(scene, visible)
    actors: dict[str, list] = {name: [] for name in LAYERS}
    plotter.set_background(S.BACKGROUND)
    mate_actor = None
    for name in LAYERS:
        if name not in show:
            continue
        for it in scene.layers.get(name, ()):
            style = dict(it.style)
            own_normals = bool(style.get("smooth_shading")) and it.mesh.GetPointData().GetNormals() is not None
            if own_normals:  # shaded smooth with the mesh's own normals: no normals filter in
                style["smooth_shading"] = False  # the actor's pipeline, re-run on each new mesh
            a = plotter.add_mesh(it.mesh, reset_camera=False, render=False, **style)
            if own_normals:
                a.prop.interpolation = "phong"
            if isinstance(style.get("scalars"), str):
                _colour_by_name(a, it.mesh, style["scalars"])
            actors[name].append(a)
            if "scalars" in style and mate_actor is None:
                mate_actor = a
    fs = _font_px(plotter)
    if "labels" in show:
        groups: dict[tuple, list[Label]] = {}
        for lb in scene.labels:
            if lb.layer in show or lb.layer == "labels":
                groups.setdefault((lb.colour, lb.size, lb.layer == "datum", lb.justify), []).append(lb)
        for (colour, size, framed, justify), lbs in groups.items():
            a = plotter.add_point_labels(
                np.array([lb.point for lb in lbs]), [lb.text for lb in lbs],
                font_size=max(8, int(round(size * (fs + 3) / 14))), text_color=colour, font_family=S.FONT_FAMILY,
                bold=True, shape="rect", shape_color=S.BACKGROUND, shape_opacity=1.0 if framed else 0.8,
                show_points=False, always_visible=True, margin=5 if framed else 2, reset_camera=False,
                render=False, justification_horizontal=justify)
            actors["labels"].append(a)
    w, h = plotter.window_size
    if "readouts" in show:
        t = plotter.add_text(scene.title, position=(int(0.012 * w), h - int(0.012 * h)), font_size=fs + 4,
                             color=S.TEXT, font=S.FONT_FAMILY, render=False)
        t.GetTextProperty().SetVerticalJustificationToTop()
        t.GetTextProperty().BoldOn()
        actors["readouts"].append(t)
        r = plotter.add_text("\n".join(scene.readouts), position=(int(0.012 * w), h - int(0.012 * h) - 3.2 * fs),
                             font_size=fs, color=S.TEXT, font=S.MONO_FAMILY, render=False)
        r.GetTextProperty().SetVerticalJustificationToTop()
        r.GetTextProperty().SetLineSpacing(1.05)
        actors["readouts"].append(r)
        head, _, rest = scene.caption.partition("\n")
        for i, (txt, size, bold) in enumerate(((head, fs + 6, True), (rest, fs, False))):
            if not txt:
                continue
            c = plotter.add_text(txt, position=(w - int(0.012 * w), h - int(0.012 * h) - i * 2.2 * (fs + 4)),
                                 font_size=size, color=S.TEXT, font=S.FONT_FAMILY, render=False)
            c.GetTextProperty().SetVerticalJustificationToTop()
            c.GetTextProperty().SetJustificationToRight()
            c.GetTextProperty().SetBold(bold)
            actors["readouts"].append(c)
        top = h - int(0.012 * h) - 3.2 * fs - _text_box("\n".join(scene.readouts), r.GetTextProperty())[1]
        top -= 0.6 * fs
        if scene.verdict:  # under the readouts
            v = plotter.add_text(scene.verdict, position=(int(0.012 * w), int(top)), font_size=fs + 3,
                                 color=scene.verdict_colour, font=S.FONT_FAMILY, render=False)
            v.GetTextProperty().BoldOn()
            v.GetTextProperty().SetVerticalJustificationToTop()
            actors["readouts"].append(v)
            top -= _text_box(scene.verdict, v.GetTextProperty())[1] + 0.4 * fs
        for txt, colour in scene.verdicts:  # one line each, in its own colour
            v = plotter.add_text(txt, position=(int(0.012 * w), int(top)), font_size=fs, color=colour,
                                 font=S.MONO_FAMILY, render=False)
            v.GetTextProperty().BoldOn()
            v.GetTextProperty().SetVerticalJustificationToTop()
            actors["readouts"].append(v)
            top -= 1.15 * _text_box(txt, v.GetTextProperty())[1]
    if "legend" in show:
        rows = [(lbl, col) for (lbl, col), layer in zip(scene.legend, scene.legend_layers) if layer in show]
        texts = []
        for lbl, col in rows:
            tx = plotter.add_text(lbl, position=(0, 0), font_size=fs, color=S.TEXT, font=S.FONT_FAMILY, render=False)
            tx.GetTextProperty().SetBackgroundColor(*S.rgb(S.BACKGROUND))
            tx.GetTextProperty().SetBackgroundOpacity(0.8)
            texts.append(tx)
        widths = [_text_width(lbl, tx.GetTextProperty()) for (lbl, _), tx in zip(rows, texts)]
        row_px = 1.25 * max((tx.GetTextProperty().GetFontSize() for tx in texts), default=fs)
        x_txt = w - int(0.012 * w) - max(widths, default=0)
        for i, ((lbl, col), tx) in enumerate(zip(reversed(rows), reversed(texts))):
            y = int(0.015 * h + i * row_px)
            tx.SetPosition(x_txt, y)
            sw = plotter.add_text("  ", position=(0, y), font_size=fs, font=S.MONO_FAMILY, render=False)
            tp = sw.GetTextProperty()
            sw.SetPosition(x_txt - _text_width("  ", tp) - int(0.6 * fs), y)
            tp.SetBackgroundColor(*S.rgb(col))
            tp.SetBackgroundOpacity(1.0)
            tp.SetFrame(True)
            tp.SetFrameColor(*S.rgb(S.TEXT))
            actors["legend"] += [sw, tx]
        if mate_actor is not None and scene.scalar_bar is not None:
            u = scene.units
            bar = scene.scalar_bar
            actors["legend"].append(plotter.add_scalar_bar(
                title=bar["title"], mapper=mate_actor.mapper, n_labels=bar.get("n_labels", 5), color=S.TEXT,
                font_family=S.FONT_FAMILY, vertical=True, position_x=0.90, position_y=0.46, width=0.06,
                height=0.34, fmt=bar.get("fmt", f"%.{u.decimals}f"), title_font_size=fs + 3, label_font_size=fs + 1,
                unconstrained_font_size=True, render=False))
            if bar.get("ticks"):
                from vtkmodules.vtkCommonCore import vtkDoubleArray

                ticks = vtkDoubleArray()
                for t in bar["ticks"]:
                    ticks.InsertNextValue(t)
                sb = actors["legend"][-1]
                sb.SetCustomLabels(ticks)
                sb.SetUseCustomLabels(True)
    return actors


def apply_view(plotter, scene: Scene3D, view: str) -> None:
    """Point the plotter's camera at the scene from ``view`` (parallel projection for "top" and
    "section"), leaving the corners to the readouts and the legend."""
    if view not in scene.cameras:
        raise ValueError(f"unknown view {view!r}; choose one of {', '.join(VIEWS)}")
    plotter.camera_position = scene.cameras[view]
    cam = plotter.camera
    if view in scene.parallel_scale:
        cam.parallel_projection = True
        cam.parallel_scale = scene.parallel_scale[view]
    else:
        cam.parallel_projection = False
        cam.view_angle = 30.0
    plotter.renderer.GetActiveCamera().SetWindowCenter(*scene.window_centre)
    plotter.reset_camera_clipping_range()


def render_variants(scene: Scene3D, view: str, variants: dict, size=(1600, 1200)) -> dict:
    """Several pictures of one scene from one camera, sharing one off-screen plotter: ``variants``
    maps a name to ``(path or None, visible layers or None)``; returns name -> (h, w, 3) image.
    Cheaper than one :func:`render_image` per picture (the scene is set up once)."""
    sc = view_scene(scene, view)
    wanted = [set(LAYERS) - HIDDEN_BY_DEFAULT if vis is None else set(vis) for _, vis in variants.values()]
    pl = pv.Plotter(off_screen=True, window_size=(int(size[0]), int(size[1])))
    out = {}
    try:
        actors = add_to_plotter(pl, sc, set().union(*wanted))
        apply_view(pl, sc, view)
        for (name, (path, _)), vis in zip(variants.items(), wanted):
            for layer, acts in actors.items():
                for a in acts:
                    if hasattr(a, "SetVisibility"):
                        a.SetVisibility(layer in vis)
            pl.render()
            img = pl.screenshot(str(path) if path is not None else None, return_img=True)
            out[name] = np.asarray(img)[..., :3]
    finally:
        pl.close()
    return out


def render_image(scene: Scene3D, path=None, view: str = "iso", size=(1600, 1200),
                 visible: set[str] | None = None) -> np.ndarray:
    """Render the scene off-screen from camera ``view`` (drawn as :func:`view_scene` gives it),
    write a PNG to ``path`` if given, and return the image as an (h, w, 3) uint8 array."""
    sc = view_scene(scene, view)
    pl = pv.Plotter(off_screen=True, window_size=(int(size[0]), int(size[1])))
    try:
        add_to_plotter(pl, sc, visible)
        apply_view(pl, sc, view)
        img = pl.screenshot(str(path) if path is not None else None, return_img=True)
    finally:
        pl.close()
    return np.asarray(img)[..., :3]
