"""The one exaggeration system of the pictures (3D scene and 2D views).

Tolerances are tiny against sizes (0.015 on 8 mm), so every picture exaggerates radial and
lateral deviations by a factor k about a reference radius. Two rules choose k, and both round
it down to a round number of one series, :data:`NICE` x 10^n (:func:`nice_floor`), so that
pictures of one scene use the same few factors and every picture can state its k:

* :func:`auto_exaggeration` (the 3D scene): from the scene alone (every feature at MMC), so k
  does not jump while a what-if slider moves; the largest zone drawn at about a tenth of the
  hole diameter.
* :func:`auto_k` (the 2D views): from the deviations actually drawn, which fill at most a
  fraction of the drawn radius.

:class:`Exaggeration` is the 2D display mapping (radii about r0, lateral offsets) and its
inverse, used to read true values back from a drawing. Pure: no pyvista, no matplotlib.

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
"""The mantissas of the round factors, largest first: k is one of them times a power of ten."""

_REL = 1e-12  # relative slack: 0.4 * 0.7 / 0.014 computes to 19.999999999999996 and still gives 20


def nice_floor(x: float) -> float:
    """The largest of 1, 1.5, 2, 2.5, 3, 4, 5, 6, 8 x 10^n not above ``x`` (within a relative
    1e-12, for ratios that miss a round value by rounding error), and at least 1.

    >>> [nice_floor(x) for x in (1.0, 1.49, 1.5, 7.99, 8.0, 9.99, 10.0)]
    [1.0, 1.0, 1.5, 6.0, 8.0, 8.0, 10.0]
    >>> nice_floor(0.4 * 0.7 / 0.014), nice_floor(2.5e4), nice_floor(-3.0)
    (20.0, 25000.0, 1.0)
    """
    if x <= 1.0:
        return 1.0
    e = 10.0 ** math.floor(math.log10(x))
    for m in NICE:
        if m * e <= x * (1 + _REL):
            return m * e
    return e


# ----------------------------------------------------------------------- 3D: from the scene


def _zone_mmc(f: Feature) -> float:
    """The tolerance zone at MMC (0 without a tolerance)."""
    return 0.0 if f.tolerance is None else tolerance_allowed(f, f.mmc)


def _involved(res: SceneResult, mate_index: int | None, feature_id: str | None) -> list[Feature]:
    """The features a 3D picture shows: the mate's hole and pin, one feature, or all of them.
    The first is the reference (its MMC diameter sets the scale)."""
    sc = res.scene
    if mate_index is not None:
        m = sc.mates[mate_index]
        return [sc.feature(m.hole), sc.feature(m.pin)]
    if feature_id is not None:
        return [sc.feature(feature_id)]
    return list(sc.features)


def auto_exaggeration(res: SceneResult, mate_index: int | None = None, feature_id: str | None = None,
                      target: float = 0.10) -> float:
    """The 3D scene's radial exaggeration.

    With D the reference feature's MMC diameter and t the largest tolerance zone at MMC among
    the features shown (the largest size tolerance when none has a zone), k = ``target`` D / t:
    the largest zone drawn at about ``target`` times the diameter. k is capped so that no drawn
    boundary radius falls below a third of R0 = D / 2: a radius r is drawn at R0 - k (R0 - r),
    and r_min is the smallest radius any drawn boundary can have (the smaller limit less the
    largest tolerance allowed, halved), so k <= (2/3) R0 / (R0 - r_min). The result is rounded
    down by :func:`nice_floor`; 1 when nothing is toleranced.

    >>> from geom.analysis import analyse_scene
    >>> from geom.model import Characteristic, Feature, Kind, Material, Mate, Scene, Tolerance, Units
    >>> tol = lambda t: Tolerance(Characteristic.PERPENDICULARITY, t, material=Material.MMC, datums=("A",))
    >>> hole = Feature("h", Kind.HOLE, (8.000, 8.015), 12.0, tolerance=tol(0.015))
    >>> pin = Feature("p", Kind.PIN, (7.965, 7.975), 12.0, tolerance=tol(0.005))
    >>> res = analyse_scene(Scene("s", Units.MM, features=(hole, pin), mates=(Mate("h", "p"),)))
    >>> auto_exaggeration(res, mate_index=0)  # 0.10 * 8.000 / 0.015 = 53.3, cap 106.7: 50
    50.0
    """
    feats = _involved(res, mate_index, feature_id)
    if not feats:  # a scene of fasteners only: nothing toleranced to scale
        return 1.0
    D = feats[0].mmc
    dev = max(_zone_mmc(f) for f in feats)
    if dev <= 0:
        dev = max(f.size_tolerance for f in feats)
    if dev <= 0 or D <= 0:
        return 1.0
    k = target * D / dev
    R0 = D / 2.0
    r_min = R0
    for f in feats:
        lo = min(f.limits) - tolerance_max(f)  # smallest diameter any drawn boundary can have
        r_min = min(r_min, lo / 2.0)
    if r_min < R0:
        k = min(k, (2.0 / 3.0) * R0 / (R0 - r_min))
    return nice_floor(k)


# ------------------------------------------------------------------- 2D: the display mapping


@dataclass(frozen=True)
class Exaggeration:
    """Display mapping: radial deviations about ``r0`` times ``k``, axis offsets times ``k``.

    A curve at true distance r from the nominal axis is drawn at ``r_disp + k (r - r0)``; an
    axis or zone at true lateral offset x at ``k x``. ``r_disp`` equals ``r0`` unless the
    drawing is shortened (a wide, short feature in section). Each mapping has its inverse, to
    read a true value back from a drawn one.

    >>> ex = Exaggeration(k=8.0, r0=4.0, r_disp=4.0)
    >>> float(ex.radial(3.75)), float(ex.unradial(2.0)), float(ex.lateral(0.125))
    (2.0, 3.75, 1.0)
    """

    k: float
    r0: float
    r_disp: float

    def radial(self, r):
        """Drawn distance from the axis of a curve at true distance ``r``."""
        return self.r_disp + self.k * (np.asarray(r, dtype=float) - self.r0)

    def unradial(self, rd):
        """True distance of a curve drawn at ``rd``: the inverse of :meth:`radial`."""
        return self.r0 + (np.asarray(rd, dtype=float) - self.r_disp) / self.k

    def lateral(self, x):
        """Drawn position of an axis or a zone at true lateral offset ``x``."""
        return self.k * np.asarray(x, dtype=float)

    def unlateral(self, xd):
        """True lateral offset drawn at ``xd``: the inverse of :meth:`lateral`."""
        return np.asarray(xd, dtype=float) / self.k

    def wall(self, s, half, side):
        """Display x of a wall at half-width ``half`` beside an axis at lateral ``s``
        (``side`` = +1 or -1): it moves with the axis, its radius is exaggerated about r0."""
        return self.lateral(s) + side * self.radial(half)

    def map_polar(self, xy):
        """Map points (n, 2) given relative to the nominal axis: radius exaggerated, direction
        kept (the axis point itself stays at the axis).

        >>> Exaggeration(8.0, 1.0, 1.0).map_polar([[0.0, 1.125], [0.0, 0.0]]).tolist() == [[0, 2], [0, 0]]
        True
        """
        xy = np.asarray(xy, dtype=float)
        r = np.hypot(xy[:, 0], xy[:, 1])
        r = np.where(r == 0.0, 1e-300, r)
        return xy * (self.radial(r) / r)[:, None]

    def unmap_polar(self, xy):
        """The inverse of :meth:`map_polar` (for points drawn at a positive radius)."""
        xy = np.asarray(xy, dtype=float)
        r = np.hypot(xy[:, 0], xy[:, 1])
        r = np.where(r == 0.0, 1e-300, r)
        return xy * (self.unradial(r) / r)[:, None]

    @property
    def shortened(self) -> bool:
        """Is the diameter drawn shorter than to scale (``r_disp`` below ``r0``)?"""
        return abs(self.r_disp - self.r0) > 1e-12 * max(1.0, self.r0)

    def label(self, units) -> str:
        """The caption every 2D picture carries.

        >>> from geom.model import Units
        >>> Exaggeration(60.0, 3.0, 3.0).label(Units.MM)
        'radial deviations ×60 about ⌀6.000 — dimension texts are TRUE values'
        """
        s = f"radial deviations ×{self.k:g} about ⌀{units.fmt(2 * self.r0)}"
        if self.shortened:
            s += "; diameter shortened (not to scale)"
        return s + " — dimension texts are TRUE values"


def auto_k(spread: float, r_disp: float, fill: float = 0.4) -> float:
    """The 2D views' factor, by the fill rule: the largest round k (:func:`nice_floor`, at
    least 1) with k * spread <= fill * r_disp, where ``spread`` is the largest radial deviation
    drawn: deviations visible, shapes kept.

    >>> auto_k(0.05, 4.0), auto_k(0.0, 4.0)  # 0.4 * 4.0 / 0.05 = 32: 30
    (30.0, 1.0)
    """
    if spread <= 0 or r_disp <= 0:
        return 1.0
    return nice_floor(fill * r_disp / spread)
