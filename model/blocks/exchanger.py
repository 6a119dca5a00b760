"""Exchanger: counter-current, two streams; one outlet T or the duty fixes the other side.

The duty Q is the heat passed from the hot side to the cold side (W). Counter-current
end differences: ``dT_hot_end = T_hot_in - T_cold_out`` and
``dT_cold_end = T_hot_out - T_cold_in``; ``LMTD = (dT1 - dT2) / ln(dT1 / dT2)``, with
its limit ``(dT1 + dT2) / 2`` when the two are equal; ``UA = Q / LMTD``. A temperature
cross (an end difference at or below zero), an approach below the minimum, a negative
duty or a "hot" inlet colder than the "cold" one are reported as warnings: the balance
is still exact, but the exchanger as specified cannot be built that way.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from model.blocks.base import (
    BlockOutput,
    CompiledBlock,
    enthalpies,
    one_phase,
    outlet_pressure,
    temperature_for_enthalpy,
)
from model.blocks.result import BlockResult
from model.errors import CalculationError
from model.flowsheet.kinds import AS_INLET
from model.properties.stream_state import StreamState

#: Relative difference of the end differences below which the LMTD is their mean.
EQUAL_ENDS = 1e-6


@dataclass(kw_only=True)
class CompiledExchanger(CompiledBlock):
    """``mode`` picks ``hot_T``, ``cold_T`` (K) or ``duty`` (W, hot to cold)."""

    mode: str
    hot_T: float | None
    cold_T: float | None
    duty: float | None
    hot_phase: str | None
    cold_phase: str | None
    minimum_approach: float | None
    hot_pressure_drop: float
    cold_pressure_drop: float


def build_exchanger(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledExchanger:
    def phase(name: str) -> str | None:
        value = specs.get(name, AS_INLET)
        return None if value == AS_INLET else value

    return CompiledExchanger(
        **common,
        mode=specs.get("mode", "cold outlet temperature"),
        hot_T=specs.get("hot_T"),
        cold_T=specs.get("cold_T"),
        duty=specs.get("duty"),
        hot_phase=phase("hot_phase"),
        cold_phase=phase("cold_phase"),
        minimum_approach=specs.get("minimum_approach"),
        hot_pressure_drop=float(specs.get("hot_pressure_drop") or 0.0),
        cold_pressure_drop=float(specs.get("cold_pressure_drop") or 0.0),
    )


def log_mean_temperature_difference(dT1: float, dT2: float) -> float:
    """LMTD of two positive end differences, with the equal-ends limit."""
    if abs(dT1 - dT2) <= EQUAL_ENDS * max(dT1, dT2):
        return 0.5 * (dT1 + dT2)
    return (dT1 - dT2) / math.log1p((dT1 - dT2) / dT2)  # log1p: no cancellation near 1


def _enthalpy_at(basis, state: StreamState, T: float, phase: str) -> float:
    return basis.stream_enthalpy_flow(state.flows, T, phase == "liquid")


def _duty_and_outlet_temperatures(
    block, basis, hot, cold, hot_phase, cold_phase, h_hot, h_cold, strict, warnings
) -> tuple[float, float, float]:
    """Q (hot to cold) and the hot and cold outlet temperatures."""
    hot_T, cold_T = block.hot_T, block.cold_T
    if block.mode == "hot outlet temperature":
        duty = h_hot - _enthalpy_at(basis, hot, hot_T, hot_phase)
    elif block.mode == "cold outlet temperature":
        duty = _enthalpy_at(basis, cold, cold_T, cold_phase) - h_cold
    else:
        duty = float(block.duty)
    empty = [side for side, state in (("hot", hot), ("cold", cold)) if state.flows.sum() <= 0.0]
    if empty and duty != 0.0:
        detail = f"duty {duty:.6g} W cannot pass with no flow on the {empty[0]} side"
        if strict:
            raise CalculationError(block.name, detail)
        warnings.append(detail)
        duty, hot_T, cold_T = 0.0, hot.T, cold.T
    if block.mode != "hot outlet temperature" or hot_T is None:
        hot_T = temperature_for_enthalpy(
            block,
            basis,
            hot.flows,
            h_hot - duty,
            hot_phase == "liquid",
            hot.T,
            strict,
            warnings,
            "hot outlet",
        )
    if block.mode != "cold outlet temperature" or cold_T is None:
        cold_T = temperature_for_enthalpy(
            block,
            basis,
            cold.flows,
            h_cold + duty,
            cold_phase == "liquid",
            cold.T,
            strict,
            warnings,
            "cold outlet",
        )
    return duty, float(hot_T), float(cold_T)


def _checks(
    block: CompiledExchanger, duty: float, T: dict[str, float], warnings: list[str]
) -> dict[str, tuple[float, str]]:
    """LMTD and UA when they exist; warnings for cross, approach and direction."""
    values: dict[str, tuple[float, str]] = {}
    hot_end = T["hot_in"] - T["cold_out"]
    cold_end = T["hot_out"] - T["cold_in"]
    values["hot end approach"] = (hot_end, "temperature_difference")
    values["cold end approach"] = (cold_end, "temperature_difference")
    if T["hot_in"] < T["cold_in"]:
        warnings.append(
            f"the hot inlet ({T['hot_in']:.2f} K) is colder than the cold inlet "
            f"({T['cold_in']:.2f} K); swap the streams"
        )
    if duty < 0.0:
        warnings.append(
            f"negative duty {duty:.6g} W: heat would flow from the cold side to the hot side"
        )
    if min(hot_end, cold_end) <= 0.0:
        warnings.append(
            f"temperature cross: end differences {hot_end:.3f} K (hot end) and "
            f"{cold_end:.3f} K (cold end); a counter-current exchanger cannot "
            "do this duty"
        )
    elif block.minimum_approach is not None and min(hot_end, cold_end) < block.minimum_approach:
        warnings.append(
            f"approach {min(hot_end, cold_end):.3f} K is below the minimum "
            f"{block.minimum_approach:.3f} K"
        )
    if hot_end > 0.0 and cold_end > 0.0 and duty > 0.0:
        lmtd = log_mean_temperature_difference(hot_end, cold_end)
        values["LMTD"] = (lmtd, "temperature_difference")
        values["UA"] = (duty / lmtd, "heat_transfer_coefficient_area")
    return values


def compute_exchanger(
    block: CompiledExchanger, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    hot, cold = inlets
    hot_phase = one_phase(block, block.hot_phase or hot.phase, "hot_phase")
    cold_phase = one_phase(block, block.cold_phase or cold.phase, "cold_phase")
    h_hot, h_cold = enthalpies(basis, [hot, cold])
    warnings: list[str] = []
    duty, hot_T, cold_T = _duty_and_outlet_temperatures(
        block,
        basis,
        hot,
        cold,
        hot_phase,
        cold_phase,
        float(h_hot),
        float(h_cold),
        strict,
        warnings,
    )
    outlets = {
        "hot_out": StreamState(
            hot.flows, hot_T, outlet_pressure(block, hot.P, block.hot_pressure_drop), hot_phase
        ),
        "cold_out": StreamState(
            cold.flows, cold_T, outlet_pressure(block, cold.P, block.cold_pressure_drop), cold_phase
        ),
    }
    temperatures = {"hot_in": hot.T, "cold_in": cold.T, "hot_out": hot_T, "cold_out": cold_T}
    values = _checks(block, duty, temperatures, warnings)
    return BlockOutput(outlets, BlockResult(duty_W=duty, values=values, warnings=warnings))
