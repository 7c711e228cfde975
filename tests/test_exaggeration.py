"""The one exaggeration system (viewer.exaggeration): the round-number series, the 3D rule from
the scene, the 2D fill rule, and the display mapping with its inverses."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom.analysis import analyse_scene
from geom.model import Characteristic, Feature, Kind, Mate, Material, Scene, Tolerance, Units
from viewer.exaggeration import NICE, Exaggeration, auto_exaggeration, auto_k, bar_length, nice_floor

# The round factors a drawing may use: 1, 1.5, 2, 2.5, 3, 4, 5, 6, 8 times a power of ten
# (common practice for drawing scales and chart steps, no source). Written out here, not taken
# from the module, and enumerated rather than computed through a logarithm.
MANTISSAS = (1.0, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0)
SERIES = sorted(m * 10.0**e for e in range(0, 9) for m in MANTISSAS)


def _largest_step_at_most(x: float) -> float:
    """Independent reference: scan the written-out series (at least 1)."""
    return max([s for s in SERIES if s <= x * (1 + 1e-12)] or [1.0])


def _next_step(k: float) -> float:
    return min(s for s in SERIES if s > k * (1 + 1e-12))


def _perp(t, material=Material.MMC):
    return Tolerance(Characteristic.PERPENDICULARITY, t, material=material, datums=("A",))


# ------------------------------------------------------------------------------ the series


def test_series_is_the_written_one():
    assert sorted(NICE) == list(MANTISSAS)


@pytest.mark.parametrize("e", range(0, 7))
def test_nice_floor_over_decades(e):
    # every step of every decade maps to itself; just below a step, to the step before it
    steps = [m * 10.0**e for m in MANTISSAS]
    for i, s in enumerate(steps):
        assert nice_floor(s) == pytest.approx(s, rel=1e-15)
        below = s * (1 - 1e-6)
        expect = steps[i - 1] if i > 0 else (10.0 ** (e - 1) * 8.0 if e > 0 else 1.0)
        assert nice_floor(below) == pytest.approx(expect, rel=1e-15)
    # the last step of the decade holds up to the next power of ten
    assert nice_floor(9.999 * 10.0**e) == pytest.approx(8.0 * 10.0**e)


def test_nice_floor_is_at_least_one_and_forgives_rounding_error():
    for x in (-5.0, 0.0, 1e-9, 0.5, 1.0):
        assert nice_floor(x) == 1.0
    # the fill ratio 0.4 * 0.7 / 0.014 is 20 by hand, 19.999999999999996 in binary floating
    # point: still 20
    assert 0.4 * 0.7 / 0.014 < 20.0
    assert nice_floor(0.4 * 0.7 / 0.014) == 20.0


@settings(max_examples=300, deadline=None)
@given(x=st.floats(1.0, 1e8, allow_nan=False))
def test_nice_floor_is_the_largest_step_not_above(x):
    k = nice_floor(x)
    assert k == pytest.approx(_largest_step_at_most(x), rel=1e-15)
    assert k <= x * (1 + 1e-12)
    assert _next_step(k) > x


@settings(max_examples=200, deadline=None)
@given(x=st.floats(0.0, 1e7, allow_nan=False), y=st.floats(0.0, 1e7, allow_nan=False))
def test_nice_floor_is_monotonic(x, y):
    lo, hi = sorted((x, y))
    assert nice_floor(lo) <= nice_floor(hi)


# --------------------------------------------------------------------------- 2D: fill rule


@settings(max_examples=300, deadline=None)
@given(spread=st.floats(1e-6, 10.0), r_disp=st.floats(1e-3, 100.0), fill=st.floats(0.05, 0.9))
def test_auto_k_never_exceeds_the_fill_rule_and_is_the_largest_step(spread, r_disp, fill):
    k = auto_k(spread, r_disp, fill)
    assert k >= 1.0
    if k > 1.0:  # k = 1 is true scale, allowed even where the deviations are large
        assert k * spread <= fill * r_disp * (1 + 1e-12)
    assert _next_step(k) * spread > fill * r_disp  # the next round step would break the rule


def test_auto_k_hand_values():
    # 0.4 * 3.000 / 0.015 = 80 exactly on a step; a little more spread and it drops to 60
    assert auto_k(0.015, 3.0) == 80.0
    assert auto_k(0.01502, 3.0) == 60.0
    # nothing to exaggerate: true scale
    assert auto_k(0.0, 3.0) == 1.0 and auto_k(0.01, 0.0) == 1.0


# ------------------------------------------------------------------- 2D: display mapping

_k = st.floats(1.0, 500.0)
_r0 = st.floats(0.1, 50.0)


@settings(max_examples=200, deadline=None)
@given(k=_k, r0=_r0, shorten=st.floats(0.2, 1.0), dr=st.floats(-0.05, 0.05), x=st.floats(-0.5, 0.5))
def test_radial_and_lateral_round_trip(k, r0, shorten, dr, x):
    ex = Exaggeration(k, r0, r0 * shorten)
    r = r0 + dr * r0
    assert float(ex.unradial(ex.radial(r))) == pytest.approx(r, rel=1e-12, abs=1e-12 * r0)
    assert float(ex.unlateral(ex.lateral(x))) == pytest.approx(x, rel=1e-12, abs=1e-15)
    # the definition, by hand: r_disp + k (r - r0), and k x
    assert float(ex.radial(r)) == pytest.approx(r0 * shorten + k * (r - r0), rel=1e-12, abs=1e-12 * r0)
    assert float(ex.lateral(x)) == pytest.approx(k * x, rel=1e-15, abs=1e-300)


@settings(max_examples=200, deadline=None)
@given(k=_k, r0=_r0, rel=st.lists(st.floats(0.9, 1.1), min_size=1, max_size=8),
       ang=st.floats(0.0, 2 * math.pi))
def test_map_polar_round_trip_keeps_direction(k, r0, rel, ang):
    ex = Exaggeration(k, r0, r0)
    r = np.array(rel) * r0
    r = r[ex.radial(r) > 1e-9 * r0]  # a point drawn at a positive radius (else it folds over)
    if r.size == 0:
        return
    xy = np.column_stack((r * math.cos(ang), r * math.sin(ang)))
    mapped = ex.map_polar(xy)
    np.testing.assert_allclose(np.hypot(mapped[:, 0], mapped[:, 1]), ex.radial(r), rtol=1e-12)
    unit = mapped / np.hypot(mapped[:, 0], mapped[:, 1])[:, None]  # the direction is kept
    np.testing.assert_allclose(unit, np.tile([math.cos(ang), math.sin(ang)], (len(r), 1)), atol=1e-12)
    np.testing.assert_allclose(ex.unmap_polar(mapped), xy, rtol=1e-9, atol=1e-12 * r0)


def test_map_polar_leaves_the_axis_point_on_the_axis():
    mapped = Exaggeration(50.0, 3.0, 3.0).map_polar([[0.0, 0.0]])
    assert np.all(mapped == 0.0)


def test_wall_moves_with_the_axis():
    # a wall at half-width w beside an axis at lateral s: k s +/- (r_disp + k (w - r0)), by hand
    ex = Exaggeration(20.0, 4.0, 2.5)
    s, w = 0.01, 4.003
    for side in (-1, 1):
        assert float(ex.wall(s, w, side)) == pytest.approx(20.0 * s + side * (2.5 + 20.0 * (w - 4.0)), rel=1e-12)


def test_label_states_k_and_a_shortened_diameter():
    full = Exaggeration(60.0, 3.0, 3.0)
    short = Exaggeration(40.0, 20.0, 4.4)
    assert not full.shortened and short.shortened
    assert full.label(Units.MM) == "radial deviations ×60 about Ø6.000; lengths and dimension texts true"
    assert "not to scale" not in full.label(Units.MM)
    # the common sentence first, the view's own clause after it
    assert short.label(Units.MM) == short.text(Units.MM) + "; diameter shortened, not to scale"
    assert short.text(Units.MM) == "radial deviations ×40 about Ø40.000; lengths and dimension texts true"
    assert Exaggeration(1.5, 0.125, 0.125).label(Units.IN).startswith("radial deviations ×1.5 about Ø0.2500")
    assert Exaggeration(1.0, 3.0, 3.0).text(Units.MM).startswith("true scale: radial deviations ×1")


@pytest.mark.parametrize("k, room, expect", [(50.0, 1.0, 0.02), (60.0, 0.75, 0.01), (40.0, 0.75, 0.01),
                                             (8.0, 1.0, 0.1), (1.0, 0.7, 0.5), (300.0, 0.75, 0.002)])
def test_bar_length_is_the_largest_1_2_5_step_in_the_room(k, room, expect):
    # room / k, rounded down to 1, 2 or 5 x 10^n, by hand: 1.0 / 50 = 0.02; 0.75 / 60 = 0.0125 -> 0.01;
    # 0.75 / 40 = 0.01875 -> 0.01; 1 / 8 = 0.125 -> 0.1; 0.7 -> 0.5; 0.75 / 300 = 0.0025 -> 0.002
    assert bar_length(k, room) == pytest.approx(expect, rel=1e-12)
    assert k * bar_length(k, room) <= room * (1 + 1e-12)


# ----------------------------------------------------------------- 3D: from the scene alone


def _res(*features, mates=()):
    return analyse_scene(Scene("t", Units.MM, features=tuple(features), mates=tuple(mates)))


def test_auto_exaggeration_of_a_hand_computed_mate():
    # hole 8.000-8.015, zone 0.015 at MMC; pin 7.965-7.975, zone 0.005 at MMC (invented here).
    # Reference D = hole MMC = 8.000; largest zone at MMC t = 0.015 (ASME Y14.5 bonus: zero at
    # MMC, from memory); target k = 0.10 D / t = 0.800 / 0.015 = 53.3.
    # Cap: the smallest diameter a drawn boundary can have is the smaller limit less the largest
    # tolerance allowed (t + size tolerance at LMC): hole 8.000 - 0.030 = 7.970, pin
    # 7.965 - 0.015 = 7.950; r_min = 3.975, R0 = 4.000, cap = (2/3) 4.000 / 0.025 = 106.7.
    # Room (the 2D views at any state in the range): the pin at LMC 7.965 with 0.015 allowed
    # reaches 7.965 / 2 - 0.015 / 2 = 3.975, 0.025 inside R0; the hole at LMC 8.015 with 0.030
    # reaches 4.0075 + 0.015 = 4.0225 (+3e-6 sec term), 0.0225 outside: 0.4 * 4.000 / 0.025 = 64.
    # k = round step at most min(53.3, 106.7, 64): 50.
    hole = Feature("h", Kind.HOLE, (8.000, 8.015), 12.0, tolerance=_perp(0.015))
    pin = Feature("p", Kind.PIN, (7.965, 7.975), 12.0, tolerance=_perp(0.005))
    res = _res(hole, pin, mates=(Mate("h", "p"),))
    assert auto_exaggeration(res, mate_index=0) == 50.0
    # the pin alone is its own reference: D = 7.975, t = 0.005: 0.7975 / 0.005 = 159.5;
    # cap (2/3) 3.9875 / ((7.975 - 7.950) / 2) = 212.7; room: at LMC its side reaches 3.975,
    # 0.0125 inside R0 = 3.9875, 0.4 * 3.9875 / 0.0125 = 127.6; round step: 100
    assert auto_exaggeration(res, feature_id="p") == 100.0


def test_auto_exaggeration_room_over_the_whole_range_keeps_the_smallest_radius_visible():
    # a hole with a wide size tolerance: 10.000-10.100, zone 0.010 at MMC (invented here).
    # target 0.10 * 10.000 / 0.010 = 100; the boundary at 10.000 - (0.010 + 0.100) = 9.890
    # gives R0 - r_min = 0.055, cap = (2/3) 5.000 / 0.055 = 60.6. But at LMC 10.100 the zone is
    # 0.110 (ASME bonus, from memory) and the wall, d / (2 cos theta) with tan theta = 0.110 / 10,
    # plus half the zone, reaches 5.05031 + 0.055 = 5.10531 (a 720-gon vertex up to 2.4e-5 more):
    # room 0.4 * 5.000 / 0.10533 = 18.99: k = 15. The smallest radius is drawn at
    # 5.000 - 15 * 0.055 = 4.175 >= 5.000 / 3.
    hole = Feature("h", Kind.HOLE, (10.000, 10.100), 10.0, tolerance=_perp(0.010))
    k = auto_exaggeration(_res(hole), feature_id="h")
    assert k == 15.0
    assert 5.000 - k * 0.055 >= 5.000 / 3


def test_auto_exaggeration_without_a_zone_uses_the_size_tolerance():
    # no geometric tolerance: the size tolerance 0.012 is what is drawn; 0.10 * 6.000 / 0.012
    # = 50, no boundary below the smaller limit (no cap); room 0.4 * 3.000 / 0.006 = 200: 50
    hole = Feature("h", Kind.HOLE, (6.000, 6.012), 8.0)
    assert auto_exaggeration(_res(hole), feature_id="h") == 50.0
    assert auto_exaggeration(_res()) == 1.0  # nothing toleranced to scale


@settings(max_examples=60, deadline=None)
@given(d=st.floats(1.0, 50.0), ts=st.floats(0.001, 0.5), t=st.floats(0.001, 0.5), kind=st.sampled_from(Kind))
def test_auto_exaggeration_invariants(d, ts, t, kind):
    f = Feature("f", kind, (d, d + ts), 10.0, tolerance=_perp(t))
    k = auto_exaggeration(_res(f), feature_id="f")
    D = f.mmc
    assert k in SERIES or k == 1.0
    assert k <= max(1.0, 0.10 * D / t * (1 + 1e-12))  # never beyond the target
    # smallest drawn radius: R0 - k (R0 - r_min) with r_min = (smaller limit - t - ts) / 2
    R0, r_min = D / 2, (d - t - ts) / 2
    if k > 1.0 and r_min < R0:
        assert R0 - k * (R0 - r_min) >= R0 / 3 * (1 - 1e-9)
    # the room at both limits: a wall of diameter s with zone z (ASME bonus |s - MMC|) lies
    # between s / 2 - z / 2 and s / 2 + z / 2 from the basic axis (at least; a tilt adds more)
    for s in (d, d + ts):
        z = t + abs(s - D)
        dev = max(abs(s / 2 + z / 2 - R0), abs(s / 2 - z / 2 - R0))
        assert k == 1.0 or k * dev <= 0.4 * R0 * (1 + 1e-9)
