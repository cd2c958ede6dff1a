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

import numpy as np
from scipy.linalg.lapack import dgtsv

from peer_common import HandWritten


class CrankNicolsonPeer(HandWritten):
    """The inverse (soak for a target depth) of one setup, by linearly implicit Crank–Nicolson.

    ``cells`` cells growing by ``stretch`` over the domain (last cell over first), first step
    ``first_step`` × the rough soak time, steps growing by ``growth``.
    """

    def inverse(self, target: float) -> float:
        """Soak [s] for an effective case depth of ``target`` [m]."""
        st = self.setup
        c_eq, beta = st.equilibrium_carbon, st.beta
        x, k, scale = self.grid(target)
        faces = 0.5 * (x[1:] + x[:-1])
        kA = self.A / np.diff(x)  # conductance × A
        V = np.diff(np.concatenate(([0.0], faces, [x[-1]])))
        half_s = 0.5 * self.s
        n = len(x)
        diag = np.empty(n)

        def step(c, h, start):
            theta = 1.0 if start else 0.5  # linearly implicit Euler for the first steps, then Crank–Nicolson
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

        return self.march(step, n, k, scale)
