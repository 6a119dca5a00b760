"""The diagram as the report prints it: the window's own scene, on white, fitted to a box.

The report draws the same :class:`gui.diagram.scene.DiagramScene` the window shows, so
routes, stream numbers and tear marks are the window's; only the canvas grid is left
out and, for a converged solution, the "solved" badges (they say nothing on paper). The
scene paints through ``QPainter`` into the PDF, so the diagram stays vector graphics.
"""

from __future__ import annotations

from PySide6.QtCore import QRectF, QSizeF, Qt
from PySide6.QtGui import QColor, QPainter

from gui.diagram.scene import DiagramScene
from gui.diagram.stream_item import StreamItem
from model.flowsheet.document import Flowsheet

PAPER = QColor("#ffffff")
#: Streams' stacking order on paper: above the blocks (1), below their ports (2).
STREAMS_ABOVE_BLOCKS = 1.5
#: Scene units of white space kept around the drawing.
DIAGRAM_MARGIN = 24.0


class PrintScene(DiagramScene):
    """A read-only copy of the window's scene for one case, painted on white."""

    def __init__(self, flowsheet: Flowsheet, solution, unit_system: str) -> None:
        super().__init__()
        self.set_editable(False)
        self.set_flowsheet(flowsheet)
        self.set_unit_system(unit_system)
        self.set_results(solution, current=solution is not None)
        if solution is not None and solution.converged:
            for item in self.block_items():
                item.set_badge("")
        for item in self.items():
            if isinstance(item, StreamItem):  # numbers over block edges, never hidden
                item.setZValue(STREAMS_ABOVE_BLOCKS)

    def drawBackground(self, painter: QPainter, rect: QRectF) -> None:  # noqa: N802 (Qt)
        painter.fillRect(rect, PAPER)

    def drawing_rect(self) -> QRectF:
        """The blocks and streams with a margin (the scene rect itself is much larger)."""
        return self.itemsBoundingRect().adjusted(
            -DIAGRAM_MARGIN, -DIAGRAM_MARGIN, DIAGRAM_MARGIN, DIAGRAM_MARGIN
        )

    def release(self) -> None:
        """Stop following the case's flowsheet (its signals would otherwise reach us)."""
        self.set_flowsheet(Flowsheet())


#: Largest scale of the diagram on paper (a small flowsheet is not blown up).
LARGEST_SCALE = 1.5


def diagram_scale(scene: PrintScene, box: QSizeF) -> float:
    """The scale at which the drawing fills ``box`` (at most :data:`LARGEST_SCALE`)."""
    source = scene.drawing_rect()
    if source.isEmpty():
        return LARGEST_SCALE
    return min(box.width() / source.width(), box.height() / source.height(), LARGEST_SCALE)


def paint_diagram(painter: QPainter, scene: PrintScene, box: QRectF) -> float:
    """Paint the drawing at the top of ``box``, centred across it, at :func:`diagram_scale`;
    return the scale."""
    source = scene.drawing_rect()
    if source.isEmpty():
        return 0.0
    scale = diagram_scale(scene, box.size())
    width, height = source.width() * scale, source.height() * scale
    target = QRectF(
        box.left() + (box.width() - width) / 2,
        box.top(),
        width,
        height,
    )
    scene.render(painter, target, source, Qt.AspectRatioMode.KeepAspectRatio)
    return scale
