"""The quasi-Newton method (Broyden 1965, Math. Comp. 19: the "good" update) on
F(x) = g(x) - x, checked against numpy's linear solve and scipy.optimize.root."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import root

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
from convergence.errors import ConvergenceInputError
from tests.convergence.problems import reactor_loop, reactor_problem, wide_map


def _counting(g):
    calls = {"count": 0}

    def counted(x: np.ndarray) -> np.ndarray:
        calls["count"] += 1
        return g(x)

    return counted, calls


def test_solves_a_coupled_linear_loop_where_direct_substitution_diverges():
    matrix = np.array([[0.5, 1.2, 0.0], [-0.8, 0.3, 0.4], [0.2, 0.0, 1.1]])
    offsets = np.array([1.0, 2.0, -1.0])
    assert max(abs(np.linalg.eigvals(matrix))) > 1.0  # direct substitution diverges
    g, calls = _counting(lambda x: matrix @ x + offsets)
    problem = FixedPointProblem(g=g, x0=np.zeros(3) + 1.0, tear_slices={"S1": slice(0, 3)})
    result = solve_fixed_point(problem, "broyden", SolverSettings(tolerance=1e-12))
    assert result.converged, result.message
    # Reference: numpy.linalg.solve of (I - A) x = b.
    np.testing.assert_allclose(result.x, np.linalg.solve(np.eye(3) - matrix, offsets), rtol=1e-10)
    assert result.evaluations == calls["count"] == result.iterations
    assert len(result.history.records) == result.iterations
    assert all(record.q == {"S1": None} for record in result.history.records)
    assert {record.step for record in result.history.records[:-1]} == {"quasi-Newton"}
    direct = solve_fixed_point(problem, "direct")
    assert not direct.converged


def test_reactor_loop_matches_scipy_root():
    x0 = np.array([5.0, 0.5, 0.5, 350.0])
    # Reference: scipy.optimize.root(method='broyden1') on F(x) = g(x) - x.
    reference = root(lambda x: reactor_loop(x) - x, x0, method="broyden1", tol=1e-12)
    assert reference.success
    g, calls = _counting(reactor_loop)
    problem = reactor_problem(g=g)
    result = solve_fixed_point(problem, "broyden", SolverSettings(tolerance=1e-12))
    assert result.converged
    np.testing.assert_allclose(result.x, reference.x, rtol=1e-9)
    assert result.evaluations == calls["count"]
    direct = solve_fixed_point(reactor_problem(), "direct", SolverSettings(tolerance=1e-12))
    assert result.evaluations < direct.evaluations


def test_first_step_is_direct_substitution():
    points = []

    def g(x: np.ndarray) -> np.ndarray:
        points.append(x.copy())
        return np.cos(x)

    problem = FixedPointProblem(g=g, x0=np.array([1.0]), tear_slices={"x": slice(0, 1)})
    solve_fixed_point(problem, "broyden", SolverSettings(max_iterations=2))
    assert points[1][0] == pytest.approx(np.cos(1.0), rel=1e-15)


def test_restarts_are_recorded_as_events():
    # On the 40-variable map the limited memory (30 updates) fills, and a step that more
    # than doubles the residual falls back to direct substitution; both are events.
    g, x0 = wide_map()
    problem = FixedPointProblem(g=g, x0=x0, tear_slices={"W": slice(0, x0.size)})
    result = solve_fixed_point(problem, "broyden", SolverSettings(tolerance=1e-12))
    assert result.converged
    details = [event.detail for event in result.history.events_of("restart")]
    assert any("memory of 30 updates full" in detail for detail in details)
    assert any("residual more than doubled" in detail for detail in details)
    # Against bounded Wegstein at the fixed default bounds (adaptive bounds, on by default
    # since issue 7, take Wegstein to 15 evaluations here).
    fixed_bounds = SolverSettings(tolerance=1e-12, adaptive_bounds=False)
    wegstein = solve_fixed_point(problem, "wegstein", fixed_bounds)
    assert result.evaluations < wegstein.evaluations


def test_a_lower_bound_keeps_a_slow_coupled_loop_from_jumping_below_zero():
    # The single butane loop of tests/benchmarks/recycle_cases.py at recycle 0.95, as a
    # linear map: per pass n-butane N' = 0.95 (0.7 (10 + N)) and isobutane
    # I' = 0.95 (1 + I + 0.3 (10 + N)); a pass clips negative flows to zero, as the
    # flowsheet's does. The first secant update sees one direction only, and the full
    # quasi-Newton step from it lands far below zero flow (about -150 and -350 mol/s),
    # which the clip sends back to the start: without the bound the run cycled.
    r = 0.95
    matrix = r * np.array([[0.7, 0.0], [0.3, 1.0]])
    offsets = r * np.array([7.0, 4.0])
    points = []

    def g(x: np.ndarray) -> np.ndarray:
        points.append(x.copy())
        return np.maximum(matrix @ np.maximum(x, 0.0) + offsets, 0.0)

    problem = FixedPointProblem(
        g=g, x0=np.array([6.65, 3.8]), tear_slices={"recycle": slice(0, 2)}, lower_bound=0.0
    )
    result = solve_fixed_point(problem, "broyden", SolverSettings(tolerance=1e-10))
    assert result.converged, result.message
    # Reference: numpy.linalg.solve of (I - A) x = b; closed form N = 7r / (1 - 0.7r).
    expected = np.linalg.solve(np.eye(2) - matrix, offsets)
    assert expected[0] == pytest.approx(7 * r / (1 - 0.7 * r), rel=1e-12)
    np.testing.assert_allclose(result.x, expected, rtol=1e-9)
    assert min(point.min() for point in points) > 0.0
    assert result.iterations <= 12  # a 2-variable linear map: about 2n secant steps


def test_a_lower_bound_is_checked():
    problem = FixedPointProblem(g=np.cos, x0=np.array([1.0]), tear_slices={"x": slice(0, 1)})
    problem.lower_bound = float("nan")
    with pytest.raises(ConvergenceInputError, match="lower_bound"):
        solve_fixed_point(problem, "broyden")
