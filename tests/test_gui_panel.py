"""The side panel on a 1280 x 800 screen: the window opens inside the screen and the what-if
panel (sliders, size boxes, play bar) fits its column without a horizontal scroll bar, its size
boxes showing value and unit whole (common practice for a desktop tool, no source)."""

from __future__ import annotations

import os

import pytest

pytestmark = pytest.mark.gui
if not os.environ.get("DISPLAY"):
    pytest.skip("GUI tests need an X display: run them under xvfb-run -a", allow_module_level=True)

from test_gui import _close, _open  # noqa: E402  (one way to open and close the window in tests)


def test_the_what_if_panel_fits_its_column_at_1280_by_800(qtbot):
    from PyQt5.QtWidgets import QAbstractSpinBox, QApplication, QScrollArea

    win = _open(qtbot)
    try:
        win.resize(1280, 800)
        qtbot.waitUntil(lambda: (win.width(), win.height()) == (1280, 800), timeout=10_000)
        QApplication.processEvents()
        scroll = next(s for s in win.findChildren(QScrollArea) if s.widget().isAncestorOf(win.whatif))
        assert not scroll.horizontalScrollBar().isVisible()
        assert win.whatif.minimumSizeHint().width() <= scroll.viewport().width()
        for s in win.whatif.findChildren(QAbstractSpinBox):
            if s.isVisibleTo(win):
                assert s.sizeHint().width() <= s.width(), s
    finally:
        _close(win)


def test_the_window_opens_inside_a_small_screen():
    from PyQt5.QtWidgets import QApplication

    from viewer.app.window import _first_size

    app = QApplication.instance() or QApplication([])
    g = app.primaryScreen().availableGeometry()
    w, h = _first_size()
    assert w <= g.width() and h <= g.height()
