"""What a solve returns: every stream's state, every block's results, how it converged.

A :class:`FlowsheetSolution` is plain data; :meth:`FlowsheetSolution.to_dict` gives the
JSON-able form the case file stores and :meth:`FlowsheetSolution.from_dict` rebuilds it
(the property basis from the flowsheet's components).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from convergence import FixedPointResult
from model.blocks.result import BlockResult
from model.properties.stream_state import StreamState
from model.solve.convergence_data import convergence_from_dict, convergence_to_dict
from model.solve.part_results import PartSolution, label_records, parts_from_dict
from model.solve.target_results import TargetsOutcome
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
        "vapor_fraction": state.vapor_fraction(),
        **({} if state.vapor_flows is None else {"vapor_flows_mol_s": state.vapor_flows.tolist()}),
    }


def _stream_from_dict(data: dict[str, Any]) -> StreamState:
    vapor = data.get("vapor_flows_mol_s")
    return StreamState(
        np.array(data["flows_mol_s"], dtype=float),
        float(data["T_K"]),
        float(data["P_Pa"]),
        str(data["phase"]),
        vapor_flows=None if vapor is None else np.array(vapor, dtype=float),
    )


@dataclass
class FlowsheetSolution:
    """Result of :func:`model.solve.driver.solve_flowsheet`.

    ``status`` is one of :data:`SOLUTION_STATUSES`; ``converged`` is True only for
    "solved". ``streams`` and ``blocks`` are empty for "needs input" and may be
    partial for "failed". ``convergence`` is None for a flowsheet without recycle
    (solved in one pass).

    The loops are converged one strongly connected part at a time: ``parts`` holds each
    part's blocks, tears, own result, passes and block evaluations, in solve order, and
    ``convergence`` is their combined result (:func:`model.solve.part_results.combine_parts`).
    ``passes`` is the most passes any part needed (start, iterations and final pass over
    that part's blocks; 1 without recycle), since the parts' passes cover different
    blocks; ``block_evaluations`` counts every block calculation of the solve, the
    measure of its whole cost. Solutions stored before parts existed load with no
    ``parts`` and with ``block_evaluations`` 0 (not recorded).
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
    parts: list[PartSolution] = field(default_factory=list)
    block_evaluations: int = 0
    targets: TargetsOutcome | None = None  # the outer loop's report (model.solve.targets)

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
            "parts": [part.to_dict() for part in self.parts],
            "passes": self.passes,
            "block_evaluations": self.block_evaluations,
            "balance": None if self.balance is None else self.balance.to_dict(),
            "issues": [issue.to_dict() for issue in self.issues],
            **({} if self.targets is None else {"targets": self.targets.to_dict()}),
        }

    @classmethod
    def from_dict(cls, data: dict[str, Any], source: Any = None) -> FlowsheetSolution:
        """Rebuild from :meth:`to_dict`; ``source`` gives the basis: a
        :class:`~model.properties.enthalpy.PropertyBasis`, or a flowsheet whose components
        make one."""
        from model.properties.enthalpy import PropertyBasis
        from model.properties.property_method import case_basis
        from model.solve.balance import BalanceReport

        basis = source
        if source is not None and not isinstance(source, PropertyBasis):
            basis = case_basis(source) if source.components else None
        convergence = data.get("convergence")
        balance = data.get("balance")
        tear_streams = [str(n) for n in data.get("tear_streams", [])]
        combined = None if convergence is None else convergence_from_dict(convergence)
        parts = parts_from_dict(data.get("parts", []), combined, tear_streams)
        if parts and combined is not None:
            combined = label_records(combined, parts)
        return cls(
            status=str(data["status"]),
            converged=bool(data["converged"]),
            message=str(data["message"]),
            basis=basis,
            component_names=[str(n) for n in data.get("component_names", [])],
            streams={n: _stream_from_dict(s) for n, s in data.get("streams", {}).items()},
            blocks={n: BlockResult.from_dict(r) for n, r in data.get("blocks", {}).items()},
            tear_streams=tear_streams,
            calculation_order=[str(n) for n in data.get("calculation_order", [])],
            convergence=combined,
            passes=int(data.get("passes", 0)),
            balance=None if balance is None else BalanceReport.from_dict(balance),
            issues=[Issue.from_dict(i) for i in data.get("issues", [])],
            parts=parts,
            block_evaluations=int(data.get("block_evaluations", 0)),
            targets=None
            if data.get("targets") is None
            else TargetsOutcome.from_dict(data["targets"]),
        )
