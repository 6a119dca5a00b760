"""Vapor-liquid equilibrium of the "ideal" property method: flashes and bubble/dew points.

K-values by Raoult's law, ``K_i = Psat_i(T) / P``, and by Henry's law above a
component's critical temperature, ``K_i = H_i(T) / P`` (:mod:`model.properties.vapor_pressure`).
An isothermal flash solves Rachford & Rice (1952) in its bracket; flashes at a given
enthalpy or vapor fraction, and bubble and dew points, search the temperature with
Brent's method (Brent 1973) in a bracket found first, so every answer lies in
[10 K, 6000 K] and no phase flow is negative. Enthalpy is the property basis's: each
phase on the formation basis, the liquid by Watson's heat of vaporization.

K-values at one (T, P) are kept (a few, newest last), so a pass that flashes the same
temperature again (a drum at its set T) computes no vapor pressure.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from model.errors import InputError
from model.properties.rachford_rice import solve_rachford_rice
from model.properties.temperature_range import T_SEARCH_MAX, T_SEARCH_MIN
from model.properties.vapor_pressure import VaporPressureData

IDEAL = "ideal"
_T_TOLERANCE = 1e-9  # K
_CACHE_SIZE = 16
_SHARE_ROUNDING = 1e-9  # of the latent heat: a T search's 1e-9 K is far below it
_LN_K_LIMIT = 700.0  # |ln K| beyond this is held there: exp() stays finite


@dataclass(frozen=True)
class FlashResult:
    """One flash: T (K), P (Pa), each phase's component flows (mol/s), the vapor
    fraction, "vapor", "liquid" or "two-phase", and the K-values used."""

    T: float
    P: float
    vapor_flows: np.ndarray
    liquid_flows: np.ndarray
    vapor_fraction: float
    phase: str
    K: np.ndarray


@dataclass(frozen=True)
class SaturationPoint:
    """A bubble or dew temperature (K), or None with the reason there is none (e.g.
    "above the critical temperature of ammonia")."""

    T: float | None
    reason: str = ""


class EquilibriumSearch:
    """What every property method's equilibrium shares: the enthalpy of a flash's
    phases, the flash at a given enthalpy (a search on T over ``flash_TP``), and bubble
    and dew points (``flash_PV`` at 0 and 1). Subclasses give ``flash_TP`` and
    ``flash_PV``."""

    basis: object
    #: Why a bubble or dew point is none when the method's search finds none.
    no_saturation_reason = f"none between {T_SEARCH_MIN:g} K and {T_SEARCH_MAX:g} K"

    def flash_TP(self, flows: np.ndarray, T: float, P: float) -> FlashResult:
        raise NotImplementedError

    def flash_PV(
        self, flows: np.ndarray, P: float, vapor_fraction: float, T_guess: float = 298.15
    ) -> FlashResult:
        raise NotImplementedError

    def enthalpy_flow(self, result: FlashResult) -> float:
        """Enthalpy flow (W) of a flash's two phases at its temperature."""
        basis = self.basis
        return basis.stream_enthalpy_flow(
            result.vapor_flows, result.T, False
        ) + basis.stream_enthalpy_flow(result.liquid_flows, result.T, True)

    def flash_PH(
        self, flows: np.ndarray, P: float, enthalpy_flow: float, T_guess: float = 298.15
    ) -> FlashResult:
        """Flash at P (Pa) to a given enthalpy flow (W): the latent heat is inside the
        searched enthalpy, which rises with T, so the bracket holds the one answer.

        Raises
        ------
        InputError
            No temperature in [10 K, 6000 K] gives that enthalpy flow.
        """

        def residual(T: float) -> float:
            return self.enthalpy_flow(self.flash_TP(flows, T, P)) - enthalpy_flow

        T = _bracketed_root(residual, T_guess)
        if T is None:
            raise InputError(
                "enthalpy_flow",
                enthalpy_flow,
                f"an enthalpy flow this stream reaches between {T_SEARCH_MIN:g} K and "
                f"{T_SEARCH_MAX:g} K at {P:.6g} Pa",
            )
        result = self.flash_TP(flows, T, P)
        if np.count_nonzero(np.asarray(flows) > 0.0) == 1:
            return self._lever_rule(result, enthalpy_flow)
        return result

    def _lever_rule(self, result: FlashResult, enthalpy_flow: float) -> FlashResult:
        """One component boils at one temperature: the enthalpy jumps there by the
        latent heat, and the search stops on the jump. The vapor fraction is then the
        share of the latent heat the target holds (liquid and vapor of one composition)."""
        basis = self.basis
        flows = result.vapor_flows + result.liquid_flows
        h_liquid = basis.stream_enthalpy_flow(flows, result.T, True)
        h_vapor = basis.stream_enthalpy_flow(flows, result.T, False)
        if not h_vapor > h_liquid:
            return result
        share = (enthalpy_flow - h_liquid) / (h_vapor - h_liquid)
        if not _SHARE_ROUNDING < share < 1.0 - _SHARE_ROUNDING:  # one phase, off the jump
            return result
        vapor = share * flows
        liquid = flows - vapor
        return FlashResult(result.T, result.P, vapor, liquid, share, "two-phase", result.K)

    def bubble_point(self, flows: np.ndarray, P: float, T_guess: float = 298.15) -> float | None:
        """Bubble temperature (K) at P (Pa); None where there is none (:meth:`saturation`)."""
        return self.saturation(flows, P, 0.0, T_guess).T

    def dew_point(self, flows: np.ndarray, P: float, T_guess: float = 298.15) -> float | None:
        """Dew temperature (K) at P (Pa); None where there is none (:meth:`saturation`)."""
        return self.saturation(flows, P, 1.0, T_guess).T

    def saturation(
        self, flows: np.ndarray, P: float, vapor_fraction: float, T_guess: float = 298.15
    ) -> SaturationPoint:
        """Bubble (vapor fraction 0) or dew (1) point at P (Pa), or why there is none.

        None lies outside [10 K, 6000 K]; and a temperature at or above the critical
        temperature of every component present is not a saturation point: no component
        can be liquid there. (The ideal method would otherwise give one from vapor
        pressures continued past the critical point, or from Henry constants.)
        """
        flows = np.asarray(flows, dtype=float)
        if not flows.sum() > 0.0:
            return SaturationPoint(None, "no flow")
        try:
            T = self.flash_PV(flows, P, vapor_fraction, T_guess).T
        except InputError:
            return SaturationPoint(None, self.no_saturation_reason)
        present = np.flatnonzero(flows > 0.0)
        critical = np.asarray(self.basis.Tc)[present]
        if T >= critical.max():
            heaviest = self.basis.names[present[int(np.argmax(critical))]]
            return SaturationPoint(None, f"above the critical temperature of {heaviest}")
        return SaturationPoint(T)


class IdealEquilibrium(EquilibriumSearch):
    """Raoult's and Henry's law for one component list (``basis`` order).

    Parameters
    ----------
    basis
        The :class:`~model.properties.enthalpy.PropertyBasis` whose enthalpies are used.
    data
        One :class:`VaporPressureData` per component, in the basis's order.
    """

    def __init__(self, basis, data: list[VaporPressureData]) -> None:
        self.basis = basis
        self.data = list(data)
        self._K_cache: dict[tuple[float, float], np.ndarray] = {}

    # ---- K-values ------------------------------------------------------------------

    def ln_K(self, T: float, P: float) -> np.ndarray:
        """ln K of each component at T (K), P (Pa); cached per (T, P)."""
        key = (float(T), float(P))
        known = self._K_cache.get(key)
        if known is not None:
            return known
        ln_P = math.log(P)
        values = np.array([record.ln_K_pressure(T) - ln_P for record in self.data])
        np.clip(values, -_LN_K_LIMIT, _LN_K_LIMIT, out=values)
        if len(self._K_cache) >= _CACHE_SIZE:
            del self._K_cache[next(iter(self._K_cache))]
        self._K_cache[key] = values
        return values

    def K_values(self, T: float, P: float) -> np.ndarray:
        """K of each component at T (K), P (Pa)."""
        return np.exp(self.ln_K(T, P))

    # ---- flashes -------------------------------------------------------------------

    def flash_TP(self, flows: np.ndarray, T: float, P: float) -> FlashResult:
        """Isothermal flash of ``flows`` (mol/s) at T (K), P (Pa)."""
        flows = np.asarray(flows, dtype=float)
        total = flows.sum()
        K = self.K_values(T, P)
        if not total > 0.0:
            zero = np.zeros_like(flows)
            return FlashResult(T, P, zero, zero.copy(), 1.0, "vapor", K)
        split = solve_rachford_rice(flows / total, K)
        if split.phase == "liquid":
            vapor = np.zeros_like(flows)
        elif split.phase == "vapor":
            vapor = flows.copy()
        else:
            # component flows of the vapor, never above the feed's nor below zero
            vapor = np.clip(split.vapor_fraction * total * split.y, 0.0, flows)
        liquid = np.maximum(flows - vapor, 0.0)
        return FlashResult(T, P, vapor, liquid, split.vapor_fraction, split.phase, K)

    def flash_PV(
        self, flows: np.ndarray, P: float, vapor_fraction: float, T_guess: float = 298.15
    ) -> FlashResult:
        """Flash at P (Pa) to a vapor fraction in [0, 1] (0: bubble point, 1: dew point).

        Raises
        ------
        InputError
            No temperature in [10 K, 6000 K] gives that vapor fraction.
        """
        flows = np.asarray(flows, dtype=float)
        z = flows / flows.sum()
        present = z > 0.0
        zp = z[present]
        V = float(vapor_fraction)

        def residual(T: float) -> float:
            excess = np.exp(self.ln_K(T, P)[present]) - 1.0
            return float(np.sum(zp * excess / (1.0 + V * excess)))

        T = _bracketed_root(residual, T_guess)
        if T is None:
            raise InputError(
                "vapor_fraction",
                vapor_fraction,
                f"a vapor fraction this feed reaches between {T_SEARCH_MIN:g} K and "
                f"{T_SEARCH_MAX:g} K at {P:.6g} Pa",
            )
        return self.flash_TP(flows, T, P)


def _bracketed_root(residual: Callable[[float], float], guess: float) -> float | None:
    """Root of an increasing function of T in [10 K, 6000 K] by Brent's method, the
    bracket grown from the guess (steps of 2, 4, 8 ... K); None if there is none."""
    from scipy.optimize import brentq

    guess = min(max(float(guess), T_SEARCH_MIN), T_SEARCH_MAX) if math.isfinite(guess) else 298.15
    f_guess = residual(guess)
    if f_guess == 0.0:
        return guess
    step = 2.0
    low = high = guess
    f_low = f_high = f_guess
    while True:
        if f_guess > 0.0:  # root below the guess
            high, f_high = low, f_low
            low = max(low - step, T_SEARCH_MIN)
            f_low = residual(low)
            if f_low <= 0.0:
                break
            if low == T_SEARCH_MIN:
                return None
        else:
            low, f_low = high, f_high
            high = min(high + step, T_SEARCH_MAX)
            f_high = residual(high)
            if f_high >= 0.0:
                break
            if high == T_SEARCH_MAX:
                return None
        step *= 2.0
    if f_low == 0.0:
        return low
    if f_high == 0.0:
        return high
    return float(brentq(residual, low, high, xtol=_T_TOLERANCE, rtol=1e-15))
