"""Units of measure: the application's one pint registry, unit systems and parsing.

This package is the boundary between user-facing units and the solve: it turns text such
as ``"25 degC"`` or ``"120 kmol/h"`` into floats in internal units (mol/s, kg/s, K, Pa,
W, J/mol, kg/mol) and formats internal floats for display. Layers below the GUI receive
plain floats and numpy arrays only.

Importing the package is cheap: the pint registry is built on the first conversion (or
the first use of ``ureg``, ``Quantity`` or ``Unit``), once, by :func:`get_registry`.
"""

from typing import Any

from .conversion import (
    check_unit_length,
    from_internal,
    from_internal_array,
    resolve_unit,
    to_internal,
    to_internal_array,
)
from .errors import (
    InputError,
    LoopwrightError,
    TextTooLongError,
    UnitError,
    UnitTextTooLongError,
)
from .formatting import format_quantity, format_value
from .kinds import KIND_ALIASES, KINDS, QuantityKind, display_units, get_kind
from .limits import MAX_QUANTITY_TEXT_LENGTH, MAX_UNIT_TEXT_LENGTH, check_text_length
from .parsing import parse_quantity, parse_to_internal
from .registry import get_registry
from .systems import UNIT_SYSTEMS, UnitSystem, get_unit_system

__all__ = [
    "KINDS",
    "KIND_ALIASES",
    "InputError",
    "LoopwrightError",
    "MAX_QUANTITY_TEXT_LENGTH",
    "MAX_UNIT_TEXT_LENGTH",
    "Quantity",
    "QuantityKind",
    "TextTooLongError",
    "UNIT_SYSTEMS",
    "Unit",
    "UnitError",
    "UnitSystem",
    "UnitTextTooLongError",
    "check_text_length",
    "check_unit_length",
    "display_units",
    "format_quantity",
    "format_value",
    "get_registry",
    "from_internal",
    "from_internal_array",
    "get_kind",
    "get_unit_system",
    "parse_quantity",
    "parse_to_internal",
    "resolve_unit",
    "to_internal",
    "to_internal_array",
    "ureg",
]


def __getattr__(name: str) -> Any:
    """``ureg``, ``Quantity`` and ``Unit`` from :mod:`.registry`, which builds it on first use."""
    if name in ("ureg", "Quantity", "Unit"):
        from . import registry

        return getattr(registry, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
