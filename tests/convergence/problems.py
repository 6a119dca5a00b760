"""Small fixed-point problems shared by the convergence tests (our own, not from a source).

Each is nonlinear in every variable, so no variable converges exactly in one
accelerated step (which would make the slope guards of different implementations
decide on rounding noise).
"""

from __future__ import annotations

import numpy as np

from convergence import FixedPointProblem

# Reactor loop: feed of A (with inert I) mixed with the recycle, A -> B with a
# conversion that falls as the reactor is diluted, a separator sending most A and I
# back, and a feed-effluent exchanger whose outlet temperature depends on the recycle
# temperature with a negative slope (an oscillating heat loop).
REACTOR_FEED = np.array([10.0, 0.0, 0.2])  # mol/s of A, B, I
RECYCLE_FRACTION = np.array([0.9, 0.05, 0.8])
REACTOR_NAMES = ["S5 flow of A", "S5 flow of B", "S5 flow of I", "S5 T"]


def reactor_loop(recycle: np.ndarray) -> np.ndarray:
    """One pass of the reactor loop: recycle (A, B, I in mol/s; T in K) -> new recycle."""
    mixed = REACTOR_FEED + recycle[:3]
    total = float(np.sum(mixed))
    conversion = 0.6 * 30.0 / (30.0 + total)
    reacted = conversion * mixed[0]
    effluent = mixed + np.array([-reacted, reacted, 0.0])
    flows = RECYCLE_FRACTION * effluent * (1.0 + 0.01 * np.tanh(mixed[2] - 1.0))
    temperature = 620.0 - 0.6 * recycle[3] + 2.0 * np.sqrt(total)
    return np.append(flows, temperature)


def reactor_problem(**fields) -> FixedPointProblem:
    """The reactor loop as one tear stream S5 of four variables."""
    values = {
        "g": reactor_loop,
        "x0": np.array([5.0, 0.5, 0.5, 350.0]),
        "tear_slices": {"S5": slice(0, 4)},
        "variable_names": REACTOR_NAMES,
    }
    return FixedPointProblem(**{**values, **fields})


def coupled_pair(x: np.ndarray) -> np.ndarray:
    """Two coupled tears of two variables each, with slopes of both signs."""
    return np.array(
        [
            0.5 * np.cos(x[0]) - 0.3 * x[2] + 1.0,
            0.7 * x[1] + 0.1 * np.sin(x[3]) + 0.6,
            -0.6 * x[0] + 0.2 * np.sin(x[2]) + 2.0,
            0.2 * np.tanh(x[1]) - 0.5 * x[3] + 0.1 * x[0] + 3.0,
        ]
    )


def coupled_problem(**fields) -> FixedPointProblem:
    """``coupled_pair`` with tears S3 (variables 0, 1) and S9 (variables 2, 3)."""
    values = {
        "g": coupled_pair,
        "x0": np.array([1.0, 1.0, 1.0, 1.0]),
        "tear_slices": {"S3": slice(0, 2), "S9": slice(2, 4)},
        "variable_names": ["S3 a", "S3 b", "S9 a", "S9 b"],
    }
    return FixedPointProblem(**{**values, **fields})


def wide_map(size: int = 40, seed: int = 7):
    """A ``size``-variable map with per-variable slopes spread over (-0.8, 0.95) and weak
    nonlinear coupling; returns (g, x0)."""
    generator = np.random.default_rng(seed)
    slopes = generator.uniform(-0.8, 0.95, size)
    offsets = generator.uniform(1.0, 5.0, size)
    coupling = generator.normal(0.0, 0.05 / np.sqrt(size), (size, size))

    def g(x: np.ndarray) -> np.ndarray:
        return offsets + slopes * x + 0.1 * np.tanh(coupling @ x) + 0.02 * np.sin(x)

    return g, generator.uniform(2.0, 4.0, size)
