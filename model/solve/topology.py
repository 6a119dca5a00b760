"""Recycle topology: strongly connected parts, tear streams and calculation order.

Pure graph work on block and stream names; nothing here knows about components,
enthalpy or units. The solve driver calls :func:`analyse_topology`.

Method
------
1. The flowsheet is a ``networkx.MultiDiGraph``: one node per block (feeds and products
   included), one edge per stream, keyed by the stream's name. Parallel streams between
   the same two blocks stay separate edges.
2. Strongly connected parts that hold a cycle (more than one block, or a block feeding
   itself) are found with ``networkx.strongly_connected_components``.
3. Preferred tears that lie on a cycle (a stream inside a strongly connected part always
   does) are torn first, unconditionally. The graph left without them is split into
   strongly connected parts again.
4. Parallel streams from block ``u`` to block ``v`` form one *bundle*. A cycle of blocks
   through ``u -> v`` stands for one stream cycle per choice of parallel stream, and all
   of those are broken at ``u -> v`` only when every stream of the bundle is torn:
   tearing some of a bundle breaks nothing, as each cycle can take an untorn parallel.
   So the minimum tear set is a minimum-cost cover of the *block* cycles by whole
   bundles, a bundle of ``k`` streams counting ``k`` tears.
5. Block cycles of each part are enumerated with ``networkx.simple_cycles`` (Johnson's
   algorithm). While a part has at most ``max_cycles`` of them, the cover is solved
   exactly as a binary integer program with ``scipy.optimize.milp`` (HiGHS, relative
   gap 0): one binary per bundle, one row ``sum(bundles on the cycle) >= 1`` per cycle.
   The result is a proven minimum (``exact=True``).
6. Past ``max_cycles`` block cycles in a part (or if the integer program does not
   finish), that part is torn by a heuristic and ``exact`` is False: the block ordering
   of Eades, Lin & Smyth ("A fast and effective heuristic for the feedback arc set
   problem", Information Processing Letters 47(6), 1993) on stream counts, tearing every
   stream that runs backward in that ordering; then each torn bundle, costliest first
   (most streams, then most tear variables), is put back whenever that closes no cycle.
   The result breaks every cycle and is minimal (no single bundle can be put back) but
   not proven minimum.
7. The calculation order is ``networkx.lexicographical_topological_sort`` of the graph
   without the tear streams, ties broken by the blocks' given order.

Tie-break rule
--------------
- Every preferred tear that lies on a cycle is torn, even when that costs more tears in
  total than the unconstrained minimum: the user's choice is honoured. A preferred tear
  on no cycle is not torn; it is listed in ``Topology.unused_preferred_tears``.
- The remaining cycles (those through no preferred tear) are cut with the fewest tear
  streams. Count always comes first.
- Among covers with that fewest count, the one with the smallest total of
  ``tear_weights`` (tear variables: components + 2 per stream) wins. The objective is
  ``cost(bundle) = streams_in_bundle * M + sum(weights)`` with
  ``M = 1 + sum of all candidate weights``, so no saving in weights can ever pay for one
  more tear stream.
- Remaining ties go to the integer program's choice, which is the same for the same
  input: blocks, streams and cycles reach it in a fixed order (the given order, cycles
  sorted), never in set order, so the answer does not change with the hash seed.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from itertools import pairwise

import networkx as nx
import numpy as np

from model.errors import InputError

__all__ = [
    "Topology",
    "TearSelection",
    "analyse_topology",
    "strongly_connected_parts",
    "choose_tear_streams",
    "calculation_order",
]

MILP_TIME_LIMIT_S = 30.0  # per call; past it the heuristic takes over (exact=False)

StreamTriple = tuple[str, str, str]
BundleKey = tuple[str, str]


@dataclass(frozen=True)
class Topology:
    """Result of :func:`analyse_topology`.

    Attributes
    ----------
    parts
        Strongly connected parts that hold a cycle, each a list of block names in
        calculation order; the parts themselves in calculation order.
    tear_streams
        Chosen tear streams, in the order the streams were given.
    calculation_order
        Every block once; with the tear streams cut, each block after all its feeders.
    cycle_count
        Block cycles enumerated (the rows of the set cover; cycles through a preferred
        tear are not enumerated). A part handed to the heuristic contributes the
        ``max_cycles + 1`` cycles counted before giving up.
    exact
        True when the tear set is a proven minimum under the tie-break rule.
    method
        How the tears were chosen, in words.
    unused_preferred_tears
        Preferred tears that lie on no cycle, so were not torn.
    """

    parts: list[list[str]]
    tear_streams: list[str]
    calculation_order: list[str]
    cycle_count: int
    exact: bool
    method: str
    unused_preferred_tears: list[str] = field(default_factory=list)


@dataclass(frozen=True)
class TearSelection:
    """Result of :func:`choose_tear_streams` (fields as in :class:`Topology`)."""

    tear_streams: list[str]
    cycle_count: int
    exact: bool
    method: str
    unused_preferred_tears: list[str]


# ---- input and graph -------------------------------------------------------------------


def _check_graph_input(blocks: Sequence[str], streams: Sequence[StreamTriple]) -> None:
    """Raise InputError for duplicate names or streams touching unknown blocks."""
    seen_blocks: set[str] = set()
    for index, name in enumerate(blocks):
        if not isinstance(name, str) or name in seen_blocks:
            raise InputError(f"blocks[{index}]", name, "a block name given once")
        seen_blocks.add(name)
    seen_streams: set[str] = set()
    for index, stream in enumerate(streams):
        if not (isinstance(stream, tuple | list) and len(stream) == 3):
            raise InputError(f"streams[{index}]", stream, "(stream name, source, target)")
        name, source, target = stream
        if not isinstance(name, str) or name in seen_streams:
            raise InputError(f"streams[{index}].name", name, "a stream name given once")
        seen_streams.add(name)
        for end, block in (("source", source), ("target", target)):
            if block not in seen_blocks:
                raise InputError(f"{name}.{end}", block, "one of the blocks given")


def _build_graph(blocks: Sequence[str], streams: Sequence[StreamTriple]) -> nx.MultiDiGraph:
    """Block graph with one edge per stream, keyed by stream name, in the given order."""
    graph = nx.MultiDiGraph()
    graph.add_nodes_from(blocks)
    for name, source, target in streams:
        graph.add_edge(source, target, key=name)
    return graph


def _cyclic_components(graph: nx.DiGraph | nx.MultiDiGraph) -> list[list[str]]:
    """Strongly connected components holding a cycle, in the graph's node order.

    Lists, not sets: set order of strings changes from run to run, and every later
    step (cycle enumeration, milp columns, ties) must see the same order each time.
    """
    rank = {node: index for index, node in enumerate(graph)}
    components = [
        sorted(component, key=rank.__getitem__)
        for component in nx.strongly_connected_components(graph)
        if len(component) > 1 or graph.has_edge(*[next(iter(component))] * 2)
    ]
    return sorted(components, key=lambda component: rank[component[0]])


def _stream_weights(
    streams: Sequence[StreamTriple], tear_weights: Mapping[str, float] | None
) -> dict[str, float]:
    """Tear weight per stream; a stream missing from the mapping gets the largest weight."""
    if not tear_weights:
        return {name: 0.0 for name, _, _ in streams}
    for name, weight in tear_weights.items():
        if not (isinstance(weight, int | float) and math.isfinite(weight) and weight >= 0):
            raise InputError(f"tear_weights[{name!r}]", weight, "a finite number >= 0")
    largest = float(max(tear_weights.values()))
    return {name: float(tear_weights.get(name, largest)) for name, _, _ in streams}


def _check_preferred(streams: Sequence[StreamTriple], preferred: Iterable[str]) -> set[str]:
    """The preferred tears as a set; each must be one of the streams."""
    names = {name for name, _, _ in streams}
    chosen = set()
    for name in preferred:
        if name not in names:
            raise InputError("preferred_tears", name, "names of streams of the flowsheet")
        chosen.add(name)
    return chosen


# ---- exact cover and heuristic ------------------------------------------------------------


def _bundles_of(graph: nx.MultiDiGraph, nodes: list[str], cut: set[str]) -> nx.DiGraph:
    """Simple digraph on ``nodes``; edge attribute ``streams`` lists the uncut parallels."""
    inside = set(nodes)
    bundles = nx.DiGraph()
    bundles.add_nodes_from(nodes)
    for source, target, name in graph.out_edges(nodes, keys=True):
        if target in inside and name not in cut:
            if bundles.has_edge(source, target):
                bundles[source][target]["streams"].append(name)
            else:
                bundles.add_edge(source, target, streams=[name])
    return bundles


def _sub_part(bundles: nx.DiGraph, nodes: list[str]) -> nx.DiGraph:
    """Copy of ``bundles`` on ``nodes`` with the nodes and edges in a fixed order."""
    inside = set(nodes)
    part = nx.DiGraph()
    part.add_nodes_from(nodes)
    part.add_edges_from(
        (source, target, data)
        for source, target, data in bundles.out_edges(nodes, data=True)
        if target in inside
    )
    return part


def _enumerate_cycles(part: nx.DiGraph, max_cycles: int) -> list[list[BundleKey]] | None:
    """Block cycles of a part as lists of bundles; None once there are more than max_cycles.

    networkx yields the cycles in an order that follows set order (so the string hash
    seed); each cycle is rotated to start at its first block in node order and the list
    is sorted, so the integer program sees the same rows in every run.
    """
    rank = {node: index for index, node in enumerate(part)}
    ranked_cycles: list[list[int]] = []
    for node_cycle in nx.simple_cycles(part):
        if len(ranked_cycles) == max_cycles:
            return None
        ranks = [rank[node] for node in node_cycle]
        start = ranks.index(min(ranks))
        ranked_cycles.append(ranks[start:] + ranks[:start])
    nodes = list(part)
    return [
        list(pairwise([nodes[index] for index in [*ranks, ranks[0]]]))
        for ranks in sorted(ranked_cycles)
    ]


@dataclass
class _CoverPlan:
    """Preferred tears forced, and the parts left to cover exactly or by heuristic."""

    forced: set[str] = field(default_factory=set)
    exact_parts: list[tuple[nx.DiGraph, list[list[BundleKey]]]] = field(default_factory=list)
    heuristic_parts: list[nx.DiGraph] = field(default_factory=list)
    cycle_count: int = 0

    def all_parts(self) -> list[nx.DiGraph]:
        return [part for part, _ in self.exact_parts] + self.heuristic_parts

    def exact_bundles(self) -> list[BundleKey]:
        return [key for part, _ in self.exact_parts for key in part.edges]


def _plan_cover(graph: nx.MultiDiGraph, preferred: set[str], max_cycles: int) -> _CoverPlan:
    """Tear the preferred streams on cycles, then enumerate the cycles left, part by part."""
    plan = _CoverPlan()
    for component in _cyclic_components(graph):
        plan.forced |= {
            name
            for _, target, name in graph.edges(component, keys=True)
            if name in preferred and target in component
        }
        left = _bundles_of(graph, component, plan.forced)
        for sub_part in _cyclic_components(left):
            part = _sub_part(left, sub_part)
            cycles = _enumerate_cycles(part, max_cycles)
            if cycles is None:
                plan.cycle_count += max_cycles + 1
                plan.heuristic_parts.append(part)
            else:
                plan.cycle_count += len(cycles)
                plan.exact_parts.append((part, cycles))
    return plan


def _bundle_costs(parts: list[nx.DiGraph], weights: dict[str, float]) -> dict[BundleKey, float]:
    """Cost per bundle: streams * M + their weights, M = 1 + all weights (count first)."""
    bundles = {
        (source, target): streams
        for part in parts
        for source, target, streams in part.edges(data="streams")
    }
    unit = 1.0 + sum(weights[name] for streams in bundles.values() for name in streams)
    return {
        key: len(streams) * unit + sum(weights[name] for name in streams)
        for key, streams in bundles.items()
    }


def _solve_cover(
    bundle_cost: dict[BundleKey, float], cycles: list[list[BundleKey]]
) -> set[BundleKey] | None:
    """Minimum-cost set of bundles meeting every cycle (scipy milp); None if unsolved."""
    # scipy.optimize costs a few hundred ms to import: only a flowsheet with a loop pays it
    from scipy.optimize import Bounds, LinearConstraint, milp
    from scipy.sparse import csr_array

    columns = list(bundle_cost)
    column_of = {key: index for index, key in enumerate(columns)}
    rows, cols = [], []
    for row, cycle in enumerate(cycles):
        for key in cycle:
            rows.append(row)
            cols.append(column_of[key])
    matrix = csr_array((np.ones(len(rows)), (rows, cols)), shape=(len(cycles), len(columns)))
    result = milp(
        c=np.array([bundle_cost[key] for key in columns]),
        constraints=LinearConstraint(matrix, lb=1.0, ub=np.inf),
        integrality=np.ones(len(columns)),
        bounds=Bounds(0.0, 1.0),
        options={"mip_rel_gap": 0.0, "time_limit": MILP_TIME_LIMIT_S},
    )
    if result.status != 0 or result.x is None:
        return None
    return {key for key, value in zip(columns, result.x, strict=True) if value > 0.5}


def _eades_lin_smyth_order(part: nx.DiGraph) -> list[str]:
    """Block ordering with few backward streams (Eades, Lin & Smyth 1993), stable."""
    rank = {node: index for index, node in enumerate(part)}
    out_weight = {node: 0 for node in part}
    in_weight = {node: 0 for node in part}
    for source, target, streams in part.edges(data="streams"):
        if source != target:
            out_weight[source] += len(streams)
            in_weight[target] += len(streams)
    remaining = set(part)
    head: list[str] = []
    tail: list[str] = []  # sinks, latest first

    def remove(node: str) -> None:
        remaining.discard(node)
        for target, data in part[node].items():
            if target in remaining:
                in_weight[target] -= len(data["streams"])
        for source in part.predecessors(node):
            if source in remaining:
                out_weight[source] -= len(part[source][node]["streams"])

    while remaining:
        progress = True
        while progress:
            progress = False
            for node in sorted(remaining, key=rank.__getitem__):
                if node not in remaining:
                    continue
                if out_weight[node] == 0:
                    tail.append(node)
                elif in_weight[node] == 0:
                    head.append(node)
                else:
                    continue
                remove(node)
                progress = True
        if remaining:
            best = max(
                remaining, key=lambda node: (out_weight[node] - in_weight[node], -rank[node])
            )
            head.append(best)
            remove(best)
    return head + tail[::-1]


def _heuristic_cover(part: nx.DiGraph, bundle_cost: dict[BundleKey, float]) -> set[BundleKey]:
    """Backward bundles of the Eades-Lin-Smyth order, minus every one that can go back."""
    position = {node: index for index, node in enumerate(_eades_lin_smyth_order(part))}
    torn = [key for key in part.edges if position[key[0]] >= position[key[1]]]
    remaining = nx.DiGraph()
    remaining.add_nodes_from(part)
    remaining.add_edges_from(key for key in part.edges if position[key[0]] < position[key[1]])
    kept: set[BundleKey] = set()
    for source, target in sorted(torn, key=lambda key: -bundle_cost[key]):
        if source != target and not nx.has_path(remaining, target, source):
            remaining.add_edge(source, target)
        else:
            kept.add((source, target))
    return kept


# ---- public functions ---------------------------------------------------------------------


def strongly_connected_parts(
    blocks: Sequence[str], streams: Sequence[StreamTriple]
) -> list[list[str]]:
    """Strongly connected parts that hold a cycle, blocks in the given order.

    Parameters
    ----------
    blocks
        Block names (feeds and products included).
    streams
        ``(stream name, source block, target block)`` per stream.

    Returns
    -------
    list of list of str
        One list per part, ordered by each part's first block in ``blocks``.
    """
    _check_graph_input(blocks, streams)
    return _cyclic_components(_build_graph(blocks, streams))


def choose_tear_streams(
    blocks: Sequence[str],
    streams: Sequence[StreamTriple],
    preferred_tears: Iterable[str] = (),
    tear_weights: Mapping[str, float] | None = None,
    max_cycles: int = 5000,
) -> TearSelection:
    """Choose tear streams that break every cycle (see the module docstring for the rule).

    Parameters
    ----------
    blocks, streams
        As in :func:`strongly_connected_parts`.
    preferred_tears
        Stream names the user wants torn; each one on a cycle is always torn.
    tear_weights
        Tear variables per stream (components + 2); among equal tear counts the smaller
        total wins. Streams missing from the mapping take its largest weight; names
        that are no stream are ignored.
    max_cycles
        Largest number of block cycles per part solved exactly; past it the
        Eades-Lin-Smyth heuristic is used for that part.

    Returns
    -------
    TearSelection
    """
    _check_graph_input(blocks, streams)
    if isinstance(max_cycles, bool) or not isinstance(max_cycles, int) or max_cycles < 0:
        raise InputError("max_cycles", max_cycles, "a whole number >= 0")
    preferred = _check_preferred(streams, preferred_tears)
    weights = _stream_weights(streams, tear_weights)
    plan = _plan_cover(_build_graph(blocks, streams), preferred, max_cycles)
    bundle_cost = _bundle_costs(plan.all_parts(), weights)

    torn_bundles: set[BundleKey] = set()
    notes: list[str] = []
    heuristic_parts = list(plan.heuristic_parts)
    if heuristic_parts:
        notes.append(f"{len(heuristic_parts)} part(s) with more than {max_cycles} simple cycles")
    if plan.exact_parts:
        cycles = [cycle for _, part_cycles in plan.exact_parts for cycle in part_cycles]
        cover = _solve_cover({key: bundle_cost[key] for key in plan.exact_bundles()}, cycles)
        if cover is None:
            notes.append(f"scipy milp gave no answer within {MILP_TIME_LIMIT_S:g} s")
            heuristic_parts += [part for part, _ in plan.exact_parts]
        else:
            torn_bundles |= cover
            notes.insert(0, f"set cover over {len(cycles)} simple cycles (scipy milp)")
    for part in heuristic_parts:
        torn_bundles |= _heuristic_cover(part, bundle_cost)
    if heuristic_parts:
        notes.append("Eades-Lin-Smyth heuristic used there (not proven minimum)")
    if plan.forced:
        notes.append(f"{len(plan.forced)} preferred tear(s) honoured")
    if not notes:
        notes.append("no recycle: no tear streams needed")

    streams_of = {
        (u, v): names for part in plan.all_parts() for u, v, names in part.edges.data("streams")
    }
    torn = plan.forced | {name for key in torn_bundles for name in streams_of[key]}
    return TearSelection(
        tear_streams=[name for name, _, _ in streams if name in torn],
        cycle_count=plan.cycle_count,
        exact=not heuristic_parts,
        method="; ".join(notes),
        unused_preferred_tears=[name for name, _, _ in streams if name in preferred - plan.forced],
    )


def calculation_order(
    blocks: Sequence[str], streams: Sequence[StreamTriple], tear_streams: Iterable[str]
) -> list[str]:
    """Every block once, each after all blocks feeding it once the tear streams are cut.

    Ties go to the block given first (``networkx.lexicographical_topological_sort``).
    Raises InputError naming ``tear_streams`` when a cycle is left uncut.
    """
    _check_graph_input(blocks, streams)
    cut = set(tear_streams)
    rank = {name: index for index, name in enumerate(blocks)}
    graph = nx.DiGraph()
    graph.add_nodes_from(blocks)
    graph.add_edges_from((source, target) for name, source, target in streams if name not in cut)
    try:
        return list(nx.lexicographical_topological_sort(graph, key=rank.__getitem__))
    except nx.NetworkXUnfeasible:
        cycle = [source for source, _ in nx.find_cycle(graph)]
        raise InputError(
            "tear_streams", sorted(cut), f"a set that cuts every cycle (uncut: {cycle})"
        ) from None


def analyse_topology(
    blocks: Sequence[str],
    streams: Sequence[StreamTriple],
    preferred_tears: Iterable[str] = (),
    tear_weights: Mapping[str, float] | None = None,
    max_cycles: int = 5000,
) -> Topology:
    """Strongly connected parts, minimum tear streams and calculation order of a flowsheet.

    Parameters
    ----------
    blocks
        Block names, feeds and products included; their order breaks ties.
    streams
        ``(stream name, source block, target block)`` per stream.
    preferred_tears, tear_weights, max_cycles
        See :func:`choose_tear_streams` and the tie-break rule in the module docstring.

    Returns
    -------
    Topology

    Examples
    --------
    >>> topology = analyse_topology(
    ...     ["feed", "mixer", "reactor", "separator", "product"],
    ...     [("S1", "feed", "mixer"), ("S2", "mixer", "reactor"),
    ...      ("S3", "reactor", "separator"), ("recycle", "separator", "mixer"),
    ...      ("S4", "separator", "product")],
    ...     preferred_tears=["recycle"])
    >>> topology.tear_streams, topology.calculation_order[:2]
    (['recycle'], ['feed', 'mixer'])
    """
    selection = choose_tear_streams(blocks, streams, preferred_tears, tear_weights, max_cycles)
    order = calculation_order(blocks, streams, selection.tear_streams)
    position = {name: index for index, name in enumerate(order)}
    parts = [
        sorted(part, key=position.__getitem__) for part in strongly_connected_parts(blocks, streams)
    ]
    return Topology(
        parts=sorted(parts, key=lambda part: position[part[0]]),
        tear_streams=selection.tear_streams,
        calculation_order=order,
        cycle_count=selection.cycle_count,
        exact=selection.exact,
        method=selection.method,
        unused_preferred_tears=selection.unused_preferred_tears,
    )
