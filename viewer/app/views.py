"""The 3D view (pyvistaqt) and the 2D views (matplotlib canvases) of the window.

Both rebuild from the model on its signals: the meshes come from :mod:`viewer.scene3d`, the
figures from :mod:`viewer.figures`; nothing here computes a tolerance number.
Updates are coalesced: a burst of slider moves costs one rebuild per event-loop turn.
"""

from __future__ import annotations

import time
from dataclasses import replace

from PyQt5.QtCore import QTimer, pyqtSignal
from PyQt5.QtWidgets import (
    QActionGroup, QHBoxLayout, QLabel, QMenu, QTabWidget, QToolButton, QVBoxLayout, QWidget,
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
    "labels": "Labels",
    "readouts": "Numbers on the picture",
    "legend": "Colour legend",
}
HIDDEN_IN_WINDOW = {"readouts"}
MESHLESS = {"labels", "readouts", "legend"}  # layers add_to_plotter draws as text, not meshes  # the window's readout table shows these numbers already
VIEW_NAMES = {"iso": "Iso", "top": "Top (through A)", "section": "Section"}


class View3D(QWidget):
    """The interactive 3D scene of the mate or feature in focus."""

    rendered = pyqtSignal()  # emitted after each full rebuild and render

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
            a = self.layer_menu.addAction(LAYER_NAMES.get(name, name))
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
        self.plotter = QtInteractor(self)
        self.plotter.set_background("white")
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
        model.statesChanged.connect(self.schedule)
        model.sceneChanged.connect(self.schedule)
        model.focusChanged.connect(self.schedule)

    # ------------------------------------------------------------ building

    def schedule(self) -> None:
        if not self._pending:
            self._pending = True
            QTimer.singleShot(0, self.update_now)

    def build(self):
        """The Scene3D of the focus at the current what-if states."""
        m = self.model
        kind, key = m.focus
        s = self.scene3d_mod
        if kind == "mate":
            return s.build_mate_scene(m.result, key, states=dict(m.states))
        return s.build_feature_scene(m.result, key, state=m.states[key])

    def update_now(self) -> None:
        self._pending = False
        if self.closed:
            return
        t0 = time.perf_counter()
        sc3 = self.build()
        self.show_scene(sc3)
        self.last_update_s = time.perf_counter() - t0

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
        self.plotter.render()
        self.rendered.emit()

    def _shown(self):
        """The scene as drawn from the current camera: the section view cuts it."""
        if self.current_view == "section":
            return self.scene3d_mod.section_cut(self.current)
        return self.current

    def _signature(self, shown) -> tuple:
        return (tuple((n, tuple(it.name for it in items)) for n, items in shown.layers.items()),
                frozenset(self.visible), self.current_view == "section")

    def _update_in_place(self) -> bool:
        """Same focus, same layers, same meshes by name: hand the new meshes to the existing
        actors (no new actors, no new mappers) and re-add only the text. False if the
        structure changed and a full re-add is needed."""
        shown = self._shown()
        if self._signature(shown) != getattr(self, "_sig", None):
            return False
        p = self.plotter
        for name, items in shown.layers.items():
            if name not in self.visible or name in MESHLESS:
                continue
            actors = self.actors.get(name, [])
            if len(actors) < len(items):
                return False
            for a, it in zip(actors, items):
                a.mapper.SetInputData(it.mesh)
                clim = it.style.get("clim")
                if clim is not None:
                    a.mapper.scalar_range = tuple(clim)
        for layer in MESHLESS - {"legend"}:
            for a in self.actors.get(layer, []):
                p.remove_actor(a, render=False)
            self.actors[layer] = []
        text_only = replace(shown, layers={})
        added = self.scene3d_mod.add_to_plotter(p, text_only, set(self.visible) - {"legend"}) or {}
        for layer in MESHLESS - {"legend"}:
            self.actors[layer] = [a for a in added.get(layer, []) if a is not None]
        self._update_legend(shown)
        return True

    def _readd(self) -> None:
        p = self.plotter
        for title in list(p.scalar_bars.keys()):  # pyvista keeps a registry of its bars
            p.remove_scalar_bar(title, render=False)
        if getattr(p, "legend", None) is not None:
            p.remove_legend(render=False)
        for actors in self.actors.values():
            for a in actors:
                p.remove_actor(a, render=False)
        shown = self._shown()
        added = self.scene3d_mod.add_to_plotter(p, shown, set(self.visible)) or {}
        self.actors = {k: [a for a in v if a is not None] for k, v in added.items()}
        # the legend box is unreadably small in a window-sized view: the same rows are shown as
        # Qt text under the view; the clearance colour bar stays in the picture
        self._sig = self._signature(shown)
        self._update_legend(shown)

    def _update_legend(self, shown) -> None:
        p = self.plotter
        bars = {id(b) for b in p.scalar_bars.values()}
        for a in self.actors.get("legend", []):
            if id(a) not in bars:
                a.SetVisibility(False)
        rows = [(lbl, col) for (lbl, col), layer in zip(shown.legend, shown.legend_layers)
                if layer in self.visible]
        self.legend.setText("  ".join(
            f"<span style='color:{col}; font-size:14pt'>■</span>&nbsp;{_html(lbl)}" for lbl, col in rows)
            if "legend" in self.visible else "")
        self.legend.setVisible("legend" in self.visible and bool(rows))

    # ------------------------------------------------------------ camera and layers

    def set_view(self, view: str, render: bool = True) -> None:
        if self.current is None or self.closed or view not in self.current.cameras:
            return
        cut_changed = (view == "section") != (self.current_view == "section")
        self.current_view = view
        if cut_changed:
            self._readd()
        p = self.plotter
        p.camera_position = self.current.cameras[view]
        scale = self.current.parallel_scale.get(view)
        p.camera.parallel_projection = scale is not None
        if scale is not None:
            p.camera.parallel_scale = scale
        else:
            p.camera.view_angle = 30.0
        p.reset_camera_clipping_range()
        if render:
            p.render()

    def set_layer(self, name: str, on: bool) -> None:
        (self.visible.add if on else self.visible.discard)(name)
        if self.current is not None and not self.closed:
            self._readd()
            self.plotter.render()

    def image(self):
        """The current 3D picture as an RGB array."""
        return self.plotter.screenshot(return_img=True)

    def close_plotter(self) -> None:
        if not self.closed:
            self.closed = True
            self.plotter.close()


def _html(text: str) -> str:
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


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
        model.statesChanged.connect(self.schedule)
        model.sceneChanged.connect(self.schedule)
        model.focusChanged.connect(self.schedule)

    TABS = (("through", "Through-view"), ("section", "Section"), ("bonus", "Bonus chart"))  # figures.VIEWS_2D

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
        """What the 2D views show: the mate in focus (or of the focused feature), else the feature."""
        mi = self.model.focus_mate()
        kind, key = self.model.focus
        if kind == "feature" and (mi is None or self.model.scene.feature(key).tolerance is None):
            return key
        return mi if mi is not None else key

    def make_figure(self, key: str):
        m = self.model
        fig, _data = self.figures_mod.draw_view(key, m.result, self.subject(), dict(m.states))
        return fig

    def draw(self, key: str) -> None:
        c = self.canvases[key]
        fig = self.make_figure(key)
        old = c.figure
        c.adopt(fig)
        c.draw()
        old.clear()
        self.stale.discard(key)

    def figure(self):
        return self.canvases[self.current_key()].figure
