"""The headless commands ``loopwright solve``, ``loopwright export`` and ``loopwright sweep``.

``solve CASE`` loads a case file, solves it and prints the convergence summary, the
stream table and block duties in the chosen unit system, the balance closures and the
cautions (or, with ``--json``, one JSON object). With ``--second-opinion`` it then
solves the flowsheet again with every stream at once (:mod:`model.solve.second_opinion_solve`) and
prints the largest relative difference from the sequential answer (in JSON:
``"second_opinion": {"agrees", "largest_relative_difference", "message"}``).
``--stop-on`` chooses the stopping rule ("estimated error" or "residual") and
``--fixed-bounds`` keeps q within the given bounds (no adaptive widening) and
``--no-dominant-mode`` takes per-variable Wegstein steps only (no dominant-mode step); see
:class:`convergence.SolverSettings`. A case with targets is solved with them met
(:mod:`model.solve.targets`; ``--no-targets`` leaves them aside) and the report lists
each target's adjusted value, measured value and outer iterations (JSON: ``"targets"``).
``sweep`` is :mod:`model.study.sweep_command`.
``export CASE --csv FILE --xlsx FILE --report FILE`` solves the case and writes any of:
a CSV file (cautions, stream table, block results, closures), a spreadsheet
(:mod:`model.report.xlsx`) and the printable report. The report draws the diagram with
Qt, which the model never imports: the ``loopwright`` command (``gui.launcher``) hands
``main`` a ``report_writer`` that does it. Every file is written to a temporary file and
renamed. Exit status: 0 converged, 1 not converged, 2 bad input or a bad file (the message goes to
standard error); the second opinion does not change it.

Examples
--------
>>> main(["solve", "examples/ammonia_synthesis_loop.loop.json", "--json"])  # doctest: +SKIP
0
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
from collections.abc import Callable
from typing import Any

from convergence import METHODS
from convergence.settings import STOP_RULES
from model.case.document import Case
from model.case.file import load_case, write_file_atomically
from model.errors import LoopwrightError
from model.report.csv_file import results_csv
from model.report.report_order import ReportOrder
from model.report.text import solution_report, solution_summary
from model.report.xlsx import workbook_bytes
from model.solve.second_opinion_solve import AGREEMENT_TOLERANCE, SecondOpinion, second_opinion
from model.solve.targets import adjusted_flowsheet
from model.study.sweep_command import add_sweep_parser, run_sweep_command
from units_of_measure import UNIT_SYSTEMS

EXIT_CONVERGED = 0
EXIT_NOT_CONVERGED = 1
EXIT_BAD_INPUT = 2
#: Solve states that mean the input cannot be solved as it stands.
BAD_INPUT_STATES = ("needs input",)
#: Makes the printable report of a solved case: ``(case, case path) -> file bytes``.
ReportWriter = Callable[[Case, str], bytes]
EXPORT_FORMATS = ("csv", "xlsx", "report")


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of both sub-commands."""
    parser = argparse.ArgumentParser(
        prog="loopwright",
        description="Solve a Loopwright case without the window, or export its stream table.",
    )
    commands = parser.add_subparsers(dest="command", required=True)
    solve = commands.add_parser("solve", help="solve a case and print the results")
    _add_common(solve)
    solve.add_argument("--method", choices=list(METHODS), help="convergence method")
    solve.add_argument("--q-min", type=float, dest="q_min", help="lower bound of Wegstein's q")
    solve.add_argument("--q-max", type=float, dest="q_max", help="upper bound of Wegstein's q")
    solve.add_argument(
        "--stop-on",
        choices=list(STOP_RULES),
        dest="stop_on",
        help="what must fall to the tolerance: 'estimated error' (residual / |1 - slope|, "
        "the default) or 'residual' (the largest scaled residual alone)",
    )
    solve.add_argument(
        "--fixed-bounds",
        action="store_true",
        dest="fixed_bounds",
        help="keep Wegstein's q within --q-min/--q-max (a run does not widen them itself)",
    )
    solve.add_argument(
        "--no-dominant-mode",
        action="store_true",
        dest="no_dominant_mode",
        help="per-variable Wegstein steps only: no dominant-mode step on coupled tears",
    )
    solve.add_argument("--json", action="store_true", help="print one JSON object")
    solve.add_argument(
        "--no-targets",
        action="store_true",
        dest="no_targets",
        help="solve with the specs as they stand, leaving the case's targets aside",
    )
    solve.add_argument(
        "--second-opinion",
        action="store_true",
        dest="second_opinion",
        help="check the answer by solving every stream at once (scipy.optimize.root)",
    )
    solve.add_argument(
        "--agreement-tolerance",
        type=_positive_float,
        dest="agreement_tolerance",
        default=AGREEMENT_TOLERANCE,
        metavar="TOL",
        help=f"largest relative difference that agrees (default {AGREEMENT_TOLERANCE:g})",
    )
    export = commands.add_parser(
        "export", help="solve a case and write its results: CSV, spreadsheet, printable report"
    )
    _add_common(export)
    export.add_argument(
        "--csv", metavar="FILE", help="CSV file: cautions, stream table, block results, closures"
    )
    export.add_argument(
        "--xlsx", metavar="FILE", help="spreadsheet: summary, streams, block results, closures"
    )
    export.add_argument(
        "--report", metavar="FILE", help="printable report (PDF) with the diagram and tables"
    )
    add_sweep_parser(commands)
    return parser


def _positive_float(text: str) -> float:
    """A finite number above zero (argparse type)."""
    try:
        value = float(text)
    except ValueError:
        value = math.nan
    if not (math.isfinite(value) and value > 0.0):
        raise argparse.ArgumentTypeError(f"{text!r} is not allowed; a finite number > 0")
    return value


def _add_common(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("case", metavar="CASE", help="case file (*.loop.json)")
    parser.add_argument(
        "--units",
        choices=list(UNIT_SYSTEMS),
        metavar="SYSTEM",
        help="unit system of the output: "
        + ", ".join(repr(name) for name in UNIT_SYSTEMS)
        + " (default: the case's own)",
    )


def main(argv: list[str] | None = None, report_writer: ReportWriter | None = None) -> int:
    """Run ``solve`` or ``export`` (``argv[0]``, default ``sys.argv[1:]``); return the status.

    ``report_writer`` makes ``export --report``'s file (``gui.report_export``); without
    one, ``--report`` is refused.
    """
    parser = build_parser()
    try:
        args = parser.parse_args(sys.argv[1:] if argv is None else argv)
    except SystemExit as stop:  # argparse has printed the usage and the problem
        return EXIT_BAD_INPUT if stop.code not in (0, None) else 0
    if args.command == "sweep":
        return run_sweep_command(args)
    refusal = _export_refusal(args, report_writer)
    if refusal:
        print(f"loopwright export: {refusal}", file=sys.stderr)
        return EXIT_BAD_INPUT
    try:
        case = _prepared_case(args)
        solution = case.solve()
    except (LoopwrightError, ValueError) as error:
        print(f"loopwright {args.command}: {error}", file=sys.stderr)
        return EXIT_BAD_INPUT
    if solution.status in BAD_INPUT_STATES:
        _print_refusal(args.command, solution)
        return EXIT_BAD_INPUT
    if args.command == "solve":
        opinion = None
        if args.second_opinion:
            checked = adjusted_flowsheet(case.flowsheet, solution)  # targets' values in place
            opinion = second_opinion(checked, solution, args.agreement_tolerance)
        try:
            _print_solution(case, args.json, opinion)
        except BrokenPipeError:  # the reader (e.g. ``head``) stopped early: not an error
            sys.stdout = open(os.devnull, "w")  # noqa: SIM115 - Python flushes it at exit
    else:
        for name in EXPORT_FORMATS:
            path = getattr(args, name)
            if path is None:
                continue
            try:
                write_file_atomically(path, _export_bytes(name, case, args.case, report_writer))
            except OSError as error:
                print(f"loopwright export: {path}: {error.strerror or error}", file=sys.stderr)
                return EXIT_BAD_INPUT
    return EXIT_CONVERGED if solution.converged else EXIT_NOT_CONVERGED


def _prepared_case(args: argparse.Namespace) -> Case:
    """Load the case and apply the command line's choices to it."""
    case = load_case(args.case)
    if args.units is not None:
        case.unit_system = args.units
    if getattr(args, "method", None) is not None:
        case.method = args.method
    changes = {
        name: value
        for name in ("q_min", "q_max", "stop_on")
        if (value := getattr(args, name, None)) is not None
    }
    if getattr(args, "fixed_bounds", False):
        changes["adaptive_bounds"] = False
    if getattr(args, "no_dominant_mode", False):
        changes["dominant_mode"] = False
    if changes:
        case.settings.update(**changes)
    if getattr(args, "no_targets", False):
        case.flowsheet.targets = []
    return case


def _print_refusal(command: str, solution: Any) -> None:
    print(f"loopwright {command}: {solution.status}: {solution.message}", file=sys.stderr)
    for issue in solution.issues:
        print(f"  {issue.severity}: {issue.message}", file=sys.stderr)


def _print_solution(case: Case, as_json: bool, opinion: SecondOpinion | None = None) -> None:
    solution = case.solution
    if as_json:
        summary = solution_summary(solution)
        if opinion is not None:
            summary["second_opinion"] = second_opinion_summary(opinion)
        print(json.dumps(summary, indent=2, allow_nan=True))
        return
    if case.title:
        print(case.title)
        print()
    order = ReportOrder.of(case.flowsheet)
    text = solution_report(solution, case.unit_system, order.streams, order.blocks, order.numbers)
    sys.stdout.write(text)
    if opinion is not None:
        print()
        print(second_opinion_line(opinion))


def second_opinion_summary(opinion: SecondOpinion) -> dict[str, Any]:
    """The JSON entry of ``--second-opinion``: agrees, largest relative difference, message."""
    difference = opinion.largest_relative_difference
    return {
        "agrees": bool(opinion.agrees),
        "largest_relative_difference": None if difference is None else float(difference),
        "message": opinion.message,
    }


def second_opinion_line(opinion: SecondOpinion) -> str:
    """One line for the text report, e.g. ``Second opinion: agrees: largest ...``."""
    difference = opinion.largest_relative_difference
    if not opinion.converged or difference is None:
        return f"Second opinion: {opinion.message}"
    line = (
        f"Second opinion: {'agrees' if opinion.agrees else 'DOES NOT AGREE'}: largest "
        f"relative difference {difference:.3g} at {opinion.worst} (tolerance "
        f"{opinion.tolerance:g}); every stream at once by scipy.optimize.root "
        f"'{opinion.method}', {opinion.evaluations} evaluations, {opinion.seconds:.3g} s"
    )
    if not opinion.agrees:
        line += (
            "; a tear converged to the solver tolerance can still be off by about "
            "tolerance / (1 - loop gain): tighten the tolerance and solve again"
        )
    return line


def _export_refusal(args: argparse.Namespace, report_writer: ReportWriter | None) -> str:
    """Why an ``export`` cannot start (``""`` when it can)."""
    if args.command != "export":
        return ""
    if all(getattr(args, name) is None for name in EXPORT_FORMATS):
        return "name at least one file to write: --csv FILE, --xlsx FILE or --report FILE"
    if args.report is not None and report_writer is None:
        return (
            "--report needs the diagram drawing of the window package; run it as "
            "'loopwright export' (the installed command)"
        )
    return ""


def _export_bytes(
    name: str, case: Case, case_path: str, report_writer: ReportWriter | None
) -> bytes:
    """The content of one export file of the solved ``case``."""
    if name == "csv":
        order = ReportOrder.of(case.flowsheet)
        return results_csv(case.solution, case.unit_system, order).encode("utf-8")
    if name == "xlsx":
        return workbook_bytes(case, case_path)
    assert report_writer is not None  # refused before the solve otherwise
    return report_writer(case, case_path)


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
