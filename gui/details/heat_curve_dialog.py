"""An exchanger's heat curve: both sides' temperatures against the heat passed.

Drawn from the block result's ``profile`` (:mod:`model.blocks.exchanger_zones`): the
hot side from its inlet (left) to its outlet (right), the cold side counter-current
under it, each cut marked, and the smallest difference (the pinch) marked with its
value. A phase change shows as a bend (a condensing pure vapor as a flat stretch).
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QDialog, QLabel, QVBoxLayout, QWidget

from gui.recycle_monitor.plots import AXIS_COLOUR, TEAR_COLOURS, _styled_plot
from units_of_measure import UNIT_SYSTEMS, format_quantity, from_internal_array

HOT_COLOUR, COLD_COLOUR = TEAR_COLOURS[1], TEAR_COLOURS[0]


def pinch_text(profile: dict[str, list[float]], unit_system: str) -> str:
    """Where the two curves come closest, in the unit system's units."""
    system = UNIT_SYSTEMS[unit_system]
    difference = np.asarray(profile["hot T"]) - np.asarray(profile["cold T"])
    index = int(np.argmin(difference))
    smallest = float(difference[index])
    unit = system.unit_for("temperature_difference")
    approach = format_quantity(abs(smallest), "temperature_difference", unit)
    where = format_quantity(profile["heat passed"][index], "power", system.unit_for("power"))
    if smallest < 0.0:
        return (
            f"internal temperature cross: the cold side is {approach} above the hot side "
            f"{where} from the hot inlet end"
        )
    return f"smallest difference {approach}, {where} from the hot inlet end"


class HeatCurveDialog(QDialog):
    """The heat curve of exchanger ``block_name`` in ``unit_system``."""

    def __init__(
        self,
        block_name: str,
        profile: dict[str, list[float]],
        unit_system: str,
        parent: QWidget | None = None,
    ) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"Heat curve · {block_name}")
        system = UNIT_SYSTEMS[unit_system]
        power, temperature = system.unit_for("power"), system.unit_for("temperature")
        heat = from_internal_array(profile["heat passed"], "power", power)
        self.plot = _styled_plot(block_name, f"temperature [{temperature}]")
        item = self.plot.getPlotItem()
        item.setLabel("bottom", f"heat passed from the hot inlet end [{power}]", color=AXIS_COLOUR)
        self.curves = {}
        for side, colour in (("hot", HOT_COLOUR), ("cold", COLD_COLOUR)):
            T = from_internal_array(profile[f"{side} T"], "temperature", temperature)
            self.curves[side] = item.plot(
                heat,
                T,
                pen=pg.mkPen(colour, width=2),
                symbol="o",
                symbolSize=4,
                symbolBrush=colour,
                symbolPen=None,
                name=f"{side} side",
            )
        difference = np.asarray(profile["hot T"]) - np.asarray(profile["cold T"])
        pinch = float(heat[int(np.argmin(difference))])
        item.addItem(
            pg.InfiniteLine(pinch, angle=90, pen=pg.mkPen(AXIS_COLOUR, style=Qt.PenStyle.DashLine))
        )
        self.pinch_label = QLabel(pinch_text(profile, unit_system))
        note = QLabel(
            "Counter-current: the cold side enters at the right and leaves at the left. "
            "Where the cold curve rises above the hot one, the exchanger as specified "
            "cannot be built."
        )
        note.setWordWrap(True)
        layout = QVBoxLayout(self)
        layout.addWidget(self.plot)
        layout.addWidget(self.pinch_label)
        layout.addWidget(note)
        self.resize(640, 460)
