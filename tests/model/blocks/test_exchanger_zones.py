"""Zone analysis of an exchanger whose hot side condenses (model.blocks.exchanger_zones).

References: the UA is checked against scipy's adaptive quadrature (``scipy.integrate.
quad``, QUADPACK) of dQ / (T_hot - T_cold) over the same temperature profile, and the
internal approach against ``scipy.optimize.minimize_scalar`` of T_hot - T_cold over the
duty: the properties themselves are checked elsewhere (tests/model/properties against
thermo and CoolProp); here the zone sum and the pinch search are what is tested.
"""

from __future__ import annotations

import pytest
from scipy.integrate import quad
from scipy.optimize import minimize_scalar

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import TypedQuantity
from model.properties.components import lookup_component
from model.properties.property_method import equilibrium_for
from model.solve.driver import solve_flowsheet
from tests.model.blocks.sheets import feed_specs, one_block_sheet

P_ATM = 101325.0
STEAM = 5.0  # mol/s of water vapor at 420 K, 1 atm, condensed to 340 K


def condenser_sheet(cold_flow: float, minimum_approach: float | None = None) -> Flowsheet:
    """Steam (hot, "equilibrium") to a 340 K outlet against liquid water at 300 K, 10 bar."""
    specs = {
        "mode": "hot outlet temperature",
        "hot_T": TypedQuantity(340.0, "K"),
        "hot_phase": "equilibrium",
        "cold_phase": "liquid",
    }
    if minimum_approach is not None:
        specs["minimum_approach"] = TypedQuantity(minimum_approach, "K")
    feeds = {
        "hot_in": ("hot", feed_specs({"water": STEAM}, 420.0, P_ATM, "vapor")),
        "cold_in": ("cold", feed_specs({"water": cold_flow}, 300.0, 1e6, "liquid")),
    }
    outlets = {"hot_out": "hot out", "cold_out": "cold out"}
    water = [lookup_component("water")]
    return one_block_sheet(water, "Exchanger", "X", specs, feeds, outlets)


def _condenser(cold_flow: float, minimum_approach: float | None = None):
    solution = solve_flowsheet(condenser_sheet(cold_flow, minimum_approach))
    assert solution.converged, solution.message
    return solution


def _difference(solution):
    """T_hot - T_cold (K) as a function of the heat passed from the hot inlet end (W)."""
    basis = solution.basis
    hot, cold = solution.streams["hot"], solution.streams["cold"]
    h_hot, h_cold_out = hot.enthalpy_flow(basis), solution.streams["cold out"].enthalpy_flow(basis)
    equilibrium = equilibrium_for(basis)

    def difference(q: float) -> float:
        T_hot = equilibrium.flash_PH(hot.flows, P_ATM, h_hot - q, 373.0).T
        T_cold = basis.temperature_from_enthalpy(cold.flows, h_cold_out - q, True, 330.0)
        return T_hot - T_cold

    return difference


def test_zone_UA_of_a_condenser_matches_the_integral_of_its_profile():
    solution = _condenser(60.0)
    result = solution.blocks["X"]
    duty = result.duty_W
    difference = _difference(solution)
    reference, _ = quad(lambda q: 1.0 / difference(q), 0.0, duty, limit=200, epsabs=0.0)
    # 20 zones plus cuts at the dew and bubble points: the zone sum is second order in
    # the zone width inside each smooth stretch; 1e-4 relative was measured 0.8e-5
    assert result.values["UA"][0] == pytest.approx(reference, rel=1e-4)
    assert result.values["LMTD"][0] == pytest.approx(duty / reference, rel=1e-4)
    # the end-temperature LMTD is kept beside it, and differs: the profile bends
    end = result.values["end-temperature LMTD"][0]
    assert abs(end - duty / reference) > 1.0
    assert not any("end temperatures only" in warning for warning in result.warnings)
    pinch = minimize_scalar(
        difference, bounds=(0.0, duty), method="bounded", options={"xatol": 1e-3}
    )
    assert result.values["minimum internal approach"][0] == pytest.approx(pinch.fun, abs=1e-6)
    assert solution.balance.energy_closure < 1e-9


def test_an_internal_cross_the_ends_do_not_show_is_reported():
    solution = _condenser(30.0)
    result = solution.blocks["X"]
    hot_end, cold_end = (result.values[f"{end} end approach"][0] for end in ("hot", "cold"))
    assert hot_end > 30.0 and cold_end == pytest.approx(40.0)  # both ends look easy
    difference = _difference(solution)
    pinch = minimize_scalar(
        difference, bounds=(0.0, result.duty_W), method="bounded", options={"xatol": 1e-3}
    )
    assert pinch.fun < -5.0  # the cold water passes the condensing steam's temperature
    approach = result.values["minimum internal approach"][0]
    assert approach == pytest.approx(pinch.fun, abs=1e-6)
    assert "UA" not in result.values and "LMTD" not in result.values
    (warning,) = [w for w in result.warnings if "internal temperature cross" in w]
    assert f"the cold side is {-approach:.3f} K hotter than the hot side" in warning
    assert solution.balance.energy_closure < 1e-9  # the balance itself is still exact


def test_an_internal_approach_below_the_minimum_is_warned():
    solution = _condenser(60.0, minimum_approach=35.0)
    result = solution.blocks["X"]
    approach = result.values["minimum internal approach"][0]
    ends = min(result.values[f"{end} end approach"][0] for end in ("hot", "cold"))
    assert approach < 35.0 < ends  # only the inside is below the minimum
    assert any(
        "internal approach" in w and "below the minimum 35.000 K" in w for w in result.warnings
    )


def test_the_heat_curve_is_kept_by_the_case_file():
    from model.case.document import Case
    from model.case.file import case_from_json, case_to_json

    case = Case(flowsheet=condenser_sheet(60.0))
    case.solution = case.solve()
    profile = case.solution.blocks["X"].profile
    reopened = case_from_json(case_to_json(case)).solution.blocks["X"].profile
    assert reopened == profile and len(profile["hot T"]) > 21  # 20 zones + saturation cuts
