"""The window's status bar: solve state · iteration · largest residual · closure · caution.

The caution line is a permanent widget and is always visible; when the window is too
narrow for all of it, it is shortened with an ellipsis and the full cautions show on
hover.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, QTimer
from PySide6.QtGui import QFontMetrics, QResizeEvent
from PySide6.QtWidgets import QLabel, QSizePolicy, QStatusBar

from model.report.cautions import CAUTION_LINE, CAUTIONS
from units_of_measure import format_value

STATES = ("not solved", "solving", "solved", "not converged", "needs input")
STATE_STYLE = {
    "not solved": "background:#e6e9ed; color:#3a4553;",
    "solving": "background:#dde7f4; color:#23405f;",
    "solved": "background:#d9eee0; color:#1d5431;",
    "not converged": "background:#f5d5d1; color:#7a1e14;",
    "needs input": "background:#f7e7b5; color:#5a4300;",
}
SOLUTION_STATES = {
    "solved": "solved",
    "not converged": "not converged",
    "stopped": "not converged",
    "needs input": "needs input",
    "failed": "not converged",
}


class ElidedLabel(QLabel):
    """A one-line label that shortens its text with an ellipsis instead of clipping it."""

    def __init__(self, text: str, parent=None) -> None:
        super().__init__(parent)
        self._full_text = text
        self.setSizePolicy(QSizePolicy.Policy.Ignored, QSizePolicy.Policy.Preferred)
        self.setMinimumWidth(120)
        self._elide()

    def full_text(self) -> str:
        return self._full_text

    def resizeEvent(self, event: QResizeEvent) -> None:
        super().resizeEvent(event)
        self._elide()

    def _elide(self) -> None:
        metrics = QFontMetrics(self.font())
        super().setText(
            metrics.elidedText(
                self._full_text, Qt.TextElideMode.ElideRight, max(self.width() - 4, 40)
            )
        )


class StatusLine(QStatusBar):
    """Status bar with the solve state, the iteration, the largest residual, the balance
    closure and the caution line."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setSizeGripEnabled(False)
        self.state_label = QLabel()
        self.state_label.setObjectName("solveState")
        self.iteration_label = QLabel()
        self.residual_label = QLabel()
        self.closure_label = QLabel()
        self.note_label = QLabel()
        self.note_label.setStyleSheet("color:#23405f;")
        self._note_timer = QTimer(self)
        self._note_timer.setSingleShot(True)
        self._note_timer.timeout.connect(self.note_label.clear)
        self.caution_label = ElidedLabel(CAUTION_LINE)
        self.caution_label.setObjectName("cautionLine")
        self.caution_label.setToolTip("\n".join(CAUTIONS))
        self.caution_label.setStyleSheet("color:#5a4300;")
        for label in (
            self.state_label,
            self.iteration_label,
            self.residual_label,
            self.closure_label,
            self.note_label,
        ):
            self.addWidget(label)
        self.addPermanentWidget(self.caution_label, 1)
        self.set_state("not solved")

    def state(self) -> str:
        return self.state_label.text().strip()

    def set_state(self, state: str) -> None:
        """Show one of :data:`STATES` as a worded badge; clears the progress on a new state."""
        if state not in STATES:
            raise ValueError(f"solve state {state!r}: expected one of {', '.join(STATES)}")
        self.state_label.setText(f" {state} ")
        self.state_label.setStyleSheet(STATE_STYLE[state] + "border-radius:3px; padding:1px 4px;")

    def set_progress(
        self,
        iteration: int | None,
        largest_residual: float | None,
        detail: str = "",
        work: str = "",
    ) -> None:
        """Show the iteration count and the largest scaled residual (None hides them).

        ``detail`` follows the iteration (the part being converged); ``work`` (passes
        and block evaluations of a finished solve) shows on hover, keeping the bar short
        enough for the caution line.
        """
        text = "" if iteration is None else f"iteration {iteration}"
        self.iteration_label.setText(f"{text} · {detail}" if text and detail else text)
        self.iteration_label.setToolTip(work)
        self.residual_label.setText(
            ""
            if largest_residual is None
            else f"largest residual {format_value(largest_residual, 3)}"
        )

    def set_closure(self, text: str, details: str = "") -> None:
        """The balance verdict (kept short so the caution line has room); ``details``
        (every closure) shows on hover."""
        self.closure_label.setText(text)
        self.closure_label.setToolTip(details or text)

    def show_note(self, text: str, milliseconds: int = 8000) -> None:
        """A passing explanation (a refused gesture, a stop request), cleared after a while."""
        self.note_label.setText(text)
        self.note_label.setToolTip(text)
        self._note_timer.start(milliseconds)


def closure_text(balance) -> tuple[str, str]:
    """For the status bar: the verdict with the largest relative closure, and every
    closure (mass, elements, energy) for the tooltip."""
    if balance is None:
        return "", ""
    verdict = "balances close" if balance.closes else "balances do not close"
    closures = balance.closures
    largest = max(closures.values(), default=0.0)
    details = ", ".join(f"{name} {format_value(value, 2)}" for name, value in closures.items())
    return f"{verdict} (largest {format_value(largest, 2)})", f"Relative closures: {details}"
