"""parse_quantity / parse_to_internal on good and bad user text."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from units_of_measure import KINDS, Quantity, UnitError, parse_quantity, parse_to_internal

# NIST SP 811 exact factors (CHECKS.md): bar, psi, lb, lbmol; h = 3600 s
BAR_PA = 100000.0
PSI_PA = 6894.757293168


@pytest.mark.parametrize(
    ("text", "kind", "expected"),
    [
        ("25 degC", "temperature", 298.15),  # NIST SP 811: T(K) = t(degC) + 273.15
        ("25°C", "temperature", 298.15),  # NIST SP 811
        ("25 ° C", "temperature", 298.15),  # NIST SP 811
        ("25 \u2103", "temperature", 298.15),  # NIST SP 811; one-character degree Celsius sign
        ("25 C", "temperature", 298.15),  # NIST SP 811; lone C in a temperature field
        ("77 F", "temperature", 298.15),  # NIST SP 811: t(degF) = 1.8 t(degC) + 32
        ("\u221240 degF", "temperature", 233.15),  # NIST SP 811; typographic minus sign
        ("3.5 barg", "pressure", 3.5 * BAR_PA + 101325.0),  # common practice for gauge
        ("3.5barg", "pressure", 3.5 * BAR_PA + 101325.0),  # common practice for gauge
        ("0 psig", "pressure", 101325.0),  # common practice for gauge
        ("14.7 psia", "pressure", 14.7 * PSI_PA),  # NIST SP 811: psi
        ("2 bara", "pressure", 2 * BAR_PA),  # NIST SP 811: bar
        ("120 kmol/h", "molar_flow", 120e3 / 3600),  # SI prefix; NIST SP 811: h = 3600 s
        ("120 kmol/hr", "molar_flow", 120e3 / 3600),
        ("1e3 kg/h", "mass_flow", 1e3 / 3600),
        ("1E3kg/h", "mass_flow", 1e3 / 3600),
        ("2.5 t/h", "mass_flow", 2.5e3 / 3600),  # NIST SP 811: t = 1000 kg
        ("  5 kW ", "power", 5e3),
        (".5 MW", "power", 5e5),
        ("+5 kW", "duty", 5e3),
        ("2 MMBtu/h", "power", 2e6 * 1055.05585262 / 3600),  # NIST SP 811: Btu_IT
        ("5 degC", "temperature_difference", 5.0),  # NIST SP 811: 1 Celsius degree = 1 K
        ("9 degF", "temperature_difference", 5.0),  # NIST SP 811: 1 Fahrenheit degree = 5/9 K
        ("0.5 bar", "pressure_difference", 50000.0),  # NIST SP 811: no gauge offset on a drop
        ("25 %", "fraction", 0.25),
        ("0.25", "fraction", 0.25),
        ("100 ppm", "fraction", 1e-4),
        ("18.015 g/mol", "molar_mass", 0.018015),
        ("-241.8 kJ/mol", "molar_enthalpy", -241800.0),
        ("2 kW/K", "ua", 2000.0),
    ],
)
def test_good_text_parses(text: str, kind: str, expected: float) -> None:
    assert parse_to_internal(text, kind) == pytest.approx(expected, rel=1e-12)


def test_parse_quantity_keeps_the_typed_unit() -> None:
    quantity = parse_quantity("25 degC", "temperature")
    assert quantity.magnitude == 25.0 and quantity.units == Quantity(1, "degC").units
    difference = parse_quantity("5 degC", "temperature_difference")
    assert difference.units == Quantity(1, "delta_degC").units


def test_bare_number_is_refused_unless_a_default_unit_is_given() -> None:
    with pytest.raises(UnitError, match="a unit is required") as caught:
        parse_quantity("25", "temperature", field="Feed.T")
    assert caught.value.field == "Feed.T" and caught.value.value == "25"
    assert parse_to_internal("25", "temperature", default_unit="degC") == pytest.approx(298.15)
    assert parse_to_internal("25 K", "temperature", default_unit="degC") == 25.0


def test_wrong_dimension_message_names_field_value_and_expected_dimension() -> None:
    with pytest.raises(UnitError) as caught:
        parse_quantity("3 kg", "temperature", field="Feed.T")
    assert str(caught.value) == (
        "Feed.T: '3 kg' is not allowed; expected a temperature such as degC, K, degF"
    )
    assert caught.value.field == "Feed.T"
    assert caught.value.value == "3 kg"


@pytest.mark.parametrize(
    ("text", "kind", "reason"),
    [
        ("abc", "temperature", "not a number"),
        ("", "pressure", "not a number"),
        ("kg/h 5", "mass_flow", "not a number"),
        ("nan degC", "temperature", "not a finite number"),
        ("NaN", "fraction", "not a finite number"),
        ("inf K", "temperature", "not a finite number"),
        ("-Infinity kW", "power", "not a finite number"),
        ("25 degQ", "temperature", "unknown unit"),
        ("5 kg/", "mass_flow", "unknown unit"),
        ("5 (kg", "mass_flow", "unknown unit"),
        ("1 C", "molar_flow", "expected a molar flow"),
        ("5 kmol/h", "mass_flow", "expected a mass flow"),
        ("0.5 barg", "pressure_difference", "gauge units measure pressures"),
        ("5 delta_degC", "temperature", "a difference unit"),
        ("-300 degC", "temperature", "absolute zero"),
        ("-2 barg", "pressure", "vacuum"),
        ("3 kg", "fraction", "expected a fraction"),
        ("1,000 kg/h", "mass_flow", "unknown unit"),
        ("5 kg/0", "mass_flow", "unknown unit"),  # regression: pint raised ZeroDivisionError
        ("3 dB", "fraction", "logarithmic unit"),
    ],
)
def test_bad_text_is_refused_with_a_reason(text: str, kind: str, reason: str) -> None:
    with pytest.raises(UnitError, match=reason) as caught:
        parse_quantity(text, kind, field="B1.spec")
    assert str(caught.value).startswith(f"B1.spec: {text!r} is not allowed; ")


def test_non_text_is_refused() -> None:
    with pytest.raises(UnitError, match="not text"):
        parse_quantity(25.0, "temperature")  # type: ignore[arg-type]


@settings(max_examples=300, deadline=None)
@given(text=st.text(max_size=24), kind=st.sampled_from(sorted(KINDS)))
def test_any_text_parses_or_raises_unit_error(text: str, kind: str) -> None:
    # property: user text never escapes as a pint or Python parsing error
    try:
        parse_to_internal(text, kind)
    except UnitError:
        pass


@settings(max_examples=300, deadline=None)
@given(
    number=st.floats(-1e6, 1e6, allow_nan=False),
    unit=st.sampled_from(["kg", "kmol/h", "degC", "barg", "Pa", "%", "kW/K", "s", "m**2"]),
    kind=st.sampled_from(sorted(KINDS)),
)
def test_number_and_unit_parse_or_raise_unit_error(number: float, unit: str, kind: str) -> None:
    try:
        parse_to_internal(f"{number} {unit}", kind)
    except UnitError:
        pass
