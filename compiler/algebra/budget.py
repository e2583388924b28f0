"""A cooperative deadline that long loops poll, so a time limit works in any thread.

A signal can interrupt a runaway computation only in the main thread; a
build run from a worker thread (a server, a test runner) relies on the loops
that can run long calling ``check()``.  The engine opens a ``deadline`` per
build and per step; the algebra only ever calls ``check()``.  Deadlines are
per thread, and a nested one never outlives the one around it.
"""
from __future__ import annotations

import threading
import time
from contextlib import contextmanager


class BudgetExceeded(Exception):
    """The active deadline has passed; ``limit`` names it ("step time limit of 30 s")."""

    def __init__(self, limit: str):
        super().__init__(limit)
        self.limit = limit


_local = threading.local()


def _stack() -> list:
    if not hasattr(_local, "stack"):
        _local.stack = []
    return _local.stack


@contextmanager
def deadline(seconds: float, limit: str):
    """Within the block, ``check()`` raises once ``seconds`` have passed
    (or once an enclosing deadline has, whichever comes first)."""
    stack = _stack()
    end = time.monotonic() + seconds
    if stack and stack[-1][0] <= end:
        end, limit = stack[-1]
    stack.append((end, limit))
    try:
        yield
    finally:
        stack.pop()


def remaining() -> tuple[float, str] | None:
    """Seconds left and the name of the deadline that will end first, if any."""
    stack = _stack()
    if not stack:
        return None
    end, limit = stack[-1]
    return end - time.monotonic(), limit


def check() -> None:
    """Raise ``BudgetExceeded`` if the thread's active deadline has passed."""
    stack = getattr(_local, "stack", None)
    if stack and time.monotonic() > stack[-1][0]:
        raise BudgetExceeded(stack[-1][1])
