"""Fuzz campaign: mutated case documents loaded and solved; counts of each outcome.

Each document is loaded (only the project's CaseFileError may refuse it), then solved
with a short iteration limit. Outcomes: refused at load; solved with closing balances;
not converged (a result, with its reason); and the faults this campaign hunts: another
exception at load, an exception out of the solve, a result marked converged with
non-finite values or open balances, a document over the time limit.

    python -m tests.benchmarks.bench_fuzz [--count 20000] [--seed 1]
"""

from __future__ import annotations

import argparse
import random
import time
from collections import Counter
from pathlib import Path

from tests.model.case.mutations import mutated_document, outcome

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


def base_texts() -> list[str]:
    return [path.read_text("utf-8") for path in sorted(EXAMPLES.glob("*.loop.json"))]


def main(quick: bool = True, count: int | None = None, seed: int = 1) -> dict:
    count = count or (500 if quick else 20_000)
    rng = random.Random(seed)
    texts = base_texts()
    kinds: Counter[str] = Counter()
    examples: dict[str, list[str]] = {}
    start = time.perf_counter()
    for _ in range(count):
        document = mutated_document(rng, texts)
        kind, detail = outcome(document)
        kinds[kind] += 1
        if detail and len(examples.setdefault(kind, [])) < 5:
            examples[kind].append(detail)
    elapsed = time.perf_counter() - start
    for kind, number in kinds.most_common():
        print(f"{number:7d}  {kind}")
    for kind, details in examples.items():
        if kind.startswith(("other", "exception", "converged with", "over")):
            print(f"--- {kind}:")
            for detail in details:
                print("   ", detail.replace("\n", "\n    "))
    print(f"{count} documents in {elapsed:.1f} s")
    return {"documents": count, "seconds": elapsed, **dict(kinds)}


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--count", type=int, default=20_000)
    parser.add_argument("--seed", type=int, default=1)
    arguments = parser.parse_args()
    main(quick=False, count=arguments.count, seed=arguments.seed)
