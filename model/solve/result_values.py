"""The value a :class:`~model.flowsheet.target_definition.ResultAddress` names in a solution.

Targets measure with it and sweeps record with it; values are internal floats (mol/s,
K, Pa, W, dimensionless mole fractions). Whether an address can be read in a flowsheet
is checked before the solve (:func:`model.validation.target_checks.check_result_address`).
"""

from __future__ import annotations

import math
from typing import Any

from model.flowsheet.target_definition import ResultAddress


def result_value(solution: Any, address: ResultAddress) -> float:
    """The value at ``address`` in ``solution`` (a FlowsheetSolution); NaN when the
    solution has no value there (a failed solve, a block without a duty)."""
    if address.quantity == "duty":
        result = solution.blocks.get(address.owner)
        duty = None if result is None else result.duty_W
        return math.nan if duty is None else float(duty)
    state = solution.streams.get(address.owner)
    if state is None:
        return math.nan
    if address.quantity == "T":
        return float(state.T)
    if address.quantity == "P":
        return float(state.P)
    if address.quantity == "total_flow":
        return float(state.total_molar_flow())
    index = list(solution.component_names).index(address.key)
    if address.quantity == "flow":
        return float(state.flows[index])
    total = float(state.total_molar_flow())
    return float(state.flows[index]) / total if total > 0.0 else math.nan
