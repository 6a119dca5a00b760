"""How each strongly connected part converged, and the one result that sums them up.

A part-by-part solve (:mod:`model.solve.part_solve`) runs one
:func:`convergence.solve_fixed_point` per loop part. :class:`PartSolution` keeps each
part's own result with its blocks, tears, passes and block evaluations;
:func:`combine_parts` builds the single :class:`convergence.FixedPointResult` the
recycle monitor, the report, the case file and the command line read as
``solution.convergence``:

- the records of every part, in solve order, as :class:`PartRecord` (the record with
  the part's label), iteration and evaluation numbers running on from part to part;
  events likewise renumbered;
- ``x`` and ``gx`` concatenated in the flowsheet's tear order (parts not iterated left
  out);
- status the worst of the parts' (:data:`STATUS_RANK`), iterations and evaluations
  summed, largest residual and estimated error the largest, diagnoses merged.

The combined history is a :class:`PartsHistory`: a tear's series (residuals, slopes,
q) come from the records that hold that tear, i.e. from its own part.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Any

import numpy as np

from convergence import ConvergenceHistory, Event, FixedPointResult, IterationRecord

__all__ = [
    "PartRecord",
    "PartSolution",
    "PartsHistory",
    "STATUS_RANK",
    "combine_parts",
    "label_records",
    "part_record",
    "parts_from_dict",
]

#: Fixed-point statuses from best to worst; a combined result takes its parts' worst.
STATUS_RANK = ("converged", "not converged", "stopped", "diverging", "not finite")


@dataclass(frozen=True)
class PartRecord(IterationRecord):
    """An iteration record of one part's run, numbered on from the parts before it.

    ``part`` is the part's label (``"part 2 of 5"``); ``part_iteration`` the iteration
    within that part's own run.
    """

    part: str = ""
    part_iteration: int = 0


def part_record(
    record: IterationRecord, label: str, iterations_before: int, evaluations_before: int
) -> PartRecord:
    """``record`` of part ``label``, renumbered after the iterations of earlier parts."""
    values = {f.name: getattr(record, f.name) for f in dataclasses.fields(IterationRecord)}
    values["iteration"] = record.iteration + iterations_before
    values["evaluations"] = record.evaluations + evaluations_before
    return PartRecord(**values, part=label, part_iteration=record.iteration)


@dataclass
class PartsHistory(ConvergenceHistory):
    """The records of several parts in one list; each tear's series from its own part."""

    def _holding(self, tear: str) -> list[IterationRecord]:
        return [record for record in self.records if tear in record.residuals]

    def residuals(self, tear: str) -> np.ndarray:
        return np.array([r.residuals[tear] for r in self._holding(tear)], dtype=float)

    def q_median(self, tear: str) -> np.ndarray:
        return np.array(
            [np.nan if r.q.get(tear) is None else r.q[tear].median for r in self._holding(tear)],
            dtype=float,
        )

    def slopes(self, tear: str) -> np.ndarray:
        return np.array(
            [np.nan if r.slopes.get(tear) is None else r.slopes[tear] for r in self._holding(tear)],
            dtype=float,
        )


@dataclass
class PartSolution:
    """One step of a part-by-part solve and how it went.

    Attributes
    ----------
    label
        ``"part k of n"``.
    blocks, tear_streams
        The part's blocks in calculation order and its tear streams.
    convergence
        The part's own result; None when the part was not iterated (a part upstream
        did not converge, so it was passed once from its start).
    passes
        Passes over the part's blocks: start pass, iterations and final pass.
    block_evaluations
        Block calculations made for the part (``passes`` times its block count).
    """

    label: str
    blocks: list[str]
    tear_streams: list[str]
    convergence: FixedPointResult | None
    passes: int
    block_evaluations: int

    def to_dict(self) -> dict[str, Any]:
        """JSON-able summary; the part's records, x and diagnosis are stored once, in the
        combined result, and :func:`parts_from_dict` takes them back from there."""
        result = self.convergence
        data: dict[str, Any] = {
            "label": self.label,
            "blocks": list(self.blocks),
            "tear_streams": list(self.tear_streams),
            "passes": self.passes,
            "block_evaluations": self.block_evaluations,
            "iterated": result is not None,
        }
        if result is not None:
            data |= {
                "status": result.status,
                "message": result.message,
                "iterations": result.iterations,
                "evaluations": result.evaluations,
                "largest_residual": _finite_or_none(result.largest_residual),
                "largest_estimated_error": _finite_or_none(result.largest_estimated_error),
            }
        return data


def _finite_or_none(value: float) -> float | None:
    return float(value) if np.isfinite(value) else None


def _number(value: Any) -> float:
    return np.nan if value is None else float(value)


def _part_result(
    data: dict[str, Any], combined: FixedPointResult, where: dict[str, slice], before: tuple
) -> FixedPointResult:
    """A part's own result, cut out of the combined one it was stored in."""
    iterations, evaluations = before
    last = iterations + int(data["iterations"])
    records = [
        dataclasses.replace(
            _plain_record(record),
            iteration=record.iteration - iterations,
            evaluations=record.evaluations - evaluations,
        )
        for record in combined.history.records
        if iterations < record.iteration <= last
    ]
    events = [
        Event(event.iteration - iterations, event.kind, event.detail)
        for event in combined.history.events
        if iterations < event.iteration <= last
    ]
    tears = [str(name) for name in data["tear_streams"]]
    return FixedPointResult(
        converged=data["status"] == "converged",
        status=str(data["status"]),
        message=str(data["message"]),
        x=np.concatenate([combined.x[where[tear]] for tear in tears]),
        gx=np.concatenate([combined.gx[where[tear]] for tear in tears]),
        iterations=int(data["iterations"]),
        evaluations=int(data["evaluations"]),
        history=ConvergenceHistory(records=records, events=events),
        diagnosis={t: combined.diagnosis[t] for t in tears if t in combined.diagnosis},
        method=combined.method,
        largest_residual=_number(data.get("largest_residual")),
        largest_estimated_error=_number(data.get("largest_estimated_error")),
    )


def _plain_record(record: IterationRecord) -> IterationRecord:
    values = {f.name: getattr(record, f.name) for f in dataclasses.fields(IterationRecord)}
    return IterationRecord(**values)


def parts_from_dict(
    entries: list[dict[str, Any]], combined: FixedPointResult | None, tear_streams: list[str]
) -> list[PartSolution]:
    """The parts stored by :meth:`PartSolution.to_dict`, each with its own result cut out
    of ``combined`` (records and events by their running iteration numbers, x and gx by
    the flowsheet's tear order ``tear_streams``, the diagnosis by tear)."""
    iterated = [tear for entry in entries if entry["iterated"] for tear in entry["tear_streams"]]
    order = [tear for tear in tear_streams if tear in set(iterated)]
    width = len(combined.x) // len(order) if combined is not None and order else 0
    where = {tear: slice(k * width, (k + 1) * width) for k, tear in enumerate(order)}
    parts, before = [], (0, 0)
    for entry in entries:
        result = None
        if entry["iterated"]:
            if combined is None:
                raise ValueError("stored parts were iterated, but there is no convergence result")
            result = _part_result(entry, combined, where, before)
            before = (before[0] + result.iterations, before[1] + result.evaluations)
        parts.append(
            PartSolution(
                label=str(entry["label"]),
                blocks=[str(name) for name in entry["blocks"]],
                tear_streams=[str(name) for name in entry["tear_streams"]],
                convergence=result,
                passes=int(entry["passes"]),
                block_evaluations=int(entry["block_evaluations"]),
            )
        )
    return parts


def _labelled(ran: list[PartSolution]) -> tuple[list[PartRecord], list[Event]]:
    """Records and events of the parts' runs, numbered on from part to part."""
    records: list[PartRecord] = []
    events: list[Event] = []
    iterations = evaluations = 0
    for part in ran:
        history = part.convergence.history
        records += [part_record(r, part.label, iterations, evaluations) for r in history.records]
        events += [Event(e.iteration + iterations, e.kind, e.detail) for e in history.events]
        iterations += part.convergence.iterations
        evaluations += part.convergence.evaluations
    return records, events


def _tear_values(parts: list[PartSolution], tear_streams: list[str]) -> tuple[list, list]:
    """x and gx pieces per tear, in the flowsheet's tear order, of the parts iterated."""
    pieces: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    for part in parts:
        result = part.convergence
        if result is None:
            continue
        width = len(result.x) // len(part.tear_streams)
        for k, tear in enumerate(part.tear_streams):
            where = slice(k * width, (k + 1) * width)
            pieces[tear] = (result.x[where], result.gx[where])
    order = [tear for tear in tear_streams if tear in pieces]
    return [pieces[t][0] for t in order], [pieces[t][1] for t in order]


def _combined_message(parts: list[PartSolution], worst: PartSolution, status: str) -> str:
    ran = [p for p in parts if p.convergence is not None]
    iterations = sum(p.convergence.iterations for p in ran)
    if status == "converged":
        if len(parts) == 1:
            return worst.convergence.message
        slowest = max(ran, key=lambda p: p.convergence.iterations)
        return (
            f"converged part by part: {len(parts)} parts, {iterations} iterations in all "
            f"(the most, {slowest.convergence.iterations}, in {slowest.label}: tears "
            f"{', '.join(slowest.tear_streams)}); largest scaled residual "
            f"{max(p.convergence.largest_residual for p in ran):.3g}"
        )
    message = worst.convergence.message
    if len(parts) == 1:
        return message
    left = len(parts) - len(ran)
    after = f"; {left} part(s) downstream passed once, not converged" if left else ""
    return f"{worst.label} (tears {', '.join(worst.tear_streams)}): {message}{after}"


def combine_parts(
    parts: list[PartSolution], tear_streams: list[str], method: str
) -> FixedPointResult | None:
    """One result standing for every part's run (see the module docstring).

    ``tear_streams`` is the flowsheet's tear order; None when no part was iterated.
    """
    ran = [part for part in parts if part.convergence is not None]
    if not ran:
        return None
    records, events = _labelled(ran)
    worst = max(ran, key=lambda part: STATUS_RANK.index(part.convergence.status))
    status = worst.convergence.status
    x, gx = _tear_values(ran, tear_streams)
    diagnosis = {}
    for part in ran:
        diagnosis.update(part.convergence.diagnosis)
    return FixedPointResult(
        converged=status == "converged",
        status=status,
        message=_combined_message(parts, worst, status),
        x=np.concatenate(x),
        gx=np.concatenate(gx),
        iterations=sum(part.convergence.iterations for part in ran),
        evaluations=sum(part.convergence.evaluations for part in ran),
        history=PartsHistory(records=records, events=events),
        diagnosis=diagnosis,
        method=method,
        largest_residual=float(np.max([p.convergence.largest_residual for p in ran])),
        largest_estimated_error=float(np.max([p.convergence.largest_estimated_error for p in ran])),
    )


def label_records(combined: FixedPointResult, parts: list[PartSolution]) -> FixedPointResult:
    """``combined`` (as read from a case file) with its records labelled by part again."""
    records, _ = _labelled([part for part in parts if part.convergence is not None])
    history = PartsHistory(records=records, events=list(combined.history.events))
    return dataclasses.replace(combined, history=history)
