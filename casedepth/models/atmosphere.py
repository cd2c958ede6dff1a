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

A reading is read only where it means a carburizing gas (:func:`probe_window`): above 0 mV (0 mV is a
gas as rich in oxygen as the air reference), below the reading of graphite saturation (a_C = 1: soot
deposits and the gas cannot stay there) and at or above the reading of the least potential that
carburizes — 0.10 %C, or the potential that holds the steel's core carbon where the steel is given.
The probe relation takes only millivolts; dew point and CO2 readings are not converted here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .. import formats
from ..constants import GAS_CONSTANT as R, ZERO_CELSIUS
from ..errors import InputError
from ..units import temperature_range

AIR_OXYGEN = 0.209  # atm, the probe's reference
#: CO in endothermic gas made from natural gas, about 20 vol % (common practice; 23–24 % from propane)
ENDO_CO_FRACTION = 0.20
#: the least carbon potential a probe reading is read for: leaner gas decarburizes every case-hardening steel
#: (the leanest grade of the library holds 0.105 %C), and the activity relation is quoted from about 0.1 %C
LEAST_CARBURIZING_POTENTIAL = 0.10  # wt % C
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
                                     f"{low:g}–{high:g} wt % at {formats.temperature(T)}")
    return illinois(miss, low, f_low, high, f_high, 1e-13, 1e-13)


def _check(T: float, CO: float) -> None:
    lo, hi = TEMPERATURE_RANGE
    if not (math.isfinite(T) and lo <= T <= hi):
        raise InputError("temperature", f"{formats.typed(T - ZERO_CELSIUS, '°C')} is outside {temperature_range(lo, hi)}")
    if not (math.isfinite(CO) and 0.05 <= CO <= 0.5):
        raise InputError("carrier_co", f"{CO * 100:g} % CO is outside 5–50 %")


def carbon_activity_from_probe(E: float, T: float, CO: float) -> float:
    r"""Carbon activity (graphite reference) of a gas from its probe voltage [mV], temperature [K] and CO
    fraction [-], by the equilibrium C + ½ O2 = CO: :math:`a_C = p_{CO} / (K\,p_{O_2}^{1/2})`."""
    return CO / (CO_formation_constant(T) * math.sqrt(oxygen_probe_pressure(E, T)))


def probe_voltage_for_activity(activity: float, T: float, CO: float) -> float:
    """The probe voltage [mV] of a gas of carbon activity ``activity`` [-] at T [K] and CO fraction [-];
    inverse of :func:`carbon_activity_from_probe`."""
    return probe_voltage((CO / (CO_formation_constant(T) * activity)) ** 2, T)


@dataclass(frozen=True)
class ProbeWindow:
    """The readings that mean a carburizing gas at one temperature and CO content: from the least potential read
    (``least``, at ``least_mv``) up to graphite saturation (``graphite``, at ``graphite_mv``, not included)."""

    least: float  # wt % C
    least_mv: float
    graphite: float  # wt % C, the potential at a_C = 1
    graphite_mv: float
    T: float  # K
    CO: float  # fraction

    def where(self) -> str:
        return f"at {formats.temperature(self.T)} with {formats.percent(self.CO * 100)} CO"

    def text(self, potentials_first: bool = False) -> str:
        mv, pct = f"{self.least_mv:.0f}–{self.graphite_mv:.0f} mV", formats.carbon_range(self.least, self.graphite)
        return f"{pct} ({mv}) {self.where()}" if potentials_first else f"{mv} ({pct}) {self.where()}"


def probe_window(T: float, CO: float = ENDO_CO_FRACTION, core_potential: float | None = None) -> ProbeWindow:
    """The readings of a carburizing gas at T [K] and CO fraction [-]: from :data:`LEAST_CARBURIZING_POTENTIAL`
    (or ``core_potential`` [wt % C], the potential that holds a steel's core carbon, if higher) to graphite.

    Examples
    --------
    >>> window = probe_window(1198.15)
    >>> round(window.least_mv), round(window.graphite_mv), round(window.graphite, 2)
    (1014, 1166, 1.26)
    """
    _check(T, CO)
    least = LEAST_CARBURIZING_POTENTIAL
    if core_potential is not None:
        if not (math.isfinite(core_potential) and 0.0 <= core_potential <= 2.0):
            raise InputError("core_potential", f"{formats.typed(core_potential, '%C')} is outside 0–2 %C")
        least = max(least, core_potential)
    return ProbeWindow(least, probe_voltage_for_activity(austenite_carbon_activity(least, T), T, CO),
                       carbon_for_activity(1.0, T), probe_voltage_for_activity(1.0, T, CO), T, CO)


def _below_window(window: ProbeWindow, core_potential: float | None) -> str:
    """Why the floor of ``window`` is where it is, in words."""
    if core_potential is not None and window.least > LEAST_CARBURIZING_POTENTIAL:
        return f"the potential that holds the steel's core carbon ({formats.carbon(window.least)}, {window.least_mv:.0f} mV)"
    return f"{formats.carbon(window.least)} ({window.least_mv:.0f} mV), below which every case-hardening steel loses carbon"


def carbon_potential_from_probe(E: float, T: float, CO: float = ENDO_CO_FRACTION,
                                core_potential: float | None = None) -> float:
    """Carbon potential [wt % C] of a carburizing gas from the probe voltage [mV] at T [K] and its CO
    fraction [-] (default 20 % CO, endothermic gas from natural gas).

    A reading is refused (:class:`InputError` against ``"mv"``, naming the limit in mV and %C) unless it means
    a carburizing gas, :func:`probe_window`: at or below 0 mV it is no furnace atmosphere (0 mV is air); at or
    above graphite saturation soot deposits; below the least potential — 0.10 %C, or ``core_potential`` [wt % C],
    the potential that holds the steel's core carbon (its core carbon over its alloy factor) — the gas
    decarburizes.

    Examples
    --------
    >>> round(carbon_potential_from_probe(1150.0, 1198.15), 2)
    1.02
    """
    window = probe_window(T, CO, core_potential)
    if not (math.isfinite(E) and E > 0.0):
        raise InputError("mv", f"{E:g} mV is not a reading of a furnace atmosphere: an air-reference probe reads above "
                               f"0 mV in any gas with less oxygen than air (Nernst); carburizing readings are "
                               f"{window.text()}")
    if E >= window.graphite_mv:  # compared in millivolts: the activity of a huge reading overflows
        try:
            activity = carbon_activity_from_probe(E, T, CO)
        except (OverflowError, ZeroDivisionError):
            activity = math.inf
        meaning = f"a carbon activity of {activity:.2f}" if activity < 1e6 else "a carbon activity far above 1"
        raise InputError("mv", f"{E:g} mV {window.where()} means {meaning}, at or above "
                               f"graphite saturation ({window.graphite_mv:.0f} mV, {formats.carbon(window.graphite)}): "
                               f"soot would deposit; check the probe, the temperature and the CO content; carburizing "
                               f"readings are {window.text()}")
    activity = carbon_activity_from_probe(E, T, CO)
    if E < window.least_mv:
        try:
            meaning = formats.carbon(carbon_for_activity(activity, T))
        except InputError:  # leaner than the relation reaches
            meaning = "next to no carbon"
        raise InputError("mv", f"{E:g} mV {window.where()} means {meaning}, a decarburizing atmosphere: readings "
                               f"start at {_below_window(window, core_potential)}; carburizing readings are "
                               f"{window.text()}")
    return carbon_for_activity(activity, T)


def check_carburizing_potential(carbon_potential: float, T: float, CO: float = ENDO_CO_FRACTION,
                                core_potential: float | None = None) -> None:
    """Refuse a carbon potential [wt % C] a probe would not read in a carburizing gas at T [K] and CO fraction
    [-] (:func:`probe_window`): at or above graphite saturation, or below the least potential (0.10 %C or
    ``core_potential``). Plans allow such potentials with a warning; a probe setting is refused."""
    window = probe_window(T, CO, core_potential)
    if not math.isfinite(carbon_potential):
        raise InputError("carbon_potential", f"{carbon_potential:g} is not a number; carburizing potentials are "
                                             f"{window.text(True)}")
    if carbon_potential >= window.graphite:
        raise InputError("carbon_potential", f"{formats.typed(carbon_potential, '%C')} is at or above graphite "
                                             f"saturation {window.where()} ({formats.carbon(window.graphite)}, "
                                             f"{window.graphite_mv:.0f} mV): "
                                             f"soot would deposit; carburizing potentials are {window.text(True)}")
    if carbon_potential < window.least:
        raise InputError("carbon_potential", f"{formats.typed(carbon_potential, '%C')} {window.where()} is a "
                                             f"decarburizing atmosphere: potentials start at {_below_window(window, core_potential)}; "
                                             f"carburizing potentials are {window.text(True)}")


def probe_voltage_for_potential(carbon_potential: float, T: float, CO: float = ENDO_CO_FRACTION) -> float:
    """The probe voltage [mV] that means a carbon potential [wt % C] at T [K] and CO fraction [-].

    Examples
    --------
    >>> round(probe_voltage_for_potential(1.0, 1198.15))
    1149
    """
    _check(T, CO)
    if not (math.isfinite(carbon_potential) and 0.05 <= carbon_potential <= 2.0):
        raise InputError("carbon_potential", f"{formats.typed(carbon_potential, '%C')} is outside 0.05–2 %C")
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
