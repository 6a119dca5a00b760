"""A mixer whose outlet phase is "equilibrium": the PH flash of the mixed inlets at the
outlet pressure; two-phase inlets are accepted.

References: thermo's ideal ``FlashVL`` (ideal gas, ideal liquid, the same Antoine table,
tests/model/properties/test_phase_equilibrium.py) at the outlet's T and P: 1e-6 relative
in the vapor fraction and the vapor composition (both solve the same equations to far
tighter tolerances). Adiabatic mixing of two parts of one stream gives that stream's
state back (a conservation fact).
"""

from __future__ import annotations

import numpy as np
import pytest

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.properties.components import lookup_component
from model.solve.driver import solve_flowsheet
from tests.model.blocks.test_heater_two_phase import P_ATM, _heater, _solved, _split
from tests.model.properties.test_phase_equilibrium import _thermo_flasher

NAMES = ["water", "methanol"]


def test_mixer_fed_two_phase_streams_flashes_them_back_to_their_state():
    sheet = _split(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    sheet.add_block("Mixer", "M", specs={"phase": "equilibrium"})
    sheet.add_block("Product", "P")
    sheet.connect("S", "out1", "M", "in1", "a")
    sheet.connect("S", "out2", "M", "in2", "b")
    sheet.connect("M", "out", "P", "in", "mixed")
    solution = _solved(sheet)
    mixed, heated = solution.streams["mixed"], solution.streams["out"]
    reference = _thermo_flasher(NAMES).flash(T=355.0, P=P_ATM, zs=[0.5, 0.5])
    assert mixed.T == pytest.approx(355.0, rel=1e-9)  # the search's 1e-9 K
    assert mixed.two_phase
    assert mixed.vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    assert mixed.vapor_flows == pytest.approx(heated.vapor_flows, rel=1e-6)
    assert solution.blocks["M"].values["vapor fraction"][0] == pytest.approx(reference.VF, rel=1e-6)
    assert solution.balance.energy_closure < 1e-9


def _hot_vapor_and_cold_liquid(phase: str) -> Flowsheet:
    sheet = Flowsheet()
    for name in NAMES:
        sheet.add_component(lookup_component(name))
    for name, T, feed_phase in (("V", 400.0, "vapor"), ("L", 300.0, "liquid")):
        sheet.add_block(
            "Feed",
            name,
            specs={
                "flows": ComponentAmounts({"water": 0.5, "methanol": 0.5}, "mol/s"),
                "T": TypedQuantity(T, "K"),
                "P": TypedQuantity(P_ATM, "Pa"),
                "phase": feed_phase,
            },
        )
    sheet.add_block("Mixer", "M", specs={"phase": phase})
    sheet.add_block("Product", "P")
    sheet.connect("V", "out", "M", "in1", "vapor in")
    sheet.connect("L", "out", "M", "in2", "liquid in")
    sheet.connect("M", "out", "P", "in", "mixed")
    return sheet


def test_mixing_a_hot_vapor_into_a_cold_liquid_gives_thermos_flash_at_the_outlet():
    solution = _solved(_hot_vapor_and_cold_liquid("equilibrium"))
    mixed = solution.streams["mixed"]
    reference = _thermo_flasher(NAMES).flash(T=mixed.T, P=P_ATM, zs=[0.5, 0.5])
    assert 0.0 < reference.VF < 1.0  # the point tested is two-phase
    assert mixed.vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    y = mixed.vapor_flows / mixed.vapor_flows.sum()
    assert y == pytest.approx(np.array(reference.gas.zs), rel=1e-6)
    # adiabatic: the outlet carries the inlets' enthalpy (no duty on a mixer)
    basis = solution.basis
    h_in = sum(solution.streams[n].enthalpy_flow(basis) for n in ("vapor in", "liquid in"))
    assert mixed.enthalpy_flow(basis) == pytest.approx(h_in, rel=1e-9)
    assert solution.balance.energy_closure < 1e-9
    # a named phase keeps the old behaviour: one phase, its T from the enthalpy
    liquid = _solved(_hot_vapor_and_cold_liquid("liquid")).streams["mixed"]
    assert liquid.phase == "liquid" and liquid.T > mixed.T


def test_as_inlet_with_a_two_phase_inlet_asks_for_a_phase_naming_equilibrium():
    sheet = _split(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    sheet.add_block("Mixer", "M")
    sheet.add_block("Product", "P")
    sheet.connect("S", "out1", "M", "in1", "a")
    sheet.connect("S", "out2", "M", "in2", "b")
    sheet.connect("M", "out", "P", "in", "mixed")
    solution = solve_flowsheet(sheet)
    assert not solution.converged
    assert "M" in solution.message and "equilibrium" in solution.message
