"""Stream enthalpy on the formation basis, vectorised over streams and components.

The basis of DESIGN.md ("Engineering basis"): elements in their standard state at
298.15 K have zero enthalpy, so

- vapor: ``H(T) = Hf_ig(298.15 K) + integral of Cp_ig from 298.15 K to T``;
- liquid: ``H(T) = H_vapor(T) - dHvap(T)``, with the Watson (1943) correlation
  ``dHvap(T) = dHvap(Tb) ((1 - T/Tc) / (1 - Tb/Tc))^0.38`` below Tc and zero above;

ideal mixing, no pressure effect. Heats of reaction then come out of the energy balance
by themselves (Hess's law). Everything here is plain floats in SI internal units
(K, J/mol, mol/s, W); no pint quantity is created.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np

from model.errors import InputError
from model.properties.components import Component
from model.properties.cp_correlations import SCALAR_PATH_LIMIT, CpTable, few_components
from model.properties.temperature_range import T_SEARCH_MAX, T_SEARCH_MIN

WATSON_EXPONENT = 0.38
_T_TOLERANCE = 1e-9  # K, step size at which the temperature solve stops
#: Bound on |dCp/dT| / Cp (1/K) of one phase's enthalpy: a Newton step dT from a point
#: leaves an error of about 1/2 (Cp'/Cp) dT^2 in T, so a step with
#: 1/2 _CURVATURE dT^2 <= _T_TOLERANCE is taken without another evaluation to confirm
#: it. Ideal-gas and liquid correlations stay below 0.1/K away from the critical point;
#: 10/K leaves room for a liquid within a kelvin or two of it.
_CURVATURE = 10.0
_CONFIRMED_STEP = math.sqrt(2.0 * _T_TOLERANCE / _CURVATURE)
_MAX_ITERATIONS = 200
_RECENT_SIZE = 8  # single-stream evaluations remembered (see _stream_enthalpy_and_heat_capacity)
_ROUND_OFF = 1e-12  # relative to the total flow: negative flows this small are zero


class PropertyBasis:
    """A fixed, ordered component list with its constants packed into numpy arrays.

    Array arguments follow one convention: ``m`` streams (rows) by ``n`` components
    (columns, in the order of ``names``). Flows are mol/s, temperatures K, enthalpies
    J/mol, enthalpy flows W. The methods do no input checking beyond shapes, because
    the flowsheet solve calls them many times; :meth:`StreamState.validate` checks
    stream values at the boundary.

    Parameters
    ----------
    components
        The components, at least one, with unique names.
    property_method
        The case's property method for phase equilibrium ("ideal"); see
        :mod:`model.properties.property_method`.

    Examples
    --------
    >>> from model.properties.components import lookup_component
    >>> basis = PropertyBasis([lookup_component("water")])
    >>> round(basis.stream_enthalpy_flow(np.array([1.0]), 298.15, liquid=False))
    -241822
    """

    def __init__(self, components: Sequence[Component], property_method: str = "ideal") -> None:
        components = tuple(components)
        self.property_method = property_method
        if not components or not all(isinstance(c, Component) for c in components):
            raise InputError("components", components, "a non-empty list of components")
        self.components = components
        self.names = [c.name for c in components]
        self._index = {name: i for i, name in enumerate(self.names)}
        if len(self._index) != len(self.names):
            duplicates = sorted({n for n in self.names if self.names.count(n) > 1})
            raise InputError("components", duplicates, "each component name once")
        self.molar_mass = np.array([c.molar_mass for c in components])
        self.Tc = np.array([c.Tc for c in components])
        self.Tb = np.array([c.Tb for c in components])
        self.Hf_ig = np.array([c.Hf_ig for c in components])
        self.Hvap_Tb = np.array([c.Hvap_Tb for c in components])
        self._reduced_Tb_complement = 1.0 - self.Tb / self.Tc
        # single-stream Watson: dHvap = _watson_scale * max(1 - T/Tc, 0)^0.38
        self._inverse_Tc = 1.0 / self.Tc
        self._watson_scale = self.Hvap_Tb / self._reduced_Tb_complement**WATSON_EXPONENT
        self._watson_terms = list(zip(self._watson_scale.tolist(), self.Tc.tolist(), strict=True))
        self._recent: dict[tuple[float, bool, bytes], tuple[float, float]] = {}
        self._cp = CpTable([c.cp for c in components], enthalpy_offset=self.Hf_ig)
        self.cp_T_min = self._cp.T_min
        self.cp_T_max = self._cp.T_max
        self.element_names, self.element_matrix = _element_matrix(components)

    def __len__(self) -> int:
        return len(self.names)

    def index(self, name: str) -> int:
        """Column of a component, by name."""
        try:
            return self._index[name]
        except (KeyError, TypeError):
            raise InputError("component", name, f"one of {self.names}") from None

    # ---- per-component molar properties ----------------------------------------------

    def ideal_gas_enthalpy(self, T: np.ndarray) -> np.ndarray:
        """Ideal-gas molar enthalpy on the formation basis, J/mol; (m,) -> (m, n)."""
        return self._ideal_gas(_column(T))[0]

    def heat_of_vaporization(self, T: np.ndarray) -> np.ndarray:
        """Watson heat of vaporization, J/mol; (m,) -> (m, n); zero at and above Tc."""
        return self._vaporization(_column(T))[0]

    def molar_enthalpies(self, T: np.ndarray, liquid: np.ndarray) -> np.ndarray:
        """Molar enthalpy of each component in each stream's phase, J/mol; -> (m, n)."""
        T_column = _column(T)
        enthalpy = self._ideal_gas(T_column)[0]
        liquid_column = np.asarray(liquid, dtype=bool).reshape(-1, 1)
        if liquid_column.any():
            enthalpy = enthalpy - liquid_column * self._vaporization(T_column)[0]
        return enthalpy

    # ---- stream totals ----------------------------------------------------------------

    def enthalpy_flow(self, flows: np.ndarray, T: np.ndarray, liquid: np.ndarray) -> np.ndarray:
        """Enthalpy flow of each stream, W; flows (m, n) mol/s, T (m,), liquid (m,)."""
        flows = _flow_rows(flows, len(self.names))
        return np.einsum("ij,ij->i", flows, self.molar_enthalpies(T, liquid))

    def heat_capacity_flow(
        self, flows: np.ndarray, T: np.ndarray, liquid: np.ndarray
    ) -> np.ndarray:
        """d(enthalpy_flow)/dT of each stream, W/K (includes -d(dHvap)/dT of liquids)."""
        flows = _flow_rows(flows, len(self.names))
        T_column = _column(T)
        heat_capacity = self._ideal_gas(T_column)[1]
        liquid_column = np.asarray(liquid, dtype=bool).reshape(-1, 1)
        if liquid_column.any():
            heat_capacity = heat_capacity - liquid_column * self._vaporization(T_column)[1]
        return np.einsum("ij,ij->i", flows, heat_capacity)

    def stream_enthalpy_flow(self, flows: np.ndarray, T: float, liquid: bool) -> float:
        """Enthalpy flow of one stream, W: the cheap path for single streams.

        Agrees with :meth:`enthalpy_flow` to rounding (relative 1e-13), not to the bit.
        """
        return self._stream_enthalpy_and_heat_capacity(flows, T, liquid)[0]

    def stream_enthalpy_and_heat_capacity_flow(
        self, flows: np.ndarray, T: float, liquid: bool
    ) -> tuple[float, float]:
        """Enthalpy flow (W) and its temperature derivative (W/K) of one stream, at once."""
        return self._stream_enthalpy_and_heat_capacity(flows, T, liquid)

    def stream_heat_capacity_flow(self, flows: np.ndarray, T: float, liquid: bool) -> float:
        """d(enthalpy flow)/dT of one stream, W/K."""
        return self._stream_enthalpy_and_heat_capacity(flows, T, liquid)[1]

    def temperature_from_enthalpy(
        self,
        flows: np.ndarray,
        enthalpy_flow: float,
        liquid: bool,
        T_guess: float = 298.15,
        kept: KeptMolarValues | None = None,
    ) -> float:
        """Temperature at which a stream has the given enthalpy flow.

        A Newton iteration with the heat-capacity flow as derivative, kept inside a
        bracket that starts as [10 K, 6000 K] and shrinks with every evaluation;
        bisection takes over whenever a Newton step would leave it. Used by mixers,
        adiabatic reactors, duty-specified heaters and exchangers.

        Parameters
        ----------
        flows
            Component flows of the stream, (n,) mol/s, not negative (values above
            -1e-12 times the total flow are taken as round-off and set to zero).
        enthalpy_flow
            Target enthalpy flow, W.
        liquid
            Phase of the stream.
        T_guess
            Starting temperature, K; a good guess saves iterations.
        kept
            A block's :class:`KeptMolarValues`: every evaluation then computes each
            component's molar enthalpy and Cp (the same cost) and ``kept`` keeps the
            last, so that an evaluation at that temperature in a later call (the next
            pass starts there) is a dot product with the flows.

        Returns
        -------
        float
            Temperature in K. For a stream with no flow and a zero target, ``T_guess``.

        Raises
        ------
        InputError
            Bad flows, or no temperature in [10 K, 6000 K] gives that enthalpy flow.
        """
        flows, total = self._checked_flows(flows)
        if not math.isfinite(enthalpy_flow):
            raise InputError("enthalpy_flow", enthalpy_flow, "a finite enthalpy flow in W")
        guess = float(T_guess) if math.isfinite(T_guess) else 298.15
        if not total > 0.0:
            if enthalpy_flow == 0.0:
                return guess
            raise InputError("enthalpy_flow", enthalpy_flow, "0 W for a stream with no flow")

        if kept is None:

            def residual(T: float) -> tuple[float, float]:
                enthalpy, heat_capacity = self._stream_enthalpy_and_heat_capacity(flows, T, liquid)
                return enthalpy - enthalpy_flow, heat_capacity

        else:

            def residual(T: float) -> tuple[float, float]:
                enthalpy, heat_capacity = (kept.molar(self, T, liquid) @ flows).tolist()
                return enthalpy - enthalpy_flow, heat_capacity

        root = _bracketed_newton(residual, guess, T_SEARCH_MIN, T_SEARCH_MAX)
        if root is None:
            low = self.stream_enthalpy_flow(flows, T_SEARCH_MIN, liquid)
            high = self.stream_enthalpy_flow(flows, T_SEARCH_MAX, liquid)
            raise InputError(
                "enthalpy_flow",
                enthalpy_flow,
                f"an enthalpy flow this stream reaches between {T_SEARCH_MIN:g} K and "
                f"{T_SEARCH_MAX:g} K, i.e. from {low:.6g} W to {high:.6g} W",
            )
        return root

    # ---- reactions --------------------------------------------------------------------

    def standard_heat_of_reaction(self, stoichiometry: np.ndarray) -> float:
        """Hess's law at 298.15 K, ideal gas: sum of nu * Hf_ig, J/mol of reaction.

        Coefficients so large that the sum overflows give inf or NaN, without a warning.
        """
        nu = self._stoichiometry(stoichiometry)
        with np.errstate(over="ignore", invalid="ignore"):
            return float(nu @ self.Hf_ig)

    def element_balance(self, stoichiometry: np.ndarray) -> np.ndarray:
        """Net atoms of each element (``element_names`` order) made by one reaction.

        Coefficients so large that a sum overflows give inf or NaN there (never a
        balance), without a numpy warning; the reaction checks refuse them first.
        """
        nu = self._stoichiometry(stoichiometry)
        with np.errstate(over="ignore", invalid="ignore"):
            return self.element_matrix @ nu

    # ---- warnings ---------------------------------------------------------------------

    def correlation_range_warnings(self, T: float, flows: np.ndarray | None = None) -> list[str]:
        """Components (with flow, if ``flows`` given) whose Cp correlation is used out of range."""
        outside = (self.cp_T_min > T) | (self.cp_T_max < T)
        return [
            f"{self.names[i]}: ideal-gas Cp correlation ({self.components[i].cp.name}) is "
            f"fitted for {self.cp_T_min[i]:g}-{self.cp_T_max[i]:g} K and used at {T:.2f} K"
            for i in np.flatnonzero(outside & self._present(flows))
        ]

    def supercritical_liquid_warnings(self, T: float, flows: np.ndarray | None = None) -> list[str]:
        """Components of a liquid (with flow, if ``flows`` given) above their Tc."""
        above = self.Tc < T
        return [
            f"{self.names[i]}: liquid at {T:.2f} K is above its critical temperature "
            f"{self.Tc[i]:.2f} K; its heat of vaporization is taken as zero"
            for i in np.flatnonzero(above & self._present(flows))
        ]

    # ---- internals --------------------------------------------------------------------

    def _ideal_gas(self, T: float | np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(H_ig, Cp_ig) at T: a float gives (n,), an (m, 1) column gives (m, n)."""
        heat_capacity, sensible = self._cp.heat_capacity_and_sensible_enthalpy(T)
        return self.Hf_ig + sensible, heat_capacity

    def _vaporization(self, T: float | np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(dHvap, d(dHvap)/dT) by Watson, in the operation order of chemicals' Watson."""
        reduced = T / self.Tc
        below = reduced < 1.0
        ratio = np.where(below, (1.0 - reduced) / self._reduced_Tb_complement, 0.0)
        heat = self.Hvap_Tb * ratio**WATSON_EXPONENT
        # d/dT of the Watson form; at and above Tc the heat is zero and so is the slope
        slope = -WATSON_EXPONENT * heat / np.where(below, self.Tc - T, np.inf)
        return heat, slope

    def _stream_enthalpy_and_heat_capacity(
        self, flows: np.ndarray, T: float, liquid: bool
    ) -> tuple[float, float]:
        """Enthalpy flow (W) and heat-capacity flow (W/K) of one stream at T.

        A flowsheet pass often asks for the same stream at the same temperature twice
        in a row (a block's outlet at its set temperature, then the next block's inlet;
        an inlet's enthalpy, then the first step of the outlet's temperature solve), so
        the last few results are kept, keyed by the exact flows, T and phase.
        """
        flows = np.asarray(flows, dtype=float)
        T = float(T)
        liquid = bool(liquid)
        key = (T, liquid, flows.tobytes())
        recent = self._recent
        known = recent.get(key)
        if known is not None:
            return known
        enthalpy, heat_capacity = self._cp.stream_totals(flows, T)  # formation basis
        if liquid:
            heat, slope = self._stream_vaporization(flows, T)
            enthalpy -= heat
            heat_capacity -= slope
        self._remember(key, enthalpy, heat_capacity)
        return enthalpy, heat_capacity

    def _remember(self, key: tuple[float, bool, bytes], enthalpy: float, capacity: float) -> None:
        recent = self._recent
        if len(recent) >= _RECENT_SIZE:
            try:  # forget the oldest
                del recent[next(iter(recent))]
            except (RuntimeError, KeyError, StopIteration):  # another thread was there first
                recent.clear()
        recent[key] = (enthalpy, capacity)

    def at_temperature(self, T: float, liquid: bool) -> tuple[np.ndarray, np.ndarray]:
        """Each component's molar enthalpy (J/mol) and heat capacity (J/mol/K) at ``T`` in
        one phase, for blocks that evaluate many streams at one set temperature."""
        enthalpy, heat_capacity = self._ideal_gas(float(T))
        if liquid:
            heat, slope = self._vaporization(float(T))
            enthalpy, heat_capacity = enthalpy - heat, heat_capacity - slope
        return np.asarray(enthalpy, dtype=float), np.asarray(heat_capacity, dtype=float)

    def molar_values(self, T: float, liquid: bool) -> np.ndarray:
        """Each component's molar enthalpy (row 0, J/mol, formation basis) and heat
        capacity (row 1, J/mol/K, less d(dHvap)/dT for a liquid) at ``T``: a (2, n) array
        whose product with a stream's flows gives its enthalpy and heat-capacity flows,
        equal to :meth:`stream_enthalpy_and_heat_capacity_flow` to rounding.

        Python floats per component for up to ``SCALAR_PATH_LIMIT`` components (numpy's
        cost per call outweighs its speed for so few), the vectorised form for more.
        """
        T = float(T)
        if len(self.names) > SCALAR_PATH_LIMIT:
            return np.stack(self.at_temperature(T, liquid))
        enthalpy, heat_capacity = self._cp.molar_values(T)
        if liquid:
            for column, (scale, Tc) in enumerate(self._watson_terms):
                if T < Tc:
                    heat = scale * (1.0 - T / Tc) ** WATSON_EXPONENT
                    enthalpy[column] -= heat
                    heat_capacity[column] += WATSON_EXPONENT * heat / (Tc - T)
        return np.array((enthalpy, heat_capacity))

    def _stream_vaporization(self, flows: np.ndarray, T: float) -> tuple[float, float]:
        """Flow-weighted Watson heat of vaporization (W) and its T derivative (W/K).

        ``dHvap = Hvap_Tb ((1 - T/Tc)/(1 - Tb/Tc))^0.38`` below Tc, 0 above; its slope is
        ``-0.38 dHvap / (Tc - T)``. In Python floats for few components with flow.
        """
        if few_components(flows):
            heat_flow = slope_flow = 0.0
            for flow, (scale, Tc) in zip(flows.tolist(), self._watson_terms, strict=True):
                if flow != 0.0 and T < Tc:
                    heat = scale * (1.0 - T / Tc) ** WATSON_EXPONENT
                    heat_flow += flow * heat
                    slope_flow -= flow * WATSON_EXPONENT * heat / (Tc - T)
            return heat_flow, slope_flow
        terms = np.empty((2, len(self.names)))
        reduced_complement = np.maximum(1.0 - T * self._inverse_Tc, 0.0)
        heat = np.multiply(self._watson_scale, reduced_complement**WATSON_EXPONENT, out=terms[0])
        # at and above Tc dHvap = 0 and so is its slope
        np.divide(heat, np.maximum(self.Tc - T, 1e-300), out=terms[1])
        heat_flow, ratio_flow = (terms @ flows).tolist()
        return heat_flow, -WATSON_EXPONENT * ratio_flow

    def _checked_flows(self, flows: np.ndarray) -> tuple[np.ndarray, float]:
        """Flows of one stream: finite, not negative (round-off of -1e-12 of the total is
        0); and their total, mol/s."""
        flows = np.asarray(flows, dtype=float)
        if flows.shape == (len(self.names),):
            values = flows.tolist()  # few components: Python's min and sum are cheaper
            total = sum(values)
            if min(values) >= 0.0 and math.isfinite(total):
                return flows, total  # the usual case
        if flows.shape != (len(self.names),) or not np.all(np.isfinite(flows)):
            raise InputError("flows", flows, f"{len(self.names)} finite component flows")
        # round-off from upstream subtractions (a few ulps of the total) counts as 0
        if np.any(flows < -_ROUND_OFF * np.abs(flows).sum()):
            raise InputError("flows", flows, "component flows of 0 mol/s or more")
        flows = np.maximum(flows, 0.0)
        return flows, float(flows.sum())

    def _stoichiometry(self, stoichiometry: np.ndarray) -> np.ndarray:
        nu = np.asarray(stoichiometry, dtype=float)
        if nu.shape != (len(self.names),) or not np.all(np.isfinite(nu)):
            raise InputError(
                "stoichiometry", stoichiometry, f"{len(self.names)} finite coefficients"
            )
        return nu

    def _present(self, flows: np.ndarray | None) -> np.ndarray:
        if flows is None:
            return np.ones(len(self.names), dtype=bool)
        return np.asarray(flows, dtype=float) > 0.0


class KeptMolarValues:
    """Each component's molar enthalpy and heat capacity (:meth:`PropertyBasis.
    molar_values`) at the temperature and phase asked last, kept from pass to pass by a
    block: for its temperature searches (the next pass starts where the last one
    evaluated, :attr:`T`) and for inlets that carry no enthalpy (a tear stream whose
    temperature stays put while its flows move). A request at that temperature again
    costs a dot product with the flows instead of the correlations.
    """

    __slots__ = ("T", "liquid", "values")

    def __init__(self) -> None:
        self.T: float | None = None
        self.liquid = False
        self.values: np.ndarray | None = None

    def molar(self, basis: PropertyBasis, T: float, liquid: bool) -> np.ndarray:
        """The (2, n) molar values at ``T``: the kept ones if at that T and phase, else
        new ones (kept from now on)."""
        if T != self.T or liquid != self.liquid or self.values is None:
            self.values = basis.molar_values(T, liquid)
            self.T, self.liquid = T, liquid
        return self.values


def _column(T: np.ndarray) -> np.ndarray:
    """Temperatures as an (m, 1) column so they broadcast against components."""
    return np.asarray(T, dtype=float).reshape(-1, 1)


def _flow_rows(flows: np.ndarray, n: int) -> np.ndarray:
    flows = np.asarray(flows, dtype=float)
    if flows.ndim != 2 or flows.shape[1] != n:
        raise InputError("flows", flows.shape, f"an (m, {n}) array of component flows")
    return flows


def _element_matrix(components: Sequence[Component]) -> tuple[list[str], np.ndarray]:
    """Sorted element symbols and the (elements, components) matrix of atom counts."""
    counts = [c.elements for c in components]
    element_names = sorted({element for count in counts for element in count})
    matrix = np.array([[count.get(e, 0.0) for count in counts] for e in element_names])
    return element_names, matrix.reshape(len(element_names), len(components))


def _bracketed_newton(
    residual: Callable[[float], tuple[float, float]], x: float, low: float, high: float
) -> float | None:
    """Root of an increasing residual in [low, high] by safeguarded Newton; None if none.

    The bracket ends are only evaluated when a step needs them, so a good guess costs
    a handful of evaluations. ``residual`` returns (value, derivative).
    """
    f_low: float | None = None
    f_high: float | None = None
    x = min(max(x, low), high)
    for _ in range(_MAX_ITERATIONS):
        f, derivative = residual(x)
        if f == 0.0:
            return x
        if f < 0.0:
            low, f_low = x, f
        else:
            high, f_high = x, f
        x_new = x - f / derivative if derivative > 0.0 and math.isfinite(derivative) else math.nan
        if abs(x_new - x) <= _CONFIRMED_STEP and low <= x_new <= high:
            return x_new  # its linearisation error is below the tolerance (_CURVATURE)
        if not low < x_new < high:
            if f_low is None:
                f_low = residual(low)[0]
                if f_low > 0.0:
                    return None
            if f_high is None:
                f_high = residual(high)[0]
                if f_high < 0.0:
                    return None
            if f_low == 0.0 or f_high == 0.0:
                return low if f_low == 0.0 else high
            x_new = 0.5 * (low + high)
        if abs(x_new - x) <= _T_TOLERANCE:
            return x_new
        x = x_new
    return None
