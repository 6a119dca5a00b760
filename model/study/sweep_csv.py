"""A sweep's results as CSV: the cautions, then one row per point.

Columns: each varied spec (in its unit), each recorded result in the unit a user
reads it in (the unit system's display unit of its kind; mole fractions as fractions),
then converged, status and the message (the reason a point did not converge). The
same text is what the sweep dialog copies and exports.
"""

from __future__ import annotations

import csv
import io
import math

from model.report.cautions import CAUTIONS
from model.study.sweep_run import SweepResult
from units_of_measure import from_internal, get_unit_system


def record_unit(kind: str, unit_system: str) -> str:
    """The display unit of a recorded quantity kind in ``unit_system`` ("" for fractions)."""
    if kind == "fraction":
        return ""
    return get_unit_system(unit_system).unit_for(kind)


def record_headers(result: SweepResult, unit_system: str) -> list[str]:
    headers = []
    for record in result.plan.records:
        unit = record_unit(record.kind, unit_system)
        headers.append(f"{record} [{unit}]" if unit else str(record))
    return headers


def displayed(value: float, kind: str, unit_system: str) -> float:
    """An internal value in the display unit of ``record_unit``."""
    unit = record_unit(kind, unit_system)
    if not unit or not math.isfinite(value):
        return value
    return from_internal(value, kind, unit)


def sweep_csv(result: SweepResult, unit_system: str = "Metric") -> str:
    """The CSV text (module docstring)."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(["# " + " ".join(CAUTIONS)])
    headers = [v.label for v in result.plan.variations] + record_headers(result, unit_system)
    writer.writerow([*headers, "converged", "status", "message"])
    kinds = [record.kind for record in result.plan.records]
    for point in result.points:
        recorded = [
            "" if not math.isfinite(v) else repr(displayed(v, kind, unit_system))
            for v, kind in zip(point.recorded, kinds, strict=True)
        ]
        values = [repr(float(v)) for v in point.values]
        writer.writerow(
            [*values, *recorded, "yes" if point.converged else "no", point.status, point.message]
        )
    return out.getvalue()
