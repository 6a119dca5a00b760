"""Bounded Wegstein checked against an outside implementation: polykin's fixpoint_wegstein.

Source: polykin 0.8, ``polykin.math.fixpoint_wegstein`` (a published bounded Wegstein,
citing Wegstein 1958, CACM 1(6)). Its iteration was matched to ours by reading its source
(polykin/math/fixpoint/wegstein.py):

- convergence test: polykin stops when max|sclx * (g(x) - x)| <= tolx with sclx fixed
  from x0 by ``polykin.math.derivatives.scalex``; we pass the fixed scale ``1 / sclx``
  (``FixedPointProblem.scale``) and ``tolerance = tolx``;
- first steps: polykin's ``wait`` direct-substitution iterations (at least 1) before the
  first accelerated one are our ``direct_steps``;
- slope guard: polykin takes s = 0 where |x_k - x_{k-1}| <= machine epsilon (absolute);
  we pass ``step_guard = eps``;
- both evaluate g once per iteration starting at x0, count an iteration per evaluation,
  update x + (1 - q)(g(x) - x), and return the last evaluated iterate (maxiter ->
  max_iterations);
- polykin stops on the residual, keeps its q bounds fixed and takes every variable's q
  from its own slope: we set ``stop_on="residual"``, ``adaptive_bounds=False`` and
  ``dominant_slope=False`` (our defaults since issue 7 stop on the estimated error, let
  a run widen its bounds, and give coupled variables their tear's dominant slope).
With that, the iterates must be bit-for-bit identical, not merely close.
"""

from __future__ import annotations

import numpy as np
import pytest
from polykin.math import fixpoint_wegstein
from polykin.math.derivatives import scalex

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
from tests.convergence.problems import coupled_pair, reactor_loop, wide_map

EPS = float(np.finfo(float).eps)


def _recording(g):
    """g plus the list of points it was evaluated at (copies)."""
    points: list[np.ndarray] = []

    def wrapped(x: np.ndarray) -> np.ndarray:
        points.append(np.array(x, copy=True))
        return g(x)

    return wrapped, points


def _both(g, x0, *, wait=1, qmin=-5.0, qmax=0.0, tolx=1e-6, maxiter=50):
    """Run polykin and ours with matched settings; return both results and evaluation points."""
    polykin_g, polykin_points = _recording(g)
    reference = fixpoint_wegstein(
        polykin_g, x0.copy(), wait=wait, qmin=qmin, qmax=qmax, tolx=tolx, maxiter=maxiter
    )
    our_g, our_points = _recording(g)
    problem = FixedPointProblem(
        g=our_g,
        x0=x0.copy(),
        tear_slices={"T1": slice(0, x0.size)},
        scale=1.0 / scalex(x0),
        step_guard=EPS,
    )
    settings = SolverSettings(
        direct_steps=wait,
        q_min=qmin,
        q_max=qmax,
        tolerance=tolx,
        max_iterations=maxiter,
        stop_on="residual",
        adaptive_bounds=False,
        dominant_slope=False,
        early_acceleration=False,  # polykin waits ``wait`` steps whatever they show
    )
    ours = solve_fixed_point(problem, "wegstein", settings)
    return reference, polykin_points, ours, our_points


def _assert_identical(reference, polykin_points, ours, our_points):
    assert ours.iterations == reference.niter
    assert ours.evaluations == reference.nfeval
    assert ours.converged == reference.success
    assert len(our_points) == len(polykin_points)
    for ours_x, reference_x in zip(our_points, polykin_points, strict=True):
        np.testing.assert_array_equal(ours_x, reference_x)
    np.testing.assert_array_equal(ours.x, reference.x)
    np.testing.assert_array_equal(ours.gx - ours.x, reference.f)


@pytest.mark.filterwarnings("ignore:divide by zero:RuntimeWarning")  # polykin's s = 1 case
@pytest.mark.parametrize(
    ("qmax", "expected_iterations"),
    # Iteration counts from CHECKS.md ("Fixed-point methods"), computed with polykin 0.8.
    [(0.0, 34), (0.9, 6)],
)
def test_cosine_matches_polykin(qmax, expected_iterations):
    # x = cos x from x0 = 1 at polykin's defaults (tolx 1e-6, wait 1, q_min -5).
    reference, polykin_points, ours, our_points = _both(np.cos, np.array([1.0]), qmax=qmax)
    _assert_identical(reference, polykin_points, ours, our_points)
    assert ours.iterations == expected_iterations
    # Fixed point from scipy.optimize.fixed_point(np.cos, [1.0], method='del2').
    assert abs(ours.x[0] - 0.7390851332151607) < 1e-5


@pytest.mark.parametrize(
    ("qmin", "expected_iterations"),
    # CHECKS.md: x = 0.9 x + 1: 17 iterations at defaults (ideal q = -9 clipped at -5),
    # exact in 3 with q_min = -10 (computed with polykin 0.8).
    [(-5.0, 17), (-10.0, 3)],
)
def test_affine_scalar_matches_polykin(qmin, expected_iterations):
    reference, polykin_points, ours, our_points = _both(
        lambda x: 0.9 * x + 1.0, np.array([1.0]), qmin=qmin
    )
    _assert_identical(reference, polykin_points, ours, our_points)
    assert ours.iterations == expected_iterations


VECTOR_PROBLEMS = {
    "reactor loop": (reactor_loop, np.array([5.0, 0.5, 0.5, 350.0])),
    "coupled pair": (coupled_pair, np.ones(4)),
    "wide map": wide_map(),
}
MATCHED_SETTINGS = [
    {"wait": 1, "qmin": -5.0, "qmax": 0.0},
    {"wait": 2, "qmin": -5.0, "qmax": 0.5},
    {"wait": 3, "qmin": -10.0, "qmax": 0.9},
    {"wait": 1, "qmin": 0.3, "qmax": 0.3},  # equal bounds: constant q
]


@pytest.mark.filterwarnings("ignore:divide by zero:RuntimeWarning")
@pytest.mark.parametrize("settings", MATCHED_SETTINGS, ids=lambda s: str(s))
@pytest.mark.parametrize("name", list(VECTOR_PROBLEMS))
def test_vector_problems_match_polykin(name, settings):
    g, x0 = VECTOR_PROBLEMS[name]
    reference, polykin_points, ours, our_points = _both(g, x0, tolx=1e-10, maxiter=100, **settings)
    _assert_identical(reference, polykin_points, ours, our_points)
