"""GUI tests only (marked ``gui``): the window's settings (recent files) go to a temporary
file, never to the user's own settings."""

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
