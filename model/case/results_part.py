"""Checking the optional ``results`` of a case file against the case it belongs to.

The results are the last solution (``FlowsheetSolution.to_dict``). Before rebuilding
them, the parts that the window and the reports read directly are checked: the
component list must be the case's, every stream and block named must exist, and each
stream state must hold one finite flow per component, a temperature and pressure above
zero and a known phase; the convergence result's ``x`` and ``gx`` must be arrays of
equal length whose items are numbers of ordinary size or null (a non-finite value, as
``FlowsheetSolution.to_dict`` writes it). Anything else that
``FlowsheetSolution.from_dict`` refuses is reported at ``results``.
"""

from __future__ import annotations

from typing import Any

from model.case.schema import MISSING, Problems, join
from model.flowsheet.document import Flowsheet
from model.flowsheet.kinds import PHASES
from model.properties.stream_state import TWO_PHASE


def read_results(problems: Problems, value: Any, flowsheet: Flowsheet) -> Any:
    """The stored solution, or None after recording what is wrong with it."""
    from model.solve.solution import FlowsheetSolution

    data = problems.object(
        "results", value, required=("status", "converged", "message", "component_names")
    )
    if data is None:
        return None
    count = len(problems)
    names = flowsheet.component_names()
    if "component_names" in data and data["component_names"] != names:
        problems.add(
            "results.component_names",
            data.get("component_names"),
            "the case's components in the case's order: " + ", ".join(names),
        )
    streams = problems.object("results.streams", data.get("streams", {}))
    for name, state in (streams or {}).items():
        path = join("results.streams", name)
        if name not in flowsheet.streams:
            problems.add(path, name, "the name of a stream of this case")
            continue
        _check_state(problems, path, state, len(names))
    blocks = problems.object("results.blocks", data.get("blocks", {}))
    for name in blocks or {}:
        if name not in flowsheet.blocks:
            problems.add(join("results.blocks", name), name, "the name of a block of this case")
    _check_convergence(problems, data.get("convergence"))
    if len(problems) != count:
        return None
    try:
        return FlowsheetSolution.from_dict(data, flowsheet)
    except Exception as error:  # any other unreadable part is a problem of the file
        problems.add_error("results", error, "(results)")
        return None


def _check_state(problems: Problems, path: str, state: Any, component_count: int) -> None:
    data = problems.object(path, state, required=("flows_mol_s", "T_K", "P_Pa", "phase"))
    if data is None:
        return
    flows = problems.array(join(path, "flows_mol_s"), data.get("flows_mol_s", []))
    if flows is not None and len(flows) != component_count:
        problems.add(
            join(path, "flows_mol_s"), flows, f"one flow per component ({component_count})"
        )
    elif flows is not None:
        for index, flow in enumerate(flows):
            problems.number(join(join(path, "flows_mol_s"), index), flow, minimum=0.0)
    if "T_K" in data:
        problems.number(join(path, "T_K"), data["T_K"], positive=True)
    if "P_Pa" in data:
        problems.number(join(path, "P_Pa"), data["P_Pa"], positive=True)
    if "phase" in data:
        problems.choice(join(path, "phase"), data["phase"], (*PHASES, TWO_PHASE))


def _check_convergence(problems: Problems, value: Any) -> None:
    """``x`` and ``gx`` of the stored convergence result: equal-length number arrays."""
    if value is None:
        return
    data = problems.object("results.convergence", value, required=("x", "gx"))
    if data is None:
        return
    lengths = []
    for key in ("x", "gx"):
        path = join("results.convergence", key)
        items = problems.array(path, data.get(key, MISSING))
        if items is None:
            continue
        lengths.append(len(items))
        for index, item in enumerate(items):
            if item is not None:
                problems.number(join(path, index), item)
    if len(lengths) == 2 and lengths[0] != lengths[1]:
        problems.add(
            "results.convergence.gx",
            f"{lengths[1]} values",
            f"as many values as results.convergence.x ({lengths[0]})",
        )
