"""Bad text never hangs the unit layer, and conversions that overflow are refused.

Issue 15: a 100,000-character unit took over 12 s to parse (pint's parser grows with the
square of the length); 1.7e308 barg converted to an infinite pressure in Pa.
"""

from __future__ import annotations

import pytest

from units_of_measure import (
    MAX_QUANTITY_TEXT_LENGTH,
    MAX_UNIT_TEXT_LENGTH,
    InputError,
    TextTooLongError,
    UnitError,
    UnitTextTooLongError,
    check_text_length,
    from_internal,
    from_internal_array,
    parse_quantity,
    parse_to_internal,
    resolve_unit,
    to_internal,
)

LONG_UNIT = "kmol/h" * 16_667  # 100,002 characters of text that is a unit, repeated


def _assert_names_length_and_limit(error: UnitTextTooLongError, field: str, length: int) -> None:
    message = str(error)
    assert isinstance(error, UnitError) and isinstance(error, InputError)
    assert error.field == field and message.startswith(f"{field}: ")
    assert error.length == length
    assert f"({length} characters)" in message  # the text's length
    assert f"this has {length}" in error.allowed  # kept by callers that re-raise `allowed`
    assert f"limited to {error.limit} characters" in message
    assert len(message) < 300  # the text itself is cut short in the message


def test_a_hundred_thousand_character_unit_is_refused_before_parsing() -> None:
    with pytest.raises(UnitTextTooLongError) as refused:
        resolve_unit(LONG_UNIT, "molar_flow")
    _assert_names_length_and_limit(refused.value, "unit", len(LONG_UNIT))
    assert refused.value.limit == MAX_UNIT_TEXT_LENGTH
    assert refused.value.value == LONG_UNIT  # the error keeps the whole text


@pytest.mark.parametrize(
    "convert",
    [
        lambda: to_internal(1.0, LONG_UNIT, "molar_flow", field="Feed.flow"),
        lambda: parse_quantity("1 " + LONG_UNIT, "molar_flow", "Feed.flow"),
        lambda: parse_to_internal("1", "molar_flow", "Feed.flow", default_unit=LONG_UNIT),
    ],
    ids=["to_internal", "parse_quantity", "default unit"],
)
def test_a_long_unit_is_refused_naming_the_field_its_length_and_the_limit(convert) -> None:
    with pytest.raises(UnitTextTooLongError) as refused:
        convert()
    error = refused.value
    # parse_quantity's whole text meets the quantity limit first, the others the unit limit
    assert error.limit in (MAX_UNIT_TEXT_LENGTH, MAX_QUANTITY_TEXT_LENGTH)
    _assert_names_length_and_limit(error, "Feed.flow", error.length)
    assert error.length in (len(LONG_UNIT), len(LONG_UNIT) + 2)


def test_display_conversions_refuse_a_long_unit_too() -> None:
    with pytest.raises(UnitTextTooLongError):
        from_internal(1.0, "molar_flow", LONG_UNIT)
    with pytest.raises(UnitTextTooLongError):
        from_internal_array([1.0], "molar_flow", LONG_UNIT)


def test_the_limits_are_generous_for_real_units() -> None:
    # every unit a process engineer types is far below the limit, and text at the limit
    # is still read (spaces around the unit are allowed)
    padded = "kmol/h".center(MAX_UNIT_TEXT_LENGTH)
    assert len(padded) == MAX_UNIT_TEXT_LENGTH
    assert to_internal(3.6, padded, "molar_flow") == pytest.approx(1.0)  # 3.6 kmol/h = 1 mol/s
    with pytest.raises(UnitTextTooLongError):
        to_internal(3.6, padded + " ", "molar_flow")
    typed = "25 degC".ljust(MAX_QUANTITY_TEXT_LENGTH)
    assert parse_to_internal(typed, "temperature") == pytest.approx(298.15)  # NIST SP 811
    with pytest.raises(UnitTextTooLongError) as refused:
        parse_to_internal(typed + " ", "temperature", "Feed.T")
    assert refused.value.limit == MAX_QUANTITY_TEXT_LENGTH
    assert f"quantity text is limited to {MAX_QUANTITY_TEXT_LENGTH} characters" in str(
        refused.value
    )


def test_a_quantity_whose_unit_part_is_over_the_unit_limit_names_the_unit_limit() -> None:
    text = "25 " + "k" * (MAX_UNIT_TEXT_LENGTH + 1)
    assert len(text) <= MAX_QUANTITY_TEXT_LENGTH
    with pytest.raises(UnitTextTooLongError) as refused:
        parse_quantity(text, "temperature", "Feed.T")
    assert refused.value.field == "Feed.T"
    assert refused.value.limit == MAX_UNIT_TEXT_LENGTH
    assert refused.value.length == MAX_UNIT_TEXT_LENGTH + 1


def test_check_text_length_for_other_fields_is_an_input_error_not_a_unit_error() -> None:
    check_text_length("Feed", "blocks[0].name", 10)  # within the limit: nothing happens
    with pytest.raises(TextTooLongError) as refused:
        check_text_length("F" * 11, "blocks[0].name", 10, "a block name")
    assert not isinstance(refused.value, UnitError)
    assert str(refused.value) == (
        "blocks[0].name: 'FFFFFFFFFFF' is not allowed; "
        "a block name is limited to 10 characters (this has 11)"
    )


def test_any_input_error_cuts_a_long_value_short_in_its_message() -> None:
    error = InputError("Feed.name", "x" * 5000, "a shorter name")
    assert (
        str(error) == f"Feed.name: {'x' * 40!r}... (5000 characters) is not allowed; a shorter name"
    )
    assert error.value == "x" * 5000
    assert str(InputError("f", [1.0] * 1000, "fewer")).startswith("f: [1.0, 1.0")
    assert len(str(InputError("f", [1.0] * 1000, "fewer"))) < 120


@pytest.mark.parametrize(
    ("value", "unit", "kind", "largest"),
    [
        # NIST SP 811: 1 bar = 1e5 Pa, so the largest finite barg is max float / 1e5
        (1.7e308, "barg", "pressure", "1.798e+303"),
        # 1 MMBtu/h = 1e6 * 1055.05585262 J / 3600 s (NIST SP 811): 293,071 W
        (1e308, "MMBtu/h", "power", "6.134e+302"),
        (-1e307, "kJ/mol", "molar_enthalpy", "1.798e+305"),
    ],
)
def test_a_value_that_overflows_on_conversion_is_refused(value, unit, kind, largest) -> None:
    with pytest.raises(UnitError) as refused:
        to_internal(value, unit, kind, field="Feed.P")
    message = str(refused.value)
    assert refused.value.field == "Feed.P"
    assert message.startswith(f"Feed.P: '{value} {unit}' is not allowed; it converts to ")
    assert "inf" in message
    assert f"between -{largest} and {largest} {unit}" in message


def test_the_same_overflow_typed_as_text_is_refused() -> None:
    with pytest.raises(UnitError, match=r"Feed\.P: '1\.7e308 barg' .* converts to inf Pa"):
        parse_to_internal("1.7e308 barg", "pressure", "Feed.P")


def test_large_values_that_stay_finite_still_convert() -> None:
    # NIST SP 811: 1 bar = 1e5 Pa; gauge = absolute - 101325 Pa (common practice)
    assert to_internal(1e303, "barg", "pressure") == pytest.approx(1e308)
    assert to_internal(1e300, "kmol/h", "molar_flow") == pytest.approx(1e300 / 3.6)
