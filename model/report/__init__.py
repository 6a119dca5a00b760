"""Reports of a solution: the stream table, block duties, closures, and the cautions."""

from model.report.cautions import CAUTION_LINE, CAUTIONS
from model.report.table import StreamTable, stream_table, stream_table_csv, stream_table_text
from model.report.text import solution_report, solution_summary

__all__ = [
    "CAUTIONS",
    "CAUTION_LINE",
    "StreamTable",
    "solution_report",
    "solution_summary",
    "stream_table",
    "stream_table_csv",
    "stream_table_text",
]
