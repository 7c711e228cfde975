"""The wheel carries everything an installed matezone needs: every module of every (sub)package
and the demo scenes, which are found from the installed package, not from a source checkout.

The wheel is built from a copy of the checkout (the build writes build/ and *.egg-info beside the
sources) by the build backend that pyproject.toml names, run offline with the setuptools that the
test extra installs. Then the wheel is unpacked into a folder of its own and ``matezone analyze``
runs on the bundled demo scene from another folder, importing matezone from the unpacked wheel.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
import tomllib
import zipfile
from importlib.metadata import version
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
CODE = ("geom", "viewer", "matezone")
TOP_SKIP = {"build", "dist", "out", "tests", "benchmarks"}  # at the top of the checkout only


def _skip(folder: str, names: list[str]) -> set[str]:
    skip = {n for n in names if n.startswith(".") or n == "__pycache__" or n.endswith(".egg-info")}
    return skip | (TOP_SKIP & set(names) if Path(folder) == ROOT else set())


def _backend_requirement() -> tuple[str, tuple[int, ...]]:
    system = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["build-system"]
    (req,) = [r for r in system["requires"] if r.startswith("setuptools")]
    least = re.fullmatch(r"setuptools>=([\d.]+)", req).group(1)
    return req, tuple(int(x) for x in least.split("."))


@pytest.fixture(scope="module")
def wheel(tmp_path_factory) -> Path:
    req, least = _backend_requirement()
    have = version("setuptools")
    assert tuple(int(x) for x in re.findall(r"\d+", have)[:len(least)]) >= least, (
        f"setuptools {have} is older than the build requirement {req}: run pip install -e '.[test]'")
    work = tmp_path_factory.mktemp("wheel")
    src = work / "src"
    shutil.copytree(ROOT, src, ignore=_skip, symlinks=True)
    out = work / "dist"
    out.mkdir()
    build = "import sys\nfrom setuptools import build_meta\nprint(build_meta.build_wheel(sys.argv[1]))"
    p = subprocess.run([sys.executable, "-c", build, str(out)], cwd=src, capture_output=True, text=True,
                       timeout=300)
    assert p.returncode == 0, p.stderr[-3000:]
    return out / p.stdout.split()[-1]


def test_wheel_holds_every_module_of_every_package(wheel):
    names = set(zipfile.ZipFile(wheel).namelist())
    on_disk = {p.relative_to(ROOT).as_posix() for top in CODE for p in (ROOT / top).rglob("*.py")
               if "__pycache__" not in p.parts}
    assert "geom/inspect/__init__.py" in on_disk  # a subpackage, found by the discovery
    assert not on_disk - names, sorted(on_disk - names)
    tops = {n.split("/")[0] for n in names}
    info = {t for t in tops if t.endswith(".dist-info")}
    assert len(info) == 1 and tops - info == set(CODE), tops  # nothing else at the top of site-packages


def test_wheel_ships_the_demo_scenes_as_matezone_scenes(wheel):
    names = set(zipfile.ZipFile(wheel).namelist())
    scenes = sorted(p.name for p in (ROOT / "scenes").iterdir() if p.suffix in (".toml", ".csv", ".py"))
    assert "gearbox_endcap_dowel.toml" in scenes and "cap_bore_inspection.csv" in scenes
    assert {f"matezone/scenes/{n}" for n in scenes} <= names
    assert not any(n.startswith("scenes/") for n in names)  # no top-level package named scenes
    entry = next(n for n in names if n.endswith(".dist-info/entry_points.txt"))
    assert "matezone = matezone.cli:main" in zipfile.ZipFile(wheel).read(entry).decode()


def test_installed_wheel_analyses_its_demo_scene_from_another_folder(wheel, tmp_path):
    site = tmp_path / "site"
    zipfile.ZipFile(wheel).extractall(site)  # what pip does with a pure-Python wheel
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    env = {**os.environ, "PYTHONPATH": str(site)}
    probe = ("import matezone, geom\nfrom matezone.cli import demo_scene, main\n"
             "print(matezone.__file__)\nprint(geom.__file__)\nprint(demo_scene())\n"
             "raise SystemExit(main(['analyze', str(demo_scene())]))")
    p = subprocess.run([sys.executable, "-c", probe], cwd=elsewhere, env=env, capture_output=True, text=True,
                       timeout=120)
    assert p.returncode == 0, p.stderr
    mz, gm, scene, *report = p.stdout.splitlines()
    for path in (mz, gm, scene):
        assert Path(path).is_relative_to(site), path  # not the checkout
    assert Path(scene) == site / "matezone" / "scenes" / "gearbox_endcap_dowel.toml"
    title = tomllib.loads((ROOT / "scenes" / "gearbox_endcap_dowel.toml").read_text(encoding="utf-8"))["title"]
    assert report[0] == title
    assert any(line.startswith("  virtual condition") for line in report)
