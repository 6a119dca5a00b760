"""The flowsheet document: components, blocks, streams and their change events.

Views mirror this document through its signals (model.flowsheet.events), which fire only on a real
change; edits come through the public methods below, which check their input first
and leave the document unchanged when they refuse. Nothing here computes a balance:
see ``model.solve.driver``.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass, field, replace
from typing import Any

from model.errors import InputError
from model.flowsheet.events import Signal
from model.flowsheet.kinds import BlockKind, block_kind
from model.flowsheet.spec_checks import check_spec_value
from model.flowsheet.spec_values import StreamEstimate
from model.flowsheet.target_definition import Target
from model.limits import NAME_LENGTH_LIMIT, check_length

#: Highest numbered port of a mixer's inlets or a splitter's outlets.
MAX_NUMBERED_PORT = 999


@dataclass(eq=False)
class Block:
    """A block on the diagram: its kind, unique name, specs as typed and position."""

    kind: str
    name: str
    specs: dict[str, Any] = field(default_factory=dict)
    position: tuple[float, float] = (0.0, 0.0)

    @property
    def block_kind(self) -> BlockKind:
        return block_kind(self.kind)


@dataclass(eq=False)
class Stream:
    """A material stream from one block's outlet port to another block's inlet port.

    ``number`` is the stream's short number on the diagram and in the stream table
    header (an H&MB's stream number); the flowsheet gives one when the stream is first
    inserted and the stream keeps it for good (undo, save and reopen), so numbers stay
    stable while the user's names stay free text. ``bends`` are the user's bend points
    on the diagram, in order from source to target (the route passes through each).
    """

    name: str
    source: str
    source_port: str
    target: str
    target_port: str
    preferred_tear: bool = False
    estimate: StreamEstimate | None = None
    number: int | None = None
    bends: tuple[tuple[float, float], ...] = ()


class Flowsheet:
    """Components, blocks and streams of one case, with change signals.

    Signals carry the object that changed. They fire only when something really
    changed, after the change is complete.
    """

    block_added = Signal(object)
    block_removed = Signal(object)
    block_renamed = Signal(object, str)  # block, old name
    block_moved = Signal(object)
    block_specs_changed = Signal(object, str)  # block, spec field name
    stream_added = Signal(object)
    stream_removed = Signal(object)
    stream_renamed = Signal(object, str)  # stream, old name
    stream_changed = Signal(object)  # preferred tear or estimate
    stream_bends_changed = Signal(object)  # the drawing only: results stay current
    components_changed = Signal()
    property_method_changed = Signal(str)
    structure_changed = Signal()  # any block or stream added, removed or renamed
    targets_changed = Signal()  # the list of targets replaced

    def __init__(self) -> None:
        self.components: list[Any] = []  # model.properties.components.Component, in case order
        self.blocks: dict[str, Block] = {}
        self.streams: dict[str, Stream] = {}
        self.targets: list[Target] = []  # met by the outer loop (model.solve.targets)
        #: Phase equilibrium method of the case (model.properties.property_method).
        self.property_method = "ideal"
        #: Constants of the property method recorded in the case, with their sources
        #: (model.properties.property_data.PropertyData; None: the libraries' at solve time).
        self.property_data: Any = None

    def set_property_method(self, name: str) -> None:
        """Choose the case's property method; an unknown name changes nothing."""
        from model.properties.property_method import check_property_method

        name = check_property_method(name)
        if name != self.property_method:
            self.property_method = name
            self.property_method_changed.emit(name)

    # ---- components -------------------------------------------------------------
    def component_names(self) -> list[str]:
        return [c.name for c in self.components]

    def add_component(self, component: Any, index: int | None = None) -> None:
        """Add a component (``model.properties.components.Component``); names must be unique."""
        if component.name in self.component_names():
            raise InputError("component", component.name, "each component may be added once")
        position = len(self.components) if index is None else index
        self.components.insert(position, component)
        self.components_changed.emit()

    def component_users(self, name: str) -> list[str]:
        """Names of the blocks whose specs mention the component ``name``."""
        return [b.name for b in self.blocks.values() if _mentions_component(b.specs, name)]

    def remove_component(self, name: str) -> int:
        """Remove a component not used by any spec; return its former index."""
        names = self.component_names()
        if name not in names:
            raise InputError("component", name, "one of the case's components: " + ", ".join(names))
        users = self.component_users(name)
        if users:
            raise InputError(
                "component",
                name,
                "a component still used in the specs of " + ", ".join(users) + " cannot be removed",
            )
        index = names.index(name)
        del self.components[index]
        self.components_changed.emit()
        return index

    # ---- blocks -----------------------------------------------------------------
    def new_block_name(self, kind: str) -> str:
        """A free name such as ``"Mixer 2"``."""
        for number in itertools.count(1):
            candidate = f"{kind} {number}"
            if candidate not in self.blocks:
                return candidate
        raise AssertionError("unreachable")

    def add_block(
        self,
        kind: str,
        name: str | None = None,
        position: tuple[float, float] = (0.0, 0.0),
        specs: dict[str, Any] | None = None,
    ) -> Block:
        """Create a block of ``kind`` with the kind's default specs, updated by ``specs``."""
        kind_info = block_kind(kind)
        block = Block(
            kind,
            self.new_block_name(kind) if name is None else name,
            kind_info.default_specs(),
            (float(position[0]), float(position[1])),
        )
        for field_name, value in (specs or {}).items():
            kind_info.field(field_name)  # unknown field -> KeyError with known names
            block.specs[field_name] = value
        return self.insert_block(block)

    def insert_block(self, block: Block) -> Block:
        """Put an existing block object (back) into the flowsheet, e.g. on undo."""
        _check_name("block name", block.name, self.blocks)
        block_kind(block.kind)
        self.blocks[block.name] = block
        self.block_added.emit(block)
        self.structure_changed.emit()
        return block

    def remove_block(self, name: str) -> tuple[Block, list[Stream]]:
        """Remove a block and every stream attached to it; return both for undo."""
        block = self.block(name)
        attached = [s for s in self.streams.values() if name in (s.source, s.target)]
        for stream in attached:
            self.remove_stream(stream.name)
        del self.blocks[name]
        self.block_removed.emit(block)
        self.structure_changed.emit()
        return block, attached

    def rename_block(self, old: str, new: str) -> None:
        block = self.block(old)
        if new == old:
            return
        _check_name("block name", new, self.blocks)
        del self.blocks[old]
        block.name = new
        self.blocks[new] = block
        for stream in self.streams.values():
            if stream.source == old:
                stream.source = new
            if stream.target == old:
                stream.target = new
        self._rename_in_targets(old, new, block=True)
        self.block_renamed.emit(block, old)
        self.structure_changed.emit()

    # ---- targets ----------------------------------------------------------------
    def set_targets(self, targets: list[Target]) -> None:
        """Replace the targets (checked against the flowsheet only when solved, by
        :func:`model.validation.target_checks.validate_targets`, so nothing typed is lost)."""
        targets = list(targets)
        if any(not isinstance(target, Target) for target in targets):
            raise InputError("targets", targets, "a list of Target objects")
        if targets != self.targets:
            self.targets = targets
            self.targets_changed.emit()

    def _rename_in_targets(self, old: str, new: str, block: bool) -> None:
        renamed = []
        for target in self.targets:
            adjusted, measured = target.adjusted, target.measured
            if block and adjusted.block == old:
                adjusted = replace(adjusted, block=new)
            if measured.owner == old and (measured.quantity == "duty") == block:
                measured = replace(measured, owner=new)
            renamed.append(replace(target, adjusted=adjusted, measured=measured))
        self.set_targets(renamed)

    def move_block(self, name: str, position: tuple[float, float]) -> None:
        block = self.block(name)
        new_position = (float(position[0]), float(position[1]))
        if new_position != block.position:
            block.position = new_position
            self.block_moved.emit(block)

    def set_spec(self, block_name: str, field_name: str, value: Any) -> None:
        """Set one spec as typed (``None`` clears it); a refused value leaves the block unchanged.

        The value is checked by :func:`model.flowsheet.spec_checks.check_spec_value`.
        """
        block = self.block(block_name)
        spec_field = _spec_field(block, field_name)
        if value is not None:
            value = check_spec_value(self, block, spec_field, value)
        if block.specs.get(field_name) == value and (field_name in block.specs) == (
            value is not None
        ):
            return
        if value is None:
            block.specs.pop(field_name, None)
        else:
            block.specs[field_name] = value
        self.block_specs_changed.emit(block, field_name)

    def block(self, name: str) -> Block:
        try:
            return self.blocks[name]
        except KeyError:
            raise InputError("block", name, "the name of a block in this flowsheet") from None

    # ---- ports ------------------------------------------------------------------
    def inlet_ports(self, block_name: str) -> list[str]:
        """The block's inlet ports, with one spare for a kind with variable inlets."""
        block = self.block(block_name)
        kind = block.block_kind
        if not kind.variable_inlets:
            return list(kind.inlets)
        used = {s.target_port for s in self.streams.values() if s.target == block_name}
        return _numbered_ports("in", used, len(kind.inlets))

    def outlet_ports(self, block_name: str) -> list[str]:
        """The block's outlet ports, with one spare for a kind with variable outlets."""
        block = self.block(block_name)
        kind = block.block_kind
        if not kind.variable_outlets:
            return list(kind.outlets)
        used = {s.source_port for s in self.streams.values() if s.source == block_name}
        return _numbered_ports("out", used, len(kind.outlets))

    def _has_port(self, block_name: str, port: str, inlet: bool) -> bool:
        """Whether the block has this port; a variable-port kind has every numbered one
        (``in1`` ... ``in999``), so a gap left by a removed stream may stay a gap."""
        kind = self.block(block_name).block_kind
        variable = kind.variable_inlets if inlet else kind.variable_outlets
        if not variable:
            return port in (kind.inlets if inlet else kind.outlets)
        prefix = "in" if inlet else "out"
        number = port.removeprefix(prefix)
        return (
            port.startswith(prefix) and number.isdigit() and 1 <= int(number) <= MAX_NUMBERED_PORT
        )

    def stream_into(self, block_name: str, port: str) -> Stream | None:
        for stream in self.streams.values():
            if stream.target == block_name and stream.target_port == port:
                return stream
        return None

    def stream_out_of(self, block_name: str, port: str) -> Stream | None:
        for stream in self.streams.values():
            if stream.source == block_name and stream.source_port == port:
                return stream
        return None

    def inlet_streams(self, block_name: str) -> list[Stream]:
        """Streams into the block, in port order (in1, in2, ... numerically)."""
        streams = [s for s in self.streams.values() if s.target == block_name]
        return sorted(streams, key=lambda s: _port_sort_key(s.target_port))

    def outlet_streams(self, block_name: str) -> list[Stream]:
        streams = [s for s in self.streams.values() if s.source == block_name]
        return sorted(streams, key=lambda s: _port_sort_key(s.source_port))

    # ---- streams ----------------------------------------------------------------
    def new_stream_name(self) -> str:
        for number in itertools.count(1):
            candidate = f"S{number}"
            if candidate not in self.streams:
                return candidate
        raise AssertionError("unreachable")

    def next_stream_number(self) -> int:
        """The number a new stream gets: one above the highest in use (1 for the first)."""
        return 1 + max((s.number or 0 for s in self.streams.values()), default=0)

    def connect(
        self, source: str, source_port: str, target: str, target_port: str, name: str | None = None
    ) -> Stream:
        """Draw a stream from an outlet port to a free inlet port."""
        stream = Stream(
            self.new_stream_name() if name is None else name,
            source,
            source_port,
            target,
            target_port,
        )
        return self.insert_stream(stream)

    def insert_stream(self, stream: Stream) -> Stream:
        """Put a stream object (back) into the flowsheet after checking its ports."""
        _check_name("stream name", stream.name, self.streams)
        if not self._has_port(stream.source, stream.source_port, inlet=False):
            raise InputError(
                f"{stream.name}.from port",
                f"{stream.source}.{stream.source_port}",
                "an outlet port of "
                + stream.source
                + ": "
                + ", ".join(self.outlet_ports(stream.source)),
            )
        if not self._has_port(stream.target, stream.target_port, inlet=True):
            raise InputError(
                f"{stream.name}.to port",
                f"{stream.target}.{stream.target_port}",
                "an inlet port of "
                + stream.target
                + ": "
                + ", ".join(self.inlet_ports(stream.target)),
            )
        if stream.source == stream.target:
            raise InputError(
                f"{stream.name}", stream.source, "a stream must join two different blocks"
            )
        taken = self.stream_out_of(stream.source, stream.source_port)
        if taken is not None:
            raise InputError(
                f"{stream.name}.from port",
                f"{stream.source}.{stream.source_port}",
                f"a free outlet port; {taken.name} already leaves it",
            )
        taken = self.stream_into(stream.target, stream.target_port)
        if taken is not None:
            raise InputError(
                f"{stream.name}.to port",
                f"{stream.target}.{stream.target_port}",
                f"a free inlet port; {taken.name} already enters it",
            )
        _check_stream_number(stream, self.streams)
        if stream.number is None:
            stream.number = self.next_stream_number()
        self.streams[stream.name] = stream
        self.stream_added.emit(stream)
        self.structure_changed.emit()
        return stream

    def remove_stream(self, name: str) -> Stream:
        stream = self.stream(name)
        del self.streams[name]
        self.stream_removed.emit(stream)
        self.structure_changed.emit()
        return stream

    def rename_stream(self, old: str, new: str) -> None:
        stream = self.stream(old)
        if new == old:
            return
        _check_name("stream name", new, self.streams)
        del self.streams[old]
        stream.name = new
        self.streams[new] = stream
        self._rename_in_targets(old, new, block=False)
        self.stream_renamed.emit(stream, old)
        self.structure_changed.emit()

    def set_preferred_tear(self, name: str, preferred: bool) -> None:
        stream = self.stream(name)
        if stream.preferred_tear != bool(preferred):
            stream.preferred_tear = bool(preferred)
            self.stream_changed.emit(stream)

    def set_estimate(self, name: str, estimate: StreamEstimate | None) -> None:
        """Set (or clear, with None) a tear stream's initial estimate, after checking it."""
        stream = self.stream(name)
        if estimate is not None:
            _check_estimate(f"{name}.estimate", estimate, self.component_names())
        if stream.estimate != estimate:
            stream.estimate = estimate
            self.stream_changed.emit(stream)

    def set_stream_bends(self, name: str, bends: Sequence[tuple[float, float]]) -> None:
        """Set the user's bend points of a stream's line (finite x, y pairs)."""
        stream = self.stream(name)
        points = tuple((float(x), float(y)) for x, y in bends)
        if not all(math.isfinite(v) for point in points for v in point):
            raise InputError(f"{name}.bends", list(bends), "points of two finite numbers")
        if points != stream.bends:
            stream.bends = points
            self.stream_bends_changed.emit(stream)

    def stream(self, name: str) -> Stream:
        try:
            return self.streams[name]
        except KeyError:
            raise InputError("stream", name, "the name of a stream in this flowsheet") from None


def _check_estimate(field: str, estimate: StreamEstimate, components: list[str]) -> None:
    """Flows of known components, finite and not negative; T and P finite and above zero."""
    for component, flow in estimate.flows.items():
        if component not in components:
            raise InputError(
                f"{field}.flows",
                component,
                "one of the case's components: " + ", ".join(components),
            )
        if not math.isfinite(flow) or flow < 0.0:
            raise InputError(
                f"{field}.flows.{component}",
                flow,
                "a flow must be a finite number of mol/s, zero or more",
            )
    for label, value in (("T", estimate.T), ("P", estimate.P)):
        if value is not None and (not math.isfinite(value) or value <= 0.0):
            unit = "K" if label == "T" else "Pa"
            raise InputError(
                f"{field}.{label}",
                value,
                f"an absolute {label} above zero, in {unit}, or no estimate",
            )


def _check_stream_number(stream: Stream, streams: dict[str, Stream]) -> None:
    """A stream's own number, when it has one, is a whole number >= 1 not used by another."""
    number = stream.number
    if number is None:
        return
    if isinstance(number, bool) or not isinstance(number, int) or number < 1:
        raise InputError(f"{stream.name}.number", number, "a whole number of 1 or more")
    holder = next((s.name for s in streams.values() if s.number == number), None)
    if holder is not None:
        raise InputError(
            f"{stream.name}.number", number, f"a number not already used; {holder} has it"
        )


def _check_name(what: str, name: Any, taken: dict[str, Any]) -> None:
    if isinstance(name, str):
        check_length(what, name, NAME_LENGTH_LIMIT)
    if not isinstance(name, str) or not name.strip() or name != name.strip():
        raise InputError(
            what, name, "a name must be non-empty text without leading or trailing spaces"
        )
    if name in taken:
        raise InputError(what, name, "a name not already used in this flowsheet")


def _spec_field(block: Block, field_name: str):
    try:
        return block.block_kind.field(field_name)
    except KeyError as error:
        raise InputError(f"{block.name}.{field_name}", field_name, str(error.args[0])) from None


def _numbered_ports(prefix: str, used: set[str], minimum: int) -> list[str]:
    numbers = sorted(_port_sort_key(p)[1] for p in used)
    highest = max([minimum, *numbers]) if numbers else minimum
    ports = [f"{prefix}{n}" for n in range(1, highest + 1)]
    if set(ports) <= used:
        ports.append(f"{prefix}{highest + 1}")
    return ports


def _port_sort_key(port: str) -> tuple[str, int]:
    digits = "".join(ch for ch in port if ch.isdigit())
    prefix = port.rstrip("0123456789")
    return (prefix, int(digits) if digits else 0)


def _mentions_component(specs: dict[str, Any], name: str) -> bool:
    for value in specs.values():
        values = getattr(value, "values", None)
        if isinstance(values, dict) and name in values:
            return True
        if isinstance(value, list):
            for item in value:
                if name in getattr(item, "stoichiometry", {}) or getattr(item, "key", None) == name:
                    return True
    return False
