"""The balance closures as rows in display units, for the spreadsheet, CSV and report.

The closures themselves are computed by :mod:`model.solve.balance` (in internal units);
here each balance becomes a row: what is balanced, in, out, the unit, the relative
closure and the verdict. Elements carry only their flows: the balance report keeps the
largest relative closure of all elements, shown on the ``"Elements"`` row.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from model.solve.balance import CLOSURE_FACTOR
from units_of_measure import from_internal, get_unit_system


@dataclass(frozen=True)
class ClosureRow:
    """One balance: ``incoming`` and ``outgoing`` in ``unit`` (NaN where the row has no
    such number), its ``relative_closure`` (NaN where not computed) and ``verdict``."""

    balance: str
    incoming: float
    outgoing: float
    unit: str
    relative_closure: float
    verdict: str


def closure_rows(balance: Any, unit_system: str) -> list[ClosureRow]:
    """Rows of ``balance`` (a :class:`model.solve.balance.BalanceReport`, or None: no rows)."""
    if balance is None:
        return []
    system = get_unit_system(unit_system)
    nan = math.nan

    def row(name: str, kind: str, values: tuple[float, float], closure: float, check: str):
        unit = system.unit_for(kind)
        shown = [from_internal(v, kind, unit) if math.isfinite(v) else v for v in values]
        verdict = "" if not check else "does not close" if check in balance.failing else "closes"
        return ClosureRow(name, shown[0], shown[1], "" if unit == "1" else unit, closure, verdict)

    rows = [
        row("Mass", "mass_flow", (balance.mass_in, balance.mass_out), balance.mass_closure, "mass")
    ]
    rows += [
        row(f"Element {element} (atoms)", "molar_flow", flows, nan, "")
        for element, flows in balance.elements.items()
    ]
    if balance.elements:
        largest = f"Elements (largest: {balance.worst_element})"
        rows.append(row(largest, "fraction", (nan, nan), balance.element_closure, "elements"))
    return [
        *rows,
        row("Energy: feeds' enthalpy", "power", (balance.enthalpy_in, nan), nan, ""),
        row("Energy: block duties (heat added)", "power", (balance.duties, nan), nan, ""),
        row(
            "Energy",
            "power",
            (balance.energy_in, balance.energy_out),
            balance.energy_closure,
            "energy",
        ),
    ]


def closure_threshold_text(balance: Any) -> str:
    """The line that says what "closes" means, e.g. ``"A balance closes when ..."``."""
    if balance is None:
        return "No balance: the flowsheet was not solved."
    return (
        f"A balance closes when its relative closure is at most {balance.threshold:.1e} "
        f"({CLOSURE_FACTOR:g} x the solver tolerance)."
    )
