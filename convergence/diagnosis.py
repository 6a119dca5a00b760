"""Tear health: from the observed slopes, say how each tear behaves and which q would help.

For an iteration x <- g(x) whose dominant slope is s, direct substitution converges when
|s| < 1, monotonically for s > 0 and oscillating for s < 0. Wegstein's analysis
(Wegstein 1958, CACM 1(6)) gives the q that makes the step exact for that slope:
q = s/(s - 1); it is negative for 0 < s < 1 (acceleration), between 0 and 1 for s < 0
(damping) and above 1 for s > 1. When that q lies outside [q_min, q_max] the bounds
stop the method from using it, and the diagnosis says which bound to move.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from convergence.history import ConvergenceHistory
from convergence.settings import SettingsSnapshot, SolverSettings

SLOPE_WINDOW = 5
#: How the advice names a run's method when its steps do not use q bounds.
_METHOD_NAMES = {"direct": "direct substitution", "broyden": "quasi-Newton (Broyden)"}
RESIDUAL_WINDOW = 6
BOUND_MARGIN = 0.25


@dataclass(frozen=True)
class TearDiagnosis:
    """What the recycle monitor shows for one tear.

    Attributes
    ----------
    tear
        Tear name.
    converging
        The tear has converged, or the error factor per iteration of the step rule in
        force, q + (1 - q) s (Wegstein 1958; q = 0 for direct substitution), is below 1
        in size; for quasi-Newton steps or an unknown slope: the residual falls.
    pattern
        ``"monotonic"`` (slope > 0), ``"oscillating"`` (slope < 0) or ``"unknown"``.
    slope
        Dominant slope estimate (median of the last few per-iteration estimates; nan if
        none).
    suggested_q
        s/(s - 1) (nan if the slope is unknown, -inf for s = 1).
    suggested_bounds
        q bounds that admit ``suggested_q`` with a margin; the current bounds if they
        already do.
    blocked_by_bounds
        ``suggested_q`` lies outside the q bounds in force (the settings' bounds as the
        run's adaptive bounds last widened them, :func:`bounds_in_force`) and the tear's
        last step was not a dominant-mode step (which the bounds do not limit).
    advice
        The above in plain words.
    widened_by_run
        The settings' q bounds stop ``suggested_q`` but the run's adaptive bounds had
        widened them to admit it (``suggested_bounds`` would keep that widening).
    residual_ratio
        Average factor by which the tear's residual changed per iteration over the last
        few iterations (nan if unknown).
    direct_substitution_converges
        |slope| < 1.
    rate
        q + (1 - q) s for the last direct or accelerated step (nan if unknown).
    """

    tear: str
    converging: bool
    pattern: str
    slope: float
    suggested_q: float
    suggested_bounds: tuple[float, float]
    blocked_by_bounds: bool
    advice: str
    widened_by_run: bool = False
    residual_ratio: float = math.nan
    direct_substitution_converges: bool = False
    rate: float = math.nan


def _recent_slope(history: ConvergenceHistory, tear: str) -> float:
    slopes = history.slopes(tear)
    slopes = slopes[np.isfinite(slopes)]
    if slopes.size == 0:
        return math.nan
    return float(np.median(slopes[-SLOPE_WINDOW:]))


def _residual_ratio(history: ConvergenceHistory, tear: str) -> float:
    residuals = history.residuals(tear)[-RESIDUAL_WINDOW:]
    if residuals.size < 2 or residuals[0] <= 0.0 or residuals[-1] <= 0.0:
        return math.nan
    return float((residuals[-1] / residuals[0]) ** (1.0 / (residuals.size - 1)))


def _last_step(history: ConvergenceHistory, tear: str) -> tuple[str, float]:
    """The kind of the tear's last step (``"direct"``, ``"accelerated"``, ``"dominant
    mode"``, ``"quasi-Newton"`` or ``"none"``) and, for an accelerated one, its median q."""
    for record in reversed(history.records):
        if record.step in ("direct", "fallback"):
            return "direct", math.nan
        if record.took_mode_step(tear):
            return "dominant mode", math.nan
        if record.step in ("accelerated", "dominant mode"):
            return "accelerated", record.q[tear].median
        if record.step == "quasi-Newton":
            return "quasi-Newton", math.nan
    return "none", math.nan


def _rate(history: ConvergenceHistory, tear: str, slope: float) -> float:
    """Error factor per iteration of the last direct or accelerated step: q + (1 - q) s.

    After a quasi-Newton or dominant-mode step, or with no slope, it is unknown (nan).
    """
    kind, q = _last_step(history, tear)
    if kind == "accelerated":
        return q + (1.0 - q) * slope
    if kind in ("quasi-Newton", "dominant mode"):
        return math.nan
    return slope


def _round_outward(value: float, upward: bool) -> float:
    """``value`` rounded to two significant digits, away from the q it must admit."""
    if value == 0.0:
        return 0.0
    step = 10.0 ** (math.floor(math.log10(abs(value))) - 1)
    rounded = (math.ceil if upward else math.floor)(value / step) * step
    return float(f"{rounded:.12g}")


def suggested_bounds(q: float, q_min: float, q_max: float) -> tuple[float, float]:
    """Bounds that admit ``q`` with a margin, moving only the bound that stops it.

    Above 0 < q < 1 the new q_max stays below 1 (q = 1 makes no progress).
    """
    if not math.isfinite(q) or q_min <= q <= q_max:
        return (q_min, q_max)
    margin = BOUND_MARGIN * max(abs(q), 0.4)
    if q < q_min:
        return (_round_outward(q - margin, upward=False), q_max)
    upper = q + margin
    if q < 1.0:
        upper = min(upper, (q + 1.0) / 2.0)
    return (q_min, _round_outward(upper, upward=True))


def _format_q(q: float) -> str:
    return f"{q:.0f}" if abs(q) >= 10.0 else f"{q:.2f}"


def bounds_in_force(history: ConvergenceHistory, settings: SettingsSnapshot) -> tuple[float, float]:
    """The q bounds the run last used: the settings' bounds, widened where the run's
    adaptive bounds (:mod:`convergence.adaptive`) widened them under the same settings.

    A widening lasts for the run, so advice to widen a bound the run already widened
    would be stale; a user's change of q_min or q_max replaces every widening, so only
    records made under the settings' present bounds count.
    """
    q_min, q_max = settings.q_min, settings.q_max
    for record in reversed(history.records):
        if (record.settings.q_min, record.settings.q_max) != (q_min, q_max):
            break
        if record.q_bounds is not None:
            return (min(q_min, record.q_bounds[0]), max(q_max, record.q_bounds[1]))
    return (q_min, q_max)


def _advice(
    pattern: str,
    converging: bool,
    slope: float,
    q: float,
    bounds: tuple[float, float],
    settings: SettingsSnapshot,
    in_force: tuple[float, float],
    method: str = "wegstein",
    mode_step: bool = False,
) -> str:
    if not math.isfinite(slope):
        return "unknown: too few iterations (or steps too small) to estimate a slope"
    state = pattern if converging else f"{pattern} and diverging"
    head = f"{state}, slope {slope:.2f}"
    if abs(slope) >= 1.0:
        head += " (direct substitution diverges)"
    if method in _METHOD_NAMES:
        return f"{head}; this {_METHOD_NAMES[method]} run does not use Wegstein's q bounds"
    if not math.isfinite(q):
        return f"{head}: no finite q helps; the loop does not damp itself (is there a purge?)"
    low, high = in_force
    if low <= q <= high:
        widened = (low, high) != (settings.q_min, settings.q_max)
        return f"{head}: q ≈ {_format_q(q)} would help; it is within the q bounds " + (
            f"[{low:g}, {high:g}] the run widened itself to (settings [{settings.q_min:g}, "
            f"{settings.q_max:g}])"
            if widened
            else f"[{low:g}, {high:g}]"
        )
    if q > high:
        bound = f"q_max = {high:g}"
        wider = f"q_max = {max(bounds[1], suggested_bounds(q, low, high)[1]):g}"
    else:
        bound = f"q_min = {low:g}"
        wider = f"q_min = {min(bounds[0], suggested_bounds(q, low, high)[0]):g}"
    if mode_step:
        return (
            f"{head}: q ≈ {_format_q(q)} would help; the run's dominant-mode steps, which "
            f"the q bounds do not limit, went past {bound} (for Wegstein's own steps, try "
            f"{wider})"
        )
    return f"{head}: q ≈ {_format_q(q)} would help; {bound} stops it; try {wider}"


def _diagnose_one(
    history: ConvergenceHistory, tear: str, settings: SettingsSnapshot, method: str
) -> TearDiagnosis:
    slope = _recent_slope(history, tear)
    ratio = _residual_ratio(history, tear)
    residuals = history.residuals(tear)
    rate = _rate(history, tear, slope)
    if residuals.size and residuals[-1] <= settings.tolerance:
        converging = True
    elif math.isfinite(rate):
        converging = abs(rate) < 1.0
    else:
        converging = math.isfinite(ratio) and ratio < 1.0
    if not math.isfinite(slope):
        pattern, q = "unknown", math.nan
    else:
        pattern = "oscillating" if slope < 0.0 else "monotonic"
        q = slope / (slope - 1.0) if slope != 1.0 else -math.inf
    in_force = bounds_in_force(history, settings)
    uses_bounds = method not in _METHOD_NAMES
    mode_step = _last_step(history, tear)[0] == "dominant mode"
    outside = bool(uses_bounds and math.isfinite(slope) and not in_force[0] <= q <= in_force[1])
    blocked = outside and not mode_step
    bounds = (
        suggested_bounds(q, settings.q_min, settings.q_max)
        if uses_bounds
        else (settings.q_min, settings.q_max)
    )
    return TearDiagnosis(
        tear=tear,
        converging=converging,
        pattern=pattern,
        slope=slope,
        suggested_q=q,
        suggested_bounds=bounds,
        blocked_by_bounds=blocked,
        advice=_advice(
            pattern, converging, slope, q, bounds, settings, in_force, method, mode_step
        ),
        widened_by_run=bool(
            uses_bounds
            and math.isfinite(slope)
            and not outside
            and not settings.q_min <= q <= settings.q_max
        ),
        residual_ratio=ratio,
        direct_substitution_converges=bool(math.isfinite(slope) and abs(slope) < 1.0),
        rate=rate,
    )


def diagnose_tears(
    history: ConvergenceHistory,
    settings: SolverSettings | SettingsSnapshot | None = None,
    tears: list[str] | None = None,
    method: str | None = None,
) -> dict[str, TearDiagnosis]:
    """Diagnose every tear of a run from its history.

    q advice (which bound stops Wegstein's q, which bounds to try) is given for a
    bounded Wegstein run only: a direct-substitution or quasi-Newton run uses no q
    bounds, so its advice says so and its suggested bounds are the settings' own.

    Parameters
    ----------
    history
        The run's history (its records carry the per-iteration slope estimates).
    settings
        The q bounds to judge against; default: the settings of the last record.
    tears
        Tear names; default: those of the first record.
    method
        The run's method (a key of :data:`convergence.solver.METHODS`); default:
        ``"broyden"`` if the history has a quasi-Newton step, else ``"wegstein"``.

    Returns
    -------
    dict[str, TearDiagnosis]
        One diagnosis per tear, in order.
    """
    if isinstance(settings, SolverSettings):
        settings = settings.snapshot()
    if settings is None:
        settings = history.records[-1].settings if history.records else SettingsSnapshot()
    if tears is None:
        tears = list(history.records[0].residuals) if history.records else []
    if method is None:
        steps = {record.step for record in history.records}
        method = "broyden" if "quasi-Newton" in steps else "wegstein"
    return {tear: _diagnose_one(history, tear, settings, method) for tear in tears}
