"""The [[process]] and [yield] tables (geom/scenefile_stats.py): loaded, refused with field
paths, written back equal; ``matezone yield``: exit codes, JSON keys, caution and assumptions."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from geom import dumps, load, loads
from geom.scenefile import SceneError
from geom.yieldspec import DEFAULT_SAMPLES, StatSpec

ROOT = Path(__file__).resolve().parent.parent
BASE = """units = "mm"
[[feature]]
id = "bore"
kind = "hole"
limits = [10.0, 10.015]
length = 15
[[feature]]
id = "pin"
kind = "pin"
limits = [9.985, 9.995]
length = 15
[[mate]]
hole = "bore"
pin = "pin"
"""


def test_defaults_and_round_trip():
    s = loads(BASE + "[yield]\nprecision = 0.001\n")
    assert s.statistics == StatSpec(precision=0.001) and s.statistics.samples == DEFAULT_SAMPLES
    s2 = loads(BASE + """[yield]
samples = 1234
seed = 5
confidence = 0.99
[[process]]
feature = "bore"
size = { model = "normal", mean = 10.006, sigma = 0.0025 }
position = { model = "normal", sigma = 0.004 }
[[process]]
feature = "pin"
size = { model = "uniform" }
""")
    assert loads(dumps(s2)) == s2 and s2.statistics.samples == 1234
    for name in ("valve_body_guide_pin.toml", "pump_cover_bolts.toml"):
        sc = load(ROOT / "scenes" / name)
        assert sc.statistics is not None and loads(dumps(sc)) == sc


@pytest.mark.parametrize("extra, where, what", [
    ('[[process]]\nfeature = "bor"\n', "process[0].feature", "did you mean 'bore'"),
    ('[[process]]\nfeature = "bore"\nsize = { sigma = -0.002 }\n', "process[0].size.sigma", "expected a number > 0"),
    ('[[process]]\nfeature = "bore"\nsize = { model = "capability", cp = 1.0 }\n', "process[0].size.cpk", "missing"),
    ('[[process]]\nfeature = "bore"\nsize = { model = "capability", cp = 1.0, cpk = 1.5 }\n',
     "process[0].size.cpk", "cpk <= cp"),
    ('[[process]]\nfeature = "bore"\nsize = { model = "normal", mean = 11.0 }\n', "process[0].size.mean",
     "probable typo"),
    ('[[process]]\nfeature = "bore"\nsize = { model = "gauss" }\n', "process[0].size.model", "expected one of"),
    ('[[process]]\nfeature = "bore"\nposition = { sigma = "x" }\n', "process[0].position.sigma", "expected a number"),
    ('[[process]]\nfeature = "bore"\n[[process]]\nfeature = "bore"\n', "process[1].feature", "one [[process]]"),
    ("[yield]\nsamples = 0\n", "yield.samples", "whole number"),
    ("[yield]\nconfidence = 1.0\n", "yield.confidence", "confidence"),
    ("[yield]\nsample = 10\n", "yield.sample", "did you mean 'samples'"),
])
def test_loader_errors(extra, where, what):
    with pytest.raises(SceneError) as e:
        loads(BASE + extra, "s.toml")
    assert f"s.toml: {where}: " in str(e.value) and what in str(e.value)


def test_mean_just_outside_limits_is_allowed():
    # a process can make bad parts: a mean 2 sigma outside the limits loads
    s = loads(BASE + '[[process]]\nfeature = "bore"\nsize = { mean = 10.02, sigma = 0.0025 }\n')
    assert s.statistics.processes[0].size.mean == 10.02


def _cli(*args):
    return subprocess.run([sys.executable, "-m", "matezone", "yield", *args], capture_output=True, text=True,
                          cwd=ROOT, timeout=120)


def test_cli_json_and_text(tmp_path):
    p = _cli("scenes/valve_body_guide_pin.toml", "--samples", "5000", "--seed", "3", "--json")
    assert p.returncode == 0, p.stderr
    out = json.loads(p.stdout)
    run = out["runs"][0]
    for k in ("p_interference", "p_interval", "histogram", "rejections", "stack", "contributions", "needed",
              "assumptions", "worst_case", "rejected_assemble_fraction"):
        assert k in run
    assert run["samples"] == 5000 and run["seed"] == 3 and "caution" in out
    assert sum(run["histogram"]["counts"]) == 5000
    t = _cli("scenes/valve_body_guide_pin.toml", "--samples", "3000")
    assert t.returncode == 0 and "P(interference)" in t.stdout and "assumptions:" in t.stdout
    assert "do not replace" in t.stdout
    loaded = [m for m in ("vtk", "PyQt5", "matplotlib", "pyvista")]
    q = subprocess.run([sys.executable, "-c", "import sys; from matezone.cli import main; "
                        "main(['yield', 'scenes/valve_body_guide_pin.toml', '--samples', '100']); "
                        f"print([m for m in {loaded!r} if m in sys.modules])"],
                       capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert q.stdout.strip().endswith("[]")


def test_cli_bad_input(tmp_path):
    for args in (("scenes/valve_body_guide_pin.toml", "--samples", "0"),
                 ("scenes/valve_body_guide_pin.toml", "--seed", "-1"),
                 ("nope.toml",)):
        p = _cli(*args)
        assert p.returncode == 2 and len(p.stderr.strip().splitlines()) == 1, (args, p.stderr)
    f = tmp_path / "lone.toml"
    f.write_text('units = "mm"\n[[feature]]\nid = "b"\nkind = "hole"\nlimits = [1, 2]\nlength = 1\n')
    p = _cli(str(f))
    assert p.returncode == 2 and "no [[mate]] or [[interface]]" in p.stderr
