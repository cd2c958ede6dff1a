"""Hardening a carburized part: the quench from the hardening temperature and the temper, and the
hardness they give at each depth — the case's threshold, the surface and the core the drawing states.

* :class:`Hardening` — the quench medium (a row of :data:`casedepth.models.quench.QUENCH_MEDIA`), the
  temperature it quenches to, the temper, and the temperature the part is quenched from;
* :func:`cooling` — the cooling rate at 700 °C at depths of the part's own section (heat conduction
  with a surface coefficient, Carslaw & Jaeger 1959; :mod:`casedepth.models.quench`);
* :func:`quenched_at` — what the structure relation of :mod:`casedepth.models.hardness` needs at a depth;
* :func:`hardness_at` — hardness and structure at depths for the carbon there
  (:mod:`casedepth.models.transformation`);
* :func:`core_depth` — where the core hardness is read: the centre of the section, or 12.5 mm below
  the surface of a section of unknown thickness (the middle of a 1-in bar).

Temperatures in K, times in s, depths in m, cooling rates in K/s.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .. import formats
from ..constants import ROOM_TEMPERATURE, ZERO_CELSIUS
from ..models.hardness import Quenched

#: where the core is read in a section of unknown thickness, m (the middle of a 1-in bar)
UNKNOWN_SECTION_CORE = 12.5e-3
#: the depth a setup reads its threshold's cooling at when no drawing depth is given, m (a usual case depth)
DEFAULT_HARDNESS_DEPTH = 1.0e-3


@dataclass(frozen=True)
class Hardening:
    """The quench and temper: medium key, quench (bath) temperature [K], temper temperature [K] and time
    [s] (None: as quenched), and the temperature the part is quenched from [K]."""

    medium: str = "oil"
    quench_temperature: float = 60.0 + ZERO_CELSIUS
    temper_temperature: float | None = 180.0 + ZERO_CELSIUS
    temper_time: float = 2 * 3600.0
    start_temperature: float = 845.0 + ZERO_CELSIUS

    def describe(self, units=None) -> str:
        from ..models.quench import QUENCH_MEDIA

        def temp(T):
            return _temperature(T, units)

        medium = QUENCH_MEDIA[self.medium].label if self.medium in QUENCH_MEDIA else self.medium
        temper = ("as quenched" if self.temper_temperature is None else
                  f"tempered {temp(self.temper_temperature)} for {self.temper_time / 3600:g} h")
        return f"quenched from {temp(self.start_temperature)} in {medium.lower()} at {temp(self.quench_temperature)}, {temper}"

    def short(self, units=None) -> str:
        """The quench and temper in a few words, for plot titles: ``oil at 60 °C, temper 170 °C/2 h``."""
        def temp(T):
            return _temperature(T, units)

        temper = ("as quenched" if self.temper_temperature is None else
                  f"temper {temp(self.temper_temperature)}/{self.temper_time / 3600:g} h")
        return f"{self.medium} at {temp(self.quench_temperature)}, {temper}"


def _temperature(T: float, units=None) -> str:
    """A temperature [K] in the display units given, or in whole °C."""
    return formats.temperature(T) if units is None else formats.temperature(T, units)


def _quench_body(geometry) -> tuple[str, float | None]:
    """The body the quench model solves: the part's own plate, cylinder or sphere; a bore (a hole in a large
    body) as a flat surface of a thick section, which cools it about as fast (first order in depth/radius)."""
    if geometry.shape == "bore":
        return "plate", None
    return geometry.shape, geometry.size


def core_depth(geometry) -> float:
    """Depth [m] where the core hardness is read: the centre of the section, or :data:`UNKNOWN_SECTION_CORE`."""
    half = geometry.half_section
    return half if math.isfinite(half) else UNKNOWN_SECTION_CORE


def cooling(geometry, hardening: Hardening, depths) -> np.ndarray:
    """Cooling rate at 700 °C [K/s] at ``depths`` [m] below the quenched surface."""
    from ..models.quench import cooling_at_depths

    shape, size = _quench_body(geometry)
    depths = np.asarray(depths, dtype=float)
    if size is not None:
        depths = np.minimum(depths, 0.5 * size)
    result = cooling_at_depths(shape, size, depths, hardening.medium, hardening.start_temperature,
                               hardening.quench_temperature)
    return np.asarray(result.cooling_rate_700, dtype=float)


def lowest_before_temper(hardening: Hardening) -> float:
    """The lowest temperature [K] the case reaches before tempering, where retained austenite is counted
    (Koistinen & Marburger 1959): the bath, or room temperature after the wash if the bath is warmer
    (parts are washed and cool to the room before they are tempered; common practice)."""
    return min(hardening.quench_temperature, ROOM_TEMPERATURE)


def quenched_at(composition: dict, geometry, hardening: Hardening, depth: float) -> Quenched:
    """What the structure relation needs at ``depth`` [m]: the composition, the cooling rate there, the
    quench and the temper."""
    rate = float(cooling(geometry, hardening, np.array([depth]))[0])
    return Quenched(dict(composition), rate, lowest_before_temper(hardening), hardening.temper_temperature,
                    hardening.temper_time if hardening.temper_temperature is not None else None)


def hardness_at(composition: dict, geometry, hardening: Hardening, depths, carbon) -> dict:
    """Hardness [HV] and structure at ``depths`` [m] with the local ``carbon`` [wt %] there: the dict of
    :func:`casedepth.models.transformation.hardness_profile` plus ``cooling_rate`` [K/s]."""
    from ..models.transformation import hardness_profile

    rates = cooling(geometry, hardening, depths)
    out = hardness_profile(composition, np.asarray(carbon, dtype=float), rates, lowest_before_temper(hardening),
                           hardening.temper_temperature,
                           hardening.temper_time if hardening.temper_temperature is not None else None)
    out = dict(out)
    out["cooling_rate"] = rates
    return out
