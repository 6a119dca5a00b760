"""The case summary that heads every export: what was solved, on what basis, how it went.

Pairs of (label, text) so the spreadsheet's summary sheet, the printed report's first
page and any other export show the same lines. The cautions are not among them: each
export puts :data:`model.report.cautions.CAUTIONS` above everything else.
"""

from __future__ import annotations

import datetime as _datetime
from pathlib import Path
from typing import Any

#: The property basis in plain words (DESIGN.md, "Engineering basis").
PROPERTY_BASIS = (
    "Ideal: enthalpy on the formation basis (elements at 298.15 K = 0), ideal-gas heat "
    "capacities, liquids by the heat of vaporization (Watson's correlation); ideal "
    "mixtures; phase equilibrium only in flash drums and outlets whose phase is "
    "'equilibrium', by the case's property method (every other outlet's phase is as "
    "specified); pressure does not change enthalpy."
)


def exported_at(when: _datetime.datetime | None = None) -> str:
    """The export's local date and time, e.g. ``"2025-03-14 09:26"``."""
    return (when or _datetime.datetime.now()).strftime("%Y-%m-%d %H:%M")


def status_text(solution: Any) -> str:
    """``"solved: converged in 6 iterations ..."``: the status, then the solver's message
    (which may start with the status itself)."""
    message = solution.message or ""
    if message.startswith(solution.status):
        return message
    return f"{solution.status}: {message}" if message else solution.status


def summary_rows(
    case: Any, source: str | Path | None = None, when: _datetime.datetime | None = None
) -> list[tuple[str, str]]:
    """(label, text) lines describing ``case`` (a :class:`model.case.document.Case`).

    ``source`` is the case file's path (its name is shown), ``when`` the export's time
    (default now).
    """
    solution = case.solution
    flowsheet = case.flowsheet
    components = ", ".join(f"{c.name} ({c.formula})" for c in flowsheet.components)
    rows = [
        ("Title", case.title or "(untitled case)"),
        ("Case file", Path(source).name if source else "(not saved)"),
        ("Exported", exported_at(when)),
        ("Unit system", case.unit_system),
        ("Property basis", PROPERTY_BASIS),
        ("Property method", flowsheet.property_method),
        ("Components", components or "(none)"),
    ]
    if solution is None:
        return [*rows, ("Solver status", "not solved")]
    rows += [
        ("Solver status", status_text(solution)),
        ("Method", case.method),
        ("Flowsheet passes", str(solution.passes)),
        ("Tear streams", ", ".join(solution.tear_streams) or "none (no recycle)"),
        ("Calculation order", " → ".join(solution.calculation_order)),
    ]
    balance = solution.balance
    if balance is not None:
        verdict = "close" if balance.closes else "do not close: " + ", ".join(balance.failing)
        rows.append(
            (
                "Balances",
                f"{verdict} (mass {balance.mass_closure:.1e}, elements "
                f"{balance.element_closure:.1e}, energy {balance.energy_closure:.1e}; "
                f"threshold {balance.threshold:.1e})",
            )
        )
    if case.notes:
        rows.append(("Notes", case.notes))
    return rows
