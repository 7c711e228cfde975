"""A scene's datums, patterns and interfaces through analyse_scene, the text and the JSON.

Check values: datum feature MMB = its virtual condition relative to the higher datums and the
shift = departure from MMB (ASME Y14.5-2009 4.11.4 and 4.11.6, from memory); gauge pins at the
holes' virtual condition MMC - t at their basic locations (ASME Y14.5 functional gauging, common
practice); per-pair worst-case clearance hole VC - pin VC (the fixed-fastener case of ASME
Y14.5's appendix formulas, H - F = T1 + T2, rearranged: from memory). Every expected number is
computed in the test from the limits and tolerances, not copied from the program.
"""

from __future__ import annotations

import json
import math

import pytest

from geom import analyse_scene, result_to_json
from geom.model import (
    Characteristic,
    DatumSpec,
    Feature,
    InterfaceSpec,
    Kind,
    Material,
    PatternSpec,
    Scene,
    Tolerance,
    Units,
)
from geom.readout import render_text

R = 36.0  # bolt circle radius of the invented cover


def _pos(t, datums):
    return Tolerance(Characteristic.POSITION, t, material=Material.MMC, datums=datums)


def _perp(t):
    return Tolerance(Characteristic.PERPENDICULARITY, t, material=Material.MMC, datums=("A",))


def _scene(measured=(), datum_sizes=()):
    locs = tuple((R * math.cos(math.radians(a)), R * math.sin(math.radians(a))) for a in (45, 135, 225, 315))
    feats = (
        Feature("cover-pilot", Kind.HOLE, (52.0, 52.03), 10.0, tolerance=_perp(0.02)),
        Feature("cover-hole", Kind.HOLE, (9.0, 9.2), 10.0, tolerance=_pos(0.15, ("A", "B"))),
        Feature("housing-boss", Kind.PIN, (51.94, 51.96), 10.0, tolerance=_perp(0.01)),
        Feature("housing-pin", Kind.PIN, (8.6, 8.7), 12.0, tolerance=_pos(0.1, ("A", "D"))),
    )
    return Scene("invented cover on housing", Units.MM, features=feats,
                 datums=(DatumSpec("B", "cover-pilot", "MMB"), DatumSpec("D", "housing-boss", "MMB")),
                 patterns=(PatternSpec("cover-bolts", "cover-hole", locs, measured=measured,
                                       datum_sizes=datum_sizes),
                           PatternSpec("housing-pins", "housing-pin", locs)),
                 interfaces=(InterfaceSpec("cover-bolts", "housing-pins"),))


def test_datum_mmb_and_most_shift():
    fr = analyse_scene(_scene()).frames
    b, d = fr.datums
    assert b.mmb.value == pytest.approx(52.0 - 0.02)  # bore: MMC - perpendicularity at MMC
    assert d.mmb.value == pytest.approx(51.96 + 0.01)  # boss: MMC + perpendicularity at MMC
    # the most shift: the bore at its LMC, 52.03 - 51.98 = 0.05 diametral, 0.025 radial
    assert b.shift_max.diametral.value == pytest.approx(52.03 - 51.98)
    assert b.shift_max.radial.value == pytest.approx((52.03 - 51.98) / 2)
    assert d.shift_max.diametral.value == pytest.approx(51.97 - 51.94)


def test_gauge_pins_and_interface_pairs():
    fr = analyse_scene(_scene()).frames
    cover, housing = fr.patterns
    assert [g.diameter.value for g in cover.gauge.pins] == pytest.approx([9.0 - 0.15] * 4)
    assert [c for g in cover.gauge.pins for c in g.basic] == pytest.approx(
        [c for xy in cover.pattern.locations for c in xy])
    sims = {s.letter: s for s in cover.gauge.simulators if s.diameter is not None}
    assert sims["B"].diameter.value == pytest.approx(51.98)  # the datum simulator at MMB
    (it,) = fr.interfaces
    want = (9.0 - 0.15) - (8.7 + 0.1)  # hole VC - pin VC
    assert [p.clearance_min.value for p in it.mate.pairs] == pytest.approx([want] * 4)
    assert it.mate.assembles is (want >= 0)
    assert it.mate.pilot.value == pytest.approx(51.98 - 51.97)  # bore MMB - boss MMB


def test_measured_pattern_right_way_and_wrong_way():
    # every hole 0.09 off its basic location in +x, the pilot bore produced at 52.02: shift
    # available 52.02 - 51.98 = 0.04 diametral, 0.02 radial; each hole at MMC 9.0: 0.15 allowed
    off = 0.09
    locs = _scene().patterns[0].locations
    measured = tuple((x + off, y, 9.0) for x, y in locs)
    sc = _scene(measured, (("B", 52.02),))
    pr = analyse_scene(sc).frames.patterns[0]
    right, wrong = pr.right, pr.wrong
    # right way: the pattern moves as one body by up to 0.02 toward -x: 2 * (0.09 - 0.02) = 0.14 <= 0.15
    assert right.conforms
    assert [r.position for r in right.readings] == pytest.approx([2 * (off - 0.02)] * 4, abs=1e-6)
    # wrong way: 2 * 0.09 = 0.18 against 0.15 + 0.04 = 0.19: also passes here (it never rejects what
    # the right way accepts); the difference shows when the holes are off in different directions
    assert wrong.conforms and [r.allowed for r in wrong.readings] == pytest.approx([0.15 + 0.04] * 4)
    # holes pushed outward (radially) by 0.085: no common shift helps, each reads 0.17 > 0.15 the
    # right way; the wrong way allows 0.19 each and passes: the trainee's trap
    measured = tuple((x * (1 + 0.085 / R), y * (1 + 0.085 / R), 9.0) for x, y in locs)
    fr = analyse_scene(_scene(measured, (("B", 52.02),))).frames.patterns[0]
    assert not fr.right.conforms and fr.wrong.conforms
    assert fr.right.readings[fr.right.governs].position == pytest.approx(0.17, abs=1e-6)


def test_text_and_json_carry_the_frames_and_keep_the_old_keys():
    sc = _scene()
    res = analyse_scene(sc)
    text = render_text(res)
    assert "datum B: feature 'cover-pilot' referenced at MMB" in text
    assert "as one body" in text and "interface 'cover-bolts' over 'housing-pins'" in text
    js = json.loads(json.dumps(result_to_json(res)))
    for key in ("title", "units", "standard", "features", "mates", "fasteners"):  # the old contract
        assert key in js
    assert js["datums"]["B"]["mmb"] == pytest.approx(51.98)
    assert js["datums"]["B"]["shift_diametral"] == pytest.approx(0.05)
    assert js["datums"]["B"]["shift_radial"] == pytest.approx(0.025)
    pins = js["patterns"]["cover-bolts"]["gauge"]["pins"]
    assert [p["diameter"] for p in pins] == pytest.approx([8.85] * 4)
    pair = js["interfaces"][0]["pairs"][0]
    assert pair["clearance_min"] == pytest.approx(8.85 - 8.8)


def test_a_scene_without_frames_keeps_its_json_unchanged():
    from geom.model import Mate

    plain = Scene("plain", Units.MM, features=(
        Feature("h", Kind.HOLE, (8.0, 8.02), 10.0, tolerance=_perp(0.01)),
        Feature("p", Kind.PIN, (7.97, 7.98), 10.0, tolerance=_perp(0.005))), mates=(Mate("h", "p"),))
    js = result_to_json(analyse_scene(plain))
    assert set(js) == {"title", "units", "standard", "features", "mates", "fasteners"}


def test_the_window_logic_lists_focuses_and_removes_a_pattern():
    from geom.scenefile import dumps, loads
    from viewer.windowlogic.editing import contents_entries, removal
    from viewer.windowlogic.focus import default_focus, focus_valid

    sc = loads(dumps(_scene()))  # through the file, as the window holds it
    assert default_focus(sc) == ("pattern", "cover-bolts")  # no mate: the first pattern
    entries = [e.focus for e in contents_entries(sc)]
    assert ("pattern", "cover-bolts") in entries and ("pattern", "housing-pins") in entries
    assert focus_valid(sc, ("pattern", "housing-pins")) and not focus_valid(sc, ("pattern", "nope"))
    import tomllib

    d = tomllib.loads(dumps(sc))
    mutate, what = removal(sc, "pattern", "housing-pins")
    mutate(d)
    assert what == "remove pattern housing-pins"
    assert [p["id"] for p in d["pattern"]] == ["cover-bolts"] and d["interface"] == []  # its interface too
    # removing a member feature takes its pattern along, so the scene still loads
    d = tomllib.loads(dumps(sc))
    removal(sc, "feature", "housing-pin")[0](d)
    assert [p["id"] for p in d["pattern"]] == ["cover-bolts"] and d["interface"] == []


def test_the_datum_size_what_if_changes_the_shift_not_the_zones():
    from geom.frames import pattern_at

    # every hole 0.09 off in +x (see above): with the bore at 52.02 the pattern may move 0.02 and
    # conforms (0.14 <= 0.15); with the bore at its MMB 51.98 there is no shift: 0.18 > 0.15
    locs = _scene().patterns[0].locations
    measured = tuple((x + 0.09, y, 9.0) for x, y in locs)
    pr = analyse_scene(_scene(measured, (("B", 52.02),))).frames.patterns[0]
    assert pr.right.conforms
    at_mmb = pattern_at(pr, {"B": 52.0})  # 52.0 - 51.98 = 0.02 diametral, 0.01 radial
    assert [r.position for r in at_mmb.right.readings] == pytest.approx([2 * (0.09 - 0.01)] * 4, abs=1e-6)
    assert not at_mmb.right.conforms  # 0.16 > 0.15
    assert [r.allowed for r in at_mmb.right.readings] == [r.allowed for r in pr.right.readings]  # zones unchanged
    assert pattern_at(pr, {"B": 52.02}) is pr  # the scene's own size: the scene's result
