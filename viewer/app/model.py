"""The window's one model: the current valid scene, its analysis, the what-if states, the
focus (which mate or feature is looked at), the file path and the dirty flag.

Widgets never talk to each other: they call the model's methods and observe its Qt signals,
which are the only change notification. Every edit goes through :func:`geom.scenefile.parse`
(the scene is turned into the same dict a TOML file decodes to, changed, and parsed), so the
window accepts and rejects exactly what the command line does, with the same message.

The logic behind it needs no Qt and lives in :mod:`viewer.windowlogic` (focus, what-if states,
the scene as a dict, points files); the names this module had before are importable from it
still. The inspection runs in :class:`viewer.app.workers.InspectionWorker`'s thread.
"""

from __future__ import annotations

import copy
from dataclasses import replace
from pathlib import Path

from PyQt5.QtCore import QObject, QThread, pyqtSignal
from PyQt5.QtWidgets import QUndoCommand, QUndoStack

from geom import boundaries as B
from geom.analysis import SceneResult, analyse_scene
from geom.model import Feature, Scene
from geom.scenefile import SceneError, load, save
from viewer.windowlogic import focus
from viewer.windowlogic.editing import (
    feature_index,
    new_scene,
    parse_dict,
    rename_in_mates,
    scene_dict,
    scene_label,
)
from viewer.windowlogic.messages import edit_message
from viewer.windowlogic.points import (
    has_measured,
    inspection_errors,
    outside_warning,
    points_entry,
    points_outside,
    points_source,
    rebase_points,
    report_points,
    scene_folder,
)
from viewer.windowlogic.whatif import Row, Verdict, mate_verdict_at, moved_state, settled_states, whatif_rows

from .workers import InspectionWorker

# names importable from here before the logic moved to viewer.windowlogic (and the worker to .workers)
__all__ = [
    "SceneModel", "InspectionWorker", "Row", "Verdict", "feature_index", "has_measured", "inspection_errors",
    "mate_verdict_at", "new_scene", "parse_dict", "points_entry", "points_outside", "points_source",
    "rename_in_mates", "scene_dict", "scene_folder", "scene_label", "whatif_rows",
]


class _Edit(QUndoCommand):
    def __init__(self, model: "SceneModel", before: Scene, after: Scene, text: str,
                 renames: dict[str, str] | None = None):
        super().__init__(text)
        self.model, self.before, self.after = model, before, after
        self.renames = renames or {}

    def redo(self):
        self.model._install(self.after, self.renames)

    def undo(self):
        self.model._install(self.before, {v: k for k, v in self.renames.items()})


class SceneModel(QObject):
    """The current valid scene and everything the window shows about it."""

    sceneChanged = pyqtSignal()  # scene / analysis replaced (edit, undo, open, new)
    statesChanged = pyqtSignal()  # a what-if state moved
    focusChanged = pyqtSignal()  # another mate or feature is looked at
    pathChanged = pyqtSignal(str)
    dirtyChanged = pyqtSignal(bool)
    message = pyqtSignal(str, str)  # level ("info" | "error"), text
    inspectionChanged = pyqtSignal()  # a new inspection result is shown (or none)
    inspectionBusy = pyqtSignal(bool)  # an inspection is being computed
    inspectionFinished = pyqtSignal(bool)  # a requested inspection ended: True shown, False refused
    bonusBasisChanged = pyqtSignal(str)
    _request = pyqtSignal(int, object, str, object, str)  # to the worker thread

    def __init__(self, scene: Scene | None = None, path: str | None = None, parent=None):
        super().__init__(parent)
        self.undo_stack = QUndoStack(self)
        self.undo_stack.cleanChanged.connect(self._clean_changed)
        self.scene: Scene = scene or new_scene()
        self.result: SceneResult = analyse_scene(self.scene)
        self.path: str | None = path
        self.states: dict[str, B.FeatureState] = {}
        self.focus: tuple[str, object] = ("none", None)
        self._reset_states()
        self._default_focus()
        # inspection: the last valid result shown, the key it was computed for, the request out
        self.bonus_basis = "unrelated"
        self.inspection = None  # geom.inspect.InspectionResult of the feature last inspected
        self.inspection_key: tuple | None = None
        self.inspection_seconds = 0.0
        self._token = 0
        self._recording = False
        self._pending: dict | None = None  # the request in flight
        # points files the user picked in this window (resolved): one outside the scene's folder
        # is handed to geom explicitly, as `matezone inspect --points` does
        self._picked: set[str] = set()
        self._ithread: QThread | None = None
        self._iworker: InspectionWorker | None = None

    def _clean_changed(self, clean: bool) -> None:
        self.dirtyChanged.emit(not clean)

    # ------------------------------------------------------------ reading

    @property
    def dirty(self) -> bool:
        return not self.undo_stack.isClean()

    @property
    def label(self) -> str:
        return scene_label(self.path)

    def focus_features(self) -> list[str]:
        """Ids of the features whose what-if controls belong to the current focus (none for a
        fastener: a fastener pattern has no what-if state)."""
        return focus.focus_features(self.scene, self.focus)

    def focus_fastener(self) -> str | None:
        """The fastener looked at, or None."""
        return focus.keyed(self.focus, "fastener")

    def focus_pattern(self) -> str | None:
        """The pattern looked at, or None."""
        return focus.keyed(self.focus, "pattern")

    def focus_inspection(self) -> str | None:
        """The feature whose inspection is looked at, or None."""
        return focus.keyed(self.focus, "inspection")

    def shown_inspection(self):
        """The inspection result of the focused feature (the last valid one), or None."""
        fid = self.focus_inspection()
        if fid is not None and self.inspection is not None and self.inspection.feature.id == fid:
            return self.inspection
        return None

    def focus_mate(self) -> int | None:
        """Index of the mate looked at, or of the first mate the focused feature is in."""
        return focus.focus_mate(self.scene, self.focus)

    # ------------------------------------------------------------ focus and what-if

    def set_focus(self, kind: str, key) -> None:
        if not focus.focus_valid(self.scene, (kind, key)):
            return
        if (kind, key) != self.focus:
            self.focus = (kind, key)
            self.focusChanged.emit()
        if kind == "inspection":
            self.request_inspection()

    def set_state(self, fid: str, size: float | None = None, share: float | None = None,
                  direction_deg: float | None = None) -> None:
        """Move one feature's what-if state (size clamped to its limits, share to 0..1)."""
        old = self.states[fid]
        new = moved_state(self.scene.feature(fid), old, size, share, direction_deg)
        if new != old:
            self.states[fid] = new
            self.statesChanged.emit()

    def reset_states(self) -> None:
        """Every feature back to the worst case: MMC, all of the tolerance used."""
        self._reset_states(keep=False, measured=False)
        self.statesChanged.emit()

    def _reset_states(self, keep: bool = True, measured: bool = True) -> None:
        """A state for every feature: the one it had while its size is within the limits, else
        the worst case (:func:`viewer.windowlogic.whatif.settled_states`; a measured pattern's
        datum feature at its measured size unless ``measured`` is False)."""
        self.states = settled_states(self.scene, self.states if keep else {}, measured)

    def _default_focus(self) -> None:
        self.focus = focus.default_focus(self.scene)

    # ------------------------------------------------------------ edits

    def try_edit(self, mutate, text: str = "edit", renames: dict[str, str] | None = None) -> SceneError | None:
        """Apply ``mutate(data)`` to the scene's dict and parse it. Valid: pushed on the undo
        stack and shown; invalid: nothing changes and the SceneError is returned."""
        data = copy.deepcopy(scene_dict(self.scene))
        mutate(data)
        try:
            new = parse_dict(data, self.path)
        except SceneError as e:
            return e
        if new == self.scene:
            return None
        self.undo_stack.push(_Edit(self, self.scene, new, text, renames))
        return None

    def _install(self, scene: Scene, renames: dict[str, str] | None = None,
                 result: SceneResult | None = None) -> None:
        # analysed first: should geom fail on the scene, nothing here has changed yet
        result = analyse_scene(scene) if result is None else result
        for old, new in (renames or {}).items():
            if old in self.states:
                self.states[new] = self.states.pop(old)
            if self.focus in (("feature", old), ("inspection", old)):
                self.focus = (self.focus[0], new)
        self.scene = scene
        self.result = result
        self._reset_states()
        if not focus.focus_valid(self.scene, self.focus):
            self._default_focus()
        self.sceneChanged.emit()
        self.statesChanged.emit()
        self.focusChanged.emit()
        if self.focus_inspection() is not None:
            self.request_inspection()  # the feature or its measured data may have changed

    # ------------------------------------------------------------ files

    def replace_scene(self, scene: Scene, path: str | None) -> None:
        """Open / New: a fresh history, clean. The scene is analysed before anything changes, so
        a scene geom cannot analyse leaves the current one (and its history) as it was."""
        result = analyse_scene(scene)
        self._token += 1  # answers to requests about the old scene are dropped
        self._pending = None
        self.inspection, self.inspection_key = None, None
        self._picked = set()
        self.undo_stack.clear()
        self.path = path
        self.states = {}
        self.scene = scene
        self._default_focus()
        self._install(scene, result=result)
        self.undo_stack.setClean()
        self.pathChanged.emit(path or "")
        self.dirtyChanged.emit(False)

    def open(self, path: str) -> None:
        """Load a scene file (raises SceneError with the CLI's message)."""
        self.replace_scene(load(path), str(path))

    def new(self) -> None:
        self.replace_scene(new_scene(), None)

    def save(self, path: str | None = None) -> None:
        """Atomic save; the scene written is the one shown."""
        target = path or self.path
        if not target:
            raise ValueError("no file name given")
        moved = target != self.path
        scene = rebase_points(self.scene, target) if moved else self.scene
        save(scene, target)
        if moved:
            self.path = str(target)
            self.scene = replace(scene, source=str(Path(target).resolve()))
            self.pathChanged.emit(self.path)
        self.undo_stack.setClean()
        self.dirtyChanged.emit(False)
        self.message.emit("info", f"saved {self.path}")
        for f in self.scene.features:
            if points_outside(self.scene, f.id):
                self.message.emit("info", outside_warning(self.scene, f.id))

    def report_points(self) -> tuple[dict[str, str], list[str]]:
        """The points files an exported report reads, as this window reads them: (feature id ->
        absolute path of its ``[feature.measured] points`` file, messages for the files geom would
        refuse to read from the scene, those outside its folder that were not picked here)."""
        return report_points(self.scene, self._picked)

    # ------------------------------------------------------------ inspection

    def set_bonus_basis(self, basis: str) -> None:
        """Take the bonus from the unrelated or the related envelope (geom.inspect.BONUS_BASES)."""
        from geom.inspect import BONUS_BASES

        if basis not in BONUS_BASES or basis == self.bonus_basis:
            return
        self.bonus_basis = basis
        self.bonusBasisChanged.emit(basis)
        if self.focus_inspection() is not None:
            self.request_inspection()

    def _key(self, fid: str, points: str | None) -> tuple:
        f = self.scene.feature(fid)
        path, mtime = points_source(self.scene, fid, points)
        m = f.measured
        typed = None if path is not None or m is None else m
        return (fid, self.scene.units, self.scene.standard, replace(f, measured=None, name=""),
                None if m is None else m.uncertainty, typed, path, mtime, self.bonus_basis)

    def request_inspection(self) -> None:
        """Inspect the focused feature from its [feature.measured] data, unless the result shown
        is already for the same feature, data and bonus basis."""
        fid = self.focus_inspection()
        if fid is None or self._recording:
            return
        if not has_measured(self.scene, fid):
            self._token += 1
            self._pending = None
            if self.inspection is not None and self.inspection.feature.id == fid:
                self.inspection, self.inspection_key = None, None
                self.inspectionChanged.emit()
            self.message.emit("info", f"{fid} has no measured data yet: use File > Load measured points… "
                                      "to read a CSV of points for it")
            return
        path, _ = points_source(self.scene, fid)
        if path is not None and path in self._picked and points_outside(self.scene, fid):
            self._submit(fid, path, record=False)
            return
        self._submit(fid, None, record=False)

    def load_points(self, fid: str, path: str) -> None:
        """Inspect ``fid`` from the CSV ``path``. When it can be used, the path is recorded in the
        feature's [feature.measured] points (an undoable edit) and the inspection is shown; when
        not, the message says why and nothing changes."""
        if fid not in {f.id for f in self.scene.features}:
            self.message.emit("error", f"no feature {fid!r} to load points for")
            return
        self._picked.add(str(Path(path).resolve()))
        self._submit(fid, str(path), record=True)

    def _submit(self, fid: str, points: str | None, record: bool) -> None:
        key = self._key(fid, points)
        if not record and self.inspection is not None and key == self.inspection_key:
            return
        if self._pending is not None and self._pending["key"] == key and self._pending["record"] == record:
            return
        self._token += 1
        self._pending = dict(token=self._token, fid=fid, points=points, record=record, key=key)
        self._start_worker()
        self.inspectionBusy.emit(True)
        self._request.emit(self._token, self.scene, fid, points, self.bonus_basis)

    def _start_worker(self) -> None:
        if self._ithread is not None:
            return
        self._ithread = QThread(self)
        self._iworker = InspectionWorker()
        self._iworker.moveToThread(self._ithread)
        self._request.connect(self._iworker.run)
        self._iworker.done.connect(self._inspected)
        self._iworker.failed.connect(self._inspect_failed)
        self._ithread.start()

    def stop_worker(self) -> None:
        """End the inspection thread (the window calls this when it closes)."""
        if self._ithread is not None:
            self._ithread.quit()
            self._ithread.wait()
            self._ithread = None
            self._iworker = None

    def _inspected(self, token: int, res, seconds: float) -> None:
        req = self._pending
        if req is None or token != req["token"]:
            return  # an answer nobody waits for any more
        self._pending = None
        self.inspection_seconds = seconds
        if req["record"]:
            fid, entry = req["fid"], points_entry(req["points"], self.path)

            def mutate(d):
                i = feature_index(self.scene, fid)
                d["feature"][i].setdefault("measured", {})["points"] = entry

            self._recording = True  # the edit's sceneChanged must not start another inspection
            try:
                err = self.try_edit(mutate, f"load measured points for {fid}")
            finally:
                self._recording = False
            if err is not None:
                self.inspectionBusy.emit(False)
                self.message.emit("error", edit_message(err))
                self.inspectionFinished.emit(False)
                return
            req["key"] = self._key(fid, None)
        self.inspection, self.inspection_key = res, req["key"]
        self.inspectionBusy.emit(False)
        for w in res.warnings:
            self.message.emit("info", f"warning: {w}")
        if req["record"]:
            n = 0 if res.points is None else len(res.points)
            self.message.emit("info", f"{n} measured points of {req['fid']} read from {req['points']}")
            if points_outside(self.scene, req["fid"]):
                self.message.emit("info", outside_warning(self.scene, req["fid"]))
        if self.focus != ("inspection", req["fid"]):
            self.focus = ("inspection", req["fid"])
            self.focusChanged.emit()
        self.inspectionChanged.emit()
        self.inspectionFinished.emit(True)

    def _inspect_failed(self, token: int, text: str) -> None:
        req = self._pending
        if req is None or token != req["token"]:
            return
        self._pending = None
        self.inspectionBusy.emit(False)
        self.message.emit("error", text)  # the last valid view stays
        self.inspectionFinished.emit(False)

    @property
    def inspecting(self) -> bool:
        return self._pending is not None

    # ------------------------------------------------------------ helpers for widgets

    def feature(self, fid: str) -> Feature:
        return self.scene.feature(fid)
