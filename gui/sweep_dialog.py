"""The sweep dialog (Solve → Sweep…): vary one spec (or two, a grid), record results,
watch them come in on a live plot, stop, copy or export the table as CSV.

The sweep runs in a worker thread (``model.study.sweep_run.run_sweep``, the same runner
as ``loopwright sweep``: in that thread for one worker, else on a process pool); each
point reaches the dialog as a queued signal, which updates the progress bar and the
curves with ``setData``. Stop asks the runner to end after the runs under way. The
case is handed over as its text, so editing the window meanwhile changes nothing.
"""

from __future__ import annotations

import math
import os
from typing import Any

import pyqtgraph as pg
from PySide6.QtCore import QObject, QThread, Signal, Slot
from PySide6.QtWidgets import (
    QApplication,
    QComboBox,
    QDialog,
    QFileDialog,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPlainTextEdit,
    QProgressBar,
    QPushButton,
    QSpinBox,
    QVBoxLayout,
    QWidget,
)

from gui.recycle_monitor.plots import TEAR_COLOURS, _styled_plot
from gui.targets_dialog import result_choices, spec_choices
from model.errors import LoopwrightError
from model.study.sweep_csv import displayed, record_headers, sweep_csv
from model.study.sweep_definition import SweepPlan, parse_record, parse_variation
from model.study.sweep_run import SweepResult, check_plan, run_sweep


class _SweepWorker(QObject):
    point = Signal(int, object)
    finished = Signal(object)
    failed = Signal(str)

    def __init__(self, case_text: str, plan: SweepPlan, workers: int) -> None:
        super().__init__()
        self.case_text, self.plan, self.workers = case_text, plan, workers
        self.stop_requested = False

    @Slot()
    def run(self) -> None:
        try:
            result = run_sweep(
                self.case_text,
                self.plan,
                workers=self.workers,
                on_point=lambda index, point: self.point.emit(index, point),
                should_stop=lambda: self.stop_requested,
            )
        except Exception as error:  # reported in the dialog, never lost in the thread
            self.failed.emit(f"{type(error).__name__}: {error}")
            return
        self.finished.emit(result)


class SweepDialog(QDialog):
    """Set up, run and show one sweep of the case handed in as ``case``."""

    def __init__(self, case: Any, case_text: str, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Sweep")
        self.case, self.case_text = case, case_text
        self.unit_system = case.unit_system
        specs, results = spec_choices(case.flowsheet), result_choices(case.flowsheet)
        self.spec_1, self.spec_2 = self._combo(specs), self._combo(["", *specs])
        self.spec_2.setCurrentText("")
        self.values_1 = QLineEdit("0.005:0.05:10")
        self.values_2 = QLineEdit("")
        self.values_1.setToolTip("START:STOP:N, START:STOP:N:log or V1,V2,...; a unit may follow")
        self.record_choice = self._combo(results)
        self.records = QPlainTextEdit()
        self.records.setMaximumHeight(70)
        add_record = QPushButton("Add")
        add_record.clicked.connect(self._add_record)
        self.workers = QSpinBox()
        self.workers.setRange(1, max(os.cpu_count() or 1, 1) * 4)
        self.workers.setValue(os.cpu_count() or 1)
        self.run_button, self.stop_button = QPushButton("Run"), QPushButton("Stop")
        self.copy_button, self.export_button = QPushButton("Copy CSV"), QPushButton("Export CSV…")
        self.stop_button.setEnabled(False)
        self.copy_button.setEnabled(False)
        self.export_button.setEnabled(False)
        self.progress = QProgressBar()
        self.message = QLabel("")
        self.message.setWordWrap(True)
        self.plot = _styled_plot("Recorded results", "recorded")
        for name in ("left", "bottom"):  # values as the user typed them, no SI prefix
            self.plot.getPlotItem().getAxis(name).enableAutoSIPrefix(False)
        self._build_layout(add_record)
        self.run_button.clicked.connect(self.start)
        self.stop_button.clicked.connect(self.stop)
        self.copy_button.clicked.connect(self.copy_csv)
        self.export_button.clicked.connect(self.export_csv)
        self.result: SweepResult | None = None
        self._thread: QThread | None = None
        self._worker: _SweepWorker | None = None
        self._curves: dict[tuple[int, float], pg.PlotDataItem] = {}
        self._points: dict[int, Any] = {}
        self.resize(900, 640)

    @staticmethod
    def _combo(choices: list[str]) -> QComboBox:
        combo = QComboBox()
        combo.setEditable(True)
        combo.addItems(choices)
        combo.setMinimumContentsLength(30)
        return combo

    def _build_layout(self, add_record: QPushButton) -> None:
        form = QFormLayout()
        for label, spec, values in (
            ("Vary", self.spec_1, self.values_1),
            ("and (grid, optional)", self.spec_2, self.values_2),
        ):
            row = QHBoxLayout()
            row.addWidget(spec, 2)
            row.addWidget(values, 1)
            form.addRow(label, row)
        record_row = QHBoxLayout()
        record_row.addWidget(self.record_choice, 1)
        record_row.addWidget(add_record)
        form.addRow("Record", record_row)
        form.addRow("Recorded (one a line)", self.records)
        form.addRow("Worker processes", self.workers)
        buttons = QHBoxLayout()
        for button in (self.run_button, self.stop_button, self.copy_button, self.export_button):
            buttons.addWidget(button)
        buttons.addWidget(self.progress, 1)
        layout = QVBoxLayout(self)
        layout.addLayout(form)
        layout.addLayout(buttons)
        layout.addWidget(self.message)
        layout.addWidget(self.plot, 1)

    def _add_record(self) -> None:
        text = self.record_choice.currentText().strip()
        if text:
            self.records.appendPlainText(text)

    # ---- the run ----------------------------------------------------------------
    def plan(self) -> SweepPlan:
        """The sweep as typed; InputError/ValueError naming what could not be read."""
        texts = [f"{self.spec_1.currentText().strip()}={self.values_1.text().strip()}"]
        if self.spec_2.currentText().strip():
            texts.append(f"{self.spec_2.currentText().strip()}={self.values_2.text().strip()}")
        records = [line.strip() for line in self.records.toPlainText().splitlines() if line.strip()]
        plan = SweepPlan(
            tuple(parse_variation(text) for text in texts),
            tuple(parse_record(text) for text in records),
        )
        check_plan(self.case, plan)
        return plan

    def start(self) -> bool:
        if self._thread is not None:
            return False
        try:
            plan = self.plan()
        except (LoopwrightError, ValueError) as error:
            self.message.setText(f"<b>Cannot run:</b> {error}")
            return False
        self._reset_plot(plan)
        self.progress.setRange(0, plan.point_count)
        self.progress.setValue(0)
        self.message.setText(f"Solving {plan.point_count} points…")
        worker = _SweepWorker(self.case_text, plan, self.workers.value())
        thread = QThread()
        thread.setObjectName("loopwright-sweep")
        worker.moveToThread(thread)
        worker.point.connect(self._on_point)
        worker.finished.connect(self._on_finished)
        worker.failed.connect(self._on_failed)
        thread.started.connect(worker.run)
        self._thread, self._worker, self._plan = thread, worker, plan
        self.run_button.setEnabled(False)
        self.stop_button.setEnabled(True)
        thread.start()
        return True

    def stop(self) -> None:
        if self._worker is not None:
            self._worker.stop_requested = True
            self.message.setText("Stopping after the runs under way…")

    def is_running(self) -> bool:
        return self._thread is not None

    def _end_thread(self) -> None:
        thread = self._thread
        self._thread = self._worker = None
        if thread is not None:
            thread.quit()
            thread.wait()
        self.run_button.setEnabled(True)
        self.stop_button.setEnabled(False)

    def _reset_plot(self, plan: SweepPlan) -> None:
        self.plot.getPlotItem().clear()
        self.plot.getPlotItem().addLegend(offset=(-10, 10))
        self._curves.clear()
        self._points.clear()
        first = plan.variations[0]
        self.plot.getPlotItem().setLabel("bottom", first.label)
        headers = record_headers(SweepResult(plan), self.unit_system)
        self.plot.getPlotItem().setLabel("left", "; ".join(headers))

    @Slot(int, object)
    def _on_point(self, index: int, point: Any) -> None:
        self._points[index] = point
        self.progress.setValue(len(self._points))
        plan = self._plan
        grid = len(plan.variations) == 2
        for k, record in enumerate(plan.records):
            key = (k, point.values[1] if grid else 0.0)
            curve = self._curves.get(key)
            if curve is None:
                colour = TEAR_COLOURS[len(self._curves) % len(TEAR_COLOURS)]
                name = str(record) + (
                    f" at {plan.variations[1].address} = {key[1]:g}" if grid else ""
                )
                curve = self.plot.plot(
                    pen=pg.mkPen(colour, width=2),
                    symbol="o",
                    symbolSize=6,
                    symbolBrush=colour,
                    name=name,
                )
                self._curves[key] = curve
            xs, ys = [], []
            for i in sorted(self._points):
                other = self._points[i]
                if grid and other.values[1] != key[1]:
                    continue
                value = displayed(other.recorded[k], record.kind, self.unit_system)
                xs.append(other.values[0])
                ys.append(value if math.isfinite(value) else math.nan)
            curve.setData(xs, ys, connect="finite")

    @Slot(object)
    def _on_finished(self, result: SweepResult) -> None:
        self._end_thread()
        self.result = result
        failed = result.not_converged
        state = "stopped" if result.stopped else "done"
        text = f"Sweep {state}: {len(result.points)} of {result.plan.point_count} points"
        if failed:
            text += f"; {len(failed)} did not converge (see the status column of the CSV)"
        self.message.setText(text)
        self.copy_button.setEnabled(True)
        self.export_button.setEnabled(True)

    @Slot(str)
    def _on_failed(self, message: str) -> None:
        self._end_thread()
        self.message.setText(f"<b>The sweep failed:</b> {message}")

    # ---- results ----------------------------------------------------------------
    def csv_text(self) -> str:
        return "" if self.result is None else sweep_csv(self.result, self.unit_system)

    def copy_csv(self) -> None:
        QApplication.clipboard().setText(self.csv_text())
        self.message.setText("The sweep's table is on the clipboard (CSV).")

    def export_csv(self, path: str | None = None) -> bool:
        from model.case.file import write_file_atomically

        if not path:
            path, _ = QFileDialog.getSaveFileName(self, "Export sweep", "", "CSV files (*.csv)")
        if not path:
            return False
        try:
            write_file_atomically(path, self.csv_text().encode("utf-8"))
        except OSError as error:
            self.message.setText(f"<b>Not written:</b> {path}: {error.strerror or error}")
            return False
        self.message.setText(f"Written: {path}")
        return True

    def closeEvent(self, event) -> None:
        self.stop()
        if self._thread is not None:
            self._thread.quit()
            self._thread.wait()
        super().closeEvent(event)
