"""Zone analysis of an exchanger with a phase change inside.

With a phase change the temperature of a side is not linear in the heat it passes: a
condensing vapor stays near its dew point while the other side keeps warming, so the
end temperatures say little about the approach inside, and the LMTD of the ends is not
the mean the duty sees. The duty is therefore cut into ``ZONES`` equal zones; at each
cut both sides' temperatures come from their enthalpy (a flash at that enthalpy on an
equilibrium side, the temperature-from-enthalpy solve on a one-phase side), and

    UA = sum over zones of dQ / LMTD(zone end differences)

(the zone, or incremental, method of condenser design texts such as Kern, *Process
Heat Transfer*, McGraw-Hill 1950, from memory), with the effective mean difference
Q / UA.
The smallest difference over the cuts is the internal approach: below zero the
exchanger has an internal temperature cross that its ends do not show.

Positions are counted as the heat passed from the hot inlet end (0) to the hot outlet
end (Q); counter-current, the cold side there carries its outlet enthalpy less that
heat. Each side's pressure falls linearly with the heat it has passed, from inlet to
outlet pressure.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from model.properties.property_method import equilibrium_for

#: Relative difference of the end differences below which the LMTD is their mean.
EQUAL_ENDS = 1e-6
#: Zones the duty is cut into; the zone LMTD sum is second order in the zone width, and
#: 20 zones put a condensing profile's UA within 0.1 % of the integral (tested).
ZONES = 20


def log_mean_temperature_difference(dT1: float, dT2: float) -> float:
    """LMTD of two positive end differences, with the equal-ends limit."""
    if abs(dT1 - dT2) <= EQUAL_ENDS * max(dT1, dT2):
        return 0.5 * (dT1 + dT2)
    return (dT1 - dT2) / math.log1p((dT1 - dT2) / dT2)  # log1p: no cancellation near 1


@dataclass(frozen=True)
class ZoneSide:
    """One side for the profile: its component flows, inlet and outlet enthalpy flow
    (W), temperature (K) and pressure (Pa), and whether it is flashed ("equilibrium")
    or kept one phase (then ``liquid`` says which)."""

    flows: np.ndarray
    h_in: float
    h_out: float
    T_in: float
    T_out: float
    P_in: float
    P_out: float
    equilibrium: bool
    liquid: bool


@dataclass(frozen=True)
class ZoneProfile:
    """Temperatures of both sides at each cut, from the hot inlet end (heat passed 0)
    to the hot outlet end (heat passed Q)."""

    heat_passed: np.ndarray
    hot_T: np.ndarray
    cold_T: np.ndarray

    @property
    def differences(self) -> np.ndarray:
        return self.hot_T - self.cold_T

    @property
    def minimum_approach(self) -> float:
        return float(self.differences.min())

    @property
    def pinch_share(self) -> float:
        """Where the smallest difference lies, as a share of the duty from the hot inlet end."""
        duty = float(self.heat_passed[-1])
        return float(self.heat_passed[int(np.argmin(self.differences))]) / duty

    def UA(self) -> float | None:
        """Sum of the zones' dQ / LMTD (W/K); None when any difference is not positive."""
        dT = self.differences
        if not (dT > 0.0).all():
            return None
        dQ = np.diff(self.heat_passed)
        return float(
            sum(
                q / log_mean_temperature_difference(float(a), float(b))
                for q, a, b in zip(dQ, dT[:-1], dT[1:], strict=True)
            )
        )


def _temperature(basis, side: ZoneSide, h: float, share: float, guess: float) -> float:
    """Temperature (K) of ``side`` at enthalpy flow ``h`` (W), ``share`` of the way from
    its inlet to its outlet (which sets its pressure)."""
    P = side.P_in + share * (side.P_out - side.P_in)
    if side.equilibrium:
        return float(equilibrium_for(basis).flash_PH(side.flows, P, h, guess).T)
    return float(basis.temperature_from_enthalpy(side.flows, h, side.liquid, guess))


def _saturation_enthalpies(basis, side: ZoneSide) -> list[float]:
    """Enthalpy flows (W) of ``side`` at its dew point (all vapor) and bubble point (all
    liquid) at its outlet pressure: where its profile bends."""
    if not side.equilibrium:
        return []
    equilibrium = equilibrium_for(basis)
    found = []
    for point, liquid in ((equilibrium.dew_point, False), (equilibrium.bubble_point, True)):
        T = point(side.flows, side.P_out, side.T_out)
        if T is not None:
            found.append(float(basis.stream_enthalpy_flow(side.flows, T, liquid)))
    return found


def zone_profile(
    basis, hot: ZoneSide, cold: ZoneSide, duty: float, zones: int = ZONES
) -> ZoneProfile:
    """Both sides' temperatures at ``zones + 1`` equally spaced cuts of ``duty`` (W > 0),
    plus a cut wherever a side reaches its dew or bubble point, so that the approach
    there (often the pinch) is one of the cuts.

    The end cuts are the block's own inlet and outlet temperatures; the inner cuts are
    searched from the neighbouring cut's temperature.

    Raises
    ------
    InputError
        A side's enthalpy at a cut is out of the temperature search's reach (only
        possible when the ends themselves were).
    """
    bends = [hot.h_in - h for h in _saturation_enthalpies(basis, hot)]
    bends += [cold.h_out - h for h in _saturation_enthalpies(basis, cold)]
    inner = [q for q in bends if 1e-9 * duty < q < (1.0 - 1e-9) * duty]
    heat = np.unique(np.concatenate([np.linspace(0.0, duty, zones + 1), inner]))
    hot_T = np.empty(heat.size)
    cold_T = np.empty(heat.size)
    hot_T[0], hot_T[-1] = hot.T_in, hot.T_out
    cold_T[0], cold_T[-1] = cold.T_out, cold.T_in
    for i in range(1, heat.size - 1):
        share = heat[i] / duty
        hot_T[i] = _temperature(basis, hot, hot.h_in - heat[i], share, hot_T[i - 1])
        cold_T[i] = _temperature(basis, cold, cold.h_out - heat[i], 1.0 - share, cold_T[i - 1])
    return ZoneProfile(heat, hot_T, cold_T)
