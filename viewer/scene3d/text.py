"""The words on the 3D pictures: the feature control frame in characters VTK's fonts have, the
boundary names in the scene's standard's terms, a feature's readout lines, the names of fitted
envelopes and the word and colour of a check. Every number comes from geom; nothing here
computes a tolerance.

>>> _latin("\u2300 8.000 \u2264 x")
'\u00d8 8.000 <= x'
"""

from __future__ import annotations

from geom.analysis import SceneResult, term, tolerance_allowed_derived
from geom.boundaries import FeatureState, bonus
from geom.conformance import verdict_word
from geom.inspect import envelope_abbr
from geom.model import Characteristic, Feature, Kind, Material, Standard, Units, Zone

from .. import style as S

_CHAR = {
    Characteristic.POSITION: "position",
    Characteristic.PERPENDICULARITY: "perpendicularity",
    Characteristic.PARALLELISM: "parallelism",
    Characteristic.ANGULARITY: "angularity",
    Characteristic.STRAIGHTNESS: "straightness",
}


def _frame_text(f: Feature, u: Units) -> str:
    """Feature control frame in characters every renderer has (Latin-1)."""
    tol = f.tolerance
    if tol is None:
        return "no geometric tolerance"
    dia = "\u00d8" if tol.zone is Zone.DIAMETER else ""
    mod = {Material.MMC: " (M)", Material.LMC: " (L)", Material.RFS: ""}[tol.material]
    proj = f" (P){u.fmt(tol.projected)}" if tol.projected else ""
    dat = (" to " + ", ".join(tol.datums)) if tol.datums else ""  # VTK fonts drop '|'
    ang = f" at {tol.angle:g} deg" if tol.characteristic is Characteristic.ANGULARITY and tol.angle is not None else ""
    return f"{_CHAR[tol.characteristic]} {dia}{u.fmt(tol.value)}{mod}{proj}{dat}{ang}"


def _size_name(f: Feature, size: float, std) -> str:
    if abs(size - f.mmc) <= 1e-12:
        return term("mmc", std)[0]
    if abs(size - f.lmc) <= 1e-12:
        return term("lmc", std)[0]
    return "between"


def _boundary_terms(res: SceneResult, f: Feature) -> tuple[tuple[str, float | None], tuple[str, float | None]]:
    """((name, size) of the mating-side boundary, (name, size) of the opposite one)."""
    fr = res.features[f.id]
    std = res.scene.standard
    tol = f.tolerance
    hole = f.kind is Kind.HOLE
    mm_side = fr.inner_boundary if hole else fr.outer_boundary
    lm_side = fr.outer_boundary if hole else fr.inner_boundary
    if tol is None:
        return (("envelope at " + term("mmc", std)[0], mm_side.value), ("", None))
    vc = fr.virtual_condition
    rc = fr.resultant_condition
    vc_name = vc.abbr(std)
    # a value is None where no boundary exists (ISO independency on a side no modifier or
    # envelope bounds): nothing is drawn there
    if tol.material is Material.MMC:
        return ((vc_name, vc.value), (rc.abbr(std), rc.value))
    if tol.material is Material.LMC:  # the VC sits on the LMC side; the mate sees the RC side
        mname = f"{mm_side.abbr(std)} = {rc.abbr(std)}" if rc.value is not None else mm_side.abbr(std)
        return ((mname, mm_side.value), (vc_name, vc.value))
    return ((mm_side.abbr(std), mm_side.value), (lm_side.abbr(std), lm_side.value))


def _feature_lines(res: SceneResult, f: Feature, st: FeatureState, role: str) -> list[str]:
    u, std = res.scene.units, res.scene.standard
    lines = [f"{role.upper()} '{f.id}'" + (f" ({f.name})" if f.name else ""),
             f"  {_frame_text(f, u)}",
             f"  limits {u.fmt(f.limits[0])} - {u.fmt(f.limits[1])} {u.value}"]
    if f.tolerance is None:
        lines.append(f"  produced {u.fmt(st.size)} ({_size_name(f, st.size, std)})")
    else:
        b = bonus(f, st.size)
        lines.append(f"  produced {u.fmt(st.size)} ({_size_name(f, st.size, std)}),  "
                     f"{term('bonus', std)[0]} {u.fmt(b)}")
        lines.append("  " + tolerance_allowed_derived(f, b).formula(u, std)
                     + ("" if st.share >= 1.0 else f",  {st.share:.0%} used"))
    fr = res.features[f.id]
    vc = fr.virtual_condition
    if vc.value is not None and f.tolerance is not None and f.tolerance.material is Material.MMC:
        lines.append("  " + vc.formula(u, std))
    else:  # the mating-side boundary (or why there is none), and the VC where it lies elsewhere
        d = fr.inner_boundary if f.kind is Kind.HOLE else fr.outer_boundary
        lines.append("  " + d.formula(u, std))
        if vc.value is not None:
            lines.append("  (" + vc.formula(u, std) + ")")
    return lines


def _word(check) -> tuple[str, str]:
    """(word, colour) of a check: geom.conformance.verdict_word, the one mapping of a check to
    its word and colour role, in the picture's colours (style.ROLE_COLOUR)."""
    word, role = verdict_word(check)
    return word, S.ROLE_COLOUR[role]


def _envelope_names(e, std, hole: bool) -> tuple[str, str]:
    """(long, short) name of a fitted envelope in the standard's own terms: the long one is
    geom's name (geom.inspect.envelope_name) with its symbol, the short one for 3D labels."""
    mm = "minimum material" in e.name
    abbr = envelope_abbr(std, hole, mm)
    if std is Standard.ISO:  # "associated cylinder, maximum inscribed (GX), unconstrained"
        return e.name, f"{abbr}, {e.name.rsplit(', ', 1)[-1]}"
    related = e.name.startswith("related")
    return f"{e.name} ({abbr})", f"{'related' if related else 'unrelated'} {abbr}"


def _latin(text: str) -> str:
    """Characters VTK's fonts draw: the diameter sign as the Latin-1 O-slash."""
    return (text.replace("\u2300", "\u00d8").replace("\u2264", "<=").replace("\u2265", ">=")
            .replace("\u2212", "-").replace("\u00a7", "sec. "))
