"""A 2D view by its name (:data:`VIEWS_2D`, what the window's tabs and the report ask for), and
saving a figure with matezone's settings.
"""

from __future__ import annotations

from matplotlib.figure import Figure

from geom.analysis import SceneResult
from viewer import style as S

from .aids import DPI, style_context
from .bonus import bonus_chart
from .section import section_view
from .through import through_view

VIEWS_2D = ("through", "section", "bonus")


def draw_view(name: str, res: SceneResult, subject, states=None, exaggeration=None, **kw):
    """Dispatch by view name (one of :data:`VIEWS_2D`); returns ``(Figure, data)``.

    >>> draw_view("plan", None, 0)
    Traceback (most recent call last):
    ...
    ValueError: unknown 2D view 'plan'; expected one of through, section, bonus
    """
    if name == "through":
        return through_view(res, subject, states, exaggeration, **kw)
    if name == "section":
        return section_view(res, subject, states, exaggeration, **kw)
    if name == "bonus":
        return bonus_chart(res, subject, states, **kw)
    raise ValueError(f"unknown 2D view {name!r}; expected one of {', '.join(VIEWS_2D)}")


def save_figure(fig: Figure, path, dpi: int = DPI) -> None:
    """Save with matezone's settings (TrueType text in PDF, text kept as text in SVG)."""
    with style_context():
        fig.savefig(path, dpi=dpi, facecolor=S.BACKGROUND)
