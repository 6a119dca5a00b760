"""The property methods a case can choose, and each basis's equilibrium object.

A case names its property method (the case file's optional key "property_method":
"ideal", the default, or "Peng-Robinson"). The phase equilibrium of a method is made
once per property basis, i.e. once per solve, so its caches serve every pass.
"""

from __future__ import annotations

from model.errors import InputError
from model.properties.peng_robinson import PENG_ROBINSON
from model.properties.phase_equilibrium import IDEAL, EquilibriumSearch, IdealEquilibrium
from model.properties.vapor_pressure import vapor_pressure_data

PROPERTY_METHODS = (IDEAL, PENG_ROBINSON)
DEFAULT_PROPERTY_METHOD = IDEAL


def check_property_method(value: object) -> str:
    """The property method's name; InputError for any other value."""
    if value not in PROPERTY_METHODS:
        raise InputError("property_method", value, f"one of {list(PROPERTY_METHODS)}")
    return str(value)


def equilibrium_for(basis) -> EquilibriumSearch:
    """The phase equilibrium of ``basis`` under its property method, made on first use.

    Raises
    ------
    InputError
        A component has no data the method needs (named in the field).
    """
    known = basis.__dict__.get("_equilibrium")
    if known is not None:
        return known
    method = check_property_method(basis.property_method)
    if method == PENG_ROBINSON:
        from model.properties.peng_robinson import PengRobinsonEquilibrium

        equilibrium: EquilibriumSearch = PengRobinsonEquilibrium(basis)
    else:
        data = [vapor_pressure_data(c.name, c.cas, c.Tc) for c in basis.components]
        equilibrium = IdealEquilibrium(basis, data)
    basis.__dict__["_equilibrium"] = equilibrium
    return equilibrium


def missing_data(method: str, component) -> str | None:
    """What ``component`` lacks for ``method`` (None: nothing), in plain words."""
    try:
        if method == PENG_ROBINSON:
            from model.properties.peng_robinson import acentric_factor

            acentric_factor(component.name, component.cas)
        else:
            vapor_pressure_data(component.name, component.cas, component.Tc)
    except InputError as error:
        return error.allowed
    return None
