"""The 3D scene builder: meshes checked against geom's numbers and against formulas computed
here; every scene file builds and renders off-screen; a few pixel checks."""

from __future__ import annotations

import glob
import math
import os

import numpy as np
import pytest

import geom
from geom.boundaries import FeatureState
from viewer import memo
from scenetext import fastener, hole, pin, scene_toml, tol
from viewer import style as S
from viewer.scene3d import (
    HIDDEN_BY_DEFAULT,
    LAYERS,
    N_PHI,
    N_PHI_CAGE,
    VIEWS,
    CLOSE_UP,
    Scene3D,
    add_to_plotter,
    auto_exaggeration,
    build_feature_scene,
    build_inspection_scene,
    build_mate_scene,
    render_image,
    section_cut,
)

pv = pytest.importorskip("pyvista")

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SCENES = sorted(glob.glob(os.path.join(ROOT, "scenes", "*.toml")))


@pytest.fixture(autouse=True)
def _check_shared(monkeypatch):
    """Every mesh and array a memo hands out is checked against its fingerprint
    (viewer.memo, MATEZONE_CHECK_SHARED): nothing downstream may modify a shared mesh."""
    monkeypatch.setattr(memo, "CHECK_SHARED", True)


def _res(name: str) -> geom.SceneResult:
    return geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", name)))


@pytest.fixture(scope="module")
def gearbox():
    return _res("gearbox_endcap_dowel.toml")


@pytest.fixture(scope="module")
def sensor():
    return _res("sensor_bracket_interference.toml")


@pytest.fixture(scope="module")
def motor():
    return _res("motor_flange_studs.toml")


def _radial(points: np.ndarray, centre) -> np.ndarray:
    return np.hypot(points[:, 0] - centre[0], points[:, 1] - centre[1])


# ------------------------------------------------------------------------------- geometry


def test_zone_volume_at_true_scale(gearbox):
    sc3 = build_mate_scene(gearbox, 0, exaggeration=1.0)
    hole = gearbox.scene.feature("cap-bore")
    t = hole.tolerance.value  # at MMC there is no bonus: zone = stated tolerance
    L = hole.length
    mesh = sc3.find("zone", "hole zone").mesh.triangulate()
    exact = math.pi / 4 * t**2 * L  # volume of a cylinder, pi r^2 h (standard formula, from memory)
    # Resolution bound, computed here: an N-gon inscribed in the circle has area
    # (N/2) r^2 sin(2 pi/N); its relative deficit 1 - sin(x)/x (x = 2 pi/N) is below x^2/6
    # (Taylor series of sin, from memory).
    x = 2 * math.pi / N_PHI
    deficit = 1 - math.sin(x) / x
    assert deficit < x**2 / 6
    assert mesh.volume == pytest.approx(exact * (1 - deficit), rel=1e-9)
    assert abs(mesh.volume - exact) <= exact * x**2 / 6


def test_vc_cylinder_diameters_match_geom(gearbox, sensor):
    for res, hole_id, pin_id in ((gearbox, "cap-bore", "dowel"), (sensor, "bracket-hole", "locating-pin")):
        sc3 = build_mate_scene(res, 0, exaggeration=1.0)
        for fid, tag in ((hole_id, "hole"), (pin_id, "pin")):
            vc = res.features[fid].virtual_condition.value  # geom's VC (ASME Y14.5 VC = MMC -/+ t)
            (item,) = [it for it in sc3.layers["vc"] if it.name.startswith(tag)]
            x0, x1, y0, y1, z0, z1 = item.mesh.bounds
            # ring vertices at 0, 90, 180, 270 deg (N_PHI_CAGE divisible by 4): bounds are the diameter
            assert N_PHI_CAGE % 4 == 0
            assert x1 - x0 == pytest.approx(vc, abs=1e-9)
            assert y1 - y0 == pytest.approx(vc, abs=1e-9)
            # a perfect cylinder normal to A over the feature's length
            assert (z0, z1) == pytest.approx((0.0, res.scene.feature(fid).length))
            pts = item.mesh.points
            assert np.allclose(_radial(pts, res.scene.feature(hole_id).at), vc / 2, atol=1e-9)


def test_vc_scaled_by_exaggeration(gearbox):
    k = 40.0
    sc3 = build_mate_scene(gearbox, 0, exaggeration=k)
    hole = gearbox.scene.feature("cap-bore")
    R0 = hole.mmc / 2
    vc = gearbox.features["cap-bore"].virtual_condition.value
    (item,) = [it for it in sc3.layers["vc"] if it.name.startswith("hole")]
    # the drawing rule stated in the module: r is drawn as R0 + k (r - R0)
    assert item.mesh.bounds[1] - item.mesh.bounds[0] == pytest.approx(2 * (R0 + k * (vc / 2 - R0)), abs=1e-9)
    zone = sc3.find("zone", "hole zone").mesh
    assert zone.bounds[1] - zone.bounds[0] == pytest.approx(k * hole.tolerance.value, rel=1e-9)


@pytest.mark.parametrize("name", ["gearbox_endcap_dowel.toml", "sensor_bracket_interference.toml",
                                  "valve_body_guide_pin.toml"])
def test_axis_ends_on_zone_boundary(name):
    res = _res(name)
    sc3 = build_mate_scene(res, 0, exaggeration=1.0)
    m = res.scene.mates[0]
    hole = res.scene.feature(m.hole)
    for tag, f in (("hole", hole), ("pin", res.scene.feature(m.pin))):
        pts = sc3.find("axis", f"{tag} axis").mesh.points
        t = geom.tolerance_allowed(f, f.mmc)  # zone at the worst-case (MMC) state
        # both ends on the zone's cylinder: distance from the zone axis = t/2 (independent check)
        d = _radial(pts[[0, -1]], hole.at)
        assert d == pytest.approx([t / 2, t / 2], abs=1e-12)
        # and on opposite sides of it (entering at one side, leaving at the other)
        a, b = pts[0, :2] - hole.at, pts[-1, :2] - hole.at
        assert np.dot(a, b) == pytest.approx(-(t / 2) ** 2, abs=1e-12)


def test_hole_and_pin_tilt_adversely_by_default(gearbox):
    sc3 = build_mate_scene(gearbox, 0, exaggeration=1.0)
    h = sc3.find("axis", "hole axis").mesh.points
    p = sc3.find("axis", "pin axis").mesh.points
    assert np.sign(h[-1, 0] - h[0, 0]) == -np.sign(p[-1, 0] - p[0, 0]) != 0


def _clearance_bound(res, m) -> float:
    """Second-order terms the closed form VC(hole) - VC(pin) leaves out, computed here: a
    cylinder of radius r tilted by theta differs from its section normal to A by about
    r theta^2 / 2 on each side (sec theta - 1 ~ theta^2 / 2, Taylor series, from memory);
    plus the angular sampling of the surface, offset * (1 - cos(pi / N)) per side."""
    hole, pin = res.scene.feature(m.hole), res.scene.feature(m.pin)
    th = geom.tolerance_allowed(hole, hole.mmc) / hole.length
    tp = geom.tolerance_allowed(pin, pin.mmc) / pin.length
    r = max(hole.mmc, pin.mmc) / 2
    offset = geom.tolerance_allowed(hole, hole.mmc) + geom.tolerance_allowed(pin, pin.mmc)
    return 2 * (r * (th**2 + tp**2) + offset * (1 - math.cos(math.pi / N_PHI)))


@pytest.mark.parametrize("name", ["gearbox_endcap_dowel.toml", "sensor_bracket_interference.toml",
                                  "valve_body_guide_pin.toml", "motor_flange_studs.toml"])
def test_clearance_scalars_match_geom(name):
    res = _res(name)
    m = res.mates[0]
    bound = _clearance_bound(res, res.scene.mates[0])
    mins = []
    for k in (1.0, None):  # true scale and the auto exaggeration: the scalars are TRUE distances
        sc3 = build_mate_scene(res, 0, exaggeration=k)
        mesh = sc3.find("mate", "pin surface (clearance)").mesh
        c = mesh.point_data["clearance"]
        # geom's worst-case clearance: IB(hole) - OB(pin) (ASME Y14.5 boundaries via geom.analysis)
        assert c.min() == pytest.approx(m.clearance_min, abs=bound)
        assert np.allclose(c, 2 * mesh.point_data["gap"])
        assert sc3.clearance == pytest.approx(m.clearance_min, abs=1e-12)
        mins.append(c.min())
    assert mins[0] == pytest.approx(mins[1], abs=1e-12)


def test_interference_is_negative_and_red(sensor, gearbox):
    sc3 = build_mate_scene(sensor, 0)
    assert sensor.mates[0].clearance_min < 0  # the demo is built to fail (scene file comment)
    assert sc3.find("mate", "pin surface (clearance)").mesh.point_data["clearance"].min() < 0
    assert ("interference: pin and hole overlap", S.INTERFERENCE) in sc3.legend
    assert sc3.verdict.startswith("INTERFERES")
    ok = build_mate_scene(gearbox, 0)
    assert all(col != S.INTERFERENCE for _, col in ok.legend)
    assert ok.verdict.startswith("ASSEMBLES")


def test_what_if_state_changes_clearance(gearbox):
    hole = gearbox.scene.feature("cap-bore")
    pin = gearbox.scene.feature("dowel")
    hs = FeatureState(size=hole.lmc, share=0.5, direction_deg=30.0)
    ps = FeatureState(size=pin.lmc, share=0.0, direction_deg=210.0)
    sc3 = build_mate_scene(gearbox, 0, states={hole.id: hs, pin.id: ps}, exaggeration=1.0)
    expect = geom.clearance_at(hole, pin, hs, ps)  # geom's what-if formula
    c = sc3.find("mate", "pin surface (clearance)").mesh.point_data["clearance"]
    # the pin is straight (share 0): the tightest spot is where the hole's tilt is largest; the
    # sampled minimum can only be at or above the closed form, by the resolution bound at most
    assert c.min() >= expect - 1e-6
    assert c.min() == pytest.approx(expect, abs=_clearance_bound(gearbox, gearbox.scene.mates[0]) + 1e-5)
    assert sc3.verdict.startswith("what-if")


# ------------------------------------------------------------------------------- layers


def test_layers_present_and_hidden(gearbox, motor):
    sc3 = build_mate_scene(gearbox, 0)
    for name in ("part", "datum", "zone", "zone_axis", "axis", "surface", "vc", "rc", "mate", "clearance"):
        assert name in sc3.layers, name
    assert "projected" not in sc3.layers  # no projected tolerance in this scene
    assert set(sc3.layers) <= set(LAYERS)
    assert "rc" in HIDDEN_BY_DEFAULT
    pl = pv.Plotter(off_screen=True, window_size=(320, 240))
    try:
        actors = add_to_plotter(pl, sc3)
        assert actors["rc"] == []  # hidden by default
        assert len(actors["vc"]) == len(sc3.layers["vc"])
        assert actors["readouts"] and actors["legend"] and actors["labels"]
    finally:
        pl.close()
    pl = pv.Plotter(off_screen=True, window_size=(320, 240))
    try:
        actors = add_to_plotter(pl, sc3, visible=set(LAYERS))
        assert len(actors["rc"]) == len(sc3.layers["rc"]) > 0
    finally:
        pl.close()
    stud = build_feature_scene(motor, "stud-hole")
    assert "projected" in stud.layers  # the stud hole has a projected zone (scene file)
    assert "mate" not in stud.layers
    # projected zone: from -P to 0 on the far side of datum A
    P = motor.scene.feature("stud-hole").tolerance.projected
    zb = stud.find("zone", "hole zone").mesh.bounds
    assert (zb[4], zb[5]) == pytest.approx((-P, 0.0))
    ext = stud.find("projected", "hole axis extension").mesh.points
    assert ext[:, 2].min() == pytest.approx(-P)
    assert any(it.name == "mating clearance hole VC" for it in stud.layers["projected"])
    for fid in ("pilot", "adaptor-bore"):
        assert "projected" not in build_feature_scene(motor, fid).layers


def test_mating_hole_in_projected_zone(motor):
    """The fastener in the mating part's clearance hole: VC = H - T against F + t (fixed
    fastener formula H = F + 2T, ASME Y14.5 appendix, from memory)."""
    stud = build_feature_scene(motor, "stud-hole", exaggeration=1.0)
    fa = motor.scene.fasteners[0]
    T = (fa.hole - fa.fastener) / 2  # computed here, independently of geom
    t = motor.scene.feature("stud-hole").tolerance.value  # at MMC: no bonus
    expect = (fa.hole - T) - (fa.fastener + t)
    assert stud.clearance == pytest.approx(expect, abs=1e-12)
    hole = stud.find("projected", "mating clearance hole VC").mesh
    assert hole.bounds[1] - hole.bounds[0] == pytest.approx(fa.hole - T, abs=1e-9)


def test_auto_exaggeration(gearbox):
    k = auto_exaggeration(gearbox, mate_index=0)
    hole = gearbox.scene.feature("cap-bore")
    t = hole.tolerance.value
    # the drawn zone is about a tenth of the diameter: at most 0.10 D, rounded down by at most
    # the largest step of the round-number series (1 -> 1.5)
    assert k * t <= 0.10 * hole.mmc + 1e-12
    assert k * t >= 0.10 * hole.mmc / 1.5
    # by hand from the scene file: 0.10 x 8.000 / 0.015 = 53.3 (the hole's zone at MMC is the
    # larger one, the dowel's is 0.005), rounded down in the round series 1, 1.5, 2, 2.5, 3, 4,
    # 5, 6, 8 x 10^n (common practice, no source): 50. The cap against shrinking a drawn radius
    # below a third of R0 = 4 does not bite: the smallest radius any boundary can have is the
    # dowel's (7.965 - 0.015) / 2 = 3.975, and (2/3) x 4 / (4 - 3.975) = 106.7 > 53.3. The room
    # rule of the 2D views over the whole size range does not bite either: the dowel at LMC
    # 7.965 with 0.015 allowed reaches 3.975, 0.025 inside R0, and the bore at LMC 8.015 with
    # 0.030 reaches 4.0225: 0.4 x 4 / 0.025 = 64 > 53.3.
    assert k == 50.0
    sc3 = build_mate_scene(gearbox, 0)
    assert sc3.exaggeration == 50.0
    # the one scale sentence about the hole's MMC diameter 8.000, then the 3D picture's clause
    assert sc3.scale_text == "radial deviations \u00d750 about \u00d88.000; lengths and dimension texts true"
    assert sc3.caption == sc3.scale_text + "\nzones, gaps, tilts and size differences all drawn at this factor"
    assert build_mate_scene(gearbox, 0, exaggeration=1.0).caption.startswith("true scale: radial deviations \u00d71")


def test_bowed_and_width_zones_build():
    text = scene_toml(hole("h", (10.0, 10.02), 20.0, tolerance=tol("straightness", 0.02, datums=())),
                      pin("p", (9.95, 9.97), 20.0, tolerance=tol("position", 0.01, datums=("A", "B"), zone="width")),
                      mates=[("h", "p")], title="t")
    res = geom.analyse_scene(geom.loads(text))
    sc3 = build_mate_scene(res, 0, exaggeration=1.0)
    axis = sc3.find("axis", "hole axis").mesh.points
    # bowed axis: ends on one side of the zone, middle on the other (geom.placement docstring)
    assert axis[0, 0] == pytest.approx(-0.01) and axis[len(axis) // 2, 0] == pytest.approx(0.01)
    slab = sc3.find("zone", "pin zone").mesh.bounds
    assert slab[1] - slab[0] == pytest.approx(0.01)  # width zone: two planes t apart
    c = sc3.find("mate", "pin surface (clearance)").mesh.point_data["clearance"]
    # second order: the bowed axis leaves its ends at slope 4 * 0.02 / 20 (the parabola of
    # geom.placement, differentiated here); a cylinder tilted by theta gains ~ r theta^2 / 2 a side
    theta_end = 4 * 0.02 / 20.0
    bound = 2 * 5.0 * theta_end**2 + 2 * 5.0 * (0.005 / 20) ** 2
    assert c.min() == pytest.approx(res.mates[0].clearance_min, abs=bound)


# ------------------------------------------------------------------------------- every scene


@pytest.mark.parametrize("path", SCENES, ids=[os.path.basename(p) for p in SCENES])
def test_every_scene_builds_and_renders(path):
    res = geom.analyse_scene(geom.load(path))
    built: list[Scene3D] = [build_mate_scene(res, i) for i in range(len(res.scene.mates))]
    built += [build_feature_scene(res, f.id) for f in res.scene.features]
    # a scene with measured points: every such feature also builds its inspection view
    # (independent: the InspectionResult computed by geom.inspect from the scan file)
    from geom.inspect import inspect_feature

    for f in res.scene.features:
        if f.measured is not None and f.measured.points is not None:
            insp = inspect_feature(res.scene, f.id)
            sc3 = build_inspection_scene(res, insp)
            assert sc3.find("points", "measured points").mesh.n_points == len(insp.points)
            # size, axis, surface, and the axis reading that does not govern where there is one
            # and the line that says which readings decide the headline, and why
            assert len(sc3.verdicts) == 3 + (insp.other_axis_check is not None) + bool(insp.verdict.why)
            assert sc3.verdict == insp.verdict.headline
            built.append(sc3)
    if not built:  # a scene of fasteners only: nothing to draw in 3D, and nothing fails
        assert not res.scene.features and auto_exaggeration(res) == 1.0
        return
    for sc3 in built:
        assert sc3.exaggeration >= 1.0
        assert set(VIEWS) <= set(sc3.cameras) <= {*VIEWS, CLOSE_UP}  # the close-up where a fit has a tightest spot
        assert sc3.readouts and sc3.legend
        for items in sc3.layers.values():
            for it in items:
                assert it.mesh.n_points > 0 and np.isfinite(it.mesh.points).all()
        assert section_cut(sc3).layers
    img = render_image(built[0], None, "iso", size=(400, 300))
    assert img.shape == (300, 400, 3)
    # not blank: a good share of the pixels differ from the background
    bg = np.array(S.rgb255(S.BACKGROUND))
    assert (np.abs(img.astype(int) - bg).sum(axis=2) > 30).mean() > 0.10


# ------------------------------------------------------------------------------- pixels


def _red_pixels(img: np.ndarray) -> int:
    """Pixels of the interference colour, allowing for shading: strongly red, little green/blue
    (threshold chosen here: S.INTERFERENCE is (224, 0, 43); no other role colour is red)."""
    r, g, b = (img[..., i].astype(int) for i in range(3))
    return int(((r > 120) & (g < 60) & (b < 90) & (r - g > 100)).sum())


def test_interference_colour_in_pictures(sensor, gearbox, tmp_path):
    bad = render_image(build_mate_scene(sensor, 0), tmp_path / "bad.png", "iso", size=(800, 600))
    good = render_image(build_mate_scene(gearbox, 0), tmp_path / "good.png", "iso", size=(800, 600))
    assert (tmp_path / "bad.png").stat().st_size > 10_000
    assert _red_pixels(bad) > 2000  # the overlapping corners, the verdict and the scale bar
    assert _red_pixels(good) < 20


def test_views_differ(gearbox):
    sc3 = build_mate_scene(gearbox, 0)
    imgs = {v: render_image(sc3, None, v, size=(320, 240)) for v in VIEWS}
    assert not np.array_equal(imgs["iso"], imgs["top"])
    assert not np.array_equal(imgs["top"], imgs["section"])
    with pytest.raises(ValueError):
        render_image(sc3, None, "bottom", size=(64, 48))


def test_style_luminance_distinct():
    roles = [S.PART, S.DATUM, S.ZONE, S.AXIS, S.SURFACE, S.VC, S.RC, S.MATE, S.INTERFERENCE]
    lum = sorted(S.luminance(c) for c in roles)
    # greyscale print: the roles' relative luminances (WCAG 2 formula, from memory) are distinct
    assert min(b - a for a, b in zip(lum, lum[1:])) > 0.015
    ramp = [S.luminance(c) for c in S.CLEARANCE_COLORS]
    assert ramp == sorted(ramp) and ramp[0] > S.luminance(S.INTERFERENCE) + 0.1


def test_render_variants_equal_separate_renders(sensor):
    # Independent: each variant must be pixel-identical to its own render_image call.
    from viewer.scene3d import render_variants

    s3 = build_mate_scene(sensor, 0)
    bare = set(LAYERS) - set(HIDDEN_BY_DEFAULT) - {"readouts", "legend"}
    got = render_variants(s3, "iso", {"full": (None, None), "bare": (None, bare)}, size=(480, 360))
    assert np.array_equal(got["full"], render_image(s3, None, "iso", size=(480, 360)))
    assert np.array_equal(got["bare"], render_image(s3, None, "iso", size=(480, 360), visible=bare))
    assert not np.array_equal(got["full"], got["bare"])


def test_clearance_colour_scale_is_fixed_and_holds_every_state(gearbox, sensor):
    """One colour scale per mate, whatever the what-if state: its low end is geom's worst-case
    clearance (inner boundary - outer boundary = VC - VC at MMC, ASME Y14.5 virtual condition),
    less the second-order lean term d (sec a - 1) < 1e-4 here, where that is below zero, else 0;
    every local clearance coloured at the corner states (sizes at the limits, none or all of
    the tolerance used, tilts the same way or opposite) and at random states lies within it;
    only an interfering mate shows red on it."""
    for res in (gearbox, sensor):
        m = res.scene.mates[0]
        hole, pin = res.scene.feature(m.hole), res.scene.feature(m.pin)
        worst = res.mates[0].clearance_min
        rng = np.random.default_rng(11)
        corners = [FeatureState(size, share, d) for size in (0, 1) for share in (0.0, 1.0) for d in (0.0, 180.0)]
        pairs = [({hole.id: FeatureState(hole.limits[h.size], h.share, h.direction_deg),
                   pin.id: FeatureState(pin.limits[p.size], p.share, p.direction_deg)}) for h in corners for p in corners]
        pairs += [{f.id: FeatureState(float(rng.uniform(*f.limits)), float(rng.uniform(0, 1)),
                                      float(rng.uniform(0, 360))) for f in (hole, pin)} for _ in range(12)]
        pairs.append(None)  # the worst case itself
        clims = set()
        for states in pairs:
            item = build_mate_scene(res, 0, states=states).find("mate", "pin surface (clearance)")
            lo, hi = item.style["clim"]
            clims.add((lo, hi))
            values = np.asarray(item.mesh.point_data["clearance"])
            assert lo - 1e-12 <= values.min() and values.max() <= hi + 1e-12
        assert len(clims) == 1
        (lo, hi), = clims
        assert min(0.0, worst) - 1e-4 <= lo <= min(0.0, worst) + 1e-12
        assert (lo < 0) == (worst < 0) and hi > 0


# ------------------------------------------------------------------------------- words


def _iso(name: str) -> geom.SceneResult:
    """A demo scene read as an ISO GPS drawing (the same numbers, the ISO standard)."""
    path = os.path.join(ROOT, "scenes", name)
    text = open(path).read()
    assert 'standard = "asme"' in text
    return geom.analyse_scene(geom.loads(text.replace('standard = "asme"', 'standard = "iso"'), path, path))


def _words(sc3: Scene3D) -> str:
    return "\n".join([*sc3.readouts, *(lbl for lbl, _ in sc3.legend), *(lb.text for lb in sc3.labels),
                      *(t for t, _ in sc3.verdicts), sc3.verdict, sc3.caption])


def test_iso_scene_speaks_iso():
    """ISO 2692 terms (from memory): MMS / LMS, the maximum material virtual size MMVS, and the
    tolerance "increase" where ASME says bonus; no ASME word on an ISO picture."""
    res = _iso("gearbox_endcap_dowel.toml")
    for sc3 in (build_mate_scene(res, 0), build_feature_scene(res, "cap-bore"),
                build_mate_scene(res, 0, states={"cap-bore": FeatureState(res.scene.feature("cap-bore").lmc)})):
        words = _words(sc3)
        for w in ("MMVS", "MMS", "increase", "tolerance allowed = t + increase"):
            assert w in words, w
        for w in ("bonus", "VC =", "VC:", " VC ", "MMC", "LMC", "RFS", "Rule #1", "from memory", "\u00a7"):
            assert w not in words, w


def test_asme_words_and_tolerance_allowed_formula(gearbox):
    """The ASME picture says bonus and VC; "tolerance allowed = t + bonus" is geom's formula
    (ASME Y14.5: tolerance allowed = stated + bonus, bonus = produced size - MMC, from memory)."""
    hole = gearbox.scene.feature("cap-bore")
    st = FeatureState(hole.lmc)
    sc3 = build_mate_scene(gearbox, 0, states={"cap-bore": st})
    t = hole.tolerance.value
    b = hole.lmc - hole.mmc  # bonus at LMC, computed here
    u = gearbox.scene.units
    words = _words(sc3)
    assert f"tolerance allowed = t + bonus = {u.fmt(t)} + {u.fmt(b)} = {u.fmt(t + b)}" in words
    assert "VC: worst-case mating boundary" in words


def test_iso_boundaries_none_build(motor):
    """ISO 8015 independency (from memory): a side that neither a modifier nor the envelope
    bounds has no worst-case boundary; the pictures draw none there and say why."""
    pilot = motor.features["pilot"]  # position at LMC, no (M)/(E): the MMS side is not bounded
    assert pilot.outer_boundary.value is None and pilot.resultant_condition.value is None
    sc3 = build_feature_scene(motor, "pilot", exaggeration=1.0)
    assert not any(it.name.startswith("pin O") for it in sc3.layers.get("vc", ()))
    assert "OB: none" in "\n".join(sc3.readouts)
    # the LMVS (LMS - t = 39.950 - 0.020 = 39.930, ISO 2692, from memory) is on the other side
    (cage,) = sc3.layers["rc"]
    assert cage.mesh.bounds[1] - cage.mesh.bounds[0] == pytest.approx(39.930, abs=1e-9)
    stud = motor.features["stud-hole"]  # (M) only: no LMS-side boundary, no RC
    assert stud.resultant_condition.value is None
    st3 = build_feature_scene(motor, "stud-hole")
    assert "rc" not in st3.layers and "vc" in st3.layers


def test_fastener_only_scene():
    """A scene of fasteners only (no feature) is valid: nothing in the 3D module assumes a feature."""
    res = geom.analyse_scene(geom.loads(scene_toml(
        fasteners=[fastener("s", "fixed", 6.0, 6.6, thread_depth=10.0, projection=8.0)], title="studs only")))
    assert not res.scene.features and not res.scene.mates
    assert auto_exaggeration(res) == 1.0
