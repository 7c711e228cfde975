"""The main window: panels around the 3D and 2D views; files, undo, the recent-files list and
the exports. The menus are made in :mod:`.menus`, the report is written by
:class:`.workers.ReportWorker`."""

from __future__ import annotations

import os
import sys
import traceback
from pathlib import Path

from PyQt5.QtCore import QSettings, Qt, QThread, QUrl, pyqtSignal
from PyQt5.QtGui import QDesktopServices
from PyQt5.QtWidgets import (
    QFileDialog,
    QLabel,
    QMainWindow,
    QMessageBox,
    QProgressDialog,
    QScrollArea,
    QSplitter,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from geom.scenefile import SceneError, load
from viewer.windowlogic.messages import edit_message

from . import glyphs
from .exports import ExportActions
from .menus import APP_NAME, build_menus
from .model import SceneModel
from .panels import ContentsList, FeatureForm, MateForm, MessageBar, ReadoutTable, SceneForm, VerdictBanner, WhatIfPanel
from .workers import ReportWorker

__all__ = ["MainWindow", "ReportWorker", "settings", "APP_NAME", "RECENT_MAX", "SETTINGS_ENV"]

RECENT_MAX = 8
FILE_FILTER = "Scene files (*.toml);;All files (*)"
POINTS_FILTER = "Measured points (*.csv);;All files (*)"
SETTINGS_ENV = "MATEZONE_SETTINGS"  # an .ini file to keep the window's settings in (tests use one)
# the file dialogs hand back the path the user picked, a symbolic link included: a scene opened
# through a link is saved through it (geom.scenefile.save writes to the link's target)
DIALOG_OPTIONS = QFileDialog.DontResolveSymlinks


def settings() -> QSettings:
    """The window's settings (recent files): the file named by $MATEZONE_SETTINGS if set, else the
    user's matezone settings."""
    path = os.environ.get(SETTINGS_ENV)
    if path:
        return QSettings(path, QSettings.IniFormat)
    return QSettings("matezone", "matezone")


def _top_aligned(widget: QWidget) -> QWidget:
    """A tab page holding ``widget`` at the top, the free space below it; it scrolls when the
    window is smaller than the page (a small screen or a large font)."""
    page = QWidget()
    lay = QVBoxLayout(page)
    lay.addWidget(widget)
    lay.addStretch(1)
    scroll = QScrollArea()
    scroll.setWidgetResizable(True)
    scroll.setFrameShape(QScrollArea.NoFrame)
    scroll.setWidget(page)
    return scroll


def _first_size() -> tuple[int, int]:
    """The window's size when it opens: 1560 x 960, or what the screen has free less a margin."""
    from PyQt5.QtWidgets import QApplication

    screen = QApplication.primaryScreen() if QApplication.instance() is not None else None
    if screen is None:
        return 1560, 960
    g = screen.availableGeometry()
    return min(1560, int(g.width() * 0.96)), min(960, int(g.height() * 0.92))


class MainWindow(ExportActions, QMainWindow):
    """matezone's desktop window (its picture and sweep exports: :class:`.exports.ExportActions`)."""

    sweepExported = pyqtSignal(bool, str)  # a size sweep export ended: written?, file or message
    MIN_3D_HEIGHT = 300  # the 3D view keeps this much height on a small screen (1024 x 700)

    def __init__(self, model: SceneModel | None = None, with_views: bool = True):
        super().__init__()
        if "found" not in glyphs._state:
            from PyQt5.QtWidgets import QApplication

            glyphs.setup(QApplication.instance())
        self.model = model or SceneModel()
        self.setWindowTitle(APP_NAME)
        self.resize(*_first_size())
        self.confirm = self._ask_unsaved  # replaceable in tests: returns "save" | "discard" | "cancel"
        self._thread: QThread | None = None
        self._worker: ReportWorker | None = None
        self.progress: QProgressDialog | None = None
        self._sthread: QThread | None = None  # the size sweep export
        self._sworker = None
        self.sweep_progress: QProgressDialog | None = None
        self.last_export: str | None = None
        self._last_focus_kind = None

        m = self.model
        # --- left column: contents, what-if / edit tabs, messages
        left = QWidget()
        ll = QVBoxLayout(left)
        ll.setContentsMargins(4, 4, 4, 4)
        ll.addWidget(QLabel("<b>Scene contents</b>"))
        self.contents = ContentsList(m)
        self.contents.setMaximumHeight(190)
        ll.addWidget(self.contents)
        self.tabs = QTabWidget()
        self.whatif = WhatIfPanel(m)
        self.tabs.addTab(_top_aligned(self.whatif), "What-if")
        self.feature_form = FeatureForm(m)
        self.mate_form = MateForm(m)
        ed = QWidget()
        el = QVBoxLayout(ed)
        el.addWidget(self.mate_form)
        el.addWidget(self.feature_form, 1)
        scroll = QScrollArea()  # the form is taller than a small screen
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QScrollArea.NoFrame)
        scroll.setWidget(ed)
        self.tabs.addTab(scroll, "Edit feature")
        self.scene_form = SceneForm(m)
        self.tabs.addTab(_top_aligned(self.scene_form), "Scene")
        ll.addWidget(self.tabs, 1)
        self.messages = MessageBar(m)
        ll.addWidget(self.messages)

        # --- centre: verdict, 3D | 2D, readouts
        centre = QWidget()
        cl = QVBoxLayout(centre)
        cl.setContentsMargins(4, 4, 4, 4)
        self.verdict = VerdictBanner(m)
        cl.addWidget(self.verdict)
        # 3D and 2D views side by side over the full-width readout table
        vsplit = QSplitter(Qt.Vertical)
        hsplit = QSplitter(Qt.Horizontal)
        self.view3d = None
        self.views2d = None
        if with_views:
            from .views import View3D, Views2D

            self.view3d = View3D(m)
            self.views2d = Views2D(m)
            self.view3d.plotter.interactor.setMinimumHeight(self.MIN_3D_HEIGHT)
            hsplit.addWidget(self.view3d)
            hsplit.addWidget(self.views2d)
            hsplit.setSizes([600, 580])
        vsplit.addWidget(hsplit)
        self.readouts = ReadoutTable(m)
        vsplit.addWidget(self.readouts)
        vsplit.setSizes([600, 280])
        cl.addWidget(vsplit, 1)

        split = QSplitter(Qt.Horizontal)
        split.addWidget(left)
        split.addWidget(centre)
        split.setSizes([380, 1180])
        split.setStretchFactor(1, 1)
        self.setCentralWidget(split)

        build_menus(self)
        # the Edit-feature tab's button is for the feature it shows (for a mate: its hole)
        self.feature_form.load_button.clicked.connect(lambda: self.load_points_dialog(fid=self.feature_form.fid))
        self.whatif.loadRequested.connect(self.act["load_points"].trigger)
        m.focusChanged.connect(self._load_action_text)
        m.sceneChanged.connect(self._load_action_text)
        self._load_action_text()
        m.pathChanged.connect(lambda _p: self._title())
        m.dirtyChanged.connect(lambda _d: self._title())
        m.sceneChanged.connect(self._title)
        m.focusChanged.connect(self._focus_tab)
        self._title()
        self.statusBar().showMessage("Drag to rotate, right-drag or wheel to zoom, middle-drag to pan.")

    def _title(self) -> None:
        m = self.model
        self.setWindowTitle(f"{m.label}[*] – {m.scene.title} – {APP_NAME}")
        self.setWindowModified(m.dirty)

    def points_target(self) -> str | None:
        """The feature "Load measured points…" reads points for: the feature or inspection in
        focus (None for a mate: pick one of its features first)."""
        kind, key = self.model.focus
        return key if kind in ("feature", "inspection") else None

    def _load_action_text(self) -> None:
        fid = self.points_target()
        a = self.act["load_points"]
        a.setEnabled(fid is not None)
        a.setText(f"&Load measured points for {fid}…" if fid else "&Load measured points… (select a feature)")

    def load_points_dialog(self, path: str | None = None, fid: str | None = None) -> None:
        """Ask for a CSV and inspect the selected feature from it (in the worker thread)."""
        fid = fid or self.points_target()
        if fid is None:
            self.model.message.emit("error", "select a feature (or its inspection) to load measured points for")
            return
        if path is None:
            start = str(Path(self.model.path).parent) if self.model.path else str(Path.cwd())
            path, _ = QFileDialog.getOpenFileName(self, f"Measured points for {fid}", start, POINTS_FILTER)
        if path:
            self.model.load_points(fid, path)

    def _focus_tab(self) -> None:
        kind, _ = self.model.focus
        self.mate_form.setVisible(kind == "mate")
        # the first tab holds the what-if controls, or for an inspection its data and bonus basis
        self.tabs.setTabText(0, "Inspection" if kind == "inspection" else "What-if")
        if kind == "inspection" and kind != self._last_focus_kind:
            self.tabs.setCurrentIndex(0)
        self._last_focus_kind = kind

    # ------------------------------------------------------------ files

    def _ask_unsaved(self) -> str:
        b = QMessageBox.question(
            self, "Unsaved changes", f"{self.model.label} has unsaved changes. Save them first?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel, QMessageBox.Save)
        return {QMessageBox.Save: "save", QMessageBox.Discard: "discard"}.get(b, "cancel")

    def commit_typing(self) -> SceneError | None:
        """Commit every value typed but not yet committed (a field left without Enter, a spin box
        value not yet taken): Save, Save As, the exports, New, Open, close and quit call this
        first, so what the user typed is never lost. Returns the scene rules' error when a typed
        value is rejected (the field keeps its text and is marked, as on Enter)."""
        self.whatif.commit_typed()
        for form in (self.feature_form, self.mate_form, self.scene_form):
            err = form.commit_typed()
            if err is not None:
                return err
        return None

    def _typing_committed(self, what: str) -> bool:
        """:meth:`commit_typing`; False (with the reason inline) when a typed value is rejected."""
        err = self.commit_typing()
        if err is None:
            return True
        self.model.message.emit("error", f"{what}: not done, a typed value is not accepted: {edit_message(err)}. Correct it "
                                         "(or discard it) and try again; nothing was written")
        return False

    def maybe_save(self) -> bool:
        """True when it is fine to drop the current scene (typed values committed first)."""
        err = self.commit_typing()
        if not self.model.dirty and err is None:
            return True
        answer = self.confirm()
        if answer == "save":
            return self.file_save()
        return answer == "discard"

    def file_new(self) -> None:
        if self.maybe_save():
            self.model.new()
            self.model.message.emit("info", "new scene: one hole, one pin and a mate to edit")

    def file_open(self) -> None:
        start = str(Path(self.model.path).parent) if self.model.path else str(Path.cwd())
        path, _ = QFileDialog.getOpenFileName(self, "Open scene", start, FILE_FILTER, options=DIALOG_OPTIONS)
        if path:
            self.open_path(path)

    def open_path(self, path: str, ask: bool = True) -> bool:
        """Open a scene file. It is read and checked first: a file the command line refuses shows
        the CLI's message inline and leaves the current scene (and its unsaved changes) as they
        were, without asking about them."""
        path = str(path)
        try:
            scene = load(path)
        except SceneError as e:
            self.model.message.emit("error", str(e))
            return False
        except (OSError, MemoryError, RecursionError, ValueError) as e:  # the loader reports these itself
            self.model.message.emit("error", f"{path}: cannot be read ({type(e).__name__}: {e})")
            return False
        if ask and not self.maybe_save():
            return False
        try:
            self.model.replace_scene(scene, path)
        except Exception as e:  # geom cannot analyse it: the model is unchanged (it analyses first)
            sys.stderr.write(traceback.format_exc())
            self.model.message.emit("error", f"{path}: cannot be analysed ({type(e).__name__}: {e}); "
                                             "the scene shown is unchanged")
            return False
        self._add_recent(path)
        self.model.message.emit("info", f"opened {path}")
        return True

    def file_save(self) -> bool:
        """Save to the scene's own path (the one the user opened, a symbolic link included)."""
        if not self._typing_committed("save"):
            return False
        if not self.model.path:
            return self.file_save_as()
        return self._save_to(self.model.path)

    def file_save_as(self, path: str | None = None) -> bool:
        """Save under a new name (asked for when ``path`` is None). A folder, device or pipe is
        refused with the loader's message; nothing is written then."""
        if not self._typing_committed("save as"):
            return False
        if path is None:
            start = self.model.path or str(Path.cwd() / "scene.toml")
            path, _ = QFileDialog.getSaveFileName(self, "Save scene as", start, FILE_FILTER, options=DIALOG_OPTIONS)
        if not path:
            return False
        path = str(path)
        # an existing path is taken as named (a /dev/null or a folder is refused as itself, not
        # turned into "/dev/null.toml"); a new name gets the .toml suffix
        if not os.path.lexists(path) and not path.endswith(".toml"):
            path += ".toml"
        return self._save_to(path)

    def _save_to(self, path: str) -> bool:
        try:
            self.model.save(path)
        except SceneError as e:  # not a regular file: geom refuses before writing anything
            self.model.message.emit("error", f"{e}; nothing was written")
            return False
        except OSError as e:
            self.model.message.emit("error", f"{path}: cannot be written ({e.strerror or e}); "
                                             "the file is as it was")
            return False
        self._add_recent(path)
        return True

    def recent_files(self) -> list[str]:
        v = settings().value("recent", [])
        if isinstance(v, str):
            v = [v]
        return [p for p in (v or []) if isinstance(p, str) and p]

    def _add_recent(self, path: str) -> None:
        p = os.path.abspath(path)  # as named: a link stays a link (saving through it)
        files = [p] + [f for f in self.recent_files() if f != p]
        settings().setValue("recent", files[:RECENT_MAX])

    def _fill_recent(self) -> None:
        self.recent_menu.clear()
        files = self.recent_files()
        if not files:
            a = self.recent_menu.addAction("(none yet)")
            a.setEnabled(False)
            return
        for i, p in enumerate(files):
            a = self.recent_menu.addAction(f"&{i + 1} {Path(p).name}  –  {Path(p).parent}")
            a.triggered.connect(lambda _c=False, p=p: self.open_path(p))
        self.recent_menu.addSeparator()
        clear = self.recent_menu.addAction("Clear list")
        clear.triggered.connect(lambda: settings().setValue("recent", []))

    # ------------------------------------------------------------ export

    def export_report(self, folder: str | None = None) -> None:
        """Write the report folder in a worker (``matezone report``, all or nothing). A folder
        that holds other files is refused at once with the command's message."""
        if self._thread is not None:
            self.model.message.emit("error", "a report is already being written")
            return
        if not self._typing_committed("export report"):
            return
        if folder is None:
            folder = QFileDialog.getExistingDirectory(self, "Export report into folder", str(Path.cwd()),
                                                      QFileDialog.ShowDirsOnly)
        if not folder:
            return
        from viewer.reportdir import ReportDirError, check_target

        folder = os.path.abspath(folder)  # the command runs in another working folder
        try:
            check_target(Path(folder))  # the command's own check, before any work
        except ReportDirError as e:
            self.model.message.emit("error", f"report not written: {e}")
            return
        m = self.model
        points, refused = m.report_points()
        if refused:
            self.model.message.emit("error", "report not written: " + "; ".join(refused))
            return
        sizes = {fid: st.size for fid, st in m.states.items()}
        view = self.view3d.current_view if self.view3d is not None else "iso"
        self.progress = QProgressDialog("Writing the report…", "Cancel", 0, 0, self)
        self.progress.setWindowTitle("Export report")
        self.progress.setWindowModality(Qt.WindowModal)
        self.progress.setMinimumDuration(0)
        self._thread = QThread(self)
        self._worker = ReportWorker(m.scene, m.label if m.path else "scene.toml", folder, sizes, view,
                                    points=points, bonus_basis=m.bonus_basis)
        self.progress.canceled.connect(self.cancel_report)
        self._worker.moveToThread(self._thread)
        self._thread.started.connect(self._worker.run)
        self._worker.progress.connect(self._report_progress)
        self._worker.finished.connect(self._report_done)
        self._worker.failed.connect(self._report_failed)
        self._thread.start()

    def cancel_report(self) -> None:
        """Cancel the report being written (the progress dialog's Cancel): the worker stops the
        command, which leaves the previous report whole. Called on the GUI thread, directly."""
        if self._worker is not None:
            self._worker.cancel()

    def open_report_folder(self) -> None:
        if self.last_export and Path(self.last_export).is_dir():
            QDesktopServices.openUrl(QUrl.fromLocalFile(self.last_export))

    def _report_progress(self, what: str) -> None:
        if self.progress is not None:
            self.progress.setLabelText(what)

    def _end_report(self) -> bool:
        """Tear the worker down; True if it had been cancelled."""
        cancelled = self._worker is not None and self._worker.cancelled
        if self.progress is not None:
            self.progress.canceled.disconnect()
            self.progress.reset()
            self.progress.deleteLater()
            self.progress = None
        if self._thread is not None:
            self._thread.quit()
            self._thread.wait()
            self._thread.deleteLater()
        self._thread, self._worker = None, None
        return cancelled

    def _report_done(self, folder: str) -> None:
        self._end_report()
        self.last_export = folder
        self.act["open_report_folder"].setEnabled(True)
        self.model.message.emit("info", f"report written to {folder} (File > Open the last report's folder)")

    def _report_failed(self, msg: str) -> None:
        cancelled = self._end_report()
        self.last_export = None
        self.act["open_report_folder"].setEnabled(False)
        self.model.message.emit("error", f"report {'cancelled' if cancelled else 'not written'}: {msg}")

    # ------------------------------------------------------------ errors, closing, screenshots

    def show_exception(self, etype, value, tb) -> None:
        """sys.excepthook: the error is shown in the window, which keeps running."""
        text = "".join(traceback.format_exception_only(etype, value)).strip()
        sys.stderr.write("".join(traceback.format_exception(etype, value, tb)))
        self.model.message.emit("error", f"internal error, your scene is unchanged: {text}")

    def closeEvent(self, event) -> None:
        if not self.maybe_save():
            event.ignore()
            return
        if self._thread is not None:
            if self._worker is not None:
                self._worker.cancel()
            self._thread.quit()
            self._thread.wait()
        if self._sthread is not None:
            self.cancel_sweep()
            self._end_sweep()
        self.model.stop_worker()
        if self.view3d is not None:
            self.view3d.close_plotter()
        event.accept()

    def save_screenshot(self, path: str) -> None:
        """A picture of the whole window (the 3D view included) as it is shown."""
        if self.view3d is not None:
            self.view3d.plotter.render()
        if self.views2d is not None:
            self.views2d.refresh_current()
        pm = self.grab()
        if not pm.save(path):
            raise OSError(f"{path}: cannot be written")
