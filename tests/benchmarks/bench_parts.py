"""Part by part against all loops at once: passes, block evaluations and time, per case.

*Before* is the whole tear problem (every tear of the flowsheet in one fixed-point run,
each pass over every block): :func:`model.solve.tear_problem.build_tear_problem`, then
:func:`convergence.solve_fixed_point`, then ``finish``, exactly what the solve did
before it went part by part. *After* is :func:`model.solve.driver.solve_flowsheet`,
which converges each strongly connected part on its own. Both at the default method
and settings (iteration limit at least 3 per loop), in the same run.

Cases: generated chains of 10, 30 and 100 loops of 10 blocks in series, 20 components
(:func:`tests.benchmarks.flowsheet_generator.generate_flowsheet`; quick: 10 and 30),
with the slowest loop of each also solved alone (:func:`tests.benchmarks.loop_alone.loop_alone`);
and every case of :mod:`tests.benchmarks.recycle_cases`. Then direct substitution
against the default on chains of 8, 9, 10 and 12-block loops
(:func:`never_worse_than_direct`). Block evaluations before are
passes times blocks. Times are best of a few runs, as ratios after / before.

Run: ``python -m tests.benchmarks.bench_parts [--quick]``.
"""

from __future__ import annotations

import argparse

from convergence import SolverSettings, solve_fixed_point
from model.solve.driver import solve_flowsheet
from model.solve.tear_problem import build_tear_problem
from tests.benchmarks.bench_enthalpy import best_time
from tests.benchmarks.flowsheet_generator import generate_flowsheet
from tests.benchmarks.loop_alone import loop_alone
from tests.benchmarks.recycle_cases import CASES, build_case


def _settings(loops: int) -> SolverSettings:
    return SolverSettings(max_iterations=max(200, 3 * loops))


def _before(sheet, loops: int) -> dict:
    settings = _settings(loops)
    tear_problem = build_tear_problem(sheet)
    result = solve_fixed_point(tear_problem.problem, "wegstein", settings)
    solution = tear_problem.finish(result, settings)
    return {
        "status": solution.status,
        "passes": solution.passes,
        "block_evaluations": solution.passes * len(sheet.blocks),
    }


def _after(sheet, loops: int) -> tuple[dict, object]:
    solution = solve_flowsheet(sheet, settings=_settings(loops))
    figures = {
        "status": solution.status,
        "passes": solution.passes,
        "block_evaluations": solution.block_evaluations,
    }
    return figures, solution


def _row(name: str, sheet, loops: int, repeats: int) -> tuple[dict, object]:
    before = _before(sheet, loops)
    after, solution = _after(sheet, loops)
    before_s = best_time(lambda: _before(sheet, loops), repeats)
    after_s = best_time(lambda: _after(sheet, loops), repeats)
    row = {
        "case": name,
        "blocks": len(sheet.blocks),
        "parts": len(solution.parts),
        "before": before,
        "after": after,
        "evaluations_ratio": after["block_evaluations"] / before["block_evaluations"],
        "time_ratio": after_s / before_s,
    }
    return row, solution


def _chain(loops: int, repeats: int) -> dict:
    sheet = generate_flowsheet(2 + 10 * loops, loops, 20)
    row, solution = _row(f"chain of {loops} loops", sheet, loops, repeats)
    slowest = max(solution.parts, key=lambda part: part.passes)
    alone_sheet = loop_alone(sheet, solution, slowest.blocks)
    alone = solve_flowsheet(alone_sheet)
    row["slowest loop alone"] = {
        "part": slowest.label,
        "status": alone.status,
        "passes": alone.passes,
        "block_evaluations": alone.block_evaluations,
        "evaluations_per_block": alone.block_evaluations / len(alone_sheet.blocks),
    }
    row["after"]["evaluations_per_block"] = solution.block_evaluations / len(sheet.blocks)
    return row


def _print(rows: list[dict]) -> None:
    print(
        f"{'case':44} {'parts':>5} {'passes before/after':>20} {'block evals before/after':>25}"
        f" {'evals':>6} {'time':>6}"
    )
    for row in rows:
        before, after = row["before"], row["after"]
        passes = f"{before['passes']}/{after['passes']}"
        evaluations = f"{before['block_evaluations']}/{after['block_evaluations']}"
        flags = "" if before["status"] == after["status"] else f"  ({before['status']} before)"
        print(
            f"{row['case']:44} {row['parts']:>5} {passes:>20} {evaluations:>25} "
            f"{row['evaluations_ratio']:>6.2f} {row['time_ratio']:>6.2f}{flags}"
        )
        alone = row.get("slowest loop alone")
        if alone:
            print(
                f"{'':4}slowest loop alone ({alone['part']}): {alone['passes']} passes, "
                f"{alone['evaluations_per_block']:.2f} evaluations per block; the chain: "
                f"{after['passes']} passes, {after['evaluations_per_block']:.2f} per block"
            )


def never_worse_than_direct(loop_counts: tuple[int, ...]) -> list[dict]:
    """Direct substitution against the default on chains of several loop lengths (8, 9,
    10 and 12 blocks, 20 components): the default must converge wherever direct
    substitution does (issue 14, item 2)."""
    rows = []
    for loops in loop_counts:
        for size in (8, 9, 10, 12):
            sheet = generate_flowsheet(2 + size * loops, loops, 20)
            row = {"loops": loops, "size": size}
            for method in ("direct", "wegstein"):
                solution = solve_flowsheet(sheet, method, _settings(loops))
                row[method] = (solution.status, solution.passes, solution.block_evaluations)
            row["rule holds"] = row["direct"][0] != "solved" or row["wegstein"][0] == "solved"
            print(
                f"chain of {loops} loops of {size} blocks: direct {row['direct']}, "
                f"default {row['wegstein']}, rule holds: {row['rule holds']}"
            )
            rows.append(row)
    return rows


def main(quick: bool = False) -> dict:
    """Measure every case (see the module docstring); return the figures."""
    repeats = 1 if quick else 3
    rows = [_chain(loops, repeats) for loops in ((10, 30) if quick else (10, 30, 100))]
    for name in CASES:
        row, _ = _row(name, build_case(name), 1, repeats)
        rows.append(row)
    _print(rows)
    rule = never_worse_than_direct((10, 30) if quick else (10, 30, 100))
    return {"rows": rows, "never worse than direct": rule}


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true")
    main(parser.parse_args().quick)
