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

import pyvista as pv

from .. import style as S
from .overlays import _text_box, drawn_text, source_text, stack_left
from .plotter import _font_px, _label_groups, _readout_texts, add_to_plotter, callouts

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
class _TextSlot:
    """One screen-text actor of the readout block (``height``: of its text when it was made)."""

    actor: object
    kind: str
    text: str
    height: int

    @classmethod
    def of(cls, actor, kind, text):
        if not hasattr(actor, "GetInput") or source_text(actor) != text:
            return None
        return cls(actor, kind, text, _text_box(actor.GetInput(), actor.GetTextProperty())[1])

    def set(self, text: str, colour: str) -> None:
        if text != self.text:
            self.actor.SetInput(drawn_text(self.actor, text))  # wrapped as the actor's first text was
            if hasattr(self.actor, "_matezone_text"):
                self.actor._matezone_text = text
            self.text = text
        tp = self.actor.GetTextProperty()
        rgb = S.rgb(colour)
        if tuple(tp.GetColor()) != rgb:
            tp.SetColor(*rgb)


def _label_style(lb) -> tuple:
    """What a label's text actor is made with beyond its text, colour and anchor: a label of
    another size or frame needs a new actor."""
    return (lb.size, lb.layer == "datum")


class LiveScene:
    """The actors of the scene shown on ``plotter`` (``actors``: layer name -> actors, as
    :func:`add_to_plotter` returns them), ready to take the next scene in place."""

    def __init__(self, plotter):
        self.plotter = plotter
        self.actors: dict[str, list] = {}
        self.text_key = None  # (window size, layers shown) the text actors were made for
        self._feeds: dict[int, _Feed] = {}  # id of a mesh actor -> the mesh it draws, its own
        self._sig = None  # structure of the scene whose actors are on the plotter
        self._labels = None  # the callouts (one per label) that can take new text in place
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
        c = callouts(p)
        if c is not None:
            c.remove()
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
        lbs = [lb for _k, group in _label_groups(scene, show) for lb in group]
        if [_label_style(lb) for lb in lbs] != [_label_style(lb) for lb in self._labels.labels]:
            return False
        texts = _readout_texts(scene, show)
        if [k for k, _t, _c in texts] != [sl.kind for sl in self._readouts]:
            return False
        # a readout block grown wider than the caption was placed clear of: laid out anew; taller
        # or shorter: the verdict lines are stacked again under it (plotter.stack_left)
        for (_k, t, _c), sl in zip(texts, self._readouts):
            left = getattr(sl.actor, "_matezone_left_w", None)
            if left is not None and t != sl.text \
                    and _text_box(drawn_text(sl.actor, t), sl.actor.GetTextProperty())[0] > left:
                return False
        self._labels.set(lbs)
        for sl, (_k, t, c) in zip(self._readouts, texts):
            sl.set(t, c)
        stack_left([sl.actor for sl in self._readouts], self.plotter.window_size[1], _font_px(self.plotter))
        return True

    def _record_text(self, scene, visible) -> None:
        """Remember which text actor holds which label group / readout line, after checking
        that the actors add_to_plotter made hold exactly those strings (else: no in-place
        updates, the text is re-made each time)."""
        show = self._text_layers(visible)
        self.text_key = (tuple(self.plotter.window_size), frozenset(show))
        lbs = [lb for _k, group in _label_groups(scene, show) for lb in group]
        c = callouts(self.plotter)
        self._labels = c if c is not None and [lb.text for lb in c.labels] == [lb.text for lb in lbs] else None
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
