"""The kinds of quantity the model uses, each with its internal unit and display units.

The internal units are the ones the solve computes in (mol/s, kg/s, K, Pa, W, J/mol,
kg/mol); the display units are the ones a unit chooser offers. Every display unit is a
plain ASCII string that :func:`units_of_measure.parse_quantity` reads back.

Two kinds sit on an absolute scale, ``temperature`` and ``pressure``: there, offset
units (degC, degF, barg, psig) are points on the scale. Every other kind reads a
temperature offset unit as a difference (``"5 degC"`` of ``temperature_difference`` is
5 K; ``"Btu/h/degF"`` is per degree Fahrenheit of difference) and refuses gauge
pressure units, because a gauge offset must never apply to a pressure drop.
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import UnitError

__all__ = ["QuantityKind", "KINDS", "KIND_ALIASES", "get_kind", "display_units"]


@dataclass(frozen=True)
class QuantityKind:
    """One kind of quantity.

    Parameters
    ----------
    name
        Key in :data:`KINDS`, e.g. ``"molar_flow"``.
    description
        Words for messages, with an article: ``"a molar flow"``.
    internal_unit
        Unit the solve uses for this kind (pint spelling).
    display_units
        Units offered to the user, first the internal one.
    examples
        The few units (or, for fractions, inputs) named in error messages.
    absolute_scale
        True where offset units are points on a scale (temperature, pressure).
    """

    name: str
    description: str
    internal_unit: str
    display_units: tuple[str, ...]
    examples: tuple[str, ...]
    absolute_scale: bool = False

    @property
    def expectation(self) -> str:
        """What an input of this kind should look like, for error messages."""
        return f"expected {self.description} such as {', '.join(self.examples)}"


_KIND_LIST = (
    QuantityKind(
        "molar_flow",
        "a molar flow",
        "mol/s",
        ("mol/s", "kmol/h", "kmol/s", "mol/h", "lbmol/h"),
        ("kmol/h", "mol/s", "lbmol/h"),
    ),
    QuantityKind(
        "mass_flow",
        "a mass flow",
        "kg/s",
        ("kg/s", "kg/h", "t/h", "g/s", "lb/h"),
        ("kg/h", "t/h", "lb/h"),
    ),
    QuantityKind(
        "temperature",
        "a temperature",
        "K",
        ("K", "degC", "degF", "degR"),
        ("degC", "K", "degF"),
        absolute_scale=True,
    ),
    QuantityKind(
        "temperature_difference",
        "a temperature difference",
        "K",
        ("K", "degC", "degF", "degR"),
        ("K", "degC", "degF"),
    ),
    QuantityKind(
        "pressure",
        "a pressure",
        "Pa",
        ("Pa", "kPa", "MPa", "bar", "barg", "kPag", "psia", "psig", "atm", "mmHg"),
        ("bar", "barg", "kPa", "psia", "psig"),
        absolute_scale=True,
    ),
    QuantityKind(
        "pressure_difference",
        "a pressure difference",
        "Pa",
        ("Pa", "kPa", "mbar", "bar", "psi", "mmHg"),
        ("bar", "kPa", "psi"),
    ),
    QuantityKind(
        "power",
        "a power or heat duty",
        "W",
        ("W", "kW", "MW", "kJ/h", "Btu/h", "MMBtu/h", "kcal/h", "Gcal/h"),
        ("kW", "MW", "Btu/h", "MMBtu/h"),
    ),
    QuantityKind(
        "molar_enthalpy",
        "a molar enthalpy",
        "J/mol",
        ("J/mol", "kJ/mol", "kJ/kmol", "kcal/kmol", "Btu/lbmol"),
        ("kJ/mol", "J/mol", "Btu/lbmol"),
    ),
    QuantityKind(
        "molar_mass",
        "a molar mass",
        "kg/mol",
        ("kg/mol", "g/mol", "kg/kmol", "lb/lbmol"),
        ("g/mol", "kg/kmol"),
    ),
    QuantityKind(
        "heat_transfer_coefficient_area",
        "a heat transfer coefficient times area (UA)",
        "W/K",
        ("W/K", "kW/K", "MW/K", "kcal/h/K", "Btu/h/degF"),
        ("kW/K", "W/K", "Btu/h/degF"),
    ),
    QuantityKind(
        "fraction",
        "a fraction",
        "dimensionless",
        ("1", "%", "ppm"),
        ("0.25", "25 %", "100 ppm"),
    ),
    QuantityKind(
        "heat_capacity",
        "a molar heat capacity",
        "J/mol/K",
        ("J/mol/K", "kJ/kmol/K", "kJ/mol/K", "kcal/kmol/K", "Btu/lbmol/degF"),
        ("J/mol/K", "kJ/kmol/K", "Btu/lbmol/degF"),
    ),
)

#: Every kind, by name.
KINDS: dict[str, QuantityKind] = {kind.name: kind for kind in _KIND_LIST}

#: Other names accepted for a kind.
KIND_ALIASES: dict[str, str] = {"duty": "power", "ua": "heat_transfer_coefficient_area"}


def get_kind(kind: str) -> QuantityKind:
    """Return the kind called ``kind`` (or one of its :data:`KIND_ALIASES`).

    Raises
    ------
    UnitError
        If no kind has that name; the message lists the known kinds.
    """
    name = KIND_ALIASES.get(kind, kind)
    try:
        return KINDS[name]
    except (KeyError, TypeError):
        known = ", ".join([*KINDS, *KIND_ALIASES])
        raise UnitError("kind", kind, f"expected one of: {known}") from None


def display_units(kind: str) -> tuple[str, ...]:
    """Units a unit chooser offers for ``kind``, the internal unit first."""
    return get_kind(kind).display_units
