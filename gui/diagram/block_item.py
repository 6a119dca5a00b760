"""Graphics items for blocks and their ports.

A block is a rounded rectangle with its glyph, name and kind in words; inlets are small
circles on its left edge, outlets on its right edge; a worded badge under it shows its
state. Items only read the model object they show; the scene keeps them up to date.
"""

from __future__ import annotations

from functools import cache

from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QBrush, QFont, QFontMetricsF, QPainter, QPainterPath, QPen
from PySide6.QtWidgets import QGraphicsEllipseItem, QGraphicsItem, QStyleOptionGraphicsItem

from gui.diagram import look
from model.flowsheet.document import Block

# Port names shown beside the port for kinds whose ports differ in meaning.
PORT_LABELS = {
    "hot_in": "hot",
    "cold_in": "cold",
    "hot_out": "hot",
    "cold_out": "cold",
}
SEPARATOR_LABELS = {"out1": "1st", "out2": "2nd"}


@cache
def _fonts() -> dict[str, QFont]:
    return {
        "name": look.font(9.5, bold=True),
        "kind": look.font(8.0),
        "glyph": look.font(15.0),
        "badge": look.font(7.5),
        "port": look.font(7.0),
    }


def name_lines(name: str, metrics: QFontMetricsF, width: float) -> list[str]:
    """A block name in one line, or wrapped on two (at a space or after a hyphen) when
    it is wider than ``width``; only a name too long for two lines is elided."""
    if metrics.horizontalAdvance(name) <= width:
        return [name]
    breaks = [i + 1 for i, c in enumerate(name) if c in " -" and 0 < i < len(name) - 1]
    fitting = [b for b in breaks if metrics.horizontalAdvance(name[:b].rstrip()) <= width]
    if fitting:
        first, rest = name[: fitting[-1]].rstrip(), name[fitting[-1] :].strip()
    else:  # one long word: as much of it as fits, the rest below
        cut = max(1, len(name) - 1)
        while cut > 1 and metrics.horizontalAdvance(name[:cut]) > width:
            cut -= 1
        first, rest = name[:cut], name[cut:]
    return [first, metrics.elidedText(rest, Qt.TextElideMode.ElideRight, width)]


def block_height(inlet_count: int, outlet_count: int) -> float:
    """A block's drawn height: room for its ports, at least the minimum height."""
    return max(look.BLOCK_MIN_HEIGHT, look.PORT_SPACING * (max(inlet_count, outlet_count) + 1))


class PortItem(QGraphicsEllipseItem):
    """An inlet or outlet circle; the scene starts a stream drag from it."""

    def __init__(self, block_item: BlockItem, direction: str, port: str, label: str = "") -> None:
        radius = look.PORT_RADIUS
        super().__init__(-radius, -radius, 2 * radius, 2 * radius, block_item)
        self.block_item = block_item
        self.direction = direction  # "in" or "out"
        self.port = port
        self.label = label
        self.label_below = False  # the last of several labelled ports: label under the line
        self.connected = False
        self.setAcceptHoverEvents(True)
        self.setZValue(2)
        self._hovered = False
        self._refresh_look()

    @property
    def block_name(self) -> str:
        return self.block_item.block.name

    def set_connected(self, connected: bool) -> None:
        if connected != self.connected:
            self.connected = connected
            self._refresh_look()

    def _refresh_look(self) -> None:
        pen = QPen(look.SELECTION if self._hovered else look.SLATE, 2.0 if self._hovered else 1.3)
        if (
            not self.connected
            and self.port.rstrip("0123456789") in ("in", "out")
            and self.block_item.has_variable_ports(self.direction)
        ):
            pen.setStyle(Qt.PenStyle.DotLine)
        self.setPen(pen)
        self.setBrush(QBrush(look.SLATE if self.connected else look.BLOCK_FILL))
        what = "inlet" if self.direction == "in" else "outlet"
        state = "connected" if self.connected else "free: drag to draw a stream"
        self.setToolTip(f"{self.block_name} · {what} {self.port} ({state})")

    def shape(self) -> QPainterPath:
        path = QPainterPath()
        radius = look.PORT_HIT_RADIUS
        path.addEllipse(QPointF(0, 0), radius, radius)
        return path

    def boundingRect(self) -> QRectF:
        radius = look.PORT_HIT_RADIUS
        rect = QRectF(-radius, -radius, 2 * radius, 2 * radius)
        if self.label:
            rect = rect.united(self._label_rect())
        return rect

    def _label_rect(self) -> QRectF:
        width = QFontMetricsF(_fonts()["port"]).horizontalAdvance(self.label) + 2
        x = -width - 3 if self.direction == "in" else 3
        y = look.PORT_RADIUS + 2 if self.label_below else -look.PORT_RADIUS - 13
        return QRectF(x, y, width, 11)

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget=None) -> None:
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        painter.setPen(self.pen())
        painter.setBrush(self.brush())
        painter.drawEllipse(self.rect())
        if self.label and look.zoom_of(painter) >= look.DETAIL_ZOOM:
            painter.setFont(_fonts()["port"])
            painter.setPen(look.SLATE_LIGHT)
            painter.drawText(self._label_rect(), Qt.AlignmentFlag.AlignCenter, self.label)

    def hoverEnterEvent(self, event) -> None:
        self._hovered = True
        self._refresh_look()
        super().hoverEnterEvent(event)

    def hoverLeaveEvent(self, event) -> None:
        self._hovered = False
        self._refresh_look()
        super().hoverLeaveEvent(event)


class BlockItem(QGraphicsItem):
    """A block drawn as a rounded rectangle centred on the block's position."""

    def __init__(self, block: Block) -> None:
        super().__init__()
        self.block = block
        self.badge = ""
        self._height = look.BLOCK_MIN_HEIGHT
        self._ports: dict[tuple[str, str], PortItem] = {}
        flags = QGraphicsItem.GraphicsItemFlag
        self.setFlags(flags.ItemIsMovable | flags.ItemIsSelectable | flags.ItemSendsGeometryChanges)
        self.setAcceptHoverEvents(True)
        self.setZValue(1)
        self.setPos(*block.position)

    # ---- ports ------------------------------------------------------------------
    def has_variable_ports(self, direction: str) -> bool:
        kind = self.block.block_kind
        return kind.variable_inlets if direction == "in" else kind.variable_outlets

    def set_ports(
        self, inlets: list[str], outlets: list[str], connected: set[tuple[str, str]]
    ) -> None:
        """Show these ports; ``connected`` holds ("in"|"out", port) pairs that carry a stream."""
        wanted = [("in", p) for p in inlets] + [("out", p) for p in outlets]
        if list(self._ports) != wanted:
            for port_item in self._ports.values():
                port_item.setParentItem(None)
                if port_item.scene() is not None:
                    port_item.scene().removeItem(port_item)
            self.prepareGeometryChange()
            self._height = block_height(len(inlets), len(outlets))
            self._ports = {
                key: PortItem(self, key[0], key[1], self._port_label(key[1])) for key in wanted
            }
            for direction, names in (("in", inlets), ("out", outlets)):
                x = -look.BLOCK_WIDTH / 2 if direction == "in" else look.BLOCK_WIDTH / 2
                for index, name in enumerate(names):
                    y = -self._height / 2 + self._height * (index + 1) / (len(names) + 1)
                    self._ports[(direction, name)].setPos(x, y)
                    self._ports[(direction, name)].label_below = 0 < index == len(names) - 1
        for key, port_item in self._ports.items():
            port_item.set_connected(key in connected)

    def _port_label(self, port: str) -> str:
        if self.block.kind == "Separator":
            return SEPARATOR_LABELS.get(port, "")
        return PORT_LABELS.get(port, "")

    def port(self, direction: str, name: str) -> PortItem | None:
        return self._ports.get((direction, name))

    def port_index(self, direction: str, name: str) -> int:
        """The port's place among the block's inlets or outlets (0 for the first)."""
        names = [key[1] for key in self._ports if key[0] == direction]
        return names.index(name) if name in names else 0

    def ports(self) -> list[PortItem]:
        return list(self._ports.values())

    def port_scene_position(self, direction: str, name: str) -> QPointF:
        """Where a stream attaches; the block's edge centre if the port is not shown."""
        port_item = self._ports.get((direction, name))
        if port_item is not None:
            return port_item.scenePos()
        x = -look.BLOCK_WIDTH / 2 if direction == "in" else look.BLOCK_WIDTH / 2
        return self.mapToScene(QPointF(x, 0))

    # ---- state ------------------------------------------------------------------
    def set_badge(self, text: str) -> None:
        if text != self.badge:
            self.badge = text
            self.update()

    def body_rect(self) -> QRectF:
        return QRectF(-look.BLOCK_WIDTH / 2, -self._height / 2, look.BLOCK_WIDTH, self._height)

    def scene_body_rect(self) -> QRectF:
        return self.mapRectToScene(self.body_rect())

    def _badge_rect(self) -> QRectF:
        width = QFontMetricsF(_fonts()["badge"]).horizontalAdvance(self.badge) + 14
        return QRectF(-width / 2, self._height / 2 + 4, width, 15)

    # ---- drawing ----------------------------------------------------------------
    def boundingRect(self) -> QRectF:
        body = self.body_rect()
        return body.adjusted(-look.PORT_HIT_RADIUS - 4, -18, look.PORT_HIT_RADIUS + 4, 24)

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget=None) -> None:
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        painter.setRenderHint(QPainter.RenderHint.TextAntialiasing)
        body = self.body_rect()
        if self.isSelected():
            painter.setPen(QPen(look.SELECTION, 3.0))
            painter.setBrush(Qt.BrushStyle.NoBrush)
            painter.drawRoundedRect(body.adjusted(-4, -4, 4, 4), 11, 11)
        painter.setPen(QPen(look.SLATE, 1.4))
        painter.setBrush(look.BLOCK_FILL)
        painter.drawRoundedRect(body, 8, 8)
        zoom = look.zoom_of(painter)
        if zoom >= look.WORDS_ZOOM:
            self._paint_words(painter, body, zoom >= look.DETAIL_ZOOM)
        if self.badge:
            self._paint_badge(painter, zoom >= look.DETAIL_ZOOM)

    def _paint_words(self, painter: QPainter, body: QRectF, details: bool) -> None:
        fonts = _fonts()
        kind = self.block.block_kind
        glyph_rect = QRectF(body.left() + 8, body.center().y() - 14, 26, 28)
        painter.setFont(fonts["glyph"])
        painter.setPen(look.SLATE)
        painter.drawText(
            glyph_rect, Qt.AlignmentFlag.AlignCenter, look.shown_glyph(kind.glyph, 15.0)
        )
        text_left = glyph_rect.right() + 6
        text_width = body.right() - 8 - text_left
        metrics = QFontMetricsF(fonts["name"])
        lines = name_lines(self.block.name, metrics, text_width)
        line_height = metrics.height()
        kind_height = 15.0 if details else 0.0
        top = body.center().y() - (line_height * len(lines) + kind_height) / 2
        painter.setFont(fonts["name"])
        left = Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter
        for number, line in enumerate(lines):
            painter.drawText(
                QRectF(text_left, top + number * line_height, text_width, line_height), left, line
            )
        if not details:
            return
        painter.setFont(fonts["kind"])
        painter.setPen(look.SLATE_LIGHT)
        painter.drawText(
            QRectF(text_left, top + len(lines) * line_height, text_width, kind_height),
            left,
            kind.name.lower(),
        )

    def _paint_badge(self, painter: QPainter, words: bool) -> None:
        fill, text = look.BADGE_COLOURS.get(self.badge, look.BADGE_COLOURS["not solved"])
        rect = self._badge_rect()
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(fill)
        painter.drawRoundedRect(rect, 7, 7)
        if not words:
            return
        painter.setFont(_fonts()["badge"])
        painter.setPen(text)
        painter.drawText(rect, Qt.AlignmentFlag.AlignCenter, self.badge)

    def itemChange(self, change: QGraphicsItem.GraphicsItemChange, value):
        if change == QGraphicsItem.GraphicsItemChange.ItemPositionHasChanged:
            scene = self.scene()
            if scene is not None and hasattr(scene, "block_item_moved"):
                scene.block_item_moved(self)
        return super().itemChange(change, value)
