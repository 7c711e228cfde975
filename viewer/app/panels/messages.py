"""The message bar at the bottom of the side panel: the latest message of the model, coloured by
its level; an error is cleared by the next change of the scene."""

from __future__ import annotations

from PyQt5.QtCore import Qt
from PyQt5.QtWidgets import QFrame, QHBoxLayout, QLabel, QToolButton

from viewer.windowlogic.looks import MESSAGE_DEFAULT, MESSAGE_LOOK

from ..model import SceneModel


class MessageBar(QFrame):
    """One line at the bottom of the side panel: the latest message, coloured by level."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(parent)
        self.setObjectName("messageBar")
        lay = QHBoxLayout(self)
        lay.setContentsMargins(6, 3, 6, 3)
        self.label = QLabel()
        self.label.setWordWrap(True)
        self.label.setTextFormat(Qt.PlainText)  # a message quotes file names and typed text: never markup
        self.label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        close = QToolButton()
        close.setText("×")
        close.setToolTip("Dismiss the message")
        close.clicked.connect(self.clear)
        lay.addWidget(self.label, 1)
        lay.addWidget(close)
        model.message.connect(self.show_message)
        model.sceneChanged.connect(lambda: self.clear() if self.level == "error" else None)
        self.level = ""
        self.hide()

    def show_message(self, level: str, text: str) -> None:
        self.level = level
        bg, fg = MESSAGE_LOOK.get(level, MESSAGE_DEFAULT)
        self.setStyleSheet(f"#messageBar {{ background: {bg}; border: 1px solid {fg}; }} QLabel {{ color: {fg}; }}")
        self.label.setText(("Error: " if level == "error" else "") + text)
        self.show()

    def clear(self) -> None:
        self.level = ""
        self.label.clear()
        self.hide()

    def text(self) -> str:
        return self.label.text()
