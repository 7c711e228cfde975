"""The 3D picture of a measured feature: :func:`build_inspection_scene`, in phases (the tilt
plane, the layers of :mod:`.measured`, the readouts, the verdict lines), and the exaggeration
it picks (:func:`_inspection_exaggeration`).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from geom.analysis import SceneResult, term
from geom.conformance import Outcome, readings_disagree
from geom.model import Kind, Standard

from .. import style as S
from ..exaggeration import auto_exaggeration, nice_floor
from .assemble import _Built, _exaggeration, _finish
from .measured import (
    _axis_layers,
    _datum_beyond,
    _envelope_layers,
    _outside_layer,
    _points_layer,
    _Readings,
    _readings,
    _vc_layer,
    _zone_layer,
    _zone_placement,
)
from .rings import _axis_at
from .text import _envelope_names, _frame_text, _latin, _word
from .values import Scene3D, _Ex


def _inspection_exaggeration(res: SceneResult, insp) -> float:
    """The feature's usual exaggeration (:func:`auto_exaggeration`), lowered (to a round number)
    if the measured part departs so far that a drawn point, envelope or median-line offset would
    move more than half the reference radius."""
    f = insp.feature
    k = auto_exaggeration(res, feature_id=f.id)
    R0 = f.mmc / 2.0
    c = np.array(f.at, float)
    far = []
    if insp.points is not None and len(insp.points):
        far.append(float(np.abs(np.hypot(*(insp.points[:, :2] - c).T) - R0).max()))
    for e in (insp.unrelated, insp.related):
        if e is not None:
            off = max(math.hypot(*(np.array(e.at_z(z)) - c)) for z in (0.0, f.length))
            far.append(abs(e.diameter / 2 - R0) + off)
    if insp.median_line is not None and len(insp.median_line):
        far.append(float(np.hypot(*(insp.median_line[:, :2] - c).T).max()))
    if insp.tolerance_allowed is not None:
        far.append(insp.tolerance_allowed)
    if insp.virtual_condition is not None:
        far.append(abs(insp.virtual_condition / 2 - R0))
    m = max(far, default=0.0)
    if m > 0 and k * m > 0.5 * R0:
        k = nice_floor(0.5 * R0 / m)
    return k


def _tilt_plane(insp) -> tuple[np.ndarray | None, str, float]:
    """(zone axis or None, where the zone is, direction of the tilt plane in degrees): the plane
    of the pictures runs towards the median line's largest departure from the zone axis."""
    f = insp.feature
    zone_axis, zone_where = (None, "")
    if f.tolerance is not None and insp.tolerance_allowed is not None:
        zone_axis, zone_where = _zone_placement(f, insp)
    direction_deg = 0.0
    line = insp.median_line
    if line is not None and len(line):
        ref = zone_axis[0, :2] if zone_axis is not None else np.array(f.at, float)
        if zone_axis is not None and zone_axis[0, 2] != zone_axis[1, 2]:
            ref = _axis_at(zone_axis, line[:, 2])[:, :2]
        off = line[:, :2] - ref
        i = int(np.argmax(np.hypot(off[:, 0], off[:, 1])))
        if np.hypot(*off[i]) > 1e-12:
            direction_deg = math.degrees(math.atan2(off[i, 1], off[i, 0]))
    return zone_axis, zone_where, direction_deg


def _readout_lines(insp, std, u, rd: _Readings) -> list[str]:
    """The numbers on the picture: the frame, the limits, the data, the envelopes, the bonus
    basis, geom's formulas and the axis readings (which governs)."""
    f = insp.feature
    fmt = u.fmt
    hole = f.kind is Kind.HOLE
    lines = [f"{'HOLE' if hole else 'PIN'} '{f.id}' as measured",
             f"  {_frame_text(f, u)}",
             f"  limits {fmt(f.limits[0])} - {fmt(f.limits[1])} {u.value}"]
    if insp.source == "points" and insp.points is not None:
        lines.append(f"  {len(insp.points)} points in {len(insp.sections)} sections"
                     + (f", U = {fmt(insp.uncertainty)} (k = 2)" if insp.uncertainty is not None else ", no U given"))
    else:
        lines.append("  typed values"
                     + (f", U = {fmt(insp.uncertainty)} (k = 2)" if insp.uncertainty is not None else ""))
    for e in (insp.unrelated, insp.related):
        if e is not None:
            how = f"tilt {e.tilt_deg:.3f} deg" if e.constraint != "typed value" else "typed"
            if e.constraint.startswith("normal to A"):
                how = e.constraint.split(";")[0]
            lines.append(f"  {_envelope_names(e, std, hole)[1]} \u00d8{fmt(e.diameter)}  ({how})")
    if insp.bonus is not None:
        B = term("bonus", std)[0]
        basis = insp.bonus_basis
        if std is Standard.ISO:
            basis = {"unrelated": "unconstrained", "related": "constrained"}.get(basis, basis) + " associated cylinder"
        else:
            basis += " envelope"
        lines.append(f"  {B} basis: {basis}")
    lines += [f"  {_latin(x)}" for x in insp.formulas]
    allowed = rd.shown.get("allowed", "")
    governing, other = rd.governing, rd.other
    if governing is not None and governing.deviation is not None:
        if other is None:
            lines.append(f"  axis reading: {governing.basis} {rd.needs(governing)}"
                         + (f" (tolerance allowed {allowed})" if allowed else ""))
        else:
            lines.append("  axis readings" + (f" (tolerance allowed {allowed})" if allowed else "") + ":")
            lines.append(f"    {governing.basis} {rd.needs(governing)} (governs)")
            lines.append(f"    {other.basis} {rd.needs(other)} (does not govern)")
    return lines


def _verdict_lines(b: _Built, insp) -> tuple[list[tuple[str, str]], str, str]:
    """(verdict lines with their colours, the headline, its colour): the size, axis and surface
    checks, the reading that does not govern (neutral), and why the headline says what it
    says; geom's notes on the verdict go to ``b``'s notes."""
    checks = [(insp.size_check, None), (insp.axis_check, None), (insp.surface_check, None)]
    if insp.other_axis_check is not None:
        checks.append((insp.other_axis_check, "does not govern"))
    wide = max(len(_word(c)[0]) for c, _ in checks) + 2
    verdicts = []
    for c, tag in checks:
        word, colour = _word(c)
        name = "axis" if tag else c.name
        text = f"{name:<8}{word:<{wide}}{c.detail}"
        if c.evaluated and (c.uncertainty is None or c.outcome is Outcome.NOT_PROVEN):
            # with U stated, CONFORMS / DOES NOT CONFORM already say "proven"
            text += f"  [{c.outcome_text if c.uncertainty is not None else c.rule}]"
        if tag:  # the reading that does not govern: shown for information, in a neutral colour
            text += f"  {tag}"
            colour = S.NEUTRAL
        verdicts.append((_latin(text), colour))
    pv_ = insp.verdict
    headline, head_colour = ("", S.TEXT) if pv_ is None else (_latin(pv_.headline), S.ROLE_COLOUR[pv_.role])
    if pv_ is not None:
        if pv_.why:  # which readings decide the headline, and why
            verdicts.append((_latin(pv_.why), S.TEXT))
        b.notes += [_latin(n) for n in pv_.notes]
    if insp.axis_governs:
        b.notes.append(_latin(insp.axis_governs))
    if insp.explanation and readings_disagree(insp.axis_check, insp.surface_check):
        b.notes.append(_latin(insp.explanation[0]))
    return verdicts, headline, head_colour


def build_inspection_scene(res: SceneResult, insp, exaggeration: float | None = None) -> Scene3D:
    """A measured feature in 3D, in the datum frame with datum A (z = 0).

    ``insp`` is the :class:`geom.inspect.InspectionResult` of one feature of ``res.scene``.
    Layers: "points" (the measured points, scalars ``radial_deviation``: their true distance from
    the least-squares cylinder, + outward, shown with a diverging colour map symmetric about 0
    and a scalar bar), "median_line" (the section centres as a polyline with its points, and for
    a projected zone the line the reading was taken on), "axis" (where it governs, ASME position
    and orientation: the feature axis, the axis of the unrelated envelope), "envelopes" (the
    unrelated envelope as a translucent surface, the related one as a dashed wireframe, named in
    the standard's terms by geom.inspect), "zone" (the tolerance zone at the tolerance allowed:
    t + the bonus / increase earned; at the true position for position, floating where the
    governing axis reading places it for orientation), "zone_axis", "vc" (the virtual-condition
    boundary, coaxial with the related envelope: the gauge pin that must enter), "datum".

    Text: ``verdict`` is geom's one overall verdict, ``insp.verdict.headline`` word for word, in
    the colour of its role (style.ROLE_COLOUR); ``verdicts`` are the size, axis and surface checks
    (word and colour role from geom.conformance.verdict_word) and, where there is one, the axis
    reading that does not govern (labelled so, in a neutral colour); the readouts give both axis
    readings and which governs (``insp.axis.basis``).

    The radial exaggeration k works as in the rest of the package: radii r are drawn as
    R0 + k (r - R0) about R0 = MMC / 2, lateral offsets of axes and centres x k, lengths along
    the axis true; a point's radial deviation is drawn x k about the drawn least-squares axis.
    ``exaggeration=None`` picks k (:func:`_inspection_exaggeration`); 1.0 draws true geometry.
    Scalars, readouts and verdicts are always the true values of ``insp``.
    """
    sc = res.scene
    f = insp.feature
    u, std = sc.units, sc.standard
    k = _exaggeration(exaggeration, lambda: _inspection_exaggeration(res, insp))
    ex = _Ex(k, f.at, f.mmc / 2.0)
    b = _Built()

    zone_axis, zone_where, direction_deg = _tilt_plane(insp)
    phi = math.radians(direction_deg)
    v = np.array([-math.sin(phi), math.cos(phi), 0.0])  # normal to the cut plane, towards the half it keeps

    bar = _points_layer(b, insp, ex, f.at, u)
    rd = _readings(insp, std, u)
    _axis_layers(b, insp, ex, rd, v)
    labels_at = iter(((0.30, 28.0), (0.55, 0.0), (0.80, -28.0)))  # (height / length, angle from the tilt)
    _envelope_layers(b, insp, ex, u, std, phi, labels_at)
    if zone_axis is not None:
        _zone_layer(b, insp, ex, u, std, zone_axis, zone_where, v)
        _outside_layer(b, insp, ex, zone_axis)
    if insp.virtual_condition is not None:
        _vc_layer(b, res, insp, ex, phi, labels_at)
    _datum_beyond(b, insp, ex, direction_deg)

    lines = _readout_lines(insp, std, u, rd)
    verdicts, headline, head_colour = _verdict_lines(b, insp)
    sc3 = _finish(res, b, ex, sc.title, lines, headline, head_colour, direction_deg, "inspection", (f.id,), {},
                  bar=bar)
    detail = ("deviations, sizes, offsets, colours and numbers true" if k == 1.0 else
              "deviations, sizes, offsets drawn at this factor; colours and numbers true")
    caption = sc3.scale_text + "\n" + detail
    return replace(sc3, caption=caption, verdicts=tuple(verdicts))
