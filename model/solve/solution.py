"""What a solve returns: every stream's state, every block's results, how it converged.

A :class:`FlowsheetSolution` is plain data; :meth:`FlowsheetSolution.to_dict` gives the
JSON-able form the case file stores and :meth:`FlowsheetSolution.from_dict` rebuilds it
(the property basis from the flowsheet's components).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from convergence import ConvergenceHistory, FixedPointResult, TearDiagnosis
from model.blocks.result import BlockResult
from model.properties.stream_state import StreamState
from model.validation.issue import Issue

if TYPE_CHECKING:
    from model.properties.enthalpy import PropertyBasis
    from model.solve.balance import BalanceReport

#: The states a solution can be in (DESIGN.md vocabulary, plus "failed").
SOLUTION_STATUSES = ("solved", "not converged", "stopped", "needs input", "failed")


def _stream_to_dict(state: StreamState) -> dict[str, Any]:
    return {
        "flows_mol_s": state.flows.tolist(),
        "T_K": state.T,
        "P_Pa": state.P,
        "phase": state.phase,
    }


def _stream_from_dict(data: dict[str, Any]) -> StreamState:
    return StreamState(
        np.array(data["flows_mol_s"], dtype=float),
        float(data["T_K"]),
        float(data["P_Pa"]),
        str(data["phase"]),
    )


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


@dataclass
class FlowsheetSolution:
    """Result of :func:`model.solve.driver.solve_flowsheet`.

    ``status`` is one of :data:`SOLUTION_STATUSES`; ``converged`` is True only for
    "solved". ``streams`` and ``blocks`` are empty for "needs input" and may be
    partial for "failed". ``convergence`` is None for a flowsheet without recycle
    (solved in one pass). ``passes`` counts flowsheet passes, the final one included.
    """

    status: str
    converged: bool
    message: str
    basis: PropertyBasis | None
    component_names: list[str]
    streams: dict[str, StreamState] = field(default_factory=dict)
    blocks: dict[str, BlockResult] = field(default_factory=dict)
    tear_streams: list[str] = field(default_factory=list)
    calculation_order: list[str] = field(default_factory=list)
    convergence: FixedPointResult | None = None
    passes: int = 0
    balance: BalanceReport | None = None
    issues: list[Issue] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        """JSON-able form for the case file (the basis is not stored)."""
        return {
            "status": self.status,
            "converged": self.converged,
            "message": self.message,
            "component_names": list(self.component_names),
            "streams": {name: _stream_to_dict(s) for name, s in self.streams.items()},
            "blocks": {name: r.to_dict() for name, r in self.blocks.items()},
            "tear_streams": list(self.tear_streams),
            "calculation_order": list(self.calculation_order),
            "convergence": None
            if self.convergence is None
            else convergence_to_dict(self.convergence),
            "passes": self.passes,
            "balance": None if self.balance is None else self.balance.to_dict(),
            "issues": [issue.to_dict() for issue in self.issues],
        }

    @classmethod
    def from_dict(cls, data: dict[str, Any], source: Any = None) -> FlowsheetSolution:
        """Rebuild from :meth:`to_dict`; ``source`` gives the basis: a
        :class:`~model.properties.enthalpy.PropertyBasis`, or a flowsheet whose components
        make one."""
        from model.properties.enthalpy import PropertyBasis
        from model.solve.balance import BalanceReport

        basis = source
        if source is not None and not isinstance(source, PropertyBasis):
            basis = PropertyBasis(source.components) if source.components else None
        convergence = data.get("convergence")
        balance = data.get("balance")
        return cls(
            status=str(data["status"]),
            converged=bool(data["converged"]),
            message=str(data["message"]),
            basis=basis,
            component_names=[str(n) for n in data.get("component_names", [])],
            streams={n: _stream_from_dict(s) for n, s in data.get("streams", {}).items()},
            blocks={n: BlockResult.from_dict(r) for n, r in data.get("blocks", {}).items()},
            tear_streams=[str(n) for n in data.get("tear_streams", [])],
            calculation_order=[str(n) for n in data.get("calculation_order", [])],
            convergence=None if convergence is None else convergence_from_dict(convergence),
            passes=int(data.get("passes", 0)),
            balance=None if balance is None else BalanceReport.from_dict(balance),
            issues=[Issue.from_dict(i) for i in data.get("issues", [])],
        )
