"""The readout table under the views: quantity, value and formula rows for the focus (the
what-if state first, then the fixed boundaries; for an inspection every reading of geom's
result). The rows come from :mod:`viewer.windowlogic.readouts` and
:mod:`viewer.windowlogic.inspection`; here they are put on the table, and a what-if move sets
only the texts that changed."""

from __future__ import annotations

from PyQt5.QtCore import Qt
from PyQt5.QtGui import QBrush, QColor
from PyQt5.QtWidgets import QAbstractItemView, QHeaderView, QTableWidget, QTableWidgetItem

from viewer.windowlogic.inspection import inspection_table
from viewer.windowlogic.readouts import FEATURE_HEAD, Table, fixed_rows, focus_table

from ..glyphs import ui_text
from ..model import SceneModel


class ReadoutTable(QTableWidget):
    """Quantity, value and formula rows: the what-if state first, then the fixed boundaries.
    Every number and formula comes from geom."""

    def __init__(self, model: SceneModel, parent=None):
        super().__init__(0, 3, parent)
        self.model = model
        self.setHorizontalHeaderLabels(["Quantity", "Value", "Formula"])
        self.verticalHeader().hide()
        self.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.setWordWrap(False)
        h = self.horizontalHeader()
        h.setSectionResizeMode(0, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(1, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(2, QHeaderView.Stretch)
        self.values: dict[tuple[str, str], str] = {}  # (feature id, quantity) -> value shown
        self._looks: list = []  # (bold, bg, fg) of the rows shown
        self._fixed: tuple = (None, {})  # (result, (feature id, units, standard) -> its fixed rows)
        model.statesChanged.connect(self.refresh)
        model.focusChanged.connect(self.refresh)
        model.sceneChanged.connect(self.refresh)
        model.inspectionChanged.connect(self.refresh)
        self.refresh()

    def _apply(self, lines) -> None:
        """Show ``lines``. Same number of rows with the same looks as shown: only the texts that
        differ are set (a what-if move changes a few numbers, and re-making every item costs more
        than the rest of the readout); otherwise the rows are made anew."""
        looks = [ln.look for ln in lines]
        if looks == self._looks and self.rowCount() == len(lines):
            changed = [(r, c, text, ln.tip) for r, ln in enumerate(lines)
                       for c, text in enumerate(ln.cells) if self.item(r, c).text() != text]
            if not changed:
                return
            # the columns sized to their contents would be measured again after every single
            # text (all rows each time): hold them while the texts change, measure once after
            head = self.horizontalHeader()
            modes = [head.sectionResizeMode(i) for i in range(self.columnCount())]
            for i, mode in enumerate(modes):
                if mode == QHeaderView.ResizeToContents:
                    head.setSectionResizeMode(i, QHeaderView.Interactive)
            for r, c, text, tip in changed:
                it = self.item(r, c)
                it.setText(text)
                it.setToolTip(tip or text)
            for i, mode in enumerate(modes):
                if mode == QHeaderView.ResizeToContents:
                    head.setSectionResizeMode(i, mode)
            return
        self.setRowCount(0)
        self.setRowCount(len(lines))
        for r, ln in enumerate(lines):
            bold, bg, fg = ln.look
            for c, text in enumerate(ln.cells):
                it = QTableWidgetItem(text)
                if bold:
                    f = it.font()
                    f.setBold(True)
                    it.setFont(f)
                if bg:
                    it.setBackground(QBrush(QColor(bg)))
                if fg and c < 2:
                    it.setForeground(QBrush(QColor(fg)))
                if c == 1:
                    it.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                it.setToolTip(ln.tip or text)
                self.setItem(r, c, it)
        self._looks = looks

    def refresh(self) -> None:
        m = self.model
        self.setUpdatesEnabled(False)
        fid = m.focus_inspection()
        if fid is not None:
            insp = m.shown_inspection()
            if insp is not None:
                t = inspection_table(insp, ui_text)
                self.values = t.values
                self.setWordWrap(True)
                self._apply(t.lines)
                self.resizeRowsToContents()
            else:
                t = Table(ui_text)
                t.add((f"inspection of {fid}", "", "no result yet: load measured points"), bold=True, bg=FEATURE_HEAD)
                self.values = t.values
                self._apply(t.lines)
            self.setUpdatesEnabled(True)
            return
        self.setWordWrap(False)
        t = focus_table(m.result, m.scene, m.states, m.focus_features(), m.focus_mate(), m.focus_fastener(),
                        ui_text, self._fixed_rows, pattern=m.focus_pattern())
        self.values = t.values
        self._apply(t.lines)
        self.setUpdatesEnabled(True)

    def _fixed_rows(self, res, fid: str, u, st) -> list:
        """geom's rows for the feature's limits and boundaries: they depend on the analysed
        scene only (not on the what-if state), so they are formatted once per result."""
        key = (fid, u, st)
        if self._fixed[0] is not res:
            self._fixed = (res, {})
        rows = self._fixed[1].get(key)
        if rows is None:
            rows = self._fixed[1][key] = fixed_rows(res, fid, u, st)
        return rows

    def value(self, fid: str, quantity: str) -> str:
        return self.values[(fid, quantity)]
