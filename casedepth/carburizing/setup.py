"""A carburizing furnace step: the steel, part, temperature, atmosphere and models, validated.

:class:`CarburizingSetup` holds every input that decides the carbon profile, refuses values the
models do not cover (naming the parameter key and the allowed range) and knows the plain-language
warnings about the step. The forward and inverse soaks are in :mod:`casedepth.carburizing.soak`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import cached_property

import numpy as np

from .. import formats
from ..constants import ZERO_CELSIUS
from ..errors import InputError, NotReachableError
from ..models.austenite import Andrews_1965_Ac3
from ..models.diffusivity import Diffusivity
from ..models.hardness import DEFAULT_HARDNESS_RELATION, HARDNESS_RELATIONS, Quenched, threshold_carbon
from ..models.steels import Steel
from ..models.surface import DEFAULT_BETA, Gunnarson_alloy_factor, beta_at, equilibrium_surface_carbon, steel_saturation_carbon
from ..numerics.geometry import Geometry
from ..numerics.solver import Accuracy, CarbonSolver, SurfaceCondition
from ..numerics.special import erfcx
from ..units import Threshold, as_number, both_temperatures, finite_number, temperature_range
from .hardening import DEFAULT_HARDNESS_DEPTH, Hardening, quenched_at

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
        Mass-transfer coefficient at ``temperature``, [m/s]; ``math.inf`` for a surface held at equilibrium.
    beta_activation : float
        How β changes with the temperature of other stages (heat-up, drop, stages of one's own), an Arrhenius
        activation energy [J/mol]; 0 keeps β the same at every temperature (see :func:`beta_from_gas`).
    alloy_factor_on : bool
        Apply the Gunnarson alloy factor between the carbon potential and the steel's surface carbon.
    geometry : Geometry
        Shape and size of the part.
    hardness_relation : str
        Key of :data:`casedepth.hardness.HARDNESS_RELATIONS` used for hardness thresholds.
    hardening : Hardening
        The quench and temper (the structure relation reads hardness from them).
    hardness_depth : float
        Depth at whose cooling a hardness threshold is turned into carbon, [m]: the drawing's aim.
    accuracy : Accuracy
        Discretisation settings.
    """

    steel: Steel
    temperature: float
    carbon_potential: float
    threshold: Threshold = Threshold(0.40, "carbon")
    diffusivity: Diffusivity = field(default_factory=Diffusivity)
    beta: float = DEFAULT_BETA
    beta_activation: float = 0.0
    alloy_factor_on: bool = True
    geometry: Geometry = field(default_factory=Geometry)
    hardness_relation: str = DEFAULT_HARDNESS_RELATION
    accuracy: Accuracy = field(default_factory=Accuracy)
    hardening: Hardening = field(default_factory=Hardening)
    hardness_depth: float = DEFAULT_HARDNESS_DEPTH

    def __post_init__(self):
        ac3 = Andrews_1965_Ac3(self.steel.composition)
        T = as_number(self.temperature, "temperature")
        as_number(self.carbon_potential, "carbon_potential")
        if not (self.beta == math.inf or finite_number(self.beta)):
            raise InputError("beta", f"{str(self.beta)[:40]!r} is not a number (or inf for a surface held at equilibrium)")
        if not math.isfinite(T) or T < ac3:
            raise InputError("temperature", f"{both_temperatures(T)} is below the Ac3 of this steel ({both_temperatures(ac3)}, Andrews "
                             f"1965): it would not be fully austenitic; allowed {temperature_range(ac3, MAX_TEMPERATURE)}")
        if T > MAX_TEMPERATURE:
            raise InputError("temperature", f"{both_temperatures(T)} is above the carburizing range the models cover; "
                             f"allowed {temperature_range(ac3, MAX_TEMPERATURE)}")
        lo, hi = POTENTIAL_RANGE
        if not (math.isfinite(self.carbon_potential) and lo <= self.carbon_potential <= hi):
            raise InputError("carbon_potential", f"{formats.typed(self.carbon_potential, '%C')} is outside "
                             f"{formats.typed_range(lo, hi, '%C')}")
        if not (math.isinf(self.beta) and self.beta > 0) and not (BETA_RANGE[0] <= self.beta <= BETA_RANGE[1]):
            raise InputError("beta", f"{self.beta * 100:g} cm/s is outside {BETA_RANGE[0] * 100:g}–"
                             f"{BETA_RANGE[1] * 100:g} cm/s (or inf for a surface held at equilibrium)")
        if self.hardness_relation not in HARDNESS_RELATIONS:
            raise InputError("hardness_relation", f"unknown {self.hardness_relation!r}; choose one of "
                             f"{', '.join(HARDNESS_RELATIONS)}")
        carbon = self.threshold_carbon
        if not carbon > self.steel.carbon + 0.01:
            meaning = "is" if self.threshold.kind == "carbon" else f"means {formats.carbon(carbon)},"
            raise InputError("threshold_value", f"{self.threshold} {meaning} not above the core carbon "
                             f"{formats.typed(self.steel.carbon, '%C')}: the whole part would count as case; "
                             f"choose a threshold above {formats.typed(self.steel.carbon + 0.01, '%C')}")
        if carbon >= self.equilibrium_carbon:
            meaning = "" if self.threshold.kind == "carbon" else f" ({formats.carbon(carbon)})"
            raise NotReachableError("threshold_value", f"{self.threshold}{meaning} is not below the surface carbon the carbon "
                             f"potential {formats.typed(self.carbon_potential, '%C')} gives this steel "
                             f"({formats.carbon(self.equilibrium_carbon)}): no effective case can form; lower the "
                             f"threshold or raise the potential")

    # -- derived quantities ---------------------------------------------------------------
    @cached_property  # read several times by every solve's set-up
    def alloy_factor(self) -> float:
        """Equilibrium surface carbon of this steel over that of plain carbon steel, [-]."""
        return Gunnarson_alloy_factor(self.steel.composition) if self.alloy_factor_on else 1.0

    @cached_property
    def equilibrium_carbon(self) -> float:
        """Surface carbon the atmosphere would bring the steel to, [wt %]."""
        return equilibrium_surface_carbon(self.carbon_potential, self.alloy_factor)

    @cached_property
    def saturation_carbon(self) -> float:
        """Carbon saturation (Acm) of this steel's austenite at the temperature, [wt %]."""
        return steel_saturation_carbon(self.temperature, self.alloy_factor)

    @cached_property  # a root search for the structure relation; read by every step of a march
    def threshold_carbon(self) -> float:
        """The carbon content [wt %] that the threshold stands for (total case: the core's carbon plus the excess;
        a hardness under the structure relation: the carbon whose case reaches it with the quench at
        :attr:`hardness_depth`)."""
        if self.threshold.kind == "above core":
            return self.steel.carbon + self.threshold.value
        quenched = self.quenched_at(self.hardness_depth) if self.structure and self.threshold.is_hardness else None
        return threshold_carbon(self.threshold, self.hardness_relation, quenched, self.steel.carbon)

    @property
    def structure(self) -> bool:
        """Whether hardness comes from the quench's structure (the relation's row says)."""
        return HARDNESS_RELATIONS[self.hardness_relation].structure

    def quenched_at(self, depth: float) -> Quenched:
        """How ``depth`` [m] of this part is quenched and tempered (for the structure relation)."""
        return quenched_at(self.steel.composition, self.geometry, self.hardening, depth)

    def at_temperature(self, T: float) -> "CarburizingSetup":
        """The same step at another temperature T [K] (β follows the temperature as the setup's gas β does)."""
        return replace(self, temperature=T, beta=self.beta_at(T))

    def beta_at(self, T: float) -> float:
        """β [m/s] at the temperature T [K] of a stage (``beta`` at the setup's own temperature)."""
        return beta_at(self.beta, self.beta_activation, self.temperature, T)

    @property
    def surface_condition(self) -> SurfaceCondition:
        return SurfaceCondition(self.temperature, self.equilibrium_carbon, self.beta)

    def warnings(self) -> list[str]:
        """Plain-language cautions about the furnace step (not errors: the result is still given)."""
        return list(self._warnings)

    @cached_property  # the same for every solve of this setup
    def _warnings(self) -> tuple[str, ...]:
        out = []
        sat = self.saturation_carbon
        if self.equilibrium_carbon > sat:
            out.append(f"The atmosphere would bring the surface to {formats.carbon(self.equilibrium_carbon)}, above the "
                       f"{formats.carbon(sat)} that this steel's austenite holds at {formats.temperature(self.temperature)}: "
                       f"expect carbides at the surface and soot in the furnace. Lower the carbon potential or boost and "
                       "diffuse.")
        if self.equilibrium_carbon <= self.steel.carbon:
            out.append(f"The carbon potential ({formats.carbon(self.carbon_potential)}) is not above the core carbon "
                       f"({formats.carbon(self.steel.carbon)}): this atmosphere decarburizes.")
        if self.temperature > GRAIN_GROWTH_TEMPERATURE:
            out.append(f"{formats.temperature(self.temperature)} is above about 980 °C, where most carburizing grades "
                       f"coarsen their grain unless made fine-grained (common practice); check the steel's grain-size "
                       "control.")
        if self.threshold.is_hardness:
            rel = HARDNESS_RELATIONS[self.hardness_relation]
            if rel.structure:
                out.append(f"{self.threshold} is read as {formats.carbon(self.threshold_carbon)}: the carbon whose case "
                           f"reaches it with this steel, quench and temper at the aim depth "
                           f"({formats.length(self.hardness_depth)}).")
            else:
                out.append(f"{self.threshold} is taken as {formats.carbon(self.threshold_carbon)} ({rel.display}; "
                           f"assumes {rel.assumptions}).")
            c = self.steel.composition
            if not rel.structure and sum(float(c.get(el, 0.0)) for el in ("Cr", "Ni", "Mo")) < 0.3 and float(c.get("Mn", 0.0)) < 1.0:
                out.append("This is a plain-carbon grade: its case hardens through to the threshold only with a fast "
                           "(water or brine) quench or in thin sections; after an oil quench the hardness depth may "
                           "fall short of this carbon-based estimate (common practice). Confirm on a test section.")
        return tuple(out)

    # -- in words ------------------------------------------------------------------------------------
    def threshold_meaning(self) -> str:
        """`` (= 0.37 %C)`` for a threshold that is not a carbon content, else nothing."""
        return f" (= {formats.carbon(self.threshold_carbon)})" if self.threshold.kind != "carbon" else ""

    def models_text(self) -> str:
        """The models of the step, in one line."""
        beta = ("inf (surface held at equilibrium)" if math.isinf(self.beta) else f"{self.beta * 100:.3g} cm/s"
                + (" (gas, ×/÷1.5)" if self.beta_activation else ""))
        multiplier = "" if self.diffusivity.multiplier == 1.0 else f" × {self.diffusivity.multiplier:g}"
        return f"D: {self.diffusivity.display}{multiplier}; β = {beta}; {self.geometry.describe()}"

    def describe_lines(self, surface: float) -> list[str]:
        """The surface carbon a case ended with [wt %], the steel and the models, as the command line prints them."""
        return [f"  surface carbon        {formats.carbon(surface)} at the end (equilibrium "
                f"{formats.carbon(self.equilibrium_carbon)}, saturation {formats.carbon(self.saturation_carbon)})",
                f"  steel                 {self.steel.name} ({self.steel.standard}), core {formats.carbon(self.steel.carbon)}, "
                f"alloy factor {self.alloy_factor:.3f}" + ("" if self.alloy_factor_on else " (off)"),
                f"  models                {self.models_text()}"]

    def to_dict(self) -> dict:
        """The step in JSON (units in the key names)."""
        return {
            "threshold": str(self.threshold), "threshold_carbon_pct": self.threshold_carbon,
            "equilibrium_surface_carbon_pct": self.equilibrium_carbon, "saturation_carbon_pct": self.saturation_carbon,
            "alloy_factor": self.alloy_factor, "core_carbon_pct": self.steel.carbon,
            "temperature_c": self.temperature - ZERO_CELSIUS, "carbon_potential_pct": self.carbon_potential,
            "steel": self.steel.name, "composition_pct": dict(self.steel.composition),
            "geometry": self.geometry.describe(), "diffusivity_model": self.diffusivity.method,
            "beta_cm_per_s": None if math.isinf(self.beta) else self.beta * 100.0,
            "beta_from_gas": bool(self.beta_activation),
        }

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
        D = float(self.diffusivity(self.threshold_carbon, self.temperature))
        c0, ceq = self.steel.carbon, self.equilibrium_carbon
        wanted = (self.threshold_carbon - c0) / (ceq - c0)
        if not 0.0 < wanted < 1.0:
            return case_depth**2 / D
        h = self.beta / D
        held = math.isinf(h)

        def fraction(t):
            root = math.sqrt(D * t)
            u = case_depth / (2.0 * root)
            if held:
                return math.erfc(u)
            return math.erfc(u) - math.exp(-u * u) * erfcx(u + h * root)

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


#: surface carbon that case-hardened parts are usually specified at, wt % (common practice for gears and
#: shafts, e.g. 0.70–0.90 %C; from memory): above the upper end a quenched case holds much retained
#: austenite and may form carbides at grain boundaries
SURFACE_CARBON_PRACTICE = (0.70, 0.90)


def case_warnings(setup: CarburizingSetup, depth: float, surface: float) -> list[str]:
    """The setup's warnings and those about the case it ended with: ``depth`` [m], ``surface`` carbon [wt %]."""
    warnings = setup.warnings()
    if setup.geometry.finite and depth >= setup.geometry.half_section * (1 - 1e-9):
        warnings.append("The threshold carbon reaches the centre of the section: the part is carburized through.")
    low, high = SURFACE_CARBON_PRACTICE
    if surface > high and setup.equilibrium_carbon <= setup.saturation_carbon:
        warnings.append(f"The surface ends at {formats.carbon(surface)}, above the {formats.carbon_range(low, high)} "
                        f"usually specified for case-hardened parts (common practice): a quenched case this rich holds "
                        f"retained austenite and may form carbides; a diffuse stage at a lower potential brings it down.")
    return warnings
