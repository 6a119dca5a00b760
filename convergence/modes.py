"""Dominant-mode step: remove a coupled tear's leading modes where per-variable q cannot.

Wegstein's q = s/(s - 1) per variable (Wegstein 1958) is exact for a tear whose
variables each follow a slope of their own. In a coupled tear (a reversible reaction
recycling both isomers, a purge flow set elsewhere) g's Jacobian has modes that mix the
variables: the per-variable secant quotients change from step to step and the q made
from them removes one mode at a time.

The dominant eigenvalue method (Orbach & Crowe, Can. J. Chem. Eng. 49, 509, 1971)
estimates the leading eigenvalue lambda from successive differences and extrapolates
along its mode, x + (g(x) - x)/(1 - lambda); its generalisation to several leading
eigenvalues (Crowe & Nishio, AIChE J. 21, 528, 1975) fits them from the last
differences. This step does the latter from the last :data:`MEMORY` difference pairs
of a tear (in its scaled variables): with X = [dx_(k-2), dx_(k-1), dx_k] and
G = [dg_(k-2), dg_(k-1), dg_k], the map restricted to span(X) is modelled as
g(x + X c) = g(x) + G c, c is chosen to make the modelled residual
g(x) - x + (G - X) c smallest (least squares), and the next iterate is g(x) + G c.
Outside span(X) the step is direct substitution.

When a tear takes it instead of Wegstein's step (rules of our own, measured on
tests/benchmarks/recycle_cases.py; otherwise the tear keeps Wegstein's step):

- Its last two steps are parallel (one mode seen) and its moving variables all have
  about the mode's slope lambda = <dg, dx>/<dx, dx> (within :data:`UNIFORM` of
  1 - lambda; per-variable slopes then cannot tell a coupled tear from a decoupled
  one), lambda < 1: the one-mode step x + (g(x) - x)/(1 - lambda) along the mode,
  direct substitution across it (per-variable Wegstein would extrapolate the other
  modes by the same factor). Once :data:`MEMORY` pairs are known, such a tear takes
  the leading-modes step below instead: the small differences across the mode in its
  earlier steps fit the other modes too (the reversible isomerisation, modes 0.9 and
  0.1, then takes 5 passes instead of 7). A tear with one moving variable is Wegstein's
  own case:
  there a negative slope is taken this way (a damping q = lambda/(lambda - 1)
  between 0 and 1 without waiting for two agreeing slopes: a point between x and
  g(x), never an extrapolation); a positive one at the first pair and while the
  secant works (the tear's previous step was this step and its residual then fell
  below :data:`PROGRESS` of the one before), and one above 1 also where the last two
  pairs agree on it (direct substitution diverging: no q within the bounds turns it
  back; a slope-1.3 line is then exact at iteration 2, as with our Broyden, instead
  of at 4); otherwise it is left to Wegstein and its adaptive bounds, which guard q
  below q_min and above 1. (An energy recycle with 1 % bypass, slope 0.99: 7 passes
  instead of 9, as many as scipy's broyden1.) From the second such secant step on,
  the step goes through the last three points instead of two (:func:`curved_secant`,
  inverse quadratic interpolation) where that moves the variable by at most
  :data:`CURVATURE` of the secant's step: an energy loop's heat capacities curve its
  map (the suite's energy recycle then takes 5 passes instead of 6, its 40 % bypass
  variant 4 instead of 5).
- At the first pair, the step of an early accelerated iteration
  (:meth:`convergence.steps.BoundedWegstein._early`): when the tear's g change is
  parallel to its step, the step is a mode and the one-mode rules above apply (with
  several moving variables a mode that grows is not trusted from one pair).
- Its last two steps are parallel, it has several moving variables, and both of its
  last two difference pairs give a mode that grows, lambda > 1, agreeing within
  :data:`MISFIT` of lambda - 1: the one-mode step as above, whatever the per-variable
  slopes say (no q within the bounds turns a growing mode back; a 25 mol/s fixed purge
  of tests/benchmarks/recycle_variants.py grew at 1.013 a pass and never converged
  before; one estimate alone is not trusted, since from a zero-flow start the first
  quotients are noise).
- Its steps are not parallel and the tear is known to be coupled: Wegstein's
  per-variable slopes of the latest step once mispredicted the previous step's g
  change by more than :data:`MISFIT` at a non-parallel iteration, or the tear took a
  one-mode step with several moving variables. Once known, a tear stays coupled and
  takes the leading-modes step at every non-parallel iteration while its slopes still
  mispredict or its residual falls below :data:`PROGRESS` of the last (per-variable slopes
  of a coupled tear can agree for a step by chance: leaving the step then cost the
  25 mol/s fixed purge of the variants 4 passes, 16 instead of 12). A decoupled tear,
  whose slopes hold, keeps Wegstein's step exactly; a tear not yet known to be
  coupled whose residual fell below :data:`PROGRESS` times the last one keeps
  Wegstein's step, which is working. (Three pairs rather than two: the fixed-purge
  loop, three coupled flows, took 15 passes instead of 19.)

- Before all of these: a tear with d >= 2 moving variables whose remembered steps span
  them takes the leading-modes step wherever that full secant model has shown itself
  right, forecasting the latest g change better than the per-variable slopes did
  (:func:`_full_secant`; 486 reversible isomerisations took 2,297 passes instead of
  2,553, and the default fell behind the best compared method on none of them instead
  of 96).

A step whose modelled eigenvalues come within :data:`CLOSEST_TO_ONE` of 1 (a gain
above 1/:data:`CLOSEST_TO_ONE`) is not taken.
"""

from __future__ import annotations

import math
from collections import deque

import numpy as np

from convergence.points import Evaluated
from convergence.problem import TearLayout

#: Relative misprediction of the previous step's g change by the latest per-variable
#: slopes above which the tear counts as coupled (a rule of our own, the same 20 % as
#: the steadiness test of :mod:`convergence.adaptive`).
MISFIT = 0.2
#: Two scaled steps whose cosine exceeds this are one mode.
PARALLEL = 0.999
#: Along one mode, per-variable slopes this close to the mode's eigenvalue (relative
#: to 1 - lambda, the quantity the step divides by) cannot tell a coupled tear from a
#: decoupled one; the tear then takes the one-mode step (measured on the suite: 0.3 to
#: 1.0 give the same passes).
UNIFORM = 0.5
#: A tear not yet known to be coupled whose largest scaled residual fell below this
#: fraction of the last one keeps Wegstein's step: it is working (measured on
#: tests/benchmarks/recycle_cases.py: the inert-and-purge loop, decoupled after a
#: nonlinear start, loses two passes to a mode step taken while Wegstein converges).
PROGRESS = 0.2
#: Modelled eigenvalues must stay this far from 1 (gain 1/(1 - lambda) at most 2000,
#: the widest adaptive q bound's, :data:`convergence.adaptive.Q_MIN_LIMIT`).
CLOSEST_TO_ONE = 1.0 / 2001.0
#: Difference pairs kept (the latest included): up to this many leading modes.
MEMORY = 3


def _misfit(a_previous, b_previous, slopes) -> float:
    """How badly the per-variable slopes predict the previous g change."""
    size = float(np.linalg.norm(b_previous))
    if size == 0.0:
        return 0.0
    return float(np.linalg.norm(slopes * a_previous - b_previous)) / size


def _eigenvalues_allowed(eigenvalues: np.ndarray) -> bool:
    real = np.real(eigenvalues)
    return bool(np.all(np.isfinite(eigenvalues)) and np.all(np.abs(1.0 - real) >= CLOSEST_TO_ONE))


def _quotient(step: np.ndarray, change: np.ndarray) -> float | None:
    """The eigenvalue estimate <change, step>/<step, step> of one pair (None: no step)."""
    size = float(np.dot(step, step))
    return float(np.dot(change, step)) / size if size > 0.0 else None


def cosine(first: np.ndarray, second: np.ndarray) -> float:
    """|cos| of the angle between two vectors (1 when either is zero)."""
    size = float(np.sqrt(np.dot(first, first) * np.dot(second, second)))
    return abs(float(np.dot(first, second))) / size if size > 0.0 else 1.0


def _one_mode(f: np.ndarray, step: np.ndarray, change: np.ndarray) -> np.ndarray | None:
    """Dominant eigenvalue step: x + f/(1 - lambda) along ``step``, direct elsewhere.

    The model g(x + step c) = g(x) + change c, c minimising the modelled residual;
    returns the scaled displacement from x.
    """
    size = float(np.dot(step, step))
    eigenvalue = float(np.dot(change, step)) / size
    if not _eigenvalues_allowed(np.array([eigenvalue])):
        return None
    difference = change - step
    weight = -float(np.dot(difference, f)) / float(np.dot(difference, difference))
    return f + change * weight


#: The curved secant replaces the secant step only where it moves the variable by at
#: most this fraction of the secant's own step away from it (measured on the energy
#: loops of the suite, its variants and further scratch loops: 0.25 to 1 give the same
#: passes); a larger correction means the oldest point lies outside the curve's reach.
CURVATURE = 0.5


def curved_secant(
    f: float, latest: tuple[float, float], previous: tuple[float, float]
) -> float | None:
    """The root of f = g(x) - x by inverse quadratic interpolation through the last three
    points of one variable, as a displacement from the latest (None: two f values equal).

    ``latest`` and ``previous`` are the (step, g change) pairs of the last two steps;
    the points are x_k = 0, x_(k-1) = -a_1, x_(k-2) = -a_1 - a_0 with their f values.
    Inverse quadratic interpolation is the interpolation step of Brent's method (Brent,
    Algorithms for Minimization without Derivatives, 1973, ch. 4): on a smooth curve its
    error shrinks with the product of the last three errors, the secant's with two.
    """
    (a1, b1), (a0, b0) = latest, previous
    xs = (0.0, -a1, -a1 - a0)
    f1 = f - (b1 - a1)
    fs = (f, f1, f1 - (b0 - a0))
    if len(set(fs)) < 3:
        return None
    total = 0.0
    for j in range(3):
        term = xs[j]
        for m in range(3):
            if m != j:
                term *= fs[m] / (fs[j] - fs[m])
        total += term
    return total if math.isfinite(total) else None


def _leading_modes(f: np.ndarray, steps: np.ndarray, changes: np.ndarray) -> np.ndarray | None:
    """The generalised step on the span of the steps, direct substitution elsewhere.

    g(x + X c) = g(x) + G c, c minimising the modelled residual f + (G - X) c; the
    next iterate g(x) + G c. Returns the scaled displacement from x.
    """
    projected, *_ = np.linalg.lstsq(steps, changes, rcond=None)
    if not _eigenvalues_allowed(np.linalg.eigvals(projected)):
        return None
    weights, *_ = np.linalg.lstsq(changes - steps, -f, rcond=None)
    return f + changes @ weights


#: Where nothing is left to check a full secant model against (exactly d pairs for d
#: moving variables), its latest d unit steps must span them at least as well as two
#: steps that are not parallel (:data:`PARALLEL`): smallest singular value over largest
#: sqrt((1 - cos)/(1 + cos)) = 0.022. (The fixed-purge loop of the suite, three coupled
#: flows, took 15 passes instead of 14 with 1e-3; a checked model needs no such limit:
#: 486 reversible isomerisations, a and b from 0.1 to 0.9, r from 0.5 to 0.99, took
#: 2,297 passes with none and 2,306 with 0.03 on every model.)
SPANNING = math.sqrt((1.0 - PARALLEL) / (1.0 + PARALLEL))


def _forecast_error(model: np.ndarray, step: np.ndarray, change: np.ndarray) -> float:
    """|model step - change| / |change|: how badly a model predicted a g change."""
    size = float(np.linalg.norm(change))
    return float(np.linalg.norm(model @ step - change)) / size if size > 0.0 else 0.0


def _full_secant(
    point: Evaluated, before: list[tuple[np.ndarray, np.ndarray]], part: slice
) -> np.ndarray | None:
    """The leading-modes step of a tear whose remembered steps span its moving
    variables and whose secant model has shown itself right, or None.

    With d moving variables and at least d difference pairs whose latest d steps span
    them, the pairs determine g's whole Jacobian on those variables: the secant method
    for simultaneous equations (Wolfe, Commun. ACM 2(12), 12, 1959; Barnes, Comput. J.
    8, 66, 1965), which is exact on an affine map. It is taken where it forecast the
    latest g change better than Wegstein's per-variable slopes did: from the pairs
    before the latest (at least d of them), within :data:`MISFIT` and closer than the
    slopes of the pair before; with exactly d pairs, where those slopes missed by more
    than :data:`MISFIT` (a coupled tear). An isomerisation recycling both isomers
    (a = b = 0.5, r = 0.9) then takes 5 passes instead of 7; a decoupled tear off its
    nonlinear start (the inert-and-purge loop) keeps Wegstein's step, whose slopes
    forecast exactly where the older pairs' model missed by 130 %.
    """
    if not before:
        return None
    scale = point.scale[part]
    usable = point.usable[part]
    moving = int(usable.sum())
    pairs = [(a[part] / scale, b[part] / scale) for a, b in before]
    pairs.append((point.step[part] / scale, point.g_step[part] / scale))
    if moving < 2 or len(pairs) < moving:
        return None
    steps = np.column_stack([a for a, _ in pairs])
    changes = np.column_stack([b for _, b in pairs])
    x_steps, g_changes = steps[usable], changes[usable]
    latest = x_steps[:, -moving:]
    lengths = np.linalg.norm(latest, axis=0)
    if not np.all(lengths > 0.0):
        return None
    singular = np.linalg.svd(latest / lengths, compute_uv=False)
    spread = singular[moving - 1] / singular[0]
    if not spread > 0.0:
        return None
    a_previous, b_previous = x_steps[:, -2], g_changes[:, -2]
    slopes = np.zeros_like(a_previous)
    np.divide(b_previous, a_previous, out=slopes, where=a_previous != 0.0)
    slopes_error = _forecast_error(np.diag(slopes), x_steps[:, -1], g_changes[:, -1])
    if len(pairs) > moving:
        model = g_changes[:, :-1] @ np.linalg.pinv(x_steps[:, :-1])
        model_error = _forecast_error(model, x_steps[:, -1], g_changes[:, -1])
        shown = model_error <= MISFIT and model_error < slopes_error
    else:
        # nothing to check the model against: its steps must not be parallel
        shown = slopes_error > MISFIT and spread >= SPANNING
    return _leading_modes(point.fx[part] / scale, steps, changes) if shown else None


class DominantModes:
    """Remembers the last difference pairs and makes the dominant-mode step.

    Parameters
    ----------
    layout
        The checked problem (tear slices).
    """

    def __init__(self, layout: TearLayout) -> None:
        self.layout = layout
        self.pairs: deque[tuple[np.ndarray, np.ndarray]] = deque(maxlen=MEMORY - 1)
        self.residuals: dict[str, float] = {}
        self.coupled: dict[int, bool] = {}
        self.secant: set[int] = set()  # one-variable tears whose last step was the secant

    def improve(
        self, point: Evaluated, x_new: np.ndarray, allowed: bool
    ) -> tuple[np.ndarray, list[str]]:
        """``x_new`` with the coupled tears' parts replaced by the dominant-mode step.

        Returns the new iterate and the tears that took the step (none unless
        ``allowed``). Remembers this point's difference pair and residuals for the next
        calls, so that direct-substitution steps teach it too.
        """
        before = list(self.pairs)
        last_residuals, self.residuals = (
            self.residuals,
            {
                tear: float(np.max(np.abs(point.fx[part]) / point.scale[part]))
                for tear, part in self.layout.tear_slices.items()
            },
        )
        if point.step is None:
            return x_new, []
        self.pairs.append((point.step, point.g_step))
        if not allowed:
            return x_new, []
        scale = point.scale
        improved, moved = x_new, []
        for tear, part in self.layout.tear_slices.items():
            last = last_residuals.get(tear, np.inf)
            ratio = self.residuals[tear] / last if last > 0.0 else np.inf
            displacement = self._mode_rules(point, before, part, ratio)
            full = _full_secant(point, before, part)
            if full is not None:
                # the full secant model, where it has shown itself right, comes first
                self.coupled[part.start] = True
                displacement = full
            if displacement is None or not np.all(np.isfinite(displacement)):
                continue
            if not moved:
                improved = x_new.copy()
            improved[part] = point.x[part] + displacement * scale[part]
            moved.append(tear)
        return improved, moved

    def _mode_rules(
        self,
        point: Evaluated,
        before: list[tuple[np.ndarray, np.ndarray]],
        part: slice,
        ratio: float,
    ) -> np.ndarray | None:
        """The step the one-mode and coupled-tear rules choose, or None (Wegstein)."""
        after_secant = part.start in self.secant
        self.secant.discard(part.start)
        progressing = ratio < PROGRESS
        scale = point.scale[part]
        a_latest, b_latest = point.step[part] / scale, point.g_step[part] / scale
        usable = point.usable[part]
        if not usable.any():
            return None
        f = point.fx[part] / scale
        slopes = np.zeros_like(a_latest)
        np.divide(b_latest, a_latest, out=slopes, where=usable)
        if not before:
            # The first pair (an early accelerated step): a g change along its step is
            # a mode seen at once (with several moving variables one estimate cannot
            # show a mode that grows, see _along_one_mode).
            if cosine(a_latest, b_latest) <= PARALLEL:
                return None
            return self._along_one_mode(
                part, f, (a_latest, b_latest), slopes[usable], None, False, usable
            )
        a_previous, b_previous = before[-1][0][part] / scale, before[-1][1][part] / scale
        steps = np.column_stack([pair[0][part] / scale for pair in before] + [a_latest])
        changes = np.column_stack([pair[1][part] / scale for pair in before] + [b_latest])
        if cosine(a_previous, a_latest) > PARALLEL:
            one = self._along_one_mode(
                part,
                f,
                (a_latest, b_latest),
                slopes[usable],
                (a_previous, b_previous),
                progressing and after_secant,
                usable,
            )
            if one is None or usable.sum() == 1 or steps.shape[1] < MEMORY:
                return one
            # Several moving variables and a full memory: the small differences across
            # the mode in the earlier steps fit the other modes too.
            lead = _leading_modes(f, steps, changes)
            return one if lead is None else lead
        was_coupled = self.coupled.get(part.start, False)
        if progressing and not was_coupled:
            return None
        coupled = _misfit(a_previous, b_previous, slopes) > MISFIT
        if was_coupled and (coupled or progressing):
            # Known to be coupled, and still so or its residual falling fivefold: it
            # stays so (a coupled tear's per-variable slopes can agree for a step by
            # chance; leaving the leading-modes step then cost the 25 mol/s fixed purge
            # 4 passes and isomerisation 0.3, 0.3, 0.6 three). Merely falling is not
            # enough: a chain of 10 loops solved as one problem then took 88 passes
            # instead of 39 (tests/benchmarks/bench_parts.py, its "before" column).
            return _leading_modes(f, steps, changes)
        self.coupled[part.start] = coupled
        return None

    def _along_one_mode(
        self,
        part: slice,
        f: np.ndarray,
        latest: tuple[np.ndarray, np.ndarray],
        moving_slopes: np.ndarray,
        previous: tuple[np.ndarray, np.ndarray] | None,
        secant_working: bool,
        usable: np.ndarray,
    ) -> np.ndarray | None:
        """The one-mode step of a tear whose last two steps were parallel, or None.

        ``previous`` is the pair before the latest (None at the first pair)."""
        step, change = latest
        eigenvalue = float(np.dot(change, step)) / float(np.dot(step, step))
        # Two estimates of the slope agree: the pair before gives it within MISFIT of
        # |1 - lambda|, the quantity the step divides by.
        before = None if previous is None else _quotient(*previous)
        agreeing = before is not None and abs(eigenvalue - before) <= MISFIT * abs(1.0 - eigenvalue)
        if moving_slopes.size == 1:
            # One moving variable: Wegstein's own case; a damping q, or the secant step
            # at the first pair and while it works, and for a slope above 1 (direct
            # substitution diverging: no q within the bounds turns it back) also where
            # the last two pairs agree on it.
            allowed = (
                eigenvalue < 0.0
                or previous is None
                or secant_working
                or (eigenvalue > 1.0 and agreeing)
            )
        else:
            spread = float(np.max(np.abs(moving_slopes - eigenvalue)))
            uniform = spread <= UNIFORM * abs(1.0 - eigenvalue)
            # A mode that grows steadily (lambda > 1 from both of the last two pairs,
            # agreeing) is one no q within the bounds can turn back, whatever the
            # per-variable slopes say: the step along it is taken. One estimate alone
            # is not enough: from a zero-flow start the first quotients are noise.
            allowed = (uniform and eigenvalue < 1.0) or (eigenvalue > 1.0 and agreeing)
        if not allowed:
            return None
        self.coupled[part.start] = moving_slopes.size > 1
        if moving_slopes.size == 1:
            self.secant.add(part.start)
        displacement = _one_mode(f, step, change)
        if (
            displacement is not None
            and moving_slopes.size == 1
            and previous is not None
            and eigenvalue > 0.0
        ):
            # The secant working on one variable: through three points, its curve.
            # (Not for a negative slope: that damping is an interpolation between x and
            # g(x), and the oscillating loops' first points, from a zero-flow start, lie
            # off the curve: 4 passes became 5.)
            i = int(np.flatnonzero(usable)[0])
            curved = curved_secant(
                float(f[i]),
                (float(step[i]), float(change[i])),
                (float(previous[0][i]), float(previous[1][i])),
            )
            if curved is not None and abs(curved - displacement[i]) <= CURVATURE * abs(
                displacement[i]
            ):
                displacement = displacement.copy()
                displacement[i] = curved
        return displacement
