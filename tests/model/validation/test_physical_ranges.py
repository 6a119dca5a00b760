"""Specs are checked after unit conversion against their physical range (issue 15)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from model.case.file import case_from_json, load_case
from model.errors import CaseFileError, InputError
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.solve.driver import solve_flowsheet
from model.validation.validate import validate_flowsheet

EXAMPLES = Path(__file__).resolve().parents[3] / "examples"


def _ammonia():
    return load_case(EXAMPLES / "ammonia_synthesis_loop.loop.json")


@pytest.mark.parametrize(
    ("block", "field", "value", "words"),
    [
        ("Loop cooler", "T", TypedQuantity(2.0**63, "K"), "at most 6000 K"),
        ("Loop cooler", "T", TypedQuantity(5.0, "K"), "at least 10 K"),
        ("Make-up gas", "P", TypedQuantity(1.7e308, "barg"), "finite"),
        ("Make-up gas", "P", TypedQuantity(1e20, "bar"), "at most 1e9 Pa"),
        ("Make-up gas", "total_flow", TypedQuantity(1e300, "kmol/h"), "at most 1e9 mol/s"),
    ],
)
def test_a_spec_out_of_its_physical_range_is_refused_naming_block_field_and_value(
    block, field, value, words
):
    case = _ammonia()
    before = case.flowsheet.block(block).specs[field]
    with pytest.raises(InputError) as caught:
        case.flowsheet.set_spec(block, field, value)
    message = str(caught.value)
    assert message.startswith(f"{block}.{field}: ") and words in message
    assert case.flowsheet.block(block).specs[field] == before  # nothing lost


def test_a_case_file_with_an_infinite_pressure_after_conversion_is_refused_at_load():
    # 1.7e308 barg is a finite number in the file but an infinite pressure in Pa; it
    # used to solve and report "converged" with P = inf on a stream.
    document = json.loads((EXAMPLES / "ammonia_synthesis_loop.loop.json").read_text("utf-8"))
    document["blocks"][0]["specs"]["P"]["value"] = 1.7e308
    with pytest.raises(CaseFileError) as caught:
        case_from_json(json.dumps(document))
    [problem] = caught.value.problems
    assert problem.path == "blocks[0].specs.P" and "finite" in problem.allowed


def test_a_feed_too_small_for_the_arithmetic_is_refused():
    # A feed of 1e-300 kmol/h used to report "solved" with mass, element and energy
    # closures of 0.56, 0.96 and 0.02.
    case = _ammonia()
    case.flowsheet.set_spec("Make-up gas", "total_flow", TypedQuantity(1e-300, "kmol/h"))
    errors = [i for i in validate_flowsheet(case.flowsheet) if i.is_error]
    assert [i.field for i in errors] == ["total_flow"]
    assert "Make-up gas.total_flow" in errors[0].message and "1e-12 mol/s" in errors[0].message
    assert solve_flowsheet(case.flowsheet).status == "needs input"


def test_component_flows_are_checked_after_conversion():
    case = _ammonia()
    case.flowsheet.set_spec("Make-up gas", "basis", "component flows")
    with pytest.raises(InputError, match=r"Make-up gas\.flows\[argon\]: .*at most 1e9"):
        case.flowsheet.set_spec(
            "Make-up gas", "flows", ComponentAmounts({"argon": 1e250}, "kmol/h")
        )


def test_a_block_that_fails_while_the_tears_iterate_gives_a_failed_result_not_an_error():
    # Found by fuzzing (issue 15): a pressure drop larger than the inlet pressure raised
    # CalculationError out of solve_flowsheet, which promises never to raise.
    case = load_case(EXAMPLES / "shift_feed_effluent_exchanger.loop.json")
    case.flowsheet.set_spec(
        "Feed-effluent exchanger", "cold_pressure_drop", TypedQuantity(300.0, "bar")
    )
    solution = solve_flowsheet(case.flowsheet, case.method, case.settings)
    assert solution.status == "failed" and not solution.converged
    assert "Feed-effluent exchanger" in solution.message and "pressure drop" in solution.message
    assert any(i.block == "Feed-effluent exchanger" for i in solution.issues if i.is_error)
