"""The registry's process units against NIST SP 811 exact factors (see CHECKS.md)."""

from __future__ import annotations

import pytest

from units_of_measure import Quantity, parse_to_internal, to_internal, ureg

# NIST SP 811 (exact or defined values), as listed in /work/shared/CHECKS.md.
POUND_KG = 0.45359237
POUND_MOLE_MOL = 453.59237
BTU_IT_J = 1055.05585262
PSI_PA = 6894.757293168
ATM_PA = 101325.0
BAR_PA = 100000.0
KCAL_IT_J = 4186.8
MMHG_PA = 133.322387415
HOUR_S = 3600.0
# Common practice: gauge = absolute - 101325 Pa.
GAUGE_REFERENCE_PA = 101325.0

REL = 1e-12


@pytest.mark.parametrize(
    ("text", "kind", "expected"),
    [
        ("1 lb/h", "mass_flow", POUND_KG / HOUR_S),  # NIST SP 811: 1 lb = 0.45359237 kg
        ("1 lbmol/h", "molar_flow", POUND_MOLE_MOL / HOUR_S),  # NIST SP 811: lb * 1000 mol/kg
        ("1 Btu/h", "power", BTU_IT_J / HOUR_S),  # NIST SP 811: Btu_IT = 1055.05585262 J
        ("1 BTU/h", "power", BTU_IT_J / HOUR_S),  # NIST SP 811: Btu_IT
        ("1 MMBtu/h", "power", 1e6 * BTU_IT_J / HOUR_S),  # NIST SP 811: Btu_IT
        ("1 kcal/h", "power", KCAL_IT_J / HOUR_S),  # NIST SP 811: kcal_IT = 4186.8 J
        ("1 Gcal/h", "power", 1e6 * KCAL_IT_J / HOUR_S),  # NIST SP 811: kcal_IT
        ("1 psia", "pressure", PSI_PA),  # NIST SP 811: 1 psi = 6894.757293168 Pa
        ("1 psi", "pressure_difference", PSI_PA),  # NIST SP 811
        ("1 atm", "pressure", ATM_PA),  # NIST SP 811: 1 atm = 101325 Pa exactly
        ("1 bar", "pressure", BAR_PA),  # NIST SP 811: 1 bar = 100000 Pa exactly
        ("1 bara", "pressure", BAR_PA),  # NIST SP 811
        ("1 mmHg", "pressure", MMHG_PA),  # NIST SP 811: 1 mmHg = 133.322387415 Pa
        ("1 kW", "power", 1e3),  # SI prefix
        ("1 MW", "power", 1e6),  # SI prefix
        ("1 t/h", "mass_flow", 1000.0 / HOUR_S),  # NIST SP 811: 1 t = 1000 kg
        ("1 kmol/h", "molar_flow", 1000.0 / HOUR_S),  # SI prefix, NIST SP 811: 1 h = 3600 s
        ("1 kmol/hr", "molar_flow", 1000.0 / HOUR_S),  # same, "hr" spelling
        ("1 kPa", "pressure", 1000.0),  # SI prefix
    ],
)
def test_process_units_match_nist_sp811(text: str, kind: str, expected: float) -> None:
    assert parse_to_internal(text, kind) == pytest.approx(expected, rel=REL)


@pytest.mark.parametrize(
    ("text", "expected_kelvin"),
    [
        ("0 degC", 273.15),  # NIST SP 811: T(K) = t(degC) + 273.15
        ("25 degC", 298.15),  # NIST SP 811
        ("25 °C", 298.15),  # NIST SP 811
        ("-40 degC", 233.15),  # NIST SP 811
        ("32 degF", 273.15),  # NIST SP 811: t(degF) = 1.8 t(degC) + 32
        ("212 degF", 373.15),  # NIST SP 811
        ("-40 degF", 233.15),  # NIST SP 811: -40 degF = -40 degC
        ("491.67 degR", 273.15),  # NIST SP 811: T(degR) = 1.8 T(K)
        ("0 degR", 0.0),  # NIST SP 811
        ("300 K", 300.0),
    ],
)
def test_temperature_scales_match_nist_sp811(text: str, expected_kelvin: float) -> None:
    assert parse_to_internal(text, "temperature") == pytest.approx(expected_kelvin, rel=REL)


@pytest.mark.parametrize(
    ("text", "expected_pa"),
    [
        ("3.5 barg", 3.5 * BAR_PA + GAUGE_REFERENCE_PA),  # common practice: gauge + 101325 Pa
        ("0 barg", GAUGE_REFERENCE_PA),  # common practice
        ("0 psig", GAUGE_REFERENCE_PA),  # common practice
        ("14.5 psig", 14.5 * PSI_PA + GAUGE_REFERENCE_PA),  # NIST SP 811 psi; common practice
        ("0 kPag", GAUGE_REFERENCE_PA),  # common practice
        ("250 kPag", 250e3 + GAUGE_REFERENCE_PA),  # common practice
    ],
)
def test_gauge_pressure_is_absolute_minus_one_atmosphere(text: str, expected_pa: float) -> None:
    assert parse_to_internal(text, "pressure") == pytest.approx(expected_pa, rel=REL)


def test_gauge_reading_round_trips_through_pint_itself() -> None:
    # common practice: gauge = absolute - 101325 Pa; checked on the registry, not the helpers
    assert Quantity(3.5, "barg").to("Pa").magnitude == pytest.approx(451325.0, rel=REL)
    assert Quantity(101325.0, "Pa").to("psig").magnitude == pytest.approx(0.0, abs=1e-12)


def test_pressure_drop_in_bar_takes_no_gauge_offset() -> None:
    # NIST SP 811: 1 bar = 100000 Pa; a drop is a difference, so no offset
    assert parse_to_internal("0.5 bar", "pressure_difference") == pytest.approx(50000.0)
    assert to_internal(0.5, "bar", "pressure_difference") == pytest.approx(50000.0)


def test_btu_per_pound_mole_degree_fahrenheit_is_4_1868_joule_per_mole_kelvin() -> None:
    # NIST SP 811: Btu_IT/(lb.degF) = 4186.8 J/(kg.K) exactly; per mole with lbmol = 453.59237 mol
    expected = BTU_IT_J / (POUND_MOLE_MOL * (1.0 / 1.8))
    assert expected == pytest.approx(4.1868, rel=REL)
    assert parse_to_internal("1 Btu/lbmol/degF", "heat_capacity") == pytest.approx(expected)


def test_btu_per_pound_mole_is_2_326_joule_per_mole() -> None:
    # NIST SP 811: Btu_IT/lb = 2326 J/kg exactly, hence Btu_IT/lbmol = 2.326 J/mol
    expected = BTU_IT_J / POUND_MOLE_MOL
    assert parse_to_internal("1 Btu/lbmol", "molar_enthalpy") == pytest.approx(expected, rel=REL)
    assert expected == pytest.approx(2.326, rel=REL)


def test_coulomb_farad_and_pint_long_names_keep_their_meaning() -> None:
    # pint's definitions (reference library): C is coulomb, F is farad
    assert Quantity(1.0, "C").to("A*s").magnitude == pytest.approx(1.0)
    assert Quantity(1.0, "F").dimensionality == ureg.farad.dimensionality
    # ISO Btu and thermochemical calorie stay reachable (ISO 80000-5 / NIST SP 811 values)
    assert Quantity(1.0, "Btu_iso").to("J").magnitude == pytest.approx(1055.056, rel=REL)
    assert Quantity(1.0, "thermochemical_calorie").to("J").magnitude == pytest.approx(4.184)


def test_mbtu_is_refused_as_ambiguous() -> None:
    from units_of_measure import UnitError

    with pytest.raises(UnitError, match="kBtu or MMBtu"):
        parse_to_internal("3 MBtu/h", "power", field="Heater.duty")
    # kBtu is unambiguous: a thousand IT Btu (NIST SP 811)
    assert parse_to_internal("1 kBtu/h", "power") == pytest.approx(1e3 * BTU_IT_J / HOUR_S)
