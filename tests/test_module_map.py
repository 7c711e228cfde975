"""DEVELOPERS.md's module map matches the tree: every module of geom/, viewer/ and matezone/ is
named in it (directly, as a sibling after a comma, or by a ``folder/*.py`` row), and every file
it names exists."""

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PACKAGES = ("geom", "viewer", "matezone")


def _map_rows() -> list[str]:
    text = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    section = text.split("## Module map", 1)[1].split("\n## ", 1)[0]
    return [line.split("|")[1] for line in section.splitlines() if line.startswith("| `")]


def _named() -> tuple[set[Path], set[Path]]:
    """(files named, folders covered by a ``folder/*.py`` row). In a cell, a bare name after a
    comma lives in the folder of the cell's first path."""
    files, folders = set(), set()
    for cell in _map_rows():
        names = re.findall(r"`([^`]+)`", cell)
        folder = None
        for n in names:
            if "/" in n:
                folder = Path(n).parent
                if n.endswith("/*.py"):
                    folders.add(Path(n[:-5]))
                    continue
                files.add(Path(n))
            elif folder is not None:
                files.add(folder / n)
    return files, folders


def test_every_module_is_in_the_map():
    files, folders = _named()
    missing = []
    for pkg in PACKAGES:
        for path in sorted((ROOT / pkg).rglob("*.py")):
            rel = path.relative_to(ROOT)
            if rel.name == "__init__.py" or rel.name == "__main__.py" or rel.parent in folders:
                continue
            if rel not in files:
                missing.append(str(rel))
    assert not missing, f"modules missing from DEVELOPERS.md's module map: {missing}"


def test_every_file_in_the_map_exists():
    files, folders = _named()
    gone = [str(p) for p in sorted(files) if not (ROOT / p).is_file()]
    gone += [str(p) for p in sorted(folders) if not (ROOT / p).is_dir()]
    assert not gone, f"DEVELOPERS.md names files that do not exist: {gone}"


def test_no_module_is_over_the_house_size():
    # issue 11: no module over about 500 lines (common practice, no source: a page-able module)
    big = {}
    for pkg in PACKAGES:
        for path in (ROOT / pkg).rglob("*.py"):
            n = len(path.read_text(encoding="utf-8").splitlines())
            if n > 520:
                big[str(path.relative_to(ROOT))] = n
    assert not big, big
