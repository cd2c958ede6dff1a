"""Carburizing plans evaluated: the setup a plan's values make, the cycles a plan may ask for, and the
outcome every surface reads.

* :func:`carburizing_setup` — the one place a plan's values become a :class:`CarburizingSetup`;
* :data:`CYCLES` — one row per cycle (one soak, boost and diffuse, stages of one's own): its label,
  the note the window shows, which potential the setup stands for, and how it is planned;
* :func:`evaluate` — a plan's values to a :class:`CarburizingOutcome`;
* :func:`forward` — what a soak of a given length gives, the shop's stages counted as the plan counts them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import cached_property
from typing import Any, Callable, Mapping

import numpy as np

from .. import formats, safety
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from ..models.atmosphere import READINGS, FurnaceGas, StageReadings, stage_readings
from ..models.surface import BETA_ACTIVATION, beta_from_gas
from ..models.diffusivity import Diffusivity
from ..models.hardness import HARDNESS_RELATIONS, HV_RANGE, ASTM_E140_hrc_to_hv, ASTM_E140_hv_to_hrc
from ..models.steels import steel_for
from ..numerics.geometry import Geometry
from ..numerics.solver import Profile
from ..outcome import Curve, Fact, Level, Outcome, Panel, ProfileView, SheetContent, Summary, Timeline, quote_fact
from ..parameters import drawing_window
from ..shop.quote import Quote, ShopDefaults, quote_lines
from ..units import DisplayUnits, Threshold, format_clock, format_duration
from .cycle import (CycleResult, Stage, describe_counted, run_recipe, run_recipes, shop_stages, stage_from_dict, stage_lines,
                    stage_to_dict, timeline)
from .planners import boost_diffuse_times, plan_boost_diffuse, plan_single_soak, plan_single_soaks
from .hardening import DEFAULT_HARDNESS_DEPTH, Hardening, core_depth, hardness_at
from .setup import CarburizingSetup, case_warnings
from .soak import (CarburizingResult, carburize, carburize_many, check_probe_depth, check_soak,
                   soak_times_for_case_depths, soak_times_many)


# -- plan values -> setup ------------------------------------------------------------------------------------
def stage_list(values: Mapping[str, Any]) -> list[Stage]:
    """The plan's own stages."""
    return [stage_from_dict(row, number) for number, row in enumerate(values["stages"], 1)]


def carburizing_setup(values: Mapping[str, Any]) -> CarburizingSetup:
    """The validated setup of a plan's values; an :class:`InputError` names the parameter at fault.

    The setup's carbon potential is the one the plan's cycle stands for (:attr:`Cycle.potential`): the
    furnace step's for one soak, the boost's, or the richest stage's — the atmosphere the cautions judge.
    """
    cycle = CYCLES[values["process"]]
    potential, key = cycle.potential(values)
    temperature, temperature_key = cycle.temperature(values)
    try:
        return CarburizingSetup(
            steel=steel_for(values["steel"], values["composition"]),
            temperature=temperature,
            carbon_potential=potential,
            threshold=Threshold(values["threshold_value"], values["threshold_kind"]),
            diffusivity=Diffusivity(values["diffusivity"], values["d_multiplier"], values["d0"], values["q"]),
            beta=_beta(values, temperature),
            beta_activation=BETA_ACTIVATION if _gas_beta(values) else 0.0,
            alloy_factor_on=values["alloy_factor"],
            geometry=Geometry(values["shape"], values["size"]),
            hardness_relation=values["hardness_relation"],
            hardening=hardening_of(values),
            hardness_depth=_aim_depth(values),
        )
    except InputError as error:
        renamed = {"carbon_potential": key, "temperature": temperature_key}.get(error.field, error.field)
        raise error.renamed(renamed) from None


def _gas_beta(values: Mapping[str, Any]) -> bool:
    return not values["beta_held"] and values["beta_model"] == "gas-2026"


def _beta(values: Mapping[str, Any], temperature: float) -> float:
    """β [m/s] at ``temperature`` [K] as the plan takes it: held (inf), one value, or from the carrier gas."""
    if values["beta_held"]:
        return math.inf
    if values["beta_model"] == "gas-2026":
        return values["beta_multiplier"] * beta_from_gas(temperature, values["carrier_co"] / 100.0,
                                                         values["carrier_h2"] / 100.0)
    return values["beta"]


def shop_of(values: Mapping[str, Any]) -> ShopDefaults:
    return ShopDefaults.from_dict(values["shop"])


def hardening_of(values: Mapping[str, Any]) -> Hardening:
    """The plan's quench and temper, quenched from the shop's hardening temperature."""
    return Hardening(values["quench"], values["quench_temperature"], values["temper_temperature"],
                     values["temper_time"], shop_of(values).drop_temperature_c + ZERO_CELSIUS)


def _aim_depth(values: Mapping[str, Any]) -> float:
    """The drawing's aim depth [m], where a hardness threshold's cooling is read (the window's middle if the
    window itself is at fault: its own error comes later, naming it)."""
    try:
        return drawing_window(values)[1]
    except InputError:
        return DEFAULT_HARDNESS_DEPTH


# -- the cycles ---------------------------------------------------------------------------------------------
@dataclass
class Planned:
    """What a cycle's planner gives: the stages the furnace runs (all of them, for the quote and the
    timeline), the soaks [s] for the drawing's minimum, aim and maximum, the carbon run (the soak alone,
    or the cycle with the stages counted), the boost and diffuse times where planned, and warnings."""

    stages: list[Stage]
    soak_times: tuple[float, float, float]
    cycle: CycleResult | None = None
    isothermal: Any = None  # the soak alone for min, aim, max (CarburizingResult), when no stage is counted
    boost_time: float | None = None
    diffuse_time: float | None = None
    warnings: list[str] = field(default_factory=list)
    counted: tuple[Stage, ...] = ()  # the shop's stages whose carbon is counted in the case


def _counted_stages(values, shop, setup, potential) -> tuple[tuple, tuple, tuple, tuple]:
    """The shop's stages before and after the step (for the quote), and those counted in the case."""
    temper = None if values["temper_temperature"] is None else (values["temper_temperature"], values["temper_time"])
    before, after = shop_stages(shop, setup.temperature, potential, temper)
    moves = any(s.moves_carbon and s.duration > 0 for s in (*before, *after))
    if values["count_shop_stages"] and moves:
        return before, after, before, after
    return before, after, (), ()


def _plan_single(setup: CarburizingSetup, values, shop, targets) -> Planned:
    before, after, count_before, count_after = _counted_stages(values, shop, setup, setup.carbon_potential)
    T = setup.temperature
    if count_before or count_after:
        planned = plan_single_soak(setup, list(targets), count_before, count_after)
        cycle = planned.cycle
        warnings = case_warnings(setup, cycle.case_depth, cycle.surface_carbon)  # the case at the end of the cycle
        warnings += [w for w in cycle.warnings if w not in warnings]
        soaks, isothermal = tuple(planned.soak_times), None
    else:
        isothermal = soak_times_for_case_depths(setup, list(targets), size_for=targets[1])
        soaks, cycle, warnings = tuple(r.soak_time for r in isothermal), None, list(isothermal[1].warnings)
    stages = [*before, Stage("soak", soaks[1], T, setup.carbon_potential), *after]
    counted = tuple(s for s in (*count_before, *count_after) if s.moves_carbon and s.duration > 0)
    return Planned(stages, soaks, cycle, isothermal, warnings=warnings, counted=counted)


def _plan_boost_diffuse(setup: CarburizingSetup, values, shop, targets) -> Planned:
    before, after, count_before, count_after = _counted_stages(values, shop, setup, values["boost_potential"])
    planned = plan_boost_diffuse(setup, targets[1], (values["surface_min"], values["surface_max"]),
                                 values["boost_potential"], values["diffuse_potential"], before=count_before,
                                 after=count_after)
    T = setup.temperature
    stages = [*before, Stage("boost", planned.boost_time, T, values["boost_potential"]),
              Stage("diffuse", planned.diffuse_time, T, values["diffuse_potential"]), *after]
    held = planned.boost_time + planned.diffuse_time
    counted = tuple(s for s in (*count_before, *count_after) if s.moves_carbon and s.duration > 0)
    return Planned(stages, (held, held, held), planned.cycle, boost_time=planned.boost_time,
                   diffuse_time=planned.diffuse_time, warnings=list(planned.cycle.warnings), counted=counted)


def _plan_stages(setup: CarburizingSetup, values, shop, targets) -> Planned:
    stages = stage_list(values)
    cycle = run_recipe(setup, stages)
    held = sum(s.duration for s in stages if s.kind in ("soak", "boost", "diffuse"))
    return Planned(stages, (held, held, held), cycle, warnings=list(cycle.warnings), counted=tuple(stages))


def _carburizing_stages(values) -> list[Stage]:
    try:
        return [stage for stage in stage_list(values) if stage.moves_carbon]
    except InputError:
        return []


def _richest_stage(values) -> tuple[float, str]:
    rich = [stage.carbon_potential for stage in _carburizing_stages(values) if stage.carbon_potential is not None]
    return (float(max(rich)), "stages") if rich else (values["carbon_potential"], "carbon_potential")


def _hottest_stage(values) -> tuple[float, str]:
    hot = [stage.temperature for stage in _carburizing_stages(values)
           if stage.kind != "heat-up" and stage.temperature is not None]
    return (float(max(hot)), "stages") if hot else (values["temperature"], "temperature")


def _furnace_temperature(values) -> tuple[float, str]:
    return values["temperature"], "temperature"


#: the stages held at temperature: the time a load's spread study stretches or shortens (the rest keep their lengths)
HELD_KINDS = ("soak", "boost", "diffuse")


def _held_single(values, durations: tuple[float, ...]) -> list[Stage]:
    (soak,) = durations
    return [Stage("soak", soak, values["temperature"], values["carbon_potential"])]


def _held_boost_diffuse(values, durations: tuple[float, ...]) -> list[Stage]:
    boost, diffuse = durations
    T = values["temperature"]
    return [Stage("boost", boost, T, values["boost_potential"]), Stage("diffuse", diffuse, T, values["diffuse_potential"])]


def _held_own_stages(values, durations: tuple[float, ...]) -> list[Stage]:
    """The plan's own stages, its held ones (soak, boost, diffuse) given ``durations`` in order."""
    stages = stage_list(values)
    held = [k for k, stage in enumerate(stages) if stage.kind in HELD_KINDS]
    if len(held) != len(durations):
        raise ValueError(f"{len(durations)} held times for {len(held)} held stages")
    for k, duration in zip(held, durations):
        stages[k] = replace(stages[k], duration=duration)
    return stages


@dataclass(frozen=True)
class Cycle:
    """One row of the cycle table: what the window calls it, the note under it, which carbon potential and
    temperature the setup stands for (and the parameter that holds each), and how it is planned."""

    key: str
    label: str
    note: str
    potential: Callable[[Mapping[str, Any]], tuple[float, str]]
    temperature: Callable[[Mapping[str, Any]], tuple[float, str]]
    plan: Callable[[CarburizingSetup, Mapping[str, Any], ShopDefaults, tuple], Planned]
    has_soak: bool  # a single soak at temperature that loads and calibration may vary
    #: (values, lengths [s] of the held stages) -> the stages the plan holds at temperature with those lengths; the
    #: whole recipe for stages of one's own, else what the shop's counted stages go around
    held: Callable[[Mapping[str, Any], tuple[float, ...]], list[Stage]]
    own_stages: bool = False  # the held stages are the whole recipe (no shop stages go around them)


CYCLES: dict[str, Cycle] = {
    "single": Cycle(
        "single", "One soak at one carbon potential",
        "The soak time at temperature for the case at the end of the cycle (with the shop's heat-up, drop and "
        "equalize counted when ticked); the quote adds load, quench, wash and temper times.",
        lambda v: (v["carbon_potential"], "carbon_potential"), _furnace_temperature, _plan_single, True, _held_single),
    "boost-diffuse": Cycle(
        "boost-diffuse", "Boost and diffuse (plan both times)",
        "Plans boost and diffuse so the case and the surface carbon are on target at the end of the cycle (with "
        "the shop's heat-up, drop and equalize counted when ticked).",
        lambda v: (v["boost_potential"], "boost_potential"), _furnace_temperature, _plan_boost_diffuse, False,
        _held_boost_diffuse),
    "stages": Cycle(
        "stages", "Stages of my own",
        "Runs the stages as entered (temperatures ramp from the previous stage) and shows what they give.",
        _richest_stage, _hottest_stage, _plan_stages, False, _held_own_stages, own_stages=True),
}

#: errors of the planners raised against their arguments, and the parameter each stands for (a depth not reached:
#: the deepest the drawing allows)
_PLANNER_FIELDS = {"target": "case_max"}


def _planner_error(cycle: Cycle, error: InputError) -> InputError:
    """A planner's error named after the plan's parameter it stands for."""
    if error.field == "stages" and cycle.key != "stages":
        return InputError("shop", f"a stage from the shop's times: {error.message}")
    return error.renamed(_PLANNER_FIELDS[error.field]) if error.field in _PLANNER_FIELDS else error


def evaluate(values: Mapping[str, Any]) -> "CarburizingOutcome":
    """A carburizing plan's outcome; :class:`InputError` (or :class:`NotReachableError`) naming the parameter."""
    cycle = CYCLES[values["process"]]
    setup = carburizing_setup(values)
    shop = shop_of(values)
    targets = drawing_window(values)
    try:
        planned = cycle.plan(setup, values, shop, targets)
    except InputError as error:
        raise _planner_error(cycle, error) from None
    gas = FurnaceGas.of(values)
    outcome = CarburizingOutcome(
        values=dict(values), setup=setup, cycle_kind=cycle.key, planned=planned, targets=targets,
        quote=quote_lines(stage_lines(planned.stages), shop), warnings=list(planned.warnings),
        cautions=safety.cautions(setup.temperature, setup.equilibrium_carbon, setup.saturation_carbon, gas=gas),
        readings=stage_readings(planned.stages, gas.at, shop.potential_tolerance_pct), gas=gas)
    if outcome.hardened is not None:
        outcome.warnings += outcome.hardened.warnings(values)
    return outcome


def aim_soaks(values_list: list[Mapping[str, Any]]) -> list[float | InputError]:
    """What :func:`evaluate` gives as each plan's :attr:`~casedepth.outcome.Outcome.soak_time` (the time at
    temperature for the drawing's aim), without the rest of the outcome (the window's ends, hardness, quote): the
    plans of one soak and of boost and diffuse searched together, the shop's stages counted or not
    (:func:`soak_times_many`, :func:`~casedepth.carburizing.planners.plan_single_soaks`,
    :func:`~casedepth.carburizing.planners.boost_diffuse_times`), plans of one's own stages run one by one. The same numbers to
    round-off; a plan that cannot be planned gets its :class:`InputError` in its place."""
    out: list[float | InputError | None] = [None] * len(values_list)
    alone, counted, isothermal, split = [], [], [], []
    for k, values in enumerate(values_list):
        try:
            cycle = CYCLES[values["process"]]
            setup = carburizing_setup(values)
            shop = shop_of(values)
            targets = drawing_window(values)
            if cycle.key == "boost-diffuse":
                _, _, before, after = _counted_stages(values, shop, setup, values["boost_potential"])
                split.append((k, (setup, targets[1], (values["surface_min"], values["surface_max"]),
                                  values["boost_potential"], values["diffuse_potential"], before, after)))
                continue
            if cycle.key != "single":
                alone.append((k, cycle, setup, values, shop, targets))
                continue
            _, _, before, after = _counted_stages(values, shop, setup, setup.carbon_potential)
        except InputError as error:
            out[k] = error
            continue
        (counted if before or after else isothermal).append((k, setup, targets[1], before, after))
    for k, cycle, setup, values, shop, targets in alone:
        try:
            out[k] = cycle.plan(setup, values, shop, targets).soak_times[1]
        except InputError as error:
            out[k] = _planner_error(cycle, error)
    for (k, _), result in zip(split, boost_diffuse_times([row for _, row in split]) if split else []):
        if isinstance(result, InputError):
            out[k] = _planner_error(CYCLES["boost-diffuse"], result)
        elif isinstance(result, Exception):
            raise result
        else:
            out[k] = result[0] + result[1]
    if isothermal:
        found = soak_times_many([row[1] for row in isothermal], [row[2] for row in isothermal], errors="return")
        for (k, *_), result in zip(isothermal, found):
            out[k] = _planner_error(CYCLES["single"], result) if isinstance(result, InputError) else result.soak_time
    if counted:
        found = plan_single_soaks(*(list(column) for column in zip(*(row[1:] for row in counted))))
        for (k, *_), result in zip(counted, found):
            if isinstance(result, InputError):
                result = _planner_error(CYCLES["single"], result)
            elif isinstance(result, Exception):
                raise result
            out[k] = result
    return out


# -- what a soak gives ---------------------------------------------------------------------------------------
def _soak_recipe(setup: CarburizingSetup, soak: float, before: tuple[Stage, ...], after: tuple[Stage, ...]) -> list[Stage]:
    return [*before, Stage("soak", soak, setup.temperature, setup.carbon_potential), *after]


def _soak_result(setup: CarburizingSetup, soak: float, before, after, cycle: CycleResult,
                 probe_depth: float | None) -> CarburizingResult:
    """What a soak with the shop's stages around it gave (``cycle``), as a soak's result."""
    warnings = case_warnings(setup, cycle.case_depth, cycle.surface_carbon)
    warnings += [w for w in cycle.warnings if w not in warnings]
    counted = tuple(s for s in (*before, *after) if s.moves_carbon and s.duration > 0)
    at = None if probe_depth is None else cycle.profile.carbon_at(probe_depth)
    return CarburizingResult(setup, soak, cycle.profile, cycle.case_depth, cycle.history, warnings,
                             sum(cycle.stage_uptake), carbon_at_depth=at, probe_depth=probe_depth, counted=counted)


def run_soak(setup: CarburizingSetup, soak: float, before: tuple[Stage, ...] = (), after: tuple[Stage, ...] = (),
             probe_depth: float | None = None) -> CarburizingResult:
    """A soak of ``soak`` [s] at the setup's temperature and potential, with the ``before`` and ``after``
    stages run around it and counted in the case (none: the soak alone)."""
    if not before and not after:
        return carburize(setup, soak, probe_depth)
    check_soak(soak)
    check_probe_depth(setup, probe_depth)
    return _soak_result(setup, soak, before, after, run_recipe(setup, _soak_recipe(setup, soak, before, after)),
                        probe_depth)


@dataclass(frozen=True)
class _Run:
    """One forward case: the setup, the time at temperature [s], the counted stages before and after, and the held
    stages between them (``None``: the plain soak of the setup)."""

    setup: CarburizingSetup
    soak: float
    before: tuple[Stage, ...]
    after: tuple[Stage, ...]
    held: tuple[Stage, ...] | None = None

    @property
    def recipe(self) -> list[Stage]:
        if self.held is None:
            return _soak_recipe(self.setup, self.soak, self.before, self.after)
        return [*self.before, *self.held, *self.after]


def _forward_run(values: Mapping[str, Any], soak: float, shares: tuple[float, ...] | None) -> _Run:
    """What :func:`forward` runs: the one soak (no ``shares``, or a one-soak plan), else the plan's own cycle with its
    held stages (:attr:`Cycle.held`) ``shares`` of ``soak`` long and the shop's stages counted as the plan counts
    them."""
    check_soak(soak)
    cycle = CYCLES[values["process"]]
    if shares is None or cycle.key == "single":
        setup = carburizing_setup({**values, "process": "single"})
        _, _, before, after = _counted_stages(values, shop_of(values), setup, setup.carbon_potential)
        return _Run(setup, soak, before, after)
    setup = carburizing_setup(values)
    held = tuple(cycle.held(values, tuple(share * soak for share in shares)))
    if cycle.own_stages:
        return _Run(setup, soak, (), (), held)
    _, _, before, after = _counted_stages(values, shop_of(values), setup, held[0].carbon_potential)
    return _Run(setup, soak, before, after, held)


def forward(values: Mapping[str, Any], soak: float, probe_depth: float | None = None,
            shares: tuple[float, ...] | None = None) -> CarburizingResult:
    """What a plan gives after ``soak`` [s] at temperature, the shop's stages counted as the plan counts them: one soak
    of that length, or with ``shares`` (the plan's :attr:`~casedepth.outcome.Outcome.held_shares`) the plan's own
    cycle with its held stages (boost and diffuse, or its own soaks) stretched alike to that total."""
    run = _forward_run(values, soak, shares)
    if run.held is None:
        return run_soak(run.setup, soak, run.before, run.after, probe_depth)
    check_probe_depth(run.setup, probe_depth)
    return _soak_result(run.setup, soak, run.before, run.after, run_recipe(run.setup, run.recipe), probe_depth)


def forward_many(values_list: list[Mapping[str, Any]], soaks: list[float],
                 shares: tuple[float, ...] | None = None) -> list[CarburizingResult]:
    """:func:`forward` of each plan's values after its soak [s] (all with ``shares``), the cases marched together where
    they can be (:func:`casedepth.carburizing.cycle.run_recipes`, :func:`casedepth.carburizing.soak.carburize_many`):
    the same numbers to round-off; a batched result's history holds only the start and the end."""
    runs = [_forward_run(values, soak, shares) for values, soak in zip(values_list, soaks)]
    results: list[CarburizingResult | None] = [None] * len(runs)
    plain = [k for k, run in enumerate(runs) if run.held is None and not run.before and not run.after]
    for k, result in zip(plain, carburize_many([runs[k].setup for k in plain], [runs[k].soak for k in plain])):
        results[k] = result
    staged = [k for k in range(len(runs)) if results[k] is None]
    cycles = run_recipes([runs[k].setup for k in staged], [runs[k].recipe for k in staged])
    for k, cycle in zip(staged, cycles):
        run = runs[k]
        results[k] = _soak_result(run.setup, run.soak, run.before, run.after, cycle, None)
    return results


# -- the outcome -----------------------------------------------------------------------------------------------
#: how sure a hardness from the quench is, HRC: the coefficients are from memory and the quench's constant h is
#: an average (an oil-quenched surface cools faster in the boiling stage); printed with every figure
HARDNESS_UNCERTAINTY_HRC = 3.0


@dataclass
class Hardened:
    """The part after its quench and temper (the structure relation): hardness [HV] and retained austenite
    [-] along the profile at the end, the surface and core hardness [HV], where the core was read [m], the
    ideal critical diameter of the core and of the case at the surface carbon [m], and the hardening."""

    depth: np.ndarray
    hardness: np.ndarray
    retained_austenite: np.ndarray
    martensite: np.ndarray
    surface: float
    core: float
    core_depth: float
    ideal_diameter: float
    case_ideal_diameter: float
    hardening: Hardening

    @property
    def surface_hrc(self) -> float:
        return float(ASTM_E140_hv_to_hrc(np.clip(self.surface, HV_RANGE[0], HV_RANGE[1])))

    @property
    def core_hrc(self) -> float:
        return float(ASTM_E140_hv_to_hrc(np.clip(self.core, HV_RANGE[0], HV_RANGE[1])))

    def warnings(self, values: Mapping[str, Any]) -> list[str]:
        """Which of the drawing's surface and core hardness windows the part misses, and what would move it."""
        out = []
        ra = 100.0 * float(self.retained_austenite[0])
        low, high = values.get("surface_hrc_min"), values.get("surface_hrc_max")
        if low is not None and self.surface_hrc < low:
            why = (f"retained austenite is about {formats.percent(ra)} there: a lower surface carbon (a diffuse stage), "
                   f"a colder quench or a deep freeze would raise it" if ra >= 10.0 else
                   "the case does not fully harden there: a harsher quench or a richer steel would raise it"
                   if float(self.martensite[0]) < 0.9 else
                   "a lower temper or a higher surface carbon would raise it")
            out.append(f"Surface hardness {formats.hrc(self.surface_hrc)} is below the drawing's {_window(low, high)}: {why}.")
        if high is not None and self.surface_hrc > high:
            out.append(f"Surface hardness {formats.hrc(self.surface_hrc)} is above the drawing's {_window(low, high)}: a "
                       f"higher temper or a lower surface carbon would lower it.")
        low, high = values.get("core_hrc_min"), values.get("core_hrc_max")
        if low is not None and self.core_hrc < low:
            out.append(f"Core hardness {formats.hrc(self.core_hrc)} is below the drawing's {_window(low, high)}: a "
                       f"richer steel, a harsher quench or a higher core carbon would raise it. This steel's ideal diameter "
                       f"is {formats.ideal_diameter(self.ideal_diameter)}.")
        if high is not None and self.core_hrc > high:
            out.append(f"Core hardness {formats.hrc(self.core_hrc)} is above the drawing's {_window(low, high)}: a milder "
                       f"quench or a leaner steel would lower it.")
        return out


def harden(s: CarburizingSetup, end: Profile) -> Hardened | None:
    """The part whose case ends as ``end`` after the setup's quench and temper (None under the first release's
    carbon → hardness relations, which read no structure)."""
    if not s.structure:
        return None
    from ..models.hardenability import ideal_critical_diameter

    grain = s.steel.grain_size
    core_x = core_depth(s.geometry)
    depths = np.append(end.depth, core_x)
    carbon = np.append(end.carbon, s.steel.carbon)
    out = hardness_at(s.steel.composition, s.geometry, s.hardening, depths, carbon)
    hv, ra, martensite = out["hv"], out["retained_austenite"], out["martensite"]
    return Hardened(end.depth, hv[:-1], ra[:-1], martensite[:-1], float(hv[0]), float(hv[-1]), core_x,
                    float(ideal_critical_diameter(s.steel.composition, grain)),
                    float(ideal_critical_diameter(s.steel.composition, grain, carbon=min(end.surface_carbon, 0.9))),
                    s.hardening)


def hardness_along(s: CarburizingSetup, profile: Profile, hardened: Hardened | None = None) -> np.ndarray:
    """Hardness [HV] along ``profile``: from the quench's structure (``hardened``'s, where it is that profile's), or
    the relation's carbon → hardness."""
    if s.structure:
        if hardened is not None:
            return hardened.hardness
        return hardness_at(s.steel.composition, s.geometry, s.hardening, profile.depth, profile.carbon)["hv"]
    return HARDNESS_RELATIONS[s.hardness_relation].hv(profile.carbon)


def threshold_hardness(s: CarburizingSetup) -> float:
    """The hardness [HV] the threshold stands for, for the hardness plot's line."""
    relation = HARDNESS_RELATIONS[s.hardness_relation]
    if s.threshold.is_hardness:
        return s.threshold.value if s.threshold.kind == "HV" else float(ASTM_E140_hrc_to_hv(s.threshold.value))
    if s.structure:
        return float(relation.hv(np.array([s.threshold_carbon]), s.quenched_at(s.hardness_depth))[0])
    return float(relation.hv(s.threshold_carbon))


def hardness_panel(s: CarburizingSetup, shown: Profile, hv: np.ndarray, end: Profile, end_hv: np.ndarray,
                   scrubbing: bool, when: str, final_label: str) -> Panel:
    """The hardness plot of a carburized case: ``hv`` along ``shown`` (and the end's, faint, while scrubbing)."""
    relation = HARDNESS_RELATIONS[s.hardness_relation]
    threshold_hv = threshold_hardness(s)
    return Panel("hardness [HV]", Curve(shown.depth, hv, "estimated from the quench and temper" if s.structure
                                        else f"estimated: {relation.display}"),
                 Curve(end.depth, end_hv, final_label) if scrubbing else None,
                 [Level(threshold_hv, f"threshold ≈ {formats.hv(threshold_hv)} "
                                      f"({formats.hrc(ASTM_E140_hv_to_hrc(threshold_hv))})", "threshold")],
                 (min(float(end_hv.min()), threshold_hv) - 60, max(float(end_hv.max()), threshold_hv) + 60),
                 "Hardness " + when + ("; " + s.hardening.short() if s.structure else
                                       "; assumes a fully martensitic case"), hrc_axis=True)


def hardness_facts(hardened: Hardened | None, v: Mapping[str, Any]) -> list[Fact]:
    """The surface and core hardness against the drawing's windows, retained austenite and D_I, as facts."""
    if hardened is None:
        return []
    return [Fact("hardness", f"Surface / core hardness (±{formats.hrc(HARDNESS_UNCERTAINTY_HRC)})",
                 f"{formats.hrc(hardened.surface_hrc)}{_drawing(v['surface_hrc_min'], v['surface_hrc_max'])} / "
                 f"{formats.hrc(hardened.core_hrc)}{_drawing(v['core_hrc_min'], v['core_hrc_max'])}"),
            Fact("hardenability", "Retained austenite, D_I",
                 f"{formats.percent(100 * float(hardened.retained_austenite[0]))} at the surface; ideal diameter of "
                 f"the core {formats.ideal_diameter(hardened.ideal_diameter)}")]


def _drawing(low: float | None, high: float | None, hrc: float | None = None) -> str:
    """`` (drawing 58–62 HRC)`` — with ``hrc`` also ``: in`` or ``: OUT`` — or nothing without a window."""
    if low is None and high is None:
        return ""
    if hrc is None:
        return f" (drawing {_window(low, high)})"
    inside = (low is None or hrc >= low) and (high is None or hrc <= high)
    return f" (drawing {_window(low, high)}: {'in' if inside else 'OUT'})"


def _window(low: float | None, high: float | None) -> str:
    if high is None:
        return f"minimum {formats.hrc(low)}"
    return formats.hardness_range(low, high, "HRC") if low is not None else f"maximum {formats.hrc(high)}"


@dataclass
class CarburizingOutcome(Outcome):
    """What a carburizing plan gives: the soaks (or boost and diffuse), the case and profile at the end,
    the whole cycle, its quote, the probe set points, warnings and cautions."""

    values: dict
    setup: CarburizingSetup
    cycle_kind: str  # key of CYCLES
    planned: Planned
    targets: tuple[float, float, float]
    quote: Quote
    warnings: list[str]
    cautions: list
    readings: list[StageReadings]  # every reading of each held stage, with the shop's band
    gas: FurnaceGas = FurnaceGas()
    treatment: str = "carburizing"
    potential_name = "carbon potential [%C]"
    profile_name = "Carbon profile"

    # -- the numbers ------------------------------------------------------------------------------------
    @property
    def probe(self) -> list[tuple[str, float]]:
        """The ideal oxygen-probe voltage [mV] of each held stage: ``[(stage label, mV), …]``."""
        return [(r.label, r.values["mv"]) for r in self.readings]

    @property
    def control(self):
        """The reading the furnace is run on (a :class:`casedepth.models.atmosphere.Reading`)."""
        return READINGS[self.gas.control]

    def _control_text(self) -> str:
        """``soak 1153 mV, equalize 1121 mV``: each held stage's setpoint in the reading the furnace is run on."""
        return ", ".join(f"{r.label.lower()} {self.control.show(r.values[self.gas.control])}" for r in self.readings
                         if self.gas.control in r.values)

    @property
    def stages(self) -> list[Stage]:
        return self.planned.stages

    @property
    def cycle(self) -> CycleResult | None:
        return self.planned.cycle

    @property
    def boost_time(self) -> float | None:
        return self.planned.boost_time

    @property
    def diffuse_time(self) -> float | None:
        return self.planned.diffuse_time

    @property
    def counts_shop_stages(self) -> bool:
        return bool(self.planned.counted) and self.cycle_kind != "stages"

    @property
    def soak_window(self) -> tuple[float, float, float]:
        return self.planned.soak_times

    @property
    def held_stages(self) -> list[tuple[str, float]]:
        return [(stage.label.lower(), stage.duration) for stage in self.planned.stages if stage.kind in HELD_KINDS]

    @property
    def _end(self):
        return self.planned.cycle if self.planned.cycle is not None else self.planned.isothermal[1]

    @property
    def depth(self) -> float:
        return self._end.case_depth

    case_depth = depth

    @property
    def surface_carbon(self) -> float:
        return self._end.profile.surface_carbon

    @property
    def profile(self) -> Profile:
        return self._end.profile

    @property
    def duration(self) -> float:
        return float(self._end.history.times[-1])

    @property
    def hardenability_case_carbon(self) -> float:
        return round(min(self.surface_carbon, 0.9), 2)

    @cached_property  # the quench through the section and the structure at every depth: once per outcome
    def hardened(self) -> Hardened | None:
        """The part after its quench and temper (None under the first release's carbon → hardness relations)."""
        return harden(self.setup, self.profile)

    def _hardness_of(self, profile: Profile):
        return hardness_along(self.setup, profile, self.hardened if profile is self.profile else None)

    def profile_at(self, time: float) -> Profile:
        return self._end.profile_at(time)

    def depth_after(self, soak: float, multiplier: float | None = None) -> float:
        if not CYCLES[self.cycle_kind].has_soak:
            raise InputError("process", f"a {CYCLES[self.cycle_kind].label.lower()} cycle has no single soak to vary")
        setup = self.setup
        if multiplier is not None:
            setup = replace(setup, diffusivity=replace(setup.diffusivity, multiplier=multiplier))
        counted = self.planned.counted
        soak_index = next(i for i, s in enumerate(self.stages) if s.kind == "soak")
        before = tuple(s for s in self.stages[:soak_index] if s in counted)
        after = tuple(s for s in self.stages[soak_index + 1:] if s in counted)
        return run_soak(setup, soak, before, after).case_depth

    # -- words and pictures ------------------------------------------------------------------------------
    def _headline(self) -> str:
        if self.cycle_kind == "single":
            return f"Soak {format_duration(self.soak_time)}"
        if self.cycle_kind == "boost-diffuse":
            return f"Boost {format_duration(self.boost_time)}, diffuse {format_duration(self.diffuse_time)}"
        return f"Cycle {format_duration(self.quote.total_h * 3600)}"

    def _how(self, units: DisplayUnits) -> str:
        s = self.setup
        aim = self.targets[1]
        counted = ("heat-up and drop counted" if self.counts_shop_stages else
                   "no heat-up or drop counted")
        if self.cycle_kind == "single":
            return (f"at {units.format_temperature(s.temperature)}, carbon potential {formats.carbon(s.carbon_potential)}, "
                    f"for {units.format_length(aim)} {s.threshold.depth_name} at {s.threshold} "
                    f"({self.soak_time / 3600:.2f} h at temperature; {counted})")
        if self.cycle_kind == "boost-diffuse":
            return (f"at {units.format_temperature(s.temperature)}: the cycle ends with "
                    f"{units.format_length(self.depth)} at {s.threshold} and the surface carbon in its window; {counted}")
        return f"the stages as entered give {units.format_length(self.depth)} at {s.threshold}"

    def summary(self, units: DisplayUnits) -> Summary:
        s, (low, _, high) = self.setup, self.targets
        facts = []
        if self.cycle_kind == "single":
            soak_low, _, soak_high = self.soak_window
            facts.append(Fact("window", "Drawing window", f"{units.format_length(low)} after {format_duration(soak_low)}  "
                                                          f"to  {units.format_length(high)} after {format_duration(soak_high)}"))
        else:
            inside = low <= self.depth <= high
            facts.append(Fact("window", "Drawing window", f"{units.format_length(low)} to {units.format_length(high)}"
                              + ("" if inside else "  — the case ends outside it")))
        facts += [
            Fact("surface", "Surface carbon at the end", formats.carbon(self.surface_carbon)
                 + (f" (window {formats.carbon_range(self.values['surface_min'], self.values['surface_max'])})"
                    if self.cycle_kind == "boost-diffuse" else "")),
            Fact("reached", "Case depth at the end", units.format_length(self.depth)),
            Fact("threshold", "Threshold means", formats.carbon(s.threshold_carbon) if s.threshold.kind != "carbon"
                 else f"{formats.carbon(s.threshold_carbon)} (carbon threshold)"),
            Fact("equilibrium", "Surface carbon in equilibrium" if self.cycle_kind == "single" else "Richest gas, in equilibrium",
                 f"{formats.carbon(s.equilibrium_carbon)} (alloy factor {s.alloy_factor:.3f})"),
            Fact("saturation", "Saturation (Acm)", formats.carbon(s.saturation_carbon)),
            *self._hardness_facts(),
            Fact("probe", f"{self.control.title} setpoints (ideal)",
                 (self._control_text() or "—") + f"  ({self.gas.describe()})",
                 "\n".join(r.text() for r in self.readings)),
            quote_fact(self.quote),
        ]
        return Summary(self._headline(), self._how(units), facts)

    def _hardness_facts(self) -> list[Fact]:
        return hardness_facts(self.hardened, self.values)

    def _hardness_lines(self, units: DisplayUnits) -> list[str]:
        """The surface and core hardness against the drawing, retained austenite and D_I, for text and sheet."""
        hardened = self.hardened
        if hardened is None:
            return []
        v = self.values
        return [f"  surface hardness      {formats.hrc(hardened.surface_hrc)} ±{HARDNESS_UNCERTAINTY_HRC:g}"
                f"{_drawing(v['surface_hrc_min'], v['surface_hrc_max'], hardened.surface_hrc)}; retained austenite "
                f"{formats.percent(100 * float(hardened.retained_austenite[0]))}",
                f"  core hardness         {formats.hrc(hardened.core_hrc)}"
                f"{_drawing(v['core_hrc_min'], v['core_hrc_max'], hardened.core_hrc)}"
                f" at {units.format_length(hardened.core_depth)}; ideal diameter D_I "
                f"{formats.ideal_diameter(hardened.ideal_diameter)}",
                f"  quench and temper     {hardened.hardening.describe(units)}"]

    def _hardness_sheet_lines(self, units: DisplayUnits) -> list[str]:
        """The hardness figures in two lines for the process sheet."""
        hardened = self.hardened
        if hardened is None:
            return []
        v = self.values
        return [f"Hardness (±{formats.hrc(HARDNESS_UNCERTAINTY_HRC)}): surface {formats.hrc(hardened.surface_hrc)}"
                f"{_drawing(v['surface_hrc_min'], v['surface_hrc_max'])}, retained austenite "
                f"{formats.percent(100 * float(hardened.retained_austenite[0]))}; core {formats.hrc(hardened.core_hrc)}"
                f"{_drawing(v['core_hrc_min'], v['core_hrc_max'])}; D_I {formats.ideal_diameter(hardened.ideal_diameter)}",
                f"Quench and temper: {hardened.hardening.describe(units)}"]

    def timeline(self) -> Timeline:
        times, temps, pots, labels = timeline(self.stages)
        return Timeline(times, temps, pots, labels, self.potential_name, 1.6)

    def view(self, time: float | None = None) -> ProfileView:
        s, high = self.setup, self.targets[2]
        end = self.profile
        scrubbing = time is not None and time < self.duration
        shown = self.profile_at(time) if scrubbing else end
        whole = "soak" if self.cycle is None else "cycle"
        when = (f"after {format_duration(shown.time)} of {format_duration(self.duration)}" if scrubbing
                else f"after the full {whole}, {format_duration(self.duration)}")
        hv, end_hv = self._hardness_of(shown), self._hardness_of(end)
        final_label = "at the end of the " + whole
        top = max(s.saturation_carbon, s.equilibrium_carbon, float(end.carbon.max())) * 1.08
        main = Panel("carbon [wt %]", Curve(shown.depth, shown.carbon, "carbon"),
                     Curve(end.depth, end.carbon, final_label) if scrubbing else None,
                     [Level(s.threshold_carbon, f"threshold {formats.carbon(s.threshold_carbon)}"
                            + ("" if s.threshold.kind == "carbon" else f" ({s.threshold})"), "threshold"),
                      Level(s.steel.carbon, f"core {formats.carbon(s.steel.carbon)}", "core"),
                      Level(s.saturation_carbon, f"saturation (Acm) {formats.carbon(s.saturation_carbon)}", "limit")],
                     (0.0, top), "Carbon " + when)
        hardness = hardness_panel(s, shown, hv, end, end_hv, scrubbing, when, final_label)
        reach = max(high * 2.2, self.depth * 2.0)
        half = s.geometry.half_section
        return ProfileView(self.profile_name, main, hardness, min(reach, half) if np.isfinite(half) else reach,
                           self.targets)

    def stage_rows(self) -> list[dict]:
        return [stage_to_dict(stage) for stage in self.stages]

    def describe_end(self) -> str:
        s = self.setup
        relation = HARDNESS_RELATIONS[s.hardness_relation]
        what = (f"soak {self.duration / 3600:.4f} h at {formats.temperature(s.temperature)}" if self.cycle is None
                else f"end of a {self.duration / 3600:.4f} h cycle")
        return f"{what}; hardness " + (s.hardening.describe() if s.structure else f"assumes {relation.assumptions}")

    def profile_columns(self):
        comment, columns = super().profile_columns()
        hv = columns[-1][1]
        return comment, [*columns, ("hardness_hrc", ASTM_E140_hv_to_hrc(np.clip(hv, 238.0, 940.0)))]

    def to_dict(self) -> dict:
        s = self.setup
        out = s.to_dict()
        out.update({
            "plan": self.values["title"], "treatment": self.treatment, "process": self.cycle_kind,
            "soak_time_h": self.soak_time / 3600.0, "case_depth_mm": self.depth * 1e3,
            "surface_carbon_pct": self.surface_carbon, "target_depth_mm": [d * 1e3 for d in self.targets],
            "shop_stages_counted": bool(self.values["count_shop_stages"]),
            "stages": [stage_to_dict(stage) for stage in self.stages], "quote": self.quote.to_dict(),
            "warnings": list(self.warnings), "cautions": [c.title for c in self.cautions],
            "profile": self.profile.to_dict(),
            "probe_mv": [{"stage": label, "mv": mv} for label, mv in self.probe],
            "atmosphere_readings": [r.to_dict() for r in self.readings],
            **self.gas.to_dict(),
        })
        if self.cycle_kind == "single":
            low, _, high = self.soak_window
            out["window_soak_time_h"] = [low / 3600.0, high / 3600.0]
        out["profile"]["hardness_hv"] = [float(v) for v in self._hardness_of(self.profile)]
        hardened = self.hardened
        if hardened is not None:
            out.update(surface_hardness_hrc=hardened.surface_hrc, core_hardness_hrc=hardened.core_hrc,
                       core_depth_mm=hardened.core_depth * 1e3,
                       retained_austenite_surface_pct=100.0 * float(hardened.retained_austenite[0]),
                       ideal_diameter_mm=hardened.ideal_diameter * 1e3,
                       case_ideal_diameter_mm=hardened.case_ideal_diameter * 1e3,
                       quench=self.values["quench"], quench_temperature_c=hardened.hardening.quench_temperature - ZERO_CELSIUS,
                       temper_temperature_c=(None if hardened.hardening.temper_temperature is None else
                                             hardened.hardening.temper_temperature - ZERO_CELSIUS),
                       temper_time_h=hardened.hardening.temper_time / 3600.0)
        if self.boost_time is not None:
            out.update(boost_time_h=self.boost_time / 3600.0, diffuse_time_h=self.diffuse_time / 3600.0,
                       surface_target_pct=[self.values["surface_min"], self.values["surface_max"]],
                       boost_potential_pct=self.values["boost_potential"],
                       diffuse_potential_pct=self.values["diffuse_potential"])
        return out

    def text(self, units: DisplayUnits) -> str:
        s, (low, aim, high) = self.setup, self.targets
        T = units.format_temperature(s.temperature)
        if self.cycle_kind == "single":
            lines = [f"Soak time: {format_duration(self.soak_time)} ({self.soak_time / 3600:.2f} h) at {T}, carbon "
                     f"potential {formats.carbon(s.carbon_potential)}"]
            if high > low:
                soak_low, _, soak_high = self.soak_window
                lines.append(f"  drawing window        {units.format_length(low)} to {units.format_length(high)}: soak "
                             f"{format_duration(soak_low)} to {format_duration(soak_high)} (aim {units.format_length(aim)})")
        elif self.cycle_kind == "boost-diffuse":
            lines = [f"Boost {format_duration(self.boost_time)} at carbon potential "
                     f"{formats.carbon(self.values['boost_potential'])}, then diffuse {format_duration(self.diffuse_time)} "
                     f"at {formats.carbon(self.values['diffuse_potential'])}, at {T}",
                     f"  time at temperature   {format_duration(self.boost_time + self.diffuse_time)}"]
        else:
            lines = [f"Stages as entered: the cycle runs {format_duration(self.quote.total_h * 3600)}"]
        if self.cycle_kind != "stages":
            lines.append(f"  shop stages           {describe_counted(self.planned.counted)}")
        lines.append(f"  {s.threshold.depth_name:<21} {units.format_length(self.depth)} at {s.threshold}"
                     + s.threshold_meaning())
        lines += s.describe_lines(self.surface_carbon)
        if self.cycle_kind == "boost-diffuse":
            lines[-3] += f"; window {formats.carbon_range(self.values['surface_min'], self.values['surface_max'])}"
        lines += self._hardness_lines(units)
        if self.readings:
            lines.append(f"  furnace readings      ideal, {self.gas.describe()}; the shop's potential band in brackets; "
                         f"trim as the controller is trimmed:")
            lines += [f"    {r.text()}" for r in self.readings]
        lines += ["Cycle quote:", self.quote.text()]
        lines += [f"Warning: {w}" for w in self.warnings]
        lines.append(safety.caution_line(self.cautions))
        return "\n".join(lines)

    def sheet(self, units: DisplayUnits) -> SheetContent:
        s, (low, aim, high) = self.setup, self.targets
        lines = []
        if self.cycle_kind == "single":
            soak_low, soak, soak_high = self.soak_window
            lines.append(f"Soak {format_duration(soak)} at {units.format_temperature(s.temperature)}, carbon potential "
                         f"{formats.carbon(s.carbon_potential)}; window {units.format_length(low)}–"
                         f"{units.format_length(high)}: {format_duration(soak_low)} to {format_duration(soak_high)}")
        elif self.cycle_kind == "boost-diffuse":
            lines.append(f"Boost {format_duration(self.boost_time)}, then diffuse {format_duration(self.diffuse_time)} "
                         f"at {units.format_temperature(s.temperature)}")
        else:
            lines.append("Stages as entered (every stage in the setpoints)")
        if self.cycle_kind != "stages":
            lines.append("Shop stages " + describe_counted(self.planned.counted))
        lines.append(f"{s.threshold.depth_name.capitalize()} {units.format_length(self.depth)} at {s.threshold}; surface "
                     f"carbon {formats.carbon(self.surface_carbon)} at the end; aim {units.format_length(aim)}")
        lines += self._hardness_sheet_lines(units)
        lines.append(f"Models: {s.models_text()}; alloy factor "
                     + (f"{s.alloy_factor:.3f} (Gunnarson)" if s.alloy_factor_on else "off")
                     + (f"; {HARDNESS_RELATIONS[s.hardness_relation].display.lower()}" if s.threshold.is_hardness else ""))
        rows = [[stage.label, f"{stage.duration / 3600:.2f}",
                 "" if stage.temperature is None else units.format_temperature(stage.temperature),
                 "" if stage.carbon_potential is None else formats.carbon_value(stage.carbon_potential),
                 self._reading_cell(stage)] for stage in self.stages]
        shop = shop_of(self.values)
        notes = [f"* The carburizing atmosphere goes in only with the furnace at or above "
                 f"{units.format_temperature(safety.SAFE_ADMISSION_TEMPERATURE)}, after the purge (NFPA 86 practice). "
                 f"Bands: temperature ±{shop.temperature_tolerance_c * (1.8 if units.imperial else 1.0):.0f}"
                 f"{units.temperature_unit.replace('°', ' °')}, potential ±{formats.carbon(shop.potential_tolerance_pct)} "
                 f"(the shop's), and the {self.control.label} band it gives (ideal; {self.gas.describe()})."]
        column = {"mv": "probe mV", "dew_point": "dew point", "co2": "CO2 %"}[self.gas.control]
        return SheetContent(lines, ["stage", "hours", "temperature", "potential %C", column], rows,
                            self._callout(units), ["stage", "h:min", "temperature", "carbon potential",
                                                   f"{self.control.label} (ideal)"], self._setpoints(units),
                            self._inspection(units), notes)

    def _reading_cell(self, stage: Stage, shift: float = 0.0) -> str:
        """A held stage's setpoint in the reading the furnace is run on (its potential moved by ``shift`` [wt % C]),
        or blank."""
        if stage.carbon_potential is None:
            return ""
        found = stage_readings([replace(stage, carbon_potential=stage.carbon_potential + shift)], self.gas.at)
        if not found or self.gas.control not in found[0].values:
            return ""
        value = found[0].values[self.gas.control]
        return {"mv": f"{value:.0f}", "co2": f"{value * 100:.3f}"}.get(self.gas.control) or self.control.show(value)

    # -- the floor's sheet ----------------------------------------------------------------------------------
    def _callout(self, units: DisplayUnits) -> list[str]:
        s, (low, aim, high), v = self.setup, self.targets, self.values
        out = [f"{s.threshold.depth_name.capitalize()} {units.format_length(low)}–{units.format_length(high)} at "
               f"{s.threshold} (aim {units.format_length(aim)})"]
        if self.cycle_kind == "boost-diffuse":
            out.append(f"Surface carbon {formats.carbon_range(v['surface_min'], v['surface_max'])}")
        hardness = []
        if v["surface_hrc_min"] is not None or v["surface_hrc_max"] is not None:
            hardness.append(f"surface hardness {_window(v['surface_hrc_min'], v['surface_hrc_max'])}")
        if v["core_hrc_min"] is not None or v["core_hrc_max"] is not None:
            hardness.append(f"core hardness {_window(v['core_hrc_min'], v['core_hrc_max'])}")
        if hardness:
            text = "; ".join(hardness)
            out.append(text[:1].upper() + text[1:])
        return out

    def _setpoints(self, units: DisplayUnits) -> list[list[str]]:
        shop = shop_of(self.values)
        band_t = shop.temperature_tolerance_c * (1.8 if units.imperial else 1.0)
        band_p = shop.potential_tolerance_pct
        rows = []
        for stage in self.stages:
            temperature = ("" if stage.temperature is None else
                           f"{units.format_temperature(stage.temperature)} ±{band_t:.0f}")
            potential = ("" if stage.carbon_potential is None else
                         f"{formats.carbon_value(stage.carbon_potential)} ±{formats.carbon(band_p)}")
            if potential and stage.kind == "heat-up":  # the atmosphere goes in hot, after the purge
                potential += " *"
            reading = ""
            if stage.carbon_potential is not None:
                low, high = (self._reading_cell(stage, d) for d in (-band_p, band_p))
                if low and high:
                    reading = {"mv": f"{low}–{high} mV", "co2": f"{high}–{low} %"}.get(self.gas.control,
                                                                                        f"{high} to {low}")
            rows.append([stage.label, format_clock(stage.duration), temperature, potential, reading])
        return rows

    def _inspection(self, units: DisplayUnits) -> list[str]:
        s, (low, _, high), v = self.setup, self.targets, self.values
        window = f"{units.format_length(low)}–{units.format_length(high)}"
        out = ["Coupon: a piece of the same steel heat and section as the parts, in the load, sectioned after the "
               "temper (common practice)."]
        if s.threshold.is_hardness:
            out.append(f"Case depth: microhardness traverse (HV 1) on the coupon's section, read at {s.threshold} "
                       f"(ISO 18203 / SAE J423); accept {window}.")
        else:
            out.append(f"Case depth: carbon at {s.threshold} by analysis of turned layers, or a microhardness traverse "
                       f"read through the plan's carbon → hardness relation; accept {window}.")
        if v["surface_hrc_min"] is not None or v["surface_hrc_max"] is not None:
            out.append(f"Surface hardness: HRC (or HR15N / HV on small parts) on the coupon's surface; accept "
                       f"{_window(v['surface_hrc_min'], v['surface_hrc_max'])}.")
        if v["core_hrc_min"] is not None or v["core_hrc_max"] is not None:
            out.append(f"Core hardness: HRC at the centre of the section; accept "
                       f"{_window(v['core_hrc_min'], v['core_hrc_max'])}.")
        return out

