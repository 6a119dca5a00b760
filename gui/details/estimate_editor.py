"""The initial estimate of a stream, used as the solver's starting point when it tears it.

The model keeps the estimate in internal units (``model.flowsheet.spec_values.StreamEstimate``:
mol/s, K, Pa); here each value is typed with a unit and shown in the unit its editor
has chosen (first the unit system's). Every change goes through the undo stack as one
:class:`gui.commands_specs.SetEstimateCommand`; choosing another unit only changes how
the estimate is shown.
"""

from __future__ import annotations

import math
from collections.abc import Callable

from PySide6.QtWidgets import QGroupBox, QHBoxLayout, QLabel, QPushButton, QVBoxLayout, QWidget

from gui.commands_specs import push_estimate_change
from model.errors import InputError, LoopwrightError
from model.flowsheet.document import Flowsheet
from model.flowsheet.spec_values import ComponentAmounts, StreamEstimate, TypedQuantity
from units_of_measure import UnitError, from_internal, resolve_unit, to_internal

from .amount_tables import ComponentAmountsEditor, flow_kind
from .spec_editors import EditorContext, QuantityEditor, rounded

EXPLANATION = (
    "Where the solver starts when it tears this stream. With an estimate, components "
    "left empty start at zero flow, and an empty temperature or pressure at the feeds' "
    "mean; without one, the solver starts from a first pass through the flowsheet."
)


def _close(first: float | None, second: float | None) -> bool:
    if first is None or second is None:
        return first is second
    return math.isclose(first, second, rel_tol=1e-9, abs_tol=1e-300)


def same_estimate(first: StreamEstimate | None, second: StreamEstimate | None) -> bool:
    """Equal to round-off (a unit change converts back and forth through 12 digits)."""
    if first is None or second is None:
        return first is second
    return (
        set(first.flows) == set(second.flows)
        and all(_close(first.flows[n], second.flows[n]) for n in first.flows)
        and _close(first.T, second.T)
        and _close(first.P, second.P)
    )


class EstimateEditor(QGroupBox):
    """Component flows, temperature and pressure of one stream's initial estimate."""

    def __init__(
        self,
        flowsheet_getter: Callable[[], Flowsheet],
        undo_stack,
        unit_system_getter: Callable[[], str],
        parent: QWidget | None = None,
    ) -> None:
        super().__init__("Initial estimate (for a tear stream)", parent)
        self._flowsheet_getter = flowsheet_getter
        self._undo_stack = undo_stack
        self.context = EditorContext(flowsheet_getter, "", unit_system_getter)
        explanation = QLabel(EXPLANATION)
        explanation.setWordWrap(True)
        self.flows_editor = ComponentAmountsEditor(self.context, "component_flows")
        self.flows_editor.setObjectName("estimate.flows")
        self.T_editor = QuantityEditor(self.context, "temperature")
        self.T_editor.setObjectName("estimate.T")
        self.P_editor = QuantityEditor(self.context, "pressure")
        self.P_editor.setObjectName("estimate.P")
        for editor in (self.T_editor, self.P_editor):
            editor.value_edit.setPlaceholderText("feeds' mean")
        self.clear_button = QPushButton("Clear estimate")
        self.clear_button.setToolTip("Start this stream from the solver's first pass")
        rows = QVBoxLayout(self)
        rows.addWidget(explanation)
        rows.addWidget(self.flows_editor)
        for label, editor in (("Temperature", self.T_editor), ("Pressure", self.P_editor)):
            row = QHBoxLayout()
            row.addWidget(QLabel(label), 1)
            row.addWidget(editor, 3)
            rows.addLayout(row)
        rows.addWidget(self.clear_button)
        self.flows_editor.edited.connect(lambda value: self._apply(self.flows_editor, flows=value))
        self.T_editor.edited.connect(lambda value: self._apply(self.T_editor, T=value))
        self.P_editor.edited.connect(lambda value: self._apply(self.P_editor, P=value))
        self.clear_button.clicked.connect(self.clear_estimate)

    # ---- showing ----------------------------------------------------------------
    @property
    def stream_name(self) -> str:
        return self.context.block_name

    def show_stream(self, name: str) -> None:
        """Edit the estimate of stream ``name`` (field names in messages start with it)."""
        self.context.block_name = name
        self.refresh()

    def refresh(self) -> None:
        """Show the model's estimate in each editor's chosen unit."""
        flowsheet = self._flowsheet_getter()
        if self.stream_name not in flowsheet.streams:
            return
        estimate = flowsheet.stream(self.stream_name).estimate
        self.flows_editor.set_value(self._flows_shown(estimate))
        for editor, kind, value in (
            (self.T_editor, "temperature", estimate.T if estimate else None),
            (self.P_editor, "pressure", estimate.P if estimate else None),
        ):
            unit = self._usable_unit(editor.unit(), kind)
            shown = None if value is None else rounded(from_internal(value, kind, unit))
            editor.set_value(None if shown is None else TypedQuantity(shown, unit))
        self.clear_button.setEnabled(estimate is not None)

    def refresh_context(self) -> None:
        """Components or the unit system changed: rows follow the components, and the
        estimate is shown in the unit system's units."""
        for editor in (self.flows_editor, self.T_editor, self.P_editor):
            editor.set_value(None)  # back to the unit system's unit
        self.refresh()

    def _usable_unit(self, unit: str, kind: str) -> str:
        """``unit`` if it is one of ``kind`` (the chooser may hold a refused one), else
        the unit system's."""
        try:
            resolve_unit(unit, kind)
        except UnitError:
            return self.context.default_unit(kind)
        return unit

    def _flows_shown(self, estimate: StreamEstimate | None) -> ComponentAmounts | None:
        if estimate is None or not estimate.flows:
            return None
        unit = self.flows_editor.unit()
        kind = flow_kind(unit) or "molar_flow"
        if flow_kind(unit) is None:
            unit = self.context.default_unit("molar_flow")
        masses = self._molar_masses()
        values = {}
        for name, flow in estimate.flows.items():
            amount = flow * masses[name] if kind == "mass_flow" else flow
            values[name] = rounded(from_internal(amount, kind, unit))
        return ComponentAmounts(values, unit)

    def _molar_masses(self) -> dict[str, float]:
        components = self._flowsheet_getter().components
        return {c.name: float(c.molar_mass) for c in components}

    # ---- editing ----------------------------------------------------------------
    def _apply(self, editor, **change) -> bool:
        """Offer the estimate with one part changed; a refusal marks ``editor``."""
        flowsheet = self._flowsheet_getter()
        old = flowsheet.stream(self.stream_name).estimate or StreamEstimate()
        flows, T, P = dict(old.flows), old.T, old.P
        try:
            if "flows" in change:
                flows = self._flows_internal(change["flows"])
            if "T" in change:
                T = self._internal(change["T"], "temperature")
            if "P" in change:
                P = self._internal(change["P"], "pressure")
        except LoopwrightError as error:  # a unit the chooser holds but refused
            editor.show_error(str(error))
            return False
        estimate = StreamEstimate(flows, T, P)
        if same_estimate(estimate, flowsheet.stream(self.stream_name).estimate or StreamEstimate()):
            self.refresh()  # a unit change: the same estimate, shown in the new unit
            return True
        message = push_estimate_change(self._undo_stack, flowsheet, self.stream_name, estimate)
        if message:
            editor.show_error(message)
            return False
        self.refresh()
        return True

    def clear_estimate(self) -> None:
        push_estimate_change(self._undo_stack, self._flowsheet_getter(), self.stream_name, None)
        self.refresh()

    @staticmethod
    def _internal(quantity: TypedQuantity | None, kind: str) -> float | None:
        return None if quantity is None else to_internal(quantity.value, quantity.unit, kind)

    def _flows_internal(self, amounts: ComponentAmounts | None) -> dict[str, float]:
        if amounts is None:
            return {}
        kind = flow_kind(amounts.unit)
        if kind is None:
            raise InputError(
                f"{self.stream_name}.estimate.flows", amounts.unit, "a molar or mass flow unit"
            )
        masses = self._molar_masses()
        flows = {}
        for name, number in amounts.values.items():
            internal = to_internal(number, amounts.unit, kind)
            flows[name] = internal / masses[name] if kind == "mass_flow" else internal
        return flows
