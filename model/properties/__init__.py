"""Components, their constants and sources, heat capacity, enthalpy and stream state."""

from model.properties.components import Component, define_component, lookup_component
from model.properties.cp_correlations import CpCorrelation
from model.properties.enthalpy import T_SEARCH_MAX, T_SEARCH_MIN, PropertyBasis
from model.properties.formula import molar_mass_of, parse_formula
from model.properties.stream_state import PHASES, StreamState

__all__ = [
    "PHASES",
    "T_SEARCH_MAX",
    "T_SEARCH_MIN",
    "Component",
    "CpCorrelation",
    "PropertyBasis",
    "StreamState",
    "define_component",
    "lookup_component",
    "molar_mass_of",
    "parse_formula",
]
