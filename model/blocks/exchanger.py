"""Exchanger: counter-current, two streams; one outlet T or the duty fixes the other side.

The duty Q is the heat passed from the hot side to the cold side (W). Counter-current
end differences: ``dT_hot_end = T_hot_in - T_cold_out`` and
``dT_cold_end = T_hot_out - T_cold_in``; ``LMTD = (dT1 - dT2) / ln(dT1 / dT2)``, with
its limit ``(dT1 + dT2) / 2`` when the two are equal; ``UA = Q / LMTD``. A temperature
cross (an end difference at or below zero), an approach below the minimum, a negative
duty or a "hot" inlet colder than the "cold" one are reported as warnings: the balance
is still exact, but the exchanger as specified cannot be built that way.

In the final (strict) pass every exchanger also gets its heat curve, both sides'
temperatures at cuts of the duty (:mod:`model.blocks.exchanger_zones`); where a flashed
side changes phase, the LMTD and UA are the zone analysis's and the smallest difference
inside is checked, since the end temperatures no longer tell it.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from model.blocks.base import (
    BlockOutput,
    CompiledBlock,
    inlet_enthalpy,
    outlet_pressure,
    temperature_for_enthalpy,
)
from model.blocks.exchanger_zones import (
    ZoneSide,
    log_mean_temperature_difference,
    zone_profile,
)
from model.blocks.result import BlockResult
from model.errors import CalculationError, InputError
from model.flowsheet.kinds import AS_INLET, EQUILIBRIUM
from model.properties.phase_equilibrium import FlashResult
from model.properties.property_method import equilibrium_for
from model.properties.stream_state import TWO_PHASE, StreamState


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


@dataclass
class _Side:
    """One side's inlet, outlet phase ("vapor", "liquid" or "equilibrium"), outlet P,
    and the flash of its outlet once known (equilibrium sides only)."""

    inlet: StreamState
    phase: str
    P: float
    what: str
    flash: FlashResult | None = None


def _enthalpy_at(basis, side: _Side, T: float) -> float:
    if side.phase != EQUILIBRIUM:
        return basis.stream_enthalpy_flow(side.inlet.flows, T, side.phase == "liquid")
    equilibrium = equilibrium_for(basis)
    side.flash = equilibrium.flash_TP(side.inlet.flows, T, side.P)
    return float(equilibrium.enthalpy_flow(side.flash))


def _outlet_T(block, basis, side: _Side, target: float, strict: bool, warnings) -> float:
    """Outlet T of a side carrying enthalpy ``target`` (W): a flash at that enthalpy on
    an equilibrium side (latent heat inside its bracketed search)."""
    flows = side.inlet.flows
    if side.phase != EQUILIBRIUM or not flows.sum() > 0.0:
        liquid = side.phase == "liquid" or (
            side.phase == EQUILIBRIUM and side.inlet.phase == "liquid"
        )
        T = temperature_for_enthalpy(
            block, basis, flows, target, liquid, side.inlet.T, strict, warnings, side.what
        )
        if side.phase == EQUILIBRIUM:
            side.flash = equilibrium_for(basis).flash_TP(flows, T, side.P)
        return T
    equilibrium = equilibrium_for(basis)
    start = block.last_temperatures.get(side.what, side.inlet.T)
    try:
        side.flash = equilibrium.flash_PH(flows, side.P, target, start)
    except InputError as error:
        if strict:
            raise CalculationError(block.name, f"{side.what}: {error.allowed}") from None
        warnings.append(f"{side.what}: duty not reached ({error.allowed}); held at the inlet T")
        side.flash = equilibrium.flash_TP(flows, side.inlet.T, side.P)
    block.last_temperatures[side.what] = side.flash.T
    return side.flash.T


def _outlet(basis, side: _Side, T: float) -> StreamState:
    if side.flash is None:
        return StreamState(side.inlet.flows, T, side.P, side.phase)
    flash = side.flash
    vapor = flash.vapor_flows if flash.phase == TWO_PHASE else None
    h = float(equilibrium_for(basis).enthalpy_flow(flash))
    return StreamState(side.inlet.flows, flash.T, side.P, flash.phase, h, vapor)


def _duty_and_outlet_temperatures(
    block, basis, hot: _Side, cold: _Side, h_hot, h_cold, strict, warnings
) -> tuple[float, float, float]:
    """Q (hot to cold) and the hot and cold outlet temperatures."""
    hot_T, cold_T = block.hot_T, block.cold_T
    if block.mode == "hot outlet temperature":
        duty = h_hot - _enthalpy_at(basis, hot, hot_T)
    elif block.mode == "cold outlet temperature":
        duty = _enthalpy_at(basis, cold, cold_T) - h_cold
    else:
        duty = float(block.duty)
    empty = [name for name, side in (("hot", hot), ("cold", cold)) if side.inlet.flows.sum() <= 0.0]
    if empty and duty != 0.0:
        detail = f"duty {duty:.6g} W cannot pass with no flow on the {empty[0]} side"
        if strict:
            raise CalculationError(block.name, detail)
        warnings.append(detail)
        duty, hot_T, cold_T = 0.0, hot.inlet.T, cold.inlet.T
        hot.flash = cold.flash = None
    if block.mode != "hot outlet temperature" or hot_T is None:
        hot_T = _outlet_T(block, basis, hot, h_hot - duty, strict, warnings)
    if block.mode != "cold outlet temperature" or cold_T is None:
        cold_T = _outlet_T(block, basis, cold, h_cold + duty, strict, warnings)
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


def _zone_side(
    side: _Side, outlet: StreamState, h_in: float, h_out: float, flashed: bool
) -> ZoneSide:
    """A side for the heat curve; one that does not change phase is searched in its one
    phase (no flash needed at its cuts)."""
    one_phase = outlet.phase if not flashed else side.phase
    return ZoneSide(
        flows=side.inlet.flows,
        h_in=h_in,
        h_out=h_out,
        T_in=side.inlet.T,
        T_out=outlet.T,
        P_in=side.inlet.P,
        P_out=side.P,
        equilibrium=flashed,
        liquid=one_phase == "liquid",
    )


def _changes_phase(side: _Side, outlet: StreamState) -> bool:
    """On a flashed side: the phase changes, or the side is two-phase at an end."""
    if side.flash is None:
        return False
    return TWO_PHASE in (side.inlet.phase, outlet.phase) or side.inlet.phase != outlet.phase


def _profile(basis, sides, outlets, inlet_enthalpies, duty, changes, warnings):
    """The heat curve (:func:`model.blocks.exchanger_zones.zone_profile`), or None (with
    a warning where a phase changes) when a cut is out of the temperature search's reach."""
    (hot, cold), (h_hot, h_cold) = sides, inlet_enthalpies
    try:
        return zone_profile(
            basis,
            _zone_side(hot, outlets["hot_out"], h_hot, h_hot - duty, changes["hot_out"]),
            _zone_side(cold, outlets["cold_out"], h_cold, h_cold + duty, changes["cold_out"]),
            duty,
        )
    except InputError as error:
        if any(changes.values()):
            warnings.append(f"no zone analysis ({error.allowed}); LMTD and UA from the ends only")
        return None


def _zone_figures(block, profile, duty, values, warnings) -> None:
    """Replace the end-temperature LMTD and UA by the zone analysis's
    (:mod:`model.blocks.exchanger_zones`) and report its internal approach."""
    approach = profile.minimum_approach
    values["end-temperature LMTD"] = values["LMTD"]
    values["minimum internal approach"] = (approach, "temperature_difference")
    ua = profile.UA()
    if ua is None:
        del values["LMTD"], values["UA"]
        warnings.append(
            f"internal temperature cross: {100 * profile.pinch_share:.0f} % of the duty from "
            f"the hot inlet end the cold side is {-approach:.3f} K hotter than the hot side, "
            "though both ends are positive; a counter-current exchanger cannot do this duty"
        )
        return
    values["LMTD"] = (duty / ua, "temperature_difference")
    values["UA"] = (ua, "heat_transfer_coefficient_area")
    if block.minimum_approach is not None and approach < block.minimum_approach:
        warnings.append(
            f"internal approach {approach:.3f} K, {100 * profile.pinch_share:.0f} % of the "
            f"duty from the hot inlet end, is below the minimum {block.minimum_approach:.3f} K"
        )


def _side(block, inlet: StreamState, phase: str | None, drop: float, what: str) -> _Side:
    """A side whose phase is kept from a two-phase inlet is flashed like an equilibrium one."""
    kept = phase or inlet.phase
    return _Side(
        inlet,
        EQUILIBRIUM if kept == TWO_PHASE else kept,
        outlet_pressure(block, inlet.P, drop),
        what,
    )


def compute_exchanger(
    block: CompiledExchanger, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    hot_in, cold_in = inlets
    hot = _side(block, hot_in, block.hot_phase, block.hot_pressure_drop, "hot outlet")
    cold = _side(block, cold_in, block.cold_phase, block.cold_pressure_drop, "cold outlet")
    h_hot, h_cold = (inlet_enthalpy(block, basis, s, k) for k, s in enumerate((hot_in, cold_in)))
    warnings: list[str] = []
    duty, hot_T, cold_T = _duty_and_outlet_temperatures(
        block, basis, hot, cold, float(h_hot), float(h_cold), strict, warnings
    )
    outlets = {"hot_out": _outlet(basis, hot, hot_T), "cold_out": _outlet(basis, cold, cold_T)}
    temperatures = {
        "hot_in": hot_in.T,
        "cold_in": cold_in.T,
        "hot_out": outlets["hot_out"].T,
        "cold_out": outlets["cold_out"].T,
    }
    values = _checks(block, duty, temperatures, warnings)
    for name, side in (("hot", hot), ("cold", cold)):
        if side.flash is not None:
            values[f"{name} outlet vapor fraction"] = (float(side.flash.vapor_fraction), "")
    changes = {
        port: _changes_phase(side, outlets[port])
        for side, port in ((hot, "hot_out"), (cold, "cold_out"))
    }
    changed = any(changes.values())
    result = BlockResult(duty_W=duty, values=values, warnings=warnings)
    if strict and duty > 0.0 and min(hot_in.flows.sum(), cold_in.flows.sum()) > 0.0:
        # the final figures: worth a temperature search (a flash) at every cut
        enthalpy = (float(h_hot), float(h_cold))
        profile = _profile(basis, (hot, cold), outlets, enthalpy, duty, changes, warnings)
        if profile is not None:
            result.profile = {
                "heat passed": profile.heat_passed.tolist(),
                "hot T": profile.hot_T.tolist(),
                "cold T": profile.cold_T.tolist(),
            }
            if changed and "LMTD" in values:
                _zone_figures(block, profile, duty, values, warnings)
    elif changed and "LMTD" in values:
        warnings.append(
            "LMTD and UA from the end temperatures only: with a phase change "
            "inside, the temperature profile is not the one the LMTD assumes"
        )
    return BlockOutput(outlets, result)
