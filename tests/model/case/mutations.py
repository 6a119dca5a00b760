"""Mutations of case documents, shared by the load fuzz test, the solve fuzz test and the
fuzz campaign benchmark: keys removed, values replaced by wrong types, huge, negative or
non-finite numbers, wrong units, unicode names, duplicated entries, long text.
"""

from __future__ import annotations

import json
import math
import random
import time
import traceback
from typing import Any

import numpy as np

from model.case.file import case_from_json
from model.errors import CaseFileError

UNITS = [
    "degC",
    "K",
    "degF",
    "bar",
    "barg",
    "psig",
    "Pa",
    "kmol/h",
    "kg/h",
    "t/h",
    "mol/s",
    "kW",
    "MMBtu/h",
    "W",
    "m",
    "kg",
    "",
    "mole fraction",
    "mass fraction",
    "fraction to first outlet",
    "dimensionless",
    "%",
    "1/0",
]
NAMES = [
    "Loop mixer",
    "Converter",
    "Make-up gas",
    "Nowhere",
    "Réacteur ✓",
    "混合器",
    " x",
    "",
    "in1",
    "out2",
    "out9",
    "hot_in",
    "argon",
    "water",
    "Purge",
    "Recycle gas",
]


def json_paths(node: Any, prefix: tuple = ()) -> list[tuple]:
    """Every path (tuple of keys and indices) into a JSON document."""
    found = [prefix] if prefix else []
    if isinstance(node, dict):
        for key, value in node.items():
            found.extend(json_paths(value, (*prefix, key)))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            found.extend(json_paths(value, (*prefix, index)))
    return found


def _parent(document: Any, path: tuple) -> tuple[Any, Any]:
    node = document
    for key in path[:-1]:
        node = node[key]
    return node, path[-1]


def mutate(document: Any, path: tuple, operation: str, value: Any) -> None:
    parent, key = _parent(document, path)
    if operation == "remove":
        del parent[key]
    elif operation == "replace":
        parent[key] = value
    elif operation == "duplicate" and isinstance(parent, list):
        parent.append(json.loads(json.dumps(parent[key])))
    elif operation == "rename" and isinstance(parent[key], str):
        parent[key] = value if isinstance(value, str) else str(value)
    else:
        parent[key] = value


WEIRD_NUMBERS = [
    10**400,
    -(10**400),
    1e308,
    -1e308,
    1.7e308,
    5e-324,
    1e-300,
    -0.0,
    0,
    1,
    -1,
    0.5,
    1.7,
    2**63,
    -(2**63),
    1e30,
    -1e30,
    1e-30,
    float("nan"),
    float("inf"),
    -float("inf"),
    300,
    1e6,
]


def random_value(rng: random.Random) -> Any:
    """One wrong or surprising JSON value, as the hypothesis strategies draw them."""
    number = rng.choice(WEIRD_NUMBERS) if rng.random() < 0.7 else rng.uniform(-1e4, 1e4)
    choice = rng.randrange(10)
    if choice == 0:
        return None
    if choice == 1:
        return rng.choice([True, False])
    if choice == 2:
        return number
    if choice == 3:
        return rng.choice(NAMES)
    if choice == 4:
        return rng.choice(UNITS)
    if choice == 5:
        return {"value": number, "unit": rng.choice(UNITS)}
    if choice == 6:
        return {"values": {rng.choice(NAMES): number}, "unit": "kmol/h"}
    if choice == 7:
        return [number, rng.choice(NAMES)][: rng.randrange(3)]
    if choice == 8:
        return "x" * rng.choice([1, 250, 5_000, 100_000])  # long text
    return {rng.choice(NAMES): number}


def mutated_document(rng: random.Random, base_texts: list[str]) -> str:
    """A case text with 1-3 random mutations (and now and then truncated)."""
    document = json.loads(rng.choice(base_texts))
    for _ in range(rng.randint(1, 3)):
        paths = json_paths(document)
        if not paths:
            break
        numbers = [p for p in paths if _is_number(_parent(document, p))]
        if numbers and rng.random() < 0.6:  # most often: a spec's number made extreme
            value = rng.choice(WEIRD_NUMBERS) if rng.random() < 0.8 else rng.uniform(-1e3, 1e3)
            mutate(document, rng.choice(numbers), "replace", value)
        else:
            mutate(document, rng.choice(paths), rng.choice(OPERATIONS), random_value(rng))
    text = json.dumps(document, indent=1, ensure_ascii=rng.random() < 0.5)
    if rng.randrange(10) == 0:
        text = text[: rng.randrange(len(text) + 1)]
    return text


OPERATIONS = ["remove", "replace", "duplicate", "rename"]


def _is_number(parent_and_key: tuple[Any, Any]) -> bool:
    parent, key = parent_and_key
    value = parent[key]
    return isinstance(value, (int, float)) and not isinstance(value, bool)


#: Iteration limit of a fuzzed solve (short: the outcome matters, not the answer; long
#: enough for the flash-drum examples, which take 15-17 iterations unmutated).
MAX_ITERATIONS = 30
#: A solve slower than this counts as a fault (the examples solve in tens of ms).
SECONDS_PER_DOCUMENT = 5.0
#: Outcomes that are faults.
FAULTS = (
    "other exception at load",
    "exception out of the solve",
    "converged with non-finite values",
    "converged with open balances",
    "over the time limit",
)


def finite_solution(solution) -> bool:
    """Every stream's flows, T, P and enthalpy and every duty are finite numbers."""
    for state in solution.streams.values():
        values = [*np.ravel(state.flows), state.T, state.P]
        if not all(math.isfinite(float(v)) for v in values):
            return False
    return all(r.duty_W is None or math.isfinite(r.duty_W) for r in solution.blocks.values())


def outcome(text: str) -> tuple[str, str]:
    """(kind, detail) of one document: load, then solve with a short iteration limit."""
    try:
        case = case_from_json(text, "fuzzed.loop.json")
    except CaseFileError:
        return "refused at load", ""
    except Exception as error:  # noqa: BLE001 - what the campaign counts
        return "other exception at load", f"{type(error).__name__}: {error}"[:300]
    case.settings.update(max_iterations=MAX_ITERATIONS)
    start = time.perf_counter()
    try:
        solution = case.solve()
    except Exception as error:  # noqa: BLE001
        detail = f"{type(error).__name__}: {error}"[:300]
        return "exception out of the solve", detail + "\n" + traceback.format_exc()[-600:]
    elapsed = time.perf_counter() - start
    if elapsed > SECONDS_PER_DOCUMENT:
        return "over the time limit", f"{elapsed:.1f} s"
    if solution.converged:
        if not finite_solution(solution):
            return "converged with non-finite values", solution.message[:200]
        if solution.balance is None or not solution.balance.closes:
            return "converged with open balances", solution.message[:200]
        return "solved, balances close", ""
    return f"not solved: {solution.status}", ""
