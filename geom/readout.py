"""Plain-text tables of an analysis: what ``matezone analyze`` prints, and the rows the report
and the viewer show. Pure formatting of values computed in :mod:`geom.analysis`."""

from __future__ import annotations

from .analysis import FeatureResult, MateResult, SceneResult, mate_formula, mate_verdict, term
from .model import Standard, Units

CAUTION = (
    "These results support, and do not replace, the governing drawing, the applicable standard, "
    "your organisation's procedures and the judgement of qualified engineers and inspectors."
)

STANDARD_NAME = {
    Standard.ASME: "ASME Y14.5 (Rule #1: envelope at MMC applies by default)",
    Standard.ISO: "ISO GPS (ISO 8015 independency; envelope only where (E) is given)",
}


def feature_rows(r: FeatureResult, units: Units, standard: Standard) -> list[tuple[str, str, str]]:
    """(quantity, value, formula) rows for one feature."""
    f = r.feature
    tol = f.tolerance
    rows = [
        (f"{term('mmc', standard)[1]} ({term('mmc', standard)[0]})", units.fmt(r.mmc.value),
         r.mmc.formula(units, standard)),
        (f"{term('lmc', standard)[1]} ({term('lmc', standard)[0]})", units.fmt(r.lmc.value),
         r.lmc.formula(units, standard)),
    ]
    if tol is not None:
        rows += [
            (term("t_mmc", standard)[1], units.fmt(r.tolerance_at_mmc.value), r.tolerance_at_mmc.formula(units, standard)),
            (term("t_lmc", standard)[1], units.fmt(r.tolerance_at_lmc.value), r.tolerance_at_lmc.formula(units, standard)),
            (f"largest {term('bonus', standard)[1]}", units.fmt(r.bonus_max.value), r.bonus_max.formula(units, standard)),
        ]
        vc_key = r.virtual_condition.key
        rows.append((term(vc_key, standard)[1], units.fmt(r.virtual_condition.value),
                     r.virtual_condition.formula(units, standard)))
        rows.append((term("rc", standard)[1], units.fmt(r.resultant_condition.value),
                     r.resultant_condition.formula(units, standard)))
    proj = " (within the projected height)" if tol is not None and tol.projected else ""
    rows.append((term("inner", standard)[1] + proj, units.fmt(r.inner_boundary.value),
                 r.inner_boundary.formula(units, standard)))
    rows.append((term("outer", standard)[1] + proj, units.fmt(r.outer_boundary.value),
                 r.outer_boundary.formula(units, standard)))
    if r.in_hole_boundary is not None:
        rows.append((term("inner", standard)[1] + " within the hole's own length (a mate uses it)",
                     units.fmt(r.in_hole_boundary.value), r.in_hole_boundary.formula(units, standard)))
    if r.tilt_max_deg is not None:
        tmax = max(r.tolerance_at_mmc.value, r.tolerance_at_lmc.value)
        where = "projected height" if f.tolerance.projected else "length"
        rows.append(("largest axis tilt", f"{r.tilt_max_deg:.4f} deg",
                     f"atan(largest t / {where}) = atan({units.fmt(tmax)} / {units.fmt(_tilt_len(f))})"))
    return rows


def _tilt_len(f) -> float:
    from .boundaries import tilt_length

    return tilt_length(f)


def _table(rows: list[tuple[str, str, str]], indent: str = "  ") -> list[str]:
    w0 = max(len(r[0]) for r in rows)
    w1 = max(len(r[1]) for r in rows)
    return [f"{indent}{a:<{w0}}  {b:>{w1}}   {c}".rstrip() for a, b, c in rows]


def feature_heading(r: FeatureResult, units: Units) -> str:
    f = r.feature
    lim = f"{units.fmt(f.limits[0])} - {units.fmt(f.limits[1])} {units.value}"
    tol = f.tolerance.symbol(units) if f.tolerance else "no geometric tolerance"
    tol += "".join(f", refined by {t.symbol(units)}" for t in f.refinements)
    env = "envelope applies" if r.envelope else "no envelope"
    return f"{f.kind.value} '{f.id}'{' (' + f.name + ')' if f.name else ''}: size {lim}, length {units.fmt(f.length)}, {tol}; {env}"


def mate_lines(m: MateResult, units: Units, standard: Standard) -> list[str]:
    u = units.value
    mm, lm = term("mmc", standard)[0], term("lmc", standard)[0]
    return [
        f"mate: hole '{m.hole}' with pin '{m.pin}'",
        f"  worst-case clearance  {mate_formula(m, units, standard)} {u}",
        f"    hole boundary       {m.hole_boundary.formula(units, standard)}",
        f"    pin boundary        {m.pin_boundary.formula(units, standard)}",
        f"  from sizes alone      min = {units.fmt(m.clearance_min_size, signed=True)} {u} (hole {mm} - pin {mm}), "
        f"max = {units.fmt(m.clearance_max, signed=True)} {u} (hole {lm} - pin {lm})",
        f"  verdict               {mate_verdict(m.clearance_min, m.assembles, units)}",
        *[f"  assumes               {a}" for a in m.assumptions],
    ]


def render_text(res: SceneResult) -> str:
    sc = res.scene
    u, st = sc.units, sc.standard
    out = [f"{sc.title}", f"units: {u.value}   standard: {STANDARD_NAME[st]}", ""]
    for r in res.features.values():
        out.append(feature_heading(r, u))
        out += _table(feature_rows(r, u, st))
        if r.controls:  # several controls on the feature (geom.refinement)
            from .refinement import controls_text

            out += controls_text(r, u, st)
        out += [f"  note: {n}" for n in r.notes]
        out.append("")
    for m in res.mates:
        out += mate_lines(m, u, st)
        out.append("")
    for fid, fr in res.fasteners.items():
        fa = fr.fastener
        out.append(f"fastener '{fid}' ({fa.kind}): F = {u.fmt(fa.fastener)}, H = {u.fmt(fa.hole)} {u.value}")
        lbl = "position tolerance, each part"
        out.append(f"  {lbl}: T = {fr.position_tolerance.formula(u, st).split('= ', 1)[1]}"
                   + (" (projected zone on the threaded part)" if fa.kind == "fixed" else ""))
        if fr.position_tolerance_unprojected is not None:
            out.append(f"  without a projected zone, equal T: T = "
                       f"{fr.position_tolerance_unprojected.formula(u, st).split('= ', 1)[1]} "
                       f"(from H = F + T1 + T2(1 + 2P/D), P = {u.fmt(fa.projection)}, D = {u.fmt(fa.thread_depth)})")
        out.append("")
    if res.frames is not None:
        from .frames import frames_text

        out += frames_text(res.frames, sc)
    out.append(CAUTION)
    return "\n".join(out) + "\n"
