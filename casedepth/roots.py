"""Root finding for the inverse problems: one small, well-tested routine shared by all of them."""

from __future__ import annotations

from typing import Callable


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
    if fa == 0.0:
        return a
    if fb == 0.0:
        return b
    if fa * fb > 0:
        raise ValueError("the root is not bracketed")
    side, x = 0, b
    for _ in range(200):
        x = (fa * b - fb * a) / (fa - fb)
        fx = f(x)
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
