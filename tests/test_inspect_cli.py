"""``matezone inspect``: the demo scene, text and JSON output, and bad input (one message, exit 2)."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from geom.conformance import Outcome
from geom.inspect import inspect_feature
from geom.readout import CAUTION
from geom.scenefile import load
from matezone.cli import main
from scenetext import measured_bore

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "scenes" / "cap_bore_inspection.toml"
DEMO_SECTIONS = 24  # scripts/make_demo_points.py (SECTIONS): the demo scan was generated as 24 rings

SCENE = measured_bore()  # tests/scenetext.py: bore 8.000 - 8.022, perpendicularity 0.015 (M) to A


def ring_csv(path: Path, R=4.003, zs=(0.5, 6.0, 11.5), n=60, centre=(0.0, 0.0), scale=1.0, section=False):
    rows = ["x,y,z" + (",section" if section else "")]
    for k, z in enumerate(zs):
        for i in range(n):
            a = 2 * np.pi * i / n
            x, y = centre[0] + R * np.cos(a), centre[1] + R * np.sin(a)
            rows.append(f"{x * scale:.6f},{y * scale:.6f},{z * scale:.6f}" + (f",{k + 1}" if section else ""))
    path.write_text("\n".join(rows) + "\n")
    return path


@pytest.fixture
def scene(write_scene):
    return write_scene(SCENE, "part.toml")


def run(capsys, *argv):
    code = main(["inspect", *map(str, argv)])
    out, err = capsys.readouterr()
    return code, out, err


# ---------------------------------------------------------------- the demo


def test_demo_scene_tells_its_story():
    # invented demo (scripts/make_demo_points.py): a CMM's median-line printout rejects the bore,
    # yet under ASME the feature axis governs perpendicularity (ASME Y14.5 definition of feature
    # axis, from memory) and it conforms, as does the surface (gauge) reading
    sc = load(DEMO)
    r = inspect_feature(sc, "cap-bore")
    assert r.source == "points" and len(r.sections) == DEMO_SECTIONS
    assert r.size_conforms is True
    assert r.axis.basis == "feature axis"
    assert r.axis_conforms is True and r.axis_check.outcome is Outcome.CONFORMS
    # the median line (section centres) drifts 0.015 tilt + 0.0075 flare at the top face along
    # one direction (scripts/make_demo_points.py): about 0.0225 minus lobing/noise, over 0.018
    assert r.median_axis.deviation > 0.018 + 0.001
    assert r.other_axis_check.outcome is Outcome.NONCONFORMS
    assert r.verdict.outcome is Outcome.CONFORMS and r.verdict.word == "CONFORMS"
    assert r.surface_check.values[0] - 7.985 > 0.001  # clears VC = MMC - t by more than U
    assert r.surface_conforms is True and r.surface_check.outcome is Outcome.CONFORMS
    assert r.least_squares.axis_conforms is True  # the least-squares printout passes it
    assert r.median_line.shape == (DEMO_SECTIONS, 3) and r.radial_deviation.shape == (len(r.points),)
    assert dict(sc.report)["report_number"]


def test_demo_csv_is_reproducible(tmp_path):
    out = tmp_path / "again.csv"
    subprocess.run([sys.executable, str(ROOT / "scripts" / "make_demo_points.py"), str(out)], check=True,
                   capture_output=True)
    assert out.read_text() == (ROOT / "scenes" / "cap_bore_inspection.csv").read_text()


def test_cli_text_output(capsys):
    code, out, _ = run(capsys, DEMO, "--feature", "cap-bore")
    assert code == 0
    assert "tolerance allowed = t + bonus = 0.015 + " in out
    assert "VC = MMC - t = 8.000 - 0.015 = 7.985" in out  # ASME Y14.5-2018 §1.3 (from memory)
    assert "axis     CONFORMS" in out and "surface  CONFORMS" in out
    assert "VERDICT: PART CONFORMS" in out and "does not govern" in out
    assert "least squares (the usual CMM default)" in out
    assert "bonus basis: unrelated" in out
    assert out.rstrip().endswith(CAUTION)


def test_cli_json_output(capsys):
    code, out, _ = run(capsys, DEMO, "--feature", "cap-bore", "--json")
    assert code == 0
    d = json.loads(out)
    for k in ("unrelated_ame", "related_ame", "axis_deviation", "tolerance_allowed", "axis_conforms",
              "surface_conforms", "size_conforms", "sections", "least_squares", "bonus_basis", "decisions"):
        assert k in d
    assert d["axis_conforms"] is True and d["surface_conforms"] is True
    assert d["verdict"]["outcome"] == "conformance proven"
    assert d["axis_readings"]["governing"] == "feature axis"
    assert d["axis_readings"]["not_governing_check"]["outcome"] == "nonconformance proven"
    # tolerance allowed = t + (AME - MMC) (ASME Y14.5-2018 §1.3, from memory) recomputed from the JSON
    assert d["tolerance_allowed"] == pytest.approx(0.015 + d["unrelated_ame"] - 8.0, abs=1e-9)
    assert d["decisions"]["axis"]["outcome"] == "conformance proven"
    assert len(d["sections"]) == DEMO_SECTIONS and d["caution"] == CAUTION


def test_cli_points_option_and_values(tmp_path, capsys, scene):
    csv = ring_csv(tmp_path / "p.csv", section=True)
    code, out, _ = run(capsys, scene, "--feature", "bore", "--points", csv, "--json")
    assert code == 0
    # exact rings R = 4.003 written to 6 decimals (rounding +-5e-7 per coordinate)
    assert json.loads(out)["unrelated_ame"] == pytest.approx(8.006, abs=2e-6)
    scene.write_text(measured_bore(measured={"size": 8.004, "related_size": 7.99, "axis_deviation": 0.01}))
    code, out, _ = run(capsys, scene, "--feature", "bore")
    # bonus = typed envelope size - MMC = 8.004 - 8.000 (ASME Y14.5 bonus at MMC, from memory)
    assert code == 0 and "values typed" in out and "tolerance allowed = t + bonus = 0.015 + 0.004 = 0.019" in out


# ---------------------------------------------------------------- bad input


def bad(capsys, scene, csv, *expect):
    code, out, err = run(capsys, scene, "--feature", "bore", "--points", csv)
    assert code == 2
    assert "Traceback" not in err and err.count("\n") == 1
    assert str(csv) in err
    for e in expect:
        assert e in err
    return err


def test_malformed_csv_names_the_line(tmp_path, capsys, scene):
    csv = ring_csv(tmp_path / "p.csv")
    lines = csv.read_text().splitlines()
    lines[6] = "4.0,abc,0.5"
    csv.write_text("\n".join(lines) + "\n")
    bad(capsys, scene, csv, "line 7", "'y'", "'abc'")


def test_short_row_names_the_line(tmp_path, capsys, scene):
    csv = ring_csv(tmp_path / "p.csv")
    lines = csv.read_text().splitlines()
    lines[4] = "4.0,0.5"
    csv.write_text("\n".join(lines) + "\n")
    bad(capsys, scene, csv, "line 5", "expected 3 values")


@pytest.mark.parametrize("word", ["nan", "inf"])
def test_nan_and_inf(tmp_path, capsys, scene, word):
    csv = ring_csv(tmp_path / "p.csv")
    lines = csv.read_text().splitlines()
    lines[9] = f"4.0,0.1,{word}"
    csv.write_text("\n".join(lines) + "\n")
    bad(capsys, scene, csv, "line 10", "finite")


def test_missing_header(tmp_path, capsys, scene):
    csv = ring_csv(tmp_path / "p.csv")
    csv.write_text("\n".join(csv.read_text().splitlines()[1:]) + "\n")
    bad(capsys, scene, csv, "header")


def test_too_few_points_in_a_section(tmp_path, capsys, scene):
    csv = ring_csv(tmp_path / "p.csv")
    csv.write_text(csv.read_text() + "4.0,0.0,20.0\n0.0,4.0,20.0\n")
    bad(capsys, scene, csv, "2 points", "at least 3")


def test_one_section(tmp_path, capsys, scene):
    bad(capsys, scene, ring_csv(tmp_path / "p.csv", zs=(3.0,)), "at least 2 sections")


def test_points_not_around_the_axis(tmp_path, capsys, scene):
    bad(capsys, scene, ring_csv(tmp_path / "p.csv", centre=(30.0, 0.0)), "do not surround the nominal axis")


def test_wrong_units(tmp_path, capsys, scene):
    err = bad(capsys, scene, ring_csv(tmp_path / "p.csv", scale=1 / 25.4), "wrong units")
    assert "inch values in a mm scene" in err


def test_missing_points_file(tmp_path, capsys, scene):
    bad(capsys, scene, tmp_path / "nope.csv", "no such file")


def test_unknown_feature(tmp_path, capsys, scene):
    code, _, err = run(capsys, scene, "--feature", "bor", "--points", ring_csv(tmp_path / "p.csv"))
    assert code == 2 and "no feature 'bor'" in err and "did you mean 'bore'" in err and "Traceback" not in err


def test_no_points_and_no_values(capsys, scene):
    code, _, err = run(capsys, scene, "--feature", "bore")
    assert code == 2 and "no [feature.measured]" in err


def test_far_from_size_warns(tmp_path, capsys, scene):
    code, out, err = run(capsys, scene, "--feature", "bore", "--points", ring_csv(tmp_path / "p.csv", R=4.5))
    assert code == 0 and "warning" in err and "far outside the limits" in err


def test_header_with_a_repeated_column(tmp_path, capsys, scene):
    csv = ring_csv(tmp_path / "p.csv")
    lines = csv.read_text().splitlines()
    lines[0] = lines[0] + ",x"
    csv.write_text("\n".join(l + ",0" if i else l for i, l in enumerate(lines)) + "\n")
    bad(capsys, scene, csv, "line 1", "'x' appears 2 times")


def test_nan_section_label(tmp_path, capsys, scene):
    csv = ring_csv(tmp_path / "p.csv", section=True)
    lines = csv.read_text().splitlines()
    lines[3] = ",".join(lines[3].split(",")[:3] + ["nan"])
    csv.write_text("\n".join(lines) + "\n")
    bad(capsys, scene, csv, "line 4", "expected a label")


def test_empty_after_header_is_one_line(tmp_path, capsys, scene):
    csv = tmp_path / "p.csv"
    csv.write_text("x,y,z\n")
    bad(capsys, scene, csv, "no points")
