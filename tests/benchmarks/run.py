"""Run every benchmark in this folder and print (or save) their figures.

Usage, from the project root::

    python -m tests.benchmarks.run            # full mode
    python -m tests.benchmarks.run --quick    # smoke mode, well under two minutes
    python -m tests.benchmarks.run --only enthalpy --json results.json

Each benchmark is a module ``bench_*.py`` exposing ``main(quick: bool) -> dict``.
Times are reported as ratios measured in the same run; pass counts do not depend on
the machine.
"""

from __future__ import annotations

import argparse
import importlib
import json
import platform
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent


def benchmark_names() -> list[str]:
    return sorted(p.stem.removeprefix("bench_") for p in HERE.glob("bench_*.py"))


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="small sizes, for smoke runs")
    parser.add_argument("--only", nargs="*", default=None, help="names, e.g. enthalpy topology")
    parser.add_argument("--json", type=Path, default=None, help="also write all figures here")
    args = parser.parse_args(argv)
    names = args.only or benchmark_names()
    results: dict[str, object] = {
        "machine": f"{platform.machine()} python {platform.python_version()}",
        "quick": args.quick,
    }
    for name in names:
        module = importlib.import_module(f"tests.benchmarks.bench_{name}")
        print(f"== {name} ==", flush=True)
        start = time.perf_counter()
        results[name] = module.main(quick=args.quick)
        print(f"   ({time.perf_counter() - start:.1f} s)\n", flush=True)
    if args.json:
        args.json.write_text(json.dumps(results, indent=2, default=str))
    return 0


if __name__ == "__main__":
    sys.exit(main())
