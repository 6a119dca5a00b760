"""Reading the flowsheet part of a case file: components, blocks, streams and specs.

Each part is checked and inserted through the flowsheet's own methods
(``add_component``, ``insert_block``, ``insert_stream``, ``set_spec``), so a case file
can hold nothing the window could not have built; every refusal becomes a problem with
its JSON path. Order matters: components first (specs name them), then blocks without
specs, then streams (a splitter's fractions name its connected outlets), then specs.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

from model.case.schema import MISSING, Problems, join
from model.case.specs import spec_from_json
from model.flowsheet.document import Block, Flowsheet, Stream
from model.flowsheet.events import Signal
from model.flowsheet.kinds import BLOCK_KINDS
from model.flowsheet.spec_values import ComponentAmounts, StreamEstimate

BLOCK_KEYS = ("kind", "name", "position", "specs")
STREAM_KEYS = ("name", "from", "to", "preferred_tear", "estimate", "number", "bends")
ESTIMATE_KEYS = ("flows_mol_s", "T_K", "P_Pa")


@contextmanager
def signals_blocked(flowsheet: Flowsheet) -> Iterator[None]:
    """Hold back the flowsheet's change signals while it is being built from a file.

    Nothing listens to a flowsheet still being read, and a view should see the loaded
    case whole, not block by block; blocked signals also skip the emit machinery.
    """
    signals = [
        getattr(flowsheet, name)
        for name, attribute in vars(type(flowsheet)).items()
        if isinstance(attribute, Signal)
    ]
    for signal in signals:
        signal.block()
    try:
        yield
    finally:
        for signal in signals:
            signal.unblock()


def read_flowsheet(problems: Problems, data: dict[str, Any], flowsheet: Flowsheet) -> None:
    """Components, then blocks (without specs), streams, and last the specs."""
    with signals_blocked(flowsheet):
        _read_parts(problems, data, flowsheet)


def _read_parts(problems: Problems, data: dict[str, Any], flowsheet: Flowsheet) -> None:
    _read_components(problems, data.get("components", []), flowsheet)
    blocks = problems.array("blocks", data.get("blocks", []))
    block_specs = _read_blocks(problems, blocks or [], flowsheet)
    streams = problems.array("streams", data.get("streams", []))
    _read_streams(problems, streams or [], flowsheet)
    for path, block, specs in block_specs:
        _read_specs(problems, path, block, specs, flowsheet)


def _read_components(problems: Problems, value: Any, flowsheet: Flowsheet) -> None:
    from model.properties.components import Component

    items = problems.array("components", value)
    for index, item in enumerate(items or []):
        path = join("components", index)
        data = problems.object(path, item, required=("name",))
        if data is None or problems.text(join(path, "name"), data.get("name"), name=True) is None:
            continue
        if data["name"] in flowsheet.component_names():
            problems.add(join(path, "name"), data["name"], "each component may be listed once")
            continue
        try:
            flowsheet.add_component(Component.from_dict(data))
        except Exception as error:  # a component's own check names what is wrong
            field = getattr(error, "field", None)
            inner = join(path, field) if isinstance(field, str) and field in data else path
            problems.add_error(inner, error)


def _read_blocks(
    problems: Problems, items: list[Any], flowsheet: Flowsheet
) -> list[tuple[str, Block, dict[str, Any]]]:
    """Insert each readable block without specs; return (path, block, raw specs) to set."""
    pending = []
    for index, item in enumerate(items):
        path = join("blocks", index)
        data = problems.object(path, item, known=BLOCK_KEYS, required=("kind", "name"))
        if data is None:
            continue
        kind = problems.choice(join(path, "kind"), data.get("kind", MISSING), BLOCK_KINDS)
        name = problems.text(join(path, "name"), data.get("name", MISSING), name=True)
        position = _read_position(problems, join(path, "position"), data.get("position", [0, 0]))
        specs = problems.object(join(path, "specs"), data.get("specs", {}))
        if kind is None or name is None:
            if isinstance(data.get("name"), str):
                problems.unread_blocks.add(data["name"])
            continue
        if name in flowsheet.blocks:
            problems.add(join(path, "name"), name, "each block name may be used once")
            continue
        block = flowsheet.insert_block(Block(kind, name, {}, position or (0.0, 0.0)))
        pending.append((path, block, specs or {}))
    return pending


def _read_position(problems: Problems, path: str, value: Any) -> tuple[float, float] | None:
    items = problems.array(path, value)
    if items is None:
        return None
    if len(items) != 2:
        problems.add(path, value, "a position is [x, y]: two numbers")
        return None
    x = problems.number(join(path, 0), items[0])
    y = problems.number(join(path, 1), items[1])
    return None if x is None or y is None else (x, y)


def _read_specs(
    problems: Problems, path: str, block: Block, specs: dict[str, Any], flowsheet: Flowsheet
) -> None:
    """Set each spec through ``Flowsheet.set_spec`` (which checks its meaning)."""
    kind = block.block_kind
    specs_path = join(path, "specs")
    known = [spec_field.name for spec_field in kind.spec_fields]
    for name in specs:
        if name not in known:
            listed = ", ".join(known) if known else "none"
            problems.add(
                join(specs_path, name), name, f"a specification of a {kind.name} ({listed})"
            )
    for name, raw in specs.items():  # the file's order, which is the order they were set
        if name not in known or raw is None:
            continue
        spec_field = kind.field(name)
        field_path = join(specs_path, spec_field.name)
        value = spec_from_json(problems, field_path, spec_field, raw, flowsheet.component_names())
        if value is None:
            continue
        try:
            flowsheet.set_spec(block.name, spec_field.name, value)
        except Exception as error:  # the model's check names the field, value and rule
            problems.add(field_path, getattr(error, "value", raw), _model_rule(error, block.name))
            continue
        _keep_exact_numbers(block, spec_field.name, value)


def _model_rule(error: Exception, block_name: str) -> str:
    """The model check's rule, prefixed with the part of the spec it concerns if narrower
    (e.g. ``"reactions[1].stoichiometry: an element-balanced reaction ..."``)."""
    allowed = getattr(error, "allowed", None)
    if allowed is None:
        return f"it could not be read ({type(error).__name__}: {error})"
    field = getattr(error, "field", "")
    prefix = block_name + "."
    if isinstance(field, str) and field.startswith(prefix) and "[" in field[len(prefix) :]:
        return f"{field[len(prefix) :]}: {allowed}"
    return str(allowed)


def _keep_exact_numbers(block: Block, field_name: str, read: Any) -> None:
    """Keep the file's fractions bit for bit when the check only renormalised them by rounding.

    A saved composition already sums to 1; dividing it by its floating-point sum again
    could move the last bit and so change the solved numbers, which must reopen identical.
    """
    stored = block.specs.get(field_name)
    if not isinstance(read, ComponentAmounts) or not isinstance(stored, ComponentAmounts):
        return
    if stored == read or stored.unit != read.unit or stored.values.keys() != read.values.keys():
        return
    if all(
        math.isclose(stored.values[k], read.values[k], rel_tol=1e-14, abs_tol=0.0)
        for k in read.values
    ):
        block.specs[field_name] = read


def _read_streams(problems: Problems, items: list[Any], flowsheet: Flowsheet) -> None:
    """Insert the streams in the file's order; the flowsheet says which port is wrong.

    A stream without a ``number`` (a file written before streams had numbers, or by a
    script) gets the next one above the file's highest, in the file's order, so the
    numbers come out the same every time the file is read.
    """
    read = [
        (join("streams", index), _read_stream(problems, join("streams", index), item, flowsheet))
        for index, item in enumerate(items)
    ]
    _number_unnumbered([stream for _, stream in read if stream is not None])
    for path, stream in read:
        if stream is None:
            continue
        if stream.name in flowsheet.streams:
            problems.add(join(path, "name"), stream.name, "each stream name may be used once")
            continue
        try:
            flowsheet.insert_stream(stream)
        except Exception as error:  # the flowsheet says which port is wrong and why
            problems.add_error(path, error)


def _read_stream(problems: Problems, path: str, item: Any, flowsheet: Flowsheet) -> Stream | None:
    data = problems.object(path, item, known=STREAM_KEYS, required=("name", "from", "to"))
    if data is None:
        return None
    count = len(problems)
    name = problems.text(join(path, "name"), data.get("name", MISSING), name=True)
    source = _read_end(problems, join(path, "from"), data.get("from", MISSING), flowsheet)
    target = _read_end(problems, join(path, "to"), data.get("to", MISSING), flowsheet)
    preferred = problems.boolean(join(path, "preferred_tear"), data.get("preferred_tear", False))
    estimate = _read_estimate(problems, join(path, "estimate"), data.get("estimate"), flowsheet)
    number = _read_stream_number(problems, join(path, "number"), data.get("number"))
    bends = _read_bends(problems, join(path, "bends"), data.get("bends", []))
    if len(problems) != count or name is None or source is None or target is None:
        return None
    stream = Stream(name, source[0], source[1], target[0], target[1], bool(preferred), estimate)
    stream.number = number
    stream.bends = bends
    return stream


def _read_bends(problems: Problems, path: str, value: Any) -> tuple[tuple[float, float], ...]:
    """The optional bend points of a stream's line on the diagram: a list of [x, y]."""
    items = problems.array(path, value) or []
    points = [_read_position(problems, join(path, index), item) for index, item in enumerate(items)]
    return tuple(point for point in points if point is not None)


def _read_stream_number(problems: Problems, path: str, value: Any) -> int | None:
    """An optional whole number >= 1 (JSON integer)."""
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, int) or value < 1:
        problems.add(path, value, "a whole number of 1 or more (the stream's number), or none")
        return None
    return value


def _number_unnumbered(streams: list[Stream]) -> None:
    """Give each stream without a number the next one above the highest given."""
    highest = max((s.number or 0 for s in streams), default=0)
    for stream in streams:
        if stream.number is None:
            highest += 1
            stream.number = highest


def _read_end(
    problems: Problems, path: str, value: Any, flowsheet: Flowsheet
) -> tuple[str, str] | None:
    data = problems.object(path, value, known=("block", "port"), required=("block", "port"))
    if data is None or "block" not in data or "port" not in data:
        return None
    block = problems.text(join(path, "block"), data["block"], name=True)
    port = problems.text(join(path, "port"), data["port"], name=True)
    if block in problems.unread_blocks:
        return None  # the block's own problem is reported already
    if block is not None and block not in flowsheet.blocks:
        listed = ", ".join(flowsheet.blocks) or "none could be read"
        problems.add(join(path, "block"), block, f"the name of a block of this case ({listed})")
        return None
    return None if block is None or port is None else (block, port)


def _read_estimate(
    problems: Problems, path: str, value: Any, flowsheet: Flowsheet
) -> StreamEstimate | None:
    if value is None:
        return None
    data = problems.object(path, value, known=ESTIMATE_KEYS)
    if data is None:
        return None
    count = len(problems)
    flows = problems.number_map(
        join(path, "flows_mol_s"),
        data.get("flows_mol_s", {}),
        flowsheet.component_names(),
        "a component of this case",
        minimum=0.0,
    )
    temperature = data.get("T_K")
    pressure = data.get("P_Pa")
    if temperature is not None:
        temperature = problems.number(join(path, "T_K"), temperature, positive=True)
    if pressure is not None:
        pressure = problems.number(join(path, "P_Pa"), pressure, positive=True)
    if len(problems) != count:
        return None
    return StreamEstimate(flows or {}, temperature, pressure)
