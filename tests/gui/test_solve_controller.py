"""Solve controller: a real flowsheet solve in a worker thread, live q bounds, stop."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import threading  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import pytest  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from gui.recycle_monitor import RecycleMonitor  # noqa: E402
from gui.solve_controller import SolveController  # noqa: E402
from model.case.file import load_case  # noqa: E402
from model.solve.driver import solve_flowsheet  # noqa: E402

pytestmark = pytest.mark.gui
EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "ammonia_loop_fixed_split.loop.json"


def paced_solve(flowsheet, method, settings, callback):
    """The real solve, with 10 ms after each iteration so the test can act mid-run."""

    def report(record):
        callback(record)
        time.sleep(0.01)

    return solve_flowsheet(flowsheet, method, settings, report)


@pytest.fixture
def case():
    loaded = load_case(EXAMPLE)
    # q_min = q_max = 0: bounded Wegstein does direct substitution (Wegstein 1958), so
    # the typed-split loop (argon slope about 0.98) needs well over a hundred iterations
    # to 1e-12 (a linear loop: its balances close to that tolerance, unlike a flash's)
    loaded.settings.update(q_min=0.0, q_max=0.0, tolerance=1e-12, max_iterations=2000)
    return loaded


@pytest.fixture
def running(qtbot, case):
    controller = SolveController()
    monitor = RecycleMonitor()
    qtbot.addWidget(monitor)
    monitor.resize(1100, 380)
    monitor.show()
    monitor.bind_settings(case.settings)
    records, solutions = [], []
    controller.started.connect(monitor.begin_run)
    controller.progress.connect(monitor.add_record)
    controller.progress.connect(records.append)
    controller.finished.connect(solutions.append)
    yield controller, monitor, records, solutions
    if controller.is_running():
        controller.stop()
        qtbot.waitUntil(lambda: not controller.is_running(), timeout=30000)


def type_into(qtbot, line_edit, text):
    line_edit.setFocus()
    line_edit.selectAll()
    qtbot.keyClicks(line_edit, text)
    qtbot.keyClick(line_edit, Qt.Key.Key_Return)


def test_q_bounds_changed_during_a_solve_are_recorded_and_marked(
    qtbot, case, running, screenshot_dir
):
    controller, monitor, records, solutions = running
    progress_threads = []
    controller.progress.connect(lambda _r: progress_threads.append(threading.current_thread()))
    assert controller.start(case.flowsheet, "wegstein", case.settings, paced_solve)
    assert controller.is_running()
    assert not controller.start(case.flowsheet, "wegstein", case.settings)  # one at a time
    qtbot.waitUntil(lambda: len(records) >= 4, timeout=20000)
    assert controller.is_running()
    first_curve = monitor.plots.series["Recycle gas"].residual_curve
    type_into(qtbot, monitor.controls.edits["q_max"], "0.5")
    type_into(qtbot, monitor.controls.edits["q_min"], "-20")
    assert case.settings.q_max == 0.5 and case.settings.q_min == -20.0
    qtbot.waitUntil(lambda: bool(solutions), timeout=60000)
    solution = solutions[0]
    assert solution.status == "solved"
    history = solution.convergence.history
    changes = history.events_of("settings changed")
    assert changes and "q_max" in "".join(e.detail for e in changes)
    changed_at = changes[0].iteration
    assert history.records[changed_at - 1].settings.q_max == 0.5
    assert history.records[0].settings.q_max == 0.0
    # the run went on past the change and converged with acceleration
    assert len(history.records) < 100
    monitor.end_run(solution.convergence)
    assert changed_at in monitor.plots.markers
    assert monitor.plots.series["Recycle gas"].residual_curve is first_curve
    assert all(t is threading.main_thread() for t in progress_threads)  # queued delivery
    assert not controller.is_running()
    grab = monitor.grab()
    assert grab.save(str(screenshot_dir / "recycle_monitor.png"))


def test_stop_ends_the_run_with_status_stopped(qtbot, case, running):
    controller, monitor, records, solutions = running
    controller.start(case.flowsheet, "wegstein", case.settings, paced_solve)
    qtbot.waitUntil(lambda: len(records) >= 3, timeout=20000)
    controller.stop()
    qtbot.waitUntil(lambda: bool(solutions), timeout=20000)
    assert solutions[0].status == "stopped"
    assert len(records) < 50
    assert not controller.is_running()
    assert not case.settings.stop_requested


def test_failure_in_the_solve_is_reported(qtbot):
    controller = SolveController()

    def broken(flowsheet, method, settings, callback):
        raise RuntimeError("pass failed on purpose")

    from convergence import SolverSettings

    with qtbot.waitSignal(controller.failed, timeout=10000) as signal:
        controller.start(None, "wegstein", SolverSettings(), broken)
    assert "pass failed on purpose" in signal.args[0]
    assert not controller.is_running()


def test_a_fast_solve_reaches_the_window_in_batches_in_order(qtbot):
    """5,000 records reported at full speed arrive, every one and in order, in far fewer
    queued batches: one event a record made the window wait for the interpreter lock
    once a record (up to 5 ms each) and starved its timers."""
    controller = SolveController()
    records, batches, solutions = [], [], []
    controller.progress.connect(records.append)
    controller.progress_batch.connect(batches.append)
    controller.finished.connect(solutions.append)

    def fast_solve(flowsheet, method, settings, callback):
        for iteration in range(5000):
            callback(iteration)
        return "done"

    from convergence import SolverSettings

    assert controller.start(None, "direct", SolverSettings(), fast_solve)
    qtbot.waitUntil(lambda: bool(solutions), timeout=30000)
    assert records == list(range(5000))  # the last records came before the end
    assert [r for batch in batches for r in batch] == records
    assert len(batches) < 5000
