"""Components, their constants and sources, heat capacity, enthalpy and stream state."""

from model.lazy import lazy_face

__getattr__, __dir__, __all__ = lazy_face(
    __name__,
    {
        "Component": "model.properties.components",
        "CpCorrelation": "model.properties.cp_correlations",
        "PHASES": "model.properties.stream_state",
        "PropertyBasis": "model.properties.enthalpy",
        "StreamState": "model.properties.stream_state",
        "T_SEARCH_MAX": "model.properties.enthalpy",
        "T_SEARCH_MIN": "model.properties.enthalpy",
        "define_component": "model.properties.components",
        "lookup_component": "model.properties.components",
        "molar_mass_of": "model.properties.formula",
        "parse_formula": "model.properties.formula",
    },
)
