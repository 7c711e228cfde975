"""Pictures that make the point (issue 12): the report's 3D picture legible at print size, bonus
charts running MMC to LMC like the what-if slider, the measured part marked on the 2D views,
the median line's portions outside its zone marked, no fastener gap on a hole no fastener is
paired with, and the page's scale words the same as the pictures'."""

from pathlib import Path

import numpy as np
import pytest

import geom
from geom import analyse_scene, load
from viewer import figures as F
from viewer import scene3d
from viewer import style as S
from viewer.exaggeration import scale_text, subject_exaggeration
from viewer.report import fit as RF
from viewer.report import writer as W
from viewer.report.page import crop_to_content
from viewer.report.readings import scene_inspections
from viewer.scene3d.measured import OUTSIDE, outside_runs

ROOT = Path(__file__).resolve().parent.parent
SCENES = ROOT / "scenes"


@pytest.fixture(scope="module")
def bracket():
    return analyse_scene(load(SCENES / "sensor_bracket_interference.toml"))


@pytest.fixture(scope="module")
def cap():
    res = analyse_scene(load(SCENES / "cap_bore_inspection.toml"))
    (insp,) = scene_inspections(res.scene).values()
    return res, insp


# ------------------------------------------------------------------ 1. the page's 3D picture


@pytest.mark.parametrize("scene", ["sensor_bracket_interference.toml", "motor_flange_studs.toml"])
def test_page_picture_labels_print_at_6_pt_and_250_dpi(scene):
    """Print size, computed from the render, the crop and the slot (typographic point = 1/72 in,
    common practice, no source): a label of font height h px in a crop of H px printed H_in
    inches high prints at h * 72 * H_in / H points; the picture's resolution is H / H_in."""
    res = analyse_scene(load(SCENES / scene))
    item = RF.report_items(res)[0]
    st = RF.item_states(res, item, None)
    s3 = (scene3d.build_mate_scene(res, item.index, states=st) if item.index is not None
          else scene3d.build_feature_scene(res, item.feature_id, state=st[item.feature_id]))
    slot = RF.image_slot_3d(res, item, st)
    seen = []
    fit = W.label_fit(slot)

    def spy(img, px):
        out = fit(img, px)
        seen.append((img, px, out))
        return out

    pics = scene3d.render_variants(s3, "iso", {"page": (None, W._page_layers(), spy)}, size=W.RENDER_SIZE)
    img, px, last = seen[-1]
    assert last == 1.0 and np.array_equal(img, pics["page"])  # the picture returned is the one judged
    crop = crop_to_content(pics["page"])
    # the slot as the page draws it: width of half the content, height less the heading and note
    assert slot[0] == pytest.approx((RF.CONTENT_W - 0.15) / 2)
    h, w = crop.shape[:2]
    printed_in = min(slot[1], slot[0] * h / w)  # imshow, aspect kept, in the slot's box
    label_pt = px * 72.0 * printed_in / h
    dpi = h / printed_in
    assert label_pt >= W.LABEL_MIN_PT >= 6.0
    assert dpi >= 250
    # unscaled, the same labels would print too small (the reason for the scale)
    base = scene3d.plotter.label_font_px(_Sized(W.RENDER_SIZE), min(lb.size for lb in s3.labels))
    assert base * 72.0 * printed_in / h < 6.0 < label_pt


class _Sized:
    """A stand-in with a plotter's window size (label_font_px reads only that)."""

    def __init__(self, size):
        self.window_size = size


# ------------------------------------------------------------------ 2. bonus chart direction


@pytest.mark.parametrize("fid", ["bracket-hole", "locating-pin"])
def test_bonus_chart_runs_mmc_left_to_lmc_right(bracket, fid):
    """The what-if slider runs MMC -> LMC left to right; so does every bonus chart (the hole's
    MMC is its smallest size, the pin's its largest: sensor_bracket_interference.toml)."""
    fig, data = F.bonus_chart(bracket, 0)
    f = bracket.scene.feature(fid)
    j = [p.feature_id for p in data.panels].index(fid)
    ax_b = fig.axes[2 * j + 1]
    left, right = ax_b.get_xlim()
    assert abs(left - f.mmc) < abs(left - f.lmc) and abs(right - f.lmc) < abs(right - f.mmc)
    # the tick named MMC is drawn left of the one named LMC (display coordinates)
    ticks = {t.get_text().split("\n")[-1]: ax_b.transData.transform((t.get_position()[0], 0))[0]
             for t in ax_b.get_xticklabels()}
    assert ticks["MMC"] < ticks["LMC"]
    # the top panel shares the axis
    assert fig.axes[2 * j].get_xlim() == (left, right)


# ------------------------------------------------------------------ 3. the measured part


def test_bonus_chart_and_through_view_mark_the_measured_part(cap):
    res, insp = cap
    u = res.scene.units
    # cap_bore_inspection: unrelated AME 8.003 (bonus basis: unrelated envelope); ASME Y14.5 bonus
    # at MMC (from memory): allowed = t + (AME - MMC) = 0.015 + 0.003...
    f = insp.feature
    allowed = f.tolerance.value + (insp.unrelated_ame - f.mmc)
    assert insp.tolerance_allowed == pytest.approx(allowed, abs=1e-12)
    want = f"measured: AME {u.fmt(insp.unrelated_ame)}, tolerance allowed {u.fmt(allowed)}"
    assert want == "measured: AME 8.003, tolerance allowed 0.018"
    fig, _ = F.bonus_chart(res, f.id, measured=insp)
    mk = [a for ax in fig.axes for a in ax.lines if a.get_gid() == f"{f.id}-measured"]
    assert len(mk) == 1
    assert mk[0].get_xdata()[0] == pytest.approx(insp.unrelated_ame)
    assert mk[0].get_ydata()[0] == pytest.approx(allowed)
    texts = [t.get_text() for ax in fig.axes for t in ax.texts]
    assert want in texts
    fig, data = F.through_view(res, f.id, measured=insp)
    assert data.states[f.id].size == pytest.approx(insp.unrelated_ame)
    foot = next(t for t in fig.texts if t.get_gid() == "footer").get_text()
    assert foot.startswith(want)
    # without it: the what-if state, no mark
    fig0, data0 = F.through_view(res, f.id)
    assert data0.states[f.id].size == f.mmc
    assert "measured" not in next(t for t in fig0.texts if t.get_gid() == "footer").get_text()


# ------------------------------------------------------------------ 6. median line outside


def test_outside_runs_against_an_independent_crossing():
    """A straight line leaning from the zone axis: it crosses the cylinder of radius t/2 where
    its distance t/2 is reached, by similar triangles (independent computation)."""
    axis = np.array([[1.0, 2.0, 0.0], [1.0, 2.0, 10.0]])
    line = np.array([[1.0, 2.0, 0.0], [1.0 + 0.012, 2.0 + 0.016, 10.0]])  # leans 0.02 over 10
    runs = outside_runs(line, axis, 0.03)
    (r,) = runs
    assert r[0, 2] == pytest.approx(10.0 * 0.015 / 0.02, abs=1e-9)  # z = 7.5
    assert r[-1, 2] == pytest.approx(10.0)
    assert outside_runs(line, axis, 0.05) == []


def test_cap_bore_median_line_marked_outside_its_zone(cap):
    res, insp = cap
    # cap_bore_inspection: the median line needs 0.021 > 0.018 allowed, so no zone of 0.018
    # holds it all, and part of it is drawn as leaving
    assert insp.median_axis.deviation > insp.tolerance_allowed
    s3 = scene3d.build_inspection_scene(res, insp)
    outs = [it for it in s3.layers["median_line"] if it.name == OUTSIDE]
    assert outs
    assert all(it.style["color"] == S.ROLE_COLOUR["fail"] for it in outs)  # the nonconformance colour
    main = s3.find("median_line", "median line")
    assert main.style["line_width"] < min(it.style["line_width"] for it in outs)
    assert any(lbl == OUTSIDE for lbl, _ in s3.legend)


def test_median_line_inside_its_zone_marks_nothing(cap):
    res, insp = cap
    from dataclasses import replace

    wide = replace(insp, tolerance_allowed=0.2)  # a zone far wider than the 0.021 the line needs
    s3 = scene3d.build_inspection_scene(res, wide)
    assert not [it for it in s3.layers["median_line"] if it.name == OUTSIDE]


# ------------------------------------------------------------------ 7. fastener pairing

_LONE = """title = "lone stud hole"
units = "mm"
standard = "iso"
[[feature]]
id = "stud"
kind = "hole"
limits = [5.350, 5.500]
length = 10.0
at = [0.0, 0.0]
[feature.tolerance]
characteristic = "position"
value = 0.2
material = "MMC"
datums = ["A", "B", "C"]
projected = {P}
[[fastener]]
id = "studs"
kind = "fixed"
fastener = 6.0
hole = 6.6
thread_depth = 10.0
projection = 8.0
"""


def test_fastener_gap_only_where_the_table_pairs_them():
    """A fixed pattern with projection P = 8 pairs with a zone projected by 8, not by 12."""
    paired = geom.analyse_scene(geom.loads(_LONE.format(P=8.0)))
    s3 = scene3d.build_feature_scene(paired, "stud")
    assert any(it.name == "fastener" or "fastener" in it.name for it in s3.layers["projected"])
    assert s3.clearance is not None and "fastener" in s3.verdict
    lone = geom.analyse_scene(geom.loads(_LONE.format(P=12.0)))
    s3 = scene3d.build_feature_scene(lone, "stud")
    names = [it.name for it in s3.layers["projected"]]
    assert not any("fastener" in n or "mating" in n for n in names)
    assert s3.clearance is None and "fastener" not in s3.verdict
    assert not any("fastener" in lb.text or "gap" in lb.text for lb in s3.labels)


# ------------------------------------------------------------------ 8. one scale wording


def test_fit_page_says_the_pictures_scale(bracket):
    item = RF.report_items(bracket)[0]
    hole = bracket.scene.feature(bracket.scene.mates[0].hole)
    k = subject_exaggeration(bracket, mate_index=0)
    words = scale_text(k, hole.mmc / 2, bracket.scene.units)
    assert RF.item_scale_text(bracket, item) == words
    s3 = scene3d.build_mate_scene(bracket, 0)
    assert s3.scale_text == words
    fig = RF.build_page(bracket, item, RF.item_states(bracket, item, None), None, 1, 1)
    assert any(words in t.get_text() for t in fig.texts)
    assert not any("radial deviations exaggerated" in t.get_text() for t in fig.texts)


# ------------------------------------------------------------------ 4. the model in the free area


def _demo_scenes():
    out = []
    for name in ("sensor_bracket_interference", "gearbox_endcap_dowel", "motor_flange_studs",
                 "valve_body_guide_pin", "cap_bore_inspection"):
        res = analyse_scene(load(SCENES / f"{name}.toml"))
        out += [(name, scene3d.build_mate_scene(res, i)) for i in range(len(res.scene.mates))]
        for insp in scene_inspections(res.scene).values():
            out.append((name + " inspection", scene3d.build_inspection_scene(res, insp)))
    return out


@pytest.mark.parametrize("size", [(1600, 1200), (1024, 700)])
def test_iso_camera_frames_the_model_clear_of_every_overlay(size):
    """World-to-display (VTK) of the model's box at the framed iso camera: inside the window,
    clear of every text actor's box and of the colour bar (each measured from the actors
    themselves), and at least half the free area's width or height."""
    import pyvista as pv

    from viewer.scene3d import plotter as P
    from viewer.scene3d.section import view_scene

    for name, s3 in _demo_scenes():
        sc = view_scene(s3, "iso")
        pl = pv.Plotter(off_screen=True, window_size=size)
        try:
            actors = P.add_to_plotter(pl, sc)
            P.apply_view(pl, sc, "iso", frame=True)
            d = P.project(pl, P._model_corners(sc))
            x0, x1, y0, y1 = d[:, 0].min(), d[:, 0].max(), d[:, 1].min(), d[:, 1].max()
            w, h = size
            assert 0 <= x0 and x1 <= w and 0 <= y0 and y1 <= h, name
            boxes = []
            for a in actors["readouts"] + actors["legend"]:
                if a.IsA("vtkTextActor") and a.GetInput():
                    bb = [0.0] * 4
                    a.GetBoundingBox(pl.renderer, bb)  # pixels about the actor's anchor
                    ax_, ay_ = a.GetPosition()
                    boxes.append([bb[0] + ax_, bb[1] + ax_, bb[2] + ay_, bb[3] + ay_])
                elif a.IsA("vtkScalarBarActor"):
                    px, py = a.GetPositionCoordinate().GetValue()[:2]
                    pw, ph = a.GetPosition2Coordinate().GetValue()[:2]
                    boxes.append([px * w, (px + pw) * w, py * h, (py + ph) * h])
            assert boxes, name
            for bx in boxes:
                clear = bx[1] <= x0 or bx[0] >= x1 or bx[3] <= y0 or bx[2] >= y1
                assert clear, (name, bx, (x0, x1, y0, y1))
            fx0, fx1, fy0, fy1 = P.free_area(pl)
            assert (x1 - x0) >= 0.5 * (fx1 - fx0) or (y1 - y0) >= 0.5 * (fy1 - fy0), name
        finally:
            pl.close()
