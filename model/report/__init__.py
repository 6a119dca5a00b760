"""Reports of a solution: the stream table, block results, closures, the case summary,
the cautions, and the CSV and spreadsheet exports."""

from model.report.block_table import ResultRow, result_rows
from model.report.cautions import CAUTION_LINE, CAUTIONS
from model.report.closure_table import ClosureRow, closure_rows
from model.report.csv_file import results_csv
from model.report.report_order import ReportOrder
from model.report.stream_numbers import numbered_stream_order, stream_label, stream_numbers
from model.report.summary import summary_rows
from model.report.table import StreamTable, stream_table, stream_table_text
from model.report.text import solution_report, solution_summary
from model.report.xlsx import workbook_bytes

__all__ = [
    "CAUTIONS",
    "CAUTION_LINE",
    "ClosureRow",
    "ReportOrder",
    "ResultRow",
    "StreamTable",
    "closure_rows",
    "numbered_stream_order",
    "result_rows",
    "results_csv",
    "solution_report",
    "solution_summary",
    "stream_label",
    "stream_numbers",
    "stream_table",
    "stream_table_text",
    "summary_rows",
    "workbook_bytes",
]
