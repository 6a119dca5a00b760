"""A suite of recycle flowsheets built in code, for the convergence benchmark and tests.

Every scenario is invented; the chemistry is element-balanced but the conversions and
splits are made up to give each loop a stated behaviour. The dominant slope of a loop
(the factor by which direct substitution shrinks the error per pass) is given from the
steady-state balance written beside each builder; :data:`CASES` maps a case name to
``(builder, what it exercises)``.

| case | tears | dominant slope of direct substitution |
|---|---|---|
| single loop, recycle 0.5 / 0.9 / 0.99 | 1 | r (isobutane passes the reactor unchanged) |
| inert and purge | 1 | 0.98 for argon (2 % purge); hydrogen and nitrogen faster |
| nested loops | 2 (the recycles, preferred) | about 0.9 (measured) |
| interlocking loops | 1 (the shared stream) | about 0.68 (measured) |
| energy recycle through an exchanger | 1 | about 0.8 (temperature only) |
| direct substitution oscillates | 1 | -0.73 |
| direct substitution diverges | 1 | about 1.1 (a fixed purge flow) |
| direct substitution diverges, oscillating | 1 | -1.25 |
| reversible isomerisation, both isomers recycled | 1 | 0.9 and 0.1 (coupled, see below) |
"""

from __future__ import annotations

from collections.abc import Callable

from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, StreamEstimate, TypedQuantity
from model.properties.components import lookup_component

ISOMERISATION = {"n-butane": -1.0, "isobutane": 1.0}


def _sheet(components: list[str]) -> Flowsheet:
    sheet = Flowsheet()
    for name in components:
        sheet.add_component(lookup_component(name))
    return sheet


def _block(sheet: Flowsheet, kind: str, name: str, **specs: object) -> None:
    sheet.add_block(kind, name)
    for field_name, value in specs.items():
        sheet.set_spec(name, field_name, value)


def _connect(sheet: Flowsheet, source: str, target: str, name: str | None = None) -> None:
    """Connect ``"Block.port"`` to ``"Block.port"``."""
    source_block, source_port = source.rsplit(".", 1)
    target_block, target_port = target.rsplit(".", 1)
    sheet.connect(source_block, source_port, target_block, target_port, name)


def _feed(sheet: Flowsheet, name: str, flows: dict[str, float], T: float, P_bar: float) -> None:
    _block(
        sheet,
        "Feed",
        name,
        flows=ComponentAmounts(flows, "mol/s"),
        T=TypedQuantity(T, "K"),
        P=TypedQuantity(P_bar, "bar"),
        phase="vapor",
    )


def _reactor(sheet: Flowsheet, name: str, reactions: list[Reaction], T: float | None) -> None:
    if T is None:
        _block(sheet, "Reactor", name, reactions=reactions, mode="adiabatic", phase="vapor")
    else:
        _block(sheet, "Reactor", name, reactions=reactions, T=TypedQuantity(T, "K"))


def _butane_loop(reactions: list[Reaction], recycle_ratio: float) -> Flowsheet:
    """Feed -> mixer -> reactor (``reactions``) at 420 K -> cooler at 330 K -> splitter
    sending ``recycle_ratio`` of its inlet back to the mixer."""
    sheet = _sheet(["n-butane", "isobutane"])
    _feed(sheet, "Feed", {"n-butane": 10.0, "isobutane": 1.0}, 350.0, 5.0)
    _block(sheet, "Mixer", "Mixer")
    _reactor(sheet, "Reactor", reactions, 420.0)
    _block(sheet, "Heater", "Cooler", T=TypedQuantity(330.0, "K"))
    _block(sheet, "Splitter", "Splitter", fractions={"out1": recycle_ratio})
    _block(sheet, "Product", "Product")
    _connect(sheet, "Feed.out", "Mixer.in1", "feed")
    _connect(sheet, "Mixer.out", "Reactor.in", "reactor feed")
    _connect(sheet, "Reactor.out", "Cooler.in", "effluent")
    _connect(sheet, "Cooler.out", "Splitter.in", "cooled effluent")
    _connect(sheet, "Splitter.out1", "Mixer.in2", "recycle")
    _connect(sheet, "Splitter.out2", "Product.in", "product")
    return sheet


def single_loop(recycle_ratio: float) -> Flowsheet:
    """Feed -> mixer -> isomerisation reactor (30 % of n-butane) -> cooler -> splitter
    sending ``recycle_ratio`` of its inlet back to the mixer.

    Per pass the recycle's isobutane is multiplied by r and its n-butane by r (1 - 0.3);
    temperatures are set by the reactor and cooler, so the dominant slope is r.
    """
    reaction = Reaction(ISOMERISATION, "n-butane", 0.3, "isomerisation")
    return _butane_loop([reaction], recycle_ratio)


def inert_and_purge() -> Flowsheet:
    """Ammonia synthesis loop: argon enters with the make-up gas and leaves only with the
    2 % purge, so the argon in the loop gas is multiplied by 0.98 per pass."""
    sheet = _sheet(["hydrogen", "nitrogen", "ammonia", "argon"])
    _feed(sheet, "Make-up", {"hydrogen": 62.2, "nitrogen": 20.7, "argon": 0.42}, 298.15, 150.0)
    _block(sheet, "Mixer", "Loop mixer")
    synthesis = Reaction(
        {"nitrogen": -1.0, "hydrogen": -3.0, "ammonia": 2.0}, "nitrogen", 0.25, "synthesis"
    )
    _reactor(sheet, "Converter", [synthesis], 723.15)
    _block(sheet, "Heater", "Loop cooler", T=TypedQuantity(263.15, "K"))
    _block(
        sheet,
        "Separator",
        "Ammonia separator",
        split=ComponentAmounts({"ammonia": 0.95}, "fraction to first outlet"),
        phase1="liquid",
        phase2="vapor",
    )
    _block(sheet, "Splitter", "Purge splitter", fractions={"out2": 0.02})
    _block(sheet, "Product", "Liquid ammonia")
    _block(sheet, "Product", "Purge gas")
    _connect(sheet, "Make-up.out", "Loop mixer.in1", "make-up")
    _connect(sheet, "Loop mixer.out", "Converter.in", "converter feed")
    _connect(sheet, "Converter.out", "Loop cooler.in", "converter effluent")
    _connect(sheet, "Loop cooler.out", "Ammonia separator.in", "cooled effluent")
    _connect(sheet, "Ammonia separator.out1", "Liquid ammonia.in", "ammonia")
    _connect(sheet, "Ammonia separator.out2", "Purge splitter.in", "loop gas")
    _connect(sheet, "Purge splitter.out1", "Loop mixer.in2", "recycle gas")
    _connect(sheet, "Purge splitter.out2", "Purge gas.in", "purge")
    return sheet


def nested_loops() -> Flowsheet:
    """An inner cooler loop inside an outer reactor loop; both recycles are preferred tears.

    Outer: mixer 1 -> reactor (isomerisation, 20 %) -> mixer 2 -> cooler -> splitter
    (60 % back to mixer 2: the inner loop) -> separator (95 % of n-butane and 50 % of
    isobutane back to mixer 1: the outer loop) -> product.
    """
    sheet = _sheet(["n-butane", "isobutane"])
    _feed(sheet, "Feed", {"n-butane": 10.0}, 350.0, 5.0)
    _block(sheet, "Mixer", "Outer mixer")
    _reactor(sheet, "Reactor", [Reaction(ISOMERISATION, "n-butane", 0.2, "isomerisation")], 420.0)
    _block(sheet, "Mixer", "Inner mixer")
    _block(sheet, "Heater", "Cooler", T=TypedQuantity(330.0, "K"))
    _block(sheet, "Splitter", "Inner splitter", fractions={"out1": 0.6})
    _block(
        sheet,
        "Separator",
        "Separator",
        split=ComponentAmounts({"n-butane": 0.95, "isobutane": 0.5}, "fraction to first outlet"),
        phase1="vapor",
        phase2="vapor",
    )
    _block(sheet, "Product", "Product")
    _connect(sheet, "Feed.out", "Outer mixer.in1", "feed")
    _connect(sheet, "Outer mixer.out", "Reactor.in", "reactor feed")
    _connect(sheet, "Reactor.out", "Inner mixer.in1", "effluent")
    _connect(sheet, "Inner mixer.out", "Cooler.in", "cooler feed")
    _connect(sheet, "Cooler.out", "Inner splitter.in", "cooled")
    _connect(sheet, "Inner splitter.out1", "Inner mixer.in2", "inner recycle")
    _connect(sheet, "Inner splitter.out2", "Separator.in", "separator feed")
    _connect(sheet, "Separator.out1", "Outer mixer.in2", "outer recycle")
    _connect(sheet, "Separator.out2", "Product.in", "product")
    sheet.set_preferred_tear("inner recycle", True)
    sheet.set_preferred_tear("outer recycle", True)
    return sheet


def interlocking_loops() -> Flowsheet:
    """Two loops sharing the reactor, neither inside the other.

    Feed -> mixer 1 -> heater -> mixer 2 -> reactor (isomerisation, 25 %) -> splitter:
    50 % back to mixer 1 (loop A: mixer 1, heater, mixer 2, reactor, splitter); the rest
    to a separator whose first outlet (80 % of n-butane) returns to mixer 2 (loop B:
    mixer 2, reactor, splitter, separator).
    """
    sheet = _sheet(["n-butane", "isobutane"])
    _feed(sheet, "Feed", {"n-butane": 10.0}, 350.0, 5.0)
    _block(sheet, "Mixer", "Mixer A")
    _block(sheet, "Heater", "Heater", T=TypedQuantity(400.0, "K"))
    _block(sheet, "Mixer", "Mixer B")
    _reactor(sheet, "Reactor", [Reaction(ISOMERISATION, "n-butane", 0.25, "isomerisation")], 420.0)
    _block(sheet, "Splitter", "Splitter", fractions={"out1": 0.5})
    _block(
        sheet,
        "Separator",
        "Separator",
        split=ComponentAmounts({"n-butane": 0.8}, "fraction to first outlet"),
        phase1="vapor",
        phase2="vapor",
    )
    _block(sheet, "Product", "Product")
    _connect(sheet, "Feed.out", "Mixer A.in1", "feed")
    _connect(sheet, "Mixer A.out", "Heater.in", "heater feed")
    _connect(sheet, "Heater.out", "Mixer B.in1", "heated")
    _connect(sheet, "Mixer B.out", "Reactor.in", "reactor feed")
    _connect(sheet, "Reactor.out", "Splitter.in", "effluent")
    _connect(sheet, "Splitter.out1", "Mixer A.in2", "recycle A")
    _connect(sheet, "Splitter.out2", "Separator.in", "separator feed")
    _connect(sheet, "Separator.out1", "Mixer B.in2", "recycle B")
    _connect(sheet, "Separator.out2", "Product.in", "product")
    return sheet


def energy_recycle() -> Flowsheet:
    """Feed-effluent exchanger on an adiabatic, exothermic CO shift converter.

    The exchanger cools 80 % of the effluent to 560 K (the rest bypasses it) and passes
    that heat to the feed: the loop carries temperature only, and its slope is the
    hot side's share, 0.8, times the ratio of the two sides' heat capacity flows
    (about 1: the same gas, shifted).
    """
    components = ["carbon monoxide", "water", "carbon dioxide", "hydrogen", "nitrogen"]
    sheet = _sheet(components)
    _feed(
        sheet,
        "Raw gas",
        {
            "carbon monoxide": 40.0,
            "water": 100.0,
            "carbon dioxide": 15.0,
            "hydrogen": 120.0,
            "nitrogen": 10.0,
        },
        480.0,
        30.0,
    )
    _block(
        sheet,
        "Exchanger",
        "Feed-effluent exchanger",
        mode="hot outlet temperature",
        hot_T=TypedQuantity(560.0, "K"),
        hot_phase="vapor",
        cold_phase="vapor",
    )
    shift = Reaction(
        {"carbon monoxide": -1.0, "water": -1.0, "carbon dioxide": 1.0, "hydrogen": 1.0},
        "carbon monoxide",
        0.8,
        "CO shift",
    )
    _reactor(sheet, "Shift converter", [shift], None)
    _block(sheet, "Splitter", "Bypass splitter", fractions={"out2": 0.2})
    _block(sheet, "Mixer", "Bypass mixer", phase="vapor")
    _block(sheet, "Product", "Shifted gas")
    _connect(sheet, "Raw gas.out", "Feed-effluent exchanger.cold_in", "raw gas")
    _connect(sheet, "Feed-effluent exchanger.cold_out", "Shift converter.in", "preheated gas")
    _connect(sheet, "Shift converter.out", "Bypass splitter.in", "shift effluent")
    _connect(sheet, "Bypass splitter.out1", "Feed-effluent exchanger.hot_in", "hot side")
    _connect(sheet, "Bypass splitter.out2", "Bypass mixer.in2", "bypass")
    _connect(sheet, "Feed-effluent exchanger.hot_out", "Bypass mixer.in1", "cooled effluent")
    _connect(sheet, "Bypass mixer.out", "Shifted gas.in", "product gas")
    return sheet


def competing_ethylene(recycle_fraction: float) -> Flowsheet:
    """Ethylene made from n-butane and consumed by n-butane, recycled.

    Reactor 1 alkylates: ethylene + n-butane -> n-hexane (95 % of the ethylene);
    reactor 2 cracks what n-butane is left: n-butane -> 2 ethylene + hydrogen (80 %).
    A separator returns ``recycle_fraction`` f of the ethylene. With fresh n-butane F
    and recycled ethylene e, the new recycle is e' = f [(1 - 0.95) e + 2 (0.8) (F -
    0.95 e)], so the slope is f (0.05 - 1.52) = -1.47 f: more ethylene back means less
    n-butane left to crack, hence less ethylene. f = 0.5: -0.735 (direct substitution
    oscillates and converges); f = 0.85: -1.25 (it oscillates and diverges).
    """
    sheet = _sheet(["n-butane", "ethylene", "n-hexane", "hydrogen"])
    _feed(sheet, "Butane", {"n-butane": 10.0}, 400.0, 10.0)
    _block(sheet, "Mixer", "Mixer")
    alkylation = Reaction(
        {"ethylene": -1.0, "n-butane": -1.0, "n-hexane": 1.0}, "ethylene", 0.95, "alkylation"
    )
    cracking = Reaction(
        {"n-butane": -1.0, "ethylene": 2.0, "hydrogen": 1.0}, "n-butane", 0.8, "cracking"
    )
    _reactor(sheet, "Alkylation reactor", [alkylation], 450.0)
    _reactor(sheet, "Cracker", [cracking], 900.0)
    _block(sheet, "Heater", "Quench", T=TypedQuantity(400.0, "K"))
    _block(
        sheet,
        "Separator",
        "Ethylene separator",
        split=ComponentAmounts({"ethylene": recycle_fraction}, "fraction to first outlet"),
        phase1="vapor",
        phase2="vapor",
    )
    _block(sheet, "Product", "Product")
    _connect(sheet, "Butane.out", "Mixer.in1", "butane")
    _connect(sheet, "Mixer.out", "Alkylation reactor.in", "alkylation feed")
    _connect(sheet, "Alkylation reactor.out", "Cracker.in", "cracker feed")
    _connect(sheet, "Cracker.out", "Quench.in", "cracked gas")
    _connect(sheet, "Quench.out", "Ethylene separator.in", "quenched gas")
    _connect(sheet, "Ethylene separator.out1", "Mixer.in2", "ethylene recycle")
    _connect(sheet, "Ethylene separator.out2", "Product.in", "product")
    return sheet


def fixed_purge_flow() -> Flowsheet:
    """A cracking loop whose purge flow is set (the splitter's "outlet flow" mode).

    n-butane -> 2 ethylene + hydrogen (30 % per pass) triples the moles reacted; the
    purge takes a set 20 mol/s and the recycle is the rest of the loop gas. More
    recycle means more n-butane cracked, more moles, and - with the purge fixed - all of
    the extra moles go back: any error of the recycle grows by about 1.1 per pass, so
    direct substitution drifts away from the steady state (the tear's estimate is high).
    """
    sheet = _sheet(["n-butane", "ethylene", "hydrogen"])
    _feed(sheet, "Butane", {"n-butane": 10.0}, 400.0, 3.0)
    _block(sheet, "Mixer", "Mixer")
    cracking = Reaction(
        {"n-butane": -1.0, "ethylene": 2.0, "hydrogen": 1.0}, "n-butane", 0.3, "cracking"
    )
    _reactor(sheet, "Cracker", [cracking], 900.0)
    _block(sheet, "Heater", "Quench", T=TypedQuantity(400.0, "K"))
    _block(
        sheet,
        "Splitter",
        "Purge splitter",
        mode="outlet flow",
        flow_port="out2",
        flow=TypedQuantity(20.0, "mol/s"),
    )
    _block(sheet, "Product", "Purge")
    _connect(sheet, "Butane.out", "Mixer.in1", "butane")
    _connect(sheet, "Mixer.out", "Cracker.in", "cracker feed")
    _connect(sheet, "Cracker.out", "Quench.in", "cracked gas")
    _connect(sheet, "Quench.out", "Purge splitter.in", "loop gas")
    _connect(sheet, "Purge splitter.out1", "Mixer.in2", "recycle")
    _connect(sheet, "Purge splitter.out2", "Purge.in", "purge")
    # Steady state: recycle 6.67 mol/s n-butane, 13.3 ethylene, 6.67 hydrogen (purge =
    # feed + 2 x cracked). Estimated 30 % high, as a user might: below the steady state
    # direct substitution would instead fall to the spurious no-recycle state in which
    # the purge takes all there is (with a warning).
    sheet.set_estimate(
        "recycle",
        StreamEstimate({"n-butane": 8.7, "ethylene": 17.3, "hydrogen": 8.7}, T=400.0, P=3.0e5),
    )
    return sheet


def reversible_isomerisation() -> Flowsheet:
    """n-butane <-> isobutane at fixed conversions 2/3 each way, 90 % of the cooled
    effluent recycled: the tear's two flows are coupled.

    Per pass, with a = b = 2/3 (A -> B of A, then B -> A of B, in order) and the
    recycle fraction r = 0.9, the recycle (A, B) is multiplied by
    r [[1 - a + ab, b], [a (1 - b), 1 - b]]: a matrix whose columns sum to 1, with
    eigenvalues r = 0.9 (the total flow) and r (1 - a)(1 - b) = 0.1 (the split between
    the isomers). Neither flow follows a slope of its own.
    """
    forward = Reaction(ISOMERISATION, "n-butane", 2.0 / 3.0, "isomerisation")
    backward = Reaction({"isobutane": -1.0, "n-butane": 1.0}, "isobutane", 2.0 / 3.0, "reverse")
    return _butane_loop([forward, backward], 0.9)


CASES: dict[str, tuple[Callable[[], Flowsheet], str]] = {
    "single loop, recycle 0.5": (lambda: single_loop(0.5), "slope 0.5"),
    "single loop, recycle 0.9": (lambda: single_loop(0.9), "slope 0.9"),
    "single loop, recycle 0.99": (lambda: single_loop(0.99), "slope 0.99"),
    "inert and purge": (inert_and_purge, "argon slope 0.98, other slopes smaller"),
    "nested loops": (nested_loops, "two tears, one loop inside the other"),
    "interlocking loops": (interlocking_loops, "two loops sharing the reactor, one tear"),
    "energy recycle": (energy_recycle, "temperature-only loop through an exchanger"),
    "direct substitution oscillates": (
        lambda: competing_ethylene(0.5),
        "slope -0.735",
    ),
    "direct substitution diverges": (fixed_purge_flow, "slope about 1.1, monotonic"),
    "direct substitution diverges, oscillating": (
        lambda: competing_ethylene(0.85),
        "slope -1.25",
    ),
    "reversible isomerisation": (
        reversible_isomerisation,
        "coupled tear: eigenvalues 0.9 and 0.1",
    ),
}


def build_case(name: str) -> Flowsheet:
    """The flowsheet of suite case ``name`` (a key of :data:`CASES`)."""
    if name not in CASES:
        raise KeyError(f"no recycle case {name!r}; the cases are: {', '.join(CASES)}")
    return CASES[name][0]()
