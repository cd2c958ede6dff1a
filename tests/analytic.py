"""Analytic reference solutions for constant-diffusivity diffusion into a body.

These are independent references for testing the numerical solver in ``casedepth``; this
module deliberately imports nothing from ``casedepth``.

Conventions
-----------
* SI units: lengths in m, times in s, diffusivity ``D`` in m^2/s, mass-transfer
  coefficient ``beta`` in m/s.
* The body starts at a uniform concentration ``C0``; the surface is held at (or, with a
  mass-transfer boundary, exchanges towards) the value ``Cs``. Every profile function returns
  the dimensionless fraction ``F = (C - C0) / (Cs - C0)``, which lies in ``[0, 1]``.
* ``x`` is always the depth below the carburized surface: ``r = radius - x`` for a cylinder
  or sphere, and ``z = half_thickness - x`` for a plane sheet (``z`` measured from the
  mid-plane, as in Crank's sheet solutions).
* ``x`` and ``t`` broadcast against each other; a 0-d result is returned as a ``float``.
* Mass-transfer boundary: ``-D dC/dx = beta (Cs - C)`` at ``x = 0``, with ``h = beta / D``
  (Crank's notation) and ``L = radius * beta / D`` for the cylinder. ``beta = inf`` means the
  surface is held at ``Cs``.

Accuracy
--------
Series are truncated where the first omitted eigen-term carries the factor
``exp(-lambda^2 D t / a^2) <= exp(-45) ~ 3e-20``, or where the first omitted image term is
below ``erfc(6.5) ~ 4e-20``. The remaining tails decay at least geometrically, so truncation
error is below 1e-15 in F for every ``D t / a^2`` the functions accept. Rounding, not
truncation, sets the accuracy: about 1e-14 absolute in F (tested against independent
representations and invariants in ``test_analytic.py``). Eigen-series need about
``sqrt(45 / tau) / pi`` terms (``tau = D t / a^2``): about 215 at ``tau = 1e-4`` and 2 140 at
``tau = 1e-6``. Where
an exact image (erfc) form exists (plane sheet, sphere) it is used for small ``tau``, so those
functions need at most a handful of terms at any time. The cylinder has no exact image
form, so its Bessel series is summed with as many terms as needed, up to ``_MAX_TERMS``
(``tau >~ 2e-9``); below that a ``ValueError`` is raised.

References
----------
J. Crank, *The Mathematics of Diffusion*, 2nd ed., Oxford: Clarendon Press, 1975.
H. S. Carslaw and J. C. Jaeger, *Conduction of Heat in Solids*, 2nd ed., Oxford: Clarendon
Press, 1959.
M. Abramowitz and I. A. Stegun (eds.), *Handbook of Mathematical Functions*, Washington:
National Bureau of Standards, 1964.

Equation numbers of Crank (1975) and section numbers of Carslaw & Jaeger (1959) are quoted
from memory where marked; every formula is nevertheless checked in ``test_analytic.py``
against the diffusion equation, its boundary condition and the published uptake series.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable

import numpy as np
from scipy import optimize, special

__all__ = [
    "erfc_plane",
    "evaporation_plane",
    "slab_dirichlet",
    "cylinder_dirichlet",
    "cylinder_evaporation",
    "sphere_dirichlet",
    "evaporation_plane_uptake",
    "slab_uptake",
    "cylinder_uptake",
    "cylinder_evaporation_uptake",
    "sphere_uptake",
    "cylinder_evaporation_roots",
    "depth_at",
    "time_to_depth",
]

_TAIL_EXPONENT = 45.0  # exp(-45) ~ 2.9e-20: smallest kept decay factor of an eigen-term
_IMAGE_ARGUMENT = 6.5  # erfc(6.5) ~ 3.8e-20: smallest kept image term
_MAX_TERMS = 50_000  # about tau >= 1.8e-9 for the Bessel series
_BLOCK = 1_000_000  # points x terms per block, bounds the temporary arrays to ~8 MB each
_SLAB_IMAGE_TAU = 1.0  # at or below: erfc images (<= 8 terms); above: Fourier (<= 4 terms)
_SPHERE_IMAGE_TAU = 0.01  # at or below: erfc images (2 terms); above: Fourier (<= 23 terms)
_SPHERE_CENTRE_RHO = 1e-8  # below this r/a the image form is replaced by its r -> 0 limit
_EPS = np.finfo(float).eps


# ----------------------------------------------------------------------------- helpers


def _positive(name: str, value: float) -> float:
    value = float(value)
    if not (value > 0.0 and math.isfinite(value)):
        raise ValueError(f"{name} must be a positive finite number, got {value!r}")
    return value


def _depth_and_time(x, t, x_max: float = math.inf):
    """Broadcast ``x`` and ``t`` to float arrays and check 0 <= x <= x_max, t > 0."""
    x, t = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(t, dtype=float))
    if not np.all(t > 0.0) or not np.all(np.isfinite(t)):
        raise ValueError("t must be positive and finite")
    # A relative slack lets callers pass x = radius computed with rounding error.
    if np.any(np.isnan(x)) or np.any(x < 0.0) or np.any(x > x_max * (1.0 + 1e-12)):
        raise ValueError(f"x must lie in [0, {x_max}]")
    return np.minimum(x, x_max), t


def _result(values: np.ndarray):
    return float(values) if np.ndim(values) == 0 else values


def _blocks(n_points: int, n_terms: int):
    step = max(1, _BLOCK // max(1, n_terms))
    for start in range(0, n_points, step):
        yield slice(start, min(start + step, n_points))


def _eigen_terms(tau_min: float, first_root: float, spacing: float) -> int:
    """Terms needed so the first omitted root lambda has lambda^2 tau_min >= _TAIL_EXPONENT.

    Roots are assumed to grow no slower than ``first_root + spacing * (n - 1)``.
    """
    lam = math.sqrt(_TAIL_EXPONENT / tau_min)
    n = max(1, math.ceil((lam - first_root) / spacing) + 2)
    if n > _MAX_TERMS:
        raise ValueError(
            f"D t / a^2 = {tau_min:.3g} needs {n} series terms (limit {_MAX_TERMS}); "
            "at such short times use erfc_plane instead")
    return n


@functools.lru_cache(maxsize=16)
def _j0_zeros(n: int) -> np.ndarray:
    zeros = special.jn_zeros(0, n)
    zeros.setflags(write=False)
    return zeros


# ----------------------------------------------------------------------- semi-infinite


def erfc_plane(x, t, D):
    """Semi-infinite medium, surface held at ``Cs``.

    ``F = erfc(x / (2 sqrt(D t)))``.

    Crank (1975), ch. 2, section 2.3 (semi-infinite medium), eq. (2.45) (from memory);
    Carslaw & Jaeger (1959), section 2.4 (from memory).

    Parameters
    ----------
    x : array_like
        Depth below the surface, [m], ``>= 0``.
    t : array_like
        Time since the surface was brought to ``Cs``, [s], ``> 0``.
    D : float
        Diffusivity, [m^2/s].

    Returns
    -------
    float or numpy.ndarray
        ``F = (C - C0) / (Cs - C0)``.
    """
    D = _positive("D", D)
    x, t = _depth_and_time(x, t)
    return _result(special.erfc(x / (2.0 * np.sqrt(D * t))))


def evaporation_plane(x, t, D, beta):
    """Semi-infinite medium with a mass-transfer ("surface evaporation") boundary.

    Boundary condition ``-D dC/dx = beta (Cs - C)`` at ``x = 0``. With ``h = beta / D`` and
    ``u = x / (2 sqrt(D t))``::

        F = erfc(u) - exp(h x + h^2 D t) erfc(u + h sqrt(D t)).

    Crank (1975), ch. 3, section 3.3 (surface evaporation), eq. (3.35) (from memory);
    Carslaw & Jaeger (1959), section 2.7, eq. (1) (from memory).

    The product ``exp(h x + h^2 D t) erfc(u + h sqrt(D t))`` overflows times underflows for
    large arguments; it equals ``exp(-u^2) erfcx(u + h sqrt(D t))`` exactly, because
    ``(u + h sqrt(D t))^2 = u^2 + h x + h^2 D t``, and that form is used.

    Parameters
    ----------
    x : array_like
        Depth below the surface, [m], ``>= 0``.
    t : array_like
        Time, [s], ``> 0``.
    D : float
        Diffusivity, [m^2/s].
    beta : float
        Mass-transfer coefficient, [m/s], ``>= 0``. ``inf`` gives :func:`erfc_plane`;
        ``0`` gives ``F = 0``.

    Returns
    -------
    float or numpy.ndarray
        ``F = (C - C0) / (Cs - C0)``.
    """
    D = _positive("D", D)
    beta = float(beta)
    if not beta >= 0.0:
        raise ValueError(f"beta must be >= 0, got {beta!r}")
    if math.isinf(beta):
        return erfc_plane(x, t, D)
    x, t = _depth_and_time(x, t)
    u = x / (2.0 * np.sqrt(D * t))
    k = beta * np.sqrt(t / D)  # h sqrt(D t)
    return _result(special.erfc(u) - np.exp(-u * u) * special.erfcx(u + k))


def evaporation_plane_uptake(t, D, beta):
    """Carbon taken up per unit surface by :func:`evaporation_plane`, over ``Cs - C0``, [m].

    ``M_t / (Cs - C0) = (1/h) [exp(h^2 D t) erfc(h sqrt(D t)) - 1 + 2 h sqrt(D t / pi)]``
    with ``h = beta / D``.

    Crank (1975), ch. 3, section 3.3, eq. (3.37) (from memory). For ``beta = inf`` it is
    ``2 sqrt(D t / pi)``, Crank (1975) ch. 2, eq. (2.48) (from memory).

    ``exp(k^2) erfc(k)`` is evaluated as ``erfcx(k)``; for ``k = h sqrt(D t) < 0.5`` the
    bracket loses digits to cancellation, so its Taylor series
    ``sum_{n>=2} (-k)^n / Gamma(n/2 + 1)`` is summed instead (A&S 1964, eq. 7.1.8 with
    ``erfcx(k) = w(i k)``, from memory).

    Parameters
    ----------
    t : array_like
        Time, [s], ``> 0``.
    D : float
        Diffusivity, [m^2/s].
    beta : float
        Mass-transfer coefficient, [m/s], ``>= 0``; ``inf`` allowed.

    Returns
    -------
    float or numpy.ndarray
        Uptake per unit surface area divided by ``Cs - C0``, [m].
    """
    D = _positive("D", D)
    beta = float(beta)
    if not beta >= 0.0:
        raise ValueError(f"beta must be >= 0, got {beta!r}")
    _, t = _depth_and_time(0.0, t)
    if math.isinf(beta):
        return _result(2.0 * np.sqrt(D * t / np.pi))
    if beta == 0.0:
        return _result(np.zeros_like(t))
    h = beta / D
    k = np.atleast_1d(h * np.sqrt(D * t))
    bracket = special.erfcx(k) - 1.0 + 2.0 * k / np.sqrt(np.pi)
    small = k < 0.5
    if np.any(small):
        n = np.arange(2, 40)
        bracket[small] = np.sum((-k[small, None]) ** n / special.gamma(n / 2.0 + 1.0), axis=1)
    return _result((bracket / h).reshape(t.shape))


# --------------------------------------------------------------------------- plane sheet


def _slab_fourier(xi, tau, n_terms: int | None = None):
    """Crank eq. (4.17) at depth ``xi = x / l``, ``tau = D t / l^2``, ``0 <= xi <= 1``.

    With ``z = l - x`` and ``k = 2n + 1``:
    ``(-1)^n cos(k pi z / 2l) = sin(k pi xi / 2)``, which makes ``F(0) = 1`` exact.
    """
    xi, tau = np.broadcast_arrays(np.asarray(xi, float), np.asarray(tau, float))
    shape = xi.shape
    xi, tau = xi.ravel(), tau.ravel()
    if n_terms is None:
        n_terms = _eigen_terms(float(tau.min()), math.pi / 2.0, math.pi) if tau.size else 1
    k = 2.0 * np.arange(n_terms) + 1.0
    decay_rate = (k * np.pi / 2.0) ** 2
    out = np.empty_like(xi)
    for s in _blocks(xi.size, n_terms):
        terms = np.sin(0.5 * np.pi * np.outer(xi[s], k)) * np.exp(-np.outer(tau[s], decay_rate)) / k
        out[s] = 1.0 - (4.0 / np.pi) * terms.sum(axis=1)
    return out.reshape(shape)


def _slab_images(xi, tau, n_terms: int | None = None):
    """Erfc (image) series of the sheet problem at depth ``xi = x / l``, ``0 <= xi <= 1``.

    ``F = sum_n (-1)^n [erfc((2n + xi) / 2 sqrt(tau)) + erfc((2n + 2 - xi) / 2 sqrt(tau))]``,
    Crank (1975) eq. (4.15) (from memory), rewritten for the depth from the face.
    The terms alternate and shrink, so the error is below the first omitted one,
    ``<= 2 erfc(N / sqrt(tau))``.
    """
    xi, tau = np.broadcast_arrays(np.asarray(xi, float), np.asarray(tau, float))
    shape = xi.shape
    xi, tau = xi.ravel(), tau.ravel()
    if n_terms is None:
        n_terms = math.ceil(_IMAGE_ARGUMENT * math.sqrt(float(tau.max()))) + 1 if tau.size else 1
    n = np.arange(n_terms, dtype=float)
    sign = np.where(n % 2 == 0, 1.0, -1.0)
    out = np.empty_like(xi)
    for s in _blocks(xi.size, n_terms):
        scale = 1.0 / (2.0 * np.sqrt(tau[s]))[:, None]
        near = special.erfc((2.0 * n + xi[s, None]) * scale)
        far = special.erfc((2.0 * n + 2.0 - xi[s, None]) * scale)
        out[s] = ((near + far) * sign).sum(axis=1)
    return out.reshape(shape)


def slab_dirichlet(x, t, D, half_thickness):
    """Plane sheet ``-l < z < l`` with both faces held at ``Cs``.

    ``F = 1 - (4/pi) sum_{n>=0} (-1)^n / (2n+1) exp(-D (2n+1)^2 pi^2 t / 4 l^2)
    cos((2n+1) pi z / 2l)`` with ``z = l - x``: Crank (1975), ch. 4, section 4.3, eq. (4.17);
    Carslaw & Jaeger (1959), section 3.3 (from memory).

    For ``tau = D t / l^2 <= 1`` the equivalent erfc (image) series, Crank (1975) eq. (4.15)
    (from memory), is summed instead: ``ceil(6.5 sqrt(tau)) + 1 <= 8`` terms bound the
    alternating tail by ``2 erfc(6.5) ~ 8e-20``. For ``tau > 1`` the Fourier series needs at
    most 4 terms for a tail factor below ``exp(-45)``. Both representations agree to ~1e-15
    where they overlap (tested), so the result is accurate to rounding at every ``tau``.

    Parameters
    ----------
    x : array_like
        Depth below one face, [m], ``0 <= x <= 2 l``; the profile is symmetric about the
        mid-plane ``x = l``.
    t : array_like
        Time, [s], ``> 0``.
    D : float
        Diffusivity, [m^2/s].
    half_thickness : float
        ``l``, half the sheet thickness, [m].

    Returns
    -------
    float or numpy.ndarray
        ``F = (C - C0) / (Cs - C0)``.
    """
    D = _positive("D", D)
    l = _positive("half_thickness", half_thickness)
    x, t = _depth_and_time(x, t, 2.0 * l)
    xi = np.minimum(x, 2.0 * l - x) / l
    tau = D * t / l**2
    out = np.empty(xi.shape)
    images = tau <= _SLAB_IMAGE_TAU
    if np.any(images):
        out[images] = _slab_images(xi[images], tau[images])
    if np.any(~images):
        out[~images] = _slab_fourier(xi[~images], tau[~images])
    return _result(out)


def slab_uptake(t, D, half_thickness):
    """Fractional uptake ``M_t / M_inf`` of :func:`slab_dirichlet`.

    ``M_t / M_inf = 1 - sum_{n>=0} 8 / ((2n+1)^2 pi^2) exp(-D (2n+1)^2 pi^2 t / 4 l^2)``,
    Crank (1975), ch. 4, eq. (4.18). ``M_inf = 2 l (Cs - C0)`` per unit face area of the
    whole sheet, i.e. ``l (Cs - C0)`` per unit carburized surface. Terms as for
    :func:`slab_dirichlet`'s Fourier series.
    """
    D = _positive("D", D)
    l = _positive("half_thickness", half_thickness)
    _, t = _depth_and_time(0.0, t)
    tau = (D * t / l**2).ravel()
    n_terms = _eigen_terms(float(tau.min()), math.pi / 2.0, math.pi)
    k = 2.0 * np.arange(n_terms) + 1.0
    decay_rate = (k * np.pi / 2.0) ** 2
    out = np.empty_like(tau)
    for s in _blocks(tau.size, n_terms):
        out[s] = 1.0 - (8.0 / np.pi**2) * (np.exp(-np.outer(tau[s], decay_rate)) / k**2).sum(axis=1)
    return _result(out.reshape(t.shape))


# ------------------------------------------------------------------------------ cylinder


def _cylinder_series(rho, tau, n_terms: int | None = None):
    """Crank eq. (5.22) at ``rho = r / a``, ``tau = D t / a^2``."""
    rho, tau = np.broadcast_arrays(np.asarray(rho, float), np.asarray(tau, float))
    shape = rho.shape
    rho, tau = rho.ravel(), tau.ravel()
    if n_terms is None:
        n_terms = _eigen_terms(float(tau.min()), 2.404825557695773, math.pi) if tau.size else 1
    alpha = _j0_zeros(n_terms)
    coef = 2.0 / (alpha * special.j1(alpha))
    out = np.empty_like(rho)
    for s in _blocks(rho.size, n_terms):
        terms = special.j0(np.outer(rho[s], alpha)) * np.exp(-np.outer(tau[s], alpha**2))
        out[s] = 1.0 - terms @ coef
    return out.reshape(shape)


def cylinder_dirichlet(x, t, D, radius):
    """Solid cylinder ``0 <= r < a``, surface held at ``Cs``.

    ``F = 1 - (2/a) sum_n exp(-D alpha_n^2 t) J0(r alpha_n) / (alpha_n J1(a alpha_n))`` with
    ``J0(a alpha_n) = 0``: Crank (1975), ch. 5, section 5.3.1, eq. (5.22);
    Carslaw & Jaeger (1959), section 7.4 (from memory).

    The roots ``a alpha_n`` come from ``scipy.special.jn_zeros(0, N)``. ``N`` is chosen so
    that ``(a alpha_N)^2 tau >= 45`` for the smallest ``tau = D t / a^2`` requested; each
    coefficient ``2 / (a alpha_n |J1(a alpha_n)|)`` is at most 1.61 (the first) and falls like
    ``sqrt(2 pi / (a alpha_n))``, and consecutive decay factors shrink by at least
    ``exp(-2 pi a alpha_N tau)``, so truncation error is below 1e-15. ``N`` is about 214 at ``tau = 1e-4`` and 2 140 at ``tau = 1e-6``.

    Parameters
    ----------
    x : array_like
        Depth below the surface, [m], ``0 <= x <= radius``.
    t : array_like
        Time, [s], ``> 0``.
    D : float
        Diffusivity, [m^2/s].
    radius : float
        Cylinder radius ``a``, [m].

    Returns
    -------
    float or numpy.ndarray
        ``F = (C - C0) / (Cs - C0)``.

    Raises
    ------
    ValueError
        If ``D t / a^2`` is so small (``<~ 2e-9``) that more than ``_MAX_TERMS`` terms would
        be needed; :func:`erfc_plane` is exact to ~``sqrt(D t) / a`` there.
    """
    D = _positive("D", D)
    a = _positive("radius", radius)
    x, t = _depth_and_time(x, t, a)
    return _result(_cylinder_series(1.0 - x / a, D * t / a**2))


def cylinder_uptake(t, D, radius):
    """Fractional uptake ``M_t / M_inf`` of :func:`cylinder_dirichlet`.

    ``M_t / M_inf = 1 - sum_n 4 / (a^2 alpha_n^2) exp(-D alpha_n^2 t)``, Crank (1975), ch. 5,
    eq. (5.23). ``M_inf = pi a^2 (Cs - C0)`` per unit length, i.e. ``(a/2)(Cs - C0)`` per unit
    carburized surface.
    """
    D = _positive("D", D)
    a = _positive("radius", radius)
    _, t = _depth_and_time(0.0, t)
    tau = (D * t / a**2).ravel()
    alpha = _j0_zeros(_eigen_terms(float(tau.min()), 2.404825557695773, math.pi))
    out = np.empty_like(tau)
    for s in _blocks(tau.size, alpha.size):
        out[s] = 1.0 - np.exp(-np.outer(tau[s], alpha**2)) @ (4.0 / alpha**2)
    return _result(out.reshape(t.shape))


@functools.lru_cache(maxsize=32)
def _robin_roots(L: float, n: int) -> np.ndarray:
    # The n-th root of b J1(b) = L J0(b) lies between j_{1,n-1} (j_{1,0} = 0) and j_{0,n}:
    # the function takes opposite signs there and moves from one end to the other as L goes
    # from 0 to infinity.
    upper = special.jn_zeros(0, n)
    lower = np.concatenate(([0.0], special.jn_zeros(1, n - 1))) if n > 1 else np.zeros(1)

    def f(b):
        return b * special.j1(b) - L * special.j0(b)

    roots = np.array([
        optimize.brentq(f, lo, hi, xtol=1e-14, rtol=4.0 * _EPS, maxiter=200)
        for lo, hi in zip(lower, upper)
    ])
    roots.setflags(write=False)
    return roots


def cylinder_evaporation_roots(L: float, n: int) -> np.ndarray:
    """First ``n`` positive roots ``beta_n`` of ``beta J1(beta) = L J0(beta)``.

    Crank (1975), ch. 5, eq. (5.51) (from memory); Carslaw & Jaeger (1959), section 7.7
    (from memory). Each root is found with ``scipy.optimize.brentq`` on the bracket
    ``[j_{1,n-1}, j_{0,n}]`` (zeros of J1 and J0, ``j_{1,0} = 0``), on which the function
    changes sign exactly once for ``0 < L < inf``.

    Parameters
    ----------
    L : float
        ``a beta / D`` (radius times mass-transfer coefficient over diffusivity), ``> 0``.
    n : int
        Number of roots.

    Returns
    -------
    numpy.ndarray
        Read-only, increasing roots.
    """
    L = _positive("L", L)
    if int(n) < 1:
        raise ValueError("n must be >= 1")
    return _robin_roots(L, int(n))


def _robin_coefficients(L: float, b: np.ndarray) -> np.ndarray:
    """``2 L / ((b^2 + L^2) J0(b))``, using ``J0(b) = b J1(b) / L`` where J0 is the smaller.

    At a root both denominators are equal; the larger of |J0|, |J1| is the one whose value
    is insensitive to the last bits of the root (large L puts roots near zeros of J0).
    """
    j0b, j1b = special.j0(b), special.j1(b)
    coef = np.empty_like(b)
    use_j0 = np.abs(j0b) >= np.abs(j1b)
    coef[use_j0] = 2.0 * L / ((b[use_j0] ** 2 + L * L) * j0b[use_j0])
    b1 = b[~use_j0]
    coef[~use_j0] = 2.0 * L * L / ((b1**2 + L * L) * b1 * j1b[~use_j0])
    return coef


def _cylinder_evaporation_series(rho, tau, L: float, n_terms: int | None = None):
    rho, tau = np.broadcast_arrays(np.asarray(rho, float), np.asarray(tau, float))
    shape = rho.shape
    rho, tau = rho.ravel(), tau.ravel()
    if n_terms is None:
        # Roots satisfy b_n >= j_{1,n-1} >= (n - 1) pi, so spacing pi from 0 is a safe bound.
        n_terms = _eigen_terms(float(tau.min()), 0.0, math.pi) if tau.size else 1
    b = _robin_roots(L, n_terms)
    coef = _robin_coefficients(L, b)
    out = np.empty_like(rho)
    for s in _blocks(rho.size, n_terms):
        terms = special.j0(np.outer(rho[s], b)) * np.exp(-np.outer(tau[s], b**2))
        out[s] = 1.0 - terms @ coef
    return out.reshape(shape)


def cylinder_evaporation(x, t, D, beta, radius):
    """Solid cylinder with a mass-transfer boundary ``-D dC/dr = beta (C - Cs)`` at ``r = a``.

    ``F = 1 - sum_n 2 L J0(beta_n r / a) exp(-beta_n^2 D t / a^2) / ((beta_n^2 + L^2) J0(beta_n))``
    with ``L = a beta / D`` and ``beta_n J1(beta_n) = L J0(beta_n)``: Crank (1975), ch. 5,
    section 5.3.2, eqs. (5.50)-(5.51) (from memory); Carslaw & Jaeger (1959), section 7.7
    (from memory).

    Roots come from :func:`cylinder_evaporation_roots`. Since ``beta_n >= (n - 1) pi``, ``N``
    is chosen so that ``((N - 1) pi)^2 tau >= 45`` for the smallest ``tau = D t / a^2``; the
    coefficients ``2 L / ((beta_n^2 + L^2) J0(beta_n))`` stay below 1.61 in magnitude (checked
    for L = 1e-6 ... 1e9), so truncation error is below 1e-15. Roots are cached per
    ``(L, N)``.

    Parameters
    ----------
    x : array_like
        Depth below the surface, [m], ``0 <= x <= radius``.
    t : array_like
        Time, [s], ``> 0``.
    D : float
        Diffusivity, [m^2/s].
    beta : float
        Mass-transfer coefficient, [m/s], ``>= 0``; ``inf`` gives :func:`cylinder_dirichlet`,
        ``0`` gives ``F = 0``.
    radius : float
        Cylinder radius ``a``, [m].

    Returns
    -------
    float or numpy.ndarray
        ``F = (C - C0) / (Cs - C0)``.
    """
    D = _positive("D", D)
    a = _positive("radius", radius)
    beta = float(beta)
    if not beta >= 0.0:
        raise ValueError(f"beta must be >= 0, got {beta!r}")
    if math.isinf(beta):
        return cylinder_dirichlet(x, t, D, a)
    x, t = _depth_and_time(x, t, a)
    if beta == 0.0:
        return _result(np.zeros(x.shape))
    return _result(_cylinder_evaporation_series(1.0 - x / a, D * t / a**2, a * beta / D))


def cylinder_evaporation_uptake(t, D, beta, radius):
    """Fractional uptake ``M_t / M_inf`` of :func:`cylinder_evaporation`.

    ``M_t / M_inf = 1 - sum_n 4 L^2 exp(-beta_n^2 D t / a^2) / (beta_n^2 (beta_n^2 + L^2))``,
    Crank (1975), ch. 5, eq. (5.52) (from memory). ``M_inf`` as in :func:`cylinder_uptake`.
    """
    D = _positive("D", D)
    a = _positive("radius", radius)
    beta = float(beta)
    if not beta >= 0.0:
        raise ValueError(f"beta must be >= 0, got {beta!r}")
    if math.isinf(beta):
        return cylinder_uptake(t, D, a)
    _, t = _depth_and_time(0.0, t)
    if beta == 0.0:
        return _result(np.zeros(t.shape))
    L = a * beta / D
    tau = (D * t / a**2).ravel()
    b = _robin_roots(L, _eigen_terms(float(tau.min()), 0.0, math.pi))
    weight = 4.0 * L * L / (b**2 * (b**2 + L * L))
    out = np.empty_like(tau)
    for s in _blocks(tau.size, b.size):
        out[s] = 1.0 - np.exp(-np.outer(tau[s], b**2)) @ weight
    return _result(out.reshape(t.shape))


# -------------------------------------------------------------------------------- sphere


def _sphere_fourier(rho, tau, n_terms: int | None = None):
    """Crank eq. (6.18) at ``rho = r / a``, ``tau = D t / a^2``.

    ``(2 a / (pi r)) (-1)^n / n sin(n pi r / a) = 2 (-1)^n sinc(n rho)`` with
    ``sinc(y) = sin(pi y) / (pi y)``, which is regular at the centre.
    """
    rho, tau = np.broadcast_arrays(np.asarray(rho, float), np.asarray(tau, float))
    shape = rho.shape
    rho, tau = rho.ravel(), tau.ravel()
    if n_terms is None:
        n_terms = _eigen_terms(float(tau.min()), math.pi, math.pi) if tau.size else 1
    n = np.arange(1, n_terms + 1, dtype=float)
    sign = np.where(n % 2 == 0, 1.0, -1.0)
    out = np.empty_like(rho)
    for s in _blocks(rho.size, n_terms):
        terms = np.sinc(np.outer(rho[s], n)) * np.exp(-np.outer(tau[s], (n * np.pi) ** 2))
        out[s] = 1.0 + 2.0 * (terms @ sign)
    return out.reshape(shape)


def _sphere_images(rho, tau, n_terms: int | None = None):
    """Erfc (image) series of the sphere problem, exact for all ``tau``.

    ``F = (a/r) sum_{n>=0} [erfc(((2n+1) a - r) / 2 sqrt(D t)) - erfc(((2n+1) a + r) / 2 sqrt(D t))]``,
    Crank (1975), ch. 6, section 6.3, eq. (6.16) (from memory); it follows from the sheet
    image series because ``r C`` obeys the plane diffusion equation. For ``r/a < 1e-8`` the
    0/0 form is replaced by its limit
    ``F(0) = sum_n (2 / sqrt(pi tau)) exp(-(2n+1)^2 / (4 tau))``; the quadratic correction
    there is below 1e-12 relative.
    """
    rho, tau = np.broadcast_arrays(np.asarray(rho, float), np.asarray(tau, float))
    shape = rho.shape
    rho, tau = rho.ravel(), tau.ravel()
    if n_terms is None:
        n_terms = math.ceil(_IMAGE_ARGUMENT * math.sqrt(float(tau.max()))) + 1 if tau.size else 1
    c = 2.0 * np.arange(n_terms, dtype=float) + 1.0
    out = np.empty_like(rho)
    for s in _blocks(rho.size, n_terms):
        r, tt = rho[s, None], tau[s, None]
        scale = 1.0 / (2.0 * np.sqrt(tt))
        centre = r < _SPHERE_CENTRE_RHO
        safe_r = np.where(centre, 1.0, r)
        diff = (special.erfc((c - safe_r) * scale) - special.erfc((c + safe_r) * scale)).sum(axis=1)
        limit = (2.0 / np.sqrt(np.pi * tt) * np.exp(-(c**2) / (4.0 * tt))).sum(axis=1)
        out[s] = np.where(centre[:, 0], limit, diff / safe_r[:, 0])
    return out.reshape(shape)


def sphere_dirichlet(x, t, D, radius):
    """Solid sphere ``0 <= r < a``, surface held at ``Cs``.

    ``F = 1 + (2 a / (pi r)) sum_{n>=1} (-1)^n / n sin(n pi r / a) exp(-D n^2 pi^2 t / a^2)``:
    Crank (1975), ch. 6, section 6.3.1, eq. (6.18); at the centre ``r -> 0`` this becomes
    ``1 + 2 sum_{n>=1} (-1)^n exp(-D n^2 pi^2 t / a^2)``, eq. (6.19). Carslaw & Jaeger
    (1959), section 9.3 (from memory).

    The ``r -> 0`` limit is handled by writing the terms with ``sinc`` (regular at 0). For
    ``tau = D t / a^2 <= 0.01`` the exact image form (see ``_sphere_images``, Crank eq.
    (6.16), from memory) is summed instead: 2 terms, tail below ``erfc(10) ~ 2e-45``. For
    ``tau > 0.01`` the Fourier series needs at most 23 terms for a tail factor below
    ``exp(-45)``. The two forms agree to ~1e-15 where they overlap (tested).

    Parameters
    ----------
    x : array_like
        Depth below the surface, [m], ``0 <= x <= radius``.
    t : array_like
        Time, [s], ``> 0``.
    D : float
        Diffusivity, [m^2/s].
    radius : float
        Sphere radius ``a``, [m].

    Returns
    -------
    float or numpy.ndarray
        ``F = (C - C0) / (Cs - C0)``.
    """
    D = _positive("D", D)
    a = _positive("radius", radius)
    x, t = _depth_and_time(x, t, a)
    rho = 1.0 - x / a
    tau = D * t / a**2
    out = np.empty(rho.shape)
    images = tau <= _SPHERE_IMAGE_TAU
    if np.any(images):
        out[images] = _sphere_images(rho[images], tau[images])
    if np.any(~images):
        out[~images] = _sphere_fourier(rho[~images], tau[~images])
    return _result(out)


def sphere_uptake(t, D, radius):
    """Fractional uptake ``M_t / M_inf`` of :func:`sphere_dirichlet`.

    ``M_t / M_inf = 1 - (6 / pi^2) sum_{n>=1} exp(-D n^2 pi^2 t / a^2) / n^2``, Crank (1975),
    ch. 6, eq. (6.20). ``M_inf = (4/3) pi a^3 (Cs - C0)``, i.e. ``(a/3)(Cs - C0)`` per unit
    carburized surface.
    """
    D = _positive("D", D)
    a = _positive("radius", radius)
    _, t = _depth_and_time(0.0, t)
    tau = (D * t / a**2).ravel()
    n = np.arange(1, _eigen_terms(float(tau.min()), math.pi, math.pi) + 1, dtype=float)
    out = np.empty_like(tau)
    for s in _blocks(tau.size, n.size):
        out[s] = 1.0 - (6.0 / np.pi**2) * (np.exp(-np.outer(tau[s], (n * np.pi) ** 2)) @ (1.0 / n**2))
    return _result(out.reshape(t.shape))


# ------------------------------------------------------------------ depth and time helpers


def depth_at(profile: Callable, F_threshold: float, t: float, x_max: float, args: tuple = ()) -> float:
    """Depth at which ``profile(x, t, *args)`` has fallen to ``F_threshold``.

    The profile must decrease with depth on ``[0, x_max]``, as all the profiles in this
    module do between the surface and the centre. Solved with ``scipy.optimize.brentq``
    to a relative tolerance of ~1e-15 of ``x_max``.

    Parameters
    ----------
    profile : callable
        ``F = profile(x, t, *args)``, e.g. ``erfc_plane`` with ``args=(D,)`` or
        ``lambda x, t: cylinder_dirichlet(x, t, D, a)``.
    F_threshold : float
        Fraction ``(C - C0) / (Cs - C0)`` that defines the depth, e.g. the case-depth carbon.
    t : float
        Time, [s].
    x_max : float
        Search limit, [m]: the half-thickness or radius for a finite body, a few tens of
        ``sqrt(D t)`` for a semi-infinite one.
    args : tuple
        Extra positional arguments for ``profile``.

    Returns
    -------
    float
        The depth, [m]; ``0.0`` if the surface itself is at or below ``F_threshold``.

    Raises
    ------
    ValueError
        If ``profile`` is still above ``F_threshold`` at ``x_max``.
    """
    x_max = _positive("x_max", x_max)

    def excess(x):
        return float(profile(x, t, *args)) - F_threshold

    if excess(0.0) <= 0.0:
        return 0.0
    if excess(x_max) > 0.0:
        raise ValueError(f"F stays above {F_threshold} down to x_max = {x_max} m")
    return optimize.brentq(excess, 0.0, x_max, xtol=1e-15 * x_max, rtol=4.0 * _EPS, maxiter=500)


def time_to_depth(profile: Callable, F_threshold: float, depth: float, t_guess: float,
                  args: tuple = ()) -> float:
    """Time at which the depth where ``F = F_threshold`` reaches ``depth``.

    For the profiles here, ``F`` at a fixed depth rises monotonically with time, so this is
    the root in ``t`` of ``profile(depth, t, *args) = F_threshold``. The bracket is found by
    halving and doubling ``t_guess``; the root by ``scipy.optimize.brentq`` to ~1e-15
    relative.

    Parameters
    ----------
    profile : callable
        ``F = profile(x, t, *args)``, as for :func:`depth_at`.
    F_threshold : float
        Fraction defining the depth, ``0 < F_threshold < 1``.
    depth : float
        Target depth, [m], ``>= 0``.
    t_guess : float
        Starting time for the bracket search, [s].
    args : tuple
        Extra positional arguments for ``profile``.

    Returns
    -------
    float
        Time, [s].

    Raises
    ------
    ValueError
        If no bracket is found within 2^200 of ``t_guess`` either way.
    """
    if not 0.0 < F_threshold < 1.0:
        raise ValueError("F_threshold must lie strictly between 0 and 1")
    t_guess = _positive("t_guess", t_guess)

    def excess(t):
        return float(profile(depth, t, *args)) - F_threshold

    lo = hi = t_guess
    for _ in range(200):
        if excess(hi) >= 0.0:
            break
        lo, hi = hi, 2.0 * hi
    else:
        raise ValueError(f"F at {depth} m does not reach {F_threshold} by t = {hi:g} s")
    for _ in range(200):
        if excess(lo) <= 0.0:
            break
        hi, lo = lo, 0.5 * lo
    else:
        raise ValueError(f"F at {depth} m already exceeds {F_threshold} at t = {lo:g} s")
    if lo == hi:
        return lo
    return optimize.brentq(excess, lo, hi, xtol=1e-300, rtol=4.0 * _EPS, maxiter=500)
