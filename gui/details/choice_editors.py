"""The simpler spec editors: a plain fraction, a choice of words, an outlet port."""

from __future__ import annotations

from PySide6.QtCore import QSignalBlocker
from PySide6.QtWidgets import QComboBox, QLineEdit, QVBoxLayout

from units_of_measure import UnitError, parse_quantity

from .spec_editors import EditorContext, SpecEditor, number_text, set_invalid_style


class FractionEditor(SpecEditor):
    """A plain fraction between 0 and 1 (``"2 %"`` is read as 0.02)."""

    def __init__(self, context: EditorContext, kind: str = "fraction", parent=None) -> None:
        super().__init__(context, kind, parent)
        self.value_edit = QLineEdit()
        self.value_edit.setPlaceholderText("0 to 1")
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.value_edit)
        layout.addWidget(self.message_label)
        self._dirty = False
        self.value_edit.textEdited.connect(lambda _text: setattr(self, "_dirty", True))
        self.value_edit.editingFinished.connect(self._commit)

    def set_value(self, value: float | None) -> None:
        self._dirty = False
        with QSignalBlocker(self.value_edit):
            self.value_edit.setText("" if value is None else number_text(float(value)))
        self.clear_error()
        set_invalid_style(self.value_edit, None)

    def show_error(self, message: str) -> None:
        super().show_error(message)
        set_invalid_style(self.value_edit, message)

    def _commit(self) -> None:
        if not self._dirty:
            return
        text = self.value_edit.text().strip()
        self._dirty = False
        if not text:
            self.edited.emit(None)
            return
        try:
            value = float(parse_quantity(text, "fraction", self.context.block_name).magnitude)
        except UnitError as error:
            self._dirty = True
            self.show_error(str(error))
            return
        self.edited.emit(value)


class ChoiceEditor(SpecEditor):
    """One of a fixed list of words (phase, mode, basis)."""

    def __init__(self, context: EditorContext, choices: tuple[str, ...], parent=None) -> None:
        super().__init__(context, "choice", parent)
        self.combo = QComboBox()
        self.combo.addItems(list(choices))
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.combo)
        layout.addWidget(self.message_label)
        self.combo.activated.connect(lambda _i: self.edited.emit(self.combo.currentText()))

    def set_value(self, value: str | None) -> None:
        with QSignalBlocker(self.combo):
            self.combo.setCurrentIndex(self.combo.findText(value) if value else -1)
        self.clear_error()


class PortEditor(SpecEditor):
    """One of the block's outlet ports, shown with the stream that leaves it."""

    def __init__(self, context: EditorContext, parent=None) -> None:
        super().__init__(context, "port", parent)
        self.combo = QComboBox()
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.combo)
        layout.addWidget(self.message_label)
        self._value: str | None = None
        self.combo.activated.connect(lambda _i: self.edited.emit(self.combo.currentData()))
        self.refresh_context()

    def refresh_context(self) -> None:
        flowsheet = self.context.flowsheet
        with QSignalBlocker(self.combo):
            self.combo.clear()
            for port in flowsheet.outlet_ports(self.context.block_name):
                stream = flowsheet.stream_out_of(self.context.block_name, port)
                self.combo.addItem(port if stream is None else f"{port} ({stream.name})", port)
            self.combo.setCurrentIndex(self.combo.findData(self._value) if self._value else -1)

    def set_value(self, value: str | None) -> None:
        self._value = value
        self.refresh_context()
        self.clear_error()
