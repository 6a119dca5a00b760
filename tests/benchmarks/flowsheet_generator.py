"""Generated flowsheets of any size, for benchmarks (and tests) of the solve.

:func:`generate_flowsheet` builds one feed, a chain of recycle loops and one product:

    Feed -> [Mixer -> Reactor -> Heater ... -> Splitter -(half back to the Mixer)-> ] x loops
         -> Heater ... -> Product

Each loop's reactor isomerises n-butane to isobutane (conversion 0.2, outlet T set);
its heaters alternate between a set outlet temperature and a set duty (the latter
solve the temperature from the enthalpy, as the mixers do); its splitter sends half of
the loop's flow back. Blocks left over after the loops are heaters in the chain after
them. Every component is fed at 1 mol/s (n-butane at 5 mol/s) as vapor at 350 K, 5 bar.
Components come from the ``chemicals`` database, in the fixed order of
:data:`COMPONENT_QUERIES` (n-butane and isobutane first, for the reaction).
"""

from __future__ import annotations

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity
from model.properties.components import lookup_component

#: Component look-ups, first the reaction's two; 58 in all.
COMPONENT_QUERIES = (
    "n-butane",
    "isobutane",
    "methane",
    "ethane",
    "propane",
    "n-pentane",
    "isopentane",
    "n-hexane",
    "n-heptane",
    "n-octane",
    "n-nonane",
    "n-decane",
    "ethylene",
    "propylene",
    "1-butene",
    "benzene",
    "toluene",
    "ethylbenzene",
    "o-xylene",
    "m-xylene",
    "p-xylene",
    "cyclohexane",
    "cyclopentane",
    "methylcyclohexane",
    "methanol",
    "ethanol",
    "1-propanol",
    "isopropanol",
    "1-butanol",
    "acetone",
    "methyl ethyl ketone",
    "acetic acid",
    "dimethyl ether",
    "diethyl ether",
    "water",
    "hydrogen",
    "nitrogen",
    "oxygen",
    "argon",
    "carbon monoxide",
    "carbon dioxide",
    "ammonia",
    "hydrogen sulfide",
    "sulfur dioxide",
    "helium",
    "neon",
    "chlorine",
    "hydrogen chloride",
    "nitrous oxide",
    "nitric oxide",
    "formaldehyde",
    "acetaldehyde",
    "ethylene oxide",
    "acetylene",
    "1,3-butadiene",
    "isobutylene",
    "naphthalene",
    "chloromethane",
)
BLOCKS_PER_LOOP_MINIMUM = 3  # mixer, reactor, splitter


def _heater_specs(number: int) -> dict:
    if number % 2:
        return {"mode": "duty", "duty": TypedQuantity(-200.0 + 50.0 * (number % 7), "W")}
    return {"T": TypedQuantity(370.0 + 10.0 * (number % 5), "K")}


def _loop(
    sheet: Flowsheet,
    index: int,
    size: int,
    upstream: tuple[str, str],
    reaction: Reaction,
    counter: list[int],
) -> tuple[str, str]:
    """Add one loop of ``size`` blocks fed from ``upstream``; return its outlet port."""
    mixer, reactor, splitter = f"M{index}", f"R{index}", f"T{index}"
    sheet.add_block("Mixer", mixer)
    sheet.add_block(
        "Reactor", reactor, specs={"reactions": [reaction], "T": TypedQuantity(400.0, "K")}
    )
    sheet.add_block("Splitter", splitter, specs={"fractions": {"out1": 0.5}})
    sheet.connect(*upstream, mixer, "in1", f"{mixer} in")
    sheet.connect(mixer, "out", reactor, "in", f"{reactor} in")
    previous = (reactor, "out")
    for _ in range(size - BLOCKS_PER_LOOP_MINIMUM):
        previous = _heater(sheet, previous, counter)
    sheet.connect(*previous, splitter, "in", f"{splitter} in")
    sheet.connect(splitter, "out1", mixer, "in2", f"recycle {index}")
    return splitter, "out2"


def _heater(sheet: Flowsheet, upstream: tuple[str, str], counter: list[int]) -> tuple[str, str]:
    counter[0] += 1
    name = f"H{counter[0]}"
    sheet.add_block("Heater", name, specs=_heater_specs(counter[0]))
    sheet.connect(*upstream, name, "in", f"{name} in")
    return name, "out"


def generate_flowsheet(blocks: int = 100, loops: int = 10, components: int = 20) -> Flowsheet:
    """A solvable flowsheet of exactly ``blocks`` blocks with ``loops`` recycle loops.

    Parameters
    ----------
    blocks
        Total blocks, feed and product included; at least ``2 + 3 * loops``.
    loops
        Recycle loops, in series; each has one tear stream.
    components
        From 2 to ``len(COMPONENT_QUERIES)``.
    """
    if not 2 <= components <= len(COMPONENT_QUERIES):
        raise ValueError(f"components must be 2 to {len(COMPONENT_QUERIES)}, not {components}")
    if loops < 0 or blocks < 2 + BLOCKS_PER_LOOP_MINIMUM * loops:
        raise ValueError(
            f"{blocks} blocks cannot hold {loops} loops of "
            f"{BLOCKS_PER_LOOP_MINIMUM} blocks plus a feed and a product"
        )
    sheet = Flowsheet()
    for query in COMPONENT_QUERIES[:components]:
        sheet.add_component(lookup_component(query))
    names = sheet.component_names()
    flows = {name: 1.0 for name in names}
    flows[names[0]] = 5.0
    sheet.add_block(
        "Feed",
        "Feed",
        specs={
            "flows": ComponentAmounts(flows, "mol/s"),
            "T": TypedQuantity(350.0, "K"),
            "P": TypedQuantity(5.0, "bar"),
            "phase": "vapor",
        },
    )
    reaction = Reaction({names[0]: -1.0, names[1]: 1.0}, names[0], 0.2, "isomerisation")
    size = (blocks - 2) // loops if loops else 0
    upstream, counter = ("Feed", "out"), [0]
    for index in range(1, loops + 1):
        upstream = _loop(sheet, index, size, upstream, reaction, counter)
    while len(sheet.blocks) < blocks - 1:
        upstream = _heater(sheet, upstream, counter)
    sheet.add_block("Product", "Product")
    sheet.connect(*upstream, "Product", "in", "product")
    return sheet
