"""Whole furnace cycles: ordered stages, run through the carbon solver, and boost/diffuse planning.

A recipe is a list of :class:`Stage`. Carburizing stages (heat-up, boost, diffuse, soak, drop,
equalize) move carbon; the others (load, quench, wash, temper) only take time. Temperature ramps
linearly within a stage from where the previous stage ended; the carbon potential may step at the
start of a stage or ramp within it. During heat-up the part takes up carbon only once it is
austenitic (above its Ac3, Andrews 1965); below that the atmosphere is not carburizing steel that
matters here, and in practice it is not yet admitted (below about 760 °C, NFPA 86).

:func:`plan_boost_diffuse` finds the boost and diffuse times that give both a target effective
case depth and a target final surface carbon: for a trial boost time the diffuse stage is marched
until the case reaches the target, and the boost time is adjusted (regula falsi) until the surface
carbon at that moment is the one wanted.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from .austenite import Andrews_1965_Ac3, saturation_carbon
from .carburizing import GRAIN_GROWTH_TEMPERATURE, MAX_TEMPERATURE, POTENTIAL_RANGE, CarburizingSetup, _both
from .errors import InputError, NotReachableError
from .roots import illinois
from .solver import CarbonSolver, Profile, SurfaceCondition, threshold_depth
from .units import ZERO_CELSIUS, both_lengths, format_duration

# kind -> (moves carbon, ramps temperature by default, label)
STAGE_KINDS: dict[str, tuple[bool, str]] = {
    "load": (False, "Load and close"),
    "heat-up": (True, "Heat-up"),
    "boost": (True, "Boost"),
    "diffuse": (True, "Diffuse"),
    "soak": (True, "Soak"),
    "drop": (True, "Drop to hardening temperature"),
    "equalize": (True, "Equalize"),
    "quench": (False, "Quench"),
    "wash": (False, "Wash"),
    "temper": (False, "Temper"),
}
MAX_STAGE = 200 * 3600.0  # s
# a ramp (heat-up, drop) is crossed in at least this many steps, each at its midpoint condition
RAMP_STEPS = 10
#: a surface-carbon target given as one value means value ± this, wt % (common practice for callouts)
SURFACE_TOLERANCE = 0.05

ROOM = 20.0 + ZERO_CELSIUS


@dataclass(frozen=True)
class Stage:
    """One stage of a furnace cycle.

    Parameters
    ----------
    kind : str
        A key of :data:`STAGE_KINDS`.
    duration : float
        Length of the stage, [s].
    temperature : float or None
        Part temperature at the end of the stage, [K]; it ramps linearly from the previous stage's
        end. ``None`` for stages that take only time (their temperature does not matter to carbon).
    carbon_potential : float or None
        Carbon potential at the end of the stage, [wt %]; ``None`` for stages that move no carbon.
    start_potential : float or None
        Carbon potential at the start of the stage, [wt %], to ramp it; ``None`` steps it at once.
    """

    kind: str
    duration: float
    temperature: float | None = None
    carbon_potential: float | None = None
    start_potential: float | None = None

    @property
    def moves_carbon(self) -> bool:
        return STAGE_KINDS[self.kind][0]

    @property
    def label(self) -> str:
        return STAGE_KINDS[self.kind][1]

    @classmethod
    def heat_up(cls, to: float, potential: float, rate: float | None = None, duration: float | None = None,
                start: float = ROOM) -> "Stage":
        """A heat-up to ``to`` [K] at ``rate`` [K/s] from ``start`` [K], or in ``duration`` [s]."""
        if duration is None:
            if rate is None or not rate > 0:
                raise InputError("heat-up", "give a heating rate above zero or a duration")
            duration = (to - start) / rate
        return cls("heat-up", duration, to, potential)


@dataclass
class CycleResult:
    """A recipe run: the profile at the end and how it got there. Times in s, depths in m."""

    setup: CarburizingSetup
    stages: list[Stage]
    stage_start: list[float]
    stage_uptake: list[float]  # carbon taken up in each stage, wt % · m per unit surface
    profile: Profile
    case_depth: float
    history_time: np.ndarray
    history_carbon: list[np.ndarray]
    warnings: list[str] = field(default_factory=list)

    @property
    def total_time(self) -> float:
        return self.stage_start[-1] + self.stages[-1].duration if self.stages else 0.0

    @property
    def surface_carbon(self) -> float:
        return self.profile.surface_carbon

    def profile_at(self, time: float) -> Profile:
        """The profile at ``time`` [s] of the cycle (linear in time between solver steps)."""
        times = self.history_time
        k = int(np.clip(np.searchsorted(times, time), 1, len(times) - 1))
        w = float(np.clip((time - times[k - 1]) / max(times[k] - times[k - 1], 1e-30), 0.0, 1.0))
        return Profile(self.profile.depth, (1 - w) * self.history_carbon[k - 1] + w * self.history_carbon[k],
                       float(time), self.profile.half_section)


def check_recipe(setup: CarburizingSetup, stages: list[Stage]) -> list[str]:
    """Refuse a recipe that cannot be run, naming the stage; returns warnings for one that can."""
    if not stages:
        raise InputError("stages", "a recipe needs at least one stage")
    ac3 = Andrews_1965_Ac3(setup.steel.composition)
    warnings = []
    previous_t = None
    hottest = None
    for number, stage in enumerate(stages, 1):
        where = f"stage {number} ({stage.kind})"
        if stage.kind not in STAGE_KINDS:
            raise InputError(where, f"unknown kind; choose one of {', '.join(STAGE_KINDS)}")
        if not (math.isfinite(stage.duration) and 0.0 <= stage.duration <= MAX_STAGE):
            raise InputError(where, f"duration {stage.duration / 3600:g} h is outside 0–{MAX_STAGE / 3600:g} h")
        if not stage.moves_carbon:
            continue
        T = stage.temperature
        if T is None or not math.isfinite(T):
            raise InputError(where, "needs a temperature")
        if not (ac3 <= T <= MAX_TEMPERATURE):
            raise InputError(where, f"temperature {_both(T)} is outside {_both(ac3)} (Ac3, Andrews 1965) to "
                             f"{_both(MAX_TEMPERATURE)}")
        for name, potential in (("carbon potential", stage.carbon_potential), ("start potential", stage.start_potential)):
            if potential is None:
                if name == "carbon potential":
                    raise InputError(where, "needs a carbon potential")
                continue
            if not (math.isfinite(potential) and POTENTIAL_RANGE[0] <= potential <= POTENTIAL_RANGE[1]):
                raise InputError(where, f"{name} {potential:g} %C is outside {POTENTIAL_RANGE[0]:g}–{POTENTIAL_RANGE[1]:g} %C")
            T_here = T if name == "carbon potential" or previous_t is None else max(previous_t, ac3)
            saturation = saturation_carbon(T_here)
            if potential > saturation * (1 + 1e-9):
                raise InputError(where, f"{name} {potential:.2f} %C is above the carbon saturation of austenite at "
                                 f"{_both(T_here)} ({saturation:.2f} %C): carbides and soot; lower it")
        if stage.kind in ("drop",) and hottest is not None and T >= hottest:
            raise InputError(where, f"a drop must end below the carburizing temperature ({_both(hottest)}), "
                             f"not at {_both(T)}")
        if stage.kind in ("boost", "diffuse", "soak"):
            hottest = max(hottest or T, T)
        if T > GRAIN_GROWTH_TEMPERATURE and not any("grain" in w for w in warnings):
            warnings.append(f"{where} runs at {_both(T)}, above about 980 °C, where most carburizing grades coarsen "
                            f"their grain unless made fine-grained (common practice).")
        previous_t = T
    return warnings


def _conditions(setup: CarburizingSetup, stage: Stage, t_from: float):
    """The stage's surface condition as a function of time into the stage (or a constant)."""
    af = setup.alloy_factor
    t_to = stage.temperature
    p_to = stage.carbon_potential
    p_from = stage.start_potential if stage.start_potential is not None else p_to
    if t_from == t_to and p_from == p_to:
        return SurfaceCondition(t_to, p_to * af, setup.beta)
    span = max(stage.duration, 1e-30)

    def at(t: float) -> SurfaceCondition:
        w = min(max(t / span, 0.0), 1.0)
        return SurfaceCondition(t_from + w * (t_to - t_from), (p_from + w * (p_to - p_from)) * af, setup.beta)

    return at


def run_recipe(setup: CarburizingSetup, stages: list[Stage], start_temperature: float | None = None,
               solver: CarbonSolver | None = None) -> CycleResult:
    """Run a recipe on the setup's steel, part and models (its own temperature and potential are not used).

    ``start_temperature`` [K] is where the load starts: by default room temperature if the recipe
    begins with a heat-up, else the first carburizing stage's temperature (a load already at heat).
    """
    warnings = check_recipe(setup, stages)
    if start_temperature is None:
        first = next((s for s in stages if s.moves_carbon), None)
        start_temperature = ROOM if first is None or first.kind == "heat-up" else first.temperature
    ac3 = Andrews_1965_Ac3(setup.steel.composition)
    carbon_time = sum(s.duration for s in stages if s.moves_carbon)
    if solver is None:
        solver = setup.solver(soak_time=max(carbon_time, 60.0))
    starts, uptake = [], []
    t_now = start_temperature
    for stage in stages:
        starts.append(solver.time)
        before = solver.carbon_uptake()
        if not stage.moves_carbon or stage.duration == 0.0:
            if stage.duration > 0.0:
                solver.wait(stage.duration)
        else:
            frozen = 0.0
            t_from = t_now
            if t_from < ac3 < stage.temperature:  # heating through Ac3: carbon moves only above it
                frozen = stage.duration * (ac3 - t_from) / (stage.temperature - t_from)
                solver.wait(frozen)
                t_from = ac3
            rest = replace(stage, duration=stage.duration - frozen)
            condition = _conditions(setup, rest, t_from)
            ramp = not isinstance(condition, SurfaceCondition)
            solver.advance(rest.duration, condition, max_step=rest.duration / RAMP_STEPS if ramp else math.inf)
        uptake.append(solver.carbon_uptake() - before)
        if stage.moves_carbon:
            t_now = stage.temperature
    profile = solver.profile()
    depth = profile.depth_at(setup.threshold_carbon)
    history_time = np.array(solver.history_time)
    history_carbon = [solver.snapshot(k) for k in range(len(history_time))]
    return CycleResult(setup, list(stages), starts, uptake, profile, depth, history_time, history_carbon, warnings)


#: temperature shown for stages that do not set one: quench and wash baths, about 60 °C (display only)
BATH = 60.0 + ZERO_CELSIUS


def timeline(stages: list[Stage], start_temperature: float | None = None):
    """Temperature [K] and carbon potential [wt %] against time [s] at the stage boundaries, for plots.

    Returns (times, temperatures, potentials, labels): one point per boundary (ramps are straight
    between them; a stepped potential repeats its time); potential is NaN where no atmosphere acts.
    """
    if start_temperature is None:
        first = next((s for s in stages if s.moves_carbon), None)
        start_temperature = ROOM if first is None or first.kind == "heat-up" else first.temperature
    times, temps, pots, labels = [0.0], [start_temperature], [math.nan], []
    now, t_now = 0.0, start_temperature
    for stage in stages:
        labels.append((now, now + stage.duration, stage.label))
        if stage.moves_carbon:
            begin = stage.start_potential if stage.start_potential is not None else stage.carbon_potential
            times += [now, now + stage.duration]
            temps += [t_now, stage.temperature]
            pots += [begin, stage.carbon_potential]
            t_now = stage.temperature
        else:
            here = stage.temperature if stage.temperature is not None else (ROOM if stage.kind == "load" else BATH)
            times += [now, now + stage.duration]
            temps += [here, here]
            pots += [math.nan, math.nan]
            t_now = here
        now += stage.duration
    return np.array(times), np.array(temps), np.array(pots, dtype=float), labels


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
        return (f"boost {format_duration(self.boost_time)}, then diffuse {format_duration(self.diffuse_time)}")


def plan_boost_diffuse(setup: CarburizingSetup, target_depth: float, surface_target: float | tuple[float, float],
                       boost_potential: float, diffuse_potential: float, temperature: float | None = None,
                       before: tuple[Stage, ...] = (), after: tuple[Stage, ...] = ()) -> BoostDiffusePlan:
    """Boost and diffuse times for a target effective case depth [m] and final surface carbon [wt %].

    ``surface_target`` is (low, high), or one value meaning ± :data:`SURFACE_TOLERANCE`. ``before``
    (e.g. a heat-up) and ``after`` (e.g. drop and equalize) stages are run as given and counted: both
    targets hold at the end of the whole cycle. The surface carbon such a cycle can end with runs from
    that of a diffuse alone (no boost) to that of a boost alone (no diffuse); the plan aims at the
    middle of the part of the window within that range.
    """
    T = setup.temperature if temperature is None else temperature
    if isinstance(surface_target, (int, float)):
        surface_target = (surface_target - SURFACE_TOLERANCE, surface_target + SURFACE_TOLERANCE)
    low, high = surface_target
    if not (0.05 <= low <= high <= 2.0):
        raise InputError("surface target", f"{low:g}–{high:g} %C is not a carbon window within 0.05–2 %C")
    for name, potential in (("boost potential", boost_potential), ("diffuse potential", diffuse_potential)):
        if not (POTENTIAL_RANGE[0] <= potential <= POTENTIAL_RANGE[1]):
            raise InputError(name, f"{potential:g} %C is outside {POTENTIAL_RANGE[0]:g}–{POTENTIAL_RANGE[1]:g} %C")
    if boost_potential <= diffuse_potential:
        raise InputError("boost potential", f"{boost_potential:g} %C must be above the diffuse potential ({diffuse_potential:g} %C)")
    saturation = saturation_carbon(T)
    if boost_potential > saturation:
        raise InputError("boost potential", f"{boost_potential:.2f} %C is above the carbon saturation of austenite at "
                         f"{_both(T)} ({saturation:.2f} %C): the boost would form carbides and soot; lower it")
    check_recipe(setup, [*before, Stage("boost", 1.0, T, boost_potential), Stage("diffuse", 1.0, T, diffuse_potential), *after])
    af = setup.alloy_factor
    thr = setup.threshold_carbon
    boost = SurfaceCondition(T, boost_potential * af, setup.beta)
    diffuse = SurfaceCondition(T, diffuse_potential * af, setup.beta)

    # the boost alone, long enough to reach the target: every boost time to try lies within it
    template = setup.solver(case_depth=target_depth)
    if before:
        run_recipe(setup, list(before), solver=template)
    boost_start = template.time
    template.advance(MAX_STAGE, boost, lambda s: s.threshold_depth(thr) >= target_depth)
    if template.threshold_depth(thr) < target_depth:
        raise NotReachableError("target", f"{both_lengths(target_depth)} is not reached within {MAX_STAGE / 3600:g} h of boost")
    t_full = template.history_time[-1] - boost_start

    def boost_state(tb: float) -> CarbonSolver:
        return _state_at(template, boost_start + tb)

    def ending(state: CarbonSolver) -> tuple[float, float]:
        """Case depth and surface carbon after the 'after' stages, from ``state``."""
        if not after:
            return state.threshold_depth(thr), float(state.carbon[0])
        end = run_recipe(setup, list(after), T, solver=state.fork())
        return end.case_depth, end.surface_carbon

    def diffuse_to(state: CarbonSolver, depth: float) -> CarbonSolver:
        """The state after diffusing from ``state`` until the case depth is ``depth``."""
        if state.threshold_depth(thr) >= depth:
            return state
        solver = state.fork()
        solver.advance(MAX_STAGE, diffuse, lambda s: s.threshold_depth(thr) >= depth)
        if solver.threshold_depth(thr) < depth:
            raise NotReachableError("target", f"{both_lengths(target_depth)} is not reached within {MAX_STAGE / 3600:g} h of diffuse")
        k = len(solver.history_time) - 1
        tau = _land(solver, k, depth, thr)
        return template.fork(solver.retake(k, tau).carbon, solver.history_time[k - 1] + tau)

    hint = [0.0]  # c = final depth² − depth² where the diffuse stops, from the last trial (varies slowly)

    def finish(tb: float) -> tuple[float, float]:
        """Diffuse time and final surface carbon for boost time ``tb``, the case landing on target at
        the end of the cycle: the 'after' stages add depth nearly in quadrature, so the depth the
        diffuse stops at is found by secant on the squares, starting from the last trial's c."""
        state = boost_state(tb)
        goal2 = target_depth**2 - hint[0]
        previous = None
        for _ in range(8):
            end_state = diffuse_to(state, math.sqrt(max(goal2, 0.0)))
            depth, surface = ending(end_state)
            stop2 = end_state.threshold_depth(thr) ** 2
            hint[0] = depth**2 - stop2
            miss = target_depth - depth
            if not after or abs(miss) <= 1e-6 * target_depth or end_state is state and miss < 0:
                break
            slope = 1.0 if previous is None or previous[0] == stop2 else (depth**2 - previous[1]) / (stop2 - previous[0])
            previous = (stop2, depth**2)
            goal2 = stop2 + (target_depth**2 - depth**2) / max(slope, 0.1)
        return end_state.time - state.time, surface

    # the longest boost: with no diffuse at all, the case ends on target (after the 'after' stages)
    if after:
        def overshoot(tb: float) -> float:
            return ending(boost_state(tb))[0] - target_depth

        f_full = overshoot(t_full)
        f_none = overshoot(0.0)
        tb_max = t_full if f_full <= 0 else (0.0 if f_none >= 0 else
                                             illinois(overshoot, 0.0, f_none, t_full, f_full, 1e-6 * t_full, 1e-7 * target_depth))
    else:
        tb_max = t_full
    _, surface_low = finish(0.0)
    _, surface_high = finish(tb_max)
    lo, hi = max(low, surface_low), min(high, surface_high)
    if lo > hi:
        raise NotReachableError("surface target", f"{low:.2f}–{high:.2f} %C cannot be reached: with these potentials the "
                                f"surface ends between {surface_low:.3f} %C (diffuse only) and {surface_high:.3f} %C "
                                f"(boost only); change the diffuse or boost potential")
    aim = 0.5 * (lo + hi)
    if aim <= surface_low:
        tb = 0.0
    elif aim >= surface_high:
        tb = tb_max
    else:
        tb = illinois(lambda t: finish(t)[1] - aim, 0.0, surface_low - aim, tb_max, surface_high - aim,
                           1e-6 * tb_max, 2e-4)
    td, _ = finish(tb)
    stages = [*before, Stage("boost", tb, T, boost_potential), Stage("diffuse", td, T, diffuse_potential), *after]
    cycle = run_recipe(setup, stages)
    return BoostDiffusePlan(tb, td, cycle, (low, high), target_depth, aim)


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
    temperature and the equalize: each target holds at the end of the whole cycle. One march at
    temperature keeps every step; a trial soak is re-taken from it and only the ``after`` stages are
    run on a copy. The ``after`` stages add depth nearly in quadrature (final² = soak-end² + c, c
    varying slowly with depth), so a secant on the squares lands each target in one to three trials:
    the ``cycle_for`` target (whose whole cycle is returned) to 1e-6 of its depth, the others to 1e-4.
    """
    T = setup.temperature
    thr = setup.threshold_carbon
    soak = setup.surface_condition
    check_recipe(setup, [*before, Stage("soak", 1.0, T, setup.carbon_potential), *after])
    deepest = max(targets)
    template = setup.solver(case_depth=targets[cycle_for])
    head = run_recipe(setup, list(before), solver=template) if before else None
    start, uptake_at_start = template.time, template.carbon_uptake()
    depths = [template.threshold_depth(thr)]  # depth after every step of the soak

    def record(s: CarbonSolver) -> bool:
        depths.append(s.threshold_depth(thr))
        return depths[-1] >= deepest

    template.advance(MAX_STAGE, soak, record)
    if depths[-1] < deepest:
        raise NotReachableError("target", f"{both_lengths(deepest)} is not reached within {MAX_STAGE / 3600:g} h of soak")
    first = len(template.history_time) - len(depths)  # history index where the soak starts

    def soak_for(depth2: float) -> float:
        """Soak [s] after which the depth at temperature is √depth2 (0 if the heat-up already gives it)."""
        depth = math.sqrt(max(depth2, 0.0))
        if depth <= depths[0]:
            return 0.0
        k = first + int(np.searchsorted(depths, depth, side="left"))
        return template.history_time[k - 1] - start + _land(template, k, depth, thr)

    def state_after(ts: float) -> CarbonSolver:
        return _state_at(template, start + ts)

    def ending(ts: float) -> tuple[float, CycleResult | None]:
        state = state_after(ts)
        if not after:
            return state.threshold_depth(thr), None
        end = run_recipe(setup, list(after), T, solver=state)
        return end.case_depth, end

    floor = depths[0] ** 2
    # Secant on (soak-end depth², final depth²) per target: the one whose cycle is returned first and to
    # 1e-6, the others to 1e-4 (about the solver's own accuracy). Each starts from the c = final² −
    # soak-end² of the last trial, which varies slowly with depth, so most land in one or two trials.
    order = [cycle_for] + [i for i in range(len(targets)) if i != cycle_for]
    times, c, end = [0.0] * len(targets), 0.0, None
    for i in order:
        goal, tol = targets[i], (1e-6 if i == cycle_for else 1e-4)
        x = min(max(goal**2 - c, floor), deepest**2)
        tries = []
        for _ in range(12):
            ts = soak_for(x)
            final, ended = ending(ts)
            c = final**2 - x
            tries.append((x, final**2))
            if abs(final - goal) <= tol * goal or (ts == 0.0 and final >= goal):
                break
            if len(tries) == 1:
                x += goal**2 - final**2
            else:
                (x0, y0), (x1, y1) = tries[-2], tries[-1]
                x = x1 + (goal**2 - y1) * (x1 - x0) / (y1 - y0) if y1 != y0 else x1 + goal**2 - y1
            x = min(max(x, floor), deepest**2)
        else:
            raise ArithmeticError(f"the soak for {goal * 1e3:g} mm did not converge")
        times[i] = ts
        if i == cycle_for:
            end = ended
    ts = times[cycle_for]
    stages = [*before, Stage("soak", ts, T, setup.carbon_potential), *after]
    cycle = _joined_cycle(setup, stages, head, template, start, ts, uptake_at_start, state_after(ts), end)
    if 0.0 in times:
        cycle.warnings.append(f"The heat-up and drop alone give more than {min(targets) * 1e3:g} mm at "
                              f"{setup.threshold}: that target needs no soak at all")
    return SoakPlan(times, cycle)


def _joined_cycle(setup, stages, head, template, start, ts, uptake_at_start, state, tail) -> CycleResult:
    """The whole cycle from the pieces already run: the heat-up (``head``, or None), the soak's march
    (``template`` up to ``start + ts``, whose state is ``state``) and the stages after it (``tail``, or None).
    Runs the cycle afresh if the pieces do not fit (the grid was extended on the way)."""
    t = start + ts
    k = int(np.searchsorted(template.history_time, t))
    head_carbon = [template.snapshot(i) for i in range(k)]
    tail_times = list(tail.history_time) if tail is not None else [t]
    tail_carbon = list(tail.history_carbon) if tail is not None else [state.carbon]
    if any(len(c) != len(state.carbon) for c in (*head_carbon, *tail_carbon)):
        return run_recipe(setup, stages)
    starts = [*(head.stage_start if head else []), start, *(tail.stage_start if tail else [])]
    uptake = [*(head.stage_uptake if head else []), state.carbon_uptake() - uptake_at_start,
              *(tail.stage_uptake if tail else [])]
    profile = tail.profile if tail is not None else state.profile()
    depth = tail.case_depth if tail is not None else profile.depth_at(setup.threshold_carbon)
    return CycleResult(setup, list(stages), starts, uptake, profile, depth,
                       np.array(list(template.history_time[:k]) + tail_times), head_carbon + tail_carbon,
                       check_recipe(setup, stages))


def _state_at(march: CarbonSolver, t: float) -> CarbonSolver:
    """A fork of ``march`` at time ``t`` [s] within its history: the step that spans ``t`` is re-taken to it."""
    k = int(np.searchsorted(march.history_time, t))
    carbon = march.snapshot(k) if march.history_time[k] == t else march.retake(k, t - march.history_time[k - 1]).carbon
    return march.fork(carbon, t)


def _land(solver: CarbonSolver, k: int, target: float, thr: float) -> float:
    """Length of step ``k`` that brings the threshold depth to ``target`` (regula falsi on depth²)."""
    from .carburizing import _land_on

    t0 = solver.history_time[k - 1]
    step = solver.history_time[k] - t0
    half = solver.geometry.half_section
    d0 = threshold_depth(solver.nodes, solver.snapshot(k - 1), thr, half)
    d1 = threshold_depth(solver.nodes, solver.snapshot(k), thr, half)
    return _land_on(lambda tau: solver.retake(k, tau).depth_at(thr), target, step, d0, d1)


def temperature_tradeoff(setup: CarburizingSetup, target_depth: float, temperatures: list[float]) -> list[tuple[float, float]]:
    """Soak times [s] for the same target at several temperatures [K]: (temperature, soak time) pairs."""
    from .carburizing import soak_time_for_case_depth

    return [(T, soak_time_for_case_depth(replace(setup, temperature=T), target_depth).soak_time) for T in temperatures]
