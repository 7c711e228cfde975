"""Statistics of a yield run: P(interference) with its Clopper-Pearson interval, the parts
rejected by each feature's own tolerance and how many of those would still assemble, the
linear clearance stack (worst case beside RSS and the Monte Carlo mean - 3 sigma), the percent
contribution of each input and the sample size a stated precision needs."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

HIST_BINS = 60


@dataclass(frozen=True)
class Rejection:
    feature: str
    fraction: float  # of parts (assemblies) this feature's own tolerance rejects
    assemble_fraction: float | None  # of those, the share whose assembly still has clearance >= 0


@dataclass(frozen=True)
class Stack:
    """Linear clearance stack: contributor ``names`` with range ``mids`` and half-ranges ``halves``."""

    names: tuple[str, ...]
    mids: tuple[float, ...]
    halves: tuple[float, ...]
    nominal: float  # sum of the mids
    worst_case_min: float  # nominal - sum |half|  (worst case: the halves add)
    rss_min: float  # nominal - sqrt(sum half^2)  (RSS)
    mc_mean: float
    mc_sigma: float

    @property
    def mc_low(self) -> float:
        return self.mc_mean - 3.0 * self.mc_sigma


@dataclass(frozen=True)
class Needed:
    precision: float | None
    n_normal: int | None  # z^2 p (1 - p) / h^2 at the estimated p
    n_zero: int | None  # zero failures: n = ln(1 / (1 - confidence)) / h (the rule of three at 95 %)


@dataclass(frozen=True)
class YieldResult:
    kind: str
    index: int
    label: str
    samples: int
    seed: int
    confidence: float
    clearance: np.ndarray = field(compare=False, repr=False)
    hist_counts: np.ndarray = field(compare=False, repr=False)
    hist_edges: np.ndarray = field(compare=False, repr=False)
    worst_case: float = 0.0
    failures: int = 0
    p_interference: float = 0.0
    p_ci: tuple[float, float] = (0.0, 1.0)
    rejections: tuple[Rejection, ...] = ()
    rejected_fraction: float = 0.0
    rejected_assemble_fraction: float | None = None
    stack: Stack | None = None
    contributions: tuple[tuple[str, float], ...] = ()
    needed: Needed | None = None
    assumptions: tuple[str, ...] = ()


def clopper_pearson(x: int, n: int, confidence: float = 0.95) -> tuple[float, float]:
    """Exact binomial interval (Clopper and Pearson 1934) from beta quantiles; 0 (n) failures
    give a lower (upper) end of exactly 0 (1).

    >>> lo, hi = clopper_pearson(0, 1000)
    >>> lo, round(hi, 6)
    (0.0, 0.003682)
    """
    from scipy.stats import beta

    a = 1.0 - confidence
    lo = 0.0 if x == 0 else float(beta.ppf(a / 2, x, n - x + 1))
    hi = 1.0 if x == n else float(beta.ppf(1 - a / 2, x + 1, n - x))
    return lo, hi


def needed_samples(p: float, precision: float | None, confidence: float) -> Needed:
    """Sample size for a half-width ``precision`` of the interval on P: the normal approximation
    n = z^2 p (1 - p) / h^2 (None at p = 0) and, for zero failures, n = ln(1/(1 - confidence)) / h
    (3 / h at 95 %, the rule of three).

    >>> needed_samples(0.01, 0.001, 0.95).n_normal, needed_samples(0.0, 0.001, 0.95).n_zero
    (38031, 2996)
    """
    if precision is None:
        return Needed(None, None, None)
    from scipy.stats import norm

    z = float(norm.ppf(0.5 + confidence / 2))
    nn = math.ceil(z * z * p * (1 - p) / precision ** 2) if 0 < p < 1 else None
    return Needed(precision, nn, math.ceil(math.log(1.0 / (1.0 - confidence)) / precision))


def linear_stack(rows, mc_mean: float, mc_sigma: float) -> Stack:
    """Worst case (sum of half-ranges) and RSS (root sum of their squares) of a linear stack."""
    names = tuple(r[0] for r in rows)
    mids = tuple(float(r[1]) for r in rows)
    halves = tuple(float(r[2]) for r in rows)
    nom = sum(mids)
    return Stack(names, mids, halves, nom, nom - sum(abs(h) for h in halves),
                 nom - math.sqrt(sum(h * h for h in halves)), mc_mean, mc_sigma)


def contributions(clearance: np.ndarray, inputs: dict[str, np.ndarray]) -> tuple[tuple[str, float], ...]:
    """Percent contribution of each input: its squared correlation with the clearance, the shares
    normalised to 100 % (for independent inputs of a linear stack these are the variance shares)."""
    sc = clearance.std()
    r2 = {}
    for k, x in inputs.items():
        sx = x.std()
        r2[k] = 0.0 if sx == 0 or sc == 0 else float(np.corrcoef(x, clearance)[0, 1] ** 2)
    tot = sum(r2.values())
    return tuple((k, 100.0 * v / tot if tot > 0 else 0.0) for k, v in r2.items())


def histogram(clearance: np.ndarray, worst_case: float, bins: int = HIST_BINS):
    """Counts and edges over the sampled range widened to show zero and the worst case."""
    lo = min(float(clearance.min()), worst_case, 0.0)
    hi = max(float(clearance.max()), worst_case, 0.0)
    if hi <= lo:
        hi = lo + 1e-9
    return np.histogram(clearance, bins=bins, range=(lo, hi))


def summarise(scene, spec, kind, index, n, seed, data: dict, info: dict) -> YieldResult:
    c = data["clearance"]
    ok = data["assembles"]
    x = int(n - ok.sum())
    rej_any = np.zeros(n, dtype=bool)
    rejs = []
    for key, v in data.items():
        if key.startswith("rej:"):
            rej_any |= v
            k = int(v.sum())
            rejs.append(Rejection(key[4:], k / n, float(ok[v].mean()) if k else None))
    kr = int(rej_any.sum())
    inputs = {k[3:]: v for k, v in data.items() if k.startswith("in:")}
    counts, edges = histogram(c, info["worst_case"])
    feats = info["features"]
    assumptions = tuple(f"'{s.f.id}': {s.size_words}; {s.pos_words}" for s in feats) + info["assumptions"] + (
        "each part's bonus comes from its own sampled size, so size and axis tolerance stay correlated",
        f"{n} assemblies, seed {seed}: the same seed gives the same numbers",
    )
    p = x / n
    return YieldResult(
        kind, index, info["label"], n, seed, spec.confidence, c, counts, edges, float(info["worst_case"]),
        x, p, clopper_pearson(x, n, spec.confidence), tuple(rejs), kr / n,
        float(ok[rej_any].mean()) if kr else None,
        linear_stack(info["stack"], float(c.mean()), float(c.std(ddof=1)) if n > 1 else 0.0),
        contributions(c, inputs), needed_samples(p, spec.precision, spec.confidence), assumptions)
