"""Several controls on one feature: a position refined by a tighter perpendicularity.

Reference values: each control's virtual condition is MMC - t for a hole at MMC (ASME Y14.5,
virtual condition; position with an orientation refinement, from memory); an orientation
refinement must be tighter than the position it refines (ASME Y14.5, from memory).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom.analysis import analyse_scene
from geom.boundaries import FeatureState
from geom.jsonout import result_to_json
from geom.placement import worst_case_axis
from geom.scenefile import SceneError, dumps, loads

BASE = """title = "t"
units = "mm"
[[feature]]
id = "b"
kind = "hole"
limits = [10.0, 10.015]
length = 12.0
[feature.tolerance]
characteristic = "position"
value = {pos}
material = "MMC"
datums = ["A", "B", "C"]
[[feature.refinement]]
characteristic = "perpendicularity"
value = {perp}
material = "MMC"
datums = {rdat}
[[datum]]
letter = "B"
[[datum]]
letter = "C"
"""


def scene(pos=0.2, perp=0.05, rdat='["A"]'):
    return loads(BASE.format(pos=pos, perp=perp, rdat=rdat), "r.toml")


def controls(sc):
    return {c.role: c for c in analyse_scene(sc).features["b"].controls}


def test_each_control_has_its_own_vc():
    c = controls(scene())
    # hole at MMC: VC = MMC - t (ASME Y14.5): 10.000 - 0.200 and 10.000 - 0.050
    assert c["main"].virtual_condition.value == pytest.approx(9.800, abs=1e-12)
    assert c["refinement"].virtual_condition.value == pytest.approx(9.950, abs=1e-12)
    # at LMC each control earns the size tolerance 0.015 as bonus (common practice, no source)
    assert c["refinement"].tolerance_at_lmc.value == pytest.approx(0.065, abs=1e-12)


def test_tighter_check_both_ways():
    assert controls(scene())["refinement"].tighter.ok
    loose = controls(scene(perp=0.25))["refinement"].tighter
    assert not loose.ok and "0.250" in loose.text


def test_refinement_datums_must_start_from_a():
    with pytest.raises(SceneError) as e:
        scene(rdat='["A", "C"]')
    assert "refinement[0]" in str(e.value)


def test_round_trip_and_json():
    sc = scene()
    assert loads(dumps(sc), "r.toml") == sc
    js = result_to_json(analyse_scene(sc))
    feats = js["features"]
    f = feats[0] if isinstance(feats, list) else feats["b"]
    assert [c["role"] for c in f["controls"]] == ["main", "refinement"]
    assert f["controls"][1]["tighter"]["ok"] is True


def test_refined_axis_reaches_the_position_edge_with_limited_tilt():
    f = scene().feature("b")
    p = worst_case_axis(f, FeatureState(10.0))
    bottom, top = p.points[0], p.points[-1]
    lateral = math.hypot(top[0] - bottom[0], top[1] - bottom[1])
    assert lateral <= 0.05 + 1e-12  # tilt over the length within the refinement's zone
    far = max(math.hypot(*bottom[:2]), math.hypot(*top[:2]))
    assert far == pytest.approx(0.1, abs=1e-9)  # still at the position zone's edge (radius t/2)


@settings(max_examples=30, deadline=None)
@given(st.floats(0.01, 0.19))
def test_refining_never_changes_the_position_vc_or_the_fit(perp):
    plain = loads(BASE.split("[[feature.refinement]]")[0].format(pos=0.2) + '[[datum]]\nletter = "B"\n'
                  '[[datum]]\nletter = "C"\n', "p.toml")
    r0 = analyse_scene(plain).features["b"]
    r1 = analyse_scene(scene(perp=round(perp, 4))).features["b"]
    assert r1.virtual_condition.value == r0.virtual_condition.value
    assert controls(scene(perp=round(perp, 4)))["refinement"].tighter.ok
