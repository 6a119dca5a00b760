"""Case files: format, round trip, every problem at once, migration, atomic save."""

from __future__ import annotations

import copy
import json
import os
import time
from pathlib import Path

import pytest

from convergence import SolverSettings
from model.case.document import Case
from model.case.file import (
    CASE_FORMAT,
    CASE_VERSION,
    case_from_dict,
    case_from_json,
    case_to_dict,
    case_to_json,
    load_case,
    save_case,
)
from model.errors import CaseFileError, LoopwrightError
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, Reaction, StreamEstimate, TypedQuantity
from model.properties.components import lookup_component

EXAMPLES = Path(__file__).resolve().parents[3] / "examples"


def every_spec_kind_case() -> Case:
    """A small case using every spec field kind, several units and both tear options."""
    sheet = Flowsheet()
    for name in ("methane", "oxygen", "carbon dioxide", "water", "nitrogen"):
        sheet.add_component(lookup_component(name))
    sheet.add_block("Feed", "Fuel", (0.0, 0.0), specs={})
    sheet.set_spec("Fuel", "flows", ComponentAmounts({"methane": 1200.0}, "kg/h"))
    sheet.set_spec("Fuel", "T", TypedQuantity(77.0, "degF"))
    sheet.set_spec("Fuel", "P", TypedQuantity(50.0, "psig"))
    sheet.add_block("Feed", "Air", (0.0, 120.5))
    sheet.set_spec("Air", "basis", "total and fractions")
    sheet.set_spec("Air", "total_flow", TypedQuantity(25.0, "t/h"))
    sheet.set_spec(
        "Air", "composition", ComponentAmounts({"oxygen": 0.21, "nitrogen": 0.79}, "mole fraction")
    )
    sheet.set_spec("Air", "T", TypedQuantity(300.0, "K"))
    sheet.set_spec("Air", "P", TypedQuantity(4.5, "bar"))
    sheet.add_block("Mixer", "Burner mixer", (150.0, 60.0))
    sheet.set_spec("Burner mixer", "P", TypedQuantity(400.0, "kPa"))
    sheet.add_block("Reactor", "Burner", (300.0, 60.0))
    sheet.set_spec(
        "Burner",
        "reactions",
        [
            Reaction(
                {"methane": -1.0, "oxygen": -2.0, "carbon dioxide": 1.0, "water": 2.0},
                "methane",
                1.0,
                "combustion",
            )
        ],
    )
    sheet.set_spec("Burner", "mode", "adiabatic")
    sheet.set_spec("Burner", "pressure_drop", TypedQuantity(0.2, "bar"))
    sheet.add_block("Splitter", "Flue splitter", (450.0, 60.0))
    sheet.set_spec("Flue splitter", "mode", "outlet flow")
    sheet.set_spec("Flue splitter", "flow_port", "out2")
    sheet.set_spec("Flue splitter", "flow", TypedQuantity(50.0, "kmol/h"))
    sheet.add_block("Heater", "Recycle cooler", (450.0, 200.0))
    sheet.set_spec("Recycle cooler", "mode", "duty")
    sheet.set_spec("Recycle cooler", "duty", TypedQuantity(-0.5, "MMBtu/h"))
    sheet.add_block("Exchanger", "Boiler", (600.0, 60.0))
    sheet.set_spec("Boiler", "mode", "duty")
    sheet.set_spec("Boiler", "duty", TypedQuantity(2.0, "MW"))
    sheet.set_spec("Boiler", "minimum_approach", TypedQuantity(10.0, "degC"))
    sheet.add_block("Separator", "Knock-out", (750.0, 60.0))
    sheet.set_spec(
        "Knock-out", "split", ComponentAmounts({"water": 0.9}, "fraction to first outlet")
    )
    sheet.set_spec("Knock-out", "T1", TypedQuantity(40.0, "degC"))
    for name, position in (
        ("Stack", (900.0, 0.0)),
        ("Condensate", (900.0, 120.0)),
        ("Steam out", (750.0, 200.0)),
    ):
        sheet.add_block("Product", name, position)
    sheet.add_block("Feed", "Boiler water", (600.0, 200.0), specs={})
    sheet.set_spec("Boiler water", "flows", ComponentAmounts({"water": 1.0}, "lbmol/h"))
    sheet.set_spec("Boiler water", "T", TypedQuantity(100.0, "degC"))
    sheet.set_spec("Boiler water", "P", TypedQuantity(10.0, "barg"))
    sheet.set_spec("Boiler water", "phase", "liquid")
    sheet.connect("Fuel", "out", "Burner mixer", "in1", "Fuel gas")
    sheet.connect("Air", "out", "Burner mixer", "in2", "Combustion air")
    sheet.connect("Burner mixer", "out", "Burner", "in", "Burner feed")
    sheet.connect("Burner", "out", "Flue splitter", "in", "Hot flue gas")
    sheet.connect("Flue splitter", "out1", "Boiler", "hot_in", "Flue to boiler")
    sheet.connect("Flue splitter", "out2", "Recycle cooler", "in", "Flue recycle")
    sheet.connect("Recycle cooler", "out", "Burner mixer", "in3", "Cooled recycle ☃")
    sheet.connect("Boiler", "hot_out", "Knock-out", "in", "Boiler exit")
    sheet.connect("Knock-out", "out1", "Condensate", "in", "Water")
    sheet.connect("Knock-out", "out2", "Stack", "in", "Stack gas")
    sheet.connect("Boiler water", "out", "Boiler", "cold_in", "Feed water")
    sheet.connect("Boiler", "cold_out", "Steam out", "in", "Steam")
    sheet.set_preferred_tear("Flue recycle", True)
    sheet.set_estimate(
        "Flue recycle", StreamEstimate({"nitrogen": 10.0, "water": 1.5}, 900.0, 4.0e5)
    )
    settings = SolverSettings(q_min=-20.0, q_max=0.5, tolerance=1e-9, max_iterations=321)
    return Case(sheet, settings, "direct", "US customary", None, "Fired heater ☃", "Notes\nline 2")


def _write(path: Path, data: object) -> Path:
    path.write_text(json.dumps(data, indent=1), encoding="utf-8")
    return path


def _problems(data: object) -> dict[str, str]:
    with pytest.raises(CaseFileError) as caught:
        case_from_dict(data, "test.loop.json")
    return {problem.path: str(problem) for problem in caught.value.problems}


@pytest.fixture(scope="module")
def ammonia_data() -> dict:
    return json.loads((EXAMPLES / "ammonia_loop_fixed_split.loop.json").read_text("utf-8"))


# ---- format and round trip ------------------------------------------------------------
def test_file_starts_with_format_name_and_integer_version() -> None:
    data = case_to_dict(every_spec_kind_case())
    assert list(data)[:2] == ["format", "version"]
    assert data["format"] == CASE_FORMAT == "loopwright-case"
    assert data["version"] == CASE_VERSION == 3 and isinstance(data["version"], int)


def test_save_then_load_gives_back_specs_units_layout_and_settings(tmp_path: Path) -> None:
    case = every_spec_kind_case()
    path = tmp_path / "fired heater.loop.json"
    save_case(case, path)
    loaded = load_case(path)
    assert case_to_dict(loaded) == case_to_dict(case)
    for name, block in case.flowsheet.blocks.items():
        other = loaded.flowsheet.blocks[name]
        assert (other.kind, other.position, other.specs) == (
            block.kind,
            block.position,
            block.specs,
        )
    assert loaded.flowsheet.blocks["Fuel"].specs["T"] == TypedQuantity(77.0, "degF")
    assert loaded.flowsheet.blocks["Recycle cooler"].specs["duty"].unit == "MMBtu/h"
    assert list(loaded.flowsheet.streams) == list(case.flowsheet.streams)
    recycle = loaded.flowsheet.streams["Flue recycle"]
    assert (
        recycle.preferred_tear
        and recycle.estimate == case.flowsheet.streams["Flue recycle"].estimate
    )
    assert loaded.settings.snapshot().values() == case.settings.snapshot().values()
    assert (loaded.method, loaded.unit_system, loaded.title, loaded.notes) == (
        "direct",
        "US customary",
        "Fired heater ☃",
        "Notes\nline 2",
    )
    assert [c.to_dict() for c in loaded.flowsheet.components] == [
        c.to_dict() for c in case.flowsheet.components
    ]
    assert path.read_text("utf-8") == case_to_json(loaded)  # load + save writes the same text


def test_examples_reopen_to_the_identical_text() -> None:
    for path in sorted(EXAMPLES.glob("*.loop.json")):
        assert case_to_json(load_case(path)) == path.read_text("utf-8"), path.name


def test_components_keep_their_constants_and_sources(ammonia_data: dict) -> None:
    argon = next(c for c in ammonia_data["components"] if c["name"] == "argon")
    assert argon["molar_mass"] == pytest.approx(0.039948)  # from memory: Ar 39.948 g/mol
    assert argon["sources"]["Tc"] and argon["cp"]["source"]
    changed = copy.deepcopy(ammonia_data)
    changed["components"][3]["Tc"] = 151.0  # a library update must not change an open case
    assert case_from_dict(changed).flowsheet.components[3].Tc == 151.0


# ---- every problem at once ---------------------------------------------------------------
def test_every_problem_is_reported_at_once_with_its_path(ammonia_data: dict) -> None:
    data = copy.deepcopy(ammonia_data)
    data["blocks"][2]["specs"]["reactions"][0]["conversion"] = 1.7
    data["blocks"][0]["specs"]["T"] = {"value": 25.0, "unit": "bar"}
    data["blocks"][3]["specs"]["T"]["value"] = "cold"
    data["blocks"][4]["position"] = [1.0]
    data["streams"][2]["to"]["block"] = "Loop coolr"
    data["solver_settings"]["q_max"] = "high"
    data["unit_system"] = "Imperial"
    problems = _problems(data)
    assert set(problems) == {
        "blocks[2].specs.reactions[0].conversion",
        "blocks[0].specs.T",
        "blocks[3].specs.T.value",
        "blocks[4].position",
        "streams[2].to.block",
        "solver_settings.q_max",
        "unit_system",
    }
    assert problems["blocks[2].specs.reactions[0].conversion"] == (
        "blocks[2].specs.reactions[0].conversion: 1.7 is not allowed; "
        "a fraction must be a number between 0 and 1"
    )
    assert "a temperature" in problems["blocks[0].specs.T"]
    assert "Loop cooler" in problems["streams[2].to.block"]  # lists the blocks there are
    assert "'SI', 'Metric', 'US customary'" in problems["unit_system"]


def test_message_lists_every_problem(ammonia_data: dict, tmp_path: Path) -> None:
    data = copy.deepcopy(ammonia_data)
    data["blocks"].append(copy.deepcopy(data["blocks"][0]))
    data["streams"].append(dict(data["streams"][0], to={"block": "Purge gas", "port": "in"}))
    with pytest.raises(CaseFileError) as caught:
        load_case(_write(tmp_path / "dup.loop.json", data))
    text = str(caught.value)
    assert text.startswith(str(tmp_path / "dup.loop.json") + ": 2 problems")
    assert "blocks[8].name: 'Make-up gas' is not allowed; each block name may be used once" in text
    assert "streams[8].name: 'Make-up' is not allowed; each stream name may be used once" in text


@pytest.mark.parametrize(
    ("change", "path", "words"),
    [
        (
            lambda d: d["blocks"][0]["specs"]["total_flow"].update(value=float("nan")),
            "blocks[0].specs.total_flow.value",
            "finite",
        ),
        (
            lambda d: d["blocks"][0]["specs"]["total_flow"].update(value=-5.0),
            "blocks[0].specs.total_flow",
            "zero or positive",
        ),
        (
            lambda d: d["blocks"][0]["specs"]["T"].update(value=-300.0),
            "blocks[0].specs.T",
            "above absolute zero",
        ),
        (
            lambda d: d["blocks"][0]["specs"]["composition"]["values"].update(argn=0.1),
            "blocks[0].specs.composition.values.argn",
            "a component of this case",
        ),
        (
            lambda d: d["blocks"][0]["specs"]["composition"]["values"].update(argon=0.5),
            "blocks[0].specs.composition",
            "sum to 1",
        ),
        (
            lambda d: d["blocks"][2]["specs"]["reactions"][0]["stoichiometry"].update(
                hydrogen=-2.0
            ),
            "blocks[2].specs.reactions",
            "element-balanced",
        ),
        (
            lambda d: d["blocks"][2]["specs"]["reactions"][0].update(key="ammonia"),
            "blocks[2].specs.reactions[0].key",
            "reactant",
        ),
        (
            lambda d: d["blocks"][2]["specs"].update(temperature=5),
            "blocks[2].specs.temperature",
            "a specification of a Reactor",
        ),
        (
            lambda d: d["blocks"][5]["specs"].update(mode="half"),
            "blocks[5].specs.mode",
            "'fractions', 'outlet flow'",
        ),
        (lambda d: d["blocks"][1].update(kind="Mixr"), "blocks[1].kind", "'Mixer'"),
        (lambda d: d["blocks"][1].pop("name"), "blocks[1].name", "required"),
        (lambda d: d["blocks"][1].update(name=" Loop mixer"), "blocks[1].name", "spaces"),
        (
            lambda d: d["streams"][0].update(preferred_tear="yes"),
            "streams[0].preferred_tear",
            "true or false",
        ),
        (lambda d: d["streams"][0]["from"].update(port="out7"), "streams[0]", "outlet port"),
        (lambda d: d["streams"][6]["to"].update(port="in1"), "streams[6]", "already enters"),
        (
            lambda d: d["streams"][0].update(estimate={"T_K": -1.0}),
            "streams[0].estimate.T_K",
            "greater than 0",
        ),
        (lambda d: d["components"][3].update(Tc="hot"), "components[3].Tc", "finite number"),
        (
            lambda d: d["components"].append(copy.deepcopy(d["components"][0])),
            "components[4].name",
            "listed once",
        ),
        (lambda d: d.update(spec={}), "spec", "a key here is one of"),
        (lambda d: d.update(method="newton"), "method", "'wegstein'"),
        (lambda d: d.update(title=7), "title", "text"),
        (lambda d: d["solver_settings"].update(colour="teal"), "solver_settings.colour", "q_min"),
        (lambda d: d.pop("blocks"), "blocks", "required"),
    ],
)
def test_each_kind_of_problem_names_path_value_and_rule(ammonia_data, change, path, words):
    data = copy.deepcopy(ammonia_data)
    change(data)
    problems = _problems(data)
    assert path in problems, problems
    assert words in problems[path]


def test_case_with_gaps_in_numbered_ports_reopens() -> None:
    """Removing a mixer's or splitter's middle stream leaves in1, in3: still a valid case."""
    sheet = Flowsheet()
    for kind, name in [
        ("Feed", "A"),
        ("Feed", "B"),
        ("Feed", "C"),
        ("Mixer", "M"),
        ("Splitter", "SP"),
        ("Product", "P1"),
        ("Product", "P2"),
        ("Product", "P3"),
    ]:
        sheet.add_block(kind, name)
    for number, feed in enumerate("ABC", start=1):
        sheet.connect(feed, "out", "M", f"in{number}", f"S{feed}")
    sheet.connect("M", "out", "SP", "in", "Mixed")
    for number in (1, 2, 3):
        sheet.connect("SP", f"out{number}", f"P{number}", "in", f"Out{number}")
    sheet.remove_stream("SB")
    sheet.remove_stream("Out2")
    text = case_to_json(Case(sheet))
    reopened = case_from_json(text)
    assert case_to_json(reopened) == text
    assert list(reopened.flowsheet.blocks) == list(sheet.blocks)  # no placeholder left
    assert reopened.flowsheet.streams["SC"].target_port == "in3"
    assert reopened.flowsheet.inlet_ports("M") == ["in1", "in2", "in3"]
    data = json.loads(text)
    data["streams"][1]["to"]["port"] = "in1000"  # beyond MAX_NUMBERED_PORT
    assert "streams[1]" in _problems(data)


def test_unreadable_block_does_not_also_fail_its_streams(ammonia_data: dict) -> None:
    data = copy.deepcopy(ammonia_data)
    data["blocks"][1]["kind"] = "Blender"
    assert list(_problems(data)) == ["blocks[1].kind"]


@pytest.mark.parametrize(
    ("text", "where", "words"),
    [
        (
            b'{"format": "loopwright-case", "version": 1, "blocks": [',
            "(line 1, column 56)",
            "valid JSON",
        ),
        (b"", "(line 1, column 1)", "valid JSON"),
        (b'\xff\xfe{"format"', "(byte 0)", "UTF-8"),
        (b"[1, 2]", "(top level)", "one JSON object"),
        (b'{"format": "other-tool", "version": 1}', "format", "loopwright-case"),
        (b'{"format": "loopwright-case", "version": "1"}', "version", "whole number"),
        (b'{"format": "loopwright-case", "version": -1}', "version", "from 0 to 3"),
        (
            b'{"format": "loopwright-case", "version": 1, "version": 1, "components": [],'
            b' "blocks": [], "streams": []}',
            "version",
            "once",
        ),
        (b"[" * 100000, "(whole file)", "nested too deeply"),
    ],
)
def test_bad_files_give_a_case_file_error(text: bytes, where: str, words: str) -> None:
    with pytest.raises(CaseFileError) as caught:
        case_from_json(text, "bad.loop.json")
    assert caught.value.problems[0].path == where
    assert words in str(caught.value)


def test_newer_version_is_refused_clearly(ammonia_data: dict) -> None:
    data = dict(ammonia_data, version=CASE_VERSION + 1)
    problems = _problems(data)
    assert list(problems) == ["version"]
    assert "newer version" in problems["version"]
    assert f"up to version {CASE_VERSION}" in problems["version"]


def test_missing_file_is_a_case_file_error(tmp_path: Path) -> None:
    with pytest.raises(CaseFileError, match="a readable case file"):
        load_case(tmp_path / "nowhere.loop.json")
    assert issubclass(CaseFileError, LoopwrightError)


# ---- migration -------------------------------------------------------------------------
def version_0_data(ammonia_data: dict) -> dict:
    """The ammonia example as the pre-release layout (version 0) wrote it."""
    return {
        "format": "loopwright-case",
        "version": 0,
        "title": ammonia_data["title"],
        "notes": ammonia_data["notes"],
        "units": "Metric",
        "method": "wegstein",
        "settings": {"q_min": -5.0, "q_max": 0.0},
        "components": ammonia_data["components"],
        "blocks": [
            {
                "kind": "Feed",
                "name": "Make-up gas",
                "x": 0.0,
                "y": 0.0,
                "spec": {
                    "basis": "component flows",
                    "flows": {"hydrogen": 62.1875, "nitrogen": 20.7291667, "argon": 0.4166667},
                    "T": 298.15,
                    "P": 15101325.0,
                    "phase": "vapor",
                },
            },
            {
                "kind": "Mixer",
                "name": "Loop mixer",
                "x": 160.0,
                "y": 0.0,
                "spec": {"phase": "vapor"},
            },
            {
                "kind": "Reactor",
                "name": "Converter",
                "x": 320.0,
                "y": 0.0,
                "spec": {
                    "reactions": [
                        {
                            "stoichiometry": {"nitrogen": -1, "hydrogen": -3, "ammonia": 2},
                            "key": "nitrogen",
                            "conversion": 0.25,
                        }
                    ],
                    "mode": "outlet temperature",
                    "T": 723.15,
                    "phase": "vapor",
                },
            },
            {
                "kind": "Heater",
                "name": "Loop cooler",
                "x": 480.0,
                "y": 0.0,
                "spec": {
                    "mode": "outlet temperature",
                    "T": 263.15,
                    "phase": "vapor",
                    "pressure_drop": 0,
                },
            },
            {
                "kind": "Separator",
                "name": "Ammonia separator",
                "x": 640.0,
                "y": 0.0,
                "spec": {"split": {"ammonia": 0.95}, "phase1": "liquid", "phase2": "vapor"},
            },
            {
                "kind": "Splitter",
                "name": "Purge splitter",
                "x": 640.0,
                "y": -160.0,
                "spec": {"mode": "fractions", "fractions": {"out2": 0.02}},
            },
            {"kind": "Product", "name": "Liquid ammonia", "x": 800.0, "y": 0.0, "spec": {}},
            {"kind": "Product", "name": "Purge gas", "x": 800.0, "y": -160.0, "spec": {}},
        ],
        "streams": [
            {
                "name": s["name"],
                "from": [s["from"]["block"], s["from"]["port"]],
                "to": [s["to"]["block"], s["to"]["port"]],
                "tear": s["name"] == "Recycle gas",
            }
            for s in ammonia_data["streams"]
        ],
    }


def test_version_0_file_is_migrated(ammonia_data: dict, tmp_path: Path) -> None:
    case = load_case(_write(tmp_path / "old.loop.json", version_0_data(ammonia_data)))
    sheet = case.flowsheet
    assert sheet.blocks["Converter"].specs["T"] == TypedQuantity(723.15, "K")
    assert sheet.blocks["Make-up gas"].specs["P"] == TypedQuantity(15101325.0, "Pa")
    assert sheet.blocks["Make-up gas"].specs["flows"] == ComponentAmounts(
        {"hydrogen": 62.1875, "nitrogen": 20.7291667, "argon": 0.4166667}, "mol/s"
    )
    assert sheet.blocks["Loop cooler"].specs["pressure_drop"] == TypedQuantity(0.0, "Pa")
    assert sheet.blocks["Ammonia separator"].specs["split"] == ComponentAmounts(
        {"ammonia": 0.95}, "fraction to first outlet"
    )
    assert sheet.blocks["Purge splitter"].position == (640.0, -160.0)
    assert sheet.streams["Recycle gas"].preferred_tear
    assert not sheet.streams["Purge"].preferred_tear
    assert [s.name for s in sheet.streams.values()] == [s["name"] for s in ammonia_data["streams"]]
    assert case.unit_system == "Metric" and case.settings.q_min == -5.0
    saved = tmp_path / "saved.loop.json"
    save_case(case, saved)  # a migrated case is saved in the current version
    assert json.loads(saved.read_text("utf-8"))["version"] == CASE_VERSION


def test_version_0_problems_are_reported_after_migration(ammonia_data: dict) -> None:
    data = version_0_data(ammonia_data)
    data["blocks"][2]["spec"]["T"] = -4.0
    data["streams"][0]["from"] = "Make-up gas.out"
    problems = _problems(data)
    assert set(problems) == {"blocks[2].specs.T", "streams[0].from"}


# ---- atomic save -----------------------------------------------------------------------
def test_save_keeps_the_previous_file_as_backup(tmp_path: Path) -> None:
    case = every_spec_kind_case()
    path = tmp_path / "case.loop.json"
    save_case(case, path)
    first = path.read_bytes()
    case.flowsheet.move_block("Fuel", (5.0, 7.0))
    save_case(case, path)
    assert (tmp_path / "case.loop.json.bak").read_bytes() == first
    assert load_case(path).flowsheet.blocks["Fuel"].position == (5.0, 7.0)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.loop.json", "case.loop.json.bak"]


def _saved_twice_with_failure(tmp_path: Path, monkeypatch, fail) -> tuple[Path, bytes]:
    case = every_spec_kind_case()
    path = tmp_path / "case.loop.json"
    save_case(case, path)
    before = path.read_bytes()
    case.flowsheet.move_block("Fuel", (99.0, 99.0))
    fail(monkeypatch, path)
    with pytest.raises(CaseFileError, match="a file that can be written"):
        save_case(case, path)
    monkeypatch.undo()
    return path, before


def test_interrupted_rename_leaves_previous_file_intact(tmp_path: Path, monkeypatch) -> None:
    real_replace = os.replace

    def fail(patch, path):
        def replace(source, target):
            if Path(target) == path:
                raise OSError(5, "Input/output error (simulated power cut)")
            real_replace(source, target)

        patch.setattr(os, "replace", replace)

    path, before = _saved_twice_with_failure(tmp_path, monkeypatch, fail)
    assert path.read_bytes() == before
    assert load_case(path).flowsheet.blocks["Fuel"].position == (0.0, 0.0)
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".tmp")]


def test_write_failing_midway_leaves_previous_file_intact(tmp_path: Path, monkeypatch) -> None:
    real_fdopen = os.fdopen

    class HalfWriter:
        """Writes half of what it is given, then the disk 'fills up'."""

        def __init__(self, stream):
            self.stream = stream

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.stream.close()

        def write(self, payload):
            self.stream.write(payload[: len(payload) // 2])
            self.stream.flush()
            raise OSError(28, "No space left on device (simulated)")

    def fail(patch, path):
        patch.setattr(os, "fdopen", lambda fd, mode: HalfWriter(real_fdopen(fd, mode)))

    path, before = _saved_twice_with_failure(tmp_path, monkeypatch, fail)
    assert path.read_bytes() == before
    assert load_case(path).flowsheet.blocks["Fuel"].position == (0.0, 0.0)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.loop.json"]


def test_fsync_is_called_before_the_rename(tmp_path: Path, monkeypatch) -> None:
    calls: list[str] = []
    real_fsync, real_replace = os.fsync, os.replace
    monkeypatch.setattr(os, "fsync", lambda fd: (calls.append("fsync"), real_fsync(fd))[1])
    monkeypatch.setattr(
        os, "replace", lambda a, b: (calls.append(f"replace {Path(b).name}"), real_replace(a, b))[1]
    )
    save_case(every_spec_kind_case(), tmp_path / "case.loop.json")
    assert calls[:2] == ["fsync", "replace case.loop.json"]


def test_unwritable_folder_is_a_case_file_error(tmp_path: Path) -> None:
    with pytest.raises(CaseFileError):
        save_case(every_spec_kind_case(), tmp_path / "no such folder" / "case.loop.json")


def test_a_save_removes_temporaries_left_by_an_interrupted_save(tmp_path: Path) -> None:
    # Regression (issue 15): a save killed before its rename left ".NAME.*.tmp" beside
    # the case, and later saves never removed it.
    case = load_case(EXAMPLES / "ammonia_loop_fixed_split.loop.json")
    path = tmp_path / "case.loop.json"
    stale = [tmp_path / ".case.loop.json.k2j4.tmp", tmp_path / ".case.loop.json.bak.9x1.tmp"]
    fresh = tmp_path / ".case.loop.json.now1.tmp"  # may be a save running right now
    other = tmp_path / ".other.loop.json.k2j4.tmp"  # another case's
    for leftover in [*stale, fresh, other]:
        leftover.write_text("partial")
    an_hour_ago = time.time() - 3600
    for leftover in [*stale, other]:
        os.utime(leftover, (an_hour_ago, an_hour_ago))
    save_case(case, path)
    names = sorted(p.name for p in tmp_path.iterdir())
    assert names == sorted([path.name, fresh.name, other.name])
