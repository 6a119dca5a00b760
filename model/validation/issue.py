"""One problem found in a flowsheet, as the log and the diagram badges show it."""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import Any

SEVERITIES = ("error", "warning")


@dataclass(frozen=True)
class Issue:
    """An error (the flowsheet cannot be solved as it is) or a warning.

    ``block``, ``stream`` and ``field`` say where, so the log can link to the diagram.
    """

    severity: str
    message: str
    block: str | None = None
    stream: str | None = None
    field: str | None = None

    def __post_init__(self) -> None:
        if self.severity not in SEVERITIES:
            raise ValueError(f"severity must be one of {SEVERITIES}, not {self.severity!r}")

    @property
    def is_error(self) -> bool:
        return self.severity == "error"

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> Issue:
        return cls(
            str(data["severity"]),
            str(data["message"]),
            data.get("block"),
            data.get("stream"),
            data.get("field"),
        )
