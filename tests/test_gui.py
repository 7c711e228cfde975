"""The desktop window (pytest-qt, run under ``xvfb-run -a``): opening the demo scenes, the
what-if controls and what follows them (readouts, verdict, 3D actors updated in place), bad
input, files and undo, exports, the ``matezone view`` command. Measured parts and scenes of other
shapes: tests/test_gui_scenes.py; no lost work, hostile files: tests/test_gui_files.py.

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
    if win.model.focus[0] == "pattern":  # a scene of patterns opens on its first: a top view, no 3D yet
        pr = next(p for p in res.frames.patterns if p.pattern.id == win.model.focus[1])
        assert win.views2d.tabText(0) == "Pattern (top view)"
        want = "none" if pr.right is None else ("ok" if pr.right.conforms else "fail")
        assert win.verdict.state == want
        _close(win)
        return
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
    assert vc_before == u.fmt(8.000 - 0.015)  # hole VC = MMC - t, the file's 8.000 and 0.015 (ASME Y14.5, from memory)
    bonus_seen = []
    assert win.readouts.value("cap-bore", "bonus at this size") == u.fmt(bonus(hole, hole.mmc))  # opens at MMC
    for size in (8.0045, 8.010, 8.015):  # the file's limits are 8.000 .. 8.015
        with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
            controls.size.spin.setValue(size)
        assert m.states["cap-bore"].size == pytest.approx(size)
        # independent computation with geom at the same size; the bonus is the departure from
        # MMC 8.000 (ASME Y14.5, from memory)
        assert win.readouts.value("cap-bore", "bonus at this size") == u.fmt(bonus(hole, size)) == u.fmt(size - 8.000)
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
    """The strings of every 3D label, read from the callouts' VTK text actors (as given, before
    any wrapping to the window)."""
    from viewer.scene3d.overlays import source_text

    return [source_text(a) for a in view.actors.get("labels", []) if hasattr(a, "GetInput")]


def _settled(v) -> bool:
    """Nothing more is coming in the 3D view: no rebuild queued, the text overlays made for the
    view's present size, and the last frame on screen (its paint seen)."""
    return (not v._pending and not v._timer.isActive() and v._text_key is not None
            and v._text_key[0] == tuple(v.plotter.window_size) and v._fresh is None)


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
    qtbot.waitUntil(lambda: _settled(v), timeout=10_000)  # the window's layout has settled
    # the 3D widget is held at its size: a label beside it that re-wraps after a move (the banner,
    # the legend) would otherwise resize it at a moment of the layout's choosing, and a resize
    # re-makes the text overlays (checked on purpose at the end)
    view = v.plotter.interactor
    view.setFixedSize(view.size())
    qtbot.waitUntil(lambda: _settled(v), timeout=10_000)
    before = _props(v)
    assert v.actors["readouts"] and v.actors["labels"]
    for step in (c.size.STEPS // 3, c.size.STEPS, c.size.STEPS // 2):
        renders = v.renders
        with qtbot.waitSignal(v.rendered, timeout=30_000):
            c.size.slider.setValue(step)
        qtbot.waitUntil(lambda: _settled(v), timeout=10_000)
        # the very same actors (none added or removed: no leak over many moves), and one frame:
        # the widget's paint shows it without rendering again
        assert _props(v) == before
        assert v.renders - renders == 1
        size = m.states["cap-bore"].size
        # the produced-size readout in 3D shows the new size and geom's bonus at it (geom.boundaries)
        lines = "\n".join(a.GetInput() for a in v.actors["readouts"]).splitlines()
        produced = [ln for ln in lines if ln.strip().startswith(f"produced {u.fmt(size)}")]
        assert produced and f"bonus {u.fmt(bonus(hole, size))}" in produced[0]
    # the tightest-spot label follows a share move: geom's what-if clearance (geom.analysis)
    with qtbot.waitSignal(v.rendered, timeout=30_000):
        c.share.spin.setValue(40.0)
    qtbot.waitUntil(lambda: _settled(v), timeout=10_000)
    assert _props(v) == before
    gap = clearance_at(hole, pin, m.states["cap-bore"], m.states["dowel"])
    assert gap > 0  # at 40 % of the tolerance used the parts clear (the banner says so too)
    # the label reads the sampled surface; geom's exact what-if gap agrees within half a unit of
    # the usual display precision (Units.decimals) -- a label that did not follow would be off by more
    from viewer.scene3d.clearance import LOCAL_GAP

    tight = [t.split(" (")[0][len(LOCAL_GAP):] for t in _label_texts(v) if t.startswith(LOCAL_GAP + "\n")]
    assert len(tight) == 1 and tight[0].endswith(f" {u.value}")  # one label at the tightest spot
    assert abs(float(tight[0].split()[0]) - gap) <= 0.5 * 10 ** -u.decimals + 1e-9
    # a burst of moves before the event loop turns costs one rebuild and one frame
    renders, rebuilt = v.renders, []
    v.rendered.connect(lambda: rebuilt.append(1))
    for pct in (50.0, 60.0, 70.0):
        c.share.spin.setValue(pct)
    qtbot.waitUntil(lambda: bool(rebuilt) and _settled(v), timeout=30_000)
    assert len(rebuilt) == 1 and v.renders - renders == 1
    assert _props(v) == before
    # what the in-place update shows is what a full rebuild of the same state shows
    moved = np.asarray(v.image())
    v.set_layer("rc", True)
    v.set_layer("rc", False)  # every actor made anew from the same scene
    assert _props(v) != before
    again = np.asarray(v.image())
    assert np.array_equal(again, moved), f"{np.count_nonzero(np.any(again != moved, axis=-1))} pixels differ"
    # a resize makes the text overlays anew for the new size; moves then update them in place again
    qtbot.waitUntil(lambda: _settled(v), timeout=10_000)
    before, old_size = _props(v), tuple(v.plotter.window_size)
    view.setFixedSize(view.width() - 40, view.height() - 30)
    qtbot.waitUntil(lambda: tuple(v.plotter.window_size) != old_size and _settled(v), timeout=10_000)
    assert _props(v) != before and v._text_key[0] == tuple(v.plotter.window_size)
    before = _props(v)
    with qtbot.waitSignal(v.rendered, timeout=30_000):
        c.share.spin.setValue(45.0)
    qtbot.waitUntil(lambda: _settled(v), timeout=10_000)
    assert _props(v) == before
    _close(win)


# ---------------------------------------------------------------- bad input


def _expected_message(scene, path, mutate, label) -> str:
    """The scene rules' message for the edit (what the CLI says), the field named as the form
    labels it (issue 12: the window speaks the form's words, not the file path syntax)."""
    from geom.scenefile import SceneError
    from viewer.app.model import parse_dict, scene_dict

    d = scene_dict(scene)
    mutate(d)
    with pytest.raises(SceneError) as e:
        parse_dict(d, path)
    return f"{label}: {e.value.detail}"


@pytest.mark.parametrize("field,text,mutate,label", [
    ("tolerance.value", "-0.02", lambda d: d["feature"][0]["tolerance"].__setitem__("value", -0.02),
     "Cap-bore: tolerance value"),
    ("limits[0]", "abc", lambda d: d["feature"][0]["limits"].__setitem__(0, "abc"), "Cap-bore: size limits, first value"),
    ("limits[1]", "7.9", lambda d: d["feature"][0]["limits"].__setitem__(1, 7.9), "Cap-bore: size limits"),  # reversed
])
def test_invalid_value_marks_the_field_and_keeps_the_scene(qtbot, field, text, mutate, label):
    win = _open(qtbot)
    m = win.model
    m.set_focus("feature", "cap-bore")
    before = m.scene
    form = win.feature_form
    w = form.fields[field]
    w.setText(text)
    w.editingFinished.emit()
    expected = _expected_message(before, m.path, mutate, label)  # the CLI's rules, the form's words
    assert "feature[" not in expected
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
    assert win.feature_form.fields["length"].text() == "12"  # the scene file: length = 12.0, shown as typed
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


def test_export_report_runs_in_a_worker_and_writes_files(qtbot, tmp_path, monkeypatch):
    win = _open(qtbot)
    # the window runs in a folder that is not the source tree and holds a stand-in `matezone`
    # package: the command must run the installed program (as from a wheel), not the stand-in
    work = tmp_path / "work"
    (work / "matezone").mkdir(parents=True)
    (work / "matezone" / "__init__.py").write_text("")
    (work / "matezone" / "cli.py").write_text("import sys\nsys.exit('matezone: the stand-in ran')\n")
    monkeypatch.chdir(work)
    out = tmp_path / "report"
    win.export_report(str(out))
    # the worker thread runs the command; its answer can only arrive through the event loop, so
    # nothing is recorded yet
    assert win._thread is not None and win._thread.isRunning()
    worker = win._worker
    assert worker is not None and win.last_export is None
    assert not win.act["open_report_folder"].isEnabled()
    qtbot.waitUntil(lambda: win._thread is None, timeout=180_000)
    assert win.last_export == str(out), win.messages.text()
    assert win.act["open_report_folder"].isEnabled()
    # it ran in the temporary folder of the scene copy it was given (gone now), not in the source tree
    ran = Path(worker.cwd)
    assert ran.name.startswith("matezone-report-") and not ran.exists() and not ran.is_relative_to(ROOT)
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
    assert win.export_image(str(p), caption=False) == str(p)  # the picture alone (the caption: test_gui_teach)
    shot = _colours(QImage(str(p)))
    for a in win.view3d.layer_actions.values():  # the blank reference: same widget, nothing drawn
        a.setChecked(False)
    blank_p = tmp_path / "blank.png"
    assert win.export_image(str(blank_p), caption=False) == str(blank_p)
    blank = _colours(QImage(str(blank_p)))
    assert blank.shape == shot.shape
    assert len(np.unique(blank)) <= 2  # independent: a blank render is the background colour alone
    # shaded surfaces give hundreds of colours; a handful would be flat fills or text only
    assert len(np.unique(shot)) >= 100
    # the drawing covers a real part of the view, not a few stray pixels (at least 5 %)
    assert np.mean(shot != blank) > 0.05
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
