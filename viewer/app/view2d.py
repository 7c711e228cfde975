"""The 2D views of the window: matplotlib figures of :mod:`viewer.figures` in tabs, each on a
canvas that keeps the figure's designed page (:func:`_fit_canvas_class`); only the tab shown is
redrawn, the others when they are opened.
"""

from __future__ import annotations

from PyQt5.QtCore import QTimer
from PyQt5.QtWidgets import QTabWidget

from .model import SceneModel
from .views import draw_problem

MARKS_MEASURED = ("through", "bonus")  # the 2D views that mark a measured part when one is shown


def font_scale() -> float:
    """The desktop's text size against the one the figures are drawn for (9 pt at 96 dots per
    inch, 12 pixels), from the application font as Qt renders it; 1 to 1.6."""
    from PyQt5.QtGui import QFontInfo
    from PyQt5.QtWidgets import QApplication

    app = QApplication.instance()
    if app is None:
        return 1.0
    px = QFontInfo(app.font()).pixelSize()
    return min(1.6, max(1.0, px / 12.0))


MIN_PAGE = (6.0, 4.5)  # inches: the smallest page the figures are laid out for


def pane_figsize(w_px: float, h_px: float, scale: float) -> tuple[float, float]:
    """The page (inches) to draw a window figure on for a pane of ``w_px`` x ``h_px`` pixels so
    its text shows at ``scale`` times 9 pt at 96 dots per inch: the pane at 96 x ``scale`` dots
    per inch, grown (aspect kept) to at least :data:`MIN_PAGE`, which the figures' layout needs.

    >>> pane_figsize(960, 720, 1.0), pane_figsize(480, 360, 1.0)
    ((10.0, 7.5), (6.0, 4.5))
    """
    d = 96.0 * scale
    fw, fh = max(w_px, 1.0) / d, max(h_px, 1.0) / d
    k = max(1.0, MIN_PAGE[0] / fw, MIN_PAGE[1] / fh)
    return fw * k, fh * k


def _fit_canvas_class():
    from matplotlib.backends.backend_qt5agg import FigureCanvasQTAgg

    class FitCanvas(FigureCanvasQTAgg):
        """A canvas that scales the figure's resolution so the page the figure was drawn for
        (:func:`pane_figsize` for the window's figures, else its own size) fits the widget: the
        layout is kept, the text scales with the widget."""

        def fit_dpi(self, w: float, h: float) -> float:
            fw, fh = getattr(self.figure, "_matezone_page", None) or self.figure.get_size_inches()
            return max(40.0, min(w / fw, h / fh))

        def adopt(self, fig) -> None:
            if getattr(fig, "_matezone_page", None) is None:
                fig._matezone_page = tuple(fig.get_size_inches())
            self.figure = fig
            r = self.device_pixel_ratio or 1.0
            w, h = max(self.width(), 200) * r, max(self.height(), 150) * r
            dpi = self.fit_dpi(w, h)
            fig._original_dpi = dpi / r
            fig.set_dpi(dpi)
            fig.set_size_inches(w / dpi, h / dpi, forward=False)
            fig.set_canvas(self)

        def resizeEvent(self, event):
            r = self.device_pixel_ratio or 1.0
            dpi = self.fit_dpi(event.size().width() * r, event.size().height() * r)
            self.figure._original_dpi = dpi / r
            self.figure.set_dpi(dpi)
            super().resizeEvent(event)
            if getattr(self, "on_resize", None) is not None:
                self.on_resize()

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
        # a pane resized: its figures are drawn again for the new page once the resizing stops
        self._resize_timer = QTimer(self)
        self._resize_timer.setSingleShot(True)
        self._resize_timer.setInterval(250)
        self._resize_timer.timeout.connect(self._repage)
        for c in self.canvases.values():
            c.on_resize = self._resize_timer.start
        self._pending = False
        self.draw_error: str | None = None  # the last drawing failure shown, until a draw succeeds
        model.statesChanged.connect(self.schedule)
        model.sceneChanged.connect(self.schedule)
        model.focusChanged.connect(self.schedule)
        model.inspectionChanged.connect(self.schedule)
        model.focusChanged.connect(self._tabs_for_focus)
        model.sceneChanged.connect(self._tabs_for_focus)
        self._tabs_for_focus()

    def _tabs_for_focus(self) -> None:
        """A fastener has one 2D picture (its section schematic), shown in the first tab; the
        other tabs are for holes and pins."""
        fast = self.model.focus_fastener() is not None
        pat = self.model.focus_pattern() is not None
        for i, (_key, title) in enumerate(self.TABS):
            text = "Fastener section" if fast and i == 0 else "Pattern (top view)" if pat and i == 0 else title
            if self.tabText(i) != text:
                self.setTabText(i, text)
            self.setTabEnabled(i, not (fast or pat) or i == 0)
        if (fast or pat) and self.currentIndex() != 0:
            self.setCurrentIndex(0)

    TABS = (("through", "Through-view"), ("section", "Section"), ("bonus", "Bonus chart"))  # figures.VIEWS_2D
    VIEW_NAMES = {"through": "through-view", "section": "section view", "bonus": "bonus chart"}

    def schedule(self) -> None:
        self.stale = {k for k, _ in self.TABS}
        if not self._pending:
            self._pending = True
            QTimer.singleShot(0, self.refresh_current)

    def _repage(self) -> None:
        """Draw the figures again if the pane now asks for another page than they were drawn on."""
        c = self.canvases[self.current_key()]
        page = getattr(c.figure, "_matezone_page", None)
        want = pane_figsize(max(c.width(), 200), max(c.height(), 150), font_scale())
        if page is not None and max(abs(a - b) / b for a, b in zip(want, page)) > 0.05:
            self.schedule()

    def current_key(self) -> str:
        return self.TABS[self.currentIndex()][0]

    def refresh_current(self) -> None:
        self._pending = False
        key = self.current_key()
        if key in self.stale:
            self.draw(key)

    def subject(self):
        """What the 2D views show: the mate in focus (or of the focused feature), else the feature;
        for a fastener or a pattern ("fastener", id) or ("pattern", id)."""
        fast = self.model.focus_fastener()
        if fast is not None:
            return ("fastener", fast)
        pat = self.model.focus_pattern()
        if pat is not None:
            return ("pattern", pat)
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
            c = self.canvases[key]
            w, h = max(c.width(), 200), max(c.height(), 150)
            page = pane_figsize(w, h, font_scale())  # drawn for the pane, text at the desktop's size
            if isinstance(sub, tuple) and sub[0] == "pattern":  # its top view (the report's), right and wrong way
                from viewer.figures.pattern import pattern_figure
                from viewer.windowlogic.whatif import pattern_now

                fig = pattern_figure(m.result, sub[1], figsize=page, pr=pattern_now(m.result, m.scene, sub[1], m.states))
                fig._matezone_page = page
                return fig
            if isinstance(sub, tuple):  # a fastener: its section schematic (the report's), in every tab
                from viewer.report import fastener_figure

                return fastener_figure(m.result, sub[1])
            kw = {}
            insp = m.shown_inspection()
            if insp is not None and key in MARKS_MEASURED:  # the measured part, not the nominal one
                kw["measured"] = insp
            fig, _data = self.figures_mod.draw_view(key, m.result, sub, dict(m.states), figsize=page, **kw)
            fig._matezone_page = page
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
