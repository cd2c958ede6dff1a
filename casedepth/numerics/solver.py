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
scheme, to round-off. Time steps grow geometrically, matching the √t growth of a case. A march
starts with two smoothing steps: linearly implicit Euler extrapolated to second order for a
finite mass-transfer coefficient, plain linearly implicit Euler after the jump of a held surface.

The step is written for speed as well (one exponential gives D and dD/dC for the exponential
diffusivities, fused flux and Jacobian, LAPACK ``dgtsv`` without copies where the matrix is not
needed again); ``benchmarks/bench_carburize.py`` measures it against two peers.

References
----------
.. [1] Verwer, J. G., E. J. Spee, J. G. Blom, W. Hundsdorfer. "A second-order Rosenbrock method
   applied to photochemical dispersion problems." SIAM J. Sci. Comput. 20 (1999): 1456–1480.
.. [2] Hairer, E., and G. Wanner. Solving Ordinary Differential Equations II: Stiff and
   Differential-Algebraic Problems, 2nd ed., Springer, 1996, §IV.7 (Rosenbrock methods).
.. [3] Patankar, S. V. Numerical Heat Transfer and Fluid Flow. Hemisphere, 1980
   (finite-volume discretisation on non-uniform grids).
.. [4] Deuflhard, P. "Recent progress in extrapolation methods for ordinary differential
   equations." SIAM Review 27 (1985): 505–535 (linearly implicit Euler with extrapolation);
   Hairer & Wanner [2], §IV.9.
"""

from __future__ import annotations

import copy
import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..errors import SolverError
from ..models.diffusivity import Diffusivity
from ..models.surface import beta_at
from .budget import MAX_STEPS, check_signal, signal
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
    influx : float
        A constant carbon flux into the surface on top of the mass transfer, [wt % · m/s] (the carbon a
        low-pressure boost delivers before the surface saturates; used with ``beta`` = 0, and
        ``equilibrium_carbon`` the limit the march stops at, which bounds the plausibility check).
    """

    temperature: float
    equilibrium_carbon: float
    beta: float
    influx: float = 0.0


@dataclass(frozen=True)
class Ramp:
    """A surface condition that moves linearly in time: temperature [K] and carbon potential [wt %] from their
    values at the start to those at ``span`` [s], the equilibrium surface carbon the potential times
    ``alloy_factor``; ``beta`` [m/s] as in :class:`SurfaceCondition`, at ``temperature_to``, and changing with the
    temperature by ``beta_activation`` [J/mol] (Arrhenius; 0: constant). Called with a time [s] since the start
    it gives the condition then (held at the ends outside 0–span)."""

    temperature_from: float
    temperature_to: float
    potential_from: float
    potential_to: float
    alloy_factor: float
    beta: float
    span: float
    beta_activation: float = 0.0

    @classmethod
    def constant(cls, condition: SurfaceCondition) -> Ramp:
        """A condition that does not move, as a ramp (its potential is the equilibrium carbon, factor 1); a ramp
        carries no constant influx."""
        if condition.influx:
            raise ValueError("a surface condition with a constant influx is not a ramp")
        return cls(condition.temperature, condition.temperature, condition.equilibrium_carbon,
                   condition.equilibrium_carbon, 1.0, condition.beta, 1.0)

    def __call__(self, t: float) -> SurfaceCondition:
        w = min(max(t / self.span, 0.0), 1.0)
        T = self.temperature_from + w * (self.temperature_to - self.temperature_from)
        return SurfaceCondition(T, (self.potential_from + w * (self.potential_to - self.potential_from)) * self.alloy_factor,
                                beta_at(self.beta, self.beta_activation, self.temperature_to, T))


@dataclass(frozen=True)
class Accuracy:
    """Discretisation settings, relative to the problem's own scales.

    The grid spans ``domain`` length scales with ``cells`` cells growing from the surface; time
    steps start at ``first_step`` of the time scale and grow by ``step_growth``. The time scale is
    the soak (or a first estimate of it) and the length scale √(D_max × time scale), so the same
    settings resolve a 0.2 mm case and a 3 mm case alike. The defaults give the soak time and the
    effective case depth to better than 0.1 % over the whole valid domain (880–1050 °C, any potential
    up to saturation, 0.2–3 mm, every geometry, finite and infinite β; tests/test_accuracy_domain.py
    draws 200 cases and compares each with a 4× refined solve). ROS2's time error dominates there:
    with steps growing by 1.25 it reached 0.12 % on a few cases in 100 (held surfaces with a strongly
    carbon-dependent D, deep cases on spheres); with 1.15, and the extrapolated start of a finite-β
    march (:meth:`CarbonSolver._smoothing_step`), the worst of 800 drawn cases was 0.07 %.

    A march from the core's uniform carbon starts with steps of ``first_step`` (5e-3) of the time scale:
    errors made while the case is thin barely reach the depth at the end of the soak, and over 1000 drawn
    cases (five seeds of the test above) the worst error was 0.062–0.071 % with 5e-3 as with 1e-3, in 26
    steps instead of 35. A furnace step after another (a diffuse after a boost, the soak after the heat-up, a
    pulse) starts from a case already there and may be short against the time scale: it starts with
    ``restart_step`` (1e-3), as every march did before.
    """

    cells: int = 160
    stretch: float = 8.0  # last cell over first cell within the domain
    domain: float = 8.0  # domain depth in length scales (semi-infinite bodies)
    first_step: float = 5e-3  # first time step over the time scale, from the core's uniform carbon
    step_growth: float = 1.15  # ratio of neighbouring time steps
    restart_step: float = 1e-3  # first time step over the time scale of a furnace step after another

    def refined(self, factor: int = 2) -> Accuracy:
        """Settings with cells and time steps about ``factor`` times finer."""
        return Accuracy(self.cells * factor, self.stretch, self.domain, self.first_step / factor,
                        1.0 + (self.step_growth - 1.0) / factor, self.restart_step / factor)

    def start_step(self, fresh: bool) -> float:
        """The first time step over the time scale: ``first_step`` for a march from the core's uniform carbon
        (``fresh``), else ``restart_step``."""
        return self.first_step if fresh else self.restart_step


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


_lapack = None  # LAPACK's tridiagonal routines (dgtsv, dgttrf, dgttrs), once loaded


def _load_lapack():
    global _lapack
    if _lapack is None:  # imported on first use: scipy.linalg takes a third of a second to import
        from scipy.linalg.lapack import dgtsv, dgttrf, dgttrs
        _lapack = (dgtsv, dgttrf, dgttrs)
    return _lapack


def _singular() -> SolverError:
    return SolverError("singular matrix in the carbon solver; the furnace step may be outside the models' range")


def _tridiagonal(below: np.ndarray, diagonal: np.ndarray, above: np.ndarray, rhs: np.ndarray) -> np.ndarray:
    """Solve a tridiagonal system (LAPACK dgtsv, Gaussian elimination with partial pivoting). The matrix and the
    right-hand side are overwritten, the right-hand side with the solution (a matrix solved twice is factored once,
    :func:`_factored`)."""
    dgtsv = (_lapack or _load_lapack())[0]
    _, _, _, x, info = dgtsv(below, diagonal, above, rhs, 1, 1, 1, 1)
    if info != 0:
        raise _singular()
    return x


def _factored(below: np.ndarray, diagonal: np.ndarray, above: np.ndarray):
    """A solver for the tridiagonal matrix (below, diagonal, above), factored once (LAPACK dgttrf, the same
    elimination with partial pivoting as dgtsv; the arrays are overwritten): called with a right-hand side it
    overwrites it with the solution (dgttrs) and returns it."""
    _, dgttrf, dgttrs = _lapack or _load_lapack()
    dl, d, du, du2, ipiv, info = dgttrf(below, diagonal, above, 1, 1, 1)
    if info != 0:
        raise _singular()

    def solve(rhs: np.ndarray) -> np.ndarray:
        return dgttrs(dl, d, du, du2, ipiv, rhs, "N", 1)[0]
    return solve


def threshold_depth(depth: np.ndarray, c: np.ndarray, carbon: float, half_section: float = math.inf) -> float:
    """Depth [m] where the profile ``c`` on nodes ``depth`` first falls to ``carbon``; see :meth:`Profile.depth_at`."""
    i = int((c < carbon).argmax())  # the first node under the threshold (0 if there is none, or the surface is)
    if i == 0:
        return 0.0 if c[0] < carbon else float(min(depth[-1], half_section))
    # the few nodes around the crossing as Python floats: scalar arithmetic on them is several times
    # faster than on numpy scalars, and this runs after every step of a march
    lo = max(i - 2, 0)
    xs, cs = depth[lo:i + 2].tolist(), c[lo:i + 2].tolist()
    m = i - lo  # position of node i in the window
    x0, x1, c0, c1 = xs[m - 1], xs[m], cs[m - 1], cs[m]
    linear = x0 + (c0 - carbon) / (c0 - c1) * (x1 - x0)
    last = m + 1 >= len(cs)
    j = m - 1 if last or (m >= 2 and abs(cs[m - 2] - carbon) < abs(cs[m + 1] - carbon)) else m
    if j < 1 or j + 1 >= len(cs) or (lo + j < 1):
        return linear
    # inverse quadratic interpolation x(c) through three nodes around the crossing
    (xa, xb, xc), (ca, cb, cc) = xs[j - 1:j + 2], cs[j - 1:j + 2]
    if not (ca > cb > cc):
        return linear
    x = (xa * (carbon - cb) * (carbon - cc) / ((ca - cb) * (ca - cc))
         + xb * (carbon - ca) * (carbon - cc) / ((cb - ca) * (cb - cc))
         + xc * (carbon - ca) * (carbon - cb) / ((cc - ca) * (cc - cb)))
    return x if x0 <= x <= x1 else linear


class _Work:
    """Arrays a step writes into and reads back within itself, kept between steps (allocating them each step
    cost as much as the arithmetic at the usual 160 nodes).

    ``flows`` holds, for the stage being worked out, the flow through every face in the direction of the
    surface: [−surface inflow, flow through face 0, …, flow through face n−2, 0 (the far end's wall)], so that
    the net inflow of every control volume is one difference of it (:meth:`CarbonSolver._net_inflow`)."""

    def __init__(self, n: int):
        self.kD = np.empty(n - 1)  # the faces' conductance times D at a stage
        self.above, self.below = np.empty(n - 1), np.empty(n - 1)  # the matrix's off-diagonals
        self.flows = np.zeros(n + 1)
        # views, made once: a slice costs as much as a small ufunc call
        self.flow, self.flows_in, self.flows_out = self.flows[1:-1], self.flows[1:], self.flows[:-1]
        self.diagonal = np.empty(n)
        self.diagonal_head, self.diagonal_tail = self.diagonal[:-1], self.diagonal[1:]
        self.rhs = np.empty(n)
        self.rhs2 = np.empty(n)
        self.mid = np.empty(n)


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
        self._finite = geometry.finite
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
        self.carbon = self._uniform = np.full(len(self.nodes), self.core_carbon)
        self.history_time: list[float] = [0.0]
        self.history_carbon: list[np.ndarray] = [self.carbon]
        self._history_steps: list[tuple[SurfaceCondition, bool]] = []
        self._history_flux: list[float] = []  # carbon through the surface in each step, wt % · m

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
        self._volume_head, self._volume_last = self.volume[:-1], float(self.volume[-1])
        self.surface_area = float(g.area(0.0))
        self._work = _Work(len(nodes))
        self._kernel = None  # (T [K], the faces' (k·A, s/2)) for this grid, see _face_kernel
        self._shallower = None  # (depth, the last node above it) for March's test of a depth not yet reached

    def _extend(self) -> None:
        old = len(self.nodes)
        self._set_grid(extend_nodes(self.nodes, 1.5 * self.nodes[-1], self._ratio, finite=False))
        self.carbon = np.concatenate((self.carbon, np.full(len(self.nodes) - old, self.core_carbon)))
        self._evaluations = []

    def _far_end_touched(self, cond: SurfaceCondition) -> bool:
        """Whether a semi-infinite part's carbon has reached the far end of its grid (see FAR_FIELD_TOLERANCE)."""
        core = self.core_carbon
        first, last = float(self.carbon[0]), float(self.carbon[-1])
        scale = max(abs(cond.equilibrium_carbon - core), abs(first - core), 1e-12)
        return abs(last - core) > self.FAR_FIELD_TOLERANCE * scale

    # -- physics ----------------------------------------------------------------------------
    def _face_kernel(self, T: float):
        """(k·A, s/2) for D = A·exp(s·C) on the faces at ``T`` [K] (k the faces' conductance), or None where
        the model has no such form; cached per temperature and grid."""
        if self._kernel is None or self._kernel[0] != T:
            form = self.diffusivity.exponential_form(T)
            value = None if form is None else (self.conductance * form[0], 0.5 * form[1])
            self._kernel = (T, value)
        return self._kernel[1]

    def _face_flows(self, c: np.ndarray, T: float, jacobian: bool, out: np.ndarray | None = None):
        """Flow into each node from the next one through their face, k·D·(c[i+1] − c[i]), written into ``out`` if
        given, and with ``jacobian`` its slopes in c[i+1] and −c[i] (D taken at the faces' mean carbon, dD/dC
        included)."""
        cached = self._kernel
        kernel = cached[1] if cached is not None and cached[0] == T else self._face_kernel(T)
        inner, outer = c[1:], c[:-1]
        kD = np.add(inner, outer, out=self._work.kD)
        if kernel is not None:  # D = A·exp(s·C): one exponential gives D and dD/dC = s·D
            kA, half_s = kernel
            np.multiply(kD, half_s, out=kD)
            np.exp(kD, out=kD)
            np.multiply(kD, kA, out=kD)
        else:
            np.multiply(kD, 0.5, out=kD)
            D, dD = self.diffusivity.with_derivative(kD, T) if jacobian else (self.diffusivity(kD, T), None)
            kD = self.conductance * D
        flow = np.subtract(inner, outer, out=out)
        np.multiply(flow, kD, out=flow)
        if not jacobian:
            return flow, None, None
        # d flow / d c[i+1] = kD + u and d flow / d c[i] = −(kD − u), with u = ½ k dD/dC (c[i+1] − c[i])
        if kernel is not None:
            u = np.multiply(flow, kernel[1])
        else:
            u = np.subtract(inner, outer)
            u *= 0.5 * self.conductance * dD
        return flow, np.add(kD, u), np.subtract(kD, u, out=u)

    def _surface_flow(self, flow: np.ndarray, c0: float, cond: SurfaceCondition) -> float:
        """Carbon entering through the surface: β·A·(C_eq − c0), or for a held surface what crosses the
        first face inward."""
        if math.isfinite(cond.beta):
            return self.surface_area * (cond.beta * (cond.equilibrium_carbon - c0) + cond.influx)
        return -float(flow[0])

    def _net_inflow(self, surface: float, held: bool, out: np.ndarray | None = None) -> np.ndarray:
        """Net inflow of each control volume from the flows through its faces, :attr:`_Work.flow` (written there by
        :meth:`_face_flows`), and the surface (not for a held surface, whose row is replaced), written into ``out``
        if given."""
        w = self._work
        w.flows[0] = 0.0 if held else -surface
        return np.subtract(w.flows_in, w.flows_out, out=out)

    def _evaluate(self, c: np.ndarray, cond: SurfaceCondition):
        """Inflow, the Jacobian's couplings to the next node (``upper``) and from the node before (``lower``),
        surface flow and its slope at ``c``; cached for the last two states (a step re-taken shorter
        starts from the same state)."""
        for key, value in self._evaluations:
            if key[0] is c and key[1] == cond:
                return value
        flow, upper, lower = self._face_flows(c, cond.temperature, True, self._work.flow)
        held = not math.isfinite(cond.beta)
        surface = self._surface_flow(flow, float(c[0]), cond)
        inflow = self._net_inflow(surface, held)
        # d surface / d c[0] at a finite β; a held surface's flow changes with c[1]
        slope = (1, -float(upper[0])) if held else (0, -self.surface_area * cond.beta)
        value = (inflow, upper, lower, surface, slope)
        self._evaluations = [((c, cond), value), *self._evaluations[:1]]
        return value

    def _system(self, upper: np.ndarray, lower: np.ndarray, g: float, inflow: np.ndarray, dt: float,
                cond: SurfaceCondition):
        """The tridiagonal system (M − g J) k = dt F of one stage: (below, diagonal, above, right-hand side), in
        the step's work arrays (good until the next system); a held surface's row says k[0] = 0."""
        w = self._work
        above = np.multiply(upper, -g, out=w.above)
        below = np.multiply(lower, -g, out=w.below)
        diagonal = w.diagonal
        np.subtract(self._volume_head, below, out=w.diagonal_head)
        diagonal[-1] = self._volume_last
        np.subtract(w.diagonal_tail, above, out=w.diagonal_tail)
        rhs = np.multiply(inflow, dt, out=w.rhs)
        if math.isfinite(cond.beta):
            diagonal[0] += g * self.surface_area * cond.beta
        else:
            diagonal[0], above[0], rhs[0] = 1.0, 0.0, 0.0
        return below, diagonal, above, rhs

    def _step(self, dt: float, cond: SurfaceCondition, euler: bool = False, start: np.ndarray | None = None):
        """One ROS2 step from the present state (or ``start``): returns (carbon, carbon through the surface).

        With M = diag(V) and J the Jacobian at y_n:
        (M - γ dt J) k1 = dt F(y_n);  (M - γ dt J) k2 = dt F(y_n + k1) - 2 M k1;
        y_(n+1) = y_n + 3/2 k1 + 1/2 k2.
        J couples node i to i+1 by upper[i] and node i+1 to i by lower[i]; its diagonal is
        −lower[i] − upper[i−1] (− β·A at a surface with finite β). The matrix is factored once for both
        stages, and the second is solved for k2/2 directly (its right-hand side halved, exactly in binary
        floating point, so the numbers are those of solving for k2 and halving).
        """
        c0 = self.carbon if start is None else start
        flux = 0.0
        held = not math.isfinite(cond.beta)
        if held and c0[0] != cond.equilibrium_carbon:
            # a held surface jumps to its new value at once; that carbon enters at once
            flux += self.volume[0] * (cond.equilibrium_carbon - c0[0])
            c0 = c0.copy()
            c0[0] = cond.equilibrium_carbon
        if euler and not held:
            return self._smoothing_step(c0, dt, cond, flux)
        inflow0, upper, lower, surface0, (j, slope) = self._evaluate(c0, cond)
        g = (1.0 if euler else _GAMMA) * dt
        below, diagonal, above, rhs1 = self._system(upper, lower, g, inflow0, dt, cond)
        if euler:
            # linearly implicit Euler, (M - dt J) k = dt F: first order, but its amplification
            # 1/(1 - z) is positive for every mode, so it smooths the jump of a held surface before
            # ROS2 (whose internal stage overshoots on rough data) takes over. Extrapolating it, as
            # for a finite β, assumes a smooth solution and made the start worse after a jump
            # (0.12 % instead of 0.04 % on a held 20MnCr5 shaft, tests/test_accuracy_domain.py)
            k1 = _tridiagonal(below, diagonal, above, rhs1)
            return np.add(c0, k1), flux + dt * surface0 + g * slope * k1[j]
        w = self._work
        solve = _factored(below, diagonal, above)  # the matrix factored once for both stages
        k1 = solve(rhs1)
        mid = np.add(c0, k1, out=w.mid)
        flow1, _, _ = self._face_flows(mid, cond.temperature, False, w.flow)
        surface1 = self._surface_flow(flow1, float(mid[0]), cond)
        rhs2 = self._net_inflow(surface1, held, w.rhs2)
        rhs2 *= 0.5 * dt
        rhs2 -= np.multiply(self.volume, k1, out=w.mid)
        if held:
            rhs2[0] = 0.0
        half_k2 = solve(rhs2)
        # the same combination of the two stage equations, summed over all volumes (internal
        # fluxes cancel), gives the carbon that crossed the surface
        flux += 0.5 * (dt * surface0 + g * slope * k1[j]) + 0.5 * (dt * surface1 + g * slope * (2.0 * half_k2[j]))
        carbon = np.multiply(k1, 1.5)
        carbon += c0
        carbon += half_k2
        return carbon, flux

    def _euler(self, c: np.ndarray, h: float, cond: SurfaceCondition, evaluation) -> tuple[np.ndarray, float]:
        """One linearly implicit Euler step of ``h`` [s] from ``c`` with the Jacobian of ``evaluation`` and the
        inflow at ``c``: (carbon, carbon through the surface)."""
        inflow, upper, lower, surface, (j, slope) = evaluation
        k = _tridiagonal(*self._system(upper, lower, h, inflow, h, cond))
        return np.add(c, k), h * surface + h * slope * k[j]

    def _smoothing_step(self, c0: np.ndarray, dt: float, cond: SurfaceCondition, flux: float):
        """One step of linearly implicit Euler extrapolated (Deuflhard 1985): twice two half steps minus one
        whole, the Jacobian of the start kept throughout. Second order, and L-stable — its amplification
        2/(1 − z/2)² − 1/(1 − z) vanishes for the stiffest modes — so it starts a march from a sudden
        change at the surface without the first-order error of plain Euler steps."""
        evaluation = self._evaluate(c0, cond)
        whole, through_whole = self._euler(c0, dt, cond, evaluation)
        half, through_1 = self._euler(c0, 0.5 * dt, cond, evaluation)
        flow, _, _ = self._face_flows(half, cond.temperature, False, self._work.flow)
        surface = self._surface_flow(flow, float(half[0]), cond)
        held = not math.isfinite(cond.beta)
        at_half = (self._net_inflow(surface, held), *evaluation[1:3], surface, evaluation[4])
        two, through_2 = self._euler(half, 0.5 * dt, cond, at_half)
        two *= 2.0
        two -= whole
        return two, flux + 2.0 * (through_1 + through_2) - through_whole

    # -- public -----------------------------------------------------------------------------
    def advance(self, duration: float, condition: SurfaceCondition | Callable[[float], SurfaceCondition],
                on_step: Callable[[CarbonSolver], bool] | None = None, max_step: float = math.inf) -> None:
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
        dt = min(acc.start_step(self.fresh) * self.time_scale, max_step)
        smoothing = self.SMOOTHING_STEPS
        low, high = float(self.carbon.min()), float(self.carbon.max())  # the range the profile has spanned
        stop = signal()
        steps = 0
        while end - self.time > 1e-12 * max(end, 1.0):
            if stop is not None:
                check_signal(stop)
            steps += 1
            if steps > MAX_STEPS:
                raise SolverError(f"the carbon solver took over {MAX_STEPS} steps for one stage of "
                                  f"{duration / 3600:g} h; the inputs may be outside the models' range")
            euler = smoothing > 0
            h = min(dt, end - self.time)
            cond = condition if isinstance(condition, SurfaceCondition) else condition(self.time - start + h / 2)
            carbon, flux = self._step(h, cond, euler)
            # plausible if the new carbon stays within the range spanned by the profile so far and the atmosphere,
            # with a slack of 1e-3 of it (NaN fails both comparisons, so a blown-up step is caught too)
            new_low, new_high = float(np.minimum.reduce(carbon)), float(np.maximum.reduce(carbon))
            equilibrium = cond.equilibrium_carbon
            bottom = low if low < equilibrium else equilibrium
            top = high if high > equilibrium else equilibrium
            slack = 1e-3 * max(top - bottom, 1e-3)
            if not (new_low >= bottom - slack and new_high <= top + slack):
                # carbon outside the range the surface and the part allow: the step was too
                # long for the data (a maximum principle holds for diffusion); take half of it
                if h < 1e-9 * max(self.time_scale, 1.0):
                    raise SolverError("the carbon solver cannot find a stable step; the inputs may be outside the models' range")
                dt = h / 2
                smoothing = max(smoothing, 1)
                continue
            state = (self.carbon, self.flux_integral)
            self.carbon, self.flux_integral = carbon, self.flux_integral + flux
            if not self._finite and carbon[-1] != self.core_carbon and self._far_end_touched(cond):
                self.carbon, self.flux_integral = state
                self._extend()
                continue
            smoothing -= 1
            if new_low < low:
                low = new_low
            if new_high > high:
                high = new_high
            self.time += h
            self.history_time.append(self.time)
            self.history_carbon.append(carbon)
            self._history_steps.append((cond, euler))
            self._history_flux.append(flux)
            if on_step is not None and on_step(self):
                return
            dt = min(dt * acc.step_growth, max_step)

    def last_node_above(self, depth: float) -> int:
        """Index of the last node shallower than ``depth`` [m] (−1 if there is none); kept for the grid."""
        if self._shallower is None or self._shallower[0] != depth:
            self._shallower = (depth, int(np.searchsorted(self.nodes, depth)) - 1)
        return self._shallower[1]

    @property
    def fresh(self) -> bool:
        """Whether the carbon is still the core's, the same everywhere (a march from here takes
        :attr:`Accuracy.first_step`)."""
        if self.carbon is self._uniform:  # the start's own array (a solver never changes its carbon in place)
            return True
        return bool(np.all(self.carbon == self.core_carbon))

    def wait(self, duration: float) -> None:
        """Let ``duration`` [s] pass with the carbon frozen (quench, wash, temper, load below Ac3)."""
        self.time += duration
        self.history_time.append(self.time)
        self.history_carbon.append(self.carbon)
        self._history_steps.append((None, False))
        self._history_flux.append(0.0)

    def fork(self, carbon: np.ndarray | None = None, time: float | None = None) -> CarbonSolver:
        """A new solver on this grid starting from ``carbon`` [wt %] at ``time`` [s] (default: the
        present state), with a history of its own; this solver is not changed."""
        twin = copy.copy(self)
        twin.carbon = self.carbon if carbon is None else np.asarray(carbon, dtype=float)
        twin.time = self.time if time is None else float(time)
        twin.flux_integral = twin.carbon_uptake()  # carbon present at the start counts as taken up before
        twin.history_time = [twin.time]
        twin.history_carbon = [twin.carbon]
        twin._history_steps = []
        twin._history_flux = []
        twin._evaluations = []
        twin._work = _Work(len(self.nodes))  # its own: the two may step on different threads
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

    def shorten_last_step(self, dt: float) -> None:
        """Take the last step of the march again, only ``dt`` [s] long, and make that the present state (an event
        inside the step — the surface reaching a limit — landed on by the caller's root search with
        :meth:`retake`). The history's last entry and the carbon through the surface follow."""
        index = len(self.history_time) - 1
        cond, euler = self._history_steps[index - 1]
        if cond is None:
            raise ValueError("the last step took only time (no carbon moved)")
        carbon, flux = self._step(dt, cond, euler, start=self.snapshot(index - 1))
        self.flux_integral += flux - self._history_flux[-1]
        self._history_flux[-1] = flux
        self.carbon = carbon
        self.time = self.history_time[index - 1] + dt
        self.history_time[-1] = self.time
        self.history_carbon[-1] = carbon

    def history(self, last: int | None = None, final: Profile | None = None) -> History:
        """The history up to step ``last`` (default: all of it), on the present grid; with ``final``, the
        steps before ``last`` and then that profile (a step re-taken to a shorter length)."""
        last = len(self.history_time) - 1 if last is None else last
        n = len(self.nodes)
        kept = last + 1 if final is None else last
        # as snapshot() gives them: a profile from before the grid was extended padded with the core's carbon
        carbon = [c if len(c) == n else self.snapshot(k) for k, c in enumerate(self.history_carbon[:kept])]
        if final is None:
            times = self.history_time[:last + 1]
        else:
            times = [*self.history_time[:last], final.time]
            carbon.append(final.carbon)
        return History(self.nodes.copy(), np.array(times), carbon, self.geometry.half_section)

    def threshold_depth(self, carbon: float) -> float:
        """Depth [m] where the present profile falls to ``carbon`` [wt %]."""
        return threshold_depth(self.nodes, self.carbon, carbon, self.geometry.half_section)

    def profile(self) -> Profile:
        return Profile(self.nodes.copy(), self.carbon.copy(), self.time, self.geometry.half_section)

    def carbon_uptake(self) -> float:
        """Carbon added to the part since the start, [wt % · m] per unit surface."""
        return float(np.sum(self.volume * (self.carbon - self.core_carbon)))
