"""q from the tear's dominant slope for coupled variables (``dominant_slope``).

Outside references: numpy.linalg (eigenvalues of the map's matrix; the fixed point as the
solution of (I - A) x = c) and polykin 0.8 ``fixpoint_dem``, the dominant eigenvalue
method of Orbach & Crowe (Can. J. Chem. Eng. 49, 1971), run on the same map with the same
stopping rule through its callback.
"""

from __future__ import annotations

import numpy as np
import pytest
from polykin.math import fixpoint_dem

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
from convergence.coupling import DominantSlopeQ
from convergence.points import Evaluated
from convergence.problem import TearLayout

# A tear of three strongly coupled variables: eigenvalues 1.1 (direct substitution
# diverges along that mode), 0.4 and 0.6, with eigenvectors far from the axes (our own).
EIGENVECTORS = np.array([[1.0, 1.0, 0.2], [0.8, -1.0, 0.5], [1.2, 0.3, -1.0]])
COUPLED = EIGENVECTORS @ np.diag([1.1, 0.4, 0.6]) @ np.linalg.inv(EIGENVECTORS)
OFFSETS = np.array([1.0, 2.0, 3.0])
FIXED_POINT = np.linalg.solve(np.eye(3) - COUPLED, OFFSETS)


def _coupled_problem() -> FixedPointProblem:
    return FixedPointProblem(
        g=lambda x: COUPLED @ x + OFFSETS, x0=1.3 * FIXED_POINT, tear_slices={"T": slice(0, 3)}
    )


def test_tear_slope_over_direct_steps_is_the_dominant_eigenvalue():
    # The ratio <Δg, Δx>/<Δx, Δx> over direct-substitution steps tends to the dominant
    # eigenvalue (power iteration); numpy.linalg.eigvals gives 1.1.
    dominant = max(np.linalg.eigvals(COUPLED).real)
    assert dominant == pytest.approx(1.1)
    problem = _coupled_problem()
    layout = TearLayout(problem)
    x_previous, x = problem.x0, problem.g(problem.x0)
    for _ in range(40):  # direct substitution
        x_previous, x = x, problem.g(x)
    gx, scale = problem.g(x), layout.scale_of(x)
    point = Evaluated(
        41,
        x,
        gx,
        gx - x,
        scale,
        step=x - x_previous,
        g_step=gx - problem.g(x_previous),
        usable=layout.usable_steps(x - x_previous, scale),
    )
    q = DominantSlopeQ(layout).tear_q(point)
    np.testing.assert_allclose(q, dominant / (dominant - 1.0), rtol=1e-4)


def test_coupled_tear_that_per_variable_wegstein_cannot_close_converges():
    # dominant_mode off as well: its two-mode step closes this tear by itself
    # (tests/convergence/test_dominant_mode.py); here the dominant slope is on trial.
    per_variable = solve_fixed_point(
        _coupled_problem(), "wegstein", SolverSettings(dominant_slope=False, dominant_mode=False)
    )
    assert not per_variable.converged
    result = solve_fixed_point(_coupled_problem(), "wegstein", SolverSettings())
    assert result.converged, result.message
    np.testing.assert_allclose(result.x, FIXED_POINT, rtol=1e-7)  # numpy.linalg.solve

    def stop_like_ours(niter, x, fx):
        return bool(np.max(np.abs(fx) / np.abs(x)) <= 1e-8), True

    reference = fixpoint_dem(
        _coupled_problem().g, 1.3 * FIXED_POINT, tolx=0.0, maxiter=500, callback=stop_like_ours
    )
    assert reference.success
    np.testing.assert_allclose(reference.x, FIXED_POINT, rtol=1e-7)
    assert result.evaluations < reference.nfeval  # 29 against 75 when written


def test_decoupled_variables_keep_their_own_q():
    # A diagonal map: every variable's own slope is steady, so q is per variable exactly
    # as without the option (Wegstein 1958: exact on the first accelerated step).
    slopes = np.array([0.5, 0.9, -0.7])
    problem = FixedPointProblem(
        g=lambda x: slopes * x + 1.0, x0=np.ones(3), tear_slices={"S": slice(0, 3)}
    )
    settings = {"q_min": -20.0, "q_max": 0.9, "tolerance": 1e-12}
    on = solve_fixed_point(problem, "wegstein", SolverSettings(**settings))
    off = solve_fixed_point(problem, "wegstein", SolverSettings(dominant_slope=False, **settings))
    assert on.iterations == off.iterations == 4
    np.testing.assert_array_equal(on.x, off.x)


def test_held_q_stays_per_variable():
    settings = {"q_mode": "held", "adaptive_bounds": False, "max_iterations": 30}
    on = solve_fixed_point(_coupled_problem(), "wegstein", SolverSettings(**settings))
    off = solve_fixed_point(
        _coupled_problem(), "wegstein", SolverSettings(dominant_slope=False, **settings)
    )
    np.testing.assert_array_equal(on.x, off.x)
