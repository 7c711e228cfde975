"""Shared test set-up.

- GUI tests (marked ``gui``): the window's settings (recent files) go to a temporary file, never
  to the user's own settings.
- ``write_scene``: writes a scene text (usually built with ``tests/scenetext.py``) into the
  test's temporary folder.
- Doctests of ``viewer/app`` (the Qt window) are skipped where no display is reachable: a Qt
  widget made there would abort the whole run, not fail one test.
"""

from pathlib import Path

import pytest


@pytest.fixture(autouse=True)
def _gui_private_settings(request, tmp_path_factory, monkeypatch):
    if request.node.get_closest_marker("gui") is None:
        return
    folder = tmp_path_factory.mktemp("settings")
    # the window reads $MATEZONE_SETTINGS (a `matezone view` started by a test inherits it)
    monkeypatch.setenv("MATEZONE_SETTINGS", str(folder / "matezone.ini"))
    from PyQt5.QtCore import QSettings

    # and any QSettings made without it lands under the same temporary folder
    for fmt in (QSettings.NativeFormat, QSettings.IniFormat):
        QSettings.setPath(fmt, QSettings.UserScope, str(folder / "qt"))


@pytest.fixture
def write_scene(tmp_path):
    """``write_scene(text, name="scene.toml") -> Path``: the scene text written into tmp_path."""

    def write(text: str, name: str = "scene.toml") -> Path:
        path = tmp_path / name
        path.write_text(text, encoding="utf-8")
        return path

    return write


APP = Path(__file__).resolve().parent.parent / "viewer" / "app"


def pytest_collection_modifyitems(config, items):
    doctests = [it for it in items if type(it).__name__ == "DoctestItem" and APP in Path(str(it.path)).parents]
    if not doctests:
        return
    from matezone.cmd_view import display_problem

    problem = display_problem()
    if problem:
        skip = pytest.mark.skip(reason=f"viewer/app doctests need a display ({problem}): run under xvfb-run -a")
        for it in doctests:
            it.add_marker(skip)
