"""Checking one spec value as it is typed, before the document stores it.

:meth:`model.flowsheet.document.Flowsheet.set_spec` calls :func:`check_spec_value`, so a
refused value never reaches the block; the whole-flowsheet checks of
``model.validation`` call it again for every stored value.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, Protocol

import numpy as np

from model.errors import LoopwrightError
from model.flowsheet import value_checks as values
from model.flowsheet.kinds import SpecField


class Document(Protocol):
    """What the checks read of the flowsheet document (it stands above this module)."""

    components: list[Any]

    def component_names(self) -> list[str]: ...


class Named(Protocol):
    """A block, as far as the checks need it: its name, for the error's field."""

    name: str


def element_balance_function(
    flowsheet: Document,
) -> Callable[[dict[str, float]], dict[str, float]] | None:
    """``stoichiometry -> {element: net atoms}`` from the components' formulas.

    Uses :meth:`model.properties.enthalpy.PropertyBasis.element_balance`; ``None`` when the case
    has no components (then every component name is refused anyway).
    """
    if not flowsheet.components:
        return None
    from model.properties.enthalpy import PropertyBasis  # chemicals data: loaded when needed

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


def check_spec_value(flowsheet: Document, block: Named, spec_field: SpecField, value: Any) -> Any:
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
