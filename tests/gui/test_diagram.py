"""The diagram editor alone (scene, view, editor, shelf) driven by real mouse events."""

from __future__ import annotations

from types import SimpleNamespace

import pytest
from PySide6.QtCore import QPoint, QPointF, Qt
from PySide6.QtGui import QUndoStack
from PySide6.QtTest import QTest

from gui.diagram.block_item import BlockItem
from gui.diagram.editor import DiagramEditor
from gui.diagram.scene import DiagramScene
from gui.diagram.stream_item import StreamItem
from gui.diagram.view import DiagramView
from model.flowsheet.document import Flowsheet


@pytest.fixture
def diagram(qtbot, mouse):
    flowsheet = Flowsheet()
    scene = DiagramScene()
    view = DiagramView(scene)
    view.resize(1000, 700)
    stack = QUndoStack()
    editor = DiagramEditor(scene, view, stack, lambda: flowsheet, view)
    messages: list[str] = []
    editor.message.connect(messages.append)
    scene.set_flowsheet(flowsheet)
    qtbot.addWidget(view)
    view.show()
    qtbot.waitExposed(view)
    view.centerOn(0, 0)
    return SimpleNamespace(
        flowsheet=flowsheet,
        scene=scene,
        view=view,
        stack=stack,
        editor=editor,
        messages=messages,
        mouse=mouse(view),
    )


def port_position(diagram, block, direction, port) -> QPointF:
    return diagram.scene.block_item(block).port(direction, port).scenePos()


def test_scene_mirrors_every_model_change(diagram, qtbot):
    sheet, scene = diagram.flowsheet, diagram.scene
    sheet.add_block("Feed", "F", (-200, 0))
    mixer = sheet.add_block("Mixer", "M", (0, 0))
    assert {i.block.name for i in scene.block_items()} == {"F", "M"}
    assert [p.port for p in scene.block_item("M").ports()] == ["in1", "in2", "out"]
    sheet.connect("F", "out", "M", "in1", name="S1")
    sheet.add_block("Splitter", "T", (200, 0))
    sheet.connect("T", "out1", "M", "in2")
    # both Mixer inlets taken: the model offers a spare in3 and the item shows it
    assert [p.port for p in scene.block_item("M").ports()] == ["in1", "in2", "in3", "out"]
    sheet.rename_block("M", "Mixer A")
    assert scene.block_item("Mixer A").block is mixer
    sheet.move_block("Mixer A", (40, 60))
    assert (scene.block_item("Mixer A").pos().x(), scene.block_item("Mixer A").pos().y()) == (
        40,
        60,
    )
    sheet.rename_stream("S1", "Fresh feed")
    assert scene.stream_item("Fresh feed").stream.name == "Fresh feed"
    sheet.remove_block("Mixer A")
    assert scene.block_item("Mixer A") is None
    assert not [i for i in scene.items() if isinstance(i, StreamItem)]
    qtbot.waitUntil(lambda: scene.block_item("F").badge == "needs input")


def test_shelf_drop_adds_a_block_where_it_is_dropped(diagram, drop):
    from gui.diagram.shelf import BlockShelf, kind_from_mime

    shelf = BlockShelf()
    item = shelf.findItems("Reactor", Qt.MatchFlag.MatchExactly)[0]
    assert kind_from_mime(shelf.mimeData([item])) == "Reactor"
    drop(diagram.view, "Reactor", QPointF(120, 80))
    block = diagram.flowsheet.block("Reactor 1")
    assert block.position == pytest.approx((120, 80), abs=1.0)
    assert diagram.scene.selected_block_names() == ["Reactor 1"]
    diagram.stack.undo()
    assert not diagram.flowsheet.blocks


def test_dragging_from_outlet_to_inlet_draws_a_stream(diagram):
    diagram.editor.add_block("Feed", -200, 0)
    diagram.editor.add_block("Heater", 100, 40)
    diagram.mouse.connect(diagram.scene, "Feed 1", "out", "Heater 1", "in")
    (stream,) = diagram.flowsheet.streams.values()
    assert (stream.source, stream.source_port, stream.target, stream.target_port) == (
        "Feed 1",
        "out",
        "Heater 1",
        "in",
    )
    # the same gesture backwards (inlet to outlet) is refused: that inlet is taken
    diagram.editor.add_block("Feed", -200, 200)
    diagram.mouse.drag(
        port_position(diagram, "Heater 1", "in", "in"),
        port_position(diagram, "Feed 2", "out", "out"),
    )
    assert len(diagram.flowsheet.streams) == 1
    assert "already enters it" in diagram.messages[-1]
    assert diagram.stack.count() == 4  # the refused gesture pushed nothing
    diagram.stack.undo()
    diagram.stack.undo()
    assert len(diagram.flowsheet.blocks) == 2 and not diagram.flowsheet.streams


def test_dropping_a_port_drag_on_a_block_uses_its_first_free_inlet(diagram):
    diagram.editor.add_block("Feed", -250, 0)
    diagram.editor.add_block("Mixer", 100, 0)
    diagram.mouse.drag(port_position(diagram, "Feed 1", "out", "out"), QPointF(120, 5))
    assert diagram.flowsheet.stream_into("Mixer 1", "in1") is not None


def test_dangling_outlet_finishes_with_a_product_in_one_undo_step(diagram):
    diagram.editor.add_block("Heater", 0, 0)
    diagram.mouse.drag(port_position(diagram, "Heater 1", "out", "out"), QPointF(220, 30))
    product = diagram.flowsheet.block("Product 1")
    assert diagram.flowsheet.stream_into("Product 1", "in").source == "Heater 1"
    assert product.position[0] > 220  # its inlet lands where the drag ended
    diagram.mouse.drag(port_position(diagram, "Heater 1", "in", "in"), QPointF(-260, 10))
    assert diagram.flowsheet.stream_out_of("Feed 1", "out").target == "Heater 1"
    assert diagram.stack.count() == 3
    diagram.stack.undo()
    diagram.stack.undo()
    assert list(diagram.flowsheet.blocks) == ["Heater 1"] and not diagram.flowsheet.streams


def test_moving_blocks_with_the_mouse_is_one_undo_step(diagram):
    diagram.editor.add_block("Feed", -200, 0)
    diagram.editor.add_block("Product", 200, 0)
    diagram.mouse.connect(diagram.scene, "Feed 1", "out", "Product 1", "in")
    diagram.scene.clearSelection()
    diagram.mouse.drag(QPointF(-190, 5), QPointF(-140, 105))
    assert diagram.flowsheet.block("Feed 1").position == pytest.approx((-150, 100), abs=1.0)
    route = diagram.scene.stream_item("S1")
    assert route.boundingRect().contains(
        route.mapFromScene(port_position(diagram, "Feed 1", "out", "out"))
    )
    assert diagram.stack.undoText() == "Move Feed 1"
    diagram.stack.undo()
    assert diagram.flowsheet.block("Feed 1").position == (-200, 0)
    assert diagram.scene.block_item("Feed 1").pos() == QPointF(-200, 0)


def test_rename_by_double_click_and_refused_name_keeps_the_old_one(diagram, monkeypatch):
    from PySide6.QtWidgets import QInputDialog, QMessageBox

    diagram.editor.add_block("Heater", 0, 0)
    diagram.editor.add_block("Heater", 0, 200)
    answers = iter([("Cooler", True), ("Cooler", True)])
    monkeypatch.setattr(QInputDialog, "getText", lambda *args, **kw: next(answers))
    warnings = []
    monkeypatch.setattr(QMessageBox, "warning", lambda *args: warnings.append(args[2]))
    diagram.mouse.double_click(QPointF(10, 5))
    assert "Cooler" in diagram.flowsheet.blocks
    diagram.scene.select_only(["Heater 2"])
    assert diagram.editor.rename_selected() is False
    assert "Heater 2" in diagram.flowsheet.blocks  # refused: the name is taken
    assert "Cooler" in warnings[0] and "not already used" in warnings[0]
    assert diagram.stack.count() == 3


def test_delete_removes_a_block_with_its_streams_in_one_undo_step(diagram):
    editor, sheet = diagram.editor, diagram.flowsheet
    for kind, x in (("Feed", -300), ("Heater", 0), ("Product", 300)):
        editor.add_block(kind, x, 0)
    editor.connect_ports("Feed 1", "out", "Heater 1", "in")
    editor.connect_ports("Heater 1", "out", "Product 1", "in")
    heater = sheet.block("Heater 1")
    diagram.scene.select_only(["Heater 1"])
    diagram.editor.delete_selection()
    assert "Heater 1" not in sheet.blocks and not sheet.streams
    diagram.stack.undo()
    assert sheet.block("Heater 1") is heater
    assert sorted(sheet.streams) == ["S1", "S2"]
    assert diagram.scene.stream_item("S2") is not None


def test_copy_paste_gives_new_names_and_keeps_inner_streams(diagram):
    editor, sheet = diagram.editor, diagram.flowsheet
    editor.add_block("Mixer", 0, 0)
    editor.add_block("Splitter", 250, 0)
    editor.add_block("Product", 500, 0)
    editor.connect_ports("Mixer 1", "out", "Splitter 1", "in")
    editor.connect_ports("Splitter 1", "out1", "Product 1", "in")
    editor.connect_ports("Splitter 1", "out2", "Mixer 1", "in1")
    sheet.set_spec("Splitter 1", "fractions", {"out1": 0.1})
    diagram.scene.select_only(["Mixer 1", "Splitter 1"])
    assert editor.copy_selection() == 2
    pasted = editor.paste()
    assert sorted(pasted) == ["Mixer 2", "Splitter 2"]
    copies = {
        (s.source, s.source_port, s.target, s.target_port)
        for s in sheet.streams.values()
        if s.source in pasted
    }
    assert copies == {
        ("Mixer 2", "out", "Splitter 2", "in"),
        ("Splitter 2", "out2", "Mixer 2", "in1"),
    }
    assert sheet.block("Splitter 2").specs["fractions"] == {"out1": 0.1}
    assert sheet.block("Splitter 2").position == (290, 40)
    diagram.stack.undo()
    assert sorted(sheet.blocks) == ["Mixer 1", "Product 1", "Splitter 1"]
    assert len(sheet.streams) == 3


def test_wheel_zoom_pan_rubber_band_and_fit(diagram):
    view, editor = diagram.view, diagram.editor
    for index in range(6):
        editor.add_block("Heater", index * 300, (index % 2) * 200)
    before = view.zoom()
    wheel_at = QPoint(500, 350)
    QTest.mouseMove(view.viewport(), wheel_at)
    from PySide6.QtGui import QWheelEvent

    event = QWheelEvent(
        QPointF(wheel_at),
        QPointF(view.viewport().mapToGlobal(wheel_at)),
        QPoint(),
        QPoint(0, 240),
        Qt.MouseButton.NoButton,
        Qt.KeyboardModifier.NoModifier,
        Qt.ScrollPhase.NoScrollPhase,
        False,
    )
    QTest.qWait(1)
    from PySide6.QtCore import QCoreApplication

    QCoreApplication.sendEvent(view.viewport(), event)
    assert view.zoom() == pytest.approx(before * 1.15**2)
    centre_before = view.mapToScene(view.viewport().rect().center())
    diagram.mouse.drag(
        QPointF(centre_before),
        QPointF(centre_before) + QPointF(-100, -60),
        button=Qt.MouseButton.MiddleButton,
    )
    moved = view.mapToScene(view.viewport().rect().center()) - centre_before
    assert moved.x() == pytest.approx(100, abs=3) and moved.y() == pytest.approx(60, abs=3)
    view.fit_to_view()
    visible = view.mapToScene(view.viewport().rect()).boundingRect()
    for item in diagram.scene.block_items():
        assert visible.contains(item.scene_body_rect())
    diagram.scene.clearSelection()
    diagram.mouse.drag(QPointF(-150, -120), QPointF(470, 260))  # rubber band
    assert sorted(diagram.scene.selected_block_names()) == ["Heater 1", "Heater 2"]


def test_editing_is_refused_while_disabled(diagram, drop):
    diagram.editor.add_block("Feed", 0, 0)
    diagram.editor.set_enabled(False)
    drop(diagram.view, "Heater", QPointF(200, 0))
    diagram.mouse.drag(port_position(diagram, "Feed 1", "out", "out"), QPointF(300, 0))
    diagram.mouse.drag(QPointF(5, 5), QPointF(100, 100))
    assert list(diagram.flowsheet.blocks) == ["Feed 1"]
    assert diagram.flowsheet.block("Feed 1").position == (0, 0)
    assert all(isinstance(i, BlockItem) for i in diagram.scene.block_items())


def test_solution_marks_tears_badges_and_hover_text(diagram, example_path):
    from model.case.file import load_case
    from units_of_measure import format_quantity

    case = load_case(example_path("shift_feed_effluent_exchanger"))
    scene = diagram.scene
    scene.set_flowsheet(case.flowsheet)
    solution = case.solve()
    scene.set_unit_system("Metric")
    scene.set_results(solution, current=True)
    tears = {i.stream.name for i in scene.items() if isinstance(i, StreamItem) and i.is_tear}
    assert tears == set(solution.tear_streams) and tears
    assert {i.badge for i in scene.block_items()} == {"solved"}
    tear = solution.tear_streams[0]
    state = solution.streams[tear]
    text = scene.stream_item(tear).toolTip()
    assert format_quantity(state.T, "temperature", "degC") in text
    assert format_quantity(state.total_molar_flow(), "molar_flow", "kmol/h") in text
    heater = next(n for n, r in solution.blocks.items() if r.duty_W is not None)
    assert (
        format_quantity(solution.blocks[heater].duty_W, "power", "kW")
        in scene.block_item(heater).toolTip()
    )
    scene.set_results(solution, current=False)  # an edit since: badges say so
    assert {i.badge for i in scene.block_items()} == {"not solved"}
    assert "changed since" in scene.stream_item(tear).toolTip()


def test_paste_keeps_numbered_ports_and_the_specs_that_name_them(diagram):
    editor, sheet = diagram.editor, diagram.flowsheet
    editor.add_block("Splitter", 0, 0)
    for index in range(3):
        editor.add_block("Product", 300, index * 120)
        editor.connect_ports("Splitter 1", f"out{index + 1}", f"Product {index + 1}", "in")
    sheet.set_spec("Splitter 1", "fractions", {"out3": 0.3, "out1": 0.5})
    diagram.scene.select_only(["Splitter 1", "Product 3"])  # only the out3 stream is inside
    editor.copy_selection()
    editor.paste()
    (copied,) = [s for s in sheet.streams.values() if s.source == "Splitter 2"]
    assert (copied.source_port, copied.target) == ("out3", "Product 4")
    assert sheet.block("Splitter 2").specs["fractions"] == {"out3": 0.3, "out1": 0.5}
    assert [p.port for p in diagram.scene.block_item("Splitter 2").ports()] == [
        "in",
        "out1",
        "out2",
        "out3",
    ]
