"""Writing a report folder (:func:`write_report`, called by ``matezone report`` and the window
through :func:`viewer.reportdir.write_report_atomic`): per item the 3D picture and the 2D views
as PNG, SVG and PDF, per inspected feature its 3D pictures, per fastener its schematic, then
``report.pdf`` (inspection pages, fit pages, fastener pages) and ``results.json``. Also the
off-screen renders the pages show (:func:`page_image_3d`, :func:`inspection_images`).

>>> VECTOR_FORMATS
('svg', 'pdf')
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Callable

import numpy as np
from matplotlib.backends.backend_pdf import PdfPages

from geom.analysis import SceneResult
from geom.jsonout import result_to_json
from geom.readout import CAUTION
from geom.textfile import file_slug
from viewer import figures as F
from viewer.figures.pattern import pattern_figure

from .fastener import FASTENERS_PER_PAGE, build_fastener_page, fastener_figure
from .fit import VIEW_FILES, build_page, image_slot_3d, item_states, printed_height, report_items
from .inspection import build_inspection_page, inspection_image_slot
from .page import PAGE_3D_ASPECT, crop_to_content
from .pattern import build_pattern_page
from .readings import scene_inspections
from .yieldpage import build_yield_page

VECTOR_FORMATS = ("svg", "pdf")
RENDER_SIZE = (1600, 1200)  # pixels of every 3D picture
INSPECTION_VIEW_NAMES = {"iso": "3D view", "top": "view from above, along the axis",
                         "section": "section in the plane of the tilt"}

Progress = Callable[[str], None]


# ------------------------------------------------------------------------------------ 3D images


def _page_layers() -> set[str]:
    """Layers drawn on the page's 3D picture: all but the text overlays (the page prints them)."""
    from viewer import scene3d

    return set(scene3d.LAYERS) - set(scene3d.HIDDEN_BY_DEFAULT) - {"readouts", "legend"}


def _bare_render(scene3d_obj, view: str) -> np.ndarray:
    from viewer import scene3d

    return scene3d.render_image(scene3d_obj, None, view=view, size=RENDER_SIZE, visible=_page_layers())


def page_image_3d(scene3d_obj, view: str) -> np.ndarray:
    """The 3D picture for the page: the model and its 3D labels without the text overlays (the
    page prints those numbers in its table), cropped to the model so it reads at page size."""
    return crop_to_content(_bare_render(scene3d_obj, view))


LABEL_MIN_PT = 6.0  # the least printed size of a 3D label on a page
_LABEL_AIM_PT = 6.4  # what the page picture's labels are drawn for (crops move a little)
_CROP_PAD = 0.04  # crop_to_content's default pad


def label_fit(slot: tuple[float, float], aim_pt: float = _LABEL_AIM_PT, aspect: float = PAGE_3D_ASPECT):
    """The ``fit`` of :func:`viewer.scene3d.render_variants` for a page picture printed in
    ``slot`` (width, height in inches) after :func:`crop_to_content` to ``aspect`` (the page's
    crop): the label scale at which the smallest label prints at ``aim_pt`` points (never
    smaller than drawn)."""

    def fit(img: np.ndarray, label_px: float) -> float:
        crop = crop_to_content(img, aspect=aspect)
        fit.last = (img, crop)  # the crop of the picture judged last, for the page to reuse
        if fit.base is None:  # render_variants asks first at label scale 1
            fit.base, fit.crop_h = label_px, crop.shape[0]
        pt = label_px * printed_height(crop.shape, slot) * 72.0 / crop.shape[0]
        # larger labels reach further, so the crop (and the picture's reduction) grows: as much
        # again as it grew since the last picture is allowed for, never past the crop of the
        # whole picture (labels stay in the window)
        h, w = img.shape[:2]
        whole = max(h * (1 + 2 * _CROP_PAD), w * (1 + 2 * _CROP_PAD) / aspect)
        grew = max(1.0, min(crop.shape[0] / fit.crop_h, whole / crop.shape[0]))
        fit.crop_h = crop.shape[0]
        if pt >= aim_pt or (label_px > fit.base and pt >= LABEL_MIN_PT):  # enlarged: the least will do
            return 1.0
        # the scale asked for is absolute: the labels are now drawn at label_px / base
        return aim_pt / pt * 1.04 * grew * label_px / fit.base

    fit.last = (None, None)
    fit.base = fit.crop_h = None
    return fit


def _page_crop(variant: tuple, img: np.ndarray) -> np.ndarray:
    """The page picture cropped (:func:`crop_to_content`), reusing the crop its fit made."""
    last = getattr(variant[2], "last", (None, None))
    return last[1] if last[0] is img else crop_to_content(img)


def page_variant(slot: tuple[float, float], aspect: float = PAGE_3D_ASPECT) -> tuple:
    """The ``render_variants`` entry of a page picture printed in ``slot`` after a crop to
    ``aspect``: no text overlays, labels drawn to print at :data:`LABEL_MIN_PT` or more."""
    return (None, _page_layers(), label_fit(slot, aspect=aspect))


def inspection_variants(res: SceneResult, insp, s3, view: str, pngs) -> list[dict]:
    """Per camera of an inspection (:func:`_inspection_views`) the full picture (written to its
    PNG in ``pngs``) and the page's, its labels drawn to print at :data:`LABEL_MIN_PT` or more in
    the slot the inspection page gives each picture (:func:`inspection_image_slot`, cropped to
    the slot's shape as the page crops it). A slot wider than :data:`RENDER_SIZE` has its page
    picture rendered as wide (same height), so labels grown for print stay in the picture."""
    from viewer import scene3d

    cams = _inspection_views(view)
    slot = inspection_image_slot(res, insp, len(cams), s3.caption, s3.legend, tuple(q.name for q in pngs))
    aspect = slot[0] / slot[1]
    wide = (max(RENDER_SIZE[0], round(RENDER_SIZE[1] * aspect)), RENDER_SIZE[1])
    out = []
    for q, v in zip(pngs, cams):
        if wide == RENDER_SIZE:  # one plotter for both
            out.append(scene3d.render_variants(s3, v, {"full": (q, None), "page": page_variant(slot, aspect)},
                                               size=RENDER_SIZE))
            continue
        pic = scene3d.render_variants(s3, v, {"full": (q, None)}, size=RENDER_SIZE)
        pic.update(scene3d.render_variants(s3, v, {"page": page_variant(slot, aspect)}, size=wide))
        out.append(pic)
    return out


def _inspection_views(view: str) -> list[str]:
    """The cameras of an inspection's pictures: the report's, then the section (once)."""
    return list(dict.fromkeys((view, "section")))


def inspection_images(scene3d_obj, view: str) -> list[tuple[str, np.ndarray]]:
    """The inspection page's pictures: the report's camera and the section in the plane of the
    tilt (where the median line's drift shows), without text overlays (the page prints the
    numbers and the colour key); cropped on the page."""
    return [(INSPECTION_VIEW_NAMES.get(v, v), _bare_render(scene3d_obj, v)) for v in _inspection_views(view)]


# ------------------------------------------------------------------------------------ writing


def _yield_runs(res: SceneResult) -> list:
    """One statistical fit (:func:`geom.yieldmc.run_yield`, the scene's samples and seed) per
    mate and pattern interface, when the scene has statistical inputs; else none."""
    if res.scene.statistics is None:
        return []
    from geom.yieldmc import run_yield, targets

    return [run_yield(res.scene, kind, i) for kind, i, _label in targets(res.scene)]


def _sweepable(res: SceneResult, item) -> bool:
    """Whether a page subject has a size to sweep: the mate's hole, or the lone feature."""
    fid = res.scene.mates[item.index].hole if item.index is not None else item.feature_id
    f = res.scene.feature(fid)
    return f.lmc != f.mmc


def write_report(res: SceneResult, out_dir, sizes: dict[str, float] | None = None, view: str = "iso",
                 progress: Progress | None = None, inspections: dict | None = None,
                 animate: tuple[str, ...] = ()) -> list[Path]:
    """Write every file of the report into ``out_dir``; returns the paths written.

    ``sizes``: produced sizes (feature id -> size) for the what-if pictures; the rest stays at the
    worst case. ``view``: camera of the 3D picture (one of viewer.scene3d.VIEWS).
    ``inspections``: feature id -> :class:`geom.inspect.InspectionResult`, one inspection page
    each (first in the PDF); None inspects every feature with ``[feature.measured]`` data.
    Fasteners of the scene get their own page(s) at the end.
    ``animate``: formats (".gif", ".mp4") of a teaching sweep per page subject whose moving
    feature has a size range (:mod:`viewer.animate`: MMC to LMC at one locked scale).
    """
    from viewer import scene3d

    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    items = report_items(res)
    if inspections is None:
        inspections = scene_inspections(res.scene)
    fids = list(res.fasteners)
    fastener_pages = [fids[i:i + FASTENERS_PER_PAGE] for i in range(0, len(fids), FASTENERS_PER_PAGE)]
    sweeps = [(item, fmt) for item in items for fmt in animate if _sweepable(res, item)]
    pids = [pr.pattern.id for pr in res.frames.patterns] if res.frames is not None else []
    # the statistical fit, where the scene gives its inputs ([yield] / [[process]] tables)
    yields = _yield_runs(res)
    steps = (len(items) * (1 + len(VIEW_FILES)) + len(inspections) + len(fids) + 2 + len(sweeps) + len(pids)
             + len(yields))
    n = 0
    written: list[Path] = []

    def say(what: str, paths):
        nonlocal n
        n += 1
        if progress is not None:
            shown = ", ".join(str(q) for q in paths)
            progress(f"[{n}/{steps}] {what} -> {shown}")

    images3d = {}
    page_states = {}
    for item in items:
        states = item_states(res, item, sizes)
        page_states[item.file_key] = states
        # 3D picture, rendered once and reused on the page
        png = out / f"{item.file_key}_3d_{view}.png"
        if item.index is not None:
            s3 = scene3d.build_mate_scene(res, item.index, states=states)
        else:
            s3 = scene3d.build_feature_scene(res, item.feature_id, state=states[item.feature_id])
        slot = image_slot_3d(res, item, states, design_intent=bool(inspections))
        page = page_variant(slot)
        pics = scene3d.render_variants(s3, view, {"full": (png, None), "page": page})
        images3d[item.file_key] = _page_crop(page, pics["page"])
        written.append(png)
        say(f"{item.label}: 3D view", [png])
        for name in VIEW_FILES:
            fig, _ = F.draw_view(name, res, item.ref, states)
            paths = [out / f"{item.file_key}_{name}.{ext}" for ext in ("png", *VECTOR_FORMATS)]
            for q in paths:
                F.save_figure(fig, q)
            written += paths
            say(f"{item.label}: {name} view", paths)
    for item, fmt in sweeps:
        from viewer.animate import sweep_animation

        q = out / f"{item.file_key}_sweep{fmt}"
        sweep_animation(res, item.index if item.index is not None else item.feature_id, q, view=view)
        written.append(q)
        say(f"{item.label}: size sweep MMC to LMC", [q])
    insp_pages = {}
    for fid, insp in inspections.items():
        s3 = scene3d.build_inspection_scene(res, insp)
        key = f"inspection_{file_slug(fid)}"
        cams = _inspection_views(view)
        pngs = [out / f"{key}_3d_{v}.png" for v in cams]
        # per camera the full picture (the PNG) and the page's (no text overlays, labels sized for its slot)
        pics = inspection_variants(res, insp, s3, view, pngs)
        written += pngs
        images = [(INSPECTION_VIEW_NAMES.get(v, v), pic["page"]) for v, pic in zip(cams, pics)]
        insp_pages[fid] = (images, s3.caption, s3.legend, tuple(q.name for q in pngs))
        say(f"inspection {fid}: 3D views", pngs)
    fastener_files = {}
    for fid in fids:
        fig = fastener_figure(res, fid)
        paths = [out / f"fastener_{file_slug(fid)}.{ext}" for ext in ("png", "svg")]
        for q in paths:
            F.save_figure(fig, q)
        written += paths
        fastener_files[fid] = paths[0].name
        say(f"fastener {fid}: schematic", paths)
    pattern_files = {}
    for pid in pids:
        fig = pattern_figure(res, pid)
        paths = [out / f"pattern_{file_slug(pid)}.{ext}" for ext in ("png", *VECTOR_FORMATS)]
        for q in paths:
            F.save_figure(fig, q)
        written += paths
        pattern_files[pid] = paths[0].name
        say(f"pattern {pid}: top view", paths)
    for yr in yields:
        from viewer.figures.yieldplot import yield_figure

        fig = yield_figure(yr, res.scene.units)
        paths = [out / f"yield_{yr.kind}_{yr.index + 1}.{ext}" for ext in ("png", "svg")]
        for q in paths:
            F.save_figure(fig, q)
        written += paths
        say(f"statistical fit of {yr.kind} {yr.index + 1}: histogram", paths)
    pdf = out / "report.pdf"
    rep = dict(res.scene.report)
    pages = len(inspections) + len(items) + len(pids) + len(fastener_pages) + len(yields)
    with F.style_context():
        with PdfPages(pdf, metadata={"Title": f"Fit evidence: {res.scene.title}",
                                     "Subject": rep.get("report_number", ""),
                                     "Creator": "matezone report"}) as pp:
            page = 0
            for fid, insp in inspections.items():
                page += 1
                imgs, caption, legend, names = insp_pages[fid]
                pp.savefig(build_inspection_page(res, insp, imgs, page, pages, caption, legend, names))
            for pid in pids:  # a pattern is the interface's subject: before its members' own pages
                page += 1
                pp.savefig(build_pattern_page(res, pid, page, pages, pattern_files[pid]))
            for item in items:
                page += 1
                fig = build_page(res, item, page_states[item.file_key], images3d[item.file_key], page, pages, view,
                                 design_intent=bool(inspections))
                pp.savefig(fig)
            for group in fastener_pages:
                page += 1
                pp.savefig(build_fastener_page(res, group, page, pages, fastener_files))
            for yr in yields:
                page += 1
                pp.savefig(build_yield_page(res, yr, page, pages))
    written.append(pdf)
    say(f"report ({pages} page{'s' if pages != 1 else ''})", [pdf])
    js = out / "results.json"
    data = result_to_json(res)
    from geom.inspect import inspection_to_json

    data["inspections"] = {fid: inspection_to_json(insp) for fid, insp in inspections.items()}
    if res.scene.statistics is not None:
        from geom.yieldout import yield_to_json

        data["yield"] = [yield_to_json(yr) for yr in yields]
    data["caution"] = CAUTION
    js.write_text(json.dumps(data, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
    written.append(js)
    say("numbers", [js])
    return written
