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
import math
import re
import textwrap
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

import numpy as np
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from geom.analysis import SceneResult, clearance_at, mate_verdict, result_to_json, term
from geom.boundaries import FeatureState, effective_size, tolerance_allowed
from geom.model import Kind
from geom.readout import CAUTION, STANDARD_NAME, feature_heading, feature_rows, mate_lines
from geom.scenefile import REPORT_KEYS
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
        ht, pt = sub.hole.tolerance, sub.pin.tolerance
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
               if m.clearance_min < m.clearance_min_size - 1e-12 and not m.assembles else
               "are reduced by the geometric tolerances to the worst-case value above.")
        )
        if not is_worst_case(res, item, states):
            hs, ps = states[sub.hole.id], states[sub.pin.id]
            c = clearance_at(sub.hole, sub.pin, hs, ps)
            verdict = "the pin overlaps the hole by" if c < -1e-9 else "clearance"
            out.append(
                f"What-if pictures: hole '{sub.hole.id}' at {u.fmt(hs.size)} (tolerance allowed "
                f"{u.fmt(tolerance_allowed(sub.hole, hs.size))}), pin '{sub.pin.id}' at {u.fmt(ps.size)} "
                f"(tolerance allowed {u.fmt(tolerance_allowed(sub.pin, ps.size))}), all of it used: "
                f"{verdict} {u.fmt(abs(c))} {uv} at these sizes."
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
            out.append(f"Virtual condition: {r.virtual_condition.formula(u, std)} {uv}.")
        if not is_worst_case(res, item, states):
            st = states[f.id]
            out.append(f"What-if pictures: at {u.fmt(st.size)} the tolerance allowed is "
                       f"{u.fmt(tolerance_allowed(f, st.size))} and the mating-side boundary "
                       f"{u.fmt(effective_size(f, st))} {uv}.")
        out += [f"Note: {n}" for n in r.notes]
    return out


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


def build_page(res: SceneResult, item: Item, states, image3d: np.ndarray | None, page_no: int, pages: int,
               view: str = "iso") -> Figure:
    """One evidence page (A4 portrait) for a mate or a lone feature."""
    sc = res.scene
    u, std = sc.units, sc.standard
    rep = dict(sc.report)
    sub = item.subject
    with F.style_context():
        fig = Figure(figsize=PAGE, facecolor=S.BACKGROUND)
        p = _Page(fig)
        x0, W = MARGIN, PAGE[0] - 2 * MARGIN
        # ---------------------------------------------------------------- header
        p.text(x0, 0.34, "FIT EVIDENCE", fontsize=13, weight="bold")
        p.text(x0 + 1.45, 0.37, "worst-case mating of toleranced holes and pins", fontsize=8.5)
        p.text(x0 + W, 0.34, f"report no. {rep.get('report_number') or '—'}", fontsize=9, ha="right", weight="bold")
        p.text(x0 + W, 0.55, f"page {page_no} of {pages}", fontsize=7.5, ha="right")
        p.text(x0, 0.58, sc.title + (f"   ({Path(sc.source).name})" if sc.source else ""), fontsize=8.5)
        # ---------------------------------------------------------------- title block
        y, h = 0.82, 0.32
        char, tol = _requirement_parts(item, u)
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
                p.text(sx, sy, "Bonus: tolerance allowed vs produced size", fontsize=fs2 * 1.2, weight="bold")
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
            shown = formula if first in abbr else f"{qty}: {formula}"
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
    from viewer import scene3d

    visible = set(scene3d.LAYERS) - set(scene3d.HIDDEN_BY_DEFAULT) - {"readouts", "legend"}
    img = scene3d.render_image(scene3d_obj, None, view=view, size=(1600, 1200), visible=visible)
    return crop_to_content(img)


# ------------------------------------------------------------------------------------ writing


Progress = Callable[[str], None]


def write_report(res: SceneResult, out_dir, sizes: dict[str, float] | None = None, view: str = "iso",
                 progress: Progress | None = None) -> list[Path]:
    """Write every file of the report into ``out_dir``; returns the paths written.

    ``sizes``: produced sizes (feature id -> size) for the what-if pictures; the rest stays at the
    worst case. ``view``: camera of the 3D picture (one of viewer.scene3d.VIEWS).
    """
    from viewer import scene3d

    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    items = report_items(res)
    steps = len(items) * (1 + len(VIEW_FILES)) + 2
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
        scene3d.render_image(s3, png, view=view, size=(1600, 1200))
        images3d[item.file_key] = page_image_3d(s3, view)
        written.append(png)
        say(f"{item.label}: 3D view", [png])
        for name in VIEW_FILES:
            fig, _ = F.draw_view(name, res, item.ref, states)
            paths = [out / f"{item.file_key}_{name}.{ext}" for ext in ("png", *VECTOR_FORMATS)]
            for q in paths:
                F.save_figure(fig, q)
            written += paths
            say(f"{item.label}: {name} view", paths)
    pdf = out / "report.pdf"
    rep = dict(res.scene.report)
    with F.style_context():
        with PdfPages(pdf, metadata={"Title": f"Fit evidence: {res.scene.title}",
                                     "Subject": rep.get("report_number", ""),
                                     "Creator": "matezone report"}) as pp:
            for i, item in enumerate(items, 1):
                fig = build_page(res, item, page_states[item.file_key], images3d[item.file_key], i, len(items), view)
                pp.savefig(fig)
    written.append(pdf)
    say(f"report ({len(items)} page{'s' if len(items) != 1 else ''})", [pdf])
    js = out / "results.json"
    data = result_to_json(res)
    data["caution"] = CAUTION
    js.write_text(json.dumps(data, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
    written.append(js)
    say("numbers", [js])
    return written
