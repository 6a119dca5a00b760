"""``loopwright solve --second-opinion``: the answer checked by solving every stream at once.

Outside route: scipy.optimize.root on the simultaneous stream equations
(:mod:`model.solve.second_opinion_solve`); the CLI prints its largest relative difference from the
sequential-modular answer and adds it to ``--json``.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from model.cli import main

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
SHIFT = EXAMPLES / "shift_feed_effluent_exchanger.loop.json"
HYDRATION = EXAMPLES / "ethylene_hydration_two_recycles.loop.json"


def _run(capsys, *argv: str) -> tuple[int, str, str]:
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


def _tightened(tmp_path: Path, source: Path, **settings) -> Path:
    data = json.loads(source.read_text("utf-8"))
    data["solver_settings"].update(settings)
    path = tmp_path / source.name
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


def test_json_holds_the_second_opinion_with_the_agreed_keys(capsys) -> None:
    # Energy recycle (feed-effluent exchanger, adiabatic shift reactor) solved as saved.
    status, out, err = _run(capsys, "solve", str(SHIFT), "--json", "--second-opinion")
    assert status == 0 and err == ""
    entry = json.loads(out)["second_opinion"]
    assert set(entry) == {"agrees", "largest_relative_difference", "message"}
    assert entry["agrees"] is True
    assert 0.0 <= entry["largest_relative_difference"] <= 1e-8
    assert "scipy.optimize.root" in entry["message"] and "agrees with" in entry["message"]


def test_text_report_ends_with_the_second_opinion_line(capsys) -> None:
    status, out, _ = _run(capsys, "solve", str(SHIFT), "--second-opinion")
    assert status == 0
    last = out.rstrip().splitlines()[-1]
    assert last.startswith("Second opinion: agrees: largest relative difference ")
    difference = float(last.split("largest relative difference ")[1].split()[0])
    assert difference <= 1e-8 and "(tolerance 1e-08)" in last


def test_without_the_flag_there_is_no_second_opinion(capsys) -> None:
    _, out, _ = _run(capsys, "solve", str(SHIFT), "--json")
    assert "second_opinion" not in json.loads(out)
    _, out, _ = _run(capsys, "solve", str(SHIFT))
    assert "Second opinion" not in out


def test_a_loosely_converged_loop_shows_its_error_and_a_tighter_solve_agrees(
    capsys, tmp_path
) -> None:
    # With fixed q bounds and the residual rule, the hydration loops converge to a scaled
    # tear residual of 1e-8; their error is larger by about 1 / (1 - loop gain) (Wegstein
    # 1958), so the 1e-8 check fails and says why; at tolerance 1e-12 the answers agree.
    residual_rule = ["--stop-on", "residual", "--fixed-bounds"]
    status, out, _ = _run(
        capsys, "solve", str(HYDRATION), "--json", "--second-opinion", *residual_rule
    )
    assert status == 0
    loose = json.loads(out)["second_opinion"]
    assert loose["agrees"] is False and 1e-8 < loose["largest_relative_difference"] < 1e-6
    _, out, _ = _run(capsys, "solve", str(HYDRATION), "--second-opinion", *residual_rule)
    assert "DOES NOT AGREE" in out and "tighten the tolerance" in out
    _, out, _ = _run(
        capsys,
        "solve",
        str(HYDRATION),
        "--json",
        "--second-opinion",
        "--agreement-tolerance",
        "1e-6",
        *residual_rule,
    )
    assert json.loads(out)["second_opinion"]["agrees"] is True
    # The default rule stops on the estimated error residual / |1 - slope|, so at the
    # saved tolerance 1e-8 the answer already agrees within it.
    _, out, _ = _run(capsys, "solve", str(HYDRATION), "--json", "--second-opinion")
    entry = json.loads(out)["second_opinion"]
    assert entry["agrees"] is True and entry["largest_relative_difference"] <= 1e-8
    tight = _tightened(tmp_path, HYDRATION, tolerance=1e-12)
    _, out, _ = _run(capsys, "solve", str(tight), "--json", "--second-opinion")
    entry = json.loads(out)["second_opinion"]
    assert entry["agrees"] is True and entry["largest_relative_difference"] <= 1e-8


def test_an_unconverged_solve_is_flagged_but_keeps_its_exit_status(capsys, tmp_path) -> None:
    stopped = _tightened(tmp_path, SHIFT, max_iterations=3)
    status, out, _ = _run(capsys, "solve", str(stopped), "--json", "--second-opinion")
    assert status == 1
    entry = json.loads(out)["second_opinion"]
    assert entry["agrees"] is False and entry["largest_relative_difference"] > 1e-5


@pytest.mark.parametrize("value", ["0", "-1e-8", "nan", "close"])
def test_bad_agreement_tolerance_exits_with_2(capsys, value) -> None:
    status, out, err = _run(
        capsys, "solve", str(SHIFT), "--second-opinion", "--agreement-tolerance", value
    )
    assert status == 2 and out == ""
    assert "--agreement-tolerance" in err and "Traceback" not in err
