"""Every menu item and toolbar button does something, says so, and the caution line stays
readable (pytest-qt, offscreen)."""

from __future__ import annotations

import pytest
from PySide6.QtCore import SIGNAL
from PySide6.QtWidgets import QMenu, QWidgetAction

from model.report.cautions import CAUTIONS

pytestmark = pytest.mark.gui


def _menu_actions(menu: QMenu) -> list:
    found = []
    for action in menu.actions():
        if action.isSeparator():
            continue
        if action.menu() is not None:
            found += _menu_actions(action.menu())
        else:
            found.append(action)
    return found


def test_no_menu_item_or_toolbar_button_is_dead(window):
    actions = [a for m in window.menuBar().actions() for a in _menu_actions(m.menu())]
    actions += [a for a in window.actions.toolbar.actions() if not a.isSeparator()]
    assert len(actions) > 25
    for action in actions:
        if isinstance(action, QWidgetAction):
            continue  # the toolbar's method and unit choosers (tested in test_window.py)
        group = action.actionGroup()
        connected = action.receivers(SIGNAL("triggered(bool)")) + (
            group.receivers(SIGNAL("triggered(QAction*)")) if group is not None else 0
        )
        label = action.text() or action.iconText()
        assert connected > 0, f"{label!r} is connected to nothing"
        assert action.statusTip() or action.toolTip(), label


def test_edit_actions_explain_themselves_when_there_is_nothing_to_act_on(window):
    notes = []
    window.editor.message.connect(notes.append)
    window.actions["copy"].trigger()
    window.actions["paste"].trigger()
    window.actions["delete"].trigger()
    assert notes == [
        "Select blocks on the diagram to copy them.",
        "Nothing to paste: copy blocks first.",
        "Select blocks or streams on the diagram to delete them.",
    ]
    assert window.status.note_label.text() == notes[-1]
    window.editor.add_block("Mixer", 0.0, 0.0)
    window.editor.add_block("Heater", 256.0, 0.0)
    window.actions["select_all"].trigger()
    window.actions["copy"].trigger()
    assert notes[-1] == "Copied 2 blocks and the streams between them."
    window.actions["paste"].trigger()
    assert len(window.case.flowsheet.blocks) == 4


def test_export_from_the_file_menu_and_the_caution_line_after_a_solve(
    qtbot, window, example_path, tmp_path, monkeypatch
):
    export = window.actions["export_csv"]
    assert not export.isEnabled()  # nothing solved yet
    assert window.files.open_path(str(example_path("ammonia_loop_fixed_split")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.actions["solve"].trigger()
    assert export.isEnabled()
    path = tmp_path / "loop.csv"
    monkeypatch.setattr(
        "gui.stream_table.QFileDialog.getSaveFileName", lambda *args: (str(path), "")
    )
    export.trigger()
    assert path.read_text("utf-8").splitlines()[0] == "# " + " ".join(CAUTIONS)
    # the closure verdict is short, its numbers on hover, so the whole caution line shows
    closure = window.status.closure_label
    assert closure.text().startswith("balances close (largest ")
    assert "mass" in closure.toolTip() and "energy" in closure.toolTip()
    window.resize(1360, 860)
    qtbot.wait(20)
    caution = window.status.caution_label
    assert caution.isVisible() and caution.text() == caution.full_text()


def test_a_solver_setting_typed_in_the_monitor_marks_the_case_changed(qtbot, window):
    window.files.mark_saved()
    assert not window.isWindowModified()
    edit = window.monitor.controls.edits["q_min"]
    edit.setText("-20")
    edit.textEdited.emit("-20")
    edit.editingFinished.emit()
    assert window.case.settings.q_min == -20.0
    assert window.isWindowModified()
