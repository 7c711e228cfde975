"""Scene files for tests, written from a few arguments instead of TOML copied into each test.

``scene_toml`` writes the keys in the order a person writes them (top-level keys, then each
``[[feature]]`` with its ``[feature.tolerance]`` and ``[feature.measured]``, then ``[[mate]]``,
``[[fastener]]`` and ``[report]``), one ``key = value`` per line and no blank lines, so a test may
still edit one line of the text with ``str.replace`` to make it malformed.

>>> print(scene_toml(hole("b", (8.0, 8.02), 10, tolerance=tol("perpendicularity", 0.01))), end="")
units = "mm"
[[feature]]
id = "b"
kind = "hole"
limits = [8.0, 8.02]
length = 10
[feature.tolerance]
characteristic = "perpendicularity"
value = 0.01
material = "MMC"
datums = ["A"]
>>> print(scene_toml(fasteners=[fastener("m6", "floating", 6.0, 6.6)]), end="")
units = "mm"
[[fastener]]
id = "m6"
kind = "floating"
fastener = 6.0
hole = 6.6
"""

from __future__ import annotations

import json
import math
from collections.abc import Iterable, Mapping


def toml_value(v) -> str:
    """One TOML value: strings as basic strings (JSON's escapes are TOML's), numbers as Python
    writes them, sequences as inline arrays.

    >>> toml_value("guide\\u202ehole"), toml_value(True), toml_value((10.0, 10.015)), toml_value(["A", "B"])
    ('"guide\\\\u202ehole"', 'true', '[10.0, 10.015]', '["A", "B"]')
    """
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, str):
        return json.dumps(v)
    if isinstance(v, float) and not math.isfinite(v):
        return ("-inf" if v < 0 else "inf") if math.isinf(v) else "nan"
    if isinstance(v, (int, float)):
        return repr(v)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(toml_value(x) for x in v) + "]"
    raise TypeError(f"no TOML value for {v!r}")


def tol(characteristic: str, value: float, material: str | None = "MMC", datums=("A",), **keys) -> dict:
    """A ``[feature.tolerance]`` table: characteristic, value, material, datums, then ``keys``
    (zone, projected, angle, ...). ``material=None`` or ``datums=()`` leave the key out."""
    t = {"characteristic": characteristic, "value": value}
    if material is not None:
        t["material"] = material
    if datums:
        t["datums"] = list(datums)
    t.update(keys)
    return t


def _feature(kind: str, id: str, limits, length, tolerance=None, measured=None, **keys) -> dict:
    f = {"id": id, "kind": kind, "limits": list(limits), "length": length, **keys}
    if tolerance is not None:
        f["tolerance"] = tolerance
    if measured is not None:
        f["measured"] = measured
    return f


def hole(id: str, limits, length, *, tolerance: dict | None = None, measured: dict | None = None, **keys) -> dict:
    """A ``[[feature]]`` of kind hole; ``keys`` are further feature keys (name, at, envelope, ...)."""
    return _feature("hole", id, limits, length, tolerance, measured, **keys)


def pin(id: str, limits, length, *, tolerance: dict | None = None, measured: dict | None = None, **keys) -> dict:
    """A ``[[feature]]`` of kind pin (see :func:`hole`)."""
    return _feature("pin", id, limits, length, tolerance, measured, **keys)


def fastener(id: str, kind: str, fastener: float, hole: float, **keys) -> dict:
    """A ``[[fastener]]``: floating, or fixed with ``thread_depth`` (and ``projection``) in ``keys``."""
    return {"id": id, "kind": kind, "fastener": fastener, "hole": hole, **keys}


def _table(header: str, table: Mapping) -> list[str]:
    lines = [header] if header else []
    subs = []
    for k, v in table.items():
        if isinstance(v, Mapping):
            subs.append((k, v))
        else:
            lines.append(f"{k} = {toml_value(v)}")
    name = header.strip("[]")
    for k, v in subs:
        lines += _table(f"[{name}.{k}]", v)
    return lines


def scene_toml(*features: dict, mates: Iterable[tuple[str, str]] = (), fasteners: Iterable[dict] = (),
               units: str | None = "mm", title: str | None = None, standard: str | None = None,
               report: Mapping | None = None) -> str:
    """The text of a scene file with these features, mates (hole id, pin id) and fasteners.
    ``None`` leaves a top-level key out."""
    top = {k: v for k, v in (("title", title), ("units", units), ("standard", standard)) if v is not None}
    lines = _table("", top)
    for f in features:
        lines += _table("[[feature]]", f)
    for h, p in mates:
        lines += _table("[[mate]]", {"hole": h, "pin": p})
    for fa in fasteners:
        lines += _table("[[fastener]]", fa)
    if report is not None:
        lines += _table("[report]", report)
    return "\n".join(lines) + "\n"


# ---------------------------------------------------------------- the scenes many tests use


def bore_and_dowel() -> str:
    """A hole 10.000 - 10.015 (perpendicularity 0.02 at MMC to A) and a pin 9.98 - 9.99, mated:
    the worst case interferes (VC 9.98 against the pin's envelope 9.99)."""
    return scene_toml(
        hole("bore", (10.0, 10.015), 15.0, tolerance=tol("perpendicularity", 0.02)),
        pin("dowel", (9.98, 9.99), 15.0),
        mates=[("bore", "dowel")], title="t")


def measured_bore(id: str = "bore", limits=(8.0, 8.022), length=12, value=0.015, measured: dict | None = None,
                  material: str | None = "MMC", title: str | None = None, standard: str | None = None,
                  **keys) -> str:
    """One hole to inspect: perpendicularity at ``material`` (MMC) to A, optionally with typed
    values or a points file in ``[feature.measured]``; ``title`` and ``standard`` are the scene's.

    >>> print(measured_bore("b", measured={"size": 8.004}, material="RFS", standard="iso"), end="")
    units = "mm"
    standard = "iso"
    [[feature]]
    id = "b"
    kind = "hole"
    limits = [8.0, 8.022]
    length = 12
    [feature.tolerance]
    characteristic = "perpendicularity"
    value = 0.015
    material = "RFS"
    datums = ["A"]
    [feature.measured]
    size = 8.004
    """
    return scene_toml(hole(id, limits, length, tolerance=tol("perpendicularity", value, material),
                           measured=measured, **keys), title=title, standard=standard)
