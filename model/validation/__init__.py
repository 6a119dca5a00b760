"""Checking a flowsheet's input: one spec value as it is typed, or the whole flowsheet.

:func:`check_spec_value` is what :meth:`model.flowsheet.Flowsheet.set_spec` calls, so a
refused value never reaches the block; :func:`validate_flowsheet` lists every problem
at once (the log shows them all, the solve refuses to start while any is an error);
:func:`block_state` gives the diagram's badge.

Examples
--------
>>> from model.flowsheet import Flowsheet
>>> sheet = Flowsheet()
>>> heater = sheet.add_block("Heater", "H1")
>>> block_state(sheet, "H1")
'needs input'
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import numpy as np

from model.block_kinds import SpecField
from model.errors import LoopwrightError
from model.flowsheet import Block, Flowsheet
from model.validation import values
from model.validation.flowsheet_checks import (
    PortMap,
    feed_issues,
    mixer_phase_issues,
    port_issues,
    spec_issues,
    splitter_issues,
)
from model.validation.issue import Issue

__all__ = ["Issue", "check_spec_value", "validate_flowsheet", "block_state", "block_states"]


def element_balance_function(
    flowsheet: Flowsheet,
) -> Callable[[dict[str, float]], dict[str, float]] | None:
    """``stoichiometry -> {element: net atoms}`` from the components' formulas.

    Uses :meth:`model.thermo.PropertyBasis.element_balance`; ``None`` when the case
    has no components (then every component name is refused anyway).
    """
    if not flowsheet.components:
        return None
    from model.thermo import PropertyBasis

    try:
        basis = PropertyBasis(flowsheet.components)
    except LoopwrightError:
        return None

    def balance(stoichiometry: dict[str, float]) -> dict[str, float]:
        vector = np.zeros(len(basis.names))
        for component, coefficient in stoichiometry.items():
            vector[basis.index(component)] = float(coefficient)
        with np.errstate(over="ignore", invalid="ignore"):  # huge coefficients: inf, refused
            net = basis.element_balance(vector)
        return {element: float(n) for element, n in zip(basis.element_names, net, strict=True)}

    return balance


def check_spec_value(flowsheet: Flowsheet, block: Block, spec_field: SpecField, value: Any) -> Any:
    """Check one spec value as typed and return it normalised.

    Parameters
    ----------
    flowsheet
        Gives the component names (and formulas, for the element balance).
    block
        The block the value is meant for; named in the error.
    spec_field
        The field of the block kind (its ``kind`` picks the check).
    value
        As typed: a TypedQuantity, a fraction, a choice, ComponentAmounts, ...

    Returns
    -------
    The value to store (e.g. a composition scaled to sum to exactly 1).

    Raises
    ------
    InputError
        Field ``f"{block.name}.{spec_field.name}"`` (or a part of it), the value and
        what is allowed, e.g. ``"R1.reactions[1].conversion: 1.2 is not allowed;
        conversion must be a fraction between 0 and 1"``.
    """
    name = f"{block.name}.{spec_field.name}"
    components = flowsheet.component_names()
    kind = spec_field.kind
    if kind == "choice":
        return values.check_choice(name, value, spec_field.choices)
    if kind == "fraction":
        return values.check_fraction(name, value)
    if kind == "component_flows":
        return values.check_component_flows(name, value, components)
    if kind == "component_fractions":
        if spec_field.name == "split":
            return values.check_split(name, value, components)
        return values.check_composition(name, value, components)
    if kind == "port_fractions":
        return values.check_port_fractions(name, value)
    if kind == "port":
        return values.check_port(name, value)
    if kind == "reactions":
        return values.check_reactions(name, value, components, element_balance_function(flowsheet))
    return values.check_quantity(name, value, kind)


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
