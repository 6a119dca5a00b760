"""How pass and solve cost grow with flowsheet size: blocks x components.

Flowsheets from :func:`tests.benchmarks.flowsheet_generator.generate_flowsheet`: one
recycle loop per 10 blocks, in series, each with a reactor, heaters and a splitter.
For every size of the grid (full: 10 / 100 / 1,000 blocks x 5 / 20 / 50 components;
quick: 10 / 100 blocks x 5 / 20 components) it measures

- the time of one flowsheet pass at the converged tears (best mean over rounds, the
  sizes timed in turn so that other work on the machine slows them alike);
- the time of one whole solve at the default settings (validation, compile, topology,
  the tear iterations, final pass, balances), and its pass count;

and fits the growth exponents t ~ blocks^b x components^c (least squares on the logs),
for the pass and for the solve. A pass linear in blocks gives b = 1; a per-block cost
that hardly depends on the component count gives c well below 1. The solve converges
the loops in series part by part, so its passes are those of the slowest loop and its
block evaluations grow like the blocks.

Run: ``python -m tests.benchmarks.bench_scaling [--quick]``.
"""

from __future__ import annotations

import argparse
import time

import numpy as np

from convergence import SolverSettings
from model.properties.enthalpy import PropertyBasis
from model.solve.compile import compile_flowsheet
from model.solve.driver import solve_flowsheet
from model.solve.passes import FlowsheetPass
from model.solve.topology import analyse_topology
from tests.benchmarks.flowsheet_generator import generate_flowsheet

BLOCKS_PER_LOOP = 10


def _measure_solve(blocks: int, components: int, repeats: int) -> dict:
    """Solve once per repeat (best time kept); set up a pass at the converged tears."""
    loops = max(1, blocks // BLOCKS_PER_LOOP)
    sheet = generate_flowsheet(blocks, loops, components)
    settings = SolverSettings(max_iterations=max(200, 3 * loops))
    best, solution = np.inf, None
    for _ in range(repeats):
        start = time.perf_counter()
        solution = solve_flowsheet(sheet, settings=settings)
        best = min(best, time.perf_counter() - start)
    if not solution.converged:
        raise RuntimeError(f"{blocks} blocks x {components} components: {solution.message}")
    basis = PropertyBasis(sheet.components)
    compiled = compile_flowsheet(sheet, basis)
    topology = analyse_topology(
        list(sheet.blocks), [(s.name, s.source, s.target) for s in sheet.streams.values()]
    )
    runner = FlowsheetPass(compiled, topology.calculation_order, topology.tear_streams, basis)
    return {
        "blocks": blocks,
        "components": components,
        "loops": loops,
        "solve_s": best,
        "passes": solution.passes,
        "block_evaluations": solution.block_evaluations,
        "run": runner.run,
        "tears": [solution.streams[name] for name in topology.tear_streams],
        "pass_s": np.inf,
    }


def _time_passes(rows: list[dict], rounds: int, budget_s: float) -> None:
    """Best mean pass time per row; each round gives every row about ``budget_s``."""
    for _ in range(rounds):
        for row in rows:
            count = (
                max(1, int(budget_s / max(row["pass_s"], 1e-5)))
                if np.isfinite(row["pass_s"])
                else 3
            )
            start = time.perf_counter()
            for _ in range(count):
                row["run"](row["tears"], strict=False)
            row["pass_s"] = min(row["pass_s"], (time.perf_counter() - start) / count)
    for row in rows:
        del row["run"], row["tears"]


def fit_exponents(rows: list[dict], key: str) -> dict[str, float]:
    """Least-squares b, c of log t = a + b log(blocks) + c log(components)."""
    design = np.column_stack(
        [
            np.ones(len(rows)),
            np.log([row["blocks"] for row in rows]),
            np.log([row["components"] for row in rows]),
        ]
    )
    coefficients, *_ = np.linalg.lstsq(design, np.log([row[key] for row in rows]), rcond=None)
    return {"blocks": float(coefficients[1]), "components": float(coefficients[2])}


def markdown_table(rows: list[dict]) -> str:
    """The grid as a markdown table."""
    lines = [
        "| blocks | loops | components | pass (ms) | solve (s) | passes per solve "
        "| block evaluations |",
        "|---:|---:|---:|---:|---:|---:|---:|",
    ]
    for row in rows:
        lines.append(
            f"| {row['blocks']} | {row['loops']} | {row['components']} | "
            f"{row['pass_s'] * 1e3:.3g} | {row['solve_s']:.3g} | {row['passes']} | "
            f"{row['block_evaluations']} |"
        )
    return "\n".join(lines)


def main(quick: bool = False) -> dict:
    """Measure the grid, print the table and the exponents, return the figures."""
    block_sizes = (10, 100) if quick else (10, 100, 1000)
    component_counts = (5, 20) if quick else (5, 20, 50)
    rows = [
        _measure_solve(blocks, components, repeats=1 if quick or blocks >= 1000 else 2)
        for blocks in block_sizes
        for components in component_counts
    ]
    _time_passes(rows, rounds=2 if quick else 5, budget_s=0.05 if quick else 0.2)
    exponents = {"pass": fit_exponents(rows, "pass_s"), "solve": fit_exponents(rows, "solve_s")}
    print(markdown_table(rows))
    for what, fitted in exponents.items():
        print(f"{what}: t ~ blocks^{fitted['blocks']:.2f} x components^{fitted['components']:.2f}")
    return {"rows": rows, "exponents": exponents}


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="smaller grid, fewer rounds")
    main(quick=parser.parse_args().quick)
