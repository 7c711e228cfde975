"""What a 2D view shows and in which state: the subject (a mate, or a lone hole or pin), the
what-if states resolved against the worst case (:func:`geom.boundaries.worst_case_state`), and
the facts about a state that several views print (the name of the boundary a part presents, the
"state shown" line, whether perfect form is assumed).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from geom.analysis import SceneResult, term
from geom.boundaries import (
    FeatureState,
    effective_size,
    tolerance_allowed,
    virtual_condition,
    worst_case_state,
)
from geom.model import Feature, Kind, Material
from geom.placement import AxisPlacement


@dataclass(frozen=True)
class Subject:
    """What a view shows: a mate (hole + pin) or a lone feature (one of them None)."""

    key: str  # "mate-<hole>--<pin>" or "feature-<id>"
    title: str
    hole: Feature | None
    pin: Feature | None

    @property
    def features(self) -> tuple[Feature, ...]:
        return tuple(f for f in (self.hole, self.pin) if f is not None)

    @property
    def is_mate(self) -> bool:
        return self.hole is not None and self.pin is not None


def subject_of(res: SceneResult, subject: int | str) -> Subject:
    """``subject``: a mate index (int) or a feature id (str)."""
    sc = res.scene
    if isinstance(subject, (int, np.integer)) and not isinstance(subject, bool):
        if not 0 <= subject < len(sc.mates):
            raise IndexError(f"mate index {subject} out of range (scene has {len(sc.mates)} mates)")
        m = sc.mates[subject]
        h, p = sc.feature(m.hole), sc.feature(m.pin)
        return Subject(f"mate-{h.id}--{p.id}", f"mate: hole '{h.id}' with pin '{p.id}'", h, p)
    f = sc.feature(subject)
    title = f"{f.kind.value} '{f.id}'" + (f" ({f.name})" if f.name else "")
    if f.kind is Kind.HOLE:
        return Subject(f"feature-{f.id}", title, f, None)
    return Subject(f"feature-{f.id}", title, None, f)


def resolve_states(res: SceneResult, subject: int | str | Subject,
                   states: dict[str, FeatureState] | None = None) -> dict[str, FeatureState]:
    """The state of every feature of the subject: the given one, else the worst case (in a
    mate the pin tilts the opposite way to the hole); states of other features are ignored."""
    sub = subject if isinstance(subject, Subject) else subject_of(res, subject)
    out = {f.id: worst_case_state(f, sub.is_mate) for f in sub.features}
    for fid, st in (states or {}).items():
        if fid in out:
            out[fid] = st
    return out


def _subject(res: SceneResult, subject) -> Subject:
    return subject if isinstance(subject, Subject) else subject_of(res, subject)


def _tilt_direction_deg(pl: AxisPlacement) -> float:
    return math.degrees(math.atan2(pl.direction[1], pl.direction[0]))


def _zone_height(pl: AxisPlacement) -> float:
    return pl.zone_z[1] - pl.zone_z[0]


def _boundary_name(f: Feature, state: FeatureState, standard) -> str:
    """Name of the mating-side boundary a part in this state presents."""
    vc = virtual_condition(f)
    tol = f.tolerance
    eff = effective_size(f, state)
    if vc is not None and tol is not None and tol.material is Material.MMC and abs(eff - vc) < 1e-9:
        return term("vc_MMC", standard)[0]
    return "clear boundary" if f.kind is Kind.HOLE else "swept boundary"


def _form_assumed(res: SceneResult, f: Feature) -> bool:
    """geom finds no worst-case boundary on the feature's mating (MMC) side (ISO independency
    without (M) or (E)): a drawn boundary there assumes perfect form."""
    fr = res.features[f.id]
    return (fr.inner_boundary if f.kind is Kind.HOLE else fr.outer_boundary).value is None


def _state_line(res, states) -> str:
    """The footer line naming the state drawn: size and tolerance allowed of each feature."""
    u = res.scene.units
    parts = []
    for fid, st in states.items():
        f = res.scene.feature(fid)
        ta = tolerance_allowed(f, st.size)
        share = "" if st.share == 1.0 else f", {st.share:.0%} of it used"
        parts.append(f"{fid} at {u.fmt(st.size)} (tolerance allowed {u.fmt(ta)}{share})")
    return "state shown: " + "; ".join(parts)


@dataclass(frozen=True)
class Measured:
    """A measured feature as the 2D views mark it: the envelope size its bonus was figured from
    (the actual mating size; under an (L) modifier the minimum-material one), its symbol, and
    the tolerance allowed at it (geom.inspect's InspectionResult)."""

    feature_id: str
    size: float
    allowed: float | None
    abbr: str  # AME / AMME (ASME), GX / GN (ISO): geom.inspect.envelope_abbr

    def text(self, u) -> str:
        """"measured: AME 8.003, tolerance allowed 0.018" (no tolerance: the size alone)."""
        tail = "" if self.allowed is None else f", tolerance allowed {u.fmt(self.allowed)}"
        return f"measured: {self.abbr} {u.fmt(self.size)}{tail}"

    def state(self, direction_deg: float = 0.0) -> FeatureState:
        """The what-if state at the measured size, its whole allowed tolerance used."""
        return FeatureState(self.size, 1.0, direction_deg)


def measured_of(insp) -> Measured | None:
    """The :class:`Measured` of an inspection result (a :class:`Measured` passes through);
    None where no envelope size was found."""
    if insp is None or isinstance(insp, Measured):
        return insp
    from geom.inspect import envelope_abbr

    f = insp.feature
    lmc = f.tolerance is not None and f.tolerance.material is Material.LMC
    related = insp.bonus_basis == "related"
    if lmc:
        env = insp.least_material_related if related else insp.least_material
        size = None if env is None else env.diameter
    else:
        size = insp.related_ame if related else insp.unrelated_ame
    if size is None:
        return None
    return Measured(f.id, float(size), insp.tolerance_allowed,
                    envelope_abbr(insp.standard, f.kind is Kind.HOLE, lmc))

