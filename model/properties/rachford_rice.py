"""The Rachford & Rice (1952) equation of an isothermal flash, solved in a bracket.

For feed mole fractions z and K-values K, the vapor fraction V solves

    f(V) = sum z_i (K_i - 1) / (1 + V (K_i - 1)) = 0,

f decreasing in V. A root in [0, 1] exists when f(0) > 0 (above the bubble point) and
f(1) < 0 (below the dew point); otherwise the feed is one phase, liquid if f(0) <= 0
and vapor if f(1) >= 0. The root lies where every ``1 + V (K_i - 1)`` is positive, so
the solve (Brent 1973, ``scipy.optimize.brentq``) keeps to [0, 1] and no phase flow can
come out negative.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

_V_TOLERANCE = 1e-14


@dataclass(frozen=True)
class SplitResult:
    """Vapor fraction and the phase mole fractions; ``phase`` "two-phase", "liquid" or
    "vapor" (one phase: x or y is the feed, the other the incipient phase's)."""

    vapor_fraction: float
    x: np.ndarray
    y: np.ndarray
    phase: str


def rachford_rice_residual(V: float, z: np.ndarray, K: np.ndarray) -> float:
    """f(V) of the Rachford-Rice equation."""
    excess = K - 1.0
    return float(np.sum(z * excess / (1.0 + V * excess)))


def solve_rachford_rice(z: np.ndarray, K: np.ndarray) -> SplitResult:
    """The split of a feed with mole fractions ``z`` at K-values ``K``.

    Components with no feed take no part. One phase is reported with ``vapor_fraction``
    0 or 1 and the incipient phase's composition (``K z`` normalised for a liquid,
    ``z / K`` normalised for a vapor).

    Examples
    --------
    >>> import numpy as np
    >>> result = solve_rachford_rice(np.array([0.5, 0.5]), np.array([2.0, 0.5]))
    >>> round(result.vapor_fraction, 12), result.phase
    (0.5, 'two-phase')
    """
    from scipy.optimize import brentq

    z = np.asarray(z, dtype=float)
    K = np.asarray(K, dtype=float)
    present = z > 0.0
    zp, Kp = z[present], K[present]
    # f(0) = sum z K - 1 and f(1) = 1 - sum z / K, evaluated by the very function the
    # root search calls, so the phase test and the bracket agree to the last bit
    f_zero = rachford_rice_residual(0.0, zp, Kp)
    f_one = rachford_rice_residual(1.0, zp, Kp)
    if f_zero <= 0.0:
        y = K * z
        return SplitResult(0.0, z.copy(), y / y.sum(), "liquid")
    if f_one >= 0.0:
        x = np.where(present, z / np.where(present, K, 1.0), 0.0)
        return SplitResult(1.0, x / x.sum(), z.copy(), "vapor")
    V = brentq(rachford_rice_residual, 0.0, 1.0, args=(zp, Kp), xtol=_V_TOLERANCE, rtol=1e-15)
    x = z / (1.0 + V * (K - 1.0))
    y = K * x
    return SplitResult(float(V), x / x.sum(), y / y.sum(), "two-phase")
