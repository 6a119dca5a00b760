"""SolverSettings: stated defaults, checked updates applied at once, thread safety."""

from __future__ import annotations

import dataclasses
import json
import threading

import pytest

from convergence import (
    SETTING_NAMES,
    ConvergenceInputError,
    SettingsSnapshot,
    SolverSettings,
    UnknownSettingError,
)


def test_defaults():
    # q bounds -5 and 0: common practice (DESIGN.md, "Recycles").
    settings = SolverSettings()
    assert (settings.q_min, settings.q_max) == (-5.0, 0.0)
    assert settings.direct_steps == 2 and settings.acceleration_interval == 1
    assert settings.q_mode == "bounded"
    assert settings.tolerance == 1e-8 and settings.max_iterations == 200
    assert settings.divergence_factor == 1e4 and settings.divergence_patience == 5
    assert settings.snapshot().version == 0


def test_unknown_name_is_a_key_error_listing_allowed_names():
    settings = SolverSettings()
    with pytest.raises(KeyError) as caught:
        settings.update(qmax=1.0)
    assert isinstance(caught.value, UnknownSettingError)
    assert isinstance(caught.value, ValueError)
    message = str(caught.value)
    assert "qmax" in message and all(name in message for name in SETTING_NAMES)
    with pytest.raises(UnknownSettingError):
        SolverSettings(q_maximum=0.5)


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"q_min": 1.0}, "q_min"),  # above q_max = 0
        ({"q_max": float("nan")}, "q_max"),
        ({"tolerance": 0.0}, "tolerance"),
        ({"tolerance": -1e-8}, "tolerance"),
        ({"direct_steps": 0}, "direct_steps"),
        ({"acceleration_interval": 1.5}, "acceleration_interval"),
        ({"max_iterations": True}, "max_iterations"),
        ({"q_mode": "fixed"}, "q_mode"),
        ({"divergence_factor": 1.0}, "divergence_factor"),
        ({"divergence_patience": 0}, "divergence_patience"),
        ({"q_max": "0.5"}, "q_max"),
    ],
)
def test_invalid_values_name_field_value_and_allowed(changes, field):
    settings = SolverSettings()
    with pytest.raises(ConvergenceInputError) as caught:
        settings.update(**changes)
    assert caught.value.field == field
    assert caught.value.value is changes[field]
    assert field in str(caught.value) and caught.value.allowed in str(caught.value)
    assert settings.snapshot() == SettingsSnapshot()  # nothing changed


def test_update_is_checked_as_a_whole():
    settings = SolverSettings()
    settings.update(q_min=0.2, q_max=0.5)  # each alone would be refused against the other
    assert (settings.q_min, settings.q_max, settings.version) == (0.2, 0.5, 1)
    with pytest.raises(ConvergenceInputError):
        settings.update(q_max=2.0, tolerance=0.0)
    assert (settings.q_max, settings.tolerance, settings.version) == (0.5, 1e-8, 1)


def test_version_bumps_only_on_a_real_change():
    settings = SolverSettings()
    settings.update(q_max=0.0)
    assert settings.version == 0
    settings.update(q_max=0.5)
    settings.update(max_iterations=50)
    assert settings.version == 2


def test_snapshot_is_frozen_and_detached():
    settings = SolverSettings()
    snapshot = settings.snapshot()
    settings.update(q_min=-10.0)
    assert snapshot.q_min == -5.0 and settings.snapshot().q_min == -10.0
    with pytest.raises(dataclasses.FrozenInstanceError):
        snapshot.q_min = 3.0  # type: ignore[misc]
    with pytest.raises(AttributeError, match="update"):
        settings.q_min = 3.0


def test_round_trip_through_a_case_file():
    settings = SolverSettings(q_min=-20.0, q_mode="held", max_iterations=80)
    restored = SolverSettings.from_dict(json.loads(json.dumps(settings.to_dict())))
    assert restored.to_dict() == settings.to_dict()
    with pytest.raises(UnknownSettingError):
        SolverSettings.from_dict({"speed": 3})


def test_stop_request_and_clear():
    settings = SolverSettings()
    assert not settings.stop_requested
    settings.request_stop()
    assert settings.stop_requested
    settings.clear_stop()
    assert not settings.stop_requested


def test_concurrent_updates_never_leave_a_torn_state():
    # Two consistent configurations written from two threads; every snapshot a reader
    # takes must be one of them (or the start), never a mix.
    settings = SolverSettings()
    first = {"q_min": -1.0, "q_max": 0.5, "tolerance": 1e-6}
    second = {"q_min": -10.0, "q_max": -2.0, "tolerance": 1e-9}
    allowed = {(-5.0, 0.0, 1e-8), tuple(first.values()), tuple(second.values())}
    stop = threading.Event()

    def writer(values):
        while not stop.is_set():
            settings.update(**values)

    threads = [threading.Thread(target=writer, args=(values,)) for values in (first, second)]
    for thread in threads:
        thread.start()
    try:
        versions = []
        for _ in range(20_000):
            snapshot = settings.snapshot()
            assert (snapshot.q_min, snapshot.q_max, snapshot.tolerance) in allowed
            versions.append(snapshot.version)
    finally:
        stop.set()
        for thread in threads:
            thread.join()
    assert versions == sorted(versions)
