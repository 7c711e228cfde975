"""The 3D picture of a measured feature (viewer.scene3d.build_inspection_scene): its meshes
checked against the InspectionResult that geom.inspect computed, against computations done here
(scipy), and rendered off-screen."""

from __future__ import annotations

import math
import os

import numpy as np
import pytest

import geom
from geom.inspect import inspect_feature
from viewer import style as S
from viewer.scene3d import (
    LAYERS, N_PHI, VIEWS, add_to_plotter, build_inspection_scene, render_image, section_cut,
)

pv = pytest.importorskip("pyvista")

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SCAN = os.path.join(ROOT, "scenes", "cap_bore_inspection.toml")


@pytest.fixture(scope="module")
def scan():
    res = geom.analyse_scene(geom.load(SCAN))
    return res, inspect_feature(res.scene, "cap-bore")


@pytest.fixture(scope="module")
def true_scale(scan):
    res, insp = scan
    return build_inspection_scene(res, insp, exaggeration=1.0)


def _dist_to_line(P: np.ndarray, p0, d) -> np.ndarray:
    """Distance of points from the line through p0 with direction d (vector algebra, here)."""
    d = np.asarray(d, float) / np.linalg.norm(d)
    w = P - np.asarray(p0, float)
    return np.linalg.norm(w - np.outer(w @ d, d), axis=1)


def test_new_layers_are_known(true_scale):
    for name in ("points", "median_line", "envelopes"):
        assert name in LAYERS and name in true_scale.layers
    # the existing layer names stay (the window and the report list them)
    for name in ("part", "datum", "zone", "zone_axis", "axis", "surface", "vc", "rc", "mate", "clearance",
                 "projected", "labels", "readouts", "legend"):
        assert name in LAYERS
    assert set(true_scale.layers) <= set(LAYERS)
    assert true_scale.kind == "inspection" and set(true_scale.cameras) == set(VIEWS)


def test_points_are_the_measured_points_with_true_deviation(scan, true_scale):
    _, insp = scan
    mesh = true_scale.find("points", "measured points").mesh
    # independent: the InspectionResult computed by geom.inspect (points read from the scan file)
    assert mesh.n_points == len(insp.points) == 8640  # 24 sections x 360 points: scripts/make_demo_points.py
    assert np.allclose(mesh.points, insp.points, rtol=0, atol=1e-12)
    dev = mesh.point_data["radial_deviation"]
    # independent: geom.inspect's radial deviations, min and max exactly
    assert mesh.get_data_range("radial_deviation") == (insp.radial_deviation.min(), insp.radial_deviation.max())
    assert np.array_equal(dev, insp.radial_deviation)
    # independent, here: distance from the least-squares cylinder's axis minus its radius
    ls = insp.least_squares.cylinder
    again = _dist_to_line(insp.points, ls.point, ls.direction) - ls.diameter / 2
    assert np.allclose(dev, again, atol=1e-9)
    # a diverging map centred on zero: the clim is symmetric and holds every value
    lo, hi = true_scale.find("points", "measured points").style["clim"]
    assert lo == -hi and hi == pytest.approx(np.abs(dev).max())
    assert true_scale.scalar_bar["title"].endswith(true_scale.units.value)


def test_exaggerated_points_keep_deviation_times_k(scan):
    """The drawing rule stated in the module: a point's distance from the drawn LS axis is
    R0 + k (rho - R0), so it exceeds the drawn LS radius by exactly k x its radial deviation."""
    res, insp = scan
    k = 40.0
    sc3 = build_inspection_scene(res, insp, exaggeration=k)
    P = sc3.find("points", "measured points").mesh.points
    ls = insp.least_squares.cylinder
    c = np.array([*insp.feature.at, 0.0])
    p0 = np.array(ls.point, float)
    p0d = c + np.array([k, k, 1.0]) * (p0 - c)  # lateral offsets x k (computed here)
    dd = np.array(ls.direction) * np.array([k, k, 1.0])
    R0 = insp.feature.mmc / 2
    r_ls = ls.diameter / 2
    drawn = _dist_to_line(P, p0d, dd)
    assert np.allclose(drawn - (R0 + k * (r_ls - R0)), k * insp.radial_deviation, atol=1e-9)
    assert "x 40" in sc3.caption


def test_unrelated_envelope_diameter_from_mesh(scan, true_scale):
    _, insp = scan
    e = insp.unrelated  # independent: geom.inspect's unrelated actual mating envelope
    mesh = true_scale.find("envelopes", "unrelated envelope").mesh
    # the vertices lie on the envelope: their distance from its axis is the radius
    d = _dist_to_line(mesh.points, e.point, e.direction)
    assert np.allclose(2 * d, e.diameter, rtol=0, atol=1e-9)
    # independent, here: a least-squares cylinder fitted to the mesh vertices by scipy
    from scipy.optimize import least_squares

    def resid(x):
        a, b, u, v, r = x
        return _dist_to_line(mesh.points, (a, b, 0.0), (u, v, 1.0)) - r

    fit = least_squares(resid, x0=[0.0, 0.0, 0.0, 0.0, 4.0], xtol=1e-15, ftol=1e-15, gtol=1e-15)
    assert 2 * fit.x[4] == pytest.approx(e.diameter, abs=1e-7)
    # resolution bound, computed here: the polygon of N_PHI vertices on a circle of radius r has
    # its flat faces inside it by r (1 - cos(pi / N_PHI)); the faces' mid points are that far in
    r = e.diameter / 2
    bound = r * (1 - math.cos(math.pi / N_PHI))
    tri = mesh.triangulate()
    mids = np.array([tri.points[f].mean(axis=0) for f in tri.regular_faces[:N_PHI]])
    dm = _dist_to_line(mids, e.point, e.direction)
    assert np.all(dm <= r + 1e-9) and np.all(dm >= r - bound - 1e-9)


def test_related_envelope_vc_and_zone(scan, true_scale):
    res, insp = scan
    rel = insp.related  # independent: geom.inspect's related envelope, normal to A
    cage = true_scale.find("envelopes", "related envelope").mesh
    assert np.allclose(2 * _dist_to_line(cage.points, rel.point, (0, 0, 1)), rel.diameter, atol=1e-9)
    # the virtual condition: geom's VC = MMC - t for a hole at MMC (ASME Y14.5 VC), coaxial with the related AME
    vc = res.features["cap-bore"].virtual_condition.value
    assert vc == pytest.approx(insp.feature.mmc - insp.feature.tolerance.value)
    (item,) = true_scale.layers["vc"]
    assert np.allclose(2 * _dist_to_line(item.mesh.points, rel.point, (0, 0, 1)), vc, atol=1e-9)
    # zone at the tolerance allowed t + bonus (independent: geom.inspect; ASME Y14.5 bonus = AME - MMC)
    t_allowed = insp.feature.tolerance.value + (insp.unrelated.diameter - insp.feature.mmc)
    assert insp.tolerance_allowed == pytest.approx(t_allowed, abs=1e-12)
    zone = true_scale.find("zone", "zone (tolerance allowed)").mesh
    x0, x1, y0, y1, z0, z1 = zone.bounds
    assert (z0, z1) == pytest.approx((0.0, insp.feature.length))
    cx, cy = (x0 + x1) / 2, (y0 + y1) / 2
    side = max(x1 - x0, y1 - y0)  # bounds of an N-gon (N divisible by 4): its diameter
    assert side == pytest.approx(t_allowed, abs=1e-9)
    # floating zone: placed where the axis reading puts it, the centre of the smallest circle
    # holding the section centres. Independent, here: minimise the largest distance with scipy.
    from scipy.optimize import minimize

    xy = insp.median_line[:, :2]
    worst = lambda c: np.hypot(*(xy - c).T).max()
    best = minimize(worst, xy.mean(axis=0), method="Nelder-Mead",
                    options=dict(xatol=1e-10, fatol=1e-12, maxiter=20000))
    assert worst(np.array([cx, cy])) == pytest.approx(best.fun, abs=2e-7)
    assert 2 * best.fun == pytest.approx(insp.axis.deviation, abs=1e-6)  # the reading geom.inspect printed


def test_median_line_vertices(scan, true_scale):
    _, insp = scan
    line = true_scale.find("median_line", "median line").mesh
    # independent: geom.inspect's derived median line (least-squares centres of the sections)
    assert np.array_equal(line.points, insp.median_line)
    assert line.n_lines == 1 and line.lines[0] == len(insp.median_line)
    pts = true_scale.find("median_line", "median line points").mesh
    assert np.array_equal(pts.points, insp.median_line)


def test_readouts_and_verdicts(scan, true_scale):
    res, insp = scan
    u = res.scene.units
    text = "\n".join(true_scale.readouts)
    # every number is geom.inspect's, formatted by Units.fmt (independent: the InspectionResult)
    for v in (insp.unrelated.diameter, insp.related.diameter, insp.bonus, insp.tolerance_allowed,
              insp.virtual_condition, insp.axis.deviation):
        assert u.fmt(v) in text
    assert "cap-bore" in text and "8.000 - 8.022" in text and "bonus basis: unrelated" in text
    words = {line.split()[0]: (line.split()[1], colour) for line, colour in true_scale.verdicts}
    # the demo scan: size and surface conform, the axis reading fails (scenes/cap_bore_inspection.toml)
    assert insp.size_check.conforms and insp.surface_check.conforms and insp.axis_check.conforms is False
    assert words == {"size": ("CONFORMS", S.OK), "axis": ("FAILS", S.INTERFERENCE),
                     "surface": ("CONFORMS", S.OK)}
    legend = " | ".join(lbl for lbl, _ in true_scale.legend)
    for what in ("measured points", "median line", "unrelated AME", "related AME", "tolerance zone", "VC"):
        assert what in legend
    assert "TRUE SCALE" in true_scale.caption


def test_not_proven_verdict_is_amber():
    """A typed inspection (no points) builds too; a value within U of its limit is 'not proven'
    (ISO 14253-1 decision rule, from memory)."""
    text = '''units = "mm"
[[feature]]
id = "b"
kind = "hole"
limits = [8.0, 8.015]
length = 12
[feature.tolerance]
characteristic = "perpendicularity"
value = 0.015
material = "MMC"
datums = ["A"]
[feature.measured]
size = 8.004
related_size = 7.990
axis_deviation = 0.0185
uncertainty = 0.001
'''
    res = geom.analyse_scene(geom.loads(text))
    insp = inspect_feature(res.scene, "b")
    # tolerance allowed 0.015 + 0.004 = 0.019 (ASME bonus = AME - MMC, computed here); 0.0185 is within U of it
    assert insp.tolerance_allowed == pytest.approx(0.019)
    sc3 = build_inspection_scene(res, insp)
    assert "points" not in sc3.layers and "envelopes" in sc3.layers
    words = {line.split()[0]: (line.split()[1:3], colour) for line, colour in sc3.verdicts}
    assert words["axis"] == (["NOT", "PROVEN"], S.NOT_PROVEN)
    assert sc3.exaggeration >= 1.0


def test_renders_non_blank_in_every_view(scan, tmp_path):
    res, insp = scan
    sc3 = build_inspection_scene(res, insp)
    bg = np.array(S.rgb255(S.BACKGROUND))
    for view in VIEWS:
        img = render_image(sc3, tmp_path / f"{view}.png", view, size=(480, 360))
        assert img.shape == (360, 480, 3)
        assert (tmp_path / f"{view}.png").stat().st_size > 5_000
        # not blank: a good share of the pixels differ from the background (threshold chosen here)
        assert (np.abs(img.astype(int) - bg).sum(axis=2) > 30).mean() > 0.10
    # the deviation colours reach the picture: both ends of the diverging ramp appear (brown and
    # blue pixels; thresholds chosen here from S.DEVIATION_COLORS)
    img = render_image(sc3, None, "iso", size=(800, 600), visible={"points"})
    r, g, b = (img[..., i].astype(int) for i in range(3))
    assert ((b - r > 40) & (b > 120)).sum() > 200  # blue: outward
    assert ((r - b > 40) & (r > 120) & (g > 60)).sum() > 200  # brown/tan: inward
    # the window path: add_to_plotter gives actors for the new layers and a scalar bar
    pl = pv.Plotter(off_screen=True, window_size=(320, 240))
    try:
        actors = add_to_plotter(pl, section_cut(sc3))
        assert actors["points"] and actors["median_line"] and actors["envelopes"]
        assert len(actors["readouts"]) >= 3 + 3  # title, readouts, caption + three verdict lines
        assert pl.scalar_bars
    finally:
        pl.close()


def test_bad_exaggeration(scan):
    res, insp = scan
    with pytest.raises(ValueError):
        build_inspection_scene(res, insp, exaggeration=0.0)
