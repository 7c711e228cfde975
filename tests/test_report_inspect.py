"""`matezone report` with measured features and fasteners: the inspection evidence page, the
fastener page, results.json's inspections, and the --points / --bonus-basis options."""

import contextlib
import io
import json
import re
import shutil
from pathlib import Path

import matplotlib.image as mpimg
import pytest
from pypdf import PdfReader

from geom import analyse_scene, load
from geom.analysis import analyse_fastener
from geom.inspect import inspect_feature, inspection_to_json
from geom.readout import CAUTION
from matezone.cli import main
from viewer.report import SECTION_ROWS, condensed_sections

ROOT = Path(__file__).resolve().parent.parent
CAP = ROOT / "scenes" / "cap_bore_inspection.toml"
CAP_CSV = ROOT / "scenes" / "cap_bore_inspection.csv"
VALVE = ROOT / "scenes" / "valve_body_guide_pin.toml"


def _run(*argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main([str(a) for a in argv])
    return code, out.getvalue(), err.getvalue()


def _squash(s):
    return re.sub(r"\s+", "", s)


def _pages(path):
    return [p.extract_text() for p in PdfReader(str(path)).pages]


@pytest.fixture(scope="module")
def cap_report(tmp_path_factory):
    out = tmp_path_factory.mktemp("cap")
    code, stdout, stderr = _run("report", CAP, "--out", out)
    assert code == 0, stderr
    return out, stdout


@pytest.fixture(scope="module")
def cap_inspection():
    # the check values: computed here by geom.inspect from the scan shipped with the scene
    sc = load(CAP)
    return sc, inspect_feature(sc, "cap-bore")


def test_inspection_page_carries_the_numbers_and_verdicts(cap_report, cap_inspection):
    out, _ = cap_report
    sc, insp = cap_inspection
    u = sc.units
    pages = _pages(out / "report.pdf")
    assert len(pages) == 2  # the inspection page first, then the design fit of the one mate
    text = pages[0]
    assert "INSPECTION EVIDENCE" in text
    # numbers from geom.inspect.inspect_feature (computed above), at the units' precision
    ame, rel = u.fmt(insp.unrelated_ame), u.fmt(insp.related_ame)
    axis, allowed = u.fmt(insp.axis_deviation), u.fmt(insp.tolerance_allowed)
    vc = u.fmt(insp.virtual_condition)
    assert (ame, rel, axis, allowed, vc) == ("8.003", "7.990", "0.021", "0.018", "7.985")  # the demo scan
    flat = _squash(text)
    # envelopes beside least squares: each envelope named with its diameter
    assert _squash(f"unrelated AME ⌀{ame}") in flat and _squash(f"related AME ⌀{rel}") in flat
    assert _squash(f"tolerance allowed {allowed}") in flat
    assert _squash(f"axis reading {axis} (section centres)") in flat
    # the bonus and tolerance allowed as geom derived them (geom.inspect formulas)
    for formula in insp.formulas:
        assert _squash(formula) in flat, formula
    # the three verdicts with their ISO 14253-1 outcomes (from the InspectionResult)
    assert insp.axis_check.conforms is False and insp.surface_check.conforms is True
    assert "AXIS READING FAILS" in text
    assert _squash("axis reading: FAILS") in flat and _squash("surface reading: CONFORMS") in flat
    assert _squash("size reading: CONFORMS") in flat
    for c in (insp.size_check, insp.axis_check, insp.surface_check):
        assert _squash(c.detail) in flat, c.detail
        assert c.outcome in text
    # the least-squares side by side: LS size and its tolerance allowed
    ls = insp.least_squares
    assert u.fmt(ls.size) in text and u.fmt(ls.tolerance_allowed) in text
    # the explanation of the disagreement, as geom wrote it
    assert "WHY THE AXIS AND SURFACE READINGS DISAGREE" in text
    for para in insp.explanation:
        assert _squash(para) in flat
    # evidence page furniture: title block, dispositions, signatures, caution
    for s in ("NC-2026-077", "GX-220-014", "0417", "R. Lindqvist", "2026-12-09", "C4"):
        assert s in text, s
    for d in ("use-as-is", "rework", "repair", "scrap", "return to supplier"):
        assert d in text
    assert "signature" in text
    assert _squash(CAUTION) in flat


def test_inspection_section_table_is_condensed(cap_report, cap_inspection):
    out, _ = cap_report
    _, insp = cap_inspection
    text = _pages(out / "report.pdf")[0]
    n = len(insp.sections)
    assert n == 24 > SECTION_ROWS  # the demo scan: 24 rings
    shown = condensed_sections(insp.sections)
    assert f"{len(shown)} of {n} sections shown" in text
    top = insp.sections[-1]  # the widest ring, at the flared top: always shown
    assert f"{top.z:.3f}" in text and f"{top.ls_diameter:.3f}" in text


def test_inspection_pictures(cap_report):
    out, stdout = cap_report
    for view in ("iso", "section"):
        img = mpimg.imread(out / f"inspection_cap-bore_3d_{view}.png")
        assert img.shape[1] >= 1600 and img.shape[0] >= 1200
    assert "inspection cap-bore: 3D views -> " in stdout


def test_results_json_inspections_equal_inspection_to_json(cap_report, cap_inspection):
    out, _ = cap_report
    sc, insp = cap_inspection
    data = json.loads((out / "results.json").read_text(encoding="utf-8"))
    assert list(data["inspections"]) == ["cap-bore"]
    assert data["inspections"]["cap-bore"] == json.loads(json.dumps(inspection_to_json(insp)))
    assert data["caution"] == CAUTION


def test_points_and_related_bonus_basis(tmp_path):
    # --points for the feature (the same scan, given on the command line) and the related basis:
    # the related AME is below MMC, so geom gives no bonus and the tolerance allowed is t alone
    csv = tmp_path / "scan.csv"
    shutil.copy(CAP_CSV, csv)
    out = tmp_path / "o"
    code, _, err = _run("report", CAP, "--out", out, "--points", f"cap-bore={csv}", "--bonus-basis", "related")
    assert code == 0, err
    sc = load(CAP)
    insp = inspect_feature(sc, "cap-bore", points=csv, bonus_basis="related")  # check values: geom.inspect
    assert insp.bonus == 0.0 and sc.units.fmt(insp.tolerance_allowed) == "0.015"
    data = json.loads((out / "results.json").read_text(encoding="utf-8"))
    assert data["inspections"]["cap-bore"] == json.loads(json.dumps(inspection_to_json(insp)))
    assert data["inspections"]["cap-bore"]["bonus_basis"] == "related"
    text = _pages(out / "report.pdf")[0]
    flat = _squash(text)
    assert "scan.csv" in flat and "--bonus-basisrelated" in flat
    assert _squash("tolerance allowed 0.015") in flat
    for formula in insp.formulas:
        assert _squash(formula) in flat


def _bad_csv(tmp_path):
    bad = tmp_path / "bad.csv"
    bad.write_text("x,y,z\n4.0,0.0,0.25\n0.0,4.0,0.25\n-4.0,n/a,0.25\n", encoding="utf-8")
    return bad


@pytest.mark.parametrize("argv, needle", [
    (lambda t: ["--points", f"cap-bore={_bad_csv(t)}"], "line 4: column 'y': expected a number, got 'n/a'"),
    (lambda t: ["--points", f"cap-bore={t / 'missing.csv'}"], "missing.csv: no such file"),
    (lambda t: ["--points", "nosuch=scan.csv"], "no feature has the id 'nosuch'"),
    (lambda t: ["--points", "cap-bore"], "expected ID=CSV"),
    (lambda t: ["--points", f"cap-bore={CAP_CSV}", "--points", f"cap-bore={CAP_CSV}"], "given twice"),
    (lambda t: ["--bonus-basis", "sideways"], "expected one of unrelated, related"),
])
def test_bad_inspection_input_exits_2_with_one_message(tmp_path, argv, needle):
    out = tmp_path / "o"
    code, _, err = _run("report", CAP, "--out", out, *argv(tmp_path))
    assert code == 2
    assert needle in err, err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert not (out / "report.pdf").exists()


def test_fastener_page_carries_the_fastener_values(tmp_path):
    code, stdout, err = _run("report", VALVE, "--out", tmp_path)
    assert code == 0, err
    sc = load(VALVE)
    u = sc.units
    res = analyse_scene(sc)
    floating, fixed = (analyse_fastener(fa) for fa in sc.fasteners)
    # ASME Y14.5 fastener appendix formulas, from memory: floating T = H - F; fixed T = (H - F) / 2;
    # fixed, equal tolerances without a projected zone: H = F + T1 + T2 (1 + 2P/D)
    t_float = floating.position_tolerance.value
    t_fixed = fixed.position_tolerance.value
    t_unproj = fixed.position_tolerance_unprojected.value
    assert (u.fmt(t_float), u.fmt(t_fixed), u.fmt(t_unproj)) == ("0.0160", "0.0155", "0.0066")
    fa = sc.fasteners[1]
    assert t_unproj * (2 + 2 * fa.projection / fa.thread_depth) == pytest.approx(fa.hole - fa.fastener)
    pages = _pages(tmp_path / "report.pdf")
    text = pages[-1]
    flat = _squash(text)
    assert "FASTENER TOLERANCES" in text
    for v in ("0.0160", "0.0155", "0.0066", "0.2500", "0.2660", "0.2810", "0.5000", "0.3750"):
        assert v in text, v
    for fr in (floating, fixed):
        assert _squash(fr.position_tolerance.formula(u, sc.standard)) in flat
    assert _squash(fixed.position_tolerance_unprojected.formula(u, sc.standard)) in flat
    assert _squash("H = F + T1 + T2(1 + 2P/D)") in flat
    assert "floating" in text and "fixed" in text and _squash(CAUTION) in flat
    for fid in res.fasteners:
        img = mpimg.imread(tmp_path / f"fastener_{fid}.png")
        assert img.shape[0] >= 1000 and img.shape[1] >= 1000
        svg = (tmp_path / f"fastener_{fid}.svg").read_text(encoding="utf-8")
        assert "<svg" in svg and "0.2500" in svg  # F, annotated with its true value
    assert "fastener body-studs: schematic -> " in stdout


def test_condensed_sections_keeps_ends_and_extremes(cap_inspection):
    _, insp = cap_inspection
    secs = insp.sections
    idx = condensed_sections(secs)
    assert idx == sorted(set(idx)) and idx[0] == 0 and idx[-1] == len(secs) - 1
    assert len(idx) <= SECTION_ROWS + 10  # at most the ends, the extremes of five columns, the spaced ones
    for key in ("ls_diameter", "mating_diameter", "roundness"):
        vals = [getattr(s, key) for s in secs]
        assert vals.index(max(vals)) in idx and vals.index(min(vals)) in idx
    assert condensed_sections(secs[:5]) == [0, 1, 2, 3, 4]
