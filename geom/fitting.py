"""Fits of circles and cylinders to measured points: least squares (Gaussian), maximum inscribed,
minimum circumscribed. Pure numpy; scipy is imported inside the functions that need it.

Every envelope is of the points themselves (no chords between them):

* :func:`ls_circle` — geometric least-squares circle (Gauss-Newton from the algebraic fit);
* :func:`inscribed_circle` — the largest circle holding no point, centred inside the points'
  convex hull: the best Voronoi vertex (a Delaunay circumcentre), exact for the discrete set;
* :func:`circumscribed_circle` — the smallest circle holding every point (Welzl's algorithm,
  with numpy doing the "which point is outside" scans), exact for the discrete set;
* :func:`minimax_cylinder` — the largest empty / smallest enclosing cylinder, axis free or held
  (any subset of: axis position, axis tilt), by sequential linear programming with a trust
  region and constraint generation (minimax problems converge quadratically at a vertex);
* :func:`ls_cylinder` — the least-squares cylinder (Gauss-Newton).

An axis is written ``(a, b, u, v)``: it passes through ``(a, b, z0)`` with direction
``(u, v, 1)``; ``z0`` is a reference height chosen by the caller (the points' mean height keeps
the problem well conditioned).

>>> import numpy as np
>>> t = np.linspace(0, 2 * np.pi, 12, endpoint=False)
>>> xy = np.c_[1 + 2 * np.cos(t), -3 + 2 * np.sin(t)]
>>> [round(float(v), 9) for v in ls_circle(xy)]
[1.0, -3.0, 2.0]
>>> c = inscribed_circle(xy); round(c[2], 9)
2.0
>>> c = circumscribed_circle(xy); round(c[2], 9)
2.0
"""

from __future__ import annotations

import math

import numpy as np


class FitError(ValueError):
    """Points that cannot be fitted (too few, collinear, not surrounding a centre)."""


# ---------------------------------------------------------------- circles


def ls_circle(xy: np.ndarray, iterations: int = 30) -> tuple[float, float, float]:
    """Geometric least-squares circle (cx, cy, r): minimises the sum of squared radial deviations."""
    xy = np.asarray(xy, float)
    if len(xy) < 3:
        raise FitError(f"a circle needs at least 3 points, got {len(xy)}")
    m = xy.mean(axis=0)
    q = xy - m
    scale = float(np.abs(q).max()) or 1.0
    q = q / scale
    # algebraic (Kasa) start: x^2 + y^2 = A x + B y + C
    A = np.c_[q, np.ones(len(q))]
    sol, *_ = np.linalg.lstsq(A, (q * q).sum(axis=1), rcond=None)
    c = sol[:2] / 2.0
    r2 = sol[2] + c @ c
    if not np.isfinite(r2) or r2 <= 0:
        raise FitError("points are collinear: no circle fits them")
    r = math.sqrt(r2)
    for _ in range(iterations):
        d = q - c
        rho = np.hypot(d[:, 0], d[:, 1])
        if np.any(rho == 0):
            break
        J = np.c_[-d / rho[:, None], -np.ones(len(q))]
        res = rho - r
        step, *_ = np.linalg.lstsq(J, -res, rcond=None)
        c = c + step[:2]
        r = r + step[2]
        if np.abs(step).max() < 1e-15:
            break
    return (float(c[0] * scale + m[0]), float(c[1] * scale + m[1]), float(abs(r) * scale))


def _circumcentres(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Circumcentres of triangles (rows of a, b, c), computed relative to a."""
    bx, by = (b - a).T
    cx, cy = (c - a).T
    d = 2.0 * (bx * cy - by * cx)
    with np.errstate(divide="ignore", invalid="ignore"):
        ux = (cy * (bx * bx + by * by) - by * (cx * cx + cy * cy)) / d
        uy = (bx * (cx * cx + cy * cy) - cx * (bx * bx + by * by)) / d
    return a + np.c_[ux, uy]


def inscribed_circle(xy: np.ndarray, centre_hint=None) -> tuple[float, float, float]:
    """Maximum inscribed circle (cx, cy, r) of a ring of points: the largest circle holding no
    point whose centre lies inside the points' convex hull (a vertex of their Voronoi diagram).

    The radius returned is the smallest distance from the centre to any point, so it is the
    radius of an empty circle by construction.
    """

    xy = np.asarray(xy, float)
    if len(xy) < 3:
        raise FitError(f"a circle needs at least 3 points, got {len(xy)}")
    m = xy.mean(axis=0) if centre_hint is None else np.asarray(centre_hint, float)
    q = xy - m
    rho = np.hypot(q[:, 0], q[:, 1])
    rmin, rmax = float(rho.min()), float(rho.max())
    # Fast path: only points near the smallest radius can touch the inscribed circle. Solve on
    # them; accept the answer only if it holds for every point (checked below), else use all.
    band = 0.2 * (rmax - rmin)
    sub = np.flatnonzero(rho <= rmin + band)
    if 3 <= len(sub) < len(q):
        got = _inscribed_vertex(q[sub], rmin)
        if got is not None:
            c, r_sub = got
            r_all = float(np.hypot(*(q - c).T).min())
            # a point outside the subset is at >= rmin + band from m, so >= rmin + band - |c| from c;
            # the circle (radius <= rmin + |c|) cannot reach it while 2 |c| < band
            if 2 * float(np.hypot(*c)) < band and abs(r_all - r_sub) <= 1e-12 * max(1.0, rmax):
                return (float(c[0] + m[0]), float(c[1] + m[1]), r_all)
    got = _inscribed_vertex(q, rmin)
    if got is None:
        raise FitError("no inscribed circle: the points do not surround any centre")
    c, _ = got
    rad = float(np.hypot(*(q - c).T).min())
    return (float(c[0] + m[0]), float(c[1] + m[1]), rad)


def _inscribed_vertex(q: np.ndarray, rmin: float):
    """Largest empty circle of points ``q`` centred inside their convex hull: (centre, radius),
    or None. The centre is a Voronoi vertex (circumcentre of a Delaunay triangle)."""
    from scipy.spatial import Delaunay

    try:
        tri = Delaunay(q)
    except Exception:  # qhull: all points collinear or coincident
        return None
    s = tri.simplices
    cc = _circumcentres(q[s[:, 0]], q[s[:, 1]], q[s[:, 2]])
    ok = np.isfinite(cc).all(axis=1)
    ok[ok] = tri.find_simplex(cc[ok]) >= 0
    if not ok.any():
        return None
    r = np.hypot(*(cc - q[s[:, 0]]).T)
    r[~ok] = -np.inf
    i = int(np.argmax(r))
    return cc[i], float(r[i])


def circumscribed_circle(xy: np.ndarray, seed: int = 0) -> tuple[float, float, float]:
    """Minimum circumscribed circle (cx, cy, r): the smallest circle holding every point.

    Welzl's incremental algorithm on a seeded shuffle (expected linear time); the scans for a
    point outside the current circle are vectorised. The radius returned is the largest
    distance from the centre to any point.
    """
    xy = np.asarray(xy, float)
    if len(xy) < 2:
        raise FitError(f"a circle needs at least 2 points, got {len(xy)}")
    m = xy.mean(axis=0)
    P = xy - m
    P = P[np.random.default_rng(seed).permutation(len(P))]
    scale = float(np.abs(P).max()) or 1.0
    eps = 1e-12 * scale

    def first_out(lo: int, hi: int, c, r) -> int | None:
        if hi <= lo:
            return None
        d = np.hypot(P[lo:hi, 0] - c[0], P[lo:hi, 1] - c[1])
        out = d > r + eps
        if not out.any():
            return None
        return lo + int(np.argmax(out))

    def circ3(a, b, c):
        cc = _circumcentres(a[None], b[None], c[None])[0]
        if not np.isfinite(cc).all():  # collinear: the two farthest apart
            pts = [a, b, c]
            i, j = max(((0, 1), (0, 2), (1, 2)), key=lambda ij: np.hypot(*(pts[ij[0]] - pts[ij[1]])))
            cc = (pts[i] + pts[j]) / 2.0
        return cc, float(max(np.hypot(*(cc - a)), np.hypot(*(cc - b)), np.hypot(*(cc - c))))

    c, r = P[0].copy(), 0.0
    n = len(P)
    i = first_out(1, n, c, r)
    while i is not None:
        c, r = P[i].copy(), 0.0
        j = first_out(0, i, c, r)
        while j is not None:
            c = (P[i] + P[j]) / 2.0
            r = float(np.hypot(*(P[i] - P[j]))) / 2.0
            k = first_out(0, j, c, r)
            while k is not None:
                c, r = circ3(P[i], P[j], P[k])
                k = first_out(k + 1, j, c, r)
            j = first_out(j + 1, i, c, r)
        i = first_out(i + 1, n, c, r)
    rad = float(np.hypot(*(P - c).T).max())
    return (float(c[0] + m[0]), float(c[1] + m[1]), rad)


def local_sizes(xy: np.ndarray, centre) -> np.ndarray:
    """Two-point sizes: each point's radius from ``centre`` plus the radius of the surface
    opposite (interpolated along the angle). ISO 14405-1 takes the two points on a line through
    the associated (least-squares) circle's centre (from memory)."""
    d = np.asarray(xy, float) - np.asarray(centre, float)
    ang = np.arctan2(d[:, 1], d[:, 0])
    rad = np.hypot(d[:, 0], d[:, 1])
    order = np.argsort(ang)
    opp = np.interp(ang + np.pi, ang[order], rad[order], period=2 * np.pi)
    return rad + opp


def largest_angular_gap(xy: np.ndarray, centre) -> float:
    """Largest angle (radians) between consecutive points seen from ``centre``."""
    d = np.asarray(xy, float) - np.asarray(centre, float)
    ang = np.sort(np.arctan2(d[:, 1], d[:, 0]))
    if len(ang) < 2:
        return 2 * np.pi
    gaps = np.diff(np.r_[ang, ang[0] + 2 * np.pi])
    return float(gaps.max())


# ---------------------------------------------------------------- cylinders


def axis_distances(P: np.ndarray, x, z0: float, jac: bool = False):
    """Distances of points ``P`` (n, 3) from the axis ``x = (a, b, u, v)`` through (a, b, z0) with
    direction (u, v, 1); with ``jac`` also their gradient (n, 4) with respect to (a, b, u, v)."""
    a, b, u, v = (float(t) for t in x)
    wx = P[:, 0] - a
    wy = P[:, 1] - b
    wz = P[:, 2] - z0
    n2 = 1.0 + u * u + v * v
    s = u * wx + v * wy + wz
    d2 = wx * wx + wy * wy + wz * wz - s * s / n2
    d = np.sqrt(np.maximum(d2, 0.0))
    if not jac:
        return d
    with np.errstate(divide="ignore", invalid="ignore"):
        h = 0.5 / d
    h[~np.isfinite(h)] = 0.0
    g = np.empty((len(P), 4))
    g[:, 0] = (-2.0 * wx + 2.0 * s * u / n2) * h
    g[:, 1] = (-2.0 * wy + 2.0 * s * v / n2) * h
    g[:, 2] = (-2.0 * s * wx / n2 + 2.0 * s * s * u / (n2 * n2)) * h
    g[:, 3] = (-2.0 * s * wy / n2 + 2.0 * s * s * v / (n2 * n2)) * h
    return d, g


def minimax_cylinder(P: np.ndarray, x0, z0: float, inscribed: bool, free=(True, True, True, True),
                     max_iter: int = 200, offsets=None) -> tuple[np.ndarray, float]:
    """Largest cylinder holding no point (``inscribed``) or smallest holding all of them.

    ``x0 = (a, b, u, v)`` starts the search and gives the values of the parameters that are
    not ``free``. Returns (axis parameters, radius). The radius is the smallest (inscribed) or
    largest (circumscribed) distance of a point from the axis found, so it is exact for that
    axis; the axis is a local optimum reached from ``x0`` (start from a least-squares fit).

    ``offsets`` (n,), if given, are subtracted from the distances: the circumscribed fit then
    minimises max_i (d_i - offset_i) (each point with an allowance of its own), the inscribed
    fit maximises min_i (d_i - offset_i); the value returned is that max (min).

    Method: sequential linear programming. At x, maximise r subject to
    d_i(x) + g_i . dx >= r (or minimise r subject to <=) inside a box trust region, on a working
    set of constraints that grows with every linearised constraint the step violates.
    """
    from scipy.optimize import linprog

    P = np.asarray(P, float)
    x = np.asarray(x0, float).copy()
    free = np.asarray(free, bool)
    sgn = 1.0 if inscribed else -1.0  # work on sgn * d: maximise its minimum
    off = np.zeros(len(P)) if offsets is None else np.asarray(offsets, float)

    def dist(xx, jac=False):
        if jac:
            d, g = axis_distances(P, xx, z0, jac=True)
            return d - off, g
        return axis_distances(P, xx, z0) - off

    def value(xx):
        return sgn * float((sgn * dist(xx)).min())

    if not free.any():
        return x, value(x)
    k = int(free.sum())
    zspan = float(np.ptp(P[:, 2])) or 1.0
    d = dist(x)
    spread = float(np.ptp(d)) or 1e-6 * (float(np.abs(d).mean()) or 1.0)
    unit = np.array([1.0, 1.0, 1.0 / zspan, 1.0 / zspan])[free]
    delta = 0.5 * spread
    tiny = 1e-15 * max(1.0, float(np.abs(P).max()))
    f = sgn * d
    fbest = float(f.min())
    for _ in range(max_iter):
        d, g = dist(x, jac=True)
        f = sgn * d
        G = sgn * g[:, free]
        fbest = float(f.min())
        ws = np.argsort(f)[: min(len(f), 8 * (k + 1))]
        bounds = [(-delta * s, delta * s) for s in unit] + [(None, None)]
        c = np.zeros(k + 1)
        c[-1] = -1.0  # maximise t
        for _ in range(20):
            # t - G dx <= f
            A = np.c_[-G[ws], np.ones(len(ws))]
            res = linprog(c, A_ub=A, b_ub=f[ws], bounds=bounds, method="highs")
            if res.status != 0:
                break
            dx, t = res.x[:k], res.x[k]
            lin = f + G @ dx
            viol = np.flatnonzero(lin < t - 1e-14 * max(1.0, abs(t)))
            viol = np.setdiff1d(viol, ws, assume_unique=False)
            if len(viol) == 0:
                break
            add = viol[np.argsort(lin[viol])[: 8 * (k + 1)]]
            ws = np.r_[ws, add]
        else:
            pass
        if res.status != 0:
            break
        predicted = t - fbest
        if predicted <= 1e-14 * max(1.0, abs(fbest)) + tiny:
            break
        xn = x.copy()
        xn[free] += dx
        fn = float((sgn * dist(xn)).min())
        actual = fn - fbest
        if actual >= 0.1 * predicted:
            x = xn
            if actual >= 0.75 * predicted and np.abs(dx / unit).max() >= 0.99 * delta:
                delta *= 2.0
        else:
            delta *= 0.25
        if delta < tiny:
            break
    return x, value(x)


def ls_cylinder(P: np.ndarray, x0, z0: float, iterations: int = 50) -> tuple[np.ndarray, float]:
    """Least-squares (Gaussian) cylinder: axis (a, b, u, v) and radius minimising the sum of
    squared radial deviations. Gauss-Newton from ``x0``."""
    P = np.asarray(P, float)
    x = np.asarray(x0, float).copy()
    d = axis_distances(P, x, z0)
    r = float(d.mean())
    for _ in range(iterations):
        d, g = axis_distances(P, x, z0, jac=True)
        J = np.c_[g, -np.ones(len(P))]
        res = d - r
        JtJ = J.T @ J
        step = np.linalg.lstsq(JtJ, -(J.T @ res), rcond=None)[0]
        x = x + step[:4]
        r = r + step[4]
        if np.abs(step).max() < 1e-15 * max(1.0, abs(r)):
            break
    return x, float(r)


def axis_point(x, z0: float, z: float | np.ndarray) -> np.ndarray:
    """Point(s) (x, y) of the axis (a, b, u, v) at height(s) z."""
    a, b, u, v = x
    z = np.asarray(z, float)
    return np.stack([a + u * (z - z0), b + v * (z - z0)], axis=-1)


def axis_direction_unit(x) -> np.ndarray:
    _, _, u, v = x
    d = np.array([u, v, 1.0])
    return d / np.linalg.norm(d)


def min_width_along_x(z: np.ndarray, xs: np.ndarray, tilt_free: bool) -> float:
    """Smallest distance between two planes normal to x (tilted about y when ``tilt_free``)
    holding every point (z_i, x_i): an exact linear programme."""
    z = np.asarray(z, float)
    xs = np.asarray(xs, float)
    if not tilt_free:
        return float(np.ptp(xs))
    if len(z) < 3:
        return 0.0
    from scipy.optimize import linprog

    zc = z - z.mean()
    # variables (s, lo, hi): lo <= x - s z <= hi, minimise hi - lo (measured along x; the planes'
    # tilt is tiny so the normal width differs by a factor cos(atan s) ~ 1 - s^2/2)
    A = np.r_[np.c_[zc, np.ones(len(z)), np.zeros(len(z))], np.c_[-zc, np.zeros(len(z)), -np.ones(len(z))]]
    # rows:  s z + lo <= x  ->  [z, 1, 0] . (s, lo, hi) <= x ;  -s z - hi <= -x
    b = np.r_[xs, -xs]
    res = linprog([0.0, -1.0, 1.0], A_ub=A, b_ub=b, bounds=[(None, None)] * 3, method="highs")
    if res.status != 0:
        return float(np.ptp(xs))
    s = res.x[0]
    return float((res.x[2] - res.x[1]) / math.sqrt(1.0 + s * s))
