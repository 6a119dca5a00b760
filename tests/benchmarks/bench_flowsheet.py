"""Flowsheet pass and solve cost on generated flowsheets (tests.benchmarks.flowsheet_generator).

Measures, in one run on this machine:

- the 100-block, 10-loop, 20-component flowsheet: time per pass (one sequential-modular
  pass at the converged tear values) and per whole solve (validation, compile,
  topology, iterations, final pass, balance), with the pass count;
- pass cost for 10 / 100 / 1000 blocks (one loop per 10 blocks, 20 components) and for
  5 / 20 / 50 components (100 blocks), with the fitted growth exponents
  ``t ~ blocks^b``, ``t ~ components^c`` and, over all points, ``t ~ (blocks x
  components)^e``. Linear growth in blocks gives b = 1; a per-block overhead that does
  not depend on the component count gives c < 1.

Run: ``python -m tests.benchmarks.bench_flowsheet [--quick]`` (quick: 10 / 100 / 300
blocks, fewer repeats).
"""

from __future__ import annotations

import argparse
import sys
import time

import numpy as np

from convergence import SolverSettings
from model.properties.enthalpy import PropertyBasis
from model.solve.compile import compile_flowsheet
from model.solve.driver import solve_flowsheet
from model.solve.passes import FlowsheetPass
from model.solve.topology import analyse_topology
from tests.benchmarks.flowsheet_generator import generate_flowsheet


def _prepare(blocks: int, loops: int, components: int, max_iterations: int = 200) -> dict:
    """Solve a generated flowsheet once (timed) and set up a pass at its last tear values.

    Each strongly connected part converges on its own, so a chain of loops in series
    costs the passes of its slowest loop (``passes``; ``block_evaluations`` the whole
    work); ``max_iterations`` is raised for the largest size so that every pass is
    timed at converged tears.
    """
    sheet = generate_flowsheet(blocks, loops, components)
    settings = SolverSettings()
    settings.update(max_iterations=max_iterations)
    start = time.perf_counter()
    solution = solve_flowsheet(sheet, settings=settings)
    solve_seconds = time.perf_counter() - start
    if solution.status not in ("solved", "not converged"):
        raise RuntimeError(f"generated flowsheet did not solve: {solution.message}")
    basis = PropertyBasis(sheet.components)
    compiled = compile_flowsheet(sheet, basis)
    topology = analyse_topology(
        list(sheet.blocks), [(s.name, s.source, s.target) for s in sheet.streams.values()]
    )
    runner = FlowsheetPass(compiled, topology.calculation_order, topology.tear_streams, basis)
    return {
        "blocks": blocks,
        "loops": loops,
        "components": components,
        "solve_s": solve_seconds,
        "passes": solution.passes,
        "block_evaluations": solution.block_evaluations,
        "solved": solution.converged,
        "run": runner.run,
        "tears": [solution.streams[name] for name in topology.tear_streams],
        "pass_s": np.inf,
    }


def _time_passes(rows: list[dict], repeats: int, rounds: int) -> None:
    """Best mean pass time per row, the rows timed in turn in every round so that other
    work on the machine slows all sizes alike."""
    for _ in range(rounds):
        for row in rows:
            count = max(1, repeats * 100 // row["blocks"])
            start = time.perf_counter()
            for _ in range(count):
                row["run"](row["tears"], strict=False)
            row["pass_s"] = min(row["pass_s"], (time.perf_counter() - start) / count)
    for row in rows:
        row["per_block_component_us"] = row["pass_s"] / (row["blocks"] * row["components"]) * 1e6
        del row["run"], row["tears"]


def _exponent(sizes: list[float], seconds: list[float]) -> float:
    """Least-squares slope of log(seconds) on log(size)."""
    return float(np.polyfit(np.log(sizes), np.log(seconds), 1)[0])


def main(quick: bool = False) -> dict:
    """Run the measurements, print them, and return them as a dict."""
    repeats, rounds = (3, 3) if quick else (10, 7)
    reference = _prepare(100, 10, 20)
    block_sizes = (10, 100, 300) if quick else (10, 100, 1000)
    by_blocks = [
        reference if b == 100 else _prepare(b, max(1, b // 10), 20, max(200, 3 * b // 10))
        for b in block_sizes
    ]
    by_components = [reference if c == 20 else _prepare(100, 10, c) for c in (5, 20, 50)]
    rows = by_blocks + [row for row in by_components if row is not reference]
    _time_passes(rows, repeats, rounds)
    print(
        f"100 blocks, 10 loops, 20 components: pass {reference['pass_s'] * 1e3:.2f} ms, "
        f"solve {reference['solve_s']:.3f} s in {reference['passes']} passes"
    )
    for row in by_blocks + by_components:
        print(
            f"  {row['blocks']:5d} blocks {row['loops']:4d} loops {row['components']:3d} "
            f"components: pass {row['pass_s'] * 1e3:9.2f} ms "
            f"({row['per_block_component_us']:.2f} us per block x component), "
            f"solve {row['solve_s']:.2f} s, {row['passes']} passes"
            + ("" if row["solved"] else " (iteration limit reached)")
        )
    points = {(r["blocks"], r["components"]): r["pass_s"] for r in by_blocks + by_components}
    result = {
        "reference": reference,
        "by_blocks": by_blocks,
        "by_components": by_components,
        "exponent_blocks": _exponent(
            [r["blocks"] for r in by_blocks], [r["pass_s"] for r in by_blocks]
        ),
        "exponent_components": _exponent(
            [r["components"] for r in by_components], [r["pass_s"] for r in by_components]
        ),
        "exponent_blocks_x_components": _exponent(
            [b * c for b, c in points], list(points.values())
        ),
        "pass_time_ratios_between_block_sizes": [
            by_blocks[k + 1]["pass_s"] / by_blocks[k]["pass_s"] for k in range(2)
        ],
    }
    print(
        f"growth exponents: blocks {result['exponent_blocks']:.2f}, components "
        f"{result['exponent_components']:.2f}, blocks x components "
        f"{result['exponent_blocks_x_components']:.2f}"
    )
    print(
        "pass time ratios between block sizes: "
        + ", ".join(f"{r:.1f}" for r in result["pass_time_ratios_between_block_sizes"])
    )
    return result


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="smaller sizes, fewer repeats")
    main(quick=parser.parse_args().quick)
    sys.exit(0)
