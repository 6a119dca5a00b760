"""One sequential-modular pass, and the tear vector the convergence package iterates on.

:class:`FlowsheetPass` computes every compiled block once in calculation order, starting
from given tear stream states; :class:`TearVector` packs tear states into one float
vector (per tear: its component flows, then T, then P) and back, and gives the absolute
floors of the scaled residual. Both run on floats only.
"""

from __future__ import annotations

import numpy as np

from model.blocks import COMPUTERS
from model.blocks.held import HeldTemperature
from model.blocks.result import BlockResult
from model.errors import CalculationError, LoopwrightError
from model.properties.stream_state import StreamState
from model.solve.compile import CompiledFlowsheet

__all__ = [
    "FlowsheetPass",
    "TearVector",
    "FLOW_FLOOR_RELATIVE",
    "FLOW_FLOOR_ABSOLUTE",
    "TEMPERATURE_FLOOR",
    "PRESSURE_FLOOR",
]

#: Absolute floor of the scaled residual of a tear flow, relative to the total feed flow.
FLOW_FLOOR_RELATIVE = 1e-9
FLOW_FLOOR_ABSOLUTE = 1e-12  # mol/s
TEMPERATURE_FLOOR = 1.0  # K
PRESSURE_FLOOR = 1.0  # Pa


class FlowsheetPass:
    """One sequential-modular pass over the compiled blocks in calculation order.

    ``run(tear_states)`` starts from the given states of the tear streams, computes every
    block once, and leaves every stream state in ``states``, the tear streams as their
    source blocks recomputed them in ``recomputed`` and block results in ``results``.

    ``order`` may be some of the blocks only (one strongly connected part): with
    ``shared``, the pass reads and writes that other pass's ``states`` and ``results``,
    so the part sees the streams upstream steps left there. ``count`` counts passes,
    ``block_evaluations`` block calculations, and ``held`` lists, for the last pass,
    every block whose temperature search was held at its limit (with the warning).
    """

    def __init__(
        self,
        compiled: CompiledFlowsheet,
        order: list[str],
        tear_streams: list[str],
        basis,
        shared: FlowsheetPass | None = None,
    ) -> None:
        self.basis = basis
        self.tear_indices = [compiled.stream_index[name] for name in tear_streams]
        tear_position = {index: k for k, index in enumerate(self.tear_indices)}
        self.steps = []
        for name in order:
            block = compiled.blocks[name]
            outlets = tuple(
                (port, index, tear_position.get(index))
                for port, index in zip(block.outlet_ports, block.outlet_streams, strict=True)
            )
            self.steps.append((block, COMPUTERS[block.kind], block.inlet_streams, outlets))
        if shared is None:
            self.states: list[StreamState | None] = [None] * len(compiled.stream_names)
            self.results: dict[str, BlockResult] = {}
        else:
            self.states, self.results = shared.states, shared.results
        self.recomputed: list[StreamState | None] = [None] * len(tear_streams)
        self.count = 0
        self.block_evaluations = 0
        self.held: list[tuple[str, HeldTemperature]] = []

    def run(self, tear_states: list[StreamState], strict: bool) -> None:
        """Compute every block once from ``tear_states`` (in tear order)."""
        self.count += 1
        self.block_evaluations += len(self.steps)
        self.held = []
        states = self.states
        for index, state in zip(self.tear_indices, tear_states, strict=True):
            states[index] = state
        basis, recomputed, results = self.basis, self.recomputed, self.results
        for block, compute, inlet_indices, outlets in self.steps:
            try:
                output = compute(block, [states[i] for i in inlet_indices], basis, strict)
            except CalculationError:
                raise
            except LoopwrightError as error:
                raise CalculationError(block.name, str(error)) from error
            except (ArithmeticError, ValueError) as error:  # e.g. a log of a value out of range
                raise CalculationError(
                    block.name, f"the calculation failed with these inlet states ({error})"
                ) from error
            for port, index, tear in outlets:
                if tear is None:
                    states[index] = output.outlets[port]
                else:
                    recomputed[tear] = output.outlets[port]
            results[block.name] = output.result
            if output.result.warnings:
                self.held += [
                    (block.name, w)
                    for w in output.result.warnings
                    if isinstance(w, HeldTemperature)
                ]


class TearVector:
    """Packing of tear stream states into one float vector and back.

    Per tear stream, in tear order: its ``n`` component flows, then T, then P.
    """

    def __init__(self, tear_streams: list[str], component_names: list[str]) -> None:
        self.tear_streams = list(tear_streams)
        self.width = len(component_names) + 2
        self.size = self.width * len(tear_streams)
        self.slices = {
            name: slice(k * self.width, (k + 1) * self.width) for k, name in enumerate(tear_streams)
        }
        self.variable_names = [
            f"{tear} {part}" for tear in tear_streams for part in (*component_names, "T", "P")
        ]
        self.phases = ["vapor"] * len(tear_streams)
        self.clipped = [0] * len(tear_streams)

    def pack(self, states: list[StreamState]) -> np.ndarray:
        vector = np.empty(self.size)
        width = self.width
        for k, state in enumerate(states):
            start = k * width
            vector[start : start + width - 2] = state.flows
            vector[start + width - 2] = state.T
            vector[start + width - 1] = state.P
        return vector

    def unpack(self, vector: np.ndarray, count_clipping: bool = True) -> list[StreamState]:
        """Tear states from a vector; negative flows are clipped to zero (and counted)."""
        states = []
        width = self.width
        for k in range(len(self.tear_streams)):
            start = k * width
            flows = vector[start : start + width - 2]
            if flows.min(initial=0.0) < 0.0:
                if count_clipping:
                    self.clipped[k] += 1
                flows = np.maximum(flows, 0.0)
            states.append(
                StreamState(
                    flows,
                    float(vector[start + width - 2]),
                    float(vector[start + width - 1]),
                    self.phases[k],
                )
            )
        return states

    def abs_floor(self, total_feed_flow: float) -> np.ndarray:
        """Per-variable absolute floor (see the module docstring)."""
        floor = np.full(self.size, FLOW_FLOOR_RELATIVE * total_feed_flow + FLOW_FLOOR_ABSOLUTE)
        floor[self.width - 2 :: self.width] = TEMPERATURE_FLOOR
        floor[self.width - 1 :: self.width] = PRESSURE_FLOOR
        return floor
