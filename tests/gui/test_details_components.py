"""A component defined by hand in the components pane: typed with units, checked by the
model, added as one undo step (pytest-qt, offscreen)."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from chemicals.elements import molecular_weight  # noqa: E402
from chemicals.heat_capacity import TRC_gas_data, TRCCp  # noqa: E402
from PySide6.QtGui import QUndoStack  # noqa: E402
from scipy.constants import R  # noqa: E402

from gui.details import DetailsPane  # noqa: E402
from model.flowsheet.document import Flowsheet  # noqa: E402
from model.properties.components import USER_SOURCE  # noqa: E402

pytestmark = pytest.mark.gui

# Water's ideal-gas Cp polynomial of Poling, Prausnitz & O'Connell, The Properties of
# Gases and Liquids, 5th ed., Appendix A (Cp/R coefficients, 50-1000 K; from memory),
# here in J/(mol K^n): a_n = R x (4.395, -4.186e-3, 1.405e-5, -1.564e-8, 0.632e-11)
POLING_WATER = tuple(R * c for c in (4.395, -4.186e-3, 1.405e-5, -1.564e-8, 0.632e-11))


@pytest.fixture
def sheet():
    return Flowsheet()


@pytest.fixture
def form(qtbot, sheet):
    stack = QUndoStack()
    pane = DetailsPane(lambda: sheet, stack)
    pane.undo_stack = stack
    qtbot.addWidget(pane)
    pane.resize(420, 1200)
    pane.show()
    pane.show_components()
    page = pane.components_page
    assert page.define_form.isHidden()
    page.define_toggle.click()
    assert page.define_form.isVisible()
    page.define_form.pane = pane
    return page.define_form


def enter(form, field: str, text: str) -> None:
    """Type into one quantity field and commit it, as Enter does."""
    editor = form.quantity_editors[field]
    editor.value_edit.setText(text)
    editor.value_edit.textEdited.emit(text)
    editor.value_edit.editingFinished.emit()


def fill_water(form, name: str = "water (by hand)") -> None:
    form.name_edit.setText(name)
    form.formula_edit.setText("H2O")
    # IAPWS-95 (IAPWS R6-95): critical point 647.096 K = 373.946 degC, 22.064 MPa
    enter(form, "Tc", "373.946 degC")
    enter(form, "Pc", "220.64 bar")
    # CHECKS.md: normal boiling point 373.124 K, Hvap there 40.651 kJ/mol (CoolProp,
    # IAPWS-95), formation enthalpy -241.826 kJ/mol (nasa_gas -241.825, chemicals -241.822)
    enter(form, "Tb", "373.124 K")
    enter(form, "Hf_ig", "-241.826 kJ/mol")
    enter(form, "Hvap_Tb", "40.651")  # a bare number takes the unit shown: kJ/mol (Metric)
    for edit, coefficient in zip(form.coefficient_edits, POLING_WATER, strict=True):
        edit.setText(repr(coefficient))
    enter(form, "cp.T_min", "50 K")
    enter(form, "cp.T_max", "1000 K")


def test_component_defined_by_hand_is_added_in_internal_units(form, sheet, screenshot_dir):
    fill_water(form)
    assert form.pane.grab().save(str(screenshot_dir / "details_define_component.png"))
    assert form.define(), form.error_text()
    (water,) = sheet.components
    assert water.name == "water (by hand)" and water.formula == "H2O"
    assert water.Tc == pytest.approx(647.096, abs=1e-9)  # degC + 273.15, exact
    assert water.Pc == pytest.approx(22.064e6, rel=1e-12)  # 1 bar = 1e5 Pa, exact
    assert water.Tb == pytest.approx(373.124, abs=1e-9)
    assert water.Hf_ig == pytest.approx(-241826.0, abs=1e-6)
    assert water.Hvap_Tb == pytest.approx(40651.0, abs=1e-6)
    # molar mass left empty: from the formula with chemicals' standard atomic weights
    assert water.molar_mass == pytest.approx(molecular_weight({"H": 2, "O": 1}) / 1000)
    assert water.cp.coefficients == pytest.approx(POLING_WATER, rel=1e-15)
    assert (water.cp.T_min, water.cp.T_max) == (50.0, 1000.0)
    assert water.sources["Tc"] == USER_SOURCE
    # the polynomial agrees with chemicals' TRC ideal-gas correlation for water to 1 %
    trc = TRC_gas_data.loc["7732-18-5"]
    coefficients = [trc[k] for k in ("a0", "a1", "a2", "a3", "a4", "a5", "a6", "a7")]
    for T in (298.15, 800.0):
        assert water.cp.heat_capacity(T) == pytest.approx(TRCCp(T, *coefficients), rel=0.01)
    assert form.name_edit.text() == "" and form.quantity_editors["Tc"].value_edit.text() == ""
    form.pane.undo_stack.undo()
    assert sheet.components == []
    form.pane.undo_stack.redo()
    assert sheet.component_names() == ["water (by hand)"]


def test_refused_entries_show_the_models_message_and_keep_the_text(form, sheet):
    fill_water(form)
    enter(form, "Tc", "90 degC")  # below the boiling point
    assert not form.define()
    message = form.quantity_editors["Tc"].error_text()
    assert message.startswith("Tc:") and "above Tb" in message
    assert form.quantity_editors["Tc"].value_edit.text() == "90"
    assert sheet.components == [] and form.pane.undo_stack.count() == 0

    enter(form, "Tc", "647.096 K")
    form.formula_edit.setText("H2Qx")
    assert not form.define()
    assert form.error_text().startswith("formula:") and form.formula_edit.text() == "H2Qx"
    assert "border" in form.formula_edit.styleSheet()

    form.formula_edit.setText("H2O")
    enter(form, "Pc", "220 kg")  # not a pressure
    assert "component.Pc" in form.quantity_editors["Pc"].error_text()
    assert not form.define()
    assert form.quantity_editors["Pc"].value_edit.text() == "220 kg"

    enter(form, "Pc", "22.064 MPa")
    for edit in form.coefficient_edits:
        edit.clear()
    assert not form.define()
    assert form.error_text().startswith("cp.coefficients:")
    assert "border" in form.coefficient_edits[0].styleSheet()
    for edit, coefficient in zip(form.coefficient_edits, POLING_WATER, strict=True):
        edit.setText(repr(coefficient))
    assert form.define(), form.error_text()
    assert sheet.component_names() == ["water (by hand)"]


def test_a_name_already_in_the_case_is_refused(form, sheet):
    fill_water(form, "steam")
    assert form.define()
    fill_water(form, "steam")
    assert not form.define()
    assert form.error_text().startswith("name:") and form.name_edit.text() == "steam"
    assert sheet.component_names() == ["steam"]
