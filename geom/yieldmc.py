"""Monte Carlo of the statistical fit: per assembly, each part's size first, then its axis error;
each part judged by its own tolerance (the bonus from its sampled size); the clearance by the
same geometry as the worst-case analysis (:func:`geom.analysis.analyse_mate`,
:func:`geom.patterns.mate_patterns`).

Geometry. A feature's axis error is a vector ``a`` (scene units) whose diametral zone needed is
2|a| (position: the axis offset; orientation: half its tilt over the length). A hole receives a
pin with diametral clearance ``hole size - pin size - 2|a_hole - a_pin|``: at MMC with the whole
tolerance used in opposite directions this is the worst case ``VC(hole) - VC(pin)``. Two
patterns assemble when one relative translation ``d`` puts every pin inside its hole:
|d - (b_i - a_i)| <= (H_i - P_i) / 2 for every member and |d| <= the pilot clearance / 2 (the
sampled pilot sizes and their orientation errors, as in the worst case); a non-empty
intersection of discs, found among the disc centres and the pairwise circle intersection points
(Helly's theorem in the plane reduces it to such points). Rotation is not used to help.

Runs are seeded (``numpy.random.Generator(PCG64(seed))``, one jumped stream per block of
:data:`BLOCK` assemblies), so a seed gives the same numbers whatever the chunk size.
"""

from __future__ import annotations

import numpy as np

from .model import Characteristic, Feature, Kind, Material, Scene, Zone
from .yieldspec import DEFAULT_SAMPLES, MAX_SAMPLES, ProcessSpec, StatSpec, capability_to_normal, default_axis_sigma

BLOCK = 1 << 16  # assemblies per random stream
SLACK = 1e-9


class YieldCancelled(Exception):
    """The run was cancelled through its ``cancel`` callback."""


# ---------------------------------------------------------------- one feature's process


class Sampler:
    """A feature's resolved process: size distribution and axis error model, with the words."""

    def __init__(self, f: Feature, proc: ProcessSpec):
        self.f = f
        lo, hi = f.limits
        s = proc.size
        if s.model == "uniform":
            self.size = ("uniform", lo, hi)
            self.size_words = f"size uniform between the limits {lo:g} .. {hi:g}"
        elif s.model == "capability":
            m, sd = capability_to_normal(lo, hi, s.cp, s.cpk, f.kind is Kind.HOLE, s.toward)
            self.size = ("normal", m, sd)
            self.size_words = (f"size normal from Cp {s.cp:g}, Cpk {s.cpk:g} toward {s.toward.upper()}: "
                               f"mean {m:.6g}, sigma {sd:.3g}")
        else:
            m = s.mean if s.mean is not None else (lo + hi) / 2.0
            sd = s.sigma if s.sigma is not None else (hi - lo) / 6.0
            self.size = ("normal", m, sd)
            self.size_words = (f"size normal, mean {m:.6g}" + (" (default: centred)" if s.mean is None else "")
                               + f", sigma {sd:.3g}" + (" (default: size tolerance / 6)" if s.sigma is None else ""))
        tol = f.tolerance
        self.axis = tol is not None
        self.width = tol is not None and tol.zone is Zone.WIDTH
        self.straight = tol is not None and tol.characteristic is Characteristic.STRAIGHTNESS
        if tol is None:
            self.sigma = 0.0
            self.pos_words = "no geometric tolerance: axis taken as perfect"
        else:
            t = tol.value if tol.material is not Material.LMC else tol.value + f.size_tolerance
            u = proc.position.sigma
            self.sigma = u if u is not None else default_axis_sigma(t) if t > 0 else default_axis_sigma(f.size_tolerance)
            how = "in x only (width zone)" if self.width else "x and y independent (radial error Rayleigh)"
            self.pos_words = (f"axis error normal, per-axis sigma {self.sigma:.3g}, {how}"
                              + (" (default: 99.73 % of axes inside the stated zone at MMC)" if u is None else ""))

    def draw(self, rng: np.random.Generator, shape) -> tuple[np.ndarray, np.ndarray]:
        """(sizes of ``shape``, axis errors of ``shape + (2,)``); the draws' count and order do not
        depend on the parameter values (common random numbers)."""
        if self.size[0] == "uniform":
            sz = rng.uniform(self.size[1], self.size[2], shape)
        else:
            sz = self.size[1] + self.size[2] * rng.standard_normal(shape)
        e = rng.standard_normal(tuple(np.atleast_1d(shape)) + (2,)) * self.sigma
        if self.width:
            e[..., 1] = 0.0
        if not self.axis:
            e[...] = 0.0
        return sz, e

    def allowed(self, size: np.ndarray) -> np.ndarray:
        """t + bonus at each sampled size (the bonus from the sampled size; RFS none)."""
        tol = self.f.tolerance
        if tol is None:
            return np.zeros_like(size)
        if tol.material is Material.RFS:
            return np.full_like(size, tol.value)
        ref = self.f.mmc if tol.material is Material.MMC else self.f.lmc
        return tol.value + np.clip(np.abs(size - ref), 0.0, self.f.size_tolerance)

    def conforms(self, size: np.ndarray, e: np.ndarray) -> np.ndarray:
        lo, hi = self.f.limits
        ok = (size >= lo - SLACK) & (size <= hi + SLACK)
        if self.axis:
            ok &= 2.0 * np.hypot(e[..., 0], e[..., 1]) <= self.allowed(size) + SLACK
        return ok


def samplers(scene: Scene, spec: StatSpec | None) -> dict:
    spec = spec or StatSpec()
    return {f.id: Sampler(f, spec.process(f.id)) for f in scene.features}


# ---------------------------------------------------------------- geometry


def mate_clearance(hole: Sampler, pin: Sampler, hs, ps, eh, ep) -> np.ndarray:
    """Diametral clearance of a hole over a pin: sizes minus twice the relative axis error
    (straightness: the bend counts in full, adversely)."""
    vh = eh if not hole.straight else 0.0 * eh
    vp = ep if not pin.straight else 0.0 * ep
    rel = vh - vp
    c = hs - ps - 2.0 * np.hypot(rel[..., 0], rel[..., 1])
    for s, e in ((hole, eh), (pin, ep)):
        if s.straight:
            c = c - 2.0 * np.hypot(e[..., 0], e[..., 1])
    return c


def discs_feasible(c: np.ndarray, r: np.ndarray, eps: float = 1e-12) -> np.ndarray:
    """Do the discs (centres ``c`` (N, k, 2), radii ``r`` (N, k)) share a point? Vectorised over N.

    Candidates: the centres and the pairwise circle intersection points; if the intersection is
    not empty it holds one of them (a disc inside all others holds its centre; otherwise the
    intersection's boundary has a corner where two circles cross)."""
    n, k = r.shape
    cand = [c]
    ii, jj = np.triu_indices(k, 1)
    if len(ii):
        ci, cj, ri, rj = c[:, ii], c[:, jj], r[:, ii], r[:, jj]
        dv = cj - ci
        d = np.hypot(dv[..., 0], dv[..., 1])
        ds = np.where(d > 0, d, 1.0)
        a = (ri ** 2 - rj ** 2 + d ** 2) / (2.0 * ds)
        h = np.sqrt(np.clip(ri ** 2 - a ** 2, 0.0, None))
        u = dv / ds[..., None]
        perp = np.stack([-u[..., 1], u[..., 0]], axis=-1)
        base = ci + a[..., None] * u
        cand += [base + h[..., None] * perp, base - h[..., None] * perp]
    p = np.concatenate(cand, axis=1)  # (N, m, 2)
    dx = p[:, :, None, 0] - c[:, None, :, 0]
    dy = p[:, :, None, 1] - c[:, None, :, 1]
    rr = np.clip(r, 0.0, None)[:, None, :] + eps * (1.0 + np.abs(r[:, None, :]))
    ok = dx * dx + dy * dy <= rr * rr
    return (ok.all(axis=2) & (r >= -eps).all(axis=1)[:, None]).any(axis=1)


def discs_margin(c: np.ndarray, r: np.ndarray, shrink: np.ndarray | None = None, iters: int = 24) -> np.ndarray:
    """max over d of min_i 2 (r_i - |d - c_i|) over the discs marked in ``shrink`` (default all),
    d kept inside the other discs (a fixed constraint such as the pilot clearance): the largest
    common margin (diametral), by bisection on a uniform shrink of the marked discs. Its sign is
    that of :func:`discs_feasible`. Where the fixed discs alone share no point the margin is
    2 x the most negative fixed radius (the pilots themselves interfere). The fixed discs, if
    any, must hold the first fixed disc's centre (true of one disc)."""
    k = r.shape[1]
    shrink = np.ones(k, dtype=bool) if shrink is None else np.asarray(shrink, dtype=bool)
    feas = discs_feasible(c, r)
    if shrink.all():
        c0 = c.mean(axis=1, keepdims=True)
    else:
        c0 = c[:, [int(np.flatnonzero(~shrink)[0])]]
    dist0 = np.hypot(*(c - c0).transpose(2, 0, 1))
    low = (r - dist0)[:, shrink].min(axis=1)  # feasible at c0
    high = r[:, shrink].min(axis=1)
    lo = np.where(feas, 0.0, low)
    hi = np.where(feas, high, 0.0)
    for _ in range(iters):
        mid = 0.5 * (lo + hi)
        ok = discs_feasible(c, r - mid[:, None] * shrink)
        lo = np.where(ok, mid, lo)
        hi = np.where(ok, hi, mid)
    out = 2.0 * np.where(feas, lo, hi)
    if not shrink.all():
        fixed_bad = r[:, ~shrink].min(axis=1)
        out = np.where(fixed_bad < 0, 2.0 * fixed_bad, out)
    return out


# ---------------------------------------------------------------- targets and runs


def targets(scene: Scene) -> list[tuple[str, int, str]]:
    """What can be run: ("mate", i, label) and ("interface", i, label)."""
    out = [("mate", i, f"{m.hole} / {m.pin}") for i, m in enumerate(scene.mates)]
    out += [("interface", i, f"{it.holes} over {it.pins}") for i, it in enumerate(scene.interfaces)]
    return out


def _stream(seed: int, k: int) -> np.random.Generator:
    return np.random.Generator(np.random.PCG64(seed).jumped(k))


def _blocks(total, seed, chunk, progress, cancel, fn):
    """Run ``fn(rng, n)`` per block of :data:`BLOCK` (its own jumped stream); ``progress`` and
    ``cancel`` every ``chunk`` assemblies; the per-block outputs concatenated (dict of arrays)."""
    per = max(1, -(-int(chunk) // BLOCK))
    nblocks = -(-total // BLOCK)
    parts = []
    for b in range(nblocks):
        if b % per == 0:
            if cancel is not None and cancel():
                raise YieldCancelled("the yield run was cancelled")
            if progress is not None and b:
                progress(b * BLOCK, total)
        n = min(BLOCK, total - b * BLOCK)
        parts.append(fn(_stream(seed, b), n))
    if progress is not None:
        progress(total, total)
    return {k: np.concatenate([p[k] for p in parts]) for k in parts[0]}


def run_yield(scene: Scene, kind: str = "mate", index: int = 0, samples: int | None = None,
              seed: int | None = None, progress=None, cancel=None, chunk: int = 1 << 17):
    """Run the Monte Carlo of one mate or interface; a :class:`geom.yieldstats.YieldResult`.
    Bad input raises ValueError with a message."""
    from .yieldstats import summarise

    spec = scene.statistics or StatSpec()
    n = spec.samples if samples is None else samples
    seed = spec.seed if seed is None else seed
    if isinstance(n, bool) or not isinstance(n, int) or not 1 <= n <= MAX_SAMPLES:
        raise ValueError(f"samples: expected a whole number from 1 to {MAX_SAMPLES}, got {n!r}")
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise ValueError(f"seed: expected a whole number >= 0, got {seed!r}")
    sm = samplers(scene, spec)
    if kind == "mate":
        if not 0 <= index < len(scene.mates):
            raise ValueError(f"the scene has no mate {index + 1} (it has {len(scene.mates)})")
        from .yieldrun import mate_run
    elif kind == "interface":
        if not 0 <= index < len(scene.interfaces):
            raise ValueError(f"the scene has no interface {index + 1} (it has {len(scene.interfaces)})")
        from .yieldrun import interface_run as mate_run
    else:
        raise ValueError(f"kind: expected 'mate' or 'interface', got {kind!r}")
    fn, info = mate_run(scene, index, sm)
    data = _blocks(n, seed, chunk, progress, cancel, fn)
    return summarise(scene, spec, kind, index, n, seed, data, info)


__all__ = ["BLOCK", "DEFAULT_SAMPLES", "Sampler", "YieldCancelled", "discs_feasible", "discs_margin",
           "mate_clearance", "run_yield", "samplers", "targets"]
