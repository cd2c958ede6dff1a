"""The surface of the part: what the atmosphere offers and how fast carbon crosses the surface.

* the alloy factor (Gunnarson) between the atmosphere's carbon potential, which is defined
  on plain carbon steel, and the equilibrium surface carbon of an alloy steel;
* the mass-transfer (surface reaction) coefficient β of the boundary J = β (C_eq − C_s) (EN 10052
  definition; the solver applies it);
* the carbon saturation of the steel, for the carbide/soot warning.
"""

from __future__ import annotations

from .austenite import saturation_carbon

# Mass-transfer coefficient for endothermic-gas carburizing at 900–950 °C. Published values
# lie about 1–3e-5 cm/s and rise with pCO·pH2 (Ruck, Monceau & Grabke 1996; Karabelchtchikova
# 2007); 1.5e-5 cm/s is a mid-range value (from memory, no single source).
DEFAULT_BETA = 1.5e-7  # m/s

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
