"""The details of one block: a form drawn from its kind's spec fields, and its results.

Editors are chosen from ``SpecField.kind`` alone (see :func:`make_editor`), so a new
block kind needs no new form. Every applied value goes through the undo stack
(:func:`gui.commands_specs.push_spec_change`); the form refreshes from the flowsheet's
``block_specs_changed`` signal, forwarded by the details pane.
"""

from __future__ import annotations

from typing import Any

from PySide6.QtCore import Qt
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import (
    QFormLayout,
    QGroupBox,
    QLabel,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from gui.commands_specs import push_spec_change
from model.errors import LoopwrightError
from model.flowsheet.kinds import SpecField

from .amount_tables import ComponentAmountsEditor, PortFractionsEditor
from .choice_editors import ChoiceEditor, FractionEditor, PortEditor
from .reaction_table import ReactionTable
from .results_text import block_results_html
from .spec_editors import EditorContext, QuantityEditor, SpecEditor
from .split_table import SplitTable

TABLE_KINDS = ("component_flows", "component_fractions", "port_fractions", "reactions")


def make_editor(spec_field: SpecField, context: EditorContext) -> SpecEditor:
    """The editor for one spec field, chosen from its kind."""
    kind = spec_field.kind
    if kind == "choice":
        editor: SpecEditor = ChoiceEditor(context, spec_field.choices)
    elif kind == "fraction":
        editor = FractionEditor(context)
    elif kind == "port":
        editor = PortEditor(context)
    elif kind == "port_fractions":
        editor = PortFractionsEditor(context)
    elif kind == "reactions":
        editor = ReactionTable(context)
    elif kind == "component_fractions" and spec_field.name == "split":
        editor = SplitTable(context)
    elif kind in ("component_flows", "component_fractions"):
        editor = ComponentAmountsEditor(context, kind)
    else:
        editor = QuantityEditor(context, kind)
        editor.value_edit.setPlaceholderText("required" if spec_field.required else "optional")
    editor.setObjectName(spec_field.name)
    editor.setToolTip(spec_field.help)
    return editor


class BlockForm(QWidget):
    """Spec editors of one block, its state badge and its results."""

    def __init__(self, context: EditorContext, undo_stack: QUndoStack, parent=None) -> None:
        super().__init__(parent)
        self.context = context
        self._undo_stack = undo_stack
        self._solution: Any = None
        block = context.block
        kind = block.block_kind
        self.title_label = QLabel()
        self.title_label.setTextFormat(Qt.TextFormat.RichText)
        self.description_label = QLabel(kind.description)
        self.description_label.setWordWrap(True)
        self.state_label = QLabel()
        self.form = QFormLayout()
        self.form.setRowWrapPolicy(QFormLayout.RowWrapPolicy.WrapLongRows)
        self.form.setFieldGrowthPolicy(QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
        self.editors: dict[str, SpecEditor] = {}
        for spec_field in kind.spec_fields:
            editor = make_editor(spec_field, context)
            editor.edited.connect(lambda value, name=spec_field.name: self.apply(name, value))
            label = QLabel(spec_field.label + ("" if spec_field.required else " (optional)"))
            label.setToolTip(spec_field.help)
            label.setWordWrap(True)
            if spec_field.kind in TABLE_KINDS:
                self.form.addRow(label)
                self.form.addRow(editor)
            else:
                self.form.addRow(label, editor)
            self.editors[spec_field.name] = editor
        if not kind.spec_fields:
            self.form.addRow(QLabel("A product has no specifications."))
        self.results_box = QGroupBox("Results")
        self.results_label = QLabel()
        self.results_label.setWordWrap(True)
        self.results_label.setTextFormat(Qt.TextFormat.RichText)
        self.results_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        results_layout = QVBoxLayout(self.results_box)
        results_layout.addWidget(self.results_label)
        self.heat_curve_button = QPushButton("Heat Curve…")
        self.heat_curve_button.setToolTip("Both sides' temperatures against the heat passed")
        self.heat_curve_button.clicked.connect(self.show_heat_curve)
        self.heat_curve_button.setVisible(False)
        results_layout.addWidget(self.heat_curve_button)
        self.heat_curve_dialog = None
        layout = QVBoxLayout(self)
        layout.addWidget(self.title_label)
        layout.addWidget(self.description_label)
        layout.addWidget(self.state_label)
        layout.addLayout(self.form)
        layout.addWidget(self.results_box)
        layout.addStretch(1)
        self.refresh()

    # ---- mirroring the model ----------------------------------------------------
    def refresh(self) -> None:
        """Show every spec, the title, the visible rows and the state badge."""
        specs = self.context.block.specs
        for name, editor in self.editors.items():
            editor.set_value(specs.get(name))
        self.refresh_context()

    def show_spec(self, name: str) -> None:
        """Show the model's value of one spec (after the flowsheet announced a change)."""
        self.editors[name].set_value(self.context.block.specs.get(name))
        self._update_rows()
        self._update_state()

    def refresh_context(self) -> None:
        """Components, ports, names or the unit system changed."""
        block = self.context.block
        self.title_label.setText(f"<b>{block.name}</b> · {block.kind}")
        for editor in self.editors.values():
            editor.refresh_context()
        self._update_rows()
        self._update_state()
        self.set_solution(self._solution)

    def _update_rows(self) -> None:
        block = self.context.block
        for spec_field in block.block_kind.spec_fields:
            visible = spec_field.needed_when is None or spec_field.is_needed(block.specs)
            self.form.setRowVisible(self.editors[spec_field.name], visible)
            if spec_field.kind in TABLE_KINDS:
                index, _role = self.form.getWidgetPosition(self.editors[spec_field.name])
                self.form.setRowVisible(index - 1, visible)

    def _update_state(self) -> None:
        from model.validation.validate import block_state

        try:
            state = block_state(self.context.flowsheet, self.context.block_name)
        except LoopwrightError as error:
            state = f"cannot check: {error}"
        colour = "#8a4b00" if state == "needs input" else "#2e6b30"
        self.state_label.setText(f"<span style='color:{colour}'>State: {state}</span>")

    def set_solution(self, solution: Any) -> None:
        self._solution = solution
        self.results_label.setText(
            block_results_html(solution, self.context.block_name, self.context.unit_system_getter())
        )
        self.heat_curve_button.setVisible(bool(self._profile()))

    def _profile(self) -> dict[str, list[float]]:
        blocks = getattr(self._solution, "blocks", None) or {}
        result = blocks.get(self.context.block_name)
        return getattr(result, "profile", None) or {}

    def show_heat_curve(self) -> None:
        """Open the heat curve of this exchanger's last result (a window of its own)."""
        from .heat_curve_dialog import HeatCurveDialog  # loads pyqtgraph

        profile = self._profile()
        if not profile:
            return
        if self.heat_curve_dialog is not None:
            self.heat_curve_dialog.close()
        self.heat_curve_dialog = HeatCurveDialog(
            self.context.block_name, profile, self.context.unit_system_getter(), self
        )
        self.heat_curve_dialog.show()

    # ---- applying edits ---------------------------------------------------------
    def apply(self, name: str, value: Any) -> bool:
        """Offer a value to the model through the undo stack; mark the editor if refused."""
        editor = self.editors[name]
        message = push_spec_change(
            self._undo_stack, self.context.flowsheet, self.context.block_name, name, value
        )
        if message:
            editor.show_error(message)
            return False
        self.show_spec(name)
        return True
