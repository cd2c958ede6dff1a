"""Implicit finite-volume solver for carbon diffusion with a carbon-dependent diffusivity.

The part is cut into control volumes around nodes on a grid graded toward the surface
(:func:`casedepth.geometry.graded_nodes`); node 0 sits on the surface. Fluxes between nodes use D
at the mean carbon of the two nodes. Time integration is the TR-BDF2 scheme (Bank et al. 1985)
written as a three-stage ESDIRK method: second order, L-stable (no ringing after the sudden
start of a carburizing step) and, as a Runge–Kutta method, exactly conservative: the carbon
added to the part equals the quadrature of the surface flux over the stages. Each implicit
stage is solved by Newton's method with the exact tridiagonal Jacobian (dD/dC included), so
the carbon dependence of D is not lagged. Time steps grow geometrically, matching the √t
growth of a diffusion case.

References
----------
.. [1] Bank, R. E., W. M. Coughran, W. Fichtner, E. H. Grosse, D. J. Rose, R. K. Smith.
   "Transient simulation of silicon devices and circuits." IEEE Trans. Computer-Aided Design
   4 (1985): 436–451 (the TR-BDF2 scheme).
.. [2] Hosea, M. E., and L. F. Shampine. "Analysis and implementation of TR-BDF2."
   Applied Numerical Mathematics 20 (1996): 21–37 (TR-BDF2 as an ESDIRK method).
.. [3] Patankar, S. V. Numerical Heat Transfer and Fluid Flow. Hemisphere, 1980
   (finite-volume discretisation on non-uniform grids).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.linalg import solve_banded

from .diffusivity import Diffusivity
from .geometry import Geometry, graded_nodes

# TR-BDF2 as ESDIRK: c = (0, 2d, 1), b = (w, w, d), d = 1 - 1/sqrt(2), w = sqrt(2)/4.
_D = 1.0 - 1.0 / math.sqrt(2.0)
_W = math.sqrt(2.0) / 4.0
_C2 = 2.0 * _D


@dataclass(frozen=True)
class SurfaceCondition:
    """What the furnace does to the surface during one step.

    Parameters
    ----------
    temperature : float
        Part temperature, [K]
    equilibrium_carbon : float
        Surface carbon in equilibrium with the atmosphere (after the alloy factor), [wt %]
    beta : float
        Mass-transfer coefficient, [m/s]; ``math.inf`` holds the surface at ``equilibrium_carbon``.
    """

    temperature: float
    equilibrium_carbon: float
    beta: float


@dataclass(frozen=True)
class Accuracy:
    """Discretisation settings. The defaults give effective case depth to better than 0.1 %
    (see tests/test_convergence.py); halve ``cell_growth - 1`` and ``step_growth - 1`` to check."""

    surface_cell: float = 1e-6  # m, width of the first cell
    cell_growth: float = 1.03  # ratio of neighbouring cell widths
    first_step: float = 1.0  # s, first time step of each furnace step
    step_growth: float = 1.15  # ratio of neighbouring time steps
    max_step: float = 1800.0  # s

    def refined(self, factor: int = 2) -> "Accuracy":
        """Settings with cells and time steps about ``factor`` times finer."""
        return Accuracy(self.surface_cell / factor, 1.0 + (self.cell_growth - 1.0) / factor,
                        self.first_step / factor, 1.0 + (self.step_growth - 1.0) / factor, self.max_step / factor)


@dataclass
class Profile:
    """Carbon against depth at one moment.

    ``depth`` [m] from the surface, ``carbon`` [wt %], ``time`` [s] since the start.
    """

    depth: np.ndarray
    carbon: np.ndarray
    time: float
    half_section: float = math.inf

    @property
    def surface_carbon(self) -> float:
        return float(self.carbon[0])

    def depth_at(self, carbon: float) -> float:
        """Depth [m] where carbon first falls to ``carbon`` [wt %] going inward.

        Zero if the surface is already below it; the half-section (centre) if it is never reached.
        Linear interpolation between the two nodes that bracket it.
        """
        c = self.carbon
        below = np.flatnonzero(c < carbon)
        if len(below) == 0:
            return float(min(self.depth[-1], self.half_section))
        i = int(below[0])
        if i == 0:
            return 0.0
        x0, x1, c0, c1 = self.depth[i - 1], self.depth[i], c[i - 1], c[i]
        return float(x0 + (c0 - carbon) / (c0 - c1) * (x1 - x0))

    def carbon_at(self, depth: float) -> float:
        """Carbon [wt %] at ``depth`` [m] (linear between nodes)."""
        return float(np.interp(depth, self.depth, self.carbon))


class CarbonSolver:
    """Carbon in one part, advanced through furnace steps.

    Parameters
    ----------
    geometry : Geometry
        The part's shape and size.
    diffusivity : Diffusivity
        D(carbon, T).
    core_carbon : float
        Uniform starting carbon, [wt %].
    depth : float
        For a semi-infinite body, the starting domain depth [m]; it is extended automatically
        while carbon reaches its far end. Ignored for finite sections.
    accuracy : Accuracy
        Grid and time-step settings.
    """

    #: the far end counts as untouched while its carbon change is below this share of the surface's
    FAR_FIELD_TOLERANCE = 1e-9

    def __init__(self, geometry: Geometry, diffusivity: Diffusivity, core_carbon: float,
                 depth: float = 5e-3, accuracy: Accuracy = Accuracy()):
        self.geometry = geometry
        self.diffusivity = diffusivity
        self.core_carbon = float(core_carbon)
        self.accuracy = accuracy
        self.time = 0.0
        self.flux_integral = 0.0  # carbon that crossed the surface, wt % · m (per unit surface)
        span = geometry.half_section if geometry.finite else depth
        self._set_grid(graded_nodes(span, accuracy.surface_cell, accuracy.cell_growth, geometry.finite))
        self.carbon = np.full(len(self.nodes), self.core_carbon)

    # -- grid -------------------------------------------------------------------------------
    def _set_grid(self, nodes: np.ndarray) -> None:
        g = self.geometry
        self.nodes = nodes
        faces = 0.5 * (nodes[1:] + nodes[:-1])
        self.spacing = np.diff(nodes)
        self.face_area = g.area(faces)
        bounds = np.concatenate(([0.0], faces, [nodes[-1]]))
        self.volume = g.volume(bounds[:-1], bounds[1:])
        self.surface_area = float(g.area(0.0))

    def _extend(self) -> None:
        old = len(self.nodes)
        acc = self.accuracy
        self._set_grid(graded_nodes(1.5 * self.nodes[-1], acc.surface_cell, acc.cell_growth, False))
        self.carbon = np.concatenate((self.carbon, np.full(len(self.nodes) - old, self.core_carbon)))

    def _far_end_touched(self) -> bool:
        if self.geometry.finite:
            return False
        change = np.abs(self.carbon - self.core_carbon)
        return change[-1] > self.FAR_FIELD_TOLERANCE * max(change.max(), 1e-12)

    # -- physics ----------------------------------------------------------------------------
    def _inflow(self, c: np.ndarray, cond: SurfaceCondition):
        """Net carbon inflow into each control volume and the three diagonals of its Jacobian."""
        cf = 0.5 * (c[1:] + c[:-1])
        D, dD = self.diffusivity.with_derivative(cf, cond.temperature)
        grad = (c[1:] - c[:-1]) / self.spacing
        flow = -self.face_area * D * grad  # carbon through each internal face, inward positive
        d_left = self.face_area * (-0.5 * dD * grad + D / self.spacing)  # d flow / d c[i]
        d_right = self.face_area * (-0.5 * dD * grad - D / self.spacing)  # d flow / d c[i+1]
        inflow = np.zeros_like(c)
        inflow[:-1] -= flow
        inflow[1:] += flow
        main = np.zeros_like(c)
        main[:-1] -= d_left
        main[1:] += d_right
        upper = -d_right  # d inflow[i] / d c[i+1]
        lower = d_left  # d inflow[i+1] / d c[i]
        surface_flow = 0.0
        if math.isfinite(cond.beta):
            surface_flow = self.surface_area * cond.beta * (cond.equilibrium_carbon - c[0])
            inflow[0] += surface_flow
            main[0] -= self.surface_area * cond.beta
        else:
            surface_flow = flow[0]  # what leaves the surface node inward; the node itself is held
        return inflow, main, upper, lower, surface_flow

    def _stage(self, base: np.ndarray, h: float, guess: np.ndarray, cond: SurfaceCondition):
        """Solve V (y - base) = h F(y) for y by Newton's method; ``base`` already holds the explicit part."""
        y = guess.copy()
        dirichlet = not math.isfinite(cond.beta)
        if dirichlet:
            y[0] = cond.equilibrium_carbon
        scale = max(abs(cond.equilibrium_carbon - self.core_carbon), 1e-3)
        band = np.empty((3, len(y)))
        for _ in range(30):
            inflow, main, upper, lower, surface_flow = self._inflow(y, cond)
            residual = self.volume * (y - base) - h * inflow
            band[0, 1:] = -h * upper
            band[1] = self.volume - h * main
            band[2, :-1] = -h * lower
            if dirichlet:
                residual[0] = 0.0
                band[1, 0] = 1.0
                band[0, 1] = 0.0
            delta = solve_banded((1, 1), band, residual, overwrite_ab=False, check_finite=False)
            y -= delta
            if np.max(np.abs(delta)) < 1e-12 * scale:
                inflow, _, _, _, surface_flow = self._inflow(y, cond)
                return y, inflow, surface_flow
        raise ArithmeticError("Newton iterations did not converge; the furnace step may be outside the models' range")

    def _step(self, dt: float, cond: SurfaceCondition, inflow0=None):
        """One TR-BDF2 step from the present state; returns (carbon, flux_added, last inflow)."""
        c0 = self.carbon
        if inflow0 is None:
            inflow0, _, _, _, flow0 = self._inflow(c0, cond)
            if not math.isfinite(cond.beta) and c0[0] != cond.equilibrium_carbon:
                # a sudden change of a held surface: the first stage starts from the new surface value
                start = c0.copy()
                start[0] = cond.equilibrium_carbon
                inflow0, _, _, _, flow0 = self._inflow(start, cond)
        else:
            inflow0, flow0 = inflow0
        v = self.volume
        base2 = c0 + dt * _D * inflow0 / v
        y2, f2, flow2 = self._stage(base2, dt * _D, c0, cond)
        base3 = c0 + dt * _W * (inflow0 + f2) / v
        y3, f3, flow3 = self._stage(base3, dt * _D, y2 + (y2 - c0) * (1 - _C2) / _C2, cond)
        flux = dt * (_W * flow0 + _W * flow2 + _D * flow3)
        if not math.isfinite(cond.beta):
            # the held surface node's own change counts as carbon that crossed the surface
            flux += self.volume[0] * (y3[0] - c0[0])
        return y3, flux, (f3, flow3)

    # -- public -----------------------------------------------------------------------------
    def trial(self, dt: float, cond: SurfaceCondition) -> Profile:
        """The profile one step of ``dt`` [s] ahead, without changing the state."""
        carbon, _, _ = self._step(dt, cond)
        return Profile(self.nodes, carbon, self.time + dt, self.geometry.half_section)

    def advance(self, duration: float, cond: SurfaceCondition,
                on_step: Callable[["CarbonSolver"], bool] | None = None) -> None:
        """March ``duration`` [s] under one surface condition.

        ``on_step(solver)`` is called after every step; if it returns True the march stops there
        (the caller reads ``solver.time``). Steps start at ``first_step`` and grow by ``step_growth``.
        """
        acc = self.accuracy
        end = self.time + duration
        dt = acc.first_step
        carried = None
        while self.time < end * (1 - 1e-12):
            h = min(dt, end - self.time)
            state = (self.carbon, self.time, self.flux_integral)
            carbon, flux, carried = self._step(h, cond, carried)
            self.carbon, self.time, self.flux_integral = carbon, self.time + h, self.flux_integral + flux
            if self._far_end_touched():
                self.carbon, self.time, self.flux_integral = state
                self._extend()
                carried = None
                continue
            self.last_step = (state, h)
            if on_step is not None and on_step(self):
                return
            dt = min(dt * acc.step_growth, acc.max_step)

    def restore_last_step(self) -> float:
        """Undo the last step of :meth:`advance`; returns its length [s]."""
        (carbon, time, flux), h = self.last_step
        if len(carbon) < len(self.nodes):
            carbon = np.concatenate((carbon, np.full(len(self.nodes) - len(carbon), self.core_carbon)))
        self.carbon, self.time, self.flux_integral = carbon, time, flux
        return h

    def commit(self, dt: float, cond: SurfaceCondition) -> None:
        """Take one step of exactly ``dt`` [s]."""
        carbon, flux, _ = self._step(dt, cond)
        self.carbon, self.time, self.flux_integral = carbon, self.time + dt, self.flux_integral + flux

    def profile(self) -> Profile:
        return Profile(self.nodes.copy(), self.carbon.copy(), self.time, self.geometry.half_section)

    def carbon_uptake(self) -> float:
        """Carbon added to the part since the start, [wt % · m] per unit surface."""
        return float(np.sum(self.volume * (self.carbon - self.core_carbon)))
