"""The 3D labels as callouts that never collide: each label is a screen text placed near the
projection of its anchor, clear of the other labels, of the markers (the tightest-spot and axis
end dots), of the other labels' anchors and of the texts and colour bar over the picture, with a
leader line back to its anchor when it had to move away. The placement is re-done before every
render (the camera may have moved), from the anchors' projections; it costs a few numpy
operations per label.

:func:`place` is the pure placement (pixels in, boxes out); :class:`Callouts` holds the actors
of one plotter and re-places them.

>>> boxes = place([(100, 100), (104, 100)], [(60, 14), (60, 14)], obstacles=[], area=(0, 400, 0, 300))
>>> a, b = boxes
>>> a[1] <= b[0] or b[1] <= a[0] or a[3] <= b[2] or b[3] <= a[2]  # no overlap
True
"""

from __future__ import annotations

import numpy as np

from .. import style as S

PAD = 4.0  # pixels kept between a label and anything else
LEADER = "#5C636A"  # the leader lines' grey
MARKER_POINTS = 16
WRAP = 0.6  # a label wider than this share of the window is broken into rows at its words  # a point mesh with at most this many points is a marker labels keep clear of

# offsets tried, in units of (label width, label height) from the preferred place, nearest first
_STEPS = [(0, 0)] + sorted(
    [(dx, dy) for dx in (-1.0, -0.5, 0.0, 0.5) for dy in np.arange(-7.0, 7.5, 0.5) if (dx, dy) != (0, 0)]
    + [(dx, dy) for dx in (-2.2, 1.2) for dy in np.arange(-4.0, 4.5, 1.0)],
    key=lambda s: (abs(s[0]) * 2.5 + abs(s[1]), s[1] < 0, s[0]))


def _overlap(c: np.ndarray, obs: np.ndarray) -> np.ndarray:
    """Area each candidate box in ``c`` (n, 4: x0, x1, y0, y1) shares with the boxes ``obs``."""
    if len(obs) == 0:
        return np.zeros(len(c))
    w = np.minimum(c[:, None, 1], obs[None, :, 1]) - np.maximum(c[:, None, 0], obs[None, :, 0])
    h = np.minimum(c[:, None, 3], obs[None, :, 3]) - np.maximum(c[:, None, 2], obs[None, :, 2])
    return (np.clip(w, 0, None) * np.clip(h, 0, None)).sum(axis=1)


def place(anchors, sizes, obstacles, area, justify=None, pad: float = PAD) -> list[tuple[float, float, float, float]]:
    """Boxes (x0, x1, y0, y1), pixels, for labels of ``sizes`` (w, h) at ``anchors`` (x, y), in
    order (earlier labels are placed first and keep their place): each as near its preferred
    place (beside the anchor on the ``justify`` side: "left" puts the text to the right of the
    anchor, "right" to its left) as it can be while inside ``area`` (x0, x1, y0, y1) and clear,
    by ``pad``, of ``obstacles`` (boxes), of the labels placed before it and of every other
    label's anchor. Where no place is clear, the one overlapping least is taken."""
    anchors = np.asarray(anchors, float).reshape(-1, 2)
    justify = list(justify) if justify is not None else ["left"] * len(anchors)
    fixed = [tuple(map(float, o)) for o in obstacles]
    pts = [(x - pad, x + pad, y - pad, y + pad) for x, y in anchors]
    steps = np.array(_STEPS, float)
    out: list[tuple[float, float, float, float]] = []
    ax0, ax1, ay0, ay1 = area
    for i, ((x, y), (w, h)) in enumerate(zip(anchors, sizes)):
        x0 = x + pad if justify[i] != "right" else x - pad - w
        y0 = y - h / 2.0
        cx = x0 + steps[:, 0] * (w + pad) * (1 if justify[i] != "right" else -1)
        cy = y0 + steps[:, 1] * (h + pad) * 0.5
        # each place followed by itself slid into the area (a label near an edge keeps its row)
        sx = np.clip(cx, ax0, max(ax0, ax1 - w))
        sy = np.clip(cy, ay0, max(ay0, ay1 - h))
        cx = np.stack([cx, sx], axis=1).ravel()
        cy = np.stack([cy, sy], axis=1).ravel()
        cand = np.stack([cx, cx + w, cy, cy + h], axis=1)
        grown = np.array(fixed + out + [p for k, p in enumerate(pts) if k != i], float).reshape(-1, 4)
        grown = grown + np.array([-pad, pad, -pad, pad])
        bad = _overlap(cand, grown)
        outside = (np.clip(ax0 - cand[:, 0], 0, None) + np.clip(cand[:, 1] - ax1, 0, None)) * h \
            + (np.clip(ay0 - cand[:, 2], 0, None) + np.clip(cand[:, 3] - ay1, 0, None)) * w
        cost = bad + outside
        k = int(np.argmax(cost <= 0)) if np.any(cost <= 0) else int(np.argmin(cost))
        out.append(tuple(float(v) for v in cand[k]))
    return out


def leader(anchor, box, pad: float = PAD) -> tuple[tuple[float, float], tuple[float, float]] | None:
    """The leader line from ``anchor`` to the nearest point of ``box`` (x0, x1, y0, y1); None where
    the box lies beside its anchor (within twice ``pad``).

    >>> leader((0, 0), (3, 50, -5, 5)) is None
    True
    >>> leader((0, 0), (0, 40, 30, 44))
    ((0.0, 0.0), (0.0, 30.0))
    """
    x, y = float(anchor[0]), float(anchor[1])
    nx = min(max(x, box[0]), box[1])
    ny = min(max(y, box[2]), box[3])
    if np.hypot(nx - x, ny - y) <= 2 * pad:
        return None
    return (x, y), (float(nx), float(ny))


def project_points(renderer, points: np.ndarray) -> np.ndarray:
    """Display coordinates (pixels, origin bottom left) of world ``points`` (n, 3) through the
    renderer's camera, vectorised (the same transform as VTK's WorldToDisplay)."""
    pts = np.asarray(points, float).reshape(-1, 3)
    if len(pts) == 0:
        return np.zeros((0, 2))
    w, h = renderer.GetRenderWindow().GetSize() if renderer.GetRenderWindow() else (1, 1)
    vx0, vy0, vx1, vy1 = renderer.GetViewport()
    vw, vh = max((vx1 - vx0) * w, 1.0), max((vy1 - vy0) * h, 1.0)
    m = renderer.GetActiveCamera().GetCompositeProjectionTransformMatrix(vw / vh, -1, 1)
    mat = np.array([[m.GetElement(r, c) for c in range(4)] for r in range(4)])
    q = np.c_[pts, np.ones(len(pts))] @ mat.T
    ndc = q[:, :2] / np.where(np.abs(q[:, 3:4]) < 1e-300, 1e-300, q[:, 3:4])
    return np.c_[vx0 * w + (ndc[:, 0] + 1) * vw / 2, vy0 * h + (ndc[:, 1] + 1) * vh / 2]


class Callouts:
    """The callout actors of one plotter: one screen text per label and one actor holding the
    leader lines; :meth:`relayout` places them for the camera of the moment (it runs before every
    render, as an observer of the renderer, and only works when the camera, window or labels
    changed)."""

    def __init__(self, plotter, labels, font_px, markers=()):
        import vtk

        self.plotter = plotter
        self.labels = list(labels)
        self.anchors = np.array([lb.point for lb in self.labels], float).reshape(-1, 3)
        self.texts: list = []
        from .overlays import _set_wrapped

        wrap = WRAP * max(plotter.window_size[0], 1)
        for lb, fpx in zip(self.labels, font_px):
            t = vtk.vtkTextActor()
            tp = t.GetTextProperty()
            tp.SetFontFamilyAsString(S.FONT_FAMILY.capitalize())
            tp.BoldOn()
            tp.SetFontSize(int(fpx))
            tp.SetColor(*S.rgb(lb.colour))
            tp.SetBackgroundColor(*S.rgb(S.BACKGROUND))
            framed = lb.layer == "datum"
            tp.SetBackgroundOpacity(1.0 if framed else 0.85)
            tp.SetFrame(framed)
            tp.SetFrameColor(*S.rgb(S.TEXT))
            tp.SetJustificationToLeft()
            tp.SetVerticalJustificationToBottom()
            _set_wrapped(t, lb.text, wrap, hang=0)  # a long label (or one drawn large for print) on two rows
            plotter.renderer.AddViewProp(t)
            self.texts.append(t)
        self._lines = vtk.vtkPolyData()
        self._lines.SetPoints(vtk.vtkPoints())
        self._lines.SetLines(vtk.vtkCellArray())
        mapper = vtk.vtkPolyDataMapper2D()
        mapper.SetInputData(self._lines)
        self.leaders = vtk.vtkActor2D()
        self.leaders.SetMapper(mapper)
        self.leaders.GetProperty().SetColor(*S.rgb(LEADER))
        self.leaders.GetProperty().SetLineWidth(1.2)
        plotter.renderer.AddViewProp(self.leaders)
        self.markers: list = list(markers)  # actors drawing a few points as dots, which labels keep clear of
        self._sizes: dict = {}
        self._off: set[int] = set()  # labels hidden because their anchor is out of the picture
        self._key = None
        self.boxes: list[tuple[float, float, float, float]] = []
        ren = plotter.renderer
        old = getattr(ren, "_matezone_callouts", None)
        if old is not None:
            old.remove()
        ren._matezone_callouts = self
        self._tag = ren.AddObserver("StartEvent", lambda *_: self.relayout())

    @property
    def actors(self) -> list:
        return [*self.texts, self.leaders]

    def remove(self) -> None:
        """Take the actors off the plotter and stop placing them."""
        ren = self.plotter.renderer
        ren.RemoveObserver(self._tag)
        for a in self.actors:
            ren.RemoveViewProp(a)
        if getattr(ren, "_matezone_callouts", None) is self:
            ren._matezone_callouts = None

    def add_markers(self, actors) -> None:
        """Actors drawing a few points as dots (their points are read at each placement, so a
        what-if move that shifts them is followed)."""
        self.markers += list(actors)
        self._key = None

    def set(self, labels) -> None:
        """New texts, colours and anchors of the same labels (the window's what-if path)."""
        labels = list(labels)
        from .overlays import drawn_text

        for t, old, lb in zip(self.texts, self.labels, labels):
            if lb.text != old.text:
                t.SetInput(drawn_text(t, lb.text))
                t._matezone_text = lb.text
            if lb.colour != old.colour:
                t.GetTextProperty().SetColor(*S.rgb(lb.colour))
        self.labels = labels
        self.anchors = np.array([lb.point for lb in labels], float).reshape(-1, 3)
        self._key = None

    def _size(self, t) -> tuple[float, float]:
        from .overlays import _text_box

        tp = t.GetTextProperty()
        key = (t.GetInput(), tp.GetFontSize())
        if key not in self._sizes:
            self._sizes[key] = tuple(float(v) for v in _text_box(t.GetInput(), tp))
        return self._sizes[key]

    def relayout(self) -> None:
        """Place every shown label for the camera of the moment (nothing when nothing changed)."""
        ren = self.plotter.renderer
        cam = ren.GetActiveCamera()
        wanted = [i for i, t in enumerate(self.texts) if t.GetVisibility() or i in self._off]
        win = tuple(ren.GetRenderWindow().GetSize()) if ren.GetRenderWindow() else (1, 1)
        marks = [(a, a.GetMapper().GetInput()) for a in self.markers if a.GetVisibility()]
        marks = [(a, d) for a, d in marks if d is not None and d.GetNumberOfPoints()]
        key = (cam.GetMTime(), win, tuple(wanted), tuple((id(a), d.GetMTime()) for a, d in marks), id(self.labels))
        if key == self._key:
            return
        self._key = key
        from .plotter import overlay_boxes

        w, h = win
        anchors = project_points(ren, self.anchors) if len(self.anchors) else np.zeros((0, 2))
        # a label whose anchor is out of the picture (a close-up) is not drawn
        inside = {i for i in wanted if 0 <= anchors[i, 0] <= w and 0 <= anchors[i, 1] <= h}
        self._off = set(wanted) - inside
        for i in wanted:
            self.texts[i].SetVisibility(i in inside)
        shown = [i for i in wanted if i in inside]
        obstacles = list(overlay_boxes(self.plotter))
        for a, d in marks:
            r = 0.5 * a.GetProperty().GetPointSize() + 1.0
            p = np.array([d.GetPoint(k) for k in range(d.GetNumberOfPoints())])
            for x, y in project_points(ren, p):
                obstacles.append((x - r, x + r, y - r, y + r))
        area = (6.0, w - 6.0, 6.0, h - 6.0)  # the window, kept off its edges
        boxes = place(anchors[shown], [self._size(self.texts[i]) for i in shown], obstacles, area,
                      [self.labels[i].justify for i in shown])
        pts, cells = [], []
        self.boxes = [None] * len(self.texts)
        for i, box in zip(shown, boxes):
            self.texts[i].SetPosition(box[0], box[2])
            self.boxes[i] = box
            seg = leader(anchors[i], box)
            if seg is not None:
                cells.append((len(pts), len(pts) + 1))
                pts += [(*seg[0], 0.0), (*seg[1], 0.0)]
        self._set_lines(pts, cells)

    def _set_lines(self, pts, cells) -> None:
        import vtk

        vp = vtk.vtkPoints()
        for p in pts:
            vp.InsertNextPoint(*p)
        ca = vtk.vtkCellArray()
        for a, b in cells:
            ca.InsertNextCell(2)
            ca.InsertCellPoint(a)
            ca.InsertCellPoint(b)
        self._lines.SetPoints(vp)
        self._lines.SetLines(ca)
        self._lines.Modified()
