"""The carburizing atmosphere in the readings furnaces are run on: oxygen-probe millivolts, dew point, CO2,
and the carbon potential itself (what a shim-stock test measures).

A plan speaks of carbon potential; the furnace is controlled and checked on a reading of its gas. Each
reading fixes the carbon activity of the gas through one equilibrium with graphite, at the CO and H2
contents of the carrier gas:

* probe:      C + ½ O2 = CO          a_C = p_CO / (K₁ p_O2^½), p_O2 from the Nernst equation of the probe;
* CO2:        C + CO2 = 2 CO         a_C = p_CO² / (K₂ p_CO2);
* dew point:  C + H2O = CO + H2      a_C = p_CO p_H2 / (K₃ p_H2O), p_H2O from the dew point (Buck 1981);

and the carbon potential (the carbon of plain iron in equilibrium with the gas) from the activity of carbon
in austenite. In a gas at equilibrium the three readings agree (the water-gas shift CO + H2O = CO2 + H2 is
K₂/K₃ apart); a furnace's gas is near it at temperature.

* Nernst equation of the probe with air reference, E [mV] = 0.0496 T log10(0.209 / pO2) — exact;
* standard Gibbs energies (1 bar standard state) as linear fits over 800–1100 °C of the NASA Glenn
  polynomials (McBride, Zehe & Gordon, NASA TP-2002-211556, 2002; they reproduce the JANAF tables, Chase
  1998, within a few tens of J/mol): :data:`GAS_DATA`; each fit's largest residual is stated beside it;
* activity of carbon in austenite, log10 a_C = 2300/T − 2.21 + 0.15 %C + log10 %C — a handbook relation,
  from memory (checked against the Acm line: graphite saturation within 0.1 %C);
* saturation vapour pressure over water, e = 6.1121 exp(17.502 t / (240.97 + t)) hPa (Buck, J. Appl.
  Meteorol. 20 (1981) 1527), the dew point over water also below 0 °C.

The carrier's CO and H2 are taken as the carrier's own (:data:`CARRIERS`): the CO2, H2O and CH4 the gas also
holds are a few tenths of a percent and change them little. Controllers in service apply their own
corrections (a CO factor or process factor set against shim stock); the relations here are the ideal ones,
and a shop should trim them the same way. Temperatures in K, fractions of the gas by volume, carbon in wt %.

A reading is read only where it means a carburizing gas (:func:`reading_window`): at or above the least
potential that carburizes — 0.10 %C, or the potential that holds the steel's core carbon where the steel is
given — and below graphite saturation (a_C = 1: soot deposits and the gas cannot stay there); a probe
reading also above 0 mV (0 mV is a gas as rich in oxygen as the air reference).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

from .. import formats
from ..constants import GAS_CONSTANT as R, ZERO_CELSIUS
from ..errors import InputError
from ..units import temperature_range

AIR_OXYGEN = 0.209  # the probe's reference: the oxygen fraction of air
NERNST_SLOPE = 0.0496  # mV/K, R ln10 / 4F for an ideal probe
#: the least carbon potential a reading is read for: leaner gas decarburizes every case-hardening steel
#: (the leanest grade of the library holds 0.105 %C), and the activity relation is quoted from about 0.1 %C
LEAST_CARBURIZING_POTENTIAL = 0.10  # wt % C
TEMPERATURE_RANGE = (800.0 + ZERO_CELSIUS, 1100.0 + ZERO_CELSIUS)  # K, austenite with carburizing gas
CO_RANGE = (0.05, 0.50)  # fraction of the gas
H2_RANGE = (0.0, 0.80)
DEW_POINT_RANGE = (-40.0 + ZERO_CELSIUS, 60.0 + ZERO_CELSIUS)  # K, where Buck's relation is used here


# -- the carrier gas --------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Carrier:
    """A carrier gas: its CO and H2 by volume (the rest N2) and where those figures come from."""

    key: str
    label: str
    short: str  # for one-line set points: "natural-gas endo"
    co: float  # fraction
    h2: float  # fraction
    source: str


#: the carrier gases a plan names; CO and H2 are a new plan's (editable: an enriched or trimmed gas is typed in)
CARRIERS: dict[str, Carrier] = {c.key: c for c in (
    Carrier("natural-gas-endo", "Endothermic gas from natural gas", "natural-gas endo", 0.20, 0.40,
            "about 20 % CO, 40 % H2, 40 % N2 (common practice; CH4 + ½ air → CO + 2 H2 + 1.9 N2 gives 20.5/41)"),
    Carrier("propane-endo", "Endothermic gas from propane", "propane endo", 0.235, 0.315,
            "about 23–24 % CO, 31–32 % H2, 44–45 % N2 (common practice; C3H8 + 1.5 O2 in air → 3 CO + 4 H2 + 5.6 N2)"),
    Carrier("nitrogen-methanol", "Nitrogen–methanol (40 % N2)", "nitrogen–methanol", 0.20, 0.40,
            "methanol cracks to CO + 2 H2: with 40 % N2 the gas is 20 % CO, 40 % H2 (stoichiometry; the 40/60 "
            "mix is common practice)"),
    Carrier("own", "Own mix (CO and H2 as typed)", "own mix", 0.20, 0.40, "the shop's own analysis"),
)}
DEFAULT_CARRIER = "natural-gas-endo"


def carrier_from_text(text: str, field: str = "carrier") -> tuple[str, float, float]:
    """``natural-gas-endo``, ``propane-endo``, ``nitrogen-methanol`` or an own mix ``"CO=20 H2=40"`` (vol %):
    (carrier key, CO fraction, H2 fraction)."""
    words = str(text).strip()
    if words in CARRIERS and words != "own":
        c = CARRIERS[words]
        return c.key, c.co, c.h2
    parts = {}
    for item in words.replace(",", " ").split():
        name, sep, number = item.partition("=")
        name = name.strip().upper()
        if not sep or name not in ("CO", "H2"):
            raise InputError(field, f"{words[:60]!r} is not a carrier: give one of "
                                    f"{', '.join(k for k in CARRIERS if k != 'own')} or \"CO=20 H2=40\" (vol %)")
        try:
            parts[name] = float(number.strip().rstrip("%")) / 100.0
        except ValueError:
            raise InputError(field, f"{item!r}: the {name} content must be a number (vol %)") from None
    if "CO" not in parts:
        raise InputError(field, f"{words[:60]!r}: an own mix needs its CO, e.g. \"CO=20 H2=40\" (vol %)")
    co, h2 = parts["CO"], parts.get("H2", 0.0)
    check_carrier(co, h2, field)
    return "own", co, h2


def reading_from_text(text: str, field: str = "potential_as") -> tuple[str, float]:
    """A reading as a person writes it: ``1150mV`` (probe), ``dew point 20F`` / ``dp -7C`` (a bare number °C),
    ``CO2 0.15%`` (vol %), or ``1.0%C`` (a potential): (reading key, value in SI)."""
    from ..units import parse_number, parse_temperature

    words = " ".join(str(text).split()).strip()
    low = words.lower()
    try:
        if low.endswith("mv"):
            return "mv", parse_number(words[:-2].strip(), field)
        for prefix in ("dew point", "dewpoint", "dp"):
            if low.startswith(prefix):
                return "dew_point", parse_temperature(words[len(prefix):].strip(), field)
        if low.startswith("co2"):
            return "co2", parse_number(words[3:].strip().rstrip("%").strip(), field) / 100.0
        if low.endswith("%c"):
            return "carbon_potential", parse_number(words[:-2].strip(), field)
    except InputError:
        pass
    raise InputError(field, f"{words[:60]!r} is not a reading: write 1150mV, \"dew point 20F\", \"CO2 0.15%\" or 1.0%C")


def check_carrier(co: float, h2: float, field: str = "carrier_co") -> None:
    """Refuse a CO or H2 fraction outside what the relations here cover, or more than the whole gas."""
    if not (math.isfinite(co) and CO_RANGE[0] <= co <= CO_RANGE[1]):
        raise InputError(field, f"{formats.percent(co * 100)} CO is outside "
                                f"{formats.typed_range(CO_RANGE[0] * 100, CO_RANGE[1] * 100, '%')}")
    if not (math.isfinite(h2) and H2_RANGE[0] <= h2 <= H2_RANGE[1]):
        raise InputError("carrier_h2" if field == "carrier_co" else field,
                         f"{formats.percent(h2 * 100)} H2 is outside "
                         f"{formats.typed_range(H2_RANGE[0] * 100, H2_RANGE[1] * 100, '%')}")
    if co + h2 > 1.0:
        raise InputError("carrier_h2" if field == "carrier_co" else field,
                         f"{co * 100:g} % CO and {h2 * 100:g} % H2 are more than the whole gas")


# -- thermochemistry --------------------------------------------------------------------------------------------------
#: CO + ½ O2 = CO2: ΔG° = a + b·T [J/mol], 800–1100 °C; NASA Glenn polynomials (McBride, Zehe & Gordon 2002),
#: linear fit computed for this project, largest residual 27 J/mol
CO_TO_CO2 = (-281723.2, 86.2226)
#: H2 + ½ O2 = H2O(g): ΔG° = a + b·T [J/mol], 800–1100 °C; the same polynomials and fit, largest residual 32 J/mol
H2_TO_H2O = (-249061.8, 56.3844)


@dataclass(frozen=True)
class GasData:
    """One set of standard Gibbs energies for the readings, as a plan names it.

    ``co_formation`` is C(graphite) + ½ O2 = CO, ΔG° = a + b·T [J/mol]; the CO2 and dew-point equilibria follow
    from it with :data:`CO_TO_CO2` and :data:`H2_TO_H2O`. ``pressure`` is the furnace's total pressure in the
    units of the standard state (1 atm over a 1 bar standard state is 1.01325)."""

    key: str
    display: str
    co_formation: tuple[float, float]
    pressure: float
    source: str
    superseded_by: str | None = None

    def gibbs(self, reaction: str, T: float) -> float:
        """ΔG° [J/mol] at T [K] of ``probe`` (C + ½O2 = CO), ``co2`` (C + CO2 = 2CO) or ``dew_point``
        (C + H2O = CO + H2)."""
        a, b = self.co_formation
        formation = a + b * T
        if reaction == "probe":
            return formation
        other = CO_TO_CO2 if reaction == "co2" else H2_TO_H2O
        return formation - (other[0] + other[1] * T)

    def constant(self, reaction: str, T: float) -> float:
        """The equilibrium constant exp(−ΔG°/RT) of ``reaction`` at T [K]."""
        return math.exp(-self.gibbs(reaction, T) / (R * T))


GAS_DATA: dict[str, GasData] = {d.key: d for d in (
    GasData("nasa-glenn-2002", "NASA Glenn 2002 tables (fits)",
            (-113335.0, -87.07), 1.01325,
            "C + ½O2 = CO: −113 335 − 87.07 T J/mol, a fit of the NASA Glenn polynomials over 800–1100 °C, largest "
            "residual 39 J/mol; the JANAF tables (Chase 1998) agree within about 15 J/mol"),
    GasData("linear-first-release", "First releases' ΔG° (950 J/mol off)",
            (-111700.0, -87.65), 1.0,
            "a textbook linear form from memory, partial pressures taken as fractions; about 950 J/mol off the "
            "tables at 925 °C, which reads a probe 4–6 mV low", superseded_by="nasa-glenn-2002"),
)}
DEFAULT_GAS_DATA = "nasa-glenn-2002"


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


def oxygen_probe_pressure(E: float, T: float) -> float:
    r"""Oxygen partial pressure from a zirconia probe with air reference (Nernst equation), [atm].

    .. math:: E = 0.0496\,T \log_{10}\frac{0.209}{p_{O_2}}

    E in mV, T in K. 0.0496 mV/K is R ln10 / 4F; exact for an ideal probe, valid wherever the probe conducts
    (above about 650 °C).

    Examples
    --------
    >>> f"{oxygen_probe_pressure(1150.0, 1198.15):.2e}"
    '9.31e-21'
    """
    return AIR_OXYGEN * 10.0 ** (-E / (NERNST_SLOPE * T))


def probe_voltage(pO2: float, T: float) -> float:
    """The probe voltage [mV] for an oxygen pressure [atm] at T [K]; inverse of :func:`oxygen_probe_pressure`."""
    return NERNST_SLOPE * T * math.log10(AIR_OXYGEN / pO2)


def water_vapour_pressure(dew_point: float) -> float:
    """Saturation vapour pressure over water [hPa] at the dew point [K] (Buck 1981; −40 to +60 °C used here).

    Examples
    --------
    >>> round(water_vapour_pressure(273.15 + 20.0), 2)
    23.37
    """
    t = dew_point - ZERO_CELSIUS
    return 6.1121 * math.exp(17.502 * t / (240.97 + t))


def dew_point_for_pressure(pressure: float) -> float:
    """The dew point [K] of water vapour at ``pressure`` [hPa]; inverse of :func:`water_vapour_pressure`."""
    x = math.log(pressure / 6.1121)
    return 240.97 * x / (17.502 - x) + ZERO_CELSIUS


# -- the readings -----------------------------------------------------------------------------------------------------
ONE_ATMOSPHERE_HPA = 1013.25


@dataclass(frozen=True)
class Gas:
    """A carburizing gas at temperature ``T`` [K]: its carrier's CO and H2 fractions and the thermochemistry it is
    read with (a key of :data:`GAS_DATA`). Turns a reading into the gas's carbon activity and back."""

    T: float
    co: float = 0.20
    h2: float = 0.40
    data: str = DEFAULT_GAS_DATA

    def __post_init__(self):
        lo, hi = TEMPERATURE_RANGE
        if not (math.isfinite(self.T) and lo <= self.T <= hi):
            raise InputError("temperature", f"{formats.typed(self.T - ZERO_CELSIUS, '°C')} is outside "
                                            f"{temperature_range(lo, hi)}")
        check_carrier(self.co, self.h2)
        if self.data not in GAS_DATA:
            raise InputError("gas_data", f"unknown {self.data!r}; choose one of {', '.join(GAS_DATA)}")

    @property
    def thermo(self) -> GasData:
        return GAS_DATA[self.data]

    def activity(self, kind: str, value: float) -> float:
        """The carbon activity [-] a reading of ``kind`` (a key of :data:`READINGS`) means; ``value`` in SI (mV,
        K for a dew point, a fraction for CO2, wt % for a potential)."""
        P, T = self.thermo.pressure, self.T
        if kind == "carbon_potential":
            return austenite_carbon_activity(value, T)
        if kind == "mv":
            return P * self.co / (self.thermo.constant("probe", T) * math.sqrt(P * oxygen_probe_pressure(value, T)))
        if kind == "co2":
            return P * self.co ** 2 / (self.thermo.constant("co2", T) * value)
        if kind == "dew_point":
            water = water_vapour_pressure(value) / ONE_ATMOSPHERE_HPA  # fraction of the gas (sampled at 1 atm)
            return P * self.co * self.h2 / (self.thermo.constant("dew_point", T) * water)
        raise KeyError(kind)

    def reading(self, kind: str, activity: float) -> float:
        """The reading of ``kind`` [SI] that means carbon activity ``activity``; inverse of :meth:`activity`."""
        P, T = self.thermo.pressure, self.T
        if kind == "carbon_potential":
            return carbon_for_activity(activity, T)
        if kind == "mv":
            return probe_voltage((self.co / (self.thermo.constant("probe", T) * activity)) ** 2 * P, T)
        if kind == "co2":
            return P * self.co ** 2 / (self.thermo.constant("co2", T) * activity)
        if kind == "dew_point":
            if self.h2 <= 0.0:
                raise InputError("carrier_h2", "a gas without hydrogen has no dew point to read: give its H2")
            water = P * self.co * self.h2 / (self.thermo.constant("dew_point", T) * activity)
            return dew_point_for_pressure(water * ONE_ATMOSPHERE_HPA)
        raise KeyError(kind)

    def where(self) -> str:
        return f"at {formats.temperature(self.T)} with {formats.percent(self.co * 100)} CO, {formats.percent(self.h2 * 100)} H2"


@dataclass(frozen=True)
class Reading:
    """One kind of reading: its field name (the command line's option), label, unit in words, whether a higher
    reading is a richer gas, and how it is shown (SI in)."""

    key: str
    label: str
    richer_when_higher: bool
    show: Callable[[float], str]
    json_key: str
    to_json: Callable[[float], float]

    @property
    def title(self) -> str:
        """The label at the start of a line: ``Probe``, ``Dew point``, ``CO2``."""
        return self.label[:1].upper() + self.label[1:]

    def named(self, value: float) -> str:
        """The reading in a sentence: ``1200 mV``, ``a dew point of −7 °C / 20 °F``, ``0.010 % CO2``."""
        return {"dew_point": f"a dew point of {self.show(value)}", "co2": f"{self.show(value)} CO2"}.get(
            self.key, self.show(value))


READINGS: dict[str, Reading] = {r.key: r for r in (
    Reading("carbon_potential", "carbon potential", True, formats.carbon, "carbon_potential_pct", lambda v: v),
    Reading("mv", "probe", True, formats.millivolts, "probe_mv", lambda v: v),
    Reading("dew_point", "dew point", False, formats.dew_point, "dew_point_c", lambda v: v - ZERO_CELSIUS),
    Reading("co2", "CO2", False, formats.gas_percent, "co2_pct", lambda v: v * 100.0),
)}


@dataclass(frozen=True)
class ReadingWindow:
    """The potentials of a carburizing gas at one state: from the least potential read (``least``) up to graphite
    saturation (``graphite``, not included), with each reading at both ends."""

    gas: Gas
    least: float  # wt % C
    graphite: float  # wt % C, the potential at a_C = 1

    def at(self, kind: str, potential: float) -> float:
        return self.gas.reading(kind, austenite_carbon_activity(potential, self.gas.T)) if potential != self.graphite \
            else self.gas.reading(kind, 1.0)

    def span(self, kind: str) -> str:
        """``1014–1166 mV (0.10–1.26 %C)``: the readings of ``kind`` over the window, lean end first."""
        pct = formats.carbon_range(self.least, self.graphite)
        if kind == "carbon_potential":
            return pct
        show = READINGS[kind].show
        return f"{show(self.at(kind, self.least))} to {show(self.at(kind, self.graphite))} ({pct})" \
            if kind != "mv" else f"{self.at(kind, self.least):.0f}–{self.at(kind, self.graphite):.0f} mV ({pct})"

    def text(self, kind: str) -> str:
        return f"{self.span(kind)} {self.gas.where()}"


def reading_window(gas: Gas, core_potential: float | None = None) -> ReadingWindow:
    """The potentials (and readings) of a carburizing gas: from :data:`LEAST_CARBURIZING_POTENTIAL` (or
    ``core_potential`` [wt % C], the potential that holds a steel's core carbon, if higher) to graphite."""
    least = LEAST_CARBURIZING_POTENTIAL
    if core_potential is not None:
        if not (math.isfinite(core_potential) and 0.0 <= core_potential <= 2.0):
            raise InputError("core_potential", f"{formats.typed(core_potential, '%C')} is outside 0–2 %C")
        least = max(least, core_potential)
    return ReadingWindow(gas, least, carbon_for_activity(1.0, gas.T))


def _below_window(window: ReadingWindow, kind: str, core_potential: float | None) -> str:
    """Why the floor of ``window`` is where it is, in words."""
    shown = "" if kind == "carbon_potential" else f", {READINGS[kind].show(window.at(kind, window.least))}"
    if core_potential is not None and window.least > LEAST_CARBURIZING_POTENTIAL:
        return f"the potential that holds the steel's core carbon ({formats.carbon(window.least)}{shown})"
    return f"{formats.carbon(window.least)} ({READINGS[kind].show(window.at(kind, window.least))}), below which " \
           f"every case-hardening steel loses carbon" if kind != "carbon_potential" else \
        f"{formats.carbon(window.least)}, below which every case-hardening steel loses carbon"


def _check_value(kind: str, value: float, window: ReadingWindow) -> None:
    """Refuse a reading that is no reading of a furnace gas at all."""
    if kind == "mv" and not (math.isfinite(value) and value > 0.0):
        raise InputError("mv", f"{value:g} mV is not a reading of a furnace atmosphere: an air-reference probe reads "
                               f"above 0 mV in any gas with less oxygen than air (Nernst); carburizing readings are "
                               f"{window.text('mv')}")
    if kind == "co2" and not (math.isfinite(value) and 0.0 < value < 1.0):
        raise InputError("co2", f"{value * 100:g} % CO2 is not a reading of a carburizing gas; carburizing readings "
                                f"are {window.text('co2')}")
    if kind == "dew_point" and not (math.isfinite(value) and DEW_POINT_RANGE[0] <= value <= DEW_POINT_RANGE[1]):
        raise InputError("dew_point", f"a dew point of {formats.typed(value - ZERO_CELSIUS, '°C')} is outside "
                                      f"{temperature_range(*DEW_POINT_RANGE)}, which the vapour-pressure relation "
                                      f"covers here; carburizing readings are {window.text('dew_point')}")
    if kind == "carbon_potential" and not math.isfinite(value):
        raise InputError("carbon_potential", f"{value:g} is not a number; carburizing potentials are "
                                             f"{window.text('carbon_potential')}")


def potential_from_reading(kind: str, value: float, gas: Gas, core_potential: float | None = None) -> float:
    """The carbon potential [wt % C] a reading of ``kind`` (SI) means in ``gas``.

    A reading is refused (:class:`InputError` against the reading's key, naming the limit in the reading and in
    %C) unless it means a carburizing gas, :func:`reading_window`: at or beyond graphite saturation soot deposits;
    leaner than the least potential — 0.10 %C, or ``core_potential`` [wt % C], the potential that holds the steel's
    core carbon — the gas decarburizes.
    """
    if kind == "dew_point" and gas.h2 <= 0.0:
        raise InputError("carrier_h2", "a gas without hydrogen has no dew point to read: give its H2")
    window = reading_window(gas, core_potential)
    _check_value(kind, value, window)
    reading = READINGS[kind]
    show = reading.show
    graphite = window.at(kind, window.graphite)
    beyond = value >= graphite if reading.richer_when_higher else value <= graphite
    if beyond:
        if kind == "carbon_potential":
            raise InputError(kind, f"{formats.typed(value, '%C')} is at or above graphite saturation {gas.where()} "
                                   f"({formats.carbon(window.graphite)}, {window.at('mv', window.graphite):.0f} mV): "
                                   f"soot would deposit; carburizing potentials are {window.text(kind)}")
        try:
            activity = gas.activity(kind, value)
        except (OverflowError, ZeroDivisionError):
            activity = math.inf
        meaning = f"a carbon activity of {activity:.2f}" if activity < 1e6 else "a carbon activity far above 1"
        raise InputError(kind, f"{reading.named(value)} {gas.where()} means {meaning}, at or beyond graphite saturation "
                               f"({show(graphite)}, {formats.carbon(window.graphite)}): soot would deposit; check the "
                               f"instrument, the temperature and the carrier gas; carburizing readings are "
                               f"{window.text(kind)}")
    least = window.at(kind, window.least)
    leaner = value < least if reading.richer_when_higher else value > least
    if kind == "carbon_potential":
        if leaner:
            raise InputError(kind, f"{formats.typed(value, '%C')} {gas.where()} is a decarburizing atmosphere: "
                                   f"potentials start at {_below_window(window, kind, core_potential)}; carburizing "
                                   f"potentials are {window.text(kind)}")
        return value
    activity = gas.activity(kind, value)
    if leaner and abs(value - least) > 1e-9 * max(abs(least), 1.0):
        try:
            meaning = formats.carbon(carbon_for_activity(activity, gas.T))
        except InputError:  # leaner than the relation reaches
            meaning = "next to no carbon"
        raise InputError(kind, f"{reading.named(value)} {gas.where()} means {meaning}, a decarburizing atmosphere: readings "
                               f"start at {_below_window(window, kind, core_potential)}; carburizing readings are "
                               f"{window.text(kind)}")
    return carbon_for_activity(activity, gas.T)


def reading_for_potential(kind: str, potential: float, gas: Gas) -> float:
    """The reading of ``kind`` [SI] that means carbon potential ``potential`` [wt % C] in ``gas``."""
    if not (math.isfinite(potential) and 0.05 <= potential <= 2.0):
        raise InputError("carbon_potential", f"{formats.typed(potential, '%C')} is outside 0.05–2 %C")
    return gas.reading(kind, austenite_carbon_activity(potential, gas.T))


def readings_for_potential(potential: float, gas: Gas) -> dict[str, float]:
    """Every reading [SI] of a gas at ``potential`` [wt % C]: ``{reading key: value}`` in :data:`READINGS` order
    (no dew point for a gas without hydrogen)."""
    return {kind: reading_for_potential(kind, potential, gas) for kind in READINGS
            if not (kind == "dew_point" and gas.h2 <= 0.0)}


def convert_reading(kind: str, value: float, gas: Gas, core_potential: float | None = None) -> dict[str, float]:
    """One reading of ``kind`` [SI] in ``gas`` turned into all of them (the reading itself as given): what the
    command line's ``probe`` and the window's converter show. Refused as :func:`potential_from_reading` refuses."""
    potential = potential_from_reading(kind, value, gas, core_potential)
    readings = readings_for_potential(potential, gas)
    readings[kind] = value
    return readings


# -- the probe, as before: the functions the plan and the command line called --------------------------------------------
def carbon_potential_from_probe(E: float, T: float, CO: float = 0.20, core_potential: float | None = None,
                                h2: float = 0.40, data: str = DEFAULT_GAS_DATA) -> float:
    """Carbon potential [wt % C] of a carburizing gas from the probe voltage [mV] at T [K] and its CO fraction
    (default 20 % CO, endothermic gas from natural gas); see :func:`potential_from_reading`.

    Examples
    --------
    >>> round(carbon_potential_from_probe(1150.0, 1198.15), 3)
    0.951
    """
    return potential_from_reading("mv", E, Gas(T, CO, h2, data), core_potential)


def probe_voltage_for_potential(carbon_potential: float, T: float, CO: float = 0.20,
                                data: str = DEFAULT_GAS_DATA) -> float:
    """The probe voltage [mV] that means a carbon potential [wt % C] at T [K] and CO fraction [-].

    Examples
    --------
    >>> round(probe_voltage_for_potential(1.0, 1198.15))
    1153
    """
    return reading_for_potential("mv", carbon_potential, Gas(T, CO, 0.40, data))


@dataclass(frozen=True)
class FurnaceGas:
    """What a plan says of its furnace's gas: the carrier (a key of :data:`CARRIERS`), its CO and H2 fractions, the
    thermochemistry (a key of :data:`GAS_DATA`) and the reading the furnace is controlled on (a key of
    :data:`READINGS`)."""

    carrier: str = DEFAULT_CARRIER
    co: float = 0.20
    h2: float = 0.40
    data: str = DEFAULT_GAS_DATA
    control: str = "mv"

    @classmethod
    def of(cls, values) -> "FurnaceGas":
        """The gas a plan's values name (``carrier``, ``carrier_co`` and ``carrier_h2`` in vol %, ``gas_data``,
        ``control_reading``)."""
        return cls(values["carrier"], values["carrier_co"] / 100.0, values["carrier_h2"] / 100.0, values["gas_data"],
                   values["control_reading"])

    def at(self, T: float) -> Gas:
        return Gas(T, self.co, self.h2, self.data)

    def describe(self) -> str:
        """``natural-gas endo, 20 % CO, 40 % H2``."""
        return f"{CARRIERS[self.carrier].short}, {formats.percent(self.co * 100)} CO, {formats.percent(self.h2 * 100)} H2"

    def to_dict(self) -> dict:
        return {"carrier": self.carrier, "carrier_co_pct": self.co * 100.0, "carrier_h2_pct": self.h2 * 100.0,
                "gas_data": self.data, "controlled_on": READINGS[self.control].json_key}


#: stages whose potential a controller holds at a steady temperature
_HELD_STAGES = ("soak", "boost", "diffuse", "equalize")


@dataclass(frozen=True)
class StageReadings:
    """The readings of one held stage: its label, temperature [K], potential [wt % C], and every reading [SI] at
    the potential and at the potential ± the shop's band (``low`` is the lean end)."""

    label: str
    temperature: float
    potential: float
    values: dict[str, float]
    low: dict[str, float]
    high: dict[str, float]

    def to_dict(self) -> dict:
        out = {"stage": self.label, "temperature_c": self.temperature - ZERO_CELSIUS}
        for kind, value in self.values.items():
            r = READINGS[kind]
            out[r.json_key] = r.to_json(value)
            ends = sorted((r.to_json(self.low[kind]), r.to_json(self.high[kind])))
            out[f"{r.json_key}_band"] = ends
        return out

    def text(self) -> str:
        """``Soak: 1.00 %C ±0.05, 1153 mV (1150–1157), dew point −9 °C / 15 °F (−10 to −8 °C), CO2 0.109 % (0.102–0.117)``
        — each reading with the band the shop's potential tolerance gives it."""
        parts = []
        for kind, value in self.values.items():
            lo, hi = sorted((self.low[kind], self.high[kind]))
            if kind == "carbon_potential":
                parts.append(f"{formats.carbon(value)} ±{max(hi - value, value - lo):.2f}")
            elif kind == "mv":
                parts.append(f"{formats.millivolts(value)} ({lo:.0f}–{hi:.0f})")
            elif kind == "dew_point":
                parts.append(f"dew point {formats.dew_point(value)} ({formats.dew_point_range(lo, hi)})")
            else:
                parts.append(f"CO2 {formats.gas_percent(value)} ({formats.gas_percent_range(lo, hi)})")
        return f"{self.label}: " + ", ".join(parts)


def stage_readings(stages, gas_of: Callable[[float], Gas], band: float = 0.0) -> list[StageReadings]:
    """The readings of the held carburizing stages of a cycle (``Stage`` objects; ramps and stages without a
    potential are skipped); ``gas_of(T)`` gives the gas at a stage's temperature, ``band`` [wt % C] is the shop's
    potential tolerance. A stage whose readings fall outside the relations' range is left out."""
    out = []
    for stage in stages:
        if stage.kind in _HELD_STAGES and stage.temperature is not None and stage.carbon_potential is not None \
                and stage.duration > 0:
            try:
                gas = gas_of(stage.temperature)
                p = stage.carbon_potential
                out.append(StageReadings(stage.label, stage.temperature, p, readings_for_potential(p, gas),
                                         readings_for_potential(max(p - band, 0.05), gas),
                                         readings_for_potential(min(p + band, 2.0), gas)))
            except InputError:
                continue
    return out
