"""The flowsheet document: edits, refusals that change nothing, and change signals."""

from __future__ import annotations

import pytest

from model.errors import InputError
from model.flowsheet.document import Flowsheet


def _recorder(flowsheet: Flowsheet) -> list[tuple[str, str]]:
    events: list[tuple[str, str]] = []
    flowsheet.block_added.connect(lambda b: events.append(("block added", b.name)))
    flowsheet.block_removed.connect(lambda b: events.append(("block removed", b.name)))
    flowsheet.block_renamed.connect(lambda b, old: events.append(("block renamed", old)))
    flowsheet.block_moved.connect(lambda b: events.append(("block moved", b.name)))
    flowsheet.stream_added.connect(lambda s: events.append(("stream added", s.name)))
    flowsheet.stream_removed.connect(lambda s: events.append(("stream removed", s.name)))
    flowsheet.stream_changed.connect(lambda s: events.append(("stream changed", s.name)))
    return events


def _loop() -> Flowsheet:
    flowsheet = Flowsheet()
    for kind, name in [("Feed", "F"), ("Mixer", "M"), ("Splitter", "SP"), ("Product", "P")]:
        flowsheet.add_block(kind, name)
    flowsheet.connect("F", "out", "M", "in1", "S1")
    flowsheet.connect("M", "out", "SP", "in", "S2")
    flowsheet.connect("SP", "out1", "P", "in", "S3")
    flowsheet.connect("SP", "out2", "M", "in2", "S4")
    return flowsheet


def test_variable_ports_always_offer_one_spare() -> None:
    flowsheet = _loop()
    assert flowsheet.inlet_ports("M") == ["in1", "in2", "in3"]
    assert flowsheet.outlet_ports("SP") == ["out1", "out2", "out3"]
    assert flowsheet.inlet_ports("P") == ["in"]


def test_inlet_streams_come_in_port_order() -> None:
    flowsheet = _loop()
    flowsheet.add_block("Feed", "F2")
    flowsheet.connect("F2", "out", "M", "in3", "S5")
    assert [s.name for s in flowsheet.inlet_streams("M")] == ["S1", "S4", "S5"]


def test_removing_a_block_removes_its_streams_and_says_so() -> None:
    flowsheet = _loop()
    events = _recorder(flowsheet)
    block, streams = flowsheet.remove_block("SP")
    assert {s.name for s in streams} == {"S2", "S3", "S4"}
    assert set(flowsheet.streams) == {"S1"}
    assert events[-1] == ("block removed", "SP")
    # Putting them back restores the flowsheet.
    flowsheet.insert_block(block)
    for stream in streams:
        flowsheet.insert_stream(stream)
    assert set(flowsheet.streams) == {"S1", "S2", "S3", "S4"}


def test_rename_updates_stream_ends() -> None:
    flowsheet = _loop()
    flowsheet.rename_block("M", "Mixer A")
    assert flowsheet.streams["S1"].target == "Mixer A"
    assert flowsheet.streams["S2"].source == "Mixer A"


@pytest.mark.parametrize(
    "args, field",
    [
        (("F", "out", "M", "in3", "S9"), "S9.from port"),  # outlet already used by S1
        (("M", "out9", "P", "in", "S9"), "S9.from port"),  # no such port
        (("SP", "out3", "P", "in", "S9"), "S9.to port"),  # inlet already used by S3
        (("SP", "out3", "M", "in3", "S1"), "stream name"),  # name taken
    ],
)
def test_refused_connections_name_the_field_and_change_nothing(args, field) -> None:
    flowsheet = _loop()
    events = _recorder(flowsheet)
    before = {name: vars(s).copy() for name, s in flowsheet.streams.items()}
    with pytest.raises(InputError) as error:
        flowsheet.connect(*args)
    assert error.value.field == field
    assert {name: vars(s) for name, s in flowsheet.streams.items()} == before
    assert events == []


def test_signals_fire_only_on_real_change() -> None:
    flowsheet = _loop()
    events = _recorder(flowsheet)
    flowsheet.move_block("M", (0.0, 0.0))  # where it already is
    flowsheet.rename_block("M", "M")
    flowsheet.set_preferred_tear("S4", False)
    assert events == []
    flowsheet.move_block("M", (10.0, 5.0))
    flowsheet.set_preferred_tear("S4", True)
    assert events == [("block moved", "M"), ("stream changed", "S4")]


def test_bad_names_are_refused() -> None:
    flowsheet = _loop()
    for bad in ["", "  M2", "F"]:
        with pytest.raises(InputError):
            flowsheet.add_block("Mixer", bad)
    with pytest.raises(InputError) as error:
        flowsheet.add_block("Blender")
    assert "Mixer" in str(error.value)


def test_estimates_are_checked_and_a_refusal_changes_nothing() -> None:
    from model.flowsheet.spec_values import StreamEstimate

    class _Water:
        name = "water"

    flowsheet = _loop()
    flowsheet.add_component(_Water())
    good = StreamEstimate({"water": 2.0}, 350.0, 2e5)
    flowsheet.set_estimate("S4", good)
    for bad, field in [
        (StreamEstimate({"argon": 1.0}), "S4.estimate.flows"),
        (StreamEstimate({"water": -1.0}), "S4.estimate.flows.water"),
        (StreamEstimate({}, T=0.0), "S4.estimate.T"),
        (StreamEstimate({}, P=float("nan")), "S4.estimate.P"),
    ]:
        with pytest.raises(InputError) as error:
            flowsheet.set_estimate("S4", bad)
        assert error.value.field == field
        assert flowsheet.streams["S4"].estimate == good
