"""Details pane: spec editors, refused entries, unit changes, undo (pytest-qt, offscreen)."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtGui import QUndoStack  # noqa: E402
from PySide6.QtWidgets import QAbstractItemView, QLineEdit  # noqa: E402

from gui.details import DetailsPane  # noqa: E402
from model.flowsheet.document import Flowsheet  # noqa: E402
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity  # noqa: E402
from model.properties.components import lookup_component  # noqa: E402
from units_of_measure import to_internal  # noqa: E402

pytestmark = pytest.mark.gui


@pytest.fixture
def sheet():
    flowsheet = Flowsheet()
    for name in ("nitrogen", "hydrogen", "ammonia", "argon"):
        flowsheet.add_component(lookup_component(name))
    return flowsheet


@pytest.fixture
def pane(qtbot, sheet):
    stack = QUndoStack()
    widget = DetailsPane(lambda: sheet, stack)
    widget.undo_stack = stack  # keep it alive with the pane
    qtbot.addWidget(widget)
    widget.resize(420, 700)
    widget.show()
    return widget


def type_into(qtbot, line_edit: QLineEdit, text: str) -> None:
    """Select all, type like a user and press Enter."""
    line_edit.setFocus()
    line_edit.selectAll()
    qtbot.keyClicks(line_edit, text)
    qtbot.keyClick(line_edit, Qt.Key.Key_Return)


def edit_cell(qtbot, table, row: int, column: int, text: str) -> None:
    """Open the cell's editor, type the text and press Enter, as a user does."""
    table.setCurrentCell(row, column)
    table.editItem(table.item(row, column))
    editors = [e for e in table.viewport().findChildren(QLineEdit) if e.isVisible()]
    assert len(editors) == 1, "the cell editor did not open"
    editor = editors[0]
    editor.selectAll()
    qtbot.keyClicks(editor, text)
    qtbot.keyClick(editor, Qt.Key.Key_Return)
    # the delegate commits through a queued call
    qtbot.waitUntil(lambda: table.state() != QAbstractItemView.State.EditingState, timeout=2000)


def test_quantity_typed_with_unit_then_another_unit_chosen(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1")
    form = pane.show_block("H1")
    editor = form.editors["T"]
    type_into(qtbot, editor.value_edit, "25 degC")
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(25.0, "degC")
    assert editor.value_edit.text() == "25" and editor.unit() == "degC"
    assert pane.undo_stack.count() == 1

    index = editor.unit_combo.findText("degF")
    editor.unit_combo.setCurrentIndex(index)
    editor.unit_combo.activated.emit(index)
    spec = sheet.blocks["H1"].specs["T"]
    assert spec.unit == "degF"
    # 25 degC = 77 degF exactly (T(degF) = 1.8 T(degC) + 32, NIST SP 811)
    assert spec.value == pytest.approx(77.0, abs=1e-9)
    assert to_internal(spec.value, spec.unit, "temperature") == pytest.approx(298.15, abs=1e-9)
    assert editor.value_edit.text() == "77"

    pane.undo_stack.undo()
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(25.0, "degC")
    assert editor.value_edit.text() == "25" and editor.unit() == "degC"
    assert pane.undo_stack.count() == 2  # refreshing the editor pushed nothing


def test_bare_number_takes_the_chosen_unit(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1")
    editor = pane.show_block("H1").editors["T"]
    pane_unit = editor.unit()
    assert pane_unit == "degC"  # Metric is the default unit system
    type_into(qtbot, editor.value_edit, "-10")
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(-10.0, "degC")


def test_wrong_unit_is_refused_and_the_text_stays(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1", specs={"T": TypedQuantity(300.0, "K")})
    editor = pane.show_block("H1").editors["T"]
    type_into(qtbot, editor.value_edit, "25 kg")
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(300.0, "K")
    assert "H1.T" in editor.error_text() and "temperature" in editor.error_text()
    assert editor.value_edit.text() == "25 kg"
    assert "border" in editor.value_edit.styleSheet()
    assert pane.undo_stack.count() == 0


def test_typed_unit_in_the_unit_chooser(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1", specs={"T": TypedQuantity(300.0, "K")})
    editor = pane.show_block("H1").editors["T"]
    combo_edit = editor.unit_combo.lineEdit()
    type_into(qtbot, combo_edit, "degR")
    spec = sheet.blocks["H1"].specs["T"]
    # 300 K = 540 degR (T(degR) = 1.8 T(K), NIST SP 811)
    assert spec.unit == "degR" and spec.value == pytest.approx(540.0, abs=1e-9)
    type_into(qtbot, combo_edit, "kmol/h")
    assert sheet.blocks["H1"].specs["T"].unit == "degR"
    assert "kmol/h" in editor.error_text()


def test_mode_choice_shows_the_needed_fields(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1")
    form = pane.show_block("H1")
    assert form.form.isRowVisible(form.editors["T"])
    assert not form.form.isRowVisible(form.editors["duty"])
    combo = form.editors["mode"].combo
    combo.setCurrentIndex(combo.findText("duty"))
    combo.activated.emit(combo.currentIndex())
    assert sheet.blocks["H1"].specs["mode"] == "duty"
    assert form.form.isRowVisible(form.editors["duty"])
    assert not form.form.isRowVisible(form.editors["T"])


def test_heater_outlet_phase_offers_equilibrium(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1")
    form = pane.show_block("H1")
    combo = form.editors["phase"].combo
    items = [combo.itemText(i) for i in range(combo.count())]
    assert items == ["as inlet", "vapor", "liquid", "equilibrium"]
    assert combo.currentText() == "as inlet"  # the default keeps old cases' meaning
    combo.setCurrentIndex(combo.findText("equilibrium"))
    combo.activated.emit(combo.currentIndex())
    assert sheet.blocks["H1"].specs["phase"] == "equilibrium"
    pane.undo_stack.undo()
    assert sheet.blocks["H1"].specs["phase"] == "as inlet"
    sheet.add_block("Exchanger", "X1")  # both of its sides offer it too
    form = pane.show_block("X1")
    for name in ("hot_phase", "cold_phase"):
        combo = form.editors[name].combo
        assert combo.findText("equilibrium") >= 0


def test_conversion_above_one_is_refused_with_the_models_message(qtbot, pane, sheet):
    reaction = Reaction({"nitrogen": -1.0, "hydrogen": -3.0, "ammonia": 2.0}, "nitrogen", 0.25)
    sheet.add_block("Reactor", "R1", specs={"reactions": [reaction]})
    table = pane.show_block("R1").editors["reactions"]
    conversion_row = table._conversion_row()
    edit_cell(qtbot, table.table, conversion_row, 0, "1.2")
    assert sheet.blocks["R1"].specs["reactions"][0].conversion == 0.25
    assert "conversion must be a fraction between 0 and 1" in table.error_text()
    assert table.table.item(conversion_row, 0).text() == "1.2"
    assert pane.undo_stack.count() == 0
    edit_cell(qtbot, table.table, conversion_row, 0, "0.3")
    assert sheet.blocks["R1"].specs["reactions"][0].conversion == 0.3
    assert table.error_text() == ""


def test_reaction_typed_in_the_table_is_element_balanced(qtbot, pane, sheet):
    sheet.add_block("Reactor", "R1")
    table = pane.show_block("R1").editors["reactions"]
    rows = {name: row for row, name in enumerate(table._names, start=1)}
    edit_cell(qtbot, table.table, rows["nitrogen"], 0, "-1")
    edit_cell(qtbot, table.table, rows["hydrogen"], 0, "-3")
    edit_cell(qtbot, table.table, rows["ammonia"], 0, "2")
    key = table.table.cellWidget(table._key_row(), 0)
    key.setCurrentIndex(key.findText("nitrogen"))
    key.activated.emit(key.currentIndex())
    edit_cell(qtbot, table.table, table._conversion_row(), 0, "0.25")
    reactions = sheet.blocks["R1"].specs["reactions"]
    assert reactions == [
        Reaction({"nitrogen": -1.0, "hydrogen": -3.0, "ammonia": 2.0}, "nitrogen", 0.25)
    ]
    assert table.table.item(table._check_row(), 0).text() == "element-balanced"
    heat = float(table.table.item(table._heat_row(), 0).text())
    # N2 + 3 H2 -> 2 NH3: -91.88 kJ/mol +- 0.8 (NASA Glenn, nasa_gas.yaml; CHECKS.md)
    assert heat == pytest.approx(-91.88, abs=0.8)
    # and exactly Hess's law on the components' own heats of formation (kJ/mol)
    assert heat == pytest.approx(2 * lookup_component("ammonia").Hf_ig / 1000, rel=1e-4)
    assert "nitrogen + 3 hydrogen → 2 ammonia" in table.summary_label.text()


def test_unbalanced_reaction_is_flagged_and_refused(qtbot, pane, sheet):
    sheet.add_block("Reactor", "R1")
    table = pane.show_block("R1").editors["reactions"]
    rows = {name: row for row, name in enumerate(table._names, start=1)}
    key = table.table.cellWidget(table._key_row(), 0)
    key.setCurrentIndex(key.findText("nitrogen"))
    edit_cell(qtbot, table.table, table._conversion_row(), 0, "0.5")
    edit_cell(qtbot, table.table, rows["nitrogen"], 0, "-1")
    edit_cell(qtbot, table.table, rows["hydrogen"], 0, "-1")
    edit_cell(qtbot, table.table, rows["ammonia"], 0, "1")
    check = table.table.item(table._check_row(), 0).text()
    # N: -2 + 1 = -1; H: -2 + 3 = +1 (atom counts of N2, H2, NH3)
    assert check.startswith("not balanced") and "N -1" in check and "H +1" in check
    assert "reactions" not in sheet.blocks["R1"].specs
    assert "element-balanced reaction" in table.error_text()


def test_component_flows_table_and_unit_change(qtbot, pane, sheet):
    sheet.add_block("Feed", "F1")
    editor = pane.show_block("F1").editors["flows"]
    assert editor.unit() == "kmol/h"
    names = sheet.component_names()
    edit_cell(qtbot, editor.table, names.index("nitrogen"), 0, "75")
    edit_cell(qtbot, editor.table, names.index("hydrogen"), 0, "225")
    assert sheet.blocks["F1"].specs["flows"] == ComponentAmounts(
        {"nitrogen": 75.0, "hydrogen": 225.0}, "kmol/h"
    )
    assert "300 kmol/h" in editor.total_label.text()
    index = editor.unit_combo.findText("kg/h")
    editor.unit_combo.setCurrentIndex(index)
    editor.unit_combo.activated.emit(index)
    flows = sheet.blocks["F1"].specs["flows"]
    assert flows.unit == "kg/h"
    nitrogen = lookup_component("nitrogen")
    # kmol/h x kg/kmol = kg/h; molar mass from the component record (kg/mol -> kg/kmol)
    assert flows.values["nitrogen"] == pytest.approx(75.0 * nitrogen.molar_mass * 1000, rel=1e-9)
    edit_cell(qtbot, editor.table, names.index("argon"), 0, "-3")
    assert "flow of zero or more" in editor.error_text()
    assert editor.table.item(names.index("argon"), 0).text() == "-3"


def test_split_and_splitter_fractions(qtbot, pane, sheet):
    sheet.add_block("Separator", "V1")
    split = pane.show_block("V1").editors["split"]
    names = sheet.component_names()
    edit_cell(qtbot, split.table, names.index("ammonia"), 0, "0.95")
    assert sheet.blocks["V1"].specs["split"].values == {"ammonia": 0.95}
    assert split.table.item(names.index("ammonia"), 1).text() == "0.05"
    assert split.table.item(names.index("argon"), 1).text() == "1"

    sheet.add_block("Splitter", "T1")
    fractions = pane.show_block("T1").editors["fractions"]
    edit_cell(qtbot, fractions.table, 1, 1, "0.02")
    assert sheet.blocks["T1"].specs["fractions"] == {"out2": 0.02}
    assert fractions.table.item(0, 2).text().startswith("0.98")


def test_component_lookup_suggests_and_undo_removes(qtbot, pane, sheet):
    sheet.remove_component("ammonia")
    pane.show_components()
    page = pane.components_page
    type_into(qtbot, page.query_edit, "amonia")
    assert "did you mean" in page.message_label.text()
    assert [b.text() for b in page.suggestion_buttons][0] == "Add ammonia"
    assert page.query_edit.text() == "amonia"  # what was typed stays
    qtbot.mouseClick(page.suggestion_buttons[0], Qt.MouseButton.LeftButton)
    assert "ammonia" in sheet.component_names()
    shown = {label: (value, source) for label, value, source in page.shown_rows}
    assert "Heat capacity correlation (ideal gas)" in shown
    # ammonia's normal boiling point 239.82 K = -33.33 degC (CRC Handbook, from memory)
    assert float(shown["Normal boiling point"][0].split()[0]) == pytest.approx(-33.33, abs=0.05)
    assert "ATCT" in shown["Heat of formation (ideal gas, 298.15 K)"][1]
    assert "ATCT" in page.properties.text()
    pane.undo_stack.undo()
    assert "ammonia" not in sheet.component_names()
    assert page.component_list.count() == 3


def test_component_used_by_a_spec_is_not_removed(qtbot, pane, sheet):
    sheet.add_block(
        "Separator",
        "V1",
        specs={"split": ComponentAmounts({"argon": 0.5}, "fraction to first outlet")},
    )
    pane.show_components()
    page = pane.components_page
    page.component_list.setCurrentRow(sheet.component_names().index("argon"))
    assert not page.remove_selected()
    assert "V1" in page.message_label.text()
    assert "argon" in sheet.component_names()


def test_details_of_a_solved_example(qtbot, screenshot_dir):
    from pathlib import Path

    from model.case.file import load_case

    root = Path(__file__).resolve().parents[2]
    case = load_case(root / "examples" / "ammonia_synthesis_loop.loop.json")
    solution = case.solve()
    stack = QUndoStack()
    pane = DetailsPane(lambda: case.flowsheet, stack)
    qtbot.addWidget(pane)
    pane.resize(460, 900)
    pane.show()
    pane.set_solution(solution)
    form = pane.show_block("Converter")
    table = form.editors["reactions"]
    assert table.table.item(table._check_row(), 0).text() == "element-balanced"
    assert "Duty" in form.results_label.text()
    assert "State: ready" in form.state_label.text()
    pane.set_unit_system("US customary")
    assert "Btu/lbmol" in table.table.verticalHeaderItem(table._heat_row()).text()
    assert "Btu/h" in form.results_label.text()
    pane.set_unit_system("Metric")
    shots = screenshot_dir
    assert pane.grab().save(str(shots / "details_reactor.png"))
    pane.show_block("Make-up gas")
    assert pane.grab().save(str(shots / "details_feed.png"))
    pane.show_stream(solution.tear_streams[0])
    assert pane.stream_page.tear_label.text() == "The solver tears this stream."
    assert pane.grab().save(str(shots / "details_stream.png"))
    pane.show_components()
    pane.components_page.component_list.setCurrentRow(2)
    assert pane.grab().save(str(shots / "details_components.png"))


def _focus_window(qtbot, widget):
    widget.activateWindow()
    qtbot.waitUntil(lambda: widget.isActiveWindow(), timeout=2000)


def test_bare_number_then_a_unit_is_one_undo_step(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1", specs={"T": TypedQuantity(300.0, "K")})
    editor = pane.show_block("H1").editors["T"]
    _focus_window(qtbot, pane)
    editor.value_edit.setFocus()
    editor.value_edit.selectAll()
    qtbot.keyClicks(editor.value_edit, "25")
    editor.unit_combo.setFocus()  # the user goes to the unit chooser
    qtbot.waitUntil(lambda: editor.unit_combo.hasFocus(), timeout=2000)
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(300.0, "K")  # held, not applied
    assert pane.undo_stack.count() == 0 and editor.has_pending_text()
    index = editor.unit_combo.findText("degF")
    editor.unit_combo.setCurrentIndex(index)
    editor.unit_combo.activated.emit(index)
    # 25 in the chosen unit, not 25 K converted (which would be -414.67 degF)
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(25.0, "degF")
    assert editor.value_edit.text() == "25" and editor.unit() == "degF"
    assert pane.undo_stack.count() == 1
    pane.undo_stack.undo()
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(300.0, "K")


def test_held_text_is_applied_when_the_focus_leaves_the_editor(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1")
    form = pane.show_block("H1")
    editor = form.editors["T"]
    _focus_window(qtbot, pane)
    editor.value_edit.setFocus()
    qtbot.keyClicks(editor.value_edit, "-10")
    editor.unit_combo.setFocus()
    qtbot.waitUntil(lambda: editor.unit_combo.hasFocus(), timeout=2000)
    assert "T" not in sheet.blocks["H1"].specs
    form.editors["pressure_drop"].value_edit.setFocus()  # elsewhere, no unit chosen
    qtbot.waitUntil(lambda: form.editors["pressure_drop"].value_edit.hasFocus(), timeout=2000)
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(-10.0, "degC")  # the unit shown
    assert pane.undo_stack.count() == 1


def test_number_with_its_own_unit_then_another_unit_is_converted_once(qtbot, pane, sheet):
    sheet.add_block("Heater", "H1")
    editor = pane.show_block("H1").editors["T"]
    _focus_window(qtbot, pane)
    editor.value_edit.setFocus()
    qtbot.keyClicks(editor.value_edit, "25 degC")
    editor.unit_combo.setFocus()
    qtbot.waitUntil(lambda: editor.unit_combo.hasFocus(), timeout=2000)
    index = editor.unit_combo.findText("K")
    editor.unit_combo.setCurrentIndex(index)
    editor.unit_combo.activated.emit(index)
    # T(K) = T(degC) + 273.15 (NIST SP 811)
    assert sheet.blocks["H1"].specs["T"] == TypedQuantity(298.15, "K")
    assert pane.undo_stack.count() == 1
