"""Independent peer for the benchmark: method of lines with SciPy's variable-order BDF.

Solves the same problem as :mod:`casedepth` for a semi-infinite plate,

    dC/dt = d/dx (D(C, T) dC/dx),     C(x, 0) = C_core,
    -D dC/dx |_(x=0) = beta (C_eq - C_s),    no flux at the far end of a deep domain,

with its own spatial discretisation (vertex-centred finite volumes on a geometrically graded
grid, Patankar 1980, Numerical Heat Transfer and Fluid Flow, ch. 4) and
``scipy.integrate.solve_ivp(method="BDF")`` in time (the NDF/BDF family of Shampine & Reichelt
1997, "The MATLAB ODE Suite", SIAM J. Sci. Comput. 18; background in Hairer & Wanner 1996,
Solving Ordinary Differential Equations II, ch. III.1). Only the material data are taken
from the setup: ``setup.diffusivity``, ``setup.equilibrium_carbon``, ``setup.beta``,
``setup.temperature``, ``setup.steel.carbon`` and ``setup.threshold_carbon``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.integrate import solve_ivp

from casedepth.constants import GAS_CONSTANT_CAL as R_CAL


def graded_grid(depth: float, n_cells: int, growth: float) -> np.ndarray:
    """``n_cells + 1`` node depths [m] on [0, depth], each cell ``growth`` times the previous one."""
    if growth == 1.0:
        return np.linspace(0.0, depth, n_cells + 1)
    widths = growth ** np.arange(n_cells)
    return np.concatenate(([0.0], np.cumsum(widths))) * (depth / widths.sum())


def domain_depth(setup, horizon: float) -> float:
    """Domain depth [m]: eight diffusion lengths at the largest D of the case, for a soak of ``horizon`` [s].

    At 8 sqrt(D t) the erfc tail is erfc(4) ≈ 1.5e-8 of the surface rise, so the no-flux far end
    does not feel the carbon; this is the same rule casedepth uses to size its first domain.
    """
    c = np.linspace(setup.steel.carbon, setup.equilibrium_carbon, 21)
    d_max = float(np.max(setup.diffusivity(c, setup.temperature)))
    return 8.0 * math.sqrt(d_max * horizon)


@dataclass
class PeerResult:
    soak_time: float  # s
    case_depth: float  # m
    depth: np.ndarray  # m
    carbon: np.ndarray  # wt %
    nfev: int
    njev: int
    nlu: int
    steps: int


class MolPeer:
    """Method-of-lines model of one carburizing soak.

    Parameters
    ----------
    setup : casedepth.CarburizingSetup
        Source of the material data (semi-infinite plate, finite beta, carbon threshold).
    depth : float
        Domain depth [m].
    n_cells, growth : int, float
        Grid: ``n_cells`` cells growing geometrically by ``growth`` from the surface.
    rtol, atol : float
        Tolerances handed to ``solve_ivp`` (atol in wt % C).
    jacobian : str
        ``"analytic"``: exact tridiagonal Jacobian as a sparse matrix; ``"sparsity"``: SciPy builds
        it by grouped finite differences from a tridiagonal ``jac_sparsity`` pattern (3 extra
        right-hand-side calls per Jacobian).
    """

    def __init__(self, setup, depth: float, n_cells: int, growth: float, rtol: float, atol: float,
                 jacobian: str = "analytic"):
        if setup.geometry.finite or setup.geometry.shape != "plate" or not math.isfinite(setup.beta):
            raise ValueError("the peer models a semi-infinite plate with a finite beta only")
        if jacobian == "analytic" and setup.diffusivity.method != "tibbetts":
            raise ValueError("the analytic Jacobian uses the Tibbetts form of dD/dC")
        self.T = setup.temperature
        self.D = setup.diffusivity
        self.beta = setup.beta
        self.c_eq = setup.equilibrium_carbon
        self.c_core = setup.steel.carbon
        self.threshold = setup.threshold_carbon
        self.rtol, self.atol, self.jacobian = rtol, atol, jacobian

        x = graded_grid(depth, n_cells, growth)
        self.x = x
        self.h = np.diff(x)
        faces = 0.5 * (x[1:] + x[:-1])
        self.volume = np.diff(np.concatenate(([0.0], faces, [x[-1]])))
        n = len(x)
        self.n = n
        # Tibbetts (1980): ln D = const - 1.6 C + 6600 C / (R T), so dD/dC = D (6600/(R T) - 1.6).
        self.dlnD_dC = 6600.0 / (R_CAL * self.T) - 1.6
        self.pattern = sp.diags([np.ones(n - 1), np.ones(n), np.ones(n - 1)], [-1, 0, 1], format="csc")
        # CSC of a tridiagonal matrix stores, column by column, (upper, main, lower) entries;
        # the index arrays below let jac() refill .data without rebuilding the matrix.
        self._csc = self.pattern.copy()
        self._csc.sort_indices()
        rows = self._csc.indices
        cols = np.repeat(np.arange(n), np.diff(self._csc.indptr))
        self._is_main = rows == cols
        self._is_upper = rows == cols - 1
        self._is_lower = rows == cols + 1

    # -- right-hand side and its Jacobian ---------------------------------------------------
    def rhs(self, t, c):
        cf = 0.5 * (c[1:] + c[:-1])
        flow = -self.D(cf, self.T) * (c[1:] - c[:-1]) / self.h  # inward flux through internal faces
        net = np.zeros_like(c)
        net[:-1] -= flow
        net[1:] += flow
        net[0] += self.beta * (self.c_eq - c[0])
        return net / self.volume

    def jac(self, t, c):
        cf = 0.5 * (c[1:] + c[:-1])
        D = self.D(cf, self.T)
        grad = (c[1:] - c[:-1]) / self.h
        dD = D * self.dlnD_dC
        d_left = -0.5 * dD * grad + D / self.h  # d flow / d c[i]
        d_right = -0.5 * dD * grad - D / self.h  # d flow / d c[i+1]
        main = np.zeros(self.n)
        main[:-1] -= d_left
        main[1:] += d_right
        main[0] -= self.beta
        m = self._csc
        m.data[self._is_main] = main / self.volume
        m.data[self._is_upper] = -d_right / self.volume[:-1]  # row i, column i+1
        m.data[self._is_lower] = d_left / self.volume[1:]  # row i+1, column i
        return m.copy()

    # -- results -------------------------------------------------------------------------------
    def case_depth(self, c: np.ndarray) -> float:
        """Depth [m] where the carbon first falls to the threshold; linear between nodes."""
        below = np.flatnonzero(c < self.threshold)
        if len(below) == 0:
            return float(self.x[-1])
        i = int(below[0])
        if i == 0:
            return 0.0
        x0, x1 = self.x[i - 1], self.x[i]
        return float(x0 + (c[i - 1] - self.threshold) / (c[i - 1] - c[i]) * (x1 - x0))

    def _solve(self, t_end: float, events=None):
        jac_kw = {"jac": self.jac} if self.jacobian == "analytic" else {"jac_sparsity": self.pattern}
        c0 = np.full(self.n, self.c_core)
        sol = solve_ivp(self.rhs, (0.0, t_end), c0, method="BDF", rtol=self.rtol, atol=self.atol,
                        events=events, **jac_kw)
        if sol.status < 0:
            raise ArithmeticError(sol.message)
        return sol

    def _result(self, sol, t: float, c: np.ndarray) -> PeerResult:
        return PeerResult(t, self.case_depth(c), self.x, c, sol.nfev, sol.njev, sol.nlu, len(sol.t) - 1)

    def forward(self, soak_time: float) -> PeerResult:
        """Integrate a soak of ``soak_time`` [s]; effective case depth from the final profile."""
        sol = self._solve(soak_time)
        return self._result(sol, sol.t[-1], sol.y[:, -1])

    def inverse(self, target: float, horizon: float) -> PeerResult:
        """Soak time [s] at which the carbon at depth ``target`` [m] reaches the threshold.

        A terminal event on C(target) - threshold, located by solve_ivp's root finder on the
        dense output; ``horizon`` [s] is the longest soak searched.
        """
        i = int(np.searchsorted(self.x, target))
        x0, x1 = self.x[i - 1], self.x[i]
        w = (target - x0) / (x1 - x0)
        thr = self.threshold

        def reached(t, c):
            return (1.0 - w) * c[i - 1] + w * c[i] - thr

        reached.terminal = True
        reached.direction = 1.0
        sol = self._solve(horizon, events=reached)
        if sol.status != 1:
            raise ArithmeticError(f"{target * 1e3:g} mm not reached within {horizon / 3600:g} h")
        return self._result(sol, float(sol.t_events[0][0]), sol.y_events[0][0])
