"""Small widget helpers the panels share: combo boxes that carry a value per entry, and the
window's looks (re-exported from :mod:`viewer.windowlogic.looks`, where they are plain strings)."""

from __future__ import annotations

from PyQt5.QtWidgets import QComboBox

from viewer.windowlogic.looks import BAD_RED, ERROR_STYLE, NEUTRAL, OK_GREEN, ROLE_LOOK

__all__ = ["BAD_RED", "ERROR_STYLE", "NEUTRAL", "OK_GREEN", "ROLE_LOOK", "combo", "set_combo"]


def combo(values, labels=None) -> QComboBox:
    """A combo box with one entry per value (its label, else the value as text), the value as
    the entry's data."""
    c = QComboBox()
    for i, v in enumerate(values):
        c.addItem(labels[i] if labels else str(v), v)
    return c


def set_combo(c: QComboBox, value) -> None:
    """Select the entry whose data is ``value`` (the first entry when none is)."""
    i = c.findData(value)
    c.setCurrentIndex(max(i, 0))
