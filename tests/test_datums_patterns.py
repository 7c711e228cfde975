"""Datum reference frames, datum features at MMB with datum shift, patterns judged the right way
(best fit within the shift) and the wrong way (shift as per-hole bonus), gauges and the
worst-case mating of two patterns (issue 13, pure-computation core)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from shapely.geometry import Point

from geom.analysis import analyse_fastener
from geom.datums import (
    DatumFrame,
    DatumRef,
    datum_shift,
    frame,
    lmb,
    mmb,
    shift_of,
    simulators,
)
from geom.model import Characteristic, Fastener, Feature, Kind, Material, Standard, Tolerance, Units
from geom.patterns import (
    Pattern,
    best_fit,
    bolt_circle,
    default_requirement,
    gauge,
    mate_patterns,
    members,
    pattern_conforms,
    wrong_way,
)

MM = Units.MM


def pos(t, datums=("A", "B"), material=Material.MMC, projected=None):
    return Tolerance(Characteristic.POSITION, t, material=material, datums=datums, projected=projected)


BORE = Feature("pilot bore", Kind.HOLE, (40.0, 40.1), 8.0)
BOSS = Feature("pilot boss", Kind.PIN, (39.9, 39.95), 6.0)


def hole_pattern(t=0.1, bore=BORE, boundary="MMB", locs=((30.0, 0.0), (-30.0, 0.0)), tertiary=None,
                 requirement="simultaneous", limits=(6.6, 6.8)):
    refs = [DatumRef("A"), DatumRef("B", bore, boundary)] + ([tertiary] if tertiary else [])
    fr = frame(*refs)
    return Pattern("holes", Feature("h", Kind.HOLE, limits, 8.0, tolerance=pos(t, fr.letters)), locs, fr,
                   requirement)


# ---------------------------------------------------------------- datum features: MMB, LMB, shift


def test_mmb_is_mmc_without_a_tolerance_to_higher_datums():
    # ASME Y14.5-2009 4.11.4 (from memory): no tolerance relative to higher datums -> MMB = MMC
    assert mmb(BORE).value == 40.0
    assert mmb(BOSS).value == 39.95
    assert lmb(BORE).value == 40.1 and lmb(BOSS).value == 39.9  # LMB = LMC likewise


def test_mmb_is_the_virtual_condition_relative_to_higher_datums():
    # ASME Y14.5-2009 4.11.4 / 2018 7.11.4 (from memory): MMB = VC relative to the higher datums
    perp = Tolerance(Characteristic.PERPENDICULARITY, 0.02, material=Material.MMC, datums=("A",))
    bore = BORE.with_(tolerance=perp)
    assert mmb(bore, higher=("A",)).value == pytest.approx(40.0 - 0.02)  # hole: MMC - t
    boss = BOSS.with_(tolerance=perp)
    assert mmb(boss, higher=("A",)).value == pytest.approx(39.95 + 0.02)  # pin: MMC + t
    # RFS tolerance: the same collective boundary MMC -/+ t (from memory, same clause)
    rfs = Tolerance(Characteristic.PERPENDICULARITY, 0.02, datums=("A",))
    assert mmb(BORE.with_(tolerance=rfs), ("A",)).value == pytest.approx(39.98)
    # a tolerance to a lower-precedence datum does not count (same clause, from memory)
    to_c = pos(0.05, ("A", "C"))
    assert mmb(BOSS.with_(tolerance=to_c), higher=("A",)).value == 39.95
    # LMB = LMC + t@LMC for a hole (t@LMC = t + size tolerance under MMC; geom.boundaries)
    assert lmb(bore, ("A",)).value == pytest.approx(40.1 + 0.02 + 0.1)


def test_datum_shift_values_and_formula():
    # datum shift = actual mating size - MMB (hole), MMB - size (pin); radial = half
    # (ASME Y14.5-2009 4.11.6 datum feature shift, from memory)
    s = datum_shift(BORE, 40.06, "MMB")
    assert s.diametral.value == pytest.approx(0.06) and s.radial.value == pytest.approx(0.03)
    assert s.diametral.formula(MM) == "datum shift = size - MMB = 40.060 - 40.000 = 0.060"
    b = datum_shift(BOSS, 39.92, "MMB")
    assert b.diametral.value == pytest.approx(0.03)  # 39.95 - 39.92, independent arithmetic
    assert datum_shift(BORE, 40.06, "RMB").diametral.value == 0.0  # RMB: simulator contacts it
    # LMB: departure from LMB (hole: LMB - size), 40.1 - 40.06
    assert datum_shift(BORE, 40.06, "LMB").diametral.value == pytest.approx(0.04)
    # ISO words (ISO 2692 MMR on a datum, from memory): MMVS, mobility
    iso = s.diametral.formula(MM, Standard.ISO)
    assert iso.startswith("datum mobility = size - MMVS")


@given(st.floats(0.0, 1.0), st.sampled_from(["MMB", "LMB", "RMB"]), st.sampled_from([BORE, BOSS]))
def test_datum_shift_never_negative(u, boundary, f):
    # definition: a departure is never negative (brief; ASME datum shift, from memory)
    size = f.limits[0] + u * (f.limits[1] - f.limits[0])
    s = datum_shift(f, size, boundary)
    assert s.diametral.value >= 0.0 and s.radial.value == pytest.approx(s.diametral.value / 2)


def test_bad_datum_input_is_refused():
    with pytest.raises(ValueError, match="plane has no size"):
        DatumRef("B", None, "MMB")
    with pytest.raises(ValueError, match="plane has no size"):
        datum_shift(None, 40.0, "MMB")
    with pytest.raises(ValueError, match="boundary must be"):
        datum_shift(BORE, 40.0, "MMC")
    with pytest.raises(ValueError, match="outside its limits"):
        datum_shift(BORE, 40.2, "MMB")
    with pytest.raises(ValueError, match="primary datum"):
        frame(DatumRef("A", BORE))
    with pytest.raises(ValueError, match="stands secondary"):
        DatumFrame((DatumRef("A"), DatumRef("B", BORE, "MMB", "tertiary")))
    with pytest.raises(ValueError, match="repeat"):
        frame(DatumRef("A"), DatumRef("A"))
    with pytest.raises(ValueError, match="produced size is needed"):
        shift_of(frame(DatumRef("A"), DatumRef("B", BORE, "MMB")), "B", None)


def test_frame_rotation_freedom():
    # degrees of freedom (ASME Y14.5 / ISO 5459 datum systems, common practice): a secondary datum
    # feature of size fixes the centre; a tertiary plane or feature fixes the rotation about it
    assert frame(DatumRef("A"), DatumRef("B", BORE, "MMB")).rotation == "free"
    assert frame(DatumRef("A"), DatumRef("B", BORE, "MMB"), DatumRef("C")).rotation == "fixed"
    slot = Feature("clock hole", Kind.HOLE, (5.0, 5.05), 8.0, at=(25.0, 0.0))
    assert frame(DatumRef("A"), DatumRef("B", BORE, "MMB"), DatumRef("C", slot, "MMB")).rotation == "limited"
    sims = simulators(frame(DatumRef("A"), DatumRef("B", BORE, "MMB")))
    assert [s.kind for s in sims] == ["plane", "pin"] and sims[1].diameter.value == 40.0  # MMB


# ---------------------------------------------------------------- pattern basics


def test_bolt_circle_against_roots_of_unity():
    # independent computation: points r * exp(i(a0 + 2 pi k / n))
    pts = bolt_circle(6, 80.0, 15.0)
    z = 40.0 * np.exp(1j * (np.radians(15.0) + 2 * np.pi * np.arange(6) / 6))
    assert np.allclose(np.array(pts), np.c_[z.real, z.imag], atol=1e-12)
    with pytest.raises(ValueError):
        bolt_circle(0, 10.0)
    with pytest.raises(ValueError):
        bolt_circle(4, -1.0)


def test_members_allowed_is_t_plus_bonus():
    # ASME Y14.5 bonus: departure from MMC (hole: size - MMC); tolerance allowed = t + bonus
    p = hole_pattern(0.1)
    m = members(p, (6.6, 6.75))
    assert [round(x.allowed.value, 9) for x in m] == [0.1, 0.25]
    assert m[0].vc == pytest.approx(6.5)  # VC = MMC - t = 6.6 - 0.1


def test_pattern_validation():
    fr = frame(DatumRef("A"), DatumRef("B", BORE, "MMB"))
    f = Feature("h", Kind.HOLE, (6.6, 6.8), 8.0, tolerance=pos(0.1, ("A", "C")))
    with pytest.raises(ValueError, match="differ from the frame"):
        Pattern("p", f, ((1.0, 0.0),), fr)
    with pytest.raises(ValueError, match="does not locate"):
        Pattern("p", f.with_(tolerance=pos(0.1, ("A",))), ((1.0, 0.0),), frame(DatumRef("A")))
    p = hole_pattern()
    with pytest.raises(ValueError, match="measured"):
        pattern_conforms(p, ((30.0, 0.0),), (6.6, 6.6), 40.0)
    with pytest.raises(ValueError, match="outside its limits"):
        pattern_conforms(p, ((30.0, 0.0), (-30.0, 0.0)), (6.5, 6.6), 40.0)


def test_default_requirement():
    # ASME Y14.5-2009 4.19 simultaneous requirement by default (from memory);
    # ISO 5458:2018 independent zones unless CZ is indicated (from memory)
    assert default_requirement(Standard.ASME) == "simultaneous"
    assert default_requirement(Standard.ISO) == "separate"


# ---------------------------------------------------------------- right way vs wrong way


EXPANDED = ((30.09, 0.0), (-30.09, 0.0))  # both holes 0.09 outward: a shift cannot help both


def test_wrong_way_accepts_what_the_right_way_rejects():
    # constructed: t = 0.1 at MMC, holes at MMC (no bonus), datum bore at 40.1 (0.1 shift, MMB 40.0)
    # each hole reads 2 * 0.09 = 0.18 from its basic location (independent arithmetic)
    p = hole_pattern(0.1, tertiary=DatumRef("C"))
    right = pattern_conforms(p, EXPANDED, (6.6, 6.6), 40.1)
    wrong = wrong_way(p, EXPANDED, (6.6, 6.6), 40.1)
    assert [round(r.position, 9) for r in right.readings] == [0.18, 0.18]
    assert not right.conforms  # 0.18 > 0.1: the shift moves both holes together
    assert wrong.conforms and wrong.added == pytest.approx(0.1)  # 0.18 <= 0.1 + 0.1 each
    # separate requirement: each hole may use the shift on its own: 0.18 - 2 * 0.05 = 0.08 <= 0.1
    sep = pattern_conforms(hole_pattern(0.1, tertiary=DatumRef("C"), requirement="separate"), EXPANDED,
                           (6.6, 6.6), 40.1)
    assert sep.conforms and [round(r.position, 6) for r in sep.readings] == [0.08, 0.08]


def test_shift_moves_the_pattern_as_one_body():
    # both holes 0.09 in +x; shift of 0.05 radial brings each to 0.04 off (0.08 diametral)
    p = hole_pattern(0.1, tertiary=DatumRef("C"))
    c = pattern_conforms(p, ((30.09, 0.0), (-29.91, 0.0)), (6.6, 6.6), 40.1)
    assert c.conforms and c.shift[0] == pytest.approx(-0.05, abs=1e-7)
    assert all(r.position == pytest.approx(0.08, abs=1e-6) for r in c.readings)
    at_mmb = pattern_conforms(p, ((30.09, 0.0), (-29.91, 0.0)), (6.6, 6.6), 40.0)
    assert not at_mmb.conforms and at_mmb.shift == (0.0, 0.0)  # datum at MMB: no shift


def test_rotation_free_without_tertiary():
    # a pattern turned 0.2 deg about B: without a tertiary datum it is aligned by rotation
    p = hole_pattern(0.1, boundary="RMB", locs=bolt_circle(4, 60.0))
    th = math.radians(0.2)
    xy = [(x * math.cos(th) - y * math.sin(th), x * math.sin(th) + y * math.cos(th)) for x, y in p.locations]
    c = pattern_conforms(p, xy, (6.6,) * 4, None)
    assert c.conforms and c.rotation_deg == pytest.approx(-0.2, abs=1e-5)
    fixed = hole_pattern(0.1, boundary="RMB", locs=bolt_circle(4, 60.0), tertiary=DatumRef("C"))
    # tertiary plane: rotation fixed, each hole 2 * 30 * sin(0.1 deg) * 2 off = 0.2094 > 0.1
    assert not pattern_conforms(fixed, xy, (6.6,) * 4).conforms


def _grid_min(meas, basic, allowed, radius, rot_range, tert=None, n=41, nt=61):
    """Brute force: the least worst excess over a grid of translations in the disc and rotations."""
    m, b, a = np.asarray(meas), np.asarray(basic), np.asarray(allowed)
    g = np.linspace(-radius, radius, n) if radius > 0 else np.zeros(1)
    dx, dy = np.meshgrid(g, g)
    inside = dx ** 2 + dy ** 2 <= radius ** 2 + 1e-15
    dx, dy = dx[inside], dy[inside]
    ths = np.linspace(-rot_range, rot_range, nt) if rot_range > 0 else np.zeros(1)
    best = np.inf
    for th in ths:
        c, s = math.cos(th), math.sin(th)
        px, py = c * m[:, 0] - s * m[:, 1], s * m[:, 0] + c * m[:, 1]
        ex = 2 * np.hypot(px[None] + dx[:, None] - b[None, :, 0], py[None] + dy[:, None] - b[None, :, 1]) - a
        worst = ex.max(axis=1)
        if tert is not None:
            c3, b3, s3 = tert
            ok = np.hypot(c * c3[0] - s * c3[1] + dx - b3[0], s * c3[0] + c * c3[1] + dy - b3[1]) <= s3 + 1e-12
            worst = np.where(ok, worst, np.inf)
        best = min(best, worst.min())
    h = (2 * radius / (n - 1)) if radius > 0 else 0.0
    ht = (2 * rot_range / (nt - 1)) if rot_range > 0 else 0.0
    rmax = float(np.hypot(m[:, 0], m[:, 1]).max())
    # Lipschitz bound of the grid: the excess moves by at most 2|dd| + 2 r |dtheta|; an optimum on a
    # constraint's edge may be a whole step (not half) from the nearest feasible grid point
    return best, 2 * h * math.sqrt(2) + 2 * rmax * ht


dev = st.floats(-0.12, 0.12)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.tuples(dev, dev), min_size=3, max_size=5), st.floats(0.0, 0.08),
       st.sampled_from(["free", "fixed"]), st.floats(0.0, 90.0))
def test_best_fit_against_brute_force_grid(devs, radius, rotation, a0):
    # independent computation: a grid search over translation (disc) and rotation
    basic = bolt_circle(len(devs), 50.0, a0)
    meas = [(x + dx, y + dy) for (x, y), (dx, dy) in zip(basic, devs)]
    allowed = [0.1 + 0.02 * i for i in range(len(devs))]
    w, d, th = best_fit(meas, basic, allowed, radius, rotation)
    assert math.hypot(*d) <= radius + 1e-9
    assert rotation == "free" or th == 0.0
    g, bound = _grid_min(meas, basic, allowed, radius, 0.012 if rotation == "free" else 0.0)
    assert w <= g + 1e-7  # no worse than the best grid point (1e-7: far below any displayed digit)
    assert w >= g - bound - 1e-9  # and the grid is within its resolution of the optimum


@settings(max_examples=20, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.tuples(dev, dev), min_size=3, max_size=4), st.floats(0.0, 0.05))
def test_limited_rotation_against_brute_force_grid(devs, s3):
    # a tertiary datum feature at MMB at (25, 0): |R c3 + d - b3| <= its radial shift; the
    # secondary at RMB (radius 0) so the grid over theta covers the feasible set exactly
    # (with both shifts the feasible set can be a thin lens a grid cannot sample)
    radius = 0.0
    basic = bolt_circle(len(devs), 50.0, 30.0)
    meas = [(x + dx, y + dy) for (x, y), (dx, dy) in zip(basic, devs)]
    allowed = [0.1] * len(devs)
    tert = ((25.0, 0.0), (25.0, 0.0), s3)
    w, _, th = best_fit(meas, basic, allowed, radius, "limited", tert)
    assert 25.0 * 2 * abs(math.sin(th / 2)) <= s3 + 1e-9  # the solver's point is feasible
    g, bound = _grid_min(meas, basic, allowed, radius, (s3 + radius) / 25.0 * 1.01, tert, n=31, nt=41)
    assert w <= g + 1e-7 and w >= g - bound - 1e-9


def _part(p, shift_u, theta, devs_u, sizes_u, datum_u, datum_feature):
    """A produced part that fits its gauge, built from unit samples (see test 3 below)."""
    lo, hi = p.feature.limits
    sizes = [lo + u * (hi - lo) for u in sizes_u]
    dsize = datum_feature.limits[0] + datum_u * (datum_feature.limits[1] - datum_feature.limits[0])
    rad = datum_shift(datum_feature, dsize, "MMB").radial.value
    d = (rad * shift_u[0] * math.cos(shift_u[1]), rad * shift_u[0] * math.sin(shift_u[1]))
    al = [m.allowed.value for m in members(p, sizes)]
    gxy = [(b[0] + 0.5 * a * r * math.cos(phi), b[1] + 0.5 * a * r * math.sin(phi))
           for b, a, (r, phi) in zip(p.locations, al, devs_u)]
    c, s = math.cos(-theta), math.sin(-theta)
    meas = [(c * (x - d[0]) - s * (y - d[1]), s * (x - d[0]) + c * (y - d[1])) for x, y in gxy]
    return sizes, dsize, d, gxy, meas


unit = st.floats(0.0, 1.0)
polar = st.tuples(unit, st.floats(0.0, 2 * math.pi))


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(dev, dev), min_size=2, max_size=4), st.floats(40.0, 40.1), st.floats(6.6, 6.8))
def test_properties_shift_and_wrong_way(devs, datum_size, size):
    # (1) the shift never enlarges an individual zone: allowed with shift == t + bonus without
    # (2) the right way never accepts what the wrong way rejects
    p = hole_pattern(0.1, locs=bolt_circle(len(devs), 60.0))
    meas = [(x + dx, y + dy) for (x, y), (dx, dy) in zip(p.locations, devs)]
    sizes = [size] * len(devs)
    right = pattern_conforms(p, meas, sizes, datum_size)
    base = [m.allowed.value for m in members(p, sizes)]
    assert [r.allowed for r in right.readings] == base
    assert [r.allowed for r in pattern_conforms(p, meas, sizes, 40.0).readings] == base
    wrong = wrong_way(p, meas, sizes, datum_size)
    assert (not right.conforms) or wrong.conforms


# (3) gauge-fitting parts assemble with the worst-case mating pattern

BOSS_B = Feature("pilot boss", Kind.PIN, (39.95, 40.0), 6.0)


def _pin_pattern(t):
    fr = frame(DatumRef("A"), DatumRef("B", BOSS_B, "MMB"))
    return Pattern("pins", Feature("pin", Kind.PIN, (6.3, 6.4), 8.0, tolerance=pos(t)), bolt_circle(4, 60.0, 45.0), fr)


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(unit, st.floats(0, 2 * math.pi)), min_size=4, max_size=4),
       st.lists(st.tuples(unit, st.floats(0, 2 * math.pi)), min_size=4, max_size=4),
       st.lists(unit, min_size=4, max_size=4), st.lists(unit, min_size=4, max_size=4),
       unit, unit, polar, polar, st.floats(-0.003, 0.003), st.floats(-0.003, 0.003))
def test_gauge_fitting_parts_assemble(dh, dp, sh, sp, ub, up, shb, shp, thb, thp):
    holes = hole_pattern(0.1, locs=bolt_circle(4, 60.0, 45.0))
    pins = _pin_pattern(0.1)
    mate = mate_patterns(holes, pins)
    # hole VC 6.6 - 0.1 = 6.5, pin VC 6.4 + 0.1 = 6.5 (ASME VC): line-to-line; pilots 40.0 - 40.0
    assert all(pc.clearance_min.value == pytest.approx(0.0) for pc in mate.pairs)
    assert mate.pilot.value == pytest.approx(0.0) and mate.assembles
    s1, dz1, d1, g1, m1 = _part(holes, shb, thb, dh, sh, ub, BORE.with_(limits=(40.0, 40.1)))
    s2, dz2, d2, g2, m2 = _part(pins, shp, thp, dp, sp, up, BOSS_B)
    # each part fits its gauge, so each conforms the right way
    assert pattern_conforms(holes, m1, s1, dz1).conforms
    assert pattern_conforms(pins, m2, s2, dz2).conforms
    # gauge frames aligned: every pin disk inside its hole disk, the boss inside the bore
    # (independent: shapely containment with a tiny tolerance, and circle arithmetic)
    for (c1, a), (c2, b) in zip(zip(g1, s1), zip(g2, s2)):
        assert math.hypot(c1[0] - c2[0], c1[1] - c2[1]) <= (a - b) / 2 + 1e-9
        assert Point(c1).buffer(a / 2 + 1e-6, 256).contains(Point(c2).buffer(b / 2 - 1e-6, 256))
    assert math.hypot(d1[0] - d2[0], d1[1] - d2[1]) <= (dz1 - dz2) / 2 + 1e-9  # pilot bore vs boss


def test_interfering_mate_is_reported():
    # pin t = 0.15: pin VC 6.55 > hole VC 6.5 -> clearance -0.05 (ASME VC arithmetic)
    m = mate_patterns(hole_pattern(0.1, locs=bolt_circle(4, 60.0, 45.0)), _pin_pattern(0.15))
    assert not m.assembles and m.pairs[m.tightest].clearance_min.value == pytest.approx(-0.05)
    # and a worst-case pair of conforming parts really interferes: hole 0 at MMC displaced
    # 0.05 outward radially, pin 0 at MMC displaced 0.075 inward, both other members at basic
    b = np.array(bolt_circle(4, 60.0, 45.0)[0])
    u = b / np.linalg.norm(b)
    h, p = b + 0.05 * u, b - 0.075 * u
    assert np.linalg.norm(h - p) > (6.6 - 6.4) / 2  # 0.125 > 0.1: the pin's surface crosses the hole's


def test_gauge_sizes():
    # ASME functional gauge (from memory): gauge pin = hole VC = MMC - t; datum simulator at MMB
    g = gauge(hole_pattern(0.1, locs=bolt_circle(4, 60.0)))
    assert all(e.diameter.value == pytest.approx(6.5) and e.kind == "pin" for e in g.pins)
    assert [e.basic for e in g.pins] == list(bolt_circle(4, 60.0))
    assert g.simulators[1].diameter.value == 40.0
    gp = gauge(_pin_pattern(0.1))
    assert gp.pins[0].kind == "hole" and gp.pins[0].diameter.value == pytest.approx(6.5)  # MMC + t
    assert gp.simulators[1].kind == "hole" and gp.simulators[1].diameter.value == 40.0


# ---------------------------------------------------------------- fasteners


def _threaded(t2, projected=10.0):
    fr = frame(DatumRef("A"), DatumRef("B", BOSS_B, "MMB"))
    f = Feature("M6", Kind.HOLE, (4.9, 5.1), 12.0, tolerance=pos(t2, material=Material.RFS, projected=projected))
    return Pattern("threads", f, bolt_circle(4, 60.0, 45.0), fr)


def test_fixed_fastener_unequal_tolerances():
    # ASME Y14.5 fixed fastener, projected zone: T1 + T2 = H - F (from memory)
    holes = hole_pattern(0.4, locs=bolt_circle(4, 60.0, 45.0), limits=(6.6, 6.8))
    ok = mate_patterns(holes, _threaded(0.2), fastener=6.0)  # 0.4 + 0.2 = 6.6 - 6.0
    assert ok.fastener.kind == "fixed" and ok.fastener.limits[0].value == pytest.approx(6.6)
    assert ok.assembles and ok.pairs[0].clearance_min.value == pytest.approx(0.0)
    bad = mate_patterns(holes, _threaded(0.25), fastener=6.0)
    assert not bad.assembles and not bad.fastener.assembles
    assert bad.pairs[0].clearance_min.value == pytest.approx(6.6 - 6.0 - 0.4 - 0.25)
    # equal split agrees with geom.analysis: T = (H - F) / 2 for a fixed fastener
    T = analyse_fastener(Fastener("x", "fixed", 6.0, 6.6, 12.0, 8.0)).position_tolerance.value
    eq = mate_patterns(hole_pattern(T, locs=bolt_circle(4, 60.0, 45.0)), _threaded(T), fastener=6.0)
    assert eq.pairs[0].clearance_min.value == pytest.approx(0.0)


def test_floating_fastener_different_holes():
    # ASME Y14.5 floating fastener: T = H - F for each part (from memory); H1 = 6.6, H2 = 6.4
    holes = hole_pattern(0.6, locs=bolt_circle(4, 60.0, 45.0), limits=(6.6, 6.8))
    fr = frame(DatumRef("A"), DatumRef("B", BOSS_B, "MMB"))
    other = lambda t: Pattern("h2", Feature("h2", Kind.HOLE, (6.4, 6.6), 8.0, tolerance=pos(t)),
                              bolt_circle(4, 60.0, 45.0), fr)
    ok = mate_patterns(holes, other(0.4), fastener=6.0)
    assert ok.fastener.kind == "floating"
    assert [round(d.value, 9) for d in ok.fastener.limits] == [0.6, 0.4]  # H - F per part
    assert ok.assembles and ok.fastener.assembles
    bad = mate_patterns(holes, other(0.5), fastener=6.0)
    assert not bad.fastener.assembles and not bad.assembles
    assert bad.pairs[0].clearance_min.value == pytest.approx(6.4 - 0.5 - 6.0)  # smaller VC - F
    with pytest.raises(ValueError, match="fastener"):
        mate_patterns(holes, other(0.4))


def test_three_plane_frame_reads_positions_directly():
    # A|B|C planes: nothing may shift or turn, so the position is 2 * the radial deviation
    # (ASME Y14.5 position, diametral zone: common practice, no source)
    fr = frame(DatumRef("A"), DatumRef("B"), DatumRef("C"))
    p = Pattern("p", Feature("h", Kind.HOLE, (6.6, 6.8), 8.0, tolerance=pos(0.1, ("A", "B", "C"))),
                ((10.0, 10.0), (30.0, 10.0)), fr)
    c = pattern_conforms(p, ((10.03, 10.04), (30.0, 10.0)), (6.62, 6.6))
    assert [round(r.position, 9) for r in c.readings] == [0.1, 0.0]  # 2 * hypot(0.03, 0.04)
    assert c.conforms and c.governs == 0 and c.shift == (0.0, 0.0)
    assert [round(r.margin, 9) for r in c.readings] == [0.02, 0.1]  # 0.1 + 0.02 bonus - 0.1
