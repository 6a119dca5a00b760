"""Automatic layered layout of a diagram: calculation order left to right (Qt-free).

For a case written by a script, with no positions. The recycle streams are cut
(:func:`layout_cuts`), which leaves a graph without cycles, so the blocks' topological
order is a calculation order. Each block's column is its longest path from a feed
(``networkx.topological_generations``), except that a block with no inlets (a feed)
sits one column before the first block it feeds, not in column 0. In a column, blocks
are ordered by the mean row of the blocks feeding them (the barycentre rule of
Sugiyama, Tagawa & Toda, IEEE Trans. SMC 11(2), 1981); a column of one block is drawn
level with the block that feeds it, so a main line runs straight. Recycle streams then
run backwards, and the router takes them below the line.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

import networkx as nx

from model.flowsheet.document import Flowsheet

Position = tuple[float, float]

COLUMN_PITCH = 250.0  #: centre to centre across: a block's width plus room for a label
ROW_GAP = 70.0  #: free height between two blocks of one column


def flowsheet_layout(
    flowsheet: Flowsheet, height_of: Callable[[str], float]
) -> dict[str, Position]:
    """Layered positions for every block of ``flowsheet`` (see :func:`layout_cuts`)."""
    blocks = list(flowsheet.blocks)
    streams = [(s.name, s.source, s.target) for s in flowsheet.streams.values()]
    preferred = [s.name for s in flowsheet.streams.values() if s.preferred_tear]
    cut = layout_cuts(blocks, streams, preferred)
    graph = nx.DiGraph()
    graph.add_nodes_from(blocks)
    graph.add_edges_from((s, t) for name, s, t in streams if name not in cut)
    rank = {name: index for index, name in enumerate(blocks)}
    order = list(nx.lexicographical_topological_sort(graph, key=rank.__getitem__))
    return layered_positions(order, streams, cut, height_of)


def layout_cuts(
    blocks: Sequence[str], streams: Sequence[tuple[str, str, str]], preferred: Sequence[str]
) -> set[str]:
    """The streams drawn running backwards: the preferred tears, then each stream that
    returns to a block still open in a depth-first walk down the flow from the feeds
    (a back edge; the walk follows the process, so these are its recycles)."""
    cut = set(preferred)
    fed = {t for name, s, t in streams if name not in cut}
    graph = nx.DiGraph()  # the walk starts from the feeds: they come first
    graph.add_nodes_from([name for name in blocks if name not in fed])
    graph.add_nodes_from(blocks)
    graph.add_edges_from((s, t) for name, s, t in streams if name not in cut)
    back: set[tuple[str, str]] = set()
    open_blocks: set[str] = set()
    for u, v, label in nx.dfs_labeled_edges(graph):
        if label == "forward":
            open_blocks.add(v)
        elif label == "reverse":
            open_blocks.discard(v)
        elif label == "nontree" and v in open_blocks:
            back.add((u, v))
    return cut | {name for name, s, t in streams if (s, t) in back}


def layered_positions(
    blocks: Sequence[str],
    streams: Sequence[tuple[str, str, str]],
    tear_streams: Sequence[str],
    height_of: Callable[[str], float],
    column_pitch: float = COLUMN_PITCH,
    row_gap: float = ROW_GAP,
) -> dict[str, Position]:
    """Centre positions of ``blocks`` (names in calculation order) for a layered drawing.

    ``streams`` are ``(name, source, target)``; ``height_of(block)`` is a block's drawn
    height. Column 0 is at x = 0, and each column is centred on y = 0.
    """
    cut = set(tear_streams)
    graph = nx.DiGraph()
    graph.add_nodes_from(blocks)
    graph.add_edges_from((s, t) for name, s, t in streams if name not in cut and s != t)
    if not nx.is_directed_acyclic_graph(graph):  # cuts that leave a cycle: drop back edges
        order = {name: index for index, name in enumerate(blocks)}
        graph.remove_edges_from([(s, t) for s, t in list(graph.edges) if order[s] >= order[t]])
    column = {}
    for number, generation in enumerate(nx.topological_generations(graph)):
        for name in generation:
            column[name] = number
    for name in reversed(list(nx.topological_sort(graph))):  # feeds next to what they feed
        if graph.in_degree(name) == 0 and graph.out_degree(name) > 0:
            column[name] = min(column[t] for t in graph.successors(name)) - 1
    shift = min(column.values(), default=0)
    columns: dict[int, list[str]] = {}
    for name in blocks:
        columns.setdefault(column[name] - shift, []).append(name)
    rank: dict[str, float] = {}
    positions: dict[str, Position] = {}
    for number in sorted(columns):
        members = _ordered(columns[number], graph, rank, blocks)
        heights = [height_of(name) for name in members]
        total = sum(heights) + row_gap * (len(members) - 1)
        top = -total / 2
        feeding = [p for p in graph.predecessors(members[0]) if p in positions]
        if len(members) == 1 and feeding:
            top = positions[feeding[0]][1] - total / 2
        for index, (name, height) in enumerate(zip(members, heights, strict=True)):
            rank[name] = index - (len(members) - 1) / 2
            positions[name] = (number * column_pitch, top + height / 2)
            top += height + row_gap
    return positions


def _ordered(
    members: list[str], graph: nx.DiGraph, rank: dict[str, float], blocks: Sequence[str]
) -> list[str]:
    """Members by the mean row of their placed predecessors (calculation order on ties);
    blocks fed by nothing placed yet keep their calculation order after the others."""
    order = {name: index for index, name in enumerate(blocks)}

    def key(name: str) -> tuple[float, int]:
        placed = [rank[p] for p in graph.predecessors(name) if p in rank]
        if not placed:
            placed = [rank[s] for s in graph.successors(name) if s in rank] or [0.0]
        return (sum(placed) / len(placed), order[name])

    return sorted(members, key=key)


def needs_layout(positions: Sequence[Position]) -> bool:
    """Whether a diagram has no positions of its own: two or more blocks, all at one place
    (a case file without positions reads every block at the origin)."""
    return len(positions) >= 2 and len(set(positions)) == 1
