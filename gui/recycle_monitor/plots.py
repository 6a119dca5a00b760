"""The recycle monitor's two plots: scaled residual per tear (log axis) and q per tear.

Each tear's items are created once, on its first record, and then updated with
``setData``; the plots never call ``processEvents``. Vertical markers show where the
solver settings changed during the run.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtGui import QColor

#: One colour per tear, in order (colour-blind-safe palette, Okabe & Ito 2008).
TEAR_COLOURS = ("#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00", "#56b4e9", "#000000")
#: Residuals are drawn no lower than this (log axis; an exact zero has no logarithm).
RESIDUAL_FLOOR = 1e-17
AXIS_COLOUR = "#333333"
LIMIT_COLOUR = "#7a7a7a"
MARKER_COLOUR = "#8e44ad"


def _styled_plot(title: str, left: str) -> pg.PlotWidget:
    plot = pg.PlotWidget(background="w")
    item = plot.getPlotItem()
    item.setTitle(title, color=AXIS_COLOUR, size="10pt")
    item.setLabel("left", left, color=AXIS_COLOUR)
    item.setLabel("bottom", "iteration", color=AXIS_COLOUR)
    item.showGrid(x=True, y=True, alpha=0.15)
    # A long run has thousands of iterations: draw only what fits the view, thinned to
    # the peaks of each pixel column, so a redraw stays short while the solve goes on.
    item.setDownsampling(auto=True, mode="peak")
    item.setClipToView(True)
    for name in ("left", "bottom"):
        axis = item.getAxis(name)
        axis.setPen(pg.mkPen(AXIS_COLOUR))
        axis.setTextPen(pg.mkPen(AXIS_COLOUR))
        # no "(x0.001)" scale on the label: the ticks then read as the values do
        # (a log axis scaled so showed the tolerance 1e-8 at its "1e-5" tick)
        axis.enableAutoSIPrefix(False)
    item.addLegend(
        offset=(-10, 10), labelTextColor=AXIS_COLOUR, brush=pg.mkBrush(255, 255, 255, 200)
    )
    plot.setMenuEnabled(False)
    return plot


@dataclass
class TearSeries:
    """Data and plot items of one tear."""

    colour: str
    iterations: list[int] = field(default_factory=list)
    residuals: list[float] = field(default_factory=list)
    q_iterations: list[int] = field(default_factory=list)
    q_median: list[float] = field(default_factory=list)
    q_minimum: list[float] = field(default_factory=list)
    q_maximum: list[float] = field(default_factory=list)
    residual_curve: pg.PlotDataItem | None = None
    q_curve: pg.PlotDataItem | None = None
    q_low: pg.PlotDataItem | None = None
    q_high: pg.PlotDataItem | None = None
    q_band: pg.FillBetweenItem | None = None


Q_TITLE = "q per tear (median, min–max band)"
#: What the q plot shows, as its tooltip.
Q_TOOLTIP = (
    "Each accelerated step moves a variable to x + (1 − q)(g(x) − x). For a Wegstein step"
    " this is Wegstein's q, clipped to the q bounds; for a dominant-mode step of a tear"
    " with one moving variable it is the q that step amounts to, which the bounds do not"
    " limit. A coupled tear's dominant-mode step has no one q and leaves a gap."
)
#: The q plot's title after a run that took no Wegstein step (direct or quasi-Newton).
NO_Q_TITLE = "Wegstein q: none in this run"


class ConvergencePlots:
    """Residual and q plots of one run, tear by tear."""

    def __init__(self) -> None:
        self.residual_plot = _styled_plot("Largest scaled residual per tear", "residual")
        self.residual_plot.getPlotItem().setLogMode(x=False, y=True)
        self.q_plot = _styled_plot(Q_TITLE, "q")
        self.q_plot.setToolTip(Q_TOOLTIP)
        self.q_plot.setXLink(self.residual_plot)  # the same iterations under both
        self.series: dict[str, TearSeries] = {}
        dashed = pg.mkPen(LIMIT_COLOUR, width=1.5, style=Qt.PenStyle.DashLine)
        self.tolerance_line = pg.InfiniteLine(
            angle=0, pen=dashed, label="tolerance", labelOpts=_label_options()
        )
        # q_max's label left of the legend in the top right corner; both labels face
        # the middle of the view, so neither is cut off at the edge of the plot
        self.q_min_line = pg.InfiniteLine(
            angle=0, pen=dashed, label="q_min", labelOpts=_label_options()
        )
        self.q_max_line = pg.InfiniteLine(
            angle=0,
            pen=dashed,
            label="q_max",
            labelOpts=_label_options(position=0.6),
        )
        self.residual_plot.addItem(self.tolerance_line)
        self.q_plot.addItem(self.q_min_line)
        self.q_plot.addItem(self.q_max_line)
        self.markers: dict[int, tuple[pg.InfiniteLine, pg.InfiniteLine]] = {}

    # ---- limits -----------------------------------------------------------------
    def set_tolerance(self, tolerance: float) -> None:
        """Draw the tolerance (log axis: the line sits at log10 of it)."""
        self.tolerance_line.setValue(math.log10(tolerance))
        self.tolerance_line.label.setFormat(f"tolerance {tolerance:g}")

    def set_q_bounds(
        self, q_min: float, q_max: float, in_force: tuple[float, float] | None = None
    ) -> None:
        """Draw the settings' q bounds; ``in_force`` are the bounds the run last used
        (:func:`convergence.diagnosis.bounds_in_force`), named in a label where the run
        widened one (the lines stay at the settings' values: a widening is per variable,
        and a line at q = -87 would squash every tear's curve)."""
        low, high = in_force if in_force is not None else (q_min, q_max)
        self.q_min_line.setValue(q_min)
        self.q_max_line.setValue(q_max)
        self.q_min_line.label.setFormat(_bound_text("q_min", q_min, low))
        self.q_max_line.label.setFormat(_bound_text("q_max", q_max, high))

    # ---- data -------------------------------------------------------------------
    def clear(self) -> None:
        """Forget every tear and marker (a new run begins)."""
        for series in self.series.values():
            for item in (series.residual_curve,):
                self.residual_plot.removeItem(item)
            for item in (series.q_band, series.q_curve, series.q_low, series.q_high):
                self.q_plot.removeItem(item)
        self.series.clear()
        for residual_marker, q_marker in self.markers.values():
            self.residual_plot.removeItem(residual_marker)
            self.q_plot.removeItem(q_marker)
        self.markers.clear()

    def tear_series(self, tear: str) -> TearSeries:
        """The tear's series, creating its curves on first sight."""
        series = self.series.get(tear)
        if series is not None:
            return series
        colour = TEAR_COLOURS[len(self.series) % len(TEAR_COLOURS)]
        series = TearSeries(colour)
        pen = pg.mkPen(colour, width=2)
        series.residual_curve = self.residual_plot.plot(
            [], [], pen=pen, name=tear, symbol="o", symbolSize=4, symbolBrush=colour, symbolPen=None
        )
        series.q_curve = self.q_plot.plot(
            [], [], pen=pen, name=tear, symbol="o", symbolSize=4, symbolBrush=colour, symbolPen=None
        )
        band = QColor(colour)
        band.setAlpha(60)
        edge = pg.mkPen(band, width=1)
        series.q_low = pg.PlotDataItem([], [], pen=edge)
        series.q_high = pg.PlotDataItem([], [], pen=edge)
        series.q_band = pg.FillBetweenItem(series.q_low, series.q_high, brush=pg.mkBrush(band))
        series.q_band.setZValue(-10)
        self.q_plot.addItem(series.q_low)
        self.q_plot.addItem(series.q_high)
        self.q_plot.addItem(series.q_band)
        self.series[tear] = series
        return series

    def append(self, record) -> None:
        """Add one IterationRecord's numbers (drawn on the next :meth:`redraw`)."""
        for tear, residual in record.residuals.items():
            series = self.tear_series(tear)
            series.iterations.append(record.iteration)
            series.residuals.append(
                max(float(residual), RESIDUAL_FLOOR) if math.isfinite(residual) else math.nan
            )
            stats = record.q.get(tear) if record.q else None
            if stats is not None:
                series.q_iterations.append(record.iteration)
                series.q_median.append(stats.median)
                series.q_minimum.append(stats.minimum)
                series.q_maximum.append(stats.maximum)
            elif record.took_mode_step(tear):
                # a coupled tear's dominant-mode step has no one q: a gap in its curve
                series.q_iterations.append(record.iteration)
                series.q_median.append(math.nan)
                series.q_minimum.append(math.nan)
                series.q_maximum.append(math.nan)

    def redraw(self) -> None:
        """Push the collected numbers into the existing curves; the q plot's title says
        when a run has iterations but no q (its method takes no Wegstein step)."""
        iterated = any(series.iterations for series in self.series.values())
        no_q = iterated and not any(series.q_iterations for series in self.series.values())
        self.q_plot.getPlotItem().setTitle(
            NO_Q_TITLE if no_q else Q_TITLE, color=AXIS_COLOUR, size="10pt"
        )
        for series in self.series.values():
            x = np.asarray(series.iterations, dtype=float)
            _symbols_while_few(series, len(x))
            series.residual_curve.setData(
                x, np.asarray(series.residuals, dtype=float), connect="finite"
            )
            qx = np.asarray(series.q_iterations, dtype=float)
            series.q_curve.setData(qx, np.asarray(series.q_median, dtype=float), connect="finite")
            series.q_low.setData(qx, np.asarray(series.q_minimum, dtype=float), connect="finite")
            series.q_high.setData(qx, np.asarray(series.q_maximum, dtype=float), connect="finite")

    # ---- markers ----------------------------------------------------------------
    def add_marker(self, iteration: int, text: str) -> bool:
        """A vertical line on both plots where settings changed; False if one is there."""
        if iteration in self.markers:
            return False
        pen = pg.mkPen(MARKER_COLOUR, width=1.5, style=Qt.PenStyle.DotLine)
        label = text.split(" for ", 1)[0]  # "q_min -5 -> -87"; the reason is in the tooltip
        lines = []
        # near the bottom of the residual plot (a converged run's tolerance line is
        # higher), a quarter up the q plot (clear of the q_min label at its bottom)
        for plot, height in ((self.residual_plot, 0.04), (self.q_plot, 0.25)):
            line = pg.InfiniteLine(
                pos=iteration,
                angle=90,
                pen=pen,
                label=label,
                labelOpts=_marker_label_options(height),
            )
            line.setToolTip(text)
            plot.addItem(line, ignoreBounds=True)
            lines.append(line)
        self.markers[iteration] = (lines[0], lines[1])
        return True


#: Above this many iterations a tear's curves are drawn as lines without point symbols:
#: thousands of symbols make each refresh slow enough to stall the window.
SYMBOL_LIMIT = 200


def _symbols_while_few(series: TearSeries, count: int) -> None:
    symbol = "o" if count <= SYMBOL_LIMIT else None
    for curve in (series.residual_curve, series.q_curve):
        if curve.opts.get("symbol") != symbol:
            curve.setSymbol(symbol)


def _label_options(position: float = 0.98) -> dict:
    """A limit line's label ending at ``position`` along it (0.98: the right end), on
    the side of the line facing the middle of the view (pyqtgraph picks one of the two
    anchors by that side): a bound at the top of the plot is labelled below its line."""
    return {
        "position": position,
        "color": LIMIT_COLOUR,
        "anchors": [(1.0, 0.0), (1.0, 1.0)],
        "fill": pg.mkBrush(255, 255, 255, 170),
        "movable": False,
    }


def _bound_text(name: str, setting: float, in_force: float) -> str:
    """``"q_min -5"``, or ``"q_min -5 (run: -87)"`` where the run widened it."""
    return f"{name} {setting:g}" + (f" (run: {in_force:g})" if in_force != setting else "")


def _marker_label_options(height: float) -> dict:
    """A settings marker's label at ``height`` up the line, on the side of the line
    facing the middle of the view (pyqtgraph picks one of the two anchors by that side),
    so a marker near the right edge is not cut off."""
    return {
        "position": height,
        "color": MARKER_COLOUR,
        "anchors": [(0.0, 1.0), (1.0, 1.0)],
        "fill": pg.mkBrush(255, 255, 255, 190),
        "movable": False,
    }
