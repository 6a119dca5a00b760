"""A convergence result as JSON-able data and back, for the case file.

:func:`convergence_to_dict` stores a :class:`convergence.FixedPointResult` (its history,
diagnosis and summary fields); :func:`convergence_from_dict` rebuilds it. Non-finite
numbers are stored as None (JSON null) so the case file stays strict JSON.
"""

from __future__ import annotations

import dataclasses
import math
from typing import Any

import numpy as np

from convergence import ConvergenceHistory, FixedPointResult, TearDiagnosis

__all__ = ["convergence_from_dict", "convergence_to_dict"]


def _plain(value: Any) -> Any:
    """A JSON-safe copy: tuples to lists, non-finite floats to None."""
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    return value


def _number(value: Any) -> float:
    return math.nan if value is None else float(value)


def _numbers(values: Any) -> np.ndarray:
    """A float array from a stored list; None (a non-finite value) comes back as NaN."""
    if not isinstance(values, list):
        raise TypeError(f"a list of numbers is needed, not {type(values).__name__}")
    return np.array([_number(v) for v in values], dtype=float)


def convergence_to_dict(result: FixedPointResult) -> dict[str, Any]:
    """The convergence result as its history dict plus the summary fields.

    Non-finite numbers (e.g. ``gx`` of a "not finite" run) are stored as None (JSON
    null), so the case file stays strict JSON. ``largest_estimated_error`` is stored
    when the result has it.
    """
    data = {
        "converged": result.converged,
        "status": result.status,
        "message": result.message,
        "method": result.method,
        "iterations": result.iterations,
        "evaluations": result.evaluations,
        "largest_residual": _plain(float(result.largest_residual)),
        "x": _plain(result.x.tolist()),
        "gx": _plain(result.gx.tolist()),
        "history": result.history.to_dict(),
        "diagnosis": {tear: _plain(dataclasses.asdict(d)) for tear, d in result.diagnosis.items()},
    }
    estimated_error = getattr(result, "largest_estimated_error", None)
    if estimated_error is not None:
        data["largest_estimated_error"] = _plain(float(estimated_error))
    return data


def _diagnosis_from_dict(data: dict[str, Any]) -> TearDiagnosis:
    """A tear diagnosis; float fields stored as None (non-finite) come back as NaN."""
    known = {f.name: f.type for f in dataclasses.fields(TearDiagnosis)}
    values = {name: value for name, value in data.items() if name in known}
    for name, kind in known.items():
        if name in values and kind in ("float", float):
            values[name] = _number(values[name])
    values["suggested_bounds"] = tuple(_number(v) for v in values["suggested_bounds"])
    return TearDiagnosis(**values)


def convergence_from_dict(data: dict[str, Any]) -> FixedPointResult:
    """Inverse of :func:`convergence_to_dict` (files without ``largest_estimated_error``
    load with it NaN)."""
    return FixedPointResult(
        converged=bool(data["converged"]),
        status=str(data["status"]),
        message=str(data["message"]),
        x=_numbers(data["x"]),
        gx=_numbers(data["gx"]),
        iterations=int(data["iterations"]),
        evaluations=int(data["evaluations"]),
        history=ConvergenceHistory.from_dict(data["history"]),
        diagnosis={t: _diagnosis_from_dict(d) for t, d in data.get("diagnosis", {}).items()},
        method=str(data.get("method", "wegstein")),
        largest_residual=_number(data.get("largest_residual")),
        largest_estimated_error=_number(data.get("largest_estimated_error")),
    )
