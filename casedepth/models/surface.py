"""The surface of the part: what the atmosphere offers and how fast carbon crosses the surface.

* the alloy factor (Gunnarson) between the atmosphere's carbon potential, which is defined
  on plain carbon steel, and the equilibrium surface carbon of an alloy steel;
* the mass-transfer (surface reaction) coefficient β of the boundary J = β (C_eq − C_s) (EN 10052
  definition; the solver applies it);
* the carbon saturation of the steel, for the carbide/soot warning.
"""

from __future__ import annotations

import math

from ..constants import GAS_CONSTANT, ZERO_CELSIUS
from .austenite import saturation_carbon

# Mass-transfer coefficient for endothermic-gas carburizing at 900–950 °C. Published values
# lie about 1–3e-5 cm/s and rise with pCO·pH2 (Ruck, Monceau & Grabke 1996; Karabelchtchikova
# 2007); 1.5e-5 cm/s is a mid-range value (from memory, no single source).
DEFAULT_BETA = 1.5e-7  # m/s

#: β from the gas (:func:`beta_from_gas`): the reference state, and the temperature dependence
BETA_REFERENCE_TEMPERATURE = 925.0 + ZERO_CELSIUS  # K
BETA_REFERENCE_GAS = (0.20, 0.40)  # CO and H2 fractions of endothermic gas from natural gas (common practice)
BETA_ACTIVATION = 110e3  # J/mol, from memory (see beta_from_gas)


def beta_from_gas(T: float, co: float, h2: float) -> float:
    r"""Mass-transfer coefficient β [m/s] of a CO–H2–N2 carburizing gas at T [K] with CO and H2 fractions [-].

    .. math:: \beta = \beta_0\,\frac{x_{CO}\,x_{H_2}}{0.20 \cdot 0.40}
              \exp\!\left[-\frac{Q}{R}\left(\frac{1}{T} - \frac{1}{1198\ \mathrm{K}}\right)\right]

    * proportional to p_CO·p_H2: carbon is transferred mainly by CO + H2 → C(ad) + H2O, whose rate grows with
      the product (Grabke's kinetics, as used by Ruck, Monceau & Grabke, steel research 67 (1996) 240; the
      product law is the published one, its use for β here is the program's);
    * β₀ = 1.5e-5 cm/s at 925 °C in endothermic gas of 20 % CO and 40 % H2: mid-range of the published
      1–3e-5 cm/s (Karabelchtchikova, PhD thesis, WPI 2007; Ruck, Monceau & Grabke 1996), from memory;
    * Q = 110 kJ/mol: the order of the surface reaction's activation energy, from memory; β rises about 1.9×
      from 880 to 950 °C with it.

    Valid 850–1050 °C, 5–50 % CO and 0–80 % H2 of the carrier. Uncertain about ×/÷1.5 at 925 °C and more
    away from it: the Load spread's β factor (2 by default) covers it; calibrate on the shop's sections.

    Examples
    --------
    >>> round(beta_from_gas(1198.15, 0.20, 0.40) * 100, 8)
    1.5e-05
    >>> round(beta_from_gas(1198.15, 0.235, 0.315) / beta_from_gas(1198.15, 0.20, 0.40), 3)
    0.925
    """
    co0, h20 = BETA_REFERENCE_GAS
    return (DEFAULT_BETA * (co * h2) / (co0 * h20)
            * math.exp(-BETA_ACTIVATION / GAS_CONSTANT * (1.0 / T - 1.0 / BETA_REFERENCE_TEMPERATURE)))


def beta_at(beta: float, activation: float, T_from: float, T: float) -> float:
    """β [m/s] at T [K] from its value ``beta`` at ``T_from`` [K] with the Arrhenius ``activation`` [J/mol]
    (0: β does not change with temperature; an infinite β stays infinite)."""
    if activation == 0.0 or T == T_from or math.isinf(beta):
        return beta
    return beta * math.exp(-activation / GAS_CONSTANT * (1.0 / T - 1.0 / T_from))

GUNNARSON_COEFFICIENTS = {"Si": 0.055, "Mn": -0.013, "Cr": -0.040, "Ni": 0.014, "Mo": -0.013}


def Gunnarson_alloy_factor(composition: dict[str, float]) -> float:
    r"""Alloy factor: equilibrium carbon of an alloy steel over that of plain carbon steel in the same gas.

    .. math::
        \log_{10}\frac{\%C_\mathrm{plain}}{\%C_\mathrm{alloy}} = 0.055\,Si - 0.013\,Mn
            - 0.040\,Cr + 0.014\,Ni - 0.013\,Mo

    and the factor returned is :math:`\%C_\mathrm{alloy} / \%C_\mathrm{plain}`.

    Parameters
    ----------
    composition : dict
        Element symbol → content, [wt %]; missing elements count as zero.

    Returns
    -------
    factor : float
        Ratio of equilibrium surface carbon, alloy / plain, [-]

    Notes
    -----
    Valid for low-alloy carburizing steels (a few percent of alloying elements in total) in
    austenite at usual carburizing temperatures. Chromium, manganese and molybdenum lower
    the carbon activity and so raise the surface carbon; silicon and nickel do the reverse.
    The relation is as quoted in heat-treating handbooks (from memory).

    Examples
    --------
    >>> round(Gunnarson_alloy_factor({"Si": 0.25, "Mn": 0.80, "Cr": 0.50, "Ni": 0.55, "Mo": 0.20}), 4)
    1.027

    References
    ----------
    .. [1] Gunnarson, S. "Structure anomalies in the surface zone of gas-carburized
       case-hardened steel." Härterei-Technische Mitteilungen 22 (1967): 293–295
       (as quoted in ASM Handbook Vol. 4, Heat Treating, 1991, "Gas Carburizing"; from memory).
    """
    exponent = sum(coef * float(composition.get(el, 0.0)) for el, coef in GUNNARSON_COEFFICIENTS.items())
    return 10.0 ** (-exponent)


def equilibrium_surface_carbon(carbon_potential: float, alloy_factor: float = 1.0) -> float:
    """Surface carbon [wt %] of a steel in equilibrium with a gas of the given carbon potential [wt %]."""
    return carbon_potential * alloy_factor


def steel_saturation_carbon(T: float, alloy_factor: float = 1.0) -> float:
    """Carbon saturation of the steel's austenite [wt %] at T [K].

    The plain Fe–C Acm value scaled by the alloy factor: carbides form when the gas would hold the
    steel at a carbon activity above that of plain austenite at saturation. An approximation that
    treats the alloy effect on the activity as a constant factor (as the Gunnarson relation does).
    """
    return saturation_carbon(T) * alloy_factor
