"""File → Export: the CSV file, the spreadsheet and the printable report of the case.

Each export asks for a file name, makes the whole file in memory and writes it to a
temporary file that is then renamed (``model.case.file.write_file_atomically``), so a
failed export leaves no half-written file; a failure is shown in a message box and the
status line. The exports describe the case's last solution in the case's unit system.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from PySide6.QtWidgets import QFileDialog, QMessageBox

from model.case.file import write_file_atomically

#: Export kind -> (dialog title, file-name filter, suffix).
EXPORTS = {
    "xlsx": ("Export spreadsheet", "Spreadsheets (*.xlsx)", ".xlsx"),
    "report": ("Export report", "PDF files (*.pdf)", ".pdf"),
}


class CaseExports:
    """The window's spreadsheet and report exports (the CSV is the stream table's)."""

    def __init__(self, window: Any) -> None:
        self._window = window

    def suggested_path(self, suffix: str) -> str:
        """The case file's name with ``suffix`` beside it, or ``untitled`` + suffix."""
        path = self._window.files.path
        if not path:
            return f"untitled{suffix}"
        name = Path(path).name.removesuffix(".loop.json").removesuffix(".json")
        return str(Path(path).with_name(name + suffix))

    def ask_xlsx(self) -> bool:
        """Ask for a file name and write the spreadsheet; True when written."""
        return self._ask("xlsx")

    def ask_report(self) -> bool:
        """Ask for a file name and write the printable report (PDF); True when written."""
        return self._ask("report")

    def _ask(self, kind: str) -> bool:
        title, filter_text, suffix = EXPORTS[kind]
        if not self._window.results_current and not self._confirm_stale(title):
            return False
        path, _ = QFileDialog.getSaveFileName(
            self._window, title, self.suggested_path(suffix), filter_text
        )
        if not path:
            return False
        if not path.lower().endswith(suffix):
            path += suffix
        return self.export(kind, path)

    def _confirm_stale(self, title: str) -> bool:
        """Ask whether to export results that predate the last edits."""
        answer = QMessageBox.question(
            self._window,
            title,
            "The case has changed since it was last solved; the export shows the last "
            "solution, not the case as it is now. Export anyway? (F5 solves it again.)",
        )
        return answer == QMessageBox.StandardButton.Yes

    def export(self, kind: str, path: str) -> bool:
        """Write the ``kind`` export (``"xlsx"`` or ``"report"``) to ``path``."""
        window = self._window
        try:
            write_file_atomically(path, self._content(kind))
        except OSError as error:
            text = f"{path} could not be written: {error.strerror or error}"
            QMessageBox.warning(window, EXPORTS[kind][0], text)
            window.show_message(text, 10_000)
            return False
        window.show_message(f"Wrote {path}", 5_000)
        return True

    def _content(self, kind: str) -> bytes:
        window = self._window
        if kind == "xlsx":
            from model.report.xlsx import workbook_bytes  # openpyxl: loaded on first export

            return workbook_bytes(window.case, window.files.path)
        from gui.report import report_pdf_bytes  # the report's modules load on first use

        return report_pdf_bytes(window.case, window.files.path)
