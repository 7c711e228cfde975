"""Judge a produced part: from inspection values typed into the scene or from measured points.

For one feature of size it gives the actual mating envelopes (unrelated: any orientation;
related: held to datum A as the tolerance requires), both axis readings (the feature axis, i.e.
the axis of the unrelated envelope, and the derived / extracted median line: the centres of
sections normal to the associated least-squares axis), the bonus and tolerance allowed, and
three readings, each with its ISO 14253-1 outcome (:mod:`geom.conformance`) when an expanded
uncertainty U (k = 2) is given:

* size: local two-point sizes within the limits and, where the envelope applies (ASME Rule #1
  or ISO (E)), the unrelated mating envelope not beyond MMC;
* axis: the governing axis reading within the tolerance allowed (t + bonus). Under ASME,
  position and orientation apply to the feature axis; the median line governs straightness
  only. Under ISO the extracted median line governs (ISO 1101);
* surface: the related envelope does not violate the virtual condition (what a functional
  gauge checks).

One overall verdict (:func:`geom.conformance.part_verdict`) combines the readings that govern:
size and surface where a modifier (MMC/LMC) applies, size and axis otherwise. A reading that
does not govern and disagrees is a labelled note.

The least-squares results a CMM usually prints are carried alongside, so a reader can see why a
gauge and a printout disagree. Definitions (ASME Y14.5-2018 §§1.3, 5.8 and Y14.5.1, from
memory): the unrelated actual mating envelope (AME) of a hole is the largest perfect cylinder,
in any orientation, that contains none of its surface; of a pin the smallest that contains it;
the related AME is the same held normal to datum A (and at the true position for position).

>>> from geom.scenefile import loads
>>> sc = loads('''units = "mm"
... [[feature]]
... id = "b"
... kind = "hole"
... limits = [8.0, 8.015]
... length = 12
... [feature.tolerance]
... characteristic = "perpendicularity"
... value = 0.015
... material = "MMC"
... datums = ["A"]
... [feature.measured]
... size = 8.004
... related_size = 7.990
... axis_deviation = 0.012
... local_sizes = [8.005, 8.012]
... ''')
>>> r = inspect_feature(sc, "b")
>>> round(r.tolerance_allowed, 6), r.axis_conforms, r.surface_conforms, r.size_conforms
(0.019, True, True, True)
>>> r.verdict.headline
'PART CONFORMS: size and surface readings conform'
"""

from __future__ import annotations

from ..conformance import Check, Outcome, decide
from .driver import inspect_feature
from .explain import GOVERNS_ASME, GOVERNS_ISO, _spread
from .output import inspection_to_json, render_inspection
from .readings import envelope_abbr, envelope_name, governing_axis, group_sections, straightness_needed
from .results import (
    BONUS_BASES, SLACK, AxisReading, Envelope, InspectError, InspectionResult, LeastSquaresResult, SectionResult,
)

__all__ = [
    "BONUS_BASES", "GOVERNS_ASME", "GOVERNS_ISO", "SLACK", "AxisReading", "Check", "Envelope", "InspectError",
    "InspectionResult", "LeastSquaresResult", "Outcome", "SectionResult", "decide", "envelope_abbr",
    "envelope_name", "governing_axis", "group_sections", "inspect_feature", "inspection_to_json",
    "render_inspection", "straightness_needed", "_spread",
]
