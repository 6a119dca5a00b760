"""The reactor's reaction table: one column per reaction, one row per component.

Rows: label, the stoichiometric coefficient of each case component (negative for
reactants, positive for products, empty when it takes no part), key reactant,
fractional conversion, then two rows the table computes: the element-balance check
from the components' formulas and the standard heat of reaction at 298.15 K (Hess's
law on the ideal-gas heats of formation). Columns narrow enough for a side dock.

The cells are the user's working copy: every edit builds the whole reaction list from
them and offers it to the model; a refused list leaves the model as it was and the
typed text in place, marked with the model's message.
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QPushButton, QVBoxLayout, QWidget

from model.errors import LoopwrightError
from model.flowsheet.spec_values import Reaction
from units_of_measure import UnitError, format_value, from_internal

from .spec_editors import EditorContext, number_text
from .table_editor import TableEditor, parse_table_number

BALANCED_TEXT = "element-balanced"


def reaction_equation(stoichiometry: dict[str, float]) -> str:
    """``"nitrogen + 3 hydrogen → 2 ammonia"`` from coefficients."""

    def side(pairs: list[tuple[str, float]]) -> str:
        terms = [(name if abs(n) == 1 else f"{format_value(abs(n))} {name}") for name, n in pairs]
        return " + ".join(terms) or "(nothing)"

    reactants = [(c, n) for c, n in stoichiometry.items() if n < 0]
    products = [(c, n) for c, n in stoichiometry.items() if n > 0]
    return f"{side(reactants)} → {side(products)}"


class ReactionTable(TableEditor):
    """Editor of the ``reactions`` spec (``list[Reaction]``)."""

    def __init__(self, context: EditorContext, parent: QWidget | None = None) -> None:
        super().__init__(context, "reactions", [], parent)
        self._value: list[Reaction] | None = None
        self._names: list[str] = []
        self._columns = 0
        self.add_button = QPushButton("Add reaction")
        self.remove_button = QPushButton("Remove reaction")
        self.summary_label = QLabel()
        self.summary_label.setWordWrap(True)
        self.summary_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        buttons = QHBoxLayout()
        buttons.addWidget(self.add_button)
        buttons.addWidget(self.remove_button)
        buttons.addStretch(1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.table)
        layout.addLayout(buttons)
        layout.addWidget(self.summary_label)
        layout.addWidget(self.message_label)
        self.add_button.clicked.connect(self.add_reaction)
        self.remove_button.clicked.connect(self.remove_reaction)
        self.refresh_context()

    # ---- layout of rows ---------------------------------------------------------
    def _key_row(self) -> int:
        return 1 + len(self._names)

    def _conversion_row(self) -> int:
        return 2 + len(self._names)

    def _check_row(self) -> int:
        return 3 + len(self._names)

    def _heat_row(self) -> int:
        return 4 + len(self._names)

    def _heat_unit(self) -> str:
        return self.context.default_unit("molar_enthalpy")

    def refresh_context(self) -> None:
        """Show the model's reactions in every cell (drops the working copy).

        The table is rebuilt only when its rows change (components added or removed);
        otherwise cells and key choosers are updated in place, which is safe while a
        key chooser's own signal is being handled.
        """
        reactions = self._value or []
        names = self.context.flowsheet.component_names()
        used = [c for r in reactions for c in r.stoichiometry if c not in names]
        names = names + list(dict.fromkeys(used))
        labels = [
            "Label",
            *names,
            "Key reactant",
            "Conversion",
            "Element balance",
            f"ΔH°r 298 K ({self._heat_unit()})",
        ]
        columns = max(len(reactions), 1)
        with QSignalBlocker(self.table):
            if names != self._names or self.table.rowCount() != len(labels):
                self.table.clear()
                self.table.setColumnCount(0)
                self._names = names
            self.table.setRowCount(len(labels))
            self.table.setVerticalHeaderLabels(labels)
            while self.table.columnCount() > columns:
                self.table.removeColumn(self.table.columnCount() - 1)
            self.table.setColumnCount(columns)
        self._columns = columns
        self._set_headers()
        for column in range(columns):
            self._fill_column(column, reactions[column] if column < len(reactions) else None)
        self._update_checks()
        self.fit_height()

    def _set_headers(self) -> None:
        with QSignalBlocker(self.table):
            labels = [f"Reaction {c + 1}" for c in range(self._columns)]
            self.table.setHorizontalHeaderLabels(labels)

    def _fill_column(self, column: int, reaction: Reaction | None) -> None:
        self.cell(0, column, reaction.label if reaction else "")
        for row, name in enumerate(self._names, start=1):
            coefficient = reaction.stoichiometry.get(name) if reaction else None
            self.cell(row, column, "" if coefficient is None else number_text(coefficient))
        combo = self.table.cellWidget(self._key_row(), column)
        if not isinstance(combo, QComboBox):
            combo = QComboBox()
            combo.activated.connect(lambda _i, c=column: self._on_key_chosen(c))
            self.table.setCellWidget(self._key_row(), column, combo)
        with QSignalBlocker(combo):
            combo.clear()
            combo.addItem("")
            combo.addItems(self._names)
            combo.setCurrentIndex(max(combo.findText(reaction.key), 0) if reaction else 0)
        self.cell(self._key_row(), column, "", editable=False)
        self.cell(
            self._conversion_row(), column, number_text(reaction.conversion) if reaction else ""
        )
        self.cell(self._check_row(), column, "", editable=False)
        self.cell(self._heat_row(), column, "", editable=False)

    def set_value(self, value: list[Reaction] | None) -> None:
        self._value = None if value is None else list(value)
        self.clear_marks()
        self.refresh_context()

    # ---- user edits -------------------------------------------------------------
    def add_reaction(self) -> None:
        """Append an empty column; it reaches the model once it is complete and valid."""
        self._columns += 1
        with QSignalBlocker(self.table):
            self.table.setColumnCount(self._columns)
        self._set_headers()
        self._fill_column(self._columns - 1, None)
        self._update_checks()

    def remove_reaction(self) -> None:
        """Remove the selected reaction (or the last one) and offer the rest to the model."""
        columns = sorted({i.column() for i in self.table.selectedIndexes()})
        column = columns[0] if columns else self._columns - 1
        if self._columns == 0:
            return
        self.table.removeColumn(column)
        self._columns -= 1
        self._set_headers()
        self._rebind_key_choosers()
        self._last_cell = None
        self._offer()

    def _rebind_key_choosers(self) -> None:
        """After a column is removed, key choosers report their new column numbers."""
        for column in range(self._columns):
            combo = self.table.cellWidget(self._key_row(), column)
            combo.activated.disconnect()
            combo.activated.connect(lambda _i, c=column: self._on_key_chosen(c))

    def _on_key_chosen(self, column: int) -> None:
        self._last_cell = (self._key_row(), column)
        self._offer()

    def cell_edited(self, row: int, column: int, text: str) -> None:
        if row in (self._check_row(), self._heat_row()):
            return
        self._offer()

    def _column_is_empty(self, column: int) -> bool:
        rows = [0, *range(1, 1 + len(self._names)), self._conversion_row()]
        texts = [self._text(r, column) for r in rows]
        return not any(texts) and not self._key(column)

    def _text(self, row: int, column: int) -> str:
        item = self.table.item(row, column)
        return item.text().strip() if item is not None else ""

    def _key(self, column: int) -> str:
        combo = self.table.cellWidget(self._key_row(), column)
        return combo.currentText() if combo is not None else ""

    def _stoichiometry(self, column: int) -> dict[str, float]:
        """Coefficients typed in one column (raises UnitError on a non-number)."""
        block = self.context.block_name
        coefficients = {}
        for row, name in enumerate(self._names, start=1):
            field = f"{block}.reactions[{column + 1}].stoichiometry[{name}]"
            try:
                number = parse_table_number(field, self._text(row, column))
            except UnitError:
                self._last_cell = (row, column)
                raise
            if number is not None:
                coefficients[name] = number
        return coefficients

    def reactions_from_cells(self) -> list[Reaction]:
        """The reactions typed in the table, skipping empty columns."""
        reactions = []
        for column in range(self._columns):
            if self._column_is_empty(column):
                continue
            stoichiometry = self._stoichiometry(column)
            field = f"{self.context.block_name}.reactions[{column + 1}].conversion"
            try:
                conversion = parse_table_number(field, self._text(self._conversion_row(), column))
            except UnitError:
                self._last_cell = (self._conversion_row(), column)
                raise
            reactions.append(
                Reaction(
                    stoichiometry,
                    self._key(column),
                    math.nan if conversion is None else conversion,
                    self._text(0, column),
                )
            )
        return reactions

    def _offer(self) -> None:
        self._update_checks()
        try:
            reactions = self.reactions_from_cells()
        except UnitError as error:
            self.show_error(str(error))
            return
        self.edited.emit(reactions or None)

    # ---- computed rows ----------------------------------------------------------
    def _update_checks(self) -> None:
        """Element balance and heat of reaction of every column, from the typed cells."""
        balance = self._balance_function()
        lines = []
        for column in range(self._columns):
            try:
                stoichiometry = self._stoichiometry(column)
            except UnitError:
                stoichiometry = {}
            check, heat = self._check_texts(stoichiometry, balance)
            self.cell(self._check_row(), column, check, editable=False)
            self.cell(self._heat_row(), column, heat, editable=False)
            if stoichiometry:
                unit = "" if heat in ("", "—") else f" {self._heat_unit()}"
                lines.append(
                    f"{column + 1}. {reaction_equation(stoichiometry)}: {check}; "
                    f"ΔH°r(298.15 K) = {heat}{unit}"
                )
        self.summary_label.setText("\n".join(lines))

    def _balance_function(self):
        from model.flowsheet.spec_checks import element_balance_function

        try:
            return element_balance_function(self.context.flowsheet)
        except LoopwrightError:
            return None

    def _check_texts(self, stoichiometry: dict[str, float], balance) -> tuple[str, str]:
        known = set(self.context.flowsheet.component_names())
        if not stoichiometry or balance is None or not set(stoichiometry) <= known:
            return "—", "—"
        net = {e: n for e, n in balance(stoichiometry).items() if abs(n) > 1e-9}
        if net:
            check = "not balanced: " + ", ".join(f"{e} {n:+g}" for e, n in net.items())
        else:
            check = BALANCED_TEXT
        return check, self._heat_text(stoichiometry)

    def _heat_text(self, stoichiometry: dict[str, float]) -> str:
        from model.properties.enthalpy import PropertyBasis

        components = self.context.flowsheet.components
        try:
            basis = PropertyBasis(components)
        except LoopwrightError:
            return "—"
        vector = np.zeros(len(basis.names))
        for name, coefficient in stoichiometry.items():
            vector[basis.index(name)] = coefficient
        heat = float(basis.standard_heat_of_reaction(vector))
        return format_value(from_internal(heat, "molar_enthalpy", self._heat_unit()))
