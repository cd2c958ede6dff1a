"""A gas-nitriding step: the atmosphere's nitriding potential, nitrogen in ferrite, nitride formers,
and :class:`NitridingSetup`, which validates every input (naming the parameter key and the allowed
range) and knows the warnings about the step.

* nitriding potential K_N = p(NH3)/p(H2)^1.5 and its conversion from ammonia dissociation — exact
  definitions (Lehrer 1930; Mittemeijer & Somers 2015);
* nitrogen diffusion in ferrite, Bohnenkamp (1967) or da Silva & McLellan (1976), one row each of
  :data:`casedepth.models.iron_nitrogen.NITROGEN_DIFFUSIVITIES`;
* the nitride formers of the steel (:mod:`casedepth.models.nitrides`) and the grade's constants for
  them; the diffusion zone they make is the setup's zone model (:mod:`casedepth.nitriding.zone`).

Everything is SI inside; nitrogen and alloy contents in wt %.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

from .. import formats
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from ..models import nitrides
from ..models.iron_nitrogen import (DEFAULT_NITROGEN_DIFFUSIVITY, NITROGEN_DIFFUSIVITIES, Lehrer_boundaries,
                                    nitrogen_saturation_ferrite, surface_phase)
from ..models.steels import Steel, nitriding_constants
from ..numerics.roots import illinois
from ..units import as_number, temperature_range
from .layer import DEFAULT_LAYER_MODEL, LAYER_MODELS
from .zone import DEFAULT_ZONE_MODEL, ZONE_MODELS, Precipitate, Zone, wagner_front_factor

TEMPERATURE_RANGE = (480.0 + ZERO_CELSIUS, 590.0 + ZERO_CELSIUS)  # K; gas nitriding of steels
KN_RANGE = (0.05, 30.0)  # atm^-1/2
# below this nitride-forming capacity [wt % N] a steel is treated as having none (erfc diffusion zone)
MIN_CAPACITY = 0.005


def nitriding_potential(p_NH3: float, p_H2: float) -> float:
    r"""Nitriding potential of an NH3–H2 atmosphere.

    .. math:: K_N = \frac{p_{NH_3}}{p_{H_2}^{3/2}}

    Parameters
    ----------
    p_NH3, p_H2 : float
        Partial pressures (or volume fractions at 1 atm total), [atm]

    Returns
    -------
    K_N : float
        Nitriding potential, [atm^-1/2]

    Examples
    --------
    >>> round(nitriding_potential(0.5, 0.375), 3)
    2.177

    References
    ----------
    .. [1] Lehrer, E. "Über das Eisen-Wasserstoff-Ammoniak-Gleichgewicht." Z. Elektrochem. 36 (1930) 383–392.
    .. [2] Mittemeijer, E. J., and M. A. J. Somers (eds.). Thermochemical Surface Engineering of Steels.
       Woodhead, 2015, ch. 3.
    """
    if not (p_NH3 > 0 and p_H2 > 0):
        raise InputError("exhaust", "NH3 and H2 fractions must both be above zero")
    return p_NH3 / p_H2**1.5


def nitriding_potential_from_dissociation(dissociation: float) -> float:
    """K_N [atm^-1/2] of the exhaust of a pure-ammonia feed with the given dissociation [-].

    ``dissociation`` is the volume fraction of the exhaust that is N2 + H2 (the burette reading);
    the rest is NH3, and the products are 1 part N2 to 3 parts H2 (NH3 → ½ N2 + 3/2 H2), 1 atm.

    Examples
    --------
    >>> round(nitriding_potential_from_dissociation(0.30), 2)
    6.56
    """
    if not (0.0 < dissociation < 1.0):
        raise InputError("dissociation", f"{dissociation * 100:g} % is outside 0–100 %")
    return nitriding_potential(1.0 - dissociation, 0.75 * dissociation)


def dissociation_for_potential(K_N: float) -> float:
    """The dissociation [-] of a pure-ammonia feed that gives nitriding potential ``K_N`` [atm^-1/2]."""
    _check_kn(K_N)
    def miss(d: float) -> float:  # falls as the dissociation rises
        return math.log(nitriding_potential_from_dissociation(d) / K_N)

    low, high = 1e-6, 1 - 1e-9
    return illinois(miss, low, miss(low), high, miss(high), 1e-14, 1e-13)


def nitride_capacity(composition: dict[str, float]) -> float:
    """Nitrogen [wt %] the nitride formers of a steel take up: CrN, AlN, VN, TiN, Mo2N (all of each;
    :func:`casedepth.models.nitrides.capacities` per former)."""
    return sum(nitrides.capacities(composition).values())


Wagner_front_factor = wagner_front_factor  # the name earlier releases exported


def _check_kn(K_N: float) -> None:
    K_N = as_number(K_N, "kn")
    if not (math.isfinite(K_N) and KN_RANGE[0] <= K_N <= KN_RANGE[1]):
        raise InputError("kn", f"K_N = {formats.typed(K_N, formats.KN_UNIT)} is outside "
                         f"{formats.typed_range(*KN_RANGE, formats.KN_UNIT)}")


@dataclass(frozen=True)
class NitridingSetup:
    """A gas-nitriding step: steel, temperature [K], nitriding potential [atm^-1/2], core and nitrided
    hardness [HV], the calibrations on D_N and on the hardness the nitrides add, and the models: compound layer, diffusion zone, D_N; the
    hardness limit of the nitrided depth [HV] (None: core + 50 HV, DIN 50190-3 / ISO 18203)."""

    steel: Steel
    temperature: float
    nitriding_potential: float
    core_hardness: float | None = None
    surface_hardness: float | None = None
    diffusivity_multiplier: float = 1.0
    layer_model: str = DEFAULT_LAYER_MODEL
    zone_model: str = DEFAULT_ZONE_MODEL
    nitrogen_diffusivity: str = DEFAULT_NITROGEN_DIFFUSIVITY
    hardness_limit_hv: float | None = None
    #: calibration factor on the hardness the nitrides add over the core (the zone's strength; 1 = the grade's
    #: constant, or the set surface hardness)
    strength_multiplier: float = 1.0
    #: the factor within which a furnace fit the plan took knows D_N (the half-width of its 95 % interval), or None
    #: for a plan not calibrated on the shop's sections
    calibrated_within: float | None = None

    min_capacity = MIN_CAPACITY

    def __post_init__(self):
        T = as_number(self.temperature, "temperature")
        lo, hi = TEMPERATURE_RANGE
        if not (math.isfinite(T) and lo <= T <= hi):
            raise InputError("temperature", f"{formats.typed(T - ZERO_CELSIUS, '°C')} is outside the gas-nitriding "
                             f"range, {temperature_range(lo, hi)}: below the tempering temperature, below the "
                             f"eutectoid of Fe–N at 590 °C")
        _check_kn(self.nitriding_potential)
        if self.zone_model not in ZONE_MODELS:
            raise InputError("zone_model", f"unknown model {self.zone_model!r}; choose one of {', '.join(ZONE_MODELS)}")
        sharp = ZONE_MODELS[self.zone_model].key == "sharp-front-2026"
        for name, value in (("core_hardness", self.core), ("surface_hardness", self.typical_surface if sharp else
                                                           self.surface_hardness)):
            if value is None:
                continue
            value = as_number(value, name)
            if not (math.isfinite(value) and 100.0 <= value <= 1400.0):
                raise InputError(name, f"{formats.typed(value, 'HV')} is outside 100–1400 HV")
        limit = self.hardness_limit
        if self.hardness_limit_hv is not None:
            value = as_number(self.hardness_limit_hv, "nitrided_limit")
            if not (math.isfinite(value) and 100.0 <= value <= 1400.0):
                raise InputError("nitrided_limit", f"{formats.typed(value, 'HV')} is outside 100–1400 HV")
            if value <= self.core:
                raise InputError("nitrided_limit", f"{formats.typed(value, 'HV')} must exceed the core hardness "
                                 f"({formats.typed(self.core, 'HV')})")
        surface = self.typical_surface if sharp else self.surface_hardness
        if surface is not None and surface <= limit:
            raise InputError("surface_hardness", f"{formats.typed(surface, 'HV')} must exceed the hardness limit "
                             f"({formats.typed(limit, 'HV')}) for a nitrided hardness depth to exist")
        if not (math.isfinite(as_number(self.diffusivity_multiplier, "n_multiplier")) and 0.1 <= self.diffusivity_multiplier <= 10.0):
            raise InputError("n_multiplier", f"{self.diffusivity_multiplier:g} is outside 0.1–10")
        if not (math.isfinite(as_number(self.strength_multiplier, "strength_multiplier"))
                and 0.1 <= self.strength_multiplier <= 10.0):
            raise InputError("strength_multiplier", f"{self.strength_multiplier:g} is outside 0.1–10")
        if self.layer_model not in LAYER_MODELS:
            raise InputError("layer_model", f"unknown model {self.layer_model!r}; choose one of {', '.join(LAYER_MODELS)}")
        if self.nitrogen_diffusivity not in NITROGEN_DIFFUSIVITIES:
            raise InputError("n_diffusivity", f"unknown model {self.nitrogen_diffusivity!r}; choose one of "
                             f"{', '.join(NITROGEN_DIFFUSIVITIES)}")

    @property
    def core(self) -> float:
        return float(self.core_hardness if self.core_hardness is not None else (self.steel.core_hardness_hv or 300.0))

    @property
    def hardness_limit(self) -> float:
        """The hardness [HV] the nitrided depth is read at: as set, or core + 50 HV (DIN 50190-3 / ISO 18203)."""
        return float(self.hardness_limit_hv) if self.hardness_limit_hv is not None else self.core + 50.0

    @property
    def limit_text(self) -> str:
        """The hardness limit in words: ``core 300 HV + 50 HV`` or ``400 HV``."""
        if self.hardness_limit_hv is None:
            return f"core {formats.hv(self.core)} + 50 HV"
        return formats.hv(self.hardness_limit)

    @property
    def typical_surface(self) -> float:
        """The nitrided surface hardness [HV] as set, or the grade's typical value (or an estimate from the formers)."""
        if self.surface_hardness is not None:
            return float(self.surface_hardness)
        if self.steel.nitrided_surface_hv:
            return float(self.steel.nitrided_surface_hv)
        # no table value: the core plus what the nitride formers and dissolved nitrogen add (from memory)
        return self.core + 250.0 * nitride_capacity(self.steel.composition) / 0.27 + 70.0

    @property
    def surface(self) -> float:
        """Hardness at the top of the diffusion zone [HV], as the zone model gives it."""
        return self.zone.surface_hardness

    @property
    def phase(self) -> str:
        return surface_phase(self.temperature, self.nitriding_potential)

    @property
    def diffusivity(self) -> float:
        return self.diffusivity_multiplier * NITROGEN_DIFFUSIVITIES[self.nitrogen_diffusivity].function(self.temperature)

    @property
    def substrate_nitrogen(self) -> float:
        """Dissolved nitrogen at the top of the ferrite [wt %]: saturation under a compound layer,
        proportional to K_N below the α/γ′ boundary (Sieverts-type law)."""
        saturation = nitrogen_saturation_ferrite(self.temperature)
        alpha_gamma, _ = Lehrer_boundaries(self.temperature)
        return saturation * min(1.0, self.nitriding_potential / alpha_gamma)

    @property
    def capacity(self) -> float:
        return nitride_capacity(self.steel.composition)

    @cached_property
    def constants(self) -> nitrides.NitridingConstants:
        """The grade's excess-nitrogen ratio and strength constant (its own, or the nearest grade's)."""
        return nitriding_constants(self.steel)

    @property
    def precipitates(self) -> list[Precipitate]:
        """The steel's nitride formers at this temperature, with the grade's excess nitrogen."""
        excess = self.constants.excess
        return [Precipitate(el, capacity, nitrides.solubility_product(el, self.temperature), excess)
                for el, capacity in nitrides.capacities(self.steel.composition).items()]

    @cached_property  # one solve per setup, read by every result
    def zone(self) -> Zone:
        """The diffusion zone (a row of :data:`casedepth.nitriding.zone.ZONE_MODELS`, solved for this step)."""
        return ZONE_MODELS[self.zone_model].build(self)

    @property
    def front_factor(self) -> float | None:
        """γ of the sharp internal-nitriding front (Wagner 1959), or None for a steel without nitride formers."""
        if self.capacity < MIN_CAPACITY:
            return None
        return wagner_front_factor(self.substrate_nitrogen, self.capacity)

    @property
    def layer(self):
        """The compound-layer model (a row of :data:`casedepth.nitriding.layer.LAYER_MODELS`)."""
        return LAYER_MODELS[self.layer_model]

    @property
    def uptake(self) -> float:
        """A of the nitrogen flux A/√t the diffusion zone draws from under the compound layer [wt % m/√s]."""
        return self.zone.uptake

    def models_text(self) -> str:
        """The models of the step, in one line."""
        multiplier = "" if self.diffusivity_multiplier == 1.0 else f" × {self.diffusivity_multiplier:g}"
        strength = "" if self.strength_multiplier == 1.0 else f", nitrides' hardness × {self.strength_multiplier:g}"
        diffusivity = NITROGEN_DIFFUSIVITIES[self.nitrogen_diffusivity].short
        zone = ZONE_MODELS[self.zone_model]
        if zone.key == "sharp-front-2026":
            return (f"{self.layer.display}; nitrogen in ferrite after {diffusivity}{multiplier}; internal-nitriding "
                    f"front after Wagner (1959){strength}")
        return f"{self.layer.display}; nitrogen in ferrite after {diffusivity}{multiplier}; {zone.display.lower()}{strength}"

    @property
    def uncertainty(self) -> str:
        """How sure the nitrided depth is, in words (printed with every depth the zone model gives): the zone
        model's own, or for a plan calibrated by a furnace fit what the fit's D_N interval gives (depth ∝ √D_N and
        time ∝ 1/D_N at one depth, Crank 1975 §3.3)."""
        if self.calibrated_within is None:
            return ZONE_MODELS[self.zone_model].uncertainty
        return f"depth {self.short_uncertainty}, time ±{self._within(1.0)} from the furnace fit's D_N (95 %); hardness ±60 HV"

    @property
    def short_uncertainty(self) -> str:
        """The depth's uncertainty in a few words, for plot titles: ``±25 % until calibrated``."""
        if self.calibrated_within is None:
            return f"{ZONE_MODELS[self.zone_model].short_uncertainty} until calibrated"
        return f"±{self._within(0.5)}"

    def _within(self, power: float) -> str:
        return f"{formats.trimmed(100.0 * (self.calibrated_within ** power - 1.0), 1)} %"

    def warnings(self) -> list[str]:
        out = []
        if self.capacity < 0.05:
            out.append("This steel has almost no nitride formers (Cr, Al, V, Ti, Mo): the diffusion zone hardens "
                       "little, and a nitrided hardness depth may be shallow or absent.")
        if self.phase == "alpha":
            out.append("K_N is below the α/γ′ boundary: no compound layer forms (the boundary values are uncertain "
                       "by perhaps ±30 %).")
        sharp = ZONE_MODELS[self.zone_model].key == "sharp-front-2026"
        if sharp and self.diffusivity_multiplier == 1.0 and self.capacity >= MIN_CAPACITY:
            out.append("Uncalibrated: the sharp-front model with the published nitrogen diffusivity often reaches a "
                       "depth sooner than measured on alloy steels; set the D_N multiplier from the shop's own "
                       "sections before quoting times.")
        if not sharp and self.capacity >= MIN_CAPACITY and self.steel.nitriding is None:
            out.append(f"No nitriding constants for {self.steel.name}: the excess nitrogen and hardness use "
                       f"{self.constants.source}; calibrate on the shop's own sections before quoting times.")
        return out
