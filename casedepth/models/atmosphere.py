"""The carburizing atmosphere as the furnace measures it: oxygen-probe millivolts ↔ carbon potential.

Furnaces controlled by an oxygen (zirconia) probe read a voltage; a plan speaks of carbon
potential. In endothermic gas the carbon activity follows from the probe's oxygen pressure and the
CO content through the reaction C + ½ O2 = CO, and the carbon potential (the carbon content of
plain iron in equilibrium with the gas) from the activity of carbon in austenite.

* Nernst equation of the probe with air reference, E [mV] = 0.0496 T log10(0.209 / pO2) — exact;
* standard Gibbs energy of C(graphite) + ½ O2 = CO, ΔG° = −111 700 − 87.65 T J/mol — standard
  thermochemical data (as tabulated in e.g. Gaskell, Introduction to the Thermodynamics of
  Materials), from memory;
* activity of carbon in austenite, log10 a_C = 2300/T − 2.21 + 0.15 %C + log10 %C — a handbook
  relation, from memory.

Controllers in service apply their own corrections (a CO factor or process factor set against shim
stock or a dew point); the relation here is the ideal one, and a shop should trim it the same way.
Temperatures in K, pressures in atm, millivolts in mV, carbon in wt %.
"""

from __future__ import annotations

import math

from ..constants import GAS_CONSTANT as R, ZERO_CELSIUS
from ..errors import InputError

AIR_OXYGEN = 0.209  # atm, the probe's reference
#: CO in endothermic gas made from natural gas, about 20 vol % (common practice; 23–24 % from propane)
ENDO_CO_FRACTION = 0.20
PROBE_RANGE_MV = (900.0, 1300.0)  # readings of carburizing atmospheres
TEMPERATURE_RANGE = (800.0 + ZERO_CELSIUS, 1100.0 + ZERO_CELSIUS)  # K, austenite with carburizing gas


def oxygen_probe_pressure(E: float, T: float) -> float:
    r"""Oxygen partial pressure from a zirconia probe with air reference (Nernst equation).

    .. math:: E = 0.0496\,T \log_{10}\frac{0.209}{p_{O_2}}

    Parameters
    ----------
    E : float
        Probe voltage, [mV]
    T : float
        Probe (furnace) temperature, [K]

    Returns
    -------
    pO2 : float
        Oxygen partial pressure in the furnace, [atm]

    Notes
    -----
    0.0496 mV/K is R ln10 / 4F; exact for an ideal probe. Valid wherever the probe conducts (above
    about 650 °C).

    Examples
    --------
    >>> f"{oxygen_probe_pressure(1150.0, 1198.15):.2e}"
    '9.31e-21'
    """
    return AIR_OXYGEN * 10.0 ** (-E / (0.0496 * T))


def probe_voltage(pO2: float, T: float) -> float:
    """The probe voltage [mV] for an oxygen pressure [atm] at T [K]; inverse of :func:`oxygen_probe_pressure`."""
    return 0.0496 * T * math.log10(AIR_OXYGEN / pO2)


def CO_formation_constant(T: float) -> float:
    r"""Equilibrium constant of C(graphite) + ½ O2 = CO, K = p_CO / (a_C p_O2^½).

    .. math:: \Delta G^\circ = -111\,700 - 87.65\,T \ \mathrm{J/mol}, \qquad K = \exp(-\Delta G^\circ / RT)

    Parameters
    ----------
    T : float
        Temperature, [K]

    Returns
    -------
    K : float
        [atm^-1/2]

    Notes
    -----
    Standard thermochemical data (from memory); valid 700–1400 °C.

    Examples
    --------
    >>> f"{CO_formation_constant(1198.15):.3g}"
    '2.8e+09'

    References
    ----------
    .. [1] Gaskell, D. R. Introduction to the Thermodynamics of Materials, table of standard Gibbs
       energies of formation (from memory).
    """
    return math.exp((111700.0 + 87.65 * T) / (R * T))


def austenite_carbon_activity(carbon: float, T: float) -> float:
    r"""Activity of carbon (graphite reference) in plain-carbon austenite.

    .. math:: \log_{10} a_C = \frac{2300}{T} - 2.21 + 0.15\,\%C + \log_{10}\%C

    Parameters
    ----------
    carbon : float
        Carbon content, [wt %]
    T : float
        Temperature, [K]

    Returns
    -------
    a_C : float
        [-]

    Notes
    -----
    A handbook relation (from memory); valid in austenite, about 0.1–1.3 %C at 850–1000 °C.

    Examples
    --------
    >>> round(austenite_carbon_activity(1.0, 1198.15), 3)
    0.724
    """
    return 10.0 ** (2300.0 / T - 2.21 + 0.15 * carbon) * carbon


def carbon_for_activity(activity: float, T: float) -> float:
    """Carbon content [wt %] of plain austenite at T [K] whose carbon activity is ``activity`` (0.0001–5 wt %).

    Examples
    --------
    >>> round(carbon_for_activity(austenite_carbon_activity(0.8, 1198.15), 1198.15), 9)
    0.8
    """
    from ..numerics.roots import illinois

    low, high = 1e-4, 5.0
    target = math.log10(activity)

    def miss(c: float) -> float:
        return math.log10(austenite_carbon_activity(c, T)) - target

    f_low, f_high = miss(low), miss(high)
    if not (f_low <= 0.0 <= f_high):
        raise InputError("activity", f"a carbon activity of {activity:.3g} means a carbon content outside "
                                     f"{low:g}–{high:g} wt % at {T - ZERO_CELSIUS:.0f} °C")
    return illinois(miss, low, f_low, high, f_high, 1e-13, 1e-13)


def _check(T: float, CO: float) -> None:
    lo, hi = TEMPERATURE_RANGE
    if not (math.isfinite(T) and lo <= T <= hi):
        raise InputError("temperature", f"{T - ZERO_CELSIUS:.0f} °C is outside {lo - ZERO_CELSIUS:.0f}–{hi - ZERO_CELSIUS:.0f} °C")
    if not (math.isfinite(CO) and 0.05 <= CO <= 0.5):
        raise InputError("carrier_co", f"{CO * 100:g} % CO is outside 5–50 %")


def carbon_potential_from_probe(E: float, T: float, CO: float = ENDO_CO_FRACTION) -> float:
    """Carbon potential [wt % C] of a carburizing gas from the probe voltage [mV] at T [K] and its CO
    fraction [-] (default 20 % CO, endothermic gas from natural gas).

    Examples
    --------
    >>> round(carbon_potential_from_probe(1150.0, 1198.15), 2)
    1.02
    """
    _check(T, CO)
    if not (math.isfinite(E) and PROBE_RANGE_MV[0] <= E <= PROBE_RANGE_MV[1]):
        raise InputError("mv", f"{E:g} mV is outside {PROBE_RANGE_MV[0]:g}–{PROBE_RANGE_MV[1]:g} mV")
    activity = CO / (CO_formation_constant(T) * math.sqrt(oxygen_probe_pressure(E, T)))
    if activity >= 1.0:
        raise InputError("mv", f"{E:g} mV at {T - ZERO_CELSIUS:.0f} °C with {CO * 100:g} % CO means a carbon activity of "
                               f"{activity:.2f}, at or above graphite (soot would deposit): not a carburizing reading; "
                               f"check the probe, the temperature and the CO content")
    return carbon_for_activity(activity, T)


def probe_voltage_for_potential(carbon_potential: float, T: float, CO: float = ENDO_CO_FRACTION) -> float:
    """The probe voltage [mV] that means a carbon potential [wt % C] at T [K] and CO fraction [-].

    Examples
    --------
    >>> round(probe_voltage_for_potential(1.0, 1198.15))
    1149
    """
    _check(T, CO)
    if not (math.isfinite(carbon_potential) and 0.05 <= carbon_potential <= 2.0):
        raise InputError("carbon_potential", f"{carbon_potential:g} %C is outside 0.05–2 %C")
    activity = austenite_carbon_activity(carbon_potential, T)
    pO2 = (CO / (CO_formation_constant(T) * activity)) ** 2
    return probe_voltage(pO2, T)


#: stages whose potential a probe controller holds at a steady temperature
_HELD_STAGES = ("soak", "boost", "diffuse", "equalize")


def probe_setpoints(stages, CO: float = ENDO_CO_FRACTION) -> list[tuple[str, float]]:
    """Probe voltages [mV] for the held carburizing stages of a cycle: ``[(stage label, mV), …]``.

    ``stages`` are :class:`casedepth.recipe.Stage` objects; ramps (heat-up, drop) and stages without
    a potential are skipped. The voltages are those of an ideal probe (see the module notes).
    """
    out = []
    for stage in stages:
        if stage.kind in _HELD_STAGES and stage.temperature is not None and stage.carbon_potential is not None \
                and stage.duration > 0:
            out.append((stage.label, probe_voltage_for_potential(stage.carbon_potential, stage.temperature, CO)))
    return out
