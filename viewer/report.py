"""Headless report: per mate (and per feature in no mate) a 3D picture, the 2D views as PNG, SVG
and PDF, one PDF evidence page each (title block, requirement, images, numbers with formulas,
effect on fit, disposition, signatures, caution) and ``results.json``.

No display is needed: the 3D picture is rendered off-screen by :func:`viewer.scene3d.render_image`
and the 2D views are matplotlib figures saved by the Agg / PDF / SVG backends. Every number printed
comes from :mod:`geom.analysis` (through :mod:`geom.readout`), formatted at the units' precision.

>>> slug("bracket hole/1")
'bracket_hole_1'
"""

from __future__ import annotations

import json
import re
import textwrap
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

import numpy as np
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from geom.analysis import (
    SceneResult,
    clearance_at,
    fits,
    line_to_line,
    mate_verdict,
    result_to_json,
    term,
    tolerance_allowed_derived,
)
from geom.boundaries import FeatureState, bonus, effective_size
from geom.conformance import readings_disagree, verdict_word
from geom.model import Characteristic, Kind, Material
from geom.readout import CAUTION, feature_heading, feature_rows, mate_lines
from viewer import figures as F
from viewer import style as S

PAGE = (8.27, 11.69)  # A4 portrait, inches
MARGIN = 0.4
VIEW_FILES = ("through", "section", "bonus")
VECTOR_FORMATS = ("svg", "pdf")
DISPOSITIONS = ("use-as-is", "rework", "repair", "scrap", "return to supplier")
GREY = "#5A5F66"  # small labels in the title block (luminance ~0.11)


def slug(text: str) -> str:
    """A file-name-safe form of an id."""
    return re.sub(r"[^A-Za-z0-9._-]+", "_", text).strip("_") or "item"


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
            return f"mate_{slug(s.hole.id)}__{slug(s.pin.id)}"
        return f"feature_{slug((s.hole or s.pin).id)}"

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
        out.append(f"This {f.kind.value} is in no mate of the scene. {what[0].upper() + what[1:]} is set by its "
                   f"worst-case boundary: {side.formula(u, std)} {uv}.")
        if r.virtual_condition.value is not None:
            vc_name = term(r.virtual_condition.key, std)[1]
            out.append(f"{vc_name[0].upper() + vc_name[1:]}: {r.virtual_condition.formula(u, std)} {uv}.")
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


class _Page:
    """Place things on an A4 figure in inches from the top-left corner."""

    def __init__(self, fig: Figure):
        self.fig = fig
        self.W, self.H = PAGE

    def rect(self, x, y, w, h):
        """Figure-fraction rect of a box at (x, y) inches from top-left, w x h inches."""
        return (x / self.W, 1 - (y + h) / self.H, w / self.W, h / self.H)

    def text(self, x, y, s, **kw):
        kw.setdefault("va", "top")
        kw.setdefault("ha", "left")
        kw.setdefault("color", S.TEXT)
        return self.fig.text(x / self.W, 1 - y / self.H, s, **kw)

    def box(self, x, y, w, h, lw=0.6, **kw):
        r = Rectangle((x / self.W, 1 - (y + h) / self.H), w / self.W, h / self.H, transform=self.fig.transFigure,
                      fill=kw.pop("fill", False), ec=kw.pop("ec", S.TEXT), lw=lw, **kw)
        self.fig.add_artist(r)
        return r

    def line(self, x0, y0, x1, y1, lw=0.6, color=S.TEXT, **kw):
        from matplotlib.lines import Line2D

        self.fig.add_artist(Line2D([x0 / self.W, x1 / self.W], [1 - y0 / self.H, 1 - y1 / self.H],
                                   transform=self.fig.transFigure, lw=lw, color=color, **kw))

    def field(self, x, y, w, h, label, value, fs=7.0):
        """A title-block box: small label at the top, value below (blank when absent)."""
        self.box(x, y, w, h)
        self.text(x + 0.04, y + 0.03, label.upper(), fontsize=4.8, color=GREY)
        if value:
            chars = max(8, int(w * 72 / (fs * 0.55)))
            lines = textwrap.wrap(str(value), chars)[:2]
            self.text(x + 0.04, y + 0.13, "\n".join(lines), fontsize=fs if len(lines) == 1 else fs * 0.85,
                      linespacing=1.05)


def _requirement_parts(item: Item, units) -> tuple[str, str]:
    """(characteristic, tolerance) of the item's features, from the scene."""
    chars, tols = [], []
    for f in item.subject.features:
        t = f.tolerance
        prefix = f"{f.kind.value}: " if item.subject.is_mate else ""
        chars.append(prefix + (t.characteristic.value + (" (projected)" if t.projected else "") if t else "size only"))
        tols.append(prefix + (t.symbol(units) if t else "none"))
    return "; ".join(chars), "; ".join(tols)


def _head(p: _Page, res: SceneResult, title: str, subtitle: str, char: str, tol: str, page_no: int,
          pages: int) -> float:
    """Page header and the title block (from the scene's ``[report]`` table); returns the y below it."""
    sc = res.scene
    u, std = sc.units, sc.standard
    rep = dict(sc.report)
    x0, W = MARGIN, PAGE[0] - 2 * MARGIN
    # ---------------------------------------------------------------- header
    p.text(x0, 0.34, title, fontsize=13, weight="bold")
    xs = x0 + (1.45 if len(title) <= 12 else 0.135 * len(title) + 0.1)
    room = x0 + W - 1.75 - xs  # the report number sits at the right
    p.text(xs, 0.37, subtitle, fontsize=min(8.5, max(6.0, room * 72 / (0.53 * max(len(subtitle), 1)))))
    p.text(x0 + W, 0.34, f"report no. {rep.get('report_number') or '—'}", fontsize=9, ha="right", weight="bold")
    p.text(x0 + W, 0.55, f"page {page_no} of {pages}", fontsize=7.5, ha="right")
    p.text(x0, 0.58, sc.title + (f"   ({Path(sc.source).name})" if sc.source else ""), fontsize=8.5)
    # ---------------------------------------------------------------- title block
    y, h = 0.82, 0.32
    rows = [
        [("report number", rep.get("report_number"), 1.55), ("part number", rep.get("part"), 1.45),
         ("revision", rep.get("revision"), 0.62), ("part name", rep.get("part_name"), 2.15),
         ("supplier", rep.get("supplier"), None)],
        [("lot", rep.get("lot"), 1.55), ("serial", rep.get("serial"), 1.45), ("quantity", rep.get("quantity"), 0.62),
         ("date", rep.get("date"), 1.05), ("prepared by", rep.get("prepared_by"), None)],
        [("requirement (as stated)", rep.get("requirement"), 4.6), ("drawing zone", rep.get("drawing_zone"), 0.9),
         ("units / standard", f"{u.value} / {std.value.upper()}", None)],
        [("characteristic", char, 2.45), ("tolerance (feature control frame)", tol, 2.6),
         ("how it was found", rep.get("found_by"), None)],
        [("remarks", rep.get("remarks"), None)],
    ]
    for row in rows:
        x = x0
        for label, value, w in row:
            w = (x0 + W - x) if w is None else w
            p.field(x, y, w, h, label, value)
            x += w
        y += h
    p.box(x0, 0.82, W, y - 0.82, lw=1.2)
    return y


DESIGN_TITLE = "DESIGN INTENT"
DESIGN_SUBTITLE = "worst-case fit from the drawing limits — not a verdict on the measured part"


def build_page(res: SceneResult, item: Item, states, image3d: np.ndarray | None, page_no: int, pages: int,
               view: str = "iso", design_intent: bool = False) -> Figure:
    """One evidence page (A4 portrait) for a mate or a lone feature.

    ``design_intent``: the report also judges measured parts (inspection pages), so this page is
    titled as what it is, the worst case the drawing allows, and not as a verdict on the part."""
    sc = res.scene
    u, std = sc.units, sc.standard
    sub = item.subject
    with F.style_context():
        fig = Figure(figsize=PAGE, facecolor=S.BACKGROUND)
        p = _Page(fig)
        x0, W = MARGIN, PAGE[0] - 2 * MARGIN
        char, tol = _requirement_parts(item, u)
        if design_intent:
            title, subtitle = DESIGN_TITLE, DESIGN_SUBTITLE
        else:
            title, subtitle = "FIT EVIDENCE", "worst-case mating of toleranced holes and pins"
        y = _head(p, res, title, subtitle, char, tol, page_no, pages)
        # ---------------------------------------------------------------- subject and verdict
        y += 0.08
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
        y += 0.36
        # ---------------------------------------------------------------- images, 2 x 2
        gw, gh, gap = (W - 0.15) / 2, 2.0, 0.1
        slots = [(x0, y), (x0 + gw + 0.15, y), (x0, y + gh + gap), (x0 + gw + 0.15, y + gh + gap)]
        fs2 = 5.4
        # 3D
        ax = fig.add_axes(p.rect(slots[0][0], slots[0][1] + 0.14, gw, gh - 0.42))
        ax.set_axis_off()
        if image3d is not None:
            ax.imshow(image3d, interpolation="antialiased")
            ax.set_aspect("equal")
        p.text(slots[0][0], slots[0][1], f"3D view ({view})", fontsize=fs2 * 1.2, weight="bold")
        p.text(slots[0][0], slots[0][1] + gh - 0.2, "same colours as the 2D views; red = interference; "
               "radial deviations exaggerated, lengths true\n(the full picture with its numbers and legend is "
               "the separate 3D PNG)", fontsize=fs2 * 0.85, color=GREY)
        for (sx, sy), name in zip(slots[1:], VIEW_FILES):
            rect = p.rect(sx, sy + 0.14, gw, gh - 0.4 if name != "bonus" else gh - 0.5)
            if name == "bonus":
                rect = p.rect(sx + 0.38, sy + 0.2, gw - 0.4, gh - 0.55)
            F.draw_view(name, res, item.ref, states, fig=fig, rect=rect, fontsize=fs2)
            if name == "bonus":
                b = term("bonus", std)[0]
                p.text(sx, sy, f"{b[0].upper() + b[1:]}: tolerance allowed vs produced size", fontsize=fs2 * 1.2,
                       weight="bold")
        for sx, sy in slots:
            p.box(sx - 0.03, sy - 0.03, gw + 0.06, gh + 0.02, lw=0.4, ec=S.PART)
        y += 2 * gh + gap + 0.08
        # ---------------------------------------------------------------- numbers with formulas
        y = _numbers(p, res, item, x0, y, W)
        # ---------------------------------------------------------------- effect on fit
        p.text(x0, y, "EFFECT ON FIT", fontsize=7, weight="bold")
        y += 0.13
        body = []
        for para in effect_on_fit(res, item, states):
            body += textwrap.wrap(para, 158)
        p.text(x0, y, "\n".join(body), fontsize=6.1, linespacing=1.2, gid="effect")
        y += 0.102 * len(body) + 0.08
        # ---------------------------------------------------------------- disposition and signatures
        _disposition(p, x0, max(y, PAGE[1] - 1.12), W)
        # ---------------------------------------------------------------- caution
        p.line(x0, PAGE[1] - 0.44, x0 + W, PAGE[1] - 0.44, lw=0.5)
        p.text(x0, PAGE[1] - 0.41, "\n".join(textwrap.wrap("CAUTION: " + CAUTION, 160)), fontsize=6.2,
               style="italic", gid="caution")
    return fig


def _abbreviations(std) -> dict[str, str]:
    keys = ("mmc", "lmc", "t", "t_mmc", "t_lmc", "bonus", "vc_MMC", "vc_LMC", "rc", "inner", "outer")
    return {term(k, std)[0]: term(k, std)[1] for k in keys}


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
        head = feature_heading(r, u)
        head_lines = textwrap.wrap(head, int(colw * 72 / (fs * 0.55)))[:2]
        p.text(x, y, "\n".join(head_lines), fontsize=fs, color=S.TEXT)
        p.line(x, y + 0.1 * len(head_lines) + 0.01, x + colw - 0.1, y + 0.1 * len(head_lines) + 0.01, lw=0.5)
        yy = y + 0.1 * len(head_lines) + 0.04
        for i, (qty, val, formula) in enumerate(feature_rows(r, u, std)):
            first = formula.split(" = ", 1)[0].split(":", 1)[0]
            if first not in abbr:
                shown = f"{qty}: {formula}"
            elif qty != abbr[first] and qty.startswith(abbr[first]):
                rest = qty[len(abbr[first]):].strip()  # e.g. "(within the projected height)"
                if rest.startswith("(") and rest.endswith(")") and rest.count("(") == 1:
                    rest = rest[1:-1]
                shown = f"{formula}, {rest}"
            else:
                shown = formula
            wrapped = textwrap.wrap(shown, int((colw - 0.8) * 72 / (fs * 0.53)), subsequent_indent="   ")
            if i % 2 == 0:
                p.box(x, yy - 0.012, colw - 0.1, rowh * len(wrapped), lw=0, fill=True, fc="#EEF0F2", ec="none")
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


def _disposition(p: _Page, x0: float, y: float, W: float) -> None:
    p.text(x0, y, "DISPOSITION (tick one)", fontsize=7, weight="bold")
    x = x0 + 1.55
    for d in DISPOSITIONS:
        p.box(x, y - 0.005, 0.11, 0.11, lw=0.8)
        p.text(x + 0.16, y, d, fontsize=7)
        x += 0.3 + 0.062 * len(d)
    y += 0.26
    for i, who in enumerate(("engineering", "quality", "customer / supplier (if required)")):
        xs = x0 + i * (W / 3)
        p.line(xs, y + 0.12, xs + W / 3 - 0.25, y + 0.12, lw=0.6)
        p.text(xs, y + 0.15, f"{who}: name, signature, date", fontsize=5.5, color=GREY)


# ------------------------------------------------------------------------------------ 3D image

PAGE_3D_ASPECT = 1.75  # width / height of the 3D slot on the page


def crop_to_content(img: np.ndarray, aspect: float = PAGE_3D_ASPECT, pad: float = 0.04,
                    background=S.BACKGROUND, tol: int = 6) -> np.ndarray:
    """The smallest window of ``aspect`` around every non-background pixel (plus ``pad``)."""
    bg = np.array(S.rgb255(background), dtype=int)
    mask = (np.abs(img[..., :3].astype(int) - bg) > tol).any(axis=-1)
    if not mask.any():
        return img
    rows, cols = np.where(mask.any(axis=1))[0], np.where(mask.any(axis=0))[0]
    r0, r1, c0, c1 = rows[0], rows[-1] + 1, cols[0], cols[-1] + 1
    h, w = r1 - r0, c1 - c0
    h, w = int(h * (1 + 2 * pad)), int(w * (1 + 2 * pad))
    if w / h < aspect:
        w = int(h * aspect)
    else:
        h = int(w / aspect)
    cy, cx = (r0 + r1) // 2, (c0 + c1) // 2
    H, Wd = img.shape[:2]
    out = np.empty((h, w, img.shape[2]), dtype=img.dtype)
    out[...] = np.array(S.rgb255(background) + ((255,) if img.shape[2] == 4 else ()), dtype=img.dtype)
    y0, x0 = cy - h // 2, cx - w // 2
    sy0, sx0, sy1, sx1 = max(y0, 0), max(x0, 0), min(y0 + h, H), min(x0 + w, Wd)
    out[sy0 - y0:sy1 - y0, sx0 - x0:sx1 - x0] = img[sy0:sy1, sx0:sx1]
    return out


def page_image_3d(scene3d_obj, view: str) -> np.ndarray:
    """The 3D picture for the page: the model and its 3D labels without the text overlays (the
    page prints those numbers in its table), cropped to the model so it reads at page size."""
    return crop_to_content(_bare_render(scene3d_obj, view))


def _page_layers() -> set[str]:
    """Layers drawn on the page's 3D picture: all but the text overlays (the page prints them)."""
    from viewer import scene3d

    return set(scene3d.LAYERS) - set(scene3d.HIDDEN_BY_DEFAULT) - {"readouts", "legend"}


def _bare_render(scene3d_obj, view: str) -> np.ndarray:
    from viewer import scene3d

    return scene3d.render_image(scene3d_obj, None, view=view, size=(1600, 1200), visible=_page_layers())


def inspection_images(scene3d_obj, view: str) -> list[tuple[str, np.ndarray]]:
    """The inspection page's pictures: the report's camera and the section in the plane of the
    tilt (where the median line's drift shows), without text overlays (the page prints the
    numbers and the colour key); cropped on the page."""
    views = list(dict.fromkeys((view, "section")))
    names = {"iso": "3D view", "top": "view from above, along the axis", "section": "section in the plane of the tilt"}
    return [(names.get(v, v), _bare_render(scene3d_obj, v)) for v in views]


# ------------------------------------------------------------------------------------ writing


Progress = Callable[[str], None]


def write_report(res: SceneResult, out_dir, sizes: dict[str, float] | None = None, view: str = "iso",
                 progress: Progress | None = None, inspections: dict | None = None) -> list[Path]:
    """Write every file of the report into ``out_dir``; returns the paths written.

    ``sizes``: produced sizes (feature id -> size) for the what-if pictures; the rest stays at the
    worst case. ``view``: camera of the 3D picture (one of viewer.scene3d.VIEWS).
    ``inspections``: feature id -> :class:`geom.inspect.InspectionResult`, one inspection page
    each (first in the PDF); None inspects every feature with ``[feature.measured]`` data.
    Fasteners of the scene get their own page(s) at the end.
    """
    from viewer import scene3d

    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    items = report_items(res)
    if inspections is None:
        inspections = scene_inspections(res.scene)
    fids = list(res.fasteners)
    fastener_pages = [fids[i:i + FASTENERS_PER_PAGE] for i in range(0, len(fids), FASTENERS_PER_PAGE)]
    steps = len(items) * (1 + len(VIEW_FILES)) + len(inspections) + len(fids) + 2
    n = 0
    written: list[Path] = []

    def say(what: str, paths):
        nonlocal n
        n += 1
        if progress is not None:
            shown = ", ".join(str(q) for q in paths)
            progress(f"[{n}/{steps}] {what} -> {shown}")

    images3d = {}
    page_states = {}
    for item in items:
        states = item_states(res, item, sizes)
        page_states[item.file_key] = states
        # 3D picture, rendered once and reused on the page
        png = out / f"{item.file_key}_3d_{view}.png"
        if item.index is not None:
            s3 = scene3d.build_mate_scene(res, item.index, states=states)
        else:
            s3 = scene3d.build_feature_scene(res, item.feature_id, state=states[item.feature_id])
        pics = scene3d.render_variants(s3, view, {"full": (png, None), "page": (None, _page_layers())})
        images3d[item.file_key] = crop_to_content(pics["page"])
        written.append(png)
        say(f"{item.label}: 3D view", [png])
        for name in VIEW_FILES:
            fig, _ = F.draw_view(name, res, item.ref, states)
            paths = [out / f"{item.file_key}_{name}.{ext}" for ext in ("png", *VECTOR_FORMATS)]
            for q in paths:
                F.save_figure(fig, q)
            written += paths
            say(f"{item.label}: {name} view", paths)
    insp_pages = {}
    for fid, insp in inspections.items():
        s3 = scene3d.build_inspection_scene(res, insp)
        key = f"inspection_{slug(fid)}"
        pngs = [out / f"{key}_3d_{v}.png" for v in dict.fromkeys((view, "section"))]
        for q, v in zip(pngs, dict.fromkeys((view, "section"))):
            scene3d.render_image(s3, q, view=v, size=(1600, 1200))
        written += pngs
        insp_pages[fid] = (inspection_images(s3, view), s3.caption, s3.legend, tuple(q.name for q in pngs))
        say(f"inspection {fid}: 3D views", pngs)
    fastener_files = {}
    for fid in fids:
        fig = fastener_figure(res, fid)
        paths = [out / f"fastener_{slug(fid)}.{ext}" for ext in ("png", "svg")]
        for q in paths:
            F.save_figure(fig, q)
        written += paths
        fastener_files[fid] = paths[0].name
        say(f"fastener {fid}: schematic", paths)
    pdf = out / "report.pdf"
    rep = dict(res.scene.report)
    pages = len(inspections) + len(items) + len(fastener_pages)
    with F.style_context():
        with PdfPages(pdf, metadata={"Title": f"Fit evidence: {res.scene.title}",
                                     "Subject": rep.get("report_number", ""),
                                     "Creator": "matezone report"}) as pp:
            page = 0
            for fid, insp in inspections.items():
                page += 1
                imgs, caption, legend, names = insp_pages[fid]
                pp.savefig(build_inspection_page(res, insp, imgs, page, pages, caption, legend, names))
            for item in items:
                page += 1
                fig = build_page(res, item, page_states[item.file_key], images3d[item.file_key], page, pages, view,
                                 design_intent=bool(inspections))
                pp.savefig(fig)
            for group in fastener_pages:
                page += 1
                pp.savefig(build_fastener_page(res, group, page, pages, fastener_files))
    written.append(pdf)
    say(f"report ({pages} page{'s' if pages != 1 else ''})", [pdf])
    js = out / "results.json"
    data = result_to_json(res)
    from geom.inspect import inspection_to_json

    data["inspections"] = {fid: inspection_to_json(insp) for fid, insp in inspections.items()}
    data["caution"] = CAUTION
    js.write_text(json.dumps(data, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
    written.append(js)
    say("numbers", [js])
    return written


# ------------------------------------------------------------------------------ inspection pages

INSPECTED_CHECKS = ("size", "axis", "surface")
SECTION_ROWS = 12  # longest section table printed whole; longer ones are condensed
DISAGREE_TITLE = "NOTE: READINGS THAT DISAGREE"
LOWER_SIZES = (6.0, 5.7, 5.4, 5.1, 4.8)  # text sizes tried for the inspection page's lower blocks
IMAGE_MIN = 1.3  # smallest height of the inspection pictures, inches


def inspected_ids(scene, points: dict[str, str] | None = None) -> list[str]:
    """Features to inspect, in scene order: those with ``[feature.measured]`` data and those
    given measured points (``points``: feature id -> CSV path)."""
    given = set(points or {})
    return [f.id for f in scene.features if f.measured is not None or f.id in given]


def scene_inspections(scene, points: dict[str, str] | None = None, bonus_basis: str = "unrelated") -> dict:
    """:func:`geom.inspect.inspect_feature` for every inspected feature (feature id -> result).

    Errors of geom (``InspectError``, ``PointsError``, ``FitError``) pass through unchanged."""
    from geom.inspect import inspect_feature

    points = points or {}
    return {fid: inspect_feature(scene, fid, points=points.get(fid), bonus_basis=bonus_basis)
            for fid in inspected_ids(scene, points)}


def _vc_terms(insp) -> tuple[str, str]:
    """(abbreviation, name) of the feature's virtual condition in the standard's terms."""
    t = insp.feature.tolerance
    key = "vc_LMC" if t is not None and t.material is Material.LMC else "vc_MMC"
    return term(key, insp.standard)


def _envelope_words(insp, related: bool) -> str:
    """The name of the envelope a reading uses, in the standard's terms (from geom.inspect)."""
    from geom.inspect import envelope_name

    t = insp.feature.tolerance
    lmc = t is not None and t.material is Material.LMC
    if t is not None and (t.characteristic is Characteristic.STRAIGHTNESS or not t.datums):
        related = False
    position = t is not None and t.characteristic is Characteristic.POSITION
    return envelope_name(insp.standard, insp.feature.kind is Kind.HOLE, related, lmc, position)


def _envelope_abbr(insp) -> str:
    """AME / AMME (ASME), GX / GN (ISO): geom.inspect.envelope_abbr of the feature."""
    from geom.inspect import envelope_abbr

    t = insp.feature.tolerance
    return envelope_abbr(insp.standard, insp.feature.kind is Kind.HOLE, t is not None and t.material is Material.LMC)


def check_meaning(insp, name: str) -> str:
    """What a reading checks, in the standard's terms and with the governing axis reading."""
    std = insp.standard
    t = insp.feature.tolerance
    B = term("bonus", std)[0]
    if name == "size":
        text = "two-point local sizes within the limits"
        if insp.envelope_check is not None:
            text += f"; {insp.envelope_check.name}: {_envelope_abbr(insp)} not beyond {term('mmc', std)[0]}"
        return text
    if t is None:
        return "no geometric tolerance: not checked"
    if name == "axis":
        basis = insp.axis.basis if insp.axis is not None else "axis"
        return f"the {basis} within the tolerance allowed, t + {B}"
    if t.material is Material.RFS:
        return f"{term('rfs', std)[1]}: no virtual condition, so no surface reading"
    vc = _vc_terms(insp)[0]
    if t.projected:
        return (f"axis of the {_envelope_abbr(insp)} (the gauge pin that fits) over the projected height, "
                "within the tolerance allowed")
    held = "held to the datum" if t.datums and t.characteristic is not Characteristic.STRAIGHTNESS else "unrelated"
    return f"{_envelope_abbr(insp)} ({held}) does not violate {vc}: what a functional gauge checks"


def reading_rows(insp) -> list[tuple[str, str, object, str]]:
    """(label, role, check, meaning) of every reading shown: size, the axis reading that applies,
    surface, then the other axis reading ("does not govern"). ``role``: "governs" for a reading
    the part verdict uses (``insp.verdict.governing``), "shown" for one it does not use."""
    gov = set(insp.verdict.governing) if insp.verdict is not None else set()
    rows = []
    for n in INSPECTED_CHECKS:
        c = getattr(insp, f"{n}_check")
        label = f"axis ({insp.axis.basis})" if n == "axis" and insp.axis is not None else n
        rows.append((label, "governs" if n in gov else "shown", c, check_meaning(insp, n)))
    oc = insp.other_axis_check
    if oc is not None:
        other = insp.feature_axis if insp.axis is insp.median_axis else insp.median_axis
        basis = other.basis if other is not None else oc.name
        rows.append((f"axis ({basis})", "does not govern", oc,
                     f"the {basis}, judged the same way"))
    return rows


_ROLE_TAG = {"governs": " (governs)", "shown": "", "does not govern": " (does not govern)"}


def _disagreements(insp) -> bool:
    """Whether two readings of the feature disagree (geom.conformance.readings_disagree)."""
    return (readings_disagree(insp.axis_check, insp.surface_check)
            or readings_disagree(insp.other_axis_check, insp.axis_check))


def _headline(insp) -> tuple[str, str, tuple[str, ...], str]:
    """(headline, colour role, notes, why) of the part verdict, exactly as geom gives them."""
    v = insp.verdict
    if v is None:  # geom always sets it; kept so an old result cannot crash the page
        return "NOT EVALUATED", "none", (), ""
    return v.headline, v.role, tuple(v.notes), v.why


def condensed_sections(sections, n_max: int = SECTION_ROWS) -> list[int]:
    """Indices of the sections to print, in order: all of them when there are at most ``n_max``,
    otherwise the first and last, those with the extreme least-squares and mating diameters,
    local sizes and roundness, and evenly spaced others up to ``n_max``."""
    n = len(sections)
    if n <= n_max:
        return list(range(n))
    keep = {0, n - 1}
    for key in ("ls_diameter", "mating_diameter", "local_min", "local_max", "roundness"):
        vals = [getattr(s, key) for s in sections]
        keep.add(int(np.argmin(vals)))
        keep.add(int(np.argmax(vals)))
    for i in np.linspace(0, n - 1, n_max).round().astype(int):
        if len(keep) >= n_max:
            break
        keep.add(int(i))
    return sorted(keep)


def _inspection_subject(insp) -> str:
    f = insp.feature
    u = insp.units
    who = f"{f.kind.value.capitalize()} '{f.id}'{' (' + f.name + ')' if f.name else ''} as produced"
    if insp.source == "points" and insp.points is not None:
        P = insp.points
        src = Path(insp.source_file).name if insp.source_file else "points"
        how = (f"{len(P)} measured points in {len(insp.sections)} sections from {src}, "
               f"z = {u.fmt(P[:, 2].min())} .. {u.fmt(P[:, 2].max())} {u.value}")
    else:
        how = "inspection values typed into the scene's [feature.measured] table"
    unc = (f"; U = {u.fmt(insp.uncertainty)} {u.value} (k = 2)" if insp.uncertainty is not None
           else "; no measurement uncertainty U given")
    return f"{who}: {how}{unc}"


def _table(p: _Page, x: float, y: float, widths, rows, fs: float, head_fs: float | None = None,
           aligns=None, colours=None, shade: bool = True, rowh: float | None = None, gid: str | None = None) -> float:
    """A small table: the first row is the heading; returns the y below it."""
    rowh = rowh or fs * 0.0185
    aligns = aligns or ["left"] + ["right"] * (len(widths) - 1)
    total = sum(widths)
    for r, row in enumerate(rows):
        if r and shade and r % 2 == 1:
            p.box(x, y - 0.012, total, rowh, lw=0, fill=True, fc="#EEF0F2", ec="none")
        xx = x
        for c, (w, cell) in enumerate(zip(widths, row)):
            col = (colours[r][c] if colours and colours[r] and colours[r][c] else (GREY if r == 0 else S.TEXT))
            kw = dict(fontsize=head_fs or fs, weight="bold") if r == 0 else dict(fontsize=fs)
            if aligns[c] == "right":
                p.text(xx + w - 0.05, y, cell, ha="right", color=col, **kw)
            else:
                p.text(xx + 0.03, y, cell, color=col, **kw)
            xx += w
        if r == 0:
            p.line(x, y + rowh - 0.015, x + total, y + rowh - 0.015, lw=0.5)
        y += rowh
    return y


def _sections_table(p: _Page, insp, x: float, y: float, w: float, fs: float) -> float:
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
    y = _table(p, x, y, widths, rows, fs, gid="sections")
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
    std = insp.standard
    B = term("bonus", std)[0]
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
    readings = [a for a in (insp.feature_axis, insp.median_axis) if a is not None]
    if insp.axis is not None and all(a is not insp.axis for a in readings):
        readings.insert(0, insp.axis)
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


def _wrap(text: str, width_in: float, fs: float, indent: str = "") -> list[str]:
    return textwrap.wrap(text, max(6, int(width_in * 72 / (fs * 0.55))), subsequent_indent=indent)


class _DryPage(_Page):
    """Measures a layout: the same calls as :class:`_Page`, nothing drawn."""

    def text(self, *a, **kw):
        return None

    def box(self, *a, **kw):
        return None

    def line(self, *a, **kw):
        return None


def _basis_words(insp) -> str:
    """The envelope the bonus (ISO: increase) is taken from, by its name in the standard."""
    if insp.bonus_basis == "unrelated":
        return f"{_envelope_words(insp, False)} (the default)"
    if insp.bonus_basis == "related":
        return f"{_envelope_words(insp, True)} (chosen with --bonus-basis related)"
    return insp.bonus_basis


def _paragraphs(p: _Page, x0: float, y: float, W: float, fs: float, title: str, paras, gid: str) -> float:
    if not paras:
        return y
    y += 0.05
    p.text(x0, y, title, fontsize=7, weight="bold")
    y += 0.14
    body = []
    for para in paras:
        body += _wrap(para, W, fs)
    p.text(x0, y, "\n".join(body), fontsize=fs, linespacing=1.2, gid=gid)
    return y + 0.1 * len(body) + 0.04


def _inspection_lower(p: _Page, insp, x0: float, y: float, W: float, fs: float) -> float:
    """Sections | envelopes beside least squares and the bonus basis; the readings and their
    verdicts; the notes on readings that disagree; the explanation. Returns the y below."""
    u = insp.units
    std = insp.standard
    B = term("bonus", std)[0]
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
    shown_axes = [a for a in (insp.feature_axis, insp.median_axis) if a is not None]
    if insp.axis is not None and all(a is not insp.axis for a in shown_axes):
        shown_axes.insert(0, insp.axis)
    al = [f"{a.basis} reading ({'governs' if a is insp.axis else 'does not govern'}): {a.method}" for a in shown_axes]
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
    rows = [("reading", "what is checked", "measured against the limit", "verdict", "outcome")]
    cols = [None]
    for label, role, c, meaning in reading_rows(insp):
        word, r = verdict_word(c)
        cc = S.ROLE_COLOUR[r]
        rows.append((label + _ROLE_TAG[role], meaning, c.detail, word, c.outcome_text))
        cols.append((GREY if role == "does not govern" else None, None, None, cc, cc))
    widths = [0.95, 2.25, 2.05, 1.0, W - 6.25]
    y = _wrapped_table(p, x0, y, widths, rows, fs, cols)
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
    if _disagreements(insp):
        title = DISAGREE_TITLE + (" (WHY THE AXIS AND SURFACE READINGS DISAGREE)"
                                  if readings_disagree(insp.axis_check, insp.surface_check) else "")
    else:
        title = "EXPLANATION AND NOTES"
    return _paragraphs(p, x0, y, W, fs, title, paras, "explanation")


def _deviation_bar(fig, p: _Page, insp, x: float, y: float, w: float, fs: float) -> None:
    """Horizontal colour bar of the points' radial deviation (true values, as the 3D picture)."""
    from matplotlib.cm import ScalarMappable
    from matplotlib.colors import Normalize

    u = insp.units
    dev = np.asarray(insp.radial_deviation, float)
    m = float(np.abs(dev).max()) or 10.0 ** -(u.decimals + 1)
    title = _wrap(f"points: radial deviation from the least-squares cylinder, {u.value} (true values; + outward)",
                  w, fs * 0.88)
    cax = fig.add_axes(p.rect(x, y + 0.03 + 0.09 * len(title), w, 0.09))
    sm = ScalarMappable(Normalize(-m, m), S.deviation_colormap())
    cb = fig.colorbar(sm, cax=cax, orientation="horizontal")
    cb.set_ticks([-m, -m / 2, 0.0, m / 2, m])
    ticks = (-m, -m / 2, 0.0, m / 2, m)
    cb.ax.set_xticklabels([("+" if v > 0 else "") + t for v, t in zip(ticks, u.fmt_cmp(*ticks))], fontsize=fs * 0.85)
    cb.outline.set_linewidth(0.4)
    p.text(x, y, "\n".join(title), fontsize=fs * 0.88, linespacing=1.15)


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
    sc = res.scene
    u = sc.units
    f = insp.feature
    t = f.tolerance
    fs = 6.0
    with F.style_context():
        fig = Figure(figsize=PAGE, facecolor=S.BACKGROUND)
        p = _Page(fig)
        x0, W = MARGIN, PAGE[0] - 2 * MARGIN
        char = (t.characteristic.value + (" (projected)" if t.projected else "")) if t else "size only"
        y = _head(p, res, "INSPECTION EVIDENCE", "a produced feature judged against its tolerance", char,
                  t.symbol(u) if t else "none", page_no, pages)
        # ---------------------------------------------------------------- subject and verdict
        y += 0.08
        subj = _wrap(_inspection_subject(insp), W, 8.0 * 1.12)
        p.text(x0, y, "\n".join(subj), fontsize=8.0, weight="bold", linespacing=1.15)
        y += 0.135 * len(subj) + 0.05
        head, role, notes, _ = _headline(insp)
        col = S.ROLE_COLOUR[role]
        bad = role == "fail"
        hl = _wrap(head, W - 0.2, 9.0 * 1.12)
        # the per-reading row: each reading's word (geom.conformance.verdict_word), flowed over lines
        items = []
        for label, r_role, c, _m in reading_rows(insp):
            word, wr = verdict_word(c)
            items.append((f"{label}{_ROLE_TAG[r_role]}: {word}", S.ROLE_COLOUR[wr]))
        if notes and _disagreements(insp):
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
        y += bh + 0.08
        # ---------------------------------------------------------------- sizes of the blocks below
        dry = _DryPage(fig)
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
        # the tables and the explanation in the text size that leaves the pictures room (long
        # explanations, as geom writes them where readings disagree, take a smaller size)
        for fs_low in LOWER_SIZES:
            img_h = room - _inspection_lower(dry, insp, x0, 0.0, W, fs_low)
            if img_h >= IMAGE_MIN:
                break
        img_h = float(min(3.0, max(IMAGE_MIN, img_h)))
        # ---------------------------------------------------------------- 3D pictures
        p.text(x0, y, "3D VIEWS OF THE MEASURED FEATURE", fontsize=7, weight="bold")
        y += 0.15
        n_img = max(1, len(images))
        gap = 0.12
        gw = (W - gap * (n_img - 1)) / n_img
        for i, (label, img) in enumerate(images):
            xi = x0 + i * (gw + gap)
            ax = fig.add_axes(p.rect(xi, y, gw, img_h))
            ax.set_axis_off()
            ax.imshow(crop_to_content(img, aspect=gw / img_h), interpolation="antialiased")
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
            _deviation_bar(fig, p, insp, x0 + 2 * kw_ + 0.1, y, W - 2 * kw_ - 0.15, fs)
        y += leg_h + 0.04
        p.text(x0, y, "\n".join(cl), fontsize=fs * 0.88, color=GREY, linespacing=1.15)
        y += cap_h + 0.1
        # ---------------------------------------------------------------- tables, verdicts, explanation
        y = _inspection_lower(p, insp, x0, y, W, fs_low)
        # ---------------------------------------------------------------- disposition, signatures, caution
        _disposition(p, x0, max(y + 0.05, PAGE[1] - 1.12), W)
        p.line(x0, PAGE[1] - 0.44, x0 + W, PAGE[1] - 0.44, lw=0.5)
        p.text(x0, PAGE[1] - 0.41, "\n".join(textwrap.wrap("CAUTION: " + CAUTION, 160)), fontsize=6.2,
               style="italic", gid="caution")
    return fig


def _wrapped_table(p: _Page, x: float, y: float, widths, rows, fs: float, colours=None, bold=(0, 3)) -> float:
    """A table whose cells wrap to their column; the first row is the heading, ``bold`` the
    columns printed bold."""
    lh = fs * 0.0172
    total = sum(widths)
    for r, row in enumerate(rows):
        # upper-case words (the verdict words) are wider than the average the wrap assumes
        cells = [_wrap(str(c), w - 0.06, fs * (1.3 if str(c).isupper() else 1.0)) or [""]
                 for c, w in zip(row, widths)]
        n = max(len(c) for c in cells)
        if r and r % 2 == 1:
            p.box(x, y - 0.012, total, lh * n + 0.02, lw=0, fill=True, fc="#EEF0F2", ec="none")
        xx = x
        for c, (w, lines) in enumerate(zip(widths, cells)):
            col = (colours[r][c] if colours and colours[r] and colours[r][c] else (GREY if r == 0 else S.TEXT))
            kw = dict(weight="bold") if (r == 0 or c in bold) else {}
            p.text(xx + 0.03, y, "\n".join(lines), fontsize=fs, color=col, linespacing=1.15, **kw)
            xx += w
        if r == 0:
            p.line(x, y + lh * n, x + total, y + lh * n, lw=0.5)
        y += lh * n + 0.03
    return y


# ------------------------------------------------------------------------------- fastener pages

FASTENERS_PER_PAGE = 3


def fastener_rows(res: SceneResult, fid: str) -> list[tuple[str, str]]:
    """(quantity, value with its formula) of a fastener, from :func:`geom.analysis.analyse_fastener`
    (through ``res.fasteners``) and its ``Derived`` formulas."""
    from geom.analysis import required_hole_fixed

    sc = res.scene
    u, std = sc.units, sc.standard
    fr = res.fasteners[fid]
    fa = fr.fastener
    uv = u.value
    fixed = fa.kind == "fixed"
    mmc = term("mmc", std)[0]
    rows = [("kind", "fixed: one part threaded (or press-fit) holds the fastener; the other has a clearance hole"
             if fixed else "floating: a clearance hole in each part, the fastener held by a nut"),
            ("F", f"{u.fmt(fa.fastener)} {uv}  fastener at {mmc} (its largest size)"),
            ("H", f"{u.fmt(fa.hole)} {uv}  clearance hole at {mmc} (its smallest size)")]
    if fixed:
        rows += [("P", f"{u.fmt(fa.projection)} {uv}  greatest thickness of the part with the clearance hole "
                       "(the projected height)"),
                 ("D", f"{u.fmt(fa.thread_depth)} {uv}  least thread depth (engagement) in the fixed part")]
    T = fr.position_tolerance
    rows.append(("position tolerance", f"⌀{u.fmt(T.value)} {uv} at {mmc}, "
                 + ("each part" if not fixed else "each part, projected zone P on the threaded part")))
    rows.append(("formula", T.formula(u, std)))
    Tu = fr.position_tolerance_unprojected
    if Tu is not None:
        rows.append(("no projected zone", f"⌀{u.fmt(Tu.value)} {uv} at {mmc}, each part (equal tolerances)"))
        rows.append(("formula", Tu.formula(u, std) + "   from H = F + T1 + T2(1 + 2P/D) with T1 = T2 = T"))
        back = required_hole_fixed(fa.fastener, Tu.value, Tu.value, fa.projection, fa.thread_depth)
        rows.append(("check", f"F + T + T(1 + 2P/D) = {u.fmt(fa.fastener)} + {u.fmt(Tu.value)} + "
                              f"{u.fmt(Tu.value)} × (1 + 2 × {u.fmt(fa.projection)} / {u.fmt(fa.thread_depth)}) "
                              f"= {u.fmt(back)} = H"))
    return rows


def fastener_words(res: SceneResult, fid: str) -> list[str]:
    """What the numbers mean, in words (every number from geom.analysis)."""
    sc = res.scene
    u, std = sc.units, sc.standard
    uv = u.value
    mmc, B = term("mmc", std)[0], term("bonus", std)[0]
    fr = res.fasteners[fid]
    fa = fr.fastener
    T = fr.position_tolerance.value
    if fa.kind == "floating":
        return [f"Both parts may locate their clearance holes within ⌀{u.fmt(T)} {uv} at {mmc}: with both holes at "
                f"their smallest size {u.fmt(fa.hole)} and their axes displaced the full amount in opposite "
                f"directions, a fastener of {u.fmt(fa.fastener)} still passes through both. Larger holes earn "
                f"more tolerance: the {B} at {mmc}."]
    Tu = fr.position_tolerance_unprojected.value
    return [f"The fastener is fixed in one part, so the two parts share the clearance H − F: each gets "
            f"⌀{u.fmt(T)} {uv} at {mmc}. The threaded hole's zone is projected {u.fmt(fa.projection)} {uv} above it, "
            "through the part it holds, because that is where the fastener must fit the clearance hole.",
            f"Without a projected zone a threaded hole may tilt within its tolerance over the depth D; the "
            f"fastener carries that tilt up through P and leans further out at the top of the clearance part. "
            f"With equal tolerances the holes must then be held to ⌀{u.fmt(Tu)} {uv} instead of "
            f"⌀{u.fmt(T)} {uv}, or the clearance hole made larger."]


def _dim(ax, x0, y0, x1, y1, text, fs, text_xy, ha="center", va="center", ext=None, color=S.TEXT):
    """Dimension line with arrows and its (true) value; ``ext``: extension lines [(x, y, x, y), ...]."""
    ax.annotate("", xy=(x1, y1), xytext=(x0, y0),
                arrowprops=dict(arrowstyle="<|-|>", color=color, lw=0.8, shrinkA=0, shrinkB=0, mutation_scale=7))
    for ex in ext or ():
        ax.plot([ex[0], ex[2]], [ex[1], ex[3]], color=color, lw=0.5)
    ax.text(*text_xy, text, fontsize=fs, ha=ha, va=va, color=color,
            bbox=dict(boxstyle="round,pad=0.15", fc=S.BACKGROUND, ec="none", alpha=0.9))


def draw_fastener(ax, res: SceneResult, fid: str, fs: float = 7.0) -> None:
    """A section through the fastener in both parts, to scale (scene units on both axes), with F,
    H and (fixed) P and D dimensioned at their true values. Part thicknesses of a floating pattern
    are not in the scene: they are drawn at an arbitrary thickness, and so are the screw head and nut."""

    sc = res.scene
    u = sc.units
    fa = res.fasteners[fid].fastener
    F_, H = fa.fastener, fa.hole
    fixed = fa.kind == "fixed"
    if fixed:
        P, D = fa.projection, fa.thread_depth
        top, bot = (0.0, P), (-D, 0.0)
    else:
        t = 1.2 * H  # not in the scene: schematic thickness
        top, bot = (0.0, t), (-t, 0.0)
    half_w = 1.9 * H
    hatch = dict(fill=True, fc="#E4E7EA", ec=S.TEXT, lw=0.9, hatch="////")

    def plate(y0, y1, hole_half, colour_ec=S.TEXT):
        for sgn in (-1, 1):
            xs = sorted((sgn * hole_half, sgn * half_w))
            ax.add_patch(Rectangle((xs[0], y0), xs[1] - xs[0], y1 - y0, **hatch))

    plate(*top, H / 2)
    plate(*bot, (F_ / 2) if fixed else H / 2)
    head_h, head_w = 0.55 * F_, 1.7 * F_
    # fastener: shank, head (and nut for floating)
    shank_bot = bot[0] if fixed else bot[0] - 0.75 * F_
    ax.add_patch(Rectangle((-F_ / 2, shank_bot), F_, top[1] - shank_bot, fc=S.SURFACE, ec=S.TEXT, lw=0.9, alpha=0.85))
    ax.add_patch(Rectangle((-head_w / 2, top[1]), head_w, head_h, fc=S.SURFACE, ec=S.TEXT, lw=0.9, alpha=0.85))
    if not fixed:
        ax.add_patch(Rectangle((-head_w / 2, bot[0] - head_h), head_w, head_h, fc=S.SURFACE, ec=S.TEXT, lw=0.9,
                               alpha=0.85))
    else:  # thread marks along the engagement D
        n = 8
        ys = np.linspace(bot[0], bot[1], 2 * n + 1)
        for sgn in (-1, 1):
            xs = [sgn * (F_ / 2 + (0.06 * F_ if i % 2 else 0.0)) for i in range(len(ys))]
            ax.plot(xs, ys, color=S.TEXT, lw=0.7)
        # the projected zone: from the threaded part's face up through P
        ax.add_patch(Rectangle((-H / 2, 0.0), H, P, fill=False, ec=S.PROJECTED, lw=1.2, ls=(0, (4, 2))))
    ax.plot([0, 0], [shank_bot - 0.15 * F_, top[1] + head_h + 0.15 * F_], color=S.TEXT, lw=0.5, ls="-.")
    # dimensions (true values)
    yH = top[1] + head_h + 0.45 * F_
    _dim(ax, -H / 2, yH, H / 2, yH, f"H ⌀{u.fmt(H)}", fs, (0, yH + 0.02 * H), va="bottom",
         ext=[(-H / 2, top[1], -H / 2, yH + 0.05 * F_), (H / 2, top[1], H / 2, yH + 0.05 * F_)])
    yF = shank_bot - (head_h if not fixed else 0.0) - 0.45 * F_
    _dim(ax, -F_ / 2, yF, F_ / 2, yF, f"F ⌀{u.fmt(F_)}", fs, (0, yF - 0.02 * H), va="top",
         ext=[(-F_ / 2, shank_bot, -F_ / 2, yF - 0.05 * F_), (F_ / 2, shank_bot, F_ / 2, yF - 0.05 * F_)])
    xr = half_w + 0.25 * H
    if fixed:
        _dim(ax, xr, 0.0, xr, P, f"P {u.fmt(P)}", fs, (xr + 0.08 * H, P / 2), ha="left",
             ext=[(half_w, P, xr + 0.1 * H, P)])
        _dim(ax, xr, -D, xr, 0.0, f"D {u.fmt(D)}", fs, (xr + 0.08 * H, -D / 2), ha="left",
             ext=[(half_w, -D, xr + 0.1 * H, -D), (half_w, 0.0, xr + 0.1 * H, 0.0)])
        ax.text(-half_w - 0.1 * H, 0.4 * P, "projected\nzone\n(height P)", fontsize=fs * 0.9, ha="right", va="center",
                color=S.PROJECTED)
        ax.text(-half_w - 0.1 * H, -D / 2, "threaded\npart", fontsize=fs * 0.9, ha="right", va="center")
        ax.text(-half_w - 0.1 * H, 0.85 * P, "clearance-\nhole part", fontsize=fs * 0.9, ha="right", va="center")
    else:
        ax.text(-half_w - 0.1 * H, sum(top) / 2, "part 1", fontsize=fs * 0.9, ha="right", va="center")
        ax.text(-half_w - 0.1 * H, sum(bot) / 2, "part 2", fontsize=fs * 0.9, ha="right", va="center")
    ax.set_aspect("equal")
    ax.autoscale_view()
    ax.set_axis_off()
    x_lo, x_hi = -half_w - 1.35 * H, xr + 1.3 * H
    y_lo, y_hi = yF - 0.35 * H, yH + 0.35 * H
    ax.set_xlim(x_lo, x_hi)
    ax.set_ylim(y_lo, y_hi)


def fastener_figure(res: SceneResult, fid: str) -> Figure:
    """The fastener schematic as its own figure (for the PNG / SVG files)."""
    sc = res.scene
    fa = res.fasteners[fid].fastener
    with F.style_context():
        fig = Figure(figsize=(6.0, 6.0), facecolor=S.BACKGROUND)
        ax = fig.add_axes((0.03, 0.1, 0.94, 0.8))
        draw_fastener(ax, res, fid, fs=9)
        fig.text(0.03, 0.97, f"fastener '{fid}' ({fa.kind}): section, drawn to scale", fontsize=11,
                 weight="bold", va="top")
        note = (f"lengths in {sc.units.value}, true values; " + (
            "screw head drawn schematic" if fa.kind == "fixed" else
            "part thicknesses, head and nut drawn schematic (not in the scene; the formula does not use them)"))
        fig.text(0.03, 0.03, "\n".join(textwrap.wrap(note, 95)), fontsize=8, color=GREY, va="bottom")
    return fig


def build_fastener_page(res: SceneResult, fids: list[str], page_no: int, pages: int,
                        files: dict[str, str] | None = None) -> Figure:
    """A page of fastener tables (kind, F, H, P, D, position tolerance with its formula, the
    equal tolerance without a projected zone, the meaning in words) each beside its schematic."""
    sc = res.scene
    u = sc.units
    fs = 6.4
    with F.style_context():
        fig = Figure(figsize=PAGE, facecolor=S.BACKGROUND)
        p = _Page(fig)
        x0, W = MARGIN, PAGE[0] - 2 * MARGIN
        chars = "; ".join(f"{fid}: position ({res.fasteners[fid].fastener.kind} fastener)" for fid in fids)
        tols = "; ".join(f"{fid}: ⌀{u.fmt(res.fasteners[fid].position_tolerance.value)} (M)" for fid in fids)
        y = _head(p, res, "FASTENER TOLERANCES", "position tolerance of clearance and threaded holes", chars, tols,
                  page_no, pages)
        y += 0.12
        block_h = min(3.6, (PAGE[1] - 0.6 - y) / max(len(fids), 2))
        tw = 4.35  # table width; the schematic takes the rest
        for fid in fids:
            fa = res.fasteners[fid].fastener
            p.text(x0, y, f"Fastener '{fid}' ({fa.kind})", fontsize=8.5, weight="bold")
            yy = y + 0.18
            for q, v in fastener_rows(res, fid):
                lines = _wrap(v, tw - 1.0, fs, "   ")
                p.text(x0, yy, q, fontsize=fs, weight="bold", color=GREY)
                p.text(x0 + 1.0, yy, "\n".join(lines), fontsize=fs, linespacing=1.2)
                yy += 0.108 * len(lines) + 0.02
            yy += 0.04
            body = []
            for para in fastener_words(res, fid):
                body += _wrap(para, tw, fs)
            p.text(x0, yy, "\n".join(body), fontsize=fs, linespacing=1.2, style="italic")
            ax = fig.add_axes(p.rect(x0 + tw + 0.1, y + 0.05, W - tw - 0.1, block_h - 0.35))
            draw_fastener(ax, res, fid, fs=fs)
            cap = "section, to scale; values true" + ("" if fa.kind == "fixed" else
                                                      "; thicknesses, head, nut schematic")
            if files and fid in files:
                cap += f" ({files[fid]})"
            p.text(x0 + tw + 0.1, y + block_h - 0.27, "\n".join(_wrap(cap, W - tw - 0.1, fs * 0.85)),
                   fontsize=fs * 0.85, color=GREY)
            p.line(x0, y + block_h - 0.06, x0 + W, y + block_h - 0.06, lw=0.4, color=S.PART)
            y += block_h
        p.line(x0, PAGE[1] - 0.44, x0 + W, PAGE[1] - 0.44, lw=0.5)
        p.text(x0, PAGE[1] - 0.41, "\n".join(textwrap.wrap("CAUTION: " + CAUTION, 160)), fontsize=6.2,
               style="italic", gid="caution")
    return fig
