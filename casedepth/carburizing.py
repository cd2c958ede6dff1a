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

import numpy as np
from scipy.optimize import brentq
from scipy.special import erfcinv

from .austenite import Andrews_1965_Ac3
from .diffusivity import Diffusivity
from .errors import InputError, NotReachableError
from .geometry import Geometry
from .hardness import HARDNESS_RELATIONS, threshold_carbon
from .solver import Accuracy, CarbonSolver, Profile, SurfaceCondition
from .steels import Steel
from .surface import DEFAULT_BETA, Gunnarson_alloy_factor, equilibrium_surface_carbon, steel_saturation_carbon
from .units import ZERO_CELSIUS, Threshold

MAX_TEMPERATURE = 1100.0 + ZERO_CELSIUS  # K; top of the range the diffusivity and Acm data cover
GRAIN_GROWTH_TEMPERATURE = 980.0 + ZERO_CELSIUS  # K; common practice, see warnings()
POTENTIAL_RANGE = (0.05, 2.0)  # wt % C
BETA_RANGE = (1e-9, 1e-4)  # m/s
TARGET_RANGE = (0.01e-3, 10e-3)  # m
SOAK_RANGE = (60.0, 500 * 3600.0)  # s


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
            raise InputError("temperature", f"{T - ZERO_CELSIUS:.0f} °C is below the Ac3 of this steel "
                             f"({ac3 - ZERO_CELSIUS:.0f} °C, Andrews 1965): it would not be fully austenitic; "
                             f"allowed {ac3 - ZERO_CELSIUS:.0f}–{MAX_TEMPERATURE - ZERO_CELSIUS:.0f} °C")
        if T > MAX_TEMPERATURE:
            raise InputError("temperature", f"{T - ZERO_CELSIUS:.0f} °C is above the carburizing range the models "
                             f"cover; allowed {ac3 - ZERO_CELSIUS:.0f}–{MAX_TEMPERATURE - ZERO_CELSIUS:.0f} °C")
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
        """The carbon content [wt %] that the threshold stands for."""
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
        if self.threshold.kind != "carbon":
            rel = HARDNESS_RELATIONS[self.hardness_relation]
            out.append(f"{self.threshold} is taken as {self.threshold_carbon:.2f} %C ({rel.display}; "
                       f"assumes {rel.assumptions}).")
        return out

    # -- helpers for the solver ----------------------------------------------------------------
    def diffusivity_range(self) -> tuple[float, float]:
        """Smallest and largest D [m²/s] between the core carbon and the surface carbon."""
        c = np.linspace(self.steel.carbon, max(self.equilibrium_carbon, self.steel.carbon), 21)
        D = self.diffusivity(c, self.temperature)
        return float(D.min()), float(D.max())

    def solver(self, duration_estimate: float) -> CarbonSolver:
        """A fresh solver with a domain deep enough for a soak of about ``duration_estimate`` [s]."""
        _, d_max = self.diffusivity_range()
        depth = max(8.0 * math.sqrt(d_max * duration_estimate), 0.5e-3)
        return CarbonSolver(self.geometry, self.diffusivity, self.steel.carbon, depth, self.accuracy)


@dataclass
class CarburizingResult:
    """The outcome of a soak: times in s, depths in m, carbon in wt %."""

    setup: CarburizingSetup
    soak_time: float
    profile: Profile
    case_depth: float
    history_time: np.ndarray
    history_depth: np.ndarray
    warnings: list[str]
    carbon_uptake: float  # wt % · m per unit surface
    target_depth: float | None = None
    carbon_at_depth: float | None = None
    probe_depth: float | None = None

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


def _threshold_depth(solver: CarbonSolver, carbon: float) -> float:
    return Profile(solver.nodes, solver.carbon, solver.time, solver.geometry.half_section).depth_at(carbon)


def carburize(setup: CarburizingSetup, soak_time: float, probe_depth: float | None = None) -> CarburizingResult:
    """Run a soak of ``soak_time`` [s]; the effective case depth it gives and the profile at its end.

    ``probe_depth`` [m], if given, is a depth at which the carbon is reported.
    """
    if not (math.isfinite(soak_time) and SOAK_RANGE[0] <= soak_time <= SOAK_RANGE[1]):
        raise InputError("time", f"{soak_time / 3600:g} h is outside {SOAK_RANGE[0] / 60:g} min–{SOAK_RANGE[1] / 3600:g} h")
    if probe_depth is not None:
        limit = min(setup.geometry.half_section, TARGET_RANGE[1] * 5)
        if not (math.isfinite(probe_depth) and 0.0 <= probe_depth <= limit):
            raise InputError("carbon at", f"{probe_depth * 1e3:g} mm is outside 0–{limit * 1e3:g} mm")
    thr = setup.threshold_carbon
    solver = setup.solver(soak_time)
    times, depths = [], []

    def record(s: CarbonSolver) -> bool:
        times.append(s.time)
        depths.append(_threshold_depth(s, thr))
        return False

    solver.advance(soak_time, setup.surface_condition, record)
    profile = solver.profile()
    warnings = setup.warnings()
    _section_warning(setup, depths[-1], warnings)
    return CarburizingResult(setup, soak_time, profile, depths[-1], np.array(times), np.array(depths), warnings,
                             solver.carbon_uptake(),
                             carbon_at_depth=None if probe_depth is None else profile.carbon_at(probe_depth),
                             probe_depth=probe_depth)


def _section_warning(setup: CarburizingSetup, depth: float, warnings: list[str]) -> None:
    if setup.geometry.finite and depth >= setup.geometry.half_section * (1 - 1e-9):
        warnings.append("The threshold carbon reaches the centre of the section: the part is carburized through.")


def estimate_soak_time(setup: CarburizingSetup, target: float) -> float:
    """Rough soak [s] for ``target`` [m] from the erfc solution at the smallest D (used to size the grid)."""
    d_min, _ = setup.diffusivity_range()
    c0, cs = setup.steel.carbon, setup.equilibrium_carbon
    fraction = (setup.threshold_carbon - c0) / (cs - c0)
    u = float(erfcinv(min(max(fraction, 1e-6), 0.999)))
    return (target / (2.0 * u)) ** 2 / d_min


def soak_time_for_case_depth(setup: CarburizingSetup, target: float) -> CarburizingResult:
    """The soak [s] at the setup's temperature and potential that gives effective case depth ``target`` [m]."""
    lo, hi = TARGET_RANGE
    limit = min(hi, setup.geometry.half_section)
    if not (math.isfinite(target) and lo <= target <= limit):
        what = " (half the section)" if limit < hi else ""
        raise InputError("target", f"{target * 1e3:g} mm is outside {lo * 1e3:g}–{limit * 1e3:g} mm{what}")
    thr = setup.threshold_carbon
    if thr >= setup.equilibrium_carbon:
        raise NotReachableError("threshold", f"the threshold {thr:.3f} %C is not below the surface carbon this atmosphere "
                                f"gives ({setup.equilibrium_carbon:.3f} %C); raise the carbon potential or lower the threshold")
    solver = setup.solver(min(estimate_soak_time(setup, target), SOAK_RANGE[1]))
    times, depths = [], []

    def record(s: CarbonSolver) -> bool:
        times.append(s.time)
        depths.append(_threshold_depth(s, thr))
        return depths[-1] >= target

    cond = setup.surface_condition
    solver.advance(SOAK_RANGE[1], cond, record)
    if depths[-1] < target:
        raise NotReachableError("target", f"{target * 1e3:g} mm is not reached within {SOAK_RANGE[1] / 3600:g} h "
                                f"(reached {depths[-1] * 1e3:.3f} mm); raise the temperature or the carbon potential")
    step = solver.restore_last_step()
    depth_before = depths[-2] if len(depths) > 1 else 0.0

    def miss(tau: float) -> float:
        if tau == 0.0:
            return depth_before - target
        return solver.trial(tau, cond).depth_at(thr) - target

    tau = step if depths[-1] == target else brentq(miss, 0.0, step, xtol=1e-9 * step, rtol=1e-12)
    solver.commit(tau, cond)
    times[-1] = solver.time
    profile = solver.profile()
    depth = profile.depth_at(thr)
    depths[-1] = depth
    warnings = setup.warnings()
    _section_warning(setup, depth, warnings)
    return CarburizingResult(setup, solver.time, profile, depth, np.array(times), np.array(depths), warnings,
                             solver.carbon_uptake(), target_depth=target)
