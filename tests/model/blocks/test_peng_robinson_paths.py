"""Peng-Robinson on the loop's flash drum and on the heater and exchanger "equilibrium"
outlets, against thermo's PR flash set up separately in the test
(tests/model/properties/test_peng_robinson.py ``_reference_flasher``: ``FlashVL`` with
``PRMIX``, chemicals' Tc, Pc and omega, thermo's ChemSep PR kij); 1e-6 relative, both
solving the same equations to far tighter tolerances.

The ammonia loop's drum (-10 degC, 151 bar): thermo finds two phases, a liquid of
97.6 % ammonia (2.9e-5 m3/mol) and a gas of 1.5e-4 m3/mol (75 kg/m3), but names both
"liquid" (its phase label "LL"); the vapor is the phase of the larger molar volume.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from model.case.file import load_case
from model.flowsheet.spec_values import TypedQuantity
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.property_method import equilibrium_for
from model.solve.driver import solve_flowsheet
from tests.model.blocks.test_heater_two_phase import _exchanger, _heater
from tests.model.properties.test_peng_robinson import _reference_flasher

thermo = pytest.importorskip("thermo")
EXAMPLES = Path(__file__).resolve().parents[3] / "examples"
LOOP = ["hydrogen", "nitrogen", "ammonia", "argon"]
# the drum feed of the ideal ammonia example (mole fractions, 4 digits are enough here)
DRUM_FEED = [0.5909, 0.1961, 0.1471, 0.0659]
DRUM_T, DRUM_P = 263.15, 151.01325e5


def _lighter_and_heavier(state):
    """thermo's two phases, the lighter (vapor) first, with their phase fractions."""
    phases = list(zip(state.betas, state.phases, strict=True))
    phases.sort(key=lambda item: -item[1].V())  # molar volume, m3/mol
    return phases


def test_ammonia_loop_drum_condition_matches_thermo_set_up_separately():
    components = [lookup_component(name) for name in LOOP]
    ours = equilibrium_for(PropertyBasis(components, "Peng-Robinson")).flash_TP(
        np.array(DRUM_FEED), DRUM_T, DRUM_P
    )
    reference = _reference_flasher([c.cas for c in components]).flash(
        T=DRUM_T, P=DRUM_P, zs=DRUM_FEED
    )
    assert reference.phase_count == 2
    (beta_vapor, vapor), (_, liquid) = _lighter_and_heavier(reference)
    assert vapor.V() > 4.0 * liquid.V()  # a gas (1.5e-4 m3/mol) and a liquid (2.9e-5)
    assert ours.phase == "two-phase"
    assert ours.vapor_fraction == pytest.approx(beta_vapor, rel=1e-6)
    y = ours.vapor_flows / ours.vapor_flows.sum()
    x = ours.liquid_flows / ours.liquid_flows.sum()
    assert y == pytest.approx(np.array(vapor.zs), rel=1e-6)
    assert x == pytest.approx(np.array(liquid.zs), rel=1e-6)
    assert x[LOOP.index("ammonia")] > 0.95


def test_ammonia_example_solves_by_peng_robinson_with_a_two_phase_drum():
    case = load_case(EXAMPLES / "ammonia_synthesis_loop.loop.json")
    case.flowsheet.set_property_method("Peng-Robinson")
    solution = case.solve()
    assert solution.converged, solution.message
    assert solution.balance.closes
    liquid = solution.streams["Ammonia"]
    feed = solution.streams["Cooled effluent"]
    reference = _reference_flasher([c.cas for c in case.flowsheet.components]).flash(
        T=feed.T, P=feed.P, zs=(feed.flows / feed.flows.sum()).tolist()
    )
    _, (beta_liquid, phase) = _lighter_and_heavier(reference)
    assert liquid.flows.sum() == pytest.approx(beta_liquid * feed.flows.sum(), rel=1e-6)
    assert liquid.flows / liquid.flows.sum() == pytest.approx(np.array(phase.zs), rel=1e-6)


def test_heater_equilibrium_outlet_by_peng_robinson_matches_thermo():
    sheet = _heater(
        {"mode": "outlet temperature", "T": TypedQuantity(230.0, "K")},
        {"methane": 0.5, "ethane": 0.3, "propane": 0.2},
    )
    _set_feed(sheet, P_bar=30.0, phase="vapor")
    sheet.set_property_method("Peng-Robinson")
    solution = solve_flowsheet(sheet)
    assert solution.converged, solution.message
    out = solution.streams["out"]
    cas = [c.cas for c in sheet.components]
    reference = _reference_flasher(cas).flash(T=230.0, P=30e5, zs=[0.5, 0.3, 0.2])
    assert 0.0 < reference.VF < 1.0
    assert out.two_phase and out.vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    y = out.vapor_flows / out.vapor_flows.sum()
    assert y == pytest.approx(np.array(reference.gas.zs), rel=1e-6)
    # the duty of that run gives back its temperature (our enthalpy, PR's split)
    by_duty = _heater(
        {"mode": "duty", "duty": TypedQuantity(solution.blocks["H"].duty_W, "W")},
        {"methane": 0.5, "ethane": 0.3, "propane": 0.2},
    )
    _set_feed(by_duty, P_bar=30.0, phase="vapor")
    by_duty.set_property_method("Peng-Robinson")
    again = solve_flowsheet(by_duty)
    assert again.converged, again.message
    assert again.streams["out"].T == pytest.approx(230.0, rel=1e-6)
    assert again.streams["out"].vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)


def test_exchanger_equilibrium_cold_side_by_peng_robinson_matches_thermo():
    sheet = _exchanger({"cold_T": TypedQuantity(355.0, "K")})
    sheet.set_property_method("Peng-Robinson")
    solution = solve_flowsheet(sheet)
    assert solution.converged, solution.message
    cold = solution.streams["cold out"]
    cas = [c.cas for c in sheet.components]
    reference = _reference_flasher(cas).flash(T=355.0, P=101325.0, zs=[0.5, 0.5])
    assert reference.phase_count == 2  # the point tested is two-phase
    (beta_vapor, vapor), _ = _lighter_and_heavier(reference)
    assert cold.two_phase and cold.vapor_fraction() == pytest.approx(beta_vapor, rel=1e-6)
    y = cold.vapor_flows / cold.vapor_flows.sum()
    assert y == pytest.approx(np.array(vapor.zs), rel=1e-6)


def _set_feed(sheet, P_bar: float, phase: str) -> None:
    sheet.set_spec("F", "P", TypedQuantity(P_bar, "bar"))
    sheet.set_spec("F", "phase", phase)


def test_drum_feed_by_peng_robinson_has_a_dew_point_and_no_bubble_point_found():
    # thermo's P-VF flash at VF 1 (set up in the test) gives the dew point, 1e-6 rel.;
    # at VF 0 it returns that same point with the feed as its gas, which is no bubble
    # point: thermo's TP flash still finds gas at 150 K, so none lies near the drum
    components = [lookup_component(name) for name in LOOP]
    equilibrium = equilibrium_for(PropertyBasis(components, "Peng-Robinson"))
    flasher = _reference_flasher([c.cas for c in components])
    z = np.array(DRUM_FEED)
    dew = flasher.flash(P=DRUM_P, VF=1.0, zs=DRUM_FEED).T
    assert equilibrium.dew_point(z, DRUM_P, DRUM_T) == pytest.approx(dew, rel=1e-6)
    cold = flasher.flash(T=150.0, P=DRUM_P, zs=DRUM_FEED)
    assert cold.phase_count == 2 and _lighter_and_heavier(cold)[0][0] > 0.5
    bubble = equilibrium.saturation(z, DRUM_P, 0.0, DRUM_T)
    assert bubble.T is None and bubble.reason == "none found by thermo's Peng-Robinson flash"
