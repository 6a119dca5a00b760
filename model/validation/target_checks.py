"""Checking a flowsheet's targets before the outer loop starts (every problem at once).

A target is refused, with a message naming the block (or stream), the field and the
value, when: its adjusted spec does not exist or is not numeric; its limits are not
numbers with lower < upper, or do not bracket the spec's current value; its measured
result cannot be read (no such stream, block or component); its wanted value's unit
has another dimension than the measured quantity; two targets adjust the same spec.
"""

from __future__ import annotations

import math
from typing import Any

from model.errors import InputError, LoopwrightError
from model.flowsheet.spec_numbers import spec_number
from model.flowsheet.target_definition import ResultAddress, Target
from model.validation.issue import Issue
from units_of_measure import to_internal


def check_result_address(flowsheet: Any, address: ResultAddress) -> None:
    """Raise InputError naming the address when it cannot be read in ``flowsheet``."""
    where = str(address)
    if address.quantity == "duty":
        if address.owner not in flowsheet.blocks:
            raise InputError(where, address.owner, "a duty is read of a block of this flowsheet")
        return
    if address.owner not in flowsheet.streams:
        raise InputError(where, address.owner, "the name of a stream in this flowsheet")
    if address.key is not None and address.key not in flowsheet.component_names():
        components = ", ".join(flowsheet.component_names()) or "none"
        raise InputError(where, address.key, f"a component of the case ({components})")


def wanted_internal(target: Target) -> float:
    """The wanted value in the measured quantity's internal unit (InputError when its
    unit has another dimension)."""
    wanted = target.wanted
    unit = wanted.unit or None
    return to_internal(wanted.value, unit, target.measured.kind, field=f"{target.measured} wanted")


def check_target(flowsheet: Any, target: Target) -> None:
    """Raise InputError (block.field, value, what is allowed) for the first problem."""
    where = str(target.adjusted)
    lower, upper = target.lower, target.upper
    if not (math.isfinite(lower) and math.isfinite(upper) and lower < upper):
        raise InputError(f"{where} limits", f"[{lower:g}, {upper:g}]", "finite lower < upper")
    current = spec_number(flowsheet.blocks, target.adjusted, target.unit)
    if not lower <= current <= upper:
        unit = f" {target.unit}" if target.unit else ""
        raise InputError(
            where,
            f"{current:g}{unit}",
            f"the limits [{lower:g}, {upper:g}]{unit} must bracket the spec's current value",
        )
    check_result_address(flowsheet, target.measured)
    wanted_internal(target)


def validate_targets(flowsheet: Any, targets: list[Target]) -> list[Issue]:
    """Every problem of ``targets`` in ``flowsheet`` as an error Issue (empty: all good)."""
    issues: list[Issue] = []
    seen: set[str] = set()
    for number, target in enumerate(targets, start=1):
        block = target.adjusted.block if target.adjusted.block in flowsheet.blocks else None
        try:
            check_target(flowsheet, target)
        except LoopwrightError as error:
            issues.append(Issue("error", f"target {number}: {error}", block=block, field="targets"))
            continue
        if str(target.adjusted) in seen:
            message = f"target {number}: {target.adjusted} is adjusted by an earlier target too"
            issues.append(Issue("error", message, block=block, field="targets"))
        seen.add(str(target.adjusted))
    return issues
