"""The words of a rejected edit, without Qt: a :class:`geom.scenefile.SceneError` raised for a
value typed in one of the window's forms names the field by its scene-file path
(``feature[0] "bore".tolerance.value``); the window says it with the label the user sees on the
form (``Bore: tolerance value``) followed by the rule's own message. Errors reading a file keep
the file path form (the command line's words), so this is only used for edits.

>>> field_label('feature[0] "bore".tolerance.value')
'Bore: tolerance value'
>>> field_label("mate[1].pin"), field_label("units")
('Mate 2: pin', 'Units')
"""

from __future__ import annotations

import re

# scene-file keys -> the words of the form that edits them (the feature form, the mate form,
# the scene form); a key not listed falls back to the longest listed key it starts with
FIELD_LABELS = {
    # the feature form
    "id": "id",
    "name": "name",
    "kind": "kind",
    "limits": "size limits",
    "limits[0]": "size limits, first value",
    "limits[1]": "size limits, second value",
    "length": "length",
    "at": "basic location",
    "at[0]": "basic location x",
    "at[1]": "basic location y",
    "envelope": "envelope",
    "tolerance": "tolerance",
    "tolerance.characteristic": "tolerance characteristic",
    "tolerance.zone": "tolerance zone",
    "tolerance.value": "tolerance value",
    "tolerance.material": "material condition",
    "tolerance.datums": "datums",
    "tolerance.projected": "projected zone",
    "tolerance.angle": "basic angle",
    "measured": "measured data",
    "measured.points": "measured points file",
    "measured.uncertainty": "measurement uncertainty",
    # the mate form
    "hole": "hole",
    "pin": "pin",
    # the scene form
    "title": "Title",
    "units": "Units",
    "standard": "Standard",
}

_ITEM = re.compile(r'^(feature|mate|fastener)\[(\d+)\](?: "((?:[^"\\]|\\.)*)")? ?\.?(.*)$')


def _key_label(key: str) -> str | None:
    """The label of a key inside a feature or mate (``tolerance.datums[2]``: "datums, entry 3")."""
    if key in FIELD_LABELS:
        return FIELD_LABELS[key]
    m = re.match(r"^(.*)\[(\d+)\]$", key)
    if m and m.group(1) in FIELD_LABELS:
        return f"{FIELD_LABELS[m.group(1)]}, entry {int(m.group(2)) + 1}"
    cut = max(key.rfind("["), key.rfind("."))
    return _key_label(key[:cut]) if cut > 0 else None


def field_label(path: str) -> str | None:
    """The form's words for the scene-file field ``path``, or None when no form shows it.

    >>> field_label('feature[2] "cap-bore".limits[1]'), field_label("feature[0].tolerance.datums[2]")
    ('Cap-bore: size limits, second value', 'Feature 1: datums, entry 3')
    >>> field_label("feature[0].zzz") is None
    True
    """
    m = _ITEM.match(path)
    if m is None:
        return FIELD_LABELS.get(path) if path in ("title", "units", "standard") else None
    table, index, name, key = m.groups()
    if name:
        who = name[:1].upper() + name[1:]
    else:
        who = f"{table.capitalize()} {int(index) + 1}"
    if not key:
        return who
    what = _key_label(key)
    return None if what is None else f"{who}: {what}"


def edit_message(err) -> str:
    """What the window says of a rejected edit: the form's label and the rule's message
    (``Bore: tolerance value: expected a number > 0, got -0.02``); the error as the command line
    says it (file, path, message) when the path names no field of a form."""
    path = getattr(err, "path", "")
    label = field_label(path) if path else None
    if label is None:
        return str(err)
    return f"{label}: {err.detail}"
