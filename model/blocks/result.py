"""What one block's calculation returns besides its outlets: duty, values, warnings."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any


@dataclass
class BlockResult:
    """A block's computed results.

    Attributes
    ----------
    duty_W
        Heat added to the block, W (None for blocks without a duty).
    values
        Name -> (value in internal units, units_of_measure kind or "" for plain
        numbers), e.g. ``{"LMTD": (35.2, "temperature_difference")}``.
    warnings
        Plain-words warnings (temperature cross, clipped flows ...).
    profile
        An exchanger's heat curve (empty for other blocks): ``"heat passed"`` (W, from
        the hot inlet end), ``"hot T"`` and ``"cold T"`` (K) at each cut of the duty,
        see :mod:`model.blocks.exchanger_zones`.
    """

    duty_W: float | None = None
    values: dict[str, tuple[float, str]] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)
    profile: dict[str, list[float]] = field(default_factory=dict)

    def to_dict(self) -> dict[str, Any]:
        data = {
            "duty_W": self.duty_W,
            "values": {name: [value, kind] for name, (value, kind) in self.values.items()},
            "warnings": list(self.warnings),
        }
        if self.profile:
            data["profile"] = {name: list(points) for name, points in self.profile.items()}
        return data

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> BlockResult:
        duty = data.get("duty_W")
        return cls(
            None if duty is None else float(duty),
            {name: (float(v), str(k)) for name, (v, k) in data.get("values", {}).items()},
            [str(w) for w in data.get("warnings", [])],
            {
                str(name): [float(v) for v in points]
                for name, points in data.get("profile", {}).items()
            },
        )
