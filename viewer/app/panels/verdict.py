"""The verdict banner over the views: the fit (or the part verdict of an inspection) in colour
and in words. What it says comes from :mod:`viewer.windowlogic.banner`; here it is painted."""

from __future__ import annotations

from PyQt5.QtCore import Qt
from PyQt5.QtGui import QFont
from PyQt5.QtWidgets import QFrame, QLabel, QSizePolicy, QVBoxLayout

from viewer.windowlogic.banner import banner

from ..model import SceneModel
from .common import ROLE_LOOK


class VerdictBanner(QFrame):
    """The verdict in colour and in words: for a mate ASSEMBLES / INTERFERES at the sizes set
    and in the worst case; for an inspection geom's one part verdict (``insp.verdict``), word for
    word as the PDF shows it, coloured by its role (:data:`ROLE_LOOK`)."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.state = "none"
        self.role = "none"
        self.setObjectName("verdict")
        lay = QVBoxLayout(self)
        lay.setContentsMargins(10, 6, 10, 6)
        self.headline = QLabel()
        f = QFont()
        f.setPointSize(13)
        f.setBold(True)
        self.headline.setFont(f)
        self.headline.setWordWrap(True)
        self.headline.setTextFormat(Qt.PlainText)  # geom's headline, word for word (it may hold "<" / ">")
        self.detail = QLabel()
        self.detail.setWordWrap(True)
        lay.addWidget(self.headline)
        lay.addWidget(self.detail)
        self.setSizePolicy(QSizePolicy.Preferred, QSizePolicy.Maximum)
        model.statesChanged.connect(self.refresh)
        model.focusChanged.connect(self.refresh)
        model.sceneChanged.connect(self.refresh)
        model.inspectionChanged.connect(self.refresh)
        self.refresh()

    def refresh(self) -> None:
        m = self.model
        b = banner(m.result, m.scene, m.states, m.focus_inspection(), m.shown_inspection(), m.focus_fastener(),
                   m.focus_mate(), m.focus_pattern())
        self.state = b.state
        self._paint(b.role, b.head, b.detail, mark=b.mark)
        if b.tip is not None and self.toolTip() != b.tip:
            self.setToolTip(b.tip)

    def _paint(self, role: str, head: str, detail: str, mark: bool = True) -> None:
        """Colour and mark from :data:`ROLE_LOOK`; ``head`` shown after the mark, word for word."""
        fg, bg, sign = ROLE_LOOK[role]
        self.role = role
        head = f"{sign} {head}" if mark else head
        sheet = f"#verdict {{ background: {bg}; border: 2px solid {fg}; border-radius: 4px; }} QLabel {{ color: {fg}; }}"
        if sheet != self.styleSheet():  # re-styling is costly; a what-if move mostly keeps the colour
            self.setStyleSheet(sheet)
        if head != self.headline.text():
            self.headline.setText(head)
        if detail != self.detail.text():
            self.detail.setText(detail)

    def text(self) -> str:
        return self.headline.text()
