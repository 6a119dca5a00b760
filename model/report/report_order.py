"""What a report needs from the flowsheet besides the solution: the order of the streams
and blocks, the streams' numbers and the blocks' kinds.

The solution holds states and results by name only; the flowsheet knows the numbers
and kinds. Reports take a :class:`ReportOrder` so that the window, the command line and
every export list the same streams in the same order under the same numbers.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from model.report.stream_numbers import numbered_stream_order, stream_numbers


@dataclass(frozen=True)
class ReportOrder:
    """Streams (in number order) with their numbers, blocks (in the flowsheet's order)
    with their kinds. Empty lists mean "the solution's own order"."""

    streams: list[str] = field(default_factory=list)
    numbers: dict[str, int] = field(default_factory=dict)
    blocks: list[str] = field(default_factory=list)
    kinds: dict[str, str] = field(default_factory=dict)

    @classmethod
    def of(cls, flowsheet: Any) -> ReportOrder:
        """The order of ``flowsheet`` (a :class:`model.flowsheet.document.Flowsheet`)."""
        return cls(
            streams=numbered_stream_order(flowsheet),
            numbers=stream_numbers(flowsheet),
            blocks=list(flowsheet.blocks),
            kinds={name: block.kind for name, block in flowsheet.blocks.items()},
        )
