"""The feature editor: every value of one feature and its geometric tolerance, the feature
control frame as drawn, and where its measured data come from. The fields' texts and the
feature table they describe come from :mod:`viewer.windowlogic.fields`."""

from __future__ import annotations

from html import escape as _html_escape

from PyQt5.QtCore import Qt
from PyQt5.QtWidgets import (
    QCheckBox,
    QComboBox,
    QFormLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPushButton,
    QVBoxLayout,
)

from geom.analysis import term
from geom.model import Characteristic, Kind, Material, Standard, Zone
from geom.readout import feature_heading
from viewer.windowlogic.editing import feature_index, rename_in_mates
from viewer.windowlogic.fields import feature_choices, feature_field, feature_table, feature_texts
from viewer.windowlogic.focus import edited_feature

from ..glyphs import mono_css, ui_text
from ..model import SceneModel
from .common import set_combo
from .forms import Form


class FeatureForm(Form):
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
        fid = edited_feature(self.model.scene, self.model.focus, self.fid)  # a fastener: the form keeps its feature
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
        for key, text in feature_texts(f).items():  # the tolerance's fields only when it has one
            F[key].setText(text)
        for key, value in feature_choices(f).items():
            set_combo(F[key], value)
        t = f.tolerance
        self.has_tol.setChecked(t is not None)
        self.tol_box.setEnabled(t is not None)
        if t is not None:
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
        text = {k: w.text() for k, w in self.fields.items() if isinstance(w, QLineEdit)}
        choice = {k: w.currentData() for k, w in self.fields.items() if isinstance(w, QComboBox)}
        return feature_table(text, choice, self.has_tol.isChecked())

    def field_for(self, err):
        return feature_field(err.path, self.fields)

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
