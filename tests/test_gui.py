"""The desktop window (pytest-qt, run under ``xvfb-run -a``).

Check values are computed inside each test from geom (geom.boundaries.bonus /
tolerance_allowed / virtual_condition, geom.scenefile.parse) or read from the scene file,
so the window is held to the same numbers and messages as the command line.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

pytestmark = pytest.mark.gui

ROOT = Path(__file__).resolve().parent.parent
SCENES = sorted((ROOT / "scenes").glob("*.toml"))
GEARBOX = ROOT / "scenes" / "gearbox_endcap_dowel.toml"
MATEZONE = [sys.executable, "-m", "matezone.cli"]

if not os.environ.get("DISPLAY"):
    pytest.skip("GUI tests need an X display: run them under xvfb-run -a", allow_module_level=True)


# the window's settings go to a temporary file: tests/conftest.py (_gui_private_settings)


def _open(qtbot, path=GEARBOX):
    from geom.scenefile import load
    from viewer.app.main import make_window

    win = make_window(load(path), str(path))
    qtbot.addWidget(win)
    win.confirm = lambda: "discard"
    win.show()
    with qtbot.waitSignal(win.view3d.rendered, timeout=60_000):
        win.view3d.schedule()
    return win


def _close(win):
    win.confirm = lambda: "discard"
    win.close()


# ---------------------------------------------------------------- opening


@pytest.mark.parametrize("path", SCENES, ids=[p.stem for p in SCENES])
def test_every_demo_scene_opens_with_3d_actors_and_a_verdict(qtbot, path):
    from geom.analysis import analyse_scene
    from geom.scenefile import load

    win = _open(qtbot, path)
    res = analyse_scene(load(path))
    assert win.model.scene == res.scene
    assert sum(len(a) for a in win.view3d.actors.values()) > 0
    assert win.view3d.plotter.renderer.GetActors().GetNumberOfItems() > 0
    mi = win.model.focus_mate()
    if mi is None:
        assert win.verdict.state == "none"
    else:
        # at the opening state (worst case) the what-if fit is geom's worst-case verdict
        assert win.verdict.state == ("assembles" if res.mates[mi].assembles else "interferes")
        assert win.verdict.text().split()[1] == ("ASSEMBLES" if res.mates[mi].assembles else "INTERFERES")
    _close(win)


def test_interfering_scene_says_interferes_in_words_and_colour(qtbot):
    from geom.analysis import analyse_scene
    from geom.scenefile import load

    path = ROOT / "scenes" / "sensor_bracket_interference.toml"
    res = analyse_scene(load(path))
    win = _open(qtbot, path)
    m = res.mates[0]
    assert not m.assembles  # the scene file's own comment: interferes in the worst case
    amount = res.scene.units.fmt(-m.clearance_min)
    assert f"INTERFERES by {amount}" in win.verdict.text()
    from viewer import style

    assert style.INTERFERENCE.lower() in win.verdict.styleSheet().lower()
    _close(win)


# ---------------------------------------------------------------- what-if


def _table_value(win, fid: str, quantity: str) -> str:
    """The value the readout table SHOWS for ``quantity`` in the block of feature ``fid`` (read
    from the widget's items, not from the table's record of what it meant to show)."""
    t = win.readouts
    inside = False
    for r in range(t.rowCount()):
        head = t.item(r, 0).text()
        if head.endswith(" at the sizes set"):
            inside = head.split(" ")[1] == fid
        elif inside and head == quantity:
            return t.item(r, 1).text()
    raise KeyError((fid, quantity))


def test_size_control_readouts_equal_geom_at_that_size(qtbot):
    from geom.boundaries import FeatureState, bonus, effective_size, tolerance_allowed, virtual_condition

    win = _open(qtbot)
    m = win.model
    u = m.scene.units
    hole = m.scene.feature("cap-bore")
    controls = win.whatif.groups["cap-bore"]
    vc_before = win.readouts.value("cap-bore", "virtual condition (MMC) (constant)")
    bonus_seen = []
    assert win.readouts.value("cap-bore", "bonus at this size") == u.fmt(bonus(hole, hole.mmc))  # opens at MMC
    for size in (8.0045, 8.010, 8.015):  # the file's limits are 8.000 .. 8.015
        with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
            controls.size.spin.setValue(size)
        assert m.states["cap-bore"].size == pytest.approx(size)
        # independent computation with geom at the same size
        assert win.readouts.value("cap-bore", "bonus at this size") == u.fmt(bonus(hole, size))
        assert win.readouts.value("cap-bore", "tolerance allowed at this size") == u.fmt(tolerance_allowed(hole, size))
        st = FeatureState(size, 1.0, 0.0)
        assert win.readouts.value("cap-bore", "clear opening normal to A") == u.fmt(effective_size(hole, st))
        # the VC stays put while the bonus grows
        assert win.readouts.value("cap-bore", "virtual condition (MMC) (constant)") == u.fmt(virtual_condition(hole))
        assert win.readouts.value("cap-bore", "virtual condition (MMC) (constant)") == vc_before
        # and the widget shows those texts (a move only re-sets the texts that changed)
        assert _table_value(win, "cap-bore", "bonus at this size") == u.fmt(bonus(hole, size))
        assert _table_value(win, "cap-bore", "tolerance allowed at this size") == u.fmt(tolerance_allowed(hole, size))
        assert _table_value(win, "cap-bore", "virtual condition (MMC) (constant)") == vc_before
        bonus_seen.append(float(win.readouts.value("cap-bore", "bonus at this size")))
    assert bonus_seen == sorted(bonus_seen) and bonus_seen[0] > 0  # grows with departure from MMC

    # the slider maps MMC..LMC and moves the spin box with it
    with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
        controls.size.slider.setValue(controls.size.STEPS // 2)
    mid = hole.limits[0] + 0.5 * (hole.limits[1] - hole.limits[0])
    assert m.states["cap-bore"].size == pytest.approx(mid)
    assert controls.size.spin.value() == pytest.approx(mid, abs=10 ** -controls.size.spin.decimals())
    assert win.readouts.value("cap-bore", "bonus at this size") == u.fmt(bonus(hole, mid))
    _close(win)


def test_share_and_direction_controls_move_the_state_and_the_fit(qtbot):
    from geom.analysis import clearance_at

    win = _open(qtbot)
    m = win.model
    c = win.whatif.groups["cap-bore"]
    with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
        c.share.spin.setValue(40.0)
    with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
        c.direction.spin.setValue(135.0)
    st = m.states["cap-bore"]
    assert (st.share, st.direction_deg) == (pytest.approx(0.40), pytest.approx(135.0))
    hole, pin = m.scene.feature("cap-bore"), m.scene.feature("dowel")
    expect = clearance_at(hole, pin, st, m.states["dowel"])  # geom's what-if clearance
    assert m.scene.units.fmt(expect) in win.verdict.text()
    _close(win)


def _props(view) -> list:
    """Every actor / 2D prop in the 3D view's renderer (read from VTK)."""
    props = view.plotter.renderer.GetViewProps()
    return [props.GetItemAsObject(i) for i in range(props.GetNumberOfItems())]


def _label_texts(view) -> list[str]:
    """The strings of every 3D point label, read from the label actors' VTK pipelines."""
    out = []
    for a in view.actors.get("labels", []):
        data = a.GetMapper().GetInputAlgorithm().GetInputDataObject(0, 0)
        arr = data.GetPointData().GetAbstractArray("labels")
        out += [arr.GetValue(i) for i in range(arr.GetNumberOfValues())]
    return out


def test_slider_moves_keep_the_3d_actors_and_their_text_follows(qtbot):
    from geom.analysis import clearance_at
    from geom.boundaries import bonus

    win = _open(qtbot)
    v, m = win.view3d, win.model
    u = m.scene.units
    hole, pin = m.scene.feature("cap-bore"), m.scene.feature("dowel")
    c = win.whatif.groups["cap-bore"]
    v.layer_actions["readouts"].setChecked(True)  # the numbers on the picture, produced size among them
    qtbot.waitExposed(win)
    # the window's layout settles: the text overlays are made for the view's present size (a
    # resize re-makes them) and that frame is on screen
    qtbot.waitUntil(lambda: v._text_key is not None and v._text_key[0] == tuple(v.plotter.window_size)
                    and v._fresh is None, timeout=10_000)
    before = _props(v)
    assert v.actors["readouts"] and v.actors["labels"]
    kept = 0
    for step in (c.size.STEPS // 3, c.size.STEPS, c.size.STEPS // 2):
        renders, size_before = v.renders, tuple(v.plotter.window_size)
        with qtbot.waitSignal(v.rendered, timeout=30_000):
            c.size.slider.setValue(step)
        qtbot.waitUntil(lambda: v._fresh is None, timeout=10_000)
        # no actor added or removed: the count stays, so no leak over many moves
        assert len(_props(v)) == len(before)
        if tuple(v.plotter.window_size) == size_before:  # (a resize re-makes the text overlays)
            # the very same actors, and one frame: the widget's paint shows it without rendering again
            assert _props(v) == before
            assert v.renders - renders == 1
            kept += 1
        before = _props(v)
        size = m.states["cap-bore"].size
        # the produced-size readout in 3D shows the new size and geom's bonus at it (geom.boundaries)
        lines = "\n".join(a.GetInput() for a in v.actors["readouts"]).splitlines()
        produced = [ln for ln in lines if ln.strip().startswith(f"produced {u.fmt(size)}")]
        assert produced and f"bonus {u.fmt(bonus(hole, size))}" in produced[0]
    assert kept >= 2  # the window kept its size for most moves: the in-place path was checked
    # the tightest-spot label follows a share move: geom's what-if clearance (geom.analysis)
    with qtbot.waitSignal(v.rendered, timeout=30_000):
        c.share.spin.setValue(40.0)
    assert _props(v) == before
    gap = clearance_at(hole, pin, m.states["cap-bore"], m.states["dowel"])
    assert gap > 0  # at 40 % of the tolerance used the parts clear (the banner says so too)
    # the label reads the sampled surface; geom's exact what-if gap agrees within half a unit of
    # the usual display precision (Units.decimals) -- a label that did not follow would be off by more
    tight = [t.split(" (")[0] for t in _label_texts(v) if t.startswith("tightest ")]
    assert tight and all(t.endswith(f" {u.value}") for t in tight)  # one per tightest spot
    for t in tight:
        assert abs(float(t.split()[1]) - gap) <= 0.5 * 10 ** -u.decimals + 1e-9
    # a burst of moves before the event loop turns costs one rebuild and one frame
    renders, rebuilt = v.renders, []
    v.rendered.connect(lambda: rebuilt.append(1))
    for pct in (50.0, 60.0, 70.0):
        c.share.spin.setValue(pct)
    qtbot.waitUntil(lambda: bool(rebuilt) and v._fresh is None, timeout=30_000)
    qtbot.waitUntil(lambda: not v._pending and not v._timer.isActive(), timeout=10_000)  # nothing more queued
    assert len(rebuilt) == 1 and v.renders - renders == 1
    assert _props(v) == before
    # what the in-place update shows is what a full rebuild of the same state shows
    moved = np.asarray(v.image())
    v.set_layer("rc", True)
    v.set_layer("rc", False)  # every actor made anew from the same scene
    assert _props(v) != before
    again = np.asarray(v.image())
    assert np.array_equal(again, moved), f"{np.count_nonzero(np.any(again != moved, axis=-1))} pixels differ"
    _close(win)


# ---------------------------------------------------------------- bad input


def _expected_message(scene, path, mutate) -> str:
    from geom.scenefile import SceneError
    from viewer.app.model import parse_dict, scene_dict

    d = scene_dict(scene)
    mutate(d)
    with pytest.raises(SceneError) as e:
        parse_dict(d, path)
    return str(e.value)


@pytest.mark.parametrize("field,text,mutate", [
    ("tolerance.value", "-0.02", lambda d: d["feature"][0]["tolerance"].__setitem__("value", -0.02)),
    ("limits[0]", "abc", lambda d: d["feature"][0]["limits"].__setitem__(0, "abc")),
    ("limits[1]", "7.9", lambda d: d["feature"][0]["limits"].__setitem__(1, 7.9)),  # reversed
])
def test_invalid_value_marks_the_field_and_keeps_the_scene(qtbot, field, text, mutate):
    win = _open(qtbot)
    m = win.model
    m.set_focus("feature", "cap-bore")
    before = m.scene
    form = win.feature_form
    w = form.fields[field]
    w.setText(text)
    w.editingFinished.emit()
    expected = _expected_message(before, m.path, mutate)  # the CLI's rules, same text
    assert form.error_label.text() == expected
    assert win.messages.text().endswith(expected)
    assert "c62828" in w.styleSheet()  # red border
    assert m.scene == before and not m.dirty
    assert m.undo_stack.count() == 0
    _close(win)


def test_malformed_file_shows_the_cli_message(qtbot, tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(GEARBOX.read_text().replace("value = 0.015", 'value = "x"'))
    cli = subprocess.run(MATEZONE + ["analyze", str(bad)], capture_output=True, text=True, cwd=ROOT)
    assert cli.returncode == 2
    win = _open(qtbot)
    before = win.model.scene
    assert not win.open_path(str(bad))
    assert cli.stderr.strip() == "matezone: " + win.messages.text().removeprefix("Error: ")
    assert win.model.scene == before
    _close(win)


def test_exception_in_a_slot_is_shown_and_the_window_keeps_running(qtbot):
    from viewer.app.main import install_excepthook

    win = _open(qtbot)
    old = sys.excepthook
    try:
        install_excepthook(win)
        try:
            raise RuntimeError("probe failure")
        except RuntimeError:
            sys.excepthook(*sys.exc_info())
    finally:
        sys.excepthook = old
    assert "probe failure" in win.messages.text()
    assert win.isVisible()
    _close(win)


# ---------------------------------------------------------------- files and undo


def test_save_reopen_identical(qtbot, tmp_path):
    from geom.scenefile import dumps, load

    win = _open(qtbot)
    m = win.model
    m.set_focus("feature", "dowel")
    win.feature_form.fields["tolerance.value"].setText("0.004")
    win.feature_form.fields["tolerance.value"].editingFinished.emit()
    assert m.scene.feature("dowel").tolerance.value == 0.004 and m.dirty
    out = tmp_path / "saved.toml"
    assert win._save_to(str(out))
    assert not m.dirty
    assert not list(tmp_path.glob(".saved.toml.*"))  # atomic save leaves no temporary file
    again = load(out)
    assert again == m.scene
    assert out.read_text() == dumps(m.scene)
    win2 = _open(qtbot, out)
    assert win2.model.scene == m.scene
    assert os.path.abspath(out) in win2.recent_files()  # as named (a link would stay a link)
    _close(win2)
    _close(win)


def test_undo_redo_of_edits(qtbot):
    win = _open(qtbot)
    m = win.model
    original = m.scene
    m.set_focus("feature", "cap-bore")
    f = win.feature_form.fields["length"]
    f.setText("20")
    f.editingFinished.emit()
    assert m.scene.feature("cap-bore").length == 20.0
    win.feature_form.fields["id"].setText("bore")
    win.feature_form.fields["id"].editingFinished.emit()
    assert m.scene.mates[0].hole == "bore"  # the mate follows the rename
    win.act["undo"].trigger()
    assert m.scene.mates[0].hole == "cap-bore" and m.scene.feature("cap-bore").length == 20.0
    win.act["undo"].trigger()
    assert m.scene == original and not m.dirty
    assert win.feature_form.fields["length"].text() == "12"
    win.act["redo"].trigger()
    assert m.scene.feature("cap-bore").length == 20.0 and m.dirty
    _close(win)


def test_unsaved_changes_prompt(qtbot):
    win = _open(qtbot)
    m = win.model
    m.set_focus("feature", "cap-bore")
    win.feature_form.fields["length"].setText("13")
    win.feature_form.fields["length"].editingFinished.emit()
    asked = []
    win.confirm = lambda: asked.append(1) or "cancel"
    win.act["new"].trigger()
    assert asked and m.scene.feature("cap-bore").length == 13.0  # cancelled: nothing lost
    win.close()
    assert win.isVisible()  # cancelled close
    win.confirm = lambda: "discard"
    win.act["new"].trigger()
    assert m.path is None and not m.dirty and len(m.scene.features) == 2
    _close(win)


def test_export_report_runs_in_a_worker_and_writes_files(qtbot, tmp_path):
    win = _open(qtbot)
    out = tmp_path / "report"
    win.export_report(str(out))
    assert win._thread is not None and win._thread.isRunning() or win.last_export
    qtbot.waitUntil(lambda: win._thread is None, timeout=180_000)
    assert win.last_export == str(out), win.messages.text()
    assert any(out.rglob("*.pdf")) and any(out.rglob("*.png"))
    _close(win)


def _colours(img) -> np.ndarray:
    """The picture's pixels as one 24-bit colour number each."""
    img = img.convertToFormat(img.Format_RGB888)
    w, h = img.width(), img.height()
    ptr = img.constBits()
    ptr.setsize(img.byteCount())
    arr = np.frombuffer(ptr, np.uint8).reshape(h, img.bytesPerLine())[:, : w * 3].reshape(h, w, 3)
    return (arr[..., 0].astype(np.int64) << 16) | (arr[..., 1].astype(np.int64) << 8) | arr[..., 2]


def test_export_image_is_not_blank(qtbot, tmp_path):
    """The export holds the scene: compared with a blank render of the same view (every layer
    off: the background alone), it has many more colours and many pixels differ."""
    from PyQt5.QtGui import QImage

    win = _open(qtbot)
    p = tmp_path / "view.png"
    assert win.export_image(str(p)) == str(p)
    shot = _colours(QImage(str(p)))
    for a in win.view3d.layer_actions.values():  # the blank reference: same widget, nothing drawn
        a.setChecked(False)
    blank_p = tmp_path / "blank.png"
    assert win.export_image(str(blank_p)) == str(blank_p)
    blank = _colours(QImage(str(blank_p)))
    assert blank.shape == shot.shape
    assert len(np.unique(blank)) <= 2  # independent: a blank render is the background colour alone
    # shaded surfaces give hundreds of colours; a handful would be flat fills or text only
    assert len(np.unique(shot)) >= 100
    # the drawing covers a real part of the view, not a few stray pixels (at least 5 %)
    assert np.mean(shot != blank) > 0.05
    _close(win)


# ---------------------------------------------------------------- inspection (measured points)

CAP = ROOT / "scenes" / "cap_bore_inspection.toml"
CAP_CSV = ROOT / "scenes" / "cap_bore_inspection.csv"


def _wait_inspection(qtbot, win, trigger):
    with qtbot.waitSignal(win.model.inspectionFinished, timeout=120_000) as blocker:
        trigger()
    return blocker.args[0]


def _scene_without_points(tmp_path):
    """The cap-bore scene with its [feature.measured] table dropped, saved under tmp_path."""
    from geom.scenefile import load, save

    sc = load(CAP)
    f = sc.feature("cap-bore").with_(measured=None)
    from dataclasses import replace

    sc = replace(sc, features=tuple(f if g.id == "cap-bore" else g for g in sc.features))
    out = tmp_path / "cap.toml"
    save(sc, out)
    return out


def _banner_colour(win) -> str:
    """The text / border colour of the banner's style sheet."""
    import re

    m = re.search(r"border: 2px solid (#[0-9A-Fa-f]{6})", win.verdict.styleSheet())
    assert m, win.verdict.styleSheet()
    return m.group(1).lower()


def test_load_points_readouts_equal_geom_inspect(qtbot, tmp_path):
    from geom.analysis import term
    from geom.conformance import verdict_word
    from geom.inspect import inspect_feature
    from geom.scenefile import load
    from viewer import style

    path = _scene_without_points(tmp_path)
    win = _open(qtbot, path)
    m = win.model
    m.set_focus("feature", "cap-bore")
    assert win.act["load_points"].isEnabled()
    # through the action, as File > Load measured points… does after the file dialog
    assert _wait_inspection(qtbot, win, lambda: win.load_points_dialog(path=str(CAP_CSV))) is True
    qtbot.waitUntil(lambda: win.view3d.current is not None and win.view3d.current.kind == "inspection",
                    timeout=60_000)
    assert m.focus == ("inspection", "cap-bore")
    assert m.dirty and m.undo_stack.count() == 1  # the points path is an undoable edit
    # the CSV is not in the scene's folder: read because it was picked here, and the window says
    # that a scene file may not name it (geom.inspect reads no file outside the scene's folder)
    assert "outside the scene's folder" in win.messages.text()
    u, st = m.scene.units, m.scene.standard
    B = term("bonus", st)[0]
    # independent: geom.inspect computed in the test, same scene, same points file
    ref = inspect_feature(load(path), "cap-bore", points=str(CAP_CSV))
    v = lambda q: win.readouts.value("cap-bore", q)
    assert v("unrelated actual mating envelope").endswith(u.fmt(ref.unrelated_ame))
    assert v("related actual mating envelope").endswith(u.fmt(ref.related_ame))
    assert v(f"{B} basis") == "unrelated" == ref.bonus_basis
    assert v(B) == u.fmt(ref.bonus)
    assert v("tolerance allowed") == u.fmt(ref.tolerance_allowed)
    assert v("axis reading") == u.fmt(ref.axis.deviation)
    assert v("virtual condition (MMC)") == u.fmt(ref.virtual_condition)
    assert v("LS size").endswith(u.fmt(ref.least_squares.size))
    assert v("LS tolerance allowed") == u.fmt(ref.least_squares.tolerance_allowed)
    # every reading: geom's one word (verdict_word) and its ISO 14253-1 outcome phrase
    for c in (ref.size_check, ref.axis_check, ref.surface_check):
        assert v(f"{c.name} verdict") == verdict_word(c)[0]
        assert v(f"{c.name} outcome") == c.outcome_text
    # both axis readings are shown, the governing one named; the other one judged and labelled
    # (ASME Y14.5: orientation of a feature of size applies to its feature axis, the axis of the
    # unrelated actual mating envelope; from memory)
    assert ref.axis.basis == "feature axis" and ref.median_axis is not None
    assert v("feature axis (governing axis reading)") == u.fmt(ref.feature_axis.deviation)
    assert v("median line (does not govern)") == u.fmt(ref.median_axis.deviation)
    other = ref.other_axis_check
    assert other is not None
    assert v("median line reading (does not govern)") == verdict_word(other)[0]
    # the least-squares reading is not a verdict: no verdict word beside it
    ls_row = v("LS axis against tolerance allowed")
    assert ls_row.endswith("(not a verdict)")
    assert not any(w in ls_row for w in ("CONFORM", "FAIL", "NOT PROVEN"))
    # the banner: geom's one part verdict, word for word, in its role's colour (the PDF's)
    assert win.verdict.text().endswith(ref.verdict.headline)
    assert _banner_colour(win) == style.ROLE_COLOUR[ref.verdict.role].lower()
    assert v("part verdict") == ref.verdict.word
    assert ui_in(win.verdict.detail.text(), ref.verdict.why)
    for n in ref.verdict.notes:
        assert ui_in(win.verdict.detail.text(), n)
    for i, e in enumerate(ref.explanation):
        assert v(f"explanation {i + 1}") == e
    # the 3D view shows geom's verdict lines for this result
    shown = win.view3d.current
    assert shown.verdicts and shown.feature_ids == ("cap-bore",)

    # the bonus basis switch: related envelope, recomputed by geom in the worker
    rel = inspect_feature(load(path), "cap-bore", points=str(CAP_CSV), bonus_basis="related")  # independent
    ok = _wait_inspection(qtbot, win, lambda: win.whatif.inspection.basis_buttons["related"].setChecked(True))
    assert ok, win.messages.text()
    assert v(f"{B} basis") == "related"
    assert v(B) == u.fmt(rel.bonus)
    assert v("tolerance allowed") == u.fmt(rel.tolerance_allowed)
    assert v("axis outcome") == rel.axis_check.outcome_text
    assert win.verdict.text().endswith(rel.verdict.headline)
    _close(win)


def ui_in(html: str, text: str) -> bool:
    """``text`` appears in the label's rich text (escaped as the label escapes it)."""
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;") in html


INSPECTION_SCENES = [p for p in SCENES if "[feature.measured]" in p.read_text()]


@pytest.mark.parametrize("path", INSPECTION_SCENES, ids=[p.stem for p in INSPECTION_SCENES])
def test_demo_inspection_banner_is_geoms_verdict_in_the_ok_colour(qtbot, path):
    from geom.conformance import Outcome
    from geom.inspect import inspect_feature
    from geom.scenefile import load
    from viewer import style
    from viewer.app.panels import ROLE_LOOK

    sc = load(path)
    for f in [f for f in sc.features if f.measured is not None]:
        ref = inspect_feature(sc, f.id)  # independent: geom in the test
        # every demo inspection conforms: the scene files say so (cap_bore_inspection.toml: under
        # ASME Y14.5 perpendicularity of a feature of size applies to its feature axis, from
        # memory, and the feature axis reading 0.015 <= the tolerance allowed 0.018 = 0.015 + the
        # bonus 8.003 - 8.000)
        assert ref.verdict.outcome is Outcome.CONFORMS and ref.verdict.role == "ok"
        if f.id == "cap-bore":
            assert ref.axis.basis == "feature axis"
            assert ref.axis.deviation <= ref.tolerance_allowed
            assert ref.tolerance_allowed == pytest.approx(0.015 + (ref.unrelated_ame - 8.000))  # t + bonus
        win = _open(qtbot, path)
        assert _wait_inspection(qtbot, win, lambda: win.model.set_focus("inspection", f.id)) is True
        text = win.verdict.text()
        assert ref.verdict.headline in text
        assert text == f"{ROLE_LOOK['ok'][2]} {ref.verdict.headline}"  # a mark, then the headline
        # the PDF colours its headline with viewer.style.ROLE_COLOUR[role]: the banner uses the same
        assert _banner_colour(win) == style.ROLE_COLOUR["ok"].lower() == style.OK.lower()
        assert win.verdict.state == "ok"
        _close(win)


def test_inspection_failing_by_the_surface_reading_stays_red(qtbot, tmp_path):
    import shutil
    from dataclasses import replace

    from geom.inspect import inspect_feature
    from geom.scenefile import load, save
    from viewer import style

    # the demo bore with a tighter tolerance (0.008): VC 7.992 at MMC 8.000 (ASME Y14.5: VC = MMC - t)
    sc = load(CAP)
    f = sc.feature("cap-bore")
    f = f.with_(tolerance=replace(f.tolerance, value=0.008))
    sc = replace(sc, features=tuple(f if g.id == "cap-bore" else g for g in sc.features))
    path = tmp_path / "tight.toml"
    save(sc, path)
    shutil.copy(CAP_CSV, tmp_path / CAP_CSV.name)
    ref = inspect_feature(load(path), "cap-bore", points=str(CAP_CSV))  # independent: geom in the test
    # the related envelope is smaller than the VC 7.992 (the demo's related envelope is under 7.992)
    assert ref.related_ame < 8.000 - 0.008
    assert ref.surface_conforms is False and ref.verdict.role == "fail"
    win = _open(qtbot, path)
    assert _wait_inspection(qtbot, win, lambda: win.model.set_focus("inspection", "cap-bore")) is True
    assert win.verdict.state == "fail"
    assert win.verdict.text() == "✖ " + ref.verdict.headline
    assert "DOES NOT CONFORM" in win.verdict.text()
    assert _banner_colour(win) == style.ROLE_COLOUR["fail"].lower()
    assert style.ROLE_COLOUR["ok"].lower() not in win.verdict.styleSheet().lower()
    _close(win)


def test_window_text_names_standards_without_clause_numbers(qtbot):
    """No clause numbers quoted from memory in the window: no section sign, no "from memory"."""
    from PyQt5.QtWidgets import QLabel

    win = _open(qtbot, CAP)
    assert _wait_inspection(qtbot, win, lambda: win.model.set_focus("inspection", "cap-bore")) is True
    texts = [w.text() for w in win.findChildren(QLabel)] + [w.toolTip() for w in win.findChildren(QLabel)]
    t = win.readouts
    texts += [t.item(r, c).text() for r in range(t.rowCount()) for c in range(t.columnCount())]
    for focus in (("mate", 0), ("feature", "cap-bore")):
        win.model.set_focus(*focus)
        texts += [w.text() for w in win.findChildren(QLabel)]
        texts += [t.item(r, c).text() for r in range(t.rowCount()) for c in range(t.columnCount())]
    joined = "\n".join(texts)
    assert "§" not in joined and "from memory" not in joined.lower()
    _close(win)


# ---------------------------------------------------------------- scenes of other shapes


FASTENERS_ONLY = """
title = "Cover screws only"
units = "mm"
standard = "asme"
[[fastener]]
id = "cover-screws"
kind = "floating"
fastener = 6.0
hole = 6.6
"""


def test_fastener_only_scene_opens_and_shows_the_fastener(qtbot, tmp_path):
    from geom.scenefile import load

    path = tmp_path / "screws.toml"
    path.write_text(FASTENERS_ONLY)
    sc = load(path)
    assert not sc.features and len(sc.fasteners) == 1
    win = _open(qtbot, path)
    m = win.model
    assert m.focus == ("fastener", "cover-screws")
    items = [win.contents.list.item(i).text() for i in range(win.contents.list.count())]
    assert items == ["fastener cover-screws (floating)"]
    # floating fasteners: T = H - F (ASME Y14.5 fastener formula, from memory) = 6.6 - 6.0
    assert win.readouts.value("cover-screws", "position tolerance") == f"{6.6 - 6.0:.3f}"
    assert "FASTENER cover-screws" in win.verdict.text()
    # the what-if has nothing to move, and says so
    assert win.whatif.groups == {} and not win.whatif.reset.isEnabled()
    assert "no what-if" in win.whatif.hint.text()
    assert not win.feature_form.isEnabled()
    # the 2D view shows the fastener's section; the other tabs are for holes and pins
    assert win.views2d.tabText(0) == "Fastener section"
    assert not win.views2d.isTabEnabled(1) and not win.views2d.isTabEnabled(2)
    assert "Error" not in win.messages.text()
    # a hole added to it: the window goes on working
    win.contents._add("hole")
    assert [f.id for f in m.scene.features] == ["hole-1"] and m.focus == ("feature", "hole-1")
    with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
        win.view3d.schedule()
    assert win.whatif.groups and win.feature_form.isEnabled()
    _close(win)


def test_scene_the_loader_refuses_shows_its_message_inline(qtbot, tmp_path):
    from geom.scenefile import SceneError, load

    bad = tmp_path / "pos_a.toml"
    # position to datum A alone: a plane orients but does not locate (ASME Y14.5 / ISO 5459 datum
    # reference frames, common practice), so the loader refuses it
    bad.write_text(GEARBOX.read_text().replace('characteristic = "perpendicularity"', 'characteristic = "position"', 1))
    with pytest.raises(SceneError) as e:  # independent: the loader itself
        load(bad)
    win = _open(qtbot)
    before = win.model.scene
    assert not win.open_path(str(bad))
    assert win.messages.isVisible() and win.messages.text() == "Error: " + str(e.value)
    assert "datum A alone" in win.messages.text()
    assert win.model.scene == before
    _close(win)


INCH_SCENE = """
title = "Fine inch fit"
units = "in"
standard = "{standard}"
[[feature]]
id = "bore"
kind = "hole"
limits = [0.25000, 0.25015]
length = 0.5
[feature.tolerance]
characteristic = "perpendicularity"
value = 0.0002
material = "MMC"
datums = ["A"]
[[feature]]
id = "pin"
kind = "pin"
limits = [0.24960, 0.24975]
length = 0.5
[[mate]]
hole = "bore"
pin = "pin"
"""


def test_inch_limits_apart_by_000015_show_distinct_limits(qtbot, tmp_path):
    path = tmp_path / "fine.toml"
    path.write_text(INCH_SCENE.format(standard="asme"))
    win = _open(qtbot, path)
    m = win.model
    m.set_focus("feature", "bore")
    g = win.whatif.groups["bore"]
    spin = g.size.spin
    # the limits as typed, written with the five decimals that tell them apart (independent formatting)
    lo, hi = f"{0.25000:.5f}", f"{0.25015:.5f}"
    assert lo != hi
    assert spin.textFromValue(0.25000) == lo and spin.textFromValue(0.25015) == hi
    from PyQt5.QtWidgets import QLabel

    labels = [w.text() for w in g.size.findChildren(QLabel)]
    assert f"MMC {lo}" in labels and f"LMC {hi}" in labels
    # the slider's far end reaches LMC and the spin box shows it
    with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
        g.size.slider.setValue(g.size.STEPS)
    assert m.states["bore"].size == pytest.approx(0.25015)
    assert spin.text().startswith(hi)
    assert win.readouts.value("bore", "produced size") == hi
    row = [win.readouts.item(r, 2).text() for r in range(win.readouts.rowCount())
           if win.readouts.item(r, 0).text() == "produced size"][0]
    assert f"MMC {lo}" in row and f"LMC {hi}" in row
    _close(win)


def test_iso_scene_says_iso_terms_in_the_what_if(qtbot, tmp_path):
    from geom.analysis import tolerance_allowed_derived
    from geom.boundaries import bonus

    path = tmp_path / "fine_iso.toml"
    path.write_text(INCH_SCENE.format(standard="iso"))
    win = _open(qtbot, path)
    m = win.model
    m.set_focus("feature", "bore")
    f = m.scene.feature("bore")
    b = bonus(f, f.mmc)
    # ISO 2692 words: "increase" for the bonus, MMS / LMS for the sizes (from memory)
    assert win.readouts.value("bore", "increase at this size") == m.scene.units.fmt(b)
    fml = [win.readouts.item(r, 2).text() for r in range(win.readouts.rowCount())
           if win.readouts.item(r, 0).text() == "tolerance allowed at this size"][0]
    assert fml == tolerance_allowed_derived(f, b).formula(m.scene.units, m.scene.standard)
    assert "t + increase" in fml and "bonus" not in fml
    assert "MMS" in win.whatif.hint.text() and "increase" in win.whatif.hint.text()
    assert "bonus" not in win.whatif.hint.text()
    _close(win)


def test_malformed_points_file_shows_the_cli_message_and_keeps_the_view(qtbot, tmp_path):
    bad = tmp_path / "bad.csv"
    lines = CAP_CSV.read_text().splitlines()
    lines[6] = lines[6].split(",")[0] + ",n/a," + ",".join(lines[6].split(",")[2:])  # line 7: y is not a number
    bad.write_text("\n".join(lines) + "\n")
    # independent: what `matezone inspect` prints for the same file (the installed command: under
    # `python -m matezone.cli` the CLI's UserError class is a second copy and escapes as a traceback)
    exe = Path(sys.executable).with_name("matezone")
    cli = subprocess.run(([str(exe)] if exe.exists() else MATEZONE) + ["inspect", str(CAP), "--feature", "cap-bore", "--points", str(bad)],
                         capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert cli.returncode == 2 and cli.stderr.startswith("matezone: ")
    win = _open(qtbot, CAP)
    m = win.model
    assert _wait_inspection(qtbot, win, lambda: m.set_focus("inspection", "cap-bore")) is True
    qtbot.waitUntil(lambda: win.view3d.current is not None and win.view3d.current.kind == "inspection",
                    timeout=60_000)
    before_scene, before_view, before_insp = m.scene, win.view3d.current, m.inspection
    before_rows = dict(win.readouts.values)
    assert _wait_inspection(qtbot, win, lambda: win.load_points_dialog(path=str(bad))) is False
    assert cli.stderr.strip() == "matezone: " + win.messages.text().removeprefix("Error: ")
    assert "line 7" in win.messages.text()
    # nothing queued any more: no inspection under way, no 3D rebuild waiting
    qtbot.waitUntil(lambda: not m.inspecting and not win.view3d._pending, timeout=10_000)
    # nothing changed: scene, history, result, 3D scene and readouts are the last valid ones
    assert m.scene == before_scene and not m.dirty and m.undo_stack.count() == 0
    assert m.inspection is before_insp and win.view3d.current is before_view
    assert win.readouts.values == before_rows
    _close(win)


def test_points_path_is_saved_relative_and_reopens(qtbot, tmp_path):
    import shutil

    from geom.scenefile import load

    path = _scene_without_points(tmp_path)
    (tmp_path / "scans").mkdir()
    csv = tmp_path / "scans" / "bore.csv"
    shutil.copy(CAP_CSV, csv)
    win = _open(qtbot, path)
    m = win.model
    m.set_focus("feature", "cap-bore")
    assert _wait_inspection(qtbot, win, lambda: win.load_points_dialog(path=str(csv))) is True
    assert m.scene.feature("cap-bore").measured.points == "scans/bore.csv"  # relative to the scene file
    assert win._save_to(str(path)) and not m.dirty
    assert 'points = "scans/bore.csv"' in path.read_text()
    again = load(path)  # independent: the scene-file reader
    assert again.feature("cap-bore").measured.points == "scans/bore.csv"
    win2 = _open(qtbot, path)  # reopened from the scene file alone
    assert _wait_inspection(qtbot, win2, lambda: win2.model.set_focus("inspection", "cap-bore")) is True
    assert Path(win2.model.inspection.source_file).resolve() == csv.resolve()
    _close(win2)
    # saved in a folder beside it: the entry is rewritten so that it still names the same file,
    # and the window says that a scene file may not name points outside its folder
    (tmp_path / "other").mkdir()
    moved = tmp_path / "other" / "cap.toml"
    assert win._save_to(str(moved))
    assert "outside the scene's folder" in win.messages.text()
    entry = load(moved).feature("cap-bore").measured.points
    assert (moved.parent / entry).resolve() == csv.resolve()
    # from the scene file alone geom refuses it (independent: geom.inspect in the test), and a
    # fresh window shows that message inline
    from geom.inspect import InspectError, inspect_feature

    with pytest.raises(InspectError) as e:
        inspect_feature(load(moved), "cap-bore")
    win3 = _open(qtbot, moved)
    assert _wait_inspection(qtbot, win3, lambda: win3.model.set_focus("inspection", "cap-bore")) is False
    assert win3.messages.text() == "Error: " + str(e.value)
    _close(win3)
    # undo removes the recorded path again
    win.act["undo"].trigger()
    assert m.scene.feature("cap-bore").measured is None
    _close(win)


def test_characteristic_symbols_are_drawn_or_written_as_words(qtbot):
    from PyQt5.QtGui import QFontMetrics
    from PyQt5.QtWidgets import QApplication

    from viewer.app import glyphs

    win = _open(qtbot)
    found = glyphs._state["found"]
    font = QApplication.instance().font()
    for ch, fam in found.items():
        if fam is None:  # no installed family draws it: the window writes the word
            assert glyphs.ui_text(f"{ch} 0.1") == f"{glyphs.WORDS[ch]} 0.1"
        else:  # independent: Qt's own metrics say the chosen family has the glyph
            from PyQt5.QtGui import QFont

            assert QFontMetrics(QFont(fam)).inFontUcs4(ord(ch))
            assert fam in font.families()
    win.model.set_focus("feature", "cap-bore")
    heading = win.feature_form.heading.text()
    assert all(ch not in heading for ch in glyphs.missing())
    _close(win)


def test_size_spin_shows_display_decimals_and_keeps_finer_values(qtbot):
    win = _open(qtbot)
    m = win.model
    u = m.scene.units
    spin = win.whatif.groups["cap-bore"].size.spin
    assert spin.textFromValue(8.0) == u.fmt(8.0)  # Units.fmt: mm to 3 decimals (geom.model)
    spin.lineEdit().setText("8.0045")
    spin.interpretText()
    assert m.states["cap-bore"].size == pytest.approx(8.0045, abs=1e-9)  # the typed value, not 8.005 or 8.004
    _close(win)


# ---------------------------------------------------------------- the command


def _variance(img) -> float:
    img = img.convertToFormat(img.Format_RGB888)
    w, h = img.width(), img.height()
    ptr = img.constBits()
    ptr.setsize(img.byteCount())
    arr = np.frombuffer(ptr, np.uint8).reshape(h, img.bytesPerLine())[:, : w * 3]
    return float(arr.astype(float).var())


def test_screenshot_writes_a_non_blank_window_picture(tmp_path):
    from PyQt5.QtGui import QImage

    png = tmp_path / "shot.png"
    r = subprocess.run(MATEZONE + ["view", str(GEARBOX), "--screenshot", str(png)], capture_output=True,
                       text=True, cwd=ROOT, timeout=180)
    assert r.returncode == 0, r.stderr
    img = QImage(str(png))
    assert img.width() > 800 and img.height() > 500
    assert _variance(img) > 100.0  # a blank picture has none
    # the 3D region is rendered, not blank: it holds several distinct colours
    img = img.convertToFormat(img.Format_RGB32)
    colours = {img.pixel(x, y) for x in range(img.width() // 3, 2 * img.width() // 3, 7)
               for y in range(img.height() // 5, img.height() // 2, 7)}
    assert len(colours) > 20


def test_no_display_exits_2_with_a_pointer_to_report():
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    r = subprocess.run(MATEZONE + ["view", str(GEARBOX)], capture_output=True, text=True, cwd=ROOT,
                       env=env, timeout=60)
    assert r.returncode == 2
    assert "matezone report" in r.stderr and "display" in r.stderr
    assert "Traceback" not in r.stderr and "qt.qpa" not in r.stderr
    r = subprocess.run(MATEZONE, capture_output=True, text=True, cwd=ROOT, env=env, timeout=60)
    assert r.returncode == 2 and "matezone report" in r.stderr


def test_unreachable_display_exits_2():
    env = dict(os.environ, DISPLAY=":9876")
    env.pop("WAYLAND_DISPLAY", None)
    r = subprocess.run(MATEZONE + ["view", str(GEARBOX)], capture_output=True, text=True, cwd=ROOT,
                       env=env, timeout=60)
    assert r.returncode == 2
    assert ":9876" in r.stderr and "matezone report" in r.stderr and "Traceback" not in r.stderr
