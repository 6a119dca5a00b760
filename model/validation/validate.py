"""Checking a whole flowsheet's input before a solve, and the diagram's block badges.

:func:`validate_flowsheet` lists every problem
at once (the log shows them all, the solve refuses to start while any is an error);
:func:`block_state` gives the diagram's badge.

Examples
--------
>>> from model.flowsheet.document import Flowsheet
>>> sheet = Flowsheet()
>>> heater = sheet.add_block("Heater", "H1")
>>> block_state(sheet, "H1")
'needs input'
"""

from __future__ import annotations

from typing import Any

from model.flowsheet import value_checks as values
from model.flowsheet.document import Block, Flowsheet
from model.flowsheet.kinds import EQUILIBRIUM, SpecField
from model.flowsheet.spec_checks import check_spec_value, element_balance_function
from model.validation.flowsheet_checks import (
    PortMap,
    feed_issues,
    flash_drum_issues,
    mixer_phase_issues,
    port_issues,
    spec_issues,
    splitter_issues,
)
from model.validation.issue import Issue

__all__ = ["validate_flowsheet", "block_state", "block_states"]


def validate_flowsheet(flowsheet: Flowsheet) -> list[Issue]:
    """Every missing or invalid item of the flowsheet, errors and warnings, at once.

    Checks: components present; every needed spec given and valid (units, ranges,
    known components, reactions element-balanced with a reactant as key); every
    fixed port connected exactly once and numbered ports at least once; splitter
    fractions summing to 1 over the connected outlets; mixers keeping "the inlet
    phase" of inlets in one phase.
    """
    issues: list[Issue] = []
    if not flowsheet.components:
        issues.append(
            Issue(
                "error",
                "components: the case has no components; add at least one before solving",
                field="components",
            )
        )
    if not flowsheet.blocks:
        issues.append(
            Issue("error", "blocks: the diagram is empty; add feeds, blocks and products")
        )
    ports = PortMap(flowsheet)
    balance = element_balance_function(flowsheet)

    def check(sheet: Flowsheet, block: Block, spec_field: SpecField, value: Any) -> Any:
        if spec_field.kind == "reactions":
            name = f"{block.name}.{spec_field.name}"
            return values.check_reactions(name, value, sheet.component_names(), balance)
        return check_spec_value(sheet, block, spec_field, value)

    for block in flowsheet.blocks.values():
        issues += spec_issues(flowsheet, block, check)
        issues += port_issues(block, ports)
        if block.kind == "Splitter":
            issues += splitter_issues(block, ports)
        elif block.kind == "Feed":
            issues += feed_issues(block)
        elif block.kind == "Flash drum" or EQUILIBRIUM in (
            block.specs.get(name)
            for name in ("phase", "hot_phase", "cold_phase", "phase1", "phase2")
        ):
            issues += flash_drum_issues(flowsheet, block)
    issues += mixer_phase_issues(flowsheet, ports)
    return issues


def block_states(flowsheet: Flowsheet) -> dict[str, str]:
    """``{block name: "needs input" | "ready"}`` for every block, from one validation."""
    blocked = {i.block for i in validate_flowsheet(flowsheet) if i.is_error}
    return {name: "needs input" if name in blocked else "ready" for name in flowsheet.blocks}


def block_state(flowsheet: Flowsheet, block_name: str) -> str:
    """``"needs input"`` when any error names the block, else ``"ready"``."""
    flowsheet.block(block_name)  # unknown name -> InputError
    return block_states(flowsheet)[block_name]
