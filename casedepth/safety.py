"""Safety cautions for carburizing furnace work, shown beside every result.

The texts restate common practice under NFPA 86 (Standard for Ovens and Furnaces) and the usual
occupational-safety references; they are reminders, not instructions. Local codes, the furnace
maker's instructions and licensed practice govern.
"""

from __future__ import annotations

from dataclasses import dataclass

from .constants import ZERO_CELSIUS
from .units import both_temperatures

#: Lowest furnace temperature at which a flammable atmosphere is admitted without a purge with
#: inert gas, 760 °C / 1400 °F (NFPA 86 practice; edition-dependent).
SAFE_ADMISSION_TEMPERATURE = 760.0 + ZERO_CELSIUS


@dataclass(frozen=True)
class Caution:
    """One caution: a short title, the text, and whether the inputs make it pressing."""

    key: str
    title: str
    text: str
    pressing: bool = False


DEFERENCE = ("These cautions are reminders only. Local codes (such as NFPA 86 in the United States), the furnace "
             "maker's instructions and licensed practice govern.")

STANDING = (
    Caution("flammable-toxic", "Flammable and toxic atmosphere",
            "Endothermic carrier gas is about 20 % CO, 40 % H2 and 40 % N2: flammable, explosive when mixed with air, "
            "and carbon monoxide is toxic and odourless. Keep CO detectors working and ventilation running."),
    Caution("admission", "Admit gas only when hot",
            "Admit a flammable atmosphere only with the furnace at or above about 760 °C (1400 °F), where it "
            "ignites at once, with the interlocks in service; below that, purge with nitrogen first (about "
            "five furnace volumes) and burn off effluent at the vents and doors."),
    Caution("quench-oil", "Quench oil can burn",
            "Quench oil is a fire hazard: keep the load moving into the oil fast and fully submerged, watch oil "
            "level and temperature, keep the tank cover and fire suppression ready; water in oil can erupt."),
)


AMMONIA = (
    Caution("ammonia-toxic", "Ammonia is toxic",
            "Ammonia harms at tens of ppm: OSHA PEL 50 ppm (8 h), NIOSH REL 25 ppm (35 ppm short term), IDLH "
            "300 ppm. Keep detectors and ventilation working, and check the exhaust burn-off or scrubber."),
    Caution("ammonia-flammable", "Ammonia and its hydrogen burn",
            "Ammonia is flammable at about 15–28 % in air, and dissociated ammonia is 75 % hydrogen: purge the "
            "retort with nitrogen before heating and before opening, and keep the interlocks in service."),
)


LOW_PRESSURE = (
    Caution("acetylene", "Acetylene is flammable and unstable",
            "Acetylene burns over a wide range in air and can decompose explosively under pressure: keep it at the "
            "cylinder maker's pressure limits (about 1.5 bar gauge in the line), use acetone- or DMF-filled cylinders "
            "upright with flashback arrestors, and keep the gas train and its interlocks as the furnace maker sets "
            "them (propane and ethylene are flammable too)."),
    Caution("vacuum-quench", "Vacuum furnace and high-pressure gas quench",
            "The quench chamber is a pressure vessel (10–20 bar): keep its relief valves, door locks and inspections "
            "current; never open a door under pressure or vacuum, and vent the hydrocarbon's cracked gases (hydrogen) "
            "through the pumps' exhaust as the maker requires."),
    Caution("asphyxiation", "Nitrogen and helium displace air",
            "A gas quench releases cubic metres of nitrogen or helium: pits, enclosures and the space around the "
            "furnace can lose their oxygen without warning. Keep oxygen monitors and ventilation working and enter "
            "confined spaces only under a permit."),
)


def lpc_cautions(temperature: float | None = None) -> list[Caution]:
    """The cautions of low-pressure carburizing, with grain growth above about 980 °C pressing (common practice)."""
    pressing = []
    if temperature is not None and temperature > 980.0 + ZERO_CELSIUS:
        pressing.append(Caution(
            "grain-growth", "Grain growth",
            f"{both_temperatures(temperature)} is above about 980 °C (1800 °F), where steels without grain-refining "
            "additions (Nb, Ti, Al–N) coarsen their grain: confirm the grade's grain-size control before running hot.",
            True))
    return pressing + list(LOW_PRESSURE)


METHANOL = Caution(
    "methanol", "Methanol is toxic and flammable",
    "Methanol poisons through the skin and by its vapour, and burns with an almost invisible flame: keep it in a "
    "closed, grounded supply line, drip or inject it only with the furnace above about 760 °C (1400 °F) and the "
    "nitrogen flowing, and keep the flow interlocked with the furnace temperature.")


def cautions(temperature: float | None = None, equilibrium_carbon: float | None = None,
             saturation_carbon: float | None = None, ammonia: bool = False, gas=None) -> list[Caution]:
    """The standing cautions, with those the inputs make pressing first.

    Parameters
    ----------
    temperature : float, optional
        Furnace temperature, [K].
    equilibrium_carbon, saturation_carbon : float, optional
        Surface carbon the atmosphere gives and the austenite's saturation, [wt %].
    gas : casedepth.models.atmosphere.FurnaceGas, optional
        The carrier gas: the caution states its CO and H2, and a nitrogen–methanol carrier adds methanol's.
    """
    pressing = []
    if ammonia:  # nitriding runs below 760 °C by design: purging, not admission temperature, is the rule
        return list(AMMONIA)
    standing = list(STANDING)
    if gas is not None:
        co, h2 = round(gas.co * 100), round(gas.h2 * 100)
        standing[0] = Caution(
            "flammable-toxic", "Flammable and toxic atmosphere",
            f"Carrier gas of about {co} % CO, {h2} % H2 and {100 - co - h2} % N2: flammable, explosive when mixed with "
            "air, and carbon monoxide is toxic and odourless. Keep CO detectors working and ventilation running.")
        if gas.carrier == "nitrogen-methanol":
            standing.insert(1, METHANOL)
    if temperature is not None and temperature < SAFE_ADMISSION_TEMPERATURE:
        pressing.append(Caution(
            "below-admission", "Below the safe admission temperature",
            f"{both_temperatures(temperature)} is below about 760 °C (1400 °F): a flammable atmosphere must not be "
            "admitted or held; purge with inert gas and follow the furnace's low-temperature procedure.", True))
    if equilibrium_carbon is not None and saturation_carbon is not None and equilibrium_carbon > saturation_carbon:
        pressing.append(Caution(
            "soot", "Sooting atmosphere",
            "A carbon potential above saturation deposits soot; burning it out is an exothermic operation that "
            "needs controlled air admission under the furnace's burn-out procedure.", True))
    return pressing + standing


def caution_line(items: list[Caution]) -> str:
    """The cautions in one line, for the command line's text output."""
    return ("Caution: " + "; ".join(c.title.lower() for c in items)
            + ". Local codes (such as NFPA 86) and licensed practice govern.")

