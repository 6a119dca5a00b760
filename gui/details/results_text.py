"""Results of one block, as short rich text in the chosen unit system."""

from __future__ import annotations

import html
from typing import Any

from units_of_measure import UNIT_SYSTEMS, UnitError, format_quantity, format_value, get_kind


def display_kind(kind: str) -> str | None:
    """The units_of_measure kind name for a result's kind ("" -> None, "UA" -> its kind)."""
    if not kind:
        return None
    try:
        return get_kind(kind).name
    except UnitError:
        return get_kind(kind.lower()).name


def format_result(value: float, kind: str, unit_system: str) -> str:
    """An internal-unit result value shown in the unit system (plain numbers as they are)."""
    name = display_kind(kind)
    if name is None:
        return format_value(value)
    return format_quantity(value, name, UNIT_SYSTEMS[unit_system].unit_for(name))


def block_results_html(solution: Any, block_name: str, unit_system: str) -> str:
    """Duty, computed values and warnings of one block, or why there are none."""
    if solution is None:
        return "Not solved yet."
    status = html.escape(str(solution.status))
    result = solution.blocks.get(block_name) if solution.blocks else None
    if result is None:
        return f"Solve status: {status}. No results for this block."
    lines = [f"Solve status: {status}"]
    if result.duty_W is not None:
        lines.append(f"Duty: <b>{format_result(result.duty_W, 'power', unit_system)}</b>")
    for name, (value, kind) in result.values.items():
        lines.append(f"{html.escape(name)}: {format_result(value, kind, unit_system)}")
    for warning in result.warnings:
        lines.append(f"<span style='color:#8a4b00'>⚠ {html.escape(warning)}</span>")
    return "<br>".join(lines)
