"""The examples as a user first sees them: spaced blocks with readable names, the diagram
fitted to the view on opening, and the second opinion run from the Solve menu."""

from __future__ import annotations

import itertools

import pytest
from PySide6.QtGui import QFontMetricsF

from gui.diagram import look
from gui.diagram.block_item import _fonts, name_lines
from gui.diagram.view import FIT_MAX_ZOOM
from model.flowsheet.spec_values import TypedQuantity

pytestmark = pytest.mark.gui
EXAMPLES = (
    "ammonia_synthesis_loop",
    "shift_feed_effluent_exchanger",
    "ethylene_hydration_two_recycles",
)
NAME_WIDTH = look.BLOCK_WIDTH - 56  # the body less the glyph column and margins


def test_name_lines_wrap_on_two_lines_and_elide_only_what_cannot_fit(qapp):
    metrics = QFontMetricsF(_fonts()["name"])
    assert name_lines("Mixer", metrics, NAME_WIDTH) == ["Mixer"]
    lines = name_lines("Feed-effluent exchanger", metrics, NAME_WIDTH)
    assert lines == ["Feed-effluent", "exchanger"]
    assert name_lines("Ammonia separator", metrics, NAME_WIDTH) == ["Ammonia", "separator"]
    long_lines = name_lines("A very long block name that cannot fit in two", metrics, NAME_WIDTH)
    assert len(long_lines) == 2 and long_lines[1].endswith("…")
    assert all(metrics.horizontalAdvance(line) <= NAME_WIDTH for line in long_lines)


@pytest.mark.parametrize("name", EXAMPLES)
def test_example_blocks_are_spaced_and_their_names_readable(qtbot, window, example_path, name):
    assert window.files.open_path(str(example_path(name)))
    metrics = QFontMetricsF(_fonts()["name"])
    items = window.scene.block_items()
    for item in items:
        lines = name_lines(item.block.name, metrics, NAME_WIDTH)
        assert "".join(lines).replace(" ", "") == item.block.name.replace(" ", ""), lines
        assert not any("…" in line for line in lines)
    for first, second in itertools.combinations(items, 2):
        (x1, y1), (x2, y2) = first.block.position, second.block.position
        # about 256 x 200 apart: a block's width (156) leaves 100 for the stream's name
        assert abs(x1 - x2) >= 256 or abs(y1 - y2) >= 200, (first.block.name, second.block.name)
        grown = first.scene_body_rect().adjusted(-40, -40, 40, 40)
        assert not grown.intersects(second.scene_body_rect())


def _diagram_in_view(window):
    view = window.view
    shown = view.mapToScene(view.viewport().rect()).boundingRect()
    return shown, window.scene.itemsBoundingRect()


@pytest.mark.parametrize("name", EXAMPLES)
def test_opening_a_case_fits_the_diagram_to_the_view(qtbot, window, example_path, name):
    window.view.zoom_by(0.2)  # the user had zoomed far out on another case
    assert window.files.open_path(str(example_path(name)))
    qtbot.waitUntil(lambda: window.view.fitted, timeout=2000)
    qtbot.wait(20)
    shown, diagram = _diagram_in_view(window)
    assert shown.contains(diagram)
    assert window.view.zoom() <= FIT_MAX_ZOOM + 1e-9
    # fitted, not tiny in a corner: the diagram spans the view in one direction ...
    assert max(diagram.width() / shown.width(), diagram.height() / shown.height()) > 0.8
    # ... and sits in its middle
    assert abs(diagram.center().x() - shown.center().x()) < 0.05 * shown.width()
    assert abs(diagram.center().y() - shown.center().y()) < 0.05 * shown.height()
    # it stays fitted while the window settles its size, until the user zooms
    window.resize(window.width() - 200, window.height() - 100)
    qtbot.wait(20)
    shown, diagram = _diagram_in_view(window)
    assert shown.contains(diagram)
    window.view.zoom_by(1.25)
    assert not window.view.fitted


def test_a_small_diagram_and_a_new_case_are_shown_at_natural_size(qtbot, window):
    window.editor.add_block("Heater", 500.0, 300.0)
    window.view.fit_to_view()
    assert window.view.zoom() == pytest.approx(FIT_MAX_ZOOM)
    shown, diagram = _diagram_in_view(window)
    assert shown.contains(diagram) and shown.center().x() == pytest.approx(500, abs=2)
    window.files.mark_saved()
    assert window.files.new_case()
    qtbot.wait(20)
    assert window.view.zoom() == pytest.approx(1.0)
    assert window.view.mapToScene(window.view.viewport().rect().center()).x() == pytest.approx(
        0, abs=2
    )


def test_second_opinion_from_the_solve_menu_agrees_on_the_ammonia_loop(qtbot, window, example_path):
    action = window.actions["second_opinion"]
    assert action.text().replace("&", "") == "Second Opinion (all streams at once)"
    assert action in window.menuBar().actions()[3].menu().actions()  # the Solve menu
    assert window.files.open_path(str(example_path("ammonia_synthesis_loop")))
    assert not action.isEnabled()  # no solution to check yet
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.actions["solve"].trigger()
    assert action.isEnabled()
    with qtbot.waitSignal(window.checker.finished, timeout=60000):
        action.trigger()
        assert not action.isEnabled() and not window.actions["solve"].isEnabled()
        assert not window.editor.enabled  # the flowsheet is read in the worker thread
    opinion = window.last_second_opinion
    # the independent route (scipy.optimize.root on every stream) gives the same answer
    # within the agreement tolerance of 1e-8 (WALKTHROUGH.md step 7)
    assert opinion.converged and opinion.agrees
    assert opinion.largest_relative_difference <= 1e-8
    assert opinion.evaluations > 1
    last = window.log.entries()[-1]
    assert last[0] == "info" and "Second opinion agrees" in last[2]
    assert f"{opinion.evaluations} flowsheet evaluations" in last[2] and opinion.worst in last[2]
    assert "Second opinion agrees" in window.status.note_label.text()
    assert action.isEnabled() and window.editor.enabled
    window.editor.move_blocks({"Converter": ((512.0, 0.0), (512.0, 40.0))})
    assert action.isEnabled()  # moving a block changes no result
    window.details.show_block("Loop cooler").apply("T", TypedQuantity(-20.0, "degC"))
    assert not window.results_current and not action.isEnabled()  # results out of date
