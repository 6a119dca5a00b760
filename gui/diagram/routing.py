"""Orthogonal stream routes around blocks: a shortest path with a bend penalty (Qt-free).

A stream leaves its outlet to the right and enters its inlet from the left, each
through a short horizontal stub. Between the two stubs the route is searched on a
sparse grid whose lines are the stubs' own lines, lines a clearance off each block's
sides and a ring around them all, so every corner a good route needs is on the grid.
Each grid point appears twice in the graph, once per direction of travel (across or
up and down); turning costs :attr:`RouteSettings.bend_cost` on top of the length, so
the shortest path (``networkx.dijkstra_path``) is short and bends little. Grid edges
that would pass through a block, grown by the clearance, are left out.

Only blocks near the stream are put in its grid at first; a route that then crosses
another block is searched again with that block added, so a stream between two
neighbours costs a handful of grid points however large the diagram is. A user's bend
points are waypoints: the route passes through each in order, leg by leg.

Rectangles are ``(left, top, right, bottom)`` with y growing downwards (scene
coordinates); points are ``(x, y)``.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from itertools import pairwise

import networkx as nx

Point = tuple[float, float]
Rect = tuple[float, float, float, float]

ACROSS, ALONG = 0, 1  # horizontal and vertical travel


@dataclass(frozen=True)
class RouteSettings:
    """How routes keep off blocks and how much a bend costs (scene units)."""

    clearance: float = 10.0  #: the gap kept between a line and a block
    stub: float = 18.0  #: horizontal run out of an outlet and into an inlet
    bend_cost: float = 60.0  #: a bend costs as much as this much more length
    lane_spacing: float = 10.0  #: how far apart routes of neighbouring ports keep
    reach: float = 90.0  #: how far around its ends a stream looks for blocks at first
    #: a backward stream's runs above its lower end cost this fraction more, so recycles
    #: return below the line rather than over it
    below_bias: float = 0.25
    #: running along another stream's line costs this many times the shared length more,
    #: so two streams share a run only where there is no other way
    share_cost: float = 2.0


DEFAULT_SETTINGS = RouteSettings()


def route_stream(
    start: Point,
    end: Point,
    obstacles: Sequence[Rect],
    waypoints: Sequence[Point] = (),
    lane: int = 0,
    settings: RouteSettings = DEFAULT_SETTINGS,
    arrive_lane: int = 0,
    occupied: Sequence[tuple[Point, Point]] = (),
) -> list[Point]:
    """Corner points from an outlet ``start`` to an inlet ``end`` around ``obstacles``.

    ``lane`` (the outlet's place on its block) moves the lines near blocks a little
    further out, so routes from neighbouring ports do not share a run; ``arrive_lane``
    (the inlet's place) lengthens the inlet stub likewise, so streams into neighbouring
    inlets of one block come down to them on separate verticals. ``occupied`` holds the
    segments of the other streams' lines: running along one costs extra
    (:attr:`RouteSettings.share_cost`), and lines a lane beside each are on the grid. When no route
    exists (an end stub inside another block), the plain two-bend route is returned.

    >>> route_stream((0.0, 0.0), (200.0, 0.0), [(-100.0, -30.0, 0.0, 30.0)])
    [(0.0, 0.0), (200.0, 0.0)]
    """
    leave = (start[0] + settings.stub, start[1])
    arrive = (end[0] - settings.stub - settings.lane_spacing * arrive_lane, end[1])
    stops = [leave, *waypoints, arrive]
    grown = [_grow(rect, settings.clearance) for rect in obstacles]
    region = _bounds(stops, settings.reach)
    chosen = {index for index, rect in enumerate(grown) if _overlaps(rect, region)}
    for _attempt in range(len(grown) + 1):
        path = _search(stops, [grown[i] for i in sorted(chosen)], lane, settings, occupied)
        if path is None:
            break
        crossed = {i for i, rect in enumerate(grown) if i not in chosen and _path_hits(path, rect)}
        if not crossed:
            return simplify([start, *path, end])
        chosen |= crossed
    middle = (leave[0] + arrive[0]) / 2
    return simplify([start, leave, (middle, leave[1]), (middle, arrive[1]), arrive, end])


def bend_count(points: Sequence[Point]) -> int:
    """Corners of a simplified orthogonal route (its points less its two ends)."""
    return max(0, len(simplify(list(points))) - 2)


def simplify(points: list[Point]) -> list[Point]:
    """Drop repeated points and points in the middle of a straight run."""
    kept: list[Point] = []
    for point in points:
        if kept and point == kept[-1]:
            continue
        if len(kept) >= 2 and _collinear(kept[-2], kept[-1], point):
            kept[-1] = point
        else:
            kept.append(point)
    return kept


def segment_crosses(a: Point, b: Point, rect: Rect) -> bool:
    """Whether the axis-parallel segment a-b passes through the open interior of ``rect``."""
    left, top, right, bottom = rect
    low_x, high_x = sorted((a[0], b[0]))
    low_y, high_y = sorted((a[1], b[1]))
    return low_x < right and high_x > left and low_y < bottom and high_y > top


# ---- the search -----------------------------------------------------------------------------
def _search(
    stops: list[Point],
    rects: list[Rect],
    lane: int,
    settings: RouteSettings,
    occupied: Sequence[tuple[Point, Point]] = (),
) -> list[Point] | None:
    offset = settings.lane_spacing * lane
    outer = _bounds([*stops, *[(r[0], r[1]) for r in rects], *[(r[2], r[3]) for r in rects]], 0)
    ring = settings.clearance * 2 + offset
    xs = {p[0] for p in stops} | {outer[0] - ring, outer[2] + ring}
    ys = {p[1] for p in stops} | {outer[1] - ring, outer[3] + ring}
    for left, top, right, bottom in rects:
        xs |= {left - offset, right + offset}
        ys |= {top - offset, bottom + offset}
    for a, b in pairwise(stops):  # a jog half-way between two stops
        xs.add((a[0] + b[0]) / 2)
        ys.add((a[1] + b[1]) / 2)
    region = (outer[0] - ring, outer[1] - ring, outer[2] + ring, outer[3] + ring)
    runs = _runs_within(occupied, region)
    spacing = settings.lane_spacing  # a lane beside a run near a block, to step aside to
    xs |= {x + spacing for x in runs[ALONG] if any(abs(x - r[2]) <= spacing for r in rects)}
    xs |= {x - spacing for x in runs[ALONG] if any(abs(x - r[0]) <= spacing for r in rects)}
    graph = _grid_graph(sorted(xs), sorted(ys), rects, set(stops), settings, stops, runs)
    points: list[Point] = [stops[0]]
    for number, (a, b) in enumerate(pairwise(stops)):
        first, last = number == 0, number == len(stops) - 2
        leg = _leg(graph, a, b, first, last, settings.bend_cost)
        if leg is None:
            return None
        points.extend(leg[1:])
    return points


def _grid_graph(
    xs: list[float],
    ys: list[float],
    rects: list[Rect],
    free: set[Point],
    settings: RouteSettings,
    stops: list[Point],
    runs: dict[int, dict[float, list[tuple[float, float]]]],
) -> nx.Graph:
    edges: list[tuple[tuple, tuple, float]] = []
    high_y = max(p[1] for p in stops)
    backward = stops[-1][0] < stops[0][0]
    for y in ys:
        blocked = [(r[0], r[2]) for r in rects if r[1] < y < r[3]]
        factor = 1.0 + (settings.below_bias if backward and y < high_y else 0.0)
        row = [x for x in xs if (x, y) in free or not any(lo < x < hi for lo, hi in blocked)]
        for a, b in pairwise(row):
            if not any(lo < b and hi > a for lo, hi in blocked):
                shared = _shared(runs[ACROSS].get(y, ()), a, b) * settings.share_cost
                edges.append(((a, y, ACROSS), (b, y, ACROSS), (b - a) * factor + shared))
    for x in xs:
        blocked = [(r[1], r[3]) for r in rects if r[0] < x < r[2]]
        column = [y for y in ys if (x, y) in free or not any(lo < y < hi for lo, hi in blocked)]
        for a, b in pairwise(column):
            if not any(lo < b and hi > a for lo, hi in blocked):
                shared = _shared(runs[ALONG].get(x, ()), a, b) * settings.share_cost
                edges.append(((x, a, ALONG), (x, b, ALONG), b - a + shared))
    ends = {node for edge in edges for node in edge[:2]}
    edges += [
        ((x, y, ACROSS), (x, y, ALONG), settings.bend_cost)
        for x, y, direction in ends
        if direction == ACROSS and (x, y, ALONG) in ends
    ]
    graph = nx.Graph()
    graph.add_weighted_edges_from(edges)
    return graph


def _leg(
    graph: nx.Graph, a: Point, b: Point, first: bool, last: bool, bend_cost: float
) -> list[Point] | None:
    """Shortest path from stop ``a`` to stop ``b``; the outlet stub is left and the inlet
    stub reached going across, so a vertical start or finish there costs a bend."""
    source, target = ("source", a), ("target", b)
    for point, node, straight in ((a, source, first), (b, target, last)):
        for direction in (ACROSS, ALONG):
            if graph.has_node((*point, direction)):
                cost = bend_cost if straight and direction == ALONG else 0.0
                graph.add_edge(node, (*point, direction), weight=cost)
    try:
        if not (graph.has_node(source) and graph.has_node(target)):
            return None
        path = nx.dijkstra_path(graph, source, target, weight="weight")
    except nx.NetworkXNoPath:
        return None
    finally:
        for node in (source, target):
            if graph.has_node(node):
                graph.remove_node(node)
    return simplify([(node[0], node[1]) for node in path[1:-1]])


def _runs_within(
    segments: Sequence[tuple[Point, Point]], region: Rect
) -> dict[int, dict[float, list[tuple[float, float]]]]:
    """Other lines' runs inside ``region``: horizontal ones by y, vertical ones by x,
    each as (low, high) along its line."""
    runs: dict[int, dict[float, list[tuple[float, float]]]] = {ACROSS: {}, ALONG: {}}
    left, top, right, bottom = region
    for a, b in segments:
        if a[1] == b[1] and top <= a[1] <= bottom:
            low, high = sorted((a[0], b[0]))
            if low < right and high > left:
                runs[ACROSS].setdefault(a[1], []).append((low, high))
        elif a[0] == b[0] and left <= a[0] <= right:
            low, high = sorted((a[1], b[1]))
            if low < bottom and high > top:
                runs[ALONG].setdefault(a[0], []).append((low, high))
    return runs


def _shared(runs: Sequence[tuple[float, float]], a: float, b: float) -> float:
    """Length of a..b that lies along any of ``runs``."""
    return sum(max(0.0, min(b, high) - max(a, low)) for low, high in runs)


# ---- geometry -------------------------------------------------------------------------------
def _grow(rect: Rect, by: float) -> Rect:
    return (rect[0] - by, rect[1] - by, rect[2] + by, rect[3] + by)


def _bounds(points: Sequence[Point], margin: float) -> Rect:
    xs = [p[0] for p in points]
    ys = [p[1] for p in points]
    return (min(xs) - margin, min(ys) - margin, max(xs) + margin, max(ys) + margin)


def _overlaps(a: Rect, b: Rect) -> bool:
    return a[0] < b[2] and a[2] > b[0] and a[1] < b[3] and a[3] > b[1]


def _path_hits(path: list[Point], rect: Rect) -> bool:
    return any(segment_crosses(a, b, rect) for a, b in pairwise(path))


def _collinear(a: Point, b: Point, c: Point) -> bool:
    return (a[0] == b[0] == c[0]) or (a[1] == b[1] == c[1])


def insert_bend(route: Sequence[Point], bends: Sequence[Point], point: Point) -> list[Point]:
    """``bends`` with ``point`` put in, in its place along ``route`` (from source to target),
    so the line still passes through the bend points in order."""
    at = _distance_along(route, point)
    before = [bend for bend in bends if _distance_along(route, bend) <= at]
    return [*before, point, *bends[len(before) :]]


def _distance_along(route: Sequence[Point], point: Point) -> float:
    """How far along ``route`` lies the place nearest to ``point``."""
    best, best_at, travelled = float("inf"), 0.0, 0.0
    for a, b in pairwise(route):
        length = abs(b[0] - a[0]) + abs(b[1] - a[1])
        t = 0.0
        if length > 0:
            dx, dy = b[0] - a[0], b[1] - a[1]
            t = ((point[0] - a[0]) * dx + (point[1] - a[1]) * dy) / (dx * dx + dy * dy)
            t = min(1.0, max(0.0, t))
        near = (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))
        distance = abs(near[0] - point[0]) + abs(near[1] - point[1])
        if distance < best:
            best, best_at = distance, travelled + t * length
        travelled += length
    return best_at
