"""``matezone view [SCENE] [--screenshot PNG]``: the desktop window.

The display is checked before Qt is touched: without one, Qt would abort the process. With no
display the command says so, points to ``matezone report`` and exits 2.
"""

from __future__ import annotations

import ctypes
import ctypes.util
import os
import sys

EXIT_BAD_INPUT = 2
NO_DISPLAY_HINT = ("to make the pictures, the PDF and results.json without a display, run: "
                   "matezone report SCENE --out FOLDER")


def _x11_reachable(display: str) -> bool:
    """Can an X client connect to ``display``? (libxcb, as Qt's xcb platform would.)"""
    name = ctypes.util.find_library("xcb")
    if not name:
        return True  # cannot tell without libxcb; let Qt try
    try:
        xcb = ctypes.CDLL(name)
    except OSError:
        return True
    xcb.xcb_connect.restype = ctypes.c_void_p
    xcb.xcb_connect.argtypes = [ctypes.c_char_p, ctypes.c_void_p]
    xcb.xcb_connection_has_error.argtypes = [ctypes.c_void_p]
    xcb.xcb_disconnect.argtypes = [ctypes.c_void_p]
    conn = xcb.xcb_connect(display.encode(), None)
    if not conn:
        return False
    bad = xcb.xcb_connection_has_error(conn)
    xcb.xcb_disconnect(conn)
    return bad == 0


def _wayland_plugin_present() -> bool:
    from viewer.app.platform import wayland_plugin_present

    return wayland_plugin_present()


def display_problem(env=None) -> str | None:
    """Why the window cannot open here, or None when a display is reachable."""
    env = os.environ if env is None else env
    platform = env.get("QT_QPA_PLATFORM", "")
    if platform.split(":")[0] in ("offscreen", "minimal"):
        return f"QT_QPA_PLATFORM={platform} gives the 3D view no OpenGL context; the viewer needs a display"
    display, wayland = env.get("DISPLAY", ""), env.get("WAYLAND_DISPLAY", "")
    if display:
        if _x11_reachable(display):
            return None
        if not wayland:
            return f"cannot connect to the display {display!r}"
    if wayland:
        if _wayland_plugin_present():
            return None
        return f"a Wayland display ({wayland!r}) is set but Qt has no Wayland plugin here and no X display is set"
    return "no display (neither DISPLAY nor WAYLAND_DISPLAY is set)"


def run(args, load) -> int:
    from matezone.cli import demo_scene

    problem = display_problem()
    if problem:
        print(f"matezone: the viewer cannot open: {problem}; {NO_DISPLAY_HINT}", file=sys.stderr)
        return EXIT_BAD_INPUT
    path = args.scene or str(demo_scene())
    scene = load(path)  # a bad file: UserError, one line, exit 2, before any window

    from viewer.app.main import run_window

    return run_window(scene, path, screenshot=getattr(args, "screenshot", None))
