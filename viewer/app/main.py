"""Start the window: the QApplication, the exception hook, the optional screenshot-and-exit."""

from __future__ import annotations

import sys

from PyQt5.QtCore import QTimer
from PyQt5.QtWidgets import QApplication

SCREENSHOT_TIMEOUT_MS = 120_000


def make_window(scene, path: str | None):
    from .model import SceneModel
    from .window import MainWindow

    model = SceneModel(scene, path)
    return MainWindow(model)


def install_excepthook(window) -> None:
    """Exceptions that reach the event loop are shown in the window; it keeps running."""

    def hook(etype, value, tb):
        if issubclass(etype, KeyboardInterrupt):
            QApplication.instance().quit()
            return
        try:
            window.show_exception(etype, value, tb)
        except Exception:  # the window itself is broken: at least tell the terminal
            sys.__excepthook__(etype, value, tb)

    sys.excepthook = hook


def run_window(scene, path: str | None, screenshot: str | None = None) -> int:
    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("matezone")
    app.setOrganizationName("matezone")
    win = make_window(scene, path)
    install_excepthook(win)
    if path:
        win._add_recent(path)
    result = {"code": 0}
    if screenshot:
        def shoot():
            try:
                win.save_screenshot(screenshot)
            except OSError as e:
                print(f"matezone: {e}", file=sys.stderr)
                result["code"] = 2
            app.exit(result["code"])

        def after_render():
            win.view3d.rendered.disconnect(after_render)
            QTimer.singleShot(300, shoot)  # let the 2D tab and the panels paint too

        def give_up():
            print("matezone: the window did not render in time; no screenshot written", file=sys.stderr)
            app.exit(2)

        win.view3d.rendered.connect(after_render)
        QTimer.singleShot(SCREENSHOT_TIMEOUT_MS, give_up)
    win.show()
    win.view3d.schedule()
    win.views2d.schedule()
    code = app.exec_()
    return result["code"] if screenshot else code
