"""The cautions shown in the window, in every report and in every export (DESIGN.md)."""

from __future__ import annotations

CAUTIONS: list[str] = [
    "Results are preliminary estimates for engineering review by qualified personnel.",
    "The property basis is ideal: no phase equilibrium (each stream's phase is as specified), "
    "no heat of mixing, no pressure effect on enthalpy.",
    "Designs must follow local codes and licensed engineering practice.",
]

CAUTION_LINE: str = (
    "Preliminary estimates for review by qualified personnel · ideal property basis, "
    "no phase equilibrium · follow local codes and licensed practice"
)
