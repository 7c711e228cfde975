"""The statistical fit page: per analysed mate (or pattern interface) of a scene with
``[yield]`` / ``[[process]]`` tables, the clearance histogram with the zero and worst-case lines,
P(interference) with its interval, the parts each feature's own tolerance rejects and how many
of those would still assemble, the linear stack (worst case beside RSS and the Monte Carlo
mean - 3 sigma), the contribution of each input, the sample size a stated precision needs, the
samples and seed, and the assumptions. Every number comes from :func:`geom.yieldmc.run_yield`."""

from __future__ import annotations

from geom.analysis import SceneResult
from viewer import style as S
from viewer.figures.yieldplot import draw_contributions, draw_histogram

from .page import CONTENT_W, GREY, MARGIN, _paragraphs, _table, evidence_page


def _pct(v: float | None) -> str:
    return "-" if v is None else f"{100.0 * v:.4g} %"


def yield_rows(res: SceneResult, r) -> list[list[str]]:
    """The page's table (heading first): quantity and value."""
    u = res.scene.units
    lo, hi = r.p_ci
    st = r.stack
    rows = [["quantity", "value"],
            ["P(interference)", f"{r.failures} / {r.samples} = {r.p_interference:.4g}"],
            [f"{100 * r.confidence:g} % interval (Clopper-Pearson)", f"{lo:.4g} .. {hi:.4g}"]]
    for j in r.rejections:
        rows.append([f"'{j.feature}' rejected by its own tolerance", _pct(j.fraction)])
        rows.append(["   of those, still assemble", _pct(j.assemble_fraction)])
    rows.append(["any part rejected", _pct(r.rejected_fraction)])
    rows.append(["   of those assemblies, still assemble (use-as-is evidence)", _pct(r.rejected_assemble_fraction)])
    w, rss, mc = u.fmt_cmp(st.worst_case_min, st.rss_min, st.mc_low)
    rows.append(["least clearance: worst case (sum of half-ranges)", w])
    rows.append(["least clearance: RSS (root sum of squares)", rss])
    rows.append(["least clearance: Monte Carlo mean - 3 sigma", mc])
    rows.append(["clearance mean, sigma", f"{u.fmt(st.mc_mean)}, {u.fmt(st.mc_sigma)}"])
    for name, v in sorted(r.contributions, key=lambda kv: -kv[1]):
        rows.append([f"contribution: {name}", f"{v:.1f} %"])
    nd = r.needed
    if nd is not None and nd.precision is not None:
        if nd.n_normal:
            rows.append([f"samples for +-{nd.precision:g} on P (normal approximation)", str(nd.n_normal)])
        rows.append([f"samples for P < {nd.precision:g} with no interference seen", str(nd.n_zero)])
    rows.append(["samples, seed", f"{r.samples}, {r.seed}"])
    return rows


def yield_colours(rows) -> list:
    """Red for a nonzero P(interference), green for zero (the verdict roles' colours)."""
    out = [None] * len(rows)
    if len(rows) > 1:
        zero = rows[1][1].startswith("0 /")
        out[1] = [None, S.ROLE_COLOUR["ok" if zero else "fail"]]
    return out


def build_yield_page(res: SceneResult, r, page_no: int, pages: int):
    """The page of one yield run ``r`` (a :class:`geom.yieldstats.YieldResult`)."""
    u = res.scene.units
    char = f"statistical fit of {r.kind} {r.index + 1}: {r.label}"
    with evidence_page(res, "HOW MANY FAIL", "statistical fit (Monte Carlo)", char, "", page_no, pages) as (p, y):
        x0, W = MARGIN, CONTENT_W
        y += 0.35
        h = 2.6
        ax = p.fig.add_axes(p.rect(x0 + 0.5, y, W * 0.62 - 0.5, h))
        draw_histogram(ax, r, u, fs=6.5)
        bx = p.fig.add_axes(p.rect(x0 + W * 0.80, y, W * 0.20 - 0.05, h))
        draw_contributions(bx, r, fs=6.5)
        y += h + 0.5
        p.text(x0, y, "histogram of the simulated clearance (bins as computed); red: interference side",
               fontsize=5.8, color=GREY)
        y += 0.25
        rows = yield_rows(res, r)
        y = _table(p, x0, y, [W * 0.62, W * 0.38], rows, 6.3, colours=yield_colours(rows)) + 0.1
        y = _paragraphs(p, x0, y, W, 6.0, "ASSUMPTIONS", list(r.assumptions), "yield-assumptions")
    return p.fig
