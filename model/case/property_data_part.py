"""The case file's "property_data": the property method's constants with their sources.

Written for the case's method only (``model.properties.property_data``)::

    "property_data": {
      "vapor_pressure": {                                   # "ideal"
        "hydrogen": {"antoine": {"A": ..., "B": ..., "C": ..., "T_min": ..., "T_max": ...,
                                 "source": "..."},
                     "henry": {"A": ..., "B": ..., "source": "..."}}   # or absent
      },
      "acentric_factor": {"ammonia": {"value": 0.252, "source": "..."}},   # "Peng-Robinson"
      "binary_parameters": [{"components": ["nitrogen", "ammonia"], "kij": 0.2193,
                             "source": "..."}]
    }

Numbers in K and Pa (Antoine: log10(P/Pa) = A - B/(T/K + C); Henry: ln(H/Pa) = A + B/T).
Reading checks every value (kij finite with |kij| < 1, pairs of two different
components of the case, each pair once) and reports each problem with its path.
"""

from __future__ import annotations

from typing import Any

from model.case.schema import MISSING, Problems, join
from model.errors import InputError
from model.properties.property_data import (
    ANTOINE_KEYS,
    PropertyData,
    RecordedValue,
    check_kij,
    completed,
    pair_key,
)
from model.properties.vapor_pressure import VaporPressureData

_HENRY_KEYS = ("A", "B", "source")
_VALUE_KEYS = ("value", "source")
_PAIR_KEYS = ("components", "kij", "source")


def property_data_to_json(flowsheet) -> dict[str, Any]:
    """The JSON of the constants ``flowsheet``'s method uses (recorded, completed from the
    libraries for what is not recorded yet)."""
    components = flowsheet.components
    method = flowsheet.property_method
    data = completed(flowsheet.property_data, components, method)
    return data.to_json([c.name for c in components], method)


def read_property_data(problems: Problems, value: Any, flowsheet) -> PropertyData | None:
    """The recorded constants of a case file (absent: None, the libraries' then)."""
    if value is MISSING or value is None:
        return None
    path = "property_data"
    data = problems.object(
        path, value, known=("vapor_pressure", "acentric_factor", "binary_parameters")
    )
    if data is None:
        return None
    components = {c.name: c for c in flowsheet.components}
    count = len(problems)
    vapor = _read_vapor_pressures(problems, data.get("vapor_pressure", {}), components)
    omegas = _read_omegas(problems, data.get("acentric_factor", {}), components)
    pairs = _read_pairs(problems, data.get("binary_parameters", []), components)
    if len(problems) != count:
        return None
    return PropertyData(vapor, omegas, pairs)


def _component_entries(problems: Problems, path: str, value: Any, components: dict):
    entries = problems.object(path, value)
    for name, entry in (entries or {}).items():
        if name not in components:
            problems.add(
                join(path, name), name, "a component of this case: " + ", ".join(components)
            )
            continue
        yield name, join(path, name), entry


def _read_vapor_pressures(problems: Problems, value: Any, components: dict) -> dict:
    records = {}
    for name, path, entry in _component_entries(
        problems, "property_data.vapor_pressure", value, components
    ):
        entry = problems.object(path, entry, known=("antoine", "henry"), required=("antoine",))
        if entry is None:
            continue
        antoine = _numbers(problems, join(path, "antoine"), entry.get("antoine"), ANTOINE_KEYS)
        henry = entry.get("henry")
        henry = (
            None if henry is None else _numbers(problems, join(path, "henry"), henry, _HENRY_KEYS)
        )
        if antoine is None or (entry.get("henry") is not None and henry is None):
            continue
        if not 0.0 < antoine["T_min"] < antoine["T_max"]:
            problems.add(
                join(join(path, "antoine"), "T_max"),
                antoine["T_max"],
                f"a range with 0 < T_min < T_max (T_min is {antoine['T_min']:g} K)",
            )
            continue
        records[name] = VaporPressureData(
            antoine["A"],
            antoine["B"],
            antoine["C"],
            antoine["T_min"],
            antoine["T_max"],
            float(components[name].Tc),
            antoine["source"],
            None if henry is None else henry["A"],
            None if henry is None else henry["B"],
            "" if henry is None else henry["source"],
        )
    return records


def _numbers(problems: Problems, path: str, value: Any, keys: tuple[str, ...]) -> dict | None:
    entry = problems.object(path, value, known=keys, required=keys)
    if entry is None or any(key not in entry for key in keys):
        return None
    result: dict[str, Any] = {}
    for key in keys:
        if key == "source":
            result[key] = problems.text(join(path, key), entry[key], limit=2000)
        else:
            result[key] = problems.number(join(path, key), entry[key])
    return None if any(v is None for v in result.values()) else result


def _read_omegas(problems: Problems, value: Any, components: dict) -> dict:
    omegas = {}
    for name, path, entry in _component_entries(
        problems, "property_data.acentric_factor", value, components
    ):
        numbers = _numbers(problems, path, entry, _VALUE_KEYS)
        if numbers is None:
            continue
        if not -1.0 < numbers["value"] < 3.0:
            problems.add(
                join(path, "value"), numbers["value"], "an acentric factor between -1 and 3"
            )
            continue
        omegas[name] = RecordedValue(numbers["value"], numbers["source"])
    return omegas


def _read_pairs(problems: Problems, value: Any, components: dict) -> dict:
    pairs: dict[tuple[str, str], RecordedValue] = {}
    items = problems.array("property_data.binary_parameters", value)
    for index, item in enumerate(items or []):
        path = join("property_data.binary_parameters", index)
        entry = problems.object(path, item, known=_PAIR_KEYS, required=_PAIR_KEYS)
        if entry is None or any(key not in entry for key in _PAIR_KEYS):
            continue
        names = entry["components"]
        names_path = join(path, "components")
        if (
            not isinstance(names, list)
            or len(names) != 2
            or not all(isinstance(n, str) and n in components for n in names)
            or names[0] == names[1]
        ):
            problems.add(
                names_path, names, "two different components of this case: " + ", ".join(components)
            )
            continue
        key = pair_key(*names)
        if key in pairs:
            problems.add(names_path, names, "each pair of components once")
            continue
        try:
            kij = check_kij(join(path, "kij"), entry["kij"])
        except (InputError, OverflowError) as error:
            problems.add_error(join(path, "kij"), error, entry["kij"])
            continue
        source = problems.text(join(path, "source"), entry["source"], limit=2000)
        if source is not None:
            pairs[key] = RecordedValue(kij, source)
    return pairs
