"""Solving off the window's thread: debounced, coalesced, newest request wins, stale work stopped."""

from __future__ import annotations

import threading

from PySide6.QtCore import QObject, QRunnable, QThreadPool, QTimer, Signal

from ..numerics.budget import Stopped, stoppable
from ..plan.evaluate import evaluate


class _Signals(QObject):
    done = Signal(int, object, object)  # generation, outcome or None, error or None


class _Job(QRunnable):
    def __init__(self, generation: int, values: dict, signals: _Signals):
        super().__init__()
        self.generation, self.values, self.signals = generation, values, signals
        self.stop = threading.Event()

    def run(self):
        try:
            with stoppable(self.stop):
                self.signals.done.emit(self.generation, evaluate(self.values), None)
        except Exception as error:  # an unforeseen failure is shown, never lost in a thread
            self.signals.done.emit(self.generation, None, error)


class Calculator(QObject):
    """Runs :func:`casedepth.plan.evaluate` on a worker thread.

    :meth:`request` may be called on every keystroke: the work starts ``delay_ms`` after the last
    request, at most one job runs at a time, a running job a newer request makes stale is stopped at its
    next solver step, and only the newest request's answer is reported.
    """

    busy = Signal()
    finished = Signal(object)  # Outcome
    failed = Signal(object)  # the exception

    def __init__(self, delay_ms: int = 10, parent=None):
        super().__init__(parent)
        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(1)
        self._signals = _Signals()
        self._signals.done.connect(self._done)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(delay_ms)
        self._timer.timeout.connect(self._start)
        self._generation = 0
        self._values: dict | None = None
        self._job: _Job | None = None
        self._pending = False

    def request(self, values: dict) -> None:
        self._values = values
        self._generation += 1
        if self._job is not None:
            self._job.stop.set()  # what it solves is stale now
        self._timer.start()

    def _start(self) -> None:
        if self._job is not None:
            self._pending = True
            return
        self._pending = False
        self.busy.emit()
        self._job = _Job(self._generation, self._values, self._signals)
        self._job.setAutoDelete(False)
        self._pool.start(self._job)

    def _done(self, generation: int, outcome, error) -> None:
        self._job = None
        if self._pending or generation != self._generation:
            if not self._timer.isActive():
                self._start()
            return
        if isinstance(error, Stopped):
            return
        if error is None:
            self.finished.emit(outcome)
        else:
            self.failed.emit(error)

    def wait(self) -> None:
        """Stop any running job and wait until the worker is idle (for shutting down): never longer than a step."""
        self._timer.stop()
        if self._job is not None:
            self._job.stop.set()
        self._pool.waitForDone()
