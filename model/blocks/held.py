"""A temperature search held at the end of its bracket, as a warning that keeps its numbers.

While the recycle iterates, a block asked for an enthalpy that no temperature between
``T_SEARCH_MIN`` and ``T_SEARCH_MAX`` gives holds its outlet at the bracket's end
(:func:`model.blocks.base.temperature_for_enthalpy`). The block's outlet then no longer
depends on its inlets, so the loop's output stops depending on the tear values: the
iteration can see x == g(x) exactly at a point that is no solution. The solve has to
know when that happened and why, so the warning is a :class:`HeldTemperature`: a plain
``str`` (what the log and the case file show) that also carries the enthalpy needed,
the range reachable and the temperature held.
"""

from __future__ import annotations

__all__ = ["HeldTemperature"]


class HeldTemperature(str):
    """Warning text of a held temperature search, with its figures as attributes.

    Attributes
    ----------
    what
        Which outlet, e.g. ``"outlet"`` or ``"cold outlet"``.
    needed_W
        The enthalpy flow the block needed the stream to carry, W.
    reachable_W
        Enthalpy flows of the stream at the bracket's ends (low, high), W.
    held_K
        The temperature the stream was held at, K.
    bracket_K
        The bracket's ends, K.
    """

    what: str
    needed_W: float
    reachable_W: tuple[float, float]
    held_K: float
    bracket_K: tuple[float, float]

    def __new__(
        cls,
        what: str,
        needed_W: float,
        reachable_W: tuple[float, float],
        held_K: float,
        bracket_K: tuple[float, float],
    ) -> HeldTemperature:
        text = f"{what}: no temperature gives {needed_W:.6g} W; held at {held_K:g} K"
        warning = super().__new__(cls, text)
        warning.what = what
        warning.needed_W = float(needed_W)
        warning.reachable_W = (float(reachable_W[0]), float(reachable_W[1]))
        warning.held_K = float(held_K)
        warning.bracket_K = (float(bracket_K[0]), float(bracket_K[1]))
        return warning

    def explanation(self) -> str:
        """The figures in words: needed, reachable, held."""
        low_T, high_T = self.bracket_K
        low, high = self.reachable_W
        return (
            f"its {self.what} needed an enthalpy flow of {self.needed_W:.6g} W, but between "
            f"{low_T:g} K and {high_T:g} K it reaches only {low:.6g} W to {high:.6g} W, so "
            f"its temperature was held at {self.held_K:g} K"
        )
