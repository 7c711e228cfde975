"""Result values of an inspection (frozen dataclasses) and its error type."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..conformance import (
    Check, PartVerdict,
)
from ..model import (
    Feature, Standard, Units,
)

SLACK = 1e-9  # numeric slack when comparing with a limit (scene units)
BONUS_BASES = ("unrelated", "related")


class InspectError(ValueError):
    """Inspection input that cannot be used (message names the file and what was expected)."""


# ---------------------------------------------------------------- result values


@dataclass(frozen=True)
class SectionResult:
    """One section (ring) of points: least-squares circle, mating circle, local sizes."""

    label: str
    z: float  # mean height of its points
    n: int
    ls_centre: tuple[float, float]
    ls_diameter: float
    mating_centre: tuple[float, float]  # maximum inscribed (hole) / minimum circumscribed (pin)
    mating_diameter: float
    local_min: float  # smallest and largest two-point size
    local_max: float
    roundness: float  # radial range about the least-squares centre
    largest_gap_deg: float  # largest angular gap between points seen from the LS centre


@dataclass(frozen=True)
class Envelope:
    """A perfect cylinder fitted to the points: its axis point at z = 0, unit direction, diameter."""

    name: str
    diameter: float
    point: tuple[float, float, float]
    direction: tuple[float, float, float]
    constraint: str

    def at_z(self, z: float) -> tuple[float, float]:
        p, d = self.point, self.direction
        s = (z - p[2]) / d[2]
        return (p[0] + s * d[0], p[1] + s * d[1])

    @property
    def tilt_deg(self) -> float:
        return math.degrees(math.acos(max(-1.0, min(1.0, abs(self.direction[2])))))


@dataclass(frozen=True)
class AxisReading:
    """How much zone the derived median line needs."""

    deviation: float | None  # reading for the tolerance's own zone shape
    diameter_reading: float | None
    width_reading: float | None
    method: str  # what was measured and how
    line: np.ndarray  # (k, 3) points the reading was taken on
    basis: str = "median line"  # "median line" (derived / extracted median line) or "feature axis"


@dataclass(frozen=True)
class LeastSquaresResult:
    """The usual CMM printout: least-squares cylinder size and axis."""

    cylinder: Envelope | None
    size: float
    axis_deviation: float | None
    bonus: float | None
    tolerance_allowed: float | None
    size_conforms: bool
    axis_conforms: bool | None
    formulas: tuple[str, ...]


@dataclass(frozen=True)
class InspectionResult:
    feature: Feature
    units: Units
    standard: Standard
    source: str  # "points" or "values"
    source_file: str | None
    points: np.ndarray | None  # (n, 3) measured points, datum frame
    point_section: np.ndarray | None  # (n,) index into ``sections``
    radial_deviation: np.ndarray | None  # (n,) distance from the LS cylinder's surface (+ outward)
    sections: tuple[SectionResult, ...]
    median_line: np.ndarray | None  # (k, 3) LS centres of the sections
    unrelated: Envelope | None
    related: Envelope | None
    least_material: Envelope | None  # unrelated minimum-material envelope (LMC modifier only)
    least_material_related: Envelope | None
    unrelated_ame: float | None
    related_ame: float | None
    local_sizes: tuple[float, float] | None
    axis: AxisReading | None
    bonus_basis: str
    bonus: float | None
    tolerance_allowed: float | None
    virtual_condition: float | None
    uncertainty: float | None
    formulas: tuple[str, ...]
    size_check: Check
    local_check: Check
    envelope_check: Check | None
    axis_check: Check
    surface_check: Check
    least_squares: LeastSquaresResult | None
    explanation: tuple[str, ...]
    notes: tuple[str, ...] = ()
    warnings: tuple[str, ...] = field(default=())
    # both axis readings: the axis of the unrelated envelope (ASME's "feature axis") and the
    # derived / extracted median line; ``axis`` is the one that governs (``axis_governs`` says why)
    feature_axis: AxisReading | None = None
    median_axis: AxisReading | None = None
    other_axis_check: Check | None = None  # the reading that does not govern, judged the same way
    axis_governs: str = ""
    verdict: PartVerdict | None = None  # the one overall verdict of the feature
    section_increases: tuple[float, ...] | None = None  # straightness at a modifier: per section

    @property
    def size_conforms(self) -> bool | None:
        return self.size_check.conforms

    @property
    def axis_conforms(self) -> bool | None:
        return self.axis_check.conforms

    @property
    def surface_conforms(self) -> bool | None:
        return self.surface_check.conforms

    @property
    def axis_deviation(self) -> float | None:
        return None if self.axis is None else self.axis.deviation
