"""Benchmark of the diagram's stream routing and automatic layout (not a timed test).

Run ``python -m tests.benchmarks.bench_routing [--quick]`` (offscreen). On a generated
case (50 blocks, 10 recycle loops, laid out automatically) it measures:

- ``layout_ms``: the layered layout of all blocks;
- ``route_all_ms``: routing every stream once (what opening the case or a new layout
  costs), through the scene;
- ``drag_step_ms`` / ``drag_step_p95_ms`` / ``drag_step_max_ms``: one step of dragging
  a mixer (median, 95th percentile and worst over the steps; the worst can hold a pause
  of Python's garbage collector): only the streams touching it are routed again;
- ``drag_to_route_all``: the ratio of the two, measured in the same run (the drag
  routes 3 of the case's streams);
- ``bends_mean`` / ``bends_max`` per stream, and ``crossings`` (lines through blocks).
"""

from __future__ import annotations

import argparse
import os
import statistics
import time
from itertools import pairwise

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def main(quick: bool = False) -> dict:
    from PySide6.QtCore import QPointF
    from PySide6.QtWidgets import QApplication

    from gui.diagram.editor import automatic_positions, lay_out_if_unplaced
    from gui.diagram.routing import bend_count, segment_crosses
    from gui.diagram.scene import DiagramScene
    from tests.benchmarks.flowsheet_generator import generate_flowsheet

    _app = QApplication.instance() or QApplication([])
    flowsheet = generate_flowsheet(blocks=50, loops=10, components=2)
    repeats = 3 if quick else 10
    started = time.perf_counter()
    for _ in range(repeats):
        automatic_positions(flowsheet)
    layout_ms = (time.perf_counter() - started) * 1000 / repeats
    lay_out_if_unplaced(flowsheet)
    scene = DiagramScene()
    scene.set_flowsheet(flowsheet)
    route_all = []
    for _ in range(repeats):
        started = time.perf_counter()
        scene.reroute_all()
        route_all.append((time.perf_counter() - started) * 1000)
    item = scene.block_item("M5")
    origin = item.pos()
    steps = []
    for step in range(20 if quick else 100):
        started = time.perf_counter()
        item.setPos(origin + QPointF(2.0 * step, 1.0 * step))  # the scene re-routes here
        steps.append((time.perf_counter() - started) * 1000)
    item.setPos(origin)
    bends = [bend_count(scene.stream_item(s).route()) for s in flowsheet.streams]
    rects = [
        (r.left(), r.top(), r.right(), r.bottom())
        for r in (scene.block_item(b).scene_body_rect() for b in flowsheet.blocks)
    ]
    crossings = sum(
        segment_crosses(a, b, rect)
        for s in flowsheet.streams
        for a, b in pairwise(scene.stream_item(s).route())
        for rect in rects
    )
    results = {
        "blocks": len(flowsheet.blocks),
        "streams": len(flowsheet.streams),
        "layout_ms": layout_ms,
        "route_all_ms": statistics.median(route_all),
        "drag_step_ms": statistics.median(steps),
        "drag_step_p95_ms": statistics.quantiles(steps, n=20)[-1],
        "drag_step_max_ms": max(steps),
        "drag_to_route_all": statistics.median(steps) / statistics.median(route_all),
        "bends_mean": statistics.mean(bends),
        "bends_max": max(bends),
        "crossings": crossings,
    }
    for name, value in results.items():
        print(f"{name:28s} {value:10.4g}")
    return results


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer repeats")
    main(parser.parse_args().quick)
