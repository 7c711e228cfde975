"""The window's picture and sweep exports, mixed into :class:`.window.MainWindow`: File >
Export picture… (the 3D view at a scale factor, or the 2D tab shown at a resolution, with a
caption block below it), File > Export size sweep… (a GIF or MP4 written by
:class:`.workers.SweepWorker`), Edit > Copy image and Edit > Copy table. Every failure is one
line in the message bar; the captions and file names come from :mod:`viewer.windowlogic`."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from PyQt5.QtCore import Qt, QThread
from PyQt5.QtGui import QImage
from PyQt5.QtWidgets import (
    QApplication,
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QFileDialog,
    QFormLayout,
    QProgressDialog,
    QSpinBox,
)

from viewer.windowlogic.picture import caption_lines, part_text, state_text, table_tsv, with_caption
from viewer.windowlogic.teaching import default_export_path, subject_label, sweep_target

from .workers import SweepWorker

SCALES = (1, 2, 3)  # the 3D view's picture: times the widget's pixels
DPI = 200  # the 2D tab's default resolution (dots per inch of its 8 x 6 in page)
SWEEP_FILTER = "Animated GIF (*.gif);;MP4 movie (*.mp4)"


class PictureDialog(QDialog):
    """Which pane to save and at what scale (3D) or resolution (2D)."""

    def __init__(self, panes: list[tuple[str, str]], current: str, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Export picture")
        lay = QFormLayout(self)
        self.pane = QComboBox()
        for key, text in panes:
            self.pane.addItem(text, key)
        self.pane.setCurrentIndex(max(0, [k for k, _ in panes].index(current) if current in dict(panes) else 0))
        self.scale = QComboBox()
        for k in SCALES:
            self.scale.addItem(f"{k}x the view's pixels", k)
        self.dpi = QSpinBox()
        self.dpi.setRange(50, 600)
        self.dpi.setValue(DPI)
        self.dpi.setSuffix(" dpi")
        lay.addRow("Pane", self.pane)
        lay.addRow("3D view scale", self.scale)
        lay.addRow("2D view resolution", self.dpi)
        bb = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        bb.accepted.connect(self.accept)
        bb.rejected.connect(self.reject)
        lay.addRow(bb)


def _write_png(path: str, img) -> None:
    """Write ``img`` to ``path`` whole or not at all (a temporary file beside it, then a rename)."""
    import imageio.v2 as imageio

    p = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{p.stem}.", suffix=p.suffix or ".png", dir=p.parent if str(p.parent) else ".")
    os.close(fd)
    try:
        imageio.imwrite(tmp, img, format=p.suffix.lstrip(".").upper() or "PNG")
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # as a plain new file would be, not the temporary file's 0600
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _qimage(img) -> QImage:
    import numpy as np

    a = np.ascontiguousarray(np.asarray(img)[..., :3], dtype=np.uint8)
    h, w = a.shape[:2]
    return QImage(a.data, w, h, 3 * w, QImage.Format_RGB888).copy()


class ExportActions:
    """The export and copy actions of the main window (a mixin: uses ``self.model``,
    ``self.view3d``, ``self.views2d``, ``self.readouts`` and ``self.verdict``)."""

    # ------------------------------------------------------------ what is shown

    def shown_pane(self) -> str:
        """"2d" when the keyboard focus is in the 2D tabs, else "3d" (the 2D tab without a 3D view)."""
        w = QApplication.focusWidget()
        if self.views2d is not None and (self.view3d is None or (w is not None and self.views2d.isAncestorOf(w))):
            return "2d"
        return "3d"

    def picture_caption(self) -> list[str]:
        m = self.model
        sc3 = self.view3d.current if self.view3d is not None else None
        scale = (sc3.caption or f"deviations x{sc3.exaggeration:g}") if sc3 is not None else "as drawn"
        return caption_lines(m.scene.title, part_text(m.scene, m.focus),
                             state_text(m.scene, m.states, m.focus_features()), self.verdict.headline.text(), scale)

    def pane_image(self, pane: str, scale: int = 1, dpi: int = DPI):
        """The pane's pixels ((h, w, 3) uint8): the 3D view at ``scale`` times its pixels, the 2D
        tab shown at ``dpi``."""
        import io

        import imageio.v2 as imageio

        if pane == "2d":
            buf = io.BytesIO()
            self.views2d.figure().savefig(buf, format="png", dpi=dpi, facecolor="white")
            return imageio.imread(buf.getvalue(), format="PNG")[..., :3]
        self.view3d.render()
        return self.view3d.plotter.screenshot(return_img=True, scale=int(scale))[..., :3]

    def _picture_name(self, pane: str) -> str:
        m = self.model
        what = "3d" if pane == "3d" else self.views2d.current_key()
        return default_export_path(m.path, subject_label(m.scene, m.focus[1] if m.focus[1] is not None else "scene"),
                                   what, ".png", str(Path.cwd()))

    # ------------------------------------------------------------ export picture

    def export_image(self, path: str | None = None, pane: str | None = None, scale: int = 1, dpi: int = DPI,
                     caption: bool = True) -> str | None:
        """Save the 3D view (``pane`` "3d", ``scale`` x its pixels) or the 2D tab shown ("2d", at
        ``dpi``; .svg and .pdf are kept as vectors) with the caption block below it. Without a
        path the pane, scale and file are asked for."""
        if not self._typing_committed("export picture"):
            return None
        if path is None:
            panes = ([("3d", "3D view")] if self.view3d is not None else []) + \
                    ([("2d", f"2D: {self.views2d.tabText(self.views2d.currentIndex())}")] if self.views2d else [])
            if not panes:
                return None
            dlg = PictureDialog(panes, self.shown_pane(), self)
            if dlg.exec_() != QDialog.Accepted:
                return None
            pane, scale, dpi = dlg.pane.currentData(), dlg.scale.currentData(), dlg.dpi.value()
            flt = "PNG picture (*.png)" + (";;SVG (*.svg);;PDF (*.pdf)" if pane == "2d" else "")
            path, _ = QFileDialog.getSaveFileName(self, "Export picture", self._picture_name(pane), flt)
        if not path:
            return None
        p = Path(path)
        if pane is None:  # from the suffix: vectors are the 2D tab's, pixels the 3D view's
            pane = "2d" if p.suffix.lower() in (".svg", ".pdf") or self.view3d is None else "3d"
        if p.exists() and not p.is_file():
            self.model.message.emit("error", f"{path}: is not a regular file (a folder, device or pipe); "
                                             "no picture written")
            return None
        try:
            if (pane == "2d" and self.views2d is None) or (pane == "3d" and self.view3d is None):
                raise ValueError(f"there is no {pane.upper()} view in this window")
            lines = self.picture_caption()
            if pane == "2d" and p.suffix.lower() in (".svg", ".pdf"):
                fig = self.views2d.figure()
                t = fig.text(0.01, 0.0, "\n".join(lines), va="top", ha="left", fontsize=8, parse_math=False) \
                    if caption else None
                try:
                    fig.savefig(path, dpi=dpi, bbox_inches="tight" if caption else None)
                finally:
                    if t is not None:
                        t.remove()
            else:
                img = self.pane_image(pane, scale, dpi)
                factor = scale if pane == "3d" else dpi / 100.0
                _write_png(path, with_caption(img, lines, factor) if caption else img)
        except (OSError, ValueError, OverflowError, RuntimeError, MemoryError) as e:
            self.model.message.emit("error", f"{path}: cannot be written ({e})")
            return None
        self.model.message.emit("info", f"picture saved: {path}")
        return path

    # ------------------------------------------------------------ clipboard

    def copy_image(self, pane: str | None = None) -> bool:
        """Edit > Copy image: the pane shown (as on screen, no caption) to the clipboard."""
        pane = pane or self.shown_pane()
        try:
            img = self.pane_image(pane, 1, 100)
        except (AttributeError, OSError, ValueError, RuntimeError) as e:
            self.model.message.emit("error", f"the picture cannot be copied ({e})")
            return False
        QApplication.clipboard().setImage(_qimage(img))
        self.model.message.emit("info", f"{'3D' if pane == '3d' else '2D'} picture copied to the clipboard")
        return True

    def table_text(self) -> str:
        t = self.readouts
        header = [t.horizontalHeaderItem(c).text() for c in range(t.columnCount())]
        rows = [[t.item(r, c).text() if t.item(r, c) is not None else "" for c in range(t.columnCount())]
                for r in range(t.rowCount())]
        return table_tsv(header, rows)

    def copy_table(self) -> str:
        """Edit > Copy table: the readout table as tab-separated text, header first."""
        text = self.table_text()
        QApplication.clipboard().setText(text)
        self.model.message.emit("info", f"{self.readouts.rowCount()} readout rows copied to the clipboard")
        return text

    # ------------------------------------------------------------ export sweep

    def export_sweep(self, path: str | None = None, steps: int | None = None, turns: float | None = None) -> bool:
        """Write the teaching sweep of the focus (its mate's hole or the feature) to a GIF or MP4
        in a worker; True when the job started. The steps and turns default to the play
        control's."""
        m = self.model
        if self._sthread is not None:
            m.message.emit("error", "a sweep is already being written")
            return False
        if not self._typing_committed("export size sweep"):
            return False
        target = sweep_target(m.scene, m.focus)
        if target is None:
            m.message.emit("error", "size sweep not written: pick a mate or a feature with a size range to sweep")
            return False
        subject, fid = target
        play = self.whatif.play
        steps = play.steps.value() if steps is None else steps
        turns = (1.0 if play.turn.isChecked() else 0.0) if turns is None else turns
        if path is None:
            start = default_export_path(m.path, subject_label(m.scene, subject), "sweep", ".gif", str(Path.cwd()))
            path, _ = QFileDialog.getSaveFileName(self, "Export size sweep", start, SWEEP_FILTER)
        if not path:
            return False
        path = os.path.abspath(path)  # the job runs in another working folder
        if Path(path).suffix.lower() not in (".gif", ".mp4"):
            m.message.emit("error", f"{path}: expected a file name ending in .gif or .mp4; nothing was written")
            return False
        if os.path.lexists(path) and not Path(path).is_file():
            m.message.emit("error", f"{path}: is not a regular file (a folder, device or pipe); nothing was written")
            return False
        if not Path(path).parent.is_dir():
            m.message.emit("error", f"{path}: its folder does not exist; nothing was written")
            return False
        view = self.view3d.current_view if self.view3d is not None else "iso"
        self.sweep_progress = QProgressDialog(f"Writing the size sweep of {fid}…", "Cancel", 0, 0, self)
        self.sweep_progress.setWindowTitle("Export size sweep")
        self.sweep_progress.setWindowModality(Qt.WindowModal)
        self.sweep_progress.setMinimumDuration(0)
        self._sthread = QThread(self)
        self._sworker = SweepWorker(m.scene, path, subject, fid, int(steps), float(turns), view)
        self.sweep_progress.canceled.connect(self.cancel_sweep)
        self._sworker.moveToThread(self._sthread)
        self._sthread.started.connect(self._sworker.run)
        self._sworker.progress.connect(self.sweep_progress.setLabelText)
        self._sworker.finished.connect(self._sweep_done)
        self._sworker.failed.connect(self._sweep_failed)
        self._sthread.start()
        return True

    def cancel_sweep(self) -> None:
        if self._sworker is not None:
            self._sworker.cancel()

    def _end_sweep(self) -> bool:
        cancelled = self._sworker is not None and self._sworker.cancelled
        if self.sweep_progress is not None:
            self.sweep_progress.canceled.disconnect()
            self.sweep_progress.reset()
            self.sweep_progress.deleteLater()
            self.sweep_progress = None
        if self._sthread is not None:
            self._sthread.quit()
            self._sthread.wait()
            self._sthread.deleteLater()
        self._sthread, self._sworker = None, None
        return cancelled

    def _sweep_done(self, path: str) -> None:
        self._end_sweep()
        self.model.message.emit("info", f"size sweep written to {path}")
        self.sweepExported.emit(True, path)

    def _sweep_failed(self, msg: str) -> None:
        cancelled = self._end_sweep()
        text = f"size sweep {'cancelled' if cancelled else 'not written'}: {msg}"
        self.model.message.emit("error", text)
        self.sweepExported.emit(False, text)


__all__ = ["ExportActions", "PictureDialog", "SCALES"]
