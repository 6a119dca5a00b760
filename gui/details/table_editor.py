"""Base of the table editors: a QTableWidget whose typed cells stay until accepted.

A cell the model refused keeps the user's text, turns red and carries the message as
tooltip; computed (read-only) cells are tinted so they do not look editable.
"""

from __future__ import annotations

import math

from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtGui import QBrush
from PySide6.QtWidgets import QHeaderView, QTableWidget, QTableWidgetItem

from units_of_measure import UnitError

from .spec_editors import COMPUTED_CELL, INVALID_CELL, EditorContext, SpecEditor


class TableEditor(SpecEditor):
    """Base of the table editors: a QTableWidget whose typed cells stay until accepted."""

    def __init__(self, context: EditorContext, kind: str, columns: list[str], parent=None):
        super().__init__(context, kind, parent)
        self.table = QTableWidget(0, len(columns))
        self.table.setHorizontalHeaderLabels(columns)
        self.table.verticalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Stretch)
        self.table.setSizeAdjustPolicy(QTableWidget.SizeAdjustPolicy.AdjustToContents)
        self.table.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self._last_cell: tuple[int, int] | None = None
        self.table.itemChanged.connect(self._on_item_changed)

    def _on_item_changed(self, item: QTableWidgetItem) -> None:
        self._last_cell = (item.row(), item.column())
        self.cell_edited(item.row(), item.column(), item.text().strip())

    def cell_edited(self, row: int, column: int, text: str) -> None:
        """A cell's text was changed by the user."""
        raise NotImplementedError

    def cell(self, row: int, column: int, text: str = "", editable: bool = True):
        """Set a cell's text (signals blocked) and its editability; return the item."""
        with QSignalBlocker(self.table):
            item = self.table.item(row, column)
            if item is None:
                item = QTableWidgetItem()
                self.table.setItem(row, column, item)
            item.setText(text)
            flags = Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable
            if editable:
                flags |= Qt.ItemFlag.ItemIsEditable
            item.setFlags(flags)
            item.setBackground(QBrush() if editable else QBrush(COMPUTED_CELL))
            item.setToolTip("" if editable else "computed")
        return item

    def show_error(self, message: str) -> None:
        super().show_error(message)
        if self._last_cell is not None:
            item = self.table.item(*self._last_cell)
            if item is not None:
                with QSignalBlocker(self.table):
                    item.setBackground(INVALID_CELL)
                    item.setToolTip(message)

    def clear_marks(self) -> None:
        self.clear_error()
        with QSignalBlocker(self.table):
            for row in range(self.table.rowCount()):
                for column in range(self.table.columnCount()):
                    item = self.table.item(row, column)
                    if item is not None and item.flags() & Qt.ItemFlag.ItemIsEditable:
                        item.setBackground(QBrush())
                        item.setToolTip("")

    def fit_height(self) -> None:
        """Size the table to show every row without its own scroll bar."""
        header = self.table.horizontalHeader().height()
        rows = sum(self.table.rowHeight(r) for r in range(self.table.rowCount()))
        self.table.setFixedHeight(header + rows + 2 * self.table.frameWidth() + 2)


def parse_table_number(field: str, text: str) -> float | None:
    """A cell's number (empty -> None), or UnitError naming the field."""
    if not text:
        return None
    try:
        number = float(text.replace("\u2212", "-"))
    except ValueError:
        raise UnitError(field, text, "expected a number") from None
    if not math.isfinite(number):
        raise UnitError(field, text, "expected a finite number")
    return number
