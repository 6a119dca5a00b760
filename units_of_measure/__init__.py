"""Units of measure: the application's one pint registry, unit systems and parsing.

This package is the boundary between user-facing units and the solve: it turns text such
as ``"25 degC"`` or ``"120 kmol/h"`` into floats in internal units (mol/s, kg/s, K, Pa,
W, J/mol, kg/mol) and formats internal floats for display. Layers below the GUI receive
plain floats and numpy arrays only.
"""

from .conversion import (
    from_internal,
    from_internal_array,
    resolve_unit,
    to_internal,
    to_internal_array,
)
from .errors import InputError, LoopwrightError, UnitError
from .formatting import format_quantity, format_value
from .kinds import KIND_ALIASES, KINDS, QuantityKind, display_units, get_kind
from .parsing import parse_quantity, parse_to_internal
from .registry import Quantity, Unit, ureg
from .systems import UNIT_SYSTEMS, UnitSystem, get_unit_system

__all__ = [
    "KINDS",
    "KIND_ALIASES",
    "InputError",
    "LoopwrightError",
    "Quantity",
    "QuantityKind",
    "UNIT_SYSTEMS",
    "Unit",
    "UnitError",
    "UnitSystem",
    "display_units",
    "format_quantity",
    "format_value",
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
