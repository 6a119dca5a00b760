"""Targets and sweeps from the window: the targets dialog, F5 meeting the target with
the monitor's third plot, using the adjusted value, and the sweep dialog's live plot."""

from __future__ import annotations

import csv
import io

import pytest

from tests.model.solve.ammonia_closed_form import example_loop

pytestmark = pytest.mark.gui
ARGON = "Recycle gas.mole_fraction[argon]"


def _open(window, example_path):
    assert window.files.open_path(str(example_path("ammonia_loop_fixed_split")))
    return window.case


def test_f5_meets_the_examples_target_and_the_monitor_plots_its_residual(
    qtbot, window, example_path
):
    case = _open(window, example_path)
    expected = example_loop(case).purge_for_argon(0.08)  # closed form, derived there
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.start_solve()
    solution = window.case.solution
    assert window.status.state() == "solved"
    (result,) = solution.targets.results
    assert abs(result.adjusted - expected) <= 1e-6 * expected  # target tolerance 1e-7
    label = "target 1: " + ARGON
    xs, ys = window.monitor.target_plot.data[label]
    assert window.monitor.target_plot.plot.isVisibleTo(window.monitor)  # a targets run: shown
    assert len(xs) == solution.targets.outer_iterations and ys[-1] <= 1e-7
    # the document keeps its spec until the user takes the adjusted value (one undo step)
    splitter = window.case.flowsheet.blocks["Purge splitter"]
    assert splitter.specs["fractions"] == {"out2": 0.02}
    assert window.use_adjusted_values() == 1
    assert splitter.specs["fractions"]["out2"] == pytest.approx(result.adjusted, rel=1e-12)
    window.undo_stack.undo()
    assert splitter.specs["fractions"] == {"out2": 0.02}


def test_targets_dialog_adds_a_target_as_one_undo_step(qtbot, window, example_path):
    from gui.targets_dialog import TargetsDialog

    case = _open(window, example_path)
    dialog = TargetsDialog(case.flowsheet)
    qtbot.addWidget(dialog)
    assert dialog.table.rowCount() == 1  # the example's own target
    row = dialog.add_row()
    dialog.set_row(
        row,
        {0: "Loop cooler.T", 1: "-40", 2: "0", 4: "Loop cooler.duty", 5: "-10", 6: "MW"},
    )
    targets = dialog.read_targets()
    assert targets[1].unit == "degC"  # the spec's own unit where none is typed
    assert str(targets[1].measured) == "Loop cooler.duty"
    dialog.set_row(row, {1: "cold"})
    with pytest.raises(ValueError, match="target 2: lower: 'cold' is not a number"):
        dialog.read_targets()
    dialog.set_row(row, {0: "no dot"})
    dialog.accept()
    assert "target 2" in dialog.message.text() and "'no dot'" in dialog.message.text()
    assert dialog.result() == 0  # not accepted: still open, rows kept
    assert dialog.table.rowCount() == 2


def test_sweep_dialog_runs_off_the_gui_thread_plots_live_and_exports_csv(
    qtbot, window, example_path, tmp_path, screenshot_dir
):
    _open(window, example_path)
    window.resize(1400, 900)
    dialog = window.show_sweep()
    dialog.spec_1.setCurrentText("Converter.reactions[1].conversion")
    dialog.values_1.setText("0.15:0.35:5")
    dialog.records.setPlainText("Recycle gas.total_flow\nPurge.total_flow")
    dialog.workers.setValue(1)
    assert dialog.start()
    assert dialog.is_running()
    qtbot.waitUntil(lambda: not dialog.is_running(), timeout=120000)
    assert dialog.result.complete and not dialog.result.not_converged
    assert dialog.progress.value() == 5
    curve = dialog._curves[(0, 0.0)]
    xs, ys = curve.getData()
    assert list(xs) == [0.15, 0.2, 0.25, 0.3, 0.35]
    # more conversion per pass, less gas to recycle (the target holds argon at 8 %)
    assert all(a > b for a, b in zip(ys, ys[1:], strict=False))
    path = tmp_path / "sweep.csv"
    assert dialog.export_csv(str(path))
    rows = list(csv.reader(io.StringIO(path.read_text("utf-8"))))
    assert rows[1][0] == "Converter.reactions[1].conversion"
    assert len(rows) == 2 + 5
    qtbot.wait(50)
    assert dialog.grab().save(str(screenshot_dir / "sweep_dialog.png"))


def test_sweep_dialog_names_what_it_could_not_read(qtbot, window, example_path):
    _open(window, example_path)
    dialog = window.show_sweep()
    dialog.spec_1.setCurrentText("Converter.reactions[1].conversion")
    dialog.values_1.setText("0.1:0.3:many")
    dialog.records.setPlainText(ARGON)
    assert not dialog.start()
    assert "'many'" in dialog.message.text()
