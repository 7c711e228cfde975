"""The 2D views of a mate or a lone feature (matplotlib, Agg only): pure functions, result and
what-if state in, a Figure and the numbers it shows out.

* :func:`through_view` (:mod:`.through`) - looking normal to datum A: the hole's end sections,
  their overlap (the clear opening, shaded), its largest inscribed circle, the pin's sections
  and swept envelope, and the clearance or overlap between them.
* :func:`section_view` (:mod:`.section`, drawn in the steps of :mod:`.section_steps`) - the
  section in the plane of the tilt: datum A, the tolerance zones, the tilted axes, hole walls,
  pin, the mating (virtual-condition) boundaries; tilt angle and zone width dimensioned.
* :func:`bonus_chart` (:mod:`.bonus`) - tolerance allowed against produced size across the
  limits, and below it the produced size with the two boundaries it gives, so a constant
  virtual condition shows as a flat line.
* :func:`draw_view` / :func:`save_figure` (:mod:`.dispatch`) - a view by name, and saving.
* :mod:`.subjects` - what a view shows (a mate or a lone feature) and in which state;
  :mod:`.aids` - the style and the drawing aids the views share.

Tolerances are tiny against sizes (0.015 on 8 mm), so radial deviations are exaggerated about a
reference radius R0: a curve at distance r from the axis is drawn at R0' + k (r - R0), an axis
offset x at k x (R0' = R0 unless a wide, short feature is drawn with its diameter shortened);
the mapping and k are :mod:`viewer.exaggeration`'s: one k per subject, the 3D scene's, at every
what-if state. Every drawing states it in the one sentence of
:func:`viewer.exaggeration.scale_text` and carries a scale bar labelled with its TRUE length;
every dimension text gives the TRUE value at the units' precision.
Geometry is computed in true units (shapely, :mod:`geom.throughview`) and only mapped for
display; each function returns ``(Figure, data)`` where the frozen data object keeps the true
geometry and numbers, and the artists carry ``gid`` labels so tests can read them back.

Figures are built with :class:`matplotlib.figure.Figure` directly (no pyplot, no GUI backend):
``fig.savefig`` renders with Agg / the PDF and SVG backends.
"""

import matplotlib

# Names, ids and report fields are free text: a "$" in them must print as "$", never start
# matplotlib's math markup. No picture of ours uses math markup, so it is off for every figure
# (set on importing any part of this package, before any figure is built).
matplotlib.rcParams["text.parse_math"] = False

from viewer.exaggeration import Exaggeration, auto_k  # noqa: E402

from .aids import (  # noqa: E402
    DPI,
    FIGSIZE,
    FONT_FAMILY,
    HOLE_LINE,
    OPENING_FILL,
    RC_PARAMS,
    style_context,
)
from .bonus import BonusData, BonusPanel, bonus_chart, bonus_data  # noqa: E402
from .dispatch import VIEWS_2D, draw_view, save_figure  # noqa: E402
from .section import SectionData, section_data, section_view  # noqa: E402
from .subjects import Measured, Subject, measured_of, resolve_states, subject_of  # noqa: E402
from .through import ThroughData, through_data, through_view  # noqa: E402

__all__ = [
    "BonusData", "BonusPanel", "DPI", "Exaggeration", "FIGSIZE", "FONT_FAMILY", "HOLE_LINE", "Measured", "OPENING_FILL",
    "RC_PARAMS", "SectionData", "Subject", "ThroughData", "VIEWS_2D", "auto_k", "bonus_chart", "bonus_data",
    "draw_view", "measured_of", "resolve_states", "save_figure", "section_data", "section_view", "style_context", "subject_of",
    "through_data", "through_view",
]
