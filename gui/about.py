"""Help → About: what Loopwright is, the methods it uses, and the cautions in full."""

from __future__ import annotations

from html import escape

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QDialog, QDialogButtonBox, QLabel, QVBoxLayout, QWidget

from model.report.cautions import CAUTIONS

METHOD_NOTES = (
    "Recycles are closed by bounded Wegstein acceleration (J. H. Wegstein, "
    "\u201cAccelerating convergence of iterative processes\u201d, Communications of the "
    "ACM 1(6), 1958), by direct substitution, or by a quasi-Newton (Broyden) method.",
    "Enthalpy is on a formation basis from ideal-gas heat capacities; heats of "
    "vaporization follow the Watson correlation (Watson 1943) from the normal boiling "
    "point. Component data come from the chemicals library and are copied into each case.",
)


def about_html(version: str) -> str:
    """The About text as simple HTML: description, methods, cautions."""
    cautions = "".join(f"<li>{escape(c)}</li>" for c in CAUTIONS)
    notes = "".join(f"<p>{escape(n)}</p>" for n in METHOD_NOTES)
    return (
        f"<h3>Loopwright {escape(version)}</h3>"
        "<p>Steady-state heat and material balances of processes with recycle loops.</p>"
        f"{notes}<p><b>Cautions</b></p><ul>{cautions}</ul>"
    )


class AboutDialog(QDialog):
    """Modal About box; the cautions are listed in full."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        from importlib.metadata import PackageNotFoundError, version

        try:
            number = version("loopwright")
        except PackageNotFoundError:
            number = "(development)"
        self.setWindowTitle("About Loopwright")
        self.text_label = QLabel(about_html(number))
        self.text_label.setWordWrap(True)
        self.text_label.setTextFormat(Qt.TextFormat.RichText)
        self.text_label.setMinimumWidth(460)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(self.text_label)
        layout.addWidget(buttons)
