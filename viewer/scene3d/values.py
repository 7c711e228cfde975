"""What a 3D scene is made of: the layer and view names, :class:`Layer`, :class:`Label`,
:class:`Scene3D` (the frozen result every builder returns), the drawing transform
:class:`_Ex` (radial exaggeration k about R0) and the two ``add_mesh`` styles.

>>> ex = _Ex(10.0, (0.0, 0.0), 4.0)
>>> ex.r(4.5), ex.pts([[0.25, 0.0, 3.0]]).tolist()
(9.0, [[2.5, 0.0, 3.0]])
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pyvista as pv

from geom.boundaries import FeatureState
from geom.model import Units

from .. import style as S

LAYERS = (
    "part",  # the part around the hole (block with the hole through it) / under the pin, translucent
    "datum",  # datum plane A and the datum feature symbol
    "zone",  # tolerance zone at the produced size
    "zone_axis",  # axis of the zone (true position, or the floating zone's axis)
    "axis",  # worst-case actual axes (and their entry/exit points); a measured feature's feature axis
    "surface",  # the feature's surface at the produced size around its actual axis
    "vc",  # the mating-side worst-case boundary: VC (MMVS) at MMC, IB/OB for RFS
    "rc",  # the opposite boundary: RC (hidden by default)
    "mate",  # the mating pin (or hole) at its own worst case, coloured by clearance
    "clearance",  # the tightest spot(s) and the gap there
    "projected",  # projected tolerance zone region: axis extension, mating part, fastener
    "mating_part",  # an interface's part 2: its plate, pins (or threaded holes) and pilot boss
    "simulator",  # an interface's datum simulators at their MMB (the pilot of the gauge)
    "points",  # measured points, coloured by radial deviation (inspection scenes)
    "median_line",  # derived median line: section centres, as a polyline with its points
    "envelopes",  # unrelated and related actual mating envelopes of the measured feature
    "scale",  # scale bars: across (true length, drawn at k) and along the axis (true)
    "labels",  # 3D text labels
    "readouts",  # numbers on the picture and the exaggeration caption
    "legend",  # colour legend and the clearance scalar bar
)
HIDDEN_BY_DEFAULT = frozenset({"rc"})
VIEWS = ("iso", "top", "section")  # the cameras every scene has
CLOSE_UP = "gap"  # a camera only a mate scene has: the section view closed in on the tightest spot

N_PHI = 96  # vertices round a surface (divisible by 8: vertices on +-x, +-y and the diagonals)
N_PHI_CAGE = 96  # vertices round a boundary ring (wireframe)
N_Z_MATE = 13  # rings along the mating surface (clearance colouring)
N_FINE = 2048  # samples round the ends when locating the tightest spot


@dataclass(frozen=True)
class Layer:
    """One mesh of a layer, with the keyword arguments for ``Plotter.add_mesh``."""

    name: str
    mesh: pv.PolyData
    style: dict = field(default_factory=dict)


@dataclass(frozen=True)
class Label:
    """A 3D text label: anchor point (drawn coordinates), text, colour, size."""

    point: tuple[float, float, float]
    text: str
    colour: str = S.TEXT
    size: int = 15
    layer: str = "labels"
    justify: str = "left"  # which way the text runs from the point: "left" (text to the right) or "right"


Camera = tuple[tuple[float, float, float], tuple[float, float, float], tuple[float, float, float]]


@dataclass(frozen=True)
class Scene3D:
    title: str
    layers: dict[str, tuple[Layer, ...]]  # layer name -> meshes (only layers with content)
    labels: tuple[Label, ...]
    readouts: tuple[str, ...]  # the numbers on the picture, one line each
    legend: tuple[tuple[str, str], ...]  # (what it means, colour)
    cameras: dict[str, Camera]  # view -> (position, focal point, view up)
    exaggeration: float  # radial exaggeration k (1.0: true geometry)
    units: Units
    caption: str = ""  # the scale sentence (first line), then the 3D picture's own clause
    scale_text: str = ""  # the scale sentence alone: viewer.exaggeration.scale_text, as in the 2D views
    verdict: str = ""
    verdict_colour: str = S.TEXT
    clearance: float | None = None  # what-if worst clearance (true, diametral) in scene units
    tightest: float | None = None  # smallest 'clearance' scalar found on the surface (true)
    scalar_bar: dict | None = None  # title, clim of the clearance colouring
    legend_layers: tuple[str, ...] = ()  # layer each legend row belongs to
    parallel_scale: dict[str, float] = field(default_factory=dict)  # views drawn in parallel projection
    section: tuple[tuple[float, float, float], tuple[float, float, float]] = ((0, 0, 0), (0, 1, 0))  # origin, normal
    kind: str = "mate"  # "mate", "feature" or "inspection"
    feature_ids: tuple[str, ...] = ()
    states: dict[str, FeatureState] = field(default_factory=dict)
    notes: tuple[str, ...] = ()
    window_centre: tuple[float, float] = (0.26, 0.27)  # camera window centre: picture shifted left/down
    verdicts: tuple[tuple[str, str], ...] = ()  # (text, colour): verdict lines drawn under the readouts

    def meshes(self, layer: str) -> tuple[pv.PolyData, ...]:
        return tuple(item.mesh for item in self.layers.get(layer, ()))

    def find(self, layer: str, name: str) -> Layer:
        for item in self.layers.get(layer, ()):
            if item.name == name:
                return item
        raise KeyError(f"{layer}/{name}")


@dataclass(frozen=True)
class _Ex:
    """The drawing transform: lateral deviations and radii exaggerated by k about (c, R0)."""

    k: float
    c: tuple[float, float]
    R0: float

    def pts(self, p: np.ndarray) -> np.ndarray:
        q = np.array(p, dtype=float, copy=True)
        q[..., 0] = self.c[0] + self.k * (q[..., 0] - self.c[0])
        q[..., 1] = self.c[1] + self.k * (q[..., 1] - self.c[1])
        return q

    def r(self, radius: float) -> float:
        return max(self.R0 + self.k * (radius - self.R0), 0.02 * self.R0)


def _surf(colour: str, opacity: float, **kw) -> dict:
    """The ``add_mesh`` style of a shaded surface."""
    d = dict(color=colour, opacity=opacity, smooth_shading=True, specular=0.2, ambient=0.25,
             show_edges=False)
    d.update(kw)
    return d


def _line(colour: str, width: float) -> dict:
    """The ``add_mesh`` style of unlit lines."""
    return dict(color=colour, line_width=width, render_lines_as_tubes=False, lighting=False)
