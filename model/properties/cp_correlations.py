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

:meth:`CpTable.heat_capacity_and_integral` evaluates many streams at once with the
bit-exact forms above; :meth:`CpTable.stream_totals` is the cheap path for one stream
at one temperature (the flowsheet pass), the same correlations regrouped as a sum of
per-component terms and equal to the first to rounding.
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
#: A single stream with at most this many components carrying flow is summed component by
#: component in Python floats (numpy's cost per call outweighs its speed for so few).
SCALAR_PATH_LIMIT = 24


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
    enthalpy_offset
        Per component, a constant (J/mol) that :meth:`stream_totals` adds to the
        sensible enthalpy; a property basis passes the formation enthalpies, so that
        one call gives a stream's enthalpy flow on the formation basis. Default 0.
    """

    def __init__(
        self, correlations: Sequence[CpCorrelation], enthalpy_offset: Sequence[float] | None = None
    ) -> None:
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
        # the single-stream path (see stream_totals): T - a7 and T + a6 in one addition,
        # and the coefficients of the per-component terms of the integral and of Cp
        self._shifts = np.stack([-self._trc.a7, self._trc.a6])
        self._minus_a2 = self._trc.minus_a2
        offset = (
            np.zeros(self.size)
            if enthalpy_offset is None
            else np.array(enthalpy_offset, dtype=float)
        )
        self._constant = offset - self._integral_at_reference  # per mole at T = 0 K, J/mol
        self._term_coefficients = _term_coefficients(self._trc, self._constant)
        self._scalar_terms = _scalar_terms(
            self._term_coefficients, self._trc, self._poly, self.correlations
        )

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

    def stream_totals(self, flows: np.ndarray, T: float) -> tuple[float, float]:
        """Enthalpy flow (W) and heat-capacity flow (W/K) of one stream at temperature T.

        Per component the enthalpy is the table's ``enthalpy_offset`` plus the integral
        of Cp from 298.15 K to T: algebraically ``flows @ (offset + sensible)`` and
        ``flows @ Cp`` from :meth:`heat_capacity_and_sensible_enthalpy`, to rounding
        (about 1e-15 of the largest term), not to the bit.

        The cheap path of a flowsheet pass, where one stream is asked at a time. The
        correlation is written as a sum of per-component terms times constant
        coefficients (set up once, see :func:`_term_coefficients`). With few components
        carrying flow (:func:`few_components`) the terms are summed in Python floats,
        skipping components without flow; otherwise they are rows of one array
        (:func:`_single_temperature_terms`), about twenty numpy operations whatever the
        number of components, weighted by the flows in one matrix-vector product.

        Parameters
        ----------
        flows
            Component flows, a float array of shape (n,), mol/s.
        T
            Temperature, K (a float).
        """
        if few_components(flows):
            return _scalar_totals(flows.tolist(), T, self._scalar_terms)
        if not self._has_trc:
            enthalpy, heat_capacity = float(self._constant @ flows), 0.0
        else:
            terms = _single_temperature_terms(T, self._shifts, self._minus_a2)
            terms *= flows
            enthalpy, heat_capacity = (self._term_coefficients @ terms.ravel()).tolist()
        if self._has_poly:
            power = 1.0
            for order, coefficient in enumerate((self._poly @ flows).tolist()):
                heat_capacity += coefficient * power
                power *= T
                enthalpy += coefficient * power / (order + 1.0)
        return enthalpy, heat_capacity

    def molar_values(self, T: float) -> tuple[list[float], list[float]]:
        """Each component's molar enthalpy (``enthalpy_offset`` plus the integral of Cp
        from 298.15 K, J/mol) and Cp (J/mol/K) at one temperature, as Python floats in
        column order: the terms of :meth:`stream_totals` before they are weighted by the
        flows, so that ``flows @ enthalpy`` is that method's enthalpy flow to rounding.

        A block keeps them for the temperature it found last pass; the next pass starts
        its search there and the first step costs a dot product.
        """
        return _scalar_molar(float(T), self._scalar_terms, self.size)


def few_components(flows: np.ndarray) -> bool:
    """True when at most :data:`SCALAR_PATH_LIMIT` components of ``flows`` are non-zero."""
    return len(flows) <= SCALAR_PATH_LIMIT or np.count_nonzero(flows) <= SCALAR_PATH_LIMIT


# Rows of the per-component terms of one stream at one temperature T, y = (T - a7)/(T + a6)
# above a7 (else 0), q = 1/(T + a6), e = exp(-a2/T); see _single_temperature_terms.
_ROW_LOG, _ROW_RATIO, _ROW_Y = 0, 1, 2  # ln(1 - y), y/(1 - y), then y^1 .. y^8 (rows 2..9)
_ROW_EXP, _ROW_EXP_T2, _ROW_Q2Y6, _ROW_ONE, _ROW_T = 10, 11, 12, 13, 14
_TERM_ROWS = 15
_EXP_OVERFLOW = 709.0  # math.exp raises above about 709.78, where numpy gives inf


def _single_temperature_terms(T: float, shifts: np.ndarray, minus_a2: np.ndarray) -> np.ndarray:
    """The (15, n) per-component terms of the TRC integral and Cp at one temperature T.

    ``shifts`` is ``[-a7, a6]`` stacked, ``minus_a2`` is ``-a2``; both (n,) rows.
    """
    terms = np.empty((_TERM_ROWS, shifts.shape[1]))
    shifted = T + shifts  # T - a7, T + a6
    q = 1.0 / shifted[1]
    y = np.maximum(shifted[0], 0.0, out=terms[_ROW_Y])
    y *= q
    powers = terms[_ROW_Y : _ROW_Y + 8]
    powers[1:] = y
    np.multiply.accumulate(powers, axis=0, out=powers)  # y, y^2, ..., y^8
    one_minus_y = 1.0 - y
    np.log(one_minus_y, out=terms[_ROW_LOG])
    np.divide(y, one_minus_y, out=terms[_ROW_RATIO])
    T_inverse = 1.0 / T
    exponential = np.multiply(minus_a2, T_inverse, out=terms[_ROW_EXP])
    np.exp(exponential, out=exponential)
    np.multiply(exponential, T_inverse * T_inverse, out=terms[_ROW_EXP_T2])
    np.multiply(q, q, out=terms[_ROW_Q2Y6])
    terms[_ROW_Q2Y6] *= powers[5]  # q^2 y^6 = y^8 / (T - a7)^2
    terms[_ROW_ONE] = 1.0
    terms[_ROW_T] = T
    return terms


def _term_coefficients(c: TrcArrays, constant: np.ndarray) -> np.ndarray:
    """(2, 15 n) coefficients: row 0 gives the enthalpy, row 1 Cp, from the terms.

    ``constant`` is each component's term independent of T (offset less H(298.15 K)).

    Expanding ``TRCCp_integral``: ``H(T) - H(0) = R (a0 T + (a1/a2) e + (a6 + a7) ((2 a3 +
    8 a4) ln(1 - y) + (a3 + a4) y/(1 - y) + (a3 + 7 a4) y + 3 a4 y^2 + 5/3 a4 y^3 + a4 y^4
    + 0.6 a4 y^5 + 1/3 a4 y^6 + (a4 - a5/(a6 + a7)^2)/7 y^7))``; and ``Cp = R (a0 + a1
    e/T^2 + a3 y^2 + a4 y^8 - a5 q^2 y^6)``, since ``y/(T - a7) = q``.
    """
    enthalpy = np.zeros((_TERM_ROWS, len(c.a0)))
    heat_capacity = np.zeros_like(enthalpy)
    scale = R * c.first
    enthalpy[_ROW_LOG] = scale * c.log_factor
    enthalpy[_ROW_RATIO] = scale * (c.a3 + c.a4)
    polynomial = (c.a3 + 7.0 * c.a4, 3.0 * c.a4, 5.0 / 3.0 * c.a4, c.a4, 0.6 * c.a4, c.a4 / 3.0)
    for power, coefficient in enumerate((*polynomial, c.fifth_factor), start=1):
        enthalpy[_ROW_Y + power - 1] = scale * coefficient
    enthalpy[_ROW_EXP] = R * c.a1 / c.a2_nonzero
    enthalpy[_ROW_ONE] = constant
    enthalpy[_ROW_T] = R * c.a0
    heat_capacity[_ROW_Y + 1] = R * c.a3
    heat_capacity[_ROW_Y + 7] = R * c.a4
    heat_capacity[_ROW_EXP_T2] = R * c.a1
    heat_capacity[_ROW_Q2Y6] = -R * c.a5
    heat_capacity[_ROW_ONE] = R * c.a0
    return np.stack([enthalpy.ravel(), heat_capacity.ravel()])


class _ScalarTerms(NamedTuple):
    """Per-component floats of :func:`_scalar_totals`, TRC and polynomial columns apart."""

    trc_columns: tuple[int, ...]
    trc: list[tuple[float, ...]]
    polynomial_columns: tuple[int, ...]
    polynomial: list[tuple[float, ...]]


def _scalar_terms(
    coefficients: np.ndarray,
    c: TrcArrays,
    polynomial: np.ndarray,
    correlations: Sequence[CpCorrelation],
) -> _ScalarTerms:
    """The floats :func:`_scalar_totals` needs, per component.

    TRC: a7, a6, -a2 and the term coefficients (20 floats); polynomial: the constant
    term (offset less H(298.15 K) from 0 K), c0..c4 for Cp and c0, c1/2 .. c4/5 for its
    integral (11 floats).
    """
    enthalpy, heat_capacity = coefficients.reshape(2, _TERM_ROWS, -1)
    trc_rows = (
        c.a7,
        c.a6,
        c.minus_a2,
        enthalpy[_ROW_ONE],
        enthalpy[_ROW_T],
        enthalpy[_ROW_EXP],
        heat_capacity[_ROW_ONE],
        heat_capacity[_ROW_EXP_T2],
        enthalpy[_ROW_LOG],
        enthalpy[_ROW_RATIO],
        *enthalpy[_ROW_Y : _ROW_Y + 7],  # y^1 .. y^7
        heat_capacity[_ROW_Y + 1],  # y^2
        heat_capacity[_ROW_Y + 7],  # y^8
        heat_capacity[_ROW_Q2Y6],
    )
    polynomial_rows = (
        enthalpy[_ROW_ONE],
        *polynomial,
        *(polynomial / (_EXPONENTS + 1.0)[:, None]),
    )
    trc = [k for k, correlation in enumerate(correlations) if correlation.name == TRC]
    others = [k for k, correlation in enumerate(correlations) if correlation.name != TRC]
    return _ScalarTerms(
        tuple(trc),
        [tuple(float(row[k]) for row in trc_rows) for k in trc],
        tuple(others),
        [tuple(float(row[k]) for row in polynomial_rows) for k in others],
    )


def _scalar_totals(flows: list[float], T: float, terms: _ScalarTerms) -> tuple[float, float]:
    """:meth:`CpTable.stream_totals` in Python floats, components without flow skipped."""
    enthalpy = heat_capacity = 0.0
    if terms.polynomial:
        for column, (h_one, c0, c1, c2, c3, c4, i0, i1, i2, i3, i4) in zip(
            terms.polynomial_columns, terms.polynomial, strict=True
        ):
            flow = flows[column]
            enthalpy += flow * (h_one + T * (i0 + T * (i1 + T * (i2 + T * (i3 + T * i4)))))
            heat_capacity += flow * (c0 + T * (c1 + T * (c2 + T * (c3 + T * c4))))
        flows = [flows[column] for column in terms.trc_columns]
    T_inverse = 1.0 / T
    T_inverse_squared = T_inverse * T_inverse
    for flow, component in zip(flows, terms.trc, strict=True):
        if flow == 0.0:
            continue
        (a7, a6, minus_a2, h_one, h_T, h_exp, c_one, c_exp, h_log, h_ratio,
         h1, h2, h3, h4, h5, h6, h7, c_y2, c_y8, c_q2y6) = component  # fmt: skip
        exponent = minus_a2 * T_inverse
        exponential = math.exp(exponent) if exponent < _EXP_OVERFLOW else math.inf  # as numpy
        h = h_one + h_T * T + h_exp * exponential
        c = c_one + c_exp * exponential * T_inverse_squared
        if T > a7:
            q = 1.0 / (T + a6)
            y = (T - a7) * q
            one_minus_y = 1.0 - y
            y2 = y * y
            y6 = y2 * y2 * y2
            h += h_log * math.log(one_minus_y) + h_ratio * y / one_minus_y
            h += y * (h1 + y * (h2 + y * (h3 + y * (h4 + y * (h5 + y * (h6 + y * h7))))))
            c += c_y2 * y2 + y6 * (c_y8 * y2 + c_q2y6 * q * q)
        enthalpy += flow * h
        heat_capacity += flow * c
    return enthalpy, heat_capacity


def _scalar_molar(T: float, terms: _ScalarTerms, size: int) -> tuple[list[float], list[float]]:
    """Per-component terms of :func:`_scalar_totals` (every component), column order."""
    enthalpy = [0.0] * size
    heat_capacity = [0.0] * size
    for column, (h_one, c0, c1, c2, c3, c4, i0, i1, i2, i3, i4) in zip(
        terms.polynomial_columns, terms.polynomial, strict=True
    ):
        enthalpy[column] = h_one + T * (i0 + T * (i1 + T * (i2 + T * (i3 + T * i4))))
        heat_capacity[column] = c0 + T * (c1 + T * (c2 + T * (c3 + T * c4)))
    T_inverse = 1.0 / T
    T_inverse_squared = T_inverse * T_inverse
    exp, log = math.exp, math.log
    for column, component in zip(terms.trc_columns, terms.trc, strict=True):
        (a7, a6, minus_a2, h_one, h_T, h_exp, c_one, c_exp, h_log, h_ratio,
         h1, h2, h3, h4, h5, h6, h7, c_y2, c_y8, c_q2y6) = component  # fmt: skip
        exponent = minus_a2 * T_inverse
        exponential = exp(exponent) if exponent < _EXP_OVERFLOW else math.inf  # as numpy
        h = h_one + h_T * T + h_exp * exponential
        c = c_one + c_exp * exponential * T_inverse_squared
        if T > a7:
            q = 1.0 / (T + a6)
            y = (T - a7) * q
            one_minus_y = 1.0 - y
            y2 = y * y
            y6 = y2 * y2 * y2
            h += h_log * log(one_minus_y) + h_ratio * y / one_minus_y
            h += y * (h1 + y * (h2 + y * (h3 + y * (h4 + y * (h5 + y * (h6 + y * h7))))))
            c += c_y2 * y2 + y6 * (c_y8 * y2 + c_q2y6 * q * q)
        enthalpy[column] = h
        heat_capacity[column] = c
    return enthalpy, heat_capacity
