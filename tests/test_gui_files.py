"""The desktop window loses no work and shows no traceback on bad input (pytest-qt, run under
``xvfb-run -a``): typed values are committed before every save, export and close; saves keep
permissions and go through links; special files are refused; hostile scene files show the
loader's message and keep the scene; drawing failures are a message; exports are all or nothing;
free text is never math markup; the tests never touch the user's settings.

Expected messages are computed inside each test with the code the command line uses
(geom.scenefile.load / save, viewer.reportdir.check_target), so the window is held to the CLI's
words.
"""

from __future__ import annotations

import json
import os
import shutil
import stat
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

pytestmark = pytest.mark.gui

ROOT = Path(__file__).resolve().parent.parent
GEARBOX = ROOT / "scenes" / "gearbox_endcap_dowel.toml"
CAP = ROOT / "scenes" / "cap_bore_inspection.toml"
CAP_CSV = ROOT / "scenes" / "cap_bore_inspection.csv"

if not os.environ.get("DISPLAY"):
    pytest.skip("GUI tests need an X display: run them under xvfb-run -a", allow_module_level=True)


from scenetext import hole, scene_toml, tol  # noqa: E402
from test_gui import _close, _open  # noqa: E402  (one way to open and close the window in tests)


def _copy(tmp_path, src=GEARBOX, name="scene.toml") -> Path:
    dst = tmp_path / name
    shutil.copy(src, dst)
    return dst


def _type(qtbot, widget, text: str) -> None:
    """Type ``text`` over the field's content as a user would, without pressing Enter."""
    widget.selectAll()
    qtbot.keyClicks(widget, text)


def _message(win) -> str:
    return win.messages.text().removeprefix("Error: ")


# ---------------------------------------------------------------- 1. typed values are never lost


def test_save_commits_the_value_being_typed(qtbot, tmp_path):
    from PyQt5.QtCore import Qt
    from PyQt5.QtGui import QKeySequence

    from geom.scenefile import load

    path = _copy(tmp_path)
    win = _open(qtbot, path)
    m = win.model
    m.set_focus("feature", "dowel")
    w = win.feature_form.fields["tolerance.value"]
    assert w.text() != "0.004"
    from PyQt5.QtWidgets import QApplication

    win.activateWindow()
    QApplication.setActiveWindow(win)  # (Xvfb has no window manager to activate it)
    w.setFocus()
    _type(qtbot, w, "0.004")
    # typed, not committed: no Enter, the field has not lost focus
    assert w.text() == "0.004" and m.scene.feature("dowel").tolerance.value != 0.004 and not m.dirty
    assert win.act["save"].shortcut() == QKeySequence(QKeySequence.Save)
    qtbot.waitUntil(lambda: win.isActiveWindow() and w.hasFocus(), timeout=10_000)
    qtbot.keyClick(w, Qt.Key_S, Qt.ControlModifier)  # Ctrl+S, typed into the field being edited
    qtbot.waitUntil(lambda: not m.dirty and "saved" in win.messages.text(), timeout=10_000)
    assert load(path).feature("dowel").tolerance.value == 0.004  # independent: the scene-file reader
    assert m.scene.feature("dowel").tolerance.value == 0.004
    _close(win)


def test_close_and_quit_commit_the_value_being_typed(qtbot, tmp_path):
    from geom.scenefile import load

    path = _copy(tmp_path)
    win = _open(qtbot, path)
    win.model.set_focus("feature", "cap-bore")
    _type(qtbot, win.feature_form.fields["length"], "13")
    asked = []
    win.confirm = lambda: asked.append(1) or "save"  # the unsaved-changes question: Save
    win.act["quit"].trigger()
    assert asked  # the typed value made the scene unsaved, so the window asked
    qtbot.waitUntil(lambda: not win.isVisible(), timeout=10_000)
    assert load(path).feature("cap-bore").length == 13.0  # independent: the scene-file reader


def test_rejected_typed_value_stops_the_save_and_keeps_the_file(qtbot, tmp_path):
    from geom.scenefile import SceneError, load
    from viewer.app.model import parse_dict, scene_dict

    path = _copy(tmp_path)
    before = path.read_bytes()
    win = _open(qtbot, path)
    m = win.model
    m.set_focus("feature", "cap-bore")
    w = win.feature_form.fields["tolerance.value"]
    _type(qtbot, w, "-0.02")
    # independent: the scene rules on the same value (what `matezone analyze` says of it)
    d = scene_dict(m.scene)
    d["feature"][0]["tolerance"]["value"] = -0.02
    with pytest.raises(SceneError) as e:
        parse_dict(d, m.path)
    assert not win.file_save()
    assert path.read_bytes() == before  # nothing written
    said = f"Cap-bore: tolerance value: {e.value.detail}"  # the rule's message, the form's label for the field
    assert said in win.messages.text() and "nothing was written" in win.messages.text()
    assert w.text() == "-0.02" and "c62828" in w.styleSheet()  # the typed text stays, marked
    assert win.feature_form.error_label.text() == said
    # closing asks (the typed value is not in the scene); Cancel keeps the window and the text
    win.confirm = lambda: "cancel"
    win.close()
    assert win.isVisible() and w.text() == "-0.02"
    assert load(path).feature("cap-bore").tolerance.value == load(GEARBOX).feature("cap-bore").tolerance.value
    _close(win)


def test_exports_use_the_value_being_typed(qtbot, tmp_path):
    win = _open(qtbot, _copy(tmp_path))
    m = win.model
    spin = win.whatif.groups["cap-bore"].size.spin
    spin.lineEdit().selectAll()
    qtbot.keyClicks(spin, "8.01")  # the scene's limits are 8.000 .. 8.015; keyboard tracking is off
    assert m.states["cap-bore"].size != pytest.approx(8.01)
    m.set_focus("feature", "cap-bore")
    _type(qtbot, win.feature_form.fields["length"], "14")
    assert win.export_image(str(tmp_path / "view.png"))
    assert m.scene.feature("cap-bore").length == 14.0 and m.dirty
    assert m.states["cap-bore"].size == pytest.approx(8.01)
    _close(win)


# ---------------------------------------------------------------- 2. saving keeps what the file is


def test_save_keeps_permissions_and_writes_through_a_link(qtbot, tmp_path):
    from geom.scenefile import load

    (tmp_path / "real").mkdir()
    target = _copy(tmp_path / "real")
    os.chmod(target, 0o640)
    link = tmp_path / "link.toml"
    link.symlink_to(target)
    win = _open(qtbot, link)
    m = win.model
    assert m.path == str(link)  # the path the user has, not the resolved one
    m.set_focus("feature", "cap-bore")
    f = win.feature_form.fields["length"]
    f.setText("15")
    f.editingFinished.emit()
    assert win.file_save()
    assert link.is_symlink() and link.resolve() == target.resolve()  # the link stays a link
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o640  # the file's permission bits, kept
    assert load(target).feature("cap-bore").length == 15.0  # independent: the target holds the save
    assert not list((tmp_path / "real").glob(".*.tmp"))  # no temporary file left
    assert os.path.abspath(link) in win.recent_files()
    _close(win)


def test_save_as_refuses_folders_devices_and_pipes(qtbot, tmp_path):
    from geom.scenefile import SceneError, save

    win = _open(qtbot, _copy(tmp_path))
    m = win.model
    m.set_focus("feature", "cap-bore")
    f = win.feature_form.fields["length"]
    f.setText("16")
    f.editingFinished.emit()
    folder = tmp_path / "folder"
    folder.mkdir()
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    path_before, scene_before = m.path, m.scene
    for special in (folder, Path(os.devnull), fifo):
        with pytest.raises(SceneError) as e:  # independent: geom's own refusal, nothing written
            save(scene_before, special)
        assert not win.file_save_as(str(special))
        assert _message(win) == f"{e.value}; nothing was written"
        assert m.path == path_before and m.scene == scene_before and m.dirty  # the edit is still there
    assert stat.S_ISDIR(os.stat(folder).st_mode) and not any(folder.iterdir())
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)
    assert stat.S_ISCHR(os.stat(os.devnull).st_mode)
    assert not (tmp_path / "folder.toml").exists() and not (tmp_path / "pipe.toml").exists()
    _close(win)


# ---------------------------------------------------------------- 3. the report export


def _snapshot(folder: Path) -> dict:
    """name -> (inode, bytes) of every file in ``folder``."""
    return {p.name: (p.stat().st_ino, p.read_bytes()) for p in sorted(folder.iterdir())}


def test_export_report_with_relative_points_is_whole_refused_or_left_as_it_was(qtbot, tmp_path):
    from geom.scenefile import load
    from viewer.reportdir import MANIFEST, ReportDirError, check_target

    assert not Path(load(CAP).feature("cap-bore").measured.points).is_absolute()  # a relative points path
    win = _open(qtbot, CAP)
    out = tmp_path / "report"
    win.export_report(str(out))
    qtbot.waitUntil(lambda: win._thread is None, timeout=180_000)
    assert win.last_export == str(out), win.messages.text()
    assert win.act["open_report_folder"].isEnabled()
    res = json.loads((out / "results.json").read_text())
    insp = res["inspections"]["cap-bore"]
    # the points the scene names, read from beside the scene file; every data row of the CSV
    # (independent count: the file's lines after its header)
    assert Path(insp["source_file"]).resolve() == CAP_CSV.resolve()
    assert insp["n_points"] == len([ln for ln in CAP_CSV.read_text().splitlines()[1:] if ln.strip()])
    listed = set(json.loads((out / MANIFEST).read_text())["files"])
    assert {p.name for p in out.iterdir()} - {MANIFEST} == listed and "report.pdf" in listed
    first = _snapshot(out)

    # a folder with other files is refused with the writer's one message, before any work
    other = tmp_path / "mine"
    other.mkdir()
    (other / "notes.txt").write_text("keep me")
    with pytest.raises(ReportDirError) as e:  # independent: the report writer's own check
        check_target(other)
    win.export_report(str(other))
    assert win._thread is None
    assert _message(win) == f"report not written: {e.value}"
    assert [p.name for p in other.iterdir()] == ["notes.txt"] and (other / "notes.txt").read_text() == "keep me"

    # a cancelled export leaves the previous report whole: the same files, untouched
    win.export_report(str(out))
    worker = win._worker
    assert worker is not None
    with qtbot.waitSignal(worker.progress, timeout=120_000,
                          check_params_cb=lambda s: s.startswith("[")):  # the command is writing
        pass
    win.cancel_report()
    qtbot.waitUntil(lambda: win._thread is None, timeout=60_000)
    assert win.last_export is None
    assert "report cancelled" in win.messages.text() and "unchanged" in win.messages.text()
    assert _snapshot(out) == first
    assert sorted(p.name for p in tmp_path.iterdir()) == ["mine", "report"]  # no temporary folder left
    _close(win)


# ---------------------------------------------------------------- 4. hostile files, drawing failures


def _hostile_files(tmp_path) -> dict[str, Path]:
    files = {}
    p = tmp_path / "binary.toml"
    p.write_bytes(bytes(range(256)) * 4)
    files["binary bytes"] = p
    files["/dev/zero"] = Path("/dev/zero")
    p = tmp_path / "fifo.toml"
    os.mkfifo(p)
    files["a FIFO"] = p
    p = tmp_path / "nested.toml"
    p.write_text("x = " + "[" * 5000 + "]" * 5000 + "\n")
    files["5000 nested arrays"] = p
    p = tmp_path / "long_int.toml"
    p.write_text(scene_toml(title="t", standard="asme") + "big = " + "7" * 5000 + "\n")
    files["an integer of 5000 digits"] = p
    p = tmp_path / "sparse.toml"
    with open(p, "wb") as fh:  # 100 MB without writing it: `truncate -s 100M`
        fh.truncate(100 * 2**20)
    files["100 MB sparse"] = p
    p = tmp_path / "folder.toml"
    p.mkdir()
    files["a folder"] = p
    files["missing"] = tmp_path / "missing.toml"
    return files


def test_hostile_files_show_the_loader_message_and_keep_the_scene(qtbot, tmp_path):
    from geom.scenefile import SceneError, load

    win = _open(qtbot)
    m = win.model
    m.set_focus("feature", "cap-bore")
    f = win.feature_form.fields["length"]
    f.setText("17")
    f.editingFinished.emit()  # unsaved work that must survive
    asked = []
    win.confirm = lambda: asked.append(1) or "discard"
    before = (m.scene, m.path, m.dirty, m.undo_stack.count())
    for what, path in _hostile_files(tmp_path).items():
        with pytest.raises(SceneError) as e:  # independent: the loader `matezone analyze` uses
            load(path)
        assert not win.open_path(str(path)), what
        assert win.messages.text() == "Error: " + str(e.value), what
        assert "Traceback" not in win.messages.text()
        assert (m.scene, m.path, m.dirty, m.undo_stack.count()) == before, what
    assert not asked  # a file that cannot be opened does not ask about the unsaved changes
    assert m.scene.feature("cap-bore").length == 17.0
    _close(win)


def test_3d_view_that_cannot_be_drawn_is_a_message_and_the_view_stays(qtbot, monkeypatch):
    from viewer import scene3d

    win = _open(qtbot)
    v, m = win.view3d, win.model
    shown, scene_before = v.current, m.scene
    real = scene3d.build_mate_scene

    def overflow(*a, **k):
        raise OverflowError("math range error")

    monkeypatch.setattr(scene3d, "build_mate_scene", overflow)
    with qtbot.waitSignal(v.drawFailed, timeout=30_000) as got:
        win.whatif.groups["cap-bore"].share.spin.setValue(50.0)
    assert "OverflowError: math range error" in got.args[0] and got.args[0] in win.messages.text()
    assert v.current is shown and m.scene == scene_before  # the last picture stays, nothing changed

    def non_finite(*a, **k):  # a mesh with a coordinate that overflowed to infinity
        sc = real(*a, **k)
        name, items = next((n, it) for n, it in sc.layers.items() if it)
        mesh = items[0].mesh.copy()
        mesh.points[0] = (np.inf, 0.0, 0.0)
        return replace(sc, layers={**sc.layers, name: (replace(items[0], mesh=mesh),) + tuple(items[1:])})

    monkeypatch.setattr(scene3d, "build_mate_scene", non_finite)
    with qtbot.waitSignal(v.drawFailed, timeout=30_000) as got:
        win.whatif.groups["cap-bore"].share.spin.setValue(60.0)
    assert "not finite" in got.args[0] and "not finite" in win.messages.text()
    assert v.current is shown

    monkeypatch.setattr(scene3d, "build_mate_scene", real)
    with qtbot.waitSignal(v.rendered, timeout=30_000):
        win.whatif.groups["cap-bore"].share.spin.setValue(70.0)
    assert v.draw_error is None and v.current is not shown
    _close(win)


def test_2d_view_that_cannot_be_drawn_is_a_message_and_the_figure_stays(qtbot, monkeypatch):
    import matplotlib.artist
    from matplotlib.figure import Figure

    win = _open(qtbot)
    v2 = win.views2d
    v2.setCurrentIndex(0)
    v2.schedule()  # the window draws the tab shown once the event loop turns
    qtbot.waitUntil(lambda: "through" not in v2.stale, timeout=30_000)
    before = v2.canvases["through"].figure

    class Unprintable(matplotlib.artist.Artist):
        def draw(self, renderer):
            raise OverflowError("cannot convert float infinity to integer")

    def bad_view(*a, **k):  # a figure whose drawing fails (as matplotlib does on an infinite extent)
        fig = Figure()
        fig.add_artist(Unprintable())
        return fig, None

    monkeypatch.setattr(v2.figures_mod, "draw_view", bad_view)
    v2.schedule()
    qtbot.waitUntil(lambda: "through" not in v2.stale, timeout=30_000)
    assert "through-view cannot be drawn" in win.messages.text() and "OverflowError" in win.messages.text()
    assert v2.canvases["through"].figure is before  # the last figure that drew is shown
    v2.canvases["through"].repaint()  # and paints (an exception here fails the test: pytest-qt)
    _close(win)


# ---------------------------------------------------------------- 6. free text is never math markup


LONE = scene_toml(hole("bore", (10.0, 10.02), 10.0, tolerance=tol("perpendicularity", 0.01), name="spot $x$ face"),
                  title="Price $5 and $x$ title", standard="asme")


def test_dollar_signs_in_names_are_drawn_literally_in_the_2d_views(qtbot, tmp_path):
    import matplotlib.text
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    path = tmp_path / "lone.toml"
    path.write_text(LONE)
    win = _open(qtbot, path)
    v2 = win.views2d
    assert win.model.focus == ("feature", "bore")
    seen = 0
    v2.schedule()
    for i, (key, _title) in enumerate(v2.TABS):
        v2.setCurrentIndex(i)
        qtbot.waitUntil(lambda key=key: key not in v2.stale, timeout=30_000)
        fig = v2.canvases[key].figure
        texts = [t for t in fig.findobj(matplotlib.text.Text) if "$x$" in t.get_text()]
        assert texts, key  # the feature's name is in the view's title
        renderer = v2.canvases[key].get_renderer()
        for t in texts:
            assert t.get_parse_math() is False
            # independent: the same string drawn literally by matplotlib is as wide; as math it is not
            ref = Figure(dpi=fig.dpi)
            FigureCanvasAgg(ref)
            r_lit = ref.text(0, 0, t.get_text(), fontproperties=t.get_fontproperties(), parse_math=False)
            r_math = ref.text(0, 0.5, t.get_text(), fontproperties=t.get_fontproperties(), parse_math=True)
            rr = ref.canvas.get_renderer()
            w = t.get_window_extent(renderer).width
            assert w == pytest.approx(r_lit.get_window_extent(rr).width, rel=1e-6)
            assert w != pytest.approx(r_math.get_window_extent(rr).width, rel=1e-3)
            seen += 1
    assert seen >= 3
    _close(win)


# ---------------------------------------------------------------- 5. the user's settings stay untouched


def _real_settings_file() -> Path:
    """Where QSettings("matezone", "matezone") keeps the user's settings on Linux (XDG base
    directory specification: $XDG_CONFIG_HOME, default ~/.config), worked out independently."""
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "matezone" / "matezone.conf"


def _state(p: Path):
    return (p.read_bytes(), p.stat().st_mtime_ns) if p.exists() else None


def test_tests_never_write_the_users_settings(qtbot, tmp_path):
    from viewer.app.window import settings

    assert sys.platform.startswith("linux")  # the layout worked out in _real_settings_file
    real = _real_settings_file()
    before = _state(real)
    private = Path(os.environ["MATEZONE_SETTINGS"])
    assert not private.is_relative_to(real.parent) and settings().fileName() == str(private)
    path = _copy(tmp_path)
    win = _open(qtbot, path)
    assert win.open_path(str(path), ask=False)
    assert win.file_save_as(str(tmp_path / "again.toml"))
    win._fill_recent()
    assert os.path.abspath(tmp_path / "again.toml") in win.recent_files()
    _close(win)
    assert _state(real) == before  # the user's file: the same bytes, not even rewritten
    assert str(tmp_path / "again.toml") in private.read_text()  # the recent list went to the test's file
