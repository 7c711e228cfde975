"""The 2D views of a mate or a lone feature (matplotlib, Agg only): pure functions, result and
what-if state in, a Figure and the numbers it shows out.

* :func:`through_view` - looking normal to datum A: the hole's end sections, their overlap (the
  clear opening, shaded), its largest inscribed circle, the pin's sections and swept envelope,
  and the clearance or overlap between them.
* :func:`section_view` - the section in the plane of the tilt: datum A, the tolerance zones, the
  tilted axes, hole walls, pin, the mating (virtual-condition) boundaries; tilt angle and zone
  width dimensioned.
* :func:`bonus_chart` - tolerance allowed against produced size across the limits, and below it
  the produced size with the two boundaries it gives, so a constant virtual condition shows as
  a flat line.

Tolerances are tiny against sizes (0.015 on 8 mm), so radial deviations are exaggerated about a
reference radius R0: a curve at distance r from the axis is drawn at R0' + k (r - R0), an axis
offset x at k x (R0' = R0 unless a wide, short feature is drawn with its diameter shortened).
Every drawing says so ("radial deviations x k"); every dimension text gives the TRUE value at the
units' precision. Geometry is computed in true units (shapely, :mod:`geom.throughview`) and only
mapped for display; each function returns ``(Figure, data)`` where the frozen data object keeps
the true geometry and numbers, and the artists carry ``gid`` labels so tests can read them back.

Figures are built with :class:`matplotlib.figure.Figure` directly (no pyplot, no GUI backend):
``fig.savefig`` renders with Agg / the PDF and SVG backends.
"""

from __future__ import annotations

import contextlib
import math
from dataclasses import dataclass, field

import matplotlib
import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Arc, Circle, PathPatch, Polygon as MplPolygon, Rectangle
from matplotlib.path import Path as MplPath

from geom.analysis import SceneResult, clearance_at, fits, line_to_line, term

# Names, ids and report fields are free text: a "$" in them must print as "$", never start
# matplotlib's math markup. No picture of ours uses math markup, so it is off for every figure.
matplotlib.rcParams["text.parse_math"] = False
from geom.boundaries import FeatureState, effective_size, tolerance_allowed, virtual_condition, worst_case_state
from geom.model import Feature, Kind, Material, Standard, Zone
from geom.placement import AxisPlacement, worst_case_axis
from geom.throughview import ThroughView, clear_opening, swept_envelope
from viewer import style as S
from viewer.exaggeration import Exaggeration, auto_k  # noqa: F401  (re-exported)

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


# ------------------------------------------------------------------------------- exaggeration


# ---------------------------------------------------------------------------- subjects, states


@dataclass(frozen=True)
class Subject:
    """What a view shows: a mate (hole + pin) or a lone feature (one of them None)."""

    key: str  # "mate-<hole>--<pin>" or "feature-<id>"
    title: str
    hole: Feature | None
    pin: Feature | None

    @property
    def features(self) -> tuple[Feature, ...]:
        return tuple(f for f in (self.hole, self.pin) if f is not None)

    @property
    def is_mate(self) -> bool:
        return self.hole is not None and self.pin is not None


def subject_of(res: SceneResult, subject: int | str) -> Subject:
    """``subject``: a mate index (int) or a feature id (str)."""
    sc = res.scene
    if isinstance(subject, (int, np.integer)) and not isinstance(subject, bool):
        if not 0 <= subject < len(sc.mates):
            raise IndexError(f"mate index {subject} out of range (scene has {len(sc.mates)} mates)")
        m = sc.mates[subject]
        h, p = sc.feature(m.hole), sc.feature(m.pin)
        return Subject(f"mate-{h.id}--{p.id}", f"mate: hole '{h.id}' with pin '{p.id}'", h, p)
    f = sc.feature(subject)
    title = f"{f.kind.value} '{f.id}'" + (f" ({f.name})" if f.name else "")
    if f.kind is Kind.HOLE:
        return Subject(f"feature-{f.id}", title, f, None)
    return Subject(f"feature-{f.id}", title, None, f)


def resolve_states(res: SceneResult, subject: int | str | Subject,
                   states: dict[str, FeatureState] | None = None) -> dict[str, FeatureState]:
    sub = subject if isinstance(subject, Subject) else subject_of(res, subject)
    out = {f.id: worst_case_state(f, sub.is_mate) for f in sub.features}
    for fid, st in (states or {}).items():
        if fid in out:
            out[fid] = st
    return out


def _tilt_direction_deg(pl: AxisPlacement) -> float:
    return math.degrees(math.atan2(pl.direction[1], pl.direction[0]))


def _zone_height(pl: AxisPlacement) -> float:
    return pl.zone_z[1] - pl.zone_z[0]


def _boundary_name(f: Feature, state: FeatureState, standard) -> str:
    """Name of the mating-side boundary a part in this state presents."""
    vc = virtual_condition(f)
    tol = f.tolerance
    eff = effective_size(f, state)
    if vc is not None and tol is not None and tol.material is Material.MMC and abs(eff - vc) < 1e-9:
        return term("vc_MMC", standard)[0]
    return "clear boundary" if f.kind is Kind.HOLE else "swept boundary"


# ------------------------------------------------------------------------------- drawing aids


def _new_figure(fig, rect, figsize):
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
    pos = ax.get_position(original=True)
    return (pos.width * ax.figure.get_figwidth()) / (pos.height * ax.figure.get_figheight())


def _clean_axes(ax):
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


def _dim_line(ax, x0, y0, x1, y1, text, fs, color=S.TEXT, text_xy=None, ha="center", va="bottom",
              weight="normal", gid=None, outside=False):
    """A dimension: double arrow between two points and its text (true value)."""
    style = "<|-|>" if not outside else "|-|"
    ax.annotate("", xy=(x1, y1), xytext=(x0, y0),
                arrowprops=dict(arrowstyle=style, color=color, lw=0.9, shrinkA=0, shrinkB=0,
                                mutation_scale=7))
    tx, ty = text_xy if text_xy is not None else ((x0 + x1) / 2, (y0 + y1) / 2)
    return ax.text(tx, ty, text, fontsize=fs, color=color, ha=ha, va=va, weight=weight, gid=gid,
                   bbox=dict(boxstyle="round,pad=0.15", fc=S.BACKGROUND, ec="none", alpha=0.85))


def _callout(ax, xy, xytext, text, fs, color=S.TEXT, weight="normal", ha="left", gid=None, box=False):
    return ax.annotate(
        text, xy=xy, xytext=xytext, fontsize=fs, color=color, weight=weight, ha=ha, va="center", gid=gid,
        arrowprops=dict(arrowstyle="-|>", color=color, lw=0.7, shrinkA=1, shrinkB=1, mutation_scale=7),
        bbox=(dict(boxstyle="round,pad=0.3", fc=S.BACKGROUND, ec=color, lw=1.2) if box else
              dict(boxstyle="round,pad=0.1", fc=S.BACKGROUND, ec="none", alpha=0.9)),
    )


def _spread_y(targets: list[float], lo: float, hi: float, min_gap: float) -> list[float]:
    """Text heights near the targets, in their order, at least ``min_gap`` apart, inside
    [lo, hi] when they fit (else running above ``hi``)."""
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


def _footer(fig, ax, own, text_lines, fs):
    """Exaggeration / assumption lines under the drawing."""
    if own:
        fig.text(0.03, 0.025, "\n".join(text_lines), fontsize=fs * 0.85, color=S.TEXT, va="bottom", ha="left",
                 gid="footer")
    else:
        import textwrap

        w_pt = ax.get_position(original=True).width * fig.get_figwidth() * 72.0
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


# =============================================================================== through-view


@dataclass(frozen=True)
class ThroughData:
    """True geometry of the through-view (coordinates relative to the basic location, scene units)."""

    subject: Subject
    states: dict
    hole: ThroughView | None  # clear_opening: sections, opening polygon, inscribed circle
    pin: ThroughView | None  # swept_envelope: sections, hull, enclosing circle
    overlap: object | None  # shapely: the pin's envelope outside the clear opening (None: no pin/hole)
    clearance: float | None  # diametral, geom.analysis.clearance_at at these states
    gap_per_side: float | None  # (inscribed - enclosing) / 2 from the drawn (shapely) geometry
    exaggeration: Exaggeration = field(repr=False)
    segments: int = 720  # vertices per section polygon (chord error ~ d (1 - cos(pi / segments)) / 2)


def _through_geometry(f: Feature, st: FeatureState, segments: int):
    pl = worst_case_axis(f, st)
    args = (st.size, pl.offset, _zone_height(pl) if not pl.bowed else f.length, _tilt_direction_deg(pl),
            (0.0, 0.0), pl.bowed, segments)
    return pl, (clear_opening(*args) if f.kind is Kind.HOLE else swept_envelope(*args))


def through_data(res: SceneResult, subject, states=None, exaggeration: float | None = None,
                 segments: int = 720) -> ThroughData:
    sub = subject if isinstance(subject, Subject) else subject_of(res, subject)
    sts = resolve_states(res, sub, states)
    hv = pv = None
    if sub.hole is not None:
        _, hv = _through_geometry(sub.hole, sts[sub.hole.id], segments)
    if sub.pin is not None:
        _, pv = _through_geometry(sub.pin, sts[sub.pin.id], segments)
    overlap = clearance = gap = None
    if hv is not None and pv is not None:
        overlap = pv.opening.difference(hv.opening)
        clearance = clearance_at(sub.hole, sub.pin, sts[sub.hole.id], sts[sub.pin.id])
        gap = (hv.diameter - pv.diameter) / 2.0
    r0 = (sub.hole or sub.pin).mmc / 2.0
    radii = []
    for tv in (hv, pv):
        if tv is None:
            continue
        for poly in tv.sections:
            xy = np.asarray(poly.exterior.coords)
            radii += [np.hypot(xy[:, 0], xy[:, 1]).min(), np.hypot(xy[:, 0], xy[:, 1]).max()]
        radii.append(tv.diameter / 2)
    spread = max(abs(r - r0) for r in radii)
    k = float(exaggeration) if exaggeration else auto_k(spread, r0)
    return ThroughData(sub, sts, hv, pv, overlap, clearance, gap, Exaggeration(k, r0, r0), segments)


def through_view(res: SceneResult, subject, states=None, exaggeration: float | None = None, *,
                 fig: Figure | None = None, rect=None, fontsize: float = 9.0, figsize=FIGSIZE):
    """Through-view normal to datum A. Returns ``(Figure, ThroughData)``.

    Artists with ``gid``: "hole-section-0" / "hole-section-1" (end sections), "opening" (the
    shaded clear opening), "inscribed" (its largest inscribed circle), "pin-section-*",
    "pin-envelope" (the pin's enclosing circle), "overlap", "gap-dim".
    """
    with style_context():
        data = through_data(res, subject, states, exaggeration)
        fig, ax, own = _new_figure(fig, rect, figsize)
        _draw_through(ax, res, data, fontsize)
        sub = data.subject
        u = res.scene.units
        _title(fig, ax, own, f"Through-view normal to datum A\n{sub.title}", fontsize)
        foot = [data.exaggeration.label(u), _state_line(res, data.states)]
        so = _second_order_note(res, data)
        if so:
            foot.append(so)
        _footer(fig, ax, own, foot, fontsize)
    return fig, data


def _circle_caption(u, std, f, st, diameter: float, what: str, kind: str, generic: str, sign: str,
                    assumed: bool = False) -> str:
    """Caption of the through-view's circle: its shapely diameter, and the boundary it stands for
    (= at display precision, or ~ where the elliptical-section term shows). ``assumed``: geom
    finds no worst-case boundary on that side (the circle assumes perfect form)."""
    name = _boundary_name(f, st, std)
    eff = effective_size(f, st)
    eq = "=" if u.fmt(diameter) == u.fmt(eff) else "≈"
    tail = (f"{kind} {name} {u.fmt(eff)}" if name != generic
            else f"size {sign} tolerance allowed = {u.fmt(eff)}")
    return f"{what} ⌀{u.fmt(diameter)}\n{eq} {tail}" + ("\n(perfect form assumed)" if assumed else "")


def _form_assumed(res: SceneResult, f: Feature) -> bool:
    """geom finds no worst-case boundary on the feature's mating (MMC) side (ISO independency
    without (M) or (E)): a drawn boundary there assumes perfect form."""
    fr = res.features[f.id]
    return (fr.inner_boundary if f.kind is Kind.HOLE else fr.outer_boundary).value is None


def _gap_text(u, clearance: float, interferes: bool, consequence: str, line_to_line_text: str) -> str:
    """The dimension text of a diametral clearance or overlap (true value, and per side)."""
    per, dia = _half(u, clearance), u.fmt(abs(clearance))
    if interferes:
        return f"OVERLAP {dia} on ⌀\n({per} per side):\n{consequence}"
    if line_to_line(clearance):
        return line_to_line_text
    return f"clearance {dia} on ⌀\n({per} per side)"


def _half(units, clearance: float) -> str:
    """The per-side (half) value of a diametral clearance as it is shown, with the digits it
    needs (``Units.fmt`` extends them: half of 0.025 prints 0.0125), so that twice it reads as
    the diametral value."""
    return units.fmt(abs(float(units.fmt(clearance))) / 2.0)


def _state_line(res, states) -> str:
    u = res.scene.units
    parts = []
    for fid, st in states.items():
        f = res.scene.feature(fid)
        ta = tolerance_allowed(f, st.size)
        share = "" if st.share == 1.0 else f", {st.share:.0%} of it used"
        parts.append(f"{fid} at {u.fmt(st.size)} (tolerance allowed {u.fmt(ta)}{share})")
    return "state shown: " + "; ".join(parts)


def _second_order_note(res, d: ThroughData) -> str:
    """Say why a drawn circle differs from the boundary formula at display precision."""
    u = res.scene.units
    for tv, f in ((d.hole, d.subject.hole), (d.pin, d.subject.pin)):
        if tv is None or tv.bowed:
            continue
        eff = effective_size(f, d.states[f.id])
        if u.fmt(tv.diameter) != u.fmt(eff):
            return (f"{f.id}: the circle differs from the boundary formula by {u.fmt(abs(tv.diameter - eff))}: "
                    f"sections of a tilted cylinder are ellipses (term d(sec θ − 1), geom.throughview)")
    return ""


def _draw_through(ax, res: SceneResult, d: ThroughData, fs: float):
    from matplotlib.lines import Line2D

    u, std = res.scene.units, res.scene.standard
    ex = d.exaggeration
    sub = d.subject
    _clean_axes(ax)
    reach = [ex.r_disp]
    legend = []
    calls = []  # (target xy in data, text, colour, emphasised, gid)
    if d.hole is not None:
        hv, f, st = d.hole, sub.hole, d.states[sub.hole.id]
        # the clear opening first (shaded), then the section outlines over it
        path = _poly_path(hv.opening)
        if path is not None:
            mp = MplPath(ex.map_polar(path.vertices), path.codes)
            ax.add_patch(PathPatch(mp, fc=OPENING_FILL, ec="none", zorder=1, gid="opening"))
        tol = f.tolerance
        if tol is not None and tol.projected:
            names = (f"at z = -{u.fmt(tol.projected)} (end of projected zone)", "at A (z = 0)")
        elif len(hv.sections) == 3:
            names = ("at A (z = 0)", "at mid-length", f"at z = {u.fmt(f.length)}")
        else:
            names = ("at A (z = 0)", f"at z = {u.fmt(f.length)} (top)")
        styles = ("--", "-.", ":")
        for i, sec in enumerate(hv.sections):
            xy = ex.map_polar(np.asarray(sec.exterior.coords))
            ax.plot(xy[:, 0], xy[:, 1], ls=styles[i % 3], color=HOLE_LINE, lw=1.2, zorder=3, gid=f"hole-section-{i}")
            legend.append(Line2D([], [], ls=styles[i % 3], color=HOLE_LINE, lw=1.2, label=f"hole section {names[i]}"))
            reach.append(np.abs(xy).max())
        legend.append(MplPolygon([[0, 0]], fc=OPENING_FILL, ec=HOLE_LINE, lw=0.3,
                                 label="clear opening (seen through both ends)"))
        rc = ex.radial(hv.diameter / 2)
        c = ex.lateral(hv.centre)
        ax.add_patch(Circle(c, rc, fill=False, ec=S.VC, lw=2.0, zorder=5, gid="inscribed"))
        txt = _circle_caption(u, std, f, st, hv.diameter, "opening's largest circle", "hole", "clear boundary", "−",
                              _form_assumed(res, f))
        a = math.radians(-35)
        calls.append(((c[0] + rc * math.cos(a), c[1] + rc * math.sin(a)), txt, S.VC, False, "inscribed-text"))
    if d.pin is not None:
        pv, f, st = d.pin, sub.pin, d.states[sub.pin.id]
        alone = d.hole is None
        for i, sec in enumerate(pv.sections):
            xy = ex.map_polar(np.asarray(sec.exterior.coords))
            if alone:
                ax.fill(xy[:, 0], xy[:, 1], fc=S.MATE, alpha=0.35, ec="none", zorder=2)
            ax.plot(xy[:, 0], xy[:, 1], ls=(0, (1, 1.5)), color=S.MATE_AXIS, lw=0.9, zorder=4, gid=f"pin-section-{i}")
            reach.append(np.abs(xy).max())
        legend.append(Line2D([], [], ls=(0, (1, 1.5)), color=S.MATE_AXIS, lw=0.9,
                             label="pin sections at both ends (swept)"))
        rp = ex.radial(pv.diameter / 2)
        cp = ex.lateral(pv.centre)
        ax.add_patch(Circle(cp, rp, fill=False, ec=S.MATE_AXIS, lw=2.0, zorder=6, gid="pin-envelope"))
        legend.append(Line2D([], [], color=S.MATE_AXIS, lw=2.0, label="pin's enclosing circle (smallest around it)"))
        reach.append(rp)
        txt = _circle_caption(u, std, f, st, pv.diameter, "pin's enclosing circle", "pin", "swept boundary", "+",
                              _form_assumed(res, f))
        a = math.radians(35)
        calls.append(((cp[0] + rp * math.cos(a), cp[1] + rp * math.sin(a)), txt, S.MATE_AXIS, False, "pin-text"))
    if d.hole is not None:
        legend.insert(len(d.hole.sections) + 1,
                      Line2D([], [], color=S.VC, lw=2.0, label="largest circle in the opening"))
    R = max(reach)
    if d.hole is not None and d.pin is not None:
        interferes = d.clearance is not None and not fits(d.clearance)
        if interferes and d.overlap is not None and not d.overlap.is_empty:
            path = _poly_path(d.overlap)
            if path is not None:
                mp = MplPath(ex.map_polar(path.vertices), path.codes)
                ax.add_patch(PathPatch(mp, fc=S.INTERFERENCE, ec=S.INTERFERENCE, lw=0.5, hatch="xxxx",
                                       zorder=7, gid="overlap"))
                legend.append(MplPolygon([[0, 0]], fc=S.INTERFERENCE, hatch="xxxx", ec=S.INTERFERENCE,
                                         label="OVERLAP: pin outside the opening"))
        # gap between the two circles, dimensioned along the hole's tilt (narrowest way)
        phi = math.radians(d.states[sub.hole.id].direction_deg)
        ri, ro = ex.radial(d.hole.diameter / 2), ex.radial(d.pin.diameter / 2)
        p0 = np.array([math.cos(phi), math.sin(phi)])
        a_, b_ = p0 * ri, p0 * ro
        ax.annotate("", xy=b_, xytext=a_, arrowprops=dict(arrowstyle="<|-|>", color=S.TEXT, lw=1.1, shrinkA=0,
                                                          shrinkB=0, mutation_scale=8), gid="gap-dim", zorder=9)
        txt = _gap_text(u, d.clearance, interferes, "the pin does not fit", "line-to-line: zero clearance")
        tip = b_ if np.linalg.norm(b_) >= np.linalg.norm(a_) else a_
        calls.append((tuple(tip), txt, S.INTERFERENCE if interferes else S.TEXT, True, "gap-text"))
    ax.plot([0], [0], marker="+", color=S.ZONE_AXIS, ms=8, mew=1.0, zorder=8)
    # drawing in the left half, texts in a column on the right
    W = max(2.1 * R / 0.62, 2.2 * R * _box_ratio(ax))
    _fit_limits(ax, -1.05 * R - 0.01 * W, -1.05 * R + 0.99 * W, -1.1 * R, 1.1 * R, anchor=(0.0, 0.5))
    xcol = float(ax.transLimits.transform((1.05 * R, 0))[0]) + 0.03
    leg = ax.legend(handles=legend, loc="lower left", bbox_to_anchor=(xcol - 0.01, 0.0), fontsize=fs * 0.78,
                    frameon=True, framealpha=0.95, edgecolor=S.PART, borderaxespad=0.0, handlelength=2.4)
    _column(ax, calls, xcol, _legend_top(ax, leg) + 0.04, 0.97, fs, ha="left")


def _legend_top(ax, leg) -> float:
    """Top of a legend in axes fraction (the legend is measured with a renderer)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    fig = ax.figure
    canvas = fig.canvas if isinstance(fig.canvas, FigureCanvasAgg) else FigureCanvasAgg(fig)
    bb = leg.get_window_extent(canvas.get_renderer())
    return float(ax.transAxes.inverted().transform((bb.x1, bb.y1))[1])


def _column(ax, calls, xfrac, lo, hi, fs, ha="left", gap=None):
    """Callout texts in a column at axes fraction ``xfrac``, near their targets' heights."""
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


# ================================================================================ section view


@dataclass(frozen=True)
class SectionData:
    """True numbers of the section in the plane of the tilt (lateral x relative to the basic
    location along ``direction_deg``, z from datum A)."""

    subject: Subject
    states: dict
    direction_deg: float
    placements: dict  # feature id -> AxisPlacement
    zone_width: dict  # feature id -> tolerance allowed at the state (zone size)
    tilt_deg: dict  # feature id -> axis tilt to the zone axis (0 for a bowed axis)
    boundary: dict  # feature id -> mating-side boundary at the state (effective_size)
    gap_per_side: float | None  # smallest horizontal wall-to-wall gap (negative: overlap)
    gap_z: float | None
    gap_side: int | None  # +1 right, -1 left
    clearance: float | None  # diametral, clearance_at
    exaggeration: Exaggeration = field(repr=False)


def _lateral_of(pl: AxisPlacement, f: Feature, u: np.ndarray):
    pts = pl.points
    s = (pts[:, 0] - f.at[0]) * u[0] + (pts[:, 1] - f.at[1]) * u[1]
    return pts[:, 2], s


def _half_width(f: Feature, st: FeatureState, pl: AxisPlacement) -> float:
    """Horizontal half-width of the wall in the section: d / (2 cos(theta)) for a tilted axis."""
    return st.size / (2.0 * math.cos(math.radians(pl.tilt_deg)))


def section_data(res: SceneResult, subject, states=None, exaggeration: float | None = None) -> SectionData:
    sub = subject if isinstance(subject, Subject) else subject_of(res, subject)
    sts = resolve_states(res, sub, states)
    lead = sub.hole or sub.pin
    pls = {f.id: worst_case_axis(f, sts[f.id], samples=2) for f in sub.features}
    direction = _tilt_direction_deg(pls[lead.id])
    u = np.array([math.cos(math.radians(direction)), math.sin(math.radians(direction))])
    zone = {fid: pl.zone_size for fid, pl in pls.items()}
    tilt = {fid: pl.tilt_deg for fid, pl in pls.items()}
    bnd = {f.id: effective_size(f, sts[f.id]) for f in sub.features}
    gap = gap_z = side = clr = None
    if sub.is_mate:
        h, p = sub.hole, sub.pin
        zh, sh = _lateral_of(pls[h.id], h, u)
        zp, sp = _lateral_of(pls[p.id], p, u)
        wh, wp = _half_width(h, sts[h.id], pls[h.id]), _half_width(p, sts[p.id], pls[p.id])
        ztop = min(h.length, p.length)
        z = np.linspace(0.0, ztop, 257)
        ah, ap = np.interp(z, zh, sh), np.interp(z, zp, sp)
        right = (ah + wh) - (ap + wp)
        left = (ap - wp) - (ah - wh)
        ir, il = int(np.argmin(right)), int(np.argmin(left))
        if left[il] <= right[ir] + 1e-12:
            gap, gap_z, side = float(left[il]), float(z[il]), -1
        else:
            gap, gap_z, side = float(right[ir]), float(z[ir]), 1
        clr = clearance_at(h, p, sts[h.id], sts[p.id])
    r0 = lead.mmc / 2.0
    L = max(max(f.length for f in sub.features), max(_zone_height(pl) for pl in pls.values()))
    r_disp = min(r0, 0.55 * L)
    spread = 0.0
    for f in sub.features:
        pl, st = pls[f.id], sts[f.id]
        spread = max(spread, abs(_half_width(f, st, pl) - r0) + pl.offset / 2, abs(bnd[f.id] / 2 - r0))
    k = float(exaggeration) if exaggeration else auto_k(spread, r_disp)
    return SectionData(sub, sts, direction, pls, zone, tilt, bnd, gap, gap_z, side, clr, Exaggeration(k, r0, r_disp))


def section_view(res: SceneResult, subject, states=None, exaggeration: float | None = None, *,
                 fig: Figure | None = None, rect=None, fontsize: float = 9.0, figsize=FIGSIZE):
    """Section in the plane of the tilt. Returns ``(Figure, SectionData)``.

    Artists with ``gid``: "datum-A", "<id>-zone-limit" (two lines each), "<id>-axis",
    "<id>-wall" (hole walls / pin sides), "<id>-boundary" (VC lines), "overlap", "gap-dim",
    "<id>-zone-dim", "<id>-tilt-arc".
    """
    with style_context():
        data = section_data(res, subject, states, exaggeration)
        fig, ax, own = _new_figure(fig, rect, figsize)
        _draw_section(ax, res, data, fontsize)
        u = res.scene.units
        dir_txt = f"{data.direction_deg:.0f}°"
        _title(fig, ax, own, f"Section in the plane of the tilt ({dir_txt} on A)\n{data.subject.title}", fontsize)
        _footer(fig, ax, own, [data.exaggeration.label(u) + "; lengths along the axis to scale",
                               _state_line(res, data.states)], fontsize)
    return fig, data


def _hatch_region(ax, xs, zs, color, hatch, gid, alpha=1.0, z=1, fc=None):
    ax.add_patch(MplPolygon(np.column_stack((xs, zs)), closed=True, fc=fc or "none", ec=color, hatch=hatch,
                            lw=0.0, alpha=alpha, zorder=z, gid=gid))


def _narrow_dim(ax, x0, x1, y, color, lw=0.9, gid=None):
    """Dimension of a narrow width: arrows outside pointing in at the extension lines."""
    a = max(abs(x1 - x0) * 0.9, 1e-12)
    for xa, xb in ((x0 - a, x0), (x1 + a, x1)):
        ax.annotate("", xy=(xb, y), xytext=(xa, y), arrowprops=dict(arrowstyle="-|>", color=color, lw=lw, shrinkA=0,
                                                                    shrinkB=0, mutation_scale=7), gid=gid)
    ax.plot([x0, x1], [y, y], color=color, lw=lw)
    return x1 + a


def _draw_section(ax, res: SceneResult, d: SectionData, fs: float):
    from matplotlib.lines import Line2D
    from shapely.geometry import Polygon as ShPolygon

    un, std = res.scene.units, res.scene.standard
    ex = d.exaggeration
    sub = d.subject
    _clean_axes(ax)
    u = np.array([math.cos(math.radians(d.direction_deg)), math.sin(math.radians(d.direction_deg))])
    Lmax = max(f.length for f in sub.features)
    zmin = min(0.0, *(pl.zone_z[0] for pl in d.placements.values()))
    ztop = max(Lmax, max(pl.zone_z[1] for pl in d.placements.values()))
    smax = max(float(np.abs(_lateral_of(pl, f, u)[1]).max()) for f in sub.features
               for pl in [d.placements[f.id]])
    xr = ex.r_disp * 1.35 + ex.k * smax  # reach of the material
    plate = 0.14 * Lmax if sub.pin is not None else 0.0
    step = 0.09 * (ztop - zmin)
    # dimension levels: hole zone above the part; pin zone below its part (mate) or above (alone)
    top_dims = [f for f in sub.features if f.tolerance is not None and not (sub.is_mate and f.kind is Kind.PIN)]
    bot_dims = [f for f in sub.features if f.tolerance is not None and sub.is_mate and f.kind is Kind.PIN]
    ylo = min(zmin, -plate) - step * (0.9 + len(bot_dims))
    yhi = ztop + step * (0.9 + len(top_dims))
    # drawing in the middle of the axes; texts in columns left and right
    dfrac = 0.5 if _box_ratio(ax) < 1.65 else 0.4  # narrower drawing in a wide report slot
    W = max(2 * xr / dfrac, (yhi - ylo) * _box_ratio(ax))
    _fit_limits(ax, -xr - 0.22 * W, -xr + 0.78 * W, ylo, yhi, anchor=(0.5, 0.5))
    shapes = {}
    legend = []
    # ---------------------------------------------------------------- parts: hole material, pin, plate
    for f in sub.features:
        st, pl = d.states[f.id], d.placements[f.id]
        zs, s = _lateral_of(pl, f, u)
        z = np.linspace(0.0, f.length, 65)
        a = np.interp(z, zs, s)
        w = _half_width(f, st, pl)
        xl, xrr = ex.wall(a, w, -1), ex.wall(a, w, +1)
        if f.kind is Kind.HOLE:
            left = np.column_stack((np.r_[-xr, xl, -xr], np.r_[0.0, z, f.length]))
            right = np.column_stack((np.r_[xr, xrr[::-1], xr], np.r_[f.length, z[::-1], 0.0]))
            for poly, g in ((left, "l"), (right, "r")):
                ax.add_patch(MplPolygon(poly, closed=True, fc=S.PART, ec=S.TEXT, hatch="////", lw=0.0, zorder=1,
                                        gid=f"{f.id}-material-{g}"))
            ax.plot(xl, z, color=HOLE_LINE, lw=1.8, zorder=4, gid=f"{f.id}-wall")
            ax.plot(xrr, z, color=HOLE_LINE, lw=1.8, zorder=4, gid=f"{f.id}-wall")
            shapes["hole"] = (ShPolygon(left), ShPolygon(right))
            ax.text(xr - 0.1 * ex.r_disp, f.length * 0.5, "hole's part", rotation=90,
                    ha="center", va="center", fontsize=fs * 0.8,
                    bbox=dict(boxstyle="round,pad=0.15", fc=S.BACKGROUND, ec="none", alpha=0.85), zorder=3)
            legend.append(Line2D([], [], color=HOLE_LINE, lw=1.8, label=f"hole wall at {un.fmt(st.size)}"))
        else:
            body = np.column_stack((np.r_[xl, xrr[::-1]], np.r_[z, z[::-1]]))
            ax.add_patch(MplPolygon(body, closed=True, fc=S.MATE, ec=S.MATE_AXIS, lw=1.3, zorder=3,
                                    gid=f"{f.id}-wall"))
            shapes["pin"] = ShPolygon(body)
            legend.append(MplPolygon([[0, 0]], fc=S.MATE, ec=S.MATE_AXIS, label=f"pin at {un.fmt(st.size)}"))
            if sub.is_mate:
                ax.add_patch(Rectangle((-xr, -plate), 2 * xr, plate, fc=S.MATE, ec=S.MATE_AXIS, lw=0.8, alpha=0.6,
                                       hatch="\\\\\\\\", zorder=2, gid=f"{f.id}-plate"))
                ax.text(-xr * 0.62, -plate / 2, "pin's part", ha="center", va="center", fontsize=fs * 0.8,
                        bbox=dict(boxstyle="round,pad=0.15", fc=S.BACKGROUND, ec="none", alpha=0.85), zorder=3)
    # overlap, in display coordinates: the mapping is affine on each side of the axis
    interferes = d.clearance is not None and not fits(d.clearance)
    if "hole" in shapes and "pin" in shapes and interferes:
        ov = shapes["pin"].intersection(shapes["hole"][0]).union(shapes["pin"].intersection(shapes["hole"][1]))
        path = _poly_path(ov) if not ov.is_empty else None
        if path is not None:
            ax.add_patch(PathPatch(path, fc=S.INTERFERENCE, ec=S.INTERFERENCE, hatch="xxxx", lw=0.6, zorder=6,
                                   gid="overlap"))
            legend.append(MplPolygon([[0, 0]], fc=S.INTERFERENCE, hatch="xxxx", ec=S.INTERFERENCE,
                                     label="OVERLAP: pin in the hole wall"))
    # ---------------------------------------------------------------- datum A
    ax.plot([-xr * 1.04, xr * 1.04], [0, 0], color=S.DATUM, lw=2.6, zorder=5, gid="datum-A", solid_capstyle="butt")
    ax.text(-xr * 1.06, 0, "A", fontsize=fs * 1.1, weight="bold", ha="right", va="center", color=S.TEXT,
            bbox=dict(boxstyle="square,pad=0.25", fc=S.BACKGROUND, ec=S.TEXT, lw=0.9), zorder=6)
    # ---------------------------------------------------------------- zones, axes, boundaries
    hatches = {Kind.HOLE: "////", Kind.PIN: "\\\\\\\\"}
    zone_x = {}
    for f in sub.features:
        st, pl = d.states[f.id], d.placements[f.id]
        is_hole = f.kind is Kind.HOLE
        axis_col = S.AXIS if is_hole else S.MATE_AXIS
        z0, z1 = pl.zone_z
        zcol = S.PROJECTED if (f.tolerance and f.tolerance.projected) else S.ZONE
        if f.tolerance is not None:
            c = float((np.array(pl.centre) - np.array(f.at)) @ u)
            x0, x1 = float(ex.lateral(c - pl.zone_size / 2)), float(ex.lateral(c + pl.zone_size / 2))
            zone_x[f.id] = (x0, x1, z0, z1, zcol)
            ax.add_patch(Rectangle((x0, z0), x1 - x0, z1 - z0, fc=zcol, alpha=0.25, ec="none", zorder=3.5))
            ax.add_patch(Rectangle((x0, z0), x1 - x0, z1 - z0, fc="none", ec=zcol, hatch=hatches[f.kind], lw=0,
                                   alpha=0.6, zorder=3.6))
            for xx in (x0, x1):
                ax.plot([xx, xx], [z0, z1], color=zcol, lw=1.0, ls="--", zorder=7, gid=f"{f.id}-zone-limit")
            legend.append(MplPolygon([[0, 0]], fc=zcol, alpha=0.35, hatch=hatches[f.kind], ec=zcol,
                                     label=f"{f.kind.value} tolerance zone"
                                     + (" (projected)" if f.tolerance.projected else "")))
        zs, s = _lateral_of(pl, f, u)
        ax.plot(ex.lateral(s), zs, color=axis_col, lw=1.7 if is_hole else 1.4, ls="-" if is_hole else "-.",
                zorder=8, gid=f"{f.id}-axis")
        legend.append(Line2D([], [], color=axis_col, lw=1.5, ls="-" if is_hole else "-.",
                             label=f"{f.kind.value} axis, tilted across its zone"))
        b = d.boundary[f.id]
        xb = float(ex.radial(b / 2))
        bls = (0, (6, 2, 1, 2)) if is_hole else (0, (2, 1.5))
        bcol = S.VC if is_hole else S.MATE_AXIS
        zb0, zb1 = min(z0, 0.0), max(z1, f.length) if not (f.tolerance and f.tolerance.projected) else z1
        for sgn in (-1, 1):
            ax.plot([sgn * xb, sgn * xb], [zb0, zb1], color=bcol, lw=1.4, ls=bls, zorder=7, gid=f"{f.id}-boundary")
        legend.append(Line2D([], [], color=bcol, lw=1.4, ls=bls,
                             label=f"{f.kind.value} {_boundary_name(f, st, std)} ⌀{un.fmt(b)}"
                             + (" (perfect form assumed)" if _form_assumed(res, f) else "")))
    # ---------------------------------------------------------------- zone width dimensions
    for fs_list, base, sgn in ((top_dims, ztop, 1), (bot_dims, min(zmin, -plate), -1)):
        for i, f in enumerate(fs_list):
            x0, x1, z0, z1, zcol = zone_x[f.id]
            pl = d.placements[f.id]
            y = base + sgn * step * (0.9 + i)
            for xx in (x0, x1):
                ax.plot([xx, xx], [z1 if sgn > 0 else z0, y], color=zcol, lw=0.6, zorder=3)
            xe = _narrow_dim(ax, x0, x1, y, S.TEXT, gid=f"{f.id}-zone-arrows")
            sym = "⌀" if f.tolerance.zone is Zone.DIAMETER else "width "
            txt = f"{f.kind.value} zone {sym}{un.fmt(pl.zone_size)} = tolerance allowed at {un.fmt(d.states[f.id].size)}"
            # texts above the drawing run right; below it they run left (the legend sits bottom right)
            xt = xe + 0.03 * xr if sgn > 0 else x0 - (xe - x1) - 0.03 * xr
            ax.text(xt, y, txt, fontsize=fs * 0.85, ha="left" if sgn > 0 else "right", va="center",
                    gid=f"{f.id}-zone-dim", zorder=9,
                    bbox=dict(boxstyle="round,pad=0.1", fc=S.BACKGROUND, ec="none", alpha=0.9))
    # ---------------------------------------------------------------- tilt angles
    right_calls, left_calls = [], []
    for f in sub.features:
        pl = d.placements[f.id]
        col = S.AXIS if f.kind is Kind.HOLE else S.MATE_AXIS
        if pl.bowed:
            zs, s = _lateral_of(pl, f, u)
            right_calls.append(((float(ex.lateral(s[len(s) // 2])), float(zs[len(zs) // 2])),
                                f"{f.kind.value} axis bowed across its\nstraightness zone (no tilt)", col, False,
                                f"{f.id}-tilt-text"))
            continue
        if f.tolerance is None or pl.offset <= 0:
            continue
        zs, s = _lateral_of(pl, f, u)
        at_top = f.kind is Kind.PIN and sub.is_mate
        i0, i1 = (-1, 0) if at_top else (0, -1)
        vx, vz = float(ex.lateral(s[i0])), float(zs[i0])
        dx, dz = float(ex.lateral(s[i1])) - vx, float(zs[i1]) - vz
        ang_axis = math.degrees(math.atan2(dz, dx))
        ang_ref = 90.0 if dz > 0 else -90.0
        rad = 0.4 * min(abs(dz), Lmax)
        t1, t2 = sorted((ang_axis, ang_ref))
        ax.plot([vx, vx], [vz, vz + math.copysign(rad * 1.15, dz)], color=col, lw=0.7, ls=":", zorder=8)
        ax.add_patch(Arc((vx, vz), 2 * rad, 2 * rad, theta1=t1, theta2=t2, color=col, lw=1.1, zorder=8,
                         gid=f"{f.id}-tilt-arc"))
        mid = math.radians((t1 + t2) / 2)
        drawn = abs(ang_ref - ang_axis)
        txt = f"{f.kind.value} axis tilt {pl.tilt_deg:.3f}° (true)\ndrawn {drawn:.1f}° (×{ex.k:g})"
        right_calls.append(((vx + rad * math.cos(mid), vz + rad * math.sin(mid)), txt, col, False, f"{f.id}-tilt-text"))
    for f in sub.features:
        if f.tolerance is not None and f.tolerance.projected and f.id in zone_x:
            x0, x1, z0, z1, zcol = zone_x[f.id]
            right_calls.append(((x1, z0 + 0.3 * (z1 - z0)), f"projected zone {un.fmt(f.tolerance.projected)} beyond A\n"
                                "(where the mating part sits)", zcol, False, f"{f.id}-projected-text"))
    # ---------------------------------------------------------------- wall-to-wall gap
    if d.gap_per_side is not None:
        h, p = sub.hole, sub.pin
        zh, sh = _lateral_of(d.placements[h.id], h, u)
        zp, sp = _lateral_of(d.placements[p.id], p, u)
        ah, ap = float(np.interp(d.gap_z, zh, sh)), float(np.interp(d.gap_z, zp, sp))
        wh = _half_width(h, d.states[h.id], d.placements[h.id])
        wp = _half_width(p, d.states[p.id], d.placements[p.id])
        xh, xp = float(ex.wall(ah, wh, d.gap_side)), float(ex.wall(ap, wp, d.gap_side))
        zdim = d.gap_z + (-0.03 if d.gap_z > Lmax / 2 else 0.03) * Lmax
        ax.annotate("", xy=(xp, zdim), xytext=(xh, zdim),
                    arrowprops=dict(arrowstyle="<|-|>", color=S.TEXT, lw=1.1, shrinkA=0, shrinkB=0, mutation_scale=7),
                    gid="gap-dim", zorder=10)
        txt = _gap_text(un, d.clearance, interferes, "the pin hits the wall", "line-to-line:\nzero clearance")
        tip = (min(xh, xp), zdim) if d.gap_side < 0 else (max(xh, xp), zdim)
        call = (tip, txt, S.INTERFERENCE if interferes else S.TEXT, True, "gap-text")
        (left_calls if d.gap_side < 0 else right_calls).append(call)
    if ex.shortened:
        for sgn in (-1, 1):
            xb = sgn * ex.r_disp * 0.8
            zz = np.linspace(min(zmin, -plate), ztop, 13)
            ax.plot(xb + 0.04 * ex.r_disp * np.sin(np.arange(13) * 2.4), zz, color=S.TEXT, lw=0.7, zorder=9)
    tl = ax.transLimits
    _column(ax, left_calls, float(tl.transform((-xr * 1.1, 0))[0]) - 0.01, 0.25, 0.9, fs * 0.9, ha="right")
    xcol = float(tl.transform((xr, 0))[0]) + 0.03
    leg = ax.legend(handles=legend, loc="lower left", bbox_to_anchor=(xcol, 0.0), fontsize=fs * 0.72, frameon=True,
                    framealpha=0.95, edgecolor=S.PART, borderaxespad=0.0, handlelength=2.6)
    _column(ax, right_calls, xcol, _legend_top(ax, leg) + 0.04, 0.86, fs * 0.9, ha="left")


# ================================================================================= bonus chart


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
    sub = subject if isinstance(subject, Subject) else subject_of(res, subject)
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
                fontsize: float = 9.0, figsize=FIGSIZE):
    """Tolerance allowed against produced size (top) and the boundaries it gives (bottom), one
    column per feature. Returns ``(Figure, BonusData)``.

    Artists with ``gid``: "<id>-allowed" (tolerance allowed line), "<id>-size" (the produced size
    diagonal), "<id>-mating" / "<id>-opposite" (boundary lines), "<id>-produced" (marker).
    """
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
        if own:
            B = term("bonus", res.scene.standard)[0]
            _title(fig, None, True, f"{B[0].upper() + B[1:]}: tolerance allowed vs produced size\n{data.subject.title}",
                   fontsize)
    return fig, data


def _draw_bonus(ax_t, ax_b, res, f: Feature, p: BonusPanel, fs: float):
    u, std = res.scene.units, res.scene.standard
    mmc_n, lmc_n = term("mmc", std)[0], term("lmc", std)[0]
    B = term("bonus", std)[0]
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
    # ---- top: tolerance allowed
    ax_t.fill_between(p.sizes, 0, p.allowed, color=S.ZONE, alpha=0.15, lw=0)
    ax_t.plot(p.sizes, p.allowed, color=S.ZONE_AXIS, lw=2.0, gid=f"{f.id}-allowed")
    t = f.tolerance.value
    ax_t.axhline(t, color=S.TEXT, lw=0.6, ls=":")
    ymax = max(p.allowed.max(), t) * 1.35
    ax_t.set_ylim(0, ymax)
    ax_t.set_ylabel(f"tolerance\nallowed ({u.value})", fontsize=fs * 0.8)
    ax_t.plot([p.produced], [p.allowed_at_produced], "o", ms=6, mfc=S.BACKGROUND, mec=S.TEXT, mew=1.5, zorder=6,
              gid=f"{f.id}-produced")
    ax_t.annotate(f"at {u.fmt(p.produced)}: {u.fmt(p.allowed_at_produced)}",
                  xy=(p.produced, p.allowed_at_produced),
                  xytext=(0.5, 0.93), textcoords="axes fraction", ha="center", va="top", fontsize=fs * 0.82,
                  arrowprops=dict(arrowstyle="-", color=S.TEXT, lw=0.5, shrinkB=4))
    lo_lbl = {"MMC": f"t = {u.fmt(t)} at {mmc_n}", "LMC": f"t = {u.fmt(t)} at {lmc_n}", "RFS": f"t = {u.fmt(t)} at every size"}
    ax_t.text(0.5, t / ymax - 0.03, lo_lbl[p.material], transform=ax_t.transAxes, fontsize=fs * 0.75, va="top",
              ha="center")
    # ---- bottom: produced size and the boundaries
    ax_b.plot(p.sizes, p.sizes, color=S.SURFACE, lw=1.2, gid=f"{f.id}-size")
    mating_const = p.material == "MMC"
    opp_const = p.material == "LMC"
    vcn = term("vc_MMC", std)[0] if p.material == "MMC" else term("vc_LMC", std)[0]
    m_lbl = (f"{vcn} = size {'−' if f.kind is Kind.HOLE else '+'} allowed = {u.fmt(p.constant)} (constant)"
             if mating_const else f"size {'−' if f.kind is Kind.HOLE else '+'} allowed (mating side)")
    o_lbl = (f"{vcn} = size {'+' if f.kind is Kind.HOLE else '−'} allowed = {u.fmt(p.constant)} (constant)"
             if opp_const else f"size {'+' if f.kind is Kind.HOLE else '−'} allowed (other side)")
    # a side where geom finds no worst-case boundary (ISO independency: neither a modifier nor
    # the envelope bounds it) has no line: the size does not limit form there
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
    i3 = len(p.sizes) // 3
    entries = [(p.sizes[i3], "produced size", S.SURFACE), (p.mating[i3], m_lbl, S.VC), (p.opposite[i3], o_lbl, S.TEXT)]
    entries = [(min(max(yv, lo_), hi_), txt, col) for yv, txt, col in entries]  # a line not drawn: label in range
    fr = [(e[0] - lo_) / (hi_ - lo_) for e in entries]
    ys = _spread_y([f_ + 0.035 for f_ in fr], 0.03, 0.97, fs * 1.5 / (ax_b.get_position(original=True).height
                                                                    * ax_b.figure.get_figheight() * 72))
    for (yv, txt, col), yy in zip(entries, ys):
        ax_b.text(0.03, yy, txt, transform=ax_b.transAxes, ha="left", va="bottom", fontsize=fs * 0.74, color=col,
                  bbox=dict(boxstyle="round,pad=0.08", fc=S.BACKGROUND, ec="none", alpha=0.75))
    ax_b.axvline(p.produced, color=S.TEXT, lw=0.8, ls="--")
    ax_t.axvline(p.produced, color=S.TEXT, lw=0.8, ls="--")
    # the bonus bracket on the top panel: from t to t + bonus_max
    ref = f.mmc if p.material == "MMC" else f.lmc
    other = f.lmc if p.material == "MMC" else f.mmc
    if p.material in ("MMC", "LMC"):
        tb = tolerance_allowed(f, other)
        ax_t.annotate("", xy=(other, tb), xytext=(other, t),
                      arrowprops=dict(arrowstyle="<|-|>", color=S.TEXT, lw=0.8, shrinkA=0, shrinkB=0, mutation_scale=6))
        ha = "right" if other > ref else "left"
        off = -1 if other > ref else 1
        ax_t.annotate(f"{B} {u.fmt(tb - t)}", xy=(other, (t + tb) / 2), xytext=(off * 4, 0),
                      textcoords="offset points", ha=ha, va="center", fontsize=fs * 0.75)
    ax_b.set_xlim(p.sizes[0] - 0.04 * (p.sizes[-1] - p.sizes[0]), p.sizes[-1] + 0.04 * (p.sizes[-1] - p.sizes[0]))
    # name the limits on the x axis
    ax_b.set_xticks([f.limits[0], f.limits[1]])
    ax_b.set_xticklabels([f"{u.fmt(f.limits[0])}\n{mmc_n if f.limits[0] == f.mmc else lmc_n}",
                          f"{u.fmt(f.limits[1])}\n{mmc_n if f.limits[1] == f.mmc else lmc_n}"])


# ===================================================================================== helpers

VIEWS_2D = ("through", "section", "bonus")


def draw_view(name: str, res: SceneResult, subject, states=None, exaggeration=None, **kw):
    """Dispatch by view name (one of :data:`VIEWS_2D`)."""
    if name == "through":
        return through_view(res, subject, states, exaggeration, **kw)
    if name == "section":
        return section_view(res, subject, states, exaggeration, **kw)
    if name == "bonus":
        return bonus_chart(res, subject, states, **kw)
    raise ValueError(f"unknown 2D view {name!r}; expected one of {', '.join(VIEWS_2D)}")


def save_figure(fig: Figure, path, dpi: int = DPI) -> None:
    """Save with matezone's settings (TrueType text in PDF, text kept as text in SVG)."""
    with style_context():
        fig.savefig(path, dpi=dpi, facecolor=S.BACKGROUND)
