"""The default never fails where direct substitution converges (issue 14, item 2).

Random affine maps x = M x + b with spectral radius rho(M) < 1 (numpy's eigenvalues are
the outside check that direct substitution converges; numpy's linear solve gives the
fixed point). Per-variable Wegstein can amplify a coupled mode that direct substitution
damps: without the fallback (convergence/fallback.py) some of these maps diverge.
"""

from __future__ import annotations

import numpy as np
import pytest

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point

MAPS = 40


def _random_maps(seed: int):
    rng = np.random.default_rng(seed)
    for trial in range(MAPS):
        n = int(rng.integers(2, 12))
        matrix = rng.normal(size=(n, n))
        if trial % 3 == 0:
            matrix = np.abs(matrix)  # every variable raises every other (a Perron mode)
        radius = rng.uniform(0.3, 0.97)
        matrix *= radius / max(abs(np.linalg.eigvals(matrix)))
        b = rng.uniform(1.0, 10.0, n)
        tears = int(rng.integers(1, 4))
        cuts = np.linspace(0, n, tears + 1).astype(int)
        slices = {
            f"T{i}": slice(cuts[i], cuts[i + 1]) for i in range(tears) if cuts[i + 1] > cuts[i]
        }
        yield matrix, b, slices


def _problem(matrix, b, slices):
    return FixedPointProblem(lambda x: matrix @ x + b, np.ones(b.size), slices)


@pytest.mark.parametrize("seed", [2, 3])
def test_wherever_direct_substitution_converges_the_default_converges(seed):
    failures_without = 0
    for matrix, b, slices in _random_maps(seed):
        settings = {"max_iterations": 1000}
        direct = solve_fixed_point(
            _problem(matrix, b, slices), "direct", SolverSettings(**settings)
        )
        assert direct.converged  # rho(M) < 1 (numpy.linalg.eigvals)
        default = solve_fixed_point(
            _problem(matrix, b, slices), "wegstein", SolverSettings(**settings)
        )
        assert default.converged, default.message
        # numpy's solve of (I - M) x = b; rtol 1e-5: the stop is an estimated error of
        # 1e-8 per tear from the dominant slope, which coupled modes can understate.
        expected = np.linalg.solve(np.eye(b.size) - matrix, b)
        np.testing.assert_allclose(default.x, expected, rtol=1e-5)
        # dominant_mode off in the unguarded run: its two-mode step closes some of these
        # maps by itself; here the safeguard behind per-variable Wegstein is on trial.
        unguarded = solve_fixed_point(
            _problem(matrix, b, slices),
            "wegstein",
            SolverSettings(fallback=False, dominant_mode=False, **settings),
        )
        failures_without += not unguarded.converged
    # The safeguard is needed: without it some of these maps are not closed.
    assert failures_without > 0


def test_the_fallback_is_visible_and_switchable():
    # A coupled map (seed 2, a map whose unguarded default run diverges).
    for matrix, b, slices in _random_maps(2):
        unguarded = solve_fixed_point(
            _problem(matrix, b, slices),
            "wegstein",
            SolverSettings(fallback=False, dominant_mode=False, max_iterations=1000),
        )
        if unguarded.status == "diverging":
            break
    result = solve_fixed_point(
        _problem(matrix, b, slices),
        "wegstein",
        SolverSettings(dominant_mode=False, max_iterations=1000),
    )
    assert result.converged
    [event] = result.history.events_of("fallback")
    assert "direct substitution from the best point" in event.detail
    steps = [record.step for record in result.history.records]
    assert steps[event.iteration - 1] == "fallback"
    assert set(steps[event.iteration :]) <= {"direct", "none"}
    assert not unguarded.history.events_of("fallback")


def test_fallback_factor_is_checked():
    with pytest.raises(ValueError, match="fallback_factor"):
        SolverSettings(fallback_factor=1.0)
