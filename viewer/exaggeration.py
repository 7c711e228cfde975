"""The one exaggeration system of the pictures (3D scene and 2D views).

Tolerances are tiny against sizes, so every picture exaggerates radial and lateral deviations by
a factor k about a reference radius. k is always a round number of one series
(:data:`NICE` x 10^n) so the same deviation is drawn the same way in every view, and every
picture states k. Pure: no pyvista, no matplotlib.

>>> nice_floor(137.0), nice_floor(0.4), nice_floor(26.0)
(100.0, 1.0, 25.0)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from geom.analysis import SceneResult
from geom.boundaries import tolerance_allowed, tolerance_max
from geom.model import Feature

NICE = (8.0, 6.0, 5.0, 4.0, 3.0, 2.5, 2.0, 1.5, 1.0)


def nice_floor(x: float) -> float:
    """Largest of 1, 1.5, 2, 2.5, 3, 4, 5, 6, 8 x 10^n not above x (at least 1)."""
    if x <= 1.0:
        return 1.0
    e = 10.0 ** math.floor(math.log10(x))
    for m in NICE:
        if m * e <= x * (1 + 1e-12):
            return m * e
    return e


def _zone_mmc(f: Feature) -> float:
    return 0.0 if f.tolerance is None else tolerance_allowed(f, f.mmc)


def _involved(res: SceneResult, mate_index: int | None, feature_id: str | None) -> list[Feature]:
    sc = res.scene
    if mate_index is not None:
        m = sc.mates[mate_index]
        return [sc.feature(m.hole), sc.feature(m.pin)]
    if feature_id is not None:
        return [sc.feature(feature_id)]
    return list(sc.features)


def auto_exaggeration(res: SceneResult, mate_index: int | None = None, feature_id: str | None = None,
                      target: float = 0.10) -> float:
    """Radial exaggeration that draws the largest tolerance zone of the worst case (every
    feature at MMC; computed from the scene, not from a what-if state, so it does not jump
    while a slider moves) at about ``target`` times the hole diameter, rounded down to a round
    number (:data:`NICE` x 10^n), and never so large that a drawn radius falls
    below a third of the reference radius. Without any zone the size tolerance is used."""
    feats = _involved(res, mate_index, feature_id)
    if not feats:  # a scene of fasteners only: nothing toleranced to scale
        return 1.0
    ref = feats[0]
    D = ref.mmc
    dev = max(_zone_mmc(f) for f in feats)
    if dev <= 0:
        dev = max(f.size_tolerance for f in feats)
    if dev <= 0 or D <= 0:
        return 1.0
    k = target * D / dev
    R0 = D / 2.0
    r_min = R0
    for f in feats:
        lo = min(f.limits) - tolerance_max(f)  # smallest radius any drawn boundary can have
        r_min = min(r_min, lo / 2.0)
    if r_min < R0:
        k = min(k, (2.0 / 3.0) * R0 / (R0 - r_min))
    return nice_floor(k)


@dataclass(frozen=True)
class Exaggeration:
    """Display mapping: radial deviations about ``r0`` times ``k``, axis offsets times ``k``.

    A curve at true distance r from the nominal axis is drawn at ``r_disp + k (r - r0)``; an
    axis or zone at true lateral offset x at ``k x``. ``r_disp`` equals ``r0`` unless the
    drawing is shortened (a wide, short feature in section).
    """

    k: float
    r0: float
    r_disp: float

    def radial(self, r):
        return self.r_disp + self.k * (np.asarray(r, dtype=float) - self.r0)

    def unradial(self, rd):
        return self.r0 + (np.asarray(rd, dtype=float) - self.r_disp) / self.k

    def lateral(self, x):
        return self.k * np.asarray(x, dtype=float)

    def unlateral(self, xd):
        return np.asarray(xd, dtype=float) / self.k

    def wall(self, s, half, side):
        """Display x of a wall at half-width ``half`` beside an axis at lateral ``s``
        (``side`` = +1 or -1): it moves with the axis, its radius is exaggerated about r0."""
        return self.lateral(s) + side * self.radial(half)

    def map_polar(self, xy):
        """Map points (n, 2) given relative to the nominal axis: radius exaggerated, direction kept."""
        xy = np.asarray(xy, dtype=float)
        r = np.hypot(xy[:, 0], xy[:, 1])
        r = np.where(r == 0.0, 1e-300, r)
        return xy * (self.radial(r) / r)[:, None]

    def unmap_polar(self, xy):
        xy = np.asarray(xy, dtype=float)
        r = np.hypot(xy[:, 0], xy[:, 1])
        r = np.where(r == 0.0, 1e-300, r)
        return xy * (self.unradial(r) / r)[:, None]

    @property
    def shortened(self) -> bool:
        return abs(self.r_disp - self.r0) > 1e-12 * max(1.0, self.r0)

    def label(self, units) -> str:
        s = f"radial deviations ×{self.k:g} about ⌀{units.fmt(2 * self.r0)}"
        if self.shortened:
            s += "; diameter shortened (not to scale)"
        return s + " — dimension texts are TRUE values"


def auto_k(spread: float, r_disp: float, fill: float = 0.4) -> float:
    """Largest round step k (:func:`nice_floor`, at least 1) with k * spread <= fill * r_disp:
    deviations visible, shapes kept.

    >>> auto_k(0.05, 4.0), auto_k(0.0, 4.0)
    (30.0, 1.0)
    """
    if spread <= 0 or r_disp <= 0:
        return 1.0
    return nice_floor(fill * r_disp / spread)
