"""A teaching sweep: one feature's produced size run from MMC to LMC (and its tilt direction
round), with the numbers that tick beside the picture at each step.

At each step the part is at the worst case for that size: the whole tolerance allowed is used.
Under MMC the boundary the part presents to its mate (hole: size - tolerance allowed; pin:
size + tolerance allowed) stays at the virtual condition however the size moves: the bonus
earned is exactly the size departure (ASME Y14.5 bonus tolerance and virtual condition; ISO 2692
MMVS). That constant opening is the lesson.

>>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
>>> bore = Feature("bore", Kind.HOLE, (10.0, 10.04), 12.0, tolerance=Tolerance(
...     Characteristic.POSITION, 0.05, material=Material.MMC, datums=("A", "B")))
>>> [(round(s.size, 3), round(s.bonus, 3), round(s.presented, 3)) for s in size_sweep(bore, 3)]
[(10.0, 0.0, 9.95), (10.02, 0.02, 9.95), (10.04, 0.04, 9.95)]
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .boundaries import (
    FeatureState, bonus, effective_size, tolerance_allowed, virtual_condition, worst_case_state,
)
from .model import Feature

MAX_STEPS = 2000  # a sweep longer than this is a mistake, not a lesson


@dataclass(frozen=True)
class SweepStep:
    """One step of a sweep: the state drawn and the numbers shown beside it."""

    index: int
    state: FeatureState
    bonus: float  # earned at this size (the ISO "increase")
    tolerance_allowed: float  # stated + bonus
    presented: float  # the boundary the part presents to its mate (effective_size)
    virtual_condition: float | None  # constant for a feature with a modifier; None for RFS

    @property
    def size(self) -> float:
        return self.state.size


def size_sweep(feature: Feature, steps: int = 25, turns: float = 0.0,
               role_in_mate: bool = False) -> tuple[SweepStep, ...]:
    """``steps`` states of ``feature`` from MMC to LMC (both included), each using the whole
    tolerance allowed at its size; the tilt direction starts where the worst case puts it
    (:func:`geom.boundaries.worst_case_state`) and turns ``turns`` full turns over the sweep
    (0: the size alone moves).

    Raises ValueError for fewer than 2 or more than :data:`MAX_STEPS` steps or a non-finite turn.
    """
    if isinstance(steps, bool) or not isinstance(steps, int) or not 2 <= steps <= MAX_STEPS:
        raise ValueError(f"a sweep needs a whole number of steps from 2 to {MAX_STEPS}, got {steps!r}")
    if not math.isfinite(turns):
        raise ValueError(f"a sweep needs a finite number of turns, got {turns!r}")
    start = worst_case_state(feature, role_in_mate)
    vc = virtual_condition(feature)
    out = []
    for i in range(steps):
        u = i / (steps - 1)
        size = feature.mmc + u * (feature.lmc - feature.mmc)
        if i == steps - 1:
            size = feature.lmc  # exactly, not within rounding
        direction = (start.direction_deg + 360.0 * turns * u) % 360.0
        st = FeatureState(size, 1.0, direction)
        out.append(SweepStep(i, st, bonus(feature, size), tolerance_allowed(feature, size),
                             effective_size(feature, st), vc))
    return tuple(out)
