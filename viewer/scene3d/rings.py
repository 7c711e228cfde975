"""Rings round an axis, in numpy (no VTK): the points of a right circular cylinder about a
polyline cut by planes parallel to A, the distance of those points to another polyline without
forming them, and the exact normals of the wall through them. These run on every what-if move.

>>> _rings(np.array([[0.0, 0.0, 0.0], [0.0, 0.0, 1.0]]), 2.0, 4).round(12).tolist()[0]
[[2.0, 0.0, 0.0], [0.0, 2.0, 0.0], [-2.0, 0.0, 0.0], [-0.0, -2.0, 0.0]]
"""

from __future__ import annotations

import numpy as np

from ..memo import memoized
from .values import N_PHI


def _axis_at(points: np.ndarray, z: np.ndarray) -> np.ndarray:
    """Axis points at heights z (linear interpolation / extrapolation of the polyline)."""
    zp = points[:, 2]
    out = np.empty((len(z), 3))
    for i in (0, 1):
        if len(zp) == 2:
            a, b = points[0, i], points[1, i]
            out[:, i] = a + (b - a) * (z - zp[0]) / (zp[1] - zp[0])
        else:
            out[:, i] = np.interp(z, zp, points[:, i])
    out[:, 2] = z
    return out


@memoized("scene3d unit circles", 16)
def _unit_circle(n_phi: int) -> np.ndarray:
    """(n_phi, 2) read-only array of (cos phi, sin phi), phi = 2 pi j / n_phi."""
    phi = 2.0 * np.pi * np.arange(n_phi) / n_phi
    cs = np.column_stack((np.cos(phi), np.sin(phi)))
    cs.flags.writeable = False
    return cs


def _ring_frame(axis: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(U, V), each (nz, 3): the point at angle phi of the unit-radius ring of :func:`_rings` at
    ``axis[i]`` is ``axis[i] + cos(phi) U[i] + sin(phi) V[i]``. U and V are the unit vectors e1, e2
    normal to the axis (e1 from +x), each slid along the axis back into the plane z = axis z."""
    T = np.gradient(axis, axis=0) if len(axis) > 2 else np.repeat((axis[1] - axis[0])[None], len(axis), 0)
    T = T / np.linalg.norm(T, axis=1)[:, None]
    e1 = -T[:, 0:1] * T  # ref - (T . ref) T with ref = +x
    e1[:, 0] += 1.0
    e1 /= np.linalg.norm(e1, axis=1)[:, None]
    e2 = np.empty_like(T)  # T x e1
    e2[:, 0] = T[:, 1] * e1[:, 2] - T[:, 2] * e1[:, 1]
    e2[:, 1] = T[:, 2] * e1[:, 0] - T[:, 0] * e1[:, 2]
    e2[:, 2] = T[:, 0] * e1[:, 1] - T[:, 1] * e1[:, 0]
    inv_tz = 1.0 / T[:, 2:3]
    return e1 - (e1[:, 2:3] * inv_tz) * T, e2 - (e2[:, 2:3] * inv_tz) * T


def _rings(axis: np.ndarray, radius: float, n_phi: int = N_PHI, frame=None) -> np.ndarray:
    """(nz, n_phi, 3) points of a right circular cylinder of ``radius`` about the polyline
    ``axis`` (points at increasing z), cut by the planes z = axis z: each ring is the section
    of the cylinder in the plane parallel to A at that height (an ellipse for a tilted axis)."""
    U, V = _ring_frame(axis) if frame is None else frame
    return axis[:, None, :] + radius * (_unit_circle(n_phi) @ np.stack((U, V), axis=1))


def _ring_dist(axis: np.ndarray, radius: float, line: np.ndarray, n_phi: int) -> np.ndarray:
    """(nz, n_phi) distances of the points ``_rings(axis, radius, n_phi)`` to the polyline
    ``line`` (its end segments extended), as :func:`_dist_to_polyline` gives them, without
    forming the points. On a ring p - a = W0 + cos(phi) U + sin(phi) V is linear in (cos, sin),
    so its part across a segment is D0 + cos D1 + sin D2 and the squared length of that is a
    quadratic form in (cos, sin): six coefficients per ring against the basis
    (1, cos, sin, cos^2, sin^2, 2 sin cos) of the n_phi angles. Past an inner end of a segment
    the part along it beyond the end is added (Pythagoras)."""
    U, V = _ring_frame(axis)
    UV = radius * np.stack((U, V), axis=1)  # (nz, 2, 3)
    basis = _quadratic_basis(n_phi)  # (6, n_phi)
    nseg = len(line) - 1
    best = None
    for i in range(nseg):
        a, ab = line[i], line[i + 1] - line[i]
        L2 = float(ab @ ab)
        W0 = axis - a
        t0 = W0 @ ab / L2  # (nz,)
        t12 = UV @ ab / L2  # (nz, 2)
        D0 = W0 - t0[:, None] * ab
        D1 = UV[:, 0] - t12[:, 0:1] * ab
        D2 = UV[:, 1] - t12[:, 1:2] * ab
        coef = np.column_stack((np.einsum("ij,ij->i", D0, D0), 2.0 * np.einsum("ij,ij->i", D0, D1),
                                2.0 * np.einsum("ij,ij->i", D0, D2), np.einsum("ij,ij->i", D1, D1),
                                np.einsum("ij,ij->i", D2, D2), np.einsum("ij,ij->i", D1, D2)))
        d2 = coef @ basis
        if nseg > 1:  # inner segment ends: add the part along the segment beyond them
            t = t0[:, None] + t12 @ basis[1:3]
            lo = -np.inf if i == 0 else 0.0
            hi = np.inf if i == nseg - 1 else 1.0
            over = t - np.clip(t, lo, hi)
            d2 += over * over * L2
        best = d2 if best is None else np.minimum(best, d2)
    return np.sqrt(np.maximum(best, 0.0))


@memoized("scene3d quadratic bases", 16)
def _quadratic_basis(n_phi: int) -> np.ndarray:
    """(6, n_phi) read-only rows 1, cos, sin, cos^2, sin^2, 2 sin cos of phi = 2 pi j / n_phi."""
    c, s = _unit_circle(n_phi).T
    q = np.vstack((np.ones(n_phi), c, s, c * c, s * s, 2.0 * s * c))
    q.flags.writeable = False
    return q


def _ring_point(axis: np.ndarray, frame, radius: float, i: int, j: int, n_phi: int) -> np.ndarray:
    """The point ``_rings(axis, radius, n_phi, frame)[i, j]`` alone."""
    U, V = frame
    c, s = _unit_circle(n_phi)[j]
    return axis[i] + radius * (c * U[i] + s * V[i])


def _dist_to_polyline(p: np.ndarray, axis: np.ndarray) -> np.ndarray:
    """Distance of points p (m, 3) to the polyline ``axis``, its end segments extended."""
    best = np.full(len(p), np.inf)
    nseg = len(axis) - 1
    for i in range(nseg):
        a, b = axis[i], axis[i + 1]
        ab = b - a
        t = (p - a) @ ab / (ab @ ab)
        lo = -np.inf if i == 0 else 0.0
        hi = np.inf if i == nseg - 1 else 1.0
        t = np.clip(t, lo, hi)
        d = np.linalg.norm(p - (a + t[:, None] * ab), axis=1)
        best = np.minimum(best, d)
    return best


def _tube_normals(rings: np.ndarray) -> np.ndarray:
    """(nz, n, 3) unit normals of the wall through the rings (nz, n, 3), pointing away from each
    ring's centre: the cross product of the tangents round the ring (central difference) and
    along the tube (central difference inside, one-sided at the ends). For the rings of
    :func:`_rings` this is the exact normal of the cylinder, up to the O(h^2) of the central
    difference; a degenerate (zero-radius) ring gets the radial direction, or +x. Written out
    component by component: it runs on every what-if move."""
    nz, n, _ = rings.shape
    j = np.arange(n)
    d_phi = rings[:, (j + 1) % n] - rings[:, (j - 1) % n]
    d_z = np.empty_like(rings)
    d_z[0] = rings[1] - rings[0]
    d_z[-1] = rings[-1] - rings[-2]
    if nz > 2:
        d_z[1:-1] = 0.5 * (rings[2:] - rings[:-2])
    a0, a1, a2 = d_phi[..., 0], d_phi[..., 1], d_phi[..., 2]
    b0, b1, b2 = d_z[..., 0], d_z[..., 1], d_z[..., 2]
    nrm = np.stack((a1 * b2 - a2 * b1, a2 * b0 - a0 * b2, a0 * b1 - a1 * b0), axis=-1)
    out = rings - rings.mean(axis=1, keepdims=True)
    flip = (nrm * out).sum(axis=-1) < 0.0
    nrm[flip] *= -1.0
    length = np.sqrt((nrm * nrm).sum(axis=-1))
    bad = ~(length > 1e-300)
    if bad.any():
        nrm[bad] = out[bad]
        nrm[bad & ~(np.sqrt((out * out).sum(axis=-1)) > 1e-300)] = (1.0, 0.0, 0.0)
        length = np.sqrt((nrm * nrm).sum(axis=-1))
    return nrm / length[..., None]
