"""Several controls on one feature: the main tolerance refined by tighter ones.

A feature of size may carry, beside its main tolerance, refinements on the same axis: a
position ⌀0.20 (M) | A | B | C refined by a perpendicularity ⌀0.05 (M) | A (the orientation
zone floats inside the position zone), or a position or an orientation refined by the
straightness of the derived median line. Each control has its own boundaries, computed by the
same functions as the main one (:func:`geom.analysis.analyse_feature` of
``feature.with_(tolerance=control)``), so each VC carries its formula in the standard's terms.

What may refine what (ASME Y14.5 and ISO 1101 refinement of a location by an orientation and
of either by a form tolerance, common practice): an orientation refines a position, the
straightness of the derived median line refines an orientation or a position; a position
refines nothing. A refinement references the main tolerance's datums from A in the same order
or fewer (perpendicularity to A refines position to A | B | C). Whether it is tighter is a
design-review finding (:class:`Tighter`), not a load error: ASME Y14.5 asks a refinement to be
less than the tolerance it refines, else it says nothing more (from memory).

The refinement changes neither the position VC nor the fit with a mating part at true
position: :func:`geom.analysis.analyse_mate` keeps the main tolerance's boundaries.

>>> from geom.model import Feature, Kind, Tolerance, Characteristic as C, Material as M, Units
>>> pos = Tolerance(C.POSITION, 0.2, material=M.MMC, datums=("A", "B", "C"))
>>> per = Tolerance(C.PERPENDICULARITY, 0.05, material=M.MMC, datums=("A",))
>>> f = Feature("b", Kind.HOLE, (10.0, 10.015), 15.0, tolerance=pos, refinements=(per,))
>>> [control_label(c, Units.MM) for c in analyse_controls(f)]
['VC to A|B|C = 9.800 (located at true position)', 'VC to A = 9.950 (orientation only: located nowhere)']
>>> analyse_controls(f)[1].tighter.ok
True
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from . import boundaries as B
from .model import Characteristic, Feature, Kind, Standard, Tolerance, Units, Zone

ORIENTATION = frozenset({Characteristic.PERPENDICULARITY, Characteristic.PARALLELISM, Characteristic.ANGULARITY})


def refinement_problem(main: Tolerance | None, ref: Tolerance,
                       earlier: tuple[Tolerance, ...] = ()) -> tuple[str, str] | None:
    """(key of the offending field, or "" for the whole table; why) when ``ref`` cannot refine
    ``main`` (with the refinements ``earlier`` already on the feature), else None.

    >>> from geom.model import Characteristic as C
    >>> per = Tolerance(C.PERPENDICULARITY, 0.05, datums=("A",))
    >>> refinement_problem(per, Tolerance(C.POSITION, 0.02, datums=("A", "B", "C")))[0]
    'characteristic'
    """
    if main is None:
        return ("", "expected a [feature.tolerance] first: a refinement tightens the feature's main "
                    "tolerance, and this feature has none")
    ch, mc = ref.characteristic, main.characteristic
    if ch is mc or any(e.characteristic is ch for e in earlier):
        return ("characteristic", f"expected each characteristic once on a feature; {ch.value} is already there")
    if mc is Characteristic.STRAIGHTNESS:
        return ("characteristic", "expected a main tolerance that locates or orients: straightness is a form "
                                  "tolerance and nothing refines it")
    if ch is Characteristic.POSITION:
        return ("characteristic", f"a position cannot refine {mc.value}: a refinement controls less than the "
                                  "tolerance it refines (an orientation refines a position; straightness refines "
                                  "an orientation or a position)")
    if ch in ORIENTATION:
        if mc is not Characteristic.POSITION:
            return ("characteristic", f"an orientation refines a position only; {ch.value} cannot refine "
                                      f"{mc.value} (straightness of the median line can)")
        if ch is not Characteristic.PERPENDICULARITY:
            return ("characteristic", f"{ch.value} to datum A holds the axis at an angle to A other than 90 deg, but "
                                      "a position zone's axis is normal to A in matezone's frame (datum A is z = 0); "
                                      "refine the position with perpendicularity to A")
    if tuple(ref.datums) != tuple(main.datums[:len(ref.datums)]):
        return ("datums", f"expected the main tolerance's datums from A in the same order, or fewer (e.g. [\"A\"] "
                          f"refining {list(main.datums)!r}), got {list(ref.datums)!r}")
    if ref.zone is not main.zone and not (ch is Characteristic.STRAIGHTNESS and ref.zone is Zone.DIAMETER):
        return ("zone", f"expected a {main.zone.value} zone like the main tolerance's: a {ref.zone.value} zone "
                        f"nested in a {main.zone.value} zone controls the axis in other directions than the zone "
                        "it refines")
    if ch is not Characteristic.STRAIGHTNESS and ref.projected != main.projected:
        return ("projected", "expected the same projected height as the main tolerance's (the nested zone "
                             "covers the same height as the zone it refines)")
    return None


def parse_refinements(c, v, path: str, feat: Feature) -> tuple[Tolerance, ...]:
    """The ``[[feature.refinement]]`` tables of the feature ``feat`` (its main tolerance read),
    hardened like ``[feature.tolerance]``; ``c`` is the scene file's ``_Ctx``."""
    from .scenefile import _join, _tolerance  # the scene file's own reader of a tolerance table

    out: list[Tolerance] = []
    for j, tv in enumerate(c.array_of_tables(v, _join(path, "refinement"))):
        rp = f"{_join(path, 'refinement')}[{j}]"
        tol = _tolerance(c, tv, rp)
        why = refinement_problem(feat.tolerance, tol, tuple(out))
        if why:
            c.fail(_join(rp, why[0]) if why[0] else rp, why[1])
        sizes = [s for s in B.worst_case_boundaries(feat.with_(tolerance=tol)) if s is not None]
        if sizes and min(sizes) <= 0:
            c.fail(_join(rp, "value"), f"expected a tolerance that leaves a boundary > 0; with {tol.value:g} the "
                                       f"smallest worst-case boundary is {min(sizes):g}")
        out.append(tol)
    return tuple(out)


# ---------------------------------------------------------------- each control's boundaries


@dataclass(frozen=True)
class Tighter:
    """The design-review check of a refinement: its tolerance allowed is less than that of the
    control it refines at MMC and at LMC (``ok``), in words (``text``)."""

    ok: bool
    text: str


@dataclass(frozen=True)
class ControlResult:
    """One control of a feature: the main tolerance (``role`` "main") or a refinement, with
    its own boundaries (``geom.analysis.Derived``, formulas in the standard's terms)."""

    tolerance: Tolerance
    role: str  # "main" or "refinement"
    virtual_condition: object
    resultant_condition: object
    tolerance_at_mmc: object
    tolerance_at_lmc: object
    inner_boundary: object
    outer_boundary: object
    tighter: Tighter | None = None  # None for the main tolerance


def control_feature(f: Feature, tol: Tolerance) -> Feature:
    """The feature with ``tol`` as its only tolerance: what the boundary functions read."""
    return f.with_(tolerance=tol, refinements=())


def _tighter(f: Feature, ref: Tolerance, over: tuple[Tolerance, ...], units: Units, std: Standard) -> Tighter:
    from .analysis import term

    fr = control_feature(f, ref)
    mm, lm = term("mmc", std)[0], term("lmc", std)[0]
    said, bad = [], []
    for o in over:
        fo = control_feature(f, o)
        for at, a, b in ((mm, B.tolerance_at_mmc(fr), B.tolerance_at_mmc(fo)),
                         (lm, B.tolerance_at_lmc(fr), B.tolerance_at_lmc(fo))):
            sa, sb = units.fmt_cmp(a, b)
            if a < b - 1e-12:
                said.append(f"{sa} < {sb} at {at}")
            else:
                bad.append(f"at {at} it allows {sa}, not less than the {sb} of {o.characteristic.value} "
                           f"{o.symbol(units)}")
    if bad:
        return Tighter(False, f"{ref.symbol(units)} is not tighter: " + "; ".join(bad) + ". A refinement must be "
                       "less than the tolerance it refines (ASME Y14.5), else it refines nothing; tighten it "
                       "or drop it")
    names = " and ".join(o.symbol(units) for o in over)
    return Tighter(True, f"{ref.symbol(units)} is tighter than {names}: " + ", ".join(said))


def analyse_controls(f: Feature, standard: Standard = Standard.ASME,
                     units: Units = Units.MM) -> tuple[ControlResult, ...]:
    """The main tolerance and each refinement, each with its own boundaries; a refinement's
    :class:`Tighter` check is against the main tolerance and, for straightness, against an
    orientation refinement too (the form control sits inside both)."""
    from .analysis import analyse_feature  # it builds on this module's values

    out = []
    for i, tol in enumerate((f.tolerance, *f.refinements)):
        r = analyse_feature(control_feature(f, tol), standard)
        check = None
        if i:
            over = (f.tolerance,)
            if tol.characteristic is Characteristic.STRAIGHTNESS:
                over += tuple(t for t in f.refinements if t.characteristic in ORIENTATION)
            check = _tighter(f, tol, over, units, standard)
        out.append(ControlResult(tol, "refinement" if i else "main", r.virtual_condition, r.resultant_condition,
                                 r.tolerance_at_mmc, r.tolerance_at_lmc, r.inner_boundary, r.outer_boundary, check))
    return tuple(out)


def with_controls(feats: dict, standard: Standard, units: Units) -> dict:
    """The scene's feature results, those with refinements given their ``controls``."""
    return {fid: (replace(r, controls=analyse_controls(r.feature, standard, units)) if r.feature.refinements else r)
            for fid, r in feats.items()}


def _scope(tol: Tolerance) -> str:
    if tol.characteristic is Characteristic.POSITION:
        return "located at true position"
    if tol.characteristic in ORIENTATION:
        return "orientation only: located nowhere"
    return "form only: neither oriented nor located"


def mating_side(c: ControlResult, hole: bool):
    """The control's boundary on the mating (MMC) side: its VC at MMC, else its IB (hole) / OB."""
    vc = c.virtual_condition
    if vc.value is not None and vc.key == "vc_MMC":
        return vc
    return c.inner_boundary if hole else c.outer_boundary


def control_label(c: ControlResult, units: Units, standard: Standard = Standard.ASME, hole: bool = True) -> str:
    """E.g. ``VC to A|B|C = 9.800 (located at true position)``; a control without a VC names its
    mating-side boundary (or says there is none)."""
    d = c.virtual_condition if c.virtual_condition.value is not None else mating_side(c, hole)
    to = ("to " + "|".join(c.tolerance.datums)) if c.tolerance.datums else "(no datum)"
    if d.value is None:
        return f"no {d.abbr(standard)} {to} ({_scope(c.tolerance)})"
    return f"{d.abbr(standard)} {to} = {units.fmt(d.value)} ({_scope(c.tolerance)})"


def controls_text(r, units: Units, standard: Standard) -> list[str]:
    """The text lines ``matezone analyze`` prints under a feature with refinements."""
    from .analysis import term

    hole = r.feature.kind is Kind.HOLE
    out = ["  controls (the main tolerance and its refinements):"]
    for c in r.controls:
        t = c.tolerance
        out.append(f"    {c.role:<10}  {t.symbol(units)}   {control_label(c, units, standard, hole)}")
        d = c.virtual_condition if c.virtual_condition.value is not None else mating_side(c, hole)
        out.append(f"                {d.formula(units, standard)};  {term('t_mmc', standard)[0]} "
                   f"{units.fmt(c.tolerance_at_mmc.value)}, {term('t_lmc', standard)[0]} "
                   f"{units.fmt(c.tolerance_at_lmc.value)}")
        if c.tighter is not None:
            out.append(f"                tighter check: {'passes' if c.tighter.ok else 'FAILS'}: {c.tighter.text}")
    return out


def controls_json(r, units: Units, standard: Standard) -> list[dict]:
    """The ``controls`` list of a feature in ``analyze --json``."""
    def num(v):
        return None if v is None else round(v, 9) + 0.0

    hole = r.feature.kind is Kind.HOLE
    out = []
    for c in r.controls:
        t = c.tolerance
        out.append({
            "role": c.role,
            "symbol": t.symbol(units),
            "characteristic": t.characteristic.value,
            "zone": t.zone.value,
            "value": t.value,
            "material": t.material.value,
            "datums": list(t.datums),
            "projected": t.projected,
            "vc": num(c.virtual_condition.value),
            "rc": num(c.resultant_condition.value),
            "inner_boundary": num(c.inner_boundary.value),
            "outer_boundary": num(c.outer_boundary.value),
            "tolerance_at_mmc": num(c.tolerance_at_mmc.value),
            "tolerance_at_lmc": num(c.tolerance_at_lmc.value),
            "label": control_label(c, units, standard, hole),
            "formulas": {k: getattr(c, k).formula(units, standard)
                         for k in ("virtual_condition", "resultant_condition", "tolerance_at_mmc", "tolerance_at_lmc")},
            "tighter": None if c.tighter is None else {"ok": c.tighter.ok, "text": c.tighter.text},
        })
    return out
