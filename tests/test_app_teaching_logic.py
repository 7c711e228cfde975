"""The window's teaching, export and detail logic without Qt (split from test_app_logic.py):
the play sweep, export names and captions, layer rows, the new scene, slider steps, messages, lesson.

Check values are worked out inside each test from the scene file's numbers or hand arithmetic,
named beside them.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest

from geom.analysis import analyse_scene
from geom.model import Units
from geom.scenefile import SceneError, load
from viewer.windowlogic import banner, editing, whatif

ROOT = Path(__file__).resolve().parent.parent
SCENES = ROOT / "scenes"
GEARBOX = SCENES / "gearbox_endcap_dowel.toml"
BRACKET = SCENES / "sensor_bracket_interference.toml"
FLANGE = SCENES / "motor_flange_studs.toml"
CAP = SCENES / "cap_bore_inspection.toml"
CAP_CSV = SCENES / "cap_bore_inspection.csv"
ALL_SCENES = sorted(SCENES.glob("*.toml"))

MM = Units.MM


def _gearbox():
    sc = load(GEARBOX)
    return sc, analyse_scene(sc)


def _rows(res, fid, state) -> dict[str, str]:
    return {r.quantity: r.value for r in whatif.whatif_rows(res, fid, state)}



# ---------------------------------------------------------------- the teaching sweep and pictures (issue 12)


def test_sweep_target_is_the_mates_hole_the_feature_or_nothing():
    from viewer.windowlogic.teaching import sweep_target

    sc = load(GEARBOX)
    m = sc.mates[0]
    assert sweep_target(sc, ("mate", 0)) == (0, m.hole)  # a mate sweeps its hole
    assert sweep_target(sc, ("feature", m.pin)) == (0, m.pin)  # a feature in a mate: within the mate
    assert sweep_target(sc, ("inspection", m.hole)) is None
    assert sweep_target(sc, ("none", None)) is None
    lone = replace(sc, mates=())
    assert sweep_target(lone, ("feature", m.hole)) == (m.hole, m.hole)


def test_play_steps_run_from_mmc_to_lmc_at_the_whole_tolerance():
    from viewer.windowlogic.teaching import play_steps

    sc = load(GEARBOX)
    fid, steps = play_steps(sc, ("mate", 0), 6)
    f = sc.feature(fid)
    # independent: six evenly spaced sizes, both limits included
    assert [s.size for s in steps] == pytest.approx([f.mmc + (f.lmc - f.mmc) * i / 5 for i in range(6)])
    assert steps[-1].size == f.lmc and all(s.state.share == 1.0 for s in steps)


def test_default_export_names_and_the_sweep_job_refusing_a_bad_name(tmp_path, capsys):
    from viewer.windowlogic.teaching import default_export_path, main, subject_label

    assert default_export_path(str(tmp_path / "a.toml"), subject_label(None, 1), "sweep", ".mp4", "/x") == \
        str(tmp_path / "a_mate2_sweep.mp4")
    assert subject_label(None, "../etc") == "etc"  # no folder reached through a feature id
    assert main([str(GEARBOX), str(tmp_path / "s.avi"), "mate:0", "cap-bore", "3", "0.0", "iso"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and err[0].startswith("matezone: ") and ".gif or .mp4" in err[0]
    assert list(tmp_path.iterdir()) == []


def test_caption_band_and_table_text():
    import numpy as np

    from viewer.windowlogic.picture import caption_height, caption_lines, table_tsv, with_caption

    lines = caption_lines("Cap", "mate 1: hole h with pin p", "h size 8.000 mm", "ASSEMBLES", "x20")
    img = np.zeros((40, 300, 3), np.uint8)
    out = with_caption(img, lines, 2.0)
    assert out.shape == (40 + caption_height(5, 2.0), 300, 3)
    band = out[40:]
    assert (band == 255).all(axis=2).mean() > 0.6  # a white band ...
    assert (band.min(axis=2) < 128).any()  # ... with dark type on it
    assert (out[:40] == 0).all()  # the picture above is untouched
    assert table_tsv(["a", "b"], [["x\ty", "line\nbreak"]]) == "a\tb\nx y\tline break\n"


# ---------------------------------------------------------------- issue 12: window details


def test_layer_rows_list_only_the_layers_of_the_scene_with_the_legend_colours():
    from viewer import scene3d
    from viewer.windowlogic.layers import layer_rows

    sc, res = _gearbox()
    sc3 = scene3d.build_mate_scene(res, 0)
    rows = layer_rows(sc3, scene3d.LAYERS, sc.standard)
    listed = [r.layer for r in rows]
    # independent: a layer is listed when the scene holds a mesh or a label for it (or readout
    # lines / a legend; "labels" switches every label), in the builder's layer order
    have = {n for n, items in sc3.layers.items() if items} | {lb.layer for lb in sc3.labels}
    have |= {"labels"} if sc3.labels else set()
    have |= {"readouts"} if sc3.readouts else set()
    have |= {"legend"} if sc3.legend else set()
    assert listed == [n for n in scene3d.LAYERS if n in have]
    assert "points" not in listed and "envelopes" not in listed  # a fit scene has no measured data
    by = {r.layer: r for r in rows}
    # each row's swatches are the colours of its legend rows, read from the scene's legend
    for layer in ("vc", "zone", "mate"):
        expect = [c for (_t, c), lay in zip(sc3.legend, sc3.legend_layers) if lay == layer]
        assert list(by[layer].colours) == list(dict.fromkeys(expect)) and expect
    assert by["vc"].name == "VC boundary" and by["labels"].colours == ()
    # a layer with no meshes and no labels left is not listed
    bare = replace(sc3, layers={k: v for k, v in sc3.layers.items() if k != "rc"},
                   labels=tuple(lb for lb in sc3.labels if lb.layer != "rc"),
                   legend=tuple(r for r, lay in zip(sc3.legend, sc3.legend_layers) if lay != "rc"),
                   legend_layers=tuple(lay for lay in sc3.legend_layers if lay != "rc"))
    assert "rc" in listed and "rc" not in [r.layer for r in layer_rows(bare, scene3d.LAYERS, sc.standard)]


def test_the_new_scene_assembles_with_room_to_spare():
    res = analyse_scene(editing.new_scene())
    m = res.mates[0]
    # hole VC = MMC - t = 10.000 - 0.050; pin VC = MMC + t = 9.920 + 0.010 (ASME Y14.5 virtual
    # condition at MMC, from memory); clearance = hole VC - pin VC = 0.020
    assert m.clearance_min == pytest.approx((10.0 - 0.05) - (9.92 + 0.01))
    assert m.clearance_min > 0 and m.assembles
    b = banner.mate_banner(res, res.scene, 0, whatif.settled_states(res.scene, {}))  # at the worst case
    assert b.state == "assembles" and b.head.startswith("ASSEMBLES")


@pytest.mark.parametrize("lo, hi, units", [(8.0, 8.015, MM), (0.25, 0.25015, Units("in")),
                                          (40.0, 40.039, MM), (0.5, 0.5012, Units("in"))])
def test_size_slider_steps_one_display_digit(lo, hi, units):
    step = 10.0 ** -units.decimals  # one digit of the usual precision: 0.001 mm, 0.0001 in
    n, per = whatif.size_slider_plan(lo, hi, step)
    assert n >= whatif.SLIDER_POSITIONS and n % 2 == 0
    assert whatif.slider_size(lo, hi, step, per, 0, n) == lo and whatif.slider_size(lo, hi, step, per, n, n) == hi
    for k in range(int((hi - lo) / step + 1e-9)):  # every whole key step lands on a display digit
        v = whatif.slider_size(lo, hi, step, per, k * per, n)
        assert v == pytest.approx(lo + k * step, abs=1e-12)
        assert units.fmt(v) == f"{lo + k * step:.{units.decimals}f}"
    assert whatif.slider_size(lo, hi, step, per, n // 2, n) == pytest.approx(lo + n // 2 * step / per)


def test_a_rejected_edit_speaks_the_form_labels():
    from viewer.windowlogic.messages import edit_message, field_label

    sc, _ = _gearbox()

    def refused(mutate):
        d = editing.scene_dict(sc)
        mutate(d)
        with pytest.raises(SceneError) as e:
            editing.parse_dict(d, str(GEARBOX))
        return e.value

    e = refused(lambda d: d["feature"][0]["tolerance"].__setitem__("value", -0.02))
    assert '"cap-bore"' in e.path and e.path.endswith("tolerance.value")  # the file path form ...
    assert edit_message(e) == f"Cap-bore: tolerance value: {e.detail}"  # ... said as the form's words
    assert "feature[" not in edit_message(e) and GEARBOX.name not in edit_message(e)
    e = refused(lambda d: d["feature"][0]["limits"].__setitem__(0, "abc"))
    assert edit_message(e) == f"Cap-bore: size limits, first value: {e.detail}"
    e = refused(lambda d: d["feature"][1]["tolerance"].__setitem__("datums", ["A", 1]))
    assert edit_message(e).startswith("Dowel: datums")
    e = refused(lambda d: d["mate"][0].__setitem__("hole", "nothing"))
    assert edit_message(e) == f"Mate 1: hole: {e.detail}"
    e = refused(lambda d: d.__setitem__("units", "furlong"))
    assert edit_message(e) == f"Units: {e.detail}"
    # a path no form shows keeps the command line's words (file, path, message)
    e = refused(lambda d: d.__setitem__("zzz", 1))
    assert edit_message(e) == str(e)
    assert field_label("feature[0].at[1]") == "Feature 1: basic location y"


def test_lesson_steps_the_hole_to_mmc_then_lmc_then_both_at_the_vc():
    import tomllib

    from viewer.windowlogic.teaching import lesson_steps

    sc, _ = _gearbox()
    raw = tomllib.loads(GEARBOX.read_text(encoding="utf-8"))["feature"][0]  # cap-bore, 8.000 .. 8.015
    fid, steps = lesson_steps(sc, ("mate", 0))
    assert fid == "cap-bore" and len(steps) == 3
    assert [s.state.size for s in steps] == [raw["limits"][0], raw["limits"][1], raw["limits"][1]]
    assert all(s.state.share == 1.0 for s in steps)
    t = raw["tolerance"]["value"]
    vc = raw["limits"][0] - t  # hole VC = MMC - t (ASME Y14.5, from memory) = 7.985
    # at MMC the opening is MMC - t; at LMC it is LMC - (t + bonus) with bonus = LMC - MMC
    assert steps[0].note.endswith(f"= {MM.fmt(raw['limits'][0] - t)}")
    lmc_used = t + (raw["limits"][1] - raw["limits"][0])
    assert steps[1].note.endswith(f"= {MM.fmt(raw['limits'][1] - lmc_used)}")
    assert steps[2].note.endswith(f"the opening stays at the VC {MM.fmt(vc)}")
    # the pin looked at alone: its envelope; a scene under ISO says MMVS; no lesson off MMC
    _, pin_steps = lesson_steps(sc, ("feature", "dowel"))
    assert "the envelope stays at the VC" in pin_steps[2].note
    iso = replace(sc, standard=type(sc.standard)("iso"))
    assert "stays at the MMVS" in lesson_steps(iso, ("mate", 0))[1][2].note
    assert lesson_steps(load(FLANGE), ("mate", 0)) is None  # the flange's adaptor bore is RFS
    assert lesson_steps(sc, ("fastener", "x")) is None
