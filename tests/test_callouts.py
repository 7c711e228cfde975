"""3D labels as callouts: they never collide with each other, with the markers (tightest spot,
axis ends), with other labels' anchors or with the texts and colour bar over the picture; the
title and the scale caption never overlap; the close-up camera aims at the tightest spot.

Geometry checks are plain rectangle arithmetic done here (no source needed beyond it); the
requirement that labels stay clear of one another and of the marks they name is common
practice for technical illustration, no source.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom.analysis import analyse_scene
from geom.scenefile import load
from viewer.scene3d.callouts import PAD, leader, place, project_points

SCENES = Path(__file__).resolve().parents[1] / "scenes"
MATE_SCENES = ["gearbox_endcap_dowel", "sensor_bracket_interference", "valve_body_guide_pin", "motor_flange_studs"]


def _overlap(a, b, pad=0.0) -> bool:
    return a[0] < b[1] + pad and b[0] < a[1] + pad and a[2] < b[3] + pad and b[2] < a[3] + pad


# ---------------------------------------------------------------- the pure placement

@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.floats(150, 650), st.floats(150, 450)), min_size=1, max_size=7),
       st.lists(st.tuples(st.floats(30, 160), st.floats(10, 20)), min_size=7, max_size=7),
       st.lists(st.tuples(st.floats(0, 780), st.floats(0, 580)), max_size=4))
def test_placed_boxes_never_overlap_each_other_obstacles_or_anchors(anchors, sizes, dots):
    # room enough: 800 x 600 pixels for at most 7 labels of at most 160 x 20 and 4 dots
    obstacles = [(x, x + 12, y, y + 12) for x, y in dots]
    area = (0.0, 800.0, 0.0, 600.0)
    boxes = place(anchors, sizes[:len(anchors)], obstacles, area)
    for i, b in enumerate(boxes):
        w, h = sizes[i]
        assert b[1] - b[0] == pytest.approx(w) and b[3] - b[2] == pytest.approx(h)  # the text's own size
        assert area[0] <= b[0] and b[1] <= area[1] and area[2] <= b[2] and b[3] <= area[3]
        for o in obstacles:
            assert not _overlap(b, o)
        for k, other in enumerate(boxes[:i]):
            assert not _overlap(b, other), (i, k)
        for k, (x, y) in enumerate(anchors):
            if k != i:
                assert not _overlap(b, (x, x, y, y)), (i, k)


def test_a_label_with_room_stays_beside_its_anchor_on_its_side():
    (b,) = place([(100, 100)], [(50, 12)], [], (0, 400, 0, 300))
    assert b == (100 + PAD, 150 + PAD, 94.0, 106.0)  # text to the right of the anchor, centred on it
    (b,) = place([(100, 100)], [(50, 12)], [], (0, 400, 0, 300), justify=["right"])
    assert b[1] == 100 - PAD  # text to the left
    assert leader((100, 100), b) is None  # beside its anchor: no leader line


def test_a_crowded_label_moves_and_gets_a_leader():
    # a wall of boxes right of and round the anchor leaves room only farther away
    wall = [(90, 300, 80, 120)]
    (b,) = place([(100, 100)], [(50, 12)], wall, (0, 400, 0, 300))
    assert not _overlap(b, wall[0])
    seg = leader((100, 100), b)
    assert seg is not None and seg[0] == (100.0, 100.0)
    x, y = seg[1]
    assert b[0] <= x <= b[1] and b[2] <= y <= b[3]  # the leader ends on the box


# ---------------------------------------------------------------- on the rendered pictures

def _plotter(sc3, view, size):
    import pyvista as pv

    from viewer.scene3d import add_to_plotter, apply_view, view_scene

    shown = view_scene(sc3, view)
    pl = pv.Plotter(off_screen=True, window_size=size)
    add_to_plotter(pl, shown)
    apply_view(pl, shown, view, frame=True)
    pl.screenshot(None, return_img=True)  # renders (pyvista's render() waits for a first show)
    return pl, shown


@pytest.mark.parametrize("name", MATE_SCENES)
@pytest.mark.parametrize("size", [(1280, 800), (800, 560)])
def test_labels_clear_of_each_other_markers_and_overlays(name, size):
    from viewer.scene3d import build_mate_scene
    from viewer.scene3d.plotter import callouts, overlay_boxes

    res = analyse_scene(load(SCENES / f"{name}.toml"))
    pl, _shown = _plotter(build_mate_scene(res, 0), "iso", size)
    try:
        c = callouts(pl)
        boxes = [b for b, t in zip(c.boxes, c.texts) if b is not None and t.GetVisibility()]
        assert boxes, "the scene has labels"
        ren = pl.renderer
        marks = []
        for a in c.markers:
            if a.GetVisibility():
                d = a.GetMapper().GetInput()
                r = 0.5 * a.GetProperty().GetPointSize()
                for x, y in project_points(ren, np.array([d.GetPoint(k) for k in range(d.GetNumberOfPoints())])):
                    marks.append((x - r, x + r, y - r, y + r))
        assert marks, "the tightest spot and the axis ends are markers"
        over = overlay_boxes(pl)
        for i, b in enumerate(boxes):
            assert 0 <= b[0] and b[1] <= size[0] and 0 <= b[2] and b[3] <= size[1]
            for other in boxes[:i]:
                assert not _overlap(b, other)
            for m in marks:
                assert not _overlap(b, m)
            for o in over:
                assert not _overlap(b, o)
        # the overlays themselves: title, readouts, caption rows, verdict, the legend block and the
        # colour bar never overlap one another
        texts = [b for _k, b in pl._matezone_overlays[1]]
        for i, b in enumerate(texts):
            for o in texts[:i]:
                assert not _overlap(b, o, pad=-1.0), (b, o)
    finally:
        pl.close()


def test_leaders_are_drawn_from_anchor_to_label():
    from viewer.scene3d import build_mate_scene
    from viewer.scene3d.plotter import callouts

    res = analyse_scene(load(SCENES / "gearbox_endcap_dowel.toml"))
    pl, _ = _plotter(build_mate_scene(res, 0), "iso", (800, 560))
    try:
        c = callouts(pl)
        lines = c.leaders.GetMapper().GetInput()
        anchors = project_points(pl.renderer, c.anchors)
        want = sum(1 for i, b in enumerate(c.boxes) if b is not None and leader(anchors[i], b) is not None)
        assert lines.GetNumberOfLines() == want
    finally:
        pl.close()


# ---------------------------------------------------------------- the close-up of the tightest spot

@pytest.mark.parametrize("name", ["gearbox_endcap_dowel", "sensor_bracket_interference"])
def test_close_up_aims_at_the_tightest_spot_and_shows_its_gap(name):
    from viewer.scene3d import CLOSE_UP, build_mate_scene, build_feature_scene
    from viewer.scene3d.plotter import callouts

    res = analyse_scene(load(SCENES / f"{name}.toml"))
    sc3 = build_mate_scene(res, 0)
    assert CLOSE_UP in sc3.cameras and CLOSE_UP in sc3.parallel_scale
    spot = next(lb.point for lb in sc3.labels if lb.layer == "clearance")
    # the picture's half height holds three drawn gaps: k x |clearance| each (exaggerated radially)
    assert sc3.parallel_scale[CLOSE_UP] >= 3 * sc3.exaggeration * abs(sc3.tightest) - 1e-12
    assert sc3.parallel_scale[CLOSE_UP] < sc3.parallel_scale["section"]  # closer than the section
    size = (900, 640)
    pl, _ = _plotter(sc3, CLOSE_UP, size)
    try:
        x, y = project_points(pl.renderer, np.array([spot]))[0]
        assert 0 < x < size[0] and 0 < y < size[1]  # the spot is in the picture
        c = callouts(pl)
        i = next(k for k, lb in enumerate(c.labels) if lb.layer == "clearance")
        assert c.texts[i].GetVisibility()  # its label drawn
        # labels whose anchors fall outside the close-up are not drawn
        anchors = project_points(pl.renderer, c.anchors)
        for k, (ax, ay) in enumerate(anchors):
            if not (0 <= ax <= size[0] and 0 <= ay <= size[1]):
                assert not c.texts[k].GetVisibility()
    finally:
        pl.close()
    feat = build_feature_scene(res, res.scene.features[0].id)
    assert CLOSE_UP not in feat.cameras  # a lone feature has no fit: no tightest spot


# ---------------------------------------------------------------- the 3D scale bars

@pytest.mark.parametrize("name", ["gearbox_endcap_dowel", "valve_body_guide_pin"])
def test_scale_bars_are_drawn_at_the_picture_scale_with_their_true_lengths(name):
    from viewer.exaggeration import bar_length
    from viewer.scene3d import build_mate_scene

    res = analyse_scene(load(SCENES / f"{name}.toml"))
    sc3 = build_mate_scene(res, 0)
    u = res.scene.units
    across = sc3.find("scale", "scale bar across").mesh.points
    along = sc3.find("scale", "scale bar along the axis").mesh.points
    # the bar across: its first segment is the bar; drawn k times its true length
    # (independent: the bar's own two end points, measured here)
    bar = np.linalg.norm(across[1] - across[0])
    true = bar / sc3.exaggeration
    assert true == pytest.approx(bar_length(sc3.exaggeration, bar + 1e-12))  # a 1-2-5 length
    texts = {lb.text for lb in sc3.labels if lb.layer == "scale"}
    assert f"{u.fmt(true)} {u.value} true\n(drawn x{sc3.exaggeration:g})" in texts
    # along the axis lengths are true: the bar's drawn length is its labelled length
    length = np.linalg.norm(along[1] - along[0])
    assert f"{u.fmt(length)} {u.value} true" in texts
    assert along[1][2] > along[0][2] and np.allclose(along[1][:2], along[0][:2])  # it stands along z
