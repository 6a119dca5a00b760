"""The spreadsheet and CSV exports hold exactly the model's own report, in its units."""

from __future__ import annotations

import csv
import datetime
import math
import zipfile
from pathlib import Path

import openpyxl
import pytest

from model.case.file import load_case, write_file_atomically
from model.cli import main
from model.report.block_table import WARNING, result_rows
from model.report.cautions import CAUTION_LINE, CAUTIONS
from model.report.closure_table import closure_rows
from model.report.csv_file import results_csv
from model.report.report_order import ReportOrder
from model.report.summary import summary_rows
from model.report.table import stream_table
from model.report.xlsx import SHEETS, workbook_bytes

EXAMPLES = Path(__file__).resolve().parents[3] / "examples"
EXAMPLE_FILES = sorted(EXAMPLES.glob("*.loop.json"))
WHEN = datetime.datetime(2025, 3, 14, 9, 26)


@pytest.fixture(scope="module", params=EXAMPLE_FILES, ids=lambda p: p.stem)
def solved(request):
    case = load_case(request.param)
    case.unit_system = "US customary"
    case.solve()
    return request.param, case


@pytest.fixture(scope="module")
def workbook(solved, tmp_path_factory):
    path, case = solved
    target = tmp_path_factory.mktemp("xlsx") / "case.xlsx"
    write_file_atomically(target, workbook_bytes(case, path, WHEN))
    return openpyxl.load_workbook(target)


def _numbers_match(cell, expected) -> None:
    """A number cell holding ``expected`` (stored, not rounded), or text equal to it."""
    if isinstance(expected, str):
        assert cell.value == expected, cell.coordinate
    elif math.isfinite(expected):
        assert cell.data_type == "n" and not isinstance(cell.value, str), cell.coordinate
        assert cell.value == pytest.approx(expected, rel=1e-15, abs=1e-300), cell.coordinate
    else:
        assert cell.value is None, cell.coordinate


def test_the_sheets_and_the_cautions_in_the_first_rows(workbook, solved):
    _, case = solved
    has_curves = any(result.profile for result in case.solution.blocks.values())
    assert workbook.sheetnames == list(SHEETS if has_curves else SHEETS[:4])
    summary = workbook["Summary"]
    assert [summary.cell(r, 2).value for r in (1, 2, 3)] == CAUTIONS
    for name in workbook.sheetnames[1:]:
        assert workbook[name]["A1"].value.startswith(CAUTION_LINE)
    labels = {summary.cell(r, 1).value: summary.cell(r, 2).value for r in range(5, 30)}
    assert labels["Title"] == case.title and labels["Exported"] == "2025-03-14 09:26"
    assert labels["Solver status"].startswith("solved: ")
    assert labels["Property basis"].startswith("Ideal: ")
    assert dict(summary_rows(case, solved[0], WHEN))["Case file"] == labels["Case file"]


def test_every_stream_number_equals_the_models_stream_table(workbook, solved):
    _, case = solved
    order = ReportOrder.of(case.flowsheet)
    table = stream_table(case.solution, "US customary", order.streams, order.numbers)
    sheet = workbook["Streams"]
    assert sheet.freeze_panes == "C4"  # caution, numbers and names stay; labels and units too
    numbers = [sheet.cell(2, 3 + i).value for i in range(len(table.columns))]
    assert numbers == [order.numbers[name] for name in table.columns]
    assert all(isinstance(n, int) for n in numbers)
    assert [sheet.cell(3, 3 + i).value for i in range(len(table.columns))] == list(table.columns)
    assert sheet.max_row == 3 + len(table.rows)
    for r, row in enumerate(table.rows, start=4):
        assert sheet.cell(r, 1).value == row.label
        assert (sheet.cell(r, 2).value or "") == row.unit
        for c, expected in enumerate(row.shown(), start=3):
            _numbers_match(sheet.cell(r, c), expected)
    temperature = next(r for r in table.rows if r.label == "Temperature")
    assert temperature.unit == "degF"
    # T(degF) = 1.8 T(K) - 459.67 (NIST SP 811): the sheet is in the case's unit system
    first = case.solution.streams[table.columns[0]]
    assert sheet.cell(4 + table.rows.index(temperature), 3).value == pytest.approx(
        1.8 * first.T - 459.67, rel=1e-12
    )


def test_every_block_result_equals_the_models_rows(workbook, solved):
    _, case = solved
    rows = result_rows(case.solution, "US customary", ReportOrder.of(case.flowsheet))
    sheet = workbook["Block results"]
    assert sheet.freeze_panes == "A3"
    assert [c.value for c in sheet[2]] == ["Block", "Kind", "Quantity", "Unit", "Value"]
    assert sheet.max_row == 2 + len(rows)
    for r, row in enumerate(rows, start=3):
        assert [sheet.cell(r, c).value or "" for c in (1, 2, 3, 4)] == [
            row.item,
            row.kind,
            row.quantity,
            row.unit,
        ]
        _numbers_match(sheet.cell(r, 5), row.value)
    duties = {row.item: row for row in rows if row.quantity == "duty"}
    for name, result in case.solution.blocks.items():  # every duty is there, in Btu/h
        if result.duty_W is not None:
            # 1 Btu/h = 1055.05585262 J / 3600 s (NIST SP 811, International Table Btu)
            expected = result.duty_W * 3600.0 / 1055.05585262
            assert duties[name].value == pytest.approx(expected, rel=1e-12, abs=1e-9)


def test_the_balance_closures_equal_the_models_rows(workbook, solved):
    _, case = solved
    rows = closure_rows(case.solution.balance, "US customary")
    sheet = workbook["Balance closures"]
    for r, row in enumerate(rows, start=3):
        assert sheet.cell(r, 1).value == row.balance
        for c, expected in zip(
            (2, 3, 5), (row.incoming, row.outgoing, row.relative_closure), strict=True
        ):
            _numbers_match(sheet.cell(r, c), expected)
    mass = rows[0]
    assert mass.unit == "lb/h" and mass.verdict == "closes"
    # 1 lb = 0.45359237 kg (NIST SP 811)
    assert mass.incoming == pytest.approx(
        case.solution.balance.mass_in * 3600 / 0.45359237, rel=1e-12
    )


def test_columns_are_sized_to_their_contents(workbook):
    sheet = workbook["Streams"]
    label_width = sheet.column_dimensions["A"].width
    longest = max(len(str(sheet.cell(r, 1).value or "")) for r in range(2, sheet.max_row + 1))
    assert longest + 2 <= label_width <= longest + 4
    assert all(sheet.column_dimensions[c].width >= 8 for c in "BCD")


def test_the_csv_has_the_same_block_results_below_the_stream_table(solved):
    _, case = solved
    order = ReportOrder.of(case.flowsheet)
    lines = results_csv(case.solution, "US customary", order).splitlines()
    assert lines[0] == "# " + " ".join(CAUTIONS)
    rows = list(csv.reader(lines[1:]))
    start = rows.index(["Block results"]) + 2
    expected = result_rows(case.solution, "US customary", order)
    for row, result in zip(rows[start:], expected, strict=False):
        assert row[:4] == [result.item, result.kind, result.quantity, result.unit]
        if result.quantity == WARNING:
            assert row[4] == result.value
        else:
            assert float(row[4]) == pytest.approx(result.value, rel=1e-9)
    assert rows[start + len(expected)] == []


def test_export_from_the_command_line_writes_csv_and_xlsx_in_place(tmp_path, capsys):
    path = EXAMPLES / "ammonia_synthesis_loop.loop.json"
    target = tmp_path / "loop.xlsx"
    target.write_bytes(b"an older export")
    status = main(["export", str(path), "--xlsx", str(target), "--csv", str(tmp_path / "a.csv")])
    assert status == 0 and capsys.readouterr().err == ""
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.csv", "loop.xlsx"]  # no temp left
    sheet = openpyxl.load_workbook(target)["Streams"]
    assert sheet.cell(3, 3).value == "Make-up" and sheet.cell(2, 3).value == 1


def test_a_failed_write_leaves_the_old_file_whole(tmp_path, monkeypatch):
    target = tmp_path / "loop.xlsx"
    target.write_bytes(b"the older export")

    def refuse(*_args):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr("model.case.file.os.fsync", refuse)
    with pytest.raises(OSError):
        write_file_atomically(target, b"x" * 1000)
    assert target.read_bytes() == b"the older export"
    assert [p.name for p in tmp_path.iterdir()] == ["loop.xlsx"]


def test_export_without_a_file_or_with_report_but_no_drawing_is_refused(capsys):
    path = str(EXAMPLES / "ammonia_synthesis_loop.loop.json")
    assert main(["export", path]) == 2
    assert "--csv FILE, --xlsx FILE or --report FILE" in capsys.readouterr().err
    assert main(["export", path, "--report", "r.pdf"]) == 2
    assert "window package" in capsys.readouterr().err


def test_heat_curves_sheet_holds_each_exchangers_curve_and_a_chart(tmp_path):
    case = load_case(EXAMPLES / "shift_feed_effluent_exchanger.loop.json")
    case.unit_system = "US customary"
    case.solve()
    profile = case.solution.blocks["Feed-effluent exchanger"].profile
    target = tmp_path / "case.xlsx"
    write_file_atomically(target, workbook_bytes(case, None, WHEN))
    sheet = openpyxl.load_workbook(target)["Heat curves"]
    assert sheet["A3"].value.startswith("Exchanger Feed-effluent exchanger: heat curve")
    assert [c.value for c in sheet[4]] == [
        "heat passed [Btu/h]",
        "hot side T [degF]",
        "cold side T [degF]",
        "difference [degF]",  # a difference: 1.8 per K, no offset (checked below)
    ]
    rows = list(sheet.iter_rows(min_row=5, max_col=4, values_only=True))
    assert len(rows) == len(profile["hot T"])
    # T(degF) = 1.8 T(K) - 459.67 and 1 Btu/h = 0.29307107 W (NIST SP 811)
    for row, Q, hot, cold in zip(rows, *profile.values(), strict=True):
        assert row[0] == pytest.approx(Q / 0.29307107, rel=1e-8)
        assert row[1] == pytest.approx(1.8 * hot - 459.67, rel=1e-12)
        assert row[2] == pytest.approx(1.8 * cold - 459.67, rel=1e-12)
        assert row[3] == pytest.approx(1.8 * (hot - cold), rel=1e-9)
    with zipfile.ZipFile(target) as archive:  # openpyxl does not read charts back
        assert any(name.startswith("xl/charts/chart") for name in archive.namelist())
