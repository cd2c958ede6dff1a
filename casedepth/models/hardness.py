"""Hardness of the carburized case: carbon → hardness and the HV ↔ HRC conversion.

Drawings give effective case depth at a hardness (550 HV after ISO 18203, 50 HRC after
SAE J423) as often as at a carbon content. The solver works in carbon, so a hardness
threshold is turned into the carbon content whose martensite has that hardness. The
relations here assume a fully martensitic case (enough hardenability and a quench severe
enough for the section); they do not model bainite, retained austenite or alloy effects.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

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
        raise InputError("hardness", f"{hrc} HRC is outside the conversion table, {HRC_RANGE[0]:g}–{HRC_RANGE[1]:g} HRC")
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
        raise InputError("hardness", f"{hv} HV is outside the conversion table, {HV_RANGE[0]:g}–{HV_RANGE[1]:g} HV")
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
class HardnessRelation:
    """One row of the carbon → hardness method table."""

    key: str
    display: str
    offset_hrc: float
    assumptions: str
    reference: str

    def hrc(self, carbon):
        """Hardness [HRC] of the case at carbon content [wt %]."""
        return Just_1968_martensite_hrc(carbon) - self.offset_hrc

    def hv(self, carbon):
        """Hardness [HV] of the case at carbon content [wt %] (through ASTM E140); below 20 HRC clipped to the table."""
        return ASTM_E140_hrc_to_hv(np.clip(self.hrc(carbon), HRC_RANGE[0], HRC_RANGE[1]))

    def carbon_for_hrc(self, hrc: float) -> float:
        """Carbon content [wt %] whose martensite has the given hardness [HRC]."""
        top = self.hrc(JUST_PLATEAU_CARBON)
        bottom = self.hrc(0.0)
        if not (bottom < hrc < top):
            raise InputError("threshold_value", f"{hrc:.1f} HRC is outside what the case can have under "
                             f"'{self.display}', {bottom:.1f}–{top:.1f} HRC")
        return ((hrc - 20.0 + self.offset_hrc) / 60.0) ** 2


HARDNESS_RELATIONS: dict[str, HardnessRelation] = {
    "tempered": HardnessRelation(
        "tempered", "Martensite tempered at 150–200 °C", LOW_TEMPER_DROP_HRC,
        "fully martensitic case, low-temperature temper; Just (1968) as-quenched hardness "
        f"less {LOW_TEMPER_DROP_HRC} HRC (common practice)",
        "Just, Härterei-Tech. Mitt. 23 (1968) 85; temper drop: common practice",
    ),
    "as-quenched": HardnessRelation(
        "as-quenched", "As-quenched martensite", 0.0,
        "fully martensitic case, untempered, no retained austenite",
        "Just, Härterei-Tech. Mitt. 23 (1968) 85",
    ),
}


def threshold_carbon(threshold: Threshold, relation: str = "tempered") -> float:
    """The carbon content [wt %] equivalent to a case-depth threshold (carbon passes through)."""
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
        return rel.carbon_for_hrc(hrc)
    except InputError:
        if threshold.kind == "HRC":
            raise
        low, high = (float(ASTM_E140_hrc_to_hv(x)) for x in (rel.hrc(0.0), rel.hrc(JUST_PLATEAU_CARBON)))
        raise InputError("threshold_value", f"{threshold} ({hrc:.1f} HRC) is outside what the case can have under "
                         f"'{rel.display}', {low:.0f}–{high:.0f} HV") from None


__all__ = [
    "ASTM_E140_hrc_to_hv", "ASTM_E140_hv_to_hrc", "Just_1968_martensite_hrc", "HARDNESS_RELATIONS",
    "HardnessRelation", "threshold_carbon",
]
