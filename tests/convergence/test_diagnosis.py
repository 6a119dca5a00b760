"""Tear diagnosis: pattern, slope, the q Wegstein's analysis suggests (q = s/(s - 1),
Wegstein 1958, CACM 1(6)) and whether the q bounds stop it."""

from __future__ import annotations

import numpy as np
import pytest

from convergence import (
    FixedPointProblem,
    SettingsSnapshot,
    SolverSettings,
    diagnose_tears,
    solve_fixed_point,
    suggested_bounds,
)


def _linear_tears(slopes: dict[str, float], size: int = 3) -> FixedPointProblem:
    """Tears of ``size`` variables each; every variable of a tear has that tear's slope."""
    names = list(slopes)
    slope_vector = np.repeat([slopes[name] for name in names], size)
    offsets = np.linspace(1.0, 4.0, slope_vector.size)

    def g(x: np.ndarray) -> np.ndarray:
        return slope_vector * x + offsets

    return FixedPointProblem(
        g=g,
        x0=np.full(slope_vector.size, 0.5),
        tear_slices={name: slice(k * size, (k + 1) * size) for k, name in enumerate(names)},
    )


def test_oscillating_tear_blocked_by_q_max():
    # Slope -0.7: q = 0.7/1.7 = 0.4118 would help; the default q_max = 0 forbids it
    # (the example of issue 3 and DESIGN.md, "Recycles").
    # Fixed bounds: with adaptive bounds the run widens q_max by itself.
    settings = SolverSettings(adaptive_bounds=False)
    result = solve_fixed_point(_linear_tears({"S7": -0.7}), "wegstein", settings)
    diagnosis = result.diagnosis["S7"]
    assert diagnosis.pattern == "oscillating" and diagnosis.converging
    assert diagnosis.slope == pytest.approx(-0.7, abs=1e-9)
    assert diagnosis.suggested_q == pytest.approx(0.7 / 1.7, abs=1e-9)
    assert diagnosis.blocked_by_bounds
    low, high = diagnosis.suggested_bounds
    assert low == -5.0 and diagnosis.suggested_q < high < 1.0
    assert diagnosis.advice.startswith(
        "oscillating, slope -0.70: q ≈ 0.41 would help; q_max = 0 stops it"
    )
    assert diagnosis.direct_substitution_converges


def test_monotonic_tear_blocked_by_q_min():
    # Slope 0.98: q = 0.98/(0.98 - 1) = -49; q_min = -5 stops it (WALKTHROUGH.md).
    # Fixed bounds: the run must stay blocked (adaptive bounds would widen them).
    settings = SolverSettings(max_iterations=30, adaptive_bounds=False)
    result = solve_fixed_point(_linear_tears({"S2": 0.98}), "wegstein", settings)
    diagnosis = result.diagnosis["S2"]
    assert diagnosis.pattern == "monotonic" and diagnosis.converging
    assert diagnosis.slope == pytest.approx(0.98, abs=1e-9)
    assert diagnosis.suggested_q == pytest.approx(-49.0, abs=1e-6)
    assert diagnosis.blocked_by_bounds
    assert diagnosis.suggested_bounds[0] <= -49.0 and diagnosis.suggested_bounds[1] == 0.0
    # Wegstein 1958: with q clipped at -5 the error shrinks by q + (1 - q) s = 0.88.
    assert diagnosis.rate == pytest.approx(-5.0 + 6.0 * 0.98, abs=1e-9)
    assert diagnosis.advice.startswith(
        "monotonic, slope 0.98: q ≈ -49 would help; q_min = -5 stops it"
    )


def test_following_the_advice_converges_a_diverging_tear():
    # Slope -1.5: direct substitution diverges (|s| > 1); q = 0.6 would fix it.
    problem = _linear_tears({"S4": -1.5, "S5": 0.5})
    # At the fixed default bounds (adaptive bounds would find q = 0.6 by themselves), with
    # no fallback to direct substitution (which diverges here too, but later).
    settings = SolverSettings(adaptive_bounds=False, fallback=False)
    first = solve_fixed_point(problem, "wegstein", settings)
    assert first.status == "diverging"
    diagnosis = first.diagnosis["S4"]
    assert not diagnosis.converging and diagnosis.pattern == "oscillating"
    assert not diagnosis.direct_substitution_converges
    assert diagnosis.suggested_q == pytest.approx(0.6, abs=1e-9)
    assert "oscillating and diverging, slope -1.50 (direct substitution diverges)" in (
        diagnosis.advice
    )
    # The other tear is fine: slope 0.5, q = -1 lies within the default bounds.
    assert first.diagnosis["S5"].suggested_q == pytest.approx(-1.0, abs=1e-9)
    assert not first.diagnosis["S5"].blocked_by_bounds
    assert first.diagnosis["S5"].suggested_bounds == (-5.0, 0.0)
    low, high = diagnosis.suggested_bounds
    second = solve_fixed_point(problem, "wegstein", SolverSettings(q_min=low, q_max=high))
    assert second.converged
    assert not second.diagnosis["S4"].blocked_by_bounds


def test_diagnosis_against_other_bounds():
    # Wegstein's own steps only: a dominant-mode step is not limited by the bounds
    # (test_a_dominant_mode_step_is_not_blocked_by_the_bounds).
    result = solve_fixed_point(
        _linear_tears({"S7": -0.7}), "wegstein", SolverSettings(dominant_mode=False)
    )
    relaxed = diagnose_tears(result.history, SolverSettings(q_max=0.5))
    assert not relaxed["S7"].blocked_by_bounds
    assert "within the q bounds [-5, 0.5]" in relaxed["S7"].advice
    from_snapshot = diagnose_tears(result.history, SettingsSnapshot(q_max=0.3))
    assert from_snapshot["S7"].blocked_by_bounds


def test_too_few_iterations_give_an_unknown_pattern():
    settings = SolverSettings(max_iterations=1)
    result = solve_fixed_point(_linear_tears({"S7": -0.7}), "wegstein", settings)
    diagnosis = result.diagnosis["S7"]
    assert diagnosis.pattern == "unknown" and np.isnan(diagnosis.slope)
    assert not diagnosis.blocked_by_bounds and "too few iterations" in diagnosis.advice


@pytest.mark.parametrize(
    ("q", "bounds", "expected"),
    [
        (-1.0, (-5.0, 0.0), (-5.0, 0.0)),  # admitted: unchanged
        (0.4118, (-5.0, 0.0), (-5.0, 0.52)),  # q + 0.25 |q| = 0.515, rounded up
        (0.9, (-5.0, 0.0), (-5.0, 0.95)),  # kept below 1: (q + 1)/2
        (-49.0, (-5.0, 0.0), (-62.0, 0.0)),  # q - 0.25 |q| = -61.25, rounded down
        (2.0, (-5.0, 0.0), (-5.0, 2.5)),
    ],
)
def test_suggested_bounds(q, bounds, expected):
    assert suggested_bounds(q, *bounds) == pytest.approx(expected)


@pytest.mark.parametrize(
    ("method", "name"), [("broyden", "quasi-Newton (Broyden)"), ("direct", "direct substitution")]
)
def test_q_advice_only_after_a_wegstein_run(method, name):
    # Slope 0.98 wants q = -49 (Wegstein 1958), below q_min = -5; a Wegstein run at
    # fixed bounds is told so (test_monotonic_tear_blocked_by_q_min), but a Broyden or
    # direct-substitution run uses no q bounds and must not be told to move them.
    settings = SolverSettings(max_iterations=30)
    result = solve_fixed_point(_linear_tears({"S2": 0.98}), method, settings)
    diagnosis = result.diagnosis["S2"]
    assert diagnosis.slope == pytest.approx(0.98, abs=1e-6)
    assert "q_min" not in diagnosis.advice and "stops it" not in diagnosis.advice
    assert f"this {name} run does not use Wegstein's q bounds" in diagnosis.advice
    assert not diagnosis.blocked_by_bounds and not diagnosis.widened_by_run
    assert diagnosis.suggested_bounds == (settings.q_min, settings.q_max)
    # Without the method named, a history with quasi-Newton steps is read as Broyden's.
    if method == "broyden":
        again = diagnose_tears(result.history, settings)["S2"]
        assert "stops it" not in again.advice


def test_a_dominant_mode_step_is_not_blocked_by_the_bounds():
    # x = 0.9 x + 1: one variable is one mode, so iteration 2 takes the one-mode step
    # x + f/(1 - s), Wegstein's (1958) q = s/(s - 1) = -9 unclipped, and lands on the
    # fixed point 10. q_min = -5 did not stop the run: the advice says the mode step went
    # past it and what Wegstein's own steps would need; no bounds are to be applied.
    problem = FixedPointProblem(lambda x: 0.9 * x + 1.0, np.array([1.0]), {"S1": slice(0, 1)})
    result = solve_fixed_point(problem, "wegstein", SolverSettings(tolerance=1e-10))
    assert [record.step for record in result.history.records] == [
        "direct",
        "dominant mode",
        "none",
    ]
    assert result.history.records[1].mode_tears == ("S1",)
    assert result.x[0] == pytest.approx(10.0, rel=1e-14)
    diagnosis = result.diagnosis["S1"]
    assert not diagnosis.blocked_by_bounds and not diagnosis.widened_by_run
    assert "dominant-mode steps, which the q bounds do not limit, went past q_min = -5" in (
        diagnosis.advice
    )
    assert "try q_min = -12" in diagnosis.advice
