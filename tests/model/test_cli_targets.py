"""``loopwright solve`` on a case with targets: text lines and the JSON entry."""

from __future__ import annotations

import json
from pathlib import Path

from model.case.file import load_case, save_case
from model.cli import main
from model.flowsheet.spec_values import TypedQuantity
from model.flowsheet.target_definition import Target, parse_result_address, parse_spec_address
from tests.model.solve.ammonia_closed_form import example_loop

EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "ammonia_loop_fixed_split.loop.json"


def _case_with_target(tmp_path: Path, wanted: float) -> Path:
    case = load_case(EXAMPLE)
    target = Target(
        parse_spec_address("Purge splitter.fractions[out2]"),
        0.005,
        0.2,
        "",
        parse_result_address("Recycle gas.mole_fraction[argon]"),
        TypedQuantity(wanted, "%"),
    )
    case.flowsheet.set_targets([target])
    path = tmp_path / "target.loop.json"
    save_case(case, path)
    return path


def test_solve_prints_and_jsons_the_target(tmp_path: Path, capsys):
    path = _case_with_target(tmp_path, 8.0)
    assert main(["solve", str(path)]) == 0
    out = capsys.readouterr().out
    assert "Targets:" in out
    assert "target 1: Recycle gas.mole_fraction[argon] = 8 %: met" in out
    assert main(["solve", str(path), "--json"]) == 0
    entry = json.loads(capsys.readouterr().out)["targets"]
    (result,) = entry["results"]
    # rel 1e-6 against the closed form (tests/model/solve/ammonia_closed_form.py)
    expected = example_loop(load_case(EXAMPLE)).purge_for_argon(0.08)
    assert abs(result["adjusted"] - expected) <= 1e-6 * expected
    assert entry["outer_iterations"] == result["iterations"] > 0


def test_an_unreachable_target_exits_1_and_no_targets_solves_the_specs(tmp_path, capsys):
    path = _case_with_target(tmp_path, 40.0)
    assert main(["solve", str(path)]) == 1
    assert "not reachable within the limits" in capsys.readouterr().out
    assert main(["solve", str(path), "--no-targets"]) == 0
