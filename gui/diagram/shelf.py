"""The block shelf: every block kind in words with its small monochrome glyph.

Drag a kind onto the diagram (the drag carries :data:`BLOCK_KIND_MIME` with the kind's
name), or press Enter / double-click to add one at the centre of the diagram.
"""

from __future__ import annotations

from PySide6.QtCore import QMimeData, QSize, Qt, Signal
from PySide6.QtGui import QIcon, QPainter, QPixmap
from PySide6.QtWidgets import QAbstractItemView, QListWidget, QListWidgetItem

from gui.diagram import look
from model.flowsheet.kinds import BLOCK_KINDS

BLOCK_KIND_MIME = "application/x-loopwright-block-kind"
GLYPH_SIZE = 22


def mime_for_kind(kind: str) -> QMimeData:
    """The drag data the shelf produces for ``kind`` (tests build drops from it)."""
    data = QMimeData()
    data.setData(BLOCK_KIND_MIME, kind.encode("utf-8"))
    data.setText(kind)
    return data


def kind_from_mime(data: QMimeData) -> str | None:
    """The block kind carried by a shelf drag, or None for any other drag."""
    if not data.hasFormat(BLOCK_KIND_MIME):
        return None
    kind = bytes(data.data(BLOCK_KIND_MIME).data()).decode("utf-8")
    return kind if kind in BLOCK_KINDS else None


def glyph_icon(glyph: str) -> QIcon:
    """A monochrome slate icon of the kind's glyph character."""
    pixmap = QPixmap(GLYPH_SIZE * 2, GLYPH_SIZE * 2)
    pixmap.setDevicePixelRatio(2.0)
    pixmap.fill(Qt.GlobalColor.transparent)
    painter = QPainter(pixmap)
    painter.setRenderHint(QPainter.RenderHint.TextAntialiasing)
    painter.setPen(look.SLATE)
    painter.setFont(look.font(13.0))
    painter.drawText(
        pixmap.rect().adjusted(0, 0, -GLYPH_SIZE, -GLYPH_SIZE),
        Qt.AlignmentFlag.AlignCenter,
        look.shown_glyph(glyph, 13.0),
    )
    painter.end()
    return QIcon(pixmap)


class BlockShelf(QListWidget):
    """List of block kinds to drag onto the diagram; ``kind_activated(kind)`` on Enter."""

    kind_activated = Signal(str)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setDragEnabled(True)
        self.setDragDropMode(QAbstractItemView.DragDropMode.DragOnly)
        self.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.setIconSize(QSize(GLYPH_SIZE, GLYPH_SIZE))
        self.setSpacing(2)
        for kind in BLOCK_KINDS.values():
            item = QListWidgetItem(glyph_icon(kind.glyph), kind.name)
            item.setData(Qt.ItemDataRole.UserRole, kind.name)
            item.setToolTip(f"{kind.description}\nDrag onto the diagram, or press Enter.")
            self.addItem(item)
        self.itemActivated.connect(
            lambda item: self.kind_activated.emit(item.data(Qt.ItemDataRole.UserRole))
        )

    def mimeTypes(self) -> list[str]:
        return [BLOCK_KIND_MIME]

    def mimeData(self, items: list[QListWidgetItem]) -> QMimeData:
        kind = items[0].data(Qt.ItemDataRole.UserRole) if items else ""
        return mime_for_kind(kind)

    def sizeHint(self) -> QSize:
        return QSize(150, 300)
