"""Pulse tables for a low-pressure carburizing callout, and what a given table gives.

* :func:`run_pulses` — the forward mode: a pulse table run on the load (boosts and diffuses, then the drop to the
  hardening temperature and the equalize, whose carbon moves inward too);
* :func:`plan_pulses` — the planner: the pulse table that ends with the case at the target depth and the surface
  carbon in the middle of its window, no boost holding the surface at the limit longer than allowed.

How a table is built (the planner's own rule, stated so a planner can follow it): every boost lasts until the
surface reaches the limit and then holds it there the same time ``hold``; every diffuse but the last lasts until
the surface has fallen to the re-boost carbon, halfway from the limit to the final surface aim (so the diffuses
lengthen as the case deepens, as published schedules do); the last diffuse lasts until the case, after the drop
and equalize, is at the target. ``hold`` is then the one number that sets how much carbon goes in, found by a
root search so that the surface ends at its aim; the number of pulses is the fewest whose hold is within the
allowed time (or the number asked for).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import cached_property

from .. import formats
from ..errors import InputError, NotReachableError, SolverError
from ..numerics.march import March
from ..numerics import searches
from ..numerics.batch import run_programs
from ..numerics.roots import bracket_and_solve_steps, secant_on_squares_steps
from ..numerics.solver import CarbonSolver, threshold_depth
from ..units import both_lengths, format_duration
from .pulses import Pulse, PulseMarch, PulseRun, check_pulses, cool_program, finish
from .setup import LpcSetup

#: the longest a boost holds the surface at the limit by default, s (common practice, from memory: boosts of a few
#: minutes; a surface held at saturation much longer grows carbides at the grain boundaries)
DEFAULT_HOLD = 180.0
#: where a diffuse between boosts ends: this share of the way from the limit down to the final surface aim
REBOOST_SHARE = 0.5
MAX_PULSES = 40
#: the longest hold at the limit a search tries, s
LONGEST_HOLD = 7200.0
#: the hold falls about as the count to this power (measured on this planner's tables: 1.52–1.58 for 0.5, 1.0 and
#: 1.6 mm of 8620 at 950 °C; a saturated surface takes carbon as √t, which alone would make it 2)
HOLD_EXPONENT = 1.55
#: the counts the search for the fewest pulses starts from, in turn, until one lands (5: a usual table)
FIRST_COUNTS = (5, 1, 15)
#: a diffuse longer than this is not planned, s
MAX_DIFFUSE = 10 * 3600.0




#: the time scale the pulses' solver is sized for, s: every boost and diffuse starts with steps of 1/1000 of it, so a
#: boost of a few minutes takes about 10–15 steps (a 17-pulse, 8 h table lands within 0.01 % of a 4× refined solve
#: and of the independent method-of-lines peer in tests/lpc_peer.py; sized for the whole table instead, 0.07 %, and
#: for the case alone, 0.5 %: the boosts then took 2–3 steps). The grid grows with the case (the solver extends it).
PULSE_TIME_SCALE = 3 * 3600.0


def _march(lpc: LpcSetup, solver=None) -> PulseMarch:
    if solver is None:
        # the first boost lasts minutes against the table's hours: it starts with a restart's first step, not the
        # longer one a soak from the core's carbon may take (Accuracy.first_step)
        accuracy = lpc.carbon.accuracy
        carbon = replace(lpc.carbon, accuracy=replace(accuracy, first_step=accuracy.restart_step))
        solver = carbon.solver(soak_time=PULSE_TIME_SCALE)
    return PulseMarch(solver, lpc.temperature, lpc.limit, lpc.influx)


def run_pulses(lpc: LpcSetup, pulses: list[Pulse]) -> PulseRun:
    """What the pulse table ``pulses`` gives on the load, the drop and equalize after it counted."""
    check_pulses(pulses)
    march = _march(lpc)
    for pulse in pulses:
        march.boost(pulse.boost)
        march.diffuse(pulse.diffuse)
    march.cool(lpc.hardening_temperature, lpc.drop_time, lpc.equalize_time)
    return finish(march, pulses, lpc.threshold_carbon)


#: the least a trial that cannot land misses by, so that no root is found among such trials
MISSED = 1e-3
#: a table lands when its surface ends this close to the aim, wt % (else that count of pulses cannot land)
LANDED = 2e-3


class _Missed(Exception):
    """A trial put in more carbon than the target takes (the case past it before the last diffuse) or too little (the
    case short of it after the longest diffuse). ``miss`` is above :data:`MISSED` for the first and below −MISSED for
    the second, and grows with how far the case misses, so a root search can still take a secant."""

    def __init__(self, miss: float):
        super().__init__(miss)
        self.miss = miss


def _last_diffuse(lpc: LpcSetup, march: PulseMarch, target: float, aim: float, offset: list[float]):
    """Diffuse until the case, after the drop and equalize, is at ``target`` [m]: the diffuse's length [s] and the
    surface carbon [wt %] the load ends with (:class:`_Missed`, measured against the surface ``aim``, if it cannot).
    A search (see :class:`_Cool`)."""
    thr = lpc.threshold_carbon
    solver = march.solver
    start = solver.time

    if solver.threshold_depth(thr) >= target:  # past it before the drop adds its part: too much carbon, a miss above 0
        raise _Missed(MISSED + max(float(solver.carbon[0]) - aim, 0.0) + solver.threshold_depth(thr) / target - 1.0)
    diffusing = March(solver, thr)
    if not diffusing.advance(MAX_DIFFUSE, march._closed(), until=target):  # too little: a miss below 0
        raise _Missed(-MISSED + min(float(solver.carbon[0]) - aim, 0.0) + diffusing.depth / target - 1.0)

    def trial(x: float):
        time = diffusing.time_to(math.sqrt(max(x, 0.0)))
        state = diffusing.fork(time)
        depth, surface = yield _Cool(state)
        return depth, state.threshold_depth(thr) ** 2, (time, surface, depth)

    floor = diffusing.depths[0] ** 2
    try:
        # the drop's share of the depth² (``offset``) varies slowly from trial to trial: the last one starts the search
        (time, surface, depth), offset[0] = yield from secant_on_squares_steps(trial, target, offset[0], floor,
                                                                              target**2, 1e-6)
    except SolverError:  # the drop spreads the case back below the target whatever the stop: too little carbon
        raise _Missed(-MISSED - 0.5) from None
    if depth > target * (1 + 1e-4):  # the drop alone takes it past the target with no diffuse: too much carbon
        raise _Missed(MISSED + max(surface - aim, 0.0) + depth / target - 1.0)
    return time - start, surface


def _trial(lpc: LpcSetup, target: float, count: int, hold: float, reboost: float,
           aim: float, offset: list[float] | None = None):
    """The table of ``count`` pulses each holding the limit ``hold`` [s] (see the module notes), and the surface carbon
    [wt %] it ends with when the case is at ``target``. A search (see :class:`_Cool`)."""
    march = _march(lpc)
    pulses = []
    for _ in range(count - 1):
        pulses.append(Pulse(march.boost(hold=hold), march.diffuse(until_surface=reboost)))
    boost = march.boost(hold=hold)
    diffuse, surface = yield from _last_diffuse(lpc, march, target, aim, [0.0] if offset is None else offset)
    return [*pulses, Pulse(boost, diffuse)], surface


@dataclass
class PulsePlan:
    """A planned table: its pulses, the hold at the limit of every boost [s], the re-boost carbon [wt %], the surface
    aim [wt %], the same callout with one pulse fewer (longer boosts) where there is one, and what the table gives
    (:attr:`run`: the table re-run as a table, as a saved plan runs it)."""

    lpc: LpcSetup
    pulses: list[Pulse]
    hold: float
    reboost: float
    aim: float
    fewer: PulsePlan | None = None
    warnings: list[str] = field(default_factory=list)

    @cached_property
    def run(self) -> PulseRun:
        return run_pulses(self.lpc, self.pulses)


def _hold_guess(lpc: LpcSetup, target: float, aim: float, reboost: float, count: int) -> float:
    """A first estimate of the hold [s] that puts in the carbon a case of ``target`` [m] with the surface at ``aim``
    holds, only to start the search: that carbon as Crank's (1975, eq. 3.15) erfc profile, each boost's as the
    constant-flux rise to the limit (Carslaw & Jaeger 1959 §2.9, from memory) and then a surface stepped from the
    re-boost carbon to the limit, 2ΔC√(Dh/π) (Crank 1975 eq. 3.15), D at the limit and constant."""
    c0, T, limit, flux = lpc.steel.carbon, lpc.temperature, lpc.limit, lpc.influx
    wanted = (lpc.threshold_carbon - c0) / (aim - c0)
    if not 0.0 < wanted < 1.0:
        return 120.0
    low, high = 0.0, 6.0  # erfc⁻¹(wanted) by bisection: only a start
    for _ in range(40):
        middle = 0.5 * (low + high)
        low, high = (middle, high) if math.erfc(middle) > wanted else (low, middle)
    length = target / (2.0 * low)
    carbon = (aim - c0) * 2.0 * length / math.sqrt(math.pi)
    D = float(lpc.carbon.diffusivity(limit, T))
    if math.isfinite(flux):
        carbon -= flux * math.pi * D * ((limit - c0) / (2.0 * flux)) ** 2  # the first boost's rise to the limit
        carbon -= (count - 1) * flux * math.pi * D * ((limit - reboost) / (2.0 * flux)) ** 2
    per_boost = max(carbon / count, 1e-9)
    return min(max((per_boost / (2.0 * (limit - reboost) * math.sqrt(D / math.pi))) ** 2, 5.0), 3600.0)


def _for_count(lpc: LpcSetup, target: float, window: tuple[float, float], count: int, guess: float | None = None):
    """The table of ``count`` pulses that ends on the target with the surface at the middle of ``window`` (the search
    for the hold starts at ``guess`` [s]). A search (see :class:`_Cool`) returning a :class:`PulsePlan`."""
    aim = 0.5 * (window[0] + window[1])
    reboost = lpc.limit - REBOOST_SHARE * (lpc.limit - aim)
    found: dict[float, tuple[list[Pulse], float]] = {}
    offset = [0.0]  # what the drop adds to the depth², from the last trial

    def miss(hold: float):
        try:
            found[hold] = yield from _trial(lpc, target, count, hold, reboost, aim, offset)
        except _Missed as missed:
            return missed.miss
        return found[hold][1] - aim

    shortest = 0.0 if math.isfinite(lpc.carbon_flux) else 1.0  # an unlimited flux puts nothing in without a hold
    if guess is None:
        guess = _hold_guess(lpc, target, aim, reboost, count)
    hold = yield from bracket_and_solve_steps(miss, max(guess, shortest), shortest, LONGEST_HOLD, 1.0, 5e-4,
                             lambda: NotReachableError(
                                 "case_max", f"{both_lengths(target)} with the surface at {formats.carbon(aim)} needs "
                                 f"boosts of over 2 h at the limit with {count} pulses: plan more pulses"),
                             lambda: NotReachableError(
                                 "case_max", f"{count} boost{'s' if count > 1 else ''} that only reach the limit already "
                                 f"put in more carbon than {both_lengths(target)} takes with the surface at "
                                 f"{formats.carbon(aim)}: plan fewer pulses"))
    if hold not in found:
        yield from miss(hold)
    if hold not in found or abs(found[hold][1] - aim) > LANDED:
        raise NotReachableError("case_max", f"no hold of the limit lands {both_lengths(target)} with the surface at "
                                f"{formats.carbon(aim)} with {count} pulses")
    pulses, _ = found[hold]
    return PulsePlan(lpc, pulses, hold, reboost, aim)


def plan_pulses(lpc: LpcSetup, target: float, window: tuple[float, float], count: int | None = None,
                max_hold: float = DEFAULT_HOLD) -> PulsePlan:
    """The pulse table for a case of ``target`` [m] at the threshold with the final surface carbon in ``window``
    [wt %] (see the module notes): ``count`` pulses, or the fewest whose boosts hold the limit no longer than
    ``max_hold`` [s]. Its :attr:`PulsePlan.fewer` is the same callout with one pulse fewer."""
    return searches.alone(_plan_steps(lpc, target, window, count, max_hold, fewer=True), lambda r: _cooled(lpc, r.state.fork()))


def pulse_tables(rows: list[tuple]) -> list[PulsePlan | Exception]:
    """:func:`plan_pulses` of each row of its arguments ``(lpc, target, window, count, max_hold)``, without the table
    with one pulse fewer (:attr:`PulsePlan.fewer` is None): the searches run side by side, each round's drops and
    equalizes marched in one batch (:func:`casedepth.numerics.batch.run_programs`), so the same tables to round-off;
    a row the single planner refuses gets its error in its place."""
    setups = [row[0] for row in rows]

    def serve_many(keys: list[int], requests: list[_Cool]) -> list:
        solvers = [request.state.fork() for request in requests]
        programs = [cool_program(setups[k].temperature, setups[k].limit, setups[k].hardening_temperature,
                                 setups[k].drop_time, setups[k].equalize_time) for k in keys]
        out = []
        for k, solver, marched in zip(keys, solvers, run_programs(solvers, programs)):
            if marched is None:  # not batched: alone, as the single planner runs it
                try:
                    out.append(_cooled(setups[k], solver))  # run_programs did not move it
                except (InputError, SolverError) as error:
                    out.append(error)
                continue
            lpc = setups[k]
            out.append((threshold_depth(solver.nodes, marched.carbon, lpc.threshold_carbon,
                                        solver.geometry.half_section), float(marched.carbon[0])))
        return out

    return searches.together([_plan_steps(*row, fewer=False) for row in rows], serve_many)


@dataclass(frozen=True)
class _Cool:
    """A search's request: the drop and equalize from ``state`` (on a fork of it); answered with the case depth [m]
    and the surface carbon [wt %] after them. The planner's searches are generators that yield these
    (:mod:`casedepth.numerics.searches`): served at once for one plan, in one batch for several."""

    state: CarbonSolver


def _cooled(lpc: LpcSetup, solver: CarbonSolver) -> tuple[float, float]:
    """The case depth [m] and surface carbon [wt %] after the drop and equalize, marching ``solver`` (a fork of a
    request's state) through them."""
    cooled = _march(lpc, solver)
    cooled.cool(lpc.hardening_temperature, lpc.drop_time, lpc.equalize_time)
    return cooled.solver.threshold_depth(lpc.threshold_carbon), float(cooled.solver.carbon[0])


def _plan_steps(lpc: LpcSetup, target: float, window: tuple[float, float], count: int | None, max_hold: float,
                fewer: bool):
    """The search of :func:`plan_pulses` (see :class:`_Cool`); with ``fewer``, also the table with one pulse fewer."""
    low, high = window
    if not (lpc.steel.carbon < low <= high < lpc.limit):
        raise InputError("surface_min", f"{formats.typed_range(low, high, '%C')} must lie between the core carbon "
                                        f"({formats.carbon(lpc.steel.carbon)}) and the limit ({formats.carbon(lpc.limit)})")
    if not (math.isfinite(max_hold) and max_hold > 0.0):
        raise InputError("max_hold", f"{max_hold!r} s is not a time above zero")
    plans: dict[int, PulsePlan | None] = {}  # every count tried, by count (None: no table of that count lands)
    if count is not None:
        if not (1 <= count <= MAX_PULSES):
            raise InputError("pulse_count", f"{count} is outside 1–{MAX_PULSES} pulses")
        plan = yield from _for_count(lpc, target, window, count)
    else:
        plan = yield from _fewest(lpc, target, window, max_hold, plans)
    if count is not None and plan.hold > max_hold:
        plan.warnings.append(f"Each boost holds the surface at the limit {format_duration(plan.hold)}, longer than "
                             f"{format_duration(max_hold)}: carbides may form at the surface; plan more pulses.")
    n = len(plan.pulses)
    if n > 1 and fewer:
        if n - 1 in plans:
            plan.fewer = plans[n - 1]
        else:
            try:
                plan.fewer = yield from _for_count(lpc, target, window, n - 1, guess=plan.hold * n / (n - 1))
            except (NotReachableError, InputError):
                plan.fewer = None
    return plan


def _fewest(lpc: LpcSetup, target: float, window: tuple[float, float], max_hold: float,
            plans: dict[int, PulsePlan | None]):
    """The plan with the fewest pulses whose hold is within ``max_hold`` [s]: a first guess from one pulse's hold,
    then one pulse more or fewer until it is the fewest that fits (every count tried is left in ``plans``)."""

    def plan_for(n: int):
        if n not in plans:
            # the carbon a boost puts in grows about as its hold: a known count's hold, shared out, starts the search
            known = min(plans.items(), key=lambda kv: abs(kv[0] - n) if kv[1] is not None else math.inf, default=None)
            guess = known[1].hold * known[0] / n if known is not None and known[1] is not None else None
            try:
                plans[n] = yield from _for_count(lpc, target, window, n, guess=guess)
            except NotReachableError:
                plans[n] = None
        return plans[n]

    # the hold falls about as a power of the count (:data:`HOLD_EXPONENT`): from the first count that lands (5, else
    # 1, 15), predict the count, refit the power on the counts known, then step to the fewest that fits
    for ref_n in FIRST_COUNTS:
        ref = yield from plan_for(ref_n)
        if ref is not None:
            break
    else:
        raise NotReachableError("case_max", f"no pulse table ends at {both_lengths(target)} with the surface in "
                                f"{formats.carbon_range(*window)} (tried {', '.join(map(str, FIRST_COUNTS))} pulses): for a shallow "
                                "case the drop and equalize alone carry the carbon of a boost too deep (quench from the "
                                "carburizing temperature, or carburize cooler); for a deep one, carburize hotter")
    n, exponent = ref_n, HOLD_EXPONENT
    for _ in range(6):
        guess = max(1, min(MAX_PULSES, math.ceil(ref_n * (ref.hold / max_hold) ** (1.0 / exponent) - 0.05)))
        if guess == n:
            break
        n = guess
        while (yield from plan_for(n)) is None and n != ref_n:  # no table of that count lands: back toward the one that did
            n += 1 if n < ref_n else -1
        if n == ref_n:
            break
        exponent = max(math.log(ref.hold / plans[n].hold) / math.log(n / ref_n), 0.3)
    while n < MAX_PULSES and plans[n].hold > max_hold and (yield from plan_for(n + 1)) is not None:
        n += 1
    while n > 1 and (yield from plan_for(n - 1)) is not None and plans[n - 1].hold <= max_hold:
        n -= 1
    chosen = yield from plan_for(n)
    if chosen is None:
        raise NotReachableError("case_max", f"no table of up to {MAX_PULSES} pulses ends at {both_lengths(target)} with the "
                                f"surface in {formats.carbon_range(*window)}")
    if chosen.hold > max_hold:
        chosen.warnings.append(f"Even {n} pulses hold the surface at the limit {format_duration(chosen.hold)} a boost, "
                               f"longer than {format_duration(max_hold)}.")
    return chosen
