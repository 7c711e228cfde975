"""Page primitives shared by every PDF page of the report: the A4 sheet measured in inches from
the top-left corner (:class:`_Page`, and :class:`_DryPage` that only measures), the one way a
page starts (:func:`evidence_page`: header, title block, and the caution footer when the page is
done), text wrapping, the two table layouts, titled paragraphs, the disposition and signature
block, and fitting a 3D render to its slot (:func:`crop_to_content`).

>>> _wrap("one two three four", 0.5, 6.0)
['one two', 'three four']
>>> upper_first("bonus: tolerance allowed")
'Bonus: tolerance allowed'
"""

from __future__ import annotations

import textwrap
from contextlib import contextmanager

import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from geom.analysis import SceneResult
from geom.readout import CAUTION
from viewer import figures as F
from viewer import style as S

PAGE = (8.27, 11.69)  # A4 portrait, inches
MARGIN = 0.4
CONTENT_W = PAGE[0] - 2 * MARGIN  # width between the margins
DISPOSITIONS = ("use-as-is", "rework", "repair", "scrap", "return to supplier")
TITLE_ROW_H = 0.3  # inches, one row of the title block
GREY = "#5A5F66"  # small labels in the title block (luminance ~0.11)
SHADE = "#EEF0F2"  # every other table row


def upper_first(text: str) -> str:
    """``text`` with its first letter upper-case and the rest as it was (unlike ``str.capitalize``)."""
    return text[0].upper() + text[1:]


def _wrap(text: str, width_in: float, fs: float, indent: str = "") -> list[str]:
    """Lines of ``text`` that fit ``width_in`` inches at font size ``fs`` (an average glyph width)."""
    return textwrap.wrap(text, max(6, int(width_in * 72 / (fs * 0.55))), subsequent_indent=indent)


def requirement_of(f, units) -> tuple[str, str]:
    """(characteristic, tolerance) of one feature as the title block states them."""
    t = f.tolerance
    if t is None:
        return "size only", "none"
    return t.characteristic.value + (" (projected)" if t.projected else ""), t.symbol(units)


# ------------------------------------------------------------------------------------ the sheet


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
            lines = _wrap(str(value), w, fs)[:2]
            self.text(x + 0.04, y + 0.13, "\n".join(lines), fontsize=fs if len(lines) == 1 else fs * 0.85,
                      linespacing=1.05)


class _DryPage(_Page):
    """Measures a layout: the same calls as :class:`_Page`, nothing drawn."""

    def text(self, *a, **kw):
        return None

    def box(self, *a, **kw):
        return None

    def line(self, *a, **kw):
        return None


# ------------------------------------------------------------------------ start and end of a page


def title_block_rows(rep: dict, char: str, tol: str, units_standard: str) -> list[list[tuple]]:
    """The title block's rows of (label, value, width in inches or None for the rest of the row).

    Identity, lot and counts, requirement and characteristic rows are always there (blank boxes
    to fill by hand when the scene leaves them out); the method/equipment row and the
    disposition/containment row appear when any of their fields is given; remarks last."""
    g = rep.get
    rows = [
        [("report number", g("report_number"), 1.3), ("drawing number", g("drawing"), 1.3),
         ("sheet", g("sheet"), 0.5), ("revision", g("revision"), 0.55), ("part number", g("part"), 1.35),
         ("part name", g("part_name"), None)],
        [("customer", g("customer"), 1.8), ("order", g("order"), 1.3), ("supplier", g("supplier"), 1.6),
         ("lot", g("lot"), 1.1), ("serial", g("serial"), None)],
        [("quantity", g("quantity"), 0.85), ("inspected", g("quantity_inspected"), 0.8),
         ("rejected", g("quantity_rejected"), 0.75), ("date", g("date"), 1.0), ("inspector", g("inspector"), 1.6),
         ("prepared by", g("prepared_by"), None)],
        [("requirement (as stated)", g("requirement"), 4.6), ("drawing zone", g("drawing_zone"), 0.9),
         ("units / standard", units_standard, None)],
        [("characteristic", char, 2.45), ("tolerance (feature control frame)", tol, 2.6),
         ("how it was found", g("found_by"), None)],
    ]
    if any(g(k) for k in ("method", "equipment", "calibration")):
        rows.append([("inspection method", g("method"), 2.45), ("equipment", g("equipment"), 2.6),
                     ("calibration reference", g("calibration"), None)])
    if any(g(k) for k in ("disposition_by", "containment", "corrective_action")):
        rows.append([("disposition authority", g("disposition_by"), 2.0), ("containment", g("containment"), 3.05),
                     ("corrective action ref.", g("corrective_action"), None)])
    rows.append([("remarks", g("remarks"), None)])
    return rows


def _head(p: _Page, res: SceneResult, title: str, subtitle: str, char: str, tol: str, page_no: int,
          pages: int) -> float:
    """Page header and the title block (from the scene's ``[report]`` table); returns the y below it."""
    sc = res.scene
    u, std = sc.units, sc.standard
    rep = dict(sc.report)
    x0, W = MARGIN, CONTENT_W
    # ---------------------------------------------------------------- header
    p.text(x0, 0.34, title, fontsize=13, weight="bold")
    xs = x0 + (1.45 if len(title) <= 12 else 0.135 * len(title) + 0.1)
    room = x0 + W - 1.75 - xs  # the report number sits at the right
    p.text(xs, 0.37, subtitle, fontsize=min(8.5, max(6.0, room * 72 / (0.53 * max(len(subtitle), 1)))))
    p.text(x0 + W, 0.34, f"report no. {rep.get('report_number') or '—'}", fontsize=9, ha="right", weight="bold")
    p.text(x0 + W, 0.55, f"page {page_no} of {pages}", fontsize=7.5, ha="right")
    p.text(x0, 0.58, sc.title, fontsize=8.5)  # the scene's own title; its file name is not evidence
    # ---------------------------------------------------------------- title block
    y, h = 0.82, TITLE_ROW_H
    rows = title_block_rows(rep, char, tol, f"{u.value} / {std.value.upper()}")
    for row in rows:
        x = x0
        for label, value, w in row:
            w = (x0 + W - x) if w is None else w
            p.field(x, y, w, h, label, value)
            x += w
        y += h
    p.box(x0, 0.82, W, y - 0.82, lw=1.2)
    return y


def _caution(p: _Page) -> None:
    """The caution at the foot of the page (geom.readout.CAUTION), above a rule."""
    p.line(MARGIN, PAGE[1] - 0.44, MARGIN + CONTENT_W, PAGE[1] - 0.44, lw=0.5)
    p.text(MARGIN, PAGE[1] - 0.41, "\n".join(textwrap.wrap("CAUTION: " + CAUTION, 160)), fontsize=6.2,
           style="italic", gid="caution")


@contextmanager
def evidence_page(res: SceneResult, title: str, subtitle: str, char: str, tol: str, page_no: int, pages: int):
    """A new A4 evidence page in matezone's figure style: yields ``(page, y)``, the header and title
    block drawn and ``y`` the height below them; when the ``with`` block ends the caution is drawn
    at the foot, so no page goes out without it. The figure is ``page.fig``."""
    with F.style_context():
        p = _Page(Figure(figsize=PAGE, facecolor=S.BACKGROUND))
        y = _head(p, res, title, subtitle, char, tol, page_no, pages)
        yield p, y
        _caution(p)


def _disposition(p: _Page, x0: float, y: float, W: float) -> None:
    """The disposition to tick and the three signature lines."""
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


# ------------------------------------------------------------------------------ tables and text


def _cell_colour(colours, r: int, c: int) -> str:
    """A cell's colour: the one given, else grey for the heading row and text colour below."""
    return colours[r][c] if colours and colours[r] and colours[r][c] else (GREY if r == 0 else S.TEXT)


def _table(p: _Page, x: float, y: float, widths, rows, fs: float, head_fs: float | None = None,
           aligns=None, colours=None, shade: bool = True, rowh: float | None = None) -> float:
    """A small table of one-line cells: the first row is the heading; returns the y below it."""
    rowh = rowh or fs * 0.0185
    aligns = aligns or ["left"] + ["right"] * (len(widths) - 1)
    total = sum(widths)
    for r, row in enumerate(rows):
        if r and shade and r % 2 == 1:
            p.box(x, y - 0.012, total, rowh, lw=0, fill=True, fc=SHADE, ec="none")
        xx = x
        for c, (w, cell) in enumerate(zip(widths, row)):
            col = _cell_colour(colours, r, c)
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
            p.box(x, y - 0.012, total, lh * n + 0.02, lw=0, fill=True, fc=SHADE, ec="none")
        xx = x
        for c, (w, lines) in enumerate(zip(widths, cells)):
            kw = dict(weight="bold") if (r == 0 or c in bold) else {}
            p.text(xx + 0.03, y, "\n".join(lines), fontsize=fs, color=_cell_colour(colours, r, c), linespacing=1.15,
                   **kw)
            xx += w
        if r == 0:
            p.line(x, y + lh * n, x + total, y + lh * n, lw=0.5)
        y += lh * n + 0.03
    return y


def _paragraphs(p: _Page, x0: float, y: float, W: float, fs: float, title: str, paras, gid: str) -> float:
    """A bold title and wrapped paragraphs below it (nothing when there are none); returns the y below."""
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


# ------------------------------------------------------------------------------------ 3D images

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
