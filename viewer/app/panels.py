"""Side panels of the window: scene contents, the editor forms, the what-if controls, the
readout table, the fit verdict and the message bar. Each observes the :class:`SceneModel`."""

from __future__ import annotations

from html import escape as _html_escape

import re
from pathlib import Path

from PyQt5.QtCore import Qt, pyqtSignal
from PyQt5.QtGui import QBrush, QColor, QFont
from PyQt5.QtWidgets import (
    QAbstractItemView, QButtonGroup, QCheckBox, QComboBox, QDoubleSpinBox, QFormLayout, QFrame,
    QGridLayout, QGroupBox, QHBoxLayout, QHeaderView, QLabel, QLineEdit, QListWidget,
    QListWidgetItem, QPushButton, QRadioButton, QSizePolicy, QSlider, QTableWidget,
    QTableWidgetItem, QToolButton, QVBoxLayout, QWidget,
)

from geom.analysis import term
from geom.conformance import verdict_word
from geom.model import Characteristic, Kind, Material, Standard, Units, Zone
from geom.readout import STANDARD_NAME, feature_heading, feature_rows
from geom.scenefile import SceneError

from .glyphs import mono_css, ui_text
from .model import SceneModel, feature_index, mate_verdict_at, rename_in_mates, whatif_rows

from viewer import style

ERROR_STYLE = "border: 2px solid #c62828; background: #fff3f3;"

# The one mapping of verdict roles (geom.conformance.verdict_word, PartVerdict.role) to the
# window's looks: (text and border colour, background, mark). The colours are the PDF's
# (viewer.style.ROLE_COLOUR), so the banner and the report headline look alike; a mate's fit
# uses the same roles (assembles: "ok", interferes: "fail", nothing to judge: "none").
ROLE_LOOK = {
    "ok": (style.ROLE_COLOUR["ok"], "#e8f5e9", "✔"),
    "fail": (style.ROLE_COLOUR["fail"], "#ffebee", "✖"),
    "unproven": (style.ROLE_COLOUR["unproven"], "#fff3e0", "?"),
    "none": (style.ROLE_COLOUR["none"], "#eceff1", "–"),
}
OK_GREEN, BAD_RED, NEUTRAL = ROLE_LOOK["ok"][0], ROLE_LOOK["fail"][0], ROLE_LOOK["none"][0]


def _text_value(text: str):
    """A typed number, or the raw text so that the scene rules reject it with their message."""
    t = text.strip()
    try:
        return float(t)
    except ValueError:
        return t


def _opt(text: str):
    """Optional number field: empty means absent."""
    return None if not text.strip() else _text_value(text)


def _num_text(v) -> str:
    return "" if v is None else repr(float(v)).removesuffix(".0") if float(v).is_integer() else repr(float(v))


def _combo(values, labels=None) -> QComboBox:
    c = QComboBox()
    for i, v in enumerate(values):
        c.addItem(labels[i] if labels else str(v), v)
    return c


def _set_combo(c: QComboBox, value) -> None:
    i = c.findData(value)
    c.setCurrentIndex(max(i, 0))


# ---------------------------------------------------------------- message bar


class MessageBar(QFrame):
    """One line at the bottom of the side panel: the latest message, coloured by level."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.setObjectName("messageBar")
        lay = QHBoxLayout(self)
        lay.setContentsMargins(6, 3, 6, 3)
        self.label = QLabel()
        self.label.setWordWrap(True)
        self.label.setTextFormat(Qt.PlainText)  # a message quotes file names and typed text: never markup
        self.label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        close = QToolButton()
        close.setText("×")
        close.setToolTip("Dismiss the message")
        close.clicked.connect(self.clear)
        lay.addWidget(self.label, 1)
        lay.addWidget(close)
        model.message.connect(self.show_message)
        model.sceneChanged.connect(lambda: self.clear() if self.level == "error" else None)
        self.level = ""
        self.hide()

    def show_message(self, level: str, text: str) -> None:
        self.level = level
        colours = {"error": ("#fdecea", BAD_RED), "info": ("#e8f5e9", OK_GREEN)}
        bg, fg = colours.get(level, ("#eceff1", NEUTRAL))
        self.setStyleSheet(f"#messageBar {{ background: {bg}; border: 1px solid {fg}; }} QLabel {{ color: {fg}; }}")
        self.label.setText(("Error: " if level == "error" else "") + text)
        self.show()

    def clear(self) -> None:
        self.level = ""
        self.label.clear()
        self.hide()

    def text(self) -> str:
        return self.label.text()


# ---------------------------------------------------------------- scene contents


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
        sc = self.model.scene
        self.list.blockSignals(True)
        self.list.clear()
        for i, m in enumerate(sc.mates):
            it = QListWidgetItem(f"mate {i + 1}: {m.hole} ← {m.pin}")
            it.setData(Qt.UserRole, ("mate", i))
            self.list.addItem(it)
        for f in sc.features:
            it = QListWidgetItem(f"{f.kind.value} {f.id}" + (f" – {f.name}" if f.name else ""))
            it.setData(Qt.UserRole, ("feature", f.id))
            self.list.addItem(it)
        for f in sc.features:
            if f.measured is None:
                continue
            src = f"points {Path(f.measured.points).name}" if f.measured.points else "typed values"
            it = QListWidgetItem(f"inspection: {f.id} ({src})")
            it.setData(Qt.UserRole, ("inspection", f.id))
            it.setToolTip(f"The produced {f.kind.value} {f.id} judged from its measured data")
            self.list.addItem(it)
        for fa in sc.fasteners:
            it = QListWidgetItem(f"fastener {fa.id} ({fa.kind})")
            it.setData(Qt.UserRole, ("fastener", fa.id))
            it.setToolTip(f"Position tolerance of the {fa.kind}-fastener pattern {fa.id} (edit it in the scene file)")
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
            self.model.message.emit("error", str(err))

    def _add(self, kind: str) -> None:
        ids = {f.id for f in self.model.scene.features}
        n = 1
        while f"{kind}-{n}" in ids:
            n += 1
        fid = f"{kind}-{n}"
        lim = [10.0, 10.02] if kind == "hole" else [9.96, 9.98]
        ref = next((f for f in self.model.scene.features if f.kind.value == kind), None)
        length = ref.length if ref else 10.0
        if ref:
            lim = list(ref.limits)

        def mutate(d):
            d.setdefault("feature", []).append({"id": fid, "kind": kind, "limits": lim, "length": length})

        self._report(self.model.try_edit(mutate, f"add {kind} {fid}"))
        self.model.set_focus("feature", fid)

    def _add_mate(self) -> None:
        sc = self.model.scene
        hole = next((f.id for f in sc.features if f.kind is Kind.HOLE), None)
        pin = next((f.id for f in sc.features if f.kind is Kind.PIN), None)
        if hole is None or pin is None:
            self.model.message.emit("error", "a mate needs a hole and a pin: add them first")
            return
        self._report(self.model.try_edit(lambda d: d.setdefault("mate", []).append({"hole": hole, "pin": pin}),
                                         "add mate"))
        self.model.set_focus("mate", len(self.model.scene.mates) - 1)

    def _remove(self) -> None:
        kind, key = self.model.focus
        if kind == "inspection":
            i = feature_index(self.model.scene, key)
            self._report(self.model.try_edit(lambda d: d["feature"][i].pop("measured", None),
                                             f"remove the measured data of {key}"))
            return
        if kind == "mate":
            self._report(self.model.try_edit(lambda d: d["mate"].pop(key), f"remove mate {key + 1}"))
            return
        if kind == "fastener":
            self._report(self.model.try_edit(
                lambda d: d.__setitem__("fastener", [x for x in d.get("fastener", []) if x["id"] != key]),
                f"remove fastener {key}"))
            return
        if kind != "feature":
            return

        def mutate(d):
            d["feature"] = [f for f in d.get("feature", []) if f["id"] != key]
            d["mate"] = [m for m in d.get("mate", []) if key not in (m["hole"], m["pin"])]

        self._report(self.model.try_edit(mutate, f"remove {key}"))


# ---------------------------------------------------------------- editor forms


class _Form(QWidget):
    """A form whose fields are committed together through the scene rules. A rejected value
    keeps its text, gets a red border and the rule's message beside it; the scene stays."""

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
        c = _combo(values, labels)
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
        self.error_label.setText(str(err))
        self.error_label.show()
        self.model.message.emit("error", str(err))

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


class SceneForm(_Form):
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
        _set_combo(self.fields["units"], sc.units.value)
        _set_combo(self.fields["standard"], sc.standard.value)
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


class MateForm(_Form):
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
            _set_combo(c, getattr(m, role))
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


class FeatureForm(_Form):
    """Every value of one feature and its geometric tolerance."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(model, parent)
        self.fid: str | None = None
        outer = QVBoxLayout(self)
        outer.setContentsMargins(0, 0, 0, 0)
        self.heading = QLabel()
        self.heading.setWordWrap(True)
        outer.addWidget(self.heading)
        lay = QFormLayout()
        outer.addLayout(lay)
        lay.addRow("Id", self._line("id", "Unique name; mates follow a rename"))
        lay.addRow("Name", self._line("name", "Free text shown on pictures (optional)"))
        lay.addRow("Kind", self._choice("kind", [k.value for k in Kind], ["hole (internal)", "pin (external)"]))
        lim = QHBoxLayout()
        lim.addWidget(self._line("limits[0]", "Smallest size"))
        lim.addWidget(QLabel("to"))
        lim.addWidget(self._line("limits[1]", "Largest size"))
        lay.addRow("Size limits", lim)
        lay.addRow("Length", self._line("length", "Length of engagement along the axis"))
        at = QHBoxLayout()
        at.addWidget(QLabel("x"))
        at.addWidget(self._line("at[0]", "Basic location x on datum A"))
        at.addWidget(QLabel("y"))
        at.addWidget(self._line("at[1]", "Basic location y on datum A"))
        lay.addRow("Basic location", at)
        lay.addRow("Envelope", self._choice("envelope", [None, True, False],
                                             ["the standard's default", "required (E)", "not required"]))
        self.has_tol = QCheckBox("geometric tolerance on the axis")
        self.has_tol.toggled.connect(lambda _on: self.commit("tolerance"))
        self.fields["tolerance"] = self.has_tol
        lay.addRow(self.has_tol)
        self.tol_box = QGroupBox("Tolerance")
        tl = QFormLayout(self.tol_box)
        tl.addRow("Characteristic", self._choice("tolerance.characteristic", [c.value for c in Characteristic]))
        tl.addRow("Zone", self._choice("tolerance.zone", [z.value for z in Zone],
                                       ["diameter (cylinder)", "width (two planes)"]))
        tl.addRow("Value t", self._line("tolerance.value", "Stated tolerance (zone size)"))
        tl.addRow("Material condition", self._choice("tolerance.material", [m.value for m in Material]))
        tl.addRow("Datums", self._line("tolerance.datums", "Datum letters in order, e.g. A, B"))
        tl.addRow("Projected zone", self._line("tolerance.projected", "Projected height beyond A (empty: none)"))
        tl.addRow("Basic angle", self._line("tolerance.angle", "Angle to datum A in degrees (angularity only)"))
        self.frame = QLabel()
        self.frame.setStyleSheet(f"font-family: {mono_css()};")
        tl.addRow("Frame", self.frame)
        outer.addWidget(self.tol_box)
        meas = QGroupBox("Measured part")
        ml = QVBoxLayout(meas)
        self.measured_label = QLabel()
        self.measured_label.setWordWrap(True)
        ml.addWidget(self.measured_label)
        self.load_button = QPushButton("Load measured points…")
        self.load_button.setToolTip("Read a CSV of points measured on this feature (x,y,z[,section], datum frame) "
                                    "and judge the produced part")
        ml.addWidget(self.load_button, 0, Qt.AlignLeft)
        outer.addWidget(meas)
        outer.addWidget(self.error_label)
        revert = QPushButton("Discard typed values")
        revert.setToolTip("Show the values of the scene again, dropping rejected input")
        revert.clicked.connect(self.fill)
        outer.addWidget(revert, 0, Qt.AlignLeft)
        outer.addStretch(1)
        model.sceneChanged.connect(self.fill)
        model.focusChanged.connect(self._focus)
        self._focus()

    def _focus(self) -> None:
        kind, key = self.model.focus
        if kind in ("feature", "inspection"):
            fid = key
        elif kind == "mate":
            fid = self.model.scene.mates[key].hole
        else:  # a fastener: the form keeps the feature it shows
            fid = self.fid
        if fid != self.fid or not self.has_error():
            self.fid = fid
            self.fill()

    def _material_labels(self, st: Standard) -> None:
        """The material-condition choices in the scene's standard's terms (MMC / MMS ...)."""
        c = self.fields["tolerance.material"]
        labels = {Material.MMC.value: f"{term('mmc', st)[0]} (M)", Material.LMC.value: f"{term('lmc', st)[0]} (L)",
                  Material.RFS.value: f"{term('rfs', st)[0]} (no modifier)"}
        for i in range(c.count()):
            text = labels.get(c.itemData(i))
            if text and c.itemText(i) != text:
                c.setItemText(i, text)

    def fill(self) -> None:
        sc = self.model.scene
        if self.fid not in {f.id for f in sc.features}:
            self.fid = sc.features[0].id if sc.features else None
        self._material_labels(sc.standard)
        if self.fid is None:  # a scene of fasteners only: nothing to edit here
            self.setEnabled(False)
            self.heading.setText("No feature in this scene: add a hole or a pin in the scene contents. "
                                 "Fasteners are edited in the scene file.")
            self.mark(None, None)
            return
        self.setEnabled(True)
        f = sc.feature(self.fid)
        r = self.model.result.features[f.id]
        u = sc.units
        self._filling = True
        self.heading.setText(f"<b>{_html_escape(ui_text(feature_heading(r, u)))}</b>")
        F = self.fields
        F["id"].setText(f.id)
        F["name"].setText(f.name)
        _set_combo(F["kind"], f.kind.value)
        F["limits[0]"].setText(_num_text(f.limits[0]))
        F["limits[1]"].setText(_num_text(f.limits[1]))
        F["length"].setText(_num_text(f.length))
        F["at[0]"].setText(_num_text(f.at[0]))
        F["at[1]"].setText(_num_text(f.at[1]))
        _set_combo(F["envelope"], f.envelope)
        t = f.tolerance
        self.has_tol.setChecked(t is not None)
        self.tol_box.setEnabled(t is not None)
        if t is not None:
            _set_combo(F["tolerance.characteristic"], t.characteristic.value)
            _set_combo(F["tolerance.zone"], t.zone.value)
            F["tolerance.value"].setText(_num_text(t.value))
            _set_combo(F["tolerance.material"], t.material.value)
            F["tolerance.datums"].setText(", ".join(t.datums))
            F["tolerance.projected"].setText(_num_text(t.projected))
            F["tolerance.angle"].setText(_num_text(t.angle))
            self.frame.setText(ui_text(t.symbol(u)))
        else:
            self.frame.setText("")
        m = f.measured
        if m is None:
            self.measured_label.setText("No measured data.")
        elif m.points:
            self.measured_label.setText(f"Points file: {m.points}")
        else:
            self.measured_label.setText("Inspection values typed in the scene file.")
        self._filling = False
        self.mark(None, None)

    def collect(self) -> dict:
        """The feature table the widgets describe (as a TOML file would hold it)."""
        F = self.fields
        d: dict = {"id": F["id"].text().strip(), "kind": F["kind"].currentData(),
                   "limits": [_text_value(F["limits[0]"].text()), _text_value(F["limits[1]"].text())],
                   "length": _text_value(F["length"].text()),
                   "at": [_text_value(F["at[0]"].text()), _text_value(F["at[1]"].text())]}
        if F["name"].text().strip():
            d["name"] = F["name"].text().strip()
        if F["envelope"].currentData() is not None:
            d["envelope"] = F["envelope"].currentData()
        if self.has_tol.isChecked():
            t = {"characteristic": F["tolerance.characteristic"].currentData(),
                 "zone": F["tolerance.zone"].currentData(),
                 "value": _text_value(F["tolerance.value"].text()),
                 "material": F["tolerance.material"].currentData(),
                 "datums": [x for x in re.split(r"[\s,|]+", F["tolerance.datums"].text().strip()) if x]}
            for k in ("projected", "angle"):
                v = _opt(F[f"tolerance.{k}"].text())
                if v is not None:
                    t[k] = v
            d["tolerance"] = t
        return d

    def field_for(self, err):
        m = re.match(r'^feature\[\d+\](?: "[^"]*")?\.?(.*)$', err.path)
        if not m:
            return None
        key = m.group(1)
        while key and key not in self.fields:  # e.g. "tolerance.datums[0]" -> "tolerance.datums"
            cut = max(key.rfind("["), key.rfind("."))
            if cut <= 0:
                break
            key = key[:cut]
        return key if key in self.fields else None

    def apply(self):
        if self.fid is None:
            return None
        old = self.model.scene.feature(self.fid)
        i = feature_index(self.model.scene, self.fid)
        new = self.collect()
        new_id = new["id"]
        renames = {old.id: new_id} if new_id and new_id != old.id else {}

        def mutate(d):
            if "measured" in d["feature"][i]:
                new["measured"] = d["feature"][i]["measured"]
            d["feature"][i] = new
            for o, n in renames.items():
                rename_in_mates(d, o, n)

        err = self.model.try_edit(mutate, f"edit {old.id}", renames)
        if err is None and renames:
            self.fid = new_id
            self.model.set_focus("feature", new_id) if self.model.focus[0] == "feature" else None
        self.tol_box.setEnabled(self.has_tol.isChecked())
        return err


# ---------------------------------------------------------------- what-if controls


def length_decimals(units: Units, *values: float) -> int:
    """Decimals that show every one of ``values`` and keep unequal ones apart: those of
    :meth:`geom.model.Units.fmt_cmp` (an inch feature with limits 0.25000 .. 0.25015 needs 5)."""
    shown = units.fmt_cmp(*values) if values else (units.fmt(0.0),)
    return max(len(t.partition(".")[2]) for t in shown)


class LengthSpin(QDoubleSpinBox):
    """A spin box that shows a length with at least ``display`` decimals (those that keep the
    feature's limits apart, :func:`length_decimals`), and more where a value needs them not to be
    hidden (:meth:`geom.model.Units.digits`); finer typed values are kept (the exact value is in
    the tooltip)."""

    def __init__(self, display: int, units: Units | None = None, parent=None):
        super().__init__(parent)
        self.display = display
        self.units = units
        extra = 3  # Units.digits extends a value by up to three decimals
        self.setDecimals(max(6, display + extra, (units.decimals if units else 0) + extra))
        self.valueChanged.connect(lambda v: self.setToolTip(f"{v:.{self.decimals()}f}".rstrip("0").rstrip(".")))

    def textFromValue(self, v: float) -> str:
        k = max(self.display, self.units.digits(v)) if self.units is not None else self.display
        return f"{v:.{k}f}"


class _SliderSpin(QWidget):
    """A slider for sweeping plus a spin box for an exact value, kept in step."""

    valueChanged = pyqtSignal(float)
    STEPS = 1000

    def __init__(self, lo: float, hi: float, decimals: int, suffix: str = "", left="", right="", parent=None,
                 length: bool = False, units: Units | None = None):
        super().__init__(parent)
        self.lo, self.hi = lo, hi
        lay = QGridLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        self.slider = QSlider(Qt.Horizontal)
        self.slider.setRange(0, self.STEPS)
        if length:  # shown at ``decimals``, finer typed values kept; steps of the last shown digit
            self.spin = LengthSpin(decimals, units)
            self.spin.setSingleStep(10.0 ** -decimals)
        else:
            self.spin = QDoubleSpinBox()
            self.spin.setDecimals(decimals)
            self.spin.setSingleStep(10.0 ** -(decimals - 1) if decimals > 1 else 1.0)
        self.spin.setRange(lo, hi)
        self.spin.setSuffix(suffix)
        self.spin.setKeyboardTracking(False)
        self.spin.setMinimumWidth(110)
        lay.addWidget(self.slider, 0, 0, 1, 2)
        lay.addWidget(self.spin, 0, 2)
        lay.setColumnStretch(0, 1)
        lay.setColumnStretch(1, 1)
        if left or right:
            l, r = QLabel(left), QLabel(right)
            for w in (l, r):
                w.setStyleSheet("color: #607d8b; font-size: 9pt;")
            lay.addWidget(l, 1, 0)
            lay.addWidget(r, 1, 1, Qt.AlignRight)
        self.slider.valueChanged.connect(self._from_slider)
        self.spin.valueChanged.connect(self._from_spin)

    def _from_slider(self, pos: int) -> None:
        v = self.lo + (self.hi - self.lo) * pos / self.STEPS
        self.spin.blockSignals(True)
        self.spin.setValue(v)
        self.spin.blockSignals(False)
        self.valueChanged.emit(v)

    def _from_spin(self, v: float) -> None:
        self._place_slider(v)
        self.valueChanged.emit(v)

    def _place_slider(self, v: float) -> None:
        self.slider.blockSignals(True)
        span = self.hi - self.lo
        self.slider.setValue(round((v - self.lo) / span * self.STEPS) if span else 0)
        self.slider.blockSignals(False)

    def set_value(self, v: float) -> None:
        self.spin.blockSignals(True)
        self.spin.setValue(v)
        self.spin.blockSignals(False)
        self._place_slider(v)

    def value(self) -> float:
        return self.spin.value()


class FeatureControls(QGroupBox):
    """Produced size (MMC to LMC), tilt direction and share used, for one feature."""

    def __init__(self, model: SceneModel, fid: str, parent=None):
        f = model.scene.feature(fid)
        super().__init__(f"{f.kind.value} {fid}", parent)
        self.model, self.fid = model, fid
        u = model.scene.units
        st = model.scene.standard
        lay = QFormLayout(self)
        mm, lm = term("mmc", st)[0], term("lmc", st)[0]
        # the slider runs from MMC (left) to LMC (right) whichever way the size grows; the limits
        # are shown with the decimals that keep them apart
        mmc_s, lmc_s = u.fmt_cmp(f.mmc, f.lmc)
        self.size = _SliderSpin(min(f.mmc, f.lmc), max(f.mmc, f.lmc), length_decimals(u, f.mmc, f.lmc),
                                f" {u.value}", f"{mm} {mmc_s}", f"{lm} {lmc_s}", length=True, units=u)
        self.size.slider.setInvertedAppearance(f.mmc > f.lmc)
        self.size.slider.setToolTip(f"Left: {mm} (smallest hole / largest pin), right: {lm}")
        self.direction = _SliderSpin(0.0, 360.0, 1, " deg")
        self.share = _SliderSpin(0.0, 100.0, 1, " %")
        self.size.valueChanged.connect(lambda v: model.set_state(fid, size=v))
        self.direction.valueChanged.connect(lambda v: model.set_state(fid, direction_deg=v))
        self.share.valueChanged.connect(lambda v: model.set_state(fid, share=v / 100.0))
        lay.addRow("Produced size", self.size)
        has_tol = f.tolerance is not None
        lay.addRow("Tilt direction", self.direction)
        lay.addRow("Tolerance used", self.share)
        for w in (self.direction, self.share):
            w.setEnabled(has_tol)
        if f.tolerance is not None and f.tolerance.zone is Zone.WIDTH:
            self.direction.setEnabled(False)
            self.direction.setToolTip("A width zone allows tilt across its planes only")
        self.sync()

    def sync(self) -> None:
        st = self.model.states[self.fid]
        self.size.set_value(st.size)
        self.direction.set_value(st.direction_deg)
        self.share.set_value(st.share * 100.0)


BASIS_TEXT = {
    "unrelated": ("unrelated envelope", "Bonus from the unrelated actual mating envelope: the perfect cylinder "
                                        "that fits, in any orientation"),
    "related": ("related envelope (held to the datum)", "Bonus from the related actual mating envelope: the "
                                                       "perfect cylinder that fits while held normal to A"),
}


class InspectionControls(QGroupBox):
    """For an inspection: where the measured data come from, the bonus basis switch and the
    button that loads another points file. The numbers are in the readout table."""

    def __init__(self, model: SceneModel, fid: str, parent=None):
        super().__init__(f"measured {model.scene.feature(fid).kind.value} {fid}", parent)
        self.model, self.fid = model, fid
        lay = QVBoxLayout(self)
        self.source = QLabel()
        self.source.setWordWrap(True)
        self.source.setTextInteractionFlags(Qt.TextSelectableByMouse)
        lay.addWidget(self.source)
        self.load_button = QPushButton("Load measured points…")
        self.load_button.setToolTip("Read a CSV of points measured on this feature (x,y,z[,section], datum frame)")
        lay.addWidget(self.load_button, 0, Qt.AlignLeft)
        lay.addWidget(QLabel("Bonus taken from the"))
        self.basis = QButtonGroup(self)
        self.basis_buttons: dict[str, QRadioButton] = {}
        for key, (text, tip) in BASIS_TEXT.items():
            b = QRadioButton(text)
            b.setToolTip(tip)
            b.toggled.connect(lambda on, key=key: model.set_bonus_basis(key) if on else None)
            self.basis.addButton(b)
            self.basis_buttons[key] = b
            lay.addWidget(b)
        self.busy = QLabel("computing the envelopes and the median line…")
        self.busy.setStyleSheet("color: #546e7a; font-style: italic;")
        self.busy.setVisible(model.inspecting)
        lay.addWidget(self.busy)
        model.bonusBasisChanged.connect(lambda _b: self.sync())
        model.inspectionBusy.connect(self.busy.setVisible)
        model.inspectionChanged.connect(self.sync)
        model.sceneChanged.connect(self.sync)
        self.sync()

    def sync(self) -> None:
        m = self.model
        b = self.basis_buttons[m.bonus_basis]
        if not b.isChecked():
            b.blockSignals(True)
            b.setChecked(True)
            b.blockSignals(False)
        if self.fid not in {f.id for f in m.scene.features}:
            return
        meas = m.scene.feature(self.fid).measured
        res = m.shown_inspection()
        if res is not None and res.source == "points":
            n = 0 if res.points is None else len(res.points)
            text = f"{n} points in {len(res.sections)} sections from <b>{_html_escape(Path(res.source_file).name)}</b>"
        elif res is not None:
            text = "inspection values typed in the scene file"
        elif meas is None:
            text = "no measured data yet: load a CSV of points"
        else:
            text = "not inspected yet"
        if res is not None:
            text += (f"; U = {m.scene.units.fmt(res.uncertainty)} (k = 2)" if res.uncertainty is not None
                     else "; no uncertainty U given")
        self.source.setText(text)
        self.source.setToolTip(res.source_file if res is not None and res.source_file else "")


class WhatIfPanel(QWidget):
    """What-if controls for the features in focus; the worst case is MMC with all of the
    tolerance used. For an inspection: the measured data and the bonus basis."""

    loadRequested = pyqtSignal()  # "Load measured points…" pressed in the inspection controls

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.lay = QVBoxLayout(self)
        self.lay.setContentsMargins(0, 0, 0, 0)
        head = QHBoxLayout()
        hint = QLabel(self._hint())
        hint.setWordWrap(True)
        hint.setStyleSheet("color: #546e7a;")
        reset = QPushButton("Worst case")
        reset.setToolTip("Every feature at maximum material, all of the allowed tolerance used")
        reset.clicked.connect(model.reset_states)
        head.addWidget(hint, 1)
        head.addWidget(reset)
        self.lay.addLayout(head)
        self.hint = hint
        self.reset = reset
        self.groups: dict[str, FeatureControls] = {}
        self.inspection: InspectionControls | None = None
        self._shown: tuple = ()
        model.focusChanged.connect(self.rebuild)
        model.sceneChanged.connect(lambda: self.rebuild(force=True))
        model.statesChanged.connect(self.sync)
        self.rebuild(force=True)

    def _hint(self) -> str:
        """The what-if hint in the scene's standard's terms."""
        st = self.model.scene.standard
        mm, lm, b = term("mmc", st)[0], term("lmc", st)[0], term("bonus", st)[0]
        return f"Move a size from {mm} toward {lm}: the {b} grows, the {term('vc_MMC', st)[0]} stays put."

    def rebuild(self, force: bool = False) -> None:
        fids = tuple(self.model.focus_features())
        insp = self.model.focus_inspection()
        fast = self.model.focus_fastener()
        key = (fids, self.model.scene.units, self.model.scene.standard, insp, fast)
        if key == self._shown and not force:
            return
        self._shown = key
        old = list(self.groups.values()) + ([self.inspection] if self.inspection is not None else [])
        for g in old:
            self.lay.removeWidget(g)
            g.hide()
            g.setParent(None)
            g.deleteLater()
        self.groups = {}
        self.inspection = None
        if insp:
            hint = ("The measured part is judged as produced: no what-if here. Pick a mate or a "
                    "feature in the list above to try sizes.")
        elif fast:
            hint = (f"Fastener {fast}: its position tolerance follows from the fastener and hole sizes "
                    "(see the readouts); there is no what-if state to move. Pick a mate or a feature "
                    "to try sizes.")
        else:
            hint = self._hint()
        self.hint.setText(hint)
        self.reset.setVisible(insp is None)
        self.reset.setEnabled(bool(fids))
        if insp is not None:
            self.inspection = InspectionControls(self.model, insp)
            self.inspection.load_button.clicked.connect(self.loadRequested)
            self.lay.addWidget(self.inspection)
            return
        for fid in fids:
            g = FeatureControls(self.model, fid)
            self.groups[fid] = g
            self.lay.addWidget(g)

    def sync(self) -> None:
        for g in self.groups.values():
            if g.fid in self.model.states:
                g.sync()

    def commit_typed(self) -> None:
        """A value typed in a spin box without Enter (its keyboard tracking is off) is taken now:
        an export then uses the size the user sees."""
        for g in list(self.groups.values()):
            for w in (g.size, g.direction, g.share):
                if w.spin.hasFocus() or w.spin.lineEdit().isModified():
                    w.spin.interpretText()


# ---------------------------------------------------------------- verdict and readouts


def other_axis_basis(res) -> str | None:
    """The basis ("feature axis" / "median line") of the axis reading that does not govern."""
    for a in (res.median_axis, res.feature_axis):
        if a is not None and a is not res.axis:
            return a.basis
    return None


def axis_readings(res) -> list:
    """(reading, governs) for every axis reading of an inspection: the governing one first."""
    out = [] if res.axis is None else [(res.axis, True)]
    for a in (res.feature_axis, res.median_axis):
        if a is not None and a is not res.axis and all(a is not b for b, _g in out):
            out.append((a, False))
    return out


class VerdictBanner(QFrame):
    """The verdict in colour and in words: for a mate ASSEMBLES / INTERFERES at the sizes set
    and in the worst case; for an inspection geom's one part verdict (``insp.verdict``), word for
    word as the PDF shows it, coloured by its role (:data:`ROLE_LOOK`)."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.state = "none"
        self.role = "none"
        self.setObjectName("verdict")
        lay = QVBoxLayout(self)
        lay.setContentsMargins(10, 6, 10, 6)
        self.headline = QLabel()
        f = QFont()
        f.setPointSize(13)
        f.setBold(True)
        self.headline.setFont(f)
        self.headline.setWordWrap(True)
        self.headline.setTextFormat(Qt.PlainText)  # geom's headline, word for word (it may hold "<" / ">")
        self.detail = QLabel()
        self.detail.setWordWrap(True)
        lay.addWidget(self.headline)
        lay.addWidget(self.detail)
        self.setSizePolicy(QSizePolicy.Preferred, QSizePolicy.Maximum)
        model.statesChanged.connect(self.refresh)
        model.focusChanged.connect(self.refresh)
        model.sceneChanged.connect(self.refresh)
        model.inspectionChanged.connect(self.refresh)
        self.refresh()

    def refresh(self) -> None:
        fid = self.model.focus_inspection()
        if fid is not None:
            self._inspection(fid)
            return
        if self.toolTip():
            self.setToolTip("")
        fast = self.model.focus_fastener()
        if fast is not None:
            self._fastener(fast)
            return
        mi = self.model.focus_mate()
        if mi is None:
            self.state = "none"
            self._paint("none", "NO MATE: fit not evaluated",
                        "This feature is in no mate. Add a mate to judge a fit.", mark=False)
            return
        v = mate_verdict_at(self.model.result, mi, self.model.states)
        m = self.model.scene.mates[mi]
        self.state = "assembles" if v.assembles else "interferes"
        self._paint("ok" if v.assembles else "fail", v.headline,
                    f"Mate {mi + 1} ({m.hole} ← {m.pin}). Worst case: {v.worst_case}.<br>"
                    f"<span style='font-family:monospace'>{_html_escape(v.formula)}</span>")

    def _fastener(self, fid: str) -> None:
        fr = self.model.result.fasteners[fid]
        u, st = self.model.scene.units, self.model.scene.standard
        self.state = "none"
        self._paint("none", f"FASTENER {fid} ({fr.fastener.kind}): position tolerance "
                            f"⌀{u.fmt(fr.position_tolerance.value)} {u.value}",
                    f"<span style='font-family:monospace'>{_html_escape(fr.position_tolerance.formula(u, st))}</span>"
                    "<br>No fit to judge here: the tolerance is what the fastener pattern allows.", mark=False)

    def _inspection(self, fid: str) -> None:
        res = self.model.shown_inspection()
        if res is None:
            self.state = "none"
            self._paint("none", f"INSPECTION of {fid}: no result yet",
                        "Load a CSV of measured points for it (File > Load measured points…).", mark=False)
            return
        u = self.model.scene.units
        v = res.verdict
        rule = ("ISO 14253-1 decision rule, U = " + u.fmt(res.uncertainty) + " (k = 2)"
                if res.uncertainty is not None else "no uncertainty U given: measured values alone")
        lines = [f"Measured {_html_escape(res.feature.kind.value)} {_html_escape(fid)}; {rule}."]
        if v is None:  # geom gave no overall verdict: nothing claims one
            self.state = "none"
            self._paint("none", f"INSPECTION of {fid}: NOT EVALUATED", "<br>".join(lines))
            return
        lines.append("<b>Why:</b> " + _html_escape(v.why))
        if res.axis is not None:
            gov = f"<b>Governing axis reading:</b> {_html_escape(res.axis.basis)}"
            other = other_axis_basis(res)
            if other:
                gov += f" (the {_html_escape(other)} reading is shown and does not govern)"
            lines.append(gov)  # the reason (res.axis_governs) is in the tooltip and the readout table
        lines += ["<b>Note:</b> " + _html_escape(n) for n in v.notes]
        self.state = v.role
        self._paint(v.role, v.headline, "<br>".join(lines))
        tip = res.axis_governs or ""
        if self.toolTip() != tip:
            self.setToolTip(tip)

    def _paint(self, role: str, head: str, detail: str, mark: bool = True) -> None:
        """Colour and mark from :data:`ROLE_LOOK`; ``head`` shown after the mark, word for word."""
        fg, bg, sign = ROLE_LOOK[role]
        self.role = role
        head = f"{sign} {head}" if mark else head
        sheet = f"#verdict {{ background: {bg}; border: 2px solid {fg}; border-radius: 4px; }} QLabel {{ color: {fg}; }}"
        if sheet != self.styleSheet():  # re-styling is costly; a what-if move mostly keeps the colour
            self.setStyleSheet(sheet)
        if head != self.headline.text():
            self.headline.setText(head)
        if detail != self.detail.text():
            self.detail.setText(detail)

    def text(self) -> str:
        return self.headline.text()


class ReadoutTable(QTableWidget):
    """Quantity, value and formula rows: the what-if state first, then the fixed boundaries.
    Every number and formula comes from geom."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(0, 3, parent)
        self.model = model
        self.setHorizontalHeaderLabels(["Quantity", "Value", "Formula"])
        self.verticalHeader().hide()
        self.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.setWordWrap(False)
        h = self.horizontalHeader()
        h.setSectionResizeMode(0, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(1, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(2, QHeaderView.Stretch)
        self.values: dict[tuple[str, str], str] = {}  # (feature id, quantity) -> value shown
        self._queued: list = []  # rows of the refresh under way: (cells, (bold, bg, fg), tip)
        self._looks: list = []  # (bold, bg, fg) of the rows shown
        self._fixed: tuple = (None, {})  # (result, (feature id, units, standard) -> its fixed rows)
        model.statesChanged.connect(self.refresh)
        model.focusChanged.connect(self.refresh)
        model.sceneChanged.connect(self.refresh)
        model.inspectionChanged.connect(self.refresh)
        self.refresh()

    def _add(self, cells, bold=False, bg: str | None = None, tip: str = "", fg: str | None = None) -> None:
        """Queue a row; :meth:`_apply` puts the queued rows on the table."""
        self._queued.append((tuple(cells), (bold, bg, fg), tip))

    def _apply(self) -> None:
        """Show the queued rows. Same number of rows with the same looks as shown: only the
        texts that differ are set (a what-if move changes a few numbers, and re-making every
        item costs more than the rest of the readout); otherwise the rows are made anew."""
        rows, self._queued = self._queued, []
        looks = [look for _cells, look, _tip in rows]
        if looks == self._looks and self.rowCount() == len(rows):
            changed = [(r, c, text, tip) for r, (cells, _look, tip) in enumerate(rows)
                       for c, text in enumerate(cells) if self.item(r, c).text() != text]
            if not changed:
                return
            # the columns sized to their contents would be measured again after every single
            # text (all rows each time): hold them while the texts change, measure once after
            head = self.horizontalHeader()
            modes = [head.sectionResizeMode(i) for i in range(self.columnCount())]
            for i, mode in enumerate(modes):
                if mode == QHeaderView.ResizeToContents:
                    head.setSectionResizeMode(i, QHeaderView.Interactive)
            for r, c, text, tip in changed:
                it = self.item(r, c)
                it.setText(text)
                it.setToolTip(tip or text)
            for i, mode in enumerate(modes):
                if mode == QHeaderView.ResizeToContents:
                    head.setSectionResizeMode(i, mode)
            return
        self.setRowCount(0)
        self.setRowCount(len(rows))
        for r, (cells, (bold, bg, fg), tip) in enumerate(rows):
            for c, text in enumerate(cells):
                it = QTableWidgetItem(text)
                if bold:
                    f = it.font()
                    f.setBold(True)
                    it.setFont(f)
                if bg:
                    it.setBackground(QBrush(QColor(bg)))
                if fg and c < 2:
                    it.setForeground(QBrush(QColor(fg)))
                if c == 1:
                    it.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                it.setToolTip(tip or text)
                self.setItem(r, c, it)
        self._looks = looks

    def _row(self, fid: str, quantity: str, value: str, formula: str = "", **kw) -> None:
        self.values[(fid, quantity)] = value
        self._add((quantity, value, formula), **kw)

    def _check_row(self, fid: str, quantity: str, c, role_text: str, key: str | None = None) -> None:
        """One reading: geom's word (verdict_word), coloured by its role; the detail, the ISO
        14253-1 outcome as geom words it, and whether the reading governs."""
        word, role = verdict_word(c)
        self._row(fid, quantity, word, f"{c.detail}   [{c.outcome_text}; {role_text}]",
                  fg=ROLE_LOOK[role][0], bold=True)
        self.values[(fid, f"{key or c.name} outcome")] = c.outcome_text

    def inspection_rows(self, res) -> None:
        """Every row from geom.inspect's InspectionResult: nothing is computed here."""
        fid = res.feature.id
        u = res.units
        st = res.standard
        fmt = u.fmt
        B = term("bonus", st)[0]
        head = dict(bold=True, bg="#eceff1")
        src = (f"{len(res.points)} points in {len(res.sections)} sections from {res.source_file}"
               if res.source == "points" and res.points is not None else "values typed in the scene file")
        self._add((f"inspection of {res.feature.kind.value} {fid}", "", src), bold=True, bg="#e3f2fd")
        v = res.verdict
        if v is not None:
            look = ROLE_LOOK[v.role]
            self._row(fid, "part verdict", v.word, ui_text(v.headline), bold=True, fg=look[0], bg=look[1])
            self._row(fid, "why", "", ui_text(v.why))
            for i, n in enumerate(v.notes):
                self._row(fid, "note" if len(v.notes) == 1 else f"note {i + 1}", "", ui_text(n), tip=n)
        self._add(("readings", "", "ISO 14253-1 decision rule, U = " + fmt(res.uncertainty) + " (k = 2)"
                   if res.uncertainty is not None else "no uncertainty U given: decided on the measured values alone"),
                  **head)
        governing = v.governing if v is not None else ()
        for c in (res.size_check, res.axis_check, res.surface_check):
            self._check_row(fid, f"{c.name} verdict", c, "governs the part verdict" if c.name in governing
                            else "shown, does not govern the part verdict")
        other = res.other_axis_check
        if other is not None:
            basis = other_axis_basis(res) or "other axis"
            self._check_row(fid, f"{basis} reading (does not govern)", other, "does not govern",
                            key=f"{basis} reading")
        if res.envelope_check is not None:
            for c in (res.local_check, res.envelope_check):
                self._check_row(fid, f"  {c.name}", c, "part of size")
        self._add(("envelopes", "", "perfect cylinders fitted to the measured surface"), **head)
        for e in (res.unrelated, res.related, res.least_material, res.least_material_related):
            if e is None:
                continue
            how = e.constraint if e.constraint == "typed value" else (
                f"axis at A ({fmt(e.point[0])}, {fmt(e.point[1])}), tilt {e.tilt_deg:.5f} deg; {e.constraint}")
            self._row(fid, e.name, ui_text(f"⌀{fmt(e.diameter)}"), how)
        if res.local_sizes is not None:
            lo, hi = u.fmt_cmp(*res.local_sizes)
            llo, lhi = u.fmt_cmp(*res.feature.limits)
            self._row(fid, "local sizes (two-point)", f"{lo} .. {hi}", f"limits {llo} .. {lhi}")
        if res.bonus is not None or res.formulas:
            self._add((f"{B} and tolerance allowed", "", f"{B} basis: the {res.bonus_basis} envelope"), **head)
            self._row(fid, f"{B} basis", res.bonus_basis,
                      "switch it in the side panel (unrelated: any orientation; related: held to the datum)")
            formulas = list(res.formulas)
            # geom lists the bonus formula first (when a bonus was evaluated), then tolerance allowed
            allowed_f = next((x for x in formulas if x.startswith("tolerance allowed")), "")
            bonus_f = formulas[0] if formulas and res.bonus is not None and formulas[0] != allowed_f else ""
            self._row(fid, B, fmt(res.bonus), ui_text(bonus_f))
            self._row(fid, "tolerance allowed", fmt(res.tolerance_allowed), allowed_f)
            for x in formulas:
                if x not in (bonus_f, allowed_f):
                    self._add(("", "", ui_text(x)))
        if res.virtual_condition is not None:
            vc_key = "vc_LMC" if res.feature.tolerance is not None and \
                res.feature.tolerance.material is Material.LMC else "vc_MMC"
            self._row(fid, term(vc_key, st)[1], fmt(res.virtual_condition), "the boundary a functional gauge checks")
        readings = axis_readings(res)
        if readings:
            self._add(("axis readings", "", ui_text(res.axis_governs) if res.axis_governs else ""), **head,
                      tip=res.axis_governs)
            for a, gov in readings:
                what = "governing axis reading" if gov else "does not govern"
                self._row(fid, f"{a.basis} ({what})", fmt(a.deviation), ui_text(a.method))
                if gov:
                    self.values[(fid, "axis reading")] = fmt(a.deviation)
                if a.diameter_reading is not None:
                    self._row(fid, f"  {a.basis}: diameter reading", fmt(a.diameter_reading), "")
                if a.width_reading is not None:
                    self._row(fid, f"  {a.basis}: width reading", fmt(a.width_reading), "")
        ls = res.least_squares
        if ls is not None:
            self._add(("least squares beside the envelope", "", "the usual CMM printout, side by side; not a verdict"),
                      **head)
            s_ls, s_env = u.fmt_cmp(ls.size, res.unrelated_ame) if res.unrelated_ame is not None else (fmt(ls.size), "-")
            self._row(fid, "LS size", ui_text(f"⌀{s_ls}"),
                      ui_text(f"envelope ⌀{s_env}") + f"; LS size {'within' if ls.size_conforms else 'outside'} "
                      "the limits")
            if ls.axis_deviation is not None:
                self._row(fid, "LS axis reading", fmt(ls.axis_deviation),
                          ui_text(ls.formulas[1]) if len(ls.formulas) > 1 else "")
            if ls.tolerance_allowed is not None:
                self._row(fid, "LS tolerance allowed", fmt(ls.tolerance_allowed),
                          " ; ".join(ui_text(x) for x in ls.formulas[2:]))
            if ls.axis_conforms is not None and ls.axis_deviation is not None and ls.tolerance_allowed is not None:
                a, b = u.fmt_cmp(ls.axis_deviation, ls.tolerance_allowed)
                where = "within" if ls.axis_conforms else "beyond"
                self._row(fid, "LS axis against tolerance allowed",
                          f"{where} the tolerance allowed (not a verdict)",
                          f"{a} {'<=' if ls.axis_conforms else '>'} {b}")
        if res.explanation:
            self._add(("explanation", "", ""), **head)
            for i, e in enumerate(res.explanation):
                self.values[(fid, f"explanation {i + 1}")] = e
                self._add(("", "", ui_text(e)), tip=e)
        for n in res.notes:
            self._add(("note", "", ui_text(n)))
        for w in res.warnings:
            self._add(("warning", "", ui_text(w)), fg=BAD_RED)

    def refresh(self) -> None:
        m = self.model
        res, sc = m.result, m.scene
        u, st = sc.units, sc.standard
        self.setUpdatesEnabled(False)
        self._queued = []
        self.values = {}
        fid = m.focus_inspection()
        if fid is not None:
            insp = m.shown_inspection()
            if insp is not None:
                self.inspection_rows(insp)
                self.setWordWrap(True)
                self._apply()
                self.resizeRowsToContents()
            else:
                self._add((f"inspection of {fid}", "", "no result yet: load measured points"), bold=True, bg="#e3f2fd")
                self._apply()
            self.setUpdatesEnabled(True)
            return
        self.setWordWrap(False)
        for fid in m.focus_features():
            r = res.features[fid]
            self._add((f"{r.feature.kind.value} {fid} at the sizes set", "", ""), bold=True, bg="#e3f2fd")
            for row in whatif_rows(res, fid, m.states[fid]):
                self.values[(fid, row.quantity)] = row.value
                self._add((row.quantity, row.value, row.formula), bg="#fff8e1" if row.constant else None,
                          tip="Does not change with the produced size" if row.constant else "")
            self._add((f"{fid}: limits and worst-case boundaries", "", ""), bold=True, bg="#eceff1")
            for q, v, fml in self._fixed_rows(res, fid, u, st):
                self.values[(fid, q)] = v
                self._add((q, ui_text(v), ui_text(fml)))
            for n in r.notes:
                self._add(("note", "", n))
        mi = m.focus_mate()
        if mi is not None:
            mr = res.mates[mi]
            self._add((f"mate {mi + 1}: worst case", "", ""), bold=True, bg="#eceff1")
            from geom.analysis import mate_formula
            self._add(("worst-case clearance", u.fmt(mr.clearance_min, signed=True),
                       mate_formula(mr, u, st)))
            self._add(("clearance from sizes alone", u.fmt(mr.clearance_min_size, signed=True),
                       f"hole {term('mmc', st)[0]} - pin {term('mmc', st)[0]}"))
            self._add(("loosest fit from sizes", u.fmt(mr.clearance_max, signed=True),
                       f"hole {term('lmc', st)[0]} - pin {term('lmc', st)[0]}"))
            for a in mr.assumptions:
                self._add(("assumes", "", a))
        fast = m.focus_fastener()
        for fid, fr in res.fasteners.items():
            if fast is not None and fid != fast:
                continue
            fa = fr.fastener
            self._add((f"fastener {fid} ({fa.kind})", "", ""), bold=True, bg="#eceff1")
            if fast is not None:  # the fastener looked at: its inputs too
                self._row(fid, "fastener F (at its largest size)", u.fmt(fa.fastener), "")
                self._row(fid, "clearance hole H (at its smallest size)", u.fmt(fa.hole), "")
                if fa.projection is not None:
                    self._row(fid, "projection P", u.fmt(fa.projection), "")
                if fa.thread_depth is not None:
                    self._row(fid, "thread depth D", u.fmt(fa.thread_depth), "")
            self.values[(fid, "position tolerance")] = u.fmt(fr.position_tolerance.value)
            self._add(("position tolerance", u.fmt(fr.position_tolerance.value),
                       fr.position_tolerance.formula(u, st)))
            if fr.position_tolerance_unprojected is not None:
                self._add(("without a projected zone", u.fmt(fr.position_tolerance_unprojected.value),
                           fr.position_tolerance_unprojected.formula(u, st)))
        self._apply()
        self.setUpdatesEnabled(True)

    def _fixed_rows(self, res, fid: str, u, st) -> list:
        """geom's rows for the feature's limits and boundaries: they depend on the analysed
        scene only (not on the what-if state), so they are formatted once per result."""
        key = (fid, u, st)
        if self._fixed[0] is not res:
            self._fixed = (res, {})
        rows = self._fixed[1].get(key)
        if rows is None:
            rows = self._fixed[1][key] = list(feature_rows(res.features[fid], u, st))
        return rows

    def value(self, fid: str, quantity: str) -> str:
        return self.values[(fid, quantity)]
