"""The one memo of the picture builders: a small LRU map, a registry of every memo, derived keys.

Every cache of :mod:`viewer.scene3d` is a :class:`Memo` (or a function wrapped by
:func:`memoized`): interned meshes, replayed builder pieces, section cuts and plans, ring
tables, colour maps. :func:`clear_caches` empties them all (tests use it to build from nothing).

What a memo hands out is shared: the same object goes to every caller, so nobody downstream may
modify it. The debug switch checks that: with the environment variable
``MATEZONE_CHECK_SHARED=1`` (read at import; tests set :data:`CHECK_SHARED` directly) a memo
fingerprints every mesh and array in a value when it is stored and checks the fingerprint each
time the value is handed out again, raising ``AssertionError`` naming the memo and the key when
something changed it. Meshes are recognised by their methods (``GetPoints``, ``GetPointData``,
...), so this module imports neither pyvista nor VTK: it is pure Python.

>>> m = Memo("doctest squares", maxsize=2)
>>> m.remember(3, lambda: 9), m.remember(4, lambda: 16), m.remember(3, lambda: -1)
(9, 16, 9)
>>> m.put(5, 25); list(m.keys())   # 4 was the least recently used: it goes
25
[3, 5]
>>> key_of(1.5, "a", (2, 3)) == key_of(1.5, "a", (2, 3))
True
"""

from __future__ import annotations

import hashlib
import os
import reprlib
import weakref
from collections import OrderedDict
from functools import wraps

CHECK_SHARED = os.environ.get("MATEZONE_CHECK_SHARED", "") == "1"

_MISSING = object()
_REGISTRY: weakref.WeakValueDictionary[str, Memo] = weakref.WeakValueDictionary()


class Memo:
    """A least-recently-used map of at most ``maxsize`` entries, registered under ``name``
    (so that :func:`clear_caches` reaches it and a failed check names it). A hit moves the entry
    to the most recent end; a store beyond ``maxsize`` drops the least recent entry."""

    def __init__(self, name: str, maxsize: int):
        if maxsize < 1:
            raise ValueError(f"memo {name!r}: maxsize must be at least 1, got {maxsize!r}")
        if name in _REGISTRY:
            raise ValueError(f"a memo named {name!r} exists already")
        self.name = name
        self.maxsize = int(maxsize)
        self._items: OrderedDict = OrderedDict()
        self._prints: dict = {}  # key -> fingerprint of the value (only while CHECK_SHARED)
        _REGISTRY[name] = self

    def __len__(self) -> int:
        return len(self._items)

    def __contains__(self, key) -> bool:  # does not count as a use
        return key in self._items

    def __repr__(self) -> str:
        return f"Memo({self.name!r}, {len(self._items)}/{self.maxsize})"

    def keys(self):
        """The keys, least recently used first."""
        return self._items.keys()

    def get(self, key, default=None):
        """The value stored under ``key`` (now the most recently used), else ``default``."""
        items = self._items
        value = items.get(key, _MISSING)
        if value is _MISSING:
            return default
        items.move_to_end(key)
        if CHECK_SHARED:
            self._check(key, value)
        return value

    def put(self, key, value):
        """Store ``value`` under ``key`` as the most recently used; returns ``value``."""
        items = self._items
        items[key] = value
        items.move_to_end(key)
        if CHECK_SHARED:
            self._prints[key] = fingerprint(value)
        if len(items) > self.maxsize:
            old, _ = items.popitem(last=False)
            self._prints.pop(old, None)
        return value

    def remember(self, key, make):
        """The value under ``key``, or ``make()`` stored there."""
        value = self.get(key, _MISSING)
        if value is _MISSING:
            value = self.put(key, make())
        return value

    def clear(self) -> None:
        self._items.clear()
        self._prints.clear()

    def _check(self, key, value) -> None:
        now = fingerprint(value)
        was = self._prints.setdefault(key, now)  # stored before the switch was on: checked from now
        if now != was:
            raise AssertionError(f"a shared value was modified after memo {self.name!r} handed it out "
                                 f"(key {reprlib.repr(key)})")


def memoized(name: str, maxsize: int):
    """Decorator: remember a pure function's results in a :class:`Memo` keyed by its arguments
    (which must be hashable), in place of ``functools.lru_cache``. The memo is the wrapper's
    ``memo`` attribute."""
    def wrap(fn):
        memo = Memo(name, maxsize)

        @wraps(fn)
        def call(*args, **kwargs):
            key = args if not kwargs else args + (_KWARGS, *sorted(kwargs.items()))
            value = memo.get(key, _MISSING)
            if value is _MISSING:
                value = memo.put(key, fn(*args, **kwargs))
            return value

        call.memo = memo
        return call

    return wrap


_KWARGS = object()  # separates positional from keyword arguments in a memoized key


def clear_caches() -> None:
    """Empty every memo there is."""
    for memo in list(_REGISTRY.values()):
        memo.clear()


def memos() -> dict[str, Memo]:
    """Every live memo by name."""
    return dict(_REGISTRY)


# ---------------------------------------------------------------- derived keys


class Held:
    """A key part standing for an object by identity: equal only to a Held of the very same
    object, and holding it (so its id cannot be reused while the key is stored)."""

    __slots__ = ("obj",)

    def __init__(self, obj):
        self.obj = obj

    def __eq__(self, other) -> bool:
        return isinstance(other, Held) and other.obj is self.obj

    def __hash__(self) -> int:
        return id(self.obj)

    def __repr__(self) -> str:
        return f"Held({type(self.obj).__name__} at {id(self.obj):#x})"


def key_part(x):
    """``x`` as a part of a key that compares by value: hashable values as they are, arrays
    (anything with ``dtype`` and ``tobytes``) by dtype, shape and bytes, lists and tuples item
    by item, dicts by their items; anything else unhashable by identity (:class:`Held`).

    >>> key_part([1.0, (2, [3])])
    (1.0, (2, (3,)))
    """
    if isinstance(x, (str, int, float, bool, type(None))):
        return x
    if hasattr(x, "dtype") and hasattr(x, "tobytes"):
        return ("array", str(x.dtype), getattr(x, "shape", ()), x.tobytes())
    if isinstance(x, (tuple, list)):
        return tuple(key_part(y) for y in x)
    if isinstance(x, dict):
        return ("dict", *((key_part(k), key_part(v)) for k, v in x.items()))
    try:
        hash(x)
    except TypeError:
        return Held(x)
    return x


def key_of(*args, **kwargs) -> tuple:
    """The key of a call with these arguments (:func:`key_part` of each): every input named,
    none forgotten."""
    key = tuple(key_part(a) for a in args)
    if kwargs:
        key += (("kwargs",), *((k, key_part(v)) for k, v in sorted(kwargs.items())))
    return key


# ---------------------------------------------------------------- fingerprints


def fingerprint(value) -> str:
    """A hash of what may be modified in ``value``: the points, cells and point / cell arrays of
    every mesh in it, the bytes of every array, the scalars and the lengths of its containers
    (tuples, lists, dicts, dataclasses walked; other objects by type only)."""
    h = hashlib.blake2b(digest_size=16)
    _feed(h, value, set())
    return h.hexdigest()


def _feed(h, x, seen: set) -> None:
    if isinstance(x, (str, int, float, bool, type(None), bytes)):
        h.update(repr(x).encode())
        return
    if id(x) in seen:
        return
    seen.add(id(x))
    if hasattr(x, "GetPoints") and hasattr(x, "GetPointData"):  # a VTK data set (a mesh)
        h.update(b"mesh")
        pts = x.GetPoints()
        _buffer(h, None if pts is None else pts.GetData())
        for cells in ("GetPolys", "GetLines", "GetVerts", "GetStrips"):
            ca = getattr(x, cells)() if hasattr(x, cells) else None
            if ca is not None:
                _cells(h, ca)
        for data in (x.GetPointData(), x.GetCellData()):
            for i in range(data.GetNumberOfArrays()):
                arr = data.GetAbstractArray(i)
                h.update(str(arr.GetName() if arr is not None else None).encode())
                _buffer(h, arr)
            for role in ("GetScalars", "GetNormals", "GetTCoords"):
                arr = getattr(data, role)()
                h.update(str(None if arr is None else arr.GetName()).encode())
        return
    if hasattr(x, "GetConnectivityArray"):  # a vtkCellArray
        _cells(h, x)
        return
    if hasattr(x, "dtype") and hasattr(x, "tobytes"):
        h.update(f"array {x.dtype} {getattr(x, 'shape', ())}".encode())
        h.update(x.tobytes())
        return
    if isinstance(x, (tuple, list, set, frozenset)):
        h.update(f"{type(x).__name__} {len(x)}".encode())
        for y in x:
            _feed(h, y, seen)
        return
    if isinstance(x, dict):
        h.update(f"dict {len(x)}".encode())
        for k, y in x.items():
            _feed(h, k, seen)
            _feed(h, y, seen)
        return
    fields = getattr(type(x), "__dataclass_fields__", None)
    h.update(type(x).__qualname__.encode())
    if fields:
        for name in fields:
            _feed(h, getattr(x, name), seen)


def _cells(h, ca) -> None:
    h.update(b"cells")
    _buffer(h, ca.GetOffsetsArray())
    _buffer(h, ca.GetConnectivityArray())


def _buffer(h, arr) -> None:
    if arr is None:
        h.update(b"none")
        return
    try:
        view = memoryview(arr)
    except (TypeError, ValueError, BufferError):  # no buffer (strings, implicit arrays): value by value
        h.update(repr([arr.GetValue(i) for i in range(arr.GetNumberOfValues())]).encode())
        return
    h.update(f"{view.format} {view.shape}".encode())
    if view.nbytes:
        h.update(view.cast("B"))
