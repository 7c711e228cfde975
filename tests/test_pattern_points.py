"""Measured patterns from CMM points per member (geom.patternpoints, the [[pattern]] points keys)."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from geom.frames import analyse_frames, frames_text, frames_to_json
from geom.patternpoints import fit_cylinder
from geom.pointsfile import write_points
from geom.scenefile import SceneError, dumps, load, loads

L = 10.0
ROOT = Path(__file__).resolve().parent.parent


def cyl(bottom, top, dia, rings=(1.0, 4.0, 6.0, 9.0), n=48):
    """Points exactly on the cylinder of axis bottom (z = 0) -> top (z = L): the known construction."""
    b, t = np.array([*bottom, 0.0]), np.array([*top, L])
    d = (t - b) / np.linalg.norm(t - b)
    e1 = np.cross(d, [0.0, 1.0, 0.0])
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(d, e1)
    out = []
    for z in rings:
        c = b + d * (z / d[2])
        for k in range(n):
            a = 2 * math.pi * k / n
            out.append(c + dia / 2 * (math.cos(a) * e1 + math.sin(a) * e2))
    return np.array(out)


@pytest.mark.parametrize("hole", [True, False])
def test_perfect_cylinder_gives_size_and_axis_ends(hole):
    # the known construction (numpy): a perfect cylinder's envelope is itself
    P = cyl((1.0, -2.0), (1.03, -1.96), 9.05)
    f = fit_cylinder(P, L, hole, "c.csv")
    assert abs(f.diameter - 9.05) < 1e-6
    assert np.allclose(f.bottom, (1.0, -2.0), atol=1e-6) and np.allclose(f.top, (1.03, -1.96), atol=1e-6)


def test_related_datum_envelope_is_normal_to_A():
    P = cyl((0.02, -0.01), (0.02, -0.01), 52.018)
    f = fit_cylinder(P, L, True, "p.csv", related=True)
    assert abs(f.diameter - 52.018) < 1e-6 and np.allclose(f.bottom, f.top) and np.allclose(f.bottom, (0.02, -0.01))


HEAD = '''units = "mm"
[[feature]]
id = "pilot"
kind = "hole"
limits = [52.0, 52.03]
length = 10
[[feature]]
id = "h"
kind = "hole"
limits = [9.0, 9.2]
length = 10
[feature.tolerance]
characteristic = "position"
value = 0.15
material = "MMC"
datums = ["A", "B"]
[[datum]]
letter = "B"
feature = "pilot"
boundary = "{boundary}"
[[pattern]]
id = "p"
feature = "h"
locations = [[30.0, 0.0], [-30.0, 0.0]]
'''


def _scene(tmp_path, members, extra, pilot=None, boundary="RMB"):
    for i, (b, t, d) in enumerate(members):
        write_points(tmp_path / f"h{i}.csv", cyl(b, t, d), decimals=10)
    if pilot is not None:
        write_points(tmp_path / "pilot.csv", cyl(pilot[0], pilot[0], pilot[1]), decimals=10)
    (tmp_path / "s.toml").write_text(HEAD.format(boundary=boundary) + extra)
    return load(tmp_path / "s.toml")


PTS = 'points = ["h0.csv", "h1.csv"]\n'


def test_tilted_member_judged_by_both_ends(tmp_path):
    # RMB datum: no shift, rotation about B free (it moves the members across, not outwards). Hole 2's
    # axis: 0.03 out at the bottom, 0.14 out at the top; its midpoint (0.085: 0.17 diametral) would pass
    # 0.15 + 0.05 bonus, the top (0.28) does not (ASME Y14.5: the axis must lie within the cylindrical
    # zone over the feature's length, from memory)
    members = [((30.0, 0.0), (30.0, 0.0), 9.05), ((-30.03, 0.0), (-30.14, 0.0), 9.05)]
    s = _scene(tmp_path, members, PTS)
    pr = analyse_frames(s).patterns[0]
    assert pr.points_error is None
    # rotation is free: the fit turns the pattern; independent check by brute force over the turn
    best = min(max(2 * math.hypot(x * math.cos(t) - y * math.sin(t) - bx, x * math.sin(t) + y * math.cos(t) - by)
                   - 0.2 for (x, y), (bx, by) in (((30.0, 0.0), (30.0, 0.0)), ((-30.03, 0.0), (-30.0, 0.0)),
                                                  ((-30.14, 0.0), (-30.0, 0.0))))
               for t in np.linspace(-0.01, 0.01, 20001))
    fit = -min(r.margin for r in pr.right.readings)
    assert fit <= best + 1e-9 and best - fit < 1e-5  # a grid cannot beat the optimum; it comes close
    assert pr.right.conforms is (best <= 1e-9)
    mid = (-30.085, 0.0)  # the midpoint's pattern: same fit with the midpoint only
    best_mid = min(max(2 * math.hypot(x * math.cos(t) - y * math.sin(t) - bx, x * math.sin(t) + y * math.cos(t) - by)
                       - 0.2 for (x, y), (bx, by) in (((30.0, 0.0), (30.0, 0.0)), (mid, (-30.0, 0.0))))
                   for t in np.linspace(-0.01, 0.01, 20001))
    assert best > 0 > best_mid  # fails by its ends where the midpoint passes
    assert not pr.right.conforms and pr.points.members[1].governing_end == "top"


def test_points_verdict_equals_typed_for_perpendicular_axes(tmp_path):
    members = [((30.06, 0.02), (30.06, 0.02), 9.04), ((-29.95, -0.03), (-29.95, -0.03), 9.1)]
    s = _scene(tmp_path, members, PTS + 'datum_points = { B = "pilot.csv" }\n', ((0.0, 0.0), 52.02), "MMB")
    typed = loads(HEAD.format(boundary="MMB") + 'measured = [[30.06, 0.02, 9.04], [-29.95, -0.03, 9.1]]\n'
                  'datum_sizes = { B = 52.02 }\n')
    a, b = analyse_frames(s).patterns[0], analyse_frames(typed).patterns[0]
    assert a.right.conforms == b.right.conforms
    for ra, rb in zip(a.right.readings, b.right.readings):  # the typed path (geom.patterns) as reference
        assert abs(ra.position - rb.position) < 1e-6 and abs(ra.allowed - rb.allowed) < 1e-6


def test_datum_points_give_size_and_origin(tmp_path):
    members = [((30.5, 0.2), (30.5, 0.2), 9.05), ((-29.5, 0.2), (-29.5, 0.2), 9.05)]
    s = _scene(tmp_path, members, PTS + 'datum_points = { B = "pilot.csv" }\n', ((0.5, 0.2), 52.02), "MMB")
    pr = analyse_frames(s).patterns[0]
    (lt, f), = pr.points.datums
    assert lt == "B" and abs(f.diameter - 52.02) < 1e-6 and np.allclose(pr.points.origin, (0.5, 0.2), atol=1e-6)
    # members relative to the origin sit at their basic locations: position 0 (construction)
    assert all(r.position < 1e-5 for r in pr.right.readings)
    # the datum shift from the produced size 52.02 - MMB 52.00 (ASME Y14.5 datum feature shift, from memory)
    assert abs(pr.right.datum.diametral.value - 0.02) < 1e-6


def test_no_datum_points_states_the_assumption(tmp_path):
    members = [((30.0, 0.0), (30.0, 0.0), 9.05), ((-30.0, 0.0), (-30.0, 0.0), 9.05)]
    s = _scene(tmp_path, members, PTS)
    fr = analyse_frames(s)
    assert any("origin is taken as the datum axis" in a for a in fr.patterns[0].points.assumptions)
    assert any("origin is taken as the datum axis" in ln for ln in frames_text(fr, s))


def test_json_keys_and_round_trip(tmp_path):
    members = [((30.0, 0.0), (30.0, 0.05), 9.05), ((-30.0, 0.0), (-30.0, 0.0), 9.05)]
    s = _scene(tmp_path, members, PTS + 'datum_points = { B = "pilot.csv" }\n', ((0.0, 0.0), 52.02), "MMB")
    j = frames_to_json(analyse_frames(s), s)["patterns"]["p"]
    m = j["from_points"]["members"][0]
    assert {"size", "axis_bottom", "axis_top", "reading"} <= set(m) and "measured" in j
    assert abs(m["axis_top"][1] - 0.05) < 1e-6
    assert loads(dumps(s)) == s


@pytest.mark.parametrize("extra, words", [
    ('points = ["h0.csv"]\n', "one points CSV file per member (2)"),
    (PTS + 'measured = [[30, 0, 9.1], [-30, 0, 9.1]]\n', "either measured"),
    (PTS + 'datum_points = { B = "pilot.csv" }\ndatum_sizes = { B = 52.02 }\n', "not both"),
    (PTS + 'datum_points = { A = "pilot.csv" }\n', "datum feature of size"),
])
def test_scene_errors(extra, words):
    with pytest.raises(SceneError) as e:
        loads(HEAD.format(boundary="RMB") + extra, "s.toml")
    assert words in str(e.value) and "pattern[0]" in str(e.value)


def test_missing_file_is_named_at_analysis(tmp_path):
    (tmp_path / "s.toml").write_text(HEAD.format(boundary="RMB") + 'points = ["nope.csv", "h1.csv"]\n')
    s = load(tmp_path / "s.toml")
    fr = analyse_frames(s)
    assert "nope.csv" in fr.patterns[0].points_error and fr.patterns[0].right is None
    assert any("nope.csv" in ln for ln in frames_text(fr, s))


def test_points_outside_the_scene_folder_are_refused(tmp_path):
    (tmp_path / "s.toml").write_text(HEAD.format(boundary="RMB") + 'points = ["../x.csv", "/etc/passwd"]\n')
    pr = analyse_frames(load(tmp_path / "s.toml")).patterns[0]
    assert "inside the scene's folder" in pr.points_error and "../x.csv" in pr.points_error


def test_demo_scene_hole_3_top_governs(tmp_path):
    # the demo's points are regenerated by the seeded script and must equal the shipped files
    import runpy
    import sys

    argv = sys.argv
    sys.argv = ["make", str(tmp_path)]
    try:
        runpy.run_path(str(ROOT / "scripts" / "make_pump_cover_points.py"), run_name="__main__")
    finally:
        sys.argv = argv
    for f in (ROOT / "scenes" / "pump_cover_cmm").glob("*.csv"):
        assert (tmp_path / f.name).read_text() == f.read_text()
    s = load(ROOT / "scenes" / "pump_cover_cmm.toml")
    pr = analyse_frames(s).patterns[0]
    assert pr.right.governs == 2 and pr.points.members[2].governing_end == "top"
