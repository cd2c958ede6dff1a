"""A low-pressure carburizing load: the steel and part, the temperature, the gas and its carbon flux, the limit the
surface is held to, and the drop to the hardening temperature — validated, naming the parameter at fault.

The steel, part, threshold and models are a :class:`~casedepth.carburizing.setup.CarburizingSetup` whose surface
is held at the limit (``carbon_potential`` = the limit, no alloy factor, β = ∞): the one place a case's carbon is
read as a depth or a hardness for both kinds of carburizing.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .. import formats
from ..carburizing.setup import CarburizingSetup
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from ..models.surface import Gunnarson_alloy_factor, steel_saturation_carbon
from ..units import both_temperatures
from .pulses import STEEL_DENSITY, influx_of


@dataclass(frozen=True)
class Hydrocarbon:
    """A carburizing gas: its name, formula and the carbon one normal litre of it carries [g/NL] (0 °C, 101.325 kPa,
    DIN 1343: 22.414 L/mol; carbon 12.011 g/mol)."""

    key: str
    label: str
    formula: str
    carbon_atoms: int

    @property
    def carbon_per_litre(self) -> float:
        return self.carbon_atoms * 12.011 / 22.414


#: the gases a low-pressure furnace doses (the plan's ``hydrocarbon``; the window and the command line offer these)
HYDROCARBONS: dict[str, Hydrocarbon] = {h.key: h for h in (
    Hydrocarbon("acetylene", "Acetylene", "C₂H₂", 2),
    Hydrocarbon("ethylene", "Ethylene", "C₂H₄", 2),
    Hydrocarbon("propane", "Propane", "C₃H₈", 3),
)}

#: low-pressure carburizing runs hotter than atmosphere furnaces (common practice: 900–1050 °C)
TEMPERATURE_RANGE = (880.0 + ZERO_CELSIUS, 1050.0 + ZERO_CELSIUS)


@dataclass(frozen=True)
class LpcSetup:
    """A low-pressure carburizing load.

    Parameters
    ----------
    carbon : CarburizingSetup
        The steel, part, carburizing temperature, threshold and models, its surface held at :attr:`limit`.
    carbon_flux : float
        Carbon the gas delivers in a boost, [kg/(m²·s)]; ``math.inf``: the surface at the limit at once.
    limit : float
        Surface carbon the boosts hold [wt %]: the steel's saturation, or a lower limit.
    saturation : float
        The steel's austenite saturation at the temperature [wt %] (Acm times the alloy factor).
    hardening_temperature : float
        Where the load is quenched from, [K]; the carburizing temperature means no drop.
    drop_time, equalize_time : float
        The drop to the hardening temperature and the equalize there, [s] (nitrogen; carbon moves inward).
    area : float
        The load's carburized surface, [m²] (for the gas).
    gas : Hydrocarbon
        The carburizing gas.
    """

    carbon: CarburizingSetup
    carbon_flux: float
    limit: float
    saturation: float
    hardening_temperature: float
    drop_time: float
    equalize_time: float
    area: float
    gas: Hydrocarbon

    @property
    def temperature(self) -> float:
        return self.carbon.temperature

    @property
    def steel(self):
        return self.carbon.steel

    @property
    def threshold_carbon(self) -> float:
        return self.carbon.threshold_carbon

    @property
    def influx(self) -> float:
        """The solver's carbon influx during a boost before the limit, [wt % · m/s]."""
        return influx_of(self.carbon_flux)

    @property
    def drops(self) -> bool:
        return self.hardening_temperature < self.temperature - 1e-9

    def gas_litres(self, carbon_kg: float) -> float:
        """Normal litres of the gas that carry ``carbon_kg`` [kg] of carbon."""
        return carbon_kg * 1e3 / self.gas.carbon_per_litre

    def describe_flux(self) -> str:
        if math.isinf(self.carbon_flux):
            return "unlimited (the surface at the limit from the start of every boost)"
        return f"{formats.trimmed(self.carbon_flux * 3600e3, 3)} g/(m²·h)"


def saturation_of(steel, temperature: float) -> float:
    """The carbon saturation [wt %] of the steel's austenite at ``temperature`` [K]: the limit a boost holds unless
    a lower one is set (:func:`casedepth.models.surface.steel_saturation_carbon` with the Gunnarson alloy factor)."""
    return steel_saturation_carbon(temperature, Gunnarson_alloy_factor(steel.composition))


def lpc_setup(carbon: CarburizingSetup, carbon_flux: float, limit: float | None, hardening_temperature: float,
              drop_time: float, equalize_time: float, area: float, gas: str) -> LpcSetup:
    """The validated load (``limit`` None: the steel's saturation); :class:`InputError` names the parameter. The plain
    ranges of the flux and the area are the parameter table's (checked with every evaluation); this checks what
    depends on the steel and the temperature."""
    T = carbon.temperature
    if not (TEMPERATURE_RANGE[0] <= T <= TEMPERATURE_RANGE[1]):
        raise InputError("temperature", f"{both_temperatures(T)} is outside the low-pressure range "
                                        f"{both_temperatures(TEMPERATURE_RANGE[0])}–{both_temperatures(TEMPERATURE_RANGE[1])}")
    if not carbon_flux > 0.0:
        raise InputError("carbon_flux", f"{formats.typed(carbon_flux * 3600e3, 'g/(m²·h)')} is not a flux above zero")
    saturation = saturation_of(carbon.steel, T)
    if limit is None:
        limit = saturation
    elif not (carbon.steel.carbon < limit <= saturation * (1 + 1e-9)):
        raise InputError("surface_limit", f"{formats.typed(limit, '%C')} must be above the core carbon "
                                          f"({formats.carbon(carbon.steel.carbon)}) and not above this steel's saturation at "
                                          f"{both_temperatures(T)} ({formats.carbon(saturation)}): carbides")
    if not (carbon.threshold_carbon < limit):
        raise InputError("threshold_value", f"the threshold's {formats.carbon(carbon.threshold_carbon)} is not below the "
                                            f"surface limit {formats.carbon(limit)}: no case can form")
    if not (hardening_temperature <= T + 1e-9):
        raise InputError("hardening_temperature", f"{both_temperatures(hardening_temperature)} is above the carburizing "
                                                  f"temperature {both_temperatures(T)}")
    if not area > 0.0:
        raise InputError("load_area", f"{formats.typed(area, 'm²')} is not an area above zero")
    if gas not in HYDROCARBONS:
        raise InputError("hydrocarbon", f"{gas!r} is not one of {', '.join(HYDROCARBONS)}")
    return LpcSetup(carbon, float(carbon_flux), float(limit), float(saturation), float(hardening_temperature),
                    float(drop_time), float(equalize_time), float(area), HYDROCARBONS[gas])


__all__ = ["HYDROCARBONS", "LpcSetup", "lpc_setup", "saturation_of", "STEEL_DENSITY"]
