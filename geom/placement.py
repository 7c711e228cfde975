"""Where things sit in the datum frame for a what-if state: the zone and the worst-case axis.

Datum A is the plane z = 0; the part occupies 0 <= z <= length; a projected tolerance zone
extends from A away from the part (-projected <= z <= 0), where the mating part sits.
Orientation-only tolerances (perpendicularity, parallelism, angularity) have a floating zone,
drawn centred on the basic location; position zones sit at the true position.

All drawings use the frame of the feature's nominal axis: for perpendicularity and position it
is the datum frame itself. (Parallelism and angularity are drawn in the same local frame;
:func:`geom.model.axis_direction` gives the nominal axis in the datum frame.)

>>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
>>> t = Tolerance(Characteristic.PERPENDICULARITY, 0.02, material=Material.MMC, datums=("A",))
>>> f = Feature("b", Kind.HOLE, (10.0, 10.015), 15.0, tolerance=t)
>>> p = worst_case_axis(f, FeatureState(10.0))
>>> [round(float(v), 6) for v in p.points[0]], [round(float(v), 6) for v in p.points[-1]]
([-0.01, 0.0, 0.0], [0.01, 0.0, 15.0])
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .boundaries import FeatureState, tolerance_allowed
from .model import Characteristic, Feature, Zone


@dataclass(frozen=True)
class AxisPlacement:
    """The zone and the axis of a feature in a what-if state (local frame, lengths in scene units)."""

    zone_size: float  # tolerance allowed at the produced size (zone diameter or width)
    zone_z: tuple[float, float]  # z range the zone covers
    centre: tuple[float, float]  # zone axis (x, y)
    direction: tuple[float, float]  # unit vector on A of the tilt (or bow)
    points: np.ndarray  # (n, 3) points of the actual axis, z = 0 .. length (or the zone range)
    offset: float  # how far the axis moves across the zone: share * zone_size
    tilt_deg: float  # angle of the axis to the zone axis (0 for a bowed axis)
    bowed: bool  # straightness: the axis bends instead of tilting
    width_zone: bool
    # an orientation refinement of a position (geom.refinement): its tolerance allowed at the
    # produced size (the nested zone's size) and the (x, y) of its floating zone's axis; None without
    refined_zone: float | None = None
    refined_centre: tuple[float, float] | None = None


def orientation_refinement(feature: Feature):
    """The orientation refinement (perpendicularity) of a position tolerance, or None: the one
    control that limits the axis' tilt inside the position zone."""
    tol = feature.tolerance
    if tol is None or tol.characteristic is not Characteristic.POSITION:
        return None
    for r in feature.refinements:
        if r.characteristic in (Characteristic.PERPENDICULARITY, Characteristic.PARALLELISM,
                                Characteristic.ANGULARITY):
            return r
    return None


def worst_case_axis(feature: Feature, state: FeatureState, samples: int = 2) -> AxisPlacement:
    """The axis entering the zone at one side and leaving at the opposite side.

    ``state.share`` scales how much of the allowed tolerance the axis uses; ``direction_deg``
    turns the tilt on A (a width zone only allows tilt across its planes, along x).
    Straightness gives a circular-arc axis: ends on one side of the zone, middle on the other.

    A position refined by an orientation (perpendicularity to A): the axis may still shift to the
    edge of the position zone, but its tilt over the zone's length is limited to the share of the
    refinement's tolerance allowed at the size. The axis is drawn offset and tilted by that much,
    touching the position zone's edge at the far end; the nested orientation zone floats on it
    (``refined_zone``, ``refined_centre``). The mate's worst-case clearance is still the position
    VC's (:func:`geom.analysis.analyse_mate`): the refinement does not change the VC seen by a
    mating part located at true position.
    """
    tol = feature.tolerance
    zone = tolerance_allowed(feature, state.size)
    off = max(0.0, min(1.0, state.share)) * zone
    width = tol is not None and tol.zone is Zone.WIDTH
    phi = 0.0 if width else math.radians(state.direction_deg)
    u = np.array([math.cos(phi), math.sin(phi)])
    cx, cy = feature.at
    L = feature.length
    bowed = tol is not None and tol.characteristic is Characteristic.STRAIGHTNESS
    if tol is not None and tol.projected:
        z0, z1 = -tol.projected, 0.0
    else:
        z0, z1 = 0.0, L
    ref = None
    if bowed:
        n = max(samples, 33)
        z = np.linspace(0.0, L, n)
        # circular arc through the zone's two sides: sagitta = off, chord = L (ends at -off/2)
        s = (z - L / 2) / (L / 2)
        lateral = off / 2 - off * s**2  # parabola, indistinguishable from the arc at these sizes
        tilt = 0.0
    else:
        n = max(samples, 2)
        z = np.linspace(min(z0, 0.0), max(z1, L), n)
        ref = orientation_refinement(feature)
        span, t_ref = off, None  # how far the axis moves across over the zone's length
        if ref is not None:
            t_ref = tolerance_allowed(feature.with_(tolerance=ref, refinements=()), state.size)
            span = min(off, max(0.0, min(1.0, state.share)) * t_ref)
        lateral = off / 2 - span + span * (z - z0) / (z1 - z0)
        tilt = math.degrees(math.atan2(span, z1 - z0))
    pts = np.column_stack((cx + lateral * u[0], cy + lateral * u[1], z))
    refined = None
    if not bowed and ref is not None:  # the nested zone's axis: the middle of the axis' sideways run
        m = off / 2 - span / 2
        refined = (t_ref, (float(cx + m * u[0]), float(cy + m * u[1])))
    return AxisPlacement(zone, (z0, z1), (cx, cy), (float(u[0]), float(u[1])), pts, off, tilt, bowed, width,
                         *(refined or (None, None)))
