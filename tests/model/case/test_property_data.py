"""The property method's constants recorded in the case file ("property_data").

Outside sources of the checks:
- Henry constants: thermo's own "Sander T dep" table (``thermo.interaction_parameters.IPDB``,
  data file Interaction Parameters/Sander_henry_T_dep.json, Sander 2015), exactly;
- Antoine coefficients: chemicals ``Psat_data_AntoinePoling`` (Poling et al. 5th ed.), exactly;
- kij: thermo's ``IPDB.get_ip_asymmetric_matrix("ChemSep PR", ...)``, exactly; acentric
  factors: chemicals ``omega``, exactly;
- the flash with a user-edited kij: thermo ``FlashVL`` with ``PRMIX`` set up in the test
  with that kij (tests/model/properties/test_peng_robinson.py), 1e-6 relative.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path

import numpy as np
import pytest

from model.case.document import Case
from model.case.file import case_from_dict, case_from_json, case_to_json
from model.errors import CaseFileError
from model.flowsheet.spec_values import TypedQuantity
from model.properties import property_data as property_data_module
from model.properties.property_method import case_basis, equilibrium_for
from model.report.text import solution_report, solution_summary
from model.solve.driver import solve_flowsheet

thermo = pytest.importorskip("thermo")
EXAMPLES = Path(__file__).resolve().parents[3] / "examples"
HC = ["methane", "ethane", "propane"]


def _ammonia() -> dict:
    return json.loads((EXAMPLES / "ammonia_synthesis_loop.loop.json").read_text("utf-8"))


def _peng_robinson_case() -> Case:
    from tests.model.blocks.test_flash_drum import _drum

    flows = {"methane": 0.5, "ethane": 0.3, "propane": 0.2}
    specs = {"mode": "temperature", "T": TypedQuantity(230, "K")}
    sheet = _drum(specs, T_feed=230.0, phase="vapor", flows=flows, P_bar=30.0)
    sheet.set_property_method("Peng-Robinson")
    return Case(flowsheet=sheet)


def _problems(data: dict) -> dict[str, str]:
    with pytest.raises(CaseFileError) as caught:
        case_from_dict(data, "test.loop.json")
    return {problem.path: str(problem) for problem in caught.value.problems}


def test_ideal_case_records_henry_and_antoine_constants_of_thermo_and_chemicals():
    from chemicals.vapor_pressure import Psat_data_AntoinePoling
    from thermo.interaction_parameters import IPDB

    data = _ammonia()
    recorded = data["property_data"]["vapor_pressure"]
    sander = IPDB.tables["Sander T dep"]  # thermo's own table, solute then water
    for component in data["components"]:
        entry = recorded[component["name"]]
        row = sander[f"{component['cas']} 7732-18-5"]
        assert (entry["henry"]["A"], entry["henry"]["B"]) == (row["A"], row["B"])
        assert "Sander_henry_T_dep.json" in entry["henry"]["source"]
        assert "Sander 2015" in entry["henry"]["source"]
        poling = Psat_data_AntoinePoling.loc[component["cas"]]
        antoine = entry["antoine"]
        assert (antoine["A"], antoine["B"], antoine["C"]) == (poling.A, poling.B, poling.C)
        assert "Psat_data_AntoinePoling" in antoine["source"]


def test_peng_robinson_case_records_chemsep_kij_and_omega_and_solves_with_them():
    from chemicals.acentric import omega
    from thermo.interaction_parameters import IPDB

    case = _peng_robinson_case()
    data = json.loads(case_to_json(case))["property_data"]
    cas = [c.cas for c in case.flowsheet.components]
    reference = IPDB.get_ip_asymmetric_matrix("ChemSep PR", cas, "kij")  # thermo's table
    pairs = {tuple(p["components"]): p for p in data["binary_parameters"]}
    assert set(pairs) == {("methane", "ethane"), ("methane", "propane"), ("ethane", "propane")}
    for (a, b), pair in pairs.items():
        i, j = HC.index(a), HC.index(b)
        assert pair["kij"] == reference[i][j]
        assert "ChemSep PR" in pair["source"] and "pr.json" in pair["source"]
    for name, c in zip(HC, cas, strict=True):
        assert data["acentric_factor"][name]["value"] == omega(c)  # chemicals' default
    reopened = case_from_json(case_to_json(case))
    equilibrium = equilibrium_for(case_basis(reopened.flowsheet))
    assert equilibrium.kijs == [[float(k) for k in row] for row in reference]


def test_user_edited_kij_in_the_file_is_used_at_solve_time():
    data = json.loads(case_to_json(_peng_robinson_case()))
    for pair in data["property_data"]["binary_parameters"]:
        if pair["components"] == ["methane", "propane"]:
            pair["kij"], pair["source"] = 0.3, "edited by hand"
    case = case_from_dict(data)
    solution = solve_flowsheet(case.flowsheet)
    assert solution.converged, solution.message
    edited = _edited_reference(case, 0.3)
    reference = edited.flash(T=230.0, P=30e5, zs=[0.5, 0.3, 0.2])
    assert solution.streams["vapor"].flows.sum() == pytest.approx(reference.VF, rel=1e-6)
    unedited = _edited_reference(case, None).flash(T=230.0, P=30e5, zs=[0.5, 0.3, 0.2])
    assert abs(unedited.VF - reference.VF) > 1e-4  # the edit matters at these conditions
    assert "kij methane–propane: 0.3 (edited by hand)" in solution_report(solution, "Metric")


def _edited_reference(case: Case, methane_propane: float | None):
    """thermo's PR flash set up here, with ChemSep's kij, one of them replaced."""
    from chemicals.acentric import omega
    from chemicals.critical import Pc, Tc
    from thermo import CEOSGas, CEOSLiquid, ChemicalConstantsPackage, FlashVL
    from thermo.eos_mix import PRMIX
    from thermo.interaction_parameters import IPDB

    cas = [c.cas for c in case.flowsheet.components]
    kijs = IPDB.get_ip_asymmetric_matrix("ChemSep PR", cas, "kij")
    if methane_propane is not None:
        kijs[0][2] = kijs[2][0] = methane_propane
    Tcs, Pcs, omegas = [Tc(c) for c in cas], [Pc(c) for c in cas], [omega(c) for c in cas]
    constants = ChemicalConstantsPackage(Tcs=Tcs, Pcs=Pcs, omegas=omegas, MWs=[1.0] * 3)
    eos = {"Tcs": Tcs, "Pcs": Pcs, "omegas": omegas, "kijs": kijs}
    return FlashVL(
        constants,
        None,
        liquid=CEOSLiquid(PRMIX, eos_kwargs=eos),
        gas=CEOSGas(PRMIX, eos_kwargs=eos),
    )


def test_recorded_kij_survive_a_change_of_the_library_table(monkeypatch):
    text = case_to_json(_peng_robinson_case())
    monkeypatch.setattr(property_data_module, "_chemsep_pr_table", lambda: {})
    reopened = case_from_json(text)
    kijs = equilibrium_for(case_basis(reopened.flowsheet)).kijs
    assert kijs[0][2] != 0.0  # still ChemSep's methane-propane, from the file
    fresh = _peng_robinson_case()  # a new case takes the (now empty) table: zeros
    assert equilibrium_for(case_basis(fresh.flowsheet)).kijs[0][2] == 0.0


@pytest.mark.parametrize(
    ("kij", "words"),
    [
        (float("nan"), "finite"),
        (1.0, "-1 < kij < 1"),
        (-1.5, "-1 < kij < 1"),
        ("0.1", "a number"),
    ],
)
def test_bad_kij_is_refused_naming_field_and_value(kij, words):
    data = json.loads(case_to_json(_peng_robinson_case()))
    data["property_data"]["binary_parameters"][0]["kij"] = kij
    problems = _problems(data)
    message = problems["property_data.binary_parameters[0].kij"]
    assert words in message and repr(kij)[:3] in message


@pytest.mark.parametrize(
    "pair", [["methane", "butane"], ["methane", "methane"], ["methane"], "methane"]
)
def test_unknown_component_pair_is_refused(pair):
    data = json.loads(case_to_json(_peng_robinson_case()))
    data["property_data"]["binary_parameters"][0]["components"] = pair
    message = _problems(data)["property_data.binary_parameters[0].components"]
    assert "two different components of this case" in message


def test_a_pair_given_twice_is_refused():
    data = json.loads(case_to_json(_peng_robinson_case()))
    pairs = data["property_data"]["binary_parameters"]
    pairs.append(copy.deepcopy(pairs[0]))
    pairs[-1]["components"].reverse()
    message = _problems(data)["property_data.binary_parameters[3].components"]
    assert "each pair of components once" in message


def test_bad_antoine_and_unknown_component_are_refused():
    data = _ammonia()
    data["property_data"]["vapor_pressure"]["ammonia"]["antoine"]["B"] = "x"
    data["property_data"]["vapor_pressure"]["water"] = data["property_data"]["vapor_pressure"][
        "argon"
    ]
    problems = _problems(data)
    assert "a number" in problems["property_data.vapor_pressure.ammonia.antoine.B"]
    assert "a component of this case" in problems["property_data.vapor_pressure.water"]


def test_version_2_file_migrates_with_the_libraries_constants_recorded():
    data = _ammonia()
    del data["property_data"]
    data["version"] = 2
    case = case_from_dict(data)
    saved = json.loads(case_to_json(case))
    assert saved["version"] == 3
    assert saved["property_data"] == _ammonia()["property_data"]


def test_edited_henry_constant_is_used_by_the_ideal_equilibrium():
    data = _ammonia()
    data["property_data"]["vapor_pressure"]["argon"]["henry"]["A"] = 30.0
    case = case_from_dict(data)
    equilibrium = equilibrium_for(case_basis(case.flowsheet))
    argon = [c.name for c in case.flowsheet.components].index("argon")
    # Henry's law above argon's Tc: K = exp(A + B/T) / P (chemicals Henry_pressure form)
    from chemicals.solubility import Henry_pressure

    B = data["property_data"]["vapor_pressure"]["argon"]["henry"]["B"]
    K = equilibrium.K_values(263.15, 151e5)[argon]
    assert K == pytest.approx(Henry_pressure(263.15, 30.0, B) / 151e5, rel=1e-12)


def test_json_summary_carries_the_property_data():
    case = case_from_dict(_ammonia())
    summary = solution_summary(solve_flowsheet(case.flowsheet, case.method, case.settings))
    assert summary["property_data"]["method"] == "ideal"
    assert (
        summary["property_data"]["vapor_pressure"] == _ammonia()["property_data"]["vapor_pressure"]
    )
    assert np.isfinite(summary["property_data"]["vapor_pressure"]["argon"]["henry"]["A"])
