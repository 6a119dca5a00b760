"""The details pane: the selected block's specs, the selected stream, or the components.

It mirrors the flowsheet through its psygnal signals (reconnecting when the window
swaps in another case's flowsheet) and edits it only through undo commands. Block forms
are kept per block while the block exists, so text the user typed and that the model
refused is still there when they come back to the block.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from PySide6.QtCore import Qt
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import QLabel, QScrollArea, QVBoxLayout, QWidget

from model.flowsheet.document import Flowsheet

from .block_form import BlockForm
from .components_pane import ComponentsPane
from .spec_editors import EditorContext
from .stream_details import StreamDetails

_SIGNAL_SLOTS = (
    ("block_specs_changed", "_on_specs_changed"),
    ("components_changed", "_on_components_changed"),
    ("property_method_changed", "_on_property_method_changed"),
    ("structure_changed", "_on_structure_changed"),
    ("block_renamed", "_on_block_renamed"),
    ("block_removed", "_on_block_removed"),
    ("stream_renamed", "_on_stream_renamed"),
    ("stream_changed", "_on_stream_changed"),
)


class DetailsPane(QWidget):
    """Details of the selected item.

    Parameters
    ----------
    flowsheet_getter
        Returns the case's flowsheet now (the window may open another case).
    undo_stack
        Where every edit goes.
    """

    def __init__(
        self,
        flowsheet_getter: Callable[[], Flowsheet],
        undo_stack: QUndoStack,
        parent: QWidget | None = None,
    ) -> None:
        super().__init__(parent)
        self._flowsheet_getter = flowsheet_getter
        self._undo_stack = undo_stack
        self._unit_system = "Metric"
        self._solution: Any = None
        self._connected: Flowsheet | None = None
        self._forms: dict[str, BlockForm] = {}
        self._current: QWidget | None = None
        self.scroll = QScrollArea()
        self.scroll.setWidgetResizable(True)
        self.scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.scroll)
        self.empty_page = QLabel(
            "Select a block or a stream on the diagram to see its "
            "details, or open the component list."
        )
        self.empty_page.setWordWrap(True)
        self.empty_page.setAlignment(Qt.AlignmentFlag.AlignTop | Qt.AlignmentFlag.AlignLeft)
        self.empty_page.setMargin(8)
        self.stream_page = StreamDetails(self.flowsheet, undo_stack, self.unit_system)
        self.components_page = ComponentsPane(self.flowsheet, undo_stack, self.unit_system)
        self._show_page(self.empty_page)

    # ---- access -----------------------------------------------------------------
    def flowsheet(self) -> Flowsheet:
        self._sync_flowsheet()
        return self._flowsheet_getter()

    def unit_system(self) -> str:
        return self._unit_system

    def current_page(self) -> QWidget | None:
        return self._current

    def current_form(self) -> BlockForm | None:
        return self._current if isinstance(self._current, BlockForm) else None

    # ---- public API (used by the window) ---------------------------------------
    def show_block(self, name: str) -> BlockForm:
        """Show the specs and results of block ``name``."""
        flowsheet = self.flowsheet()
        flowsheet.block(name)  # unknown name -> InputError
        form = self._forms.get(name)
        if form is None:
            context = EditorContext(self.flowsheet, name, self.unit_system)
            form = BlockForm(context, self._undo_stack)
            form.set_solution(self._solution)
            self._forms[name] = form
        self._show_page(form)
        return form

    def show_stream(self, name: str) -> None:
        self.flowsheet().stream(name)
        self.stream_page.set_solution(self._solution)
        self.stream_page.show_stream(name)
        self._show_page(self.stream_page)

    def show_components(self) -> None:
        self.flowsheet()
        self.components_page.refresh()
        self._show_page(self.components_page)

    def clear(self) -> None:
        """Show nothing selected."""
        self._sync_flowsheet()
        self._show_page(self.empty_page)

    def refresh(self) -> None:
        """Redraw what is shown from the model (e.g. after the window loaded a case)."""
        self._sync_flowsheet()
        page = self._current
        if isinstance(page, BlockForm):
            page.refresh()
        elif page is self.stream_page:
            self.stream_page.refresh()
        elif page is self.components_page:
            self.components_page.refresh()

    def set_unit_system(self, name: str) -> None:
        """Display results and empty fields' units in unit system ``name``."""
        from units_of_measure import UNIT_SYSTEMS

        UNIT_SYSTEMS[name]  # unknown name -> UnitError listing the known ones
        self._unit_system = name
        for form in self._forms.values():
            form.refresh_context()
        self.stream_page.refresh_context()
        self.components_page.set_unit_system()

    def set_solution(self, solution: Any) -> None:
        """Results to show for the selected item (None: not solved)."""
        self._solution = solution
        for form in self._forms.values():
            form.set_solution(solution)
        self.stream_page.set_solution(solution)

    # ---- internals --------------------------------------------------------------
    def _show_page(self, page: QWidget) -> None:
        if self._current is page:
            return
        if self._current is not None:
            self.scroll.takeWidget()
        self.scroll.setWidget(page)
        page.show()
        self._current = page

    def _sync_flowsheet(self) -> None:
        """Follow the window's flowsheet: reconnect signals and forget old forms."""
        flowsheet = self._flowsheet_getter()
        if flowsheet is self._connected:
            return
        if self._connected is not None:
            for signal, slot in _SIGNAL_SLOTS:
                getattr(self._connected, signal).disconnect(getattr(self, slot))
        for signal, slot in _SIGNAL_SLOTS:
            getattr(flowsheet, signal).connect(getattr(self, slot))
        self._connected = flowsheet
        if self._forms:
            self._show_page(self.empty_page)
        for form in self._forms.values():
            form.deleteLater()
        self._forms.clear()

    def _on_specs_changed(self, block: Any, field: str) -> None:
        form = self._forms.get(block.name)
        if form is not None:
            form.show_spec(field)

    def _on_components_changed(self) -> None:
        for form in self._forms.values():
            form.refresh_context()
        self.stream_page.refresh_context()
        self.components_page.refresh()

    def _on_property_method_changed(self, _name: str) -> None:
        self.components_page.refresh()

    def _on_structure_changed(self) -> None:
        flowsheet = self._flowsheet_getter()
        for form in self._forms.values():
            if form.context.block_name in flowsheet.blocks:
                form.refresh_context()
        if self._current is self.stream_page:
            if self.stream_page.stream_name in flowsheet.streams:
                self.stream_page.refresh()
            else:
                self._show_page(self.empty_page)

    def _on_block_renamed(self, block: Any, old: str) -> None:
        form = self._forms.pop(old, None)
        if form is not None:
            form.context.block_name = block.name
            self._forms[block.name] = form

    def _on_block_removed(self, block: Any) -> None:
        form = self._forms.pop(block.name, None)
        if form is None:
            return
        if self._current is form:
            self._show_page(self.empty_page)
        form.deleteLater()

    def _on_stream_renamed(self, stream: Any, old: str) -> None:
        if self.stream_page.stream_name == old:
            self.stream_page.stream_name = stream.name

    def _on_stream_changed(self, stream: Any) -> None:
        if self._current is self.stream_page and self.stream_page.stream_name == stream.name:
            self.stream_page.refresh()
