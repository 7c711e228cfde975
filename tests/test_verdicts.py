"""One verdict you can sign: readings per standard, three outcomes, boundaries, wording, precision.

Each check value names its source beside it. Point sets are generated inside the tests from
exact geometry (a known cylinder, bend or taper), so the expected value is the generating one or
an independent computation (scipy) on the same points.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from geom import analyse_feature, analyse_scene, loads
from geom.analysis import fits, line_to_line, tolerance_allowed_derived
from geom.boundaries import worst_case_boundaries
from geom.conformance import Outcome, combine, decide, not_evaluated, part_verdict, verdict_word
from geom.inspect import InspectError, inspect_feature, inspection_to_json, render_inspection
from geom.model import (
    Characteristic,
    Feature,
    Kind,
    Material,
    Measured,
    Scene,
    Standard,
    Tolerance,
    Units,
    Zone,
    datum_problem,
)
from geom.readout import feature_rows, render_text
from geom.scenefile import SceneError
from matezone.cli import main
from scenetext import fastener, hole, scene_toml, tol

# ---------------------------------------------------------------- point generators


def tilted_cylinder_rings(d, length, tilt_deg, nsec=9, per=180, centre=(0.0, 0.0)):
    """Rings at constant z (as a CMM scans them) on a perfect cylinder of diameter d whose axis
    leans tilt_deg from z in the x-z plane, through (centre, 0)."""
    t = math.radians(tilt_deg)
    ax = np.array([math.sin(t), 0.0, math.cos(t)])
    e1 = np.array([math.cos(t), 0.0, -math.sin(t)])
    e2 = np.array([0.0, 1.0, 0.0])
    phi = np.linspace(0, 2 * np.pi, per, endpoint=False)
    pts, secs = [], []
    for i, z in enumerate(np.linspace(0.05 * length, 0.95 * length, nsec)):
        radial = 0.5 * d * (np.outer(np.cos(phi), e1) + np.outer(np.sin(phi), e2))
        s = (z - radial[:, 2]) / ax[2]  # axis parameter that puts the point at height z
        p = np.outer(s, ax) + radial + np.array([*centre, 0.0])
        pts.append(p)
        secs += [i + 1] * per
    return np.vstack(pts), np.array(secs)


def bent_pin_rings(diameters, centres_x, length, per=240):
    """Rings of exact circles: section i has diameter diameters[i] and centre (centres_x[i], 0)."""
    phi = np.linspace(0, 2 * np.pi, per, endpoint=False)
    zs = np.linspace(0.0, length, len(diameters))
    pts = [np.c_[cx + 0.5 * d * np.cos(phi), 0.5 * d * np.sin(phi), np.full(per, z)]
           for d, cx, z in zip(diameters, centres_x, zs)]
    return np.vstack(pts), np.repeat(np.arange(1, len(diameters) + 1), per), zs


def one(feature, standard=Standard.ASME, units=Units.MM):
    return Scene("t", units, standard, (feature,))


# ---------------------------------------------------------------- 1. axis reading per standard


def test_governing_axis_follows_the_standard():
    # ASME Y14.5 (definition of feature axis, from memory): perpendicularity of a feature of size
    # applies to the axis of the unrelated AME; ISO 1101 (from memory): to the extracted median line.
    # A hole whose lower half is straight and whose upper half drifts sideways (a banana): the
    # envelope's axis and the section centres read differently.
    zs = np.linspace(0.5, 11.5, 12)
    drift = 0.012 * np.clip((zs / 12 - 0.5) / 0.5, 0, None) ** 2
    phi = np.linspace(0, 2 * np.pi, 240, endpoint=False)
    P = np.vstack([np.c_[dx + 4.004 * np.cos(phi), 4.004 * np.sin(phi), np.full(240, z)]
                   for z, dx in zip(zs, drift)])
    tol = Tolerance(Characteristic.PERPENDICULARITY, 0.010, material=Material.MMC, datums=("A",))
    f = Feature("b", Kind.HOLE, (8.0, 8.02), 12.0, tolerance=tol)
    asme = inspect_feature(one(f), "b", points=P)
    iso = inspect_feature(one(f, Standard.ISO), "b", points=P)
    assert asme.axis.basis == "feature axis" and iso.axis.basis == "median line"
    # median line: the section centres, whose spread projected on A is the drift range (exact data)
    assert iso.axis_deviation == pytest.approx(float(drift.max() - drift.min()), abs=1e-6)
    assert asme.median_axis.deviation == pytest.approx(iso.axis_deviation, abs=1e-12)
    # feature axis: the unrelated envelope's axis over the length; for perpendicularity with a
    # diameter zone, the distance between its ends projected on A (ASME Y14.5.1, from memory)
    e = asme.unrelated
    ends = np.array([e.at_z(0.0), e.at_z(12.0)])
    assert asme.axis_deviation == pytest.approx(float(np.hypot(*(ends[1] - ends[0]))), abs=1e-9)
    assert abs(asme.axis_deviation - iso.axis_deviation) > 1e-4  # two different readings
    assert "feature axis" in render_inspection(asme) and "GOVERNS" in render_inspection(asme)


def test_straightness_is_read_on_the_median_line_in_both_standards():
    # ASME Y14.5: the derived median line is toleranced by straightness (from memory)
    P, secs, _ = bent_pin_rings([9.99] * 7, [0, 0.002, 0.003, 0.0035, 0.003, 0.002, 0], 20.0)
    tol = Tolerance(Characteristic.STRAIGHTNESS, 0.010, material=Material.RFS)
    f = Feature("p", Kind.PIN, (9.98, 10.0), 20.0, tolerance=tol)
    for std in Standard:
        r = inspect_feature(one(f, std), "p", points=P, sections=secs)
        assert r.axis.basis == "median line"


# ---------------------------------------------------------------- 2. local sizes normal to the axis


@pytest.mark.parametrize("tilt", [0.5, 3.0, 8.0])
def test_perfect_tilted_hole_has_its_true_size(tilt):
    # ISO 14405-1 two-point size and ISO 17450-3 (from memory): sections are taken normal to the
    # associated (least-squares) cylinder's axis. A perfect cylinder of diameter 8.005 tilted
    # `tilt` degrees: every local size is 8.005 (at constant z they would be up to 8.005/cos(tilt)).
    P, secs = tilted_cylinder_rings(8.005, 12.0, tilt)
    f = Feature("h", Kind.HOLE, (8.000, 8.010), 12.0)  # no geometric tolerance: size only
    r = inspect_feature(one(f), "h", points=P, sections=secs)
    assert r.local_sizes == pytest.approx((8.005, 8.005), abs=1e-7)
    assert all(s.ls_diameter == pytest.approx(8.005, abs=1e-9) for s in r.sections)
    assert r.size_check.outcome is Outcome.CONFORMS
    assert 8.005 / math.cos(math.radians(3.0)) > 8.010  # at constant z the 3 deg hole would fail
    # the median line lies on the generating axis: x = z tan(tilt) (exact data)
    ml = r.median_line
    assert ml[:, 0] == pytest.approx(ml[:, 2] * math.tan(math.radians(tilt)), abs=1e-7)


# ---------------------------------------------------------------- 3. straightness at MMC


def _needed_by_scipy(centres, increases):
    """min over lines L of max_i (2 dist(c_i, L) - inc_i), by SLSQP on the epigraph form."""
    from scipy.optimize import minimize

    z = centres[:, 2]

    def dist(p):
        a, b, u, v = p[:4]
        x = centres[:, 0] - (a + u * z)
        y = centres[:, 1] - (b + v * z)
        w = np.c_[x, y, np.zeros(len(z))]
        d = np.array([u, v, 1.0]) / math.sqrt(1 + u * u + v * v)
        return np.linalg.norm(w - np.outer(w @ d, d), axis=1)

    cons = {"type": "ineq", "fun": lambda p: p[4] - (2 * dist(p) - increases)}
    res = minimize(lambda p: p[4], np.r_[0, 0, 0, 0, 0.1], constraints=[cons], method="SLSQP",
                   options={"ftol": 1e-14, "maxiter": 500})
    return float(res.fun)


def test_straightness_at_mmc_takes_each_local_size():
    # ASME Y14.5 straightness of a derived median line at MMC (from memory): "as each actual
    # local size departs from MMC, an increase in the local tolerance equal to the amount of such
    # departure is allowed". A pin 9.98 - 10.00, straightness 0.010 (M): sections of 9.985 (each
    # earns 10.000 - 9.985 = 0.015), bowed 0.014 (sagitta): 0.014 <= 0.010 + 0.015 conforms.
    # The unrelated envelope (about 9.985 + 0.014 = 9.999) would earn only 0.001 and reject it.
    n = 9
    zeta = np.linspace(0, 1, n)
    bow = 0.014 * 4 * zeta * (1 - zeta)  # parabola, sagitta 0.014 at the middle
    P, secs, _ = bent_pin_rings([9.985] * n, bow, 20.0)
    tol = Tolerance(Characteristic.STRAIGHTNESS, 0.010, material=Material.MMC)
    f = Feature("p", Kind.PIN, (9.98, 10.0), 20.0, tolerance=tol)
    r = inspect_feature(one(f), "p", points=P, sections=secs)
    assert r.section_increases == pytest.approx([0.015] * n, abs=1e-7)  # 10.000 - 9.985 each
    needed = r.axis_check.values[0]
    # independent: SLSQP on the section centres with the same increases
    assert needed == pytest.approx(_needed_by_scipy(r.median_line, np.full(n, 0.015)), abs=2e-6)
    # elementary geometry: the centres of a symmetric bow of sagitta s fit between two lines
    # parallel to its chord s apart, so every section is within s/2 of the best line: with the
    # same increase b everywhere, t needed = s - b = 0.014 - 0.015
    assert needed == pytest.approx(0.014 - 0.015, abs=2e-6)
    assert r.axis_check.outcome is Outcome.CONFORMS
    assert r.unrelated_ame > 10.0 - 0.002  # envelope-based bonus would be under 0.002 (exact data)


def test_straightness_at_mmc_varying_sizes_against_scipy():
    # the same rule with sizes varying along the pin (taper): the governing section is where the
    # bow is large and the increase small (ASME Y14.5 straightness at MMC, from memory)
    n = 11
    zeta = np.linspace(0, 1, n)
    d = 9.996 - 0.010 * zeta  # 9.996 at one end, 9.986 at the other
    bow = 0.012 * 4 * zeta * (1 - zeta)
    P, secs, _ = bent_pin_rings(d, bow, 25.0)
    tol = Tolerance(Characteristic.STRAIGHTNESS, 0.006, material=Material.MMC)
    f = Feature("p", Kind.PIN, (9.98, 10.0), 25.0, tolerance=tol)
    r = inspect_feature(one(f), "p", points=P, sections=secs)
    inc = 10.0 - d  # departure of each section's local size from MMC (exact circles)
    assert r.section_increases == pytest.approx(inc, abs=1e-7)
    assert r.axis_check.values[0] == pytest.approx(_needed_by_scipy(r.median_line, inc), abs=2e-6)


def test_least_squares_straightness_is_computed():
    # the usual CMM printout of straightness: section centres against their least-squares line,
    # twice the largest distance (common practice, no source); computed here with numpy.polyfit
    n = 9
    zeta = np.linspace(0, 1, n)
    bow = 0.010 * 4 * zeta * (1 - zeta)
    P, secs, zs = bent_pin_rings([9.99] * n, bow, 20.0)
    tol = Tolerance(Characteristic.STRAIGHTNESS, 0.010, material=Material.MMC)
    f = Feature("p", Kind.PIN, (9.98, 10.0), 20.0, tolerance=tol)
    r = inspect_feature(one(f), "p", points=P, sections=secs)
    c = r.median_line
    k, m = np.polyfit(c[:, 2], c[:, 0], 1)
    resid = (c[:, 0] - (k * c[:, 2] + m)) / math.sqrt(1 + k * k)
    assert r.least_squares.axis_deviation == pytest.approx(2 * np.abs(resid).max(), abs=1e-7)
    assert r.least_squares.axis_deviation > 0.004  # not a literal zero


def test_diameter_spread_wording_never_repeats_one_number():
    # common practice, no source: "run from 8.005 to 8.005" says nothing; equal numbers say "all"
    from geom.inspect import _spread

    assert _spread(Units.MM, "d", [8.0051, 8.0052]) == "d run from ⌀8.0051 to ⌀8.0052"
    assert _spread(Units.MM, "d", [8.005, 8.005]) == "d are all ⌀8.005"


# ---------------------------------------------------------------- 4. ASME RFS straightness boundaries


def test_asme_rfs_straightness_boundaries():
    # ASME Y14.5 straightness of a derived median line, RFS (from memory): Rule #1 is waived and
    # the outer boundary of a pin is MMC + t, the inner LMC - t; of a hole IB = MMC - t, OB = LMC + t
    t = Tolerance(Characteristic.STRAIGHTNESS, 0.010)
    pin = Feature("p", Kind.PIN, (9.98, 10.00), 20.0, tolerance=t)
    hole = Feature("h", Kind.HOLE, (10.02, 10.04), 20.0, tolerance=t)
    assert worst_case_boundaries(pin, Standard.ASME) == pytest.approx((9.97, 10.01))
    assert worst_case_boundaries(hole, Standard.ASME) == pytest.approx((10.01, 10.05))
    # ISO 8015 independency (from memory): no modifier, no (E): no boundary
    assert worst_case_boundaries(pin, Standard.ISO) == (None, None)
    r = analyse_feature(pin, Standard.ASME)
    assert r.outer_boundary.formula(Units.MM) == "OB = MMC + t@MMC = 10.000 + 0.010 = 10.010"


# ---------------------------------------------------------------- 5. location needs locating datums


def position_hole(datums) -> str:
    return scene_toml(hole("h", (8.0, 8.02), 10, tolerance=tol("position", 0.05, datums=datums)))


POS_A_ONLY = position_hole(("A",))


def test_position_to_a_alone_is_refused_everywhere(write_scene, capsys):
    # ASME Y14.5 / ISO 5459 datum reference frames (common practice): a plane datum removes one
    # translation and two rotations, so it cannot locate an axis in x and y
    f = write_scene(POS_A_ONLY)
    for cmd in (["analyze", str(f)], ["inspect", str(f), "--feature", "h"]):
        assert main(cmd) == 2
        err = capsys.readouterr().err
        assert 'feature[0] "h".tolerance.datums' in err and "unlocated in x and y" in err
        assert err.count("\n") == 1  # one line
    # an API-built scene: inspect refuses with the same reason
    tol = Tolerance(Characteristic.POSITION, 0.05, material=Material.MMC, datums=("A",))
    sc = one(Feature("h", Kind.HOLE, (8.0, 8.02), 10.0, tolerance=tol, measured=Measured(size=8.01)))
    with pytest.raises(InspectError, match="unlocated"):
        inspect_feature(sc, "h")
    # with locating datums it loads
    assert loads(position_hole(("A", "B", "C"))).features[0].tolerance.datums == ("A", "B", "C")


@pytest.mark.parametrize("tol", [
    Tolerance(Characteristic.PERPENDICULARITY, 0.05, Zone.WIDTH, datums=("A",)),
    Tolerance(Characteristic.ANGULARITY, 0.05, datums=("A",), angle=30.0),
    Tolerance(Characteristic.PARALLELISM, 0.05, datums=("A",)),
])
def test_zone_direction_needs_a_second_datum(tol):
    # a plane datum fixes no direction about its own normal (common practice, no source)
    assert datum_problem(tol) is not None
    assert datum_problem(Tolerance(tol.characteristic, tol.value, tol.zone, datums=("A", "B"),
                                   angle=tol.angle)) is None


# ---------------------------------------------------------------- 6. three outcomes


def test_checks_not_evaluated_never_count_as_proven():
    # ISO 14253-1 (from memory): conformance must be proven; a missing reading proves nothing
    ok = decide("local sizes", (8.01,), 8.0, 8.02, 0.001)
    missing = not_evaluated("envelope", "no envelope size")
    whole = combine("size", [ok, missing])
    assert ok.outcome is Outcome.CONFORMS
    assert whole.outcome is Outcome.NOT_PROVEN and whole.conforms is None
    assert verdict_word(missing) == ("NOT EVALUATED", "none")
    # one nonconformance proven decides whatever else is missing
    bad = decide("local sizes", (8.03,), 8.0, 8.02, 0.001)
    assert combine("size", [bad, missing]).outcome is Outcome.NONCONFORMS


def test_json_keeps_booleans_only_where_proven():
    # ISO 14253-1 (from memory): 0.0175 against 0.018 with U = 0.001 is neither proven
    m = Measured(size=8.003, related_size=7.990, axis_deviation=0.0175, local_sizes=(8.004, 8.010),
                 uncertainty=0.001)
    tol = Tolerance(Characteristic.PERPENDICULARITY, 0.015, material=Material.MMC, datums=("A",))
    sc = one(Feature("b", Kind.HOLE, (8.0, 8.022), 12.0, tolerance=tol, measured=m))
    d = inspection_to_json(inspect_feature(sc, "b"))
    # t + bonus = 0.015 + (8.003 - 8.000) = 0.018 (ASME Y14.5 bonus, from memory)
    assert d["tolerance_allowed"] == pytest.approx(0.018)
    assert d["axis_conforms"] is None and d["decisions"]["axis"]["outcome"] == "not proven"
    assert d["decisions"]["axis"]["conforms"] is None
    json.dumps(d)  # serialisable


# ---------------------------------------------------------------- 7. one overall verdict


def test_part_verdict_follows_the_governing_readings():
    # with a modifier the surface governs (ASME Y14.5 surface interpretation precedence; ISO
    # 2692 MMR, from memory): an axis reading that fails is a note, not the verdict
    size = decide("size", (8.01,), 8.0, 8.02, None)
    axis = decide("axis", (0.021,), None, 0.018, None)
    surf = decide("surface", (7.990,), 7.985, None, None)
    v = part_verdict(size, axis, surf, ("size", "surface"), "why", ("the axis disagrees",))
    assert v.outcome is Outcome.CONFORMS and v.word == "CONFORMS" and v.role == "ok"
    v = part_verdict(size, axis, surf, ("size", "axis"), "RFS")
    assert v.outcome is Outcome.NONCONFORMS and v.headline.startswith("PART DOES NOT CONFORM: axis")


def test_rfs_feature_verdict_is_governed_by_the_axis():
    # no modifier: no virtual condition, the tolerance applies to the axis (ASME Y14.5, from memory)
    m = Measured(size=8.005, axis_deviation=0.020, local_sizes=(8.006, 8.01))
    tol = Tolerance(Characteristic.PERPENDICULARITY, 0.015, datums=("A",))
    r = inspect_feature(one(Feature("b", Kind.HOLE, (8.0, 8.022), 12.0, tolerance=tol, measured=m)), "b")
    assert r.verdict.governing == ("size", "axis")
    assert r.verdict.outcome is Outcome.NONCONFORMS  # 0.020 > 0.015 (no bonus at RFS)


# ---------------------------------------------------------------- 8. display precision


def test_inch_micro_limits_are_never_shown_equal():
    # common practice, no source: a limit pair 0.25000 / 0.25015 in at 4 decimals would print
    # 0.2500 / 0.2502 (a wrong last digit): it prints in full
    f = Feature("p", Kind.PIN, (0.25, 0.25015), 0.5)
    sc = Scene("t", Units.IN, Standard.ASME, (f,))
    text = render_text(analyse_scene(sc))
    assert "0.25015" in text and "0.2502" not in text
    # the display rule of DEVELOPERS.md (mm 3 decimals, in 4, more where fewer would hide the value)
    assert Units.IN.fmt(0.00015) == "0.00015"
    assert Units.MM.fmt_cmp(0.0183, 0.018) == ("0.0183", "0.0180")
    # a reading that would print as 0.000 keeps its digits
    assert Units.MM.fmt(0.00031234) == "0.00031"
    c = decide("axis", (0.0183,), None, 0.018, None, Units.MM)
    assert c.detail == "0.0183 > 0.0180"


# ---------------------------------------------------------------- 9. wording per standard


def test_iso_inspection_speaks_iso_terms():
    # ISO 2692 words the tolerance rise as an "increase" and the boundary as MMVS; ISO 14405-1
    # names the fitted cylinders GX / GN (from memory)
    m = Measured(size=8.003, related_size=7.990, axis_deviation=0.012, local_sizes=(8.004, 8.010))
    tol = Tolerance(Characteristic.PERPENDICULARITY, 0.015, material=Material.MMC, datums=("A",))
    f = Feature("b", Kind.HOLE, (8.0, 8.022), 12.0, tolerance=tol, measured=m, envelope=False)
    text = render_inspection(inspect_feature(one(f, Standard.ISO), "b"))
    for asme_word in ("bonus", "Rule #1", "actual mating envelope", "VC =", " AME"):
        assert asme_word not in text, asme_word
    assert "increase" in text and "MMVS" in text and "GX" in text


def test_no_envelope_wording_where_no_envelope_applies():
    # ISO 8015 independency: no envelope unless (E) (from memory): a size beyond MMS earns no
    # increase, and nothing is said about an envelope
    m = Measured(size=7.999, related_size=7.99, axis_deviation=0.01, local_sizes=(8.001, 8.01))
    tol = Tolerance(Characteristic.PERPENDICULARITY, 0.015, material=Material.MMC, datums=("A",))
    f = Feature("b", Kind.HOLE, (8.0, 8.022), 12.0, tolerance=tol, measured=m)
    r = inspect_feature(one(f, Standard.ISO), "b")
    assert not any("envelope" in n for n in r.notes)
    r = inspect_feature(one(f, Standard.ASME), "b")
    assert any("violates the envelope" in n for n in r.notes)


# ---------------------------------------------------------------- 10. projected zones


def test_projected_hole_table_names_where_its_boundaries_apply():
    # fixed-fastener hole with a projected zone: over its own length L the axis may lean out of
    # the zone, IB = MMC - t(1 + 2L/P) (ASME Y14.5 fastener formulas, from memory):
    # 5.35 - 0.2(1 + 2*10/8) = 4.65
    tol = Tolerance(Characteristic.POSITION, 0.2, material=Material.MMC, datums=("A", "B"), projected=8.0)
    f = Feature("s", Kind.HOLE, (5.35, 5.5), 10.0, tolerance=tol)
    rows = feature_rows(analyse_feature(f, Standard.ISO), Units.MM, Standard.ISO)
    labels = [r[0] for r in rows]
    assert any("within the projected height" in lb for lb in labels)
    inhole = [r for r in rows if "hole's own length" in r[0]]
    assert inhole and inhole[0][1] == "4.650"


# ---------------------------------------------------------------- 11. fastener-only scenes


def test_fastener_only_scene_is_valid(write_scene, capsys):
    # floating fastener T = H - F (ASME Y14.5 fastener formulas, from memory): 6.6 - 6.0 = 0.6
    f = write_scene(scene_toml(fasteners=[fastener("m6", "floating", 6.0, 6.6)]), "bolts.toml")
    assert main(["analyze", str(f)]) == 0
    out = capsys.readouterr().out
    assert "T = H - F = 6.600 - 6.000 = 0.600" in out
    with pytest.raises(SceneError, match=r"\[\[feature\]\] or \[\[fastener\]\]"):
        loads(scene_toml())  # units and nothing else


# ---------------------------------------------------------------- 12. ISO opposite-side boundaries


def test_iso_mmr_without_envelope_bounds_only_the_mms_side():
    # ISO 2692 (from memory): (M) defines the MMVS (MMS - t for a hole); under ISO 8015
    # independency nothing bounds the LMS side, exactly as with no modifier: no value is
    # computed on a perfect-form assumption in either case
    tol = Tolerance(Characteristic.POSITION, 0.05, material=Material.MMC, datums=("A", "B"))
    h = Feature("h", Kind.HOLE, (10.0, 10.1), 10.0, tolerance=tol)
    assert worst_case_boundaries(h, Standard.ISO) == (pytest.approx(9.95), None)
    r = analyse_feature(h, Standard.ISO)
    assert r.outer_boundary.value is None and r.resultant_condition.value is None
    assert "independency" in r.outer_boundary.note
    # ASME: RC = LMC + t + bonus = 10.1 + 0.05 + 0.1 = 10.25 (ASME Y14.5 resultant condition)
    assert analyse_feature(h, Standard.ASME).resultant_condition.value == pytest.approx(10.25)


# ---------------------------------------------------------------- 13. one predicate, one formula


def test_one_fit_predicate_and_one_allowed_formula():
    # line-to-line still assembles (common practice, no source)
    assert fits(0.0) and fits(-5e-10) and not fits(-1e-6)
    assert line_to_line(1e-10) and not line_to_line(1e-3)
    tol = Tolerance(Characteristic.POSITION, 0.002, material=Material.MMC, datums=("A", "B", "C"))
    h = Feature("h", Kind.HOLE, (1.120, 1.124), 0.5, tolerance=tol)
    # common-practice inch check: .002 + .003 bonus = .005
    d = tolerance_allowed_derived(h, 0.003)
    assert d.formula(Units.IN, Standard.ASME) == "tolerance allowed = t + bonus = 0.0020 + 0.0030 = 0.0050"
    assert d.formula(Units.IN, Standard.ISO) == "tolerance allowed = t + increase = 0.0020 + 0.0030 = 0.0050"
