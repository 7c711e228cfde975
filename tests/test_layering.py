"""The layers stay apart (DEVELOPERS.md, "Layers"): geom and `matezone analyze` never load GUI or
rendering modules, the viewer's builders never reach into the window, and only viewer/app
imports Qt.

The source checks read import statements (``ast``), not text, and walk the folders, so a module
or subpackage added later is checked without an edit here.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
HEAVY = ("pyvista", "vtk", "vtkmodules", "PyQt5", "pyvistaqt", "matplotlib", "qtpy")
QT = {"PyQt5", "PyQt6", "PySide2", "PySide6", "pyvistaqt", "qtpy", "sip"}
GEOM_ALLOWED = {"numpy", "shapely", "scipy", "geom"}
GEOM_LAZY = {"shapely", "scipy"}  # imported inside the functions that need them, never at module level
NOT_SOURCE = {".venv", "build", "dist", "tests", "benchmarks"}  # tests and benchmarks drive the window


def sources(top: str = "") -> list[Path]:
    """Every .py file under ROOT/top (all subpackages), without caches and hidden folders."""
    out = []
    for p in sorted((ROOT / top).rglob("*.py")):
        rel = p.relative_to(ROOT).parts
        if any(part.startswith(".") or part == "__pycache__" or part.endswith(".egg-info") for part in rel):
            continue
        out.append(p)
    return out


def module_name(path: Path, root: Path = ROOT) -> str:
    parts = list(path.relative_to(root).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def imports(path: Path, root: Path = ROOT) -> list[tuple[str, ast.stmt, bool]]:
    """(dotted name, node, inside a function) for every import in the file. Relative imports are
    resolved against the file's package; ``from a import b`` gives ``a`` and ``a.b`` (b may be a
    module)."""
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    name = module_name(path, root)
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    found = []

    def visit(node, in_function):
        for child in ast.iter_child_nodes(node):
            inner = in_function or isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda))
            if isinstance(child, ast.Import):
                found.extend((a.name, child, in_function) for a in child.names)
            elif isinstance(child, ast.ImportFrom):
                if child.level:
                    base = package.split(".")[: len(package.split(".")) - (child.level - 1)]
                    mod = ".".join(base + ([child.module] if child.module else []))
                else:
                    mod = child.module
                found.append((mod, child, in_function))
                found.extend((f"{mod}.{a.name}", child, in_function) for a in child.names if a.name != "*")
            visit(child, inner)

    visit(tree, False)
    return found


def where(path: Path, node: ast.stmt) -> str:
    return f"{path.relative_to(ROOT)}:{node.lineno}"


def _loaded_after(code: str) -> set[str]:
    probe = code + "\nimport sys\nprint(' '.join(sorted({m.split('.')[0] for m in sys.modules})))"
    out = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, cwd=ROOT)
    assert out.returncode == 0, out.stderr
    return set(out.stdout.split())


# ---------------------------------------------------------------- the walk itself


def test_the_import_reader_sees_every_form_of_import(tmp_path):
    # the checks below are only as good as this reader: plain, from, relative, lazy, aliased
    pkg = tmp_path / "viewer" / "scene3d"
    pkg.mkdir(parents=True)
    f = pkg / "build.py"
    f.write_text("import numpy as np\nfrom . import mesh\nfrom ..app import window\nfrom .. import app\n"
                 "def f():\n    from PyQt5.QtWidgets import QWidget\n    import viewer.app.views\n")
    got = {(name, lazy) for name, _, lazy in imports(f, root=tmp_path)}
    assert {("numpy", False), ("viewer.scene3d", False), ("viewer.scene3d.mesh", False),
            ("viewer.app", False), ("viewer.app.window", False), ("viewer", False),
            ("PyQt5.QtWidgets", True), ("viewer.app.views", True)} <= got
    assert module_name(pkg / "__init__.py", root=tmp_path) == "viewer.scene3d"


def test_the_walk_finds_subpackages():
    # geom/inspect/ is a subpackage today: a walk that misses it would check too little
    assert any(p.parent.name == "inspect" for p in sources("geom"))
    assert any(p.parent.name == "app" for p in sources("viewer"))


# ---------------------------------------------------------------- geom


def test_import_geom_loads_no_gui_or_rendering_module():
    import pkgutil

    import geom

    names = sorted(m.name for m in pkgutil.walk_packages(geom.__path__, "geom."))
    assert "geom.inspect" in names and len(names) > 5
    loaded = _loaded_after("import " + ", ".join(["geom", *names]))
    assert not loaded & set(HEAVY), loaded & set(HEAVY)
    assert "scipy" not in loaded  # scipy is imported lazily, inside the functions that need it


def test_geom_source_imports_only_allowed_third_party_modules():
    stdlib = set(sys.stdlib_module_names)
    bad = [f"{where(p, node)} imports {name}" for p in sources("geom") for name, node, _ in imports(p)
           if name.split(".")[0] not in stdlib | GEOM_ALLOWED]
    assert not bad, bad


def test_geom_imports_shapely_and_scipy_only_inside_functions():
    bad = [f"{where(p, node)} imports {name} at module level" for p in sources("geom")
           for name, node, lazy in imports(p) if name.split(".")[0] in GEOM_LAZY and not lazy]
    assert not bad, bad


def test_analyze_command_loads_no_gui_or_rendering_module():
    code = (
        "import io, contextlib\nfrom matezone.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    assert main(['analyze', 'scenes/gearbox_endcap_dowel.toml', '--json']) == 0\n"
    )
    loaded = _loaded_after(code)
    assert not loaded & set(HEAVY), loaded & set(HEAVY)


# ---------------------------------------------------------------- viewer builders and the window


def _builders() -> list[Path]:
    return [p for p in sources("viewer") if p.relative_to(ROOT).parts[:2] != ("viewer", "app")]


def test_viewer_builders_never_import_the_window():
    bad = [f"{where(p, node)} imports {name}" for p in _builders() for name, node, _ in imports(p)
           if name == "viewer.app" or name.startswith("viewer.app.")]
    assert not bad, bad


def test_viewer_builders_never_import_the_command_line():
    bad = [f"{where(p, node)} imports {name}" for p in sources("viewer") for name, node, _ in imports(p)
           if name.split(".")[0] == "matezone"]
    assert not bad, bad


WALK_BUILDERS = """
import importlib, pkgutil
def walk(package):
    for m in pkgutil.iter_modules(importlib.import_module(package).__path__, package + "."):
        if m.name != "viewer.app":
            walk(m.name) if m.ispkg else importlib.import_module(m.name)
walk("viewer")
"""


def test_importing_every_viewer_builder_loads_no_qt():
    # the AST check above sees direct imports; this one sees what the imported libraries pull in.
    # The walk imports what Python would import (packages and modules), all but viewer.app.
    assert len(_builders()) > 3
    loaded = _loaded_after(WALK_BUILDERS)
    assert {"viewer", "pyvista", "matplotlib"} <= loaded  # the builders and their libraries were imported
    assert not loaded & QT, loaded & QT


def test_only_viewer_app_imports_qt():
    checked, bad = 0, []
    for p in sources():
        rel = p.relative_to(ROOT).parts
        if rel[0] in NOT_SOURCE or rel[:2] == ("viewer", "app"):
            continue
        checked += 1
        bad += [f"{where(p, node)} imports {name}" for name, node, _ in imports(p) if name.split(".")[0] in QT]
    assert checked > 10  # geom, viewer, matezone, scripts were walked
    assert not bad, bad
