"""Turns the diagram's gestures into undo commands: add, connect, move, bend, rename,
delete, copy and paste, and a new automatic layout.

The scene and view only report what the user did; this editor builds the command,
pushes it with :func:`gui.commands.execute` and explains a refusal by the model (a
status message for gestures, a message box for a typed name). Nothing changes when the
model refuses.
"""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtCore import QObject, Signal
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import QInputDialog, QLineEdit, QMessageBox, QWidget

from gui import commands
from gui.diagram import look
from gui.diagram.block_item import block_height
from gui.diagram.layout import flowsheet_layout, needs_layout
from gui.diagram.scene import DiagramScene
from gui.diagram.view import DiagramView
from model.errors import LoopwrightError
from model.flowsheet.document import Flowsheet

PASTE_OFFSET = 40.0


class DiagramEditor(QObject):
    """Edits the flowsheet on behalf of the diagram; ``message(str)`` explains refusals."""

    message = Signal(str)

    def __init__(
        self,
        scene: DiagramScene,
        view: DiagramView,
        undo_stack: QUndoStack,
        flowsheet_getter: Callable[[], Flowsheet],
        dialog_parent: QWidget | None = None,
    ) -> None:
        super().__init__(dialog_parent)
        self._scene, self._view, self._undo_stack = scene, view, undo_stack
        self._flowsheet = flowsheet_getter
        self._dialog_parent = dialog_parent
        self._clipboard = commands.ClipboardContent()
        self._paste_count = 0
        self.enabled = True
        scene.connection_requested.connect(self.connect_ports)
        scene.dangling_released.connect(self.finish_dangling)
        scene.blocks_moved.connect(self.move_blocks)
        scene.rename_requested.connect(self.ask_rename)
        scene.bends_requested.connect(self.set_bends)
        scene.message.connect(self.message)
        view.block_dropped.connect(self.add_block)

    def set_enabled(self, enabled: bool) -> None:
        """Refuse every edit while a solve runs."""
        self.enabled = enabled
        self._scene.set_editable(enabled)
        self._view.setAcceptDrops(enabled)

    def _run(self, command: commands._Command) -> bool:
        if not self.enabled:
            self.message.emit("The flowsheet cannot be edited while a solve runs.")
            return False
        try:
            commands.execute(self._undo_stack, command)
        except LoopwrightError as error:
            self.message.emit(str(error))
            return False
        return True

    # ---- gestures -------------------------------------------------------------------
    def add_block(self, kind: str, x: float, y: float) -> str | None:
        """Add a block of ``kind`` centred at (x, y); return its name."""
        command = commands.AddBlockCommand(self._flowsheet(), kind, (x, y))
        if self._run(command):
            self._scene.select_only([command.block_name])
            return command.block_name
        return None

    def add_block_at_centre(self, kind: str) -> str | None:
        centre = self._view.mapToScene(self._view.viewport().rect().center())
        return self.add_block(kind, round(centre.x()), round(centre.y()))

    def connect_ports(self, source: str, source_port: str, target: str, target_port: str) -> bool:
        command = commands.ConnectCommand(
            self._flowsheet(), source, source_port, target, target_port
        )
        return self._run(command)

    def finish_dangling(self, block: str, port: str, x: float, y: float) -> str | None:
        """Finish a free outlet with a new Product, or start a free inlet with a new Feed."""
        flowsheet = self._flowsheet()
        outlet = port in flowsheet.outlet_ports(block)
        half = look.BLOCK_WIDTH / 2
        position = (round(x + half) if outlet else round(x - half), round(y))
        try:
            command = commands.FinishWithBlockCommand(flowsheet, block, port, position)
        except LoopwrightError as error:
            self.message.emit(str(error))
            return None
        if self._run(command):
            self._scene.select_only([command.new_block_name])
            return command.new_block_name
        return None

    def move_blocks(self, moves: dict) -> None:
        if not self._run(commands.MoveBlocksCommand(self._flowsheet(), moves)):
            flowsheet = self._flowsheet()  # put the items back where the model has them
            for name in moves:
                item = self._scene.block_item(name)
                if item is not None:
                    item.setPos(*flowsheet.block(name).position)

    def set_bends(self, stream: str, bends: list) -> bool:
        """Give a stream's line these bend points (one undo step)."""
        return self._run(commands.SetBendsCommand(self._flowsheet(), stream, bends))

    def lay_out(self) -> bool:
        """Place every block anew, calculation order left to right (one undo step)."""
        flowsheet = self._flowsheet()
        if not flowsheet.blocks:
            self.message.emit("There are no blocks to lay out.")
            return False
        if self._run(commands.LayOutCommand(flowsheet, automatic_positions(flowsheet))):
            self._view.fit_to_view()
            return True
        return False

    # ---- names ----------------------------------------------------------------------
    def ask_rename(self, what: str, name: str) -> bool:
        """Ask for a new name of a block or stream; a refused name keeps the old one."""
        if not self.enabled:
            return False
        new_name, accepted = QInputDialog.getText(
            self._dialog_parent,
            f"Rename {what}",
            f"New name for {name}:",
            QLineEdit.EchoMode.Normal,
            name,
        )
        if not accepted or new_name == name:
            return False
        return self.rename(what, name, new_name)

    def rename(self, what: str, old: str, new: str) -> bool:
        kind = commands.RenameBlockCommand if what == "block" else commands.RenameStreamCommand
        try:
            commands.execute(self._undo_stack, kind(self._flowsheet(), old, new))
        except LoopwrightError as error:
            QMessageBox.warning(self._dialog_parent, f"Cannot rename {old}", str(error))
            return False
        return True

    def rename_selected(self) -> bool:
        blocks = self._scene.selected_block_names()
        streams = self._scene.selected_stream_names()
        if len(blocks) + len(streams) != 1:
            self.message.emit("Select one block or stream to rename it.")
            return False
        return (
            self.ask_rename("block", blocks[0]) if blocks else self.ask_rename("stream", streams[0])
        )

    # ---- delete, copy, paste -------------------------------------------------------------
    def delete_selection(self) -> None:
        """Delete the selected blocks (with their streams) and streams in one undo step."""
        flowsheet = self._flowsheet()
        blocks = self._scene.selected_block_names()
        streams = self._scene.selected_stream_names()
        if blocks or streams:
            self._run(commands.DeleteCommand(flowsheet, blocks, streams))
        else:
            self.message.emit("Select blocks or streams on the diagram to delete them.")

    def copy_selection(self) -> int:
        """Copy the selected blocks and the streams between them; return the block count."""
        names = self._scene.selected_block_names()
        if not names:
            self.message.emit("Select blocks on the diagram to copy them.")
            return 0
        self._clipboard = commands.ClipboardContent.from_selection(self._flowsheet(), names)
        self._paste_count = 0
        self.message.emit(
            f"Copied {len(names)} block{'s' if len(names) != 1 else ''} "
            "and the streams between them."
        )
        return len(names)

    def can_paste(self) -> bool:
        return bool(self._clipboard)

    def paste(self) -> list[str]:
        """Paste the copied blocks with new names, offset from the originals."""
        if not self._clipboard:
            self.message.emit("Nothing to paste: copy blocks first.")
            return []
        self._paste_count += 1
        offset = (PASTE_OFFSET * self._paste_count, PASTE_OFFSET * self._paste_count)
        command = commands.PasteCommand(self._flowsheet(), self._clipboard, offset)
        if self._run(command):
            self._scene.select_only(command.new_block_names)
            return command.new_block_names
        return []

    def select_all(self) -> None:
        for item in self._scene.items():
            if item.flags() & item.GraphicsItemFlag.ItemIsSelectable:
                item.setSelected(True)


def automatic_positions(flowsheet: Flowsheet) -> dict[str, tuple[float, float]]:
    """A layered layout of ``flowsheet`` at the drawn block sizes (see gui.diagram.layout)."""

    def height_of(name: str) -> float:
        return block_height(len(flowsheet.inlet_ports(name)), len(flowsheet.outlet_ports(name)))

    return flowsheet_layout(flowsheet, height_of)


def lay_out_if_unplaced(flowsheet: Flowsheet) -> bool:
    """Give a flowsheet with no positions of its own (all blocks at one place) a layout,
    directly and not as an edit (used when a case is opened); return whether it did."""
    if not needs_layout([block.position for block in flowsheet.blocks.values()]):
        return False
    for name, position in automatic_positions(flowsheet).items():
        flowsheet.move_block(name, position)
    return True
