"""Solving off the window's thread: debounced, coalesced, newest request wins, stale work stopped.

Two kinds of work share the one worker thread: the plan's evaluation, which every edit asks for, and the plan
at other temperatures (:func:`casedepth.plan.compare_temperatures`), which only the Temperatures tab asks for.
The evaluation goes first: a comparison waits for it, and an edit stops a comparison that is running (the
edit's answer is what the planner waits for); the stopped comparison runs again after the evaluation unless the
new result asks for its own (a refused edit leaves the last result, and its comparison, on show).
"""

from __future__ import annotations

import threading
from collections.abc import Callable

from PySide6.QtCore import QObject, QRunnable, QThreadPool, QTimer, Signal

from ..numerics.budget import Stopped, stoppable
from ..plan.evaluate import compare_temperatures, evaluate


class _Signals(QObject):
    done = Signal(object, object, object)  # the job, its answer or None, error or None


class _Job(QRunnable):
    """One piece of work for the worker thread, stoppable from the window's thread: ``work()`` for the evaluation
    of ``generation``, or for ``comparison`` (the values and temperatures compared)."""

    def __init__(self, work: Callable[[], object], signals: _Signals, generation: int = 0,
                 comparison: tuple[dict, list[float]] | None = None):
        super().__init__()
        self.work, self.signals, self.generation, self.comparison = work, signals, generation, comparison
        self.stop = threading.Event()

    def run(self):
        try:
            with stoppable(self.stop):
                answer = self.work()
        except Exception as error:  # noqa: BLE001 - an unforeseen failure is shown, never lost in a thread
            self.signals.done.emit(self, None, error)
        else:
            self.signals.done.emit(self, answer, None)


class Calculator(QObject):
    """Runs :func:`casedepth.plan.evaluate` on a worker thread, and :func:`casedepth.plan.compare_temperatures`
    when asked.

    :meth:`request` may be called on every keystroke: the work starts ``delay_ms`` after the last
    request, at most one job runs at a time, a running job a newer request makes stale is stopped at its
    next solver step, and only the newest request's answer is reported. :meth:`compare` waits until no
    evaluation is running or due; a new result drops it (whoever wants the comparison of the new result asks
    for it when it is shown).
    """

    busy = Signal()
    finished = Signal(object)  # Outcome
    failed = Signal(object)  # the exception
    compared = Signal(object, object, object)  # the values compared, (temperature, soak) pairs or None, error

    def __init__(self, delay_ms: int = 10, parent=None):
        super().__init__(parent)
        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(1)
        self._signals = _Signals()
        self._signals.done.connect(self._done)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(delay_ms)
        self._timer.timeout.connect(self._due)
        self._generation = 0
        self._values: dict | None = None
        self._job: _Job | None = None
        self._due_now = False  # the debounce is over and the evaluation waits for the running job to stop
        self._comparison: tuple[dict, list[float]] | None = None

    def request(self, values: dict) -> None:
        self._values = values
        self._generation += 1
        job = self._job
        if job is not None:
            job.stop.set()  # what it solves is stale now, or it would hold up the edit's answer
            if job.comparison is not None and self._comparison is None:
                self._comparison = job.comparison
        self._timer.start()

    def compare(self, values: dict, temperatures: list[float]) -> None:
        """Work out the soak of the plan ``values`` at each of ``temperatures`` [K] once no evaluation is running
        or due; :attr:`compared` tells the answer. Replaces a comparison still waiting."""
        self._comparison = (values, list(temperatures))
        self._next()

    def idle(self) -> bool:
        """Nothing running and nothing waiting to run."""
        return self._job is None and not self._timer.isActive() and not self._due_now and self._comparison is None

    def _due(self) -> None:
        self._due_now = True
        self._next()

    def _next(self) -> None:
        """Start what waits when the worker is free: the evaluation first, then a comparison."""
        if self._job is not None or self._timer.isActive():
            return
        if self._due_now:
            self._due_now = False
            self.busy.emit()
            values = self._values
            self._start(_Job(lambda: evaluate(values), self._signals, generation=self._generation))
        elif self._comparison is not None:
            comparison, self._comparison = self._comparison, None
            self._start(_Job(lambda: compare_temperatures(*comparison), self._signals, comparison=comparison))

    def _start(self, job: _Job) -> None:
        self._job = job
        job.setAutoDelete(False)
        self._pool.start(job)

    def _done(self, job: _Job, answer, error) -> None:
        self._job = None
        stopped = isinstance(error, Stopped)
        if job.comparison is not None and not stopped:
            if self._comparison is job.comparison:
                self._comparison = None  # (put back by an edit that came as it finished)
            self.compared.emit(job.comparison[0], answer, error)
        elif job.comparison is None and not stopped and job.generation == self._generation:
            if error is None:
                self._comparison = None  # of the result before: the new result's is asked for when it is shown
                self.finished.emit(answer)
            else:
                self.failed.emit(error)
        self._next()

    def wait(self) -> None:
        """Stop any running job and wait until the worker is idle (for shutting down): never longer than a step."""
        self._timer.stop()
        self._due_now = False
        self._comparison = None
        if self._job is not None:
            self._job.stop.set()
        self._pool.waitForDone()
