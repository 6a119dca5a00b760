"""Passes of the default against the best compared method over whole families of loops.

The suite and its variants (:mod:`tests.benchmarks.recycle_cases`,
:mod:`tests.benchmarks.recycle_variants`) are a few points of each loop shape; these
grids sweep the shapes' parameters, so a rule tuned on one point shows what it does to
its neighbours. Every loop is invented (scenarios of our own). Each family reports the
default's passes, the sum of the best compared method's passes per loop (the fewest of
direct substitution, polykin's Wegstein, scipy broyden1 and scipy anderson that
converged, as in :mod:`tests.benchmarks.bench_recycle_methods`, 1e-8) and how many loops
the default needs more, or fewer, passes on. Pass counts do not depend on the machine.

Run: ``python -m tests.benchmarks.bench_families [--quick]`` (``--quick``: a coarse
isomerisation grid).
"""

from __future__ import annotations

import argparse
from collections.abc import Callable

import numpy as np

from model.flowsheet.document import Flowsheet
from model.solve.tear_problem import build_tear_problem
from tests.benchmarks.bench_recycle_methods import COMPARED, METHOD_RUNNERS
from tests.benchmarks.recycle_cases import competing_ethylene, single_loop
from tests.benchmarks.recycle_variants import _bypass, _isomerisation, _purge

LIMIT = 300


def families(quick: bool = False) -> dict[str, dict[str, Callable[[], Flowsheet]]]:
    """Family name -> loop label -> flowsheet builder."""
    steps = (0.2, 0.5, 0.8) if quick else tuple(np.round(np.arange(0.1, 0.95, 0.1), 1))
    ratios = (0.7, 0.9, 0.99) if quick else (0.5, 0.7, 0.8, 0.9, 0.95, 0.99)
    return {
        # eigenvalues r and r (1 - a)(1 - b): two coupled modes
        "reversible isomerisation a, b, r": {
            f"{a:g}, {b:g}, {r:g}": (lambda a=a, b=b, r=r: _isomerisation(a, b, r))
            for a in steps
            for b in steps
            for r in ratios
        },
        "single loop, recycle r": {
            f"{r:g}": (lambda r=r: single_loop(r)) for r in (0.3, 0.6, 0.8, 0.9, 0.97, 0.99)
        },
        "inert and purge, purge fraction": {
            f"{p:g}": (lambda p=p: _purge(p))
            for p in (0.01, 0.03, 0.05, 0.1, 0.15, 0.2, 0.3, 0.5, 0.7)
        },
        "energy recycle, bypass fraction": {
            f"{b:g}": (lambda b=b: _bypass(b)) for b in (0.02, 0.05, 0.1, 0.2, 0.4, 0.6, 0.8)
        },
        "ethylene, recycle fraction f": {
            f"{f:g}": (lambda f=f: competing_ethylene(f))
            for f in (0.1, 0.2, 0.4, 0.55, 0.7, 0.75, 0.85)
        },
    }


def _passes(label: str, builder: Callable[[], Flowsheet]) -> int | None:
    """Passes of one method on a fresh tear problem (None: not converged)."""
    with np.errstate(all="ignore"):
        count, converged, _, _ = METHOD_RUNNERS[label](build_tear_problem(builder()).problem, LIMIT)
    return count if converged else None


def measure_family(loops: dict[str, Callable[[], Flowsheet]]) -> dict:
    """The default's and the best compared method's passes on every loop of a family."""
    rows = {}
    for label, builder in loops.items():
        compared = [p for p in (_passes(m, builder) for m in COMPARED) if p is not None]
        rows[label] = (_passes("Wegstein", builder), min(compared) if compared else None)
    return rows


def summary(rows: dict) -> dict:
    """Totals over the loops both converged; loops behind (more passes) and ahead."""
    both = {k: v for k, v in rows.items() if v[0] is not None and v[1] is not None}
    return {
        "loops": len(rows),
        "default passes": sum(v[0] for v in both.values()),
        "best compared passes": sum(v[1] for v in both.values()),
        "behind": {k: v for k, v in both.items() if v[0] > v[1]},
        "ahead": sum(v[0] < v[1] for v in both.values()),
        "default not converged": [k for k, v in rows.items() if v[0] is None],
    }


def main(quick: bool = False) -> dict:
    """Measure every family, print one line each (and the loops the default is behind on)."""
    results = {}
    print("| family | loops | default | best compared | behind | ahead | not converged |")
    print("|---|---|---|---|---|---|---|")
    for name, loops in families(quick).items():
        figures = summary(measure_family(loops))
        behind = figures["behind"]
        print(
            f"| {name} | {figures['loops']} | {figures['default passes']} | "
            f"{figures['best compared passes']} | {len(behind)} | {figures['ahead']} | "
            f"{len(figures['default not converged'])} |"
        )
        results[name] = figures
    for name, figures in results.items():
        for label, (default, best) in figures["behind"].items():
            print(f"behind: {name} {label}: {default} against {best}")
    return results


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="a coarse isomerisation grid")
    main(quick=parser.parse_args().quick)
