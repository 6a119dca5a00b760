"""Block specifications in a case file: each spec field kind to JSON and back.

The JSON form follows the field kinds of ``model.flowsheet.kinds``:

- quantity kinds and ``"flow"``: ``{"value": 25.0, "unit": "degC"}`` (as typed);
- ``"component_flows"`` / ``"component_fractions"``: ``{"values": {name: number}, "unit": ...}``;
- ``"reactions"``: a list of ``{"stoichiometry": {name: coefficient}, "key", "conversion",
  "label"}``;
- ``"fraction"``: a number; ``"choice"`` and ``"port"``: a string; ``"port_fractions"``:
  ``{port: fraction}``.

Reading checks the shape here (with JSON paths down to one reaction's conversion) and
leaves the meaning (units of the right kind, element balance, ...) to
``model.flowsheet.spec_checks.check_spec_value``, through ``Flowsheet.set_spec``.
"""

from __future__ import annotations

from typing import Any

from model.case.schema import Problems, join
from model.flowsheet.kinds import SpecField
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity

PLAIN_KINDS = ("fraction", "choice", "port", "port_fractions")
AMOUNT_KINDS = ("component_flows", "component_fractions")


def spec_to_json(value: Any) -> Any:
    """The JSON form of one spec value as typed (see the module docstring)."""
    if isinstance(value, (TypedQuantity, ComponentAmounts, Reaction)):
        return value.to_dict()
    if isinstance(value, (list, tuple)):
        return [spec_to_json(item) for item in value]
    if isinstance(value, dict):
        return {str(key): spec_to_json(item) for key, item in value.items()}
    return value


def spec_from_json(
    problems: Problems, path: str, spec_field: SpecField, raw: Any, component_names: list[str]
) -> Any:
    """Read one spec value of ``spec_field``'s kind; None (after recording) when not allowed."""
    kind = spec_field.kind
    if kind == "fraction":
        return problems.fraction(path, raw)
    if kind == "choice":
        return problems.choice(path, raw, spec_field.choices)
    if kind == "port":
        return problems.text(path, raw, name=True)
    if kind == "port_fractions":
        return _port_fractions(problems, path, raw)
    if kind in AMOUNT_KINDS:
        return _component_amounts(problems, path, raw, component_names)
    if kind == "reactions":
        return _reactions(problems, path, raw, component_names)
    return _typed_quantity(problems, path, raw)


def _typed_quantity(problems: Problems, path: str, raw: Any) -> TypedQuantity | None:
    data = problems.object(path, raw, known=("value", "unit"), required=("value", "unit"))
    if data is None or "value" not in data or "unit" not in data:
        return None
    value = problems.number(join(path, "value"), data["value"])
    unit = problems.text(join(path, "unit"), data["unit"], name=True)
    if value is None or unit is None:
        return None
    return TypedQuantity(value, unit)


def _component_amounts(
    problems: Problems, path: str, raw: Any, component_names: list[str]
) -> ComponentAmounts | None:
    data = problems.object(path, raw, known=("values", "unit"), required=("values", "unit"))
    if data is None or "values" not in data or "unit" not in data:
        return None
    values = problems.number_map(
        join(path, "values"),
        data["values"],
        component_names,
        "a component of this case",
        minimum=0.0,
    )
    unit = problems.text(join(path, "unit"), data["unit"], name=True)
    if values is None or unit is None:
        return None
    return ComponentAmounts(values, unit)


def _port_fractions(problems: Problems, path: str, raw: Any) -> dict[str, float] | None:
    data = problems.object(path, raw)
    if data is None:
        return None
    result: dict[str, float] = {}
    count = len(problems)
    for port, value in data.items():
        port_path = join(path, port)
        if problems.text(port_path, port, name=True) is None:
            continue
        number = problems.fraction(port_path, value)
        if number is not None:
            result[port] = number
    return result if len(problems) == count else None


def _reactions(
    problems: Problems, path: str, raw: Any, component_names: list[str]
) -> list[Reaction] | None:
    items = problems.array(path, raw)
    if items is None:
        return None
    reactions: list[Reaction] = []
    count = len(problems)
    for index, item in enumerate(items):
        reaction = _reaction(problems, join(path, index), item, component_names)
        if reaction is not None:
            reactions.append(reaction)
    return reactions if len(problems) == count else None


def _reaction(
    problems: Problems, path: str, raw: Any, component_names: list[str]
) -> Reaction | None:
    data = problems.object(
        path,
        raw,
        known=("stoichiometry", "key", "conversion", "label"),
        required=("stoichiometry", "key", "conversion"),
    )
    if data is None or not {"stoichiometry", "key", "conversion"} <= set(data):
        return None
    count = len(problems)
    stoichiometry = problems.number_map(
        join(path, "stoichiometry"),
        data["stoichiometry"],
        component_names,
        "a component of this case",
    )
    key = problems.choice(join(path, "key"), data["key"], component_names)
    conversion = problems.fraction(join(path, "conversion"), data["conversion"])
    label = problems.text(join(path, "label"), data.get("label", ""))
    if stoichiometry is not None and key is not None and stoichiometry.get(key, 0.0) >= 0.0:
        problems.add(
            join(path, "key"),
            key,
            "the key must be a reactant: a component with a "
            "negative coefficient in the stoichiometry",
        )
    if len(problems) != count:
        return None
    return Reaction(stoichiometry, key, conversion, label)
