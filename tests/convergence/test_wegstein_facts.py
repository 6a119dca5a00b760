"""Facts of the bounded Wegstein method (J. H. Wegstein, "Accelerating convergence of
iterative processes", Communications of the ACM 1(6), 1958), and the settings that shape
its steps: direct steps, acceleration interval, equal bounds, held q."""

from __future__ import annotations

import numpy as np
import pytest

from convergence import METHODS, FixedPointProblem, SolverSettings, solve_fixed_point
from tests.convergence.problems import coupled_pair, coupled_problem, reactor_problem

# Slopes of g; those above 1 and below -1 make direct substitution diverge.
SLOPES = [0.5, 0.9, 0.98, 2.0, 3.0, -0.5, -0.7, -3.0]


def _affine(slopes, offsets):
    slopes, offsets = np.asarray(slopes, float), np.asarray(offsets, float)

    def g(x: np.ndarray) -> np.ndarray:
        return slopes * x + offsets

    return g, offsets / (1.0 - slopes)


def _recorded_run(problem, method, settings):
    points: list[np.ndarray] = []
    g = problem.g

    def recording(x: np.ndarray) -> np.ndarray:
        points.append(np.array(x, copy=True))
        return g(x)

    problem.g = recording
    return solve_fixed_point(problem, method, settings), points


@pytest.mark.parametrize("slope", SLOPES)
def test_first_accelerated_step_is_exact_on_affine_map(slope):
    # Wegstein 1958: with q = s/(s - 1) the step q x + (1 - q) g(x) lands on the fixed
    # point of an affine map; the bounds [-60, 60] admit every q of SLOPES.
    g, fixed_point = _affine([slope], [3.0])
    problem = FixedPointProblem(g=g, x0=np.array([1.0]), tear_slices={"S1": slice(0, 1)})
    settings = SolverSettings(q_min=-60.0, q_max=60.0, direct_steps=1, tolerance=1e-12)
    result, points = _recorded_run(problem, "wegstein", settings)
    np.testing.assert_allclose(points[2], fixed_point, rtol=1e-12)
    assert result.converged and result.iterations == 3 and result.evaluations == 3
    assert result.history.records[1].q["S1"].median == pytest.approx(slope / (slope - 1.0))


def test_first_accelerated_step_is_exact_per_variable():
    # Wegstein per variable: a diagonal affine map with all SLOPES at once.
    g, fixed_point = _affine(SLOPES, np.arange(1.0, len(SLOPES) + 1.0))
    problem = FixedPointProblem(
        g=g, x0=np.full(len(SLOPES), 0.5), tear_slices={"S1": slice(0, len(SLOPES))}
    )
    settings = SolverSettings(
        q_min=-60.0, q_max=60.0, direct_steps=2, early_acceleration=False, tolerance=1e-12
    )
    result, points = _recorded_run(problem, "wegstein", settings)
    np.testing.assert_allclose(points[3], fixed_point, rtol=1e-12)
    assert result.converged and result.iterations == 4


@pytest.mark.parametrize("slope", [2.0, 3.0, -3.0])
def test_direct_substitution_diverges_where_wegstein_is_exact(slope):
    g, _ = _affine([slope], [3.0])
    problem = FixedPointProblem(g=g, x0=np.array([1.0]), tear_slices={"S1": slice(0, 1)})
    result = solve_fixed_point(problem, "direct", SolverSettings())
    assert not result.converged
    assert result.status == "diverging"


def test_clipped_q_gives_the_linear_rate_of_the_bound():
    # Wegstein 1958: on an affine map with slope s the error after a step with q is
    # multiplied by q + (1 - q) s; with s = 0.9 and q clipped at q_min = -5: 0.4.
    g, fixed_point = _affine([0.9], [1.0])
    problem = FixedPointProblem(g=g, x0=np.array([1.0]), tear_slices={"S1": slice(0, 1)})
    settings = SolverSettings(direct_steps=1, adaptive_bounds=False)  # q stays clipped
    result, points = _recorded_run(problem, "wegstein", settings)
    errors = np.array([point[0] for point in points]) - fixed_point[0]
    np.testing.assert_allclose(errors[2:6] / errors[1:5], 0.4, rtol=1e-9)
    assert result.history.records[1].q["S1"].clipped_low == 1


@pytest.mark.parametrize("make_problem", [reactor_problem, coupled_problem])
def test_zero_bounds_reproduce_direct_substitution(make_problem):
    # Wegstein 1958: q = 0 is direct substitution. Our update x + (1 - q)(g - x) with
    # q = 0 equals g exactly when g and x are within a factor of two (Sterbenz), which
    # holds on these problems, so the iterates are identical, not just close.
    settings = {"tolerance": 1e-12, "max_iterations": 500}
    direct, direct_points = _recorded_run(make_problem(), "direct", SolverSettings(**settings))
    zero, zero_points = _recorded_run(
        make_problem(), "wegstein", SolverSettings(q_min=0.0, q_max=0.0, **settings)
    )
    assert direct.converged and zero.iterations == direct.iterations
    for direct_x, zero_x in zip(direct_points, zero_points, strict=True):
        np.testing.assert_array_equal(zero_x, direct_x)


def test_equal_bounds_are_the_constant_q_method():
    # Wegstein 1958: with q fixed at c, x_{k+1} = c x_k + (1 - c) g(x_k) (relaxation).
    problem = FixedPointProblem(g=np.cos, x0=np.array([1.0]), tear_slices={"x": slice(0, 1)})
    settings = SolverSettings(q_min=0.4, q_max=0.4, direct_steps=1, tolerance=1e-12)
    result, points = _recorded_run(problem, "wegstein", settings)
    expected = [1.0, np.cos(1.0)]  # one direct-substitution step first
    while len(expected) < len(points):
        expected.append(0.4 * expected[-1] + 0.6 * np.cos(expected[-1]))
    # The two algebraically equal update forms differ by rounding only.
    np.testing.assert_allclose([point[0] for point in points], expected, rtol=1e-14)
    assert result.converged


@pytest.mark.parametrize("method", list(METHODS))
def test_tighter_tolerance_gives_smaller_final_residual(method):
    # scipy.optimize habit (STYLE.md): a tighter tolerance gives a smaller residual.
    finals, iterations = [], []
    for tolerance in (1e-4, 1e-7, 1e-10, 1e-13):
        settings = SolverSettings(tolerance=tolerance, max_iterations=1000)
        result = solve_fixed_point(coupled_problem(), method, settings)
        assert result.converged, result.message
        assert result.largest_residual <= tolerance
        finals.append(result.largest_residual)
        iterations.append(result.iterations)
    assert np.all(np.diff(finals) < 0.0)
    assert np.all(np.diff(iterations) >= 0)


def test_acceleration_interval_alternates_steps():
    settings = SolverSettings(
        direct_steps=2,
        acceleration_interval=3,
        tolerance=1e-14,
        max_iterations=12,
        early_acceleration=False,
    )
    result = solve_fixed_point(reactor_problem(), "wegstein", settings)
    kinds = [record.step for record in result.history.records]
    assert kinds[:11] == ["direct", "direct"] + ["accelerated", "direct", "direct"] * 3
    assert kinds[11] == "none"  # the last iteration (the limit) takes no step
    q_medians = result.history.q_median("S5")
    assert np.isnan(q_medians[[0, 1, 3, 4, 6, 7]]).all()
    assert np.isfinite(q_medians[[2, 5, 8]]).all()


def _q_estimate(x_before, x_after, g_before, g_after, q_min, q_max):
    slope = (g_after - g_before) / (x_after - x_before)
    return np.clip(slope / (slope - 1.0), q_min, q_max)


def test_held_q_is_estimated_from_the_direct_steps_then_held():
    # Fixed bounds: the held q is clipped to [-5, 0] throughout.
    settings = SolverSettings(q_mode="held", direct_steps=3, tolerance=1e-12, adaptive_bounds=False)
    result, points = _recorded_run(coupled_problem(), "wegstein", settings)
    assert result.converged
    g_values = [coupled_pair(point) for point in points]
    # Iterations 1-3 are direct substitution; the 4th takes q from the secant between
    # the 3rd and 4th evaluation points and holds it.
    held_q = _q_estimate(points[2], points[3], g_values[2], g_values[3], -5.0, 0.0)
    accelerated = [record for record in result.history.records if record.step == "accelerated"]
    assert len(accelerated) == result.iterations - 4
    for record in accelerated:
        for tear, part in {"S3": slice(0, 2), "S9": slice(2, 4)}.items():
            stats = record.q[tear]
            assert (stats.minimum, stats.maximum) == pytest.approx(
                (held_q[part].min(), held_q[part].max()), rel=1e-12
            )
    for k in range(3, len(points) - 1):
        step = points[k] + (1.0 - held_q) * (g_values[k] - points[k])
        np.testing.assert_allclose(points[k + 1], step, rtol=1e-14)
    # In bounded mode q follows the latest slope instead.
    bounded = solve_fixed_point(coupled_problem(), "wegstein", SolverSettings(direct_steps=3))
    medians = bounded.history.q_median("S3")
    assert np.ptp(medians[np.isfinite(medians)]) > 0.5


def test_held_q_on_affine_map_is_exact():
    g, fixed_point = _affine([0.5, -0.7, 0.9], [1.0, 2.0, 3.0])
    problem = FixedPointProblem(g=g, x0=np.ones(3), tear_slices={"S1": slice(0, 3)})
    settings = SolverSettings(
        q_mode="held", direct_steps=2, q_min=-10.0, q_max=1.0, early_acceleration=False
    )
    result = solve_fixed_point(problem, "wegstein", settings)
    assert result.converged and result.iterations == 4
    np.testing.assert_allclose(result.x, fixed_point, rtol=1e-12)


def test_early_acceleration_after_one_direct_step_that_contracts():
    # x = 0.3 x + 1 from 0: the first direct step cuts the scaled residual from 1/floor
    # to 0.3 (ratio far below 0.5), so iteration 2 is accelerated, and for an
    # affine map that step is exact (Wegstein 1958): 3 iterations instead of 4.
    g, fixed_point = _affine([0.3], [1.0])
    problem = FixedPointProblem(g=g, x0=np.array([0.0]), tear_slices={"S1": slice(0, 1)})
    early = solve_fixed_point(problem, "wegstein", SolverSettings(tolerance=1e-12))
    # (One variable is one mode: the step taken is the one-mode step, which for one
    # variable is Wegstein's own x + f/(1 - s), not clipped to the bounds.)
    assert [r.step for r in early.history.records] == ["direct", "dominant mode", "none"]
    np.testing.assert_allclose(early.x, fixed_point, rtol=1e-12)
    late = solve_fixed_point(
        problem, "wegstein", SolverSettings(tolerance=1e-12, early_acceleration=False)
    )
    assert late.iterations == early.iterations + 1
    # Slopes 0.8 and 0.3 from (20, 2) (fixed point (5, 1/0.7)): the largest scaled
    # residual goes from 0.35 to 0.247, a ratio of 0.71, and the second residual is not
    # parallel to the first (cosine 0.905 in the scaled variables: two modes seen), so
    # both direct steps are taken.
    slow = FixedPointProblem(
        g=_affine([0.8, 0.3], [1.0, 1.0])[0],
        x0=np.array([20.0, 2.0]),
        tear_slices={"S1": slice(0, 2)},
    )
    steps = [r.step for r in solve_fixed_point(slow, "wegstein").history.records]
    assert steps[:3] == ["direct", "direct", "accelerated"]
