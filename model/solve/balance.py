"""Balance closure: mass, each element and energy, from the feeds to the products.

In: the streams leaving Feed blocks; out: the streams entering Product blocks. Energy
in is the feeds' enthalpy plus every block's duty (heat added), energy out the
products' enthalpy, all on the formation basis, so reactions need no separate term.

Relative closures
-----------------
- mass: ``|in - out| / max(in, out)``;
- each element: ``|in - out| / max(in, out, floor)`` with ``floor = 1e-9 x`` the total
  atom flow in, the same absolute floor the solve uses for trace components; the
  report keeps the largest;
- energy: ``|E_in - E_out| / max(sum|H_feed| + sum|duty|, sum|H_product|)``: on the
  formation basis the net enthalpy can be near zero, so the scale is the gross flow of
  energy through the boundary.

A balance *closes* when every relative closure is at most ``10 x`` the solver's
tolerance: the solve accepts each tear variable within ``tolerance x`` its own size,
and a recycle may carry several times the feed, so the boundary mismatch of a
converged solve is a small multiple of the tolerance at most.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import Any

import numpy as np

from model.blocks.base import enthalpy as stream_enthalpy
from model.properties.stream_state import TWO_PHASE

#: Closure threshold as a multiple of the solver tolerance (see the module docstring).
CLOSURE_FACTOR = 10.0
ELEMENT_FLOOR = 1e-9


def _relative(incoming: float, outgoing: float, scale: float) -> float:
    return abs(incoming - outgoing) / scale if scale > 0.0 else 0.0


@dataclass
class BalanceReport:
    """Mass (kg/s), element (mol/s of atoms) and energy (W) in and out, and closures."""

    mass_in: float
    mass_out: float
    elements: dict[str, tuple[float, float]]
    enthalpy_in: float
    duties: float
    enthalpy_out: float
    mass_closure: float
    element_closure: float
    energy_closure: float
    threshold: float
    worst_element: str = ""

    @property
    def energy_in(self) -> float:
        """Feeds' enthalpy plus the duties, W."""
        return self.enthalpy_in + self.duties

    @property
    def energy_out(self) -> float:
        """Products' enthalpy, W."""
        return self.enthalpy_out

    @property
    def closures(self) -> dict[str, float]:
        return {
            "mass": self.mass_closure,
            "elements": self.element_closure,
            "energy": self.energy_closure,
        }

    @property
    def failing(self) -> list[str]:
        """Balances whose relative closure exceeds the threshold."""
        return [name for name, value in self.closures.items() if not value <= self.threshold]

    @property
    def closes(self) -> bool:
        return not self.failing

    def lines(self) -> list[str]:
        """A human summary, one line per balance and a verdict."""

        def verdict(name: str) -> str:
            return "closes" if name not in self.failing else "DOES NOT CLOSE"

        lines = [
            f"mass: in {self.mass_in:.8g} kg/s, out {self.mass_out:.8g} kg/s, "
            f"relative closure {self.mass_closure:.2e} ({verdict('mass')})",
        ]
        for element, (incoming, outgoing) in self.elements.items():
            lines.append(f"element {element}: in {incoming:.8g} mol/s, out {outgoing:.8g} mol/s")
        if self.elements:
            lines.append(
                f"elements: largest relative closure {self.element_closure:.2e}"
                f" ({self.worst_element}, {verdict('elements')})"
            )
        lines.append(
            f"energy: in {self.energy_in:.8g} W (enthalpy {self.enthalpy_in:.8g} W + duties "
            f"{self.duties:.8g} W), out {self.energy_out:.8g} W, relative closure "
            f"{self.energy_closure:.2e} ({verdict('energy')})"
        )
        summary = (
            "balances close" if self.closes else "balances do not close: " + ", ".join(self.failing)
        )
        lines.append(
            f"{summary} (threshold {self.threshold:.1e} = {CLOSURE_FACTOR:g} x solver tolerance)"
        )
        return lines

    def to_dict(self) -> dict[str, Any]:
        data = asdict(self)
        data["elements"] = {e: list(v) for e, v in self.elements.items()}
        return data

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> BalanceReport:
        values = dict(data)
        values["elements"] = {e: (float(a), float(b)) for e, (a, b) in data["elements"].items()}
        return cls(**values)


def balance_report(
    basis,
    streams: dict[str, Any],
    duties: list[float],
    feed_streams: list[str],
    product_streams: list[str],
    tolerance: float,
) -> BalanceReport:
    """Compute the closures of a solved flowsheet.

    Parameters
    ----------
    basis
        The solve's :class:`~model.properties.enthalpy.PropertyBasis`.
    streams
        Stream states by name (:class:`~model.properties.stream_state.StreamState`).
    duties
        Every block's duty (heat added), W.
    feed_streams, product_streams
        Names of the streams leaving Feed blocks and entering Product blocks.
    tolerance
        The solver's tolerance; the threshold is ``CLOSURE_FACTOR`` times it.
    """

    def totals(names: list[str]) -> tuple[float, np.ndarray, np.ndarray]:
        if not names:
            return 0.0, np.zeros(len(basis.element_names)), np.zeros(0)
        flows = np.stack([streams[n].flows for n in names])
        enthalpy = basis.enthalpy_flow(
            flows,
            np.array([streams[n].T for n in names]),
            np.array([streams[n].phase == "liquid" for n in names]),
        )
        for i, name in enumerate(names):  # a two-phase stream: both phases' enthalpy
            if streams[name].phase == TWO_PHASE:
                enthalpy[i] = stream_enthalpy(basis, streams[name])
        return (
            float((flows @ basis.molar_mass).sum()),
            basis.element_matrix @ flows.sum(0),
            (enthalpy),
        )

    mass_in, atoms_in, h_feeds = totals(feed_streams)
    mass_out, atoms_out, h_products = totals(product_streams)
    floor = ELEMENT_FLOOR * float(atoms_in.sum())
    element_closures = [
        _relative(a, b, max(a, b, floor)) for a, b in zip(atoms_in, atoms_out, strict=True)
    ]
    worst = int(np.argmax(element_closures)) if element_closures else -1
    duty_total = float(sum(duties))
    energy_in = float(h_feeds.sum()) + duty_total
    energy_scale = max(
        float(np.abs(h_feeds).sum()) + float(np.abs(duties).sum()), float(np.abs(h_products).sum())
    )
    return BalanceReport(
        mass_in=mass_in,
        mass_out=mass_out,
        elements={
            e: (float(a), float(b))
            for e, a, b in zip(basis.element_names, atoms_in, atoms_out, strict=True)
        },
        enthalpy_in=float(h_feeds.sum()),
        duties=duty_total,
        enthalpy_out=float(h_products.sum()),
        mass_closure=_relative(mass_in, mass_out, max(mass_in, mass_out)),
        element_closure=float(element_closures[worst]) if element_closures else 0.0,
        energy_closure=_relative(energy_in, float(h_products.sum()), energy_scale),
        threshold=CLOSURE_FACTOR * tolerance,
        worst_element=basis.element_names[worst] if worst >= 0 else "",
    )
