"""Mutated case files give a clear CaseFileError or a valid case, never another exception.

Hypothesis takes the example case files (one of them with stored results) and breaks
them: keys removed, values replaced by wrong types, huge, negative or non-finite
numbers, wrong units, unicode names, duplicated entries, streams pointing at missing
blocks, truncated text. Loading must either refuse with problems that each name a path
and what is allowed, or give a case that saves and reopens to the same text.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from model.case.file import case_from_json, case_to_json, load_case
from model.errors import CaseFileError
from tests.model.case.mutations import NAMES, UNITS, json_paths, mutate

EXAMPLES = Path(__file__).resolve().parents[3] / "examples"
FUZZ_SETTINGS = settings(
    max_examples=1000, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)


def _with_results() -> str:
    case = load_case(EXAMPLES / "shift_feed_effluent_exchanger.loop.json")
    case.solve()
    return case_to_json(case)


BASE_TEXTS = [path.read_text("utf-8") for path in sorted(EXAMPLES.glob("*.loop.json"))]
BASE_TEXTS.append(_with_results())


BASE_PATHS = [json_paths(json.loads(text)) for text in BASE_TEXTS]

weird_numbers = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.integers(min_value=-(10**30), max_value=10**30),
    st.sampled_from([10**400, -(10**400), 1e308, -1e308, 5e-324, -0.0, 0, 1, -1, 0.5, 1.7]),
)
weird_values = st.one_of(
    st.none(),
    st.booleans(),
    weird_numbers,
    st.text(max_size=12),
    st.sampled_from(NAMES),
    st.sampled_from(UNITS),
    st.builds(lambda v, u: {"value": v, "unit": u}, weird_numbers, st.sampled_from(UNITS)),
    st.builds(
        lambda n, v: {"values": {n: v}, "unit": "kmol/h"}, st.sampled_from(NAMES), weird_numbers
    ),
    st.lists(st.one_of(weird_numbers, st.sampled_from(NAMES)), max_size=3),
    st.dictionaries(st.sampled_from(NAMES), weird_numbers, max_size=2),
)


@st.composite
def mutated_case_texts(draw) -> str:
    base = draw(st.integers(min_value=0, max_value=len(BASE_TEXTS) - 1))
    document = json.loads(BASE_TEXTS[base])
    for _ in range(draw(st.integers(min_value=1, max_value=3))):
        paths = json_paths(document)
        if not paths:
            break
        path = draw(st.sampled_from(paths))
        operation = draw(st.sampled_from(["remove", "replace", "duplicate", "rename"]))
        mutate(document, path, operation, draw(weird_values))
    text = json.dumps(document, indent=1, ensure_ascii=draw(st.booleans()))
    if draw(st.integers(min_value=0, max_value=9)) == 0:  # now and then: a truncated file
        text = text[: draw(st.integers(min_value=0, max_value=len(text)))]
    return text


def _check_outcome(text: str | bytes) -> None:
    try:
        case = case_from_json(text, "fuzzed.loop.json")
    except CaseFileError as error:
        assert error.problems
        for problem in error.problems:
            assert isinstance(problem.path, str) and problem.path
            assert isinstance(problem.allowed, str) and problem.allowed
        assert str(error).startswith("fuzzed.loop.json: ")
        return
    saved = case_to_json(case)  # an accepted case saves and reopens to the same text
    assert case_to_json(case_from_json(saved)) == saved


@FUZZ_SETTINGS
@given(mutated_case_texts())
def test_mutated_case_files_never_raise_anything_else(text: str) -> None:
    _check_outcome(text)


@settings(max_examples=400, deadline=None, derandomize=True)
@given(st.integers(min_value=0, max_value=len(BASE_TEXTS) - 1), st.data())
def test_truncated_and_corrupted_bytes_never_raise_anything_else(base: int, data) -> None:
    raw = BASE_TEXTS[base].encode("utf-8")
    cut = data.draw(st.integers(min_value=0, max_value=len(raw)))
    garbage = data.draw(st.binary(max_size=8))
    _check_outcome(raw[:cut] + garbage)


@settings(max_examples=400, deadline=None, derandomize=True)
@given(st.sampled_from(BASE_PATHS[0]), weird_values)
def test_any_single_replacement_in_the_ammonia_case(path: tuple, value: Any) -> None:
    document = json.loads(BASE_TEXTS[0])
    mutate(document, path, "replace", value)
    _check_outcome(json.dumps(document))


@pytest.mark.parametrize("index", range(len(BASE_TEXTS)))
def test_every_key_removed_in_turn(index: int) -> None:
    """Exhaustive: each key or item of each base file removed alone."""
    for path in BASE_PATHS[index]:
        document = json.loads(BASE_TEXTS[index])
        mutate(document, path, "remove", None)
        _check_outcome(json.dumps(document))


def test_results_with_convergence_x_null_are_refused_naming_the_json_path() -> None:
    """Found by the fuzz test: ``"x": null`` loaded as a NaN scalar that could not be saved."""
    document = json.loads(BASE_TEXTS[-1])
    document["results"]["convergence"]["x"] = None
    with pytest.raises(CaseFileError) as caught:
        case_from_json(json.dumps(document), "fuzzed.loop.json")
    paths = [problem.path for problem in caught.value.problems]
    assert "results.convergence.x" in paths
    _check_outcome(json.dumps(document))


def test_results_with_a_null_item_in_convergence_gx_load_and_save() -> None:
    """A non-finite g(x) value is stored as null; such a file loads, saves and reopens."""
    document = json.loads(BASE_TEXTS[-1])
    document["results"]["convergence"]["gx"][0] = None
    case = case_from_json(json.dumps(document), "fuzzed.loop.json")
    assert np.isnan(case.solution.convergence.gx[0])
    saved = case_to_json(case)
    assert json.loads(saved)["results"]["convergence"]["gx"][0] is None
    assert case_to_json(case_from_json(saved)) == saved


def test_results_keep_the_largest_estimated_error_and_old_files_load_without_it() -> None:
    document = json.loads(BASE_TEXTS[-1])
    stored = document["results"]["convergence"]["largest_estimated_error"]
    # The solver's own summary, written next to the residual it bounds from above.
    assert stored >= document["results"]["convergence"]["largest_residual"]
    case = case_from_json(json.dumps(document), "fuzzed.loop.json")
    assert case.solution.convergence.largest_estimated_error == stored
    del document["results"]["convergence"]["largest_estimated_error"]
    old = case_from_json(json.dumps(document), "fuzzed.loop.json")
    assert np.isnan(old.solution.convergence.largest_estimated_error)
    resaved = json.loads(case_to_json(old))["results"]["convergence"]
    assert resaved.get("largest_estimated_error") is None  # NaN is stored as null
