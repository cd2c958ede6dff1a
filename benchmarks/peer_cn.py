"""Second peer for the benchmark: a straightforward hand-written linearly implicit Crank–Nicolson.

The same problem as :mod:`peer_mol` (semi-infinite plate, carbon-dependent D, mass transfer β at the
surface) in the plainest fast form one would write by hand:

* vertex-centred finite volumes on a geometrically graded grid (Patankar 1980, ch. 4), rescaled so
  that one node sits exactly on the target depth — the crossing test is then one comparison;
* the trapezoidal rule linearised about the present state (one Newton step of Crank & Nicolson
  1947 with the exact Jacobian, dD/dC included: (M − h/2 J) Δ = h F(y)), second order, one
  tridiagonal solve with LAPACK ``dgtsv`` per step, no copies;
* two linearly implicit Euler steps first, to damp the sudden start (Rannacher 1984);
* the step that crosses the target re-taken shorter, regula falsi (Illinois) on the carbon at the
  target node.

Only Tibbetts' (1980) exponential D is written out, as a peer would for its one case. Only the
material data come from the setup.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.linalg.lapack import dgtsv

from casedepth.constants import GAS_CONSTANT_CAL as R_CAL


class CrankNicolsonPeer:
    """The inverse (soak for a target depth) of one setup, by linearly implicit Crank–Nicolson.

    ``cells`` cells growing by ``stretch`` over the domain (last cell over first), first step
    ``first_step`` × the rough soak time, steps growing by ``growth``.
    """

    def __init__(self, setup, cells: int = 160, stretch: float = 8.0, domain: float = 8.0,
                 first_step: float = 1e-3, growth: float = 1.1):
        self.setup = setup
        self.cells, self.stretch, self.domain = cells, stretch, domain
        self.first_step, self.growth = first_step, growth
        T = setup.temperature
        self.A = 0.47e-4 * math.exp(-37000.0 / (R_CAL * T))  # m²/s (Tibbetts 1980: 0.47 cm²/s)
        self.s = -1.6 + 6600.0 / (R_CAL * T)  # d ln D / dC, per wt %
        self.steps = 0

    def inverse(self, target: float) -> float:
        """Soak [s] for an effective case depth of ``target`` [m]."""
        st = self.setup
        c_core, c_eq, beta, thr = st.steel.carbon, st.equilibrium_carbon, st.beta, st.threshold_carbon
        d_max = self.A * math.exp(self.s * max(c_eq, c_core))
        scale = st.rough_soak_time(target)
        widths = (self.stretch ** (1.0 / (self.cells - 1))) ** np.arange(self.cells)
        x = np.concatenate(([0.0], np.cumsum(widths))) * (self.domain * math.sqrt(d_max * scale) / widths.sum())
        k = int(np.argmin(np.abs(x - target)))
        x *= target / x[k]  # a node on the target
        faces = 0.5 * (x[1:] + x[:-1])
        kA = self.A / np.diff(x)  # conductance × A
        V = np.diff(np.concatenate(([0.0], faces, [x[-1]])))
        half_s = 0.5 * self.s
        n = len(x)
        diag = np.empty(n)

        def step(c, h, theta):
            kD = np.add(c[1:], c[:-1])
            kD *= half_s
            np.exp(kD, out=kD)
            kD *= kA
            flow = np.subtract(c[1:], c[:-1])
            flow *= kD  # into node i from node i+1
            u = flow * half_s
            up = kD + u  # d flow / d c[i+1]
            lo = kD - u  # -d flow / d c[i]
            rhs = np.empty(n)
            rhs[:-1] = flow
            rhs[-1] = 0.0
            rhs[1:] -= flow
            rhs[0] += beta * (c_eq - c[0])
            rhs *= h
            g = theta * h
            up *= -g
            lo *= -g
            np.copyto(diag, V)
            diag[:-1] -= lo
            diag[1:] -= up
            diag[0] += g * beta
            _, _, _, dc, _ = dgtsv(lo, diag, up, rhs, 1, 1, 1, 1)
            dc += c
            return dc

        c = np.full(n, c_core)
        t, h, steps = 0.0, self.first_step * scale, 0
        while True:
            steps += 1
            theta = 1.0 if steps <= 2 else 0.5
            new = step(c, h, theta)
            if new[k] >= thr:
                a, fa, b, fb, side = 0.0, c[k] - thr, h, new[k] - thr, 0
                for _ in range(50):
                    tau = (fa * b - fb * a) / (fa - fb)
                    f = step(c, tau, theta)[k] - thr
                    if abs(f) <= 1e-10 or abs(b - a) <= 1e-12 * h:
                        break
                    if f * fb > 0:
                        b, fb = tau, f
                        if side == -1:
                            fa *= 0.5
                        side = -1
                    else:
                        a, fa = tau, f
                        if side == 1:
                            fb *= 0.5
                        side = 1
                self.steps = steps
                return t + tau
            c, t, h = new, t + h, h * self.growth
