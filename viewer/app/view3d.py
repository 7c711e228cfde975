"""The 3D view of the window (pyvistaqt): the scene of the mate, feature or inspection in
focus, from :mod:`viewer.scene3d`. A what-if move keeps the actors: the view hands each new
scene to its :class:`viewer.scene3d.LiveScene`, which puts it into the existing actors in place
(new meshes by shallow copy, new label and readout strings and anchor points) and makes actors
anew only when the scene's structure changes. The legend is shown under the picture, merged with
the layer toggles (:class:`.panels.layers.LayerList`).
"""

from __future__ import annotations

import time
from dataclasses import replace

import numpy as np
from PyQt5.QtCore import QEvent, QObject, QTimer, pyqtSignal
from PyQt5.QtWidgets import QHBoxLayout, QLabel, QToolButton, QVBoxLayout, QWidget

from viewer.windowlogic.layers import LAYER_NAMES, layer_name, layer_rows

from .model import SceneModel
from .panels.layers import LayerList, StayOpenMenu
from .views import DrawError, draw_problem

__all__ = ["LAYER_NAMES", "View3D", "layer_name"]

HIDDEN_IN_WINDOW = {"readouts"}  # the window's readout table shows these numbers already
WINDOW_CENTRE = (0.0, 0.05)  # camera window centre in the window: centred, a little low (labels above)
VIEW_NAMES = {"iso": "Iso", "top": "Top", "section": "Section", "gap": "Close-up"}
VIEW_TIPS = {"top": "Camera: normal to datum A, looking through the hole",
             "gap": "Camera: the section closed in on the tightest spot of the fit, where the gap (or the "
                    "overlap) is smallest; only a mate has one"}


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
        for v in (*scene3d.VIEWS, scene3d.CLOSE_UP):
            b = QToolButton()
            b.setText(VIEW_NAMES.get(v, v))
            b.setToolTip(VIEW_TIPS.get(v, f"Camera: {VIEW_NAMES.get(v, v)}"))
            b.clicked.connect(lambda _c=False, v=v: self.set_view(v))
            bar.addWidget(b)
            self.view_buttons[v] = b
        self.layer_button = QToolButton()
        self.layer_button.setText("Layers ▾")
        self.layer_button.setPopupMode(QToolButton.InstantPopup)
        self.layer_menu = StayOpenMenu(self)  # open while layers are toggled
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
        self.layer_list = LayerList(self.layer_actions)  # the legend and the layer toggles, merged
        lay.addWidget(self.layer_list)
        self.visible: set[str] = {n for n, a in self.layer_actions.items() if a.isChecked()}
        self.live = scene3d.LiveScene(self.plotter)  # the actors on the plotter, updated in place
        self.current = None  # Scene3D shown
        self.current_view = "iso"
        self._framed = None  # the camera as last framed by set_view (a user move differs)
        self._focus_key = None
        self._pending = False
        self.closed = False
        self.last_update_s = 0.0
        self.cut_iso = True  # iso drawn cut open at the plane of the tilt, as the report draws it
        self._cut = None  # is the scene shown cut open?
        self._shown_cache = None  # ((id of the scene, view), scene, scene as shown)
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

    @property
    def actors(self) -> dict[str, list]:
        """Layer name -> the actors on the plotter (:meth:`viewer.scene3d.add_to_plotter`'s)."""
        return self.live.actors

    @property
    def _text_key(self):
        """(window size, layers shown) the text overlays were made for (None: none made)."""
        return self.live.text_key

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
        if kind == "pattern":  # both parts of the interface the pattern takes part in
            from viewer.scene3d.interface import build_interface_scene, interfaces_of

            sizes = {fid: st.size for fid, st in m.states.items()}
            return build_interface_scene(m.result, interfaces_of(m.result, key)[0], datum_sizes=sizes)
        if kind not in ("mate", "feature", "inspection"):
            return None  # a fastener (or nothing): no 3D picture
        if kind == "inspection":
            insp = m.shown_inspection()
            return None if insp is None else s.build_inspection_scene(m.result, insp)
        if kind == "mate":
            return s.build_mate_scene(m.result, key, states=dict(m.states))
        return s.build_feature_scene(m.result, key, state=m.states[key])

    def _has_picture(self) -> bool:
        """Does the focus have a 3D picture (a pattern: only where it takes part in an interface)?"""
        kind, key = self.model.focus
        if kind == "pattern":
            from viewer.scene3d.interface import interfaces_of

            return bool(interfaces_of(self.model.result, key))
        return kind in ("mate", "feature", "inspection")

    def update_now(self) -> None:
        self._pending = False
        self._timer.stop()  # a rebuild asked for before this one is served by it
        if self.closed:
            return
        t0 = time.perf_counter()
        if not self._has_picture():
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

    def _clear_actors(self) -> None:
        self.live.clear()  # a broken plotter: what can be removed is, the rest forgotten
        self._shown_cache = None

    def show_nothing(self) -> None:
        """A focus with no 3D picture (a fastener pattern): the view is emptied and says so."""
        self._clear_actors()
        self.current = None
        self._focus_key = self.model.focus
        kind, key = self.model.focus
        self.caption.setText(f"{kind} {key}: no 3D picture; its schematic is in the 2D view, its numbers "
                             "in the readouts" if key is not None else "nothing to show")
        self.layer_list.setVisible(False)
        self.render()
        self.rendered.emit()

    def show_scene(self, sc3) -> None:
        """Replace the actors by those of ``sc3``; the camera stays unless the focus changed."""
        first = self.current is None or self._focus_key != self.model.focus
        self._focus_key = self.model.focus
        self.current = sc3
        self.caption.setText(sc3.caption)
        close_up = self.scene3d_mod.CLOSE_UP
        self.view_buttons[close_up].setEnabled(close_up in sc3.cameras)
        if self.current_view not in sc3.cameras:  # the close-up of a scene with no fit
            self.current_view, first = "iso", True
        aimed = not first and self.current_view == close_up and self._camera_now() == self._framed
        if first or not self._update_in_place():
            self._readd()
        if first or aimed:  # the close-up follows the tightest spot while the user has not turned it
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

    def _update_in_place(self) -> bool:
        """Same focus, same structure: the new scene into the existing actors
        (:meth:`viewer.scene3d.LiveScene.update`). False if a full re-add is needed."""
        shown = self._shown()
        if not self.live.update(shown, self.visible, tag=shown is not self.current):
            return False
        self._update_legend(shown)
        return True

    def _readd(self, shown=None) -> None:
        shown = shown if shown is not None else self._shown()
        self._cut = shown is not self.current
        self.live.readd(shown, self.visible, tag=self._cut)
        # the legend box is unreadably small in a window-sized view: the same rows are shown as
        # Qt text under the view; the clearance colour bar stays in the picture
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
        if getattr(self, "_framed", None) is not None and self._camera_now() == self._framed:
            # the camera is still the one framed for the old size (the user has not turned it):
            # frame the model again for the new size
            self.set_view(self.current_view, render=False)
            moved = True
        if moved or stale:
            self.render()

    def _camera_now(self) -> tuple:
        """The camera's position, focal point and up vector, to tell a user's move from a frame."""
        return tuple(tuple(round(float(c), 9) for c in v) for v in self.plotter.camera_position)

    def _place_scalar_bar(self) -> bool:
        """Keep the colour bar and its title inside the view; True if a bar moved."""
        return False if self.closed else self.scene3d_mod.keep_scalar_bars_in_view(self.plotter)

    def _update_legend(self, shown) -> None:
        """The in-picture legend box stays hidden (unreadably small in a window-sized view; the
        clearance colour bar stays); the layer list under the view shows its rows instead, one per
        layer of the scene shown, with its checkbox."""
        p = self.plotter
        bars = {id(b) for b in p.scalar_bars.values()}
        for a in self.actors.get("legend", []):
            if id(a) not in bars:
                a.SetVisibility(False)
        sc3 = self.current if self.current is not None else shown
        self.layer_list.set_rows(layer_rows(sc3, self.scene3d_mod.LAYERS, self.model.scene.standard))
        self.layer_list.setVisible(bool(self.layer_list.rows))

    # ------------------------------------------------------------ camera and layers

    def set_view(self, view: str, render: bool = True) -> None:
        if self.current is None or self.closed or view not in self.current.cameras:
            return
        self.current_view = view
        shown = self._shown(view)
        if (shown is not self.current) != self._cut:
            self._readd(shown)
        # the scene's camera leaves the top-left corner to the numbers on the picture; the window
        # shows them in the table instead, so the model is framed into the area the overlays drawn
        # here (the colour bar, the labels) leave free, filling it
        self.scene3d_mod.apply_view(self.plotter, replace(self.current, window_centre=WINDOW_CENTRE), view,
                                    frame=True)
        self._framed = self._camera_now()
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
