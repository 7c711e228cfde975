"""The fast paths of viewer.scene3d against the plain constructions they replace: the same
meshes and numbers, computed here the direct way (point by point, or with the PyVista/VTK
sources), shared meshes that come back unchanged (and are never modified: the memo's check is
on, see the fixture), replayed pieces keyed by all their inputs, and the window's in-place
update against a fresh drawing."""

from __future__ import annotations

import os

import numpy as np
import pytest

import geom
from geom.boundaries import FeatureState
from viewer import memo
from viewer import scene3d as S3
from viewer.scene3d import primitives as P
from viewer.scene3d import rings as R
from viewer.scene3d import section as SE

pv = pytest.importorskip("pyvista")

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


@pytest.fixture(autouse=True)
def _check_shared(monkeypatch):
    """Every mesh and array a memo hands out is checked against its fingerprint
    (viewer.memo, MATEZONE_CHECK_SHARED): nothing downstream may modify a shared mesh."""
    monkeypatch.setattr(memo, "CHECK_SHARED", True)


def _quad_faces(nz: int, n: int) -> np.ndarray:
    """The faces of a tube of nz rings of n points in the flat form ``pv.PolyData`` takes, quad
    by quad (i, j) -> (i, j + 1) -> (i + 1, j + 1) -> (i + 1, j), written out here."""
    faces = []
    for i in range(nz - 1):
        for j in range(n):
            faces += [4, i * n + j, i * n + (j + 1) % n, (i + 1) * n + (j + 1) % n, (i + 1) * n + j]
    return np.array(faces)


def _rings_reference(axis: np.ndarray, radius: float, n_phi: int) -> np.ndarray:
    """The ring points formed one by one: e1 from +x normal to the axis, e2 = T x e1, each
    generator point slid along the axis back into the plane z = axis z (computed here)."""
    out = np.empty((len(axis), n_phi, 3))
    for i in range(len(axis)):
        if len(axis) > 2:
            lo, hi = max(i - 1, 0), min(i + 1, len(axis) - 1)
            T = axis[hi] - axis[lo]
        else:
            T = axis[1] - axis[0]
        T = T / np.linalg.norm(T)
        e1 = np.array([1.0, 0, 0]) - T[0] * T
        e1 /= np.linalg.norm(e1)
        e2 = np.cross(T, e1)
        for j in range(n_phi):
            phi = 2 * np.pi * j / n_phi
            radial = radius * (np.cos(phi) * e1 + np.sin(phi) * e2)
            out[i, j] = axis[i] + radial - radial[2] / T[2] * T
    return out


@pytest.mark.parametrize("bowed", [False, True])
def test_ring_distances_match_point_by_point(bowed):
    rng = np.random.default_rng(3)
    zs = np.linspace(0.0, 12.0, 13)
    tilt = np.array([0.004, -0.003]) * zs[:, None]
    axis = np.column_stack((tilt + [0.01, 0.02], zs))
    if bowed:  # a 33-point polyline with a bow, as geom.placement gives for straightness
        lz = np.linspace(0.0, 12.0, 33)
        line = np.column_stack((0.02 * (2 * lz / 12 - 1) ** 2, 0.0 * lz, lz))
    else:
        line = np.array([[0.0, 0.0, 0.0], [-0.01, 0.005, 12.0]])
    r = 3.99 + rng.uniform(0, 0.01)
    for n_phi in (S3.N_PHI, 257):
        pts = _rings_reference(axis, r, n_phi)
        assert np.allclose(R._rings(axis, r, n_phi), pts, atol=1e-12)
        d_ref = R._dist_to_polyline(pts.reshape(-1, 3), line).reshape(len(zs), n_phi)
        # identical up to rounding: the distances are ~4, the gaps they give ~0.01
        assert np.abs(R._ring_dist(axis, r, line, n_phi) - d_ref).max() < 1e-12


def test_direct_meshes_match_pyvista_constructions():
    rng = np.random.default_rng(5)
    for _ in range(20):
        cx, cy = rng.normal(0, 30, 2)
        dz, size = -abs(rng.normal(0, 0.05)), abs(rng.normal(10, 4)) + 0.5
        ref = pv.Plane(center=(cx, cy, dz), direction=(0, 0, 1), i_size=2 * size, j_size=2 * size,
                       i_resolution=1, j_resolution=1)
        mine = P._datum_plane(cx, cy, dz, size)
        assert mine.points.dtype == ref.points.dtype == np.float32
        # the VTK source rounds through its transforms: a few float32 units in the last place
        assert np.allclose(mine.points, ref.points, rtol=0, atol=4 * np.spacing(np.float32(abs(cx) + abs(cy) + size)))
        assert np.array_equal(mine.faces, ref.faces)
        for name in ("Normals", "TextureCoordinates"):
            assert np.array_equal(mine.point_data[name], ref.point_data[name])
    rings = rng.normal(size=(4, 16, 3))
    ref = pv.PolyData(rings.reshape(-1, 3), _quad_faces(4, 16))
    mine = P._tube(rings, shared=False)
    assert np.array_equal(mine.points, ref.points) and np.array_equal(mine.faces, ref.faces)
    pts = rng.normal(size=(5, 3))
    ref = pv.PolyData(pts)  # PyVista gives bare points one vertex cell each
    mine = P._points(pts)
    assert np.array_equal(mine.points, ref.points) and np.array_equal(mine.verts, ref.verts)
    ref = pv.PolyData(pts, lines=np.r_[5, np.arange(5)])
    assert np.array_equal(P._polyline(pts).lines, ref.lines)


def test_cage_matches_point_by_point():
    centre, radius, z0, z1, phase = (1.0, -2.0), 4.005, 0.0, 12.0, 0.3
    mesh = P._cage(centre, radius, z0, z1, n_rings=3, n_gen=8, phase=phase)
    n = S3.N_PHI_CAGE
    pts = [(centre[0] + radius * np.cos(2 * np.pi * j / n), centre[1] + radius * np.sin(2 * np.pi * j / n), z)
           for z in (z0, (z0 + z1) / 2, z1) for j in range(n)]
    for g in range(8):
        p = phase + 2 * np.pi * g / 8
        pts += [(centre[0] + radius * np.cos(p), centre[1] + radius * np.sin(p), z) for z in (z0, z1)]
    assert np.allclose(mesh.points, np.array(pts), atol=1e-12)
    lines = [[n + 1, *range(r * n, r * n + n), r * n] for r in range(3)]
    lines += [[2, 3 * n + 2 * g, 3 * n + 2 * g + 1] for g in range(8)]
    assert np.array_equal(mesh.lines, np.concatenate(lines))


def test_unchanged_pieces_are_shared_and_pure():
    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "gearbox_endcap_dowel.toml")))
    hole = res.scene.feature(res.scene.mates[0].hole)
    a = S3.build_mate_scene(res, 0)
    b = S3.build_mate_scene(res, 0, states={hole.id: FeatureState(hole.lmc, 1.0, 0.0)})
    c = S3.build_mate_scene(res, 0)
    # only the hole moved: the pin's plate and the boundary cages are the very same meshes
    assert a.find("part", "pin part").mesh is b.find("part", "pin part").mesh
    assert [it.mesh for it in a.layers["vc"]] == [it.mesh for it in b.layers["vc"]]
    assert a.find("surface", "hole surface").mesh is not b.find("surface", "hole surface").mesh
    # same inputs, same meshes and numbers; the clearance-coloured mesh is each scene's own
    for name, items in a.layers.items():
        for x, y in zip(items, c.layers[name]):
            assert np.array_equal(x.mesh.points, y.mesh.points)
    ma, mc = a.find("mate", "pin surface (clearance)").mesh, c.find("mate", "pin surface (clearance)").mesh
    assert ma is not mc and np.array_equal(ma.point_data["clearance"], mc.point_data["clearance"])
    # the section cut of a shared mesh is reused, and equals a fresh cut
    ca, cc = S3.section_cut(a), S3.section_cut(c)
    assert ca.find("vc", a.layers["vc"][0].name).mesh is cc.find("vc", a.layers["vc"][0].name).mesh
    origin, normal = a.section
    n = np.asarray(normal, float)
    o = np.asarray(origin, float) - 1e-7 * max(1.0, a.exaggeration) * n
    fresh = a.layers["vc"][0].mesh.copy().clip(normal=tuple(-n), origin=tuple(o), invert=True)
    _same_geometry(ca.find("vc", a.layers["vc"][0].name).mesh, fresh)


def _measures(mesh) -> dict:
    """Measures of a mesh that do not depend on how its faces are split into triangles: area,
    vector area (sum of the triangles' (b - a) x (c - a) / 2: orientation-aware), line
    length, bounds and the number of vertex cells."""
    mesh = pv.wrap(mesh)
    tri = mesh.triangulate() if mesh.n_cells else mesh
    P = np.asarray(tri.points, dtype=float)
    out = {"n_verts": mesh.n_verts}
    faces = tri.faces.reshape(-1, 4)[:, 1:] if tri.GetNumberOfPolys() else np.empty((0, 3), int)
    cross = np.cross(P[faces[:, 1]] - P[faces[:, 0]], P[faces[:, 2]] - P[faces[:, 0]]) / 2.0
    out["area"], out["vector area"] = np.linalg.norm(cross, axis=1).sum(), cross.sum(axis=0)
    segs = []
    lines = mesh.lines
    i = 0
    while i < len(lines):
        k = lines[i]
        ids = lines[i + 1:i + 1 + k]
        segs += list(zip(ids[:-1], ids[1:]))
        i += k + 1
    segs = np.array(segs, dtype=int).reshape(-1, 2)
    out["length"] = np.linalg.norm(np.asarray(mesh.points)[segs[:, 1]] - np.asarray(mesh.points)[segs[:, 0]],
                                   axis=1).sum()
    out["bounds"] = np.array(mesh.bounds) if mesh.n_points else np.zeros(6)
    return out


def _used_points(mesh) -> tuple[np.ndarray, dict]:
    """The points some cell uses (the original points kept and the points made on the edges)
    and their point data."""
    mesh = pv.wrap(mesh)
    used = set()
    for cells in (mesh.GetPolys(), mesh.GetLines(), mesh.GetVerts()):
        used.update(SE._cells_of(cells)[1].tolist())
    idx = np.array(sorted(used), dtype=int)
    arrays = {k: np.asarray(mesh.point_data[k], dtype=float).reshape(mesh.n_points, -1)[idx]
              for k in mesh.point_data.keys() if k != "vtkOriginalPointIds"}
    return np.asarray(mesh.points, dtype=float)[idx].reshape(-1, 3), arrays


def _same_geometry(mine, ref, scale: float = 1.0, rtol: float = 1e-9, plane=None) -> None:
    """Same measures; a point of either mesh has one of the other at the same place (scipy's
    KD-tree, to 10 rtol x size) with the same point data, or lies in the cutting ``plane``
    (o, n): each splits a polygon into triangles its own way before cutting (a fan here; VTK
    cuts quads whole and ear-cuts larger polygons), and a split line crossing the plane gives
    a point on the cut line that the other does not make (the region kept is the same)."""
    from scipy.spatial import cKDTree

    a, b = _measures(mine), _measures(ref)
    assert a.keys() == b.keys()
    for key in a:
        assert np.allclose(a[key], b[key], rtol=rtol, atol=rtol * scale ** (2 if "area" in key else 1)), key
    (pa, da), (pb, db) = _used_points(mine), _used_points(ref)
    assert da.keys() == db.keys() and (len(pa) == 0) == (len(pb) == 0)
    if not len(pa):
        return
    tol = 10 * rtol * scale
    for p, d, q, e in ((pa, da, pb, db), (pb, db, pa, da)):
        near = cKDTree(q).query_ball_point(p, tol)
        match = np.array([len(c) > 0 for c in near])
        # point data compared from VTK's points to ours: VTK's clip merges coincident points
        # (a cap's rim and the wall's), keeping one normal where ours keeps both
        for i in np.flatnonzero(match) if p is pb else ():
            assert any(all(np.allclose(d[k][i], e[k][j], rtol=1e-6, atol=1e-7) for k in d)
                       for j in near[i]), p[i]
        if not match.all():
            assert plane is not None
            o, n = plane
            assert np.abs((p[~match] - o) @ n).max() <= tol


def _all_scene_meshes():
    for name in ("gearbox_endcap_dowel", "sensor_bracket_interference", "motor_flange_studs",
                 "valve_body_guide_pin"):
        res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", name + ".toml")))
        scenes = [S3.build_mate_scene(res, i) for i in range(len(res.scene.mates))]
        scenes += [S3.build_feature_scene(res, f.id) for f in res.scene.features]
        hole = res.scene.feature(res.scene.mates[0].hole) if res.scene.mates else None
        if hole is not None:  # a what-if state: tilted the other way, at LMC
            scenes.append(S3.build_mate_scene(res, 0, states={hole.id: FeatureState(hole.lmc, 0.6, 137.0)}))
        for sc3 in scenes:
            yield from _meshes_of(name, sc3)
    from geom.inspect import inspect_feature

    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "cap_bore_inspection.toml")))
    insp = inspect_feature(res.scene, "cap-bore")  # the measured points: vertex cells with data
    yield from _meshes_of("cap_bore_inspection", S3.build_inspection_scene(res, insp))


def _meshes_of(name, sc3):
    for layer, items in sc3.layers.items():
        for it in items:
            yield name, sc3, layer, it


def test_section_cut_matches_vtk_clip_and_cutter():
    """The numpy clip and section against VTK's own filters (vtkClipPolyData with the plane
    reversed and InsideOut; vtkCutter), mesh by mesh over every scene: same area, same
    oriented (vector) area, same bounds, same line length, same integrals of the point data."""
    from vtkmodules.vtkCommonDataModel import vtkPlane
    from vtkmodules.vtkFiltersCore import vtkClipPolyData, vtkCutter

    checked = sections = 0
    for _name, sc3, layer, it in _all_scene_meshes():
        if layer in SE._UNCUT:  # lines and points in the plane: section_cut leaves them whole
            continue
        origin, normal = sc3.section
        n = np.asarray(normal, float)
        o = np.asarray(origin, float) - 1e-7 * max(1.0, sc3.exaggeration) * n
        plane = vtkPlane()
        plane.SetOrigin(*o)
        plane.SetNormal(*(-n))
        clip = vtkClipPolyData()
        clip.SetClipFunction(plane)
        clip.SetInputData(it.mesh)
        clip.InsideOutOn()
        clip.Update()
        scale = max(1.0, float(np.ptp(np.asarray(it.mesh.points), axis=0).max())) if it.mesh.n_points else 1.0
        # VTK's polygon clipper puts its cut points up to ~2e-8 x size off the plane (ours are
        # on it); float32 points (the datum plane, as PyVista's Plane makes it) round at 6e-8
        rtol = 1e-7 if it.mesh.points.dtype == np.float64 else 1e-6
        _same_geometry(SE._clip_behind(it.mesh, o, n), clip.GetOutput(), scale, rtol, (o, n))
        checked += 1
        if it.mesh.GetNumberOfPolys():
            plane = vtkPlane()
            plane.SetOrigin(*origin)
            plane.SetNormal(*n)
            cutter = vtkCutter()
            cutter.SetCutFunction(plane)
            cutter.SetInputData(it.mesh)
            cutter.Update()
            mine = SE._plane_section(it.mesh, np.asarray(origin, float), n)
            ref = pv.wrap(cutter.GetOutput())
            _same_geometry(mine, ref, scale, rtol, (np.asarray(origin, float), n))
            sections += mine.n_lines > 0
    assert checked > 100 and sections > 20


def test_line_clip_matches_dense_sampling():
    """The kept length of every polyline (cages, axes, the wavy median line of a scan) against
    the share of 4 001 samples per segment on the kept side (computed here). VTK's polyline
    clip is not the reference here: on the median line, which crosses the plane several
    times, it kept 11.20 of 11.56 where sampling gives 9.26 (seen while writing this test)."""
    checked = 0
    for _name, sc3, _layer, it in _all_scene_meshes():
        if not it.mesh.n_lines:
            continue
        origin, normal = sc3.section
        n = np.asarray(normal, float)
        o = np.asarray(origin, float) - 1e-7 * max(1.0, sc3.exaggeration) * n
        P = np.asarray(it.mesh.points, dtype=float)
        segs = SE._fan(*SE._cells_of(it.mesh.GetLines()), first=1)
        t = np.linspace(0.0, 1.0, 4001)
        a, b = P[segs[:, 0]], P[segs[:, 1]]
        s = ((a - o) @ n)[:, None] + t[None, :] * ((b - a) @ n)[:, None]  # distance along each segment
        seg_len = np.linalg.norm(b - a, axis=1)
        kept = s >= 0.0
        expected = (seg_len * np.mean(kept, axis=1)).sum()
        got = _measures(SE._clip_behind(it.mesh, o, n))["length"]
        # sampling resolves a crossing to 1/4000 of its segment (a long straight segment that
        # crosses the plane once, as the feature axis of a scan, is off by up to that much)
        crossing = kept.any(axis=1) & ~kept.all(axis=1)
        assert abs(got - expected) <= (seg_len[crossing] / 4000.0).sum() + 1e-12, it.name
        checked += 1
    assert checked > 50


def test_remembered_pieces_equal_a_fresh_build():
    """A scene built from remembered pieces (the pin, the datum) is the scene built from
    nothing: same layers and mesh points in the same order, same labels, legend and notes."""
    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "sensor_bracket_interference.toml")))
    hole = res.scene.feature(res.scene.mates[0].hole)
    states = [{hole.id: FeatureState(s, 0.7, 30.0)} for s in (hole.mmc, hole.lmc, hole.mmc)]
    warm = [S3.build_mate_scene(res, 0, states=st) for st in states]
    for st, w in zip(states, warm):
        S3.clear_caches()  # nothing remembered: every piece built anew
        fresh = S3.build_mate_scene(res, 0, states=st)
        assert list(fresh.layers) == list(w.layers)
        for name in fresh.layers:
            assert [it.name for it in fresh.layers[name]] == [it.name for it in w.layers[name]]
            for x, y in zip(fresh.layers[name], w.layers[name]):
                assert np.array_equal(x.mesh.points, y.mesh.points) and x.style.keys() == y.style.keys()
        assert fresh.labels == w.labels and fresh.legend == w.legend and fresh.notes == w.notes
        assert fresh.readouts == w.readouts
    # the third state repeats the first: its pin and datum are the first one's very meshes
    assert warm[2].find("datum", "datum plane").mesh is warm[0].find("datum", "datum plane").mesh
    assert warm[1].find("axis", "pin axis").mesh is warm[0].find("axis", "pin axis").mesh


def test_replayed_pieces_are_keyed_by_every_argument():
    """A replayed piece runs again whenever any argument differs (by value; an unhashable object
    by identity) and is replayed, adding the same items, when all are equal."""
    from viewer.scene3d.assemble import _Built, replayed

    calls = []

    @replayed
    def piece(b, res, n, arr, tag="x"):
        calls.append(n)
        b.notes.append(f"{tag} {n} {float(arr.sum())}")
        b.add("axis", "line", P._polyline(np.array([[0.0, 0.0, 0.0], [0.0, 0.0, float(n)]])), {})
        return n * 2

    S3.clear_caches()
    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "gearbox_endcap_dowel.toml")))
    twin = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "gearbox_endcap_dowel.toml")))
    arr = np.array([1.0, 2.0])
    runs = [(res, 1, arr), (res, 1, arr.copy()), (res, 2, arr), (res, 1, np.array([1.0, 2.5])),
            (twin, 1, arr), (res, 1, arr)]
    built = []
    for args in runs:
        b = _Built()
        assert piece(b, *args) == 2 * args[1]
        built.append(b)
    b = _Built()
    piece(b, res, 1, arr, tag="y")  # a keyword argument is an input too
    # runs 0, 2, 3, 4 and the keyword call are new inputs; 1 and 5 repeat run 0
    assert len(calls) == 5
    assert built[1].notes == built[5].notes == built[0].notes == ["x 1 3.0"]
    assert built[5].layers["axis"][0] is built[0].layers["axis"][0]  # the very same item, replayed
    assert b.notes == ["y 1 3.0"]


def test_feature_geometry_is_read_only():
    """What a replayed feature hands on is shared between replays: a frozen dataclass of
    read-only arrays (nothing can patch it after the call)."""
    import dataclasses

    from viewer.scene3d.assemble import _Built
    from viewer.scene3d.feature import _feature_geometry
    from viewer.scene3d.values import _Ex

    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "gearbox_endcap_dowel.toml")))
    hole = res.scene.feature("cap-bore")
    st = FeatureState(hole.mmc, 1.0, 0.0)
    g = _feature_geometry(_Built(), res, hole, st, _Ex(10.0, hole.at, hole.mmc / 2), hole.at, primary=True)
    assert g is _feature_geometry(_Built(), res, hole, st, _Ex(10.0, hole.at, hole.mmc / 2), hole.at, primary=True)
    with pytest.raises(dataclasses.FrozenInstanceError):
        g.r_draw = 1.0
    for arr in (g.pts_true, g.axis_true, g.axis_draw, g.rings_draw):
        with pytest.raises(ValueError):
            arr[0] = 0.0
    assert g.r_true == hole.mmc / 2 and g.z == (0.0, hole.length)  # at MMC over the length (scene file)


def test_a_modified_shared_mesh_is_caught():
    """The memo's check (MATEZONE_CHECK_SHARED, on in these tests): a shared mesh changed after
    it was handed out makes the next build that takes it fail, naming the memo."""
    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "gearbox_endcap_dowel.toml")))
    S3.clear_caches()
    plate = S3.build_mate_scene(res, 0).find("part", "pin part").mesh  # memoized: the same for every build
    assert S3.build_mate_scene(res, 0).find("part", "pin part").mesh is plate
    before = np.array(plate.points)
    plate.points[0] = before[0] + 1.0
    try:
        with pytest.raises(AssertionError, match="scene3d plates"):
            S3.build_mate_scene(res, 0)
    finally:
        plate.points[0] = before[0]
        S3.clear_caches()


def test_live_scene_takes_a_move_in_place_and_draws_what_a_fresh_plotter_draws():
    """The window's path without the window: a scene shown, then a what-if move put into the
    same actors (LiveScene), against the moved scene drawn afresh on a plotter of its own
    (pixels compared exactly, as the GUI test does for the window)."""
    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "gearbox_endcap_dowel.toml")))
    hole = res.scene.feature("cap-bore")
    a = S3.view_scene(S3.build_mate_scene(res, 0), "iso")
    b = S3.view_scene(S3.build_mate_scene(res, 0, states={hole.id: FeatureState(hole.lmc, 0.6, 0.0)}), "iso")
    # the legend's boxed rows are not updated in place (the window shows them as Qt text)
    visible = set(S3.LAYERS) - set(S3.HIDDEN_BY_DEFAULT) - {"legend"}
    size = (480, 360)
    pl = pv.Plotter(off_screen=True, window_size=size)
    fresh = pv.Plotter(off_screen=True, window_size=size)
    try:
        live = S3.LiveScene(pl)
        assert not live.show(a, visible)  # the first scene: every actor made
        actors = {k: list(v) for k, v in live.actors.items()}
        assert actors["readouts"] and actors["labels"] and actors["mate"]
        assert live.show(b, visible)  # the move: in place
        assert {k: list(v) for k, v in live.actors.items()} == actors  # the very same actors
        S3.apply_view(pl, b, "iso")
        moved = np.asarray(pl.screenshot(return_img=True))
        S3.add_to_plotter(fresh, b, visible)
        S3.apply_view(fresh, b, "iso")
        again = np.asarray(fresh.screenshot(return_img=True))
        assert np.array_equal(moved, again), f"{np.count_nonzero(np.any(moved != again, axis=-1))} pixels differ"
        assert not live.show(S3.build_feature_scene(res, "dowel"), visible)  # another structure: made anew
    finally:
        pl.close()
        fresh.close()
