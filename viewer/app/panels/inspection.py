"""The inspection controls, shown in place of the what-if controls when an inspection is in
focus: where the measured data come from, the bonus-basis switch (unrelated or related
envelope) and the button that loads another points file. The numbers are in the readout table."""

from __future__ import annotations

from html import escape as _html_escape

from PyQt5.QtCore import Qt
from PyQt5.QtWidgets import QButtonGroup, QGroupBox, QLabel, QPushButton, QRadioButton, QVBoxLayout

from viewer.windowlogic.inspection import BASIS_TEXT, source_text

from ..model import SceneModel


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
        text = source_text(res, meas, m.scene.units, _html_escape)
        self.source.setText(text)
        self.source.setToolTip(res.source_file if res is not None and res.source_file else "")
