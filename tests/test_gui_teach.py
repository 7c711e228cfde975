"""The window as a teaching tool (issue 12): the play control sweeping a size from MMC to LMC
through the what-if path (the readouts tick with it), the size sweep exported as a GIF, the
picture export with its caption, the clipboard copies, and the layout on a small screen
(1024 x 700, with and without a 1.5x font).

Check values: the sizes of the sweep are ``numpy.linspace`` over the feature's limits read from
the scene file; bonus and tolerance allowed come from geom.boundaries (ASME Y14.5 bonus
tolerance: the departure from MMC), formatted with ``Units.fmt`` as the window must print them.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np
import pytest

pytestmark = pytest.mark.gui

ROOT = Path(__file__).resolve().parent.parent
GEARBOX = ROOT / "scenes" / "gearbox_endcap_dowel.toml"

if not os.environ.get("DISPLAY"):
    pytest.skip("GUI tests need an X display: run them under xvfb-run -a", allow_module_level=True)


from test_gui import _close, _open  # noqa: E402  (one way to open and close the window in tests)


def _copy(tmp_path) -> Path:
    p = tmp_path / "endcap.toml"
    p.write_text(GEARBOX.read_text(encoding="utf-8"), encoding="utf-8")
    return p


# ---------------------------------------------------------------- 1. play


def test_play_sweeps_the_hole_from_mmc_to_lmc_and_the_readouts_tick(qtbot):
    from geom import boundaries as B
    from geom.scenefile import load

    win = _open(qtbot)
    m = win.model
    m.set_focus("mate", 0)
    hole = load(GEARBOX).feature(load(GEARBOX).mates[0].hole)  # the mate's hole is what is swept
    bar = win.whatif.play
    bar.player.timer.setInterval(1)  # fast in tests; the signals are waited on, never a sleep
    bar.steps.setValue(5)
    seen = []  # (size in the model, size readout, bonus readout, tolerance allowed readout)

    def record(_i):
        v = win.readouts.values
        bonus_key = next(q for (f, q) in v if f == hole.id and q.endswith(" at this size")
                         and not q.startswith("tolerance"))
        seen.append((m.states[hole.id].size, v[(hole.id, "produced size")], v[(hole.id, bonus_key)],
                     v[(hole.id, "tolerance allowed at this size")]))

    bar.player.stepped.connect(record)
    with qtbot.waitSignal(bar.player.stopped, timeout=30_000) as stop:
        bar.button.click()
        assert bar.button.text() == "Pause"
    assert stop.args == ["end"]
    want = np.linspace(hole.mmc, hole.lmc, 5)  # independent: evenly spaced, both limits included
    assert [s[0] for s in seen] == pytest.approx(list(want), abs=1e-12)
    u = m.scene.units
    for (size, size_txt, bonus_txt, ta_txt), w in zip(seen, want):
        assert size_txt == u.fmt(w)
        assert bonus_txt == u.fmt(B.bonus(hole, w))  # ASME Y14.5: bonus = departure from MMC
        assert ta_txt == u.fmt(B.tolerance_allowed(hole, w))
    assert seen[0][2] != seen[-1][2]  # the bonus ticked
    assert m.states[hole.id].size == hole.lmc and bar.button.text() == "Play"
    # the banner judges the sizes reached (geom's fit at the states set)
    from viewer.windowlogic.whatif import mate_verdict_at

    assert win.verdict.text().endswith(mate_verdict_at(m.result, 0, m.states).headline)
    _close(win)


def test_play_turns_the_tilt_round_when_asked(qtbot):
    win = _open(qtbot)
    m = win.model
    bar = win.whatif.play
    fid = m.scene.mates[0].hole
    bar.player.timer.setInterval(1)
    bar.steps.setValue(5)
    bar.turn.setChecked(True)
    dirs = []
    bar.player.stepped.connect(lambda _i: dirs.append(m.states[fid].direction_deg))
    with qtbot.waitSignal(bar.player.stopped, timeout=30_000):
        bar.button.click()
    # one full turn over the sweep in quarter turns (5 steps): 0, 90, 180, 270, 360 deg from the start
    steps = [(d - dirs[0]) % 360.0 for d in dirs]
    assert steps == pytest.approx([0.0, 90.0, 180.0, 270.0, 0.0], abs=1e-9)
    _close(win)


@pytest.mark.parametrize("how", ["pause", "edit", "focus", "worst"])
def test_play_stops_on_pause_an_edit_and_a_focus_change(qtbot, how):
    win = _open(qtbot)
    m = win.model
    bar = win.whatif.play
    bar.player.timer.setInterval(60_000)  # the first step is set at once; the next would wait a minute
    bar.button.click()
    assert bar.player.playing and bar.button.text() == "Pause"
    fid = bar.player.fid
    with qtbot.waitSignal(bar.player.stopped, timeout=10_000) as stop:
        if how == "pause":
            bar.button.click()
        elif how == "edit":
            win.whatif.groups[fid].share.spin.setValue(50.0)  # the user moves a control
        elif how == "focus":
            m.set_focus("feature", m.scene.mates[0].pin)
        else:
            win.act["worst"].trigger()
    assert stop.args == [{"worst": "edit"}.get(how, how)]
    assert not bar.player.playing and bar.button.text() == "Play"
    _close(win)


def test_play_has_nothing_to_sweep_for_a_fastener_or_inspection(qtbot):
    win = _open(qtbot)
    m = win.model
    m.set_focus("inspection", m.scene.mates[0].hole)
    assert not win.whatif.play.player.play()
    assert not win.whatif.play.isVisibleTo(win)
    _close(win)


# ---------------------------------------------------------------- 2. export the sweep


def test_export_sweep_writes_a_gif_with_one_frame_per_step(qtbot, tmp_path, monkeypatch):
    import imageio.v2 as imageio
    from PyQt5.QtWidgets import QFileDialog

    scene = _copy(tmp_path)
    win = _open(qtbot, scene)
    asked = []
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (asked.append(a[2]), ("", ""))[1])
    assert not win.export_sweep()  # the dialog was cancelled: nothing started
    assert asked == [str(tmp_path / "endcap_mate1_sweep.gif")]  # from the scene's stem and folder
    out = tmp_path / "endcap_mate1_sweep.gif"
    with qtbot.waitSignal(win.sweepExported, timeout=240_000) as done:
        assert win.export_sweep(str(out), steps=4)
    assert done.args == [True, str(out)], done.args
    frames = imageio.mimread(str(out))
    assert len(frames) == 4  # one frame per step asked for
    assert not any(frames[0].shape != f.shape for f in frames)
    assert "size sweep written" in win.messages.text()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["endcap.toml", out.name]  # no temporary left
    _close(win)


def test_export_sweep_refuses_a_bad_name_inline(qtbot, tmp_path):
    win = _open(qtbot)
    assert not win.export_sweep(str(tmp_path / "sweep.avi"), steps=3)
    assert "expected a file name ending in .gif or .mp4" in win.messages.text()
    box = tmp_path / "box.gif"
    box.mkdir()
    assert not win.export_sweep(str(box), steps=3)  # a folder
    assert "not a regular file" in win.messages.text()
    assert list(tmp_path.iterdir()) == [box] and list(box.iterdir()) == []
    _close(win)


# ---------------------------------------------------------------- 3. pictures and the clipboard


def test_export_picture_of_the_3d_view_at_2x_with_a_caption(qtbot, tmp_path):
    from PyQt5.QtGui import QImage

    win = _open(qtbot)
    ww, wh = win.view3d.plotter.window_size  # the render window's pixels
    p = tmp_path / "view.png"
    assert win.export_image(str(p), pane="3d", scale=2) == str(p)
    img = QImage(str(p))
    assert img.width() == 2 * ww
    assert img.height() > 2 * wh  # the caption block below the picture
    band = img.height() - 2 * wh
    assert band < wh  # a caption, not a second picture
    plain = tmp_path / "plain.png"
    assert win.export_image(str(plain), pane="3d", scale=1, caption=False) == str(plain)
    assert (QImage(str(plain)).width(), QImage(str(plain)).height()) == (ww, wh)
    _close(win)


def test_export_picture_of_the_2d_tab_at_a_dpi(qtbot, tmp_path):
    from PyQt5.QtGui import QImage

    win = _open(qtbot)
    win.views2d.setCurrentIndex(2)
    win.views2d.refresh_current()
    fw, fh = win.views2d.figure().get_size_inches()
    p = tmp_path / "bonus.png"
    assert win.export_image(str(p), pane="2d", dpi=150) == str(p)
    img = QImage(str(p))
    assert abs(img.width() - fw * 150) <= 1  # matplotlib: inches x dpi, rounded
    assert img.height() > fh * 150
    svg = tmp_path / "bonus.svg"
    assert win.export_image(str(svg)) == str(svg)
    text = svg.read_text(encoding="utf-8")
    assert "<svg" in text
    _close(win)


def test_default_picture_name_comes_from_the_scene(qtbot, tmp_path, monkeypatch):
    from PyQt5.QtWidgets import QDialog, QFileDialog

    from viewer.app import exports

    win = _open(qtbot, _copy(tmp_path))
    monkeypatch.setattr(exports.PictureDialog, "exec_", lambda self: QDialog.Accepted)
    asked = []
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (asked.append(a[2]), ("", ""))[1])
    assert win.export_image() is None
    assert asked == [str(tmp_path / "endcap_mate1_3d.png")]
    _close(win)


def test_copy_table_puts_the_rows_on_the_clipboard(qtbot):
    from PyQt5.QtWidgets import QApplication

    win = _open(qtbot)
    text = win.copy_table()
    got = QApplication.clipboard().text()
    assert got == text
    lines = got.rstrip("\n").split("\n")
    t = win.readouts
    assert lines[0].split("\t") == ["Quantity", "Value", "Formula"]
    assert len(lines) == t.rowCount() + 1
    for r, line in enumerate(lines[1:]):
        assert line.split("\t") == [" ".join(t.item(r, c).text().split()) for c in range(3)]
    assert any(line.startswith("produced size\t") for line in lines)
    _close(win)


def test_copy_image_puts_the_3d_view_on_the_clipboard(qtbot):
    from PyQt5.QtWidgets import QApplication

    win = _open(qtbot)
    assert win.copy_image("3d")
    img = QApplication.clipboard().image()
    assert (img.width(), img.height()) == tuple(win.view3d.plotter.window_size)
    _close(win)


# ---------------------------------------------------------------- 4. a small screen


def _spin_boxes(win):
    from PyQt5.QtWidgets import QAbstractSpinBox

    return [w for w in win.findChildren(QAbstractSpinBox) if w.isVisibleTo(win) and win.whatif.isAncestorOf(w)]


@pytest.mark.parametrize("font_scale", [1.0, 1.5])
def test_the_window_is_usable_at_1024_by_700(qtbot, tmp_path, font_scale):
    from PyQt5.QtWidgets import QApplication

    app = QApplication.instance()
    old = app.font()
    if font_scale != 1.0:
        f = app.font()
        f.setPointSizeF(f.pointSizeF() * font_scale)
        app.setFont(f)
    try:
        win = _open(qtbot)
        win.resize(1024, 700)
        qtbot.waitUntil(lambda: (win.width(), win.height()) == (1024, 700), timeout=10_000)
        QApplication.processEvents()
        assert win.view3d.plotter.interactor.height() >= 300
        spins = _spin_boxes(win)
        assert len(spins) >= 7  # two features x (size, direction, share) and the step count
        for s in spins:
            hint = s.sizeHint()
            assert hint.width() <= s.width() and hint.height() <= s.height(), (s, hint, s.size())
        win.save_screenshot(str(tmp_path / f"small_{font_scale}.png"))
        _close(win)
    finally:
        app.setFont(old)
