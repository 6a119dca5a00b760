"""Case files for the window: new, open, save, save as, recent files, the unsaved-changes
prompt, and autosave to a recovery file offered at the next start after a crash.

A case counts as changed when its undo stack has left the saved state, or when its
method, unit system, solver settings or solution differ from those last saved. The
recovery files of a session live in one folder (``LOOPWRIGHT_RECOVERY_DIR`` or the
application data folder) and are held by a lock file while the session runs: at the
next start, a recovery file whose lock is free belonged to a session that ended
without closing properly, and is offered to the user.
"""

from __future__ import annotations

import contextlib
import json
import os
import time
import uuid
from pathlib import Path
from typing import Any

from PySide6.QtCore import QLockFile, QObject, QSettings, QStandardPaths, QTimer, Signal
from PySide6.QtWidgets import QFileDialog, QMessageBox

from gui.window_host import CaseHost
from model.errors import LoopwrightError

CASE_FILTER = "Loopwright cases (*.loop.json);;All files (*)"
CASE_SUFFIX = ".loop.json"
RECENT_KEY = "files/recent"
RECENT_LIMIT = 8
AUTOSAVE_SECONDS = 60
RECOVERY_ENV = "LOOPWRIGHT_RECOVERY_DIR"


def recovery_dir() -> Path:
    """Folder of the recovery files: ``$LOOPWRIGHT_RECOVERY_DIR`` or the app data folder."""
    configured = os.environ.get(RECOVERY_ENV)
    if configured:
        return Path(configured)
    location = QStandardPaths.writableLocation(QStandardPaths.StandardLocation.AppDataLocation)
    return Path(location or Path.home() / ".loopwright") / "recovery"


class CaseFiles(QObject):
    """Reads and writes the window's case; ``changed()`` when the path or recent list change."""

    changed = Signal()

    def __init__(self, window: CaseHost, autosave_seconds: float = AUTOSAVE_SECONDS) -> None:
        super().__init__(window)
        self._window = window
        self.path: str | None = None
        self._saved_state: tuple = ()
        self._recovered = False
        session = f"session-{uuid.uuid4().hex[:12]}"
        folder = recovery_dir()
        self.recovery_path = folder / f"{session}{CASE_SUFFIX}"
        self._meta_path = folder / f"{session}.json"
        self._lock: QLockFile | None = None
        self._last_autosaved_state: tuple = ()
        self._timer = QTimer(self)
        self._timer.timeout.connect(self.autosave_now)
        if autosave_seconds > 0:
            self._timer.start(round(autosave_seconds * 1000))

    # ---- changed or not ------------------------------------------------------------
    def _state(self) -> tuple:
        case = self._window.case
        return (
            case.method,
            case.unit_system,
            json.dumps(case.settings.to_dict(), sort_keys=True),
            id(case.solution),
        )

    def mark_saved(self) -> None:
        self._window.undo_stack.setClean()
        self._saved_state = self._state()
        self._recovered = False
        self.changed.emit()

    def is_modified(self) -> bool:
        return (
            self._recovered
            or not self._window.undo_stack.isClean()
            or self._state() != self._saved_state
        )

    def display_name(self) -> str:
        return Path(self.path).name if self.path else "untitled"

    def maybe_save(self) -> bool:
        """Ask what to do with unsaved changes; True when the caller may go on.

        Never while a solve or a second opinion runs: it is reading this case's flowsheet.
        """
        if self._window.is_busy():
            self._window.show_message(
                "Stop the solve (or wait for the second opinion) before opening or closing a case."
            )
            return False
        if not self.is_modified():
            return True
        answer = QMessageBox.question(
            self._window,
            "Unsaved changes",
            f"The case {self.display_name()} has unsaved changes. Save them?",
            QMessageBox.StandardButton.Save
            | QMessageBox.StandardButton.Discard
            | QMessageBox.StandardButton.Cancel,
            QMessageBox.StandardButton.Save,
        )
        if answer == QMessageBox.StandardButton.Save:
            return self.save()
        return answer == QMessageBox.StandardButton.Discard

    # ---- new, open, save -----------------------------------------------------------
    def new_case(self) -> bool:
        from model.case.document import Case

        if not self.maybe_save():
            return False
        self._install(Case(), None)
        return True

    def open_case(self, path: str | None = None) -> bool:
        """Open ``path`` (or ask for one) after the unsaved-changes prompt."""
        if not self.maybe_save():
            return False
        if path is None:
            path, _ = QFileDialog.getOpenFileName(
                self._window, "Open case", self._start_folder(), CASE_FILTER
            )
            if not path:
                return False
        return self.open_path(path)

    def open_path(self, path: str) -> bool:
        """Open ``path`` without prompting; a bad file leaves the window as it was."""
        from model.case.file import load_case

        try:
            case = load_case(path)
        except LoopwrightError as error:
            self._show_error("Cannot open case", error)
            self.forget_recent(path)
            return False
        self._install(case, str(Path(path).resolve()))
        self.add_recent(self.path)
        return True

    def save(self) -> bool:
        return self.save_as(self.path) if self.path else self.save_as()

    def save_as(self, path: str | None = None) -> bool:
        """Save to ``path`` (or ask for one); ``.loop.json`` is added when missing."""
        from model.case.file import save_case

        if path is None:
            suggestion = self.path or str(Path(self._start_folder()) / f"untitled{CASE_SUFFIX}")
            path, _ = QFileDialog.getSaveFileName(
                self._window, "Save case as", suggestion, CASE_FILTER
            )
            if not path:
                return False
        if not path.endswith(CASE_SUFFIX):
            path += CASE_SUFFIX
        try:
            save_case(self._window.case_for_saving(), path)
        except LoopwrightError as error:
            self._show_error("Cannot save case", error)
            return False
        self.path = str(Path(path).resolve())
        self.mark_saved()
        self.add_recent(self.path)
        self.autosave_now()
        return True

    def _install(self, case: Any, path: str | None) -> None:
        self._window.install_case(case)
        self.path = path
        self.mark_saved()

    def _show_error(self, title: str, error: LoopwrightError) -> None:
        problems = getattr(error, "problems", None)
        box = QMessageBox(
            QMessageBox.Icon.Warning,
            title,
            str(error).splitlines()[0],
            QMessageBox.StandardButton.Ok,
            self._window,
        )
        if problems:
            box.setInformativeText("\n".join(f"• {p}" for p in problems[:12]))
            box.setDetailedText("\n".join(str(p) for p in problems))
        else:
            box.setInformativeText(str(error))
        box.exec()

    def _start_folder(self) -> str:
        if self.path:
            return str(Path(self.path).parent)
        recent = self.recent_files()
        return str(Path(recent[0]).parent) if recent else str(Path.cwd())

    # ---- recent files ------------------------------------------------------------------
    def recent_files(self) -> list[str]:
        value = QSettings().value(RECENT_KEY, [])
        if isinstance(value, str):
            value = [value]
        return [str(p) for p in (value or [])]

    def add_recent(self, path: str) -> None:
        paths = [path] + [p for p in self.recent_files() if p != path]
        QSettings().setValue(RECENT_KEY, paths[:RECENT_LIMIT])
        self.changed.emit()

    def forget_recent(self, path: str) -> None:
        resolved = str(Path(path).resolve())
        paths = [p for p in self.recent_files() if p not in (path, resolved)]
        QSettings().setValue(RECENT_KEY, paths)
        self.changed.emit()

    def clear_recent(self) -> None:
        QSettings().setValue(RECENT_KEY, [])
        self.changed.emit()

    # ---- autosave and recovery ------------------------------------------------------------
    def autosave_now(self) -> bool:
        """Write the case to this session's recovery file if it changed since the last
        save or autosave; remove the recovery file when nothing is unsaved."""
        from model.case.file import save_case

        if not self.is_modified():
            self._remove_recovery_files()
            return False
        state = (self._window.undo_stack.index(), self._state())
        if state == self._last_autosaved_state and self.recovery_path.exists():
            return False
        try:
            self._hold_lock()
            save_case(self._window.case_for_saving(), self.recovery_path)
            self._meta_path.write_text(
                json.dumps({"case_path": self.path, "saved_at": time.time()}), encoding="utf-8"
            )
        except (LoopwrightError, OSError) as error:
            self._window.show_message(f"Autosave failed: {error}")
            return False
        self._last_autosaved_state = state
        return True

    def _hold_lock(self) -> None:
        if self._lock is None:
            self.recovery_path.parent.mkdir(parents=True, exist_ok=True)
            self._lock = QLockFile(_lock_path(self.recovery_path))
            self._lock.setStaleLockTime(0)
            self._lock.tryLock(0)

    def _remove_recovery_files(self) -> None:
        for path in (self.recovery_path, self._meta_path, Path(str(self.recovery_path) + ".bak")):
            with contextlib.suppress(OSError):
                path.unlink()
        self._last_autosaved_state = ()

    def clean_exit(self) -> None:
        """Remove this session's recovery files (the window closed properly)."""
        self._timer.stop()
        self._remove_recovery_files()
        if self._lock is not None:
            self._lock.unlock()
            self._lock = None

    def orphaned_recoveries(self) -> list[Path]:
        """Recovery files of sessions that ended without closing, newest first."""
        folder = recovery_dir()
        found = []
        for case_path in folder.glob(f"session-*{CASE_SUFFIX}"):
            if case_path == self.recovery_path:
                continue
            lock = QLockFile(_lock_path(case_path))
            lock.setStaleLockTime(0)
            if lock.tryLock(0):
                lock.unlock()
                found.append(case_path)
        return sorted(found, key=lambda p: p.stat().st_mtime, reverse=True)

    def offer_recovery(self) -> bool:
        """Offer each orphaned recovery file, newest first; True when one was opened."""
        from model.case.file import load_case

        for case_path in self.orphaned_recoveries():
            meta = _read_meta(case_path)
            origin = meta.get("case_path") or "an unsaved case"
            when = time.strftime("%Y-%m-%d %H:%M", time.localtime(case_path.stat().st_mtime))
            answer = QMessageBox.question(
                self._window,
                "Recover unsaved work",
                f"Loopwright did not close properly. Recover the copy of {origin} "
                f"autosaved at {when}?",
                QMessageBox.StandardButton.Yes | QMessageBox.StandardButton.No,
                QMessageBox.StandardButton.Yes,
            )
            if answer == QMessageBox.StandardButton.Yes:
                try:
                    case = load_case(case_path)
                except LoopwrightError as error:
                    self._show_error("Cannot recover case", error)
                else:
                    self._install(case, meta.get("case_path"))
                    self._recovered = True
                    self.changed.emit()
                    _remove_session(case_path)
                    return True
            _remove_session(case_path)
        return False


def _read_meta(case_path: Path) -> dict[str, Any]:
    meta_path = Path(str(case_path).removesuffix(CASE_SUFFIX) + ".json")
    try:
        data = json.loads(meta_path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    return data if isinstance(data, dict) else {}


def _remove_session(case_path: Path) -> None:
    stem = str(case_path).removesuffix(CASE_SUFFIX)
    for path in (
        case_path,
        Path(stem + ".json"),
        Path(_lock_path(case_path)),
        Path(str(case_path) + ".bak"),
    ):
        with contextlib.suppress(OSError):
            path.unlink()


def _lock_path(case_path: Path) -> str:
    """The lock file that a running session holds beside its recovery file."""
    return str(case_path).removesuffix(CASE_SUFFIX) + ".lock"
