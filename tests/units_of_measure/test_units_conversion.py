"""to_internal / from_internal and their array versions, for every kind and offered unit."""

from __future__ import annotations

import numpy as np
import pint
import pytest

from units_of_measure import (
    KINDS,
    Quantity,
    UnitError,
    display_units,
    from_internal,
    from_internal_array,
    get_kind,
    to_internal,
    to_internal_array,
    ureg,
)

# Internal values inside every kind's physical range (temperatures and pressures >= 0).
INTERNAL_SAMPLES = np.array([1.0, 0.37, 298.15, 101325.0, 2.5e6])
# Round trips through a gauge unit cancel against the 101325 Pa offset, so their absolute
# accuracy is a few ulp of 1e5 Pa (~1e-11 Pa), whatever the value.
ROUND_TRIP_ABS = 1e-10

EVERY_KIND_AND_UNIT = [(kind, unit) for kind in KINDS for unit in display_units(kind)]


@pytest.mark.parametrize(("kind", "unit"), EVERY_KIND_AND_UNIT)
def test_round_trip_for_every_offered_unit(kind: str, unit: str) -> None:
    for internal_value in INTERNAL_SAMPLES:
        shown = from_internal(internal_value, kind, unit)
        assert to_internal(shown, unit, kind) == pytest.approx(
            internal_value, rel=1e-12, abs=ROUND_TRIP_ABS
        )


@pytest.mark.parametrize(("kind", "unit"), EVERY_KIND_AND_UNIT)
def test_arrays_agree_with_scalars(kind: str, unit: str) -> None:
    shown = from_internal_array(INTERNAL_SAMPLES, kind, unit)
    expected = [from_internal(value, kind, unit) for value in INTERNAL_SAMPLES]
    np.testing.assert_allclose(shown, expected, rtol=1e-15)
    np.testing.assert_allclose(
        to_internal_array(shown, unit, kind), INTERNAL_SAMPLES, rtol=1e-12, atol=ROUND_TRIP_ABS
    )


@pytest.mark.parametrize(("kind", "unit"), EVERY_KIND_AND_UNIT)
def test_linear_maps_agree_with_pint(kind: str, unit: str) -> None:
    # reference library: pint's own conversion of the same value
    pint_unit = unit
    if unit in ("degC", "degF") and not get_kind(kind).absolute_scale:
        pint_unit = f"delta_{unit}"  # pint reads a lone degC as a temperature
    internal_unit = get_kind(kind).internal_unit
    expected = Quantity(7.25, pint_unit).to(internal_unit).magnitude
    assert to_internal(7.25, unit, kind) == pytest.approx(expected, rel=1e-12)


def test_kelvin_to_fahrenheit_applies_the_offset() -> None:
    # NIST SP 811: t(degF) = T(K) * 1.8 - 459.67
    assert from_internal(300.0, "temperature", "degF") == pytest.approx(300.0 * 1.8 - 459.67)
    assert from_internal(273.15, "temperature", "degC") == pytest.approx(0.0, abs=1e-12)
    assert from_internal(300.0, "temperature", "degR") == pytest.approx(540.0)  # T(degR) = 1.8 T(K)
    temperatures = from_internal_array([233.15, 273.15, 373.15], "temperature", "degF")
    np.testing.assert_allclose(temperatures, [-40.0, 32.0, 212.0], atol=1e-12)  # NIST SP 811


def test_temperature_differences_use_delta_units() -> None:
    # NIST SP 811: a Celsius degree equals a kelvin; a Fahrenheit degree is 5/9 K
    assert to_internal(10.0, "degC", "temperature_difference") == pytest.approx(10.0)
    assert to_internal(18.0, "degF", "temperature_difference") == pytest.approx(10.0)
    assert from_internal(10.0, "temperature_difference", "degF") == pytest.approx(18.0)
    assert to_internal(Quantity(5.0, "degC"), None, "temperature_difference") == pytest.approx(5.0)
    assert to_internal(Quantity(5.0, "delta_degC"), None, "temperature_difference") == 5.0


def test_quantities_are_accepted_and_foreign_registries_refused() -> None:
    # NIST SP 811: 25 degC = 298.15 K
    assert to_internal(Quantity(25.0, "degC"), None, "temperature") == pytest.approx(298.15)
    assert to_internal(ureg.Quantity(3.5, "barg"), None, "pressure") == pytest.approx(451325.0)
    with pytest.raises(UnitError, match="not both"):
        to_internal(Quantity(25.0, "degC"), "K", "temperature")
    foreign = pint.UnitRegistry().Quantity(1.0, "kg/s")
    with pytest.raises(UnitError, match="registry"):
        to_internal(foreign, None, "mass_flow")


@pytest.mark.parametrize("bad_value", [float("nan"), float("inf"), "12", True, None])
def test_non_numbers_are_refused(bad_value: object) -> None:
    with pytest.raises(UnitError) as caught:
        to_internal(bad_value, "kW", "power", field="Heater.duty")
    assert caught.value.field == "Heater.duty"


def test_a_plain_number_needs_a_unit_except_for_fractions() -> None:
    with pytest.raises(UnitError, match="needs a unit"):
        to_internal(3.0, None, "molar_flow", field="Feed.flow")
    assert to_internal(0.3, None, "fraction") == 0.3
    assert to_internal(30.0, "%", "fraction") == pytest.approx(0.3)


def test_wrong_dimension_names_field_value_and_expectation() -> None:
    with pytest.raises(UnitError) as caught:
        to_internal(3.0, "kg", "temperature", field="Feed.T")
    message = str(caught.value)
    assert message.startswith("Feed.T: '3.0 kg' is not allowed")
    assert "expected a temperature such as degC, K, degF" in message


def test_below_absolute_zero_and_below_vacuum_are_refused() -> None:
    with pytest.raises(UnitError, match="absolute zero"):
        to_internal(-300.0, "degC", "temperature")
    with pytest.raises(UnitError, match="vacuum"):
        to_internal(-2.0, "barg", "pressure")
    # a pressure difference may be negative (a pressure rise through a drop field)
    assert to_internal(-0.1, "bar", "pressure_difference") == pytest.approx(-10000.0)


def test_gauge_units_are_refused_for_pressure_differences() -> None:
    with pytest.raises(UnitError, match="gauge units measure pressures"):
        to_internal(0.5, "barg", "pressure_difference", field="Heater.pressure_drop")


def test_difference_units_are_refused_for_temperatures() -> None:
    with pytest.raises(UnitError, match="a difference unit"):
        to_internal(5.0, "delta_degC", "temperature")


def test_unknown_kind_lists_the_known_kinds() -> None:
    with pytest.raises(UnitError, match="molar_flow"):
        to_internal(1.0, "kW", "enthalpy_flow")
    assert get_kind("duty") is KINDS["power"]
    assert get_kind("ua") is KINDS["heat_transfer_coefficient_area"]


def test_nan_passes_through_display_conversion() -> None:
    # a value not yet computed stays NaN in the stream table
    assert np.isnan(from_internal(float("nan"), "temperature", "degC"))
    shown = from_internal_array(np.array([np.nan, 298.15]), "temperature", "degC")
    assert np.isnan(shown[0]) and shown[1] == pytest.approx(25.0)
