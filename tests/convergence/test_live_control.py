"""Live control of a run: stop requests and settings changes from another thread and from
the callback (scipy.optimize habit, STYLE.md: a stop request is honoured and the result
says it was stopped)."""

from __future__ import annotations

import threading

import numpy as np
import pytest

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
from tests.convergence.problems import coupled_problem

TIMEOUT = 10.0


def _cosine_problem(g=np.cos) -> FixedPointProblem:
    return FixedPointProblem(g=g, x0=np.array([1.0]), tear_slices={"x": slice(0, 1)})


def _pausing_at(evaluation: int, action):
    """cos x whose ``evaluation``-th call lets another thread run ``action`` meanwhile."""
    calls = {"count": 0}
    inside, done = threading.Event(), threading.Event()

    def g(x: np.ndarray) -> np.ndarray:
        calls["count"] += 1
        if calls["count"] == evaluation:
            inside.set()
            assert done.wait(TIMEOUT)
        return np.cos(x)

    def other_thread() -> None:
        assert inside.wait(TIMEOUT)
        action()
        done.set()

    return g, threading.Thread(target=other_thread), calls


def test_stop_from_another_thread_ends_within_one_evaluation():
    # Fixed bounds, so that the stop is the run's only event.
    settings = SolverSettings(tolerance=1e-14, adaptive_bounds=False)
    g, thread, calls = _pausing_at(5, settings.request_stop)
    thread.start()
    result = solve_fixed_point(_cosine_problem(g), "wegstein", settings)
    thread.join(TIMEOUT)
    assert result.status == "stopped" and not result.converged
    assert result.evaluations == 5 == calls["count"] == result.iterations
    assert "stop request" in result.message
    assert [event.kind for event in result.history.events] == ["stopped"]
    np.testing.assert_array_equal(result.gx, np.cos(result.x))
    assert not settings.stop_requested  # the run cleared the request it honoured


def test_callback_returning_true_stops():
    seen = []

    def callback(record):
        seen.append(record.iteration)
        return record.iteration == 3

    result = solve_fixed_point(_cosine_problem(), "direct", SolverSettings(), callback)
    assert result.status == "stopped" and result.iterations == 3 == result.evaluations
    assert seen == [1, 2, 3]
    assert "callback" in result.message


def test_a_stop_requested_before_the_run_does_not_end_it():
    # Regression (issue 15): a late Stop, pressed after a run had ended, stayed set and
    # ended the next run at iteration 1 without saying why.
    settings = SolverSettings()
    settings.request_stop()
    result = solve_fixed_point(_cosine_problem(), "wegstein", settings)
    assert result.status == "converged" and not settings.stop_requested
    # x = cos x: the fixed point, scipy.optimize.fixed_point (CHECKS.md)
    assert result.x[0] == pytest.approx(0.7390851332151607, abs=1e-7)


def test_settings_change_from_another_thread_applies_at_next_iteration():
    # Fixed bounds: only the other thread's change may lift q_max.
    settings = SolverSettings(q_max=0.0, direct_steps=1, tolerance=1e-12, adaptive_bounds=False)
    g, thread, _ = _pausing_at(4, lambda: settings.update(q_max=0.9))
    thread.start()
    result = solve_fixed_point(_cosine_problem(g), "wegstein", settings)
    thread.join(TIMEOUT)
    records = result.history.records
    # Iteration 4 was running when the change came: it keeps version 0 and q_max = 0,
    # so cos x's oscillation (q = s/(s-1) ~ 0.4) is clipped to 0.
    assert [record.settings_version for record in records[:4]] == [0, 0, 0, 0]
    assert records[3].q["x"].maximum == 0.0 and records[3].q["x"].clipped_high == 1
    # From iteration 5 on: version 1, q_max = 0.9 admits q ~ 0.4.
    assert all(record.settings_version == 1 for record in records[4:])
    assert records[4].settings.q_max == 0.9
    assert 0.3 < records[4].q["x"].median < 0.5
    changed = result.history.events_of("settings changed")
    assert len(changed) == 1 and changed[0].iteration == 5
    assert "q_max 0.0 -> 0.9" in changed[0].detail
    assert result.converged and result.iterations < 12


def test_settings_change_from_callback_applies_at_next_iteration():
    # Fixed bounds, so that the first "settings changed" event is the callback's.
    settings = SolverSettings(tolerance=1e-12, adaptive_bounds=False)

    def callback(record):
        if record.iteration == 3:
            settings.update(tolerance=1e-3, max_iterations=50)

    result = solve_fixed_point(coupled_problem(), "wegstein", settings, callback)
    records = result.history.records
    assert records[2].settings.tolerance == 1e-12 and records[3].settings.tolerance == 1e-3
    assert records[3].settings_version == records[2].settings_version + 1
    event = result.history.events_of("settings changed")[0]
    assert event.iteration == 4
    assert "tolerance" in event.detail and "max_iterations 200 -> 50" in event.detail
    assert result.converged and result.largest_residual <= 1e-3


def test_lowering_the_iteration_limit_during_a_run():
    settings = SolverSettings(tolerance=1e-14)

    def callback(record):
        if record.iteration == 2:
            settings.update(max_iterations=6)

    result = solve_fixed_point(coupled_problem(), "direct", settings, callback)
    assert result.status == "not converged" and result.iterations == 6


def test_callback_sees_every_record_in_order():
    seen = []
    result = solve_fixed_point(coupled_problem(), "wegstein", SolverSettings(), seen.append)
    assert seen == result.history.records
    assert [record.iteration for record in seen] == list(range(1, result.iterations + 1))
    assert [record.evaluations for record in seen] == list(range(1, result.evaluations + 1))


@pytest.mark.parametrize("method", ["direct", "wegstein", "broyden"])
def test_every_method_honours_a_stop(method):
    settings = SolverSettings(tolerance=1e-14)
    g, thread, _ = _pausing_at(3, settings.request_stop)
    thread.start()
    result = solve_fixed_point(_cosine_problem(g), method, settings)
    thread.join(TIMEOUT)
    assert result.status == "stopped" and result.evaluations == 3
