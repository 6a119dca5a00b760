"""Long text is refused before any parsing or look-up, naming the field, length and limit."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from model.case.file import case_from_json
from model.errors import CaseFileError, InputError
from model.flowsheet.document import Flowsheet
from model.limits import FORMULA_LENGTH_LIMIT, NAME_LENGTH_LIMIT, NOTES_LENGTH_LIMIT
from model.properties.components import lookup_component
from model.properties.formula import parse_formula

EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "ammonia_synthesis_loop.loop.json"
LONG = "x" * 100_000


def test_a_block_name_of_100000_characters_is_refused_with_its_length():
    sheet = Flowsheet()
    with pytest.raises(InputError) as caught:
        sheet.add_block("Heater", LONG)
    message = str(caught.value)
    assert f"at most {NAME_LENGTH_LIMIT} characters" in message and "100000" in message
    assert len(message) < 300  # the error shows the start of the text, not all of it
    assert sheet.blocks == {}


def test_a_long_component_query_and_formula_are_refused_before_the_look_up():
    with pytest.raises(InputError, match=f"at most {NAME_LENGTH_LIMIT} characters"):
        lookup_component("methane" * 10_000)
    with pytest.raises(InputError, match=f"at most {FORMULA_LENGTH_LIMIT} characters"):
        parse_formula("CH4" * 50_000)


@pytest.mark.parametrize(
    ("path", "json_path", "limit"),
    [
        (("blocks", 0, "name"), "blocks[0].name", NAME_LENGTH_LIMIT),
        (("notes",), "notes", NOTES_LENGTH_LIMIT),
    ],
)
def test_a_case_file_with_a_long_text_is_refused_naming_the_json_path(path, json_path, limit):
    document = json.loads(EXAMPLE.read_text("utf-8"))
    node = document
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = "y" * (limit + 1)
    with pytest.raises(CaseFileError) as caught:
        case_from_json(json.dumps(document), "long.loop.json")
    problem = next(p for p in caught.value.problems if p.path == json_path)
    assert f"at most {limit} characters" in problem.allowed
