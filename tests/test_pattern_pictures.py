"""The pattern's picture and report page on the invented pump cover scene.

Check values are computed here from the scene's limits and tolerances: the gauge pin is the hole's
VC, MMC - t (ASME Y14.5 functional gauging, common practice); zones are drawn k times their
diameter t + bonus about each basic location; a right-way reading of a hole pushed out radially
by e is 2e whatever the shift (a translation cannot bring opposite holes in together: geometry,
no source).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from matplotlib.patches import Circle

from geom import analyse_scene, load
from viewer.figures.pattern import draw_pattern, exaggeration_for, pattern_figure, pattern_result

SCENE = Path(__file__).resolve().parents[1] / "scenes" / "pump_cover_bolts.toml"


@pytest.fixture(scope="module")
def res():
    return analyse_scene(load(SCENE))


def test_the_demo_cover_fails_the_right_way_and_passes_the_wrong_way(res):
    pr = pattern_result(res, "cover-bolts")
    e = math.hypot(25.5160, 25.5160) - 36.0  # each hole's radial error as measured (scene file)
    assert [r.position for r in pr.right.readings] == pytest.approx([2 * e] * 4, abs=2e-4)
    assert not pr.right.conforms
    # the wrong way: each allowed 0.150 + the shift 52.020 - 51.980 = 0.040
    assert [r.allowed for r in pr.wrong.readings] == pytest.approx([0.150 + 0.040] * 4)
    assert pr.wrong.conforms


def test_the_picture_draws_each_zone_k_times_and_the_gauge_true(res):
    from matplotlib.figure import Figure

    pr = pattern_result(res, "cover-bolts")
    fig = Figure()
    ax = fig.add_subplot()
    k, _handles = draw_pattern(ax, res, "cover-bolts", "right")
    assert k == exaggeration_for(pr)
    circles = [c for c in ax.patches if isinstance(c, Circle)]
    zones = [c for c in circles if c.get_fill() and abs(c.radius - k * 0.150 / 2) < 1e-9]
    assert len(zones) == 4  # one per member, diameter k x (t + bonus at 9.000 = MMC)
    pins = [c for c in circles if abs(c.radius - (9.000 - 0.150) / 2) < 1e-9]
    assert len(pins) == 4  # gauge pins at the VC, true size
    assert {(round(c.center[0], 6), round(c.center[1], 6)) for c in pins} == {
        (round(36 * math.cos(math.radians(a)), 6), round(36 * math.sin(math.radians(a)), 6)) for a in (45, 135, 225, 315)}
    sim = [c for c in circles if abs(c.radius - (52.000 - 0.020) / 2) < 1e-9]
    assert len(sim) == 1  # datum B's simulator at its MMB


def test_the_report_puts_the_pattern_page_first(tmp_path, res):
    import subprocess

    from viewer.report.writer import write_report

    paths = write_report(res, tmp_path)
    names = {p.name for p in paths}
    assert {"pattern_cover-bolts.png", "pattern_cover-bolts.svg", "pattern_housing-studs.png"} <= names
    txt = subprocess.run(["pdftotext", "-f", "1", "-l", "1", str(tmp_path / "report.pdf"), "-"],
                         capture_output=True, text=True, check=True).stdout
    assert "PATTERN IN ITS DATUM FRAME" in txt and "DOES NOT CONFORM" in txt
    assert "not a verdict" in txt and "DISPOSITION" in txt
    assert "do not replace" in txt.replace("\n", " ")  # the caution on every page


def test_a_pattern_without_measured_members_has_one_panel(res):
    fig = pattern_figure(res, "housing-studs")
    assert len(fig.axes) == 1


SENSOR = Path(__file__).resolve().parents[1] / "scenes" / "sensor_plate_composite.toml"


def test_the_lower_tier_is_drawn_where_its_fit_puts_it():
    """The composite's feature-relating tier: one zone per member, k x (t2 + bonus) wide, centred
    where the free fit carries each basic location back (fitted = R measured + d: geometry, no
    source); t2 + bonus at 6.620 = 0.100 + 0.020 (ASME Y14.5 bonus, from memory; scene file)."""
    from matplotlib.figure import Figure

    from viewer.figures.pattern import lower_zone_centres

    r2 = analyse_scene(load(SENSOR))
    pr = pattern_result(r2, "sensor-holes")
    ax = Figure().add_subplot()
    k, handles = draw_pattern(ax, r2, "sensor-holes", "right")
    low = [c for c in ax.patches if c.get_gid() == "lower-tier zone"]
    assert len(low) == 4
    assert [c.radius for c in low] == pytest.approx([k * (0.100 + 0.020) / 2] * 4, abs=1e-9)
    lo = pr.composite.lower
    for c, r, b in zip(low, lo.readings, pr.pattern.locations):
        # the zone centre z satisfies R(theta) z + d = b (the fit's transform inverted here)
        th = math.radians(r.rotation_deg)
        zx, zy = b[0] + (c.center[0] - b[0]) / k, b[1] + (c.center[1] - b[1]) / k
        fx = math.cos(th) * zx - math.sin(th) * zy + r.shift[0]
        fy = math.sin(th) * zx + math.cos(th) * zy + r.shift[1]
        assert (fx, fy) == pytest.approx(b, abs=1e-9)
    assert lower_zone_centres(pr)[0] != pytest.approx(pr.pattern.locations[0], abs=1e-6)  # the whole pattern is off
    texts = [t for _a, t in handles]
    assert any(t.startswith("pattern-locating ⌀0.400 | A | B | C") for t in texts)
    assert any(t.startswith("feature-relating ⌀0.100 | A") for t in texts)
