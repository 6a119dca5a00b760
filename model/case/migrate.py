"""Bringing case files of older format versions up to the current one.

Each step takes the JSON data of version ``n`` and returns version ``n + 1``; loading
applies the steps in turn and then checks the result like any current file. A step
changes only what it recognises and leaves anything unexpected in place, so that the
checks report it with its path instead of the migration failing on it.

Version 0 (the pre-release layout) differed from version 1 in this way:

- top level: ``"units"`` instead of ``"unit_system"``, ``"settings"`` instead of
  ``"solver_settings"``; no ``"results"``;
- blocks: ``"spec"`` instead of ``"specs"``; the position as ``"x"`` and ``"y"``
  instead of ``"position": [x, y]``; quantities as bare numbers in internal units
  (K, Pa, W, mol/s, kelvin differences) instead of ``{"value", "unit"}``; component
  flows as a bare ``{component: mol/s}`` object, compositions and separator splits as a
  bare ``{component: fraction}`` object (mole fractions for a feed's composition);
- streams: ``"from"`` and ``"to"`` as ``[block, port]`` arrays, ``"tear"`` instead of
  ``"preferred_tear"``.

Version 2 added the top-level ``"targets"`` array (``model.case.targets_part``); a
version-1 file has none, so its migration writes an empty one.

Version 3 added the top-level ``"property_data"`` object: the property method's
constants with their sources (``model.case.property_data_part``). A version-2 file
has none; its migration leaves it absent, and loading then takes the constants of the
libraries installed now (the ones a version-2 file was always solved with) and records
them, so the case saves them and keeps them from then on. Keys that are optional
and default to the old behaviour when absent need no version step.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from model.flowsheet.kinds import BLOCK_KINDS

CURRENT_VERSION = 3

# Internal unit of each quantity kind, as version 0 stored its bare numbers.
VERSION_0_UNITS = {
    "temperature": "K",
    "temperature_difference": "K",
    "pressure": "Pa",
    "pressure_difference": "Pa",
    "power": "W",
    "molar_flow": "mol/s",
    "flow": "mol/s",
    "mass_flow": "kg/s",
}
VERSION_0_AMOUNT_UNITS = {
    ("Feed", "flows"): "mol/s",
    ("Feed", "composition"): "mole fraction",
    ("Separator", "split"): "fraction to first outlet",
}


def _rename(data: dict[str, Any], old: str, new: str) -> None:
    if old in data and new not in data:
        data[new] = data.pop(old)


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _migrate_spec_0(kind_name: str, field_name: str, value: Any) -> Any:
    kind = BLOCK_KINDS.get(kind_name)
    spec_field = None
    if kind is not None:
        spec_field = next((f for f in kind.spec_fields if f.name == field_name), None)
    if spec_field is None:
        return value
    if spec_field.kind in VERSION_0_UNITS and _is_number(value):
        return {"value": value, "unit": VERSION_0_UNITS[spec_field.kind]}
    amount_unit = VERSION_0_AMOUNT_UNITS.get((kind_name, field_name))
    if amount_unit is not None and isinstance(value, dict) and "values" not in value:
        return {"values": value, "unit": amount_unit}
    return value


def _migrate_block_0(block: Any) -> Any:
    if not isinstance(block, dict):
        return block
    block = dict(block)
    _rename(block, "spec", "specs")
    if "position" not in block and ("x" in block or "y" in block):
        block["position"] = [block.pop("x", 0.0), block.pop("y", 0.0)]
    specs = block.get("specs")
    if isinstance(specs, dict) and isinstance(block.get("kind"), str):
        block["specs"] = {
            name: _migrate_spec_0(block["kind"], name, value) for name, value in specs.items()
        }
    return block


def _migrate_end_0(end: Any) -> Any:
    if isinstance(end, list) and len(end) == 2:
        return {"block": end[0], "port": end[1]}
    return end


def _migrate_stream_0(stream: Any) -> Any:
    if not isinstance(stream, dict):
        return stream
    stream = dict(stream)
    _rename(stream, "tear", "preferred_tear")
    for end in ("from", "to"):
        if end in stream:
            stream[end] = _migrate_end_0(stream[end])
    return stream


def migrate_0_to_1(data: dict[str, Any]) -> dict[str, Any]:
    """Version 0 (pre-release layout, see the module docstring) to version 1."""
    data = dict(data)
    _rename(data, "units", "unit_system")
    _rename(data, "settings", "solver_settings")
    if isinstance(data.get("blocks"), list):
        data["blocks"] = [_migrate_block_0(block) for block in data["blocks"]]
    if isinstance(data.get("streams"), list):
        data["streams"] = [_migrate_stream_0(stream) for stream in data["streams"]]
    data["version"] = 1
    return data


def migrate_1_to_2(data: dict[str, Any]) -> dict[str, Any]:
    """Version 1 to version 2: no targets yet (an empty ``"targets"`` array)."""
    data = dict(data)
    data.setdefault("targets", [])
    data["version"] = 2
    return data


def migrate_2_to_3(data: dict[str, Any]) -> dict[str, Any]:
    """Version 2 to version 3: no recorded property data (taken from the libraries when
    the case is read, see the module docstring)."""
    data = dict(data)
    data["version"] = 3
    return data


MIGRATIONS: dict[int, Callable[[dict[str, Any]], dict[str, Any]]] = {
    0: migrate_0_to_1,
    1: migrate_1_to_2,
    2: migrate_2_to_3,
}
OLDEST_VERSION = min(MIGRATIONS)


def migrate(data: dict[str, Any], version: int) -> dict[str, Any]:
    """Apply the migration steps from ``version`` up to :data:`CURRENT_VERSION`.

    The top-level object keeps its record of keys the file gave twice
    (``model.case.schema.JSONObject``), so the checks still report them."""
    original = data
    while version < CURRENT_VERSION:
        data = MIGRATIONS[version](data)
        version += 1
    if data is not original and hasattr(original, "duplicate_keys"):
        migrated = type(original)(data)
        migrated.duplicate_keys = original.duplicate_keys
        return migrated
    return data
