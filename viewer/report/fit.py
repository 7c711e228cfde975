"""The fit page: what the report is about (:class:`Item`, one per mate and per feature in no
mate, with its what-if states), the worst-case mating result in words (:func:`effect_on_fit`)
and the evidence page of one item (:func:`build_page`: verdict, 3D picture and 2D views, numbers
with their formulas, effect on fit, disposition).

Every number comes from :mod:`geom.analysis` (through :mod:`geom.readout`), formatted by
``Units.fmt``.

>>> Item.__name__, VIEW_FILES
('Item', ('through', 'section', 'bonus'))
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure

from geom.analysis import (
    SceneResult,
    clearance_at,
    fits,
    line_to_line,
    mate_verdict,
    term,
    tolerance_allowed_derived,
)
from geom.boundaries import FeatureState, bonus, effective_size
from geom.model import Kind
from geom.readout import feature_heading, feature_rows, mate_lines
from geom.textfile import file_slug
from viewer import figures as F
from viewer import style as S
from viewer.exaggeration import scale_text, subject_exaggeration

from .page import (
    CONTENT_W,
    GREY,
    MARGIN,
    PAGE,
    SHADE,
    _disposition,
    _DryPage,
    _Page,
    _wrap,
    evidence_page,
    requirement_of,
    upper_first,
)

VIEW_FILES = ("through", "section", "bonus")  # the 2D views of every item, in their page slots
FIT_TITLE = "FIT EVIDENCE"
FIT_SUBTITLE = "worst-case mating of toleranced holes and pins"
DESIGN_TITLE = "DESIGN INTENT"
DESIGN_SUBTITLE = "worst-case fit from the drawing limits — not a verdict on the measured part"


# ------------------------------------------------------------------------------------ subjects


@dataclass(frozen=True)
class Item:
    """One page of the report: a mate (``index``) or a feature that is in no mate (``feature_id``)."""

    subject: F.Subject
    index: int | None
    feature_id: str | None

    @property
    def file_key(self) -> str:
        s = self.subject
        if s.is_mate:
            return f"mate_{file_slug(s.hole.id)}__{file_slug(s.pin.id)}"
        return f"feature_{file_slug((s.hole or s.pin).id)}"

    @property
    def label(self) -> str:
        s = self.subject
        return f"mate {s.hole.id}/{s.pin.id}" if s.is_mate else f"feature {(s.hole or s.pin).id}"

    @property
    def ref(self):
        return self.index if self.index is not None else self.feature_id


def report_items(res: SceneResult) -> list[Item]:
    """Every mate, then every feature that is in no mate, in scene order."""
    sc = res.scene
    items = [Item(F.subject_of(res, i), i, None) for i in range(len(sc.mates))]
    mated = {m.hole for m in sc.mates} | {m.pin for m in sc.mates}
    items += [Item(F.subject_of(res, f.id), None, f.id) for f in sc.features if f.id not in mated]
    return items


def item_states(res: SceneResult, item: Item, sizes: dict[str, float] | None) -> dict[str, FeatureState]:
    """What-if states for an item: the worst case, with the given produced sizes substituted."""
    states = F.resolve_states(res, item.subject)
    for fid, st in list(states.items()):
        if sizes and fid in sizes:
            states[fid] = FeatureState(sizes[fid], st.share, st.direction_deg)
    return states


def is_worst_case(res: SceneResult, item: Item, states) -> bool:
    return states == F.resolve_states(res, item.subject)


# ------------------------------------------------------------------------------- words on fit


def effect_on_fit(res: SceneResult, item: Item, states: dict[str, FeatureState]) -> list[str]:
    """The worst-case mating result in words (numbers from geom.analysis, at the units' precision)."""
    sc = res.scene
    u, std = sc.units, sc.standard
    uv = u.value
    sub = item.subject
    out: list[str] = []
    mmc = term("mmc", std)[0]
    if sub.is_mate:
        m = res.mates[item.index]
        hb, pb = m.hole_boundary, m.pin_boundary
        how = ("each at its maximum material size, each axis using all the tolerance it is allowed, tilted "
               "against each other")
        hvc, pvc = res.features[sub.hole.id].virtual_condition, res.features[sub.pin.id].virtual_condition

        def name(d, vc):
            same = vc.value is not None and d.value is not None and u.fmt(vc.value) == u.fmt(d.value)
            return f"{term(d.key, std)[1]} ({d.abbr(std)}{', = its ' + vc.abbr(std) if same else ''})"

        out.append(
            f"Worst case ({how}): the hole leaves a clear opening of {u.fmt(hb.value)} {uv}, its {name(hb, hvc)}; "
            f"the pin needs {u.fmt(pb.value)} {uv}, its {name(pb, pvc)}. "
            f"Result: {mate_verdict(m.clearance_min, m.assembles, u)}."
        )
        out.append(
            f"The size limits alone (hole {mmc} − pin {mmc} = {u.fmt(m.clearance_min_size, signed=True)} {uv}; "
            f"loosest hole − pin at least material = {u.fmt(m.clearance_max, signed=True)} {uv}) "
            + ("hide this: the geometric tolerances consume that allowance."
               if not m.assembles and fits(m.clearance_min_size) else
               "are reduced by the geometric tolerances to the worst-case value above.")
        )
        if not is_worst_case(res, item, states):
            hs, ps = states[sub.hole.id], states[sub.pin.id]
            c = clearance_at(sub.hole, sub.pin, hs, ps)
            if not fits(c):
                at = f"the pin overlaps the hole by {u.fmt(-c)} {uv}"
            elif line_to_line(c):
                at = "line-to-line (zero clearance)"
            else:
                at = f"clearance {u.fmt(c)} {uv}"
            out.append(
                f"What-if pictures: hole '{sub.hole.id}' at {u.fmt(hs.size)} ({_allowed_at(sub.hole, hs.size, u, std)}), "
                f"pin '{sub.pin.id}' at {u.fmt(ps.size)} ({_allowed_at(sub.pin, ps.size, u, std)}), all of it used: "
                f"{at} at these sizes."
            )
        out += [f"Assumes: {a}." for a in m.assumptions]
    else:
        f = sub.hole or sub.pin
        r = res.features[f.id]
        side = r.inner_boundary if f.kind is Kind.HOLE else r.outer_boundary
        what = "the largest pin that always enters" if f.kind is Kind.HOLE else "the smallest hole that always accepts it"
        out.append(f"This {f.kind.value} is in no mate of the scene. {upper_first(what)} is set by its "
                   f"worst-case boundary: {side.formula(u, std)} {uv}.")
        if r.virtual_condition.value is not None:
            vc_name = term(r.virtual_condition.key, std)[1]
            out.append(f"{upper_first(vc_name)}: {r.virtual_condition.formula(u, std)} {uv}.")
        if not is_worst_case(res, item, states):
            st = states[f.id]
            out.append(f"What-if pictures: at {u.fmt(st.size)}, {_allowed_at(f, st.size, u, std)}; the mating-side "
                       f"boundary {u.fmt(effective_size(f, st))} {uv}.")
        out += [f"Note: {n}" for n in r.notes]
    return out


def _allowed_at(f, size: float, units, std) -> str:
    """``tolerance allowed = t + bonus = ...`` at a produced size, from geom's formula (ISO:
    "increase"); "no geometric tolerance" for a size-only feature."""
    if f.tolerance is None:
        return "no geometric tolerance"
    return tolerance_allowed_derived(f, bonus(f, size)).formula(units, std)


# ------------------------------------------------------------------------------------ the page


def _requirement_parts(item: Item, units) -> tuple[str, str]:
    """(characteristic, tolerance) of the item's features, from the scene; a mate's prefixed by kind."""
    chars, tols = [], []
    for f in item.subject.features:
        prefix = f"{f.kind.value}: " if item.subject.is_mate else ""
        char, tol = requirement_of(f, units)
        chars.append(prefix + char)
        tols.append(prefix + tol)
    return "; ".join(chars), "; ".join(tols)


def build_page(res: SceneResult, item: Item, states, image3d: np.ndarray | None, page_no: int, pages: int,
               view: str = "iso", design_intent: bool = False) -> Figure:
    """One evidence page (A4 portrait) for a mate or a lone feature.

    ``design_intent``: the report also judges measured parts (inspection pages), so this page is
    titled as what it is, the worst case the drawing allows, and not as a verdict on the part."""
    char, tol = _requirement_parts(item, res.scene.units)
    title, subtitle = (DESIGN_TITLE, DESIGN_SUBTITLE) if design_intent else (FIT_TITLE, FIT_SUBTITLE)
    with evidence_page(res, title, subtitle, char, tol, page_no, pages) as (p, y):
        y = _verdict(p, res, item, y + 0.08, design_intent)
        y = _pictures(p, res, item, states, image3d, view, y, _picture_height(p, res, item, states, y))
        y = _numbers(p, res, item, MARGIN, y, CONTENT_W)
        y = _effect(p, res, item, states, y)
        _disposition(p, MARGIN, max(y, DISPOSITION_TOP), CONTENT_W)
    return p.fig


def _verdict(p: _Page, res: SceneResult, item: Item, y: float, design_intent: bool) -> float:
    """The subject line and the framed verdict (a mate's fit, or a lone feature's boundary)."""
    sc = res.scene
    u, std = sc.units, sc.standard
    sub = item.subject
    x0, W = MARGIN, CONTENT_W
    if sub.is_mate:
        m = res.mates[item.index]
        head = (f"Mate {item.index + 1} of {len(sc.mates)}: hole '{sub.hole.id}'"
                f"{' (' + sub.hole.name + ')' if sub.hole.name else ''} receives pin '{sub.pin.id}'"
                f"{' (' + sub.pin.name + ')' if sub.pin.name else ''}")
        verdict = mate_verdict(m.clearance_min, m.assembles, u)
        bad = not m.assembles
    else:
        f = sub.hole or sub.pin
        head = f"{f.kind.value.capitalize()} '{f.id}'{' (' + f.name + ')' if f.name else ''}: in no mate"
        r = res.features[f.id]
        b = r.inner_boundary if f.kind is Kind.HOLE else r.outer_boundary
        verdict = (f"mating-side worst-case boundary {b.abbr(std)} {u.fmt(b.value)} {u.value}"
                   if b.value is not None else f"no worst-case boundary ({b.note})")
        bad = False
    p.text(x0, y, head, fontsize=8.5, weight="bold")
    y += 0.19
    col = S.INTERFERENCE if bad else (S.OK if sub.is_mate else S.TEXT)
    mark = "✗ " if bad else ("✓ " if sub.is_mate else "")
    if design_intent:
        verdict = "design intent: " + verdict
    p.box(x0, y, W, 0.3, lw=2.0 if bad else 1.0, ec=col)
    p.text(x0 + 0.1, y + 0.15, mark + verdict, fontsize=10, weight="bold", color=col, va="center")
    return y + 0.36


PICTURE_H = (1.55, 2.0)  # inches of one picture slot: the least legible, and the full height
DISPOSITION_TOP = PAGE[1] - 1.12  # the disposition block and the caution below it


def _picture_height(p: _Page, res: SceneResult, item: Item, states, y: float) -> float:
    """The height of a picture slot that leaves room for the numbers and the effect on fit above
    the disposition block, measured with a dry run of both (a long title block or a long
    derivation takes it from the pictures, never from the page foot)."""
    dry = _DryPage(p.fig)
    below = _effect(dry, res, item, states, _numbers(dry, res, item, MARGIN, 0.0, CONTENT_W))
    room = DISPOSITION_TOP - y - below - 0.08 - 0.1  # 0.08 after the pictures, 0.1 between rows
    return max(PICTURE_H[0], min(PICTURE_H[1], room / 2))


def item_scale_text(res: SceneResult, item: Item) -> str:
    """The page subject's scale sentence, :func:`viewer.exaggeration.scale_text` at the
    subject's one exaggeration: the words its 3D picture and 2D views print."""
    k = subject_exaggeration(res, item.index, item.feature_id if item.index is None else None)
    sub = item.subject
    ref = sub.hole if sub.is_mate else (sub.hole or sub.pin)
    return scale_text(k, ref.mmc / 2, res.scene.units)


IMAGE_INSET = 0.42  # inches of a picture slot's height kept for its heading and its note


def image_slot_3d(res: SceneResult, item: Item, states, design_intent: bool = False) -> tuple[float, float]:
    """(width, height) in inches of the box the page's 3D picture is printed into, from a dry
    run of the page down to the pictures (the same layout :func:`build_page` draws)."""
    char, tol = _requirement_parts(item, res.scene.units)
    title, subtitle = (DESIGN_TITLE, DESIGN_SUBTITLE) if design_intent else (FIT_TITLE, FIT_SUBTITLE)
    with evidence_page(res, title, subtitle, char, tol, 1, 1) as (p, y):
        dry = _DryPage(p.fig)
        y = _verdict(dry, res, item, y + 0.08, design_intent)
        gh = _picture_height(dry, res, item, states, y)
    return (CONTENT_W - 0.15) / 2, gh - IMAGE_INSET


def printed_height(image_shape, slot: tuple[float, float]) -> float:
    """Inches the ``image`` (its shape) prints at when shown whole, aspect kept, in ``slot``
    (width, height in inches), as ``imshow`` with equal aspect fits it."""
    h, w = image_shape[:2]
    return min(slot[1], slot[0] * h / w)


def _pictures(p: _Page, res: SceneResult, item: Item, states, image3d, view: str, y: float,
              gh: float = PICTURE_H[1]) -> float:
    """The 3D picture and the three 2D views, 2 x 2, each slot ``gh`` inches high."""
    std = res.scene.standard
    fig = p.fig
    x0, W = MARGIN, CONTENT_W
    gw, gap = (W - 0.15) / 2, 0.1
    slots = [(x0, y), (x0 + gw + 0.15, y), (x0, y + gh + gap), (x0 + gw + 0.15, y + gh + gap)]
    fs2 = 5.4
    ax = fig.add_axes(p.rect(slots[0][0], slots[0][1] + 0.14, gw, gh - IMAGE_INSET))
    ax.set_axis_off()
    if image3d is not None:
        ax.imshow(image3d, interpolation="antialiased")
        ax.set_aspect("equal")
    p.text(slots[0][0], slots[0][1], f"3D view ({view})", fontsize=fs2 * 1.2, weight="bold")
    p.text(slots[0][0], slots[0][1] + gh - 0.2, "same colours as the 2D views; red = interference;\n"
           + item_scale_text(res, item) + "\n(the full picture with its numbers and legend is "
           "the separate 3D PNG)", fontsize=fs2 * 0.85, color=GREY)
    for (sx, sy), name in zip(slots[1:], VIEW_FILES):
        rect = p.rect(sx, sy + 0.14, gw, gh - 0.4 if name != "bonus" else gh - 0.5)
        if name == "bonus":
            rect = p.rect(sx + 0.38, sy + 0.2, gw - 0.4, gh - 0.55)
        F.draw_view(name, res, item.ref, states, fig=fig, rect=rect, fontsize=fs2)
        if name == "bonus":
            b = term("bonus", std)[0]
            p.text(sx, sy, f"{upper_first(b)}: tolerance allowed vs produced size", fontsize=fs2 * 1.2,
                   weight="bold")
    for sx, sy in slots:
        p.box(sx - 0.03, sy - 0.03, gw + 0.06, gh + 0.02, lw=0.4, ec=S.PART)
    return y + (2 * gh + gap + 0.08)


def _effect(p: _Page, res: SceneResult, item: Item, states, y: float) -> float:
    """EFFECT ON FIT: :func:`effect_on_fit` wrapped to the page."""
    x0 = MARGIN
    p.text(x0, y, "EFFECT ON FIT", fontsize=7, weight="bold")
    y += 0.13
    body = []
    for para in effect_on_fit(res, item, states):
        body += textwrap.wrap(para, 158)
    p.text(x0, y, "\n".join(body), fontsize=6.1, linespacing=1.2, gid="effect")
    return y + (0.102 * len(body) + 0.08)


def _abbreviations(std) -> dict[str, str]:
    keys = ("mmc", "lmc", "t", "t_mmc", "t_lmc", "bonus", "vc_MMC", "vc_LMC", "rc", "inner", "outer")
    return {term(k, std)[0]: term(k, std)[1] for k in keys}


def _shown_row(qty: str, formula: str, abbr: dict[str, str]) -> str:
    """A feature row as printed: the formula, labelled by its quantity only where the formula's
    abbreviation does not already name it (with a qualifier such as "within the projected
    height" kept after a comma)."""
    first = formula.split(" = ", 1)[0].split(":", 1)[0]
    if first not in abbr:
        return f"{qty}: {formula}"
    if qty != abbr[first] and qty.startswith(abbr[first]):
        rest = qty[len(abbr[first]):].strip()  # e.g. "(within the projected height)"
        if rest.startswith("(") and rest.endswith(")") and rest.count("(") == 1:
            rest = rest[1:-1]
        return f"{formula}, {rest}"
    return formula


def _numbers(p: _Page, res: SceneResult, item: Item, x0: float, y: float, W: float) -> float:
    """Side-by-side tables (one per feature): value and formula as derived, then the mate lines
    and a glossary of the abbreviations the formulas use."""
    sc = res.scene
    u, std = sc.units, sc.standard
    feats = item.subject.features
    colw = W / len(feats)
    fs = 5.9
    rowh = 0.102
    abbr = _abbreviations(std)
    p.text(x0, y, "NUMBERS (computed; each formula as derived)", fontsize=7, weight="bold")
    y += 0.15
    ymax = y
    for j, f in enumerate(feats):
        r = res.features[f.id]
        x = x0 + j * colw
        head_lines = _wrap(feature_heading(r, u), colw, fs)[:2]
        p.text(x, y, "\n".join(head_lines), fontsize=fs, color=S.TEXT)
        p.line(x, y + 0.1 * len(head_lines) + 0.01, x + colw - 0.1, y + 0.1 * len(head_lines) + 0.01, lw=0.5)
        yy = y + 0.1 * len(head_lines) + 0.04
        for i, (qty, val, formula) in enumerate(feature_rows(r, u, std)):
            wrapped = textwrap.wrap(_shown_row(qty, formula, abbr), int((colw - 0.8) * 72 / (fs * 0.53)),
                                    subsequent_indent="   ")
            if i % 2 == 0:
                p.box(x, yy - 0.012, colw - 0.1, rowh * len(wrapped), lw=0, fill=True, fc=SHADE, ec="none")
            p.text(x + 0.6, yy, val, fontsize=fs, ha="right", family="DejaVu Sans Mono", weight="bold")
            p.text(x + 0.68, yy, "\n".join(wrapped), fontsize=fs, linespacing=1.2)
            yy += rowh * len(wrapped)
        ymax = max(ymax, yy)
    y = ymax + 0.04
    if item.subject.is_mate:
        m = res.mates[item.index]
        lines = [ln.strip() for ln in mate_lines(m, u, std)[1:]]
        lines = [ln for ln in lines if not ln.startswith(("verdict", "assumes"))]
        p.text(x0, y, "\n".join(lines), fontsize=fs, family="DejaVu Sans Mono", linespacing=1.25)
        y += 0.1 * len(lines) + 0.04
    used = [k for k in abbr if k]
    gl = "; ".join(f"{k} {abbr[k]}" for k in dict.fromkeys(used))
    gl_lines = textwrap.wrap("Abbreviations: " + gl, 175)
    p.text(x0, y, "\n".join(gl_lines), fontsize=fs * 0.85, color=GREY)
    return y + 0.09 * len(gl_lines) + 0.08
