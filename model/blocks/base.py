"""What every compiled block shares, and the energy arithmetic several kinds use.

A compiled block holds its specs as internal floats and numpy arrays (converted once
by :mod:`model.solve.compile`) and the indices of its streams in the solve's stream list,
so a pass does no unit conversion and no look-up by name.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from model.blocks.held import HeldTemperature
from model.blocks.result import BlockResult
from model.errors import CalculationError, InputError
from model.properties.enthalpy import T_SEARCH_MAX, T_SEARCH_MIN, KeptMolarValues
from model.properties.stream_state import TWO_PHASE, StreamState

#: Relative size below which a negative flow is rounding, silently set to zero.
ROUNDING = 1e-12
_BRACKET = (T_SEARCH_MIN, T_SEARCH_MAX)


@dataclass(kw_only=True)
class CompiledBlock:
    """A block ready for the pass: name, kind and its ports with stream indices.

    ``inlet_ports``/``outlet_ports`` are in the kind's port order (numbered ports in
    numeric order); ``inlet_streams``/``outlet_streams`` are the matching indices into
    the solve's list of stream states.
    """

    name: str
    kind: str
    inlet_ports: tuple[str, ...]
    inlet_streams: tuple[int, ...]
    outlet_ports: tuple[str, ...]
    outlet_streams: tuple[int, ...]
    #: The temperature each of the block's flashes found last pass, by what it solved
    #: for: the next pass starts its search there (the recycle changes little from pass
    #: to pass), which saves one or two evaluations.
    last_temperatures: dict[str, float] = field(default_factory=dict, repr=False, compare=False)
    #: Molar values kept from pass to pass: per temperature-from-enthalpy search (by what
    #: it solves for) at its last point, where the next pass starts; per inlet ("inlet
    #: <k>") that carries no enthalpy, at its temperature.
    kept_molar_values: dict[str, KeptMolarValues] = field(
        default_factory=dict, repr=False, compare=False
    )


@dataclass
class BlockOutput:
    """A block's computed outlets, by outlet port, and its results."""

    outlets: dict[str, StreamState]
    result: BlockResult


def enthalpy(basis, state: StreamState) -> float:
    """Enthalpy flow of one stream, W (formation basis): the one its producing block
    carried on it, else computed."""
    if state.enthalpy is not None:
        return state.enthalpy
    if state.phase == TWO_PHASE and state.vapor_flows is None:
        restore_phases(basis, state)
    return state.enthalpy_flow(basis)


def inlet_enthalpy(block: CompiledBlock, basis, state: StreamState, inlet: int) -> float:
    """Enthalpy flow (W) of the block's inlet number ``inlet``: the one carried on it,
    else by the molar values the block keeps for that inlet (a dot product when its
    temperature and phase are last pass's, as a tear's often are)."""
    if state.enthalpy is not None:
        return state.enthalpy
    if state.phase == TWO_PHASE or state.vapor_flows is not None:
        return enthalpy(basis, state)
    molar = _kept(block, f"inlet {inlet}").molar(basis, state.T, state.liquid)
    return float(molar[0] @ state.flows)


def _kept(block: CompiledBlock, key: str) -> KeptMolarValues:
    kept = block.kept_molar_values.get(key)
    if kept is None:
        kept = block.kept_molar_values[key] = KeptMolarValues()
    return kept


def restore_phases(basis, state: StreamState) -> None:
    """Give a two-phase state that carries only its flows, T and P (a tear stream's
    iterate) its phases back, by the property method's flash at its T and P.

    A single component's split is not fixed by T and P (it boils at one temperature):
    such a state comes back as the flash's one phase.
    """
    from model.properties.property_method import equilibrium_for

    result = equilibrium_for(basis).flash_TP(state.flows, state.T, state.P)
    if result.phase == TWO_PHASE:
        state.vapor_flows = result.vapor_flows
    else:
        state.phase = result.phase


class SetTemperatureEnthalpy:
    """Enthalpy flows at a block's set outlet temperature: each component's molar
    enthalpy and heat capacity there are computed once per solve (per phase asked), so
    a pass needs one matrix-vector product instead of the heat-capacity correlations."""

    def __init__(self, basis, T: float) -> None:
        self.basis = basis
        self.T = float(T)
        self._molar: dict[bool, np.ndarray] = {}

    def flows(self, flows: np.ndarray, liquid: bool) -> tuple[float, float]:
        """Enthalpy flow (W) and heat-capacity flow (W/K) of ``flows`` at the set
        temperature in the given phase."""
        molar = self._molar.get(liquid)
        if molar is None:
            molar = self._molar[liquid] = self.basis.molar_values(self.T, liquid)
        enthalpy, heat_capacity = (molar @ flows).tolist()
        return enthalpy, heat_capacity


def enthalpies(basis, states: list[StreamState]) -> np.ndarray:
    """Enthalpy flows of several streams, W.

    One stream at a time: a block's few streams mostly carry their enthalpy (from the
    block that made them); the others take the single-stream path, which remembers its
    last few results.
    """
    return np.array([enthalpy(basis, state) for state in states])


def outlet_pressure(block: CompiledBlock, inlet_pressure: float, pressure_drop: float) -> float:
    """Inlet pressure less the drop; a drop that leaves no pressure is an error."""
    pressure = inlet_pressure - pressure_drop
    if pressure <= 0.0:
        raise CalculationError(
            block.name,
            f"pressure drop {pressure_drop:.6g} Pa exceeds the "
            f"inlet pressure {inlet_pressure:.6g} Pa",
        )
    return pressure


def temperature_for_enthalpy(
    block: CompiledBlock,
    basis,
    flows: np.ndarray,
    target: float,
    liquid: bool,
    guess: float,
    strict: bool,
    warnings: list[str],
    what: str = "outlet",
    first_start: float | None = None,
    total: float | None = None,
) -> float:
    """Temperature at which ``flows`` carry enthalpy ``target`` (W).

    The search starts where the block's search for ``what`` evaluated last (the last
    pass; its kept molar values make that first step a dot product), else at
    ``first_start`` if given, else at ``guess``. A zero flow carries no enthalpy: its
    temperature is ``guess`` (the inlet's) when the target is zero; a non-zero target
    into a zero flow is an error in a strict pass, and a warning (temperature left at
    ``guess``) while the recycle iterates. ``total`` is the sum of ``flows`` if the
    caller has it.
    """
    if total is None:
        total = sum(flows.tolist())  # Python's sum: cheaper than numpy's for few
    if not total > 0.0:
        if abs(target) > 0.0:
            detail = f"{target:.6g} W cannot go into the zero flow of the {what}"
            if strict:
                raise CalculationError(block.name, detail)
            warnings.append(detail)
        return guess
    kept = _kept(block, what)
    if kept.T is not None:
        start = kept.T
    elif first_start is not None and math.isfinite(first_start):
        start = first_start
    else:
        start = guess
    try:
        T = float(basis.temperature_from_enthalpy(flows, target, liquid, start, kept))
    except InputError as error:
        if strict:
            raise CalculationError(block.name, f"{what}: {error.allowed}") from None
        # While the recycle iterates, tear values may ask the impossible for a moment
        # (e.g. more heat than a still-small flow can give): hold the bracket's end.
        # The warning keeps its figures: a loop held here is at no fixed point (held.py).
        low, high = (basis.stream_enthalpy_flow(flows, T, liquid) for T in _BRACKET)
        limit = T_SEARCH_MIN if target < low else T_SEARCH_MAX
        warnings.append(HeldTemperature(what, target, (low, high), limit, _BRACKET))
        return limit
    return T


def energy_outlet(
    block: CompiledBlock,
    basis,
    flows: np.ndarray,
    phase: str,
    enthalpy_in: float,
    mode: str,
    set_temperature: float | None,
    set_duty: float | None,
    inlet_T: float,
    strict: bool,
    warnings: list[str],
    at_set_temperature: SetTemperatureEnthalpy | None = None,
    inlet_heat_capacity: float | None = None,
) -> tuple[float, float, float | None, float | None]:
    """Outlet temperature, duty, outlet enthalpy and outlet heat-capacity flow for the
    modes "outlet temperature", "adiabatic" and "duty".

    The duty is the heat added, ``H_out - H_in`` (W); ``enthalpy_in`` is the inlet's.
    The outlet enthalpy (W) is None when the temperature search was held at its limit
    (the outlet then does not carry the enthalpy asked for); its heat-capacity flow
    (W/K) is known at a set temperature only. ``inlet_heat_capacity``, when the
    outlet has the inlet's flows and that is known, starts a block's first search at
    ``T_in + duty / Cp_in``.
    """
    liquid = phase == "liquid"
    if mode == "outlet temperature":
        if at_set_temperature is not None:
            out, heat_capacity = at_set_temperature.flows(flows, liquid)
        else:
            out, heat_capacity = basis.stream_enthalpy_and_heat_capacity_flow(
                flows, set_temperature, liquid
            )
        return float(set_temperature), out - enthalpy_in, out, heat_capacity
    duty = 0.0 if mode == "adiabatic" else float(set_duty)
    warned = len(warnings)
    target = enthalpy_in + duty
    first_start = (
        inlet_T + duty / inlet_heat_capacity
        if inlet_heat_capacity is not None and inlet_heat_capacity > 0.0
        else None
    )
    total = sum(flows.tolist())
    T = temperature_for_enthalpy(
        block, basis, flows, target, liquid, inlet_T, strict, warnings, "outlet", first_start, total
    )
    if not total > 0.0:
        duty, target = 0.0, 0.0
    return T, duty, (target if len(warnings) == warned else None), None


def one_phase(block: CompiledBlock, phase: str, field: str = "phase") -> str:
    """``phase`` kept from a two-phase inlet ("as inlet") is refused: only a heater's or
    an exchanger's "equilibrium" outlet or a flash drum splits the phases; this block
    needs one named."""
    if phase == TWO_PHASE:
        raise CalculationError(
            block.name,
            f"{field}: 'as inlet' but the inlet is two-phase; choose the outlet phase, "
            "vapor or liquid",
        )
    return phase


def clip_rounding(flows: np.ndarray, scale: float) -> np.ndarray:
    """Zero the negative entries that are rounding error relative to ``scale``."""
    return np.where(flows < 0.0, np.where(flows > -ROUNDING * scale, 0.0, flows), flows)
