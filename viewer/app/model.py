"""The window's one model: the current valid scene, its analysis, the what-if states, the
focus (which mate or feature is looked at), the file path and the dirty flag.

Widgets never talk to each other: they call the model's methods and observe its Qt signals,
which are the only change notification. Every edit goes through :func:`geom.scenefile.parse`
(the scene is turned into the same dict a TOML file decodes to, changed, and parsed), so the
window accepts and rejects exactly what the command line does, with the same message.
"""

from __future__ import annotations

import copy
import os
import time
import tomllib
from dataclasses import dataclass, replace
from pathlib import Path

from PyQt5.QtCore import QObject, QThread, pyqtSignal, pyqtSlot
from PyQt5.QtWidgets import QUndoCommand, QUndoStack

from geom import boundaries as B
from geom.analysis import (
    Derived, SceneResult, analyse_scene, clearance_at, fits, mate_verdict, term, tolerance_allowed_derived,
)
from geom.model import Feature, Material, Scene
from geom.scenefile import SceneError, dumps, load, parse, save

# ---------------------------------------------------------------- scene <-> plain dict


def scene_dict(scene: Scene) -> dict:
    """The decoded-TOML form of a scene: what :func:`geom.scenefile.parse` takes."""
    return tomllib.loads(dumps(scene))


def scene_label(path: str | None) -> str:
    return Path(path).name if path else "<unsaved scene>"


def parse_dict(data: dict, path: str | None) -> Scene:
    """Validate ``data`` with the scene-file rules; raises :class:`SceneError`."""
    return parse(data, scene_label(path), str(Path(path).resolve()) if path else None)


def new_scene() -> Scene:
    """A small valid scene to start from (File > New): one hole, one pin, one mate."""
    data = {
        "title": "Untitled fit",
        "units": "mm",
        "standard": "asme",
        "feature": [
            # position needs datums that locate the axis (A alone only orients): A | B | C
            {"id": "hole-1", "kind": "hole", "limits": [10.0, 10.02], "length": 10.0,
             "tolerance": {"characteristic": "position", "value": 0.05, "material": "MMC",
                           "datums": ["A", "B", "C"]}},
            {"id": "pin-1", "kind": "pin", "limits": [9.96, 9.98], "length": 10.0,
             "tolerance": {"characteristic": "perpendicularity", "value": 0.01, "material": "MMC",
                           "datums": ["A"]}},
        ],
        "mate": [{"hole": "hole-1", "pin": "pin-1"}],
    }
    return parse(data, "<new scene>")


# ---------------------------------------------------------------- what-if readouts (no Qt)


def _plain(v: float, decimals: int = 1) -> str:
    """A percentage or angle as the what-if controls set it (one decimal), without a trailing .0."""
    return f"{v:.{decimals}f}".rstrip("0").rstrip(".")


@dataclass(frozen=True)
class Row:
    quantity: str
    value: str
    formula: str
    constant: bool = False  # does not depend on the what-if state


def whatif_rows(res: SceneResult, fid: str, state: B.FeatureState) -> list[Row]:
    """Readouts of one feature at a what-if state; every number comes from geom."""
    sc = res.scene
    u, st = sc.units, sc.standard
    r = res.features[fid]
    f = r.feature
    tol = f.tolerance
    mmc_abbr, lmc_abbr = term("mmc", st)[0], term("lmc", st)[0]
    mmc_s, lmc_s = u.fmt_cmp(f.mmc, f.lmc)  # compared with each other: never printed equal
    rows = [Row("produced size", u.fmt(state.size), f"between {mmc_abbr} {mmc_s} and {lmc_abbr} {lmc_s}")]
    b = B.bonus(f, state.size)
    bname = term("bonus", st)[0]
    if tol is None:
        rows.append(Row(bname, u.fmt(b), "no geometric tolerance"))
    elif tol.material is Material.RFS:
        rows.append(Row(bname, u.fmt(b), f"{bname} = 0 ({term('rfs', st)[1]})"))
    else:
        ref_key = "mmc" if tol.material is Material.MMC else "lmc"
        ref = f.mmc if tol.material is Material.MMC else f.lmc
        rows.append(Row(f"{bname} at this size", u.fmt(b),
                        Derived("bonus", b, "|size - {" + ref_key + "}|", "|{} - {}|",
                                (state.size, ref)).formula(u, st)))
    ta = B.tolerance_allowed(f, state.size)
    if tol is not None:
        rows.append(Row("tolerance allowed at this size", u.fmt(ta),
                        tolerance_allowed_derived(f, b).formula(u, st)))
        used = state.share * ta
        rows.append(Row("tolerance used", u.fmt(used),
                        f"{_plain(state.share * 100)} % of {u.fmt(ta)}, tilted toward "
                        f"{_plain(state.direction_deg)} deg"))
        tilt = B.tilt_angle_deg(f, used)
        if tilt is not None:
            rows.append(Row("axis tilt", f"{tilt:.4f} deg",
                            f"atan(used / L) = atan({u.fmt(used)} / {u.fmt(B.tilt_length(f))})"))
    eff = B.effective_size(f, state)
    sign = "-" if f.kind.value == "hole" else "+"
    what = "clear opening" if f.kind.value == "hole" else "swept envelope"
    rows.append(Row(f"{what} normal to A", u.fmt(eff),
                    f"size {sign} used = {u.fmt(state.size)} {sign} {u.fmt(state.share * ta)} = {u.fmt(eff)}"))
    vc = r.virtual_condition
    if vc.value is not None:
        rows.append(Row(f"{term(vc.key, st)[1]} (constant)", u.fmt(vc.value), vc.formula(u, st), constant=True))
        if tol.material is Material.MMC:
            # with all of the tolerance used, the boundary presented equals the VC at every size
            gap = abs(eff - vc.value)
            rows.append(Row(f"room left to {vc.abbr(st)}", u.fmt(gap),
                            f"|{what} - {vc.abbr(st)}| = |{u.fmt(eff)} - {u.fmt(vc.value)}| = {u.fmt(gap)}"))
    return rows


@dataclass(frozen=True)
class Verdict:
    assembles: bool
    headline: str  # "ASSEMBLES ..." / "INTERFERES by ..."
    worst_case: str  # geom's worst-case verdict sentence
    formula: str
    whatif_clearance: float


def mate_verdict_at(res: SceneResult, mate_index: int, states: dict[str, B.FeatureState]) -> Verdict:
    from geom.analysis import mate_formula

    sc = res.scene
    u = sc.units
    m = res.mates[mate_index]
    hole, pin = sc.feature(m.hole), sc.feature(m.pin)
    c = clearance_at(hole, pin, states[m.hole], states[m.pin])
    ok = fits(c)  # geom's one fit predicate (line-to-line included)
    headline = mate_verdict(c, ok, u).replace(" in the worst case", " at the sizes set")
    return Verdict(ok, headline, mate_verdict(m.clearance_min, m.assembles, u),
                   mate_formula(m, u, sc.standard), c)


# ---------------------------------------------------------------- inspection (geom.inspect, off the GUI thread)

def inspection_errors() -> tuple[type, ...]:
    """The message-carrying errors ``matezone inspect`` turns into one line (same classes)."""
    from geom.fitting import FitError
    from geom.inspect import InspectError
    from geom.pointsfile import PointsError

    return (InspectError, PointsError, FitError)


def points_source(scene: Scene, fid: str, points: str | None = None) -> tuple[str | None, float | None]:
    """(absolute path, modification time) of the points an inspection of ``fid`` reads: ``points``
    if given, else the feature's ``[feature.measured] points`` resolved as geom.inspect resolves
    it (relative to the scene file). (None, None) for typed values."""
    if points is None:
        m = scene.feature(fid).measured
        if m is None or m.points is None:
            return None, None
        base = Path(scene.source).parent if scene.source else Path.cwd()
        path = Path(m.points) if Path(m.points).is_absolute() else base / m.points
    else:
        path = Path(points)
    path = path.resolve()
    try:
        return str(path), path.stat().st_mtime
    except OSError:
        return str(path), None


def scene_folder(scene: Scene) -> Path:
    """The folder a scene's points files must lie in (geom.inspect reads no file outside it)."""
    return (Path(scene.source).parent if scene.source else Path.cwd()).resolve()


def points_outside(scene: Scene, fid: str) -> bool:
    """True when the feature's recorded points file lies outside the scene's folder: geom.inspect
    refuses to read it from the scene file (a scene must not make the program read any file)."""
    path, _ = points_source(scene, fid)
    return path is not None and not Path(path).is_relative_to(scene_folder(scene))


def has_measured(scene: Scene, fid: str) -> bool:
    return scene.feature(fid).measured is not None


def points_entry(points_path: str, scene_path: str | None) -> str:
    """How a points file is written in ``[feature.measured] points``: relative to the scene
    file's folder when there is one (and the relative form exists), else absolute."""
    p = Path(points_path).resolve()
    if scene_path:
        try:
            return Path(os.path.relpath(p, Path(scene_path).resolve().parent)).as_posix()
        except ValueError:  # another drive
            pass
    return str(p)


class InspectionWorker(QObject):
    """Runs :func:`geom.inspect.inspect_feature` in its own thread. A request carries a token;
    the answer (result or the error's message) comes back with it, so the model can drop answers
    to requests it no longer wants."""

    done = pyqtSignal(int, object, float)  # token, InspectionResult, seconds
    failed = pyqtSignal(int, str)  # token, message (the CLI's text)

    @pyqtSlot(int, object, str, object, str)
    def run(self, token: int, scene, fid: str, points, basis: str) -> None:
        from geom.inspect import inspect_feature

        t0 = time.perf_counter()
        try:
            res = inspect_feature(scene, fid, points=points, bonus_basis=basis)
        except inspection_errors() as e:
            self.failed.emit(token, str(e))
            return
        except OSError as e:
            self.failed.emit(token, f"{points or fid}: cannot be read ({e.strerror or e})")
            return
        except Exception as e:  # the window keeps running; the message says what went wrong
            self.failed.emit(token, f"internal error while inspecting {fid!r}: {type(e).__name__}: {e}")
            return
        self.done.emit(token, res, time.perf_counter() - t0)


# ---------------------------------------------------------------- the model


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
        kind, key = self.focus
        if kind == "mate":
            m = self.scene.mates[key]
            return [m.hole, m.pin]
        if kind in ("feature", "inspection"):
            return [key]
        return []

    def focus_fastener(self) -> str | None:
        """The fastener looked at, or None."""
        kind, key = self.focus
        return key if kind == "fastener" else None

    def focus_inspection(self) -> str | None:
        """The feature whose inspection is looked at, or None."""
        kind, key = self.focus
        return key if kind == "inspection" else None

    def shown_inspection(self):
        """The inspection result of the focused feature (the last valid one), or None."""
        fid = self.focus_inspection()
        if fid is not None and self.inspection is not None and self.inspection.feature.id == fid:
            return self.inspection
        return None

    def focus_mate(self) -> int | None:
        """Index of the mate looked at, or of the first mate the focused feature is in."""
        kind, key = self.focus
        if kind == "mate":
            return key
        if kind != "feature":
            return None
        for i, m in enumerate(self.scene.mates):
            if key in (m.hole, m.pin):
                return i
        return None

    # ------------------------------------------------------------ focus and what-if

    def set_focus(self, kind: str, key) -> None:
        if kind == "mate" and not (isinstance(key, int) and 0 <= key < len(self.scene.mates)):
            return
        if kind in ("feature", "inspection") and key not in {f.id for f in self.scene.features}:
            return
        if kind == "fastener" and key not in {fa.id for fa in self.scene.fasteners}:
            return
        if kind not in ("mate", "feature", "inspection", "fastener"):
            return
        if (kind, key) != self.focus:
            self.focus = (kind, key)
            self.focusChanged.emit()
        if kind == "inspection":
            self.request_inspection()

    def set_state(self, fid: str, size: float | None = None, share: float | None = None,
                  direction_deg: float | None = None) -> None:
        """Move one feature's what-if state (size clamped to its limits, share to 0..1)."""
        f = self.scene.feature(fid)
        old = self.states[fid]
        lo, hi = f.limits
        new = B.FeatureState(
            old.size if size is None else min(max(float(size), lo), hi),
            old.share if share is None else min(max(float(share), 0.0), 1.0),
            old.direction_deg if direction_deg is None else float(direction_deg) % 360.0,
        )
        if new != old:
            self.states[fid] = new
            self.statesChanged.emit()

    def reset_states(self) -> None:
        """Every feature back to the worst case: MMC, all of the tolerance used."""
        self._reset_states(keep=False)
        self.statesChanged.emit()

    def _reset_states(self, keep: bool = True) -> None:
        old = self.states if keep else {}
        states = {}
        for f in self.scene.features:
            st = old.get(f.id)
            lo, hi = f.limits
            if st is not None and lo <= st.size <= hi:
                states[f.id] = st
            elif st is not None:
                states[f.id] = B.FeatureState(f.mmc, st.share, st.direction_deg)
            else:
                states[f.id] = self._worst_case(f)
        self.states = states

    def _worst_case(self, f: Feature) -> B.FeatureState:
        """MMC, all of the tolerance used; a pin in a mate tilts opposite to the hole (the same
        default the 2D views and the report use)."""
        from geom.boundaries import worst_case_state

        in_mate = any(f.id in (m.hole, m.pin) for m in self.scene.mates)
        return worst_case_state(f, in_mate)

    def _default_focus(self) -> None:
        """The first mate, else the first feature, else the first fastener (a scene may hold
        fastener tables only)."""
        sc = self.scene
        if sc.mates:
            self.focus = ("mate", 0)
        elif sc.features:
            self.focus = ("feature", sc.features[0].id)
        elif sc.fasteners:
            self.focus = ("fastener", sc.fasteners[0].id)
        else:
            self.focus = ("none", None)

    def _focus_valid(self) -> bool:
        kind, key = self.focus
        sc = self.scene
        if kind == "mate":
            return isinstance(key, int) and 0 <= key < len(sc.mates)
        if kind in ("feature", "inspection"):
            return key in {f.id for f in sc.features}
        if kind == "fastener":
            return key in {fa.id for fa in sc.fasteners}
        return False

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
        if not self._focus_valid():
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
        scene = self._rebase_points(self.scene, target) if moved else self.scene
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
                self.message.emit("info", self._outside_warning(f.id))

    def report_points(self) -> tuple[dict[str, str], list[str]]:
        """The points files an exported report reads, as this window reads them: (feature id ->
        absolute path of its ``[feature.measured] points`` file, messages for the files geom would
        refuse to read from the scene, those outside its folder that were not picked here)."""
        points, refused = {}, []
        for f in self.scene.features:
            if f.measured is None or f.measured.points is None:
                continue
            path, _ = points_source(self.scene, f.id)
            if points_outside(self.scene, f.id) and path not in self._picked:
                refused.append(f"feature {f.id!r}: its points file {path} is outside the scene's folder "
                               f"{scene_folder(self.scene)}; a scene may only name points inside its own folder "
                               "(load the file with File > Load measured points…, or copy it there)")
                continue
            points[f.id] = path
        return points, refused

    def _rebase_points(self, scene: Scene, target: str) -> Scene:
        """The scene with each relative points file rewritten relative to ``target``'s folder
        (same files; a scene saved elsewhere still finds its measured points)."""
        feats = []
        for f in scene.features:
            m = f.measured
            if m is not None and m.points is not None and not Path(m.points).is_absolute():
                path, _ = points_source(scene, f.id)
                f = f.with_(measured=replace(m, points=points_entry(path, target)))
            feats.append(f)
        return replace(scene, features=tuple(feats))

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

    def _outside_warning(self, fid: str) -> str:
        path, _ = points_source(self.scene, fid)
        return (f"note: {path} is outside the scene's folder {scene_folder(self.scene)}: this window reads it "
                "because you picked it, but a scene file may only name points inside its own folder; copy "
                "the file there (or give it with `matezone inspect --points`)")

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
                self.message.emit("error", str(err))
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
                self.message.emit("info", self._outside_warning(req["fid"]))
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


def feature_index(scene: Scene, fid: str) -> int:
    for i, f in enumerate(scene.features):
        if f.id == fid:
            return i
    raise KeyError(fid)


def rename_in_mates(data: dict, old: str, new: str) -> None:
    for m in data.get("mate", []):
        for role in ("hole", "pin"):
            if m.get(role) == old:
                m[role] = new
