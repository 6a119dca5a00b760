"""The main window's actions, menus (File Edit View Solve Help) and toolbar.

Built in one place so the window class keeps to wiring and state. Actions that act on
the diagram (delete, copy, paste, rename, select all) take their shortcuts only while
the diagram has the keyboard focus, so typing in the details pane is never taken for a
diagram edit.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from PySide6.QtCore import Qt
from PySide6.QtGui import QAction, QActionGroup, QKeySequence
from PySide6.QtWidgets import QComboBox, QLabel, QMenu, QToolBar

from convergence import METHODS
from gui.window_host import ActionHost
from units_of_measure import UNIT_SYSTEMS

#: The File menu's exports: enabled once the case has a solution.
EXPORT_ACTIONS = ("export_csv", "export_xlsx", "export_report")


@dataclass
class WindowActions:
    """Every action of the window, the two choosers and the recent-files menu."""

    actions: dict[str, QAction] = field(default_factory=dict)
    method_combo: QComboBox | None = None
    unit_combo: QComboBox | None = None
    method_group: QActionGroup | None = None
    unit_group: QActionGroup | None = None
    recent_menu: QMenu | None = None
    toolbar: QToolBar | None = None

    def __getitem__(self, name: str) -> QAction:
        return self.actions[name]

    def enable_exports(self, enabled: bool) -> None:
        """File → Export … on (the case has a solution) or off."""
        for name in EXPORT_ACTIONS:
            self.actions[name].setEnabled(enabled)


def _action(
    window, actions: dict, name: str, text: str, slot, shortcut=None, tip: str = ""
) -> QAction:
    action = QAction(text, window)
    if shortcut is not None:
        shortcuts = shortcut if isinstance(shortcut, list) else [shortcut]
        action.setShortcuts([QKeySequence(s) for s in shortcuts])
    plain = text.replace("&", "").rstrip(".…")
    action.setIconText(plain)
    action.setStatusTip(tip or plain)
    action.setToolTip(tip or plain)
    action.triggered.connect(lambda _checked=False: slot())
    actions[name] = action
    return action


def build_actions(window: ActionHost) -> WindowActions:
    """Create the actions, menus and toolbar of ``window`` and return them."""
    result = WindowActions()
    a = result.actions
    files, editor = window.files, window.editor
    key = QKeySequence.StandardKey
    _action(window, a, "new", "&New", files.new_case, key.New, "New case")
    _action(window, a, "open", "&Open…", files.open_case, key.Open, "Open a case")
    _action(window, a, "save", "&Save", files.save, key.Save, "Save the case")
    _action(window, a, "save_as", "Save &As…", files.save_as, key.SaveAs)
    _action(
        window,
        a,
        "export_csv",
        "Export &CSV…",
        window.stream_table.ask_export,
        None,
        "Write the stream table, block results and closures to a CSV file (cautions first)",
    )
    _action(
        window,
        a,
        "export_xlsx",
        "Export &Spreadsheet…",
        window.exports.ask_xlsx,
        None,
        "Write the summary, stream table, block results and closures to an .xlsx file",
    )
    _action(
        window,
        a,
        "export_report",
        "Export &Report…",
        window.exports.ask_report,
        "Ctrl+P",
        "Write a printable report (PDF): the diagram, the tables and the cautions",
    )
    _action(window, a, "quit", "&Quit", window.close, key.Quit)
    a["undo"] = window.undo_stack.createUndoAction(window, "&Undo")
    a["undo"].setShortcuts([QKeySequence(key.Undo)])
    a["undo"].setIconText("Undo")  # the menu names the edit; the toolbar keeps its width
    a["redo"] = window.undo_stack.createRedoAction(window, "&Redo")
    a["redo"].setShortcuts([QKeySequence("Ctrl+Shift+Z"), QKeySequence("Ctrl+Y")])
    a["redo"].setIconText("Redo")
    _action(window, a, "copy", "&Copy", editor.copy_selection, key.Copy, "Copy the selected blocks")
    _action(window, a, "paste", "&Paste", editor.paste, key.Paste, "Paste copied blocks")
    _action(
        window,
        a,
        "delete",
        "&Delete",
        editor.delete_selection,
        [key.Delete, "Backspace"],
        "Delete the selected blocks and streams",
    )
    _action(window, a, "rename", "Re&name…", editor.rename_selected, "F2")
    _action(window, a, "select_all", "Select &All", editor.select_all, key.SelectAll)
    _action(
        window,
        a,
        "components",
        "Co&mponents…",
        window.show_components,
        None,
        "Show the case's components in the details pane",
    )
    for name in ("copy", "paste", "delete", "rename", "select_all"):
        a[name].setShortcutContext(Qt.ShortcutContext.WidgetWithChildrenShortcut)
        window.view.addAction(a[name])
    _action(window, a, "fit", "&Fit to View", window.view.fit_to_view, "Ctrl+0")
    _action(window, a, "zoom_in", "Zoom &In", lambda: window.view.zoom_by(1.25), key.ZoomIn)
    _action(window, a, "zoom_out", "Zoom &Out", lambda: window.view.zoom_by(0.8), key.ZoomOut)
    _action(
        window,
        a,
        "lay_out",
        "&Lay Out Diagram",
        editor.lay_out,
        "Ctrl+L",
        "Place the blocks anew: calculation order left to right, recycles below (undoable)",
    )
    _action(window, a, "solve", "&Solve", window.start_solve, "F5", "Solve the flowsheet (F5)")
    _action(window, a, "stop", "S&top", window.stop_solve, "Esc", "Stop the solve (Esc)")
    _action(
        window,
        a,
        "second_opinion",
        "Second &Opinion (all streams at once)",
        window.start_second_opinion,
        None,
        "Check the solution by solving every stream at once, without tear streams",
    )
    _action(
        window,
        a,
        "targets",
        "&Targets…",
        window.edit_targets,
        None,
        "Targets: adjust a spec until a result has the value wanted",
    )
    _action(
        window,
        a,
        "use_target_values",
        "&Use Target Values in the Specs",
        window.use_adjusted_values,
        None,
        "Write each met target's adjusted value into its spec (undoable)",
    )
    _action(window, a, "sweep", "S&weep…", window.show_sweep, None, "Sweep one or two specs")
    _action(window, a, "about", "&About Loopwright", window.show_about)
    _action(window, a, "clear_recent", "Clear Recent Files", files.clear_recent)
    a["stop"].setEnabled(False)
    a["second_opinion"].setEnabled(False)
    for name in EXPORT_ACTIONS:
        a[name].setEnabled(False)
    _build_choosers(window, result)
    _build_menus(window, result)
    _build_toolbar(window, result)
    return result


def _build_choosers(window: ActionHost, result: WindowActions) -> None:
    result.method_combo = QComboBox()
    result.method_combo.setToolTip("Convergence method for the recycle loops")
    result.method_group = QActionGroup(window)
    for method_key, human_name in METHODS.items():
        result.method_combo.addItem(human_name, method_key)
        action = QAction(human_name, window, checkable=True)
        action.setData(method_key)
        result.method_group.addAction(action)
    result.method_combo.currentIndexChanged.connect(
        lambda index: window.set_method(result.method_combo.itemData(index))
    )
    result.method_group.triggered.connect(lambda action: window.set_method(action.data()))
    result.unit_combo = QComboBox()
    result.unit_combo.setToolTip("Unit system of the stream table, details and hover text")
    result.unit_group = QActionGroup(window)
    for system in UNIT_SYSTEMS:
        result.unit_combo.addItem(system, system)
        action = QAction(system, window, checkable=True)
        action.setData(system)
        result.unit_group.addAction(action)
    result.unit_combo.currentIndexChanged.connect(
        lambda index: window.set_unit_system(result.unit_combo.itemData(index))
    )
    result.unit_group.triggered.connect(lambda action: window.set_unit_system(action.data()))


def _build_menus(window: ActionHost, result: WindowActions) -> None:
    a = result.actions
    bar = window.menuBar()
    file_menu = bar.addMenu("&File")
    file_menu.addActions([a["new"], a["open"]])
    result.recent_menu = file_menu.addMenu("Open &Recent")
    file_menu.addActions([a["save"], a["save_as"]])
    file_menu.addSeparator()
    file_menu.addActions([a[name] for name in EXPORT_ACTIONS])
    file_menu.addSeparator()
    file_menu.addAction(a["quit"])
    edit_menu = bar.addMenu("&Edit")
    edit_menu.addActions([a["undo"], a["redo"]])
    edit_menu.addSeparator()
    edit_menu.addActions([a["copy"], a["paste"], a["delete"], a["rename"], a["select_all"]])
    edit_menu.addSeparator()
    edit_menu.addAction(a["components"])
    view_menu = bar.addMenu("&View")
    view_menu.addActions([a["fit"], a["zoom_in"], a["zoom_out"]])
    view_menu.addAction(a["lay_out"])
    view_menu.addSeparator()
    units_menu = view_menu.addMenu("&Unit System")
    units_menu.addActions(result.unit_group.actions())
    window.panels_menu = view_menu.addMenu("&Panels")
    solve_menu = bar.addMenu("&Solve")
    solve_menu.addActions([a["solve"], a["stop"], a["second_opinion"]])
    solve_menu.addSeparator()
    solve_menu.addActions([a["targets"], a["use_target_values"], a["sweep"]])
    solve_menu.addSeparator()
    method_menu = solve_menu.addMenu("&Method")
    method_menu.addActions(result.method_group.actions())
    help_menu = bar.addMenu("&Help")
    help_menu.addAction(a["about"])


def _build_toolbar(window: ActionHost, result: WindowActions) -> None:
    a = result.actions
    toolbar = QToolBar("Main toolbar", window)
    toolbar.setObjectName("mainToolbar")
    toolbar.setMovable(False)
    toolbar.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextOnly)
    toolbar.addActions([a["new"], a["open"], a["save"]])
    toolbar.addSeparator()
    toolbar.addActions([a["undo"], a["redo"]])
    toolbar.addSeparator()
    toolbar.addActions([a["solve"], a["stop"]])
    toolbar.addSeparator()
    toolbar.addWidget(QLabel(" Method "))
    toolbar.addWidget(result.method_combo)
    toolbar.addWidget(QLabel("  Units "))
    toolbar.addWidget(result.unit_combo)
    window.addToolBar(toolbar)
    result.toolbar = toolbar


def fill_recent_menu(window: ActionHost, result: WindowActions) -> None:
    """Rebuild File → Open Recent from the saved list."""
    menu = result.recent_menu
    menu.clear()
    paths = window.files.recent_files()
    for number, path in enumerate(paths, start=1):
        action = menu.addAction(f"&{number} {path}")
        action.triggered.connect(lambda _checked=False, p=path: window.files.open_case(p))
    if paths:
        menu.addSeparator()
    menu.addAction(result.actions["clear_recent"])
