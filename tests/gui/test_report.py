"""The printable report: vector PDF, numbered diagram, tables, cautions on every page;
File → Export for the spreadsheet and the report; ``export --report`` without a display."""

from __future__ import annotations

import datetime
import os
import re
import subprocess
import sys
from pathlib import Path

import openpyxl
import pytest
from PySide6.QtGui import QColor
from PySide6.QtWidgets import QMessageBox

from gui.diagram import look
from gui.diagram.stream_item import StreamItem
from gui.report import page_images, report_pdf_bytes
from gui.report.diagram_print import PrintScene, diagram_scale
from gui.report.pages import CAUTION_TEXT, FOOTER_HEIGHT, ReportPages
from model.case.file import load_case
from model.report.report_order import ReportOrder
from model.report.table import stream_table

pytestmark = pytest.mark.gui
EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
EXAMPLE_FILES = sorted(EXAMPLES.glob("*.loop.json"))
WHEN = datetime.datetime(2025, 3, 14, 9, 26)


@pytest.fixture(scope="module", params=EXAMPLE_FILES, ids=lambda p: p.stem.split("_")[0])
def solved(request, qapp):
    case = load_case(request.param)
    case.solve()
    return request.param, case


def _pdf_page_count(data: bytes) -> int:
    return len(re.findall(rb"/Type\s*/Page(?![s\w])", data))


def _has_colour_near(image, colour: QColor, top: int, bottom: int, tolerance: int = 40) -> bool:
    """Whether a pixel of rows ``top``..``bottom`` is within ``tolerance`` of ``colour``."""
    for y in range(max(top, 0), min(bottom, image.height())):
        for x in range(0, image.width(), 2):
            pixel = image.pixelColor(x, y)
            if (
                abs(pixel.red() - colour.red())
                + abs(pixel.green() - colour.green())
                + abs(pixel.blue() - colour.blue())
                <= tolerance
            ):
                return True
    return False


def test_the_pdf_is_vector_with_one_page_per_report_page(solved):
    path, case = solved
    data = report_pdf_bytes(case, path, WHEN)
    assert data.startswith(b"%PDF-") and data.rstrip().endswith(b"%%EOF")
    with ReportPages(case, path, WHEN) as pages:
        assert _pdf_page_count(data) == pages.page_count() >= 2
    assert b"/Subtype /Image" not in data and b"/Subtype/Image" not in data  # no raster


def test_the_diagram_is_drawn_large_enough_for_its_words(solved):
    path, case = solved
    with ReportPages(case, path, WHEN) as pages:
        scale = diagram_scale(pages.scene, pages.diagram_box.size())
    assert scale >= look.DETAIL_ZOOM  # below it the stream labels would be left out
    assert scale >= 0.7  # the report's own floor (A3 when A4 would go below it)


def test_stream_labels_on_the_diagram_match_the_stream_table_headers(solved):
    _, case = solved
    scene = PrintScene(case.flowsheet, case.solution, case.unit_system)
    try:
        labels = {
            item.stream.name: item.label_text()
            for item in scene.items()
            if isinstance(item, StreamItem)
        }
    finally:
        scene.release()
    order = ReportOrder.of(case.flowsheet)
    table = stream_table(case.solution, case.unit_system, order.streams, order.numbers)
    for name, number in zip(table.columns, table.column_numbers(), strict=True):
        assert labels[name] == f"{number} · {name}"


def test_every_stream_number_and_value_is_in_the_report_tables(solved):
    path, case = solved
    with ReportPages(case, path, WHEN) as pages:
        documents = [pages.document] + [pages.first_page_tables] * bool(pages.first_page_tables)
        text = "\n".join(d.toPlainText() for d in documents)
    order = ReportOrder.of(case.flowsheet)
    table = stream_table(case.solution, case.unit_system, order.streams, order.numbers)
    for name in table.columns:
        assert name in text
    for row in table.rows:
        for cell in row.cells():
            assert cell in text, (row.label, cell)
    assert "Block results" in text and "Balance closures" in text


def test_the_cautions_are_at_the_foot_of_every_page(solved, screenshot_dir):
    path, case = solved
    images = page_images(case, path.name, WHEN, scale=1.0)
    assert len(images) >= 2
    for image in images:
        footer_top = image.height() - int(FOOTER_HEIGHT) - 60  # the bottom margin is 38
        assert _has_colour_near(image, CAUTION_TEXT, footer_top, image.height())
    for number, image in enumerate(images[:2], start=1):  # the diagram and the first tables
        assert image.save(str(screenshot_dir / f"report_{path.name.split('.')[0]}_{number}.png"))


def test_file_menu_exports_the_spreadsheet_and_the_report(
    qtbot, window, example_path, tmp_path, monkeypatch
):
    for name in ("export_csv", "export_xlsx", "export_report"):
        assert not window.actions[name].isEnabled()
    assert window.files.open_path(str(example_path("ammonia_synthesis_loop")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.actions["solve"].trigger()
    assert window.actions["export_xlsx"].isEnabled() and window.actions["export_report"].isEnabled()
    answers = iter([str(tmp_path / "loop"), str(tmp_path / "loop.pdf")])
    suggested = []

    def choose(_parent, _title, suggestion, _filter):
        suggested.append(suggestion)
        return next(answers), ""

    monkeypatch.setattr("gui.exports.QFileDialog.getSaveFileName", choose)
    window.actions["export_xlsx"].trigger()
    window.actions["export_report"].trigger()
    assert Path(suggested[0]).name == "ammonia_synthesis_loop.xlsx"
    sheet = openpyxl.load_workbook(tmp_path / "loop.xlsx")["Streams"]  # the suffix was added
    model = window.stream_table.model
    assert [sheet.cell(3, 3 + i).value for i in range(len(model.names))] == model.names
    assert [sheet.cell(2, 3 + i).value for i in range(len(model.names))] == list(range(1, 9))
    temperature = next(
        r for r in range(4, sheet.max_row + 1) if sheet.cell(r, 1).value == "Temperature"
    )
    for column, name in enumerate(model.names, start=3):
        state = window.case.solution.streams[name]
        assert sheet.cell(temperature, column).value == pytest.approx(state.T - 273.15, abs=1e-9)
    pdf = (tmp_path / "loop.pdf").read_bytes()
    assert pdf.startswith(b"%PDF-") and _pdf_page_count(pdf) >= 2


def test_the_window_stream_table_heads_each_column_with_its_number(qtbot, window, example_path):
    assert window.files.open_path(str(example_path("ammonia_synthesis_loop")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.actions["solve"].trigger()
    model = window.stream_table.model
    header = [model.column_title(i) for i in range(len(model.names))]
    assert header[:3] == ["1\nMake-up", "2\nConverter feed", "3\nConverter effluent"]
    assert header[6] == "7\nRecycle gas (tear)"
    item = window.scene.stream_item("Recycle gas")
    assert item.label_text() == "7 · Recycle gas"
    assert window.stream_table.copy_to_clipboard().split("\n")[0].split("\t")[:3] == [
        "Stream",
        "1",
        "2",
    ]


def test_export_report_from_the_command_line_needs_no_display(tmp_path):
    environment = {
        k: v
        for k, v in os.environ.items()
        if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")
    }
    target = tmp_path / "loop.pdf"
    done = subprocess.run(
        [
            sys.executable,
            "-m",
            "gui.launcher",
            "export",
            str(EXAMPLES / "shift_feed_effluent_exchanger.loop.json"),
            "--report",
            str(target),
            "--xlsx",
            str(tmp_path / "loop.xlsx"),
        ],
        capture_output=True,
        text=True,
        timeout=180,
        env=environment,
        cwd=Path(__file__).resolve().parents[2],
    )
    assert done.returncode == 0, done.stderr
    assert target.read_bytes().startswith(b"%PDF-")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["loop.pdf", "loop.xlsx"]


def test_exporting_results_older_than_the_last_edit_asks_first(
    qtbot, window, example_path, tmp_path, monkeypatch
):
    assert window.files.open_path(str(example_path("shift_feed_effluent_exchanger")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.actions["solve"].trigger()
    window.case.flowsheet.move_block("Raw gas", (-40.0, 0.0))  # not an edit of the balance
    assert window.results_current
    window.case.flowsheet.set_preferred_tear("Bypass", True)  # an edit: results now stale
    assert not window.results_current
    questions = []
    monkeypatch.setattr(
        "gui.exports.QMessageBox.question",
        lambda *args: questions.append(args[2]) or QMessageBox.StandardButton.No,
    )
    monkeypatch.setattr(
        "gui.exports.QFileDialog.getSaveFileName",
        lambda *args: (str(tmp_path / "late.xlsx"), ""),
    )
    window.actions["export_xlsx"].trigger()
    assert "changed since it was last solved" in questions[0]
    assert not (tmp_path / "late.xlsx").exists()
    window.select_stream("Bypass")
    assert window.details.stream_page.title_label.text().endswith("· stream 5")


def test_the_report_draws_each_exchangers_heat_curve(qapp, screenshot_dir):
    from gui.report.heat_curve_print import COLD, HOT, nice_ticks

    path = EXAMPLES / "shift_feed_effluent_exchanger.loop.json"
    case = load_case(path)
    case.solve()
    with ReportPages(case, path, WHEN) as pages:
        assert pages._curve_pages() == [["Feed-effluent exchanger"]]
        assert pages.page_count() == 2 + pages._table_pages()  # the curve's page is last
    images = page_images(case, path.name, WHEN, scale=1.0)
    drawn = [
        image
        for image in images[-1:]
        if _has_colour_near(image, HOT, 0, image.height(), 30)
        and _has_colour_near(image, COLD, 0, image.height(), 30)
    ]
    assert drawn, "no page shows both sides' curves"
    for number, image in enumerate(drawn, start=1):
        assert image.save(str(screenshot_dir / f"report_heat_curve_{number}.png"))
    # round ticks: steps of 1, 2 or 5 times a power of ten, covering the range
    assert nice_ticks(0.0, 600.943) == [0.0, 100.0, 200.0, 300.0, 400.0, 500.0, 600.0, 700.0]
    assert nice_ticks(220.0, 391.3) == [200.0, 250.0, 300.0, 350.0, 400.0]
    assert nice_ticks(5.0, 5.0) == [5.0, 6.0]  # a flat curve still gets an axis
