"""Loopwright's main window: block shelf, diagram, details pane, result tabs, status line.

The window holds one :class:`model.case.document.Case`. Every edit of the flowsheet goes through
the undo stack (structure commands from the diagram editor, spec commands from the
details pane); the views mirror the case through its signals. A solve runs in the
solve controller's worker thread while editing is switched off.
"""

from __future__ import annotations

import dataclasses
import threading

from PySide6.QtCore import Qt, QTimer
from PySide6.QtGui import QCloseEvent, QUndoStack
from PySide6.QtWidgets import QDockWidget, QMainWindow, QTabWidget, QWidget

from gui.diagram.editor import DiagramEditor, lay_out_if_unplaced
from gui.diagram.scene import DiagramScene
from gui.diagram.shelf import BlockShelf
from gui.diagram.view import DiagramView
from gui.exports import CaseExports
from gui.files import AUTOSAVE_SECONDS, CaseFiles
from gui.solve_controller import preload_solver_modules
from gui.status_line import StatusLine
from gui.window_actions import build_actions, fill_recent_menu
from gui.window_solve import WindowSolveMixin
from model.case.document import Case
from model.report.report_order import ReportOrder


def default_window_size() -> tuple[int, int]:
    """1360 x 860 at least; on a larger screen up to 90 % of it (at most 1680 x 1050), so
    a six-column diagram fits beside the docks at a readable zoom."""
    from PySide6.QtGui import QGuiApplication

    screen = QGuiApplication.primaryScreen()
    if screen is None:
        return 1360, 860
    available = screen.availableGeometry()
    width = max(1360, min(1680, int(0.9 * available.width())))
    height = max(860, min(1050, int(0.9 * available.height())))
    return width, height


class MainWindow(WindowSolveMixin, QMainWindow):
    """The desktop window around one case."""

    def __init__(self, autosave_seconds: float = AUTOSAVE_SECONDS) -> None:
        super().__init__()
        from gui.details import DetailsPane
        from gui.log_pane import LogPane
        from gui.solve_controller import SolveController
        from gui.stream_table import StreamTable

        self.setObjectName("loopwrightMainWindow")
        self.case = Case()
        self.undo_stack = QUndoStack(self)
        self.results_current = False
        self._edited_flowsheet = None
        self._state_refresh_pending = False
        self.scene = DiagramScene(self)
        self.view = DiagramView(self.scene)
        self.view.setObjectName("diagram")
        self.setCentralWidget(self.view)
        self.editor = DiagramEditor(
            self.scene, self.view, self.undo_stack, lambda: self.case.flowsheet, self
        )
        self.shelf = BlockShelf()
        self.details = DetailsPane(lambda: self.case.flowsheet, self.undo_stack)
        self.stream_table = StreamTable()
        self._monitor = None  # built just after the window shows (pyqtgraph takes a while)
        self.monitor_page = QWidget()
        self.log = LogPane()
        self.solver = SolveController(self)
        self.checker = SolveController(self)  # runs the second opinion
        self.last_second_opinion = None
        self.status = StatusLine(self)
        self.setStatusBar(self.status)
        self.files = CaseFiles(self, autosave_seconds)
        self.exports = CaseExports(self)
        self._build_docks()
        self.actions = build_actions(self)
        for dock in (self.shelf_dock, self.details_dock, self.results_dock):
            self.panels_menu.addAction(dock.toggleViewAction())
        self._connect()
        fill_recent_menu(self, self.actions)
        self.resize(*default_window_size())
        self.install_case(self.case)
        self.files.mark_saved()
        QTimer.singleShot(100, self, self._build_monitor)

    @property
    def monitor(self):
        """The recycle monitor, built on first use (it loads pyqtgraph)."""
        if self._monitor is None:
            from gui.recycle_monitor import RecycleMonitor

            monitor = RecycleMonitor()
            monitor.bounds_applied.connect(self._update_title)
            monitor.controls.settings_changed.connect(self._update_title)
            index = self.result_tabs.indexOf(self.monitor_page)
            self.result_tabs.removeTab(index)
            self.result_tabs.insertTab(index, monitor, "Recycle monitor")
            self.monitor_page.deleteLater()
            self.monitor_page = monitor
            self._monitor = monitor
            self._show_history()
        return self._monitor

    def _build_monitor(self) -> None:
        self.monitor  # noqa: B018 - the property builds it

    def _show_history(self) -> None:
        solution = self.case.solution
        self._monitor.bind_settings(self.case.settings)
        self._monitor.show_history(solution.convergence if solution is not None else None)
        self._monitor.show_targets(getattr(solution, "targets", None))

    # ---- layout and wiring ---------------------------------------------------------------
    def _dock(self, title: str, name: str, widget: QWidget, area) -> QDockWidget:
        dock = QDockWidget(title, self)
        dock.setObjectName(name)
        dock.setWidget(widget)
        dock.setFeatures(
            QDockWidget.DockWidgetFeature.DockWidgetMovable
            | QDockWidget.DockWidgetFeature.DockWidgetClosable
        )
        self.addDockWidget(area, dock)
        return dock

    def _build_docks(self) -> None:
        area = Qt.DockWidgetArea
        self.setCorner(Qt.Corner.BottomLeftCorner, area.BottomDockWidgetArea)
        self.setCorner(Qt.Corner.BottomRightCorner, area.BottomDockWidgetArea)
        self.shelf_dock = self._dock(
            "Block shelf", "shelfDock", self.shelf, area.LeftDockWidgetArea
        )
        self.details_dock = self._dock(
            "Details", "detailsDock", self.details, area.RightDockWidgetArea
        )
        self.result_tabs = QTabWidget()
        self.result_tabs.setDocumentMode(True)
        self.result_tabs.setMinimumHeight(150)  # the diagram may take the room it needs
        self.result_tabs.addTab(self.stream_table, "Stream table")
        self.result_tabs.addTab(self.monitor_page, "Recycle monitor")
        self.result_tabs.addTab(self.log, "Log")
        self.results_dock = self._dock(
            "Results", "resultsDock", self.result_tabs, area.BottomDockWidgetArea
        )
        self._docks_sized = False

    def showEvent(self, event) -> None:
        """Give the diagram most of the room once the window first has its size."""
        super().showEvent(event)
        if not self._docks_sized:
            self._docks_sized = True
            QTimer.singleShot(0, self, self._size_docks)
            QTimer.singleShot(300, self, self._preload_solver)

    def _preload_solver(self) -> None:
        """Import the solve's modules (networkx, scipy.optimize: about half a second) in a
        background thread while the user looks at the window, not when F5 is pressed."""
        threading.Thread(target=preload_solver_modules, name="preload-solver", daemon=True).start()

    def _size_docks(self) -> None:
        horizontal, vertical = Qt.Orientation.Horizontal, Qt.Orientation.Vertical
        self.resizeDocks([self.shelf_dock, self.details_dock], [150, 380], horizontal)
        # the diagrams are wide rather than tall: the results (plots, stream table) take 40 %
        self.resizeDocks([self.results_dock], [max(200, self.height() * 2 // 5)], vertical)

    def _connect(self) -> None:
        self.shelf.kind_activated.connect(self.editor.add_block_at_centre)
        self.editor.message.connect(self.show_message)
        self.scene.selectionChanged.connect(self._selection_changed)
        self.log.block_activated.connect(self.select_block)
        self.log.stream_activated.connect(self.select_stream)
        self.stream_table.stream_activated.connect(self.select_stream)
        self.solver.progress_batch.connect(self._solve_progress)
        self.solver.finished.connect(self._solve_finished)
        self.solver.failed.connect(self._solve_failed)
        self.checker.finished.connect(self._second_opinion_finished)
        self.checker.failed.connect(self._second_opinion_failed)
        self.undo_stack.indexChanged.connect(self._update_title)
        self.files.changed.connect(self._files_changed)

    # ---- the case --------------------------------------------------------------------------
    def install_case(self, case: Case) -> None:
        """Show ``case`` everywhere (used by New, Open and recovery); clears the undo stack."""
        if self._edited_flowsheet is not None:
            for signal in self._edit_signals(self._edited_flowsheet):
                signal.disconnect(self._model_edited)
        self.case = case
        self.undo_stack.clear()
        self._edited_flowsheet = case.flowsheet
        for signal in self._edit_signals(case.flowsheet):
            signal.connect(self._model_edited)
        lay_out_if_unplaced(case.flowsheet)
        self.scene.set_flowsheet(case.flowsheet)
        self.details.set_unit_system(case.unit_system)
        self.details.set_solution(case.solution)
        self.details.show_components()
        if self._monitor is not None:
            self._show_history()
        self._sync_choosers()
        self._show_results(case.solution, current=case.solution is not None)
        QTimer.singleShot(0, self.view, self.view.fit_to_view)

    def case_for_saving(self) -> Case:
        """The case as it should be written: results are dropped once the flowsheet has
        changed since the solve (they would no longer match it)."""
        if self.case.solution is None or self.results_current:
            return self.case
        return dataclasses.replace(self.case, solution=None)

    @staticmethod
    def _edit_signals(flowsheet) -> list:
        return [
            flowsheet.structure_changed,
            flowsheet.block_specs_changed,
            flowsheet.components_changed,
            flowsheet.stream_changed,
            flowsheet.targets_changed,
        ]

    def _model_edited(self, *_args) -> None:
        """Any edit that changes what a solve would give makes the results out of date."""
        if self.results_current:
            self.results_current = False
            self.scene.set_results(self.case.solution, current=False)
            self.status.set_closure("")
            self.update_solve_actions()
        if not self._state_refresh_pending:
            self._state_refresh_pending = True
            QTimer.singleShot(0, self, self._refresh_idle_state)

    def _refresh_idle_state(self) -> None:
        from model.validation.validate import block_states

        self._state_refresh_pending = False
        if self.solver.is_running() or self.results_current:
            return
        needs_input = "needs input" in block_states(self.case.flowsheet).values()
        self.status.set_state("needs input" if needs_input else "not solved")

    def _sync_choosers(self) -> None:
        actions = self.actions
        for combo, value in (
            (actions.method_combo, self.case.method),
            (actions.unit_combo, self.case.unit_system),
        ):
            combo.blockSignals(True)
            combo.setCurrentIndex(max(0, combo.findData(value)))
            combo.blockSignals(False)
        for group, value in (
            (actions.method_group, self.case.method),
            (actions.unit_group, self.case.unit_system),
        ):
            for action in group.actions():
                action.setChecked(action.data() == value)

    def set_method(self, method: str) -> None:
        if method and method != self.case.method:
            self.case.method = method
            self._sync_choosers()
            self._update_title()

    def set_unit_system(self, name: str) -> None:
        if not name:
            return
        self.case.unit_system = name
        self._sync_choosers()
        self.scene.set_unit_system(name)
        self.details.set_unit_system(name)
        order = ReportOrder.of(self.case.flowsheet)
        self.stream_table.set_solution(self.case.solution, name, report_order=order)
        self._update_title()

    def _files_changed(self) -> None:
        self._update_title()
        fill_recent_menu(self, self.actions)

    def _update_title(self, *_unused) -> None:
        self.setWindowTitle(f"{self.files.display_name()}[*] — Loopwright")
        self.setWindowModified(self.files.is_modified())

    def show_message(self, text: str, milliseconds: int = 8000) -> None:
        """A passing note in the status bar."""
        self.status.show_note(text, milliseconds)

    # ---- selection ----------------------------------------------------------------------
    def _selection_changed(self) -> None:
        blocks = self.scene.selected_block_names()
        streams = self.scene.selected_stream_names()
        if len(blocks) == 1 and not streams:
            self.details.show_block(blocks[0])
        elif len(streams) == 1 and not blocks:
            self.details.show_stream(streams[0])
        elif not blocks and not streams:
            self.details.show_components()
        else:
            self.details.clear()

    def select_block(self, name: str) -> None:
        """Select a block on the diagram (from the log, for example) and bring it in view."""
        item = self.scene.block_item(name)
        if item is not None:
            self.scene.select_only([name])
            self.view.center_on_item(item)

    def select_stream(self, name: str) -> None:
        item = self.scene.stream_item(name)
        if item is not None:
            self.scene.select_only(streams=[name])
            self.view.centerOn(item.midpoint())

    def show_components(self) -> None:
        self.scene.clearSelection()
        self.details.show_components()
        self.details_dock.show()

    def show_about(self) -> None:
        from gui.about import AboutDialog

        AboutDialog(self).exec()

    # ---- closing -------------------------------------------------------------------------
    def closeEvent(self, event: QCloseEvent) -> None:
        if self.solver.is_running():
            self.solver.stop()  # maybe_save below refuses; the user closes once it stopped
        if not self.files.maybe_save():
            event.ignore()
            return
        self.files.clean_exit()
        event.accept()
