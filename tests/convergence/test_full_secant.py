"""The full secant model: a coupled tear whose steps span its moving variables.

Outside references: numpy.linalg.solve for the fixed point of an affine map (x = J x +
c, so (I - J) x = c); scipy's ``broyden1`` and ``anderson`` and polykin 0.8's
``fixpoint_wegstein`` (through tests/benchmarks/bench_recycle_methods.py's runners and
its 1e-8 stopping rule) for the passes the default is compared with (issue 14, item
4), run here, not recalled. The reversible isomerisation's two eigenvalues, r and
r (1 - a)(1 - b), are derived in tests/benchmarks/recycle_cases.py.
"""

from __future__ import annotations

import numpy as np
import pytest

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point
from model.solve.tear_problem import build_tear_problem
from tests.benchmarks.bench_recycle_methods import COMPARED, METHOD_RUNNERS, build_case
from tests.benchmarks.recycle_variants import _isomerisation


def _affine(eigenvalues: list[float]) -> tuple[np.ndarray, np.ndarray]:
    """A map x -> J x + c whose J has the given eigenvalues along mixed directions."""
    size = len(eigenvalues)
    rng = np.random.default_rng(7)
    modes = np.eye(size) + 0.6 * rng.standard_normal((size, size))
    jacobian = modes @ np.diag(eigenvalues) @ np.linalg.inv(modes)
    return jacobian, np.linspace(1.0, 2.0, size)


def _best_compared(problem_of) -> int:
    """Fewest passes among the compared outside methods that converged."""
    passes = []
    with np.errstate(all="ignore"):
        for label in COMPARED:
            count, converged, _, _ = METHOD_RUNNERS[label](problem_of(), 300)
            if converged:
                passes.append(count)
    assert passes
    return min(passes)


@pytest.mark.parametrize(
    "eigenvalues",
    [
        [0.9, 0.1],  # the coupled isomerisation's spectrum (issue 14, item 4)
        [1.2, 0.5],  # one mode grows: direct substitution diverges
        [0.95, 0.6, 0.2],
    ],
)
def test_an_affine_coupled_map_is_solved_exactly_in_no_more_passes_than_outside_methods(
    eigenvalues,
):
    jacobian, constant = _affine(eigenvalues)
    fixed_point = np.linalg.solve(np.eye(len(constant)) - jacobian, constant)
    size = len(constant)

    def problem():
        return FixedPointProblem(
            g=lambda x: jacobian @ x + constant,
            x0=fixed_point * 1.3 + 0.5,
            tear_slices={"S": slice(0, size)},
        )

    result = solve_fixed_point(problem(), "wegstein", SolverSettings(tolerance=1e-8))
    assert result.converged
    np.testing.assert_allclose(result.x, fixed_point, rtol=1e-9)
    assert any(record.step == "dominant mode" for record in result.history.records)
    assert result.evaluations <= _best_compared(problem)
    # the step is switched off with the dominant-mode step; Wegstein alone needs more
    plain = solve_fixed_point(
        problem(), "wegstein", SolverSettings(tolerance=1e-8, dominant_mode=False)
    )
    assert plain.evaluations > result.evaluations


@pytest.mark.parametrize(
    ("forward", "backward", "recycle_ratio"),
    [
        (2.0 / 3.0, 2.0 / 3.0, 0.9),  # modes 0.9 and 0.1
        (0.5, 0.5, 0.9),  # 7 passes against 5 before the full secant model
        (0.3, 0.6, 0.9),  # 7 against 5
        (0.6, 0.3, 0.95),  # 10 against 5
        (0.7, 0.2, 0.99),  # 10 against 5
        (0.7, 0.7, 0.99),  # 6 against 5 (also with a span limit on checked models)
    ],
)
def test_reversible_isomerisations_need_no_more_passes_than_the_best_compared_method(
    forward, backward, recycle_ratio
):
    def problem():
        return build_tear_problem(_isomerisation(forward, backward, recycle_ratio)).problem

    count, converged, _, _ = METHOD_RUNNERS["Wegstein"](problem(), 300)
    assert converged and count <= _best_compared(problem)


def test_a_decoupled_tear_off_its_nonlinear_start_keeps_wegsteins_step():
    # The inert-and-purge loop: each flow follows a slope of its own once off its
    # zero-flow start. A model from the older pairs missed the latest g change where
    # Wegstein's slopes did not, so no dominant-mode step is taken (taking it cost 5
    # passes: 11 instead of 6).
    problem = build_tear_problem(build_case("inert and purge")).problem
    result = solve_fixed_point(problem, "wegstein", SolverSettings())
    assert result.converged
    assert not any(record.step == "dominant mode" for record in result.history.records)
    assert result.evaluations <= _best_compared(
        lambda: build_tear_problem(build_case("inert and purge")).problem
    )
