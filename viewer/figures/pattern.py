"""The top view of a pattern in its datum frame: the datum feature's simulator at its MMB, each
member at its basic location with its gauge pin (the VC, true size) and its tolerance zone; the
zones, the measured axes and the shift envelope are small against the pattern, so they are drawn
``k`` times their size about the basic locations (one factor per picture, said in the caption;
sizes and locations of the gauge true).

Where the scene gives measured members: one panel the right way (the pattern moved as one body
within the shift envelope, each member against its own zone) and one the wrong way (the shift
added to every zone, nothing moved), so a trainee sees the difference.
"""

from __future__ import annotations

import math

import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Circle

from geom.analysis import SceneResult
from geom.model import Kind
from viewer import style as S

from .aids import DPI, FIGSIZE, style_context


def pattern_result(res: SceneResult, pid: str):
    """The :class:`geom.frames.PatternResult` of pattern ``pid``."""
    for pr in res.frames.patterns if res.frames is not None else ():
        if pr.pattern.id == pid:
            return pr
    raise KeyError(pid)


def exaggeration_for(pr) -> float:
    """The factor zones and deviations are drawn at: a zone drawn as a quarter of the smallest
    distance between two members (or from a member to the datum axis), a 1-2-5 number."""
    from viewer.exaggeration import nice_floor

    locs = np.asarray(pr.pattern.locations, float)
    gaps = [float(np.hypot(*locs[i])) for i in range(len(locs))]
    gaps += [float(np.hypot(*(locs[i] - locs[j]))) for i in range(len(locs)) for j in range(i)]
    room = 0.25 * min(g for g in gaps if g > 0) if any(g > 0 for g in gaps) else 1.0
    zone = max(m.allowed.value for m in pr.members)
    checks = [c for c in (pr.right, pr.wrong) if c is not None]
    zone = max([zone] + [r.allowed for c in checks for r in c.readings])
    return max(1.0, nice_floor(room / max(zone, 1e-12)))


def draw_pattern(ax, res: SceneResult, pid: str, way: str = "right", k: float | None = None, fs: float = 8.0,
                 pr=None):
    """Draw pattern ``pid`` on ``ax``: ``way`` "right" (the measured fit within the shift) or
    "wrong" (the shift as bonus); without measured members, the pattern at MMC and its gauge.
    ``pr``: the pattern's result to draw (a what-if of the datum size), else the scene's. Returns
    the factor ``k`` the zones are drawn at and the legend's (artist, text) pairs."""
    pr = pr or pattern_result(res, pid)
    u = res.scene.units
    p = pr.pattern
    k = k or exaggeration_for(pr)
    chk = pr.right if way == "right" else pr.wrong
    hole = p.feature.kind is Kind.HOLE
    handles = []
    # the datum feature's simulator (true size) and the frame's axes
    sims = [s for s in pr.gauge.simulators if s.diameter is not None]
    for s in sims:
        c = Circle((0, 0), s.diameter.value / 2, fill=False, lw=1.0, ls="-", ec=S.PART)
        ax.add_patch(c)
        handles.append((c, f"datum {s.letter} simulator ⌀{u.fmt(s.diameter.value)} (at its MMB)"))
    reach = max(float(np.hypot(*xy)) for xy in p.locations)
    ax.axhline(0.0, color=S.PART, lw=0.5, ls="-.")  # the frame's axes through the datum origin
    ax.axvline(0.0, color=S.PART, lw=0.5, ls="-.")
    for g in pr.gauge.pins:  # the gauge pins, true size
        c = Circle(g.basic, g.diameter.value / 2, fill=False, lw=0.9, ls="--", ec=S.VC)
        ax.add_patch(c)
    handles.append((Circle((0, 0), 1, fill=False, ls="--", ec=S.VC),
                    f"gauge {'pins' if hole else 'holes'} ⌀{u.fmt(pr.gauge.pins[0].diameter.value)} (VC), true size"))
    readings = chk.readings if chk is not None else None
    for i, (bx, by) in enumerate(p.locations):
        allowed = readings[i].allowed if readings else pr.members[i].allowed.value
        z = Circle((bx, by), k * allowed / 2, fill=True, alpha=0.35, fc=S.ZONE, ec=S.ZONE, lw=0.8)
        ax.add_patch(z)
        if readings:
            r = readings[i]
            mx, my = bx + k * (r.measured[0] - bx), by + k * (r.measured[1] - by)
            fx, fy = bx + k * (r.fitted[0] - bx), by + k * (r.fitted[1] - by)
            col = S.ROLE_COLOUR["ok" if r.margin >= -1e-12 else "fail"]
            ax.plot([mx], [my], marker="o", ms=3, color=S.NEUTRAL, zorder=5)
            if math.hypot(fx - mx, fy - my) > 1e-9:
                ax.annotate("", (fx, fy), (mx, my), arrowprops={"arrowstyle": "->", "color": S.TEXT, "lw": 0.7})
            ax.plot([fx], [fy], marker="o", ms=4.5, color=col, zorder=6)
            ax.text(bx, by - k * allowed / 2 - 0.02 * reach, f"{i + 1}: {u.fmt(r.position)} / {u.fmt(r.allowed)}",
                    ha="center", va="top", fontsize=fs * 0.85, color=col)
        else:
            ax.text(bx, by - k * allowed / 2 - 0.02 * reach, f"{i + 1}", ha="center", va="top", fontsize=fs * 0.85)
    tiers = pr.composite is not None and way == "right" and chk is not None
    up_words = f"zone at each basic location, x{k:g}" + (" (t + bonus + shift)" if way == "wrong" and chk else
                                                          " (t + bonus)")
    if tiers:
        form = pr.spec.lower[2]
        up_words = (f"{'pattern-locating' if form == 'composite' else 'upper segment'} "
                    f"⌀{u.fmt(p.feature.tolerance.value)} | {' | '.join(p.frame.letters)}: " + up_words)
    handles.append((Circle((0, 0), 1, fc=S.ZONE, alpha=0.35, ec=S.ZONE), up_words))
    if tiers:
        handles.append(_lower_tier(ax, pr, k, u))
    if chk is not None and way == "right" and chk.datum is not None:
        rad = chk.datum.radial.value
        env = Circle((0, 0), k * rad, fill=False, ec=S.TEXT, lw=0.9, ls=":")
        ax.add_patch(env)
        handles.append((env, f"shift envelope: radial {u.fmt(rad)}, x{k:g}"))
        if math.hypot(*chk.shift) > 0:
            ax.annotate("", (k * chk.shift[0], k * chk.shift[1]), (0, 0),
                        arrowprops={"arrowstyle": "->", "color": S.TEXT, "lw": 1.0})
    ax.set_aspect("equal")
    # the datum origin and every member in view, with a margin of a fifth of the span
    pts = np.asarray(list(p.locations) + [(0.0, 0.0)], float)
    lo, hi = pts.min(axis=0), pts.max(axis=0)
    pad = 0.2 * max(float((hi - lo).max()), 1e-9) + max(pr.gauge.pins[0].diameter.value, k * max(
        m.allowed.value for m in pr.members))
    ax.set_xlim(lo[0] - pad, hi[0] + pad)
    ax.set_ylim(lo[1] - pad, hi[1] + pad)
    ax.tick_params(labelsize=fs * 0.8)
    if chk is None:
        title = f"pattern '{p.id}' at MMC with its gauge"
    elif way == "right":
        title = f"right way: moved as one body\n{'CONFORMS' if chk.conforms else 'DOES NOT CONFORM'}"
        if pr.composite is not None:  # the second tier's verdict under the first's
            lo = pr.composite.lower
            title = (f"upper tier, within the datum shift: {'CONFORMS' if chk.conforms else 'DOES NOT CONFORM'}\n"
                     f"lower tier ⌀{u.fmt(pr.spec.lower[0])} to {'|'.join(pr.spec.lower[1])}: "
                     f"{'CONFORMS' if lo.conforms else 'DOES NOT CONFORM'}")
    else:
        title = (f"wrong way: +{u.fmt(chk.added)} on each zone\n"
                 f"{'would pass' if chk.conforms else 'would fail'} (not a verdict)")
    ax.set_title(title, fontsize=fs, loc="left", pad=3)
    return k, handles


def lower_zone_centres(pr) -> list[tuple[float, float]]:
    """Where the lower tier's best fit puts its zones, in the measured coordinates: the basic
    locations carried back through the fit (fitted = R(theta) measured + d, so a zone at basic b
    sits at R(-theta) (b - d))."""
    lo = pr.composite.lower
    out = []
    for r in lo.readings:
        th = -math.radians(r.rotation_deg)
        x, y = r.basic[0] - r.shift[0], r.basic[1] - r.shift[1]
        out.append((math.cos(th) * x - math.sin(th) * y, math.sin(th) * x + math.cos(th) * y))
    return out


def _lower_tier(ax, pr, k: float, u):
    """The lower tier's zones (t2 + bonus, x k about each basic location) where its fit puts them;
    the legend's (artist, text)."""
    t2, datums, form = pr.spec.lower
    lo = pr.composite.lower
    for (bx, by), (zx, zy), r in zip(pr.pattern.locations, lower_zone_centres(pr), lo.readings):
        c = Circle((bx + k * (zx - bx), by + k * (zy - by)), k * r.allowed / 2, fill=False, ec=S.PROJECTED, lw=1.1,
                   ls=(0, (4, 2)), zorder=4, gid="lower-tier zone")
        ax.add_patch(c)
    name = "feature-relating" if form == "composite" else "lower segment (two single segments)"
    return (Circle((0, 0), 1, fill=False, ec=S.PROJECTED, ls=(0, (4, 2))),
            f"{name} ⌀{u.fmt(t2)} | {' | '.join(datums)}: zones where its fit puts them, x{k:g}")


def pattern_figure(res: SceneResult, pid: str, figsize=FIGSIZE, fs: float = 8.0, pr=None) -> Figure:
    """The pattern's picture alone: one panel (no measured members) or right and wrong way;
    ``pr`` as :func:`draw_pattern` takes it."""
    pr = pr or pattern_result(res, pid)
    ways = ("right", "wrong") if pr.wrong is not None else ("right",)
    with style_context():
        fig = Figure(figsize=figsize, dpi=DPI, facecolor=S.BACKGROUND)
        k = exaggeration_for(pr)
        w = 0.86 / len(ways)
        handles = None
        for i, way in enumerate(ways):
            ax = fig.add_axes((0.06 + i * (w + 0.02), 0.22, w - 0.02, 0.68))
            _k, h = draw_pattern(ax, res, pid, way, k, fs, pr=pr)
            handles = handles or h
        fig.text(0.03, 0.97, f"Pattern '{pid}' in its datum frame ({'|'.join(pr.pattern.frame.letters)}), top view",
                 fontsize=fs * 1.3, weight="bold", va="top", gid="title")
        fig.text(0.03, 0.03, f"zones, measured axes and the shift drawn x{k:g} about the basic locations;\n"
                 f"gauge, simulator and locations true ({res.scene.units.value})",
                 fontsize=fs * 0.85, va="bottom", gid="footer")
        fig.legend([h for h, _ in handles], [t for _, t in handles], loc="lower right", fontsize=fs * 0.8,
                   bbox_to_anchor=(0.99, 0.10), frameon=True, ncol=2)
    return fig
