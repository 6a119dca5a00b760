"""The separator's split table: the fraction of each component sent to the first outlet.

Components left empty go wholly to the second outlet (the model's rule), which the
read-only second column shows.
"""

from __future__ import annotations

from PySide6.QtWidgets import QHBoxLayout, QPushButton, QVBoxLayout, QWidget

from model.flowsheet.spec_values import ComponentAmounts
from units_of_measure import UnitError, format_value, parse_quantity

from .spec_editors import EditorContext, number_text
from .table_editor import TableEditor

SPLIT_UNIT = "fraction to first outlet"


class SplitTable(TableEditor):
    """Per component: fraction to the first outlet (editable) and to the second (shown)."""

    def __init__(self, context: EditorContext, parent: QWidget | None = None) -> None:
        super().__init__(context, "component_fractions", ["To first outlet", "To second"], parent)
        self._value: ComponentAmounts | None = None
        self._names: list[str] = []
        self.all_first_button = QPushButton("All to first")
        self.all_second_button = QPushButton("All to second")
        self.all_first_button.setToolTip("Send the selected components wholly to the first outlet")
        self.all_second_button.setToolTip(
            "Send the selected components wholly to the second outlet"
        )
        buttons = QHBoxLayout()
        buttons.addWidget(self.all_first_button)
        buttons.addWidget(self.all_second_button)
        buttons.addStretch(1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.table)
        layout.addLayout(buttons)
        layout.addWidget(self.message_label)
        self.all_first_button.clicked.connect(lambda: self._set_selected("1"))
        self.all_second_button.clicked.connect(lambda: self._set_selected(""))
        self.refresh_context()

    def refresh_context(self) -> None:
        flowsheet = self.context.flowsheet
        given = self._value.values if self._value else {}
        names = flowsheet.component_names()
        self._names = names + [n for n in given if n not in names]
        headers = []
        for port, words in (("out1", "To first outlet"), ("out2", "To second")):
            stream = flowsheet.stream_out_of(self.context.block_name, port)
            headers.append(f"{words} ({stream.name})" if stream else words)
        self.table.setHorizontalHeaderLabels(headers)
        self.table.setRowCount(len(self._names))
        self.table.setVerticalHeaderLabels(self._names)
        for row, name in enumerate(self._names):
            self.cell(row, 0, number_text(given[name]) if name in given else "")
            second = 1.0 - given[name] if name in given else 1.0
            self.cell(row, 1, format_value(second, 6), editable=False)
        self.fit_height()

    def set_value(self, value: ComponentAmounts | None) -> None:
        self._value = value
        self.clear_marks()
        self.refresh_context()

    def cell_edited(self, row: int, column: int, text: str) -> None:
        self._emit_from_cells()

    def _set_selected(self, text: str) -> None:
        rows = sorted({index.row() for index in self.table.selectedIndexes()})
        if not rows:
            return
        for row in rows:
            self.cell(row, 0, text)
        self._last_cell = (rows[0], 0)
        self._emit_from_cells()

    def _emit_from_cells(self) -> None:
        values: dict[str, float] = {}
        for row, name in enumerate(self._names):
            text = self.table.item(row, 0).text().strip()
            if not text:
                continue
            field = f"{self.context.block_name}.split[{name}]"
            try:
                values[name] = float(parse_quantity(text, "fraction", field).magnitude)
            except UnitError as error:
                self._last_cell = (row, 0)
                self.show_error(str(error))
                return
        self.edited.emit(ComponentAmounts(values, SPLIT_UNIT) if values else None)
