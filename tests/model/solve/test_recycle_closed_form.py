"""Recycle loops whose steady state is known in closed form, derived by hand below.

Notation: F fresh feed (mol/s), X per-pass conversion of the key reactant A, r the
fraction of a loop stream sent back, p = 1 - r the purge fraction. Every derivation is a
steady-state balance "in = out" around the mixer or the whole loop.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq

from convergence import SolverSettings
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity
from model.properties.components import define_component, lookup_component
from model.properties.cp_correlations import CpCorrelation
from model.solve.driver import solve_flowsheet

ISOMERISATION_A_TO_B = {"n-butane": -1, "isobutane": 1}


def _tight() -> SolverSettings:
    """Tolerance 1e-12: the loop's error is up to residual / (1 - slope), so compare the
    closed forms at 1e-9 against a solve converged well below that."""
    settings = SolverSettings()
    settings.update(tolerance=1e-12)
    return settings


def _sheet(components, feed: dict[str, float], T0: float = 300.0) -> Flowsheet:
    sheet = Flowsheet()
    for component in components:
        sheet.add_component(
            lookup_component(component) if isinstance(component, str) else component
        )
    sheet.add_block(
        "Feed",
        "F",
        specs={
            "flows": ComponentAmounts(feed, "mol/s"),
            "T": TypedQuantity(T0, "K"),
            "P": TypedQuantity(5.0, "bar"),
        },
    )
    sheet.add_block("Mixer", "M")
    sheet.connect("F", "out", "M", "in1", "fresh")
    return sheet


def _reactor(sheet, key, conversion, stoichiometry, **specs):
    reaction = Reaction(stoichiometry, key, conversion, "A to B")
    sheet.add_block("Reactor", "R", specs={"reactions": [reaction], **specs})


@pytest.mark.parametrize("conversion", [0.1, 0.25, 0.5, 0.9])
def test_perfect_separator_recycle(conversion):
    """Mixer -> reactor (A -> B at X) -> perfect separator; unreacted A back to the mixer.

    A leaves only as B, so the overall conversion is 1 and the product is F of B. Mixer
    balance on A: a = F + (1 - X) a  =>  a = F / X, and the recycle (1 - X) a gives
    recycle / fresh = (1 - X) / X.
    """
    sheet = _sheet(("n-butane", "isobutane"), {"n-butane": 1.0})
    _reactor(sheet, "n-butane", conversion, ISOMERISATION_A_TO_B, T=TypedQuantity(400, "K"))
    sheet.add_block(
        "Separator",
        "S",
        specs={
            "split": ComponentAmounts({"n-butane": 1.0}, "fraction to first outlet"),
            "phase1": "vapor",
            "phase2": "vapor",
        },
    )
    sheet.add_block("Product", "P")
    sheet.connect("M", "out", "R", "in")
    sheet.connect("R", "out", "S", "in")
    sheet.connect("S", "out1", "M", "in2", "recycle")
    sheet.connect("S", "out2", "P", "in", "product")
    solution = solve_flowsheet(sheet, settings=_tight())
    assert solution.status == "solved", solution.message
    recycle = solution.streams["recycle"].flows
    product = solution.streams["product"].flows
    assert recycle[0] / 1.0 == pytest.approx((1 - conversion) / conversion, rel=1e-7)
    overall_conversion = 1.0 - product[0] / 1.0
    assert overall_conversion == pytest.approx(1.0, abs=1e-9)
    assert product[1] == pytest.approx(1.0, rel=1e-9)
    assert solution.balance.closes


def test_inert_builds_up_to_the_level_its_purge_allows():
    """A (fed with an inert I at mole fraction z) reacts at X; B is separated off; the rest
    (A and I) is recycled with a fraction p purged.

    Inert balance on the loop (it only leaves by the purge): I_loop = F z + (1 - p) I_loop
    => I_loop = F z / p. A balance at the mixer: a = F (1 - z) + (1 - p)(1 - X) a
    => a = F (1 - z) / (1 - (1 - p)(1 - X)). The separator's recycle-side outlet carries
    I_loop and (1 - X) a, so the inert's mole fraction in the loop is
    y_I = I_loop / (I_loop + (1 - X) a); the overall conversion of A is X a / (F (1 - z)).
    """
    F, z, X, p = 1.0, 0.05, 0.4, 0.1
    sheet = _sheet(
        ("n-butane", "isobutane", "nitrogen"), {"n-butane": F * (1 - z), "nitrogen": F * z}
    )
    _reactor(sheet, "n-butane", X, ISOMERISATION_A_TO_B, T=TypedQuantity(400, "K"))
    sheet.add_block(
        "Separator",
        "S",
        specs={
            "split": ComponentAmounts({"isobutane": 1.0}, "fraction to first outlet"),
            "phase1": "vapor",
            "phase2": "vapor",
        },
    )
    sheet.add_block("Splitter", "T", specs={"fractions": {"out2": p}})
    sheet.add_block("Product", "P")
    sheet.add_block("Product", "Purge")
    sheet.connect("M", "out", "R", "in")
    sheet.connect("R", "out", "S", "in")
    sheet.connect("S", "out1", "P", "in", "product")
    sheet.connect("S", "out2", "T", "in", "loop")
    sheet.connect("T", "out1", "M", "in2", "recycle")
    sheet.connect("T", "out2", "Purge", "in", "purge")
    solution = solve_flowsheet(sheet)
    assert solution.status == "solved", solution.message
    inert_loop = F * z / p
    a = F * (1 - z) / (1 - (1 - p) * (1 - X))
    loop = solution.streams["loop"]
    assert loop.flows[2] == pytest.approx(inert_loop, rel=1e-7)
    assert loop.flows[0] == pytest.approx((1 - X) * a, rel=1e-7)
    assert loop.mole_fractions()[2] == pytest.approx(
        inert_loop / (inert_loop + (1 - X) * a), rel=1e-7
    )
    assert solution.streams["purge"].flows[2] == pytest.approx(F * z, rel=1e-7)
    overall = solution.streams["product"].flows[1] / (F * (1 - z))
    assert overall == pytest.approx(X * a / (F * (1 - z)), rel=1e-7)
    assert solution.balance.closes


def _constant_cp(name: str, heat_of_formation: float):
    return define_component(
        name,
        "C4H10",
        Tc=425.0,
        Pc=3.8e6,
        Tb=272.7,
        Hf_ig=heat_of_formation,
        cp=CpCorrelation("polynomial", (100.0,), 100.0, 2000.0, "test: constant Cp"),
        Hvap_Tb=22.4e3,
    )


def _feed_effluent_loop(components, cold_outlet_T: float) -> Flowsheet:
    """Fresh A -> mixer -> exchanger cold side -> adiabatic reactor -> exchanger hot side ->
    splitter: fraction r = 0.5 back to the mixer, the rest is the product."""
    a_name = components[0] if isinstance(components[0], str) else components[0].name
    b_name = components[1] if isinstance(components[1], str) else components[1].name
    sheet = _sheet(components, {a_name: 1.0})
    _reactor(sheet, a_name, 0.5, {a_name: -1, b_name: 1}, mode="adiabatic", phase="vapor")
    sheet.add_block("Exchanger", "X", specs={"cold_T": TypedQuantity(cold_outlet_T, "K")})
    sheet.add_block("Splitter", "T", specs={"fractions": {"out1": 0.5}})
    sheet.add_block("Product", "P")
    sheet.connect("M", "out", "X", "cold_in", "mixed")
    sheet.connect("X", "cold_out", "R", "in", "preheated")
    sheet.connect("R", "out", "X", "hot_in", "effluent")
    sheet.connect("X", "hot_out", "T", "in", "cooled")
    sheet.connect("T", "out1", "M", "in2", "recycle")
    sheet.connect("T", "out2", "P", "in", "product")
    return sheet


def test_feed_effluent_exchanger_loop_with_constant_cp_by_hand():
    """Energy and material recycle; A and B have one constant Cp c = 100 J/mol/K, so a
    stream's heat capacity is c per mole whatever its composition, and A -> B keeps moles.

    F = 1, X = 0.5, r = 0.5, T0 = 300 K, cold outlet T_c = 500 K,
    dHr = Hf_B - Hf_A = -10 kJ/mol. Loop flow M = F / (1 - r) = 2 mol/s; A at the
    reactor a = F / (1 - r (1 - X)) = 4/3 mol/s. The reaction heats the loop by
    D = X a (-dHr) / (M c) = 33.33 K. Exchanger: T_h,out = T_r - (T_c - T_m); adiabatic
    reactor T_r = T_c + D, so T_h,out = T_m + D. Mixer: T_m = (1 - r) T0 + r T_h,out
    => T_m = T0 + r D / (1 - r) = 333.33 K, T_h,out = T0 + D / (1 - r) = 366.67 K,
    T_r = 533.33 K, Q = M c (T_c - T_m) = 33.33 kW; both end differences are D, so
    LMTD = D (the equal-ends limit) and UA = Q / D = 1000 W/K.
    """
    components = (_constant_cp("A", -125e3), _constant_cp("B", -135e3))
    solution = solve_flowsheet(_feed_effluent_loop(components, 500.0))
    assert solution.status == "solved", solution.message
    D = 0.5 * (4 / 3) * 10e3 / (2 * 100.0)
    streams = solution.streams
    assert streams["mixed"].T == pytest.approx(300.0 + D, abs=1e-5)
    assert streams["cooled"].T == pytest.approx(300.0 + 2 * D, abs=1e-5)
    assert streams["effluent"].T == pytest.approx(500.0 + D, abs=1e-5)
    assert streams["recycle"].flows == pytest.approx([1 / 3, 2 / 3], rel=1e-7)
    exchanger = solution.blocks["X"]
    assert exchanger.duty_W == pytest.approx(2 * 100.0 * (500.0 - 300.0 - D), rel=1e-7)
    assert exchanger.values["LMTD"][0] == pytest.approx(D, rel=1e-6)
    assert exchanger.values["UA"][0] == pytest.approx(1000.0, rel=1e-6)
    assert solution.balance.closes


def test_feed_effluent_exchanger_loop_against_brentq_on_the_energy_balance():
    """The same loop with n-butane -> isobutane and their TRC Cp: temperatures from
    scipy.optimize.brentq on the hand-written balances, with the project's PropertyBasis
    for the enthalpies (so this checks the loop, not the property data).

    Material (as above): M = 2, a = 4/3, effluent A = (1 - X) a = 2/3, B = 4/3; product and
    recycle are halves of it. Whole plant (adiabatic; the exchanger's heat stays
    inside): H(product, T_h,out) = H(feed, T0) gives T_h,out. Mixer: H(M, T_m) =
    H(feed, T0) + H(recycle, T_h,out). Reactor: H(effluent, T_r) = H(mixed, T_c).
    """
    sheet = _feed_effluent_loop(("n-butane", "isobutane"), 500.0)
    solution = solve_flowsheet(sheet)
    assert solution.status == "solved", solution.message
    basis = solution.basis

    def enthalpy(flows, T):
        return basis.stream_enthalpy_flow(np.asarray(flows, dtype=float), T, False)

    feed, effluent = [1.0, 0.0], [2 / 3, 4 / 3]
    product = recycle = [1 / 3, 2 / 3]
    mixed = [1.0 + 1 / 3, 2 / 3]
    h_feed = enthalpy(feed, 300.0)
    T_hot_out = brentq(lambda T: enthalpy(product, T) - h_feed, 200.0, 1500.0, xtol=1e-10)
    T_mixed = brentq(
        lambda T: enthalpy(mixed, T) - h_feed - enthalpy(recycle, T_hot_out),
        200.0,
        1500.0,
        xtol=1e-10,
    )
    T_reactor = brentq(
        lambda T: enthalpy(effluent, T) - enthalpy(mixed, 500.0), 200.0, 1500.0, xtol=1e-10
    )
    assert solution.streams["cooled"].T == pytest.approx(T_hot_out, abs=1e-5)
    assert solution.streams["mixed"].T == pytest.approx(T_mixed, abs=1e-5)
    assert solution.streams["effluent"].T == pytest.approx(T_reactor, abs=1e-5)
    assert solution.streams["recycle"].flows == pytest.approx(recycle, rel=1e-7)
