"""The 3D view (pyvistaqt) and the 2D views (matplotlib canvases) of the window.

Both rebuild from the model on its signals: the meshes come from :mod:`viewer.scene3d`, the
figures from :mod:`viewer.figures`; nothing here computes a tolerance number.
Updates are coalesced: a burst of slider moves costs one rebuild per event-loop turn (one
zero-delay single-shot timer per view). A what-if move keeps the 3D actors: the new meshes are
handed to the existing mappers and the text labels and readouts get their new strings and
anchor points in place; actors are only re-made when the scene's structure changes.
"""

from __future__ import annotations

from html import escape as _html_escape

import time
from dataclasses import dataclass, replace

import numpy as np

from PyQt5.QtCore import QEvent, QObject, QTimer, pyqtSignal
from PyQt5.QtWidgets import (
    QHBoxLayout, QLabel, QMenu, QTabWidget, QToolButton, QVBoxLayout, QWidget,
)

from .model import SceneModel

# names shown for the scene's layers (the builder's own names are the keys)
LAYER_NAMES = {
    "part": "Part",
    "datum": "Datum A",
    "zone": "Tolerance zone",
    "zone_axis": "Zone axis",
    "axis": "Worst-case axis",
    "surface": "Feature surface",
    "vc": "VC boundary",
    "rc": "RC boundary",
    "mate": "Mating part",
    "clearance": "Clearance colouring",
    "projected": "Projected zone",
    "points": "Measured points",
    "median_line": "Median line",
    "envelopes": "Mating envelopes",
    "labels": "Labels",
    "readouts": "Numbers on the picture",
    "legend": "Colour legend",
}
# the names that depend on the standard's terms (geom.analysis.term): ASME VC, ISO MMVS / LMVS ...
def layer_name(name: str, standard) -> str:
    """The Layers-menu name of a scene layer, in the scene's standard's terms."""
    from geom.analysis import term
    from geom.model import Standard

    if name == "vc":
        vc = {term("vc_MMC", standard)[0], term("vc_LMC", standard)[0]}
        return " / ".join(sorted(vc)) + " boundary"
    if name == "rc":
        return f"{term('rc', standard)[0]} boundary"
    if name == "envelopes":
        return "Mating envelopes" if standard is Standard.ASME else "Associated cylinders"
    return LAYER_NAMES.get(name, name)


HIDDEN_IN_WINDOW = {"readouts"}
MESHLESS = {"labels", "readouts", "legend"}  # layers add_to_plotter draws as text, not meshes  # the window's readout table shows these numbers already
WINDOW_CENTRE = (0.0, 0.05)  # camera window centre in the window: centred, a little low (labels above)
VIEW_NAMES = {"iso": "Iso", "top": "Top (through A)", "section": "Section"}


def _non_finite(sc3, checked: dict) -> str | None:
    """The first layer of ``sc3`` holding a mesh point or label anchor that is not a finite number
    (an overflow, an infinity, a NaN), or None. Meshes already checked (``checked``: id -> mesh,
    the builders hand back the same objects for the same geometry) are not read again."""
    from vtkmodules.util.numpy_support import vtk_to_numpy

    if len(checked) > 4096:
        checked.clear()
    for name, items in sc3.layers.items():
        for it in items:
            mesh = it.mesh
            if checked.get(id(mesh)) is mesh:
                continue
            pts = mesh.GetPoints() if hasattr(mesh, "GetPoints") else None
            if pts is not None and pts.GetNumberOfPoints() and not np.isfinite(vtk_to_numpy(pts.GetData())).all():
                return name
            checked[id(mesh)] = mesh
    for lb in sc3.labels:
        if not np.isfinite(np.asarray(lb.point, dtype=float)).all():
            return lb.layer
    return None


class DrawError(ValueError):
    """A picture that cannot be drawn (non-finite coordinates)."""


def draw_problem(what: str, e: BaseException) -> str:
    """The one line shown when a view cannot be drawn; the scene and its numbers are unchanged."""
    why = str(e) if isinstance(e, DrawError) else f"{type(e).__name__}: {e}"
    return (f"the {what} cannot be drawn for this scene ({why}); the scene and the readouts are unchanged")


class View3D(QWidget):
    """The interactive 3D scene of the mate or feature in focus."""

    rendered = pyqtSignal()  # emitted after each full rebuild and render
    drawFailed = pyqtSignal(str)  # the scene could not be drawn: the message shown

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        from pyvistaqt import QtInteractor

        from viewer import scene3d

        self.scene3d_mod = scene3d
        self.model = model
        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        bar = QHBoxLayout()
        bar.addWidget(QLabel("View:"))
        self.view_buttons: dict[str, QToolButton] = {}
        for v in scene3d.VIEWS:
            b = QToolButton()
            b.setText(VIEW_NAMES.get(v, v))
            b.setToolTip(f"Camera: {VIEW_NAMES.get(v, v)}")
            b.clicked.connect(lambda _c=False, v=v: self.set_view(v))
            bar.addWidget(b)
            self.view_buttons[v] = b
        self.layer_button = QToolButton()
        self.layer_button.setText("Layers ▾")
        self.layer_button.setPopupMode(QToolButton.InstantPopup)
        self.layer_menu = QMenu(self)
        self.layer_actions = {}
        for name in scene3d.LAYERS:
            a = self.layer_menu.addAction(layer_name(name, model.scene.standard))
            a.setCheckable(True)
            a.setChecked(name not in scene3d.HIDDEN_BY_DEFAULT and name not in HIDDEN_IN_WINDOW)
            a.toggled.connect(lambda on, name=name: self.set_layer(name, on))
            self.layer_actions[name] = a
        self.layer_button.setMenu(self.layer_menu)
        bar.addWidget(self.layer_button)
        bar.addStretch(1)
        self.caption = QLabel()
        self.caption.setWordWrap(True)
        self.caption.setStyleSheet("color: #37474f; font-size: 8pt;")
        self.caption.setToolTip("Tolerances are tiny against sizes: radial deviations are drawn enlarged")
        bar.addWidget(self.caption)
        lay.addLayout(bar)
        # auto_update=False: pyvistaqt would otherwise re-render the whole scene five times a
        # second while idle; every change here renders once, explicitly
        self.plotter = QtInteractor(self, auto_update=False)
        self.plotter.set_background("white")
        self.renders = 0  # frames VTK has finished in this view
        self.plotter.render_window.AddObserver("EndEvent", self._count_render)
        self._fresh = None  # the frame count right after render(): the next paint need not render
        self._paint_filter = _PaintFresh(self)
        self.plotter.interactor.installEventFilter(self._paint_filter)
        lay.addWidget(self.plotter.interactor, 1)
        self.legend = QLabel()
        self.legend.setWordWrap(True)
        self.legend.setToolTip("What the colours in the 3D view mean")
        lay.addWidget(self.legend)
        self.visible: set[str] = {n for n, a in self.layer_actions.items() if a.isChecked()}
        self.actors: dict[str, list] = {}
        self.current = None  # Scene3D shown
        self.current_view = "iso"
        self._focus_key = None
        self._pending = False
        self.closed = False
        self.last_update_s = 0.0
        self.cut_iso = True  # iso drawn cut open at the plane of the tilt, as the report draws it
        self._cut = None  # is the scene shown cut open?
        self._shown_cache = None  # ((id of the scene, view), scene, scene as shown)
        self._sig = None  # structure of the scene whose actors are on the plotter
        self._feeds: dict[int, _Feed] = {}  # id of a mesh actor -> the mesh it draws, its own
        self._labels: list[_LabelSlot] | None = None  # label actors that can take new text in place
        self._readouts: list[_TextSlot] | None = None  # readout text actors, likewise
        self._text_key = None  # (window size, layers shown) the text actors were made for
        self._checked: dict = {}  # meshes found finite (id -> mesh)
        self.draw_error: str | None = None  # the last drawing failure shown, until a draw succeeds
        self._timer = QTimer(self)  # the coalescing timer: one rebuild per event-loop turn
        self._timer.setSingleShot(True)
        self._timer.setInterval(0)
        self._timer.timeout.connect(self.update_now)
        self._resize_filter = _OnResize(self._resized)
        self.plotter.interactor.installEventFilter(self._resize_filter)
        model.statesChanged.connect(self.schedule)
        model.sceneChanged.connect(self.schedule)
        model.sceneChanged.connect(self._layer_names)
        model.focusChanged.connect(self.schedule)
        model.inspectionChanged.connect(self.schedule)
        model.inspectionBusy.connect(self._busy)

    def _layer_names(self) -> None:
        st = self.model.scene.standard
        for name, a in self.layer_actions.items():
            text = layer_name(name, st)
            if a.text() != text:
                a.setText(text)

    def _busy(self, on: bool) -> None:
        if on:
            self.caption.setText("computing the inspection…")
        elif self.current is not None:
            self.caption.setText(self.current.caption)

    # ------------------------------------------------------------ building

    def schedule(self) -> None:
        """Ask for a rebuild on the next event-loop turn; more requests before then are merged."""
        self._pending = True
        if not self._timer.isActive():
            self._timer.start()

    def build(self):
        """The Scene3D of the focus at the current what-if states; for an inspection the scene
        of its result (None while none is there: the last view stays)."""
        m = self.model
        kind, key = m.focus
        s = self.scene3d_mod
        if kind not in ("mate", "feature", "inspection"):
            return None  # a fastener (or nothing): no 3D picture
        if kind == "inspection":
            insp = m.shown_inspection()
            return None if insp is None else s.build_inspection_scene(m.result, insp)
        if kind == "mate":
            return s.build_mate_scene(m.result, key, states=dict(m.states))
        return s.build_feature_scene(m.result, key, state=m.states[key])

    def update_now(self) -> None:
        self._pending = False
        self._timer.stop()  # a rebuild asked for before this one is served by it
        if self.closed:
            return
        t0 = time.perf_counter()
        if self.model.focus[0] not in ("mate", "feature", "inspection"):
            self.show_nothing()
            return
        try:  # a scene that cannot be built: the last picture stays
            sc3 = self.build()
            bad = None if sc3 is None else _non_finite(sc3, self._checked)
            if bad is not None:
                raise DrawError(f"the {LAYER_NAMES.get(bad, bad).lower()} layer has coordinates that are "
                                "not finite numbers")
        except Exception as e:
            self._failed(e)
            return
        if sc3 is None:
            return
        try:
            self.show_scene(sc3)
        except Exception as e:  # the actors may be half replaced: the view is emptied
            self._clear_actors()
            self.current = None
            self._failed(e)
            return
        self.draw_error = None
        self.last_update_s = time.perf_counter() - t0

    def _failed(self, e: BaseException) -> None:
        """Say inline (once per distinct problem) that the picture cannot be drawn."""
        import traceback

        msg = draw_problem("3D view", e)
        self.caption.setText("3D view not drawn: see the message")
        if msg != self.draw_error:
            self.draw_error = msg
            if not isinstance(e, DrawError):  # a builder failed: for whoever reads the terminal
                traceback.print_exception(type(e), e, e.__traceback__, limit=3)
            self.model.message.emit("error", msg)
        self.drawFailed.emit(msg)

    def _remove_actors(self) -> None:
        """Take every actor, scalar bar and legend of ours off the plotter (no render)."""
        p = self.plotter
        for title in list(p.scalar_bars.keys()):  # pyvista keeps a registry of its bars
            p.remove_scalar_bar(title, render=False)
        if getattr(p, "legend", None) is not None:
            p.remove_legend(render=False)
        for actors in self.actors.values():
            for a in actors:
                p.remove_actor(a, render=False)

    def _clear_actors(self) -> None:
        try:
            self._remove_actors()
        except Exception:  # the plotter itself is broken: nothing more to remove
            pass
        self.actors, self._feeds, self._sig = {}, {}, None
        self._labels = self._readouts = None
        self._shown_cache = None

    def show_nothing(self) -> None:
        """A focus with no 3D picture (a fastener pattern): the view is emptied and says so."""
        self._clear_actors()
        self.current = None
        self._focus_key = self.model.focus
        kind, key = self.model.focus
        self.caption.setText(f"{kind} {key}: no 3D picture; its schematic is in the 2D view, its numbers "
                             "in the readouts" if key is not None else "nothing to show")
        self.legend.setVisible(False)
        self.render()
        self.rendered.emit()

    def show_scene(self, sc3) -> None:
        """Replace the actors by those of ``sc3``; the camera stays unless the focus changed."""
        first = self.current is None or self._focus_key != self.model.focus
        self._focus_key = self.model.focus
        self.current = sc3
        self.caption.setText(sc3.caption)
        if first or not self._update_in_place():
            self._readd()
        if first:
            self.set_view(self.current_view, render=False)
        self.render()
        self.rendered.emit()

    def _count_render(self, _obj=None, _event=None) -> None:
        self.renders += 1

    def render(self) -> None:
        """Render the scene now, once. The widget's next paint only puts this frame on screen
        (pyvistaqt's paint would otherwise render the unchanged scene a second time)."""
        if self.closed:
            return
        self.plotter.render()
        self._fresh = self.renders

    def _shown(self, view: str | None = None):
        """The scene as drawn from the camera ``view`` (:func:`viewer.scene3d.view_scene`: cut open
        at the plane of the tilt for iso and section, whole from the top)."""
        view = view or self.current_view
        if view == "iso" and not self.cut_iso:
            return self.current
        key = (id(self.current), view)
        if self._shown_cache is None or self._shown_cache[0] != key or self._shown_cache[1] is not self.current:
            self._shown_cache = (key, self.current, self.scene3d_mod.view_scene(self.current, view))
        return self._shown_cache[2]

    def _signature(self, shown) -> tuple:
        return (tuple((n, tuple(it.name for it in items)) for n, items in shown.layers.items()),
                frozenset(self.visible), shown is not self.current)

    def _update_in_place(self) -> bool:
        """Same focus, same layers, same meshes by name: hand the new meshes to the existing
        actors' pipelines (no new actors, no new mappers; an unchanged shared mesh is left alone) and give
        the text actors their new strings, colours and anchor points. False if the structure
        changed and a full re-add is needed."""
        shown = self._shown()
        if self._signature(shown) != self._sig:
            return False
        pairs = []
        for name, items in shown.layers.items():
            if name not in self.visible or name in MESHLESS:
                continue
            actors = self.actors.get(name, [])
            if len(actors) < len(items):
                return False
            pairs += zip(actors, items)
        if any(id(a) not in self._feeds for a, _it in pairs):
            return False
        for a, it in pairs:
            self._feeds[id(a)].feed(it.mesh)
            mapper = a.GetMapper()
            clim = it.style.get("clim")
            if clim is not None and tuple(mapper.GetScalarRange()) != tuple(clim):
                a.mapper.scalar_range = tuple(clim)  # pyvista's setter: the mapper and its lookup table
        if not self._update_text(shown):
            return False  # all made anew, so that the overlays keep their drawing order
        self._update_legend(shown)
        return True

    def _text_layers(self) -> set[str]:
        """The layers add_to_plotter is asked to draw as text on a what-if update."""
        return set(self.visible) - {"legend"}

    def _update_text(self, shown) -> bool:
        """Labels and readouts of ``shown`` into the existing text actors. False (nothing
        touched) if their number, grouping, fonts or the layout of the readout block would differ
        (or the window was resized): then every actor is made anew."""
        show = self._text_layers()
        if self._labels is None or self._readouts is None \
                or self._text_key != (tuple(self.plotter.window_size), frozenset(show)):
            return False
        groups = _label_groups(shown, show)
        if [(k, len(v)) for k, v in groups] != [(sl.key, len(sl.texts)) for sl in self._labels]:
            return False
        texts = _readout_texts(shown, show)
        if [k for k, _t, _c in texts] != [sl.kind for sl in self._readouts]:
            return False
        # the readout block is laid out from the heights of its texts: the same heights keep every
        # position, so only the strings change; otherwise it is laid out anew
        heights = [_text_height(t, sl.actor.GetTextProperty()) if t != sl.text else sl.height
                   for (_k, t, _c), sl in zip(texts, self._readouts)]
        if heights != [sl.height for sl in self._readouts]:
            return False
        for sl, (_k, lbs) in zip(self._labels, groups):
            sl.set([lb.text for lb in lbs], np.array([lb.point for lb in lbs], dtype=float))
        for sl, (_k, t, c) in zip(self._readouts, texts):
            sl.set(t, c)
        return True

    def _record_text(self, shown) -> None:
        """Remember which text actor holds which label group / readout line, after checking
        that the actors add_to_plotter made hold exactly those strings (else: no in-place
        updates, the text is re-made each time)."""
        show = self._text_layers()
        self._text_key = (tuple(self.plotter.window_size), frozenset(show))
        groups = _label_groups(shown, show)
        actors = self.actors.get("labels", [])
        labels = [_LabelSlot.of(a, k, lbs) for a, (k, lbs) in zip(actors, groups)]
        self._labels = labels if len(actors) == len(groups) and all(labels) else None
        texts = _readout_texts(shown, show)
        actors = self.actors.get("readouts", [])
        readouts = [_TextSlot.of(a, k, t) for a, (k, t, _c) in zip(actors, texts)]
        self._readouts = readouts if len(actors) == len(texts) and all(readouts) else None

    def _readd(self, shown=None) -> None:
        p = self.plotter
        self._remove_actors()
        shown = shown if shown is not None else self._shown()
        self._cut = shown is not self.current
        added = self.scene3d_mod.add_to_plotter(p, shown, set(self.visible)) or {}
        self.actors = {k: [a for a in v if a is not None] for k, v in added.items()}
        self._feeds = {}
        for name, items in shown.layers.items():
            if name in self.visible and name not in MESHLESS:
                for a, it in zip(self.actors.get(name, []), items):
                    self._feeds[id(a)] = _Feed.of(a, it.mesh)
        # the legend box is unreadably small in a window-sized view: the same rows are shown as
        # Qt text under the view; the clearance colour bar stays in the picture
        self._sig = self._signature(shown)
        self._record_text(shown)
        self._update_legend(shown)
        self._place_scalar_bar()

    def _resized(self) -> None:
        """After a resize: keep the colour bar in view and make the text overlays (sized and
        placed for the window) anew, as a fresh build at this size would draw them."""
        if self.closed or self.current is None:
            return
        moved = self._place_scalar_bar()
        stale = self._text_key is not None and self._text_key[0] != tuple(self.plotter.window_size)
        if stale:
            self._readd()
        if moved or stale:
            self.render()

    def _place_scalar_bar(self) -> bool:
        """Keep the colour bar and its title inside the view: the title is centred over the bar
        and is wider than it, so the bar moves left until the title's right end clears the edge.
        True if a bar moved."""
        bars = list(self.plotter.scalar_bars.values()) if not self.closed else []
        if not bars:
            return False
        import vtk

        w = max(int(self.plotter.window_size[0]), 1)
        moved = False
        for bar in bars:
            bb = [0, 0, 0, 0]
            vtk.vtkTextRenderer().GetBoundingBox(bar.GetTitleTextProperty(), bar.GetTitle(), bb, 72)
            title_w = (bb[1] - bb[0] + 1) / w
            width = bar.GetWidth()
            margin = 0.015
            x = min(0.90, 1.0 - margin - width / 2 - title_w / 2)
            old = tuple(bar.GetPosition())
            bar.SetPosition(max(0.5, x), old[1])
            moved = moved or tuple(bar.GetPosition()) != old
        return moved

    def _update_legend(self, shown) -> None:
        p = self.plotter
        bars = {id(b) for b in p.scalar_bars.values()}
        for a in self.actors.get("legend", []):
            if id(a) not in bars:
                a.SetVisibility(False)
        rows = [(lbl, col) for (lbl, col), layer in zip(shown.legend, shown.legend_layers)
                if layer in self.visible]
        text = "  ".join(f"<span style='color:{col}; font-size:14pt'>■</span>&nbsp;{_html_escape(lbl)}"
                         for lbl, col in rows) if "legend" in self.visible else ""
        if text != self.legend.text():
            self.legend.setText(text)
        self.legend.setVisible("legend" in self.visible and bool(rows))

    # ------------------------------------------------------------ camera and layers

    def set_view(self, view: str, render: bool = True) -> None:
        if self.current is None or self.closed or view not in self.current.cameras:
            return
        self.current_view = view
        shown = self._shown(view)
        if (shown is not self.current) != self._cut:
            self._readd(shown)
        # the scene's camera leaves the top-left corner to the numbers on the picture; the window
        # shows them in the table instead, so the picture is centred (the colour bar keeps its side)
        self.scene3d_mod.apply_view(self.plotter, replace(self.current, window_centre=WINDOW_CENTRE), view)
        if render:
            self.render()

    def set_layer(self, name: str, on: bool) -> None:
        (self.visible.add if on else self.visible.discard)(name)
        if self.current is not None and not self.closed:
            self._readd()
            self.render()

    def image(self):
        """The current 3D picture as an RGB array."""
        return self.plotter.screenshot(return_img=True)

    def close_plotter(self) -> None:
        if not self.closed:
            self.closed = True
            self.plotter.close()


@dataclass
class _Feed:
    """The data object a mesh actor draws: the actor's own, filled by shallow copy from the
    scene's mesh (``source``). A what-if move copies the new mesh into it: the mapper keeps the
    same input, so VTK re-uploads the arrays but does not rebuild the actor's shaders, as it
    would for a new input object (measured: about 1 ms per actor per frame). The scene's meshes
    are shared and never written: a shallow copy only takes references to their arrays."""

    own: object
    source: object

    @classmethod
    def of(cls, actor, mesh) -> _Feed:
        import pyvista as pv

        own = pv.PolyData()
        own.ShallowCopy(mesh)
        _pipeline_head(actor.GetMapper()).SetInputDataObject(0, own)
        return cls(own, mesh)

    def feed(self, mesh) -> None:
        if mesh is not self.source:
            self.own.ShallowCopy(mesh)
            self.source = mesh


def _pipeline_head(mapper):
    """The algorithm that takes the mesh as data in an actor's pipeline: the mapper itself, or
    the first filter add_mesh put before it (e.g. the point normals of smooth shading). A new
    mesh given there runs through the same filters as the one add_mesh was given."""
    alg = mapper
    while alg.GetNumberOfInputPorts() and alg.GetNumberOfInputConnections(0):
        up = alg.GetInputAlgorithm(0, 0)
        if up is None or up.IsA("vtkTrivialProducer"):
            break
        alg = up
    return alg


def _label_groups(scene, show: set[str]) -> list[tuple[tuple, list]]:
    """The scene's labels as add_to_plotter groups them into one point-label actor each (same
    colour, size, frame and justification), in its order; none if "labels" is not shown."""
    if "labels" not in show:
        return []
    groups: dict[tuple, list] = {}
    for lb in scene.labels:
        if lb.layer in show or lb.layer == "labels":
            groups.setdefault((lb.colour, lb.size, lb.layer == "datum", lb.justify), []).append(lb)
    return list(groups.items())


def _readout_texts(scene, show: set[str]) -> list[tuple[str, str, str]]:
    """(kind, text, colour) of the readout text actors add_to_plotter makes, in its order."""
    if "readouts" not in show:
        return []
    from viewer import style

    head, _, rest = scene.caption.partition("\n")
    out = [("title", scene.title, style.TEXT), ("readouts", "\n".join(scene.readouts), style.TEXT)]
    out += [(k, t, style.TEXT) for k, t in (("caption", head), ("caption detail", rest)) if t]
    if scene.verdict:
        out.append(("verdict", scene.verdict, scene.verdict_colour))
    out += [("verdict line", t, c) for t, c in scene.verdicts]
    return out


def _text_height(text: str, prop) -> int:
    """Height in pixels of ``text`` in the text property ``prop`` (as the layout measures it)."""
    import vtk

    bb = [0, 0, 0, 0]
    vtk.vtkTextRenderer().GetBoundingBox(prop, text, bb, 72)
    return int(bb[3] - bb[2] + 1)


@dataclass
class _LabelSlot:
    """One point-label actor and the points + strings feeding its label hierarchy."""

    actor: object
    key: tuple
    data: object  # the vtkPolyData with the anchor points and the "labels" string array
    texts: list
    points: np.ndarray

    @classmethod
    def of(cls, actor, key, lbs):
        import vtk

        mapper = actor.GetMapper()
        if not isinstance(mapper, vtk.vtkLabelPlacementMapper):
            return None
        hier = mapper.GetInputAlgorithm()
        data = hier.GetInputDataObject(0, 0) if hier is not None else None
        arr = data.GetPointData().GetAbstractArray("labels") if data is not None else None
        texts = [lb.text for lb in lbs]
        if arr is None or [arr.GetValue(i) for i in range(arr.GetNumberOfValues())] != texts:
            return None
        pts = np.array([data.GetPoint(i) for i in range(data.GetNumberOfPoints())], dtype=float)
        return cls(actor, key, data, texts, pts)

    def set(self, texts: list, points: np.ndarray) -> None:
        """New strings and anchor points; the hierarchy re-places them at the next render."""
        changed = False
        if texts != self.texts:
            arr = self.data.GetPointData().GetAbstractArray("labels")
            for i, t in enumerate(texts):
                arr.SetValue(i, t)
            arr.Modified()
            self.texts = list(texts)
            changed = True
        if points.shape != self.points.shape or not np.array_equal(points, self.points):
            vp = self.data.GetPoints()
            for i, q in enumerate(points):
                vp.SetPoint(i, *q)
            vp.Modified()
            self.points = points
            changed = True
        if changed:
            self.data.Modified()


@dataclass
class _TextSlot:
    """One screen-text actor of the readout block."""

    actor: object
    kind: str
    text: str
    height: int

    @classmethod
    def of(cls, actor, kind, text):
        if not hasattr(actor, "GetInput") or actor.GetInput() != text:
            return None
        return cls(actor, kind, text, _text_height(text, actor.GetTextProperty()))

    def set(self, text: str, colour: str) -> None:
        from viewer import style

        if text != self.text:
            self.actor.SetInput(text)
            self.text = text
        tp = self.actor.GetTextProperty()
        rgb = style.rgb(colour)
        if tuple(tp.GetColor()) != rgb:
            tp.SetColor(*rgb)


class _PaintFresh(QObject):
    """Event filter on the 3D widget: a paint that follows :meth:`View3D.render` with no other
    frame and no resize in between shows that frame without rendering the scene again (the
    interactor's render is switched off for that one paint). Every other paint renders."""

    def __init__(self, view: View3D):
        super().__init__()
        self.view = view

    def eventFilter(self, obj, event):
        v = self.view
        t = event.type()
        if t == QEvent.Resize:
            v._fresh = None
        elif t == QEvent.Paint and v._fresh is not None:
            fresh, v._fresh = v._fresh == v.renders, None
            iren = v.plotter.render_window.GetInteractor() if not v.closed else None
            if fresh and iren is not None and iren.GetEnableRender():
                iren.EnableRenderOff()
                try:
                    obj.event(event)
                finally:
                    iren.EnableRenderOn()
                return True
        return False


class _OnResize(QObject):
    """Event filter: calls ``fn`` after its widget is resized."""

    def __init__(self, fn):
        super().__init__()
        self.fn = fn

    def eventFilter(self, obj, event):
        if event.type() == QEvent.Resize:
            QTimer.singleShot(0, self.fn)
        return False


def _fit_canvas_class():
    from matplotlib.backends.backend_qt5agg import FigureCanvasQTAgg

    class FitCanvas(FigureCanvasQTAgg):
        """A canvas that scales the figure's resolution so its designed page (8 x 6 in) fits the
        widget: the layout the figure was drawn for is kept, text just gets smaller."""

        DESIGN = (8.0, 6.0)

        def fit_dpi(self, w: float, h: float) -> float:
            return max(40.0, min(w / self.DESIGN[0], h / self.DESIGN[1]))

        def adopt(self, fig) -> None:
            r = self.device_pixel_ratio or 1.0
            w, h = max(self.width(), 200) * r, max(self.height(), 150) * r
            dpi = self.fit_dpi(w, h)
            fig._original_dpi = dpi / r
            fig.set_dpi(dpi)
            fig.set_size_inches(w / dpi, h / dpi, forward=False)
            self.figure = fig
            fig.set_canvas(self)

        def resizeEvent(self, event):
            r = self.device_pixel_ratio or 1.0
            dpi = self.fit_dpi(event.size().width() * r, event.size().height() * r)
            self.figure._original_dpi = dpi / r
            self.figure.set_dpi(dpi)
            super().resizeEvent(event)

    return FitCanvas


class Views2D(QTabWidget):
    """The 2D views in tabs; only the tab shown is redrawn, the others when they are opened."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        from viewer import figures

        FitCanvas = _fit_canvas_class()

        self.figures_mod = figures
        self.model = model
        self.canvases: dict = {}
        self.stale: set[str] = set()
        for key, title in self.TABS:
            from matplotlib.figure import Figure

            c = FitCanvas(Figure())
            self.canvases[key] = c
            self.addTab(c, title)
            self.stale.add(key)
        self.currentChanged.connect(lambda _i: self.refresh_current())
        self._pending = False
        self.draw_error: str | None = None  # the last drawing failure shown, until a draw succeeds
        model.statesChanged.connect(self.schedule)
        model.sceneChanged.connect(self.schedule)
        model.focusChanged.connect(self.schedule)
        model.focusChanged.connect(self._tabs_for_focus)
        model.sceneChanged.connect(self._tabs_for_focus)
        self._tabs_for_focus()

    def _tabs_for_focus(self) -> None:
        """A fastener has one 2D picture (its section schematic), shown in the first tab; the
        other tabs are for holes and pins."""
        fast = self.model.focus_fastener() is not None
        for i, (_key, title) in enumerate(self.TABS):
            text = "Fastener section" if fast and i == 0 else title
            if self.tabText(i) != text:
                self.setTabText(i, text)
            self.setTabEnabled(i, not fast or i == 0)
        if fast and self.currentIndex() != 0:
            self.setCurrentIndex(0)

    TABS = (("through", "Through-view"), ("section", "Section"), ("bonus", "Bonus chart"))  # figures.VIEWS_2D
    VIEW_NAMES = {"through": "through-view", "section": "section view", "bonus": "bonus chart"}

    def schedule(self) -> None:
        self.stale = {k for k, _ in self.TABS}
        if not self._pending:
            self._pending = True
            QTimer.singleShot(0, self.refresh_current)

    def current_key(self) -> str:
        return self.TABS[self.currentIndex()][0]

    def refresh_current(self) -> None:
        self._pending = False
        key = self.current_key()
        if key in self.stale:
            self.draw(key)

    def subject(self):
        """What the 2D views show: the mate in focus (or of the focused feature), else the feature;
        for a fastener its id as ("fastener", id)."""
        fast = self.model.focus_fastener()
        if fast is not None:
            return ("fastener", fast)
        mi = self.model.focus_mate()
        kind, key = self.model.focus
        if kind == "feature" and (mi is None or self.model.scene.feature(key).tolerance is None):
            return key
        return mi if mi is not None else key

    def make_figure(self, key: str):
        """The figure of the 2D view ``key``. Free text in it (names, ids, titles, report fields)
        is drawn as written: matplotlib's math markup is off while the figure is made, so a
        ``$`` in a name is a dollar sign (each text keeps that setting)."""
        import matplotlib

        m = self.model
        sub = self.subject()
        with matplotlib.rc_context({"text.parse_math": False}):
            if isinstance(sub, tuple):  # a fastener: its section schematic (the report's), in every tab
                from viewer.report import fastener_figure

                return fastener_figure(m.result, sub[1])
            fig, _data = self.figures_mod.draw_view(key, m.result, sub, dict(m.states))
            return fig

    def draw(self, key: str) -> None:
        """Draw the view ``key``; a figure that cannot be made or drawn leaves the last one shown
        and says why in the message bar."""
        import matplotlib

        c = self.canvases[key]
        old = c.figure
        try:
            fig = self.make_figure(key)
            c.adopt(fig)
            with matplotlib.rc_context({"text.parse_math": False}):
                c.draw()
        except Exception as e:
            if c.figure is not old:  # back to the last figure that drew
                c.adopt(old)
                try:
                    c.draw()
                except Exception:
                    pass
            self.stale.discard(key)  # not retried on every paint; the next change tries again
            msg = draw_problem(self.VIEW_NAMES.get(key, key), e)
            if msg != self.draw_error:
                self.draw_error = msg
                self.model.message.emit("error", msg)
            return
        self.draw_error = None
        old.clear()
        self.stale.discard(key)

    def figure(self):
        return self.canvases[self.current_key()].figure
