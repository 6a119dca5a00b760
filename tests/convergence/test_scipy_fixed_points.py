"""Fixed points checked against scipy.optimize.fixed_point (method 'del2': Steffensen's
method with Aitken's del-squared acceleration), for every method."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import fixed_point

from convergence import METHODS, FixedPointProblem, SolverSettings, solve_fixed_point
from tests.convergence.problems import coupled_pair, reactor_loop, wide_map

PROBLEMS = {
    "cosine": (np.cos, np.array([1.0])),
    "reactor loop": (reactor_loop, np.array([5.0, 0.5, 0.5, 350.0])),
    "coupled pair": (coupled_pair, np.ones(4)),
    "wide map": wide_map(),
}


def test_cosine_fixed_point_value():
    # CHECKS.md: x = cos x from x0 = 1 -> 0.7390851332151607,
    # scipy.optimize.fixed_point(np.cos, [1.0], method='del2').
    reference = fixed_point(np.cos, [1.0], method="del2")
    assert reference[0] == pytest.approx(0.7390851332151607, abs=1e-15)
    problem = FixedPointProblem(g=np.cos, x0=np.array([1.0]), tear_slices={"x": slice(0, 1)})
    result = solve_fixed_point(problem, "wegstein", SolverSettings(q_max=0.9, tolerance=1e-14))
    assert result.x[0] == pytest.approx(0.7390851332151607, abs=1e-14)


@pytest.mark.parametrize("method", list(METHODS))
@pytest.mark.parametrize("name", list(PROBLEMS))
def test_fixed_points_agree_with_scipy(name, method):
    g, x0 = PROBLEMS[name]
    # scipy's xtol is relative (CHECKS.md pitfalls); 1e-13 leaves it well inside 1e-9.
    reference = fixed_point(g, x0, method="del2", xtol=1e-13, maxiter=2000)
    problem = FixedPointProblem(g=g, x0=x0, tear_slices={"T": slice(0, x0.size)})
    settings = SolverSettings(tolerance=1e-12, max_iterations=2000)
    result = solve_fixed_point(problem, method, settings)
    assert result.converged, result.message
    np.testing.assert_allclose(result.x, reference, rtol=1e-9)
