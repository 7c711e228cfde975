"""The fast paths of viewer.scene3d against the plain constructions they replace: the same
meshes and numbers, computed here the direct way (point by point, or with the PyVista/VTK
sources), and shared meshes that come back unchanged."""

from __future__ import annotations

import os

import numpy as np
import pytest

import geom
from geom.boundaries import FeatureState
from viewer import scene3d as S3

pv = pytest.importorskip("pyvista")

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


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
        assert np.allclose(S3._rings(axis, r, n_phi), pts, atol=1e-12)
        d_ref = S3._dist_to_polyline(pts.reshape(-1, 3), line).reshape(len(zs), n_phi)
        # identical up to rounding: the distances are ~4, the gaps they give ~0.01
        assert np.abs(S3._ring_dist(axis, r, line, n_phi) - d_ref).max() < 1e-12


def test_direct_meshes_match_pyvista_constructions():
    rng = np.random.default_rng(5)
    for _ in range(20):
        cx, cy = rng.normal(0, 30, 2)
        dz, size = -abs(rng.normal(0, 0.05)), abs(rng.normal(10, 4)) + 0.5
        ref = pv.Plane(center=(cx, cy, dz), direction=(0, 0, 1), i_size=2 * size, j_size=2 * size,
                       i_resolution=1, j_resolution=1)
        mine = S3._datum_plane(cx, cy, dz, size)
        assert mine.points.dtype == ref.points.dtype == np.float32
        # the VTK source rounds through its transforms: a few float32 units in the last place
        assert np.allclose(mine.points, ref.points, rtol=0, atol=4 * np.spacing(np.float32(abs(cx) + abs(cy) + size)))
        assert np.array_equal(mine.faces, ref.faces)
        for name in ("Normals", "TextureCoordinates"):
            assert np.array_equal(mine.point_data[name], ref.point_data[name])
    rings = rng.normal(size=(4, 16, 3))
    ref = pv.PolyData(rings.reshape(-1, 3), S3._quad_faces(4, 16))
    mine = S3._tube(rings, shared=False)
    assert np.array_equal(mine.points, ref.points) and np.array_equal(mine.faces, ref.faces)
    pts = rng.normal(size=(5, 3))
    ref = pv.PolyData(pts)  # PyVista gives bare points one vertex cell each
    mine = S3._points(pts)
    assert np.array_equal(mine.points, ref.points) and np.array_equal(mine.verts, ref.verts)
    ref = pv.PolyData(pts, lines=np.r_[5, np.arange(5)])
    assert np.array_equal(S3._polyline(pts).lines, ref.lines)


def test_cage_matches_point_by_point():
    centre, radius, z0, z1, phase = (1.0, -2.0), 4.005, 0.0, 12.0, 0.3
    mesh = S3._cage(centre, radius, z0, z1, n_rings=3, n_gen=8, phase=phase)
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
    assert np.array_equal(ca.find("vc", a.layers["vc"][0].name).mesh.points, fresh.points)
