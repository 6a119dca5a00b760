"""Bad input: every refused spec, connection or reaction names block, field, value, allowed.

Source of the rules: DESIGN.md "Block kinds" and issue 4 "Bad input" (a refused edit
leaves the flowsheet unchanged); the messages are checked for the four parts.
"""

from __future__ import annotations

import warnings

import pytest

from model.errors import InputError
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_checks import check_spec_value
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity
from model.properties.components import lookup_component
from model.validation.validate import block_state, block_states, validate_flowsheet


def _sheet(*names: str) -> Flowsheet:
    sheet = Flowsheet()
    for name in names or ("nitrogen", "hydrogen", "ammonia"):
        sheet.add_component(lookup_component(name))
    return sheet


def _refused(sheet: Flowsheet, block: str, field: str, value, *words: str) -> InputError:
    """set_spec refuses, the message has every word, the block is unchanged, no signal."""
    before = dict(sheet.block(block).specs)
    seen = []
    sheet.block_specs_changed.connect(lambda *args: seen.append(args))
    with pytest.raises(InputError) as caught:
        sheet.set_spec(block, field, value)
    message = str(caught.value)
    assert caught.value.field.startswith(f"{block}.{field}")
    for word in words:
        assert word in message, message
    assert sheet.block(block).specs == before
    assert seen == []
    return caught.value


def test_conversion_above_one_is_refused_with_the_walkthrough_message():
    sheet = _sheet()
    sheet.add_block("Reactor", "R1")
    good = Reaction({"nitrogen": -1, "hydrogen": -3, "ammonia": 2}, "nitrogen", 0.25)
    sheet.set_spec("R1", "reactions", [good])
    bad = Reaction({"nitrogen": -1, "hydrogen": -3, "ammonia": 2}, "nitrogen", 1.2)
    error = _refused(
        sheet,
        "R1",
        "reactions",
        [bad],
        "R1.reactions[1].conversion",
        "1.2",
        "conversion must be a fraction between 0 and 1",
    )
    assert error.value == 1.2
    assert sheet.block("R1").specs["reactions"] == [good]  # the old value stays


def test_temperature_typed_in_kg_is_refused():
    sheet = _sheet()
    sheet.add_block("Heater", "H1")
    _refused(sheet, "H1", "T", TypedQuantity(300.0, "kg"), "H1.T", "300", "kg", "a temperature")


def test_quantity_ranges_are_refused():
    sheet = _sheet()
    sheet.add_block("Heater", "H1")
    _refused(sheet, "H1", "T", TypedQuantity(-300.0, "degC"), "H1.T", "absolute zero")
    _refused(
        sheet,
        "H1",
        "pressure_drop",
        TypedQuantity(-1.0, "bar"),
        "H1.pressure_drop",
        "zero or positive",
    )
    _refused(sheet, "H1", "pressure_drop", TypedQuantity(1.0, "barg"), "H1.pressure_drop", "gauge")
    _refused(sheet, "H1", "T", 300.0, "H1.T", "a number with its unit")


def test_typed_text_below_absolute_zero_keeps_the_unit_layers_reason():
    # absolute zero is 0 K = -273.15 degC (NIST SP 811); the reason comes from
    # units_of_measure, the field, the text and what is allowed from the check
    sheet = _sheet()
    sheet.add_block("Heater", "H1")
    error = _refused(
        sheet, "H1", "T", "-300 degC", "H1.T", "'-300 degC'", "at or above absolute zero"
    )
    assert error.value == "-300 degC"
    _refused(sheet, "H1", "T", "300 kg", "H1.T", "'300 kg'", "a temperature such as degC")
    _refused(sheet, "H1", "pressure_drop", "1 barg", "H1.pressure_drop", "gauge")
    _refused(sheet, "H1", "pressure_drop", "-1 bar", "H1.pressure_drop", "zero or positive")
    sheet.add_block("Feed", "F1")
    _refused(sheet, "F1", "total_flow", "3 degC", "F1.total_flow", "a molar flow such as")
    _refused(sheet, "F1", "total_flow", "-3 t/h", "F1.total_flow", "zero or positive")


def test_typed_text_that_reads_is_stored_in_the_unit_typed():
    sheet = _sheet()
    sheet.add_block("Heater", "H1")
    sheet.add_block("Feed", "F1")
    sheet.set_spec("H1", "T", "\u221240 degC")  # a typographic minus, as pasted
    assert sheet.block("H1").specs["T"] == TypedQuantity(-40.0, "degC")
    sheet.set_spec("F1", "total_flow", " 12.5 t/h ")
    assert sheet.block("F1").specs["total_flow"] == TypedQuantity(12.5, "t/h")


def test_choice_outside_the_list_is_refused():
    sheet = _sheet()
    sheet.add_block("Heater", "H1")
    _refused(
        sheet, "H1", "mode", "sideways", "H1.mode", "'sideways'", "'outlet temperature'", "'duty'"
    )


def test_unknown_component_in_a_spec_is_refused():
    sheet = _sheet()
    sheet.add_block("Feed", "F1")
    _refused(
        sheet,
        "F1",
        "flows",
        ComponentAmounts({"argon": 1.0}, "kmol/h"),
        "F1.flows",
        "'argon'",
        "nitrogen, hydrogen, ammonia",
    )


def test_feed_flows_need_a_flow_unit_and_no_negative_flow():
    sheet = _sheet()
    sheet.add_block("Feed", "F1")
    _refused(
        sheet,
        "F1",
        "flows",
        ComponentAmounts({"nitrogen": 1.0}, "degC"),
        "F1.flows.unit",
        "degC",
        "molar flow unit",
    )
    _refused(
        sheet,
        "F1",
        "flows",
        ComponentAmounts({"nitrogen": -1.0}, "kmol/h"),
        "F1.flows[nitrogen]",
        "-1.0",
        "zero or more",
    )
    sheet.set_spec("F1", "flows", ComponentAmounts({"nitrogen": 1.0}, "t/h"))  # mass is fine


def test_composition_must_sum_to_one_and_is_normalised_within_1e_6():
    sheet = _sheet()
    sheet.add_block("Feed", "F1")
    _refused(
        sheet,
        "F1",
        "composition",
        ComponentAmounts({"nitrogen": 0.5, "hydrogen": 0.4}, "mole fraction"),
        "F1.composition",
        "0.9",
        "sum to 1",
    )
    sheet.set_spec(
        "F1",
        "composition",
        ComponentAmounts({"nitrogen": 0.25, "hydrogen": 0.7500005}, "mole fraction"),
    )
    stored = sheet.block("F1").specs["composition"]
    assert sum(stored.values.values()) == pytest.approx(1.0, abs=1e-15)


def test_separator_split_out_of_range_is_refused():
    sheet = _sheet()
    sheet.add_block("Separator", "S1")
    _refused(
        sheet,
        "S1",
        "split",
        ComponentAmounts({"ammonia": 1.05}, "fraction to first outlet"),
        "S1.split[ammonia]",
        "1.05",
        "between 0 and 1",
    )


def test_splitter_fractions_over_one_are_refused():
    sheet = _sheet()
    sheet.add_block("Splitter", "T1")
    _refused(
        sheet,
        "T1",
        "fractions",
        {"out1": 0.7, "out2": 0.4},
        "T1.fractions",
        "1.1",
        "not sum to more than 1",
    )
    _refused(sheet, "T1", "fractions", {"left": 0.5}, "T1.fractions[left]", "out1")


def test_unbalanced_reaction_is_refused_with_the_net_atoms():
    sheet = _sheet()
    sheet.add_block("Reactor", "R1")
    unbalanced = Reaction({"nitrogen": -1, "hydrogen": -3, "ammonia": 1}, "nitrogen", 0.5)
    _refused(
        sheet,
        "R1",
        "reactions",
        [unbalanced],
        "R1.reactions[1].stoichiometry",
        "element-balanced",
        "H -3",
        "N -1",
    )


def test_huge_stoichiometric_coefficients_are_refused_without_numpy_warnings():
    sheet = _sheet()
    sheet.add_block("Reactor", "R1")
    huge = Reaction({"nitrogen": -1e300, "hydrogen": -3e300, "ammonia": 2e300}, "nitrogen", 0.5)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # an overflow warning would fail here
        _refused(
            sheet,
            "R1",
            "reactions",
            [huge],
            "R1.reactions[1].stoichiometry[nitrogen]",
            "-1e+300",
            "between -1e+06 and 1e+06",
        )
        sheet.block("R1").specs["reactions"] = [huge]  # as an old file could hold it
        messages = [i.message for i in validate_flowsheet(sheet) if i.field == "reactions"]
    assert any("stoichiometry[nitrogen]" in m and "1e+06" in m for m in messages)
    # a large but balanced reaction stays acceptable: N2 + 3 H2 -> 2 NH3, times 2.5e5
    scaled = Reaction({"nitrogen": -2.5e5, "hydrogen": -7.5e5, "ammonia": 5e5}, "nitrogen", 0.5)
    sheet.set_spec("R1", "reactions", [scaled])


def test_key_must_be_a_reactant():
    sheet = _sheet()
    sheet.add_block("Reactor", "R1")
    reaction = Reaction({"nitrogen": -1, "hydrogen": -3, "ammonia": 2}, "ammonia", 0.5, "NH3")
    _refused(
        sheet,
        "R1",
        "reactions",
        [reaction],
        "R1.reactions[1].key (NH3)",
        "'ammonia'",
        "nitrogen, hydrogen",
    )


def test_check_spec_value_returns_the_value_to_store():
    sheet = _sheet()
    block = sheet.add_block("Heater", "H1")
    spec_field = block.block_kind.field("T")
    value = TypedQuantity(25.0, "degC")
    assert check_spec_value(sheet, block, spec_field, value) is value


def test_empty_flowsheet_reports_no_components_and_no_blocks():
    issues = validate_flowsheet(Flowsheet())
    messages = " | ".join(i.message for i in issues)
    assert "no components" in messages and "diagram is empty" in messages
    assert all(i.is_error for i in issues)


def test_validate_reports_every_problem_at_once_with_block_and_field():
    sheet = _sheet()
    sheet.add_block("Feed", "F1")  # flows, T, P missing; outlet unconnected
    sheet.add_block("Mixer", "M1")  # no inlet, outlet unconnected
    sheet.add_block("Splitter", "T1", specs={"fractions": {"out1": 0.5, "out2": 0.3}})
    sheet.add_block("Product", "P1")
    sheet.add_block("Product", "P2")
    sheet.connect("M1", "out", "T1", "in")
    sheet.connect("T1", "out1", "P1", "in")
    sheet.connect("T1", "out2", "P2", "in")
    issues = validate_flowsheet(sheet)
    where = {(i.block, i.field) for i in issues if i.is_error}
    assert {
        ("F1", "flows"),
        ("F1", "T"),
        ("F1", "P"),
        ("F1", "out"),
        ("M1", "in1"),
        ("T1", "fractions"),
    } <= where
    splitter = next(i for i in issues if i.block == "T1")
    assert "sum to 0.8" in splitter.message and "must sum to 1" in splitter.message
    assert block_state(sheet, "F1") == "needs input"
    assert block_states(sheet)["P1"] == "ready"


def test_splitter_may_leave_one_outlet_out_but_not_two():
    sheet = _sheet()
    sheet.add_block("Splitter", "T1", specs={"fractions": {"out1": 0.5}})
    for port in ("out1", "out2", "out3"):
        sheet.add_block("Product", f"P{port}")
        sheet.connect("T1", port, f"P{port}", "in")
    issues = [i for i in validate_flowsheet(sheet) if i.block == "T1"]
    assert any("out2, out3 have no fraction" in i.message for i in issues)


def test_values_stored_without_set_spec_are_checked_by_validation():
    """A file (or an old case) can hold values set_spec would refuse today."""
    sheet = _sheet()
    bad = Reaction({"nitrogen": -1, "hydrogen": -3, "ammonia": 2}, "nitrogen", 1.5)
    sheet.add_block("Reactor", "R1", specs={"reactions": [bad], "T": TypedQuantity(5, "kg")})
    messages = [i.message for i in validate_flowsheet(sheet) if i.block == "R1"]
    assert any("R1.reactions[1].conversion" in m and "1.5" in m for m in messages)
    assert any(m.startswith("R1.T") and "kg" in m for m in messages)


def test_mixer_as_inlet_with_inlets_in_two_phases_asks_to_choose():
    sheet = _sheet()
    flows = ComponentAmounts({"ammonia": 1.0}, "mol/s")
    for name, phase in (("F1", "vapor"), ("F2", "liquid")):
        sheet.add_block(
            "Feed",
            name,
            specs={
                "flows": flows,
                "T": TypedQuantity(300, "K"),
                "P": TypedQuantity(20, "bar"),
                "phase": phase,
            },
        )
    sheet.add_block("Heater", "H1", specs={"T": TypedQuantity(310, "K")})  # phase as inlet
    sheet.add_block("Mixer", "M1")
    sheet.add_block("Product", "P1")
    sheet.connect("F1", "out", "M1", "in1", "S1")
    sheet.connect("F2", "out", "H1", "in", "S2")
    sheet.connect("H1", "out", "M1", "in2", "S3")
    sheet.connect("M1", "out", "P1", "in")
    issue = next(i for i in validate_flowsheet(sheet) if i.block == "M1")
    assert issue.field == "phase"
    assert "S1 vapor" in issue.message and "S3 liquid" in issue.message
    assert "choose the outlet phase" in issue.message
    sheet.set_spec("M1", "phase", "vapor")
    assert [i for i in validate_flowsheet(sheet) if i.is_error] == []
