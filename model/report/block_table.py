"""Block results as rows: every duty, every computed value, every warning, in units.

One row per result: the block, its kind, the quantity, the display unit and the value
in that unit. A block's results are whatever its :class:`model.blocks.result.BlockResult`
holds (a reactor's extents and heats of reaction, an exchanger's approaches, LMTD and
UA ...), so a new result of a block kind shows up in every report without a change
here. The text report, the CSV file and the spreadsheet are all made from these rows.

Other results (for example the targets of a later version) join through
:data:`RESULT_SOURCES`: each source is a function ``(solution, system, order) ->
list[ResultRow]`` whose rows follow the block rows; ``ResultRow.item`` and
``ResultRow.kind`` then name the target and say what it is.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from model.report.report_order import ReportOrder
from units_of_measure import UnitError, from_internal, get_kind, get_unit_system

#: Quantity name of a block's warning rows (their value is the warning's text).
WARNING = "warning"


@dataclass(frozen=True)
class ResultRow:
    """One result of one block (or other item) in display units.

    Attributes
    ----------
    item
        The block's name.
    kind
        The block's kind (``"Reactor"``), ``""`` when unknown.
    quantity
        What the value is: ``"duty"``, ``"extent N2 + 3 H2 = 2 NH3"``, ``"LMTD"``,
        or :data:`WARNING`.
    unit
        Display unit of ``value``; ``""`` for plain numbers and text.
    value
        The number in ``unit`` (NaN where the block could not compute it), or the
        warning's text.
    """

    item: str
    kind: str
    quantity: str
    unit: str
    value: float | str

    @property
    def is_number(self) -> bool:
        return not isinstance(self.value, str)


def _known_kind(kind: str) -> str | None:
    """The ``units_of_measure`` kind for a result's kind name (``"UA"`` is its alias ``"ua"``)."""
    for candidate in (kind, kind.lower()):
        try:
            return get_kind(candidate).name
        except UnitError:
            continue
    return None


def shown_value(value: float | None, kind: str, system: Any) -> tuple[float, str]:
    """``(number in the system's unit, unit)`` for an internal value of ``kind``.

    Plain numbers (``kind == ""``) have no unit; a kind the unit layer does not know is
    left in internal units, and its unit says so.
    """
    number = math.nan if value is None else float(value)
    if not kind:
        return number, ""
    known = _known_kind(kind)
    if known is None:
        return number, f"internal units ({kind})"
    unit = system.unit_for(known)
    if not math.isfinite(number):
        return number, "" if unit == "1" else unit
    return from_internal(number, known, unit), "" if unit == "1" else unit


def block_result_rows(solution: Any, system: Any, order: ReportOrder) -> list[ResultRow]:
    """Rows of every block's duty, values and warnings, blocks in ``order``."""
    rows: list[ResultRow] = []
    names = [n for n in order.blocks if n in solution.blocks] or list(solution.blocks)
    for name in names:
        result = solution.blocks[name]
        kind = order.kinds.get(name, "")
        if result.duty_W is not None:
            rows.append(ResultRow(name, kind, "duty", *_flipped(result.duty_W, "power", system)))
        for label, (value, value_kind) in result.values.items():
            rows.append(ResultRow(name, kind, label, *_flipped(value, value_kind, system)))
        rows += [ResultRow(name, kind, WARNING, "", text) for text in result.warnings]
    return rows


def _flipped(value: float | None, kind: str, system: Any) -> tuple[str, float]:
    number, unit = shown_value(value, kind, system)
    return unit, number


#: Where result rows come from, in report order (see the module docstring).
RESULT_SOURCES: list[Callable[[Any, Any, ReportOrder], list[ResultRow]]] = [block_result_rows]


def result_rows(
    solution: Any, unit_system: str, order: ReportOrder | None = None
) -> list[ResultRow]:
    """Every result row of ``solution`` in ``unit_system``: blocks first, then any other
    source of :data:`RESULT_SOURCES`."""
    system = get_unit_system(unit_system)
    order = order or ReportOrder()
    return [row for source in RESULT_SOURCES for row in source(solution, system, order)]
