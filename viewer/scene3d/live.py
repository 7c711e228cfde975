"""A scene kept live on a plotter (the window's 3D view): :class:`LiveScene` holds the actors
:func:`.plotter.add_to_plotter` made and puts a later scene of the same structure into them in
place (:meth:`LiveScene.show`). A what-if move then costs about one frame: the new meshes are
handed to the actors' own data objects (:class:`_Feed`), the labels and readouts take their new
strings and anchor points, and actors are only made anew when the structure, the fonts or the
layout of the readout block change. The grouping of labels and the readout texts are those of
:mod:`.plotter` (no second copy of its layout here).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pyvista as pv

from .. import style as S
from .plotter import _label_groups, _readout_texts, _text_box, add_to_plotter

MESHLESS = frozenset({"labels", "readouts", "legend"})  # layers add_to_plotter draws as text, not meshes


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
        return cls(actor, kind, text, _text_box(text, actor.GetTextProperty())[1])

    def set(self, text: str, colour: str) -> None:
        if text != self.text:
            self.actor.SetInput(text)
            self.text = text
        tp = self.actor.GetTextProperty()
        rgb = S.rgb(colour)
        if tuple(tp.GetColor()) != rgb:
            tp.SetColor(*rgb)


class LiveScene:
    """The actors of the scene shown on ``plotter`` (``actors``: layer name -> actors, as
    :func:`add_to_plotter` returns them), ready to take the next scene in place."""

    def __init__(self, plotter):
        self.plotter = plotter
        self.actors: dict[str, list] = {}
        self.text_key = None  # (window size, layers shown) the text actors were made for
        self._feeds: dict[int, _Feed] = {}  # id of a mesh actor -> the mesh it draws, its own
        self._sig = None  # structure of the scene whose actors are on the plotter
        self._labels: list[_LabelSlot] | None = None  # label actors that can take new text in place
        self._readouts: list[_TextSlot] | None = None  # readout text actors, likewise

    def show(self, scene, visible: set[str], tag=None, in_place: bool = True) -> bool:
        """Put ``scene`` (drawn as it comes: cut or whole) on the plotter with the layers
        ``visible``: into the existing actors where the structure allows (True), else with
        every actor made anew (False). ``tag`` is part of the structure (the window says
        whether the scene is cut open)."""
        if in_place and self.update(scene, visible, tag):
            return True
        self.readd(scene, visible, tag)
        return False

    def _signature(self, scene, visible, tag) -> tuple:
        return (tuple((n, tuple(it.name for it in items)) for n, items in scene.layers.items()),
                frozenset(visible), tag)

    def update(self, scene, visible: set[str], tag=None) -> bool:
        """Same layers, same meshes by name: hand the new meshes to the existing actors'
        pipelines (no new actors, no new mappers; an unchanged shared mesh is left alone) and
        give the text actors their new strings, colours and anchor points. False (nothing
        touched but meshes) if the structure changed and a full re-add is needed."""
        if self._signature(scene, visible, tag) != self._sig:
            return False
        pairs = []
        for name, items in scene.layers.items():
            if name not in visible or name in MESHLESS:
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
        return self._update_text(scene, visible)  # False: all made anew, the overlays keep their order

    def readd(self, scene, visible: set[str], tag=None) -> None:
        """Every actor of ours off the plotter, and the scene's made anew."""
        self.remove()
        added = add_to_plotter(self.plotter, scene, set(visible)) or {}
        self.actors = {k: [a for a in v if a is not None] for k, v in added.items()}
        self._feeds = {}
        for name, items in scene.layers.items():
            if name in visible and name not in MESHLESS:
                for a, it in zip(self.actors.get(name, []), items):
                    self._feeds[id(a)] = _Feed.of(a, it.mesh)
        self._sig = self._signature(scene, visible, tag)
        self._record_text(scene, visible)

    def remove(self) -> None:
        """Take every actor, scalar bar and legend of ours off the plotter (no render)."""
        p = self.plotter
        for title in list(p.scalar_bars.keys()):  # pyvista keeps a registry of its bars
            p.remove_scalar_bar(title, render=False)
        if getattr(p, "legend", None) is not None:
            p.remove_legend(render=False)
        for actors in self.actors.values():
            for a in actors:
                p.remove_actor(a, render=False)

    def clear(self) -> None:
        """Remove what can be removed (a broken plotter: nothing more) and forget it all."""
        try:
            self.remove()
        except Exception:
            pass
        self.actors, self._feeds, self._sig = {}, {}, None
        self._labels = self._readouts = None

    @staticmethod
    def _text_layers(visible) -> set[str]:
        """The layers the text actors are matched against on an update."""
        return set(visible) - {"legend"}

    def _update_text(self, scene, visible) -> bool:
        """Labels and readouts of ``scene`` into the existing text actors. False (nothing
        touched) if their number, grouping, fonts or the layout of the readout block would differ
        (or the window was resized): then every actor is made anew."""
        show = self._text_layers(visible)
        if self._labels is None or self._readouts is None \
                or self.text_key != (tuple(self.plotter.window_size), frozenset(show)):
            return False
        groups = _label_groups(scene, show)
        if [(k, len(v)) for k, v in groups] != [(sl.key, len(sl.texts)) for sl in self._labels]:
            return False
        texts = _readout_texts(scene, show)
        if [k for k, _t, _c in texts] != [sl.kind for sl in self._readouts]:
            return False
        # the readout block is laid out from the heights of its texts: the same heights keep every
        # position, so only the strings change; otherwise it is laid out anew
        heights = [_text_box(t, sl.actor.GetTextProperty())[1] if t != sl.text else sl.height
                   for (_k, t, _c), sl in zip(texts, self._readouts)]
        if heights != [sl.height for sl in self._readouts]:
            return False
        for sl, (_k, lbs) in zip(self._labels, groups):
            sl.set([lb.text for lb in lbs], np.array([lb.point for lb in lbs], dtype=float))
        for sl, (_k, t, c) in zip(self._readouts, texts):
            sl.set(t, c)
        return True

    def _record_text(self, scene, visible) -> None:
        """Remember which text actor holds which label group / readout line, after checking
        that the actors add_to_plotter made hold exactly those strings (else: no in-place
        updates, the text is re-made each time)."""
        show = self._text_layers(visible)
        self.text_key = (tuple(self.plotter.window_size), frozenset(show))
        groups = _label_groups(scene, show)
        actors = self.actors.get("labels", [])
        labels = [_LabelSlot.of(a, k, lbs) for a, (k, lbs) in zip(actors, groups)]
        self._labels = labels if len(actors) == len(groups) and all(labels) else None
        texts = _readout_texts(scene, show)
        actors = self.actors.get("readouts", [])
        readouts = [_TextSlot.of(a, k, t) for a, (k, t, _c) in zip(actors, texts)]
        self._readouts = readouts if len(actors) == len(texts) and all(readouts) else None


def keep_scalar_bars_in_view(plotter) -> bool:
    """Keep each colour bar and its title inside the view: the title is centred over the bar
    and is wider than it, so the bar moves left until the title's right end clears the edge.
    True if a bar moved."""
    bars = list(plotter.scalar_bars.values())
    if not bars:
        return False
    w = max(int(plotter.window_size[0]), 1)
    moved = False
    for bar in bars:
        title_w = _text_box(bar.GetTitle(), bar.GetTitleTextProperty())[0] / w
        width = bar.GetWidth()
        margin = 0.015
        x = min(0.90, 1.0 - margin - width / 2 - title_w / 2)
        old = tuple(bar.GetPosition())
        bar.SetPosition(max(0.5, x), old[1])
        moved = moved or tuple(bar.GetPosition()) != old
    return moved
