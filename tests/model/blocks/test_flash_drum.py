"""The flash drum block: solved in a one-block flowsheet, against thermo's ideal flash.

Reference: thermo ``FlashVL`` with an ideal gas and an ideal liquid whose vapor
pressures use the same Antoine table (ANTOINE_POLING), set up in
tests/model/properties/test_phase_equilibrium.py; 1e-6 relative in the vapor fraction.
"""

from __future__ import annotations

import numpy as np
import pytest

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.properties.components import lookup_component
from model.solve.driver import solve_flowsheet
from model.validation.validate import validate_flowsheet
from tests.model.properties.test_phase_equilibrium import _thermo_flasher

NAMES = ["benzene", "toluene"]
FLOWS = {"benzene": 0.4, "toluene": 0.6}


def _drum(
    specs: dict,
    T_feed: float = 300.0,
    phase: str = "liquid",
    flows: dict[str, float] = FLOWS,
    P_bar: float = 1.01325,
) -> Flowsheet:
    """Feed -> flash drum D -> vapor and liquid products (streams named by their port)."""
    sheet = Flowsheet()
    for name in flows:
        sheet.add_component(lookup_component(name))
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts(flows, "mol/s"),
            "T": TypedQuantity(T_feed, "K"),
            "P": TypedQuantity(P_bar, "bar"),
            "phase": phase,
        },
    )
    sheet.add_block("Flash drum", "D", specs=specs)
    sheet.add_block("Product", "V")
    sheet.add_block("Product", "L")
    sheet.connect("F", "out", "D", "in", "feed")
    sheet.connect("D", "vapor", "V", "in", "vapor")
    sheet.connect("D", "liquid", "L", "in", "liquid")
    return sheet


def test_flash_drum_at_T_and_P_matches_thermo_and_closes():
    sheet = _drum({"mode": "temperature", "T": TypedQuantity(371.0, "K")})
    solution = solve_flowsheet(sheet)
    assert solution.converged, solution.message
    reference = _thermo_flasher(NAMES).flash(T=371.0, P=101325.0, zs=[0.4, 0.6])
    vapor, liquid = solution.streams["vapor"], solution.streams["liquid"]
    assert vapor.flows.sum() == pytest.approx(reference.VF, rel=1e-6)
    assert vapor.mole_fractions() == pytest.approx(np.array(reference.gas.zs), rel=1e-6)
    assert liquid.mole_fractions() == pytest.approx(np.array(reference.liquid0.zs), rel=1e-6)
    assert (vapor.phase, liquid.phase) == ("vapor", "liquid")
    value = solution.blocks["D"].values["vapor fraction"][0]
    assert value == pytest.approx(reference.VF, rel=1e-6)
    # energy balance: duty = H_out - H_in, closes to the solver's tolerance
    assert solution.balance.energy_closure < 1e-9


def test_adiabatic_flash_of_a_hot_liquid_keeps_the_enthalpy():
    # a liquid at 371 K is dropped to 1 atm with no heat: its enthalpy is kept and it
    # partly vaporizes, cooling towards its bubble point.
    sheet = _drum(
        {"mode": "duty", "duty": TypedQuantity(0.0, "W"), "P": TypedQuantity(0.7, "bar")},
        T_feed=371.0,
    )
    solution = solve_flowsheet(sheet)
    assert solution.converged, solution.message
    vapor_fraction = solution.blocks["D"].values["vapor fraction"][0]
    assert 0.0 < vapor_fraction < 1.0
    assert solution.blocks["D"].duty_W == pytest.approx(0.0, abs=1e-6)
    assert solution.streams["vapor"].T < 371.0


def test_flash_drum_at_a_vapor_fraction_gives_bubble_and_dew_points():
    # thermo FlashVL at P and VF = 0 / 1 (bubble / dew temperature), 1e-6 relative
    flasher = _thermo_flasher(NAMES)
    for fraction in (0.0, 1.0):
        sheet = _drum({"mode": "vapor fraction", "vapor_fraction": fraction})
        solution = solve_flowsheet(sheet)
        assert solution.converged, solution.message
        reference = flasher.flash(P=101325.0, VF=fraction, zs=[0.4, 0.6]).T
        assert solution.streams["vapor"].T == pytest.approx(reference, rel=1e-6)


def test_single_phase_feed_is_reported_with_its_bubble_point():
    sheet = _drum({"mode": "temperature", "T": TypedQuantity(320.0, "K")})
    solution = solve_flowsheet(sheet)
    assert solution.converged
    assert solution.streams["vapor"].flows.sum() == 0.0
    result = solution.blocks["D"]
    assert result.values["vapor fraction"][0] == 0.0
    assert result.values["bubble point"][0] == pytest.approx(
        _thermo_flasher(NAMES).flash(P=101325.0, VF=0.0, zs=[0.4, 0.6]).T, rel=1e-6
    )
    assert any("stays liquid" in warning for warning in result.warnings)


@pytest.mark.parametrize(
    ("field", "value"),
    [
        ("P", TypedQuantity(0.0, "bar")),
        ("P", TypedQuantity(-1.0, "bar")),
        ("T", TypedQuantity(-5.0, "K")),
    ],
)
def test_bad_flash_specs_are_refused_at_validation(field, value):
    sheet = _drum({"mode": "temperature", "T": TypedQuantity(371.0, "K")})
    sheet.block("D").specs[field] = value  # as a case file could hold it
    errors = [i for i in validate_flowsheet(sheet) if i.is_error]
    assert errors and errors[0].block == "D" and errors[0].field == field
    assert solve_flowsheet(sheet).status == "needs input"


@pytest.mark.parametrize("fraction", [-0.1, 1.5])
def test_vapor_fraction_outside_zero_to_one_is_refused(fraction):
    sheet = _drum({"mode": "vapor fraction", "vapor_fraction": 0.5})
    sheet.block("D").specs["vapor_fraction"] = fraction
    errors = [i for i in validate_flowsheet(sheet) if i.is_error]
    assert errors and errors[0].field == "vapor_fraction" and str(fraction) in errors[0].message


def test_component_without_vapor_pressure_data_is_refused_naming_it():
    from model.properties.components import define_component

    sheet = _drum({"mode": "temperature", "T": TypedQuantity(371.0, "K")})
    oil = lookup_component("n-decane")
    sheet.add_component(
        define_component(
            "my oil",
            oil.formula,
            Tc=oil.Tc,
            Pc=oil.Pc,
            Tb=oil.Tb,
            Hf_ig=oil.Hf_ig,
            cp=oil.cp,
            Hvap_Tb=oil.Hvap_Tb,
        )
    )
    errors = [i for i in validate_flowsheet(sheet) if i.is_error]
    assert [(e.block, e.field) for e in errors] == [("D", "components")]
    assert "my oil" in errors[0].message


def test_stream_table_of_a_case_with_a_flash_drum_has_bubble_and_dew_points():
    # thermo FlashVL at P and VF = 0 / 1 for the feed (benzene-toluene 40/60), 1e-6 rel.
    from model.report.table import stream_table

    solution = solve_flowsheet(_drum({"mode": "temperature", "T": TypedQuantity(371.0, "K")}))
    table = stream_table(solution, "SI", ["feed", "vapor", "liquid"])
    rows = {row.label: row.values for row in table.rows}
    flasher = _thermo_flasher(NAMES)
    assert rows["Bubble point"][0] == pytest.approx(
        flasher.flash(P=101325.0, VF=0.0, zs=[0.4, 0.6]).T, rel=1e-6
    )
    assert rows["Dew point"][0] == pytest.approx(
        flasher.flash(P=101325.0, VF=1.0, zs=[0.4, 0.6]).T, rel=1e-6
    )
    # the drum's outlets are saturated at its temperature
    assert rows["Dew point"][1] == pytest.approx(371.0, rel=1e-9)
    assert rows["Bubble point"][2] == pytest.approx(371.0, rel=1e-9)
