"""The scene-contents list: the mates, features, inspections and fasteners of the scene, with
buttons that add a hole, a pin or a mate and remove what is selected. Picking an entry sets the
model's focus; the entries and the edits come from :mod:`viewer.windowlogic.editing`."""

from __future__ import annotations

from PyQt5.QtCore import Qt
from PyQt5.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QListWidget,
    QListWidgetItem,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from geom.scenefile import SceneError
from viewer.windowlogic.editing import contents_entries, new_feature, new_mate, removal
from viewer.windowlogic.messages import edit_message

from ..model import SceneModel


class ContentsList(QWidget):
    """The mates, features, inspections and fasteners of the scene; picking one focuses the
    views and the editor."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        self.list = QListWidget()
        self.list.setSelectionMode(QAbstractItemView.SingleSelection)
        self.list.currentItemChanged.connect(self._picked)
        lay.addWidget(self.list)
        row = QHBoxLayout()
        for text, tip, slot in (
            ("+ hole", "Add a hole feature", lambda: self._add("hole")),
            ("+ pin", "Add a pin feature", lambda: self._add("pin")),
            ("+ mate", "Add a mate (a hole receiving a pin)", self._add_mate),
            ("Remove", "Remove the selected feature (and its mates) or mate", self._remove),
        ):
            b = QPushButton(text)
            b.setToolTip(tip)
            b.clicked.connect(slot)
            row.addWidget(b)
        lay.addLayout(row)
        model.sceneChanged.connect(self.refresh)
        model.focusChanged.connect(self._select_focus)
        self.refresh()

    def refresh(self) -> None:
        self.list.blockSignals(True)
        self.list.clear()
        for e in contents_entries(self.model.scene):
            it = QListWidgetItem(e.text)
            it.setData(Qt.UserRole, e.focus)
            if e.tip:
                it.setToolTip(e.tip)
            self.list.addItem(it)
        self.list.blockSignals(False)
        self._select_focus()

    def _select_focus(self) -> None:
        self.list.blockSignals(True)
        for i in range(self.list.count()):
            if tuple(self.list.item(i).data(Qt.UserRole)) == tuple(self.model.focus):
                self.list.setCurrentRow(i)
        self.list.blockSignals(False)

    def _picked(self, item, _prev) -> None:
        if item is not None:
            self.model.set_focus(*item.data(Qt.UserRole))

    def _report(self, err: SceneError | None) -> None:
        if err is not None:
            self.model.message.emit("error", edit_message(err))

    def _add(self, kind: str) -> None:
        fid, entry = new_feature(self.model.scene, kind)
        self._report(self.model.try_edit(lambda d: d.setdefault("feature", []).append(entry), f"add {kind} {fid}"))
        self.model.set_focus("feature", fid)

    def _add_mate(self) -> None:
        mate = new_mate(self.model.scene)
        if mate is None:
            self.model.message.emit("error", "a mate needs a hole and a pin: add them first")
            return
        self._report(self.model.try_edit(lambda d: d.setdefault("mate", []).append(mate), "add mate"))
        self.model.set_focus("mate", len(self.model.scene.mates) - 1)

    def _remove(self) -> None:
        edit = removal(self.model.scene, *self.model.focus)
        if edit is not None:
            self._report(self.model.try_edit(*edit))
