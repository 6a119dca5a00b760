"""Targets met by the outer loop, checked against the ammonia loop's closed form.

The closed form (argon in = argon purged, and the other balances of the loop) is derived
in tests/model/solve/ammonia_closed_form.py.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from convergence import SolverSettings
from model.case.file import load_case
from model.flowsheet.spec_values import TypedQuantity
from model.flowsheet.target_definition import Target, parse_result_address, parse_spec_address
from model.solve.targets import solve_with_targets
from tests.model.solve.ammonia_closed_form import example_loop

EXAMPLE = Path(__file__).resolve().parents[3] / "examples" / "ammonia_loop_fixed_split.loop.json"
KMOL_H = 1000.0 / 3600.0  # mol/s per kmol/h (NIST SP 811: 1 h = 3600 s)


def _target(adjusted, lower, upper, measured, wanted, unit="", wanted_unit="%"):
    return Target(
        parse_spec_address(adjusted),
        lower,
        upper,
        unit,
        parse_result_address(measured),
        TypedQuantity(wanted, wanted_unit),
    )


def _argon(wanted=8.0, lower=0.005, upper=0.2):
    return _target(
        "Purge splitter.fractions[out2]",
        lower,
        upper,
        "Recycle gas.mole_fraction[argon]",
        wanted,
    )


@pytest.fixture
def case():
    case = load_case(EXAMPLE)
    case.flowsheet.set_targets([])
    return case


def test_purge_for_8_percent_argon_matches_the_closed_form(case):
    expected = example_loop(case).purge_for_argon(0.08)
    solution = solve_with_targets(case.flowsheet, targets=[_argon()])
    assert solution.converged, solution.message
    (result,) = solution.targets.results
    assert result.status == "met"
    # rel 1e-6: the target tolerance (1e-7 relative on the argon fraction, which varies
    # about as 1 / purge fraction) and the recycle tolerance 1e-8 lie below it
    assert result.adjusted == pytest.approx(expected, rel=1e-6)
    assert result.measured == pytest.approx(0.08, rel=1e-7)
    assert result.iterations == solution.targets.outer_iterations >= 3
    argon_index = case.flowsheet.component_names().index("argon")
    argon = solution.streams["Recycle gas"].mole_fractions()[argon_index]
    assert argon == pytest.approx(0.08, rel=1e-7)


def test_the_document_is_not_changed_by_the_outer_loop(case):
    before = case.flowsheet.blocks["Purge splitter"].specs["fractions"]
    solve_with_targets(case.flowsheet, targets=[_argon()])
    assert case.flowsheet.blocks["Purge splitter"].specs["fractions"] == before


def test_a_wanted_value_beyond_the_limits_is_not_reachable_with_both_end_values(case):
    loop = example_loop(case)
    solution = solve_with_targets(case.flowsheet, targets=[_argon(30.0, 0.015, 0.2)])
    (result,) = solution.targets.results
    assert not solution.converged and solution.status == "not converged"
    assert result.status == "not reachable"
    assert "not reachable within the limits" in result.message
    # both ends against the closed form's argon fraction at each purge fraction
    # (rtol 1e-7: recycle solves converged to 1e-8)
    assert result.at_lower == pytest.approx(loop.argon_fraction(0.015), rel=1e-7)
    assert result.at_upper == pytest.approx(loop.argon_fraction(0.2), rel=1e-7)
    assert "10.3686 %" in result.message and "1.31108 %" in result.message


def test_two_targets_purge_and_make_up_flow_match_the_closed_form(case):
    """Every flow of the loop scales with the make-up flow at a fixed purge fraction, so
    150 kmol/h of liquid ammonia needs 300 kmol/h x 150 / (ammonia at 300 kmol/h)."""
    loop = example_loop(case)
    purge = loop.purge_for_argon(0.08)
    make_up = 300.0 * 150.0 / loop.liquid_ammonia(purge)
    flow = _target(
        "Make-up gas.total_flow",
        100.0,
        600.0,
        "Ammonia.total_flow",
        150.0,
        unit="kmol/h",
        wanted_unit="kmol/h",
    )
    solution = solve_with_targets(case.flowsheet, targets=[_argon(), flow])
    assert solution.converged, solution.message
    argon, ammonia = solution.targets.results
    assert argon.adjusted == pytest.approx(purge, rel=1e-6)
    # rel 1e-6: the target tolerance is 1e-7 on the ammonia flow
    assert ammonia.adjusted == pytest.approx(make_up, rel=1e-6)
    assert ammonia.measured == pytest.approx(150.0 * KMOL_H, rel=1e-7)
    assert solution.targets.method == "broyden"


def test_outer_iterations_are_recorded_with_each_targets_residual(case):
    records = []
    solution = solve_with_targets(
        case.flowsheet, targets=[_argon()], callback=lambda record: records.append(record)
    )
    outer = [r for r in records if hasattr(r, "adjusted")]
    assert len(outer) == solution.targets.outer_iterations == len(solution.targets.history)
    label = "target 1: Recycle gas.mole_fraction[argon]"
    assert abs(outer[-1].residuals[label]) <= 1e-7
    assert outer[-1].adjusted[label] == pytest.approx(solution.targets.results[0].adjusted)


def test_a_stop_request_ends_the_outer_loop(case):
    settings = SolverSettings()
    solution = solve_with_targets(
        case.flowsheet, settings=settings, targets=[_argon()], callback=lambda record: True
    )
    assert not solution.converged
    assert solution.status == "stopped"


@pytest.mark.parametrize(
    ("target", "words"),
    [
        (_argon(8.0, 0.05, 0.2), ["Purge splitter.fractions[out2]", "0.02", "bracket"]),
        (
            _target("Nowhere.T", 200, 400, "Purge.T", 300, "K", "K"),
            ["Nowhere.T", "'Nowhere'", "name of a block"],
        ),
        (
            _target("Converter.mode", 0, 1, "Purge.T", 300, "", "K"),
            ["Converter.mode", "numeric spec"],
        ),
        (
            _target("Purge splitter.fractions[out2]", 0, 1, "Purge.T", 8, "", "%"),
            ["Purge.T wanted", "8 %"],
        ),
        (
            _target("Purge splitter.fractions[out2]", 0, 1, "Purge.mole_fraction[xenon]", 1),
            ["Purge.mole_fraction[xenon]", "'xenon'", "component"],
        ),
        (
            _target("Converter.reactions[2].conversion", 0, 1, "Purge.T", 300, "", "K"),
            ["Converter.reactions[2].conversion", "reaction number from 1 to 1"],
        ),
    ],
)
def test_bad_targets_are_refused_naming_block_field_and_value(case, target, words):
    solution = solve_with_targets(case.flowsheet, targets=[target])
    assert solution.status == "needs input"
    message = solution.issues[0].message
    for word in words:
        assert word in message, message


@pytest.mark.parametrize(
    "text", ["no dot", "Purge splitter.fractions[out2", "Converter.reactions[x].conversion"]
)
def test_an_address_that_cannot_be_read_is_named(text):
    with pytest.raises(ValueError, match="adjusted spec") as error:
        parse_spec_address(text)
    assert repr(text) in str(error.value)


def test_a_renamed_block_keeps_its_target(case):
    case.flowsheet.set_targets([_argon()])
    case.flowsheet.rename_block("Purge splitter", "Splitter A")
    case.flowsheet.rename_stream("Recycle gas", "Back")
    (target,) = case.flowsheet.targets
    assert str(target.adjusted) == "Splitter A.fractions[out2]"
    assert str(target.measured) == "Back.mole_fraction[argon]"
