"""Explanations in words: why readings disagree and which governs."""

from __future__ import annotations



from ..analysis import term
from ..conformance import (
    readings_disagree,
)
from ..model import (
    Characteristic, Kind, Material, Standard, Units,
)
from .results import SLACK

def _axis_difference(ls_axis, dml_axis, units: Units) -> str:
    """Mention the axis readings only where they differ (with the digits that tell them apart)."""
    if ls_axis is None or dml_axis is None or abs(ls_axis - dml_axis) <= SLACK:
        return ""
    a, b = units.fmt_cmp(ls_axis, dml_axis)
    if a == b:
        return ""
    return f", and reads the axis of the fitted cylinder ({a}) instead of the governing axis reading ({b})"


def _spread(units: Units, what: str, vals) -> str:
    """"the X run from a to b" where a and b differ on paper, else "the X are all a"."""
    lo, hi = units.fmt_cmp(min(vals), max(vals))
    return f"{what} are all ⌀{lo}" if lo == hi else f"{what} run from ⌀{lo} to ⌀{hi}"


def _explain(feature, std, units, axis_check, surface_check, sections, un_env, ls, allowed, governing,
             other_check, gov):
    out: list[str] = []
    hole = feature.kind is Kind.HOLE
    B = term("bonus", std)[0]
    tol = feature.tolerance
    rel_word = "related envelope" if std is Standard.ASME else "orientation-constrained associated cylinder"
    if readings_disagree(axis_check, surface_check):
        form = ""
        if sections:
            rnd = units.fmt(max(s.roundness for s in sections))
            form = (f" The sections' least-squares diameters {_spread(units, '', [s.ls_diameter for s in sections]).strip()}"
                    f" (roundness up to {rnd}): the surface is not a perfect cylinder.")
            form = form.replace("diameters are all", "diameters are all").replace("diameters run", "diameters run")
        basis = governing.basis if governing is not None else "axis"
        if not axis_check.conforms:
            out.append(
                f"The axis and surface readings disagree: the {basis} needs more zone than t + {B} "
                f"({axis_check.detail}), yet the {rel_word} clears the {term('vc_MMC', std)[0] if tol.material is Material.MMC else term('vc_LMC', std)[0]} "
                f"({surface_check.detail}). The {B} is taken from the {'narrowest' if hole else 'widest'} "
                f"place ({'the envelope' if std is Standard.ASME else 'the associated cylinder'}), while the axis follows the form error; a functional gauge "
                "feels only the surface." + form)
        else:
            out.append(
                f"The axis and surface readings disagree: the {basis} stays within t + {B} "
                f"({axis_check.detail}), yet the {rel_word} violates the boundary "
                f"({surface_check.detail}). Form error (bend, lobing, taper) narrows the datum-held "
                "envelope more than the axis shows." + form)
        out.append(GOVERNS_ASME if std is Standard.ASME else GOVERNS_ISO)
        if std is Standard.ASME and tol.characteristic is not Characteristic.POSITION:
            out.append(f"ASME words that precedence for position; applying it to {tol.characteristic.value} "
                       "at a modifier is an extension by analogy (the virtual condition is the same kind of boundary).")
    if other_check is not None and readings_disagree(other_check, axis_check):
        what = "derived median line" if std is Standard.ASME else "extracted median line"
        if other_check.name.startswith("median"):
            out.append(
                f"A printout of the {what} (the section centres) would say the axis "
                f"{'conforms' if other_check.conforms else 'does not conform'} ({other_check.detail}); "
                f"under ASME Y14.5 that line is toleranced only by straightness, while "
                f"{tol.characteristic.value} applies to the feature axis ({axis_check.detail}).")
        else:
            out.append(
                f"The feature axis (axis of the unconstrained associated cylinder) would say the axis "
                f"{'conforms' if other_check.conforms else 'does not conform'} ({other_check.detail}); under ISO 1101 "
                f"the extracted median line governs ({axis_check.detail}).")
    if ls is not None and ls.axis_conforms is not None and axis_check.conforms is not None:
        env_word = ("mating" if tol.material is not Material.LMC else "minimum material") if std is Standard.ASME \
            else "associated cylinder"
        if std is Standard.ASME:
            env_word += " envelope"
        if ls.axis_conforms != axis_check.conforms or (surface_check.conforms is not None
                                                      and ls.axis_conforms != surface_check.conforms):
            env_d = None if un_env is None else un_env.diameter
            src = ("the least-squares size" if tol.characteristic is not Characteristic.STRAIGHTNESS
                   else "the least-squares size (not each local size)")
            out.append(
                f"A least-squares printout would say the axis {'conforms' if ls.axis_conforms else 'does not conform'}: "
                f"it takes the {B} from {src} {units.fmt(ls.size)} (an average through the form "
                f"error) instead of the {env_word} {units.fmt(env_d)}, giving tolerance allowed "
                f"{units.fmt(ls.tolerance_allowed)} against {units.fmt(allowed)}"
                + _axis_difference(ls.axis_deviation, None if governing is None else governing.deviation, units)
                + ". That is why a gauge and a CMM printout can disagree.")
    return out


GOVERNS_ASME = ("ASME Y14.5 (position, surface interpretation): where the axis and surface interpretations of a "
                "tolerance at MMC differ, the surface interpretation takes precedence. The surface (gauge) reading "
                "governs.")
GOVERNS_ISO = ("ISO 2692 states the maximum/least material requirement as a virtual size the surface must not "
               "violate, so the surface (gauge) reading is the requirement.")
