"""Graphics item for a material stream: an orthogonal dark slate line with an arrowhead,
its number and name at the midpoint, and a teal double bar when it is a tear stream.

The route itself comes from :mod:`gui.diagram.routing` (the scene sets it); the user's
bend points on it are shown as small squares while the stream is selected."""

from __future__ import annotations

import math
from functools import cache

from PySide6.QtCore import QLineF, QPointF, QRectF, Qt
from PySide6.QtGui import (
    QBrush,
    QFont,
    QFontMetricsF,
    QPainter,
    QPainterPath,
    QPainterPathStroker,
    QPen,
    QPolygonF,
)
from PySide6.QtWidgets import QGraphicsItem, QStyleOptionGraphicsItem

from gui.diagram import look
from model.flowsheet.document import Stream
from model.report.stream_numbers import stream_label

BEND_HIT_RADIUS = 7.0


@cache
def _label_font() -> QFont:
    return look.font(8.0)


class StreamItem(QGraphicsItem):
    """A stream between two ports; the scene sets its route with :meth:`set_route`."""

    def __init__(self, stream: Stream) -> None:
        super().__init__()
        self.stream = stream
        self.is_tear = False
        self._points: list[QPointF] = []
        self._bends: list[QPointF] = []
        self._path = QPainterPath()
        self._shape = QPainterPath()
        self._label_rect = QRectF()
        self._shown_text = ""
        self._bounds = QRectF()
        self.setFlags(QGraphicsItem.GraphicsItemFlag.ItemIsSelectable)
        self.setAcceptHoverEvents(True)
        self.setZValue(0)

    def set_route(self, points: list[QPointF], bends: list[QPointF] = ()) -> None:
        """Draw the line through ``points``; ``bends`` are the user's bend points on it."""
        self.prepareGeometryChange()
        self._points = points
        self._bends = list(bends)
        self._path = QPainterPath(points[0])
        for point in points[1:]:
            self._path.lineTo(point)
        stroker = QPainterPathStroker()
        stroker.setWidth(8.0)
        self._shape = stroker.createStroke(self._path)
        self._update_label_rect()

    def set_tear(self, is_tear: bool) -> None:
        if is_tear != self.is_tear:
            self.is_tear = is_tear
            self.update()

    def route(self) -> list[tuple[float, float]]:
        """The line's corner points, from the outlet to the inlet."""
        return [(point.x(), point.y()) for point in self._points]

    def bend_at(self, position: QPointF) -> int | None:
        """The index of the user's bend point under ``position`` (scene), if any."""
        for index, bend in enumerate(self._bends):
            if math.hypot(bend.x() - position.x(), bend.y() - position.y()) <= BEND_HIT_RADIUS:
                return index
        return None

    def label_contains(self, position: QPointF) -> bool:
        return self._label_rect.contains(position)

    def name_changed(self) -> None:
        self.prepareGeometryChange()
        self._update_label_rect()

    def label_text(self) -> str:
        """The words on the line: the stream's number and name (as the stream table heads
        its column)."""
        return stream_label(self.stream.number, self.stream.name)

    def shown_text(self) -> str:
        """The label as drawn: number and name, or the number alone when the name would
        not fit beside the line's longest run (it would run under the next block)."""
        return self._shown_text

    def midpoint(self) -> QPointF:
        """Where the label sits: the middle of the line's longest horizontal run (the
        longest run of all when none is horizontal), so it is read beside a straight
        stretch rather than squeezed between two blocks."""
        a, b = self._label_run()
        return (a + b) / 2

    def _label_run(self) -> tuple[QPointF, QPointF]:
        if len(self._points) < 2:
            return QPointF(), QPointF()
        runs = list(zip(self._points, self._points[1:], strict=False))
        across = [run for run in runs if run[0].y() == run[1].y()] or runs
        return max(across, key=lambda run: QLineF(*run).length())

    def _update_label_rect(self) -> None:
        metrics = QFontMetricsF(_label_font())
        room = QLineF(*self._label_run()).length() - 2 * look.ARROW_LENGTH
        self._shown_text = self.label_text()
        if metrics.horizontalAdvance(self._shown_text) + 8 > room:
            self._shown_text = str(self.stream.number or "") or self._shown_text
        width = metrics.horizontalAdvance(self._shown_text) + 8
        height = metrics.height() + 2
        middle = self.midpoint()
        self._label_rect = QRectF(middle.x() - width / 2, middle.y() - height - 3, width, height)
        self._bounds = (
            self._shape.boundingRect().united(self._label_rect).adjusted(-12, -12, 12, 12)
        )

    def boundingRect(self) -> QRectF:
        return self._bounds

    def shape(self) -> QPainterPath:
        path = QPainterPath(self._shape)
        path.addRect(self._label_rect)
        return path

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget=None) -> None:
        if not self._points:
            return
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        width = look.STREAM_WIDTH * (1.8 if self.isSelected() else 1.0)
        colour = look.SELECTION if self.isSelected() else look.SLATE
        painter.setPen(
            QPen(
                colour,
                width,
                Qt.PenStyle.SolidLine,
                Qt.PenCapStyle.FlatCap,
                Qt.PenJoinStyle.MiterJoin,
            )
        )
        painter.setBrush(Qt.BrushStyle.NoBrush)
        painter.drawPath(self._path)
        self._paint_arrowhead(painter, colour)
        if self.is_tear:
            self._paint_tear_mark(painter)
        if self.isSelected():
            painter.setPen(QPen(colour, 1.2))
            painter.setBrush(QBrush(look.BLOCK_FILL))
            for bend in self._bends:
                painter.drawRect(QRectF(bend.x() - 4, bend.y() - 4, 8, 8))
        if look.zoom_of(painter) < look.DETAIL_ZOOM:
            return
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(QBrush(look.CANVAS))
        painter.drawRoundedRect(self._label_rect, 3, 3)
        painter.setFont(_label_font())
        painter.setPen(colour)
        painter.drawText(self._label_rect, Qt.AlignmentFlag.AlignCenter, self._shown_text)

    def _paint_arrowhead(self, painter: QPainter, colour) -> None:
        tip = self._points[-1]
        line = QLineF(tip, self._points[-2])
        line.setLength(look.ARROW_LENGTH)
        back = line.p2()
        normal = line.normalVector()
        normal.setLength(look.ARROW_LENGTH * 0.42)
        offset = normal.p2() - normal.p1()
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(colour)
        painter.drawPolygon(QPolygonF([tip, back + offset, back - offset]))

    def _length_to(self, point: QPointF) -> float:
        """Length along the line from its start to ``point`` (a point on it)."""
        travelled = 0.0
        for a, b in zip(self._points, self._points[1:], strict=False):
            run = QLineF(a, b)
            if QLineF(a, point).length() + QLineF(point, b).length() <= run.length() + 1e-6:
                return travelled + QLineF(a, point).length()
            travelled += run.length()
        return travelled / 2

    def _paint_tear_mark(self, painter: QPainter) -> None:
        """Two short teal bars across the line, just before the name."""
        length = self._length_to(self.midpoint())
        at_length = max(0.0, length - self._label_rect.width() / 2 - 12)
        percent = self._path.percentAtLength(at_length)
        centre = self._path.pointAtPercent(percent)
        angle = self._path.angleAtPercent(percent)
        painter.save()
        painter.translate(centre)
        painter.rotate(-angle)
        painter.setPen(QPen(look.TEAL, 2.6, Qt.PenStyle.SolidLine, Qt.PenCapStyle.RoundCap))
        for dx in (-3.5, 3.5):
            painter.drawLine(QPointF(dx - 2.5, -7), QPointF(dx + 2.5, 7))
        painter.restore()
