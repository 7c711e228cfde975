"""Output of an inspection: the ``inspect --json`` object and the text ``matezone inspect`` prints."""

from __future__ import annotations



from ..analysis import analyse_feature, term
from ..conformance import (
    Check, verdict_word,
)
from ..model import (
    Kind, Standard,
)
from .results import AxisReading, Envelope, InspectionResult

# ---------------------------------------------------------------- output


def _r(v):
    if v is None:
        return None
    return round(float(v), 9) + 0.0


def _env_json(e: Envelope | None):
    if e is None:
        return None
    return {"name": e.name, "diameter": _r(e.diameter), "axis_point_at_A": [_r(v) for v in e.point],
            "direction": [_r(v) for v in e.direction], "tilt_deg": _r(e.tilt_deg), "constraint": e.constraint}


def _check_json(c: Check | None):
    """A check: ``conforms`` is true/false only where proven (null otherwise), ``outcome`` one of
    the three ISO 14253-1 outcomes, ``evaluated`` false where the check could not be made."""
    if c is None:
        return None
    return {"conforms": c.conforms, "outcome": c.outcome.value, "evaluated": c.evaluated, "rule": c.rule,
            "outcome_text": c.outcome_text, "detail": c.detail,
            "values": [_r(v) for v in c.values], "low": _r(c.low), "high": _r(c.high)}


def _axis_json(a: AxisReading | None):
    if a is None:
        return None
    return {"basis": a.basis, "deviation": _r(a.deviation), "diameter_reading": _r(a.diameter_reading),
            "width_reading": _r(a.width_reading), "method": a.method}


def inspection_to_json(res: InspectionResult) -> dict:
    """The ``inspect --json`` object (numbers in scene units; None where not evaluated)."""
    f = res.feature
    tol = f.tolerance
    ls = res.least_squares
    return {
        "feature": f.id,
        "kind": f.kind.value,
        "units": res.units.value,
        "standard": res.standard.value,
        "limits": list(f.limits),
        "tolerance": None if tol is None else tol.symbol(res.units),
        "source": res.source,
        "source_file": res.source_file,
        "n_points": None if res.points is None else int(len(res.points)),
        "unrelated_ame": _r(res.unrelated_ame),
        "related_ame": _r(res.related_ame),
        "unrelated_amme": None if res.least_material is None else _r(res.least_material.diameter),
        "related_amme": None if res.least_material_related is None else _r(res.least_material_related.diameter),
        "local_sizes": None if res.local_sizes is None else [_r(v) for v in res.local_sizes],
        "axis_deviation": _r(res.axis_deviation),
        "axis_diameter_reading": None if res.axis is None else _r(res.axis.diameter_reading),
        "axis_width_reading": None if res.axis is None else _r(res.axis.width_reading),
        "axis_method": None if res.axis is None else res.axis.method,
        "feature_axis_deviation": None if res.feature_axis is None else _r(res.feature_axis.deviation),
        "median_line_deviation": None if res.median_axis is None else _r(res.median_axis.deviation),
        "axis_readings": {
            "governing": None if res.axis is None else res.axis.basis,
            "why": res.axis_governs,
            "feature_axis": _axis_json(res.feature_axis),
            "median_line": _axis_json(res.median_axis),
            "not_governing_check": _check_json(res.other_axis_check),
        },
        "verdict": None if res.verdict is None else {
            "outcome": None if res.verdict.outcome is None else res.verdict.outcome.value,
            "word": res.verdict.word, "headline": res.verdict.headline,
            "governing_checks": list(res.verdict.governing), "why": res.verdict.why,
            "notes": list(res.verdict.notes),
        },
        "section_increases": None if res.section_increases is None else [_r(v) for v in res.section_increases],
        "bonus_basis": res.bonus_basis,
        "bonus": _r(res.bonus),
        "tolerance_allowed": _r(res.tolerance_allowed),
        "virtual_condition": _r(res.virtual_condition),
        "uncertainty": _r(res.uncertainty),
        "decision_rule": ("ISO 14253-1 (U, k = 2)" if res.uncertainty is not None
                          else "measured values only (no U given)"),
        "size_conforms": res.size_conforms,
        "axis_conforms": res.axis_conforms,
        "surface_conforms": res.surface_conforms,
        "decisions": {
            "size": _check_json(res.size_check),
            "local_sizes": _check_json(res.local_check),
            "envelope": _check_json(res.envelope_check),
            "axis": _check_json(res.axis_check),
            "surface": _check_json(res.surface_check),
        },
        "envelopes": {
            "unrelated": _env_json(res.unrelated),
            "related": _env_json(res.related),
            "unrelated_minimum_material": _env_json(res.least_material),
            "related_minimum_material": _env_json(res.least_material_related),
        },
        "median_line": None if res.median_line is None else [[_r(v) for v in p] for p in res.median_line],
        "sections": [
            {"label": s.label, "z": _r(s.z), "n": s.n, "ls_centre": [_r(v) for v in s.ls_centre],
             "ls_diameter": _r(s.ls_diameter), "mating_centre": [_r(v) for v in s.mating_centre],
             "mating_diameter": _r(s.mating_diameter), "local_min": _r(s.local_min),
             "local_max": _r(s.local_max), "roundness": _r(s.roundness)}
            for s in res.sections
        ],
        "least_squares": None if ls is None else {
            "size": _r(ls.size), "cylinder": _env_json(ls.cylinder), "axis_deviation": _r(ls.axis_deviation),
            "bonus": _r(ls.bonus), "tolerance_allowed": _r(ls.tolerance_allowed),
            "size_conforms": ls.size_conforms, "axis_conforms": ls.axis_conforms, "formulas": list(ls.formulas),
        },
        "formulas": list(res.formulas),
        "explanation": list(res.explanation),
        "notes": list(res.notes),
        "warnings": list(res.warnings),
    }


def render_inspection(res: InspectionResult, title: str = "") -> str:
    """Readable summary of an inspection (what ``matezone inspect`` prints, without the caution)."""
    from ..readout import STANDARD_NAME, feature_heading

    u = res.units
    fmt = u.fmt
    f = res.feature
    out = []
    if title:
        out.append(title)
    out.append(f"units: {u.value}   standard: {STANDARD_NAME[res.standard]}")
    out.append(feature_heading(analyse_feature(f, res.standard), u))
    if res.source == "points":
        P = res.points
        out.append(f"measured: {len(P)} points in {len(res.sections)} sections from {res.source_file}, "
                   f"z = {fmt(P[:, 2].min())} .. {fmt(P[:, 2].max())}")
    else:
        out.append(f"measured: values typed in [feature.measured] of {res.source_file or 'the scene'}")
    out.append("")
    if res.sections:
        rows = [("section", "z", "LS ⌀", "mating ⌀" if True else "", "local min", "local max", "roundness")]
        for s in res.sections:
            rows.append((s.label, fmt(s.z), fmt(s.ls_diameter), fmt(s.mating_diameter), fmt(s.local_min),
                         fmt(s.local_max), fmt(s.roundness)))
        w = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
        for r in rows:
            out.append("  " + "  ".join(c.rjust(w[i]) if i else c.ljust(w[i]) for i, c in enumerate(r)))
        out.append(f"  (mating circle: {'largest inscribed' if f.kind is Kind.HOLE else 'smallest circumscribed'};"
                   " local sizes: two-point, through the LS centre)")
        out.append("")
    envs = [e for e in (res.unrelated, res.related, res.least_material, res.least_material_related) if e is not None]
    if res.least_squares is not None and res.least_squares.cylinder is not None:
        envs.append(res.least_squares.cylinder)
    if envs:
        out.append("envelopes")
        w = max(len(e.name) for e in envs)
        for e in envs:
            ax = "" if e.constraint == "typed value" else (
                f"   axis at A ({fmt(e.point[0])}, {fmt(e.point[1])}), tilt {e.tilt_deg:.5f} deg; {e.constraint}")
            out.append(f"  {e.name:<{w}}  ⌀{fmt(e.diameter)}{ax}")
        out.append("")
    readings = [a for a in (res.axis, res.median_axis if res.median_axis is not res.axis else None,
                            res.feature_axis if res.feature_axis is not res.axis else None) if a is not None]
    if readings:
        out.append("axis readings")
        zone = f.tolerance.zone.value if f.tolerance else ""
        for a in readings:
            parts = []
            if a.diameter_reading is not None:
                parts.append(f"⌀ reading {fmt(a.diameter_reading)}")
            if a.width_reading is not None:
                parts.append(f"width reading {fmt(a.width_reading)}")
            role = "GOVERNS" if a is res.axis else "shown, does not govern"
            out.append(f"  {a.basis} ({role}): {a.method}")
            out.append(f"    {', '.join(parts)}; the tolerance's {zone} zone uses {fmt(a.deviation)}")
        if res.axis_governs:
            out.append(f"  why: {res.axis_governs}")
        out.append("")
    if res.formulas:
        B = term("bonus", res.standard)[0]
        env = "envelope" if res.standard is Standard.ASME else "associated cylinder"
        out.append(f"{B} basis: {res.bonus_basis} {env}"
                   + (" (the default)" if res.bonus_basis == "unrelated" else " (datum-related; option)"))
        out += [f"  {x}" for x in res.formulas]
        out.append("")
    dec = (f"U = {fmt(res.uncertainty)} (k = 2), ISO 14253-1 decision rule" if res.uncertainty is not None
           else "no uncertainty U given: decided on the measured values alone")
    out.append(f"readings ({dec})")
    for c in (res.size_check, res.axis_check, res.surface_check):
        gov = "*" if res.verdict is not None and c.name in res.verdict.governing else " "
        out.append(f"  {gov}{c.name:<8} {verdict_word(c)[0]:<16} {c.detail}   [{c.outcome_text}]")
    if res.other_axis_check is not None:
        c = res.other_axis_check
        out.append(f"   {'':<8} {verdict_word(c)[0]:<16} {c.detail}   [{c.outcome_text}; does not govern]")
    if res.envelope_check is not None and res.size_check.evaluated:
        out.append(f"            size = {res.local_check.name} and {res.envelope_check.name}")
    if res.verdict is not None:
        v = res.verdict
        out.append(f"  (* governs: {v.why})")
        out.append("")
        out.append(f"VERDICT: {v.headline}")
        out += [f"  note: {n}" for n in v.notes]
    out.append("")
    ls = res.least_squares
    if ls is not None:
        out.append("least squares (the usual CMM default), side by side")
        out.append(f"  size: LS ⌀{fmt(ls.size)} vs {'mating envelope' if res.standard is Standard.ASME else 'associated cylinder'} "
                   f"⌀{fmt(res.unrelated_ame)}; {'within' if ls.size_conforms else 'outside'} the limits")
        out += [f"  {x}" for x in ls.formulas[1:]]
        if ls.axis_conforms is not None:
            a, b = u.fmt_cmp(ls.axis_deviation, ls.tolerance_allowed)
            out.append(f"  LS axis reading: {'within' if ls.axis_conforms else 'beyond'} the tolerance allowed "
                       f"({a} {'<=' if ls.axis_conforms else '>'} {b}); not a verdict")
        out.append("")
    for e in res.explanation:
        out.append(e)
    if res.explanation:
        out.append("")
    out += [f"note: {n}" for n in res.notes]
    out += [f"warning: {w}" for w in res.warnings]
    return "\n".join(out).rstrip() + "\n"
