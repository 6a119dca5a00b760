"""Every stream at once: the equations "stream = block output(inlets)" of the second opinion.

:class:`StreamSystem` holds the variables of every stream not leaving a Feed block (its
component flows, T and P, in the flowsheet's stream order) as one scaled vector ``z``
and evaluates every block once from the streams in ``z`` (a Jacobi sweep, no calculation
order and no tear streams). The residual ``z - G(z)`` is zero exactly at a steady state
of the whole flowsheet. Scales: flows by the total feed flow, T by 1000 K, P by the
feeds' mean pressure, so every scaled variable is of order one.

:func:`crude_start` is where the root finder starts: the feeds carried once through the
blocks, each stream not computed yet taken at zero flow at the feeds' mean T and P (no
recycle, nothing from a sequential solve). Runs on floats only, like a flowsheet pass.
"""

from __future__ import annotations

import numpy as np

from model.blocks import CompiledBlock, compute_block
from model.blocks.result import BlockResult
from model.errors import CalculationError, LoopwrightError
from model.properties.enthalpy import T_SEARCH_MAX, T_SEARCH_MIN
from model.properties.stream_state import StreamState
from model.solve.compile import CompiledFlowsheet
from model.solve.passes import FLOW_FLOOR_ABSOLUTE, FLOW_FLOOR_RELATIVE

__all__ = ["StreamSystem", "crude_start", "largest_relative_difference", "TEMPERATURE_SCALE"]

#: Scale of the temperature variables, K.
TEMPERATURE_SCALE = 1000.0
#: Lowest pressure handed to a block while the root finder explores, Pa.
PRESSURE_MINIMUM = 1.0


def evaluate(block: CompiledBlock, inlets: list[StreamState], basis, strict: bool):
    """One block's output; any project error becomes a CalculationError naming the block."""
    try:
        return compute_block(block, inlets, basis, strict)
    except CalculationError:
        raise
    except LoopwrightError as error:
        raise CalculationError(block.name, str(error)) from error


class StreamSystem:
    """The scaled stream vector of a compiled flowsheet and its residual.

    Parameters
    ----------
    compiled
        The compiled flowsheet (read only).
    basis
        Its :class:`~model.properties.enthalpy.PropertyBasis`.
    phases
        Phase of every stream, by stream index; the root finder varies numbers only,
        so the phases of the unknown streams are held here and updated by the caller.
    """

    def __init__(self, compiled: CompiledFlowsheet, basis, phases: list[str]) -> None:
        self.compiled = compiled
        self.basis = basis
        self.phases = list(phases)
        self.width = len(compiled.component_names) + 2
        self.fixed: dict[int, StreamState] = {}
        for block in compiled.blocks.values():
            if block.kind == "Feed":
                output = evaluate(block, [], basis, True)
                for port, index in zip(block.outlet_ports, block.outlet_streams, strict=True):
                    self.fixed[index] = output.outlets[port]
        self.unknown = [i for i in range(len(compiled.stream_names)) if i not in self.fixed]
        self.blocks = [b for b in compiled.blocks.values() if b.kind not in ("Feed", "Product")]
        feeds = list(self.fixed.values())
        self.total_feed_flow = float(sum(s.flows.sum() for s in feeds))
        self.mean_T = float(np.mean([s.T for s in feeds])) if feeds else 298.15
        self.mean_P = float(np.mean([s.P for s in feeds])) if feeds else 101325.0
        scale = np.full(self.width, self.total_feed_flow if self.total_feed_flow > 0 else 1.0)
        scale[-2], scale[-1] = TEMPERATURE_SCALE, self.mean_P
        self.scale = np.tile(scale, len(self.unknown))
        self.flow_floor = FLOW_FLOOR_RELATIVE * self.total_feed_flow + FLOW_FLOOR_ABSOLUTE
        self.evaluations = 0
        self.results: dict[str, BlockResult] = {}

    @property
    def size(self) -> int:
        """Number of unknowns."""
        return self.width * len(self.unknown)

    def pack(self, states: dict[int, StreamState]) -> np.ndarray:
        """Scaled vector of the unknown streams' states (by stream index)."""
        vector = np.empty(self.size)
        width = self.width
        for k, index in enumerate(self.unknown):
            state = states[index]
            vector[k * width : k * width + width - 2] = state.flows
            vector[k * width + width - 2] = state.T
            vector[k * width + width - 1] = state.P
        return vector / self.scale

    def states(self, z: np.ndarray) -> dict[int, StreamState]:
        """Every stream's state from ``z`` (feeds fixed), kept inside what blocks accept.

        A step of the root finder may take a flow below zero or T, P out of range; the
        blocks see the flow at zero, T inside the temperature search bracket and P at
        least 1 Pa. At a root no such limit is active, as every output is in range.
        """
        x = np.asarray(z, dtype=float) * self.scale
        states = dict(self.fixed)
        width = self.width
        for k, index in enumerate(self.unknown):
            start = k * width
            states[index] = StreamState(
                np.maximum(x[start : start + width - 2], 0.0),
                float(np.clip(x[start + width - 2], T_SEARCH_MIN, T_SEARCH_MAX)),
                float(max(x[start + width - 1], PRESSURE_MINIMUM)),
                self.phases[index],
            )
        return states

    def outputs(self, states: dict[int, StreamState], strict: bool) -> dict[int, StreamState]:
        """Every block computed once from ``states``: its outlet states by stream index."""
        self.evaluations += 1
        computed: dict[int, StreamState] = {}
        for block in self.blocks:
            output = evaluate(block, [states[i] for i in block.inlet_streams], self.basis, strict)
            for port, index in zip(block.outlet_ports, block.outlet_streams, strict=True):
                computed[index] = output.outlets[port]
            self.results[block.name] = output.result
        return computed

    def residual(self, z: np.ndarray) -> np.ndarray:
        """Scaled ``z - G(z)`` with lenient blocks (used by the root finder)."""
        return np.asarray(z, dtype=float) - self.pack(self.outputs(self.states(z), False))

    def residual_measure(
        self, states: dict[int, StreamState], outputs: dict[int, StreamState]
    ) -> tuple[float, str]:
        """Largest residual "stream - block output" and where it is.

        The larger of the relative difference (:func:`largest_relative_difference`) and
        the flow residual relative to the total feed flow. The second keeps a flowsheet
        without a steady state (an inert with no way out) from passing for solved: its
        flows grow without bound, and relative to such flows any residual looks small.
        """
        unknown = self.unknown
        mine = self.named({i: outputs[i] for i in unknown})
        given = self.named({i: states[i] for i in unknown})
        names = list(self.compiled.component_names)
        value, where = largest_relative_difference(mine, given, names, self.flow_floor)
        feed = self.total_feed_flow if self.total_feed_flow > 0.0 else 1.0
        for name in mine:
            flow_residual = float(np.abs(mine[name].flows - given[name].flows).max(initial=0.0))
            if not flow_residual / feed <= value:
                value, where = flow_residual / feed, f"{name} flows (relative to the feed)"
        return value, where

    def named(self, states: dict[int, StreamState]) -> dict[str, StreamState]:
        """States by stream name, in the flowsheet's stream order."""
        names = self.compiled.stream_names
        return {names[i]: states[i] for i in sorted(states)}


def crude_start(system: StreamSystem, known_phases: dict[int, str]) -> dict[int, StreamState]:
    """The feeds carried once through the blocks, with no recycle (see the module docstring).

    A block is computed when all its inlets are known; when none is ready (a loop), the
    pending block with the most known inlets goes next, its unknown inlets at zero flow
    at the feeds' mean T and P, in their phase from the specs (else the first known
    inlet's). Lenient blocks: a shortfall is limited, not an error.
    """
    known: dict[int, StreamState] = dict(system.fixed)
    feed_phases = [s.phase for s in system.fixed.values()] or ["vapor"]
    default_phase = max(set(feed_phases), key=feed_phases.count)
    pending = list(system.blocks)
    zero = np.zeros(system.width - 2)
    while pending:
        ready = [b for b in pending if all(i in known for i in b.inlet_streams)]
        block = ready[0] if ready else max(pending, key=lambda b: _known_count(b, known))
        present = [known[i].phase for i in block.inlet_streams if i in known]
        inlets = [
            known[i]
            if i in known
            else StreamState(
                zero,
                system.mean_T,
                system.mean_P,
                known_phases.get(i, present[0] if present else default_phase),
            )
            for i in block.inlet_streams
        ]
        output = evaluate(block, inlets, system.basis, False)
        for port, index in zip(block.outlet_ports, block.outlet_streams, strict=True):
            known[index] = output.outlets[port]
        pending.remove(block)
    system.evaluations += 1
    return known


def _known_count(block: CompiledBlock, known: dict[int, StreamState]) -> int:
    return sum(i in known for i in block.inlet_streams)


def largest_relative_difference(
    streams: dict[str, StreamState],
    reference: dict[str, StreamState],
    component_names: list[str],
    flow_floor: float,
) -> tuple[float, str]:
    """Largest relative difference between two sets of stream states, and where it is.

    Flows count relative to the stream's total flow (the larger of the two, at least
    ``flow_floor`` mol/s), so a trace component is judged against its stream; T (K) and
    P relative to their own values. A stream missing from one side or in another phase
    is an infinite difference.

    Returns
    -------
    (difference, worst)
        ``worst`` names the stream and variable, e.g. ``"S7 T"``.
    """
    largest, worst = 0.0, ""
    for name in sorted(set(streams) | set(reference), key=list({**reference, **streams}).index):
        if name not in streams or name not in reference:
            return float("inf"), f"{name} missing"
        mine, theirs = streams[name], reference[name]
        if mine.phase != theirs.phase:
            return float("inf"), f"{name} phase"
        total = max(mine.flows.sum(), theirs.flows.sum(), flow_floor)
        flow_differences = np.abs(mine.flows - theirs.flows) / total
        candidates = [
            (float(flow_differences.max(initial=0.0)), ""),
            (abs(mine.T - theirs.T) / max(abs(mine.T), abs(theirs.T)), "T"),
            (abs(mine.P - theirs.P) / max(abs(mine.P), abs(theirs.P)), "P"),
        ]
        if flow_differences.size:
            candidates[0] = (candidates[0][0], component_names[int(np.argmax(flow_differences))])
        for value, part in candidates:
            if not value <= largest:  # NaN counts as the worst
                largest, worst = value, f"{name} {part}"
                if not np.isfinite(value):
                    return float("inf"), worst
    return largest, worst
