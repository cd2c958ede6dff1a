"""What the two hand-written inverse peers share (:mod:`peer_cn`, :mod:`peer_bare`): Tibbetts' D, the graded grid with
a node on the target, and the landing of the step that crossed it. Independent of casedepth's solver; only the
material data and the rough soak come from the setup."""

from __future__ import annotations

import math

import numpy as np

from casedepth.constants import GAS_CONSTANT_CAL as R_CAL


class HandWritten:
    """A hand-written inverse of one setup: ``cells`` cells growing by ``stretch`` over ``domain`` length scales (last
    cell over first), first step ``first_step`` × the rough soak, steps growing by ``growth``; :attr:`steps` is the
    last inverse's step count."""

    def __init__(self, setup, cells: int = 160, stretch: float = 8.0, domain: float = 8.0,
                 first_step: float = 1e-3, growth: float = 1.1):
        self.setup = setup
        self.cells, self.stretch, self.domain = cells, stretch, domain
        self.first_step, self.growth = first_step, growth
        self.A, self.s = tibbetts(setup.temperature)  # m²/s, per wt %
        self.steps = 0

    def grid(self, target: float):
        """:func:`plate_grid` for ``target`` [m] with this peer's settings: (nodes [m], the target node, rough soak [s])."""
        return plate_grid(self.setup, target, self.A, self.s, self.cells, self.stretch, self.domain)

    def march(self, step, n: int, k: int, scale: float) -> float:
        """The time [s] at which the carbon at node ``k`` of ``n`` reaches the threshold, from the core's carbon:
        steps from ``first_step`` × ``scale`` [s] growing by ``growth``, ``step(c, h, start)`` giving the carbon after
        a step of ``h`` [s] from ``c`` (``start``: one of the first two, which smooth the sudden start), the step that
        crosses re-taken shorter (:func:`land`)."""
        st = self.setup
        c = np.full(n, st.steel.carbon)
        t, h, steps = 0.0, self.first_step * scale, 0
        while True:
            steps += 1
            start = steps <= 2
            new = step(c, h, start)
            if new[k] >= st.threshold_carbon:
                self.steps = steps
                return t + land(lambda tau: step(c, tau, start)[k], h, c[k], new[k], st.threshold_carbon)
            c, t, h = new, t + h, h * self.growth


def tibbetts(temperature: float) -> tuple[float, float]:
    """(A [m²/s], s [per wt %]) of Tibbetts' (1980) D = A·exp(s·C) at ``temperature`` [K]: 0.47 cm²/s ×
    exp(−(37000 − 6600 C)/(R T)) × exp(−1.6 C)."""
    return 0.47e-4 * math.exp(-37000.0 / (R_CAL * temperature)), -1.6 + 6600.0 / (R_CAL * temperature)


def plate_grid(setup, target: float, A: float, s: float, cells: int, stretch: float, domain: float):
    """Nodes [m] of a semi-infinite plate graded toward the surface (``cells`` cells over ``domain`` × √(D_max ×
    rough soak), the last ``stretch`` × the first; Patankar 1980, ch. 4), rescaled so that a node sits on
    ``target`` [m]: (nodes, that node's index, the rough soak [s])."""
    d_max = A * math.exp(s * max(setup.equilibrium_carbon, setup.steel.carbon))
    scale = setup.rough_soak_time(target)
    widths = (stretch ** (1.0 / (cells - 1))) ** np.arange(cells)
    x = np.concatenate(([0.0], np.cumsum(widths))) * (domain * math.sqrt(d_max * scale) / widths.sum())
    k = int(np.argmin(np.abs(x - target)))
    x *= target / x[k]
    return x, k, scale


def land(carbon_after, h: float, before: float, after: float, threshold: float) -> float:
    """The part [s] of a step of ``h`` [s] after which the carbon at the target node reaches ``threshold``, by
    regula falsi (Illinois: Dowell & Jarratt 1971) on ``carbon_after(tau)`` (the step re-taken with length tau),
    from the node's carbon ``before`` and ``after`` the whole step."""
    a, fa, b, fb, side = 0.0, before - threshold, h, after - threshold, 0
    tau = h
    for _ in range(50):
        tau = (fa * b - fb * a) / (fa - fb)
        f = carbon_after(tau) - threshold
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
    return tau
