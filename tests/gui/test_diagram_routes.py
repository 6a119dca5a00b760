"""Stream lines on the diagram: around blocks, re-routed on moves, bend points, layout.

The geometric check: no segment of any stream's line passes through the interior of
any block's drawn rectangle (a line touches its own two blocks only where its ports sit
on their edges). The bends per stream are printed (``pytest -s``) for the record.
"""

from __future__ import annotations

import json
from itertools import pairwise

import pytest
from PySide6.QtCore import QPointF
from PySide6.QtGui import QUndoStack

from gui.diagram.editor import DiagramEditor, lay_out_if_unplaced
from gui.diagram.routing import bend_count, segment_crosses
from gui.diagram.scene import DiagramScene
from gui.diagram.view import DiagramView
from model.case.file import case_to_json, load_case
from tests.benchmarks.flowsheet_generator import generate_flowsheet
from tests.gui.conftest import EXAMPLES

EXAMPLE_FILES = sorted(EXAMPLES.glob("*.loop.json"))


def show(qtbot, flowsheet):
    scene = DiagramScene()
    view = DiagramView(scene)
    stack = QUndoStack()
    editor = DiagramEditor(scene, view, stack, lambda: flowsheet, view)
    scene.set_flowsheet(flowsheet)
    qtbot.addWidget(view)
    view.resize(1200, 700)
    return scene, view, stack, editor


def block_crossings(scene, flowsheet) -> list[tuple[str, str]]:
    """(stream, block) pairs where the stream's line passes through the block."""
    rects = {}
    for name in flowsheet.blocks:
        body = scene.block_item(name).scene_body_rect()
        rects[name] = (body.left(), body.top(), body.right(), body.bottom())
    found = []
    for stream in flowsheet.streams.values():
        route = scene.stream_item(stream.name).route()
        for block, rect in rects.items():
            if any(segment_crosses(a, b, rect) for a, b in pairwise(route)):
                found.append((stream.name, block))
    return found


def bends_per_stream(scene, flowsheet) -> dict[str, int]:
    return {s: bend_count(scene.stream_item(s).route()) for s in flowsheet.streams}


@pytest.mark.parametrize("path", EXAMPLE_FILES, ids=lambda p: p.name.split(".")[0])
def test_no_line_of_an_example_passes_through_a_block(qtbot, path):
    flowsheet = load_case(path).flowsheet
    scene, *_ = show(qtbot, flowsheet)
    assert block_crossings(scene, flowsheet) == []
    bends = bends_per_stream(scene, flowsheet)
    print(f"\n{path.name}: bends per stream {bends}")
    assert max(bends.values()) <= 4  # a few bends: around one block at most


def test_no_line_of_a_laid_out_50_block_case_passes_through_a_block(qtbot):
    flowsheet = generate_flowsheet(blocks=50, loops=10, components=2)
    assert lay_out_if_unplaced(flowsheet)  # the generator places every block at (0, 0)
    scene, *_ = show(qtbot, flowsheet)
    assert block_crossings(scene, flowsheet) == []
    bends = bends_per_stream(scene, flowsheet)
    print(f"\n50-block case: bends per stream {sorted(bends.values())}")
    assert max(bends.values()) <= 4
    recycles = [f"recycle {n}" for n in range(1, 11)]
    for name in recycles:  # each recycle returns below its loop
        route = scene.stream_item(name).route()
        assert max(y for _, y in route) > scene.block_item("M1").scene_body_rect().bottom()


def test_a_block_dropped_on_a_line_pushes_it_around_when_the_move_ends(qtbot):
    flowsheet = load_case(EXAMPLES / "ammonia_synthesis_loop.loop.json").flowsheet
    scene, _view, stack, editor = show(qtbot, flowsheet)
    feed = scene.block_item("Make-up gas")
    route = scene.stream_item("Converter feed").route()
    (x0, y0), (x1, _) = route[0], route[1]
    middle = ((x0 + x1) / 2, y0 + 80.0)  # just below the line between mixer and converter
    editor.move_blocks({"Make-up gas": (flowsheet.block("Make-up gas").position, middle)})
    assert feed.pos() == QPointF(*middle)
    assert block_crossings(scene, flowsheet) == []
    stack.undo()
    assert block_crossings(scene, flowsheet) == []


def test_a_double_click_on_a_line_adds_a_bend_point_saved_with_the_case(qtbot, tmp_path, mouse):
    path = EXAMPLES / "shift_feed_effluent_exchanger.loop.json"
    case = load_case(path)
    flowsheet = case.flowsheet
    scene, view, stack, _editor = show(qtbot, flowsheet)
    view.show()
    qtbot.waitExposed(view)
    name = "Bypass"
    item = scene.stream_item(name)
    view.centerOn(item.midpoint())
    route = item.route()
    longest = max(pairwise(route), key=lambda ab: abs(ab[1][0] - ab[0][0]))
    at = QPointF(longest[0][0] + 30.0 * (1 if longest[1][0] > longest[0][0] else -1), longest[0][1])
    mouse(view).click(at)
    mouse(view).double_click(at)
    assert len(flowsheet.stream(name).bends) == 1
    bend = flowsheet.stream(name).bends[0]
    assert abs(bend[0] - at.x()) <= 1 and abs(bend[1] - at.y()) <= 1
    # The bend point is written as an optional list of points and read back.
    saved = json.loads(case_to_json(case))
    assert next(s for s in saved["streams"] if s["name"] == name)["bends"] == [list(bend)]
    copy = tmp_path / "bent.loop.json"
    copy.write_text(case_to_json(case), encoding="utf-8")
    assert load_case(copy).flowsheet.stream(name).bends == (bend,)
    stack.undo()
    assert flowsheet.stream(name).bends == ()
    assert "bends" not in next(
        s for s in json.loads(case_to_json(case))["streams"] if s["name"] == name
    )


def test_dragging_a_bend_point_moves_it_and_the_line_follows(qtbot, mouse):
    flowsheet = load_case(EXAMPLES / "shift_feed_effluent_exchanger.loop.json").flowsheet
    scene, view, stack, editor = show(qtbot, flowsheet)
    view.show()
    qtbot.waitExposed(view)
    route = scene.stream_item("Bypass").route()
    start = QPointF(*route[len(route) // 2])
    editor.set_bends("Bypass", [(start.x(), start.y())])
    scene.select_only(streams=["Bypass"])
    view.centerOn(start)
    target = QPointF(start.x(), start.y() + 60.0)
    mouse(view).drag(start, target)
    moved = flowsheet.stream("Bypass").bends[0]
    assert abs(moved[1] - target.y()) <= 10  # snapped to half the grid
    assert block_crossings(scene, flowsheet) == []
    assert any(
        min(a[1], b[1]) <= moved[1] <= max(a[1], b[1]) and min(a[0], b[0]) <= moved[0]
        for a, b in pairwise(scene.stream_item("Bypass").route())
    )
    stack.undo()
    assert flowsheet.stream("Bypass").bends == ((start.x(), start.y()),)


def test_lay_out_places_every_block_anew_in_one_undo_step(qtbot):
    flowsheet = load_case(EXAMPLES / "ethylene_hydration_two_recycles.loop.json").flowsheet
    scene, _view, stack, editor = show(qtbot, flowsheet)
    before = {name: block.position for name, block in flowsheet.blocks.items()}
    assert editor.lay_out()
    after = {name: block.position for name, block in flowsheet.blocks.items()}
    assert after != before and len(set(after.values())) == len(after)
    assert after["Ethylene feed"][0] < after["Reactor mixer"][0] < after["Flash drum"][0]
    assert block_crossings(scene, flowsheet) == []
    stack.undo()
    assert {name: block.position for name, block in flowsheet.blocks.items()} == before


def test_a_case_written_without_positions_opens_laid_out(qtbot, window, tmp_path):
    data = json.loads((EXAMPLES / "ammonia_synthesis_loop.loop.json").read_text("utf-8"))
    for block in data["blocks"]:
        block.pop("position", None)
    data.pop("results", None)
    path = tmp_path / "scripted.loop.json"
    path.write_text(json.dumps(data), encoding="utf-8")
    assert window.files.open_path(str(path))
    flowsheet = window.case.flowsheet
    positions = [block.position for block in flowsheet.blocks.values()]
    assert len(set(positions)) == len(positions)
    assert block_crossings(window.scene, flowsheet) == []
    assert not window.files.is_modified()  # laid out as it opened, not an edit
    window.actions["lay_out"].trigger()
    assert window.undo_stack.count() in (0, 1)  # the same layout again is no edit


def _save_diagram(qtbot, flowsheet, path, size, zoom=None):
    scene, view, *_ = show(qtbot, flowsheet)
    view.resize(*size)
    view.show()
    qtbot.waitExposed(view)
    scene.refresh_states()
    view.fit_to_view()
    if zoom is not None:  # natural size, from the left end
        view.reset_zoom()
        left = scene.itemsBoundingRect().left()
        view.centerOn(QPointF(left + size[0] / 2 - 40, 40))
    qtbot.wait(20)
    assert view.grab().save(str(path))
    assert path.stat().st_size > 10_000  # a real picture
    return scene


def test_diagram_screenshots_of_the_examples_and_a_laid_out_case(qtbot, screenshot_dir):
    for path in EXAMPLE_FILES:
        name = path.name.split(".")[0]
        flowsheet = load_case(path).flowsheet
        _save_diagram(qtbot, flowsheet, screenshot_dir / f"diagram_{name}.png", (1400, 720))
    small = generate_flowsheet(blocks=14, loops=3, components=2)
    assert lay_out_if_unplaced(small)
    _save_diagram(qtbot, small, screenshot_dir / "diagram_generated_14_blocks.png", (2000, 420))
    large = generate_flowsheet(blocks=50, loops=10, components=2)
    assert lay_out_if_unplaced(large)
    scene = _save_diagram(
        qtbot, large, screenshot_dir / "diagram_generated_50_blocks_start.png", (1800, 420), 1.0
    )
    assert block_crossings(scene, large) == []


def test_the_command_line_report_of_a_case_without_positions_is_laid_out(qtbot, tmp_path):
    from gui.report import report_for_command_line

    data = json.loads((EXAMPLES / "ammonia_synthesis_loop.loop.json").read_text("utf-8"))
    for block in data["blocks"]:
        block.pop("position", None)
    path = tmp_path / "scripted.loop.json"
    path.write_text(json.dumps(data), encoding="utf-8")
    case = load_case(path)
    case.solve()  # as ``loopwright export`` does before it writes
    assert case.solution is not None and case.solution.converged
    pdf = report_for_command_line(case, str(path))
    assert pdf.startswith(b"%PDF-")
    positions = [block.position for block in case.flowsheet.blocks.values()]
    assert len(set(positions)) == len(positions)


def test_a_double_click_on_a_streams_label_still_asks_for_its_new_name(qtbot, mouse):
    flowsheet = load_case(EXAMPLES / "ammonia_synthesis_loop.loop.json").flowsheet
    scene, view, _stack, _editor = show(qtbot, flowsheet)
    view.show()
    qtbot.waitExposed(view)
    item = scene.stream_item("Recycle gas")
    label = item.shape().boundingRect()
    at = QPointF(item.midpoint().x(), item.midpoint().y() - 8)  # on the words, above the line
    assert item.label_contains(at) and label.contains(at)
    view.centerOn(at)
    scene.rename_requested.disconnect()  # no dialog: the request is what is checked
    with qtbot.waitSignal(scene.rename_requested) as asked:
        mouse(view).double_click(at)
    assert asked.args == ["stream", "Recycle gas"]
    assert flowsheet.stream("Recycle gas").bends == ()
