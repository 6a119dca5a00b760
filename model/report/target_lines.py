"""Targets in the reports: one line per target, and the JSON entry of ``solve --json``."""

from __future__ import annotations

import math
from typing import Any

from model.solve.targets import in_wanted_unit, target_label


def target_lines(solution: Any) -> list[str]:
    """``target 1: Recycle gas.mole_fraction[argon] = 8 %: met; Purge
    splitter.fractions[out2] = 0.0202561; measured 8 %; 7 outer iterations``, then the
    run's outer iterations and passes. Empty when the solution has no targets."""
    outcome = getattr(solution, "targets", None)
    if outcome is None:
        return []
    lines = []
    for number, result in enumerate(outcome.results, start=1):
        target = result.target
        unit = f" {target.unit}" if target.unit else ""
        adjusted = "n/a" if not math.isfinite(result.adjusted) else f"{result.adjusted:.9g}{unit}"
        line = (
            f"{target_label(number, target)} = {target.wanted}: {result.status}; "
            f"{target.adjusted} = {adjusted}; measured "
            f"{in_wanted_unit(target, result.measured)}; {result.iterations} outer iterations"
        )
        lines.append(line)
        if not result.met:
            lines.append(f"  {result.message}")
    lines.append(
        f"Outer loop ({outcome.method}): {outcome.outer_iterations} outer iterations, "
        f"{outcome.passes} flowsheet passes, {outcome.block_evaluations} block evaluations"
    )
    return lines


def targets_summary(solution: Any) -> dict[str, Any] | None:
    """The ``"targets"`` entry of ``solve --json`` (internal units for measured values,
    the target's unit for adjusted values); None without targets."""
    outcome = getattr(solution, "targets", None)
    if outcome is None:
        return None
    return {
        "outer_iterations": outcome.outer_iterations,
        "passes": outcome.passes,
        "block_evaluations": outcome.block_evaluations,
        "method": outcome.method,
        "results": [result.to_dict() for result in outcome.results],
    }
