"""The fastener page: a fastener's numbers with their formulas (:func:`fastener_rows`) and their
meaning in words (:func:`fastener_words`), its section drawn to scale (:func:`draw_fastener`,
also saved alone by :func:`fastener_figure`), and the page of up to
:data:`FASTENERS_PER_PAGE` of them (:func:`build_fastener_page`).

Every number comes from :func:`geom.analysis.analyse_fastener` (through ``res.fasteners``).

>>> FASTENERS_PER_PAGE
3
"""

from __future__ import annotations

import textwrap

import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from geom.analysis import SceneResult, required_hole_fixed, term
from viewer import figures as F
from viewer import style as S

from .page import CONTENT_W, GREY, MARGIN, PAGE, _wrap, evidence_page

FASTENERS_PER_PAGE = 3  # fasteners on one page


def fastener_rows(res: SceneResult, fid: str) -> list[tuple[str, str]]:
    """(quantity, value with its formula) of a fastener, from :func:`geom.analysis.analyse_fastener`
    (through ``res.fasteners``) and its ``Derived`` formulas."""
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
    u = res.scene.units
    fs = 6.4
    x0, W = MARGIN, CONTENT_W
    chars = "; ".join(f"{fid}: position ({res.fasteners[fid].fastener.kind} fastener)" for fid in fids)
    tols = "; ".join(f"{fid}: ⌀{u.fmt(res.fasteners[fid].position_tolerance.value)} (M)" for fid in fids)
    with evidence_page(res, "FASTENER TOLERANCES", "position tolerance of clearance and threaded holes", chars,
                       tols, page_no, pages) as (p, y):
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
            ax = p.fig.add_axes(p.rect(x0 + tw + 0.1, y + 0.05, W - tw - 0.1, block_h - 0.35))
            draw_fastener(ax, res, fid, fs=fs)
            cap = "section, to scale; values true" + ("" if fa.kind == "fixed" else
                                                      "; thicknesses, head, nut schematic")
            if files and fid in files:
                cap += f" ({files[fid]})"
            p.text(x0 + tw + 0.1, y + block_h - 0.27, "\n".join(_wrap(cap, W - tw - 0.1, fs * 0.85)),
                   fontsize=fs * 0.85, color=GREY)
            p.line(x0, y + block_h - 0.06, x0 + W, y + block_h - 0.06, lw=0.4, color=S.PART)
            y += block_h
    return p.fig
