"""Block calculations: one module per block kind, and the registry the solve calls.

Each kind has a ``build_<kind>(common, specs, basis)`` that turns internal specs (floats
in internal units, made once by :mod:`model.solve.compile`) into a compiled block of numpy
arrays, and a ``compute_<kind>(block, inlets, basis, strict)`` that maps inlet stream
states to outlet stream states and the block's results. ``strict`` is False while a
recycle iterates: a transient shortfall (a reactant not yet recycled) is then limited
with a warning instead of ending the solve; the final pass is always strict.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from model.blocks.base import BlockOutput, CompiledBlock
from model.blocks.exchanger import build_exchanger, compute_exchanger
from model.blocks.feed import build_feed, build_product, compute_feed, compute_product
from model.blocks.flash_drum import build_flash_drum, compute_flash_drum
from model.blocks.heater import build_heater, compute_heater
from model.blocks.mixer import build_mixer, compute_mixer
from model.blocks.reactor import build_reactor, compute_reactor
from model.blocks.separator import build_separator, compute_separator
from model.blocks.splitter import build_splitter, compute_splitter
from model.properties.stream_state import StreamState

__all__ = ["BlockOutput", "CompiledBlock", "BUILDERS", "COMPUTERS", "build_block", "compute_block"]

Builder = Callable[[dict[str, Any], dict[str, Any], Any], CompiledBlock]
Computer = Callable[..., BlockOutput]

#: Block kind -> builder of its compiled form.
BUILDERS: dict[str, Builder] = {
    "Feed": build_feed,
    "Product": build_product,
    "Mixer": build_mixer,
    "Splitter": build_splitter,
    "Separator": build_separator,
    "Flash drum": build_flash_drum,
    "Reactor": build_reactor,
    "Heater": build_heater,
    "Exchanger": build_exchanger,
}

#: Block kind -> calculation.
COMPUTERS: dict[str, Computer] = {
    "Feed": compute_feed,
    "Product": compute_product,
    "Mixer": compute_mixer,
    "Splitter": compute_splitter,
    "Separator": compute_separator,
    "Flash drum": compute_flash_drum,
    "Reactor": compute_reactor,
    "Heater": compute_heater,
    "Exchanger": compute_exchanger,
}


def build_block(kind: str, common: dict[str, Any], specs: dict[str, Any], basis) -> CompiledBlock:
    """Compile one block from its ports (``common``) and internal specs."""
    return BUILDERS[kind](common, specs, basis)


def compute_block(
    compiled_block: CompiledBlock, inlets: list[StreamState], basis, strict: bool = True
) -> BlockOutput:
    """Outlets (by port) and results of one block from its inlet states (in port order).

    Raises
    ------
    CalculationError
        The block cannot do what its specs ask with these inlets (strict pass).
    """
    return COMPUTERS[compiled_block.kind](compiled_block, inlets, basis, strict)
