"""The details of one stream: where it runs, the preferred-tear choice and its results."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import (
    QCheckBox,
    QHeaderView,
    QLabel,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from gui.commands_specs import SetPreferredTearCommand
from gui.stream_table import build_rows, shown_text
from model.flowsheet import Flowsheet


class StreamDetails(QWidget):
    """Route, preferred tear and computed state of one stream."""

    def __init__(
        self,
        flowsheet_getter: Callable[[], Flowsheet],
        undo_stack: QUndoStack,
        unit_system_getter: Callable[[], str],
        parent: QWidget | None = None,
    ) -> None:
        super().__init__(parent)
        self._flowsheet_getter = flowsheet_getter
        self._undo_stack = undo_stack
        self._unit_system_getter = unit_system_getter
        self.stream_name: str | None = None
        self._solution: Any = None
        self.title_label = QLabel()
        self.route_label = QLabel()
        self.route_label.setWordWrap(True)
        self.preferred_check = QCheckBox("Preferred tear stream")
        self.preferred_check.setToolTip(
            "The solver tears this stream when a recycle loop needs a tear and this choice "
            "breaks it; other tears are chosen to break the remaining loops."
        )
        self.tear_label = QLabel()
        self.tear_label.setWordWrap(True)
        self.results = QTableWidget(0, 1)
        self.results.setHorizontalHeaderLabels(["Value"])
        self.results.setEditTriggers(QTableWidget.EditTrigger.NoEditTriggers)
        self.results.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Stretch)
        layout = QVBoxLayout(self)
        layout.addWidget(self.title_label)
        layout.addWidget(self.route_label)
        layout.addWidget(self.preferred_check)
        layout.addWidget(self.tear_label)
        layout.addWidget(self.results, 1)
        self.preferred_check.toggled.connect(self._on_preferred_toggled)

    def show_stream(self, name: str) -> None:
        self.stream_name = name
        self.refresh()

    def refresh(self) -> None:
        """Mirror the stream (signals blocked) and its results."""
        flowsheet = self._flowsheet_getter()
        if self.stream_name not in flowsheet.streams:
            self.title_label.setText("No stream selected.")
            self.route_label.clear()
            self.results.setRowCount(0)
            return
        stream = flowsheet.stream(self.stream_name)
        self.title_label.setText(f"<b>{stream.name}</b> · stream")
        self.route_label.setText(
            f"From {stream.source} ({stream.source_port}) to {stream.target} ({stream.target_port})"
        )
        with QSignalBlocker(self.preferred_check):
            self.preferred_check.setChecked(stream.preferred_tear)
        self.set_solution(self._solution)

    def set_solution(self, solution: Any) -> None:
        self._solution = solution
        name = self.stream_name
        tears = list(getattr(solution, "tear_streams", []) or [])
        self.tear_label.setText("The solver tears this stream." if name in tears else "")
        if solution is None or name not in solution.streams:
            self.results.setRowCount(1)
            self.results.setVerticalHeaderLabels(["Results"])
            self.results.setItem(0, 0, QTableWidgetItem("Not solved yet."))
            return
        rows = build_rows(solution, self._unit_system_getter(), [name])
        self.results.setRowCount(len(rows))
        self.results.setVerticalHeaderLabels([row.title for row in rows])
        for index, row in enumerate(rows):
            text = shown_text(row.shown[0]) if row.shown else ""
            item = QTableWidgetItem(text)
            item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
            self.results.setItem(index, 0, item)

    def _on_preferred_toggled(self, checked: bool) -> None:
        if self.stream_name is None:
            return
        flowsheet = self._flowsheet_getter()
        self._undo_stack.push(SetPreferredTearCommand(flowsheet, self.stream_name, checked))
