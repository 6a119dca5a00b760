"""Live solver controls: q bounds, acceleration interval, tolerance, iteration limit and
the dominant-mode step (on or off).

Each field calls ``SolverSettings.update`` as soon as the user finishes typing, also
while a solve runs (the settings object is thread-safe and the run picks the change up
at its next iteration). A refused value keeps the settings as they were; the field is
marked red, shows the solver's message and keeps the text typed.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from PySide6.QtCore import QSignalBlocker, Signal
from PySide6.QtWidgets import (
    QCheckBox,
    QGridLayout,
    QLabel,
    QLineEdit,
    QVBoxLayout,
    QWidget,
)

from convergence import ConvergenceInputError, SolverSettings
from gui.details.spec_editors import INVALID_COLOR, set_invalid_style

#: (setting name, label, parser, tooltip)
CONTROLS: tuple[tuple[str, str, Callable[[str], Any], str], ...] = (
    ("q_min", "q_min", float, "Lower bound of Wegstein's q; more negative accelerates more."),
    ("q_max", "q_max", float, "Upper bound of q; above 0 damps oscillating loops (keep < 1)."),
    (
        "acceleration_interval",
        "Accelerate every",
        int,
        "Accelerate every k-th iteration; the others are direct-substitution steps.",
    ),
    ("tolerance", "Tolerance", float, "Largest scaled residual accepted as converged."),
    ("max_iterations", "Iteration limit", int, "Largest number of flowsheet passes."),
)


DOMINANT_MODE_TIP = (
    "On a tear whose variables are coupled, step on its leading modes (fitted from "
    "the last three steps) instead of Wegstein's per-variable q; shown as 'dominant mode' "
    "steps in the history."
)


def _number_text(value: Any) -> str:
    return f"{value:g}" if isinstance(value, float) else str(value)


class LiveControls(QWidget):
    """Line edits bound to one :class:`~convergence.SolverSettings`.

    Signals
    -------
    settings_changed(object)
        The settings' new snapshot after an accepted change.
    """

    settings_changed = Signal(object)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.settings: SolverSettings | None = None
        self.edits: dict[str, QLineEdit] = {}
        self._dirty: set[str] = set()
        grid = QGridLayout()
        grid.setHorizontalSpacing(6)
        for index, (name, label, _parser, tooltip) in enumerate(CONTROLS):
            edit = QLineEdit()
            edit.setToolTip(tooltip)
            edit.setMinimumWidth(60)
            edit.textEdited.connect(lambda _text, n=name: self._dirty.add(n))
            edit.editingFinished.connect(lambda n=name: self.apply(n))
            self.edits[name] = edit
            caption = QLabel(label)
            caption.setToolTip(tooltip)
            row, column = divmod(index, 2)
            grid.addWidget(caption, row, 2 * column)
            grid.addWidget(edit, row, 2 * column + 1)
        self.dominant_mode = QCheckBox("Dominant-mode step")
        self.dominant_mode.setToolTip(DOMINANT_MODE_TIP)
        self.dominant_mode.toggled.connect(self._apply_dominant_mode)
        grid.addWidget(self.dominant_mode, grid.rowCount(), 0, 1, 4)
        self.message_label = QLabel()
        self.message_label.setWordWrap(True)
        self.message_label.setStyleSheet(f"color: {INVALID_COLOR};")
        self.message_label.hide()
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addLayout(grid)
        layout.addWidget(self.message_label)
        self.setEnabled(False)

    def bind(self, settings: SolverSettings) -> None:
        """Show and edit ``settings`` from now on."""
        self.settings = settings
        self.setEnabled(True)
        self._dirty.clear()
        self.refresh()
        self._show_message("")

    def refresh(self) -> None:
        """Show the settings' values (signals blocked); fields with a refused entry keep it."""
        if self.settings is None:
            return
        for name, edit in self.edits.items():
            if name in self._dirty:
                continue
            with QSignalBlocker(edit):
                edit.setText(_number_text(getattr(self.settings, name)))
            set_invalid_style(edit, None)
        with QSignalBlocker(self.dominant_mode):
            self.dominant_mode.setChecked(self.settings.dominant_mode)

    def _apply_dominant_mode(self, checked: bool) -> None:
        if self.settings is None:
            return
        self.settings.update(dominant_mode=checked)
        self.settings_changed.emit(self.settings.snapshot())

    def apply(self, name: str) -> bool:
        """Send the field's typed value to the settings; mark it and keep it if refused."""
        if self.settings is None or name not in self._dirty:
            return False
        edit = self.edits[name]
        parser = next(p for n, _label, p, _tip in CONTROLS if n == name)
        text = edit.text().strip().replace("\u2212", "-")
        try:
            value = parser(text)
        except ValueError:
            kind = "a whole number" if parser is int else "a number"
            return self._refuse(name, f"{name}: {text!r} is not allowed; {kind}")
        try:
            self.settings.update(**{name: value})
        except ConvergenceInputError as error:
            return self._refuse(name, str(error))
        self._dirty.discard(name)
        set_invalid_style(edit, None)
        self._show_message("")
        self.refresh()
        self.settings_changed.emit(self.settings.snapshot())
        return True

    def _refuse(self, name: str, message: str) -> bool:
        self._dirty.add(name)
        kept = _number_text(getattr(self.settings, name))
        full = f"{message} (kept {name} = {kept})"
        set_invalid_style(self.edits[name], full)
        self._show_message(full)
        return False

    def _show_message(self, message: str) -> None:
        self.message_label.setText(message)
        self.message_label.setVisible(bool(message))

    def error_text(self) -> str:
        return self.message_label.text() if not self.message_label.isHidden() else ""
