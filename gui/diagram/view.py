"""The diagram view: wheel zoom, pan, rubber-band selection, fit-to-view, shelf drops.

Pan with the middle button, or hold the space bar and drag with the left button.
Dropping a block kind from the block shelf emits :attr:`DiagramView.block_dropped`.
After :meth:`DiagramView.fit_to_view` the view stays fitted while it is resized (the
window settling its docks, the user resizing it) until the user zooms or pans.
"""

from __future__ import annotations

from PySide6.QtCore import QPointF, Qt, Signal
from PySide6.QtGui import QKeyEvent, QMouseEvent, QPainter, QWheelEvent
from PySide6.QtWidgets import QGraphicsView

from gui.diagram.shelf import BLOCK_KIND_MIME, kind_from_mime

ZOOM_STEP = 1.15
MIN_ZOOM = 0.1
MAX_ZOOM = 4.0
FIT_MARGIN = 40.0
#: A fitted diagram is never magnified beyond its natural size: a single block does not
#: fill the window.
FIT_MAX_ZOOM = 1.0


class DiagramView(QGraphicsView):
    """Shows the diagram scene; emits ``block_dropped(kind, x, y)`` in scene coordinates."""

    block_dropped = Signal(str, float, float)

    def __init__(self, scene, parent=None) -> None:
        super().__init__(scene, parent)
        self.setRenderHints(QPainter.RenderHint.Antialiasing | QPainter.RenderHint.TextAntialiasing)
        self.setDragMode(QGraphicsView.DragMode.RubberBandDrag)
        self.setRubberBandSelectionMode(Qt.ItemSelectionMode.IntersectsItemShape)
        self.setTransformationAnchor(QGraphicsView.ViewportAnchor.AnchorUnderMouse)
        self.setResizeAnchor(QGraphicsView.ViewportAnchor.AnchorViewCenter)
        self.setViewportUpdateMode(QGraphicsView.ViewportUpdateMode.SmartViewportUpdate)
        self.setAcceptDrops(True)
        self.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        self._pan_start: QPointF | None = None
        self._space_held = False
        self.fitted = False

    # ---- zoom -----------------------------------------------------------------------
    def zoom(self) -> float:
        return self.transform().m11()

    def zoom_by(self, factor: float) -> None:
        """Scale by ``factor``, kept within [MIN_ZOOM, MAX_ZOOM] (the user's zoom)."""
        self.fitted = False
        target = min(MAX_ZOOM, max(MIN_ZOOM, self.zoom() * factor))
        factor = target / self.zoom()
        if abs(factor - 1.0) > 1e-9:
            self.scale(factor, factor)

    def reset_zoom(self) -> None:
        """Natural size (the user's choice: the view no longer keeps a fit)."""
        self.fitted = False
        self.resetTransform()

    def wheelEvent(self, event: QWheelEvent) -> None:
        self.fitted = False
        steps = event.angleDelta().y() / 120.0
        if steps:
            self.zoom_by(ZOOM_STEP**steps)
        event.accept()

    def fit_to_view(self) -> None:
        """Show every block and stream, centred with a margin, at no more than natural size
        (:data:`FIT_MAX_ZOOM`); an empty diagram is shown at natural size around the origin.
        The view then keeps the fit when it is resized, until the user zooms or pans."""
        scene = self.scene()
        self.resetTransform()
        if scene.items():
            bounds = scene.itemsBoundingRect()
            self.fitInView(
                bounds.adjusted(-FIT_MARGIN, -FIT_MARGIN, FIT_MARGIN, FIT_MARGIN),
                Qt.AspectRatioMode.KeepAspectRatio,
            )
            if self.zoom() > FIT_MAX_ZOOM:
                self.resetTransform()
                self.scale(FIT_MAX_ZOOM, FIT_MAX_ZOOM)
            self.centerOn(bounds.center())
        else:
            self.centerOn(QPointF(0.0, 0.0))
        self.fitted = True

    def resizeEvent(self, event) -> None:
        super().resizeEvent(event)
        if self.fitted:
            self.fit_to_view()

    def center_on_item(self, item) -> None:
        self.centerOn(item)

    # ---- pan ------------------------------------------------------------------------
    def keyPressEvent(self, event: QKeyEvent) -> None:
        if event.key() == Qt.Key.Key_Space and not event.isAutoRepeat():
            self._space_held = True
            self.fitted = False
            self.setDragMode(QGraphicsView.DragMode.ScrollHandDrag)
            event.accept()
            return
        super().keyPressEvent(event)

    def keyReleaseEvent(self, event: QKeyEvent) -> None:
        if event.key() == Qt.Key.Key_Space and not event.isAutoRepeat():
            self._space_held = False
            self.setDragMode(QGraphicsView.DragMode.RubberBandDrag)
            event.accept()
            return
        super().keyReleaseEvent(event)

    def mousePressEvent(self, event: QMouseEvent) -> None:
        if event.button() == Qt.MouseButton.MiddleButton:
            self._pan_start = event.position()
            self.viewport().setCursor(Qt.CursorShape.ClosedHandCursor)
            event.accept()
            return
        super().mousePressEvent(event)

    def mouseMoveEvent(self, event: QMouseEvent) -> None:
        if self._pan_start is not None:
            self.pan_by(event.position() - self._pan_start)
            self._pan_start = event.position()
            event.accept()
            return
        super().mouseMoveEvent(event)

    def mouseReleaseEvent(self, event: QMouseEvent) -> None:
        if event.button() == Qt.MouseButton.MiddleButton and self._pan_start is not None:
            self._pan_start = None
            self.viewport().unsetCursor()
            event.accept()
            return
        super().mouseReleaseEvent(event)

    def pan_by(self, delta: QPointF) -> None:
        """Move the drawing with the pointer by ``delta`` viewport pixels."""
        self.fitted = False
        horizontal, vertical = self.horizontalScrollBar(), self.verticalScrollBar()
        horizontal.setValue(horizontal.value() - round(delta.x()))
        vertical.setValue(vertical.value() - round(delta.y()))

    # ---- drops from the block shelf -----------------------------------------------------
    def dragEnterEvent(self, event) -> None:
        if event.mimeData().hasFormat(BLOCK_KIND_MIME) and self.acceptDrops():
            event.acceptProposedAction()
        else:
            event.ignore()

    def dragMoveEvent(self, event) -> None:
        if event.mimeData().hasFormat(BLOCK_KIND_MIME) and self.acceptDrops():
            event.acceptProposedAction()
        else:
            event.ignore()

    def dropEvent(self, event) -> None:
        kind = kind_from_mime(event.mimeData())
        if kind is None or not self.acceptDrops():
            event.ignore()
            return
        position = self.mapToScene(event.position().toPoint())
        event.acceptProposedAction()
        self.block_dropped.emit(kind, round(position.x()), round(position.y()))
