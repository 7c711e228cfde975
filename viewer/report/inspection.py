"""The inspection page: the nonconformance evidence of one measured feature
(:func:`build_inspection_page`): the part verdict in its role's colour with every reading's word,
the 3D pictures with their colour key and the deviation bar, the section table, the envelopes
beside least squares, the bonus basis and formulas, both axis readings, the readings with their
ISO 14253-1 outcomes, the notes where readings disagree, the explanation and the disposition.

Every number comes from the :class:`geom.inspect.InspectionResult`; the words from
:mod:`viewer.report.readings`.

>>> LOWER_SIZES[0], IMAGE_MIN
(6.0, 1.3)
"""

from __future__ import annotations

import textwrap

import numpy as np
from matplotlib.figure import Figure

from geom.analysis import SceneResult, term
from geom.conformance import readings_disagree, verdict_word
from geom.model import Kind
from viewer import style as S

from .page import (
    CONTENT_W,
    GREY,
    MARGIN,
    PAGE,
    _disposition,
    _DryPage,
    _Page,
    _paragraphs,
    _table,
    _wrap,
    _wrapped_table,
    crop_to_content,
    evidence_page,
    requirement_of,
)
from .readings import (
    _ROLE_TAG,
    _basis_words,
    _headline,
    _inspection_subject,
    _vc_terms,
    axis_readings,
    condensed_sections,
    reading_rows,
    required_actual_deviation,
)

DISAGREE_TITLE = "NOTE: READINGS THAT DISAGREE"
LOWER_SIZES = (6.0, 5.7, 5.4, 5.1, 4.8)  # text sizes tried for the inspection page's lower blocks
IMAGE_MIN = 1.3  # smallest height of the inspection pictures, inches
INSPECTION_TITLE = "INSPECTION EVIDENCE"
INSPECTION_SUBTITLE = "a produced feature judged against its tolerance"


# ------------------------------------------------------------------------------ the lower blocks


def _sections_table(p: _Page, insp, x: float, y: float, w: float, fs: float) -> float:
    """Each ring of points: z, least-squares and mating diameters, local sizes, roundness."""
    u = insp.units
    fmt = u.fmt
    hole = insp.feature.kind is Kind.HOLE
    secs = insp.sections
    mate = "inscr. ⌀" if hole else "circ. ⌀"
    rows = [("section", "z", "LS ⌀", mate, "local min", "local max", "round."), ]
    idx = condensed_sections(secs)
    for i in idx:
        s = secs[i]
        rows.append((s.label, fmt(s.z), fmt(s.ls_diameter), fmt(s.mating_diameter), fmt(s.local_min),
                     fmt(s.local_max), fmt(s.roundness)))
    widths = [0.5] + [(w - 0.5) / 6] * 6
    y = _table(p, x, y, widths, rows, fs)
    shown = len(idx)
    note = (f"{shown} of {len(secs)} sections shown (first, last, the extremes of each column, evenly spaced "
            "others); every section is in results.json. " if shown < len(secs) else "")
    note += ("LS: least-squares circle; " + ("inscr.: largest inscribed circle; " if hole else
             "circ.: smallest circumscribed circle; ")
             + "local sizes: two-point, through the LS centre; round.: roundness, the radial range about the "
             "LS centre.")
    lines = textwrap.wrap(note, int(w * 72 / (fs * 0.85 * 0.5)))
    p.text(x, y + 0.01, "\n".join(lines), fontsize=fs * 0.85, color=GREY, linespacing=1.15)
    return y + 0.015 + 0.088 * len(lines)


def _envelope_vs_ls(p: _Page, insp, x: float, y: float, w: float, fs: float) -> float:
    """The envelopes (what the standard and a gauge use) beside the least-squares fit (a CMM's
    usual default), and both axis readings with the one that applies; every value and every
    envelope name from the InspectionResult (geom.inspect)."""
    u = insp.units
    fmt = u.fmt
    ls = insp.least_squares
    B = term("bonus", insp.standard)[0]
    lmc = insp.least_material is not None
    env_u = insp.least_material if lmc else insp.unrelated
    env_r = insp.least_material_related if lmc else insp.related

    def d(e):
        return "—" if e is None else f"⌀{fmt(e.diameter)}"

    rows = [("", "envelope", "least squares (CMM)")]
    cols = [None]
    if env_u is not None or ls is not None:
        rows.append((env_u.name if env_u is not None else "envelope", d(env_u),
                     "—" if ls is None else f"⌀{fmt(ls.size)} (cylinder)"))
        cols.append(None)
    if env_r is not None and env_r is not env_u:
        rows.append((env_r.name, d(env_r), "—"))
        cols.append(None)
    rows.append((B, fmt(insp.bonus), "—" if ls is None or ls.bonus is None else fmt(ls.bonus)))
    cols.append(None)
    # the readings and their limit, shown with the same digits (Units.fmt_cmp)
    readings = axis_readings(insp)
    lim = insp.tolerance_allowed
    devs = [a.deviation for a in readings]
    known = [v for v in devs if v is not None]
    if lim is not None and known:
        *shown, lim_s = u.fmt_cmp(*known, lim)
    else:
        shown, lim_s = [fmt(v) for v in known], fmt(lim)
    it = iter(shown)
    dev_s = [next(it) if v is not None else "—" for v in devs]
    ls_dev = ls_lim = "—"
    if ls is not None and ls.axis_deviation is not None and ls.tolerance_allowed is not None:
        ls_dev, ls_lim = u.fmt_cmp(ls.axis_deviation, ls.tolerance_allowed)
    elif ls is not None and ls.tolerance_allowed is not None:
        ls_lim = fmt(ls.tolerance_allowed)
    rows.append(("tolerance allowed", lim_s, ls_lim))
    cols.append(None)
    for i, (a, v) in enumerate(zip(readings, dev_s)):
        gov = a is insp.axis
        rows.append((f"{a.basis} reading: {'governs' if gov else 'does not govern'}", v,
                     (ls_dev + (" (cylinder axis)" if ls_dev != "—" else "")) if i == 0 else ""))
        cols.append((None if gov else GREY, None if gov else GREY, None))
    word, role = verdict_word(insp.axis_check)
    if ls is not None and ls.axis_conforms is not None:
        lw_ = ("within" if ls.axis_conforms else "beyond") + " the tolerance allowed (not a verdict)"
    else:
        lw_ = "—"
    rows.append((f"axis verdict ({insp.axis.basis})" if insp.axis is not None else "axis verdict", word, lw_))
    cols.append((None, S.ROLE_COLOUR[role], None))
    widths = [w * 0.45, w * 0.2, w * 0.35]
    y = _wrapped_table(p, x, y, widths, rows, fs, cols, bold=(0,))
    if ls is None:
        note = "no measured points: the least-squares fit needs points (typed values only)."
        p.text(x, y + 0.01, note, fontsize=fs * 0.85, color=GREY)
        y += 0.1
    return y


def _inspection_lower(p: _Page, insp, x0: float, y: float, W: float, fs: float) -> float:
    """Sections | envelopes beside least squares and the bonus basis; the readings and their
    verdicts; the notes on readings that disagree; the explanation. Returns the y below."""
    u = insp.units
    B = term("bonus", insp.standard)[0]
    colw = (W - 0.25) / 2
    yl = yr = y
    if insp.sections:
        p.text(x0, yl, "SECTIONS (each ring of points)", fontsize=7, weight="bold")
        yl = _sections_table(p, insp, x0, yl + 0.14, colw, fs)
    xr = x0 + colw + 0.25 if insp.sections else x0
    wr = colw if insp.sections else W
    p.text(xr, yr, "ENVELOPES BESIDE LEAST SQUARES", fontsize=7, weight="bold")
    yr = _envelope_vs_ls(p, insp, xr, yr + 0.14, wr, fs)
    yr += 0.06
    p.text(xr, yr, f"{B.upper()} BASIS AND TOLERANCE ALLOWED", fontsize=7, weight="bold")
    yr += 0.14
    lines = _wrap(f"{B} basis: {_basis_words(insp)}", wr, fs, "   ")
    for x in insp.formulas:
        lines += _wrap(x, wr, fs, "   ")
    p.text(xr, yr, "\n".join(lines), fontsize=fs, linespacing=1.2, gid="formulas")
    yr += 0.1 * len(lines) + 0.02
    y = max(yl, yr) + 0.06
    # ---------------------------------------------------------------- both axis readings
    al = [f"{a.basis} reading ({'governs' if a is insp.axis else 'does not govern'}): {a.method}"
          for a in axis_readings(insp)]
    notes = insp.verdict.notes if insp.verdict is not None else ()
    if insp.axis_governs and not any(insp.axis_governs in n for n in notes):
        al.append(f"which axis reading applies: {insp.axis_governs}")
    if al:
        p.text(x0, y, "AXIS READINGS", fontsize=7, weight="bold")
        lines = []
        for a in al:
            lines += _wrap(a, W - 0.95, fs * 0.9, "   ")
        p.text(x0 + 0.95, y + 0.01, "\n".join(lines), fontsize=fs * 0.9, linespacing=1.15, gid="axis-readings")
        y += max(0.14, 0.09 * len(lines) + 0.04)
    # ---------------------------------------------------------------- readings and verdicts
    rule = (f"ISO 14253-1 decision rule, U = {u.fmt(insp.uncertainty)} {u.value} (k = 2): a verdict is proven "
            "only when the value lies at least U inside the limit (conformance) or at least U beyond it "
            "(nonconformance); within U of a limit neither is proven" if insp.uncertainty is not None else
            "no uncertainty U given: decided on the measured values alone (ISO 14253-1 needs U)")
    p.text(x0, y, "READINGS", fontsize=7, weight="bold")
    rl = _wrap(rule, W - 0.75, fs * 0.9)
    p.text(x0 + 0.75, y + 0.01, "\n".join(rl), fontsize=fs * 0.9, color=GREY, linespacing=1.15)
    y += max(0.14, 0.09 * len(rl) + 0.04)
    rows = [("reading", "what is checked", "required", "actual", "deviation", "verdict", "outcome")]
    cols = [None]
    for label, role, c, meaning in reading_rows(insp):
        word, r = verdict_word(c)
        cc = S.ROLE_COLOUR[r]
        req, act, dev = required_actual_deviation(c, u) if c.evaluated else ("—", c.detail, "—")
        rows.append((label + _ROLE_TAG[role], meaning, req, act, dev, word, c.outcome_text))
        cols.append((GREY if role == "does not govern" else None, None, None, None, cc, cc, cc))
    widths = [0.95, 1.85, 1.0, 1.0, 0.95, 1.0, W - 6.75]
    y = _wrapped_table(p, x0, y, widths, rows, fs, cols, bold=(0, 5))
    _, _, notes, why = _headline(insp)
    if why:
        wl = _wrap(f"What governs the verdict: {why}.", W, fs)
        p.text(x0, y + 0.01, "\n".join(wl), fontsize=fs, linespacing=1.2, gid="why")
        y += 0.1 * len(wl) + 0.03
    # ---------------------------------------------------------------- notes and explanation
    # the verdict's labelled notes first, then geom's explanation (why the readings disagree),
    # the inspection's notes and warnings
    paras = list(notes) + list(insp.explanation) + [f"Note: {n}" for n in insp.notes] + \
        [f"Warning: {w}" for w in insp.warnings]
    axis_surface = readings_disagree(insp.axis_check, insp.surface_check)
    if axis_surface or readings_disagree(insp.other_axis_check, insp.axis_check):
        title = DISAGREE_TITLE + (" (WHY THE AXIS AND SURFACE READINGS DISAGREE)" if axis_surface else "")
    else:
        title = "EXPLANATION AND NOTES"
    return _paragraphs(p, x0, y, W, fs, title, paras, "explanation")


def _deviation_bar(p: _Page, insp, x: float, y: float, w: float, fs: float) -> None:
    """Horizontal colour bar of the points' radial deviation (true values, as the 3D picture)."""
    from matplotlib.cm import ScalarMappable
    from matplotlib.colors import Normalize

    u = insp.units
    dev = np.asarray(insp.radial_deviation, float)
    m = float(np.abs(dev).max()) or 10.0 ** -(u.decimals + 1)
    title = _wrap(f"points: radial deviation from the least-squares cylinder, {u.value} (true values; + outward)",
                  w, fs * 0.88)
    cax = p.fig.add_axes(p.rect(x, y + 0.03 + 0.09 * len(title), w, 0.09))
    sm = ScalarMappable(Normalize(-m, m), S.deviation_colormap())
    cb = p.fig.colorbar(sm, cax=cax, orientation="horizontal")
    cb.set_ticks([-m, -m / 2, 0.0, m / 2, m])
    ticks = (-m, -m / 2, 0.0, m / 2, m)
    cb.ax.set_xticklabels([("+" if v > 0 else "") + t for v, t in zip(ticks, u.fmt_cmp(*ticks))], fontsize=fs * 0.85)
    cb.outline.set_linewidth(0.4)
    p.text(x, y, "\n".join(title), fontsize=fs * 0.88, linespacing=1.15)


# ------------------------------------------------------------------------------------ the page


def build_inspection_page(res: SceneResult, insp, images=(), page_no: int = 1, pages: int = 1,
                          caption: str = "", legend=(), files: tuple[str, ...] = ()) -> Figure:
    """The nonconformance evidence page of one measured feature (A4 portrait): title block, the
    3D inspection pictures (``images``: (label, uncropped render) pairs, shown side by side, with
    the scene's colour ``legend``), the section table, envelopes beside least squares, the bonus
    basis and tolerance allowed, both axis readings (which one applies), every reading with its
    word (:func:`geom.conformance.verdict_word`) and ISO 14253-1 outcome, the part verdict exactly
    as geom gives it (``insp.verdict``: headline in its role's colour, why, labelled notes where
    readings disagree), the explanation, disposition, signatures and the caution. Every number
    comes from ``insp`` (:class:`geom.inspect.InspectionResult`), formatted at the units' precision."""
    char, tol = requirement_of(insp.feature, res.scene.units)
    with evidence_page(res, INSPECTION_TITLE, INSPECTION_SUBTITLE, char, tol, page_no, pages) as (p, y):
        y = _verdict_box(p, insp, y + 0.08)
        y, fs_low = _pictures(p, insp, images, caption, legend, files, y)
        y = _inspection_lower(p, insp, MARGIN, y, CONTENT_W, fs_low)
        _disposition(p, MARGIN, max(y + 0.05, PAGE[1] - 1.12), CONTENT_W)
    return p.fig


def _verdict_box(p: _Page, insp, y: float) -> float:
    """The subject line, then the part verdict's headline in its role's colour over each
    reading's word (geom.conformance.verdict_word), flowed over lines. Returns the y below."""
    x0, W = MARGIN, CONTENT_W
    subj = _wrap(_inspection_subject(insp), W, 8.0 * 1.12)
    p.text(x0, y, "\n".join(subj), fontsize=8.0, weight="bold", linespacing=1.15)
    y += 0.135 * len(subj) + 0.05
    head, role, notes, _ = _headline(insp)
    col = S.ROLE_COLOUR[role]
    bad = role == "fail"
    hl = _wrap(head, W - 0.2, 9.0 * 1.12)
    items = []
    for label, r_role, c, _m in reading_rows(insp):
        word, wr = verdict_word(c)
        items.append((f"{label}{_ROLE_TAG[r_role]}: {word}", S.ROLE_COLOUR[wr]))
    if notes and (readings_disagree(insp.axis_check, insp.surface_check)
                  or readings_disagree(insp.other_axis_check, insp.axis_check)):
        items.append(("readings disagree: see NOTE below", S.TEXT))
    fs_r = 7.0
    flow, line, used = [], [], 0.0
    for text, cc in items:
        w_ = 0.62 * fs_r / 72 * len(text) + 0.25
        if line and used + w_ > W - 0.2:
            flow.append(line)
            line, used = [], 0.0
        line.append((used, text, cc))
        used += w_
    if line:
        flow.append(line)
    bh = 0.165 * len(hl) + 0.14 * len(flow) + 0.13
    p.box(x0, y, W, bh, lw=2.0 if bad else 1.0, ec=col)
    p.text(x0 + 0.1, y + 0.06, "\n".join(hl), fontsize=9.0, weight="bold", color=col, linespacing=1.1,
           gid="headline")
    yy = y + 0.06 + 0.165 * len(hl) + 0.02
    for line in flow:
        for dx, text, cc in line:
            italic = dict(style="italic", weight="normal") if text.startswith("readings disagree") else \
                dict(weight="bold")
            p.text(x0 + 0.1 + dx, yy, text, fontsize=fs_r, color=cc, **italic)
        yy += 0.14
    return y + (bh + 0.08)


def _picture_layout(p: _Page, insp, n_img: int, caption: str, legend, files, y: float) -> dict:
    """The sizes of the pictures block starting at ``y``: the text size the blocks below take
    (``fs_low``), the pictures' height (``img_h``) and width each (``gw``), the colour key's rows
    and height, the caption's lines and height; measured with a dry run of the blocks below."""
    x0, W = MARGIN, CONTENT_W
    fs = 6.0
    dry = _DryPage(p.fig)
    leg = list(legend)
    leg_rows = (len(leg) + 1) // 2
    leg_h = max(0.105 * leg_rows, 0.45 if insp.radial_deviation is not None else 0.0)
    cap = [ln for ln in caption.splitlines() if ln.strip()]
    basis = insp.axis.basis if insp.axis is not None else "axis"
    vc_abbr = _vc_terms(insp)[0]
    cap_text = ("; ".join(cap) + ". " if cap else "") + (
        f"For the axis reading the {basis} (the reading that applies) must stay inside the green zone; for "
        f"the surface reading the dashed related envelope must clear the purple {vc_abbr} boundary (the gauge).")
    if files:
        cap_text += " Full pictures with every number: " + ", ".join(files) + "."
    cl = _wrap(cap_text, W, fs * 0.88)
    cap_h = 0.09 * len(cl)
    bottom = PAGE[1] - 1.17
    room = bottom - y - 0.13 - 0.06 - leg_h - 0.04 - cap_h - 0.1
    for fs_low in LOWER_SIZES:
        img_h = room - _inspection_lower(dry, insp, x0, 0.0, W, fs_low)
        if img_h >= IMAGE_MIN:
            break
    n = max(1, n_img)
    return dict(fs=fs, fs_low=fs_low, img_h=float(min(3.0, max(IMAGE_MIN, img_h))), gap=PICTURE_GAP,
                gw=(W - PICTURE_GAP * (n - 1)) / n, leg=leg, leg_rows=leg_rows, leg_h=leg_h, cl=cl, cap_h=cap_h)


PICTURE_GAP = 0.12  # inches between the inspection page's pictures
PICTURES_TOP = 0.15  # inches from the block's heading to its pictures


def inspection_image_slot(res: SceneResult, insp, n_images: int, caption: str = "", legend=(),
                          files: tuple[str, ...] = ()) -> tuple[float, float]:
    """(width, height) in inches of the box each of the inspection page's ``n_images`` 3D
    pictures is printed into, from a dry run of the page down to the pictures (the layout
    :func:`build_inspection_page` draws with the same caption, legend and file names)."""
    char, tol = requirement_of(insp.feature, res.scene.units)
    with evidence_page(res, INSPECTION_TITLE, INSPECTION_SUBTITLE, char, tol, 1, 1) as (p, y):
        dry = _DryPage(p.fig)
        y = _verdict_box(dry, insp, y + 0.08)
        lay = _picture_layout(dry, insp, n_images, caption, legend, files, y)
    return lay["gw"], lay["img_h"] - TITLE_BAND


TITLE_BAND = 0.12  # inches over each 3D picture kept for its title


def _pictures(p: _Page, insp, images, caption: str, legend, files, y: float) -> tuple[float, float]:
    """The 3D pictures side by side, the colour key (and the deviation bar) and the caption, in
    the height the blocks below leave them (:func:`_picture_layout`): returns the y below and the
    text size those blocks take (long explanations, as geom writes them where readings disagree,
    take a smaller size)."""
    x0, W = MARGIN, CONTENT_W
    lay = _picture_layout(p, insp, len(images), caption, legend, files, y)
    fs, fs_low, img_h, gw, gap = lay["fs"], lay["fs_low"], lay["img_h"], lay["gw"], lay["gap"]
    leg, leg_rows, leg_h, cl, cap_h = lay["leg"], lay["leg_rows"], lay["leg_h"], lay["cl"], lay["cap_h"]
    # ---------------------------------------------------------------- 3D pictures
    p.text(x0, y, "3D VIEWS OF THE MEASURED FEATURE", fontsize=7, weight="bold")
    y += PICTURES_TOP
    for i, (label, img) in enumerate(images):
        xi = x0 + i * (gw + gap)
        # the picture under its title's band: the title never lies over the drawing
        ax = p.fig.add_axes(p.rect(xi, y + TITLE_BAND, gw, img_h - TITLE_BAND))
        ax.set_axis_off()
        ax.imshow(crop_to_content(img, aspect=gw / (img_h - TITLE_BAND)), interpolation="antialiased")
        ax.set_aspect("equal")
        p.box(xi - 0.02, y - 0.02, gw + 0.04, img_h + 0.04, lw=0.4, ec=S.PART)
        p.text(xi + 0.04, y + 0.03, label, fontsize=6.5, weight="bold", color=GREY)
    y += img_h + 0.07
    # legend: two columns of keys, the deviation colour bar on the right
    kw_ = 2.55
    for i, (text, colour) in enumerate(leg):
        cx, cy = x0 + (i // leg_rows) * kw_, y + (i % leg_rows) * 0.105
        p.box(cx, cy + 0.005, 0.09, 0.07, lw=0, fill=True, fc=colour, ec="none")
        shown = text if len(text) <= 64 else text.split(" (")[0][:64]
        p.text(cx + 0.13, cy, shown, fontsize=fs * 0.88)
    if insp.radial_deviation is not None:
        _deviation_bar(p, insp, x0 + 2 * kw_ + 0.1, y, W - 2 * kw_ - 0.15, fs)
    y += leg_h + 0.04
    p.text(x0, y, "\n".join(cl), fontsize=fs * 0.88, color=GREY, linespacing=1.15)
    return y + (cap_h + 0.1), fs_low
