"""The cost of one flowsheet pass, 100 / 300 / 1,000 blocks x 20 components (issue 14).

Flowsheets from :func:`tests.benchmarks.flowsheet_generator.generate_flowsheet` (one
recycle loop per 10 blocks), solved once; then one pass (:class:`FlowsheetPass`) is
timed in two ways:

- *converged*: every pass from the converged tear states, as ``bench_scaling`` does;
- *moving*: the passes alternate between the converged tears and tears whose flows are
  1e-6 larger (at the same T, as these loops' tears are: a set-temperature heater
  makes them), so every block sees inlets that changed since its last pass, as in a
  late iteration of the recycle.

Times are the process's CPU time (``time.process_time``), the best mean over rounds,
the sizes timed in turn: on a machine shared with other work CPU time varies less
than wall time. Also counted: correlation evaluations per pass (weighted by the flows,
``CpTable.stream_totals``, or per component, ``CpTable.molar_values``).

``--against DIR`` times another checkout of the project (e.g. ``git worktree add`` or
``git archive`` of the commit before a change) in a second process running this file
with that checkout's packages, rounds interleaved with this one's, and prints the
ratios this / other, measured in one run. ``--profile`` prints the
cProfile entries of 20 converged 1,000-block passes with the largest own time.

Run: ``python -m tests.benchmarks.bench_pass_cost [--quick] [--against DIR] [--profile]``.
"""

from __future__ import annotations

import argparse
import cProfile
import io
import json
import os
import pstats
import subprocess
import sys
import time
from pathlib import Path

from convergence import SolverSettings
from model.properties.cp_correlations import CpTable
from model.properties.enthalpy import PropertyBasis
from model.properties.stream_state import StreamState
from model.solve.compile import compile_flowsheet
from model.solve.driver import solve_flowsheet
from model.solve.passes import FlowsheetPass
from model.solve.topology import analyse_topology
from tests.benchmarks.flowsheet_generator import generate_flowsheet

COMPONENTS = 20
BLOCKS_PER_LOOP = 10
MOVE = 1e-6  # relative change of the tear flows between "moving" passes


def prepare(blocks: int) -> dict:
    """Solve the generated flowsheet; a pass set up at its converged tears."""
    loops = max(1, blocks // BLOCKS_PER_LOOP)
    sheet = generate_flowsheet(blocks, loops, COMPONENTS)
    solution = solve_flowsheet(sheet, settings=SolverSettings(max_iterations=max(200, 3 * loops)))
    if not solution.converged:
        raise RuntimeError(f"{blocks} blocks: {solution.message}")
    basis = PropertyBasis(sheet.components)
    topology = analyse_topology(
        list(sheet.blocks), [(s.name, s.source, s.target) for s in sheet.streams.values()]
    )
    runner = FlowsheetPass(
        compile_flowsheet(sheet, basis), topology.calculation_order, topology.tear_streams, basis
    )
    tears = [solution.streams[name] for name in topology.tear_streams]
    moved = [StreamState(t.flows * (1.0 + MOVE), t.T, t.P, t.phase) for t in tears]
    runner.run(tears, strict=False)
    return {"blocks": blocks, "run": runner.run, "tears": tears, "moved": moved}


def time_round(rows: list[dict], passes: int) -> dict[str, float]:
    """One round: mean CPU time per pass (s) of each size, converged and moving."""
    times = {}
    for row in rows:
        count = max(2, passes // row["blocks"]) // 2 * 2
        run, tears, moved = row["run"], row["tears"], row["moved"]
        start = time.process_time()
        for _ in range(count):
            run(tears, strict=False)
        times[f"{row['blocks']} converged"] = (time.process_time() - start) / count
        start = time.process_time()
        for k in range(count):
            run(moved if k % 2 else tears, strict=False)
        times[f"{row['blocks']} moving"] = (time.process_time() - start) / count
    return times


def evaluations_per_pass(row: dict) -> dict[str, float]:
    """Correlation evaluations of one converged and one moving pass."""
    counts = [0]
    totals = CpTable.stream_totals
    molar = getattr(CpTable, "molar_values", None)  # not in checkouts before issue 14

    def counted_totals(table, flows, T):
        counts[0] += 1
        return totals(table, flows, T)

    def counted_molar(table, T):
        counts[0] += 1
        return molar(table, T)

    CpTable.stream_totals = counted_totals
    if molar is not None:
        CpTable.molar_values = counted_molar
    try:
        row["run"](row["tears"], strict=False)
        converged = counts[0]
        row["run"](row["moved"], strict=False)
        row["run"](row["tears"], strict=False)
    finally:
        CpTable.stream_totals = totals
        if molar is not None:
            CpTable.molar_values = molar
    return {"converged": converged, "moving": (counts[0] - converged) / 2}


def profile_top(row: dict, entries: int = 15) -> str:
    """cProfile of 20 converged passes, the entries with the largest own time."""
    row["run"](row["tears"], strict=False)  # from the converged state, not a moved one
    profile = cProfile.Profile()
    profile.enable()
    for _ in range(20):
        row["run"](row["tears"], strict=False)
    profile.disable()
    text = io.StringIO()
    pstats.Stats(profile, stream=text).sort_stats("tottime").print_stats(entries)
    return text.getvalue()


def _worker(sizes: list[int], passes: int) -> None:
    """Second process of ``--against``: one round per line read, figures as JSON."""
    rows = [prepare(blocks) for blocks in sizes]
    print(json.dumps([evaluations_per_pass(row) for row in rows]), flush=True)
    for _ in sys.stdin:
        print(json.dumps(time_round(rows, passes)), flush=True)


def _sizes(quick: bool) -> tuple[list[int], int]:
    """Flowsheet sizes (blocks), and block passes per size and round (sets the repeats)."""
    return ([100, 300], 600) if quick else ([100, 300, 1000], 6000)


def _best(rounds: list[dict[str, float]]) -> dict[str, float]:
    return {key: min(r[key] for r in rounds) for key in rounds[0]}


def main(quick: bool = False, against: Path | None = None, profile: bool = False) -> dict:
    """Measure, print the table (and the ratios against another checkout), return all."""
    sizes, passes = _sizes(quick)
    rounds = 3 if quick else 10
    other = None
    if against is not None:
        environment = dict(os.environ, PYTHONPATH=str(against))
        other = subprocess.Popen(
            # this file, run by path: its imports come from the other checkout
            [sys.executable, __file__, "--worker"] + (["--quick"] if quick else []),
            cwd=against,
            env=environment,
            stdin=subprocess.PIPE,
            stdout=subprocess.PIPE,
            text=True,
        )
    rows = [prepare(blocks) for blocks in sizes]
    evaluations = [evaluations_per_pass(row) for row in rows]
    other_evaluations = json.loads(other.stdout.readline()) if other else None
    mine, theirs = [], []
    for _ in range(rounds):
        mine.append(time_round(rows, passes))
        if other is not None:
            other.stdin.write("round\n")
            other.stdin.flush()
            theirs.append(json.loads(other.stdout.readline()))
    if other is not None:
        other.stdin.close()
        other.wait()
    best = _best(mine)
    figures: dict = {
        "pass_s": best,
        "evaluations": dict(zip(map(str, sizes), evaluations, strict=True)),
    }
    print("| pass | CPU ms | evaluations | other's CPU ms | other's evaluations | ratio |")
    print("|---|---:|---:|---:|---:|---:|")
    other_best = _best(theirs) if theirs else {}
    for key, seconds in best.items():
        size, kind = key.split()
        k = sizes.index(int(size))
        own = evaluations[k][kind]
        line = f"| {key} | {seconds * 1e3:.2f} | {own:g} |"
        if other_best:
            their = other_evaluations[k][kind]
            ratio = seconds / other_best[key]
            line += f" {other_best[key] * 1e3:.2f} | {their:g} | {ratio:.2f} |"
        else:
            line += " | | |"
        print(line)
    if other_best:
        figures["other_pass_s"] = other_best
        figures["ratio"] = {key: best[key] / other_best[key] for key in best}
    if profile:
        figures["profile"] = profile_top(rows[-1])
        print(figures["profile"])
    return figures


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="100 and 300 blocks, fewer rounds")
    parser.add_argument("--against", type=Path, default=None, help="another checkout to time")
    parser.add_argument("--profile", action="store_true", help="cProfile the largest size")
    parser.add_argument("--worker", action="store_true", help=argparse.SUPPRESS)
    arguments = parser.parse_args()
    if arguments.worker:
        _worker(
            [100, 300] if arguments.quick else [100, 300, 1000], 600 if arguments.quick else 3000
        )
    else:
        main(arguments.quick, arguments.against, arguments.profile)
