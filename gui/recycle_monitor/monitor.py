"""The recycle monitor: convergence plots, tear diagnosis and live solver settings."""

from __future__ import annotations

import html
import math
from typing import Any

from PySide6.QtCore import Qt, QTimer, Signal, Slot
from PySide6.QtWidgets import (
    QGroupBox,
    QLabel,
    QPushButton,
    QSplitter,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from convergence import (
    ConvergenceHistory,
    ConvergenceInputError,
    SolverSettings,
    TearDiagnosis,
    bounds_in_force,
    diagnose_tears,
)

from .controls import LiveControls
from .plots import ConvergencePlots
from .target_plot import TargetPlot

#: Least time between two redraws while records stream in, ms.
REDRAW_INTERVAL_MS = 50


def change_text(previous: Any, current: Any) -> str:
    """``"q_max 0 → 0.5"`` for the settings that differ between two snapshots."""
    changes = current.differences(previous)
    return "; ".join(
        f"{name} {old:g} → {new:g}" if isinstance(new, (int, float)) else f"{name} {old} → {new}"
        for name, (old, new) in changes.items()
    )


def part_of(record: Any) -> str:
    """The label of the strongly connected part a record belongs to ("" if none)."""
    return getattr(record, "part", "")


def _part_text(record: Any) -> str:
    """`` · part 2 of 5`` for a record of a solve with several parts, else ""."""
    part = part_of(record)
    return "" if not part or part.endswith(" of 1") else f" · {html.escape(part)}"


def suggested_bounds_for(diagnoses: dict[str, TearDiagnosis]) -> tuple[float, float] | None:
    """Bounds admitting every blocked tear's suggested q, and keeping the widening a run
    made by itself (None if the settings' bounds stop no tear)."""
    blocked = [d for d in diagnoses.values() if d.blocked_by_bounds or d.widened_by_run]
    if not blocked:
        return None
    return (
        min(d.suggested_bounds[0] for d in blocked),
        max(d.suggested_bounds[1] for d in blocked),
    )


class RecycleMonitor(QWidget):
    """Residual and q plots per tear, the tear diagnosis and live solver controls.

    Signals
    -------
    bounds_applied(float, float)
        The user applied suggested q bounds (q_min, q_max).
    """

    bounds_applied = Signal(float, float)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.plots = ConvergencePlots()
        self.target_plot = TargetPlot()
        self.controls = LiveControls()
        self.status_label = QLabel("No run yet.")
        self.status_label.setWordWrap(True)
        self.status_label.setTextFormat(Qt.TextFormat.RichText)
        self.diagnosis_view = QTextBrowser()
        self.diagnosis_view.setOpenLinks(False)
        self.apply_button = QPushButton("Apply suggested bounds")
        self.apply_button.setEnabled(False)
        self._settings: SolverSettings | None = None
        self._records: list[Any] = []
        self._previous = None
        self._suggestion: tuple[float, float] | None = None
        self._run_text = ""
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(REDRAW_INTERVAL_MS)
        self._timer.timeout.connect(self.redraw)
        self._build_layout()
        self.controls.settings_changed.connect(self._on_settings_changed)
        self.apply_button.clicked.connect(self.apply_suggested_bounds)

    def _build_layout(self) -> None:
        settings_box = QGroupBox("Solver settings (apply at the next iteration)")
        QVBoxLayout(settings_box).addWidget(self.controls)
        diagnosis_box = QGroupBox("Tear diagnosis")
        diagnosis_layout = QVBoxLayout(diagnosis_box)
        diagnosis_layout.addWidget(self.diagnosis_view, 1)
        diagnosis_layout.addWidget(self.apply_button)
        side = QWidget()
        side_layout = QVBoxLayout(side)
        side_layout.setContentsMargins(4, 0, 0, 0)
        side_layout.addWidget(self.status_label)
        side_layout.addWidget(settings_box)
        side_layout.addWidget(diagnosis_box, 1)
        splitter = QSplitter()
        splitter.addWidget(self.plots.residual_plot)
        splitter.addWidget(self.plots.q_plot)
        splitter.addWidget(self.target_plot.plot)
        splitter.addWidget(side)
        splitter.setStretchFactor(0, 3)
        splitter.setStretchFactor(1, 3)
        splitter.setStretchFactor(2, 2)
        splitter.setStretchFactor(3, 2)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addWidget(splitter)

    # ---- public API -------------------------------------------------------------
    def bind_settings(self, settings: SolverSettings) -> None:
        """Edit ``settings`` with the live controls and draw its limits."""
        self._settings = settings
        self.controls.bind(settings)
        self._draw_limits(settings.snapshot())
        self._update_diagnosis(None)

    def begin_run(self) -> None:
        """Forget the previous run's curves, markers and diagnosis."""
        self._timer.stop()
        self.plots.clear()
        self.target_plot.clear()
        self._records = []
        self._previous = None
        self._run_text = ""
        self.status_label.setText("Solving…")
        self.diagnosis_view.setHtml("<i>Waiting for the first iterations.</i>")
        self._set_suggestion(None)

    @Slot(object)
    def add_target_record(self, record: Any) -> None:
        """Take one outer iteration of the targets loop (``TargetIterationRecord``)."""
        self.target_plot.append(record)

    def show_targets(self, outcome: Any) -> None:
        """Draw a finished (or stored) targets run's history; None draws nothing."""
        self.target_plot.clear()
        if outcome is None:
            return
        for result in outcome.results[:1]:
            self.target_plot.set_tolerance(result.target.tolerance)
        for record in outcome.history:
            self.target_plot.append(record)

    @Slot(object)
    def add_record(self, record: Any) -> None:
        """Take one IterationRecord; curves are redrawn at most every 50 ms.

        With targets, every outer iteration is a new recycle solve, whose iterations
        count from 1 again: the tear plots then show that latest solve."""
        if self._records and record.iteration < self._records[-1].iteration:
            self._timer.stop()
            self.plots.clear()
            self._records = []
            self._previous = None
        self._records.append(record)
        self.plots.append(record)
        if self._previous is not None and record.settings_version != self._previous.version:
            self.plots.add_marker(record.iteration, change_text(self._previous, record.settings))
        self._previous = record.settings
        if not self._timer.isActive():
            self._timer.start()

    def end_run(self, result: Any, block_evaluations: int = 0) -> None:
        """Draw everything of the finished run; ``result`` is a FixedPointResult or None,
        ``block_evaluations`` the solve's block calculations (0: not known)."""
        self._timer.stop()
        if result is None:
            self.redraw()
            self.status_label.setText("The flowsheet has no recycle: nothing to converge.")
            self.diagnosis_view.setHtml("<i>No tear streams.</i>")
            self._set_suggestion(None)
            return
        for event in result.history.events:
            if event.kind == "settings changed":
                self.plots.add_marker(event.iteration, event.detail.split(": ", 1)[-1])
            elif event.kind == "fallback":
                self.plots.add_marker(event.iteration, "fallback to direct substitution")
        self.redraw()
        diagnoses = dict(result.diagnosis) or self._live_diagnosis()
        parts = {part_of(record) for record in result.history.records} - {""}
        in_parts = f" in {len(parts)} parts" if len(parts) > 1 else ""
        self.status_label.setText(
            f"<b>{html.escape(result.status.capitalize())}</b> · {result.iterations} "
            f"iterations{in_parts} · {result.evaluations} evaluations"
            + (f" · {block_evaluations} block evaluations" if block_evaluations else "")
        )
        self._run_text = self._run_html(result)
        self._update_diagnosis(diagnoses)

    @staticmethod
    def _run_html(result: Any) -> str:
        """The run's message, the settings changes made during it, any fallback to
        direct substitution (:mod:`convergence.fallback`) and the iterations that took
        a dominant-mode step (:mod:`convergence.modes`)."""
        text = f"<p>{html.escape(result.message)}</p>"
        changes = result.history.events_of("settings changed")
        if changes:
            text += (
                "<p>Settings changed:<br>"
                + "<br>".join(
                    f"iteration {e.iteration}: {html.escape(e.detail.split(': ', 1)[-1])}"
                    for e in changes
                )
                + "</p>"
            )
        for event in result.history.events_of("fallback"):
            text += f"<p>Fallback at iteration {event.iteration}: {html.escape(event.detail)}</p>"
        modes = [r.iteration for r in result.history.records if r.step == "dominant mode"]
        if modes:
            text += (
                "<p>Dominant-mode steps (along a tear's leading modes, instead of Wegstein's "
                "per-variable q; the q plot shows the q such a step amounts to where one "
                "variable moves, a gap where several do) "
                f"at iteration{'s' if len(modes) > 1 else ''} "
                + ", ".join(str(iteration) for iteration in modes)
                + "</p>"
            )
        return text

    def show_history(self, result: Any) -> None:
        """Show a stored run (e.g. of a reopened case); None clears the plots."""
        self.begin_run()
        if result is None:
            self.status_label.setText("No run yet.")
            self.diagnosis_view.clear()
            return
        for record in result.history.records:
            self.add_record(record)
        self.end_run(result)

    # ---- drawing ----------------------------------------------------------------
    def redraw(self) -> None:
        """Push collected records into the curves, limits and live diagnosis."""
        self._timer.stop()
        self.plots.redraw()
        if not self._records:
            return
        last = self._records[-1]
        self._draw_limits(self._settings.snapshot() if self._settings else last.settings)
        self.status_label.setText(
            f"Iteration {last.iteration}{_part_text(last)} · {last.evaluations} evaluations · "
            f"largest residual {last.largest_residual:.3g}"
        )
        self._update_diagnosis(self._live_diagnosis())

    def _draw_limits(self, snapshot: Any) -> None:
        self.plots.set_tolerance(snapshot.tolerance)
        in_force = (
            bounds_in_force(ConvergenceHistory(records=self._records), snapshot)
            if self._records
            else None
        )
        self.plots.set_q_bounds(snapshot.q_min, snapshot.q_max, in_force)

    def _live_diagnosis(self) -> dict[str, TearDiagnosis]:
        """Every tear diagnosed from its own part's records (the solve converges the
        strongly connected parts one after another; each record names its part)."""
        by_part: dict[str, list[Any]] = {}
        for record in self._records:
            by_part.setdefault(part_of(record), []).append(record)
        diagnoses: dict[str, TearDiagnosis] = {}
        for records in by_part.values():
            diagnoses.update(diagnose_tears(ConvergenceHistory(records=records), self._settings))
        return diagnoses

    def _update_diagnosis(self, diagnoses: dict[str, TearDiagnosis] | None) -> None:
        run_html = self._run_text
        if not diagnoses:
            if run_html:
                self.diagnosis_view.setHtml(run_html)
            self._set_suggestion(None)
            return
        parts = []
        for tear, diagnosis in diagnoses.items():
            series = self.plots.series.get(tear)
            colour = series.colour if series else "#333333"
            ratio = diagnosis.residual_ratio
            trend = (
                ""
                if not math.isfinite(ratio)
                else f" The residual changes ×{ratio:.3g} per iteration."
            )
            parts.append(
                f"<p><b style='color:{colour}'>■ {html.escape(tear)}</b>: "
                f"{html.escape(diagnosis.advice)}.{trend}</p>"
            )
        self.diagnosis_view.setHtml("".join(parts) + run_html)
        self._set_suggestion(suggested_bounds_for(diagnoses))

    def _set_suggestion(self, bounds: tuple[float, float] | None) -> None:
        self._suggestion = bounds
        usable = bounds is not None and self._settings is not None
        self.apply_button.setEnabled(usable)
        self.apply_button.setText(
            "Apply suggested bounds"
            if bounds is None
            else f"Apply suggested bounds: q_min {bounds[0]:g}, q_max {bounds[1]:g}"
        )

    def suggestion(self) -> tuple[float, float] | None:
        """The q bounds the diagnosis suggests now (None: the bounds do not stop any tear)."""
        return self._suggestion

    # ---- edits of the settings --------------------------------------------------
    def apply_suggested_bounds(self) -> bool:
        """Set the suggested q bounds on the bound settings (at once, also mid-run)."""
        if self._suggestion is None or self._settings is None:
            return False
        q_min, q_max = self._suggestion
        try:
            self._settings.update(q_min=q_min, q_max=q_max)
        except ConvergenceInputError as error:
            self.controls._show_message(str(error))
            return False
        self.controls.refresh()
        self._on_settings_changed(self._settings.snapshot())
        self.bounds_applied.emit(q_min, q_max)
        return True

    def _on_settings_changed(self, snapshot: Any) -> None:
        self._draw_limits(snapshot)
        self._update_diagnosis(self._live_diagnosis() if self._records else None)
