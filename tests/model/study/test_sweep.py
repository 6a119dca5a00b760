"""Sweeps: the --vary forms, recorded results against the ammonia loop's closed form,
the same numbers on one worker, two workers and a Dask LocalCluster, and exit codes."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from model.case.file import load_case
from model.cli import main
from model.study.sweep_csv import sweep_csv
from model.study.sweep_definition import SweepPlan, parse_record, parse_variation
from model.study.sweep_run import run_sweep
from tests.model.solve.ammonia_closed_form import example_loop

EXAMPLE = Path(__file__).resolve().parents[3] / "examples" / "ammonia_loop_fixed_split.loop.json"
ARGON = "Recycle gas.mole_fraction[argon]"


def _without_targets() -> str:
    """The example's text without its target (which adjusts the purge these sweeps vary)."""
    data = json.loads(EXAMPLE.read_text("utf-8"))
    data["targets"] = []
    return json.dumps(data)


def _plan(*vary: str, records=(ARGON, "Recycle gas.total_flow")) -> SweepPlan:
    return SweepPlan(
        tuple(parse_variation(text) for text in vary), tuple(parse_record(r) for r in records)
    )


def test_the_three_forms_give_their_values():
    linear = parse_variation("Purge splitter.fractions[out2]=0.01:0.05:5")
    assert linear.values == (0.01, 0.02, 0.03, 0.04, 0.05)
    logarithmic = parse_variation("Purge splitter.fractions[out2]=0.001:0.1:3:log")
    assert logarithmic.values == pytest.approx((0.001, 0.01, 0.1), rel=1e-12)
    listed = parse_variation("Loop cooler.T=-30,-20,-10 degC")
    assert listed.values == (-30.0, -20.0, -10.0) and listed.unit == "degC"
    assert str(listed.address) == "Loop cooler.T"


@pytest.mark.parametrize(
    ("text", "token"),
    [
        ("Purge splitter.fractions[out2]=0.01:abc:5", "'abc'"),
        ("Purge splitter.fractions[out2]=0.01:0.05:five", "'five'"),
        ("Purge splitter.fractions[out2]=0.01:0.05:5:cubic", "'cubic'"),
        ("Purge splitter.fractions[out2]=0.01,x2", "'x2'"),
        ("Purge splitter.fractions[out2] 0.01", "no '='"),
        ("Purge splitter=0.01", "'Purge splitter'"),
    ],
)
def test_bad_syntax_names_the_token(text, token):
    with pytest.raises(ValueError) as error:
        parse_variation(text)
    assert token in str(error.value)


def test_recorded_argon_matches_the_closed_form_at_every_point():
    text = _without_targets()
    loop = example_loop(load_case(EXAMPLE))
    result = run_sweep(text, _plan("Purge splitter.fractions[out2]=0.005:0.05:10"), workers=1)
    assert result.complete and not result.not_converged
    for point in result.points:
        # rtol 1e-7: each recycle solve converged to 1e-8 (estimated error)
        assert point.recorded[0] == pytest.approx(loop.argon_fraction(point.values[0]), rel=1e-7)


def test_a_warm_started_neighbour_needs_fewer_passes_than_a_cold_first_point():
    text = _without_targets()
    result = run_sweep(text, _plan("Purge splitter.fractions[out2]=0.02:0.021:5"), workers=1)
    first, *rest = result.points
    assert all(point.passes < first.passes for point in rest)


def _grid():
    return _plan(
        "Converter.reactions[1].conversion=0.15:0.35:3",
        "Purge splitter.fractions[out2]=0.01:0.03:4",
    )


def test_one_worker_and_two_workers_give_identical_results():
    text = _without_targets()
    serial = run_sweep(text, _grid(), workers=1)
    pooled = run_sweep(text, _grid(), workers=2)
    assert serial.points == pooled.points
    assert sweep_csv(serial) == sweep_csv(pooled)
    assert [p.values for p in serial.points] == _grid().points()


def test_a_dask_local_cluster_gives_identical_results():
    distributed = pytest.importorskip("distributed")
    text = _without_targets()
    serial = run_sweep(text, _grid(), workers=1)
    with (
        distributed.LocalCluster(processes=False, n_workers=2, dashboard_address=None) as cluster,
        distributed.Client(cluster) as client,
    ):
        on_cluster = run_sweep(text, _grid(), dask=client)
    assert on_cluster.points == serial.points


def test_a_stop_returns_the_points_solved_so_far():
    text = _without_targets()
    seen = []
    result = run_sweep(
        text,
        _plan("Purge splitter.fractions[out2]=0.01:0.05:12"),
        on_point=lambda index, point: seen.append(index),
        should_stop=lambda: len(seen) >= 5,
    )
    assert result.stopped and not result.complete
    assert len(result.points) == 5 == len(seen)


@pytest.fixture
def plain_case(tmp_path) -> str:
    path = tmp_path / "no targets.loop.json"
    path.write_text(_without_targets(), encoding="utf-8")
    return str(path)


def test_sweep_command_writes_csv_and_exits_0_when_all_converge(tmp_path, plain_case, capsys):
    out = tmp_path / "sweep.csv"
    status = main(
        [
            "sweep",
            plain_case,
            "--vary",
            "Purge splitter.fractions[out2]=0.01,0.02",
            "--record",
            ARGON,
            "--csv",
            str(out),
            "--workers",
            "1",
        ]
    )
    assert status == 0
    rows = list(csv.reader(io.StringIO(out.read_text("utf-8"))))
    assert rows[0][0].startswith("# Results are preliminary estimates")
    assert rows[1][:2] == ["Purge splitter.fractions[out2]", ARGON]
    assert [row[0] for row in rows[2:]] == ["0.01", "0.02"]
    assert ARGON in capsys.readouterr().out


def test_sweep_command_exits_1_and_lists_the_points_that_did_not_converge(plain_case, capsys):
    # no purge: the argon fed cannot leave, so that point cannot converge
    status = main(
        [
            "sweep",
            plain_case,
            "--vary",
            "Purge splitter.fractions[out2]=0,0.02",
            "--record",
            ARGON,
            "--workers",
            "1",
        ]
    )
    assert status == 1
    err = capsys.readouterr().err
    assert "not converged: Purge splitter.fractions[out2] = 0:" in err
    assert "1 of 2 points did not converge" in err


@pytest.mark.parametrize(
    ("arguments", "words"),
    [
        (["--vary", "Purge splitter.fractions[out2]=0.01:0.05:x", "--record", ARGON], "'x'"),
        (["--vary", "Nowhere.T=300,310", "--record", ARGON], "'Nowhere'"),
        (["--vary", "Purge splitter.fractions[out2]=0.01", "--record", "Gone.T"], "'Gone'"),
        (["--vary", "Purge splitter.fractions[out2]=0.01", "--record", "Purge.size"], "Purge"),
    ],
)
def test_sweep_command_exits_2_on_bad_input(arguments, words, plain_case, capsys):
    assert main(["sweep", plain_case, *arguments, "--workers", "1"]) == 2
    assert words in capsys.readouterr().err


def test_a_spec_the_cases_target_adjusts_cannot_be_swept(capsys):
    arguments = ["--vary", "Purge splitter.fractions[out2]=0.01,0.02", "--record", ARGON]
    assert main(["sweep", str(EXAMPLE), *arguments]) == 2
    assert "a spec that no target of the case adjusts" in capsys.readouterr().err


def test_a_sweep_of_conversion_keeps_the_examples_target_met_at_every_point():
    text = EXAMPLE.read_text("utf-8")
    plan = _plan("Converter.reactions[1].conversion=0.15:0.35:3")
    result = run_sweep(text, plan, workers=1)
    assert not result.not_converged
    # the target holds argon in the recycle gas at 8 mol % (its tolerance 1e-7 relative)
    assert all(point.recorded[0] == pytest.approx(0.08, rel=2e-7) for point in result.points)
