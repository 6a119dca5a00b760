"""Display text for numbers and quantities.

Convention: a quantity is shown as ``"<number> <unit>"`` with the unit text exactly as
offered by the kind (ASCII, e.g. ``"25 degC"``, ``"120 kmol/h"``, ``"3.5 barg"``), and a
plain fraction as the number alone. So every displayed value can be copied back into an
input field and :func:`units_of_measure.parse_quantity` reads the same value (to the
digits shown). Numbers show ``significant`` significant digits without trailing zeros,
all integer digits of ordinary numbers, and scientific notation only below 1e-4 or from
1e9 up in magnitude.
"""

from __future__ import annotations

import math

from .conversion import from_internal
from .errors import InputError

__all__ = ["format_value", "format_quantity", "FIXED_NOTATION_RANGE"]

#: Magnitudes shown in fixed notation: ``low <= |value| < high``.
FIXED_NOTATION_RANGE = (1e-4, 1e9)


def _strip_zeros(text: str) -> str:
    """Remove trailing zeros after a decimal point, and the point if nothing follows."""
    if "." not in text:
        return text
    return text.rstrip("0").rstrip(".")


def _scientific(value: float, significant: int) -> str:
    mantissa, exponent = f"{value:.{significant - 1}e}".split("e")
    return f"{_strip_zeros(mantissa)}e{exponent}"


def format_value(value: float, significant: int = 5) -> str:
    """Format a number for display with ``significant`` significant digits.

    Examples
    --------
    >>> [format_value(v) for v in (298.15, 25.0, -0.0, 123456.7, 1.23456e-7, 3.2e12)]
    ['298.15', '25', '0', '123457', '1.2346e-07', '3.2e+12']
    """
    if isinstance(significant, bool) or not isinstance(significant, int) or significant < 1:
        raise InputError("significant", significant, "expected an integer of at least 1")
    number = float(value)
    if math.isnan(number):
        return "nan"
    if math.isinf(number):
        return "inf" if number > 0 else "-inf"
    if number == 0.0:
        return "0"
    low, high = FIXED_NOTATION_RANGE
    if not low <= abs(number) < high:
        return _scientific(number, significant)
    decimals = max(significant - 1 - math.floor(math.log10(abs(number))), 0)
    text = _strip_zeros(f"{number:.{decimals}f}")
    if abs(float(text)) >= high:  # rounding carried it up to the next power of ten
        return _scientific(number, significant)
    return text


def format_quantity(value_internal: float, kind: str, unit: str, significant: int = 5) -> str:
    """Show an internal-unit value in ``unit``, e.g. ``"25 degC"`` (see module docstring).

    Examples
    --------
    >>> format_quantity(298.15, "temperature", "degC")
    '25 degC'
    """
    number = format_value(from_internal(value_internal, kind, unit), significant)
    if unit in ("", "1"):
        return number
    return f"{number} {unit}"
