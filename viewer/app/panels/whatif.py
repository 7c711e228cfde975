"""The what-if controls: for each feature in focus a slider and spin box for the produced size
(MMC to LMC), the tilt direction and the share of the tolerance used; for an inspection the
inspection controls (:mod:`.inspection`) instead. Moves go to the model's what-if states."""

from __future__ import annotations

from PyQt5.QtCore import Qt, pyqtSignal
from PyQt5.QtWidgets import (
    QDoubleSpinBox,
    QFormLayout,
    QGridLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QSlider,
    QVBoxLayout,
    QWidget,
)

from geom.analysis import term
from geom.model import Units, Zone
from viewer.windowlogic.fields import length_decimals
from viewer.windowlogic.whatif import SLIDER_POSITIONS, size_slider_plan, slider_size

from ..model import SceneModel
from .inspection import InspectionControls
from .play import PlayBar


class LengthSpin(QDoubleSpinBox):
    """A spin box that shows a length with at least ``display`` decimals (those that keep the
    feature's limits apart, :func:`length_decimals`), and more where a value needs them not to be
    hidden (:meth:`geom.model.Units.digits`); finer typed values are kept. Its tooltip is its
    text."""

    def __init__(self, display: int, units: Units | None = None, parent=None):
        super().__init__(parent)
        self.display = display
        self.units = units
        extra = 3  # Units.digits extends a value by up to three decimals
        self.setDecimals(max(6, display + extra, (units.decimals if units else 0) + extra))
        self.valueChanged.connect(lambda _v: self.setToolTip(self.text()))

    def textFromValue(self, v: float) -> str:
        k = max(self.display, self.units.digits(v)) if self.units is not None else self.display
        return f"{v:.{k}f}"


class _SliderSpin(QWidget):
    """A slider for sweeping plus a spin box for an exact value, kept in step."""

    valueChanged = pyqtSignal(float)
    STEPS = SLIDER_POSITIONS  # slider positions (a length slider: an instance value, see below)

    def __init__(self, lo: float, hi: float, decimals: int, suffix: str = "", left="", right="", parent=None,
                 length: bool = False, units: Units | None = None):
        super().__init__(parent)
        self.lo, self.hi = lo, hi
        lay = QGridLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        self.slider = QSlider(Qt.Horizontal)
        # a length slider steps one display digit of the units (10 ** -Units.decimals) per key
        # press, ten per page; the others a thousandth of their range
        self.step = 10.0 ** -units.decimals if length and units is not None else (hi - lo) / self.STEPS
        self.STEPS, self.per = size_slider_plan(lo, hi, self.step) if self.step > 0 else (self.STEPS, 1)
        self.slider.setRange(0, self.STEPS)
        self.slider.setSingleStep(self.per)
        self.slider.setPageStep(10 * self.per)
        self.length = length
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
        self.spin.setMinimumWidth(max(110, self.spin.sizeHint().width()))  # the value and its unit never clip
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
        v = slider_size(self.lo, self.hi, self.step, self.per, pos, self.STEPS) if self.step > 0 else self.lo
        self.spin.blockSignals(True)
        self.spin.setValue(v)
        self.spin.blockSignals(False)
        self._tips()
        self.valueChanged.emit(v)

    def _from_spin(self, v: float) -> None:
        self._place_slider(v)
        self.valueChanged.emit(v)

    def _place_slider(self, v: float) -> None:
        self.slider.blockSignals(True)
        self.slider.setValue(min(round((v - self.lo) / self.step * self.per), self.STEPS) if self.step > 0 else 0)
        self.slider.blockSignals(False)
        self._tips()

    def _tips(self) -> None:
        """A length's tooltips (slider and spin box) are the spin box's text (Units.fmt's digits)."""
        if self.length:
            text = self.spin.text()
            self.slider.setToolTip(text)
            self.spin.setToolTip(text)

    def set_value(self, v: float) -> None:
        self.spin.blockSignals(True)
        self.spin.setValue(v)
        self.spin.blockSignals(False)
        self._place_slider(v)

    def value(self) -> float:
        return self.spin.value()


class FeatureControls(QGroupBox):
    """Produced size (MMC to LMC), tilt direction and share used, for one feature."""

    def __init__(self, model: SceneModel, fid: str, parent=None, datum: str | None = None):
        f = model.scene.feature(fid)
        # a pattern's datum feature: only its size moves the pattern (its shift); tilt and share do not
        super().__init__(f"datum {datum}: {f.kind.value} {fid}" if datum else f"{f.kind.value} {fid}", parent)
        self.model, self.fid = model, fid
        u = model.scene.units
        st = model.scene.standard
        lay = QFormLayout(self)
        lay.setRowWrapPolicy(QFormLayout.WrapLongRows)  # a narrow panel puts a row's name above it
        mm, lm = term("mmc", st)[0], term("lmc", st)[0]
        # the slider runs from MMC (left) to LMC (right) whichever way the size grows; the limits
        # are shown with the decimals that keep them apart
        mmc_s, lmc_s = u.fmt_cmp(f.mmc, f.lmc)
        self.size = _SliderSpin(min(f.mmc, f.lmc), max(f.mmc, f.lmc), length_decimals(u, f.mmc, f.lmc),
                                f" {u.value}", f"{mm} {mmc_s}", f"{lm} {lmc_s}", length=True, units=u)
        self.size.slider.setInvertedAppearance(f.mmc > f.lmc)
        self.size.setToolTip(f"Left: {mm} (smallest hole / largest pin), right: {lm}")
        self.direction = _SliderSpin(0.0, 360.0, 1, " deg")
        self.share = _SliderSpin(0.0, 100.0, 1, " %")
        self.size.valueChanged.connect(lambda v: model.set_state(fid, size=v))
        self.direction.valueChanged.connect(lambda v: model.set_state(fid, direction_deg=v))
        self.share.valueChanged.connect(lambda v: model.set_state(fid, share=v / 100.0))
        lay.addRow("Produced size", self.size)
        has_tol = f.tolerance is not None
        if datum is None:
            lay.addRow("Tilt direction", self.direction)
            lay.addRow("Tolerance used", self.share)
        else:
            self.direction.hide()
            self.share.hide()
            self.size.setToolTip("The datum feature's produced size: its departure from the MMB is the shift "
                                 "the pattern may take, as one body")
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
        self.play = PlayBar(model)
        self.lay.addWidget(self.play)
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
        pat = self.model.focus_pattern()
        key = (fids, self.model.scene.units, self.model.scene.standard, insp, fast, pat)
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
        elif pat:
            hint = (f"Pattern {pat}: move the datum feature's produced size: its departure from the MMB "
                    "is the shift the pattern may take, as one body; each member keeps its own zone.")
        elif fast:
            hint = (f"Fastener {fast}: its position tolerance follows from the fastener and hole sizes "
                    "(see the readouts); there is no what-if state to move. Pick a mate or a feature "
                    "to try sizes.")
        else:
            hint = self._hint()
        self.hint.setText(hint)
        self.reset.setVisible(insp is None)
        self.play.setVisible(insp is None and fast is None and pat is None)
        self.reset.setEnabled(bool(fids))
        if insp is not None:
            self.inspection = InspectionControls(self.model, insp)
            self.inspection.load_button.clicked.connect(self.loadRequested)
            self.lay.addWidget(self.inspection)
            return
        datum_of = {}
        if pat:
            from viewer.windowlogic.whatif import pattern_datum_features

            datum_of = {fid: ltr for ltr, fid in pattern_datum_features(self.model.scene, pat)}
        for fid in fids:
            g = FeatureControls(self.model, fid, datum=datum_of.get(fid))
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
