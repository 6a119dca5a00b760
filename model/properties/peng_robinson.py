"""Vapor-liquid equilibrium by the Peng & Robinson (1976) equation of state, through
``thermo``'s flash.

The equation of state, its mixing rules and the flash are ``thermo``'s
(``FlashVL`` with ``CEOSGas``/``CEOSLiquid`` of ``PRMIX``); nothing of the equation is
written here. Critical constants are the case's components' (the ones the enthalpy
basis uses); the acentric factors and the binary interaction parameters are the case's
recorded ones (:mod:`model.properties.property_data`: ``chemicals.acentric.omega`` and
thermo's ChemSep PR table where it has the pair, zero otherwise, unless the case file
says otherwise).
The split is the equation's; enthalpies stay on the project's formation basis
(ideal gas, Watson liquid), so energy balances are those of every other block.
"""

from __future__ import annotations

import numpy as np

from model.errors import InputError
from model.properties.phase_equilibrium import EquilibriumSearch, FlashResult

PENG_ROBINSON = "Peng-Robinson"
EOS_SOURCE = "thermo FlashVL with PRMIX (Peng & Robinson 1976)"


def acentric_factor(name: str, cas: str) -> float:
    """The component's acentric factor from ``chemicals``; InputError if none."""
    from chemicals.acentric import omega

    value = omega(cas) if cas else None
    if value is None:
        raise InputError(
            f"{name}.omega",
            cas or "(no CAS number)",
            "a component with an acentric factor in chemicals for Peng-Robinson",
        )
    return float(value)


class PengRobinsonEquilibrium(EquilibriumSearch):
    """Peng-Robinson flashes of one component list (``basis`` order) by ``thermo``.

    ``omegas`` are the components' acentric factors and ``kijs`` the symmetric matrix of
    binary interaction parameters, both in the basis's order.
    """

    no_saturation_reason = "none found by thermo's Peng-Robinson flash"

    def __init__(self, basis, omegas: list[float], kijs: list[list[float]]) -> None:
        from thermo import CEOSGas, CEOSLiquid, ChemicalConstantsPackage, FlashVL
        from thermo.eos_mix import PRMIX

        self.basis = basis
        components = basis.components
        cas = [c.cas for c in components]
        self.omegas = [float(w) for w in omegas]
        self.kijs = [[float(k) for k in row] for row in kijs]
        constants = ChemicalConstantsPackage(
            Tcs=[c.Tc for c in components],
            Pcs=[c.Pc for c in components],
            omegas=self.omegas,
            MWs=[1000.0 * c.molar_mass for c in components],
            CASs=cas,
        )
        eos = {
            "Tcs": constants.Tcs,
            "Pcs": constants.Pcs,
            "omegas": constants.omegas,
            "kijs": self.kijs,
        }
        gas = CEOSGas(PRMIX, eos_kwargs=eos)
        liquid = CEOSLiquid(PRMIX, eos_kwargs=eos)
        self._flasher = FlashVL(constants, None, liquid=liquid, gas=gas)

    def flash_TP(self, flows: np.ndarray, T: float, P: float) -> FlashResult:
        """Isothermal flash of ``flows`` (mol/s) at T (K), P (Pa) by thermo."""
        flows = np.asarray(flows, dtype=float)
        total = flows.sum()
        n = len(flows)
        if not total > 0.0:
            zero = np.zeros(n)
            return FlashResult(T, P, zero, zero.copy(), 1.0, "vapor", np.full(n, np.nan))
        zs = (flows / total).tolist()
        if n == 1:  # a pure fluid: its phase from its saturation temperature at P
            return self._pure_flash(flows, T, P)
        state = self._flasher.flash(T=float(T), P=float(P), zs=zs)
        phases = list(state.phases)
        if len(phases) == 2:
            # thermo names the phases by its own identification rule, which at high
            # pressure may call the gas a second liquid ("LL", e.g. the ammonia loop's
            # drum at 151 bar); a vapor-liquid split's vapor is its lighter phase
            light = 0 if phases[0].V() > phases[1].V() else 1
            V = float(state.betas[light])
            y = np.array(phases[light].zs)
            x = np.array(phases[1 - light].zs)
            vapor = np.clip(V * total * y, 0.0, flows)
            K = y / np.where(x > 0.0, x, np.nan)
            return FlashResult(T, P, vapor, np.maximum(flows - vapor, 0.0), V, "two-phase", K)
        if state.gas is not None:
            return FlashResult(T, P, flows.copy(), np.zeros(n), 1.0, "vapor", np.full(n, np.nan))
        return FlashResult(T, P, np.zeros(n), flows.copy(), 0.0, "liquid", np.full(n, np.nan))

    def _pure_flash(self, flows: np.ndarray, T: float, P: float) -> FlashResult:
        nan = np.full(1, np.nan)
        try:
            saturation = float(self._flasher.flash(P=float(P), VF=0.0, zs=[1.0]).T)
        except Exception:  # no saturation at P (above the critical pressure): one phase
            saturation = self.basis.components[0].Tc
        if T < saturation:
            return FlashResult(T, P, np.zeros(1), flows.copy(), 0.0, "liquid", nan)
        return FlashResult(T, P, flows.copy(), np.zeros(1), 1.0, "vapor", nan)

    def flash_PV(
        self, flows: np.ndarray, P: float, vapor_fraction: float, T_guess: float = 298.15
    ) -> FlashResult:
        """Flash at P (Pa) to a vapor fraction by thermo's own P-VF flash."""
        flows = np.asarray(flows, dtype=float)
        try:
            state = self._flasher.flash(
                P=float(P), VF=float(vapor_fraction), zs=(flows / flows.sum()).tolist()
            )
        except Exception as error:  # thermo raises its own errors when there is no answer
            raise InputError(
                "vapor_fraction", vapor_fraction, f"a vapor fraction reached at {P:.6g} Pa"
            ) from error
        T = float(state.T)
        if (
            len(flows) > 1
            and vapor_fraction in (0.0, 1.0)
            and _other_saturation(state, flows, vapor_fraction)
        ):
            raise InputError(
                "vapor_fraction",
                vapor_fraction,
                "a saturation point thermo's flash finds (it found the "
                + ("dew point" if vapor_fraction == 0.0 else "bubble point")
                + f" at {T:.2f} K instead)",
            )
        if len(flows) == 1:  # a pure fluid at saturation: the split asked for
            V = float(vapor_fraction)
            phase = "liquid" if V == 0.0 else "vapor" if V == 1.0 else "two-phase"
            return FlashResult(T, P, V * flows, (1.0 - V) * flows, V, phase, np.ones(1))
        return self.flash_TP(flows, T, P)


def _other_saturation(state, flows: np.ndarray, vapor_fraction: float) -> bool:
    """True when thermo's P-VF flash at VF 0 or 1 returned the other saturation point: the
    phase of the feed's composition is the vapor (larger molar volume) at a bubble
    point, or the liquid at a dew point (thermo labels its phases by its own rule)."""
    phases = list(state.phases)
    if len(phases) != 2:
        return False
    z = flows / flows.sum()
    distance = [float(np.max(np.abs(np.array(p.zs) - z))) for p in phases]
    feed = int(np.argmin(distance))
    feed_is_vapor = phases[feed].V() > phases[1 - feed].V()
    return feed_is_vapor == (vapor_fraction == 0.0)
