"""The main window's menu bar (File, Edit, View, Help) and its actions, kept in ``win.act`` by
key ("save", "export_report", "undo", ...) so that tests and the panels can trigger them."""

from __future__ import annotations

from PyQt5.QtGui import QKeySequence
from PyQt5.QtWidgets import QAction, QMessageBox

from geom.readout import CAUTION

APP_NAME = "matezone"


def build_menus(win) -> None:
    """Make the menu bar of the main window ``win`` and fill ``win.act``."""
    mb = win.menuBar()
    fm = mb.addMenu("&File")
    win.act = {}

    def add(menu, key, text, slot, shortcut=None, tip=""):
        a = QAction(text, win)
        if shortcut is not None:
            a.setShortcut(QKeySequence(shortcut))
        a.setStatusTip(tip)
        a.triggered.connect(lambda _c=False: slot())
        menu.addAction(a)
        win.act[key] = a
        return a

    add(fm, "new", "&New", win.file_new, QKeySequence.New, "Start a new scene with one hole, one pin and a mate")
    add(fm, "open", "&Open…", win.file_open, QKeySequence.Open, "Open a scene file")
    win.recent_menu = fm.addMenu("Open &recent")
    win.recent_menu.aboutToShow.connect(win._fill_recent)
    fm.addSeparator()
    add(fm, "save", "&Save", win.file_save, QKeySequence.Save)
    add(fm, "save_as", "Save &as…", win.file_save_as, QKeySequence.SaveAs)
    fm.addSeparator()
    add(fm, "load_points", "&Load measured points…", win.load_points_dialog, "Ctrl+L",
        "Read a CSV of points measured on the selected feature and judge the produced part")
    fm.addSeparator()
    add(fm, "export_report", "Export &report…", win.export_report, "Ctrl+Shift+R",
        "Pictures, PDF and results.json, as `matezone report` writes them")
    add(fm, "export_image", "Export &picture…", win.export_image, "Ctrl+Shift+E",
        "Save the 3D view, or the 2D view shown, as a picture with a caption")
    add(fm, "export_sweep", "Export size s&weep…", win.export_sweep, "Ctrl+Shift+W",
        "Write the size sweep from MMC to LMC (the play control's) as an animated GIF or an MP4")
    add(fm, "open_report_folder", "Open the last report's &folder", win.open_report_folder,
        tip="Show the folder the last report was written to")
    win.act["open_report_folder"].setEnabled(False)
    fm.addSeparator()
    add(fm, "quit", "&Quit", win.close, QKeySequence.Quit)

    em = mb.addMenu("&Edit")
    undo = win.model.undo_stack.createUndoAction(win, "&Undo")
    undo.setShortcut(QKeySequence.Undo)
    redo = win.model.undo_stack.createRedoAction(win, "&Redo")
    redo.setShortcut(QKeySequence.Redo)
    em.addAction(undo)
    em.addAction(redo)
    win.act["undo"], win.act["redo"] = undo, redo
    em.addSeparator()
    add(em, "copy_image", "Copy &image", win.copy_image, "Ctrl+Shift+C",
        "Copy the pane shown (the 3D view, or the 2D view when it has the keyboard focus)")
    add(em, "copy_table", "Copy &table", win.copy_table, "Ctrl+Shift+T",
        "Copy the readout table as tab-separated text")
    em.addSeparator()
    add(em, "worst", "&Worst case", win.model.reset_states, "Ctrl+0",
        "Every feature at maximum material with all of its tolerance used")

    vm = mb.addMenu("&View")
    if win.view3d is not None:
        for i, (v, b) in enumerate(win.view3d.view_buttons.items()):
            add(vm, f"view_{v}", f"Camera: {b.text()}", lambda v=v: win.view3d.set_view(v), f"Ctrl+{i + 1}")
        vm.addSeparator()
        from .panels.layers import StayOpenMenu

        lm = StayOpenMenu("Layers", vm)  # stays open while layers are toggled
        vm.addMenu(lm)
        win.layers_menu = lm
        for a in win.view3d.layer_actions.values():
            lm.addAction(a)

    hm = mb.addMenu("&Help")
    add(hm, "about", "&About matezone", lambda: about(win))


def about(win) -> None:
    """Help > About: what the program does and the caution every report carries."""
    QMessageBox.about(win, "About matezone",
                      "<b>matezone</b> shows the worst-case fit of toleranced holes and pins: "
                      "maximum and least material sizes, bonus (ISO: increase), virtual and resultant "
                      "condition, clearance, fastener tolerances and the conformance of measured parts.<br><br>"
                      + CAUTION)
