"""Peng-Robinson through thermo: checked against thermo set up separately in the test
and against CoolProp saturation for a pure fluid.

- methane-ethane-propane at 230 K, 30 bar: thermo ``FlashVL`` with ``PRMIX`` built
  here from chemicals' constants (Tc, Pc, omega by CAS) and the ChemSep PR kij;
  1e-6 relative in the vapor fraction and compositions. (Our critical constants are the
  components' own, from the same chemicals defaults, so the two set-ups agree.)
- pure propane: the PR bubble point at 10 bar against CoolProp's saturation
  temperature (its reference equation of state); Peng-Robinson reproduces the vapor
  pressure of light hydrocarbons to about 1-2 % in pressure, about 1 K here.
"""

from __future__ import annotations

import numpy as np
import pytest

from model.flowsheet.spec_values import TypedQuantity
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.property_method import equilibrium_for
from model.solve.driver import solve_flowsheet

thermo = pytest.importorskip("thermo")
CoolProp = pytest.importorskip("CoolProp.CoolProp")
NAMES = ["methane", "ethane", "propane"]


def _reference_flasher(cas: list[str]):
    from chemicals.acentric import omega
    from chemicals.critical import Pc, Tc
    from thermo import CEOSGas, CEOSLiquid, ChemicalConstantsPackage, FlashVL
    from thermo.eos_mix import PRMIX
    from thermo.interaction_parameters import IPDB

    Tcs, Pcs, omegas = [Tc(c) for c in cas], [Pc(c) for c in cas], [omega(c) for c in cas]
    kijs = IPDB.get_ip_asymmetric_matrix("ChemSep PR", cas, "kij")
    constants = ChemicalConstantsPackage(Tcs=Tcs, Pcs=Pcs, omegas=omegas, MWs=[1.0] * len(cas))
    eos = {"Tcs": Tcs, "Pcs": Pcs, "omegas": omegas, "kijs": kijs}
    return FlashVL(
        constants,
        None,
        liquid=CEOSLiquid(PRMIX, eos_kwargs=eos),
        gas=CEOSGas(PRMIX, eos_kwargs=eos),
    )


def test_methane_ethane_propane_flash_matches_thermo_set_up_separately():
    components = [lookup_component(name) for name in NAMES]
    basis = PropertyBasis(components, "Peng-Robinson")
    equilibrium = equilibrium_for(basis)
    z = np.array([0.5, 0.3, 0.2])
    ours = equilibrium.flash_TP(z, 230.0, 30e5)
    reference = _reference_flasher([c.cas for c in components]).flash(
        T=230.0, P=30e5, zs=z.tolist()
    )
    assert 0.0 < reference.VF < 1.0
    assert ours.vapor_fraction == pytest.approx(reference.VF, rel=1e-6)
    vapor = ours.vapor_flows / ours.vapor_flows.sum()
    assert vapor == pytest.approx(np.array(reference.gas.zs), rel=1e-6)
    assert equilibrium.kijs[0][2] != 0.0  # ChemSep has methane-propane


def test_pure_propane_bubble_point_near_coolprop_saturation():
    # CoolProp PropsSI('T','P',1e6,'Q',0,'Propane'); 1.5 K for PR's vapor-pressure error
    basis = PropertyBasis([lookup_component("propane")], "Peng-Robinson")
    bubble = equilibrium_for(basis).bubble_point(np.array([1.0]), 1e6, 290.0)
    assert bubble == pytest.approx(CoolProp.PropsSI("T", "P", 1e6, "Q", 0, "Propane"), abs=1.5)


def test_flash_drum_solves_by_peng_robinson_when_the_case_chooses_it():
    from tests.model.blocks.test_flash_drum import _drum

    flows = {"methane": 0.5, "ethane": 0.3, "propane": 0.2}
    specs = {"mode": "temperature", "T": TypedQuantity(230, "K")}
    sheet = _drum(specs, T_feed=230.0, phase="vapor", flows=flows, P_bar=30.0)
    sheet.set_property_method("Peng-Robinson")
    solution = solve_flowsheet(sheet)
    assert solution.converged, solution.message
    cas = [lookup_component(n).cas for n in NAMES]
    reference = _reference_flasher(cas).flash(T=230.0, P=30e5, zs=[0.5, 0.3, 0.2])
    assert solution.streams["vapor"].flows.sum() == pytest.approx(reference.VF, rel=1e-6)
