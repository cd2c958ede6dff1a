"""Solving off the window's thread: debounced, coalesced, newest request wins, stale work stopped.

Work of two sorts shares the one worker thread: the plan's evaluation, which every edit asks for, and side work
a page asks for only while it is shown (:data:`SIDE_WORK`): the plan at other temperatures
(:func:`casedepth.plan.compare_temperatures`, the Temperatures tab) and the spread of a load
(:func:`casedepth.shop.capability.capability`, the Load spread tab). The evaluation goes first: side work waits
for it, and an edit stops side work that is running (the edit's answer is what the planner waits for); the
stopped work runs again after the evaluation unless the new result asks for its own (a refused edit leaves the
last result, and its side work, on show).
"""

from __future__ import annotations

import threading
from collections.abc import Callable

from PySide6.QtCore import QObject, QRunnable, QThreadPool, QTimer, Signal

from ..numerics.budget import Stopped, stoppable
from ..plan.evaluate import compare_temperatures, evaluate
from ..shop.capability import capability

#: the side work pages ask for: kind -> (the signal of :class:`Calculator` that tells the answer, the work). The
#: work looks its function up when it runs (so a test can stand in for it).
SIDE_WORK: dict[str, tuple[str, Callable[..., object]]] = {
    "comparison": ("compared", lambda values, temperatures: compare_temperatures(values, temperatures)),
    "capability": ("capability_known", lambda values, spread: capability(values, spread, optimize=None)),
}


class _Signals(QObject):
    done = Signal(object, object, object)  # the job, its answer or None, error or None


class _Job(QRunnable):
    """One piece of work for the worker thread, stoppable from the window's thread: ``work()`` for the evaluation
    of ``generation``, or for ``side`` work (its kind in :data:`SIDE_WORK` and its arguments, the plan's values
    first)."""

    def __init__(self, work: Callable[[], object], signals: _Signals, generation: int = 0,
                 side: tuple[str, tuple] | None = None):
        super().__init__()
        self.work, self.signals, self.generation, self.side = work, signals, generation, side
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
    """Runs :func:`casedepth.plan.evaluate` on a worker thread, and the side work of :data:`SIDE_WORK` when asked.

    :meth:`request` may be called on every keystroke: the work starts ``delay_ms`` after the last
    request, at most one job runs at a time, a running job a newer request makes stale is stopped at its
    next solver step, and only the newest request's answer is reported. :meth:`compare` and
    :meth:`work_out_capability` wait until no evaluation is running or due; a new result drops them (whoever
    wants the side work of the new result asks for it when it is shown).
    """

    busy = Signal()
    finished = Signal(object)  # Outcome
    failed = Signal(object)  # the exception
    compared = Signal(object, object, object)  # the values compared, (temperature, soak) pairs or None, error
    capability_known = Signal(object, object, object)  # the values, their Capability or None, error

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
        self._side: dict[str, tuple] = {}  # side work waiting: kind -> arguments

    def request(self, values: dict) -> None:
        self._values = values
        self._generation += 1
        job = self._job
        if job is not None:
            job.stop.set()  # what it solves is stale now, or it would hold up the edit's answer
            if job.side is not None:
                self._side.setdefault(*job.side)
        self._timer.start()

    def compare(self, values: dict, temperatures: list[float]) -> None:
        """Work out the soak of the plan ``values`` at each of ``temperatures`` [K] once no evaluation is running
        or due; :attr:`compared` tells the answer. Replaces a comparison still waiting."""
        self._ask("comparison", values, list(temperatures))

    def work_out_capability(self, values: dict, spread) -> None:
        """Work out how a load of the plan ``values`` spreads with ``spread`` (a
        :class:`~casedepth.shop.capability.Spread`) once no evaluation is running or due; :attr:`capability_known`
        tells the answer. Replaces one still waiting."""
        self._ask("capability", values, spread)

    def _ask(self, kind: str, *arguments) -> None:
        self._side[kind] = arguments
        self._next()

    def idle(self) -> bool:
        """Nothing running and nothing waiting to run."""
        return self._job is None and not self._timer.isActive() and not self._due_now and not self._side

    def _due(self) -> None:
        self._due_now = True
        self._next()

    def _next(self) -> None:
        """Start what waits when the worker is free: the evaluation first, then side work in the order asked."""
        if self._job is not None or self._timer.isActive():
            return
        if self._due_now:
            self._due_now = False
            self.busy.emit()
            values = self._values
            self._start(_Job(lambda: evaluate(values), self._signals, generation=self._generation))
        elif self._side:
            kind = next(iter(self._side))
            arguments = self._side.pop(kind)
            work = SIDE_WORK[kind][1]
            self._start(_Job(lambda: work(*arguments), self._signals, side=(kind, arguments)))

    def _start(self, job: _Job) -> None:
        self._job = job
        job.setAutoDelete(False)
        self._pool.start(job)

    def _done(self, job: _Job, answer, error) -> None:
        self._job = None
        stopped = isinstance(error, Stopped)
        if job.side is not None and not stopped:
            kind, arguments = job.side
            if self._side.get(kind) is arguments:
                del self._side[kind]  # (put back by an edit that came as it finished)
            getattr(self, SIDE_WORK[kind][0]).emit(arguments[0], answer, error)
        elif job.side is None and not stopped and job.generation == self._generation:
            if error is None:
                self._side.clear()  # of the result before: the new result's is asked for when it is shown
                self.finished.emit(answer)
            else:
                self.failed.emit(error)
        self._next()

    def wait(self) -> None:
        """Stop any running job and wait until the worker is idle (for shutting down): never longer than a step."""
        self._timer.stop()
        self._due_now = False
        self._side.clear()
        if self._job is not None:
            self._job.stop.set()
        self._pool.waitForDone()
