"""Targets and the addresses they name: a block's spec and a stream's or block's result.

A *target* (our word for a specification met by adjusting an input) names one numeric
spec of a block that the solve may change between a lower and an upper limit, and one
result of the solve with the value wanted; the outer loop of
:mod:`model.solve.targets` adjusts the spec until the result has that value.

Addresses are written the same way everywhere (case file, command line, window):

- a spec: ``BLOCK.FIELD`` for a quantity field (``Loop cooler.T``,
  ``Make-up gas.total_flow``), ``BLOCK.FIELD[KEY]`` for a field holding one number per
  outlet or component (``Purge splitter.fractions[out2]``, ``Make-up gas.flows[argon]``,
  ``Ammonia separator.split[ammonia]``), and ``BLOCK.reactions[N].conversion`` for the
  conversion of a reactor's N-th reaction (counted from 1);
- a result: ``STREAM.QUANTITY`` or ``STREAM.QUANTITY[component]`` with QUANTITY one of
  :data:`RESULT_QUANTITIES` (``Recycle gas.mole_fraction[argon]``, ``Purge.total_flow``,
  ``Loop gas.T``), or ``BLOCK.duty``.

Block and stream names may hold spaces and dots: the field is read from the end.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Any

from model.errors import InputError
from model.flowsheet.spec_values import TypedQuantity
from model.limits import NAME_LENGTH_LIMIT

#: Result quantities: name -> (quantity kind of units_of_measure, needs a component key).
RESULT_QUANTITIES: dict[str, tuple[str, bool]] = {
    "flow": ("molar_flow", True),
    "mole_fraction": ("fraction", True),
    "total_flow": ("molar_flow", False),
    "T": ("temperature", False),
    "P": ("pressure", False),
    "duty": ("power", False),
}

_ADDRESS = re.compile(
    r"^(?P<owner>.+?)\.(?P<field>[A-Za-z_][A-Za-z0-9_]*)"
    r"(?:\[(?P<key>[^\[\]]+)\])?(?P<conversion>\.conversion)?$"
)
_SPEC_ALLOWED = (
    "BLOCK.FIELD, BLOCK.FIELD[KEY] or BLOCK.reactions[N].conversion, e.g. "
    "'Purge splitter.fractions[out2]' or 'Loop cooler.T'"
)
_RESULT_ALLOWED = (
    "STREAM.QUANTITY, STREAM.QUANTITY[component] or BLOCK.duty with QUANTITY one of "
    + ", ".join(RESULT_QUANTITIES)
    + ", e.g. 'Recycle gas.mole_fraction[argon]'"
)


@dataclass(frozen=True)
class SpecAddress:
    """One number among a block's specs: ``block.field[key]`` (key: outlet, component,
    or reaction number for ``reactions``, whose number is the conversion)."""

    block: str
    field: str
    key: str | None = None

    def __str__(self) -> str:
        if self.field == "reactions":
            return f"{self.block}.reactions[{self.key}].conversion"
        return f"{self.block}.{self.field}" + (f"[{self.key}]" if self.key is not None else "")


@dataclass(frozen=True)
class ResultAddress:
    """One result of a solve: a stream's quantity (``key``: the component) or a block's
    duty."""

    owner: str
    quantity: str
    key: str | None = None

    @property
    def kind(self) -> str:
        """The quantity kind of units_of_measure the value has (e.g. "fraction")."""
        return RESULT_QUANTITIES[self.quantity][0]

    def __str__(self) -> str:
        return f"{self.owner}.{self.quantity}" + (f"[{self.key}]" if self.key is not None else "")


def _match(text: Any, what: str, allowed: str) -> re.Match[str]:
    if not isinstance(text, str) or len(text) > 3 * NAME_LENGTH_LIMIT:
        raise InputError(what, text, allowed)
    match = _ADDRESS.match(text.strip())
    if match is None:
        raise InputError(what, text, allowed)
    return match


def parse_spec_address(text: Any, what: str = "adjusted spec") -> SpecAddress:
    """``"Purge splitter.fractions[out2]"`` -> ``SpecAddress("Purge splitter", "fractions",
    "out2")``; the text that cannot be read is named in the error."""
    match = _match(text, what, _SPEC_ALLOWED)
    field, key = match["field"], match["key"]
    if (field == "reactions") != (match["conversion"] is not None) or (
        field == "reactions" and (key is None or not key.strip().isdigit())
    ):
        raise InputError(what, text, _SPEC_ALLOWED)
    return SpecAddress(match["owner"].strip(), field, None if key is None else key.strip())


def parse_result_address(text: Any, what: str = "measured result") -> ResultAddress:
    """``"Recycle gas.mole_fraction[argon]"`` -> ``ResultAddress("Recycle gas",
    "mole_fraction", "argon")``; the text that cannot be read is named in the error."""
    match = _match(text, what, _RESULT_ALLOWED)
    quantity, key = match["field"], match["key"]
    if quantity not in RESULT_QUANTITIES or match["conversion"] is not None:
        raise InputError(what, text, _RESULT_ALLOWED)
    needs_key = RESULT_QUANTITIES[quantity][1]
    if needs_key != (key is not None):
        need = "needs a component in brackets" if needs_key else "takes no [key]"
        raise InputError(what, text, f"{quantity} {need}; {_RESULT_ALLOWED}")
    return ResultAddress(match["owner"].strip(), quantity, None if key is None else key.strip())


@dataclass(frozen=True)
class Target:
    """Adjust ``adjusted`` within [``lower``, ``upper``] (in ``unit``; "" for fractions
    and conversions) until ``measured`` equals ``wanted``.

    ``tolerance`` is relative to the wanted value (with an absolute floor of
    ``tolerance`` times the measured quantity's scale where the wanted value is zero).
    """

    adjusted: SpecAddress
    lower: float
    upper: float
    unit: str
    measured: ResultAddress
    wanted: TypedQuantity
    tolerance: float = 1e-7

    def label(self) -> str:
        return f"{self.measured} = {self.wanted}"

    def to_dict(self) -> dict[str, Any]:
        return {
            "adjusted": str(self.adjusted),
            "lower": self.lower,
            "upper": self.upper,
            "unit": self.unit,
            "measured": str(self.measured),
            "wanted": self.wanted.to_dict(),
            "tolerance": self.tolerance,
        }

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> Target:
        """Inverse of :meth:`to_dict` (the case file checks the data's shape first)."""
        return cls(
            parse_spec_address(data["adjusted"]),
            float(data["lower"]),
            float(data["upper"]),
            str(data.get("unit", "")),
            parse_result_address(data["measured"]),
            TypedQuantity.from_dict(data["wanted"]),
            float(data.get("tolerance", 1e-7)),
        )
