"""Model: properties, the flowsheet document, validation, block calculations, the solve,
reports and case files (no Qt).

Subpackages, each standing above the ones before it (import-linter keeps the order):
``properties`` → ``flowsheet`` → ``validation`` and ``blocks`` → ``solve`` → ``report``
and ``case`` → ``study`` (sweeps) → ``cli``. ``model.errors`` is below them all.
"""
