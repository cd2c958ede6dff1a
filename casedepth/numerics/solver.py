"""Implicit finite-volume solver for carbon diffusion with a carbon-dependent diffusivity.

The part is cut into control volumes around nodes on a grid graded toward the surface
(:func:`casedepth.geometry.graded_nodes`); node 0 sits on the surface. Fluxes between nodes use D
at the mean carbon of the two nodes. Time integration is the two-stage Rosenbrock method ROS2
(Verwer et al. 1999) with γ = 1 − 1/√2: second order and L-stable (no ringing after the sudden
start of a carburizing step). It is linearly implicit: each stage is one tridiagonal solve with
the exact Jacobian of the discrete fluxes, dD/dC included, evaluated at the start of the step.
The carbon dependence of D is therefore not lagged (a lagged D would make the scheme first
order), and no Newton iterations are needed. The stages are sums of conservative flux
differences, so the carbon added to the part equals the surface flux integrated by the same
scheme, to round-off. Time steps grow geometrically, matching the √t growth of a case.

References
----------
.. [1] Verwer, J. G., E. J. Spee, J. G. Blom, W. Hundsdorfer. "A second-order Rosenbrock method
   applied to photochemical dispersion problems." SIAM J. Sci. Comput. 20 (1999): 1456–1480.
.. [2] Hairer, E., and G. Wanner. Solving Ordinary Differential Equations II: Stiff and
   Differential-Algebraic Problems, 2nd ed., Springer, 1996, §IV.7 (Rosenbrock methods).
.. [3] Patankar, S. V. Numerical Heat Transfer and Fluid Flow. Hemisphere, 1980
   (finite-volume discretisation on non-uniform grids).
"""

from __future__ import annotations

import copy
import math
from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.linalg.lapack import dgtsv

from ..errors import SolverError
from ..models.diffusivity import Diffusivity
from .budget import MAX_STEPS, check
from .geometry import Geometry, extend_nodes, graded_nodes

# ROS2: both roots of 2γ² - 4γ + 1 = 0 give an L-stable method; the smaller has the much smaller
# error constant at the moderate step ratios used here (1 + 1/√2 is chosen in [1] for positivity).
_GAMMA = 1.0 - 1.0 / math.sqrt(2.0)


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
    """Discretisation settings, relative to the problem's own scales.

    The grid spans ``domain`` length scales with ``cells`` cells growing from the surface; time
    steps start at ``first_step`` of the time scale and grow by ``step_growth``. The time scale is
    the soak (or a first estimate of it) and the length scale √(D_max × time scale), so the same
    settings resolve a 0.2 mm case and a 3 mm case alike. The defaults give effective case depth
    to better than 0.1 % (tests/test_convergence.py, tests/test_solver_analytic.py).
    """

    cells: int = 160
    stretch: float = 8.0  # last cell over first cell within the domain
    domain: float = 8.0  # domain depth in length scales (semi-infinite bodies)
    first_step: float = 1e-3  # first time step over the time scale
    step_growth: float = 1.25  # ratio of neighbouring time steps

    def refined(self, factor: int = 2) -> "Accuracy":
        """Settings with cells and time steps about ``factor`` times finer."""
        return Accuracy(self.cells * factor, self.stretch, self.domain, self.first_step / factor,
                        1.0 + (self.step_growth - 1.0) / factor)


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
        Between nodes, the depth is read from the quadratic through the three nearest nodes
        (second-order accurate, like the discretisation), falling back to a straight line where
        the quadratic is not monotone.
        """
        return threshold_depth(self.depth, self.carbon, carbon, self.half_section)

    def carbon_at(self, depth: float) -> float:
        """Carbon [wt %] at ``depth`` [m] (linear between nodes)."""
        return float(np.interp(depth, self.depth, self.carbon))

    def to_dict(self) -> dict:
        """The profile in JSON (units in the key names)."""
        return {"depth_mm": (self.depth * 1e3).tolist(), "carbon_pct": self.carbon.tolist()}


@dataclass
class History:
    """The profile after every step of a march: ``times`` [s] and ``carbon`` [wt %] on the nodes
    ``depth`` [m], in order; the last entry is the final profile."""

    depth: np.ndarray
    times: np.ndarray
    carbon: list[np.ndarray]
    half_section: float = math.inf

    def profile_at(self, time: float) -> Profile:
        """The profile at ``time`` [s], linear in time between steps (for display; clipped to the history)."""
        times = self.times
        if len(times) == 1:
            return Profile(self.depth, self.carbon[0], float(time), self.half_section)
        k = int(np.clip(np.searchsorted(times, time), 1, len(times) - 1))
        w = float(np.clip((time - times[k - 1]) / max(times[k] - times[k - 1], 1e-30), 0.0, 1.0))
        return Profile(self.depth, (1 - w) * self.carbon[k - 1] + w * self.carbon[k], float(time), self.half_section)

    def threshold_depths(self, carbon: float) -> np.ndarray:
        """Depth [m] where each profile of the history falls to ``carbon`` [wt %]."""
        return np.array([threshold_depth(self.depth, c, carbon, self.half_section) for c in self.carbon])


def _tridiagonal(below: np.ndarray, diagonal: np.ndarray, above: np.ndarray, rhs: np.ndarray) -> np.ndarray:
    """Solve a tridiagonal system (LAPACK dgtsv, Gaussian elimination with partial pivoting); inputs are kept."""
    _, _, _, x, info = dgtsv(below, diagonal, above, rhs, 0, 0, 0, 0)
    if info != 0:
        raise SolverError("singular matrix in the carbon solver; the furnace step may be outside the models' range")
    return x


def threshold_depth(depth: np.ndarray, c: np.ndarray, carbon: float, half_section: float = math.inf) -> float:
    """Depth [m] where the profile ``c`` on nodes ``depth`` first falls to ``carbon``; see :meth:`Profile.depth_at`."""
    under = c < carbon
    i = int(under.argmax())
    if not under[i]:
        return float(min(depth[-1], half_section))
    if i == 0:
        return 0.0
    x0, x1, c0, c1 = depth[i - 1], depth[i], c[i - 1], c[i]
    linear = x0 + (c0 - carbon) / (c0 - c1) * (x1 - x0)
    j = i - 1 if i + 1 >= len(c) or (i >= 2 and abs(c[i - 2] - carbon) < abs(c[i + 1] - carbon)) else i
    if j < 1 or j + 1 >= len(c):
        return float(linear)
    # inverse quadratic interpolation x(c) through three nodes around the crossing
    xs, cs = depth[j - 1:j + 2], c[j - 1:j + 2]
    if not (cs[0] > cs[1] > cs[2]):
        return float(linear)
    x = (xs[0] * (carbon - cs[1]) * (carbon - cs[2]) / ((cs[0] - cs[1]) * (cs[0] - cs[2]))
         + xs[1] * (carbon - cs[0]) * (carbon - cs[2]) / ((cs[1] - cs[0]) * (cs[1] - cs[2]))
         + xs[2] * (carbon - cs[0]) * (carbon - cs[1]) / ((cs[2] - cs[0]) * (cs[2] - cs[1])))
    return float(x) if x0 <= x <= x1 else float(linear)


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
    length_scale : float
        √(D t) for the expected soak, about half the case depth, [m]; sets the grid. For a semi-infinite body the
        domain is ``accuracy.domain`` length scales deep and is extended automatically if carbon
        reaches its far end.
    time_scale : float
        About the length of the soak, [s]; sets the first time step.
    accuracy : Accuracy
        Grid and time-step settings.
    """

    #: the far end counts as untouched while its carbon change is below this share of the surface's;
    #: its no-flux wall then acts like a mirror image at over twice the distance, which changes the
    #: carbon near the case depth by far less than round-off (Crank 1975, §2.4, method of images)
    FAR_FIELD_TOLERANCE = 1e-6
    #: linearly implicit Euler steps at the start of each furnace step, before ROS2
    SMOOTHING_STEPS = 2

    def __init__(self, geometry: Geometry, diffusivity: Diffusivity, core_carbon: float,
                 length_scale: float, time_scale: float, accuracy: Accuracy = Accuracy()):
        self.geometry = geometry
        self.diffusivity = diffusivity
        self.core_carbon = float(core_carbon)
        self.accuracy = accuracy
        self.time_scale = float(time_scale)
        self.time = 0.0
        self.flux_integral = 0.0  # carbon that crossed the surface, wt % · m (per unit surface)
        self._set_grid(graded_nodes(accuracy.domain * length_scale, accuracy.cells, accuracy.stretch,
                                    geometry.half_section))
        self._ratio = accuracy.stretch ** (1.0 / max(accuracy.cells - 1, 1))
        self._evaluations: list = []
        self.carbon = np.full(len(self.nodes), self.core_carbon)
        self.history_time: list[float] = [0.0]
        self.history_carbon: list[np.ndarray] = [self.carbon]
        self._history_steps: list[tuple[SurfaceCondition, bool]] = []

    # -- grid -------------------------------------------------------------------------------
    def _set_grid(self, nodes: np.ndarray) -> None:
        g = self.geometry
        self.nodes = nodes
        faces = 0.5 * (nodes[1:] + nodes[:-1])
        self.spacing = np.diff(nodes)
        self.face_area = g.area(faces)
        self.conductance = self.face_area / self.spacing
        bounds = np.concatenate(([0.0], faces, [nodes[-1]]))
        self.volume = g.volume(bounds[:-1], bounds[1:])
        self.surface_area = float(g.area(0.0))

    def _extend(self) -> None:
        old = len(self.nodes)
        self._set_grid(extend_nodes(self.nodes, 1.5 * self.nodes[-1], self._ratio, finite=False))
        self.carbon = np.concatenate((self.carbon, np.full(len(self.nodes) - old, self.core_carbon)))
        self._evaluations = []

    def _plausible(self, carbon: np.ndarray, cond: SurfaceCondition, old_range: tuple[float, float]) -> bool:
        """True if the new carbon stays within the range spanned by the old profile and the atmosphere
        (NaN fails both comparisons, so a blown-up step is caught too)."""
        low = min(old_range[0], cond.equilibrium_carbon)
        high = max(old_range[1], cond.equilibrium_carbon)
        slack = 1e-3 * max(high - low, 1e-3)
        return bool(carbon.min() >= low - slack and carbon.max() <= high + slack)

    def _far_end_touched(self, cond: SurfaceCondition) -> bool:
        if self.geometry.finite:
            return False
        scale = max(abs(cond.equilibrium_carbon - self.core_carbon), abs(self.carbon[0] - self.core_carbon), 1e-12)
        return abs(self.carbon[-1] - self.core_carbon) > self.FAR_FIELD_TOLERANCE * scale

    # -- physics ----------------------------------------------------------------------------
    def _net_inflow(self, flow: np.ndarray, c: np.ndarray, cond: SurfaceCondition) -> np.ndarray:
        """Net inflow of each control volume from the flows through its faces (and the surface)."""
        inflow = np.empty_like(c)
        inflow[0] = 0.0
        inflow[1:] = flow
        inflow[:-1] -= flow
        if math.isfinite(cond.beta):
            inflow[0] += self.surface_area * cond.beta * (cond.equilibrium_carbon - c[0])
        return inflow

    def _inflow_only(self, c: np.ndarray, cond: SurfaceCondition) -> np.ndarray:
        """Net carbon inflow into each control volume (no Jacobian)."""
        D = self.diffusivity(0.5 * (c[1:] + c[:-1]), cond.temperature)
        return self._net_inflow(-self.conductance * D * (c[1:] - c[:-1]), c, cond)

    def _inflow(self, c: np.ndarray, cond: SurfaceCondition):
        """Net carbon inflow into each control volume and the three diagonals of its Jacobian."""
        D, dD = self.diffusivity.with_derivative(0.5 * (c[1:] + c[:-1]), cond.temperature)
        step = c[1:] - c[:-1]
        k = self.conductance
        flow = -k * D * step  # carbon through each internal face, inward positive
        half_slope = 0.5 * dD * step
        d_left = k * (D - half_slope)  # d flow / d c[i]
        d_right = -k * (D + half_slope)  # d flow / d c[i+1]
        main = np.empty_like(c)
        main[-1] = 0.0
        main[:-1] = -d_left
        main[1:] += d_right
        if math.isfinite(cond.beta):
            main[0] -= self.surface_area * cond.beta
        return self._net_inflow(flow, c, cond), main, -d_right, d_left

    def _evaluate(self, c: np.ndarray, cond: SurfaceCondition):
        """Inflow, Jacobian diagonals, surface flow and its slope at ``c``; cached for the last two states."""
        for key, value in self._evaluations:
            if key[0] is c and key[1] == cond:
                return value
        inflow, main, upper, lower = self._inflow(c, cond)
        if math.isfinite(cond.beta):
            surface = self.surface_area * cond.beta * (cond.equilibrium_carbon - c[0])
            slope = (0, -self.surface_area * cond.beta)  # d surface / d c[0]
        else:  # held surface: what crosses the first face inward, and its slope in c[1]
            surface = float(np.sum(inflow[1:]))
            slope = (1, -upper[0])
        value = (inflow, main, upper, lower, surface, slope)
        self._evaluations = [((c, cond), value), *self._evaluations[:1]]
        return value

    def _step(self, dt: float, cond: SurfaceCondition, euler: bool = False, start: np.ndarray | None = None):
        """One ROS2 step from the present state (or ``start``): returns (carbon, carbon through the surface).

        With M = diag(V) and J the Jacobian at y_n:
        (M - γ dt J) k1 = dt F(y_n);  (M - γ dt J) k2 = dt F(y_n + k1) - 2 M k1;
        y_(n+1) = y_n + 3/2 k1 + 1/2 k2.
        """
        c0 = self.carbon if start is None else start
        flux = 0.0
        held = not math.isfinite(cond.beta)
        if held and c0[0] != cond.equilibrium_carbon:
            # a held surface jumps to its new value at once; that carbon enters at once
            flux += self.volume[0] * (cond.equilibrium_carbon - c0[0])
            c0 = c0.copy()
            c0[0] = cond.equilibrium_carbon
        inflow0, main, upper, lower, surface0, (j, slope) = self._evaluate(c0, cond)
        g = (1.0 if euler else _GAMMA) * dt
        diagonal = self.volume - g * main
        above = -g * upper
        below = -g * lower
        rhs1 = dt * inflow0
        if held:
            diagonal[0], above[0], rhs1[0] = 1.0, 0.0, 0.0
        k1 = _tridiagonal(below, diagonal, above, rhs1)
        if euler:
            # linearly implicit Euler, (M - dt J) k = dt F: first order, but its amplification
            # 1/(1 - z) is positive for every mode, so it smooths a sudden change at the surface
            # before ROS2 (whose internal stage overshoots on rough data) takes over
            return c0 + k1, flux + dt * surface0 + g * slope * k1[j]
        mid = c0 + k1
        inflow1 = self._inflow_only(mid, cond)
        rhs2 = dt * inflow1 - 2.0 * self.volume * k1
        if held:
            rhs2[0] = 0.0
            surface1 = float(np.sum(inflow1[1:]))
        else:
            surface1 = self.surface_area * cond.beta * (cond.equilibrium_carbon - mid[0])
        k2 = _tridiagonal(below, diagonal, above, rhs2)
        carbon = c0 + 1.5 * k1 + 0.5 * k2
        # the same combination of the two stage equations, summed over all volumes (internal
        # fluxes cancel), gives the carbon that crossed the surface
        flux += 0.5 * (dt * surface0 + g * slope * k1[j]) + 0.5 * (dt * surface1 + g * slope * k2[j])
        return carbon, flux

    # -- public -----------------------------------------------------------------------------
    def advance(self, duration: float, condition: SurfaceCondition | Callable[[float], SurfaceCondition],
                on_step: Callable[["CarbonSolver"], bool] | None = None, max_step: float = math.inf) -> None:
        """March ``duration`` [s] under one surface condition, or a condition that changes with time.

        ``condition`` is a :class:`SurfaceCondition`, or a function of the time [s] since the start
        of this call giving one (a ramp); each step then uses the condition at its middle, which
        keeps second order for smooth ramps (midpoint rule). Every step is kept in the history
        (:attr:`history_time`, :attr:`history_carbon`). ``on_step(solver)`` is called after every
        step; if it returns True the march stops there. Steps start at ``first_step`` of the time
        scale and grow by ``step_growth`` up to ``max_step``; the first ``SMOOTHING_STEPS`` of each
        call are linearly implicit Euler steps.
        """
        acc = self.accuracy
        start = self.time
        end = self.time + duration
        dt = min(acc.first_step * self.time_scale, max_step)
        smoothing = self.SMOOTHING_STEPS
        carbon_range = (float(self.carbon.min()), float(self.carbon.max()))
        steps = 0
        while end - self.time > 1e-12 * max(end, 1.0):
            check()
            steps += 1
            if steps > MAX_STEPS:
                raise SolverError(f"the carbon solver took over {MAX_STEPS} steps for one stage of "
                                  f"{duration / 3600:g} h; the inputs may be outside the models' range")
            h = min(dt, end - self.time)
            cond = condition if isinstance(condition, SurfaceCondition) else condition(self.time - start + h / 2)
            euler = smoothing > 0
            carbon, flux = self._step(h, cond, euler)
            if not self._plausible(carbon, cond, carbon_range):
                # carbon outside the range the surface and the part allow: the step was too
                # long for the data (a maximum principle holds for diffusion); take half of it
                if h < 1e-9 * max(self.time_scale, 1.0):
                    raise SolverError("the carbon solver cannot find a stable step; the inputs may be outside the models' range")
                dt = h / 2
                smoothing = max(smoothing, 1)
                continue
            state = (self.carbon, self.flux_integral)
            self.carbon, self.flux_integral = carbon, self.flux_integral + flux
            if self._far_end_touched(cond):
                self.carbon, self.flux_integral = state
                self._extend()
                continue
            smoothing -= 1
            carbon_range = (min(carbon_range[0], float(carbon.min())), max(carbon_range[1], float(carbon.max())))
            self.time += h
            self.history_time.append(self.time)
            self.history_carbon.append(carbon)
            self._history_steps.append((cond, euler))
            if on_step is not None and on_step(self):
                return
            dt = min(dt * acc.step_growth, max_step)

    def wait(self, duration: float) -> None:
        """Let ``duration`` [s] pass with the carbon frozen (quench, wash, temper, load below Ac3)."""
        self.time += duration
        self.history_time.append(self.time)
        self.history_carbon.append(self.carbon)
        self._history_steps.append((None, False))

    def fork(self, carbon: np.ndarray | None = None, time: float | None = None) -> "CarbonSolver":
        """A new solver on this grid starting from ``carbon`` [wt %] at ``time`` [s] (default: the
        present state), with a history of its own; this solver is not changed."""
        twin = copy.copy(self)
        twin.carbon = self.carbon if carbon is None else np.asarray(carbon, dtype=float)
        twin.time = self.time if time is None else float(time)
        twin.flux_integral = twin.carbon_uptake()  # carbon present at the start counts as taken up before
        twin.history_time = [twin.time]
        twin.history_carbon = [twin.carbon]
        twin._history_steps = []
        twin._evaluations = []
        return twin

    def snapshot(self, index: int) -> np.ndarray:
        """Carbon [wt %] after step ``index`` of the history (0 = the start), on the present grid."""
        carbon = self.history_carbon[index]
        if len(carbon) < len(self.nodes):
            carbon = np.concatenate((carbon, np.full(len(self.nodes) - len(carbon), self.core_carbon)))
        return carbon

    def retake(self, index: int, dt: float) -> Profile:
        """Step ``index`` of the history taken again, but only ``dt`` [s] long; the state is not changed."""
        cond, euler = self._history_steps[index - 1]
        if cond is None:
            return Profile(self.nodes, self.snapshot(index - 1), self.history_time[index - 1] + dt, self.geometry.half_section)
        carbon, _ = self._step(dt, cond, euler, start=self.snapshot(index - 1))
        return Profile(self.nodes, carbon, self.history_time[index - 1] + dt, self.geometry.half_section)

    def history(self, last: int | None = None, final: Profile | None = None) -> History:
        """The history up to step ``last`` (default: all of it), on the present grid; with ``final``, the
        steps before ``last`` and then that profile (a step re-taken to a shorter length)."""
        last = len(self.history_time) - 1 if last is None else last
        if final is None:
            times = self.history_time[:last + 1]
            carbon = [self.snapshot(k) for k in range(last + 1)]
        else:
            times = [*self.history_time[:last], final.time]
            carbon = [*(self.snapshot(k) for k in range(last)), final.carbon]
        return History(self.nodes.copy(), np.array(times), carbon, self.geometry.half_section)

    def threshold_depth(self, carbon: float) -> float:
        """Depth [m] where the present profile falls to ``carbon`` [wt %]."""
        return threshold_depth(self.nodes, self.carbon, carbon, self.geometry.half_section)

    def profile(self) -> Profile:
        return Profile(self.nodes.copy(), self.carbon.copy(), self.time, self.geometry.half_section)

    def carbon_uptake(self) -> float:
        """Carbon added to the part since the start, [wt % · m] per unit surface."""
        return float(np.sum(self.volume * (self.carbon - self.core_carbon)))
