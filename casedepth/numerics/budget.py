"""Bounds on a calculation: a way to stop it from another thread, and a limit on the steps of one march.

A calculation started inside :func:`stoppable` checks, at every solver step and every root-finder
iteration (:func:`check`), whether it has been asked to stop; the window uses this to drop a
calculation an edit has made stale and to close without waiting. Outside :func:`stoppable` nothing
is checked and nothing costs.
"""

from __future__ import annotations

import threading
from contextlib import contextmanager

from ..errors import SolverError

#: steps one march of the solver may take: far beyond any soak the models cover (a 500 h march takes under
#: 200), so reaching it means the inputs have driven the solver where it cannot go
MAX_STEPS = 20000

_state = threading.local()


class Stopped(SolverError):
    """The calculation was asked to stop (a newer one replaced it, or the window is closing)."""


@contextmanager
def stoppable(stop: threading.Event):
    """Run the body so that setting ``stop`` (from any thread) ends it with :class:`Stopped` at its next check."""
    previous = getattr(_state, "stop", None)
    _state.stop = stop
    try:
        yield
    finally:
        _state.stop = previous


def signal() -> threading.Event | None:
    """The stop signal of the calculation running on this thread (None outside :func:`stoppable`). A loop that
    checks at every turn reads it once and calls :func:`check_signal` with it."""
    return getattr(_state, "stop", None)


def check_signal(stop: threading.Event | None) -> None:
    """Raise :class:`Stopped` if ``stop`` (from :func:`signal`) is set."""
    if stop is not None and stop.is_set():
        raise Stopped("stopped: a newer calculation replaced this one")


def check() -> None:
    """Raise :class:`Stopped` if the calculation running on this thread has been asked to stop."""
    check_signal(getattr(_state, "stop", None))
