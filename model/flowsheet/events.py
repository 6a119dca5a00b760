"""Plain-Python change signals for the model (no Qt).

A small signal class in the manner of psygnal: ``Signal`` is declared on a class and
each instance gets its own :class:`SignalInstance` with ``connect``, ``disconnect``,
``emit``, ``block``/``unblock`` and a ``blocked()`` context manager. Bound methods are
held weakly (a view that goes away is dropped, not called); plain functions strongly.

Why not psygnal itself: its compiled build (0.9 to 0.16) drops a reference to ``None``
on each emit under CPython 3.11, which aborts the interpreter ("none_dealloc") after
some tens of thousands of emits, as the case-file fuzz tests and the window do.
"""

from __future__ import annotations

import weakref
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import Any


class SignalInstance:
    """The signal of one object: a list of callbacks called in connection order."""

    __slots__ = ("_slots", "_blocked")

    def __init__(self) -> None:
        self._slots: list[Any] = []
        self._blocked = 0

    def connect(self, callback: Callable[..., Any]) -> Callable[..., Any]:
        """Call ``callback(*args)`` on every emit; returns it (usable as a decorator)."""
        if not callable(callback):
            raise TypeError(f"cannot connect {callback!r}: it is not callable")
        if not any(_matches(slot, callback) for slot in self._slots):
            self._slots.append(_reference(callback))
        return callback

    def disconnect(self, callback: Callable[..., Any] | None = None) -> None:
        """Remove ``callback`` (or every callback when None); unknown ones are ignored."""
        if callback is None:
            self._slots.clear()
        else:
            self._slots = [slot for slot in self._slots if not _matches(slot, callback)]

    def emit(self, *args: Any) -> None:
        """Call every connected callback with ``args``, unless the signal is blocked."""
        if self._blocked:
            return
        dead = False
        for slot in list(self._slots):
            callback = slot() if isinstance(slot, weakref.WeakMethod) else slot
            if callback is None:
                dead = True
                continue
            callback(*args)
        if dead:
            self._slots = [s for s in self._slots if not isinstance(s, weakref.WeakMethod) or s()]

    def block(self) -> None:
        self._blocked += 1

    def unblock(self) -> None:
        self._blocked = max(0, self._blocked - 1)

    @contextmanager
    def blocked(self) -> Iterator[None]:
        """Hold back emits inside a ``with`` block (nested blocks are fine)."""
        self.block()
        try:
            yield
        finally:
            self.unblock()

    def __len__(self) -> int:
        return len(self._slots)


class Signal:
    """Declare a signal on a class; each instance gets its own :class:`SignalInstance`.

    ``types`` document the arguments an emit carries; they are not checked.
    """

    def __init__(self, *types: Any) -> None:
        self.types = types
        self._attribute = ""

    def __set_name__(self, owner: type, name: str) -> None:
        self._attribute = f"_signal_{name}"

    def __get__(self, instance: Any, owner: type | None = None) -> Any:
        if instance is None:
            return self
        signal = instance.__dict__.get(self._attribute)
        if signal is None:
            signal = instance.__dict__[self._attribute] = SignalInstance()
        return signal


def _reference(callback: Callable[..., Any]) -> Any:
    if hasattr(callback, "__self__") and hasattr(callback, "__func__"):
        return weakref.WeakMethod(callback)
    return callback


def _matches(slot: Any, callback: Callable[..., Any]) -> bool:
    target = slot() if isinstance(slot, weakref.WeakMethod) else slot
    return target is not None and target == callback
