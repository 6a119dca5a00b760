"""The cautions shown in the window, in every report and in every export (DESIGN.md)."""

from __future__ import annotations

CAUTIONS: list[str] = [
    "Results are preliminary estimates for engineering review by qualified personnel.",
    "The property basis is ideal: flash drums compute phase equilibrium by Raoult's law "
    "(Antoine vapor pressures) and, above a component's critical temperature, Henry's law "
    "with Henry constants measured in water (or by Peng-Robinson where the case chooses "
    "it), and so do heater, exchanger, mixer, reactor and separator outlets whose phase "
    "is 'equilibrium'; every other outlet's phase is as specified; no heat of mixing, no "
    "pressure effect on enthalpy.",
    "Designs must follow local codes and licensed engineering practice.",
]

CAUTION_LINE: str = (
    "Preliminary estimates for review by qualified personnel · ideal basis, "
    "flash drums by Raoult/Henry · follow local codes and licensed practice"
)
