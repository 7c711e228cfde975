"""Typed text in the editor forms and the what-if controls, without Qt: numbers read from text
(anything else is handed on as text, so that the scene rules refuse it with their own message),
numbers written back as the user would type them, the decimals a length is shown with, and the
feature form's fields as the feature table of a scene file.

Field keys name the scene-file path they edit: ``"limits[0]"``, ``"tolerance.value"`` ...
"""

from __future__ import annotations

import re
from collections.abc import Mapping

from geom.model import Feature, Units

# the text fields and the choice fields (combo boxes) of the feature form
FEATURE_TEXTS = ("id", "name", "limits[0]", "limits[1]", "length", "at[0]", "at[1]")
TOLERANCE_TEXTS = ("tolerance.value", "tolerance.datums", "tolerance.projected", "tolerance.angle")


def text_value(text: str):
    """A typed number, or the raw text so that the scene rules reject it with their message.

    >>> text_value(" 8.015 "), text_value("abc")
    (8.015, 'abc')
    """
    t = text.strip()
    try:
        return float(t)
    except ValueError:
        return t


def optional_value(text: str):
    """An optional number field: empty means absent (None).

    >>> optional_value("  ") is None, optional_value("2")
    (True, 2.0)
    """
    return None if not text.strip() else text_value(text)


def num_text(v) -> str:
    """A number as a field shows it: every digit Python keeps, no trailing ``.0``; "" for None.

    >>> num_text(12.0), num_text(0.015), num_text(None), num_text(1e-05)
    ('12', '0.015', '', '1e-05')
    """
    return "" if v is None else repr(float(v)).removesuffix(".0") if float(v).is_integer() else repr(float(v))


def plain(v: float, decimals: int = 1) -> str:
    """A percentage or angle as the what-if controls set it (one decimal), without a trailing .0.

    >>> plain(40.0), plain(12.5), plain(100.04)
    ('40', '12.5', '100')
    """
    return f"{v:.{decimals}f}".rstrip("0").rstrip(".")


def length_decimals(units: Units, *values: float) -> int:
    """Decimals that show every one of ``values`` and keep unequal ones apart: those of
    :meth:`geom.model.Units.fmt_cmp` (an inch feature with limits 0.25000 .. 0.25015 needs 5)."""
    shown = units.fmt_cmp(*values) if values else (units.fmt(0.0),)
    return max(len(t.partition(".")[2]) for t in shown)


def split_datums(text: str) -> list[str]:
    """Datum letters as typed, separated by commas, spaces or bars.

    >>> split_datums(" A, B | C ")
    ['A', 'B', 'C']
    """
    return [x for x in re.split(r"[\s,|]+", text.strip()) if x]


def feature_texts(f: Feature) -> dict[str, str]:
    """The text fields of the feature form for ``f`` (the tolerance's only when it has one)."""
    d = {"id": f.id, "name": f.name, "limits[0]": num_text(f.limits[0]), "limits[1]": num_text(f.limits[1]),
         "length": num_text(f.length), "at[0]": num_text(f.at[0]), "at[1]": num_text(f.at[1])}
    t = f.tolerance
    if t is not None:
        d.update({"tolerance.value": num_text(t.value), "tolerance.datums": ", ".join(t.datums),
                  "tolerance.projected": num_text(t.projected), "tolerance.angle": num_text(t.angle)})
    return d


def feature_choices(f: Feature) -> dict[str, object]:
    """The choice fields of the feature form for ``f`` (the tolerance's only when it has one)."""
    d: dict[str, object] = {"kind": f.kind.value, "envelope": f.envelope}
    t = f.tolerance
    if t is not None:
        d.update({"tolerance.characteristic": t.characteristic.value, "tolerance.zone": t.zone.value,
                  "tolerance.material": t.material.value})
    return d


def feature_table(text: Mapping[str, str], choice: Mapping[str, object], toleranced: bool) -> dict:
    """The feature table the form's fields describe, as a TOML scene file would hold it."""
    tv = text_value
    d: dict = {"id": text["id"].strip(), "kind": choice["kind"],
               "limits": [tv(text["limits[0]"]), tv(text["limits[1]"])],
               "length": tv(text["length"]),
               "at": [tv(text["at[0]"]), tv(text["at[1]"])]}
    if text["name"].strip():
        d["name"] = text["name"].strip()
    if choice["envelope"] is not None:
        d["envelope"] = choice["envelope"]
    if toleranced:
        t = {"characteristic": choice["tolerance.characteristic"],
             "zone": choice["tolerance.zone"],
             "value": tv(text["tolerance.value"]),
             "material": choice["tolerance.material"],
             "datums": split_datums(text["tolerance.datums"])}
        for k in ("projected", "angle"):
            v = optional_value(text[f"tolerance.{k}"])
            if v is not None:
                t[k] = v
        d["tolerance"] = t
    return d


def feature_field(path: str, keys) -> str | None:
    """The field of the feature form that a scene rule's path names, if there is one.

    >>> keys = {"limits[0]", "tolerance.datums"}
    >>> feature_field('feature[0] "bore".limits[0]', keys), feature_field('feature[1].tolerance.datums[2]', keys)
    ('limits[0]', 'tolerance.datums')
    >>> feature_field("mate[0].hole", keys) is None
    True
    """
    m = re.match(r'^feature\[\d+\](?: "[^"]*")?\.?(.*)$', path)
    if not m:
        return None
    key = m.group(1)
    while key and key not in keys:  # e.g. "tolerance.datums[0]" -> "tolerance.datums"
        cut = max(key.rfind("["), key.rfind("."))
        if cut <= 0:
            break
        key = key[:cut]
    return key if key in keys else None
