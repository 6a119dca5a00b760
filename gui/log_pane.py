"""The log: the flowsheet's errors and warnings and the solver's messages.

Clicking an entry that names a block emits ``block_activated(name)`` (the window selects
that block on the diagram); one that names only a stream emits ``stream_activated``.
"""

from __future__ import annotations

import time
from typing import Any

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QBrush, QColor
from PySide6.QtWidgets import (
    QHeaderView,
    QLabel,
    QTreeWidget,
    QTreeWidgetItem,
    QVBoxLayout,
    QWidget,
)

SEVERITY_COLOURS = {
    "error": QColor("#b3261e"),
    "warning": QColor("#8a4b00"),
    "info": QColor("#333333"),
}
BLOCK_ROLE = Qt.ItemDataRole.UserRole
STREAM_ROLE = Qt.ItemDataRole.UserRole + 1


class LogPane(QWidget):
    """Errors, warnings and messages with links to the blocks and streams they name."""

    block_activated = Signal(str)
    stream_activated = Signal(str)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.summary_label = QLabel("No messages.")
        self.tree = QTreeWidget()
        self.tree.setRootIsDecorated(False)
        self.tree.setColumnCount(3)
        self.tree.setHeaderLabels(["", "Where", "Message"])
        self.tree.setWordWrap(True)
        self.tree.setUniformRowHeights(False)
        header = self.tree.header()
        header.setSectionResizeMode(0, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(1, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(2, QHeaderView.ResizeMode.Stretch)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addWidget(self.summary_label)
        layout.addWidget(self.tree, 1)
        self._issue_items: list[QTreeWidgetItem] = []
        self.tree.itemClicked.connect(self._on_clicked)
        self.tree.itemActivated.connect(self._on_clicked)

    def set_issues(self, issues: list[Any]) -> None:
        """Replace the flowsheet's issues (``model.validation.issue.Issue``); messages stay."""
        for item in self._issue_items:
            self.tree.takeTopLevelItem(self.tree.indexOfTopLevelItem(item))
        self._issue_items = []
        for position, issue in enumerate(issues):
            item = self._make_item(
                issue.severity, issue.message, issue.block, getattr(issue, "stream", None)
            )
            self.tree.insertTopLevelItem(position, item)
            self._issue_items.append(item)
        self._update_summary()

    def add_message(self, severity: str, text: str, block: str | None = None) -> None:
        """Add a message ("error", "warning" or "info") below the issues, with the time."""
        item = self._make_item(severity, f"{time.strftime('%H:%M:%S')}  {text}", block, None)
        self.tree.addTopLevelItem(item)
        self.tree.scrollToItem(item)
        self._update_summary()

    def clear(self) -> None:
        self.tree.clear()
        self._issue_items = []
        self._update_summary()

    def entries(self) -> list[tuple[str, str, str]]:
        """``(severity, where, message)`` of every entry, top to bottom."""
        rows = []
        for index in range(self.tree.topLevelItemCount()):
            item = self.tree.topLevelItem(index)
            rows.append((item.text(0), item.text(1), item.text(2)))
        return rows

    def _make_item(
        self, severity: str, text: str, block: str | None, stream: str | None
    ) -> QTreeWidgetItem:
        where = block or stream or ""
        item = QTreeWidgetItem([severity, where, text])
        colour = SEVERITY_COLOURS.get(severity, SEVERITY_COLOURS["info"])
        item.setForeground(0, QBrush(colour))
        item.setToolTip(2, text)
        item.setData(0, BLOCK_ROLE, block)
        item.setData(0, STREAM_ROLE, stream)
        if where:
            item.setToolTip(1, f"Click to select {where}")
        return item

    def _update_summary(self) -> None:
        severities = [
            self.tree.topLevelItem(i).text(0) for i in range(self.tree.topLevelItemCount())
        ]
        errors, warnings = severities.count("error"), severities.count("warning")
        if not severities:
            self.summary_label.setText("No messages.")
            return
        self.summary_label.setText(
            f"{errors} error{'s' if errors != 1 else ''} · "
            f"{warnings} warning{'s' if warnings != 1 else ''} · {len(severities)} entries"
        )

    def _on_clicked(self, item: QTreeWidgetItem, _column: int = 0) -> None:
        block = item.data(0, BLOCK_ROLE)
        stream = item.data(0, STREAM_ROLE)
        if block:
            self.block_activated.emit(block)
        elif stream:
            self.stream_activated.emit(stream)
