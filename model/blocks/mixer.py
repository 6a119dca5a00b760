"""Mixer: adiabatic mixing of any number of inlets (ideal: no heat of mixing).

The outlet phase is the inlets' common one, a named one, or "equilibrium": then the
outlet is the case's flash at the outlet pressure and the inlets' total enthalpy (a PH
flash, :mod:`model.blocks.equilibrium_outlet`), vapor, liquid or two-phase, and two-phase
inlets are accepted.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from model.blocks.base import (
    BlockOutput,
    CompiledBlock,
    enthalpies,
    inlet_enthalpy,
    temperature_for_enthalpy,
)
from model.blocks.equilibrium_outlet import flash_at_enthalpy
from model.blocks.result import BlockResult
from model.errors import CalculationError
from model.flowsheet.kinds import AS_INLET, EQUILIBRIUM
from model.properties.property_method import equilibrium_for
from model.properties.stream_state import TWO_PHASE, StreamState


@dataclass(kw_only=True)
class CompiledMixer(CompiledBlock):
    """``phase`` None keeps the inlets' common phase ("equilibrium": the flash decides);
    ``P`` None takes the lowest inlet P."""

    phase: str | None
    P: float | None


def build_mixer(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledMixer:
    phase = specs.get("phase", AS_INLET)
    return CompiledMixer(**common, phase=None if phase == AS_INLET else phase, P=specs.get("P"))


def _outlet_phase(block: CompiledMixer, inlets: list[StreamState]) -> str:
    if block.phase is not None:
        return block.phase
    phases = {s.phase for s in inlets}
    if len(phases) > 1:
        raise CalculationError(
            block.name,
            "outlet phase 'as inlet' but the inlets are "
            f"{' and '.join(sorted(phases))}; choose the outlet phase",
        )
    phase = phases.pop()
    if phase == TWO_PHASE:
        raise CalculationError(
            block.name,
            "phase: 'as inlet' but the inlet is two-phase; choose the outlet phase: vapor, "
            "liquid or equilibrium (the flash of the mixed inlets)",
        )
    return phase


def compute_mixer(
    block: CompiledMixer, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    """Sum the flows; outlet T from the inlets' total enthalpy.

    When every inlet that carries flow is at one temperature and already in the
    outlet phase, that temperature is the answer exactly and no root solve is needed.
    """
    flows = inlets[0].flows.copy()
    for inlet in inlets[1:]:
        flows += inlet.flows
    P = block.P if block.P is not None else min(s.P for s in inlets)
    # Python's sums: for a few inlets of tens of components cheaper than numpy's
    totals = [sum(s.flows.tolist()) for s in inlets]
    carrying = [s for s, total in zip(inlets, totals, strict=True) if total > 0.0] or inlets
    temperatures = [s.T for s in carrying]
    if block.phase == EQUILIBRIUM:
        return _equilibrium_outlet(block, inlets, flows, P, basis, strict, carrying)
    phase = _outlet_phase(block, inlets)
    warnings: list[str] = []
    outlet_enthalpy = None
    if all(t == temperatures[0] for t in temperatures) and all(s.phase == phase for s in carrying):
        T = temperatures[0]
        if all(s.enthalpy is not None for s in inlets):
            outlet_enthalpy = float(sum(s.enthalpy for s in inlets))
    else:
        carried = [total for total in totals if total > 0.0]
        guess = (
            sum(total * t for total, t in zip(carried, temperatures, strict=True)) / sum(carried)
            if carried
            else (float(np.mean(temperatures)))
        )
        target = sum(inlet_enthalpy(block, basis, s, k) for k, s in enumerate(inlets))
        T = temperature_for_enthalpy(
            block, basis, flows, target, phase == "liquid", guess, strict, warnings
        )
        if not warnings and sum(totals) > 0.0:  # not held at a limit: it carries the target
            outlet_enthalpy = target
    outlet = StreamState(flows, T, P, phase, outlet_enthalpy)
    return BlockOutput({"out": outlet}, BlockResult(warnings=warnings))


def _mean_temperature(carrying: list[StreamState]) -> float:
    """The flow-weighted mean inlet temperature (K): where the outlet's search starts."""
    totals = np.array([s.flows.sum() for s in carrying])
    temperatures = [s.T for s in carrying]
    if totals.sum() > 0:
        return float(np.dot(totals, temperatures) / totals.sum())
    return float(np.mean(temperatures))


def _equilibrium_outlet(
    block: CompiledMixer,
    inlets: list[StreamState],
    flows: np.ndarray,
    P: float,
    basis,
    strict: bool,
    carrying: list[StreamState],
) -> BlockOutput:
    """The outlet as the property method's flash at P and the inlets' total enthalpy."""
    equilibrium = equilibrium_for(basis)
    target = float(enthalpies(basis, inlets).sum())
    warnings: list[str] = []
    result = flash_at_enthalpy(
        block,
        equilibrium,
        flows,
        P,
        target,
        _mean_temperature(carrying),
        strict,
        warnings,
        "phase",
    )
    h_out = float(equilibrium.enthalpy_flow(result))
    vapor = result.vapor_flows if result.phase == TWO_PHASE else None
    outlet = StreamState(flows, result.T, P, result.phase, h_out, vapor)
    values = {
        "vapor fraction": (float(result.vapor_fraction), ""),
        "temperature": (float(result.T), "temperature"),
    }
    return BlockOutput({"out": outlet}, BlockResult(values=values, warnings=warnings))
