"""Start the desktop application: ``run_app(case_path)`` behind the ``loopwright`` command."""

from __future__ import annotations

import gc
import importlib
import sys

from PySide6.QtWidgets import QApplication

ORGANIZATION = "Loopwright"
APPLICATION = "Loopwright"


def application() -> QApplication:
    """The running QApplication, created (with our names for QSettings) if needed."""
    app = QApplication.instance()
    if app is None:
        app = QApplication(sys.argv[:1])
    app.setOrganizationName(ORGANIZATION)
    app.setApplicationName(APPLICATION)
    app.setApplicationDisplayName(APPLICATION)
    return app


def open_window(case_path: str | None = None):
    """Create and show the main window with ``case_path`` opened, or an empty diagram.

    Without a case, an autosaved recovery file left by a session that did not close
    properly is offered.
    """
    from gui.main_window import MainWindow

    window = MainWindow()
    window.show()
    if case_path:
        window.files.open_path(case_path)
    else:
        window.files.offer_recovery()
    return window


def run_app(case_path: str | None = None) -> int:
    """Run the window until it closes; return the exit status."""
    app = application()
    window = open_window(case_path)
    status = app.exec()
    del window
    return int(status)


def preload_solver_modules() -> None:
    """Import ``model.solve`` and build the unit registry (which the window's start-up no
    longer pays for: it is built on first use), then move every object alive now out of
    the cyclic garbage collector's way (``gc.freeze``): a full collection then takes
    milliseconds, not the ~100 ms pause that would otherwise hit the window in the middle
    of a solve."""
    importlib.import_module("model.solve")
    from units_of_measure import get_registry

    get_registry()
    gc.collect()
    gc.freeze()
