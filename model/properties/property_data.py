"""The constants of the case's property method, recorded in the case with their sources.

Like the components' constants, the numbers a property method uses are copied into the
case file, so a case reopened later solves with the same numbers even if the libraries'
tables change, and a number the user edits in the file is the one used:

- "ideal": each component's Antoine coefficients and, where known, its Henry constant
  (:mod:`model.properties.vapor_pressure`);
- "Peng-Robinson": each component's acentric factor and the binary interaction
  parameter ``kij`` of every pair of components (thermo's ChemSep PR table where it has
  the pair, zero otherwise).

:class:`PropertyData` holds what a case records (both methods' parts; the file carries
the one of its method). :func:`completed` adds, from the libraries, whatever is not
recorded yet for the case's components; a component the libraries lack is left out, and
the solve's equilibrium then refuses it by name (:mod:`model.properties.property_method`).
"""

from __future__ import annotations

import dataclasses
import functools
import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from model.errors import InputError
from model.properties.peng_robinson import PENG_ROBINSON, acentric_factor
from model.properties.vapor_pressure import VaporPressureData, vapor_pressure_data

OMEGA_SOURCE = "chemicals.acentric.omega (default source)"
KIJ_ZERO_SOURCE = "no pair in thermo's 'ChemSep PR' table: 0"
KIJ_NO_CAS_SOURCE = "a component without a CAS number: 0"
ANTOINE_KEYS = ("A", "B", "C", "T_min", "T_max", "source")
KIJ_LIMIT = 1.0  # |kij| below this: a_ij = (1 - kij) sqrt(a_i a_j) stays positive


@dataclass(frozen=True)
class RecordedValue:
    """One number with its data source."""

    value: float
    source: str


def pair_key(first: str, second: str) -> tuple[str, str]:
    """The key of a pair of components, the same in either order."""
    return (first, second) if first <= second else (second, first)


@dataclass(frozen=True)
class PropertyData:
    """Recorded constants of the property methods, by component name.

    ``vapor_pressure``: name -> :class:`VaporPressureData` (ideal); ``acentric_factor``:
    name -> :class:`RecordedValue`; ``binary_parameters``: :func:`pair_key` ->
    :class:`RecordedValue` of kij (Peng-Robinson).
    """

    vapor_pressure: dict[str, VaporPressureData] = field(default_factory=dict)
    acentric_factor: dict[str, RecordedValue] = field(default_factory=dict)
    binary_parameters: dict[tuple[str, str], RecordedValue] = field(default_factory=dict)

    def to_json(self, names: Sequence[str], method: str) -> dict[str, Any]:
        """The JSON of ``method``'s constants for the components ``names`` (the case
        file's "property_data", ``model.case.property_data_part``)."""
        if method == PENG_ROBINSON:
            pairs = []
            for i, first in enumerate(names):
                for second in names[i + 1 :]:
                    value = self.binary_parameters.get(pair_key(first, second))
                    if value is not None:
                        pairs.append(
                            {
                                "components": [first, second],
                                "kij": value.value,
                                "source": value.source,
                            }
                        )
            omegas = {
                name: {
                    "value": self.acentric_factor[name].value,
                    "source": self.acentric_factor[name].source,
                }
                for name in names
                if name in self.acentric_factor
            }
            return {"acentric_factor": omegas, "binary_parameters": pairs}
        vapor = {}
        for name in names:
            record = self.vapor_pressure.get(name)
            if record is None:
                continue
            entry: dict[str, Any] = {"antoine": {key: getattr(record, key) for key in ANTOINE_KEYS}}
            if record.henry_A is not None:
                entry["henry"] = {
                    "A": record.henry_A,
                    "B": record.henry_B,
                    "source": record.henry_source,
                }
            vapor[name] = entry
        return {"vapor_pressure": vapor}

    def kij_matrix(self, names: Sequence[str]) -> list[list[float]]:
        """The symmetric kij matrix in the order of ``names`` (0 for an unrecorded pair)."""
        return [
            [
                0.0 if a == b else self.binary_parameters.get(pair_key(a, b), _ZERO).value
                for b in names
            ]
            for a in names
        ]


_ZERO = RecordedValue(0.0, KIJ_ZERO_SOURCE)


def check_kij(field_name: str, value: object) -> float:
    """A binary interaction parameter: a finite number with |kij| < 1; InputError else."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InputError(field_name, value, "a number (kij)")
    number = float(value)
    if not math.isfinite(number) or abs(number) >= KIJ_LIMIT:
        raise InputError(field_name, value, "a finite kij with -1 < kij < 1")
    return number


def completed(recorded: PropertyData | None, components: Sequence, method: str) -> PropertyData:
    """``recorded`` for ``components`` (entries of other components dropped), with what
    it lacks for ``method`` taken from the libraries. Vapor-pressure records get the
    component's own critical temperature (the one the enthalpy basis uses)."""
    recorded = recorded or PropertyData()
    names = [c.name for c in components]
    vapor = {}
    omegas = {}
    pairs = {}
    for component in components:
        name = component.name
        record = recorded.vapor_pressure.get(name)
        if record is None and method != PENG_ROBINSON:
            record = _library_vapor_pressure(component)
        if record is not None:
            vapor[name] = dataclasses.replace(record, Tc=float(component.Tc))
        omega = recorded.acentric_factor.get(name)
        if omega is None and method == PENG_ROBINSON:
            omega = _library_omega(component)
        if omega is not None:
            omegas[name] = omega
    by_name = {c.name: c for c in components}
    for i, first in enumerate(names):
        for second in names[i + 1 :]:
            key = pair_key(first, second)
            value = recorded.binary_parameters.get(key)
            if value is None and method == PENG_ROBINSON:
                value = library_kij(by_name[first].cas, by_name[second].cas)
            if value is not None:
                pairs[key] = value
    return PropertyData(vapor, omegas, pairs)


def _library_vapor_pressure(component) -> VaporPressureData | None:
    try:
        return vapor_pressure_data(component.name, component.cas, component.Tc)
    except InputError:
        return None


def _library_omega(component) -> RecordedValue | None:
    try:
        return RecordedValue(acentric_factor(component.name, component.cas), OMEGA_SOURCE)
    except InputError:
        return None


def library_kij(first_cas: str, second_cas: str) -> RecordedValue:
    """kij of a pair from thermo's ChemSep PR table (with its page), else 0."""
    if not first_cas or not second_cas:
        return RecordedValue(0.0, KIJ_NO_CAS_SOURCE)
    row = _chemsep_pr_table().get(pair_key(first_cas, second_cas))
    if row is None:
        return _ZERO
    return RecordedValue(float(row[0]), row[1])


@functools.cache
def _chemsep_pr_table() -> dict[tuple[str, str], tuple[float, str]]:
    """CAS pair -> (kij, source) of thermo's 'ChemSep PR' table (symmetric)."""
    import thermo
    from thermo.interaction_parameters import IPDB

    table = {}
    for key, row in IPDB.tables["ChemSep PR"].items():
        first, second = key.split(" ")
        pages = ", ".join(row.get("page") or [])
        source = (
            f"thermo {thermo.__version__} IPDB 'ChemSep PR' table (thermo data file "
            f"Interaction Parameters/ChemSep/pr.json, from ChemSep's pr.ipd"
            f"{', ' + pages if pages else ''})"
        )
        table[pair_key(first, second)] = (float(row["kij"]), source)
    return table


def describe(data: PropertyData, names: Sequence[str], method: str) -> list[str]:
    """The recorded constants of ``method`` in plain lines (text report, details pane)."""
    if method == PENG_ROBINSON:
        lines = [
            f"acentric factor of {name}: {data.acentric_factor[name].value:.6g} "
            f"({data.acentric_factor[name].source})"
            for name in names
            if name in data.acentric_factor
        ]
        for i, first in enumerate(names):
            for second in names[i + 1 :]:
                value = data.binary_parameters.get(pair_key(first, second))
                if value is not None:
                    lines.append(f"kij {first}–{second}: {value.value:.6g} ({value.source})")
        return lines
    lines = []
    for name in names:
        record = data.vapor_pressure.get(name)
        if record is None:
            continue
        lines.append(
            f"vapor pressure of {name}: Antoine A = {record.A:.6g}, B = {record.B:.6g} K, "
            f"C = {record.C:.6g} K ({record.source})"
        )
        if record.henry_A is not None:
            lines.append(
                f"Henry constant of {name} (above its Tc): A = {record.henry_A:.6g}, "
                f"B = {record.henry_B:.6g} K ({record.henry_source})"
            )
    return lines
