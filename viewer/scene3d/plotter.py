"""Scenes onto a ``pyvista.Plotter``: :func:`add_to_plotter` (the layout: meshes, labels,
readouts, legend, scalar bar), :func:`apply_view` (the cameras), and the off-screen pictures
:func:`render_image` and :func:`render_variants`. :mod:`.live` puts a later scene into the actors
made here, through the same grouping of labels (:func:`_label_groups`) and the same readout
texts (:func:`_readout_texts`).

Meshes that carry their own normals are shaded smooth without a normals filter, and coloured
meshes are fed to their mapper by array name (:func:`_colour_by_name`): no PyVista filter sits
in an actor's pipeline, because such filters run Python on every render after a change.
"""

from __future__ import annotations

import numpy as np
import pyvista as pv

from .. import style as S
from .section import view_scene
from .values import HIDDEN_BY_DEFAULT, LAYERS, VIEWS, Label, Scene3D


def _visible(scene: Scene3D, visible: set[str] | None) -> set[str]:
    return set(LAYERS) - HIDDEN_BY_DEFAULT if visible is None else set(visible)


def _text_box(text: str, prop) -> tuple[int, int]:
    """(width, height) in pixels of ``text`` drawn with the text property ``prop``."""
    import vtk

    bb = [0, 0, 0, 0]
    vtk.vtkTextRenderer().GetBoundingBox(prop, text, bb, 72)
    return int(bb[1] - bb[0] + 1), int(bb[3] - bb[2] + 1)


def _text_width(text: str, prop) -> int:
    return _text_box(text, prop)[0]


def _font_px(plotter) -> int:
    w, h = plotter.window_size
    return max(7, int(round(min(w, 1.333 * h) / 165)))


def _colour_by_name(actor, mesh: pv.PolyData, name: str) -> None:
    """Feed ``mesh`` straight to the actor's mapper, coloured by its point array ``name``
    (field-data scalar mode), in place of the active-scalars filter PyVista puts in between:
    that filter runs Python on every render after its input changes, i.e. on every what-if
    move. The picture is the same; the mapper's colour map and range are untouched."""
    mapper = actor.GetMapper()
    if name not in mesh.point_data or mapper.GetNumberOfInputConnections(0) == 0:
        return
    up = mapper.GetInputAlgorithm(0, 0)
    if up is None or not up.IsA("vtkPythonAlgorithm"):
        return
    mapper.SetInputDataObject(0, mesh)
    mapper.SetScalarModeToUsePointFieldData()
    mapper.SelectColorArray(name)


def _label_groups(scene: Scene3D, show: set[str]) -> list[tuple[tuple, list[Label]]]:
    """The scene's labels in the groups :func:`add_to_plotter` draws as one point-label actor
    each (same colour, size, frame and justification; key (colour, size, framed, justify)), in
    its order; none if "labels" is not shown."""
    if "labels" not in show:
        return []
    groups: dict[tuple, list[Label]] = {}
    for lb in scene.labels:
        if lb.layer in show or lb.layer == "labels":
            groups.setdefault((lb.colour, lb.size, lb.layer == "datum", lb.justify), []).append(lb)
    return list(groups.items())


def _readout_texts(scene: Scene3D, show: set[str]) -> list[tuple[str, str, str]]:
    """(kind, text, colour) of the screen texts :func:`add_to_plotter` draws for "readouts", in
    its order: title, readouts, caption and its detail line, verdict, verdict lines."""
    if "readouts" not in show:
        return []
    head, _, rest = scene.caption.partition("\n")
    out = [("title", scene.title, S.TEXT), ("readouts", "\n".join(scene.readouts), S.TEXT)]
    out += [(k, t, S.TEXT) for k, t in (("caption", head), ("caption detail", rest)) if t]
    if scene.verdict:
        out.append(("verdict", scene.verdict, scene.verdict_colour))
    out += [("verdict line", t, c) for t, c in scene.verdicts]
    return out


def label_font_px(plotter, size: int, label_scale: float = 1.0) -> int:
    """The font size (pixels, VTK's 72 dpi points) of a 3D label of :class:`Label` ``size`` on
    ``plotter`` at ``label_scale``."""
    fs = _font_px(plotter)
    return max(8, int(round(label_scale * size * (fs + 3) / 14)))


def add_labels(plotter, scene: Scene3D, show: set[str], label_scale: float = 1.0) -> list:
    """The scene's 3D labels as point-label actors (one per :func:`_label_groups` group), their
    font :func:`label_font_px` at ``label_scale``; returns the actors."""
    out = []
    for (colour, size, framed, justify), lbs in _label_groups(scene, show):
        out.append(plotter.add_point_labels(
            np.array([lb.point for lb in lbs]), [lb.text for lb in lbs],
            font_size=label_font_px(plotter, size, label_scale), text_color=colour, font_family=S.FONT_FAMILY,
            bold=True, shape="rect", shape_color=S.BACKGROUND, shape_opacity=1.0 if framed else 0.8,
            show_points=False, always_visible=True, margin=5 if framed else 2, reset_camera=False,
            render=False, justification_horizontal=justify))
    return out


def add_to_plotter(plotter, scene: Scene3D, visible: set[str] | None = None,
                   label_scale: float = 1.0) -> dict[str, list]:
    """Add the scene's layers to ``plotter`` (any ``pyvista.Plotter``, e.g. a pyvistaqt
    ``QtInteractor``); returns layer name -> actors. ``visible=None`` shows every layer but
    those in HIDDEN_BY_DEFAULT ("rc"). Overlays: "readouts" (title, numbers, exaggeration
    caption, verdict), "legend" (legend box, clearance scalar bar). ``label_scale`` scales the
    3D labels' font (a picture printed small needs larger labels)."""
    show = _visible(scene, visible)
    actors: dict[str, list] = {name: [] for name in LAYERS}
    plotter.set_background(S.BACKGROUND)
    mate_actor = None
    for name in LAYERS:
        if name not in show:
            continue
        for it in scene.layers.get(name, ()):
            style = dict(it.style)
            own_normals = bool(style.get("smooth_shading")) and it.mesh.GetPointData().GetNormals() is not None
            if own_normals:  # shaded smooth with the mesh's own normals: no normals filter in
                style["smooth_shading"] = False  # the actor's pipeline, re-run on each new mesh
            a = plotter.add_mesh(it.mesh, reset_camera=False, render=False, **style)
            if own_normals:
                a.prop.interpolation = "phong"
            if isinstance(style.get("scalars"), str):
                _colour_by_name(a, it.mesh, style["scalars"])
            actors[name].append(a)
            if "scalars" in style and mate_actor is None:
                mate_actor = a
    fs = _font_px(plotter)
    actors["labels"] += add_labels(plotter, scene, show, label_scale)
    w, h = plotter.window_size
    top = 0.0
    for kind, txt, colour in _readout_texts(scene, show):
        if kind == "title":
            t = plotter.add_text(txt, position=(int(0.012 * w), h - int(0.012 * h)), font_size=fs + 4,
                                 color=colour, font=S.FONT_FAMILY, render=False)
            t.GetTextProperty().SetVerticalJustificationToTop()
            t.GetTextProperty().BoldOn()
        elif kind == "readouts":
            t = plotter.add_text(txt, position=(int(0.012 * w), h - int(0.012 * h) - 3.2 * fs),
                                 font_size=fs, color=colour, font=S.MONO_FAMILY, render=False)
            t.GetTextProperty().SetVerticalJustificationToTop()
            t.GetTextProperty().SetLineSpacing(1.05)
            top = h - int(0.012 * h) - 3.2 * fs - _text_box(txt, t.GetTextProperty())[1]
            top -= 0.6 * fs
        elif kind in ("caption", "caption detail"):
            i, size, bold = (0, fs + 6, True) if kind == "caption" else (1, fs, False)
            t = plotter.add_text(txt, position=(w - int(0.012 * w), h - int(0.012 * h) - i * 2.2 * (fs + 4)),
                                 font_size=size, color=colour, font=S.FONT_FAMILY, render=False)
            t.GetTextProperty().SetVerticalJustificationToTop()
            t.GetTextProperty().SetJustificationToRight()
            t.GetTextProperty().SetBold(bold)
        elif kind == "verdict":  # under the readouts
            t = plotter.add_text(txt, position=(int(0.012 * w), int(top)), font_size=fs + 3,
                                 color=colour, font=S.FONT_FAMILY, render=False)
            t.GetTextProperty().BoldOn()
            t.GetTextProperty().SetVerticalJustificationToTop()
            top -= _text_box(txt, t.GetTextProperty())[1] + 0.4 * fs
        else:  # a verdict line: one each, in its own colour
            t = plotter.add_text(txt, position=(int(0.012 * w), int(top)), font_size=fs, color=colour,
                                 font=S.MONO_FAMILY, render=False)
            t.GetTextProperty().BoldOn()
            t.GetTextProperty().SetVerticalJustificationToTop()
            top -= 1.15 * _text_box(txt, t.GetTextProperty())[1]
        actors["readouts"].append(t)
    if "legend" in show:
        bar_box = None
        rows = [(lbl, col) for (lbl, col), layer in zip(scene.legend, scene.legend_layers) if layer in show]
        texts = []
        for lbl, col in rows:
            tx = plotter.add_text(lbl, position=(0, 0), font_size=fs, color=S.TEXT, font=S.FONT_FAMILY, render=False)
            tx.GetTextProperty().SetBackgroundColor(*S.rgb(S.BACKGROUND))
            tx.GetTextProperty().SetBackgroundOpacity(0.8)
            texts.append(tx)
        widths = [_text_width(lbl, tx.GetTextProperty()) for (lbl, _), tx in zip(rows, texts)]
        row_px = 1.25 * max((tx.GetTextProperty().GetFontSize() for tx in texts), default=fs)
        x_txt = w - int(0.012 * w) - max(widths, default=0)
        for i, ((lbl, col), tx) in enumerate(zip(reversed(rows), reversed(texts))):
            y = int(0.015 * h + i * row_px)
            tx.SetPosition(x_txt, y)
            sw = plotter.add_text("  ", position=(0, y), font_size=fs, font=S.MONO_FAMILY, render=False)
            tp = sw.GetTextProperty()
            sw.SetPosition(x_txt - _text_width("  ", tp) - int(0.6 * fs), y)
            tp.SetBackgroundColor(*S.rgb(col))
            tp.SetBackgroundOpacity(1.0)
            tp.SetFrame(True)
            tp.SetFrameColor(*S.rgb(S.TEXT))
            actors["legend"] += [sw, tx]
        if mate_actor is not None and scene.scalar_bar is not None:
            bar_box = (0.88 * w, w, 0.44 * h, 0.86 * h)  # the bar, its labels to the right, its title above
            u = scene.units
            bar = scene.scalar_bar
            actors["legend"].append(plotter.add_scalar_bar(
                title=bar["title"], mapper=mate_actor.mapper, n_labels=bar.get("n_labels", 5), color=S.TEXT,
                font_family=S.FONT_FAMILY, vertical=True, position_x=0.90, position_y=0.46, width=0.06,
                height=0.34, fmt=bar.get("fmt", f"%.{u.decimals}f"), title_font_size=fs + 3, label_font_size=fs + 1,
                unconstrained_font_size=True, render=False))
            if bar.get("ticks"):
                from vtkmodules.vtkCommonCore import vtkDoubleArray

                ticks = vtkDoubleArray()
                for t in bar["ticks"]:
                    ticks.InsertNextValue(t)
                sb = actors["legend"][-1]
                sb.SetCustomLabels(ticks)
                sb.SetUseCustomLabels(True)
    boxes = [(layer, _actor_box(t)) for layer in ("readouts", "legend") for t in actors[layer]
             if hasattr(t, "GetTextProperty") and hasattr(t, "GetInput")]
    rows = [b for k, b in boxes if k == "legend" and b is not None]
    if rows:  # the legend is one block: one box round its rows
        boxes = [(k, b) for k, b in boxes if k != "legend"]
        boxes.append(("legend", (min(b[0] for b in rows), max(b[1] for b in rows), min(b[2] for b in rows),
                                 max(b[3] for b in rows))))
    if "legend" in show and bar_box is not None:
        boxes.append(("legend", bar_box))
    plotter._matezone_overlays = (tuple(plotter.window_size), [(k, b) for k, b in boxes if b is not None])
    return actors


def _actor_box(t) -> tuple[float, float, float, float] | None:
    """(x0, x1, y0, y1) in pixels of a positioned text actor, from its position, justification
    and the size of its text."""
    txt = t.GetInput()
    if not txt:
        return None
    tp = t.GetTextProperty()
    bw, bh = _text_box(txt, tp)
    x, y = t.GetPosition()
    j, v = tp.GetJustification(), tp.GetVerticalJustification()  # 0 left/bottom, 1 centred, 2 right/top
    x0 = x - bw * (j / 2.0)
    y0 = y - bh * (v / 2.0)
    return (x0, x0 + bw, y0, y0 + bh)


def free_area(plotter, shown: set[str] | None = None, margin: float = 0.012) -> tuple[float, float, float, float]:
    """(x0, x1, y0, y1) in pixels: the largest rectangle of the window that no overlay
    :func:`add_to_plotter` drew (readouts, caption, verdict lines, legend, colour bar) covers,
    ``margin`` of the window kept from each; ``shown``: only the overlays of these layers
    ("readouts", "legend"; None: all drawn). The whole window when none is shown."""
    size, drawn = getattr(plotter, "_matezone_overlays", (tuple(plotter.window_size), []))
    boxes = [b for k, b in drawn if shown is None or k in shown]
    w, h = size
    mx, my = margin * w, margin * h
    grown = [(b[0] - mx, b[1] + mx, b[2] - my, b[3] + my) for b in boxes]
    xs = sorted({0.0, float(w), *[min(max(v, 0.0), w) for b in grown for v in b[:2]]})
    ys = sorted({0.0, float(h), *[min(max(v, 0.0), h) for b in grown for v in b[2:]]})
    best, area = (0.0, float(w), 0.0, float(h)), -1.0
    for i, x0 in enumerate(xs):
        for x1 in xs[i + 1:]:
            for k, y0 in enumerate(ys):
                for y1 in ys[k + 1:]:
                    if any(b[0] < x1 and b[1] > x0 and b[2] < y1 and b[3] > y0 for b in grown):
                        break  # a taller rectangle from y0 meets the same box
                    a = (x1 - x0) * (y1 - y0) * min(x1 - x0, 1.6 * (y1 - y0))  # area, not a thin strip
                    if a > area:
                        best, area = (x0, x1, y0, y1), a
    return best


def _model_corners(scene: Scene3D) -> np.ndarray:
    """The 8 corners of the box round what the picture shows of the model (datum plane apart)."""
    b = np.array([it.mesh.bounds for name, items in scene.layers.items() if name != "datum" for it in items])
    lo = b[:, 0::2].min(axis=0)
    hi = b[:, 1::2].max(axis=0)
    return np.array([[x, y, z] for x in (lo[0], hi[0]) for y in (lo[1], hi[1]) for z in (lo[2], hi[2])])


def project(plotter, points: np.ndarray) -> np.ndarray:
    """Display coordinates (pixels, origin bottom left) of world ``points`` with the plotter's
    camera (VTK's world-to-display)."""
    ren = plotter.renderer
    out = []
    for p in np.asarray(points, float):
        ren.SetWorldPoint(*p, 1.0)
        ren.WorldToDisplay()
        out.append(ren.GetDisplayPoint()[:2])
    return np.array(out)


def frame_model(plotter, scene: Scene3D, shown: set[str] | None = None, fill: float = 0.92) -> None:
    """Zoom and shift the (perspective) camera so the model's projected box fills ``fill`` of
    the free area (:func:`free_area` of the overlays ``shown``) and sits at its centre: the
    colour bar and the texts never cover the model."""
    cam = plotter.renderer.GetActiveCamera()
    w, h = plotter.window_size
    x0, x1, y0, y1 = free_area(plotter, shown)
    for _ in range(2):  # the second pass takes up what perspective left after the first
        cam.SetWindowCenter(0.0, 0.0)
        plotter.reset_camera_clipping_range()
        d = project(plotter, _model_corners(scene))
        nx = 2 * d[:, 0] / w - 1  # normalised device coordinates
        ny = 2 * d[:, 1] / h - 1
        hx, hy = (nx.max() - nx.min()) / 2, (ny.max() - ny.min()) / 2
        gx, gy = (x1 - x0) / w, (y1 - y0) / h  # the free area's half sizes in the same units
        z = fill * min(gx / max(hx, 1e-9), gy / max(hy, 1e-9))
        cam.SetViewAngle(2 * np.degrees(np.arctan(np.tan(np.radians(cam.GetViewAngle() / 2)) / z)))
        cx, cy = z * (nx.max() + nx.min()) / 2, z * (ny.max() + ny.min()) / 2
        tx, ty = (x0 + x1) / w - 1, (y0 + y1) / h - 1
        cam.SetWindowCenter(cx - tx, cy - ty)  # VTK shifts the picture by minus the window centre
    plotter.reset_camera_clipping_range()


def apply_view(plotter, scene: Scene3D, view: str, frame: bool = False) -> None:
    """Point the plotter's camera at the scene from ``view`` (parallel projection for "top" and
    "section"), leaving the corners to the readouts and the legend. ``frame``: the perspective
    ("iso") camera is zoomed and shifted so the model fills the area the overlays that
    :func:`add_to_plotter` drew leave free (:func:`frame_model`), in place of the scene's fixed
    window centre."""
    if view not in scene.cameras:
        raise ValueError(f"unknown view {view!r}; choose one of {', '.join(VIEWS)}")
    plotter.camera_position = scene.cameras[view]
    cam = plotter.camera
    if view in scene.parallel_scale:
        cam.parallel_projection = True
        cam.parallel_scale = scene.parallel_scale[view]
    else:
        cam.parallel_projection = False
        cam.view_angle = 30.0
    plotter.renderer.GetActiveCamera().SetWindowCenter(*scene.window_centre)
    plotter.reset_camera_clipping_range()
    if frame and view not in scene.parallel_scale:
        frame_model(plotter, scene)


def render_variants(scene: Scene3D, view: str, variants: dict, size=(1600, 1200)) -> dict:
    """Several pictures of one scene from one camera, sharing one off-screen plotter: ``variants``
    maps a name to ``(path or None, visible layers or None)`` or ``(path, visible, fit)``;
    returns name -> (h, w, 3) image. Cheaper than one :func:`render_image` per picture (the
    scene is set up once).

    ``fit(image, label_px) -> label scale``: for a picture printed small. ``label_px`` is the
    font size (pixels) of the smallest 3D label in ``image``; the labels are drawn again at the
    scale ``fit`` returns until it asks for no larger one (at most four renders)."""
    sc = view_scene(scene, view)
    specs = [(v + (None,))[:3] for v in variants.values()]
    wanted = [set(LAYERS) - HIDDEN_BY_DEFAULT if vis is None else set(vis) for _, vis, _ in specs]
    pl = pv.Plotter(off_screen=True, window_size=(int(size[0]), int(size[1])))
    out = {}
    try:
        union = set().union(*wanted)
        actors = add_to_plotter(pl, sc, union)
        sizes = [lb.size for _, lbs in _label_groups(sc, union) for lb in lbs]
        for name, (path, _, fit), vis in zip(variants, specs, wanted):
            for layer, acts in actors.items():
                for a in acts:
                    if hasattr(a, "SetVisibility"):
                        a.SetVisibility(layer in vis)
            apply_view(pl, sc, view)  # each variant framed as render_image frames it alone
            if view not in sc.parallel_scale:
                frame_model(pl, sc, vis)
            own, scale = [], 1.0
            for attempt in range(4):
                pl.render()
                img = np.asarray(pl.screenshot(None, return_img=True))[..., :3]
                if fit is None or not sizes or "labels" not in vis or attempt == 3:
                    break
                want = float(fit(img, label_font_px(pl, min(sizes), scale)))
                if want <= scale * 1.001:
                    break
                scale = want
                for a in own or actors["labels"]:
                    a.SetVisibility(False)
                for a in own:
                    pl.remove_actor(a, render=False)
                own = add_labels(pl, sc, vis, scale)
            for a in own:
                pl.remove_actor(a, render=False)
            if path is not None:
                import imageio.v3 as iio

                iio.imwrite(str(path), img)
            out[name] = img
    finally:
        pl.close()
    return out


def render_image(scene: Scene3D, path=None, view: str = "iso", size=(1600, 1200),
                 visible: set[str] | None = None) -> np.ndarray:
    """Render the scene off-screen from camera ``view`` (drawn as :func:`view_scene` gives it),
    write a PNG to ``path`` if given, and return the image as an (h, w, 3) uint8 array."""
    sc = view_scene(scene, view)
    pl = pv.Plotter(off_screen=True, window_size=(int(size[0]), int(size[1])))
    try:
        add_to_plotter(pl, sc, visible)
        apply_view(pl, sc, view, frame=True)
        img = pl.screenshot(str(path) if path is not None else None, return_img=True)
    finally:
        pl.close()
    return np.asarray(img)[..., :3]
