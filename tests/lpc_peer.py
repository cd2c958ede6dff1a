"""Independent reference solver ("peer") for low-pressure (vacuum) carburizing pulses.

Tests use it to check the project's own solver. It is written on purpose without anything from
``casedepth.numerics`` or ``casedepth.lpc``: it takes only a diffusivity callable and uses numpy and scipy.

Problem
-------
One-dimensional diffusion into a semi-infinite plate, carbon ``C`` in wt %, SI units otherwise::

    dC/dt = d/dx ( D(C, T) dC/dx ),   x >= 0 (depth below the surface, m),   C(x, 0) = c_core

``D = diffusivity(c, T)`` is called with an array of carbon [wt %] and a temperature [K] and returns m²/s
(for example ``casedepth.models.diffusivity.Diffusivity("tibbetts")``, or any ``lambda c, T: ...``).

A pulse table is a list of ``(boost_s, diffuse_s)`` pairs run in order at one temperature ``T``:

* boost: the surface takes a constant carbon influx ``F = influx`` [wt % · m/s], i.e. ``-D dC/dx = F`` at
  ``x = 0``, until the surface carbon reaches ``limit`` [wt %]; from then to the end of that boost the surface
  is held at ``C = limit``. ``influx = math.inf`` holds the surface at the limit from the first instant of every
  boost.
* diffuse: zero flux at the surface.

Then an optional ``tail`` of ``(duration_s, T_K)`` zero-flux segments, each at its own constant temperature.
The far end of the domain is a zero-flux wall, far enough to be untouched.

Method
------
Method of lines: a vertex-centred finite-volume grid (node 0 on the surface, so the surface carbon is a node
value and the node's half cell takes the surface flux) with cells graded geometrically from fine at the surface
to coarse in depth, face diffusivities ``D((C_i + C_(i+1)) / 2, T)``, integrated in time by
``scipy.integrate.solve_ivp`` (BDF) with a tridiagonal Jacobian pattern (``jac_sparsity``). The constant-flux
phase ends on a terminal event when the surface node reaches the limit; the surface node is then frozen at the
limit (a Dirichlet boundary) to the end of the boost. The domain is ``8 sqrt(D_max · total time)`` deep, with
``D_max`` the largest diffusivity between ``c_core`` and ``limit`` at any temperature used, so that
``erfc(4) ~ 2e-8`` of the surface step reaches the far wall.

A last state variable tallies the carbon that crossed the surface (the influx in flux phases, the flux
into the surface cell in held phases, and the step of the surface node when it is set to the limit); it is
returned as :attr:`PeerResult.carbon_entered`, beside :attr:`PeerResult.carbon_added` (the integral of the
final profile), so that a test can check the conservation of carbon.

Accuracy
--------
Measured with the defaults (400 cells, grading 20, rtol 1e-7), the checks in ``tests/test_lpc_peer.py``:

* held surface, constant D: depths of thresholds within about 1e-5 of the erfc solution (Crank 1975,
  eq. 3.13), the whole profile within 5e-6 of the surface step, the uptake within 1e-5 (Crank 1975, eq. 3.15);
* constant influx, constant D: surface carbon within 6e-5 of its rise from t_sat/20 on (Carslaw & Jaeger 1959,
  §2.9), the time it reaches the limit within 2e-5, the profile within 1e-5;
* carbon: the tally through the surface equals the integral of the profile to round-off (1e-15 relative);
* a five-pulse table with Tibbetts' (1980) carbon-dependent D and a tail: depths and the carbon added within
  about 1e-4 of a run on 3 200 cells (a uniform grid of 400 cells is 10x worse, hence the grading).

A run takes about 0.05–0.5 s.

References
----------
J. Crank, *The Mathematics of Diffusion*, 2nd ed., Oxford: Clarendon Press, 1975.
H. S. Carslaw and J. C. Jaeger, *Conduction of Heat in Solids*, 2nd ed., Oxford: Clarendon Press, 1959.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np
from scipy import sparse
from scipy.integrate import solve_ivp

__all__ = ["PeerResult", "run_pulses", "graded_grid"]

#: relative and absolute (wt %) tolerances of the time integration; the spatial grid, not these, sets the error
RTOL = 1e-7
ATOL = 1e-9
#: domain depth in units of sqrt(D_max · total time)
DOMAIN_WIDTHS = 8.0
#: ratio of the deepest cell to the surface cell
GRADING = 20.0


@dataclass
class PeerResult:
    """The peer's answer.

    Attributes
    ----------
    depth : ndarray
        Node depths below the surface [m]; ``depth[0] == 0``.
    carbon : ndarray
        Final carbon at the nodes [wt %].
    surface_history : tuple of ndarray
        ``(times [s], surface carbon [wt %])`` at every accepted time step, from 0 to the end of the tail.
    carbon_added : float
        ``∫ (C − c_core) dx`` over the final profile [wt % · m] (the trapezoid rule on the nodes, which is
        exactly the sum over the grid's control volumes).
    carbon_entered : float
        Carbon that crossed the surface [wt % · m], tallied during the run (independent of the profile).
    saturation_times : tuple of float
        For each boost, the time after its start [s] at which the surface reached the limit: 0 for a held
        boost (``influx = inf``), ``nan`` where the boost ended before the surface got there.
    """

    depth: np.ndarray
    carbon: np.ndarray
    surface_history: tuple[np.ndarray, np.ndarray]
    carbon_added: float
    carbon_entered: float = math.nan
    saturation_times: tuple[float, ...] = field(default_factory=tuple)

    def depth_at(self, threshold: float) -> float:
        """First depth [m] at which the carbon falls to ``threshold`` [wt %], by linear interpolation between
        nodes; 0 if the surface is already at or below it. Raises ``ValueError`` if the profile never falls
        that low (a threshold at or below the core carbon)."""
        c = self.carbon
        if c[0] <= threshold:
            return 0.0
        below = np.nonzero(c <= threshold)[0]
        if below.size == 0:
            raise ValueError(f"carbon never falls to {threshold} wt % (lowest {c.min():.6g} wt %)")
        i = int(below[0])
        x0, x1, c0, c1 = self.depth[i - 1], self.depth[i], c[i - 1], c[i]
        return float(x0 + (c0 - threshold) / (c0 - c1) * (x1 - x0))

    @property
    def surface_carbon(self) -> float:
        """Final surface carbon [wt %]."""
        return float(self.carbon[0])


def graded_grid(length: float, cells: int, grading: float = GRADING) -> np.ndarray:
    """Node depths [m] of ``cells`` cells over ``[0, length]``, each cell a constant factor longer than the one
    above it, the deepest ``grading`` times the surface one (uniform for ``grading = 1``)."""
    if cells < 2:
        raise ValueError("need at least 2 cells")
    if grading == 1.0:
        return np.linspace(0.0, length, cells + 1)
    a = math.log(grading) * cells / (cells - 1)  # x = L (e^(a ξ) − 1)/(e^a − 1): cell ratio e^(a/cells)
    xi = np.linspace(0.0, 1.0, cells + 1)
    x = length * np.expm1(a * xi) / math.expm1(a)
    x[-1] = length
    return x


class _Grid:
    """Control volumes and the finite-volume right-hand side on one grid."""

    def __init__(self, x: np.ndarray):
        self.x = x
        self.h = np.diff(x)  # cell lengths, N
        n = x.size
        self.volume = np.empty(n)
        self.volume[0] = self.h[0] / 2
        self.volume[-1] = self.h[-1] / 2
        self.volume[1:-1] = (self.h[:-1] + self.h[1:]) / 2
        # unknowns: n node carbons, then the tally of carbon entered; pattern tridiagonal + tally row
        rows = np.concatenate([np.arange(n), np.arange(1, n), np.arange(n - 1), [n, n]])
        cols = np.concatenate([np.arange(n), np.arange(n - 1), np.arange(1, n), [0, 1]])
        self.sparsity = sparse.csr_matrix((np.ones(rows.size, dtype=bool), (rows, cols)), shape=(n + 1, n + 1))

    def face_flux(self, c: np.ndarray, D: Callable, T: float) -> np.ndarray:
        """Flux towards depth through each face between nodes [wt % · m/s]."""
        d = np.asarray(D(0.5 * (c[:-1] + c[1:]), T), dtype=float)
        return -d * (c[1:] - c[:-1]) / self.h

    def rhs(self, t: float, y: np.ndarray, D: Callable, T: float, mode: str, influx: float) -> np.ndarray:
        """Time derivatives for ``mode`` 'flux' (surface influx), 'held' (surface fixed) or 'closed' (no flux)."""
        c = y[:-1]
        J = self.face_flux(c, D, T)
        dydt = np.empty_like(y)
        dydt[1:-2] = (J[:-1] - J[1:]) / self.volume[1:-1]
        dydt[-2] = J[-1] / self.volume[-1]
        if mode == "flux":
            dydt[0] = (influx - J[0]) / self.volume[0]
            dydt[-1] = influx
        elif mode == "held":
            dydt[0] = 0.0
            dydt[-1] = J[0]  # what enters the surface cell leaves it through its face
        else:
            dydt[0] = -J[0] / self.volume[0]
            dydt[-1] = 0.0
        return dydt


def _max_diffusivity(diffusivity: Callable, c_core: float, limit: float, temperatures: Sequence[float]) -> float:
    carbon = np.linspace(c_core, limit, 65)
    return max(float(np.max(np.asarray(diffusivity(carbon, T), dtype=float) * np.ones_like(carbon)))
               for T in temperatures)


def run_pulses(diffusivity: Callable, T: float, c_core: float, limit: float, influx: float,
               pulses: Sequence[tuple[float, float]], tail: Sequence[tuple[float, float]] = (),
               cells: int = 400, grading: float = GRADING) -> PeerResult:
    """Run a pulse table on a plate of uniform core carbon and return the final profile.

    Parameters
    ----------
    diffusivity : callable
        ``diffusivity(carbon, T)``: carbon [wt %] (ndarray) and temperature [K] to D [m²/s].
    T : float
        Temperature of the pulses [K].
    c_core : float
        Initial (core) carbon [wt %].
    limit : float
        Surface carbon [wt %] at which a boost's constant influx gives way to a surface held at ``limit``.
    influx : float
        Carbon influx during a boost [wt % · m/s] (a mass flux in kg/(m² s) times 100 / density in kg/m³);
        ``math.inf`` holds the surface at ``limit`` for the whole of every boost.
    pulses : sequence of (float, float)
        ``(boost_s, diffuse_s)`` pairs [s], run in order at ``T``; zero durations are skipped.
    tail : sequence of (float, float)
        ``(duration_s, T_K)`` zero-flux segments run after the pulses, each at its own temperature.
    cells : int
        Number of grid cells.
    grading : float
        Ratio of the deepest cell to the surface cell (1 for a uniform grid).

    Returns
    -------
    PeerResult
    """
    if not limit > c_core:
        raise ValueError("the limit must be above the core carbon")
    if not influx > 0:
        raise ValueError("the influx must be positive (math.inf for a held surface)")
    pulses = [(float(b), float(d)) for b, d in pulses]
    tail = [(float(s), float(Tk)) for s, Tk in tail]
    if any(v < 0 for p in pulses for v in p) or any(s < 0 for s, _ in tail):
        raise ValueError("durations must not be negative")
    total = sum(b + d for b, d in pulses) + sum(s for s, _ in tail)
    if total <= 0:
        raise ValueError("nothing to run")
    D_max = _max_diffusivity(diffusivity, c_core, limit, [T] + [Tk for _, Tk in tail])
    grid = _Grid(graded_grid(DOMAIN_WIDTHS * math.sqrt(D_max * total), cells, grading))
    n = grid.x.size

    y = np.empty(n + 1)
    y[:-1] = c_core
    y[-1] = 0.0
    now = 0.0
    times: list[np.ndarray] = [np.array([0.0])]
    surface: list[np.ndarray] = [np.array([c_core])]
    saturation: list[float] = []

    def integrate(y, duration, temperature, mode, events=None):
        """Advance ``y`` by up to ``duration`` [s]; returns the solution object of solve_ivp."""
        sol = solve_ivp(grid.rhs, (0.0, duration), y, method="BDF", rtol=RTOL, atol=ATOL,
                        jac_sparsity=grid.sparsity, events=events,
                        args=(diffusivity, temperature, mode, influx))
        if sol.status < 0:
            raise RuntimeError(f"solve_ivp failed: {sol.message}")
        times.append(now + sol.t[1:])
        surface.append(sol.y[0, 1:])
        return sol

    def hold(y):
        """Set the surface node to the limit, tallying the carbon that the step puts into its half cell."""
        y = y.copy()
        y[-1] += grid.volume[0] * (limit - y[0])
        y[0] = limit
        return y

    def reaches_limit(t, y, *args):
        return y[0] - limit

    reaches_limit.terminal = True
    reaches_limit.direction = 1

    for boost, diffuse in pulses:
        if boost > 0:
            left = boost
            if math.isinf(influx):
                saturation.append(0.0)
            elif y[0] >= limit:
                saturation.append(0.0)
            else:
                sol = integrate(y, boost, T, "flux", events=reaches_limit)
                y = sol.y[:, -1]
                if sol.status == 1:  # the surface reached the limit
                    t_sat = float(sol.t_events[0][0])
                    saturation.append(t_sat)
                    left = boost - t_sat
                    now += t_sat
                else:
                    saturation.append(math.nan)
                    left = 0.0
                    now += boost
            if left > 0:
                y = hold(y)
                times.append(np.array([now]))
                surface.append(np.array([limit]))
                sol = integrate(y, left, T, "held")
                y = sol.y[:, -1]
                now += left
        if diffuse > 0:
            y = integrate(y, diffuse, T, "closed").y[:, -1]
            now += diffuse
    for duration, Tk in tail:
        if duration > 0:
            y = integrate(y, duration, Tk, "closed").y[:, -1]
            now += duration

    carbon = y[:-1].copy()
    return PeerResult(
        depth=grid.x.copy(),
        carbon=carbon,
        surface_history=(np.concatenate(times), np.concatenate(surface)),
        carbon_added=float(np.dot(grid.volume, carbon - c_core)),
        carbon_entered=float(y[-1]),
        saturation_times=tuple(saturation),
    )
