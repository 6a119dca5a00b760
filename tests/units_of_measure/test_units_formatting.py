"""Display text of numbers and quantities."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from units_of_measure import (
    KINDS,
    InputError,
    display_units,
    format_quantity,
    format_value,
    parse_to_internal,
)


@pytest.mark.parametrize(
    ("value", "significant", "expected"),
    [
        (298.15, 5, "298.15"),
        (25.0, 5, "25"),
        (1.0, 5, "1"),
        (-0.0, 5, "0"),
        (0.0, 5, "0"),
        (-3.5, 5, "-3.5"),
        (123456.7, 5, "123457"),  # all integer digits of ordinary numbers
        (0.25, 5, "0.25"),
        (0.00012345678, 5, "0.00012346"),
        (1.23456e-7, 5, "1.2346e-07"),
        (3.2e12, 5, "3.2e+12"),
        (999999999.7, 5, "1e+09"),  # rounding carries into the scientific range
        (3.14159265, 3, "3.14"),
        (101325.0, 5, "101325"),
        (float("nan"), 5, "nan"),
        (float("-inf"), 5, "-inf"),
    ],
)
def test_format_value(value: float, significant: int, expected: str) -> None:
    assert format_value(value, significant) == expected


def test_significant_must_be_positive() -> None:
    with pytest.raises(InputError, match="significant"):
        format_value(1.0, 0)


@pytest.mark.parametrize(
    ("internal_value", "kind", "unit", "expected"),
    [
        (298.15, "temperature", "K", "298.15 K"),
        (298.15, "temperature", "degC", "25 degC"),  # NIST SP 811: T(K) = t(degC) + 273.15
        (373.15, "temperature", "degF", "212 degF"),  # NIST SP 811
        (451325.0, "pressure", "barg", "3.5 barg"),  # common practice: gauge + 101325 Pa
        (120e3 / 3600, "molar_flow", "kmol/h", "120 kmol/h"),
        (0.25, "fraction", "%", "25 %"),
        (0.25, "fraction", "1", "0.25"),
        (10.0, "temperature_difference", "degF", "18 degF"),  # NIST SP 811: 1 K = 1.8 degF
    ],
)
def test_format_quantity(internal_value: float, kind: str, unit: str, expected: str) -> None:
    assert format_quantity(internal_value, kind, unit) == expected


EVERY_KIND_AND_UNIT = [(kind, unit) for kind in KINDS for unit in display_units(kind)]


@settings(max_examples=400, deadline=None)
@given(
    kind_and_unit=st.sampled_from(EVERY_KIND_AND_UNIT),
    internal_value=st.floats(1e-3, 1e8),
)
def test_displayed_text_parses_back_to_the_value(
    kind_and_unit: tuple[str, str], internal_value: float
) -> None:
    # property: what the stream table shows can be typed back in (documented convention)
    kind, unit = kind_and_unit
    text = format_quantity(internal_value, kind, unit, significant=15)
    parsed = parse_to_internal(text, kind)
    assert math.isclose(parsed, internal_value, rel_tol=1e-12, abs_tol=1e-9), text
