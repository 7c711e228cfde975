"""The words and JSON of a yield run (``matezone yield``, the report page, the window tab)."""

from __future__ import annotations

from .model import Units
from .readout import CAUTION
from .yieldstats import YieldResult


def _pct(v: float | None) -> str:
    return "-" if v is None else f"{100.0 * v:.4g} %"


def yield_text(r: YieldResult, units: Units) -> list[str]:
    """The lines ``matezone yield`` prints for one run."""
    u = units
    wc, z = u.fmt_cmp(r.worst_case, 0.0)
    lo, hi = r.p_ci
    st = r.stack
    out = [f"statistical fit of {r.kind} {r.index + 1}: {r.label}",
           f"  P(interference) = {r.failures} / {r.samples} = {r.p_interference:.4g} "
           f"({100 * r.confidence:g} % Clopper-Pearson interval {lo:.4g} .. {hi:.4g})",
           f"  clearance: mean {u.fmt(st.mc_mean)}, sigma {u.fmt(st.mc_sigma)}, "
           f"min {u.fmt(float(r.clearance.min()))}, max {u.fmt(float(r.clearance.max()))} {u.value}; "
           f"worst case {wc}, zero {z}",
           "  rejected by their own tolerance:"]
    for j in r.rejections:
        out.append(f"    {j.feature}: {_pct(j.fraction)} of parts; of those, {_pct(j.assemble_fraction)} still assemble")
    out.append(f"    any part: {_pct(r.rejected_fraction)}; of those assemblies, {_pct(r.rejected_assemble_fraction)} "
               "still assemble (evidence for a use-as-is review, not a disposition)")
    w, rss, mc = u.fmt_cmp(st.worst_case_min, st.rss_min, st.mc_low)
    out.append(f"  linear stack: worst case {w} (nominal - sum of half-ranges), RSS {rss} "
               f"(nominal - root sum of squares), Monte Carlo mean - 3 sigma {mc}")
    for name, mid, half in zip(st.names, st.mids, st.halves):
        out.append(f"    {name}: {u.fmt(mid, signed=True)} +- {u.fmt(half)}")
    out.append("  contribution to the clearance's variance (squared correlation, normalised):")
    out += [f"    {k}: {v:.1f} %" for k, v in sorted(r.contributions, key=lambda kv: -kv[1])]
    nd = r.needed
    if nd is not None and nd.precision is not None:
        c = f"{100 * r.confidence:g} %"
        zero = (f"n = {nd.n_zero} for an upper bound of {nd.precision:g} if no assembly interferes "
                f"(ln(1/(1 - confidence)) / h: the rule of three at 95 %, here {c})")
        if nd.n_normal:
            out.append(f"  for a half-width of {nd.precision:g} on P at {c}: n = {nd.n_normal} "
                       f"(normal approximation at the estimated P); {zero}")
        else:
            out.append(f"  samples needed for a precision of {nd.precision:g} on P: {zero}; the normal "
                       "approximation needs at least one interference to estimate P")
    out.append("  assumptions:")
    out += [f"    {a}" for a in r.assumptions]
    out.append(CAUTION)
    return out


def _r(v):
    return None if v is None else round(float(v), 12) + 0.0


def yield_to_json(r: YieldResult) -> dict:
    st = r.stack
    return {
        "kind": r.kind, "index": r.index, "label": r.label, "samples": r.samples, "seed": r.seed,
        "confidence": r.confidence, "worst_case": _r(r.worst_case), "failures": r.failures,
        "p_interference": r.p_interference, "p_interval": list(r.p_ci),
        "clearance": {"mean": _r(st.mc_mean), "sigma": _r(st.mc_sigma), "min": _r(r.clearance.min()),
                      "max": _r(r.clearance.max())},
        "histogram": {"counts": [int(k) for k in r.hist_counts], "edges": [_r(e) for e in r.hist_edges]},
        "rejections": [{"feature": j.feature, "fraction": j.fraction, "assemble_fraction": j.assemble_fraction}
                       for j in r.rejections],
        "rejected_fraction": r.rejected_fraction, "rejected_assemble_fraction": r.rejected_assemble_fraction,
        "stack": {"names": list(st.names), "mids": [_r(v) for v in st.mids], "halves": [_r(v) for v in st.halves],
                  "worst_case_min": _r(st.worst_case_min), "rss_min": _r(st.rss_min), "mc_low": _r(st.mc_low)},
        "contributions": {k: v for k, v in r.contributions},
        "needed": None if r.needed is None else {"precision": r.needed.precision, "n_normal": r.needed.n_normal,
                                                 "n_zero": r.needed.n_zero},
        "assumptions": list(r.assumptions),
        "caution": CAUTION,
    }
