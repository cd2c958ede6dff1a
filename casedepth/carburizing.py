"""One carburizing step at constant temperature and carbon potential: forward and inverse.

* :func:`carburize` — what a soak of a given length gives (profile, effective case depth).
* :func:`soak_time_for_case_depth` — the soak that gives a target effective case depth, from one
  forward march that records the threshold depth after every step; the step that crosses the
  target is then re-taken with the length that lands on it (the threshold depth grows
  monotonically during a single step, so the root is bracketed).

Both build a :class:`CarburizingSetup`, which validates every input and knows the warnings.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .austenite import Andrews_1965_Ac3
from .diffusivity import Diffusivity
from .errors import InputError, NotReachableError
from .geometry import Geometry
from .hardness import HARDNESS_RELATIONS, threshold_carbon
from .roots import illinois
from .solver import Accuracy, CarbonSolver, Profile, SurfaceCondition, threshold_depth
from .steels import Steel
from .surface import DEFAULT_BETA, Gunnarson_alloy_factor, equilibrium_surface_carbon, steel_saturation_carbon
from .units import ZERO_CELSIUS, Threshold, both_lengths, celsius, fahrenheit, length_range

MAX_TEMPERATURE = 1100.0 + ZERO_CELSIUS  # K; top of the range the diffusivity and Acm data cover
GRAIN_GROWTH_TEMPERATURE = 980.0 + ZERO_CELSIUS  # K; common practice, see warnings()
POTENTIAL_RANGE = (0.05, 2.0)  # wt % C
BETA_RANGE = (1e-9, 1e-4)  # m/s
TARGET_RANGE = (0.01e-3, 10e-3)  # m
SOAK_RANGE = (60.0, 500 * 3600.0)  # s


def _both(kelvin: float) -> str:
    return f"{celsius(kelvin):.0f} °C ({fahrenheit(kelvin):.0f} °F)"


def _range(low: float, high: float) -> str:
    return f"{celsius(low):.0f}–{celsius(high):.0f} °C ({fahrenheit(low):.0f}–{fahrenheit(high):.0f} °F)"


@dataclass(frozen=True)
class CarburizingSetup:
    """Everything that decides a carburizing step, in SI (carbon in wt %).

    Parameters
    ----------
    steel : Steel
        Grade or custom composition; its carbon is the core carbon.
    temperature : float
        Furnace (part) temperature, [K].
    carbon_potential : float
        Carbon potential of the atmosphere (the carbon of plain carbon steel in equilibrium with it), [wt %].
    threshold : Threshold
        What "effective" means on the drawing: a carbon content or a hardness.
    diffusivity : Diffusivity
        Model of D(C, T).
    beta : float
        Mass-transfer coefficient, [m/s]; ``math.inf`` for a surface held at equilibrium.
    alloy_factor_on : bool
        Apply the Gunnarson alloy factor between the carbon potential and the steel's surface carbon.
    geometry : Geometry
        Shape and size of the part.
    hardness_relation : str
        Key of :data:`casedepth.hardness.HARDNESS_RELATIONS` used for hardness thresholds.
    accuracy : Accuracy
        Discretisation settings.
    """

    steel: Steel
    temperature: float
    carbon_potential: float
    threshold: Threshold = Threshold(0.40, "carbon")
    diffusivity: Diffusivity = field(default_factory=Diffusivity)
    beta: float = DEFAULT_BETA
    alloy_factor_on: bool = True
    geometry: Geometry = field(default_factory=Geometry)
    hardness_relation: str = "tempered"
    accuracy: Accuracy = field(default_factory=Accuracy)

    def __post_init__(self):
        ac3 = Andrews_1965_Ac3(self.steel.composition)
        T = self.temperature
        if not math.isfinite(T) or T < ac3:
            raise InputError("temperature", f"{_both(T)} is below the Ac3 of this steel ({_both(ac3)}, Andrews "
                             f"1965): it would not be fully austenitic; allowed {_range(ac3, MAX_TEMPERATURE)}")
        if T > MAX_TEMPERATURE:
            raise InputError("temperature", f"{_both(T)} is above the carburizing range the models cover; "
                             f"allowed {_range(ac3, MAX_TEMPERATURE)}")
        lo, hi = POTENTIAL_RANGE
        if not (math.isfinite(self.carbon_potential) and lo <= self.carbon_potential <= hi):
            raise InputError("carbon potential", f"{self.carbon_potential:g} %C is outside {lo:g}–{hi:g} %C")
        if not (math.isinf(self.beta) and self.beta > 0) and not (BETA_RANGE[0] <= self.beta <= BETA_RANGE[1]):
            raise InputError("beta", f"{self.beta * 100:g} cm/s is outside {BETA_RANGE[0] * 100:g}–"
                             f"{BETA_RANGE[1] * 100:g} cm/s (or inf for a surface held at equilibrium)")
        if self.hardness_relation not in HARDNESS_RELATIONS:
            raise InputError("hardness relation", f"unknown {self.hardness_relation!r}; choose one of "
                             f"{', '.join(HARDNESS_RELATIONS)}")
        carbon = self.threshold_carbon
        if not carbon > self.steel.carbon + 0.01:
            meaning = "is" if self.threshold.kind == "carbon" else f"means {carbon:.3f} %C,"
            raise InputError("threshold", f"{self.threshold} {meaning} not above the core carbon "
                             f"{self.steel.carbon:.3f} %C: the whole part would count as case; "
                             f"choose a threshold above {self.steel.carbon + 0.01:.2f} %C")

    # -- derived quantities ---------------------------------------------------------------
    @property
    def alloy_factor(self) -> float:
        """Equilibrium surface carbon of this steel over that of plain carbon steel, [-]."""
        return Gunnarson_alloy_factor(self.steel.composition) if self.alloy_factor_on else 1.0

    @property
    def equilibrium_carbon(self) -> float:
        """Surface carbon the atmosphere would bring the steel to, [wt %]."""
        return equilibrium_surface_carbon(self.carbon_potential, self.alloy_factor)

    @property
    def saturation_carbon(self) -> float:
        """Carbon saturation (Acm) of this steel's austenite at the temperature, [wt %]."""
        return steel_saturation_carbon(self.temperature, self.alloy_factor)

    @property
    def threshold_carbon(self) -> float:
        """The carbon content [wt %] that the threshold stands for (total case: the core's carbon plus the excess)."""
        if self.threshold.kind == "above core":
            return self.steel.carbon + self.threshold.value
        return threshold_carbon(self.threshold, self.hardness_relation)

    @property
    def surface_condition(self) -> SurfaceCondition:
        return SurfaceCondition(self.temperature, self.equilibrium_carbon, self.beta)

    def warnings(self) -> list[str]:
        """Plain-language cautions about the furnace step (not errors: the result is still given)."""
        out = []
        T_c = self.temperature - ZERO_CELSIUS
        sat = self.saturation_carbon
        if self.equilibrium_carbon > sat:
            out.append(f"The atmosphere would bring the surface to {self.equilibrium_carbon:.2f} %C, above the "
                       f"{sat:.2f} %C that this steel's austenite holds at {T_c:.0f} °C: expect carbides at the "
                       f"surface and soot in the furnace. Lower the carbon potential or boost and diffuse.")
        if self.equilibrium_carbon <= self.steel.carbon:
            out.append(f"The carbon potential ({self.carbon_potential:.2f} %C) is not above the core carbon "
                       f"({self.steel.carbon:.2f} %C): this atmosphere decarburizes.")
        if self.threshold_carbon >= self.equilibrium_carbon:
            out.append(f"The threshold ({self.threshold_carbon:.2f} %C) is not below the surface carbon this "
                       f"atmosphere gives ({self.equilibrium_carbon:.2f} %C): no effective case can form.")
        if self.temperature > GRAIN_GROWTH_TEMPERATURE:
            out.append(f"{T_c:.0f} °C is above about 980 °C, where most carburizing grades coarsen their grain "
                       f"unless made fine-grained (common practice); check the steel's grain-size control.")
        if self.threshold.is_hardness:
            rel = HARDNESS_RELATIONS[self.hardness_relation]
            out.append(f"{self.threshold} is taken as {self.threshold_carbon:.2f} %C ({rel.display}; "
                       f"assumes {rel.assumptions}).")
            c = self.steel.composition
            if sum(float(c.get(el, 0.0)) for el in ("Cr", "Ni", "Mo")) < 0.3 and float(c.get("Mn", 0.0)) < 1.0:
                out.append("This is a plain-carbon grade: its case hardens through to the threshold only with a fast "
                           "(water or brine) quench or in thin sections; after an oil quench the hardness depth may "
                           "fall short of this carbon-based estimate (common practice). Confirm on a test section.")
        return out

    # -- helpers for the solver ----------------------------------------------------------------
    def diffusivity_range(self) -> tuple[float, float]:
        """Smallest and largest D [m²/s] between the core carbon and the surface carbon."""
        c = np.linspace(self.steel.carbon, max(self.equilibrium_carbon, self.steel.carbon), 21)
        D = self.diffusivity(c, self.temperature)
        return float(D.min()), float(D.max())

    def rough_soak_time(self, case_depth: float) -> float:
        """A first estimate [s] of the soak for ``case_depth`` [m], only to size the first time step.

        Crank's (1975, §3.3) surface-evaporation solution for a flat surface with D taken at the
        threshold carbon; the solver then finds the real time.
        """
        from scipy.special import erfcx  # imported on first use: it is slow to import

        D = float(self.diffusivity(self.threshold_carbon, self.temperature))
        c0, ceq = self.steel.carbon, self.equilibrium_carbon
        wanted = (self.threshold_carbon - c0) / (ceq - c0)
        if not 0.0 < wanted < 1.0:
            return case_depth**2 / D
        h = self.beta / D

        def fraction(t):
            u = case_depth / (2.0 * math.sqrt(D * t))
            if math.isinf(h):
                return math.erfc(u)
            return math.erfc(u) - math.exp(-u * u) * float(erfcx(u + h * math.sqrt(D * t)))

        t = case_depth**2 / D
        for _ in range(60):  # bisection in log t: cheap and cannot fail
            if fraction(t) >= wanted:
                break
            t *= 2.0
        low, high = t / 2.0, t
        for _ in range(12):  # to within 0.02 %: plenty for sizing a grid
            mid = math.sqrt(low * high)
            low, high = (low, mid) if fraction(mid) >= wanted else (mid, high)
        return high

    def solver(self, soak_time: float | None = None, case_depth: float | None = None) -> CarbonSolver:
        """A fresh solver sized for a soak of about ``soak_time`` [s] or a case of about ``case_depth`` [m]."""
        _, d_max = self.diffusivity_range()
        if case_depth is not None:
            soak_time = self.rough_soak_time(case_depth)
        length = math.sqrt(d_max * soak_time)
        return CarbonSolver(self.geometry, self.diffusivity, self.steel.carbon, length, soak_time, self.accuracy)


@dataclass
class CarburizingResult:
    """The outcome of a soak: times in s, depths in m, carbon in wt %.

    ``history_time`` and ``history_carbon`` hold the profile after every solver step (on the
    nodes of ``profile.depth``), ending with the final profile; ``history_depth`` is the effective
    case depth at each of those times.
    """

    setup: CarburizingSetup
    soak_time: float
    profile: Profile
    case_depth: float
    history_time: np.ndarray
    history_carbon: list[np.ndarray]
    warnings: list[str]
    carbon_uptake: float  # wt % · m per unit surface
    target_depth: float | None = None
    carbon_at_depth: float | None = None
    probe_depth: float | None = None

    @cached_property
    def history_depth(self) -> np.ndarray:
        thr, half = self.setup.threshold_carbon, self.setup.geometry.half_section
        return np.array([threshold_depth(self.profile.depth, c, thr, half) for c in self.history_carbon])

    def profile_at(self, time: float) -> Profile:
        """The profile at ``time`` [s] of the soak, linear in time between solver steps (for display)."""
        times = self.history_time
        k = int(np.clip(np.searchsorted(times, time), 1, len(times) - 1))
        w = float(np.clip((time - times[k - 1]) / (times[k] - times[k - 1]), 0.0, 1.0))
        carbon = (1 - w) * self.history_carbon[k - 1] + w * self.history_carbon[k]
        return Profile(self.profile.depth, carbon, float(time), self.profile.half_section)

    @property
    def surface_carbon(self) -> float:
        return self.profile.surface_carbon

    @property
    def threshold_carbon(self) -> float:
        return self.setup.threshold_carbon

    @property
    def diffusion_length(self) -> float:
        """√(D t) with D at the threshold carbon, [m]: a length scale, not a depth where carbon stops."""
        return math.sqrt(float(self.setup.diffusivity(self.threshold_carbon, self.setup.temperature)) * self.soak_time)

    def to_dict(self) -> dict:
        """The JSON form used by ``casedepth carburize --json`` (units in the key names)."""
        s = self.setup
        out = {
            "soak_time_h": self.soak_time / 3600.0,
            "surface_carbon_pct": self.surface_carbon,
            "case_depth_mm": self.case_depth * 1e3,
            "threshold": str(s.threshold),
            "threshold_carbon_pct": self.threshold_carbon,
            "equilibrium_surface_carbon_pct": s.equilibrium_carbon,
            "saturation_carbon_pct": s.saturation_carbon,
            "alloy_factor": s.alloy_factor,
            "core_carbon_pct": s.steel.carbon,
            "temperature_c": s.temperature - ZERO_CELSIUS,
            "carbon_potential_pct": s.carbon_potential,
            "steel": s.steel.name,
            "composition_pct": dict(s.steel.composition),
            "geometry": s.geometry.describe(),
            "diffusivity_model": s.diffusivity.method,
            "beta_cm_per_s": None if math.isinf(s.beta) else s.beta * 100.0,
            "diffusion_length_mm": self.diffusion_length * 1e3,
            "warnings": list(self.warnings),
            "profile": {"depth_mm": (self.profile.depth * 1e3).tolist(), "carbon_pct": self.profile.carbon.tolist()},
        }
        if self.target_depth is not None:
            out["target_depth_mm"] = self.target_depth * 1e3
        if self.carbon_at_depth is not None:
            out["carbon_at_mm"] = self.probe_depth * 1e3
            out["carbon_at_pct"] = self.carbon_at_depth
        return out


def _history(solver: CarbonSolver, last: int, final: Profile) -> tuple[np.ndarray, list[np.ndarray]]:
    """Times and profiles of the solver's steps before step ``last``, then the final profile."""
    times = np.array([*solver.history_time[:last], final.time])
    return times, [*(solver.snapshot(k) for k in range(last)), final.carbon]


def carburize(setup: CarburizingSetup, soak_time: float, probe_depth: float | None = None) -> CarburizingResult:
    """Run a soak of ``soak_time`` [s]; the effective case depth it gives and the profile at its end.

    ``probe_depth`` [m], if given, is a depth at which the carbon is reported.
    """
    if not (math.isfinite(soak_time) and SOAK_RANGE[0] <= soak_time <= SOAK_RANGE[1]):
        raise InputError("time", f"{soak_time / 3600:g} h is outside {SOAK_RANGE[0] / 60:g} min–{SOAK_RANGE[1] / 3600:g} h")
    if probe_depth is not None:
        limit = min(setup.geometry.half_section, TARGET_RANGE[1] * 5)
        if not (math.isfinite(probe_depth) and 0.0 <= probe_depth <= limit):
            raise InputError("carbon at", f"{both_lengths(probe_depth)} is outside {length_range(0.0, limit)}")
    solver = setup.solver(soak_time=soak_time)
    solver.advance(soak_time, setup.surface_condition)
    profile = solver.profile()
    depth = profile.depth_at(setup.threshold_carbon)
    times, carbon = _history(solver, len(solver.history_time) - 1, profile)
    warnings = case_warnings(setup, depth, profile.surface_carbon)
    return CarburizingResult(setup, soak_time, profile, depth, times, carbon, warnings, solver.carbon_uptake(),
                             carbon_at_depth=None if probe_depth is None else profile.carbon_at(probe_depth),
                             probe_depth=probe_depth)


#: surface carbon above which retained austenite and carbides become a concern after quenching, wt % (common
#: practice: case-hardened gears are usually specified about 0.7–0.9 %C at the surface)
HIGH_SURFACE_CARBON = 0.95


def case_warnings(setup: CarburizingSetup, depth: float, surface: float) -> list[str]:
    """The setup's warnings and those about the case it ended with: ``depth`` [m], ``surface`` carbon [wt %]."""
    warnings = setup.warnings()
    if setup.geometry.finite and depth >= setup.geometry.half_section * (1 - 1e-9):
        warnings.append("The threshold carbon reaches the centre of the section: the part is carburized through.")
    if surface > HIGH_SURFACE_CARBON and setup.equilibrium_carbon <= setup.saturation_carbon:
        warnings.append(f"The surface ends at {surface:.2f} %C: above about 0.9 %C a quenched case holds retained "
                        f"austenite and may form carbides (common practice aims at 0.7–0.9 %C); a diffuse stage at a "
                        f"lower potential brings it down.")
    return warnings


def _land_on(depth_after, target: float, step: float, depth_start: float, depth_end: float) -> float:
    """The part of a step [s] after which the threshold depth equals ``target``.

    ``depth_after(tau)`` re-takes the step with length tau. Depth² grows nearly linearly with
    time, so regula falsi on depth² (Illinois variant: Dowell & Jarratt, BIT 11 (1971) 168) lands
    in two or three trials to 1e-7 of the target.
    """
    # |depth² − target²| ≤ 2e-7 target² means the depth is within 1e-7 of the target
    return illinois(lambda tau: depth_after(tau) ** 2 - target**2, 0.0, depth_start**2 - target**2,
                    step, depth_end**2 - target**2, 1e-12 * step, 2e-7 * target**2)


def _check_target(setup: CarburizingSetup, target: float, field: str = "target") -> None:
    lo, hi = TARGET_RANGE
    limit = min(hi, setup.geometry.half_section)
    if not (math.isfinite(target) and lo <= target <= limit):
        what = " (half the section)" if limit < hi else ""
        raise InputError(field, f"{both_lengths(target)} is outside {length_range(lo, limit)}{what}")


def soak_times_for_case_depths(setup: CarburizingSetup, targets: list[float],
                               size_for: float | None = None) -> list[CarburizingResult]:
    """Soaks [s] for several effective case depths [m] (e.g. a drawing's minimum, aim and maximum) from one march.

    The march records every step and stops once the deepest target is passed; for each target the
    step that crossed it is re-taken with the length that lands on it. The grid and steps are sized
    for ``size_for`` [m] (default: the middle target), so the answer for that depth is exactly what
    :func:`soak_time_for_case_depth` gives for it alone.
    """
    for target in targets:
        _check_target(setup, target)
    thr = setup.threshold_carbon
    if thr >= setup.equilibrium_carbon:
        raise NotReachableError("threshold", f"the threshold {thr:.3f} %C is not below the surface carbon this atmosphere "
                                f"gives ({setup.equilibrium_carbon:.3f} %C); raise the carbon potential or lower the threshold")
    deepest = max(targets)
    solver = setup.solver(case_depth=size_for if size_for is not None else sorted(targets)[len(targets) // 2])
    cond = setup.surface_condition
    depths = [0.0]  # threshold depth after every step (the march keeps them: the case grows monotonically)

    def record(s: CarbonSolver) -> bool:
        depths.append(s.threshold_depth(thr))
        return depths[-1] >= deepest

    solver.advance(SOAK_RANGE[1], cond, record)
    reached = depths[-1]
    if reached < deepest:
        raise NotReachableError("target", f"{both_lengths(deepest)} is not reached within {SOAK_RANGE[1] / 3600:g} h "
                                f"(reached {reached * 1e3:.3f} mm); raise the temperature or the carbon potential")
    results = []
    for target in targets:
        k = int(np.searchsorted(depths, target, side="left"))
        t0 = solver.history_time[k - 1]
        step = solver.history_time[k] - t0
        tau = _land_on(lambda tau: solver.retake(k, tau).depth_at(thr), target, step, depths[k - 1], depths[k])
        profile = solver.retake(k, tau)
        depth = profile.depth_at(thr)
        times, carbon = _history(solver, k, profile)
        own_warnings = case_warnings(setup, depth, profile.surface_carbon)
        uptake = float(np.sum(solver.volume * (profile.carbon - setup.steel.carbon)))
        results.append(CarburizingResult(setup, profile.time, profile, depth, times, carbon, own_warnings, uptake,
                                         target_depth=target))
    return results


def soak_time_for_case_depth(setup: CarburizingSetup, target: float) -> CarburizingResult:
    """The soak [s] at the setup's temperature and potential that gives effective case depth ``target`` [m]."""
    return soak_times_for_case_depths(setup, [target])[0]
