"""A scene being assembled, and the finish that turns it into a :class:`Scene3D`.

:class:`_Built` collects layers, labels, legend rows and notes. A builder piece decorated with
:func:`replayed` adds to it and is remembered under its own arguments: a later call with equal
arguments adds the very same items (the same mesh objects) again without building them, so a
what-if move that leaves a feature as it was leaves its meshes as they were (not rebuilt, not
cut again, not uploaded again). The key is derived from every argument of the piece
(:func:`viewer.memo.key_of`), so no input can be left out of it.

:func:`_finish` adds the cameras round what was drawn and the exaggeration caption.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import wraps

import numpy as np
import pyvista as pv

from geom.analysis import SceneResult

from .. import style as S
from ..exaggeration import scale_text
from ..memo import Memo, key_of
from .scalebar import scale_bars
from .values import CLOSE_UP, LAYERS, Label, Layer, Scene3D, _Ex

DETAIL = "zones, gaps, tilts and size differences all drawn at this factor"
"""The 3D caption's own clause, after the common scale sentence (:func:`scale_text`)."""
DETAIL_TRUE = "zones, gaps, tilts and size differences drawn true"


@dataclass
class _Built:
    """Layers being assembled."""

    layers: dict[str, list[Layer]] = field(default_factory=dict)
    labels: list[Label] = field(default_factory=list)
    legend: list[tuple[str, str, str]] = field(default_factory=list)  # (label, colour, layer)
    notes: list[str] = field(default_factory=list)

    def add(self, layer: str, name: str, mesh: pv.PolyData, style: dict) -> None:
        self.layers.setdefault(layer, []).append(Layer(name, mesh, style))

    def key(self, label: str, colour: str, layer: str) -> None:
        if not any(lbl == label for lbl, _, _ in self.legend):
            self.legend.append((label, colour, layer))

    def extend(self, rec: _Built) -> None:
        """Add what ``rec`` holds, in its order (legend rows not already here)."""
        for layer, items in rec.layers.items():
            self.layers.setdefault(layer, []).extend(items)
        self.labels.extend(rec.labels)
        for label, colour, layer in rec.legend:
            self.key(label, colour, layer)
        self.notes.extend(rec.notes)


_REPLAYS = Memo("scene3d replayed pieces", 64)  # (piece, its arguments) -> (what it added, its result)


def replayed(piece):
    """Decorator for a builder piece ``piece(b, *args, **kwargs)`` that adds to the
    :class:`_Built` ``b`` and reads nothing but its arguments: it runs on an empty
    :class:`_Built`, what it added is then added to ``b`` in the same order and its result
    returned; both are remembered under the piece and :func:`viewer.memo.key_of` its arguments
    (values by value, objects that cannot be hashed by identity), and replayed for equal
    arguments. A result is shared between replays: it must be immutable (a frozen dataclass
    of read-only arrays, a number, None)."""
    name = f"{piece.__module__}.{piece.__qualname__}"

    @wraps(piece)
    def run(b: _Built, *args, **kwargs):
        key = (name, *key_of(*args, **kwargs))
        hit = _REPLAYS.get(key)
        if hit is None:
            rec = _Built()
            hit = _REPLAYS.put(key, (rec, piece(rec, *args, **kwargs)))
        b.extend(hit[0])
        return hit[1]

    return run


def _cameras(bounds, direction_deg: float, centre) -> tuple[dict, dict, tuple]:
    """Cameras round the drawn geometry ``bounds`` (datum plane excluded): iso (oblique, from
    the side the section cut opens towards), top (normal to A, tilt direction to the right),
    section (normal to the plane of the tilt, A at the bottom)."""
    x0, x1, y0, y1, z0, z1 = bounds
    c = np.array([(x0 + x1) / 2, (y0 + y1) / 2, (z0 + z1) / 2])
    R = 0.5 * math.sqrt((x1 - x0) ** 2 + (y1 - y0) ** 2 + (z1 - z0) ** 2)
    phi = math.radians(direction_deg)
    u = np.array([math.cos(phi), math.sin(phi), 0.0])
    v = np.array([-u[1], u[0], 0.0])
    z = np.array([0.0, 0.0, 1.0])
    dist = R / math.sin(math.radians(15.0)) * 1.55
    iso = 0.45 * u - 1.0 * v + 0.55 * z
    iso /= np.linalg.norm(iso)

    def t(a):
        return tuple(float(x) for x in a)

    cams = {
        "iso": (t(c + dist * iso), t(c), t(z)),
        "top": (t(c + dist * z), t(c), t(v)),
        "section": (t(c - dist * v), t(c), t(z)),
    }
    wide = max(abs(np.dot([x1 - x0, y1 - y0, 0], u)), 1e-9)
    # the picture keeps the lower-left ~60 % of the frame (readouts above, legend to the right)
    scale = {"top": max(x1 - x0, y1 - y0) / 2 / 0.58,
             "section": max((z1 - z0) / 2 / 0.60, wide / 1.6)}
    return cams, scale, (t((centre[0], centre[1], 0.0)), t(v))


def _box(b: _Built) -> tuple:
    """(x0, x1, y0, y1, z0, z1) round the drawn meshes, the datum plane apart."""
    bounds = np.array([it.mesh.bounds for name, items in b.layers.items() if name != "datum" for it in items])
    return (bounds[:, 0].min(), bounds[:, 1].max(), bounds[:, 2].min(), bounds[:, 3].max(),
            bounds[:, 4].min(), bounds[:, 5].max())


def _close_up(section, spot, ex, tightest: float, z_mid: float) -> tuple:
    """The camera of the close-up: the section camera's direction, aimed at the tightest spot
    ``spot`` (drawn coordinates; it lies in the plane of the tilt, so the section shows the gap
    there in profile), and its parallel scale: half the picture's height is three drawn gaps (the
    gap drawn ``ex.k`` times its true size) or 0.15 of the drawn radius, whichever is more. The
    spot sits in the third of the picture towards its end of the engagement (below ``z_mid``:
    the lower third), so the picture shows the fit, not the empty side beyond it."""
    pos, focal, up = (np.asarray(v, float) for v in section)
    p = np.asarray(spot, float)
    half = max(3.0 * ex.k * abs(float(tightest)), 0.15 * ex.R0)
    c = p + (0.45 * half if p[2] <= z_mid else -0.45 * half) * up / max(np.linalg.norm(up), 1e-12)
    cam = (tuple(float(x) for x in c + (pos - focal)), tuple(float(x) for x in c), tuple(float(x) for x in up))
    return cam, half


def _finish(res: SceneResult, b: _Built, ex: _Ex, title: str, readouts: list[str], verdict: str,
            verdict_colour: str, direction_deg: float, kind: str, ids: tuple[str, ...], states: dict,
            clearance=None, tightest=None, bar=None) -> Scene3D:
    box = _box(b)
    bars, marks = scale_bars(ex, box, direction_deg, res.scene.units)
    for name, mesh, style in bars:
        b.add("scale", name, mesh, style)
    b.labels += [Label(p, text, S.TEXT, 14, layer="scale") for p, text in marks]
    layers = {name: tuple(b.layers[name]) for name in LAYERS if b.layers.get(name)}
    box = _box(b)
    cams, scale, section = _cameras(box, direction_deg, ex.c)
    spot = next((lb.point for lb in b.labels if lb.layer == "clearance"), None)
    if spot is not None and tightest is not None:
        cams[CLOSE_UP], scale[CLOSE_UP] = _close_up(cams["section"], spot, ex, tightest, (box[4] + box[5]) / 2)
    u = res.scene.units
    words = scale_text(ex.k, ex.R0, u)
    caption = words + "\n" + (DETAIL_TRUE if ex.k == 1.0 else DETAIL)
    return Scene3D(
        title=title,
        layers=layers,
        labels=tuple(b.labels),
        readouts=tuple(readouts),
        legend=tuple((lbl, col) for lbl, col, _ in b.legend),
        legend_layers=tuple(layer for _, _, layer in b.legend),
        cameras=cams,
        exaggeration=ex.k,
        units=u,
        caption=caption,
        scale_text=words,
        verdict=verdict,
        verdict_colour=verdict_colour,
        clearance=clearance,
        tightest=tightest,
        scalar_bar=bar,
        parallel_scale=scale,
        section=section,
        kind=kind,
        feature_ids=ids,
        states=dict(states),
        notes=tuple(b.notes),
    )


def _exaggeration(value, auto) -> float:
    """The exaggeration asked for, or ``auto()``; a positive finite number."""
    k = float(value) if value is not None else auto()
    if not (k > 0 and math.isfinite(k)):
        raise ValueError(f"exaggeration must be a positive number, got {value!r}")
    return k
