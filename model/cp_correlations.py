"""Ideal-gas heat-capacity correlations, evaluated for many components and temperatures.

Two forms are supported:

``"TRC ideal-gas"``
    The correlation of Kabo & Roganov, *Thermodynamics of Organic Compounds in the Gas
    State* (TRC, 1994), as tabulated in ``chemicals.heat_capacity.TRC_gas_data``; eight
    coefficients ``a0 .. a7``, ``Cp = R (a0 + a1/T^2 exp(-a2/T) + a3 y^2 +
    (a4 - a5/(T - a7)^2) y^8)`` with ``y = (T - a7)/(T + a6)`` above ``a7`` and 0 below,
    and its analytical integral. Re-implemented here on numpy arrays, term by term in the
    same order as ``chemicals.heat_capacity.TRCCp`` / ``TRCCp_integral`` so that the two
    agree to the last bit.
``"polynomial"``
    ``Cp = c0 + c1 T + c2 T^2 + c3 T^3 + c4 T^4`` in J/mol/K (one to five coefficients);
    used for hand-defined components and for the polynomials of Poling, Prausnitz &
    O'Connell (*The Properties of Gases and Liquids*, 5th ed.) after multiplying by R.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np
from scipy.constants import R

from model.errors import InputError

TRC = "TRC ideal-gas"
POLYNOMIAL = "polynomial"
CORRELATION_FORMS = (TRC, POLYNOMIAL)
T_REFERENCE = 298.15  # K, reference temperature of the formation basis
_POLYNOMIAL_TERMS = 5
_EXPONENTS = np.arange(_POLYNOMIAL_TERMS, dtype=float)
# TRC coefficients that give Cp = 0 and integral = 0 at every T (a0 = a1 = a3 = a4 = a5 = 0)
_TRC_ZERO = (0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0)


@dataclass(frozen=True)
class CpCorrelation:
    """An ideal-gas heat-capacity correlation with its valid range and data source.

    Parameters
    ----------
    name
        The form: ``"TRC ideal-gas"`` (8 coefficients a0..a7, dimensionless and K) or
        ``"polynomial"`` (1 to 5 coefficients, J/mol/K, ascending powers of T in K).
    coefficients
        Coefficients of the form, stored as plain floats.
    T_min, T_max
        Range in K over which the correlation was fitted; outside it results are
        extrapolations and the property basis warns.
    source
        Where the coefficients come from, in words.
    """

    name: str
    coefficients: tuple[float, ...]
    T_min: float
    T_max: float
    source: str

    def __post_init__(self) -> None:
        if self.name not in CORRELATION_FORMS:
            raise InputError("cp.name", self.name, f"one of {list(CORRELATION_FORMS)}")
        try:
            coefficients = tuple(float(c) for c in self.coefficients)
        except (TypeError, ValueError):
            raise InputError("cp.coefficients", self.coefficients, "a list of numbers") from None
        object.__setattr__(self, "coefficients", coefficients)
        _check_coefficients(self.name, coefficients)
        for field in ("T_min", "T_max"):
            value = getattr(self, field)
            if not _is_real(value) or not value > 0.0:
                raise InputError(f"cp.{field}", value, "a finite temperature above 0 K")
            object.__setattr__(self, field, float(value))
        if not self.T_max > self.T_min:
            raise InputError("cp.T_max", self.T_max, f"greater than T_min = {self.T_min} K")
        if not isinstance(self.source, str):
            raise InputError("cp.source", self.source, "a text naming the data source")

    def heat_capacity(self, T: float) -> float:
        """Cp in J/mol/K at T in K (scalar convenience; vectorised work uses CpTable)."""
        return float(CpTable([self]).heat_capacity_and_integral(float(T))[0][0])

    def to_dict(self) -> dict:
        """Plain, JSON-able dict of the correlation."""
        return {
            "name": self.name,
            "coefficients": list(self.coefficients),
            "T_min": self.T_min,
            "T_max": self.T_max,
            "source": self.source,
        }

    @classmethod
    def from_dict(cls, data: dict) -> CpCorrelation:
        """Rebuild a correlation from :meth:`to_dict` output (validated)."""
        if not isinstance(data, dict):
            raise InputError("cp", data, "a mapping with name, coefficients, T_min, T_max, source")
        keys = {"name", "coefficients", "T_min", "T_max", "source"}
        if set(data) != keys:
            raise InputError("cp", sorted(data), f"exactly the keys {sorted(keys)}")
        return cls(
            name=data["name"],
            coefficients=tuple(data["coefficients"]),
            T_min=data["T_min"],
            T_max=data["T_max"],
            source=data["source"],
        )


def _is_real(value: object) -> bool:
    """True for a finite int or float (bools excluded)."""
    return isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)


def _check_coefficients(name: str, coefficients: tuple[float, ...]) -> None:
    """Count and finiteness of the coefficients of each form."""
    if not all(math.isfinite(c) for c in coefficients):
        raise InputError("cp.coefficients", coefficients, "finite numbers")
    if name == TRC:
        if len(coefficients) != 8:
            raise InputError("cp.coefficients", coefficients, "8 TRC coefficients a0..a7")
        a1, a2, a6, a7 = coefficients[1], coefficients[2], coefficients[6], coefficients[7]
        if a2 == 0.0 and a1 != 0.0:
            raise InputError("cp.coefficients", coefficients, "a1 = 0 whenever a2 = 0")
        if not (a6 >= 0.0 and a7 >= 0.0 and a6 + a7 > 0.0):
            # the analytical integral has ln(1 - y) with y = (T - a7)/(T + a6) < 1
            raise InputError("cp.coefficients", coefficients, "a6 >= 0, a7 >= 0, a6 + a7 > 0")
    elif not 1 <= len(coefficients) <= _POLYNOMIAL_TERMS:
        raise InputError("cp.coefficients", coefficients, "1 to 5 polynomial coefficients")


class TrcArrays(NamedTuple):
    """TRC coefficients a0..a7 as arrays, with the T-independent terms of the integral."""

    a0: np.ndarray
    a1: np.ndarray
    a2: np.ndarray
    a3: np.ndarray
    a4: np.ndarray
    a5: np.ndarray
    a6: np.ndarray
    a7: np.ndarray
    first: np.ndarray  # a6 + a7
    log_factor: np.ndarray  # 2 a3 + 8 a4
    fifth_factor: np.ndarray  # (a4 - a5 / (a6 + a7)^2) / 7
    minus_a2: np.ndarray
    a2_nonzero: np.ndarray  # a2, with 0 replaced by 1 (a1 is then 0)

    @classmethod
    def from_coefficients(cls, a: Sequence[np.ndarray]) -> TrcArrays:
        """Pack a0..a7 (arrays or floats) and precompute the constant terms."""
        a0, a1, a2, a3, a4, a5, a6, a7 = (np.asarray(c, dtype=float) for c in a)
        first = a6 + a7
        return cls(
            a0, a1, a2, a3, a4, a5, a6, a7,
            first=first,
            log_factor=2.0 * a3 + 8.0 * a4,
            fifth_factor=1 / 7.0 * (a4 - a5 / (first * first)),
            minus_a2=-a2,
            a2_nonzero=np.where(a2 == 0.0, 1.0, a2),
        )  # fmt: skip


def trc_heat_capacity_and_integral(
    T: float | np.ndarray, a: TrcArrays | Sequence[np.ndarray]
) -> tuple[np.ndarray, np.ndarray]:
    """TRC ideal-gas Cp (J/mol/K) and its integral H(T) - H(0) with I = 0 (J/mol).

    The expressions follow ``chemicals.heat_capacity.TRCCp`` and ``TRCCp_integral``
    operation by operation (terms that do not depend on T are computed once, in the same
    way), so results agree with them to the last bit. ``T`` broadcasts against the
    coefficient arrays ``a0, ..., a7``, which must satisfy the checks of
    :class:`CpCorrelation` (``a6 + a7 > 0``; ``a1 = 0`` where ``a2 = 0``).
    """
    c = a if isinstance(a, TrcArrays) else TrcArrays.from_coefficients(a)
    # y = (T - a7)/(T + a6) above a7, else 0: max(T - a7, 0) gives exactly that
    y = np.maximum(T - c.a7, 0.0) / (T + c.a6)
    y2 = y * y
    y4 = y2 * y2
    T_inv = 1.0 / T
    T_m_a7 = T - c.a7
    # at T == a7 exactly chemicals drops the a5 term; y = 0 there, and a floor on the
    # square keeps a5/(T - a7)^2 finite so that the product with y^8 is that same 0
    T_m_a7_squared = np.maximum(T_m_a7 * T_m_a7, 1e-200)
    cp = R * (
        c.a0
        + (c.a1 * T_inv * T_inv) * np.exp(c.minus_a2 * T_inv)
        + y2 * (c.a3 + (c.a4 - c.a5 / T_m_a7_squared) * y2 * y2 * y2)
    )
    one_m_y = 1.0 - y
    inverse_one_m_y = 1.0 / one_m_y
    second = c.log_factor * np.log(one_m_y)
    third = (c.a3 * (1.0 + inverse_one_m_y) + c.a4 * (7.0 + inverse_one_m_y)) * y
    fourth = c.a4 * (3.0 * y2 + 5.0 / 3.0 * y * y2 + y4 + 0.6 * y4 * y + 1 / 3.0 * y4 * y2)
    fifth = c.fifth_factor * y4 * y2 * y
    h = c.first * (second + third + fourth + fifth)
    integral = (c.a0 + c.a1 * np.exp(c.minus_a2 / T) / (c.a2_nonzero * T) + h / T) * R * T
    return cp, integral


def polynomial_heat_capacity_and_integral(
    T: float | np.ndarray, c: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Polynomial Cp (J/mol/K) and its integral from 0 K (J/mol).

    ``c`` has shape (5, k), ascending powers. The powers of T are formed once and the
    sums are matrix products, so the cost hardly depends on k or on the degree.
    """
    T = np.asarray(T, dtype=float)  # a scalar, or an (m, 1) column
    powers = T**_EXPONENTS  # (5,) or (m, 5)
    cp = powers @ c
    integral = (powers * T / (_EXPONENTS + 1.0)) @ c
    return cp, integral


class CpTable:
    """The Cp correlations of an ordered component list, packed into coefficient arrays.

    Every component gets a column in both the TRC and the polynomial coefficient arrays;
    the form it does not use holds coefficients that make it exactly zero (0 * anything
    and x + 0.0 are exact). An evaluation is then a fixed number of numpy operations on
    whole rows, with no scatter by form, whatever the number of components or streams.

    Parameters
    ----------
    correlations
        One correlation per component, in the component order.
    """

    def __init__(self, correlations: Sequence[CpCorrelation]) -> None:
        self.correlations = tuple(correlations)
        self.size = len(self.correlations)
        trc = np.tile(_TRC_ZERO, (self.size, 1))
        poly = np.zeros((_POLYNOMIAL_TERMS, self.size))
        for column, correlation in enumerate(self.correlations):
            if correlation.name == TRC:
                trc[column] = correlation.coefficients
            else:
                poly[: len(correlation.coefficients), column] = correlation.coefficients
        self._has_trc = any(c.name == TRC for c in self.correlations)
        self._has_poly = any(c.name == POLYNOMIAL for c in self.correlations)
        self._trc = TrcArrays.from_coefficients(trc.T.copy())
        self._poly = poly
        self.T_min = np.array([c.T_min for c in self.correlations], dtype=float)
        self.T_max = np.array([c.T_max for c in self.correlations], dtype=float)
        self._integral_at_reference = self.heat_capacity_and_integral(T_REFERENCE)[1]

    def heat_capacity_and_integral(self, T: float | np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Cp (J/mol/K) and its integral from 0 K (J/mol).

        Parameters
        ----------
        T
            Temperature in K: a float (results of shape (n,)) or an array of shape
            (m, 1) (results of shape (m, n)).

        Returns
        -------
        tuple of numpy.ndarray
            ``(Cp, integral)``.
        """
        if not self._has_poly:
            return trc_heat_capacity_and_integral(T, self._trc)
        cp, integral = polynomial_heat_capacity_and_integral(T, self._poly)
        if self._has_trc:
            trc_cp, trc_integral = trc_heat_capacity_and_integral(T, self._trc)
            cp = cp + trc_cp
            integral = integral + trc_integral
        return cp, integral

    def heat_capacity_and_sensible_enthalpy(
        self, T: float | np.ndarray
    ) -> tuple[np.ndarray, np.ndarray]:
        """Cp (J/mol/K) and the integral of Cp from 298.15 K to T (J/mol)."""
        cp, integral = self.heat_capacity_and_integral(T)
        return cp, integral - self._integral_at_reference
