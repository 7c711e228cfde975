"""The bonus chart: tolerance allowed against produced size across the limits (top), and below
it the produced size with the two boundaries it gives, so a constant virtual condition shows as
a flat line; one column per feature. ISO scenes say "increase" and MMVS / LMVS
(:func:`geom.analysis.term`).
"""

from __future__ import annotations

from dataclasses import dataclass

import matplotlib
import matplotlib.ticker
import numpy as np
from matplotlib.figure import Figure

from geom.analysis import SceneResult, term
from geom.boundaries import tolerance_allowed, virtual_condition
from geom.model import Feature, Kind, Standard
from viewer import style as S

from .aids import DPI, FIGSIZE, _keep_inside, _spread_y, _title, style_context
from .subjects import Measured, Subject, _subject, measured_of, resolve_states


@dataclass(frozen=True)
class BonusPanel:
    feature_id: str
    material: str  # "MMC" | "LMC" | "RFS" | "none"
    sizes: np.ndarray  # produced sizes, ascending, limits included
    allowed: np.ndarray  # tolerance allowed at each size
    mating: np.ndarray  # mating-side boundary: size -/+ allowed (hole / pin)
    opposite: np.ndarray  # the other side: size +/- allowed
    produced: float
    allowed_at_produced: float
    constant: float | None  # the boundary that stays constant (VC at MMC / LMC), None for RFS


@dataclass(frozen=True)
class BonusData:
    subject: Subject
    panels: tuple[BonusPanel, ...]


def bonus_data(res: SceneResult, subject, states=None, n: int = 41) -> BonusData:
    """One panel per feature of the subject: ``n`` produced sizes from limit to limit."""
    sub = _subject(res, subject)
    sts = resolve_states(res, sub, states)
    panels = []
    for f in sub.features:
        lo, hi = f.limits
        sizes = np.linspace(lo, hi, n)
        allowed = np.array([tolerance_allowed(f, float(s)) for s in sizes])
        sgn = -1.0 if f.kind is Kind.HOLE else 1.0
        mat = "none" if f.tolerance is None else f.tolerance.material.value
        st = sts[f.id]
        panels.append(BonusPanel(f.id, mat, sizes, allowed, sizes + sgn * allowed, sizes - sgn * allowed,
                                 st.size, tolerance_allowed(f, st.size), virtual_condition(f)))
    return BonusData(sub, tuple(panels))


def bonus_chart(res: SceneResult, subject, states=None, *, fig: Figure | None = None, rect=None,
                fontsize: float = 9.0, figsize=FIGSIZE, measured=None):
    """Tolerance allowed against produced size (top) and the boundaries it gives (bottom), one
    column per feature, the size axis running MMC (left) to LMC (right) as the what-if slider
    does. Returns ``(Figure, BonusData)``.

    ``measured``: an inspection result (geom.inspect.InspectionResult) or a
    :class:`~.subjects.Measured`: its feature's column marks the measured envelope size and the
    tolerance allowed at it ("measured: AME 8.003, tolerance allowed 0.018") beside the what-if
    state.

    Artists with ``gid``: "<id>-allowed" (tolerance allowed line), "<id>-size" (the produced size
    diagonal), "<id>-mating" / "<id>-opposite" (boundary lines), "<id>-produced" (marker),
    "<id>-measured" (the measured marker).
    """
    meas = measured_of(measured)
    with style_context():
        data = bonus_data(res, subject, states)
        own = fig is None
        if own:
            fig = Figure(figsize=figsize, dpi=DPI, facecolor=S.BACKGROUND)
            rect = (0.09, 0.1, 0.88, 0.76)
        n = len(data.panels)
        left, bottom_, width, height = rect
        gs = fig.add_gridspec(2, n, left=left, right=left + width, bottom=bottom_, top=bottom_ + height,
                              hspace=0.12, wspace=0.32 if own else 0.42, height_ratios=(1, 1.15))
        for j, pan in enumerate(data.panels):
            ax_t = fig.add_subplot(gs[0, j])
            ax_b = fig.add_subplot(gs[1, j], sharex=ax_t)
            _draw_bonus(ax_t, ax_b, res, res.scene.feature(pan.feature_id), pan, fontsize if own else fontsize * 0.95)
            if meas is not None and meas.feature_id == pan.feature_id and meas.allowed is not None:
                _draw_measured(ax_t, ax_b, res.scene.units, meas, fontsize if own else fontsize * 0.95)
        if own:
            B = term("bonus", res.scene.standard)[0]
            _title(fig, None, True, f"{B[0].upper() + B[1:]}: tolerance allowed vs produced size\n{data.subject.title}",
                   fontsize)
        for ax in fig.axes[-2 * n:]:
            _keep_inside(ax)
    return fig, data


def _draw_bonus(ax_t, ax_b, res, f: Feature, p: BonusPanel, fs: float):
    """One feature's column: the axes, the tolerance allowed (top), the boundaries (bottom),
    the bonus bracket and the limits named on the size axis."""
    u, std = res.scene.units, res.scene.standard
    mmc_n, lmc_n = term("mmc", std)[0], term("lmc", std)[0]
    B = term("bonus", std)[0]
    _style_axes(ax_t, ax_b, u, f, fs)
    rfs = term("rfs", std)[1] if std is Standard.ISO else f"{term('rfs', std)[0]}: no modifier"
    lim_note = {"MMC": f"at {mmc_n} (M)", "LMC": f"at {lmc_n} (L)", "RFS": rfs, "none": ""}[p.material]
    ax_t.set_title(f"{f.kind.value} '{f.id}'  {f.tolerance.symbol(u) if f.tolerance else ''}",
                   fontsize=fs * 0.95, loc="left", pad=3)
    if f.tolerance is None:
        for ax in (ax_t, ax_b):
            ax.text(0.5, 0.5, f"no geometric tolerance: no {B}", transform=ax.transAxes, ha="center",
                    va="center", fontsize=fs)
        ax_b.set_xlabel(f"produced size ({u.value})", fontsize=fs * 0.85)
        return
    _draw_allowed(ax_t, u, mmc_n, lmc_n, p, f.tolerance.value, fs)
    _draw_boundaries(ax_b, res, f, p, lim_note, fs)
    _draw_bracket(ax_t, u, B, f, p, fs)
    ax_b.set_xlim(*size_axis_limits(f))
    # name the limits on the x axis
    ax_b.set_xticks([f.limits[0], f.limits[1]])
    ax_b.set_xticklabels([f"{u.fmt(f.limits[0])}\n{mmc_n if f.limits[0] == f.mmc else lmc_n}",
                          f"{u.fmt(f.limits[1])}\n{mmc_n if f.limits[1] == f.mmc else lmc_n}"])


def size_axis_limits(f: Feature, pad: float = 0.04) -> tuple[float, float]:
    """(left, right) of a bonus chart's size axis: MMC on the left, LMC on the right, as the
    what-if slider runs, for holes (sizes ascending) and pins (descending); ``pad`` of the
    range beyond each limit."""
    d = pad * (f.lmc - f.mmc)
    return f.mmc - d, f.lmc + d


def _draw_measured(ax_t, ax_b, u, m: Measured, fs: float):
    """The measured part on its column: a filled marker at (measured size, tolerance allowed at
    it), its words under the what-if note, and a dotted line down through the boundaries."""
    ax_t.plot([m.size], [m.allowed], "D", ms=5.5, mfc=S.SURFACE, mec=S.TEXT, mew=1.0, zorder=7,
              gid=f"{m.feature_id}-measured")
    ax_t.annotate(m.text(u), xy=(m.size, m.allowed), xytext=(0.5, 0.78), textcoords="axes fraction",
                  ha="center", va="top", fontsize=fs * 0.82, color=S.TEXT, weight="bold",
                  arrowprops=dict(arrowstyle="-", color=S.SURFACE, lw=0.7, shrinkB=4), gid=f"{m.feature_id}-measured-text")
    for ax in (ax_t, ax_b):
        ax.axvline(m.size, color=S.SURFACE, lw=0.9, ls=":")


def _style_axes(ax_t, ax_b, u, f: Feature, fs: float):
    """Light grid, no top or right spine, values in the units' format, ticks at the limits."""
    for ax in (ax_t, ax_b):
        ax.tick_params(labelsize=fs * 0.8, length=2.5, pad=1.5)
        ax.grid(True, color=S.PART, lw=0.4, alpha=0.7)
        for sp in ("top", "right"):
            ax.spines[sp].set_visible(False)
    fmt = matplotlib.ticker.FuncFormatter(lambda v, _: u.fmt(v))
    ax_t.yaxis.set_major_formatter(fmt)
    ax_b.yaxis.set_major_formatter(fmt)
    ax_b.xaxis.set_major_formatter(fmt)
    ax_t.xaxis.set_major_locator(matplotlib.ticker.FixedLocator([f.limits[0], f.limits[1]]))
    ax_b.xaxis.set_major_locator(matplotlib.ticker.FixedLocator([f.limits[0], f.limits[1]]))
    ax_t.tick_params(labelbottom=False)


def _draw_allowed(ax_t, u, mmc_n: str, lmc_n: str, p: BonusPanel, t: float, fs: float):
    """Top panel: the tolerance allowed line over its shaded area, the stated t, the produced
    size marked."""
    ax_t.fill_between(p.sizes, 0, p.allowed, color=S.ZONE, alpha=0.15, lw=0)
    ax_t.plot(p.sizes, p.allowed, color=S.ZONE_AXIS, lw=2.0, gid=f"{p.feature_id}-allowed")
    ax_t.axhline(t, color=S.TEXT, lw=0.6, ls=":")
    ymax = max(p.allowed.max(), t) * 1.35
    ax_t.set_ylim(0, ymax)
    ax_t.set_ylabel(f"tolerance\nallowed ({u.value})", fontsize=fs * 0.8)
    ax_t.plot([p.produced], [p.allowed_at_produced], "o", ms=6, mfc=S.BACKGROUND, mec=S.TEXT, mew=1.5, zorder=6,
              gid=f"{p.feature_id}-produced")
    ax_t.annotate(f"at {u.fmt(p.produced)}: {u.fmt(p.allowed_at_produced)}",
                  xy=(p.produced, p.allowed_at_produced),
                  xytext=(0.5, 0.93), textcoords="axes fraction", ha="center", va="top", fontsize=fs * 0.82,
                  arrowprops=dict(arrowstyle="-", color=S.TEXT, lw=0.5, shrinkB=4))
    lo_lbl = {"MMC": f"t = {u.fmt(t)} at {mmc_n}", "LMC": f"t = {u.fmt(t)} at {lmc_n}", "RFS": f"t = {u.fmt(t)} at every size"}
    ax_t.text(0.5, t / ymax - 0.03, lo_lbl[p.material], transform=ax_t.transAxes, fontsize=fs * 0.75, va="top",
              ha="center")
    ax_t.axvline(p.produced, color=S.TEXT, lw=0.8, ls="--")


def _draw_boundaries(ax_b, res, f: Feature, p: BonusPanel, lim_note: str, fs: float):
    """Bottom panel: the produced size, the mating-side and the other-side boundary (the
    constant one bold), each labelled; a side where geom finds no worst-case boundary (ISO
    independency: neither a modifier nor the envelope bounds it) has no line: the size does not
    limit form there."""
    u, std = res.scene.units, res.scene.standard
    mmc_n, lmc_n = term("mmc", std)[0], term("lmc", std)[0]
    ax_b.plot(p.sizes, p.sizes, color=S.SURFACE, lw=1.2, gid=f"{f.id}-size")
    mating_const = p.material == "MMC"
    opp_const = p.material == "LMC"
    vcn = term("vc_MMC", std)[0] if p.material == "MMC" else term("vc_LMC", std)[0]
    m_lbl = (f"{vcn} = size {'−' if f.kind is Kind.HOLE else '+'} allowed = {u.fmt(p.constant)} (constant)"
             if mating_const else f"size {'−' if f.kind is Kind.HOLE else '+'} allowed (mating side)")
    o_lbl = (f"{vcn} = size {'+' if f.kind is Kind.HOLE else '−'} allowed = {u.fmt(p.constant)} (constant)"
             if opp_const else f"size {'+' if f.kind is Kind.HOLE else '−'} allowed (other side)")
    fr = res.features[f.id]
    hole = f.kind is Kind.HOLE
    mm_side = fr.inner_boundary if hole else fr.outer_boundary
    lm_side = fr.outer_boundary if hole else fr.inner_boundary
    shown_lines = [p.sizes]
    if mm_side.value is not None:
        ax_b.fill_between(p.sizes, p.sizes, p.mating, color=S.ZONE, alpha=0.15, lw=0)
        ax_b.plot(p.sizes, p.mating, color=S.VC, lw=2.2 if mating_const else 1.3, gid=f"{f.id}-mating",
                  ls="-" if mating_const else (0, (4, 2)))
        shown_lines.append(p.mating)
    else:
        m_lbl = f"{mm_side.abbr(std)}: none ({mmc_n} side not bounded)"
    if lm_side.value is not None:
        ax_b.plot(p.sizes, p.opposite, color=S.RC, lw=2.2 if opp_const else 1.1, gid=f"{f.id}-opposite",
                  ls="-" if opp_const else (0, (4, 2)))
        shown_lines.append(p.opposite)
    else:
        o_lbl = f"{lm_side.abbr(std)}: none ({lmc_n} side not bounded)"
    allv = np.concatenate(shown_lines)
    span = allv.max() - allv.min()
    ax_b.set_ylim(allv.min() - 0.12 * span, allv.max() + 0.3 * span)
    ax_b.set_ylabel(f"size ({u.value})", fontsize=fs * 0.8)
    ax_b.set_xlabel(f"produced size ({u.value}); {lim_note}", fontsize=fs * 0.8)
    # labels just above each line at a third of the way along, kept apart
    lo_, hi_ = ax_b.get_ylim()
    i3 = len(p.sizes) // 3 if f.mmc <= f.lmc else len(p.sizes) - 1 - len(p.sizes) // 3  # a third from MMC
    entries = [(p.sizes[i3], "produced size", S.SURFACE), (p.mating[i3], m_lbl, S.VC), (p.opposite[i3], o_lbl, S.TEXT)]
    entries = [(min(max(yv, lo_), hi_), txt, col) for yv, txt, col in entries]  # a line not drawn: label in range
    fracs = [(e[0] - lo_) / (hi_ - lo_) for e in entries]
    ys = _spread_y([f_ + 0.035 for f_ in fracs], 0.03, 0.97, fs * 1.5 / (ax_b.get_position(original=True).height
                                                                       * ax_b.figure.get_figheight() * 72))
    for (yv, txt, col), yy in zip(entries, ys):
        ax_b.text(0.03, yy, txt, transform=ax_b.transAxes, ha="left", va="bottom", fontsize=fs * 0.74, color=col,
                  bbox=dict(boxstyle="round,pad=0.08", fc=S.BACKGROUND, ec="none", alpha=0.75))
    ax_b.axvline(p.produced, color=S.TEXT, lw=0.8, ls="--")


def _draw_bracket(ax_t, u, B: str, f: Feature, p: BonusPanel, fs: float):
    """On the top panel, at the limit opposite the modifier's: the bonus, from t to t + bonus."""
    if p.material not in ("MMC", "LMC"):
        return
    t = f.tolerance.value
    other = f.lmc if p.material == "MMC" else f.mmc
    tb = tolerance_allowed(f, other)
    ax_t.annotate("", xy=(other, tb), xytext=(other, t),
                  arrowprops=dict(arrowstyle="<|-|>", color=S.TEXT, lw=0.8, shrinkA=0, shrinkB=0, mutation_scale=6))
    ha = "right" if p.material == "MMC" else "left"  # the size axis runs MMC (left) to LMC (right)
    off = -1 if p.material == "MMC" else 1
    ax_t.annotate(f"{B} {u.fmt(tb - t)}", xy=(other, (t + tb) / 2), xytext=(off * 4, 0),
                  textcoords="offset points", ha=ha, va="center", fontsize=fs * 0.75)
