"""What a run records: one record per iteration, and events (settings changed, stopped ...).

Everything here is plain data that the recycle monitor plots and that a case file
stores (:meth:`ConvergenceHistory.to_dict` gives JSON-able values).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from convergence.settings import SettingsSnapshot


def _median(values: np.ndarray) -> float:
    """Median by one partial sort (np.median's result, with less per-call overhead)."""
    half = values.size // 2
    if values.size % 2:
        return float(np.partition(values, half)[half])
    middle = np.partition(values, (half - 1, half))
    return float(0.5 * (middle[half - 1] + middle[half]))


@dataclass(frozen=True)
class QStats:
    """Statistics of the per-variable q of one tear for one accelerated step.

    ``clipped_low``/``clipped_high`` count variables whose q = s/(s-1) fell below q_min or
    above q_max; ``guarded`` counts variables whose step was too small for a slope (they
    took q = 0 clipped to the bounds).
    """

    minimum: float
    median: float
    maximum: float
    clipped_low: int
    clipped_high: int
    count: int
    guarded: int = 0

    @classmethod
    def per_tear(
        cls,
        tear_slices: dict[str, slice],
        q: np.ndarray,
        q_raw: np.ndarray,
        guarded: np.ndarray,
        q_min: float,
        q_max: float,
    ) -> dict[str, QStats]:
        """Statistics of the clipped ``q`` (unclipped: ``q_raw``) for every tear."""
        below = q_raw < q_min
        above = q_raw > q_max
        return {
            tear: cls(
                minimum=float(q[part].min()),
                median=_median(q[part]),
                maximum=float(q[part].max()),
                clipped_low=int(np.count_nonzero(below[part])),
                clipped_high=int(np.count_nonzero(above[part])),
                count=int(q[part].size),
                guarded=int(np.count_nonzero(guarded[part])),
            )
            for tear, part in tear_slices.items()
        }


@dataclass(frozen=True)
class IterationRecord:
    """One iteration: one evaluation of g at x_k and the step computed from it.

    Attributes
    ----------
    iteration
        1 for the evaluation at x0.
    evaluations
        Calls of g so far (flowsheet passes).
    residuals
        Per tear, the largest scaled residual of g(x_k) - x_k.
    q
        Per tear, q statistics of the step computed after this evaluation; ``None`` for
        a direct-substitution step, a quasi-Newton step or no step (last iteration).
    settings_version, settings
        The settings in force for this iteration.
    slopes
        Per tear, the dominant slope of g along the last step (``None`` at the first
        iteration or when the step was too small).
    step
        ``"direct"``, ``"accelerated"``, ``"dominant mode"`` (a Wegstein step in which
        some tear took the dominant-mode step, :mod:`convergence.modes`),
        ``"quasi-Newton"``, ``"fallback"`` (back to the
        best point, :mod:`convergence.fallback`) or ``"none"``.
    worst_variable
        Name of the variable with the largest scaled residual.
    estimated_errors
        Per tear, the largest scaled residual divided by |1 - s| for the tear's recent
        slope s, at least the residual (:mod:`convergence.stopping`); empty in records
        written before it existed.
    q_bounds
        The widest q bounds a step of this iteration used when adaptive bounds had
        widened them beyond the settings' (lowest q_min, highest q_max over the
        variables); ``None`` when the settings' bounds were used.
    mode_tears
        The tears that took the dominant-mode step at this iteration (empty in records
        written before it existed: there a ``"dominant mode"`` step counts for every
        tear, see :meth:`took_mode_step`).
    """

    iteration: int
    evaluations: int
    residuals: dict[str, float]
    q: dict[str, QStats | None]
    settings_version: int
    settings: SettingsSnapshot
    slopes: dict[str, float | None] = field(default_factory=dict)
    step: str = "direct"
    worst_variable: str = ""
    estimated_errors: dict[str, float] = field(default_factory=dict)
    q_bounds: tuple[float, float] | None = None
    mode_tears: tuple[str, ...] = ()

    def took_mode_step(self, tear: str) -> bool:
        """Whether ``tear`` took the dominant-mode step at this iteration."""
        return self.step == "dominant mode" and (tear in self.mode_tears or not self.mode_tears)

    @property
    def largest_residual(self) -> float:
        """Largest scaled residual over all tears."""
        return max(self.residuals.values())

    @property
    def largest_estimated_error(self) -> float:
        """Largest estimated error over all tears (the residual if none was recorded)."""
        return max(self.estimated_errors.values(), default=self.largest_residual)


@dataclass(frozen=True)
class Event:
    """Something that happened during a run, at an iteration.

    ``kind`` is one of ``"settings changed"``, ``"stopped"``, ``"diverging"``,
    ``"not finite"``, ``"converged"``, ``"iteration limit"``, ``"restart"``. A
    widening by adaptive bounds is a ``"settings changed"`` event whose detail starts
    with ``"adaptive bounds:"``.
    """

    iteration: int
    kind: str
    detail: str


def _record_to_dict(record: IterationRecord) -> dict[str, Any]:
    return {
        "iteration": record.iteration,
        "evaluations": record.evaluations,
        "residuals": dict(record.residuals),
        "q": {
            tear: None if stats is None else dataclasses.asdict(stats)
            for tear, stats in record.q.items()
        },
        "settings_version": record.settings_version,
        "slopes": dict(record.slopes),
        "step": record.step,
        "worst_variable": record.worst_variable,
        "estimated_errors": dict(record.estimated_errors),
        "q_bounds": None if record.q_bounds is None else list(record.q_bounds),
        "mode_tears": list(record.mode_tears),
    }


def _record_from_dict(
    data: dict[str, Any], snapshots: dict[int, SettingsSnapshot]
) -> IterationRecord:
    return IterationRecord(
        iteration=int(data["iteration"]),
        evaluations=int(data["evaluations"]),
        residuals={tear: float(value) for tear, value in data["residuals"].items()},
        q={tear: None if stats is None else QStats(**stats) for tear, stats in data["q"].items()},
        settings_version=int(data["settings_version"]),
        settings=snapshots[int(data["settings_version"])],
        slopes={
            tear: None if value is None else float(value)
            for tear, value in data.get("slopes", {}).items()
        },
        step=str(data.get("step", "direct")),
        worst_variable=str(data.get("worst_variable", "")),
        estimated_errors={
            tear: float(value) for tear, value in data.get("estimated_errors", {}).items()
        },
        q_bounds=None if data.get("q_bounds") is None else tuple(map(float, data["q_bounds"])),
        mode_tears=tuple(str(tear) for tear in data.get("mode_tears", [])),
    )


@dataclass
class ConvergenceHistory:
    """Records of every iteration and the events of a run, in order."""

    records: list[IterationRecord] = field(default_factory=list)
    events: list[Event] = field(default_factory=list)

    def residuals(self, tear: str) -> np.ndarray:
        """Largest scaled residual of ``tear`` at every iteration."""
        return np.array([record.residuals[tear] for record in self.records], dtype=float)

    def q_median(self, tear: str) -> np.ndarray:
        """Median q of ``tear`` at every iteration (nan where no q was used)."""
        return np.array(
            [
                np.nan if record.q.get(tear) is None else record.q[tear].median
                for record in self.records
            ],
            dtype=float,
        )

    def slopes(self, tear: str) -> np.ndarray:
        """Dominant slope of ``tear`` at every iteration (nan where unknown)."""
        return np.array(
            [
                np.nan if record.slopes.get(tear) is None else record.slopes[tear]
                for record in self.records
            ],
            dtype=float,
        )

    def events_of(self, kind: str) -> list[Event]:
        """Events of one kind, in order."""
        return [event for event in self.events if event.kind == kind]

    def to_dict(self) -> dict[str, Any]:
        """JSON-able form; each settings version is stored once."""
        snapshots = {record.settings_version: record.settings for record in self.records}
        return {
            "settings": {
                str(version): snapshot.values() for version, snapshot in snapshots.items()
            },
            "records": [_record_to_dict(record) for record in self.records],
            "events": [dataclasses.asdict(event) for event in self.events],
        }

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> ConvergenceHistory:
        """Inverse of :meth:`to_dict`."""
        snapshots = {
            int(version): SettingsSnapshot(**values, version=int(version))
            for version, values in data.get("settings", {}).items()
        }
        return cls(
            records=[_record_from_dict(record, snapshots) for record in data.get("records", [])],
            events=[Event(**event) for event in data.get("events", [])],
        )
