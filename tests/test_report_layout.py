"""Report pages a quality engineer attaches to a nonconformance report: the inspection page's 3D
pictures print their labels at 6 pt or more in the slot they occupy (the fit page's mechanism,
``viewer.report.writer.page_variant``), and on the pages (and in the saved 2D figures) the
callouts stay inside their panel, the legends sit outside the drawing, nothing runs off the
figure."""

from pathlib import Path

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.legend import Legend

from geom import analyse_scene, load
from viewer import figures as F
from viewer import scene3d
from viewer.report import fit as RF
from viewer.report import writer as W
from viewer.report.inspection import build_inspection_page
from viewer.report.page import PAGE, crop_to_content
from viewer.report.readings import scene_inspections

ROOT = Path(__file__).resolve().parent.parent
SCENES = ROOT / "scenes"
DEMOS = ("gearbox_endcap_dowel.toml", "cap_bore_inspection.toml", "motor_flange_studs.toml")
TOL_PX = 0.5  # rounding of extents in display pixels (common practice, no source)


# ------------------------------------------------------------------ 1. the inspection page's 3D pictures


@pytest.fixture(scope="module")
def inspection_pictures(tmp_path_factory):
    """The cap scene's inspection pictures as ``write_report`` renders them, each call of the
    page variant's ``fit`` recorded: (res, insp, scene, names, pictures, calls per camera)."""
    res = analyse_scene(load(SCENES / "cap_bore_inspection.toml"))
    (fid, insp), = scene_inspections(res.scene).items()
    s3 = scene3d.build_inspection_scene(res, insp)
    out = tmp_path_factory.mktemp("insp")
    cams = W._inspection_views("iso")
    pngs = [out / f"inspection_{fid}_3d_{v}.png" for v in cams]
    calls = []
    real = scene3d.render_variants

    def spying(sc, view, variants, **kw):
        if "page" not in variants:
            return real(sc, view, variants, **kw)
        path, vis, fit = variants["page"]
        seen = []
        calls.append(seen)

        def spy(img, px):
            r = fit(img, px)
            seen.append((img, px, r))
            return r

        return real(sc, view, {**variants, "page": (path, vis, spy)}, **kw)

    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(scene3d, "render_variants", spying)
        pics = W.inspection_variants(res, insp, s3, "iso", pngs)
    return res, insp, s3, tuple(q.name for q in pngs), pics, calls


def test_inspection_page_3d_labels_print_at_6_pt(inspection_pictures):
    """Measured as the fit page's test does (tests/test_pictures_point.py; typographic point =
    1/72 in, common practice, no source): a label of font height h px in a crop of H px printed
    H_in inches high prints at h * 72 * H_in / H points. The slot is read back from the page
    itself (the picture's axes on the built inspection page)."""
    res, insp, s3, names, pics, calls = inspection_pictures
    images = [(W.INSPECTION_VIEW_NAMES.get(v, v), p["page"]) for v, p in zip(W._inspection_views("iso"), pics)]
    fig = build_inspection_page(res, insp, images, 1, 1, s3.caption, s3.legend, names)
    FigureCanvasAgg(fig).draw()
    pic_axes = [ax for ax in fig.axes if ax.images]
    assert len(pic_axes) == len(pics) == 2  # the report's camera and the section (writer._inspection_views)
    for ax, pic, seen in zip(pic_axes, pics, calls):
        pos = ax.get_position(original=True)
        slot = (pos.width * PAGE[0], pos.height * PAGE[1])  # inches the page gives the picture
        assert seen, "the inspection page's picture must be fitted (labels drawn for its slot)"
        img, px, last = seen[-1]
        assert last == 1.0 and np.array_equal(img, pic["page"])  # the picture returned is the one judged
        crop = crop_to_content(img, aspect=slot[0] / slot[1])  # as the page crops it
        h, w = crop.shape[:2]
        printed_in = min(slot[1], slot[0] * h / w)  # imshow, aspect kept, in the slot's box
        # the same height read from the drawn page (the image's extent on the canvas)
        drawn_in = ax.get_window_extent().height / fig.dpi
        assert drawn_in == pytest.approx(printed_in, rel=0.01)
        label_pt = px * 72.0 * printed_in / h
        assert label_pt >= W.LABEL_MIN_PT >= 6.0
        # unscaled, the labels would print smaller: the fit did scale them
        base = scene3d.plotter.label_font_px(_Sized(img.shape[1::-1]), min(lb.size for lb in s3.labels))
        assert seen[0][1] == pytest.approx(base) and base < px


class _Sized:
    """A stand-in with a plotter's window size (label_font_px reads only that)."""

    def __init__(self, size):
        self.window_size = size


# ------------------------------------------------------------------ 2. callouts, legends, edges


@pytest.fixture(scope="module")
def figures():
    """Every 2D figure of the demo scenes' reports, once: (tag, figure, page?) for each fit page
    (its 2D views drawn in their slots, the 3D picture left out) and for each saved 2D view."""
    out = []
    for name in DEMOS:
        res = analyse_scene(load(SCENES / name))
        for item in RF.report_items(res):
            st = RF.item_states(res, item, None)
            out.append((f"{name} {item.label} page", RF.build_page(res, item, st, None, 1, 1), True))
            for view in RF.VIEW_FILES:
                out.append((f"{name} {item.label} {view}", F.draw_view(view, res, item.ref, st)[0], False))
    for _, fig, _ in out:
        FigureCanvasAgg(fig).draw()
    return out


def _drawing_axes(fig):
    """The axes of the 2D drawings and charts (not the page's picture or colour bar axes)."""
    return [ax for ax in fig.axes if not ax.images and ax.get_label() != "<colorbar>" and ax.get_visible()]


def _inside(inner, outer, tol=TOL_PX):
    return (inner.x0 >= outer.x0 - tol and inner.x1 <= outer.x1 + tol
            and inner.y0 >= outer.y0 - tol and inner.y1 <= outer.y1 + tol)


def test_demo_reports_have_every_figure_kind(figures):
    kinds = {tag.rsplit(" ", 1)[1] for tag, _, _ in figures}
    assert kinds == {"page", *RF.VIEW_FILES}  # the report's 2D views (viewer.report.fit.VIEW_FILES)
    assert sum(page for *_, page in figures) == 4  # 1 + 1 + 2 pages: the three demo scenes' items


def test_callouts_stay_inside_their_panel(figures):
    """Every text annotation of a drawing or chart lies inside its axes (the footer note is a
    caption under the drawing, checked against the figure below)."""
    bad = []
    for tag, fig, _ in figures:
        r = fig.canvas.get_renderer()
        for ax in _drawing_axes(fig):
            box = ax.get_window_extent(r)
            for t in ax.texts:
                if not t.get_visible() or not t.get_text() or t.get_gid() == "footer":
                    continue
                if not _inside(t.get_window_extent(r), box):
                    bad.append((tag, t.get_gid(), t.get_text()[:40]))
    assert not bad, bad


def test_legends_lie_outside_the_drawing(figures):
    """A legend does not overlap the axes' area where the geometry is drawn, and every drawing
    that has one (through-view, section) shows it."""
    with_legend = 0
    for tag, fig, _ in figures:
        r = fig.canvas.get_renderer()
        for ax in _drawing_axes(fig):
            for leg in [c for c in ax.get_children() if isinstance(c, Legend)]:
                with_legend += 1
                lb, box = leg.get_window_extent(r), ax.get_window_extent(r)
                # overlap of the two boxes, in pixels (touching edges is no overlap)
                ox = min(lb.x1, box.x1) - max(lb.x0, box.x0)
                oy = min(lb.y1, box.y1) - max(lb.y0, box.y0)
                assert ox <= TOL_PX or oy <= TOL_PX, (tag, ax.get_title(), lb.extents, box.extents)
    # through and section, on each of the 4 pages and as each of the 4 items' saved figures
    assert with_legend == 2 * 4 * 2


def test_nothing_lies_outside_the_saved_figure(figures):
    """Texts (callouts, titles, footers, tick labels) and legends lie inside the figure, the
    page's drawings inside the page: nothing is clipped when saved (save_figure saves the whole
    figure)."""
    bad = []
    for tag, fig, _ in figures:
        r = fig.canvas.get_renderer()
        fb = fig.bbox
        for ax in _drawing_axes(fig):
            arts = [t for t in ax.texts if t.get_visible() and t.get_text()]
            arts += [ax.title, ax._left_title, ax.xaxis.label, ax.yaxis.label]
            arts += [t for t in ax.get_xticklabels() + ax.get_yticklabels() if t.get_visible() and t.get_text()]
            arts += [c for c in ax.get_children() if isinstance(c, Legend)]
            for a in arts:
                if hasattr(a, "get_text") and not a.get_text():
                    continue
                if not _inside(a.get_window_extent(r), fb):
                    bad.append((tag, type(a).__name__, getattr(a, "get_text", lambda: "")()[:40]))
        for t in fig.texts:
            if t.get_visible() and t.get_text() and not _inside(t.get_window_extent(r), fb):
                bad.append((tag, "figure text", t.get_text()[:40]))
    assert not bad, bad
