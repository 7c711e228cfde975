"""The verdict banner's content, without Qt: for a mate ASSEMBLES / INTERFERES at the sizes set
(geom's fit predicate) beside the worst case; for a fastener its position tolerance; for an
inspection geom's one part verdict (``InspectionResult.verdict``), word for word as the PDF shows
it. The colour comes from the verdict role (:data:`viewer.windowlogic.looks.ROLE_LOOK`)."""

from __future__ import annotations

from dataclasses import dataclass
from html import escape

from .inspection import decision_rule, other_axis_basis
from .whatif import mate_verdict_at


@dataclass(frozen=True)
class Banner:
    """``state``: "assembles" / "interferes" for a mate, the part verdict's role for an
    inspection, "none" otherwise. ``role`` picks the look; ``head`` is plain text shown after the
    role's mark when ``mark``; ``detail`` is rich text. ``tip``: the banner's tooltip, None to
    leave it as it is."""

    state: str
    role: str
    head: str
    detail: str
    mark: bool = True
    tip: str | None = ""


def mate_banner(res, scene, mi: int | None, states) -> Banner:
    """The fit of mate ``mi`` at ``states``; None: the feature is in no mate."""
    if mi is None:
        return Banner("none", "none", "NO MATE: fit not evaluated",
                      "This feature is in no mate. Add a mate to judge a fit.", mark=False)
    v = mate_verdict_at(res, mi, states)
    m = scene.mates[mi]
    return Banner("assembles" if v.assembles else "interferes", "ok" if v.assembles else "fail", v.headline,
                  f"Mate {mi + 1} ({m.hole} ← {m.pin}). Worst case: {v.worst_case}.<br>"
                  f"<span style='font-family:monospace'>{escape(v.formula)}</span>", tip=CLEARANCE_TIP)


CLEARANCE_TIP = (
    "The clearance here is the guaranteed clearance (through-view): the hole's clear opening minus "
    "the pin's swept envelope, both normal to datum A, at the sizes and tolerance shares set. It holds "
    "whatever directions the axes lean, and the verdict is taken on it.\n"
    "The 3D view's 'local gap at this tilt direction' is the gap where the pictured parts come "
    "closest with the tilt directions as set; it depends on those directions and on where along the "
    "axis the parts meet, so it can differ from the guaranteed clearance. It explains the picture; "
    "it does not decide the fit.")


def fastener_banner(res, scene, fid: str) -> Banner:
    """A fastener table: its position tolerance and formula; no fit to judge."""
    fr = res.fasteners[fid]
    u, st = scene.units, scene.standard
    return Banner("none", "none", f"FASTENER {fid} ({fr.fastener.kind}): position tolerance "
                                  f"⌀{u.fmt(fr.position_tolerance.value)} {u.value}",
                  f"<span style='font-family:monospace'>{escape(fr.position_tolerance.formula(u, st))}</span>"
                  "<br>No fit to judge here: the tolerance is what the fastener pattern allows.", mark=False)


def inspection_banner(fid: str, res, units) -> Banner:
    """geom's part verdict of the inspection ``res`` of feature ``fid`` (None: no result yet)."""
    if res is None:
        return Banner("none", "none", f"INSPECTION of {fid}: no result yet",
                      "Load a CSV of measured points for it (File > Load measured points…).", mark=False, tip=None)
    v = res.verdict
    rule = decision_rule(res, units, "no uncertainty U given: measured values alone")
    lines = [f"Measured {escape(res.feature.kind.value)} {escape(fid)}; {rule}."]
    if v is None:  # geom gave no overall verdict: nothing claims one
        return Banner("none", "none", f"INSPECTION of {fid}: NOT EVALUATED", "<br>".join(lines), tip=None)
    lines.append("<b>Why:</b> " + escape(v.why))
    if res.axis is not None:
        gov = f"<b>Governing axis reading:</b> {escape(res.axis.basis)}"
        other = other_axis_basis(res)
        if other:
            gov += f" (the {escape(other)} reading is shown and does not govern)"
        lines.append(gov)  # the reason (res.axis_governs) is in the tooltip and the readout table
    lines += ["<b>Note:</b> " + escape(n) for n in v.notes]
    return Banner(v.role, v.role, v.headline, "<br>".join(lines), tip=res.axis_governs or "")


def pattern_banner(res, scene, pid: str, states: dict | None = None) -> Banner:
    """A pattern: the measured pattern's verdict (the best fit within the datum shift, the datum
    features at their what-if sizes ``states``), the wrong way beside it where it would differ,
    else its gauge; the interfaces it is in."""
    from .whatif import pattern_now

    u, st = scene.units, scene.standard
    pr = pattern_now(res, scene, pid, states or {})
    p = pr.pattern
    lines = [f"{p.count} × {p.feature.id} to {'|'.join(p.frame.letters)}, {p.requirement} requirement; gauge "
             f"{pr.gauge.pins[0].kind}s ⌀{u.fmt(pr.gauge.pins[0].diameter.value)} (VC) at the basic locations"]
    if pr.right is not None:
        c = pr.right
        tier = "after the best fit within the datum shift"
        if pr.composite is not None and pr.composite.governs == "lower":  # the feature-relating tier decides
            c, tier = pr.composite.lower, f"in the lower tier ⌀{u.fmt(pr.spec.lower[0])} to {'|'.join(pr.spec.lower[1])}"
        g = c.readings[c.governs]
        role = "ok" if pr.conforms else "fail"
        head = (f"PATTERN {pid} {'CONFORMS' if pr.conforms else 'DOES NOT CONFORM'}: member {c.governs + 1} "
                f"⌀{u.fmt_cmp(g.position, g.allowed)[0]} {'<=' if g.margin >= 0 else '>'} "
                f"⌀{u.fmt_cmp(g.position, g.allowed)[1]} {tier}")
        c = pr.right
        if c.datum is not None:
            lines.append(f"datum {pr.pattern.frame.secondary.letter} at {u.fmt(c.datum.size)}: shift available "
                         f"{u.fmt(c.datum.diametral.value)} (radial {u.fmt(c.datum.radial.value)}), used "
                         f"({u.fmt(c.shift[0])}, {u.fmt(c.shift[1])})")
        if pr.wrong is not None and pr.wrong.conforms != c.conforms:
            lines.append("Adding the datum shift to each member's tolerance (the wrong way) would "
                         f"{'accept' if pr.wrong.conforms else 'reject'} it: the shift moves the pattern as one body.")
    else:
        role, head = "none", f"PATTERN {pid}: no measured members; its gauge and interfaces below"
    for it in res.frames.interfaces:
        if pid in (it.holes, it.pins):
            m = it.mate
            tight = m.pairs[m.tightest]
            lines.append(f"interface {it.holes} / {it.pins}: {'assembles' if m.assembles else 'DOES NOT ASSEMBLE'} "
                         f"in the worst case; tightest pair {tight.index + 1}: {tight.clearance_min.formula(u, st)}")
    return Banner(role, role, head, "<br>".join(lines), mark=role != "none")


def banner(res, scene, states, focus_inspection: str | None, inspection, fastener: str | None,
           mate: int | None, pattern: str | None = None) -> Banner:
    """The banner for the focus: an inspection (of feature ``focus_inspection``, its result
    ``inspection``), else a fastener, else a pattern, else the mate ``mate`` (None: no mate to
    judge)."""
    if focus_inspection is not None:
        return inspection_banner(focus_inspection, inspection, scene.units)
    if fastener is not None:
        return fastener_banner(res, scene, fastener)
    if pattern is not None:
        return pattern_banner(res, scene, pattern, states)
    return mate_banner(res, scene, mate, states)
