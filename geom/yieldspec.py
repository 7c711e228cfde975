"""Values of the statistical fit: each feature's process (size distribution, axis error model)
and the run settings (``[[process]]`` and ``[yield]`` tables of a scene).

Defaults (printed as assumptions by every output):

- size: normal, centred between the limits, sigma = size tolerance / 6 (a +-3 sigma process
  filling the limits, common practice, no source);
- axis error: independent normal x and y errors of per-axis sigma s, so the radial error r is
  Rayleigh, P(r > x) = exp(-x^2 / (2 s^2)). The diametral zone needed is 2r, so
  P(2r > t) = exp(-t^2 / (8 s^2)); asking that 99.73 % of axes lie in the stated zone t (at MMC)
  gives exp(-t^2 / (8 s^2)) = 0.0027, i.e. s = t / sqrt(8 ln(1 / 0.0027)). An orientation
  tolerance is sampled the same way: the error vector is half the tilt of the axis over the
  length, so the zone it needs is again 2r.
- capability: Cp = (USL - LSL) / (6 sigma), Cpk = (distance of the mean to the nearer limit) /
  (3 sigma) (ISO 22514-2, common definitions): sigma = T / (6 Cp), the mean 3 sigma Cpk inside
  the limit on the MMC side (default) or the LMC side.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

SIZE_MODELS = ("normal", "capability", "uniform")
POSITION_MODELS = ("normal",)
TOWARD = ("mmc", "lmc")
INSIDE = 0.0027  # the share of axes outside the stated zone by default (+-3 sigma, two-sided normal)
DEFAULT_SAMPLES = 100_000
DEFAULT_SEED = 1
DEFAULT_CONFIDENCE = 0.95
MAX_SAMPLES = 5_000_000


def default_axis_sigma(t: float) -> float:
    """Per-axis sigma that puts 99.73 % of axes inside a diametral zone t (Rayleigh tail).

    >>> round(default_axis_sigma(0.1) * math.sqrt(8 * math.log(1 / INSIDE)), 12)
    0.1
    """
    return t / math.sqrt(8.0 * math.log(1.0 / INSIDE))


def capability_to_normal(lo: float, hi: float, cp: float, cpk: float, mmc_low: bool, toward: str = "mmc"):
    """(mean, sigma) from Cp and Cpk against the limits; ``mmc_low``: the MMC is the lower limit
    (a hole). The mean sits toward the MMC limit by default.

    >>> m, s = capability_to_normal(10.0, 10.06, 1.0, 1.0, True)
    >>> round(m, 9), round(s, 9)
    (10.03, 0.01)
    """
    sigma = (hi - lo) / (6.0 * cp)
    d = 3.0 * sigma * cpk
    low_side = mmc_low if toward == "mmc" else not mmc_low
    return (lo + d if low_side else hi - d), sigma


@dataclass(frozen=True)
class SizeModel:
    """``normal`` (mean, sigma; None: centred, tolerance / 6), ``capability`` (cp, cpk, toward)
    or ``uniform`` (between the limits)."""

    model: str = "normal"
    mean: float | None = None
    sigma: float | None = None
    cp: float | None = None
    cpk: float | None = None
    toward: str = "mmc"


@dataclass(frozen=True)
class PositionModel:
    """``normal``: per-axis sigma of the axis error (None: the 99.73 % default)."""

    model: str = "normal"
    sigma: float | None = None


@dataclass(frozen=True)
class ProcessSpec:
    feature: str
    size: SizeModel = SizeModel()
    position: PositionModel = PositionModel()


@dataclass(frozen=True)
class StatSpec:
    processes: tuple[ProcessSpec, ...] = ()
    samples: int = DEFAULT_SAMPLES
    seed: int = DEFAULT_SEED
    confidence: float = DEFAULT_CONFIDENCE
    precision: float | None = None

    def process(self, fid: str) -> ProcessSpec:
        for p in self.processes:
            if p.feature == fid:
                return p
        return ProcessSpec(fid)
