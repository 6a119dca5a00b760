"""Screenshots of the window with a solved example (for the README and for review).

Saved into ``$LOOPWRIGHT_SCREENSHOT_DIR`` when set (``docs/screenshots`` for the
README), else into the test's temporary folder, so an ordinary test run leaves the work
tree untouched.
"""

from __future__ import annotations

import pytest

pytestmark = pytest.mark.gui


def test_window_screenshots_of_a_solved_example(qtbot, window, example_path, screenshot_dir):
    window.resize(1500, 920)
    assert window.files.open_path(str(example_path("ammonia_synthesis_loop")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.start_solve()
    assert window.status.state() == "solved"
    window.select_stream(window.case.solution.tear_streams[0])
    window.view.fit_to_view()
    qtbot.wait(50)
    main_path = screenshot_dir / "main_window_solved.png"
    assert window.grab().save(str(main_path))
    window.result_tabs.setCurrentWidget(window.monitor)
    window.scene.select_only(["Loop cooler"] if window.scene.block_item("Loop cooler") else [])
    qtbot.wait(50)
    monitor_path = screenshot_dir / "main_window_recycle_monitor.png"
    assert window.grab().save(str(monitor_path))
    for path in (main_path, monitor_path):
        assert path.stat().st_size > 20_000  # a real picture, not an empty frame
