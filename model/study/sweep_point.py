"""One run of sweep points: a pure function of the case text and the points' values.

:func:`solve_run` loads the case from its text, and for each point in turn puts the
varied numbers in place (a solve view; :func:`model.flowsheet.spec_numbers.flowsheet_with_numbers`),
solves it with the case's method, settings and targets, and records the chosen
results. Each point after the first warm-starts from the tear states of the point
before it. Nothing else enters, so a run gives the same numbers in this process, in a
worker process of a pool or on a Dask worker: the function and its arguments are
plain, picklable data.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from model.case.file import case_from_json
from model.errors import LoopwrightError
from model.flowsheet.spec_numbers import flowsheet_with_numbers
from model.flowsheet.target_definition import parse_result_address, parse_spec_address
from model.solve.result_values import result_value
from model.solve.targets import solve_with_targets


@dataclass(frozen=True)
class PointResult:
    """One point: its values, the recorded results (internal units; NaN where none),
    whether it converged, its status and message, and the flowsheet passes it took."""

    values: tuple[float, ...]
    recorded: tuple[float, ...]
    converged: bool
    status: str
    message: str
    passes: int


def solve_run(
    case_text: str,
    varied: tuple[tuple[str, str], ...],
    records: tuple[str, ...],
    points: tuple[tuple[float, ...], ...],
) -> list[PointResult]:
    """Solve ``points`` of the case in ``case_text`` in order (see the module docstring).

    ``varied`` gives each variation's spec address and unit as text; ``records`` the
    result addresses as text. A point whose numbers the specs refuse is a point that
    did not converge ("needs input", with the reason), not an error of the run.
    """
    case = case_from_json(case_text, "sweep case")
    addresses = [(parse_spec_address(address), unit) for address, unit in varied]
    measured = [parse_result_address(text) for text in records]
    tears = None
    results = []
    for values in points:
        numbers = [(a, float(v), unit) for (a, unit), v in zip(addresses, values, strict=True)]
        try:
            view = flowsheet_with_numbers(case.flowsheet, numbers)
        except LoopwrightError as error:
            nan = tuple(math.nan for _ in measured)
            results.append(PointResult(tuple(values), nan, False, "needs input", str(error), 0))
            continue
        solution = solve_with_targets(view, case.method, case.settings, None, tears)
        if solution.converged:
            tears = solution.streams
        passes = solution.targets.passes if solution.targets is not None else solution.passes
        recorded = tuple(
            result_value(solution, address) if solution.streams else math.nan
            for address in measured
        )
        results.append(
            PointResult(
                tuple(values),
                recorded,
                bool(solution.converged),
                solution.status,
                solution.message,
                int(passes),
            )
        )
    return results
