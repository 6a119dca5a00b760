"""The text report of a solution: block duties, closures, convergence, stream table.

Shared by the headless commands (``model.cli``) and the window's export: every number
is converted once from internal units to the chosen unit system and formatted with
``units_of_measure.format_value``; the stream table comes from ``model.report.table``.
"""

from __future__ import annotations

from typing import Any

from model.report.block_table import WARNING, result_rows
from model.report.cautions import CAUTIONS
from model.report.report_order import ReportOrder
from model.report.table import saturation_points, stream_table, stream_table_text
from model.report.target_lines import target_lines, targets_summary
from units_of_measure import format_value


def block_duty_lines(
    solution: Any, unit_system: str, block_order: list[str] | None = None
) -> list[str]:
    """``"Reactor: duty -1234.5 kW, ..."`` for every block with results (warnings are in
    the log)."""
    order = ReportOrder(blocks=list(block_order or []))
    parts: dict[str, list[str]] = {}
    for row in result_rows(solution, unit_system, order):
        if row.quantity == WARNING:
            continue
        number = format_value(row.value)
        parts.setdefault(row.item, []).append(
            f"{row.quantity} {number} {row.unit}" if row.unit else f"{row.quantity} {number}"
        )
    return [f"{name}: " + ", ".join(texts) for name, texts in parts.items()]


def work_line(solution: Any) -> str:
    """Passes and block evaluations, e.g. ``"Flowsheet passes: 9; block evaluations: 61"``.

    With several strongly connected parts the passes are the most any part needed, and
    the block evaluations are also given as whole-flowsheet passes.
    """
    line = f"Flowsheet passes: {solution.passes}"
    evaluations = getattr(solution, "block_evaluations", 0)
    if not evaluations:  # a solution stored before block evaluations were counted
        return line
    line += f"; block evaluations: {evaluations}"
    if len(solution.parts) > 1:
        blocks = len(solution.calculation_order)
        line = (
            f"Flowsheet passes: {solution.passes} (the most of any of its "
            f"{len(solution.parts)} parts); block evaluations: {evaluations}, as many as "
            f"{evaluations / max(blocks, 1):.3g} passes over all {blocks} blocks"
        )
    return line


def _part_lines(solution: Any) -> list[str]:
    """One line per strongly connected part: its tears, iterations and cost."""
    lines = []
    for part in solution.parts:
        result = part.convergence
        how = "passed once (not iterated)" if result is None else result.status
        iterations = "" if result is None else f", {result.iterations} iterations"
        lines.append(
            f"{part.label.capitalize()}: tears {', '.join(part.tear_streams)}; {how}"
            f"{iterations}, {part.passes} passes, {part.block_evaluations} block evaluations "
            f"({len(part.blocks)} blocks)"
        )
    return lines


def convergence_lines(solution: Any) -> list[str]:
    """Per tear: iterations, final residual and the diagnosis advice; or why there is none.

    With several strongly connected parts, a line per part comes first.
    """
    result = solution.convergence
    lines = [f"Status: {solution.message}".rstrip(), work_line(solution)]
    if result is None:
        lines.append("No recycle: the flowsheet was solved in one pass.")
        return lines
    lines.append(
        f"Method: {result.method}; iterations: {result.iterations}; "
        f"evaluations: {result.evaluations}"
    )
    if len(solution.parts) > 1:
        lines += _part_lines(solution)
    for tear in solution.tear_streams:
        residuals = result.history.residuals(tear)
        final = format_value(residuals[-1]) if residuals.size else "n/a"
        lines.append(f"Tear {tear}: {residuals.size} iterations, final residual {final}")
        diagnosis = result.diagnosis.get(tear)
        if diagnosis is not None and diagnosis.advice:
            lines.append(f"  {diagnosis.advice}")
    return lines


def closure_lines(solution: Any) -> list[str]:
    """The balance closure summary, or why there is none."""
    if solution.balance is None:
        return ["No balance: the flowsheet was not solved."]
    return list(solution.balance.lines())


def solution_report(
    solution: Any,
    unit_system: str,
    stream_order: list[str] | None = None,
    block_order: list[str] | None = None,
    stream_numbers: dict[str, int] | None = None,
) -> str:
    """The full text report: cautions, convergence, stream table (headed by the stream
    numbers when given), duties, closures, issues."""
    sections = [
        ["Cautions:", *(f"  {text}" for text in CAUTIONS)],
        ["Convergence:", *(f"  {line}" for line in convergence_lines(solution))],
    ]
    targets = target_lines(solution)
    if targets:
        sections.append(["Targets:", *(f"  {line}" for line in targets)])
    if solution.streams:
        table = stream_table(solution, unit_system, stream_order, stream_numbers)
        sections.append([f"Stream table ({unit_system}):", stream_table_text(table)])
    duties = block_duty_lines(solution, unit_system, block_order)
    if duties:
        sections.append(["Blocks:", *(f"  {line}" for line in duties)])
    sections.append(["Balance closures:", *(f"  {line}" for line in closure_lines(solution))])
    method = getattr(getattr(solution, "basis", None), "property_method", None)
    if method is not None:
        lines = property_data_lines(solution.basis)
        sections.append([f"Property method: {method}", *(f"  {line}" for line in lines)])
    if solution.issues:
        sections.append(
            ["Log:", *(f"  {issue.severity}: {issue.message}" for issue in solution.issues)]
        )
    return "\n\n".join("\n".join(section) for section in sections) + "\n"


def property_data_lines(basis: Any) -> list[str]:
    """The constants the property method of ``basis`` uses, one line each with its source."""
    from model.properties.property_data import describe
    from model.properties.property_method import property_data_of

    return describe(property_data_of(basis), basis.names, basis.property_method)


def property_data_summary(basis: Any) -> dict[str, Any] | None:
    """``{"method": ..., **constants}``: the ``--json`` entry of the property method."""
    if basis is None:
        return None
    from model.properties.property_method import property_data_of

    data = property_data_of(basis).to_json(basis.names, basis.property_method)
    return {"method": basis.property_method, **data}


def solution_summary(solution: Any) -> dict[str, Any]:
    """The solution as one JSON-able object in internal units (``loopwright solve --json``).

    Keys: ``status``, ``converged``, ``message``, ``iterations``, ``passes``,
    ``block_evaluations``, ``parts`` (per strongly connected part: ``label``, ``blocks``,
    ``tear_streams``, ``status``, ``iterations``, ``passes``, ``block_evaluations``),
    ``tears`` (tear -> scaled residual per iteration), ``streams`` (name -> ``molar_flows_mol_s``,
    ``T_K``, ``P_Pa``, ``phase``, ``vapor_fraction``, for two phases
    ``vapor_flows_mol_s`` and ``liquid_flows_mol_s``, ``enthalpy_flow_W``, in a case with a
    flash drum ``bubble_point_K`` and ``dew_point_K``, null where none, with
    ``bubble_point_note``/``dew_point_note`` saying why, e.g. "above the critical
    temperature of ammonia"), ``blocks`` (name -> ``duty_W`` where the block has one;
    an exchanger's ``heat_curve``: ``heat_passed_W`` from the hot inlet end,
    ``hot_T_K``, ``cold_T_K``), ``closure`` (relative closures ``mass``, ``elements``,
    ``energy``), ``property_data`` (the property method and the constants it used, with
    their sources, as in the case file), ``cautions`` and, when the case has targets,
    ``targets`` (:func:`model.report.target_lines.targets_summary`).
    """
    result = solution.convergence
    components = list(solution.component_names)
    streams = {
        name: {
            "molar_flows_mol_s": {c: float(state.flows[i]) for i, c in enumerate(components)},
            "T_K": float(state.T),
            "P_Pa": float(state.P),
            "phase": state.phase,
            "vapor_fraction": state.vapor_fraction(),
            **_phase_flows(state, components),
            "enthalpy_flow_W": float(state.enthalpy_flow(solution.basis)),
        }
        for name, state in solution.streams.items()
    }
    points = saturation_points(solution, list(solution.streams.values()))
    if points is not None:  # a case with a flash drum: each stream's bubble and dew point
        for index, entry in enumerate(streams.values()):
            for label, key in (("Bubble point", "bubble_point"), ("Dew point", "dew_point")):
                point = points[label][index]
                entry[f"{key}_K"] = None if point.T is None else float(point.T)
                if point.T is None:
                    entry[f"{key}_note"] = point.reason
    balance = solution.balance
    targets = targets_summary(solution)
    return {
        "status": solution.status,
        "converged": bool(solution.converged),
        "message": solution.message,
        "iterations": 0 if result is None else int(result.iterations),
        "passes": int(solution.passes),
        "block_evaluations": int(solution.block_evaluations),
        "parts": [
            {
                "label": part.label,
                "blocks": list(part.blocks),
                "tear_streams": list(part.tear_streams),
                "status": "not iterated" if part.convergence is None else part.convergence.status,
                "iterations": 0 if part.convergence is None else int(part.convergence.iterations),
                "passes": int(part.passes),
                "block_evaluations": int(part.block_evaluations),
            }
            for part in solution.parts
        ],
        "tears": {
            tear: [float(r) for r in result.history.residuals(tear)]
            for tear in solution.tear_streams
        }
        if result is not None
        else {},
        "streams": streams,
        "blocks": {
            name: {"duty_W": float(block.duty_W), **_heat_curve(block)}
            for name, block in solution.blocks.items()
            if block.duty_W is not None
        },
        "closure": None
        if balance is None
        else {
            "mass": float(balance.mass_closure),
            "elements": float(balance.element_closure),
            "energy": float(balance.energy_closure),
        },
        "property_data": property_data_summary(getattr(solution, "basis", None)),
        "cautions": list(CAUTIONS),
        **({} if targets is None else {"targets": targets}),
    }


def _heat_curve(block: Any) -> dict[str, Any]:
    """An exchanger's heat curve in SI, where it has one."""
    if not block.profile:
        return {}
    keys = {"heat passed": "heat_passed_W", "hot T": "hot_T_K", "cold T": "cold_T_K"}
    return {"heat_curve": {keys[name]: list(points) for name, points in block.profile.items()}}


def _phase_flows(state: Any, components: list[str]) -> dict[str, Any]:
    """Each phase's component flows of a two-phase stream; nothing for one phase."""
    if not state.two_phase:
        return {}
    return {
        "vapor_flows_mol_s": dict(zip(components, state.vapor_flows.tolist(), strict=True)),
        "liquid_flows_mol_s": dict(zip(components, state.liquid_flows.tolist(), strict=True)),
    }
