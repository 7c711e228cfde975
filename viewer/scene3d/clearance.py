"""The clearance colouring of a mating surface, always on the TRUE geometry (k = 1).

Scalars: ``gap`` is the true local radial gap from each point of the mating pin's surface to
the hole's surface (negative: material overlap); ``clearance`` = 2 * gap, the diametral
clearance a uniform gap of that size would give, so its minimum over the surface is the fit's
worst-case clearance as :func:`geom.analysis.clearance_at` states it (hole opening minus pin
envelope, both normal to A), to second order in the tilt angle. The colour scale is fixed per
mate (:func:`_clearance_span`), so it does not jump while the what-if controls move.

>>> _clearance_ticks(0.0, 0.1)
(0.0, 0.025, 0.05, 0.075, 0.1)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pyvista as pv
from vtkmodules.util.numpy_support import numpy_to_vtk

from geom.analysis import fits
from geom.boundaries import tolerance_allowed
from geom.model import Characteristic, Feature, Units

from .. import style as S
from ..memo import memoized
from .assemble import _Built
from .primitives import _points, _polygon, _segments, _tube
from .rings import _axis_at, _ring_dist, _ring_frame, _ring_point, _rings
from .values import N_FINE, N_PHI, N_Z_MATE, Label, _Ex, _line, _surf

LOCAL_GAP = "local gap at this tilt direction"
"""The name of the 3D picture's tightest gap: it is found on the surface at the tilts as set,
unlike the guaranteed clearance (through-view) the banner and the 2D views give."""
LOCAL_OVERLAP = "local interference at this tilt direction"


@dataclass(frozen=True)
class MateSide:
    """One side of a fit as :func:`_mate_surface` reads it: the z range of the feature, its
    true axis (a polyline at increasing z), its true radius and the radius its surface is
    drawn at."""

    z: tuple[float, float]
    axis: np.ndarray
    r_true: float
    r_draw: float


def _mate_surface(b: _Built, hole: MateSide, pin: MateSide, ex: _Ex, units: Units, tag_hole="hole",
                  tag_pin="pin", mate_layer: str = "mate",
                  span: tuple[float, float] | None = None) -> tuple[float, float, dict]:
    """The mating pin's surface coloured by the TRUE signed clearance to the hole surface.
    ``span``: the range of clearances the colour scale covers whatever the state (see
    :func:`_clearance_span`), widened if this state's values fall outside it; None: this
    state's own range. Returns (smallest clearance scalar, clearance at the finely sampled
    tightest spot, scalar bar)."""
    hz0, hz1 = hole.z
    pz0, pz1 = pin.z
    e0, e1 = max(hz0, pz0), min(hz1, pz1)
    zs = np.linspace(e0, e1, N_Z_MATE)
    axis_true = _axis_at(pin.axis, zs)
    axis_draw = ex.pts(axis_true)
    frame_draw = _ring_frame(axis_draw)
    rings_draw = _rings(axis_draw, pin.r_draw, frame=frame_draw)
    hole_axis = np.asarray(hole.axis, dtype=float)
    # true local gap at the mesh's vertices (the rings about the true axis at the true radius)
    gap = (hole.r_true - _ring_dist(axis_true, pin.r_true, hole_axis, N_PHI)).reshape(-1)
    mesh = pv.PolyData()  # the shared tube's points, cells and normals, with this state's colours
    mesh.ShallowCopy(_tube(rings_draw))
    clearance = 2.0 * gap
    pd = mesh.GetPointData()
    for name, values in (("gap", gap), ("clearance", clearance)):
        arr = numpy_to_vtk(values, deep=True)
        arr.SetName(name)
        pd.AddArray(arr)
    pd.SetActiveScalars("clearance")
    cmin, cmax = float(clearance.min()), float(clearance.max())

    # tightest spot: finely sampled round every ring of the engagement
    fgap = hole.r_true - _ring_dist(axis_true, pin.r_true, hole_axis, N_FINE)
    gmin = float(fgap.min())
    spots = []
    decimals = units.decimals + 1
    for zi in range(len(zs)):  # every ring where the minimum is reached (to display precision)
        j = int(np.argmin(fgap[zi]))
        if round(fgap[zi, j] - gmin, decimals) == 0 and (zi in (0, len(zs) - 1) or fgap[zi, j] < min(
                fgap[max(zi - 1, 0)].min(), fgap[min(zi + 1, len(zs) - 1)].min()) + 1e-15):
            spots.append((zi, j))
    if not spots:
        spots = [np.unravel_index(int(np.argmin(fgap)), fgap.shape)]
    spots = spots[:2] if len(spots) <= 2 else [spots[0], spots[-1]]
    c_tight = 2.0 * gmin
    interferes = not fits(c_tight)
    lo, hi = (cmin, cmax) if span is None else (min(span[0], cmin), max(span[1], cmax))
    lo = min(0.0, lo)
    hi = max(hi, lo + abs(lo) * 0.25, 1e-12)
    cmap = _clearance_colormap(lo, hi)
    title = f"clearance, {units.value}"
    style = dict(scalars="clearance", cmap=cmap, clim=(lo, hi), smooth_shading=True, ambient=0.35,
                 diffuse=0.75, specular=0.1, show_scalar_bar=False, interpolate_before_map=True)
    b.add(mate_layer, f"{tag_pin} surface (clearance)", mesh, style)
    for end in (0, -1):  # the pin's end faces (no clearance there: plain colour)
        ring = rings_draw[end]
        b.add(mate_layer, f"{tag_pin} end", _polygon(ring),
              _surf(S.MATE, 1.0, smooth_shading=False))
    b.key(f"{tag_pin} surface: clearance to the {tag_hole} (true; 2 x local gap)", S.CLEARANCE_COLORS[1], mate_layer)
    if interferes:
        b.key(f"interference: {tag_pin} and {tag_hole} overlap", S.INTERFERENCE, mate_layer)

    # markers: the tightest spots, and the gap drawn as a short segment across to the hole surface
    hole_r_draw = hole.r_draw
    colour = S.INTERFERENCE if interferes else S.TIGHT
    spot_pts = [_ring_point(axis_draw, frame_draw, pin.r_draw, zi, j, N_FINE) for zi, j in spots]
    ends = []
    for p in spot_pts:
        # outward direction on A at that spot: the gap runs across to the hole surface
        centre_d = ex.pts(_axis_at(hole.axis, np.array([p[2]])))[0]
        out = p - centre_d
        out[2] = 0.0
        nrm = np.linalg.norm(out)
        out = out / nrm if nrm > 0 else np.array([1.0, 0, 0])
        ends.append((p, centre_d + out * hole_r_draw))
    # one mesh for the spots and one for the gaps (one or two of each): fewer actors, and the
    # same ones whether the tightest fit is reached at one end or at both
    b.add("clearance", "tightest spot", _points(np.array(spot_pts)),
          dict(color=colour, point_size=16, render_points_as_spheres=True, lighting=False))
    b.add("clearance", "gap at tightest spot", _segments(np.array(ends)), _line(colour, 3.0))
    # the name on one row, the value on the next: a short callout, legible when drawn large for print
    txt = (LOCAL_OVERLAP if interferes else LOCAL_GAP) + "\n" + units.fmt(c_tight, signed=True) + f" {units.value}"
    txt += f" ({_per_side(units, c_tight)} a side)"
    cx = ex.c
    for p in spot_pts[:1]:  # the same words at a second spot would be the label drawn twice
        right = (p[0] - cx[0]) * math.cos(math.radians(0)) > 0  # spot on the +x side: text runs left
        b.labels.append(Label(tuple(p), txt, S.INTERFERENCE if interferes else S.TEXT, 16, layer="clearance",
                              justify="right" if right else "left"))
    ticks = _clearance_ticks(lo, hi)
    # the tick labels with the digits each tick needs (Units.digits: a 0.0025 step is not shown as 0.003)
    bar = dict(title=title, clim=(lo, hi), ticks=ticks, fmt=f"%.{max(units.digits(t) for t in ticks)}f")
    return cmin, c_tight, bar


def _per_side(units: Units, clearance: float) -> str:
    """Half of a diametral clearance as it is shown (``Units.fmt`` keeps the digit a half needs:
    0.005 gives 0.0025), so that twice the per-side value reads as the diametral one."""
    return units.fmt(abs(float(units.fmt(clearance))) / 2.0)


def _clearance_ticks(lo: float, hi: float) -> tuple[float, ...]:
    """Colour-bar ticks: zero (where fit turns into interference), round steps (1, 2, 2.5, 5
    x 10^n, at most four) up to ``hi``, and ``lo`` when it is below zero and not crowding the
    zero tick.

    >>> _clearance_ticks(-0.030, 0.094)
    (-0.03, 0.0, 0.025, 0.05, 0.075)
    """
    x = max(hi, -lo, 1e-12) / 4.0
    e = 10.0 ** math.floor(math.log10(x))
    step = min(m * e for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * e >= x * (1 - 1e-12))
    n = int(math.floor(hi / step + 1e-9)) if hi > 0 else 0
    ticks = [round(k * step, 12) for k in range(n + 1)]
    if lo < 0 and -lo >= 0.5 * step:
        ticks.insert(0, lo)
    return tuple(ticks)


def _reach(f: Feature, size: float) -> float:
    """Twice the largest distance of the drawn axis from the zone axis within the feature, at a
    produced size: the tolerance allowed; with a projected zone P the axis crosses the zone and
    runs on into the part over its length L with the same lean, reaching t (1/2 + L/P) from the
    zone axis (geom's projected boundary MMC -/+ t (1 + 2L/P) is the same reach)."""
    if f.tolerance is None:
        return 0.0
    t = tolerance_allowed(f, size)
    P = f.tolerance.projected
    return t * (1.0 + 2.0 * f.length / P) if P else t


def _lean(f: Feature) -> float:
    """The largest slope (tan of the angle to the normal to A) of the drawn axis over the
    states: tilted across its zone (T/L), across a projected zone (T/P), or bowed by
    straightness (4T/L at the ends of the arc, as drawn)."""
    if f.tolerance is None:
        return 0.0
    t = max(tolerance_allowed(f, f.mmc), tolerance_allowed(f, f.lmc))
    if f.tolerance.characteristic is Characteristic.STRAIGHTNESS:
        return 4.0 * t / f.length
    return t / (f.tolerance.projected or f.length)


def _clearance_span(hole: Feature, pin: Feature) -> tuple[float, float]:
    """(lo, hi) bounds of the local diametral clearance 2 (R - dist) between the pin's surface
    and the hole's over every state the what-if controls reach (sizes within limits, any share
    of the tolerance, any tilt direction). Each axis stays within reach r(size) of the common
    zone axis (:func:`_reach`: the tolerance allowed, more with a projected zone), so at sizes D
    (hole) and d (pin) the local clearance lies within D - d -/+ (r_hole(D) + r_pin(d)), plus a
    second-order term from the lean of the surfaces: a level section of a pin leaning by angle
    a is d sec(a) across, and the hole's clearance is taken square to its own leaning axis
    (D cos(b)). Reach is linear in the size, so the extremes are at the limits:
    lo = min(D - r_hole(D)) - max(d + r_pin(d)) - d_max (sec a - 1) (without a lean and a
    projected zone: VC - VC at MMC, geom's worst case), hi = max(D + r_hole(D)) - min(d -
    r_pin(d)) + D_max (1 - cos b). The colour scale spans this, so colours mean the same
    clearance as the sizes are swept, the scale does not jump under the user's eyes, and it
    shows red only where interference can happen (or within the lean term of it)."""
    def r(f: Feature, size: float) -> float:
        return _reach(f, size)

    lean_pin, lean_hole = math.atan(_lean(pin)), math.atan(_lean(hole))
    lo = min(D - r(hole, D) for D in hole.limits) - max(d + r(pin, d) for d in pin.limits)
    hi = max(D + r(hole, D) for D in hole.limits) - min(d - r(pin, d) for d in pin.limits)
    lo -= max(pin.limits) * (1.0 / math.cos(lean_pin) - 1.0)
    hi += max(hole.limits) * (1.0 - math.cos(lean_hole))
    return lo, hi


@memoized("scene3d clearance colour maps", 32)
def _clearance_colormap(lo: float, hi: float):
    """``style.clearance_colormap(lo, hi)``, memoized (shared: callers must not modify it). With
    lo = 0 the colours do not depend on hi (the ramp runs from 0 to hi), so every such call
    shares the map made for (0, 1)."""
    if lo == 0.0 and hi > 0.0:
        return _clearance_colormap_zero()
    return S.clearance_colormap(lo, hi)


@memoized("scene3d clearance colour map from zero", 1)
def _clearance_colormap_zero():
    return S.clearance_colormap(0.0, 1.0)
