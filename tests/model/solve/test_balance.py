"""Balance closure report: mass, elements and energy from feeds to products.

Expected values are hand arithmetic on the stated flows (element counts from the
formulas; molar masses from chemicals via the components), shown beside each check.
"""

from __future__ import annotations

import numpy as np
import pytest

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.stream_state import StreamState
from model.solve.balance import CLOSURE_FACTOR, BalanceReport, balance_report
from model.solve.driver import solve_flowsheet


@pytest.fixture(scope="module")
def basis() -> PropertyBasis:
    return PropertyBasis([lookup_component(n) for n in ("hydrogen", "oxygen", "water")])


def test_closed_balance_over_a_reaction(basis):
    # 2 H2 + O2 -> 2 H2O: 2 mol/s H2 + 1 mol/s O2 in, 2 mol/s H2O out (4 H, 2 O atoms)
    streams = {
        "in": StreamState(np.array([2.0, 1.0, 0.0]), 298.15, 1e5, "vapor"),
        "out": StreamState(np.array([0.0, 0.0, 2.0]), 298.15, 1e5, "vapor"),
    }
    heat = 2.0 * basis.Hf_ig[2]  # duty that brings the product back to 298.15 K
    report = balance_report(basis, streams, [heat], ["in"], ["out"], tolerance=1e-8)
    assert report.elements == {"H": pytest.approx((4.0, 4.0)), "O": pytest.approx((2.0, 2.0))}
    mass = 2 * basis.molar_mass[0] + basis.molar_mass[1]
    assert report.mass_in == pytest.approx(mass) and report.mass_out == pytest.approx(
        2 * basis.molar_mass[2], rel=1e-3
    )  # molar masses agree to rounding of atomic weights
    assert report.energy_in == pytest.approx(report.energy_out, abs=1e-9 * abs(heat))
    assert report.closes and report.threshold == CLOSURE_FACTOR * 1e-8
    assert report.element_closure < 1e-15 and report.energy_closure < 1e-12


def test_a_missing_flow_is_flagged_with_its_size(basis):
    # 1 % of the water is lost: mass and O and H all short by 1 %
    streams = {
        "in": StreamState(np.array([0.0, 0.0, 1.0]), 350.0, 1e5, "vapor"),
        "out": StreamState(np.array([0.0, 0.0, 0.99]), 350.0, 1e5, "vapor"),
    }
    report = balance_report(basis, streams, [], ["in"], ["out"], tolerance=1e-8)
    assert report.mass_closure == pytest.approx(0.01)
    assert report.element_closure == pytest.approx(0.01)
    assert report.energy_closure == pytest.approx(0.01)
    assert not report.closes and report.failing == ["mass", "elements", "energy"]
    text = "\n".join(report.lines())
    assert "DOES NOT CLOSE" in text and "balances do not close: mass, elements, energy" in text


def test_report_round_trips_and_summarises(basis):
    streams = {
        "in": StreamState(np.array([1.0, 0.0, 0.0]), 300.0, 1e5, "vapor"),
        "out": StreamState(np.array([1.0, 0.0, 0.0]), 400.0, 1e5, "vapor"),
    }
    duty = basis.stream_enthalpy_flow(np.array([1.0, 0, 0]), 400.0, False) - (
        basis.stream_enthalpy_flow(np.array([1.0, 0, 0]), 300.0, False)
    )
    report = balance_report(basis, streams, [duty], ["in"], ["out"], tolerance=1e-6)
    assert report.closes
    assert BalanceReport.from_dict(report.to_dict()) == report
    assert report.lines()[-1].startswith("balances close")


def test_solved_flowsheet_closes_with_duties_counted():
    sheet = Flowsheet()
    for name in ("hydrogen", "oxygen", "water", "nitrogen"):
        sheet.add_component(lookup_component(name))
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts({"hydrogen": 2.0, "oxygen": 1.5, "nitrogen": 3.0}, "mol/s"),
            "T": TypedQuantity(25, "degC"),
            "P": TypedQuantity(2, "bar"),
        },
    )
    reaction = Reaction({"hydrogen": -2, "oxygen": -1, "water": 2}, "hydrogen", 0.9)
    sheet.add_block("Reactor", "R", specs={"reactions": [reaction], "T": TypedQuantity(800, "K")})
    sheet.add_block("Heater", "C", specs={"T": TypedQuantity(40, "degC"), "phase": "vapor"})
    sheet.add_block("Product", "P")
    sheet.connect("F", "out", "R", "in")
    sheet.connect("R", "out", "C", "in")
    sheet.connect("C", "out", "P", "in")
    solution = solve_flowsheet(sheet)
    report = solution.balance
    assert report.duties == pytest.approx(solution.blocks["R"].duty_W + solution.blocks["C"].duty_W)
    # 4 H atoms, 3 O atoms, 6 N atoms in and out
    assert report.elements["H"] == pytest.approx((4.0, 4.0))
    assert report.elements["O"] == pytest.approx((3.0, 3.0))
    assert report.elements["N"] == pytest.approx((6.0, 6.0))
    assert max(report.closures.values()) < 1e-12 and report.closes
