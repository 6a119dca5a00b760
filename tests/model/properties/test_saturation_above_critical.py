"""Bubble and dew points above the critical temperature of every component present are
reported as not existing (the ideal method would give one from vapor pressures continued
past the critical point, or from Henry constants).

Critical temperatures: chemicals ``critical.Tc`` (default source, IUPAC/HEOS data);
ammonia's is 405.4 K (132.25 degC). Saturation below it: CoolProp's ammonia
``PropsSI('T','P',p,'Q',0,'Ammonia')``, to 0.5 K inside the Antoine table's range.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import numpy as np
import pytest
from chemicals.critical import Tc

from model.case.file import load_case
from model.properties.components import lookup_component
from model.properties.enthalpy import PropertyBasis
from model.properties.property_method import equilibrium_for
from model.report.csv_file import results_csv
from model.report.text import solution_summary

CoolProp = pytest.importorskip("CoolProp.CoolProp")
EXAMPLES = Path(__file__).resolve().parents[3] / "examples"
AMMONIA_CAS = "7664-41-7"


def test_pure_ammonia_above_its_critical_pressure_has_no_bubble_or_dew_point():
    equilibrium = equilibrium_for(PropertyBasis([lookup_component("ammonia")]))
    one = np.array([1.0])
    # what the correlation alone gives at 151 bar lies above ammonia's critical T
    continued = equilibrium.flash_PV(one, 151e5, 0.0, 300.0).T
    assert continued > Tc(AMMONIA_CAS)
    for vapor_fraction in (0.0, 1.0):
        point = equilibrium.saturation(one, 151e5, vapor_fraction, 300.0)
        assert point.T is None
        assert point.reason == "above the critical temperature of ammonia"
    assert equilibrium.dew_point(one, 151e5, 300.0) is None
    # below the critical pressure the point is reported: CoolProp, 0.5 K (inside the
    # Antoine table's 193-254 K)
    saturation = CoolProp.PropsSI("T", "P", 1.5e5, "Q", 0, "Ammonia")
    assert equilibrium.bubble_point(one, 1.5e5, 300.0) == pytest.approx(saturation, abs=0.5)


def test_ammonia_example_liquid_dew_point_is_above_the_critical_temperature():
    case = load_case(EXAMPLES / "ammonia_synthesis_loop.loop.json")
    solution = case.solve()
    assert solution.converged, solution.message
    liquid = solution.streams["Ammonia"]
    equilibrium = equilibrium_for(solution.basis)
    continued = equilibrium.flash_PV(liquid.flows, liquid.P, 1.0, liquid.T).T
    # every component present is supercritical at the continued dew point (chemicals Tc)
    assert continued > max(Tc(c.cas) for c in case.flowsheet.components)
    summary = solution_summary(solution)["streams"]["Ammonia"]
    assert summary["dew_point_K"] is None
    assert summary["dew_point_note"] == "above the critical temperature of ammonia"
    assert summary["bubble_point_K"] == pytest.approx(263.15, rel=1e-9)  # the drum's T
    rows = list(csv.reader(io.StringIO(results_csv(solution, "Metric"))))
    dew = next(row for row in rows if row and row[0] == "Dew point")
    assert "above the critical temperature of ammonia" in dew
    json.dumps(summary)  # JSON-able
