"""The steps of the section drawing (:func:`viewer.figures.section.section_view`), in the
order they draw: the frame (extent and limits), the parts (hole material, pin, the pin's
plate), their overlap, datum A, the zones with the axes and boundaries, the zone-width
dimensions, the tilt angles, the wall-to-wall gap, the break marks of a shortened diameter,
and the texts placed in columns beside the drawing. Also the section's two geometric helpers:
an axis as lateral offsets in the section plane, and the horizontal half-width of a wall.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from matplotlib.lines import Line2D
from matplotlib.patches import Arc, PathPatch, Rectangle
from matplotlib.patches import Polygon as MplPolygon

from geom.analysis import fits
from geom.boundaries import FeatureState
from geom.model import Feature, Kind, Zone
from geom.placement import AxisPlacement
from viewer import style as S

from .aids import (
    GUARANTEED,
    HOLE_LINE,
    _box_ratio,
    _column,
    _fit_limits,
    _gap_text,
    _legend_beside,
    _narrow_dim,
    _poly_path,
)
from .subjects import _boundary_name, _form_assumed

if TYPE_CHECKING:
    from .section import SectionData

_HATCHES = {Kind.HOLE: "////", Kind.PIN: "\\\\\\\\"}
_LABEL_BOX = dict(boxstyle="round,pad=0.15", fc=S.BACKGROUND, ec="none", alpha=0.85)


def _lateral_of(pl: AxisPlacement, f: Feature, u: np.ndarray):
    """The axis points as (z, lateral offset along ``u`` from the basic location)."""
    pts = pl.points
    s = (pts[:, 0] - f.at[0]) * u[0] + (pts[:, 1] - f.at[1]) * u[1]
    return pts[:, 2], s


def _half_width(f: Feature, st: FeatureState, pl: AxisPlacement) -> float:
    """Horizontal half-width of the wall in the section: d / (2 cos(theta)) for a tilted axis."""
    return st.size / (2.0 * math.cos(math.radians(pl.tilt_deg)))


@dataclass(frozen=True)
class _Frame:
    """Where the section's pieces go (display units; z true)."""

    u: np.ndarray  # unit vector of the section plane on A
    Lmax: float  # longest feature
    zmin: float  # lowest zone end (below A for a projected zone)
    ztop: float  # top of the drawing (features and zones)
    xr: float  # half-width of the drawn material
    plate: float  # thickness of the pin's part under A (0 without a pin)
    step: float  # spacing of the dimension levels
    top_dims: tuple  # features whose zone width is dimensioned above the drawing
    bot_dims: tuple  # ... below it (the pin of a mate)
    ylo: float  # bottom of the drawing's limits (dimension levels included)
    yhi: float  # top of them


def _frame(ax, d: SectionData) -> _Frame:
    """Measure the drawing and set the axes' limits: the drawing in the middle, texts beside."""
    ex, sub = d.exaggeration, d.subject
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
    top_dims = tuple(f for f in sub.features if f.tolerance is not None and not (sub.is_mate and f.kind is Kind.PIN))
    bot_dims = tuple(f for f in sub.features if f.tolerance is not None and sub.is_mate and f.kind is Kind.PIN)
    ylo = min(zmin, -plate) - step * (0.9 + len(bot_dims))
    yhi = ztop + step * (0.9 + len(top_dims))
    fr = _Frame(u, Lmax, zmin, ztop, xr, plate, step, top_dims, bot_dims, ylo, yhi)
    _limits(ax, fr)
    return fr


def _limits(ax, fr: _Frame, left: float = 0.22, right: float = 0.0) -> None:
    """The section's limits for the axes' shape: the drawing in the middle, texts beside (at
    least ``left`` and ``right`` of the width kept for them, axes fractions)."""
    dfrac = 0.5 if _box_ratio(ax) < 1.65 else 0.4  # narrower drawing in a wide report slot
    dfrac = max(0.4, min(dfrac, 1.0 - left - right))  # the drawing keeps 0.4 of the width at least
    W = max(2 * fr.xr / dfrac, (fr.yhi - fr.ylo) * _box_ratio(ax))
    _fit_limits(ax, -fr.xr - left * W, -fr.xr + (1 - left) * W, fr.ylo, fr.yhi, anchor=(0.5, 0.5))


def _column_share(ax, calls: list, fs: float) -> float:
    """About the share of the axes' width a column of these callouts takes (their longest line
    at an average glyph width of 0.55 em, common practice, no source), with its arrow's room."""
    if not calls:
        return 0.0
    chars = max(len(line) for c in calls for line in c[1].splitlines())
    w_pt = ax.get_position(original=True).width * ax.figure.get_figwidth() * 72.0
    return (0.55 * fs * chars + 10.0) / w_pt


def _draw_parts(ax, d: SectionData, fr: _Frame, un, fs: float, legend: list) -> dict:
    """Hole material with its walls, the pin's body and (in a mate) its plate under A. Returns
    the drawn shapes (shapely, display units): "hole" (left, right material), "pin"."""
    from shapely.geometry import Polygon as ShPolygon

    ex, sub, xr = d.exaggeration, d.subject, fr.xr
    shapes = {}
    for f in sub.features:
        st, pl = d.states[f.id], d.placements[f.id]
        zs, s = _lateral_of(pl, f, fr.u)
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
                    ha="center", va="center", fontsize=fs * 0.8, bbox=_LABEL_BOX, zorder=3)
            legend.append(Line2D([], [], color=HOLE_LINE, lw=1.8, label=f"hole wall at {un.fmt(st.size)}"))
        else:
            body = np.column_stack((np.r_[xl, xrr[::-1]], np.r_[z, z[::-1]]))
            ax.add_patch(MplPolygon(body, closed=True, fc=S.MATE, ec=S.MATE_AXIS, lw=1.3, zorder=3,
                                    gid=f"{f.id}-wall"))
            shapes["pin"] = ShPolygon(body)
            legend.append(MplPolygon([[0, 0]], fc=S.MATE, ec=S.MATE_AXIS, label=f"pin at {un.fmt(st.size)}"))
            if sub.is_mate:
                ax.add_patch(Rectangle((-xr, -fr.plate), 2 * xr, fr.plate, fc=S.MATE, ec=S.MATE_AXIS, lw=0.8,
                                       alpha=0.6, hatch="\\\\\\\\", zorder=2, gid=f"{f.id}-plate"))
                ax.text(-xr * 0.62, -fr.plate / 2, "pin's part", ha="center", va="center", fontsize=fs * 0.8,
                        bbox=_LABEL_BOX, zorder=3)
    return shapes


def _draw_overlap(ax, d: SectionData, shapes: dict, legend: list) -> bool:
    """The pin inside the hole wall, hatched in the interference colour; computed in display
    coordinates (the mapping is affine on each side of the axis). Returns: does it interfere."""
    interferes = d.clearance is not None and not fits(d.clearance)
    if "hole" in shapes and "pin" in shapes and interferes:
        ov = shapes["pin"].intersection(shapes["hole"][0]).union(shapes["pin"].intersection(shapes["hole"][1]))
        path = _poly_path(ov) if not ov.is_empty else None
        if path is not None:
            ax.add_patch(PathPatch(path, fc=S.INTERFERENCE, ec=S.INTERFERENCE, hatch="xxxx", lw=0.6, zorder=6,
                                   gid="overlap"))
            legend.append(MplPolygon([[0, 0]], fc=S.INTERFERENCE, hatch="xxxx", ec=S.INTERFERENCE,
                                     label="OVERLAP: pin in the hole wall"))
    return interferes


def _draw_datum(ax, fr: _Frame, fs: float):
    xr = fr.xr
    ax.plot([-xr * 1.04, xr * 1.04], [0, 0], color=S.DATUM, lw=2.6, zorder=5, gid="datum-A", solid_capstyle="butt")
    ax.text(-xr * 1.06, 0, "A", fontsize=fs * 1.1, weight="bold", ha="right", va="center", color=S.TEXT,
            bbox=dict(boxstyle="square,pad=0.25", fc=S.BACKGROUND, ec=S.TEXT, lw=0.9), zorder=6)


def _draw_zones(ax, res, d: SectionData, fr: _Frame, legend: list) -> dict:
    """Each feature's tolerance zone (shaded, hatched, limits dashed), its axis and its
    mating-side boundary lines. Returns feature id -> (x0, x1, z0, z1, colour) of the zones."""
    un, std = res.scene.units, res.scene.standard
    ex = d.exaggeration
    zone_x = {}
    for f in d.subject.features:
        st, pl = d.states[f.id], d.placements[f.id]
        is_hole = f.kind is Kind.HOLE
        axis_col = S.AXIS if is_hole else S.MATE_AXIS
        z0, z1 = pl.zone_z
        zcol = S.PROJECTED if (f.tolerance and f.tolerance.projected) else S.ZONE
        if f.tolerance is not None:
            c = float((np.array(pl.centre) - np.array(f.at)) @ fr.u)
            x0, x1 = float(ex.lateral(c - pl.zone_size / 2)), float(ex.lateral(c + pl.zone_size / 2))
            zone_x[f.id] = (x0, x1, z0, z1, zcol)
            ax.add_patch(Rectangle((x0, z0), x1 - x0, z1 - z0, fc=zcol, alpha=0.25, ec="none", zorder=3.5))
            ax.add_patch(Rectangle((x0, z0), x1 - x0, z1 - z0, fc="none", ec=zcol, hatch=_HATCHES[f.kind], lw=0,
                                   alpha=0.6, zorder=3.6))
            for xx in (x0, x1):
                ax.plot([xx, xx], [z0, z1], color=zcol, lw=1.0, ls="--", zorder=7, gid=f"{f.id}-zone-limit")
            legend.append(MplPolygon([[0, 0]], fc=zcol, alpha=0.35, hatch=_HATCHES[f.kind], ec=zcol,
                                     label=f"{f.kind.value} tolerance zone"
                                     + (" (projected)" if f.tolerance.projected else "")))
        zs, s = _lateral_of(pl, f, fr.u)
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
    return zone_x


def _draw_zone_dims(ax, d: SectionData, fr: _Frame, zone_x: dict, un, fs: float):
    """Zone widths dimensioned (true values) on levels above and below the drawing."""
    for fs_list, base, sgn in ((fr.top_dims, fr.ztop, 1), (fr.bot_dims, min(fr.zmin, -fr.plate), -1)):
        for i, f in enumerate(fs_list):
            x0, x1, z0, z1, zcol = zone_x[f.id]
            pl = d.placements[f.id]
            y = base + sgn * fr.step * (0.9 + i)
            for xx in (x0, x1):
                ax.plot([xx, xx], [z1 if sgn > 0 else z0, y], color=zcol, lw=0.6, zorder=3)
            xe = _narrow_dim(ax, x0, x1, y, S.TEXT, gid=f"{f.id}-zone-arrows")
            sym = "⌀" if f.tolerance.zone is Zone.DIAMETER else "width "
            txt = f"{f.kind.value} zone {sym}{un.fmt(pl.zone_size)} = tolerance allowed at {un.fmt(d.states[f.id].size)}"
            # texts above the drawing run right; below it they run left (the legend sits bottom right)
            xt = xe + 0.03 * fr.xr if sgn > 0 else x0 - (xe - x1) - 0.03 * fr.xr
            ax.text(xt, y, txt, fontsize=fs * 0.85, ha="left" if sgn > 0 else "right", va="center",
                    gid=f"{f.id}-zone-dim", zorder=9,
                    bbox=dict(boxstyle="round,pad=0.1", fc=S.BACKGROUND, ec="none", alpha=0.9))


def _draw_tilts(ax, d: SectionData, fr: _Frame, zone_x: dict, un) -> list:
    """Tilt arcs between each axis and the normal to A (true and drawn angle in the text), a
    note for a bowed axis, a note for a projected zone. Returns their callouts (right column)."""
    ex, sub = d.exaggeration, d.subject
    calls = []
    for f in sub.features:
        pl = d.placements[f.id]
        col = S.AXIS if f.kind is Kind.HOLE else S.MATE_AXIS
        if pl.bowed:
            zs, s = _lateral_of(pl, f, fr.u)
            calls.append(((float(ex.lateral(s[len(s) // 2])), float(zs[len(zs) // 2])),
                          f"{f.kind.value} axis bowed across its\nstraightness zone (no tilt)", col, False,
                          f"{f.id}-tilt-text"))
            continue
        if f.tolerance is None or pl.offset <= 0:
            continue
        zs, s = _lateral_of(pl, f, fr.u)
        at_top = f.kind is Kind.PIN and sub.is_mate
        i0, i1 = (-1, 0) if at_top else (0, -1)
        vx, vz = float(ex.lateral(s[i0])), float(zs[i0])
        dx, dz = float(ex.lateral(s[i1])) - vx, float(zs[i1]) - vz
        ang_axis = math.degrees(math.atan2(dz, dx))
        ang_ref = 90.0 if dz > 0 else -90.0
        rad = 0.4 * min(abs(dz), fr.Lmax)
        t1, t2 = sorted((ang_axis, ang_ref))
        ax.plot([vx, vx], [vz, vz + math.copysign(rad * 1.15, dz)], color=col, lw=0.7, ls=":", zorder=8)
        ax.add_patch(Arc((vx, vz), 2 * rad, 2 * rad, theta1=t1, theta2=t2, color=col, lw=1.1, zorder=8,
                         gid=f"{f.id}-tilt-arc"))
        mid = math.radians((t1 + t2) / 2)
        drawn = abs(ang_ref - ang_axis)
        txt = f"{f.kind.value} axis tilt {pl.tilt_deg:.3f}° (true)\ndrawn {drawn:.1f}° (×{ex.k:g})"
        calls.append(((vx + rad * math.cos(mid), vz + rad * math.sin(mid)), txt, col, False, f"{f.id}-tilt-text"))
    for f in sub.features:
        if f.tolerance is not None and f.tolerance.projected and f.id in zone_x:
            x0, x1, z0, z1, zcol = zone_x[f.id]
            calls.append(((x1, z0 + 0.3 * (z1 - z0)), f"projected zone {un.fmt(f.tolerance.projected)} beyond A\n"
                          "(where the mating part sits)", zcol, False, f"{f.id}-projected-text"))
    return calls


def _draw_gap(ax, d: SectionData, fr: _Frame, interferes: bool, un):
    """The smallest wall-to-wall gap (or overlap) of a mate, dimensioned where it occurs.
    Returns its callout, for the column on the side where it is."""
    ex, sub = d.exaggeration, d.subject
    h, p = sub.hole, sub.pin
    zh, sh = _lateral_of(d.placements[h.id], h, fr.u)
    zp, sp = _lateral_of(d.placements[p.id], p, fr.u)
    ah, ap = float(np.interp(d.gap_z, zh, sh)), float(np.interp(d.gap_z, zp, sp))
    wh = _half_width(h, d.states[h.id], d.placements[h.id])
    wp = _half_width(p, d.states[p.id], d.placements[p.id])
    xh, xp = float(ex.wall(ah, wh, d.gap_side)), float(ex.wall(ap, wp, d.gap_side))
    zdim = d.gap_z + (-0.03 if d.gap_z > fr.Lmax / 2 else 0.03) * fr.Lmax
    ax.annotate("", xy=(xp, zdim), xytext=(xh, zdim),
                arrowprops=dict(arrowstyle="<|-|>", color=S.TEXT, lw=1.1, shrinkA=0, shrinkB=0, mutation_scale=7),
                gid="gap-dim", zorder=10)
    txt = _gap_text(un, d.clearance, interferes, "the pin hits the wall", "line-to-line:\nzero clearance",
                    GUARANTEED)
    tip = (min(xh, xp), zdim) if d.gap_side < 0 else (max(xh, xp), zdim)
    return (tip, txt, S.INTERFERENCE if interferes else S.TEXT, True, "gap-text")


def _draw_break_marks(ax, ex, fr: _Frame):
    """Wavy lines across a diameter drawn shortened (not to scale)."""
    for sgn in (-1, 1):
        xb = sgn * ex.r_disp * 0.8
        zz = np.linspace(min(fr.zmin, -fr.plate), fr.ztop, 13)
        ax.plot(xb + 0.04 * ex.r_disp * np.sin(np.arange(13) * 2.4), zz, color=S.TEXT, lw=0.7, zorder=9)


def _place_texts(ax, fr: _Frame, legend: list, left_calls: list, right_calls: list, fs: float):
    """The legend beside the axes (outside the drawing, the limits fitted again to the narrowed
    axes), then the callouts in a column left of the drawing and right of it."""
    xr = fr.xr
    _legend_beside(ax, legend, fs * 0.72, frameon=True, framealpha=0.95, edgecolor=S.PART, handlelength=2.6)
    left = min(0.3, max(0.22, _column_share(ax, left_calls, fs * 0.9) + 0.02))
    _limits(ax, fr, left, _column_share(ax, right_calls, fs * 0.9) + 0.03)
    tl = ax.transLimits
    _column(ax, left_calls, float(tl.transform((-xr * 1.1, 0))[0]) - 0.01, 0.25, 0.9, fs * 0.9, ha="right")
    xcol = float(tl.transform((xr, 0))[0]) + 0.03
    _column(ax, right_calls, xcol, 0.1, 0.86, fs * 0.9, ha="left")
