"""Hypothesis properties of the conversions."""

from __future__ import annotations

import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from units_of_measure import (
    KINDS,
    display_units,
    from_internal,
    from_internal_array,
    get_kind,
    to_internal,
    to_internal_array,
)

EVERY_KIND_AND_UNIT = [(kind, unit) for kind in KINDS for unit in display_units(kind)]
# Gauge units cancel against the 101325 Pa offset: a few ulp of 1e5 Pa absolute.
OFFSET_ABS = 1e-9


@settings(max_examples=500, deadline=None)
@given(
    kind_and_unit=st.sampled_from(EVERY_KIND_AND_UNIT),
    internal_value=st.floats(0.0, 1e9) | st.floats(-1e9, 0.0),
)
def test_round_trip_internal_to_display_and_back(
    kind_and_unit: tuple[str, str], internal_value: float
) -> None:
    kind, unit = kind_and_unit
    if get_kind(kind).absolute_scale and internal_value < 0.0:
        internal_value = -internal_value  # no temperature below 0 K or pressure below vacuum
    shown = from_internal(internal_value, kind, unit)
    back = to_internal(shown, unit, kind)
    assert math.isclose(back, internal_value, rel_tol=1e-12, abs_tol=OFFSET_ABS)


@settings(max_examples=200, deadline=None)
@given(
    kind_and_unit=st.sampled_from(EVERY_KIND_AND_UNIT),
    values=st.lists(st.floats(0.0, 1e7), min_size=1, max_size=20),
)
def test_array_round_trip(kind_and_unit: tuple[str, str], values: list[float]) -> None:
    kind, unit = kind_and_unit
    internal = np.array(values)
    back = to_internal_array(from_internal_array(internal, kind, unit), unit, kind)
    np.testing.assert_allclose(back, internal, rtol=1e-12, atol=OFFSET_ABS)


@settings(max_examples=200, deadline=None)
@given(celsius=st.floats(-273.15, 1e4))
def test_celsius_fahrenheit_and_kelvin_agree(celsius: float) -> None:
    # NIST SP 811: T(K) = t(degC) + 273.15 and t(degF) = 1.8 t(degC) + 32
    kelvin = to_internal(celsius, "degC", "temperature")
    assert math.isclose(kelvin, celsius + 273.15, rel_tol=1e-12, abs_tol=1e-10)
    fahrenheit = from_internal(kelvin, "temperature", "degF")
    assert math.isclose(fahrenheit, 1.8 * celsius + 32.0, rel_tol=1e-12, abs_tol=1e-9)
