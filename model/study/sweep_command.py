"""``loopwright sweep``: solve a case over a range of one spec, or a grid of two.

::

    loopwright sweep CASE --vary "Purge splitter.fractions[out2]=0.005:0.05:10"
        --record "Recycle gas.mole_fraction[argon]" --record "Recycle gas.total_flow"
        [--vary SECOND] [--csv OUT] [--units SYSTEM] [--workers N] [--dask tcp://host:8786]

``--vary`` forms (:mod:`model.study.sweep_definition`): ``SPEC=START:STOP:N`` (linear),
``SPEC=START:STOP:N:log``, ``SPEC=V1,V2,...``, each with an optional unit after a space.
The table goes to standard output (and to ``--csv``, with the cautions first). Exit
status: 0 every point converged; 1 some did not (each listed on standard error with
its reason); 2 bad input (the message names the token that could not be read).
"""

from __future__ import annotations

import argparse
import math
import sys

from model.case.file import load_case, write_file_atomically
from model.errors import LoopwrightError
from model.study.sweep_csv import displayed, record_headers
from model.study.sweep_definition import SweepPlan, parse_record, parse_variation
from model.study.sweep_run import check_plan, default_workers, run_sweep

EXIT_ALL_CONVERGED, EXIT_SOME_NOT_CONVERGED, EXIT_BAD_INPUT = 0, 1, 2


def _workers(text: str) -> int:
    if not text.isdigit() or not 1 <= int(text) <= 256:
        raise argparse.ArgumentTypeError(f"{text!r} is not allowed; a whole number from 1 to 256")
    return int(text)


def add_sweep_parser(commands) -> argparse.ArgumentParser:
    """The ``sweep`` sub-command's parser (``commands``: argparse sub-parsers)."""
    sweep = commands.add_parser(
        "sweep", help="solve a case over a range of one spec (or a grid of two)"
    )
    sweep.add_argument("case", metavar="CASE", help="case file (*.loop.json)")
    sweep.add_argument(
        "--vary",
        action="append",
        required=True,
        metavar="SPEC=VALUES",
        help="SPEC=START:STOP:N, SPEC=START:STOP:N:log or SPEC=V1,V2,... with an optional "
        "unit after a space, e.g. 'Purge splitter.fractions[out2]=0.005:0.05:10'; "
        "give it twice for a grid",
    )
    sweep.add_argument(
        "--record",
        action="append",
        required=True,
        metavar="RESULT",
        help="a result to record at every point, e.g. 'Recycle gas.mole_fraction[argon]', "
        "'Purge.total_flow', 'Loop cooler.duty'",
    )
    sweep.add_argument("--csv", metavar="OUT", help="write the table to this CSV file")
    sweep.add_argument("--units", metavar="SYSTEM", help="unit system of the recorded results")
    sweep.add_argument(
        "--workers",
        type=_workers,
        default=None,
        help=f"local worker processes (default: the core count, {default_workers()})",
    )
    sweep.add_argument(
        "--dask", metavar="ADDRESS", help="run on a Dask cluster, e.g. tcp://scheduler:8786"
    )
    return sweep


def run_sweep_command(args: argparse.Namespace) -> int:
    """Run ``loopwright sweep`` with parsed ``args``; the exit status."""
    try:
        plan = SweepPlan(
            tuple(parse_variation(text) for text in args.vary),
            tuple(parse_record(text) for text in args.record),
        )
        case = load_case(args.case)
        check_plan(case, plan)
        unit_system = args.units or case.unit_system
        from units_of_measure import UNIT_SYSTEMS

        if unit_system not in UNIT_SYSTEMS:
            raise LoopwrightError(
                f"--units: {unit_system!r} is not one of {', '.join(UNIT_SYSTEMS)}"
            )
        if args.dask is not None:
            try:
                import distributed  # noqa: F401
            except ImportError:
                raise LoopwrightError(
                    "--dask needs the cluster extra: pip install 'loopwright[cluster]'"
                ) from None
        text = open(args.case, encoding="utf-8").read()
    except (LoopwrightError, ValueError, OSError) as error:
        print(f"loopwright sweep: {error}", file=sys.stderr)
        return EXIT_BAD_INPUT
    workers = args.workers if args.workers is not None else default_workers()
    result = run_sweep(text, plan, workers=workers, dask=args.dask)
    from model.study.sweep_csv import sweep_csv

    table = sweep_csv(result, unit_system)
    if args.csv:
        try:
            write_file_atomically(args.csv, table.encode("utf-8"))
        except OSError as error:
            print(f"loopwright sweep: {args.csv}: {error.strerror or error}", file=sys.stderr)
            return EXIT_BAD_INPUT
    _print_table(result, unit_system)
    failed = result.not_converged
    for point in failed:
        values = ", ".join(
            f"{v.address} = {x:g}" for v, x in zip(plan.variations, point.values, strict=True)
        )
        print(f"not converged: {values}: {point.message}", file=sys.stderr)
    if failed:
        print(f"{len(failed)} of {len(result.points)} points did not converge", file=sys.stderr)
        return EXIT_SOME_NOT_CONVERGED
    return EXIT_ALL_CONVERGED


def _print_table(result, unit_system: str) -> None:
    plan = result.plan
    headers = [v.label for v in plan.variations] + record_headers(result, unit_system)
    rows = []
    for point in result.points:
        cells = [f"{v:.6g}" for v in point.values]
        for value, record in zip(point.recorded, plan.records, strict=True):
            shown = displayed(value, record.kind, unit_system)
            cells.append("n/a" if not math.isfinite(shown) else f"{shown:.6g}")
        rows.append([*cells, point.status])
    headers.append("status")
    widths = [
        max(len(h), *(len(r[k]) for r in rows)) if rows else len(h) for k, h in enumerate(headers)
    ]
    print("  ".join(h.rjust(w) for h, w in zip(headers, widths, strict=True)))
    for row in rows:
        print("  ".join(c.rjust(w) for c, w in zip(row, widths, strict=True)))
