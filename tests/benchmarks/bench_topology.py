"""Benchmark of model.solve.topology.analyse_topology on generated flowsheets.

Flowsheets of 10, 100 and 1,000 blocks: a chain feed -> units -> product cut into
segments of ten blocks, each segment with one recycle loop; every third segment adds a
loop nested inside its recycle, and every fourth segment's recycle reaches back into
the previous segment, interlocking the two. Each size is timed on the exact path
(scipy milp set cover) and on the heuristic path (forced with max_cycles=0).

Run: ``python -m tests.benchmarks.bench_topology [--quick]``.
"""

from __future__ import annotations

import argparse
import time
from itertools import pairwise

from model.solve.topology import analyse_topology

SEGMENT = 10
TEAR_VARIABLES = 20 + 2  # 20 components + temperature + pressure


def generate_flowsheet(block_count: int) -> tuple[list[str], list[tuple[str, str, str]], int]:
    """Blocks, streams and loop count of a chain with about one loop per ten blocks."""
    units = [f"U{index}" for index in range(block_count - 2)]
    blocks = ["feed", *units, "product"]
    streams = [(f"S{index}", a, b) for index, (a, b) in enumerate(pairwise(blocks))]
    loops = 0
    for segment, start in enumerate(range(0, len(units) - SEGMENT + 1, SEGMENT)):
        reach = start - SEGMENT // 2 if segment % 4 == 3 else start + 1
        streams.append((f"recycle{segment}", units[start + 8], units[reach]))
        loops += 1
        if segment % 3 == 2:
            streams.append((f"inner{segment}", units[start + 6], units[start + 4]))
            loops += 1
    if len(units) < SEGMENT and len(units) >= 3:
        streams.append(("recycle0", units[-1], units[0]))
        loops += 1
    return blocks, streams, loops


def time_analysis(repeats: int, *args, **kwargs) -> float:
    """Best wall time of ``repeats`` calls of analyse_topology(*args, **kwargs), seconds."""
    best = float("inf")
    for _ in range(repeats):
        started = time.perf_counter()
        analyse_topology(*args, **kwargs)
        best = min(best, time.perf_counter() - started)
    return best


def main(quick: bool = False) -> dict:
    """Time analyse_topology per flowsheet size; print a table and return the numbers."""
    sizes = (10, 100) if quick else (10, 100, 1000)
    repeats = 2 if quick else 5
    results: dict = {"sizes": list(sizes), "runs": {}}
    print(
        f"{'blocks':>7} {'loops':>6} {'cycles':>7} {'tears':>6} {'exact ms':>9} "
        f"{'heur. tears':>11} {'heur. ms':>9}"
    )
    for size in sizes:
        blocks, streams, loops = generate_flowsheet(size)
        weights = {name: TEAR_VARIABLES for name, _, _ in streams}
        topology = analyse_topology(blocks, streams, tear_weights=weights)
        heuristic = analyse_topology(blocks, streams, tear_weights=weights, max_cycles=0)
        exact_s = time_analysis(repeats, blocks, streams, tear_weights=weights)
        heuristic_s = time_analysis(repeats, blocks, streams, tear_weights=weights, max_cycles=0)
        results["runs"][size] = {
            "loops": loops,
            "cycles": topology.cycle_count,
            "tears": len(topology.tear_streams),
            "heuristic_tears": len(heuristic.tear_streams),
            "exact_s": exact_s,
            "heuristic_s": heuristic_s,
        }
        print(
            f"{size:>7} {loops:>6} {topology.cycle_count:>7} {len(topology.tear_streams):>6} "
            f"{exact_s * 1e3:>9.2f} {len(heuristic.tear_streams):>11} {heuristic_s * 1e3:>9.2f}"
        )
    runs = results["runs"]
    for small, large in pairwise(sizes):
        ratio = runs[large]["exact_s"] / runs[small]["exact_s"]
        print(
            f"exact time ratio {large}/{small} blocks: {ratio:.1f} (blocks ratio {large // small})"
        )
    return results


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="10 and 100 blocks only")
    main(parser.parse_args().quick)
