"""The one exaggeration system of the pictures (3D scene and 2D views).

Tolerances are tiny against sizes (0.015 on 8 mm), so every picture exaggerates radial and
lateral deviations by a factor k about a reference radius. ONE factor serves every picture of a
subject (a mate, or a lone feature) at every what-if state: :func:`subject_exaggeration`
(also :func:`auto_exaggeration`) takes it from the scene alone, over the whole MMC-to-LMC range
of every feature shown, so k never jumps while a what-if slider moves. It is the smaller of two
rules, rounded down to a round number of one series, :data:`NICE` x 10^n (:func:`nice_floor`):

* the look: the largest zone at MMC drawn at about a tenth of the lead diameter, no drawn
  boundary radius below a third of the reference radius;
* the room: the largest radial deviation any 2D view draws at any state in the range
  (:func:`range_spread`) fills at most :data:`FILL` of the reference radius.

:func:`scale_text` gives the one sentence every picture states its scale with;
:func:`bar_length` the true length of a picture's scale bar. :class:`Exaggeration` is the 2D
display mapping (radii about r0, lateral offsets) and its inverse, used to read true values back
from a drawing. :func:`auto_k` is the bare fill rule. Pure: no pyvista, no matplotlib.

>>> nice_floor(137.0), nice_floor(0.4), nice_floor(26.0)
(100.0, 1.0, 25.0)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from geom.analysis import SceneResult
from geom.boundaries import tolerance_allowed, tolerance_max
from geom.model import Characteristic, Feature

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


# ------------------------------------------------------------- the one factor of a subject

FILL = 0.4
"""The room rule: the largest radial deviation drawn fills at most this fraction of the radius."""

_CHORD = 2.0 / (1.0 + math.cos(math.pi / 720))
"""How far outside its curve a vertex of the through-view's 720-gon section can lie (a factor)."""


def _zone_mmc(f: Feature) -> float:
    """The tolerance zone at MMC (0 without a tolerance)."""
    return 0.0 if f.tolerance is None else tolerance_allowed(f, f.mmc)


def _involved(res: SceneResult, mate_index: int | None, feature_id: str | None) -> list[Feature]:
    """The features a picture shows: the mate's hole and pin, one feature, or all of them.
    The first is the reference (its MMC diameter sets the scale)."""
    sc = res.scene
    if mate_index is not None:
        m = sc.mates[mate_index]
        return [sc.feature(m.hole), sc.feature(m.pin)]
    if feature_id is not None:
        return [sc.feature(feature_id)]
    return list(sc.features)


def range_spread(features, r0: float, samples: int = 129) -> float:
    """The largest radial deviation from ``r0`` of any curve a 2D view draws of ``features`` at
    any what-if state with the size in the limits (any share, any tilt direction).

    At size s with tolerance allowed t(s) wholly used over the zone height H (the projected
    height, else the length; no tilt for a bowed straightness axis), the axis moves t / 2 either
    way of the basic axis and tilts by theta, tan(theta) = t / H. A wall or section of diameter s
    then lies between s / 2 - t / 2 and s / (2 cos theta) + t / 2 from the basic axis (times the
    720-gon's vertex factor); boundaries s -/+ t and fitted circles lie between. A smaller share
    only narrows that band. The deviation is sampled over the size range (the limits included).

    >>> from geom.model import Characteristic, Feature, Kind, Material, Tolerance
    >>> tol = Tolerance(Characteristic.POSITION, 0.030, material=Material.MMC, datums=("A",))
    >>> h = Feature("h", Kind.HOLE, (6.000, 6.012), 8.0, tolerance=tol)
    >>> round(range_spread([h], 3.0), 4)  # at LMC: 3.006 / cos(atan(0.042 / 8)) + 0.021 - 3, + 720-gon
    0.0271
    """
    worst = 0.0
    for f in features:
        tol = f.tolerance
        height = tol.projected if tol is not None and tol.projected else f.length
        bowed = tol is not None and tol.characteristic is Characteristic.STRAIGHTNESS
        lo, hi = min(f.limits), max(f.limits)
        for s in np.unique(np.concatenate((np.linspace(lo, hi, samples), [lo, hi]))):
            t = tolerance_allowed(f, float(s))
            theta = 0.0 if bowed or height <= 0 else math.atan2(t, height)
            outer = (s / (2.0 * math.cos(theta)) + t / 2.0) * _CHORD
            inner = s / 2.0 - t / 2.0
            worst = max(worst, abs(outer - r0), abs(inner - r0))
    return float(worst)


def subject_exaggeration(res: SceneResult, mate_index: int | None = None, feature_id: str | None = None,
                         target: float = 0.10, fill: float = FILL) -> float:
    """The one exaggeration of a subject: a mate (``mate_index``), a lone feature
    (``feature_id``) or, with neither, the whole scene. Used by the 3D scene and by every 2D
    view at every what-if state unless the caller gives a factor.

    With D the reference feature's MMC diameter, R0 = D / 2, and t the largest tolerance zone
    at MMC among the features shown (the largest size tolerance when none has a zone):

    * the look, k <= ``target`` D / t: the largest zone drawn at about ``target`` times D;
    * no drawn boundary radius below R0 / 3: a radius r is drawn at R0 - k (R0 - r), and r_min
      is the smallest radius any drawn boundary can have over the range (the smaller limit less
      the largest tolerance allowed, halved), so k <= (2/3) R0 / (R0 - r_min);
    * the room, k <= ``fill`` R0 / :func:`range_spread`: no 2D view at any state in the range
      draws a curve further than ``fill`` R0 from the reference radius.

    The smallest of these, rounded down by :func:`nice_floor`; 1 when nothing is toleranced.

    >>> from geom.analysis import analyse_scene
    >>> from geom.model import Characteristic, Feature, Kind, Material, Mate, Scene, Tolerance, Units
    >>> tol = lambda t: Tolerance(Characteristic.PERPENDICULARITY, t, material=Material.MMC, datums=("A",))
    >>> hole = Feature("h", Kind.HOLE, (8.000, 8.015), 12.0, tolerance=tol(0.015))
    >>> pin = Feature("p", Kind.PIN, (7.965, 7.975), 12.0, tolerance=tol(0.005))
    >>> res = analyse_scene(Scene("s", Units.MM, features=(hole, pin), mates=(Mate("h", "p"),)))
    >>> # look 0.8 / 0.015 = 53.3; cap 106.7; room: the pin at LMC 7.965 less its 0.015 allowed
    >>> # lies 4 - 3.975 = 0.025 inside R0, so 1.6 / 0.025 = 64: the look governs, 50
    >>> subject_exaggeration(res, mate_index=0)
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
    spread = range_spread(feats, R0)
    if spread > 0:
        k = min(k, fill * R0 / spread)
    return nice_floor(k)


def auto_exaggeration(res: SceneResult, mate_index: int | None = None, feature_id: str | None = None,
                      target: float = 0.10) -> float:
    """The same factor as :func:`subject_exaggeration` (the name the 3D scene and the sweep use)."""
    return subject_exaggeration(res, mate_index, feature_id, target)


def features_exaggeration(res: SceneResult, features) -> float:
    """:func:`subject_exaggeration` of the subject showing ``features`` (a mate's hole and pin,
    or one feature), found by their ids: what a 2D view of them uses."""
    ids = [f.id for f in features]
    if len(ids) == 2:
        for i, m in enumerate(res.scene.mates):
            if {m.hole, m.pin} == set(ids):
                return subject_exaggeration(res, mate_index=i)
    return subject_exaggeration(res, feature_id=ids[0])


# --------------------------------------------------------------------- the words and the bar


def scale_text(k: float, r0: float, units) -> str:
    """The one sentence stating a picture's scale, the same in the 3D scene and every 2D view
    of a subject; a view adds its own clause after it.

    >>> from geom.model import Units
    >>> scale_text(50.0, 4.0, Units.MM)
    'radial deviations \u00d750 about \u00d88.000; lengths and dimension texts true'
    >>> scale_text(1.0, 4.0, Units.MM)
    'true scale: radial deviations \u00d71 (no exaggeration); lengths and dimension texts true'
    """
    if k == 1.0:
        return "true scale: radial deviations \u00d71 (no exaggeration); lengths and dimension texts true"
    return f"radial deviations \u00d7{k:g} about \u00d8{units.fmt(2 * r0)}; lengths and dimension texts true"


def bar_length(k: float, room: float) -> float:
    """The true length of a scale bar drawn at ``k`` in at most ``room`` drawing units: the
    largest 1, 2 or 5 x 10^n with k * length <= room.

    >>> bar_length(50.0, 1.0), bar_length(60.0, 0.75), bar_length(1.0, 3.0)
    (0.02, 0.01, 2.0)
    """
    x = room / k
    e = 10.0 ** math.floor(math.log10(x))
    for m in (5.0, 2.0, 1.0):
        if m * e <= x * (1 + _REL):
            return float(f"{m * e:.12g}")
    return float(f"{e:.12g}")


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

    def text(self, units) -> str:
        """The common scale sentence (:func:`scale_text`) of this mapping."""
        return scale_text(self.k, self.r0, units)

    def label(self, units) -> str:
        """The caption every 2D picture carries: the common sentence, then the shortening.

        >>> from geom.model import Units
        >>> Exaggeration(60.0, 3.0, 1.5).label(Units.MM)
        'radial deviations \u00d760 about \u00d86.000; lengths and dimension texts true; diameter shortened, not to scale'
        """
        return self.text(units) + ("; diameter shortened, not to scale" if self.shortened else "")


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
