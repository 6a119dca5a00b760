"""The initial-estimate editor of the stream details: flows, T and P typed with units,
stored in internal units through one undo command each (pytest-qt, offscreen)."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402
from PySide6.QtGui import QUndoStack  # noqa: E402

from gui.details import DetailsPane  # noqa: E402
from model.case.file import load_case  # noqa: E402
from model.flowsheet.spec_values import StreamEstimate  # noqa: E402
from units_of_measure import from_internal  # noqa: E402

pytestmark = pytest.mark.gui
EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
KMOL_H = 1000.0 / 3600.0  # mol/s in 1 kmol/h (exact)


@pytest.fixture
def case():
    return load_case(EXAMPLES / "shift_feed_effluent_exchanger.loop.json")


@pytest.fixture
def pane(qtbot, case):
    stack = QUndoStack()
    widget = DetailsPane(lambda: case.flowsheet, stack)
    widget.undo_stack = stack
    qtbot.addWidget(widget)
    widget.resize(420, 1100)
    widget.show()
    return widget


def enter(editor, text: str) -> None:
    """Type into a quantity editor and commit, as Enter does."""
    editor.value_edit.setText(text)
    editor.value_edit.textEdited.emit(text)
    editor.value_edit.editingFinished.emit()


def set_cell(table_editor, component: str, text: str) -> None:
    row = table_editor.row_names().index(component)
    table_editor.table.item(row, 0).setText(text)  # itemChanged, as a finished cell edit


def test_estimate_is_shown_in_the_unit_systems_units(pane, case):
    pane.show_stream("Preheated gas")
    editor = pane.stream_page.estimate_editor
    assert case.flowsheet.stream("Preheated gas").estimate == StreamEstimate(T=540.0)
    # T(degC) = T(K) - 273.15 (NIST SP 811): 540 K = 266.85 degC
    assert editor.T_editor.unit() == "degC" and editor.T_editor.value_edit.text() == "266.85"
    assert editor.P_editor.value_edit.text() == "" and editor.flows_editor.unit() == "kmol/h"
    pane.set_unit_system("SI")
    assert editor.T_editor.unit() == "K" and editor.T_editor.value_edit.text() == "540"
    assert pane.undo_stack.count() == 0


def test_typed_values_are_stored_in_internal_units_one_undo_step_each(pane, case):
    pane.show_stream("Preheated gas")
    editor = pane.stream_page.estimate_editor
    stream = case.flowsheet.stream("Preheated gas")
    enter(editor.P_editor, "29 bar")
    assert stream.estimate == StreamEstimate(T=540.0, P=2.9e6)  # 1 bar = 1e5 Pa, exact
    set_cell(editor.flows_editor, "carbon monoxide", "120")
    assert stream.estimate.flows == {"carbon monoxide": pytest.approx(120 * KMOL_H, rel=1e-15)}
    assert pane.undo_stack.count() == 2
    # another unit shows the same estimate (mass basis with the molar mass); nothing pushed
    box = editor.flows_editor.unit_combo
    box.setCurrentIndex(box.findText("kg/h"))
    box.activated.emit(box.currentIndex())
    molar_mass = case.flowsheet.components[0].molar_mass  # carbon monoxide, kg/mol
    shown = float(editor.flows_editor.table.item(0, 0).text())
    assert shown == pytest.approx(120 * molar_mass * 1000, rel=1e-11)
    assert pane.undo_stack.count() == 2
    assert stream.estimate.flows["carbon monoxide"] == pytest.approx(120 * KMOL_H, rel=1e-15)
    set_cell(editor.flows_editor, "water", "3600")  # kg/h
    assert stream.estimate.flows["water"] == pytest.approx(
        1.0 / case.flowsheet.components[1].molar_mass, rel=1e-12
    )  # 3600 kg/h = 1 kg/s
    pane.undo_stack.undo()
    pane.undo_stack.undo()
    assert stream.estimate == StreamEstimate(T=540.0, P=2.9e6)
    assert editor.flows_editor.table.item(0, 0).text() == ""


def test_refused_estimates_keep_the_text_and_push_nothing(pane, case):
    pane.show_stream("Preheated gas")
    editor = pane.stream_page.estimate_editor
    enter(editor.P_editor, "0 bar")
    assert editor.P_editor.error_text().startswith("Preheated gas.estimate.P:")
    assert editor.P_editor.value_edit.text() == "0"
    set_cell(editor.flows_editor, "water", "-5")
    assert "Preheated gas.estimate.flows[water]" in editor.flows_editor.error_text()
    assert pane.undo_stack.count() == 0
    assert case.flowsheet.stream("Preheated gas").estimate == StreamEstimate(T=540.0)


def test_clearing_the_estimate_is_undone_in_one_step(pane, case):
    pane.show_stream("Preheated gas")
    editor = pane.stream_page.estimate_editor
    editor.clear_button.click()
    assert case.flowsheet.stream("Preheated gas").estimate is None
    assert editor.T_editor.value_edit.text() == "" and not editor.clear_button.isEnabled()
    pane.undo_stack.undo()
    assert case.flowsheet.stream("Preheated gas").estimate == StreamEstimate(T=540.0)
    assert editor.T_editor.value_edit.text() == "266.85"


def test_an_estimate_at_the_answer_reaches_the_solver(qtbot):
    case = load_case(EXAMPLES / "ammonia_loop_fixed_split.loop.json")
    case.flowsheet.targets = []  # the recycle solve of the specs as they stand
    pane = DetailsPane(lambda: case.flowsheet, QUndoStack())
    qtbot.addWidget(pane)
    first = case.solve()
    tear = first.tear_streams[0]
    state = first.streams[tear]
    pane.show_stream(tear)
    editor = pane.stream_page.estimate_editor
    for index, component in enumerate(first.component_names):
        flow = from_internal(state.flows[index], "molar_flow", "kmol/h")
        set_cell(editor.flows_editor, component, f"{flow:.15g}")
    enter(editor.T_editor, f"{from_internal(state.T, 'temperature', 'degC'):.15g}")
    enter(editor.P_editor, f"{from_internal(state.P, 'pressure', 'bar'):.15g}")
    estimate = case.flowsheet.stream(tear).estimate
    assert estimate.T == pytest.approx(state.T, rel=1e-12)
    assert estimate.P == pytest.approx(state.P, rel=1e-12)
    for index, component in enumerate(first.component_names):
        assert estimate.flows[component] == pytest.approx(state.flows[index], rel=1e-12)
    second = case.solve()
    # started at the converged tear state, the loop converges in fewer iterations
    assert second.converged
    assert second.convergence.iterations < first.convergence.iterations
