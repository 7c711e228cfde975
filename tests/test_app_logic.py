"""The window's logic without Qt (viewer.windowlogic): readout rows at a what-if state, the fit
and the verdict banner at a state, the inspection rows, typed numbers, the scene as the editor
changes it, points files and the report command. No display and no Qt needed.

Check values are worked out inside each test from the scene file's numbers (the arithmetic of
the standard's formula, named beside it), from geom itself where the window only words geom's
result, or with the scene-file parser the command line uses.
"""

from __future__ import annotations

import math
import os
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from geom.analysis import analyse_scene
from geom.boundaries import FeatureState
from geom.model import Units
from geom.scenefile import SceneError, load
from viewer.windowlogic import banner, editing, export, fields, focus, points, readouts, whatif
from viewer.windowlogic.inspection import axis_readings, inspection_table, other_axis_basis, source_text
from viewer.windowlogic.looks import ROLE_LOOK

ROOT = Path(__file__).resolve().parent.parent
SCENES = ROOT / "scenes"
GEARBOX = SCENES / "gearbox_endcap_dowel.toml"
BRACKET = SCENES / "sensor_bracket_interference.toml"
FLANGE = SCENES / "motor_flange_studs.toml"
CAP = SCENES / "cap_bore_inspection.toml"
CAP_CSV = SCENES / "cap_bore_inspection.csv"
ALL_SCENES = sorted(SCENES.glob("*.toml"))

MM = Units.MM


def _gearbox():
    sc = load(GEARBOX)
    return sc, analyse_scene(sc)


def _rows(res, fid, state) -> dict[str, str]:
    return {r.quantity: r.value for r in whatif.whatif_rows(res, fid, state)}


# ---------------------------------------------------------------- importable without Qt


def test_window_logic_loads_no_qt():
    code = ("import viewer.windowlogic.banner, viewer.windowlogic.editing, viewer.windowlogic.export, "
            "viewer.windowlogic.fields, viewer.windowlogic.focus, viewer.windowlogic.inspection, "
            "viewer.windowlogic.looks, viewer.windowlogic.points, viewer.windowlogic.readouts, "
            "viewer.windowlogic.whatif, viewer.windowlogic.layers, viewer.windowlogic.messages, "
            "viewer.windowlogic.teaching, sys\n"
            "print(' '.join(sorted({m.split('.')[0] for m in sys.modules})))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert out.returncode == 0, out.stderr
    loaded = set(out.stdout.split())
    assert "viewer" in loaded and not loaded & {"PyQt5", "pyvistaqt", "qtpy", "sip"}


# ---------------------------------------------------------------- what-if rows


@pytest.mark.parametrize("size", [8.000, 8.0045, 8.010, 8.015])  # the scene file's limits: 8.000 .. 8.015
def test_whatif_rows_of_the_gearbox_bore_at_a_size(size):
    sc, res = _gearbox()
    rows = _rows(res, "cap-bore", FeatureState(size, 1.0, 0.0))
    t, mmc, length = 0.015, 8.000, 12.0  # the scene file: perpendicularity 0.015 at MMC, length 12
    bonus = size - mmc  # ASME Y14.5 MMC bonus: departure from MMC (from memory)
    allowed = t + bonus  # tolerance allowed = t + bonus (ASME Y14.5, from memory)
    assert rows["produced size"] == MM.fmt(size)
    assert rows["bonus at this size"] == MM.fmt(bonus)
    assert rows["tolerance allowed at this size"] == MM.fmt(allowed)
    assert rows["tolerance used"] == MM.fmt(allowed)  # all of it used
    # a hole's clear opening normal to A: the size less the tilt it takes up (common practice, no source)
    assert rows["clear opening normal to A"] == MM.fmt(size - allowed)
    assert rows["axis tilt"] == f"{math.degrees(math.atan(allowed / length)):.4f} deg"  # tan = used / L
    # the hole's VC = MMC - t (ASME Y14.5, from memory) does not move with the size
    assert rows["virtual condition (MMC) (constant)"] == MM.fmt(mmc - t)
    assert rows["room left to VC"] == MM.fmt(abs((size - allowed) - (mmc - t)))


def test_whatif_rows_with_part_of_the_tolerance_used_and_their_formulas():
    sc, res = _gearbox()
    rows = whatif.whatif_rows(res, "dowel", FeatureState(7.970, 0.4, 135.0))
    by = {r.quantity: r for r in rows}
    t, mmc = 0.005, 7.975  # the scene file's dowel
    allowed = t + (mmc - 7.970)  # a pin's bonus: MMC - size (ASME Y14.5, from memory)
    assert by["tolerance allowed at this size"].value == MM.fmt(allowed)
    assert by["tolerance used"].value == MM.fmt(0.4 * allowed)
    assert by["tolerance used"].formula == f"40 % of {MM.fmt(allowed)}, tilted toward 135 deg"
    # a pin sweeps a larger envelope when it tilts: size + used
    assert by["swept envelope normal to A"].value == MM.fmt(7.970 + 0.4 * allowed)
    assert [r.quantity for r in rows if r.constant] == ["virtual condition (MMC) (constant)"]
    assert by["virtual condition (MMC) (constant)"].value == MM.fmt(mmc + t)  # pin VC = MMC + t


def test_moved_state_clamps_to_the_limits_and_wraps_the_direction():
    sc, _ = _gearbox()
    f = sc.feature("cap-bore")
    old = FeatureState(8.0, 1.0, 0.0)
    assert whatif.moved_state(f, old, size=9.0) == FeatureState(8.015, 1.0, 0.0)  # upper limit
    assert whatif.moved_state(f, old, size=7.0) == FeatureState(8.0, 1.0, 0.0)  # lower limit
    assert whatif.moved_state(f, old, share=1.5, direction_deg=370.0) == FeatureState(8.0, 1.0, 10.0)
    assert whatif.moved_state(f, old, share=-0.2) == FeatureState(8.0, 0.0, 0.0)
    assert whatif.moved_state(f, old) == old


def test_settled_states_start_at_the_worst_case_and_keep_valid_states():
    sc, _ = _gearbox()
    states = whatif.settled_states(sc, {})
    # the worst case: MMC, all of the tolerance used; the pin in the mate tilts the other way
    assert states == {"cap-bore": FeatureState(8.000, 1.0, 0.0), "dowel": FeatureState(7.975, 1.0, 180.0)}
    kept = whatif.settled_states(sc, {"cap-bore": FeatureState(8.01, 0.5, 30.0), "dowel": FeatureState(9.0, 0.3, 60.0),
                                      "gone": FeatureState(1.0, 1.0, 0.0)})
    assert kept["cap-bore"] == FeatureState(8.01, 0.5, 30.0)  # within the limits: kept
    assert kept["dowel"] == FeatureState(7.975, 0.3, 60.0)  # outside: back to MMC, share and tilt kept
    assert set(kept) == {"cap-bore", "dowel"}


# ---------------------------------------------------------------- the fit and the banner at a state


def test_mate_verdict_at_the_worst_case_and_coaxial():
    sc, res = _gearbox()
    worst = whatif.settled_states(sc, {})
    v = whatif.mate_verdict_at(res, 0, worst)
    # worst case: hole VC - pin VC = (8.000 - 0.015) - (7.975 + 0.005) = 0.005 (ASME Y14.5 VCs, from memory)
    assert v.whatif_clearance == pytest.approx((8.000 - 0.015) - (7.975 + 0.005))
    assert v.assembles and v.headline.startswith("ASSEMBLES")
    # nothing tilted: the clearance is the size difference
    straight = {"cap-bore": FeatureState(8.010, 0.0, 0.0), "dowel": FeatureState(7.970, 0.0, 180.0)}
    assert whatif.mate_verdict_at(res, 0, straight).whatif_clearance == pytest.approx(8.010 - 7.970)


def test_banner_of_an_interfering_mate_is_red_and_says_by_how_much():
    sc = load(BRACKET)
    res = analyse_scene(sc)
    b = banner.banner(res, sc, whatif.settled_states(sc, {}), None, None, None, 0)
    # the scene file's numbers: hole VC 6.000 - 0.030, pin VC 5.990 + 0.010 (ASME Y14.5, from memory)
    overlap = (5.990 + 0.010) - (6.000 - 0.030)
    assert (b.state, b.role, b.mark) == ("interferes", "fail", True)
    # the tooltip tells the guaranteed clearance (the verdict) from the 3D picture's local gap
    assert "guaranteed clearance (through-view)" in b.tip and "local gap at this tilt direction" in b.tip
    assert f"INTERFERES by {MM.fmt(overlap)}" in b.head
    assert "Mate 1 (bracket-hole ← locating-pin)" in b.detail
    assert ROLE_LOOK[b.role][0] == ROLE_LOOK["fail"][0]


def test_banner_of_a_feature_in_no_mate_a_fastener_and_a_missing_inspection():
    sc = load(FLANGE)
    res = analyse_scene(sc)
    b = banner.banner(res, sc, {}, None, None, None, None)
    assert (b.state, b.role, b.mark) == ("none", "none", False) and b.head == "NO MATE: fit not evaluated"
    b = banner.banner(res, sc, {}, None, None, "flange-studs", None)
    # fixed fasteners: T = (H - F) / 2 (ASME Y14.5 fastener formula, from memory) = (6.6 - 6.0) / 2
    assert b.head == f"FASTENER flange-studs (fixed): position tolerance ⌀{MM.fmt((6.6 - 6.0) / 2)} mm"
    b = banner.banner(res, sc, {}, "stud-hole", None, None, None)
    assert b.head == "INSPECTION of stud-hole: no result yet" and b.tip is None  # the tooltip is left alone


# ---------------------------------------------------------------- readout tables


def test_focus_table_of_a_mate_holds_both_features_and_the_worst_case():
    sc, res = _gearbox()
    states = whatif.settled_states(sc, {})
    t = readouts.focus_table(res, sc, states, ["cap-bore", "dowel"], 0, None)
    heads = [ln.cells[0] for ln in t.lines if ln.look[0]]
    assert heads == ["hole cap-bore at the sizes set", "cap-bore: limits and worst-case boundaries",
                     "pin dowel at the sizes set", "dowel: limits and worst-case boundaries", "mate 1: worst case"]
    for fid in ("cap-bore", "dowel"):  # the what-if rows are the ones whatif_rows gives
        for r in whatif.whatif_rows(res, fid, states[fid]):
            assert t.values[(fid, r.quantity)] == r.value
    cells = {ln.cells[0]: ln.cells[1] for ln in t.lines}
    assert cells["worst-case clearance"] == MM.fmt((8.000 - 0.015) - (7.975 + 0.005), signed=True)
    assert cells["clearance from sizes alone"] == MM.fmt(8.000 - 7.975, signed=True)  # MMC - MMC
    assert cells["loosest fit from sizes"] == MM.fmt(8.015 - 7.965, signed=True)  # LMC - LMC
    assert all(len(ln.cells) == 3 for ln in t.lines)


def test_fastener_table_gives_the_tolerance_with_and_without_the_projected_zone():
    sc = load(FLANGE)
    res = analyse_scene(sc)
    t = readouts.focus_table(res, sc, {}, [], None, "flange-studs")
    v = t.values
    assert v[("flange-studs", "fastener F (at its largest size)")] == MM.fmt(6.0)  # the scene file
    assert v[("flange-studs", "projection P")] == MM.fmt(8.0)
    assert v[("flange-studs", "position tolerance")] == MM.fmt((6.6 - 6.0) / 2)  # (H - F) / 2
    unprojected = next(ln for ln in t.lines if ln.cells[0] == "without a projected zone")
    # without a projected zone: T = (H - F) / (2 + 2P/D), P = 8, D = 10 (ASME Y14.5 appendix, from memory)
    assert unprojected.cells[1] == MM.fmt((6.6 - 6.0) / (2 + 2 * 8.0 / 10.0))


def test_fixed_rows_are_asked_for_once_per_feature():
    sc, res = _gearbox()
    asked = []

    def fixed(r, fid, u, s):
        asked.append(fid)
        return readouts.fixed_rows(r, fid, u, s)

    readouts.focus_table(res, sc, whatif.settled_states(sc, {}), ["cap-bore", "dowel"], 0, None, fixed=fixed)
    assert asked == ["cap-bore", "dowel"]


@pytest.fixture(scope="module")
def cap_inspection():
    from geom.inspect import inspect_feature

    return inspect_feature(load(CAP), "cap-bore")


def test_inspection_rows_are_geoms_result(cap_inspection):
    from geom.conformance import verdict_word

    res = cap_inspection
    t = inspection_table(res)
    v = lambda q: t.values[("cap-bore", q)]  # noqa: E731
    assert v("part verdict") == res.verdict.word
    assert v("bonus basis") == "unrelated"
    assert v("bonus") == MM.fmt(res.unrelated_ame - 8.000)  # AME - MMC, the scene's lower limit (ASME Y14.5)
    assert v("tolerance allowed") == MM.fmt(0.015 + res.unrelated_ame - 8.000)  # t + bonus
    assert v("virtual condition (MMC)") == MM.fmt(8.000 - 0.015)  # MMC - t
    for c in (res.size_check, res.axis_check, res.surface_check):
        assert v(f"{c.name} verdict") == verdict_word(c)[0] and v(f"{c.name} outcome") == c.outcome_text
    # the governing reading first, the other one named and shown as not governing
    readings = axis_readings(res)
    assert readings[0] == (res.axis, True) and all(not g for _a, g in readings[1:])
    other = other_axis_basis(res)
    assert other is not None and other != res.axis.basis
    assert v(f"{other} (does not govern)") == MM.fmt(next(a for a, _g in readings[1:]).deviation)
    # the heading names the points file and its count: the CSV's data lines (independent count)
    n = len([ln for ln in CAP_CSV.read_text().splitlines()[1:] if ln.strip()])
    assert t.lines[0].cells[2].startswith(f"{n} points in ")
    # free text goes through the window's text filter
    marked = inspection_table(res, ui=lambda s: "<" + s + ">")
    assert marked.values.keys() == t.values.keys()
    assert marked.values[("cap-bore", "unrelated actual mating envelope")] == f"<⌀{MM.fmt(res.unrelated_ame)}>"
    assert any(ln.cells[2] == "<" + res.verdict.why + ">" for ln in marked.lines)


def test_inspection_source_text_and_banner(cap_inspection):
    res = cap_inspection
    n = len([ln for ln in CAP_CSV.read_text().splitlines()[1:] if ln.strip()])
    text = source_text(res, res.feature.measured, MM, lambda s: s.upper())
    assert text == f"{n} points in {len(res.sections)} sections from <b>CAP_BORE_INSPECTION.CSV</b>; U = 0.001 (k = 2)"
    assert source_text(None, None, MM, str) == "no measured data yet: load a CSV of points"
    b = banner.inspection_banner("cap-bore", res, MM)
    assert (b.state, b.role, b.head) == (res.verdict.role, res.verdict.role, res.verdict.headline)
    assert "U = 0.001 (k = 2)" in b.detail and b.tip == (res.axis_governs or "")
    odd = replace(res, verdict=replace(res.verdict, why="size < limit & more"))
    assert "size &lt; limit &amp; more" in banner.inspection_banner("cap-bore", odd, MM).detail  # rich text escaped


# ---------------------------------------------------------------- typed numbers and the feature form


@given(st.floats(allow_nan=False, allow_infinity=False))
def test_num_text_reads_back_as_the_same_number(x):
    # Python's repr of a float is the shortest text that reads back exactly (Python docs, floats)
    text = fields.num_text(x)
    assert fields.text_value(text) == x
    assert not text.endswith(".0")


def test_text_values_and_decimals():
    assert fields.text_value(" 8.0045 ") == 8.0045 and fields.text_value("8,5") == "8,5"  # refused later
    assert fields.optional_value("") is None and fields.optional_value("0") == 0.0
    assert fields.split_datums("A|B  C,") == ["A", "B", "C"]
    # the fewest decimals at which both inch limits print exactly as typed: 0.25015 needs five
    lo, hi = 0.25000, 0.25015
    k = next(k for k in range(10) if float(f"{lo:.{k}f}") == lo and float(f"{hi:.{k}f}") == hi)
    assert fields.length_decimals(Units.IN, lo, hi) == k == 5
    assert fields.length_decimals(MM, 8.000, 8.015) == 3  # mm: three decimals (DEVELOPERS.md conventions)


@pytest.mark.parametrize("path", ALL_SCENES, ids=[p.stem for p in ALL_SCENES])
def test_feature_form_round_trip_gives_the_same_scene(path):
    sc = load(path)
    for i, f in enumerate(sc.features):
        d = editing.scene_dict(sc)
        table = fields.feature_table(fields.feature_texts(f), fields.feature_choices(f), f.tolerance is not None)
        if "measured" in d["feature"][i]:
            table["measured"] = d["feature"][i]["measured"]
        d["feature"][i] = table
        assert editing.parse_dict(d, str(path)) == sc, f.id  # independent: the scene-file rules


@pytest.mark.parametrize("key,value,field", [
    ("limits", ["abc", 8.015], "limits[0]"),
    ("length", -1.0, "length"),
])
def test_a_rejected_value_names_its_field(key, value, field):
    sc, _ = _gearbox()
    keys = set(fields.FEATURE_TEXTS) | set(fields.TOLERANCE_TEXTS)
    d = editing.scene_dict(sc)
    d["feature"][0][key] = value
    with pytest.raises(SceneError) as e:  # the scene rules say where
        editing.parse_dict(d, str(GEARBOX))
    assert fields.feature_field(e.value.path, keys) == field
    d = editing.scene_dict(sc)
    d["feature"][0]["tolerance"]["datums"] = ["A", 1]
    with pytest.raises(SceneError) as e:
        editing.parse_dict(d, str(GEARBOX))
    assert fields.feature_field(e.value.path, keys) == "tolerance.datums"


# ---------------------------------------------------------------- the scene as the editor changes it


def test_contents_entries_and_focus():
    sc = load(CAP)
    entries = editing.contents_entries(sc)
    assert [e.text for e in entries] == [
        "mate 1: cap-bore ← dowel", "hole cap-bore – end cap locating bore (produced)",
        "pin dowel – housing dowel (pressed)", "inspection: cap-bore (points cap_bore_inspection.csv)"]
    assert [e.focus for e in entries] == [("mate", 0), ("feature", "cap-bore"), ("feature", "dowel"),
                                         ("inspection", "cap-bore")]
    assert all(focus.focus_valid(sc, e.focus) for e in entries)
    assert not focus.focus_valid(sc, ("mate", 1)) and not focus.focus_valid(sc, ("feature", "nope"))
    assert focus.default_focus(sc) == ("mate", 0)
    assert focus.focus_features(sc, ("mate", 0)) == ["cap-bore", "dowel"]
    assert focus.focus_mate(sc, ("feature", "dowel")) == 0 and focus.focus_mate(sc, ("inspection", "cap-bore")) is None
    assert focus.edited_feature(sc, ("mate", 0), None) == "cap-bore"  # a mate's hole
    flange = load(FLANGE)
    assert focus.edited_feature(flange, ("fastener", "flange-studs"), "pilot") == "pilot"  # kept
    assert focus.focus_features(flange, ("fastener", "flange-studs")) == []


def test_new_features_mates_and_removals_parse():
    sc, _ = _gearbox()
    fid, entry = editing.new_feature(sc, "pin")
    assert fid == "pin-1" and entry["limits"] == [7.965, 7.975]  # the first pin's limits
    d = editing.scene_dict(sc)
    d["feature"].append(entry)
    d["mate"] = [editing.new_mate(sc), {"hole": "cap-bore", "pin": "pin-1"}]  # the first hole and pin
    grown = editing.parse_dict(d, str(GEARBOX))
    assert [f.id for f in grown.features] == ["cap-bore", "dowel", "pin-1"]
    assert [(m.hole, m.pin) for m in grown.mates] == [("cap-bore", "dowel"), ("cap-bore", "pin-1")]
    mutate, text = editing.removal(grown, "feature", "cap-bore")
    d = editing.scene_dict(grown)
    mutate(d)
    shrunk = editing.parse_dict(d, str(GEARBOX))
    assert text == "remove cap-bore" and [f.id for f in shrunk.features] == ["dowel", "pin-1"]
    assert not shrunk.mates  # both mates had the bore
    assert editing.new_mate(shrunk) is None  # no hole left
    assert editing.removal(shrunk, "none", None) is None
    d = editing.scene_dict(sc)
    editing.rename_in_mates(d, "dowel", "pin-9")
    assert d["mate"] == [{"hole": "cap-bore", "pin": "pin-9"}]


# ---------------------------------------------------------------- points files


def test_points_paths_relative_outside_and_rebased(tmp_path):
    import shutil

    (tmp_path / "scans").mkdir()
    shutil.copy(CAP, tmp_path / "cap.toml")
    shutil.copy(CAP_CSV, tmp_path / "scans" / "bore.csv")
    scene_path = tmp_path / "cap.toml"
    assert points.points_entry(str(tmp_path / "scans" / "bore.csv"), str(scene_path)) == "scans/bore.csv"
    assert points.points_entry(str(tmp_path / "x.csv"), None) == str((tmp_path / "x.csv").resolve())
    d = editing.scene_dict(load(scene_path))
    d["feature"][0]["measured"]["points"] = "scans/bore.csv"
    sc = editing.parse_dict(d, str(scene_path))
    path, mtime = points.points_source(sc, "cap-bore")
    assert path == str((tmp_path / "scans" / "bore.csv").resolve())
    assert mtime == os.stat(path).st_mtime
    assert not points.points_outside(sc, "cap-bore")
    assert points.report_points(sc, set()) == ({"cap-bore": path}, [])
    # saved one folder down: the entry now climbs out to the same file, which lies outside the folder
    (tmp_path / "sub").mkdir()
    moved = points.rebase_points(sc, str(tmp_path / "sub" / "cap.toml"))
    assert moved.feature("cap-bore").measured.points == "../scans/bore.csv"
    moved = replace(moved, source=str((tmp_path / "sub" / "cap.toml").resolve()))
    assert points.points_source(moved, "cap-bore")[0] == path
    assert points.points_outside(moved, "cap-bore")
    got, refused = points.report_points(moved, set())
    assert got == {} and len(refused) == 1 and "outside the scene's folder" in refused[0]
    assert points.report_points(moved, {path}) == ({"cap-bore": path}, [])  # picked in the window: read
    assert path in points.outside_warning(moved, "cap-bore")
    assert points.points_source(moved, "dowel") == (None, None)


# ---------------------------------------------------------------- the report command


def test_report_command_and_its_messages(tmp_path):
    cmd = export.report_command("/usr/bin/python3", "/tmp/x/scene.toml", "/out/r", "top", "related",
                                {"cap-bore": 8.0045, "dowel": 0.1 + 0.2}, {"cap-bore": "/data/bore.csv"})
    assert cmd[:4] == ["/usr/bin/python3", "-m", "matezone.cli", "report"]
    assert cmd[4] == "/tmp/x/scene.toml"
    pairs = list(zip(cmd[5::2], cmd[6::2]))  # (option, value); --size and --points repeat
    assert ("--out", "/out/r") in pairs and ("--view", "top") in pairs and ("--bonus-basis", "related") in pairs
    sizes = [v for k, v in pairs if k == "--size"]
    # every digit of the what-if size reaches the command: 0.1 + 0.2 is not 0.3 in binary floating point
    assert [float(s.split("=", 1)[1]) for s in sizes] == [8.0045, 0.1 + 0.2]
    assert ("--points", "cap-bore=/data/bore.csv") in pairs
    assert export.failure_message("Traceback...\nmatezone: disk full\n", 2, False, "/out/r") == "disk full"
    assert export.failure_message("", -15, True, "/out/r") == export.not_written("/out/r")
    assert "'/out/r'" in export.not_written("/out/r")
    assert export.failure_message("matezone: cancelled, the previous report is unchanged", 130, True, "/o") == \
        "cancelled, the previous report is unchanged"  # the command's own words win
