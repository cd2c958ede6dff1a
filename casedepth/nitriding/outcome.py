"""Gas-nitriding plans evaluated: the setup a plan's values make, and the outcome every surface reads.

* :func:`nitriding_setup` — the one place a plan's values become a :class:`NitridingSetup`;
* :func:`evaluate` — a plan's values to a :class:`NitridingOutcome`: the nitriding times for the
  drawing's window, the compound layer against its window (one stage, or two stages when asked for),
  the whole retort cycle and its quote;
* :func:`forward` — what a nitriding soak of a given length gives.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any, Mapping

from .. import formats, safety
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from ..models.iron_nitrogen import PHASE_NAMES
from ..models.steels import steel_for
from ..numerics.geometry import Geometry
from ..outcome import Curve, Fact, Level, Outcome, Panel, ProfileView, SheetContent, Summary, Timeline, quote_fact
from ..parameters import drawing_window
from ..shop.quote import Quote, ShopDefaults, quote_lines
from ..units import DisplayUnits, both_lengths, format_clock, format_duration
from .cycle import nitriding_cycle, segments_timeline
from .nitride import NitridingResult, nitride, nitriding_time
from .schedule import (TwoStageSchedule, compound_layer_advice, second_stage_potential, staged_layer,
                       staged_layer_at, two_stage_for_depth)
from .setup import NitridingSetup, dissociation_for_potential
from .zone import SharpFrontZone


def nitriding_setup(values: Mapping[str, Any]) -> NitridingSetup:
    """The validated setup of a plan's values; an :class:`InputError` names the parameter at fault."""
    return NitridingSetup(steel_for(values["steel"], values["composition"]), values["temperature"], values["kn"],
                          values["core_hardness"], values["surface_hardness"], values["n_multiplier"],
                          values["layer_model"], values["zone_model"], values["n_diffusivity"], values["nitrided_limit"],
                          values["strength_multiplier"],
                          values["spread_d_factor"] if values["calibration"] and values["spread_d_factor"] > 1.0 else None)


def _curvature_warnings(values: Mapping[str, Any], depth: float) -> list[str]:
    """The nitriding models are for a flat surface: say so where the part's curvature matters."""
    try:
        geometry = Geometry(values["shape"], values["size"])
    except InputError:
        return []
    if geometry.shape == "plate":
        if geometry.finite and depth > 0.25 * geometry.half_section:
            return [f"The nitrided depth ({both_lengths(depth)}) is over a quarter of the half-thickness: the "
                    f"flat-surface model ignores the cases from the two faces meeting."]
        return []
    radius = geometry.size / 2.0
    if depth <= 0.1 * radius:
        return []
    sooner = "sooner" if geometry.shape in ("cylinder", "sphere") else "later"
    return [f"The nitrided depth ({both_lengths(depth)}) is over a tenth of the radius ({both_lengths(radius)}): the "
            f"nitriding models are for a flat surface, and on this {geometry.shape} the depth is reached {sooner} "
            f"than shown."]


def evaluate(values: Mapping[str, Any]) -> "NitridingOutcome":
    """A nitriding plan's outcome; :class:`InputError` (or :class:`NotReachableError`) naming the parameter."""
    setup = nitriding_setup(values)
    low, aim, high = targets = drawing_window(values)
    try:
        results = [nitriding_time(setup, depth) for depth in targets]
    except InputError as error:
        raise (error.renamed("case_max") if error.field == "target" else error) from None
    window = (values["compound_min"], values["compound_max"])
    if window[1] < window[0]:
        raise InputError("compound_max", f"{formats.typed(window[1] * 1e6, 'µm')} is below the window's start "
                         f"({formats.typed(window[0] * 1e6, 'µm')})")
    warnings = list(results[1].warnings) + _curvature_warnings(values, high)
    try:
        # with two stages ticked, the plan's own schedule replaces the advice's
        advice = compound_layer_advice(setup, results[1], window, values["kn_second"], with_schedule=not values["two_stage"])
        kn_window = advice.kn_for_window
    except InputError as error:
        advice, kn_window = None, None
        warnings.append(f"Compound-layer window: {error.message}")
    schedule = None
    if values["two_stage"]:
        try:
            schedule, staged = two_stage_for_depth(setup, aim, window, values["kn_second"])
        except InputError as error:
            raise (error.renamed("case_max") if error.field == "target" else error) from None
        results[1] = staged
        warnings.append(f"Two stages: {schedule.first_time / 3600:.1f} h at K_N {formats.kn(schedule.first_kn)}, then "
                        f"{schedule.second_time / 3600:.1f} h at K_N {formats.kn(schedule.second_kn)}; the drawing "
                        f"window's end times are for one stage at K_N {formats.kn(setup.nitriding_potential)}.")
    elif advice is not None and advice.message:
        warnings.append(advice.message)
    soaks = [(results[1].time, setup.nitriding_potential)] if schedule is None else schedule.stages
    shop = ShopDefaults.from_dict(values["shop"])
    segments = nitriding_cycle(soaks, setup.temperature, shop)
    return NitridingOutcome(dict(values), setup, *results, window, kn_window, safety.cautions(ammonia=True), targets,
                            warnings, schedule=schedule, advised=None if advice is None else advice.two_stage, quote=quote_lines([(s[0], s[1]) for s in segments], shop),
                            segments=segments)


def forward(values: Mapping[str, Any], soak: float, probe_depth: float | None = None,
            shares: tuple[float, ...] | None = None) -> NitridingResult:
    """What one nitriding stage of ``soak`` [s] gives (``probe_depth`` is not used: nitriding reports profiles); with
    ``shares`` of a two-stage plan (its :attr:`~NitridingOutcome.held_shares`), the plan's two stages in that split
    of ``soak``: the first at the plan's K_N, the second at its second K_N (:func:`second_stage_potential`)."""
    if probe_depth is not None:
        raise InputError("carbon_at", "carburizing only")
    setup = nitriding_setup(values)
    if shares is None or len(shares) == 1 or not values["two_stage"]:
        return nitride(setup, soak)
    layer = staged_layer(setup, shares[0] * soak, setup.nitriding_potential,
                         second_stage_potential(setup, values["kn_second"]), soak)
    return nitride(setup, soak, layer=layer)


@dataclass
class NitridingOutcome(Outcome):
    """What a nitriding plan gives: soaks for the drawing's minimum, aim and maximum nitrided depth, the
    compound layer (and the K_N or two-stage schedule that keeps it in its window), the cycle and quote."""

    values: dict
    setup: NitridingSetup
    low: NitridingResult
    aim: NitridingResult
    high: NitridingResult
    compound_window: tuple[float, float]
    kn_for_window: float | None
    cautions: list
    targets: tuple[float, float, float]
    warnings: list[str] = field(default_factory=list)
    schedule: TwoStageSchedule | None = None  # two-stage nitriding: the stages of the aim's soak
    advised: TwoStageSchedule | None = None  # one stage whose layer misses its window: a schedule that would not
    quote: Quote | None = None  # the whole cycle: load, purges, heat-up, nitriding, cool-down
    segments: list = field(default_factory=list)  # (label, hours, end temperature [K], K_N or None)
    treatment: str = "nitriding"
    potential_name = f"nitriding potential K_N [{formats.KN_UNIT}]"
    profile_name = "Nitrogen profile"

    @property
    def soak_window(self) -> tuple[float, float, float]:
        return self.low.time, self.aim.time, self.high.time

    @property
    def held_stages(self) -> list[tuple[str, float]]:
        if self.schedule is None:
            return [("nitriding", self.aim.time)]
        return [("first stage", self.schedule.first_time), ("second stage", self.aim.time - self.schedule.first_time)]

    @property
    def depth(self) -> float:
        return self.aim.nitrided_depth

    @property
    def duration(self) -> float:
        return self.aim.time

    def depth_after(self, soak: float, multiplier: float | None = None) -> float:
        setup = self.setup if multiplier is None else replace(self.setup, diffusivity_multiplier=multiplier)
        return nitride(setup, soak).nitrided_depth

    def at(self, time: float) -> NitridingResult:
        """What the aim's soak (one stage, or the two-stage schedule) has given ``time`` [s] into it."""
        time = max(time, 60.0)
        if self.schedule is None:
            return nitride(self.setup, time)
        return nitride(self.setup, time, layer=staged_layer_at(self.setup, self.schedule, time))

    # -- words and pictures ------------------------------------------------------------------------------
    def _potentials(self) -> list[float]:
        return [self.setup.nitriding_potential] if self.schedule is None else [self.schedule.first_kn,
                                                                               self.schedule.second_kn]

    def summary(self, units: DisplayUnits) -> Summary:
        setup, aim, two = self.setup, self.aim, self.schedule
        T = units.format_temperature(setup.temperature)
        if two is None:
            how = (f"at {T}, K_N {formats.kn(setup.nitriding_potential)} "
                   f"({formats.percent(100 * dissociation_for_potential(setup.nitriding_potential))} dissociation)")
        else:
            how = (f"at {T} in two stages: {format_duration(two.first_time)} at K_N {formats.kn(two.first_kn)}, then "
                   f"{format_duration(two.second_time)} at K_N {formats.kn(two.second_kn)} "
                   f"({formats.percent(100 * dissociation_for_potential(two.second_kn))} dissociation)")
        gases = []
        for kn in self._potentials():
            d = dissociation_for_potential(kn)
            gases.append(f"NH3 {formats.percent(100 * (1 - d))}, H2 {formats.percent(75 * d)}, "
                         f"N2 {formats.percent(25 * d)}")
        facts = [
            Fact("window", "Drawing window", f"{units.format_length(self.low.nitrided_depth)} after "
                 f"{format_duration(self.low.time)}  to  {units.format_length(self.high.nitrided_depth)} after "
                 f"{format_duration(self.high.time)}"),
            Fact("surface", "Compound layer", f"{aim.layer.describe()}; window "
                                              f"{formats.thin_range(*self.compound_window)}"),
            Fact("reached", "Surface phase at the end", PHASE_NAMES[aim.layer.surface_phase]),
            Fact("threshold", "K_N for the layer window",
                 "—" if self.kn_for_window is None else formats.kn(self.kn_for_window)),
            Fact("equilibrium", "Hardness", f"core {formats.hv(setup.core)}, under the layer {formats.hv(setup.surface)}"),
            Fact("uncertainty", "How sure", setup.uncertainty),
            Fact("saturation", "Nitride formers", f"bind {formats.nitrogen(setup.capacity)}"),
            Fact("probe", "Exhaust (ammonia feed)", "  then  ".join(gases)),
            quote_fact(self.quote),
        ]
        return Summary(f"Nitride {format_duration(aim.time)}",
                       f"{how}, for {units.format_length(aim.nitrided_depth)} nitrided hardness depth "
                       f"({setup.limit_text})", facts)

    def timeline(self) -> Timeline:
        times, temps, pots, labels = segments_timeline(self.segments)
        return Timeline(times, temps, pots, labels, self.potential_name, 1.0)

    def view(self, time: float | None = None) -> ProfileView:
        setup, final = self.setup, self.aim
        scrubbing = time is not None and time < self.duration
        shown = self.at(time) if scrubbing else final
        when = (f"after {format_duration(shown.time)} of {format_duration(final.time)}" if scrubbing
                else f"after {format_duration(final.time)} of nitriding")
        band = (shown.layer.thickness, "compound layer " + shown.layer.describe()) if shown.layer.thickness > 0 else None
        main = Panel("nitrogen [wt %]", Curve(shown.depth, shown.nitrogen,
                                              "nitrogen in the diffusion zone (dissolved, in nitrides and in excess)"),
                     Curve(final.depth, final.nitrogen, "at the end of nitriding") if scrubbing else None,
                     [Level(setup.capacity, f"stoichiometric nitrides of all formers, {formats.nitrogen(setup.capacity)}",
                            "limit")],
                     (0.0, max(float(final.nitrogen.max()), setup.capacity, 0.05) * 1.25), "Nitrogen " + when, band)
        zone = setup.zone
        sharp = isinstance(zone, SharpFrontZone)
        limit = (f"core + 50 HV = {formats.hv(setup.hardness_limit)}" if setup.hardness_limit_hv is None
                 else f"limit {formats.hv(setup.hardness_limit)}")
        hardness = Panel("hardness [HV]", Curve(shown.depth, shown.hardness, zone.label),
                         Curve(final.depth, final.hardness, "at the end of nitriding") if scrubbing else None,
                         [Level(setup.hardness_limit, limit, "threshold")],
                         (setup.core - 80, max(setup.surface, setup.hardness_limit) + 80),
                         "Hardness " + when + (" (sharp-front model; measured profiles are smoother)" if sharp else
                                               f" (depth {setup.short_uncertainty})"), band, hrc_axis=True)
        return ProfileView(self.profile_name, main, hardness, max(self.targets[2] * 1.8, final.nitrided_depth * 1.5),
                           self.targets)

    def describe_end(self) -> str:
        aim = self.aim
        return (f"nitrided {aim.time / 3600:.4f} h at {formats.temperature(aim.setup.temperature)}, K_N "
                f"{formats.kn(aim.setup.nitriding_potential)}; compound layer {formats.thin_length(aim.compound_layer)} "
                f"(epsilon {formats.thin_length(aim.layer.epsilon)}); hardness from the {aim.setup.zone_model} zone model")

    def to_dict(self) -> dict:
        setup, aim = self.setup, self.aim
        out = {
            "plan": self.values["title"], "treatment": self.treatment, "process": "nitriding",
            "soak_time_h": aim.time / 3600.0, "compound_layer_um": aim.compound_layer * 1e6,
            "epsilon_layer_um": aim.layer.epsilon * 1e6, "gamma_prime_layer_um": aim.layer.gamma_prime * 1e6,
            "nitrided_depth_mm": aim.nitrided_depth * 1e3, "case_depth_mm": aim.nitrided_depth * 1e3,
            "surface_phase": aim.layer.surface_phase, "nitriding_potential": setup.nitriding_potential,
            "temperature_c": setup.temperature - ZERO_CELSIUS,
            "dissociation_pct": 100.0 * dissociation_for_potential(setup.nitriding_potential),
            "core_hardness_hv": setup.core, "surface_hardness_hv": setup.surface, "steel": setup.steel.name,
            "layer_model": setup.layer_model, "zone_model": setup.zone_model,
            "nitrogen_diffusivity": setup.nitrogen_diffusivity, "hardness_limit_hv": setup.hardness_limit,
            "depth_uncertainty": setup.uncertainty, "target_depth_mm": [d * 1e3 for d in self.targets],
            "window_soak_time_h": [self.low.time / 3600.0, self.high.time / 3600.0],
            "compound_window_um": [w * 1e6 for w in self.compound_window], "kn_for_compound_window": self.kn_for_window,
            "stages": [{"time_h": t / 3600.0, "kn": kn} for t, kn in
                       ([(aim.time, setup.nitriding_potential)] if self.schedule is None else self.schedule.stages)],
            "quote": self.quote.to_dict(), "warnings": list(self.warnings), "cautions": [c.title for c in self.cautions],
            "profile": {"depth_mm": (aim.depth * 1e3).tolist(), "nitrogen_pct": aim.nitrogen.tolist(),
                        "hardness_hv": aim.hardness.tolist()},
        }
        if self.kn_for_window is not None:
            out["dissociation_for_compound_window_pct"] = 100.0 * dissociation_for_potential(self.kn_for_window)
        if self.advised is not None:
            two = self.advised
            out["two_stage"] = {"first_time_h": two.first_time / 3600.0, "first_kn": two.first_kn,
                                "second_time_h": two.second_time / 3600.0, "second_kn": two.second_kn,
                                "compound_layer_um": two.compound_layer * 1e6, "epsilon_layer_um": two.layer.epsilon * 1e6,
                                "gamma_prime_layer_um": two.layer.gamma_prime * 1e6}
        return out

    def text(self, units: DisplayUnits) -> str:
        setup, aim, (low, _, high) = self.setup, self.aim, self.targets
        kn = setup.nitriding_potential
        lines = [f"Nitriding time: {format_duration(aim.time)} ({aim.time / 3600:.1f} h) at "
                 f"{units.format_temperature(setup.temperature)}, K_N {formats.kn(kn)} "
                 f"({formats.percent(100 * dissociation_for_potential(kn))} dissociation)"]
        if self.schedule is not None:
            two = self.schedule
            lines.append(f"  in two stages          {format_duration(two.first_time)} at K_N {formats.kn(two.first_kn)}, "
                         f"then {format_duration(two.second_time)} at K_N {formats.kn(two.second_kn)}")
        if high > low:
            lines.append(f"  drawing window          {units.format_length(low)} to {units.format_length(high)}: "
                         f"{format_duration(self.low.time)} to {format_duration(self.high.time)} (one stage)")
        lines += [f"  nitrided hardness depth {units.format_length(aim.nitrided_depth)} ({setup.limit_text}); "
                  f"{setup.uncertainty}",
                  f"  compound layer          {aim.layer.describe()}; surface phase {PHASE_NAMES[aim.layer.surface_phase]}",
                  f"  layer window            {formats.thin_range(*self.compound_window)}"
                  + ("" if self.kn_for_window is None else
                     f": K_N {formats.kn(self.kn_for_window)} "
                     f"({formats.percent(100 * dissociation_for_potential(self.kn_for_window))} dissociation) centres it "
                     f"in one stage"),
                  f"  steel                   {setup.steel.name} ({setup.steel.standard}); nitride formers bind "
                  f"{formats.nitrogen(setup.capacity)}",
                  f"  models                  {setup.models_text()}",
                  "Cycle quote:", self.quote.text()]
        lines += [f"Warning: {w}" for w in self.warnings]
        lines.append(safety.caution_line(self.cautions))
        return "\n".join(lines)

    def sheet(self, units: DisplayUnits) -> SheetContent:
        s, a, (low, _, high) = self.setup, self.aim, self.targets
        lines = [f"Nitride {format_duration(a.time)} at {units.format_temperature(s.temperature)}, K_N "
                 f"{formats.kn(s.nitriding_potential)} "
                 f"({formats.percent(100 * dissociation_for_potential(s.nitriding_potential))} dissociation); window "
                 f"{units.format_length(low)}–{units.format_length(high)}: "
                 f"{format_duration(self.low.time)} to {format_duration(self.high.time)}",
                 f"Nitrided hardness depth {units.format_length(a.nitrided_depth)} ({s.limit_text}); "
                 f"compound layer {a.layer.describe()}",
                 f"How sure: {s.uncertainty}"]
        if self.schedule is not None:
            two = self.schedule
            lines.append(f"In two stages: {format_duration(two.first_time)} at K_N {formats.kn(two.first_kn)}, then "
                         f"{format_duration(two.second_time)} at K_N {formats.kn(two.second_kn)} "
                         f"({formats.percent(100 * dissociation_for_potential(two.second_kn))} dissociation)")
        lines.append(f"Models: {s.models_text()}")
        rows = [[label, f"{hours:.2f}", units.format_temperature(t_end), "" if kn is None else formats.kn_value(kn),
                 "" if kn is None else formats.percent_value(100 * dissociation_for_potential(kn))]
                for label, hours, t_end, kn in self.segments]
        shop = ShopDefaults.from_dict(self.values["shop"])
        band_t = shop.temperature_tolerance_c * (1.8 if units.imperial else 1.0)
        band_k = shop.kn_tolerance_pct / 100.0
        setpoints = []
        for label, hours, t_end, kn in self.segments:
            held = kn is not None
            temperature = (f"{units.format_temperature(t_end)} ±{band_t:.0f}" if held else
                           f"to {units.format_temperature(t_end)}")
            exhaust = ""
            if held:
                d_low, d_high = (100 * dissociation_for_potential(kn * f) for f in (1 + band_k, 1 - band_k))
                exhaust = f"{formats.percent_value(d_low)}–{formats.percent(d_high)}"
            setpoints.append([label, format_clock(hours * 3600.0), temperature,
                              f"K_N {formats.kn(kn)} ±{formats.percent(100 * band_k)}" if held else
                              "nitrogen" if "urge" in label else "",
                              exhaust])
        callout = [f"Nitrided hardness depth {units.format_length(low)}–{units.format_length(high)} at {s.limit_text} "
                   f"(aim {units.format_length(self.targets[1])})",
                   f"Compound layer {formats.thin_range(*self.compound_window)}"]
        inspection = ["Coupon: a piece of the same steel heat, hardened and tempered with the parts, in the load "
                      "(common practice).",
                      f"Nitrided hardness depth: HV 0.5 traverse on the coupon's section, read at {s.limit_text} "
                      f"(DIN 50190-3 / ISO 18203); accept {units.format_length(low)}–{units.format_length(high)}.",
                      f"Compound layer: metallographic section (nital), measured at 500×; accept "
                      f"{formats.thin_range(*self.compound_window)}.",
                      "Surface hardness: HV 1 or HR15N on the coupon's surface, as the drawing states."]
        return SheetContent(lines, ["stage", "hours", "ends at", "K_N", "dissociation %"], rows, callout,
                            ["stage", "h:min", "temperature", "atmosphere", "dissociation"], setpoints, inspection,
                            [f"Bands: temperature ±{band_t:.0f}{units.temperature_unit.replace('°', ' °')}, K_N "
                             f"±{formats.percent(100 * band_k)} (the shop's, Edit → Shop times and rates). Ammonia goes "
                             f"in only after the nitrogen purge; purge again before opening the retort."])
