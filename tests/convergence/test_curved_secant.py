"""The curved secant: a one-variable tear's secant step through its last three points.

Outside references: numpy.polyfit (the quadratic x(f) through three points, evaluated
at f = 0, is inverse quadratic interpolation, the interpolation step of Brent 1973,
ch. 4); scipy's brentq for fixed points; polykin 0.8 ``fixpoint_wegstein`` and scipy's
``broyden1`` and ``anderson`` for the passes the default is compared with (issue 14,
item 4), run here, not recalled.
"""

from __future__ import annotations

import numpy as np
import pytest
from polykin.math import fixpoint_wegstein
from scipy.optimize import brentq

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
from convergence.modes import curved_secant
from model.solve.tear_problem import build_tear_problem
from tests.benchmarks.bench_recycle_methods import COMPARED, METHOD_RUNNERS, build_case


def _pairs(xs: list[float], fs: list[float]):
    """(f_k, latest pair, previous pair) of three points x_(k-2), x_(k-1), x_k."""
    gs = [x + f for x, f in zip(xs, fs, strict=True)]
    latest = (xs[2] - xs[1], gs[2] - gs[1])
    previous = (xs[1] - xs[0], gs[1] - gs[0])
    return fs[2], latest, previous


@pytest.mark.parametrize(
    ("xs", "fs"),
    [
        ([1.0, 2.5, 3.1], [0.9, 0.31, 0.08]),
        ([10.0, 9.0, 8.7], [-1.2, -0.25, -0.02]),
        ([0.0, 4.0, 3.5], [2.0, -0.7, 0.1]),
    ],
)
def test_the_curved_secant_is_the_inverse_quadratic_through_three_points(xs, fs):
    f, latest, previous = _pairs(xs, fs)
    expected = np.polyval(np.polyfit(fs, xs, 2), 0.0) - xs[2]
    assert curved_secant(f, latest, previous) == pytest.approx(expected, rel=1e-10)


def test_two_equal_residuals_give_no_curve():
    f, latest, previous = _pairs([1.0, 2.0, 3.0], [0.5, 0.5, 0.1])
    assert curved_secant(f, latest, previous) is None


def _gently_curved(x):
    # slope 0.7 + 0.1 x (x + 2)/(1 + x)^2: about 0.8 at the fixed point near 5.9
    return 0.7 * x + 0.1 * x**2 / (1.0 + x) + 1.0


def test_a_gently_curved_loop_needs_no_more_passes_than_outside_methods():
    # The secant alone took 7 passes here (measured when the curved secant came in),
    # as many as polykin's Wegstein; through three points, 6. Counted as the benchmark
    # counts: every call of g.
    root = brentq(lambda x: _gently_curved(x) - x, 1.0, 100.0, xtol=1e-14)
    problem = FixedPointProblem(
        g=_gently_curved, x0=np.array([1.0]), tear_slices={"S": slice(0, 1)}
    )
    result = solve_fixed_point(problem, "wegstein", SolverSettings(tolerance=1e-12))
    assert result.converged and result.x[0] == pytest.approx(root, rel=1e-11)
    calls = []

    def counted(x):
        calls.append(1)
        return _gently_curved(x)

    outside = fixpoint_wegstein(counted, np.array([1.0]), tolx=1e-12)
    assert outside.success and result.evaluations < len(calls)


@pytest.mark.parametrize(
    "case",
    [
        "energy recycle",
        "energy recycle, 10 % bypass",
        "energy recycle, 40 % bypass",
        # negative slopes keep the plain one-mode damping (through a zero-flow start's
        # points the curve took one pass more on each)
        "ethylene, f = 0.75",
        "direct substitution diverges, oscillating",
    ],
)
def test_one_variable_loops_need_no_more_passes_than_the_best_compared_method(case):
    # tests/benchmarks/bench_recycle_methods.py's runners and stopping rule (1e-8). The
    # default stops on the estimated error, the outside methods on the residual: on
    # the energy recycle the secant alone took 6 passes against polykin's 5.
    passes = {}
    with np.errstate(all="ignore"):
        for label in ["Wegstein", *COMPARED]:
            count, converged, _, _ = METHOD_RUNNERS[label](
                build_tear_problem(build_case(case)).problem, 300
            )
            if converged:
                passes[label] = count
    default = passes.pop("Wegstein")
    assert passes and default <= min(passes.values())
