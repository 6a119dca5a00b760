"""Runs a flowsheet solve in a worker thread and reports its progress as queued signals.

The solve (``model.solve.targets.solve_with_targets``: the recycle solve of
``model.solve.driver.solve_flowsheet``, in an outer loop when the case has targets)
never touches Qt: its per-iteration callback
emits a signal of the worker object, which lives in the worker thread, so the record
reaches the window through Qt's queued connection and the window stays responsive. Stop
asks the live settings to stop; the solve honours it at its next iteration and returns
a solution with status "stopped".
"""

from __future__ import annotations

import gc
import importlib
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

    progress = Signal(object)
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
        self.progress.emit(record)


class SolveController(QObject):
    """Starts and stops solves; one at a time.

    Signals
    -------
    started()
        A solve began.
    progress(object)
        One ``convergence.IterationRecord`` (queued from the worker thread).
    finished(object)
        The ``model.solve.driver.FlowsheetSolution`` (also for "stopped" or "not converged").
    failed(str)
        The solve raised (a bug or bad input such as an unknown method): the message.
    """

    started = Signal()
    progress = Signal(object)
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
        worker.progress.connect(self.progress)
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

    def _end_thread(self) -> None:
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
    """Import ``model.solve.driver`` and build the unit registry (which the window's
    start-up no longer pays for: it is built on first use), then move every object alive
    now out of the cyclic garbage collector's way (``gc.freeze``): a full collection then
    takes milliseconds, not the ~100 ms pause that would otherwise hit the window in the
    middle of a solve."""
    importlib.import_module("model.solve.driver")
    from units_of_measure import get_registry

    get_registry()
    gc.collect()
    gc.freeze()
