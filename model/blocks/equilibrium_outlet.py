"""An outlet flashed to equilibrium at a given enthalpy: the PH flash a mixer's (and a
duty-specified heater's) "equilibrium" outlet takes.

The search on T is the property method's bracketed PH flash
(:meth:`model.properties.phase_equilibrium.EquilibriumSearch.flash_PH`), started at the
temperature the block found last pass; while a recycle iterates (``strict`` False) an
enthalpy out of reach is a warning and the flash is taken at the start temperature.
"""

from __future__ import annotations

import numpy as np

from model.blocks.base import CompiledBlock
from model.errors import CalculationError, InputError
from model.properties.phase_equilibrium import FlashResult


def flash_at_enthalpy(
    block: CompiledBlock,
    equilibrium,
    flows: np.ndarray,
    P: float,
    enthalpy_flow: float,
    T_start: float,
    strict: bool,
    warnings: list[str],
    field: str,
) -> FlashResult:
    """The flash of ``flows`` at P (Pa) to ``enthalpy_flow`` (W); ``field`` names the spec
    a failure is about (e.g. "duty", "phase")."""
    if not flows.sum() > 0.0:
        return equilibrium.flash_TP(flows, T_start, P)
    start = block.last_temperatures.get("outlet", T_start)
    try:
        result = equilibrium.flash_PH(flows, P, enthalpy_flow, start)
    except InputError as error:
        if strict:
            raise CalculationError(block.name, f"{field}: {error.allowed}") from None
        warnings.append(
            f"{field}: enthalpy not reached ({error.allowed}); flashed at {T_start:.2f} K"
        )
        return equilibrium.flash_TP(flows, T_start, P)
    block.last_temperatures["outlet"] = result.T
    return result
