"""The picture of a statistical fit (:func:`geom.yieldmc.run_yield`): the clearance histogram
as geom counted it (its bins, not re-binned), the line at zero clearance and the line at the
worst-case clearance, the interference side shaded in the interference colour, P(interference)
with its interval in the title, and beside it the percent contribution of each input.

Pure: a :class:`geom.yieldstats.YieldResult` in, a :class:`matplotlib.figure.Figure` out; the
artists carry ``gid`` labels ("bins", "zero", "worst-case", "interference", "contributions") so
tests read them back.
"""

from __future__ import annotations

import numpy as np
from matplotlib.figure import Figure

from geom.model import Units
from viewer import style as S

from .aids import DPI, FIGSIZE, style_context


def p_words(r) -> str:
    """P(interference) and its interval, in words (the figure's and the page's)."""
    lo, hi = r.p_ci
    return (f"P(interference) = {r.failures} / {r.samples} = {r.p_interference:.4g}; "
            f"{100 * r.confidence:g} % interval {lo:.4g} .. {hi:.4g}")


def draw_histogram(ax, r, units: Units, fs: float = 8.0) -> None:
    """The clearance histogram of ``r`` on ``ax`` with its zero and worst-case lines."""
    u = units
    counts = np.asarray(r.hist_counts)
    edges = np.asarray(r.hist_edges, float)
    widths = np.diff(edges)
    ax.bar(edges[:-1], counts, width=widths, align="edge", color=S.SURFACE, ec=S.BACKGROUND, lw=0.3, gid="bins")
    lo_x = min(float(edges[0]), 0.0, float(r.worst_case))
    hi_x = max(float(edges[-1]), 0.0, float(r.worst_case))
    pad = 0.04 * max(hi_x - lo_x, 1e-12)
    ax.set_xlim(lo_x - pad, hi_x + pad)
    top = max(int(counts.max()) if counts.size else 1, 1)
    ax.set_ylim(0, top * 1.22)
    # the interference side: clearance below zero
    ax.axvspan(lo_x - pad, 0.0, color=S.INTERFERENCE, alpha=0.12, lw=0, gid="interference")
    wc_txt, z_txt = u.fmt_cmp(float(r.worst_case), 0.0)
    ax.axvline(0.0, color=S.INTERFERENCE, lw=1.2, gid="zero")
    ax.axvline(float(r.worst_case), color=S.VC, lw=1.2, ls="--", gid="worst-case")
    ax.text(0.0, top * 1.17, f" zero clearance {z_txt}", color=S.INTERFERENCE, fontsize=fs * 0.85, va="top",
            ha="left")
    ax.text(float(r.worst_case), top * 1.08, f" worst case {wc_txt}", color=S.VC, fontsize=fs * 0.85, va="top",
            ha="left")
    ax.set_xlabel(f"clearance per assembly ({u.value})", fontsize=fs)
    ax.set_ylabel(f"assemblies (of {r.samples})", fontsize=fs)
    ax.tick_params(labelsize=fs * 0.8)
    ax.set_title(p_words(r), fontsize=fs, loc="left", pad=3)


def draw_contributions(ax, r, fs: float = 8.0) -> None:
    """The percent contribution of each input to the clearance's variance, a horizontal bar each."""
    items = sorted(r.contributions, key=lambda kv: kv[1])
    names = [k for k, _ in items]
    vals = [float(v) for _, v in items]
    ax.barh(range(len(vals)), vals, color=S.ZONE, height=0.6, gid="contributions")
    ax.set_yticks(range(len(vals)))
    ax.set_yticklabels(names, fontsize=fs * 0.8)
    ax.set_xlim(0, 100)
    for i, v in enumerate(vals):
        ax.text(min(v + 2, 70), i, f"{v:.1f} %", va="center", fontsize=fs * 0.75)
    ax.set_xlabel("share of variance (%)", fontsize=fs * 0.85)
    ax.tick_params(axis="x", labelsize=fs * 0.75)
    ax.set_title("what drives it", fontsize=fs, loc="left", pad=3)


def yield_figure(r, units: Units, figsize=FIGSIZE, fs: float = 8.0, note: str | None = None) -> Figure:
    """The statistical fit's picture: the histogram (left, wide) and the contributions (right);
    ``note`` a line printed under it (the window says what a what-if move does not change)."""
    with style_context():
        fig = Figure(figsize=figsize, dpi=DPI, facecolor=S.BACKGROUND)
        fig.text(0.02, 0.975, f"How many fail: {r.kind} {r.index + 1}, {r.label}", fontsize=fs * 1.25,
                 weight="bold", va="top", gid="title")
        ax = fig.add_axes((0.08, 0.16, 0.56, 0.70))
        draw_histogram(ax, r, units, fs)
        bx = fig.add_axes((0.80, 0.16, 0.17, 0.70))
        draw_contributions(bx, r, fs)
        foot = f"{r.samples} simulated assemblies, seed {r.seed} (the same seed gives the same numbers)"
        if note:
            foot += "\n" + note
        fig.text(0.02, 0.015, foot, fontsize=fs * 0.8, va="bottom", gid="footer")
    return fig
