"""Conversion between display units and the internal units of the solve.

Each (unit, kind) pair is reduced once, with pint, to a linear map
``internal = scale * value + offset`` and cached. After that, conversions are plain float
or numpy arithmetic, so the stream table can convert many values at once and the
numerical layers never see a pint Quantity.

pint and numpy are imported where they are first needed (pint with the registry, see
:mod:`.registry`), so importing this package costs a few milliseconds.
"""

from __future__ import annotations

import math
import re
import sys
import tokenize
from functools import lru_cache
from numbers import Real
from typing import TYPE_CHECKING, NamedTuple

from .errors import UnitError, UnitTextTooLongError
from .kinds import QuantityKind, get_kind
from .limits import MAX_UNIT_TEXT_LENGTH, check_text_length
from .registry import get_registry

if TYPE_CHECKING:
    import numpy as np
    import pint
    from numpy.typing import ArrayLike
    from pint.util import UnitsContainer

__all__ = [
    "resolve_unit",
    "to_internal",
    "from_internal",
    "to_internal_array",
    "from_internal_array",
    "check_unit_length",
]

# Exceptions pint's unit parser raises on malformed text (its tokenizer uses assertions),
# besides pint's own PintError.
_PARSE_ERRORS = (
    ArithmeticError,
    AttributeError,
    AssertionError,
    IndexError,
    KeyError,
    RecursionError,
    SyntaxError,
    TypeError,
    ValueError,
    tokenize.TokenError,
)

# Spellings that pint would misread, rewritten before parsing.
_SYMBOL_SPELLINGS = {"\u2103": "degC", "\u2109": "degF", "\u00baC": "degC", "\u00baF": "degF"}
# In a temperature field a lone C or F cannot be coulomb or farad.
_TEMPERATURE_SPELLINGS = {"C": "degC", "F": "degF", "deg C": "degC", "deg F": "degF"}
_AMBIGUOUS_MBTU = re.compile(r"\bMBtu\b|\bMBTU\b")


class LinearMap(NamedTuple):
    """``internal = scale * value + offset``."""

    scale: float
    offset: float


def _is_offset_unit(name: str) -> bool:
    """True for units whose zero is not the base zero: offset (degC, barg) or logarithmic."""
    return get_registry().Quantity(0.0, name).to_base_units().magnitude != 0.0


def _normalised_text(unit: str, kind: QuantityKind) -> str:
    """Rewrite spellings pint would misread; refuse the ambiguous ``MBtu``."""
    text = unit.strip().replace("\u00b0 ", "\u00b0")
    for symbol, spelling in _SYMBOL_SPELLINGS.items():
        text = text.replace(symbol, spelling)
    if kind.name in ("temperature", "temperature_difference"):
        text = _TEMPERATURE_SPELLINGS.get(text, text)
    if _AMBIGUOUS_MBTU.search(text):
        raise UnitError(
            "unit",
            unit,
            "MBtu is ambiguous (a thousand Btu in US practice, a million by SI prefix); "
            "write kBtu or MMBtu",
        )
    return text


def _parse_units(text: str, original: str, kind: QuantityKind) -> UnitsContainer:
    """Parse unit text with pint and check its dimension against ``kind``."""
    import pint
    from pint.util import to_units_container

    registry = get_registry()
    try:
        units = registry.parse_units(text, as_delta=False)
    except (pint.PintError, *_PARSE_ERRORS):
        raise UnitError("unit", original, f"unknown unit; {kind.expectation}") from None
    if units.dimensionality != registry.Unit(kind.internal_unit).dimensionality:
        raise UnitError("unit", original, kind.expectation)
    return to_units_container(units, registry)


def _units_for_kind(units: UnitsContainer, original: str, kind: QuantityKind) -> UnitsContainer:
    """Apply the kind's reading of offset units (see :mod:`units_of_measure.kinds`)."""
    registry = get_registry()
    offset_names = [name for name in units if _is_offset_unit(name)]
    if kind.absolute_scale:
        if any(name.startswith("delta_") for name in units):
            raise UnitError("unit", original, f"a difference unit; {kind.expectation}")
        if offset_names and dict(units.items()) != {offset_names[0]: 1}:
            raise UnitError("unit", original, f"offset unit in a product; {kind.expectation}")
        return units
    for name in offset_names:
        dimensionality = registry.get_dimensionality(name)
        if dimensionality == registry.get_dimensionality("pascal"):
            reason = "gauge units measure pressures, not differences"
            raise UnitError("unit", original, f"{reason}; {kind.expectation}")
        if dimensionality != registry.get_dimensionality("kelvin"):
            raise UnitError("unit", original, f"logarithmic unit; {kind.expectation}")
        units = units.rename(name, f"delta_{name}")
    return units


@lru_cache(maxsize=512)
def _resolve_cached(unit: str, kind_name: str) -> pint.Unit:
    kind = get_kind(kind_name)
    text = _normalised_text(unit, kind)
    units = _units_for_kind(_parse_units(text, unit, kind), unit, kind)
    return get_registry().Unit(units)


def check_unit_length(unit: object, field: str) -> None:
    """Refuse unit text over :data:`~.limits.MAX_UNIT_TEXT_LENGTH` characters, before pint.

    Raises
    ------
    UnitTextTooLongError
        Naming ``field``, the text's length and the limit; a :class:`UnitError`.
    """
    if isinstance(unit, str):
        check_text_length(unit, field, MAX_UNIT_TEXT_LENGTH, "unit text", UnitTextTooLongError)


def resolve_unit(unit: str, kind: str) -> pint.Unit:
    """Read unit text as a unit of ``kind``.

    Offset units follow the kind (points on the scale for temperature and pressure,
    differences elsewhere); ``C``/``F`` alone mean degC/degF in temperature fields.

    Raises
    ------
    UnitError
        Unknown unit, wrong dimension, a unit the kind refuses, or text longer than
        :data:`~.limits.MAX_UNIT_TEXT_LENGTH` (field ``"unit"``).
    """
    if not isinstance(unit, str):
        raise UnitError("unit", unit, "expected unit text such as 'kmol/h'")
    check_unit_length(unit, "unit")
    return _resolve_cached(unit, get_kind(kind).name)


@lru_cache(maxsize=512)
def _linear_map(unit: str, kind_name: str) -> LinearMap:
    """Scale and offset from ``unit`` to the internal unit of ``kind_name``."""
    from pint.util import to_units_container

    units = resolve_unit(unit, kind_name)
    registry = get_registry()
    internal = registry.Unit(get_kind(kind_name).internal_unit)
    container = to_units_container(units, registry)
    offset_names = [name for name in container if _is_offset_unit(name)]
    if not offset_names:
        return LinearMap(registry.Quantity(1.0, units).to(internal).magnitude, 0.0)
    delta_units = registry.Unit(container.rename(offset_names[0], f"delta_{offset_names[0]}"))
    scale = registry.Quantity(1.0, delta_units).to(internal).magnitude
    offset = registry.Quantity(0.0, units).to(internal).magnitude
    return LinearMap(scale, offset)


def _unit_text(unit: str | None, kind: QuantityKind, field: str) -> str:
    """The unit for a plain number; ``None`` is allowed only for dimensionless kinds."""
    if unit is None:
        if kind.internal_unit == "dimensionless":
            return "1"
        raise UnitError(field, None, f"a plain number needs a unit; {kind.expectation}")
    return unit


def _is_quantity(value: object) -> bool:
    """True for a pint Quantity of any registry; while pint is not imported, none exists."""
    pint = sys.modules.get("pint")
    return pint is not None and isinstance(value, pint.Quantity)


def _quantity_parts(value: pint.Quantity, unit: str | None, field: str) -> tuple[object, str]:
    """Magnitude and unit text of a Quantity from the application's registry."""
    if unit is not None:
        raise UnitError(field, value, "give a Quantity or a number with a unit, not both")
    if not isinstance(value, get_registry().Quantity):
        raise UnitError(field, value, "expected a Quantity of Loopwright's registry")
    return value.magnitude, f"{value.units:D}"


def _finite_float(magnitude: object, field: str, shown: object) -> float:
    """A finite float from ``magnitude``, or UnitError."""
    if isinstance(magnitude, bool) or not isinstance(magnitude, Real):
        raise UnitError(field, shown, "expected a number")
    number = float(magnitude)
    if not math.isfinite(number):
        raise UnitError(field, shown, "expected a finite number")
    return number


def _check_finite(
    internal_value: float,
    linear_map: LinearMap,
    unit: str,
    kind: QuantityKind,
    field: str,
    shown: str,
) -> None:
    """Refuse a value whose conversion overflows (``1.7e308 barg`` is ``inf`` Pa).

    The range named is the largest magnitude in ``unit`` that stays a finite float in
    the internal unit.
    """
    if math.isfinite(internal_value):
        return
    largest = (sys.float_info.max - abs(linear_map.offset)) / abs(linear_map.scale)
    raise UnitError(
        field,
        shown,
        f"it converts to {internal_value} {kind.internal_unit}; expected {kind.description} "
        f"between {-largest:.4g} and {largest:.4g} {unit}, finite in {kind.internal_unit}",
    )


def _check_physical(internal_value: float, kind: QuantityKind, field: str, shown: str) -> None:
    """Refuse temperatures below absolute zero and pressures below vacuum."""
    if kind.name == "temperature" and internal_value < 0.0:
        raise UnitError(field, shown, "expected a temperature at or above absolute zero (0 K)")
    if kind.name == "pressure" and internal_value < 0.0:
        raise UnitError(
            field, shown, "expected an absolute pressure of at least 0 Pa (vacuum is -1.01325 barg)"
        )


def to_internal(
    value: float | pint.Quantity, unit: str | None, kind: str, field: str = "value"
) -> float:
    """Convert a number in ``unit`` (or a Quantity) to a float in the kind's internal unit.

    Parameters
    ----------
    value
        A real number, or a Quantity of the application's registry (then ``unit`` must
        be None).
    unit
        Unit of a plain number; None only for dimensionless kinds such as ``fraction``.
    kind
        A key of :data:`units_of_measure.KINDS` (or an alias).
    field
        Named in error messages.

    Raises
    ------
    UnitError
        Not a finite number, before or after conversion; unit text over
        :data:`~.limits.MAX_UNIT_TEXT_LENGTH` characters; unit unknown or of the wrong
        dimension; a temperature below absolute zero or a pressure below vacuum.

    Examples
    --------
    >>> round(to_internal(25.0, "degC", "temperature"), 6)
    298.15
    """
    kind_spec = get_kind(kind)
    if _is_quantity(value):
        shown = str(value)
        value, unit = _quantity_parts(value, unit, field)
    else:
        unit = _unit_text(unit, kind_spec, field)
        check_unit_length(unit, field)
        shown = f"{value} {unit}"
    number = _finite_float(value, field, shown)
    try:
        linear_map = _linear_map(unit, kind_spec.name)
    except UnitError as error:
        raise UnitError(field, shown, error.allowed) from None
    internal_value = number * linear_map.scale + linear_map.offset
    _check_finite(internal_value, linear_map, unit, kind_spec, field, shown)
    _check_physical(internal_value, kind_spec, field, shown)
    return internal_value


def from_internal(value: float, kind: str, unit: str) -> float:
    """Convert a float in the kind's internal unit to ``unit``; NaN stays NaN."""
    scale, offset = _linear_map(unit, get_kind(kind).name)
    return (float(value) - offset) / scale


def to_internal_array(values: ArrayLike, unit: str, kind: str) -> np.ndarray:
    """Vectorised :func:`to_internal` for plain numbers (no range checks; NaN passes)."""
    import numpy as np

    scale, offset = _linear_map(unit, get_kind(kind).name)
    return np.asarray(values, dtype=float) * scale + offset


def from_internal_array(values: ArrayLike, kind: str, unit: str) -> np.ndarray:
    """Vectorised :func:`from_internal`: internal-unit values to ``unit``."""
    import numpy as np

    scale, offset = _linear_map(unit, get_kind(kind).name)
    return (np.asarray(values, dtype=float) - offset) / scale
