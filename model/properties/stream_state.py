"""The state of one material stream: component flows, temperature, pressure, phase.

Values are plain floats in internal units (mol/s, K, Pa). Pressure does not affect
enthalpy in the ideal basis. A single-phase stream's phase ("vapor" or "liquid") is set
by the block that makes it; a two-phase stream (phase "two-phase", made by a flash)
also carries its vapor's component flows, the rest being liquid, and its enthalpy is
the sum of its two phases'.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from model.errors import InputError
from model.properties.enthalpy import PropertyBasis

PHASES = ("vapor", "liquid")
TWO_PHASE = "two-phase"


@dataclass(eq=False)
class StreamState:
    """Component molar flows (mol/s), temperature (K), pressure (Pa) and phase.

    Examples
    --------
    >>> from model.properties.components import lookup_component
    >>> basis = PropertyBasis([lookup_component("water"), lookup_component("methanol")])
    >>> stream = StreamState(np.array([1.0, 3.0]), T=300.0, P=101325.0, phase="liquid")
    >>> stream.mole_fractions().tolist()
    [0.25, 0.75]
    """

    flows: np.ndarray
    T: float
    P: float
    phase: str
    #: The enthalpy flow (W) the block that made this state already knows (a set
    #: temperature's, an energy balance's target, a split of a known inlet), so the
    #: blocks downstream need not compute it again; None: not known, computed on demand.
    enthalpy: float | None = field(default=None, compare=False, repr=False)
    #: Component flows of the vapor phase (mol/s) of a two-phase stream; None otherwise.
    vapor_flows: np.ndarray | None = field(default=None, compare=False, repr=False)
    #: d(enthalpy flow)/dT (W/K) when the block that made this state knows it (a set
    #: temperature's); a block downstream starts its first temperature search from
    #: it. None: not known.
    heat_capacity: float | None = field(default=None, compare=False, repr=False)

    def __post_init__(self) -> None:
        # No copy when given a float array: blocks pass their inlet's flows on (a heater's
        # outlet has its inlet's), so flows are never changed in place; copy() copies.
        self.flows = np.asarray(self.flows, dtype=float)
        if self.vapor_flows is not None:
            self.vapor_flows = np.asarray(self.vapor_flows, dtype=float)
            self.phase = TWO_PHASE

    @property
    def two_phase(self) -> bool:
        """True for a stream with both a vapor and a liquid phase."""
        return self.vapor_flows is not None

    @property
    def liquid_flows(self) -> np.ndarray:
        """Component flows of the liquid phase, mol/s (all or none for one phase)."""
        if self.vapor_flows is not None:
            return np.maximum(self.flows - self.vapor_flows, 0.0)
        return self.flows if self.liquid else np.zeros_like(self.flows)

    def vapor_fraction(self) -> float:
        """Molar vapor fraction: 0 liquid, 1 vapor, between for two phases (NaN: no flow
        in a two-phase stream)."""
        if self.vapor_flows is None:
            return 0.0 if self.liquid else 1.0
        total = self.total_molar_flow()
        return float(self.vapor_flows.sum()) / total if total > 0.0 else math.nan

    @property
    def liquid(self) -> bool:
        """True for a liquid stream."""
        return self.phase == "liquid"

    def total_molar_flow(self) -> float:
        """Sum of the component flows, mol/s."""
        return float(self.flows.sum())

    def mole_fractions(self) -> np.ndarray:
        """Mole fraction of each component; all zero for a stream with no flow."""
        total = self.flows.sum()
        return self.flows / total if total > 0.0 else np.zeros_like(self.flows)

    def mass_flow(self, basis: PropertyBasis) -> float:
        """Total mass flow, kg/s."""
        return float(self.flows @ basis.molar_mass)

    def mass_fractions(self, basis: PropertyBasis) -> np.ndarray:
        """Mass fraction of each component; all zero for a stream with no flow."""
        masses = self.flows * basis.molar_mass
        total = masses.sum()
        return masses / total if total > 0.0 else np.zeros_like(masses)

    def enthalpy_flow(self, basis: PropertyBasis) -> float:
        """Enthalpy flow on the formation basis, W (a two-phase stream: both phases')."""
        if self.vapor_flows is not None:
            vapor = basis.stream_enthalpy_flow(self.vapor_flows, self.T, False)
            return vapor + basis.stream_enthalpy_flow(self.liquid_flows, self.T, True)
        return basis.stream_enthalpy_flow(self.flows, self.T, self.liquid)

    def molar_enthalpy(self, basis: PropertyBasis) -> float:
        """Enthalpy per mole of stream, J/mol; NaN for a stream with no flow."""
        total = self.total_molar_flow()
        return self.enthalpy_flow(basis) / total if total > 0.0 else math.nan

    def validate(self, field: str, basis: PropertyBasis | None = None) -> None:
        """Check the state; raise InputError naming ``field.flows``, ``field.T``, ...

        Parameters
        ----------
        field
            Where the stream is specified, e.g. ``"Feed 1"``; used in error messages.
        basis
            If given, the number of flows must match its components.
        """
        flows = self.flows
        if flows.ndim != 1 or (basis is not None and flows.shape[0] != len(basis.names)):
            expected = f"{len(basis.names)} " if basis is not None else ""
            raise InputError(f"{field}.flows", flows, f"a list of {expected}component flows")
        if not np.all(np.isfinite(flows)):
            raise InputError(f"{field}.flows", flows.tolist(), "finite flows (no NaN or inf)")
        if np.any(flows < 0.0):
            raise InputError(f"{field}.flows", flows.tolist(), "flows of 0 mol/s or more")
        if not _is_finite_number(self.T) or not self.T > 0.0:
            raise InputError(f"{field}.T", self.T, "a temperature above 0 K")
        if not _is_finite_number(self.P) or not self.P > 0.0:
            raise InputError(f"{field}.P", self.P, "an absolute pressure above 0 Pa")
        if self.phase not in (*PHASES, TWO_PHASE):
            raise InputError(f"{field}.phase", self.phase, f"one of {list(PHASES)}")
        vapor = self.vapor_flows
        if vapor is not None and (
            vapor.shape != flows.shape
            or not np.all(np.isfinite(vapor))
            or np.any(vapor < 0.0)
            or np.any(vapor > flows * (1.0 + 1e-12))
        ):
            raise InputError(
                f"{field}.vapor_flows", vapor.tolist(), "from 0 to each component's flow"
            )

    def copy(self) -> StreamState:
        """An independent copy (the flow array is copied too)."""
        vapor = None if self.vapor_flows is None else self.vapor_flows.copy()
        return StreamState(
            self.flows.copy(), self.T, self.P, self.phase, self.enthalpy, vapor, self.heat_capacity
        )


def _is_finite_number(value: object) -> bool:
    return (
        isinstance(value, (int, float, np.floating, np.integer))
        and not isinstance(value, bool)
        and math.isfinite(value)
    )
