"""Runs a flowsheet solve in a worker thread and reports its progress as queued signals.

The solve (``model.solve.targets.solve_with_targets``: the recycle solve of
``model.solve.driver.solve_flowsheet``, in an outer loop when the case has targets)
never touches Qt: its per-iteration callback hands the record to the worker object,
which lives in the worker thread, and the records reach the window through Qt's queued
connection. They are coalesced: at most one notice is queued at a time and the window
takes every record that arrived since, so a fast solve (thousands of iterations a
second) cannot flood the event loop. Each queued event makes the window's thread wait
for the solve thread to let go of the interpreter lock (up to
``sys.getswitchinterval()``, 5 ms), so one event a record starved the window's own
timers and paints. Stop
asks the live settings to stop; the solve honours it at its next iteration and returns
a solution with status "stopped".
"""

from __future__ import annotations

import gc
import importlib
import threading
import traceback
from collections.abc import Callable
from typing import Any

from PySide6.QtCore import QObject, QThread, Signal, Slot

from convergence import SolverSettings


def _default_solve(
    flowsheet: Any, method: str, settings: SolverSettings, callback: Callable[[Any], bool | None]
) -> Any:
    from model.solve.targets import solve_with_targets

    return solve_with_targets(flowsheet, method, settings, callback)


class _SolveWorker(QObject):
    """Lives in the worker thread; runs one solve when ``run`` is called there."""

    progress_ready = Signal()
    finished = Signal(object)
    failed = Signal(str)

    def __init__(
        self, solve: Callable[..., Any], flowsheet: Any, method: str, settings: SolverSettings
    ) -> None:
        super().__init__()
        self._solve = solve
        self._flowsheet = flowsheet
        self._method = method
        self._settings = settings
        self._lock = threading.Lock()
        self._pending: list[Any] = []

    @Slot()
    def run(self) -> None:
        try:
            solution = self._solve(self._flowsheet, self._method, self._settings, self._report)
        except Exception as error:  # reported to the window, never lost in the thread
            detail = "".join(traceback.format_exception_only(type(error), error)).strip()
            self.failed.emit(detail)
            return
        self.finished.emit(solution)

    def _report(self, record: Any) -> None:
        with self._lock:
            self._pending.append(record)
            if len(self._pending) > 1:  # a notice is already on its way
                return
        self.progress_ready.emit()

    def take_pending(self) -> list[Any]:
        """The records reported since the last call, oldest first (any thread)."""
        with self._lock:
            records, self._pending = self._pending, []
        return records


class SolveController(QObject):
    """Starts and stops solves; one at a time.

    Signals
    -------
    started()
        A solve began.
    progress(object)
        One ``convergence.IterationRecord``, in the window's thread, in order.
    progress_batch(object)
        The list of records that arrived since the last batch (emitted before their
        one-by-one ``progress``): the window handles a batch at once.
    finished(object)
        The ``model.solve.driver.FlowsheetSolution`` (also for "stopped" or "not converged").
    failed(str)
        The solve raised (a bug or bad input such as an unknown method): the message.
    """

    started = Signal()
    progress = Signal(object)
    progress_batch = Signal(object)
    finished = Signal(object)
    failed = Signal(str)

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self._thread: QThread | None = None
        self._worker: _SolveWorker | None = None
        self._settings: SolverSettings | None = None

    def is_running(self) -> bool:
        return self._thread is not None

    def start(
        self,
        flowsheet: Any,
        method: str,
        settings: SolverSettings,
        solve: Callable[..., Any] | None = None,
    ) -> bool:
        """Solve ``flowsheet`` in a worker thread; False if a solve is already running.

        The window must not edit the flowsheet until ``finished`` or ``failed``.
        ``solve(flowsheet, method, settings, callback)`` replaces
        ``model.solve.driver.solve_flowsheet`` (an independent check, or a test's slow solve).
        """
        if self.is_running():
            return False
        settings.clear_stop()
        self._settings = settings
        thread = QThread()
        thread.setObjectName("loopwright-solve")
        worker = _SolveWorker(solve or _default_solve, flowsheet, method, settings)
        worker.moveToThread(thread)
        worker.progress_ready.connect(self._take_progress)
        worker.finished.connect(self._on_finished)
        worker.failed.connect(self._on_failed)
        thread.started.connect(worker.run)
        self._thread, self._worker = thread, worker
        thread.start()
        self.started.emit()
        return True

    def stop(self) -> None:
        """Ask the running solve to stop at its next iteration."""
        if self._settings is not None and self.is_running():
            self._settings.request_stop()

    def wait(self, milliseconds: int = 30000) -> bool:
        """Block until the worker thread ends (for shutting down); True if it did."""
        return self._thread.wait(milliseconds) if self._thread is not None else True

    @Slot()
    def _take_progress(self) -> None:
        """Pass on every record the worker holds (a batch, then one by one)."""
        records = self._worker.take_pending() if self._worker is not None else []
        if not records:
            return
        self.progress_batch.emit(records)
        for record in records:
            self.progress.emit(record)

    def _end_thread(self) -> None:
        self._take_progress()  # the last records come before the end of the run
        thread, worker = self._thread, self._worker
        self._thread = self._worker = None
        if thread is not None:
            thread.quit()
            thread.wait()
        del worker

    @Slot(object)
    def _on_finished(self, solution: Any) -> None:
        self._end_thread()
        self.finished.emit(solution)

    @Slot(str)
    def _on_failed(self, message: str) -> None:
        self._end_thread()
        self.failed.emit(message)


def preload_solver_modules() -> None:
    """Import ``model.solve.driver`` and scipy.optimize and build the unit registry
    (which the window's start-up no longer pays for), then move every object alive
    now out of the cyclic garbage collector's way (``gc.freeze``): a full collection then
    takes milliseconds, not the ~100 ms pause that would otherwise hit the window in the
    middle of a solve."""
    importlib.import_module("model.solve.driver")
    # The tear set of any loop is chosen by scipy's MILP: imported here, not in the first
    # solve's thread, where its few hundred ms of import would hold the window up.
    importlib.import_module("scipy.optimize")
    importlib.import_module("scipy.sparse")
    from units_of_measure import get_registry

    get_registry()
    gc.collect()
    gc.freeze()
