r"""Growth of the compound ("white") layer of iron nitrides during gas nitriding: the model table.

:data:`LAYER_MODELS` has one row per model a plan may name (``layer_model``). The default is the
layer-growth model of Somers & Mittemeijer (1995): an ε layer over a γ′ layer (or
a γ′ layer alone) on the ferrite, local equilibrium at every interface, nitrogen carried through
each nitride by diffusion with a linear (quasi-steady) profile, and each interface moved by its
own mass balance:

.. math::
    (c^{\varepsilon/\gamma'} - c^{\gamma'/\varepsilon})\,\dot p_1 = J_\varepsilon - J_{\gamma'}, \qquad
    (c^{\gamma'/\alpha} - c^{\alpha/\gamma'})\,\dot p_2 = J_{\gamma'} - J_\alpha

with :math:`J_\varepsilon = D_\varepsilon (c_s - c^{\varepsilon/\gamma'})/p_1`,
:math:`J_{\gamma'} = D_{\gamma'} \Delta c_{\gamma'}/(p_2 - p_1)` and the flux into the substrate
:math:`J_\alpha = A/\sqrt{t}`, which the diffusion zone sets (see :func:`substrate_uptake_coefficient`).
At constant temperature and K_N both interfaces advance as √t, and the constants follow from two
algebraic equations; a later stage at another K_N is integrated in time.

How sure we are: the model is published; the phase-boundary contents come from the Fe–N diagram
(from memory, :mod:`casedepth.iron_nitrogen`). The nitrogen diffusivities in γ′ and ε below are
NOT read from a source: they are an order of magnitude recalled from Somers & Mittemeijer (1995)
for 843 K, set within that range so that common-practice layer thicknesses come out (about
10 µm after 20 h at 520 °C, K_N 3, on 4140). Treat predicted layers as ±50 %.

The table also keeps the parabolic rate law of the first nitriding release (a common-practice
calibration, not a published model) so that plans made with it give the numbers they gave; it is
marked superseded, and the window offers the published model to those plans.

Lengths in m, times in s, nitrogen in wt %, temperatures in K.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Callable

from .. import formats
from ..constants import GAS_CONSTANT as R, ZERO_CELSIUS
from ..errors import InputError, SolverError
from ..numerics.budget import check
from ..models import iron_nitrogen as fen

# Effective nitrogen diffusivities in the nitrides, D = D(843 K) exp(−Q/R (1/T − 1/843 K)).
# From memory, order of magnitude only (see the module notes): 8e-14 m²/s at 843 K, Q = 100 kJ/mol.
_D_REFERENCE = 8e-14  # m²/s at 843 K
_Q_NITRIDES = 100e3  # J/mol
_T_REFERENCE = 843.0  # K


def _nitride_diffusivity(T: float) -> float:
    return _D_REFERENCE * math.exp(-_Q_NITRIDES / R * (1.0 / T - 1.0 / _T_REFERENCE))


def nitrogen_diffusivity_gamma_prime(T: float) -> float:
    r"""Effective diffusivity of nitrogen in γ′-Fe4N1-x across its composition range.

    .. math:: D_{\gamma'} = 8\times10^{-14} \exp\left[-\frac{100\,000}{R}\left(\frac1T - \frac1{843}\right)\right]

    Parameters
    ----------
    T : float
        Temperature, [K]

    Returns
    -------
    D : float
        Diffusivity, [m²/s]

    Notes
    -----
    Order of magnitude recalled from Somers & Mittemeijer (1995) at 843 K (from memory); the
    activation energy is from memory too. Valid 480–590 °C.

    Examples
    --------
    >>> f"{nitrogen_diffusivity_gamma_prime(843.0):.1e}"
    '8.0e-14'

    References
    ----------
    .. [1] Somers, M. A. J., E. J. Mittemeijer. "Layer-growth kinetics on gaseous nitriding of pure
       iron: evaluation of diffusion coefficients for nitrogen in iron nitrides."
       Metall. Mater. Trans. A 26 (1995) 57–74.
    """
    return _nitride_diffusivity(T)


def nitrogen_diffusivity_epsilon(T: float) -> float:
    r"""Effective diffusivity of nitrogen in ε-Fe2-3N [m²/s] at T [K]; same form and status as
    :func:`nitrogen_diffusivity_gamma_prime` (Somers & Mittemeijer 1995, order of magnitude, from memory).

    In ε the diffusivity rises with nitrogen content; one effective value stands for the layer.

    Examples
    --------
    >>> f"{nitrogen_diffusivity_epsilon(793.15):.1e}"
    '3.3e-14'
    """
    return _nitride_diffusivity(T)


def substrate_uptake_coefficient(saturation: float, diffusivity: float, front_erf: float = 1.0) -> float:
    r"""Coefficient A of the nitrogen flux J = A/√t that the ferrite under the layer takes up.

    .. math:: A = \frac{c^{\alpha/\gamma'}}{\operatorname{erf}\gamma} \sqrt{\frac{D_\alpha}{\pi}}

    Parameters
    ----------
    saturation : float
        Nitrogen dissolved in the ferrite at the layer, [wt %]
    diffusivity : float
        Nitrogen diffusivity in ferrite, [m²/s]
    front_erf : float
        erf γ of the internal-nitriding front (Wagner 1959); 1 for a steel without nitride formers,
        where the dissolved nitrogen follows the erfc solution (Crank 1975, eq. 3.13), [-]

    Returns
    -------
    A : float
        [wt % m / √s]

    Notes
    -----
    The surface flux of the Wagner internal-nitriding solution, D ∂c/∂x at x = 0; it neglects the
    motion of the layer/ferrite interface, which is small while the layer is thin against √(D_α t).

    Examples
    --------
    >>> f"{substrate_uptake_coefficient(0.1, 1e-11):.2e}"
    '1.78e-07'
    """
    return saturation * math.sqrt(diffusivity / math.pi) / front_erf


@dataclass(frozen=True)
class CompoundLayer:
    """The compound layer: ε on top [m], γ′ beneath [m]."""

    epsilon: float = 0.0
    gamma_prime: float = 0.0
    split: bool = True  # False for a model that gives the thickness only (then it is all in the surface phase)

    @property
    def thickness(self) -> float:
        return self.epsilon + self.gamma_prime

    @property
    def surface_phase(self) -> str:
        """The phase at the surface: ``epsilon``, ``gamma'`` or ``alpha`` (no layer)."""
        if self.epsilon > 0.0:
            return "epsilon"
        return "gamma'" if self.gamma_prime > 0.0 else "alpha"

    def describe(self) -> str:
        """The layer in words, e.g. ``8.5 µm (ε 5.3 µm over γ′ 3.2 µm)``."""
        if self.thickness < 0.05e-6:
            return "none"
        if not self.split:
            return formats.thin_length(self.thickness)
        if self.epsilon < 0.05e-6:
            return f"{formats.thin_length(self.thickness)} (γ′ only)"
        return (f"{formats.thin_length(self.thickness)} (ε {formats.thin_length(self.epsilon)} over γ′ "
                f"{formats.thin_length(self.gamma_prime)})")


def _layer_parameters(T: float) -> tuple[float, float, float, float, float]:
    """Diffusivities in γ′ and ε [m²/s], the jumps at the ε/γ′ and γ′/α interfaces and γ′'s span [wt %]."""
    jump_eps = fen.EPSILON_WITH_GAMMA_PRIME - fen.GAMMA_PRIME_WITH_EPSILON
    jump_alpha = fen.GAMMA_PRIME_WITH_ALPHA - fen.nitrogen_saturation_ferrite(T)
    span_gamma = fen.GAMMA_PRIME_WITH_EPSILON - fen.GAMMA_PRIME_WITH_ALPHA
    return nitrogen_diffusivity_gamma_prime(T), nitrogen_diffusivity_epsilon(T), jump_eps, jump_alpha, span_gamma


def _gamma_layer_constant(drive: float, D: float, jump: float, A: float, k_above: float = 0.0) -> float:
    """Parabolic constant of the γ′ layer [m/√s]: root of jump (k_above + g)/2 = D drive/g − A."""
    b = 0.5 * jump * k_above + A
    return 2.0 * D * drive / (b + math.sqrt(b * b + 2.0 * jump * D * drive))


@lru_cache(maxsize=4096)
def parabolic_constants(T: float, K_N: float, uptake: float) -> tuple[float, float]:
    r"""Parabolic constants of the ε/γ′ and γ′/α interfaces, p_i = k_i √t, at constant T [K] and K_N.

    Parameters
    ----------
    T : float
        Temperature, [K]
    K_N : float
        Nitriding potential, [atm^-1/2]
    uptake : float
        A of the substrate's flux A/√t, [wt % m/√s] (:func:`substrate_uptake_coefficient`)

    Returns
    -------
    k_epsilon, k_total : float
        [m/√s]; k_epsilon = 0 where the surface is γ′, both 0 where it is α.

    Notes
    -----
    Somers & Mittemeijer (1995) model with linear profiles; see the module notes.
    The γ′ root is written without cancellation: g = 2 D Δc / (b + √(b² + 2 a D Δc)).
    """
    phase = fen.surface_phase(T, K_N)
    if phase == "alpha":
        return 0.0, 0.0
    D_g, D_e, jump_eps, jump_alpha, span = _layer_parameters(T)
    c_s = fen.surface_nitrogen(T, K_N)
    if phase == "gamma'":
        return 0.0, _gamma_layer_constant(c_s - fen.GAMMA_PRIME_WITH_ALPHA, D_g, jump_alpha, uptake)
    drive = c_s - fen.EPSILON_WITH_GAMMA_PRIME
    if drive <= 0.0:
        return 0.0, _gamma_layer_constant(span, D_g, jump_alpha, uptake)
    from ..numerics.roots import illinois

    def miss(k1):  # ε/γ′ mass balance; falls as k1 grows
        g = _gamma_layer_constant(span, D_g, jump_alpha, uptake, k1)
        return D_e * drive / k1 - D_g * span / g - 0.5 * jump_eps * k1

    top = math.sqrt(2.0 * D_e * drive / jump_eps)
    if miss(top * 1e-9) <= 0.0:
        return 0.0, _gamma_layer_constant(span, D_g, jump_alpha, uptake)
    k1 = illinois(miss, top * 1e-9, miss(top * 1e-9), top, miss(top), top * 1e-13, 0.0)
    return k1, k1 + _gamma_layer_constant(span, D_g, jump_alpha, uptake, k1)


def compound_layer(T: float, K_N: float, time: float, uptake: float) -> CompoundLayer:
    """The compound layer [m] after ``time`` [s] at constant T [K] and K_N [atm^-1/2]; ``uptake`` as in
    :func:`parabolic_constants`.

    Examples
    --------
    >>> layer = compound_layer(793.15, 3.0, 20 * 3600.0, 2.99e-7)
    >>> round(layer.thickness * 1e6, 1), round(layer.epsilon * 1e6, 1)
    (11.5, 7.3)
    """
    k1, k2 = parabolic_constants(float(T), float(K_N), float(uptake))
    root = math.sqrt(time)
    return CompoundLayer(k1 * root, (k2 - k1) * root)


def grow_compound_layer(T: float, stages: list[tuple[float, float]], uptake: float) -> CompoundLayer:
    """The compound layer [m] after consecutive stages ``(duration [s], K_N [atm^-1/2])`` at T [K].

    The first stage follows the parabolic solution; later stages integrate the interface mass
    balances in time (the substrate keeps taking A/√t, t from the start of the first stage). Where a
    stage's K_N lies below the γ′/ε boundary, an existing ε layer is cut off from the gas and feeds
    the γ′ beneath it until it is gone (its own loss to the gas is neglected). Every K_N must be at
    or above the α/γ′ boundary, where the ferrite under the layer stays saturated.
    """
    _check_staged(T, stages)
    first_time, first_kn = stages[0]
    layer = compound_layer(T, first_kn, first_time, uptake)
    p1, p2, now = layer.epsilon, layer.thickness, first_time
    for duration, K_N in stages[1:]:
        p1, p2 = _integrate_stage(T, K_N, uptake, p1, p2, now, now + duration)
        now += duration
    return CompoundLayer(float(p1), float(max(p2 - p1, 0.0)))


def _integrate_stage(T, K_N, uptake, p1, p2, start, end):
    from scipy.integrate import solve_ivp  # imported on first use: it is slow to import

    D_g, D_e, jump_eps, jump_alpha, span = _layer_parameters(T)
    c_s = fen.surface_nitrogen(T, K_N)
    eps_at_surface = fen.surface_phase(T, K_N) == "epsilon"
    floor = 1e-10  # m: a layer thinner than this counts as gone
    if eps_at_surface and p1 <= floor:
        p1 = min(floor * 10, 0.5 * p2) if p2 > floor else floor * 10  # ε nucleates on the γ′
        p2 = max(p2, 2 * p1)

    def rates(t, y):
        top, bottom = y
        loss = uptake / math.sqrt(t)
        if top > floor:
            j_eps = D_e * (c_s - fen.EPSILON_WITH_GAMMA_PRIME) / top if eps_at_surface else 0.0
            j_gam = D_g * span / max(bottom - top, floor)
            return [(j_eps - j_gam) / jump_eps, (j_gam - loss) / jump_alpha]
        drive = min(c_s, fen.GAMMA_PRIME_WITH_EPSILON) - fen.GAMMA_PRIME_WITH_ALPHA
        return [0.0, (D_g * drive / max(bottom, floor) - loss) / jump_alpha]

    def eps_gone(t, y):
        return y[0] - floor
    eps_gone.terminal, eps_gone.direction = True, -1

    def layer_gone(t, y):
        return y[1] - floor
    layer_gone.terminal, layer_gone.direction = True, -1

    y, t = [p1, p2], start
    while t < end:
        check()  # a calculation the window has made stale stops here
        events = [layer_gone] + ([eps_gone] if y[0] > floor else [])
        solution = solve_ivp(rates, (t, end), y, method="LSODA", rtol=1e-7, atol=1e-14, events=events)
        y, t = list(solution.y[:, -1]), solution.t[-1]
        if solution.status == 1:  # an event: ε or the whole layer is gone
            if y[1] <= floor * (1 + 1e-6):
                return 0.0, 0.0
            y[0] = 0.0
        elif not solution.success:
            raise SolverError(f"compound-layer growth: {solution.message}")
    return max(y[0], 0.0), max(y[1], 0.0)


def _check_staged(T: float, stages: list[tuple[float, float]]) -> None:
    alpha_gamma, _ = fen.Lehrer_boundaries(T)
    for _, K_N in stages:
        if K_N < alpha_gamma * (1 - 1e-12):
            raise InputError("kn_second", f"K_N {K_N:.3g} lies below the α/γ′ boundary ({alpha_gamma:.3g}); "
                             f"a staged layer needs every stage at or above it")


# -- the parabolic rate law of the first nitriding release (superseded) ------------------------------------
#: its activation energy, J/mol, and the layer it was calibrated to: 10 µm after 20 h at 520 °C and K_N 3
#: (common practice, from memory; not a published model)
RATE_LAW_Q = 180e3
RATE_LAW_CALIBRATION = (10e-6, 20 * 3600.0, 520.0 + ZERO_CELSIUS, 3.0)


def _rate_law_b(T: float) -> float:
    """B(T) [m²/s] of the rate law s² = 2 B(T) ln(K_N / K_N^α/γ′) t."""
    s0, t0, T0, kn0 = RATE_LAW_CALIBRATION
    b0 = s0**2 / (2.0 * math.log(kn0 / fen.Lehrer_boundaries(T0)[0]) * t0)
    return b0 * math.exp(-RATE_LAW_Q / R * (1.0 / T - 1.0 / T0))


def rate_law_constants(T: float, K_N: float, uptake: float = 0.0) -> tuple[float, float]:
    r"""Parabolic constants (ε part, whole layer) [m/√s] of the rate law of the first nitriding release.

    .. math:: s^2 = 2 B(T) \lnrac{K_N}{K_N^{lpha/\gamma'}}\, t, \qquad B(T) = B_0 e^{-Q/RT}

    A common-practice calibration (10 µm after 20 h at 520 °C, K_N 3; Q = 180 kJ/mol), kept so that
    plans made with it give the numbers they gave; it has no split into ε and γ′ (the whole layer is
    counted in the surface phase) and ignores the diffusion zone's draw (``uptake`` is not used).

    Examples
    --------
    >>> k = rate_law_constants(793.15, 3.0)[1]
    >>> round(k * math.sqrt(20 * 3600.0) * 1e6, 3)
    10.0
    """
    alpha_gamma, gamma_epsilon = fen.Lehrer_boundaries(T)
    if K_N <= alpha_gamma:
        return 0.0, 0.0
    k = math.sqrt(2.0 * _rate_law_b(T) * math.log(K_N / alpha_gamma))
    return (k if K_N >= gamma_epsilon else 0.0), k


def rate_law_staged(T: float, stages: list[tuple[float, float]], uptake: float = 0.0) -> CompoundLayer:
    """The rate law's layer [m] after consecutive stages ``(duration [s], K_N)``: s² = 2B Σ ln(K_N,i/K_N^α/γ′) t_i."""
    _check_staged(T, stages)
    alpha_gamma, gamma_epsilon = fen.Lehrer_boundaries(T)
    square = sum(2.0 * _rate_law_b(T) * math.log(max(K_N, alpha_gamma) / alpha_gamma) * time for time, K_N in stages)
    thickness = math.sqrt(max(square, 0.0))
    epsilon = thickness if stages[-1][1] >= gamma_epsilon else 0.0
    return CompoundLayer(epsilon, thickness - epsilon, split=False)


@dataclass(frozen=True)
class LayerModel:
    """One row of the compound-layer model table."""

    key: str
    display: str
    reference: str
    #: (T [K], K_N, uptake [wt % m/√s]) -> parabolic constants (ε part, whole layer) [m/√s]
    constants: Callable[[float, float, float], tuple[float, float]]
    #: (T [K], [(duration [s], K_N), …], uptake) -> the layer after consecutive stages
    staged: Callable[[float, list[tuple[float, float]], float], CompoundLayer]
    splits: bool = True  # the model tells ε from γ′
    superseded_by: str | None = None  # the key of the model offered instead (None: current)

    def layer(self, T: float, K_N: float, time: float, uptake: float) -> CompoundLayer:
        """The layer [m] after ``time`` [s] at constant T [K] and K_N."""
        k1, k2 = self.constants(float(T), float(K_N), float(uptake))
        root = math.sqrt(time)
        return CompoundLayer(k1 * root, (k2 - k1) * root, self.splits)


LAYER_MODELS: dict[str, LayerModel] = {
    "somers-mittemeijer-1995": LayerModel(
        "somers-mittemeijer-1995", "ε/γ′ layer growth, Somers & Mittemeijer (1995)",
        "Somers & Mittemeijer, Metall. Mater. Trans. A 26 (1995) 57; nitride diffusivities from memory (±50 %)",
        parabolic_constants, grow_compound_layer),
    "rate-law-2026": LayerModel(
        "rate-law-2026", "Parabolic rate law (first release, superseded)",
        "common-practice calibration, 10 µm after 20 h at 520 °C and K_N 3 (not a published model)",
        rate_law_constants, rate_law_staged, splits=False, superseded_by="somers-mittemeijer-1995"),
}
DEFAULT_LAYER_MODEL = "somers-mittemeijer-1995"
