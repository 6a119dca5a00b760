"""Flash drum: vapor-liquid equilibrium of its feed at the drum's conditions.

Specified by the pressure (the inlet's if left empty) and one of: temperature, duty
(0: adiabatic) or vapor fraction. The split comes from the case's property method
(:mod:`model.properties.property_method`); the duty is ``H_vapor + H_liquid - H_in``.
A feed that stays in one phase leaves wholly by that phase's outlet, and the result
says so with its bubble point (liquid) or dew point (vapor).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from model.blocks.base import BlockOutput, CompiledBlock, enthalpy
from model.blocks.result import BlockResult
from model.errors import CalculationError, InputError
from model.properties.phase_equilibrium import EquilibriumSearch, FlashResult
from model.properties.property_method import equilibrium_for
from model.properties.stream_state import StreamState


@dataclass(kw_only=True)
class CompiledFlashDrum(CompiledBlock):
    """``mode`` "temperature" (``T``, K), "duty" (``duty``, W) or "vapor fraction";
    ``P`` Pa or None for the inlet's."""

    mode: str
    T: float | None
    P: float | None
    duty: float | None
    vapor_fraction: float | None
    equilibrium: EquilibriumSearch


def build_flash_drum(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledFlashDrum:
    return CompiledFlashDrum(
        **common,
        mode=specs.get("mode") or "temperature",
        T=specs.get("T"),
        P=specs.get("P"),
        duty=specs.get("duty"),
        vapor_fraction=specs.get("vapor_fraction"),
        equilibrium=equilibrium_for(basis),
    )


def compute_flash_drum(
    block: CompiledFlashDrum, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    inlet = inlets[0]
    P = inlet.P if block.P is None else block.P
    h_in = enthalpy(basis, inlet)
    warnings: list[str] = []
    result = _flash(block, inlet, P, h_in, strict, warnings)
    equilibrium = block.equilibrium
    h_vapor = basis.stream_enthalpy_flow(result.vapor_flows, result.T, False)
    h_liquid = basis.stream_enthalpy_flow(result.liquid_flows, result.T, True)
    outlets = {
        "vapor": StreamState(result.vapor_flows, result.T, P, "vapor", h_vapor),
        "liquid": StreamState(result.liquid_flows, result.T, P, "liquid", h_liquid),
    }
    values: dict[str, tuple[float, str]] = {
        "vapor fraction": (result.vapor_fraction, ""),
        "temperature": (result.T, "temperature"),
        "pressure": (P, "pressure"),
    }
    if inlet.flows.sum() > 0.0 and result.phase != "two-phase":
        # one phase: say where the other would appear (bubble point of a liquid feed,
        # dew point of a vapor feed)
        if result.phase == "liquid":
            point, name = equilibrium.bubble_point(inlet.flows, P, result.T), "bubble point"
        else:
            point, name = equilibrium.dew_point(inlet.flows, P, result.T), "dew point"
        if point is not None:
            values[name] = (point, "temperature")
        warnings.append(
            f"the feed stays {result.phase} at {result.T:.2f} K and {P:.6g} Pa"
            + ("" if point is None else f"; its {name} is {point:.2f} K")
        )
    duty = float(h_vapor + h_liquid - h_in)
    return BlockOutput(outlets, BlockResult(duty_W=duty, values=values, warnings=warnings))


def _flash(
    block: CompiledFlashDrum,
    inlet: StreamState,
    P: float,
    h_in: float,
    strict: bool,
    warnings: list[str],
) -> FlashResult:
    equilibrium = block.equilibrium
    flows = inlet.flows
    if block.mode == "temperature":
        return equilibrium.flash_TP(flows, block.T, P)
    if not flows.sum() > 0.0:
        return equilibrium.flash_TP(flows, inlet.T, P)
    try:
        if block.mode == "duty":
            return equilibrium.flash_PH(flows, P, h_in + float(block.duty), inlet.T)
        return equilibrium.flash_PV(flows, P, float(block.vapor_fraction), inlet.T)
    except InputError as error:
        if strict:
            raise CalculationError(block.name, f"{block.mode}: {error.allowed}") from None
        # while the recycle iterates a tear value may ask the impossible for a moment
        warnings.append(f"{block.mode} not reached ({error.allowed}); flashed at the inlet T")
        return equilibrium.flash_TP(flows, inlet.T, P)
