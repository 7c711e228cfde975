"""Scene files: every malformed input gets one message naming file, field and expectation."""

import json
import subprocess
import sys
from pathlib import Path

import pytest

from geom import dumps, load, loads, save
from geom.scenefile import SceneError
from matezone.cli import main
from scenetext import bore_and_dowel

ROOT = Path(__file__).resolve().parent.parent
SCENES = sorted((ROOT / "scenes").glob("*.toml"))

GOOD = bore_and_dowel()  # tests/scenetext.py: bore 10.000 - 10.015 with a 9.98 - 9.99 dowel


def edit(old, new):
    assert old in GOOD
    return GOOD.replace(old, new, 1)


BAD = [
    # (scene text, field path fragment, message fragment)
    ("title = [", "", "not valid TOML"),
    (edit('units = "mm"', 'units = "cm"'), "units", "expected one of 'mm', 'in'"),
    (edit('units = "mm"\n', ""), "units", "missing"),
    (edit('kind = "hole"', 'kind = "slot"'), 'feature[0] "bore".kind', "expected one of 'hole', 'pin'"),
    (edit("limits = [10.0, 10.015]", "limits = [10.015, 10.0]"), "limits", "reversed"),
    (edit("limits = [10.0, 10.015]", "limits = [10.0]"), "limits", "expected [smallest, largest]"),
    (edit("limits = [10.0, 10.015]", "limits = [10.0, 10.0]"), "limits", "single size"),
    (edit("limits = [10.0, 10.015]", 'limits = [10.0, "10.015"]'), "limits[1]", "expected a number, got the string"),
    (edit("length = 15.0", "length = -15.0"), "length", "expected a number > 0"),
    (edit("length = 15.0", "length = nan"), "length", "expected a finite number"),
    (edit("length = 15.0", "length = inf"), "length", "expected a finite number"),
    (edit("value = 0.02", "value = -0.02"), "tolerance.value", "expected a number >= 0"),
    (edit('characteristic = "perpendicularity"', 'characteristic = "flatness"'), "characteristic", "expected one of"),
    (edit('material = "MMC"', 'material = "MMB"'), "material", "(did you mean 'MMC'?)"),
    (edit('characteristic = "perpendicularity"', 'characteristic = "straightness"'), "datums",
     "straightness is a form tolerance and takes none"),
    (edit('hole = "bore"', 'hole = "bor"'), "mate[0].hole", "(did you mean 'bore'?)"),
    (edit('pin = "dowel"', 'pin = "bore"'), "mate[0].pin", "expected a pin feature"),
    (edit('id = "dowel"', 'id = "bore"'), "feature[1].id", "expected a unique id"),
    (edit('value = 0.02', 'valeu = 0.02'), "tolerance.valeu", "unknown key (did you mean 'value'?)"),
    (edit('length = 15.0\n[feature.tolerance]', 'length = 15.0\nlenght = 3\n[feature.tolerance]'), "lenght", "unknown key"),
    (GOOD + '[[fastener]]\nid = "s"\nkind = "floating"\nfastener = 6.6\nhole = 6.0\n', 'fastener[0] "s".hole',
     "expected a clearance hole larger than the fastener"),
    (GOOD + '[[fastener]]\nid = "s"\nkind = "fixed"\nfastener = 6.0\nhole = 6.6\n', "thread_depth", "missing"),
    (edit('characteristic = "perpendicularity"', 'characteristic = "angularity"'), "angle", "basic angle"),
    (edit('value = 0.02\nmaterial = "MMC"', 'value = 0\nmaterial = "RFS"'), "value", "zero tolerance needs"),
    (edit("[[mate]]", "[mate]"), "mate", "expected an array of tables"),
]


@pytest.mark.parametrize("text, path, fragment", BAD, ids=[f"bad{i}" for i in range(len(BAD))])
def test_bad_scene_gets_one_clear_message(tmp_path, capsys, text, path, fragment):
    f = tmp_path / "broken.toml"
    f.write_text(text, encoding="utf-8")
    assert main(["analyze", str(f)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0, err  # one line
    assert str(f) in err and path in err and fragment in err, err


def test_undecodable_bytes(tmp_path, capsys):
    f = tmp_path / "latin1.toml"
    f.write_bytes(GOOD.replace('"t"', '"Stra\xdfe"').encode("latin-1"))
    assert main(["analyze", str(f)]) == 2
    assert "expected UTF-8 text, got the byte 0xdf" in capsys.readouterr().err


def test_missing_file(capsys):
    assert main(["analyze", "no/such/scene.toml"]) == 2
    assert "no/such/scene.toml: no such file" in capsys.readouterr().err


def test_no_traceback_from_the_real_command(tmp_path):
    f = tmp_path / "broken.toml"
    f.write_text(BAD[4][0], encoding="utf-8")
    p = subprocess.run([sys.executable, "-m", "matezone.cli", "analyze", str(f)], capture_output=True, text=True)
    assert p.returncode == 2 and "Traceback" not in p.stderr and "reversed" in p.stderr


@pytest.mark.parametrize("scene", SCENES, ids=[s.name for s in SCENES])
def test_round_trip(tmp_path, scene):
    s = load(scene)
    out = tmp_path / "copy.toml"
    save(s, out)
    again = load(out)
    assert again == s
    assert loads(dumps(again)) == again
    assert not list(tmp_path.glob(".copy.toml.*"))  # no temporary file left behind


def test_atomic_save_keeps_old_file_on_failure(tmp_path, monkeypatch):
    s = loads(GOOD)
    out = tmp_path / "scene.toml"
    save(s, out)
    before = out.read_bytes()
    import os

    def boom(*a, **k):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OSError):
        save(s.with_(title="changed"), out)
    assert out.read_bytes() == before
    assert not list(tmp_path.glob(".scene.toml.*"))


def test_scene_error_fields():
    with pytest.raises(SceneError) as e:
        loads(edit("length = 15.0", "length = 0"), file="x.toml")
    assert e.value.file == "x.toml" and e.value.path == 'feature[0] "bore".length'


def test_json_output(capsys, tmp_path):
    f = tmp_path / "s.toml"
    f.write_text(GOOD, encoding="utf-8")
    assert main(["analyze", str(f), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    bore = out["features"]["bore"]
    for k in ("kind", "mmc", "lmc", "virtual_condition", "resultant_condition", "inner_boundary",
              "outer_boundary", "bonus_max", "tolerance_at_mmc", "tolerance_at_lmc"):
        assert k in bore
    # ASME Y14.5-2018 (from memory): VC = MMC - t = 10.0 - 0.02
    assert bore["virtual_condition"] == pytest.approx(9.98)
    dowel = out["features"]["dowel"]
    assert dowel["virtual_condition"] is None and dowel["outer_boundary"] == 9.99  # Rule #1 envelope
    (m,) = out["mates"]
    assert m["clearance_min"] == pytest.approx(9.98 - 9.99) and m["assembles"] is False
    assert m["clearance_max"] == pytest.approx(10.015 - 9.98)  # hole LMC - pin LMC (ISO 286-1, from memory)
    assert "caution" in out


MORE_BAD = [
    # (scene text, field path fragment, message fragment) — found by an independent review
    (edit("length = 15.0", "length = 1" + "0" * 400), "length", "integer with 401 digits"),
    # VC = MMC - t = 10.0 - 10.5 = -0.5 (ASME Y14.5-2018, from memory): no hole has a negative boundary
    (edit("value = 0.02", "value = 10.5"), "tolerance.value", "smallest worst-case boundary is -0.5"),
    (edit('datums = ["A"]', 'datums = ["B"]'), "datums", "expected datum A first"),
    (edit("length = 15.0", "length = 2026-12-02"), "length", "quote it"),
    (edit('characteristic = "perpendicularity"', 'characteristic = "parallelism"').replace(
        'datums = ["A"]', 'datums = ["A", "B"]'), "mate[0].pin", "runs the same way as the hole's"),
]


@pytest.mark.parametrize("text, path, fragment", MORE_BAD, ids=[f"more{i}" for i in range(len(MORE_BAD))])
def test_more_bad_scenes(tmp_path, capsys, text, path, fragment):
    f = tmp_path / "broken.toml"
    f.write_text(text, encoding="utf-8")
    assert main(["analyze", str(f)]) == 2
    err = capsys.readouterr().err
    assert path in err and fragment in err, err


def test_byte_order_mark_is_accepted(tmp_path):
    f = tmp_path / "bom.toml"
    f.write_bytes(b"\xef\xbb\xbf" + GOOD.encode())
    assert load(f).features[0].id == "bore"


def test_python_dash_m_reports_user_errors_cleanly(tmp_path):
    # `python -m matezone.cli` runs the module as __main__; errors raised by the commands must
    # still be caught as one message with exit 2 (a second copy of the module would miss them).
    p = subprocess.run([sys.executable, "-m", "matezone.cli", "inspect", str(ROOT / "scenes" / "cap_bore_inspection.toml"),
                        "--feature", "no-such-feature"], capture_output=True, text=True)
    assert p.returncode == 2 and "Traceback" not in p.stderr and "no-such-feature" in p.stderr


def test_save_keeps_permissions_and_follows_links(tmp_path):
    # common practice, no source: an editor's save keeps the file's mode and writes through a link
    import stat

    scene = load(ROOT / "scenes" / "gearbox_endcap_dowel.toml")
    target = tmp_path / "real.toml"
    target.write_text("placeholder")
    target.chmod(0o640)
    link = tmp_path / "link.toml"
    link.symlink_to(target)
    save(scene, link)
    assert link.is_symlink() and stat.S_IMODE(target.stat().st_mode) == 0o640
    assert load(target).title == scene.title
    with pytest.raises(SceneError, match="not a regular file"):
        save(scene, tmp_path)
