"""The through-view, looking normal to datum A: the hole's end sections, their overlap (the
clear opening, shaded), its largest inscribed circle, the pin's sections and swept envelope,
and the clearance or overlap between them. :func:`through_data` computes the true geometry
(shapely, :mod:`geom.throughview`); :func:`through_view` draws it, exaggerated.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Circle, PathPatch
from matplotlib.patches import Polygon as MplPolygon
from matplotlib.path import Path as MplPath

from geom.analysis import SceneResult, clearance_at, fits
from geom.boundaries import FeatureState, effective_size
from geom.model import Feature, Kind
from geom.placement import worst_case_axis
from geom.throughview import ThroughView, clear_opening, swept_envelope
from viewer import style as S
from viewer.exaggeration import Exaggeration, features_exaggeration

from .aids import (
    FIGSIZE,
    GUARANTEED,
    HOLE_LINE,
    OPENING_FILL,
    _box_ratio,
    _clean_axes,
    _column,
    _fit_limits,
    _footer,
    _gap_text,
    _keep_inside,
    _legend_beside,
    _new_figure,
    _poly_path,
    _scale_bar,
    _title,
    style_context,
)
from .subjects import (
    Subject,
    _boundary_name,
    _form_assumed,
    _state_line,
    _subject,
    _tilt_direction_deg,
    _zone_height,
    measured_of,
    resolve_states,
)


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
    """The through-view's true geometry and its exaggeration: unless given, k is the
    subject's one factor (:func:`viewer.exaggeration.subject_exaggeration`), the same at every
    what-if state and in the 3D scene, about the reference radius (half the lead feature's MMC)."""
    sub = _subject(res, subject)
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
    k = float(exaggeration) if exaggeration else features_exaggeration(res, sub.features)
    return ThroughData(sub, sts, hv, pv, overlap, clearance, gap, Exaggeration(k, r0, r0), segments)


def through_view(res: SceneResult, subject, states=None, exaggeration: float | None = None, *,
                 fig: Figure | None = None, rect=None, fontsize: float = 9.0, figsize=FIGSIZE, measured=None):
    """Through-view normal to datum A. Returns ``(Figure, ThroughData)``.

    ``measured``: an inspection result (geom.inspect.InspectionResult) or a
    :class:`~.subjects.Measured`: its feature is drawn at the measured envelope size with the
    tolerance allowed at it, in place of its what-if state, and the footer says so first
    ("measured: AME 8.003, tolerance allowed 0.018").

    Artists with ``gid``: "hole-section-0" / "hole-section-1" (end sections), "opening" (the
    shaded clear opening), "inscribed" (its largest inscribed circle), "pin-section-*",
    "pin-envelope" (the pin's enclosing circle), "overlap", "gap-dim".
    """
    meas = measured_of(measured)
    sub = _subject(res, subject)
    sts = resolve_states(res, sub, states)
    if meas is not None and meas.feature_id in sts:
        sts[meas.feature_id] = meas.state(sts[meas.feature_id].direction_deg)
    else:
        meas = None
    with style_context():
        data = through_data(res, sub, sts, exaggeration)
        fig, ax, own = _new_figure(fig, rect, figsize)
        _draw_through(ax, res, data, fontsize)
        u = res.scene.units
        _title(fig, ax, own, f"Through-view normal to datum A\n{sub.title}", fontsize)
        foot = [data.exaggeration.label(u), _state_line(res, data.states)]
        if meas is not None:
            foot.insert(0, meas.text(u))
        _scale_bar(ax, data.exaggeration, u, fontsize)
        so = _second_order_note(res, data)
        if so:
            foot.append(so)
        _footer(fig, ax, own, foot, fontsize)
        _keep_inside(ax)
    return fig, data


# ------------------------------------------------------------------------------------ texts


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


# ---------------------------------------------------------------------------------- drawing


def _draw_through(ax, res: SceneResult, d: ThroughData, fs: float):
    """Hole, pin, then their fit; the drawing in the left half, the texts in a column right."""
    ex = d.exaggeration
    _clean_axes(ax)
    reach = [ex.r_disp]  # drawn radii, to frame the drawing
    legend = []
    calls = []  # (target xy in data, text, colour, emphasised, gid)
    if d.hole is not None:
        _draw_hole(ax, res, d, reach, legend, calls)
    if d.pin is not None:
        _draw_pin(ax, res, d, reach, legend, calls)
    if d.hole is not None:
        legend.insert(len(d.hole.sections) + 1,
                      Line2D([], [], color=S.VC, lw=2.0, label="largest circle in the opening"))
    R = max(reach)
    if d.hole is not None and d.pin is not None:
        _draw_fit(ax, res, d, legend, calls)
    ax.plot([0], [0], marker="+", color=S.ZONE_AXIS, ms=8, mew=1.0, zorder=8)
    # the legend beside the axes (outside the drawing), then the drawing and its callouts in them
    _legend_beside(ax, legend, fs * 0.78, frameon=True, framealpha=0.95, edgecolor=S.PART, handlelength=2.4)
    W = max(2.1 * R / 0.62, 2.2 * R * _box_ratio(ax))
    _fit_limits(ax, -1.05 * R - 0.01 * W, -1.05 * R + 0.99 * W, -1.1 * R, 1.1 * R, anchor=(0.0, 0.5))
    xcol = float(ax.transLimits.transform((1.05 * R, 0))[0]) + 0.03
    _column(ax, calls, xcol, 0.06, 0.94, fs, ha="left")


def _draw_hole(ax, res, d: ThroughData, reach, legend, calls):
    """The clear opening (shaded), the end sections over it, and the opening's largest circle."""
    u, std = res.scene.units, res.scene.standard
    ex = d.exaggeration
    hv, f, st = d.hole, d.subject.hole, d.states[d.subject.hole.id]
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


def _draw_pin(ax, res, d: ThroughData, reach, legend, calls):
    """The pin's sections at both ends (filled when alone) and its enclosing circle."""
    u, std = res.scene.units, res.scene.standard
    ex = d.exaggeration
    pv, f, st = d.pin, d.subject.pin, d.states[d.subject.pin.id]
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


def _draw_fit(ax, res, d: ThroughData, legend, calls):
    """The overlap (hatched, in the interference colour) and the gap between the two circles,
    dimensioned along the hole's tilt (the narrowest way)."""
    u = res.scene.units
    ex = d.exaggeration
    interferes = d.clearance is not None and not fits(d.clearance)
    if interferes and d.overlap is not None and not d.overlap.is_empty:
        path = _poly_path(d.overlap)
        if path is not None:
            mp = MplPath(ex.map_polar(path.vertices), path.codes)
            ax.add_patch(PathPatch(mp, fc=S.INTERFERENCE, ec=S.INTERFERENCE, lw=0.5, hatch="xxxx",
                                   zorder=7, gid="overlap"))
            legend.append(MplPolygon([[0, 0]], fc=S.INTERFERENCE, hatch="xxxx", ec=S.INTERFERENCE,
                                     label="OVERLAP: pin outside the opening"))
    phi = math.radians(d.states[d.subject.hole.id].direction_deg)
    ri, ro = ex.radial(d.hole.diameter / 2), ex.radial(d.pin.diameter / 2)
    p0 = np.array([math.cos(phi), math.sin(phi)])
    a_, b_ = p0 * ri, p0 * ro
    ax.annotate("", xy=b_, xytext=a_, arrowprops=dict(arrowstyle="<|-|>", color=S.TEXT, lw=1.1, shrinkA=0,
                                                      shrinkB=0, mutation_scale=8), gid="gap-dim", zorder=9)
    txt = _gap_text(u, d.clearance, interferes, "the pin does not fit", "line-to-line: zero clearance",
                    GUARANTEED)
    tip = b_ if np.linalg.norm(b_) >= np.linalg.norm(a_) else a_
    calls.append((tuple(tip), txt, S.INTERFERENCE if interferes else S.TEXT, True, "gap-text"))
