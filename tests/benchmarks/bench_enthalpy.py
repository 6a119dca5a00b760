"""Benchmark: molar enthalpy of many streams in one vectorised call vs a per-stream loop.

1,000 streams x 20 components (mixed vapor and liquid, 150-1500 K). The loop calls the
same PropertyBasis one stream at a time, as a naive caller would; the ratio is what the
vectorised layout buys. Also reports the single-stream costs the flowsheet solve pays
(enthalpy flow and temperature from enthalpy).

Run from the project root: ``python -m tests.benchmarks.bench_enthalpy [--quick]``.
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis

COMPONENTS = (
    "hydrogen",
    "nitrogen",
    "oxygen",
    "argon",
    "ammonia",
    "methane",
    "water",
    "carbon monoxide",
    "carbon dioxide",
    "ethylene",
    "ethane",
    "methanol",
    "benzene",
    "toluene",
    "ethanol",
    "propane",
    "propylene",
    "n-butane",
    "acetone",
    "hydrogen sulfide",
)


def best_time(function, repeats: int) -> float:
    """Shortest wall time of several runs, s (least disturbed by other load)."""
    best = float("inf")
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        best = min(best, time.perf_counter() - start)
    return best


def main(quick: bool = False) -> dict:
    """Run the benchmark, print a summary and return the measurements.

    Parameters
    ----------
    quick
        Fewer repeats and T solves (for a smoke run).
    """
    basis = PropertyBasis([lookup_component(name) for name in COMPONENTS])
    n_streams = 1000
    rng = np.random.default_rng(2024)
    flows = rng.uniform(0.0, 5.0, size=(n_streams, len(basis)))
    T = rng.uniform(150.0, 1500.0, size=n_streams)
    liquid = rng.uniform(size=n_streams) < 0.3
    repeats = 3 if quick else 7

    def vectorised() -> np.ndarray:
        return basis.enthalpy_flow(flows, T, liquid) / flows.sum(axis=1)

    def per_stream_loop() -> np.ndarray:
        out = np.empty(n_streams)
        for i in range(n_streams):
            row = flows[i : i + 1]
            out[i] = basis.enthalpy_flow(row, T[i : i + 1], liquid[i : i + 1])[0] / row.sum()
        return out

    def per_stream_scalar_path() -> np.ndarray:
        out = np.empty(n_streams)
        for i in range(n_streams):
            out[i] = basis.stream_enthalpy_flow(flows[i], T[i], liquid[i]) / flows[i].sum()
        return out

    reference = vectorised()
    # atol: a few streams have molar enthalpies near zero, where both paths carry ~1e-10
    # J/mol of rounding (as in tests/model/properties/test_enthalpy.py's single-vs-vectorised check)
    np.testing.assert_allclose(per_stream_loop(), reference, rtol=1e-12, atol=1e-6)
    np.testing.assert_allclose(per_stream_scalar_path(), reference, rtol=1e-12, atol=1e-6)
    t_vector = best_time(vectorised, repeats)
    t_loop = best_time(per_stream_loop, repeats)
    t_scalar = best_time(per_stream_scalar_path, repeats)

    n_solves = 50 if quick else 300
    targets = basis.enthalpy_flow(flows[:n_solves], T[:n_solves], liquid[:n_solves])

    def solves() -> None:
        for i in range(n_solves):
            basis.temperature_from_enthalpy(flows[i], targets[i], bool(liquid[i]), 298.15)

    t_solves = best_time(solves, max(1, repeats // 2))
    results = {
        "streams": n_streams,
        "components": len(basis),
        "vectorised_s": t_vector,
        "loop_s": t_loop,
        "scalar_loop_s": t_scalar,
        "ratio_loop_over_vectorised": t_loop / t_vector,
        "ratio_scalar_loop_over_vectorised": t_scalar / t_vector,
        "single_stream_enthalpy_us": 1e6 * t_scalar / n_streams,
        "temperature_from_enthalpy_us": 1e6 * t_solves / n_solves,
    }
    print(f"molar enthalpy, {n_streams} streams x {len(basis)} components")
    print(f"  one vectorised call      {1e3 * t_vector:9.2f} ms")
    print(f"  loop of enthalpy_flow    {1e3 * t_loop:9.2f} ms   ratio {t_loop / t_vector:6.1f}")
    print(f"  loop of stream_enthalpy  {1e3 * t_scalar:9.2f} ms   ratio {t_scalar / t_vector:6.1f}")
    print(f"  single stream enthalpy   {results['single_stream_enthalpy_us']:9.1f} us")
    print(f"  temperature_from_enthalpy {results['temperature_from_enthalpy_us']:8.1f} us")
    return results


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repeats")
    main(parser.parse_args().quick)
