"""Heater (a cooler is a heater with negative duty): outlet T or duty, pressure drop."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from model.blocks.base import (
    BlockOutput,
    CompiledBlock,
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


def build_heater(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledHeater:
    phase = specs.get("phase", AS_INLET)
    return CompiledHeater(
        **common,
        mode=specs.get("mode", "outlet temperature"),
        T=specs.get("T"),
        duty=specs.get("duty"),
        phase=None if phase == AS_INLET else phase,
        pressure_drop=float(specs.get("pressure_drop") or 0.0),
    )


def compute_heater(
    block: CompiledHeater, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    inlet = inlets[0]
    phase = block.phase or inlet.phase
    P = outlet_pressure(block, inlet.P, block.pressure_drop)
    warnings: list[str] = []
    T, duty = energy_outlet(
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
    )
    outlet = StreamState(inlet.flows, T, P, phase)
    return BlockOutput({"out": outlet}, BlockResult(duty_W=duty, warnings=warnings))
