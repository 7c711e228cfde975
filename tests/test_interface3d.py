"""The 3D picture of both parts of an interface, on the invented pump cover scene.

Check values are computed here from the scene's limits and tolerances: a hole's VC is MMC - t at
MMC and a pin's MMC + t at MMC (ASME Y14.5 virtual condition, from memory); the worst-case
clearance of a pair is hole VC - pin VC (ASME Y14.5 functional gauging, common practice). The
drawing transform is the one documented in viewer/scene3d/interface.py: a radius r drawn at
R0 + k (r - R0) about the pair's basic location, R0 the hole's MMC radius.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from geom import analyse_scene, load
from viewer.scene3d.interface import HIGHLIGHT, build_interface_scene, interfaces_of

SCENE = Path(__file__).resolve().parents[1] / "scenes" / "pump_cover_bolts.toml"


@pytest.fixture(scope="module")
def res():
    return analyse_scene(load(SCENE))


@pytest.fixture(scope="module")
def sc3(res):
    return build_interface_scene(res, 0)


def _radius(mesh, c):
    p = np.asarray(mesh.points)
    return float(np.hypot(p[:, 0] - c[0], p[:, 1] - c[1]).max())


def test_both_plates_are_drawn_round_the_pattern(res, sc3):
    assert interfaces_of(res, "cover-bolts") == [0] == interfaces_of(res, "housing-studs")
    p1, p2 = sc3.find("part", "part 1").mesh, sc3.find("mating_part", "part 2").mesh
    x0, x1, y0, y1, z0, z1 = p1.bounds
    assert (z0, z1) == pytest.approx((0.0, 10.0))  # part 1 is the cover: its holes' length (scene file)
    assert p2.bounds[5] == pytest.approx(0.0) and p2.bounds[4] < 0.0  # part 2 under datum A
    reach = 36.0 / math.sqrt(2.0)  # bolt circle 72 at 45 deg (scene file)
    assert x0 < -reach - 4.5 and x1 > reach + 4.5 and y0 < -reach - 4.5 and y1 > reach + 4.5


def test_each_vc_cage_is_geoms_vc_at_the_documented_scale(res, sc3):
    k, R0 = sc3.exaggeration, 9.000 / 2
    hole_vc = 9.000 - 0.150  # hole MMC - t at MMC (scene file)
    pin_vc = 8.700 + 0.100  # stud MMC + t at MMC (scene file)
    holes = [it for it in sc3.layers["vc"] if it.name == "hole VC"]
    pins = [it for it in sc3.layers["vc"] if it.name == "pin VC"]
    locs = res.frames.patterns[0].pattern.locations
    assert len(holes) == len(pins) == len(locs) == 4
    for h, p, c in zip(holes, pins, locs):
        assert R0 + (_radius(h.mesh, c) - R0) / k == pytest.approx(hole_vc / 2, abs=1e-9)
        assert R0 + (_radius(p.mesh, c) - R0) / k == pytest.approx(pin_vc / 2, abs=1e-9)
    zones = [it for it in sc3.layers["zone"] if it.name == "hole zone"]
    assert [_radius(z.mesh, c) for z, c in zip(zones, locs)] == pytest.approx([k * 0.150 / 2] * 4, abs=1e-9)


def test_the_tightest_pair_is_labelled_with_its_clearance(res, sc3):
    u = res.scene.units
    c = (9.000 - 0.150) - (8.700 + 0.100)  # hole VC - pin VC, the same at every pair here
    m = res.frames.interfaces[0].mate
    assert m.pairs[m.tightest].clearance_min.value == pytest.approx(c, abs=1e-12)
    lab = [lb for lb in sc3.labels if lb.layer == "clearance"]
    assert len(lab) == 1 and u.fmt(c) in lab[0].text and f"pair {m.tightest + 1}" in lab[0].text
    assert sc3.clearance == pytest.approx(c) and "ASSEMBLES" in sc3.verdict
    assert sc3.kind == "interface" and "gap" in sc3.cameras


def test_the_datum_size_what_if_moves_only_the_pilot_bore(res, sc3):
    other = build_interface_scene(res, 0, datum_sizes={"cover-pilot": 52.030})
    assert other.find("part", "part 1").mesh is not sc3.find("part", "part 1").mesh
    assert other.find("vc", "hole VC").mesh is sc3.find("vc", "hole VC").mesh  # replayed, not rebuilt
    assert build_interface_scene(res, 0).find("part", "part 1").mesh is sc3.find("part", "part 1").mesh


def test_an_off_screen_render_shows_the_parts_and_the_highlight(sc3):
    from viewer.scene3d import render_image

    img = render_image(sc3, view="top", size=(800, 600)).astype(int)
    assert (np.abs(img - 255).sum(axis=2) > 30).mean() > 0.05  # a good part of the frame is drawn
    want = np.array([int(HIGHLIGHT[i:i + 2], 16) for i in (1, 3, 5)])
    assert (np.abs(img - want).sum(axis=2) < 24).sum() > 20  # the tightest pair's ring (unlit: its colour)
