"""Low-pressure carburizing plans evaluated: the load a plan's values make, and the outcome every surface reads.

* :func:`lpc_of` — the one place a plan's values become an :class:`~casedepth.lpc.setup.LpcSetup`;
* :func:`evaluate` — a plan's values to an :class:`LpcOutcome`: its pulse table as given (the forward mode), or
  planned for the drawing's aim and surface-carbon window;
* :func:`forward` — what the plan's pulse table gives with its time at temperature stretched or shortened alike.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import cached_property
from typing import Any, Mapping

import numpy as np

from .. import formats, safety
from ..carburizing.hardening import Hardening
from ..carburizing.outcome import (HARDNESS_UNCERTAINTY_HRC, Hardened, _drawing, carburizing_setup, harden,
                                   hardness_along, hardness_facts, hardness_panel)
from ..constants import ROOM_TEMPERATURE, ZERO_CELSIUS
from ..errors import InputError
from ..numerics.solver import Profile
from ..outcome import Curve, Fact, Level, Outcome, Panel, ProfileView, SheetContent, Summary, Timeline, quote_fact
from ..parameters import drawing_window
from ..shop.quote import Quote, ShopDefaults, quote_lines
from ..units import DisplayUnits, format_clock, format_duration
from .planner import PulsePlan, plan_pulses, pulse_tables, run_pulses
from .pulses import Pulse, PulseRun, carbon_mass, held_time
from .schedule import format_schedule, parse_schedule
from .setup import LpcSetup, lpc_setup, saturation_of


def lpc_of(values: Mapping[str, Any]) -> LpcSetup:
    """The validated load of a plan's values; an :class:`InputError` names the parameter at fault."""
    shop = ShopDefaults.from_dict(values["shop"])
    T = values["temperature"]
    hardening_t = values["hardening_temperature"]
    if hardening_t is None:
        hardening_t = min(shop.drop_temperature_c + ZERO_CELSIUS, T)
    from ..models.steels import steel_for

    saturation = saturation_of(steel_for(values["steel"], values["composition"]), T)
    limit = values["surface_limit"]
    # the steel, part, threshold and quench as carburizing reads them, the surface held at the limit
    carbon = carburizing_setup({**values, "treatment": "carburizing", "process": "single",
                                "carbon_potential": min(limit if limit is not None else saturation, 2.0),
                                "alloy_factor": False, "beta_held": True})
    carbon = replace(carbon, hardening=Hardening(values["quench"], values["quench_temperature"],
                                                 values["temper_temperature"], values["temper_time"], hardening_t))
    flux = math.inf if values["carbon_flux"] is None else values["carbon_flux"]
    drops = hardening_t < T - 1e-9  # quenched from the carburizing temperature: no drop, no equalize
    return lpc_setup(carbon, flux, limit, hardening_t, shop.drop_h * 3600.0 if drops else 0.0,
                     shop.equalize_h * 3600.0 if drops else 0.0, values["load_area"], values["hydrocarbon"])


def _stages(lpc: LpcSetup, run: PulseRun, shop: ShopDefaults, temper: tuple[float, float] | None):
    """The cycle for the quote and the timeline: (label, hours, temperature at the end [K], gas or None)."""
    out = [("Load and pump down", shop.load_h, ROOM_TEMPERATURE, None),
           ("Heat-up in vacuum", shop.heat_up_h, lpc.temperature, None),
           (f"Pulses ({len(run.pulses)} boosts, {len(run.pulses)} diffuses)", run.held_time / 3600.0, lpc.temperature,
            lpc.gas.label)]
    if lpc.drops:
        out.append(("Drop to hardening temperature (nitrogen)", lpc.drop_time / 3600.0, lpc.hardening_temperature, None))
    if lpc.equalize_time > 0:
        out.append(("Equalize", lpc.equalize_time / 3600.0, lpc.hardening_temperature, None))
    out.append(("Gas quench", shop.quench_h, 40.0 + ZERO_CELSIUS, None))
    if temper is not None:
        out.append(("Temper", temper[1] / 3600.0, temper[0], None))
    return [row for row in out if row[1] > 0]


def evaluate(values: Mapping[str, Any]) -> "LpcOutcome":
    """A low-pressure carburizing plan's outcome: the pulse table as given, or planned for the drawing's aim with the
    surface carbon in the middle of its window; :class:`InputError` (or NotReachableError) naming the parameter."""
    lpc = lpc_of(values)
    targets = drawing_window(values)
    window = (values["surface_min"], values["surface_max"])
    warnings: list[str] = []
    plan = None
    if values["schedule"].strip():
        run = run_pulses(lpc, parse_schedule(values["schedule"]))
    else:
        count = values["pulse_count"]
        plan = plan_pulses(lpc, targets[1], window, None if count is None else int(count), values["max_hold"])
        run = plan.run
        warnings += plan.warnings
    low, _, high = targets
    if not (low * (1 - 1e-4) <= run.case_depth <= high * (1 + 1e-4)):
        warnings.append(f"The case ends at {formats.length(run.case_depth)}, outside the drawing's "
                        f"{formats.length_range(low, high)}.")
    if not (window[0] <= run.surface_carbon <= window[1]):
        warnings.append(f"The surface ends at {formats.carbon(run.surface_carbon)}, outside its window "
                        f"{formats.carbon_range(*window)}.")
    if lpc.temperature > 980.0 + ZERO_CELSIUS:
        warnings.append(f"{formats.temperature(lpc.temperature)} is above about 980 °C, where steels without "
                        f"grain-refining additions coarsen their grain (common practice): use a fine-grained grade.")
    shop = ShopDefaults.from_dict(values["shop"])
    temper = None if values["temper_temperature"] is None else (values["temper_temperature"], values["temper_time"])
    stages = _stages(lpc, run, shop, temper)
    outcome = LpcOutcome(dict(values), lpc, run, plan, targets, quote_lines([(s[0], s[1]) for s in stages], shop),
                         warnings, safety.lpc_cautions(lpc.temperature), stages)
    if outcome.hardened is not None:
        outcome.warnings += outcome.hardened.warnings(values)
    return outcome


@dataclass
class LpcResult:
    """What the plan's pulse table gives with its time at temperature ``soak`` [s] (each pulse stretched alike): the
    run, and the figures a load's spread reads."""

    setup: LpcSetup
    soak_time: float
    run: PulseRun

    @property
    def window_depth(self) -> float:
        return self.run.case_depth

    case_depth = window_depth

    @property
    def profile(self) -> Profile:
        return self.run.profile

    @property
    def surface_carbon(self) -> float:
        return self.run.surface_carbon

    @property
    def spread_figures(self) -> dict[str, float]:
        return {"surface_carbon_pct": self.surface_carbon}

    def to_dict(self) -> dict:
        return {"soak_time_h": self.soak_time / 3600.0, "case_depth_mm": self.run.case_depth * 1e3,
                "surface_carbon_pct": self.surface_carbon, "pulses": [p.to_dict() for p in self.run.pulses]}

    def text(self, units: DisplayUnits) -> str:
        return (f"{len(self.run.pulses)} pulses, {format_duration(self.soak_time)} at temperature: case "
                f"{units.format_length(self.run.case_depth)}, surface {formats.carbon(self.surface_carbon)}")


def aim_soaks(values_list: list[Mapping[str, Any]]) -> list[float | InputError]:
    """What :func:`evaluate` gives as each plan's ``soak_time`` (its boosts and diffuses together), without the rest of
    the outcome (the table with one pulse fewer, the re-run, hardness and quote): the plans that plan their table
    searched side by side, each round's drops and equalizes in one batch (:func:`~casedepth.lpc.planner.pulse_tables`),
    the same times to round-off; a plan that gives its own table runs it. A plan that cannot be planned gets its
    :class:`InputError` in its place."""
    out: list[float | InputError | None] = [None] * len(values_list)
    rows, keys = [], []
    for k, values in enumerate(values_list):
        try:
            lpc = lpc_of(values)
            aim = drawing_window(values)[1]
            if values["schedule"].strip():
                out[k] = float(run_pulses(lpc, parse_schedule(values["schedule"])).held_time)
                continue
        except InputError as error:
            out[k] = error
            continue
        count = values["pulse_count"]
        rows.append((lpc, aim, (values["surface_min"], values["surface_max"]), None if count is None else int(count),
                     values["max_hold"]))
        keys.append(k)
    for k, result in zip(keys, pulse_tables(rows)):
        if isinstance(result, InputError):
            out[k] = result
        elif isinstance(result, Exception):
            raise result
        else:
            out[k] = float(held_time(result.pulses))
    return out


def forward(values: Mapping[str, Any], soak: float, probe_depth: float | None = None,
            shares: tuple[float, ...] | None = None) -> LpcResult:
    """What the plan's pulse table (as given, or as planned) gives with its boosts and diffuses stretched alike to
    ``soak`` [s] at temperature (``shares`` are the plan's own split, which a stretch keeps)."""
    if probe_depth is not None:
        raise InputError("carbon_at", "gas carburizing only")
    lpc = lpc_of(values)
    if values["schedule"].strip():
        pulses = parse_schedule(values["schedule"])
    else:
        pulses = evaluate(values).run.pulses
    held = sum(p.boost + p.diffuse for p in pulses)
    factor = soak / held
    return LpcResult(lpc, soak, run_pulses(lpc, [Pulse(p.boost * factor, p.diffuse * factor) for p in pulses]))


@dataclass
class LpcOutcome(Outcome):
    """What a low-pressure carburizing plan gives: the pulse table, the case and surface at the end, the surface
    carbon through the cycle against its limit, the gas, the whole cycle and its quote."""

    values: dict
    setup: LpcSetup
    run: PulseRun
    plan: PulsePlan | None
    targets: tuple[float, float, float]
    quote: Quote
    warnings: list[str]
    cautions: list
    segments: list = field(default_factory=list)  # (label, hours, temperature at the end [K], gas or None)
    treatment: str = "lpc"
    potential_name = "surface carbon [%C]"
    profile_name = "Carbon profile"

    # -- the numbers -------------------------------------------------------------------------------------------
    @property
    def soak_window(self) -> tuple[float, float, float]:
        held = self.run.held_time
        return held, held, held

    @property
    def held_stages(self) -> list[tuple[str, float]]:
        # the pulses as one: a longer or shorter time at temperature stretches every boost and diffuse alike
        return [(f"{len(self.run.pulses)} pulses", self.run.held_time)]

    def frozen_values(self) -> dict[str, Any]:
        if self.values["schedule"].strip():
            return dict(self.values)
        return {**self.values, "schedule": format_schedule(self.run.pulses)}

    @property
    def depth(self) -> float:
        return self.run.case_depth

    @property
    def surface_carbon(self) -> float:
        return self.run.surface_carbon

    @property
    def profile(self) -> Profile:
        return self.run.profile

    @property
    def duration(self) -> float:
        return float(self.run.history.times[-1])

    @property
    def gas_litres(self) -> float:
        """Normal litres of the hydrocarbon that carry the carbon the load took up (all of it used)."""
        return self.setup.gas_litres(self.carbon_kg)

    @property
    def carbon_kg(self) -> float:
        return carbon_mass(self.run.uptake, self.setup.area)

    @property
    def hardenability_case_carbon(self) -> float:
        return round(min(self.surface_carbon, 0.9), 2)

    @cached_property
    def hardened(self) -> Hardened | None:
        return harden(self.setup.carbon, self.profile)

    def depth_after(self, soak: float, multiplier: float | None = None) -> float:
        raise InputError("treatment", "a pulse table has no single soak to vary")

    def _hardness_of(self, profile: Profile) -> np.ndarray:
        return hardness_along(self.setup.carbon, profile, self.hardened if profile is self.profile else None)

    # -- words ---------------------------------------------------------------------------------------------------
    def _pulse_words(self) -> str:
        pulses = self.run.pulses
        boosts = [p.boost for p in pulses]
        diffuses = [p.diffuse for p in pulses]
        return (f"{len(pulses)} pulses: boosts {format_duration(min(boosts))}–{format_duration(max(boosts))}, diffuses "
                f"{format_duration(diffuses[0])} growing to {format_duration(diffuses[-1])} (the last)")

    def _hold_words(self) -> str:
        held = self.run.time_at_limit
        return f"{format_duration(max(held))} at most in a boost" if held else "—"

    def _fewer_words(self) -> str:
        fewer = None if self.plan is None else self.plan.fewer
        if fewer is None:
            return "—"
        return (f"{len(fewer.pulses)} pulses: {format_duration(fewer.run.held_time)} at temperature (this plan "
                f"{format_duration(self.run.held_time)}), each boost at the limit {format_duration(fewer.hold)}")

    def summary(self, units: DisplayUnits) -> Summary:
        lpc, run, (low, aim, high) = self.setup, self.run, self.targets
        v = self.values
        facts = [
            Fact("window", "Drawing window", f"{units.format_length(low)} to {units.format_length(high)}; the case ends "
                                             f"at {units.format_length(run.case_depth)}"),
            Fact("surface", "Surface carbon at the end",
                 f"{formats.carbon(run.surface_carbon)} (window {formats.carbon_range(v['surface_min'], v['surface_max'])})"),
            Fact("pulses", "Pulses", self._pulse_words()),
            Fact("limit", "Surface limit", f"{formats.carbon(lpc.limit)} ("
                 + ("the steel's saturation" if v["surface_limit"] is None else f"saturation {formats.carbon(lpc.saturation)}")
                 + f"); held {self._hold_words()}"),
            Fact("flux", "Carbon flux", f"{lpc.gas.label}: {lpc.describe_flux()}"),
            Fact("gas", "Gas for the load", f"{formats.trimmed(self.gas_litres, 0)} NL {lpc.gas.label.lower()} carry "
                                            f"the {formats.trimmed(self.carbon_kg * 1e3, 1)} g of carbon "
                                            f"{formats.trimmed(lpc.area, 2)} m² take up (dose more: not all cracks on the load)"),
            Fact("fewer", "One pulse fewer", self._fewer_words()),
            *self._hardness_facts(),
            quote_fact(self.quote),
        ]
        how = (f"at {units.format_temperature(lpc.temperature)}, {lpc.gas.label.lower()} boosts and nitrogen diffuses, for "
               f"{units.format_length(aim)} {lpc.carbon.threshold.depth_name} at {lpc.carbon.threshold}"
               + (f"; drop to {units.format_temperature(lpc.hardening_temperature)} counted" if lpc.drops else ""))
        return Summary(f"Pulses {format_duration(run.held_time)}", how, facts)

    def _hardness_facts(self) -> list[Fact]:
        return hardness_facts(self.hardened, self.values)[:1]

    def timeline(self) -> Timeline:
        """Temperature through the cycle and the surface carbon (on the potential's axis) through the pulses."""
        lpc, run = self.setup, self.run
        times, temps, pots, labels = [0.0], [ROOM_TEMPERATURE], [math.nan], []
        now, t_now = 0.0, ROOM_TEMPERATURE
        for label, hours, t_end, gas in self.segments:
            span = hours * 3600.0
            labels.append((now, now + span, label))
            if gas is not None:  # the pulses: the surface carbon the solver gave, step by step
                labels.append((now, now, f"{gas.lower()} in"))
                start = run.surface_times[0]
                inside = run.surface_times <= start + run.held_time + 1e-9
                t = now + (run.surface_times[inside] - start)
                times += list(t)
                temps += [lpc.temperature] * len(t)
                pots += list(run.surface_carbon_history[inside])
            else:
                times += [now, now + span]
                temps += [t_now, t_end]
                pots += [math.nan, math.nan]
            now, t_now = now + span, t_end
        return Timeline(np.array(times), np.array(temps), np.array(pots, dtype=float), labels, self.potential_name,
                        max(lpc.limit * 1.1, 1.6), limit=(lpc.limit, f"surface limit {formats.carbon(lpc.limit)}"))

    def view(self, time: float | None = None) -> ProfileView:
        lpc, s, high = self.setup, self.setup.carbon, self.targets[2]
        end = self.profile
        scrubbing = time is not None and time < self.duration
        shown = self.run.history.profile_at(time) if scrubbing else end
        when = (f"after {format_duration(shown.time)} of {format_duration(self.duration)}" if scrubbing
                else f"after the pulses and the drop, {format_duration(self.duration)}")
        hv, end_hv = self._hardness_of(shown), self._hardness_of(end)
        main = Panel("carbon [wt %]", Curve(shown.depth, shown.carbon, "carbon"),
                     Curve(end.depth, end.carbon, "at the end") if scrubbing else None,
                     [Level(s.threshold_carbon, f"threshold {formats.carbon(s.threshold_carbon)}"
                            + ("" if s.threshold.kind == "carbon" else f" ({s.threshold})"), "threshold"),
                      Level(s.steel.carbon, f"core {formats.carbon(s.steel.carbon)}", "core"),
                      Level(lpc.limit, f"surface limit {formats.carbon(lpc.limit)}", "limit")],
                     (0.0, lpc.limit * 1.08), "Carbon " + when)
        hardness = hardness_panel(s, shown, hv, end, end_hv, scrubbing, when, "at the end")
        reach = max(high * 2.2, self.depth * 2.0)
        half = s.geometry.half_section
        return ProfileView(self.profile_name, main, hardness, min(reach, half) if np.isfinite(half) else reach,
                           self.targets)

    def describe_end(self) -> str:
        return (f"{len(self.run.pulses)} low-pressure pulses, {self.run.held_time / 3600:.4f} h at "
                f"{formats.temperature(self.setup.temperature)}; {self.setup.carbon.hardening.describe()}")

    def to_dict(self) -> dict:
        lpc, run = self.setup, self.run
        out = {
            "plan": self.values["title"], "treatment": self.treatment, "process": "low-pressure pulses",
            "pulses": [p.to_dict() for p in run.pulses], "schedule": format_schedule(run.pulses),
            "soak_time_h": run.held_time / 3600.0, "case_depth_mm": run.case_depth * 1e3,
            "surface_carbon_pct": run.surface_carbon, "max_surface_carbon_pct": run.max_surface_carbon,
            "saturation_carbon_pct": lpc.saturation, "surface_limit_pct": lpc.limit,
            "time_at_limit_s": run.time_at_limit, "saturation_after_s": [s if math.isfinite(s) else None
                                                                          for s in run.saturation],
            "gas": lpc.gas.key, "gas_volume_l": self.gas_litres, "carbon_taken_up_g": self.carbon_kg * 1e3,
            "load_area_m2": lpc.area, "carbon_flux_g_per_m2_h": (None if math.isinf(lpc.carbon_flux)
                                                                 else lpc.carbon_flux * 3600e3),
            "temperature_c": lpc.temperature - ZERO_CELSIUS, "hardening_temperature_c": lpc.hardening_temperature - ZERO_CELSIUS,
            "threshold": str(lpc.carbon.threshold), "threshold_carbon_pct": lpc.threshold_carbon,
            "target_depth_mm": [d * 1e3 for d in self.targets],
            "surface_target_pct": [self.values["surface_min"], self.values["surface_max"]],
            "steel": lpc.steel.name, "core_carbon_pct": lpc.steel.carbon, "diffusivity_model": lpc.carbon.diffusivity.method,
            "quote": self.quote.to_dict(), "warnings": list(self.warnings), "cautions": [c.title for c in self.cautions],
            "profile": {**self.profile.to_dict(), "hardness_hv": [float(h) for h in self._hardness_of(self.profile)]},
        }
        if self.plan is not None:
            out["hold_at_limit_s"] = self.plan.hold
            out["reboost_carbon_pct"] = self.plan.reboost
            if self.plan.fewer is not None:
                out["fewer_pulses"] = {"pulses": [p.to_dict() for p in self.plan.fewer.pulses],
                                       "soak_time_h": self.plan.fewer.run.held_time / 3600.0,
                                       "hold_at_limit_s": self.plan.fewer.hold}
        hardened = self.hardened
        if hardened is not None:
            out.update(surface_hardness_hrc=hardened.surface_hrc, core_hardness_hrc=hardened.core_hrc)
        return out

    def _table_rows(self) -> list[list[str]]:
        rows = []
        for number, (pulse, held) in enumerate(zip(self.run.pulses, self.run.time_at_limit), 1):
            rows.append([f"boost {number}", format_clock(pulse.boost, with_seconds=True), self.setup.gas.label.lower(),
                         f"at the limit {format_clock(held, with_seconds=True)}"])
            if pulse.diffuse > 0:
                rows.append([f"diffuse {number}", format_clock(pulse.diffuse, with_seconds=True), "nitrogen", ""])
        return rows

    def text(self, units: DisplayUnits) -> str:
        lpc, run, (low, aim, high) = self.setup, self.run, self.targets
        v = self.values
        lines = [f"Low-pressure pulses: {format_duration(run.held_time)} at {units.format_temperature(lpc.temperature)}, "
                 f"{lpc.gas.label.lower()} boosts and nitrogen diffuses ({len(run.pulses)} pulses)",
                 f"  case depth            {units.format_length(run.case_depth)} at {lpc.carbon.threshold} (drawing "
                 f"{units.format_length(low)} to {units.format_length(high)}, aim {units.format_length(aim)})",
                 f"  surface carbon        {formats.carbon(run.surface_carbon)} at the end (window "
                 f"{formats.carbon_range(v['surface_min'], v['surface_max'])}); highest {formats.carbon(run.max_surface_carbon)}",
                 f"  surface limit         {formats.carbon(lpc.limit)} (saturation {formats.carbon(lpc.saturation)}); held "
                 f"{self._hold_words()}",
                 f"  carbon flux           {lpc.describe_flux()}",
                 f"  gas                   {formats.trimmed(self.gas_litres, 0)} NL {lpc.gas.label.lower()} carry the "
                 f"{formats.trimmed(self.carbon_kg * 1e3, 1)} g of carbon the load's {formats.trimmed(lpc.area, 2)} m² take up",
                 f"  one pulse fewer       {self._fewer_words()}",
                 f"  pulse table           {format_schedule(run.pulses)}"]
        hardened = self.hardened
        if hardened is not None:
            lines.append(f"  surface hardness      {formats.hrc(hardened.surface_hrc)} ±{HARDNESS_UNCERTAINTY_HRC:g}"
                         f"{_drawing(v['surface_hrc_min'], v['surface_hrc_max'], hardened.surface_hrc)}; core "
                         f"{formats.hrc(hardened.core_hrc)}{_drawing(v['core_hrc_min'], v['core_hrc_max'], hardened.core_hrc)}")
        lines += [f"  steel                 {lpc.steel.name} ({lpc.steel.standard}), core {formats.carbon(lpc.steel.carbon)}",
                  f"  models                D: {lpc.carbon.diffusivity.display}; the saturation–diffusion boost model; "
                  f"{lpc.carbon.geometry.describe()}",
                  "Cycle quote:", self.quote.text()]
        lines += [f"Warning: {w}" for w in self.warnings]
        lines.append(safety.caution_line(self.cautions))
        return "\n".join(lines)

    def sheet(self, units: DisplayUnits) -> SheetContent:
        lpc, run, (low, aim, high) = self.setup, self.run, self.targets
        v = self.values
        shop = ShopDefaults.from_dict(v["shop"])
        band_t = shop.temperature_tolerance_c * (1.8 if units.imperial else 1.0)
        lines = [f"{len(run.pulses)} pulses, {format_duration(run.held_time)} at {units.format_temperature(lpc.temperature)}: "
                 f"case {units.format_length(run.case_depth)} at {lpc.carbon.threshold}, surface "
                 f"{formats.carbon(run.surface_carbon)} at the end (highest {formats.carbon(run.max_surface_carbon)}, "
                 f"limit {formats.carbon(lpc.limit)})",
                 f"Gas: {lpc.gas.label.lower()}, {lpc.describe_flux()}; {formats.trimmed(self.gas_litres, 0)} NL carry the "
                 f"carbon the load's {formats.trimmed(lpc.area, 2)} m² take up (dose more)"]
        hardened = self.hardened
        if hardened is not None:
            lines.append(f"Hardness (±{formats.hrc(HARDNESS_UNCERTAINTY_HRC)}): surface {formats.hrc(hardened.surface_hrc)}"
                         f"{_drawing(v['surface_hrc_min'], v['surface_hrc_max'])}; core {formats.hrc(hardened.core_hrc)}"
                         f"{_drawing(v['core_hrc_min'], v['core_hrc_max'])}; {hardened.hardening.describe(units)}")
        setpoints = []
        for label, hours, t_end, gas in self.segments:
            if gas is not None:
                for name, clock, what, note in self._table_rows():
                    setpoints.append([name, clock, f"{units.format_temperature(lpc.temperature)} ±{band_t:.0f}", what, note])
                continue
            setpoints.append([label, format_clock(hours * 3600.0), f"to {units.format_temperature(t_end)}", "", ""])
        callout = [f"Effective case depth {units.format_length(low)}–{units.format_length(high)} at "
                   f"{lpc.carbon.threshold} (aim {units.format_length(aim)})",
                   f"Surface carbon {formats.carbon_range(v['surface_min'], v['surface_max'])}"]
        inspection = [f"Case depth: carbon at {lpc.carbon.threshold} by analysis of turned layers, or a microhardness "
                      f"traverse; accept {units.format_length(low)}–{units.format_length(high)}.",
                      "Surface: no carbide network at the surface (metallography of the coupon; common practice)."]
        return SheetContent(lines, ["stage", "h:min:s", "gas", "note"], [[r[0], r[1], r[2], r[3]] for r in self._table_rows()],
                            callout, ["stage", "h:min:s", "temperature", "gas", "note"], setpoints, inspection,
                            [f"Temperature band ±{band_t:.0f} (the shop's); boosts dose {lpc.gas.label.lower()} at the "
                             f"flow the furnace maker sets for the load's area; diffuses in nitrogen."])
