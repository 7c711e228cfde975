"""The texts over a 3D picture, measured, wrapped and stacked: the text box of a string, words
wrapped to a width (remembered on the actor, so a later string wraps the same way), the scale
caption placed beside the title and readouts, the verdict lines stacked under the readout block.
Used by :mod:`.plotter` (which draws them) and :mod:`.live` (which updates them in place)."""

from __future__ import annotations


def _text_box(text: str, prop) -> tuple[int, int]:
    """(width, height) in pixels of ``text`` drawn with the text property ``prop``."""
    import vtk

    bb = [0, 0, 0, 0]
    vtk.vtkTextRenderer().GetBoundingBox(prop, text, bb, 72)
    return int(bb[1] - bb[0] + 1), int(bb[3] - bb[2] + 1)


def _text_width(text: str, prop) -> int:
    return _text_box(text, prop)[0]


def stack_left(texts, h: int, fs: int) -> None:
    """Stack the verdict and the verdict lines (``texts``: the "readouts" actors of
    :func:`add_to_plotter`, each knowing its kind) under the readout block as its text now is:
    the verdict 0.6 ``fs`` under the block, each verdict line under the one before."""
    top = None
    for t in texts:
        kind = getattr(t, "_matezone_kind", None)
        hgt = _text_box(t.GetInput(), t.GetTextProperty())[1] if t.GetInput() else 0
        if kind == "readouts":
            top = t.GetPosition()[1] - hgt - 0.6 * fs
        elif kind in ("verdict", "verdict line"):
            if top is None:  # no readout block: under the title's row
                top = h - int(0.012 * h) - 3.2 * fs
            t.SetPosition(t.GetPosition()[0], int(top))
            top -= hgt + 0.4 * fs if kind == "verdict" else 1.15 * hgt


def _place_caption(t, kind: str, w: int, h: int, fs: int, left_w: float, y: float) -> float:
    """The scale caption (bold, ``fs`` + 6, shrinking to ``fs`` + 2 before it wraps) or its detail
    line (``fs``) right-aligned at the top right from height ``y`` down, wrapped at words to the
    room the title and readouts leave (``left_w``: the wider of the two): the caption never
    overlaps them. Returns the height the next text starts at."""
    tp = t.GetTextProperty()
    tp.SetVerticalJustificationToTop()
    tp.SetJustificationToRight()
    m = int(0.012 * w)
    room = max(w - 3 * m - left_w, 0.2 * w)
    text = t.GetInput()
    # pyvista's add_text gives the text actor twice its font_size
    sizes = range(2 * (fs + 6), 2 * (fs + 2) - 1, -1) if kind == "caption" else (2 * fs,)
    tp.SetBold(kind == "caption")
    for size in sizes:
        tp.SetFontSize(size)
        if _text_box(text, tp)[0] <= room:
            break
    _set_wrapped(t, text, room)
    t.SetPosition(w - m, y)
    return y - _text_box(t.GetInput(), tp)[1] - 0.3 * fs


def _set_wrapped(t, text: str, width: float, hang: int = 2) -> None:
    """Give the text actor ``t`` the string ``text`` wrapped to ``width`` pixels, remembering
    both (:func:`drawn_text` wraps a later string the same way)."""
    t._matezone_text, t._matezone_wrap, t._matezone_hang = text, width, hang
    t.SetInput(_wrap(text, t.GetTextProperty(), width, hang))


def drawn_text(t, text: str) -> str:
    """``text`` as the text actor ``t`` draws it: wrapped as :func:`_set_wrapped` wrapped its own."""
    width = getattr(t, "_matezone_wrap", None)
    return text if width is None else _wrap(text, t.GetTextProperty(), width, getattr(t, "_matezone_hang", 2))


def source_text(t) -> str:
    """The string a text actor was given, before any wrapping."""
    return getattr(t, "_matezone_text", None) or t.GetInput()


def _wrap(text: str, tp, width: float, hang: int = 2) -> str:
    """``text`` with each of its lines broken at spaces into lines no wider than ``width`` pixels
    (a word longer than that stands on its own line); a broken line goes on indented as far as it
    was, plus ``hang`` spaces."""
    out: list[str] = []
    for line in text.split("\n"):
        if _text_box(line, tp)[0] <= width:
            out.append(line)
            continue
        indent = " " * (len(line) - len(line.lstrip(" ")) + hang)
        rows: list[str] = []
        for word in line.split(" "):
            if rows and (word == "" or _text_box(rows[-1] + " " + word, tp)[0] <= width):
                rows[-1] += " " + word
            else:
                rows.append((indent if rows else "") + word)
        out += rows
    return "\n".join(out)


def _sized(tp, size: int):
    """A copy of the text property ``tp`` at font ``size``."""
    import vtk

    c = vtk.vtkTextProperty()
    c.ShallowCopy(tp)
    c.SetFontSize(size)
    return c


def _actor_box(t) -> tuple[float, float, float, float] | None:
    """(x0, x1, y0, y1) in pixels of a positioned text actor, from its position, justification
    and the size of its text."""
    txt = t.GetInput()
    if not txt:
        return None
    tp = t.GetTextProperty()
    bw, bh = _text_box(txt, tp)
    x, y = t.GetPosition()
    j, v = tp.GetJustification(), tp.GetVerticalJustification()  # 0 left/bottom, 1 centred, 2 right/top
    x0 = x - bw * (j / 2.0)
    y0 = y - bh * (v / 2.0)
    return (x0, x0 + bw, y0, y0 + bh)
