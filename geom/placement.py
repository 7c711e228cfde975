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


def worst_case_axis(feature: Feature, state: FeatureState, samples: int = 2) -> AxisPlacement:
    """The axis entering the zone at one side and leaving at the opposite side.

    ``state.share`` scales how much of the allowed tolerance the axis uses; ``direction_deg``
    turns the tilt on A (a width zone only allows tilt across its planes, along x).
    Straightness gives a circular-arc axis: ends on one side of the zone, middle on the other.
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
        lateral = -off / 2 + off * (z - z0) / (z1 - z0)
        tilt = math.degrees(math.atan2(off, z1 - z0))
    pts = np.column_stack((cx + lateral * u[0], cy + lateral * u[1], z))
    return AxisPlacement(zone, (z0, z1), (cx, cy), (float(u[0]), float(u[1])), pts, off, tilt, bowed, width)
