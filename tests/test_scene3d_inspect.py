"""The 3D picture of a measured feature (viewer.scene3d.build_inspection_scene): its meshes
checked against the InspectionResult that geom.inspect computed, against computations done here
(scipy), and rendered off-screen."""

from __future__ import annotations

import math
import os

import numpy as np
import pytest

import geom
from geom.conformance import Outcome, verdict_word
from geom.inspect import inspect_feature
from geom.scenefile import loads
from viewer import memo
from viewer import style as S
from scenetext import measured_bore
from viewer.scene3d import (
    LAYERS,
    N_PHI,
    VIEWS,
    add_to_plotter,
    build_inspection_scene,
    render_image,
    section_cut,
)

pv = pytest.importorskip("pyvista")

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SCAN = os.path.join(ROOT, "scenes", "cap_bore_inspection.toml")


@pytest.fixture(autouse=True)
def _check_shared(monkeypatch):
    """Every mesh and array a memo hands out is checked against its fingerprint
    (viewer.memo, MATEZONE_CHECK_SHARED): nothing downstream may modify a shared mesh."""
    monkeypatch.setattr(memo, "CHECK_SHARED", True)


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
    # the common scale sentence (viewer.exaggeration.scale_text) about the MMC diameter, written out
    assert sc3.caption.startswith(f"radial deviations ×40 about Ø{insp.feature.mmc:.3f}; lengths and dimension texts true\n")
    assert sc3.scale_text == sc3.caption.partition("\n")[0]


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
    # floating zone: placed where the governing axis reading puts it. Perpendicularity at MMC
    # under ASME applies to the feature axis, the axis of the unrelated actual mating envelope
    # (ASME Y14.5 definitions, from memory); seen along A that straight axis runs between its
    # ends at z = 0 and z = L, and the smallest circle holding both is centred midway
    # (geometry, computed here from geom.inspect's unrelated envelope).
    assert insp.axis.basis == "feature axis"
    e = insp.unrelated
    ends = np.array([e.at_z(0.0), e.at_z(insp.feature.length)])
    assert (cx, cy) == pytest.approx(tuple(ends.mean(axis=0)), abs=1e-9)
    assert insp.axis.deviation == pytest.approx(np.hypot(*(ends[1] - ends[0])), abs=1e-9)
    # drawn as the governing axis: a straight line along that envelope's axis over the feature
    fa = true_scale.find("axis", "feature axis").mesh.points
    assert np.allclose(fa[:, :2], ends, atol=1e-9) and fa[:, 2] == pytest.approx([0.0, insp.feature.length])


def test_median_line_vertices(scan, true_scale):
    _, insp = scan
    line = true_scale.find("median_line", "median line").mesh
    # independent: geom.inspect's derived median line (least-squares centres of the sections)
    assert np.array_equal(line.points, insp.median_line)
    assert line.n_lines == 1 and line.lines[0] == len(insp.median_line)
    pts = true_scale.find("median_line", "median line points").mesh
    assert np.array_equal(pts.points, insp.median_line)


def _smallest_circle_diameter(xy: np.ndarray) -> float:
    """Diameter of the smallest circle holding the points (scipy Nelder-Mead on the largest
    distance, computed here)."""
    from scipy.optimize import minimize

    worst = lambda c: np.hypot(*(xy - c).T).max()
    best = minimize(worst, xy.mean(axis=0), method="Nelder-Mead", options=dict(xatol=1e-10, fatol=1e-12, maxiter=20000))
    return 2 * best.fun


def test_readouts_and_verdicts(scan, true_scale):
    res, insp = scan
    u = res.scene.units
    text = "\n".join(true_scale.readouts)
    # every number is geom.inspect's, formatted by Units.fmt (independent: the InspectionResult)
    for v in (insp.unrelated.diameter, insp.related.diameter, insp.bonus, insp.tolerance_allowed,
              insp.virtual_condition, insp.axis.deviation):
        assert u.fmt(v) in text
    # the id and limits 8.000 - 8.022 of the scene file; the bonus taken on the unrelated AME (ASME, from memory)
    assert "cap-bore" in text and "8.000 - 8.022" in text and "bonus basis: unrelated" in text
    assert "tolerance allowed = t + bonus = 0.015 + " in text  # ASME Y14.5: t + bonus, t = 0.015 (scene file)
    # the two axis readings, computed here: the feature axis (axis of the unrelated envelope,
    # ASME Y14.5 definitions, from memory) needs the distance between its ends seen along A; the
    # median line (section centres) the smallest circle holding them (scipy). The tolerance
    # allowed t + bonus = 0.015 + (AME - MMC) (ASME Y14.5 bonus, from memory).
    e, L = insp.unrelated, insp.feature.length
    feature_axis = float(np.hypot(*(np.array(e.at_z(L)) - np.array(e.at_z(0.0)))))
    median_line = _smallest_circle_diameter(insp.median_line[:, :2])
    allowed = 0.015 + (e.diameter - 8.000)
    U = 0.001  # scene file
    # ISO 14253-1 decision rule (from memory): the feature axis conforms (within the zone shrunk
    # by U), the median line does not (outside the zone grown by U)
    assert feature_axis <= allowed - U and median_line > allowed + U
    assert insp.feature_axis.deviation == pytest.approx(feature_axis, abs=1e-9)
    assert insp.median_axis.deviation == pytest.approx(median_line, abs=1e-6)
    fa_txt, ml_txt, al_txt = u.fmt_cmp(feature_axis, median_line, allowed)
    assert f"feature axis needs \u00d8{fa_txt} (governs)" in text
    assert f"median line needs \u00d8{ml_txt} (does not govern)" in text
    assert f"(tolerance allowed {al_txt})" in text
    # the one overall verdict: word for word geom's headline, in the colour of its role
    assert insp.verdict.outcome is Outcome.CONFORMS  # under ASME the feature axis governs (see above)
    assert true_scale.verdict == insp.verdict.headline
    assert true_scale.verdict.startswith("PART CONFORMS")
    assert true_scale.verdict_colour == S.ROLE_COLOUR[insp.verdict.role] == S.OK
    *checks, why = true_scale.verdicts
    assert why == (insp.verdict.why, S.TEXT)  # which readings decide, and why: geom's words
    rows = [(line.split()[0], line.split()[1], line, colour) for line, colour in checks]
    # size, the governing axis reading, surface, then the reading that does not govern
    assert [(r[0], r[1], r[3]) for r in rows] == [("size", "CONFORMS", S.OK), ("axis", "CONFORMS", S.OK),
                                                  ("surface", "CONFORMS", S.OK), ("axis", "DOES", S.NEUTRAL)]
    assert "feature axis" in rows[1][2] and "does not govern" not in rows[1][2]
    assert "median line" in rows[3][2] and rows[3][2].endswith("does not govern")
    for c, (_, _, line, _) in zip((insp.size_check, insp.axis_check, insp.surface_check, insp.other_axis_check), rows):
        word, _ = verdict_word(c)
        assert word in line and c.detail in line
    legend = " | ".join(lbl for lbl, _ in true_scale.legend)
    for what in ("measured points", "median line (section centres): does not govern", "feature axis",
                 "unrelated actual mating envelope (AME)", "related actual mating envelope (AME)",
                 "tolerance zone", "tolerance allowed = t + bonus", "VC"):
        assert what in legend
    assert true_scale.caption.startswith("true scale: radial deviations ×1 (no exaggeration)")
    labels = " | ".join(lb.text for lb in true_scale.labels)
    assert "feature axis: needs" in labels and "(governs)" in labels and "(does not govern)" in labels


def test_iso_inspection_speaks_iso(scan):
    """The same scan under ISO: the standard's own words everywhere (ISO 2692 MMVS and
    "increase", ISO 14405-1 associated cylinders GX, from memory); the extracted median line
    governs (ISO 1101, from memory)."""
    text = open(SCAN).read().replace('standard = "asme"', 'standard = "iso"')
    assert 'standard = "iso"' in text
    res = geom.analyse_scene(loads(text, SCAN, SCAN))
    insp = inspect_feature(res.scene, "cap-bore")
    sc3 = build_inspection_scene(res, insp)
    words = "\n".join([*sc3.readouts, *(lbl for lbl, _ in sc3.legend), *(lb.text for lb in sc3.labels),
                       *(t for t, _ in sc3.verdicts), sc3.verdict])
    for w in ("MMVS", "increase", "associated cylinder", "GX", "t + increase", "MMS"):
        assert w in words, w
    for w in ("bonus", "VC =", "AME", "MMC", "RFS", "Rule #1", "mating envelope", "from memory", "\u00a7"):
        assert w not in words, w
    assert insp.axis.basis == "median line"
    assert "extracted median line (section centres): governs" in words
    assert sc3.verdict == insp.verdict.headline
    assert "feature axis" not in {it.name for it in sc3.layers.get("axis", ())}


def test_not_proven_verdict_is_amber():
    """A typed inspection (no points) builds too; a value within U of its limit is 'not proven'
    (ISO 14253-1 decision rule, from memory)."""
    text = measured_bore("b", (8.0, 8.015), measured={"size": 8.004, "related_size": 7.990,
                                                       "axis_deviation": 0.0185, "uncertainty": 0.001})
    res = geom.analyse_scene(geom.loads(text))
    insp = inspect_feature(res.scene, "b")
    # tolerance allowed 0.015 + 0.004 = 0.019 (ASME bonus = AME - MMC, computed here); 0.0185 is within U of it
    assert insp.tolerance_allowed == pytest.approx(0.019)
    sc3 = build_inspection_scene(res, insp)
    assert "points" not in sc3.layers and "envelopes" in sc3.layers
    words = {line.split()[0]: (line.split()[1:3], colour) for line, colour in sc3.verdicts}
    assert words["axis"] == (["NOT", "PROVEN"], S.NOT_PROVEN)
    # one typed axis reading: nothing is labelled "does not govern"
    assert len(sc3.verdicts) == 3 + 1 and not any("does not govern" in t for t, _ in sc3.verdicts)
    # the overall verdict as geom states it, in its role's colour (the window and the PDF show the same)
    assert sc3.verdict == insp.verdict.headline
    assert sc3.verdict_colour == S.ROLE_COLOUR[insp.verdict.role]
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
