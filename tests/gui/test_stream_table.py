"""Stream table and log pane: unit systems, copy, CSV with cautions, links."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtGui import (
    QGuiApplication,  # noqa: E402
    QUndoStack,  # noqa: E402
)

from gui.details import DetailsPane  # noqa: E402
from gui.log_pane import LogPane  # noqa: E402
from gui.stream_table import (  # noqa: E402
    INTERNAL_ROLE,
    ROW_FLOOR,
    VALUE_ROLE,
    StreamTable,
    TableRow,
)
from model.case.file import load_case  # noqa: E402
from model.report.cautions import CAUTIONS  # noqa: E402
from model.report.report_order import ReportOrder  # noqa: E402
from model.validation.issue import Issue  # noqa: E402
from units_of_measure import from_internal  # noqa: E402

pytestmark = pytest.mark.gui
EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "ammonia_synthesis_loop.loop.json"


@pytest.fixture(scope="module")
def solution():
    case = load_case(EXAMPLE)
    return case.solve()


@pytest.fixture
def table(qtbot):
    widget = StreamTable()
    qtbot.addWidget(widget)
    widget.resize(900, 500)
    widget.show()
    return widget


def column_of(table, name):
    return table.model.names.index(name)


def row_of(table, title):
    return [row.title for row in table.model.rows].index(title)


def value(table, title, stream, role=VALUE_ROLE):
    model = table.model
    return model.data(model.index(row_of(table, title), column_of(table, stream)), role)


def test_values_follow_the_unit_system(table, solution):
    assert solution.status == "solved"
    stream = solution.tear_streams[0]
    state = solution.streams[stream]
    table.set_solution(solution, "Metric")
    assert value(table, "Temperature [degC]", stream) == pytest.approx(
        from_internal(state.T, "temperature", "degC"), rel=1e-12
    )
    assert value(table, "Pressure [bar]", stream) == pytest.approx(state.P / 1e5, rel=1e-12)
    # 1 kmol/h = 1000 mol / 3600 s (definition of the units)
    assert value(table, "Total molar flow [kmol/h]", stream) == pytest.approx(
        state.flows.sum() * 3.6, rel=1e-12
    )
    metric_T = value(table, "Temperature [degC]", stream)
    enthalpy_kW = value(table, "Enthalpy flow [kW]", stream)
    table.set_solution(solution, "SI")
    assert value(table, "Temperature [K]", stream) == pytest.approx(metric_T + 273.15, rel=1e-12)
    assert value(table, "Enthalpy flow [W]", stream) == pytest.approx(enthalpy_kW * 1000, rel=1e-12)
    assert value(table, "Enthalpy flow [W]", stream, INTERNAL_ROLE) == pytest.approx(
        state.enthalpy_flow(solution.basis), rel=1e-12
    )
    assert value(table, "Mass flow [kg/s]", stream) == pytest.approx(
        float(state.flows @ solution.basis.molar_mass), rel=1e-12
    )
    mole_fraction_rows = [
        i
        for i, row in enumerate(table.model.rows)
        if row.kind == "fraction" and not row.title.startswith("Vapor fraction")
    ]
    total = sum(
        table.model.data(table.model.index(r, column_of(table, stream)), VALUE_ROLE)
        for r in mole_fraction_rows
    )
    assert total == pytest.approx(1.0, abs=1e-12)
    table.set_solution(solution, "US customary")
    # T(degF) = 1.8 T(degC) + 32 (NIST SP 811)
    assert value(table, "Temperature [degF]", stream) == pytest.approx(
        1.8 * metric_T + 32, rel=1e-12
    )
    header = table.model.headerData(column_of(table, stream), Qt.Orientation.Horizontal)
    assert header == f"{stream} (tear)"
    assert "closure" in table.status_label.text()


def test_copy_gives_tab_separated_text(table, solution):
    table.set_solution(solution, "Metric")
    text = table.copy_to_clipboard()
    assert QGuiApplication.clipboard().text() == text
    lines = text.split("\n")
    assert lines[0].split("\t") == ["", *table.model.names]
    temperature = next(line for line in lines if line.startswith("Temperature [degC]"))
    cells = temperature.split("\t")
    assert len(cells) == len(table.model.names) + 1
    first = table.model.names[0]
    expected = from_internal(solution.streams[first].T, "temperature", "degC")
    assert float(cells[1]) == pytest.approx(expected, rel=1e-4)  # 5 significant digits


def test_csv_starts_with_the_cautions_and_has_the_block_results(table, solution, tmp_path):
    case = load_case(EXAMPLE)
    table.set_solution(solution, "Metric", report_order=ReportOrder.of(case.flowsheet))
    path = tmp_path / "streams.csv"
    table.export_csv(str(path))
    lines = path.read_text(encoding="utf-8").splitlines()
    assert lines[0] == "# " + " ".join(CAUTIONS)
    assert lines[1] == "Stream,," + ",".join(str(n) for n in range(1, 9))
    assert lines[2].split(",")[2:] == table.model.names
    assert "Converter,Reactor,duty,kW," in "\n".join(lines)  # the block results below
    temperature = next(line for line in lines if line.startswith("Temperature,degC"))
    numbers = np.array([float(v) for v in temperature.split(",")[2:]])
    expected = [
        from_internal(solution.streams[n].T, "temperature", "degC") for n in table.model.names
    ]
    assert numbers == pytest.approx(expected, rel=1e-9)


def test_double_click_on_a_column_activates_its_stream(qtbot, table, solution):
    table.set_solution(solution, "Metric")
    with qtbot.waitSignal(table.stream_activated) as signal:
        table.view.horizontalHeader().sectionDoubleClicked.emit(1)
    assert signal.args == [table.model.names[1]]


def test_empty_table_without_solution(table):
    table.set_solution(None, "Metric")
    assert table.model.rowCount() == 0 and table.model.columnCount() == 0
    assert table.status_label.text() == "Not solved yet."


def test_log_lists_issues_and_links_to_blocks(qtbot):
    log = LogPane()
    qtbot.addWidget(log)
    log.set_issues(
        [
            Issue("error", "R1.T: needs a value", block="R1", field="T"),
            Issue("warning", "S7: preferred tear lies on no loop", stream="S7"),
        ]
    )
    log.add_message("info", "solved in 6 iterations")
    assert [e[0] for e in log.entries()] == ["error", "warning", "info"]
    assert "1 error · 1 warning" in log.summary_label.text()
    item = log.tree.topLevelItem(0)
    with qtbot.waitSignal(log.block_activated) as signal:
        log.tree.itemClicked.emit(item, 2)
    assert signal.args == ["R1"]
    with qtbot.waitSignal(log.stream_activated) as signal:
        log.tree.itemClicked.emit(log.tree.topLevelItem(1), 2)
    assert signal.args == ["S7"]
    log.set_issues([])
    assert [e[0] for e in log.entries()] == ["info"]
    log.clear()
    assert log.entries() == []


def test_screenshot_of_the_stream_table(table, solution, screenshot_dir):
    table.set_solution(solution, "Metric")
    assert table.grab().save(str(screenshot_dir / "stream_table.png"))


def test_columns_follow_the_flowsheets_stream_order_with_the_tear_marked(table):
    case = load_case(EXAMPLE)
    solution = case.solve()
    order = list(case.flowsheet.streams)
    assert order[:3] == ["Make-up", "Converter feed", "Converter effluent"]  # not alphabetical
    table.set_solution(solution, "Metric", order)
    assert table.model.names == order
    table.set_solution(solution, "Metric")  # without an order: the solution's, the same
    assert table.model.names == order
    table.set_solution(solution, "Metric", order[::-1])
    assert table.model.names == order[::-1]
    tear = solution.tear_streams[0]
    header = table.model.headerData(column_of(table, tear), Qt.Orientation.Horizontal)
    assert header == f"{tear} (tear)"
    colour = table.model.headerData(
        column_of(table, tear), Qt.Orientation.Horizontal, Qt.ItemDataRole.ForegroundRole
    )
    assert colour is not None


def test_round_off_below_the_rows_floor_shows_as_zero():
    row = TableRow("Enthalpy flow", "kW", "power", (0.0, 0.0, 0.0), (-4.7e-13, 2688.6, -1981.0))
    assert row.floor == pytest.approx(ROW_FLOOR * 2688.6)
    assert row.texts() == ["0", "2688.6", "-1981"]
    small = TableRow("argon", "kmol/h", "molar_flow", (0.0, 0.0), (3.0e-9, 2.0e-6))
    assert small.texts() == ["3e-09", "2e-06"]  # small but not round-off: kept


def test_the_make_up_gas_enthalpy_flow_shows_as_zero(table, solution, qtbot, tmp_path):
    # Make-up gas: hydrogen, nitrogen and argon at 25 degC; on the formation basis each has
    # zero enthalpy at 298.15 K (elements in their standard state, CHECKS.md: nasa_gas and
    # chemicals both give 0), so the stream's enthalpy flow is 0 up to round-off.
    raw = solution.streams["Make-up"].enthalpy_flow(solution.basis)
    largest = max(abs(s.enthalpy_flow(solution.basis)) for s in solution.streams.values())
    assert abs(raw) <= ROW_FLOOR * largest
    table.set_solution(solution, "Metric")
    model = table.model
    index = model.index(row_of(table, "Enthalpy flow [kW]"), column_of(table, "Make-up"))
    assert model.data(index) == "0"
    assert model.data(index, INTERNAL_ROLE) == raw  # the number itself is kept
    copied = table.copy_to_clipboard().split("\n")
    enthalpy = next(line for line in copied if line.startswith("Enthalpy flow")).split("\t")
    assert enthalpy[1 + column_of(table, "Make-up")] == "0"
    path = tmp_path / "streams.csv"
    table.export_csv(str(path))
    exported = next(
        line for line in path.read_text("utf-8").splitlines() if line.startswith("Enthalpy flow")
    )
    assert exported.split(",")[2 + column_of(table, "Make-up")] == "0"
    # the details pane's stream view shows the same text
    case = load_case(EXAMPLE)
    stack = QUndoStack()
    pane = DetailsPane(lambda: case.flowsheet, stack)
    qtbot.addWidget(pane)
    pane.set_solution(solution)
    pane.show_stream("Make-up")
    texts = pane.stream_page.result_texts()
    assert texts["Enthalpy flow [kW]"] == "0"
    assert texts["Total molar flow [kmol/h]"] == model.data(
        model.index(row_of(table, "Total molar flow [kmol/h]"), column_of(table, "Make-up"))
    )
