"""Reactor and separator outlets flashed to equilibrium ("equilibrium" outlet phase).

Reference: thermo's ideal ``FlashVL`` (ideal gas, ideal liquid, the same Antoine table;
tests/model/properties/test_phase_equilibrium.py) at the outlet's T and P: 1e-6
relative in the vapor fraction and the vapor composition. The reaction is an invented
example: n-butane isomerised to isobutane at a stated conversion, the outlet between
the two boiling points at 1 atm (both below their critical temperatures there).
"""

from __future__ import annotations

import numpy as np
import pytest

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity
from model.properties.components import lookup_component
from tests.model.blocks.test_heater_two_phase import P_ATM, _solved
from tests.model.properties.test_phase_equilibrium import _thermo_flasher

NAMES = ["n-butane", "isobutane"]
ISOMERISATION = Reaction({"n-butane": -1, "isobutane": 1}, "n-butane", 0.5, "isomerisation")


def _reactor(specs: dict) -> Flowsheet:
    sheet = Flowsheet()
    for name in NAMES:
        sheet.add_component(lookup_component(name))
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts({"n-butane": 1.0}, "mol/s"),
            "T": TypedQuantity(300.0, "K"),
            "P": TypedQuantity(P_ATM, "Pa"),
            "phase": "vapor",
        },
    )
    sheet.add_block("Reactor", "R", specs={"reactions": [ISOMERISATION], **specs})
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "R", "in", "feed")
    sheet.connect("R", "out", "P", "in", "out")
    return sheet


def _check_against_thermo(state) -> None:
    z = (state.flows / state.flows.sum()).tolist()
    reference = _thermo_flasher(NAMES).flash(T=state.T, P=state.P, zs=z)
    assert 0.0 < reference.VF < 1.0  # the point tested is two-phase
    assert state.two_phase and state.vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    y = state.vapor_flows / state.vapor_flows.sum()
    assert y == pytest.approx(np.array(reference.gas.zs), rel=1e-6)


def test_reactor_outlet_at_its_temperature_is_thermos_flash_and_its_duty_gives_it_back():
    by_T = _solved(
        _reactor(
            {"mode": "outlet temperature", "T": TypedQuantity(267.0, "K"), "phase": "equilibrium"}
        )
    )
    out = by_T.streams["out"]
    # conversion 0.5 of 1 mol/s n-butane (stoichiometry)
    assert out.flows == pytest.approx([0.5, 0.5], rel=1e-12)
    _check_against_thermo(out)
    assert by_T.balance.energy_closure < 1e-9
    duty = by_T.blocks["R"].duty_W
    by_duty = _solved(
        _reactor({"mode": "duty", "duty": TypedQuantity(duty, "W"), "phase": "equilibrium"})
    )
    assert by_duty.streams["out"].T == pytest.approx(267.0, rel=1e-6)
    assert by_duty.streams["out"].vapor_fraction() == pytest.approx(out.vapor_fraction(), rel=1e-6)


def test_separator_outlet_flashed_at_its_temperature_matches_thermo():
    sheet = Flowsheet()
    for name in ("benzene", "toluene"):
        sheet.add_component(lookup_component(name))
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts({"benzene": 0.4, "toluene": 0.6}, "mol/s"),
            "T": TypedQuantity(300.0, "K"),
            "P": TypedQuantity(P_ATM, "Pa"),
            "phase": "liquid",
        },
    )
    sheet.add_block(
        "Separator",
        "S",
        specs={
            "split": ComponentAmounts({"benzene": 0.5, "toluene": 0.5}, "fraction to first outlet"),
            "T1": TypedQuantity(371.0, "K"),
            "phase1": "equilibrium",
            "phase2": "liquid",
        },
    )
    sheet.add_block("Product", "A")
    sheet.add_block("Product", "B")
    sheet.connect("F", "out", "S", "in", "feed")
    sheet.connect("S", "out1", "A", "in", "first")
    sheet.connect("S", "out2", "B", "in", "second")
    solution = _solved(sheet)
    first = solution.streams["first"]
    reference = _thermo_flasher(["benzene", "toluene"]).flash(T=371.0, P=P_ATM, zs=[0.4, 0.6])
    assert 0.0 < reference.VF < 1.0
    assert first.vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    assert solution.blocks["S"].values["out1 vapor fraction"][0] == pytest.approx(
        reference.VF, rel=1e-6
    )
    assert solution.streams["second"].phase == "liquid"
    assert solution.balance.energy_closure < 1e-9
