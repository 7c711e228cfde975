"""An inspection result (:class:`geom.inspect.InspectionResult`) in the window's words, without
Qt: the readout table's lines, the sentence saying where the measured data come from, and the
names of the bonus bases. Nothing is computed here: every number, verdict and formula is geom's."""

from __future__ import annotations

from pathlib import Path

from geom.analysis import term
from geom.conformance import verdict_word
from geom.model import Material

from .looks import BAD_RED, ROLE_LOOK
from .readouts import FEATURE_HEAD, FIXED_HEAD, Table

BASIS_TEXT = {
    "unrelated": ("unrelated envelope", "Bonus from the unrelated actual mating envelope: the perfect cylinder "
                                        "that fits, in any orientation"),
    "related": ("related envelope (held to the datum)", "Bonus from the related actual mating envelope: the "
                                                       "perfect cylinder that fits while held normal to A"),
}


def other_axis_basis(res) -> str | None:
    """The basis ("feature axis" / "median line") of the axis reading that does not govern."""
    for a in (res.median_axis, res.feature_axis):
        if a is not None and a is not res.axis:
            return a.basis
    return None


def axis_readings(res) -> list:
    """(reading, governs) for every axis reading of an inspection: the governing one first."""
    out = [] if res.axis is None else [(res.axis, True)]
    for a in (res.feature_axis, res.median_axis):
        if a is not None and a is not res.axis and all(a is not b for b, _g in out):
            out.append((a, False))
    return out


def decision_rule(res, units, alone: str) -> str:
    """The ISO 14253-1 decision rule the readings were judged by; ``alone`` without a U."""
    return ("ISO 14253-1 decision rule, U = " + units.fmt(res.uncertainty) + " (k = 2)"
            if res.uncertainty is not None else alone)


def source_text(res, measured, units, escape) -> str:
    """Where the inspection's data come from, for the inspection controls (rich text: the file
    name goes through ``escape``). ``res`` is the result shown (or None), ``measured`` the
    feature's ``[feature.measured]`` table (or None)."""
    if res is not None and res.source == "points":
        n = 0 if res.points is None else len(res.points)
        text = f"{n} points in {len(res.sections)} sections from <b>{escape(Path(res.source_file).name)}</b>"
    elif res is not None:
        text = "inspection values typed in the scene file"
    elif measured is None:
        text = "no measured data yet: load a CSV of points"
    else:
        text = "not inspected yet"
    if res is not None:
        text += (f"; U = {units.fmt(res.uncertainty)} (k = 2)" if res.uncertainty is not None
                 else "; no uncertainty U given")
    return text


def _check_row(t: Table, fid: str, quantity: str, c, role_text: str, key: str | None = None) -> None:
    """One reading: geom's word (verdict_word), coloured by its role; the detail, the ISO
    14253-1 outcome as geom words it, and whether the reading governs."""
    word, role = verdict_word(c)
    t.row(fid, quantity, word, f"{c.detail}   [{c.outcome_text}; {role_text}]", fg=ROLE_LOOK[role][0], bold=True)
    t.values[(fid, f"{key or c.name} outcome")] = c.outcome_text


def inspection_table(res, ui=None) -> Table:
    """Every line of an inspection result, in the order the readout table shows them."""
    t = Table(ui) if ui is not None else Table()
    ui = t.ui
    fid = res.feature.id
    u = res.units
    st = res.standard
    fmt = u.fmt
    B = term("bonus", st)[0]
    head = dict(bold=True, bg=FIXED_HEAD)
    src = (f"{len(res.points)} points in {len(res.sections)} sections from {res.source_file}"
           if res.source == "points" and res.points is not None else "values typed in the scene file")
    t.add((f"inspection of {res.feature.kind.value} {fid}", "", src), bold=True, bg=FEATURE_HEAD)
    v = res.verdict
    if v is not None:
        look = ROLE_LOOK[v.role]
        t.row(fid, "part verdict", v.word, ui(v.headline), bold=True, fg=look[0], bg=look[1])
        t.row(fid, "why", "", ui(v.why))
        for i, n in enumerate(v.notes):
            t.row(fid, "note" if len(v.notes) == 1 else f"note {i + 1}", "", ui(n), tip=n)
    t.add(("readings", "", decision_rule(res, u, "no uncertainty U given: decided on the measured values alone")),
          **head)
    governing = v.governing if v is not None else ()
    for c in (res.size_check, res.axis_check, res.surface_check):
        _check_row(t, fid, f"{c.name} verdict", c, "governs the part verdict" if c.name in governing
                   else "shown, does not govern the part verdict")
    other = res.other_axis_check
    if other is not None:
        basis = other_axis_basis(res) or "other axis"
        _check_row(t, fid, f"{basis} reading (does not govern)", other, "does not govern", key=f"{basis} reading")
    if res.envelope_check is not None:
        for c in (res.local_check, res.envelope_check):
            _check_row(t, fid, f"  {c.name}", c, "part of size")
    t.add(("envelopes", "", "perfect cylinders fitted to the measured surface"), **head)
    for e in (res.unrelated, res.related, res.least_material, res.least_material_related):
        if e is None:
            continue
        how = e.constraint if e.constraint == "typed value" else (
            f"axis at A ({fmt(e.point[0])}, {fmt(e.point[1])}), tilt {e.tilt_deg:.5f} deg; {e.constraint}")
        t.row(fid, e.name, ui(f"⌀{fmt(e.diameter)}"), how)
    if res.local_sizes is not None:
        lo, hi = u.fmt_cmp(*res.local_sizes)
        llo, lhi = u.fmt_cmp(*res.feature.limits)
        t.row(fid, "local sizes (two-point)", f"{lo} .. {hi}", f"limits {llo} .. {lhi}")
    if res.bonus is not None or res.formulas:
        _bonus_lines(t, res, B, head)
    if res.virtual_condition is not None:
        vc_key = "vc_LMC" if res.feature.tolerance is not None and \
            res.feature.tolerance.material is Material.LMC else "vc_MMC"
        t.row(fid, term(vc_key, st)[1], fmt(res.virtual_condition), "the boundary a functional gauge checks")
    readings = axis_readings(res)
    if readings:
        t.add(("axis readings", "", ui(res.axis_governs) if res.axis_governs else ""), **head, tip=res.axis_governs)
        for a, gov in readings:
            what = "governing axis reading" if gov else "does not govern"
            t.row(fid, f"{a.basis} ({what})", fmt(a.deviation), ui(a.method))
            if gov:
                t.values[(fid, "axis reading")] = fmt(a.deviation)
            if a.diameter_reading is not None:
                t.row(fid, f"  {a.basis}: diameter reading", fmt(a.diameter_reading), "")
            if a.width_reading is not None:
                t.row(fid, f"  {a.basis}: width reading", fmt(a.width_reading), "")
    if res.least_squares is not None:
        _least_squares_lines(t, res, head)
    if res.explanation:
        t.add(("explanation", "", ""), **head)
        for i, e in enumerate(res.explanation):
            t.values[(fid, f"explanation {i + 1}")] = e
            t.add(("", "", ui(e)), tip=e)
    for n in res.notes:
        t.add(("note", "", ui(n)))
    for w in res.warnings:
        t.add(("warning", "", ui(w)), fg=BAD_RED)
    return t


def _bonus_lines(t: Table, res, B: str, head: dict) -> None:
    fid, fmt, ui = res.feature.id, res.units.fmt, t.ui
    t.add((f"{B} and tolerance allowed", "", f"{B} basis: the {res.bonus_basis} envelope"), **head)
    t.row(fid, f"{B} basis", res.bonus_basis,
          "switch it in the side panel (unrelated: any orientation; related: held to the datum)")
    formulas = list(res.formulas)
    # geom lists the bonus formula first (when a bonus was evaluated), then tolerance allowed
    allowed_f = next((x for x in formulas if x.startswith("tolerance allowed")), "")
    bonus_f = formulas[0] if formulas and res.bonus is not None and formulas[0] != allowed_f else ""
    t.row(fid, B, fmt(res.bonus), ui(bonus_f))
    t.row(fid, "tolerance allowed", fmt(res.tolerance_allowed), allowed_f)
    for x in formulas:
        if x not in (bonus_f, allowed_f):
            t.add(("", "", ui(x)))


def _least_squares_lines(t: Table, res, head: dict) -> None:
    fid, u, ui = res.feature.id, res.units, t.ui
    fmt = u.fmt
    ls = res.least_squares
    t.add(("least squares beside the envelope", "", "the usual CMM printout, side by side; not a verdict"), **head)
    s_ls, s_env = u.fmt_cmp(ls.size, res.unrelated_ame) if res.unrelated_ame is not None else (fmt(ls.size), "-")
    t.row(fid, "LS size", ui(f"⌀{s_ls}"),
          ui(f"envelope ⌀{s_env}") + f"; LS size {'within' if ls.size_conforms else 'outside'} the limits")
    if ls.axis_deviation is not None:
        t.row(fid, "LS axis reading", fmt(ls.axis_deviation), ui(ls.formulas[1]) if len(ls.formulas) > 1 else "")
    if ls.tolerance_allowed is not None:
        t.row(fid, "LS tolerance allowed", fmt(ls.tolerance_allowed), " ; ".join(ui(x) for x in ls.formulas[2:]))
    if ls.axis_conforms is not None and ls.axis_deviation is not None and ls.tolerance_allowed is not None:
        a, b = u.fmt_cmp(ls.axis_deviation, ls.tolerance_allowed)
        where = "within" if ls.axis_conforms else "beyond"
        t.row(fid, "LS axis against tolerance allowed", f"{where} the tolerance allowed (not a verdict)",
              f"{a} {'<=' if ls.axis_conforms else '>'} {b}")
