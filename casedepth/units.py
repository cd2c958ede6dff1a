"""Units at the edges: parse what people type ("925C", "0.040in", "6h") into SI and format SI back.

Inside the library everything is SI: kelvin, metre, second, metre per second. Carbon and
alloy contents stay in mass percent (wt %), the unit every carburizing model is written in.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from .constants import ZERO_CELSIUS
from .errors import InputError

_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"

_TEMPERATURE_UNITS = {
    "c": lambda v: v + ZERO_CELSIUS,
    "°c": lambda v: v + ZERO_CELSIUS,
    "degc": lambda v: v + ZERO_CELSIUS,
    "f": lambda v: (v - 32.0) * 5.0 / 9.0 + ZERO_CELSIUS,
    "°f": lambda v: (v - 32.0) * 5.0 / 9.0 + ZERO_CELSIUS,
    "degf": lambda v: (v - 32.0) * 5.0 / 9.0 + ZERO_CELSIUS,
    "k": lambda v: v,
}

LENGTH_UNITS = {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "um": 1e-6, "µm": 1e-6, "μm": 1e-6, "in": 0.0254, '"': 0.0254}
TIME_UNITS = {"s": 1.0, "sec": 1.0, "min": 60.0, "h": 3600.0, "hr": 3600.0, "hrs": 3600.0}
VELOCITY_UNITS = {"m/s": 1.0, "cm/s": 1e-2, "mm/s": 1e-3, "um/s": 1e-6, "µm/s": 1e-6, "in/s": 0.0254}
#: a carbon mass flux into a surface, to kg/(m²·s)
MASS_FLUX_UNITS = {"g/m2h": 1e-3 / 3600.0, "g/m²h": 1e-3 / 3600.0, "g/(m2h)": 1e-3 / 3600.0, "g/(m²h)": 1e-3 / 3600.0,
                   "g/(m²·h)": 1e-3 / 3600.0, "g/m2/h": 1e-3 / 3600.0, "kg/m2s": 1.0, "kg/(m²·s)": 1.0,
                   "mg/cm2h": 1e-2 / 3600.0, "mg/(cm²·h)": 1e-2 / 3600.0}
AREA_UNITS = {"m2": 1.0, "m²": 1.0, "dm2": 1e-2, "dm²": 1e-2, "cm2": 1e-4, "cm²": 1e-4, "ft2": 0.09290304,
              "ft²": 0.09290304, "in2": 6.4516e-4, "in²": 6.4516e-4}


#: the largest number read with a unit: far beyond every range, small enough that any unit conversion stays finite
#: (the parameter table then refuses what is out of its own range with the range)
LARGEST_TYPED = 1e15


def _split(text: str, field: str) -> tuple[float, str]:
    text = str(text).strip()
    match = re.fullmatch(rf"\s*({_NUMBER})\s*(.*?)\s*", text)
    if not match:
        raise InputError(field, f"cannot read {text!r}; expected a number followed by a unit")
    value = float(match.group(1))
    if not math.isfinite(value):
        raise InputError(field, f"{text!r} is not a finite number")
    if abs(value) > LARGEST_TYPED:
        raise InputError(field, f"{text!r} is beyond any value the models could use")
    return value, match.group(2).lower()


def finite_number(value) -> bool:
    """True for a number (int, float, numpy scalar) that is finite and a float can hold: not a bool or text,
    not NaN or inf, not an integer of 400 digits."""
    if isinstance(value, bool):
        return False
    try:
        return math.isfinite(value)
    except (TypeError, ValueError, OverflowError):
        return False


def as_number(value, field: str) -> float:
    """``value`` as a float, or an :class:`InputError` naming ``field`` if it is not a finite number (the guard
    of every argument the library's functions take from their callers)."""
    if not finite_number(value):
        raise InputError(field, f"{str(value)[:40]!r} is not a finite number")
    return float(value)


def check_text(field: str, text: str, lines: bool = True) -> str:
    """Refuse text that cannot be written or printed: characters that are not Unicode (a lone surrogate, as a
    JSON escape or an undecodable command-line byte brings) or control characters other than tabs and (where
    ``lines``) line breaks."""
    try:
        text.encode("utf-8")
    except UnicodeEncodeError:
        raise InputError(field, "the text holds a character that is not valid Unicode (an undecodable byte?)") from None
    allowed = "\t\n\r" if lines else "\t"
    bad = next((c for c in text if (ord(c) < 32 and c not in allowed) or ord(c) == 127), None)
    if bad is not None:
        raise InputError(field, f"the text holds the control character U+{ord(bad):04X}")
    return text


def parse_number(value: str | float, field: str) -> float:
    """A plain finite number (no unit), or an :class:`InputError` naming ``field``."""
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise InputError(field, f"{value!r} is not a number") from None
    if not math.isfinite(number):
        raise InputError(field, f"{value!r} is not a finite number")
    return number


def parse_temperature(text: str | float, field: str = "temperature", default_unit: str = "c") -> float:
    """Read a temperature such as ``925C``, ``1700F`` or ``1198K``; returns kelvin.

    A bare number is read in ``default_unit`` (°C unless told otherwise).
    """
    value, unit = _value_and_unit(text, field, default_unit)
    if unit not in _TEMPERATURE_UNITS:
        raise InputError(field, f"unknown temperature unit {unit!r}; use C, F or K (e.g. 925C, 1700F, 1198K)")
    kelvin = _TEMPERATURE_UNITS[unit](value)
    if kelvin <= 0:
        raise InputError(field, f"{text!r} is below absolute zero")
    return kelvin


def parse_temperature_difference(text: str | float, field: str = "temperature band") -> float:
    """Read a temperature *difference* such as ``10C``, ``18F`` or ``10K`` (a band, a tolerance); returns kelvin."""
    value, unit = _value_and_unit(text, field, "c")
    if unit in ("c", "°c", "degc", "k"):
        kelvin = value
    elif unit in ("f", "°f", "degf"):
        kelvin = value * 5.0 / 9.0
    else:
        raise InputError(field, f"unknown temperature unit {unit!r}; use C, F or K (e.g. 10C, 18F)")
    if kelvin < 0:
        raise InputError(field, f"{text!r} is negative; give the half-width of the band")
    return kelvin


def _value_and_unit(text: str | float, field: str, default_unit: str) -> tuple[float, str]:
    """A number with its unit; a bare number (or number type) takes ``default_unit``."""
    if isinstance(text, (int, float)):
        return float(text), default_unit
    value, unit = _split(text, field)
    return value, unit or default_unit


def _parse_scaled(text, field, units, default_unit, kind, example):
    value, unit = _value_and_unit(text, field, default_unit)
    if unit not in units:
        raise InputError(field, f"unknown {kind} unit {unit!r}; use one of {', '.join(sorted(set(units)))} (e.g. {example})")
    return value * units[unit]


def parse_length(text: str | float, field: str = "length", default_unit: str = "mm") -> float:
    """Read a length such as ``1.0mm``, ``0.040in`` or ``800um``; returns metres."""
    return _parse_scaled(text, field, LENGTH_UNITS, default_unit, "length", "1.0mm or 0.040in")


def parse_time(text: str | float, field: str = "time", default_unit: str = "h") -> float:
    """Read a duration such as ``6h``, ``90min``, ``5h30min`` or ``3600s``; returns seconds."""
    if isinstance(text, str):
        parts = re.findall(rf"({_NUMBER})\s*([a-zA-Z]*)", text.strip())
        joined = "".join(f"{n}{u}" for n, u in parts)
        if len(parts) > 1 and joined == re.sub(r"\s+", "", text.strip()):
            return sum(_parse_scaled(f"{n}{u}", field, TIME_UNITS, default_unit, "time", "6h") for n, u in parts)
    return _parse_scaled(text, field, TIME_UNITS, default_unit, "time", "6h or 90min")


def parse_mass_flux(text: str | float, field: str = "carbon_flux", default_unit: str = "g/m2h") -> float:
    """Read a carbon mass flux such as ``150g/m2h`` or ``inf``; returns kg/(m²·s) (``math.inf`` for inf)."""
    if isinstance(text, str) and re.fullmatch(r"\s*(inf|infinite|infinity|unlimited)\s*([a-z²·()/0-9]*)\s*", text.lower()):
        return math.inf
    return _parse_scaled(text, field, MASS_FLUX_UNITS, default_unit, "carbon flux", "150g/m2h or inf")


def parse_area(text: str | float, field: str = "area", default_unit: str = "m2") -> float:
    """Read a surface area such as ``2.5m2`` or ``27ft2``; returns m²."""
    return _parse_scaled(text, field, AREA_UNITS, default_unit, "area", "2.5m2")


def parse_velocity(text: str | float, field: str = "beta", default_unit: str = "cm/s") -> float:
    """Read a mass-transfer coefficient such as ``1.5e-5cm/s`` or ``inf``; returns m/s (``math.inf`` for inf)."""
    if isinstance(text, str) and re.fullmatch(r"\s*(inf|infinite|infinity)\s*([a-zµ/]*)\s*", text.lower()):
        return math.inf
    return _parse_scaled(text, field, VELOCITY_UNITS, default_unit, "velocity", "1.5e-5cm/s or inf")


@dataclass(frozen=True)
class Threshold:
    """A case-depth threshold as written on a drawing: a carbon content or a hardness."""

    value: float
    kind: str  # "carbon" (wt %), "HV", "HRC", or "above core" (wt % over the core's carbon: total case)

    def __str__(self) -> str:
        if self.kind == "carbon":
            return f"{self.value:.2f} %C"
        if self.kind == "above core":
            return f"core + {self.value:.2f} %C"
        return f"{self.value:g} {self.kind}"

    @property
    def is_hardness(self) -> bool:
        return self.kind in ("HV", "HRC")

    @property
    def depth_name(self) -> str:
        """What the depth to this threshold is called: total case depth (SAE J423) or effective case depth."""
        return "total case depth" if self.kind == "above core" else "effective case depth"


#: total case depth: where the carbon is this much above the core's, wt % (SAE J423)
TOTAL_CASE_EXCESS = 0.04


def parse_threshold(text: str | float, field: str = "threshold") -> Threshold:
    """Read a threshold: ``0.40%C`` (carbon, wt %), ``550HV``, ``50HRC``, ``total`` (total case: core +
    0.04 %C, SAE J423) or ``core+0.05%C``; a bare number is carbon."""
    if isinstance(text, (int, float)):
        return Threshold(float(text), "carbon")
    compact = str(text).strip().lower().replace(" ", "")
    if compact in ("total", "totalcase"):
        return Threshold(TOTAL_CASE_EXCESS, "above core")
    if compact.startswith("core+"):
        value, unit = _split(compact[len("core+"):], field)
        if unit not in ("", "%c", "%", "c", "wt%c", "wt%") or not (0.005 <= value <= 0.5):
            raise InputError(field, f"cannot read threshold {text!r}; write core+0.04%C (0.005–0.5 %C above the core)")
        return Threshold(value, "above core")
    value, unit = _split(text, field)
    unit = unit.replace(" ", "")
    if unit in ("", "%c", "%", "c", "wt%c", "wt%"):
        return Threshold(value, "carbon")
    if unit.startswith("hv"):
        return Threshold(value, "HV")
    if unit == "hrc":
        return Threshold(value, "HRC")
    raise InputError(field, f"cannot read threshold {text!r}; write a carbon content (0.40%C), a hardness (550HV, 50HRC) "
                     f"or the total case (total, core+0.04%C)")


def celsius(kelvin: float) -> float:
    return kelvin - ZERO_CELSIUS


def fahrenheit(kelvin: float) -> float:
    return (kelvin - ZERO_CELSIUS) * 9.0 / 5.0 + 32.0


def both_temperatures(kelvin: float) -> str:
    """A temperature for messages in both systems: ``1198.15`` -> ``"925 °C (1697 °F)"``."""
    return f"{celsius(kelvin):.0f} °C ({fahrenheit(kelvin):.0f} °F)"


def temperature_range(low: float, high: float) -> str:
    """A range of temperatures [K] for messages in both systems: ``"800–1100 °C (1472–2012 °F)"``."""
    return f"{celsius(low):.0f}–{celsius(high):.0f} °C ({fahrenheit(low):.0f}–{fahrenheit(high):.0f} °F)"


def both_lengths(metres: float) -> str:
    """A length for messages in both systems: ``0.0012`` -> ``"1.2 mm (0.0472 in)"``."""
    return f"{metres * 1e3:g} mm ({metres / 0.0254:.3g} in)"


def length_range(low: float, high: float) -> str:
    """A range of lengths [m] for messages in both systems: ``"0.05–3 mm (0.00197–0.118 in)"``."""
    return f"{low * 1e3:g}–{high * 1e3:g} mm ({low / 0.0254:.3g}–{high / 0.0254:.3g} in)"


def format_duration(seconds: float) -> str:
    """``19080`` -> ``"5 h 18 min"`` (rounded to the minute)."""
    minutes = int(round(seconds / 60.0))
    hours, minutes = divmod(minutes, 60)
    if hours == 0:
        return f"{minutes} min"
    return f"{hours} h {minutes:02d} min"


def format_clock(seconds: float, with_seconds: bool = False) -> str:
    """``19080`` -> ``"5:18"``: hours and minutes, as the floor reads a furnace's timer (``with_seconds``: ``"0:03:02"``,
    for the short boosts of low-pressure pulses)."""
    if with_seconds:
        whole = int(round(seconds))
        hours, rest = divmod(whole, 3600)
        minutes, secs = divmod(rest, 60)
        return f"{hours}:{minutes:02d}:{secs:02d}"
    minutes = int(round(seconds / 60.0))
    hours, minutes = divmod(minutes, 60)
    return f"{hours}:{minutes:02d}"


@dataclass(frozen=True)
class DisplayUnits:
    """How values are shown to a person: metric (°C, mm) or imperial (°F, in). SI stays inside."""

    system: str = "metric"

    @property
    def imperial(self) -> bool:
        return self.system == "imperial"

    @property
    def temperature_unit(self) -> str:
        return "°F" if self.imperial else "°C"

    @property
    def length_unit(self) -> str:
        return "in" if self.imperial else "mm"

    def temperature(self, kelvin: float) -> float:
        return fahrenheit(kelvin) if self.imperial else celsius(kelvin)

    def length(self, metres: float) -> float:
        return metres / 0.0254 if self.imperial else metres * 1e3

    def length_si(self, shown: float) -> float:
        return shown * 0.0254 if self.imperial else shown * 1e-3

    @property
    def length_decimals(self) -> int:
        """Decimals a length is typed with (fields, spin boxes): 0.001 mm, 0.0001 in."""
        return 4 if self.imperial else 3

    @property
    def length_decimals_shown(self) -> int:
        """Decimals a case depth is shown with: 0.01 mm, 0.001 in (common practice: a microhardness
        traverse is read in steps of 0.05–0.1 mm)."""
        return 3 if self.imperial else 2

    def format_length(self, metres: float) -> str:
        """The one format of a case depth: ``"1.38 mm"``, ``"0.054 in"``."""
        return f"{self.length(metres):.{self.length_decimals_shown}f} {self.length_unit}"

    def format_temperature(self, kelvin: float) -> str:
        return f"{self.temperature(kelvin):.0f} {self.temperature_unit}"

    def read(self, quantity: str, text: str, field: str) -> float:
        """A value a person typed, with any unit the command line takes; a bare number is in this system's
        unit (°C or °F, mm or in; µm for ``thin length``). Returns SI."""
        if quantity == "temperature":
            return parse_temperature(text, field, default_unit="f" if self.imperial else "c")
        if quantity == "length":
            return parse_length(text, field, default_unit="in" if self.imperial else "mm")
        if quantity == "thin length":
            return parse_length(text, field, default_unit="um")
        raise ValueError(f"no unit system for {quantity!r}")

    def shown(self, quantity: str, si: float) -> float:
        """An SI value in this system's unit for ``quantity`` (see :meth:`read`)."""
        if quantity == "temperature":
            return self.temperature(si)
        if quantity == "length":
            return self.length(si)
        if quantity == "thin length":
            return si * 1e6
        raise ValueError(f"no unit system for {quantity!r}")

    def unit(self, quantity: str) -> str:
        return {"temperature": self.temperature_unit, "length": self.length_unit, "thin length": "µm"}[quantity]
