"""The details of one stream: where it runs, the preferred-tear choice, its results and
its initial estimate for when the solver tears it."""

from __future__ import annotations

import html
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
from gui.stream_table import build_rows, stream_names
from model.flowsheet.document import Flowsheet

from .estimate_editor import EstimateEditor


class StreamDetails(QWidget):
    """Route, preferred tear, computed state and initial estimate of one stream."""

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
        self.results.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.results.verticalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Fixed)
        self.results.verticalHeader().setDefaultSectionSize(22)
        self.estimate_editor = EstimateEditor(flowsheet_getter, undo_stack, unit_system_getter)
        layout = QVBoxLayout(self)
        layout.addWidget(self.title_label)
        layout.addWidget(self.route_label)
        layout.addWidget(self.preferred_check)
        layout.addWidget(self.tear_label)
        layout.addWidget(self.results)
        layout.addWidget(self.estimate_editor)
        layout.addStretch(1)
        self.preferred_check.toggled.connect(self._on_preferred_toggled)

    def show_stream(self, name: str) -> None:
        self.stream_name = name
        self.refresh()

    def refresh(self) -> None:
        """Mirror the stream (signals blocked), its results and its estimate."""
        flowsheet = self._flowsheet_getter()
        if self.stream_name not in flowsheet.streams:
            self.title_label.setText("No stream selected.")
            self.route_label.clear()
            self.results.setRowCount(0)
            self.estimate_editor.hide()
            return
        stream = flowsheet.stream(self.stream_name)
        number = "" if stream.number is None else f" {stream.number}"
        self.title_label.setText(f"<b>{html.escape(stream.name)}</b> · stream{number}")
        self.route_label.setText(
            f"From {stream.source} ({stream.source_port}) to {stream.target} ({stream.target_port})"
        )
        with QSignalBlocker(self.preferred_check):
            self.preferred_check.setChecked(stream.preferred_tear)
        self.estimate_editor.show()
        self.estimate_editor.show_stream(stream.name)
        self.set_solution(self._solution)

    def refresh_context(self) -> None:
        """Components or the unit system changed."""
        if self.stream_name in self._flowsheet_getter().streams:
            self.estimate_editor.refresh_context()
        self.set_solution(self._solution)

    def set_solution(self, solution: Any) -> None:
        """Show the stream's computed values; each row is built over every stream of the
        solution, so round-off is shown as 0 exactly as in the stream table."""
        self._solution = solution
        name = self.stream_name
        tears = list(getattr(solution, "tear_streams", []) or [])
        self.tear_label.setText("The solver tears this stream." if name in tears else "")
        if solution is None or name not in solution.streams:
            self.results.setRowCount(1)
            self.results.setVerticalHeaderLabels(["Results"])
            self.results.setItem(0, 0, QTableWidgetItem("Not solved yet."))
            self._fit_results()
            return
        names = stream_names(solution)
        column = names.index(name)
        rows = build_rows(solution, self._unit_system_getter(), names)
        self.results.setRowCount(len(rows))
        self.results.setVerticalHeaderLabels([row.title for row in rows])
        for index, row in enumerate(rows):
            item = QTableWidgetItem(row.text(column) if row.shown else "")
            item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
            self.results.setItem(index, 0, item)
        self._fit_results()

    def result_texts(self) -> dict[str, str]:
        """Row title -> the text shown (for reading the pane as a user does)."""
        return {
            self.results.verticalHeaderItem(r).text(): self.results.item(r, 0).text()
            for r in range(self.results.rowCount())
        }

    def _fit_results(self) -> None:
        """Show every row; the details pane scrolls, not the table."""
        header = self.results.horizontalHeader().height()
        rows = sum(self.results.rowHeight(r) for r in range(self.results.rowCount()))
        self.results.setFixedHeight(header + rows + 2 * self.results.frameWidth() + 2)

    def _on_preferred_toggled(self, checked: bool) -> None:
        if self.stream_name is None:
            return
        flowsheet = self._flowsheet_getter()
        self._undo_stack.push(SetPreferredTearCommand(flowsheet, self.stream_name, checked))
