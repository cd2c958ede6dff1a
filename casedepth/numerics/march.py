"""A march of the carbon solver that knows its history: the one object every cycle planner uses.

The case grows monotonically while the surface carburizes, so a planner marches once, keeping the
threshold depth after every step, and then asks the march when a depth was reached
(:meth:`March.time_to`), what the profile was at any time (:meth:`March.profile_at`), and for a
fresh solver starting there (:meth:`March.fork`). A time that falls inside a step is reached by
re-taking that step with the shorter length, so every answer is as accurate as the march itself.
"""

from __future__ import annotations

import bisect
import math
from collections.abc import Callable

from .roots import illinois
from .solver import CarbonSolver, History, Profile, SurfaceCondition, threshold_depth


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
    """The solver ``solver`` marched on from its present state, asked afterwards when the depth where the
    carbon falls to ``threshold`` [wt %] reached a value.

    Times are the solver's own [s] (the march starts at ``start_time``); depths in m. The depth after a
    step is worked out only when asked (:attr:`depths`, :meth:`time_to`); while marching ``until`` a
    depth, one comparison per step tells that the depth is still short of it (see :meth:`advance`).
    """

    def __init__(self, solver: CarbonSolver, threshold: float):
        self.solver = solver
        self.threshold = float(threshold)
        self.first = len(solver.history_time) - 1  # history index of the state the march starts from
        self._depths: dict[int, float] = {}  # depth after step k of the march (0: the start), when asked
        self._last_retake: Profile | None = None  # the last step re-taken by time_to, for profile_at

    @property
    def start_time(self) -> float:
        return self.solver.history_time[self.first]

    @property
    def steps(self) -> int:
        """Steps taken so far."""
        return len(self.solver.history_time) - 1 - self.first

    def depth_after(self, k: int) -> float:
        """The threshold depth after step ``k`` of the march (0: where it started), [m]."""
        if k not in self._depths:
            solver = self.solver
            self._depths[k] = threshold_depth(solver.nodes, solver.snapshot(self.first + k), self.threshold,
                                              solver.geometry.half_section)
        return self._depths[k]

    @property
    def depths(self) -> list[float]:
        """The threshold depth after every step since the start, [m]."""
        return [self.depth_after(k) for k in range(self.steps + 1)]

    @property
    def depth(self) -> float:
        """The threshold depth now, [m]."""
        return self.depth_after(self.steps)

    def advance(self, duration: float, condition: SurfaceCondition | Callable[[float], SurfaceCondition],
                until: float = math.inf, max_step: float = math.inf) -> bool:
        """March ``duration`` [s] under ``condition`` (see :meth:`CarbonSolver.advance`), stopping early once
        the depth reaches ``until`` [m]; True if it did. Only the march's own steps may move the solver.

        The depth is where the carbon *first* falls below the threshold going inward, so while the last
        node above ``until`` is below the threshold the depth is short of ``until`` whatever the rest of
        the profile: that one comparison saves working out the depth after most steps."""
        if not math.isfinite(until):
            self.solver.advance(duration, condition, None, max_step)
            return False
        threshold = self.threshold
        grid, shallower = None, -1  # the grid the index is for (a far end reached extends it)

        def reached(s: CarbonSolver) -> bool:
            nonlocal grid, shallower
            if s.nodes is not grid:
                grid, shallower = s.nodes, s.last_node_above(until)
            if shallower >= 0 and s.carbon[shallower] < threshold:
                return False
            return self.depth_after(self.steps) >= until

        if self.depth >= until:
            return True
        self.solver.advance(duration, condition, reached, max_step)
        return self.depth >= until

    def time_to(self, depth: float) -> float:
        """The time [s] at which the threshold depth reached ``depth`` [m] (the start time if it was there
        already). ``depth`` must not exceed :attr:`depth`."""
        # the first step after which the depth is at least ``depth``, by bisection: the case grows through a
        # march, so only a few of the steps' depths need working out; a march stopped on reaching the depth
        # crossed it in its last step, which is tried first
        low, high = 0, self.steps
        if self.depth_after(0) >= depth:
            return self.start_time
        if high > 1 and self.depth_after(high - 1) < depth:
            low = high - 1
        while high - low > 1:
            mid = (low + high) // 2
            low, high = (low, mid) if self.depth_after(mid) >= depth else (mid, high)
        k = high
        index = self.first + k
        solver = self.solver
        t0 = solver.history_time[index - 1]

        def retaken(tau: float) -> float:
            self._last_retake = solver.retake(index, tau)
            return self._last_retake.depth_at(self.threshold)

        tau = land_on(retaken, depth, solver.history_time[index] - t0, self.depth_after(k - 1), self.depth_after(k))
        return t0 + tau

    def _index(self, time: float) -> int:
        times = self.solver.history_time  # a list, sorted: bisect is what np.searchsorted does, without converting it
        return min(max(bisect.bisect_left(times, time), 1), len(times) - 1)

    def profile_at(self, time: float) -> Profile:
        """The profile at ``time`` [s] within the march, the step that spans it re-taken to it."""
        solver = self.solver
        k = bisect.bisect_left(solver.history_time, time)
        if k < len(solver.history_time) and solver.history_time[k] == time:
            return Profile(solver.nodes, solver.snapshot(k), float(time), solver.geometry.half_section)
        k = self._index(time)
        last = self._last_retake
        if last is not None and last.time == time and len(last.carbon) == len(solver.nodes):
            return last  # the step time_to re-took last, landing on this time
        return solver.retake(k, time - solver.history_time[k - 1])

    def history(self, time: float, profile: Profile | None = None) -> History:
        """The history from the solver's start up to ``time`` [s], ending with the exact profile there
        (``profile``, if the caller has it already)."""
        k = bisect.bisect_left(self.solver.history_time, time)
        if k < len(self.solver.history_time) and self.solver.history_time[k] == time:
            return self.solver.history(k)
        return self.solver.history(self._index(time), profile or self.profile_at(time))

    def fork(self, time: float | None = None) -> CarbonSolver:
        """A new solver on this grid starting from the state at ``time`` [s] (default: now)."""
        if time is None:
            return self.solver.fork()
        return self.solver.fork(self.profile_at(time).carbon, time)
