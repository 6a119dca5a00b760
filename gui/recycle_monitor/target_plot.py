"""The recycle monitor's third plot: each target's scaled residual per outer iteration.

Each outer iteration of the targets loop (one recycle solve at adjusted values) adds one
point per target: ``|measured - wanted| / scale`` on a log axis, with the target
tolerance drawn. Curves are created once per target and updated with ``setData``. The
plot is shown only while it has a target's points: a case without targets keeps the
room for the tear plots.
"""

from __future__ import annotations

import math

import pyqtgraph as pg
from PySide6.QtCore import Qt

from .plots import LIMIT_COLOUR, RESIDUAL_FLOOR, TEAR_COLOURS, _label_options, _styled_plot


class TargetPlot:
    """One curve per target label; x is the outer iteration."""

    def __init__(self) -> None:
        self.plot = _styled_plot("Target residual per outer iteration", "|scaled residual|")
        item = self.plot.getPlotItem()
        item.setLogMode(x=False, y=True)
        item.setLabel("bottom", "outer iteration")
        dashed = pg.mkPen(LIMIT_COLOUR, width=1.5, style=Qt.PenStyle.DashLine)
        self.tolerance_line = pg.InfiniteLine(
            angle=0, pen=dashed, label="target tolerance", labelOpts=_label_options()
        )
        self.plot.addItem(self.tolerance_line)
        self.set_tolerance(1e-7)
        self.curves: dict[str, pg.PlotDataItem] = {}
        self.data: dict[str, tuple[list[int], list[float]]] = {}
        self.plot.setVisible(False)

    def set_tolerance(self, tolerance: float) -> None:
        self.tolerance_line.setValue(math.log10(tolerance))
        self.tolerance_line.label.setFormat(f"target tolerance {tolerance:g}")

    def clear(self) -> None:
        for curve in self.curves.values():
            self.plot.removeItem(curve)
        self.curves.clear()
        self.data.clear()
        self.plot.setVisible(False)

    def append(self, record) -> None:
        """Take one ``TargetIterationRecord``."""
        for label, residual in record.residuals.items():
            if label not in self.curves:
                colour = TEAR_COLOURS[len(self.curves) % len(TEAR_COLOURS)]
                self.curves[label] = self.plot.plot(
                    pen=pg.mkPen(colour, width=2),
                    symbol="o",
                    symbolSize=5,
                    symbolBrush=colour,
                    name=label,
                )
                self.data[label] = ([], [])
            iterations, values = self.data[label]
            iterations.append(record.iteration)
            value = abs(residual) if math.isfinite(residual) else math.nan
            values.append(max(value, RESIDUAL_FLOOR))
            self.curves[label].setData(iterations, values)
        self.plot.setVisible(bool(self.curves))
