"""The CSV export: the cautions first, then the stream table, the block results and the
balance closures, each section under its own heading line.

The first line is a ``# `` comment with the cautions (a reader that skips comments
still finds a plain table below); an unconverged solution adds a second comment line
with its status. Numbers carry 10 significant digits in the chosen unit system, units
in their own column.
"""

from __future__ import annotations

import csv
import io
import math
from typing import Any

from model.report.block_table import result_rows
from model.report.cautions import CAUTIONS
from model.report.closure_table import closure_rows
from model.report.report_order import ReportOrder
from model.report.table import stream_table, stream_table_rows

BLOCK_HEADER = ["Block", "Kind", "Quantity", "Unit", "Value"]
CLOSURE_HEADER = ["Balance", "In", "Out", "Unit", "Relative closure", "Verdict"]


def csv_cell(value: Any) -> str:
    """A CSV cell: text as it is, a number with 10 significant digits, NaN as empty."""
    if isinstance(value, str):
        return value
    return "" if not math.isfinite(value) else f"{value:.10g}"


def results_csv(solution: Any, unit_system: str, order: ReportOrder | None = None) -> str:
    """The CSV text of ``solution`` in ``unit_system`` (see the module docstring)."""
    order = order or ReportOrder()
    buffer = io.StringIO()
    buffer.write("# " + " ".join(CAUTIONS) + "\n")
    if not solution.converged:
        buffer.write(f"# {solution.status}: {solution.message}\n")
    writer = csv.writer(buffer, lineterminator="\n")
    rows: list[list[Any]] = []
    if solution.streams:
        table = stream_table(solution, unit_system, order.streams or None, order.numbers)
        rows += stream_table_rows(table)
    results = result_rows(solution, unit_system, order)
    if results:
        rows += [[], ["Block results"], BLOCK_HEADER]
        rows += [[r.item, r.kind, r.quantity, r.unit, r.value] for r in results]
    closures = closure_rows(solution.balance, unit_system)
    if closures:
        rows += [[], ["Balance closures"], CLOSURE_HEADER]
        rows += [
            [r.balance, r.incoming, r.outgoing, r.unit, r.relative_closure, r.verdict]
            for r in closures
        ]
    for row in rows:
        writer.writerow([csv_cell(cell) for cell in row])
    return buffer.getvalue()
