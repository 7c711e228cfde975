"""The window's two views: the 3D view (:mod:`.view3d`, pyvistaqt) and the 2D views
(:mod:`.view2d`, matplotlib canvases), and what both say when a picture cannot be drawn.

Both rebuild from the model on its signals: the meshes come from :mod:`viewer.scene3d`, the
figures from :mod:`viewer.figures`; nothing here computes a tolerance number. Updates are
coalesced: a burst of slider moves costs one rebuild per event-loop turn (one zero-delay
single-shot timer per view).

``View3D`` and ``Views2D`` are importable from here (loaded on first use, so this module
stays the light common base of the two).
"""

from __future__ import annotations

__all__ = ["DrawError", "draw_problem"]  # and, loaded on first use, View3D and Views2D


class DrawError(ValueError):
    """A picture that cannot be drawn (non-finite coordinates)."""


def draw_problem(what: str, e: BaseException) -> str:
    """The one line shown when a view cannot be drawn; the scene and its numbers are unchanged."""
    why = str(e) if isinstance(e, DrawError) else f"{type(e).__name__}: {e}"
    return (f"the {what} cannot be drawn for this scene ({why}); the scene and the readouts are unchanged")


def __getattr__(name: str):
    if name == "View3D":
        from .view3d import View3D

        return View3D
    if name == "Views2D":
        from .view2d import Views2D

        return Views2D
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
