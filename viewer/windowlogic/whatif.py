"""The what-if: each feature's state (produced size, share of the tolerance used, tilt direction),
the readout rows of a feature at its state, and the fit of a mate at the states set. Every number
comes from geom; here it is only put into words."""

from __future__ import annotations

import math
from dataclasses import dataclass

from geom import boundaries as B
from geom.analysis import (
    Derived,
    SceneResult,
    clearance_at,
    fits,
    mate_formula,
    mate_verdict,
    term,
    tolerance_allowed_derived,
)
from geom.model import Feature, Material, Scene

from .fields import plain

# ---------------------------------------------------------------- states


def moved_state(f: Feature, old: B.FeatureState, size: float | None = None, share: float | None = None,
                direction_deg: float | None = None) -> B.FeatureState:
    """``old`` with the values given changed: size clamped to the feature's limits, share to
    0..1, direction taken modulo 360 degrees."""
    lo, hi = f.limits
    return B.FeatureState(
        old.size if size is None else min(max(float(size), lo), hi),
        old.share if share is None else min(max(float(share), 0.0), 1.0),
        old.direction_deg if direction_deg is None else float(direction_deg) % 360.0,
    )


def measured_datum_sizes(scene: Scene) -> dict[str, float]:
    """Feature id -> the produced size a measured pattern gives for that datum feature."""
    letters = {d.letter: d.feature for d in scene.datums if d.feature is not None}
    out: dict[str, float] = {}
    for p in scene.patterns:
        for letter, size in p.datum_sizes:
            if letter in letters:
                out.setdefault(letters[letter], float(size))
    return out


def pattern_datum_features(scene: Scene, pid: str) -> list[tuple[str, str]]:
    """(letter, feature id) of the datum features of size at MMB or LMB in pattern ``pid``'s
    frame: the sizes whose departure lets the pattern shift, the pattern's what-if controls."""
    spec = next(p for p in scene.patterns if p.id == pid)
    tol = scene.feature(spec.feature).tolerance
    by = {d.letter: d for d in scene.datums}
    return [(ltr, by[ltr].feature) for ltr in (tol.datums if tol is not None else ())
            if ltr in by and by[ltr].feature is not None and by[ltr].boundary in ("MMB", "LMB")]


def pattern_now(res, scene: Scene, pid: str, states: dict):
    """Pattern ``pid``'s result (:class:`geom.frames.PatternResult`) with its datum features at
    their what-if sizes (``states``): the datum shift follows the datum feature's size."""
    from geom.frames import pattern_at
    from viewer.figures.pattern import pattern_result

    sizes = {ltr: states[fid].size for ltr, fid in pattern_datum_features(scene, pid) if fid in states}
    return pattern_at(pattern_result(res, pid), sizes)


def settled_states(scene: Scene, old: dict[str, B.FeatureState], measured: bool = True) -> dict[str, B.FeatureState]:
    """A state for every feature of ``scene``: its state in ``old`` while the size is still within
    its limits; at MMC with the share and direction kept when not; the worst case
    (:func:`geom.boundaries.worst_case_state`: a pin in a mate tilts opposite to the hole, the
    default the 2D views and the report use) for a feature ``old`` does not hold, except a measured
    pattern's datum feature, which starts at the size measured (``measured`` False: it too at the
    worst case)."""
    in_mate = {fid for m in scene.mates for fid in (m.hole, m.pin)}
    measured = measured_datum_sizes(scene) if measured else {}
    states = {}
    for f in scene.features:
        st = old.get(f.id)
        if st is None and f.id in measured and f.limits[0] <= measured[f.id] <= f.limits[1]:
            st = B.FeatureState(measured[f.id], 1.0, 0.0)  # a measured pattern's datum: as produced
        lo, hi = f.limits
        if st is not None and lo <= st.size <= hi:
            states[f.id] = st
        elif st is not None:
            states[f.id] = B.FeatureState(f.mmc, st.share, st.direction_deg)
        else:
            states[f.id] = B.worst_case_state(f, f.id in in_mate)
    return states


SLIDER_POSITIONS = 1000  # at least this many slider positions: a drag moves smoothly


def size_slider_plan(lo: float, hi: float, step: float, least: int = SLIDER_POSITIONS) -> tuple[int, int]:
    """(positions, positions per step) of a size slider from ``lo`` to ``hi`` whose keyboard step
    is ``step`` (one display digit of the scene's units, ``10 ** -Units.decimals``): a whole
    number of positions per step, at least ``least`` positions in all, an even number of them
    (the middle position is the middle size when the span is a whole number of steps).

    >>> size_slider_plan(8.0, 8.015, 0.001)  # 15 steps of 0.001 mm, 68 positions each
    (1020, 68)
    >>> size_slider_plan(0.25, 0.25015, 0.0001)  # 1.5 steps of 0.0001 in: the last one is cut short
    (1002, 668)
    """
    span = hi - lo
    if span <= 0 or step <= 0:
        return 0, 1
    steps = span / step
    per = max(1, math.ceil(least / steps - 1e-9))
    while math.ceil(steps * per - 1e-6) % 2:
        per += 1
    return math.ceil(steps * per - 1e-6), per


def slider_size(lo: float, hi: float, step: float, per: int, pos: int, positions: int) -> float:
    """The size at slider position ``pos`` of :func:`size_slider_plan`'s slider (``hi`` at the
    last position).

    >>> slider_size(8.0, 8.015, 0.001, 68, 68 * 4, 1020), slider_size(8.0, 8.015, 0.001, 68, 1020, 1020)
    (8.004, 8.015)
    """
    if pos >= positions:
        return hi
    return min(lo + round(pos * step / per, 12), hi)


# ---------------------------------------------------------------- readout rows


@dataclass(frozen=True)
class Row:
    quantity: str
    value: str
    formula: str
    constant: bool = False  # does not depend on the what-if state


def whatif_rows(res: SceneResult, fid: str, state: B.FeatureState) -> list[Row]:
    """Readouts of one feature at a what-if state; every number comes from geom."""
    sc = res.scene
    u, st = sc.units, sc.standard
    r = res.features[fid]
    f = r.feature
    tol = f.tolerance
    mmc_abbr, lmc_abbr = term("mmc", st)[0], term("lmc", st)[0]
    mmc_s, lmc_s = u.fmt_cmp(f.mmc, f.lmc)  # compared with each other: never printed equal
    rows = [Row("produced size", u.fmt(state.size), f"between {mmc_abbr} {mmc_s} and {lmc_abbr} {lmc_s}")]
    b = B.bonus(f, state.size)
    bname = term("bonus", st)[0]
    if tol is None:
        rows.append(Row(bname, u.fmt(b), "no geometric tolerance"))
    elif tol.material is Material.RFS:
        rows.append(Row(bname, u.fmt(b), f"{bname} = 0 ({term('rfs', st)[1]})"))
    else:
        ref_key = "mmc" if tol.material is Material.MMC else "lmc"
        ref = f.mmc if tol.material is Material.MMC else f.lmc
        rows.append(Row(f"{bname} at this size", u.fmt(b),
                        Derived("bonus", b, "|size - {" + ref_key + "}|", "|{} - {}|",
                                (state.size, ref)).formula(u, st)))
    ta = B.tolerance_allowed(f, state.size)
    if tol is not None:
        rows.append(Row("tolerance allowed at this size", u.fmt(ta),
                        tolerance_allowed_derived(f, b).formula(u, st)))
        used = state.share * ta
        rows.append(Row("tolerance used", u.fmt(used),
                        f"{plain(state.share * 100)} % of {u.fmt(ta)}, tilted toward "
                        f"{plain(state.direction_deg)} deg"))
        tilt = B.tilt_angle_deg(f, used)
        if tilt is not None:
            rows.append(Row("axis tilt", f"{tilt:.4f} deg",
                            f"atan(used / L) = atan({u.fmt(used)} / {u.fmt(B.tilt_length(f))})"))
    eff = B.effective_size(f, state)
    sign = "-" if f.kind.value == "hole" else "+"
    what = "clear opening" if f.kind.value == "hole" else "swept envelope"
    rows.append(Row(f"{what} normal to A", u.fmt(eff),
                    f"size {sign} used = {u.fmt(state.size)} {sign} {u.fmt(state.share * ta)} = {u.fmt(eff)}"))
    vc = r.virtual_condition
    if vc.value is not None:
        rows.append(Row(f"{term(vc.key, st)[1]} (constant)", u.fmt(vc.value), vc.formula(u, st), constant=True))
        if tol.material is Material.MMC:
            # with all of the tolerance used, the boundary presented equals the VC at every size
            gap = abs(eff - vc.value)
            rows.append(Row(f"room left to {vc.abbr(st)}", u.fmt(gap),
                            f"|{what} - {vc.abbr(st)}| = |{u.fmt(eff)} - {u.fmt(vc.value)}| = {u.fmt(gap)}"))
    return rows


# ---------------------------------------------------------------- the fit at the states set


@dataclass(frozen=True)
class Verdict:
    assembles: bool
    headline: str  # "ASSEMBLES ..." / "INTERFERES by ..."
    worst_case: str  # geom's worst-case verdict sentence
    formula: str
    whatif_clearance: float


def mate_verdict_at(res: SceneResult, mate_index: int, states: dict[str, B.FeatureState]) -> Verdict:
    """The fit of mate ``mate_index`` at the what-if ``states`` (geom's fit predicate), beside
    geom's worst-case verdict and formula."""
    sc = res.scene
    u = sc.units
    m = res.mates[mate_index]
    hole, pin = sc.feature(m.hole), sc.feature(m.pin)
    c = clearance_at(hole, pin, states[m.hole], states[m.pin])
    ok = fits(c)  # geom's one fit predicate (line-to-line included)
    headline = mate_verdict(c, ok, u).replace(" in the worst case", " at the sizes set")
    return Verdict(ok, headline, mate_verdict(m.clearance_min, m.assembles, u),
                   mate_formula(m, u, sc.standard), c)
