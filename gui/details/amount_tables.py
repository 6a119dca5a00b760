"""Table editors for per-component amounts (feed flows and compositions) and for the
splitter's fraction to each outlet."""

from __future__ import annotations

from PySide6.QtCore import QSignalBlocker
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QVBoxLayout, QWidget

from model.flowsheet.spec_values import ComponentAmounts
from units_of_measure import (
    UnitError,
    display_units,
    format_value,
    from_internal,
    resolve_unit,
    to_internal,
)

from .spec_editors import (
    FLOW_KINDS,
    EditorContext,
    number_text,
    rounded,
    set_invalid_style,
)
from .table_editor import TableEditor, parse_table_number

FRACTION_UNITS = ("mole fraction", "mass fraction")


def flow_kind(unit: str) -> str | None:
    """``"molar_flow"`` or ``"mass_flow"`` for a flow unit, else None."""
    for kind in FLOW_KINDS:
        try:
            resolve_unit(unit, kind)
        except UnitError:
            continue
        return kind
    return None


class ComponentAmountsEditor(TableEditor):
    """One number per case component with one shared unit.

    ``kind="component_flows"``: molar- or mass-flow units (any pint unit may be typed);
    ``kind="component_fractions"``: mole or mass fractions. Changing the unit converts
    the values shown (between molar and mass basis with the components' molar masses).
    """

    def __init__(self, context: EditorContext, kind: str, parent: QWidget | None = None) -> None:
        super().__init__(context, kind, ["Amount"], parent)
        self._value: ComponentAmounts | None = None
        self.unit_combo = QComboBox()
        if kind == "component_flows":
            self.unit_combo.setEditable(True)
            self.unit_combo.setInsertPolicy(QComboBox.InsertPolicy.NoInsert)
            for each_kind in FLOW_KINDS:
                self.unit_combo.addItems(list(display_units(each_kind)))
            self.unit_combo.lineEdit().editingFinished.connect(self._on_unit_typed)
        else:
            self.unit_combo.addItems(list(FRACTION_UNITS))
        self.total_label = QLabel()
        top = QHBoxLayout()
        top.addWidget(QLabel("Unit"))
        top.addWidget(self.unit_combo, 1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addLayout(top)
        layout.addWidget(self.table)
        layout.addWidget(self.total_label)
        layout.addWidget(self.message_label)
        self.unit_combo.activated.connect(lambda _i: self._change_unit(self.unit()))
        self._show_unit(self._default_unit())
        self.refresh_context()

    def _default_unit(self) -> str:
        if self.kind == "component_flows":
            return self.context.default_unit("molar_flow")
        return FRACTION_UNITS[0]

    def unit(self) -> str:
        return self.unit_combo.currentText().strip()

    def _show_unit(self, unit: str) -> None:
        with QSignalBlocker(self.unit_combo):
            index = self.unit_combo.findText(unit)
            if index >= 0:
                self.unit_combo.setCurrentIndex(index)
            if self.unit_combo.isEditable():
                self.unit_combo.setEditText(unit)
        header = unit.capitalize() if self.kind != "component_flows" else f"Flow ({unit})"
        self.table.setHorizontalHeaderLabels([header])

    def row_names(self) -> list[str]:
        names = self.context.flowsheet.component_names()
        extra = [n for n in (self._value.values if self._value else {}) if n not in names]
        return names + extra

    def refresh_context(self) -> None:
        names = self.row_names()
        with QSignalBlocker(self.table):
            self.table.setRowCount(len(names))
            self.table.setVerticalHeaderLabels(names)
        values = self._value.values if self._value else {}
        for row, name in enumerate(names):
            self.cell(row, 0, number_text(values[name]) if name in values else "")
        if self._value is None:
            self._show_unit(self._default_unit())
        self._show_total()
        self.fit_height()

    def set_value(self, value: ComponentAmounts | None) -> None:
        self._value = value
        if value is not None:
            self._show_unit(value.unit)
        self.clear_marks()
        set_invalid_style(self.unit_combo, None)
        self.refresh_context()

    def _show_total(self) -> None:
        if self._value is None or not self._value.values:
            self.total_label.setText("No amounts given yet.")
            return
        total = sum(self._value.values.values())
        if self.kind == "component_flows":
            self.total_label.setText(f"Total: {format_value(total)} {self._value.unit}")
        else:
            self.total_label.setText(f"Sum of fractions: {format_value(total, 6)}")

    def cell_edited(self, row: int, column: int, text: str) -> None:
        self._emit_from_cells()

    def _emit_from_cells(self) -> None:
        names = self.row_names()
        values: dict[str, float] = {}
        for row, name in enumerate(names):
            item = self.table.item(row, 0)
            try:
                field = f"{self.context.block_name}.{self.objectName()}[{name}]"
                number = parse_table_number(field, item.text().strip())
            except UnitError as error:
                self._last_cell = (row, 0)
                self.show_error(str(error))
                return
            if number is not None:
                values[name] = number
        self.edited.emit(ComponentAmounts(values, self.unit()) if values else None)

    # ---- unit changes -----------------------------------------------------------
    def _on_unit_typed(self) -> None:
        if self._value is None or self.unit() != self._value.unit:
            self._change_unit(self.unit())

    def _change_unit(self, unit: str) -> None:
        if self.kind == "component_flows" and flow_kind(unit) is None:
            message = (
                f"{self.context.block_name}: unit {unit!r} is not allowed; expected a "
                "molar flow unit such as kmol/h or a mass flow unit such as kg/h"
            )
            self.show_error(message)
            set_invalid_style(self.unit_combo, message)
            return
        set_invalid_style(self.unit_combo, None)
        self._show_unit(unit)
        if self._value is None or not self._value.values:
            if self._any_cell_text():
                self._emit_from_cells()
            return
        converted = self._converted(self._value, unit)
        self.edited.emit(ComponentAmounts(converted, unit))

    def _any_cell_text(self) -> bool:
        return any(
            self.table.item(r, 0) and self.table.item(r, 0).text().strip()
            for r in range(self.table.rowCount())
        )

    def _molar_masses(self) -> dict[str, float]:
        return {c.name: float(c.molar_mass) for c in self.context.flowsheet.components}

    def _converted(self, value: ComponentAmounts, unit: str) -> dict[str, float]:
        """The same amounts expressed in ``unit``."""
        masses = self._molar_masses()
        if self.kind != "component_flows":
            if value.unit == unit:
                return dict(value.values)
            if unit == "mass fraction":
                weights = {n: v * masses[n] for n, v in value.values.items()}
            else:
                weights = {n: v / masses[n] for n, v in value.values.items()}
            total = sum(weights.values()) or 1.0
            return {n: rounded(w / total) for n, w in weights.items()}
        old_kind, new_kind = flow_kind(value.unit), flow_kind(unit)
        converted = {}
        for name, number in value.values.items():
            internal = to_internal(number, value.unit, old_kind)
            if old_kind == "molar_flow" and new_kind == "mass_flow":
                internal *= masses[name]
            elif old_kind == "mass_flow" and new_kind == "molar_flow":
                internal /= masses[name]
            converted[name] = rounded(from_internal(internal, new_kind, unit))
        return converted


class PortFractionsEditor(TableEditor):
    """The splitter's fraction to each outlet; one outlet may be left empty for the rest."""

    def __init__(self, context: EditorContext, parent: QWidget | None = None) -> None:
        super().__init__(context, "port_fractions", ["Stream", "Fraction", "Share"], parent)
        self._value: dict[str, float] | None = None
        self._ports: list[str] = []
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.table)
        hint = QLabel("Leave one fraction empty: that outlet takes the remainder.")
        hint.setWordWrap(True)
        layout.addWidget(hint)
        layout.addWidget(self.message_label)
        self.refresh_context()

    def ports(self) -> list[str]:
        """Connected outlets, outlets with a fraction, and the kind's fixed minimum."""
        flowsheet = self.context.flowsheet
        block = self.context.block
        minimum = len(block.block_kind.outlets)
        given = self._value or {}
        return [
            port
            for index, port in enumerate(flowsheet.outlet_ports(block.name))
            if index < minimum or port in given or flowsheet.stream_out_of(block.name, port)
        ]

    def refresh_context(self) -> None:
        flowsheet = self.context.flowsheet
        self._ports = self.ports()
        with QSignalBlocker(self.table):
            self.table.setRowCount(len(self._ports))
            self.table.setVerticalHeaderLabels(self._ports)
        given = self._value or {}
        for row, port in enumerate(self._ports):
            stream = flowsheet.stream_out_of(self.context.block_name, port)
            self.cell(row, 0, stream.name if stream else "(not connected)", editable=False)
            self.cell(row, 1, number_text(given[port]) if port in given else "")
        self._show_shares()
        self.fit_height()

    def _show_shares(self) -> None:
        given = self._value or {}
        missing = [p for p in self._ports if p not in given]
        remainder = 1.0 - sum(given.values())
        for row, port in enumerate(self._ports):
            if port in given:
                share = format_value(given[port], 6)
            elif len(missing) == 1:
                share = f"{format_value(remainder, 6)} (remainder)"
            else:
                share = "?"
            self.cell(row, 2, share, editable=False)

    def set_value(self, value: dict[str, float] | None) -> None:
        self._value = None if value is None else dict(value)
        self.clear_marks()
        self.refresh_context()

    def cell_edited(self, row: int, column: int, text: str) -> None:
        values: dict[str, float] = {}
        for index, port in enumerate(self._ports):
            try:
                number = parse_table_number(
                    f"{self.context.block_name}.fractions[{port}]",
                    self.table.item(index, 1).text().strip(),
                )
            except UnitError as error:
                self._last_cell = (index, 1)
                self.show_error(str(error))
                return
            if number is not None:
                values[port] = number
        self.edited.emit(values or None)
