"""Solver settings that may be changed from another thread while a run goes on.

The stopping rules and acceleration limits live in one small object with stated
defaults, as in scipy.optimize; an unknown name is an error. A run reads a frozen
snapshot at the start of every iteration, so a change made at any moment takes effect at
the next iteration and can never leave the run with half of an update.
"""

from __future__ import annotations

import dataclasses
import math
import numbers
import threading
from dataclasses import dataclass
from typing import Any

from convergence.errors import ConvergenceInputError, UnknownSettingError

Q_MODES = ("bounded", "held")
STOP_RULES = ("estimated error", "residual")


@dataclass(frozen=True)
class SettingsSnapshot:
    """Frozen copy of the solver settings in force, with the version it was taken at.

    Attributes
    ----------
    q_min, q_max
        Bounds of Wegstein's q (defaults -5 and 0: common practice).
    direct_steps
        Direct-substitution steps before the first accelerated step (at least 1, since a
        slope needs two evaluations).
    early_acceleration
        With ``direct_steps`` 2, a Wegstein run accelerates already at iteration 2 when
        the first direct step cut the largest scaled residual to less than half (the
        first step shows a contracting loop, whose slope one step measures); otherwise it
        waits for the second (see :class:`convergence.steps.BoundedWegstein`).
    acceleration_interval
        After the first acceleration, accelerate every k-th iteration; the others are
        direct-substitution steps.
    q_mode
        ``"bounded"``: q from the latest slope of every iteration; ``"held"``: q per
        variable estimated at the first accelerated step, then held (re-clipped if the
        bounds change).
    tolerance
        Largest scaled residual accepted as converged.
    max_iterations
        Largest number of iterations (= evaluations of g).
    stop_on
        What must fall to ``tolerance`` for the run to count as converged.
        ``"estimated error"``: per tear, the largest scaled residual divided by
        ``|1 - s|``, s being the tear's recent dominant slope (never less than the
        residual). With s near 1 the residual understates the distance to the fixed
        point by 1/(1 - s) (for an affine map x* - x = (g(x) - x)/(1 - s) exactly), so
        this is what makes "converged" mean "within tolerance of the answer".
        ``"residual"``: the largest scaled residual itself (the rule of most codes,
        e.g. polykin's ``fixpoint_wegstein``).
    adaptive_bounds
        Let a Wegstein run widen the q bounds for itself when a variable's q = s/(s-1)
        lies outside them and two successive slope estimates agree (see
        :mod:`convergence.adaptive`). The widened bounds are used by that run only
        (this object is not changed), each widening is recorded as a "settings
        changed" event, and a change of the q bounds made during the run replaces
        them.
    dominant_slope
        In a Wegstein run in ``"bounded"`` q mode, a variable whose own q changed by
        more than 20 % since the last step (it is driven by other variables of its
        tear) takes q from its tear's dominant slope instead (see
        :mod:`convergence.coupling`).
    dominant_mode
        In a Wegstein run, a tear whose per-variable slopes of the latest step do not
        explain the step before (its variables are coupled) takes a step on its
        leading modes, fitted from its last three difference pairs, instead of
        Wegstein's per-variable step (the dominant eigenvalue method generalised,
        Crowe & Nishio 1975; see :mod:`convergence.modes`). Recorded as a
        ``"dominant mode"`` step in the history. Taken only where the run may adapt
        its step: ``q_mode`` ``"bounded"``, ``adaptive_bounds`` on, q_min < q_max,
        ``acceleration_interval`` 1.
    fallback, fallback_factor
        Safeguard of an accelerated run (Wegstein, Broyden): once its residual, on the
        best iterate's scale, exceeds ``fallback_factor`` times the best seen, the run
        goes back to the best point and takes direct-substitution steps from there for
        the rest of the run (a "fallback" step and event in the history), so that it
        converges wherever direct substitution does instead of being reported
        diverging (see :mod:`convergence.fallback`).
    divergence_factor, divergence_patience
        A run whose residual stays above ``divergence_factor`` times the best seen for
        ``divergence_patience`` iterations in a row is reported as diverging.
    version
        Incremented by every accepted :meth:`SolverSettings.update`.
    """

    q_min: float = -5.0
    q_max: float = 0.0
    direct_steps: int = 2
    early_acceleration: bool = True
    acceleration_interval: int = 1
    q_mode: str = "bounded"
    tolerance: float = 1e-8
    max_iterations: int = 200
    stop_on: str = "estimated error"
    adaptive_bounds: bool = True
    dominant_slope: bool = True
    dominant_mode: bool = True
    fallback: bool = True
    fallback_factor: float = 100.0
    divergence_factor: float = 1e4
    divergence_patience: int = 5
    version: int = 0

    def values(self) -> dict[str, Any]:
        """The settings as a plain dict, without the version."""
        return {name: getattr(self, name) for name in SETTING_NAMES}

    def differences(self, other: SettingsSnapshot) -> dict[str, tuple[Any, Any]]:
        """Settings that differ from ``other``, as ``{name: (other's value, own value)}``."""
        return {
            name: (getattr(other, name), getattr(self, name))
            for name in SETTING_NAMES
            if getattr(other, name) != getattr(self, name)
        }


SETTING_NAMES: tuple[str, ...] = tuple(
    field.name for field in dataclasses.fields(SettingsSnapshot) if field.name != "version"
)
_FLOAT_SETTINGS = ("q_min", "q_max", "tolerance", "fallback_factor", "divergence_factor")
_INT_MINIMUMS = {
    "direct_steps": 1,
    "acceleration_interval": 1,
    "max_iterations": 1,
    "divergence_patience": 1,
}


def _as_float(name: str, value: Any) -> float:
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise ConvergenceInputError(name, value, "a finite real number")
    if not math.isfinite(value):
        raise ConvergenceInputError(name, value, "a finite real number")
    return float(value)


def _as_int(name: str, value: Any, minimum: int) -> int:
    if isinstance(value, bool) or not isinstance(value, numbers.Integral) or value < minimum:
        raise ConvergenceInputError(name, value, f"a whole number >= {minimum}")
    return int(value)


def _checked(values: dict[str, Any]) -> dict[str, Any]:
    """Return ``values`` converted to their types, or raise on the first bad one."""
    checked = dict(values)
    for name in _FLOAT_SETTINGS:
        checked[name] = _as_float(name, values[name])
    for name, minimum in _INT_MINIMUMS.items():
        checked[name] = _as_int(name, values[name], minimum)
    if checked["stop_on"] not in STOP_RULES:
        raise ConvergenceInputError("stop_on", values["stop_on"], f"one of {list(STOP_RULES)}")
    for name in (
        "adaptive_bounds",
        "dominant_slope",
        "dominant_mode",
        "fallback",
        "early_acceleration",
    ):
        if not isinstance(checked[name], bool):
            raise ConvergenceInputError(name, values[name], "True or False")
    if checked["q_mode"] not in Q_MODES:
        raise ConvergenceInputError("q_mode", values["q_mode"], f"one of {list(Q_MODES)}")
    if checked["q_min"] > checked["q_max"]:
        raise ConvergenceInputError(
            "q_min", values["q_min"], f"a number <= q_max ({checked['q_max']:g})"
        )
    if checked["tolerance"] <= 0.0:
        raise ConvergenceInputError("tolerance", values["tolerance"], "a number > 0")
    if checked["fallback_factor"] <= 1.0:
        raise ConvergenceInputError("fallback_factor", values["fallback_factor"], "a number > 1")
    if checked["divergence_factor"] <= 1.0:
        raise ConvergenceInputError(
            "divergence_factor", values["divergence_factor"], "a number > 1"
        )
    return checked


def _reject_unknown(names: Any) -> None:
    unknown = sorted(set(names) - set(SETTING_NAMES))
    if unknown:
        raise UnknownSettingError("setting", unknown[0], f"one of {list(SETTING_NAMES)}")


class SolverSettings:
    """Live, thread-safe solver settings (see :class:`SettingsSnapshot` for each field).

    Read a value as an attribute (``settings.q_max``); change values with
    :meth:`update`, which checks them all together and applies them at once under a
    lock. Another thread may call :meth:`update` or :meth:`request_stop` while a run
    goes on.

    Parameters
    ----------
    **values
        Any of the setting names; the others keep their defaults.
    """

    def __init__(self, **values: Any) -> None:
        _reject_unknown(values)
        merged = {**SettingsSnapshot().values(), **values}
        object.__setattr__(self, "_lock", threading.Lock())
        object.__setattr__(self, "_current", SettingsSnapshot(**_checked(merged), version=0))
        object.__setattr__(self, "_stop", threading.Event())

    def __getattr__(self, name: str) -> Any:
        if name in SETTING_NAMES or name == "version":
            return getattr(self._current, name)
        raise AttributeError(f"SolverSettings has no attribute {name!r}")

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(f"use update({name}=...) to change a setting")

    def __repr__(self) -> str:
        values = ", ".join(f"{name}={value!r}" for name, value in self._current.values().items())
        return f"SolverSettings({values}; version {self._current.version})"

    def update(self, **changes: Any) -> None:
        """Check and apply ``changes`` together; bump the version if anything changed.

        Raises
        ------
        UnknownSettingError
            A name that is not a setting (the message lists the allowed names).
        ConvergenceInputError
            A value that is not allowed; nothing is changed then.
        """
        _reject_unknown(changes)
        with self._lock:
            current = self._current
            checked = _checked({**current.values(), **changes})
            if checked == current.values():
                return
            new = SettingsSnapshot(**checked, version=current.version + 1)
            object.__setattr__(self, "_current", new)

    def snapshot(self) -> SettingsSnapshot:
        """Return the settings in force now, frozen."""
        return self._current

    def request_stop(self) -> None:
        """Ask the run in progress to stop after the current evaluation.

        A run clears the request when it starts, so a stop pressed after a run has ended
        never stops the next one.
        """
        self._stop.set()

    @property
    def stop_requested(self) -> bool:
        """True once :meth:`request_stop` was called and not yet cleared."""
        return self._stop.is_set()

    def clear_stop(self) -> None:
        """Withdraw a stop request (a run clears it itself when it honours it)."""
        self._stop.clear()

    def to_dict(self) -> dict[str, Any]:
        """The setting values, for a case file."""
        return self._current.values()

    @classmethod
    def from_dict(cls, values: dict[str, Any]) -> SolverSettings:
        """Settings from :meth:`to_dict` output; missing names take their defaults (so a
        case file written before ``stop_on``, ``adaptive_bounds`` and ``dominant_slope``
        existed loads)."""
        return cls(**values)
