"""The editor forms' common behaviour (:class:`Form`: fields committed together through the
scene rules, a rejected value kept and marked with the rule's message) and the two small forms:
the scene's title, units and standard, and a mate's hole and pin. The feature form is in
:mod:`.feature_form`."""

from __future__ import annotations

from PyQt5.QtCore import Qt
from PyQt5.QtWidgets import QComboBox, QFormLayout, QLabel, QLineEdit, QWidget

from geom.model import Standard, Units
from geom.readout import STANDARD_NAME
from geom.scenefile import SceneError
from viewer.windowlogic.messages import edit_message

from ..model import SceneModel
from .common import BAD_RED, ERROR_STYLE, combo, set_combo


class Form(QWidget):
    """A form whose fields are committed together through the scene rules. A rejected value
    keeps its text, gets a red border and the rule's message beside it, the field named by its
    label on the form (:func:`viewer.windowlogic.messages.edit_message`); the scene stays."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.fields: dict[str, QWidget] = {}
        self.error_label = QLabel()
        self.error_label.setObjectName("fieldError")
        self.error_label.setWordWrap(True)
        self.error_label.setTextFormat(Qt.PlainText)  # the rule's message quotes typed text
        self.error_label.setStyleSheet(f"color: {BAD_RED};")
        self.error_label.hide()
        self.bad: QWidget | None = None
        self._filling = False

    def _line(self, key: str, tip: str = "") -> QLineEdit:
        w = QLineEdit()
        w.setToolTip(tip)
        w.editingFinished.connect(lambda: self.commit(key))
        self.fields[key] = w
        return w

    def _choice(self, key: str, values, labels=None) -> QComboBox:
        c = combo(values, labels)
        c.activated.connect(lambda _i: self.commit(key))
        self.fields[key] = c
        return c

    def mark(self, key: str | None, err: SceneError | None) -> None:
        if self.bad is not None:
            self.bad.setStyleSheet("")
            self.bad = None
        if err is None:
            self.error_label.hide()
            self.error_label.clear()
            return
        w = self.fields.get(key) if key else None
        if w is not None:
            w.setStyleSheet(ERROR_STYLE)
            self.bad = w
        text = edit_message(err)  # the form's words for the field, then the rule's message
        self.error_label.setText(text)
        self.error_label.show()
        self.model.message.emit("error", text)

    def field_for(self, err: SceneError) -> str | None:
        """The field a rule's path names, if this form has it."""
        return None

    def commit(self, key: str) -> None:
        if self._filling:
            return
        err = self.apply()
        self.mark(self.field_for(err) or key if err else None, err)

    def apply(self) -> SceneError | None:
        raise NotImplementedError

    def typed(self) -> list[str]:
        """Keys of the text fields holding typed text not yet committed (editingFinished not
        seen since the text was typed; a value shown from the scene is not "typed")."""
        return [k for k, w in self.fields.items() if isinstance(w, QLineEdit) and w.isModified()]

    def commit_typed(self) -> SceneError | None:
        """Commit what is typed but not committed (Save, export, close and quit call this first, so a
        value typed without Enter is never lost). Returns the rule's error if the scene rules reject
        it: the field then keeps its text and is marked, as on Enter."""
        keys = self.typed()
        if not keys or self._filling or not self.isEnabled():
            return None
        err = self.apply()
        self.mark(self.field_for(err) or keys[0] if err else None, err)
        if err is None:
            for k in keys:
                self.fields[k].setModified(False)
        return err

    def has_error(self) -> bool:
        return self.bad is not None or not self.error_label.isHidden()


class SceneForm(Form):
    """Title, units and standard of the scene."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(model, parent)
        lay = QFormLayout(self)
        lay.addRow("Title", self._line("title", "Shown on pictures and reports"))
        lay.addRow("Units", self._choice("units", [u.value for u in Units]))
        lay.addRow("Standard", self._choice("standard", [s.value for s in Standard],
                                             [STANDARD_NAME[s].split(" (")[0] for s in Standard]))
        self.fields["standard"].setToolTip("\n".join(STANDARD_NAME.values()))
        lay.addRow(self.error_label)
        model.sceneChanged.connect(self.fill)
        self.fill()

    def fill(self) -> None:
        self._filling = True
        sc = self.model.scene
        self.fields["title"].setText(sc.title)
        set_combo(self.fields["units"], sc.units.value)
        set_combo(self.fields["standard"], sc.standard.value)
        self._filling = False
        self.mark(None, None)

    def field_for(self, err):
        return err.path if err.path in self.fields else None

    def apply(self):
        title = self.fields["title"].text()
        units = self.fields["units"].currentData()
        std = self.fields["standard"].currentData()

        def mutate(d):
            d["title"], d["units"], d["standard"] = title, units, std

        return self.model.try_edit(mutate, "scene settings")


class MateForm(Form):
    """Which hole receives which pin."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(model, parent)
        lay = QFormLayout(self)
        self.index = 0
        self.title = QLabel()
        lay.addRow(self.title)
        lay.addRow("Hole", self._choice("hole", []))
        lay.addRow("Pin", self._choice("pin", []))
        lay.addRow(self.error_label)
        model.sceneChanged.connect(self.fill)
        model.focusChanged.connect(self.fill)

    def fill(self) -> None:
        kind, key = self.model.focus
        if kind != "mate":
            return
        self.index = key
        m = self.model.scene.mates[key]
        self._filling = True
        self.title.setText(f"<b>Mate {key + 1}</b>: the hole receives the pin, both seated on datum A")
        for role in ("hole", "pin"):
            c = self.fields[role]
            c.clear()
            for f in self.model.scene.features:
                c.addItem(f"{f.id} ({f.kind.value})", f.id)
            set_combo(c, getattr(m, role))
        self._filling = False
        self.mark(None, None)

    def field_for(self, err):
        tail = err.path.rsplit(".", 1)[-1]
        return tail if tail in self.fields else None

    def apply(self):
        i, h, p = self.index, self.fields["hole"].currentData(), self.fields["pin"].currentData()

        def mutate(d):
            d["mate"][i] = {"hole": h, "pin": p}

        return self.model.try_edit(mutate, f"mate {i + 1}")
