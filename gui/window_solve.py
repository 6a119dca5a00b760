"""The main window's solving: the solve (F5) and stop (Esc), the second opinion, and
showing a solution everywhere.

Both runs go through a :class:`gui.solve_controller.SolveController` (a worker thread
per run): the solve with ``model.solve.driver.solve_flowsheet``, the second opinion with
``model.solve.second_opinion_solve.second_opinion`` in its place. Neither edits the flowsheet, so
the window only switches editing off while one runs.
"""

from __future__ import annotations

from typing import Any

from gui.status_line import SOLUTION_STATES, closure_text
from model.report.report_order import ReportOrder
from model.report.target_lines import target_lines
from model.report.text import work_line
from units_of_measure import format_value

EDIT_ACTIONS = (
    "new",
    "open",
    "copy",
    "paste",
    "delete",
    "rename",
    "components",
    "targets",
    "use_target_values",
    "sweep",
)


def _second_opinion_solve(solution: Any):
    """A ``solve(flowsheet, method, settings, callback)`` for the solve controller that
    returns the second opinion on ``solution`` instead."""

    def solve(flowsheet, _method, _settings, _callback):
        from model.solve.second_opinion_solve import second_opinion
        from model.solve.targets import adjusted_flowsheet

        # a targets solution is checked with the targets' adjusted values in place
        return second_opinion(adjusted_flowsheet(flowsheet, solution), compare_with=solution)

    return solve


def opinion_summary(opinion: Any) -> tuple[str, str]:
    """``(severity, one line)`` for the log and the status bar."""
    where = f" at {opinion.worst}" if opinion.worst else ""
    difference = opinion.largest_relative_difference
    measured = (
        ""
        if difference is None
        else f"largest relative difference {format_value(difference, 2)}{where}; "
    )
    work = (
        f"{opinion.evaluations} flowsheet evaluations"
        f"{f' ({opinion.method})' if opinion.method else ''}, {opinion.seconds:.2g} s"
    )
    if opinion.agrees:
        return "info", f"Second opinion agrees (tolerance {opinion.tolerance:g}): {measured}{work}"
    if not opinion.converged:
        return "warning", f"Second opinion did not converge: {opinion.message}; {work}"
    return "warning", (
        f"Second opinion does not agree (tolerance {opinion.tolerance:g}): {measured}{work}"
    )


class WindowSolveMixin:
    """Solve, stop, second opinion and result display of :class:`gui.main_window.MainWindow`."""

    _part_in_progress = ""  # label of the strongly connected part the solve converges now

    def is_busy(self) -> bool:
        """A solve or a second opinion is running (the flowsheet must not change)."""
        return self.solver.is_running() or self.checker.is_running()

    # ---- solve -----------------------------------------------------------------------------
    def start_solve(self) -> None:
        """Solve the case in the worker thread (F5); editing is off until it ends."""
        if self.is_busy():
            return
        self._set_editing(False)
        self.actions["stop"].setEnabled(True)
        self.status.set_state("solving")
        self.status.set_progress(None, None)
        self.status.set_closure("")
        self.scene.set_results(self.case.solution, self.results_current, solving=True)
        self.log.clear()
        self._part_in_progress = ""
        self.monitor.begin_run()
        self.solver.start(self.case.flowsheet, self.case.method, self.case.settings)
        self.update_solve_actions()

    def stop_solve(self) -> None:
        if self.solver.is_running():
            self.solver.stop()
            self.show_message("Stopping at the next iteration…")

    def _solve_progress(self, records: list) -> None:
        """Records that arrived since the last batch: the log names each part as the solve
        reaches it, the status bar and the recycle monitor show the newest. A record with
        ``adjusted`` is an outer iteration of the targets loop (the monitor's third plot)."""
        for record in records:
            if hasattr(record, "adjusted"):
                self.monitor.add_target_record(record)
                continue
            part = getattr(record, "part", "")
            if part.endswith(" of 1"):  # one strongly connected part: nothing to tell apart
                part = ""
            if part and part != self._part_in_progress:  # the solve moved on to the next part
                self._part_in_progress = part
                tears = ", ".join(record.residuals)
                self.log.add_message("info", f"Converging {part}: tears {tears}")
            self.monitor.add_record(record)
        if records:
            last = records[-1]
            if hasattr(last, "adjusted"):
                worst = max((abs(r) for r in last.residuals.values()), default=0.0)
                self.status.set_progress(last.iteration, worst, "targets")
                return
            residual = max(last.residuals.values()) if last.residuals else None
            part = getattr(last, "part", "")
            self.status.set_progress(
                last.iteration, residual, "" if part.endswith(" of 1") else part
            )

    def _solve_finished(self, solution) -> None:
        self.case.solution = solution
        self._set_editing(True)
        self.monitor.end_run(solution.convergence, solution.block_evaluations)
        self.monitor.show_targets(solution.targets)
        self._show_results(solution, current=True)
        self.log.set_issues(solution.issues)
        severity = "info" if solution.converged else "warning"
        self.log.add_message(severity, f"Solve {solution.status}: {solution.message}")
        self.log.add_message("info", work_line(solution))
        for line in target_lines(solution):
            self.log.add_message("info" if solution.converged else "warning", line)
        if solution.balance is not None:
            for line in solution.balance.lines():
                self.log.add_message("info" if solution.balance.closes else "warning", line)
        self._update_title()

    def _solve_failed(self, message: str) -> None:
        self._set_editing(True)
        self.status.set_state("not converged")
        self.log.add_message("error", f"The solve failed: {message}")
        self.result_tabs.setCurrentWidget(self.log)
        self.scene.set_results(self.case.solution, self.results_current)

    # ---- targets -----------------------------------------------------------------------
    def edit_targets(self) -> bool:
        """Solve → Targets…: edit the targets in a dialog; OK is one undo step."""
        from gui.commands_specs import SetTargetsCommand
        from gui.targets_dialog import TargetsDialog

        if self.is_busy():
            return False
        solution = self.case.solution if self.results_current else None
        dialog = TargetsDialog(self.case.flowsheet, getattr(solution, "targets", None), self)
        self.targets_dialog = dialog
        if dialog.exec() != dialog.DialogCode.Accepted:
            return False
        if dialog.targets() != self.case.flowsheet.targets:
            self.undo_stack.push(SetTargetsCommand(self.case.flowsheet, dialog.targets()))
        return True

    def use_adjusted_values(self) -> int:
        """Solve → Use Target Values: write each met target's adjusted value into its
        spec (one undo step); the number of specs changed."""
        from gui.commands_specs import SetSpecCommand
        from model.errors import LoopwrightError
        from model.flowsheet.spec_numbers import with_spec_number

        outcome = getattr(self.case.solution, "targets", None)
        if self.is_busy() or outcome is None:
            return 0
        commands = []
        for result in outcome.results:
            if not result.met:
                continue
            address = result.target.adjusted
            try:
                value = with_spec_number(
                    self.case.flowsheet, address, result.adjusted, result.target.unit
                )
            except LoopwrightError as error:
                self.log.add_message("warning", f"{address}: {error}")
                continue
            commands.append(
                SetSpecCommand(self.case.flowsheet, address.block, address.field, value)
            )
        if commands:
            self.undo_stack.beginMacro("Use target values")
            for command in commands:
                self.undo_stack.push(command)
            self.undo_stack.endMacro()
            self.log.add_message(
                "info", f"{len(commands)} spec(s) set to the targets' adjusted values"
            )
        return len(commands)

    def show_sweep(self):
        """Solve → Sweep…: the sweep dialog for the case as it stands now."""
        import dataclasses

        from gui.sweep_dialog import SweepDialog
        from model.case.file import case_to_json

        case = dataclasses.replace(self.case, solution=None)
        dialog = SweepDialog(self.case, case_to_json(case), self)
        self.sweep_dialog = dialog
        dialog.show()
        return dialog

    # ---- second opinion --------------------------------------------------------------------
    def start_second_opinion(self) -> bool:
        """Check the current solution by solving every stream at once (worker thread)."""
        if self.is_busy() or self.case.solution is None or not self.results_current:
            self.show_message("Solve the flowsheet first: the second opinion checks a solution.")
            return False
        self._set_editing(False)
        self.show_message("Second opinion: solving every stream at once…", 600_000)
        self.checker.start(
            self.case.flowsheet,
            self.case.method,
            self.case.settings,
            solve=_second_opinion_solve(self.case.solution),
        )
        self.update_solve_actions()
        return True

    def _second_opinion_finished(self, opinion) -> None:
        self.last_second_opinion = opinion
        self._set_editing(True)
        severity, text = opinion_summary(opinion)
        self.log.add_message(severity, text)
        self.show_message(text, 20_000)

    def _second_opinion_failed(self, message: str) -> None:
        self._set_editing(True)
        self.log.add_message("error", f"The second opinion failed: {message}")
        self.show_message(f"The second opinion failed: {message}", 20_000)

    # ---- showing results -------------------------------------------------------------------
    def _show_results(self, solution, current: bool) -> None:
        """Put a solution (or none) in the stream table, diagram, details and status line."""
        self.results_current = current and solution is not None
        self.update_solve_actions()
        unit_system = self.case.unit_system
        order = ReportOrder.of(self.case.flowsheet)
        self.stream_table.set_solution(solution, unit_system, report_order=order)
        self.scene.set_unit_system(unit_system)
        self.scene.set_results(solution, self.results_current)
        self.details.set_solution(solution)
        if solution is None:
            self.status.set_progress(None, None)
            self.status.set_closure("")
            self._refresh_idle_state()
            return
        self.status.set_state(SOLUTION_STATES.get(solution.status, "not converged"))
        records = solution.convergence.history.records if solution.convergence else []
        residual = (
            max(records[-1].residuals.values()) if records and records[-1].residuals else None
        )
        self.status.set_progress(
            solution.convergence.iterations if solution.convergence else solution.passes,
            residual,
            work=work_line(solution),
        )
        self.status.set_closure(*closure_text(solution.balance))

    def _set_editing(self, enabled: bool) -> None:
        """Editing on or off (off while a solve or a second opinion runs)."""
        self.editor.set_enabled(enabled)
        self.shelf.setEnabled(enabled)
        self.details.setEnabled(enabled)
        self.actions.method_combo.setEnabled(enabled)
        self.actions.method_group.setEnabled(enabled)
        for name in EDIT_ACTIONS:
            self.actions[name].setEnabled(enabled)
        self.actions.recent_menu.setEnabled(enabled)
        self.actions["undo"].setEnabled(enabled and self.undo_stack.canUndo())
        self.actions["redo"].setEnabled(enabled and self.undo_stack.canRedo())
        if enabled:
            self.actions["stop"].setEnabled(False)
        self.update_solve_actions()

    def update_solve_actions(self) -> None:
        """Solve when nothing runs; second opinion when, besides, the results are current."""
        idle = not self.is_busy()
        self.actions["solve"].setEnabled(idle)
        self.actions["second_opinion"].setEnabled(
            idle and self.case.solution is not None and self.results_current
        )
        self.actions.enable_exports(self.case.solution is not None)
