"""The statistical fit (geom.yieldmc, geom.yieldrun, geom.yieldstats) against closed forms, each
Monte Carlo estimate within its own Clopper-Pearson interval of the closed form; the worst-case
degenerate state equal to geom.analysis; the discs test against shapely; seeded and
chunking-independent runs; monotone interference as the axis errors grow (common random numbers)."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom import load, loads
from geom.analysis import analyse_feature, analyse_mate
from geom.boundaries import tolerance_at_mmc
from geom.yieldmc import BLOCK, Sampler, discs_feasible, mate_clearance, run_yield
from geom.yieldrun import interface_margin
from geom.yieldspec import INSIDE, PositionModel, ProcessSpec, SizeModel, capability_to_normal, default_axis_sigma
from geom.yieldstats import clopper_pearson, linear_stack, needed_samples

ROOT = Path(__file__).resolve().parent.parent
SCENES = sorted((ROOT / "scenes").glob("*.toml"))


def two(hole_tol="", pin_tol="", extra=""):
    return loads(f"""units = "mm"
[[feature]]
id = "h"
kind = "hole"
limits = [10.0, 10.02]
length = 10
{hole_tol}
[[feature]]
id = "p"
kind = "pin"
limits = [9.99, 10.0]
length = 10
{pin_tol}
[[mate]]
hole = "h"
pin = "p"
{extra}""")


def inside(x, n, p, conf=0.99):
    lo, hi = clopper_pearson(x, n, conf)
    return lo <= p <= hi


def test_normal_clearance_matches_phi():
    # clearance = H - P, both normal: P(c < 0) = Phi(-mean / sigma), sigma = sqrt(sh^2 + sp^2)
    # (normal distribution of a difference of independent normals, any statistics text)
    from scipy.stats import norm

    sc = two(extra="""[[process]]
feature = "h"
size = { model = "normal", mean = 10.005, sigma = 0.004 }
[[process]]
feature = "p"
size = { model = "normal", mean = 9.998, sigma = 0.003 }""")
    r = run_yield(sc, samples=40000, seed=11)
    p = float(norm.cdf(-(10.005 - 9.998) / math.hypot(0.004, 0.003)))  # Phi(-1.4) = 0.0808
    assert abs(p - 0.0808) < 1e-4  # tabulated standard normal, any statistics text
    assert inside(r.failures, r.samples, p)
    assert r.p_ci[0] < r.p_interference < r.p_ci[1]


def test_rayleigh_tail_rejections():
    # per-axis sigma s: P(2r > t) = exp(-t^2 / (8 s^2)) (Rayleigh tail; Papoulis, Probability,
    # Random Variables and Stochastic Processes, from memory). RFS and a uniform size inside the
    # limits: only the axis rejects the hole.
    tol = """[feature.tolerance]
characteristic = "perpendicularity"
value = 0.02
datums = ["A"]"""
    for sigma in (0.005, 0.008):
        sc = two(tol, extra=f"""[[process]]
feature = "h"
size = {{ model = "uniform" }}
position = {{ model = "normal", sigma = {sigma} }}""")
        r = run_yield(sc, samples=30000, seed=5)
        rej = {j.feature: j for j in r.rejections}["h"]
        p = math.exp(-0.02 ** 2 / (8 * sigma ** 2))
        assert inside(round(rej.fraction * r.samples), r.samples, p)


def test_default_axis_sigma_puts_9973_percent_inside():
    # the default: P(2r > t) = 0.0027 (the +-3 sigma share, common practice, no source)
    s = default_axis_sigma(0.05)
    assert math.isclose(math.exp(-0.05 ** 2 / (8 * s * s)), INSIDE, rel_tol=1e-12)
    sc = two("""[feature.tolerance]
characteristic = "perpendicularity"
value = 0.05
datums = ["A"]""", extra="""[[process]]
feature = "h"
size = { model = "uniform" }""")
    r = run_yield(sc, samples=60000, seed=2)
    rej = {j.feature: j for j in r.rejections}["h"]
    assert inside(round(rej.fraction * r.samples), r.samples, INSIDE)


def test_capability_definitions():
    # Cp = (USL - LSL) / (6 sigma), Cpk = min(USL - mean, mean - LSL) / (3 sigma) (ISO 22514-2,
    # common definitions, from memory)
    for mmc_low, toward in ((True, "mmc"), (False, "mmc"), (True, "lmc")):
        m, s = capability_to_normal(10.0, 10.02, 1.33, 1.0, mmc_low, toward)
        assert math.isclose(0.02 / (6 * s), 1.33)
        assert math.isclose(min(10.02 - m, m - 10.0) / (3 * s), 1.0)
        assert (m < 10.01) == (mmc_low == (toward == "mmc"))


def test_linear_stack_rss_vs_worst_case():
    # A linear stack of four contributors in the manner of the worst-case and RSS examples of
    # Drake (ed.), Dimensioning and Tolerancing Handbook (McGraw-Hill, 1999), the chapter on
    # traditional tolerance stack-ups (from memory); the numbers are ours: gap = 50 - 20 - 15 - 14.6
    # with +-0.10, +-0.05, +-0.05, +-0.08.
    rows = [("a", 50.0, 0.10), ("b", -20.0, 0.05), ("c", -15.0, 0.05), ("d", -14.6, 0.08)]
    sk = linear_stack(rows, 0.0, 0.0)
    assert math.isclose(sk.nominal, 0.4, abs_tol=1e-12)
    assert math.isclose(sk.worst_case_min, 0.4 - 0.28, abs_tol=1e-12)  # sum |t_i| = 0.28
    assert math.isclose(sk.rss_min, 0.4 - math.sqrt(0.0214), abs_tol=1e-12)  # sqrt(sum t_i^2) = 0.1463
    # Monte Carlo of the same stack, each part normal with sigma = t / 3: the clearance's sigma is
    # RSS / 3 (sum of independent normals); its 99 % chi-square interval holds it
    from scipy.stats import chi2

    rng = np.random.default_rng(3)
    n = 50000
    g = sum(m + h / 3 * rng.standard_normal(n) * (1 if m > 0 else -1) for _, m, h in rows)
    s2 = g.var(ddof=1)
    lo, hi = (n - 1) * s2 / chi2.ppf(0.995, n - 1), (n - 1) * s2 / chi2.ppf(0.005, n - 1)
    assert lo <= (math.sqrt(0.0214) / 3) ** 2 <= hi


def test_mate_stack_worst_case_is_fits():
    sc = load(ROOT / "scenes" / "valve_body_guide_pin.toml")
    r = run_yield(sc, samples=2000)
    wc = analyse_mate(analyse_feature(sc.features[0]), analyse_feature(sc.features[1])).clearance_min
    assert math.isclose(r.stack.worst_case_min, wc, abs_tol=1e-12)
    assert r.worst_case == wc


@pytest.mark.parametrize("path", SCENES, ids=lambda p: p.stem)
def test_degenerate_worst_case_reproduces_fits(path):
    sc = load(path)
    for m in sc.mates:
        h, p = sc.feature(m.hole), sc.feature(m.pin)
        if any(f.tolerance is not None and f.tolerance.projected for f in (h, p)):
            continue
        wc = analyse_mate(analyse_feature(h, sc.standard), analyse_feature(p, sc.standard)).clearance_min
        sh, sp = Sampler(h, ProcessSpec(h.id)), Sampler(p, ProcessSpec(p.id))
        th, tp = tolerance_at_mmc(h) or 0.0, tolerance_at_mmc(p) or 0.0
        c = mate_clearance(sh, sp, np.array([h.mmc]), np.array([p.mmc]), np.array([[th / 2, 0.0]]),
                           np.array([[-tp / 2, 0.0]]))
        assert abs(c[0] - wc) <= 1e-12


def test_interface_degenerate_reproduces_mate_patterns():
    # the pump demo at its worst case: every hole at MMC, its axis t1/2 radially outward; every stud
    # at MMC, t2/2 inward; no relative translation helps all four at once, so the margin is the
    # worst-case pair clearance hole VC - pin VC (geom.patterns.mate_patterns)
    from geom.frames import analyse_frames

    sc = load(ROOT / "scenes" / "pump_cover_bolts.toml")
    fr = analyse_frames(sc)
    wc = min(pc.clearance_min.value for pc in fr.interfaces[0].mate.pairs)
    pat = fr.patterns[0].pattern
    u = np.array([np.array(b) / math.hypot(*b) for b in pat.locations])[None]
    t1, t2 = 0.150, 0.100
    m = interface_margin(0.5 * t1 * u, -0.5 * t2 * u, np.full((1, 4), (9.0 - 8.7) / 2), np.array([0.005]))
    assert abs(m[0] - wc) < 2 * 0.15 / 2 ** 24 + 1e-12  # the bisection's resolution (24 halvings)


@settings(max_examples=60, deadline=None)
@given(st.integers(0, 10**6))
def test_discs_against_shapely(seed):
    from shapely.geometry import Point

    rng = np.random.default_rng(seed)
    k = int(rng.integers(2, 6))
    c = rng.uniform(-1, 1, (1, k, 2))
    r = rng.uniform(0.2, 1.5, (1, k))
    inter = Point(*c[0, 0]).buffer(r[0, 0], 256)
    for i in range(1, k):
        inter = inter.intersection(Point(*c[0, i]).buffer(r[0, i], 256))
    ours = bool(discs_feasible(c, r)[0])
    # polygons approximate the circles: judge only clear cases (shrunk or grown by 1e-3)
    grown = bool(discs_feasible(c, r + 1e-3)[0])
    shrunk = bool(discs_feasible(c, r - 1e-3)[0])
    if shrunk:
        assert ours and not inter.is_empty
    if not grown:
        assert not ours and inter.is_empty


def test_seeded_and_chunking_independent():
    sc = load(ROOT / "scenes" / "valve_body_guide_pin.toml")
    seen = []
    a = run_yield(sc, samples=3 * BLOCK + 17, seed=9, chunk=BLOCK, progress=lambda d, t: seen.append((d, t)))
    b = run_yield(sc, samples=3 * BLOCK + 17, seed=9, chunk=4 * BLOCK)
    c = run_yield(sc, samples=3 * BLOCK + 17, seed=10)
    assert np.array_equal(a.clearance, b.clearance)
    assert not np.array_equal(a.clearance, c.clearance)
    assert seen[-1] == (3 * BLOCK + 17, 3 * BLOCK + 17) and len(seen) == 4


def test_cancel():
    from geom.yieldmc import YieldCancelled

    sc = load(ROOT / "scenes" / "valve_body_guide_pin.toml")
    with pytest.raises(YieldCancelled):
        run_yield(sc, samples=10, cancel=lambda: True)


@settings(max_examples=15, deadline=None)
@given(st.floats(0.001, 0.01), st.floats(1.05, 3.0))
def test_interference_monotone_in_axis_sigma(sigma, k):
    # common random numbers: the same draws scaled by a larger sigma never turn an interfering
    # assembly into one that assembles (the clearance falls with 2 |relative error|)
    def scene(s):
        return two("""[feature.tolerance]
characteristic = "perpendicularity"
value = 0.02
datums = ["A"]""", """[feature.tolerance]
characteristic = "perpendicularity"
value = 0.01
datums = ["A"]""", extra=f"""[[process]]
feature = "h"
position = {{ sigma = {sigma!r} }}
[[process]]
feature = "p"
position = {{ sigma = {sigma / 2!r} }}""")
    a = run_yield(scene(sigma), samples=4000, seed=1)
    b = run_yield(scene(sigma * k), samples=4000, seed=1)
    assert np.all(b.clearance <= a.clearance + 1e-15)
    assert b.failures >= a.failures


def test_needed_samples():
    # n = z^2 p (1 - p) / h^2 (normal approximation to the binomial); zero failures: the rule of
    # three, n = 3 / h at 95 % (Hanley and Lippman-Hand 1983, from memory)
    nd = needed_samples(0.01, 0.001, 0.95)
    assert nd.n_normal == math.ceil(1.959963984540054 ** 2 * 0.01 * 0.99 / 1e-6)
    assert abs(needed_samples(0.0, 0.001, 0.95).n_zero - 3 / 0.001) < 10
    # Clopper-Pearson with zero failures: upper end 1 - (alpha/2)^(1/n) (closed form of the beta quantile)
    assert math.isclose(clopper_pearson(0, 1000)[1], 1 - 0.025 ** (1 / 1000), rel_tol=1e-9)


def test_process_models_used():
    # the sizes drawn follow the resolved model
    from geom.model import Feature, Kind

    f = Feature("h", Kind.HOLE, (10.0, 10.02), 10.0)
    s = Sampler(f, ProcessSpec("h", SizeModel("capability", cp=1.0, cpk=0.5), PositionModel()))
    sz, _ = s.draw(np.random.default_rng(1), 20000)
    m, sd = capability_to_normal(10.0, 10.02, 1.0, 0.5, True)
    assert abs(sz.mean() - m) < 4 * sd / math.sqrt(20000)
