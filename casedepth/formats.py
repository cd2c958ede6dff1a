"""One way to write each quantity, for every surface that shows a number to a person.

The summary, the command line, the process sheet, the charts, the window and the messages all write a
carbon content, a hardness, a depth or a nitriding potential through these functions, so "0.40 %C" never
stands beside "0.400 %C" and a depth is never "1.37584 mm" beside "1 mm" (a test scans the package for
number formats written next to a unit anywhere else).

The precision of each is what the trade writes on drawings and in reports (common practice):

* carbon and nitrogen: two decimals, ``0.40 %C`` (the resolution of a spectrometer on a shim stock or a
  turned-off layer is about 0.01 %C);
* hardness: Vickers in whole HV (ISO 6507-1 reports whole numbers above 100 HV), Rockwell C to at most one
  decimal with a trailing zero dropped (``58 HRC``, ``58.5 HRC``; ASTM E18 reads to 0.5 on analog dials);
* case depth: 0.01 mm or 0.001 in (a microhardness traverse is read in steps of 0.05–0.1 mm); thin layers
  (compound layer, white layer) in µm to one decimal at most;
* temperature: whole degrees; nitriding potential: two decimals in atm^-½;
* ideal critical diameter (Grossmann): whole mm with the inch figure to 0.01 in beside it;
* money: two decimals with a space between thousands (ISO 80000-1 groups digits with a space, which no
  decimal-comma or decimal-point reader misreads) and the shop's currency after it; a price per part to
  three decimals;
* a value echoed in a refusal, or the limit it broke: as typed, every significant digit.
"""

from __future__ import annotations

import math

from .units import DisplayUnits, format_clock, format_duration  # noqa: F401  (durations are formatted there)

#: the unit of the nitriding potential K_N = p_NH3 / p_H2^1.5, as printed
KN_UNIT = "atm⁻½"

_METRIC = DisplayUnits("metric")


def trimmed(value: float, decimals: int) -> str:
    """``value`` to at most ``decimals`` decimals with trailing zeros dropped: ``58.0`` -> ``"58"``,
    ``58.46`` -> ``"58.5"`` (one decimal)."""
    if not math.isfinite(value):
        return "–"
    text = f"{value:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def carbon(pct: float) -> str:
    """A carbon content or carbon potential [wt %]: ``0.4`` -> ``"0.40 %C"``."""
    return f"{pct:.2f} %C"


def carbon_value(pct: float) -> str:
    """A carbon content without its unit, for table cells under a "%C" heading: ``"0.40"``."""
    return f"{pct:.2f}"


def carbon_effect(pct: float) -> str:
    """How far an input moves a carbon content either way: ``"±0.03 %C"``, or ``"under ±0.01 %C"`` where it rounds to
    nothing (as :func:`length_effect`)."""
    shown = abs(pct)
    return "under ±0.01 %C" if round(shown, 2) == 0.0 else f"±{shown:.2f} %C"


def carbon_range(low: float, high: float) -> str:
    """``"0.70–0.90 %C"``."""
    return f"{low:.2f}–{high:.2f} %C"


def nitrogen(pct: float) -> str:
    """A nitrogen content [wt %]: ``"0.40 %N"``."""
    return f"{pct:.2f} %N"


def hardness_value(value: float, scale: str) -> str:
    """A hardness without its scale: whole HV, HRC to at most one decimal."""
    if scale == "HV":
        return f"{value:.0f}"
    return trimmed(value, 1)


def hardness(value: float, scale: str) -> str:
    """A hardness on its scale: ``(550.4, "HV")`` -> ``"550 HV"``; ``(58.46, "HRC")`` -> ``"58.5 HRC"``."""
    return f"{hardness_value(value, scale)} {scale}"


def hardness_range(low: float, high: float, scale: str) -> str:
    """``"58–62 HRC"``, ``"550–650 HV"``."""
    return f"{hardness_value(low, scale)}–{hardness_value(high, scale)} {scale}"


def hv(value: float) -> str:
    """A Vickers hardness: ``"550 HV"``."""
    return hardness(value, "HV")


def hrc(value: float) -> str:
    """A Rockwell C hardness: ``"58.5 HRC"``."""
    return hardness(value, "HRC")


def kn(value: float) -> str:
    """A nitriding potential: ``2.5`` -> ``"2.50 atm⁻½"``."""
    return f"{value:.2f} {KN_UNIT}"


def kn_value(value: float) -> str:
    """A nitriding potential without its unit: ``"2.50"``."""
    return f"{value:.2f}"


def percent(value: float) -> str:
    """A share in per cent (retained austenite, uncertainty, a tolerance): ``"25 %"``."""
    return f"{trimmed(value, 1)} %"


def gas_percent(fraction: float) -> str:
    """A gas content from its fraction, to the 0.001 % an infrared CO2 analyser reads: ``0.00109`` -> ``"0.109 %"``."""
    return f"{fraction * 100:.3f} %"


def gas_percent_range(low: float, high: float) -> str:
    """Two gas contents from their fractions: ``"0.102–0.117 %"``."""
    return f"{low * 100:.3f}–{high * 100:.3f} %"


def dew_point(kelvin: float) -> str:
    """A dew point in whole degrees of both systems (shops read it in either): ``"−9 °C / 15 °F"``."""
    celsius = kelvin - 273.15
    return f"{celsius:.0f} °C / {celsius * 1.8 + 32.0:.0f} °F".replace("-", "−")


def dew_point_range(low: float, high: float) -> str:
    """Two dew points in whole degrees Celsius: ``"−10 to −8 °C"``."""
    return f"{low - 273.15:.0f} to {high - 273.15:.0f} °C".replace("-", "−")


def millivolts(value: float) -> str:
    """A probe reading in whole millivolts: ``"1153 mV"``."""
    return f"{value:.0f} mV"


def percent_value(value: float) -> str:
    """A share in per cent without its sign, for table cells under a "%" heading: ``"25"``, ``"12.5"``."""
    return trimmed(value, 1)


def length(metres: float, units: DisplayUnits = _METRIC) -> str:
    """A case depth in the display system: ``"1.38 mm"`` or ``"0.054 in"``."""
    return units.format_length(metres)


def length_effect(metres: float, units: DisplayUnits = _METRIC) -> str:
    """How far an input moves a depth either way: ``"±0.04 mm"``, or ``"under ±0.01 mm"`` where it rounds to
    nothing in the depth's format (never a bare ``"±0.00 mm"``)."""
    d = units.length_decimals_shown
    shown = abs(units.length(metres))
    if round(shown, d) == 0.0:
        return f"under ±{10.0 ** -d:.{d}f} {units.length_unit}"
    return f"±{shown:.{d}f} {units.length_unit}"


def length_range(low: float, high: float, units: DisplayUnits = _METRIC) -> str:
    """``"0.90–1.30 mm"``."""
    d = units.length_decimals_shown
    return f"{units.length(low):.{d}f}–{units.length(high):.{d}f} {units.length_unit}"


def thin_length(metres: float) -> str:
    """A thin layer (compound layer, white layer, a grid step) in µm: ``"7.5 µm"``."""
    return f"{trimmed(metres * 1e6, 1)} µm"


def thin_range(low: float, high: float) -> str:
    """``"5–10 µm"``."""
    return f"{trimmed(low * 1e6, 1)}–{trimmed(high * 1e6, 1)} µm"


def ideal_diameter(metres: float) -> str:
    """Grossmann's ideal critical diameter D_I in both systems, whole mm and 0.01 in: ``"48 mm (1.90 in)"``
    (ASTM A255 computes it in inches; metric catalogues quote whole millimetres, finer than the estimate's
    own spread of several per cent)."""
    return f"{metres * 1e3:.0f} mm ({metres / 0.0254:.2f} in)"


def temperature(kelvin: float, units: DisplayUnits = _METRIC) -> str:
    """A temperature in whole degrees of the display system: ``"925 °C"``."""
    return units.format_temperature(kelvin)


def hours(seconds: float) -> str:
    """A duration in decimal hours to 0.01 h, for the office's tables and the charts beside the duration in words:
    ``24444`` -> ``"6.79 h"`` (the floor's sheet writes h:min, :func:`format_clock`)."""
    if not math.isfinite(seconds):
        return "–"
    return f"{seconds / 3600.0:.2f} h"


def typed(value: float, unit: str) -> str:
    """A value echoed back as it was given (a refusal, a limit of a table): every significant digit, so
    ``1.6001 %C`` is never shown as the ``1.60 %C`` it broke."""
    return f"{value:g} {unit}"


def typed_range(low: float, high: float, unit: str) -> str:
    """A range as it was given (a table's limits, a window a person typed), for refusals: every significant
    digit, as :func:`typed`: ``(0.1, 1.6, "%C")`` -> ``"0.1–1.6 %C"``."""
    return f"{low:g}–{high:g} {unit}"


def money(value: float, currency: str = "") -> str:
    """An amount with two decimals, thousands apart by a space, the shop's currency after it:
    ``(1234.5, "EUR")`` -> ``"1 234.50 EUR"``."""
    return _amount(value, currency, 2)


def piece_price(value: float, currency: str = "") -> str:
    """A price per part, as :func:`money` but to three decimals: a load of many small parts puts a fraction
    of a cent on each, which two decimals would round away: ``(0.0124, "EUR")`` -> ``"0.012 EUR"``."""
    return _amount(value, currency, 3)


def _amount(value: float, currency: str, decimals: int) -> str:
    if not math.isfinite(value):
        return "–"
    text = f"{value:,.{decimals}f}".replace(",", "\u00a0")
    return f"{text} {currency}" if currency else text
