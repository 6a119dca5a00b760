"""Undoable structure edits of the flowsheet: blocks, streams, names, positions, paste.

Each command is a small ``QUndoCommand`` that calls the flowsheet's public methods and
keeps the objects it removed, so undo puts back the very same block or stream (with its
specs, position and estimate). Composite edits (removing a block with its streams,
pasting, finishing a dangling outlet with a new Product) are parents of sub-commands, so
one undo step reverses all of it.

Push commands with :func:`execute`: it runs the command once before it goes on the undo
stack, so a refusal by the model (an ``InputError``) reaches the caller and nothing is
pushed.
"""

from __future__ import annotations

import copy
from dataclasses import dataclass, field
from typing import Any

from PySide6.QtGui import QUndoCommand, QUndoStack

from model.flowsheet.document import Block, Flowsheet, Stream


class _Command(QUndoCommand):
    """Base: runs its sub-commands and skips the redo that ``QUndoStack.push`` makes
    after :func:`execute` already ran the command.

    Sub-commands are kept in a Python list (``parent=`` adds to it) rather than as Qt
    children, so their Python objects live exactly as long as the parent.
    """

    def __init__(self, text: str, parent: _Command | None = None) -> None:
        super().__init__(text)
        self._children: list[_Command] = []
        self._skip_next_redo = False
        if parent is not None:
            parent._children.append(self)

    def redo(self) -> None:
        if self._skip_next_redo:
            self._skip_next_redo = False
            return
        self.apply()

    def undo(self) -> None:
        self.revert()

    def apply(self) -> None:
        """Make the change (first time and every redo); sub-commands in order by default."""
        for child in self._children:
            child.apply()

    def revert(self) -> None:
        """Reverse the change; sub-commands in reverse order by default."""
        for child in reversed(self._children):
            child.revert()


def execute(undo_stack: QUndoStack, command: _Command) -> None:
    """Run ``command`` now and push it; an ``InputError`` from the model pushes nothing.

    The model leaves the flowsheet unchanged when it refuses an edit, so a refused
    command has no effect and never appears on the stack.
    """
    command.apply()
    command._skip_next_redo = True
    undo_stack.push(command)


class AddBlockCommand(_Command):
    """Add a block of ``kind`` at ``position`` (its centre on the diagram)."""

    def __init__(
        self,
        flowsheet: Flowsheet,
        kind: str,
        position: tuple[float, float],
        name: str | None = None,
        specs: dict[str, Any] | None = None,
        parent: _Command | None = None,
    ) -> None:
        self.block_name = name or flowsheet.new_block_name(kind)
        super().__init__(f"Add {self.block_name}", parent)
        self._flowsheet = flowsheet
        self._kind, self._position, self._specs = kind, position, specs
        self._block: Block | None = None

    def apply(self) -> None:
        if self._block is None:
            self._block = self._flowsheet.add_block(
                self._kind, self.block_name, self._position, copy.deepcopy(self._specs)
            )
        else:
            self._flowsheet.insert_block(self._block)

    def revert(self) -> None:
        self._flowsheet.remove_block(self.block_name)


class ConnectCommand(_Command):
    """Draw a stream from an outlet port to an inlet port."""

    def __init__(
        self,
        flowsheet: Flowsheet,
        source: str,
        source_port: str,
        target: str,
        target_port: str,
        name: str | None = None,
        parent: _Command | None = None,
    ) -> None:
        self.stream_name = name or flowsheet.new_stream_name()
        super().__init__(f"Connect {source} to {target}", parent)
        self._flowsheet = flowsheet
        self._ends = (source, source_port, target, target_port)
        self._stream: Stream | None = None

    def apply(self) -> None:
        if self._stream is None:
            self._stream = self._flowsheet.connect(*self._ends, name=self.stream_name)
        else:
            self._flowsheet.insert_stream(self._stream)

    def revert(self) -> None:
        self._flowsheet.remove_stream(self.stream_name)


class RemoveStreamCommand(_Command):
    """Delete one stream; undo puts the same stream object back."""

    def __init__(self, flowsheet: Flowsheet, name: str, parent: _Command | None = None):
        super().__init__(f"Delete stream {name}", parent)
        self._flowsheet = flowsheet
        self.stream = flowsheet.stream(name)

    def apply(self) -> None:
        self._flowsheet.remove_stream(self.stream.name)

    def revert(self) -> None:
        self._flowsheet.insert_stream(self.stream)


class RemoveBlockCommand(_Command):
    """Delete a block; its streams go first, as sub-commands of the same undo step.

    Streams named in ``handled`` are left to the caller (a larger delete removes them).
    """

    def __init__(
        self,
        flowsheet: Flowsheet,
        name: str,
        parent: _Command | None = None,
        handled: set[str] = frozenset(),
    ) -> None:
        super().__init__(f"Delete {name}", parent)
        self._flowsheet = flowsheet
        self.block = flowsheet.block(name)
        for stream in flowsheet.inlet_streams(name) + flowsheet.outlet_streams(name):
            if stream.name not in handled:
                RemoveStreamCommand(flowsheet, stream.name, parent=self)

    def apply(self) -> None:
        super().apply()  # the attached streams
        self._flowsheet.remove_block(self.block.name)

    def revert(self) -> None:
        self._flowsheet.insert_block(self.block)
        reinsert_streams(self._flowsheet, [child.stream for child in self._children])


class DeleteCommand(_Command):
    """Delete blocks (with every stream touching them) and streams in one undo step."""

    def __init__(
        self,
        flowsheet: Flowsheet,
        block_names: list[str],
        stream_names: list[str],
        parent: _Command | None = None,
    ) -> None:
        super().__init__(f"Delete {', '.join(block_names + stream_names)}", parent)
        self._flowsheet = flowsheet
        names = list(dict.fromkeys(stream_names))
        for block in block_names:
            attached = flowsheet.inlet_streams(block) + flowsheet.outlet_streams(block)
            names += [s.name for s in attached if s.name not in names]
        self._streams = [RemoveStreamCommand(flowsheet, n, parent=self) for n in names]
        self._blocks = [
            RemoveBlockCommand(flowsheet, b, parent=self, handled=set(names)) for b in block_names
        ]

    def revert(self) -> None:
        for command in reversed(self._blocks):
            command.revert()
        reinsert_streams(self._flowsheet, [command.stream for command in self._streams])


def reinsert_streams(flowsheet: Flowsheet, streams: list[Stream]) -> None:
    """Put removed stream objects back (their blocks must be back first)."""
    for stream in streams:
        flowsheet.insert_stream(stream)


class RenameBlockCommand(_Command):
    """Rename a block; its streams follow (the model updates their ends)."""

    def __init__(self, flowsheet: Flowsheet, old: str, new: str, parent=None) -> None:
        super().__init__(f"Rename {old} to {new}", parent)
        self._flowsheet, self._old, self._new = flowsheet, old, new

    def apply(self) -> None:
        self._flowsheet.rename_block(self._old, self._new)

    def revert(self) -> None:
        self._flowsheet.rename_block(self._new, self._old)


class RenameStreamCommand(_Command):
    """Rename a stream."""

    def __init__(self, flowsheet: Flowsheet, old: str, new: str, parent=None) -> None:
        super().__init__(f"Rename stream {old} to {new}", parent)
        self._flowsheet, self._old, self._new = flowsheet, old, new

    def apply(self) -> None:
        self._flowsheet.rename_stream(self._old, self._new)

    def revert(self) -> None:
        self._flowsheet.rename_stream(self._new, self._old)


Position = tuple[float, float]


class MoveBlocksCommand(_Command):
    """Move blocks to new positions: ``moves`` maps a block name to (old, new) position."""

    def __init__(
        self, flowsheet: Flowsheet, moves: dict[str, tuple[Position, Position]], parent=None
    ):
        count = len(moves)
        what = next(iter(moves)) if count == 1 else f"{count} blocks"
        super().__init__(f"Move {what}", parent)
        self._flowsheet, self._moves = flowsheet, dict(moves)

    def apply(self) -> None:
        for name, (_old, new) in self._moves.items():
            self._flowsheet.move_block(name, new)

    def revert(self) -> None:
        for name, (old, _new) in self._moves.items():
            self._flowsheet.move_block(name, old)


class FinishWithBlockCommand(_Command):
    """One gesture: add a Product after a dangling outlet, or a Feed before a dangling inlet."""

    def __init__(
        self, flowsheet: Flowsheet, block: str, port: str, position: Position, parent=None
    ):
        direction_out = port in flowsheet.outlet_ports(block)
        kind = "Product" if direction_out else "Feed"
        super().__init__(
            f"{'Finish' if direction_out else 'Start'} {block} with a new {kind}", parent
        )
        add = AddBlockCommand(flowsheet, kind, position, parent=self)
        if direction_out:
            ConnectCommand(flowsheet, block, port, add.block_name, "in", parent=self)
        else:
            ConnectCommand(flowsheet, add.block_name, "out", block, port, parent=self)
        self.new_block_name = add.block_name


@dataclass
class ClipboardContent:
    """Blocks and the streams between them, copied for pasting (deep copies)."""

    blocks: list[Block] = field(default_factory=list)
    streams: list[Stream] = field(default_factory=list)

    @classmethod
    def from_selection(cls, flowsheet: Flowsheet, block_names: list[str]) -> ClipboardContent:
        names = set(block_names)
        blocks = [copy.deepcopy(flowsheet.block(n)) for n in block_names]
        streams = [
            copy.deepcopy(s)
            for s in flowsheet.streams.values()
            if s.source in names and s.target in names
        ]
        return cls(blocks, streams)

    def __bool__(self) -> bool:
        return bool(self.blocks)


class PasteCommand(_Command):
    """Paste copied blocks (and the streams between them) with new names, shifted by ``offset``."""

    def __init__(
        self, flowsheet: Flowsheet, content: ClipboardContent, offset: Position, parent=None
    ):
        super().__init__(f"Paste {len(content.blocks)} block(s)", parent)
        taken_blocks = set(flowsheet.blocks)
        taken_streams = set(flowsheet.streams)
        renamed: dict[str, str] = {}
        for block in content.blocks:
            renamed[block.name] = _free_name(f"{block.kind} ", taken_blocks)
            position = (block.position[0] + offset[0], block.position[1] + offset[1])
            AddBlockCommand(
                flowsheet, block.kind, position, renamed[block.name], block.specs, parent=self
            )
        for stream in content.streams:
            name = _free_name("S", taken_streams)
            ConnectCommand(
                flowsheet,
                renamed[stream.source],
                stream.source_port,
                renamed[stream.target],
                stream.target_port,
                name,
                parent=self,
            )
        self.new_block_names = list(renamed.values())


def _free_name(prefix: str, taken: set[str]) -> str:
    """The first ``prefix + number`` not in ``taken``; adds it to ``taken``."""
    number = 1
    while f"{prefix}{number}" in taken:
        number += 1
    taken.add(f"{prefix}{number}")
    return f"{prefix}{number}"


class SetBendsCommand(_Command):
    """Set the user's bend points of one stream's line (add, move or remove one)."""

    def __init__(self, flowsheet: Flowsheet, name: str, bends: list[Position], parent=None):
        super().__init__(f"Bend {name}", parent)
        self._flowsheet, self._name = flowsheet, name
        self._old, self._new = flowsheet.stream(name).bends, tuple(bends)

    def apply(self) -> None:
        self._flowsheet.set_stream_bends(self._name, self._new)

    def revert(self) -> None:
        self._flowsheet.set_stream_bends(self._name, self._old)


class LayOutCommand(_Command):
    """Move every block to a new layout and clear the bend points (one undo step)."""

    def __init__(self, flowsheet: Flowsheet, positions: dict[str, Position], parent=None):
        super().__init__("Lay out diagram", parent)
        moves = {
            name: (flowsheet.block(name).position, new)
            for name, new in positions.items()
            if flowsheet.block(name).position != new
        }
        if moves:
            MoveBlocksCommand(flowsheet, moves, parent=self)
        for stream in flowsheet.streams.values():
            if stream.bends:
                SetBendsCommand(flowsheet, stream.name, [], parent=self)


class SetPropertyMethodCommand(_Command):
    """Choose the case's property method (phase equilibrium)."""

    def __init__(self, flowsheet: Flowsheet, name: str) -> None:
        super().__init__(f"Property method {name}")
        self._flowsheet = flowsheet
        self._new, self._old = name, flowsheet.property_method

    def apply(self) -> None:
        self._flowsheet.set_property_method(self._new)

    def revert(self) -> None:
        self._flowsheet.set_property_method(self._old)
