"""The stream table: every stream of a solution as a column, in the chosen unit system.

Columns follow the streams' numbers (``model.report.stream_numbers``; without numbers
the flowsheet's stream order); each header shows the number above the stream's name,
as the diagram labels its line; tear streams are marked in teal with "(tear)". Rows:
phase, temperature, pressure, total molar flow, mass flow, enthalpy flow, then each
component's molar flow and mole fraction. :class:`StreamTableModel` is a
``QAbstractTableModel`` adapter: the display role gives formatted text in display units,
``VALUE_ROLE`` the number in display units and ``INTERNAL_ROLE`` the model's own number
(mol/s, K, Pa, W). Copy gives tab-separated text; the CSV export is the model's
(``model.report.csv_file``: cautions, stream table, block results, closures).

Round-off floor: in each row, a value whose magnitude is below
:data:`model.report.table.ROW_FLOOR` times the row's largest magnitude is shown (and
copied and exported) as 0 (see ``model.report.table``); the number itself stays in
``VALUE_ROLE``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from PySide6.QtCore import QAbstractTableModel, QModelIndex, Qt, Signal
from PySide6.QtGui import QBrush, QColor, QFont, QGuiApplication, QKeySequence, QShortcut
from PySide6.QtWidgets import (
    QFileDialog,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from model import report
from model.case.file import write_file_atomically
from model.report.csv_file import results_csv
from model.report.report_order import ReportOrder
from model.report.table import ROW_FLOOR, round_off_floor
from units_of_measure import UNIT_SYSTEMS, format_value, from_internal

__all__ = ["ROW_FLOOR", "StreamTable", "StreamTableModel", "TableRow", "build_rows"]

VALUE_ROLE = Qt.ItemDataRole.UserRole
INTERNAL_ROLE = Qt.ItemDataRole.UserRole + 1
TEAR_COLOUR = QColor("#00796b")


@dataclass(frozen=True)
class TableRow:
    """One row: its label, display unit, kind and a value per stream.

    ``internal`` holds the model's numbers (or text, for the phase); ``shown`` the same
    in the display unit. A heading row has no values.
    """

    label: str
    unit: str = ""
    kind: str | None = None
    internal: tuple[Any, ...] = ()
    shown: tuple[Any, ...] = ()

    @property
    def title(self) -> str:
        return f"{self.label} [{self.unit}]" if self.unit and self.unit != "1" else self.label

    @property
    def floor(self) -> float:
        """Magnitudes below this are shown as 0: :data:`ROW_FLOOR` x the row's largest."""
        return round_off_floor(self.shown)

    def text(self, column: int, floor: float | None = None) -> str:
        """The display text of one value, round-off below the row's floor shown as 0."""
        return shown_text(self.shown[column], self.floor if floor is None else floor)

    def texts(self) -> list[str]:
        """Display texts of every value (the floor computed once)."""
        floor = self.floor
        return [shown_text(v, floor) for v in self.shown]


def stream_names(solution: Any, order: list[str] | None = None) -> list[str]:
    """The solution's streams in ``order`` (the flowsheet's stream order), then any other
    stream of the solution in the solution's own order (which is the flowsheet's order
    when it was solved)."""
    if solution is None:
        return []
    ordered = [name for name in (order or []) if name in solution.streams]
    return ordered + [name for name in solution.streams if name not in ordered]


def build_rows(solution: Any, unit_system: str, names: list[str] | None = None) -> list[TableRow]:
    """The stream table's rows for ``names`` (default: every stream of the solution).

    The quantities come from :func:`model.report.table.stream_table`, the one place that
    computes the stream table (the command line prints the same); here they are only
    grouped under headings for the window.
    """
    if solution is None:
        return []
    names = stream_names(solution) if names is None else names
    table = report.stream_table(solution, unit_system, names)
    by_label = {row.label: row for row in table.rows}
    components = list(solution.component_names)
    flow_unit = UNIT_SYSTEMS[unit_system].unit_for("molar_flow")
    rows = [
        _window_row(by_label[label], label)
        for label in (
            "Phase",
            "Temperature",
            "Pressure",
            "Total molar flow",
            "Mass flow",
            "Vapor fraction",
        )
    ]
    rows.append(_window_row(by_label["Enthalpy flow"], "Enthalpy flow"))
    rows += [_window_row(by_label[k], k) for k in ("Bubble point", "Dew point") if k in by_label]
    rows.append(TableRow(f"Component molar flows [{flow_unit}]"))
    rows += [_window_row(by_label[f"Molar flow {c}"], f"  {c}") for c in components]
    if f"Vapor flow {components[0]}" in by_label:  # some stream is two-phase
        rows.append(TableRow(f"Vapor-phase molar flows [{flow_unit}]"))
        rows += [_window_row(by_label[f"Vapor flow {c}"], f"  {c}") for c in components]
    rows.append(TableRow("Mole fractions"))
    rows += [_window_row(by_label[f"Mole fraction {c}"], f"  {c}") for c in components]
    return rows


def _window_row(row: report.TableRow, label: str) -> TableRow:
    """A model table row as the window shows it: values also in the display unit."""
    if not row.kind:
        return TableRow(label, "", None, row.values, row.values)
    shown = tuple(
        value if isinstance(value, str) else from_internal(value, row.kind, row.unit_or_one)
        for value in row.values
    )
    return TableRow(label, row.unit, row.kind, row.values, shown)


def shown_text(value: Any, floor: float = 0.0) -> str:
    """A cell's display text: numbers with 5 significant digits (0 when their magnitude
    is below ``floor``), words as they are."""
    if isinstance(value, str):
        return value
    if abs(value) < floor:
        return "0"
    return format_value(value)


class StreamTableModel(QAbstractTableModel):
    """Adapter of a solution's streams (columns) and quantities (rows)."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.names: list[str] = []
        self.rows: list[TableRow] = []
        self.tears: set[str] = set()
        self.numbers: dict[str, int] = {}

    def set_content(
        self,
        names: list[str],
        rows: list[TableRow],
        tears: set[str],
        numbers: dict[str, int] | None = None,
    ) -> None:
        self.beginResetModel()
        self.names, self.rows, self.tears = list(names), list(rows), set(tears)
        self.numbers = dict(numbers or {})
        self.endResetModel()

    def column_title(self, section: int) -> str:
        """``"3\nRecycle gas (tear)"``: the stream's number over its name."""
        name = self.names[section]
        title = f"{name} (tear)" if name in self.tears else name
        number = self.numbers.get(name)
        return title if number is None else f"{number}\n{title}"

    def rowCount(self, parent: QModelIndex = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.rows)

    def columnCount(self, parent: QModelIndex = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.names)

    def data(self, index: QModelIndex, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid():
            return None
        row = self.rows[index.row()]
        if not row.shown:
            return None
        if role == Qt.ItemDataRole.DisplayRole:
            return row.text(index.column())
        if role == VALUE_ROLE:
            return row.shown[index.column()]
        if role == INTERNAL_ROLE:
            return row.internal[index.column()]
        if role == Qt.ItemDataRole.TextAlignmentRole and row.kind is not None:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None

    def headerData(
        self, section: int, orientation: Qt.Orientation, role: int = Qt.ItemDataRole.DisplayRole
    ) -> Any:
        horizontal = orientation == Qt.Orientation.Horizontal
        if role == Qt.ItemDataRole.DisplayRole:
            if horizontal:
                return self.column_title(section)
            return self.rows[section].title
        if role == Qt.ItemDataRole.FontRole and not horizontal and not self.rows[section].shown:
            font = QFont()
            font.setBold(True)
            return font
        if role == Qt.ItemDataRole.ForegroundRole and horizontal:
            return QBrush(TEAR_COLOUR) if self.names[section] in self.tears else None
        if role == Qt.ItemDataRole.ToolTipRole and horizontal:
            name = self.names[section]
            return f"{name}: tear stream" if name in self.tears else name
        return None

    def table_lines(self) -> list[list[str]]:
        """Header lines (the stream numbers when the streams have them, the names) and one
        line per row, as display text (for copy)."""
        lines = [["", *self.names]]
        if self.numbers:
            lines.insert(0, ["Stream", *(str(self.numbers.get(n, "")) for n in self.names)])
        for row in self.rows:
            values = row.texts() if row.shown else [""] * len(self.names)
            lines.append([row.title.strip(), *values])
        return lines


class StreamTable(QWidget):
    """Stream table dock content: the table, its closure line, copy and CSV export."""

    stream_activated = Signal(str)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.model = StreamTableModel(self)
        self.view = QTableView()
        self.view.setModel(self.model)
        self.view.setAlternatingRowColors(True)
        self.view.horizontalHeader().setDefaultSectionSize(90)
        self.view.verticalHeader().setDefaultSectionSize(22)
        self.status_label = QLabel("Not solved yet.")
        self.status_label.setWordWrap(True)
        self.status_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.copy_button = QPushButton("Copy")
        self.copy_button.setToolTip("Copy the whole table as tab-separated text")
        self.export_button = QPushButton("Export CSV…")
        buttons = QHBoxLayout()
        buttons.addWidget(self.status_label, 1)
        buttons.addWidget(self.copy_button)
        buttons.addWidget(self.export_button)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addLayout(buttons)
        layout.addWidget(self.view, 1)
        self._solution: Any = None
        self._unit_system = "Metric"
        self._order = ReportOrder()
        self.copy_button.clicked.connect(self.copy_to_clipboard)
        self.export_button.clicked.connect(self.ask_export)
        self.view.horizontalHeader().sectionDoubleClicked.connect(self._activate_column)
        self.view.doubleClicked.connect(lambda index: self._activate_column(index.column()))
        shortcut = QShortcut(QKeySequence.StandardKey.Copy, self.view)
        shortcut.setContext(Qt.ShortcutContext.WidgetWithChildrenShortcut)
        shortcut.activated.connect(self.copy_to_clipboard)

    def set_solution(
        self,
        solution: Any,
        unit_system: str,
        stream_order: list[str] | None = None,
        report_order: ReportOrder | None = None,
    ) -> None:
        """Show ``solution``'s streams (None empties the table) in ``unit_system``.

        ``report_order`` (:meth:`ReportOrder.of` the flowsheet) gives the columns in
        number order under their numbers, and the blocks' order and kinds for the CSV;
        without it, ``stream_order`` (stream names) or else the solution's order.
        """
        self._solution, self._unit_system = solution, unit_system
        self._order = report_order or ReportOrder(streams=list(stream_order or []))
        names = stream_names(solution, self._order.streams)
        tears = set(getattr(solution, "tear_streams", []) or [])
        rows = build_rows(solution, unit_system, names)
        self.model.set_content(names, rows, tears, self._order.numbers)
        self.view.resizeColumnsToContents()
        self.status_label.setText(self._status_text())
        balance = getattr(solution, "balance", None)
        self.status_label.setToolTip("\n".join(balance.lines()) if balance is not None else "")

    def _status_text(self) -> str:
        solution = self._solution
        if solution is None:
            return "Not solved yet."
        text = f"{solution.status.capitalize()} · {self._unit_system} units"
        balance = getattr(solution, "balance", None)
        if balance is not None:
            verdict = (
                "balances close"
                if balance.closes
                else ("balances do not close: " + ", ".join(balance.failing))
            )
            text += (
                f" · closure: mass {balance.mass_closure:.1e}, elements "
                f"{balance.element_closure:.1e}, energy {balance.energy_closure:.1e} "
                f"({verdict})"
            )
        return text

    def copy_to_clipboard(self) -> str:
        """Put the whole table on the clipboard as tab-separated text; return the text."""
        text = "\n".join("\t".join(line) for line in self.model.table_lines())
        QGuiApplication.clipboard().setText(text)
        return text

    def export_csv(self, path: str) -> None:
        """Write the CSV export to ``path`` (atomically): the cautions on the first line,
        the stream table, the block results and the balance closures."""
        text = results_csv(self._solution, self._unit_system, self._order)
        write_file_atomically(path, text.encode("utf-8"))

    def ask_export(self) -> bool:
        """Ask for a file name and export the table to it; True when written."""
        path, _ = QFileDialog.getSaveFileName(
            self, "Export stream table", "streams.csv", "CSV files (*.csv)"
        )
        if not path:
            return False
        self.export_csv(path)
        return True

    def _activate_column(self, column: int) -> None:
        if 0 <= column < len(self.model.names):
            self.stream_activated.emit(self.model.names[column])
