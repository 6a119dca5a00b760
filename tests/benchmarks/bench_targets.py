"""Targets and sweeps: outer iterations and passes with and without warm start, and a
sweep's throughput on one and two worker processes.

1. The target of the typed-split ammonia example (purge fraction for 8 mol % argon in
   the recycle gas): outer iterations, total flowsheet passes and block evaluations of
   every recycle solve, with each solve warm-started from the previous one's tears and
   without.
2. A sweep of the same example's conversion per pass (its target met at every point),
   serially with warm starts inside each run of neighbours, and the same points solved
   each from a cold start.
3. Sweep throughput (points per second) on 1 and 2 local worker processes, as the ratio
   2 workers / 1 worker in the same run (worker start-up included).

Run: ``python -m tests.benchmarks.bench_targets [--quick]``.
"""

from __future__ import annotations

import argparse
import json
import time
from pathlib import Path

from model.case.file import load_case
from model.solve.targets import solve_with_targets
from model.study.sweep_definition import SweepPlan, parse_record, parse_variation
from model.study.sweep_run import run_sweep

EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "ammonia_loop_fixed_split.loop.json"


def _target_figures(warm_start: bool) -> dict:
    case = load_case(EXAMPLE)
    solution = solve_with_targets(case.flowsheet, case.method, case.settings, warm_start=warm_start)
    outcome = solution.targets
    return {
        "status": solution.status,
        "outer_iterations": outcome.outer_iterations,
        "passes": outcome.passes,
        "block_evaluations": outcome.block_evaluations,
        "purge_fraction": outcome.results[0].adjusted,
    }


def _plan(points: int) -> SweepPlan:
    return SweepPlan(
        (parse_variation(f"Converter.reactions[1].conversion=0.15:0.35:{points}"),),
        (parse_record("Recycle gas.total_flow"),),
    )


def _sweep(points: int, workers: int, run_length: int) -> dict:
    text = EXAMPLE.read_text("utf-8")
    start = time.perf_counter()
    result = run_sweep(text, _plan(points), workers=workers, run_length=run_length)
    seconds = time.perf_counter() - start
    return {
        "points": len(result.points),
        "converged": len(result.points) - len(result.not_converged),
        "passes": sum(point.passes for point in result.points),
        "seconds": seconds,
        "points_per_second": len(result.points) / seconds,
    }


def main(quick: bool = False) -> dict:
    points = 8 if quick else 24
    warm, cold = _target_figures(True), _target_figures(False)
    serial = _sweep(points, 1, 5)
    cold_sweep = _sweep(points, 1, 1)  # runs of one point: each starts cold
    two = _sweep(points, 2, 5)
    figures = {
        "target with warm start": warm,
        "target without warm start": cold,
        "target passes ratio warm / cold": warm["passes"] / cold["passes"],
        "sweep points": points,
        "sweep passes warm (runs of 5) / cold": serial["passes"] / cold_sweep["passes"],
        "sweep 1 worker": serial,
        "sweep 2 workers": two,
        "throughput ratio 2 workers / 1 worker": two["points_per_second"]
        / serial["points_per_second"],
    }
    print(json.dumps(figures, indent=2))
    return figures


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true")
    main(parser.parse_args().quick)
