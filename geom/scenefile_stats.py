"""Scene files, continued: the ``[[process]]`` and ``[yield]`` tables (values in
:mod:`geom.yieldspec`), hardened like the other tables, e.g.
``valve.toml: process[1].size.sigma: expected a number > 0, got -0.002``.

A size mean outside the limits is allowed (a process can make bad parts), but a mean more than
max(10 sigma, the size tolerance) beyond a limit is refused as a probable typo (wrong units or a
wrong digit): such a process makes practically no good part, and nobody asks for that run.

>>> from geom.scenefile import loads, dumps
>>> s = loads('''units = "mm"
... [[feature]]
... id = "b"
... kind = "hole"
... limits = [10, 10.015]
... length = 15
... [yield]
... samples = 5000
... [[process]]
... feature = "b"
... size = { model = "capability", cp = 1.33, cpk = 1.0 }
... ''')
>>> s.statistics.samples, s.statistics.processes[0].size.cp, loads(dumps(s)) == s
(5000, 1.33, True)
"""

from __future__ import annotations

import difflib
from dataclasses import replace

from .model import Scene
from .scenefile import _Ctx, _join, _show, _v
from .yieldspec import (
    MAX_SAMPLES, POSITION_MODELS, SIZE_MODELS, TOWARD, PositionModel, ProcessSpec, SizeModel, StatSpec,
)

YIELD_KEYS = ("samples", "seed", "confidence", "precision")
PROCESS_KEYS = ("feature", "size", "position")
SIZE_KEYS = {"normal": ("model", "mean", "sigma"), "capability": ("model", "cp", "cpk", "toward"),
             "uniform": ("model",)}
POSITION_KEYS = {"normal": ("model", "sigma")}


def _whole(c: _Ctx, v, path, lo, hi):
    if isinstance(v, bool) or not isinstance(v, int) or not lo <= v <= hi:
        c.fail(path, f"expected a whole number from {lo} to {hi}, got {_show(v)}")
    return int(v)


def _size(c: _Ctx, v, path, feat) -> SizeModel:
    c.table(v, path, ("model", "mean", "sigma", "cp", "cpk", "toward"))
    model = c.string(v.get("model", "normal"), _join(path, "model"), SIZE_MODELS)
    c.table(v, path, SIZE_KEYS[model])
    if model == "uniform":
        return SizeModel("uniform")
    if model == "capability":
        for k in ("cp", "cpk"):
            if k not in v:
                c.fail(_join(path, k), "missing; a capability model needs cp and cpk")
        cp = c.number(v["cp"], _join(path, "cp"), positive=True)
        cpk = c.number(v["cpk"], _join(path, "cpk"), nonneg=True)
        if cpk > cp + 1e-12:
            c.fail(_join(path, "cpk"), f"expected cpk <= cp ({cp:g}): Cpk cannot exceed Cp, got {cpk:g}")
        toward = c.string(v.get("toward", "mmc"), _join(path, "toward"), TOWARD)
        return SizeModel("capability", cp=cp, cpk=cpk, toward=toward)
    sigma = c.number(v["sigma"], _join(path, "sigma"), positive=True) if "sigma" in v else None
    mean = c.number(v["mean"], _join(path, "mean"), positive=True) if "mean" in v else None
    if mean is not None:
        lo, hi = feat.limits
        s = sigma if sigma is not None else (hi - lo) / 6.0
        beyond = max(lo - mean, mean - hi)
        if beyond > max(10.0 * s, hi - lo):
            c.fail(_join(path, "mean"), f"expected a mean near the limits {lo:g} .. {hi:g} (at most "
                   f"max(10 sigma, size tolerance) outside), got {mean:g}: a probable typo")
    return SizeModel("normal", mean=mean, sigma=sigma)


def _position(c: _Ctx, v, path) -> PositionModel:
    c.table(v, path, ("model", "sigma"))
    model = c.string(v.get("model", "normal"), _join(path, "model"), POSITION_MODELS)
    c.table(v, path, POSITION_KEYS[model])
    sigma = c.number(v["sigma"], _join(path, "sigma"), positive=True) if "sigma" in v else None
    return PositionModel(model, sigma)


def parse_stats(c: _Ctx, data: dict, scene: Scene) -> Scene:
    """The scene with its ``statistics`` (a :class:`StatSpec`) read from the tables."""
    kw: dict = {}
    if "yield" in data:
        y = c.table(data["yield"], "yield", YIELD_KEYS)
        if "samples" in y:
            kw["samples"] = _whole(c, y["samples"], "yield.samples", 1, MAX_SAMPLES)
        if "seed" in y:
            kw["seed"] = _whole(c, y["seed"], "yield.seed", 0, 2**63 - 1)
        if "confidence" in y:
            conf = c.number(y["confidence"], "yield.confidence")
            if not 0.5 <= conf < 1.0:
                c.fail("yield.confidence", f"expected a confidence from 0.5 up to (not including) 1, got {conf:g}")
            kw["confidence"] = conf
        if "precision" in y:
            prec = c.number(y["precision"], "yield.precision", positive=True)
            if prec >= 0.5:
                c.fail("yield.precision", f"expected a half-width of the interval below 0.5, got {prec:g}")
            kw["precision"] = prec
    by_id = {f.id: f for f in scene.features}
    procs: list[ProcessSpec] = []
    for i, v in enumerate(c.array_of_tables(data.get("process", []), "process")):
        path = f"process[{i}]"
        c.table(v, path, PROCESS_KEYS, required=("feature",))
        fid = c.string(v["feature"], _join(path, "feature"), what="an id")
        if fid not in by_id:
            near = difflib.get_close_matches(fid, list(by_id), n=1)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            c.fail(_join(path, "feature"), f"expected the id of a [[feature]], got {fid!r}, which none has{hint}")
        if any(p.feature == fid for p in procs):
            c.fail(_join(path, "feature"), f"expected one [[process]] per feature, got {fid!r} again")
        size = _size(c, v["size"], _join(path, "size"), by_id[fid]) if "size" in v else SizeModel()
        pos = _position(c, v["position"], _join(path, "position")) if "position" in v else PositionModel()
        procs.append(ProcessSpec(fid, size, pos))
    return replace(scene, statistics=StatSpec(tuple(procs), **kw))


def dump_stats(scene: Scene) -> list[str]:
    """The TOML lines of ``scene.statistics`` (read back equal by :func:`parse_stats`)."""
    st: StatSpec = scene.statistics
    out = ["", "[yield]", f"samples = {st.samples}", f"seed = {st.seed}", f"confidence = {_v(st.confidence)}"]
    if st.precision is not None:
        out.append(f"precision = {_v(st.precision)}")
    for p in st.processes:
        out += ["", "[[process]]", f"feature = {_v(p.feature)}"]
        s = p.size
        if s.model == "uniform":
            out.append('size = { model = "uniform" }')
        elif s.model == "capability":
            out.append(f'size = {{ model = "capability", cp = {_v(s.cp)}, cpk = {_v(s.cpk)}, toward = {_v(s.toward)} }}')
        else:
            parts = ['model = "normal"'] + [f"{k} = {_v(getattr(s, k))}" for k in ("mean", "sigma")
                                            if getattr(s, k) is not None]
            out.append("size = { " + ", ".join(parts) + " }")
        pos = p.position
        out.append('position = { model = "normal"' + (f", sigma = {_v(pos.sigma)}" if pos.sigma is not None else "")
                   + " }")
    return out


__all__ = ["dump_stats", "parse_stats"]
