"""Specification values as the user typed them.

A block keeps every specification exactly as entered (value and unit), so a case file
reopens with the user's own numbers and units; the solve converts each one once to an
internal float (see ``model.solve.compile``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from units_of_measure.errors import InputError


@dataclass(frozen=True)
class TypedQuantity:
    """A number with the unit it was typed in, e.g. ``TypedQuantity(25.0, "degC")``."""

    value: float
    unit: str

    def to_dict(self) -> dict[str, Any]:
        return {"value": self.value, "unit": self.unit}

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> TypedQuantity:
        return cls(float(data["value"]), str(data["unit"]))

    def __str__(self) -> str:
        return f"{self.value:g} {self.unit}"


@dataclass(frozen=True)
class ComponentAmounts:
    """One number per component with one shared unit (a feed's flows, for example).

    ``unit`` is a molar-flow or mass-flow unit for flows, or ``"mole fraction"`` /
    ``"mass fraction"`` for compositions.
    """

    values: dict[str, float]
    unit: str

    def to_dict(self) -> dict[str, Any]:
        return {"values": dict(self.values), "unit": self.unit}

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> ComponentAmounts:
        return cls({str(k): float(v) for k, v in data["values"].items()}, str(data["unit"]))


@dataclass(frozen=True)
class Reaction:
    """A reaction at fixed fractional conversion of its key reactant.

    ``stoichiometry`` maps component names to coefficients: negative for reactants,
    positive for products, e.g. ``{"nitrogen": -1, "hydrogen": -3, "ammonia": 2}``.
    """

    stoichiometry: dict[str, float]
    key: str
    conversion: float
    label: str = ""

    def to_dict(self) -> dict[str, Any]:
        return {
            "stoichiometry": dict(self.stoichiometry),
            "key": self.key,
            "conversion": self.conversion,
            "label": self.label,
        }

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> Reaction:
        return cls(
            {str(k): float(v) for k, v in data["stoichiometry"].items()},
            str(data["key"]),
            float(data["conversion"]),
            str(data.get("label", "")),
        )


@dataclass(frozen=True)
class StreamEstimate:
    """A user's initial estimate for a tear stream (internal units: mol/s, K, Pa)."""

    flows: dict[str, float] = field(default_factory=dict)
    T: float | None = None
    P: float | None = None

    def to_dict(self) -> dict[str, Any]:
        return {"flows_mol_s": dict(self.flows), "T_K": self.T, "P_Pa": self.P}

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> StreamEstimate:
        T = data.get("T_K")
        P = data.get("P_Pa")
        return cls(
            {str(k): float(v) for k, v in data.get("flows_mol_s", {}).items()},
            None if T is None else float(T),
            None if P is None else float(P),
        )


def check_fraction(field_name: str, value: Any) -> float:
    """Return ``value`` as a float in [0, 1] or raise an InputError naming the field."""
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise InputError(field_name, value, "a fraction must be a number between 0 and 1") from None
    if not math.isfinite(number) or not 0.0 <= number <= 1.0:
        raise InputError(field_name, value, "a fraction must be a number between 0 and 1")
    return number
