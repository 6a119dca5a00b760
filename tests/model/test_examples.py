"""Every example case in ``examples/`` opens, converges and closes its balances.

The expected flows are hand balances over the whole plant (steady state: what enters
leaves or reacts), worked out in the comments; they do not depend on the solver.
"""

from __future__ import annotations

import importlib.util
from pathlib import Path

import pytest

from convergence import SolverSettings
from model.case.file import case_to_json, load_case

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
EXAMPLE_FILES = sorted(EXAMPLES.glob("*.loop.json"))
KMOL_H = 1000.0 / 3600.0  # mol/s in 1 kmol/h (exact)


def _build_module():
    spec = importlib.util.spec_from_file_location("build_examples", EXAMPLES / "build_examples.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _solved(path: Path, default_settings: bool = False, specs_only: bool = False):
    case = load_case(path)
    if default_settings:
        case.settings = SolverSettings()
    if specs_only:  # the specs as they stand, without the case's targets adjusting them
        case.flowsheet.targets = []
    return case, case.solve()


def test_there_are_at_least_three_examples_each_labelled_invented() -> None:
    assert len(EXAMPLE_FILES) >= 3
    readme = (EXAMPLES / "README.md").read_text("utf-8")
    for path in EXAMPLE_FILES:
        case = load_case(path)
        assert "(invented)" in case.title and case.notes.startswith("Invented scenario")
        assert path.name in readme
    assert readme.count("*Invented.*") >= len(EXAMPLE_FILES)


def test_committed_files_are_what_the_build_script_writes(tmp_path: Path) -> None:
    written = _build_module().build(tmp_path)
    assert sorted(p.name for p in written) == [p.name for p in EXAMPLE_FILES]
    for path in written:
        assert path.read_text("utf-8") == (EXAMPLES / path.name).read_text("utf-8"), path.name


@pytest.mark.parametrize("path", EXAMPLE_FILES, ids=lambda p: p.stem)
def test_example_converges_with_default_settings(path: Path) -> None:
    case, solution = _solved(path, default_settings=True)
    assert solution.status == "solved", solution.message
    assert (
        solution.tear_streams and solution.convergence.iterations <= SolverSettings().max_iterations
    )
    assert solution.balance.mass_closure <= 10 * SolverSettings().tolerance


@pytest.mark.parametrize("path", EXAMPLE_FILES, ids=lambda p: p.stem)
def test_example_as_saved_converges_and_its_balances_close(path: Path) -> None:
    case, solution = _solved(path)
    assert solution.converged, solution.message
    tolerance = case.settings.tolerance
    closures = {
        "mass": solution.balance.mass_closure,
        "elements": solution.balance.element_closure,
        "energy": solution.balance.energy_closure,
    }
    assert all(value <= 10 * tolerance for value in closures.values()), closures
    assert solution.balance.closes


@pytest.mark.parametrize("path", EXAMPLE_FILES, ids=lambda p: p.stem)
def test_solving_a_reopened_example_gives_identical_numbers(path: Path, tmp_path: Path) -> None:
    from model.case.file import save_case

    case, solution = _solved(path)
    copy_path = tmp_path / path.name
    save_case(case, copy_path)
    reopened = load_case(copy_path)
    assert reopened.solution.to_dict() == solution.to_dict()  # the stored results
    again = reopened.solve()
    for name, state in solution.streams.items():  # bitwise equal, not approximately
        other = again.streams[name]
        assert other.flows.tobytes() == state.flows.tobytes(), name
        assert (other.T, other.P, other.phase) == (state.T, state.P, state.phase), name
    assert case_to_json(reopened) == case_to_json(case)


def test_ammonia_loop_purges_exactly_the_argon_fed() -> None:
    # the purge fraction as specified (2 %), not as the example's target adjusts it
    case, solution = _solved(EXAMPLES / "ammonia_synthesis_loop.loop.json", specs_only=True)
    streams, names = solution.streams, solution.component_names
    argon = names.index("argon")
    # Hand balance: argon leaves with the purge (2 % of the loop gas) and dissolved in the
    # liquid ammonia the flash drum computes, so 300 kmol/h x 0.005 = 1.5 kmol/h is
    # 0.02 x (argon in the loop gas) + (argon in the liquid).
    purged = streams["Purge"].flows[argon]
    dissolved = streams["Ammonia"].flows[argon]
    assert purged == pytest.approx(0.02 * streams["Loop gas"].flows[argon], rel=1e-12)
    assert purged + dissolved == pytest.approx(1.5 * KMOL_H, rel=1e-9)
    assert 0.0 < dissolved < 0.1 * purged  # Henry's law keeps most argon in the gas
    # 25 % of the nitrogen entering the converter reacts (fixed conversion).
    nitrogen = names.index("nitrogen")
    fed = streams["Converter feed"].flows[nitrogen]
    assert streams["Converter effluent"].flows[nitrogen] == pytest.approx(0.75 * fed, rel=1e-12)


def test_ammonia_loop_converges_fast_at_default_settings_and_crawls_with_the_old_rules() -> None:
    path = EXAMPLES / "ammonia_loop_fixed_split.loop.json"  # the linear variant
    tolerance = SolverSettings().tolerance
    _, default = _solved(path, default_settings=True, specs_only=True)  # purge 2 %
    argon = default.component_names.index("argon")
    # Hand balance: the loop gas carries 300 kmol/h x 0.005 / 0.02 = 75 kmol/h of argon.
    argon_in, argon_out = default.balance.elements["Ar"]
    assert default.converged and default.convergence.iterations <= 10
    assert abs(argon_out - argon_in) / argon_in < 10 * tolerance
    loop_argon = default.streams["Loop gas"].flows[argon]
    assert loop_argon == pytest.approx(75.0 * KMOL_H, rel=10 * tolerance)
    # The old rules (q fixed within [-5, 0], stop on the residual) crawl: purging 2 %
    # leaves 98 % of the argon in the loop each pass, slope 0.98 (hand value), so
    # q = 0.98 / (0.98 - 1) = -49 lies beyond q_min = -5.
    case = load_case(path)
    case.settings = SolverSettings(q_min=-5.0, adaptive_bounds=False, stop_on="residual")
    case.flowsheet.targets = []
    old = case.solve()
    diagnosis = old.convergence.diagnosis["Recycle gas"]
    assert diagnosis.slope == pytest.approx(0.98, abs=0.005)
    assert diagnosis.blocked_by_bounds and "q_min" in diagnosis.advice
    assert old.convergence.converged and old.convergence.iterations > 100
    # ... and stopping on the residual leaves the argon balance open: reported as failed
    assert not old.converged and "balances do not close" in old.message


def test_ammonia_loop_target_gives_the_closed_form_purge_for_8_percent_argon() -> None:
    """The example's own target: the purge fraction at which argon in = argon purged
    leaves 8 mol % argon in the recycle gas, derived by hand in
    tests/model/solve/ammonia_closed_form.py (a quadratic in the purge fraction)."""
    from tests.model.solve.ammonia_closed_form import example_loop

    case, solution = _solved(EXAMPLES / "ammonia_loop_fixed_split.loop.json")
    (target,) = case.flowsheet.targets
    assert str(target.adjusted) == "Purge splitter.fractions[out2]"
    assert solution.converged and solution.targets.all_met
    expected = example_loop(case).purge_for_argon(0.08)
    # 1e-6: the target tolerance is 1e-7 on the argon fraction, the recycle's 1e-8
    assert abs(solution.targets.results[0].adjusted - expected) <= 1e-6 * expected
    assert abs(solution.targets.results[0].adjusted - expected) <= 1e-6


def test_shift_example_converts_three_quarters_of_the_carbon_monoxide() -> None:
    case, solution = _solved(EXAMPLES / "shift_feed_effluent_exchanger.loop.json")
    names, streams = solution.component_names, solution.streams
    co, h2 = names.index("carbon monoxide"), names.index("hydrogen")
    # Hand balance: 1000 kmol/h x 12 % CO = 120 kmol/h, 75 % shifted = 90 kmol/h extent.
    assert streams["Product gas"].flows[co] == pytest.approx(30.0 * KMOL_H, rel=1e-12)
    assert streams["Product gas"].flows[h2] == pytest.approx(540.0 * KMOL_H, rel=1e-12)
    # The tear carries heat only: its flows equal the feed's, its temperature is recycled.
    tear = solution.tear_streams[0]
    assert tear == "Preheated gas"
    assert streams[tear].flows.tobytes() == streams["Raw gas"].flows.tobytes()
    assert streams[tear].T > streams["Raw gas"].T + 50.0
    # Exchanger: the heat the cold side gains is the heat the hot side loses.
    basis = solution.basis
    gained = streams[tear].enthalpy_flow(basis) - streams["Raw gas"].enthalpy_flow(basis)
    lost = streams["Exchanger hot side"].enthalpy_flow(basis) - streams[
        "Cooled effluent"
    ].enthalpy_flow(basis)
    assert gained == pytest.approx(lost, rel=1e-9)
    assert solution.blocks["Feed-effluent exchanger"].duty_W == pytest.approx(gained, rel=1e-9)


def test_hydration_example_has_two_loops_through_one_tear() -> None:
    case, solution = _solved(EXAMPLES / "ethylene_hydration_two_recycles.loop.json")
    names, streams = solution.component_names, solution.streams
    ethanol, water = names.index("ethanol"), names.index("water")
    # Hand balance: ethylene leaves only by reaction, so all 100 kmol/h react; ethanol
    # leaves only with the crude ethanol and water with it: 150 fed - 100 reacted = 50.
    assert streams["Crude ethanol"].flows[ethanol] == pytest.approx(100.0 * KMOL_H, rel=1e-7)
    assert streams["Crude ethanol"].flows[water] == pytest.approx(50.0 * KMOL_H, rel=1e-7)
    # Both recycles (gas and water) pass through the reactor, so one tear breaks both.
    assert len(solution.tear_streams) == 1
    assert streams["Recycle gas"].total_molar_flow() > 5 * streams["Ethylene"].total_molar_flow()
    assert streams["Recycle water"].flows[water] > 2 * streams["Make-up water"].flows[water]
