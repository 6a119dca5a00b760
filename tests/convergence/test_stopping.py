"""The stopping rule ``stop_on``: the estimated error residual / |1 - s| against the residual.

Outside reference: for an affine map g(x) = s x + c the fixed point is x* = c / (1 - s)
and, from any x, x* - x = (g(x) - x) / (1 - s) exactly (Wegstein 1958, CACM 1(6); the
secant extrapolation of his method). So on an affine map the estimated error must be the
true error, and a run stopped on it must be within tolerance of x*.
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from convergence import (
    ConvergenceHistory,
    ConvergenceInputError,
    FixedPointProblem,
    SolverSettings,
    solve_fixed_point,
)
from convergence.stopping import LARGEST_FACTOR, ErrorEstimator


def _affine_problem(slope: float, offset: float = 1.0, x0: float = 1.0) -> FixedPointProblem:
    return FixedPointProblem(
        g=lambda x: slope * x + offset, x0=np.array([x0]), tear_slices={"S1": slice(0, 1)}
    )


def _recorded_direct_run(slope: float, **settings):
    points: list[float] = []
    problem = _affine_problem(slope)
    g = problem.g

    def recording(x: np.ndarray) -> np.ndarray:
        points.append(float(x[0]))
        return g(x)

    problem.g = recording
    return solve_fixed_point(problem, "direct", SolverSettings(**settings)), points


@pytest.mark.parametrize("slope", [0.5, 0.9, 0.98])
def test_estimated_error_of_an_affine_map_is_its_true_error(slope):
    result, points = _recorded_direct_run(slope, tolerance=1e-12, max_iterations=40)
    fixed_point = 1.0 / (1.0 - slope)  # closed form, c / (1 - s)
    for record, x in zip(result.history.records[1:], points[1:], strict=True):
        true_error = abs(fixed_point - x) / abs(x)
        assert record.estimated_errors["S1"] == pytest.approx(true_error, rel=1e-6)
        assert record.residuals["S1"] == pytest.approx(true_error * (1.0 - slope), rel=1e-6)


def test_oscillating_tear_is_held_to_its_residual():
    # s = -0.7: the true error r/1.7 is below the residual r; the estimate stays at r.
    result, points = _recorded_direct_run(-0.7, tolerance=1e-12)
    fixed_point = 1.0 / 1.7
    for record, x in zip(result.history.records[1:], points[1:], strict=True):
        assert record.estimated_errors["S1"] == record.residuals["S1"]
        assert abs(fixed_point - x) / abs(x) < record.residuals["S1"]


@pytest.mark.parametrize("method", ["direct", "wegstein", "broyden"])
def test_stop_on_estimated_error_keeps_the_true_error_within_tolerance(method):
    # Slope 0.98: the residual rule stops about 50 times too far from x* (1/(1 - 0.98)).
    tolerance, fixed_point = 1e-8, 1.0 / 0.02
    errors, iterations = {}, {}
    for rule in ("residual", "estimated error"):
        settings = SolverSettings(
            tolerance=tolerance, stop_on=rule, adaptive_bounds=False, max_iterations=3000
        )
        result = solve_fixed_point(_affine_problem(0.98), method, settings)
        assert result.converged, result.message
        errors[rule] = abs(result.x[0] - fixed_point) / fixed_point
        iterations[rule] = result.iterations
    assert errors["estimated error"] <= tolerance
    assert iterations["estimated error"] >= iterations["residual"]
    if method == "direct":  # direct substitution stops on the first residual <= 1e-8
        assert errors["residual"] > 10 * tolerance


def test_estimated_error_is_never_below_the_residual_and_is_capped():
    estimator = ErrorEstimator(["S1", "S2", "S3"])
    estimator.observe({"S1": 0.99, "S2": -3.0, "S3": None})
    assert estimator.factor("S1") == pytest.approx(100.0)
    assert estimator.factor("S2") == 1.0  # 1/|1 - s| = 0.25 is not used: floor 1
    assert estimator.factor("S3") == 1.0  # no slope yet
    estimator.observe({"S1": 1.0, "S2": -3.0, "S3": 1.0})
    estimator.observe({"S1": 1.0, "S2": -3.0, "S3": 1.0})
    assert estimator.factor("S1") == LARGEST_FACTOR  # median of (0.99, 1, 1) is 1
    errors = estimator.estimated_errors({"S1": 1e-12, "S2": 1e-9, "S3": 0.0})
    assert errors == {"S1": pytest.approx(1e-8), "S2": 1e-9, "S3": 0.0}


def test_converged_message_and_result_name_the_estimated_error():
    result = solve_fixed_point(_affine_problem(0.9), "direct", SolverSettings(tolerance=1e-6))
    assert "largest estimated error" in result.message
    assert result.largest_estimated_error <= 1e-6
    assert result.largest_estimated_error == pytest.approx(10 * result.largest_residual, rel=1e-6)


def test_estimated_errors_survive_the_case_file_form():
    result = solve_fixed_point(_affine_problem(0.9), "wegstein", SolverSettings())
    restored = ConvergenceHistory.from_dict(json.loads(json.dumps(result.history.to_dict())))
    assert restored.records == result.history.records
    old_form = result.history.to_dict()
    for record in old_form["records"]:  # a history written before the field existed
        del record["estimated_errors"], record["q_bounds"]
    for values in old_form["settings"].values():
        del values["stop_on"], values["adaptive_bounds"], values["dominant_slope"]
    old = ConvergenceHistory.from_dict(old_form)
    assert old.records[-1].estimated_errors == {}
    assert old.records[-1].largest_estimated_error == old.records[-1].largest_residual
    assert old.records[0].settings.stop_on == "estimated error"


def test_unknown_stop_rule_is_refused():
    with pytest.raises(ConvergenceInputError, match="stop_on"):
        SolverSettings(stop_on="step")
