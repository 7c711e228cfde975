"""CSV files of measured surface points: ``x,y,z`` with a header row and an optional ``section``
column, in the part's datum frame (datum A is z = 0; the nominal axis runs along +z from the
feature's basic location).

Every problem raises :class:`PointsError` naming the file and, where there is one, the line:
``bore.csv: line 7: column 'y': expected a number, got 'n/a'``.

>>> import io
>>> pc = parse_points(io.StringIO("x,y,z\\n1,0,0\\n0,1,0\\n-1,0,0\\n"), "demo.csv")
>>> pc.xyz.shape, pc.sections is None
((3, 3), True)
"""

from __future__ import annotations

import io
import math
import os
import re
import warnings
from dataclasses import dataclass

import numpy as np

from .textfile import MAX_POINTS_BYTES, clip, read_text, text_problem

COLUMNS = ("x", "y", "z")
SECTION = "section"
MAX_COORDINATE = 1e6  # largest coordinate accepted (scene units)
# a plain decimal number in ASCII: no digit separators ("4_0"), no full-width or other digits
_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\Z", re.ASCII)


def _cell(text: str, n: int = 40) -> str:
    """A cell or line as shown in a message: quoted, at most ``n`` characters."""
    return repr(clip(text, n))


class PointsError(ValueError):
    """A points file that cannot be used, with file, line and what was expected."""

    def __init__(self, file: str, message: str, line: int | None = None):
        self.file, self.line, self.detail = file, line, message
        where = f"{file}: line {line}: " if line is not None else f"{file}: "
        super().__init__(where + message)


@dataclass(frozen=True)
class PointCloud:
    """Points (n, 3) in the datum frame, their section labels (n,) or None, and the source."""

    xyz: np.ndarray
    sections: np.ndarray | None
    file: str
    lines: np.ndarray | None = None  # line number of each point in the file (for messages)


def _header(first: str, file: str) -> tuple[list[str], dict[str, int]]:
    names = [h.strip().strip('"').strip().lower() for h in first.split(",")]
    for k in COLUMNS + (SECTION,):
        if names.count(k) > 1:
            raise PointsError(file, f"header: column {k!r} appears {names.count(k)} times; expected it once", 1)
    idx = {}
    for k in COLUMNS + (SECTION,):
        if k in names:
            idx[k] = names.index(k)
    missing = [k for k in COLUMNS if k not in idx]
    if missing:
        try:
            [float(h) for h in names]
            raise PointsError(file, "expected a header row naming the columns (x,y,z[,section]), "
                                    "got numbers", 1)
        except ValueError:
            pass
        raise PointsError(file, f"header: missing column {', '.join(repr(m) for m in missing)}; "
                                f"expected x,y,z and optionally section, got {_cell(first.strip(), 60)}", 1)
    return names, idx


def _slow_parse(lines: list[str], file: str, names: list[str], idx: dict[str, int], skipped: int = 0) -> PointCloud:
    """Line-by-line parse that names the first bad line (``lines`` start at the header, which is
    line ``skipped + 1`` of the file)."""
    xyz, secs, nos = [], [], []
    for no, raw in enumerate(lines[1:], start=skipped + 2):
        s = raw.strip()
        if not s or s.startswith("#"):
            continue
        cells = [c.strip() for c in s.split(",")]
        if len(cells) != len(names):
            raise PointsError(file, f"expected {len(names)} values ({','.join(names)}), got {len(cells)}", no)
        row = []
        for k in COLUMNS:
            cell = cells[idx[k]]
            if not _NUMBER.match(cell):
                what = "a finite number" if cell.lower().lstrip("+-") in ("nan", "inf", "infinity") else "a number"
                raise PointsError(file, f"column {k!r}: expected {what} (plain digits, '.', e), got {_cell(cell)}",
                                  no)
            v = float(cell)
            if not math.isfinite(v) or abs(v) > MAX_COORDINATE:
                raise PointsError(file, f"column {k!r}: expected a coordinate of magnitude at most "
                                        f"{MAX_COORDINATE:g}, got {_cell(cell)}", no)
            row.append(v)
        xyz.append(row)
        nos.append(no)
        if SECTION in idx:
            cell = cells[idx[SECTION]]
            if not cell:
                raise PointsError(file, "column 'section': expected a label, got an empty cell", no)
            if cell.lower().lstrip("+-") in ("nan", "inf", "infinity"):
                raise PointsError(file, f"column 'section': expected a label (a number or a name), got {_cell(cell)}", no)
            why = text_problem(cell, "a section label", 40)
            if why:
                raise PointsError(file, f"column 'section': {why}", no)
            secs.append(cell)
    if not xyz:
        raise PointsError(file, "no points: expected rows of x,y,z after the header")
    sections = None
    if SECTION in idx:
        try:
            sections = np.array([float(s) for s in secs])
        except ValueError:
            sections = np.array(secs)
    return PointCloud(np.array(xyz, float), sections, file, np.array(nos))


def parse_points(src, file: str = "<points>") -> PointCloud:
    """Read points from a text stream (fast path: :func:`numpy.loadtxt`; on any problem the file
    is read again line by line to name the bad line)."""
    text = src.read()
    if "\r" in text:  # Windows (CR LF) and old Mac (CR only) line endings
        text = text.replace("\r\n", "\n").replace("\r", "\n")
    stripped = text.lstrip()
    if not stripped:
        raise PointsError(file, "empty file: expected a header row x,y,z[,section] and points")
    first_i = text[: len(text) - len(stripped)].count("\n")  # blank lines before the header
    head = stripped.split("\n", 1)[0]
    names, idx = _header(head, file)
    cols = [idx[k] for k in COLUMNS] + ([idx[SECTION]] if SECTION in idx else [])
    try:
        with warnings.catch_warnings():  # "input contained no data": the slow parse says it better
            warnings.simplefilter("ignore", UserWarning)
            arr = np.loadtxt(io.StringIO(text), delimiter=",", skiprows=first_i + 1, usecols=cols,
                             ndmin=2, comments="#")
    except ValueError:
        return _slow_parse(text.splitlines()[first_i:], file, names, idx, first_i)
    if arr.shape[0] == 0 or arr.shape[1] != len(cols) or not np.isfinite(arr).all() \
            or np.abs(arr[:, :3]).max() > MAX_COORDINATE:
        return _slow_parse(text.splitlines()[first_i:], file, names, idx, first_i)
    if any(ch in text for ch in "_") or not text.isascii():
        # loadtxt takes Python's float(), which reads "4_0" and non-ASCII digits: check strictly
        return _slow_parse(text.splitlines()[first_i:], file, names, idx, first_i)
    # loadtxt ignores surplus columns; a long row must still be an error: count the commas
    # (cheap), and on any mismatch let the line-by-line parse find the line
    if text.count(",") != (len(names) - 1) * (arr.shape[0] + 1):
        return _slow_parse(text.splitlines()[first_i:], file, names, idx, first_i)
    xyz = np.ascontiguousarray(arr[:, :3])
    sections = arr[:, 3].copy() if SECTION in idx else None
    return PointCloud(xyz, sections, file)


def read_points(path: str | os.PathLike) -> PointCloud:
    """Read a points CSV file; errors name the file (and the line)."""

    def fail(message: str):
        raise PointsError(str(path), message)

    text = read_text(path, "a .csv file of points", fail, MAX_POINTS_BYTES)
    return parse_points(io.StringIO(text), str(path))


def write_points(path: str | os.PathLike, xyz: np.ndarray, sections=None, decimals: int = 6) -> None:
    """Write points as CSV (x,y,z[,section]) with a header row."""
    xyz = np.asarray(xyz, float)
    with open(path, "w", encoding="utf-8", newline="\n") as fh:
        if sections is None:
            fh.write("x,y,z\n")
            np.savetxt(fh, xyz, delimiter=",", fmt=f"%.{decimals}f")
        else:
            fh.write("x,y,z,section\n")
            for (x, y, z), s in zip(xyz, sections):
                fh.write(f"{x:.{decimals}f},{y:.{decimals}f},{z:.{decimals}f},{s}\n")
