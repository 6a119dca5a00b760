"""Hover text for streams and blocks from the last solution, in the chosen unit system."""

from __future__ import annotations

from typing import Any

from units_of_measure import KIND_ALIASES, KINDS, UNIT_SYSTEMS, format_quantity, format_value


def _quantity(value: float, kind: str, unit_system: str) -> str:
    """``value`` (internal units) shown in the system's unit for ``kind``; "" means a number."""
    if not kind or kind == "1":
        return format_value(value)
    kind = KIND_ALIASES.get(kind.lower(), kind) if kind not in KINDS else kind
    return format_quantity(value, kind, UNIT_SYSTEMS[unit_system].unit_for(kind))


def describe_stream(
    name: str, state: Any, component_names: list[str], unit_system: str, current: bool = True
) -> str:
    """Several lines: flow, temperature, pressure, phase and mole fractions of a stream, and
    for a two-phase stream its vapor fraction and each phase's flow."""
    lines = [f"{name} ({state.phase})"]
    lines.append("flow " + _quantity(state.total_molar_flow(), "molar_flow", unit_system))
    lines.append(
        "T "
        + _quantity(state.T, "temperature", unit_system)
        + " · P "
        + _quantity(state.P, "pressure", unit_system)
    )
    fractions = state.mole_fractions()
    parts = [
        f"{component} {format_value(float(x), 4)}"
        for component, x in zip(component_names, fractions, strict=False)
        if x > 0
    ]
    if parts:
        lines.append("mole fractions: " + ", ".join(parts))
    if getattr(state, "two_phase", False):
        lines.append(f"vapor fraction {format_value(state.vapor_fraction(), 4)}")
        vapor = _quantity(float(state.vapor_flows.sum()), "molar_flow", unit_system)
        liquid = _quantity(float(state.liquid_flows.sum()), "molar_flow", unit_system)
        lines.append(f"vapor {vapor} · liquid {liquid}")
    if not current:
        lines.append("(last solve; the flowsheet changed since)")
    return "\n".join(lines)


def describe_block(
    name: str, kind: str, result: Any, unit_system: str, current: bool = True
) -> str:
    """Several lines: the block's duty and other computed values, then its warnings."""
    lines = [f"{name} ({kind.lower()})"]
    if result is not None:
        if result.duty_W is not None:
            lines.append("duty " + _quantity(result.duty_W, "power", unit_system))
        for label, (value, value_kind) in result.values.items():
            lines.append(f"{label} " + _quantity(value, value_kind, unit_system))
        lines += [f"warning: {w}" for w in result.warnings]
        if not current:
            lines.append("(last solve; the flowsheet changed since)")
    return "\n".join(lines)
