"""Undoable edits of specifications, components, preferred tears and tear estimates.

Each command is a small ``QUndoCommand`` that calls the flowsheet's public methods and
remembers what it needs to undo. Values are checked by the model before a command is
pushed (see :func:`push_spec_change`), so a refused value never reaches the undo stack.
"""

from __future__ import annotations

import math
from typing import Any

from PySide6.QtGui import QUndoCommand, QUndoStack

from model.errors import InputError
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import StreamEstimate


class SetSpecCommand(QUndoCommand):
    """Set one spec of one block; undo restores the previous value (or its absence)."""

    def __init__(self, flowsheet: Flowsheet, block_name: str, field: str, value: Any) -> None:
        block = flowsheet.block(block_name)
        label = block.block_kind.field(field).label
        super().__init__(f"Set {block_name} {label.lower()}")
        self._flowsheet = flowsheet
        self._block_name = block_name
        self._field = field
        self._value = value
        self._old_value = block.specs.get(field)

    def redo(self) -> None:
        self._flowsheet.set_spec(self._block_name, self._field, self._value)

    def undo(self) -> None:
        self._flowsheet.set_spec(self._block_name, self._field, self._old_value)


class AddComponentCommand(QUndoCommand):
    """Add a component (``model.properties.components.Component``) at the end of the case's list."""

    def __init__(self, flowsheet: Flowsheet, component: Any) -> None:
        super().__init__(f"Add component {component.name}")
        self._flowsheet = flowsheet
        self._component = component

    def redo(self) -> None:
        self._flowsheet.add_component(self._component)

    def undo(self) -> None:
        self._flowsheet.remove_component(self._component.name)


class RemoveComponentCommand(QUndoCommand):
    """Remove a component no spec uses; undo puts it back at its former place."""

    def __init__(self, flowsheet: Flowsheet, name: str) -> None:
        super().__init__(f"Remove component {name}")
        self._flowsheet = flowsheet
        self._name = name
        self._component = next(c for c in flowsheet.components if c.name == name)
        self._index = flowsheet.component_names().index(name)

    def redo(self) -> None:
        self._index = self._flowsheet.remove_component(self._name)

    def undo(self) -> None:
        self._flowsheet.add_component(self._component, self._index)


class SetPreferredTearCommand(QUndoCommand):
    """Mark or unmark a stream as the user's preferred tear stream."""

    def __init__(self, flowsheet: Flowsheet, stream_name: str, preferred: bool) -> None:
        verb = "Prefer" if preferred else "Do not prefer"
        super().__init__(f"{verb} {stream_name} as tear stream")
        self._flowsheet = flowsheet
        self._stream_name = stream_name
        self._preferred = bool(preferred)
        self._old = flowsheet.stream(stream_name).preferred_tear

    def redo(self) -> None:
        self._flowsheet.set_preferred_tear(self._stream_name, self._preferred)

    def undo(self) -> None:
        self._flowsheet.set_preferred_tear(self._stream_name, self._old)


class SetEstimateCommand(QUndoCommand):
    """Set (or clear, with None) a stream's initial estimate for when it is torn."""

    def __init__(
        self, flowsheet: Flowsheet, stream_name: str, estimate: StreamEstimate | None
    ) -> None:
        verb = "Clear" if estimate is None else "Set"
        super().__init__(f"{verb} the initial estimate of {stream_name}")
        self._flowsheet = flowsheet
        self._stream_name = stream_name
        self._estimate = estimate
        self._old = flowsheet.stream(stream_name).estimate

    def redo(self) -> None:
        self._flowsheet.set_estimate(self._stream_name, self._estimate)

    def undo(self) -> None:
        self._flowsheet.set_estimate(self._stream_name, self._old)


def checked_estimate(
    flowsheet: Flowsheet, stream_name: str, estimate: StreamEstimate | None
) -> StreamEstimate | None:
    """``estimate`` if every value is allowed (None for an estimate with nothing in it),
    else an InputError naming the field, e.g. ``"Recycle gas.estimate.T"``.

    Flows (mol/s) must be finite and not negative, of the case's components; T (K) and
    P (Pa) finite and above zero.
    """
    if estimate is None or (not estimate.flows and estimate.T is None and estimate.P is None):
        return None
    prefix = f"{stream_name}.estimate"
    names = flowsheet.component_names()
    for component, flow in estimate.flows.items():
        if component not in names:
            raise InputError(f"{prefix}.flows", component, f"one of the components {names}")
        if not (math.isfinite(flow) and flow >= 0.0):
            raise InputError(f"{prefix}.flows[{component}]", flow, "a flow of 0 or more")
    for field, value, what in (("T", estimate.T, "temperature"), ("P", estimate.P, "pressure")):
        if value is not None and not (math.isfinite(value) and value > 0.0):
            raise InputError(f"{prefix}.{field}", value, f"an absolute {what} above zero")
    return estimate


def push_estimate_change(
    undo_stack: QUndoStack,
    flowsheet: Flowsheet,
    stream_name: str,
    estimate: StreamEstimate | None,
) -> str | None:
    """Check ``estimate`` and, if allowed and different, push a :class:`SetEstimateCommand`.

    Returns the refusal message (nothing pushed), else None.
    """
    try:
        estimate = checked_estimate(flowsheet, stream_name, estimate)
    except InputError as error:
        return str(error)
    if flowsheet.stream(stream_name).estimate != estimate:
        undo_stack.push(SetEstimateCommand(flowsheet, stream_name, estimate))
    return None


def checked_spec_value(flowsheet: Flowsheet, block_name: str, field: str, value: Any) -> Any:
    """The model's normalised form of ``value`` for the spec, or raise its InputError.

    ``None`` (clearing an optional spec) is always accepted here; the model reports a
    missing required spec when the flowsheet is validated.
    """
    from model.flowsheet.spec_checks import check_spec_value

    block = flowsheet.block(block_name)
    if value is None:
        return None
    return check_spec_value(flowsheet, block, block.block_kind.field(field), value)


def push_spec_change(
    undo_stack: QUndoStack, flowsheet: Flowsheet, block_name: str, field: str, value: Any
) -> str | None:
    """Check ``value`` with the model and, if allowed, push a :class:`SetSpecCommand`.

    Returns
    -------
    str or None
        The model's message when the value is refused (nothing is pushed), else None.
        A value equal to the current one pushes nothing either.
    """
    try:
        normalised = checked_spec_value(flowsheet, block_name, field, value)
    except InputError as error:
        return str(error)
    block = flowsheet.block(block_name)
    if field in block.specs and block.specs[field] == normalised:
        return None
    if normalised is None and field not in block.specs:
        return None
    undo_stack.push(SetSpecCommand(flowsheet, block_name, field, normalised))
    return None


class SetTargetsCommand(QUndoCommand):
    """Replace the flowsheet's targets; undo restores the previous list."""

    def __init__(self, flowsheet: Flowsheet, targets: list) -> None:
        super().__init__("Edit targets")
        self._flowsheet = flowsheet
        self._targets = list(targets)
        self._old_targets = list(flowsheet.targets)

    def redo(self) -> None:
        self._flowsheet.set_targets(self._targets)

    def undo(self) -> None:
        self._flowsheet.set_targets(self._old_targets)
