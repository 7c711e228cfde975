"""The 2D views, checked on the data of the artists they draw (mapped back to true units)."""

import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import shapely
from matplotlib.patches import Circle, PathPatch
from shapely.geometry import Polygon

from geom import analyse_scene, load, tolerance_allowed, virtual_condition
from geom.boundaries import FeatureState
from geom.scenefile import loads
from viewer import figures as F
from viewer import style as S

ROOT = Path(__file__).resolve().parent.parent
SCENES = ROOT / "scenes"


@pytest.fixture(scope="module")
def bracket():
    return analyse_scene(load(SCENES / "sensor_bracket_interference.toml"))


@pytest.fixture(scope="module")
def gearbox():
    return analyse_scene(load(SCENES / "gearbox_endcap_dowel.toml"))


@pytest.fixture(scope="module")
def flange():
    return analyse_scene(load(SCENES / "motor_flange_studs.toml"))


# Figures read by several tests are built once (tests only read them).
@pytest.fixture(scope="module")
def bracket_through(bracket):
    return F.through_view(bracket, 0)


@pytest.fixture(scope="module")
def bracket_section(bracket):
    return F.section_view(bracket, 0)


@pytest.fixture(scope="module")
def bracket_bonus(bracket):
    return F.bonus_chart(bracket, 0)


# The sensor bracket scene (scenes/sensor_bracket_interference.toml), as written in the file:
# hole 6.000-6.012, position 0.030 at MMC, length 8.0; pin 5.980-5.990, perpendicularity
# 0.010 at MMC, length 8.0. Virtual conditions by ASME Y14.5 VC = MMC -/+ t (from memory):
HOLE_VC = 6.000 - 0.030  # 5.970
PIN_VC = 5.990 + 0.010  # 6.000


def _by_gid(fig, gid):
    return [a for ax in fig.axes for a in ax.findobj() if a.get_gid() == gid]


def _fig_text(fig, gid):
    """The figure-level text (title, footer of a standalone figure) with this gid."""
    (t,) = [a for a in fig.texts if a.get_gid() == gid]
    return t.get_text()


def _texts(fig):
    return " ".join(t.get_text() for t in fig.findobj(lambda a: hasattr(a, "get_text")))


def _chord(d, segments):
    """Polygon error: the section polygons straddle the true curve (geom.throughview), so a
    radius is off by at most r (1 - cos(pi / n)) either way (geometry)."""
    return d * (1 - math.cos(math.pi / segments))


def _second_order(d, t, L):
    """d (sec(theta) - 1), tan(theta) = t / L: the elliptical-section term (geom.throughview)."""
    return d * (1 / math.cos(math.atan2(t, L)) - 1)


def _opening_from_artist(fig, data):
    """Independent computation: the shaded opening's vertices mapped back to true units, the
    polygon rebuilt with shapely, and its largest inscribed circle found by shapely."""
    (patch,) = _by_gid(fig, "opening")
    path = patch.get_path()
    true_xy = data.exaggeration.unmap_polar(path.vertices)
    rings, cur = [], []
    for xy, code in zip(true_xy, path.codes):
        if code == path.MOVETO and cur:
            rings.append(cur)
            cur = []
        if code != path.CLOSEPOLY:
            cur.append(xy)
    rings.append(cur)
    poly = Polygon(rings[0], rings[1:])
    line = shapely.maximum_inscribed_circle(poly, tolerance=1e-9)
    (x0, y0), (x1, y1) = line.coords
    return poly, 2 * math.hypot(x1 - x0, y1 - y0)


@pytest.mark.parametrize("scene, subject", [("sensor_bracket_interference.toml", 0),
                                            ("gearbox_endcap_dowel.toml", 0),
                                            ("valve_body_guide_pin.toml", 0)])
def test_shaded_opening_inscribed_circle_is_virtual_condition(scene, subject):
    # ASME Y14.5-2018 virtual condition (from memory): a hole at MMC whose axis crosses its whole
    # zone leaves a clear opening of VC = MMC - t, plus the exact second-order term
    # d (sec(theta) - 1) of the elliptical sections documented in geom/throughview.py.
    res = analyse_scene(load(SCENES / scene))
    fig, data = F.through_view(res, subject)
    hole = data.subject.hole
    t = tolerance_allowed(hole, hole.mmc)
    so = _second_order(hole.mmc, t, hole.length)
    _, d_artist = _opening_from_artist(fig, data)
    vc = virtual_condition(hole)
    ch = _chord(hole.mmc, data.segments)
    assert vc - ch <= d_artist <= vc + so + ch
    # the drawn circle is the one computed beside the figure, mapped back to true units
    (circle,) = _by_gid(fig, "inscribed")
    assert isinstance(circle, Circle)
    assert float(data.exaggeration.unradial(circle.radius)) * 2 == pytest.approx(data.hole.diameter, abs=1e-9)
    assert data.hole.diameter == pytest.approx(d_artist, abs=ch)


def test_opening_stays_at_virtual_condition_with_bonus(bracket):
    # ASME Y14.5-2018 bonus at MMC (from memory): at a produced size d the tolerance allowed is
    # t + (d - MMC), so the opening d - t_allowed stays at VC (plus the second-order term).
    hole = bracket.scene.feature("bracket-hole")
    st = FeatureState(6.010, 1.0, 0.0)
    fig, data = F.through_view(bracket, 0, states={"bracket-hole": st})
    t = tolerance_allowed(hole, 6.010)
    assert t == pytest.approx(0.040)  # 0.030 + (6.010 - 6.000), from memory as above
    _, d_artist = _opening_from_artist(fig, data)
    assert d_artist == pytest.approx(5.970, abs=_second_order(6.010, t, 8.0) + _chord(6.010, data.segments))


def test_pin_envelope_circle_is_pin_virtual_condition(bracket_through):
    # ASME Y14.5-2018 (from memory): pin VC = MMC + t = 5.990 + 0.010 = 6.000, plus the same
    # second-order term; the circle is read back from the drawn artist.
    fig, data = bracket_through
    (circle,) = _by_gid(fig, "pin-envelope")
    d = 2 * float(data.exaggeration.unradial(circle.radius))
    ch = _chord(5.990, data.segments)
    assert PIN_VC - ch <= d <= PIN_VC + _second_order(5.990, 0.010, 8.0) + ch


def test_interference_is_drawn_in_the_warning_colour(bracket_through, gearbox):
    # sensor bracket: worst-case clearance = hole VC - pin VC = 5.970 - 6.000 = -0.030 (ASME
    # Y14.5 VC, from memory; values above); the overlap region must exist, be red
    # (viewer.style.INTERFERENCE) and its text give the true values.
    fig, data = bracket_through
    (ov,) = _by_gid(fig, "overlap")
    assert isinstance(ov, PathPatch)
    assert ov.get_facecolor()[:3] == pytest.approx(S.rgb(S.INTERFERENCE), abs=1e-6)
    # independent: the drawn overlap mapped back equals shapely's pin hull minus the opening
    assert data.overlap.area > 0
    (txt,) = _by_gid(fig, "gap-text")
    # per side: half of the diametral 0.030 (computed here)
    assert "OVERLAP 0.030" in txt.get_text() and "(0.015 per side)" in txt.get_text()
    assert data.clearance == pytest.approx(HOLE_VC - PIN_VC, abs=1e-9)
    # gearbox end cap assembles: no overlap artist, clearance text instead
    fig2, data2 = F.through_view(gearbox, 0)
    assert _by_gid(fig2, "overlap") == []
    (txt2,) = _by_gid(fig2, "gap-text")
    assert txt2.get_text().startswith("guaranteed clearance\n(through-view)\n")
    assert data2.clearance > 0


# The bracket's one factor, by hand (ASME Y14.5 bonus and VC from memory; limits from the scene
# file): hole 6.000-6.012 with 0.030 at MMC over 8.0, pin 5.980-5.990 with 0.010 at MMC.
# Look: 0.10 x D / t = 0.10 x 6.000 / 0.030 = 20. Cap: smallest boundary 6.000 - 0.042 = 5.958,
# R0 - r_min = 0.021, (2/3) 3 / 0.021 = 95. Room over the range: the hole at LMC 6.012 with
# 0.042 allowed reaches 3.006 / cos(atan(0.042 / 8)) + 0.021 = 3.02704, 0.02704 beyond r0:
# 0.4 x 3 / 0.02704 = 44.4. The smallest: 20 (a round step already).
BRACKET_K = 20.0


def test_through_view_states_the_one_exaggeration_and_true_dimensions(bracket_through):
    # The largest radial deviation drawn at the worst case, from the geometry (geom.throughview's
    # model, computed here): the hole's end sections are ellipses with semi-axes d / (2 cos theta)
    # and d / 2, tan theta = t / L = 0.030 / 8.0, centred t / 2 either side of the basic axis; the
    # far end of the major axis lies t / 2 + d / (2 cos theta) from it. The polygons' vertices sit
    # on or outside the curve, by at most the factor 2 / (1 + cos(pi / n)). At the one factor it
    # fills well under 0.4 of r0 (the room rule).
    fig, data = bracket_through
    d, t, L, r0 = 6.000, 0.030, 8.0, 6.000 / 2
    a = d / (2 * math.cos(math.atan2(t, L)))
    hi = t / 2 + a * 2 / (1 + math.cos(math.pi / data.segments)) - r0
    k = data.exaggeration.k
    assert k == BRACKET_K
    assert k * hi <= 0.4 * r0
    assert _fig_text(fig, "footer").startswith(
        f"radial deviations ×{k:g} about Ø6.000; lengths and dimension texts true\n")
    text = _texts(fig)
    assert f"⌀{HOLE_VC:.3f}" in text and f"⌀{PIN_VC:.3f}" in text  # true values, not the drawn ones


def test_section_view_states_the_one_exaggeration(bracket_section):
    # The section uses the same k as the through-view (BRACKET_K, by hand above); its drawn
    # radius is r0 = 3.000 (not shortened: 0.55 L = 4.4 > r0), so its footer is the same sentence.
    fig, data = bracket_section
    k = data.exaggeration.k
    assert k == BRACKET_K and data.exaggeration.r_disp == 3.0
    assert _fig_text(fig, "footer").startswith(
        f"radial deviations ×{k:g} about Ø6.000; lengths and dimension texts true\n")
    # the tilt text says the drawn angle: atan(k t / L), in degrees to one decimal
    (tilt,) = _by_gid(fig, "bracket-hole-tilt-text")
    assert f"drawn {math.degrees(math.atan(k * 0.030 / 8.0)):.1f}° (×{k:g})" in tilt.get_text()


@pytest.mark.parametrize("view", ["through", "section"])
def test_scale_bar_is_drawn_at_k_and_labelled_true(bracket, view):
    # the bar's drawn length over k is its stated true length: at k = 20 and a quarter of
    # r0 = 3.000 (0.75 drawn), 0.75 / 20 = 0.0375 rounds down to the 1-2-5 step 0.02
    fig, data = (F.through_view if view == "through" else F.section_view)(bracket, 0)
    (bar,) = _by_gid(fig, "scale-bar")
    xs = np.asarray(bar.get_xdata(), float)
    drawn = float(np.nanmax(xs) - np.nanmin(xs))
    (txt,) = _by_gid(fig, "scale-bar-text")
    assert txt.get_text() == "0.020 mm true"
    assert drawn / data.exaggeration.k == pytest.approx(0.020, rel=1e-9)


def test_section_zone_width_is_tolerance_allowed(bracket):
    # the zone of an axis is the tolerance allowed at the produced size: 0.030 at MMC and
    # 0.030 + 0.006 at 6.006 (ASME Y14.5-2018 bonus, from memory)
    for size, expect in ((6.000, 0.030), (6.006, 0.036)):
        fig, data = F.section_view(bracket, 0, states={"bracket-hole": FeatureState(size)})
        lines = _by_gid(fig, "bracket-hole-zone-limit")
        assert len(lines) == 2
        xs = sorted(float(ln.get_xdata()[0]) for ln in lines)
        width = float(data.exaggeration.unlateral(xs[1] - xs[0]))
        assert width == pytest.approx(expect, abs=1e-12)
        assert f"⌀{expect:.3f}" in _texts(fig)


def test_section_axis_tilt_and_boundaries(bracket_section):
    # tilt: tan(theta) = t / L (an axis crossing its zone corner to corner, geometry);
    # boundary lines at VC: hole 5.970, pin 6.000 (ASME Y14.5-2018, from memory)
    fig, data = bracket_section
    ex = data.exaggeration
    (axis,) = _by_gid(fig, "bracket-hole-axis")
    x, z = np.asarray(axis.get_xdata(), float), np.asarray(axis.get_ydata(), float)
    slope = float(ex.unlateral(x[-1] - x[0])) / (z[-1] - z[0])
    assert math.degrees(math.atan(slope)) == pytest.approx(math.degrees(math.atan2(0.030, 8.0)), abs=1e-9)
    assert data.tilt_deg["bracket-hole"] == pytest.approx(math.degrees(math.atan2(0.030, 8.0)))
    for fid, vc in (("bracket-hole", HOLE_VC), ("locating-pin", PIN_VC)):
        xs = sorted({round(float(ln.get_xdata()[0]), 12) for ln in _by_gid(fig, f"{fid}-boundary")})
        assert len(xs) == 2
        assert 2 * float(ex.unradial(xs[1])) == pytest.approx(vc, abs=1e-12)
        assert xs[0] == pytest.approx(-xs[1])
    # the wall-to-wall overlap per side is half the diametral interference (opposite tilts),
    # to second order (the walls are d / (2 cos theta) from the axis)
    assert data.gap_per_side == pytest.approx(-0.015, abs=1e-4)
    assert _by_gid(fig, "overlap")


# t and the bonus at LMC = |LMC - MMC| from the scene file: hole 6.012 - 6.000, pin 5.990 - 5.980
@pytest.mark.parametrize("fid, t, bonus", [("bracket-hole", 0.030, 6.012 - 6.000), ("locating-pin", 0.010, 5.990 - 5.980)])
def test_bonus_line_through_mmc_and_lmc(bracket, bracket_bonus, fid, t, bonus):
    # ASME Y14.5-2018 (from memory): tolerance allowed = t at MMC, t + |LMC - MMC| at LMC; the
    # VC line (size -/+ allowed) is constant.
    f = bracket.scene.feature(fid)
    fig, data = bracket_bonus
    (line,) = _by_gid(fig, f"{fid}-allowed")
    x, y = np.asarray(line.get_xdata()), np.asarray(line.get_ydata())
    order = np.argsort(x)
    assert np.interp(f.mmc, x[order], y[order]) == pytest.approx(t, abs=1e-12)
    assert np.interp(f.lmc, x[order], y[order]) == pytest.approx(t + bonus, abs=1e-12)
    (vc_line,) = _by_gid(fig, f"{fid}-mating")
    assert np.ptp(vc_line.get_ydata()) == pytest.approx(0.0, abs=1e-12)
    assert vc_line.get_ydata()[0] == pytest.approx({"bracket-hole": HOLE_VC, "locating-pin": PIN_VC}[fid], abs=1e-12)
    assert virtual_condition(f) == pytest.approx(vc_line.get_ydata()[0], abs=1e-12)
    (mark,) = _by_gid(fig, f"{fid}-produced")
    assert mark.get_xdata()[0] == pytest.approx(f.mmc) and mark.get_ydata()[0] == pytest.approx(t)


def test_bonus_lmc_and_rfs(flange):
    # ASME Y14.5-2018 / ISO 2692 (from memory): at LMC the bonus grows toward MMC and the LMC
    # virtual size (pin: LMC - t = 39.950 - 0.020 = 39.930) is the constant line; RFS: no bonus.
    # Scene file: pilot 39.950-39.975 (size tolerance 0.025), position 0.020 at LMC; adaptor
    # bore perpendicularity 0.015 RFS.
    fig, data = F.bonus_chart(flange, 0)
    pilot = flange.scene.feature("pilot")
    (line,) = _by_gid(fig, "pilot-allowed")
    x, y = np.asarray(line.get_xdata()), np.asarray(line.get_ydata())
    assert np.interp(pilot.lmc, x, y) == pytest.approx(0.020, abs=1e-12)
    assert np.interp(pilot.mmc, x, y) == pytest.approx(0.020 + 0.025, abs=1e-12)
    (opp,) = _by_gid(fig, "pilot-opposite")
    assert np.ptp(opp.get_ydata()) == pytest.approx(0.0, abs=1e-12)
    assert opp.get_ydata()[0] == pytest.approx(39.930, abs=1e-9)
    (rfs,) = _by_gid(fig, "adaptor-bore-allowed")
    assert np.ptp(rfs.get_ydata()) == pytest.approx(0.0, abs=1e-12)
    assert rfs.get_ydata()[0] == pytest.approx(0.015, abs=1e-12)


def test_lone_projected_feature_views(flange):
    # a feature in no mate draws alone; the projected zone (projected = 8.0 in the scene file,
    # on the other side of A: -8 <= z <= 0, DEVELOPERS.md datum frame) is labelled and the
    # through-view sections sit at the ends of the projected zone
    fig, data = F.section_view(flange, "stud-hole")
    assert data.placements["stud-hole"].zone_z == (-8.0, 0.0)
    assert "projected zone 8.000 beyond A" in _texts(fig)
    fig2, data2 = F.through_view(flange, "stud-hole")
    assert data2.pin is None and data2.hole is not None
    assert len(_by_gid(fig2, "hole-section-0")) == 1 and len(_by_gid(fig2, "hole-section-1")) == 1


def test_every_view_of_every_scene_saves(tmp_path):
    import xml.etree.ElementTree as ET

    for p in sorted(SCENES.glob("*.toml")):
        res = analyse_scene(load(p))
        subjects = list(range(len(res.scene.mates))) + [f.id for f in res.scene.features]
        for sub in subjects:
            for name in F.VIEWS_2D:
                fig, _ = F.draw_view(name, res, sub)
                out = tmp_path / f"{p.stem}_{sub}_{name}.svg"
                F.save_figure(fig, out)
                # a well-formed SVG whose texts stay text (svg.fonttype "none"): the figure's
                # first title line is in it as written
                root = ET.parse(out).getroot()
                assert root.tag.endswith("svg")
                svg_text = "".join(root.itertext())
                assert _fig_text(fig, "title") in svg_text


def test_figures_need_no_gui_backend():
    code = ("from geom import load, analyse_scene\nfrom viewer import figures as F\n"
            "r = analyse_scene(load('scenes/sensor_bracket_interference.toml'))\n"
            "[F.draw_view(n, r, 0) for n in F.VIEWS_2D]\nimport sys\n"
            "print(sorted(m for m in sys.modules if m.split('.')[0] in ('PyQt5', 'pyvistaqt', 'tkinter')"
            " or m == 'matplotlib.pyplot'))\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    assert out.stdout.strip() == "[]"


def _iso(name):
    """A demo scene read as an ISO GPS drawing (the same numbers, the ISO standard)."""
    path = SCENES / name
    text = path.read_text()
    assert 'standard = "asme"' in text
    return analyse_scene(loads(text.replace('standard = "asme"', 'standard = "iso"'), str(path), str(path)))


def test_iso_figures_speak_iso():
    """ISO 2692 terms (from memory): MMS / LMS, the maximum material virtual size MMVS and the
    tolerance "increase"; no ASME word (bonus, VC, MMC, RFS) in an ISO figure."""
    res = _iso("sensor_bracket_interference.toml")
    hole = res.scene.feature("bracket-hole")
    st = {"bracket-hole": FeatureState(hole.lmc)}
    texts = " ".join(_texts(F.draw_view(n, res, sub, st)[0]) for n in F.VIEWS_2D for sub in (0, "bracket-hole"))
    for w in ("MMVS", "MMS", "LMS", "increase", "Increase: tolerance allowed"):
        assert w in texts, w
    for w in ("bonus", "Bonus", "VC =", " VC ", "MMC", "LMC", "RFS", "Rule #1", "from memory", "§"):
        assert w not in texts, w
    # the ASME original says bonus and VC
    asme = _texts(F.bonus_chart(analyse_scene(load(SCENES / "sensor_bracket_interference.toml")), 0)[0])
    assert "bonus" in asme and "VC = size" in asme and "MMVS" not in asme


def test_bonus_chart_draws_no_iso_boundary_that_does_not_exist(flange):
    """ISO 8015 independency (from memory): a side that neither a modifier nor the envelope
    bounds has no worst-case boundary; the chart draws no line there. The stud hole at (M):
    no LMS-side boundary; the pilot at (L): no MMS-side boundary, its LMVS (39.950 - 0.020 =
    39.930, ISO 2692) is drawn."""
    fig, _ = F.bonus_chart(flange, "stud-hole")
    assert _by_gid(fig, "stud-hole-mating") and not _by_gid(fig, "stud-hole-opposite")
    assert "OB: none" in _texts(fig)
    fig, _ = F.bonus_chart(flange, "pilot")
    assert not _by_gid(fig, "pilot-mating") and _by_gid(fig, "pilot-opposite")
    (opp,) = _by_gid(fig, "pilot-opposite")
    assert opp.get_ydata()[0] == pytest.approx(39.930, abs=1e-9)
    # the mate still draws: its fit assumes perfect form on the unbounded side, and says so
    fig, _ = F.section_view(flange, 0)
    assert "(perfect form assumed)" in _texts(fig)


def test_line_to_line_fit_text():
    """Zero worst-case clearance assembles (line-to-line, common practice, no source): no
    overlap artist and the line-to-line text. Hole MMC 6.000 - t 0.010 = VC 5.990 = pin VC
    5.980 + 0.010 (ASME Y14.5 VC = MMC -/+ t, from memory)."""
    text = (SCENES / "sensor_bracket_interference.toml").read_text()
    text = text.replace("value = 0.030", "value = 0.010").replace("[5.980, 5.990]", "[5.970, 5.980]")
    res = analyse_scene(loads(text))
    assert res.mates[0].clearance_min == pytest.approx(0.0, abs=1e-12)
    for view in (F.through_view, F.section_view):
        fig, data = view(res, 0)
        assert _by_gid(fig, "overlap") == []
        (txt,) = _by_gid(fig, "gap-text")
        assert txt.get_text().startswith("line-to-line")
