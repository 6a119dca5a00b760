"""A heater whose outlet phase is "equilibrium": the outlet is the case's flash.

References: thermo ``FlashVL`` with an ideal gas and an ideal liquid whose vapor
pressures use the same Antoine table (ANTOINE_POLING), set up in
tests/model/properties/test_phase_equilibrium.py (1e-6 relative: both solve the same
equations to far tighter tolerances); CoolProp's saturation temperature of water.
"""

from __future__ import annotations

import numpy as np
import pytest

from model.case.document import Case
from model.case.file import CaseFileError, case_from_json, case_to_json
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.properties.components import lookup_component
from model.solve.driver import solve_flowsheet
from model.validation.validate import validate_flowsheet
from tests.model.properties.test_phase_equilibrium import _thermo_flasher

P_ATM = 101325.0
MIXTURE = {"water": 0.5, "methanol": 0.5}


def _heater(specs: dict, flows: dict[str, float] = MIXTURE) -> Flowsheet:
    """Feed (liquid, 300 K, 1 atm) -> heater H -> product; streams "feed" and "out"."""
    sheet = Flowsheet()
    for name in flows:
        sheet.add_component(lookup_component(name))
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts(flows, "mol/s"),
            "T": TypedQuantity(300.0, "K"),
            "P": TypedQuantity(P_ATM, "Pa"),
            "phase": "liquid",
        },
    )
    sheet.add_block("Heater", "H", specs={"phase": "equilibrium", **specs})
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "H", "in", "feed")
    sheet.connect("H", "out", "P", "in", "out")
    return sheet


def _solved(sheet: Flowsheet):
    solution = solve_flowsheet(sheet)
    assert solution.converged, solution.message
    return solution


def test_heater_into_the_two_phase_region_matches_thermo_and_closes():
    solution = _solved(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    out = solution.streams["out"]
    reference = _thermo_flasher(["water", "methanol"]).flash(T=355.0, P=P_ATM, zs=[0.5, 0.5])
    assert 0.0 < reference.VF < 1.0  # the point tested is two-phase
    assert out.two_phase and out.phase == "two-phase"
    assert out.vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    vapor_y = out.vapor_flows / out.vapor_flows.sum()
    liquid_x = out.liquid_flows / out.liquid_flows.sum()
    assert vapor_y == pytest.approx(np.array(reference.gas.zs), rel=1e-6)
    assert liquid_x == pytest.approx(np.array(reference.liquid0.zs), rel=1e-6)
    result = solution.blocks["H"]
    assert result.values["vapor fraction"][0] == pytest.approx(reference.VF, rel=1e-6)
    # energy balance: duty = H_out - H_in (both phases of the outlet)
    basis = solution.basis
    h_in = solution.streams["feed"].enthalpy_flow(basis)
    assert result.duty_W == pytest.approx(out.enthalpy_flow(basis) - h_in, rel=1e-9)
    assert solution.balance.energy_closure < 1e-9


def test_duty_of_the_temperature_run_gives_back_its_temperature():
    by_T = _solved(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    duty = by_T.blocks["H"].duty_W
    by_duty = _solved(_heater({"mode": "duty", "duty": TypedQuantity(duty, "W")}))
    out = by_duty.streams["out"]
    # the search stops within 1e-9 K: 1e-6 relative is loose for it, tight for the user
    assert out.T == pytest.approx(355.0, rel=1e-6)
    assert out.vapor_fraction() == pytest.approx(by_T.streams["out"].vapor_fraction(), rel=1e-6)
    assert by_duty.blocks["H"].values["temperature"][0] == pytest.approx(355.0, rel=1e-6)
    assert by_duty.balance.energy_closure < 1e-9


@pytest.mark.parametrize("T", [320.0, 380.0])
def test_outside_the_two_phase_region_the_outlet_is_one_phase(T):
    solution = _solved(_heater({"mode": "outlet temperature", "T": TypedQuantity(T, "K")}))
    out = solution.streams["out"]
    reference = _thermo_flasher(["water", "methanol"]).flash(T=T, P=P_ATM, zs=[0.5, 0.5])
    expected = "liquid" if reference.VF == 0.0 else "vapor"
    assert reference.VF in (0.0, 1.0)
    assert out.phase == expected and not out.two_phase


def test_pure_water_in_duty_mode_boils_at_its_saturation_temperature():
    from CoolProp.CoolProp import PropsSI

    flows = {"water": 1.0}
    # heat the liquid to a vapor fraction of about a third: the duty lies between the
    # bubble and the dew enthalpies, so the answer is on the latent-heat jump
    bubble = _solved(_heater({"mode": "outlet temperature", "T": TypedQuantity(373.0, "K")}, flows))
    duty = bubble.blocks["H"].duty_W + 15000.0  # 15 kJ/mol of a ~40 kJ/mol latent heat
    solution = _solved(_heater({"mode": "duty", "duty": TypedQuantity(duty, "W")}, flows))
    out = solution.streams["out"]
    assert out.two_phase and 0.2 < out.vapor_fraction() < 0.6
    # thermo's ideal flash of water at 1 atm (same Antoine table): 1e-6 relative
    reference = _thermo_flasher(["water", "water"]).flash(P=P_ATM, VF=0.5, zs=[0.5, 0.5]).T
    assert out.T == pytest.approx(reference, rel=1e-6)
    # CoolProp (IAPWS-95): 373.124 K. Poling's Antoine constants for water give about
    # 373.23 K at 1 atm: their fit over their range is off by ~0.1 K here, so 0.2 K.
    assert out.T == pytest.approx(PropsSI("T", "P", P_ATM, "Q", 0, "Water"), abs=0.2)
    assert solution.balance.energy_closure < 1e-9
    # the latent heat the lever rule used: vapor share of the duty beyond the bubble point
    basis = solution.basis
    latent = basis.stream_enthalpy_flow(np.array([1.0]), out.T, False) - (
        basis.stream_enthalpy_flow(np.array([1.0]), out.T, True)
    )
    assert out.vapor_fraction() == pytest.approx(
        (out.enthalpy_flow(basis) - basis.stream_enthalpy_flow(np.array([1.0]), out.T, True))
        / latent,
        rel=1e-9,
    )


def test_a_duty_beyond_reach_fails_naming_the_block():
    solution = solve_flowsheet(_heater({"mode": "duty", "duty": TypedQuantity(1e12, "W")}))
    assert not solution.converged
    assert "H" in solution.message and "duty" in solution.message


def test_a_bad_phase_choice_is_refused_naming_block_field_and_value():
    sheet = _heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")})
    sheet.block("H").specs["phase"] = "boiling"  # as a case file could hold it
    errors = [i for i in validate_flowsheet(sheet) if i.is_error]
    assert errors and errors[0].block == "H" and errors[0].field == "phase"
    assert "boiling" in errors[0].message and "equilibrium" in errors[0].message
    assert solve_flowsheet(sheet).status == "needs input"


def test_the_choice_is_kept_by_the_case_file():
    sheet = _heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")})
    text = case_to_json(Case(sheet))
    assert '"phase": "equilibrium"' in text
    again = case_from_json(text)
    assert again.flowsheet.block("H").specs["phase"] == "equilibrium"
    bad = text.replace('"phase": "equilibrium"', '"phase": "boiling"')
    with pytest.raises(CaseFileError, match="boiling"):
        case_from_json(bad)


def _split(sheet: Flowsheet) -> Flowsheet:
    """H's outlet "out" -> splitter S (a quarter to "a", the rest to "b")."""
    sheet.remove_block("P")
    sheet.add_block("Splitter", "S", specs={"fractions": {"out1": 0.25}})
    sheet.connect("H", "out", "S", "in", "out")
    return sheet


def test_a_two_phase_outlet_splits_in_proportion():
    sheet = _split(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    sheet.add_block("Product", "P1")
    sheet.add_block("Product", "P2")
    sheet.connect("S", "out1", "P1", "in", "a")
    sheet.connect("S", "out2", "P2", "in", "b")
    solution = _solved(sheet)
    a, out = solution.streams["a"], solution.streams["out"]
    assert a.two_phase and a.vapor_flows == pytest.approx(0.25 * out.vapor_flows, rel=1e-12)
    assert solution.balance.energy_closure < 1e-9


def test_a_mixer_keeping_a_two_phase_inlet_phase_fails_naming_block_and_field():
    sheet = _split(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    sheet.add_block("Mixer", "M")
    sheet.add_block("Product", "P")
    sheet.connect("S", "out1", "M", "in1", "a")
    sheet.connect("S", "out2", "M", "in2", "b")
    sheet.connect("M", "out", "P", "in", "mixed")
    solution = solve_flowsheet(sheet)
    assert not solution.converged
    assert "M" in solution.message and "phase" in solution.message
    assert "two-phase" in solution.message
    sheet.block("M").specs["phase"] = "liquid"  # a named phase: the mixer runs
    assert _solved(sheet).balance.energy_closure < 1e-9


def test_a_heater_keeping_a_two_phase_inlet_phase_flashes_it():
    sheet = _heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")})
    sheet.remove_block("P")
    sheet.add_block("Heater", "H2", specs={"T": TypedQuantity(356.0, "K")})
    sheet.add_block("Product", "P")
    sheet.connect("H", "out", "H2", "in", "out")
    sheet.connect("H2", "out", "P", "in", "out2")
    solution = _solved(sheet)
    reference = _thermo_flasher(["water", "methanol"]).flash(T=356.0, P=P_ATM, zs=[0.5, 0.5])
    assert solution.streams["out2"].vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    assert solution.balance.energy_closure < 1e-9


def test_a_two_phase_tear_stream_converges_to_the_once_through_answer():
    # feed -> mixer M (liquid) -> heater H (equilibrium, 355 K) -> splitter S, half back
    # to M: the tear carries only flows, T and P, and its phases come back by the flash
    once = _solved(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    sheet = _heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")})
    sheet.remove_block("P")
    sheet.remove_block("H")
    sheet.add_block("Mixer", "M", specs={"phase": "liquid"})
    sheet.add_block("Heater", "H", specs={"phase": "equilibrium", "T": TypedQuantity(355.0, "K")})
    sheet.add_block("Splitter", "S", specs={"fractions": {"out1": 0.5}})
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "M", "in1", "feed")
    sheet.connect("M", "out", "H", "in", "mixed")
    sheet.connect("H", "out", "S", "in", "hot")
    sheet.connect("S", "out1", "M", "in2", "recycle")
    sheet.connect("S", "out2", "P", "in", "product")
    solution = _solved(sheet)
    # at steady state the heater does what the once-through heater does (same feed in,
    # same state out); 1e-6: the recycle converges to 1e-8
    assert solution.blocks["H"].duty_W == pytest.approx(once.blocks["H"].duty_W, rel=1e-6)
    reference = _thermo_flasher(["water", "methanol"]).flash(T=355.0, P=P_ATM, zs=[0.5, 0.5])
    assert solution.streams["product"].vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    assert solution.balance.energy_closure < 1e-9


def _exchanger(specs: dict) -> Flowsheet:
    """Hot water/methanol vapor (10 mol/s, 420 K, kept vapor) against the 300 K liquid
    feed of ``_heater``; the cold outlet phase is "equilibrium"."""
    sheet = Flowsheet()
    for name in MIXTURE:
        sheet.add_component(lookup_component(name))
    for name, T, phase in (("C", 300.0, "liquid"), ("W", 420.0, "vapor")):
        sheet.add_block(
            "Feed",
            name,
            specs={
                "flows": ComponentAmounts({"water": 5.0, "methanol": 5.0}, "mol/s")
                if name == "W"
                else ComponentAmounts(MIXTURE, "mol/s"),
                "T": TypedQuantity(T, "K"),
                "P": TypedQuantity(P_ATM, "Pa"),
                "phase": phase,
            },
        )
    sheet.add_block("Exchanger", "X", specs={"cold_phase": "equilibrium", **specs})
    sheet.add_block("Product", "PH")
    sheet.add_block("Product", "PC")
    sheet.connect("W", "out", "X", "hot_in", "hot")
    sheet.connect("C", "out", "X", "cold_in", "cold")
    sheet.connect("X", "hot_out", "PH", "in", "hot out")
    sheet.connect("X", "cold_out", "PC", "in", "cold out")
    return sheet


def test_exchanger_cold_side_boils_to_thermo_and_back_from_its_duty():
    by_T = _solved(_exchanger({"cold_T": TypedQuantity(355.0, "K")}))
    cold = by_T.streams["cold out"]
    reference = _thermo_flasher(["water", "methanol"]).flash(T=355.0, P=P_ATM, zs=[0.5, 0.5])
    assert cold.two_phase and cold.vapor_fraction() == pytest.approx(reference.VF, rel=1e-6)
    result = by_T.blocks["X"]
    assert result.values["cold outlet vapor fraction"][0] == pytest.approx(reference.VF, rel=1e-6)
    # the cold side takes what a heater to the same state takes (duty = H_out - H_in)
    heater = _solved(_heater({"mode": "outlet temperature", "T": TypedQuantity(355.0, "K")}))
    assert result.duty_W == pytest.approx(heater.blocks["H"].duty_W, rel=1e-9)
    assert by_T.balance.energy_closure < 1e-9
    # the cold side boils inside: its LMTD and UA come from the zone analysis
    # (tests/model/blocks/test_exchanger_zones.py), the end-temperature LMTD is kept beside
    assert "end-temperature LMTD" in result.values and "minimum internal approach" in result.values
    assert result.values["LMTD"][0] != pytest.approx(result.values["end-temperature LMTD"][0])
    by_duty = _solved(_exchanger({"mode": "duty", "duty": TypedQuantity(result.duty_W, "W")}))
    assert by_duty.streams["cold out"].T == pytest.approx(355.0, rel=1e-6)
    assert by_duty.streams["hot out"].T == pytest.approx(by_T.streams["hot out"].T, rel=1e-6)
