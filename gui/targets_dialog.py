"""The targets dialog (Solve → Targets…): add, remove and edit the case's targets.

One row per target: the adjusted spec (chosen from the flowsheet's numeric specs, or
typed), its lower and upper limits and their unit, the measured result (chosen from the
streams' quantities and the blocks' duties, or typed), the wanted value and its unit,
and the last solve's outcome. OK checks every row (a row that cannot be read is named
with its text, nothing is lost) and sets the targets with one undoable command; the
window's solve (F5) then meets them. "Use adjusted values" writes the last solve's
adjusted values into the specs, also as one undo step.
"""

from __future__ import annotations

import math
from typing import Any

from PySide6.QtWidgets import (
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from model.errors import LoopwrightError
from model.flowsheet.spec_numbers import KEYED_KINDS, QUANTITY_KINDS, spec_unit
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.flowsheet.target_definition import (
    RESULT_QUANTITIES,
    SpecAddress,
    Target,
    parse_result_address,
    parse_spec_address,
)

COLUMNS = ("Adjusted spec", "Lower", "Upper", "Unit", "Measured", "Wanted", "Wanted unit", "Result")


def spec_choices(flowsheet: Any) -> list[str]:
    """Every numeric spec of the flowsheet that is set, as an address text."""
    choices = []
    for block in flowsheet.blocks.values():
        for spec_field in block.block_kind.spec_fields:
            value = block.specs.get(spec_field.name)
            if value is None:
                continue
            if spec_field.kind in QUANTITY_KINDS:
                choices.append(str(SpecAddress(block.name, spec_field.name)))
            elif spec_field.kind == "reactions":
                for number in range(1, len(value) + 1):
                    choices.append(str(SpecAddress(block.name, "reactions", str(number))))
            elif spec_field.kind in KEYED_KINDS:
                keys = value.values if isinstance(value, ComponentAmounts) else value
                for key in keys:
                    choices.append(str(SpecAddress(block.name, spec_field.name, key)))
    return choices


def result_choices(flowsheet: Any) -> list[str]:
    """Every result a target can measure (or a sweep record), as an address text."""
    choices = []
    for stream in flowsheet.streams:
        for quantity, (_, keyed) in RESULT_QUANTITIES.items():
            if quantity == "duty":
                continue
            if keyed:
                choices += [f"{stream}.{quantity}[{c}]" for c in flowsheet.component_names()]
            else:
                choices.append(f"{stream}.{quantity}")
    choices += [f"{block}.duty" for block, b in flowsheet.blocks.items() if b.kind != "Product"]
    return choices


def _combo(choices: list[str], text: str) -> QComboBox:
    combo = QComboBox()
    combo.setEditable(True)
    combo.addItems(choices)
    combo.setCurrentText(text)
    combo.setMinimumContentsLength(28)
    return combo


class TargetsDialog(QDialog):
    """Edit the targets of ``flowsheet``; :meth:`targets` is the list read from the rows."""

    def __init__(self, flowsheet: Any, outcome: Any = None, parent: QWidget | None = None):
        super().__init__(parent)
        self.setWindowTitle("Targets")
        self.flowsheet = flowsheet
        self._specs = spec_choices(flowsheet)
        self._results = result_choices(flowsheet)
        self.table = QTableWidget(0, len(COLUMNS))
        self.table.setHorizontalHeaderLabels(COLUMNS)
        self.message = QLabel(
            "Each target adjusts one spec within its limits until the measured result has "
            "the wanted value; F5 solves with every target met."
        )
        self.message.setWordWrap(True)
        add, remove = QPushButton("Add target"), QPushButton("Remove target")
        add.clicked.connect(lambda: self.add_row())
        remove.clicked.connect(self.remove_row)
        buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        row = QHBoxLayout()
        row.addWidget(add)
        row.addWidget(remove)
        row.addStretch(1)
        layout = QVBoxLayout(self)
        layout.addWidget(self.message)
        layout.addWidget(self.table, 1)
        layout.addLayout(row)
        layout.addWidget(buttons)
        results = list(outcome.results) if outcome is not None else []
        for k, target in enumerate(flowsheet.targets):
            self.add_row(target, results[k] if k < len(results) else None)
        self.resize(1100, 320)
        self._read: list[Target] = list(flowsheet.targets)

    def add_row(self, target: Target | None = None, result: Any = None) -> int:
        row = self.table.rowCount()
        self.table.insertRow(row)
        adjusted = str(target.adjusted) if target else ""
        measured = str(target.measured) if target else ""
        self.table.setCellWidget(row, 0, _combo(self._specs, adjusted))
        self.table.setCellWidget(row, 4, _combo(self._results, measured))
        texts = ["", "", "", "", "", "", ""]
        if target is not None:
            texts = [
                "",
                f"{target.lower:g}",
                f"{target.upper:g}",
                target.unit,
                "",
                f"{target.wanted.value:g}",
                target.wanted.unit,
            ]
        for column in (1, 2, 3, 5, 6):
            self.table.setItem(row, column, QTableWidgetItem(texts[column]))
        outcome = "" if result is None else _result_text(result)
        item = QTableWidgetItem(outcome)
        item.setFlags(item.flags() & ~item.flags().ItemIsEditable)
        self.table.setItem(row, 7, item)
        self.table.resizeColumnsToContents()
        return row

    def remove_row(self) -> None:
        row = self.table.currentRow()
        if row >= 0:
            self.table.removeRow(row)

    def set_row(self, row: int, texts: dict[int, str]) -> None:
        """Type ``texts`` (column -> text) into a row (as the user would)."""
        for column, text in texts.items():
            widget = self.table.cellWidget(row, column)
            if widget is not None:
                widget.setCurrentText(text)
            else:
                self.table.item(row, column).setText(text)

    def _text(self, row: int, column: int) -> str:
        widget = self.table.cellWidget(row, column)
        if widget is not None:
            return widget.currentText().strip()
        item = self.table.item(row, column)
        return item.text().strip() if item is not None else ""

    def read_targets(self) -> list[Target]:
        """The rows as targets; LoopwrightError/ValueError naming the row and its text."""
        targets = []
        for row in range(self.table.rowCount()):
            where = f"target {row + 1}"
            try:
                adjusted = parse_spec_address(self._text(row, 0))
                unit = self._text(row, 3)
                if not unit and adjusted.block in self.flowsheet.blocks:
                    try:
                        unit = spec_unit(self.flowsheet.blocks, adjusted)
                    except LoopwrightError:
                        unit = ""
                lower, upper = (
                    _number(self._text(row, c), name) for c, name in ((1, "lower"), (2, "upper"))
                )
                measured = parse_result_address(self._text(row, 4))
                wanted = _number(self._text(row, 5), "wanted")
            except (LoopwrightError, ValueError) as error:
                raise ValueError(f"{where}: {error}") from None
            targets.append(
                Target(
                    adjusted,
                    lower,
                    upper,
                    unit,
                    measured,
                    TypedQuantity(wanted, self._text(row, 6)),
                )
            )
        return targets

    def accept(self) -> None:
        try:
            self._read = self.read_targets()
        except ValueError as error:
            self.message.setText(f"<b>Not accepted:</b> {error}")
            return
        super().accept()

    def targets(self) -> list[Target]:
        return list(self._read)


def _number(text: str, name: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise ValueError(f"{name}: {text!r} is not a number") from None
    if not math.isfinite(value):
        raise ValueError(f"{name}: {text!r} is not a finite number")
    return value


def _result_text(result: Any) -> str:
    from model.solve.targets import in_wanted_unit

    if result.status == "met":
        return (
            f"met: {result.adjusted:.9g} gives {in_wanted_unit(result.target, result.measured)} "
            f"({result.iterations} outer iterations)"
        )
    return f"{result.status}: {result.message}"
