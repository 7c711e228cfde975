"""The jobs that run off the GUI thread, each a QObject moved to its own QThread and answering
with Qt signals: the inspection of measured points (:func:`geom.inspect.inspect_feature`) and the
report export (the ``matezone report`` command in a separate process) and the teaching sweep's
export (:mod:`viewer.windowlogic.teaching`'s job, in a separate process too)."""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import threading
import time

from PyQt5.QtCore import QObject, pyqtSignal, pyqtSlot

from geom.scenefile import save
from viewer.windowlogic.export import failure_message, not_written, report_command, scene_file_name
from viewer.windowlogic.points import inspection_errors


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


class _ProcessJob(QObject):
    """A job run as a separate process; :meth:`cancel` stops it from any thread (the command
    itself cleans up: nothing half-written is left)."""

    def cancel(self) -> None:
        with self._lock:
            self.cancelled = True
            if self.proc is not None and self.proc.poll() is None:
                self.proc.terminate()


class ReportWorker(_ProcessJob):
    """Runs the report pipeline off the GUI thread: ``matezone report`` on the scene shown
    (written to a temporary file under its own name), with the what-if sizes, the bonus basis
    and the measured points files as the window reads them (given with ``--points``: the
    temporary copy is not in the scene's folder, so relative paths would not reach them). A
    separate process keeps the off-screen renderer apart from the window's OpenGL context.

    The command runs in the temporary folder holding the scene copy, not in the window's working
    folder nor in a source checkout: every path it is given is absolute, and the program it runs
    is the installed one (nothing in a working folder can stand in for its modules).

    The command writes the folder through :func:`viewer.reportdir.write_report_atomic`: a folder
    holding other files is refused with one message, and :meth:`cancel` (SIGTERM) leaves the
    previous report whole (the command exits 130 with one message)."""

    progress = pyqtSignal(str)
    finished = pyqtSignal(str)  # output folder
    failed = pyqtSignal(str)  # the command's one message

    def __init__(self, scene, name: str, folder: str, sizes: dict[str, float], view: str,
                 points: dict[str, str] | None = None, bonus_basis: str = "unrelated"):
        super().__init__()
        self.scene, self.name, self.folder, self.sizes, self.view = scene, name, folder, sizes, view
        self.points, self.bonus_basis = dict(points or {}), bonus_basis
        self.proc: subprocess.Popen | None = None
        self.cancelled = False
        self.cwd: str | None = None  # the folder the command ran in
        self._lock = threading.Lock()  # cancel() comes from the GUI thread, run() is in the worker's

    def command(self, scene_path: str) -> list[str]:
        return report_command(sys.executable, scene_path, self.folder, self.view, self.bonus_basis,
                              self.sizes, self.points)

    def run(self) -> None:
        try:
            with tempfile.TemporaryDirectory(prefix="matezone-report-") as tmp:
                path = os.path.join(tmp, scene_file_name(self.name))
                save(self.scene, path)
                self.progress.emit("rendering pictures and writing the PDF…")
                env = dict(os.environ, PYTHONUNBUFFERED="1")
                with self._lock:
                    if self.cancelled:
                        self.failed.emit(not_written(self.folder))
                        return
                    self.cwd = tmp
                    self.proc = subprocess.Popen(self.command(path), stdout=subprocess.PIPE,
                                                 stderr=subprocess.PIPE, text=True, env=env, cwd=tmp)
                for line in self.proc.stdout:
                    if line.strip():
                        self.progress.emit(line.strip()[:120])
                err = self.proc.stderr.read()
                code = self.proc.wait()
            if code == 0:
                self.finished.emit(self.folder)
                return
            self.failed.emit(failure_message(err, code, self.cancelled, self.folder))
        except Exception as e:  # the message goes to the window; the window keeps running
            self.failed.emit(f"{type(e).__name__}: {e}")


class SweepWorker(_ProcessJob):
    """Writes the teaching sweep of the scene shown to a GIF or MP4 off the GUI thread: the job
    (:func:`viewer.windowlogic.teaching.main`) runs in a separate process on a temporary copy of
    the scene, like the report, and writes the file all or nothing; :meth:`cancel` stops it and
    leaves no file (a previous one at the path is unchanged)."""

    progress = pyqtSignal(str)
    finished = pyqtSignal(str)  # the file written
    failed = pyqtSignal(str)  # the job's one message

    def __init__(self, scene, out: str, subject, feature_id: str, steps: int, turns: float, view: str):
        super().__init__()
        self.scene, self.out, self.subject, self.feature_id = scene, out, subject, feature_id
        self.steps, self.turns, self.view = steps, turns, view
        self.proc: subprocess.Popen | None = None
        self.cancelled = False
        self._lock = threading.Lock()

    def run(self) -> None:
        from viewer.windowlogic.teaching import sweep_command

        try:
            with tempfile.TemporaryDirectory(prefix="matezone-sweep-") as tmp:
                path = os.path.join(tmp, "scene.toml")
                save(self.scene, path)
                with self._lock:
                    if self.cancelled:
                        self.failed.emit(f"cancelled; nothing was written to {self.out!r}")
                        return
                    self.proc = subprocess.Popen(
                        sweep_command(sys.executable, path, self.out, self.subject, self.feature_id,
                                      self.steps, self.turns, self.view),
                        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, cwd=tmp,
                        env=dict(os.environ, PYTHONUNBUFFERED="1"))
                for line in self.proc.stdout:
                    if line.strip():
                        self.progress.emit(line.strip()[:120])
                err = self.proc.stderr.read()
                code = self.proc.wait()
            if code == 0:
                self.finished.emit(self.out)
                return
            lines = [x.strip() for x in err.strip().splitlines() if x.strip()]
            msg = lines[-1].removeprefix("matezone: ") if lines else ""
            if self.cancelled and (code < 0 or not msg):
                msg = f"cancelled; nothing was written to {self.out!r}"
            self.failed.emit(msg or f"the sweep job exited with status {code}")
        except Exception as e:  # the message goes to the window; the window keeps running
            self.failed.emit(f"{type(e).__name__}: {e}")
