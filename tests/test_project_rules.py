"""The project's own rules, checked by the same test command as everything else."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from tests.import_graph import import_circles, import_graph

ROOT = Path(__file__).resolve().parents[1]


def _tool(name: str) -> str:
    """Find a console tool installed beside this Python (the venv's bin folder)."""
    candidate = Path(sys.executable).parent / name
    found = str(candidate) if candidate.exists() else shutil.which(name)
    if found is None:
        pytest.fail(f"{name} is not installed; install the test extras: pip install -e '.[test]'")
    return found


def test_layer_contracts_hold() -> None:
    """DESIGN.md layers, as import-linter contracts in pyproject.toml."""
    run = subprocess.run(
        [_tool("lint-imports"), "--no-cache"], cwd=ROOT, capture_output=True, text=True
    )
    assert run.returncode == 0, run.stdout + run.stderr


def test_ruff_is_clean() -> None:
    run = subprocess.run(
        [_tool("ruff"), "check", "gui", "model", "convergence", "units_of_measure", "tests"],
        cwd=ROOT,
        capture_output=True,
        text=True,
    )
    assert run.returncode == 0, run.stdout + run.stderr


def test_model_imports_without_qt() -> None:
    """The model and the numerics load in a process that never sees Qt."""
    code = (
        "import sys, model.cli, model.case, model.solve, model.report, convergence;"
        "import units_of_measure;"
        "bad = [m for m in sys.modules if m.startswith(('PySide6', 'pyqtgraph'))];"
        "print(bad); sys.exit(1 if bad else 0)"
    )
    run = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True)
    assert run.returncode == 0, run.stdout + run.stderr


def test_no_module_imports_one_that_imports_it_back() -> None:
    """A file stands above everything it imports, also through lazy and typing imports."""
    assert import_circles(ROOT) == []


def test_the_import_graph_sees_lazy_and_typing_imports() -> None:
    # the graph the circle check relies on: a function-level import (the window's solve
    # controller imports the targets' solve when a solve starts), a submodule imported by name
    # from its package, and an ordinary import
    graph = import_graph(ROOT)
    assert graph.has_edge("gui.solve_controller", "model.solve.targets")
    assert graph.has_edge("model.flowsheet.spec_checks", "model.flowsheet.value_checks")
    assert graph.has_edge("gui.files", "gui.window_host")


def test_the_command_line_loads_scipy_optimize_only_when_a_run_needs_it() -> None:
    """Start-up (issue 14): scipy.optimize (~200 ms) is for tears and the second opinion."""
    code = (
        "import sys, model.cli, model.case.file;"
        "print([m for m in sys.modules if m.startswith('scipy.optimize')])"
    )
    run = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True)
    assert run.returncode == 0, run.stderr
    assert run.stdout.strip() == "[]"


def test_package_faces_import_their_modules_only_when_a_name_is_used() -> None:
    """A lazy face (model/lazy.py): the diagram need not load the spreadsheet writer."""
    code = (
        "import sys, model.report.stream_numbers, model.solve.passes;"
        "heavy = ('model.report.xlsx', 'openpyxl', 'model.solve.second_opinion_solve');"
        "print([m for m in heavy if m in sys.modules]);"
        "from model.report import workbook_bytes;"
        "print('openpyxl' in sys.modules)"
    )
    run = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True)
    assert run.returncode == 0, run.stderr
    assert run.stdout.split() == ["[]", "True"]
