"""Questions about the Qt platform that must be answered before a QApplication exists."""

from __future__ import annotations

import os


def wayland_plugin_present() -> bool:
    """Does this Qt have a Wayland platform plugin? (QtCore alone never opens a display.)"""
    from PyQt5.QtCore import QLibraryInfo

    folder = os.path.join(QLibraryInfo.location(QLibraryInfo.PluginsPath), "platforms")
    try:
        return any("wayland" in f for f in os.listdir(folder))
    except OSError:
        return False
