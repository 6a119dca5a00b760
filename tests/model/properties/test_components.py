"""Component records: formulas, look-up, data sources, hand definition, round-trip."""

from __future__ import annotations

import json

import cantera as ct
import pytest
from chemicals import critical, phase_change, reaction
from chemicals.heat_capacity import Cp_data_Poling, Poling, Poling_integral

from model.errors import ComponentNotFoundError, InputError
from model.properties.component_data import heat_capacity_correlation
from model.properties.components import Component, CpCorrelation, define_component, lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.formula import parse_formula

REQUIRED = [
    "hydrogen",
    "nitrogen",
    "oxygen",
    "argon",
    "ammonia",
    "methane",
    "water",
    "carbon monoxide",
    "carbon dioxide",
    "ethylene",
    "ethane",
    "methanol",
    "benzene",
    "toluene",
    "ethanol",
    "propane",
]


@pytest.fixture(scope="module")
def nasa_species() -> dict[str, ct.Species]:
    """Cantera's bundled NASA Glenn data (McBride, Zehe & Gordon, NASA/TP-2002-211556)."""
    return {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}


# ---- formulas ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("formula", "expected"),
    [
        ("CH4", {"C": 1, "H": 4}),
        ("H2O", {"H": 2, "O": 1}),
        ("Ca(OH)2", {"Ca": 1, "O": 2, "H": 2}),
        ("K4[Fe(CN)6]", {"K": 4, "Fe": 1, "C": 6, "N": 6}),
        ("(CH3)3CH", {"C": 4, "H": 10}),
        ("CH1.8O0.5", {"C": 1, "H": 1.8, "O": 0.5}),
        ("Ar", {"Ar": 1}),
    ],
)
def test_parse_formula_counts_atoms(formula, expected):
    assert parse_formula(formula) == pytest.approx(expected)
    assert set(parse_formula(formula)) == set(expected)


@pytest.mark.parametrize(
    ("formula", "hint"),
    [
        ("Xq2", "'Xq' is not an element"),
        ("", "element symbols"),
        ("Ca(OH", "brackets must balance"),
        ("CaOH)2", "brackets must balance"),
        ("ch4", "'c' is not allowed"),
        ("H0", "positive count"),
    ],
)
def test_parse_formula_rejects_bad_formula_naming_field_value_allowed(formula, hint):
    with pytest.raises(InputError) as caught:
        parse_formula(formula)
    error = caught.value
    assert error.field == "formula"
    assert error.value == formula
    assert hint in error.allowed
    assert "formula" in str(error) and repr(formula) in str(error)


def test_parse_formula_returns_a_fresh_dict():
    counts = parse_formula("CH4")
    counts["C"] = 99.0
    assert parse_formula("CH4") == {"C": 1.0, "H": 4.0}


# ---- look-up ------------------------------------------------------------------------------


@pytest.mark.parametrize("query", REQUIRED)
def test_required_components_load_with_complete_sourced_data(query):
    component = lookup_component(query)
    assert component.name == query
    assert component.Tc > component.Tb > 0.0
    assert component.Pc > 0.0 and component.Hvap_Tb > 0.0 and component.molar_mass > 0.0
    assert component.cp.T_min < 298.15 < component.cp.T_max
    expected_sources = {"Tc", "Pc", "Tb", "Hf_ig", "cp", "Hvap_Tb", "molar_mass"}
    assert expected_sources <= set(component.sources)
    # CHECKS.md pitfall: chemicals' TRC formation enthalpy is at 0 K, never use it
    assert "TRC" not in component.sources["Hf_ig"]


def test_lookup_by_name_formula_and_cas_give_the_same_component():
    by_name = lookup_component("ammonia")
    assert lookup_component("NH3") == by_name
    assert lookup_component("7664-41-7") == by_name
    assert lookup_component("  Ammonia ") == by_name
    assert lookup_component("CH4").name == "methane"
    assert by_name.cas == "7664-41-7"
    assert by_name.elements == {"H": 3.0, "N": 1.0}


def test_lookup_is_cached():
    assert lookup_component("toluene") is lookup_component("toluene")
    assert lookup_component("108-88-3") is lookup_component("toluene")


def test_misspelled_name_suggests_close_matches():
    with pytest.raises(ComponentNotFoundError) as caught:
        lookup_component("amonia")
    error = caught.value
    assert error.suggestions[0] == "ammonia"
    assert error.field == "component" and error.value == "amonia"
    assert "did you mean 'ammonia'" in str(error)
    assert isinstance(error, InputError)


def test_unknown_component_and_empty_query_raise_input_errors():
    with pytest.raises(ComponentNotFoundError):
        lookup_component("qwzxv-unknownium")
    with pytest.raises(InputError):
        lookup_component("   ")


@pytest.mark.parametrize("query", ["water", "methane", "ammonia", "hydrogen", "argon", "toluene"])
def test_constants_are_the_library_values_of_the_recorded_method(query):
    # source: chemicals 1.5.2, called with the method recorded in the component
    component = lookup_component(query)
    method = {field: component.sources[field].split("method ")[1].split(" ")[0] for field in
              ("Tc", "Pc", "Tb", "Hf_ig")}  # fmt: skip
    assert component.Tc == critical.Tc(component.cas, method=method["Tc"])
    assert component.Pc == critical.Pc(component.cas, method=method["Pc"])
    assert component.Tb == phase_change.Tb(component.cas, method=method["Tb"])
    assert component.Hf_ig == reaction.Hfg(component.cas, method=method["Hf_ig"])


# (nasa_gas species, our component, tolerance kJ/mol) from CHECKS.md; the tolerances cover
# the difference between ATcT (our pinned source) and NASA Glenn data.
FORMATION_CHECKS = [
    ("H2O", "water", 0.05),
    ("CO", "carbon monoxide", 0.05),
    ("CO2", "carbon dioxide", 0.06),
    ("CH4", "methane", 0.35),
    ("NH3", "ammonia", 0.4),
    ("C2H4", "ethylene", 0.1),
    ("C2H6", "ethane", 0.1),
    ("H2", "hydrogen", 0.001),
    ("N2", "nitrogen", 0.001),
    ("O2", "oxygen", 0.001),
    ("Ar", "argon", 0.001),
]


@pytest.mark.parametrize(("species", "query", "tolerance"), FORMATION_CHECKS)
def test_formation_enthalpy_against_cantera_nasa_data(nasa_species, species, query, tolerance):
    # source: Cantera 3.2 nasa_gas.yaml (NASA Glenn coefficients), h(298.15 K) in J/kmol
    reference = nasa_species[species].thermo.h(298.15) / 1e6  # kJ/mol
    assert lookup_component(query).Hf_ig / 1e3 == pytest.approx(reference, abs=tolerance)


def test_argon_has_the_monatomic_constant_heat_capacity():
    # source: chemicals Cp_data_Poling (Poling et al. 5th ed.): Cp/R = 2.5 for argon
    argon = lookup_component("argon")
    assert argon.cp.name == "polynomial"
    assert argon.cp.heat_capacity(300.0) == pytest.approx(Poling(300.0, 2.5, 0, 0, 0, 0))
    assert argon.cp.T_min <= 10.0 and argon.cp.T_max >= 6000.0


def test_poling_fallback_matches_chemicals_polynomial():
    # isobutylamine has Poling coefficients but no TRC correlation in chemicals 1.5.2
    cas = "78-81-9"
    correlation = heat_capacity_correlation(cas, "isobutylamine")
    assert correlation.name == "polynomial" and "Poling" in correlation.source
    row = Cp_data_Poling.loc[cas]
    coefficients = [row[f"a{i}"] for i in range(5)]
    assert (correlation.T_min, correlation.T_max) == (row["Tmin"], row["Tmax"])
    basis = PropertyBasis([lookup_component(cas)])
    for T in (300.0, 600.0, 1000.0):
        sensible = basis.ideal_gas_enthalpy([T])[0, 0] - basis.Hf_ig[0]
        expected = Poling_integral(T, *coefficients) - Poling_integral(298.15, *coefficients)
        assert sensible == pytest.approx(expected, rel=1e-12)
        assert correlation.heat_capacity(T) == pytest.approx(Poling(T, *coefficients), rel=1e-13)


# ---- records ------------------------------------------------------------------------------


@pytest.mark.parametrize("query", ["water", "argon", "carbon dioxide"])
def test_component_round_trips_exactly_through_json(query):
    component = lookup_component(query)
    text = json.dumps(component.to_dict())
    again = Component.from_dict(json.loads(text))
    assert again == component
    assert again.to_dict() == component.to_dict()


def test_from_dict_rejects_missing_and_unknown_fields():
    data = lookup_component("water").to_dict()
    del data["Tc"]
    with pytest.raises(InputError, match="missing \\['Tc'\\]"):
        Component.from_dict(data)
    data = {**lookup_component("water").to_dict(), "colour": "blue"}
    with pytest.raises(InputError, match="unknown \\['colour'\\]"):
        Component.from_dict(data)
    data = lookup_component("water").to_dict()
    data["cp"]["coefficients"] = [1.0, 2.0]
    with pytest.raises(InputError, match="8 TRC coefficients"):
        Component.from_dict(data)


def _pseudo(**changes):
    values = dict(
        name="heavy oil",
        formula="C16H34",
        Tc=723.0,
        Pc=1.4e6,
        Tb=560.0,
        Hf_ig=-374_000.0,
        cp=CpCorrelation("polynomial", (-13.0, 1.53, -8.5e-4, 1.8e-7), 300.0, 1000.0, "fit"),
        Hvap_Tb=51_000.0,
    )
    values.update(changes)
    return define_component(**values)


def test_define_component_computes_molar_mass_and_records_sources():
    oil = _pseudo()
    assert oil.molar_mass == pytest.approx(0.226446, rel=1e-4)  # C16H34, 226.45 g/mol
    assert oil.sources["molar_mass"].startswith("formula")
    assert oil.sources["Tc"] == "defined by user"
    assert oil.elements == {"C": 16.0, "H": 34.0}
    assert Component.from_dict(json.loads(json.dumps(oil.to_dict()))) == oil


@pytest.mark.parametrize(
    ("changes", "field", "allowed"),
    [
        ({"Tc": 500.0}, "Tc", "Tc > Tb > 0"),
        ({"Tb": -5.0}, "Tb", "greater than 0"),
        ({"Pc": 0.0}, "Pc", "greater than 0"),
        ({"Hvap_Tb": float("nan")}, "Hvap_Tb", "finite"),
        ({"Hf_ig": "a lot"}, "Hf_ig", "finite"),
        ({"formula": "C16Xq34"}, "formula", "'Xq' is not an element"),
        ({"molar_mass": 226.45}, "molar_mass", "kg/mol"),
        ({"name": ""}, "name", "non-empty"),
        ({"cas": "123"}, "cas", "CAS number"),
    ],
)
def test_define_component_names_the_invalid_field(changes, field, allowed):
    with pytest.raises(InputError) as caught:
        _pseudo(**changes)
    assert caught.value.field == field
    assert allowed in caught.value.allowed
    given = next(iter(changes.values()))
    assert caught.value.value is given or caught.value.value == given


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        ({"name": "cubic"}, "cp.name"),
        ({"coefficients": ()}, "cp.coefficients"),
        ({"coefficients": (1.0, float("inf"))}, "cp.coefficients"),
        ({"T_min": 0.0}, "cp.T_min"),
        ({"T_max": 100.0}, "cp.T_max"),
    ],
)
def test_cp_correlation_validation(kwargs, field):
    values = dict(name="polynomial", coefficients=(29.0,), T_min=200.0, T_max=1000.0, source="x")
    values.update(kwargs)
    with pytest.raises(InputError) as caught:
        CpCorrelation(**values)
    assert caught.value.field == field
