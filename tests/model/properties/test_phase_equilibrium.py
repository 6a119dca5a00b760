"""The ideal property method's flashes against outside references.

- thermo's own ideal flash (``FlashVL`` with ``IdealGas`` and an ideal ``GibbsExcessLiquid``
  whose vapor pressures use the same Antoine table, method ANTOINE_POLING): K-values,
  vapor fractions, bubble and dew temperatures to 1e-6 relative.
- CoolProp saturation temperatures of pure fluids (``PropsSI('T','P',p,'Q',0,fluid)``).
- Rachford-Rice against its closed form for two components and the roots of the cleared
  polynomial (numpy) for three.
"""

from __future__ import annotations

import numpy as np
import pytest

from model.errors import InputError
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.phase_equilibrium import IdealEquilibrium
from model.properties.rachford_rice import rachford_rice_residual, solve_rachford_rice
from model.properties.vapor_pressure import vapor_pressure_data

CoolProp = pytest.importorskip("CoolProp.CoolProp")
thermo = pytest.importorskip("thermo")


def _equilibrium(names: list[str]) -> IdealEquilibrium:
    components = [lookup_component(name) for name in names]
    data = [vapor_pressure_data(c.name, c.cas, c.Tc) for c in components]
    return IdealEquilibrium(PropertyBasis(components), data)


def _thermo_flasher(names: list[str]):
    """thermo's ideal VLE set up on its own: ideal gas, ideal liquid, Antoine (Poling)."""
    from thermo import (
        ChemicalConstantsPackage,
        FlashVL,
        GibbsExcessLiquid,
        HeatCapacityGas,
        IdealGas,
        VaporPressure,
        VolumeLiquid,
    )

    constants = ChemicalConstantsPackage.constants_from_IDs(names)
    pressures = []
    for cas in constants.CASs:
        correlation = VaporPressure(CASRN=cas)
        correlation.method = "ANTOINE_POLING"
        pressures.append(correlation)
    gases = [HeatCapacityGas(CASRN=cas) for cas in constants.CASs]
    gas = IdealGas(HeatCapacityGases=gases, T=300.0, P=1e5, zs=[0.5, 0.5])
    volumes = [VolumeLiquid(CASRN=cas) for cas in constants.CASs]  # no effect on ideal K
    liquid = GibbsExcessLiquid(
        VaporPressures=pressures,
        HeatCapacityGases=gases,
        VolumeLiquids=volumes,
        T=300.0,
        P=1e5,
        zs=[0.5, 0.5],
    )
    return FlashVL(constants, None, liquid=liquid, gas=gas)


@pytest.mark.parametrize(
    ("names", "T", "P"),
    [(["benzene", "toluene"], 371.0, 101325.0), (["n-hexane", "n-heptane"], 359.0, 101325.0)],
)
def test_ideal_flash_matches_thermo_flashvl(names, T, P):
    # Source: thermo FlashVL (ideal gas + ideal liquid, Antoine ANTOINE_POLING), 1e-6 rel.
    flasher = _thermo_flasher(names)
    equilibrium = _equilibrium(names)
    z = [0.4, 0.6]
    reference = flasher.flash(T=T, P=P, zs=z)
    ours = equilibrium.flash_TP(np.array(z), T, P)
    assert reference.VF > 0.0 and reference.VF < 1.0  # a two-phase condition is tested
    assert ours.vapor_fraction == pytest.approx(reference.VF, rel=1e-6)
    reference_K = np.array(reference.Ks(reference.gas, reference.liquid0))
    assert ours.K == pytest.approx(reference_K, rel=1e-6)
    bubble = flasher.flash(P=P, VF=0.0, zs=z).T
    dew = flasher.flash(P=P, VF=1.0, zs=z).T
    assert equilibrium.bubble_point(np.array(z), P) == pytest.approx(bubble, rel=1e-6)
    assert equilibrium.dew_point(np.array(z), P) == pytest.approx(dew, rel=1e-6)


@pytest.mark.parametrize(
    ("name", "fluid"), [("water", "Water"), ("ammonia", "Ammonia"), ("n-hexane", "n-Hexane")]
)
def test_pure_bubble_and_dew_points_match_coolprop_saturation(name, fluid):
    # Source: CoolProp PropsSI('T','P',p,'Q',0,fluid). Poling's Antoine fits reproduce
    # their data to a few tenths of a percent in pressure, about 0.1 K near 1 atm; 0.3 K
    # allows for the difference between the Antoine data and the reference EOS.
    for P in (101325.0, 2.0e5):
        saturation = CoolProp.PropsSI("T", "P", P, "Q", 0, fluid)
        equilibrium = _equilibrium([name])
        one = np.array([1.0])
        assert equilibrium.bubble_point(one, P) == pytest.approx(saturation, abs=0.3)
        assert equilibrium.dew_point(one, P) == pytest.approx(saturation, abs=0.3)


def test_rachford_rice_two_components_closed_form():
    # Closed form for two components (the cleared equation is linear in V):
    # V = -(z1 (K1 - 1) + z2 (K2 - 1)) / ((K1 - 1)(K2 - 1)).
    z, K = np.array([0.3, 0.7]), np.array([3.2, 0.41])
    expected = -(z[0] * (K[0] - 1) + z[1] * (K[1] - 1)) / ((K[0] - 1) * (K[1] - 1))
    result = solve_rachford_rice(z, K)
    assert result.phase == "two-phase"
    assert result.vapor_fraction == pytest.approx(expected, abs=1e-8)
    assert result.y == pytest.approx(K * result.x, rel=1e-12)


def test_rachford_rice_three_components_against_polynomial_roots():
    # numpy.roots of the cleared polynomial sum z_i a_i prod_{j != i} (1 + V a_j), a = K - 1:
    # its one root in (0, 1) is the vapor fraction.
    z, K = np.array([0.2, 0.5, 0.3]), np.array([4.5, 1.1, 0.15])
    a = K - 1.0
    poly = np.zeros(3)
    for i in range(3):
        term = np.array([z[i] * a[i]])
        for j in range(3):
            if j != i:
                term = np.polymul(term, [a[j], 1.0])
        poly = np.polyadd(poly, term)
    roots = [r.real for r in np.roots(poly) if abs(r.imag) < 1e-12 and 0.0 < r.real < 1.0]
    assert len(roots) == 1
    result = solve_rachford_rice(z, K)
    assert result.vapor_fraction == pytest.approx(roots[0], abs=1e-8)
    assert abs(rachford_rice_residual(result.vapor_fraction, z, K)) < 1e-12


def test_rachford_rice_single_phase_is_reported_as_such():
    liquid = solve_rachford_rice(np.array([0.5, 0.5]), np.array([0.9, 0.5]))
    vapor = solve_rachford_rice(np.array([0.5, 0.5]), np.array([3.0, 1.5]))
    assert (liquid.phase, liquid.vapor_fraction) == ("liquid", 0.0)
    assert (vapor.phase, vapor.vapor_fraction) == ("vapor", 1.0)


def test_flash_at_enthalpy_and_vapor_fraction_invert_the_isothermal_flash():
    # Consistency: a PH flash to the enthalpy of a TP flash gives back its T; a PV flash
    # to its vapor fraction gives back its T (ideal method, benzene-toluene).
    equilibrium = _equilibrium(["benzene", "toluene"])
    flows = np.array([1.0, 1.5])
    at_T = equilibrium.flash_TP(flows, 371.0, 101325.0)
    assert 0.0 < at_T.vapor_fraction < 1.0
    assert np.all(at_T.vapor_flows >= 0.0) and np.all(at_T.liquid_flows >= 0.0)
    H = equilibrium.enthalpy_flow(at_T)
    assert equilibrium.flash_PH(flows, 101325.0, H, 300.0).T == pytest.approx(371.0, abs=1e-6)
    back = equilibrium.flash_PV(flows, 101325.0, at_T.vapor_fraction, 400.0)
    assert back.T == pytest.approx(371.0, abs=1e-6)


def test_henry_law_keeps_light_gases_out_of_liquid_ammonia():
    # Henry constants in water (Sander 2015 via thermo) for hydrogen, nitrogen, argon:
    # K = H/P far above 1 at 150 bar, so the liquid is almost all ammonia.
    equilibrium = _equilibrium(["hydrogen", "nitrogen", "ammonia", "argon"])
    result = equilibrium.flash_TP(np.array([0.6, 0.2, 0.15, 0.05]), 263.15, 151e5)
    assert result.K[[0, 1, 3]].min() > 100.0
    assert result.liquid_flows[2] / result.liquid_flows.sum() > 0.99
    assert "Sander" in equilibrium.data[0].henry_source


def test_component_without_vapor_pressure_data_is_refused():
    with pytest.raises(InputError, match="vapor_pressure"):
        vapor_pressure_data("my oil", "", 700.0)


def test_dew_point_of_a_drum_vapor_is_the_drum_temperature():
    # regression: the ethylene hydration drum's vapor sits at its dew point, where
    # 1 - sum z/K was -3e-11 by one formula and positive by another, so scipy's brentq
    # got no sign change; the phase test now uses the residual the search calls.
    from pathlib import Path

    from model.case.file import load_case
    from model.properties.property_method import equilibrium_for

    examples = Path(__file__).resolve().parents[3] / "examples"
    solution = load_case(examples / "ethylene_hydration_two_recycles.loop.json").solve()
    gas = solution.streams["Recycle gas"]
    dew = equilibrium_for(solution.basis).dew_point(gas.flows, gas.P, gas.T)
    assert dew == pytest.approx(313.15, rel=1e-9)
