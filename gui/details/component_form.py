"""Define a component by hand: name, formula and the constants of the ideal property basis,
each typed with its unit, checked by ``model.properties.components.define_component``.

A refused entry is marked with the model's message and keeps its text; an accepted
component is added through the undo stack (:class:`gui.commands_specs.AddComponentCommand`)
and the form is emptied for the next one.
"""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtWidgets import (
    QFormLayout,
    QGroupBox,
    QLabel,
    QLineEdit,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from gui.commands_specs import AddComponentCommand
from model.errors import InputError
from model.flowsheet.document import Flowsheet
from units_of_measure import UnitError

from .spec_editors import INVALID_COLOR, EditorContext, QuantityEditor, set_invalid_style
from .table_editor import parse_table_number

#: (field of define_component, label, units_of_measure kind, placeholder)
QUANTITY_FIELDS = (
    ("molar_mass", "Molar mass", "molar_mass", "from the formula"),
    ("Tc", "Critical temperature", "temperature", "required"),
    ("Pc", "Critical pressure", "pressure", "required"),
    ("Tb", "Normal boiling point", "temperature", "required"),
    ("Hf_ig", "Heat of formation (ideal gas, 298.15 K)", "molar_enthalpy", "required"),
    ("Hvap_Tb", "Heat of vaporization at Tb", "molar_enthalpy", "required"),
)
RANGE_FIELDS = (
    ("cp.T_min", "Cp valid from", "temperature"),
    ("cp.T_max", "Cp valid to", "temperature"),
)
#: Units of the polynomial's coefficients: Cp = a0 + a1 T + ... + a4 T^4, T in K.
COEFFICIENT_UNITS = ("J/(mol K)", "J/(mol K²)", "J/(mol K³)", "J/(mol K⁴)", "J/(mol K⁵)")


class ComponentForm(QGroupBox):
    """The "Define by hand" form of the component list."""

    def __init__(
        self,
        flowsheet_getter: Callable[[], Flowsheet],
        undo_stack,
        unit_system_getter: Callable[[], str],
        parent: QWidget | None = None,
    ) -> None:
        super().__init__("New component, defined by hand", parent)
        self._flowsheet_getter = flowsheet_getter
        self._undo_stack = undo_stack
        self.context = EditorContext(flowsheet_getter, "component", unit_system_getter)
        self.name_edit = QLineEdit()
        self.formula_edit = QLineEdit()
        self.formula_edit.setPlaceholderText("e.g. C2H6O (gives the element balance)")
        self.quantity_editors: dict[str, QuantityEditor] = {}
        self.coefficient_edits = [QLineEdit() for _ in COEFFICIENT_UNITS]
        self.define_button = QPushButton("Define and add")
        self.message_label = QLabel()
        self.message_label.setWordWrap(True)
        self.message_label.setStyleSheet(f"color: {INVALID_COLOR};")
        self.message_label.hide()
        fields = QFormLayout()  # labels above the fields: the dock is narrow
        fields.setRowWrapPolicy(QFormLayout.RowWrapPolicy.WrapAllRows)
        fields.addRow("Name", self.name_edit)
        fields.addRow("Formula", self.formula_edit)
        for field, label, kind, placeholder in QUANTITY_FIELDS:
            fields.addRow(label, self._quantity_editor(field, kind, placeholder))
        coefficients = QFormLayout()
        pairs = zip(self.coefficient_edits, COEFFICIENT_UNITS, strict=True)
        for number, (edit, unit) in enumerate(pairs):
            edit.setPlaceholderText("0" if number else "required")
            coefficients.addRow(f"a{number} [{unit}]", edit)
        cp_range = QFormLayout()
        for field, label, kind in RANGE_FIELDS:
            cp_range.addRow(label, self._quantity_editor(field, kind, "required"))
        cp_title = QLabel("Ideal-gas heat capacity: Cp = a0 + a1 T + a2 T² + a3 T³ + a4 T⁴, T in K")
        cp_title.setWordWrap(True)
        layout = QVBoxLayout(self)
        layout.addLayout(fields)
        layout.addWidget(cp_title)
        layout.addLayout(coefficients)
        layout.addLayout(cp_range)
        layout.addWidget(self.message_label)
        layout.addWidget(self.define_button)
        self.define_button.clicked.connect(self.define)

    def _quantity_editor(self, field: str, kind: str, placeholder: str) -> QuantityEditor:
        editor = QuantityEditor(self.context, kind)
        editor.setObjectName(field)
        editor.value_edit.setPlaceholderText(placeholder)
        editor.edited.connect(editor.set_value)  # accepted as typed; unit changes convert
        self.quantity_editors[field] = editor
        return editor

    def refresh_context(self) -> None:
        """The unit system changed: empty fields take its units."""
        for editor in self.quantity_editors.values():
            editor.refresh_context()

    # ---- defining -----------------------------------------------------------------
    def define(self) -> bool:
        """Check every entry with the model and add the component; mark what is refused."""
        from model.properties.components import USER_SOURCE, define_component
        from model.properties.cp_correlations import POLYNOMIAL, CpCorrelation

        self._clear_marks()
        try:
            values = {field: e.internal_value() for field, e in self.quantity_editors.items()}
            coefficients = self._coefficients()
        except UnitError as error:
            self._mark(error)
            return False
        cp_error = None
        try:
            cp = CpCorrelation(
                POLYNOMIAL, coefficients, values["cp.T_min"], values["cp.T_max"], USER_SOURCE
            )
        except InputError as error:  # reported after the fields above the Cp rows
            cp_error = error
            cp = CpCorrelation(POLYNOMIAL, (29.0,), 200.0, 1500.0, USER_SOURCE)
        try:
            component = define_component(
                self.name_edit.text().strip(),
                self.formula_edit.text().strip(),
                values["molar_mass"],
                **{f: values[f] for f in ("Tc", "Pc", "Tb", "Hf_ig", "Hvap_Tb")},
                cp=cp,
            )
            if cp_error is not None:
                raise cp_error
            flowsheet = self._flowsheet_getter()
            if component.name in flowsheet.component_names():
                raise InputError("name", component.name, "a name no component of the case has")
        except InputError as error:
            self._mark(error)
            return False
        self._undo_stack.push(AddComponentCommand(flowsheet, component))
        self.clear()
        return True

    def _coefficients(self) -> tuple[float, ...]:
        """a0..a4 as typed; empty ones are 0 and trailing empty ones are left out."""
        numbers = []
        for number, edit in enumerate(self.coefficient_edits):
            field = f"cp.coefficients[a{number}]"
            numbers.append(parse_table_number(field, edit.text().strip()))
        while numbers and numbers[-1] is None:
            numbers.pop()
        return tuple(0.0 if n is None else n for n in numbers)

    # ---- marks --------------------------------------------------------------------
    def _widget_for(self, field: str) -> QWidget | None:
        if field in ("name", "component"):
            return self.name_edit
        if field == "formula":
            return self.formula_edit
        if field.startswith("cp.coefficients"):
            index = field[-2] if field.endswith("]") else "0"
            return self.coefficient_edits[int(index) if index.isdigit() else 0]
        return self.quantity_editors.get(field.removeprefix("component."))

    def _mark(self, error: InputError) -> None:
        message = str(error)
        widget = self._widget_for(str(error.field))
        if isinstance(widget, QuantityEditor):
            widget.show_error(message)
        elif widget is not None:
            set_invalid_style(widget, message)
        self.message_label.setText(message)
        self.message_label.show()

    def error_text(self) -> str:
        return "" if self.message_label.isHidden() else self.message_label.text()

    def _clear_marks(self) -> None:
        self.message_label.hide()
        for edit in (self.name_edit, self.formula_edit, *self.coefficient_edits):
            set_invalid_style(edit, None)
        for editor in self.quantity_editors.values():
            editor.clear_error()
            set_invalid_style(editor.value_edit, None)

    def clear(self) -> None:
        """Empty every field (after a component was added)."""
        self._clear_marks()
        for edit in (self.name_edit, self.formula_edit, *self.coefficient_edits):
            edit.clear()
        for editor in self.quantity_editors.values():
            editor.set_value(None)
