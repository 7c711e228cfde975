"""Every bundled scene loads, analyses, and gives the numbers its story promises."""

import json
from pathlib import Path

import pytest

from geom import analyse_scene, load, result_to_json
from geom.readout import CAUTION, render_text

ROOT = Path(__file__).resolve().parent.parent
SCENES = sorted((ROOT / "scenes").glob("*.toml"))


@pytest.mark.parametrize("scene", SCENES, ids=[s.name for s in SCENES])
def test_scene_loads_and_analyses(scene):
    s = load(scene)
    res = analyse_scene(s)
    text = render_text(res)
    assert CAUTION in text
    json.dumps(result_to_json(res))  # serialisable
    for r in res.features.values():
        assert r.mmc.value in r.feature.limits


def test_demo_scenes_cover_both_units_and_a_failure():
    scenes = [load(p) for p in SCENES]
    assert {s.units.value for s in scenes} >= {"mm", "in"}
    results = [analyse_scene(s) for s in scenes]
    assert any(not m.assembles for r in results for m in r.mates)
    assert any(m.assembles for r in results for m in r.mates)


def test_interference_demo_numbers():
    # ASME Y14.5-2018 VC formulas (from memory): hole VC = 6.000 - 0.030 = 5.970,
    # pin VC = 5.990 + 0.010 = 6.000 -> interference 0.030 although sizes alone leave 0.010.
    res = analyse_scene(load(ROOT / "scenes" / "sensor_bracket_interference.toml"))
    (m,) = res.mates
    assert m.clearance_min == pytest.approx(-0.030) and not m.assembles
    assert m.clearance_min_size == pytest.approx(0.010)


def test_inch_demo_text_uses_four_decimals():
    res = analyse_scene(load(ROOT / "scenes" / "valve_body_guide_pin.toml"))
    text = render_text(res)
    # ASME Y14.5-2018 (from memory): VC = MMC - t = .3125 - .0050 = .3075; the pin's
    # VC = MMC + t = .3050 + .0020 = .3070, so the worst case leaves .3075 - .3070 = .0005
    assert "VC = MMC - t = 0.3125 - 0.0050 = 0.3075" in text
    assert "ASSEMBLES in the worst case with 0.0005 in clearance" in text


def test_iso_demo_uses_iso_terms():
    res = analyse_scene(load(ROOT / "scenes" / "motor_flange_studs.toml"))
    text = render_text(res)
    assert "MMVS = MMS - t" in text and "LMVS = LMS - t" in text
    assert "VC =" not in text
