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
from .overlays import _actor_box, _place_caption, _set_wrapped, _text_box, _text_width, stack_left
from .section import view_scene
from .values import HIDDEN_BY_DEFAULT, LAYERS, Label, Scene3D


def _visible(scene: Scene3D, visible: set[str] | None) -> set[str]:
    return set(LAYERS) - HIDDEN_BY_DEFAULT if visible is None else set(visible)


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
    """The scene's 3D labels as callouts (:class:`.callouts.Callouts`: one screen text per label,
    placed clear of each other, of the markers and of the overlays before every render, with a
    leader line where a label had to move off its anchor), their font :func:`label_font_px` at
    ``label_scale``, in :func:`_label_groups` order; returns the actors (texts, then the leaders).
    A plotter holds one set of callouts: this replaces any earlier one."""
    from .callouts import Callouts

    lbs = [lb for _k, group in _label_groups(scene, show) for lb in group]
    c = Callouts(plotter, lbs, [label_font_px(plotter, lb.size, label_scale) for lb in lbs],
                 getattr(plotter, "_matezone_markers", ()))
    return c.actors


def _show_labels(plotter, vis: set[str]) -> None:
    """Show the callouts of the labels whose layer is in ``vis`` ("labels" shown at all)."""
    c = callouts(plotter)
    if c is None:
        return
    for t, lb in zip(c.texts, c.labels):
        t.SetVisibility("labels" in vis and (lb.layer in vis or lb.layer == "labels"))
    c.leaders.SetVisibility("labels" in vis)
    c._off = set()


def callouts(plotter):
    """The :class:`.callouts.Callouts` of ``plotter`` (None before :func:`add_labels`)."""
    return getattr(plotter.renderer, "_matezone_callouts", None)


def _is_marker(mesh, style: dict) -> bool:
    """A few points drawn as dots (the tightest spot, axis ends): labels keep clear of them."""
    from .callouts import MARKER_POINTS

    return bool(style.get("render_points_as_spheres")) and mesh.n_cells == mesh.n_points \
        and 0 < mesh.n_points <= MARKER_POINTS


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
    markers = []
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
            if _is_marker(it.mesh, style):
                markers.append(a)
            if "scalars" in style and mate_actor is None:
                mate_actor = a
    fs = _font_px(plotter)
    plotter._matezone_markers = markers
    actors["labels"] += add_labels(plotter, scene, show, label_scale)
    w, h = plotter.window_size
    title_w, readouts_w, cap_y = 0, 0, h - int(0.012 * h)
    for kind, txt, colour in _readout_texts(scene, show):
        if kind == "title":
            t = plotter.add_text(txt, position=(int(0.012 * w), h - int(0.012 * h)), font_size=fs + 4,
                                 color=colour, font=S.FONT_FAMILY, render=False)
            t.GetTextProperty().SetVerticalJustificationToTop()
            t.GetTextProperty().BoldOn()
            title_w = _text_box(txt, t.GetTextProperty())[0]
        elif kind == "readouts":
            t = plotter.add_text(txt, position=(int(0.012 * w), h - int(0.012 * h) - 3.2 * fs),
                                 font_size=fs, color=colour, font=S.MONO_FAMILY, render=False)
            t.GetTextProperty().SetVerticalJustificationToTop()
            t.GetTextProperty().SetLineSpacing(1.05)
            # a line longer than 0.62 of the width goes on, indented, on the next: the right
            # column stays for the caption and the colour bar
            _set_wrapped(t, txt, 0.62 * w)
            readouts_w = _text_box(t.GetInput(), t.GetTextProperty())[0]
            t._matezone_left_w = max(title_w, readouts_w)  # the caption was placed clear of this
        elif kind in ("caption", "caption detail"):
            t = plotter.add_text(txt, position=(0, 0), font_size=fs, color=colour, font=S.FONT_FAMILY, render=False)
            cap_y = _place_caption(t, kind, w, h, fs, max(title_w, readouts_w), cap_y)
        elif kind == "verdict":  # under the readouts (stack_left), wrapped clear of the bar's column
            t = plotter.add_text(txt, position=(int(0.012 * w), 0), font_size=fs + 3,
                                 color=colour, font=S.FONT_FAMILY, render=False)
            t.GetTextProperty().BoldOn()
            _set_wrapped(t, txt, 0.86 * w - 2 * int(0.012 * w))
            t.GetTextProperty().SetVerticalJustificationToTop()
        else:  # a verdict line: one each, in its own colour
            t = plotter.add_text(txt, position=(int(0.012 * w), 0), font_size=fs, color=colour,
                                 font=S.MONO_FAMILY, render=False)
            t.GetTextProperty().BoldOn()
            _set_wrapped(t, txt, 0.86 * w - 2 * int(0.012 * w))
            t.GetTextProperty().SetVerticalJustificationToTop()
        t._matezone_kind = kind
        actors["readouts"].append(t)
    stack_left(actors["readouts"], h, fs)
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
        legend_top = 0.015 * h + len(rows) * row_px if rows else 0.0
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
            # the bar and its title between the caption's last row and the legend's top row: 0.34 of
            # the height where there is room, at least 0.12
            top = min(0.86, (cap_y - 0.012 * h) / h)
            floor = (legend_top + 0.02 * h) / h if legend_top else 0.0
            bh = max(0.12, min(0.34, top - 0.06 - max(floor, top - 0.40)))
            by = top - 0.06 - bh
            bar_box = (0.88 * w, w, (by - 0.02) * h, top * h)  # the bar, its labels to the right, its title above
            u = scene.units
            bar = scene.scalar_bar
            actors["legend"].append(plotter.add_scalar_bar(
                title=bar["title"], mapper=mate_actor.mapper, n_labels=bar.get("n_labels", 5), color=S.TEXT,
                font_family=S.FONT_FAMILY, vertical=True, position_x=0.90, position_y=by, width=0.06,
                height=bh, fmt=bar.get("fmt", f"%.{u.decimals}f"), title_font_size=fs + 3, label_font_size=fs + 1,
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
    # each text's own box and the bar's, with the actor whose visibility says whether it is shown
    own = [(t, _actor_box(t)) for layer in ("readouts", "legend") for t in actors[layer]
           if hasattr(t, "GetTextProperty") and hasattr(t, "GetInput")]
    if "legend" in show and bar_box is not None:
        own.append((actors["legend"][-1], bar_box))
    plotter._matezone_overlay_actors = [(t, b) for t, b in own if b is not None]
    return actors


def overlay_boxes(plotter) -> list[tuple[float, float, float, float]]:
    """(x0, x1, y0, y1), pixels, of each overlay text and colour bar :func:`add_to_plotter` drew
    that is shown now (the 3D labels keep clear of them)."""
    return [b for t, b in getattr(plotter, "_matezone_overlay_actors", ()) if t.GetVisibility()]


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
        raise ValueError(f"unknown view {view!r}; choose one of {', '.join(v for v in scene.cameras)}")
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
        drawn = 1.0  # the label scale the callouts on the plotter were made at
        for name, (path, _, fit), vis in zip(variants, specs, wanted):
            for layer, acts in actors.items():
                if layer == "labels":
                    continue
                for a in acts:
                    if hasattr(a, "SetVisibility"):
                        a.SetVisibility(layer in vis)
            apply_view(pl, sc, view)  # each variant framed as render_image frames it alone
            if view not in sc.parallel_scale:
                frame_model(pl, sc, vis)
            scale = 1.0
            for attempt in range(4):
                if drawn != scale:
                    add_labels(pl, sc, union, scale)
                    drawn = scale
                _show_labels(pl, vis)
                pl.render()
                img = np.asarray(pl.screenshot(None, return_img=True))[..., :3]
                if fit is None or not sizes or "labels" not in vis or attempt == 3:
                    break
                want = float(fit(img, label_font_px(pl, min(sizes), scale)))
                if want <= scale * 1.001:
                    break
                scale = want
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
