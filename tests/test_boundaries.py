"""Sizes, bonus, virtual/resultant condition and boundaries against outside check values."""

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom import (
    Characteristic,
    Feature,
    FeatureState,
    Kind,
    Material,
    SizeOutOfLimits,
    Standard,
    Tolerance,
    Zone,
    analyse_feature,
    bonus,
    effective_size,
    resultant_condition,
    tolerance_allowed,
    virtual_condition,
    worst_case_boundaries,
)


def feat(kind, lo, hi, value=None, material="MMC", ch="perpendicularity", length=10.0, zone="diameter", **kw):
    tol = None
    if value is not None:
        datums = () if ch == "straightness" else ("A",)
        tol = Tolerance(Characteristic(ch), value, Zone(zone), Material(material), datums, kw.pop("projected", None))
    return Feature("f", Kind(kind), (lo, hi), length, tolerance=tol, **kw)


# ---------------------------------------------------------------- fixed check values


def test_inch_hole_perpendicularity_common_practice():
    # Common practice, no source: hole 1.120-1.124 in, perpendicularity dia .002 at MMC:
    # virtual condition 1.118; produced at 1.124 the bonus is .004 and the tolerance allowed .006.
    h = feat("hole", 1.120, 1.124, 0.002, "MMC")
    assert virtual_condition(h) == pytest.approx(1.118, abs=1e-12)
    assert bonus(h, 1.124) == pytest.approx(0.004, abs=1e-12)
    assert tolerance_allowed(h, 1.124) == pytest.approx(0.006, abs=1e-12)


def test_metric_position_hole_common_practice():
    # Common practice, no source: hole 14.0-14.5 mm, position dia 0.2 at MMC: VC = 13.8,
    # RC = 14.5 + 0.2 + 0.5 = 15.2 (ASME Y14.5-2018 resultant condition definition, from memory).
    h = feat("hole", 14.0, 14.5, 0.2, "MMC", ch="position")
    assert virtual_condition(h) == pytest.approx(13.8)
    assert resultant_condition(h) == pytest.approx(15.2)
    assert worst_case_boundaries(h) == pytest.approx((13.8, 15.2))


@pytest.mark.parametrize(
    "kind, material, vc, rc, inner, outer",
    [
        # ASME Y14.5-2018 §1.3 definitions of virtual and resultant condition (from memory);
        # ISO 2692:2021 MMVS = MMS -/+ t, LMVS = LMS +/- t (from memory). Feature 10.0-10.2, t 0.1.
        ("hole", "MMC", 9.9, 10.5, 9.9, 10.5),  # VC = 10.0 - 0.1; RC = 10.2 + 0.1 + 0.2
        ("pin", "MMC", 10.3, 9.7, 9.7, 10.3),  # VC = 10.2 + 0.1; RC = 10.0 - 0.1 - 0.2
        ("hole", "LMC", 10.3, 9.7, 9.7, 10.3),  # VC = 10.2 + 0.1; RC = 10.0 - 0.1 - 0.2
        ("pin", "LMC", 9.9, 10.5, 9.9, 10.5),  # VC = 10.0 - 0.1; RC = 10.2 + 0.1 + 0.2
        # RFS (ASME Y14.5-2009 §2.11.3, from memory): no VC; IB/OB = MMC/LMC -/+ t
        ("hole", "RFS", None, None, 9.9, 10.3),
        ("pin", "RFS", None, None, 9.9, 10.3),
    ],
)
def test_boundary_table(kind, material, vc, rc, inner, outer):
    f = feat(kind, 10.0, 10.2, 0.1, material)
    got_vc, got_rc = virtual_condition(f), resultant_condition(f)
    assert (got_vc is None) == (vc is None) and (got_rc is None) == (rc is None)
    if vc is not None:
        assert got_vc == pytest.approx(vc) and got_rc == pytest.approx(rc)
    assert worst_case_boundaries(f) == pytest.approx((inner, outer))


def test_lmc_bonus_grows_toward_mmc():
    # ASME Y14.5-2018 LMC modifier (from memory): bonus is the departure from LMC.
    p = feat("pin", 20.0, 20.1, 0.05, "LMC", ch="position")
    assert bonus(p, 20.0) == 0.0  # at LMC
    assert bonus(p, 20.1) == pytest.approx(0.1)  # at MMC
    assert tolerance_allowed(p, 20.06) == pytest.approx(0.05 + 0.06)


def test_rfs_has_no_bonus():
    # ASME Y14.5-2018 Rule #2 (from memory): RFS applies where no modifier is given; no bonus.
    h = feat("hole", 5.0, 5.1, 0.02, "RFS")
    assert bonus(h, 5.1) == 0.0 and tolerance_allowed(h, 5.1) == 0.02
    r = analyse_feature(h)
    assert r.virtual_condition.value is None and r.resultant_condition.value is None


def test_zero_tolerance_at_mmc():
    # ASME Y14.5-2018 zero tolerance at MMC (from memory): VC = MMC, all tolerance is bonus.
    h = feat("hole", 8.0, 8.02, 0.0, "MMC", ch="position")
    assert virtual_condition(h) == 8.0
    assert tolerance_allowed(h, 8.02) == pytest.approx(0.02)


def test_straightness_pin_virtual_condition():
    # ASME Y14.5-2018 straightness of a derived median line at MMC (from memory): VC = MMC + t.
    p = feat("pin", 6.0, 6.05, 0.03, "MMC", ch="straightness")
    assert virtual_condition(p) == pytest.approx(6.08)
    assert analyse_feature(p).tilt_max_deg is None  # straightness bends the axis, it does not tilt it


def test_no_tolerance_envelope_depends_on_standard():
    # ASME Y14.5-2018 Rule #1 (from memory): perfect form at MMC bounds a hole at its MMC.
    # ISO 8015:2011 independency (from memory): no envelope unless (E) is indicated.
    h = feat("hole", 10.0, 10.1)
    assert worst_case_boundaries(h, Standard.ASME) == (10.0, None)
    assert worst_case_boundaries(h, Standard.ISO) == (None, None)
    assert worst_case_boundaries(h.with_(envelope=True), Standard.ISO) == (10.0, None)


def test_tilt_angle():
    # Geometry: an axis crossing a zone of diameter t over length L tilts by atan(t / L).
    h = feat("hole", 10.0, 10.015, 0.02, "MMC", length=15.0)
    r = analyse_feature(h)
    # the largest zone is t + bonus at LMC = 0.02 + (10.015 - 10.000) = 0.035 (ASME Y14.5 bonus, from memory)
    assert r.tilt_max_deg == pytest.approx(math.degrees(math.atan(0.035 / 15.0)))


def test_size_outside_limits_is_refused():
    h = feat("hole", 10.0, 10.015, 0.02)
    with pytest.raises(SizeOutOfLimits, match="outside its limits"):
        bonus(h, 10.02)


# ---------------------------------------------------------------- invariants (hypothesis)

sizes = st.floats(min_value=0.5, max_value=200.0)
fracs = st.floats(min_value=0.0, max_value=1.0)
tols = st.floats(min_value=0.0, max_value=0.5)


@settings(max_examples=200)
@given(lo=sizes, span=st.floats(0.001, 1.0), t=tols, frac=fracs, kind=st.sampled_from(["hole", "pin"]))
def test_mmc_virtual_condition_does_not_depend_on_produced_size(lo, span, t, frac, kind):
    # ASME Y14.5-2018 (from memory): at MMC the VC is a constant boundary; the bonus exactly
    # offsets the departure from MMC.
    f = feat(kind, lo, lo + span, t, "MMC")
    d = lo + frac * span
    assert effective_size(f, FeatureState(d)) == pytest.approx(virtual_condition(f), abs=1e-9)


@settings(max_examples=200)
@given(lo=sizes, span=st.floats(0.001, 1.0), t=tols, frac=fracs, kind=st.sampled_from(["hole", "pin"]))
def test_lmc_virtual_condition_does_not_depend_on_produced_size(lo, span, t, frac, kind):
    # The LMC counterpart: d +/- tolerance allowed stays at LMC +/- t on the least-material side.
    f = feat(kind, lo, lo + span, t, "LMC")
    d = lo + frac * span
    s = 1 if kind == "hole" else -1
    assert d + s * tolerance_allowed(f, d) == pytest.approx(virtual_condition(f), abs=1e-9)


@settings(max_examples=200)
@given(lo=sizes, span=st.floats(0.001, 1.0), t=tols, kind=st.sampled_from(["hole", "pin"]),
       material=st.sampled_from(["MMC", "LMC", "RFS"]))
def test_boundaries_enclose_the_size_range(lo, span, t, kind, material):
    # Geometry: the worst-case boundaries lie outside the size limits by at least the tolerance.
    if material == "RFS" and t == 0:
        t = 0.001
    f = feat(kind, lo, lo + span, t, material)
    inner, outer = worst_case_boundaries(f)
    assert inner <= lo - t + 1e-9 and outer >= lo + span + t - 1e-9
    assert 0.0 <= bonus(f, lo + span / 3) <= span + 1e-12


def test_iso_rfs_without_envelope_has_no_boundary():
    # ISO 8015:2011 independency with ISO 14405-1 two-point sizes (from memory): with no modifier
    # and no (E), the size does not limit form, so no worst-case boundary exists.
    h = feat("hole", 10.0, 10.1, 0.05, "RFS")
    assert worst_case_boundaries(h, Standard.ISO) == (None, None)
    # with (E) only the MMS side is bounded (ISO 14405-1 envelope: perfect form at MMS, from
    # memory); the LMS side stays unbounded under independency (ISO 8015)
    assert worst_case_boundaries(h.with_(envelope=True), Standard.ISO) == (pytest.approx(9.95), None)
    # ISO 2692 (from memory): the MMR defines the MMVC as a boundary even under independency.
    assert worst_case_boundaries(feat("hole", 10.0, 10.1, 0.05, "MMC"), Standard.ISO)[0] == pytest.approx(9.95)


def test_straightness_overrides_rule_one_but_explicit_envelope_wins():
    # ASME Y14.5-2018 (from memory): straightness of the derived median line overrides Rule #1;
    # with an explicit envelope the MMC envelope is the tighter outer boundary.
    p = feat("pin", 6.0, 6.05, 0.03, "MMC", ch="straightness")
    assert not analyse_feature(p, Standard.ASME).envelope
    assert worst_case_boundaries(p)[1] == pytest.approx(6.08)
    assert worst_case_boundaries(p.with_(envelope=True), Standard.ISO)[1] == pytest.approx(6.05)
