"""Searches written once, run alone or several together.

A planner's search (a root search whose every trial runs a costly piece of a furnace cycle: the drop and equalize
after a trial stop) is written as a generator: where it needs such a piece run it yields a request, and is sent
what the piece gave. :func:`alone` serves each request at once, which is the plan's own evaluation. :func:`together`
runs several searches side by side and serves each round's requests in one call, which can march them in one batch
(:mod:`casedepth.numerics.batch`). Every search takes the very trials it takes alone, so its numbers are the same to
round-off. An error serving a request is raised inside its search, where the trial would have raised it.
"""

from __future__ import annotations

from collections.abc import Callable, Generator, Sequence
from typing import Any

from ..errors import CasedepthError
from .budget import check


def alone(steps: Generator, serve: Callable[[Any], Any]) -> Any:
    """Run the search ``steps``, each request served at once by ``serve(request)``; what the search returns."""
    try:
        request = next(steps)
        while True:
            try:
                result = serve(request)
            except CasedepthError as error:
                request = steps.throw(error)
                continue
            request = steps.send(result)
    except StopIteration as stop:
        return stop.value


def together(searches: Sequence[Generator], serve_many: Callable[[list[int], list[Any]], list[Any]]) -> list[Any]:
    """Run several searches side by side: each round, ``serve_many(keys, requests)`` serves the requests of the open
    searches (``keys``: their places in ``searches``) and returns for each what it gave, or the
    :class:`CasedepthError` serving it raised. Returns what each search returns, or the :class:`CasedepthError` it
    raises."""
    out: list[Any] = [None] * len(searches)
    pending: dict[int, Any] = {}

    def resume(k: int, step: Callable[[Any], Any], value: Any) -> None:
        try:
            pending[k] = step(value)
        except StopIteration as stop:
            out[k] = stop.value
        except CasedepthError as error:
            out[k] = error

    for k, steps in enumerate(searches):
        resume(k, steps.send, None)
    while pending:
        check()
        keys = list(pending)
        results = serve_many(keys, [pending.pop(k) for k in keys])
        for k, result in zip(keys, results):
            steps = searches[k]
            resume(k, steps.throw if isinstance(result, CasedepthError) else steps.send, result)
    return out
