"""Component records: look-up in ``chemicals``, hand definition, validation, plain dicts.

A :class:`Component` carries exactly the constants the property basis uses (DESIGN.md,
"Engineering basis"), in SI internal units, with the data source of each value. It
round-trips exactly through :meth:`Component.to_dict` / :meth:`Component.from_dict` so
that a case reopens with the same numbers even if the library changes.
"""

from __future__ import annotations

import functools
import math
import re
from dataclasses import dataclass, field
from typing import Any

from chemicals.identifiers import check_CAS

from model.errors import InputError
from model.limits import NAME_LENGTH_LIMIT, check_length
from model.properties.component_data import component_record, find_cas
from model.properties.cp_correlations import CpCorrelation
from model.properties.formula import molar_mass_of, parse_formula

__all__ = ["Component", "CpCorrelation", "define_component", "lookup_component"]

_CAS_PATTERN = re.compile(r"^\d{2,7}-\d{2}-\d$")
_MOLAR_MASS_TOLERANCE = 0.01  # relative; mass and element balances must agree
_FIELDS = ("name", "formula", "cas", "molar_mass", "Tc", "Pc", "Tb", "Hf_ig", "cp", "Hvap_Tb")
USER_SOURCE = "defined by user"


@dataclass(frozen=True)
class Component:
    """One pure component and the constants of its ideal property basis.

    Attributes
    ----------
    name, formula, cas
        Display name (unique within a case), chemical formula, CAS number ("" if none).
    molar_mass
        kg/mol.
    Tc, Pc, Tb
        Critical temperature (K), critical pressure (Pa), normal boiling point (K).
    Hf_ig
        Ideal-gas heat of formation at 298.15 K, J/mol.
    cp
        Ideal-gas heat-capacity correlation with its valid range.
    Hvap_Tb
        Heat of vaporization at Tb, J/mol (anchor of the Watson correlation).
    sources
        Data source of each field, e.g. ``{"Hf_ig": "chemicals.reaction Hfg, method ATCT_G"}``.

    Every field is validated on construction; an invalid one raises
    :class:`~model.errors.InputError` naming the field, the value and what is allowed.
    """

    name: str
    formula: str
    cas: str
    molar_mass: float
    Tc: float
    Pc: float
    Tb: float
    Hf_ig: float
    cp: CpCorrelation
    Hvap_Tb: float
    sources: dict[str, str] = field(default_factory=dict)

    def __post_init__(self) -> None:
        _validate(self)

    @property
    def elements(self) -> dict[str, float]:
        """Element counts of the formula, e.g. ``{"C": 1.0, "H": 4.0}``."""
        return parse_formula(self.formula)

    def to_dict(self) -> dict[str, Any]:
        """Plain, JSON-able dict holding every field (units: kg/mol, K, Pa, J/mol)."""
        data: dict[str, Any] = {name: getattr(self, name) for name in _FIELDS}
        data["cp"] = self.cp.to_dict()
        data["sources"] = dict(self.sources)
        return data

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> Component:
        """Rebuild a component from :meth:`to_dict` output, validating every field."""
        if not isinstance(data, dict):
            raise InputError("component", data, "a mapping of component fields")
        expected = {*_FIELDS, "sources"}
        if set(data) != expected:
            missing = sorted(expected - set(data))
            unknown = sorted(set(data) - expected)
            raise InputError(
                "component",
                data.get("name", data),
                f"exactly the fields {sorted(expected)} (missing {missing}, unknown {unknown})",
            )
        values = dict(data)
        values["cp"] = CpCorrelation.from_dict(data["cp"])
        return cls(**values)


def _validate(component: Component) -> None:
    """Check every field; raise InputError(field, value, allowed) on the first bad one."""
    if not isinstance(component.name, str) or not component.name.strip():
        raise InputError("name", component.name, "a non-empty name")
    elements = parse_formula(component.formula)
    if not isinstance(component.cas, str) or (
        component.cas and not (_CAS_PATTERN.match(component.cas) and check_CAS(component.cas))
    ):
        raise InputError("cas", component.cas, "empty, or a CAS number such as '7732-18-5'")
    for name in ("molar_mass", "Tb", "Pc", "Hvap_Tb"):
        _require_positive(component, name)
    _require_real(component, "Tc")
    _require_real(component, "Hf_ig")
    if not component.Tc > component.Tb:
        raise InputError(
            "Tc",
            component.Tc,
            f"a critical temperature above Tb = {component.Tb:g} K (Tc > Tb > 0)",
        )
    formula_mass = molar_mass_of(elements)
    if abs(component.molar_mass - formula_mass) > _MOLAR_MASS_TOLERANCE * formula_mass:
        raise InputError(
            "molar_mass",
            component.molar_mass,
            f"within 1 % of {formula_mass:.6g} kg/mol from the formula {component.formula!r} "
            "(molar mass is in kg/mol)",
        )
    if not isinstance(component.cp, CpCorrelation):
        raise InputError("cp", component.cp, "a CpCorrelation")
    sources = component.sources
    if not isinstance(sources, dict) or not all(
        isinstance(k, str) and isinstance(v, str) for k, v in sources.items()
    ):
        raise InputError("sources", sources, "a mapping of field name to source text")
    object.__setattr__(component, "sources", dict(sources))


def _require_real(component: Component, name: str) -> None:
    value = getattr(component, name)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(name, value, "a finite number")
    object.__setattr__(component, name, float(value))


def _require_positive(component: Component, name: str) -> None:
    _require_real(component, name)
    value = getattr(component, name)
    if not value > 0.0:
        raise InputError(name, value, "a number greater than 0")


def lookup_component(query: str) -> Component:
    """A component from the ``chemicals`` database by name, formula or CAS number.

    Look-ups are cached: the same query, or another query for the same CAS number,
    returns an equal component without asking the library again.

    Parameters
    ----------
    query
        For example ``"ammonia"``, ``"NH3"`` or ``"7664-41-7"``.

    Raises
    ------
    ComponentNotFoundError
        Unknown query; its ``suggestions`` list close matches ("did you mean 'ammonia'?").
    ComponentDataError
        The database lacks a value the property basis needs; define the component by hand.

    Examples
    --------
    >>> lookup_component("CH4").name
    'methane'
    """
    if not isinstance(query, str):
        raise InputError("component", query, "a component name, formula or CAS number")
    check_length("component", query, NAME_LENGTH_LIMIT)
    return _component_for_cas(_cas_for_query(query.strip()))


@functools.lru_cache(maxsize=1024)
def _cas_for_query(query: str) -> str:
    return find_cas(query)


@functools.lru_cache(maxsize=512)
def _component_for_cas(cas: str) -> Component:
    record = component_record(cas)
    return Component(**{**record, "sources": dict(record["sources"])})


def define_component(
    name: str,
    formula: str,
    molar_mass: float | None = None,
    *,
    Tc: float,
    Pc: float,
    Tb: float,
    Hf_ig: float,
    cp: CpCorrelation,
    Hvap_Tb: float,
    cas: str = "",
) -> Component:
    """A hand-defined component, validated field by field.

    Parameters
    ----------
    name, formula
        Display name and chemical formula (the formula gives the element balance).
    molar_mass
        kg/mol; computed from the formula when omitted, and must agree with it to 1 %.
    Tc, Pc, Tb
        K, Pa, K, with ``Tc > Tb > 0`` and ``Pc > 0``.
    Hf_ig
        Ideal-gas heat of formation at 298.15 K, J/mol.
    cp
        Ideal-gas Cp correlation, e.g. ``CpCorrelation("polynomial", (29.1,), 200, 1500, "...")``.
    Hvap_Tb
        Heat of vaporization at Tb, J/mol, > 0.
    cas
        CAS number, or "".

    Raises
    ------
    InputError
        Naming the first invalid field, its value and what is allowed.
    """
    if isinstance(name, str):
        check_length("name", name, NAME_LENGTH_LIMIT)
    sources = {key: USER_SOURCE for key in ("Tc", "Pc", "Tb", "Hf_ig", "Hvap_Tb")}
    sources["cp"] = cp.source if isinstance(cp, CpCorrelation) else USER_SOURCE
    if molar_mass is None:
        molar_mass = molar_mass_of(parse_formula(formula))
        sources["molar_mass"] = "formula with the standard atomic weights of chemicals.elements"
    else:
        sources["molar_mass"] = USER_SOURCE
    return Component(
        name=name.strip() if isinstance(name, str) else name,
        formula=formula,
        cas=cas,
        molar_mass=molar_mass,
        Tc=Tc,
        Pc=Pc,
        Tb=Tb,
        Hf_ig=Hf_ig,
        cp=cp,
        Hvap_Tb=Hvap_Tb,
        sources=sources,
    )
