"""Specs as typed -> internal floats and numpy arrays, once per solve.

The flowsheet keeps every spec as the user typed it (value and unit). Before the
first pass each one is converted here, once, with :func:`units_of_measure.conversion.to_internal`
(mol/s, kg/s, K, Pa, W), and each block becomes a small compiled object
(:mod:`model.blocks`) that knows its streams by index. The passes then run on floats
only: no pint Quantity and no look-up by name.

Examples
--------
>>> from model.properties.components import lookup_component
>>> from model.flowsheet.document import Flowsheet
>>> from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
>>> from model.properties.enthalpy import PropertyBasis
>>> sheet = Flowsheet()
>>> sheet.add_component(lookup_component("water"))
>>> _ = sheet.add_block("Feed", "F", specs={
...     "flows": ComponentAmounts({"water": 3.6}, "kmol/h"),
...     "T": TypedQuantity(25.0, "degC"), "P": TypedQuantity(1.0, "atm")})
>>> _ = sheet.add_block("Product", "P")
>>> _ = sheet.connect("F", "out", "P", "in")
>>> compiled = compile_flowsheet(sheet, PropertyBasis(sheet.components))
>>> compiled.blocks["F"].state.flows.tolist(), compiled.blocks["F"].state.T
([1.0], 298.15)
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass
from typing import Any

from model.blocks import CompiledBlock, build_block
from model.flowsheet.document import Block, Flowsheet, Stream
from model.flowsheet.kinds import SpecField
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.flowsheet.value_checks import flow_kind
from units_of_measure.conversion import to_internal

_PLAIN_KINDS = ("choice", "fraction", "port", "port_fractions", "reactions")


@dataclass
class CompiledFlowsheet:
    """Every block compiled, and the stream list the passes index into.

    Attributes
    ----------
    component_names
        Column order of every flow array.
    stream_names
        Stream ``i`` of a pass's state list is ``stream_names[i]``.
    stream_index
        Inverse of ``stream_names``.
    blocks
        Compiled blocks by name, in the flowsheet's order.
    feed_streams, product_streams
        Indices of the streams leaving Feed blocks and entering Product blocks.
    """

    component_names: list[str]
    stream_names: list[str]
    stream_index: dict[str, int]
    blocks: dict[str, CompiledBlock]
    feed_streams: list[int]
    product_streams: list[int]


def internal_value(spec_field: SpecField, value: Any) -> Any:
    """One spec value in internal units.

    Quantities become floats; a ``"flow"`` becomes ``(float, "molar_flow" | "mass_flow")``;
    component flows ``({component: float}, kind)``; a composition ``({component:
    fraction}, "mole fraction" | "mass fraction")``; a separator split ``{component:
    fraction}``. Choices, fractions, ports, port fractions and reactions are kept.
    """
    kind = spec_field.kind
    if kind in _PLAIN_KINDS or value is None:
        return value
    if kind == "component_flows":
        assert isinstance(value, ComponentAmounts)
        amount_kind = flow_kind(value.unit)
        factor = to_internal(1.0, value.unit, amount_kind)
        return {c: float(v) * factor for c, v in value.values.items()}, amount_kind
    if kind == "component_fractions":
        fractions = {c: float(v) for c, v in value.values.items()}
        return fractions if spec_field.name == "split" else (fractions, value.unit)
    assert isinstance(value, TypedQuantity)
    if kind == "flow":
        amount_kind = flow_kind(value.unit)
        return to_internal(value.value, value.unit, amount_kind), amount_kind
    return to_internal(value.value, value.unit, kind)


def internal_specs(block: Block) -> dict[str, Any]:
    """All of a block's specs in internal units, defaults filled in."""
    specs = {}
    for spec_field in block.block_kind.spec_fields:
        value = block.specs.get(spec_field.name, spec_field.default)
        specs[spec_field.name] = internal_value(spec_field, value)
    return specs


def _numbered(port: str) -> int:
    digits = "".join(ch for ch in port if ch.isdigit())
    return int(digits) if digits else 0


def _ordered(streams: list[Stream], fixed: tuple[str, ...], inlet: bool) -> list[Stream]:
    """Streams in the kind's port order; numbered ports numerically."""

    def port(stream: Stream) -> str:
        return stream.target_port if inlet else stream.source_port

    if fixed and all(port(s) in fixed for s in streams):
        return sorted(streams, key=lambda s: fixed.index(port(s)))
    return sorted(streams, key=lambda s: _numbered(port(s)))


def compile_block(
    block: Block, inlets: list[Stream], outlets: list[Stream], stream_index: dict[str, int], basis
) -> CompiledBlock:
    """One block with its ports (as stream indices) and internal specs."""
    kind = block.block_kind
    inlets = _ordered(inlets, () if kind.variable_inlets else kind.inlets, True)
    outlets = _ordered(outlets, () if kind.variable_outlets else kind.outlets, False)
    common = {
        "name": block.name,
        "kind": block.kind,
        "inlet_ports": tuple(s.target_port for s in inlets),
        "inlet_streams": tuple(stream_index[s.name] for s in inlets),
        "outlet_ports": tuple(s.source_port for s in outlets),
        "outlet_streams": tuple(stream_index[s.name] for s in outlets),
    }
    return build_block(block.kind, common, internal_specs(block), basis)


def compile_flowsheet(flowsheet: Flowsheet, basis) -> CompiledFlowsheet:
    """Compile a validated flowsheet for the passes (see the module docstring).

    Parameters
    ----------
    flowsheet
        Must have passed :func:`model.validation.validate.validate_flowsheet` without errors.
    basis
        :class:`model.properties.enthalpy.PropertyBasis` of the flowsheet's components.
    """
    stream_names = list(flowsheet.streams)
    stream_index = {name: i for i, name in enumerate(stream_names)}
    into: dict[str, list[Stream]] = defaultdict(list)
    out_of: dict[str, list[Stream]] = defaultdict(list)
    for stream in flowsheet.streams.values():
        into[stream.target].append(stream)
        out_of[stream.source].append(stream)
    blocks = {
        name: compile_block(block, into[name], out_of[name], stream_index, basis)
        for name, block in flowsheet.blocks.items()
    }
    feeds = [i for b in blocks.values() if b.kind == "Feed" for i in b.outlet_streams]
    products = [i for b in blocks.values() if b.kind == "Product" for i in b.inlet_streams]
    return CompiledFlowsheet(list(basis.names), stream_names, stream_index, blocks, feeds, products)
