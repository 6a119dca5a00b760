"""The cheap single-stream path of a flowsheet pass: still right, and still cheap.

A pass asks for one stream's enthalpy at a time. That path sums the TRC ideal-gas
correlation term by term (Python floats for few components, numpy rows for many)
instead of calling the bit-exact vectorised functions, and remembers its last few
results, so that a block's inlet is not evaluated again right after the block upstream
evaluated it as its outlet; and a block keeps each component's molar enthalpy and Cp
at the temperature its search evaluated last (and at an inlet's temperature), so that
the next pass's first step there is a dot product. These tests pin each of those down:
agreement with chemicals' ``TRCCp`` / ``TRCCp_integral`` (Kabo & Roganov 1994,
chemicals 1.5.2) and with the vectorised path, no stale remembered values, a
temperature solve converged to rounding, and the number of correlation evaluations of
a block (counts, not timings; the timings are in tests/benchmarks).
"""

from __future__ import annotations

import numpy as np
import pytest
from chemicals.heat_capacity import TRC_gas_data, TRCCp, TRCCp_integral

from model.blocks import compute_block
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, TypedQuantity
from model.properties.components import lookup_component
from model.properties.cp_correlations import SCALAR_PATH_LIMIT, TRC, CpCorrelation, CpTable
from model.properties.enthalpy import KeptMolarValues, PropertyBasis
from model.properties.stream_state import StreamState
from model.solve.compile import compile_flowsheet

TEMPERATURES = (10.0, 60.0, 150.0, 298.15, 523.4, 1000.0, 2500.0, 6000.0)
# Relative to the larger of |H(T) - H(0)| and |H(298.15 K) - H(0)|. The correlation's own
# terms can be thousands of times its value (CAS 53214-97-4: terms of 8.5e7 J/mol for an
# integral of 3.2e4 J/mol at 597 K), so both chemicals and we round at about 1e-16 of
# the terms: 1e-11 of the value covers that cancellation, not a formula error.
ENTHALPY_RELATIVE = 1e-11
HEAT_CAPACITY_RELATIVE = 1e-12


@pytest.fixture(scope="module")
def trc_rows() -> np.ndarray:
    """Every usable row of chemicals' TRC_gas_data (a6 + a7 > 0), as (rows, 8)."""
    table = TRC_gas_data[(TRC_gas_data["a6"] + TRC_gas_data["a7"]) > 0]
    return table[[f"a{i}" for i in range(8)]].to_numpy(dtype=float)


def _table(rows: np.ndarray) -> CpTable:
    return CpTable([CpCorrelation(TRC, tuple(row), 50.0, 3000.0, "TRC_gas_data") for row in rows])


def _chemicals(rows: np.ndarray, T: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per row: sensible enthalpy from 298.15 K, Cp, and the scale of the enthalpy check."""
    # source: chemicals 1.5.2 TRCCp / TRCCp_integral (Kabo & Roganov 1994)
    at_T = np.array([TRCCp_integral(T, *row) for row in rows])
    at_reference = np.array([TRCCp_integral(298.15, *row) for row in rows])
    cp = np.array([TRCCp(T, *row) for row in rows])
    return at_T - at_reference, cp, np.maximum(np.abs(at_T), np.abs(at_reference))


def test_scalar_path_matches_chemicals_for_every_trc_row(trc_rows):
    table = _table(trc_rows)
    one = np.zeros(len(trc_rows))
    for T in TEMPERATURES:
        sensible, cp, scale = _chemicals(trc_rows, T)
        for row in range(len(trc_rows)):
            one[row] = 1.0  # one component with flow: the Python-float path
            enthalpy, heat_capacity = table.stream_totals(one, T)
            one[row] = 0.0
            assert abs(enthalpy - sensible[row]) <= ENTHALPY_RELATIVE * scale[row], (T, row)
            assert heat_capacity == pytest.approx(cp[row], rel=HEAT_CAPACITY_RELATIVE), (T, row)


def test_array_path_matches_chemicals_for_all_rows_at_once(trc_rows):
    table = _table(trc_rows)
    flows = np.random.default_rng(11).uniform(0.0, 2.0, len(trc_rows))
    assert np.count_nonzero(flows) > SCALAR_PATH_LIMIT  # so the numpy rows are used
    for T in TEMPERATURES:
        sensible, cp, scale = _chemicals(trc_rows, T)
        enthalpy, heat_capacity = table.stream_totals(flows, T)
        assert abs(enthalpy - flows @ sensible) <= ENTHALPY_RELATIVE * (flows @ scale), T
        assert heat_capacity == pytest.approx(flows @ cp, rel=HEAT_CAPACITY_RELATIVE), T


def test_both_paths_agree_with_the_vectorised_enthalpy_of_a_large_basis(trc_rows):
    # 30 library components: all with flow takes the numpy rows, three with flow the floats
    names = [
        "methane", "ethane", "propane", "n-butane", "isobutane", "n-pentane", "n-hexane",
        "n-heptane", "n-octane", "ethylene", "propylene", "benzene", "toluene", "o-xylene",
        "cyclohexane", "methanol", "ethanol", "acetone", "water", "hydrogen", "nitrogen",
        "oxygen", "argon", "carbon monoxide", "carbon dioxide", "ammonia", "hydrogen sulfide",
        "sulfur dioxide", "acetic acid", "dimethyl ether",
    ]  # fmt: skip
    basis = PropertyBasis([lookup_component(name) for name in names])
    rng = np.random.default_rng(5)
    sparse = np.zeros(len(names))
    sparse[[0, 18, 20]] = (1.0, 2.0, 0.5)
    for flows in (rng.uniform(0.1, 3.0, len(names)), sparse):
        for T, liquid in ((250.0, True), (400.0, False), (1300.0, False), (330.0, True)):
            vectorised = basis.enthalpy_flow(flows[None, :], [T], [liquid])[0]
            capacity = basis.heat_capacity_flow(flows[None, :], [T], [liquid])[0]
            single, single_capacity = basis.stream_enthalpy_and_heat_capacity_flow(flows, T, liquid)
            assert single == pytest.approx(vectorised, rel=1e-12)
            assert single_capacity == pytest.approx(capacity, rel=1e-12)


def test_remembered_enthalpy_follows_the_flows_not_the_array(monkeypatch):
    basis = PropertyBasis([lookup_component("nitrogen"), lookup_component("water")])
    evaluations = _count_evaluations(monkeypatch)
    state = StreamState(np.array([1.0, 2.0]), 400.0, 1e5, "vapor")
    first = state.enthalpy_flow(basis)
    assert state.enthalpy_flow(basis) == first and evaluations == [1]  # asked again: kept
    state.flows[1] = 3.0  # changed in place: the same array, other numbers
    fresh = PropertyBasis(basis.components).stream_enthalpy_flow(np.array([1.0, 3.0]), 400.0, False)
    assert state.enthalpy_flow(basis) == fresh != first
    state.T = 400.0 + 1e-9
    assert state.enthalpy_flow(basis) != fresh
    state.phase = "liquid"
    assert state.enthalpy_flow(basis) < fresh  # the heat of vaporization comes off


def test_temperature_solve_lands_on_the_root_to_rounding():
    # Outer solvers difference the pass: the inner T solve must not leave a 1e-10 K error
    basis = PropertyBasis([lookup_component(n) for n in ("methane", "water", "nitrogen")])
    rng = np.random.default_rng(3)
    for _ in range(200):
        flows = rng.uniform(0.0, 5.0, 3)
        liquid = bool(rng.uniform() < 0.3)
        T = rng.uniform(200.0, 500.0) if liquid else rng.uniform(60.0, 3000.0)
        target = basis.enthalpy_flow(flows[None, :], [T], [liquid])[0]
        guess = T + rng.choice([-150.0, -20.0, 3.0, 40.0, 300.0])
        found = basis.temperature_from_enthalpy(flows, target, liquid, guess)
        assert found == pytest.approx(T, abs=1e-11, rel=1e-13)


@pytest.mark.parametrize("size", [3, 30])  # the Python-float path, and numpy's past 24
def test_molar_values_weighted_by_flows_match_the_vectorised_stream_enthalpy(size):
    names = [
        "methane", "water", "nitrogen", "ethane", "propane", "n-butane", "isobutane",
        "n-pentane", "n-hexane", "n-heptane", "n-octane", "ethylene", "propylene", "benzene",
        "toluene", "o-xylene", "cyclohexane", "methanol", "ethanol", "acetone", "hydrogen",
        "oxygen", "argon", "carbon monoxide", "carbon dioxide", "ammonia", "hydrogen sulfide",
        "sulfur dioxide", "acetic acid", "dimethyl ether",
    ][:size]  # fmt: skip
    basis = PropertyBasis([lookup_component(name) for name in names])
    flows = np.random.default_rng(7).uniform(0.1, 3.0, size)
    for T, liquid in ((250.0, True), (400.0, False), (1300.0, False), (330.0, True)):
        enthalpy, heat_capacity = basis.molar_values(T, liquid) @ flows
        # the vectorised forms follow chemicals' TRCCp / TRCCp_integral operation by
        # operation; the molar values regroup the same terms: equal to rounding
        assert enthalpy == pytest.approx(
            basis.enthalpy_flow(flows[None, :], [T], [liquid])[0], rel=1e-12
        )
        assert heat_capacity == pytest.approx(
            basis.heat_capacity_flow(flows[None, :], [T], [liquid])[0], rel=1e-12
        )


def test_temperature_solve_with_kept_molar_values_lands_on_the_root_to_rounding():
    # as from pass to pass: one KeptMolarValues for a stream whose flows and target move
    basis = PropertyBasis([lookup_component(n) for n in ("methane", "water", "nitrogen")])
    rng = np.random.default_rng(4)
    kept = KeptMolarValues()
    for _ in range(200):
        flows = rng.uniform(0.0, 5.0, 3)
        liquid = bool(rng.uniform() < 0.3)
        T = rng.uniform(200.0, 500.0) if liquid else rng.uniform(60.0, 3000.0)
        target = basis.enthalpy_flow(flows[None, :], [T], [liquid])[0]
        start = kept.T if kept.T is not None else 298.15
        found = basis.temperature_from_enthalpy(flows, target, liquid, start, kept)
        assert found == pytest.approx(T, abs=1e-11, rel=1e-13)


def _count_evaluations(monkeypatch) -> list[int]:
    """Count the correlation evaluations of the single-stream path, weighted by the flows
    or per component (remembered ones and dot products with kept ones are free)."""
    count = [0]
    totals, molar = CpTable.stream_totals, CpTable.molar_values

    def counted_totals(table, flows, T):
        count[0] += 1
        return totals(table, flows, T)

    def counted_molar(table, T):
        count[0] += 1
        return molar(table, T)

    monkeypatch.setattr(CpTable, "stream_totals", counted_totals)
    monkeypatch.setattr(CpTable, "molar_values", counted_molar)
    return count


def _compiled(*specs: tuple[str, str, dict]):
    """A Feed 'F' (nitrogen 2, water 1 mol/s, 320 K vapor) -> blocks -> Product 'P'."""
    sheet = Flowsheet()
    for name in ("nitrogen", "water", "methane"):
        sheet.add_component(lookup_component(name))
    flows = ComponentAmounts({"nitrogen": 2.0, "water": 1.0}, "mol/s")
    feed = {"flows": flows, "T": TypedQuantity(320.0, "K"), "P": TypedQuantity(2.0, "bar")}
    sheet.add_block("Feed", "F", specs={**feed, "phase": "vapor"})
    previous = "F"
    for kind, name, block_specs in specs:
        sheet.add_block(kind, name, specs=block_specs)
        sheet.connect(previous, "out", name, "in")
        previous = name
    sheet.add_block("Product", "P")
    sheet.connect(previous, "out", "P", "in")
    basis = PropertyBasis(sheet.components)
    return compile_flowsheet(sheet, basis), basis


def test_duty_heater_after_a_set_temperature_heater_starts_from_its_heat_capacity(monkeypatch):
    compiled, basis = _compiled(
        ("Heater", "H1", {"T": TypedQuantity(400.0, "K")}),
        ("Heater", "H2", {"mode": "duty", "duty": TypedQuantity(5.0, "kW")}),
    )
    inlet = StreamState(np.array([2.0, 1.0, 0.0]), 320.0, 2e5, "vapor")
    heated = compute_block(compiled.blocks["H1"], [inlet], basis).outlets["out"]
    assert heated.enthalpy is not None and heated.heat_capacity is not None
    evaluations = _count_evaluations(monkeypatch)
    outlet = compute_block(compiled.blocks["H2"], [heated], basis).outlets["out"]
    # H2's inlet enthalpy and heat capacity are H1's, carried on the state: Newton starts
    # at 400 K + 5 kW / Cp (about 456 K) and needs two evaluations, where from 400 K it
    # needed four (a last Newton step small enough that its linearisation error is below
    # 1e-9 K is taken without a third evaluation to confirm it)
    assert evaluations == [2]
    expected = basis.stream_enthalpy_flow(heated.flows, 400.0, False) + 5000.0
    assert basis.stream_enthalpy_flow(outlet.flows, outlet.T, False) == pytest.approx(
        expected, rel=1e-13
    )


def test_next_pass_starts_where_the_search_evaluated_last(monkeypatch):
    compiled, basis = _compiled(("Heater", "H", {"mode": "duty", "duty": TypedQuantity(5.0, "kW")}))
    inlet = StreamState(np.array([2.0, 1.0, 0.0]), 320.0, 2e5, "vapor")
    first = compute_block(compiled.blocks["H"], [inlet], basis).outlets["out"]
    evaluations = _count_evaluations(monkeypatch)
    again = compute_block(compiled.blocks["H"], [inlet], basis).outlets["out"]
    # the same inlet: the kept molar values at the last point give the step (below
    # 1e-9 K) by a dot product; no evaluation of the correlations
    assert evaluations == [0]
    assert again.T == pytest.approx(first.T, abs=1e-9)
    moved = StreamState(np.array([2.0, 1.001, 0.0]), 320.0, 2e5, "vapor")
    outlet = compute_block(compiled.blocks["H"], [moved], basis).outlets["out"]
    # a recycle whose flows moved at the same T (as a tear's from a set temperature): the
    # inlet's enthalpy (this state carries none) comes from the molar values the block
    # kept at 320 K, the search's first step is still free, then Newton needs one more
    # (its step then is small enough to be taken unconfirmed)
    assert evaluations == [1]
    expected = basis.stream_enthalpy_flow(moved.flows, 320.0, False) + 5000.0
    assert basis.stream_enthalpy_flow(moved.flows, outlet.T, False) == pytest.approx(
        expected, rel=1e-13
    )
