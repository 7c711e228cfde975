"""The inspection page's words: which features are inspected (:func:`scene_inspections`), what
each reading checks in the standard's terms (:func:`check_meaning`, :func:`reading_rows`), the
part verdict as geom gives it, the envelope names, the subject line, and which sections the
page prints (:func:`condensed_sections`). No drawing here: :mod:`viewer.report.inspection`
lays these out.

>>> condensed_sections(list(range(5)))
[0, 1, 2, 3, 4]
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from geom.analysis import term
from geom.conformance import deviation
from geom.model import Characteristic, Kind, Material

INSPECTED_CHECKS = ("size", "axis", "surface")
SECTION_ROWS = 12  # longest section table printed whole; longer ones are condensed
_ROLE_TAG = {"governs": " (governs)", "shown": "", "does not govern": " (does not govern)"}


def inspected_ids(scene, points: dict[str, str] | None = None) -> list[str]:
    """Features to inspect, in scene order: those with ``[feature.measured]`` data and those
    given measured points (``points``: feature id -> CSV path)."""
    given = set(points or {})
    return [f.id for f in scene.features if f.measured is not None or f.id in given]


def scene_inspections(scene, points: dict[str, str] | None = None, bonus_basis: str = "unrelated") -> dict:
    """:func:`geom.inspect.inspect_feature` for every inspected feature (feature id -> result).

    Errors of geom (``InspectError``, ``PointsError``, ``FitError``) pass through unchanged."""
    from geom.inspect import inspect_feature

    points = points or {}
    return {fid: inspect_feature(scene, fid, points=points.get(fid), bonus_basis=bonus_basis)
            for fid in inspected_ids(scene, points)}


# ------------------------------------------------------------------------- terms of the standard


def _at_lmc(insp) -> bool:
    t = insp.feature.tolerance
    return t is not None and t.material is Material.LMC


def _vc_terms(insp) -> tuple[str, str]:
    """(abbreviation, name) of the feature's virtual condition in the standard's terms."""
    return term("vc_LMC" if _at_lmc(insp) else "vc_MMC", insp.standard)


def _envelope_words(insp, related: bool) -> str:
    """The name of the envelope a reading uses, in the standard's terms (from geom.inspect)."""
    from geom.inspect import envelope_name

    t = insp.feature.tolerance
    if t is not None and (t.characteristic is Characteristic.STRAIGHTNESS or not t.datums):
        related = False
    position = t is not None and t.characteristic is Characteristic.POSITION
    return envelope_name(insp.standard, insp.feature.kind is Kind.HOLE, related, _at_lmc(insp), position)


def _envelope_abbr(insp) -> str:
    """AME / AMME (ASME), GX / GN (ISO): geom.inspect.envelope_abbr of the feature."""
    from geom.inspect import envelope_abbr

    return envelope_abbr(insp.standard, insp.feature.kind is Kind.HOLE, _at_lmc(insp))


def _basis_words(insp) -> str:
    """The envelope the bonus (ISO: increase) is taken from, by its name in the standard."""
    if insp.bonus_basis == "unrelated":
        return f"{_envelope_words(insp, False)} (the default)"
    if insp.bonus_basis == "related":
        return f"{_envelope_words(insp, True)} (chosen with --bonus-basis related)"
    return insp.bonus_basis


# ------------------------------------------------------------------------------------ readings


def check_meaning(insp, name: str) -> str:
    """What a reading checks, in the standard's terms and with the governing axis reading."""
    std = insp.standard
    t = insp.feature.tolerance
    B = term("bonus", std)[0]
    if name == "size":
        text = "two-point local sizes within the limits"
        if insp.envelope_check is not None:
            text += f"; {insp.envelope_check.name}: {_envelope_abbr(insp)} not beyond {term('mmc', std)[0]}"
        return text
    if t is None:
        return "no geometric tolerance: not checked"
    if name == "axis":
        basis = insp.axis.basis if insp.axis is not None else "axis"
        return f"the {basis} within the tolerance allowed, t + {B}"
    if t.material is Material.RFS:
        return f"{term('rfs', std)[1]}: no virtual condition, so no surface reading"
    vc = _vc_terms(insp)[0]
    if t.projected:
        return (f"axis of the {_envelope_abbr(insp)} (the gauge pin that fits) over the projected height, "
                "within the tolerance allowed")
    held = "held to the datum" if t.datums and t.characteristic is not Characteristic.STRAIGHTNESS else "unrelated"
    return f"{_envelope_abbr(insp)} ({held}) does not violate {vc}: what a functional gauge checks"


def reading_rows(insp) -> list[tuple[str, str, object, str]]:
    """(label, role, check, meaning) of every reading shown: size, the axis reading that applies,
    surface, then the other axis reading ("does not govern"). ``role``: "governs" for a reading
    the part verdict uses (``insp.verdict.governing``), "shown" for one it does not use."""
    gov = set(insp.verdict.governing) if insp.verdict is not None else set()
    rows = []
    for n in INSPECTED_CHECKS:
        c = getattr(insp, f"{n}_check")
        label = f"axis ({insp.axis.basis})" if n == "axis" and insp.axis is not None else n
        rows.append((label, "governs" if n in gov else "shown", c, check_meaning(insp, n)))
    oc = insp.other_axis_check
    if oc is not None:
        other = insp.feature_axis if insp.axis is insp.median_axis else insp.median_axis
        basis = other.basis if other is not None else oc.name
        rows.append((f"axis ({basis})", "does not govern", oc,
                     f"the {basis}, judged the same way"))
    return rows


def required_actual_deviation(check, units) -> tuple[str, str, str]:
    """The three cells a nonconformance report gives a characteristic: what the drawing requires
    (the limits), what was found (the worst measured value, or the range of several), and the
    deviation (how far beyond the limit, "+" amount; or the margin left inside it). A combined
    check gives one entry per part, separated by "; ". Numbers compared are printed with the
    digits that tell them apart (:meth:`geom.model.Units.fmt_cmp`).

    >>> from geom.conformance import decide
    >>> from geom.model import Units
    >>> required_actual_deviation(decide("axis", [0.0183], None, 0.018, None), Units.MM)
    ('<= 0.0180', '0.0183', '+0.0003 beyond')
    """
    if check.parts:
        cells = [required_actual_deviation(c, units) for c in check.parts]
        return tuple("; ".join(c[i] for c in cells if c[i] != "—") or "—" for i in range(3))
    dev = deviation(check)
    if dev is None:
        return "—", "—", "—"
    lims = [x for x in (check.low, check.high) if x is not None]
    vals = check.values
    shown = units.fmt_cmp(*vals, *lims, abs(dev))
    sv, sl, sd = shown[: len(vals)], shown[len(vals): len(vals) + len(lims)], shown[-1]
    if check.low is not None and check.high is not None:
        req = f"{sl[0]} .. {sl[1]}"
    else:
        req = ("<= " if check.high is not None else ">= ") + sl[0]
    actual = sv[0] if len(vals) == 1 else f"{sv[int(np.argmin(vals))]} .. {sv[int(np.argmax(vals))]}"
    if dev > 0:
        return req, actual, f"+{sd} beyond"
    return req, actual, f"margin {sd}"


def axis_readings(insp) -> list:
    """The axis readings shown, feature axis then median line; the governing one first when it
    is neither (``insp.axis``)."""
    readings = [a for a in (insp.feature_axis, insp.median_axis) if a is not None]
    if insp.axis is not None and all(a is not insp.axis for a in readings):
        readings.insert(0, insp.axis)
    return readings


def _headline(insp) -> tuple[str, str, tuple[str, ...], str]:
    """(headline, colour role, notes, why) of the part verdict, exactly as geom gives them."""
    v = insp.verdict
    if v is None:  # geom always sets it; kept so an old result cannot crash the page
        return "NOT EVALUATED", "none", (), ""
    return v.headline, v.role, tuple(v.notes), v.why


def _inspection_subject(insp) -> str:
    """The subject line: the feature, where its values come from, and the uncertainty U."""
    f = insp.feature
    u = insp.units
    who = f"{f.kind.value.capitalize()} '{f.id}'{' (' + f.name + ')' if f.name else ''} as produced"
    if insp.source == "points" and insp.points is not None:
        P = insp.points
        src = Path(insp.source_file).name if insp.source_file else "points"
        how = (f"{len(P)} measured points in {len(insp.sections)} sections from {src}, "
               f"z = {u.fmt(P[:, 2].min())} .. {u.fmt(P[:, 2].max())} {u.value}")
    else:
        how = "inspection values typed into the scene's [feature.measured] table"
    unc = (f"; U = {u.fmt(insp.uncertainty)} {u.value} (k = 2)" if insp.uncertainty is not None
           else "; no measurement uncertainty U given")
    return f"{who}: {how}{unc}"


def condensed_sections(sections, n_max: int = SECTION_ROWS) -> list[int]:
    """Indices of the sections to print, in order: all of them when there are at most ``n_max``,
    otherwise the first and last, those with the extreme least-squares and mating diameters,
    local sizes and roundness, and evenly spaced others up to ``n_max``."""
    n = len(sections)
    if n <= n_max:
        return list(range(n))
    keep = {0, n - 1}
    for key in ("ls_diameter", "mating_diameter", "local_min", "local_max", "roundness"):
        vals = [getattr(s, key) for s in sections]
        keep.add(int(np.argmin(vals)))
        keep.add(int(np.argmax(vals)))
    for i in np.linspace(0, n - 1, n_max).round().astype(int):
        if len(keep) >= n_max:
            break
        keep.add(int(i))
    return sorted(keep)
