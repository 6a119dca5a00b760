"""The order in which a solve works through a flowsheet: its loops one part at a time.

A flowsheet's recycle loops sit in strongly connected parts of its block graph; every
other block lies on no loop. :func:`solve_steps` cuts the flowsheet into *steps*, in an
order in which every step's inlets come from earlier steps only:

- a *loop part*: the blocks of one strongly connected part that holds a cycle, with the
  tear streams that cut its cycles (the set cover of :mod:`model.solve.topology` chose
  them, so nested or interlocking loops of one part stay together);
- a *run of blocks outside loops*: blocks on no cycle that follow one another in that
  order; each is computed once, when its inlets are known.

The order is a topological order of the condensation of the block graph
(``networkx.condensation``: one node per strongly connected part, tear streams not cut),
ties broken by the calculation order. The calculation order alone would not do: it may
put an unrelated block between two blocks of the same part, and a part must be
converged before anything downstream of it is computed. Inside a step, blocks keep
their calculation order, which is valid there because the tears are cut.

Examples
--------
>>> from model.solve.topology import analyse_topology
>>> blocks = ["feed", "mixer 1", "split 1", "mixer 2", "split 2", "product"]
>>> streams = [("s1", "feed", "mixer 1"), ("s2", "mixer 1", "split 1"),
...            ("recycle 1", "split 1", "mixer 1"), ("s3", "split 1", "mixer 2"),
...            ("s4", "mixer 2", "split 2"), ("recycle 2", "split 2", "mixer 2"),
...            ("s5", "split 2", "product")]
>>> topology = analyse_topology(blocks, streams)
>>> steps = solve_steps(blocks, streams, topology.tear_streams, topology.calculation_order)
>>> [(s.label, s.blocks, s.tear_streams) for s in steps]  # doctest: +NORMALIZE_WHITESPACE
[('blocks outside loops', ['feed'], []),
 ('part 1 of 2', ['mixer 1', 'split 1'], ['recycle 1']),
 ('part 2 of 2', ['mixer 2', 'split 2'], ['recycle 2']),
 ('blocks outside loops', ['product'], [])]
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import networkx as nx

from model.solve.topology import StreamTriple

__all__ = ["SolveStep", "solve_steps", "OUTSIDE_LOOPS"]

#: Label of a step of blocks that lie on no loop.
OUTSIDE_LOOPS = "blocks outside loops"


@dataclass(frozen=True)
class SolveStep:
    """One step of the solve: a loop part to converge, or blocks computed once.

    Attributes
    ----------
    label
        ``"part k of n"`` for the k-th loop part of n, else :data:`OUTSIDE_LOOPS`.
    blocks
        The step's blocks in calculation order.
    tear_streams
        The part's tear streams, in the topology's tear order; empty outside loops.
    """

    label: str
    blocks: list[str]
    tear_streams: list[str]

    @property
    def is_loop(self) -> bool:
        """True for a strongly connected part (it has tear streams to converge)."""
        return bool(self.tear_streams)


def solve_steps(
    blocks: Sequence[str],
    streams: Sequence[StreamTriple],
    tear_streams: Sequence[str],
    calculation_order: Sequence[str],
) -> list[SolveStep]:
    """The steps of a part-by-part solve, in an order that respects every stream.

    Parameters
    ----------
    blocks, streams
        As given to :func:`model.solve.topology.analyse_topology`.
    tear_streams, calculation_order
        Its answer for them (:class:`~model.solve.topology.Topology`).

    Returns
    -------
    list of SolveStep
        Loop parts and runs of blocks outside loops; every block in exactly one step.
    """
    graph = nx.DiGraph()
    graph.add_nodes_from(blocks)
    graph.add_edges_from((source, target) for _, source, target in streams)
    condensed = nx.condensation(graph)
    position = {name: index for index, name in enumerate(calculation_order)}
    members = {
        node: sorted(condensed.nodes[node]["members"], key=position.__getitem__)
        for node in condensed
    }
    order = nx.lexicographical_topological_sort(condensed, key=lambda n: position[members[n][0]])
    source_of = {name: source for name, source, _ in streams}
    groups: list[tuple[list[str], list[str]]] = []  # (blocks, tears) per step
    for node in order:
        part = members[node]
        inside = set(part)
        tears = [t for t in tear_streams if source_of[t] in inside]
        if tears:
            groups.append((part, tears))
        elif groups and not groups[-1][1]:
            groups[-1][0].extend(part)  # one more block outside loops
        else:
            groups.append((list(part), []))
    loops = sum(1 for _, tears in groups if tears)
    steps, number = [], 0
    for part, tears in groups:
        if tears:
            number += 1
        label = f"part {number} of {loops}" if tears else OUTSIDE_LOOPS
        steps.append(SolveStep(label, part, tears))
    return steps
