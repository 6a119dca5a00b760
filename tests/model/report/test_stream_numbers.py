"""Stream numbers: given once, kept through undo-style reinsertion, saved and reread."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from model.case.document import Case
from model.case.file import case_from_dict, case_to_dict, load_case
from model.errors import CaseFileError, InputError
from model.flowsheet.document import Flowsheet
from model.report.stream_numbers import numbered_stream_order, stream_label, stream_numbers

EXAMPLES = Path(__file__).resolve().parents[3] / "examples"


def _chain(count: int) -> Flowsheet:
    """Feed, ``count - 1`` heaters and a product joined by ``count`` streams S1 ... Sn."""
    sheet = Flowsheet()
    names = ["feed", *(f"heater {i}" for i in range(1, count)), "product"]
    sheet.add_block("Feed", names[0])
    for name in names[1:-1]:
        sheet.add_block("Heater", name)
    sheet.add_block("Product", names[-1])
    for source, target in zip(names, names[1:], strict=False):
        sheet.connect(source, "out", target, "in")
    return sheet


def test_each_new_stream_gets_the_next_number() -> None:
    sheet = _chain(3)
    assert stream_numbers(sheet) == {"S1": 1, "S2": 2, "S3": 3}


def test_a_number_stays_with_its_stream_when_others_go_and_come_back() -> None:
    sheet = _chain(4)
    removed = sheet.remove_stream("S2")
    assert stream_numbers(sheet) == {"S1": 1, "S3": 3, "S4": 4}  # no renumbering
    sheet.insert_stream(removed)  # what undo does: the same object back
    assert stream_numbers(sheet)["S2"] == 2
    assert list(sheet.streams)[-1] == "S2"  # the document's order changed ...
    assert numbered_stream_order(sheet) == ["S1", "S2", "S3", "S4"]  # ... the numbers did not


def test_a_new_stream_after_a_deletion_gets_a_number_above_the_highest() -> None:
    sheet = _chain(3)
    sheet.remove_stream("S2")
    sheet.connect("heater 1", "out", "heater 2", "in", "new")
    assert sheet.streams["new"].number == 4


def test_a_taken_or_bad_number_is_refused_with_the_field_named() -> None:
    sheet = _chain(3)
    stream = sheet.remove_stream("S3")
    stream.number = 1
    with pytest.raises(InputError, match=r"S3\.number.*S1 has it"):
        sheet.insert_stream(stream)
    stream.number = 0
    with pytest.raises(InputError, match=r"S3\.number.*whole number of 1 or more"):
        sheet.insert_stream(stream)
    assert "S3" not in sheet.streams


def test_numbers_are_saved_and_read_back() -> None:
    sheet = _chain(3)
    sheet.remove_stream("S1")
    sheet.connect("feed", "out", "heater 1", "in", "S1")  # now number 4
    data = case_to_dict(Case(flowsheet=sheet))
    assert [s["number"] for s in data["streams"]] == [2, 3, 4]
    again = case_from_dict(json.loads(json.dumps(data)))
    assert stream_numbers(again.flowsheet) == {"S2": 2, "S3": 3, "S1": 4}


def test_a_file_without_numbers_numbers_its_streams_in_file_order_above_the_given() -> None:
    data = case_to_dict(Case(flowsheet=_chain(4)))
    data["streams"][0].pop("number")
    data["streams"][2]["number"] = None
    data["streams"][1]["number"] = 7
    case = case_from_dict(data)
    assert stream_numbers(case.flowsheet) == {"S1": 8, "S2": 7, "S3": 9, "S4": 4}


def test_a_bad_number_in_a_file_is_reported_with_its_path() -> None:
    data = case_to_dict(Case(flowsheet=_chain(2)))
    data["streams"][1]["number"] = "two"
    with pytest.raises(CaseFileError) as error:
        case_from_dict(data)
    assert "streams[1].number" in str(error.value) and "whole number" in str(error.value)
    data["streams"][1]["number"] = 1  # the same as S1's
    with pytest.raises(CaseFileError, match="S1 has it"):
        case_from_dict(data)


def test_every_example_numbers_its_streams_one_to_n_in_process_order() -> None:
    for path in sorted(EXAMPLES.glob("*.loop.json")):
        sheet = load_case(path).flowsheet
        assert sorted(stream_numbers(sheet).values()) == list(range(1, len(sheet.streams) + 1))
    ammonia = load_case(EXAMPLES / "ammonia_synthesis_loop.loop.json").flowsheet
    assert numbered_stream_order(ammonia)[:2] == ["Make-up", "Converter feed"]


def test_the_label_puts_the_number_before_the_users_name() -> None:
    assert stream_label(3, "Recycle gas") == "3 · Recycle gas"
    assert stream_label(None, "S1") == "S1"
