"""The teaching play control of the what-if panel: Play / Pause, a step count and "turn the
tilt round". A :class:`SweepPlayer` walks the focused mate's hole (or the feature looked at)
from MMC to LMC through the model's what-if path (``SceneModel.set_state`` on a QTimer), so the
3D view, the 2D tabs, the readouts and the banner tick together. It stops at LMC, on Pause, when
the focus or the scene changes, and on any other change of the what-if states (a user edit).

Beside it the three-step lesson (:class:`Lesson`): each press of "Lesson" sets the next step
(:func:`viewer.windowlogic.teaching.lesson_steps`: the hole at MMC, at LMC, then both with the
note that the opening stays at the VC) through the same what-if path."""

from __future__ import annotations

from PyQt5.QtCore import QObject, QTimer, pyqtSignal
from PyQt5.QtWidgets import QCheckBox, QGridLayout, QLabel, QPushButton, QSpinBox, QWidget

from viewer.windowlogic.teaching import (
    PLAY_MAX_STEPS,
    PLAY_STEPS,
    lesson_steps,
    lesson_target,
    play_steps,
    sweep_target,
)

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


class Lesson(QObject):
    """The three-step lesson, one step per :meth:`advance`, through the model's what-if states.
    It ends (``step`` back to -1) when the focus or the scene changes or the states are moved
    by anything else."""

    changed = pyqtSignal()  # a step was set, or the lesson ended

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.fid: str | None = None
        self.steps: tuple = ()
        self.step = -1
        self._setting = False
        model.statesChanged.connect(self._states_changed)
        model.focusChanged.connect(self.end)
        model.sceneChanged.connect(self.end)

    def available(self) -> bool:
        return lesson_target(self.model.scene, self.model.focus) is not None

    @property
    def note(self) -> str:
        return self.steps[self.step].note if self.step >= 0 else ""

    def advance(self) -> bool:
        """The next step (the first after the last); False when the focus has no lesson."""
        if self.step < 0 or self.step >= len(self.steps) - 1:
            plan = lesson_steps(self.model.scene, self.model.focus)
            if plan is None:
                self.end()
                return False
            self.fid, self.steps = plan
            self.step = -1
        self.step += 1
        st = self.steps[self.step].state
        self._setting = True
        try:
            self.model.set_state(self.fid, size=st.size, share=st.share, direction_deg=st.direction_deg)
        finally:
            self._setting = False
        self.changed.emit()
        return True

    def end(self) -> None:
        if self.step >= 0:
            self.step, self.fid, self.steps = -1, None, ()
            self.changed.emit()

    def _states_changed(self) -> None:
        if not self._setting:
            self.end()


class PlayBar(QWidget):
    """Play / Pause, the number of steps and "turn the tilt round" for the focus; under them the
    Lesson button and its note."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.player = SweepPlayer(model, self)
        self.lesson = Lesson(model, self)
        lay = QGridLayout(self)
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
        self.lesson_button = QPushButton("Lesson")
        self.lesson_button.setToolTip("Three steps: the hole at MMC, at LMC, then both: the opening stays at the VC")
        self.note = QLabel()
        self.note.setWordWrap(True)
        self.note.setStyleSheet("color: #37474f;")
        # narrow enough for the side panel: three buttons a row, the rest on rows of their own
        lay.addWidget(self.button, 0, 0)
        lay.addWidget(self.steps, 0, 1)
        lay.addWidget(self.lesson_button, 0, 2)
        lay.addWidget(self.turn, 1, 0, 1, 3)
        lay.addWidget(self.what, 2, 0, 1, 3)
        lay.addWidget(self.note, 3, 0, 1, 3)
        lay.setColumnStretch(2, 1)
        self.button.clicked.connect(self.toggle)
        self.lesson_button.clicked.connect(self.next_lesson_step)
        self.lesson.changed.connect(self._show)
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

    def next_lesson_step(self) -> None:
        """The Lesson button: the play control stops, the lesson's next step is set."""
        self.player.stop("pause")
        self.lesson.advance()

    def _show(self) -> None:
        lesson = self.lesson
        n = len(lesson.steps)
        self.lesson_button.setEnabled(lesson.step >= 0 or lesson.available())
        self.lesson_button.setText("Lesson" if lesson.step < 0 or lesson.step >= n - 1
                                   else f"Lesson: step {lesson.step + 2}/{n}")
        self.note.setText(lesson.note)
        self.note.setVisible(bool(lesson.note))
        target = sweep_target(self.model.scene, self.model.focus)
        playing = self.player.playing
        self.button.setText("Pause" if playing else "Play")
        self.button.setEnabled(playing or target is not None)
        self.steps.setEnabled(not playing)
        self.turn.setEnabled(not playing)
        self.what.setText(f"sweeps {target[1]}" if target is not None else "no size to sweep here")
