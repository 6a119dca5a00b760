"""Undo and redo of structure edits: back to empty and forward to the full flowsheet."""

from __future__ import annotations

import pytest
from PySide6.QtCore import QPointF
from PySide6.QtGui import QUndoStack

from gui import commands
from gui.commands_specs import AddComponentCommand, SetSpecCommand
from gui.diagram.editor import DiagramEditor
from gui.diagram.scene import DiagramScene
from gui.diagram.view import DiagramView
from model.case.document import Case
from model.case.file import case_to_dict
from model.errors import InputError
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.properties.components import lookup_component


def structure(flowsheet: Flowsheet) -> dict:
    """Everything the case file keeps of the flowsheet, as plain data."""
    data = case_to_dict(Case(flowsheet=flowsheet))
    return {key: data[key] for key in ("components", "blocks", "streams")}


@pytest.fixture
def editor(qtbot):
    flowsheet = Flowsheet()
    scene = DiagramScene()
    view = DiagramView(scene)
    qtbot.addWidget(view)
    stack = QUndoStack()
    diagram_editor = DiagramEditor(scene, view, stack, lambda: flowsheet, view)
    scene.set_flowsheet(flowsheet)
    return diagram_editor, flowsheet, stack, scene


def build_recycle(diagram_editor, flowsheet, stack) -> None:
    """Feed -> Mixer -> Heater -> Splitter -> Product, Splitter out2 back to the Mixer."""
    stack.push(AddComponentCommand(flowsheet, lookup_component("nitrogen")))
    stack.push(AddComponentCommand(flowsheet, lookup_component("argon")))
    for kind, x in (
        ("Feed", -400),
        ("Mixer", -150),
        ("Heater", 100),
        ("Splitter", 350),
        ("Product", 600),
    ):
        diagram_editor.add_block(kind, x, 0)
    diagram_editor.connect_ports("Feed 1", "out", "Mixer 1", "in1")
    diagram_editor.connect_ports("Mixer 1", "out", "Heater 1", "in")
    diagram_editor.connect_ports("Heater 1", "out", "Splitter 1", "in")
    diagram_editor.connect_ports("Splitter 1", "out1", "Product 1", "in")
    diagram_editor.connect_ports("Splitter 1", "out2", "Mixer 1", "in2")
    specs = [
        ("Feed 1", "flows", ComponentAmounts({"nitrogen": 90.0, "argon": 10.0}, "kmol/h")),
        ("Feed 1", "T", TypedQuantity(25.0, "degC")),
        ("Feed 1", "P", TypedQuantity(5.0, "bar")),
        ("Heater 1", "T", TypedQuantity(80.0, "degC")),
        ("Splitter 1", "fractions", {"out1": 0.25}),
    ]
    for block, field, value in specs:
        stack.push(SetSpecCommand(flowsheet, block, field, value))
    diagram_editor.move_blocks({"Heater 1": ((100.0, 0.0), (100.0, 120.0))})
    diagram_editor.rename("block", "Splitter 1", "Purge splitter")
    diagram_editor.rename("stream", "S5", "Recycle")
    diagram_editor.finish_dangling("Mixer 1", "in3", -300, 200)  # a second feed, one gesture


def test_undo_to_empty_and_redo_to_full_give_the_identical_model(editor):
    diagram_editor, flowsheet, stack, scene = editor
    empty = structure(flowsheet)
    build_recycle(diagram_editor, flowsheet, stack)
    full = structure(flowsheet)
    assert len(full["blocks"]) == 6 and len(full["streams"]) == 6
    while stack.canUndo():
        stack.undo()
    assert structure(flowsheet) == empty
    assert scene.items() == []
    while stack.canRedo():
        stack.redo()
    assert structure(flowsheet) == full
    assert sorted(i.block.name for i in scene.block_items()) == sorted(flowsheet.blocks)
    assert scene.stream_item("Recycle") is not None


def test_deleting_a_loop_block_and_undoing_restores_streams_specs_and_place(editor):
    diagram_editor, flowsheet, stack, scene = editor
    build_recycle(diagram_editor, flowsheet, stack)
    before = structure(flowsheet)
    scene.select_only(["Mixer 1"])
    diagram_editor.delete_selection()
    assert "Mixer 1" not in flowsheet.blocks
    assert len(flowsheet.streams) == 2  # the four streams at the mixer went with it
    stack.undo()
    after = structure(flowsheet)
    key = lambda item: item["name"]  # noqa: E731 - the undo appends, order may differ
    assert sorted(after["blocks"], key=key) == sorted(before["blocks"], key=key)
    assert sorted(after["streams"], key=key) == sorted(before["streams"], key=key)


def test_execute_pushes_nothing_when_the_model_refuses(editor):
    diagram_editor, flowsheet, stack, _scene = editor
    diagram_editor.add_block("Heater", 0, 0)
    diagram_editor.add_block("Heater", 0, 100)
    with pytest.raises(InputError, match="not already used"):
        commands.execute(stack, commands.RenameBlockCommand(flowsheet, "Heater 2", "Heater 1"))
    assert stack.count() == 2 and sorted(flowsheet.blocks) == ["Heater 1", "Heater 2"]
    assert not diagram_editor.connect_ports("Heater 1", "out", "Heater 1", "in")
    assert stack.count() == 2 and not flowsheet.streams


def test_redo_after_undo_of_paste_and_move_keeps_positions(editor, qtbot):
    diagram_editor, flowsheet, stack, scene = editor
    diagram_editor.add_block("Feed", 0, 0)
    diagram_editor.add_block("Product", 300, 0)
    diagram_editor.connect_ports("Feed 1", "out", "Product 1", "in")
    scene.select_only(["Feed 1", "Product 1"])
    diagram_editor.copy_selection()
    diagram_editor.paste()
    diagram_editor.move_blocks({"Feed 2": ((40.0, 40.0), (40.0, 300.0))})
    snapshot = structure(flowsheet)
    for _ in range(2):
        stack.undo()
    assert sorted(flowsheet.blocks) == ["Feed 1", "Product 1"]
    for _ in range(2):
        stack.redo()
    assert structure(flowsheet) == snapshot
    assert scene.block_item("Feed 2").pos() == QPointF(40, 300)


def test_undoing_a_mixed_delete_puts_numbered_ports_back_in_an_order_the_model_accepts(editor):
    diagram_editor, flowsheet, stack, scene = editor
    diagram_editor.add_block("Mixer", 0, 0)
    for index in range(3):
        diagram_editor.add_block("Feed", -300, index * 120)
        diagram_editor.connect_ports(f"Feed {index + 1}", "out", "Mixer 1", f"in{index + 1}")
    before = structure(flowsheet)
    # the stream on in1 selected by itself, the feeds of in2 and in3 as blocks
    scene.select_only(blocks=["Feed 3", "Feed 2"], streams=["S1"])
    diagram_editor.delete_selection()
    assert list(flowsheet.blocks) == ["Mixer 1", "Feed 1"] and not flowsheet.streams
    stack.undo()
    assert {s["name"]: s for s in structure(flowsheet)["streams"]} == {
        s["name"]: s for s in before["streams"]
    }
    assert stack.redoText().startswith("Delete")
