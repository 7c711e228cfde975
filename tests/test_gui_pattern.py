"""The window on a scene with patterns (the invented pump cover): the pattern is in the contents
list and opens first, the banner gives the right-way verdict and says the wrong way would differ,
the 2D pane shows the top view (right and wrong way), the readouts list the members.

The verdict expected is computed here from the scene: each hole 0.085 out radially reads 0.170
against 0.150 (geometry of the measured coordinates; the shift cannot help, see
tests/test_pattern_pictures.py)."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

pytestmark = pytest.mark.gui
if not os.environ.get("DISPLAY"):
    pytest.skip("GUI tests need an X display: run them under xvfb-run -a", allow_module_level=True)

from test_gui import _close, _open  # noqa: E402  (one way to open and close the window in tests)

PUMP = Path(__file__).resolve().parents[1] / "scenes" / "pump_cover_bolts.toml"


def test_the_pattern_opens_first_with_its_verdict_and_top_view(qtbot):
    win = _open(qtbot, PUMP)
    try:
        m = win.model
        assert m.focus == ("pattern", "cover-bolts")
        assert win.verdict.role == "fail"
        head = win.verdict.text()
        assert "DOES NOT CONFORM" in head and "0.170" in head and "0.150" in head
        assert "wrong way" in win.verdict.detail.text()
        v2 = win.views2d
        assert v2.tabText(0) == "Pattern (top view)" and not v2.isTabEnabled(1)
        v2.refresh_current()
        assert len(v2.canvases["through"].figure.axes) == 2  # right way and wrong way
        names = [win.readouts.item(r, 0).text() for r in range(win.readouts.rowCount())
                 if win.readouts.item(r, 0) is not None]
        assert any(n.startswith("member 4: position after the best fit") for n in names)
        # the housing's pattern: no measured members, no verdict claimed
        with qtbot.waitSignal(m.focusChanged, timeout=10_000):
            m.set_focus("pattern", "housing-studs")
        assert win.verdict.role == "none"
        assert len(v2.canvases["through"].figure.axes) in (1, 2)  # redrawn on the next turn
        qtbot.waitUntil(lambda: len(v2.canvases["through"].figure.axes) == 1, timeout=10_000)
    finally:
        _close(win)


def test_the_datum_size_is_the_patterns_what_if(qtbot):
    """The pattern's what-if control is its datum feature's produced size (starting at the size
    the scene measured); moving it changes the shift the pattern may take: size - MMB (ASME
    Y14.5 datum feature shift, from memory), computed here from the scene's numbers."""
    win = _open(qtbot, PUMP)
    try:
        m = win.model
        assert m.focus_features() == ["cover-pilot"]
        g = win.whatif.groups["cover-pilot"]
        assert g.title().startswith("datum B") and g.size.spin.value() == pytest.approx(52.020)
        mmb = 52.000 - 0.020  # the pilot's MMC less its perpendicularity at MMC
        assert f"shift available {m.scene.units.fmt(52.020 - mmb)}" in win.verdict.detail.text()
        with qtbot.waitSignal(m.statesChanged, timeout=10_000):
            g.size.spin.setValue(52.030)
        qtbot.waitUntil(lambda: f"shift available {m.scene.units.fmt(52.030 - mmb)}" in win.verdict.detail.text(),
                        timeout=10_000)
        # the members' own zones do not grow with the shift
        names = {win.readouts.item(r, 0).text(): win.readouts.item(r, 2).text()
                 for r in range(win.readouts.rowCount()) if win.readouts.item(r, 2) is not None}
        assert "allowed 0.150" in names["member 1: position after the best fit"]
    finally:
        _close(win)


def test_worst_case_puts_the_datum_feature_at_its_mmc(qtbot):
    win = _open(qtbot, PUMP)
    try:
        m = win.model
        assert m.states["cover-pilot"].size == pytest.approx(52.020)  # as the scene measured it
        with qtbot.waitSignal(m.statesChanged, timeout=10_000):
            win.whatif.reset.click()
        assert m.states["cover-pilot"].size == pytest.approx(52.000)  # the bore's MMC: the worst case
    finally:
        _close(win)


def test_the_pattern_in_focus_fills_the_3d_view_with_both_parts(qtbot):
    """A pattern that takes part in an interface shows both parts in 3D (no "no 3D picture"
    message); the datum-size what-if redraws the pilot bore at the new size."""
    win = _open(qtbot, PUMP)
    try:
        m, v = win.model, win.view3d
        assert m.focus == ("pattern", "cover-bolts")
        qtbot.waitUntil(lambda: v.current is not None, timeout=20_000)
        assert v.current.kind == "interface"
        assert sum(len(a) for a in v.actors.values()) > 0
        assert "no 3D picture" not in v.caption.text()
        before = v.current.find("part", "part 1").mesh
        with qtbot.waitSignal(m.statesChanged, timeout=10_000):
            win.whatif.groups["cover-pilot"].size.spin.setValue(52.030)
        qtbot.waitUntil(lambda: v.current.find("part", "part 1").mesh is not before, timeout=20_000)
        assert v.current.kind == "interface" and "no 3D picture" not in v.caption.text()
    finally:
        _close(win)
