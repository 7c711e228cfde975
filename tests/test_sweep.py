"""The teaching sweep: the numbers beside the picture (geom.sweep) and the moving picture
(viewer.animate, GIF and MP4)."""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from hypothesis import given, settings, strategies as st

import geom
from geom.model import Characteristic, Feature, Kind, Material, Tolerance
from geom.sweep import MAX_STEPS, size_sweep

ROOT = Path(__file__).resolve().parent.parent


def _bore(material=Material.MMC, t=0.05):
    return Feature("bore", Kind.HOLE, (10.0, 10.04), 12.0,
                   tolerance=Tolerance(Characteristic.POSITION, t, material=material, datums=("A", "B")))


def test_hole_at_mmc_presents_its_virtual_condition_at_every_size():
    # ASME Y14.5 virtual condition of a hole at MMC: VC = MMC - t = 10.000 - 0.050 = 9.950, and the
    # bonus is the departure from MMC (hand arithmetic on the standard's definitions)
    steps = size_sweep(_bore(), 5)
    assert [s.size for s in steps] == pytest.approx([10.0, 10.01, 10.02, 10.03, 10.04], abs=1e-12)
    assert [s.bonus for s in steps] == pytest.approx([0.0, 0.01, 0.02, 0.03, 0.04], abs=1e-12)
    assert [s.tolerance_allowed for s in steps] == pytest.approx([0.05, 0.06, 0.07, 0.08, 0.09], abs=1e-12)
    assert all(s.presented == pytest.approx(9.95, abs=1e-12) for s in steps)
    assert all(s.virtual_condition == pytest.approx(9.95, abs=1e-12) for s in steps)
    assert steps[-1].size == 10.04  # exactly LMC, not within rounding


def test_without_a_modifier_the_opening_grows_with_the_size():
    # RFS: no bonus, so the clear opening is size - t (common practice, no source): 9.95 .. 9.99
    steps = size_sweep(_bore(Material.RFS), 3)
    assert [s.presented for s in steps] == pytest.approx([9.95, 9.97, 9.99], abs=1e-12)
    assert all(s.virtual_condition is None and s.bonus == 0 for s in steps)


def test_pin_in_a_mate_starts_opposite_and_turns():
    pin = Feature("dowel", Kind.PIN, (7.965, 7.975), 10.0,
                  tolerance=Tolerance(Characteristic.PERPENDICULARITY, 0.005, material=Material.MMC, datums=("A",)))
    steps = size_sweep(pin, 5, turns=1.0, role_in_mate=True)
    assert [s.state.direction_deg for s in steps] == pytest.approx([180.0, 270.0, 0.0, 90.0, 180.0], abs=1e-9)
    # pin VC = MMC + t = 7.975 + 0.005 = 7.980 (ASME Y14.5 virtual condition of an external feature)
    assert all(s.presented == pytest.approx(7.98, abs=1e-12) for s in steps)


@pytest.mark.parametrize("steps, turns", [(1, 0.0), (MAX_STEPS + 1, 0.0), (2.5, 0.0), (True, 0.0), (5, math.nan)])
def test_bad_sweeps_are_refused(steps, turns):
    with pytest.raises(ValueError, match="sweep needs"):
        size_sweep(_bore(), steps, turns)


@settings(max_examples=60, deadline=None)
@given(lo=st.floats(1.0, 50.0), span=st.floats(0.001, 0.5), t=st.floats(0.0, 0.2), n=st.integers(2, 40),
       hole=st.booleans())
def test_at_mmc_the_presented_boundary_does_not_depend_on_the_size(lo, span, t, n, hole):
    kind = Kind.HOLE if hole else Kind.PIN
    f = Feature("f", kind, (lo, lo + span), 5.0,
                tolerance=Tolerance(Characteristic.POSITION, t, material=Material.MMC, datums=("A", "B")))
    vc = f.mmc - t if hole else f.mmc + t  # ASME Y14.5 virtual condition, internal / external feature
    for s in size_sweep(f, n):
        assert s.presented == pytest.approx(vc, abs=1e-9)
        assert s.bonus == pytest.approx(abs(s.size - f.mmc), abs=1e-12)


# ------------------------------------------------------------------------------- the picture


@pytest.fixture(scope="module")
def gearbox():
    return geom.analyse_scene(geom.load(ROOT / "scenes" / "gearbox_endcap_dowel.toml"))


def test_plan_locks_one_scale_and_captions_every_step(gearbox):
    from viewer.animate import plan_sweep
    from viewer.exaggeration import auto_exaggeration

    sw = plan_sweep(gearbox, 0, steps=4)
    assert sw.feature_id == "cap-bore"
    assert sw.exaggeration == auto_exaggeration(gearbox, mate_index=0)
    # the scene's bore: 8.000 - 8.015, perpendicularity 0.015 at MMC -> VC 7.985 at every step
    assert sw.captions[0].startswith("cap-bore size 8.000; bonus 0.000; tolerance allowed 0.015; VC 7.985")
    assert sw.captions[-1].startswith("cap-bore size 8.015; bonus 0.015; tolerance allowed 0.030; VC 7.985")


@pytest.mark.parametrize("kw, fragment", [
    (dict(subject=3), "mate 4 does not exist"),
    (dict(subject=0, feature_id="nope"), "is not in mate 1"),
    (dict(subject="nope"), "no feature 'nope'"),
    (dict(subject=0, steps=1), "whole number of steps"),
])
def test_bad_plans_name_what_is_wrong(gearbox, kw, fragment):
    from viewer.animate import AnimationError, plan_sweep

    with pytest.raises(AnimationError, match=fragment):
        plan_sweep(gearbox, **kw)


@pytest.mark.parametrize("suffix", [".gif", ".mp4"])
def test_sweep_written_as_gif_and_mp4(gearbox, tmp_path, suffix):
    imageio = pytest.importorskip("imageio.v2")
    from viewer.animate import sweep_animation

    out, sw = sweep_animation(gearbox, 0, tmp_path / f"lesson{suffix}", steps=4, size=(480, 360))
    assert out.exists() and [p.name for p in tmp_path.iterdir()] == [f"lesson{suffix}"]  # no temporary left
    if suffix == ".gif":
        frames = imageio.mimread(out)
    else:
        with imageio.get_reader(out) as r:
            frames = [f for f in r]
    assert len(frames) == 4
    assert frames[0].shape[:2] == (360, 480)
    first, last = (f[..., :3].astype(int) for f in (frames[0], frames[-1]))
    assert (abs(first - last).sum(axis=2) > 60).mean() > 0.001  # the size moved: the picture changed


def test_bad_file_name_is_refused_before_rendering(gearbox, tmp_path):
    from viewer.animate import AnimationError, sweep_animation

    with pytest.raises(AnimationError, match=r"expected a file name ending in \.gif or \.mp4"):
        sweep_animation(gearbox, 0, tmp_path / "lesson.avi")
    assert not list(tmp_path.iterdir())


def test_report_animate_writes_the_sweep_inside_the_report(tmp_path, capsys):
    imageio = pytest.importorskip("imageio.v2")
    from matezone.cli import main

    out = tmp_path / "rep"
    assert main(["report", str(ROOT / "scenes" / "gearbox_endcap_dowel.toml"), "--out", str(out),
                 "--animate", "gif"]) == 0
    gifs = sorted(out.glob("*_sweep.gif"))
    assert [g.name for g in gifs] == ["mate_cap-bore__dowel_sweep.gif"]
    assert len(imageio.mimread(gifs[0])) == 25  # the default sweep: 25 sizes from MMC to LMC
    import json

    assert gifs[0].name in json.loads((out / ".matezone-report.json").read_text())["files"]
    assert "size sweep MMC to LMC" in capsys.readouterr().out


def test_report_animate_refuses_an_unknown_format(tmp_path, capsys):
    from matezone.cli import main

    code = main(["report", str(ROOT / "scenes" / "gearbox_endcap_dowel.toml"), "--out", str(tmp_path / "r"),
                 "--animate", "avi"])
    assert code == 2
    assert "--animate 'avi': expected gif or mp4" in capsys.readouterr().err
    assert not (tmp_path / "r").exists()
