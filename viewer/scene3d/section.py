"""The section cut: a scene cut open at the plane of the tilt (:func:`section_cut`, used by
:func:`view_scene` for the iso and section cameras), in numpy. :func:`_clip_behind` keeps the
half of a mesh behind a plane and :func:`_plane_section` gives the outline where the plane
cuts its faces, as VTK's ``vtkClipPolyData`` and ``vtkCutter`` would (the tests compare them),
at a tenth of the cost. A cut is planned once per geometry and plane (:class:`_CutPlan`), so a
mesh that only changes colours is cut by re-interpolating its point data, and the cut of a
shared mesh handed back unchanged is itself handed back.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np
import pyvista as pv
from vtkmodules.util.numpy_support import numpy_to_vtk, vtk_to_numpy

from .. import style as S
from ..memo import Held, Memo
from .primitives import _cell_array, _mesh
from .values import CLOSE_UP, VIEWS, Layer, Scene3D

_UNCUT = frozenset({"datum", "axis", "zone_axis", "clearance", "median_line", "scale"})  # lines/points in the cut plane
_OUTLINED = {"part": ("#6B737B", 2.0), "surface": (S.SURFACE, 5.0), "zone": (S.ZONE, 2.5), "mate": (None, 6.0),
             "projected": (S.PROJECTED, 3.0), "envelopes": (None, 3.0)}


_CUTS = Memo("scene3d section cuts", 128)  # (mesh held, plane, outline) -> (cut, line)


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
    cells: dict = field(default_factory=dict, compare=False)  # the vtkCellArrays, made with the plan, shared

    def __post_init__(self):
        if self.tris is not None:
            self.cells["polys"] = _cell_array(3 * np.arange(len(self.tris) // 3 + 1), self.tris)
        if self.segs is not None:
            self.cells["lines"] = _cell_array(2 * np.arange(len(self.segs) // 2 + 1), self.segs)
        if self.verts is not None:
            self.cells["verts"] = _cell_array(np.arange(len(self.verts) + 1), self.verts)

    def _take(self, v: np.ndarray) -> np.ndarray:
        w = self.t.reshape((-1,) + (1,) * (v.ndim - 1))
        made = v[self.a] + w * (v[self.b] - v[self.a])
        if np.issubdtype(v.dtype, np.integer):
            made = np.rint(made)  # as VTK rounds interpolated integers
        return np.concatenate([v[self.old], made]).astype(v.dtype, copy=False)

    def apply(self, mesh: pv.PolyData) -> pv.PolyData:
        n_out = len(self.old) + len(self.a)
        out = _mesh(self._take(np.asarray(mesh.points, dtype=float)) if n_out else np.empty((0, 3)))
        cells = self.cells  # shared by every mesh cut to this plan: nothing writes to them
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


_PLANS = Memo("scene3d cut plans", 64)  # (kind, plane, geometry bytes) -> _CutPlan


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
    return _PLANS.remember(key, make).apply(mesh)


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
    (the key holds the mesh by identity and keeps it alive: :class:`viewer.memo.Held`); the results are shared too."""
    key = (Held(mesh), o.tobytes(), n.tobytes(), origin.tobytes(), outline)
    hit = _CUTS.get(key)
    if hit is None:
        cut = _clip_behind(mesh, o, n)
        line = None
        if outline and mesh.n_cells and mesh.n_lines == 0:
            line = _plane_section(mesh, origin, n)
        hit = _CUTS.put(key, (cut, line))
    return hit


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
    whole for "top" (the through-view normal to A); the close-up of the tightest spot
    (:data:`.values.CLOSE_UP`) is cut as the section is."""
    if view not in VIEWS and not (view == CLOSE_UP and view in scene.cameras):
        raise ValueError(f"unknown view {view!r}; choose one of {', '.join(VIEWS)}")
    return scene if view == "top" else section_cut(scene)
