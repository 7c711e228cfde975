"""viewer.memo, the one memo of the picture builders: least-recently-used order and eviction,
the registry that clear_caches empties, derived keys, and the fingerprint check that catches a
shared mesh or array modified after it was handed out."""

from __future__ import annotations

import os
import subprocess
import sys

import numpy as np
import pytest

from viewer import memo
from viewer.memo import Held, Memo, clear_caches, fingerprint, key_of, memoized

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


@pytest.fixture
def checking(monkeypatch):
    monkeypatch.setattr(memo, "CHECK_SHARED", True)


def test_least_recently_used_goes_first():
    m = Memo("test lru order", maxsize=3)
    for k in "abc":
        m.put(k, k.upper())
    assert m.get("a") == "A"  # a hit moves 'a' to the most recent end: b is now the oldest
    m.put("d", "D")
    assert list(m.keys()) == ["c", "a", "d"] and "b" not in m
    assert m.get("b") is None and m.get("b", 0) == 0  # a miss gives the default
    m.put("c", "C2")  # storing again counts as a use
    m.put("e", "E")
    assert list(m.keys()) == ["d", "c", "e"] and m.get("c") == "C2"
    assert len(m) == 3


def test_remember_makes_once_and_stores_falsy_values():
    m = Memo("test remember", maxsize=4)
    made = []
    for _ in range(3):
        assert m.remember("k", lambda: made.append(1) or 0) == 0  # 0 and None are values too
        assert m.remember("n", lambda: made.append(2)) is None
    assert made == [1, 2]


def test_names_are_unique_and_sizes_positive():
    keep = Memo("test unique name", maxsize=1)
    with pytest.raises(ValueError):
        Memo("test unique name", maxsize=1)
    with pytest.raises(ValueError):
        Memo("test size zero", maxsize=0)
    assert memo.memos()["test unique name"] is keep


def test_memoized_is_keyed_by_positional_and_keyword_arguments():
    calls = []

    @memoized("test memoized", maxsize=8)
    def f(a, b=1):
        calls.append((a, b))
        return a + b

    assert [f(1), f(1), f(1, b=2), f(1, b=2), f(2)] == [2, 2, 3, 3, 3]
    assert calls == [(1, 1), (1, 2), (2, 1)]
    assert len(f.memo) == 3


def test_clear_caches_empties_every_memo_the_scene_builders_use():
    import geom
    from viewer import scene3d

    res = geom.analyse_scene(geom.load(os.path.join(ROOT, "scenes", "gearbox_endcap_dowel.toml")))
    scene3d.section_cut(scene3d.build_mate_scene(res, 0))
    mine = Memo("test cleared too", maxsize=2)
    mine.put(1, 1)
    names = [n for n, m in memo.memos().items() if n.startswith("scene3d") and len(m)]
    # interned meshes, replayed pieces, cuts, plans, ring tables, cages, cells, colour maps
    for part in ("interned", "replayed", "cuts", "plans", "unit circles", "cages", "tube cells", "colour maps"):
        assert any(part in n for n in names), part
    assert scene3d.clear_caches is clear_caches  # one switch, re-exported
    clear_caches()
    assert all(len(m) == 0 for m in memo.memos().values())


def test_held_keys_compare_by_identity_and_keep_the_object():
    a, b = {"x": 1}, {"x": 1}
    assert Held(a) == Held(a) and Held(a) != Held(b) and hash(Held(a)) == id(a)
    m = Memo("test held", maxsize=4)
    m.put(Held(a), "a")
    assert m.get(Held(a)) == "a" and m.get(Held(b)) is None


def test_key_of_names_values_by_value():
    arr = np.array([1.0, 2.0])
    assert key_of(arr) == key_of(arr.copy())
    assert key_of(arr) != key_of(np.array([1.0, 2.5])) != key_of(arr.astype(np.float32))
    assert key_of([1, (2, 3)], {"k": [4]}) == key_of((1, [2, 3]), {"k": (4,)})
    assert key_of(1, b=2) != key_of(1, 2) and key_of(1, b=2) == key_of(1, b=2)
    unhashable = type("Thing", (), {"__eq__": lambda s, o: True, "__hash__": None})
    t = unhashable()
    assert key_of(t) == (Held(t),) and key_of(t) != key_of(unhashable())
    hash(key_of(arr, [1], {"k": 2}, t))  # every key can be stored


def test_fingerprint_sees_points_cells_and_arrays():
    pv = pytest.importorskip("pyvista")
    mesh = pv.Cylinder(resolution=12)
    mesh.point_data["c"] = np.arange(mesh.n_points, dtype=float)
    base = fingerprint(mesh)
    assert fingerprint(mesh) == base and fingerprint(mesh.copy()) == base
    changes = {
        "points": lambda m: m.points.__setitem__(0, m.points[0] + 1.0),
        "point data": lambda m: m.point_data["c"].__setitem__(3, -1.0),
        "new array": lambda m: m.point_data.set_array(np.zeros(m.n_points), "d"),
        "cells": lambda m: m.GetPolys().GetConnectivityArray().SetValue(1, 5),
        "active scalars": lambda m: m.point_data.set_array(m.point_data["c"], "c2") or m.set_active_scalars("c2"),
    }
    for what, change in changes.items():
        m = mesh.copy()
        change(m)
        assert fingerprint(m) != base, what
    arr = np.arange(5.0)
    fa = fingerprint((arr, [1, 2], {"k": "v"}))
    arr[2] = 9.0
    assert fingerprint((arr, [1, 2], {"k": "v"})) != fa


def test_a_modified_shared_mesh_is_caught_when_handed_out_again(checking):
    pv = pytest.importorskip("pyvista")
    m = Memo("test shared mesh", maxsize=4)
    mesh = m.remember(("tube", 1), lambda: pv.Cylinder(resolution=8))
    assert m.get(("tube", 1)) is mesh  # unchanged: handed out again
    mesh.points[0] = mesh.points[0] + 0.5  # a caller modifies the shared mesh
    with pytest.raises(AssertionError, match=r"test shared mesh.*tube"):
        m.get(("tube", 1))
    pair = m.put("pair", (np.zeros(3), mesh.copy()))
    pair[0][1] = 2.0  # an array inside a stored tuple
    with pytest.raises(AssertionError, match="test shared mesh"):
        m.get("pair")


def test_without_the_switch_nothing_is_fingerprinted(monkeypatch):
    monkeypatch.setattr(memo, "CHECK_SHARED", False)
    m = Memo("test unchecked", maxsize=2)
    arr = m.put("a", np.zeros(3))
    arr[0] = 1.0
    assert m.get("a") is arr  # no check: the switch is off


def test_the_environment_switch_and_a_pure_python_import():
    """``MATEZONE_CHECK_SHARED=1`` turns the check on at import; importing the memo loads
    neither pyvista nor VTK (it recognises meshes by their methods)."""
    code = ("import sys, numpy as np\nfrom viewer import memo\n"
            "assert not {'pyvista', 'vtk', 'vtkmodules'} & {m.split('.')[0] for m in sys.modules}\n"
            "m = memo.Memo('env', 2)\na = m.put(1, np.zeros(2))\na[0] = 1\n"
            "try:\n    m.get(1)\nexcept AssertionError:\n    print('caught')\nelse:\n    print('missed')\n")
    for value, expect in (("1", "caught"), ("", "missed")):
        env = dict(os.environ, MATEZONE_CHECK_SHARED=value)
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, env=env)
        assert out.returncode == 0, out.stderr
        assert out.stdout.strip() == expect
