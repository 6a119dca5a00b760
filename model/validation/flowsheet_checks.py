"""Whole-flowsheet checks: every missing or invalid item at once, as a list of Issues.

A flowsheet read from a file (or edited before its components changed) may hold
values that :func:`model.flowsheet.spec_checks.check_spec_value` would refuse today, so every
spec is checked again here, together with what only the whole flowsheet shows:
unconnected or doubly connected ports, splitter fractions against the outlets that
really exist, and a mixer asked to keep "the inlet phase" of inlets in two phases.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable
from typing import Any

from model.errors import InputError
from model.flowsheet.document import Block, Flowsheet, Stream
from model.flowsheet.kinds import AS_INLET, EQUILIBRIUM
from model.flowsheet.value_checks import flow_kind
from model.validation.issue import Issue
from units_of_measure.conversion import to_internal

SpecChecker = Callable[[Flowsheet, Block, Any, Any], Any]


class PortMap:
    """Streams attached to each (block, port), built once per validation."""

    def __init__(self, flowsheet: Flowsheet) -> None:
        self.into: dict[tuple[str, str], list[Stream]] = defaultdict(list)
        self.out_of: dict[tuple[str, str], list[Stream]] = defaultdict(list)
        self.inlets_of: dict[str, list[Stream]] = defaultdict(list)
        self.outlets_of: dict[str, list[Stream]] = defaultdict(list)
        for stream in flowsheet.streams.values():
            self.into[(stream.target, stream.target_port)].append(stream)
            self.out_of[(stream.source, stream.source_port)].append(stream)
            self.inlets_of[stream.target].append(stream)
            self.outlets_of[stream.source].append(stream)


def spec_issues(flowsheet: Flowsheet, block: Block, check: SpecChecker) -> list[Issue]:
    """Missing needed specs and specs that fail their value check."""
    issues = []
    for spec_field in block.block_kind.spec_fields:
        name = f"{block.name}.{spec_field.name}"
        value = block.specs.get(spec_field.name)
        if value is None:
            if spec_field.is_needed(block.specs):
                issues.append(
                    Issue(
                        "error",
                        f"{name}: {spec_field.label.lower()} is missing; give a value",
                        block.name,
                        None,
                        spec_field.name,
                    )
                )
            continue
        try:
            check(flowsheet, block, spec_field, value)
        except InputError as error:
            issues.append(Issue("error", str(error), block.name, None, spec_field.name))
    return issues


def _port_label(block: Block, port: str, inlet: bool) -> str:
    return f"{block.name}.{port}" + (" (inlet)" if inlet else " (outlet)")


def port_issues(block: Block, ports: PortMap) -> list[Issue]:
    """Fixed ports connected exactly once; numbered ports: at least one; no unknown port."""
    issues = []
    kind = block.block_kind
    for inlet, fixed, variable, attached, by_port in (
        (True, kind.inlets, kind.variable_inlets, ports.inlets_of[block.name], ports.into),
        (False, kind.outlets, kind.variable_outlets, ports.outlets_of[block.name], ports.out_of),
    ):
        prefix = "in" if inlet else "out"
        for stream in attached:
            port = stream.target_port if inlet else stream.source_port
            known = port in fixed or (
                variable and port.startswith(prefix) and port[len(prefix) :].isdigit()
            )
            if not known:
                issues.append(
                    Issue(
                        "error",
                        f"{_port_label(block, port, inlet)}: stream "
                        f"{stream.name} uses a port a {kind.name} does not have; "
                        f"its ports are {', '.join(fixed) or 'none'}",
                        block.name,
                        stream.name,
                        port,
                    )
                )
        used = {stream.target_port if inlet else stream.source_port for stream in attached}
        for port in sorted(used):
            streams = by_port[(block.name, port)]
            if len(streams) > 1:
                names = ", ".join(s.name for s in streams)
                issues.append(
                    Issue(
                        "error",
                        f"{_port_label(block, port, inlet)}: streams "
                        f"{names} share one port; a port takes one stream",
                        block.name,
                        streams[1].name,
                        port,
                    )
                )
        if variable:
            if not attached:
                side = "inlet" if inlet else "outlet"
                issues.append(
                    Issue(
                        "error",
                        f"{block.name}: a {kind.name.lower()} needs at "
                        f"least one {side} stream; connect one",
                        block.name,
                        None,
                        prefix + "1",
                    )
                )
            continue
        for port in fixed:
            if not by_port.get((block.name, port)):
                issues.append(
                    Issue(
                        "error",
                        f"{_port_label(block, port, inlet)} is not "
                        "connected; every port of a "
                        f"{kind.name.lower()} needs a stream",
                        block.name,
                        None,
                        port,
                    )
                )
    return issues


def splitter_issues(block: Block, ports: PortMap) -> list[Issue]:
    """Fractions against the connected outlets, or the set-flow outlet's existence."""
    connected = sorted(
        {s.source_port for s in ports.outlets_of[block.name]},
        key=lambda p: int(p[3:]) if p[3:].isdigit() else 0,
    )
    if not connected:
        return []
    specs = block.specs
    if specs.get("mode") == "outlet flow":
        return _set_flow_issues(block, connected)
    fractions = specs.get("fractions")
    if not isinstance(fractions, dict):
        return []
    issues = []
    name = f"{block.name}.fractions"
    stray = [p for p in fractions if p not in connected]
    if stray:
        issues.append(
            Issue(
                "error",
                f"{name}: {stray[0]!r} has a fraction but no stream; "
                f"the connected outlets are {', '.join(connected)}",
                block.name,
                None,
                "fractions",
            )
        )
    missing = [p for p in connected if p not in fractions]
    total = sum(float(v) for p, v in fractions.items() if p in connected)
    if len(missing) > 1:
        issues.append(
            Issue(
                "error",
                f"{name}: outlets {', '.join(missing)} have no fraction; "
                "give every outlet a fraction, or leave out just one to take "
                "the remainder",
                block.name,
                None,
                "fractions",
            )
        )
    elif not missing and abs(total - 1.0) > 1e-9:
        issues.append(
            Issue(
                "error",
                f"{name}: fractions to {', '.join(connected)} sum to "
                f"{total:.10g}; they must sum to 1, or leave one outlet out to "
                "take the remainder",
                block.name,
                None,
                "fractions",
            )
        )
    return issues


def _set_flow_issues(block: Block, connected: list[str]) -> list[Issue]:
    issues = []
    flow_port = block.specs.get("flow_port")
    if flow_port is not None and flow_port not in connected:
        issues.append(
            Issue(
                "error",
                f"{block.name}.flow_port: {flow_port!r} has no stream; "
                f"the connected outlets are {', '.join(connected)}",
                block.name,
                None,
                "flow_port",
            )
        )
    if len(connected) != 2:
        issues.append(
            Issue(
                "error",
                f"{block.name}.mode: 'outlet flow' needs exactly two "
                f"connected outlets (there are {len(connected)}); use fractions "
                "for more",
                block.name,
                None,
                "mode",
            )
        )
    return issues


#: A feed's total flow (mol/s or kg/s) that is positive but smaller than this is refused:
#: the balance arithmetic and the solve's absolute floors lose it entirely.
SMALLEST_FEED_FLOW = 1e-12


def feed_issues(block: Block) -> list[Issue]:
    """A feed whose flows are all zero is allowed but almost always a slip; one whose
    total is positive but below :data:`SMALLEST_FEED_FLOW` is refused."""
    specs = block.specs
    if specs.get("basis", "component flows") == "component flows":
        flows = specs.get("flows")
        if flows is None:
            return []
        if not any(float(v) > 0 for v in getattr(flows, "values", {}).values()):
            return [
                Issue(
                    "warning",
                    f"{block.name}.flows: every component flow is zero",
                    block.name,
                    None,
                    "flows",
                )
            ]
        field, amount, unit = "flows", sum(float(v) for v in flows.values.values()), flows.unit
    else:
        total = specs.get("total_flow")
        if total is None:
            return []
        field, amount, unit = "total_flow", float(total.value), total.unit
    return _tiny_feed_issues(block, field, amount, unit)


def _tiny_feed_issues(block: Block, field: str, amount: float, unit: str) -> list[Issue]:
    try:
        internal = to_internal(amount, unit, flow_kind(unit), field=f"{block.name}.{field}")
    except InputError:
        return []  # the spec check has reported the unit already
    if 0.0 < internal < SMALLEST_FEED_FLOW:
        message = (
            f"{block.name}.{field}: a total of {amount:g} {unit} is not allowed; a feed's "
            f"total flow must be 0 or at least {SMALLEST_FEED_FLOW:g} mol/s (or kg/s): "
            "smaller flows are lost in the balance arithmetic"
        )
        return [Issue("error", message, block.name, None, field)]
    return []


# (kind, outlet port) -> (phase spec field or None, inlet ports whose phase it keeps)
_PHASE_RULES: dict[tuple[str, str], tuple[str | None, tuple[str, ...] | None]] = {
    ("Feed", "out"): ("phase", ()),
    ("Mixer", "out"): ("phase", None),  # None: every inlet
    ("Reactor", "out"): ("phase", ("in",)),
    ("Heater", "out"): ("phase", ("in",)),
    ("Separator", "out1"): ("phase1", ("in",)),
    ("Separator", "out2"): ("phase2", ("in",)),
    ("Exchanger", "hot_out"): ("hot_phase", ("hot_in",)),
    ("Exchanger", "cold_out"): ("cold_phase", ("cold_in",)),
}


def _inlet_phases(
    block: Block, inlet_ports: tuple[str, ...] | None, ports: PortMap, phases: dict[str, str]
) -> list[tuple[str, str | None]]:
    """(stream, phase or None if not known yet) of the block's inlets on ``inlet_ports``."""
    attached = ports.inlets_of[block.name]
    if inlet_ports is not None:
        attached = [s for s in attached if s.target_port in inlet_ports]
    return [(s.name, phases.get(s.name)) for s in attached]


def stream_phases(flowsheet: Flowsheet, ports: PortMap) -> dict[str, str]:
    """Phase of every stream that can be known before solving ("as inlet" followed up)."""
    phases: dict[str, str] = {}
    for _ in range(len(flowsheet.blocks) + 1):
        changed = False
        for stream in flowsheet.streams.values():
            if stream.name in phases or stream.source not in flowsheet.blocks:
                continue
            phase = _outlet_phase(flowsheet.blocks[stream.source], stream, ports, phases)
            if phase is not None:
                phases[stream.name] = phase
                changed = True
        if not changed:
            break
    return phases


def _outlet_phase(
    block: Block, stream: Stream, ports: PortMap, phases: dict[str, str]
) -> str | None:
    """The phase ``block`` gives ``stream``: its phase spec, or its inlets' common phase."""
    if block.kind == "Flash drum":  # each outlet is its phase's
        return stream.source_port if stream.source_port in ("vapor", "liquid") else None
    field, inlet_ports = _PHASE_RULES.get((block.kind, stream.source_port), (None, None))
    chosen = block.specs.get(field) if field else AS_INLET
    if chosen == EQUILIBRIUM:  # known only from the flash
        return None
    if chosen != AS_INLET:
        return chosen if isinstance(chosen, str) else None
    inlet = {p for _, p in _inlet_phases(block, inlet_ports, ports, phases)}
    return inlet.pop() if len(inlet) == 1 and None not in inlet else None


def mixer_phase_issues(flowsheet: Flowsheet, ports: PortMap) -> list[Issue]:
    """A mixer keeping "the inlet phase" of inlets known to be in different phases."""
    phases = stream_phases(flowsheet, ports)
    issues = []
    for block in flowsheet.blocks.values():
        if block.kind != "Mixer" or block.specs.get("phase", AS_INLET) != AS_INLET:
            continue
        inlet = _inlet_phases(block, None, ports, phases)
        if len({p for _, p in inlet if p is not None}) > 1:
            shown = ", ".join(f"{name} {phase}" for name, phase in inlet if phase)
            issues.append(
                Issue(
                    "error",
                    f"{block.name}.phase: 'as inlet' but the inlets are "
                    f"in different phases ({shown}); choose the outlet phase, "
                    "vapor or liquid",
                    block.name,
                    None,
                    "phase",
                )
            )
    return issues


def flash_drum_issues(flowsheet: Flowsheet, block: Block) -> list[Issue]:
    """A flash drum (or a heater or exchanger with an "equilibrium" outlet phase) needs
    the property method's data for every component of the case."""
    from model.properties.property_method import missing_data

    issues = []
    method = flowsheet.property_method
    instead = (
        "choose a named outlet phase instead"
        if block.kind != "Flash drum"
        else "use a separator with a stated split instead"
    )
    for component in flowsheet.components:
        lacking = missing_data(method, component, getattr(flowsheet, "property_data", None))
        if lacking is not None:
            what = "vapor-pressure data" if method == "ideal" else "an acentric factor"
            issues.append(
                Issue(
                    "error",
                    f"{block.name}.components: {component.name!r} has no {what} for the "
                    f"{method} property method ({lacking}); {instead}",
                    block.name,
                    None,
                    "components",
                )
            )
    return issues
