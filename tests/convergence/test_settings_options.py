"""The settings added for issue 7: stop_on, adaptive_bounds, dominant_slope."""

from __future__ import annotations

import json

import pytest

from convergence import SETTING_NAMES, ConvergenceInputError, SolverSettings


def test_defaults_of_the_new_settings():
    settings = SolverSettings()
    assert settings.stop_on == "estimated error"
    assert settings.adaptive_bounds is True and settings.dominant_slope is True
    assert {"stop_on", "adaptive_bounds", "dominant_slope"} <= set(SETTING_NAMES)


def test_a_settings_dict_written_before_them_still_loads():
    # A case file's "solver_settings" as saved before issue 7 (examples/*.loop.json).
    old = {
        "q_min": -50.0,
        "q_max": 0.0,
        "direct_steps": 2,
        "acceleration_interval": 1,
        "q_mode": "bounded",
        "tolerance": 1e-08,
        "max_iterations": 200,
        "divergence_factor": 10000.0,
        "divergence_patience": 5,
    }
    settings = SolverSettings.from_dict(old)
    assert settings.q_min == -50.0 and settings.stop_on == "estimated error"
    again = SolverSettings.from_dict(json.loads(json.dumps(settings.to_dict())))
    assert again.to_dict() == settings.to_dict()


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"stop_on": "residuals"}, "stop_on"),
        ({"stop_on": None}, "stop_on"),
        ({"adaptive_bounds": 1}, "adaptive_bounds"),
        ({"dominant_slope": "yes"}, "dominant_slope"),
    ],
)
def test_bad_values_are_refused_naming_field_value_and_allowed(changes, field):
    settings = SolverSettings()
    with pytest.raises(ConvergenceInputError) as caught:
        settings.update(**changes)
    assert caught.value.field == field and caught.value.value is changes[field]
    assert caught.value.allowed in str(caught.value)
    assert settings.version == 0


def test_they_change_live_like_the_others():
    settings = SolverSettings()
    settings.update(stop_on="residual", adaptive_bounds=False, dominant_slope=False)
    assert settings.version == 1
    assert (settings.stop_on, settings.adaptive_bounds, settings.dominant_slope) == (
        "residual",
        False,
        False,
    )
