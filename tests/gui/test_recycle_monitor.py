"""Recycle monitor: curves made once, log residuals, markers, diagnosis, live controls."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import math  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtCore import Qt  # noqa: E402

from convergence import (  # noqa: E402
    FixedPointProblem,
    IterationRecord,
    QStats,
    SolverSettings,
    bounds_in_force,
    diagnose_tears,
    solve_fixed_point,
)
from gui.recycle_monitor import RecycleMonitor  # noqa: E402
from model.solve.driver import solve_flowsheet  # noqa: E402
from tests.benchmarks.flowsheet_generator import generate_flowsheet  # noqa: E402

pytestmark = pytest.mark.gui


def record(iteration, settings, residuals, q=None, slopes=None):
    """An IterationRecord as the solver makes it (real class, chosen numbers)."""
    snapshot = settings.snapshot()
    return IterationRecord(
        iteration=iteration,
        evaluations=iteration,
        residuals=residuals,
        q=q or dict.fromkeys(residuals),
        settings_version=snapshot.version,
        settings=snapshot,
        slopes=slopes or {},
    )


@pytest.fixture
def monitor(qtbot):
    widget = RecycleMonitor()
    qtbot.addWidget(widget)
    widget.resize(1100, 360)
    widget.show()
    return widget


def type_into(qtbot, line_edit, text):
    line_edit.setFocus()
    line_edit.selectAll()
    qtbot.keyClicks(line_edit, text)
    qtbot.keyClick(line_edit, Qt.Key.Key_Return)


def test_curves_are_created_once_and_updated(qtbot, monitor):
    settings = SolverSettings()
    monitor.bind_settings(settings)
    monitor.begin_run()
    monitor.add_record(record(1, settings, {"S5": 1.0, "S9": 0.5}))
    monitor.redraw()
    curves = {tear: s.residual_curve for tear, s in monitor.plots.series.items()}
    q_curves = {tear: s.q_curve for tear, s in monitor.plots.series.items()}
    stats = QStats(-3.0, -2.0, -1.0, 0, 0, 4)
    for iteration in range(2, 8):
        monitor.add_record(
            record(
                iteration,
                settings,
                {"S5": 10.0**-iteration, "S9": 0.0},
                q={"S5": stats, "S9": None},
            )
        )
    qtbot.waitUntil(lambda: len(monitor.plots.series["S5"].residual_curve.xData) == 7)
    assert {t: s.residual_curve for t, s in monitor.plots.series.items()} == curves
    assert all(monitor.plots.series[t].residual_curve is curves[t] for t in curves)
    assert all(monitor.plots.series[t].q_curve is q_curves[t] for t in q_curves)
    residual = monitor.plots.series["S5"].residual_curve
    assert residual.yData[-1] == pytest.approx(1e-7)
    assert monitor.plots.residual_plot.getPlotItem().ctrl.logYCheck.isChecked()
    # an exact zero is drawn at the floor, not dropped (log axis)
    assert monitor.plots.series["S9"].residual_curve.yData[-1] > 0
    q = monitor.plots.series["S5"]
    assert list(q.q_curve.yData) == [-2.0] * 6 and list(q.q_low.yData) == [-3.0] * 6
    assert q.q_band is not None
    # legend: one entry per tear
    legend = monitor.plots.residual_plot.getPlotItem().legend
    assert [label.text for _sample, label in legend.items] == ["S5", "S9"]
    # tolerance line on the log axis sits at log10(tolerance)
    assert monitor.plots.tolerance_line.value() == pytest.approx(math.log10(1e-8))
    # the ticks read as the values: no SI scale factor on the axis labels
    for plot in (monitor.plots.residual_plot, monitor.plots.q_plot):
        for name in ("left", "bottom"):
            axis = plot.getPlotItem().getAxis(name)
            assert axis.autoSIPrefixScale == 1.0 and "x0" not in axis.labelString()


def test_settings_change_marks_both_plots(qtbot, monitor):
    settings = SolverSettings()
    monitor.bind_settings(settings)
    monitor.begin_run()
    monitor.add_record(record(1, settings, {"S5": 1.0}))
    monitor.add_record(record(2, settings, {"S5": 0.5}))
    type_into(qtbot, monitor.controls.edits["q_max"], "0.5")
    assert settings.q_max == 0.5 and settings.version == 1
    monitor.add_record(record(3, settings, {"S5": 0.2}))
    monitor.redraw()
    assert list(monitor.plots.markers) == [3]
    residual_marker, q_marker = monitor.plots.markers[3]
    assert residual_marker.value() == 3 and q_marker.value() == 3
    assert "q_max 0 → 0.5" in residual_marker.label.format
    assert monitor.plots.q_max_line.value() == 0.5


def test_invalid_control_keeps_the_old_value(qtbot, monitor):
    settings = SolverSettings(q_min=-5.0, q_max=0.0)
    monitor.bind_settings(settings)
    edit = monitor.controls.edits["q_min"]
    type_into(qtbot, edit, "2")
    assert settings.q_min == -5.0 and settings.version == 0
    message = monitor.controls.error_text()
    assert "q_min" in message and "q_max" in message and "kept q_min = -5" in message
    assert edit.text() == "2" and "border" in edit.styleSheet()
    type_into(qtbot, monitor.controls.edits["max_iterations"], "many")
    assert "whole number" in monitor.controls.error_text()
    assert settings.max_iterations == 200
    type_into(qtbot, edit, "-20")
    assert settings.q_min == -20.0 and monitor.controls.error_text() == ""


def test_diagnosis_of_a_real_run_and_apply_suggested_bounds(qtbot, monitor):
    # x = 0.9 x + 1: slope 0.9, Wegstein's ideal q = s/(s-1) = -9, clipped at q_min = -5
    # (CHECKS.md, polykin fixpoint_wegstein: 17 iterations at the default bounds)
    # (without the early first step, which is exact here by itself and widens nothing)
    settings = SolverSettings(tolerance=1e-10, early_acceleration=False)
    problem = FixedPointProblem(lambda x: 0.9 * x + 1.0, np.array([1.0]), {"loop": slice(0, 1)})
    monitor.bind_settings(settings)
    monitor.begin_run()
    result = solve_fixed_point(problem, "wegstein", settings, monitor.add_record)
    monitor.end_run(result)
    text = monitor.diagnosis_view.toPlainText()
    # The run widened q_min to -12 by itself (adaptive bounds): the advice does not blame
    # q_min = -5, and the button offers to keep the widening in the settings.
    assert "loop" in text and "the run widened itself to" in text and "stops it" not in text
    low, high = monitor.suggestion()
    assert low < -9.0 <= high
    with qtbot.waitSignal(monitor.bounds_applied) as signal:
        qtbot.mouseClick(monitor.apply_button, Qt.MouseButton.LeftButton)
    assert signal.args == [low, high]
    assert (settings.q_min, settings.q_max) == (low, high)
    assert monitor.controls.edits["q_min"].text() == f"{low:g}"
    assert monitor.plots.q_min_line.value() == low


def test_show_history_of_a_stored_run(qtbot, monitor):
    settings = SolverSettings()
    problem = FixedPointProblem(lambda x: np.cos(x), np.array([1.0]), {"T": slice(0, 1)})
    result = solve_fixed_point(problem, "wegstein", settings)
    monitor.show_history(result)
    series = monitor.plots.series["T"]
    assert len(series.residual_curve.xData) == len(result.history.records)
    assert f"{result.iterations} iterations" in monitor.status_label.text()
    assert result.message in monitor.diagnosis_view.toPlainText()
    monitor.show_history(None)
    assert monitor.plots.series == {}


def test_live_diagnosis_of_a_part_by_part_solve_takes_each_tear_from_its_own_part(qtbot, monitor):
    settings = SolverSettings()
    monitor.bind_settings(settings)
    monitor.begin_run()
    solution = solve_flowsheet(
        generate_flowsheet(17, 3, 4), settings=settings, callback=monitor.add_record
    )
    assert solution.status == "solved"
    monitor.redraw()  # the live view, before the run's end is shown
    live = monitor._live_diagnosis()
    for part in solution.parts:
        own = diagnose_tears(part.convergence.history, settings)
        for tear in part.tear_streams:
            assert live[tear].slope == own[tear].slope and live[tear].advice == own[tear].advice
    monitor.end_run(solution.convergence, solution.block_evaluations)
    assert set(monitor.plots.series) == set(solution.tear_streams)


def test_a_fallback_is_shown_in_the_run_text(qtbot, monitor):
    # A coupled affine map on which per-variable held q diverges while direct
    # substitution converges (tests/convergence/test_robustness.py): the run falls back.
    from tests.convergence.problems import wide_map

    g, x0 = wide_map()
    problem = FixedPointProblem(g=g, x0=x0, tear_slices={"W": slice(0, x0.size)})
    settings = SolverSettings(q_mode="held", max_iterations=500)
    monitor.bind_settings(settings)
    monitor.begin_run()
    result = solve_fixed_point(problem, "wegstein", settings, monitor.add_record)
    monitor.end_run(result)
    assert result.converged and result.history.events_of("fallback")
    assert "Fallback at iteration" in monitor.diagnosis_view.toPlainText()


def test_dominant_mode_steps_are_shown_and_the_checkbox_switches_them(qtbot, monitor):
    # The coupled isomer map of tests/convergence/test_dominant_mode.py (eigenvalues 0.9
    # and 0.1, numpy.linalg.eigvals): the default run takes dominant-mode steps.
    from tests.convergence.test_dominant_mode import FEED, ISOMERS

    problem = FixedPointProblem(
        g=lambda x: ISOMERS @ x + FEED, x0=np.array([0.0, 5.0]), tear_slices={"R": slice(0, 2)}
    )
    settings = SolverSettings()
    monitor.bind_settings(settings)
    box = monitor.controls.dominant_mode
    assert box.isChecked()
    monitor.begin_run()
    result = solve_fixed_point(problem, "wegstein", settings, monitor.add_record)
    monitor.end_run(result)
    assert "Dominant-mode steps" in monitor.diagnosis_view.toPlainText()
    with qtbot.waitSignal(monitor.controls.settings_changed):
        box.click()
    assert settings.dominant_mode is False and not box.isChecked()
    off = solve_fixed_point(problem, "wegstein", settings)
    assert "dominant mode" not in [record.step for record in off.history.records]
    monitor.grab().save("/tmp/accel_monitor.png")


def test_a_run_without_wegstein_steps_says_so_and_no_target_plot_without_targets(
    qtbot, monitor, screenshot_dir
):
    from gui.recycle_monitor.plots import NO_Q_TITLE, Q_TITLE

    settings = SolverSettings()
    monitor.bind_settings(settings)
    problem = FixedPointProblem(lambda x: np.cos(x), np.array([1.0]), {"T": slice(0, 1)})
    title = monitor.plots.q_plot.getPlotItem().titleLabel
    monitor.show_history(solve_fixed_point(problem, "broyden", settings))
    assert NO_Q_TITLE in title.text
    assert not monitor.target_plot.plot.isVisibleTo(monitor)  # no targets: no third plot
    # the q plot follows the residual plot's iterations, not a range of its own
    qtbot.wait(20)
    ranges = [
        plot.getPlotItem().getViewBox().viewRange()[0]
        for plot in (monitor.plots.residual_plot, monitor.plots.q_plot)
    ]
    assert ranges[0] == pytest.approx(ranges[1]) and ranges[0][1] > 6.0
    assert monitor.grab().save(str(screenshot_dir / "monitor_broyden_run.png"))
    monitor.show_history(solve_fixed_point(problem, "wegstein", settings))
    assert Q_TITLE in title.text and NO_Q_TITLE not in title.text


def test_bounds_the_run_widened_are_named_and_marker_labels_stay_in_view(
    qtbot, monitor, screenshot_dir
):
    # A linear map of slope 0.99 wants Wegstein's q = s / (s - 1) = -99 (Wegstein 1958),
    # below q_min = -5: with the dominant-mode step off, the run widens q_min itself.
    settings = SolverSettings(dominant_mode=False)
    monitor.bind_settings(settings)
    problem = FixedPointProblem(
        lambda x: 0.99 * x + np.array([1.0, 2.0]), np.array([50.0, 100.0]), {"T": slice(0, 2)}
    )
    result = solve_fixed_point(problem, "wegstein", settings)
    widened = bounds_in_force(result.history, settings.snapshot())
    assert widened[0] < settings.q_min
    monitor.resize(1000, 700)
    monitor.show_history(result)
    qtbot.wait(20)
    plots = monitor.plots
    # the line stays at the settings' bound (a widening is per variable); its label
    # names the bound the run used
    assert plots.q_min_line.value() == settings.q_min
    assert plots.q_min_line.label.format == f"q_min {settings.q_min:g} (run: {widened[0]:g})"
    assert plots.q_max_line.label.format == f"q_max {settings.q_max:g}"
    (event,) = result.history.events_of("settings changed")
    residual_marker, q_marker = plots.markers[event.iteration]
    # a short label, the whole note in the tooltip
    assert residual_marker.label.format == f"q_min {settings.q_min:g} -> {widened[0]:g}"
    assert residual_marker.toolTip() == event.detail.split(": ", 1)[-1]
    # the marker sits at the right of the view: its label is drawn to its left, inside
    for plot, marker in ((plots.residual_plot, residual_marker), (plots.q_plot, q_marker)):
        view = plot.getPlotItem().getViewBox().sceneBoundingRect()
        label = marker.label.sceneBoundingRect()
        assert view.left() <= label.left() and label.right() <= view.right() + 1
        # and each plot fits its widget (a long title once widened the q plot past it)
        assert plot.getPlotItem().sceneBoundingRect().width() <= plot.width() + 1
    assert monitor.grab().save(str(screenshot_dir / "monitor_widened_bounds.png"))


def test_a_marker_near_the_left_edge_puts_its_label_to_its_right(qtbot, monitor):
    settings = SolverSettings()
    monitor.bind_settings(settings)
    monitor.begin_run()
    for iteration in range(1, 12):
        monitor.add_record(record(iteration, settings, {"S5": 0.5**iteration}))
    monitor.redraw()
    assert monitor.plots.add_marker(2, "q_max 0 → 0.5")
    qtbot.wait(20)
    for line in monitor.plots.markers[2]:
        view = line.getViewBox().sceneBoundingRect()
        label = line.label.sceneBoundingRect()
        x = line.sceneBoundingRect().center().x()
        assert label.left() >= x - 1 and label.right() <= view.right()
