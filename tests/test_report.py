"""`matezone report`: files written headless, the PDF's numbers, results.json, bad input."""

import contextlib
import io
import json
import re
from pathlib import Path

import matplotlib.image as mpimg
import pytest
from pypdf import PdfReader

from geom import analyse_scene, load, result_to_json
from geom.model import Standard
from geom.readout import CAUTION
from matezone.cli import main
from viewer.report import FASTENERS_PER_PAGE, build_page, item_states, report_items
from scenetext import hole, pin, scene_toml, tol

ROOT = Path(__file__).resolve().parent.parent
SCENES = sorted((ROOT / "scenes").glob("*.toml"))
BRACKET = ROOT / "scenes" / "sensor_bracket_interference.toml"


def _run(*argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(list(argv))
    return code, out.getvalue(), err.getvalue()


def _pdf_text(path):
    return "\n".join(p.extract_text() for p in PdfReader(str(path)).pages)


def _squash(s):
    return re.sub(r"\s+", "", s)


@pytest.fixture(scope="module")
def demo_report(tmp_path_factory):
    """``matezone report SCENE --out DIR`` for a demo scene, run once per scene in this module:
    returns (folder, stdout, the PDF's page texts)."""
    done = {}

    def build(scene):
        if scene not in done:
            out = tmp_path_factory.mktemp(scene.stem)
            code, stdout, stderr = _run("report", str(scene), "--out", str(out))
            assert code == 0, stderr
            done[scene] = out, stdout, [p.extract_text() for p in PdfReader(str(out / "report.pdf")).pages]
        return done[scene]

    return build


@pytest.fixture(scope="module")
def bracket_report(demo_report):
    out, stdout, _ = demo_report(BRACKET)
    return out, stdout


def test_report_writes_every_file(bracket_report):
    out, stdout = bracket_report
    key = "mate_bracket-hole__locating-pin"
    png3d = out / f"{key}_3d_iso.png"
    img = mpimg.imread(png3d)
    assert img.shape[1] >= 1600 and img.shape[0] >= 1200
    for view in ("through", "section", "bonus"):
        img = mpimg.imread(out / f"{key}_{view}.png")
        assert img.shape[1] >= 1600 and img.shape[0] >= 1200
        svg = (out / f"{key}_{view}.svg").read_text(encoding="utf-8")
        assert svg.lstrip().startswith("<?xml") and "<svg" in svg
        assert (out / f"{key}_{view}.pdf").read_bytes().startswith(b"%PDF")
    assert (out / "report.pdf").exists()
    # one progress line per step, numbered
    steps = [ln for ln in stdout.splitlines() if ln.startswith("[")]
    assert len(steps) == 6
    assert all(re.match(rf"\[{i}/6\] .+ -> ", ln) for i, ln in enumerate(steps, 1))
    assert "3D view -> " in steps[0] and str(png3d) in steps[0]


def test_results_json_equals_analyze_json(bracket_report):
    out, _ = bracket_report
    expect = result_to_json(analyse_scene(load(BRACKET)))
    expect["caution"] = CAUTION
    got = json.loads((out / "results.json").read_text(encoding="utf-8"))
    assert got.pop("inspections") == {}  # no feature of this scene has measured data
    assert got == json.loads(json.dumps(expect))
    # and the same as `matezone analyze --json` prints
    code, stdout, _ = _run("analyze", str(BRACKET), "--json")
    assert code == 0 and json.loads(stdout) == got


def test_pdf_carries_the_computed_numbers(demo_report):
    out, _, pages = demo_report(BRACKET)
    reader = PdfReader(str(out / "report.pdf"))
    assert len(reader.pages) == 1  # one mate, no lone feature
    text = "\n".join(pages)
    # check values: hole VC 6.000 - 0.030 = 5.970, pin VC 5.990 + 0.010 = 6.000, clearance
    # -0.030 (ASME Y14.5-2018 from memory; tests/test_scenes.py), sizes-alone +0.010
    for s in ("5.970", "6.000", "-0.030", "+0.010", "INTERFERES by 0.030 mm",
              "VC = MMC - t = 6.000 - 0.030 = 5.970"):
        assert s in text, s
    # the hole's largest bonus |LMC - MMC| = 6.012 - 6.000 = 0.012 and its resultant condition
    # RC = LMC + t + bonus = 6.012 + 0.030 + 0.012 = 6.054 (ASME Y14.5-2018, from memory), from
    # the scene's limits [6.000, 6.012] and position 0.030 at MMC, computed here
    lmc, mmc, t = 6.012, 6.000, 0.030
    for s in (f"{lmc - mmc:.3f}", f"{lmc + t + (lmc - mmc):.3f}"):
        assert s in text, s
    # the title block from the scene's [report] table
    for s in ("NCR-2026-0117", "SB-3-002", "L26-1187", "R. Ferreira", "2026-12-02", "D3"):
        assert s in text, s
    for d in ("use-as-is", "rework", "repair", "scrap", "return to supplier"):
        assert d in text
    assert _squash(CAUTION) in _squash(text)
    meta = reader.metadata
    assert "Sensor bracket" in meta.title


def test_what_if_size_changes_pictures_not_numbers(tmp_path):
    # bonus at MMC (ASME Y14.5-2018, from memory): at 6.010 the hole is allowed 0.040; the
    # clearance at these states stays 5.970 - 6.000 = -0.030 (VC is constant)
    code, _, err = _run("report", str(BRACKET), "--out", str(tmp_path), "--size", "bracket-hole=6.010",
                        "--view", "top")
    assert code == 0, err
    text = _pdf_text(tmp_path / "report.pdf")
    assert "What-if" in text and "6.010" in text and "0.040" in text
    assert (tmp_path / "mate_bracket-hole__locating-pin_3d_top.png").exists()
    # the worst-case table is unchanged
    assert "VC = MMC - t = 6.000 - 0.030 = 5.970" in text


@pytest.mark.parametrize("argv, needle", [
    (["--size", "nosuch=6.0"], "no feature has the id 'nosuch'"),
    (["--size", "bracket-hole=6.5"], "outside the limits of 'bracket-hole', 6.000 .. 6.012 mm"),
    (["--size", "bracket-hole"], "expected ID=VALUE"),
    (["--size", "bracket-hole=abc"], "expected a number"),
    (["--size", "bracket-hole=6.001", "--size", "bracket-hole=6.002"], "given twice"),
    (["--view", "sideways"], "expected one of iso, top, section"),
])
def test_bad_input_exits_2_with_one_message(tmp_path, argv, needle):
    out = tmp_path / "o"
    code, stdout, err = _run("report", str(BRACKET), "--out", str(out), *argv)
    assert code == 2
    assert needle in err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert not (out / "report.pdf").exists()


def test_bad_scene_exits_2(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(scene_toml(hole("h", (6, 5), 8)))  # limits the wrong way round
    code, _, err = _run("report", str(bad), "--out", str(tmp_path / "o"))
    assert code == 2 and "limits" in err


@pytest.mark.parametrize("scene", SCENES, ids=[s.name for s in SCENES])
def test_every_demo_scene_produces_its_report(scene, demo_report):
    out, _, pages = demo_report(scene)
    sc = load(scene)
    mated = {m.hole for m in sc.mates} | {m.pin for m in sc.mates}
    fit_pages = len(sc.mates) + len([f for f in sc.features if f.id not in mated])
    measured = [f for f in sc.features if f.measured is not None]
    fastener_pages = -(-len(sc.fasteners) // FASTENERS_PER_PAGE)
    from geom.yieldmc import targets

    yield_pages = len(targets(sc)) if sc.statistics is not None else 0  # a statistical-fit page per mate / interface
    assert len(pages) == len(measured) + fit_pages + len(sc.patterns) + fastener_pages + yield_pages
    assert len(list(out.glob("*_3d_iso.png"))) == fit_pages + len(measured)
    assert len(list(out.glob("inspection_*_3d_section.png"))) == len(measured)
    assert len(list(out.glob("*.svg"))) == 3 * fit_pages + len(sc.fasteners) + len(sc.patterns) + yield_pages
    data = json.loads((out / "results.json").read_text(encoding="utf-8"))
    assert sorted(data["inspections"]) == sorted(f.id for f in measured)
    raw = "\n".join(pages)
    text = _squash(raw)
    assert _squash(CAUTION) in text
    res = analyse_scene(sc)
    for m in res.mates:  # each mate's worst-case clearance, as analysed, is on its page
        assert sc.units.fmt(m.clearance_min, signed=True) in text
    # signed pages name the standard only: no clause numbers, no "from memory"
    assert "§" not in raw and "frommemory" not in text.lower()
    if sc.standard is Standard.ISO:  # ISO terms (ISO 2692, ISO 8015), never the ASME ones
        for word in (r"\bbonus\b", r"\bVC\b", r"\bAME\b", r"actual mating", r"Rule #1", r"\bRFS\b", r"\bMMC\b"):
            assert not re.search(word, raw), word
    # a report that judges measured parts titles its fit pages as design intent
    first = len(measured) + len(sc.patterns)  # inspections, then patterns, then the fit pages
    fit = pages[first:first + fit_pages]
    for page in fit:
        if measured:
            assert "DESIGN INTENT" in page and "FIT EVIDENCE" not in page
            assert _squash("not a verdict on the measured part") in _squash(page)
        else:
            assert "FIT EVIDENCE" in page and "DESIGN INTENT" not in page


def test_projected_hole_rows_name_the_projected_height():
    # a hole whose zone is projected: IB/OB apply within the projected height; a mating pin meets
    # the boundary over the hole's own length, MMC - t L/P for an orientation tolerance (floating
    # zone): 10.000 - 0.020 * 15 / 12 = 9.975 (ASME Y14.5 projected zone, from memory; computed here)
    sc = load(ROOT / "scenes" / "example_annotated.toml")
    bore = sc.feature("bore")
    t, L, P = bore.tolerance.value, bore.length, bore.tolerance.projected
    assert bore.mmc - t * L / P == pytest.approx(9.975)
    res = analyse_scene(sc)
    item = next(i for i in report_items(res) if i.subject.hole is not None and i.subject.hole.id == "bore")
    fig = build_page(res, item, item_states(res, item, None), None, 1, 1)  # the page, without the 3D picture
    text = _squash(" ".join(t.get_text() for t in fig.texts))
    r = res.features["bore"]
    for d in (r.inner_boundary, r.outer_boundary):  # IB/OB labelled: they hold within the projected height
        assert _squash(f"{d.formula(sc.units, sc.standard)}, within the projected height") in text
    assert _squash(f"{r.in_hole_boundary.formula(sc.units, sc.standard)}, within the hole's own length") in text
    assert sc.units.fmt(bore.mmc - t * L / P) in text  # 9.975, computed above


def test_free_text_is_never_math_markup():
    # a part name with "$" pairs (e.g. a price note) must print literally (common practice, no source)
    import matplotlib
    from matplotlib.figure import Figure

    import viewer.figures  # noqa: F401  (sets the rule for every figure)

    assert matplotlib.rcParams["text.parse_math"] is False
    fig = Figure()
    t = fig.text(0.1, 0.5, "bore $x$ face")
    assert t.get_parse_math() is False


_TYPED_PIN = scene_toml(pin("p", (5.98, 5.99), 8, tolerance=tol("perpendicularity", 0.010),
                            measured={"size": 5.986, "axis_deviation": 0.004}), title="typed pin")


def test_every_page_starts_and_ends_the_same_way():
    # the fit, inspection and fastener pages share one start (header, title block) and one foot:
    # exactly one caution, the same text at the same place (every exported page carries the
    # caution: DEVELOPERS.md house rules; common practice, no source). Invented typed values.
    from geom.scenefile import loads
    from viewer.report import build_fastener_page, build_inspection_page, scene_inspections

    sc = load(ROOT / "scenes" / "example_annotated.toml")
    res = analyse_scene(sc)
    assert res.fasteners  # the scene has fasteners, so it has a fastener page
    item = report_items(res)[0]
    typed = loads(_TYPED_PIN)
    figs = [build_page(res, item, item_states(res, item, None), None, 1, 3),
            build_fastener_page(res, list(res.fasteners)[:1], 3, 3),
            build_inspection_page(analyse_scene(typed), scene_inspections(typed)["p"], (), 2, 3)]
    footers = []
    for no, fig in zip((1, 3, 2), figs):
        texts = [t.get_text() for t in fig.texts]
        for label in ("REPORT NUMBER", "PART NUMBER", "REMARKS", f"page {no} of 3"):
            assert label in texts, label
        caution = [t for t in fig.texts if t.get_gid() == "caution"]
        assert len(caution) == 1
        assert _squash(caution[0].get_text()) == _squash("CAUTION: " + CAUTION)
        footers.append(caution[0].get_position())
    assert footers[0] == footers[1] == footers[2]
