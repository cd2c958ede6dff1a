"""Independent peer for the nitriding benchmark: the diffusion zone by the method of lines in real x, t.

Solves the same diffusion–precipitation problem as :mod:`casedepth.nitriding.zone`, but directly in
depth and time instead of through the similarity variable:

    ∂n/∂t = ∂/∂x (D ∂c/∂x),    n = N(c) = c + Σ_j (1 + e_j) max(0, M_j − K_j / c),
    c(0, t) = c_s,    c(∞, t) = 0,    n(x, 0) = 0,

n the total and c the dissolved nitrogen [wt %], D the nitrogen diffusivity in ferrite [m²/s], and
for each nitride former j its capacity M_j [wt % N], effective solubility product K_j [(wt % N)²]
and excess ratio e_j [-] (local-equilibrium precipitation, the scheme of Sun & Bell, "Modelling of
the nitriding process", Mater. Sci. Eng. A 224 (1997) 33–47).

Discretisation: cell-centred finite volumes, the unknown being n in each cell so that nitrogen is
conserved exactly (the method of lines as in Crank 1975, The Mathematics of Diffusion, 2nd ed.,
ch. 8); the flux through a face is D (c_left − c_right)/(distance of the centres), through the
surface D (c_s − c_0)/(half the first cell). c = C(n) is the inverse of N, in closed form between
the onsets K_j/M_j (a quadratic there: c² + (A − n) c − B = 0 with A = Σ (1+e) M and
B = Σ (1+e) K over the formers precipitating), exact to rounding. The grid is uniform down to the
depth the dissolved nitrogen would reach the hardness limit without any precipitation (an upper
bound on the depth, since precipitation only holds nitrogen back), then grows geometrically to
eight diffusion lengths, where erfc(4) ≈ 1.5e-8 of c_s arrives. Time: ``scipy.integrate.solve_ivp``
(BDF, Shampine & Reichelt 1997, "The MATLAB ODE Suite", SIAM J. Sci. Comput. 18) with a
tridiagonal ``jac_sparsity`` pattern (SciPy forms the Jacobian by three grouped differences), from
a short time t0 = 1e-7 t with n = 0.

Only the data are taken from the setup: ``diffusivity``, ``substrate_nitrogen``, ``precipitates``
(M, K, e of each former), ``hardness_limit`` and the zone's hardness relation ``zone.hardness(c)``
(the strength constant of the grade); none of the project's solver is used.

Units: SI (m, s, m²/s), nitrogen in wt %, hardness in HV.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.integrate import solve_ivp
from scipy.special import erfcinv

#: the smallest solubility product the project's precipitation model takes, (wt % N)²: the data
#: convention of the model (a former with a smaller product is a perfect sink), kept here too
SMALLEST_PRODUCT = 1e-12
#: the domain, in diffusion lengths √(D t)
DOMAIN = 8.0
#: growth of the cells below the uniform part
GROWTH = 1.08


class Inverse:
    """c = C(n), the inverse of the total nitrogen N(c) [wt %], exact between the onsets."""

    def __init__(self, precipitates):
        formers = [(p.capacity, max(p.product, SMALLEST_PRODUCT), p.excess) for p in precipitates if p.capacity > 0.0]
        self.formers = formers
        onsets = sorted({K / M for M, K, e in formers})
        self.onsets = np.array(onsets)
        # on [onset_k, onset_k+1) the formers with onset ≤ onset_k precipitate: A_k, B_k of the quadratic
        self.A = np.zeros(len(onsets) + 1)
        self.B = np.zeros(len(onsets) + 1)
        for k in range(1, len(onsets) + 1):
            self.A[k] = sum((1 + e) * M for M, K, e in formers if K / M <= onsets[k - 1])
            self.B[k] = sum((1 + e) * K for M, K, e in formers if K / M <= onsets[k - 1])
        self.breaks = np.array([self.total(v) for v in onsets])  # N at each onset, rising

    def total(self, c):
        """N(c) [wt %]."""
        c = np.asarray(c, dtype=float)
        out = c.copy()
        for M, K, e in self.formers:
            out = out + (1 + e) * np.where(c > K / M, M - K / np.maximum(c, 1e-300), 0.0)
        return out

    def __call__(self, n):
        """C(n) [wt %] for total nitrogen n [wt %] (array); n ≤ 0 gives c = n (no precipitate)."""
        k = np.searchsorted(self.breaks, n, side="right")
        b = n - self.A[k]
        root = np.sqrt(b * b + 4.0 * self.B[k])
        # the positive root of c² − b c − B = 0, in the form without cancellation
        with np.errstate(divide="ignore", invalid="ignore"):
            c = np.where(b >= 0.0, 0.5 * (b + root), 2.0 * self.B[k] / (root - b))
        return np.where(k == 0, n, c)


@dataclass
class PeerResult:
    time: float  # s
    depth: float  # m below the compound layer where the hardness falls to the limit
    rate: float  # depth / √time, m/√s
    uptake: float  # A of the nitrogen taken up, ∫ n dx = 2 A √t, [wt % m/√s]
    cells: int  # cells in all
    x: np.ndarray  # cell centres, m
    nitrogen: np.ndarray  # total nitrogen, wt %
    dissolved: np.ndarray  # wt %
    steps: int
    nfev: int
    njev: int


def erfc_bound(setup) -> float:
    """z = x/√(D t) where the dissolved nitrogen would fall to the hardness limit's without any
    precipitation, c_s erfc(z/2) (Crank 1975, eq. 3.13): an upper bound on the depth, since the
    formers only hold nitrogen back."""
    c_s, limit_c = setup.substrate_nitrogen, limit_nitrogen(setup)
    return 2.0 * float(erfcinv(limit_c / c_s)) if 0.0 < limit_c < c_s else 1.0


def grid(setup, time: float, cells: int, extent: float | None = None) -> np.ndarray:
    """Cell faces [m]: ``cells`` uniform cells down to ``extent`` diffusion lengths (default 1.2 ×
    :func:`erfc_bound`), then cells growing by :data:`GROWTH` to :data:`DOMAIN` diffusion lengths."""
    length = math.sqrt(setup.diffusivity * time)
    if extent is None:
        extent = 1.2 * erfc_bound(setup)
    uniform = min(max(extent, 0.05), DOMAIN / 2) * length
    h = uniform / cells
    faces = list(np.linspace(0.0, uniform, cells + 1))
    while faces[-1] < DOMAIN * length:
        h *= GROWTH
        faces.append(faces[-1] + h)
    return np.array(faces)


def limit_nitrogen(setup) -> float:
    """The dissolved nitrogen [wt %] at which the zone's hardness relation gives the hardness limit
    (bisection on [0, c_s]; the hardness rises with c); 0 if the core is already at the limit."""
    hardness, limit, c_s = setup.zone.hardness, setup.hardness_limit, setup.substrate_nitrogen
    lo, hi = 0.0, c_s
    if float(hardness(c_s)) <= limit:
        return c_s
    if float(hardness(0.0)) >= limit:
        return 0.0
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if float(hardness(mid)) < limit:
            lo = mid
        else:
            hi = mid
        if hi - lo < 1e-15 * c_s:
            break
    return 0.5 * (lo + hi)


def peer_depth_rate(setup, hours: float, cells: int, rtol: float = 1e-4, atol: float = 1e-10,
                    extent: float | None = None) -> PeerResult:
    """Run the zone from n = 0 to ``hours`` [h] on a grid of ``cells`` uniform cells (plus the graded
    tail), and read where the hardness ``setup.zone.hardness(c)`` falls to ``setup.hardness_limit``.

    Returns the depth [m] below the compound layer, depth/√t [m/√s] (comparable with the project's
    ``zone.depth_rate()``) and the uptake coefficient A [wt % m/√s] (comparable with ``setup.uptake``).
    ``rtol``/``atol`` [wt % N] go to ``solve_ivp``; ``extent`` is the depth of the uniform cells in
    diffusion lengths √(D t) (default: 1.2 × the no-precipitation bound, :func:`grid`).
    """
    time = hours * 3600.0
    D = setup.diffusivity
    c_s = setup.substrate_nitrogen
    inverse = Inverse(setup.precipitates)
    faces = grid(setup, time, cells, extent)
    width = np.diff(faces)
    centres = 0.5 * (faces[1:] + faces[:-1])
    m = len(width)
    conductance = D / np.diff(centres)  # between neighbouring centres, m/s
    surface_conductance = D / centres[0]

    def rhs(t, n):
        c = inverse(n)
        flow = conductance * (c[:-1] - c[1:])  # downward flux through the inner faces, wt % m/s
        net = np.empty(m)
        net[0] = surface_conductance * (c_s - c[0])
        net[1:] = flow
        net[:-1] -= flow  # far end: no flux (c there is ~1e-8 c_s)
        return net / width

    pattern = sp.diags([np.ones(m - 1), np.ones(m), np.ones(m - 1)], [-1, 0, 1], format="csc")
    t0 = 1e-7 * time
    sol = solve_ivp(rhs, (t0, time), np.zeros(m), method="BDF", rtol=rtol, atol=atol, jac_sparsity=pattern)
    if not sol.success:
        raise RuntimeError(sol.message)
    n = sol.y[:, -1]
    c = inverse(n)
    depth = _depth_at_limit(setup, centres, c, c_s)
    uptake = float(np.sum(n * width)) / (2.0 * math.sqrt(time))
    return PeerResult(time, depth, depth / math.sqrt(time), uptake, m, centres, n, c,
                      len(sol.t) - 1, sol.nfev, sol.njev)


def _depth_at_limit(setup, centres, c, c_s) -> float:
    """Where the hardness, linear in x between the surface and the cell centres, falls to the limit."""
    x = np.concatenate(([0.0], centres))
    hv = np.asarray(setup.zone.hardness(np.concatenate(([c_s], c))), dtype=float) - setup.hardness_limit
    if hv[0] <= 0.0:
        return 0.0
    below = np.nonzero(hv <= 0.0)[0]
    if len(below) == 0:
        return math.inf
    i = below[0]
    return float(x[i - 1] + (x[i] - x[i - 1]) * hv[i - 1] / (hv[i - 1] - hv[i]))


def peer_nitriding_time(setup, target: float, hours: float, cells: int, rtol: float = 1e-4,
                        extent: float | None = None) -> tuple[float, PeerResult]:
    """The soak [s] for a nitrided hardness depth ``target`` [m] (compound layer + zone), from one peer run.

    Self-similarity: one run to ``hours`` gives the zone's depth/√t and uptake A; the compound layer
    grows as k√t with k from the setup's layer model at that uptake (the peer has no layer model of its
    own: it checks the zone), so the soak is (target / (k + rate))², as :mod:`casedepth.nitriding.nitride`
    does with its own zone.
    """
    run = peer_depth_rate(setup, hours, cells, rtol, extent=extent)
    k = setup.layer.constants(float(setup.temperature), float(setup.nitriding_potential), run.uptake)[1]
    return (target / (k + run.rate)) ** 2, run


def focused_extent(setup, hours: float = 30.0, cells: int = 25) -> float:
    """The uniform part for a second, focused pass: 1.5 × the depth [diffusion lengths] a coarse run on
    the default grid finds (for steep fronts, where the no-precipitation bound is far too deep)."""
    run = peer_depth_rate(setup, hours, cells)
    return 1.5 * run.rate / math.sqrt(setup.diffusivity)


def main() -> None:
    """Convergence of the peer by doubling the cells, on the default grid and on the focused one, against
    the project's zone, for three grades at 520 °C, K_N 3 (depth/√t and uptake, differences in %)."""
    import time as clock

    from casedepth.models.steels import find
    from casedepth.nitriding import NitridingSetup

    for grade in ("4140", "41CrAlMo7-10", "H13"):
        setup = NitridingSetup(find(grade), 793.15, 3.0)
        project = setup.zone.depth_rate()
        print(f"{grade}: project depth/√t {project:.6e} m/√s (z {project / math.sqrt(setup.diffusivity):.4f}), "
              f"uptake {setup.uptake:.6e} wt % m/√s")
        for label, extent in (("default grid", None), ("focused grid", focused_extent(setup))):
            for cells in (25, 50, 100, 200, 400):
                start = clock.perf_counter()
                r = peer_depth_rate(setup, 30.0, cells, rtol=1e-6, extent=extent)
                ms = (clock.perf_counter() - start) * 1e3
                print(f"  {label}, {cells:3d} uniform cells ({r.cells:3d} in all): depth/√t {r.rate:.6e} "
                      f"({100 * (r.rate / project - 1):+.3f} %), uptake {100 * (r.uptake / setup.uptake - 1):+.3f} %, "
                      f"{r.steps} steps, {ms:.0f} ms")


if __name__ == "__main__":
    main()
