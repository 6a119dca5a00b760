"""Separator: a stated fraction of each component to the first outlet; reports the duty.

An outlet whose phase is "equilibrium" is the case's flash of its flows at its T and P
(vapor, liquid or two-phase); the split itself stays the one stated.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from model.blocks.base import BlockOutput, CompiledBlock, enthalpies, one_phase
from model.blocks.result import BlockResult
from model.flowsheet.kinds import AS_INLET, EQUILIBRIUM
from model.properties.property_method import equilibrium_for
from model.properties.stream_state import TWO_PHASE, StreamState


@dataclass(kw_only=True)
class CompiledSeparator(CompiledBlock):
    """``split[i]``: fraction of component i to out1. None T/P/phase: the inlet's."""

    split: np.ndarray
    temperatures: tuple[float | None, float | None]
    pressures: tuple[float | None, float | None]
    phases: tuple[str | None, str | None]


def build_separator(common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledSeparator:
    split = np.zeros(len(basis.names))
    for component, fraction in specs["split"].items():
        split[basis.index(component)] = fraction

    def phase(name: str) -> str | None:
        value = specs.get(name, AS_INLET)
        return None if value == AS_INLET else value

    return CompiledSeparator(
        **common,
        split=split,
        temperatures=(specs.get("T1"), specs.get("T2")),
        pressures=(specs.get("P1"), specs.get("P2")),
        phases=(phase("phase1"), phase("phase2")),
    )


def compute_separator(
    block: CompiledSeparator, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    """Split the flows; each outlet at its own T, P, phase; duty = H_out - H_in."""
    inlet = inlets[0]
    first = inlet.flows * block.split
    second = np.maximum(inlet.flows - first, 0.0)
    outlets = {}
    values: dict[str, tuple[float, str]] = {}
    for port, flows, T, P, phase in zip(
        ("out1", "out2"),
        (first, second),
        block.temperatures,
        block.pressures,
        block.phases,
        strict=True,
    ):
        T = inlet.T if T is None else T
        P = inlet.P if P is None else P
        if phase == EQUILIBRIUM:
            outlets[port] = _flashed(basis, flows, T, P)
            values[f"{port} vapor fraction"] = (outlets[port].vapor_fraction(), "")
            continue
        outlets[port] = StreamState(
            flows,
            T,
            P,
            one_phase(block, inlet.phase, f"phase{port[-1]}") if phase is None else phase,
        )
    h_in, h_first, h_second = enthalpies(basis, [inlet, outlets["out1"], outlets["out2"]])
    return BlockOutput(outlets, BlockResult(duty_W=float(h_first + h_second - h_in), values=values))


def _flashed(basis, flows: np.ndarray, T: float, P: float) -> StreamState:
    """An outlet as the property method's isothermal flash of its flows."""
    equilibrium = equilibrium_for(basis)
    result = equilibrium.flash_TP(flows, T, P)
    vapor = result.vapor_flows if result.phase == TWO_PHASE else None
    return StreamState(flows, T, P, result.phase, float(equilibrium.enthalpy_flow(result)), vapor)
