"""The printed report's pages: the diagram page, then the tables, cautions on each page.

Pages are landscape, laid out at 96 units per inch, the resolution the diagram's
point-sized fonts are drawn at on screen, so the printed diagram keeps the window's
proportions; text is measured on a 96-dpi device too, so the layout does not depend on
the screen. A4, unless the diagram would shrink below :data:`SMALLEST_DIAGRAM_SCALE`
of its size on screen: then A3, the usual sheet of a heat and material balance.

Page 1 holds the title block, the cautions in full and the diagram, with the stream
table under it when it fits (the classic H&MB sheet); the following pages hold the
stream table (when not on page 1), the block results, the balance closures and the case
summary, laid out and paginated by ``QTextDocument``; then each exchanger's heat curve,
two to a page, drawn as lines (the PDF stays vector). Every page ends with the cautions
and the page number. :meth:`ReportPages.paint_page`
paints one page on any ``QPainter`` (the PDF writer, or an image for a preview).
"""

from __future__ import annotations

import datetime as _datetime
from pathlib import Path
from typing import Any

from PySide6.QtCore import QMarginsF, QPointF, QRectF, QSizeF, Qt
from PySide6.QtGui import (
    QColor,
    QFontMetricsF,
    QImage,
    QPageLayout,
    QPageSize,
    QPainter,
    QPen,
    QTextDocument,
)

from gui.diagram import look
from gui.report import tables_html
from gui.report.diagram_print import PrintScene, diagram_scale, paint_diagram
from gui.report.heat_curve_print import paint_heat_curve
from model.report.block_table import result_rows
from model.report.cautions import CAUTION_LINE, CAUTIONS
from model.report.closure_table import closure_rows, closure_threshold_text
from model.report.report_order import ReportOrder
from model.report.summary import exported_at, summary_rows
from model.report.table import stream_table

#: Units per inch of the page layout (see the module docstring).
RESOLUTION = 96
PAGE_SIZES = (QPageSize.PageSizeId.A4, QPageSize.PageSizeId.A3)
#: The smallest scale of the diagram on A4; below it the report is printed on A3.
SMALLEST_DIAGRAM_SCALE = 0.7
MARGIN_MM = 10.0
FOOTER_HEIGHT = 30.0
TITLE_HEIGHT = 26.0
LINE_HEIGHT = 16.0
GAP = 10.0
LABEL_COLUMNS_WIDTH = 260.0  # quantity and unit, in page units
STREAM_COLUMN_WIDTH = 88.0
CURVES_PER_PAGE = 2
CAUTION_FILL = QColor("#fff4e0")
CAUTION_TEXT = QColor("#6b3b00")
CAUTIONS_TEXT = "Cautions: " + " ".join(CAUTIONS)


def page_layout(size: QPageSize.PageSizeId = PAGE_SIZES[0]) -> QPageLayout:
    """Landscape pages of ``size`` with 10 mm margins."""
    margins = QMarginsF(MARGIN_MM, MARGIN_MM, MARGIN_MM, MARGIN_MM)
    return QPageLayout(
        QPageSize(size), QPageLayout.Orientation.Landscape, margins, QPageLayout.Unit.Millimeter
    )


def measuring_device() -> QImage:
    """A 96-dpi image: fonts and text documents are measured on it."""
    image = QImage(1, 1, QImage.Format.Format_RGB32)
    dots_per_metre = round(RESOLUTION / 0.0254)
    image.setDotsPerMeterX(dots_per_metre)
    image.setDotsPerMeterY(dots_per_metre)
    return image


class ReportPages:
    """Every page of one case's report (the case must hold a solution).

    Pages are painted in the coordinates of the page's printable area (its origin at
    the top-left margin), as ``QPdfWriter`` gives them; :meth:`close` lets the case's
    flowsheet go.
    """

    def __init__(
        self,
        case: Any,
        source: str | Path | None = None,
        when: _datetime.datetime | None = None,
    ) -> None:
        self.case, self.source = case, source
        self.when = when or _datetime.datetime.now()
        self.order = ReportOrder.of(case.flowsheet)
        self.device = measuring_device()
        self.scene = PrintScene(case.flowsheet, case.solution, case.unit_system)
        self.cautions_height = self._cautions_height(page_layout())
        self.layout = self._choose_layout()
        self.body = QRectF(QPointF(0, 0), QSizeF(self.layout.paintRectPixels(RESOLUTION).size()))
        self.cautions_height = self._cautions_height(self.layout)
        self.text_height = self.body.height() - FOOTER_HEIGHT
        self.diagram_box = self._diagram_box(self.body.size())
        drawn = self.scene.drawing_rect().height() * diagram_scale(
            self.scene, self.diagram_box.size()
        )
        streams = self._stream_table_section()
        first = self._document(streams)
        room = self.text_height - (self.diagram_box.top() + drawn + 2 * GAP)
        self.first_page_tables = first if first.size().height() <= room else None
        self.first_page_tables_top = self.diagram_box.top() + drawn + 2 * GAP
        self.document = self._document(
            ("" if self.first_page_tables else streams) + self._other_sections(),
            paginated=True,
        )

    def close(self) -> None:
        self.scene.release()

    def __enter__(self) -> ReportPages:
        return self

    def __exit__(self, *_exc: object) -> None:
        self.close()

    # ---- geometry ---------------------------------------------------------------------
    def _cautions_height(self, layout: QPageLayout) -> float:
        """Height of the cautions box on page 1 of ``layout`` (the text wrapped in it)."""
        width = layout.paintRectPixels(RESOLUTION).width() - 16
        metrics = QFontMetricsF(look.font(8.0), self.device)
        bounds = metrics.boundingRect(
            QRectF(0, 0, width, 1000), Qt.TextFlag.TextWordWrap, CAUTIONS_TEXT
        )
        return bounds.height() + 10

    def _diagram_box(self, body: QSizeF) -> QRectF:
        top = TITLE_HEIGHT + LINE_HEIGHT + GAP + self.cautions_height + GAP
        return QRectF(0, top, body.width(), body.height() - FOOTER_HEIGHT - top)

    def _choose_layout(self) -> QPageLayout:
        """A4, or A3 when the diagram would be drawn below :data:`SMALLEST_DIAGRAM_SCALE`."""
        for size in PAGE_SIZES:
            layout = page_layout(size)
            box = self._diagram_box(QSizeF(layout.paintRectPixels(RESOLUTION).size()))
            if diagram_scale(self.scene, box.size()) >= SMALLEST_DIAGRAM_SCALE:
                return layout
        return layout

    @property
    def page_rect(self) -> QRectF:
        """The whole page, in the printable area's coordinates (margins are negative)."""
        full = QRectF(self.layout.fullRectPixels(RESOLUTION))
        area = QRectF(self.layout.paintRectPixels(RESOLUTION))
        return full.translated(-area.topLeft())

    # ---- content ----------------------------------------------------------------------
    def _stream_table_section(self) -> str:
        solution, units = self.case.solution, self.case.unit_system
        table = stream_table(solution, units, self.order.streams, self.order.numbers)
        per_table = max(4, int((self.body.width() - LABEL_COLUMNS_WIDTH) / STREAM_COLUMN_WIDTH))
        return tables_html.stream_table_html(table, f"Stream table ({units} units)", per_table)

    def _other_sections(self) -> str:
        case = self.case
        solution, units = case.solution, case.unit_system
        closures = tables_html.closures_html(
            closure_rows(solution.balance, units), closure_threshold_text(solution.balance)
        )
        return "".join(
            [
                tables_html.block_results_html(result_rows(solution, units, self.order)),
                closures,
                tables_html.summary_html(summary_rows(case, self.source, self.when)),
            ]
        )

    def _document(self, html: str, paginated: bool = False) -> QTextDocument:
        document = QTextDocument()
        document.documentLayout().setPaintDevice(self.device)
        document.setDefaultFont(look.font(8.0))
        document.setDefaultStyleSheet(tables_html.STYLE)
        document.setDocumentMargin(0.0)
        document.setHtml(html)
        if paginated:
            document.setPageSize(QSizeF(self.body.width(), self.text_height))
        else:
            document.setTextWidth(self.body.width())
        return document

    def _table_pages(self) -> int:
        return self.document.pageCount() if not self.document.isEmpty() else 0

    def _curve_pages(self) -> list[list[str]]:
        """Exchangers with a heat curve, CURVES_PER_PAGE to a page."""
        names = [name for name, r in self.case.solution.blocks.items() if r.profile]
        return [names[i : i + CURVES_PER_PAGE] for i in range(0, len(names), CURVES_PER_PAGE)]

    def page_count(self) -> int:
        return 1 + self._table_pages() + len(self._curve_pages())

    # ---- painting ---------------------------------------------------------------------
    def paint_page(self, painter: QPainter, index: int) -> None:
        """Paint page ``index`` (0 is the diagram page) in page units (1/96 inch)."""
        painter.save()
        painter.fillRect(self.page_rect, QColor("#ffffff"))
        if index == 0:
            self._paint_first_page(painter)
        elif index <= self._table_pages():
            self._paint_table_page(painter, index - 1)
        else:
            self._paint_curve_page(painter, self._curve_pages()[index - 1 - self._table_pages()])
        self._paint_footer(painter, index)
        painter.restore()

    def _paint_first_page(self, painter: QPainter) -> None:
        body, case = self.body, self.case
        left = Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter
        painter.setPen(look.SLATE)
        painter.setFont(look.font(14.0, bold=True))
        painter.drawText(
            QRectF(0, 0, body.width(), TITLE_HEIGHT),
            left,
            case.title or "Heat and material balance",
        )
        painter.setFont(look.font(8.5))
        line = " · ".join(
            [
                "Heat and material balance",
                f"case {Path(self.source).name}" if self.source else "case not saved",
                f"exported {exported_at(self.when)}",
                f"{case.unit_system} units",
                case.solution.status,
            ]
        )
        painter.drawText(QRectF(0, TITLE_HEIGHT, body.width(), LINE_HEIGHT), left, line)
        self._paint_cautions_box(painter, TITLE_HEIGHT + LINE_HEIGHT + GAP)
        paint_diagram(painter, self.scene, self.diagram_box)
        if self.first_page_tables is not None:
            painter.save()
            painter.translate(0, self.first_page_tables_top)
            self.first_page_tables.drawContents(painter)
            painter.restore()

    def _paint_cautions_box(self, painter: QPainter, top: float) -> None:
        box = QRectF(0, top, self.body.width(), self.cautions_height)
        painter.setPen(Qt.PenStyle.NoPen)
        painter.setBrush(CAUTION_FILL)
        painter.drawRoundedRect(box, 3, 3)
        painter.setPen(CAUTION_TEXT)
        painter.setFont(look.font(8.0))
        painter.drawText(box.adjusted(8, 5, -8, -5), Qt.TextFlag.TextWordWrap, CAUTIONS_TEXT)

    def _paint_table_page(self, painter: QPainter, page: int) -> None:
        height = self.text_height
        painter.save()
        painter.translate(0, -page * height)
        self.document.drawContents(painter, QRectF(0, page * height, self.body.width(), height))
        painter.restore()

    def _paint_curve_page(self, painter: QPainter, names: list[str]) -> None:
        """Heat curves, one under the other, each under its heading (vector drawing)."""
        height = self.text_height / CURVES_PER_PAGE
        for row, name in enumerate(names):
            top = row * height
            painter.setPen(look.SLATE)
            painter.setFont(look.font(10.0, bold=True))
            painter.drawText(
                QRectF(0, top, self.body.width(), TITLE_HEIGHT),
                Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter,
                f"Heat curve: {name}",
            )
            box = QRectF(0, top + TITLE_HEIGHT, self.body.width(), height - TITLE_HEIGHT - GAP)
            profile = self.case.solution.blocks[name].profile
            paint_heat_curve(painter, box, profile, self.case.unit_system)

    def _paint_footer(self, painter: QPainter, index: int) -> None:
        body = self.body
        top = body.bottom() - FOOTER_HEIGHT + 6
        painter.setPen(QPen(QColor(tables_html.RULE_COLOUR), 0.8))
        painter.drawLine(QPointF(0, top), QPointF(body.right(), top))
        painter.setFont(look.font(7.5))
        rect = QRectF(0, top + 3, body.width(), FOOTER_HEIGHT - 9)
        painter.setPen(CAUTION_TEXT)
        painter.drawText(
            rect, Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter, CAUTION_LINE
        )
        painter.setPen(look.SLATE)
        painter.drawText(
            rect,
            Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter,
            f"page {index + 1} of {self.page_count()}",
        )
