"""Heater (a cooler is a heater with negative duty): outlet T or duty, pressure drop.

The outlet phase is the inlet's, a named one, or "equilibrium": then the outlet is the
case's phase equilibrium (:mod:`model.properties.property_method`) at the outlet P and
either the set T (an isothermal flash) or the inlet enthalpy plus the duty (a flash at
that enthalpy, whose bracketed search on T has the latent heat inside), so the outlet
may be vapor, liquid or two-phase. A two-phase inlet kept "as inlet" is flashed too.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from model.blocks.base import (
    BlockOutput,
    CompiledBlock,
    SetTemperatureEnthalpy,
    energy_outlet,
    enthalpy,
    inlet_enthalpy,
    outlet_pressure,
)
from model.blocks.result import BlockResult
from model.errors import CalculationError, InputError
from model.flowsheet.kinds import AS_INLET, EQUILIBRIUM
from model.properties.phase_equilibrium import FlashResult
from model.properties.property_method import equilibrium_for
from model.properties.stream_state import TWO_PHASE, StreamState


@dataclass(kw_only=True)
class CompiledHeater(CompiledBlock):
    """``mode`` "outlet temperature" (``T``, K) or "duty" (``duty``, W added);
    ``phase`` None (the inlet's), "vapor", "liquid" or "equilibrium"."""

    mode: str
    T: float | None
    duty: float | None
    phase: str | None
    pressure_drop: float
    at_set_temperature: SetTemperatureEnthalpy | None = None


def build_heater(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledHeater:
    phase = specs.get("phase", AS_INLET)
    mode = specs.get("mode", "outlet temperature")
    T = specs.get("T")
    at_set = SetTemperatureEnthalpy(basis, T) if mode == "outlet temperature" else None
    return CompiledHeater(
        **common,
        mode=mode,
        T=T,
        duty=specs.get("duty"),
        phase=None if phase == AS_INLET else phase,
        pressure_drop=float(specs.get("pressure_drop") or 0.0),
        at_set_temperature=at_set,
    )


def compute_heater(
    block: CompiledHeater, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    inlet = inlets[0]
    phase = block.phase or inlet.phase
    P = outlet_pressure(block, inlet.P, block.pressure_drop)
    if phase in (EQUILIBRIUM, TWO_PHASE):
        return _equilibrium_outlet(block, inlet, P, basis, strict)
    warnings: list[str] = []
    T, duty, outlet_enthalpy, heat_capacity = energy_outlet(
        block,
        basis,
        inlet.flows,
        phase,
        inlet_enthalpy(block, basis, inlet, 0),
        block.mode,
        block.T,
        block.duty,
        inlet.T,
        strict,
        warnings,
        block.at_set_temperature,
        inlet.heat_capacity if phase == inlet.phase else None,
    )
    outlet = StreamState(inlet.flows, T, P, phase, outlet_enthalpy, None, heat_capacity)
    return BlockOutput({"out": outlet}, BlockResult(duty_W=duty, warnings=warnings))


def _equilibrium_outlet(
    block: CompiledHeater, inlet: StreamState, P: float, basis, strict: bool
) -> BlockOutput:
    """The outlet as the property method's flash; duty ``H_out - H_in``."""
    equilibrium = equilibrium_for(basis)
    h_in = enthalpy(basis, inlet)
    warnings: list[str] = []
    result = _flash(block, inlet, P, h_in, equilibrium, strict, warnings)
    h_out = float(equilibrium.enthalpy_flow(result))
    vapor = result.vapor_flows if result.phase == TWO_PHASE else None
    outlet = StreamState(inlet.flows, result.T, P, result.phase, h_out, vapor)
    values = {"vapor fraction": (float(result.vapor_fraction), "")}
    if block.mode != "outlet temperature":
        values["temperature"] = (float(result.T), "temperature")
    result_out = BlockResult(duty_W=h_out - h_in, values=values, warnings=warnings)
    return BlockOutput({"out": outlet}, result_out)


def _flash(
    block: CompiledHeater,
    inlet: StreamState,
    P: float,
    h_in: float,
    equilibrium,
    strict: bool,
    warnings: list[str],
) -> FlashResult:
    flows = inlet.flows
    if block.mode == "outlet temperature":
        return equilibrium.flash_TP(flows, float(block.T), P)
    duty = float(block.duty)
    if not flows.sum() > 0.0:
        if duty != 0.0:
            detail = f"{duty:.6g} W cannot go into the zero flow of the outlet"
            if strict:
                raise CalculationError(block.name, detail)
            warnings.append(detail)
        return equilibrium.flash_TP(flows, inlet.T, P)
    start = block.last_temperatures.get("outlet", inlet.T)
    try:
        result = equilibrium.flash_PH(flows, P, h_in + duty, start)
    except InputError as error:
        if strict:
            raise CalculationError(block.name, f"duty: {error.allowed}") from None
        # while the recycle iterates a tear value may ask the impossible for a moment
        warnings.append(f"duty not reached ({error.allowed}); flashed at the inlet T")
        return equilibrium.flash_TP(flows, inlet.T, P)
    block.last_temperatures["outlet"] = result.T
    return result
