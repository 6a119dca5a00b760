"""Mutated case files, loaded and solved: only clean refusals and honest results (issue 15).

A seeded mutator (tests/model/case/mutations.py) breaks the example cases: extreme
numbers in specs, wrong types, removed keys, long text, truncation. Each document must
be refused at load with the project's CaseFileError, or solve to a result that never
raises, and a result marked converged must hold finite values and closing balances.
The longer campaign is ``python -m tests.benchmarks.bench_fuzz``.
"""

from __future__ import annotations

import random
import signal
from collections import Counter
from pathlib import Path

import pytest

from model.cli import main
from tests.model.case.mutations import FAULTS, mutated_document, outcome

EXAMPLES = Path(__file__).resolve().parents[3] / "examples"
TEXTS = [path.read_text("utf-8") for path in sorted(EXAMPLES.glob("*.loop.json"))]
DOCUMENTS = 2_000
#: Wall-clock limit of one document, generous for a loaded CI machine; a document that
#: hangs (a parser gone quadratic, a solve that never returns) is what it catches.
SECONDS_LIMIT = 30


def _alarm(signum, frame):  # noqa: ARG001 (signal handler signature)
    raise TimeoutError(f"a fuzzed document took over {SECONDS_LIMIT} s")


@pytest.fixture
def time_limit():
    previous = signal.signal(signal.SIGALRM, _alarm)
    yield lambda: signal.alarm(SECONDS_LIMIT)
    signal.alarm(0)
    signal.signal(signal.SIGALRM, previous)


def test_mutated_cases_load_cleanly_and_solve_honestly(time_limit):
    rng = random.Random(20261202)
    counts: Counter[str] = Counter()
    faults = []
    for number in range(DOCUMENTS):
        text = mutated_document(rng, TEXTS)
        time_limit()
        kind, detail = outcome(text)
        counts[kind] += 1
        if kind in FAULTS:
            faults.append((number, kind, detail))
    assert faults == []
    # the campaign reaches the solve, not only the loader: solved, or iterated to its end.
    # A mutated flash drum (too hot, too low a pressure) can leave a loop without any
    # steady state (water with no way out), so fewer mutated cases solve than with
    # typed splits; some must still solve and close.
    reached = counts["solved, balances close"] + counts["not solved: not converged"]
    assert reached >= DOCUMENTS // 10
    assert counts["solved, balances close"] >= DOCUMENTS // 40


def test_the_command_line_over_mutated_files(tmp_path, capsys, time_limit):
    rng = random.Random(7)
    statuses: Counter[int] = Counter()
    for number in range(150):
        path = tmp_path / f"fuzzed{number}.loop.json"
        path.write_text(mutated_document(rng, TEXTS), encoding="utf-8")
        time_limit()
        status = main(["solve", str(path), "--json"])
        out, err = capsys.readouterr()
        statuses[status] += 1
        assert status in (0, 1, 2)
        assert "Traceback" not in out + err
        if status == 2:
            # the message names the file and what is wrong with it
            assert err.startswith("loopwright solve: ") and len(err.strip()) > 30
    assert statuses[2] and (statuses[0] or statuses[1])
