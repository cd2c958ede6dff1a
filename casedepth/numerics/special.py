"""The few special functions the models use, written out so that a solve does not import ``scipy.special``.

* :func:`bessel_j` — the Bessel functions J0 and J1 (cylinders: quench cooling, hardenability);
* :func:`bessel_zeros` — their positive zeros;
* :func:`erfc` and :func:`erfcx` — the complementary error function and its scaled form
  exp(x²)·erfc(x) (surface-evaporation solutions, the short-time quench).

Each is accurate to a few units in the last place over the arguments the models use; the tests compare
them with SciPy's. Importing ``scipy.special`` costs about a tenth of a second at every start of the
program, for a handful of calls.
"""

from __future__ import annotations

import math

import numpy as np

_SQRT_PI = math.sqrt(math.pi)


#: above this |x| the Hankel expansion is used; below it the trapezoidal rule needs at most 43 intervals
_HANKEL_FROM = 25.0
_HANKEL_TERMS = 24


def _hankel_coefficients(order: int) -> np.ndarray:
    """a_k(ν) = (4ν² − 1²)(4ν² − 3²)…(4ν² − (2k − 1)²) / (k! 8^k), k = 0 … _HANKEL_TERMS (A&S 9.2.9–9.2.10)."""
    mu = 4.0 * order * order
    a = [1.0]
    for k in range(1, _HANKEL_TERMS + 1):
        a.append(a[-1] * (mu - (2 * k - 1) ** 2) / (k * 8.0))
    return np.array(a)


_HANKEL = {order: _hankel_coefficients(order) for order in (0, 1)}


def _bessel_hankel(order: int, x: np.ndarray) -> np.ndarray:
    """J_ν(x) for x ≥ 25 from Hankel's asymptotic expansion (Abramowitz & Stegun 1964, 9.2.5):
    √(2/(πx)) [P cos χ − Q sin χ], χ = x − (ν/2 + ¼)π, the series P and Q in 1/x cut after 24 terms, whose
    last is below 1e-17 at x = 25."""
    a = _HANKEL[order]
    inverse = 1.0 / x
    # P = Σ_k (−1)^k a_2k / x^2k and Q = Σ_k (−1)^k a_(2k+1) / x^(2k+1), by Horner's rule in 1/x²
    inverse2 = inverse * inverse
    p = np.zeros_like(x)
    q = np.zeros_like(x)
    for k in range(_HANKEL_TERMS // 2, -1, -1):
        sign = -1.0 if k % 2 else 1.0
        p = p * inverse2 + sign * a[2 * k]
        if 2 * k + 1 <= _HANKEL_TERMS:
            q = q * inverse2 + sign * a[2 * k + 1]
    q *= inverse
    chi = x - (0.5 * order + 0.25) * math.pi
    return np.sqrt(2.0 / (math.pi * x)) * (p * np.cos(chi) - q * np.sin(chi))


def _bessel_integral(order: int, x: np.ndarray) -> np.ndarray:
    """J_ν(x) from Bessel's integral by the trapezoidal rule (see :func:`bessel_j`)."""
    largest = float(np.max(np.abs(x))) if x.size else 0.0
    intervals = math.ceil(0.75 * largest) + 24
    tau = np.linspace(0.0, math.pi, intervals + 1)
    weights = np.full(intervals + 1, 1.0 / intervals)
    weights[[0, -1]] *= 0.5
    phase = np.multiply.outer(x, np.sin(tau))
    np.subtract(order * tau, phase, out=phase)
    np.cos(phase, out=phase)
    return phase @ weights


def bessel_j(order: int, x) -> np.ndarray:
    r"""The Bessel function of the first kind J0 or J1 at ``x`` (any real array).

    .. math::
        J_n(x) = \frac{1}{\pi}\int_0^\pi \cos(n\tau - x\sin\tau)\,d\tau

    For |x| ≤ 25, Bessel's integral (Abramowitz & Stegun 1964, 9.1.21) by the trapezoidal rule: the
    integrand is periodic and smooth, so the rule converges geometrically (Trefethen & Weideman 2014); with M
    intervals its error is that of the aliased terms J_{2M±n}(x), below 1e-16 once M exceeds e|x|/4 by a
    margin. Beyond, Hankel's asymptotic expansion (9.2.5), which is cheaper there and as accurate.

    Parameters
    ----------
    order : int
        0 or 1.
    x : float or array
        Argument, [-]

    Examples
    --------
    >>> abs(float(bessel_j(0, 2.404825557695773))) < 1e-15
    True
    >>> round(float(bessel_j(1, 1.0)), 12)
    0.440050585745

    References
    ----------
    .. [1] Abramowitz, M., and I. A. Stegun. Handbook of Mathematical Functions. National Bureau of
       Standards, 1964, 9.1.21 and 9.2.5.
    .. [2] Trefethen, L. N., and J. A. C. Weideman. "The exponentially convergent trapezoidal rule."
       SIAM Review 56 (2014): 385–458.
    """
    if order not in (0, 1):
        raise ValueError("bessel_j: order 0 or 1")
    x = np.asarray(x, dtype=float)
    size = np.abs(x)
    far = size > _HANKEL_FROM
    if not far.any():
        return _bessel_integral(order, x)
    out = np.empty_like(x)
    out[~far] = _bessel_integral(order, x[~far])
    values = _bessel_hankel(order, size[far])
    out[far] = values if order == 0 else np.sign(x[far]) * values  # J0 is even, J1 odd
    return out


def bessel_zeros(order: int, count: int) -> np.ndarray:
    """The first ``count`` positive zeros of J0 or J1: McMahon's expansion (Abramowitz & Stegun 1964,
    9.5.12) polished by Newton's method on :func:`bessel_j`, to about 1e-15.

    >>> [round(float(z), 6) for z in bessel_zeros(0, 3)]
    [2.404826, 5.520078, 8.653728]
    """
    s = np.arange(1, count + 1, dtype=float)
    beta = (s + 0.5 * order - 0.25) * math.pi
    mu = 4.0 * order * order
    z = beta - (mu - 1.0) / (8.0 * beta) - 4.0 * (mu - 1.0) * (7.0 * mu - 31.0) / (3.0 * (8.0 * beta) ** 3)
    for _ in range(8):
        value = bessel_j(order, z)
        slope = -bessel_j(1, z) if order == 0 else bessel_j(0, z) - bessel_j(1, z) / z
        step = value / slope
        z = z - step
        if np.all(np.abs(step) <= 1e-15 * z):
            break
    return z


_erfc = np.frompyfunc(math.erfc, 1, 1)


def erfc(x) -> np.ndarray:
    """The complementary error function of an array (the standard library's, element by element)."""
    return np.asarray(_erfc(np.asarray(x, dtype=float)), dtype=float)


def _erfcx_one(x: float) -> float:
    """exp(x²)·erfc(x) for one x: the product below 26, where erfc has not yet underflowed, else
    the asymptotic series (Abramowitz & Stegun 1964, 7.1.23), whose 7th term is below 1e-17 there."""
    if x < 0.0:
        return 2.0 * math.exp(x * x) - _erfcx_one(-x)
    if x < 26.0:
        return math.exp(x * x) * math.erfc(x)
    inverse = 1.0 / (2.0 * x * x)
    term, total = 1.0, 1.0
    for k in range(1, 7):
        term *= -(2 * k - 1) * inverse
        total += term
    return total / (x * _SQRT_PI)


_erfcx = np.frompyfunc(_erfcx_one, 1, 1)


def erfcx(x):
    """The scaled complementary error function exp(x²)·erfc(x), for a number or an array.

    >>> round(erfcx(1.0), 10)
    0.4275835762
    """
    if isinstance(x, float):  # numpy's float64 too
        return _erfcx_one(float(x))
    if not isinstance(x, np.ndarray) and np.ndim(x) == 0:
        return _erfcx_one(float(x))
    return np.asarray(_erfcx(np.asarray(x, dtype=float)), dtype=float)
