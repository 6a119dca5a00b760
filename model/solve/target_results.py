"""What the outer loop of targets reports: per target and per outer iteration.

Plain data, JSON-able (the case file keeps it with the solution): for each target its
status, final adjusted value, measured value, iterations and, when no value within the
limits meets it, the measured values at both limits; for the run, the outer iterations,
the flowsheet passes of every recycle solve made, and each target's scaled residual per
outer iteration (the recycle monitor's third plot).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from model.flowsheet.target_definition import Target

#: Target statuses: met; not reachable within the limits; not met (iteration limit,
#: stopped); failed (a recycle solve at some adjusted value did not converge).
TARGET_STATUSES = ("met", "not reachable", "not met", "failed")


def _number(value: float | None) -> float | None:
    return None if value is None or not math.isfinite(value) else float(value)


@dataclass
class TargetResult:
    """One target's outcome. ``adjusted`` is in the target's unit; ``measured``,
    ``at_lower`` and ``at_upper`` in the measured quantity's internal unit."""

    target: Target
    status: str
    adjusted: float
    measured: float
    iterations: int
    message: str = ""
    at_lower: float | None = None
    at_upper: float | None = None

    @property
    def met(self) -> bool:
        return self.status == "met"

    def to_dict(self) -> dict[str, Any]:
        return {
            "target": self.target.to_dict(),
            "status": self.status,
            "adjusted": _number(self.adjusted),
            "measured": _number(self.measured),
            "iterations": self.iterations,
            "message": self.message,
            "at_lower": _number(self.at_lower),
            "at_upper": _number(self.at_upper),
        }

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> TargetResult:
        def number(key: str) -> float:
            value = data.get(key)
            return math.nan if value is None else float(value)

        return cls(
            Target.from_dict(data["target"]),
            str(data["status"]),
            number("adjusted"),
            number("measured"),
            int(data.get("iterations", 0)),
            str(data.get("message", "")),
            data.get("at_lower"),
            data.get("at_upper"),
        )


@dataclass
class TargetIterationRecord:
    """One outer iteration, as the window's recycle monitor plots it: each target's
    scaled residual ``(measured - wanted) / scale`` and adjusted value, by target label."""

    iteration: int
    residuals: dict[str, float]
    adjusted: dict[str, float]
    passes: int


@dataclass
class TargetsOutcome:
    """The outer loop's result; ``history`` holds one record per outer iteration."""

    results: list[TargetResult]
    outer_iterations: int
    passes: int
    block_evaluations: int
    history: list[TargetIterationRecord] = field(default_factory=list)
    method: str = ""

    @property
    def all_met(self) -> bool:
        return all(result.met for result in self.results)

    def to_dict(self) -> dict[str, Any]:
        return {
            "results": [result.to_dict() for result in self.results],
            "outer_iterations": self.outer_iterations,
            "passes": self.passes,
            "block_evaluations": self.block_evaluations,
            "method": self.method,
            "history": [
                {
                    "iteration": r.iteration,
                    "residuals": {k: _number(v) for k, v in r.residuals.items()},
                    "adjusted": {k: _number(v) for k, v in r.adjusted.items()},
                    "passes": r.passes,
                }
                for r in self.history
            ],
        }

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> TargetsOutcome:
        def floats(values: dict[str, Any]) -> dict[str, float]:
            return {str(k): math.nan if v is None else float(v) for k, v in values.items()}

        return cls(
            [TargetResult.from_dict(item) for item in data.get("results", [])],
            int(data.get("outer_iterations", 0)),
            int(data.get("passes", 0)),
            int(data.get("block_evaluations", 0)),
            [
                TargetIterationRecord(
                    int(r["iteration"]),
                    floats(r.get("residuals", {})),
                    floats(r.get("adjusted", {})),
                    int(r.get("passes", 0)),
                )
                for r in data.get("history", [])
            ],
            str(data.get("method", "")),
        )
