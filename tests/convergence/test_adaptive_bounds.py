"""Adaptive q bounds: a Wegstein run widens its own bounds where steady slopes ask for it.

Outside references: polykin 0.8 ``fixpoint_wegstein`` on x = 0.9 x + 1 takes 17
iterations at its default bounds (q = -9 clipped at -5) and is exact with q_min = -10
(CHECKS.md, "Fixed-point methods"); Wegstein 1958 (CACM 1(6)): with q = s/(s - 1)
admitted, the accelerated step lands on the fixed point of an affine map.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from polykin.math import fixpoint_wegstein

from convergence import ConvergenceHistory, FixedPointProblem, SolverSettings, solve_fixed_point
from convergence.adaptive import DRIFT_RATIO, Q_MIN_LIMIT, BoundsAdapter


def _affine(slope: float, offset: float = 1.0) -> FixedPointProblem:
    return FixedPointProblem(
        g=lambda x: slope * x + offset, x0=np.array([1.0]), tear_slices={"S1": slice(0, 1)}
    )


def test_slow_affine_loop_is_exact_once_its_bound_is_widened():
    # polykin at its default bounds: 17 iterations; with q_min = -10: exact (CHECKS.md).
    slow = fixpoint_wegstein(lambda x: 0.9 * x + 1.0, np.array([1.0]), tolx=1e-6)
    assert slow.niter == 17
    # Without the early first step (which is exact here at iteration 2 by itself, see
    # tests/convergence/test_first_step.py), the widening is what makes the step exact.
    settings = SolverSettings(early_acceleration=False)
    result = solve_fixed_point(_affine(0.9), "wegstein", settings)
    # Iterations 1-2 direct; at 3 the two slope estimates agree (0.9), q_min goes from -5
    # to -12 (suggested_bounds of q = -9) and the step is exact; 4 confirms it.
    assert result.converged and result.iterations == 4
    assert result.x[0] == pytest.approx(10.0, rel=1e-14)  # 1 / (1 - 0.9)
    record = result.history.records[2]
    assert record.q_bounds == (-12.0, 0.0) and record.q["S1"].median == pytest.approx(-9.0)
    assert record.q["S1"].clipped_low == 0
    [event] = result.history.events_of("settings changed")
    assert event.iteration == 3 and event.detail.startswith("adaptive bounds: q_min -5 -> -12")
    # The run's widening is its own: the settings object stays the user's. The diagnosis
    # judges against the bounds the run used, so it does not blame q_min = -5 for a step
    # the run already took at q = -9; it still suggests q_min = -12 for the settings.
    assert settings.q_min == -5.0
    diagnosis = result.diagnosis["S1"]
    assert not diagnosis.blocked_by_bounds and "stops it" not in diagnosis.advice
    assert "the run widened itself to" in diagnosis.advice
    assert diagnosis.suggested_bounds == (-12.0, 0.0)


@pytest.mark.parametrize(("slope", "bound"), [(-1.5, "q_max"), (-3.0, "q_max"), (0.98, "q_min")])
def test_loops_that_fixed_bounds_cannot_close_converge(slope, bound):
    # Slope -1.5 and -3: direct substitution diverges and q = s/(s - 1) (0.6, 0.75) lies
    # above q_max = 0; slope 0.98 wants q = -49, below q_min = -5.
    fixed = solve_fixed_point(
        _affine(slope), "wegstein", SolverSettings(adaptive_bounds=False, max_iterations=40)
    )
    # Without the early first step (a one-variable loop is one mode, and its first step
    # is already exact: tests/convergence/test_first_step.py) the widening closes them.
    adaptive = solve_fixed_point(
        _affine(slope), "wegstein", SolverSettings(early_acceleration=False)
    )
    assert not fixed.converged
    assert adaptive.converged and adaptive.iterations == 4
    assert adaptive.x[0] == pytest.approx(1.0 / (1.0 - slope), rel=1e-12)
    assert f"adaptive bounds: {bound}" in adaptive.history.events_of("settings changed")[0].detail


def test_q_above_one_is_not_granted_to_a_run_that_is_not_drifting():
    # Slope 2 wants q = 2, a step against g; it is granted only while the largest scaled
    # residual stays above DRIFT_RATIO times the best seen. Here the values run away and
    # the residual on their own scale creeps down towards 1, so it never is: the run is
    # reported diverging, as at fixed bounds, and the diagnosis's advice closes it. (The
    # bounds rule alone: with the dominant-mode step, the default, the one variable's
    # secant closes this loop, see test_first_step.py.)
    adaptive = solve_fixed_point(_affine(2.0), "wegstein", SolverSettings(dominant_mode=False))
    assert adaptive.status == "diverging"
    assert not adaptive.history.events_of("settings changed")
    advice = adaptive.diagnosis["S1"]
    assert advice.suggested_q == pytest.approx(2.0) and advice.suggested_bounds == (-5.0, 2.5)
    followed = solve_fixed_point(_affine(2.0), "wegstein", SolverSettings(q_max=2.5))
    assert followed.converged and followed.x[0] == pytest.approx(-1.0, rel=1e-12)


def test_switching_adaptation_off_during_a_run_restores_the_settings_bounds():
    # A nonlinear map whose slope settles near 0.95: the bounds widen, then the user
    # switches adaptation off; from the next iteration q is clipped at q_min = -5 again.
    problem = FixedPointProblem(
        g=lambda x: 0.95 * x + 1.0 + 0.02 * np.sin(x),
        x0=np.array([1.0]),
        tear_slices={"S": slice(0, 1)},
    )
    settings = SolverSettings(tolerance=1e-14, max_iterations=12)
    widened_at = []

    def callback(record):
        if record.q_bounds is not None and not widened_at:
            assert record.q_bounds[0] < -5.0
            widened_at.append(record.iteration)
            settings.update(adaptive_bounds=False)

    result = solve_fixed_point(problem, "wegstein", settings, callback)
    assert widened_at
    later = result.history.records[widened_at[0] :]
    accelerated = [record for record in later if record.step == "accelerated"]
    assert accelerated and all(record.q_bounds is None for record in accelerated)
    assert all(record.q["S"].minimum >= -5.0 for record in accelerated)


def test_adapter_widens_only_steady_variables_and_follows_the_user():
    adapter = BoundsAdapter(3)
    settings = SolverSettings().snapshot()
    no_guard, residual, scale = np.zeros(3, dtype=bool), np.full(3, 0.1), np.ones(3)
    adapter.observe(np.array([-9.0, -9.0, 0.5]), residual, scale)
    low, high, note = adapter.bounds(
        np.array([-9.1, -30.0, 0.45]), no_guard, settings, residual, scale
    )
    # Variable 0 is steady (-9 then -9.1); variable 1 jumped (-9 to -30); variable 2 is
    # steady at q = 0.45 > q_max: q_max -> min(0.45 + 0.25 x 0.45, (0.45 + 1)/2) rounded up.
    np.testing.assert_array_equal(low, [-12.0, -5.0, -5.0])
    np.testing.assert_array_equal(high, [0.0, 0.0, 0.57])
    assert "q_min -5 -> -12 for 1 variable(s)" in note and "q_max 0 -> 0.57" in note
    # Guarded variables (no usable slope) never widen; widening never exceeds the limit.
    adapter.observe(np.array([-9000.0, -9000.0, 0.45]), residual, scale)
    guarded = np.array([False, True, False])
    low, _, _ = adapter.bounds(
        np.array([-9000.0, -9000.0, 0.45]), guarded, settings, residual, scale
    )
    np.testing.assert_array_equal(low, [Q_MIN_LIMIT, -5.0, -5.0])
    # q above 1 only once the residual stays above DRIFT_RATIO x its best for two steps.
    _, high, _ = adapter.bounds(np.full(3, 2.0), no_guard, settings, residual, scale)
    assert high.max() < 1.0
    drifted = DRIFT_RATIO * 0.1 * 1.01 * np.ones(3)
    adapter.bounds(np.full(3, 2.0), no_guard, settings, drifted, scale)
    _, high, note = adapter.bounds(np.full(3, 2.0), no_guard, settings, drifted, scale)
    np.testing.assert_array_equal(high, [2.5, 2.5, 2.5])
    # A change of the user's q bounds replaces every widening.
    changed = SolverSettings(q_min=-3.0).snapshot()
    low, high, note = adapter.bounds(
        np.array([-1.0, -1.0, 0.0]), no_guard, changed, residual, scale
    )
    np.testing.assert_array_equal(low, [-3.0, -3.0, -3.0])
    np.testing.assert_array_equal(high, [0.0, 0.0, 0.0])
    assert note is None and not adapter.widened


def test_equal_bounds_are_left_alone():
    # The constant-q method (Wegstein 1958) is the user's deliberate choice.
    settings = SolverSettings(q_min=0.0, q_max=0.0, max_iterations=30)
    result = solve_fixed_point(_affine(0.98), "wegstein", settings)
    assert not result.history.events_of("settings changed")
    assert all(record.q_bounds is None for record in result.history.records)


def test_widened_bounds_survive_the_case_file_form():
    result = solve_fixed_point(_affine(0.9), "wegstein", SolverSettings(early_acceleration=False))
    text = json.dumps(result.history.to_dict())
    restored = ConvergenceHistory.from_dict(json.loads(text))
    assert restored.records == result.history.records
    assert restored.records[2].q_bounds == (-12.0, 0.0)
