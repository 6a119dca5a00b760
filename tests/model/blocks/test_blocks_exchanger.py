"""Exchanger: counter-current duty, other outlet, LMTD, UA and the cross/approach checks.

Two hand-defined components with a constant Cp of 30 J/mol/K make every number a hand
calculation (shown beside each check). The LMTD is the counter-current log mean of
the end differences (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer,
section 11.3, from memory); its equal-ends limit is the arithmetic mean.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from model.blocks.exchanger import log_mean_temperature_difference
from model.flowsheet.spec_values import TypedQuantity
from model.properties.components import define_component
from model.properties.cp_correlations import CpCorrelation
from model.solve.driver import solve_flowsheet
from tests.model.blocks.sheets import feed_specs, one_block_sheet

CP = 30.0  # J/mol/K


def _gas(name: str):
    return define_component(
        name,
        "N2",
        Tc=126.2,
        Pc=3.4e6,
        Tb=77.4,
        Hf_ig=0.0,
        cp=CpCorrelation("polynomial", (CP,), 50.0, 3000.0, "test: constant Cp"),
        Hvap_Tb=5.6e3,
    )


def _exchanger(hot_flow, hot_in_T, cold_flow, cold_in_T, **specs):
    feeds = {
        "hot_in": ("hot in", feed_specs({"hot gas": hot_flow}, hot_in_T, 2e5)),
        "cold_in": ("cold in", feed_specs({"cold gas": cold_flow}, cold_in_T, 2e5)),
    }
    outlets = {"hot_out": "hot out", "cold_out": "cold out"}
    gases = [_gas("hot gas"), _gas("cold gas")]
    sheet = one_block_sheet(gases, "Exchanger", "X", specs, feeds, outlets)
    solution = solve_flowsheet(sheet)
    assert solution.status == "solved", solution.message
    return solution


def test_cold_outlet_spec_gives_duty_hot_outlet_lmtd_and_ua():
    solution = _exchanger(1.0, 500.0, 2.0, 300.0, cold_T=TypedQuantity(350.0, "K"))
    result = solution.blocks["X"]
    # Q = 2 mol/s x 30 x (350 - 300) = 3000 W; hot out = 500 - 3000 / (1 x 30) = 400 K
    assert result.duty_W == pytest.approx(3000.0, rel=1e-10)
    assert solution.streams["hot out"].T == pytest.approx(400.0, abs=1e-6)
    # ends: 500 - 350 = 150 K, 400 - 300 = 100 K; LMTD = 50 / ln(1.5)
    lmtd = 50.0 / math.log(1.5)
    assert result.values["LMTD"][0] == pytest.approx(lmtd, rel=1e-8)
    UA, kind = result.values["UA"]
    assert UA == pytest.approx(3000.0 / lmtd, rel=1e-8)
    assert kind == "heat_transfer_coefficient_area"  # a units_of_measure kind
    assert result.values["hot end approach"][0] == pytest.approx(150.0)
    assert result.warnings == []


def test_hot_outlet_and_duty_specs_give_the_same_exchanger():
    by_hot = _exchanger(
        1.0, 500.0, 2.0, 300.0, mode="hot outlet temperature", hot_T=TypedQuantity(400.0, "K")
    )
    by_duty = _exchanger(1.0, 500.0, 2.0, 300.0, mode="duty", duty=TypedQuantity(3.0, "kW"))
    for solution in (by_hot, by_duty):
        assert solution.streams["cold out"].T == pytest.approx(350.0, abs=1e-6)
        assert solution.streams["hot out"].T == pytest.approx(400.0, abs=1e-6)
        assert solution.blocks["X"].duty_W == pytest.approx(3000.0, rel=1e-9)


def test_equal_end_differences_take_the_arithmetic_limit():
    # balanced, 1 mol/s each side: hot 500 -> 400 K, cold 300 -> 400 K; both ends 100 K
    solution = _exchanger(1.0, 500.0, 1.0, 300.0, cold_T=TypedQuantity(400.0, "K"))
    assert solution.blocks["X"].values["LMTD"][0] == pytest.approx(100.0, rel=1e-9)
    assert solution.blocks["X"].values["UA"][0] == pytest.approx(3000.0 / 100.0, rel=1e-9)
    # near-equal ends: the log mean differs from the arithmetic one by (e^2 / 12) relative
    for ratio in (1 + 1e-9, 1 + 1e-6, 1 + 2e-6):
        dT1, dT2 = 50.0 * ratio, 50.0
        assert log_mean_temperature_difference(dT1, dT2) == pytest.approx(
            0.5 * (dT1 + dT2), rel=1e-12
        )
    assert log_mean_temperature_difference(60.0, 40.0) == pytest.approx(20 / math.log(1.5))


def test_temperature_cross_is_reported():
    # cold out 480 K: Q = 2 x 30 x 180 = 10800 W, hot out = 500 - 360 = 140 K < cold in 300 K
    solution = _exchanger(1.0, 500.0, 2.0, 300.0, cold_T=TypedQuantity(480.0, "K"))
    warnings = solution.blocks["X"].warnings
    assert any("temperature cross" in w for w in warnings)
    assert "LMTD" not in solution.blocks["X"].values
    assert any(i.block == "X" and "temperature cross" in i.message for i in solution.issues)


def test_approach_below_the_minimum_is_reported():
    # cold out 380 K: Q = 2 x 30 x 80 = 4800 W, hot out 500 - 160 = 340 K;
    # ends 500 - 380 = 120 K and 340 - 300 = 40 K < 50 K minimum
    solution = _exchanger(
        1.0,
        500.0,
        2.0,
        300.0,
        cold_T=TypedQuantity(380.0, "K"),
        minimum_approach=TypedQuantity(50.0, "K"),
    )
    assert solution.streams["hot out"].T == pytest.approx(340.0, abs=1e-6)
    assert any("below the minimum 50" in w for w in solution.blocks["X"].warnings)


def test_heat_flowing_cold_to_hot_is_reported():
    solution = _exchanger(1.0, 300.0, 1.0, 500.0, mode="duty", duty=TypedQuantity(-1.0, "kW"))
    warnings = " | ".join(solution.blocks["X"].warnings)
    assert "hot inlet" in warnings and "colder than the cold inlet" in warnings
    assert "negative duty" in warnings


def test_heat_curve_of_constant_heat_capacities_is_straight():
    solution = _exchanger(1.0, 500.0, 2.0, 300.0, cold_T=TypedQuantity(350.0, "K"))
    profile = solution.blocks["X"].profile
    heat = np.array(profile["heat passed"])
    assert heat[0] == 0.0 and heat[-1] == pytest.approx(3000.0, rel=1e-10)
    # hand calculation: the hot side falls 1/30 K per W from 500 K, the cold side's
    # outlet end is at 350 K and it falls 1/60 K per W toward its 300 K inlet
    np.testing.assert_allclose(profile["hot T"], 500.0 - heat / 30.0, rtol=1e-9)
    np.testing.assert_allclose(profile["cold T"], 350.0 - heat / 60.0, rtol=1e-9)
    assert "minimum internal approach" not in solution.blocks["X"].values  # one phase
