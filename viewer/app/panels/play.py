"""The teaching play control of the what-if panel: Play / Pause, a step count and "turn the
tilt round". A :class:`SweepPlayer` walks the focused mate's hole (or the feature looked at)
from MMC to LMC through the model's what-if path (``SceneModel.set_state`` on a QTimer), so the
3D view, the 2D tabs, the readouts and the banner tick together. It stops at LMC, on Pause, when
the focus or the scene changes, and on any other change of the what-if states (a user edit)."""

from __future__ import annotations

from PyQt5.QtCore import QObject, QTimer, pyqtSignal
from PyQt5.QtWidgets import QCheckBox, QHBoxLayout, QLabel, QPushButton, QSpinBox, QWidget

from viewer.windowlogic.teaching import PLAY_MAX_STEPS, PLAY_STEPS, play_steps, sweep_target

from ..model import SceneModel


class SweepPlayer(QObject):
    """Plays a size sweep into the model's what-if states, one step per timer tick."""

    started = pyqtSignal(str)  # the feature swept
    stepped = pyqtSignal(int)  # the index of the step just set
    stopped = pyqtSignal(str)  # why: "end", "pause", "focus", "scene", "edit"

    INTERVAL_MS = 160  # about six steps a second, as the exported sweep's frame rate

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.timer = QTimer(self)
        self.timer.setInterval(self.INTERVAL_MS)
        self.timer.timeout.connect(self._tick)
        self.fid: str | None = None
        self.steps: tuple = ()
        self.index = -1
        self._setting = False  # the model's statesChanged of our own step
        model.statesChanged.connect(self._states_changed)
        model.focusChanged.connect(lambda: self.stop("focus"))
        model.sceneChanged.connect(lambda: self.stop("scene"))

    @property
    def playing(self) -> bool:
        return self.timer.isActive()

    def can_play(self) -> bool:
        return sweep_target(self.model.scene, self.model.focus) is not None

    def play(self, steps: int = PLAY_STEPS, turns: float = 0.0) -> bool:
        """Start from MMC (the first step is set at once); False when the focus has no size to
        sweep."""
        self.stop("pause")
        plan = play_steps(self.model.scene, self.model.focus, steps, turns)
        if plan is None:
            return False
        self.fid, self.steps = plan
        self.index = -1
        self.timer.start()
        self.started.emit(self.fid)
        self._tick()
        return True

    def stop(self, why: str = "pause") -> None:
        self.timer.stop()
        if self.fid is not None:
            self.fid = None
            self.stopped.emit(why)

    def _tick(self) -> None:
        if self.fid is None:
            return
        self.index += 1
        st = self.steps[self.index].state
        self._setting = True
        try:
            self.model.set_state(self.fid, size=st.size, share=st.share, direction_deg=st.direction_deg)
        finally:
            self._setting = False
        self.stepped.emit(self.index)
        if self.index >= len(self.steps) - 1:
            self.timer.stop()
            self.fid = None
            self.stopped.emit("end")

    def _states_changed(self) -> None:
        if not self._setting and self.fid is not None:
            self.stop("edit")


class PlayBar(QWidget):
    """Play / Pause, the number of steps and "turn the tilt round" for the focus."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.player = SweepPlayer(model, self)
        lay = QHBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        self.button = QPushButton("Play")
        self.button.setToolTip("Sweep the size from MMC to LMC through the what-if controls; the numbers tick")
        self.steps = QSpinBox()
        self.steps.setRange(2, PLAY_MAX_STEPS)
        self.steps.setValue(PLAY_STEPS)
        self.steps.setSuffix(" steps")
        self.steps.setToolTip("How many sizes the sweep shows, MMC and LMC included")
        self.turn = QCheckBox("turn the tilt round")
        self.turn.setToolTip("Turn the tilt direction one full turn over the sweep")
        self.what = QLabel()
        self.what.setStyleSheet("color: #607d8b; font-size: 9pt;")
        self.what.setWordWrap(True)  # a narrow side panel wraps it rather than widening
        lay.addWidget(self.button)
        lay.addWidget(self.steps)
        lay.addWidget(self.turn)
        lay.addWidget(self.what, 1)
        self.button.clicked.connect(self.toggle)
        self.player.started.connect(lambda _f: self._show())
        self.player.stopped.connect(lambda _w: self._show())
        model.focusChanged.connect(self._show)
        model.sceneChanged.connect(self._show)
        self._show()

    def toggle(self) -> None:
        if self.player.playing:
            self.player.stop("pause")
        else:
            self.player.play(self.steps.value(), 1.0 if self.turn.isChecked() else 0.0)

    def _show(self) -> None:
        target = sweep_target(self.model.scene, self.model.focus)
        playing = self.player.playing
        self.button.setText("Pause" if playing else "Play")
        self.button.setEnabled(playing or target is not None)
        self.steps.setEnabled(not playing)
        self.turn.setEnabled(not playing)
        self.what.setText(f"sweeps {target[1]}" if target is not None else "no size to sweep here")
