"""Composite position (pattern-locating and feature-relating tiers) and two single segments.

Sources of the check values: the lower tier of a composite frame relates the members to each
other, its repeated datums orienting only (ASME Y14.5-2009 7.5.1, from memory): so a pattern
moved as one body reads zero in the lower tier, and members displaced against each other read
their relative error whatever the translation (plane geometry, computed here); the lower segment
of two single segments locates to its datums (ASME Y14.5-2009 7.5.2, from memory), so to a full
frame it is the single position requirement of its value (geom.patterns.pattern_conforms, the
independent path). Brute-force minimax over a grid of translations is the independent check of
the free fit.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from geom.composite import composite_conforms
from geom.datums import DatumRef, frame
from geom.model import Characteristic, Feature, Kind, Material, Tolerance
from geom.patterns import Pattern, bolt_circle, pattern_conforms

R = 30.0


def _pattern(t1=0.5, n=4):
    fr = frame(DatumRef("A"), DatumRef("B"), DatumRef("C"))
    pos = Tolerance(Characteristic.POSITION, t1, material=Material.MMC, datums=("A", "B", "C"))
    return Pattern("p", Feature("h", Kind.HOLE, (6.6, 6.8), 8.0, tolerance=pos), bolt_circle(n, 2 * R, 45.0), fr)


@settings(max_examples=25, deadline=None)
@given(dx=st.floats(-0.2, 0.2), dy=st.floats(-0.2, 0.2))
def test_a_pattern_moved_as_one_body_reads_zero_in_the_lower_tier(dx, dy):
    p = _pattern()
    xy = [(x + dx, y + dy) for x, y in p.locations]
    c = composite_conforms(p, 0.05, ("A",), xy, [6.6] * 4)
    assert max(r.position for r in c.lower.readings) <= 2e-6
    # the upper tier sees the whole offset: 2 * |d| at every member
    assert [r.position for r in c.upper.readings] == pytest.approx([2 * math.hypot(dx, dy)] * 4, abs=1e-9)
    assert c.conforms is (2 * math.hypot(dx, dy) <= 0.5 + 1e-12)


def test_members_displaced_against_each_other_keep_their_relative_error():
    p = _pattern(n=2)  # two holes on opposite sides of the circle
    b1, b2 = (np.array(xy) for xy in p.locations)
    u = b1 / R  # member 1's radial direction; member 2's is -u
    e = 0.04
    # both moved the same way: a translation takes both back
    same = composite_conforms(p, 0.05, ("A",), [tuple(b1 + e * u), tuple(b2 + e * u)], [6.6, 6.6])
    assert max(r.position for r in same.lower.readings) <= 2e-6
    # both pushed outward, on opposite sides of the centre: no translation or turn brings both in
    out = composite_conforms(p, 0.05, ("A",), [tuple(b1 + e * u), tuple(b2 - e * u)], [6.6, 6.6])
    assert [r.position for r in out.lower.readings] == pytest.approx([2 * e, 2 * e], abs=1e-6)
    assert not out.lower.conforms and out.upper.conforms and not out.conforms  # 0.08 > 0.05, but <= 0.5
    assert out.governs == "lower"


def test_a_repeated_datum_plane_keeps_the_lower_tier_from_turning():
    p = _pattern()
    th = 0.002  # radians: each member moves R * th sideways
    xy = [(x * math.cos(th) - y * math.sin(th), x * math.sin(th) + y * math.cos(th)) for x, y in p.locations]
    free = composite_conforms(p, 0.05, ("A",), xy, [6.6] * 4)
    fixed = composite_conforms(p, 0.05, ("A", "B"), xy, [6.6] * 4)  # B is a plane: rotation fixed
    assert max(r.position for r in free.lower.readings) <= 2e-6
    # turned about the pattern's centre, which is the datum origin: no translation helps
    want = 2 * 2 * R * math.sin(th / 2)
    assert [r.position for r in fixed.lower.readings] == pytest.approx([want] * 4, abs=1e-6)
    assert not fixed.lower.conforms  # 0.12 > 0.05


def test_each_tier_gives_each_member_its_own_bonus():
    p = _pattern()
    c = composite_conforms(p, 0.05, ("A",), list(p.locations), [6.6, 6.7, 6.8, 6.65])
    # bonus = size - MMC (hole at MMC), added in both tiers
    assert [r.allowed for r in c.lower.readings] == pytest.approx([0.05, 0.15, 0.25, 0.10])
    assert [r.allowed for r in c.upper.readings] == pytest.approx([0.5, 0.6, 0.7, 0.55])


def test_two_single_segments_to_the_full_frame_is_the_single_requirement():
    p = _pattern()
    xy = [(x + 0.03, y - 0.01) for x, y in p.locations]
    two = composite_conforms(p, 0.05, ("A", "B", "C"), xy, [6.6] * 4, form="two_segment")
    single = pattern_conforms(Pattern("p", p.feature.with_(tolerance=Tolerance(
        Characteristic.POSITION, 0.05, material=Material.MMC, datums=("A", "B", "C"))), p.locations, p.frame),
        xy, [6.6] * 4)
    assert [r.position for r in two.lower.readings] == pytest.approx([r.position for r in single.readings])
    assert two.lower.conforms is single.conforms is False  # 2 * hypot(0.03, 0.01) = 0.063 > 0.05
    comp = composite_conforms(p, 0.05, ("A", "B", "C"), xy, [6.6] * 4)  # composite: orientation only
    assert comp.lower.conforms  # the same offset for all: the composite lower tier lets it go


def test_the_free_fit_matches_a_brute_force_grid():
    p = _pattern(n=3)
    rng = np.random.default_rng(7)
    xy = [(x + rng.normal(0, 0.02), y + rng.normal(0, 0.02)) for x, y in p.locations]
    c = composite_conforms(p, 0.05, ("A", "B"), xy, [6.6] * 3)  # rotation fixed: translation only
    worst = max(r.position - r.allowed for r in c.lower.readings)
    basic = np.array(p.locations)
    m = np.array(xy)
    g = np.linspace(-0.08, 0.08, 321)
    best = min(max(2 * np.hypot(m[:, 0] + dx - basic[:, 0], m[:, 1] + dy - basic[:, 1]) - 0.05)
               for dx in g for dy in g)
    assert worst <= best + 1e-7  # never worse than the grid
    assert best - worst <= 2 * (g[1] - g[0])  # and the grid never much better


def test_bad_lower_tiers_are_refused():
    p = _pattern()
    xy = list(p.locations)
    with pytest.raises(ValueError, match="below the upper tier"):
        composite_conforms(p, 0.5, ("A",), xy, [6.6] * 4)
    with pytest.raises(ValueError, match="starting at A"):
        composite_conforms(p, 0.1, ("B",), xy, [6.6] * 4)
    with pytest.raises(ValueError, match="form must be"):
        composite_conforms(p, 0.1, ("A",), xy, [6.6] * 4, form="stacked")
    with pytest.raises(ValueError, match="not computed yet"):
        composite_conforms(p, 0.1, ("A", "B"), xy, [6.6] * 4, form="two_segment")


def test_the_sensor_plate_demo_reads_both_tiers():
    """The invented sensor plate: every hole (0.150, 0.050) off, hole 3 a further 0.045 in x.
    Upper tier (planes B, C: no shift): 2 * hypot(0.195, 0.050) for hole 3 against 0.400 + bonus
    0.020; lower tier: the common offset goes, the 0.045 is shared out by the free fit, never
    more than 0.045 x 2 for hole 3 alone (computed here)."""
    from pathlib import Path

    from geom import analyse_scene, load, result_to_json

    res = analyse_scene(load(Path(__file__).resolve().parents[1] / "scenes" / "sensor_plate_composite.toml"))
    (pr,) = res.frames.patterns
    assert pr.wrong is None  # planes only: no datum shift to misuse
    up = pr.composite.upper
    assert up.readings[2].position == pytest.approx(2 * math.hypot(0.195, 0.050), abs=1e-6)
    assert up.readings[2].allowed == pytest.approx(0.400 + 0.020)
    lo = pr.composite.lower
    assert max(r.position for r in lo.readings) <= 2 * 0.045 + 1e-9
    assert [r.allowed for r in lo.readings] == pytest.approx([0.100 + 0.020] * 4)
    assert pr.conforms
    js = result_to_json(res)["patterns"]["sensor-holes"]
    assert js["lower"]["form"] == "composite" and js["conforms"] is True
