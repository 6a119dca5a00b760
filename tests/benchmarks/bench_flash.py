"""Benchmark: what a flash costs, and the passes the flash-drum examples take.

Flashes of the ammonia loop's drum feed (hydrogen, nitrogen, ammonia, argon at 263.15 K
and 151 bar; ideal method): an isothermal flash with the K-values cached (a drum at its
set T, as every pass after the first), one with fresh K-values (a new T each time), a
flash at a given enthalpy (duty-specified drum) and a bubble point, each against one
single-stream enthalpy flow, the unit of a block's cost. Then the examples that now
use a flash drum, solved at their saved settings, with the iterations and passes their
component-split versions took before (recorded from the previous example files: the
ammonia loop 6 iterations / 8 passes, the ethylene hydration 7 / 9).

Run from the project root: ``python -m tests.benchmarks.bench_flash [--quick]``.
"""

from __future__ import annotations

import argparse
from pathlib import Path

import numpy as np

from model.case.file import load_case
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.property_method import equilibrium_for
from tests.benchmarks.bench_enthalpy import best_time

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
BEFORE = {  # component-split separators, before the flash drums (iterations, passes)
    "ammonia_synthesis_loop": (6, 8),
    "ethylene_hydration_two_recycles": (7, 9),
}


def main(quick: bool = False) -> dict:
    count = 200 if quick else 2000
    repeats = 3 if quick else 5
    basis = PropertyBasis(
        [lookup_component(n) for n in ("hydrogen", "nitrogen", "ammonia", "argon")]
    )
    equilibrium = equilibrium_for(basis)
    flows = np.array([170.0, 57.0, 44.0, 20.0])
    P = 151.01325e5
    temperatures = 263.15 + np.linspace(0.0, 1.0, count)

    def enthalpies() -> None:
        for T in temperatures:
            basis.stream_enthalpy_flow(flows, float(T), False)

    def cached() -> None:
        for _ in range(count):
            equilibrium.flash_TP(flows, 263.15, P)

    def fresh() -> None:
        for T in temperatures:
            equilibrium.flash_TP(flows, float(T), P)

    target = equilibrium.enthalpy_flow(equilibrium.flash_TP(flows, 263.15, P))
    few = max(1, count // 20)

    def at_enthalpy() -> None:
        for k in range(few):
            equilibrium.flash_PH(flows, P, target * (1.0 + 1e-4 * k), 270.0)

    def bubble() -> None:
        for k in range(few):
            equilibrium.bubble_point(flows * (1.0 + 1e-4 * k), P, 200.0)

    unit = best_time(enthalpies, repeats) / count
    results: dict = {
        "enthalpy_flow_us": 1e6 * unit,
        "flash_TP_cached_us": 1e6 * best_time(cached, repeats) / count,
        "flash_TP_fresh_us": 1e6 * best_time(fresh, repeats) / count,
        "flash_PH_us": 1e6 * best_time(at_enthalpy, repeats) / few,
        "bubble_point_us": 1e6 * best_time(bubble, repeats) / few,
    }
    print("flash of the ammonia drum feed (4 components, ideal method)")
    for key in ("flash_TP_cached_us", "flash_TP_fresh_us", "flash_PH_us", "bubble_point_us"):
        ratio = results[key] / results["enthalpy_flow_us"]
        print(f"  {key:22s} {results[key]:9.1f} us   {ratio:7.1f} x one enthalpy flow")
    for stem, (iterations, passes) in BEFORE.items():
        solution = load_case(EXAMPLES / f"{stem}.loop.json").solve()
        now = (solution.convergence.iterations, solution.passes)
        results[stem] = {"before": [iterations, passes], "after": list(now)}
        print(
            f"  {stem}: {iterations} iterations / {passes} passes with a typed split, "
            f"{now[0]} / {now[1]} with the flash drum ({solution.status})"
        )
    return results


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true")
    main(parser.parse_args().quick)
