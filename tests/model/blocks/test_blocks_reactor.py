"""Reactor: extents in order, heat of reaction by Hess's law, energy modes, shortfalls.

Standard heats of reaction are recomputed from Cantera's nasa_gas.yaml formation
enthalpies (NASA Glenn polynomials, McBride, Zehe & Gordon, NASA/TP-2002-211556) with
the tolerances of CHECKS.md; extents are hand arithmetic shown beside each check.
"""

from __future__ import annotations

import cantera as ct
import numpy as np
import pytest

from model.blocks import compute_block
from model.errors import CalculationError
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import Reaction, TypedQuantity
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.stream_state import StreamState
from model.solve.compile import compile_flowsheet
from model.solve.driver import solve_flowsheet
from tests.model.blocks.sheets import feed_specs, one_block_sheet

NASA = {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}

REFORMING = Reaction(
    {"methane": -1, "water": -1, "carbon monoxide": 1, "hydrogen": 3}, "methane", 0.5, "reforming"
)
SHIFT = Reaction(
    {"carbon monoxide": -1, "water": -1, "carbon dioxide": 1, "hydrogen": 1},
    "carbon monoxide",
    0.5,
    "shift",
)
COMPONENTS = ("methane", "water", "carbon monoxide", "hydrogen", "carbon dioxide", "oxygen")


FORMULAS = {
    "methane": "CH4",
    "water": "H2O",
    "carbon monoxide": "CO",
    "hydrogen": "H2",
    "carbon dioxide": "CO2",
    "oxygen": "O2",
    "nitrogen": "N2",
    "ammonia": "NH3",
}


def _hess(stoichiometry: dict[str, float]) -> float:
    """Standard heat of reaction at 298.15 K, J/mol, from nasa_gas formation enthalpies."""
    return sum(
        nu * NASA[FORMULAS[name]].thermo.h(298.15) / 1000.0 for name, nu in stoichiometry.items()
    )


def _reactor_sheet(reactions, inlet: dict[str, float], T_in=298.15, **specs) -> Flowsheet:
    components = [lookup_component(name) for name in COMPONENTS]
    feeds = {"in": ("feed", feed_specs(inlet, T_in, 10e5))}
    specs = {"reactions": reactions, **specs}
    return one_block_sheet(components, "Reactor", "R", specs, feeds, {"out": "effluent"})


def test_reactions_apply_in_order_on_the_flow_present():
    # reforming: extent 0.5 x 1 mol/s CH4 = 0.5; shift then sees 0.5 mol/s CO: extent 0.25
    sheet = _reactor_sheet(
        [REFORMING, SHIFT], {"methane": 1.0, "water": 3.0}, T=TypedQuantity(298.15, "K")
    )
    solution = solve_flowsheet(sheet)
    values = solution.blocks["R"].values
    assert values["extent reforming"][0] == pytest.approx(0.5)
    assert values["extent shift"][0] == pytest.approx(0.25)
    # CH4 0.5, H2O 3 - 0.5 - 0.25 = 2.25, CO 0.25, H2 1.5 + 0.25 = 1.75, CO2 0.25
    assert solution.streams["effluent"].flows == pytest.approx([0.5, 2.25, 0.25, 1.75, 0.25, 0])


def test_heats_of_reaction_and_duty_at_298_follow_hess_law():
    sheet = _reactor_sheet(
        [REFORMING, SHIFT], {"methane": 1.0, "water": 3.0}, T=TypedQuantity(298.15, "K")
    )
    solution = solve_flowsheet(sheet)
    values = solution.blocks["R"].values
    # CHECKS.md: CO + H2O -> CO2 + H2, -41.15 kJ/mol (nasa_gas), +-0.1 kJ/mol
    assert values["heat of reaction shift"][0] == pytest.approx(
        _hess(SHIFT.stoichiometry), abs=100.0
    )
    assert values["heat of reaction reforming"][0] == pytest.approx(
        _hess(REFORMING.stoichiometry), abs=400.0
    )
    # In and out at 298.15 K as vapor: the duty is the sum of extent x heat of reaction.
    expected = (
        0.5 * values["heat of reaction reforming"][0] + 0.25 * values["heat of reaction shift"][0]
    )
    assert solution.blocks["R"].duty_W == pytest.approx(expected, rel=1e-9)


def test_ammonia_synthesis_heat_of_reaction_against_nasa():
    sheet = Flowsheet()
    for name in ("nitrogen", "hydrogen", "ammonia"):
        sheet.add_component(lookup_component(name))
    basis = PropertyBasis(sheet.components)
    # CHECKS.md: N2 + 3 H2 -> 2 NH3, -91.88 kJ/mol (nasa_gas), +-0.8 kJ/mol
    nu = {"nitrogen": -1, "hydrogen": -3, "ammonia": 2}
    vector = np.array([nu[n] for n in basis.names], dtype=float)
    assert basis.standard_heat_of_reaction(vector) == pytest.approx(_hess(nu), abs=800.0)


def test_duty_mode_and_adiabatic_mode_close_the_energy_balance():
    for specs in (
        {"mode": "adiabatic", "phase": "vapor"},
        {"mode": "duty", "duty": TypedQuantity(-50.0, "kW"), "phase": "vapor"},
    ):
        sheet = _reactor_sheet([SHIFT], {"carbon monoxide": 1.0, "water": 2.0}, 600.0, **specs)
        solution = solve_flowsheet(sheet)
        basis = solution.basis
        h_in = solution.streams["feed"].enthalpy_flow(basis)
        h_out = solution.streams["effluent"].enthalpy_flow(basis)
        duty = solution.blocks["R"].duty_W
        assert duty == pytest.approx(0.0 if specs["mode"] == "adiabatic" else -50e3)
        assert h_out - h_in == pytest.approx(duty, abs=1e-6 * abs(h_in))
    # the exothermic shift heats an adiabatic reactor above its 600 K inlet
    adiabatic = solve_flowsheet(
        _reactor_sheet([SHIFT], {"carbon monoxide": 1.0, "water": 2.0}, 600.0, mode="adiabatic")
    )
    assert adiabatic.streams["effluent"].T > 600.0


def test_pressure_drop_and_outlet_phase():
    sheet = _reactor_sheet(
        [SHIFT],
        {"carbon monoxide": 1.0, "water": 1.0},
        T=TypedQuantity(500, "K"),
        pressure_drop=TypedQuantity(0.5, "bar"),
    )
    out = solve_flowsheet(sheet).streams["effluent"]
    assert out.P == pytest.approx(9.5e5) and out.phase == "vapor" and out.T == 500.0


def test_conversion_needing_more_reactant_than_present_fails_the_solve():
    # CH4 + 2 O2 with 1 mol/s CH4 and 1 mol/s O2 at conversion 1 needs 2 mol/s O2.
    burn = Reaction(
        {"methane": -1, "oxygen": -2, "carbon dioxide": 1, "water": 2}, "methane", 1.0, "burn"
    )
    sheet = _reactor_sheet([burn], {"methane": 1.0, "oxygen": 1.0}, T=TypedQuantity(1000, "K"))
    solution = solve_flowsheet(sheet)
    assert solution.status == "failed" and not solution.converged
    for words in ("R:", "reaction burn", "needs 2 mol/s of oxygen", "only 1 mol/s"):
        assert words in solution.message, solution.message
    assert any(i.block == "R" and i.is_error for i in solution.issues)


def test_a_lenient_pass_limits_the_extent_with_a_warning_instead():
    burn = Reaction(
        {"methane": -1, "oxygen": -2, "carbon dioxide": 1, "water": 2}, "methane", 1.0, "burn"
    )
    sheet = _reactor_sheet([burn], {"methane": 1.0, "oxygen": 1.0}, T=TypedQuantity(1000, "K"))
    basis = PropertyBasis(sheet.components)
    reactor = compile_flowsheet(sheet, basis).blocks["R"]
    inlet = StreamState(np.array([1.0, 0, 0, 0, 0, 1.0]), 500.0, 1e6, "vapor")
    with pytest.raises(CalculationError, match="needs 2 mol/s of oxygen"):
        compute_block(reactor, [inlet], basis)
    output = compute_block(reactor, [inlet], basis, strict=False)
    # limited by oxygen: extent 0.5 -> CH4 0.5, O2 0, CO2 0.5, H2O 1
    assert output.outlets["out"].flows == pytest.approx([0.5, 1.0, 0, 0, 0.5, 0.0])
    assert output.result.warnings and "oxygen" in output.result.warnings[0]


def test_pressure_drop_above_inlet_pressure_is_an_error():
    sheet = _reactor_sheet(
        [SHIFT],
        {"carbon monoxide": 1.0, "water": 1.0},
        T=TypedQuantity(500, "K"),
        pressure_drop=TypedQuantity(11, "bar"),
    )
    solution = solve_flowsheet(sheet)
    assert solution.status == "failed" and "exceeds the inlet pressure" in solution.message
