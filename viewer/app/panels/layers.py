"""The layer list under the 3D view: the colour legend and the layer toggles in one compact list,
one row per layer that applies to the scene shown (its colour swatch, its name, a checkbox). The
rows come from :func:`viewer.windowlogic.layers.layer_rows`; each checkbox stays in step with
the layer's checkable QAction (the one the Layers menus hold). :class:`StayOpenMenu` is a menu
that stays open while its checkable entries are toggled."""

from __future__ import annotations

from html import escape

from PyQt5.QtCore import Qt
from PyQt5.QtWidgets import QCheckBox, QGridLayout, QLabel, QMenu, QWidget

from viewer.windowlogic.layers import LayerRow

COLUMNS = 3  # rows side by side: ten layers take four lines under the picture


class StayOpenMenu(QMenu):
    """A menu whose checkable entries toggle without closing it (a click or Return / Space), so
    several layers can be switched in one visit; other entries behave as in any menu."""

    def _toggle_active(self) -> bool:
        a = self.activeAction()
        if a is not None and a.isEnabled() and a.isCheckable() and a.menu() is None:
            a.trigger()  # a checkable action's trigger toggles it (and emits toggled)
            return True
        return False

    def mouseReleaseEvent(self, event) -> None:
        if event.button() == Qt.LeftButton and self._toggle_active():
            return
        super().mouseReleaseEvent(event)

    def keyPressEvent(self, event) -> None:
        if event.key() in (Qt.Key_Return, Qt.Key_Enter, Qt.Key_Space) and self._toggle_active():
            return
        super().keyPressEvent(event)


def swatch_html(colours) -> str:
    """The swatch of a row: a filled square per colour (none: an empty square's room)."""
    if not colours:
        return "<span style='color:transparent; font-size:13pt'>■</span>"
    return "".join(f"<span style='color:{escape(c)}; font-size:13pt'>■</span>" for c in colours)


class LayerList(QWidget):
    """The legend merged with the layer toggles; ``actions`` maps a layer to its checkable QAction."""

    def __init__(self, actions: dict, parent=None):
        super().__init__(parent)
        self.actions = actions
        self.grid = QGridLayout(self)
        self.grid.setContentsMargins(2, 0, 2, 0)
        self.grid.setHorizontalSpacing(6)
        self.grid.setVerticalSpacing(0)
        self.rows: tuple[LayerRow, ...] = ()
        self.boxes: dict[str, QCheckBox] = {}
        self.swatches: dict[str, QLabel] = {}
        self.setToolTip("What the colours in the 3D view mean; tick a layer to show it")
        for name, a in actions.items():
            a.toggled.connect(lambda on, name=name: self._action_toggled(name, on))

    def shown_layers(self) -> tuple[str, ...]:
        """The layers listed, in order."""
        return tuple(r.layer for r in self.rows)

    def set_rows(self, rows: tuple[LayerRow, ...]) -> None:
        """Show ``rows``; the same layers, names and colours keep their widgets (a what-if move
        only changes the words of a tooltip)."""
        same = [(r.layer, r.name, r.colours) for r in rows] == [(r.layer, r.name, r.colours) for r in self.rows]
        if not same:
            self._rebuild(rows)
        for r in rows:
            tip = r.tip or r.name
            if self.boxes[r.layer].toolTip() != tip:
                self.boxes[r.layer].setToolTip(tip)
                self.swatches[r.layer].setToolTip(tip)
        self.rows = tuple(rows)
        listed = {r.layer for r in rows}
        for name, a in self.actions.items():  # the menus list the same layers
            a.setVisible(name in listed)

    def _rebuild(self, rows) -> None:
        while self.grid.count():
            w = self.grid.takeAt(0).widget()
            if w is not None:
                w.hide()
                w.setParent(None)
                w.deleteLater()
        self.boxes, self.swatches = {}, {}
        for i, r in enumerate(rows):
            line, col = divmod(i, COLUMNS)
            sw = QLabel(swatch_html(r.colours))
            sw.setTextFormat(Qt.RichText)
            box = QCheckBox(r.name)
            a = self.actions.get(r.layer)
            box.setChecked(a is not None and a.isChecked())
            box.toggled.connect(lambda on, name=r.layer: self._box_toggled(name, on))
            self.grid.addWidget(sw, line, 2 * col, Qt.AlignRight)
            self.grid.addWidget(box, line, 2 * col + 1)
            self.boxes[r.layer], self.swatches[r.layer] = box, sw
        for c in range(2 * COLUMNS):
            self.grid.setColumnStretch(c, 1 if c % 2 else 0)

    def _box_toggled(self, name: str, on: bool) -> None:
        a = self.actions.get(name)
        if a is not None and a.isChecked() != on:
            a.setChecked(on)

    def _action_toggled(self, name: str, on: bool) -> None:
        box = self.boxes.get(name)
        if box is not None and box.isChecked() != on:
            box.blockSignals(True)
            box.setChecked(on)
            box.blockSignals(False)
