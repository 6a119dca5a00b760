"""Reading quantities typed by the user, such as ``"25 degC"`` or ``"3.5 barg"``.

The text is split into a number and unit text here (not by pint's expression parser), so
that a missing unit, a non-number, NaN and infinity each get their own clear message,
and so that the unit is read the way its kind requires (see :mod:`.kinds`).
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING

from .conversion import check_unit_length, resolve_unit, to_internal
from .errors import UnitError, UnitTextTooLongError
from .kinds import get_kind
from .limits import MAX_QUANTITY_TEXT_LENGTH, check_text_length
from .registry import get_registry

if TYPE_CHECKING:
    import pint

__all__ = ["parse_quantity", "parse_to_internal"]

_NUMBER_THEN_UNIT = re.compile(
    r"(?P<number>[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)(?P<unit>.*)", re.DOTALL
)
_NON_FINITE = re.compile(r"[+-]?(?:nan|inf(?:inity)?)(?![a-z])", re.IGNORECASE)
# Unicode minus and no-break spaces, as pasted from documents.
_TYPOGRAPHIC = str.maketrans({"\u2212": "-", "\u00a0": " ", "\u202f": " "})


def _split_number_and_unit(text: str, field: str, expectation: str) -> tuple[float, str]:
    """Return the number and the (stripped) unit text of ``text``."""
    cleaned = text.translate(_TYPOGRAPHIC).strip()
    if _NON_FINITE.match(cleaned):
        raise UnitError(field, text, f"not a finite number; {expectation}")
    match = _NUMBER_THEN_UNIT.match(cleaned)
    if match is None:
        raise UnitError(field, text, f"not a number followed by a unit; {expectation}")
    return float(match["number"]), match["unit"].strip()


def _parse(
    text: str, kind: str, field: str, default_unit: str | None
) -> tuple[float, pint.Unit, float]:
    """Number, unit read for the kind, and internal value of user text."""
    kind_spec = get_kind(kind)
    if not isinstance(text, str):
        raise UnitError(field, text, f"not text; {kind_spec.expectation}")
    check_text_length(text, field, MAX_QUANTITY_TEXT_LENGTH, "quantity text", UnitTextTooLongError)
    number, unit = _split_number_and_unit(text, field, kind_spec.expectation)
    if not unit:
        if default_unit is None and kind_spec.internal_unit != "dimensionless":
            raise UnitError(field, text, f"a unit is required; {kind_spec.expectation}")
        unit = default_unit if default_unit is not None else "1"
    check_unit_length(unit, field)
    try:
        units = resolve_unit(unit, kind_spec.name)
        internal_value = to_internal(number, unit, kind_spec.name, field)
    except UnitError as error:
        raise UnitError(field, text, error.allowed) from None
    return number, units, internal_value


def parse_quantity(
    text: str, kind: str, field: str = "value", default_unit: str | None = None
) -> pint.Quantity:
    """Read user text as a Quantity of ``kind``.

    Parameters
    ----------
    text
        A number and a unit, e.g. ``"25 degC"``, ``"3.5 barg"``, ``"1e3 kg/h"``.
    kind
        A key of :data:`units_of_measure.KINDS` (or an alias).
    field
        Where the text was typed, e.g. ``"Feed.T"``; named in error messages.
    default_unit
        Unit for a bare number. Without it a bare number is refused, except for
        dimensionless kinds (``fraction``), where it is a plain fraction.

    Returns
    -------
    pint.Quantity
        In the unit typed, read for the kind: a temperature difference typed in degC
        comes back in ``delta_degC``.

    Raises
    ------
    UnitError
        Text over :data:`~.limits.MAX_QUANTITY_TEXT_LENGTH` characters (or its unit over
        :data:`~.limits.MAX_UNIT_TEXT_LENGTH`), checked before any parsing; not a
        number, NaN or infinity, a missing or unknown unit, a unit of the wrong
        dimension, a temperature below absolute zero or a pressure below vacuum. The
        message names ``field``, the text and what was expected, e.g.
        ``Feed.T: '3 kg' is not allowed; expected a temperature such as degC, K, degF``.

    Examples
    --------
    >>> parse_quantity("3.5 barg", "pressure").to("Pa").magnitude
    451325.0
    """
    number, units, _ = _parse(text, kind, field, default_unit)
    return get_registry().Quantity(number, units)


def parse_to_internal(
    text: str, kind: str, field: str = "value", default_unit: str | None = None
) -> float:
    """Read user text (see :func:`parse_quantity`) straight to a float in internal units.

    Examples
    --------
    >>> parse_to_internal("360 kmol/h", "molar_flow")  # mol/s
    100.0
    """
    return _parse(text, kind, field, default_unit)[2]
