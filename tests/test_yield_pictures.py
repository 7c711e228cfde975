"""The statistical fit's picture and report page on the invented valve-body demo.

Check values: the histogram's bars are geom's bins (numpy.histogram of the sampled clearances
over the same edges, recomputed here); the worst-case line sits at the worst-case clearance of
geom.analysis (hole VC against pin VC, ASME Y14.5 virtual condition, common practice); the zero
line at zero clearance (line-to-line fit, common practice, no source).
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.patches import Rectangle

from geom import analyse_scene, load
from geom.yieldmc import run_yield

SCENE = Path(__file__).resolve().parents[1] / "scenes" / "valve_body_guide_pin.toml"


@pytest.fixture(scope="module")
def res():
    sc = load(SCENE)
    return analyse_scene(replace(sc, statistics=replace(sc.statistics, samples=20000)))


@pytest.fixture(scope="module")
def yr(res):
    return run_yield(res.scene, "mate", 0)


def _line_x(ax, gid):
    lines = [ln for ln in ax.get_lines() if ln.get_gid() == gid]
    assert len(lines) == 1
    return float(np.asarray(lines[0].get_xdata(), float)[0])


def test_the_bars_are_geoms_bins_and_the_lines_sit_at_zero_and_the_worst_case(res, yr):
    from viewer.figures.yieldplot import yield_figure

    fig = yield_figure(yr, res.scene.units)
    ax = fig.axes[0]
    bars = [p for p in ax.patches if isinstance(p, Rectangle) and p.get_gid() == "bins"]
    assert len(bars) == len(yr.hist_counts)
    # numpy reference: the sampled clearances counted over the same edges
    ref, _ = np.histogram(yr.clearance, bins=yr.hist_edges)
    assert [round(b.get_height()) for b in bars] == list(ref)
    assert [b.get_x() for b in bars] == pytest.approx(list(yr.hist_edges[:-1]))
    assert _line_x(ax, "zero") == 0.0
    wc = res.mates[0].clearance_min  # geom.analysis worst case (VC against VC)
    assert _line_x(ax, "worst-case") == pytest.approx(wc, abs=1e-12)
    assert yr.worst_case == pytest.approx(wc, abs=1e-12)
    texts = " ".join(t.get_text() for t in ax.texts)
    assert f"worst case {res.scene.units.fmt_cmp(wc, 0.0)[0]}" in texts
    contrib = [p for p in fig.axes[1].patches if p.get_gid() == "contributions"]
    assert sorted(p.get_width() for p in contrib) == pytest.approx(sorted(v for _, v in yr.contributions))


def test_the_title_carries_p_and_its_interval(res, yr):
    from viewer.figures.yieldplot import yield_figure

    title = yield_figure(yr, res.scene.units).axes[0].get_title(loc="left")
    assert f"{yr.failures} / {yr.samples}" in title
    assert f"{yr.p_ci[1]:.4g}" in title


def test_the_page_renders_to_pdf_with_its_table(res, yr, tmp_path):
    from viewer.report.yieldpage import build_yield_page, yield_rows

    rows = yield_rows(res, yr)
    labels = [r[0] for r in rows]
    assert any("RSS" in s for s in labels) and any("worst case" in s for s in labels)
    assert sum("rejected by its own tolerance" in s for s in labels) == len(yr.rejections) == 2
    fig = build_yield_page(res, yr, 1, 1)
    q = tmp_path / "y.pdf"
    with PdfPages(q) as pp:
        pp.savefig(fig)
    assert q.stat().st_size > 5000
    words = " ".join(t.get_text() for t in fig.texts)
    assert "These results support" in words  # the caution footer (geom.readout.CAUTION)
    assert yr.assumptions[0][:40] in words.replace("\n", " ")


def test_the_report_writes_the_page_and_the_yield_key(res, tmp_path):
    from viewer.report.writer import write_report

    written = write_report(res, tmp_path)
    assert (tmp_path / "yield_mate_1.png") in written
    data = json.loads((tmp_path / "results.json").read_text())
    assert len(data["yield"]) == 1
    y = data["yield"][0]
    again = run_yield(res.scene, "mate", 0)  # seeded: the same numbers again
    assert y["samples"] == 20000 and y["p_interference"] == again.p_interference
    assert y["histogram"]["counts"] == [int(k) for k in again.hist_counts]


def test_no_statistics_no_yield_key(tmp_path):
    from viewer.report.writer import _yield_runs

    sc = load(SCENE)
    assert _yield_runs(analyse_scene(replace(sc, statistics=None))) == []
