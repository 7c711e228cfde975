"""Drawing aids shared by the 2D views: the matplotlib style (fonts, sizes, colours of the
opening), new figures and equal-aspect limits, shapely polygons as paths, narrow-width
dimensions, callout texts spread in a column beside the drawing, the title and the footer, and
the dimension text of a clearance. Nothing here knows a tolerance rule.
"""

from __future__ import annotations

import contextlib
import textwrap

import matplotlib
import numpy as np
from matplotlib.figure import Figure
from matplotlib.path import Path as MplPath

from geom.analysis import line_to_line
from viewer import style as S

# ------------------------------------------------------------------------------------ style

FONT_FAMILY = ["DejaVu Sans", "STIXGeneral"]  # STIX carries the GD&T symbols DejaVu lacks
RC_PARAMS = {
    "font.family": FONT_FAMILY,
    "font.size": 9.0,
    "pdf.fonttype": 3,  # text stays text (searchable, extractable) in the PDF; subsets fast
    "svg.fonttype": "none",
    "axes.edgecolor": S.TEXT,
    "axes.labelcolor": S.TEXT,
    "xtick.color": S.TEXT,
    "ytick.color": S.TEXT,
    "text.color": S.TEXT,
    "hatch.linewidth": 0.6,
    "savefig.facecolor": S.BACKGROUND,
    "axes.formatter.useoffset": False,
}
FIGSIZE = (8.0, 6.0)  # inches; at DPI this is 1600 x 1200 pixels
DPI = 200
HOLE_LINE = S.SURFACE  # hole walls / sections
OPENING_FILL = "#DCE8F5"  # light tint of SURFACE: the clear opening (luminance ~0.8)


@contextlib.contextmanager
def style_context():
    """matplotlib settings for building and saving matezone figures (fonts, TrueType in PDF)."""
    with matplotlib.rc_context(RC_PARAMS):
        yield


# ------------------------------------------------------------------------- figure and axes


def _new_figure(fig, rect, figsize):
    """The axes to draw in: a new figure of our own (``own``) or a slot ``rect`` of ``fig``."""
    own = fig is None
    if own:
        fig = Figure(figsize=figsize, dpi=DPI, facecolor=S.BACKGROUND)
        rect = rect or (0.03, 0.09, 0.94, 0.80)
    ax = fig.add_axes(rect)
    ax.set_facecolor(S.BACKGROUND)
    return fig, ax, own


def _fit_limits(ax, x0, x1, y0, y1, anchor=(0.5, 0.5)):
    """Set equal-aspect limits covering the box, grown to the axes' own shape (nothing clipped)."""
    fig = ax.figure
    pos = ax.get_position(original=True)
    w_in, h_in = pos.width * fig.get_figwidth(), pos.height * fig.get_figheight()
    dx, dy = x1 - x0, y1 - y0
    if dx / dy < w_in / h_in:
        grow = dy * w_in / h_in - dx
        x0, x1 = x0 - grow * anchor[0], x1 + grow * (1 - anchor[0])
    else:
        grow = dx * h_in / w_in - dy
        y0, y1 = y0 - grow * anchor[1], y1 + grow * (1 - anchor[1])
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)


def _box_ratio(ax) -> float:
    """Width over height of the axes on the page."""
    pos = ax.get_position(original=True)
    return (pos.width * ax.figure.get_figwidth()) / (pos.height * ax.figure.get_figheight())


def _clean_axes(ax):
    """A drawing, not a plot: equal aspect, no frame, no ticks."""
    ax.set_aspect("equal", adjustable="box")
    for sp in ax.spines.values():
        sp.set_visible(False)
    ax.set_xticks([])
    ax.set_yticks([])


def _poly_path(geom) -> MplPath | None:
    """matplotlib Path of a shapely (Multi)Polygon, holes included."""
    polys = getattr(geom, "geoms", [geom])
    verts, codes = [], []
    for p in polys:
        if p.is_empty or p.geom_type != "Polygon":
            continue
        for ring in (p.exterior, *p.interiors):
            xy = np.asarray(ring.coords)
            verts.append(xy)
            codes.append(np.r_[MplPath.MOVETO, np.full(len(xy) - 2, MplPath.LINETO), MplPath.CLOSEPOLY])
    if not verts:
        return None
    return MplPath(np.vstack(verts), np.concatenate(codes))


def _narrow_dim(ax, x0, x1, y, color, lw=0.9, gid=None):
    """Dimension of a narrow width: arrows outside pointing in at the extension lines."""
    a = max(abs(x1 - x0) * 0.9, 1e-12)
    for xa, xb in ((x0 - a, x0), (x1 + a, x1)):
        ax.annotate("", xy=(xb, y), xytext=(xa, y), arrowprops=dict(arrowstyle="-|>", color=color, lw=lw, shrinkA=0,
                                                                    shrinkB=0, mutation_scale=7), gid=gid)
    ax.plot([x0, x1], [y, y], color=color, lw=lw)
    return x1 + a


# ------------------------------------------------------------------------------ texts placed


def _spread_y(targets: list[float], lo: float, hi: float, min_gap: float) -> list[float]:
    """Text heights near the targets, in their order, at least ``min_gap`` apart, inside
    [lo, hi] when they fit (else running above ``hi``).

    >>> _spread_y([0.5, 0.5, 0.125], 0.0, 1.0, 0.25)  # the second 0.5 moves up
    [0.5, 0.75, 0.125]
    >>> _spread_y([0.875, 1.0], 0.0, 1.0, 0.25)  # no room above: the lower one moves down
    [0.75, 1.0]
    """
    if not targets:
        return []
    order = np.argsort(targets)
    ys = [min(max(float(t), lo), hi) for t in np.asarray(targets, dtype=float)[order]]
    for i in range(1, len(ys)):
        ys[i] = max(ys[i], ys[i - 1] + min_gap)
    for i in range(len(ys) - 1, -1, -1):
        cap = hi if i == len(ys) - 1 else ys[i + 1] - min_gap
        ys[i] = min(ys[i], cap)
    if ys[0] < lo:
        ys[0] = lo
        for i in range(1, len(ys)):
            ys[i] = max(ys[i], ys[i - 1] + min_gap)
    out = [0.0] * len(ys)
    for j, i in enumerate(order):
        out[i] = ys[j]
    return out


def _renderer(fig):
    """A renderer to measure the figure's artists with (the figure's Agg canvas, made if needed)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    canvas = fig.canvas if isinstance(fig.canvas, FigureCanvasAgg) else FigureCanvasAgg(fig)
    return canvas.get_renderer()


def _legend_top(ax, leg) -> float:
    """Top of a legend in axes fraction (the legend is measured with a renderer)."""
    bb = leg.get_window_extent(_renderer(ax.figure))
    return float(ax.transAxes.inverted().transform((bb.x1, bb.y1))[1])


def _slot(ax):
    """The axes' slot as it was given (figure fraction), before :func:`_legend_beside` narrowed it."""
    return getattr(ax, "_matezone_slot", None) or ax.get_position(original=True)


LEGEND_SHARE = 0.36  # of its slot's width a legend beside the drawing takes before its labels wrap
LEGEND_WRAP = 30  # characters a line of a wrapped legend label


def _legend_beside(ax, handles, fs: float, gap_pt: float = 5.0, **kw):
    """The legend outside the drawing: right of the axes, level with their foot, inside the
    axes' slot; the axes are narrowed by the legend's width (so call it before the limits are
    fitted to the axes' shape). A legend taller than the slot is drawn smaller (down to 0.7 of
    ``fs``). Returns the legend."""
    fig = ax.figure
    pos = _slot(ax)
    ax._matezone_slot = pos
    r = _renderer(fig)
    wpx, hpx = fig.get_figwidth() * fig.dpi, fig.get_figheight() * fig.dpi
    labels = [h.get_label() for h in handles]
    size, wrap = fs, None
    while True:
        shown = labels if wrap is None else ["\n".join(textwrap.wrap(t, wrap)) for t in labels]
        leg = ax.legend(handles=handles, labels=shown, loc="lower left", bbox_to_anchor=(1.0, 0.0), fontsize=size,
                        borderaxespad=0.0, **kw)
        bb = leg.get_window_extent(r)
        if wrap is None and bb.width > LEGEND_SHARE * pos.width * wpx:
            wrap = LEGEND_WRAP  # a wide legend takes the drawing's room: its long labels on two lines
            continue
        if bb.height <= pos.height * hpx or size <= fs * 0.7:
            break
        size *= 0.9
    gap = gap_pt / 72.0 * fig.dpi / wpx
    width = max(pos.width - bb.width / wpx - gap, 0.3 * pos.width)
    ax.set_position([pos.x0, pos.y0, width, pos.height])
    leg.set_bbox_to_anchor((1.0 + gap / width, 0.0), transform=ax.transAxes)
    return leg


def _keep_inside(ax, skip=("footer",), pad_pt: float = 1.0) -> None:
    """Move every text of the axes (callouts, notes; not the ``skip`` gids) that reaches past the
    axes' edges back inside them (an annotation's arrow follows its text); a text wider or taller
    than the axes is drawn smaller until it fits."""
    r = _renderer(ax.figure)
    pad = pad_pt / 72.0 * ax.figure.dpi
    for t in list(ax.texts):
        if t.get_gid() in skip or not t.get_visible() or not t.get_text():
            continue
        for _ in range(6):
            box, bb = ax.get_window_extent(r), t.get_window_extent(r)
            if bb.width <= box.width - 2 * pad and bb.height <= box.height - 2 * pad:
                break
            t.set_fontsize(t.get_fontsize() * 0.9)
        box, bb = ax.get_window_extent(r), t.get_window_extent(r)
        dx = max(0.0, box.x0 + pad - bb.x0) - max(0.0, bb.x1 - (box.x1 - pad))
        dy = max(0.0, box.y0 + pad - bb.y0) - max(0.0, bb.y1 - (box.y1 - pad))
        if dx or dy:
            _shift_text(ax, t, dx, dy)


def _shift_text(ax, t, dx: float, dy: float) -> None:
    """Move a text (or an annotation's text) by (dx, dy) display pixels."""
    from matplotlib.text import Annotation

    if isinstance(t, Annotation):
        coords = t.anncoords
        x, y = t.xyann
        if coords == "offset points":
            k = 72.0 / ax.figure.dpi
            t.xyann = (x + dx * k, y + dy * k)
            return
        if coords == "offset pixels":
            t.xyann = (x + dx, y + dy)
            return
        tr = {"axes fraction": ax.transAxes, "data": ax.transData, "figure fraction": ax.figure.transFigure}[coords]
        px = tr.transform((x, y))
        t.xyann = tuple(tr.inverted().transform((px[0] + dx, px[1] + dy)))
        return
    tr = t.get_transform()
    px = tr.transform(t.get_position())
    t.set_position(tuple(tr.inverted().transform((px[0] + dx, px[1] + dy))))


def _column(ax, calls, xfrac, lo, hi, fs, ha="left", gap=None):
    """Callout texts in a column at axes fraction ``xfrac``, near their targets' heights.

    ``calls``: (target xy in data, text, colour, emphasised, gid); an emphasised text in the
    interference colour is boxed."""
    if not calls:
        return
    to_frac = ax.transLimits  # data -> axes fraction (limits already set to the box's shape)
    targets = [float(to_frac.transform(c[0])[1]) for c in calls]
    lines = max(t[1].count("\n") + 1 for t in calls)
    pos = ax.get_position(original=True)
    h_pt = pos.height * ax.figure.get_figheight() * 72.0
    gap = gap or (lines * fs * 1.25 + 6.0) / h_pt
    ys = _spread_y(targets, lo, hi, gap)
    for (xy, txt, col, strong, gid), y in zip(calls, ys):
        boxed = strong and col == S.INTERFERENCE
        ax.annotate(
            txt, xy=xy, xycoords="data", xytext=(xfrac, y), textcoords="axes fraction", fontsize=fs,
            color=col, weight="bold" if strong else "normal", ha=ha, va="center", gid=gid, zorder=12,
            arrowprops=dict(arrowstyle="-|>", color=col, lw=0.7, shrinkA=2, shrinkB=1, mutation_scale=7),
            bbox=(dict(boxstyle="round,pad=0.3", fc=S.BACKGROUND, ec=col, lw=1.3) if boxed else
                  dict(boxstyle="round,pad=0.12", fc=S.BACKGROUND, ec="none", alpha=0.9)),
        )


def _footer(fig, ax, own, text_lines, fs):
    """Exaggeration / assumption lines under the drawing."""
    if own:
        fig.text(0.03, 0.025, "\n".join(text_lines), fontsize=fs * 0.85, color=S.TEXT, va="bottom", ha="left",
                 gid="footer")
    else:
        w_pt = _slot(ax).width * fig.get_figwidth() * 72.0
        chars = max(30, int(w_pt / (fs * 0.85 * 0.52)))
        lines = [w for ln in text_lines for w in textwrap.wrap(ln, chars)]
        ax.text(0.0, -0.01, "\n".join(lines), transform=ax.transAxes, fontsize=fs * 0.85, va="top",
                ha="left", color=S.TEXT, gid="footer")


def _title(fig, ax, own, text, fs):
    """Standalone: bold first line, the subject below it. On a report page: the first line only."""
    head, _, rest = text.partition("\n")
    if own:
        fig.text(0.03, 0.975, head, fontsize=fs * 1.3, weight="bold", va="top", ha="left", gid="title")
        if rest:
            fig.text(0.03, 0.935, rest, fontsize=fs * 1.05, va="top", ha="left", gid="subtitle")
    else:
        ax.set_title(head, fontsize=fs * 1.05, weight="bold", loc="left", pad=2)


# ---------------------------------------------------------------------- clearance texts


def _half(units, clearance: float) -> str:
    """The per-side (half) value of a diametral clearance as it is shown, with the digits it
    needs (``Units.fmt`` extends them: half of 0.025 prints 0.0125), so that twice it reads as
    the diametral value.

    >>> from geom.model import Units
    >>> _half(Units.MM, 0.025), _half(Units.MM, -0.030)
    ('0.0125', '0.015')
    """
    return units.fmt(abs(float(units.fmt(clearance))) / 2.0)


GUARANTEED = "guaranteed clearance (through-view)"
"""The name of the clearance every part in these states is sure of (the banner's number)."""


def _gap_text(u, clearance: float, interferes: bool, consequence: str, line_to_line_text: str,
              name: str = GUARANTEED) -> str:
    """The dimension text of a diametral clearance or overlap (true value, and per side),
    named ``name``.

    >>> from geom.model import Units
    >>> print(_gap_text(Units.MM, -0.030, True, "no fit", "l-t-l"))
    OVERLAP 0.030 on ⌀
    (0.015 per side):
    no fit
    """
    per, dia = _half(u, clearance), u.fmt(abs(clearance))
    if interferes:
        return f"OVERLAP {dia} on ⌀\n({per} per side):\n{consequence}"
    if line_to_line(clearance):
        return line_to_line_text
    head = name.replace(" (", "\n(")  # "guaranteed clearance\n(through-view)": a narrow callout
    return f"{head}\n{dia} on ⌀\n({per} per side)"


def _scale_bar(ax, ex, units, fs: float, height: float = 0.03):
    """A short bar in the lower left corner of the axes, drawn at the picture's k and labelled
    with its TRUE length (:func:`viewer.exaggeration.bar_length`, at most a quarter of the
    drawn radius), ``height`` up the axes: a reader measures a drawn gap against it."""
    from viewer.exaggeration import bar_length

    (x0, x1), (y0, y1) = ax.get_xlim(), ax.get_ylim()
    true = bar_length(ex.k, 0.25 * ex.r_disp)
    length, h = ex.k * true, 0.012 * (y1 - y0)
    bx, by = x0 + 0.02 * (x1 - x0), y0 + height * (y1 - y0)
    xs = [bx, bx + length, np.nan, bx, bx, np.nan, bx + length, bx + length]
    ys = [by, by, np.nan, by - h, by + h, np.nan, by - h, by + h]
    ax.plot(xs, ys, color=S.TEXT, lw=1.6, solid_capstyle="butt", zorder=9, gid="scale-bar")
    ax.text(bx, by + 1.6 * h, f"{units.fmt(true)} {units.value} true", fontsize=fs * 0.8, color=S.TEXT,
            va="bottom", ha="left", zorder=9, gid="scale-bar-text")
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    return true
