"""The property methods a case can choose, and each basis's equilibrium object.

A case names its property method (the case file's optional key "property_method":
"ideal", the default, or "Peng-Robinson") and records the method's constants
(:mod:`model.properties.property_data`). The phase equilibrium of a method is made
once per property basis, i.e. once per solve, so its caches serve every pass; it uses
the constants given to the basis by :func:`use_property_data` (the case's), else the
libraries' current ones.
"""

from __future__ import annotations

from model.errors import InputError
from model.properties.peng_robinson import PENG_ROBINSON, acentric_factor
from model.properties.phase_equilibrium import IDEAL, EquilibriumSearch, IdealEquilibrium
from model.properties.property_data import PropertyData, completed
from model.properties.vapor_pressure import vapor_pressure_data

PROPERTY_METHODS = (IDEAL, PENG_ROBINSON)
DEFAULT_PROPERTY_METHOD = IDEAL


def check_property_method(value: object) -> str:
    """The property method's name; InputError for any other value."""
    if value not in PROPERTY_METHODS:
        raise InputError("property_method", value, f"one of {list(PROPERTY_METHODS)}")
    return str(value)


def case_basis(flowsheet):
    """The property basis of a case (``flowsheet``: its components, property method and
    recorded property data), with the case's constants given to its equilibrium."""
    from model.properties.enthalpy import PropertyBasis

    basis = PropertyBasis(flowsheet.components, flowsheet.property_method)
    use_property_data(basis, getattr(flowsheet, "property_data", None))
    return basis


def use_property_data(basis, recorded: PropertyData | None) -> PropertyData:
    """Make ``basis``'s equilibrium use ``recorded`` (completed from the libraries for
    what it lacks); returns the constants the equilibrium will use."""
    data = completed(recorded, basis.components, basis.property_method)
    basis.__dict__["_property_data"] = data
    basis.__dict__.pop("_equilibrium", None)
    return data


def property_data_of(basis) -> PropertyData:
    """The constants ``basis``'s equilibrium uses (the libraries' when none were given)."""
    known = basis.__dict__.get("_property_data")
    if known is None:
        known = use_property_data(basis, None)
    return known


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
    data = property_data_of(basis)
    components = basis.components
    if method == PENG_ROBINSON:
        from model.properties.peng_robinson import PengRobinsonEquilibrium

        omegas = [
            data.acentric_factor[c.name].value
            if c.name in data.acentric_factor
            else acentric_factor(c.name, c.cas)  # raises, naming the component
            for c in components
        ]
        kijs = data.kij_matrix([c.name for c in components])
        equilibrium: EquilibriumSearch = PengRobinsonEquilibrium(basis, omegas, kijs)
    else:
        records = [
            data.vapor_pressure.get(c.name) or vapor_pressure_data(c.name, c.cas, c.Tc)
            for c in components
        ]
        equilibrium = IdealEquilibrium(basis, records)
    basis.__dict__["_equilibrium"] = equilibrium
    return equilibrium


def missing_data(method: str, component, recorded: PropertyData | None = None) -> str | None:
    """What ``component`` lacks for ``method`` (None: nothing), in plain words; a value
    recorded in the case counts as data."""
    recorded = recorded or PropertyData()
    try:
        if method == PENG_ROBINSON:
            if component.name not in recorded.acentric_factor:
                acentric_factor(component.name, component.cas)
        elif component.name not in recorded.vapor_pressure:
            vapor_pressure_data(component.name, component.cas, component.Tc)
    except InputError as error:
        return error.allowed
    return None
