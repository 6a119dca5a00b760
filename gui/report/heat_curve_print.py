"""An exchanger's heat curve drawn for the printed report (QPainter, no plot library).

Both sides' temperatures against the heat passed from the hot inlet end, in the case's
units, with axes, ticks, a legend and the pinch (the smallest difference) marked; the
same curve as the details pane's Heat Curve… window, drawn with lines and text so that
the PDF stays vector.
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QPainter, QPen, QPolygonF

from gui.diagram import look
from units_of_measure import UNIT_SYSTEMS, format_quantity, from_internal_array

HOT, COLD, INK, GRID = QColor("#d55e00"), QColor("#0072b2"), QColor("#333333"), QColor("#dddddd")
#: Room around the plot inside its box, page units (1/96 inch): tick labels, legend.
LEFT, RIGHT, TOP, BOTTOM = 56.0, 150.0, 12.0, 38.0


def nice_ticks(low: float, high: float, count: int = 8) -> list[float]:
    """Round tick values covering [low, high]: steps of 1, 2 or 5 times a power of ten."""
    span = high - low if high > low else abs(high) or 1.0
    raw = span / count
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1.0, 2.0, 5.0, 10.0) if m * power >= raw)
    first, last = math.floor(low / step), math.ceil(high / step)
    return [round(k * step, 12) for k in range(first, max(last, first + 1) + 1)]


def paint_heat_curve(
    painter: QPainter, box: QRectF, profile: dict[str, list[float]], unit_system: str
) -> None:
    """Draw a heat curve (axes, both sides, the pinch, a legend) inside ``box``."""
    system = UNIT_SYSTEMS[unit_system]
    power, temperature = system.unit_for("power"), system.unit_for("temperature")
    heat = from_internal_array(profile["heat passed"], "power", power)
    sides = {
        side: from_internal_array(profile[f"{side} T"], "temperature", temperature)
        for side in ("hot", "cold")
    }
    painter.save()
    painter.setRenderHint(QPainter.RenderHint.Antialiasing)
    painter.setFont(look.font(7.5))
    plot = box.adjusted(LEFT, TOP, -RIGHT, -BOTTOM)
    x_ticks = nice_ticks(0.0, float(heat[-1]))
    all_T = np.concatenate(list(sides.values()))
    y_ticks = nice_ticks(float(all_T.min()), float(all_T.max()))
    x_range, y_range = (x_ticks[0], x_ticks[-1]), (y_ticks[0], y_ticks[-1])

    def at(x: float, y: float) -> QPointF:
        fx = (x - x_range[0]) / ((x_range[1] - x_range[0]) or 1.0)
        fy = (y - y_range[0]) / ((y_range[1] - y_range[0]) or 1.0)
        return QPointF(plot.left() + fx * plot.width(), plot.bottom() - fy * plot.height())

    _axes(painter, box, plot, x_ticks, y_ticks, at)
    painter.setPen(QPen(INK))
    painter.drawText(
        QRectF(plot.left(), plot.bottom() + 16, plot.width(), 16),
        Qt.AlignmentFlag.AlignCenter,
        f"heat passed from the hot inlet end [{power}]",
    )
    painter.save()
    painter.translate(box.left() + 12, plot.center().y())
    painter.rotate(-90)
    painter.drawText(QRectF(-80, -8, 160, 16), Qt.AlignmentFlag.AlignCenter, f"T [{temperature}]")
    painter.restore()
    difference = sides["hot"] - sides["cold"]
    pinch = int(np.argmin(difference))
    painter.setPen(QPen(INK, 0.8, Qt.PenStyle.DashLine))
    painter.drawLine(at(heat[pinch], y_range[0]), at(heat[pinch], y_range[1]))
    for side, colour in (("hot", HOT), ("cold", COLD)):
        painter.setPen(QPen(colour, 1.6))
        painter.drawPolyline(QPolygonF([at(x, y) for x, y in zip(heat, sides[side], strict=True)]))
    _legend(painter, plot, float(difference[pinch]), system)
    painter.restore()


def _axes(painter: QPainter, box: QRectF, plot: QRectF, x_ticks, y_ticks, at) -> None:
    for value in x_ticks:
        point = at(value, 0.0)
        painter.setPen(QPen(GRID, 0.6))
        painter.drawLine(QPointF(point.x(), plot.top()), QPointF(point.x(), plot.bottom()))
        painter.setPen(QPen(INK))
        painter.drawText(
            QRectF(point.x() - 30, plot.bottom() + 2, 60, 14),
            Qt.AlignmentFlag.AlignCenter,
            f"{value:g}",
        )
    for value in y_ticks:
        point = at(0.0, value)
        painter.setPen(QPen(GRID, 0.6))
        painter.drawLine(QPointF(plot.left(), point.y()), QPointF(plot.right(), point.y()))
        painter.setPen(QPen(INK))
        painter.drawText(
            QRectF(box.left(), point.y() - 7, LEFT - 4, 14),
            Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter,
            f"{value:g}",
        )
    painter.setPen(QPen(INK, 0.8))
    painter.drawRect(plot)


def _legend(painter: QPainter, plot: QRectF, smallest: float, system) -> None:
    left = plot.right() + 10
    for row, (label, colour) in enumerate((("hot side", HOT), ("cold side", COLD))):
        y = plot.top() + 8 + 16 * row
        painter.setPen(QPen(colour, 1.6))
        painter.drawLine(QPointF(left, y), QPointF(left + 18, y))
        painter.setPen(QPen(INK))
        painter.drawText(QPointF(left + 24, y + 4), label)
    unit = system.unit_for("temperature_difference")
    text = "smallest difference " + format_quantity(smallest, "temperature_difference", unit)
    if smallest < 0.0:
        text += " (an internal cross)"
    painter.drawText(
        QRectF(left, plot.top() + 44, RIGHT - 14, 80),
        Qt.TextFlag.TextWordWrap,
        f"{text}, at the dashed line",
    )
