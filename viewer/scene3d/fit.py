"""The design-intent pictures: :func:`build_mate_scene` (a hole with the mating pin placed in it,
coloured by the true clearance) and :func:`build_feature_scene` (one feature alone; with a
projected zone the mating part and the fastener on the far side of A).

Datum A is z = 0, the part occupies 0 <= z <= length, a projected zone lies at
-projected <= z <= 0 (the datum frame of :mod:`geom.placement`). Missing what-if states take
geom's worst case (:func:`geom.boundaries.worst_case_state`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geom.analysis import SceneResult, clearance_at, fits, mate_formula, mate_verdict, term
from geom.boundaries import FeatureState, effective_size, tolerance_max, worst_case_state
from geom.model import Feature, Kind
from geom.placement import worst_case_axis

from .. import style as S
from ..exaggeration import subject_exaggeration
from .assemble import _Built, _exaggeration, _finish
from .clearance import LOCAL_GAP, MateSide, _clearance_span, _mate_surface
from .feature import _boundary_labels, _datum, _feature_geometry, _part, _symbol_side
from .primitives import _block_with_hole, _polyline, _tube
from .rings import _axis_at, _rings
from .text import _boundary_terms, _feature_lines
from .values import Label, Scene3D, _Ex, _line, _surf


def build_mate_scene(res: SceneResult, mate_index: int, states: dict[str, FeatureState] | None = None,
                     exaggeration: float | None = None) -> Scene3D:
    """The hole of mate ``mate_index`` with its part, zone, actual axis, surface and boundaries,
    and the mating pin at its own worst case placed in it, coloured by the true clearance.

    ``states`` maps feature id -> FeatureState; missing features take the worst case: at MMC,
    all the tolerance allowed used, the hole tilted at 0 deg and the pin at 180 deg (adverse).
    """
    sc = res.scene
    m = sc.mates[mate_index]
    hole, pin = sc.feature(m.hole), sc.feature(m.pin)
    states = dict(states or {})
    hs = states.get(hole.id) or worst_case_state(hole, True)
    ps = states.get(pin.id) or worst_case_state(pin, True)
    worst = hs == worst_case_state(hole, True) and ps == worst_case_state(pin, True)
    k = _exaggeration(exaggeration, lambda: subject_exaggeration(res, mate_index=mate_index))
    centre = hole.at
    ex = _Ex(k, centre, hole.mmc / 2.0)
    b = _Built()
    u, std = sc.units, sc.standard

    hg = _feature_geometry(b, res, hole, hs, ex, centre, primary=True)
    pg = _feature_geometry(b, res, pin, ps, ex, centre, primary=False)
    half = _part(b, hole, hg, ex, centre, True)
    _part(b, pin, pg, ex, centre, False)
    _datum(b, hole, centre, half, max(hole.length, pin.length), _symbol_side(hs.direction_deg))
    if hole.tolerance is not None and hole.tolerance.projected:
        _projected_note(b, res, hole, hs, ex, centre)

    # the hole's sampled axis, the pin's placement points (as geom.placement gives them)
    cmin, c_tight, bar = _mate_surface(b, MateSide(hg.z, hg.axis_true, hg.r_true, hg.r_draw),
                                       MateSide(pg.z, pg.pts_true, pg.r_true, pg.r_draw), ex, u,
                                       span=_clearance_span(hole, pin))
    mr = res.mates[mate_index]
    if worst:  # geom's worst case, as the readout and `analyze` give it (a projected hole included)
        c_formula, assembles = mr.clearance_min, mr.assembles
    else:
        c_formula = clearance_at(hole, pin, hs, ps)
        assembles = fits(c_formula)
    verdict = mate_verdict(c_formula, assembles, u)
    if not worst:
        verdict = "what-if: " + verdict.replace(" in the worst case", "")
    verdict_colour = S.INTERFERENCE if not assembles else S.OK

    # boundary labels at mid-height on the far side of the tilt plane
    _boundary_labels(b, res, hg, ex, centre, hs.direction_deg, 0.62)
    _boundary_labels(b, res, pg, ex, centre, hs.direction_deg, 0.38)

    lines = _feature_lines(res, hole, hs, "hole")
    lines += _feature_lines(res, pin, ps, "pin")
    if worst:
        lines.append(mate_formula(mr, u, std) + f" {u.value}")
    else:
        lines.append(f"clearance = opening(hole) - envelope(pin) = {u.fmt(effective_size(hole, hs))} - "
                     f"{u.fmt(effective_size(pin, ps))} = {u.fmt(c_formula, signed=True)} {u.value}")
    if abs(c_tight - c_formula) >= 0.5 * 10 ** -u.decimals:
        lines.append(f"{LOCAL_GAP} (on the picture): {u.fmt(c_tight, signed=True)} {u.value}")
    mmc = term("mmc", std)[0]
    lines.append(f"(from sizes alone: {u.fmt(mr.clearance_min_size, signed=True)} {u.value}, hole {mmc} - pin {mmc})")
    for f, side in ((hole, res.features[hole.id].inner_boundary), (pin, res.features[pin.id].outer_boundary)):
        if side.value is None:  # geom's fit takes perfect form there (MateResult.assumptions)
            lines.append(f"('{f.id}': no {side.abbr(std)} on the {mmc} side; the fit assumes perfect form)")
    b.notes.append("pin drawn on the hole's true position; both seat on datum A")
    return _finish(res, b, ex, sc.title, lines, verdict, verdict_colour, hs.direction_deg, "mate",
                   (hole.id, pin.id), {hole.id: hs, pin.id: ps}, clearance=c_formula,
                   tightest=cmin, bar=bar)


def _fastener_for(res: SceneResult, f: Feature):
    """The fixed-fastener pattern the scene's fastener table pairs with a projected zone: the
    one whose projection P equals the zone height (the thickness of the part it clamps, the
    height the zone is projected by). None if no pattern is paired so: a hole that no fastener
    goes with shows no mating fastener or gap, even where the scene has some other fixed
    pattern."""
    tol = f.tolerance
    if tol is None or not tol.projected:
        return None
    same = [fr for fr in res.fasteners.values() if fr.fastener.kind == "fixed"
            and fr.fastener.projection is not None and abs(fr.fastener.projection - tol.projected) <= 1e-9]
    return same[0] if same else None


@dataclass(frozen=True)
class _ProjectedFit:
    """The fastener in the mating part's clearance hole, as :func:`_projected_note` drew it."""

    clearance: float  # mating hole VC - fastener envelope (true, diametral)
    tight: float  # clearance at the finely sampled tightest spot
    bar: dict  # the scalar bar of its colouring
    fastener: str  # the fastener pattern's id


def _projected_note(b: _Built, res: SceneResult, f: Feature, st: FeatureState, ex: _Ex,
                    centre) -> _ProjectedFit | None:
    """Projected zone: the mating part on the far side of A, with its clearance hole, and the
    fastener along the extended axis, coloured by its clearance to that hole."""
    u, std = res.scene.units, res.scene.standard
    tol = f.tolerance
    P = tol.projected
    vcn = term("vc_MMC", std)[0]
    place = worst_case_axis(f, st, samples=2)
    shift = np.array([centre[0] - f.at[0], centre[1] - f.at[1], 0.0])
    pts_true = place.points + shift
    # what the axis would do if the same zone applied over the thread length only
    L = f.length
    off = place.offset
    uvec = np.array([*place.direction, 0.0])
    ghost = np.array([np.array([*centre, 0.0]) + uvec * (-off / 2 + off * z / L) + np.array([0, 0, z])
                      for z in (-P, L)])
    b.add("projected", "axis if the zone were not projected", _polyline(ex.pts(ghost)),
          _line(S.PART, 2.0) | dict(color="#8E959C"))
    miss = off / 2 + off * P / L - off / 2
    b.notes.append(f"same zone over the thread only: the extended axis would leave it by "
                   f"{u.fmt(miss)} at the mating part's far face")
    b.labels.append(Label(tuple(ex.pts(ghost[0:1])[0]), "axis if not projected", "#5C636A", 13, layer="projected"))
    fr = _fastener_for(res, f)
    if fr is None:
        b.notes.append("no fixed fastener in the scene's table is paired with this hole (projection P "
                       "equal to the zone's height): the mating part and fastener are not drawn")
        b.key("projected zone region", S.PROJECTED, "projected")
        return None
    fa = fr.fastener
    T = fr.position_tolerance.value
    vc_hole = fa.hole - T  # the mating clearance hole's virtual condition H - T
    rc_true = vc_hole / 2.0
    half = 1.3 * max(ex.R0, ex.r(rc_true)) + 0.45 * ex.R0
    rings = _rings(np.array([[centre[0], centre[1], -P], [centre[0], centre[1], 0.0]]), ex.r(rc_true))
    b.add("projected", "mating part", _block_with_hole(rings[0], rings[-1], centre, half, -P, 0.0),
          _surf(S.PROJECTED, 0.10, smooth_shading=False))
    b.add("projected", "mating clearance hole VC", _tube(rings), _surf(S.PROJECTED, 0.22))
    b.key(f"mating part: clearance hole at its {vcn} (H - T)", S.PROJECTED, "projected")
    # fastener of size F about the extended axis, through the mating part
    hole = MateSide(z=(-P, 0.0), axis=np.array([[centre[0], centre[1], -P], [centre[0], centre[1], 0.0]]),
                    r_true=rc_true, r_draw=ex.r(rc_true))
    fastener = MateSide(z=(-P, 0.0), axis=_axis_at(pts_true, np.array([-P, 0.0])), r_true=fa.fastener / 2.0,
                        r_draw=ex.r(fa.fastener / 2.0))
    t_max = tolerance_max(f)  # the fastener follows the hole's axis, within its zone
    _cmin, c_tight, bar = _mate_surface(b, hole, fastener, ex, u, tag_hole="mating hole", tag_pin="fastener",
                                        mate_layer="projected",
                                        span=(vc_hole - fa.fastener - t_max, vc_hole - fa.fastener + t_max))
    c = vc_hole - (fa.fastener + place.offset)
    b.notes.append(f"fastener F {u.fmt(fa.fastener)} in the projected zone: envelope F + t = "
                   f"{u.fmt(fa.fastener + place.offset)}; mating hole {vcn} = H - T = {u.fmt(fa.hole)} - {u.fmt(T)} = "
                   f"{u.fmt(vc_hole)}; clearance {u.fmt(c, signed=True)} {u.value}")
    return _ProjectedFit(clearance=c, tight=c_tight, bar=bar, fastener=fa.id)


def build_feature_scene(res: SceneResult, feature_id: str, state: FeatureState | None = None,
                        exaggeration: float | None = None) -> Scene3D:
    """One feature alone: its part, datum A, zone, actual axis, surface and boundaries; with a
    projected zone also the mating part and fastener on the far side of A (if the scene has a
    fixed-fastener pattern to take them from)."""
    sc = res.scene
    f = sc.feature(feature_id)
    st = state or worst_case_state(f)
    worst = st == worst_case_state(f)
    k = _exaggeration(exaggeration, lambda: subject_exaggeration(res, feature_id=feature_id))
    centre = f.at
    ex = _Ex(k, centre, f.mmc / 2.0)
    b = _Built()
    u, std = sc.units, sc.standard
    g = _feature_geometry(b, res, f, st, ex, centre, primary=True)
    half = _part(b, f, g, ex, centre, True)
    _datum(b, f, centre, half, f.length, _symbol_side(st.direction_deg))
    _boundary_labels(b, res, g, ex, centre, st.direction_deg, 0.5)
    lines = _feature_lines(res, f, st, f.kind.value)
    eff = effective_size(f, st)
    what = "clear opening" if f.kind is Kind.HOLE else "envelope"
    lines.append(f"{what} normal to A at this state: {u.fmt(eff)} {u.value}")
    verdict, colour, clearance, bar, tight = "", S.TEXT, None, None, None
    if f.tolerance is not None and f.tolerance.projected:
        out = _projected_note(b, res, f, st, ex, centre)
        if out is not None:
            clearance, tight, bar = out.clearance, out.tight, out.bar
            ok = fits(clearance)
            verdict = (("fastener CLEARS the mating hole by " if ok else "fastener JAMS in the mating hole by ")
                       + f"{u.fmt(abs(clearance))} {u.value}" + ("" if worst else " (what-if)"))
            colour = S.OK if ok else S.INTERFERENCE
    if not verdict:
        (mname, mval), _ = _boundary_terms(res, f)
        if mval is not None:
            verdict = f"worst-case mating boundary {mname} \u00d8{u.fmt(mval)} {u.value}"
        else:  # no boundary on the mating side: say why (geom's note)
            fr = res.features[f.id]
            verdict = (fr.inner_boundary if f.kind is Kind.HOLE else fr.outer_boundary).formula(u, std)
    return _finish(res, b, ex, sc.title, lines, verdict, colour, st.direction_deg, "feature", (f.id,),
                   {f.id: st}, clearance=clearance, tightest=tight, bar=bar)
