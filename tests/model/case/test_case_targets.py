"""Targets in the case file (format version 2), and version-1 files migrated."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from model.case.file import CASE_VERSION, case_from_dict, case_to_json, load_case, save_case
from model.errors import CaseFileError
from model.flowsheet.spec_values import TypedQuantity
from model.flowsheet.target_definition import Target, parse_result_address, parse_spec_address

EXAMPLE = Path(__file__).resolve().parents[3] / "examples" / "ammonia_loop_fixed_split.loop.json"


def _argon_target() -> Target:
    """The ammonia example's own target (purge fraction for 8 mol % argon)."""
    (target,) = load_case(EXAMPLE).flowsheet.targets
    assert str(target.adjusted) == "Purge splitter.fractions[out2]"
    return target


def _data() -> dict:
    return json.loads(EXAMPLE.read_text("utf-8"))


def test_targets_are_saved_and_read_back(tmp_path: Path):
    case = load_case(EXAMPLE)
    cooler = Target(
        parse_spec_address("Loop cooler.T"),
        -30.0,
        0.0,
        "degC",
        parse_result_address("Loop cooler.duty"),
        TypedQuantity(-5.0, "MW"),
        1e-6,
    )
    case.flowsheet.set_targets([_argon_target(), cooler])
    path = tmp_path / "with targets.loop.json"
    save_case(case, path)
    data = json.loads(path.read_text("utf-8"))
    assert data["version"] == CASE_VERSION == 3
    assert data["targets"][0]["adjusted"] == "Purge splitter.fractions[out2]"
    assert load_case(path).flowsheet.targets == [_argon_target(), cooler]


def test_a_version_1_file_opens_with_no_targets_and_saves_as_version_2(tmp_path: Path):
    data = _data()
    data["version"] = 1
    data.pop("targets", None)
    case = case_from_dict(data)
    assert case.flowsheet.targets == []
    assert json.loads(case_to_json(case))["version"] == 3


def test_a_version_1_file_with_a_targets_key_keeps_it():
    """Version 1 had no targets, so we never wrote the key there; a file that has it
    anyway keeps it (the migration adds the key only where it is missing, then the
    checks read it like any version-2 file)."""
    data = _data()
    data["version"] = 1
    data["targets"] = [_argon_target().to_dict()]
    assert case_from_dict(data).flowsheet.targets == [_argon_target()]


@pytest.mark.parametrize(
    ("change", "path", "words"),
    [
        ({"adjusted": "no dot"}, "targets[0].adjusted", "BLOCK.FIELD"),
        ({"measured": "Purge.colour"}, "targets[0].measured", "QUANTITY one of"),
        ({"lower": "low"}, "targets[0].lower", "a number"),
        ({"wanted": {"value": 8}}, "targets[0].wanted.unit", "required"),
        ({"extra": 1}, "targets[0].extra", "a key here is one of"),
    ],
)
def test_a_bad_target_is_reported_with_its_json_path(change, path, words):
    data = _data()
    data["targets"] = [{**_argon_target().to_dict(), **change}]
    with pytest.raises(CaseFileError) as caught:
        case_from_dict(data)
    problems = {problem.path: str(problem) for problem in caught.value.problems}
    assert path in problems, problems
    assert words in problems[path]


def test_a_target_naming_a_removed_block_still_opens():
    data = _data()
    target = {**_argon_target().to_dict(), "adjusted": "Gone splitter.fractions[out2]"}
    data["targets"] = [target]
    case = case_from_dict(data)
    assert str(case.flowsheet.targets[0].adjusted) == "Gone splitter.fractions[out2]"
    solution = case.solve()
    assert solution.status == "needs input"
    assert "Gone splitter" in solution.message
