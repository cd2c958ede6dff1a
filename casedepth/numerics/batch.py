"""Many carbon solvers marched together: the steps each would take alone, on 2-D arrays.

A chart, a load's spread of parts or a study solves many independent cases of one kind. Alone, each
step of :class:`~casedepth.numerics.solver.CarbonSolver` is some fifty small numpy calls on about 160
nodes, and the calls, not the arithmetic, are what it costs. :class:`BatchMarch` takes solvers with the
same number of nodes, stacks their grids and profiles as the rows of 2-D arrays, and advances every row
by the very step it would take alone: the same ROS2 stages (Verwer et al. 1999) and smoothing start, the
same step lengths (each row's own time scale and growth), the same conditions at the steps' middles.
The rows' tridiagonal systems are laid end to end, uncoupled, in one LAPACK ``dgtsv`` call; with no
coupling between blocks, Gaussian elimination never pivots across them, so each row's solution is the
one it gets alone. A batch therefore gives each row's numbers to round-off, not to a tolerance
(tests/test_batch.py checks them against the one-by-one solves).

What a single march does in exceptional cases — halve a step that left the range the surface and the part
allow, extend a semi-infinite grid whose far end the carbon reached, stop after too many steps — a batch
does not: such a row is marked :attr:`BatchMarch.failed` and left where it was, and the caller solves it
alone (so it gets the exact single-solver treatment, or the error the single path raises). The batch
keeps no history of steps: a row's results are its final profile and what crossed its surface.

Only diffusivities with the exponential form D = A·exp(s·C) (Tibbetts 1980; a constant Arrhenius D)
can be batched (:func:`batchable`); a row with another model is solved alone.

References
----------
.. [1] Verwer, J. G., E. J. Spee, J. G. Blom, W. Hundsdorfer. "A second-order Rosenbrock method
   applied to photochemical dispersion problems." SIAM J. Sci. Comput. 20 (1999): 1456–1480.
.. [2] Dowell, M., and P. Jarratt. "A modified regula falsi method for computing the root of an
   equation." BIT Numerical Mathematics 11 (1971): 168–174 (the Illinois variant, rows at once).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..constants import GAS_CONSTANT
from ..models.diffusivity import ExponentialForms
from .budget import MAX_STEPS, check
from ..errors import SolverError
from .solver import _GAMMA, CarbonSolver, Ramp, SurfaceCondition, _factored, _tridiagonal

def _end_to_end(below: np.ndarray, diagonal: np.ndarray, above: np.ndarray):
    """The rows' tridiagonal systems laid end to end as one, with no coupling between rows: (below, diagonal,
    above) of the whole."""
    m, n = diagonal.shape
    dl = np.zeros((m, n))
    dl[:, :-1] = below
    du = np.zeros((m, n))
    du[:, :-1] = above
    return dl.ravel()[:-1], diagonal.reshape(-1), du.ravel()[:-1]


def _solve(below: np.ndarray, diagonal: np.ndarray, above: np.ndarray, rhs: np.ndarray) -> np.ndarray:
    """Solve the rows' tridiagonal systems (each row one system) in one ``dgtsv`` call
    (:func:`casedepth.numerics.solver._tridiagonal`), end to end with no coupling between rows. ``rhs`` and the
    matrix are overwritten. A singular system raises :class:`SolverError`: the caller marks the rows failed and
    solves them alone."""
    return _tridiagonal(*_end_to_end(below, diagonal, above), rhs.reshape(-1)).reshape(rhs.shape)


def _factored_rows(below: np.ndarray, diagonal: np.ndarray, above: np.ndarray):
    """The rows' systems factored once, end to end (:func:`casedepth.numerics.solver._factored`, as a single march
    factors its own): called with the rows' right-hand sides it overwrites them with the solutions."""
    solve = _factored(*_end_to_end(below, diagonal, above))
    return lambda rhs: solve(rhs.reshape(-1)).reshape(rhs.shape)


#: the most nodes a batch's longest row may have over its shortest's (the rest is padding)
PADDING = 1.25
#: the fewest rows worth a batch: a batch step has a fixed cost of small numpy calls (about 0.1 ms) that fewer rows
#: do not repay. Measured with the shop's whole cycle (run_recipes against run_recipe one by one, 8620 at 900–990 °C):
#: 1 row 2.7× slower in a batch, 2 rows 1.5×, 3 rows 1.1×, 4 rows 1.08× faster, 6 rows 1.4×, 8 rows 1.7×, 10 rows 1.9×
MIN_ROWS = 4


def batchable(solver: CarbonSolver) -> bool:
    """Whether ``solver`` can be marched in a batch: its diffusivity has the exponential form."""
    return solver.diffusivity.method in ("tibbetts", "arrhenius")


def batch_rows(solvers: Sequence[CarbonSolver], shape=lambda k: (), min_rows: int = MIN_ROWS) -> list[list[int]]:
    """The solvers that can be marched together, as lists of their indices: batchable ones (:func:`batchable`)
    with the same ``shape(index)`` (e.g. the shape of their programs) and node counts within a factor of
    :data:`PADDING` of each other (a batch pads the shorter rows, :class:`BatchMarch`; wider groups would spend
    more on padding than the batch saves), in groups of at least ``min_rows`` (:data:`MIN_ROWS`); the callers march
    the rest alone."""
    by_shape: dict[tuple, list[int]] = {}
    for k in sorted((k for k, solver in enumerate(solvers) if batchable(solver)), key=lambda k: len(solvers[k].nodes)):
        by_shape.setdefault(shape(k), []).append(k)
    groups: list[list[int]] = []
    for rows in by_shape.values():  # shortest first: a row too long for the open group starts the next
        groups.append([rows[0]])
        for k in rows[1:]:
            if len(solvers[k].nodes) > PADDING * len(solvers[groups[-1][0]].nodes):
                groups.append([])
            groups[-1].append(k)
    return [sorted(rows) for rows in groups if len(rows) >= min_rows]


def threshold_depths(nodes: np.ndarray, carbon: np.ndarray, threshold: np.ndarray, half_section: np.ndarray) -> np.ndarray:
    """Each row's depth [m] where its profile first falls to its ``threshold`` [wt %]: row by row what
    :func:`casedepth.numerics.solver.threshold_depth` gives (the same quadratic, same fall-backs). Nodes at
    infinite depth are a padded row's padding (:class:`BatchMarch`) and are not read."""
    m, n = carbon.shape
    rows = np.arange(m)
    under = carbon < threshold[:, None]
    if np.isinf(nodes[:, -1]).any():  # padded rows: each row's own nodes only
        real = np.isfinite(nodes)
        under &= real
        size = np.sum(real, axis=1)
        ends = nodes[rows, size - 1]
    else:
        size = np.full(m, n)
        ends = nodes[:, -1]
    i = np.argmax(under, axis=1)
    out = np.where(carbon[:, 0] < threshold, 0.0, np.minimum(ends, half_section))
    inside = i > 0
    if not inside.any():
        return out
    r, i, n = rows[inside], i[inside], size[inside]
    thr = threshold[inside]
    x0, x1 = nodes[r, i - 1], nodes[r, i]
    c0, c1 = carbon[r, i - 1], carbon[r, i]
    linear = x0 + (c0 - thr) / (c0 - c1) * (x1 - x0)
    last = i + 1 >= n
    nearer_back = np.zeros(len(r), dtype=bool)
    deep = (i >= 2) & ~last
    nearer_back[deep] = (np.abs(carbon[r[deep], i[deep] - 2] - thr[deep])
                         < np.abs(carbon[r[deep], i[deep] + 1] - thr[deep]))
    J = np.where(last | nearer_back, i - 1, i)
    valid = (J >= 1) & (J + 1 < np.minimum(i + 2, n))
    result = linear.copy()
    if valid.any():
        v = np.flatnonzero(valid)
        rv, Jv, t = r[v], J[v], thr[v]
        xa, xb, xc = nodes[rv, Jv - 1], nodes[rv, Jv], nodes[rv, Jv + 1]
        ca, cb, cc = carbon[rv, Jv - 1], carbon[rv, Jv], carbon[rv, Jv + 1]
        monotone = (ca > cb) & (cb > cc)
        with np.errstate(divide="ignore", invalid="ignore"):
            x = (xa * (t - cb) * (t - cc) / ((ca - cb) * (ca - cc))
                 + xb * (t - ca) * (t - cc) / ((cb - ca) * (cb - cc))
                 + xc * (t - ca) * (t - cb) / ((cc - ca) * (cc - cb)))
        ok = monotone & (x0[v] <= x) & (x <= x1[v])
        result[v[ok]] = x[ok]
    out[inside] = result
    return out


@dataclass
class Crossing:
    """The step in which a row's depth passed its target: the state before it, its length [s], the
    condition it used, whether it was a smoothing step, and the depths [m] before and after."""

    carbon: np.ndarray
    length: float
    condition: tuple[float, float, float]  # (temperature [K], equilibrium carbon [wt %], β [m/s])
    smoothing: bool
    start_time: float
    depth_before: float
    depth_after: float


class BatchMarch:
    """Solvers marched together; each row's numbers are those it gets alone.

    Rows with fewer nodes than the longest (a finite section's grid runs to its centre, so its node count depends
    on the soak it was sized for) are padded: nodes at infinite depth, of unit volume, joined to the row and to
    each other by faces of zero conductance, at the core's carbon. No carbon flows to or from them, their rows of
    the tridiagonal system are the identity and their stage values zero, so the row's own nodes follow the very
    steps they take alone; the ranges, the far end and the threshold depths read the row's own nodes
    (:attr:`size`), and :meth:`row` gives a row's profile without its padding.

    The solvers' present states are read once; the batch then holds the rows' carbon [wt %], times [s] and
    carbon through the surface [wt % · m] (:attr:`carbon`, :attr:`time`, :attr:`flux_integral`) and does
    not write them back.
    """

    def __init__(self, solvers: Sequence[CarbonSolver]):
        self.solvers = list(solvers)
        self.size = np.array([len(s.nodes) for s in self.solvers])
        n = int(self.size.max())
        self.padded = bool((self.size != n).any())

        def stacked(arrays, length: int, fill: float) -> np.ndarray:  # rows padded to ``length`` with ``fill``
            return np.stack([np.concatenate((a, np.full(length - len(a), fill))) for a in arrays]).astype(float)

        self.nodes = stacked([s.nodes for s in self.solvers], n, math.inf)
        self.volume = stacked([s.volume for s in self.solvers], n, 1.0)
        self._twice_volume = 2.0 * self.volume
        self.conductance = stacked([s.conductance for s in self.solvers], n - 1, 0.0)
        self.area = np.array([s.surface_area for s in self.solvers])
        self.core = np.array([s.core_carbon for s in self.solvers])
        self.carbon = np.stack([np.concatenate((s.carbon, np.full(n - len(s.carbon), s.core_carbon)))
                                for s in self.solvers]).astype(float)
        #: each row's own nodes (False: its padding)
        self.real = np.arange(n)[None, :] < self.size[:, None]
        self.time = np.array([s.time for s in self.solvers], dtype=float)
        self.flux_integral = np.array([s.flux_integral for s in self.solvers], dtype=float)
        self.time_scale = np.array([s.time_scale for s in self.solvers])
        self.first_step = np.array([s.accuracy.first_step for s in self.solvers])
        self.restart_step = np.array([s.accuracy.restart_step for s in self.solvers])
        self.growth = np.array([s.accuracy.step_growth for s in self.solvers])
        self.finite = np.array([s.geometry.finite for s in self.solvers])
        self.half_section = np.array([s.geometry.half_section for s in self.solvers])
        self.forms = ExponentialForms([s.diffusivity for s in self.solvers])
        self.failed = np.zeros(len(self.solvers), dtype=bool)
        self.crossings: dict[int, Crossing] = {}
        self.recorded: list[tuple[np.ndarray, np.ndarray]] = []  # (times [s], threshold depths [m]) of the rows

    def __len__(self) -> int:
        return len(self.solvers)

    def row(self, position: int, carbon: np.ndarray | None = None) -> np.ndarray:
        """Row ``position``'s profile [wt %] on its own nodes (``carbon``: a full row of this batch, default its
        present carbon)."""
        carbon = self.carbon[position] if carbon is None else carbon
        return carbon[:self.size[position]]

    def _range(self, idx: np.ndarray, carbon: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Each row's lowest and highest carbon [wt %] on its own nodes."""
        if not self.padded:
            return np.minimum.reduce(carbon, axis=1), np.maximum.reduce(carbon, axis=1)
        real = self.real[idx]
        return (np.min(np.where(real, carbon, math.inf), axis=1), np.max(np.where(real, carbon, -math.inf), axis=1))

    def carbon_uptake(self) -> np.ndarray:
        """Carbon added to each row's part since its start, [wt % · m] per unit surface."""
        return np.sum(self.volume * (self.carbon - self.core[:, None]), axis=1)

    def depths(self, threshold: np.ndarray) -> np.ndarray:
        """Each row's present threshold depth [m] at its ``threshold`` [wt %]."""
        return threshold_depths(self.nodes, self.carbon, threshold, self.half_section)

    def wait(self, durations) -> None:
        """Let each row's ``durations`` [s] pass with its carbon frozen."""
        self.time = self.time + np.broadcast_to(np.asarray(durations, dtype=float), self.time.shape)

    # -- the step, on the rows ``idx`` ----------------------------------------------------------------
    def _kernels(self, idx: np.ndarray, T: np.ndarray):
        A, s = self.forms.at(idx, T)
        return self.conductance[idx] * A[:, None], (0.5 * s)[:, None]

    @staticmethod
    def _flows(c: np.ndarray, kernel, jacobian: bool):
        kA, half_s = kernel
        kD = np.add(c[:, 1:], c[:, :-1])
        kD *= half_s
        np.exp(kD, out=kD)
        kD *= kA
        flow = np.subtract(c[:, 1:], c[:, :-1])
        flow *= kD
        if not jacobian:
            return flow, None, None
        u = flow * half_s
        return flow, np.add(kD, u), np.subtract(kD, u, out=u)

    @staticmethod
    def _inflow(flow: np.ndarray, surface: np.ndarray | None) -> np.ndarray:
        m, n1 = flow.shape
        inflow = np.empty((m, n1 + 1))
        inflow[:, :-1] = flow
        inflow[:, -1] = 0.0
        inflow[:, 1:] -= flow
        if surface is not None:
            inflow[:, 0] += surface
        return inflow

    def _system(self, idx, upper, lower, g, inflow, dt, beta, held):
        above = upper * -g[:, None]
        below = lower * -g[:, None]
        diagonal = self.volume[idx]
        diagonal[:, :-1] -= below
        diagonal[:, 1:] -= above
        rhs = inflow * dt[:, None]
        if held:
            diagonal[:, 0], above[:, 0], rhs[:, 0] = 1.0, 0.0, 0.0
        else:
            diagonal[:, 0] += g * self.area[idx] * beta
        return below, diagonal, above, rhs

    def _step(self, idx, c0, dt, T, ceq, beta, held: bool, smoothing: bool, kernel=None):
        """One step of the rows ``idx`` from ``c0`` (a copy, changed here): (carbon, carbon through the surface),
        as :meth:`CarbonSolver._step` gives each (``kernel``: the rows' :meth:`_kernels` at ``T``, if known)."""
        if kernel is None:
            kernel = self._kernels(idx, T)
        area = self.area[idx]
        flux = np.zeros(len(idx))
        if held:
            flux += self.volume[idx, 0] * (ceq - c0[:, 0])
            c0[:, 0] = ceq
        flow, upper, lower = self._flows(c0, kernel, True)
        if held:
            surface0, j, slope = -flow[:, 0], 1, -upper[:, 0]
        else:
            surface0, j, slope = area * beta * (ceq - c0[:, 0]), 0, -area * beta
        inflow0 = self._inflow(flow, None if held else surface0)
        if smoothing and not held:  # linearly implicit Euler, extrapolated (CarbonSolver._smoothing_step)
            def euler(c, h, inflow, surface):
                k = _solve(*self._system(idx, upper, lower, h, inflow, h, beta, held))
                return np.add(c, k), h * surface + h * slope * k[:, j]

            whole, through_whole = euler(c0, dt, inflow0, surface0)
            half, through_1 = euler(c0, 0.5 * dt, inflow0, surface0)
            flow_h, _, _ = self._flows(half, kernel, False)
            surface_h = area * beta * (ceq - half[:, 0])
            two, through_2 = euler(half, 0.5 * dt, self._inflow(flow_h, surface_h), surface_h)
            two *= 2.0
            two -= whole
            return two, flux + 2.0 * (through_1 + through_2) - through_whole
        g = (1.0 if smoothing else _GAMMA) * dt
        below, diagonal, above, rhs1 = self._system(idx, upper, lower, g, inflow0, dt, beta, held)
        if smoothing:  # plain linearly implicit Euler after a held surface's jump
            k1 = _solve(below, diagonal, above, rhs1)
            return np.add(c0, k1), flux + dt * surface0 + g * slope * k1[:, j]
        solve = _factored_rows(below, diagonal, above)
        k1 = solve(rhs1)
        mid = np.add(c0, k1)
        flow1, _, _ = self._flows(mid, kernel, False)
        surface1 = -flow1[:, 0] if held else area * beta * (ceq - mid[:, 0])
        inflow1 = self._inflow(flow1, None if held else surface1)
        rhs2 = np.multiply(inflow1, dt[:, None], out=inflow1)
        rhs2 -= self._twice_volume[idx] * k1
        if held:
            rhs2[:, 0] = 0.0
        k2 = solve(rhs2)
        flux += 0.5 * (dt * surface0 + g * slope * k1[:, j]) + 0.5 * (dt * surface1 + g * slope * k2[:, j])
        carbon = np.multiply(k1, 1.5)
        carbon += c0
        k2 *= 0.5
        carbon += k2
        return carbon, flux

    # -- the march ------------------------------------------------------------------------------------
    def advance(self, durations, conditions: Sequence[SurfaceCondition | Ramp], max_steps=math.inf,
                until: np.ndarray | None = None, threshold: np.ndarray | None = None,
                record: np.ndarray | None = None) -> np.ndarray:
        """March each row ``durations`` [s] under its condition (a :class:`SurfaceCondition` or a
        :class:`Ramp`), as :meth:`CarbonSolver.advance` would, steps of at most ``max_steps`` [s].

        With ``until`` [m] and ``threshold`` [wt %], a row stops at the step after which its threshold
        depth reaches ``until`` (as :meth:`casedepth.numerics.march.March.advance`); that step is kept in
        :attr:`crossings`. Returns which rows reached it (all False without ``until``). Failed rows
        (:attr:`failed`) are not marched. With ``record`` (a threshold [wt %] per row), the rows' times [s] and
        threshold depths [m] at the start and after every step are appended to :attr:`recorded`."""
        N = len(self)
        durations = np.broadcast_to(np.asarray(durations, dtype=float), (N,))
        max_steps = np.broadcast_to(np.asarray(max_steps, dtype=float), (N,))
        ramps = [c if isinstance(c, Ramp) else Ramp.constant(c) for c in conditions]
        T0 = np.array([r.temperature_from for r in ramps])
        T1 = np.array([r.temperature_to for r in ramps])
        p0 = np.array([r.potential_from for r in ramps])
        p1 = np.array([r.potential_to for r in ramps])
        factor = np.array([r.alloy_factor for r in ramps])
        span = np.array([r.span for r in ramps])
        beta_end = np.array([r.beta for r in ramps])
        activation = np.array([r.beta_activation for r in ramps])
        held_rows = ~np.isfinite(beta_end)
        changing = (T0 != T1) | (p0 != p1)
        start = self.time.copy()
        end = self.time + durations
        fresh = np.all(self.carbon == self.core[:, None], axis=1)  # as CarbonSolver.fresh, row by row
        dt = np.minimum(np.where(fresh, self.first_step, self.restart_step) * self.time_scale, max_steps)
        low, high = self._range(np.arange(N), self.carbon)
        reached = np.zeros(N, dtype=bool)
        if until is not None:
            reached = ~self.failed & (self.depths(threshold) >= until)
            shallower = np.sum(self.nodes < until[:, None], axis=1) - 1  # the last node above each row's ``until``
        smoothing = CarbonSolver.SMOOTHING_STEPS
        steps = 0
        active = ~self.failed & ~reached & (end - self.time > 1e-12 * np.maximum(end, 1.0))
        if record is not None:
            self.recorded.append((self.time.copy(), self.depths(record)))
        # with no row's condition moving, each group's condition and D kernel are those of its rows: kept while the
        # group's rows are the same (the arithmetic of a step that works them out, w = 0)
        steady = not changing.any() and not activation.any()
        kept: dict[bool, tuple] = {}
        sides = {held: held_rows == held for held in (False, True)}
        while active.any():
            check()
            steps += 1
            if steps > MAX_STEPS:
                self.failed |= active
                break
            for held in (False, True):
                idx = np.flatnonzero(active & sides[held])
                if len(idx) == 0:
                    continue
                h = np.minimum(dt[idx], end[idx] - self.time[idx])
                known = kept.get(held) if steady else None
                if known is not None and np.array_equal(known[0], idx):
                    T, ceq, beta, kernel = known[1:]
                else:
                    w = np.minimum(np.maximum((self.time[idx] - start[idx] + 0.5 * h) / span[idx], 0.0), 1.0)
                    w = np.where(changing[idx], w, 0.0)
                    T = T0[idx] + w * (T1[idx] - T0[idx])
                    ceq = (p0[idx] + w * (p1[idx] - p0[idx])) * factor[idx]
                    beta = beta_end[idx]
                    if not held and activation[idx].any():  # β at the step's temperature (Ramp.__call__)
                        beta = beta * np.exp(-activation[idx] / GAS_CONSTANT * (1.0 / T - 1.0 / T1[idx]))
                    kernel = self._kernels(idx, T)
                    if steady:
                        kept[held] = (idx, T, ceq, beta, kernel)
                c0 = self.carbon[idx]
                before = c0.copy() if until is not None else None
                t_before = self.time[idx]
                try:
                    carbon, flux = self._step(idx, c0, h, T, ceq, beta, held, smoothing > 0, kernel)
                except SolverError:
                    self.failed[idx] = True
                    continue
                new_low, new_high = self._range(idx, carbon)
                lo = np.minimum(low[idx], ceq)
                hi = np.maximum(high[idx], ceq)
                slack = 1e-3 * np.maximum(hi - lo, 1e-3)
                good = (new_low >= lo - slack) & (new_high <= hi + slack)
                far = ~self.finite[idx]
                if far.any():
                    core = self.core[idx]
                    scale = np.maximum(np.maximum(np.abs(ceq - core), np.abs(carbon[:, 0] - core)), 1e-12)
                    last = carbon[np.arange(len(idx)), self.size[idx] - 1]
                    touched = far & (np.abs(last - core) > CarbonSolver.FAR_FIELD_TOLERANCE * scale)
                    good &= ~touched
                if len(idx) == N and good.all():  # every row, every step good: whole arrays, no gathering
                    ok = idx
                    self.carbon = carbon
                    self.flux_integral += flux
                    self.time += h
                    low = np.minimum(low, new_low)
                    high = np.maximum(high, new_high)
                else:
                    self.failed[idx[~good]] = True
                    ok = idx[good]
                    self.carbon[ok] = carbon[good]
                    self.flux_integral[ok] += flux[good]
                    self.time[ok] += h[good]
                    low[ok] = np.minimum(low[ok], new_low[good])
                    high[ok] = np.maximum(high[ok], new_high[good])
                if until is not None and len(ok):
                    self._check_reached(ok, good, until, threshold, shallower, reached, before, t_before, h, T, ceq,
                                        beta, smoothing > 0)
            smoothing -= 1
            if record is not None:
                self.recorded.append((self.time.copy(), self.depths(record)))
            dt = np.minimum(dt * self.growth, max_steps)
            active = ~self.failed & ~reached & (end - self.time > 1e-12 * np.maximum(end, 1.0))
        return reached

    def _check_reached(self, ok, good, until, threshold, shallower, reached, before, t_before, h, T, ceq, beta,
                       smoothing):
        """Mark the rows ``ok`` (the step's rows where ``good``) whose depth now reaches ``until``, keeping the step
        that took them there."""
        s = shallower[ok]
        short = (s >= 0) & (self.carbon[ok, np.maximum(s, 0)] < threshold[ok])
        if short.all():
            return
        in_step = np.flatnonzero(good)[~short]  # the candidates' places in the step's arrays
        candidates = ok[~short]
        depth = threshold_depths(self.nodes[candidates], self.carbon[candidates], threshold[candidates],
                                 self.half_section[candidates])
        hit = depth >= until[candidates]
        if not hit.any():
            return
        rows, steps = candidates[hit], in_step[hit]
        depth_before = threshold_depths(self.nodes[rows], before[steps], threshold[rows], self.half_section[rows])
        for row, k, d, d_before in zip(rows, steps, depth[hit], depth_before):
            self.crossings[int(row)] = Crossing(before[k], float(h[k]), (float(T[k]), float(ceq[k]), float(beta[k])),
                                                smoothing, float(t_before[k]), float(d_before), float(d))
        reached[rows] = True

    def land(self, targets: np.ndarray, threshold: np.ndarray) -> dict[int, tuple[float, np.ndarray]]:
        """For every row with a :attr:`crossings` entry, the time [s] at which its depth equals its target [m]
        and the profile then [wt %]: the crossing step re-taken shorter, all rows at once, by regula falsi
        (Illinois) on depth² as :func:`casedepth.numerics.march.land_on` does for one."""
        rows = np.array(sorted(self.crossings), dtype=int)
        out: dict[int, tuple[float, np.ndarray]] = {}
        if len(rows) == 0:
            return out
        cross = [self.crossings[int(r)] for r in rows]
        target2 = targets[rows] ** 2
        a = np.zeros(len(rows))
        b = np.array([c.length for c in cross])
        fa = np.array([c.depth_before for c in cross]) ** 2 - target2
        fb = np.array([c.depth_after for c in cross]) ** 2 - target2
        xtol, ftol = 1e-12 * b, 2e-7 * target2
        x = b.copy()
        profiles = [None] * len(rows)
        done = np.zeros(len(rows), dtype=bool)
        side = np.zeros(len(rows), dtype=int)
        for k in np.flatnonzero(fa == 0.0):
            x[k], done[k] = 0.0, True
        for k in np.flatnonzero((fb == 0.0) & ~done):
            x[k], done[k] = b[k], True
        for _ in range(200):
            open_ = np.flatnonzero(~done)
            if len(open_) == 0:
                break
            check()
            x[open_] = (fa[open_] * b[open_] - fb[open_] * a[open_]) / (fa[open_] - fb[open_])
            carbon = self._retake(rows[open_], [cross[k] for k in open_], x[open_])
            depth = threshold_depths(self.nodes[rows[open_]], carbon, threshold[rows[open_]],
                                     self.half_section[rows[open_]])
            fx = depth**2 - target2[open_]
            for position, k in enumerate(open_):
                profiles[k] = carbon[position]
            stop = (np.abs(fx) <= ftol[open_]) | (np.abs(b[open_] - a[open_]) <= xtol[open_])
            same_as_b = fx * fb[open_] > 0
            for position, k in enumerate(open_):
                if stop[position]:
                    done[k] = True
                elif same_as_b[position]:
                    b[k], fb[k] = x[k], fx[position]
                    if side[k] == -1:
                        fa[k] *= 0.5
                    side[k] = -1
                else:
                    a[k], fa[k] = x[k], fx[position]
                    if side[k] == 1:
                        fb[k] *= 0.5
                    side[k] = 1
        for k, row in enumerate(rows):
            carbon = profiles[k]
            if carbon is None:  # landed on an end of the step without a trial: its start or its end
                carbon = cross[k].carbon if x[k] == 0.0 else self._retake(rows[k:k + 1], [cross[k]], x[k:k + 1])[0]
            out[int(row)] = (cross[k].start_time + float(x[k]), carbon)
        return out

    def _retake(self, rows: np.ndarray, crossings: list[Crossing], lengths: np.ndarray) -> np.ndarray:
        """The crossing steps of ``rows`` re-taken with ``lengths`` [s]: the profiles [wt %] after them."""
        out = np.empty((len(rows), self.nodes.shape[1]))
        conditions = np.array([c.condition for c in crossings])
        held_rows = ~np.isfinite(conditions[:, 2])
        smoothing = np.array([c.smoothing for c in crossings])
        for held in (False, True):
            for smooth in (False, True):
                pick = np.flatnonzero((held_rows == held) & (smoothing == smooth))
                if len(pick) == 0:
                    continue
                c0 = np.stack([crossings[k].carbon for k in pick])
                carbon, _ = self._step(rows[pick], c0, lengths[pick], conditions[pick, 0], conditions[pick, 1],
                                       conditions[pick, 2], held, smooth)
                out[pick] = carbon
        return out


# -- programs: what a march does, segment by segment -------------------------------------------------------
@dataclass(frozen=True)
class Segment:
    """One piece of a march: ``duration`` [s] with the carbon frozen (``condition`` None) or under ``condition``
    (a :class:`SurfaceCondition` or a :class:`Ramp`) with steps of at most ``max_step`` [s]; part of stage
    number ``stage`` of the program."""

    stage: int
    duration: float
    condition: SurfaceCondition | Ramp | None = None
    max_step: float = math.inf


@dataclass(frozen=True)
class Program:
    """A march as data: ``stages`` stages, run as ``segments`` in order (a stage may have none)."""

    stages: int
    segments: tuple[Segment, ...]

    @property
    def shape(self) -> tuple:
        """What must match for programs to be marched together: the stages and the kinds of their segments."""
        return (self.stages, tuple((s.stage, s.condition is None) for s in self.segments))


@dataclass
class Marched:
    """What a program did to one solver: the carbon at the end [wt %], the time [s], and each stage's start
    time [s] and carbon taken up [wt % · m per unit surface]."""

    carbon: np.ndarray
    time: float
    stage_start: list[float]
    stage_uptake: list[float]


def run_program(solver: CarbonSolver, program: Program) -> Marched:
    """Run ``program`` on one solver (its history kept, as for any march)."""
    starts, uptake = [], []
    segments = list(program.segments)
    for stage in range(program.stages):
        starts.append(solver.time)
        before = solver.carbon_uptake()
        while segments and segments[0].stage == stage:
            segment = segments.pop(0)
            if segment.condition is None:
                solver.wait(segment.duration)
            else:
                solver.advance(segment.duration, segment.condition, max_step=segment.max_step)
        uptake.append(solver.carbon_uptake() - before)
    return Marched(solver.carbon, solver.time, starts, uptake)


def run_programs(solvers: Sequence[CarbonSolver], programs: Sequence[Program],
                 min_rows: int = MIN_ROWS) -> list[Marched | None]:
    """Run each solver's program, those that can be marched together in batches: solvers whose diffusivity
    has the exponential form, with the same number of nodes and programs of the same shape. A row the batch
    could not take to the end (see :class:`BatchMarch`) is None: the caller runs it alone (:func:`run_program`).
    The solvers themselves are not moved."""
    out: list[Marched | None] = [None] * len(solvers)
    for rows in batch_rows(solvers, lambda k: programs[k].shape, min_rows):
        batch = BatchMarch([solvers[k] for k in rows])
        first = programs[rows[0]]
        starts, uptake = [], []
        for stage in range(first.stages):
            starts.append(batch.time.copy())
            before = batch.carbon_uptake()
            for j, segment in enumerate(first.segments):
                if segment.stage != stage:
                    continue
                pieces = [programs[k].segments[j] for k in rows]
                durations = np.array([p.duration for p in pieces])
                if segment.condition is None:
                    batch.wait(durations)
                else:
                    batch.advance(durations, [p.condition for p in pieces], np.array([p.max_step for p in pieces]))
            uptake.append(batch.carbon_uptake() - before)
        for position, k in enumerate(rows):
            if not batch.failed[position]:
                out[k] = Marched(batch.row(position), float(batch.time[position]),
                                 [float(s[position]) for s in starts], [float(u[position]) for u in uptake])
    return out


def times_to(solvers: Sequence[CarbonSolver], conditions: Sequence[SurfaceCondition], thresholds: Sequence[float],
             targets: Sequence[float], horizon: float) -> list[tuple[float, np.ndarray] | None]:
    """For each solver, marched under its condition for at most ``horizon`` [s], the time [s] at which the depth
    where its carbon falls to its threshold [wt %] reaches its target [m], and the profile then [wt %]: what
    :meth:`casedepth.numerics.march.March.time_to` gives for one, the batchable solvers marched together. None
    where the batch could not (not batchable, a single march's exceptions, or the target not reached): the
    caller solves that one alone. The solvers themselves are not moved."""
    out: list[tuple[float, np.ndarray] | None] = [None] * len(solvers)
    for rows in batch_rows(solvers):
        batch = BatchMarch([solvers[k] for k in rows])
        until = np.array([targets[k] for k in rows], dtype=float)
        threshold = np.array([thresholds[k] for k in rows], dtype=float)
        already = batch.depths(threshold) >= until
        batch.failed |= already  # a target met before the march starts: the single march answers it
        batch.advance(horizon, [conditions[k] for k in rows], until=until, threshold=threshold)
        for position, (time, carbon) in batch.land(until, threshold).items():
            out[rows[position]] = (time, batch.row(position, carbon))
    return out
