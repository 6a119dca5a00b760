"""Loopwright's own visual language for the diagram: colours, sizes and fonts in one place.

Dark slate for material streams and block outlines, teal only for the tear mark, and
state shown by a worded badge (its pale fill only backs the words; outlines never change
colour with state).
"""

from __future__ import annotations

from functools import cache

from PySide6.QtCore import Qt
from PySide6.QtGui import QBrush, QColor, QFont, QFontMetrics, QPainter, QPixmap

SLATE = QColor("#2e3a48")  # streams, outlines, text
SLATE_LIGHT = QColor("#6b7785")  # kind line, spare ports
TEAL = QColor("#0f8a8a")  # tear stream mark
SELECTION = QColor("#5b8fd6")  # selection halo (not a state colour)
BLOCK_FILL = QColor("#ffffff")
CANVAS = QColor("#f6f6f3")
GRID = QColor("#e7e7e2")

BADGE_COLOURS: dict[str, tuple[QColor, QColor]] = {  # state -> (fill, text)
    "needs input": (QColor("#f7e7b5"), QColor("#5a4300")),
    "not solved": (QColor("#e6e9ed"), QColor("#3a4553")),
    "solving": (QColor("#e6e9ed"), QColor("#3a4553")),
    "solved": (QColor("#d9eee0"), QColor("#1d5431")),
    "not converged": (QColor("#f5d5d1"), QColor("#7a1e14")),
}

BLOCK_WIDTH = 156.0
BLOCK_MIN_HEIGHT = 60.0
PORT_SPACING = 22.0
PORT_RADIUS = 5.0
PORT_HIT_RADIUS = 9.0
STREAM_WIDTH = 1.6
ARROW_LENGTH = 9.0
STUB = 18.0
LANE_SPACING = 10.0  # between backward routes leaving neighbouring ports
GRID_STEP = 20.0
# Below these magnifications small words are a few pixels high: they are left out.
DETAIL_ZOOM = 0.5  # kind line, badge words, port labels, stream names
WORDS_ZOOM = 0.3  # block names and glyphs


def font(point_size: float, bold: bool = False) -> QFont:
    """The diagram's font at ``point_size``; one family for every label."""
    result = QFont()
    result.setPointSizeF(point_size)
    result.setBold(bold)
    return result


@cache
def grid_brush() -> QBrush:
    """A tiled brush of light dots every ``GRID_STEP`` scene units (the canvas)."""
    step = int(GRID_STEP)
    tile = QPixmap(step, step)
    tile.fill(Qt.GlobalColor.transparent)
    painter = QPainter(tile)
    painter.fillRect(0, 0, 2, 2, GRID)
    painter.end()
    return QBrush(tile)


GLYPH_FALLBACK = "\u22ee"  # vertical ellipsis: in nearly every font


@cache
def shown_glyph(glyph: str, point_size: float) -> str:
    """The kind's glyph, or a plain fallback when the font cannot draw it (no empty box)."""
    metrics = QFontMetrics(font(point_size))
    if all(metrics.inFontUcs4(ord(character)) for character in glyph):
        return glyph
    return GLYPH_FALLBACK


def zoom_of(painter: QPainter) -> float:
    """The drawing's magnification (level of detail) for ``painter``."""
    transform = painter.worldTransform()
    return (abs(transform.m11() * transform.m22() - transform.m12() * transform.m21())) ** 0.5
