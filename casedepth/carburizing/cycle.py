"""Whole furnace cycles: ordered stages run through the carbon solver.

A recipe is a list of :class:`Stage`. Carburizing stages (heat-up, boost, diffuse, soak, drop,
equalize) move carbon; the others (load, quench, wash, temper) only take time. Temperature ramps
linearly within a stage from where the previous stage ended; the carbon potential may step at the
start of a stage or ramp within it. During heat-up the part takes up carbon only once it is
austenitic (above its Ac3, Andrews 1965); below that the atmosphere is not carburizing steel that
matters here, and in practice it is not yet admitted (below about 760 °C, NFPA 86).

The planners that choose stage lengths for targets are in :mod:`casedepth.carburizing.planners`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from .. import formats
from ..constants import ROOM_TEMPERATURE, ZERO_CELSIUS
from ..errors import InputError
from ..models.austenite import Andrews_1965_Ac3, saturation_carbon
from ..numerics.batch import Program, Segment, run_program, run_programs
from ..numerics.solver import CarbonSolver, History, Profile, Ramp, SurfaceCondition
from ..units import both_temperatures, finite_number
from .setup import GRAIN_GROWTH_TEMPERATURE, MAX_TEMPERATURE, POTENTIAL_RANGE, CarburizingSetup

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
MAX_STAGES = 100  # stages in one cycle
# a ramp (heat-up, drop) is crossed in at least this many steps, each at its midpoint condition
RAMP_STEPS = 10


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
                start: float = ROOM_TEMPERATURE) -> "Stage":
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
    history: History
    warnings: list[str] = field(default_factory=list)

    @property
    def total_time(self) -> float:
        return self.stage_start[-1] + self.stages[-1].duration if self.stages else 0.0

    @property
    def surface_carbon(self) -> float:
        return self.profile.surface_carbon

    def profile_at(self, time: float) -> Profile:
        """The profile at ``time`` [s] of the cycle (linear in time between solver steps, for display)."""
        return self.history.profile_at(time)


STAGE_FILE_KEYS = ("kind", "duration_h", "temperature_c", "carbon_potential_pct", "start_potential_pct")


def stage_to_dict(stage: Stage) -> dict:
    """A stage as stored in a plan file (hours, °C, wt %)."""
    out = {"kind": stage.kind, "duration_h": float(f"{stage.duration / 3600.0:.12g}")}
    if stage.temperature is not None:
        out["temperature_c"] = float(f"{stage.temperature - ZERO_CELSIUS:.12g}")
    if stage.carbon_potential is not None:
        out["carbon_potential_pct"] = stage.carbon_potential
    if stage.start_potential is not None:
        out["start_potential_pct"] = stage.start_potential
    return out


def stage_from_dict(data: dict, number: int = 0) -> Stage:
    """A stage from its plan-file form; :class:`InputError` (key ``stages``) naming the stage and the entry at fault."""
    where = f"stage {number}" if number else "stage"
    unknown = sorted(set(data) - set(STAGE_FILE_KEYS))
    if unknown:
        raise InputError("stages", f"{where}: unknown entr{'y' if len(unknown) == 1 else 'ies'} {', '.join(unknown)}; "
                         f"known: {', '.join(STAGE_FILE_KEYS)}")
    if not isinstance(data.get("kind"), str) or data.get("kind") not in STAGE_KINDS:
        raise InputError("stages", f"{where}: kind {data.get('kind')!r} is not one of {', '.join(STAGE_KINDS)}")
    numbers = {}
    for key in STAGE_FILE_KEYS[1:]:
        value = data.get(key)
        if value is None and key != "duration_h":
            numbers[key] = None
            continue
        if not finite_number(value):
            raise InputError("stages", f"{where}: {key} {value!r} is not a number")
        numbers[key] = float(value)
    temperature = numbers["temperature_c"]
    return Stage(data["kind"], numbers["duration_h"] * 3600.0, None if temperature is None else temperature + ZERO_CELSIUS,
                 numbers["carbon_potential_pct"], numbers["start_potential_pct"])


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
            raise InputError("stages", f"{where}: unknown kind; choose one of {', '.join(STAGE_KINDS)}")
        if not (math.isfinite(stage.duration) and 0.0 <= stage.duration <= MAX_STAGE):
            raise InputError("stages", f"{where}: duration {stage.duration / 3600:g} h is outside 0–{MAX_STAGE / 3600:g} h")
        if not stage.moves_carbon:
            continue
        T = stage.temperature
        if T is None or not math.isfinite(T):
            raise InputError("stages", f"{where}: needs a temperature")
        if not (ac3 <= T <= MAX_TEMPERATURE):
            raise InputError("stages", f"{where}: temperature {both_temperatures(T)} is outside {both_temperatures(ac3)} (Ac3, Andrews 1965) to "
                             f"{both_temperatures(MAX_TEMPERATURE)}")
        for name, potential in (("carbon potential", stage.carbon_potential), ("start potential", stage.start_potential)):
            if potential is None:
                if name == "carbon potential":
                    raise InputError("stages", f"{where}: needs a carbon potential")
                continue
            if not (math.isfinite(potential) and POTENTIAL_RANGE[0] <= potential <= POTENTIAL_RANGE[1]):
                raise InputError("stages", f"{where}: {name} {formats.typed(potential, '%C')} is outside "
                                 f"{formats.typed_range(*POTENTIAL_RANGE, '%C')}")
            T_here = T if name == "carbon potential" or previous_t is None else max(previous_t, ac3)
            saturation = saturation_carbon(T_here)
            if potential > saturation * (1 + 1e-9):
                raise InputError("stages", f"{where}: {name} {formats.typed(potential, '%C')} is above the carbon "
                                 f"saturation of austenite at {both_temperatures(T_here)} ({formats.carbon(saturation)}): "
                                 f"carbides and soot; lower it")
        if stage.kind in ("drop",) and hottest is not None and T >= hottest:
            raise InputError("stages", f"{where}: a drop must end below the carburizing temperature ({both_temperatures(hottest)}), "
                             f"not at {both_temperatures(T)}")
        if stage.kind in ("boost", "diffuse", "soak"):
            hottest = max(hottest or T, T)
        if T > GRAIN_GROWTH_TEMPERATURE and not any("grain" in w for w in warnings):
            warnings.append(f"{where} runs at {both_temperatures(T)}, above about 980 °C, where most carburizing grades coarsen "
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
        return SurfaceCondition(t_to, p_to * af, setup.beta_at(t_to))
    return Ramp(t_from, t_to, p_from, p_to, af, setup.beta_at(t_to), max(stage.duration, 1e-30), setup.beta_activation)


def recipe_program(setup: CarburizingSetup, stages: list[Stage], start_temperature: float | None = None) -> Program:
    """The march a recipe makes (see :func:`run_recipe`), as data: frozen time where no carbon moves (stages
    that take only time, and a heat-up below Ac3), else the stage's condition, ramped where it ramps."""
    if start_temperature is None:
        first = next((s for s in stages if s.moves_carbon), None)
        start_temperature = ROOM_TEMPERATURE if first is None or first.kind == "heat-up" else first.temperature
    ac3 = Andrews_1965_Ac3(setup.steel.composition)
    segments = []
    t_now = start_temperature
    for number, stage in enumerate(stages):
        if not stage.moves_carbon or stage.duration == 0.0:
            if stage.duration > 0.0:
                segments.append(Segment(number, stage.duration))
        else:
            frozen = 0.0
            t_from = t_now
            if t_from < ac3 < stage.temperature:  # heating through Ac3: carbon moves only above it
                frozen = stage.duration * (ac3 - t_from) / (stage.temperature - t_from)
                segments.append(Segment(number, frozen))
                t_from = ac3
            rest = replace(stage, duration=stage.duration - frozen)
            condition = _conditions(setup, rest, t_from)
            ramp = not isinstance(condition, SurfaceCondition)
            segments.append(Segment(number, rest.duration, condition, rest.duration / RAMP_STEPS if ramp else math.inf))
        if stage.moves_carbon:
            t_now = stage.temperature
    return Program(len(stages), tuple(segments))


def _recipe_solver(setup: CarburizingSetup, stages: list[Stage]) -> CarbonSolver:
    carbon_time = sum(s.duration for s in stages if s.moves_carbon)
    return setup.solver(soak_time=max(carbon_time, 60.0))


def run_recipe(setup: CarburizingSetup, stages: list[Stage], start_temperature: float | None = None,
               solver: CarbonSolver | None = None) -> CycleResult:
    """Run a recipe on the setup's steel, part and models (its own temperature and potential are not used).

    ``start_temperature`` [K] is where the load starts: by default room temperature if the recipe
    begins with a heat-up, else the first carburizing stage's temperature (a load already at heat).
    """
    warnings = check_recipe(setup, stages)
    program = recipe_program(setup, stages, start_temperature)
    if solver is None:
        solver = _recipe_solver(setup, stages)
    marched = run_program(solver, program)
    profile = solver.profile()
    depth = profile.depth_at(setup.threshold_carbon)
    return CycleResult(setup, list(stages), marched.stage_start, marched.stage_uptake, profile, depth, solver.history(),
                       warnings)


def run_recipes(setups: list[CarburizingSetup], recipes: list[list[Stage]],
                start_temperatures: list[float | None] | None = None,
                solvers: list[CarbonSolver] | None = None) -> list[CycleResult]:
    """:func:`run_recipe` of each setup's recipe (from its start temperature and solver, where given), marched
    together where they can be (:func:`casedepth.numerics.batch.run_programs`): the same results, except that a
    batched result's history holds only the start and the end. A recipe that cannot be run raises as
    :func:`run_recipe` does. A given solver is not moved where its recipe was batched."""
    starts = start_temperatures or [None] * len(setups)
    warnings = [check_recipe(setup, stages) for setup, stages in zip(setups, recipes)]
    if solvers is None:
        solvers = [_recipe_solver(setup, stages) for setup, stages in zip(setups, recipes)]
    programs = [recipe_program(setup, stages, start) for setup, stages, start in zip(setups, recipes, starts)]
    results = []
    for setup, stages, start, solver, marched, warned in zip(setups, recipes, starts, solvers,
                                                              run_programs(solvers, programs), warnings):
        if marched is None:  # not batched (another diffusivity), or it needed what only a single march does
            results.append(run_recipe(setup, stages, start, solver=solver))
            continue
        half = setup.geometry.half_section
        profile = Profile(solver.nodes.copy(), marched.carbon, marched.time, half)
        history = History(solver.nodes.copy(), np.array([solver.time, marched.time]), [solver.carbon, marched.carbon], half)
        results.append(CycleResult(setup, list(stages), marched.stage_start, marched.stage_uptake, profile,
                                   profile.depth_at(setup.threshold_carbon), history, warned))
    return results


#: temperature shown for stages that do not set one: quench and wash baths, about 60 °C (display only)
BATH = 60.0 + ZERO_CELSIUS


def timeline(stages: list[Stage], start_temperature: float | None = None):
    """Temperature [K] and carbon potential [wt %] against time [s] at the stage boundaries, for plots.

    Returns (times, temperatures, potentials, labels): one point per boundary (ramps are straight
    between them; a stepped potential repeats its time); potential is NaN where no atmosphere acts,
    which includes wherever the furnace is below the safe temperature for admitting a flammable
    atmosphere (:data:`casedepth.safety.SAFE_ADMISSION_TEMPERATURE`, NFPA 86 practice): a ramp that
    crosses it gets a point there. ``labels`` are the stages' (start, end, label) and, where the
    atmosphere goes in, the moment (time, time, "purge, then atmosphere in"), which
    :class:`casedepth.outcome.Timeline` keeps as a marker.
    """
    from ..safety import SAFE_ADMISSION_TEMPERATURE as safe

    if start_temperature is None:
        first = next((s for s in stages if s.moves_carbon), None)
        start_temperature = ROOM_TEMPERATURE if first is None or first.kind == "heat-up" else first.temperature
    times, temps, pots, labels = [0.0], [start_temperature], [math.nan], []
    now, t_now = 0.0, start_temperature
    for stage in stages:
        end = now + stage.duration
        if stage.duration > 0:  # a stage of no time has no span to label
            labels.append((now, end, stage.label))
        if stage.moves_carbon:
            begin = stage.start_potential if stage.start_potential is not None else stage.carbon_potential
            t_end = stage.temperature
            points = [(now, t_now, begin), (end, t_end, stage.carbon_potential)]
            if (t_now - safe) * (t_end - safe) < 0:  # the ramp crosses the safe temperature: a point there
                w = (safe - t_now) / (t_end - t_now)
                points.insert(1, (now + w * stage.duration, safe, begin + w * (stage.carbon_potential - begin)))
            for (ta, Ta, pa), (tb, Tb, pb) in zip(points, points[1:]):
                held = min(Ta, Tb) >= safe - 1e-9
                if held and not np.isfinite(pots[-1]):  # below it the furnace ran under nitrogen
                    labels.append((ta, ta, "purge, then atmosphere in"))
                times += [ta, tb]
                temps += [Ta, Tb]
                pots += [pa, pb] if held else [math.nan, math.nan]
            t_now = t_end
        else:
            here = stage.temperature if stage.temperature is not None else (ROOM_TEMPERATURE if stage.kind == "load" else BATH)
            times += [now, end]
            temps += [here, here]
            pots += [math.nan, math.nan]
            t_now = here
        now = end
    return np.array(times), np.array(temps), np.array(pots, dtype=float), labels


#: ``temper`` argument of :func:`shop_stages` meaning "the shop's standard temper" (plans before schema 6)
SHOP_TEMPER = "shop"


def shop_stages(shop, temperature: float, potential: float,
                temper=SHOP_TEMPER) -> tuple[tuple[Stage, ...], tuple[Stage, ...]]:
    """The stages a shop runs around a carburizing step at ``temperature`` [K] and ``potential`` [wt %],
    from its standard times (a :class:`~casedepth.shop.quote.ShopDefaults`): before it, load and heat-up
    in the carburizing atmosphere; after it, the drop to the hardening temperature and equalize (if that
    is cooler), quench, wash and temper. ``temper`` is the plan's own (temperature [K], time [s]), None
    for parts left as quenched, or :data:`SHOP_TEMPER` for the shop's standard one."""
    before = []
    if shop.load_h > 0:
        before.append(Stage("load", shop.load_h * 3600.0))
    if shop.heat_up_h > 0:
        before.append(Stage("heat-up", shop.heat_up_h * 3600.0, temperature, potential))
    after = []
    drop_to = shop.drop_temperature_c + ZERO_CELSIUS
    if drop_to < temperature - 1e-9:
        if shop.drop_h > 0:
            after.append(Stage("drop", shop.drop_h * 3600.0, drop_to, shop.hardening_potential))
        if shop.equalize_h > 0:
            after.append(Stage("equalize", shop.equalize_h * 3600.0, drop_to, shop.hardening_potential))
    if temper == SHOP_TEMPER:
        temper = (shop.temper_temperature_c + ZERO_CELSIUS, shop.temper_h * 3600.0)
    for kind, seconds in (("quench", shop.quench_h * 3600.0), ("wash", shop.wash_h * 3600.0),
                          ("temper", 0.0 if temper is None else temper[1])):
        if seconds > 0:
            after.append(Stage(kind, seconds, temper[0] if kind == "temper" else None))
    return tuple(before), tuple(after)


def stage_lines(stages: list[Stage]) -> list[tuple[str, float]]:
    """``(label, hours)`` of each stage, for a quote."""
    return [(stage.label, stage.duration / 3600.0) for stage in stages]


def describe_counted(counted: tuple[Stage, ...]) -> str:
    """Which of the shop's stages a case counts, in words."""
    if not counted:
        return "not counted: the case of the soak at temperature alone"
    parts = ", ".join(f"{s.label.lower()} {s.duration / 3600:g} h" for s in counted)
    return f"counted ({parts}): the case at the end of the whole cycle"

