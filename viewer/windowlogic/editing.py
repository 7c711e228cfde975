"""The scene as the window edits it: the dict a TOML scene file decodes to, changed and parsed
again with the scene-file rules (:func:`geom.scenefile.parse`), so the window accepts and refuses
exactly what the command line does, with the same message.

Also here: the entries of the scene-contents list, and the edits its buttons make (a new hole or
pin, a new mate, a removal) as functions on that dict.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from pathlib import Path

from geom.model import Kind, Scene
from geom.scenefile import dumps, parse


def scene_dict(scene: Scene) -> dict:
    """The decoded-TOML form of a scene: what :func:`geom.scenefile.parse` takes."""
    return tomllib.loads(dumps(scene))


def scene_label(path: str | None) -> str:
    """The scene's name in titles and messages.

    >>> scene_label("/tmp/parts/cap.toml"), scene_label(None)
    ('cap.toml', '<unsaved scene>')
    """
    return Path(path).name if path else "<unsaved scene>"


def parse_dict(data: dict, path: str | None) -> Scene:
    """Validate ``data`` with the scene-file rules; raises :class:`geom.scenefile.SceneError`."""
    return parse(data, scene_label(path), str(Path(path).resolve()) if path else None)


def new_scene() -> Scene:
    """A small valid scene to start from (File > New): one hole, one pin, one mate that
    assembles with room to spare in the worst case: the hole's VC 10.000 - 0.050 = 9.950
    against the pin's VC 9.920 + 0.010 = 9.930, a clearance of 0.020."""
    data = {
        "title": "Untitled fit",
        "units": "mm",
        "standard": "asme",
        "feature": [
            # position needs datums that locate the axis (A alone only orients): A | B | C
            {"id": "hole-1", "kind": "hole", "limits": [10.0, 10.02], "length": 10.0,
             "tolerance": {"characteristic": "position", "value": 0.05, "material": "MMC",
                           "datums": ["A", "B", "C"]}},
            {"id": "pin-1", "kind": "pin", "limits": [9.90, 9.92], "length": 10.0,
             "tolerance": {"characteristic": "perpendicularity", "value": 0.01, "material": "MMC",
                           "datums": ["A"]}},
        ],
        "mate": [{"hole": "hole-1", "pin": "pin-1"}],
    }
    return parse(data, "<new scene>")


def feature_index(scene: Scene, fid: str) -> int:
    """Position of feature ``fid`` in the scene's (and its dict's) feature list."""
    for i, f in enumerate(scene.features):
        if f.id == fid:
            return i
    raise KeyError(fid)


def rename_in_mates(data: dict, old: str, new: str) -> None:
    """Make the mates of the scene dict ``data`` follow a feature renamed ``old`` -> ``new``."""
    for m in data.get("mate", []):
        for role in ("hole", "pin"):
            if m.get(role) == old:
                m[role] = new


# ---------------------------------------------------------------- the contents list


@dataclass(frozen=True)
class Entry:
    """One line of the scene-contents list: its text, the focus it selects, its tooltip."""

    text: str
    focus: tuple[str, object]
    tip: str = ""


def contents_entries(scene: Scene) -> list[Entry]:
    """The mates, patterns, features, inspections and fasteners of the scene, in that order."""
    out = [Entry(f"mate {i + 1}: {m.hole} ← {m.pin}", ("mate", i)) for i, m in enumerate(scene.mates)]
    out += [Entry(f"pattern {p.id} ({len(p.locations)} × {p.feature})", ("pattern", p.id),
                  f"The pattern {p.id} in its datum frame: gauge, measured fit, interfaces (edit it in the scene file)")
            for p in scene.patterns]
    out += [Entry(f"{f.kind.value} {f.id}" + (f" – {f.name}" if f.name else ""), ("feature", f.id))
            for f in scene.features]
    for f in scene.features:
        if f.measured is None:
            continue
        src = f"points {Path(f.measured.points).name}" if f.measured.points else "typed values"
        out.append(Entry(f"inspection: {f.id} ({src})", ("inspection", f.id),
                         f"The produced {f.kind.value} {f.id} judged from its measured data"))
    out += [Entry(f"fastener {fa.id} ({fa.kind})", ("fastener", fa.id),
                  f"Position tolerance of the {fa.kind}-fastener pattern {fa.id} (edit it in the scene file)")
            for fa in scene.fasteners]
    return out


def new_feature(scene: Scene, kind: str) -> tuple[str, dict]:
    """(id, feature table) of a new hole or pin: the first free ``kind-n`` id; the limits and
    length of the first feature of that kind, else a 10 mm fit's."""
    ids = {f.id for f in scene.features}
    n = 1
    while f"{kind}-{n}" in ids:
        n += 1
    fid = f"{kind}-{n}"
    lim = [10.0, 10.02] if kind == "hole" else [9.90, 9.92]  # those of the new scene's pair
    ref = next((f for f in scene.features if f.kind.value == kind), None)
    length = ref.length if ref else 10.0
    if ref:
        lim = list(ref.limits)
    return fid, {"id": fid, "kind": kind, "limits": lim, "length": length}


def new_mate(scene: Scene) -> dict | None:
    """A mate of the first hole and the first pin, or None when the scene lacks one of them."""
    hole = next((f.id for f in scene.features if f.kind is Kind.HOLE), None)
    pin = next((f.id for f in scene.features if f.kind is Kind.PIN), None)
    if hole is None or pin is None:
        return None
    return {"hole": hole, "pin": pin}


def removal(scene: Scene, kind: str, key):
    """(change of the scene dict, undo text) that removes what the focus ``(kind, key)`` names:
    an inspection's measured data, a mate, a fastener, a pattern with its interfaces, or a
    feature with its mates and patterns. None for anything else."""
    if kind == "inspection":
        i = feature_index(scene, key)
        return (lambda d: d["feature"][i].pop("measured", None)), f"remove the measured data of {key}"
    if kind == "mate":
        return (lambda d: d["mate"].pop(key)), f"remove mate {key + 1}"
    if kind == "fastener":
        return (lambda d: d.__setitem__("fastener", [x for x in d.get("fastener", []) if x["id"] != key]),
                f"remove fastener {key}")
    if kind == "pattern":
        def drop(d):
            d["pattern"] = [x for x in d.get("pattern", []) if x["id"] != key]
            d["interface"] = [x for x in d.get("interface", []) if key not in (x["holes"], x["pins"])]

        return drop, f"remove pattern {key}"
    if kind != "feature":
        return None

    def mutate(d):
        d["feature"] = [f for f in d.get("feature", []) if f["id"] != key]
        d["mate"] = [m for m in d.get("mate", []) if key not in (m["hole"], m["pin"])]
        gone = {p["id"] for p in d.get("pattern", []) if p.get("feature") == key}  # its patterns go with it
        if gone:
            d["pattern"] = [p for p in d["pattern"] if p["id"] not in gone]
            d["interface"] = [x for x in d.get("interface", []) if not gone & {x["holes"], x["pins"]}]

    return mutate, f"remove {key}"
