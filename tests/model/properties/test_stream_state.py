"""Stream state: totals, fractions, enthalpy, validation of bad input, copying."""

from __future__ import annotations

import math

import numpy as np
import pytest

from model.errors import InputError
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.stream_state import StreamState


@pytest.fixture(scope="module")
def basis() -> PropertyBasis:
    return PropertyBasis([lookup_component(n) for n in ("water", "methanol", "nitrogen")])


def _stream(**changes) -> StreamState:
    values = dict(flows=np.array([1.0, 3.0, 0.0]), T=300.0, P=2e5, phase="liquid")
    values.update(changes)
    return StreamState(**values)


def test_totals_and_fractions(basis):
    stream = _stream()
    assert stream.total_molar_flow() == 4.0
    np.testing.assert_allclose(stream.mole_fractions(), [0.25, 0.75, 0.0])
    # molar masses: water 18.01528 g/mol, methanol 32.04186 g/mol (standard atomic weights)
    mass = 1.0 * 0.01801528 + 3.0 * 0.03204186
    assert stream.mass_flow(basis) == pytest.approx(mass, rel=1e-12)
    np.testing.assert_allclose(
        stream.mass_fractions(basis), [0.01801528 / mass, 3 * 0.03204186 / mass, 0.0]
    )


def test_zero_stream_fractions_are_zero_and_molar_enthalpy_undefined(basis):
    stream = _stream(flows=np.zeros(3))
    assert np.all(stream.mole_fractions() == 0.0)
    assert np.all(stream.mass_fractions(basis) == 0.0)
    assert stream.enthalpy_flow(basis) == 0.0
    assert math.isnan(stream.molar_enthalpy(basis))


def test_enthalpy_uses_the_stream_phase(basis):
    liquid = _stream()
    vapor = _stream(phase="vapor")
    expected = basis.enthalpy_flow(liquid.flows[None, :], [300.0], [True])[0]
    assert liquid.enthalpy_flow(basis) == pytest.approx(expected, rel=1e-14)
    assert liquid.molar_enthalpy(basis) == pytest.approx(expected / 4.0, rel=1e-14)
    heats = basis.heat_of_vaporization([300.0])[0]
    difference = vapor.enthalpy_flow(basis) - liquid.enthalpy_flow(basis)
    assert difference == pytest.approx(float(liquid.flows @ heats), rel=1e-12)


def test_water_vapor_at_reference_is_its_formation_enthalpy(basis):
    # formation basis (DESIGN.md): 1 mol/s of water vapor at 298.15 K carries Hf_ig in W
    stream = _stream(flows=np.array([1.0, 0.0, 0.0]), T=298.15, phase="vapor")
    assert stream.enthalpy_flow(basis) == pytest.approx(lookup_component("water").Hf_ig)


@pytest.mark.parametrize(
    ("changes", "field", "allowed"),
    [
        ({"flows": np.array([1.0, -0.5, 0.0])}, "S1.flows", "0 mol/s or more"),
        ({"flows": np.array([1.0, np.nan, 0.0])}, "S1.flows", "finite"),
        ({"flows": np.array([1.0, 2.0])}, "S1.flows", "3 component flows"),
        ({"T": 0.0}, "S1.T", "above 0 K"),
        ({"T": -10.0}, "S1.T", "above 0 K"),
        ({"T": float("nan")}, "S1.T", "above 0 K"),
        ({"P": 0.0}, "S1.P", "above 0 Pa"),
        ({"phase": "solid"}, "S1.phase", "'vapor', 'liquid'"),
    ],
)
def test_validate_names_field_value_and_allowed(basis, changes, field, allowed):
    stream = _stream(**changes)
    with pytest.raises(InputError) as caught:
        stream.validate("S1", basis)
    error = caught.value
    assert error.field == field
    assert allowed in error.allowed
    assert field in str(error)


def test_valid_stream_passes_validation(basis):
    _stream().validate("S1", basis)
    _stream(phase="vapor", T=1500.0).validate("S1")


def test_copy_is_independent():
    stream = _stream()
    duplicate = stream.copy()
    duplicate.flows[0] = 99.0
    duplicate.T = 400.0
    assert stream.flows[0] == 1.0 and stream.T == 300.0


def test_flows_are_stored_as_a_float_array():
    stream = StreamState([1, 2, 3], T=300, P=1e5, phase="vapor")
    assert stream.flows.dtype == float
    assert stream.total_molar_flow() == 6.0


def test_two_phase_stream_enthalpy_is_the_sum_of_its_phases():
    # Each phase on the formation basis (the basis's own vapor and liquid enthalpies):
    # a two-phase stream's enthalpy flow is the vapor's plus the liquid's.
    basis = PropertyBasis([lookup_component("water"), lookup_component("methanol")])
    flows = np.array([2.0, 1.0])
    vapor = np.array([0.5, 0.75])
    state = StreamState(flows, 340.0, 101325.0, "vapor", vapor_flows=vapor)
    assert state.phase == "two-phase" and state.two_phase
    assert state.vapor_fraction() == pytest.approx(1.25 / 3.0, rel=1e-15)
    expected = basis.stream_enthalpy_flow(vapor, 340.0, False) + basis.stream_enthalpy_flow(
        flows - vapor, 340.0, True
    )
    assert state.enthalpy_flow(basis) == pytest.approx(expected, rel=1e-13)
    state.validate("Stream 1", basis)
    copied = state.copy()
    assert copied.vapor_flows is not state.vapor_flows
    assert copied.vapor_flows.tolist() == vapor.tolist() and copied.phase == "two-phase"
    assert StreamState(flows, 340.0, 101325.0, "liquid").vapor_fraction() == 0.0
    assert StreamState(flows, 340.0, 101325.0, "vapor").vapor_fraction() == 1.0
    with pytest.raises(InputError, match="vapor_flows"):
        StreamState(flows, 340.0, 1e5, "vapor", vapor_flows=np.array([3.0, 0.0])).validate("S")
