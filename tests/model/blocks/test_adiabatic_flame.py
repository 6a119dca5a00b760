"""Adiabatic reactor against Cantera: stoichiometric methane-air burned to fixed products.

CHECKS.md "Adiabatic reactor, fixed products": CH4 + 2 O2 + 7.524 N2 (air with
O2:N2 = 21:79) from 298.15 K and 1 atm, products held at CO2 + 2 H2O + 7.524 N2 (no
dissociation), reach 2325.0 K with Cantera's gri30.yaml; tolerance 2 K across property
data sets. The reference is recomputed here: set the reactant state, take its
enthalpy, set the product composition, then set HP without equilibrating.
"""

from __future__ import annotations

import cantera as ct
import pytest

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity
from model.properties.components import lookup_component
from model.solve.driver import solve_flowsheet

NITROGEN_PER_OXYGEN = 79.0 / 21.0


def _cantera_fixed_product_temperature() -> float:
    gas = ct.Solution("gri30.yaml")
    n2 = 2.0 * NITROGEN_PER_OXYGEN
    gas.TPX = 298.15, ct.one_atm, {"CH4": 1.0, "O2": 2.0, "N2": n2}
    enthalpy = gas.enthalpy_mass  # mass is conserved, so the specific enthalpy is too
    gas.TPX = 2000.0, ct.one_atm, {"CO2": 1.0, "H2O": 2.0, "N2": n2}
    gas.HP = enthalpy, ct.one_atm
    return gas.T


def test_stoichiometric_methane_air_reaches_the_cantera_temperature():
    sheet = Flowsheet()
    for name in ("methane", "oxygen", "nitrogen", "carbon dioxide", "water"):
        sheet.add_component(lookup_component(name))
    sheet.add_block(
        "Feed",
        "air and fuel",
        specs={
            "flows": ComponentAmounts(
                {"methane": 1.0, "oxygen": 2.0, "nitrogen": 2.0 * NITROGEN_PER_OXYGEN}, "mol/s"
            ),
            "T": TypedQuantity(298.15, "K"),
            "P": TypedQuantity(1.0, "atm"),
            "phase": "vapor",
        },
    )
    combustion = Reaction(
        {"methane": -1, "oxygen": -2, "carbon dioxide": 1, "water": 2}, "methane", 1.0, "combustion"
    )
    sheet.add_block(
        "Reactor",
        "burner",
        specs={"reactions": [combustion], "mode": "adiabatic", "phase": "vapor"},
    )
    sheet.add_block("Product", "flue")
    sheet.connect("air and fuel", "out", "burner", "in", "reactants")
    sheet.connect("burner", "out", "flue", "in", "products")
    solution = solve_flowsheet(sheet)
    assert solution.status == "solved", solution.message
    products = solution.streams["products"]
    assert products.flows == pytest.approx(
        [0.0, 0.0, 2.0 * NITROGEN_PER_OXYGEN, 1.0, 2.0], abs=1e-12
    )
    reference = _cantera_fixed_product_temperature()
    assert reference == pytest.approx(2325.0, abs=0.5)  # the CHECKS.md figure
    assert products.T == pytest.approx(reference, abs=2.0)
    assert solution.blocks["burner"].duty_W == 0.0
    assert solution.balance.closes
