"""Reading and writing the one number a :class:`SpecAddress` names among a block's specs.

Targets and sweeps change one number of a spec and leave the rest as typed: the value
of a quantity (``Loop cooler.T``), one outlet's fraction, one component's flow or
split, one reaction's conversion. A number is read and written in a unit of the
caller's choice ("" for fractions and conversions) and the new spec is checked like a
typed one (:func:`model.flowsheet.spec_checks.check_spec_value`).
"""

from __future__ import annotations

import dataclasses
import math
from typing import Any

from model.errors import InputError
from model.flowsheet.kinds import BlockKind
from model.flowsheet.spec_checks import check_spec_value
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.flowsheet.target_definition import SpecAddress
from model.flowsheet.value_checks import flow_kind
from units_of_measure import from_internal, to_internal

#: Spec field kinds holding one number per key (outlet, component or reaction).
KEYED_KINDS = ("port_fractions", "component_flows", "component_fractions", "reactions")
#: Spec field kinds holding a quantity with its unit.
QUANTITY_KINDS = (
    "temperature",
    "pressure",
    "pressure_difference",
    "temperature_difference",
    "power",
    "molar_flow",
    "flow",
)


def _field(kind: BlockKind, address: SpecAddress):
    try:
        return kind.field(address.field)
    except KeyError:
        numeric = [f.name for f in kind.spec_fields if f.kind in KEYED_KINDS + QUANTITY_KINDS]
        raise InputError(
            str(address),
            address.field,
            f"a numeric spec of a {kind.name}: " + (", ".join(numeric) or "none"),
        ) from None


def _quantity_kind(unit: str, field_kind: str) -> str:
    """The units_of_measure kind of a value in ``unit`` of a spec field kind."""
    if field_kind in ("flow", "component_flows"):
        return flow_kind(unit)
    return field_kind


def _convert(value: float, unit: str, to_unit: str, kind: str, where: str) -> float:
    if unit == to_unit:
        return float(value)
    return from_internal(to_internal(value, unit, kind, field=where), kind, to_unit)


def spec_number(blocks: dict[str, Any], address: SpecAddress, unit: str = "") -> float:
    """The number at ``address`` in ``unit`` (the spec's own unit when ""; "" for
    fractions and conversions).

    ``blocks`` is the flowsheet's blocks by name. Raises InputError naming the address
    when the block, field or key does not exist, the spec is not set or not numeric.
    """
    value, spec_unit, kind = _locate(blocks, address)
    if spec_unit is None or not unit:
        return value
    return _convert(value, spec_unit, unit, _quantity_kind(spec_unit, kind), str(address))


def spec_unit(blocks: dict[str, Any], address: SpecAddress) -> str:
    """The unit the spec at ``address`` is typed in ("" for fractions and conversions)."""
    return _locate(blocks, address)[1] or ""


def _locate(blocks: dict[str, Any], address: SpecAddress) -> tuple[float, str | None, str]:
    where = str(address)
    block = blocks.get(address.block)
    if block is None:
        raise InputError(where, address.block, "the name of a block in this flowsheet")
    spec_field = _field(block.block_kind, address)
    kind = spec_field.kind
    if kind not in KEYED_KINDS + QUANTITY_KINDS:
        raise InputError(where, spec_field.name, f"a numeric spec; {spec_field.name} is a {kind}")
    if (kind in KEYED_KINDS) != (address.key is not None):
        need = "needs a [key]" if kind in KEYED_KINDS else "takes no [key]"
        raise InputError(where, address.key, f"{spec_field.name} {need}")
    value = block.specs.get(spec_field.name)
    if value is None:
        raise InputError(where, None, f"{spec_field.name} must be set before it is adjusted")
    if kind in QUANTITY_KINDS:
        return float(value.value), value.unit, kind
    if kind == "reactions":
        index = int(address.key) - 1
        if not 0 <= index < len(value):
            raise InputError(where, address.key, f"a reaction number from 1 to {len(value)}")
        return float(value[index].conversion), None, kind
    numbers = value.values if isinstance(value, ComponentAmounts) else value
    if address.key not in numbers:
        listed = ", ".join(numbers) or "none"
        raise InputError(where, address.key, f"a key whose number is set ({listed})")
    unit = value.unit if kind == "component_flows" else None
    return float(numbers[address.key]), unit, kind


def with_spec_number(flowsheet: Any, address: SpecAddress, number: float, unit: str = "") -> Any:
    """The spec value of ``address.field`` with the number at ``address`` replaced by
    ``number`` (in ``unit``, or the spec's own unit when ""), checked as if typed.

    The flowsheet is not changed. Raises InputError naming the address and the value.
    """
    where = str(address)
    if not math.isfinite(number):
        raise InputError(where, number, "a finite number")
    block = flowsheet.blocks.get(address.block)
    _, spec_unit_now, kind = _locate(flowsheet.blocks, address)
    spec_field = block.block_kind.field(address.field)
    value = block.specs[spec_field.name]
    if kind in QUANTITY_KINDS:
        new: Any = TypedQuantity(float(number), unit or value.unit)
    elif kind == "reactions":
        index = int(address.key) - 1
        new = list(value)
        new[index] = dataclasses.replace(value[index], conversion=float(number))
    elif isinstance(value, ComponentAmounts):
        if spec_unit_now is not None and unit:
            number = _convert(number, unit, spec_unit_now, flow_kind(unit), where)
        new = ComponentAmounts({**value.values, address.key: float(number)}, value.unit)
    else:
        new = {**value, address.key: float(number)}
    return check_spec_value(flowsheet, block, spec_field, new)


__all__ = [
    "KEYED_KINDS",
    "QUANTITY_KINDS",
    "flowsheet_with_numbers",
    "spec_number",
    "spec_unit",
    "with_spec_number",
]


def flowsheet_with_numbers(flowsheet: Any, numbers: list[tuple[SpecAddress, float, str]]) -> Any:
    """A solve view of ``flowsheet`` with each ``(address, number, unit)`` put in place.

    The view shares the components, streams and untouched blocks and has its own copy of
    each changed block, so the document (and its views in the window) never change and
    no signal fires; the solve only reads it. Raises InputError naming the address.
    """
    view = object.__new__(type(flowsheet))
    view.__dict__.update(
        {key: value for key, value in flowsheet.__dict__.items() if key in _DOCUMENT_PARTS}
    )
    view.blocks = dict(flowsheet.blocks)
    for address, number, unit in numbers:
        new_value = with_spec_number(view, address, number, unit)
        block = view.blocks[address.block]
        view.blocks[address.block] = dataclasses.replace(
            block, specs={**block.specs, address.field: new_value}
        )
    return view


_DOCUMENT_PARTS = (
    "components",
    "blocks",
    "streams",
    "targets",
    "property_method",
    "property_data",
)
