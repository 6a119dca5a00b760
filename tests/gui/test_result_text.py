"""The diagram's stream tooltip text for a two-phase stream (issue 11 item 1)."""

from __future__ import annotations

import numpy as np

from gui.diagram.result_text import describe_stream
from model.properties.stream_state import StreamState


def test_a_two_phase_stream_tooltip_shows_its_vapor_fraction_and_phase_flows():
    # 1.5 of 4 mol/s in the vapor: vapor fraction 0.375 by the definition (moles of
    # vapor over moles of stream); the liquid holds the other 2.5 mol/s
    state = StreamState(
        np.array([1.0, 3.0]), T=350.0, P=101325.0, phase="vapor", vapor_flows=np.array([0.5, 1.0])
    )
    text = describe_stream("Drum feed", state, ["water", "methanol"], "SI")
    lines = text.splitlines()
    assert lines[0] == "Drum feed (two-phase)"
    assert "vapor fraction 0.375" in lines
    (flows,) = [line for line in lines if line.startswith("vapor ") and "liquid" in line]
    assert flows.startswith("vapor 1.5 mol/s") and flows.endswith("liquid 2.5 mol/s")


def test_a_one_phase_stream_tooltip_has_no_phase_lines():
    state = StreamState(np.array([1.0, 3.0]), T=300.0, P=101325.0, phase="liquid")
    text = describe_stream("Feed", state, ["water", "methanol"], "SI")
    assert "vapor fraction" not in text
