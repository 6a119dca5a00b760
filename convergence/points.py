"""An evaluated point of a fixed-point run, and the step a rule makes from it.

Kept apart from the step rules so that the helpers the rules use (coupling, adaptive
bounds) can read a point without importing the rules.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass
class Step:
    """The next iterate and how it was made.

    ``q``, ``q_raw`` and ``guarded`` are per-variable arrays for an accelerated step
    (``q_raw`` = s/(s-1) before clipping; ``guarded`` marks variables whose step was too
    small for a slope) and ``None`` otherwise. ``note`` is an event worth recording
    (a restart); ``bounds_note`` says how adaptive bounds widened at this step, and
    ``q_low``/``q_high`` are the per-variable bounds q was clipped to (``None``: the
    settings' bounds). ``mode_tears`` names the tears that took the dominant-mode step.
    """

    x_new: np.ndarray
    kind: str
    q: np.ndarray | None = None
    q_raw: np.ndarray | None = None
    guarded: np.ndarray | None = None
    note: str | None = None
    bounds_note: str | None = None
    q_low: np.ndarray | None = None
    q_high: np.ndarray | None = None
    mode_tears: tuple[str, ...] = ()


@dataclass
class Evaluated:
    """An evaluated point and its differences from the previous one.

    ``fx`` = g(x_k) - x_k and ``scale`` is the residual scale at x_k. ``step`` =
    x_k - x_{k-1}, ``g_step`` = g(x_k) - g(x_{k-1}) and ``usable`` (steps large enough
    for a slope) are ``None`` at the first iteration.
    """

    iteration: int
    x: np.ndarray
    gx: np.ndarray
    fx: np.ndarray
    scale: np.ndarray
    step: np.ndarray | None = None
    g_step: np.ndarray | None = None
    usable: np.ndarray | None = None
