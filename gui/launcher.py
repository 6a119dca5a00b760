"""The ``loopwright`` command: the window, or the headless sub-commands.

``loopwright`` and ``loopwright CASE`` open the window; ``loopwright solve ...``,
``loopwright export ...`` and ``loopwright sweep ...`` run headless from ``model.cli``
without loading Qt, except that ``export --report`` draws the diagram with an
off-screen Qt application (``gui.report``), handed to ``model.cli`` as its report
writer. The dispatch lives in ``gui`` because only ``gui`` may import both layers.
"""

from __future__ import annotations

import sys

HEADLESS_COMMANDS = ("solve", "export", "sweep")


def main(argv: list[str] | None = None) -> int:
    """Entry point of the ``loopwright`` console command; returns the exit status."""
    args = list(sys.argv[1:] if argv is None else argv)
    if args and args[0] in HEADLESS_COMMANDS:
        from model.cli import main as headless_main

        return headless_main(args, report_writer=_report_writer)
    if args and args[0] in ("-h", "--help"):
        print(
            "usage: loopwright [CASE.loop.json]\n"
            "       loopwright solve CASE [--units SYSTEM] [--method NAME] "
            "[--q-min Q] [--q-max Q] [--json]\n"
            "       loopwright export CASE [--csv FILE] [--xlsx FILE] [--report FILE] "
            "[--units SYSTEM]\n"
            '       loopwright sweep CASE --vary "SPEC=START:STOP:N" [--vary ...] '
            '--record "RESULT" [--record ...] [--csv OUT] [--workers N] [--dask ADDRESS]'
        )
        return 0
    from gui.app import run_app

    return run_app(args[0] if args else None)


def _report_writer(case, source: str) -> bytes:
    """The PDF report (Qt is loaded only now, for ``export --report``)."""
    from gui.report import report_for_command_line

    return report_for_command_line(case, source)


if __name__ == "__main__":
    sys.exit(main())
