"""The printable report: a PDF of the diagram (vector graphics), the stream table, block
results, balance closures and case summary, with the cautions on every page.

Why PDF through Qt rather than an HTML file: the report is meant to be printed and
sent on as it is, and a PDF keeps its pages, its page numbers and the cautions at the
foot of every page on any reader, where a browser decides an HTML file's page breaks
itself; and Qt draws the diagram with the window's own scene (its routes, numbers and
tear marks) straight into the PDF as vector paths, so no second drawing of the
diagram has to be kept in step with the window's.

``report_pdf_bytes`` needs a ``QApplication``; :func:`report_for_command_line` makes an
off-screen one when there is none, so ``loopwright export CASE --report FILE`` needs no
display.
"""

from __future__ import annotations

import datetime as _datetime
import os
from pathlib import Path
from typing import Any

from PySide6.QtCore import QBuffer, QByteArray, QIODevice
from PySide6.QtGui import QImage, QPainter, QPdfWriter
from PySide6.QtWidgets import QApplication

from gui.report.pages import RESOLUTION, ReportPages

__all__ = ["ReportPages", "page_images", "report_for_command_line", "report_pdf_bytes"]


def report_pdf_bytes(
    case: Any, source: str | Path | None = None, when: _datetime.datetime | None = None
) -> bytes:
    """The PDF report of the solved ``case`` (``source``: its file, named on the report)."""
    with ReportPages(case, source, when) as pages:
        return _pdf(pages, case.title)


def _pdf(pages: ReportPages, title: str) -> bytes:
    data = QByteArray()
    buffer = QBuffer(data)
    buffer.open(QIODevice.OpenModeFlag.WriteOnly)
    writer = QPdfWriter(buffer)
    writer.setResolution(RESOLUTION)
    writer.setPageLayout(pages.layout)
    writer.setTitle(title or "Heat and material balance")
    writer.setCreator("Loopwright")
    painter = QPainter(writer)
    try:
        for index in range(pages.page_count()):
            if index:
                writer.newPage()
            pages.paint_page(painter, index)
    finally:
        painter.end()
    buffer.close()
    return bytes(data.data())


def page_images(
    case: Any,
    source: str | Path | None = None,
    when: _datetime.datetime | None = None,
    scale: float = 2.0,
) -> list[QImage]:
    """Every page painted on an image, ``scale`` pixels per page unit (a preview of the
    PDF drawn by the same painting code)."""
    with ReportPages(case, source, when) as pages:
        return [_image(pages, index, scale) for index in range(pages.page_count())]


def _image(pages: ReportPages, index: int, scale: float) -> QImage:
    page = pages.page_rect
    image = QImage(
        int(page.width() * scale), int(page.height() * scale), QImage.Format.Format_RGB32
    )
    image.fill(0xFFFFFF)
    painter = QPainter(image)
    painter.setRenderHint(QPainter.RenderHint.Antialiasing)
    painter.setRenderHint(QPainter.RenderHint.TextAntialiasing)
    painter.scale(scale, scale)
    painter.translate(-page.topLeft())  # the printable area's origin at the margins
    try:
        pages.paint_page(painter, index)
    finally:
        painter.end()
    return image


def report_for_command_line(case: Any, source: str) -> bytes:
    """``model.cli``'s report writer: the PDF, with an off-screen Qt application made
    here when there is none (no display is needed). A case written without positions
    is laid out first, as the window would open it."""
    from gui.diagram.editor import lay_out_if_unplaced

    lay_out_if_unplaced(case.flowsheet)
    if QApplication.instance() is None:
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
        report_for_command_line.application = QApplication([])  # kept alive while we paint
    return report_pdf_bytes(case, source)
