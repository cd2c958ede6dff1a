"""The iron–nitrogen system under a nitriding gas: which phase the surface forms and how much nitrogen it holds.

* the Lehrer diagram: nitriding potentials of the α/γ′ and γ′/ε boundaries against temperature
  (Lehrer 1930, as evaluated by Kooi, Somers & Mittemeijer 1996) — fitted from memory, good to
  perhaps ±30 % in K_N; the γ′/ε boundary is a stationary state of the gas–solid exchange;
* phase-boundary nitrogen contents of α, γ′ and ε from the Fe–N phase diagram (Wriedt, Gokcen &
  Nafziger 1987), from memory, taken as constant over 480–590 °C except the ferrite solvus;
* the nitrogen content a nitriding gas sets at the surface of each phase.

Nitrogen contents are in wt %, temperatures in K, nitriding potentials in atm^-1/2.
"""

from __future__ import annotations

import math

from ..constants import GAS_CONSTANT as R

# Phase-boundary nitrogen contents [wt %], Fe–N diagram (Wriedt, Gokcen & Nafziger 1987), from memory:
# γ′-Fe4N1-x spans about 19.4–20.0 at % N, ε-Fe2-3N starts near 24 at % N next to γ′ and reaches
# Fe2N (33 at %) at very high K_N.
GAMMA_PRIME_WITH_ALPHA = 5.70
GAMMA_PRIME_WITH_EPSILON = 5.90
EPSILON_WITH_GAMMA_PRIME = 7.40
EPSILON_MAX = 11.0
# rise of ε's surface nitrogen per e-fold of K_N above the γ′/ε boundary [wt %]; a rough reading of
# the absorption isotherms of ε (Kooi, Somers & Mittemeijer 1996), from memory
EPSILON_SLOPE = 0.8

PHASE_NAMES = {"alpha": "α (ferrite, no compound layer)", "gamma'": "γ′ (Fe4N compound layer)",
               "epsilon": "ε (Fe2-3N over γ′ compound layer)"}


def Lehrer_boundaries(T: float) -> tuple[float, float]:
    r"""Nitriding potentials of the α/γ′ and γ′/ε boundaries of the Lehrer diagram.

    .. math::
        \log_{10} K_N^{\alpha/\gamma'} = -3.535 + 2380/T, \qquad
        \log_{10} K_N^{\gamma'/\varepsilon} = -4.333 + 3657/T

    Parameters
    ----------
    T : float
        Temperature, [K]

    Returns
    -------
    alpha_gamma, gamma_epsilon : float
        Nitriding potentials of the two boundaries, [atm^-1/2]

    Notes
    -----
    Straight lines in 1/T through values read from the Lehrer diagram as usually redrawn (about
    0.35 and 2.5 atm^-1/2 at 500 °C, 0.18 and 0.9 at 580 °C) — from memory, good to perhaps ±30 %.
    The γ′/ε boundary is a stationary state of the gas–solid exchange, not an equilibrium.
    Valid 450–600 °C. Both boundaries fall as T rises.

    Examples
    --------
    >>> [round(k, 2) for k in Lehrer_boundaries(773.15)]
    [0.35, 2.49]

    References
    ----------
    .. [1] Lehrer, E. "Über das Eisen-Wasserstoff-Ammoniak-Gleichgewicht." Z. Elektrochem. 36 (1930) 383–392.
    .. [2] Kooi, B. J., M. A. J. Somers, E. J. Mittemeijer. "An evaluation of the Fe-N phase
       diagram considering long-range order of N atoms in γ′-Fe4N1-x and ε-Fe2N1-z."
       Metall. Mater. Trans. A 27 (1996) 1063–1071.
    """
    return 10 ** (-3.535 + 2380.0 / T), 10 ** (-4.333 + 3657.0 / T)


def surface_phase(T: float, K_N: float) -> str:
    """The phase at the surface in (local) equilibrium with the gas at T [K] and K_N [atm^-1/2]:
    ``alpha`` (no compound layer), ``gamma'`` or ``epsilon``."""
    alpha_gamma, gamma_epsilon = Lehrer_boundaries(T)
    if K_N < alpha_gamma:
        return "alpha"
    return "gamma'" if K_N < gamma_epsilon else "epsilon"


def nitrogen_saturation_ferrite(T: float) -> float:
    """Nitrogen in ferrite in equilibrium with γ′ [wt %] at T [K]: 0.1 wt % near 590 °C, less when cooler.

    An Arrhenius fit, 12.3 exp(−34.2 kJ/mol / RT) wt %, to the α/(α+γ′) solvus of the Fe–N diagram
    (Wriedt, Gokcen & Nafziger, Bull. Alloy Phase Diagrams 8 (1987) 355), from memory. Valid 450–590 °C.

    Examples
    --------
    >>> round(nitrogen_saturation_ferrite(865.15), 3)
    0.106
    """
    return 12.3 * math.exp(-34200.0 / (R * T))


def surface_nitrogen(T: float, K_N: float) -> float:
    r"""Nitrogen content the gas holds at the surface of the phase it forms [wt %].

    .. math::
        c_s = \begin{cases}
        c^{\alpha/\gamma'}\,K_N / K_N^{\alpha/\gamma'} & \text{α at the surface (Sieverts-type law)}\\
        c^{\gamma'/\alpha} + (c^{\gamma'/\varepsilon} - c^{\gamma'/\alpha})
          \dfrac{\ln(K_N/K_N^{\alpha/\gamma'})}{\ln(K_N^{\gamma'/\varepsilon}/K_N^{\alpha/\gamma'})} & \text{γ′}\\
        \min\!\left(c^{\varepsilon/\gamma'} + s_\varepsilon \ln(K_N/K_N^{\gamma'/\varepsilon}),\ c^{\varepsilon}_{max}\right) & \text{ε}
        \end{cases}

    Parameters
    ----------
    T : float
        Temperature, [K]
    K_N : float
        Nitriding potential, [atm^-1/2]

    Returns
    -------
    c_s : float
        Nitrogen content at the surface, [wt %]

    Notes
    -----
    Local equilibrium between gas and surface (the usual assumption of Somers & Mittemeijer 1995).
    Nitrogen activity goes as K_N; across γ′'s narrow range the content is taken linear in ln K_N,
    which is the form of an ideal solution; in ε the slope is a rough reading of the isotherms
    (from memory). Valid 480–590 °C, K_N 0.05–30 atm^-1/2.

    Examples
    --------
    >>> round(surface_nitrogen(793.15, 3.0), 2)
    7.77

    References
    ----------
    .. [1] Somers, M. A. J., E. J. Mittemeijer. "Layer-growth kinetics on gaseous nitriding of pure
       iron: evaluation of diffusion coefficients for nitrogen in iron nitrides."
       Metall. Mater. Trans. A 26 (1995) 57–74.
    .. [2] Kooi, B. J., M. A. J. Somers, E. J. Mittemeijer. Metall. Mater. Trans. A 27 (1996) 1063–1071.
    """
    alpha_gamma, gamma_epsilon = Lehrer_boundaries(T)
    if K_N < alpha_gamma:
        return nitrogen_saturation_ferrite(T) * K_N / alpha_gamma
    if K_N < gamma_epsilon:
        share = math.log(K_N / alpha_gamma) / math.log(gamma_epsilon / alpha_gamma)
        return GAMMA_PRIME_WITH_ALPHA + (GAMMA_PRIME_WITH_EPSILON - GAMMA_PRIME_WITH_ALPHA) * share
    return min(EPSILON_MAX, EPSILON_WITH_GAMMA_PRIME + EPSILON_SLOPE * math.log(K_N / gamma_epsilon))


def Bohnenkamp_1967_nitrogen_diffusivity(T: float) -> float:
    r"""Diffusivity of nitrogen in ferrite, D = 1.5e-6 exp(−79.9 kJ/mol / RT) m²/s.

    Parameters
    ----------
    T : float
        Temperature, [K]; measured over about 400–850 °C

    Returns
    -------
    D : float
        [m²/s]

    Examples
    --------
    >>> round(Bohnenkamp_1967_nitrogen_diffusivity(793.15) * 1e12, 2)
    8.21

    References
    ----------
    .. [1] Bohnenkamp, K. Arch. Eisenhüttenwes. 38 (1967) 229 (D0 = 1.5e-2 cm²/s, Q = 79.9 kJ/mol).
    """
    return 1.5e-6 * math.exp(-79900.0 / (R * T))


def da_Silva_McLellan_1976_nitrogen_diffusivity(T: float) -> float:
    r"""Diffusivity of nitrogen in ferrite, D = 6.6e-7 exp(−77.9 kJ/mol / RT) m²/s.

    Parameters
    ----------
    T : float
        Temperature, [K]; for ferrite below about 850 °C

    Returns
    -------
    D : float
        [m²/s]; about 0.6 of Bohnenkamp's (1967) at gas-nitriding temperatures

    Notes
    -----
    The values are quoted from memory as those of the evaluation of da Silva & McLellan (1976); check
    them against the paper when it is in hand.

    Examples
    --------
    >>> round(da_Silva_McLellan_1976_nitrogen_diffusivity(793.15) * 1e12, 2)
    4.89

    References
    ----------
    .. [1] da Silva, J. R. G., R. B. McLellan. "Diffusion of carbon and nitrogen in b.c.c. iron."
       Mater. Sci. Eng. 26 (1976) 83–87.
    """
    return 6.6e-7 * math.exp(-77900.0 / (R * T))


class NitrogenDiffusivity:
    """One row of the nitrogen-diffusivity table: the name shown, a short name for sentences, the function."""

    def __init__(self, display: str, short: str, function, note: str = ""):
        self.display, self.short, self.function, self.note = display, short, function, note


#: the diffusivities of nitrogen in ferrite a plan may name (``n_diffusivity``); the precipitation
#: model's grade constants were set with the default
NITROGEN_DIFFUSIVITIES: dict[str, NitrogenDiffusivity] = {
    "da-silva-mclellan-1976": NitrogenDiffusivity(
        "da Silva & McLellan (1976)", "da Silva & McLellan (1976)", da_Silva_McLellan_1976_nitrogen_diffusivity,
        "da Silva & McLellan, Mater. Sci. Eng. 26 (1976) 83 (values from memory); the grade constants of the "
        "precipitation model were set with it"),
    "bohnenkamp-1967": NitrogenDiffusivity(
        "Bohnenkamp (1967)", "Bohnenkamp (1967)", Bohnenkamp_1967_nitrogen_diffusivity,
        "Bohnenkamp, Arch. Eisenhüttenwes. 38 (1967) 229; about 1.7× da Silva & McLellan at 520 °C: depths about "
        "1.3× deeper with the same grade constants"),
}
DEFAULT_NITROGEN_DIFFUSIVITY = "da-silva-mclellan-1976"
