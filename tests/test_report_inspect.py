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
from matplotlib.colors import to_hex
from pypdf import PdfReader

from geom import analyse_scene, load
from geom.analysis import analyse_fastener
from geom.conformance import Outcome, readings_disagree
from geom.inspect import inspect_feature, inspection_to_json
from geom.readout import CAUTION
from geom.scenefile import loads
from matezone.cli import main
from viewer.report import SECTION_ROWS, build_inspection_page, condensed_sections
from viewer.style import ROLE_COLOUR
from scenetext import fastener, measured_bore, scene_toml

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
def cap_pages(cap_report):
    """The text of each page of the cap report, read once."""
    return _pages(cap_report[0] / "report.pdf")


@pytest.fixture(scope="module")
def valve_report(tmp_path_factory):
    out = tmp_path_factory.mktemp("valve")
    code, stdout, stderr = _run("report", VALVE, "--out", out)
    assert code == 0, stderr
    return out, stdout, _pages(out / "report.pdf")


@pytest.fixture(scope="module")
def cap_inspection():
    # the check values: computed here by geom.inspect from the scan shipped with the scene
    sc = load(CAP)
    return sc, inspect_feature(sc, "cap-bore")


# the demo scan's design (scripts/make_demo_points.py): bottom diameter, tilt over the length,
# the 24 rings' heights, lobe amplitude and probe noise
D_BOTTOM, TILT, LENGTH, LOBE_AMP, NOISE = 8.005, 0.015, 12.0, 0.0005, 0.00015
RING_Z = (0.25, 12.0 - 0.25)


def _design_readings():
    """Independent check values from the demo scan's design (scripts/make_demo_points.py): the
    bore is tilted 0.015 over its length along one direction and its upper half flares, the
    section centres drifting a further 0.0075 * ((zeta - 0.5) / 0.5)^2 at zeta = z / 12 > 0.5,
    while one wall stays straight. The centres lie on one line through A, so the smallest circle
    holding them projected on A has their span as diameter (the median line reading); the
    feature axis (the axis of the largest inscribed cylinder, along the straight wall) carries
    only the tilt."""
    import numpy as np

    zs = np.linspace(0.25, 12.0 - 0.25, 24)  # the scan's 24 rings
    zeta = zs / 12.0
    offset = 0.015 * zeta + 0.0075 * np.clip((zeta - 0.5) / 0.5, 0.0, None) ** 2
    return 0.015, float(offset.max() - offset.min())


def test_inspection_page_carries_the_numbers_and_verdicts(cap_pages, cap_inspection):
    sc, insp = cap_inspection
    u = sc.units
    pages = cap_pages
    assert len(pages) == 2  # the inspection page first, then the design fit of the one mate
    text = pages[0]
    assert "INSPECTION EVIDENCE" in text
    # the readings agree with the scan's design (computed above, independently of geom)
    feature_axis, median_line = _design_readings()
    assert insp.feature_axis.deviation == pytest.approx(feature_axis, abs=0.0008)
    assert insp.median_axis.deviation == pytest.approx(median_line, abs=0.0008)
    # tolerance allowed = t + bonus, bonus = AME - MMC (ASME Y14.5 bonus at MMC); the bore's
    # narrowest diameter is 8.005 less the 0.0005 lobes on each side, less probe noise
    assert 8.000 + 0.0028 <= insp.unrelated_ame <= 8.005 - 2 * 0.0005 + 1e-9
    assert insp.tolerance_allowed == pytest.approx(0.015 + insp.unrelated_ame - 8.000, abs=1e-9)
    # VC = MMC - t = 8.000 - 0.015 = 7.985 (ASME Y14.5 virtual condition of a hole at MMC)
    assert insp.virtual_condition == pytest.approx(7.985, abs=1e-9)
    # the related AME (held normal to A) is bounded by the straight wall at the top ring and the
    # other wall at the bottom ring: D_BOTTOM less the tilt between the end rings, within the
    # lobes and a few noise deviations (the scan's design; a hole's related AME, ASME Y14.5.1)
    tilt_span = TILT * (RING_Z[1] - RING_Z[0]) / LENGTH
    assert insp.related_ame == pytest.approx(D_BOTTOM - tilt_span, abs=2 * LOBE_AMP + 4 * NOISE)
    # the numbers the page prints, at the units' precision: mm to 3 decimals (Units.fmt;
    # common practice, no source), the readings and their limit with the same digits
    ame, rel = u.fmt(insp.unrelated_ame), u.fmt(insp.related_ame)
    fa, ml, allowed = u.fmt_cmp(insp.feature_axis.deviation, insp.median_axis.deviation, insp.tolerance_allowed)
    vc = u.fmt(insp.virtual_condition)
    for shown in (ame, rel, fa, ml, allowed, vc):
        assert re.fullmatch(r"\d\.\d{3}", shown), shown
    assert vc == "7.985"  # VC, above
    assert len({fa, ml, allowed}) == 3  # unequal numbers never print equal (Units.fmt_cmp)
    flat = _squash(text)
    # envelopes beside least squares: each envelope named as geom names it, with its diameter
    assert _squash(f"{insp.unrelated.name} ⌀{ame}") in flat and _squash(f"{insp.related.name} ⌀{rel}") in flat
    assert _squash(f"tolerance allowed {allowed}") in flat
    # both axis readings, and which governs (ASME Y14.5: perpendicularity of a feature of size
    # applies to its feature axis; the derived median line only to straightness, from memory)
    assert insp.axis is insp.feature_axis and insp.axis.basis == "feature axis"
    assert _squash(f"feature axis reading: governs {fa}") in flat
    assert _squash(f"median line reading: does not govern {ml}") in flat
    assert _squash(insp.axis_governs) in flat
    # the bonus and tolerance allowed as geom derived them (geom.inspect formulas)
    for formula in insp.formulas:
        assert _squash(formula) in flat, formula
    # the one verdict, word for word as geom gives it: the part conforms (feature axis
    # 0.015 <= 0.018 and surface 7.990 >= VC 7.985, each at least U = 0.001 inside its limit,
    # ISO 14253-1 decision rule)
    assert insp.verdict.outcome is Outcome.CONFORMS
    assert "PART CONFORMS" in text and _squash(insp.verdict.headline) in flat
    assert _squash(insp.verdict.why) in flat
    # every reading with its word (geom.conformance.verdict_word) and its outcome text
    # and the nonconformance report's three cells: required, actual, deviation
    from viewer.report.readings import required_actual_deviation

    for c in (insp.size_check, insp.axis_check, insp.surface_check, insp.other_axis_check):
        for cell in required_actual_deviation(c, u):
            assert _squash(cell) in flat, cell
        assert _squash(c.outcome_text) in flat
    # by hand: the median line 0.021 against the 0.018 allowed is 0.021 - 0.018 = 0.003 beyond;
    # the surface 7.990 against VC 7.985 leaves 0.005 (the scene's demo numbers, hand arithmetic)
    assert _squash("<= 0.018 0.021 +0.003 beyond") in flat
    assert _squash(">= 7.985 7.990 margin 0.005") in flat
    assert _squash("size (governs): CONFORMS") in flat and _squash("surface (governs): CONFORMS") in flat
    assert _squash("axis (feature axis): CONFORMS") in flat
    assert _squash("axis (median line) (does not govern): DOES NOT CONFORM") in flat
    assert insp.other_axis_check.conforms is False  # 0.021 > 0.018 + U: nonconformance proven
    # the median line disagrees with the feature axis: a labelled note, as geom wrote it
    assert readings_disagree(insp.other_axis_check, insp.axis_check)
    assert "NOTE: READINGS THAT DISAGREE" in text
    for para in insp.verdict.notes + insp.explanation:
        assert _squash(para) in flat
    # no local verdict words of the old page
    assert "FAILS" not in text
    # the least-squares side by side: LS size and its tolerance allowed
    ls = insp.least_squares
    assert u.fmt(ls.size) in text and u.fmt(ls.tolerance_allowed) in text
    # evidence page furniture: title block, dispositions, signatures, caution
    for s in ("NC-2026-077", "GX-220-014", "0417", "R. Lindqvist", "2026-12-09", "C4"):
        assert s in text, s
    for d in ("use-as-is", "rework", "repair", "scrap", "return to supplier"):
        assert d in text
    assert "signature" in text
    assert _squash(CAUTION) in flat


def test_design_fit_page_is_titled_as_design_intent(cap_pages):
    # a report that judges the measured bore also shows the worst-case fit the drawing allows:
    # that page is design intent, not a verdict on the part (the part's verdict is page 1)
    first, second = cap_pages
    assert "PART CONFORMS" in first and "PART CONFORMS" not in second
    assert "DESIGN INTENT" in second and "FIT EVIDENCE" not in second
    assert _squash("worst-case fit from the drawing limits — not a verdict on the measured part") in _squash(second)
    assert "design intent: ASSEMBLES" in second


def test_inspection_headline_is_geoms_verdict_in_its_role_colour(cap_inspection):
    # the page's headline box shows insp.verdict.headline exactly, in ROLE_COLOUR[role]; the
    # same for a part that does not conform (typed values: axis 0.030 > 0.015 + 0, RFS, so the
    # axis governs; ASME Y14.5, no modifier: tolerance allowed = t)
    sc, insp = cap_inspection
    res = analyse_scene(sc)
    bad_scene = loads(measured_bore("b", (8.0, 8.015), material="RFS", title="typed inspection",
                                    measured={**_TYPED, "axis_deviation": 0.030}))
    bad = inspect_feature(bad_scene, "b")
    assert bad.verdict.role == "fail" and bad.verdict.headline.startswith("PART DOES NOT CONFORM")
    for scene_res, r in ((res, insp), (analyse_scene(bad_scene), bad)):
        fig = build_inspection_page(scene_res, r)
        heads = [t for t in fig.texts if t.get_gid() == "headline"]
        assert len(heads) == 1
        assert heads[0].get_text().replace("\n", " ") == r.verdict.headline
        assert to_hex(heads[0].get_color()) == to_hex(ROLE_COLOUR[r.verdict.role])


# invented typed values of a measured bore 8.000 - 8.015 or 8.022, perpendicularity 0.015 to A
# (tests/scenetext.py measured_bore); each test adds its axis reading
_TYPED = {"size": 8.004, "related_size": 7.990, "local_sizes": [8.005, 8.012]}


def test_inspection_section_table_is_condensed(cap_pages, cap_inspection):
    _, insp = cap_inspection
    text = cap_pages[0]
    n = len(insp.sections)
    assert n == 24 > SECTION_ROWS  # the demo scan: 24 rings
    shown = condensed_sections(insp.sections)
    assert f"{len(shown)} of {n} sections shown" in text
    top = insp.sections[-1]  # the widest ring, at the flared top: always shown
    u = insp.units
    assert u.fmt(top.z) in text and u.fmt(top.ls_diameter) in text


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
    (lambda t: ["--points", f"cap-bore={_bad_csv(t)}"], ("line 4: column 'y': expected a number", "got 'n/a'")),
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
    for part in (needle,) if isinstance(needle, str) else needle:
        assert part in err, err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert not (out / "report.pdf").exists()


def test_fastener_page_carries_the_fastener_values(valve_report):
    out, stdout, pages = valve_report
    sc = load(VALVE)
    u = sc.units
    res = analyse_scene(sc)
    floating, fixed = (analyse_fastener(fa) for fa in sc.fasteners)
    # ASME Y14.5 fastener appendix formulas, from memory: floating T = H - F; fixed T = (H - F) / 2;
    # fixed, equal tolerances without a projected zone: H = F + T1 + T2 (1 + 2P/D), so
    # T = (H - F) / (2 + 2P/D); the scene's inputs: floating F 0.2500, H 0.2660; fixed F 0.2500,
    # H 0.2810, P 0.500, D 0.375 (inches)
    t_float, t_fixed = 0.2660 - 0.2500, (0.2810 - 0.2500) / 2
    t_unproj = (0.2810 - 0.2500) / (2 + 2 * 0.500 / 0.375)
    assert floating.position_tolerance.value == pytest.approx(t_float)
    assert fixed.position_tolerance.value == pytest.approx(t_fixed)
    assert fixed.position_tolerance_unprojected.value == pytest.approx(t_unproj)
    fastener_pages = [p for p in pages if "FASTENER TOLERANCES" in p]
    assert len(fastener_pages) == 1  # the fastener page comes before the statistical-fit page
    text = fastener_pages[0]
    flat = _squash(text)
    assert "FASTENER TOLERANCES" in text
    # inch values at 4 decimals (Units.fmt; common practice, no source): 0.0160, 0.0155, 0.0066
    for v in (f"{t_float:.4f}", f"{t_fixed:.4f}", f"{t_unproj:.4f}", "0.2500", "0.2660", "0.2810", "0.5000",
              "0.3750"):
        assert v in text, v
    for fr in (floating, fixed):
        assert _squash(fr.position_tolerance.formula(u, sc.standard)) in flat
    assert _squash(fixed.position_tolerance_unprojected.formula(u, sc.standard)) in flat
    assert _squash("H = F + T1 + T2(1 + 2P/D)") in flat
    assert "floating" in text and "fixed" in text and _squash(CAUTION) in flat
    for fid in res.fasteners:
        img = mpimg.imread(out / f"fastener_{fid}.png")
        assert img.shape[0] >= 1000 and img.shape[1] >= 1000
        svg = (out / f"fastener_{fid}.svg").read_text(encoding="utf-8")
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


_ISO_TYPED = measured_bore("b", (8.0, 8.022), envelope=True, title="ISO typed inspection", standard="iso",
                           measured={**_TYPED, "axis_deviation": 0.012})


def test_iso_inspection_page_uses_iso_terms(tmp_path):
    # invented typed values. ISO 2692: increase = GX - MMS = 8.004 - 8.000 = 0.004, tolerance
    # allowed 0.015 + 0.004 = 0.019, MMVS = MMS - t = 8.000 - 0.015 = 7.985; ISO 1101: the
    # extracted median line governs the axis reading; ISO 14405-1 (E): GX not below MMS
    sc = loads(_ISO_TYPED)
    res = analyse_scene(sc)
    from viewer.report import write_report

    write_report(res, tmp_path)
    page = _pages(tmp_path / "report.pdf")[0]
    flat = _squash(page)
    for s in ("increase = GX - MMS = 8.004 - 8.000 = 0.004", "tolerance allowed = t + increase = 0.015 + 0.004 = 0.019",
              "MMVS = MMS - t = 8.000 - 0.015 = 7.985", "envelope (E)", "median line reading: governs 0.012",
              "INCREASE BASIS", "PART CONFORMS"):
        assert _squash(s) in flat, s
    for word in (r"\bbonus\b", r"\bVC\b", r"\bAME\b", r"actual mating", r"Rule #1", r"\bRFS\b", r"\bMMC\b", "§",
                 "from memory"):
        assert not re.search(word, page, re.IGNORECASE if word == "from memory" else 0), word


def _fasteners_only(std: str) -> str:
    return scene_toml(fasteners=[fastener("cover-screws", "floating", 6.0, 6.6),
                                 fastener("cover-studs", "fixed", 6.0, 6.6, thread_depth=9.0, projection=8.0)],
                      title="Cover screws", standard=std)


@pytest.mark.parametrize("std", ["asme", "iso"])
def test_fastener_only_scene_writes_the_fastener_page_and_json(tmp_path, std):
    # ASME Y14.5 fastener formulas (from memory): floating T = H - F = 6.6 - 6.0 = 0.6; fixed
    # T = (H - F) / 2 = 0.3; fixed without a projected zone, equal tolerances, from
    # H = F + T + T(1 + 2P/D): T = (H - F) / (2 + 2P/D) = 0.6 / (2 + 16/9) = 0.1588...
    sc = loads(_fasteners_only(std))
    assert len(sc.features) == 0
    t_float, t_fixed = 6.6 - 6.0, (6.6 - 6.0) / 2
    t_unproj = (6.6 - 6.0) / (2 + 2 * 8.0 / 9.0)
    from viewer.report import write_report

    written = write_report(analyse_scene(sc), tmp_path / "direct")
    assert {q.name for q in written} >= {"report.pdf", "results.json", "fastener_cover-screws.png"}
    # and through the command, from a file
    scene = tmp_path / "fasteners.toml"
    scene.write_text(_fasteners_only(std), encoding="utf-8")
    code, _, err = _run("report", scene, "--out", tmp_path / "cli")
    assert code == 0, err
    for out in (tmp_path / "direct", tmp_path / "cli"):
        pages = _pages(out / "report.pdf")
        assert len(pages) == 1 and "FASTENER TOLERANCES" in pages[0]
        for v in (t_float, t_fixed, t_unproj):
            assert sc.units.fmt(v) in pages[0], v
        assert _squash(CAUTION) in _squash(pages[0])
        data = json.loads((out / "results.json").read_text(encoding="utf-8"))
        assert data["inspections"] == {} and data["features"] in ({}, [])
        fa = data["fasteners"]
        assert fa["cover-screws"]["position_tolerance"] == pytest.approx(t_float)
        assert fa["cover-studs"]["position_tolerance"] == pytest.approx(t_fixed)
        assert fa["cover-studs"]["position_tolerance_unprojected"] == pytest.approx(t_unproj)
        assert data["caution"] == CAUTION
    # --size has nothing to act on: one clear message, exit 2
    code, _, err = _run("report", scene, "--out", tmp_path / "bad", "--size", "x=6.0")
    assert code == 2 and "no features" in err and "Traceback" not in err


def test_title_block_carries_the_nonconformance_fields_and_no_file_name(cap_pages):
    # the demo scene's [report] table (scenes/cap_bore_inspection.toml): invented demo data
    text = cap_pages[0]
    for value in ("DWG-GX-220-014", "2 of 3", "Harlund Drive Systems", "PO 55-31907", "T. Okafor",
                  "CAL-CMM-03, due 2027-04", "CA-2026-041", "MRB, design authority GX-220"):
        assert _squash(value) in _squash(text), value
    for label in ("DRAWING NUMBER", "INSPECTED", "REJECTED", "CALIBRATION REFERENCE", "DISPOSITION AUTHORITY",
                  "CONTAINMENT", "CORRECTIVE ACTION REF."):
        assert label in text, label
    assert ".toml" not in text  # the header names the part, not the scene file


def test_title_block_rows_without_report_fields_are_the_fixed_blank_form():
    from viewer.report.page import CONTENT_W, title_block_rows

    rows = title_block_rows({}, "position", "⌖ ⌀0.1 (M) | A | B", "mm / ASME")
    assert [r[0][0] for r in rows] == ["report number", "customer", "quantity", "requirement (as stated)",
                                       "characteristic", "remarks"]
    assert all(v is None for r in rows for lbl, v, _ in r if lbl not in ("characteristic", "tolerance (feature control frame)", "units / standard"))
    for r in rows:  # fixed widths leave room for the last box of each row
        assert sum(w for *_, w in r if w is not None) < CONTENT_W - 0.8
    more = title_block_rows({"equipment": "bore gauge", "containment": "lot held"}, "", "", "")
    assert [r[0][0] for r in more][-3:] == ["inspection method", "disposition authority", "remarks"]
