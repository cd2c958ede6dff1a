"""A floor, not a peer: casedepth's own method written bare, to show what numpy allows it to cost.

The same march as casedepth's default for the benchmark's case (semi-infinite plate, Tibbetts' exponential
D, mass transfer β): the same grid (160 cells over 8 length scales, the last cell 8× the first), the same
steps (the first 5e-3 of the rough soak, growing by 1.15), the same two extrapolated linearly implicit
Euler steps at the start (Deuflhard 1985) and the same ROS2 stages after them (Verwer et al. 1999), with the
matrix factored once a step (LAPACK ``dgttrf``/``dgttrs``). Everything else a user's answer needs is left
out: no history, no plausibility or far-end checks, no stop signal, no profile or warnings, and the landing
is regula falsi on the carbon at a node placed on the target (as the Crank–Nicolson peer does), not on the
depth. What it costs is what the method's numpy and LAPACK calls cost on 161 nodes, about 24 steps; the
benchmark prints how far that floor is from its goals.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.linalg.lapack import dgttrf, dgttrs, dgtsv

from peer_common import HandWritten

GAMMA = 1.0 - 1.0 / math.sqrt(2.0)


class BareRos2(HandWritten):
    """The inverse (soak for a target depth) of one setup by casedepth's method with nothing around it."""

    def __init__(self, setup, first_step: float = 5e-3, growth: float = 1.15, **grid):
        super().__init__(setup, first_step=first_step, growth=growth, **grid)

    def inverse(self, target: float) -> float:
        """Soak [s] for an effective case depth of ``target`` [m]."""
        st = self.setup
        c_eq, beta = st.equilibrium_carbon, st.beta
        x, k, scale = self.grid(target)
        kA = self.A / np.diff(x)
        V = np.diff(np.concatenate(([0.0], 0.5 * (x[1:] + x[:-1]), [x[-1]])))
        half_s = 0.5 * self.s
        n = len(x)
        F = np.zeros(n + 1)  # [−surface inflow, face flows, 0]: the inflows are one difference

        def inflow(c, jacobian):
            kD = np.add(c[1:], c[:-1])
            kD *= half_s
            np.exp(kD, out=kD)
            kD *= kA
            flow = np.subtract(c[1:], c[:-1], out=F[1:-1])
            flow *= kD
            F[0] = -beta * (c_eq - c[0])
            out = np.subtract(F[1:], F[:-1])
            if not jacobian:
                return out
            u = flow * half_s
            return out, kD + u, np.subtract(kD, u, out=u)

        def matrix(up, lo, g):
            above, below = up * -g, lo * -g
            diag = V.copy()
            diag[:-1] -= below
            diag[1:] -= above
            diag[0] += g * beta
            return below, diag, above

        def euler(c, h, f, up, lo):
            return c + dgtsv(*matrix(up, lo, h), f * h, 1, 1, 1, 1)[3]

        def step(c, h, smoothing):
            f, up, lo = inflow(c, True)
            if smoothing:  # extrapolated linearly implicit Euler: twice two half steps minus one whole
                half = euler(c, 0.5 * h, f, up, lo)
                two = euler(half, 0.5 * h, inflow(half, False), up, lo)
                return 2.0 * two - euler(c, h, f, up, lo)
            dl, d, du, du2, ipiv, _ = dgttrf(*matrix(up, lo, GAMMA * h), 1, 1, 1)
            k1 = dgttrs(dl, d, du, du2, ipiv, f * h, "N", 1)[0]
            rhs = inflow(c + k1, False)
            rhs *= 0.5 * h
            rhs -= V * k1
            half_k2 = dgttrs(dl, d, du, du2, ipiv, rhs, "N", 1)[0]
            out = k1 * 1.5
            out += c
            out += half_k2
            return out

        return self.march(step, n, k, scale)
