"""Case files in the window: open, edit, save, reopen; bad files; the unsaved-changes
prompt; recent files; autosave and recovery after a crash."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest
from PySide6.QtWidgets import QFileDialog, QMessageBox

from model.case.file import case_to_dict

pytestmark = pytest.mark.gui
ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture
def captured_boxes(monkeypatch):
    """Every QMessageBox the window shows with exec(): (title, text, informative text)."""
    boxes = []

    def fake_exec(box):
        boxes.append((box.windowTitle(), box.text(), box.informativeText()))
        return QMessageBox.StandardButton.Ok

    monkeypatch.setattr(QMessageBox, "exec", fake_exec)
    return boxes


def answer_questions(monkeypatch, *answers):
    """Answer QMessageBox.question in turn; return the list of questions asked."""
    asked, queue = [], list(answers)

    def question(parent, title, text, *rest):
        asked.append(text)
        return queue.pop(0)

    monkeypatch.setattr(QMessageBox, "question", question)
    return asked


def test_open_edit_save_and_reopen_round_trips(qtbot, make_window, example_path, tmp_path):
    window = make_window()
    assert window.files.open_path(str(example_path("ethylene_hydration_two_recycles")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.start_solve()
    window.editor.move_blocks({"Vaporizer": ((320.0, 320.0), (330.0, 480.0))})
    window.set_unit_system("US customary")
    window.case.settings.update(q_min=-20.0)
    assert window.isWindowModified()
    target = tmp_path / "edited"
    assert window.files.save_as(str(target))  # the suffix is added
    saved = tmp_path / "edited.loop.json"
    assert saved.exists() and window.files.path == str(saved.resolve())
    assert not window.isWindowModified() and window.windowTitle().startswith("edited.loop.json")
    reopened = make_window()
    assert reopened.files.open_path(str(saved))
    assert case_to_dict(reopened.case) == case_to_dict(window.case)
    assert reopened.actions.unit_combo.currentText() == "US customary"
    assert reopened.status.state() == "solved"  # the last results came back with the case
    assert reopened.scene.block_item("Vaporizer").pos().y() == 480
    assert reopened.files.recent_files()[0] == str(saved.resolve())


def test_results_made_stale_by_an_edit_are_not_saved(qtbot, make_window, example_path, tmp_path):
    window = make_window()
    window.files.open_path(str(example_path("ethylene_hydration_two_recycles")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.start_solve()
    window.editor.rename("block", "Flash drum", "Flash vessel")  # results no longer match
    assert window.files.save_as(str(tmp_path / "renamed.loop.json"))
    reopened = make_window()
    assert reopened.files.open_path(str(tmp_path / "renamed.loop.json"))
    assert reopened.case.solution is None and reopened.status.state() == "not solved"
    assert "Flash vessel" in reopened.case.flowsheet.blocks


@pytest.mark.parametrize(
    "content, expected",
    [
        (b"{ not json", "valid JSON"),
        (
            json.dumps(
                {
                    "format": "loopwright-case",
                    "version": 1,
                    "components": [],
                    "blocks": [{"kind": "Boiler", "name": "B1"}],
                    "streams": [],
                }
            ).encode(),
            "Boiler",
        ),
    ],
)
def test_a_bad_case_file_shows_a_clear_message_and_leaves_the_window(
    qtbot, window, example_path, tmp_path, captured_boxes, content, expected
):
    window.files.open_path(str(example_path("shift_feed_effluent_exchanger")))
    window.editor.rename("block", next(iter(window.case.flowsheet.blocks)), "Edited")
    before = (
        window.case,
        window.files.path,
        case_to_dict(window.case),
        window.undo_stack.count(),
        window.windowTitle(),
    )
    bad = tmp_path / "bad.loop.json"
    bad.write_bytes(content)
    assert not window.files.open_path(str(bad))
    ((title, text, details),) = captured_boxes
    assert title == "Cannot open case" and "bad.loop.json" in text
    assert expected in details
    after = (
        window.case,
        window.files.path,
        case_to_dict(window.case),
        window.undo_stack.count(),
        window.windowTitle(),
    )
    assert after == before


def test_unsaved_changes_prompt_on_new_open_and_close(qtbot, window, monkeypatch, tmp_path):
    window.editor.add_block("Heater", 0, 0)
    asked = answer_questions(monkeypatch, QMessageBox.StandardButton.Cancel)
    assert not window.files.new_case()
    assert "Heater 1" in window.case.flowsheet.blocks and "unsaved changes" in asked[0]
    answer_questions(monkeypatch, QMessageBox.StandardButton.Cancel)
    window.close()
    assert window.isVisible()
    answer_questions(monkeypatch, QMessageBox.StandardButton.Save)
    monkeypatch.setattr(
        QFileDialog, "getSaveFileName", lambda *args: (str(tmp_path / "kept.loop.json"), "")
    )
    assert window.files.new_case()  # saved first, then the new case
    assert (tmp_path / "kept.loop.json").exists() and not window.case.flowsheet.blocks
    window.editor.add_block("Mixer", 0, 0)
    answer_questions(monkeypatch, QMessageBox.StandardButton.Discard)
    assert window.files.open_case(str(tmp_path / "kept.loop.json"))
    assert list(window.case.flowsheet.blocks) == ["Heater 1"]
    assert not window.isWindowModified()


def test_recent_files_menu_and_a_missing_recent_file(window, tmp_path, captured_boxes):
    path = tmp_path / "one.loop.json"
    window.editor.add_block("Feed", 0, 0)
    window.files.save_as(str(path))
    menu_texts = [a.text() for a in window.actions.recent_menu.actions()]
    assert any(str(path.resolve()) in text for text in menu_texts)
    path.unlink()
    recent_action = next(
        a for a in window.actions.recent_menu.actions() if str(path.resolve()) in a.text()
    )
    recent_action.trigger()
    assert captured_boxes and "readable case file" in captured_boxes[0][2]
    assert window.files.recent_files() == []


def test_autosave_writes_the_recovery_file_and_a_clean_exit_removes_it(window, monkeypatch):
    files = window.files
    assert not files.autosave_now()  # nothing unsaved: nothing written
    window.editor.add_block("Feed", 10, 20)
    assert files.autosave_now()
    assert files.recovery_path.exists()
    assert Path(os.environ["LOOPWRIGHT_RECOVERY_DIR"]) == files.recovery_path.parent
    assert files.orphaned_recoveries() == []  # its own and locked
    answer_questions(monkeypatch, QMessageBox.StandardButton.Discard)
    window.close()
    assert not files.recovery_path.exists()
    assert not list(files.recovery_path.parent.glob("session-*"))


CRASHING_SESSION = """
import os
from gui.app import application
from gui.main_window import MainWindow
app = application()
window = MainWindow(autosave_seconds=0)
window.editor.add_block("Heater", 120, 40)
window.editor.add_block("Product", 400, 40)
window.editor.connect_ports("Heater 1", "out", "Product 1", "in")
assert window.files.autosave_now()
os._exit(3)  # a crash: no clean exit, the lock's process is gone
"""


def test_recovery_after_a_crash_is_offered_at_the_next_start(qtbot, make_window, monkeypatch):
    environment = dict(os.environ, QT_QPA_PLATFORM="offscreen")
    crashed = subprocess.run(
        [sys.executable, "-c", CRASHING_SESSION], cwd=ROOT, env=environment, timeout=120
    )
    assert crashed.returncode == 3
    folder = Path(os.environ["LOOPWRIGHT_RECOVERY_DIR"])
    assert len(list(folder.glob("session-*.loop.json"))) == 1
    window = make_window()
    asked = answer_questions(monkeypatch, QMessageBox.StandardButton.Yes)
    assert window.files.offer_recovery()
    assert "did not close properly" in asked[0]
    assert sorted(window.case.flowsheet.blocks) == ["Heater 1", "Product 1"]
    assert window.scene.stream_item("S1") is not None
    assert window.isWindowModified() and window.files.path is None
    assert not list(folder.glob("session-*.loop.json"))  # offered once only
    second = make_window()
    assert not second.files.offer_recovery()
