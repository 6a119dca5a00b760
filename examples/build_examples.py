"""Build the example case files of ``examples/`` (every scenario here is invented).

Run ``python examples/build_examples.py`` to regenerate the ``*.loop.json`` files from
the definitions below; the committed files are what users open. Each scenario is a
function returning a :class:`model.case.document.Case`; the tests solve every one of them.
"""

from __future__ import annotations

import sys
from collections.abc import Callable
from pathlib import Path

from convergence import SolverSettings
from model.case.document import Case
from model.case.file import case_to_json
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, StreamEstimate, TypedQuantity
from model.flowsheet.target_definition import Target, parse_result_address, parse_spec_address
from model.properties.components import lookup_component

EXAMPLES_FOLDER = Path(__file__).resolve().parent
INVENTED = "Invented scenario for demonstration; the numbers are made up, not plant data."


def _quantity(value: float, unit: str) -> TypedQuantity:
    return TypedQuantity(float(value), unit)


def _flowsheet(component_names: list[str]) -> Flowsheet:
    flowsheet = Flowsheet()
    for name in component_names:
        flowsheet.add_component(lookup_component(name))
    return flowsheet


def _block(
    flowsheet: Flowsheet, kind: str, name: str, position: tuple[float, float], **specs: object
) -> None:
    flowsheet.add_block(kind, name, position)
    for field_name, value in specs.items():
        flowsheet.set_spec(name, field_name, value)


def _connect(flowsheet: Flowsheet, name: str, source: str, target: str) -> None:
    """Connect ``"Block.port"`` to ``"Block.port"`` with a named stream."""
    source_block, source_port = source.rsplit(".", 1)
    target_block, target_port = target.rsplit(".", 1)
    flowsheet.connect(source_block, source_port, target_block, target_port, name)


def _ammonia_loop(separator: tuple[str, dict], liquid_port: str, gas_port: str) -> Flowsheet:
    """The ammonia synthesis loop of (a) and (a'), with the given ammonia separator
    (kind and specs) whose ``liquid_port`` feeds the product and ``gas_port`` the purge."""
    sheet = _flowsheet(["hydrogen", "nitrogen", "ammonia", "argon"])
    _block(
        sheet,
        "Feed",
        "Make-up gas",
        (0, 0),
        basis="total and fractions",
        total_flow=_quantity(300, "kmol/h"),
        composition=ComponentAmounts(
            {"hydrogen": 0.74625, "nitrogen": 0.24875, "argon": 0.005}, "mole fraction"
        ),
        T=_quantity(25, "degC"),
        P=_quantity(150, "barg"),
        phase="vapor",
    )
    _block(sheet, "Mixer", "Loop mixer", (256, 0), phase="vapor")
    _block(
        sheet,
        "Reactor",
        "Converter",
        (512, 0),
        mode="outlet temperature",
        T=_quantity(450, "degC"),
        phase="vapor",
        reactions=[
            Reaction(
                {"nitrogen": -1.0, "hydrogen": -3.0, "ammonia": 2.0},
                "nitrogen",
                0.25,
                "ammonia synthesis",
            )
        ],
    )
    _block(
        sheet,
        "Heater",
        "Loop cooler",
        (768, 0),
        mode="outlet temperature",
        T=_quantity(-10, "degC"),
        phase="vapor",
    )
    kind, specs = separator
    _block(sheet, kind, "Ammonia separator", (1024, 0), **specs)
    _block(
        sheet,
        "Splitter",
        "Purge splitter",
        (1024, -200),
        mode="fractions",
        fractions={"out2": 0.02},
    )
    _block(sheet, "Product", "Liquid ammonia", (1280, 0))
    _block(sheet, "Product", "Purge gas", (1280, -200))
    _connect(sheet, "Make-up", "Make-up gas.out", "Loop mixer.in1")
    _connect(sheet, "Converter feed", "Loop mixer.out", "Converter.in")
    _connect(sheet, "Converter effluent", "Converter.out", "Loop cooler.in")
    _connect(sheet, "Cooled effluent", "Loop cooler.out", "Ammonia separator.in")
    _connect(sheet, "Ammonia", f"Ammonia separator.{liquid_port}", "Liquid ammonia.in")
    _connect(sheet, "Loop gas", f"Ammonia separator.{gas_port}", "Purge splitter.in")
    _connect(sheet, "Recycle gas", "Purge splitter.out1", "Loop mixer.in2")
    _connect(sheet, "Purge", "Purge splitter.out2", "Purge gas.in")
    return sheet


def ammonia_synthesis_loop() -> Case:
    """(a) A synthesis loop whose argon inert must be purged (as in WALKTHROUGH.md)."""
    drum = ("Flash drum", {"mode": "temperature", "T": _quantity(-10, "degC")})
    sheet = _ammonia_loop(drum, "liquid", "vapor")
    return Case(
        sheet,
        SolverSettings(),
        method="broyden",
        title="Ammonia synthesis loop with argon purge (invented)",
        notes=INVENTED + " 300 kmol/h of 3:1 hydrogen/nitrogen make-up gas with 0.5 % argon "
        "at 150 barg; 25 % nitrogen conversion per pass; the loop is cooled to -10 degC and "
        "a flash drum there (ideal property method: Raoult's law for ammonia, Henry's law "
        "for the light gases) condenses about 89 % of the ammonia; 2 % of the loop gas is "
        "purged so that argon does not build up without limit. The ammonia the drum leaves "
        "in the gas depends on the whole gas flow, which couples the components; the case "
        "is solved with Broyden's method, which follows that coupling (bounded Wegstein, "
        "one q per variable, takes about 20 iterations and closes less tightly).",
    )


def ammonia_loop_fixed_split() -> Case:
    """(a') The same loop with the separator's split typed (95 % of the ammonia): a linear
    loop, where bounded Wegstein's q bounds show plainly (the argon crawl)."""
    split = ComponentAmounts({"ammonia": 0.95}, "fraction to first outlet")
    separator = ("Separator", {"split": split, "phase1": "liquid", "phase2": "vapor"})
    sheet = _ammonia_loop(separator, "out1", "out2")
    sheet.set_targets(
        [
            Target(
                parse_spec_address("Purge splitter.fractions[out2]"),
                0.005,
                0.2,
                "",
                parse_result_address("Recycle gas.mole_fraction[argon]"),
                TypedQuantity(8.0, "%"),
            )
        ]
    )
    return Case(
        sheet,
        SolverSettings(),
        title="Ammonia synthesis loop, fixed 95 % separator split (invented)",
        notes=INVENTED + " 300 kmol/h of 3:1 hydrogen/nitrogen make-up gas with 0.5 % argon "
        "at 150 barg; 25 % nitrogen conversion per pass; the loop is cooled to -10 degC, "
        "95 % of the ammonia condenses, and 2 % of the loop gas is purged so that argon "
        "does not build up without limit. A target adjusts that purge fraction (between "
        "0.5 % and 20 %) until argon in the recycle gas is 8 mol % (about 2.03 %). The "
        "argon loop's slope is about 0.98: with fixed "
        "q bounds [-5, 0] it crawls (about 120 iterations); the default adaptive bounds let "
        "the run widen q_min itself, and it converges in about 6.",
    )


def shift_with_feed_effluent_exchanger() -> Case:
    """(b) An adiabatic CO shift reactor whose effluent preheats its own feed."""
    sheet = _flowsheet(["carbon monoxide", "water", "carbon dioxide", "hydrogen", "nitrogen"])
    _block(
        sheet,
        "Feed",
        "Raw gas",
        (0, 0),
        basis="total and fractions",
        total_flow=_quantity(1000, "kmol/h"),
        composition=ComponentAmounts(
            {
                "carbon monoxide": 0.12,
                "water": 0.35,
                "carbon dioxide": 0.05,
                "hydrogen": 0.45,
                "nitrogen": 0.03,
            },
            "mole fraction",
        ),
        T=_quantity(220, "degC"),
        P=_quantity(30, "bar"),
        phase="vapor",
    )
    _block(
        sheet,
        "Exchanger",
        "Feed-effluent exchanger",
        (256, 0),
        mode="hot outlet temperature",
        hot_T=_quantity(300, "degC"),
        hot_phase="vapor",
        cold_phase="vapor",
        minimum_approach=_quantity(15, "K"),
        hot_pressure_drop=_quantity(0.3, "bar"),
        cold_pressure_drop=_quantity(0.3, "bar"),
    )
    _block(
        sheet,
        "Reactor",
        "Shift converter",
        (512, 0),
        mode="adiabatic",
        phase="vapor",
        pressure_drop=_quantity(0.5, "bar"),
        reactions=[
            Reaction(
                {"carbon monoxide": -1.0, "water": -1.0, "carbon dioxide": 1.0, "hydrogen": 1.0},
                "carbon monoxide",
                0.75,
                "CO shift",
            )
        ],
    )
    _block(
        sheet, "Splitter", "Bypass splitter", (768, 0), mode="fractions", fractions={"out2": 0.3}
    )
    _block(sheet, "Mixer", "Bypass mixer", (512, 200), phase="vapor")
    _block(sheet, "Product", "Shifted gas", (768, 200))
    _connect(sheet, "Raw gas", "Raw gas.out", "Feed-effluent exchanger.cold_in")
    _connect(sheet, "Preheated gas", "Feed-effluent exchanger.cold_out", "Shift converter.in")
    _connect(sheet, "Shift effluent", "Shift converter.out", "Bypass splitter.in")
    _connect(sheet, "Exchanger hot side", "Bypass splitter.out1", "Feed-effluent exchanger.hot_in")
    _connect(sheet, "Bypass", "Bypass splitter.out2", "Bypass mixer.in2")
    _connect(sheet, "Cooled effluent", "Feed-effluent exchanger.hot_out", "Bypass mixer.in1")
    _connect(sheet, "Product gas", "Bypass mixer.out", "Shifted gas.in")
    sheet.set_preferred_tear("Preheated gas", True)
    sheet.set_estimate("Preheated gas", StreamEstimate(T=540.0))
    return Case(
        sheet,
        title="CO shift with a feed-effluent exchanger (invented)",
        notes=INVENTED + " 1000 kmol/h of raw gas at 220 degC is preheated by 70 % of the "
        "shift converter's effluent, which the exchanger cools to 300 degC; the other 30 % "
        "bypasses it. The adiabatic converter shifts 75 % of the carbon monoxide "
        "(CO + H2O -> CO2 + H2). Heat is recycled: the preferred tear, the preheated "
        "gas, carries a temperature (estimate 540 K) while its flows are fixed.",
    )


def hydration_with_two_recycles() -> Case:
    """(c) Ethylene hydration with a gas recycle and a water recycle sharing the reactor."""
    sheet = _flowsheet(["ethylene", "water", "ethanol"])
    _block(
        sheet,
        "Feed",
        "Ethylene feed",
        (0, 0),
        flows=ComponentAmounts({"ethylene": 100.0}, "kmol/h"),
        T=_quantity(25, "degC"),
        P=_quantity(70, "bar"),
        phase="vapor",
    )
    _block(
        sheet,
        "Feed",
        "Make-up water",
        (0, 400),
        flows=ComponentAmounts({"water": 150.0}, "kmol/h"),
        T=_quantity(25, "degC"),
        P=_quantity(75, "bar"),
        phase="liquid",
    )
    _block(sheet, "Mixer", "Water mixer", (256, 400), phase="liquid", P=_quantity(75, "bar"))
    _block(
        sheet,
        "Heater",
        "Vaporizer",
        (512, 400),
        mode="outlet temperature",
        T=_quantity(300, "degC"),
        phase="vapor",
    )
    _block(sheet, "Mixer", "Reactor mixer", (256, 0), phase="vapor", P=_quantity(70, "bar"))
    _block(
        sheet,
        "Heater",
        "Preheater",
        (512, 0),
        mode="outlet temperature",
        T=_quantity(300, "degC"),
        phase="vapor",
    )
    _block(
        sheet,
        "Reactor",
        "Hydration reactor",
        (768, 0),
        mode="outlet temperature",
        T=_quantity(300, "degC"),
        phase="vapor",
        pressure_drop=_quantity(2, "bar"),
        reactions=[
            Reaction(
                {"ethylene": -1.0, "water": -1.0, "ethanol": 1.0}, "ethylene", 0.1, "hydration"
            )
        ],
    )
    _block(
        sheet,
        "Flash drum",
        "Flash drum",
        (1024, 0),
        mode="temperature",
        T=_quantity(40, "degC"),
    )
    _block(
        sheet,
        "Separator",
        "Ethanol column",
        (1024, 400),
        split=ComponentAmounts({"ethanol": 0.99, "water": 0.1}, "fraction to first outlet"),
        T1=_quantity(80, "degC"),
        P1=_quantity(1.5, "bar"),
        phase1="liquid",
        T2=_quantity(110, "degC"),
        P2=_quantity(1.5, "bar"),
        phase2="liquid",
    )
    _block(sheet, "Product", "Crude ethanol", (1280, 400))
    _connect(sheet, "Ethylene", "Ethylene feed.out", "Reactor mixer.in1")
    _connect(sheet, "Make-up water", "Make-up water.out", "Water mixer.in1")
    _connect(sheet, "Water to vaporizer", "Water mixer.out", "Vaporizer.in")
    _connect(sheet, "Steam", "Vaporizer.out", "Reactor mixer.in2")
    _connect(sheet, "Mixed feed", "Reactor mixer.out", "Preheater.in")
    _connect(sheet, "Reactor feed", "Preheater.out", "Hydration reactor.in")
    _connect(sheet, "Reactor effluent", "Hydration reactor.out", "Flash drum.in")
    _connect(sheet, "Recycle gas", "Flash drum.vapor", "Reactor mixer.in3")
    _connect(sheet, "Flash liquid", "Flash drum.liquid", "Ethanol column.in")
    _connect(sheet, "Crude ethanol", "Ethanol column.out1", "Crude ethanol.in")
    _connect(sheet, "Recycle water", "Ethanol column.out2", "Water mixer.in2")
    return Case(
        sheet,
        title="Ethylene hydration with gas and water recycles (invented)",
        notes=INVENTED + " 100 kmol/h of ethylene is hydrated at 300 degC and 70 bar with "
        "10 % conversion per pass. A flash drum at 40 degC (ideal property method) returns "
        "the unreacted ethylene, with the little water and ethanol its vapor pressures "
        "allow, as recycle gas; a column takes crude ethanol off and returns 90 % of "
        "the water, which joins 150 kmol/h of make-up water and is vaporized. The two "
        "loops share the reactor mixer, preheater, reactor and flash drum.",
    )


EXAMPLES: dict[str, Callable[[], Case]] = {
    "ammonia_synthesis_loop": ammonia_synthesis_loop,
    "ammonia_loop_fixed_split": ammonia_loop_fixed_split,
    "shift_feed_effluent_exchanger": shift_with_feed_effluent_exchanger,
    "ethylene_hydration_two_recycles": hydration_with_two_recycles,
}


def build(folder: Path = EXAMPLES_FOLDER) -> list[Path]:
    """Write every example case file into ``folder``; return their paths."""
    written = []
    for file_stem, build_case in EXAMPLES.items():
        path = folder / f"{file_stem}.loop.json"
        path.write_text(case_to_json(build_case()), encoding="utf-8")
        written.append(path)
    return written


if __name__ == "__main__":
    for written_path in build(Path(sys.argv[1]) if len(sys.argv) > 1 else EXAMPLES_FOLDER):
        print(written_path)
