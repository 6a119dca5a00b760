"""Reactor: reactions at fixed fractional conversion of a key reactant, applied in order.

Each reaction's extent is ``conversion * F_key / |nu_key|`` of the key reactant's flow
*as it stands when that reaction is applied* (after the reactions before it). The
standard heat of reaction per unit extent comes from the formation enthalpies (Hess's
law); the energy balance needs no separate heat-of-reaction term because enthalpies
are on a formation basis.

An outlet phase "equilibrium" makes the outlet the case's flash at the outlet P and the
set T, or, adiabatic or with a duty, at the inlet enthalpy plus the duty (the PH flash
of :mod:`model.blocks.equilibrium_outlet`); the duty is then ``H_out - H_in``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from model.blocks.base import (
    ROUNDING,
    BlockOutput,
    CompiledBlock,
    SetTemperatureEnthalpy,
    energy_outlet,
    enthalpy,
    inlet_enthalpy,
    one_phase,
    outlet_pressure,
)
from model.blocks.equilibrium_outlet import flash_at_enthalpy
from model.blocks.result import BlockResult
from model.errors import CalculationError
from model.flowsheet.kinds import AS_INLET, EQUILIBRIUM
from model.properties.property_method import equilibrium_for
from model.properties.stream_state import TWO_PHASE, StreamState


@dataclass(kw_only=True)
class CompiledReactor(CompiledBlock):
    """Reactions as arrays: ``stoichiometry`` (reactions, components), ``key_index``,
    ``conversion``, ``labels`` and ``heats_of_reaction`` (J/mol of extent, 298.15 K)."""

    stoichiometry: np.ndarray
    key_index: np.ndarray
    conversion: np.ndarray
    labels: tuple[str, ...]
    heats_of_reaction: np.ndarray
    component_names: tuple[str, ...]
    mode: str
    T: float | None
    duty: float | None
    phase: str | None
    pressure_drop: float
    at_set_temperature: SetTemperatureEnthalpy | None = None


def build_reactor(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledReactor:
    reactions = specs["reactions"]
    stoichiometry = np.zeros((len(reactions), len(basis.names)))
    for row, reaction in enumerate(reactions):
        for component, coefficient in reaction.stoichiometry.items():
            stoichiometry[row, basis.index(component)] = coefficient
    heats = np.array([float(basis.standard_heat_of_reaction(row)) for row in stoichiometry])
    phase = specs.get("phase", AS_INLET)
    return CompiledReactor(
        **common,
        stoichiometry=stoichiometry,
        key_index=np.array([basis.index(r.key) for r in reactions], dtype=int),
        conversion=np.array([float(r.conversion) for r in reactions]),
        labels=tuple(r.label or f"R{number}" for number, r in enumerate(reactions, start=1)),
        heats_of_reaction=heats,
        component_names=tuple(basis.names),
        mode=specs.get("mode", "outlet temperature"),
        T=specs.get("T"),
        at_set_temperature=(
            SetTemperatureEnthalpy(basis, specs["T"])
            if specs.get("mode", "outlet temperature") == "outlet temperature"
            else None
        ),
        duty=specs.get("duty"),
        phase=None if phase == AS_INLET else phase,
        pressure_drop=float(specs.get("pressure_drop") or 0.0),
    )


def _shortfall_message(block: CompiledReactor, row: int, flows: np.ndarray, extent: float) -> str:
    need = -extent * block.stoichiometry[row]
    short = int(np.argmax(need - flows))
    return (
        f"reaction {block.labels[row]} at conversion {block.conversion[row]:g} of "
        f"{block.component_names[block.key_index[row]]} needs "
        f"{need[short]:.6g} mol/s of {block.component_names[short]} but only "
        f"{flows[short]:.6g} mol/s is present; lower the conversion or feed more "
        f"{block.component_names[short]}"
    )


def react(
    block: CompiledReactor, flows: np.ndarray, strict: bool, warnings: list[str]
) -> tuple[np.ndarray, np.ndarray]:
    """Outlet flows and the extent of each reaction (mol/s), reactions in order.

    A reaction needing more of a reactant than is present is a
    :class:`~model.errors.CalculationError` in a strict pass; while a recycle iterates
    its extent is limited to the reactant present, with a warning.
    """
    extents = np.zeros(len(block.labels))
    scale = max(0.0, *flows.tolist(), 1e-300)  # Python's max: cheaper than numpy's for few
    for row in range(len(block.labels)):
        nu = block.stoichiometry[row]
        key = block.key_index[row]
        extent = block.conversion[row] * flows[key] / -nu[key]
        after = flows + extent * nu
        if after.min() < -ROUNDING * scale:  # (NaN flows: False, as np.any(NaN < x))
            if strict:
                raise CalculationError(block.name, _shortfall_message(block, row, flows, extent))
            warnings.append(_shortfall_message(block, row, flows, extent))
            reactants = nu < 0.0
            extent = float(np.min(flows[reactants] / -nu[reactants]))
            after = flows + extent * nu
        flows = np.maximum(after, 0.0)
        extents[row] = extent
    return flows, extents


def compute_reactor(
    block: CompiledReactor, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    """Apply the reactions, then the energy mode (outlet T, adiabatic or duty)."""
    inlet = inlets[0]
    warnings: list[str] = []
    flows, extents = react(block, inlet.flows, strict, warnings)
    P = outlet_pressure(block, inlet.P, block.pressure_drop)
    values: dict[str, tuple[float, str]] = {}
    for label, extent, heat in zip(block.labels, extents, block.heats_of_reaction, strict=True):
        values[f"extent {label}"] = (float(extent), "molar_flow")
        values[f"heat of reaction {label}"] = (float(heat), "molar_enthalpy")
    if block.phase == EQUILIBRIUM:
        outlet, duty = _equilibrium_outlet(block, inlet, flows, P, basis, strict, warnings)
        values["vapor fraction"] = (outlet.vapor_fraction(), "")
        if block.mode != "outlet temperature":
            values["temperature"] = (float(outlet.T), "temperature")
        return BlockOutput(
            {"out": outlet}, BlockResult(duty_W=duty, values=values, warnings=warnings)
        )
    phase = one_phase(block, block.phase or inlet.phase)
    T, duty, outlet_enthalpy, heat_capacity = energy_outlet(
        block,
        basis,
        flows,
        phase,
        inlet_enthalpy(block, basis, inlet, 0),
        block.mode,
        block.T,
        block.duty,
        inlet.T,
        strict,
        warnings,
        block.at_set_temperature,
    )
    result = BlockResult(duty_W=duty, values=values, warnings=warnings)
    outlet = StreamState(flows, T, P, phase, outlet_enthalpy, None, heat_capacity)
    return BlockOutput({"out": outlet}, result)


def _equilibrium_outlet(
    block: CompiledReactor,
    inlet: StreamState,
    flows: np.ndarray,
    P: float,
    basis,
    strict: bool,
    warnings: list[str],
) -> tuple[StreamState, float]:
    """The outlet as the property method's flash, and the duty ``H_out - H_in`` (W)."""
    equilibrium = equilibrium_for(basis)
    h_in = enthalpy(basis, inlet)
    if block.mode == "outlet temperature":
        result = equilibrium.flash_TP(flows, float(block.T), P)
    else:
        added = float(block.duty) if block.mode == "duty" else 0.0
        field = "duty" if block.mode == "duty" else "mode"
        result = flash_at_enthalpy(
            block, equilibrium, flows, P, h_in + added, inlet.T, strict, warnings, field
        )
    h_out = float(equilibrium.enthalpy_flow(result))
    vapor = result.vapor_flows if result.phase == TWO_PHASE else None
    return StreamState(flows, result.T, P, result.phase, h_out, vapor), h_out - h_in
