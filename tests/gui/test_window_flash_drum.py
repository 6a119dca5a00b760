"""The flash drum reaches the user: placed from the block shelf, its specs edited in the
details pane, vapor fractions in the stream table, the property method in the
components pane."""

from __future__ import annotations

import pytest
from PySide6.QtCore import QPointF

from model.flowsheet.spec_values import TypedQuantity


def test_flash_drum_from_shelf_to_stream_table(qtbot, window, example_path, drop):
    assert window.files.open_path(str(example_path("ammonia_synthesis_loop")))
    with qtbot.waitSignal(window.solver.finished, timeout=60000):
        window.actions["solve"].trigger()
    table = window.stream_table.model
    titles = [row.title for row in table.rows]
    assert any(title.startswith("Vapor fraction") for title in titles)
    row = next(r for r in table.rows if r.title.startswith("Vapor fraction"))
    texts = row.texts()
    assert "1" in texts and "0" in texts  # the drum's vapor and liquid outlets
    # a case with a flash drum shows bubble and dew points: the drum's liquid is at its
    # bubble point and its vapor at its dew point (both at the drum's -10 degC)
    bubble = next(r for r in table.rows if r.title.startswith("Bubble point"))
    dew = next(r for r in table.rows if r.title.startswith("Dew point"))
    streams = list(window.case.solution.streams)
    assert float(bubble.texts()[streams.index("Ammonia")]) == pytest.approx(-10.0, abs=1e-6)
    assert float(dew.texts()[streams.index("Loop gas")]) == pytest.approx(-10.0, abs=1e-6)
    # the drum's form shows its specs and its computed vapor fraction
    form = window.details.show_block("Ammonia separator")
    assert {"mode", "T", "P"} <= set(form.editors)
    form.apply("T", TypedQuantity(-20.0, "degC"))
    assert window.case.flowsheet.block("Ammonia separator").specs["T"] == TypedQuantity(
        -20.0, "degC"
    )
    # the property method is shown and chosen in the components pane
    window.details.show_components()
    page = window.details.components_page
    assert page.property_method_box.currentText() == "ideal"
    assert any(label.startswith("Vapor pressure") for label, _, _ in page.shown_rows)
    # the shelf places a flash drum
    drop(window.view, "Flash drum", QPointF(300, 300))
    assert "Flash drum 1" in window.case.flowsheet.blocks
    window.grab().save("/tmp/flash_drum_window.png")


def test_components_pane_shows_the_case_recorded_kij_under_peng_robinson(
    qtbot, window, example_path
):
    from thermo.interaction_parameters import IPDB

    assert window.files.open_path(str(example_path("ammonia_synthesis_loop")))
    window.details.show_components()
    page = window.details.components_page
    page.property_method_box.setCurrentText("Peng-Robinson")
    assert window.case.flowsheet.property_method == "Peng-Robinson"
    names = [c.name for c in window.case.flowsheet.components]
    page.component_list.setCurrentRow(names.index("nitrogen"))
    rows = {label: (value, source) for label, value, source in page.shown_rows}
    # thermo's ChemSep PR table: nitrogen-ammonia 0.2193, hydrogen-nitrogen 0.0711
    cas = {c.name: c.cas for c in window.case.flowsheet.components}
    for other in ("ammonia", "hydrogen"):
        kij = IPDB.get_ip_asymmetric_matrix("ChemSep PR", [cas["nitrogen"], cas[other]], "kij")
        value, source = rows[f"kij with {other}"]
        assert float(value) == pytest.approx(kij[0][1], rel=1e-12)
        assert "ChemSep PR" in source
    assert "Acentric factor (Peng-Robinson)" in rows
    window.grab().save("/tmp/peng_robinson_components.png")
