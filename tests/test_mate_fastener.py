"""Worst-case fit of a mate and fastener position tolerances."""

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom import (
    Characteristic,
    Fastener,
    Feature,
    FeatureState,
    Kind,
    Material,
    Tolerance,
    analyse_fastener,
    analyse_feature,
    analyse_mate,
    clearance_at,
    required_hole_fixed,
)


def hole(lo, hi, t, material="MMC"):
    tol = Tolerance(Characteristic.POSITION, t, material=Material(material), datums=("A", "B"))
    return Feature("h", Kind.HOLE, (lo, hi), 10.0, tolerance=tol)


def pin(lo, hi, t, material="MMC"):
    tol = Tolerance(Characteristic.PERPENDICULARITY, t, material=Material(material), datums=("A",))
    return Feature("p", Kind.PIN, (lo, hi), 10.0, tolerance=tol)


def test_mate_worst_case_and_size_only_fits():
    # Common practice, no source: worst-case clearance = hole VC - pin VC when both are at MMC;
    # ISO 286-1 (from memory): size-only minimum clearance = hole MMC - pin MMC,
    # maximum clearance = hole LMC - pin LMC.
    m = analyse_mate(analyse_feature(hole(6.000, 6.012, 0.030)), analyse_feature(pin(5.980, 5.990, 0.010)))
    assert m.clearance_min == pytest.approx(5.970 - 6.000)
    assert m.clearance_min_size == pytest.approx(0.010)
    assert m.clearance_max == pytest.approx(0.032)
    assert not m.assembles and "INTERFERES" in m.verdict


def test_line_to_line_fit_assembles():
    # Common practice, no source: zero worst-case clearance is a line-to-line fit, it assembles.
    m = analyse_mate(analyse_feature(hole(8.000, 8.015, 0.015)), analyse_feature(pin(7.970, 7.975, 0.010)))
    assert m.clearance_min == pytest.approx(0.0, abs=1e-12)
    assert m.assembles and "line-to-line" in m.verdict


def test_lmc_hole_mate_uses_resultant_condition():
    # ASME Y14.5-2018 (from memory): an LMC-modified hole's inner boundary is its resultant
    # condition MMC - t - bonus_max; the pin sees that.
    h = hole(10.0, 10.1, 0.05, "LMC")
    m = analyse_mate(analyse_feature(h), analyse_feature(pin(9.7, 9.8, 0.02)))
    assert m.hole_boundary.value == pytest.approx(10.0 - 0.05 - 0.1)
    # against the pin's VC = MMC + t = 9.8 + 0.02 = 9.82 (ASME Y14.5-2018, from memory)
    assert m.clearance_min == pytest.approx(9.85 - 9.82)


def test_what_if_clearance_at_mmc_equals_worst_case():
    h, p = hole(8.0, 8.015, 0.015), pin(7.965, 7.975, 0.005)
    m = analyse_mate(analyse_feature(h), analyse_feature(p))
    # At any produced sizes with the full tolerance allowed used, an MMC mate sits at its
    # worst case (VC constant: ASME Y14.5-2018, from memory).
    for dh, dp in [(8.0, 7.975), (8.015, 7.965), (8.007, 7.97)]:
        assert clearance_at(h, p, FeatureState(dh), FeatureState(dp)) == pytest.approx(m.clearance_min)
    # Using none of the tolerance gives the size-only clearance at those sizes: 8.000 - 7.975
    # (ISO 286-1 clearance = hole size - shaft size, from memory).
    assert clearance_at(h, p, FeatureState(8.0, 0.0), FeatureState(7.975, 0.0)) == pytest.approx(0.025)


@settings(max_examples=200)
@given(t_h=st.floats(0, 0.2), dt_h=st.floats(0, 0.2), t_p=st.floats(0, 0.2), dt_p=st.floats(0, 0.2),
       mh=st.sampled_from(["MMC", "LMC", "RFS"]), mp=st.sampled_from(["MMC", "LMC", "RFS"]))
def test_clearance_never_grows_as_a_tolerance_grows(t_h, dt_h, t_p, dt_p, mh, mp):
    # Invariant (common practice, no source): more geometric tolerance can only tighten the fit.
    t_h, t_p = t_h + 1e-4, t_p + 1e-4  # RFS needs a tolerance > 0

    def cmin(a, b):
        return analyse_mate(analyse_feature(hole(10.0, 10.05, a, mh)), analyse_feature(pin(9.9, 9.95, b, mp))).clearance_min

    base = cmin(t_h, t_p)
    assert cmin(t_h + dt_h, t_p) <= base + 1e-12
    assert cmin(t_h, t_p + dt_p) <= base + 1e-12


# ---------------------------------------------------------------- fasteners


def test_fixed_fastener_without_projected_zone_check_value():
    # ASME Y14.5 fastener appendix formula H = F + T1 + T2 (1 + 2P/D) (from memory); check value:
    # F 6.35, T1 0.2, T2 0.4, P 12, D 8 -> H = 8.15 mm (arithmetic ours).
    assert required_hole_fixed(6.35, 0.2, 0.4, 12.0, 8.0) == pytest.approx(8.15)


def test_fixed_fastener_equal_tolerances_satisfy_the_appendix_formula():
    fa = Fastener("s", "fixed", fastener=6.35, hole=8.15, thread_depth=8.0, projection=12.0)
    r = analyse_fastener(fa)
    # Projected zone on the threaded part: T = (H - F)/2 (ASME Y14.5 fastener appendix, from memory).
    assert r.position_tolerance.value == pytest.approx(0.9)
    # Equal T1 = T2 = T without projection must give back H through the appendix formula.
    t = r.position_tolerance_unprojected.value
    assert required_hole_fixed(6.35, t, t, 12.0, 8.0) == pytest.approx(8.15)
    assert t == pytest.approx(1.8 / (2 + 2 * 12 / 8))


def test_floating_fastener():
    # ASME Y14.5 fastener appendix, floating fastener T = H - F (from memory):
    # M10 screw (F = 10.0) in 11.0 clearance holes -> T = 1.0 on both parts.
    r = analyse_fastener(Fastener("s", "floating", fastener=10.0, hole=11.0))
    assert r.position_tolerance.value == pytest.approx(1.0)
    assert r.position_tolerance_unprojected is None


def test_projected_hole_mate_uses_boundary_over_the_engaged_length():
    # ASME Y14.5-2009 §7.4.1 projected zone and the fastener appendix geometry (from memory):
    # the axis may leave a zone projected over P by t L / P inside the part (orientation), or
    # t (1 + 2L/P) across the true position (position). Arithmetic ours.
    tol = Tolerance(Characteristic.PERPENDICULARITY, 0.020, material=Material.MMC, datums=("A",), projected=12.0)
    h = Feature("h", Kind.HOLE, (10.0, 10.015), 15.0, tolerance=tol)
    p = Feature("p", Kind.PIN, (9.985, 9.995), 15.0, tolerance=Tolerance(
        Characteristic.POSITION, 0.01, material=Material.MMC, datums=("A", "B")))
    m = analyse_mate(analyse_feature(h), analyse_feature(p))
    assert m.hole_boundary.value == pytest.approx(10.0 - 0.020 * 15 / 12)
    assert m.clearance_min == pytest.approx(9.975 - 10.005)
    assert any("projected zone" in a for a in m.assumptions)
    assert any("datum feature B" in a for a in m.assumptions)
    pos = Feature("h", Kind.HOLE, (10.0, 10.015), 15.0, tolerance=Tolerance(
        Characteristic.POSITION, 0.020, material=Material.MMC, datums=("A", "B"), projected=12.0))
    m2 = analyse_mate(analyse_feature(pos), analyse_feature(p))
    assert m2.hole_boundary.value == pytest.approx(10.0 - 0.020 * (1 + 2 * 15 / 12))


def test_mate_with_untoleranced_pin_states_its_assumption():
    # ASME Y14.5-2018 Rule #1 (from memory) bounds form at MMC but not orientation to A.
    p = Feature("p", Kind.PIN, (9.9, 9.95), 10.0)
    m = analyse_mate(analyse_feature(hole(10.0, 10.05, 0.02)), analyse_feature(p))
    assert m.pin_boundary.value == 9.95
    assert any("no orientation or location control" in a for a in m.assumptions)
