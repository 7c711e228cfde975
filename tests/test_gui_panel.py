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


def _title_px(win) -> float:
    """Height in pixels of the through-view's title as the 2D pane draws it."""
    c = win.views2d.canvases["through"]
    c.draw()
    r = c.get_renderer()
    (t,) = [t for t in c.figure.texts if t.get_gid() == "title"]
    # nothing the figure draws lies outside it (the page was laid out for this pane)
    fb = c.figure.bbox
    for tx in c.figure.findobj(lambda a: hasattr(a, "get_window_extent") and hasattr(a, "get_text")):
        if tx.get_visible() and tx.get_text():
            e = tx.get_window_extent(r)
            assert e.x0 >= fb.x0 - 1 and e.x1 <= fb.x1 + 1 and e.y0 >= fb.y0 - 1 and e.y1 <= fb.y1 + 1, tx.get_text()
    return t.get_window_extent(r).height / (c.device_pixel_ratio or 1.0)


def test_figure_text_scales_with_the_desktop_font(qtbot):
    """A 150 % desktop font gives the 2D figures larger text (the figure is laid out for the pane
    at the desktop's text size, down to its smallest page), and nothing falls off the figure."""
    from PyQt5.QtWidgets import QApplication

    app = QApplication.instance()
    old = app.font()
    heights = {}
    try:
        for scale in (1.0, 1.5):
            f = app.font()
            f.setPointSizeF(old.pointSizeF() * scale)
            app.setFont(f)
            win = _open(qtbot)
            try:
                win.resize(1900, 1150)
                qtbot.waitUntil(lambda: win.width() == 1900, timeout=10_000)
                win.views2d.schedule()
                qtbot.waitUntil(lambda: hasattr(win.views2d.canvases["through"].figure, "_matezone_page"),
                                timeout=20_000)
                QApplication.processEvents()
                win.views2d._repage()
                win.views2d.refresh_current()
                heights[scale] = _title_px(win)
            finally:
                _close(win)
    finally:
        app.setFont(old)
    # larger, as far as the figure's smallest page lets it be in this pane (measured: 1.17x)
    assert heights[1.5] >= 1.1 * heights[1.0], heights
