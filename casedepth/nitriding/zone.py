"""The diffusion zone under the compound layer: nitrogen diffusing in ferrite and precipitating as alloy
nitrides, and the hardness that gives.

Two models, one row each in :data:`ZONE_MODELS` (a plan names its model, ``zone_model``):

* ``precipitation-2026`` — diffusion with precipitation at finite solubility products
  (:mod:`casedepth.models.nitrides`; the scheme of Sun & Bell, Mater. Sci. Eng. A 224 (1997) 33):
  dissolved nitrogen c diffuses, ∂n/∂t = ∂/∂x (D ∂c/∂x), where the total nitrogen n = c + Σ (1 + e)
  max(0, M_j − K_j / c) holds what the formers bind in local equilibrium. At one temperature with the
  ferrite under the layer held at c_s the solution is self-similar in z = x/√(D t), so it is solved
  once as a boundary-value problem in z (:func:`solve_similarity`) and read at any time. With every
  K_j → 0 it becomes the sharp front of Wagner (1959) and Meijering (1971), which the tests check to
  0.1 %; without formers, the erfc solution (Crank 1975, eq. 3.13).
* ``sharp-front-2026`` — the first release: every former a perfect sink (the Wagner front), hardness a
  step from the core to the nitrided surface hardness. Kept for the plans made with it.

Contents in wt %, lengths in m, times in s, hardness in HV.
"""

from __future__ import annotations

import math
from abc import ABC, abstractmethod
from dataclasses import dataclass
from typing import Callable

import numpy as np

from .. import formats
from ..errors import NotReachableError
from ..numerics.roots import illinois

SQRT_PI = math.sqrt(math.pi)
#: hardness [HV] dissolved nitrogen adds per wt % (with the fine γ′ that forms from it on cooling), as
#: in nitrided iron and plain steels; from memory, order of magnitude only
SOLUTION_HARDENING_HV_PER_PCT = 1000.0
#: the same in the tempered matrix of an alloy steel, where it adds little beside the alloy nitrides
#: (assumed: a tenth of a percent of dissolved nitrogen ahead of the nitrides shows as a few HV on
#: measured traverses, which reach the core hardness soon beyond the nitrided depth; common practice,
#: from memory)
ALLOY_SOLUTION_HARDENING_HV_PER_PCT = 300.0
#: RK4 steps per unit of ln c in each stretch of the shooting (0.1 % of the depth; see the tests)
STEPS_PER_LOG = 24
#: the smallest solubility product the precipitation model takes, (wt % N)²; below it a former is a
#: perfect sink to within the model's accuracy
SMALLEST_PRODUCT = 1e-12


@dataclass(frozen=True)
class Precipitate:
    """One nitride former in the zone: the nitrogen its nitride can hold, M [wt % N]; its solubility
    product K [(wt % N)²]; the excess nitrogen the zone takes with it, e [-] per nitrogen in nitride."""

    element: str
    capacity: float
    product: float
    excess: float = 0.0

    @property
    def onset(self) -> float:
        """The dissolved nitrogen [wt %] above which this former precipitates, K/M."""
        return max(self.product, SMALLEST_PRODUCT) / self.capacity


def bound_nitrogen(c, precipitates: list[Precipitate]):
    """Nitrogen [wt %] held in nitrides (stoichiometric) at dissolved nitrogen ``c`` [wt %] (array or float)."""
    c = np.asarray(c, dtype=float)
    safe = np.maximum(c, 1e-300)
    out = np.zeros_like(safe)
    for p in precipitates:
        out = out + np.where(c > p.onset, p.capacity - max(p.product, SMALLEST_PRODUCT) / safe, 0.0)
    return out


def total_nitrogen(c, precipitates: list[Precipitate]):
    """Total nitrogen [wt %] at dissolved nitrogen ``c`` [wt %]: dissolved, in nitrides and in excess."""
    c = np.asarray(c, dtype=float)
    safe = np.maximum(c, 1e-300)
    out = c.copy()
    for p in precipitates:
        out = out + (1.0 + p.excess) * np.where(c > p.onset, p.capacity - max(p.product, SMALLEST_PRODUCT) / safe, 0.0)
    return out


@dataclass
class Similarity:
    """The self-similar diffusion zone c(z), z = x/√(D t): the surface slope q0 = −dc/dz at z = 0, the
    points the shooting passed (z, c), and the erfc tail c = a·erfc(z/2) beyond the last of them."""

    surface: float
    slope: float
    z: np.ndarray
    c: np.ndarray
    tail: float  # a of the tail

    def z_at(self, c: float) -> float:
        """Where the dissolved nitrogen has fallen to ``c`` [wt %] (0 < c ≤ surface)."""
        if c >= self.surface:
            return 0.0
        if c >= self.c[-1]:
            return float(np.interp(math.log(c), np.log(self.c[::-1]), self.z[::-1]))
        from scipy.special import erfcinv  # imported on first use: it is slow to import

        return 2.0 * float(erfcinv(c / self.tail))

    def c_at(self, z: np.ndarray) -> np.ndarray:
        """Dissolved nitrogen [wt %] at ``z`` (array)."""
        from scipy.special import erfc

        z = np.asarray(z, dtype=float)
        inside = np.interp(z, self.z, np.log(self.c))
        return np.where(z <= self.z[-1], np.exp(inside), self.tail * erfc(z / 2.0))


def _shoot(q0: float, surface: float, stretches, record: bool = False):
    """Integrate the similarity equations from the surface down in c; returns the residual (rising with
    q0), and with ``record`` the points passed.

    In c as the variable, dz/dc = −1/q and dq/dc = (z/2) dn/dc, q = −dc/dz; with s = ln c,
    dz/ds = −c/q and dq/ds = (z/2)(c + B/c), B = Σ (1 + e) K over the formers precipitating, which
    is smooth between the onsets. Below the last onset n = c and the solution is a·erfc(z/2), so
    the residual is the mismatch of q/c with that tail's.
    """
    z, q, c = 0.0, q0, surface
    zs, cs = [0.0], [surface]
    for c_low, B, steps in stretches:
        s, h = math.log(c), (math.log(c_low) - math.log(c)) / steps
        half = 0.5 * h
        for _ in range(steps):
            c0 = math.exp(s)
            cm = math.exp(s + half)
            c1 = math.exp(s + h)
            k1z, k1q = -c0 / q, 0.5 * z * (c0 + B / c0)
            qa = q + half * k1q
            if qa <= 0.0:
                return -c0 / surface, None
            za = z + half * k1z
            k2z, k2q = -cm / qa, 0.5 * za * (cm + B / cm)
            qb = q + half * k2q
            if qb <= 0.0:
                return -c0 / surface, None
            zb = z + half * k2z
            k3z, k3q = -cm / qb, 0.5 * zb * (cm + B / cm)
            qc = q + h * k3q
            if qc <= 0.0:
                return -c0 / surface, None
            zc = z + h * k3z
            k4z, k4q = -c1 / qc, 0.5 * zc * (c1 + B / c1)
            z += h / 6.0 * (k1z + 2.0 * k2z + 2.0 * k3z + k4z)
            q += h / 6.0 * (k1q + 2.0 * k2q + 2.0 * k3q + k4q)
            s += h
            if q <= 0.0:
                return -c1 / surface, None
            if record:
                zs.append(z)
                cs.append(c1)
        c = c_low
    # the erfc tail from (z, c, q): a = q √π exp(z²/4); it must carry c at z
    a = q * SQRT_PI * math.exp(min(0.25 * z * z, 700.0))
    residual = (a * math.erfc(0.5 * z) - c) / surface
    if record:
        return residual, Similarity(surface, q0, np.array(zs), np.array(cs), a)
    return residual, None


def solve_similarity(surface: float, precipitates: list[Precipitate], steps_per_log: int = STEPS_PER_LOG,
                     marks: tuple[float, ...] = ()) -> Similarity:
    """The self-similar zone for dissolved nitrogen ``surface`` [wt %] held at z = 0 and the formers
    ``precipitates``: shooting on the surface slope (Illinois regula falsi) between the no-precipitation
    slope (erfc, 1/√π of the surface) and the sharp-front slope of every former as a perfect sink with
    its excess (Wagner 1959). The integration also stops at each of ``marks`` (dissolved nitrogen, wt %),
    so that :meth:`Similarity.z_at` is exact there. Accurate to about 1e-4 in depth with the default steps."""
    formers = [p for p in precipitates if p.capacity > 0.0 and p.onset < surface]
    no_sink = surface / SQRT_PI
    if not formers:
        return Similarity(surface, no_sink, np.array([0.0]), np.array([surface]), surface)
    onsets = sorted({p.onset for p in formers}, reverse=True)
    lowest = onsets[-1]
    onsets = sorted(set(onsets) | {m for m in marks if lowest < m < surface}, reverse=True)
    stretches, c = [], surface
    for c_low in onsets:
        B = sum((1.0 + p.excess) * max(p.product, SMALLEST_PRODUCT) for p in formers if p.onset < c)
        stretches.append((c_low, B, max(8, math.ceil(steps_per_log * math.log(c / c_low)))))
        c = c_low
    sink = sum((1.0 + p.excess) * p.capacity for p in formers)
    gamma = wagner_front_factor(surface, sink)
    sharp = surface / (SQRT_PI * math.erf(gamma))

    def miss(q0):
        return _shoot(q0, surface, stretches)[0]

    low, high = no_sink, sharp * 1.000001
    slope = illinois(miss, low, miss(low), high, miss(high), 1e-12 * sharp, 1e-12)
    residual, solution = _shoot(slope, surface, stretches, record=True)
    if solution is None:  # the last trial fell just short; a hair more slope carries it through
        residual, solution = _shoot(slope * (1 + 1e-9), surface, stretches, record=True)
    return solution


def wagner_front_factor(surface_nitrogen: float, capacity: float) -> float:
    r"""γ of the internal-nitriding front ξ = 2γ√(Dt): root of √π γ e^{γ²} erf(γ) = c_s / c_M.

    For a small ratio γ² ≈ c_s / (2 c_M), the familiar ξ² = 2 D c_s t / c_M.

    References
    ----------
    .. [1] Wagner, C. "Reaktionstypen bei der Oxydation von Legierungen." Z. Elektrochem. 63 (1959) 772–790.
    .. [2] Meijering, J. L. "Internal oxidation in alloys." In Advances in Materials Research 5 (1971) 1–81.
    """
    ratio = surface_nitrogen / capacity

    def f(g):
        return math.sqrt(math.pi) * g * math.exp(g * g) * math.erf(g) - ratio

    return illinois(f, 1e-9, f(1e-9), 10.0, f(10.0), 1e-15, 1e-15 * ratio)


def _erfcinv(y: float) -> float:
    return illinois(lambda v: math.erfc(v) - y, 0.0, 1.0 - y, 10.0, math.erfc(10.0) - y, 1e-15, 1e-15 * y)


# -- the zone models ------------------------------------------------------------------------------------------------
class Zone(ABC):
    """What the nitriding results read from a diffusion-zone model (below the compound layer)."""

    label: str  # how the hardness curve is described on plots
    uptake: float  # A of the nitrogen flux A/√t drawn from under the compound layer [wt % m/√s]
    surface_hardness: float  # hardness at the top of the zone [HV]

    def __init__(self, setup):
        self.setup = setup
        self.diffusivity = setup.diffusivity  # m²/s
        self.surface_nitrogen = setup.substrate_nitrogen  # dissolved at the top of the zone, wt %

    @abstractmethod
    def depth_rate(self) -> float:
        """Depth below the layer at the hardness limit, per √time [m/√s] (0 if the limit is not reached)."""

    @abstractmethod
    def profile(self, time: float, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Nitrogen [wt %, dissolved + bound] and hardness [HV] at depths ``x`` [m] below the layer."""


class SharpFrontZone(Zone):
    """Every former a perfect sink: a sharp front (Wagner 1959), hardness a step; the first release."""

    label = "estimated (sharp nitriding front)"

    def __init__(self, setup):
        super().__init__(setup)
        D, c_s = self.diffusivity, self.surface_nitrogen
        self.capacity = setup.capacity
        self.gamma = setup.front_factor
        self.surface_hardness = setup.core + setup.strength_multiplier * (setup.typical_surface - setup.core)
        from .layer import substrate_uptake_coefficient

        self.uptake = substrate_uptake_coefficient(c_s, D, 1.0 if self.gamma is None else math.erf(self.gamma))

    def depth_rate(self) -> float:
        if self.gamma is not None:
            return 2.0 * self.gamma * math.sqrt(self.diffusivity)
        rise = SOLUTION_HARDENING_HV_PER_PCT * self.surface_nitrogen
        return 2.0 * _erfcinv(50.0 / rise) * math.sqrt(self.diffusivity) if rise > 50.0 else 0.0

    def profile(self, time, x):
        length = 2.0 * math.sqrt(self.diffusivity * time)
        c_s, core = self.surface_nitrogen, self.setup.core
        if self.gamma is not None:
            from scipy.special import erf

            front = self.gamma * length
            dissolved = np.where(x < front, c_s * (1.0 - erf(x / length) / erf(self.gamma)), 0.0)
            return dissolved + np.where(x < front, self.capacity, 0.0), np.where(x < front, self.surface_hardness, core)
        dissolved = c_s * np.array([math.erfc(v) for v in x / length])
        return dissolved, core + SOLUTION_HARDENING_HV_PER_PCT * dissolved


class PrecipitationZone(Zone):
    """Diffusion with precipitation at finite solubility products; hardness from the nitrides formed."""

    label = "estimated from the nitrides formed"

    def __init__(self, setup):
        super().__init__(setup)
        D, c_s = self.diffusivity, self.surface_nitrogen
        self.precipitates = setup.precipitates
        self.solution_hardening = (ALLOY_SOLUTION_HARDENING_HV_PER_PCT if setup.capacity >= setup.min_capacity
                                   else SOLUTION_HARDENING_HV_PER_PCT)
        core = setup.core
        bound_top = float(bound_nitrogen(c_s, self.precipitates))
        if setup.surface_hardness is not None and bound_top > 0.0:  # the shop's measured surface: scale the strength
            self.strength = max(setup.surface_hardness - core - self.solution_hardening * c_s, 0.0) / bound_top
        else:
            self.strength = setup.constants.strength
        self.strength *= setup.strength_multiplier  # the furnace record's calibration (1: none)
        self.surface_hardness = float(self.hardness(c_s))
        self.at_limit = self.nitrogen_at_hardness(setup.hardness_limit)
        self.solution = solve_similarity(c_s, self.precipitates, marks=(self.at_limit,))
        self.uptake = self.solution.slope * math.sqrt(D)

    def hardness(self, c):
        """Hardness [HV] where the dissolved nitrogen is ``c`` [wt %]: the core, plus the strength
        constant times the nitrogen in nitrides, plus solution hardening."""
        return (self.setup.core + self.strength * bound_nitrogen(c, self.precipitates)
                + self.solution_hardening * np.asarray(c, dtype=float))

    def nitrogen_at_hardness(self, limit: float) -> float:
        """The dissolved nitrogen [wt %] where the hardness is ``limit`` [HV]: the surface's if the top of the
        zone is below it (no depth), 0 if even the core is above it."""
        c_s = self.surface_nitrogen
        top = float(self.hardness(c_s))
        if top <= limit:
            return c_s
        floor = float(self.hardness(0.0))
        if floor >= limit:
            return 0.0
        return illinois(lambda v: float(self.hardness(v)) - limit, 0.0, floor - limit, c_s, top - limit,
                        1e-13 * c_s, 1e-10 * limit)

    def z_at_hardness(self, limit: float) -> float:
        """z where the hardness falls to ``limit`` [HV]; 0 if the top of the zone is below it."""
        c = self.at_limit if limit == self.setup.hardness_limit else self.nitrogen_at_hardness(limit)
        return math.inf if c <= 0.0 else self.solution.z_at(c)

    def depth_rate(self) -> float:
        return self.z_at_hardness(self.setup.hardness_limit) * math.sqrt(self.diffusivity)

    def profile(self, time, x):
        c = self.solution.c_at(np.asarray(x) / math.sqrt(self.diffusivity * time))
        return total_nitrogen(c, self.precipitates), self.hardness(c)


@dataclass(frozen=True)
class ZoneModel:
    """One row of the diffusion-zone model table."""

    key: str
    display: str
    reference: str
    build: Callable[[object], Zone]
    uncertainty: str  # how sure the depth is, printed with it
    short_uncertainty: str  # the same in a few words, for plot titles
    superseded_by: str | None = None


ZONE_MODELS: dict[str, ZoneModel] = {
    "precipitation-2026": ZoneModel(
        "precipitation-2026", "Nitrogen diffusion with nitride precipitation (graded hardness)",
        "after Sun & Bell, Mater. Sci. Eng. A 224 (1997) 33; excess nitrogen after Schacherl, Graat & Mittemeijer, "
        "Metall. Mater. Trans. A 35 (2004) 3387; products and grade constants fitted to common practice (from memory)",
        PrecipitationZone, "depth ±25 %, time ±50 % until calibrated on the shop's sections; hardness ±60 HV",
        "±25 %"),
    "sharp-front-2026": ZoneModel(
        "sharp-front-2026", "Sharp internal-nitriding front (first release, superseded)",
        "Wagner, Z. Elektrochem. 63 (1959) 772; Meijering (1971); hardness a step",
        SharpFrontZone, "up to 2× too deep on low-alloy steels; hardness a step",
        "up to 2× too deep", superseded_by="precipitation-2026"),
}
DEFAULT_ZONE_MODEL = "precipitation-2026"


def check_reached(zone: Zone, setup, what: str = "target") -> None:
    """Refuse a step whose zone never reaches the hardness limit (naming the parameter at fault)."""
    if zone.depth_rate() <= 0.0:
        raise NotReachableError(what, f"the diffusion zone of {setup.steel.name} at these settings reaches only "
                                f"{formats.hv(zone.surface_hardness)}, not the limit of {formats.hv(setup.hardness_limit)}")
