"""The 3D view's layer list, without Qt: the names the window gives the scene's layers (in the
scene's standard's terms), which layers apply to a :class:`viewer.scene3d.Scene3D` (those with a
mesh, a label, a readout line or a legend row in it), and one row per such layer with the
colours of its legend rows (:attr:`Scene3D.legend` / :attr:`Scene3D.legend_layers`).

>>> layer_name("vc", "asme"), layer_name("part", "asme")
('VC boundary', 'Part')
"""

from __future__ import annotations

from dataclasses import dataclass

# names shown for the scene's layers (the builder's own names are the keys)
LAYER_NAMES = {
    "part": "Part",
    "datum": "Datum A",
    "mating_part": "Part 2 (pins, pilot boss)",
    "simulator": "Datum simulators",
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
    "scale": "Scale bars",
    "labels": "Labels",
    "readouts": "Numbers on the picture",
    "legend": "Colour legend",
}


def layer_name(name: str, standard) -> str:
    """The window's name of a scene layer, in the scene's standard's terms (geom.analysis.term:
    ASME VC, ISO MMVS / LMVS ...); ``standard`` is a :class:`geom.model.Standard` or its value."""
    from geom.analysis import term
    from geom.model import Standard

    standard = Standard(standard)
    if name == "vc":
        vc = {term("vc_MMC", standard)[0], term("vc_LMC", standard)[0]}
        return " / ".join(sorted(vc)) + " boundary"
    if name == "rc":
        return f"{term('rc', standard)[0]} boundary"
    if name == "envelopes":
        return "Mating envelopes" if standard is Standard.ASME else "Associated cylinders"
    return LAYER_NAMES.get(name, name)


@dataclass(frozen=True)
class LayerRow:
    """One row of the layer list: the layer, its name, the colours of its legend rows (none for a
    layer the legend does not explain) and the legend's words for them (the row's tooltip)."""

    layer: str
    name: str
    colours: tuple[str, ...] = ()
    tip: str = ""


def layers_in(sc3, order) -> tuple[str, ...]:
    """The layers of ``order`` that the scene ``sc3`` holds something for: a mesh, a label (its
    own layer, and ``labels``, which shows or hides every label), a readout line (``readouts``)
    or a legend row or colour bar (``legend``)."""
    have = {name for name, items in sc3.layers.items() if items}
    have |= {lb.layer for lb in sc3.labels}
    if sc3.labels:
        have.add("labels")
    have |= set(sc3.legend_layers)
    if sc3.readouts:
        have.add("readouts")
    if sc3.legend or sc3.scalar_bar:
        have.add("legend")
    return tuple(n for n in order if n in have)


def layer_rows(sc3, order, standard) -> tuple[LayerRow, ...]:
    """One row per layer of ``order`` that applies to ``sc3`` (:func:`layers_in`), with the
    colours of its legend rows in the legend's order (each colour once)."""
    rows = []
    for name in layers_in(sc3, order):
        colours: list[str] = []
        words: list[str] = []
        for (text, colour), layer in zip(sc3.legend, sc3.legend_layers):
            if layer == name:
                words.append(text)
                if colour not in colours:
                    colours.append(colour)
        rows.append(LayerRow(name, layer_name(name, standard), tuple(colours), "\n".join(words)))
    return tuple(rows)
