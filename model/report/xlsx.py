"""The spreadsheet export (``.xlsx``, written by openpyxl): summary, stream table, block
results and balance closures, one sheet each, and where the case has exchangers their
heat curves (a table and a scatter chart per exchanger).

Every sheet starts with the cautions (the summary sheet with all of them, the others
with the short caution line) so a sheet copied on its own still carries them. Numbers
are stored as numbers in the chosen unit system, units in their own column; header rows
(and the stream table's label columns) are frozen and columns sized to their contents.
The workbook is made in memory (:func:`workbook_bytes`); the caller writes the bytes to
a temporary file and renames it, so a file is never left half written.
"""

from __future__ import annotations

import datetime as _datetime
import io
import math
from pathlib import Path
from typing import Any

from openpyxl import Workbook
from openpyxl.styles import Alignment, Font, PatternFill
from openpyxl.utils import get_column_letter
from openpyxl.worksheet.worksheet import Worksheet

from model.report.block_table import result_rows
from model.report.cautions import CAUTION_LINE, CAUTIONS
from model.report.closure_table import closure_rows, closure_threshold_text
from model.report.csv_file import BLOCK_HEADER, CLOSURE_HEADER
from model.report.report_order import ReportOrder
from model.report.summary import summary_rows
from model.report.table import stream_table, stream_table_rows
from units_of_measure import UNIT_SYSTEMS, format_value, from_internal_array

SHEETS = ("Summary", "Streams", "Block results", "Balance closures", "Heat curves")
CAUTION_FONT = Font(bold=True, color="8A4B00")
CAUTION_FILL = PatternFill("solid", fgColor="FFF4E0")
HEADER_FONT = Font(bold=True)
HEADER_FILL = PatternFill("solid", fgColor="E6ECEF")
WIDEST_COLUMN = 60
SUMMARY_TEXT_WIDTH = 100


def workbook_bytes(
    case: Any,
    source: str | Path | None = None,
    when: _datetime.datetime | None = None,
    order: ReportOrder | None = None,
) -> bytes:
    """The ``.xlsx`` file of ``case`` (a solved :class:`model.case.document.Case`) as bytes.

    ``source`` is the case file (its name goes on the summary sheet), ``when`` the
    export's time (default now), ``order`` the streams' order and numbers (default:
    :meth:`ReportOrder.of` the case's flowsheet).
    """
    order = order or ReportOrder.of(case.flowsheet)
    workbook = Workbook()
    _summary_sheet(workbook.active, case, source, when)
    solution = case.solution
    if solution is not None:
        _streams_sheet(workbook.create_sheet(SHEETS[1]), solution, case.unit_system, order)
        _results_sheet(workbook.create_sheet(SHEETS[2]), solution, case.unit_system, order)
        _closures_sheet(workbook.create_sheet(SHEETS[3]), solution, case.unit_system)
        curves = {name: r.profile for name, r in solution.blocks.items() if r.profile}
        if curves:
            _heat_curves_sheet(workbook.create_sheet(SHEETS[4]), curves, case.unit_system)
    buffer = io.BytesIO()
    workbook.save(buffer)
    return buffer.getvalue()


def cell_value(value: Any) -> Any:
    """What a cell stores: numbers as numbers, NaN as an empty cell, text as text."""
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def _summary_sheet(sheet: Worksheet, case: Any, source: Any, when: Any) -> None:
    sheet.title = SHEETS[0]
    for text in CAUTIONS:
        sheet.append(["Caution", text])
        _style_caution(sheet, sheet.max_row)
    sheet.append([])
    for label, text in summary_rows(case, source, when):
        sheet.append([label, text])
        sheet.cell(sheet.max_row, 1).font = HEADER_FONT
        sheet.cell(sheet.max_row, 2).alignment = Alignment(wrap_text=True, vertical="top")
    sheet.column_dimensions["A"].width = 20
    sheet.column_dimensions["B"].width = SUMMARY_TEXT_WIDTH


def _streams_sheet(sheet: Worksheet, solution: Any, unit_system: str, order: ReportOrder):
    table = stream_table(solution, unit_system, order.streams or None, order.numbers)
    _caution_row(sheet, f"{CAUTION_LINE} · stream table in {unit_system} units")
    rows = stream_table_rows(table)
    rows[0][2:] = [int(n) if n else None for n in rows[0][2:]]  # stream numbers as numbers
    for row in rows:
        sheet.append([cell_value(v) for v in row])
    for header_row in (2, 3):
        _style_header(sheet, header_row)
    for row in range(4, sheet.max_row + 1):
        sheet.cell(row, 1).font = HEADER_FONT
    sheet.freeze_panes = "C4"
    _size_columns(sheet, first_row=2)


def _results_sheet(sheet: Worksheet, solution: Any, unit_system: str, order: ReportOrder):
    _caution_row(sheet, CAUTION_LINE)
    sheet.append(BLOCK_HEADER)
    _style_header(sheet, 2)
    for row in result_rows(solution, unit_system, order):
        sheet.append([row.item, row.kind, row.quantity, row.unit, cell_value(row.value)])
    sheet.freeze_panes = "A3"
    _size_columns(sheet, first_row=2)


def _closures_sheet(sheet: Worksheet, solution: Any, unit_system: str) -> None:
    _caution_row(sheet, CAUTION_LINE)
    sheet.append(CLOSURE_HEADER)
    _style_header(sheet, 2)
    for row in closure_rows(solution.balance, unit_system):
        values = [row.incoming, row.outgoing, row.unit, row.relative_closure, row.verdict]
        sheet.append([row.balance, *(cell_value(v) for v in values)])
        sheet.cell(sheet.max_row, 5).number_format = "0.00E+00"
    sheet.append([])
    sheet.append([closure_threshold_text(solution.balance)])
    sheet.freeze_panes = "A3"
    _size_columns(sheet, first_row=2, last_row=sheet.max_row - 1)


def _heat_curves_sheet(sheet: Worksheet, curves: dict[str, dict], unit_system: str) -> None:
    """Per exchanger: heat passed, both sides' temperatures and their difference at each
    cut, under its name, with a scatter chart of the two temperatures beside it."""
    from openpyxl.chart import Reference, ScatterChart, Series

    system = UNIT_SYSTEMS[unit_system]
    power, temperature = system.unit_for("power"), system.unit_for("temperature")
    difference = system.unit_for("temperature_difference")
    _caution_row(sheet, CAUTION_LINE)
    for name, profile in curves.items():
        sheet.append([])
        sheet.append([f"Exchanger {name}: heat curve (counter-current, from the hot inlet end)"])
        sheet.cell(sheet.max_row, 1).font = HEADER_FONT
        sheet.append(
            [
                f"heat passed [{power}]",
                f"hot side T [{temperature}]",
                f"cold side T [{temperature}]",
                f"difference [{difference}]",
            ]
        )
        header = sheet.max_row
        _style_header(sheet, header)
        columns = (
            from_internal_array(profile["heat passed"], "power", power),
            from_internal_array(profile["hot T"], "temperature", temperature),
            from_internal_array(profile["cold T"], "temperature", temperature),
            from_internal_array(
                [h - c for h, c in zip(profile["hot T"], profile["cold T"], strict=True)],
                "temperature_difference",
                difference,
            ),
        )
        for row in zip(*columns, strict=True):
            sheet.append([float(v) for v in row])
        chart = ScatterChart()
        chart.title = f"{name}: heat curve"
        chart.x_axis.title = f"heat passed [{power}]"
        chart.y_axis.title = f"T [{temperature}]"
        chart.style = 13
        x = Reference(sheet, min_col=1, min_row=header + 1, max_row=sheet.max_row)
        for column, side in ((2, "hot side"), (3, "cold side")):
            values = Reference(sheet, min_col=column, min_row=header + 1, max_row=sheet.max_row)
            series = Series(values, x, title=side)
            series.marker.symbol = "circle"
            chart.series.append(series)
        sheet.add_chart(chart, f"F{header}")
    _size_columns(sheet, first_row=2)


def _caution_row(sheet: Worksheet, text: str) -> None:
    sheet.append([text])
    _style_caution(sheet, 1)


def _style_caution(sheet: Worksheet, row: int) -> None:
    for cell in sheet[row]:
        cell.font = CAUTION_FONT
        cell.fill = CAUTION_FILL


def _style_header(sheet: Worksheet, row: int) -> None:
    for cell in sheet[row]:
        cell.font = HEADER_FONT
        cell.fill = HEADER_FILL
        cell.alignment = Alignment(horizontal="center")


def _shown_length(value: Any) -> int:
    if value is None:
        return 0
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return len(format_value(value)) + 3  # the cell may show a few more digits
    return len(str(value))


def _size_columns(sheet: Worksheet, first_row: int, last_row: int | None = None) -> None:
    """Each column as wide as its longest entry from ``first_row`` (the caution row spans
    the sheet and is left out), within :data:`WIDEST_COLUMN` characters."""
    widths: dict[int, int] = {}
    for row in sheet.iter_rows(min_row=first_row, max_row=last_row or sheet.max_row):
        for cell in row:
            widths[cell.column] = max(widths.get(cell.column, 0), _shown_length(cell.value))
    for column, width in widths.items():
        sheet.column_dimensions[get_column_letter(column)].width = min(width + 2, WIDEST_COLUMN)
