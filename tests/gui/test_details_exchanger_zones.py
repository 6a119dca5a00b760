"""The details pane shows an exchanger's zone analysis: internal approach and cross."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

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
