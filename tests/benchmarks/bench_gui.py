"""Benchmarks of the window: start-up, responsiveness during a solve, diagram drawing.

Run ``python -m tests.benchmarks.bench_gui [--quick]`` (offscreen by default). Prints
and returns (``main(quick) -> dict``):

- ``cold_start_s``: a fresh interpreter importing the GUI and showing the window with
  an example case (the ``loopwright CASE`` path), measured from the parent process;
  ``empty_start_s`` the same with an empty diagram (aim: under 2 s);
- ``open_example_s``: opening the example case in an already running window;
- ``ping_*``: event-loop latency while a long solve runs in the worker thread: a 10 ms
  QTimer's lateness (aim: under 50 ms at the worst);
- ``render_*``: time per frame of drawing a 200-block diagram into a QImage, whole
  diagram (zoomed out) and panned views at 100 %.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

ROOT = Path(__file__).resolve().parents[2]
EXAMPLE = ROOT / "examples" / "ammonia_synthesis_loop.loop.json"
PING_MS = 10
FRAME_SIZE = (1600, 1000)


def cold_start(case_path: Path | None) -> float:
    """Seconds from starting a new interpreter to the window shown and painted once."""
    argument = repr(str(case_path)) if case_path else "None"
    code = (
        "from gui.app import application, open_window\n"
        "app = application()\n"
        f"window = open_window({argument})\n"
        "app.processEvents()\n"
        "window.grab()\n"
        "window.files.mark_saved(); window.files.clean_exit()\n"
    )
    environment = dict(
        os.environ,
        QT_QPA_PLATFORM="offscreen",
        LOOPWRIGHT_RECOVERY_DIR=tempfile.mkdtemp(prefix="loopwright-bench-"),
    )
    started = time.perf_counter()
    subprocess.run([sys.executable, "-c", code], check=True, cwd=ROOT, env=environment)
    return time.perf_counter() - started


def open_example(window, app) -> float:
    started = time.perf_counter()
    window.files.open_path(str(EXAMPLE))
    app.processEvents()
    window.grab()
    return time.perf_counter() - started


def latency_during_solve(window, app, seconds: float) -> dict[str, float]:
    """Lateness of a 10 ms timer while direct-substitution solves run back to back.

    A ping counts only when the solve was running both at it and at the ping before, so
    the start (validation, clearing the plots) and the finish (filling the stream table)
    are left out; they are timed on their own as ``solve_start_ms`` and
    ``solve_finish_ms``. Pings before a run's first iteration (the worker choosing tear
    streams) are reported apart as ``ping_max_before_first_iteration_ms``.
    """
    from PySide6.QtCore import QElapsedTimer, QEventLoop, Qt, QTimer

    window.files.open_path(str(EXAMPLE))
    window.set_method("direct")
    window.case.settings.update(tolerance=1e-300, max_iterations=10**6)
    clock = QElapsedTimer()
    lateness: list[float] = []
    before_first_record: list[float] = []
    state = {"last": 0.0, "running": False, "records": 0}
    run_records: list = []

    def ping() -> None:
        now = clock.nsecsElapsed() / 1e6
        running = window.solver.is_running()
        if running and state["running"]:
            late = now - state["last"] - PING_MS
            (lateness if run_records else before_first_record).append(late)
        state["last"], state["running"] = now, running

    def progress(record) -> None:
        run_records.append(record)
        state["records"] += 1

    window.solver.progress.connect(progress)
    finished: list = []
    window.solver.finished.connect(finished.append)
    timer = QTimer()
    timer.setTimerType(Qt.TimerType.PreciseTimer)
    timer.timeout.connect(ping)
    clock.start()
    timer.start(PING_MS)
    deadline = time.perf_counter() + seconds
    start_ms: list[float] = []
    while time.perf_counter() < deadline:
        loop = QEventLoop()
        window.solver.finished.connect(loop.quit)
        window.solver.failed.connect(loop.quit)
        stopper = QTimer()
        stopper.setSingleShot(True)
        stopper.timeout.connect(window.stop_solve)
        stopper.start(max(1, round((deadline - time.perf_counter()) * 1000)))
        run_records.clear()
        started = time.perf_counter()
        window.start_solve()
        start_ms.append((time.perf_counter() - started) * 1000)
        loop.exec()  # the application's own event loop until the solve ends or stops
        stopper.stop()
        window.solver.finished.disconnect(loop.quit)
        window.solver.failed.disconnect(loop.quit)
    timer.stop()
    finish_ms = float("nan")
    if finished:
        started = time.perf_counter()
        window._solve_finished(finished[-1])  # the finish handling once more, timed
        finish_ms = (time.perf_counter() - started) * 1000
    values = sorted(lateness) or [0.0]
    return {
        "ping_count": len(values),
        "ping_median_ms": statistics.median(values),
        "ping_p99_ms": values[min(len(values) - 1, int(0.99 * len(values)))],
        "ping_max_ms": values[-1],
        "ping_max_before_first_iteration_ms": max(before_first_record, default=0.0),
        "solve_iterations_seen": state["records"],
        "solve_start_ms": max(start_ms),
        "solve_finish_ms": finish_ms,
    }


def big_flowsheet(blocks: int = 200):
    """Rows of Feed -> Heater ... -> Product chains, 10 blocks a row, 240 px apart."""
    from model.flowsheet.document import Flowsheet

    sheet = Flowsheet()
    per_row = 10
    for row in range(blocks // per_row):
        names = []
        for column in range(per_row):
            kind = "Feed" if column == 0 else "Product" if column == per_row - 1 else "Heater"
            names.append(sheet.add_block(kind, None, (column * 240.0, row * 160.0)).name)
        for source, target in zip(names, names[1:], strict=False):
            sheet.connect(source, "out", target, "in")
    return sheet


def render_frames(frames: int) -> dict[str, float]:
    """Milliseconds per frame drawing the 200-block diagram into a QImage."""
    from PySide6.QtCore import QRectF
    from PySide6.QtGui import QImage, QPainter

    from gui.diagram.scene import DiagramScene

    scene = DiagramScene()
    scene.set_flowsheet(big_flowsheet())
    image = QImage(*FRAME_SIZE, QImage.Format.Format_ARGB32_Premultiplied)
    target = QRectF(0, 0, *FRAME_SIZE)
    bounds = scene.itemsBoundingRect()

    def timed(sources: list[QRectF]) -> float:
        started = time.perf_counter()
        for source in sources:
            painter = QPainter(image)
            painter.setRenderHint(QPainter.RenderHint.Antialiasing)
            scene.render(painter, target, source)
            painter.end()
        return (time.perf_counter() - started) * 1000 / len(sources)

    zoom_levels = [1.0 + 0.05 * i for i in range(frames)]
    zoomed = [
        QRectF(
            bounds.center().x() - bounds.width() * z / 2,
            bounds.center().y() - bounds.height() * z / 2,
            bounds.width() * z,
            bounds.height() * z,
        )
        for z in zoom_levels
    ]
    panned = [
        QRectF(bounds.left() + 20 * i, bounds.top() + 10 * i, *FRAME_SIZE) for i in range(frames)
    ]
    return {
        "render_whole_ms": timed(zoomed),
        "render_panned_100pct_ms": timed(panned),
        "render_blocks": len(scene.block_items()),
    }


def main(quick: bool = False) -> dict:
    """Run every measurement; ``quick`` shortens the solve and the frame counts."""
    from gui.app import application

    app = application()
    results: dict[str, float] = {}
    results["empty_start_s"] = cold_start(None)
    results["cold_start_s"] = cold_start(EXAMPLE)
    from gui.main_window import MainWindow

    window = MainWindow(autosave_seconds=0)
    window.show()
    settle_until = time.perf_counter() + 2.0  # a user looks at the window for a moment
    while time.perf_counter() < settle_until:
        app.processEvents()
        time.sleep(0.01)
    results["open_example_s"] = open_example(window, app)
    results.update(latency_during_solve(window, app, 3.0 if quick else 10.0))
    results.update(render_frames(10 if quick else 40))
    window.files.mark_saved()
    window.files.clean_exit()
    window.close()
    for name, value in results.items():
        print(f"{name:28s} {value:10.4g}")
    return results


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="shorter runs")
    main(parser.parse_args().quick)
