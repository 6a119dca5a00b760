"""The diagram scene: a mirror of the flowsheet that turns gestures into requests.

The scene listens to the flowsheet's signals and keeps a private map from model objects
to graphics items. It never writes to the model: a drag between ports, a dangling drag,
a finished move or a double-click becomes a Qt signal that the editor turns into an
undo command.
"""

from __future__ import annotations

import math
from itertools import pairwise

from PySide6.QtCore import QPointF, QRectF, Qt, QTimer, Signal
from PySide6.QtGui import QPainter, QPen, QTransform
from PySide6.QtWidgets import QGraphicsLineItem, QGraphicsScene, QGraphicsSceneMouseEvent

from gui.diagram import look, routing
from gui.diagram.block_item import BlockItem, PortItem
from gui.diagram.result_text import describe_block, describe_stream
from gui.diagram.stream_item import StreamItem
from model.flowsheet.document import Block, Flowsheet, Stream

DRAG_THRESHOLD = 4.0
MINIMUM_RECT = QRectF(-2000, -1500, 4000, 3000)
#: Room kept under a block for its state badge: lines keep off it too.
BADGE_ROOM = 22.0


class DiagramScene(QGraphicsScene):
    """Blocks and streams of one flowsheet, with the gestures that edit them.

    Signals
    -------
    connection_requested(source, source_port, target, target_port)
    dangling_released(block, port, x, y): a port drag released on empty space.
    blocks_moved(dict): block name -> ((old x, old y), (new x, new y)), on release.
    rename_requested(what, name): ``what`` is "block" or "stream" (double-click on a
        block or on a stream's label).
    bends_requested(stream, points): new bend points for a stream's line (a double-click
        on the line adds one, on a bend point removes it; a bend point dragged moves it).
    message(str): a short explanation for the status bar (a refused gesture).
    """

    connection_requested = Signal(str, str, str, str)
    dangling_released = Signal(str, str, float, float)
    blocks_moved = Signal(dict)
    rename_requested = Signal(str, str)
    bends_requested = Signal(str, list)
    message = Signal(str)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setSceneRect(MINIMUM_RECT)
        self.setItemIndexMethod(QGraphicsScene.ItemIndexMethod.NoIndex)
        self._flowsheet: Flowsheet | None = None
        self._block_items: dict[Block, BlockItem] = {}
        self._stream_items: dict[Stream, StreamItem] = {}
        self._attached: dict[Block, set[StreamItem]] = {}
        self._editable = True
        self._drag_port: PortItem | None = None
        self._drag_line: QGraphicsLineItem | None = None
        self._press_position = QPointF()
        self._solution = None
        self._results_current = False
        self._solving = False
        self._unit_system = "Metric"
        self._refresh_pending = False
        self._obstacles: list[routing.Rect] | None = None
        self._loading = False
        self._bend_drag: tuple[StreamItem, int] | None = None

    # ---- the model ------------------------------------------------------------
    def flowsheet(self) -> Flowsheet | None:
        return self._flowsheet

    def set_flowsheet(self, flowsheet: Flowsheet) -> None:
        """Show ``flowsheet`` (replacing any other) and follow its changes."""
        if self._flowsheet is not None:
            for signal, slot in self._connections(self._flowsheet):
                signal.disconnect(slot)
        self.clear()
        self._block_items.clear()
        self._stream_items.clear()
        self._attached.clear()
        self._drag_port = self._drag_line = None
        self._flowsheet = flowsheet
        for signal, slot in self._connections(flowsheet):
            signal.connect(slot)
        self._loading = True  # route every stream once, when all blocks have their ports
        try:
            for block in flowsheet.blocks.values():
                self._on_block_added(block)
            for stream in flowsheet.streams.values():
                self._on_stream_added(stream)
        finally:
            self._loading = False
        self.reroute_all()
        self.refresh_states()

    def _connections(self, flowsheet: Flowsheet):
        return [
            (flowsheet.block_added, self._on_block_added),
            (flowsheet.block_removed, self._on_block_removed),
            (flowsheet.block_renamed, self._on_block_renamed),
            (flowsheet.block_moved, self._on_block_moved),
            (flowsheet.block_specs_changed, self._on_specs_changed),
            (flowsheet.stream_added, self._on_stream_added),
            (flowsheet.stream_removed, self._on_stream_removed),
            (flowsheet.stream_renamed, self._on_stream_renamed),
            (flowsheet.stream_changed, self._on_stream_changed),
            (flowsheet.stream_bends_changed, self._on_stream_bends_changed),
            (flowsheet.components_changed, self._schedule_refresh),
        ]

    def _on_block_added(self, block: Block) -> None:
        item = BlockItem(block)
        item.setFlag(item.GraphicsItemFlag.ItemIsMovable, self._editable)
        self._block_items[block] = item
        self._attached[block] = set()
        self.addItem(item)
        self._obstacles = None
        self._refresh_ports(block)
        self._schedule_refresh()

    def _on_block_removed(self, block: Block) -> None:
        item = self._block_items.pop(block)
        self._attached.pop(block, None)
        self.removeItem(item)
        self._obstacles = None
        self._schedule_refresh()

    def _on_block_renamed(self, block: Block, _old: str) -> None:
        self._block_items[block].update()
        self._schedule_refresh()

    def _on_block_moved(self, block: Block) -> None:
        item = self._block_items[block]
        if (item.pos().x(), item.pos().y()) != block.position:
            item.setPos(*block.position)
        self._reroute_crossing(item)

    def _on_specs_changed(self, _block: Block, _field: str) -> None:
        self._schedule_refresh()

    def _on_stream_added(self, stream: Stream) -> None:
        item = StreamItem(stream)
        self._stream_items[stream] = item
        self.addItem(item)
        for name in (stream.source, stream.target):
            self._attached[self._flowsheet.blocks[name]].add(item)
            self._refresh_ports(self._flowsheet.blocks[name])
        self._route(item)
        self._schedule_refresh()

    def _on_stream_removed(self, stream: Stream) -> None:
        item = self._stream_items.pop(stream)
        self.removeItem(item)
        for name in (stream.source, stream.target):
            block = self._flowsheet.blocks.get(name)
            if block is not None:
                self._attached[block].discard(item)
                self._refresh_ports(block)
        self._schedule_refresh()

    def _on_stream_renamed(self, stream: Stream, _old: str) -> None:
        self._stream_items[stream].name_changed()
        self._schedule_refresh()

    def _on_stream_changed(self, _stream: Stream) -> None:
        self._schedule_refresh()

    def _on_stream_bends_changed(self, stream: Stream) -> None:
        self._route(self._stream_items[stream])

    # ---- geometry -----------------------------------------------------------------
    def _refresh_ports(self, block: Block) -> None:
        self._obstacles = None
        flowsheet = self._flowsheet
        connected = {("in", s.target_port) for s in flowsheet.inlet_streams(block.name)}
        connected |= {("out", s.source_port) for s in flowsheet.outlet_streams(block.name)}
        self._block_items[block].set_ports(
            flowsheet.inlet_ports(block.name), flowsheet.outlet_ports(block.name), connected
        )
        for stream_item in self._attached.get(block, ()):
            self._route(stream_item)

    def obstacles(self) -> list[routing.Rect]:
        """Every block's rectangle with room for its badge, as the router takes them."""
        if self._obstacles is None:
            self._obstacles = [_obstacle(item) for item in self._block_items.values()]
        return self._obstacles

    def _route(self, item: StreamItem, bends: list[tuple[float, float]] | None = None) -> None:
        """Route one stream around the blocks (through ``bends``, else the stream's own)."""
        if self._loading:
            return
        stream = item.stream
        source = self._block_items[self._flowsheet.blocks[stream.source]]
        target = self._block_items[self._flowsheet.blocks[stream.target]]
        start = source.port_scene_position("out", stream.source_port)
        end = target.port_scene_position("in", stream.target_port)
        lane = source.port_index("out", stream.source_port)
        bends = list(stream.bends) if bends is None else bends
        points = routing.route_stream(
            (start.x(), start.y()),
            (end.x(), end.y()),
            self.obstacles(),
            bends,
            lane,
            arrive_lane=target.port_index("in", stream.target_port),
            occupied=self._occupied(item),
        )
        item.set_route([QPointF(x, y) for x, y in points], [QPointF(x, y) for x, y in bends])

    def _occupied(self, routed: StreamItem) -> list[tuple[routing.Point, routing.Point]]:
        """The segments of every other stream's line (a route keeps off them if it can)."""
        return [
            segment
            for item in self._stream_items.values()
            if item is not routed
            for segment in pairwise(item.route())
        ]

    def reroute_all(self) -> None:
        """Route every stream again (after loading or a new layout)."""
        self._obstacles = None
        for item in self._stream_items.values():
            self._route(item)

    def block_item_moved(self, item: BlockItem) -> None:
        """Called by a block item while it moves: its own streams follow (only those, so a
        drag stays smooth; the others are checked when the move ends)."""
        self._obstacles = None
        for stream_item in self._attached.get(item.block, ()):
            self._route(stream_item)

    def _reroute_crossing(self, item: BlockItem) -> None:
        """After a move: route again the other streams whose line now crosses the block."""
        rect = _obstacle(item)
        for stream_item in self._stream_items.values():
            route = stream_item.route()
            if any(routing.segment_crosses(a, b, rect) for a, b in pairwise(route)):
                self._route(stream_item)

    # ---- look-up and selection ----------------------------------------------------
    def block_item(self, name: str) -> BlockItem | None:
        block = self._flowsheet.blocks.get(name) if self._flowsheet else None
        return self._block_items.get(block) if block is not None else None

    def stream_item(self, name: str) -> StreamItem | None:
        stream = self._flowsheet.streams.get(name) if self._flowsheet else None
        return self._stream_items.get(stream) if stream is not None else None

    def block_items(self) -> list[BlockItem]:
        return list(self._block_items.values())

    def selected_block_names(self) -> list[str]:
        return [i.block.name for i in self.selectedItems() if isinstance(i, BlockItem)]

    def selected_stream_names(self) -> list[str]:
        return [i.stream.name for i in self.selectedItems() if isinstance(i, StreamItem)]

    def select_only(self, blocks: list[str] = (), streams: list[str] = ()) -> None:
        """Select exactly these blocks and streams (by name)."""
        self.clearSelection()
        for item in [self.block_item(n) for n in blocks] + [self.stream_item(n) for n in streams]:
            if item is not None:
                item.setSelected(True)

    # ---- state badges, tear marks and hover text -------------------------------------
    def set_editable(self, editable: bool) -> None:
        """Allow or refuse moves and port drags (refused while a solve runs)."""
        self._editable = editable
        for item in self._block_items.values():
            item.setFlag(item.GraphicsItemFlag.ItemIsMovable, editable)

    def set_results(self, solution, current: bool, solving: bool = False) -> None:
        """Show the last solution (tears, badges, hover text); ``current``: no edits since."""
        self._solution, self._results_current, self._solving = solution, current, solving
        self.refresh_states()

    def set_unit_system(self, name: str) -> None:
        self._unit_system = name
        self.refresh_states()

    def _schedule_refresh(self, *_args) -> None:
        if not self._refresh_pending:
            self._refresh_pending = True
            QTimer.singleShot(0, self, self.refresh_states)

    def refresh_states(self) -> None:
        """Recompute every badge, tear mark and hover text (coalesced after edits)."""
        from model.validation.validate import block_states

        self._refresh_pending = False
        if self._flowsheet is None:
            return
        states = block_states(self._flowsheet)
        solution = self._solution
        tears = set(solution.tear_streams) if solution is not None else set()
        for block, item in self._block_items.items():
            item.set_badge(
                states.get(block.name)
                if states.get(block.name) == "needs input"
                else self._result_badge()
            )
            item.setToolTip(self._block_text(block))
        for stream, item in self._stream_items.items():
            item.set_tear(stream.name in tears)
            item.setToolTip(self._stream_text(stream))
        self._grow_scene_rect()

    def _result_badge(self) -> str:
        if self._solving:
            return "solving"
        if self._solution is None or not self._results_current:
            return "not solved"
        return "solved" if self._solution.converged else "not converged"

    def _block_text(self, block: Block) -> str:
        result = None
        if self._solution is not None:
            result = self._solution.blocks.get(block.name)
        text = describe_block(
            block.name, block.kind, result, self._unit_system, self._results_current
        )
        return text if result is not None else f"{text}\n{block.block_kind.description}"

    def _stream_text(self, stream: Stream) -> str:
        route = f"{stream.source} {stream.source_port} → {stream.target} {stream.target_port}"
        state = self._solution.streams.get(stream.name) if self._solution is not None else None
        if state is None:
            return f"{stream.name}: {route}"
        return (
            describe_stream(
                stream.name,
                state,
                self._solution.component_names,
                self._unit_system,
                self._results_current,
            )
            + "\n"
            + route
        )

    def _grow_scene_rect(self) -> None:
        bounds = self.itemsBoundingRect().adjusted(-1500, -1000, 1500, 1000)
        self.setSceneRect(bounds.united(MINIMUM_RECT).united(self.sceneRect()))

    # ---- gestures -----------------------------------------------------------------
    def _port_at(self, position: QPointF) -> PortItem | None:
        for item in self.items(position):
            if isinstance(item, PortItem):
                return item
        return None

    def _block_at(self, position: QPointF) -> BlockItem | None:
        item = self.itemAt(position, QTransform())
        while item is not None and not isinstance(item, BlockItem):
            item = item.parentItem()
        return item

    def mousePressEvent(self, event: QGraphicsSceneMouseEvent) -> None:
        port = self._port_at(event.scenePos())
        if port is not None and self._editable and event.button() == Qt.MouseButton.LeftButton:
            self._drag_port = port
            self._press_position = event.scenePos()
            self._drag_line = self.addLine(0, 0, 0, 0, QPen(look.SLATE, 1.4, Qt.PenStyle.DashLine))
            self._drag_line.setZValue(5)
            self._update_drag_line(event.scenePos())
            event.accept()
            return
        bend = self._bend_at(event.scenePos())
        if bend is not None and self._editable and event.button() == Qt.MouseButton.LeftButton:
            self._bend_drag = bend
            event.accept()
            return
        super().mousePressEvent(event)

    def _bend_at(self, position: QPointF) -> tuple[StreamItem, int] | None:
        """A bend point of a selected stream under ``position``."""
        for item in self.items(position):
            if isinstance(item, StreamItem) and item.isSelected():
                index = item.bend_at(position)
                if index is not None:
                    return item, index
        return None

    def _dragged_bends(self, position: QPointF) -> list[tuple[float, float]]:
        item, index = self._bend_drag
        bends = list(item.stream.bends)
        step = look.GRID_STEP / 2  # bend points snap to half the canvas grid
        bends[index] = (round(position.x() / step) * step, round(position.y() / step) * step)
        return bends

    def mouseMoveEvent(self, event: QGraphicsSceneMouseEvent) -> None:
        if self._drag_port is not None:
            self._update_drag_line(event.scenePos())
            event.accept()
            return
        if self._bend_drag is not None:
            self._route(self._bend_drag[0], self._dragged_bends(event.scenePos()))
            event.accept()
            return
        super().mouseMoveEvent(event)

    def _update_drag_line(self, position: QPointF) -> None:
        start = self._drag_port.scenePos()
        self._drag_line.setLine(start.x(), start.y(), position.x(), position.y())

    def mouseReleaseEvent(self, event: QGraphicsSceneMouseEvent) -> None:
        if self._drag_port is not None:
            port, self._drag_port = self._drag_port, None
            self.removeItem(self._drag_line)
            self._drag_line = None
            moved = event.scenePos() - self._press_position
            if math.hypot(moved.x(), moved.y()) >= DRAG_THRESHOLD:
                self._finish_port_drag(port, event.scenePos())
            event.accept()
            return
        if self._bend_drag is not None:
            item = self._bend_drag[0]
            bends = self._dragged_bends(event.scenePos())
            self._bend_drag = None
            if bends != list(item.stream.bends):
                self.bends_requested.emit(item.stream.name, bends)
            self._route(item)  # as the model has it, should the request be refused
            event.accept()
            return
        super().mouseReleaseEvent(event)
        self._report_moves()

    def _finish_port_drag(self, port: PortItem, position: QPointF) -> None:
        target = self._port_at(position)
        if target is None:
            block_item = self._block_at(position)
            if block_item is None:
                self.dangling_released.emit(port.block_name, port.port, position.x(), position.y())
                return
            target = self._first_free_port(block_item, "in" if port.direction == "out" else "out")
            if target is None:
                self.message.emit(
                    f"{block_item.block.name} has no free "
                    f"{'inlet' if port.direction == 'out' else 'outlet'}."
                )
                return
        if target.direction == port.direction:
            self.message.emit("A stream runs from an outlet (right edge) to an inlet (left edge).")
            return
        source, sink = (port, target) if port.direction == "out" else (target, port)
        self.connection_requested.emit(source.block_name, source.port, sink.block_name, sink.port)

    @staticmethod
    def _first_free_port(block_item: BlockItem, direction: str) -> PortItem | None:
        for port in block_item.ports():
            if port.direction == direction and not port.connected:
                return port
        return None

    def _report_moves(self) -> None:
        moves = {}
        for block, item in self._block_items.items():
            new = (float(round(item.pos().x())), float(round(item.pos().y())))
            if (item.pos().x(), item.pos().y()) != block.position:
                moves[block.name] = (block.position, new)
        if moves:
            self.blocks_moved.emit(moves)

    def mouseDoubleClickEvent(self, event: QGraphicsSceneMouseEvent) -> None:
        for item in self.items(event.scenePos()):
            if isinstance(item, PortItem):
                break
            if isinstance(item, BlockItem):
                self.rename_requested.emit("block", item.block.name)
                event.accept()
                return
            if isinstance(item, StreamItem):
                self._double_click_stream(item, event.scenePos())
                event.accept()
                return
        super().mouseDoubleClickEvent(event)

    def _double_click_stream(self, item: StreamItem, position: QPointF) -> None:
        """On the label: rename; on a bend point: remove it; elsewhere on the line: add one."""
        stream = item.stream
        if item.label_contains(position):
            self.rename_requested.emit("stream", stream.name)
            return
        if not self._editable:
            return
        index = item.bend_at(position)
        if index is not None:
            bends = [bend for number, bend in enumerate(stream.bends) if number != index]
        else:
            point = (float(round(position.x())), float(round(position.y())))
            bends = routing.insert_bend(item.route(), list(stream.bends), point)
        self.bends_requested.emit(stream.name, bends)

    # ---- canvas -------------------------------------------------------------------
    def drawBackground(self, painter: QPainter, rect: QRectF) -> None:
        painter.fillRect(rect, look.CANVAS)
        if painter.worldTransform().m11() >= 0.5:
            painter.fillRect(rect, look.grid_brush())


def _obstacle(item: BlockItem) -> routing.Rect:
    rect = item.scene_body_rect()
    return (rect.left(), rect.top(), rect.right(), rect.bottom() + BADGE_ROOM)
