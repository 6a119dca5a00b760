"""The headless commands ``loopwright solve`` and ``loopwright export``."""

from __future__ import annotations

import csv
import json
import subprocess
import sys
from pathlib import Path

import pytest

from model.case.file import load_case
from model.cli import _prepared_case, build_parser, main
from model.report.cautions import CAUTIONS
from units_of_measure import from_internal

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
# the typed-split variant: its Wegstein figures (6 iterations) are the ones checked here
AMMONIA = EXAMPLES / "ammonia_loop_fixed_split.loop.json"
FLASH_AMMONIA = EXAMPLES / "ammonia_synthesis_loop.loop.json"
HYDRATION = EXAMPLES / "ethylene_hydration_two_recycles.loop.json"


def _run(capsys, *argv: str) -> tuple[int, str, str]:
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


def _modified_copy(tmp_path: Path, source: Path, change) -> Path:
    data = json.loads(source.read_text("utf-8"))
    change(data)
    path = tmp_path / source.name
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


def test_solve_prints_summary_table_duties_closures_and_cautions(capsys) -> None:
    status, out, err = _run(capsys, "solve", str(AMMONIA), "--units", "US customary")
    assert status == 0 and err == ""
    for caution in CAUTIONS:
        assert caution in out
    assert "Tear Recycle gas: 6 iterations, final residual" in out
    assert "Stream table (US customary):" in out
    assert "Temperature [degF]" in out and "Molar flow argon [lbmol/h]" in out
    assert "Mole fraction argon" in out and "Enthalpy flow [Btu/h]" in out
    assert "Loop cooler: duty -" in out and "Btu/h" in out
    assert "balances close" in out
    # The make-up gas at 25 degC is 77 degF (T(degF) = 1.8 T(degC) + 32, NIST SP 811).
    temperature_row = next(line for line in out.splitlines() if line.startswith("Temperature"))
    assert temperature_row.split()[2] == "77"


def test_solve_json_holds_the_agreed_keys_and_the_solved_numbers(capsys) -> None:
    # the recycle solve of the specs as they stand (the example's target left aside)
    status, out, _ = _run(capsys, "solve", str(AMMONIA), "--json", "--no-targets")
    assert status == 0
    summary = json.loads(out)
    assert "targets" not in summary
    assert summary["converged"] is True and summary["iterations"] == 6
    assert summary["passes"] >= summary["iterations"]
    # One loop part of 5 blocks (mixer to splitter), passed start + 6 iterations + final;
    # the feed and the two products are computed once.
    (part,) = summary["parts"]
    assert (part["label"], part["tear_streams"], part["status"]) == (
        "part 1 of 1",
        ["Recycle gas"],
        "converged",
    )
    assert part["passes"] == summary["passes"] == 8 and part["block_evaluations"] == 5 * 8
    assert summary["block_evaluations"] == 5 * 8 + 3
    assert list(summary["tears"]) == ["Recycle gas"]
    assert len(summary["tears"]["Recycle gas"]) == summary["iterations"]
    assert summary["tears"]["Recycle gas"][-1] <= 1e-8
    case = load_case(AMMONIA)
    case.flowsheet.targets = []
    solution = case.solve()
    for name, state in solution.streams.items():
        entry = summary["streams"][name]
        assert entry["molar_flows_mol_s"] == dict(
            zip(solution.component_names, state.flows.tolist(), strict=True)
        )
        assert (entry["T_K"], entry["P_Pa"], entry["phase"]) == (state.T, state.P, state.phase)
        assert entry["enthalpy_flow_W"] == state.enthalpy_flow(solution.basis)
    assert set(summary["blocks"]) == {"Converter", "Loop cooler", "Ammonia separator"}
    assert summary["blocks"]["Loop cooler"]["duty_W"] == solution.blocks["Loop cooler"].duty_W
    assert set(summary["closure"]) == {"mass", "elements", "energy"}
    assert max(summary["closure"].values()) <= 1e-7


def test_method_and_q_bounds_from_the_command_line(capsys) -> None:
    # Fixed bounds and the residual rule: the old behaviour, where q >= -5 holds the
    # argon loop (slope 0.98, q = 0.98/(0.98-1) = -49) back and it crawls.
    fixed = ["--fixed-bounds", "--stop-on", "residual"]
    _, out, _ = _run(capsys, "solve", str(AMMONIA), "--json", "--q-min", "-5", *fixed)
    slow = json.loads(out)
    assert slow["iterations"] > 10 * 6  # the argon loop crawls
    # ... and stops on the residual with the argon balance open: a failure, exit 1
    assert not slow["converged"] and slow["status"] == "failed"
    _, out, _ = _run(capsys, "solve", str(AMMONIA), "--json", "--q-min", "-5")
    adaptive = json.loads(out)  # the run widens the bounds itself
    assert adaptive["converged"] and adaptive["iterations"] < slow["iterations"]
    # Direct substitution crawls too (slope near 1); under the residual rule it gets
    # there within the iteration limit, later than Wegstein.
    _, out, _ = _run(capsys, "solve", str(HYDRATION), "--json", "--method", "direct", *fixed)
    direct = json.loads(out)
    _, out, _ = _run(capsys, "solve", str(HYDRATION), "--json", *fixed)
    wegstein = json.loads(out)
    assert direct["converged"] and direct["iterations"] > wegstein["iterations"]


def test_solve_help_names_the_stopping_rule_and_fixed_bounds_options(capsys) -> None:
    status, out, _ = _run(capsys, "solve", "--help")
    assert status == 0
    assert "--stop-on" in out and "estimated error" in out and "residual" in out
    assert "--fixed-bounds" in out


def test_not_converged_exits_with_1(capsys, tmp_path: Path) -> None:
    path = _modified_copy(
        tmp_path,
        AMMONIA,
        lambda d: d["solver_settings"].update(
            q_min=-5.0, max_iterations=20, adaptive_bounds=False, stop_on="residual"
        ),
    )
    status, out, _ = _run(capsys, "solve", str(path), "--json")
    assert status == 1
    assert json.loads(out)["converged"] is False


@pytest.mark.parametrize(
    "argv",
    [
        ["solve", "missing.loop.json"],
        ["solve", str(AMMONIA), "--units", "Imperial"],
        ["solve", str(AMMONIA), "--method", "newton"],
        ["solve", str(AMMONIA), "--q-min", "1"],
        ["solve", str(AMMONIA), "--q-max", "nan"],
        ["solve", str(AMMONIA), "--q-min", "lots"],
        ["export", str(AMMONIA)],
        ["render", str(AMMONIA)],
    ],
)
def test_bad_input_exits_with_2_and_a_message_on_stderr(capsys, argv) -> None:
    status, out, err = _run(capsys, *argv)
    assert status == 2 and out == ""
    assert err.strip() and "Traceback" not in err


def test_bad_file_lists_its_problems_on_stderr(capsys, tmp_path: Path) -> None:
    def change(data):
        data["blocks"][2]["specs"]["reactions"][0]["conversion"] = 1.7
        data["streams"][0]["to"]["block"] = "Nowhere"

    path = _modified_copy(tmp_path, AMMONIA, change)
    status, out, err = _run(capsys, "solve", str(path))
    assert status == 2 and out == ""
    assert "blocks[2].specs.reactions[0].conversion: 1.7 is not allowed" in err
    assert "streams[0].to.block: 'Nowhere'" in err


def test_case_needing_input_exits_with_2(capsys, tmp_path: Path) -> None:
    path = _modified_copy(tmp_path, AMMONIA, lambda d: d["blocks"][2]["specs"].pop("T"))
    status, out, err = _run(capsys, "solve", str(path))
    assert status == 2 and out == ""
    assert "needs input" in err and "Converter" in err


def test_export_writes_the_stream_table_as_csv_with_a_caution_line(capsys, tmp_path) -> None:
    target = tmp_path / "table.csv"
    status, out, err = _run(capsys, "export", str(HYDRATION), "--csv", str(target), "--units", "SI")
    assert status == 0 and err == ""
    lines = target.read_text("utf-8").splitlines()
    assert lines[0].startswith("# ") and all(c in lines[0] for c in CAUTIONS)
    rows = list(csv.reader(lines[1:]))
    case = load_case(HYDRATION)
    solution = case.solve()
    numbers = [str(s.number) for s in case.flowsheet.streams.values()]
    assert rows[0] == ["Stream", "", *numbers]  # the examples number streams in file order
    assert rows[1] == ["Quantity", "Unit", *case.flowsheet.streams]
    table_end = rows.index([])
    by_label = {row[0]: row for row in rows[2:table_end]}
    assert by_label["Temperature"][1] == "K"
    assert float(by_label["Temperature"][2 + 5]) == pytest.approx(
        solution.streams["Reactor feed"].T, rel=1e-9
    )  # 10 significant digits
    assert by_label["Molar flow ethanol"][1] == "mol/s"
    assert by_label["Phase"][2:] == [s.phase for s in solution.streams.values()]
    # phase, T, P, total, mass, vapor fraction; per component x2; H; and, the case
    # having a flash drum, bubble and dew points
    assert table_end == 2 + 6 + 2 * 3 + 1 + 2
    assert by_label["Dew point"][1] == "K" and by_label["Bubble point"][1] == "K"
    assert by_label["Vapor fraction"][2:] == [
        f"{s.vapor_fraction():.10g}" if s.total_molar_flow() > 0 else "0"
        for s in solution.streams.values()
    ]
    # below the stream table: every block result, then the closures
    blocks = rows[table_end + 1 :]
    assert blocks[:2] == [["Block results"], ["Block", "Kind", "Quantity", "Unit", "Value"]]
    duty = next(r for r in blocks if r[0] == "Hydration reactor" and r[2] == "duty")
    assert duty[1] == "Reactor" and duty[3] == "W"
    assert float(duty[4]) == pytest.approx(solution.blocks["Hydration reactor"].duty_W, rel=1e-9)
    assert ["Balance closures"] in blocks


def test_export_in_metric_converts_units(capsys, tmp_path) -> None:
    target = tmp_path / "metric.csv"
    assert _run(capsys, "export", str(AMMONIA), "--csv", str(target))[0] == 0
    rows = {row[0]: row for row in csv.reader(target.read_text("utf-8").splitlines()[1:]) if row}
    solution = load_case(AMMONIA).solve()
    assert rows["Pressure"][1] == "bar"
    # 150 barg = 151.01325 bar absolute (gauge + 1.01325 bar, NIST SP 811 atm).
    assert float(rows["Pressure"][2]) == pytest.approx(151.01325, rel=1e-9)
    purge = list(load_case(AMMONIA).flowsheet.streams).index("Purge")
    assert float(rows["Enthalpy flow"][2 + purge]) == pytest.approx(
        from_internal(solution.streams["Purge"].enthalpy_flow(solution.basis), "power", "kW"),
        rel=1e-4,
    )


def test_export_to_an_unwritable_place_exits_with_2(capsys, tmp_path) -> None:
    status, _, err = _run(
        capsys, "export", str(AMMONIA), "--csv", str(tmp_path / "no folder" / "t.csv")
    )
    assert status == 2 and "No such file" in err


def test_launcher_dispatches_headless_commands_without_qt() -> None:
    code = (
        "import sys; from gui.launcher import main; status = main(['solve', sys.argv[1], "
        "'--json']); assert 'PySide6' not in sys.modules; sys.exit(status)"
    )
    done = subprocess.run(
        [sys.executable, "-c", code, str(HYDRATION)], capture_output=True, text=True, timeout=120
    )
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout)["converged"] is True


def test_export_of_an_unconverged_case_says_so_and_exits_with_1(capsys, tmp_path) -> None:
    path = _modified_copy(
        tmp_path,
        AMMONIA,
        lambda d: d["solver_settings"].update(
            q_min=-5.0, max_iterations=20, adaptive_bounds=False, stop_on="residual"
        ),
    )
    target = tmp_path / "table.csv"
    status, _, _ = _run(capsys, "export", str(path), "--csv", str(target))
    assert status == 1
    lines = target.read_text("utf-8").splitlines()
    assert lines[0].startswith("# Results are preliminary")
    assert lines[1].startswith("# not converged: ")
    assert lines[2].startswith("Stream,,1,2,")
    assert lines[3].startswith("Quantity,Unit,")


def test_solve_json_of_a_case_with_a_flash_drum_shows_vapor_fractions(capsys) -> None:
    status, out, _ = _run(capsys, "solve", str(FLASH_AMMONIA), "--json")
    assert status == 0
    summary = json.loads(out)
    streams = summary["streams"]
    assert streams["Ammonia"]["vapor_fraction"] == 0.0
    assert streams["Loop gas"]["vapor_fraction"] == 1.0
    assert summary["converged"] is True
    # the drum's computed split: most ammonia condenses, the light gases stay in the gas
    ammonia = streams["Ammonia"]["molar_flows_mol_s"]
    gas = streams["Loop gas"]["molar_flows_mol_s"]
    assert ammonia["ammonia"] > 5 * gas["ammonia"] and gas["argon"] > 100 * ammonia["argon"]
    # the drum's liquid leaves at its bubble point, its gas at its dew point (-10 degC)
    assert streams["Ammonia"]["bubble_point_K"] == pytest.approx(263.15, rel=1e-9)
    assert streams["Loop gas"]["dew_point_K"] == pytest.approx(263.15, rel=1e-9)


def test_solve_json_gives_an_exchanger_its_heat_curve(capsys) -> None:
    status, out, _ = _run(
        capsys, "solve", str(EXAMPLES / "shift_feed_effluent_exchanger.loop.json"), "--json"
    )
    assert status == 0
    summary = json.loads(out)
    curve = summary["blocks"]["Feed-effluent exchanger"]["heat_curve"]
    streams = summary["streams"]
    duty = summary["blocks"]["Feed-effluent exchanger"]["duty_W"]
    # its ends are the exchanger's own: heat passed 0 at the hot inlet (where the cold
    # side leaves) and the duty at the hot outlet (where the cold side enters)
    assert curve["heat_passed_W"][0] == 0.0
    assert curve["heat_passed_W"][-1] == pytest.approx(duty, rel=1e-12)
    assert curve["hot_T_K"][0] == pytest.approx(streams["Exchanger hot side"]["T_K"], rel=1e-12)
    assert curve["hot_T_K"][-1] == pytest.approx(streams["Cooled effluent"]["T_K"], rel=1e-12)
    assert curve["cold_T_K"][0] == pytest.approx(streams["Preheated gas"]["T_K"], rel=1e-12)
    assert curve["cold_T_K"][-1] == pytest.approx(streams["Raw gas"]["T_K"], rel=1e-12)
    hot = curve["hot_T_K"]
    assert all(a > b for a, b in zip(hot, hot[1:], strict=False))  # it cools along the way


def test_no_dominant_mode_switches_the_mode_step_off(capsys) -> None:
    parser = build_parser()
    plain = _prepared_case(parser.parse_args(["solve", str(AMMONIA)]))
    off = _prepared_case(parser.parse_args(["solve", str(AMMONIA), "--no-dominant-mode"]))
    assert plain.settings.dominant_mode is True and off.settings.dominant_mode is False
    _, out, _ = _run(capsys, "solve", "--help")
    assert "--no-dominant-mode" in out
    _, out, _ = _run(capsys, "solve", str(AMMONIA), "--json", "--no-dominant-mode")
    assert json.loads(out)["converged"]
