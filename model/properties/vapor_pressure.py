"""Vapor pressures and Henry constants of the "ideal" property method, with sources.

Raoult's law needs each component's vapor pressure: the Antoine coefficients of Poling,
Prausnitz & O'Connell (*The Properties of Gases and Liquids*, 5th ed.) as tabulated by
``chemicals`` (``Psat_data_AntoinePoling``, converted there to Pa and K). Outside the
tabulated range ``ln P`` is continued along its tangent in ``1/T`` (Clausius-Clapeyron
with the heat of vaporization at the range's end; common practice), so a flash can
search any temperature.

A component above its critical temperature has no vapor pressure; Henry's law takes its
place, with the Henry constant of the component in water from Sander's compilation
(Sander 2015, Atmos. Chem. Phys. 15, 4399), shipped by ``thermo`` as the "Sander T dep"
table of its interaction-parameter database (``thermo.interaction_parameters.IPDB``,
file ``Interaction Parameters/Sander_henry_T_dep.json``), evaluated as
``chemicals.solubility.Henry_pressure``: ``ln(H / Pa) = A + B / T`` (only the rows
without further temperature terms are taken). Water is the one solvent of that table: for another
solvent it is an estimate (the cautions say so).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from typing import Any

from model.errors import InputError

_LN10 = math.log(10.0)
WATER_CAS = "7732-18-5"
ANTOINE_SOURCE = (
    "chemicals Psat_data_AntoinePoling (Poling, Prausnitz & O'Connell, 5th ed.), "
    "log10(P/Pa) = A - B/(T/K + C); ln P continued along its tangent in 1/T outside "
    "{T_min:g}-{T_max:g} K"
)
HENRY_SOURCE = (
    "thermo {version} IPDB 'Sander T dep' table (thermo data file Interaction "
    "Parameters/Sander_henry_T_dep.json; Sander 2015, Atmos. Chem. Phys. 15, 4399), "
    "solute in water, ln(H/Pa) = A + B/T (chemicals.solubility.Henry_pressure)"
)


@dataclass(frozen=True)
class VaporPressureData:
    """One component's Antoine coefficients (Pa, K, base 10) and, if known, its Henry
    constant's (``ln(H/Pa) = henry_A + henry_B/T``), used above ``Tc``."""

    A: float
    B: float
    C: float
    T_min: float
    T_max: float
    Tc: float
    source: str
    henry_A: float | None = None
    henry_B: float | None = None
    henry_source: str = ""

    def ln_vapor_pressure(self, T: float) -> float:
        """ln(Psat / Pa) at T (K), continued along its tangent in 1/T outside the range."""
        if self.T_min <= T <= self.T_max:
            return _LN10 * (self.A - self.B / (T + self.C))
        end = self.T_min if T < self.T_min else self.T_max
        at_end = _LN10 * (self.A - self.B / (end + self.C))
        slope = _LN10 * self.B * end * end / (end + self.C) ** 2  # -d ln P / d(1/T)
        return at_end - slope * (1.0 / T - 1.0 / end)

    def ln_K_pressure(self, T: float) -> float:
        """ln of the pressure (Pa) that makes K = it / P: Henry above Tc, else Psat."""
        if T >= self.Tc and self.henry_A is not None:
            return self.henry_A + self.henry_B / T
        return self.ln_vapor_pressure(T)

    def to_dict(self) -> dict[str, Any]:
        return {name: getattr(self, name) for name in self.__dataclass_fields__}

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> VaporPressureData:
        return cls(**data)


def vapor_pressure_data(name: str, cas: str, Tc: float) -> VaporPressureData:
    """The vapor-pressure record of a component by CAS number.

    Raises
    ------
    InputError
        No Antoine coefficients for this component (``field`` names the component).
    """
    record = _antoine_table().get(cas)
    if record is None:
        raise InputError(
            f"{name}.vapor_pressure",
            cas or "(no CAS number)",
            "a component with Antoine coefficients in chemicals (Poling's table) for the "
            "ideal property method",
        )
    A, B, C, T_min, T_max = record
    henry = _henry_table().get(cas) if cas != WATER_CAS else None
    return VaporPressureData(
        A,
        B,
        C,
        T_min,
        T_max,
        float(Tc),
        ANTOINE_SOURCE.format(T_min=T_min, T_max=T_max),
        None if henry is None else henry[0],
        None if henry is None else henry[1],
        "" if henry is None else _henry_source(),
    )


@functools.cache
def _antoine_table() -> dict[str, tuple[float, float, float, float, float]]:
    from chemicals.vapor_pressure import Psat_data_AntoinePoling as table

    return {
        cas: (float(row.A), float(row.B), float(row.C), float(row.Tmin), float(row.Tmax))
        for cas, row in zip(table.index, table.itertuples(), strict=True)
    }


@functools.cache
def _henry_source() -> str:
    import thermo

    return HENRY_SOURCE.format(version=thermo.__version__)


@functools.cache
def _henry_table() -> dict[str, tuple[float, float]]:
    """CAS -> (A, B) of Henry constants in water with no other temperature terms."""
    from thermo.interaction_parameters import IPDB

    data = IPDB.tables["Sander T dep"]
    table = {}
    for key, row in data.items():
        solute, solvent = key.split(" ")
        if solvent == WATER_CAS and not any(row.get(k, 0.0) for k in "CDEF"):
            table[solute] = (float(row["A"]), float(row["B"]))
    return table
