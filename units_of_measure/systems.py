"""Named unit systems: the display unit of every kind, chosen together.

A unit system only chooses display units; the solve always runs in internal units.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from .errors import UnitError
from .kinds import KINDS, get_kind

__all__ = ["UnitSystem", "UNIT_SYSTEMS", "get_unit_system"]


@dataclass(frozen=True)
class UnitSystem:
    """Display units for every kind in :data:`units_of_measure.KINDS`.

    Parameters
    ----------
    name
        Name shown to the user, key in :data:`UNIT_SYSTEMS`.
    units
        Kind name to unit text; every kind must be present.
    """

    name: str
    units: Mapping[str, str]

    def __post_init__(self) -> None:
        missing = sorted(set(KINDS) - set(self.units))
        if missing:
            raise UnitError(f"{self.name}.units", missing, "expected a unit for every kind")

    def unit_for(self, kind: str) -> str:
        """Display unit of ``kind`` (a kind name or alias) in this system."""
        return self.units[get_kind(kind).name]


class _UnitSystemTable(dict):
    """A dict whose missing keys raise UnitError naming the known unit systems."""

    def __missing__(self, name: str) -> UnitSystem:
        raise UnitError("unit system", name, f"expected one of: {', '.join(self)}")


_SI = UnitSystem(
    "SI",
    {
        "molar_flow": "mol/s",
        "mass_flow": "kg/s",
        "temperature": "K",
        "temperature_difference": "K",
        "pressure": "Pa",
        "pressure_difference": "Pa",
        "power": "W",
        "molar_enthalpy": "J/mol",
        "molar_mass": "kg/mol",
        "heat_transfer_coefficient_area": "W/K",
        "fraction": "1",
        "heat_capacity": "J/mol/K",
    },
)

_METRIC = UnitSystem(
    "Metric",
    {
        "molar_flow": "kmol/h",
        "mass_flow": "kg/h",
        "temperature": "degC",
        "temperature_difference": "K",
        "pressure": "bar",
        "pressure_difference": "bar",
        "power": "kW",
        "molar_enthalpy": "kJ/mol",
        "molar_mass": "kg/kmol",
        "heat_transfer_coefficient_area": "kW/K",
        "fraction": "1",
        "heat_capacity": "kJ/kmol/K",
    },
)

_US_CUSTOMARY = UnitSystem(
    "US customary",
    {
        "molar_flow": "lbmol/h",
        "mass_flow": "lb/h",
        "temperature": "degF",
        "temperature_difference": "degF",
        "pressure": "psia",
        "pressure_difference": "psi",
        "power": "Btu/h",
        "molar_enthalpy": "Btu/lbmol",
        "molar_mass": "lb/lbmol",
        "heat_transfer_coefficient_area": "Btu/h/degF",
        "fraction": "1",
        "heat_capacity": "Btu/lbmol/degF",
    },
)

#: The unit systems by name; an unknown name raises UnitError listing the known ones.
UNIT_SYSTEMS: dict[str, UnitSystem] = _UnitSystemTable(
    {system.name: system for system in (_SI, _METRIC, _US_CUSTOMARY)}
)


def get_unit_system(name: str) -> UnitSystem:
    """The unit system called ``name``; UnitError listing the known ones otherwise."""
    return UNIT_SYSTEMS[name]
