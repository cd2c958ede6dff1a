"""Root finding for the inverse problems: the small, well-tested routines every planner shares.

* :func:`illinois` — a bracketed root of a scalar function (regula falsi, Illinois variant);
* :func:`secant_on_squares` — where to stop a stage so that the case *at the end of the cycle* lands
  on a target, when later stages (a drop, an equalize) add depth nearly in quadrature;
* :func:`illinois_steps`, :func:`secant_on_squares_steps`, :func:`bracket_and_solve_steps` — the same searches
  for trials that are generators, so that a planner can hand its work out and several planners' work be done
  together (:mod:`casedepth.numerics.searches`);
* :func:`bracket_and_solve` — a root of a rising function from a first guess, no bracket known.
"""

from __future__ import annotations

import math  # noqa: F401 (the example below uses it)
from typing import Any, Callable, Generator

from .. import formats
from ..errors import SolverError
from .budget import check


def _at_once(value):
    """A generator that returns ``value`` without yielding: a plain function's result in a generator search."""
    return value
    yield  # pragma: no cover (makes this a generator)


def _run(steps):
    """The result of a generator search that never yields (its trials are plain functions)."""
    try:
        next(steps)
    except StopIteration as stop:
        return stop.value
    raise RuntimeError("a search with plain trials asked for work")  # pragma: no cover


def illinois(f: Callable[[float], float], a: float, fa: float, b: float, fb: float, xtol: float, ftol: float) -> float:
    """A root of ``f`` between ``a`` and ``b``, where ``fa = f(a)`` and ``fb = f(b)`` have opposite signs.

    Regula falsi with the Illinois modification (the end kept twice has its value halved), which
    keeps the bracket and converges superlinearly; stops when |f| ≤ ``ftol`` or the bracket is
    narrower than ``xtol``.

    Examples
    --------
    >>> round(illinois(lambda x: x * x - 2.0, 1.0, -1.0, 2.0, 2.0, 1e-12, 1e-12), 10)
    1.4142135624

    References
    ----------
    .. [1] Dowell, M., and P. Jarratt. "A modified regula falsi method for computing the root of an
       equation." BIT Numerical Mathematics 11 (1971): 168–174.
    """
    return _run(illinois_steps(lambda x: _at_once(f(x)), a, fa, b, fb, xtol, ftol))


def illinois_steps(f: Callable[[float], Generator[Any, Any, float]], a: float, fa: float, b: float, fb: float,
                   xtol: float, ftol: float):
    """:func:`illinois` for an ``f`` that is itself a generator (see :func:`secant_on_squares_steps`): a generator
    yielding f's requests and returning the root; the one copy of the search."""
    if fa == 0.0:
        return a
    if fb == 0.0:
        return b
    if not (fa * fb < 0):
        raise SolverError(f"the root is not bracketed between {a:g} and {b:g}")
    side, x = 0, b
    for _ in range(200):
        check()
        x = (fa * b - fb * a) / (fa - fb)
        fx = yield from f(x)
        if abs(fx) <= ftol or abs(b - a) <= xtol:
            return x
        if fx * fb > 0:  # same side as b: move b, and halve the stale end if it was kept twice
            b, fb = x, fx
            if side == -1:
                fa *= 0.5
            side = -1
        else:
            a, fa = x, fx
            if side == 1:
                fb *= 0.5
            side = 1
    return x


def secant_on_squares(trial: Callable[[float], tuple[float, float, Any]], goal: float, offset: float,
                      floor: float, ceiling: float, rtol: float, tries: int = 12) -> tuple[Any, float]:
    """Where to stop a stage so that the final depth is ``goal`` [m], when what follows adds depth
    nearly in quadrature: final² ≈ stop² + c, with c varying slowly.

    ``trial(x)`` stops the stage where the depth² is ``x`` [m²] (or as near as it can: not below
    ``floor``, the depth² the stage starts at) and returns ``(final depth, depth² it stopped at,
    payload)``. A secant on (stop², final²) starts from ``x = goal² − offset`` (``offset`` is c of an
    earlier, similar search: most searches then land in one or two trials) and stops when the final
    depth is within ``rtol`` of the goal, or when the stage cannot stop earlier and the final depth is
    already past the goal. Returns the payload of the last trial and its c, for the next search.

    Examples
    --------
    >>> payload, c = secant_on_squares(lambda x: (math.sqrt(x + 0.3), x, "stop at %.4f" % x), 1.0, 0.0,
    ...                                0.0, 4.0, 1e-9)
    >>> payload, round(c, 6)
    ('stop at 0.7000', 0.3)
    """
    return _run(secant_on_squares_steps(lambda x: _at_once(trial(x)), goal, offset, floor, ceiling, rtol, tries))


def secant_on_squares_steps(trial: Callable[[float], Generator[Any, Any, tuple[float, float, Any]]], goal: float,
                            offset: float, floor: float, ceiling: float, rtol: float, tries: int = 12):
    """:func:`secant_on_squares` for a ``trial`` that is itself a generator (it yields the work it needs done, and
    returns what ``trial`` returns there): a generator yielding the trials' requests and returning (payload, c); the
    one copy of the search. A planner written with it runs alone or with others whose requests are served together
    (:mod:`casedepth.numerics.searches`), taking the same trials either way."""
    x = min(max(goal**2 - offset, floor), ceiling)
    previous = None
    for _ in range(tries):
        final, used, payload = yield from trial(x)
        offset = final**2 - used
        if abs(final - goal) <= rtol * goal or (used <= floor * (1 + 1e-12) and final >= goal):
            return payload, offset
        slope = 1.0 if previous is None or previous[0] == used else (final**2 - previous[1]) / (used - previous[0])
        previous = (used, final**2)
        x = min(max(used + (goal**2 - final**2) / max(slope, 0.1), floor), ceiling)
    raise SolverError(f"the stop for a final depth of {formats.typed(goal * 1e3, 'mm')} did not converge in {tries} "
                      "trials")


def bracket_and_solve(f: Callable[[float], float], x: float, lowest: float, highest: float, xtol: float, ftol: float,
                      too_high: Callable[[], Exception], too_low: Callable[[], Exception]) -> float:
    """A root of ``f``, which rises with its argument, from a first guess ``x`` in [``lowest``, ``highest``]: secant
    steps (overshooting by 30 %, each within a factor of 3, so the root is soon bracketed) until the signs differ, then
    :func:`illinois`. Raises ``too_high()`` when ``f`` is still negative beyond ``highest``, ``too_low()`` when it is
    not negative even at ``lowest``.

    Examples
    --------
    >>> round(bracket_and_solve(lambda t: t * t - 2.0, 10.0, 0.0, 100.0, 1e-12, 1e-12, ValueError, ValueError), 9)
    1.414213562
    """
    return _run(bracket_and_solve_steps(lambda t: _at_once(f(t)), x, lowest, highest, xtol, ftol, too_high, too_low))


def bracket_and_solve_steps(f: Callable[[float], Generator[Any, Any, float]], x: float, lowest: float, highest: float,
                            xtol: float, ftol: float, too_high: Callable[[], Exception],
                            too_low: Callable[[], Exception]):
    """:func:`bracket_and_solve` for an ``f`` that is itself a generator (see :func:`secant_on_squares_steps`): a
    generator yielding f's requests and returning the root; the one copy of the search."""
    fx = yield from f(x)
    if abs(fx) <= ftol:
        return x
    low = high = previous = None
    while True:
        check()
        if fx < 0.0:
            low, f_low = x, fx
        else:
            high, f_high = x, fx
        if low is not None and high is not None:
            return (yield from illinois_steps(f, low, f_low, high, f_high, xtol, ftol))
        if fx < 0.0 and x > highest:
            raise too_high()
        if fx >= 0.0 and x <= lowest:
            raise too_low()
        if previous is None or fx == previous[1]:
            step = 0.05 * x if fx < 0.0 else -0.05 * x
        else:
            step = 1.3 * (x - previous[0]) * -fx / (fx - previous[1])
        previous = (x, fx)
        x = min(max(x + step, x / 3.0), 3.0 * x)
        x = x if x > lowest + xtol else lowest
        fx = yield from f(x)
