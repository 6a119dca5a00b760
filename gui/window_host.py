"""What the window's parts need of the main window, as typing protocols.

The parts (actions and menus, case files) are built by the main window and stand below
it: they name the attributes they use here instead of importing the window class.
"""

from __future__ import annotations

from typing import Any, Protocol

from PySide6.QtGui import QUndoStack


class CaseHost(Protocol):
    """The window as the case files see it: the case, its undo stack, messages."""

    case: Any
    undo_stack: QUndoStack

    def is_busy(self) -> bool: ...

    def show_message(self, text: str, milliseconds: int = ...) -> None: ...

    def case_for_saving(self) -> Any: ...

    def install_case(self, case: Any) -> None: ...


class ActionHost(Protocol):
    """The window as its actions, menus and toolbar see it."""

    files: Any
    editor: Any
    view: Any
    stream_table: Any
    exports: Any
    undo_stack: QUndoStack
    panels_menu: Any

    def close(self) -> bool: ...

    def menuBar(self) -> Any: ...  # noqa: N802 (Qt's name)

    def addToolBar(self, toolbar: Any) -> None: ...  # noqa: N802 (Qt's name)

    def show_components(self) -> None: ...

    def show_about(self) -> None: ...

    def start_solve(self) -> None: ...

    def stop_solve(self) -> None: ...

    def start_second_opinion(self) -> None: ...

    def set_method(self, method: str) -> None: ...

    def set_unit_system(self, name: str) -> None: ...
