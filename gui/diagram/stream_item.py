"""Graphics item for a material stream: an orthogonal dark slate line with an arrowhead,
its number and name at the midpoint, and a teal double bar when it is a tear stream."""

from __future__ import annotations

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


@cache
def _label_font() -> QFont:
    return look.font(8.0)


def orthogonal_route(
    start: QPointF,
    end: QPointF,
    source_box: QRectF,
    target_box: QRectF,
    lane: int = 0,
) -> list[QPointF]:
    """Corner points of a right-angled route from an outlet to an inlet.

    Forward streams (target to the right) take one vertical jog half-way; backward
    streams, such as recycles, leave to the right, run below both blocks and enter the
    inlet from the left. When the target is well above the source, the route runs
    through the gap between the two blocks (over the top of both when they overlap in
    height), so it does not loop around the target. ``lane`` (the port's place on its
    block) spaces backward routes apart, so two of them never share a vertical run.
    """
    offset = look.STUB + look.LANE_SPACING * lane
    leave = QPointF(start.x() + offset, start.y())
    arrive = QPointF(end.x() - offset, end.y())
    if end.x() - start.x() >= look.ARROW_LENGTH:
        middle_x = (start.x() + end.x()) / 2
        return [start, QPointF(middle_x, start.y()), QPointF(middle_x, end.y()), end]
    margin = 34 + look.LANE_SPACING * lane
    if end.y() < start.y() - look.BLOCK_MIN_HEIGHT:  # target well above the source
        gap = source_box.top() - target_box.bottom()
        if gap >= 2 * look.STUB:  # between the two blocks
            lane_y = target_box.bottom() + gap / 2 - look.LANE_SPACING * lane
        else:  # over the top of both
            lane_y = min(source_box.top(), target_box.top()) - margin
    else:
        lane_y = max(source_box.bottom(), target_box.bottom()) + margin
    return [start, leave, QPointF(leave.x(), lane_y), QPointF(arrive.x(), lane_y), arrive, end]


class StreamItem(QGraphicsItem):
    """A stream between two ports; the scene sets its route with :meth:`set_route`."""

    def __init__(self, stream: Stream) -> None:
        super().__init__()
        self.stream = stream
        self.is_tear = False
        self._points: list[QPointF] = []
        self._path = QPainterPath()
        self._shape = QPainterPath()
        self._label_rect = QRectF()
        self._bounds = QRectF()
        self.setFlags(QGraphicsItem.GraphicsItemFlag.ItemIsSelectable)
        self.setAcceptHoverEvents(True)
        self.setZValue(0)

    def set_route(self, points: list[QPointF]) -> None:
        self.prepareGeometryChange()
        self._points = points
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

    def name_changed(self) -> None:
        self.prepareGeometryChange()
        self._update_label_rect()

    def label_text(self) -> str:
        """The words on the line: the stream's number and name (as the stream table heads
        its column)."""
        return stream_label(self.stream.number, self.stream.name)

    def midpoint(self) -> QPointF:
        return self._path.pointAtPercent(0.5) if self._points else QPointF()

    def _update_label_rect(self) -> None:
        metrics = QFontMetricsF(_label_font())
        width = metrics.horizontalAdvance(self.label_text()) + 8
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
        if look.zoom_of(painter) < look.DETAIL_ZOOM:
            return
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(QBrush(look.CANVAS))
        painter.drawRoundedRect(self._label_rect, 3, 3)
        painter.setFont(_label_font())
        painter.setPen(colour)
        painter.drawText(self._label_rect, Qt.AlignmentFlag.AlignCenter, self.label_text())

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

    def _paint_tear_mark(self, painter: QPainter) -> None:
        """Two short teal bars across the line, just before the name."""
        length = self._path.length()
        at_length = max(0.0, length / 2 - self._label_rect.width() / 2 - 12)
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
