"""The one pint unit registry of Loopwright, with the units process engineers type.

Every quantity in the application comes from ``ureg``; quantities never mix across
registries. On top of pint's defaults the registry adds or fixes:

- ``lbmol`` (pound-mole, 453.59237 mol exactly), so ``"lbmol/h"`` parses;
- ``Btu``/``BTU`` and ``cal`` (with prefixes: ``kBtu``, ``kcal``, ``Gcal``) mean the
  International Table units (1055.05585262 J and 4.1868 J, NIST SP 811), the process
  industry's convention; pint's long names keep their own meaning (``british_thermal_unit``
  is the ISO Btu, ``calorie`` the thermochemical one);
- ``MMBtu`` = 10^6 Btu;
- ``bara`` and ``psia`` as aliases of ``bar`` and ``psi`` (absolute pressure);
- gauge pressures ``barg``, ``kPag`` and ``psig`` as offset units: absolute = gauge
  reading + 101325 Pa (common practice). Their differences (``delta_bar_gauge`` ...)
  equal the absolute units, so a gauge offset never applies to a pressure drop.

Offset units (degC, degF, barg, ...) are converted to base units automatically when they
appear in products, so ``"25 degC"`` and ``"3.5 barg"`` parse; computing is done in
kelvin and pascal by the conversion helpers, never on offset values.

The registry is built on first use, not at import: importing pint and loading its
definitions takes a few hundred milliseconds that the command line and the window's
start-up should not pay before they convert anything. :func:`get_registry` builds it
once, under a lock, however many threads ask at the same moment; the module attributes
``ureg``, ``Quantity`` and ``Unit`` (also importable by name) call it.
"""

from __future__ import annotations

import contextlib
import logging
import threading
from collections.abc import Iterator
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    import pint

# ``ureg``, ``Quantity`` and ``Unit`` are module attributes made on first use (__getattr__).
__all__ = ["PROCESS_UNIT_DEFINITIONS", "get_registry"]

#: Definitions added to pint's defaults, in pint's definition syntax.
PROCESS_UNIT_DEFINITIONS: tuple[str, ...] = (
    "pound_mole = 453.59237 * mole = lbmol = lb_mol",
    "Btu = international_british_thermal_unit = BTU",
    "cal = international_calorie",
    "MMBtu = 1e6 * Btu = MMBTU",
    "@alias bar = bara",
    "@alias pound_force_per_square_inch = psia",
    "bar_gauge = 1e5 * pascal; offset: 101325 = barg",
    "kilopascal_gauge = 1e3 * pascal; offset: 101325 = kPag",
    # psi written out in pascal (lbf = lb * g_n, NIST SP 811) so the offset is in pascal
    "psi_gauge = 0.45359237 * 9.80665 / 0.0254 ** 2 * pascal; offset: 101325 = psig",
)


@contextlib.contextmanager
def _quiet_redefinition_log() -> Iterator[None]:
    """Silence pint's "Redefining 'Btu'" log lines while our deliberate overrides load."""
    pint_logger = logging.getLogger("pint.util")
    previous_level = pint_logger.level
    pint_logger.setLevel(logging.ERROR)
    try:
        yield
    finally:
        pint_logger.setLevel(previous_level)


def _build_registry() -> pint.UnitRegistry:
    """Create pint's default registry and add :data:`PROCESS_UNIT_DEFINITIONS`."""
    import pint

    registry = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    with _quiet_redefinition_log():
        for definition in PROCESS_UNIT_DEFINITIONS:
            registry.define(definition)
    return registry


_registry: pint.UnitRegistry | None = None
_build_lock = threading.Lock()


def get_registry() -> pint.UnitRegistry:
    """The application's unit registry, built on the first call (thread-safe).

    Every caller, in any thread, gets the same registry object: the first call builds it
    while holding a lock, and calls that arrive meanwhile wait for it instead of building
    a second one. Later calls cost one global look-up.

    Examples
    --------
    >>> get_registry() is get_registry()
    True
    """
    registry = _registry
    if registry is None:
        registry = _build_once()
    return registry


def _build_once() -> pint.UnitRegistry:
    """Build the registry unless another thread did while this one waited for the lock."""
    global _registry
    with _build_lock:
        if _registry is None:
            registry = _build_registry()
            # bind the public names, so later look-ups no longer go through __getattr__
            globals().update(ureg=registry, Quantity=registry.Quantity, Unit=registry.Unit)
            _registry = registry
        return _registry


def __getattr__(name: str) -> Any:
    """``ureg`` (the registry), ``Quantity`` and ``Unit`` (its classes), built on first use."""
    if name == "ureg":
        return get_registry()
    if name in ("Quantity", "Unit"):
        return getattr(get_registry(), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
