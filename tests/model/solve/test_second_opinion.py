"""The second opinion: every stream solved at once, checked against the sequential solve.

Outside solver: ``scipy.optimize.root`` (MINPACK's hybrd, Levenberg-Marquardt and
Newton-Krylov) on the simultaneous equations "stream = block output(inlets)"; it shares
no tear set, calculation order, Wegstein step or starting point with the sequential
solve. Closed forms are derived by hand in the comments (steady-state balances).

Why the sequential solves below use tolerance 1e-12: a tear converged to a scaled
residual e is off its fixed point by about e / (1 - loop gain) (Wegstein 1958's affine
analysis), e.g. 50 e for the ammonia loop's argon (gain 0.98); comparing at 1e-8 needs
a sequential answer converged well below that.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

import model.solve.second_opinion_solve as second_opinion_module
from convergence import SolverSettings
from model.case.file import load_case
from model.errors import InputError
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity
from model.properties.components import define_component, lookup_component
from model.properties.cp_correlations import CpCorrelation
from model.properties.stream_state import StreamState
from model.solve.driver import solve_flowsheet
from model.solve.second_opinion_equations import largest_relative_difference
from model.solve.second_opinion_solve import RESIDUAL_TOLERANCE, second_opinion

EXAMPLES = Path(__file__).resolve().parents[3] / "examples"
EXAMPLE_FILES = sorted(EXAMPLES.glob("*.loop.json"))
AGREEMENT = 1e-8  # issue 4: agreement with the sequential-modular result, relative


def _settings(**changes) -> SolverSettings:
    settings = SolverSettings()
    settings.update(**changes)
    return settings


def _tight_solution(sheet: Flowsheet, method: str = "wegstein", settings=None):
    settings = settings if settings is not None else SolverSettings()
    settings.update(tolerance=1e-12)
    solution = solve_flowsheet(sheet, method, settings)
    assert solution.status == "solved", solution.message
    return solution


def _loop_start(components, feed: dict[str, float]) -> Flowsheet:
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
            "T": TypedQuantity(300.0, "K"),
            "P": TypedQuantity(5.0, "bar"),
        },
    )
    sheet.add_block("Mixer", "M")
    sheet.connect("F", "out", "M", "in1", "fresh")
    return sheet


def _perfect_separator_loop(conversion: float) -> Flowsheet:
    """Mixer -> reactor (n-butane -> isobutane at X) -> separator sending all n-butane back."""
    sheet = _loop_start(("n-butane", "isobutane"), {"n-butane": 1.0})
    reaction = Reaction({"n-butane": -1, "isobutane": 1}, "n-butane", conversion, "A to B")
    sheet.add_block("Reactor", "R", specs={"reactions": [reaction], "T": TypedQuantity(400.0, "K")})
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
    sheet.connect("M", "out", "R", "in", "reactor feed")
    sheet.connect("R", "out", "S", "in", "effluent")
    sheet.connect("S", "out1", "M", "in2", "recycle")
    sheet.connect("S", "out2", "P", "in", "product")
    return sheet


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


def _feed_effluent_loop() -> Flowsheet:
    """Fresh A -> mixer -> exchanger cold side (to 500 K) -> adiabatic reactor (A -> B at
    X = 0.5) -> exchanger hot side -> splitter: half back to the mixer, half product."""
    sheet = _loop_start((_constant_cp("A", -125e3), _constant_cp("B", -135e3)), {"A": 1.0})
    reaction = Reaction({"A": -1, "B": 1}, "A", 0.5, "A to B")
    sheet.add_block(
        "Reactor", "R", specs={"reactions": [reaction], "mode": "adiabatic", "phase": "vapor"}
    )
    sheet.add_block("Exchanger", "X", specs={"cold_T": TypedQuantity(500.0, "K")})
    sheet.add_block("Splitter", "T", specs={"fractions": {"out1": 0.5}})
    sheet.add_block("Product", "P")
    sheet.connect("M", "out", "X", "cold_in", "mixed")
    sheet.connect("X", "cold_out", "R", "in", "preheated")
    sheet.connect("R", "out", "X", "hot_in", "effluent")
    sheet.connect("X", "hot_out", "T", "in", "cooled")
    sheet.connect("T", "out1", "M", "in2", "recycle")
    sheet.connect("T", "out2", "P", "in", "product")
    return sheet


@pytest.mark.parametrize("path", EXAMPLE_FILES, ids=lambda p: p.stem)
def test_agrees_with_the_sequential_solve_on_every_example(path: Path) -> None:
    # Outside route: scipy.optimize.root on all stream variables at once (no tears). The
    # shift example is the energy recycle: a feed-effluent exchanger around an adiabatic
    # reactor.
    case = load_case(path)
    solution = _tight_solution(case.flowsheet, case.method, case.settings)
    opinion = second_opinion(case.flowsheet, compare_with=solution)
    assert opinion.converged, opinion.message
    assert opinion.method == "hybr" and opinion.residual <= RESIDUAL_TOLERANCE
    assert opinion.largest_relative_difference <= AGREEMENT, opinion.message
    assert opinion.agrees is True
    assert any(opinion.worst.startswith(f"{name} ") for name in solution.streams)
    assert set(opinion.streams) == set(solution.streams)


def test_perfect_separator_loop_matches_the_closed_form_and_the_sequential_solve() -> None:
    # Hand balance on n-butane at the mixer: a = F + (1 - X) a => a = F / X, recycle
    # (1 - X) a = F (1 - X) / X; all of it leaves as isobutane (product = F).
    conversion = 0.25
    sheet = _perfect_separator_loop(conversion)
    opinion = second_opinion(sheet, compare_with=_tight_solution(sheet))
    assert opinion.converged and opinion.agrees, opinion.message
    recycle = opinion.streams["recycle"].flows
    assert recycle[0] == pytest.approx((1 - conversion) / conversion, rel=1e-9)
    assert opinion.streams["product"].flows == pytest.approx([0.0, 1.0], abs=1e-9)


def test_energy_recycle_with_constant_cp_matches_the_hand_temperatures() -> None:
    # Hand balance (c = 100 J/mol/K for A and B, dHr = -10 kJ/mol, F = 1, X = 0.5, r = 0.5,
    # T0 = 300 K, T_c = 500 K): loop flow M = 2, A at the reactor a = 4/3, the reaction
    # heats the loop by D = X a (-dHr) / (M c) = 33.33 K; T_mixed = T0 + r D / (1 - r),
    # T_cooled = T0 + D / (1 - r), T_effluent = T_c + D.
    sheet = _feed_effluent_loop()
    opinion = second_opinion(sheet, compare_with=_tight_solution(sheet))
    assert opinion.converged and opinion.agrees, opinion.message
    D = 0.5 * (4 / 3) * 10e3 / (2 * 100.0)
    assert opinion.streams["mixed"].T == pytest.approx(300.0 + D, abs=1e-6)
    assert opinion.streams["cooled"].T == pytest.approx(300.0 + 2 * D, abs=1e-6)
    assert opinion.streams["effluent"].T == pytest.approx(500.0 + D, abs=1e-6)
    assert opinion.streams["recycle"].flows == pytest.approx([1 / 3, 2 / 3], rel=1e-9)


@pytest.mark.parametrize(
    "path",
    [
        EXAMPLES / "ammonia_synthesis_loop.loop.json",
        EXAMPLES / "shift_feed_effluent_exchanger.loop.json",
    ],
    ids=["ammonia", "shift"],
)
def test_a_sequential_solve_stopped_early_disagrees(path: Path) -> None:
    # The check has teeth: three Wegstein iterations leave the tears far from their
    # fixed point, and the second opinion (itself converged) says so.
    case = load_case(path)
    stopped = solve_flowsheet(case.flowsheet, case.method, _settings(max_iterations=3))
    assert stopped.status == "not converged"
    opinion = second_opinion(case.flowsheet, compare_with=stopped)
    assert opinion.converged, opinion.message
    assert opinion.agrees is False
    assert opinion.largest_relative_difference > 1e3 * AGREEMENT
    assert "does not agree" in opinion.message and opinion.worst in opinion.message


def test_starts_from_a_crude_estimate_not_from_the_answer() -> None:
    # Start: the feed carried once with no recycle, so the start's recycle is one pass's
    # unreacted butane F (1 - X) = 0.75, not the answer F (1 - X) / X = 3.
    from model.properties.enthalpy import PropertyBasis
    from model.solve.compile import compile_flowsheet
    from model.solve.second_opinion_equations import StreamSystem, crude_start

    sheet = _perfect_separator_loop(0.25)
    basis = PropertyBasis(sheet.components)
    compiled = compile_flowsheet(sheet, basis)
    system = StreamSystem(compiled, basis, ["vapor"] * len(compiled.stream_names))
    start = crude_start(system, {})
    recycle = start[compiled.stream_index["recycle"]]
    assert recycle.flows == pytest.approx([0.75, 0.0], rel=1e-12)
    opinion = second_opinion(sheet)
    assert opinion.converged and opinion.evaluations > 3  # the root finder had work to do
    assert opinion.agrees is None and opinion.largest_relative_difference is None


@pytest.mark.parametrize("methods", [("lm",), ("krylov",)])
def test_other_root_methods_give_the_same_answer(methods) -> None:
    case = load_case(EXAMPLES / "shift_feed_effluent_exchanger.loop.json")
    solution = _tight_solution(case.flowsheet, case.method)
    opinion = second_opinion(case.flowsheet, solution, methods=methods)
    assert opinion.converged and opinion.method == methods[0], opinion.message
    assert opinion.largest_relative_difference <= AGREEMENT


def test_falls_back_to_the_next_method_when_hybr_stops_short(monkeypatch) -> None:
    original = second_opinion_module._options

    def starved(method: str, size: int) -> dict:
        options = original(method, size)
        return {**options, "maxfev": 3} if method == "hybr" else options

    monkeypatch.setattr(second_opinion_module, "_options", starved)
    sheet = _perfect_separator_loop(0.5)
    opinion = second_opinion(sheet, _tight_solution(sheet))
    assert opinion.converged and opinion.method == "lm", opinion.message
    assert opinion.agrees


def test_flowsheet_without_recycle_is_exact_from_the_start() -> None:
    sheet = _loop_start(("water",), {"water": 1.0})
    sheet.add_block("Heater", "H", specs={"T": TypedQuantity(80.0, "degC"), "phase": "vapor"})
    sheet.add_block("Product", "P")
    sheet.connect("M", "out", "H", "in", "mixed")
    sheet.connect("H", "out", "P", "in", "heated")
    opinion = second_opinion(sheet, solve_flowsheet(sheet))
    assert opinion.converged and opinion.method.startswith("none")
    assert opinion.largest_relative_difference == 0.0 and opinion.agrees
    assert opinion.streams["heated"].T == pytest.approx(353.15, abs=1e-12)


def test_reads_the_flowsheet_only_and_emits_no_signal() -> None:
    from model.case.document import Case
    from model.case.file import case_to_json
    from model.flowsheet.events import SignalInstance

    sheet = _feed_effluent_loop()
    before = case_to_json(Case(flowsheet=sheet))
    emitted = []
    for name in dir(sheet):
        signal = getattr(sheet, name)
        if isinstance(signal, SignalInstance):
            signal.connect(lambda *args, name=name: emitted.append(name))
    opinion = second_opinion(sheet)
    assert opinion.converged
    assert emitted == []
    assert case_to_json(Case(flowsheet=sheet)) == before


def test_needs_input_is_a_result_not_an_exception() -> None:
    sheet = _perfect_separator_loop(0.5)
    sheet.remove_stream("recycle")
    opinion = second_opinion(sheet, compare_with=solve_flowsheet(sheet))
    assert not opinion.converged and opinion.message.startswith("needs input")
    assert opinion.agrees is None and opinion.streams == {}


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"tolerance": 0.0}, "tolerance"),
        ({"tolerance": float("nan")}, "tolerance"),
        ({"methods": ("newton",)}, "methods"),
        ({"methods": ()}, "methods"),
    ],
)
def test_bad_arguments_raise_an_error_naming_the_field(changes, field) -> None:
    with pytest.raises(InputError) as caught:
        second_opinion(_perfect_separator_loop(0.5), **changes)
    assert caught.value.field == field


def test_relative_difference_counts_flows_against_their_stream_and_names_the_worst() -> None:
    names = ["a", "b"]
    reference = {"S1": StreamState(np.array([1.0, 1e-6]), 400.0, 2e5, "vapor")}
    # A trace difference of 1e-9 mol/s in a 1 mol/s stream is 1e-9 relative, not 1e-3.
    trace = {"S1": StreamState(np.array([1.0, 1e-6 + 1e-9]), 400.0, 2e5, "vapor")}
    difference, worst = largest_relative_difference(trace, reference, names, 1e-9)
    assert difference == pytest.approx(1e-9 / (1.0 + 1e-6 + 1e-9), rel=1e-6) and worst == "S1 b"
    warmer = {"S1": StreamState(np.array([1.0, 1e-6]), 404.0, 2e5, "vapor")}
    assert largest_relative_difference(warmer, reference, names, 1e-9) == (
        pytest.approx(4.0 / 404.0),
        "S1 T",
    )
    liquid = {"S1": StreamState(np.array([1.0, 1e-6]), 400.0, 2e5, "liquid")}
    assert largest_relative_difference(liquid, reference, names, 1e-9) == (np.inf, "S1 phase")
    assert largest_relative_difference({}, reference, names, 1e-9) == (np.inf, "S1 missing")


def test_flowsheet_without_a_steady_state_is_not_converged() -> None:
    # Nitrogen is fed and every bit of it is recycled: no steady state exists (its loop
    # flow grows without bound), so no root may pass for one, however small its residual
    # relative to the huge flows.
    sheet = _loop_start(("n-butane", "isobutane", "nitrogen"), {"n-butane": 1.0, "nitrogen": 0.1})
    reaction = Reaction({"n-butane": -1, "isobutane": 1}, "n-butane", 0.3, "A to B")
    sheet.add_block("Reactor", "R", specs={"reactions": [reaction], "T": TypedQuantity(400, "K")})
    split = ComponentAmounts({"n-butane": 1.0, "nitrogen": 1.0}, "fraction to first outlet")
    sheet.add_block("Separator", "S", specs={"split": split, "phase1": "vapor", "phase2": "vapor"})
    sheet.add_block("Product", "P")
    sheet.connect("M", "out", "R", "in")
    sheet.connect("R", "out", "S", "in")
    sheet.connect("S", "out1", "M", "in2", "recycle")
    sheet.connect("S", "out2", "P", "in")
    opinion = second_opinion(sheet)
    assert not opinion.converged and opinion.residual > 1e3 * RESIDUAL_TOLERANCE
    assert opinion.message.startswith("not converged")


def test_no_pint_quantity_is_created_after_compiling(monkeypatch) -> None:
    """Like a flowsheet pass, every residual evaluation runs on floats only."""
    import pint

    from units_of_measure.registry import ureg

    real_compile = second_opinion_module.compile_flowsheet

    def refuse(cls, *args, **kwargs):
        raise AssertionError("a pint Quantity was created during the second opinion")

    def compile_then_forbid_pint(*args, **kwargs):
        compiled = real_compile(*args, **kwargs)
        monkeypatch.setattr(pint.Quantity, "__new__", refuse)
        return compiled

    monkeypatch.setattr(second_opinion_module, "compile_flowsheet", compile_then_forbid_pint)
    opinion = second_opinion(_feed_effluent_loop())
    assert opinion.converged and opinion.evaluations > 3
    with pytest.raises(AssertionError, match="pint Quantity"):
        ureg.Quantity(1.0, "m")  # the trap was armed
