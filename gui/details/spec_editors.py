"""Editors for one block specification each, drawn from the spec field's kind.

Every editor shows the model's value through :meth:`SpecEditor.set_value` (with its own
signals blocked) and announces a new value the user committed through ``edited``; it
never writes to the flowsheet itself. When the model refuses a value, the owner calls
:meth:`SpecEditor.show_error`: the editor marks the entry red, shows the message beside
it and keeps the text the user typed.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from PySide6.QtCore import QSignalBlocker, Qt, Signal
from PySide6.QtGui import QColor
from PySide6.QtWidgets import (
    QApplication,
    QComboBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QVBoxLayout,
    QWidget,
)

from model.flowsheet.document import Block, Flowsheet
from model.flowsheet.spec_values import TypedQuantity
from units_of_measure import (
    UNIT_SYSTEMS,
    UnitError,
    display_units,
    from_internal,
    parse_quantity,
    resolve_unit,
    to_internal,
)

INVALID_COLOR = "#b3261e"
INVALID_CELL = QColor("#f9dedc")
COMPUTED_CELL = QColor("#eef1f3")
FLOW_KINDS = ("molar_flow", "mass_flow")


@dataclass
class EditorContext:
    """What an editor needs to know besides its own value: whose spec it edits."""

    flowsheet_getter: Callable[[], Flowsheet]
    block_name: str
    unit_system_getter: Callable[[], str]

    @property
    def flowsheet(self) -> Flowsheet:
        return self.flowsheet_getter()

    @property
    def block(self) -> Block:
        return self.flowsheet.block(self.block_name)

    def default_unit(self, kind: str) -> str:
        """The unit of ``kind`` in the chosen unit system, for an empty field."""
        return UNIT_SYSTEMS[self.unit_system_getter()].unit_for(kind)


def number_text(value: float) -> str:
    """A float as editable text: up to 12 significant digits, no trailing zeros."""
    return f"{value:.12g}"


def rounded(value: float) -> float:
    """``value`` rounded to 12 significant digits, so a converted spec reads cleanly."""
    return float(f"{value:.12g}")


def set_invalid_style(widget: QWidget, message: str | None) -> None:
    """Give ``widget`` a red border and the message as tooltip, or remove both."""
    if message:
        widget.setStyleSheet(f"border: 2px solid {INVALID_COLOR};")
        widget.setToolTip(message)
    else:
        widget.setStyleSheet("")
        widget.setToolTip("")


class SpecEditor(QWidget):
    """Base of the spec editors: an ``edited`` signal, a value setter and an error mark."""

    edited = Signal(object)

    def __init__(self, context: EditorContext, kind: str, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.context = context
        self.kind = kind
        self.message_label = QLabel()
        self.message_label.setWordWrap(True)
        self.message_label.setStyleSheet(f"color: {INVALID_COLOR};")
        self.message_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.message_label.hide()

    def set_value(self, value: Any) -> None:
        """Show the model's value; clears any error mark."""
        raise NotImplementedError

    def show_error(self, message: str) -> None:
        """Mark the entry the user just made as refused, with the model's message."""
        self.message_label.setText(message)
        self.message_label.show()

    def clear_error(self) -> None:
        self.message_label.clear()
        self.message_label.hide()

    def error_text(self) -> str:
        """The message shown, or "" when the entry is accepted."""
        return "" if self.message_label.isHidden() else self.message_label.text()

    def refresh_context(self) -> None:
        """Called when components, ports or the unit system changed; default: nothing."""


class QuantityEditor(SpecEditor):
    """A number with an editable unit chooser offering the kind's units.

    Typing ``"25 degC"`` sets the number and the unit at once; a bare number takes the
    chosen unit; any unit pint accepts for the kind may be typed in the chooser.
    Choosing another unit converts the value shown (the same quantity; between a molar
    and a mass flow unit the number is kept, as a new spec). With no value yet, the
    chosen unit is the one the next number is read in.

    Typed text is held, not applied, while the keyboard focus moves from the number to
    the unit chooser: the text is applied when it is committed (Enter, or the focus
    leaving the editor) or, together with the unit, when a unit is chosen. So "25"
    then "degF" is one edit (one undo step) of 25 degF, not 25 degC converted.
    """

    def __init__(self, context: EditorContext, kind: str, parent: QWidget | None = None) -> None:
        super().__init__(context, kind, parent)
        self._kinds = FLOW_KINDS if kind == "flow" else (kind,)
        self._value: TypedQuantity | None = None
        self._dirty = False
        self.value_edit = QLineEdit()
        self.unit_combo = QComboBox()
        self.unit_combo.setEditable(True)
        self.unit_combo.setInsertPolicy(QComboBox.InsertPolicy.NoInsert)
        for each in self._kinds:
            self.unit_combo.addItems(list(display_units(each)))
        self.unit_combo.setMinimumContentsLength(7)
        row = QHBoxLayout()
        row.setContentsMargins(0, 0, 0, 0)
        row.addWidget(self.value_edit, 3)
        row.addWidget(self.unit_combo, 2)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addLayout(row)
        layout.addWidget(self.message_label)
        self.value_edit.textEdited.connect(self._on_text_edited)
        self.value_edit.editingFinished.connect(self._on_editing_finished)
        self.unit_combo.activated.connect(self._on_unit_chosen)
        self.unit_combo.lineEdit().editingFinished.connect(self._on_unit_typed)
        self._show_unit(context.default_unit(self._kinds[0]))

    # ---- showing ----------------------------------------------------------------
    def set_value(self, value: TypedQuantity | None) -> None:
        self._value = value
        self._dirty = False
        with QSignalBlocker(self.value_edit), QSignalBlocker(self.unit_combo):
            if value is None:
                self.value_edit.clear()
                self._show_unit(self.context.default_unit(self._kinds[0]))
            else:
                self.value_edit.setText(number_text(value.value))
                self._show_unit(value.unit)
        self._clear_marks()

    def refresh_context(self) -> None:
        if self._value is None and not self._dirty:
            with QSignalBlocker(self.unit_combo):
                self._show_unit(self.context.default_unit(self._kinds[0]))

    def unit(self) -> str:
        return self.unit_combo.currentText().strip()

    def has_pending_text(self) -> bool:
        """True while typed text waits to be applied (held or refused)."""
        return self._dirty

    def typed_quantity(self) -> TypedQuantity | None:
        """The text shown read in the chosen unit (None when empty); raises UnitError."""
        text = self.value_edit.text().strip()
        if not text:
            return None
        number, unit = self._parse(text, self.unit())
        return TypedQuantity(number, unit)

    def internal_value(self) -> float | None:
        """:meth:`typed_quantity` in internal units (None when empty); raises UnitError."""
        quantity = self.typed_quantity()
        if quantity is None:
            return None
        return to_internal(quantity.value, quantity.unit, self._unit_kind(quantity.unit))

    def _show_unit(self, unit: str) -> None:
        index = self.unit_combo.findText(unit)
        if index >= 0:
            self.unit_combo.setCurrentIndex(index)
        self.unit_combo.setEditText(unit)

    def show_error(self, message: str) -> None:
        super().show_error(message)
        set_invalid_style(self.value_edit, message)

    def _clear_marks(self) -> None:
        self.clear_error()
        set_invalid_style(self.value_edit, None)
        set_invalid_style(self.unit_combo, None)

    # ---- typing -----------------------------------------------------------------
    def _on_text_edited(self, _text: str) -> None:
        self._dirty = True

    def _field(self) -> str:
        return f"{self.context.block_name}.{self.objectName() or 'value'}"

    def _parse(self, text: str, default_unit: str | None) -> tuple[float, str]:
        """Number and unit text of ``text`` for one of the editor's kinds."""
        error: UnitError | None = None
        for each in self._kinds:
            try:
                quantity = parse_quantity(text, each, self._field(), default_unit)
            except UnitError as refused:
                error = error or refused
                continue
            number = float(quantity.magnitude)
            typed_unit = text.strip()[len(_leading_number(text)) :].strip()
            return number, typed_unit or (default_unit or "")
        assert error is not None
        raise error

    def _inside_unit_chooser(self, widget: QWidget | None) -> bool:
        combo = self.unit_combo
        if widget is None:
            return False
        popup = combo.view().window()
        return widget is combo or combo.isAncestorOf(widget) or widget.window() is popup

    def _on_editing_finished(self) -> None:
        """Apply the typed text, unless the focus went to this editor's unit chooser:
        then the text waits for the unit (see the class docstring)."""
        if self._dirty and self._inside_unit_chooser(QApplication.focusWidget()):
            return
        self._commit_text()

    def _commit_text(self, chosen_unit: str | None = None) -> None:
        """Apply the typed text; with ``chosen_unit``, in that unit (converted if the text
        named another unit of the same kind)."""
        if not self._dirty:
            return
        text = self.value_edit.text().strip()
        if not text:
            self._dirty = False
            self._clear_marks()
            self.edited.emit(None)
            return
        try:
            number, unit = self._parse(text, self.unit())
        except UnitError as error:
            self.show_error(str(error))
            return
        if chosen_unit and unit != chosen_unit:
            number, unit = self._in_unit(number, unit, chosen_unit), chosen_unit
        self._dirty = False
        self._clear_marks()
        with QSignalBlocker(self.value_edit), QSignalBlocker(self.unit_combo):
            self.value_edit.setText(number_text(number))
            self._show_unit(unit)
        self.edited.emit(TypedQuantity(number, unit))

    # ---- choosing a unit ----------------------------------------------------------
    def _on_unit_chosen(self, _index: int) -> None:
        self._change_unit(self.unit_combo.currentText().strip())

    def _on_unit_typed(self) -> None:
        unit = self.unit()
        if self._value is not None and unit == self._value.unit and not self._dirty:
            return
        self._change_unit(unit)

    def _unit_kind(self, unit: str) -> str | None:
        for each in self._kinds:
            try:
                resolve_unit(unit, each)
            except UnitError:
                continue
            return each
        return None

    def _change_unit(self, unit: str) -> None:
        kind = self._unit_kind(unit)
        if kind is None:
            expected = " or ".join(k.replace("_", " ") for k in self._kinds)
            message = (
                f"{self._field()}: unit {unit!r} is not allowed; expected a unit of {expected}"
            )
            self.show_error(message)
            set_invalid_style(self.unit_combo, message)
            return
        set_invalid_style(self.unit_combo, None)
        if self._dirty or self._value is None:
            if self.value_edit.text().strip():
                self._dirty = True
                self._commit_text(chosen_unit=unit)
            return
        number = self._in_unit(self._value.value, self._value.unit, unit)
        self._clear_marks()
        with QSignalBlocker(self.value_edit):
            self.value_edit.setText(number_text(number))
        self.edited.emit(TypedQuantity(number, unit))

    def _in_unit(self, number: float, unit: str, new_unit: str) -> float:
        """``number`` in ``unit`` expressed in ``new_unit``; between a molar and a mass
        flow unit the number is kept (a new spec on the other basis)."""
        kind = self._unit_kind(unit)
        if kind is None or kind != self._unit_kind(new_unit):
            return number
        return rounded(from_internal(to_internal(number, unit, kind), kind, new_unit))


def _leading_number(text: str) -> str:
    """The leading number of ``text`` as typed (sign, digits, point, exponent)."""
    match = re.match(r"\s*[+\-\u2212]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?", text)
    return match.group(0) if match else ""
