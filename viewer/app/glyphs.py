"""Characteristic symbols in the window's fonts.

geom writes feature-control frames with the symbols of the trade (⌖ position, ⟂ perpendicularity,
...). Many desktop fonts lack some of them and Qt then draws an empty box. At start-up the window
looks for an installed family that has them (``fonts-symbola`` on Debian has all; DejaVu has ⟂ in
its Sans Mono face only) and appends it to the application font's families; a symbol that no
installed family has is written as its word instead ("position", "perpendicularity", ...).
"""

from __future__ import annotations

from PyQt5.QtGui import QFont, QFontDatabase, QFontInfo, QRawFont

# symbol -> what is written where no installed font has it
WORDS = {
    "\u2316": "position",  # ⌖
    "\u27c2": "perpendicularity",  # ⟂
    "\u2225": "parallelism",  # ∥
    "\u2220": "angularity",  # ∠
    "\u23e4": "straightness",  # ⏤
    "\u2300": "\u00d8",  # ⌀ -> Ø (Latin-1, in every font)
}

_state: dict = {}


def _has(family: str, ch: str) -> bool:
    raw = QRawFont.fromFont(QFont(family))
    return raw.isValid() and raw.familyName().lower() == family.lower() and raw.supportsCharacter(ord(ch))


def setup(app) -> dict[str, str | None]:
    """Pick the families that draw the symbols and add them to the application font (call once
    the QApplication exists). Returns symbol -> family drawing it (None: written as a word)."""
    base = app.font()
    fams = QFontDatabase().families()
    primary = QFontInfo(base).family()  # the family actually used (not an alias like "Sans Serif")
    found: dict[str, str | None] = {}
    extra: list[str] = []
    for ch in WORDS:
        fam = primary if _has(primary, ch) else next((f for f in extra if _has(f, ch)), None)
        if fam is None:
            fam = next((f for f in fams if _has(f, ch)), None)
            if fam is not None:
                extra.append(fam)
        found[ch] = fam
    if extra:
        f = QFont(base)
        f.setFamily(primary)
        f.setFamilies([primary] + extra)
        app.setFont(f)
    _state["found"] = found
    _state["extra"] = extra
    return found


def missing() -> set[str]:
    """Symbols no installed family draws (empty before :func:`setup`)."""
    return {ch for ch, fam in _state.get("found", {}).items() if fam is None}


def symbol_families() -> list[str]:
    """Families added for the symbols (for style sheets that name a family of their own)."""
    return list(_state.get("extra", []))


def ui_text(text: str) -> str:
    """``text`` with every symbol no installed font draws replaced by its word."""
    for ch in missing():
        if ch in text:
            word = WORDS[ch]
            text = text.replace(ch + " ", word + " ").replace(ch, word if len(word) == 1 else word + " ")
    return text


def mono_css() -> str:
    """A ``font-family`` list for monospaced text that still finds the symbols."""
    return ", ".join(["monospace"] + [f"'{f}'" for f in symbol_families()])
