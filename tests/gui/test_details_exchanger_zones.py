"""The details pane shows an exchanger's zone analysis: internal approach and cross."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from PySide6.QtGui import QUndoStack  # noqa: E402

from gui.details import DetailsPane  # noqa: E402
from model.solve.driver import solve_flowsheet  # noqa: E402
from tests.model.blocks.test_exchanger_zones import condenser_sheet  # noqa: E402


def _pane(qtbot, cold_flow: float):
    sheet = condenser_sheet(cold_flow)
    solution = solve_flowsheet(sheet)
    pane = DetailsPane(lambda: sheet, QUndoStack())
    qtbot.addWidget(pane)
    pane.resize(460, 900)
    pane.show()
    pane.set_solution(solution)
    return pane, pane.show_block("X")


def test_details_show_the_zone_figures_of_a_condenser(qtbot, screenshot_dir):
    pane, form = _pane(qtbot, 60.0)
    text = form.results_label.text()
    for name in ("UA", "LMTD", "end-temperature LMTD", "minimum internal approach"):
        assert name in text
    assert pane.grab().save(str(screenshot_dir / "details_exchanger_zones.png"))


def test_details_show_an_internal_cross(qtbot, screenshot_dir):
    pane, form = _pane(qtbot, 30.0)
    text = form.results_label.text()
    assert "internal temperature cross" in text and "minimum internal approach" in text
    assert pane.grab().save(str(screenshot_dir / "details_exchanger_cross.png"))


def test_heat_curve_button_opens_the_curve_of_both_sides(qtbot, screenshot_dir):
    pane, form = _pane(qtbot, 30.0)
    assert form.heat_curve_button.isVisibleTo(pane)
    form.heat_curve_button.click()
    dialog = form.heat_curve_dialog
    qtbot.addWidget(dialog)
    assert dialog.isVisible()
    hot_x, hot_y = dialog.curves["hot"].getData()
    cold_x, cold_y = dialog.curves["cold"].getData()
    assert len(hot_x) == len(cold_x) >= 21
    # Metric: kW and degC; the hot side enters at 420 K (146.85 degC) at heat passed 0
    assert hot_x[0] == 0.0 and hot_y[0] == pytest.approx(146.85)
    assert hot_y[-1] == pytest.approx(66.85) and cold_y[-1] == pytest.approx(26.85)
    assert hot_x[-1] == pytest.approx(225.896, rel=1e-5)  # the duty, kW
    assert (cold_y > hot_y).any()  # the internal cross shows
    # the pinch is at the steam's dew point, after its superheat (8.0 kW) is given up
    text = dialog.pinch_label.text()
    assert text.startswith("internal temperature cross: the cold side is 10.527 K above"), text
    assert dialog.grab().save(str(screenshot_dir / "heat_curve_cross.png"))


def test_no_heat_curve_button_for_other_blocks_or_before_a_solve(qtbot):
    sheet = condenser_sheet(60.0)
    pane = DetailsPane(lambda: sheet, QUndoStack())
    qtbot.addWidget(pane)
    form = pane.show_block("X")
    assert not form.heat_curve_button.isVisibleTo(pane)  # not solved yet
    pane.set_solution(solve_flowsheet(sheet))
    assert not pane.show_block("F1").heat_curve_button.isVisibleTo(pane)
