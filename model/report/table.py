"""The stream table: one column per stream, one row per quantity, in a unit system.

Rows: phase, T, P, total molar flow, mass flow, vapor fraction (and, when a stream is
two-phase, each component's vapor flow), each component's flow and mole
fraction, enthalpy flow, and for a case with a flash drum each stream's bubble and dew
point. Columns carry the streams' names and their numbers
(``model.report.stream_numbers``). Every number is converted once from internal units;
the text, CSV and spreadsheet forms are made from the same table, so the window, the
command line and the exports show the same numbers.

Round-off floor: in each row, a value whose magnitude is below :data:`ROW_FLOOR` times
the row's largest magnitude is shown as 0. An enthalpy flow of -4.7e-13 kW beside flows
of thousands of kW is the round-off of a sum that is zero (a feed of elements at
298.15 K), not a result.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from model.report.stream_numbers import number_text
from units_of_measure import format_value, from_internal, get_unit_system

#: Relative floor below which a value counts as 0 in its row (see the module docstring).
ROW_FLOOR = 1e-12


def round_off_floor(values: Any) -> float:
    """Magnitudes below this are round-off: :data:`ROW_FLOOR` x the largest finite one."""
    numbers = [abs(v) for v in values if not isinstance(v, str) and math.isfinite(v)]
    return ROW_FLOOR * max(numbers, default=0.0)


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
        One internal-unit value (or text) per stream column; a row of numbers may hold
        text where a stream has no number (a dew point above the critical temperature).
    """

    label: str
    kind: str
    unit: str
    values: tuple[Any, ...]

    def shown(self) -> tuple[Any, ...]:
        """The values in :attr:`unit` (text as it is, also a text cell in a row of
        numbers, e.g. why a stream has no dew point), round-off below the floor as 0."""
        if not self.kind:
            return tuple(str(value) for value in self.values)
        converted = [
            value if isinstance(value, str) else from_internal(value, self.kind, self.unit_or_one)
            for value in self.values
        ]
        floor = round_off_floor(converted)
        return tuple(
            value if isinstance(value, str) else 0.0 if abs(value) < floor else float(value)
            for value in converted
        )

    def cells(self) -> list[str]:
        """The values as display text in :attr:`unit` (5 significant digits)."""
        return [v if isinstance(v, str) else format_value(v) for v in self.shown()]

    @property
    def unit_or_one(self) -> str:
        return self.unit or "1"


@dataclass(frozen=True)
class StreamTable:
    """Streams as columns, quantities as rows, in one unit system."""

    unit_system: str
    columns: tuple[str, ...]
    rows: tuple[TableRow, ...]
    numbers: tuple[int | None, ...] = ()

    def column_numbers(self) -> list[str]:
        """Each column's stream number as header text (``""`` where a stream has none)."""
        numbers = self.numbers or (None,) * len(self.columns)
        return [number_text(number) for number in numbers]


def display_unit(system: Any, kind: str) -> str:
    """The system's unit for a kind, ``""`` for plain numbers (shown without a unit)."""
    unit = system.unit_for(kind)
    return "" if unit == "1" else unit


def stream_table(
    solution: Any,
    unit_system: str,
    stream_order: list[str] | None = None,
    stream_numbers: dict[str, int] | None = None,
) -> StreamTable:
    """Build the stream table of ``solution`` in ``unit_system``.

    ``stream_order`` fixes the column order (the flowsheet's stream order, or its
    number order); by default the solution's own order. ``stream_numbers`` (name ->
    number, :func:`model.report.stream_numbers.stream_numbers`) heads the columns.
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
        _row(system, "Vapor fraction", "fraction", [_vapor_fraction(state) for state in states]),
    ]
    if any(state.two_phase for state in states):  # each phase's flows, for two-phase streams
        for index, component in enumerate(components):
            rows.append(
                _row(
                    system,
                    f"Vapor flow {component}",
                    "molar_flow",
                    [float(state.flows[index] - state.liquid_flows[index]) for state in states],
                )
            )
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
    if _has_flash_drum(solution):
        rows += _saturation_rows(system, basis, states)
    numbers = tuple((stream_numbers or {}).get(name) for name in names)
    return StreamTable(unit_system, tuple(names), tuple(rows), numbers)


def _row(system: Any, label: str, kind: str, values: list[float]) -> TableRow:
    return TableRow(label, kind, display_unit(system, kind), tuple(float(v) for v in values))


def _has_flash_drum(solution: Any) -> bool:
    """True when a block of the solution reported a vapor fraction (a flash drum)."""
    blocks = getattr(solution, "blocks", {}) or {}
    return any("vapor fraction" in result.values for result in blocks.values())


def saturation_points(solution: Any, states: list[Any]) -> dict[str, list[Any]] | None:
    """``{"Bubble point": [point ...], "Dew point": [point ...]}`` of ``states`` at their
    pressures for a case with a flash drum, each a
    :class:`~model.properties.phase_equilibrium.SaturationPoint` (T in K, or None with
    the reason); None for a case without one, or when the property method lacks data."""
    if not _has_flash_drum(solution):
        return None
    return _saturation_points(solution.basis, states)


def _saturation_rows(system: Any, basis: Any, states: list[Any]) -> list[TableRow]:
    points = _saturation_points(basis, states)
    if points is None:
        return []
    return [
        TableRow(
            label,
            "temperature",
            display_unit(system, "temperature"),
            tuple(_point_cell(point) for point in values),
        )
        for label, values in points.items()
    ]


def _point_cell(point: Any) -> float | str:
    """A saturation point's cell: its T (K), the reason it has none, or NaN (no flow)."""
    if point.T is not None:
        return float(point.T)
    return math.nan if point.reason == "no flow" else point.reason


def _saturation_points(basis: Any, states: list[Any]) -> dict[str, list[Any]] | None:
    """Bubble and dew point of each stream at its pressure (SaturationPoint: T or the
    reason there is none); None when the property method lacks data."""
    from model.errors import InputError
    from model.properties.property_method import equilibrium_for

    try:
        equilibrium = equilibrium_for(basis)
    except InputError:
        return None
    points: dict[str, list[Any]] = {"Bubble point": [], "Dew point": []}
    for state in states:
        for label, vapor_fraction in (("Bubble point", 0.0), ("Dew point", 1.0)):
            points[label].append(
                equilibrium.saturation(state.flows, state.P, vapor_fraction, state.T)
            )
    return points


def _vapor_fraction(state: Any) -> float:
    """Molar vapor fraction (0 for a stream with no flow)."""
    return state.vapor_fraction() if state.total_molar_flow() > 0.0 else 0.0


def _mole_fraction(state: Any, index: int) -> float:
    return float(state.mole_fractions()[index]) if state.total_molar_flow() > 0.0 else 0.0


def stream_table_text(table: StreamTable) -> str:
    """The stream table as aligned plain text: a line of stream numbers (when the
    streams have them), a line of names, then one line per quantity with its unit."""
    lines = []
    if any(table.column_numbers()):
        lines.append(["Stream", *table.column_numbers()])
    lines.append(["", *table.columns])
    for row in table.rows:
        label = f"{row.label} [{row.unit}]" if row.unit else row.label
        lines.append([label, *row.cells()])
    widths = [max(len(line[i]) for line in lines) for i in range(len(lines[0]))]
    return "\n".join(
        "  ".join(
            cell.ljust(widths[0]) if i == 0 else cell.rjust(widths[i])
            for i, cell in enumerate(line)
        ).rstrip()
        for line in lines
    )


def stream_table_rows(table: StreamTable) -> list[list[Any]]:
    """The stream table as rows of cells for a CSV file or a spreadsheet: the stream
    numbers (``"Stream"``), the names (``"Quantity"``, ``"Unit"``), then per quantity its
    label, unit and values in the unit (numbers as floats, round-off as 0)."""
    rows: list[list[Any]] = [
        ["Stream", "", *table.column_numbers()],
        ["Quantity", "Unit", *table.columns],
    ]
    rows += [[row.label, row.unit, *row.shown()] for row in table.rows]
    return rows
