"""Feed, Mixer, Splitter, Separator and Heater, each solved in a one-block flowsheet.

Reference enthalpies come from Cantera (nasa_gas.yaml: NASA Glenn polynomials, McBride,
Zehe & Gordon, NASA/TP-2002-211556) and CoolProp (IAPWS-95 for water), recomputed here;
tolerances are those of CHECKS.md for sensible enthalpy (0.2 %) and for the Watson
heat of vaporization against CoolProp water (1.5 %).
"""

from __future__ import annotations

from pathlib import Path

import cantera as ct
import numpy as np
import pytest

from model.case.file import load_case
from model.flowsheet.document import Flowsheet
from model.flowsheet.kinds import BLOCK_KINDS
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.properties.components import lookup_component
from model.solve.driver import solve_flowsheet
from units_of_measure import KINDS

NASA = {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}


def _nasa_h(species: str, T: float) -> float:
    """Molar enthalpy, J/mol, from nasa_gas.yaml (Cantera's unit is J/kmol)."""
    return NASA[species].thermo.h(T) / 1000.0


def _sheet(*components: str) -> Flowsheet:
    sheet = Flowsheet()
    for name in components:
        sheet.add_component(lookup_component(name))
    return sheet


def _feed(sheet, name, flows, T_K, P_bar=1.0, phase="vapor", unit="mol/s"):
    sheet.add_block(
        "Feed",
        name,
        specs={
            "flows": ComponentAmounts(flows, unit),
            "T": TypedQuantity(T_K, "K"),
            "P": TypedQuantity(P_bar, "bar"),
            "phase": phase,
        },
    )


def _through(sheet, kind, specs, feeds=("F",), products=("P",)):
    """Connect feeds -> block -> products; return the solution."""
    sheet.add_block(kind, "B", specs=specs)
    inlets = sheet.block("B").block_kind.inlets
    outlets = sheet.block("B").block_kind.outlets
    for k, feed in enumerate(feeds):
        port = f"in{k + 1}" if kind == "Mixer" else inlets[k]
        sheet.connect(feed, "out", "B", port, f"{feed}>B")
    for k, product in enumerate(products):
        sheet.add_block("Product", product)
        port = f"out{k + 1}" if kind == "Splitter" else outlets[k]
        sheet.connect("B", port, product, "in", f"B>{product}")
    solution = solve_flowsheet(sheet)
    assert solution.status == "solved", solution.message
    return solution


def test_feed_in_mass_units_and_by_total_and_mass_fractions():
    # 1 kmol/h = 1/3.6 mol/s; water 18.01528 g/mol (chemicals, IUPAC atomic weights)
    sheet = _sheet("water", "methanol")
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "basis": "total and fractions",
            "total_flow": TypedQuantity(100.0, "kg/h"),
            "composition": ComponentAmounts({"water": 0.5, "methanol": 0.5}, "mass fraction"),
            "T": TypedQuantity(25.0, "degC"),
            "P": TypedQuantity(0.0, "barg"),
            "phase": "liquid",
        },
    )
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "P", "in", "S")
    solution = solve_flowsheet(sheet)
    stream = solution.streams["S"]
    masses = stream.flows * solution.basis.molar_mass * 3600.0  # kg/h
    assert masses == pytest.approx([50.0, 50.0], rel=1e-12)
    assert stream.T == pytest.approx(298.15) and stream.P == pytest.approx(101325.0)
    assert stream.phase == "liquid"


def test_mixer_outlet_temperature_matches_cantera_mixing_by_enthalpy():
    sheet = _sheet("nitrogen", "oxygen")
    _feed(sheet, "F1", {"nitrogen": 1.0}, 300.0, 2.0)
    _feed(sheet, "F2", {"oxygen": 3.0}, 700.0, 1.5)
    solution = _through(sheet, "Mixer", {}, feeds=("F1", "F2"))
    out = solution.streams["B>P"]
    # Reference: the same adiabatic mixing with Cantera's gri30 (ideal gas, NASA data).
    gas = ct.Solution("gri30.yaml")
    gas.TPX = 300.0, 2e5, "N2:1"
    h1 = gas.enthalpy_mole
    gas.TPX = 700.0, 1.5e5, "O2:1"
    h3 = gas.enthalpy_mole
    gas.TPX = 500.0, 1.5e5, "N2:1, O2:3"
    gas.HP = (h1 + 3 * h3) / 4 / gas.mean_molecular_weight, 1.5e5
    assert out.T == pytest.approx(gas.T, abs=0.5)
    assert out.flows == pytest.approx([1.0, 3.0])
    assert out.P == pytest.approx(1.5e5)  # default: lowest inlet pressure (DESIGN.md)


def test_mixer_of_one_temperature_keeps_it_exactly_and_honours_set_pressure():
    sheet = _sheet("nitrogen")
    _feed(sheet, "F1", {"nitrogen": 1.0}, 350.0)
    _feed(sheet, "F2", {"nitrogen": 2.0}, 350.0)
    out = _through(sheet, "Mixer", {"P": TypedQuantity(0.5, "bar")}, feeds=("F1", "F2")).streams[
        "B>P"
    ]
    assert out.T == 350.0 and out.P == pytest.approx(5e4)


def test_splitter_fractions_with_remainder_and_set_outlet_flow():
    sheet = _sheet("nitrogen", "argon")
    _feed(sheet, "F", {"nitrogen": 9.0, "argon": 1.0}, 300.0)
    solution = _through(sheet, "Splitter", {"fractions": {"out1": 0.02}}, products=("P1", "P2"))
    assert solution.streams["B>P1"].flows == pytest.approx([0.18, 0.02])
    assert solution.streams["B>P2"].flows == pytest.approx([8.82, 0.98])
    sheet2 = _sheet("nitrogen", "argon")
    _feed(sheet2, "F", {"nitrogen": 9.0, "argon": 1.0}, 300.0)
    solution = _through(
        sheet2,
        "Splitter",
        {"mode": "outlet flow", "flow_port": "out2", "flow": TypedQuantity(3.6, "kmol/h")},
        products=("P1", "P2"),
    )
    assert solution.streams["B>P2"].flows == pytest.approx([0.9, 0.1])  # 1 mol/s
    assert solution.blocks["B"].values["fraction to out1"][0] == pytest.approx(0.9)


def test_splitter_set_flow_above_the_inlet_is_clipped_with_a_warning():
    sheet = _sheet("nitrogen")
    _feed(sheet, "F", {"nitrogen": 1.0}, 300.0)
    solution = _through(
        sheet,
        "Splitter",
        {"mode": "outlet flow", "flow_port": "out1", "flow": TypedQuantity(2.0, "mol/s")},
        products=("P1", "P2"),
    )
    assert solution.streams["B>P2"].flows == pytest.approx([0.0])
    assert solution.streams["B>P1"].flows == pytest.approx([1.0])
    assert any("clipped to zero" in w for w in solution.blocks["B"].warnings)


def test_heater_duty_matches_nasa_sensible_enthalpy():
    sheet = _sheet("water")
    _feed(sheet, "F", {"water": 2.0}, 400.0)
    solution = _through(
        sheet,
        "Heater",
        {
            "T": TypedQuantity(900.0, "K"),
            "phase": "vapor",
            "pressure_drop": TypedQuantity(0.2, "bar"),
        },
    )
    expected = 2.0 * (_nasa_h("H2O", 900.0) - _nasa_h("H2O", 400.0))
    assert solution.blocks["B"].duty_W == pytest.approx(expected, rel=2e-3)
    assert solution.streams["B>P"].P == pytest.approx(0.8e5)


def test_heater_duty_mode_is_the_inverse_of_outlet_temperature_mode():
    sheet = _sheet("water")
    _feed(sheet, "F", {"water": 2.0}, 400.0)
    duty = 2.0 * (_nasa_h("H2O", 900.0) - _nasa_h("H2O", 400.0))
    solution = _through(sheet, "Heater", {"mode": "duty", "duty": TypedQuantity(duty, "W")})
    # NASA enthalpy through the project's Cp: the same 0.2 % as a temperature (CHECKS.md)
    assert solution.streams["B>P"].T == pytest.approx(900.0, abs=0.002 * 500.0)
    basis = solution.basis
    out = solution.streams["B>P"]
    h_in = basis.stream_enthalpy_flow(np.array([2.0]), 400.0, False)
    assert out.enthalpy_flow(basis) - h_in == pytest.approx(duty, rel=1e-10)


def test_heater_boiling_water_at_its_boiling_point_against_coolprop():
    CoolProp = pytest.importorskip("CoolProp.CoolProp")
    T_boil = CoolProp.PropsSI("T", "P", 101325, "Q", 1, "Water")
    sheet = _sheet("water")
    _feed(sheet, "F", {"water": 1.0}, T_boil, 1.01325, phase="liquid")
    solution = _through(sheet, "Heater", {"T": TypedQuantity(T_boil, "K"), "phase": "vapor"})
    # CHECKS.md: water's heat of vaporization at 1 atm, CoolProp (IAPWS-95), 0.4 %
    expected = CoolProp.PropsSI("Hmolar", "P", 101325, "Q", 1, "Water") - CoolProp.PropsSI(
        "Hmolar", "P", 101325, "Q", 0, "Water"
    )
    assert solution.blocks["B"].duty_W == pytest.approx(expected, rel=0.004)


def test_separator_split_states_and_duty():
    sheet = _sheet("water", "nitrogen")
    _feed(sheet, "F", {"water": 1.0, "nitrogen": 4.0}, 400.0, 3.0)
    solution = _through(
        sheet,
        "Separator",
        {
            "split": ComponentAmounts({"water": 0.9}, "fraction to first outlet"),
            "T1": TypedQuantity(310.0, "K"),
            "phase1": "liquid",
            "phase2": "vapor",
        },
        products=("P1", "P2"),
    )
    first, second = solution.streams["B>P1"], solution.streams["B>P2"]
    assert first.flows == pytest.approx([0.9, 0.0]) and second.flows == pytest.approx([0.1, 4.0])
    assert (first.T, first.phase, second.T, second.phase) == (310.0, "liquid", 400.0, "vapor")
    assert first.P == second.P == pytest.approx(3e5)
    basis = solution.basis
    feed = solution.streams["F>B"]
    balance = first.enthalpy_flow(basis) + second.enthalpy_flow(basis) - feed.enthalpy_flow(basis)
    assert solution.blocks["B"].duty_W == pytest.approx(balance, rel=1e-12)
    # Condensing 0.9 mol/s of steam from 400 K to liquid at 310 K: CoolProp IAPWS-95
    # (steam at 400 K, 3 bar is near ideal), within the 1.5 % of Watson vs CoolProp.
    CoolProp = pytest.importorskip("CoolProp.CoolProp")
    condense = 0.9 * (
        CoolProp.PropsSI("Hmolar", "T", 310.0, "P", 3e5, "Water")
        - CoolProp.PropsSI("Hmolar", "T", 400.0, "P", 1e3, "Water")
    )
    assert solution.blocks["B"].duty_W == pytest.approx(condense, rel=0.015)


def test_every_result_kind_of_the_solved_examples_is_a_units_of_measure_kind():
    """Each BlockResult value names a kind the unit layer can convert (or "" for numbers),
    so the details pane and reports can show it in the user's units."""
    examples = sorted((Path(__file__).resolve().parents[3] / "examples").glob("*.loop.json"))
    seen_kinds: set[str] = set()
    used: set[str] = set()
    for path in examples:
        case = load_case(path)
        solution = solve_flowsheet(case.flowsheet, method=case.method, settings=case.settings)
        assert solution.status == "solved", (path.name, solution.message)
        for name, result in solution.blocks.items():
            seen_kinds.add(case.flowsheet.block(name).kind)
            for label, (value, kind) in result.values.items():
                assert kind == "" or kind in KINDS, (path.name, name, label, kind)
                assert np.isfinite(value), (path.name, name, label)
                used.add(kind)
    assert seen_kinds == set(BLOCK_KINDS)  # the examples exercise every block kind
    assert "heat_transfer_coefficient_area" in used  # the exchanger's UA
