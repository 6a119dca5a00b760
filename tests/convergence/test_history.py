"""ConvergenceHistory: per-tear series for the recycle monitor, and the case-file form."""

from __future__ import annotations

import json

import numpy as np

from convergence import ConvergenceHistory, SolverSettings, diagnose_tears, solve_fixed_point
from tests.convergence.problems import coupled_problem


def _run_with_a_settings_change():
    # Fixed bounds: the one settings change is the callback's (no adaptive widening).
    settings = SolverSettings(
        direct_steps=2, acceleration_interval=2, tolerance=1e-12, adaptive_bounds=False
    )

    def callback(record):
        if record.iteration == 5:
            settings.update(q_max=0.5)

    return solve_fixed_point(coupled_problem(), "wegstein", settings, callback)


def test_series_per_tear():
    result = _run_with_a_settings_change()
    history = result.history
    residuals = history.residuals("S9")
    assert residuals.shape == (result.iterations,)
    assert residuals[-1] <= 1e-12 < residuals[0]
    q_median = history.q_median("S3")
    steps = [record.step for record in history.records]
    assert np.isnan(q_median[[k for k, step in enumerate(steps) if step != "accelerated"]]).all()
    assert np.isfinite(q_median[[k for k, step in enumerate(steps) if step == "accelerated"]]).all()
    assert np.isnan(history.slopes("S3")[0]) and np.isfinite(history.slopes("S3")[1:]).all()
    assert [event.kind for event in history.events] == ["settings changed", "converged"]


def test_round_trip_through_json():
    result = _run_with_a_settings_change()
    text = json.dumps(result.history.to_dict())
    restored = ConvergenceHistory.from_dict(json.loads(text))
    assert restored.records == result.history.records
    assert restored.events == result.history.events
    # Each settings version is stored once, not once per record.
    assert len(json.loads(text)["settings"]) == 2
    assert diagnose_tears(restored) == result.diagnosis
