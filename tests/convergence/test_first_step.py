"""The first accelerated step: taken at iteration 2 when the first step showed one mode.

Outside references: Wegstein 1958 (CACM 1(6)): for an affine map x -> s x + c the step
x + (g(x) - x)/(1 - s), q = s/(s - 1), lands on the fixed point c/(1 - s); polykin 0.8
``fixpoint_wegstein`` (its bounds, q in [-5, 0]) and scipy's ``broyden1`` count the
passes the default is compared with (issue 14, item 4), run here, not recalled.
"""

from __future__ import annotations

import numpy as np
import pytest
from polykin.math import fixpoint_wegstein

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
from model.solve.tear_problem import build_tear_problem
from tests.benchmarks.bench_recycle_methods import METHOD_RUNNERS, TOLERANCE
from tests.benchmarks.recycle_variants import VARIANTS


def _line(slope: float) -> FixedPointProblem:
    return FixedPointProblem(
        g=lambda x: slope * x + 1.0, x0=np.array([1.0]), tear_slices={"S1": slice(0, 1)}
    )


@pytest.mark.parametrize("slope", [0.9, 0.99, 0.3, -0.96, -1.5, -3.0])
def test_a_one_variable_loop_is_exact_at_iteration_two(slope):
    # One variable is one mode: iteration 2 takes x + f/(1 - s) with s measured by the
    # first step, which for an affine map is the fixed point 1/(1 - s) (Wegstein 1958).
    result = solve_fixed_point(_line(slope), "wegstein", SolverSettings(tolerance=1e-12))
    assert result.converged and result.evaluations == 3
    assert result.x[0] == pytest.approx(1.0 / (1.0 - slope), rel=1e-12)
    assert result.history.records[1].step == "dominant mode"
    # polykin's Wegstein, the same update at its own bounds, needs as many (slope 0.3,
    # q = -0.43 within them) or more.
    outside = fixpoint_wegstein(lambda x: slope * x + 1.0, np.array([1.0]), tolx=1e-12)
    assert result.evaluations <= outside.nfeval


def test_switching_the_early_step_off_restores_two_direct_steps():
    result = solve_fixed_point(_line(0.9), "wegstein", SolverSettings(early_acceleration=False))
    assert [record.step for record in result.history.records[:3]] == [
        "direct",
        "direct",
        "accelerated",
    ]


def test_the_secant_goes_on_past_the_bounds_while_it_works():
    # g(x) = 0.95 x + 1 + 0.02 sin x: slope 0.95 + 0.02 cos x, near 0.97 at the fixed
    # point, q about -30, far below q_min = -5. After the first one-mode step the tear
    # keeps the secant step while its residual falls fivefold a pass; the fixed point
    # is checked against scipy's brentq on g(x) - x.
    from scipy.optimize import brentq

    def g(x):
        return 0.95 * x + 1.0 + 0.02 * np.sin(x)

    root = brentq(lambda x: g(x) - x, 0.0, 100.0, xtol=1e-14)
    problem = FixedPointProblem(g=g, x0=np.array([1.0]), tear_slices={"S": slice(0, 1)})
    result = solve_fixed_point(problem, "wegstein", SolverSettings(tolerance=1e-12))
    assert result.converged and result.x[0] == pytest.approx(root, rel=1e-10)
    steps = [record.step for record in result.history.records]
    assert steps[1] == "dominant mode" and steps.count("dominant mode") >= 2
    late = solve_fixed_point(
        problem, "wegstein", SolverSettings(tolerance=1e-12, early_acceleration=False)
    )
    assert late.converged and result.evaluations < late.evaluations


def _passes(label: str, sheet) -> tuple[int, bool]:
    passes, converged, _, _ = METHOD_RUNNERS[label](build_tear_problem(sheet).problem, 300)
    return passes, converged


@pytest.mark.parametrize(
    "variant",
    [
        "energy recycle, 10 % bypass",
        "ethylene, f = 0.65",
        "isomerisation 1/2, 1/2, 0.8",
        "fixed purge of 25 mol/s",
    ],
)
def test_no_more_passes_than_scipy_broyden1_where_the_first_steps_closed_the_gap(variant):
    # Before the early one-mode step the default took 7, 4 and 6 passes on the first
    # three, one more than scipy's broyden1 (tests/benchmarks/recycle_variants.py, all
    # to 1e-8); the fixed purge, whose coupled tear now keeps the leading-modes step
    # while its residual falls fivefold a pass, took 18 (broyden1: 25).
    build = VARIANTS[variant][0]
    with np.errstate(all="ignore"):
        default, converged = _passes("Wegstein", build())
        broyden1, outside_converged = _passes("scipy broyden1", build())
    assert converged and outside_converged
    assert TOLERANCE == 1e-8 and default <= broyden1


def _diverging_maps():
    # One variable, direct substitution diverging at the fixed point (slope above 1):
    # affine maps, whose fixed point is offset / (1 - s), and two curved ones.
    return {
        "slope 1.05": (lambda x: 1.05 * x - 0.5, 5.0),
        "slope 1.3": (lambda x: 1.3 * x - 3.0, 5.0),
        "slope 2": (lambda x: 2.0 * x - 10.0, 8.0),
        "quadratic, slope 1.2": (lambda x: 1.2 * x - 2.0 + 0.01 * (x - 10.0) ** 2, 8.0),
        "cubic, slope 1.2": (lambda x: 1.2 * x - 0.6 + 0.05 * (x - 3.0) ** 3, 3.5),
    }


@pytest.mark.parametrize("name", list(_diverging_maps()))
def test_a_one_variable_loop_whose_direct_substitution_diverges_takes_the_secant(name):
    # No q within the default bounds turns a slope above 1 back, so the one variable
    # takes the secant step x + f/(1 - s) from its first pair on (Wegstein 1958: exact
    # for an affine map). Checked against scipy's brentq for the fixed point and, for
    # the passes, against our own Broyden and scipy's broyden1 and anderson (polykin's
    # Wegstein, q at most 0, converges only the quadratic one, in 18: measured in a
    # scratch run when this rule came in), all stopped on the residual.
    from scipy.optimize import brentq, root

    g, x0 = _diverging_maps()[name]
    fixed = brentq(lambda x: g(x) - x, 0.0, 20.0, xtol=1e-14)  # one root there
    problem = FixedPointProblem(g=g, x0=np.array([x0]), tear_slices={"S": slice(0, 1)})
    settings = SolverSettings(tolerance=1e-8, stop_on="residual")
    result = solve_fixed_point(problem, "wegstein", settings)
    assert result.converged and result.x[0] == pytest.approx(fixed, rel=1e-7)
    assert result.history.records[1].step == "dominant mode"
    broyden = solve_fixed_point(problem, "broyden", settings)
    assert broyden.converged and result.evaluations <= broyden.evaluations
    for method in ("broyden1", "anderson"):
        calls = []

        def residual(y, calls=calls):
            calls.append(1)
            return g(y) - y

        answer = root(residual, np.array([x0]), method=method, options={"fatol": 1e-8 * fixed})
        assert answer.success and result.evaluations <= len(calls), method
