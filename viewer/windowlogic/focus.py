"""What the window looks at, its focus: ``(kind, key)`` with kind one of "mate" (key: the mate's
index), "feature" or "inspection" (key: the feature id), "fastener" or "pattern" (key: its id), or
``("none", None)`` for an empty scene. Every panel follows the one focus the model holds."""

from __future__ import annotations

from geom.model import Scene

KINDS = ("mate", "feature", "inspection", "fastener", "pattern")


def default_focus(scene: Scene) -> tuple[str, object]:
    """The first mate, else the first pattern, else the first feature, else the first fastener
    (a scene may hold fastener tables only)."""
    if scene.mates:
        return ("mate", 0)
    if scene.patterns:
        return ("pattern", scene.patterns[0].id)
    if scene.features:
        return ("feature", scene.features[0].id)
    if scene.fasteners:
        return ("fastener", scene.fasteners[0].id)
    return ("none", None)


def focus_valid(scene: Scene, focus: tuple[str, object]) -> bool:
    """Does ``focus`` name something in ``scene``?"""
    kind, key = focus
    if kind == "mate":
        return isinstance(key, int) and 0 <= key < len(scene.mates)
    if kind in ("feature", "inspection"):
        return key in {f.id for f in scene.features}
    if kind == "fastener":
        return key in {fa.id for fa in scene.fasteners}
    if kind == "pattern":
        return key in {p.id for p in scene.patterns}
    return False


def focus_features(scene: Scene, focus: tuple[str, object]) -> list[str]:
    """Ids of the features whose what-if controls belong to the focus (none for a fastener: a
    fastener pattern has no what-if state)."""
    kind, key = focus
    if kind == "mate":
        m = scene.mates[key]
        return [m.hole, m.pin]
    if kind in ("feature", "inspection"):
        return [key]
    if kind == "pattern":  # the datum features whose size lets the pattern shift
        from .whatif import pattern_datum_features

        return [fid for _ltr, fid in pattern_datum_features(scene, key)]
    return []


def focus_mate(scene: Scene, focus: tuple[str, object]) -> int | None:
    """Index of the mate looked at, or of the first mate the focused feature is in."""
    kind, key = focus
    if kind == "mate":
        return key
    if kind != "feature":
        return None
    for i, m in enumerate(scene.mates):
        if key in (m.hole, m.pin):
            return i
    return None


def keyed(focus: tuple[str, object], kind: str):
    """The focus's key when it is of ``kind``, else None."""
    return focus[1] if focus[0] == kind else None


def edited_feature(scene: Scene, focus: tuple[str, object], shown: str | None) -> str | None:
    """The feature the editor form shows for ``focus``: the feature (or inspected feature), a
    mate's hole; for a fastener the form keeps ``shown``."""
    kind, key = focus
    if kind in ("feature", "inspection"):
        return key
    if kind == "mate":
        return scene.mates[key].hole
    return shown
