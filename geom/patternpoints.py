"""Measured patterns from CMM points: one points CSV per member, and optionally one per datum
feature of size.

Each member gets its unrelated actual mating envelope (a hole: the largest inscribed cylinder; a
pin: the smallest circumscribed one), fitted exactly as :mod:`geom.inspect` fits one feature
(:func:`geom.fitting.ls_cylinder` then :func:`geom.fitting.minimax_cylinder`): its diameter is
the member's produced size and its axis the member's axis. A datum feature's envelope is related
to A (held perpendicular to A, location free): its diameter is the datum's produced size (the
datum shift is measured from it, ASME Y14.5 datum feature shift, from memory) and its axis at A
is the frame origin. Without datum points the CMM frame's origin is taken as the datum axis.

A member's axis is judged at both of its ends (z = 0 and z = length): the zone is a cylinder
normal to A, so the axis lies within it if and only if both ends do. The best fit within the
datum shift moves every end as one body (:func:`geom.patterns.best_fit`); a member's reading is
the larger of its two ends'.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .model import Kind


class PatternPointsError(ValueError):
    """Points of a pattern that cannot be read or fitted; the message names the file."""


@dataclass(frozen=True)
class CylinderFit:
    """A fitted envelope: diameter and the axis at z = 0 and at z = ``length`` (x, y)."""

    file: str
    diameter: float
    bottom: tuple[float, float]
    top: tuple[float, float]


@dataclass(frozen=True)
class MemberPoints:
    index: int
    fit: CylinderFit  # axis ends relative to the frame origin
    reading: float  # the larger of the two ends' diametral positions after the best fit
    governing_end: str  # "bottom" | "top"


@dataclass(frozen=True)
class PointsFit:
    members: tuple[MemberPoints, ...]
    datums: tuple[tuple[str, CylinderFit], ...]  # datum features of size fitted (axes in CMM frame)
    origin: tuple[float, float]
    assumptions: tuple[str, ...]


def _points(base: Path, rel: str):
    from .pointsfile import PointsError, read_points

    path = Path(rel)
    full = (path if path.is_absolute() else base / path).resolve()
    if not full.is_relative_to(base):  # as geom.inspect: a scene reads only files beside it
        raise PatternPointsError(f"{rel}: expected a points CSV file inside the scene's folder {base}")
    try:
        return read_points(full)
    except PointsError as e:
        raise PatternPointsError(str(e)) from None


def fit_cylinder(P: np.ndarray, length: float, hole: bool, file: str, related: bool = False) -> CylinderFit:
    """The actual mating envelope of points ``P`` (n, 3): unrelated (axis free) or related to A
    (axis normal to A). Same steps as :func:`geom.inspect.inspect_feature`."""
    from . import fitting as F
    from .inspect.readings import _line_through, group_sections
    from .pointsfile import PointCloud

    groups, _labels = group_sections(PointCloud(P, None, file), length)
    groups = [g for g in groups if len(g) >= 3]
    if len(groups) < 2:
        raise PatternPointsError(f"{file}: expected rings of at least 3 points at 2 or more heights")
    zs = np.array([float(P[g, 2].mean()) for g in groups])
    if np.ptp(zs) <= 1e-3 * length:
        raise PatternPointsError(f"{file}: all sections lie at one height; an axis needs several")
    try:
        rough = np.array([[*F.ls_circle(P[g, :2], iterations=4)[:2], z] for g, z in zip(groups, zs)])
        z0 = float(P[:, 2].mean())
        x_ls, _r = F.ls_cylinder(P, _line_through(rough, z0), z0)
        if related:
            x0 = np.array([x_ls[0], x_ls[1], 0.0, 0.0])
            x, r = F.minimax_cylinder(P, x0, z0, inscribed=hole, free=(True, True, False, False))
        else:
            x, r = F.minimax_cylinder(P, x_ls, z0, inscribed=hole)
    except (F.FitError, np.linalg.LinAlgError, FloatingPointError, OverflowError) as e:
        raise PatternPointsError(f"{file}: the points do not determine a cylinder ({e})") from None
    ends = F.axis_point(x, z0, np.array([0.0, float(length)]))
    return CylinderFit(file, 2.0 * float(r), (float(ends[0, 0]), float(ends[0, 1])),
                       (float(ends[1, 0]), float(ends[1, 1])))


def fit_pattern_points(scene, spec, pattern) -> tuple[list[CylinderFit], dict[str, float], PointsFit]:
    """Members' fits (axes relative to the origin), the datum sizes from points, and the record."""
    base = (Path(scene.source).parent if scene.source else Path.cwd()).resolve()
    feat = pattern.feature
    hole = feat.kind is Kind.HOLE
    datums, sizes, notes = [], {}, []
    origin = (0.0, 0.0)
    for letter, rel in spec.datum_points:
        df = pattern.frame.ref(letter).feature
        pc = _points(base, rel)
        fit = fit_cylinder(pc.xyz, df.length, df.kind is Kind.HOLE, pc.file, related=True)
        datums.append((letter, CylinderFit(rel, fit.diameter, fit.bottom, fit.top)))
        sizes[letter] = fit.diameter
        if letter == pattern.frame.secondary.letter:
            origin = fit.bottom
    if not any(ltr == pattern.frame.secondary.letter for ltr, _ in datums):
        notes.append("no points of the datum feature: the CMM frame's origin is taken as the datum axis")
    fits = []
    for rel in spec.points:
        pc = _points(base, rel)
        f = fit_cylinder(pc.xyz, feat.length, hole, pc.file)
        fits.append(CylinderFit(rel, f.diameter, (f.bottom[0] - origin[0], f.bottom[1] - origin[1]),
                                (f.top[0] - origin[0], f.top[1] - origin[1])))
    return fits, sizes, PointsFit((), tuple(datums), origin, tuple(notes))


def judge_ends(p, fits, datum_sizes, wrong: bool = False):
    """The pattern check (:class:`geom.patterns.PatternCheck`, one reading per member) with both
    ends of each member's axis in the fit; and per member (reading, governing end)."""
    from .patterns import PatternCheck, Reading, _freedom, _rot, best_fit, members

    mem = members(p, [f.diameter for f in fits])
    s2, radius, rotation, tert = _freedom(p, datum_sizes or None)
    added = 2.0 * radius if wrong else 0.0
    if wrong:
        tert = None if tert is None else (tert[0], tert[1], tert[2] + radius)
        radius = 0.0
    allowed = [mb.allowed.value + added for mb in mem]
    groups = [list(range(p.count))] if p.requirement == "simultaneous" else [[i] for i in range(p.count)]
    readings, per = [None] * p.count, [None] * p.count
    for g in groups:
        m = [e for i in g for e in (fits[i].bottom, fits[i].top)]
        b = [mem[i].basic for i in g for _ in range(2)]
        a = [allowed[i] for i in g for _ in range(2)]
        _, d, th = best_fit(m, b, a, radius, rotation, tert)
        moved = [(fx + d[0], fy + d[1]) for fx, fy in _rot(th, m)]
        for k, i in enumerate(g):
            bx, by = mem[i].basic
            pos = [2.0 * math.hypot(q[0] - bx, q[1] - by) for q in moved[2 * k:2 * k + 2]]
            j = 0 if pos[0] >= pos[1] else 1
            readings[i] = Reading(i, mem[i].basic, m[2 * k + j], moved[2 * k + j], mem[i].size, pos[j], allowed[i],
                                  allowed[i] - pos[j], d, math.degrees(th))
            per[i] = (pos[j], "bottom" if j == 0 else "top")
    gov = min(readings, key=lambda r: r.margin)
    chk = PatternCheck("wrong" if wrong else "right", p.requirement, tuple(readings), gov.index, gov.shift,
                       gov.rotation_deg, s2, added, all(r.conforms for r in readings))
    return chk, per


def judged_from_points(scene, spec, pattern, shifts: bool):
    """(right way, wrong way or None, PointsFit) of a pattern whose members come from points."""
    fits, sizes, rec = fit_pattern_points(scene, spec, pattern)
    dsz = dict(spec.datum_sizes)
    dsz.update(sizes)
    right, per = judge_ends(pattern, fits, dsz)
    wrong = judge_ends(pattern, fits, dsz, wrong=True)[0] if shifts else None
    mems = tuple(MemberPoints(i, f, r, e) for i, (f, (r, e)) in enumerate(zip(fits, per)))
    return right, wrong, PointsFit(mems, rec.datums, rec.origin, rec.assumptions)


__all__ = ["CylinderFit", "MemberPoints", "PatternPointsError", "PointsFit", "fit_cylinder",
           "fit_pattern_points", "judge_ends", "judged_from_points"]
