"""Hardness of the carburized case: carbon → hardness and the HV ↔ HRC conversion.

Drawings give effective case depth at a hardness (550 HV after ISO 18203, 50 HRC after
SAE J423) as often as at a carbon content. The solver works in carbon, so a hardness
threshold is turned into the carbon content whose case has that hardness. The first release's
relations assume a fully martensitic case (enough hardenability and a quench severe enough for
the section); the structure relation works out what each depth becomes in the plan's quench
(:mod:`casedepth.models.transformation`, :mod:`casedepth.models.quench`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .. import formats
from ..errors import InputError
from ..units import Threshold

# Rockwell C → Vickers for steel, whole HRC numbers 20–68, as commonly reproduced from
# ASTM E140 Table 1 (non-austenitic steels). From memory: check against the standard.
_HRC = np.arange(20, 69, dtype=float)
_HV = np.array([
    238, 243, 248, 254, 260, 266, 272, 279, 286, 294,   # 20–29
    302, 310, 318, 327, 336, 345, 354, 363, 372, 382,   # 30–39
    392, 402, 412, 423, 434, 446, 458, 471, 484, 498,   # 40–49
    513, 528, 544, 560, 577, 595, 613, 633, 653, 674,   # 50–59
    697, 720, 746, 772, 800, 832, 865, 900, 940,        # 60–68
], dtype=float)

HV_RANGE = (float(_HV[0]), float(_HV[-1]))
HRC_RANGE = (float(_HRC[0]), float(_HRC[-1]))
#: hardness methods a traverse is read with (ISO 6507 Vickers loads, and Rockwell C); HRC readings are turned into
#: HV (ASTM E140) where they are stored
SCALES = ("HV0.1", "HV0.3", "HV0.5", "HV1", "HV5", "HV10", "HRC")


def ASTM_E140_hrc_to_hv(hrc):
    """Vickers hardness [HV] for a Rockwell C hardness [HRC], steel, 20–68 HRC.

    Linear interpolation in the conversion table for non-austenitic steels.

    Examples
    --------
    >>> ASTM_E140_hrc_to_hv(50.0)
    513.0

    References
    ----------
    .. [1] ASTM E140, Standard Hardness Conversion Tables for Metals, Table 1 (values as
       commonly reproduced; from memory).
    """
    hrc_arr = np.asarray(hrc, dtype=float)
    if np.any((hrc_arr < HRC_RANGE[0]) | (hrc_arr > HRC_RANGE[1])):
        raise InputError("hardness", f"{hrc} HRC is outside the conversion table, "
                         f"{formats.typed_range(*HRC_RANGE, 'HRC')}")
    out = np.interp(hrc_arr, _HRC, _HV)
    return float(out) if np.ndim(out) == 0 else out


def ASTM_E140_hv_to_hrc(hv):
    """Rockwell C hardness [HRC] for a Vickers hardness [HV], steel, 238–940 HV.

    Examples
    --------
    >>> round(ASTM_E140_hv_to_hrc(550.0), 2)
    52.38

    References
    ----------
    .. [1] ASTM E140, Table 1 (as for :func:`ASTM_E140_hrc_to_hv`).
    """
    hv_arr = np.asarray(hv, dtype=float)
    if np.any((hv_arr < HV_RANGE[0]) | (hv_arr > HV_RANGE[1])):
        raise InputError("hardness", f"{hv} HV is outside the conversion table, "
                         f"{formats.typed_range(*HV_RANGE, 'HV')}")
    out = np.interp(hv_arr, _HV, _HRC)
    return float(out) if np.ndim(out) == 0 else out


JUST_PLATEAU_CARBON = 0.6  # wt %; the formula's stated upper limit, above which hardness is flat


def Just_1968_martensite_hrc(carbon):
    r"""As-quenched hardness of fully martensitic steel after Just (1968).

    .. math::
        HRC = 60\sqrt{C} + 20 \qquad (C \le 0.6\ \mathrm{wt\,\%})

    held constant above 0.6 % C (the plateau of about 66 HRC).

    Parameters
    ----------
    carbon : float or ndarray
        Carbon content, [wt %]

    Returns
    -------
    hrc : float or ndarray
        Hardness, [HRC]

    Notes
    -----
    Valid for 100 % martensite, 0.1–0.6 % C; gives about 47 HRC at 0.2 % C, 58 at 0.4 % and
    66 at 0.6 %, matching the published martensite-hardness curves (Hodge & Orehoski 1946).
    Above 0.6 % C retained austenite after quenching often lowers the hardness instead.

    Examples
    --------
    >>> round(Just_1968_martensite_hrc(0.4), 1)
    57.9

    References
    ----------
    .. [1] Just, E. "Formeln der Härtbarkeit." Härterei-Technische Mitteilungen 23 (1968):
       85–100 (maximum-hardness formula; from memory).
    .. [2] Hodge, J. M., and M. A. Orehoski. "Relationship between hardenability and
       percentage of martensite in some low-alloy steels." Trans. AIME 167 (1946): 627–642.
    """
    c = np.minimum(np.maximum(np.asarray(carbon, dtype=float), 0.0), JUST_PLATEAU_CARBON)
    out = 60.0 * np.sqrt(c) + 20.0
    return float(out) if np.ndim(out) == 0 else out


# Drop in hardness from tempering a carburized case at 150–200 °C. Chosen so that 50 HRC falls
# at about 0.37 % C and a 0.8 % C surface reads about 60 HRC, as is usual for carburized and
# tempered cases (common practice; no single source).
LOW_TEMPER_DROP_HRC = 6.5


@dataclass(frozen=True)
class Quenched:
    """How a depth of the part was quenched and tempered, for the relation that works from the structure:
    the steel's composition [wt %], the cooling rate at 700 °C there [K/s], the lowest temperature of the
    quench [K] and the temper (temperature [K] and time [s], or None for as quenched)."""

    composition: dict
    cooling_rate: float
    quench_temperature: float
    temper_temperature: float | None = None
    temper_time: float | None = None


@dataclass(frozen=True)
class HardnessRelation:
    """One row of the carbon → hardness method table.

    A row either offsets the Just (1968) martensite hardness by a fixed number of HRC (``offset_hrc``;
    the first release's rows, a fully martensitic case), or, with ``structure`` set, works out the
    structure each depth gets in the quench — martensite, bainite, ferrite–pearlite, retained austenite,
    and the temper — from :mod:`casedepth.models.transformation`, given a :class:`Quenched`.
    """

    key: str
    display: str
    offset_hrc: float
    assumptions: str
    reference: str
    structure: bool = False
    superseded_by: str | None = None

    def hv(self, carbon, quenched: Quenched | None = None):
        """Hardness [HV] of the case at carbon content [wt %] (through ASTM E140 for the fixed rows; below
        20 HRC clipped to the table)."""
        if self.structure:
            return self.profile(carbon, quenched)["hv"]
        return ASTM_E140_hrc_to_hv(np.clip(self.hrc(carbon), HRC_RANGE[0], HRC_RANGE[1]))

    def hrc(self, carbon, quenched: Quenched | None = None):
        """Hardness [HRC] of the case at carbon content [wt %]."""
        if self.structure:
            hv = np.clip(self.hv(carbon, quenched), HV_RANGE[0], HV_RANGE[1])
            return ASTM_E140_hv_to_hrc(hv)
        return Just_1968_martensite_hrc(carbon) - self.offset_hrc

    def profile(self, carbon, quenched: Quenched | None) -> dict:
        """The structure and hardness at carbon content(s) [wt %] (structure rows only): the dict of
        :func:`casedepth.models.transformation.hardness_profile`."""
        from .transformation import hardness_profile

        if quenched is None:
            raise InputError("hardness_relation", f"'{self.display}' needs the quench (medium, temperature) and temper")
        carbon = np.asarray(carbon, dtype=float)
        rate = np.broadcast_to(np.asarray(quenched.cooling_rate, dtype=float), carbon.shape)
        return hardness_profile(quenched.composition, carbon, rate, quenched.quench_temperature,
                                quenched.temper_temperature, quenched.temper_time)

    def carbon_for_hrc(self, hrc: float, quenched: Quenched | None = None, core: float = 0.0) -> float:
        """Carbon content [wt %] whose case has the given hardness [HRC] (above ``core`` carbon, where the
        hardness rises with carbon)."""
        if not self.structure:
            top = self.hrc(JUST_PLATEAU_CARBON)
            bottom = self.hrc(0.0)
            if not (bottom < hrc < top):
                raise InputError("threshold_value", f"{formats.typed(hrc, 'HRC')} is outside what the case can have "
                                 f"under '{self.display}', {formats.hardness_range(bottom, top, 'HRC')}")
            return ((hrc - 20.0 + self.offset_hrc) / 60.0) ** 2
        from ..numerics.roots import illinois

        # the hardness rises with carbon up to where retained austenite takes over: search below that peak
        grid = np.linspace(core, 1.0, 61)
        curve = np.asarray(self.hrc(grid, quenched), dtype=float)
        peak = int(np.argmax(curve))
        if curve[0] >= hrc:
            raise InputError("threshold_value", f"{formats.typed(hrc, 'HRC')}: the core ({formats.carbon(core)}) "
                             f"already reaches {formats.hrc(curve[0])} with this quench, so the whole section would "
                             f"count as case; choose a higher threshold or a milder quench")
        if curve[peak] <= hrc:
            raise InputError("threshold_value", f"{formats.typed(hrc, 'HRC')} is above the "
                             f"{formats.hrc(curve[peak])} the case reaches with this steel, quench and temper "
                             f"(at {formats.carbon(grid[peak])}); lower the "
                             f"threshold, or choose a richer steel or a harsher quench")
        i = int(np.argmax(curve[:peak + 1] >= hrc))

        def miss(c):
            return float(self.hrc(np.array([c]), quenched)[0]) - hrc

        return illinois(miss, float(grid[i - 1]), float(curve[i - 1]) - hrc, float(grid[i]), float(curve[i]) - hrc,
                        1e-7, 1e-4)


HARDNESS_RELATIONS: dict[str, HardnessRelation] = {
    "structure-2026": HardnessRelation(
        "structure-2026", "From the quench: hardenability, retained austenite, temper", 0.0,
        "the structure each depth gets in the plan's quench (cooling rate at 700 °C through the part), "
        "martensite/bainite/ferrite–pearlite by Maynier, Jungmann & Dollet (1978), retained austenite by "
        "Koistinen & Marburger (1959), and the plan's temper",
        "Maynier, Jungmann & Dollet (1978); Koistinen & Marburger, Acta Metall. 7 (1959) 59; Hollomon & Jaffe, "
        "Trans. AIME 162 (1945) 223; cooling after Carslaw & Jaeger (1959)", structure=True),
    "tempered": HardnessRelation(
        "tempered", "Martensite tempered at 150–200 °C (first release)", LOW_TEMPER_DROP_HRC,
        "fully martensitic case, low-temperature temper; Just (1968) as-quenched hardness "
        f"less {LOW_TEMPER_DROP_HRC} HRC (common practice)",
        "Just, Härterei-Tech. Mitt. 23 (1968) 85; temper drop: common practice", superseded_by="structure-2026",
    ),
    "as-quenched": HardnessRelation(
        "as-quenched", "As-quenched martensite (first release)", 0.0,
        "fully martensitic case, untempered, no retained austenite",
        "Just, Härterei-Tech. Mitt. 23 (1968) 85", superseded_by="structure-2026",
    ),
}
DEFAULT_HARDNESS_RELATION = "structure-2026"


def threshold_carbon(threshold: Threshold, relation: str = "tempered", quenched: Quenched | None = None,
                     core: float = 0.0) -> float:
    """The carbon content [wt %] equivalent to a case-depth threshold (carbon passes through); the
    structure relation reads it at the quench ``quenched`` (and above the ``core`` carbon)."""
    if threshold.kind == "carbon":
        return threshold.value
    if threshold.kind == "above core":
        raise InputError("threshold_value", "a threshold above the core's carbon needs the steel: use the setup's threshold_carbon")
    if relation not in HARDNESS_RELATIONS:
        raise InputError("hardness_relation", f"unknown relation {relation!r}; choose one of {', '.join(HARDNESS_RELATIONS)}")
    try:
        hrc = threshold.value if threshold.kind == "HRC" else ASTM_E140_hv_to_hrc(threshold.value)
    except InputError as error:
        raise error.renamed("threshold_value") from None
    rel = HARDNESS_RELATIONS[relation]
    try:
        return rel.carbon_for_hrc(hrc, quenched, core)
    except InputError:
        if threshold.kind == "HRC" or rel.structure:
            raise
        low, high = (float(ASTM_E140_hrc_to_hv(x)) for x in (rel.hrc(0.0), rel.hrc(JUST_PLATEAU_CARBON)))
        raise InputError("threshold_value", f"{threshold} ({formats.typed(hrc, 'HRC')}) is outside what the case can "
                         f"have under '{rel.display}', {formats.hardness_range(low, high, 'HV')}") from None


__all__ = [
    "ASTM_E140_hrc_to_hv", "ASTM_E140_hv_to_hrc", "Just_1968_martensite_hrc", "HARDNESS_RELATIONS",
    "DEFAULT_HARDNESS_RELATION", "HardnessRelation", "Quenched", "threshold_carbon",
]
