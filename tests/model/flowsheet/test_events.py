"""Model change signals: order, blocking, weak references to bound methods."""

from __future__ import annotations

import gc
import sys

from model.flowsheet.events import Signal


class _Document:
    changed = Signal(str)


class _View:
    def __init__(self) -> None:
        self.seen: list[str] = []

    def on_changed(self, what: str) -> None:
        self.seen.append(what)


def test_each_instance_has_its_own_signal() -> None:
    first, second = _Document(), _Document()
    calls: list[str] = []
    first.changed.connect(calls.append)
    second.changed.emit("other")
    first.changed.emit("mine")
    assert calls == ["mine"]


def test_blocked_signals_hold_back_emits_and_nest() -> None:
    document = _Document()
    calls: list[str] = []
    document.changed.connect(calls.append)
    with document.changed.blocked():
        with document.changed.blocked():
            document.changed.emit("a")
        document.changed.emit("b")
    document.changed.emit("c")
    assert calls == ["c"]


def test_a_view_that_goes_away_is_dropped_not_called() -> None:
    document = _Document()
    view = _View()
    document.changed.connect(view.on_changed)
    document.changed.emit("x")
    assert view.seen == ["x"]
    del view
    gc.collect()
    document.changed.emit("y")  # must not raise
    assert len(document.changed) == 0


def test_disconnect_and_no_duplicate_connections() -> None:
    document = _Document()
    view = _View()
    document.changed.connect(view.on_changed)
    document.changed.connect(view.on_changed)
    document.changed.emit("x")
    document.changed.disconnect(view.on_changed)
    document.changed.emit("y")
    assert view.seen == ["x"]


def test_regression_many_emits_keep_none_refcount() -> None:
    """psygnal's compiled emit lost a reference to None per emit on CPython 3.11."""
    document = _Document()
    document.changed.connect(lambda what: None)
    before = sys.getrefcount(None)
    for _ in range(20000):
        document.changed.emit("x")
    assert abs(sys.getrefcount(None) - before) < 100
