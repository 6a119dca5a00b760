"""Heater (a cooler is a heater with negative duty): outlet T or duty, pressure drop."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from model.blocks.base import (
    BlockOutput,
    CompiledBlock,
    SetTemperatureEnthalpy,
    energy_outlet,
    enthalpy,
    outlet_pressure,
)
from model.blocks.result import BlockResult
from model.flowsheet.kinds import AS_INLET
from model.properties.stream_state import StreamState


@dataclass(kw_only=True)
class CompiledHeater(CompiledBlock):
    """``mode`` "outlet temperature" (``T``, K) or "duty" (``duty``, W added)."""

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
    warnings: list[str] = []
    T, duty, outlet_enthalpy = energy_outlet(
        block,
        basis,
        inlet.flows,
        phase,
        enthalpy(basis, inlet),
        block.mode,
        block.T,
        block.duty,
        inlet.T,
        strict,
        warnings,
        block.at_set_temperature,
    )
    outlet = StreamState(inlet.flows, T, P, phase, outlet_enthalpy)
    return BlockOutput({"out": outlet}, BlockResult(duty_W=duty, warnings=warnings))
