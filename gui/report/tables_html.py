"""The report's tables as the HTML subset ``QTextDocument`` lays out and paginates.

Every number comes from the model's report rows (``model.report``: the stream table,
block results, closures and case summary) with 5 significant digits in the case's unit
system, so the printed report shows what the window, the CSV file and the spreadsheet
show. A stream table wider than the page is cut into groups of streams, each group
repeating the quantity and unit columns. Each table's title is its first header row, so
a title never stays alone at the foot of a page, and the title and headers repeat on
every page the table runs onto.
"""

from __future__ import annotations

import html
import math
from typing import Any

from model.report.block_table import ResultRow
from model.report.closure_table import ClosureRow
from model.report.table import StreamTable
from units_of_measure import format_value

#: Streams per table unless the page says otherwise (an A4 landscape page fits 9).
STREAMS_PER_TABLE = 9
HEADER_COLOUR = "#e6ecef"
RULE_COLOUR = "#9aa5b1"
TITLE_STYLE = "background-color: #ffffff; font-size: 10.5pt; color: #2e3a48"
STYLE = f"""
table {{ border-collapse: collapse; border-color: {RULE_COLOUR}; }}
th {{ background-color: {HEADER_COLOUR}; font-weight: bold; }}
td.number {{ text-align: right; }}
td.label {{ font-weight: bold; }}
"""


def cell_text(value: Any) -> str:
    """A table cell: a number with 5 significant digits (empty for NaN), text escaped."""
    if isinstance(value, str):
        return html.escape(value)
    return "" if not math.isfinite(value) else format_value(value)


def _cell(value: Any, tag: str = "td", css: str = "") -> str:
    kind = css or ("number" if not isinstance(value, str) else "")
    attribute = f' class="{kind}"' if kind else ""
    return f"<{tag}{attribute}>{cell_text(value)}</{tag}>"


def _table(
    title: str, header_rows: list[list[str]], body_rows: list[str], widths: list[int] = ()
) -> str:
    """A bordered table headed by ``title`` and ``header_rows`` (cell HTML), which repeat
    on every page the table runs onto."""
    count = len(widths) or max((len(cells) for cells in header_rows), default=2)
    columns = "".join(f'<col width="{w}%"/>' for w in widths)
    caption = (
        f'<tr><th colspan="{count}" align="left" style="{TITLE_STYLE}">'
        f"{html.escape(title)}</th></tr>"
    )
    head = caption + "".join("<tr>" + "".join(cells) + "</tr>" for cells in header_rows)
    return (
        '<table border="1" cellspacing="0" cellpadding="3" width="100%">'
        f"{columns}<thead>{head}</thead><tbody>{''.join(body_rows)}</tbody></table><p></p>"
    )


def stream_table_html(table: StreamTable, title: str, per_table: int = STREAMS_PER_TABLE) -> str:
    """The stream table, ``per_table`` streams at a time, each column headed by the
    stream's number over its name; later groups are titled "``title``, continued"."""
    parts = []
    numbers = table.column_numbers()
    shown = [row.shown() for row in table.rows]
    for start in range(0, len(table.columns), per_table):
        columns = range(start, min(start + per_table, len(table.columns)))
        header = [
            ["<th>Stream</th>", "<th></th>", *(f"<th>{numbers[i]}</th>" for i in columns)],
            [
                "<th>Quantity</th>",
                "<th>Unit</th>",
                *(f"<th>{html.escape(table.columns[i])}</th>" for i in columns),
            ],
        ]
        body = [
            "<tr>"
            + _cell(row.label, css="label")
            + _cell(row.unit)
            + "".join(_cell(values[i]) for i in columns)
            + "</tr>"
            for row, values in zip(table.rows, shown, strict=True)
        ]
        parts.append(_table(title if not start else f"{title}, continued", header, body))
    return "".join(parts)


def _row(label: str, *values: Any) -> str:
    """A body row: the first cell bold (what the row is about), then the values."""
    return "<tr>" + _cell(label, css="label") + "".join(_cell(v) for v in values) + "</tr>"


def _headers(*titles: str) -> list[list[str]]:
    return [[f"<th>{t}</th>" for t in titles]]


def block_results_html(rows: list[ResultRow], title: str = "Block results") -> str:
    """One line per block result: block, kind, quantity, value, unit."""
    body = [_row(r.item, r.kind, r.quantity, r.value, r.unit) for r in rows]
    header = _headers("Block", "Kind", "Quantity", "Value", "Unit")
    return _table(title, header, body, [22, 10, 40, 16, 12])


def closures_html(
    rows: list[ClosureRow], threshold_text: str, title: str = "Balance closures"
) -> str:
    """The balances: in, out, unit, relative closure and verdict; last, what closing means."""
    header = _headers("Balance", "In", "Out", "Unit", "Relative closure", "Verdict")
    body = [
        _row(
            r.balance, r.incoming, r.outgoing, r.unit, _closure_text(r.relative_closure), r.verdict
        )
        for r in rows
    ]
    body.append(f'<tr><td colspan="6">{html.escape(threshold_text)}</td></tr>')
    return _table(title, header, body, [32, 16, 16, 10, 14, 12])


def _closure_text(value: float) -> str:
    """A relative closure in scientific notation (``""`` where none was computed)."""
    return f"{value:.2e}" if math.isfinite(value) else ""


def summary_html(rows: list[tuple[str, str]], title: str = "Case summary") -> str:
    """The case summary as a two-column table (label, text)."""
    body = [_row(label, text) for label, text in rows]
    return _table(title, [], body, [18, 82])
