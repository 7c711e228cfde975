"""The layers stay apart: geom and `matezone analyze` never load GUI or rendering modules."""

import ast
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
HEAVY = ("pyvista", "vtk", "vtkmodules", "PyQt5", "pyvistaqt", "matplotlib", "qtpy")
GEOM_ALLOWED = {"numpy", "shapely", "scipy", "geom"}


def _loaded_after(code: str) -> set[str]:
    probe = code + "\nimport sys\nprint(' '.join(sorted({m.split('.')[0] for m in sys.modules})))"
    out = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True, cwd=ROOT)
    return set(out.stdout.split())


def test_import_geom_loads_no_gui_or_rendering_module():
    loaded = _loaded_after("import geom, geom.throughview, geom.placement, geom.readout")
    assert not loaded & set(HEAVY), loaded & set(HEAVY)
    assert "scipy" not in loaded  # scipy is imported lazily, inside the functions that need it


def test_analyze_command_loads_no_gui_or_rendering_module():
    code = (
        "import io, contextlib\nfrom matezone.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    assert main(['analyze', 'scenes/gearbox_endcap_dowel.toml', '--json']) == 0\n"
    )
    loaded = _loaded_after(code)
    assert not loaded & set(HEAVY), loaded & set(HEAVY)


def test_geom_source_imports_only_allowed_third_party_modules():
    stdlib = set(sys.stdlib_module_names)
    for path in (ROOT / "geom").glob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.level == 0:
                names = [node.module]
            else:
                continue
            for n in names:
                top = n.split(".")[0]
                assert top in stdlib or top in GEOM_ALLOWED, f"{path.name} imports {n}"


def test_only_viewer_app_imports_qt():
    for path in ROOT.glob("**/*.py"):
        rel = path.relative_to(ROOT)
        if rel.parts[0] in (".venv", "build") or rel.parts[:2] == ("viewer", "app") or rel.parts[0] == "tests":
            continue
        if rel.parts[0] == "benchmarks":
            continue
        text = path.read_text(encoding="utf-8")
        for mod in ("PyQt5", "pyvistaqt"):
            assert f"import {mod}" not in text and f"from {mod}" not in text, f"{rel} imports {mod}"
