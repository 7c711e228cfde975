"""Inspection of produced parts from points and typed values (geom.inspect, geom.fitting).

Method: ISO 10360-6 reference data — points generated on known cylinders (known size, tilt,
offset, form error, noise), the software's results compared with the known values (exact data,
to 1e-9 mm) or with an independent computation done here in the test (brute force over point
triples and pairs, scipy SLSQP, scipy Voronoi) to 0.5 um on noisy data, as NIST's algorithm
testing does.
"""

from __future__ import annotations

import functools
import itertools
import math

import numpy as np
import pytest

from geom import fitting as F
from geom.conformance import Outcome, verdict_word
from geom.inspect import decide, inspect_feature, inspection_to_json, render_inspection
from geom.model import Characteristic, Feature, Kind, Material, Measured, Scene, Standard, Tolerance, Units, Zone

EXACT = 1e-9  # mm: exact reference data (ISO 10360-6 method)
NOISY = 5e-4  # mm: 0.5 um against an independent computation (the brief's acceptance figure)


# ---------------------------------------------------------------- reference data


def cylinder_points(R, L, *, nsec=9, per=240, offset=(0.0, 0.0), tilt=(0.0, 0.0), lobes=0, lobe_amp=0.0,
                    taper=0.0, noise=0.0, seed=0, z0=0.0, random_angles=False):
    """Rings at constant z on a cylinder of radius R (plus taper dR/dz) whose axis passes
    ``offset`` at z = 0 with slope ``tilt`` (dx/dz, dy/dz). Exact rings of a tilted cylinder are
    ellipses: semi-axis R / cos(theta) along the tilt, R across it."""
    rng = np.random.default_rng(seed)
    tx, ty = tilt
    th = math.atan(math.hypot(tx, ty))
    e = np.array([tx, ty]) / math.hypot(tx, ty) if (tx or ty) else np.array([1.0, 0.0])
    n = np.array([-e[1], e[0]])
    out = []
    for z in np.linspace(z0, z0 + L, nsec):
        if random_angles:
            phi = np.sort(rng.uniform(0, 2 * np.pi, per))
        else:
            phi = np.arange(per) * 2 * np.pi / per
        r = R + taper * (z - z0) + lobe_amp * np.cos(lobes * phi) + (rng.normal(0, noise, per) if noise else 0)
        c = np.array(offset) + np.array([tx, ty]) * z
        xy = c + np.outer(r * np.cos(phi) / math.cos(th), e) + np.outer(r * np.sin(phi), n)
        out.append(np.c_[xy, np.full(per, z)])
    return np.vstack(out)


def scene_with(kind=Kind.HOLE, limits=(8.0, 8.03), length=12.0, char=Characteristic.PERPENDICULARITY,
               value=0.015, material=Material.MMC, zone=Zone.DIAMETER, at=(0.0, 0.0), projected=None,
               standard=Standard.ASME, measured=None):
    datums = () if char is Characteristic.STRAIGHTNESS else (
        ("A", "B", "C") if char is Characteristic.POSITION else ("A",))
    tol = None if char is None else Tolerance(char, value, zone, material, datums, projected)
    f = Feature("f", kind, limits, length, at, tol, measured=measured)
    return Scene("test", Units.MM, standard, (f,))


# ---------------------------------------------------------------- independent computations


def _circumcentres(xy):
    """Centres of the circles through every triple of points (collinear triples left out)."""
    idx = np.array(list(itertools.combinations(range(len(xy)), 3)))
    a, b, c = xy[idx[:, 0]], xy[idx[:, 1]], xy[idx[:, 2]]
    d = 2 * ((b - a)[:, 0] * (c - a)[:, 1] - (b - a)[:, 1] * (c - a)[:, 0])
    ok = np.abs(d) > 1e-15
    a, b, c, d = a[ok], b[ok], c[ok], d[ok]
    sa, sb, sc = (a * a).sum(1), (b * b).sum(1), (c * c).sum(1)
    return np.c_[(sa * (b[:, 1] - c[:, 1]) + sb * (c[:, 1] - a[:, 1]) + sc * (a[:, 1] - b[:, 1])) / d,
                 (sa * (c[:, 0] - b[:, 0]) + sb * (a[:, 0] - c[:, 0]) + sc * (b[:, 0] - a[:, 0])) / d]


def brute_inscribed(xy, near):
    """Largest empty circle through three points, centre within 1 of ``near``: brute force."""
    cen = _circumcentres(xy)
    dist = np.sqrt(((cen[:, None, :] - xy[None, :, :]) ** 2).sum(-1)).min(1)
    keep = np.hypot(*(cen - near).T) < 1.0
    return float(dist[keep].max())


def brute_circumscribed(xy):
    """Smallest circle holding every point: brute force over pairs and triples."""
    best = math.inf
    for i, j in itertools.combinations(range(len(xy)), 2):
        c = (xy[i] + xy[j]) / 2
        r = np.hypot(*(xy - c).T).max()
        if r <= np.hypot(*(xy[i] - c)) + 1e-12:
            best = min(best, r)
    cen = _circumcentres(xy)
    far = np.sqrt(((cen[:, None, :] - xy[None, :, :]) ** 2).sum(-1)).max(1)
    return min(best, float(far.min()))


def slsqp_cylinder(P, inscribed, free=(True, True, True, True)):
    """Independent scipy computation: max r s.t. dist_i >= r (or min r s.t. dist_i <= r) by SLSQP,
    the axis written as a point on z = zm and a direction (p, q, 1), distances by cross product."""
    from scipy.optimize import minimize

    zm = P[:, 2].mean()
    free = np.array(free)

    def dist(y):
        x = np.zeros(4)
        x[free] = y[:-1]
        d = np.array([x[2], x[3], 1.0])
        d /= np.linalg.norm(d)
        w = P - np.array([x[0], x[1], zm])
        return np.linalg.norm(np.cross(w, d), axis=1)

    y0 = np.zeros(int(free.sum()) + 1)
    d0 = dist(np.r_[y0[:-1], 0.0])
    y0[-1] = d0.min() if inscribed else d0.max()
    sgn = 1.0 if inscribed else -1.0
    cons = {"type": "ineq", "fun": lambda y: sgn * (dist(y) - y[-1])}
    obj = np.zeros(len(y0))
    obj[-1] = -sgn
    res = minimize(lambda y: -sgn * y[-1], y0, jac=lambda y: obj, constraints=[cons], method="SLSQP",
                   options={"ftol": 1e-14, "maxiter": 400})
    d = dist(res.x)
    return 2 * (d.min() if inscribed else d.max())


# ---------------------------------------------------------------- exact reference data


def test_exact_straight_cylinder_offset_from_true_position():
    # ISO 10360-6 method: exact points on a cylinder R = 4 normal to A, offset 0.010 at 225 degrees
    # (a sampled direction, so the nearest point to the true position is a sample)
    off = (0.010 * math.cos(math.radians(225)), 0.010 * math.sin(math.radians(225)))
    P = cylinder_points(4.0, 12.0, offset=off)
    sc = scene_with(char=Characteristic.POSITION)
    r = inspect_feature(sc, "f", points=P)
    assert r.unrelated_ame == pytest.approx(8.0, abs=EXACT)  # known size
    assert r.related_ame == pytest.approx(8.0 - 2 * 0.010, abs=EXACT)  # at true position: 2R - 2|offset|
    assert r.axis_deviation == pytest.approx(2 * 0.010, abs=EXACT)  # position: 2 x |offset| (Y14.5.1, from memory)
    assert r.axis.width_reading == pytest.approx(2 * abs(off[0]), abs=EXACT)  # 2 x |dx|
    for s in r.sections:
        assert s.ls_diameter == pytest.approx(8.0, abs=EXACT)  # known size
        assert s.mating_diameter == pytest.approx(8.0, abs=EXACT)
        assert s.local_min == pytest.approx(8.0, abs=EXACT) and s.local_max == pytest.approx(8.0, abs=EXACT)
        assert s.ls_centre == pytest.approx(off, abs=EXACT)  # known axis
    assert np.abs(r.radial_deviation).max() < EXACT  # every point on the LS cylinder
    assert r.least_squares.size == pytest.approx(8.0, abs=EXACT)


TILTED = (4.0, 12.0, 0.02)  # R, L, t: an exact cylinder whose axis moves t between z = 0 and z = L


@functools.cache
def _tilted_inspection():
    """The exact tilted cylinder inspected once for the tests that read it (rings of 360 points:
    exact data needs the ellipse vertices, phi = 0 and 180 degrees, sampled, not a dense ring)."""
    R, L, t = TILTED
    return inspect_feature(scene_with(), "f", points=cylinder_points(R, L, nsec=13, per=360, tilt=(t / L, 0.0)))


def test_exact_tilted_cylinder_perpendicularity_and_related_envelope():
    # ISO 10360-6 method: exact tilted cylinder, offset t = 0.02 between z = 0 and z = L
    R, L, t = TILTED
    r = _tilted_inspection()
    th = math.atan(t / L)
    assert r.unrelated_ame == pytest.approx(2 * R, abs=EXACT)  # the cylinder itself
    assert r.unrelated.tilt_deg == pytest.approx(math.degrees(th), abs=1e-9)
    # related (normal to A): D = d / cos(theta) - t (clear opening of a tilted bore; geom/throughview.py
    # derivation, binding points at the ellipses' vertices at z = 0 and z = L)
    assert r.related_ame == pytest.approx(2 * R / math.cos(th) - t, abs=EXACT)
    assert r.axis_deviation == pytest.approx(t, abs=EXACT)  # centres move t from bottom to top
    assert r.least_squares.size == pytest.approx(2 * R, abs=EXACT)
    assert r.least_squares.axis_deviation == pytest.approx(t, abs=EXACT)


def test_exact_pin_min_circumscribed():
    # ISO 10360-6 method: exact pin R = 3.99, tilted 0.01 over 10 along y
    P = cylinder_points(3.99, 10.0, tilt=(0.0, 0.001))
    sc = scene_with(kind=Kind.PIN, limits=(7.97, 7.99), length=10.0, value=0.01)
    r = inspect_feature(sc, "f", points=P)
    assert r.unrelated_ame == pytest.approx(7.98, abs=EXACT)
    # related, normal to A: the ellipse vertices at z = 0 and L: d / cos(theta) + t (throughview.py, pin)
    th = math.atan(0.001)
    assert r.related_ame == pytest.approx(7.98 / math.cos(th) + 0.01, abs=EXACT)
    assert r.axis_deviation == pytest.approx(0.01, abs=EXACT)
    # bonus for a pin at MMC = MMC - AME = 7.99 - 7.98 (ASME Y14.5-2018 §1.3, from memory)
    assert r.bonus == pytest.approx(0.01, abs=EXACT)
    assert r.tolerance_allowed == pytest.approx(0.02, abs=EXACT)


def test_exact_projected_zone_extends_the_median_line():
    # our convention: projected zone on the far side of A, -P <= z <= 0; axis slope 0.001 -> the
    # line at z = -P sits P * 0.001 from its point at z = 0 (exact geometry)
    P = cylinder_points(4.0, 10.0, tilt=(0.001, 0.0))
    r = inspect_feature(scene_with(length=10.0, projected=25.0), "f", points=P)
    assert r.axis_deviation == pytest.approx(0.025, abs=EXACT)
    assert r.axis.line[:, 2] == pytest.approx([-25.0, 0.0])


def test_exact_bowed_axis_straightness():
    # centres on a circular arc of sagitta s: smallest cylinder holding them is s across
    # (ASME Y14.5-2018 straightness of a derived median line, from memory; exact geometry)
    L, s, R = 12.0, 0.01, 4.0
    zs = np.linspace(0, L, 7)
    cx = s * (1 - ((zs - L / 2) / (L / 2)) ** 2)
    phi = np.arange(180) * 2 * np.pi / 180
    P = np.vstack([np.c_[c + R * np.cos(phi), R * np.sin(phi), np.full(180, z)] for c, z in zip(cx, zs)])
    sc = scene_with(char=Characteristic.STRAIGHTNESS, value=0.02, material=Material.RFS)
    r = inspect_feature(sc, "f", points=P)
    sag = s  # the points of a parabola through (0, 0), (L/2, s), (L, 0): all lie within a strip of width s
    assert r.axis.diameter_reading == pytest.approx(sag, abs=1e-9)
    assert r.axis.width_reading == pytest.approx(sag, abs=1e-9)
    assert r.surface_check.conforms is None  # RFS: no virtual condition


# ---------------------------------------------------------------- noisy data, independent checks


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_section_circles_match_brute_force(seed):
    # independent computation: brute force over all triples (and pairs) of 70 points
    rng = np.random.default_rng(seed)
    t = np.sort(rng.uniform(0, 2 * np.pi, 70))
    r = 4 + 0.002 * np.cos(3 * t + seed) + rng.normal(0, 5e-4, 70)
    xy = np.c_[0.3 + r * np.cos(t), -0.1 + r * np.sin(t)]
    c = F.ls_circle(xy)
    assert F.inscribed_circle(xy)[2] == pytest.approx(brute_inscribed(xy, np.array(c[:2])), abs=EXACT)
    assert F.circumscribed_circle(xy)[2] == pytest.approx(brute_circumscribed(xy), abs=EXACT)


def test_ls_circle_matches_scipy_least_squares():
    # independent scipy computation: scipy.optimize.least_squares on the geometric residuals
    from scipy.optimize import least_squares

    rng = np.random.default_rng(7)
    t = rng.uniform(0, 2 * np.pi, 300)
    r = 4 + 0.003 * np.cos(2 * t) + rng.normal(0, 1e-3, 300)
    xy = np.c_[1 + r * np.cos(t), 2 + r * np.sin(t)]
    ref = least_squares(lambda p: np.hypot(xy[:, 0] - p[0], xy[:, 1] - p[1]) - p[2], [0, 0, 1],
                        xtol=1e-15, ftol=1e-15, gtol=1e-15).x
    assert F.ls_circle(xy) == pytest.approx(tuple(ref), abs=1e-9)


@pytest.mark.parametrize("kind", [Kind.HOLE, Kind.PIN])
def test_unrelated_envelope_matches_slsqp(kind):
    # independent scipy computation (SLSQP on the full constraint set, cross-product distances)
    P = cylinder_points(4.0, 12.0, nsec=8, per=100, offset=(0.01, -0.02), tilt=(0.0008, -0.0005), lobes=3,
                        lobe_amp=0.002, taper=0.0003, noise=4e-4, seed=11, random_angles=True)
    lim = (8.0, 8.03) if kind is Kind.HOLE else (7.97, 8.03)
    r = inspect_feature(scene_with(kind=kind, limits=lim), "f", points=P)
    ref = slsqp_cylinder(P, inscribed=kind is Kind.HOLE)
    assert r.unrelated_ame == pytest.approx(ref, abs=NOISY)
    # related (normal to A, location free): same independent method with the tilt held at zero
    ref_rel = slsqp_cylinder(P, inscribed=kind is Kind.HOLE, free=(True, True, False, False))
    assert r.related_ame == pytest.approx(ref_rel, abs=NOISY)


def test_related_envelope_matches_voronoi_of_projection():
    # independent computation: the related AME normal to A is the largest empty circle of the
    # points projected on A; its centre is a Voronoi vertex (scipy.spatial.Voronoi), checked here
    from scipy.spatial import Voronoi

    P = cylinder_points(4.0, 12.0, nsec=6, per=150, tilt=(0.001, 0.0004), lobes=5, lobe_amp=0.001,
                        noise=3e-4, seed=5, random_angles=True)
    r = inspect_feature(scene_with(), "f", points=P)
    xy = P[:, :2]
    vor = Voronoi(xy)
    V = vor.vertices[np.hypot(*vor.vertices.T) < 1.0]
    ref = max(np.hypot(*(xy - v).T).min() for v in V)
    assert r.related_ame == pytest.approx(2 * ref, abs=NOISY)


# ---------------------------------------------------------------- the readings disagree


def test_tapered_tilted_hole_axis_fails_surface_passes():
    # a hole 8.002 at A opening to 8.014 at the top (taper), tilted 0.022 over 12: the bonus
    # comes from the narrow end (unrelated AME ~ 8.002), the section centres need 0.022 > 0.017,
    # yet the taper leaves room for a VC pin normal to A. Under ISO the extracted median line
    # governs the axis reading (ISO 1101, from memory); with (M) the surface (MMVS) governs the
    # part (ISO 2692, from memory), so the part conforms with a labelled disagreement.
    P = cylinder_points(4.001, 12.0, nsec=13, per=360, tilt=(0.022 / 12, 0.0), taper=0.0005)
    sc = scene_with(limits=(8.0, 8.022), standard=Standard.ISO)
    r = inspect_feature(sc, "f", points=P)
    assert r.unrelated_ame == pytest.approx(8.002, abs=1e-6)  # narrow end (exact data, taper)
    assert r.tolerance_allowed == pytest.approx(0.015 + 0.002, abs=1e-6)  # t + (AME - MMC)
    assert r.axis.basis == "median line"
    # centres of sections normal to the LS axis of a tilted cone: on a line within 1e-5 of the
    # 0.022 tilt (the sections' normal plane is tilted by 0.1 degree; exact data)
    assert r.axis_deviation == pytest.approx(0.022, abs=1e-5)
    assert r.axis_conforms is False
    assert r.related_ame > 7.985  # MMVS = MMS - t = 8.000 - 0.015 (ISO 2692, from memory)
    assert r.surface_conforms is True
    assert r.size_conforms is True
    assert r.verdict.outcome is Outcome.CONFORMS and r.verdict.governing == ("size", "surface")
    assert any("disagree" in n for n in r.verdict.notes)
    assert not any("from memory" in e or "§" in e for e in r.explanation)


def test_asme_feature_axis_governs_position_and_orientation():
    # ASME Y14.5 (definitions of feature axis and derived median line, from memory): orientation
    # and position of a feature of size apply to the axis of the unrelated actual mating envelope.
    # The same tapered, tilted hole as above under ASME: the governing reading is the envelope's
    # axis, computed here independently as the axis through the envelope's two end points.
    P = cylinder_points(4.001, 12.0, nsec=13, per=360, tilt=(0.022 / 12, 0.0), taper=0.0005)
    r = inspect_feature(scene_with(limits=(8.0, 8.022)), "f", points=P)
    assert r.axis.basis == "feature axis" and r.axis is r.feature_axis
    e = r.unrelated
    ends = np.array([e.at_z(0.0), e.at_z(12.0)])
    # perpendicularity, diameter zone: smallest circle holding the axis ends projected on A =
    # their distance (two points; ASME Y14.5.1 axis perpendicularity, from memory)
    assert r.axis_deviation == pytest.approx(float(np.hypot(*(ends[1] - ends[0]))), abs=1e-9)
    assert r.median_axis.deviation == pytest.approx(0.022, abs=1e-5)  # the section centres, shown
    assert r.other_axis_check is not None and "does not govern" in r.other_axis_check.name


def test_bonus_basis_related_is_reported_and_used():
    P = cylinder_points(4.004, 12.0, tilt=(0.01 / 12, 0.0))
    sc = scene_with()
    un = inspect_feature(sc, "f", points=P)
    rel = inspect_feature(sc, "f", points=P, bonus_basis="related")
    assert un.bonus == pytest.approx(un.unrelated_ame - 8.0, abs=EXACT)  # AME - MMC
    assert rel.bonus == pytest.approx(max(0.0, rel.related_ame - 8.0), abs=EXACT)
    assert rel.bonus_basis == "related" and "related" in render_inspection(rel)
    assert inspection_to_json(rel)["bonus_basis"] == "related"


def test_lmc_hole_takes_bonus_from_minimum_material_envelope():
    # LMC: bonus = LMC - AMME for a hole (ASME Y14.5-2018 §1.3 / 2.13, from memory); exact data
    P = cylinder_points(4.005, 12.0, tilt=(0.004 / 12, 0.0))
    sc = scene_with(material=Material.LMC, limits=(8.0, 8.02))
    r = inspect_feature(sc, "f", points=P)
    assert r.least_material.diameter == pytest.approx(8.010, abs=EXACT)
    assert r.bonus == pytest.approx(8.02 - 8.01, abs=EXACT)
    assert r.virtual_condition == pytest.approx(8.02 + 0.015)  # VC = LMC + t (hole)


# ---------------------------------------------------------------- decision rule


@pytest.mark.parametrize("value,outcome,proven", [
    (0.010, Outcome.CONFORMS, True),      # 0.010 <= 0.015 - 0.002
    (0.014, Outcome.NOT_PROVEN, None),    # within U of the limit, inside it
    (0.016, Outcome.NOT_PROVEN, None),    # within U of the limit, outside it
    (0.018, Outcome.NONCONFORMS, False),  # 0.018 > 0.015 + 0.002
])
def test_iso_14253_decision_rule(value, outcome, proven):
    # ISO 14253-1 (from memory): conformance inside the zone shrunk by U, nonconformance outside
    # the zone grown by U, neither in between: three outcomes, never a boolean
    c = decide("axis", (value,), None, 0.015, 0.002)
    assert c.outcome is outcome
    assert c.conforms is proven  # True / False only where proven
    assert c.inside is (value <= 0.015)  # the measured value alone, for information
    assert verdict_word(c)[0] == {True: "CONFORMS", False: "DOES NOT CONFORM", None: "NOT PROVEN"}[proven]


def test_uncertainty_from_scene_reaches_the_verdicts():
    P = cylinder_points(4.001, 12.0, tilt=(0.0165 / 12, 0.0))
    sc = scene_with(measured=Measured(uncertainty=0.001))
    r = inspect_feature(sc, "f", points=P)
    # allowed = 0.015 + 0.002 = 0.017; deviation 0.0165 lies within U of it: not proven
    # (ISO 14253-1, from memory), so neither "conforms" nor "fails" is claimed
    assert r.axis_conforms is None
    assert r.axis_check.outcome is Outcome.NOT_PROVEN and r.axis_check.inside is True


# ---------------------------------------------------------------- typed values


def test_typed_values_with_axis_end_points_position():
    # position: twice the larger distance of the axis ends from the true position (Y14.5.1, from memory)
    m = Measured(size=8.010, related_size=7.995, axis_bottom=(10.003, 4.0), axis_top=(10.0, 3.992),
                 local_sizes=(8.011, 8.014))
    sc = scene_with(char=Characteristic.POSITION, at=(10.0, 4.0), measured=m)
    r = inspect_feature(sc, "f")
    assert r.axis_deviation == pytest.approx(2 * 0.008, abs=EXACT)
    assert r.tolerance_allowed == pytest.approx(0.015 + 0.010, abs=EXACT)
    assert r.axis_conforms and r.surface_conforms and r.size_conforms
    assert r.source == "values"


def test_typed_values_rule_one_fails():
    # ASME Rule #1 (Y14.5-2018 §5.8.1, from memory): a hole's envelope must not pass MMC
    sc = scene_with(measured=Measured(size=7.998, local_sizes=(8.001, 8.004), axis_deviation=0.0))
    r = inspect_feature(sc, "f")
    assert r.local_check.conforms is True
    assert r.envelope_check.conforms is False and r.size_conforms is False
    iso = inspect_feature(scene_with(measured=sc.features[0].measured, standard=Standard.ISO), "f")
    assert iso.envelope_check is None and iso.size_conforms is True  # ISO 8015 independency


# ---------------------------------------------------------------- invariances (hypothesis)

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_BASE = cylinder_points(4.002, 12.0, nsec=6, per=120, tilt=(0.0006, -0.0003), lobes=3, lobe_amp=0.001,
                        noise=3e-4, seed=3)


@functools.cache
def _base_inspection():
    return inspect_feature(scene_with(char=Characteristic.POSITION), "f", points=_BASE)


@settings(max_examples=12, deadline=None)
@given(angle=st.floats(0, 2 * math.pi), dx=st.floats(-50, 50), dy=st.floats(-50, 50))
def test_sizes_invariant_under_rotation_about_z_and_translation(angle, dx, dy):
    # invariance (common practice, no source): sizes of a rigidly moved part do not change
    base = _base_inspection()
    c, s = math.cos(angle), math.sin(angle)
    Q = _BASE.copy()
    Q[:, 0], Q[:, 1] = c * _BASE[:, 0] - s * _BASE[:, 1] + dx, s * _BASE[:, 0] + c * _BASE[:, 1] + dy
    moved = inspect_feature(scene_with(char=Characteristic.POSITION, at=(dx, dy)), "f", points=Q)
    tol = 1e-7
    assert moved.unrelated_ame == pytest.approx(base.unrelated_ame, abs=tol)
    assert moved.related_ame == pytest.approx(base.related_ame, abs=tol)
    assert moved.axis_deviation == pytest.approx(base.axis_deviation, abs=tol)
    assert moved.least_squares.size == pytest.approx(base.least_squares.size, abs=tol)
    assert moved.local_sizes == pytest.approx(base.local_sizes, abs=tol)
    assert [s.mating_diameter for s in moved.sections] == pytest.approx([s.mating_diameter for s in base.sections], abs=tol)


def test_import_geom_inspect_does_not_load_scipy():
    import subprocess
    import sys

    code = "import sys, geom.inspect, geom.pointsfile; print('scipy' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


# ---------------------------------------------------------------- from an independent review


def test_feature_axis_reading_of_an_exact_tilted_cylinder():
    # ISO 10360-6 method (exact data): a straight tilted cylinder's own axis moves t over L, so the
    # reading on the axis of the unrelated envelope (ASME "feature axis", Y14.5-2009 §1.3, from
    # memory) equals the derived-median-line reading, t.
    t = TILTED[2]
    r = _tilted_inspection()
    assert r.feature_axis.deviation == pytest.approx(t, abs=1e-9)
    assert inspection_to_json(r)["feature_axis_deviation"] == pytest.approx(t, abs=1e-9)


def test_lmc_typed_size_is_not_judged_as_a_mating_envelope():
    # ASME Y14.5-2018 (from memory): Rule #1 needs the mating envelope; under LMC the typed size is
    # the minimum material envelope, so the envelope check is not evaluated rather than guessed.
    sc = scene_with(material=Material.LMC, measured=Measured(size=8.010, local_sizes=(8.012, 8.02),
                                                              axis_deviation=0.01))
    r = inspect_feature(sc, "f")
    assert r.unrelated_ame is None and r.least_material.diameter == pytest.approx(8.010)
    assert r.envelope_check.conforms is None
    # bonus from the minimum material envelope: LMC - 8.010 = 0.020 (ASME LMC modifier, from memory)
    assert r.bonus == pytest.approx(0.020)
