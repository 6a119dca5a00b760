"""Reports of a solution: the stream table, block results, closures, the case summary,
the cautions, and the CSV and spreadsheet exports."""

from model.lazy import lazy_face

__getattr__, __dir__, __all__ = lazy_face(
    __name__,
    {
        "CAUTIONS": "model.report.cautions",
        "CAUTION_LINE": "model.report.cautions",
        "ClosureRow": "model.report.closure_table",
        "ReportOrder": "model.report.report_order",
        "ResultRow": "model.report.block_table",
        "StreamTable": "model.report.table",
        "closure_rows": "model.report.closure_table",
        "numbered_stream_order": "model.report.stream_numbers",
        "result_rows": "model.report.block_table",
        "results_csv": "model.report.csv_file",
        "solution_report": "model.report.text",
        "solution_summary": "model.report.text",
        "stream_label": "model.report.stream_numbers",
        "stream_numbers": "model.report.stream_numbers",
        "stream_table": "model.report.table",
        "stream_table_text": "model.report.table",
        "summary_rows": "model.report.summary",
        "workbook_bytes": "model.report.xlsx",
    },
)
