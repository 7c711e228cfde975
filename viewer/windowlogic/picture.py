"""The window's picture exports, without Qt: the caption block (title, part, state, verdict,
scale) put below a picture of the 3D view or a 2D tab, and the readout table as tab-separated
text for the clipboard. The caption is drawn with matplotlib onto a white band as wide as the
picture, so the saved file shows what the window showed and says what it is.

>>> table_tsv(["Quantity", "Value"], [["size", "8.000"], ["bonus", "0.000"]])
'Quantity\\tValue\\nsize\\t8.000\\nbonus\\t0.000\\n'
"""

from __future__ import annotations

import numpy as np

from geom.model import Scene

CAPTION_PT = 9.0  # the caption's type size at scale 1 (points at 100 dpi)
LINE = 1.45  # line pitch, in type sizes


def part_text(scene: Scene, focus: tuple[str, object]) -> str:
    """What the picture shows, in words: a mate (hole with pin), a feature, an inspection or a
    fastener."""
    kind, key = focus
    if kind == "mate":
        m = scene.mates[key]
        return f"mate {key + 1}: hole {m.hole} with pin {m.pin}"
    if kind == "feature":
        return f"{scene.feature(key).kind.value} {key}"
    if kind == "inspection":
        return f"inspection of {scene.feature(key).kind.value} {key} (as measured)"
    if kind == "fastener":
        return f"fastener {key}"
    return "empty scene"


def state_text(scene: Scene, states, fids) -> str:
    """The what-if state of the features ``fids``: size, share of the tolerance used, tilt."""
    u = scene.units
    parts = []
    for fid in fids:
        st = states[fid]
        parts.append(f"{fid} size {u.fmt(st.size)} {u.value}, {st.share * 100:.0f}% of the tolerance used, "
                     f"tilt {st.direction_deg:.0f} deg")
    return "; ".join(parts) if parts else "no what-if state"


def caption_lines(title: str, part: str, state: str, verdict: str, scale: str) -> list[str]:
    """The caption block's lines, labelled.

    >>> caption_lines("Cap", "mate 1", "h size 8", "ASSEMBLES", "x20")[3]
    'Verdict: ASSEMBLES'
    """
    return [f"{title}", f"Part: {part}", f"State: {state}", f"Verdict: {verdict}", f"Scale: {scale}"]


def caption_height(n_lines: int, scale: float = 1.0) -> int:
    """The caption band's height in pixels for ``n_lines`` at ``scale`` (1: 100 dpi).

    >>> caption_height(5), caption_height(5, 2.0)
    (101, 201)
    """
    px = CAPTION_PT * scale * 100.0 / 72.0
    return int(round((n_lines * LINE + 0.8) * px))


def caption_band(lines: list[str], width: int, scale: float = 1.0) -> np.ndarray:
    """A white (h, width, 3) uint8 band holding ``lines`` in dark type, left-aligned; long lines
    are cut with an ellipsis to fit the width."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from viewer import style as S

    dpi = 100.0 * scale
    h = caption_height(len(lines), scale)
    fig = Figure(figsize=(width / dpi, h / dpi), dpi=dpi, facecolor="white")
    FigureCanvasAgg(fig)
    chars = max(20, int(width / (CAPTION_PT * scale * 100.0 / 72.0 * 0.55)))  # a rough average glyph width
    pitch = LINE * CAPTION_PT * scale * 100.0 / 72.0 / h
    for i, text in enumerate(lines):
        t = text if len(text) <= chars else text[: chars - 1] + "…"
        fig.text(6 / width, 1.0 - (0.4 * pitch + pitch * (i + 0.75)), t, fontsize=CAPTION_PT,
                 color=S.TEXT, family=S.FONT_FAMILY, weight="bold" if i == 0 else "normal",
                 parse_math=False)
    fig.canvas.draw()
    band = np.asarray(fig.canvas.buffer_rgba())[..., :3].copy()
    if band.shape[1] != width or band.shape[0] != h:  # rounding of inches: pad or cut to the size
        out = np.full((h, width, 3), 255, np.uint8)
        hh, ww = min(h, band.shape[0]), min(width, band.shape[1])
        out[:hh, :ww] = band[:hh, :ww]
        band = out
    return band


def with_caption(img: np.ndarray, lines: list[str], scale: float = 1.0) -> np.ndarray:
    """``img`` ((h, w, 3 or 4) uint8) with the caption band below it: (h + band, w, 3)."""
    rgb = np.asarray(img)[..., :3].astype(np.uint8)
    return np.vstack([rgb, caption_band(lines, rgb.shape[1], scale)])


def table_tsv(header: list[str], rows: list[list[str]]) -> str:
    """A table as tab-separated text, one row a line (tabs and line breaks inside a cell become
    spaces), header first."""
    def clean(c: str) -> str:
        return " ".join(str(c).replace("\t", " ").split())

    return "".join("\t".join(clean(c) for c in r) + "\n" for r in [header, *rows])
