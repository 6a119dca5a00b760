"""Overhead of one bounded-Wegstein iteration relative to one evaluation of a cheap g.

The map is affine and elementwise, g(x) = c + s * x, with per-variable slopes in
(-0.8, 0.95): about the cheapest flowsheet pass there can be, so the ratio printed is
an upper bound of the solver's share of a real solve. The solver's work per iteration
must stay O(n) numpy work: the per-variable cost shown for 2,000 and 20,000 variables
should be about the same (a fixed per-iteration Python cost dominates at small n).

Run from the project root:  python -m tests.benchmarks.bench_wegstein_overhead [--quick]
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from convergence import FixedPointProblem, SolverSettings, solve_fixed_point


def _affine_map(size: int, seed: int = 3):
    generator = np.random.default_rng(seed)
    slopes = generator.uniform(-0.8, 0.95, size)
    offsets = generator.uniform(1.0, 5.0, size)

    def g(x: np.ndarray) -> np.ndarray:
        return offsets + slopes * x

    return g, generator.uniform(2.0, 4.0, size)


def _seconds_per_evaluation(g, x0: np.ndarray, repeats: int) -> float:
    best = np.inf
    for _ in range(5):
        start = time.perf_counter()
        for _ in range(repeats):
            g(x0)
        best = min(best, (time.perf_counter() - start) / repeats)
    return best


def _seconds_per_iteration(g, x0: np.ndarray, iterations: int, tears: int) -> float:
    """Time per iteration of a run that never converges (tolerance below rounding)."""
    bounds = np.linspace(0, x0.size, tears + 1).astype(int)
    problem = FixedPointProblem(
        g=g,
        x0=x0,
        tear_slices={f"S{k}": slice(bounds[k], bounds[k + 1]) for k in range(tears)},
    )
    settings = SolverSettings(tolerance=1e-300, max_iterations=iterations, q_min=-20.0)
    best = np.inf
    for _ in range(3):
        start = time.perf_counter()
        result = solve_fixed_point(problem, "wegstein", settings)
        best = min(best, (time.perf_counter() - start) / result.iterations)
    return best


def measure(size: int, iterations: int, tears: int = 4) -> dict[str, float]:
    """Seconds per g evaluation, per Wegstein iteration (g included) and their ratio."""
    g, x0 = _affine_map(size)
    evaluation = _seconds_per_evaluation(g, x0, repeats=max(iterations, 50))
    iteration = _seconds_per_iteration(g, x0, iterations, tears)
    overhead = iteration - evaluation
    return {
        "variables": size,
        "seconds_per_evaluation": evaluation,
        "seconds_per_iteration": iteration,
        "overhead_seconds": overhead,
        "overhead_ratio": overhead / evaluation,
        "overhead_nanoseconds_per_variable": 1e9 * overhead / size,
    }


def main(quick: bool = False) -> dict:
    """Measure at 2,000 and 20,000 variables; print and return the numbers."""
    iterations = 30 if quick else 150
    results = {size: measure(size, iterations) for size in (2_000, 20_000)}
    for size, numbers in results.items():
        print(
            f"{size:>6} variables: g {numbers['seconds_per_evaluation'] * 1e6:8.1f} µs, "
            f"Wegstein iteration {numbers['seconds_per_iteration'] * 1e6:8.1f} µs, "
            f"overhead {numbers['overhead_ratio']:6.1f} x g "
            f"({numbers['overhead_nanoseconds_per_variable']:.1f} ns per variable)"
        )
    growth = results[20_000]["overhead_seconds"] / results[2_000]["overhead_seconds"]
    print(f"overhead grows {growth:.1f} x for 10 x the variables (O(n) means at most ~10 x)")
    return {"sizes": results, "overhead_growth_for_10x": growth}


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer iterations")
    main(quick=parser.parse_args().quick)
