"""A stream's bend points on the diagram: an optional list of [x, y] in the case file."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from model.case.file import CASE_VERSION, case_from_dict, case_from_json, case_to_json
from model.errors import CaseFileError, InputError

EXAMPLE = Path(__file__).resolve().parents[3] / "examples" / "ammonia_synthesis_loop.loop.json"


def _data() -> dict:
    return json.loads(EXAMPLE.read_text("utf-8"))


def test_bend_points_are_saved_and_read_back_without_a_new_version():
    data = _data()
    version = data["version"]
    data["streams"][6]["bends"] = [[120.0, 260.0], [-40, 260]]
    case = case_from_dict(data, "bent.loop.json")
    stream = case.flowsheet.stream(data["streams"][6]["name"])
    assert stream.bends == ((120.0, 260.0), (-40.0, 260.0))
    text = case_to_json(case)
    saved = json.loads(text)
    assert saved["version"] == version == CASE_VERSION  # an optional key, same format
    assert saved["streams"][6]["bends"] == [[120.0, 260.0], [-40.0, 260.0]]
    assert "bends" not in saved["streams"][0]  # a stream without bends writes none
    assert case_from_json(text, "again.loop.json").flowsheet.stream(stream.name).bends == (
        stream.bends
    )


@pytest.mark.parametrize(
    "bends, path",
    [
        ("below", "streams[6].bends"),
        ([[1.0]], "streams[6].bends[0]"),
        ([[1.0, "low"]], "streams[6].bends[0][1]"),
    ],
)
def test_a_bad_bend_point_is_reported_with_its_path(bends, path):
    data = _data()
    data["streams"][6]["bends"] = bends
    with pytest.raises(CaseFileError) as caught:
        case_from_dict(data, "bad.loop.json")
    assert path in {problem.path for problem in caught.value.problems}


def test_the_flowsheet_refuses_a_bend_point_that_is_no_finite_number():
    case = case_from_dict(_data(), "ammonia.loop.json")
    name = next(iter(case.flowsheet.streams))
    with pytest.raises(InputError) as caught:
        case.flowsheet.set_stream_bends(name, [(0.0, math.inf)])
    assert caught.value.field == f"{name}.bends"
    assert case.flowsheet.stream(name).bends == ()
