"""VTK meshes assembled directly (the PyVista constructors and VTK sources cost more than the
what-if path can pay): cell arrays, tubes with their own normals, points, polylines, segments,
boundary cages, the block round a hole, the plate under a pin, the datum plane, dashed cages.

Meshes that depend on their points only are interned (:func:`_interned`): the same points give
back the very same mesh object, so an unchanged piece of the picture is neither rebuilt, nor
cut again, nor uploaded again. Interned and memoized meshes are shared: nobody may modify them
(``MATEZONE_CHECK_SHARED=1`` checks it, see :mod:`viewer.memo`).
"""

from __future__ import annotations

import numpy as np
import pyvista as pv
from vtkmodules.util.numpy_support import numpy_to_vtk, numpy_to_vtkIdTypeArray
from vtkmodules.vtkCommonCore import vtkPoints
from vtkmodules.vtkCommonDataModel import vtkCellArray

from ..memo import Memo, memoized
from .rings import _axis_at, _rings, _tube_normals, _unit_circle
from .values import N_PHI_CAGE


@memoized("scene3d tube cells", 64)
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


_INTERNED = Memo("scene3d interned meshes", 256)  # (kind, shape, point bytes) -> mesh


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
        mesh = _INTERNED.put(key, make(points))
    return mesh


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


@memoized("scene3d cages", 128)
def _cage(centre: tuple[float, float], radius: float, z0: float, z1: float, n_rings: int = 3,
          n_gen: int = 8, n_phi: int = N_PHI_CAGE, phase: float = 0.0) -> pv.PolyData:
    """Wireframe of a perfect cylinder normal to A: rings and generator lines. Memoized (it
    depends on its arguments only): the mesh is shared, callers must not modify it."""
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


@memoized("scene3d block cells", 16)
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


@memoized("scene3d square rings", 64)
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


@memoized("scene3d plates", 32)
def _plate(centre, half: float, z0: float, z1: float) -> pv.PolyData:
    """The box under a pin. Memoized: the mesh is shared, callers must not modify it."""
    return pv.Box(bounds=(centre[0] - half, centre[0] + half, centre[1] - half, centre[1] + half, z0, z1))


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
