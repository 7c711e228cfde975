"""The 3D picture's scale bars: one across (radial, drawn at the picture's exaggeration k, labelled
with its true length) and one along the axis (lengths along the axis are drawn true), standing at
the front corner of the drawn geometry on datum A, so a reader can measure a gap or a length on
the picture as on the 2D views (:func:`viewer.exaggeration.bar_length` picks both lengths, as the
2D views' bar does).

>>> import numpy as np
>>> from viewer.scene3d.values import _Ex
>>> from geom.model import Units
>>> parts = scale_bars(_Ex(50.0, (0.0, 0.0), 4.0), (-6, 6, -6, 6, 0, 10), 0.0, Units.MM)
>>> [(name, round(float(np.ptp(m.points[:, 0])), 6), round(float(np.ptp(m.points[:, 2])), 6)) for name, m, _ in parts[0]]
[('scale bar across', 1.0, 0.48), ('scale bar along the axis', 0.48, 5.0)]
>>> [lb for _p, lb in parts[1]]
['0.020 mm true\\n(drawn x50)', '5.000 mm true']
"""

from __future__ import annotations

import math

import numpy as np

from .. import style as S
from ..exaggeration import bar_length
from .primitives import _segments


def scale_bars(ex, box, direction_deg: float, units) -> tuple[list, list]:
    """([(name, mesh, style)], [(anchor, text)]): the bars for the drawn geometry in ``box``
    (x0, x1, y0, y1, z0, z1) seen with the tilt direction ``direction_deg`` to the right. The bar
    across is at most half the drawn radius ``ex.R0`` long when drawn (``ex.k`` times its true
    length); the bar along the axis at most half the drawn height. With ``ex.k`` = 1 one bar."""
    x0, x1, y0, y1, z0, z1 = box
    phi = math.radians(direction_deg)
    u = np.array([math.cos(phi), math.sin(phi), 0.0])
    v = np.array([-u[1], u[0], 0.0])
    corners = np.array([[x, y] for x in (x0, x1) for y in (y0, y1)])
    cu, cv = corners @ u[:2], corners @ v[:2]
    lift = 0.002 * ex.R0
    o = u * cu.min() + v * cv.min() + np.array([0.0, 0.0, max(z0, 0.0) + lift])  # the front corner on A
    tick = 0.06 * ex.R0
    z = np.array([0.0, 0.0, 1.0])
    meshes, labels = [], []
    style = {"color": S.TEXT, "line_width": 2.5, "render_lines_as_tubes": False, "lighting": False}
    across = bar_length(ex.k, 0.5 * ex.R0)
    a_end = o + ex.k * across * u
    if ex.k != 1.0:
        ends = np.array([[o, a_end], [o - tick * z, o + tick * z], [a_end - tick * z, a_end + tick * z]])
        meshes.append(("scale bar across", _segments(ends), style))
        labels.append((tuple(a_end + tick * z), f"{units.fmt(across)} {units.value} true\n(drawn x{ex.k:g})"))
    along = bar_length(1.0, 0.5 * max(z1 - max(z0, 0.0), 1e-9))
    top = o + along * z
    ends = np.array([[o, top], [o - tick * u, o + tick * u], [top - tick * u, top + tick * u]])
    meshes.append(("scale bar along the axis", _segments(ends), style))
    labels.append((tuple(top), f"{units.fmt(along)} {units.value} true"))
    return meshes, labels
