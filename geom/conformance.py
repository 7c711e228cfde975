"""Conformance of a measured part: the three outcomes of ISO 14253-1, checks, and one verdict.

A measured value is judged against a specification zone. Under ISO 14253-1 the expanded
uncertainty U (k = 2) shrinks the zone for proving conformance and grows it for proving
nonconformance; between the two neither is proven. So a check has exactly one of three
outcomes (:class:`Outcome`), never a boolean that would turn "not proven" into "conforms":

>>> c = decide("axis", (0.0175,), None, 0.018, 0.001)
>>> c.outcome is Outcome.NOT_PROVEN, c.conforms
(True, None)
>>> verdict_word(c)
('NOT PROVEN', 'unproven')
>>> verdict_word(decide("axis", (0.012,), None, 0.018, 0.001))
('CONFORMS', 'ok')

Without a stated U the measured values decide alone (as if U = 0), and the check says so in
:attr:`Check.rule`. A check that could not be evaluated is never counted as proven.

Every front end (the CLI, the 3D picture, the 2D views, the window and the PDF) turns a check
into words and a colour role with :func:`verdict_word`, and an inspected feature into one
overall verdict with :func:`part_verdict`, so they cannot disagree.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import Enum

SLACK = 1e-9  # numeric slack when comparing with a limit (scene units)


class Outcome(str, Enum):
    """ISO 14253-1 outcome of a check (``value`` is the phrase printed)."""

    CONFORMS = "conformance proven"
    NONCONFORMS = "nonconformance proven"
    NOT_PROVEN = "not proven"


# colour roles: each front end maps these to its own colours (viewer.style.ROLE_COLOUR, ...)
ROLE_OK = "ok"
ROLE_FAIL = "fail"
ROLE_UNPROVEN = "unproven"
ROLE_NONE = "none"  # not evaluated / not applicable


@dataclass(frozen=True)
class Check:
    """One verdict: measured value(s) against a limit, with its ISO 14253-1 outcome.

    ``inside`` tells whether the measured values themselves lie within the limits (shown for
    information; the verdict is ``outcome``). ``uncertainty`` is the U used, None when none was
    stated (the values then decide alone).
    """

    name: str
    outcome: Outcome
    detail: str  # e.g. "0.024 > 0.022"
    values: tuple[float, ...] = ()
    low: float | None = None
    high: float | None = None
    evaluated: bool = True
    uncertainty: float | None = None
    inside: bool | None = None
    missing: tuple[str, ...] = ()  # parts of a combined check that could not be evaluated
    parts: tuple["Check", ...] = ()  # the checks a combined check is made of

    @property
    def conforms(self) -> bool | None:
        """True / False only where proven; None where not proven or not evaluated."""
        if not self.evaluated:
            return None
        return {Outcome.CONFORMS: True, Outcome.NONCONFORMS: False}.get(self.outcome)

    @property
    def rule(self) -> str:
        if not self.evaluated:
            return "not evaluated"
        if self.uncertainty is None:
            return "measured values only (no U stated)"
        return "ISO 14253-1 decision rule (U, k = 2)"

    @property
    def outcome_text(self) -> str:
        """The outcome as printed beside the check, e.g. ``conformance proven (U = 0.001)``."""
        if not self.evaluated:
            return "not evaluated"
        if self.outcome is Outcome.NOT_PROVEN and self.missing:
            return f"not proven: {', '.join(self.missing)} not evaluated"
        if self.uncertainty is None:
            return {Outcome.CONFORMS: "conforms on the measured values (no U stated)",
                    Outcome.NONCONFORMS: "does not conform on the measured values (no U stated)",
                    Outcome.NOT_PROVEN: "not proven"}[self.outcome]
        if self.outcome is Outcome.NOT_PROVEN and self.inside is not None:
            return "not proven either way (within U of a limit)"
        return self.outcome.value


def not_evaluated(name: str, why: str) -> Check:
    return Check(name, Outcome.NOT_PROVEN, why, evaluated=False)



def decide(name: str, values, low: float | None, high: float | None, U: float | None,
           units=None) -> Check:
    """ISO 14253-1 decision rule (ISO 14253-1:2017, conformance and nonconformance zones, from
    memory): conformance is proven when every value lies in the specification zone shrunk by U
    on each side, nonconformance when one lies outside it grown by U; otherwise neither.
    Without U the measured values decide alone.

    ``units`` (a :class:`geom.model.Units`) formats the values and limits together, with the
    digits needed to keep unequal numbers from printing equal (:meth:`Units.fmt_cmp`).
    """
    vals = tuple(float(v) for v in values)
    lo = -math.inf if low is None else low
    hi = math.inf if high is None else high
    u = U or 0.0
    inside = all(lo - SLACK <= v <= hi + SLACK for v in vals)
    if all(lo + u - SLACK <= v <= hi - u + SLACK for v in vals):
        outcome = Outcome.CONFORMS
    elif any(v < lo - u - SLACK or v > hi + u + SLACK for v in vals):
        outcome = Outcome.NONCONFORMS
    else:
        outcome = Outcome.NOT_PROVEN
    limits = tuple(x for x in (low, high) if x is not None)
    shown = list(units.fmt_cmp(*vals, *limits)) if units is not None else [f"{v:g}" for v in vals + limits]
    sv, sl = shown[: len(vals)], shown[len(vals):]
    text = " .. ".join(sv)
    if low is not None and high is not None:
        detail = f"{text} {'within' if inside else 'outside'} {sl[0]} .. {sl[1]}"
    elif high is not None:
        detail = f"{text} {'<=' if inside else '>'} {sl[0]}"
    elif low is not None:
        detail = f"{text} {'>=' if inside else '<'} {sl[0]}"
    else:
        detail = text
    return Check(name, outcome, detail, vals, low, high, True, U, inside)



def with_detail(c: Check, detail: str, name: str | None = None) -> Check:
    """The same check with another detail text (and name)."""
    return Check(name or c.name, c.outcome, detail, c.values, c.low, c.high, c.evaluated, c.uncertainty,
                 c.inside, c.missing, c.parts)


def combine(name: str, checks, required: bool = True) -> Check:
    """All of ``checks`` must conform. Any proven nonconformance makes the whole nonconforming;
    conformance is proven only when every check is evaluated and proven (``required``: a check
    not evaluated leaves the whole not proven)."""
    checks = [c for c in checks if c is not None]
    done = [c for c in checks if c.evaluated]
    detail = "; ".join(c.detail for c in checks)
    if not done:
        return not_evaluated(name, detail)
    U = next((c.uncertainty for c in done if c.uncertainty is not None), None)
    inside = all(c.inside is not False for c in done)
    if any(c.outcome is Outcome.NONCONFORMS for c in done):
        out = Outcome.NONCONFORMS
    elif all(c.outcome is Outcome.CONFORMS for c in done) and (len(done) == len(checks) or not required):
        out = Outcome.CONFORMS
    else:
        out = Outcome.NOT_PROVEN
    missing = tuple(c.name for c in checks if not c.evaluated) if required else ()
    return Check(name, out, detail, (), None, None, True, U, inside, missing, tuple(checks))


def deviation(check: Check) -> float | None:
    """How far the worst measured value lies beyond the specification limit: positive beyond it
    (the amount of the nonconformance), negative inside it (the margin left), None where the
    check has no values or no limit (a combined check: see its ``parts``).

    >>> round(deviation(decide("axis", [0.021], None, 0.018, None)), 6)
    0.003
    >>> round(deviation(decide("size", [8.004, 8.019], 8.0, 8.022, None)), 6)
    -0.003
    """
    if not check.values or (check.low is None and check.high is None):
        return None
    worst = -math.inf
    for v in check.values:
        if check.high is not None:
            worst = max(worst, v - check.high)
        if check.low is not None:
            worst = max(worst, check.low - v)
    return worst


WORDS = {
    Outcome.CONFORMS: ("CONFORMS", ROLE_OK),
    Outcome.NONCONFORMS: ("DOES NOT CONFORM", ROLE_FAIL),
    Outcome.NOT_PROVEN: ("NOT PROVEN", ROLE_UNPROVEN),
}


def verdict_word(check: Check) -> tuple[str, str]:
    """(word, colour role) of a check: the one mapping every front end uses."""
    if not check.evaluated:
        return "NOT EVALUATED", ROLE_NONE
    return WORDS[check.outcome]


def readings_disagree(a: Check | None, b: Check | None) -> bool:
    """Two evaluated readings with opposite proven outcomes."""
    return (a is not None and b is not None and a.conforms is not None and b.conforms is not None
            and a.conforms != b.conforms)


@dataclass(frozen=True)
class PartVerdict:
    """The one overall verdict of an inspected feature."""

    outcome: Outcome | None  # None: nothing governing could be evaluated
    word: str
    role: str
    headline: str  # e.g. "PART CONFORMS: size and surface (virtual condition) readings"
    governing: tuple[str, ...]  # names of the checks that decide
    why: str  # which readings govern and why
    notes: tuple[str, ...]  # labelled notes: readings that do not govern and disagree


def part_verdict(size: Check, axis: Check, surface: Check, governing: tuple[str, ...], why: str,
                 notes=()) -> PartVerdict:
    """Combine the governing checks of one feature into its verdict."""
    by = {"size": size, "axis": axis, "surface": surface}
    gov = [by[n] for n in governing]
    whole = combine("part", gov)
    if not whole.evaluated:
        word, role = "NOT EVALUATED", ROLE_NONE
        outcome = None
    else:
        word, role = verdict_word(whole)
        outcome = whole.outcome
    failing = [c for c in gov if c.outcome is Outcome.NONCONFORMS and c.evaluated]
    unproven = [c for c in gov if c.outcome is Outcome.NOT_PROVEN or not c.evaluated]
    names = " and ".join(governing)
    if outcome is Outcome.NONCONFORMS:
        head = "PART DOES NOT CONFORM: " + "; ".join(f"{c.name} {c.detail}" for c in failing)
    elif outcome is Outcome.CONFORMS:
        head = f"PART CONFORMS: {names} readings conform"
    elif outcome is Outcome.NOT_PROVEN:
        head = "CONFORMANCE NOT PROVEN: " + "; ".join(
            f"{c.name} {'not evaluated (' + c.detail + ')' if not c.evaluated else c.outcome_text}" for c in unproven)
    else:
        head = "NOT EVALUATED: " + "; ".join(c.detail for c in gov)
    return PartVerdict(outcome, word, role, head, tuple(governing), why, tuple(notes))
