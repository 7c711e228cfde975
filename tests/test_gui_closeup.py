"""The window's close-up of the tightest spot and its callouts: the camera button is there for a
mate, off for a lone feature, follows the spot on a what-if move while the user has not turned
the camera, and the 3D labels stay clear of each other in the window.

Checks are rectangle arithmetic and the scene's own tightest-spot anchor (common practice for a
close-up: the point it shows is in the picture, no source).
"""

from __future__ import annotations

import os

import numpy as np
import pytest

pytestmark = pytest.mark.gui
if not os.environ.get("DISPLAY"):
    pytest.skip("GUI tests need an X display: run them under xvfb-run -a", allow_module_level=True)

from test_gui import _close, _open  # noqa: E402  (one way to open and close the window in tests)


def _overlap(a, b) -> bool:
    return a[0] < b[1] and b[0] < a[1] and a[2] < b[3] and b[2] < a[3]


def test_close_up_button_aims_at_the_tightest_spot_and_follows_a_move(qtbot):
    from viewer.scene3d.callouts import project_points
    from viewer.scene3d.plotter import callouts

    win = _open(qtbot)
    try:
        v = win.view3d
        button = v.view_buttons["gap"]
        assert button.isEnabled()
        with qtbot.waitSignal(v.rendered, timeout=30_000, raising=False):
            button.click()
            v.render()
            v.rendered.emit()
        assert v.current_view == "gap" and v.plotter.camera.parallel_projection

        def spot_px():
            spot = next(lb.point for lb in v.current.labels if lb.layer == "clearance")
            return project_points(v.plotter.renderer, np.array([spot]))[0]

        w, h = v.plotter.window_size
        x, y = spot_px()
        assert 0 < x < w and 0 < y < h
        # a what-if move: the hole at its LMC; the tightest spot moves, the close-up follows it
        hole = win.model.result.scene.features[0]
        with qtbot.waitSignal(v.rendered, timeout=30_000):
            win.model.set_state(hole.id, size=hole.lmc)
        x, y = spot_px()
        assert 0 < x < w and 0 < y < h
        c = callouts(v.plotter)
        boxes = [b for b, t in zip(c.boxes, c.texts) if b is not None and t.GetVisibility()]
        for i, b in enumerate(boxes):
            for o in boxes[:i]:
                assert not _overlap(b, o)
    finally:
        _close(win)


def test_close_up_is_off_for_a_lone_feature(qtbot):
    win = _open(qtbot)
    try:
        fid = win.model.result.scene.features[0].id
        with qtbot.waitSignal(win.view3d.rendered, timeout=30_000):
            win.model.set_focus("feature", fid)
        assert not win.view3d.view_buttons["gap"].isEnabled()
        assert win.view3d.current_view in ("iso", "top", "section")
    finally:
        _close(win)
