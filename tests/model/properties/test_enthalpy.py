"""Formation-basis enthalpy, Watson heat of vaporization, heats of reaction, T from H."""

from __future__ import annotations

import warnings

import cantera as ct
import CoolProp.CoolProp as CoolProp
import numpy as np
import pytest
from chemicals.heat_capacity import TRC_gas_data, TRCCp, TRCCp_integral
from chemicals.phase_change import Watson
from scipy.optimize import brentq

from model.errors import InputError
from model.properties.components import CpCorrelation, define_component, lookup_component
from model.properties.cp_correlations import trc_heat_capacity_and_integral
from model.properties.enthalpy import PropertyBasis

NAMES = [
    "methane",
    "oxygen",
    "carbon dioxide",
    "water",
    "nitrogen",
    "hydrogen",
    "ammonia",
    "carbon monoxide",
    "argon",
    "methanol",
    "benzene",
]


@pytest.fixture(scope="module")
def basis() -> PropertyBasis:
    return PropertyBasis([lookup_component(name) for name in NAMES])


@pytest.fixture(scope="module")
def nasa_species() -> dict[str, ct.Species]:
    """Cantera's bundled NASA Glenn data (McBride, Zehe & Gordon, NASA/TP-2002-211556)."""
    return {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}


def _nu(basis: PropertyBasis, coefficients: dict[str, float]) -> np.ndarray:
    nu = np.zeros(len(basis))
    for name, value in coefficients.items():
        nu[basis.index(name)] = value
    return nu


# ---- heat-capacity correlation ------------------------------------------------------------


def _trc_integral_term_magnitude(T: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Sum of the absolute values of the terms chemicals' TRCCp_integral adds up.

    The integral is a sum of terms that cancel (log(1 - y) against y for small y, terms
    of 1e5 J/mol leaving a result of 1e3), so the rounding error of any evaluation order
    is a few machine epsilons of this sum, not of the result.
    """
    a0, a1, a2, a3, a4, a5, a6, a7 = c
    y = np.where(T > a7, (T - a7) / (T + a6), 0.0)
    first = a6 + a7
    one_m_y = 1.0 - y
    terms = (
        np.abs((2 * a3 + 8 * a4) * np.log(one_m_y))
        + np.abs((a3 * (1 + 1 / one_m_y) + a4 * (7 + 1 / one_m_y)) * y)
        + np.abs(a4 * (3 * y**2 + 5 / 3 * y**3 + y**4 + 0.6 * y**5 + y**6 / 3))
        + np.abs((a4 - a5 / first**2) * y**7 / 7)
    )
    return 8.314462618 * (np.abs(a0 * T) + np.abs(a1 * np.exp(-a2 / T) / a2) + first * terms)


def test_vectorised_trc_matches_chemicals_scalar_functions_to_rounding():
    # source: chemicals 1.5.2 TRCCp / TRCCp_integral (Kabo & Roganov 1994), all usable rows.
    # Not bit for bit: a vectorised formula may round differently from the scalar one on
    # some numpy builds (numpy 2.4.6: 92 of 15,672 Cp values differ by 1 ulp, 2.5e-15
    # relative). Cp is compared to a few ulp; the integral to a few ulp of the sum of its
    # term magnitudes, since its terms cancel (three rows with |a5| ~ 1e9 lose two digits).
    table = TRC_gas_data[(TRC_gas_data["a6"] + TRC_gas_data["a7"]) > 0]
    coefficients = table[[f"a{i}" for i in range(8)]].to_numpy(dtype=float)
    temperatures = np.array([10.0, 60.0, 150.0, 298.15, 523.4, 1000.0, 2500.0, 6000.0])
    cp, integral = trc_heat_capacity_and_integral(temperatures[:, None], tuple(coefficients.T))
    expected_cp = [[TRCCp(T, *row) for row in coefficients] for T in temperatures]
    expected_integral = [[TRCCp_integral(T, *row) for row in coefficients] for T in temperatures]
    np.testing.assert_allclose(cp, expected_cp, rtol=1e-14, atol=0)
    magnitude = _trc_integral_term_magnitude(temperatures[:, None], coefficients.T)
    np.testing.assert_array_less(
        np.abs(integral - np.asarray(expected_integral)), 8 * np.finfo(float).eps * magnitude
    )


def test_trc_at_exactly_a7_drops_the_a5_term_like_chemicals():
    # source: chemicals TRCCp special-cases T == a7
    row = TRC_gas_data.loc["74-82-8", [f"a{i}" for i in range(8)]].to_numpy(dtype=float)
    cp, integral = trc_heat_capacity_and_integral(row[7], tuple(row))
    assert cp == TRCCp(row[7], *row)
    assert integral == TRCCp_integral(row[7], *row)


def test_ideal_gas_enthalpy_at_298_15_K_is_the_formation_enthalpy(basis):
    np.testing.assert_allclose(basis.ideal_gas_enthalpy([298.15])[0], basis.Hf_ig, atol=1e-9)


# (species, component, {T: relative tolerance}) from CHECKS.md
SENSIBLE_CHECKS = [
    ("N2", "nitrogen", {500.0: 0.002, 1000.0: 0.002, 1500.0: 0.002}),
    ("O2", "oxygen", {500.0: 0.002, 1000.0: 0.002, 1500.0: 0.002}),
    ("H2O", "water", {500.0: 0.002, 1000.0: 0.002, 1500.0: 0.002}),
    ("CO2", "carbon dioxide", {500.0: 0.002, 1000.0: 0.002, 1500.0: 0.002}),
    ("CH4", "methane", {500.0: 0.005, 1000.0: 0.005, 1500.0: 0.025}),
]


@pytest.mark.parametrize(("species", "name", "tolerances"), SENSIBLE_CHECKS)
def test_sensible_enthalpy_against_cantera_nasa_data(
    basis, nasa_species, species, name, tolerances
):
    # source: Cantera 3.2 nasa_gas.yaml, h(T) - h(298.15 K) in J/kmol
    thermo = nasa_species[species].thermo
    column = basis.index(name)
    temperatures = np.array(list(tolerances))
    ours = basis.ideal_gas_enthalpy(temperatures)[:, column] - basis.Hf_ig[column]
    for T, value in zip(temperatures, ours, strict=True):
        reference = (thermo.h(T) - thermo.h(298.15)) / 1e3  # J/mol
        assert value == pytest.approx(reference, rel=tolerances[T]), (species, T)


# ---- heat of vaporization -----------------------------------------------------------------


def test_watson_matches_chemicals_exactly(basis):
    # source: chemicals.phase_change.Watson (Watson 1943, exponent 0.38)
    temperatures = np.array([200.0, 298.15, 373.0, 450.0, 600.0, 647.0, 650.0, 900.0])
    heats = basis.heat_of_vaporization(temperatures)
    for name in ("water", "methanol", "ammonia", "hydrogen", "argon"):
        component = lookup_component(name)
        column = basis.index(name)
        expected = [Watson(T, component.Hvap_Tb, component.Tb, component.Tc) for T in temperatures]
        np.testing.assert_array_equal(heats[:, column], expected)


def test_heat_of_vaporization_is_zero_at_and_above_critical(basis):
    Tc = basis.Tc[basis.index("water")]
    heats = basis.heat_of_vaporization(np.array([Tc, Tc + 1e-9, 2 * Tc]))
    assert np.all(heats[:, basis.index("water")] == 0.0)


def _coolprop_hvap(fluid: str, **state: float) -> float:
    (name, value), = state.items()  # fmt: skip
    vapor = CoolProp.PropsSI("Hmolar", name, value, "Q", 1, fluid)
    liquid = CoolProp.PropsSI("Hmolar", name, value, "Q", 0, fluid)
    return vapor - liquid


def test_water_heat_of_vaporization_at_normal_boiling_point_against_coolprop():
    # source: CoolProp 8.0 (IAPWS-95) at 101325 Pa; tolerance 0.4 % (CHECKS.md)
    water = lookup_component("water")
    assert water.Hvap_Tb == pytest.approx(_coolprop_hvap("Water", P=101325.0), rel=0.004)


def test_ammonia_heat_of_vaporization_at_normal_boiling_point_against_coolprop():
    # source: CoolProp 8.0 at 101325 Pa; tolerance 0.3 % (CHECKS.md)
    ammonia = lookup_component("ammonia")
    assert ammonia.Hvap_Tb == pytest.approx(_coolprop_hvap("Ammonia", P=101325.0), rel=0.003)


@pytest.mark.parametrize("T", [298.15, 423.15])
def test_watson_against_coolprop_water_at_25_and_150_degC(basis, T):
    # source: CoolProp 8.0 (IAPWS-95); Watson is good to about 1.5 % here (CHECKS.md:
    # 44.565 vs 43.987 kJ/mol at 25 degC, 37.653 vs 38.080 at 150 degC)
    ours = basis.heat_of_vaporization([T])[0, basis.index("water")]
    assert ours == pytest.approx(_coolprop_hvap("Water", T=T), rel=0.015)


# ---- mixtures and streams -----------------------------------------------------------------


def test_liquid_enthalpy_is_ideal_gas_minus_heat_of_vaporization(basis):
    T = np.array([300.0, 350.0])
    liquid = np.array([True, False])
    enthalpies = basis.molar_enthalpies(T, liquid)
    ideal_gas = basis.ideal_gas_enthalpy(T)
    np.testing.assert_allclose(enthalpies[0], ideal_gas[0] - basis.heat_of_vaporization(T)[0])
    np.testing.assert_array_equal(enthalpies[1], ideal_gas[1])


def test_vectorised_streams_equal_single_stream_results(basis):
    rng = np.random.default_rng(7)
    flows = rng.uniform(0.0, 3.0, size=(50, len(basis)))
    T = rng.uniform(150.0, 1500.0, size=50)
    liquid = rng.uniform(size=50) < 0.4
    together = basis.enthalpy_flow(flows, T, liquid)
    heat_capacity = basis.heat_capacity_flow(flows, T, liquid)
    for i in range(50):
        single = basis.stream_enthalpy_flow(flows[i], T[i], liquid[i])
        assert together[i] == pytest.approx(single, rel=1e-12, abs=1e-6)
        capacity = basis.stream_heat_capacity_flow(flows[i], T[i], liquid[i])
        assert heat_capacity[i] == pytest.approx(capacity, rel=1e-12)


@pytest.mark.parametrize(("T", "liquid"), [(400.0, False), (1200.0, False), (320.0, True)])
def test_heat_capacity_flow_is_the_temperature_derivative(basis, T, liquid):
    flows = np.linspace(0.5, 2.0, len(basis))[None, :]
    step = 1e-3
    upper = basis.enthalpy_flow(flows, [T + step], [liquid])[0]
    lower = basis.enthalpy_flow(flows, [T - step], [liquid])[0]
    derivative = (upper - lower) / (2 * step)
    assert basis.heat_capacity_flow(flows, [T], [liquid])[0] == pytest.approx(derivative, rel=1e-7)


# ---- temperature from enthalpy ------------------------------------------------------------


@pytest.mark.parametrize(
    ("T", "liquid", "guess"),
    [
        (500.0, False, 298.15),
        (2400.0, False, 298.15),
        (250.0, False, 5000.0),
        (20.0, False, 298.15),
        (330.0, True, 298.15),
        (190.0, True, 600.0),
        (640.0, True, 300.0),  # liquid close to water's Tc, steep Watson slope
    ],
)
def test_temperature_from_enthalpy_inverts_enthalpy_flow(basis, T, liquid, guess):
    flows = np.linspace(0.2, 1.2, len(basis))
    target = basis.stream_enthalpy_flow(flows, T, liquid)
    assert basis.temperature_from_enthalpy(flows, target, liquid, guess) == pytest.approx(
        T, abs=1e-7
    )


def test_temperature_from_enthalpy_single_component_liquid():
    basis = PropertyBasis([lookup_component("water")])
    flows = np.array([2.5])
    target = basis.stream_enthalpy_flow(flows, 350.0, liquid=True)
    assert basis.temperature_from_enthalpy(flows, target, True) == pytest.approx(350.0, abs=1e-7)


def test_temperature_from_enthalpy_outside_bracket_raises(basis):
    flows = np.ones(len(basis))
    too_high = basis.stream_enthalpy_flow(flows, 6000.0, False) + 1e3
    with pytest.raises(InputError) as caught:
        basis.temperature_from_enthalpy(flows, too_high, False)
    assert caught.value.field == "enthalpy_flow"
    assert "10 K and 6000 K" in caught.value.allowed
    too_low = basis.stream_enthalpy_flow(flows, 10.0, True) - 1e3
    with pytest.raises(InputError, match="10 K and 6000 K"):
        basis.temperature_from_enthalpy(flows, too_low, True)


def test_temperature_from_enthalpy_bad_input(basis):
    flows = np.ones(len(basis))
    with pytest.raises(InputError, match="0 mol/s or more"):
        basis.temperature_from_enthalpy(-flows, 0.0, False)
    with pytest.raises(InputError, match="finite"):
        basis.temperature_from_enthalpy(flows[:2], 0.0, False)
    with pytest.raises(InputError, match="enthalpy_flow"):
        basis.temperature_from_enthalpy(flows, float("nan"), False)
    round_off = flows.copy()
    round_off[0] = -1e-15  # upstream round-off is not a negative flow
    target = basis.stream_enthalpy_flow(np.maximum(round_off, 0.0), 400.0, False)
    assert basis.temperature_from_enthalpy(round_off, target, False) == pytest.approx(400.0)
    zero = np.zeros(len(basis))
    assert basis.temperature_from_enthalpy(zero, 0.0, False, T_guess=345.0) == 345.0
    with pytest.raises(InputError, match="no flow"):
        basis.temperature_from_enthalpy(zero, 5.0, False)


# ---- reactions ----------------------------------------------------------------------------

# (stoichiometry by component, by nasa_gas species, tolerance kJ/mol) from CHECKS.md
REACTIONS = [
    (
        {"methane": -1, "oxygen": -2, "carbon dioxide": 1, "water": 2},
        {"CH4": -1, "O2": -2, "CO2": 1, "H2O": 2},
        0.3,
    ),
    ({"nitrogen": -1, "hydrogen": -3, "ammonia": 2}, {"N2": -1, "H2": -3, "NH3": 2}, 0.8),
    (
        {"carbon monoxide": -1, "water": -1, "carbon dioxide": 1, "hydrogen": 1},
        {"CO": -1, "H2O": -1, "CO2": 1, "H2": 1},
        0.1,
    ),
]


@pytest.mark.parametrize(("ours", "species", "tolerance"), REACTIONS)
def test_standard_heat_of_reaction_against_cantera(basis, nasa_species, ours, species, tolerance):
    # source: Hess's law on Cantera 3.2 nasa_gas.yaml formation enthalpies at 298.15 K
    reference = sum(nu * nasa_species[s].thermo.h(298.15) for s, nu in species.items()) / 1e6
    heat = basis.standard_heat_of_reaction(_nu(basis, ours)) / 1e3
    assert heat == pytest.approx(reference, abs=tolerance)
    assert np.all(basis.element_balance(_nu(basis, ours)) == 0.0)


def test_heat_of_reaction_comes_out_of_the_energy_balance(basis):
    # formation basis: products minus reactants at 298.15 K equals Hess's law
    nu = _nu(basis, {"methane": -1, "oxygen": -2, "carbon dioxide": 1, "water": 2})
    reactants = np.maximum(-nu, 0.0)
    products = np.maximum(nu, 0.0)
    flows = np.vstack([reactants, products])
    balance = basis.enthalpy_flow(flows, [298.15, 298.15], [False, False])
    assert balance[1] - balance[0] == pytest.approx(basis.standard_heat_of_reaction(nu), abs=1e-6)


def test_element_balance_reports_unbalanced_reaction(basis):
    nu = _nu(basis, {"methane": -1, "oxygen": -1, "carbon dioxide": 1, "water": 2})
    net = dict(zip(basis.element_names, basis.element_balance(nu), strict=True))
    assert net["O"] == 2.0 and net["C"] == 0.0 and net["H"] == 0.0
    assert basis.element_names == sorted(basis.element_names)
    assert basis.element_matrix.shape == (len(basis.element_names), len(basis))


def test_element_balance_of_overflowing_coefficients_is_not_finite_and_silent(basis):
    nu = _nu(basis, {"methane": -1e308, "oxygen": -1e308, "carbon dioxide": 1e308})
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # numpy's overflow RuntimeWarning would fail here
        net = basis.element_balance(nu)
        heat = basis.standard_heat_of_reaction(nu)
    assert not np.all(np.isfinite(net)) and not np.isfinite(heat)


def test_stoichiometry_must_match_the_components(basis):
    with pytest.raises(InputError, match="stoichiometry"):
        basis.standard_heat_of_reaction(np.ones(3))


# ---- warnings and basis construction ------------------------------------------------------


def test_correlation_range_warning_names_component_and_range():
    basis = PropertyBasis([lookup_component("ethane"), lookup_component("nitrogen")])
    assert basis.correlation_range_warnings(800.0) == []
    warnings = basis.correlation_range_warnings(2000.0)
    assert len(warnings) == 1 and warnings[0].startswith("ethane")
    assert "50-1500 K" in warnings[0]
    assert basis.correlation_range_warnings(2000.0, flows=np.array([0.0, 1.0])) == []


def test_supercritical_liquid_warning():
    basis = PropertyBasis([lookup_component("methane"), lookup_component("water")])
    warnings = basis.supercritical_liquid_warnings(300.0)
    assert len(warnings) == 1 and warnings[0].startswith("methane")
    assert "critical temperature 190.56 K" in warnings[0]
    assert basis.supercritical_liquid_warnings(300.0, flows=np.array([0.0, 1.0])) == []


def test_basis_index_and_construction_errors(basis):
    assert basis.names[basis.index("water")] == "water"
    with pytest.raises(InputError, match="one of"):
        basis.index("unobtainium")
    with pytest.raises(InputError, match="each component name once"):
        PropertyBasis([lookup_component("water"), lookup_component("H2O")])
    with pytest.raises(InputError):
        PropertyBasis([])


def test_hand_defined_polynomial_component_mixes_with_library_components():
    constant = CpCorrelation("polynomial", (30.0,), 100.0, 2000.0, "assumed constant Cp")
    inert = define_component(
        "inert", "N2", Tc=126.2, Pc=3.4e6, Tb=77.4, Hf_ig=0.0, cp=constant, Hvap_Tb=5570.0
    )
    basis = PropertyBasis([inert, lookup_component("water")])
    sensible = basis.ideal_gas_enthalpy([1000.0])[0, 0]
    assert sensible == pytest.approx(30.0 * (1000.0 - 298.15), rel=1e-13)
    flows = np.array([1.0, 1.0])
    target = basis.stream_enthalpy_flow(flows, 700.0, False)
    assert basis.temperature_from_enthalpy(flows, target, False) == pytest.approx(700.0)


@pytest.mark.parametrize(("T", "liquid"), [(500.0, False), (20.0, False), (640.0, True)])
def test_an_unconfirmed_last_newton_step_lands_within_the_tolerance(basis, T, liquid):
    # A search started a few microkelvin from the root takes one Newton step and stops
    # without evaluating again (model.properties.enthalpy._CONFIRMED_STEP): the root it
    # returns must still be within the 1e-9 K tolerance of scipy's brentq on the same
    # enthalpy (xtol 1e-12), also for a liquid near water's Tc, where Cp rises steeply.
    flows = np.linspace(0.2, 1.2, len(basis))
    target = basis.stream_enthalpy_flow(flows, T, liquid)
    reference = brentq(
        lambda t: basis.stream_enthalpy_flow(flows, t, liquid) - target,
        T - 1.0,
        T + 1.0,
        xtol=1e-12,
        rtol=4 * np.finfo(float).eps,
    )
    for offset in (-4e-6, 4e-6):
        found = basis.temperature_from_enthalpy(flows, target, liquid, T + offset)
        assert abs(found - reference) <= 1e-9
