"""Stream numbers as an H&MB shows them: on the stream's line and above its table column.

Each stream carries its own number (``Stream.number``, given by the flowsheet when the
stream is first inserted and saved in the case), so a number never moves to another
stream when streams are added, deleted and brought back. Reports list the streams in
number order; the diagram's label and the table's header are made here, so every view
writes them alike.
"""

from __future__ import annotations

from typing import Any


def stream_numbers(flowsheet: Any) -> dict[str, int]:
    """Stream name -> number, for every stream of ``flowsheet`` that has one."""
    return {
        name: stream.number
        for name, stream in flowsheet.streams.items()
        if stream.number is not None
    }


def numbered_stream_order(flowsheet: Any) -> list[str]:
    """The flowsheet's stream names in number order (streams without one last, in order)."""
    streams = list(flowsheet.streams.values())
    unnumbered = len(streams) + 1  # after every numbered stream, keeping the document order
    return [s.name for s in sorted(streams, key=lambda s: s.number if s.number else unnumbered)]


def stream_label(number: int | None, name: str) -> str:
    """The label on a stream's line: ``"3 · Recycle gas"`` (the name alone without a number)."""
    return name if number is None else f"{number} · {name}"


def number_text(number: int | None) -> str:
    """A stream number as a table header shows it (``""`` without one)."""
    return "" if number is None else str(number)
