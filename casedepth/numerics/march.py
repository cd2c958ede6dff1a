"""A march of the carbon solver that knows its history: the one object every cycle planner uses.

The case grows monotonically while the surface carburizes, so a planner marches once, keeping the
threshold depth after every step, and then asks the march when a depth was reached
(:meth:`March.time_to`), what the profile was at any time (:meth:`March.profile_at`), and for a
fresh solver starting there (:meth:`March.fork`). A time that falls inside a step is reached by
re-taking that step with the shorter length, so every answer is as accurate as the march itself.
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np

from .roots import illinois
from .solver import CarbonSolver, History, Profile, SurfaceCondition


def land_on(depth_after: Callable[[float], float], target: float, step: float, depth_start: float,
            depth_end: float) -> float:
    """The part of a step [s] after which the threshold depth equals ``target`` [m].

    ``depth_after(tau)`` re-takes the step with length tau. Depth² grows nearly linearly with time, so
    regula falsi on depth² (Illinois variant: Dowell & Jarratt, BIT 11 (1971) 168) lands in two or
    three trials to 1e-7 of the target.
    """
    # |depth² − target²| ≤ 2e-7 target² means the depth is within 1e-7 of the target
    return illinois(lambda tau: depth_after(tau) ** 2 - target**2, 0.0, depth_start**2 - target**2,
                    step, depth_end**2 - target**2, 1e-12 * step, 2e-7 * target**2)


class March:
    """The solver ``solver`` marched on from its present state, with the depth where the carbon falls to
    ``threshold`` [wt %] recorded after every step.

    Times are the solver's own [s] (the march starts at ``start_time``); depths in m.
    """

    def __init__(self, solver: CarbonSolver, threshold: float):
        self.solver = solver
        self.threshold = float(threshold)
        self.first = len(solver.history_time) - 1  # history index of the state the march starts from
        self.depths = [solver.threshold_depth(self.threshold)]  # after every step since the start

    @property
    def start_time(self) -> float:
        return self.solver.history_time[self.first]

    @property
    def depth(self) -> float:
        """The threshold depth now, [m]."""
        return self.depths[-1]

    def advance(self, duration: float, condition: SurfaceCondition | Callable[[float], SurfaceCondition],
                until: float = math.inf, max_step: float = math.inf) -> bool:
        """March ``duration`` [s] under ``condition`` (see :meth:`CarbonSolver.advance`), stopping early once
        the depth reaches ``until`` [m]; True if it did. Only the march's own steps may move the solver."""

        def record(s: CarbonSolver) -> bool:
            self.depths.append(s.threshold_depth(self.threshold))
            return self.depths[-1] >= until

        self.solver.advance(duration, condition, record, max_step)
        return self.depths[-1] >= until

    def time_to(self, depth: float) -> float:
        """The time [s] at which the threshold depth reached ``depth`` [m] (the start time if it was there
        already). ``depth`` must not exceed :attr:`depth`."""
        k = int(np.searchsorted(self.depths, depth, side="left"))
        if k == 0:
            return self.start_time
        index = self.first + k
        solver = self.solver
        t0 = solver.history_time[index - 1]
        tau = land_on(lambda tau: solver.retake(index, tau).depth_at(self.threshold), depth,
                      solver.history_time[index] - t0, self.depths[k - 1], self.depths[k])
        return t0 + tau

    def _index(self, time: float) -> int:
        return int(np.clip(np.searchsorted(self.solver.history_time, time), 1, len(self.solver.history_time) - 1))

    def profile_at(self, time: float) -> Profile:
        """The profile at ``time`` [s] within the march, the step that spans it re-taken to it."""
        solver = self.solver
        k = int(np.searchsorted(solver.history_time, time))
        if k < len(solver.history_time) and solver.history_time[k] == time:
            return Profile(solver.nodes, solver.snapshot(k), float(time), solver.geometry.half_section)
        k = self._index(time)
        return solver.retake(k, time - solver.history_time[k - 1])

    def history(self, time: float, profile: Profile | None = None) -> History:
        """The history from the solver's start up to ``time`` [s], ending with the exact profile there
        (``profile``, if the caller has it already)."""
        k = int(np.searchsorted(self.solver.history_time, time))
        if k < len(self.solver.history_time) and self.solver.history_time[k] == time:
            return self.solver.history(k)
        return self.solver.history(self._index(time), profile or self.profile_at(time))

    def fork(self, time: float | None = None) -> CarbonSolver:
        """A new solver on this grid starting from the state at ``time`` [s] (default: now)."""
        if time is None:
            return self.solver.fork()
        return self.solver.fork(self.profile_at(time).carbon, time)
