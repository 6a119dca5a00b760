"""DEVELOPERS.md's "How a solve flows" names what a solve really passes through."""

from __future__ import annotations

import importlib
import re
import sys
import types
from pathlib import Path

import pytest

from model.case.file import load_case
from model.report.table import stream_table
from model.report.text import solution_report

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "examples" / "ammonia_loop_fixed_split.loop.json"


def _section() -> str:
    text = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    start = text.index("### How a solve flows")
    return text[start : text.index("\n### ", start + 1)]


def _named_objects() -> dict[str, object]:
    """Every ``model.…`` or ``convergence.…`` dotted name of the section, resolved."""
    names = set(re.findall(r"`((?:model|convergence)(?:\.\w+)+)", _section()))
    resolved = {}
    for name in sorted(names):
        parts = name.split(".")
        for cut in range(len(parts), 0, -1):
            try:
                target: object = importlib.import_module(".".join(parts[:cut]))
            except ModuleNotFoundError:
                continue
            for attribute in parts[cut:]:
                target = getattr(target, attribute)
            resolved[name] = target
            break
    return resolved


def test_every_name_in_the_solve_flow_exists() -> None:
    names = set(re.findall(r"`((?:model|convergence)(?:\.\w+)+)", _section()))
    assert len(names) >= 12
    assert set(_named_objects()) == names


def test_a_solve_calls_every_function_the_section_names() -> None:
    functions = {
        name: obj.__code__
        for name, obj in _named_objects().items()
        if isinstance(obj, types.FunctionType)
    }
    called: set[types.CodeType] = set()

    def profile(frame, event, arg):  # noqa: ARG001 (sys.setprofile's signature)
        if event == "call":
            called.add(frame.f_code)

    sys.setprofile(profile)
    try:
        case = load_case(EXAMPLE)
        solution = case.solve()
        stream_table(solution, case.unit_system)
        solution_report(solution, case.unit_system)
    finally:
        sys.setprofile(None)
    assert solution.converged
    missed = sorted(name for name, code in functions.items() if code not in called)
    assert missed == [], f"named in DEVELOPERS.md but not called by a solve: {missed}"


@pytest.mark.parametrize("method", ["Case.solve", "TearProblem.make_start", "TearProblem.finish"])
def test_methods_the_section_names_exist(method: str) -> None:
    assert method in _section()
    from model.case.document import Case
    from model.solve.tear_problem import TearProblem

    owner, attribute = method.split(".")
    assert callable(getattr({"Case": Case, "TearProblem": TearProblem}[owner], attribute))
