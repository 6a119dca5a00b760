"""The ``"targets"`` array of a case file (format version 2 on), read and written.

Each target is an object::

    {"adjusted": "Purge splitter.fractions[out2]", "lower": 0.005, "upper": 0.2,
     "unit": "", "measured": "Recycle gas.mole_fraction[argon]",
     "wanted": {"value": 8, "unit": "%"}, "tolerance": 1e-07}

(addresses as in :mod:`model.flowsheet.target_definition`; ``unit`` is the unit of the
limits, "" for fractions and conversions; ``tolerance`` is optional). The shape is
checked here, with JSON paths; whether the addresses fit the flowsheet is checked when
the case is solved (:mod:`model.validation.target_checks`), so a file whose target
names a block that was since removed still opens with everything else.
"""

from __future__ import annotations

from typing import Any

from model.case.schema import MISSING, Problems, join
from model.errors import LoopwrightError
from model.flowsheet.spec_values import TypedQuantity
from model.flowsheet.target_definition import Target, parse_result_address, parse_spec_address

TARGET_KEYS = ("adjusted", "lower", "upper", "unit", "measured", "wanted", "tolerance")
_REQUIRED = ("adjusted", "lower", "upper", "measured", "wanted")


def targets_to_json(targets: list[Target]) -> list[dict[str, Any]]:
    return [target.to_dict() for target in targets]


def read_targets(problems: Problems, value: Any) -> list[Target]:
    """The targets of the file (``[]`` when absent); each bad one is reported and left out."""
    if value is MISSING or value is None:
        return []
    items = problems.array("targets", value)
    targets = []
    for index, item in enumerate(items or []):
        target = _read_target(problems, join("targets", index), item)
        if target is not None:
            targets.append(target)
    return targets


def _read_target(problems: Problems, path: str, item: Any) -> Target | None:
    data = problems.object(path, item, known=TARGET_KEYS, required=_REQUIRED)
    if data is None or any(key not in data for key in _REQUIRED):
        return None
    count = len(problems)
    adjusted = measured = None
    try:
        adjusted = parse_spec_address(data["adjusted"])
    except LoopwrightError as error:
        problems.add_error(join(path, "adjusted"), error, data["adjusted"])
    try:
        measured = parse_result_address(data["measured"])
    except LoopwrightError as error:
        problems.add_error(join(path, "measured"), error, data["measured"])
    lower = problems.number(join(path, "lower"), data["lower"])
    upper = problems.number(join(path, "upper"), data["upper"])
    unit = problems.text(join(path, "unit"), data.get("unit", ""))
    tolerance = problems.number(join(path, "tolerance"), data.get("tolerance", 1e-7), positive=True)
    wanted = _read_wanted(problems, join(path, "wanted"), data["wanted"])
    if len(problems) != count:
        return None
    return Target(adjusted, lower, upper, unit, measured, wanted, tolerance)


def _read_wanted(problems: Problems, path: str, value: Any) -> TypedQuantity | None:
    data = problems.object(path, value, known=("value", "unit"), required=("value", "unit"))
    if data is None:
        return None
    number = problems.number(join(path, "value"), data.get("value", MISSING))
    unit = problems.text(join(path, "unit"), data.get("unit", MISSING))
    if number is None or unit is None:
        return None
    return TypedQuantity(number, unit)
