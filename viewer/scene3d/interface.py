"""The 3D picture of both parts of an interface (:func:`build_interface_scene`): part 1 (the
plate with the clearance holes and its pilot bore, translucent) seated on part 2 (the plate with
the pins, studs or threaded holes and its pilot boss) on datum A, every pair of the pattern with
the hole's and the pin's VC boundaries (or the fastener), both position zones at MMC, the datum
simulators (the pilot), and the tightest pair highlighted and labelled with its worst-case
clearance. Every number comes from :func:`geom.patterns.mate_patterns` as
:func:`geom.frames.analyse_frames` gives it (``res.frames``): nothing is recomputed here.

Drawing (the transform of the other scenes, :class:`.values._Ex`, one factor k from
:func:`viewer.exaggeration.features_exaggeration` of the hole and the mating feature): at each
pair a radius r is drawn at R0 + k (r - R0) about the pair's basic location, R0 the clearance
hole's MMC radius; the pilot the same way about the datum origin, R0 the pilot bore's MMC radius
(part 1's datum feature; part 2's where part 1 has none); a zone of diameter t is drawn k t
wide about its basic axis. Basic locations and lengths along the axis are true.
"""

from __future__ import annotations

import math

import numpy as np
import pyvista as pv

from geom.analysis import SceneResult, fits
from geom.model import Kind

from .. import style as S
from ..exaggeration import features_exaggeration
from ..memo import memoized
from .assemble import _Built, _exaggeration, _finish, replayed
from .primitives import _cage, _datum_plane, _polyline, _tube
from .rings import _rings, _unit_circle
from .values import N_PHI, Label, Scene3D, _Ex, _line, _surf

HIGHLIGHT = S.CLEARANCE_COLORS[0]  # the tightest pair's ring when it clears (the warning red when it does not)
LIFT = 0.004  # rings drawn this fraction of part 1's thickness above its top face


def interfaces_of(res: SceneResult, pid: str) -> list[int]:
    """Indexes of the scene's interfaces that pattern ``pid`` takes part in."""
    fr = res.frames
    return [i for i, it in enumerate(fr.interfaces if fr is not None else ()) if pid in (it.holes, it.pins)]


def _pattern(res: SceneResult, pid: str):
    return next(pr for pr in res.frames.patterns if pr.pattern.id == pid)


def interface_exaggeration(res: SceneResult, index: int = 0) -> float:
    """The picture's factor: the one exaggeration of the hole and the mating feature together."""
    it = res.frames.interfaces[index]
    return features_exaggeration(res, (_pattern(res, it.holes).pattern.feature, _pattern(res, it.pins).pattern.feature))


@memoized("scene3d interface plates", 16)
def _plate_with_holes(box: tuple, holes: tuple, z0: float, z1: float, n: int = N_PHI) -> pv.PolyData:
    """A rectangular plate ``box`` (x0, x1, y0, y1) from z0 to z1 with round holes through it,
    ``holes`` ((cx, cy, r), ...): both faces triangulated round the holes (shapely's constrained
    Delaunay triangulation), the outer walls and the hole walls. Memoized: the mesh is shared,
    callers must not modify it."""
    import shapely
    from shapely.geometry import Polygon

    cs = _unit_circle(n)
    x0, x1, y0, y1 = box
    rings = [np.column_stack((cx + r * cs[:, 0], cy + r * cs[:, 1])) for cx, cy, r in holes]
    poly = Polygon([(x0, y0), (x1, y0), (x1, y1), (x0, y1)], holes=[ring.tolist() for ring in rings])
    tris = np.array([np.asarray(t.exterior.coords)[:3] for t in
                     shapely.get_parts(shapely.constrained_delaunay_triangles(poly))])
    pts, faces = [], []

    def add(p3, face):
        base = sum(len(p) for p in pts)
        pts.append(p3)
        faces.append(np.column_stack((np.full(len(face), face.shape[1]), face + base)).ravel())

    m = len(tris)
    for z, order in ((z1, [0, 1, 2]), (z0, [0, 2, 1])):  # top and bottom faces
        p = np.column_stack((tris.reshape(-1, 2), np.full(3 * m, z)))
        add(p, np.arange(3 * m).reshape(m, 3)[:, order])
    corners = np.array([(x0, y0), (x1, y0), (x1, y1), (x0, y1)])
    for ring in [corners, *rings]:  # walls: the outline and each hole, quads between the two faces
        k = len(ring)
        p = np.vstack((np.column_stack((ring, np.full(k, z0))), np.column_stack((ring, np.full(k, z1)))))
        j = np.arange(k)
        add(p, np.stack([j, (j + 1) % k, k + (j + 1) % k, k + j], axis=1))
    return pv.PolyData(np.vstack(pts), faces=np.concatenate(faces))


@memoized("scene3d interface boxes", 16)
def _box(bounds: tuple) -> pv.PolyData:
    """A plain box. Memoized: shared, not to be modified."""
    return pv.Box(bounds=bounds)


def _annulus(c, r_in: float, r_out: float, z: float, n: int = N_PHI) -> pv.PolyData:
    """The flat ring between r_in and r_out about ``c`` at height z (quads)."""
    cs = _unit_circle(n)
    p = np.vstack([np.column_stack((c[0] + r * cs[:, 0], c[1] + r * cs[:, 1], np.full(n, z))) for r in (r_in, r_out)])
    j = np.arange(n)
    quads = np.stack([np.full(n, 4), j, (j + 1) % n, n + (j + 1) % n, n + j], axis=1)
    return pv.PolyData(p, faces=quads.ravel())


def _cyl(c, r: float, z0: float, z1: float) -> pv.PolyData:
    """A closed cylinder normal to A (tube with caps, interned)."""
    return _tube(_rings(np.array([[c[0], c[1], z0], [c[0], c[1], z1]]), r), caps=True)


@replayed
def _pair(b: _Built, k: float, R0: float, basic, hole_vc: float, pin_vc: float, t_hole: float, t_pin: float,
          z_hole: tuple, z_pin: tuple, pin_size: float | None, fastener: float | None, names: tuple) -> None:
    """One pair at its basic location: the hole's and the pin's VC cages, both zones at MMC, the
    basic axis, the pin (or the fastener) at its MMC. ``names`` (hole VC, pin VC, zone words)."""
    ex = _Ex(k, tuple(basic), R0)
    c = tuple(basic)
    b.add("vc", names[0], _cage(c, ex.r(hole_vc / 2.0), z_hole[0], z_hole[1]), _line(S.VC, 2.0))
    b.add("vc", names[1], _cage(c, ex.r(pin_vc / 2.0), z_pin[0], z_pin[1], phase=math.pi / 8), _line(S.MATE_AXIS, 1.6))
    b.add("zone", "hole zone", _tube(_rings(np.array([[*c, z_hole[0]], [*c, z_hole[1]]]), k * t_hole / 2.0)),
          _surf(S.ZONE, S.ZONE_OPACITY))
    b.add("zone", "pin zone", _cage(c, k * t_pin / 2.0, z_pin[0], z_pin[1], n_rings=4), _line(S.ZONE_AXIS, 1.4))
    b.add("zone_axis", "basic axis", _polyline(np.array([[*c, min(z_hole[0], z_pin[0])],
                                                         [*c, max(z_hole[1], z_pin[1])]])), _line(S.ZONE_AXIS, 1.5))
    if pin_size is not None:
        b.add("mating_part", "pin", _cyl(c, ex.r(pin_size / 2.0), 0.0, z_pin[1]), _surf(S.MATE, 0.55))
    if fastener is not None:
        b.add("mate", "fastener", _cyl(c, ex.r(fastener / 2.0), z_pin[0], z_hole[1] * 1.15), _surf(S.MATE, 0.75))


def _datum_feature(fr):
    """The frame's datum feature of size (secondary), or None."""
    sec = fr.secondary
    return None if sec is None or sec.is_plane or sec.feature is None else sec


def build_interface_scene(res: SceneResult, index: int = 0, datum_sizes: dict[str, float] | None = None,
                          exaggeration: float | None = None) -> Scene3D:
    """Both parts of interface ``index`` of the scene (``res.frames.interfaces``), each pair's
    boundaries and zones, the pilot, the tightest pair labelled. ``datum_sizes`` maps a datum
    feature's id to its produced size (the what-if of the datum size; else the size the scene
    measured, else its MMC): the pilot bore or boss is drawn at that size, beside its simulator at
    the MMB (the worst-case numbers do not change with it)."""
    sc = res.scene
    u, std = sc.units, sc.standard
    it = res.frames.interfaces[index]
    m = it.mate
    p1, p2 = _pattern(res, it.holes), _pattern(res, it.pins)
    hole, q = p1.pattern.feature, p2.pattern.feature
    k = _exaggeration(exaggeration, lambda: interface_exaggeration(res, index))
    R0 = hole.mmc / 2.0
    b = _Built()
    L1 = hole.length
    # part 2's drawn thickness (not a dimension of the drawing): its holes' length, else a plate
    T2 = q.length if q.kind is Kind.HOLE else 0.4 * L1
    fixed_pin = q.kind is Kind.PIN
    F = m.fastener.fastener if m.fastener is not None and not fixed_pin else None
    z_pin = (0.0, q.length) if fixed_pin else ((-T2, L1) if F is not None else (0.0, L1))
    locs = np.asarray(p1.pattern.locations, float)
    # the pilot: each part's datum feature of size, drawn about part 1's bore MMC radius
    d1, d2 = _datum_feature(p1.pattern.frame), _datum_feature(p2.pattern.frame)
    pilot_ref = (d1 or d2).feature if (d1 or d2) is not None else None
    Rp = pilot_ref.mmc / 2.0 if pilot_ref is not None else R0
    exp = _Ex(k, (0.0, 0.0), Rp)
    sizes = {}
    for pr, d in ((p1, d1), (p2, d2)):
        if d is not None:
            measured = dict(pr.spec.datum_sizes).get(d.letter)
            sizes[d.feature.id] = float((datum_sizes or {}).get(d.feature.id, measured if measured is not None
                                                                 else d.feature.mmc))
    reach = float(np.max(np.abs(locs))) if len(locs) else 0.0
    half = reach + 1.3 * max(R0, Rp if pilot_ref is not None and reach < Rp else 0.0) + 0.9 * R0
    if pilot_ref is not None:
        half = max(half, exp.r(pilot_ref.mmc / 2.0) * 1.25 + 0.5 * R0)
    lo, hi = np.minimum(locs.min(axis=0), 0.0) - half + reach, np.maximum(locs.max(axis=0), 0.0) + half - reach
    box = (float(lo[0]), float(hi[0]), float(lo[1]), float(hi[1]))
    r_hole = R0  # the holes drawn at their MMC
    holes1 = [(float(x), float(y), r_hole) for x, y in locs]
    holes2 = [(float(x), float(y), _Ex(k, (x, y), R0).r(q.mmc / 2.0)) for x, y in locs] if not fixed_pin else []
    for d, holes in ((d1, holes1), (d2, holes2)):
        if d is not None and d.feature.kind is Kind.HOLE:
            holes.append((0.0, 0.0, exp.r(sizes[d.feature.id] / 2.0)))
    b.add("part", "part 1", _plate_with_holes(box, tuple(holes1), 0.0, L1),
          _surf(S.PART, 0.22, smooth_shading=False))
    b.key(f"part 1: '{hole.id}' holes and its pilot (translucent)", S.PART, "part")
    part2 = _plate_with_holes(box, tuple(holes2), -T2, 0.0) if holes2 else _box((*box, -T2, 0.0))
    b.add("mating_part", "part 2", part2, _surf(S.MATE, 0.35, smooth_shading=False))
    b.key(f"part 2: '{q.id}' {'pins' if fixed_pin else 'holes'} and its pilot", S.MATE, "mating_part")
    for d, top in ((d1, L1), (d2, None)):
        if d is not None and d.feature.kind is Kind.PIN:  # a pilot boss stands up from part 2 (down from part 1)
            z = (0.0, d.feature.length) if top is None else (-d.feature.length, 0.0)
            b.add("mating_part" if top is None else "part", f"pilot boss '{d.feature.id}'",
                  _cyl((0.0, 0.0), exp.r(sizes[d.feature.id] / 2.0), *z), _surf(S.MATE, 0.5))
    # datum A and the simulators at their MMB (the gauge's pilot)
    b.add("datum", "datum plane", _datum_plane(0.5 * (box[0] + box[1]), 0.5 * (box[2] + box[3]), -T2 - 0.004 * L1,
                                               0.62 * max(box[1] - box[0], box[3] - box[2])),
          _surf(S.DATUM, S.DATUM_OPACITY, smooth_shading=False, specular=0.0))
    b.key("datum plane A (both parts seat on it)", S.DATUM, "datum")
    for pr, z in ((p1, (0.0, L1)), (p2, (0.0, max(q.length, L1)))):
        for s in pr.gauge.simulators:
            if s.diameter is not None:
                b.add("simulator", f"datum {s.letter} simulator", _cage((0.0, 0.0), exp.r(s.diameter.value / 2.0),
                                                                         *z, n_gen=12), _line(S.DATUM, 2.2))
                b.labels.append(Label((exp.r(s.diameter.value / 2.0), 0.0, z[1]),
                                      f"datum {s.letter} simulator \u00d8{u.fmt(s.diameter.value)} (MMB)",
                                      S.DATUM, 13, layer="simulator"))
    if pilot_ref is not None:
        b.key("datum simulators at their MMB (the pilot)", S.DATUM, "simulator")
    # the pairs
    t1, t2 = p1.members[0].allowed.value, p2.members[0].allowed.value
    for pc in m.pairs:
        _pair(b, k, R0, tuple(map(float, pc.basic)), pc.hole_boundary, pc.pin_boundary, t1, t2, (0.0, L1), z_pin,
              q.mmc if fixed_pin else None, F, ("hole VC", "pin VC" if F is None else "fastener boundary"))
    pin_word = "pin VC" if fixed_pin else ("fastener F" if m.fastener.kind == "floating" else "fastener F + T2")
    b.key(f"hole boundary (VC) \u00d8{u.fmt(m.pairs[0].hole_boundary)}", S.VC, "vc")
    b.key(f"{pin_word} \u00d8{u.fmt(m.pairs[0].pin_boundary)}", S.MATE_AXIS, "vc")
    b.key(f"position zones at MMC: holes \u00d8{u.fmt(t1)} (shaded), {'pins' if fixed_pin else 'holes'} "
          f"\u00d8{u.fmt(t2)} (wire), x{k:g}", S.ZONE, "zone")
    if fixed_pin:
        b.key(f"pins at MMC \u00d8{u.fmt(q.mmc)}", S.MATE, "mating_part")
    if F is not None:
        b.key(f"fastener at MMC \u00d8{u.fmt(F)}", S.MATE, "mate")
    tight = m.pairs[m.tightest]
    c_t = tight.clearance_min.value
    ok = fits(c_t)
    colour = HIGHLIGHT if ok else S.INTERFERENCE
    ext = _Ex(k, tuple(tight.basic), R0)
    r_h, r_p = ext.r(tight.hole_boundary / 2.0), ext.r(tight.pin_boundary / 2.0)
    ztop = L1 * (1.0 + LIFT)
    b.add("clearance", "tightest pair", _annulus(tight.basic, min(r_h, r_p), max(r_h, r_p), ztop),
          dict(color=colour, lighting=False, opacity=1.0))
    ring = _rings(np.array([[*tight.basic, ztop], [*tight.basic, ztop + 1.0]]), max(r_h, r_p) + 0.35 * R0)[0]
    b.add("clearance", "tightest pair ring", _polyline(np.vstack((ring, ring[:1]))), _line(colour, 4.0))
    b.key(f"the tightest pair (pair {tight.index + 1})", colour, "clearance")
    for pc in m.pairs:  # every pair's clearance beside it, the tightest in the highlight
        bx, by = pc.basic
        rr = math.hypot(bx, by) or 1.0
        at = (bx + (bx / rr) * 1.6 * R0, by + (by / rr) * 1.6 * R0, L1)
        if pc.index == m.tightest:
            b.labels.append(Label((bx + (bx / rr) * r_h, by + (by / rr) * r_h, ztop),
                                  f"pair {pc.index + 1}, tightest: worst-case clearance "
                                  f"{u.fmt(pc.clearance_min.value)} {u.value}", colour if not ok else S.TEXT, 15,
                                  layer="clearance"))
        else:
            b.labels.append(Label(at, f"pair {pc.index + 1}: {u.fmt(pc.clearance_min.value)}", S.TEXT, 12))
    lines = [f"interface '{it.holes}' over '{it.pins}', {len(m.pairs)} pairs at their basic locations"]
    lines.append(f"tightest, pair {tight.index + 1}: {tight.clearance_min.formula(u, std)} {u.value}")
    if m.pilot is not None:
        lines.append(f"pilots: {m.pilot.formula(u, std)} {u.value}")
    for fid, s in sizes.items():
        lines.append(f"'{fid}' drawn at {u.fmt(s)} (produced); its simulator at the MMB")
    b.notes += [f"assumes {a}" for a in m.assumptions]
    b.notes.append(f"the pilot drawn about \u00d8{u.fmt(2 * Rp)} the same way (radial deviations x{k:g})")
    verdict = ("ASSEMBLES" if m.assembles else "DOES NOT ASSEMBLE") + \
        f" in the worst case: tightest pair {tight.index + 1} {u.fmt(c_t, signed=True)} {u.value}"
    if m.pilot is not None:
        verdict += f", pilots {u.fmt(m.pilot.value, signed=True)} {u.value}"
    direction = math.degrees(math.atan2(tight.basic[1], tight.basic[0])) if any(tight.basic) else 0.0
    ex = _Ex(k, (0.0, 0.0), R0)
    return _finish(res, b, ex, f"{sc.title}: interface, both parts", lines, verdict, S.OK if m.assembles
                   else S.INTERFERENCE, direction, "interface", (it.holes, it.pins), {}, clearance=c_t,
                   tightest=c_t, bar=None)
