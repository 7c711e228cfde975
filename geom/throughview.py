"""The through-view: what a mating part sees looking normal to datum A.

A hole of produced size ``d`` whose axis crosses its zone corner to corner (axis offset ``t``
between the bottom face z = 0 and the top face z = L) leaves a clear opening: the intersection
of its sections in planes parallel to A. A tilted circular cylinder cut by such planes has
elliptical sections (semi-axes d/(2 cos θ) along the tilt and d/2 across, tan θ = t/L), so the
opening's largest inscribed circle is

    D = d / cos θ - t     (while t/2 >= (a^2 - b^2)/a, i.e. for every practical tilt)

which is the virtual condition d - t plus the second-order term d (sec θ - 1) (for the
sizes tolerances use, far below a micrometre: 0.009 um for a 10 mm bore tilted 0.02 over 15).
For steep tilts the nearest point leaves the ellipse's vertex: see exact_opening_diameter.
A pin's sections sweep the union; its smallest enclosing circle is d / cos θ + t.

The geometry is computed with shapely (polygons whose vertices straddle the true curve; with
the default 1024 vertices the inscribed diameter of a 10 mm bore comes out about 0.02 um small,
on the safe side); the closed form is kept for checking.

>>> tv = clear_opening(10.0, 0.02, 15.0)
>>> round(tv.inscribed_diameter, 4), round(tv.exact_diameter, 4)
(9.98, 9.98)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

SEGMENTS = 1024  # vertices per section polygon: chord error under 0.03 um on a 10 mm bore


@dataclass(frozen=True)
class ThroughView:
    size: float  # produced size d
    offset: float  # axis offset t between the end sections, projected on A
    length: float  # L, the distance between the end sections
    direction_deg: float  # direction of the offset on A
    sections: tuple  # shapely Polygons of the sections (bottom, [middle,] top)
    opening: object  # shapely Polygon: intersection (hole) or union hull (pin)
    diameter: float  # shapely: inscribed (hole) / enclosing (pin) circle diameter
    centre: tuple[float, float]
    exact_diameter: float  # closed form, for checking
    bowed: bool = False

    @property
    def inscribed_diameter(self) -> float:
        return self.diameter


def _ellipse(cx, cy, a, b, phi, n=SEGMENTS):
    from shapely.geometry import Polygon

    k = 2.0 / (1.0 + math.cos(math.pi / n))  # vertices outside, edge midpoints inside the curve
    s = np.linspace(0.0, 2.0 * math.pi, n, endpoint=False)
    x, y = a * k * np.cos(s), b * k * np.sin(s)
    c, si = math.cos(phi), math.sin(phi)
    return Polygon(np.column_stack((cx + c * x - si * y, cy + si * x + c * y)))


def section_polygons(size, offset, length, direction_deg=0.0, centre=(0.0, 0.0), bowed=False, segments=SEGMENTS):
    """Sections of a cylinder of diameter ``size`` in planes parallel to A, at both ends
    (and the middle, for a bowed axis), as shapely polygons."""
    phi = math.radians(direction_deg)
    ux, uy = math.cos(phi), math.sin(phi)
    cx, cy = centre
    if bowed:  # straightness: ends on one side of the zone, middle on the other
        offs = (-offset / 2, offset / 2, -offset / 2)
        return tuple(_ellipse(cx + o * ux, cy + o * uy, size / 2, size / 2, phi, segments) for o in offs)
    theta = math.atan2(offset, length)
    a = size / (2.0 * math.cos(theta))
    return tuple(_ellipse(cx + o * ux, cy + o * uy, a, size / 2, phi, segments) for o in (-offset / 2, offset / 2))


def exact_opening_diameter(size: float, offset: float, length: float, bowed: bool = False) -> float:
    """Closed form of the opening's inscribed diameter (distance from the centre of the
    opening to the nearest point of either end ellipse, doubled)."""
    if bowed:
        return max(size - offset, 0.0)
    theta = math.atan2(offset, length)
    a, b, u = size / (2.0 * math.cos(theta)), size / 2.0, offset / 2.0
    if u >= a:
        return 0.0
    e = (a * a - b * b) / a  # where the ellipse's evolute meets its major axis
    r = a - u if u >= e else b * math.sqrt(1.0 - u * u / (a * a - b * b))
    return 2.0 * r


def clear_opening(size, offset, length, direction_deg=0.0, centre=(0.0, 0.0), bowed=False,
                  segments=SEGMENTS) -> ThroughView:
    """Clear opening of a hole seen normal to A, and its largest inscribed circle."""
    import shapely

    secs = section_polygons(size, offset, length, direction_deg, centre, bowed, segments)
    opening = secs[0]
    for s in secs[1:]:
        opening = opening.intersection(s)
    if opening.is_empty:
        return ThroughView(size, offset, length, direction_deg, secs, opening, 0.0, centre, 0.0, bowed)
    line = shapely.maximum_inscribed_circle(opening, tolerance=size * 1e-8)
    (x0, y0), (x1, y1) = line.coords[0], line.coords[1]
    exact = exact_opening_diameter(size, offset, length, bowed)
    return ThroughView(size, offset, length, direction_deg, secs, opening, 2 * math.hypot(x1 - x0, y1 - y0),
                       (x0, y0), exact, bowed)


def swept_envelope(size, offset, length, direction_deg=0.0, centre=(0.0, 0.0), bowed=False,
                   segments=SEGMENTS) -> ThroughView:
    """What a pin presents seen normal to A: the hull of its sections and its enclosing circle."""
    import shapely

    secs = section_polygons(size, offset, length, direction_deg, centre, bowed, segments)
    hull = shapely.union_all(secs).convex_hull
    circle = shapely.minimum_bounding_circle(hull)
    c = circle.centroid
    r = shapely.minimum_bounding_radius(hull)
    theta = 0.0 if bowed else math.atan2(offset, length)
    exact = size / math.cos(theta) + offset
    return ThroughView(size, offset, length, direction_deg, secs, hull, 2 * r, (c.x, c.y), exact, bowed)
