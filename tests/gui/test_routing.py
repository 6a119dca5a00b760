"""The stream router and the layered layout on their own (plain Python, no Qt).

Expected routes are worked out by hand on the drawn rectangles: the number of bends an
orthogonal route needs between two horizontal stubs is 0 when they are level and
unobstructed, 2 for a level change, 4 for a stream that must run back under a block.
"""

from __future__ import annotations

from itertools import pairwise

import networkx as nx

from gui.diagram.layout import layered_positions, layout_cuts, needs_layout
from gui.diagram.routing import (
    RouteSettings,
    bend_count,
    insert_bend,
    route_stream,
    segment_crosses,
    simplify,
)

SETTINGS = RouteSettings()
# Three blocks in a row, 156 wide and 60 high, centres 250 apart.
ROW = [(-78.0, -30.0, 78.0, 30.0), (172.0, -30.0, 328.0, 30.0), (422.0, -30.0, 578.0, 30.0)]


def crossings(route, rects) -> int:
    return sum(segment_crosses(a, b, rect) for a, b in pairwise(route) for rect in rects)


def on_segment(point, a, b) -> bool:
    low_x, high_x = sorted((a[0], b[0]))
    low_y, high_y = sorted((a[1], b[1]))
    return low_x <= point[0] <= high_x and low_y <= point[1] <= high_y


def is_orthogonal(route) -> bool:
    return all(a[0] == b[0] or a[1] == b[1] for a, b in pairwise(route))


def test_level_neighbours_are_joined_by_a_straight_line():
    route = route_stream((78.0, 0.0), (172.0, 0.0), ROW)
    assert route == [(78.0, 0.0), (172.0, 0.0)]
    assert bend_count(route) == 0


def test_a_level_change_takes_two_bends():
    route = route_stream((78.0, 0.0), (172.0, 12.0), ROW)
    assert is_orthogonal(route) and bend_count(route) == 2
    assert route[0] == (78.0, 0.0) and route[-1] == (172.0, 12.0)


def test_a_stream_past_a_block_goes_around_it_not_through_it():
    route = route_stream((78.0, 0.0), (422.0, 0.0), ROW)
    assert crossings(route, ROW) == 0
    assert is_orthogonal(route) and bend_count(route) == 4


def test_a_recycle_returns_below_the_line_and_keeps_its_stubs():
    route = route_stream((578.0, 0.0), (-78.0, 0.0), ROW)
    assert crossings(route, ROW) == 0 and is_orthogonal(route)
    assert bend_count(route) == 4
    lowest = max(y for _, y in route)
    assert lowest >= 30.0 + SETTINGS.clearance  # under the blocks, clear of them
    assert route[1][0] > 578.0 and route[-2][0] < -78.0  # leaves right, enters from the left


def test_a_route_passes_through_the_users_bend_points_in_order():
    bend = (250.0, -120.0)
    route = route_stream((78.0, 0.0), (422.0, 0.0), ROW, waypoints=[bend])
    assert any(on_segment(bend, a, b) for a, b in pairwise(route))
    assert crossings(route, ROW) == 0 and is_orthogonal(route)


def test_a_far_block_is_found_when_the_first_route_would_cross_it():
    # A wall far above the ends, wider than the first search region: the route must
    # still not pass through it on its way over the middle block.
    wall = (-400.0, -600.0, 1000.0, -40.0)
    route = route_stream((78.0, 0.0), (422.0, 0.0), [*ROW, wall])
    assert crossings(route, [*ROW, wall]) == 0


def test_a_new_bend_is_put_in_its_place_along_the_line():
    route = [(0.0, 0.0), (100.0, 0.0), (100.0, 100.0), (200.0, 100.0)]
    bends = [(100.0, 50.0)]
    assert insert_bend(route, bends, (50.0, 0.0)) == [(50.0, 0.0), (100.0, 50.0)]
    assert insert_bend(route, bends, (150.0, 100.0)) == [(100.0, 50.0), (150.0, 100.0)]


def test_simplify_drops_points_inside_straight_runs():
    assert simplify([(0, 0), (5, 0), (5, 0), (10, 0), (10, 5)]) == [(0, 0), (10, 0), (10, 5)]


def test_needs_layout_only_when_every_block_sits_at_one_place():
    assert needs_layout([(0.0, 0.0)] * 3)
    assert not needs_layout([(0.0, 0.0), (250.0, 0.0)])
    assert not needs_layout([(0.0, 0.0)])


def _loop_streams():
    # feed -> mixer -> reactor -> splitter -> product, splitter -> mixer (the recycle),
    # listed as a script might list them: the splitter before the reactor.
    blocks = ["feed", "mixer", "splitter", "reactor", "product"]
    streams = [
        ("S1", "feed", "mixer"),
        ("S2", "mixer", "reactor"),
        ("S3", "reactor", "splitter"),
        ("recycle", "splitter", "mixer"),
        ("S4", "splitter", "product"),
    ]
    return blocks, streams


def test_the_recycle_is_the_stream_cut_for_the_layout_whatever_the_listing_order():
    blocks, streams = _loop_streams()
    assert layout_cuts(blocks, streams, []) == {"recycle"}


def test_layered_layout_puts_the_calculation_order_left_to_right():
    blocks, streams = _loop_streams()
    cut = layout_cuts(blocks, streams, [])
    graph = nx.DiGraph([(s, t) for name, s, t in streams if name not in cut])
    order = list(nx.topological_sort(graph))
    positions = layered_positions(order, streams, cut, lambda _name: 60.0)
    xs = [positions[name][0] for name in ["feed", "mixer", "reactor", "splitter", "product"]]
    assert xs == sorted(xs) and len(set(xs)) == 5  # one column each, in flow order
    assert positions["splitter"][0] > positions["mixer"][0]  # the recycle runs backwards
    assert len({positions[name][1] for name in blocks}) == 1  # a main line, level


def test_a_side_feed_sits_next_to_the_block_it_feeds():
    blocks = ["feed", "heater", "mixer", "side feed", "product"]
    streams = [
        ("S1", "feed", "heater"),
        ("S2", "heater", "mixer"),
        ("S3", "side feed", "mixer"),
        ("S4", "mixer", "product"),
    ]
    positions = layered_positions(blocks, streams, [], lambda _name: 60.0)
    assert positions["side feed"][0] == positions["heater"][0]
    assert positions["side feed"][1] != positions["heater"][1]  # stacked, not on top
