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


def add_to_plotter(plotter, scene: Scene3D, visible: set[str] | None = None) -> dict[str, list]:
    """Add the scene's layers to ``plotter`` (any ``pyvista.Plotter``, e.g. a pyvistaqt
    ``QtInteractor``); returns layer name -> actors. ``visible=None`` shows every layer but
    those in HIDDEN_BY_DEFAULT ("rc"). Overlays: "readouts" (title, numbers, exaggeration
    caption, verdict), "legend" (legend box, clearance scalar bar)."""
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
    for (colour, size, framed, justify), lbs in _label_groups(scene, show):
        a = plotter.add_point_labels(
            np.array([lb.point for lb in lbs]), [lb.text for lb in lbs],
            font_size=max(8, int(round(size * (fs + 3) / 14))), text_color=colour, font_family=S.FONT_FAMILY,
            bold=True, shape="rect", shape_color=S.BACKGROUND, shape_opacity=1.0 if framed else 0.8,
            show_points=False, always_visible=True, margin=5 if framed else 2, reset_camera=False,
            render=False, justification_horizontal=justify)
        actors["labels"].append(a)
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
    return actors


def apply_view(plotter, scene: Scene3D, view: str) -> None:
    """Point the plotter's camera at the scene from ``view`` (parallel projection for "top" and
    "section"), leaving the corners to the readouts and the legend."""
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


def render_variants(scene: Scene3D, view: str, variants: dict, size=(1600, 1200)) -> dict:
    """Several pictures of one scene from one camera, sharing one off-screen plotter: ``variants``
    maps a name to ``(path or None, visible layers or None)``; returns name -> (h, w, 3) image.
    Cheaper than one :func:`render_image` per picture (the scene is set up once)."""
    sc = view_scene(scene, view)
    wanted = [set(LAYERS) - HIDDEN_BY_DEFAULT if vis is None else set(vis) for _, vis in variants.values()]
    pl = pv.Plotter(off_screen=True, window_size=(int(size[0]), int(size[1])))
    out = {}
    try:
        actors = add_to_plotter(pl, sc, set().union(*wanted))
        apply_view(pl, sc, view)
        for (name, (path, _)), vis in zip(variants.items(), wanted):
            for layer, acts in actors.items():
                for a in acts:
                    if hasattr(a, "SetVisibility"):
                        a.SetVisibility(layer in vis)
            pl.render()
            img = pl.screenshot(str(path) if path is not None else None, return_img=True)
            out[name] = np.asarray(img)[..., :3]
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
        apply_view(pl, sc, view)
        img = pl.screenshot(str(path) if path is not None else None, return_img=True)
    finally:
        pl.close()
    return np.asarray(img)[..., :3]
