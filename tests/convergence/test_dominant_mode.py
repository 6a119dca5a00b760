"""The dominant-mode step (``dominant_mode``, :mod:`convergence.modes`) on coupled tears.

Checks against numpy's linear algebra: the fixed point of x = M x + b is
numpy.linalg.solve(I - M, b) and M's eigenvalues numpy.linalg.eigvals(M).
"""

from __future__ import annotations

import numpy as np
import pytest

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point

# The reversible isomerisation of tests/benchmarks/recycle_cases.py as an affine map:
# 0.9 [[1 - a + ab, b], [a (1 - b), 1 - b]] with a = b = 2/3, eigenvalues 0.9 and 0.1.
ISOMERS = 0.9 * np.array([[7.0 / 9.0, 6.0 / 9.0], [2.0 / 9.0, 3.0 / 9.0]])
FEED = np.array([9.0, 1.0])


def _affine(matrix: np.ndarray, b: np.ndarray, x0: np.ndarray) -> FixedPointProblem:
    return FixedPointProblem(
        g=lambda x: matrix @ x + b, x0=x0, tear_slices={"recycle": slice(0, b.size)}
    )


def test_the_isomer_map_has_the_eigenvalues_the_case_states():
    np.testing.assert_allclose(sorted(np.linalg.eigvals(ISOMERS)), [0.1, 0.9], rtol=1e-12)


def test_coupled_isomers_converge_faster_with_the_mode_step_and_show_it():
    problem = _affine(ISOMERS, FEED, np.array([0.0, 5.0]))
    expected = np.linalg.solve(np.eye(2) - ISOMERS, FEED)
    on = solve_fixed_point(problem, "wegstein", SolverSettings(tolerance=1e-10))
    off = solve_fixed_point(
        problem, "wegstein", SolverSettings(tolerance=1e-10, dominant_mode=False)
    )
    assert on.converged and off.converged
    np.testing.assert_allclose(on.x, expected, rtol=1e-8)
    steps = [record.step for record in on.history.records]
    assert "dominant mode" in steps
    assert "dominant mode" not in [record.step for record in off.history.records]
    assert on.evaluations < off.evaluations


def test_a_decoupled_tear_keeps_wegsteins_steps():
    # Each variable follows its own slope: Wegstein's per-variable q is exact there
    # (Wegstein 1958), so no mode step is taken and the run is the same as without it.
    matrix = np.diag([0.9, 0.5, 0.98])
    problem = _affine(matrix, np.array([1.0, 2.0, 3.0]), np.zeros(3))
    on = solve_fixed_point(problem, "wegstein", SolverSettings(tolerance=1e-10))
    off = solve_fixed_point(
        problem, "wegstein", SolverSettings(tolerance=1e-10, dominant_mode=False)
    )
    assert "dominant mode" not in [record.step for record in on.history.records]
    assert on.evaluations == off.evaluations
    np.testing.assert_allclose(on.x, off.x, rtol=1e-12)


@pytest.mark.parametrize(
    "changes",
    [
        {"adaptive_bounds": False},
        {"q_mode": "held"},
        {"q_min": -2.0, "q_max": -2.0},
        {"acceleration_interval": 2},
    ],
)
def test_the_users_deliberate_step_choices_take_no_mode_step(changes):
    problem = _affine(ISOMERS, FEED, np.array([0.0, 5.0]))
    result = solve_fixed_point(problem, "wegstein", SolverSettings(max_iterations=60, **changes))
    assert "dominant mode" not in [record.step for record in result.history.records]


def test_dominant_mode_is_a_saved_setting_checked_like_the_others():
    settings = SolverSettings()
    assert settings.dominant_mode is True
    settings.update(dominant_mode=False)
    assert SolverSettings.from_dict(settings.to_dict()).dominant_mode is False
    with pytest.raises(ValueError, match="dominant_mode"):
        SolverSettings(dominant_mode="no")


def _recorded(g, x0, tears):
    points: list[np.ndarray] = []

    def recording(x: np.ndarray) -> np.ndarray:
        points.append(np.array(x, copy=True))
        return g(x)

    problem = FixedPointProblem(g=recording, x0=x0, tear_slices=tears)
    return solve_fixed_point(problem, "wegstein", SolverSettings(tolerance=1e-10)), points


def test_a_mode_steps_recorded_q_is_the_q_of_the_step_it_took():
    # The recycle monitor plots record.q: at a dominant-mode step it must describe the
    # step taken, x_(k+1) = x_k + (1 - q) (g(x_k) - x_k), not the Wegstein q the step
    # replaced. One variable, g(x) = 0.95 x + 1 + 0.02 sin x (slope near 0.97, the
    # secant's q about -30, beyond q_min = -5): q is exactly that of the step.
    def g(x):
        return 0.95 * x + 1.0 + 0.02 * np.sin(x)

    result, points = _recorded(g, np.array([1.0]), {"S": slice(0, 1)})
    checked = 0
    for record in result.history.records:
        if record.step != "dominant mode" or record.iteration >= len(points):
            continue
        x, x_next = points[record.iteration - 1], points[record.iteration]
        q = 1.0 - (x_next - x) / (g(x) - x)
        stats = record.q["S"]
        assert stats.minimum == stats.median == stats.maximum
        assert stats.median == pytest.approx(q[0], rel=1e-9)
        assert stats.clipped_low == stats.clipped_high == 0
        checked += 1
    assert checked >= 2
    assert min(record.q["S"].median for record in result.history.records[1:-1]) < -5.0


def test_a_coupled_mode_step_records_no_q():
    # The coupled isomer map (numpy: M x + b): no one q describes a step on its leading
    # modes, so the record has none there (the monitor leaves a gap, not a step not
    # taken), while its Wegstein steps keep theirs.
    result, _ = _recorded(
        lambda x: ISOMERS @ x + FEED, np.array([0.0, 5.0]), {"recycle": slice(0, 2)}
    )
    modes = [record for record in result.history.records if record.step == "dominant mode"]
    wegstein = [record for record in result.history.records if record.step == "accelerated"]
    assert modes and wegstein
    assert all(record.q["recycle"] is None for record in modes)
    assert all(record.q["recycle"] is not None for record in wegstein)
