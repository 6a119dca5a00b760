"""Feed and Product: where material enters and leaves the flowsheet."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from model.blocks.base import BlockOutput, CompiledBlock
from model.blocks.result import BlockResult
from model.properties.stream_state import StreamState


@dataclass(kw_only=True)
class CompiledFeed(CompiledBlock):
    """A feed's outlet, fixed: component flows (mol/s), T (K), P (Pa), phase."""

    state: StreamState


@dataclass(kw_only=True)
class CompiledProduct(CompiledBlock):
    """A product takes its inlet; nothing to compute."""


def feed_flows(specs: dict[str, Any], basis) -> np.ndarray:
    """Component flows in mol/s from a feed's internal specs.

    ``specs["flows"]`` is ``(values by component, kind)`` with values already in
    mol/s or kg/s; ``specs["total_flow"]`` is ``(value, kind)`` and
    ``specs["composition"]`` ``(fractions by component, "mole fraction" | "mass fraction")``.
    """
    molar_mass = np.asarray(basis.molar_mass, dtype=float)
    flows = np.zeros(len(basis.names))
    if specs.get("basis", "component flows") == "component flows":
        values, kind = specs["flows"]
        for component, value in values.items():
            flows[basis.index(component)] = value
        return flows / molar_mass if kind == "mass_flow" else flows
    total, total_kind = specs["total_flow"]
    fractions, fraction_basis = specs["composition"]
    for component, value in fractions.items():
        flows[basis.index(component)] = value
    if fraction_basis == "mass fraction":  # mass fractions -> mole fractions
        flows = flows / molar_mass
        flows /= flows.sum()
    if total_kind == "mass_flow":
        total = total / float(flows @ molar_mass)
    return total * flows


def build_feed(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledFeed:
    flows = feed_flows(specs, basis)
    state = StreamState(flows, float(specs["T"]), float(specs["P"]), specs.get("phase", "vapor"))
    state.enthalpy, state.heat_capacity = basis.stream_enthalpy_and_heat_capacity_flow(
        flows, state.T, state.liquid
    )  # once a solve
    return CompiledFeed(**common, state=state)


def build_product(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledProduct:
    return CompiledProduct(**common)


def compute_feed(
    block: CompiledFeed, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    result = BlockResult(values={"total flow": (float(block.state.flows.sum()), "molar_flow")})
    return BlockOutput({"out": block.state}, result)


def compute_product(
    block: CompiledProduct, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    return BlockOutput({}, BlockResult())
