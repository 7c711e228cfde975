"""The ``matezone analyze --json`` object: every number of an analysis in the scene's units
(None where none is defined), each with the formula that produced it."""

from __future__ import annotations

from .analysis import SceneResult, mate_formula, mate_verdict


def _r(v: float | None) -> float | None:
    return None if v is None else round(v, 9) + 0.0


def result_to_json(res: SceneResult) -> dict:
    """The ``analyze --json`` object (numbers in scene units, None where none is defined)."""
    sc = res.scene
    out: dict = {"title": sc.title, "units": sc.units.value, "standard": sc.standard.value, "features": {}}
    for fid, r in res.features.items():
        f = r.feature
        tol = f.tolerance
        out["features"][fid] = {
            "kind": f.kind.value,
            "limits": [f.limits[0], f.limits[1]],
            "length": f.length,
            "mmc": _r(r.mmc.value),
            "lmc": _r(r.lmc.value),
            "virtual_condition": _r(r.virtual_condition.value),
            "virtual_condition_kind": None if r.virtual_condition.value is None else r.virtual_condition.key[3:],
            "resultant_condition": _r(r.resultant_condition.value),
            "inner_boundary": _r(r.inner_boundary.value),
            "outer_boundary": _r(r.outer_boundary.value),
            "bonus_max": _r(r.bonus_max.value),
            "tolerance_at_mmc": _r(r.tolerance_at_mmc.value),
            "tolerance_at_lmc": _r(r.tolerance_at_lmc.value),
            "tilt_max_deg": _r(r.tilt_max_deg),
            "envelope": r.envelope,
            "tolerance": None if tol is None else {
                "characteristic": tol.characteristic.value,
                "zone": tol.zone.value,
                "value": tol.value,
                "material": tol.material.value,
                "datums": list(tol.datums),
                "projected": tol.projected,
                "angle": tol.angle,
                "frame": tol.symbol(sc.units),
            },
            "formulas": {
                k: getattr(r, k).formula(sc.units, sc.standard)
                for k in ("virtual_condition", "resultant_condition", "inner_boundary", "outer_boundary",
                          "bonus_max", "tolerance_at_mmc", "tolerance_at_lmc")
            },
            "notes": list(r.notes),
        }
        if r.controls:  # only a feature with refinements has the key (geom.refinement)
            from .refinement import controls_json

            out["features"][fid]["controls"] = controls_json(r, sc.units, sc.standard)
    out["mates"] = [
        {
            "hole": m.hole,
            "pin": m.pin,
            "clearance_min": _r(m.clearance_min),
            "clearance_max": _r(m.clearance_max),
            "clearance_min_size": _r(m.clearance_min_size),
            "assembles": m.assembles,
            "verdict": mate_verdict(m.clearance_min, m.assembles, sc.units),
            "formula": mate_formula(m, sc.units, sc.standard),
            "assumptions": list(m.assumptions),
        }
        for m in res.mates
    ]
    out["fasteners"] = {}
    for fid, fr in res.fasteners.items():
        d = {
            "kind": fr.fastener.kind,
            "fastener": fr.fastener.fastener,
            "hole": fr.fastener.hole,
            "position_tolerance": _r(fr.position_tolerance.value),
            "formula": fr.position_tolerance.formula(sc.units, sc.standard),
        }
        if fr.position_tolerance_unprojected is not None:
            d["position_tolerance_unprojected"] = _r(fr.position_tolerance_unprojected.value)
            d["formula_unprojected"] = fr.position_tolerance_unprojected.formula(sc.units, sc.standard)
        out["fasteners"][fid] = d
    if res.frames is not None and (sc.datums or sc.patterns or sc.interfaces):
        from .frames import frames_to_json

        out.update(frames_to_json(res.frames, sc))
    return out
