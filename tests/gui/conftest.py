"""Shared set-up of the GUI tests: offscreen Qt, isolated settings and recovery folder,
and helpers that drive the diagram with real mouse events on the view's viewport."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from pathlib import Path  # noqa: E402

import pytest  # noqa: E402
from PySide6.QtCore import QPoint, QPointF, QSettings, Qt  # noqa: E402
from PySide6.QtTest import QTest  # noqa: E402

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


@pytest.fixture(autouse=True)
def isolated_settings(qapp, tmp_path, monkeypatch):
    """QSettings and the recovery folder live in the test's own temporary folder."""
    qapp.setOrganizationName("LoopwrightTests")
    qapp.setApplicationName("LoopwrightTests")
    monkeypatch.setenv("LOOPWRIGHT_RECOVERY_DIR", str(tmp_path / "recovery"))
    QSettings.setDefaultFormat(QSettings.Format.IniFormat)
    QSettings.setPath(
        QSettings.Format.IniFormat, QSettings.Scope.UserScope, str(tmp_path / "settings")
    )
    yield
    QSettings().clear()


@pytest.fixture
def make_window(qtbot):
    """Factory of main windows (no autosave timer) closed without prompts at teardown.

    The windows are closed here rather than by ``qtbot.addWidget``, whose closing comes
    before this fixture's teardown and would meet the unsaved-changes prompt.
    """
    from gui.main_window import MainWindow

    windows = []

    def make(**options):
        window = MainWindow(autosave_seconds=options.pop("autosave_seconds", 0))
        window.show()
        qtbot.waitExposed(window)
        windows.append(window)
        return window

    yield make
    for window in windows:
        if window.solver.is_running():
            window.solver.stop()
            qtbot.waitUntil(lambda w=window: not w.solver.is_running(), timeout=20000)
        window.files.mark_saved()  # closing then asks nothing
        window.close()
        window.deleteLater()


@pytest.fixture
def window(make_window):
    return make_window()


class DiagramMouse:
    """Presses, moves and releases the left (or middle) button on the diagram's viewport
    at scene positions mapped with ``mapFromScene``: the events a user's mouse sends."""

    def __init__(self, view) -> None:
        self.view = view

    def point(self, scene_point: QPointF) -> QPoint:
        return self.view.mapFromScene(scene_point)

    def drag(
        self, start: QPointF, end: QPointF, button=Qt.MouseButton.LeftButton, steps: int = 4
    ) -> None:
        viewport = self.view.viewport()
        first, last = self.point(start), self.point(end)
        QTest.mousePress(viewport, button, Qt.KeyboardModifier.NoModifier, first)
        for step in range(1, steps + 1):
            between = first + (last - first) * (step / steps)
            QTest.mouseMove(viewport, between)
        QTest.mouseRelease(viewport, button, Qt.KeyboardModifier.NoModifier, last)

    def click(self, at: QPointF) -> None:
        QTest.mouseClick(
            self.view.viewport(),
            Qt.MouseButton.LeftButton,
            Qt.KeyboardModifier.NoModifier,
            self.point(at),
        )

    def double_click(self, at: QPointF) -> None:
        QTest.mouseDClick(
            self.view.viewport(),
            Qt.MouseButton.LeftButton,
            Qt.KeyboardModifier.NoModifier,
            self.point(at),
        )

    def connect(self, scene, source: str, source_port: str, target: str, target_port: str):
        """Drag from an outlet circle to an inlet circle."""
        start = scene.block_item(source).port("out", source_port).scenePos()
        end = scene.block_item(target).port("in", target_port).scenePos()
        self.drag(start, end)


def drop_kind(view, kind: str, scene_point: QPointF) -> None:
    """Drop a block kind on the view as a drag from the block shelf would: the shelf's own
    mime data in a QDragEnterEvent, QDragMoveEvent and QDropEvent sent to the viewport."""
    from PySide6.QtCore import QCoreApplication
    from PySide6.QtGui import QDragEnterEvent, QDragMoveEvent, QDropEvent

    from gui.diagram.shelf import mime_for_kind

    data = mime_for_kind(kind)
    position = view.mapFromScene(scene_point)
    action = Qt.DropAction.CopyAction
    buttons, modifiers = Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier
    viewport = view.viewport()
    for event in (
        QDragEnterEvent(position, action, data, buttons, modifiers),
        QDragMoveEvent(position, action, data, buttons, modifiers),
        QDropEvent(QPointF(position), action, data, buttons, modifiers),
    ):
        QCoreApplication.sendEvent(viewport, event)


@pytest.fixture
def screenshot_dir(tmp_path) -> Path:
    """Where screenshots go: ``$LOOPWRIGHT_SCREENSHOT_DIR`` when set (``docs/screenshots``
    for the README), else the test's temporary folder, so a test run leaves the tree as
    it was."""
    folder = Path(os.environ.get("LOOPWRIGHT_SCREENSHOT_DIR") or tmp_path)
    folder.mkdir(parents=True, exist_ok=True)
    return folder


@pytest.fixture
def example_path():
    def path(name: str) -> Path:
        return EXAMPLES / f"{name}.loop.json"

    return path


@pytest.fixture
def mouse():
    """``mouse(view)`` -> a :class:`DiagramMouse` for that view."""
    return DiagramMouse


@pytest.fixture
def drop():
    """``drop(view, kind, scene_point)``: a block-shelf drop (see :func:`drop_kind`)."""
    return drop_kind
