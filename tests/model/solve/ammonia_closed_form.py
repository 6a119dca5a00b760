"""The invented ammonia loop's steady state in closed form, derived by hand.

Loop (examples/build_examples.py): make-up gas with a of nitrogen, h of hydrogen and A
of argon (any one flow unit) -> mixer -> converter (X of the nitrogen fed converts,
N2 + 3 H2 -> 2 NH3) -> cooler -> separator (a fraction s of the ammonia to the liquid,
everything else to the loop gas) -> splitter (a fraction f of the loop gas purged, the
rest recycled to the mixer). Loop gas flows L_N, L_H, L_A, L_NH3; steady state, in = out:

- nitrogen through the converter: L_N = (1 - X) (a + (1 - f) L_N), so
  L_N = (1 - X) a / D1 with D1 = X + (1 - X) f; the extent is xi = X L_N / (1 - X) = X a / D1;
- hydrogen over the whole loop: f L_H = h - 3 xi;
- argon over the whole loop (argon in = argon purged): f L_A = A;
- ammonia at the separator: L_NH3 = (1 - s) ((1 - f) L_NH3 + 2 xi), so
  L_NH3 = 2 (1 - s) xi / D2 with D2 = s + (1 - s) f.

The argon mole fraction of the loop gas (and of the recycle gas, split from it at the
same composition) is y = L_A / (L_N + L_H + L_A + L_NH3). Asking y for a chosen value:
multiply y L = L_A by f and use the balances above,
A / y - A - h = [(1 - X) a f - 3 X a] / D1 + 2 (1 - s) X a f / (D1 D2); with c = A/y - A - h
and both denominators cleared this is the quadratic
(c - a)(1 - X)(1 - s) f^2 + [c (X (1 - s) + s (1 - X)) - a ((1 - X) s - X (1 - s))] f
+ X s (c + 3 a) = 0, whose root in (0, 1) is the purge fraction.
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class AmmoniaLoop:
    nitrogen: float  # a
    hydrogen: float  # h
    argon: float  # A
    conversion: float  # X
    ammonia_to_liquid: float  # s

    def _inputs(self) -> tuple[float, float, float, float, float]:
        return self.nitrogen, self.hydrogen, self.argon, self.conversion, self.ammonia_to_liquid

    def loop_gas(self, f: float) -> dict[str, float]:
        a, h, A, X, s = self._inputs()
        d1 = X + (1 - X) * f
        d2 = s + (1 - s) * f
        xi = X * a / d1
        return {
            "nitrogen": (1 - X) * a / d1,
            "hydrogen": (h - 3 * xi) / f,
            "argon": A / f,
            "ammonia": 2 * (1 - s) * xi / d2,
        }

    def argon_fraction(self, f: float) -> float:
        gas = self.loop_gas(f)
        return gas["argon"] / sum(gas.values())

    def liquid_ammonia(self, f: float) -> float:
        s = self.ammonia_to_liquid
        return s * self.loop_gas(f)["ammonia"] / (1 - s)

    def purge_for_argon(self, y: float) -> float:
        a, h, A, X, s = self._inputs()
        c = A / y - A - h
        q2 = (c - a) * (1 - X) * (1 - s)
        q1 = c * (X * (1 - s) + s * (1 - X)) - a * ((1 - X) * s - X * (1 - s))
        q0 = X * s * (c + 3 * a)
        root = math.sqrt(q1 * q1 - 4 * q2 * q0)
        roots = [(-q1 + root) / (2 * q2), (-q1 - root) / (2 * q2)]
        inside = [f for f in roots if 0.0 < f < 1.0]
        assert len(inside) == 1, roots
        return inside[0]


def example_loop(case) -> AmmoniaLoop:
    """The closed form's inputs read from the example case's specs (kmol/h)."""
    blocks = case.flowsheet.blocks
    feed = blocks["Make-up gas"].specs
    total = feed["total_flow"].value
    fractions = feed["composition"].values
    reaction = blocks["Converter"].specs["reactions"][0]
    split = blocks["Ammonia separator"].specs["split"].values
    return AmmoniaLoop(
        total * fractions["nitrogen"],
        total * fractions["hydrogen"],
        total * fractions["argon"],
        reaction.conversion,
        split["ammonia"],
    )
