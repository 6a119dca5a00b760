"""Splitter: outlets of the inlet's composition and state, by fraction or by one flow."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from model.blocks.base import BlockOutput, CompiledBlock
from model.blocks.result import BlockResult
from model.properties.stream_state import StreamState


@dataclass(kw_only=True)
class CompiledSplitter(CompiledBlock):
    """Either ``fractions`` (one per outlet, in outlet order, summing to 1) or a set
    ``flow`` (mol/s) for the outlet at ``flow_outlet`` (the other takes the rest)."""

    fractions: np.ndarray | None
    flow_outlet: int
    flow: float
    #: "fraction to <port>" per outlet, the names of the results (made once)
    value_names: tuple[str, ...] = field(default=(), init=False)

    def __post_init__(self) -> None:
        self.value_names = tuple(f"fraction to {port}" for port in self.outlet_ports)


def build_splitter(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledSplitter:
    outlets = common["outlet_ports"]
    if specs.get("mode", "fractions") == "outlet flow":
        return CompiledSplitter(
            **common,
            fractions=None,
            flow_outlet=outlets.index(specs["flow_port"]),
            flow=float(specs["flow"]),
        )
    given = specs["fractions"]
    missing = [port for port in outlets if port not in given]
    fractions = np.array([float(given.get(port, 0.0)) for port in outlets])
    if missing:  # validation allows at most one; it takes the remainder
        fractions[outlets.index(missing[0])] = max(0.0, 1.0 - fractions.sum())
    return CompiledSplitter(**common, fractions=fractions, flow_outlet=-1, flow=0.0)


def _set_flow_shares(block: CompiledSplitter, total: float, warnings: list[str]) -> np.ndarray:
    """Shares of the two outlets for a set outlet flow; more than the inlet is clipped."""
    if total <= 0.0:
        share = 0.0 if block.flow <= 0.0 else 1.0
    else:
        share = block.flow / total
    if share > 1.0 or (total <= 0.0 < block.flow):
        warnings.append(
            f"set flow {block.flow:.6g} mol/s of {block.outlet_ports[block.flow_outlet]}"
            f" exceeds the inlet flow {total:.6g} mol/s; the other outlet's flow "
            "would go negative and is clipped to zero"
        )
        share = 1.0
    shares = np.full(2, 1.0 - share)
    shares[block.flow_outlet] = share
    return shares


def compute_splitter(
    block: CompiledSplitter, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    inlet = inlets[0]
    warnings: list[str] = []
    if block.fractions is None:
        shares = _set_flow_shares(block, float(inlet.flows.sum()), warnings).tolist()
    else:
        shares = block.fractions.tolist()
    # enthalpy and heat capacity are linear in the flows at one T: they split too
    known, capacity, vapor = inlet.enthalpy, inlet.heat_capacity, inlet.vapor_flows
    outlets = {
        port: StreamState(
            inlet.flows * share,
            inlet.T,
            inlet.P,
            inlet.phase,
            None if known is None else known * share,
            None if vapor is None else vapor * share,
            None if capacity is None else capacity * share,
        )
        for port, share in zip(block.outlet_ports, shares, strict=True)
    }
    values = {
        name: (share, "fraction") for name, share in zip(block.value_names, shares, strict=True)
    }
    return BlockOutput(outlets, BlockResult(values=values, warnings=warnings))
