"""Running a sweep: in this process, on a local process pool, or on a Dask cluster.

The points are cut into runs of neighbours (:meth:`SweepPlan.runs`, :data:`RUN_LENGTH`
points along the last varied spec); each run is one call of
:func:`model.study.sweep_point.solve_run`, a pure function of the case text and the
run's values, so the results do not depend on where or in which order the runs are
solved: one worker, several, or a cluster give the same numbers. With one worker the
runs are solved here in turn; with more, on a ``concurrent.futures`` process pool
(processes started by "spawn", so a window's threads are never forked); with a Dask
``distributed.Client`` (or a scheduler address), by ``client.submit`` on the cluster.
We write no scheduler of our own.

``on_point`` is called in this process for every point as its run comes back
(the sweep dialog's live plot), and ``should_stop`` is asked between runs: a stopped
sweep returns the points solved so far, ``stopped`` set.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from dataclasses import dataclass, field
from multiprocessing import get_context
from typing import Any

from model.errors import InputError
from model.study.sweep_definition import SweepPlan
from model.study.sweep_point import PointResult, solve_run

#: Points per run: each warm-starts from the one before it; runs start cold.
RUN_LENGTH = 5


@dataclass
class SweepResult:
    """Every point solved, in the plan's order; ``stopped`` when a stop was asked."""

    plan: SweepPlan
    points: list[PointResult] = field(default_factory=list)
    stopped: bool = False

    @property
    def not_converged(self) -> list[PointResult]:
        return [point for point in self.points if not point.converged]

    @property
    def complete(self) -> bool:
        return len(self.points) == self.plan.point_count


def check_plan(case: Any, plan: SweepPlan) -> None:
    """Refuse a plan that cannot run on ``case``: a varied spec that does not exist or
    is not numeric, one that a target adjusts, a record that cannot be read."""
    from model.flowsheet.spec_numbers import spec_number
    from model.validation.target_checks import check_result_address

    adjusted = {str(target.adjusted) for target in case.flowsheet.targets}
    for variation in plan.variations:
        spec_number(case.flowsheet.blocks, variation.address, variation.unit)
        if str(variation.address) in adjusted:
            raise InputError(
                "--vary", str(variation.address), "a spec that no target of the case adjusts"
            )
    for record in plan.records:
        check_result_address(case.flowsheet, record)


def default_workers() -> int:
    return os.cpu_count() or 1


def run_sweep(
    case_text: str,
    plan: SweepPlan,
    workers: int = 1,
    dask: Any = None,
    on_point: Callable[[int, PointResult], None] | None = None,
    should_stop: Callable[[], bool] | None = None,
    run_length: int = RUN_LENGTH,
) -> SweepResult:
    """Solve every point of ``plan`` on the case in ``case_text`` (module docstring).

    ``dask``: a ``distributed.Client``, or a scheduler address ("tcp://host:8786");
    then ``workers`` is not used. ``on_point(index, point)`` gets the point's index in
    :meth:`SweepPlan.points`.
    """
    varied = tuple((str(v.address), v.unit) for v in plan.variations)
    records = tuple(str(r) for r in plan.records)
    runs = plan.runs(run_length)
    starts = [sum(len(run) for run in runs[:k]) for k in range(len(runs))]
    by_index: dict[int, PointResult] = {}
    result = SweepResult(plan)

    def arrived(k: int, points: list[PointResult]) -> None:
        for offset, point in enumerate(points):
            by_index[starts[k] + offset] = point
            if on_point is not None:
                on_point(starts[k] + offset, point)

    def stop_asked() -> bool:
        return should_stop is not None and should_stop()

    tasks = [(case_text, varied, records, tuple(run)) for run in runs]
    if dask is not None:
        result.stopped = _on_dask(dask, tasks, arrived, stop_asked)
    elif workers <= 1:
        for k, task in enumerate(tasks):
            if stop_asked():
                result.stopped = True
                break
            arrived(k, solve_run(*task))
    else:
        result.stopped = _on_pool(workers, tasks, arrived, stop_asked)
    result.points = [by_index[i] for i in sorted(by_index)]
    return result


def _on_pool(workers: int, tasks: list, arrived, stop_asked) -> bool:
    with ProcessPoolExecutor(max_workers=workers, mp_context=get_context("spawn")) as pool:
        pending = {pool.submit(solve_run, *task): k for k, task in enumerate(tasks)}
        while pending:
            done, _ = wait(pending, timeout=0.2, return_when=FIRST_COMPLETED)
            for future in done:
                arrived(pending.pop(future), future.result())
            if stop_asked():
                for future in pending:
                    future.cancel()
                return True
    return False


def _on_dask(dask: Any, tasks: list, arrived, stop_asked) -> bool:
    from distributed import Client, as_completed

    client = Client(dask) if isinstance(dask, str) else dask
    try:
        futures = {client.submit(solve_run, *task, pure=True): k for k, task in enumerate(tasks)}
        completed = as_completed(list(futures))
        for future in completed:
            arrived(futures[future], future.result())
            if stop_asked():
                client.cancel(list(futures))
                return True
        return False
    finally:
        if isinstance(dask, str):
            client.close()
