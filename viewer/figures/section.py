"""The section in the plane of the tilt: datum A, the tolerance zones, the tilted axes, hole
walls, pin, the mating (virtual-condition) boundaries; tilt angle and zone width dimensioned.
:func:`section_data` computes the true numbers; :func:`section_view` draws them, exaggerated,
in the steps of :mod:`viewer.figures.section_steps`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from matplotlib.figure import Figure

from geom.analysis import SceneResult, clearance_at
from geom.boundaries import effective_size
from geom.placement import worst_case_axis
from viewer.exaggeration import FILL, Exaggeration, features_exaggeration, range_spread

from .aids import FIGSIZE, _clean_axes, _footer, _keep_inside, _new_figure, _scale_bar, _title, style_context
from .section_steps import (
    _draw_break_marks,
    _draw_datum,
    _draw_gap,
    _draw_overlap,
    _draw_parts,
    _draw_tilts,
    _draw_zone_dims,
    _draw_zones,
    _frame,
    _half_width,
    _lateral_of,
    _place_texts,
)
from .subjects import (
    Subject,
    _state_line,
    _subject,
    _tilt_direction_deg,
    _zone_height,
    resolve_states,
)


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


def _wall_gap(sub: Subject, sts: dict, pls: dict, u: np.ndarray):
    """Smallest horizontal wall-to-wall gap of a mate over the shared length, sampled at 257
    heights: (gap per side, its height, its side +1 right / -1 left)."""
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
        return float(left[il]), float(z[il]), -1
    return float(right[ir]), float(z[ir]), 1


def section_data(res: SceneResult, subject, states=None, exaggeration: float | None = None) -> SectionData:
    """The section's true numbers and its exaggeration: unless given, k is the subject's one
    factor (:func:`viewer.exaggeration.subject_exaggeration`), the same at every what-if state
    and in the 3D scene. The diameter is drawn shortened to 0.55 of the longest length, but
    never so short that the largest deviation over the whole size range
    (:func:`viewer.exaggeration.range_spread`) drawn at k fills more than
    :data:`viewer.exaggeration.FILL` of it; the drawn radius is the same at every state."""
    sub = _subject(res, subject)
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
        gap, gap_z, side = _wall_gap(sub, sts, pls, u)
        clr = clearance_at(sub.hole, sub.pin, sts[sub.hole.id], sts[sub.pin.id])
    r0 = lead.mmc / 2.0
    L = max(max(f.length for f in sub.features), max(_zone_height(pl) for pl in pls.values()))
    k = float(exaggeration) if exaggeration else features_exaggeration(res, sub.features)
    r_disp = min(r0, max(0.55 * L, k * range_spread(sub.features, r0) / FILL))
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
        _footer(fig, ax, own, [data.exaggeration.label(u), _state_line(res, data.states)], fontsize)
        _scale_bar(ax, data.exaggeration, u, fontsize, height=0.13)
        _keep_inside(ax)
    return fig, data


def _draw_section(ax, res: SceneResult, d: SectionData, fs: float):
    """Draw the section step by step (each step in :mod:`viewer.figures.section_steps`)."""
    un = res.scene.units
    _clean_axes(ax)
    fr = _frame(ax, d)
    legend = []
    shapes = _draw_parts(ax, d, fr, un, fs, legend)
    interferes = _draw_overlap(ax, d, shapes, legend)
    _draw_datum(ax, fr, fs)
    zone_x = _draw_zones(ax, res, d, fr, legend)
    _draw_zone_dims(ax, d, fr, zone_x, un, fs)
    right_calls, left_calls = _draw_tilts(ax, d, fr, zone_x, un), []
    if d.gap_per_side is not None:
        call = _draw_gap(ax, d, fr, interferes, un)
        (left_calls if d.gap_side < 0 else right_calls).append(call)
    if d.exaggeration.shortened:
        _draw_break_marks(ax, d.exaggeration, fr)
    _place_texts(ax, fr, legend, left_calls, right_calls, fs)
