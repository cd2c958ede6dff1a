"""Cycle planners: stage lengths chosen so that the case *at the end of the whole cycle* is on target.

* :func:`plan_single_soak` — the soak at temperature for each of several case depths, the carbon that
  the shop's heat-up, drop and equalize move counted;
* :func:`plan_boost_diffuse` — boost and diffuse times for a case depth and a final surface-carbon
  window, the same shop stages counted.

Both march once (:class:`~casedepth.numerics.march.March`), keeping every step; a trial re-takes the
step it needs, forks the solver there and runs only the stages after it. The stages after the soak
(or the diffuse) add depth nearly in quadrature, so where to stop is found by a secant on depth
squares (:func:`~casedepth.numerics.roots.secant_on_squares`), started from the last trial's offset.
"""

from __future__ import annotations

import math
from collections.abc import Generator
from dataclasses import dataclass

import numpy as np

from .. import formats
from ..errors import InputError, NotReachableError, SolverError
from ..models.austenite import saturation_carbon
from ..numerics.march import March
from ..numerics import searches
from ..numerics.roots import illinois_steps, secant_on_squares_steps
from ..numerics.solver import CarbonSolver, History, SurfaceCondition
from ..units import both_lengths, both_temperatures, format_duration
from .cycle import MAX_STAGE, CycleResult, Stage, check_recipe, run_recipe, run_recipes
from .setup import POTENTIAL_RANGE, CarburizingSetup

#: a surface-carbon target given as one value means value ± this, wt % (common practice for callouts)
SURFACE_TOLERANCE = 0.05


@dataclass
class BoostDiffusePlan:
    """Boost and diffuse times [s] and the cycle they give."""

    boost_time: float
    diffuse_time: float
    cycle: CycleResult
    surface_target: tuple[float, float]
    target_depth: float
    surface_aim: float

    def describe(self) -> str:
        return f"boost {format_duration(self.boost_time)}, then diffuse {format_duration(self.diffuse_time)}"


def surface_window(surface_target: float | tuple[float, float]) -> tuple[float, float]:
    """A surface-carbon window [wt %]: (low, high) as given, or one value meaning ± :data:`SURFACE_TOLERANCE`."""
    if isinstance(surface_target, (int, float)):
        return surface_target - SURFACE_TOLERANCE, surface_target + SURFACE_TOLERANCE
    low, high = surface_target
    return float(low), float(high)


# -- the searches, written once for one plan and for several ------------------------------------------------------
# A planner's search is a generator (casedepth.numerics.searches): where it needs the stages after a stop run (a drop,
# an equalize: the costly part of every trial), it yields an :class:`_Ending` and is sent the run. :func:`_alone`
# serves each request at once; :func:`_together` serves a round's requests of several searches in one batch
# (run_recipes), so each search takes the very trials it takes alone and gives its numbers to round-off.
@dataclass(frozen=True)
class _Ending:
    """A search's request: run its stages after the stop from ``state`` (on a fork of it)."""

    state: CarbonSolver


@dataclass(frozen=True)
class _Search:
    """A planner's search and what its requests need: the setup, the stages after the stop and their start
    temperature [K]."""

    setup: CarburizingSetup
    after: tuple[Stage, ...]
    temperature: float
    steps: Generator


def _serve(search: _Search, request: _Ending) -> CycleResult:
    return run_recipe(search.setup, list(search.after), search.temperature, solver=request.state.fork())


def _alone(search: _Search):
    """Run one search, serving each of its requests at once; what it returns."""
    return searches.alone(search.steps, lambda request: _serve(search, request))


def _together(rows: list[_Search]) -> list:
    """Run several searches, each round's requests served in one batch (run_recipes); what each returns, or the
    :class:`InputError` or :class:`SolverError` it raises (as it would alone)."""

    def serve_many(keys: list[int], requests: list[_Ending]) -> list:
        chosen = [rows[k] for k in keys]
        try:
            return run_recipes([r.setup for r in chosen], [list(r.after) for r in chosen],
                               [r.temperature for r in chosen], [q.state.fork() for q in requests])
        except (InputError, SolverError):  # one of them cannot run: each alone, its error its own
            out = []
            for search, request in zip(chosen, requests):
                try:
                    out.append(_serve(search, request))
                except (InputError, SolverError) as error:
                    out.append(error)
            return out

    return searches.together([search.steps for search in rows], serve_many)


def _ending(after: tuple[Stage, ...], state: CarbonSolver, threshold: float):
    """The case depth [m] and surface carbon [wt %] after the ``after`` stages run from ``state``, and their run (None
    if there are none): a generator step that asks for the run (see :class:`_Ending`)."""
    if not after:
        return state.threshold_depth(threshold), float(state.carbon[0]), None
    end = yield _Ending(state)
    return end.case_depth, end.surface_carbon, end


def plan_boost_diffuse(setup: CarburizingSetup, target_depth: float, surface_target: float | tuple[float, float],
                       boost_potential: float, diffuse_potential: float, temperature: float | None = None,
                       before: tuple[Stage, ...] = (), after: tuple[Stage, ...] = ()) -> BoostDiffusePlan:
    """Boost and diffuse times for a target effective case depth [m] and final surface carbon [wt %].

    ``surface_target`` is (low, high), or one value meaning ± :data:`SURFACE_TOLERANCE`. ``before``
    (e.g. a heat-up) and ``after`` (e.g. drop and equalize) stages are run as given and counted: both
    targets hold at the end of the whole cycle. The surface carbon such a cycle can end with runs from
    that of a diffuse alone (no boost) to that of a boost alone (no diffuse); the plan aims at the
    middle of the part of the window within that range. For a trial boost time the diffuse is marched
    until the case lands on target, and the boost time is adjusted (regula falsi) until the surface
    carbon at the end is the one aimed at.
    """
    T = setup.temperature if temperature is None else temperature
    tb, td, window, aim = _alone(_Search(setup, after, T, _boost_diffuse_steps(
        setup, target_depth, surface_target, boost_potential, diffuse_potential, T, before, after)))
    stages = [*before, Stage("boost", tb, T, boost_potential), Stage("diffuse", td, T, diffuse_potential), *after]
    cycle = run_recipe(setup, stages)
    return BoostDiffusePlan(tb, td, cycle, window, target_depth, aim)


def boost_diffuse_times(rows: list[tuple]) -> list[tuple[float, float] | Exception]:
    """The boost and diffuse times [s] :func:`plan_boost_diffuse` finds for each row of its arguments ``(setup,
    target_depth, surface_target, boost_potential, diffuse_potential, before, after)``, without the cycle it runs: the
    searches' trials run together, the same times to round-off; a row the single planner refuses gets its error."""
    runs = _together([_Search(setup, after, setup.temperature, _boost_diffuse_steps(
        setup, target, surface, boost, diffuse, setup.temperature, before, after))
        for setup, target, surface, boost, diffuse, before, after in rows])
    return [result if isinstance(result, Exception) else result[:2] for result in runs]


def _boost_diffuse_steps(setup, target_depth, surface_target, boost_potential, diffuse_potential, T, before, after):
    """The search of :func:`plan_boost_diffuse` (a generator, see :class:`_Ending`): returns (boost time [s], diffuse
    time [s], the surface window, the surface aimed at)."""
    low, high = surface_window(surface_target)
    if not (0.05 <= low <= high <= 2.0):
        raise InputError("surface_min", f"{formats.typed_range(low, high, '%C')} is not a carbon window within "
                         "0.05–2 %C")
    for name, potential in (("boost_potential", boost_potential), ("diffuse_potential", diffuse_potential)):
        if not (POTENTIAL_RANGE[0] <= potential <= POTENTIAL_RANGE[1]):
            raise InputError(name, f"{formats.typed(potential, '%C')} is outside "
                             f"{formats.typed_range(*POTENTIAL_RANGE, '%C')}")
    if boost_potential <= diffuse_potential:
        raise InputError("boost_potential", f"{formats.typed(boost_potential, '%C')} must be above the diffuse "
                         f"potential ({formats.typed(diffuse_potential, '%C')})")
    saturation = saturation_carbon(T)
    if boost_potential > saturation:
        raise InputError("boost_potential", f"{formats.typed(boost_potential, '%C')} is above the carbon saturation "
                         f"of austenite at {both_temperatures(T)} ({formats.carbon(saturation)}): the boost would "
                         f"form carbides and soot; lower it")
    check_recipe(setup, [*before, Stage("boost", 1.0, T, boost_potential), Stage("diffuse", 1.0, T, diffuse_potential), *after])
    af = setup.alloy_factor
    thr = setup.threshold_carbon
    boost = SurfaceCondition(T, boost_potential * af, setup.beta)
    diffuse = SurfaceCondition(T, diffuse_potential * af, setup.beta)

    # the boost alone, long enough to reach the target: every boost time to try lies within it
    solver = setup.solver(case_depth=target_depth)
    if before:
        run_recipe(setup, list(before), solver=solver)
    boosting = March(solver, thr)
    boost_start = boosting.start_time
    if not boosting.advance(MAX_STAGE, boost, until=target_depth):
        raise NotReachableError("target", f"{both_lengths(target_depth)} is not reached within {MAX_STAGE / 3600:g} h of boost")
    t_full = solver.history_time[-1] - boost_start

    def diffuse_to(state: CarbonSolver, depth2: float) -> CarbonSolver:
        """The state after diffusing from ``state`` until the case depth² is ``depth2`` (at once if it is there)."""
        depth = math.sqrt(max(depth2, 0.0))
        if state.threshold_depth(thr) >= depth:
            return state
        diffusing = March(state.fork(), thr)
        if not diffusing.advance(MAX_STAGE, diffuse, until=depth):
            raise NotReachableError("target", f"{both_lengths(target_depth)} is not reached within {MAX_STAGE / 3600:g} h of diffuse")
        return diffusing.fork(diffusing.time_to(depth))

    offset = [0.0]  # c = final depth² − depth² where the diffuse stops, from the last trial (varies slowly)

    def finish(tb: float):
        """Diffuse time and final surface carbon for boost time ``tb``, the case landing on target at the end."""
        state = boosting.fork(boost_start + tb)

        def trial(x: float):
            stop = diffuse_to(state, x)
            depth, surface, _ = yield from _ending(after, stop, thr)
            return depth, stop.threshold_depth(thr) ** 2, (stop, surface)

        (stop, surface), offset[0] = yield from secant_on_squares_steps(
            trial, target_depth, offset[0], state.threshold_depth(thr) ** 2, math.inf, 1e-6, tries=8)
        return stop.time - state.time, surface

    def surface_miss(tb: float):
        _, surface = yield from finish(tb)
        return surface - aim

    # the longest boost: with no diffuse at all, the case ends on target (after the 'after' stages)
    if after:
        def overshoot(tb: float):
            depth, _, _ = yield from _ending(after, boosting.fork(boost_start + tb), thr)
            return depth - target_depth

        f_full = yield from overshoot(t_full)
        f_none = yield from overshoot(0.0)
        tb_max = t_full if f_full <= 0 else (0.0 if f_none >= 0 else (yield from illinois_steps(
            overshoot, 0.0, f_none, t_full, f_full, 1e-6 * t_full, 1e-7 * target_depth)))
    else:
        tb_max = t_full
    _, surface_low = yield from finish(0.0)
    _, surface_high = yield from finish(tb_max)
    lo, hi = max(low, surface_low), min(high, surface_high)
    if lo > hi:
        raise NotReachableError("surface_min", f"{formats.typed_range(low, high, '%C')} cannot be reached: with these "
                                f"potentials the surface ends between {formats.carbon(surface_low)} (diffuse only) and "
                                f"{formats.carbon(surface_high)} (boost only); change the diffuse or boost potential")
    aim = 0.5 * (lo + hi)
    if aim <= surface_low:
        tb = 0.0
    elif aim >= surface_high:
        tb = tb_max
    else:
        tb = yield from illinois_steps(surface_miss, 0.0, surface_low - aim, tb_max, surface_high - aim,
                                       1e-6 * tb_max, 2e-4)
    td, _ = yield from finish(tb)
    return tb, td, (low, high), aim


@dataclass
class SoakPlan:
    """Soaks at temperature [s] for several case depths with the shop's heat-up and drop counted,
    and the whole cycle for one of them."""

    soak_times: list[float]
    cycle: CycleResult


def plan_single_soak(setup: CarburizingSetup, targets: list[float], before: tuple[Stage, ...] = (),
                     after: tuple[Stage, ...] = (), cycle_for: int = 1) -> SoakPlan:
    """Soaks at the setup's temperature and potential for each effective case depth [m] in ``targets``,
    counting the carbon the ``before`` (load, heat-up) and ``after`` (drop, equalize, quench…) stages move.

    The case grows in the heat-up once the load passes Ac3, and again in the drop to the hardening
    temperature and the equalize: each target holds at the end of the whole cycle. The ``cycle_for``
    target (whose whole cycle is returned) lands to 1e-6 of its depth, the others to 1e-4 (about the
    solver's own accuracy).
    """
    T = setup.temperature
    times, (ts, state, tail), head, soaking, uptake_at_start = _alone(_Search(
        setup, after, T, _single_soak_steps(setup, targets, before, after, cycle_for)))
    stages = [*before, Stage("soak", ts, T, setup.carbon_potential), *after]
    cycle = _joined_cycle(setup, stages, head, soaking, ts, uptake_at_start, state, tail)
    if 0.0 in times:
        cycle.warnings.append(f"The heat-up and drop alone give more than {formats.length(min(targets))} at "
                              f"{setup.threshold}: that target needs no soak at all")
    return SoakPlan(times, cycle)


def plan_single_soaks(setups: list[CarburizingSetup], aims: list[float], befores: list[tuple[Stage, ...]],
                      afters: list[tuple[Stage, ...]]) -> list[float | Exception]:
    """For each setup, the soak [s] :func:`plan_single_soak` finds for the depth ``aims`` [m] with its ``befores`` and
    ``afters`` stages counted, without the cycle it returns: the searches' trials (the stages after the soak) run
    together, so the same soaks to round-off. A row the single planner refuses gets the error it raises."""
    runs = _together([_Search(setup, after, setup.temperature, _single_soak_steps(setup, [aim], before, after, 0))
                      for setup, aim, before, after in zip(setups, aims, befores, afters)])
    return [result if isinstance(result, Exception) else result[0][0] for result in runs]


def _single_soak_steps(setup: CarburizingSetup, targets: list[float], before, after, cycle_for: int):
    """The search of :func:`plan_single_soak` (a generator, see :class:`_Ending`): returns the soaks [s], the chosen
    target's (soak, state at its end, run of the stages after), the heat-up's run, the soak's march and the carbon
    taken up before it."""
    T = setup.temperature
    thr = setup.threshold_carbon
    check_recipe(setup, [*before, Stage("soak", 1.0, T, setup.carbon_potential), *after])
    deepest = max(targets)
    solver = setup.solver(case_depth=targets[cycle_for])
    head = run_recipe(setup, list(before), solver=solver) if before else None
    uptake_at_start = solver.carbon_uptake()
    soaking = March(solver, thr)
    start = soaking.start_time
    if not soaking.advance(MAX_STAGE, setup.surface_condition, until=deepest):
        raise NotReachableError("target", f"{both_lengths(deepest)} is not reached within {MAX_STAGE / 3600:g} h of soak")
    floor = soaking.depths[0] ** 2

    def trial(x: float):
        time = soaking.time_to(math.sqrt(max(x, 0.0)))
        state = soaking.fork(time)
        final, _, end = yield from _ending(after, state, thr)
        return final, state.threshold_depth(thr) ** 2, (time - start, state, end)

    order = [cycle_for] + [i for i in range(len(targets)) if i != cycle_for]
    times, offset, chosen = [0.0] * len(targets), 0.0, None
    for i in order:
        found, offset = yield from secant_on_squares_steps(trial, targets[i], offset, floor, deepest**2,
                                                           1e-6 if i == cycle_for else 1e-4)
        times[i] = found[0]
        if i == cycle_for:
            chosen = found
    return times, chosen, head, soaking, uptake_at_start


def _joined_cycle(setup, stages, head, soaking: March, ts, uptake_at_start, state, tail) -> CycleResult:
    """The whole cycle from the pieces already run: the heat-up (``head``, or None), the soak's march up
    to ``ts`` after its start (whose state is ``state``) and the stages after it (``tail``, or None).
    Runs the cycle afresh if the pieces do not fit (the grid was extended on the way)."""
    history = soaking.history(soaking.start_time + ts)
    if tail is not None:
        history = History(history.depth, np.concatenate((history.times[:-1], tail.history.times)),
                          history.carbon[:-1] + list(tail.history.carbon), history.half_section)
    if any(len(c) != len(history.depth) for c in history.carbon):
        return run_recipe(setup, stages)
    starts = [*(head.stage_start if head else []), soaking.start_time, *(tail.stage_start if tail else [])]
    uptake = [*(head.stage_uptake if head else []), state.carbon_uptake() - uptake_at_start,
              *(tail.stage_uptake if tail else [])]
    profile = tail.profile if tail is not None else state.profile()
    depth = tail.case_depth if tail is not None else profile.depth_at(setup.threshold_carbon)
    return CycleResult(setup, list(stages), starts, uptake, profile, depth, history, check_recipe(setup, stages))
