"""Bad input raises; bad runs are results: NaN/inf, divergence, the iteration limit."""

from __future__ import annotations

import numpy as np
import pytest

from convergence import (
    METHODS,
    ConvergenceInputError,
    FixedPointProblem,
    SolverSettings,
    solve_fixed_point,
)
from tests.convergence.problems import coupled_pair, coupled_problem, wide_map


def _failing_at(evaluation: int, index: int, value: float):
    calls = {"count": 0}

    def g(x: np.ndarray) -> np.ndarray:
        calls["count"] += 1
        result = coupled_pair(x)
        if calls["count"] == evaluation:
            result[index] = value
        return result

    return g


@pytest.mark.parametrize("method", list(METHODS))
@pytest.mark.parametrize("value", [np.nan, np.inf, -np.inf])
def test_not_finite_output_ends_the_run_naming_tear_and_variable(method, value):
    problem = coupled_problem()
    problem.g = _failing_at(3, 2, value)
    result = solve_fixed_point(problem, method)
    assert result.status == "not finite" and not result.converged
    assert "S9 a" in result.message and "tear S9" in result.message
    assert str(value) in result.message and "iteration 3" in result.message
    assert result.evaluations == 3 and len(result.history.records) == 2
    assert result.history.events[-1].kind == "not finite"
    assert not np.isfinite(result.gx[2])


def test_not_finite_without_variable_names_names_index_and_tear():
    problem = coupled_problem(variable_names=None)
    problem.g = _failing_at(1, 3, np.nan)
    result = solve_fixed_point(problem)
    assert "variable 3 of tear S9" in result.message


@pytest.mark.parametrize("method", ["direct", "wegstein"])
def test_divergence_is_reported_before_the_iteration_limit(method):
    # Slope 2: direct substitution diverges; default q bounds clip q = 2 to q_max = 0.
    problem = FixedPointProblem(
        g=lambda x: 2.0 * x - 1.0, x0=np.array([1.5]), tear_slices={"S1": slice(0, 1)}
    )
    # Fixed bounds (adaptive bounds would let q = 2 through and converge).
    settings = SolverSettings(max_iterations=200, adaptive_bounds=False)
    result = solve_fixed_point(problem, method, settings)
    assert result.status == "diverging" and not result.converged
    assert result.iterations < 40
    assert "best seen" in result.message
    assert result.history.events[-1].kind == "diverging"


def test_divergence_patience_and_factor_are_honoured():
    problem = FixedPointProblem(
        g=lambda x: 2.0 * x - 1.0, x0=np.array([1.5]), tear_slices={"S1": slice(0, 1)}
    )
    quick = solve_fixed_point(problem, "direct", SolverSettings(divergence_patience=1))
    patient = solve_fixed_point(problem, "direct", SolverSettings(divergence_patience=8))
    assert patient.iterations == quick.iterations + 7
    # Residual on the best iterate's scale: 0.5 * 2^(k-1) / 1.5 against a best of 1/3,
    # so it first exceeds 100 x best at k = 8.
    early = solve_fixed_point(
        problem, "direct", SolverSettings(divergence_factor=100.0, divergence_patience=1)
    )
    assert early.iterations == 8


def test_held_q_that_misfits_a_coupled_map_is_reported_as_diverging():
    # Held q is estimated per variable from the first steps and ignores coupling; on
    # this coupled map it diverges (bounded mode re-estimates q and converges). With the
    # fallback (the default) the held run goes back to its best point and converges by
    # direct substitution, which converges on this map.
    g, x0 = wide_map()
    problem = FixedPointProblem(g=g, x0=x0, tear_slices={"W": slice(0, x0.size)})
    held = solve_fixed_point(problem, "wegstein", SolverSettings(q_mode="held", fallback=False))
    bounded = solve_fixed_point(problem, "wegstein", SolverSettings(max_iterations=500))
    assert held.status == "diverging"
    assert bounded.converged
    direct = solve_fixed_point(problem, "direct", SolverSettings(max_iterations=500))
    safeguarded = solve_fixed_point(
        problem, "wegstein", SolverSettings(q_mode="held", max_iterations=500)
    )
    assert direct.converged and safeguarded.converged
    [event] = safeguarded.history.events_of("fallback")
    assert safeguarded.history.records[event.iteration - 1].step == "fallback"


def test_iteration_limit_is_a_result_not_an_exception():
    result = solve_fixed_point(coupled_problem(), "direct", SolverSettings(max_iterations=5))
    assert result.status == "not converged" and not result.converged and not result.success
    assert result.iterations == 5 == result.evaluations
    assert "tolerance" in result.message
    assert result.history.events[-1].kind == "iteration limit"


def test_absolute_floor_lets_trace_components_converge():
    # A trace flow tending to zero: relative to |x| its residual stays |s - 1|, so
    # without a floor it never converges; the floor ends it (DESIGN.md: relative
    # tolerance with an absolute floor for trace components).
    def g(x: np.ndarray) -> np.ndarray:
        return np.array([0.5 * x[0] + 1.0, 0.3 * x[1]])

    def problem(floor):
        return FixedPointProblem(
            g=g, x0=np.array([1.0, 1e-3]), tear_slices={"S1": slice(0, 2)}, abs_floor=floor
        )

    floored = solve_fixed_point(problem(np.array([1e-10, 1e-10])), "direct")
    unfloored = solve_fixed_point(problem(1e-300), "direct", SolverSettings(max_iterations=300))
    assert floored.converged
    assert unfloored.status in ("not converged", "diverging")
    assert unfloored.history.records[-1].worst_variable == "S1[1]"


def test_recorded_residual_is_the_scaled_residual():
    problem = coupled_problem(abs_floor=np.array([1e-10, 1e-10, 1e-10, 5.0]))
    result = solve_fixed_point(problem, "wegstein", SolverSettings(max_iterations=1))
    x0 = np.ones(4)
    scaled = np.abs(coupled_pair(x0) - x0) / np.maximum(np.abs(x0), [1e-10, 1e-10, 1e-10, 5.0])
    record = result.history.records[0]
    assert record.residuals == {
        "S3": pytest.approx(scaled[:2].max(), rel=1e-15),
        "S9": pytest.approx(scaled[2:].max(), rel=1e-15),
    }
    assert record.worst_variable == ["S3 a", "S3 b", "S9 a", "S9 b"][int(np.argmax(scaled))]


def test_start_vector_is_left_untouched():
    problem = coupled_problem()
    start = problem.x0.copy()
    solve_fixed_point(problem, "broyden")
    np.testing.assert_array_equal(problem.x0, start)


def test_errors_raised_by_g_propagate():
    def g(x: np.ndarray) -> np.ndarray:
        raise ZeroDivisionError("block R1")

    with pytest.raises(ZeroDivisionError, match="R1"):
        solve_fixed_point(FixedPointProblem(g, np.ones(2), {"S1": slice(0, 2)}))


def test_unknown_method_lists_the_methods():
    with pytest.raises(ValueError) as caught:
        solve_fixed_point(coupled_problem(), "newton")
    assert all(name in str(caught.value) for name in METHODS)
    assert "newton" in str(caught.value)


@pytest.mark.parametrize(
    ("fields", "field"),
    [
        ({"tear_slices": {"S3": slice(0, 2), "S9": slice(3, 4)}}, "tear_slices"),  # gap
        ({"tear_slices": {"S3": slice(0, 3), "S9": slice(2, 4)}}, "tear_slices"),  # overlap
        ({"tear_slices": {"S3": slice(0, 4), "S9": slice(4, 6)}}, "tear_slices['S9']"),
        ({"tear_slices": {}}, "tear_slices"),
        ({"tear_slices": {"S3": (0, 4)}}, "tear_slices['S3']"),
        ({"x0": np.ones((2, 2))}, "x0"),
        ({"x0": np.array([1.0, np.nan, 1.0, 1.0])}, "x0"),
        ({"abs_floor": 0.0}, "abs_floor"),
        ({"abs_floor": np.ones(3)}, "abs_floor"),
        ({"variable_names": ["a", "b"]}, "variable_names"),
        ({"scale": -1.0}, "scale"),
        ({"step_guard": -1.0}, "step_guard"),
    ],
)
def test_bad_problems_are_refused(fields, field):
    values = {
        "g": coupled_pair,
        "x0": np.ones(4),
        "tear_slices": {"S3": slice(0, 2), "S9": slice(2, 4)},
        **fields,
    }
    with pytest.raises(ConvergenceInputError) as caught:
        FixedPointProblem(**values)
    assert caught.value.field == field
    assert field in str(caught.value)


def test_output_of_wrong_shape_is_refused():
    problem = FixedPointProblem(lambda x: x[:2], np.ones(4), {"S1": slice(0, 4)})
    with pytest.raises(ConvergenceInputError, match=r"g\(x\).*4 numbers"):
        solve_fixed_point(problem)
