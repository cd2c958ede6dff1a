"""Gas nitriding: nitriding potential, surface phase, compound layer and diffusion zone.

Models and how sure we are of them:

* nitriding potential K_N = p(NH3)/p(H2)^1.5 and its conversion from ammonia dissociation — exact
  definitions (Lehrer 1930; Mittemeijer & Somers 2015);
* which phase the surface forms (α, γ′, ε), from the Lehrer diagram, and the phase-boundary
  nitrogen contents of the Fe–N diagram: :mod:`casedepth.iron_nitrogen` (from memory, ±30 % in K_N);
* nitrogen diffusion in ferrite, Bohnenkamp (1967);
* the diffusion zone by the internal-nitriding model of Wagner (1959) as applied to nitriding by
  Meijering (1971): nitride formers (Cr, Al, V, Ti, Mo) do not move and take up all nitrogen that
  reaches them, so a sharp front advances as ξ = 2γ√(D t) with √π γ exp(γ²) erf(γ) = c_s / c_M;
* compound-layer (ε over γ′) growth by the layer-growth model of Somers & Mittemeijer (1995), fed by
  the gas and drained by the diffusion zone beneath: :mod:`casedepth.compound_layer` (published
  model; the nitrogen diffusivities in the nitrides are an order of magnitude from memory).

Everything is SI inside; nitrogen and alloy contents in wt %.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .compound_layer import CompoundLayer, grow_compound_layer, parabolic_constants, substrate_uptake_coefficient
from .compound_layer import compound_layer as _compound_layer
from .errors import InputError, NotReachableError
from .roots import illinois
from .iron_nitrogen import PHASE_NAMES, Lehrer_boundaries, nitrogen_saturation_ferrite, surface_phase
from .steels import Steel
from .units import ZERO_CELSIUS, both_lengths, length_range

# the Fe–N phase helpers are part of this module's public face too
__all__ = ["PHASE_NAMES", "Bohnenkamp_1967_nitrogen_diffusivity", "CompoundLayer", "Lehrer_boundaries",
           "NitridingResult", "NitridingSetup", "TwoStageSchedule", "Wagner_front_factor",
           "dissociation_for_potential", "nitride", "nitride_capacity", "nitriding_potential",
           "nitriding_potential_from_dissociation", "nitriding_time", "nitrogen_saturation_ferrite",
           "potential_for_compound_layer", "compound_layer_advice", "LayerAdvice", "staged_layer_at", "surface_phase", "two_stage_for_depth",
           "two_stage_schedule"]

R = 8.314462618  # J/(mol K)
M_N = 14.007
# nitride-forming elements: molar mass [g/mol] and nitrogen atoms per metal atom in the nitride formed
NITRIDE_FORMERS = {"Cr": (51.996, 1.0), "Al": (26.982, 1.0), "V": (50.942, 1.0), "Ti": (47.867, 1.0), "Mo": (95.95, 0.5)}
TEMPERATURE_RANGE = (480.0 + ZERO_CELSIUS, 590.0 + ZERO_CELSIUS)  # K; gas nitriding of steels
KN_RANGE = (0.05, 30.0)  # atm^-1/2
# nitrogen in solid solution raises ferrite hardness by about this much per wt % N (with the fine γ′
# that forms on cooling); from memory, order of magnitude only
SOLUTION_HARDENING_HV_PER_PCT = 1000.0
# below this nitride-forming capacity [wt % N] a steel is treated as having none (erfc diffusion zone)
_MIN_CAPACITY = 0.005


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
        raise InputError("nitriding atmosphere", "NH3 and H2 fractions must both be above zero")
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
    from scipy.optimize import brentq  # imported on first use: it is slow to import

    return brentq(lambda d: nitriding_potential_from_dissociation(d) - K_N, 1e-6, 1 - 1e-9, xtol=1e-12)


def Bohnenkamp_1967_nitrogen_diffusivity(T: float) -> float:
    r"""Diffusivity of nitrogen in ferrite, D = 1.5e-6 exp(−79.9 kJ/mol / RT) m²/s.

    Examples
    --------
    >>> round(Bohnenkamp_1967_nitrogen_diffusivity(793.15) * 1e12, 2)
    8.21

    References
    ----------
    .. [1] Bohnenkamp, K. Arch. Eisenhüttenwes. 38 (1967) 229 (D0 = 1.5e-2 cm²/s, Q = 79.9 kJ/mol).
    """
    return 1.5e-6 * math.exp(-79900.0 / (R * T))


def nitride_capacity(composition: dict[str, float]) -> float:
    """Nitrogen [wt %] the nitride formers of a steel take up: CrN, AlN, VN, TiN, Mo2N (all of each)."""
    return sum(float(composition.get(el, 0.0)) / molar * atoms * M_N for el, (molar, atoms) in NITRIDE_FORMERS.items())


def Wagner_front_factor(surface_nitrogen: float, capacity: float) -> float:
    r"""γ of the internal-nitriding front ξ = 2γ√(Dt): root of √π γ e^{γ²} erf(γ) = c_s / c_M.

    For a small ratio γ² ≈ c_s / (2 c_M), the familiar ξ² = 2 D c_s t / c_M.

    References
    ----------
    .. [1] Wagner, C. "Reaktionstypen bei der Oxydation von Legierungen." Z. Elektrochem. 63 (1959) 772–790.
    .. [2] Meijering, J. L. "Internal oxidation in alloys." In Advances in Materials Research 5 (1971) 1–81.
    """
    from scipy.optimize import brentq  # imported on first use: it is slow to import

    ratio = surface_nitrogen / capacity

    def f(g):
        return math.sqrt(math.pi) * g * math.exp(g * g) * math.erf(g) - ratio

    return brentq(f, 1e-9, 10.0, xtol=1e-14)


def _check_kn(K_N: float) -> None:
    if not (math.isfinite(K_N) and KN_RANGE[0] <= K_N <= KN_RANGE[1]):
        raise InputError("nitriding potential", f"K_N = {K_N:g} atm^-1/2 is outside {KN_RANGE[0]:g}–{KN_RANGE[1]:g}")


@dataclass(frozen=True)
class NitridingSetup:
    """A gas-nitriding step: steel, temperature [K], nitriding potential [atm^-1/2], core and nitrided hardness [HV]."""

    steel: Steel
    temperature: float
    nitriding_potential: float
    core_hardness: float | None = None
    surface_hardness: float | None = None
    diffusivity_multiplier: float = 1.0

    def __post_init__(self):
        T = self.temperature
        lo, hi = TEMPERATURE_RANGE
        if not (math.isfinite(T) and lo <= T <= hi):
            raise InputError("temperature", f"{T - ZERO_CELSIUS:.0f} °C is outside the gas-nitriding range "
                             f"{lo - ZERO_CELSIUS:.0f}–{hi - ZERO_CELSIUS:.0f} °C (below the tempering temperature, "
                             f"below the eutectoid of Fe–N at 590 °C)")
        _check_kn(self.nitriding_potential)
        for name, value in (("core hardness", self.core), ("nitrided surface hardness", self.surface)):
            if not (math.isfinite(value) and 100.0 <= value <= 1400.0):
                raise InputError(name, f"{value:g} HV is outside 100–1400 HV")
        if self.surface <= self.core + 50.0:
            raise InputError("nitrided surface hardness", f"{self.surface:g} HV must exceed the core ({self.core:g} HV) "
                             f"by more than 50 HV for a nitrided hardness depth to exist")
        if not (0.1 <= self.diffusivity_multiplier <= 10.0):
            raise InputError("diffusivity multiplier", f"{self.diffusivity_multiplier:g} is outside 0.1–10")

    @property
    def core(self) -> float:
        return float(self.core_hardness if self.core_hardness is not None else (self.steel.core_hardness_hv or 300.0))

    @property
    def surface(self) -> float:
        if self.surface_hardness is not None:
            return float(self.surface_hardness)
        if self.steel.nitrided_surface_hv:
            return float(self.steel.nitrided_surface_hv)
        # no table value: the core plus what the nitride formers and dissolved nitrogen add (from memory)
        return self.core + 250.0 * nitride_capacity(self.steel.composition) / 0.27 + 70.0

    @property
    def phase(self) -> str:
        return surface_phase(self.temperature, self.nitriding_potential)

    @property
    def diffusivity(self) -> float:
        return self.diffusivity_multiplier * Bohnenkamp_1967_nitrogen_diffusivity(self.temperature)

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

    @cached_property  # a root solve, needed several times per result
    def front_factor(self) -> float | None:
        """γ of the internal-nitriding front (Wagner 1959), or None for a steel without nitride formers."""
        if self.capacity < _MIN_CAPACITY:
            return None
        return Wagner_front_factor(self.substrate_nitrogen, self.capacity)

    @cached_property
    def uptake(self) -> float:
        """A of the nitrogen flux A/√t the diffusion zone draws from under the compound layer [wt % m/√s]."""
        gamma = self.front_factor
        return substrate_uptake_coefficient(self.substrate_nitrogen, self.diffusivity,
                                            1.0 if gamma is None else math.erf(gamma))

    def warnings(self) -> list[str]:
        out = []
        if self.capacity < 0.05:
            out.append("This steel has almost no nitride formers (Cr, Al, V, Ti, Mo): the diffusion zone hardens "
                       "little, and a depth at core + 50 HV may be shallow or absent.")
        if self.phase == "alpha":
            out.append("K_N is below the α/γ′ boundary: no compound layer forms (the boundary values are uncertain "
                       "by perhaps ±30 %).")
        if self.diffusivity_multiplier == 1.0 and self.capacity >= _MIN_CAPACITY:
            out.append("Uncalibrated: the sharp-front model with the published nitrogen diffusivity often reaches a "
                       "depth sooner than measured on alloy steels; set the D_N multiplier from the shop's own "
                       "sections before quoting times.")
        return out


@dataclass
class NitridingResult:
    """A nitriding soak: time [s], compound layer [m], nitrided hardness depth [m], profiles."""

    setup: NitridingSetup
    time: float
    layer: CompoundLayer
    front: float  # internal-nitriding front below the surface [m]
    nitrided_depth: float  # depth at core + 50 HV [m]
    depth: np.ndarray  # m, from the surface
    nitrogen: np.ndarray  # wt %, dissolved + in nitrides (compound layer not included)
    hardness: np.ndarray  # HV
    warnings: list[str] = field(default_factory=list)

    @property
    def compound_layer(self) -> float:
        """Compound-layer thickness, ε + γ′ [m]."""
        return self.layer.thickness

    def to_dict(self) -> dict:
        s = self.setup
        return {
            "soak_time_h": self.time / 3600.0, "compound_layer_um": self.compound_layer * 1e6,
            "epsilon_layer_um": self.layer.epsilon * 1e6, "gamma_prime_layer_um": self.layer.gamma_prime * 1e6,
            "nitrided_depth_mm": self.nitrided_depth * 1e3, "surface_phase": self.layer.surface_phase,
            "nitriding_potential": s.nitriding_potential, "temperature_c": s.temperature - ZERO_CELSIUS,
            "dissociation_pct": 100.0 * dissociation_for_potential(s.nitriding_potential),
            "core_hardness_hv": s.core, "surface_hardness_hv": s.surface, "steel": s.steel.name,
            "warnings": list(self.warnings),
            "profile": {"depth_mm": (self.depth * 1e3).tolist(), "nitrogen_pct": self.nitrogen.tolist(),
                        "hardness_hv": self.hardness.tolist()},
        }


def nitride(setup: NitridingSetup, time: float, layer: CompoundLayer | None = None) -> NitridingResult:
    """What a nitriding soak of ``time`` [s] gives: compound layer, nitrogen and hardness profiles, nitrided depth.

    The compound layer grows by the model of :mod:`casedepth.compound_layer` unless ``layer`` is
    given (a staged schedule). The diffusion zone starts under the compound layer. With nitride
    formers, the sharp-front model (Wagner 1959; Meijering 1971) gives hardness ``surface`` behind the
    front and ``core`` beyond it, so the depth at core + 50 HV is the front; without them, dissolved
    nitrogen follows the erfc solution (Crank 1975) and hardness rises with it by a solid-solution term.
    """
    if not (math.isfinite(time) and 60.0 * (1 - 1e-9) <= time <= 500 * 3600.0 * (1 + 1e-9)):
        raise InputError("time", f"{time / 3600:g} h is outside 1 min–500 h")
    T, D = setup.temperature, setup.diffusivity
    if layer is None:
        layer = _compound_layer(T, setup.nitriding_potential, time, setup.uptake)
    s = layer.thickness
    c_s, c_m = setup.substrate_nitrogen, setup.capacity
    length = 2.0 * math.sqrt(D * time)
    x = np.linspace(0.0, 1.0, 401) ** 1.5 * max(4.0 * length, 1e-4)
    core, surface = setup.core, setup.surface
    gamma = setup.front_factor
    if gamma is not None:
        from scipy.special import erf  # imported on first use: it is slow to import

        front = gamma * length
        dissolved = np.where(x < front, c_s * (1.0 - erf(x / length) / erf(gamma)), 0.0)
        nitrogen = dissolved + np.where(x < front, c_m, 0.0)
        hardness = np.where(x < front, surface, core)
    else:
        front = 0.0
        dissolved = c_s * np.array([math.erfc(v) for v in x / length])
        nitrogen = dissolved
        hardness = core + SOLUTION_HARDENING_HV_PER_PCT * dissolved
    depth = _front_rate(setup) * math.sqrt(time)  # core + 50 HV: the front, or where solution hardening adds 50 HV
    warnings = setup.warnings()
    return NitridingResult(setup, time, layer, s + front, s + depth, s + x, nitrogen, hardness, warnings)


def _erfcinv(y: float) -> float:
    from scipy.optimize import brentq  # imported on first use: it is slow to import

    return brentq(lambda v: math.erfc(v) - y, 0.0, 10.0, xtol=1e-14)


def _front_rate(setup: NitridingSetup) -> float:
    """Nitrided depth below the compound layer per √time [m/√s], as :func:`nitride` draws it: 2γ√D for the
    Wagner front, 2 erfc⁻¹(50 HV / rise)√D without nitride formers (0 if dissolved nitrogen cannot add 50 HV)."""
    gamma = setup.front_factor
    if gamma is not None:
        return 2.0 * gamma * math.sqrt(setup.diffusivity)
    rise = SOLUTION_HARDENING_HV_PER_PCT * setup.substrate_nitrogen
    return 2.0 * _erfcinv(50.0 / rise) * math.sqrt(setup.diffusivity) if rise > 50.0 else 0.0


def nitriding_time(setup: NitridingSetup, target_depth: float) -> NitridingResult:
    """The soak [s] for a nitrided hardness depth (core + 50 HV) of ``target_depth`` [m], and what it gives.

    At one temperature and K_N the compound layer and the front below it both advance as √t, so the
    soak is (target / (k_layer + k_front))², with no search.
    """
    if not (math.isfinite(target_depth) and 0.02e-3 <= target_depth <= 2e-3):
        raise InputError("target", f"{both_lengths(target_depth)} is outside {length_range(0.02e-3, 2e-3)}")
    rate = parabolic_constants(float(setup.temperature), float(setup.nitriding_potential), float(setup.uptake))[1]
    rate += _front_rate(setup)
    time = (target_depth / rate) ** 2 if rate > 0.0 else math.inf
    if time > 500 * 3600.0 * (1 + 1e-9):
        raise NotReachableError("target", f"{both_lengths(target_depth)} is not reached within 500 h at "
                                f"{setup.temperature - ZERO_CELSIUS:.0f} °C")
    return nitride(setup, max(time, 60.0))


def potential_for_compound_layer(setup: NitridingSetup, time: float, window: tuple[float, float]) -> float:
    """The K_N [atm^-1/2] that gives a compound layer in the middle of ``window`` [m] after ``time`` [s].

    Searches K_N between the α/γ′ boundary and the top of the model's range (the layer thickens
    monotonically with K_N); refuses windows that need a K_N outside that range.
    """
    low, high = window
    if not (0.0 <= low <= high <= 100e-6):
        raise InputError("compound layer", f"{low * 1e6:g}–{high * 1e6:g} µm is not a window within 0–100 µm")
    T = setup.temperature
    alpha_gamma, _ = Lehrer_boundaries(T)
    aim = 0.5 * (low + high)
    if aim == 0.0:
        return max(KN_RANGE[0], 0.8 * alpha_gamma)
    uptake = setup.uptake

    def miss(log_kn):
        return _compound_layer(T, math.exp(log_kn), time, uptake).thickness - aim

    lo, hi = math.log(max(alpha_gamma, KN_RANGE[0])), math.log(KN_RANGE[1])
    if miss(hi) < 0 or miss(lo) > 0:
        raise NotReachableError("compound layer", f"a {aim * 1e6:.1f} µm layer in {time / 3600:.1f} h needs a K_N "
                                f"outside {KN_RANGE[0]:g}–{KN_RANGE[1]:g}; change the time or the temperature")
    from scipy.optimize import brentq  # imported on first use: it is slow to import

    return math.exp(brentq(miss, lo, hi, xtol=1e-12))


@dataclass
class TwoStageSchedule:
    """A first stage at the set K_N that builds the compound layer, then a low-K_N stage that holds
    or thins it. Times in s, K_N in atm^-1/2, layer in m."""

    first_time: float
    first_kn: float
    second_time: float
    second_kn: float
    layer: CompoundLayer

    @property
    def compound_layer(self) -> float:
        return self.layer.thickness


def two_stage_schedule(setup: NitridingSetup, total_time: float, window: tuple[float, float],
                       second_kn: float | None = None, guess: float | None = None) -> TwoStageSchedule:
    """Split ``total_time`` [s] into a stage at the setup's K_N and one at ``second_kn`` so that the
    compound layer ends in the middle of ``window`` [m].

    The second K_N defaults to just above the α/γ′ boundary (1.05 ×): there the layer gets almost no
    nitrogen from the gas while the diffusion zone keeps drawing on it, so it holds or thins, and the
    ferrite under it stays saturated, so the diffusion zone — and the nitrided depth — grow as in one
    stage. The layer follows :func:`casedepth.compound_layer.grow_compound_layer`; the first stage's
    length is found to 1e-4 of the layer (Illinois regula falsi), starting near ``guess`` [s] if given.
    """
    low, high = window
    T = setup.temperature
    alpha_gamma, _ = Lehrer_boundaries(T)
    k1 = setup.nitriding_potential
    k2 = 1.05 * alpha_gamma if second_kn is None else second_kn
    if not (alpha_gamma <= k2 < k1):
        raise InputError("second stage K_N", f"{k2:.3g} must lie between the α/γ′ boundary ({alpha_gamma:.3g}) and "
                         f"the first stage's K_N ({k1:.3g})")
    aim = 0.5 * (low + high)
    uptake = setup.uptake

    def layer_after(first):
        first = min(max(first, 60.0), total_time)
        stages = [(first, k1)] + ([(total_time - first, k2)] if total_time - first > 1.0 else [])
        return grow_compound_layer(T, stages, uptake)

    def miss(t: float) -> float:
        return layer_after(t).thickness - aim

    lo, hi = 60.0, total_time
    if guess is not None and lo < guess < hi:  # a bracket around the guess saves most of the trials
        below, above = max(lo, 0.9 * guess), min(hi, 1.1 * guess)
        f_below, f_above = miss(below), miss(above)
        if f_below <= 0.0 <= f_above:
            return _two_stage(setup, k1, k2, total_time, layer_after, illinois(
                miss, below, f_below, above, f_above, 1.0, 1e-4 * aim))
    f_lo, f_hi = miss(lo), miss(hi)
    if not (f_lo <= 0.0 <= f_hi):
        raise NotReachableError("compound layer", f"a {aim * 1e6:.1f} µm layer cannot be reached in "
                                f"{total_time / 3600:.1f} h with K_N {k1:.3g} then {k2:.3g}")
    return _two_stage(setup, k1, k2, total_time, layer_after, illinois(miss, lo, f_lo, hi, f_hi, 1.0, 1e-4 * aim))


@dataclass
class LayerAdvice:
    """What to change when the compound layer misses its window: the one K_N that centres it
    [atm^-1/2], a two-stage schedule that does (or None), and the sentence saying so (None if the
    layer is inside the window)."""

    kn_for_window: float
    two_stage: TwoStageSchedule | None
    message: str | None


def compound_layer_advice(setup: NitridingSetup, result: NitridingResult, window: tuple[float, float],
                          second_kn: float | None = None, with_schedule: bool = True) -> LayerAdvice:
    """Advice on the compound layer of ``result`` against ``window`` [m] (a two-stage schedule only if
    ``with_schedule``: it costs a search); raises :class:`InputError` (field ``compound layer``) if no
    K_N in range centres the layer in that time."""
    kn = potential_for_compound_layer(setup, result.time, window)
    layer = result.compound_layer
    if window[0] <= layer <= window[1]:
        return LayerAdvice(kn, None, None)
    try:
        two = two_stage_schedule(setup, result.time, window, second_kn) if with_schedule else None
    except InputError:
        two = None
    message = (f"The compound layer ({layer * 1e6:.1f} µm) is outside {window[0] * 1e6:g}–{window[1] * 1e6:g} µm at "
               f"K_N {setup.nitriding_potential:.2f}; K_N {kn:.2f} would put it in the middle")
    if two is not None:
        message += (f"; or nitride {two.first_time / 3600:.1f} h at K_N {two.first_kn:.2f}, then "
                    f"{two.second_time / 3600:.1f} h at K_N {two.second_kn:.2f} (layer {two.layer.describe()})")
    return LayerAdvice(kn, two, message + ".")


def _two_stage(setup, k1, k2, total_time, layer_after, first) -> TwoStageSchedule:
    first = min(max(first, 60.0), total_time)
    return TwoStageSchedule(first, k1, total_time - first, k2, layer_after(first))


def _front_time(setup: NitridingSetup, front_depth: float) -> float:
    """Soak [s] after which the diffusion zone's nitrided depth (below the compound layer) is ``front_depth`` [m]."""
    rate = _front_rate(setup)
    if rate <= 0.0:
        raise NotReachableError("target", "dissolved nitrogen alone cannot raise the hardness by 50 HV in this steel")
    return (front_depth / rate) ** 2


def two_stage_for_depth(setup: NitridingSetup, target_depth: float, window: tuple[float, float],
                        second_kn: float | None = None) -> tuple[TwoStageSchedule, NitridingResult]:
    """A two-stage schedule (see :func:`two_stage_schedule`) whose total time gives the nitrided hardness
    depth ``target_depth`` [m] with the layer the schedule leaves, and what it gives.

    The front below the layer does not depend on K_N once the ferrite is saturated (every stage at or
    above α/γ′), so the total time follows from the one-stage time with the depth taken up by the
    staged layer instead of the one-stage layer (one correction: the layer hardly changes with the total).
    """
    total = nitriding_time(setup, target_depth).time
    schedule = two_stage_schedule(setup, total, window, second_kn)
    total = _front_time(setup, target_depth - schedule.compound_layer)
    schedule = two_stage_schedule(setup, total, window, second_kn, guess=schedule.first_time)
    return schedule, nitride(setup, total, layer=schedule.layer)


def staged_layer_at(setup: NitridingSetup, schedule: TwoStageSchedule, time: float) -> CompoundLayer:
    """The compound layer [m] ``time`` [s] into a two-stage schedule."""
    first = min(time, schedule.first_time)
    stages = [(max(first, 1.0), schedule.first_kn)]
    if time > schedule.first_time + 1.0:
        stages.append((time - schedule.first_time, schedule.second_kn))
    return grow_compound_layer(setup.temperature, stages, setup.uptake)

