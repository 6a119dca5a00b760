"""The case's component list: look-up by name, formula or CAS number, and the property
values the solve uses, each with its data source."""

from __future__ import annotations

import html
from collections.abc import Callable
from typing import Any

from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import (
    QComboBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QListWidget,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from gui.commands import SetPropertyMethodCommand, execute
from gui.commands_specs import AddComponentCommand, RemoveComponentCommand
from model.errors import ComponentNotFoundError, InputError
from model.flowsheet.document import Flowsheet
from model.properties.peng_robinson import PENG_ROBINSON
from model.properties.property_data import completed, pair_key
from model.properties.property_method import PROPERTY_METHODS
from model.properties.vapor_pressure import vapor_pressure_data
from units_of_measure import UNIT_SYSTEMS, format_quantity

from .component_form import ComponentForm
from .spec_editors import INVALID_COLOR, set_invalid_style


def property_rows(
    component: Any, unit_system: str, flowsheet: Any = None
) -> list[tuple[str, str, str]]:
    """``(property, value with unit, data source)`` for each constant the solve uses; with
    the case (``flowsheet``) also its property method's constants for the component."""
    system = UNIT_SYSTEMS[unit_system]

    def shown(value: float, kind: str) -> str:
        return format_quantity(value, kind, system.unit_for(kind))

    sources = component.sources
    cp = component.cp
    cp_range = f"{cp.name}, {shown(cp.T_min, 'temperature')} to {shown(cp.T_max, 'temperature')}"
    return [
        ("Formula", component.formula, sources.get("formula", "")),
        ("CAS number", component.cas or "—", sources.get("cas", sources.get("name", ""))),
        ("Molar mass", shown(component.molar_mass, "molar_mass"), sources.get("molar_mass", "")),
        ("Normal boiling point", shown(component.Tb, "temperature"), sources.get("Tb", "")),
        ("Critical temperature", shown(component.Tc, "temperature"), sources.get("Tc", "")),
        ("Critical pressure", shown(component.Pc, "pressure"), sources.get("Pc", "")),
        (
            "Heat of formation (ideal gas, 298.15 K)",
            shown(component.Hf_ig, "molar_enthalpy"),
            sources.get("Hf_ig", ""),
        ),
        ("Heat capacity correlation (ideal gas)", cp_range, sources.get("cp", cp.source)),
        (
            "Heat of vaporization at Tb",
            shown(component.Hvap_Tb, "molar_enthalpy"),
            sources.get("Hvap_Tb", ""),
        ),
        *([] if flowsheet is None else _phase_rows(component, flowsheet)),
    ]


def _phase_rows(component: Any, flowsheet: Any) -> list[tuple[str, str, str]]:
    """The case's property method's constants for ``component`` (as recorded in the case,
    else the libraries'), with sources."""
    method = flowsheet.property_method
    recorded = completed(flowsheet.property_data, flowsheet.components, method)
    if method == PENG_ROBINSON:
        return _peng_robinson_rows(component, flowsheet, recorded)
    data = recorded.vapor_pressure.get(component.name)
    if data is None:
        try:
            data = vapor_pressure_data(component.name, component.cas, component.Tc)
        except InputError as error:
            return [("Vapor pressure (ideal method)", "no data", error.allowed)]
    rows = [
        (
            "Vapor pressure (ideal method)",
            f"Antoine A = {data.A:.6g}, B = {data.B:.6g} K, C = {data.C:.6g} K",
            data.source,
        )
    ]
    if data.henry_A is not None:
        rows.append(
            (
                "Henry constant (above Tc)",
                f"A = {data.henry_A:.6g}, B = {data.henry_B:.6g} K",
                data.henry_source,
            )
        )
    return rows


def _peng_robinson_rows(
    component: Any, flowsheet: Any, recorded: Any
) -> list[tuple[str, str, str]]:
    """Acentric factor and the kij of every pair with ``component`` (Peng-Robinson)."""
    omega = recorded.acentric_factor.get(component.name)
    rows = [
        ("Acentric factor (Peng-Robinson)", "no data", "chemicals.acentric.omega has none")
        if omega is None
        else ("Acentric factor (Peng-Robinson)", f"{omega.value:.6g}", omega.source)
    ]
    for other in flowsheet.components:
        value = recorded.binary_parameters.get(pair_key(component.name, other.name))
        if other.name != component.name and value is not None:
            rows.append((f"kij with {other.name}", f"{value.value:.6g}", value.source))
    return rows


class ComponentsPane(QWidget):
    """Component list with look-up, removal and the selected component's properties.

    It edits the case only through undo commands and refreshes from
    ``Flowsheet.components_changed`` (connected by the details pane, which calls
    :meth:`refresh`).
    """

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
        self.property_method_box = QComboBox()
        self.property_method_box.addItems(list(PROPERTY_METHODS))
        self.property_method_box.setToolTip(
            "Phase equilibrium of the flash drums: 'ideal' is Raoult's law with Antoine "
            "vapor pressures, Henry's law above a component's critical temperature"
        )
        self.component_list = QListWidget()
        self.query_edit = QLineEdit()
        self.query_edit.setPlaceholderText("name, formula or CAS number, e.g. ammonia, NH3")
        self.add_button = QPushButton("Add")
        self.remove_button = QPushButton("Remove selected")
        self.message_label = QLabel()
        self.message_label.setWordWrap(True)
        self.message_label.setStyleSheet(f"color: {INVALID_COLOR};")
        self.message_label.hide()
        self.suggestion_row = QHBoxLayout()
        self.suggestion_buttons: list[QPushButton] = []
        self.properties_title = QLabel()
        self.properties = QLabel()
        self.properties.setWordWrap(True)
        self.properties.setTextFormat(Qt.TextFormat.RichText)
        self.properties.setAlignment(Qt.AlignmentFlag.AlignTop | Qt.AlignmentFlag.AlignLeft)
        self.properties.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.component_list.setMaximumHeight(160)
        self.define_toggle = QPushButton("Define by hand…")
        self.define_toggle.setCheckable(True)
        self.define_toggle.setToolTip(
            "Type the constants of a component the database lacks (each with its unit)"
        )
        self.define_form = ComponentForm(flowsheet_getter, undo_stack, unit_system_getter)
        self.define_form.hide()
        self.define_toggle.toggled.connect(self.define_form.setVisible)
        self.shown_rows: list[tuple[str, str, str]] = []
        self._listed: list[str] = []
        self._build_layout()
        self.query_edit.returnPressed.connect(self.add_from_query)
        self.add_button.clicked.connect(self.add_from_query)
        self.remove_button.clicked.connect(self.remove_selected)
        self.component_list.currentRowChanged.connect(lambda _row: self._show_properties())
        self.property_method_box.currentTextChanged.connect(self._choose_property_method)
        self.refresh()

    def _build_layout(self) -> None:
        look_up = QHBoxLayout()
        look_up.addWidget(self.query_edit, 1)
        look_up.addWidget(self.add_button)
        layout = QVBoxLayout(self)
        method = QHBoxLayout()
        method.addWidget(QLabel("<b>Property method</b>"))
        method.addWidget(self.property_method_box, 1)
        layout.addLayout(method)
        layout.addWidget(QLabel("<b>Components of this case</b>"))
        layout.addLayout(look_up)
        layout.addWidget(self.message_label)
        layout.addLayout(self.suggestion_row)
        layout.addWidget(self.component_list, 1)
        buttons = QHBoxLayout()
        buttons.addWidget(self.remove_button)
        buttons.addStretch(1)
        buttons.addWidget(self.define_toggle)
        layout.addLayout(buttons)
        layout.addWidget(self.define_form)
        layout.addWidget(self.properties_title)
        layout.addWidget(self.properties, 1)

    @property
    def flowsheet(self) -> Flowsheet:
        return self._flowsheet_getter()

    # ---- showing ----------------------------------------------------------------
    def refresh(self) -> None:
        """Mirror the case's component list (signals blocked), keeping the selection."""
        current = self.selected_name()
        components = self.flowsheet.components
        names = [c.name for c in components]
        added = [n for n in names if n not in self._listed]
        if len(added) == 1 and self._listed:
            current = added[0]  # show the component just added
        self._listed = names
        with QSignalBlocker(self.property_method_box):
            self.property_method_box.setCurrentText(self.flowsheet.property_method)
        with QSignalBlocker(self.component_list):
            self.component_list.clear()
            for component in components:
                self.component_list.addItem(f"{component.name}  ·  {component.formula}")
            if names:
                self.component_list.setCurrentRow(
                    names.index(current) if current in names else len(names) - 1
                )
        self._show_properties()

    def _choose_property_method(self, name: str) -> None:
        if name and name != self.flowsheet.property_method:
            execute(self._undo_stack, SetPropertyMethodCommand(self.flowsheet, name))

    def selected_name(self) -> str | None:
        row = self.component_list.currentRow()
        components = self.flowsheet.components
        return components[row].name if 0 <= row < len(components) else None

    def _show_properties(self) -> None:
        name = self.selected_name()
        component = next((c for c in self.flowsheet.components if c.name == name), None)
        if component is None:
            self.properties_title.setText("No component selected.")
            self.properties.clear()
            self.shown_rows = []
            return
        self.shown_rows = property_rows(component, self._unit_system_getter(), self.flowsheet)
        self.properties_title.setText(
            f"<b>{html.escape(component.name)}</b>: values used "
            "by the solve, with their data sources"
        )
        self.properties.setText(
            "".join(
                f"<p style='margin:0 0 6px 0'><b>{html.escape(label)}</b>: {html.escape(value)}"
                f"<br><span style='color:#666666'>{html.escape(source)}</span></p>"
                for label, value, source in self.shown_rows
            )
        )

    # ---- editing ----------------------------------------------------------------
    def add_from_query(self, query: str | None = None) -> bool:
        """Look the query up and add the component; show a message and suggestions if not."""
        text = (query if isinstance(query, str) else self.query_edit.text()).strip()
        if isinstance(query, str):
            self.query_edit.setText(text)
        if not text:
            return False
        from model.properties.components import lookup_component

        try:
            component = lookup_component(text)
        except ComponentNotFoundError as error:
            self._show_message(str(error), error.suggestions)
            return False
        except InputError as error:
            self._show_message(str(error), [])
            return False
        if component.name in self.flowsheet.component_names():
            self._show_message(f"{component.name} ({text}) is already in this case.", [])
            return False
        self._undo_stack.push(AddComponentCommand(self.flowsheet, component))
        self._show_message("", [])
        self.query_edit.clear()
        return True

    def remove_selected(self) -> bool:
        """Remove the selected component, unless a spec still uses it (message then)."""
        name = self.selected_name()
        if name is None:
            return False
        users = self.flowsheet.component_users(name)
        if users:
            self._show_message(
                f"component: {name!r} is still used in the specs of "
                f"{', '.join(users)}; change those specs first.",
                [],
            )
            return False
        self._undo_stack.push(RemoveComponentCommand(self.flowsheet, name))
        self._show_message("", [])
        return True

    def _show_message(self, message: str, suggestions: list[str]) -> None:
        self.message_label.setText(message)
        self.message_label.setVisible(bool(message))
        set_invalid_style(self.query_edit, message or None)
        for button in self.suggestion_buttons:
            self.suggestion_row.removeWidget(button)
            button.deleteLater()
        self.suggestion_buttons = []
        for suggestion in suggestions:
            button = QPushButton(f"Add {suggestion}")
            button.setToolTip(f"Did you mean {suggestion}?")
            button.clicked.connect(lambda _checked=False, s=suggestion: self.add_from_query(s))
            self.suggestion_row.addWidget(button)
            button.show()
            self.suggestion_buttons.append(button)

    def set_unit_system(self) -> None:
        self._show_properties()
        self.define_form.refresh_context()
