"""The property methods a case can choose, and each basis's equilibrium object.

A case names its property method (the case file's optional key "property_method",
"ideal" when absent). The phase equilibrium of a method is made once per property
basis, i.e. once per solve, so its K-value cache serves every pass.
"""

from __future__ import annotations

from model.errors import InputError
from model.properties.phase_equilibrium import IDEAL, IdealEquilibrium
from model.properties.vapor_pressure import vapor_pressure_data

PROPERTY_METHODS = (IDEAL,)
DEFAULT_PROPERTY_METHOD = IDEAL


def check_property_method(value: object) -> str:
    """The property method's name; InputError for any other value."""
    if value not in PROPERTY_METHODS:
        raise InputError("property_method", value, f"one of {list(PROPERTY_METHODS)}")
    return str(value)


def equilibrium_for(basis) -> IdealEquilibrium:
    """The phase equilibrium of ``basis`` under its property method, made on first use.

    Raises
    ------
    InputError
        A component has no data the method needs (named in the field).
    """
    known = basis.__dict__.get("_equilibrium")
    if known is not None:
        return known
    check_property_method(basis.property_method)
    data = [vapor_pressure_data(c.name, c.cas, c.Tc) for c in basis.components]
    equilibrium = IdealEquilibrium(basis, data)
    basis.__dict__["_equilibrium"] = equilibrium
    return equilibrium
