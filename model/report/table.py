"""The stream table: one column per stream, one row per quantity, in a unit system.

Rows: phase, T, P, total molar flow, mass flow, each component's flow and mole
fraction, enthalpy flow. Every number is converted once from internal units; the text
and CSV forms are made from the same table, so the window, the command line and the
exports show the same numbers.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from typing import Any

from model.report.cautions import CAUTIONS
from units_of_measure import format_value, from_internal, get_unit_system


@dataclass(frozen=True)
class TableRow:
    """One row of the stream table.

    Attributes
    ----------
    label
        What the row shows, e.g. ``"Temperature"`` or ``"Molar flow argon"``.
    kind
        ``units_of_measure`` kind of the values, or ``""`` for text (the phase).
    unit
        Display unit of the values (``""`` for text and plain fractions).
    values
        One internal-unit value (or text) per stream column.
    """

    label: str
    kind: str
    unit: str
    values: tuple[Any, ...]

    def cells(self) -> list[str]:
        """The values as display text in :attr:`unit`."""
        if not self.kind:
            return [str(value) for value in self.values]
        return [
            format_value(from_internal(value, self.kind, self.unit_or_one)) for value in self.values
        ]

    @property
    def unit_or_one(self) -> str:
        return self.unit or "1"


@dataclass(frozen=True)
class StreamTable:
    """Streams as columns, quantities as rows, in one unit system."""

    unit_system: str
    columns: tuple[str, ...]
    rows: tuple[TableRow, ...]


def display_unit(system: Any, kind: str) -> str:
    """The system's unit for a kind, ``""`` for plain numbers (shown without a unit)."""
    unit = system.unit_for(kind)
    return "" if unit == "1" else unit


def stream_table(
    solution: Any, unit_system: str, stream_order: list[str] | None = None
) -> StreamTable:
    """Build the stream table of ``solution`` in ``unit_system``.

    ``stream_order`` fixes the column order (the flowsheet's stream order); by default
    the solution's own order.
    """
    system = get_unit_system(unit_system)
    names = [n for n in (stream_order or list(solution.streams)) if n in solution.streams]
    states = [solution.streams[name] for name in names]
    basis = solution.basis
    components = list(solution.component_names)
    rows = [
        TableRow("Phase", "", "", tuple(state.phase for state in states)),
        _row(system, "Temperature", "temperature", [state.T for state in states]),
        _row(system, "Pressure", "pressure", [state.P for state in states]),
        _row(
            system, "Total molar flow", "molar_flow", [state.total_molar_flow() for state in states]
        ),
        _row(system, "Mass flow", "mass_flow", [state.mass_flow(basis) for state in states]),
    ]
    for index, component in enumerate(components):
        rows.append(
            _row(
                system,
                f"Molar flow {component}",
                "molar_flow",
                [float(state.flows[index]) for state in states],
            )
        )
    for index, component in enumerate(components):
        rows.append(
            _row(
                system,
                f"Mole fraction {component}",
                "fraction",
                [_mole_fraction(state, index) for state in states],
            )
        )
    rows.append(
        _row(system, "Enthalpy flow", "power", [state.enthalpy_flow(basis) for state in states])
    )
    return StreamTable(unit_system, tuple(names), tuple(rows))


def _row(system: Any, label: str, kind: str, values: list[float]) -> TableRow:
    return TableRow(label, kind, display_unit(system, kind), tuple(float(v) for v in values))


def _mole_fraction(state: Any, index: int) -> float:
    return float(state.mole_fractions()[index]) if state.total_molar_flow() > 0.0 else 0.0


def stream_table_text(table: StreamTable) -> str:
    """The stream table as aligned plain text (first column: quantity and unit)."""
    header = ["", *table.columns]
    lines = [header]
    for row in table.rows:
        label = f"{row.label} [{row.unit}]" if row.unit else row.label
        lines.append([label, *row.cells()])
    widths = [max(len(line[i]) for line in lines) for i in range(len(header))]
    return "\n".join(
        "  ".join(
            cell.ljust(widths[0]) if i == 0 else cell.rjust(widths[i])
            for i, cell in enumerate(line)
        ).rstrip()
        for line in lines
    )


def stream_table_csv(table: StreamTable) -> str:
    """The stream table as CSV text; the first line is a ``# `` comment with the cautions."""
    buffer = io.StringIO()
    buffer.write("# " + " ".join(CAUTIONS) + "\n")
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(["Quantity", "Unit", *table.columns])
    for row in table.rows:
        writer.writerow([row.label, row.unit, *row.cells()])
    return buffer.getvalue()
