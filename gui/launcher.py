"""The ``loopwright`` command: the window, or the headless sub-commands.

``loopwright`` and ``loopwright CASE`` open the window; ``loopwright solve ...`` and
``loopwright export ...`` run headless from ``model.cli`` without loading Qt. The
dispatch lives in ``gui`` because only ``gui`` may import both layers.
"""

from __future__ import annotations

import sys

HEADLESS_COMMANDS = ("solve", "export")


def main(argv: list[str] | None = None) -> int:
    """Entry point of the ``loopwright`` console command; returns the exit status."""
    args = list(sys.argv[1:] if argv is None else argv)
    if args and args[0] in HEADLESS_COMMANDS:
        from model.cli import main as headless_main

        return headless_main(args)
    if args and args[0] in ("-h", "--help"):
        print(
            "usage: loopwright [CASE.loop.json]\n"
            "       loopwright solve CASE [--units SYSTEM] [--method NAME] "
            "[--q-min Q] [--q-max Q] [--json]\n"
            "       loopwright export CASE --csv FILE [--units SYSTEM]"
        )
        return 0
    from gui.app import run_app

    return run_app(args[0] if args else None)


if __name__ == "__main__":
    sys.exit(main())
