"""What the austenite of a case becomes on quenching and tempering, and how hard that is at each depth.

The carbon profile a carburizing cycle leaves is turned into hardness in four steps, each its own
small function:

* the shares of martensite, bainite and ferrite–pearlite from the composition, the local carbon and
  the cooling rate at 700 °C — the critical cooling rates of Maynier, Jungmann & Dollet (1978);
* the hardness of each constituent, from the same paper (martensite capped at the plateau of
  high-carbon martensite, :data:`MARTENSITE_PLATEAU_HV`);
* the martensite start temperature from the local carbon (:data:`MARTENSITE_START_METHODS`) and the
  austenite left untransformed at the quench temperature, after Koistinen & Marburger (1959);
* low-temperature tempering through the Hollomon–Jaffe (1945) parameter.

:func:`hardness_profile` chains them over a whole depth profile (vectorised: carbon and cooling rate are
arrays). Hardness is in HV throughout; :mod:`casedepth.models.hardness` converts to HRC.

What is confirmed and what is recalled is said in each docstring. In short: the three constituent
hardness formulas, the Andrews (1965) Ms formula, the Koistinen–Marburger equation and the Hollomon–Jaffe
form are confirmed from secondary copies; the critical-rate regressions, the van Bohemen (2012) and
Steven & Haynes (1956) Ms formulas, the hardness of austenite and the tempering softening are from memory.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

from .. import formats
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from .hardness import (
    ASTM_E140_hrc_to_hv, ASTM_E140_hv_to_hrc, HRC_RANGE, HV_RANGE, JUST_PLATEAU_CARBON, Just_1968_martensite_hrc,
)

#: seconds per hour: Maynier's cooling rates are in °C/h and tempering times in the Hollomon–Jaffe parameter in h
_HOUR = 3600.0

#: largest alloy contents [wt %] of the low-alloy steels Maynier et al. fitted (from memory)
MAYNIER_ALLOY_LIMITS = {"Mn": 2.0, "Si": 1.0, "Ni": 4.0, "Cr": 3.0, "Mo": 1.0, "V": 0.2}
#: carbon range [wt %] of Maynier et al.'s regressions; the profile evaluates the bainite, ferrite–pearlite and
#: critical-rate formulas at no more than the upper end (see :func:`hardness_profile`)
MAYNIER_CARBON_RANGE = (0.1, 0.5)
#: cooling rates at 700 °C accepted [K/s]: from a slow furnace cool to a water quench
COOLING_RATE_RANGE = (1e-3, 1e4)
#: local carbon accepted by the profile [wt %]: core to the richest case
CARBON_RANGE = (0.0, 1.5)
#: lowest temperature reached before tempering [K]: liquid nitrogen to a hot martempering bath
QUENCH_TEMPERATURE_RANGE = (77.0, 573.15)

#: hardness of as-quenched martensite at and above the plateau of Just (1968), 0.6 % C: about 882 HV (66.5 HRC)
MARTENSITE_PLATEAU_HV = float(ASTM_E140_hrc_to_hv(Just_1968_martensite_hrc(JUST_PLATEAU_CARBON)))
#: hardness of retained austenite in a carburized case [HV]; 200–250 HV is usually quoted (from memory)
AUSTENITE_HV = 230.0
#: rate constant of Koistinen & Marburger (1959) [1/K]
KOISTINEN_MARBURGER_RATE = 0.011
#: default austenitizing parameter [K]: a carburizing hold at 925 °C (the time term is not applied, see
#: :func:`Maynier_1978_critical_cooling_rates`)
DEFAULT_AUSTENITIZING_PARAMETER = 925.0 + ZERO_CELSIUS


def _as_output(out):
    return float(out) if np.ndim(out) == 0 else out


def _alloy(composition, limits=None) -> dict[str, float]:
    """The alloy contents the formulas read, as floats (missing = 0), checked; carbon is passed separately."""
    if not isinstance(composition, dict):
        raise InputError("composition", "give the composition as a dict of element → wt %, e.g. {'Mn': 0.8}")
    out = {}
    for element in ("Mn", "Si", "Ni", "Cr", "Mo", "V"):
        value = composition.get(element, 0.0)
        try:
            amount = float(value)
        except (TypeError, ValueError):
            raise InputError("composition", f"{element}={value!r} is not a number") from None
        high = (limits or {}).get(element, 10.0)
        if not (math.isfinite(amount) and 0.0 <= amount <= high):
            raise InputError("composition", f"{element}={value!r} wt % is outside 0–{high:g} wt %"
                             + (" (the low-alloy steels of Maynier et al. 1978)" if limits else ""))
        out[element] = amount
    return out


def _array(value, field: str, low: float, high: float, unit: str, *, open_low: bool = False) -> np.ndarray:
    arr = np.asarray(value, dtype=float)
    bad = ~np.isfinite(arr) | (arr > high) | ((arr <= low) if open_low else (arr < low))
    if np.any(bad):
        first = arr[bad].flat[0] if arr.ndim else arr
        bracket = "(" if open_low else "["
        raise InputError(field, f"{first:g} {unit} is outside {bracket}{low:g}, {high:g}] {unit}")
    return arr


def _carbon(carbon, high: float = 2.1) -> np.ndarray:
    return _array(carbon, "carbon", 0.0, high, "wt %")


def _cooling_rate_log(cooling_rate) -> np.ndarray:
    """log10 of the cooling rate in °C/h, the unit of Maynier et al.'s formulas, from K/s."""
    rate = _array(cooling_rate, "cooling_rate_700", COOLING_RATE_RANGE[0], COOLING_RATE_RANGE[1], "K/s")
    return np.log10(rate * _HOUR)


# -- hardness of the constituents -------------------------------------------------------------------------
def Maynier_1978_martensite_hv(composition, carbon, cooling_rate):
    r"""Hardness of as-quenched martensite after Maynier, Jungmann & Dollet (1978).

    .. math::
        HV_M = 127 + 949\,C + 27\,Si + 11\,Mn + 8\,Ni + 16\,Cr + 21 \log_{10} V_r

    with :math:`V_r` the cooling rate at 700 °C in °C/h (converted here from K/s: ×3600).

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol (Mn, Si, Ni, Cr), missing ones zero; its carbon is not used, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]
    cooling_rate : float or ndarray
        Cooling rate at 700 °C, [K/s]

    Returns
    -------
    hv : float or ndarray
        Hardness, [HV]

    Notes
    -----
    Regression on low-alloy steels with 0.1–0.5 % C (:data:`MAYNIER_ALLOY_LIMITS`). The
    :math:`\log V_r` term is the self-tempering of martensite formed in a slower quench. It agrees with
    Just (1968) within about 1.5 HRC from 0.2 to 0.6 % C for 8620 at 50 K/s. It keeps rising with
    carbon; above about 0.6 % C it overstates (1020 HV at 0.8 % C), which is why :func:`hardness_profile`
    caps it at :data:`MARTENSITE_PLATEAU_HV`. Formula confirmed from secondary copies.

    Examples
    --------
    >>> round(Maynier_1978_martensite_hv({"Mn": 0.8, "Si": 0.25, "Ni": 0.55, "Cr": 0.5}, 0.2, 50.0), 1)
    455.1

    References
    ----------
    .. [1] Maynier, P., B. Jungmann, and J. Dollet. "Creusot-Loire system for the prediction of the
       mechanical properties of low alloy steel products." In Hardenability Concepts with Applications
       to Steel, edited by D. V. Doane and J. S. Kirkaldy, 518–545. Warrendale, PA: The Metallurgical
       Society of AIME, 1978 (editors and pages from memory).
    """
    return _as_output(_martensite_hv(_alloy(composition, MAYNIER_ALLOY_LIMITS), _carbon(carbon),
                                     _cooling_rate_log(cooling_rate)))


def _martensite_hv(a, c, log_v):
    return 127.0 + 949.0 * c + 27.0 * a["Si"] + 11.0 * a["Mn"] + 8.0 * a["Ni"] + 16.0 * a["Cr"] + 21.0 * log_v


def Maynier_1978_bainite_hv(composition, carbon, cooling_rate):
    r"""Hardness of bainite formed on continuous cooling, after Maynier, Jungmann & Dollet (1978).

    .. math::
        HV_B = -323 + 185\,C + 330\,Si + 153\,Mn + 65\,Ni + 144\,Cr + 191\,Mo
               + (89 + 53\,C - 55\,Si - 22\,Mn - 10\,Ni - 20\,Cr - 33\,Mo) \log_{10} V_r

    with :math:`V_r` the cooling rate at 700 °C in °C/h (converted here from K/s).

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol (Mn, Si, Ni, Cr, Mo), missing ones zero, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]
    cooling_rate : float or ndarray
        Cooling rate at 700 °C, [K/s]

    Returns
    -------
    hv : float or ndarray
        Hardness, [HV]

    Notes
    -----
    Low-alloy steels, 0.1–0.5 % C. Confirmed from secondary copies; one open-source copy has 158 C for
    185 C (a transposition, we take 185).

    Examples
    --------
    >>> round(Maynier_1978_bainite_hv({"Mn": 0.8, "Si": 0.25, "Ni": 0.55, "Cr": 0.5, "Mo": 0.2}, 0.2, 15.0), 1)
    283.2

    References
    ----------
    .. [1] Maynier, Jungmann and Dollet (1978), as for :func:`Maynier_1978_martensite_hv`.
    """
    return _as_output(_bainite_hv(_alloy(composition, MAYNIER_ALLOY_LIMITS), _carbon(carbon),
                                  _cooling_rate_log(cooling_rate)))


def _bainite_hv(a, c, log_v):
    base = -323.0 + 185.0 * c + 330.0 * a["Si"] + 153.0 * a["Mn"] + 65.0 * a["Ni"] + 144.0 * a["Cr"] + 191.0 * a["Mo"]
    slope = 89.0 + 53.0 * c - 55.0 * a["Si"] - 22.0 * a["Mn"] - 10.0 * a["Ni"] - 20.0 * a["Cr"] - 33.0 * a["Mo"]
    return base + slope * log_v


def Maynier_1978_ferrite_pearlite_hv(composition, carbon, cooling_rate):
    r"""Hardness of ferrite–pearlite formed on continuous cooling, after Maynier, Jungmann & Dollet (1978).

    .. math::
        HV_{FP} = 42 + 223\,C + 53\,Si + 30\,Mn + 12.6\,Ni + 7\,Cr + 19\,Mo
                  + (10 - 19\,Si + 4\,Ni + 8\,Cr + 130\,V) \log_{10} V_r

    with :math:`V_r` the cooling rate at 700 °C in °C/h (converted here from K/s).

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol (Mn, Si, Ni, Cr, Mo, V), missing ones zero, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]
    cooling_rate : float or ndarray
        Cooling rate at 700 °C, [K/s]

    Returns
    -------
    hv : float or ndarray
        Hardness, [HV]

    Notes
    -----
    Low-alloy steels, 0.1–0.5 % C. Confirmed from secondary copies.

    Examples
    --------
    >>> round(Maynier_1978_ferrite_pearlite_hv({"Mn": 0.8, "Si": 0.25, "Ni": 0.55, "Cr": 0.5, "Mo": 0.2}, 0.2, 0.1), 1)
    167.3

    References
    ----------
    .. [1] Maynier, Jungmann and Dollet (1978), as for :func:`Maynier_1978_martensite_hv`.
    """
    return _as_output(_ferrite_pearlite_hv(_alloy(composition, MAYNIER_ALLOY_LIMITS), _carbon(carbon),
                                           _cooling_rate_log(cooling_rate)))


def _ferrite_pearlite_hv(a, c, log_v):
    base = 42.0 + 223.0 * c + 53.0 * a["Si"] + 30.0 * a["Mn"] + 12.6 * a["Ni"] + 7.0 * a["Cr"] + 19.0 * a["Mo"]
    slope = 10.0 - 19.0 * a["Si"] + 4.0 * a["Ni"] + 8.0 * a["Cr"] + 130.0 * a["V"]
    return base + slope * log_v


# -- constituent shares from the critical cooling rates ----------------------------------------------------
# log10 V [°C/h] = a0 - (aC C + aMn Mn + aNi Ni + aCr Cr + aMo Mo + aRootMo sqrt(Mo) + aP P_A), one row per
# critical rate, with the structure (martensite, bainite shares) at that rate. From memory; an open-source
# re-implementation has the same numbers (we took its 4.12 C in V3 and 0.27 Cr in V8 where we recalled 4.13, 0.26).
_CRITICAL_RATES = (
    # a0,    C,    Mn,   Ni,   Cr,   Mo,  sqrtMo, P_A,    M,   B
    (9.81, 4.62, 1.05, 0.54, 0.50, 0.66, 0.0, 0.00183, 1.0, 0.0),   # V1: 100 % martensite
    (8.76, 4.04, 0.96, 0.49, 0.58, 0.97, 0.0, 0.0010, 0.9, 0.1),    # V2: 90 % martensite
    (8.50, 4.12, 0.86, 0.57, 0.41, 0.94, 0.0, 0.0012, 0.5, 0.5),    # V3: 50 % martensite
    (10.17, 3.80, 1.07, 0.70, 0.57, 1.58, 0.0, 0.0032, 0.0, 1.0),   # V4: no martensite, 100 % bainite
    (10.55, 3.65, 1.08, 0.77, 0.61, 1.49, 0.0, 0.0040, 0.0, 0.9),   # V5: 90 % bainite
    (8.74, 2.23, 0.86, 0.56, 0.59, 1.60, 0.0, 0.0032, 0.0, 0.5),    # V6: 50 % bainite
    (7.51, 1.38, 0.35, 0.93, 0.11, 2.31, 0.0, 0.0033, 0.0, 0.1),    # V7: 10 % bainite, 90 % ferrite–pearlite
    (6.36, 0.43, 0.49, 0.78, 0.27, 0.38, 2.0, 0.0019, 0.0, 0.0),    # V8: 100 % ferrite–pearlite
)
_RATE_COEFFICIENTS = np.array([row[:8] for row in _CRITICAL_RATES])
_KNOT_MARTENSITE = np.array([row[8] for row in _CRITICAL_RATES])
_KNOT_BAINITE = np.array([row[9] for row in _CRITICAL_RATES])
#: what each critical rate of :func:`Maynier_1978_critical_cooling_rates` marks
CRITICAL_RATE_LABELS = ("100 % M", "90 % M", "50 % M", "0 % M (100 % B)", "90 % B", "50 % B", "10 % B", "100 % F–P")


def _austenitizing_parameter(value) -> float:
    try:
        p_a = float(value)
    except (TypeError, ValueError):
        raise InputError("austenitizing_parameter", f"{value!r} is not a temperature in K") from None
    if not (1073.15 <= p_a <= 1373.15):
        raise InputError("austenitizing_parameter", f"{p_a:g} K is outside 1073–1373 K (800–1100 °C)")
    return p_a


def _log_critical_rates(a: dict, c: np.ndarray, p_a: float) -> np.ndarray:
    """log10 of the eight critical rates [°C/h], shape (8,) + c.shape, made non-increasing."""
    k = _RATE_COEFFICIENTS.reshape((8,) + (1,) * c.ndim + (8,))
    alloy = (k[..., 2] * a["Mn"] + k[..., 3] * a["Ni"] + k[..., 4] * a["Cr"] + k[..., 5] * a["Mo"]
             + k[..., 6] * math.sqrt(a["Mo"]) + k[..., 7] * (p_a - ZERO_CELSIUS))
    log_v = k[..., 0] - k[..., 1] * c - alloy
    # the eight are independent fits and cross for some grades (1045, 20MnCr5 near V7/V8): keep them ordered
    return np.minimum.accumulate(log_v, axis=0)


def Maynier_1978_critical_cooling_rates(composition, carbon, austenitizing_parameter=DEFAULT_AUSTENITIZING_PARAMETER):
    r"""The eight critical cooling rates at 700 °C that bound the structure, after Maynier, Jungmann & Dollet (1978).

    .. math::
        \log_{10} V_i = a_i - (b_i\,C + c_i\,Mn + d_i\,Ni + e_i\,Cr + f_i\,Mo + g_i\sqrt{Mo} + h_i\,P_A)

    in °C/h, for V1 (100 % martensite), V2 (90 % M), V3 (50 % M), V4 (no martensite, all bainite),
    V5 (90 % bainite), V6 (50 % B), V7 (10 % B, the rest ferrite–pearlite), V8 (all ferrite–pearlite);
    the coefficients are in ``_CRITICAL_RATES`` and :data:`CRITICAL_RATE_LABELS` names the rows.

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol (Mn, Ni, Cr, Mo), missing ones zero, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]
    austenitizing_parameter : float, optional
        :math:`P_A`: the austenitizing temperature for a 1 h hold, [K]

    Returns
    -------
    rates : ndarray
        The eight rates, fastest first, shape ``(8,) + shape(carbon)``, [K/s]

    Notes
    -----
    **From memory.** Low-alloy steels with 0.1–0.5 % C. In the paper
    :math:`P_A = [1/T - (R/\Delta H)\ln(t/t_0)]^{-1}` grows with the austenitizing time t (t0 = 1 h); we do
    not recall ΔH, so the argument is the temperature of a 1 h hold. Nor are we sure of the unit in which
    the regressions read P_A: in kelvin the eight lines cross for common grades (V2 above V1 for 8620 at
    900 °C, which cannot be); in degrees Celsius they are in order for 8620, 4140 and 9310, and 8620's
    50 % martensite rate (44 K/s) falls between Jominy J4 and J5, as its H-band suggests (from memory).
    We therefore evaluate them with P_A in °C — check against the paper. Where two rates still cross,
    the slower is lowered to the faster (the shares then stay monotone in the cooling rate). Carbon
    enters log V linearly (4.6 per % C in V1): beyond 0.5 % C the rates fall absurdly fast (8620 with
    0.8 % C would be fully martensitic at 0.3 K/s), so :func:`hardness_profile` evaluates them at no more
    than 0.5 % C.

    Examples
    --------
    >>> rates = Maynier_1978_critical_cooling_rates({"Mn": 0.8, "Ni": 0.55, "Cr": 0.5, "Mo": 0.2}, 0.2, 1173.15)
    >>> [round(float(v), 1) for v in rates[:4]]
    [145.8, 94.2, 44.2, 13.5]

    References
    ----------
    .. [1] Maynier, Jungmann and Dollet (1978), as for :func:`Maynier_1978_martensite_hv`.
    """
    a = _alloy(composition, MAYNIER_ALLOY_LIMITS)
    c = _carbon(carbon)
    return 10.0 ** _log_critical_rates(a, c, _austenitizing_parameter(austenitizing_parameter)) / _HOUR


def _shares(log_knots: np.ndarray, log_v: np.ndarray):
    """Martensite and bainite shares, linear in log V between the (non-increasing) knots."""
    k = np.sum(log_knots > log_v, axis=0)             # knots faster than V: 0 → above V1, 8 → below V8
    upper = np.clip(k - 1, 0, 7)                       # the knot just faster than V
    lower = np.clip(k, 0, 7)                           # the knot at or just slower than V
    x_up = np.take_along_axis(log_knots, upper[None], 0)[0]
    x_lo = np.take_along_axis(log_knots, lower[None], 0)[0]
    width = np.where(x_up > x_lo, x_up - x_lo, 1.0)
    w = np.clip(np.where(x_up > x_lo, (log_v - x_lo) / width, 1.0), 0.0, 1.0)
    martensite = _KNOT_MARTENSITE[lower] + w * (_KNOT_MARTENSITE[upper] - _KNOT_MARTENSITE[lower])
    bainite = _KNOT_BAINITE[lower] + w * (_KNOT_BAINITE[upper] - _KNOT_BAINITE[lower])
    return martensite, bainite


def Maynier_1978_constituent_fractions(composition, carbon, cooling_rate,
                                       austenitizing_parameter=DEFAULT_AUSTENITIZING_PARAMETER):
    r"""Shares of martensite, bainite and ferrite–pearlite after a continuous cool, after Maynier et al. (1978).

    .. math::
        f_j(V) = f_j(V_{i+1}) + \frac{\log V - \log V_{i+1}}{\log V_i - \log V_{i+1}}
                 \bigl(f_j(V_i) - f_j(V_{i+1})\bigr), \qquad V_{i+1} \le V < V_i

    with the shares :math:`f_j(V_i)` the critical rates mark (:data:`CRITICAL_RATE_LABELS`); 100 %
    martensite above V1, 100 % ferrite–pearlite below V8.

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol, missing ones zero, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]
    cooling_rate : float or ndarray
        Cooling rate at 700 °C, [K/s]
    austenitizing_parameter : float, optional
        :math:`P_A`, the austenitizing temperature of a 1 h hold, [K]

    Returns
    -------
    martensite, bainite, ferrite_pearlite : float or ndarray
        Shares of the transformed austenite, summing to one, [-]

    Notes
    -----
    The interpolation, linear in log V between the critical rates, is ours (the paper's critical rates
    are from memory, see :func:`Maynier_1978_critical_cooling_rates`). "Martensite" here is the austenite
    that reaches Ms untransformed; how much of it stays austenite is :func:`retained_austenite`.

    Examples
    --------
    >>> m, b, fp = Maynier_1978_constituent_fractions({"Mn": 0.8, "Ni": 0.55, "Cr": 0.5, "Mo": 0.2}, 0.2, 20.0, 1173.15)
    >>> round(m, 3), round(b, 3), round(fp, 3)
    (0.165, 0.835, 0.0)

    References
    ----------
    .. [1] Maynier, Jungmann and Dollet (1978), as for :func:`Maynier_1978_martensite_hv`.
    """
    a = _alloy(composition, MAYNIER_ALLOY_LIMITS)
    c = _carbon(carbon)
    log_v = _cooling_rate_log(cooling_rate)
    c, log_v = np.broadcast_arrays(c, log_v)
    knots = _log_critical_rates(a, c, _austenitizing_parameter(austenitizing_parameter))
    martensite, bainite = _shares(knots, log_v)
    return _as_output(martensite), _as_output(bainite), _as_output(1.0 - martensite - bainite)


# -- martensite start and retained austenite --------------------------------------------------------------
def Andrews_1965_martensite_start(composition, carbon):
    r"""Martensite start temperature after Andrews (1965), linear formula.

    .. math::
        M_s\,[°C] = 539 - 423\,C - 30.4\,Mn - 17.7\,Ni - 12.1\,Cr - 7.5\,Mo

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol (Mn, Ni, Cr, Mo), missing ones zero, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]

    Returns
    -------
    Ms : float or ndarray
        Temperature, [K]

    Notes
    -----
    Fitted to low-alloy steels with up to 0.6 % C. Beyond that it runs low: about 110 °C for a plain
    1.0 % C steel against about 200 °C measured (from memory), which would leave most of a 1 % C case
    austenitic after an oil quench. Formula confirmed from secondary copies.

    Examples
    --------
    >>> round(Andrews_1965_martensite_start({"Mn": 0.45}, 0.2) - 273.15, 1)
    440.7

    References
    ----------
    .. [1] Andrews, K. W. "Empirical formulae for the calculation of some transformation
       temperatures." Journal of the Iron and Steel Institute 203 (1965): 721–727.
    """
    a = _alloy(composition)
    c = _carbon(carbon)
    celsius = 539.0 - 423.0 * c - 30.4 * a["Mn"] - 17.7 * a["Ni"] - 12.1 * a["Cr"] - 7.5 * a["Mo"]
    return _as_output(celsius + ZERO_CELSIUS)


def Steven_Haynes_1956_martensite_start(composition, carbon):
    r"""Martensite start temperature after Steven & Haynes (1956).

    .. math::
        M_s\,[°C] = 561 - 474\,C - 33\,Mn - 17\,Ni - 17\,Cr - 21\,Mo

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol (Mn, Ni, Cr, Mo), missing ones zero, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]

    Returns
    -------
    Ms : float or ndarray
        Temperature, [K]

    Notes
    -----
    **From memory.** Low-alloy steels with 0.1–0.55 % C; like Andrews' linear formula it runs low at
    case carbon levels.

    Examples
    --------
    >>> round(Steven_Haynes_1956_martensite_start({"Mn": 0.45}, 0.2) - 273.15, 1)
    451.4

    References
    ----------
    .. [1] Steven, W., and A. G. Haynes. "The temperature of formation of martensite and bainite in
       low-alloy steels." Journal of the Iron and Steel Institute 183 (1956): 349–359.
    """
    a = _alloy(composition)
    c = _carbon(carbon)
    celsius = 561.0 - 474.0 * c - 33.0 * a["Mn"] - 17.0 * a["Ni"] - 17.0 * a["Cr"] - 21.0 * a["Mo"]
    return _as_output(celsius + ZERO_CELSIUS)


def van_Bohemen_2012_martensite_start(composition, carbon):
    r"""Martensite start temperature with an exponential carbon term, after van Bohemen (2012).

    .. math::
        M_s\,[°C] = 565 - (31\,Mn + 13\,Si + 10\,Cr + 18\,Ni + 12\,Mo) - 600\,[1 - \exp(-0.96\,C)]

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol (Mn, Si, Cr, Ni, Mo), missing ones zero, [wt %]
    carbon : float or ndarray
        Carbon content, [wt %]

    Returns
    -------
    Ms : float or ndarray
        Temperature, [K]

    Notes
    -----
    **From memory** (an open-source copy agrees). Fitted to low-alloy steels up to about 1 % C; the
    exponential term flattens the fall of Ms at high carbon, giving about 450 °C at 0.2 % C and 195 °C
    at 1.0 % C for plain carbon steel, as measured (from memory). Agrees with Andrews (1965) within a
    few kelvin at the core of carburizing grades; this is why it is the default for case profiles.

    Examples
    --------
    >>> round(van_Bohemen_2012_martensite_start({}, 1.0) - 273.15, 1)
    194.7

    References
    ----------
    .. [1] van Bohemen, S. M. C. "Bainite and martensite start temperature calculated with exponential
       carbon dependence." Materials Science and Technology 28 (2012): 487–495.
    """
    a = _alloy(composition)
    c = _carbon(carbon)
    celsius = (565.0 - (31.0 * a["Mn"] + 13.0 * a["Si"] + 10.0 * a["Cr"] + 18.0 * a["Ni"] + 12.0 * a["Mo"])
               - 600.0 * (1.0 - np.exp(-0.96 * c)))
    return _as_output(celsius + ZERO_CELSIUS)


@dataclass(frozen=True)
class MartensiteStartMethod:
    """One row of the martensite-start method table."""

    key: str
    display: str
    function: Callable
    carbon_range: tuple[float, float]  # wt %, where the formula was fitted
    reference: str


MARTENSITE_START_METHODS: dict[str, MartensiteStartMethod] = {
    row.key: row for row in (
        MartensiteStartMethod("van-bohemen", "van Bohemen 2012 (exponential in C)", van_Bohemen_2012_martensite_start,
                              (0.0, 1.0), "van Bohemen, Mater. Sci. Technol. 28 (2012) 487 (from memory)"),
        MartensiteStartMethod("andrews", "Andrews 1965 (linear)", Andrews_1965_martensite_start,
                              (0.0, 0.6), "Andrews, J. Iron Steel Inst. 203 (1965) 721"),
        MartensiteStartMethod("steven-haynes", "Steven & Haynes 1956", Steven_Haynes_1956_martensite_start,
                              (0.1, 0.55), "Steven & Haynes, J. Iron Steel Inst. 183 (1956) 349 (from memory)"),
    )
}


def _ms_method(method: str) -> MartensiteStartMethod:
    if method not in MARTENSITE_START_METHODS:
        raise InputError("ms_method", f"unknown method {method!r}; choose one of {', '.join(MARTENSITE_START_METHODS)}")
    return MARTENSITE_START_METHODS[method]


def Koistinen_Marburger_1959_martensite_fraction(ms, temperature, rate=KOISTINEN_MARBURGER_RATE):
    r"""Fraction of austenite turned to martensite on cooling below Ms, after Koistinen & Marburger (1959).

    .. math::
        f = 1 - \exp[-\alpha\,(M_s - T)] \quad (T < M_s), \qquad f = 0 \quad (T \ge M_s)

    Parameters
    ----------
    ms : float or ndarray
        Martensite start temperature, [K]
    temperature : float or ndarray
        Lowest temperature reached, [K]
    rate : float, optional
        :math:`\alpha`, [1/K]; 0.011 as published

    Returns
    -------
    fraction : float or ndarray
        Martensite fraction of the austenite that reached Ms, [-]

    Notes
    -----
    Measured on Fe–C alloys and plain carbon steels with about 0.4–1.1 % C quenched to between room
    temperature and −196 °C. Athermal: the cooling rate does not enter. Confirmed from secondary copies.

    Examples
    --------
    >>> round(Koistinen_Marburger_1959_martensite_fraction(473.15, 333.15), 3)
    0.786

    References
    ----------
    .. [1] Koistinen, D. P., and R. E. Marburger. "A general equation prescribing the extent of the
       austenite-martensite transformation in pure iron-carbon alloys and plain carbon steels."
       Acta Metallurgica 7 (1959): 59–60.
    """
    undercooling = np.maximum(np.asarray(ms, dtype=float) - np.asarray(temperature, dtype=float), 0.0)
    return _as_output(1.0 - np.exp(-rate * undercooling))


def retained_austenite(composition, carbon, quench_temperature, ms_method: str = "van-bohemen"):
    r"""Austenite left untransformed after quenching a fully hardened case to ``quench_temperature``.

    .. math::
        A_R = \exp[-0.011\,(M_s(C) - T_q)] \quad (T_q < M_s), \qquad A_R = 1 \quad (T_q \ge M_s)

    Koistinen & Marburger (1959) with Ms from the local carbon by ``ms_method``.

    Parameters
    ----------
    composition : dict
        Alloy contents by element symbol, missing ones zero, [wt %]
    carbon : float or ndarray
        Local carbon dissolved in the austenite, [wt %]
    quench_temperature : float
        Lowest temperature the part reaches before tempering, [K]: the oil temperature if it goes
        from the oil to the temper, room temperature if it cools down first, lower for a cold treatment
    ms_method : str, optional
        Key of :data:`MARTENSITE_START_METHODS`

    Returns
    -------
    retained_austenite : float or ndarray
        Volume fraction of the case (before tempering), [-]

    Notes
    -----
    Assumes the austenite reaches Ms untransformed (a fully hardening cool) and ignores stabilisation
    during pauses in the quench. Carbon is what is dissolved: where carbides did not dissolve, the
    austenite holds less. Unchanged by tempering below about 200 °C.

    Examples
    --------
    >>> round(retained_austenite({"Mn": 0.8, "Si": 0.25, "Ni": 0.55, "Cr": 0.5, "Mo": 0.2}, 0.8, 333.15), 3)
    0.219

    References
    ----------
    .. [1] Koistinen and Marburger (1959), as for :func:`Koistinen_Marburger_1959_martensite_fraction`.
    .. [2] The Ms method's reference in :data:`MARTENSITE_START_METHODS`.
    """
    method = _ms_method(ms_method)
    c = _array(carbon, "carbon", CARBON_RANGE[0], CARBON_RANGE[1], "wt %")
    t_q = float(_array(quench_temperature, "quench_temperature", *QUENCH_TEMPERATURE_RANGE, "K"))
    ms = np.asarray(method.function(composition, c))
    return _as_output(1.0 - np.asarray(Koistinen_Marburger_1959_martensite_fraction(ms, t_q)))


# -- tempering ---------------------------------------------------------------------------------------------
def Hollomon_Jaffe_1945_parameter(temperature, time, constant=20.0):
    r"""Tempering parameter of Hollomon & Jaffe (1945).

    .. math::
        P = T\,(C + \log_{10} t_h)

    with :math:`t_h` the time in hours.

    Parameters
    ----------
    temperature : float or ndarray
        Tempering temperature, [K]
    time : float or ndarray
        Tempering time, [s]
    constant : float, optional
        C; 20 is the usual value for carbon and low-alloy steels. Some sources make it fall with carbon
        (21.3 − 5.8 C, from memory); we use 20 throughout.

    Returns
    -------
    P : float or ndarray
        Parameter, [K] (with the time in hours inside the logarithm)

    Notes
    -----
    Equal P, equal hardness: a way to trade tempering time against temperature. The form is confirmed
    from secondary copies; the value of C is from memory.

    Examples
    --------
    >>> round(Hollomon_Jaffe_1945_parameter(873.15, 3600.0))
    17463

    References
    ----------
    .. [1] Hollomon, J. H., and L. D. Jaffe. "Time-temperature relations in tempering steel."
       Transactions of the American Institute of Mining and Metallurgical Engineers 162 (1945): 223–249.
    """
    t = _array(temperature, "temper_temperature", 0.0, 2000.0, "K", open_low=True)
    hours = _array(time, "temper_time", 0.0, 1e9, "s", open_low=True) / _HOUR
    return _as_output(t * (constant + np.log10(hours)))


#: (temperature [K], time [s], drop [HRC]) of a carburized case's low-temperature temper: 2 h at 150–180 °C costs
#: about 2–4 HRC, 2 h at 200 °C about 4–6 HRC (common practice, from memory); the line goes through the middles
TEMPER_ANCHORS = ((165.0 + ZERO_CELSIUS, 7200.0, 3.0), (200.0 + ZERO_CELSIUS, 7200.0, 5.0))
_P1, _P2 = (Hollomon_Jaffe_1945_parameter(t, s) for t, s, _ in TEMPER_ANCHORS)
_TEMPER_SLOPE = (TEMPER_ANCHORS[1][2] - TEMPER_ANCHORS[0][2]) / (_P2 - _P1)  # HRC per unit of P
_TEMPER_ONSET = _P1 - TEMPER_ANCHORS[0][2] / _TEMPER_SLOPE                   # P below which nothing changes
#: tempering accepted by :func:`hardness_profile`: 20–250 °C, and no more than 2 h at 250 °C in P
TEMPER_TEMPERATURE_RANGE = (20.0 + ZERO_CELSIUS, 250.0 + ZERO_CELSIUS)
TEMPER_PARAMETER_MAX = Hollomon_Jaffe_1945_parameter(TEMPER_TEMPERATURE_RANGE[1], 7200.0)


def case_temper_softening_hrc(parameter):
    r"""Hardness lost by as-quenched martensite in a low-temperature temper, linear in the Hollomon–Jaffe parameter.

    .. math::
        \Delta HRC = \max[0,\; s\,(P - P_0)]

    drawn through :data:`TEMPER_ANCHORS` (P with C = 20): :math:`s \approx 2.8 \times 10^{-3}` HRC per
    unit of P and :math:`P_0 \approx 7830` (2 h at about 112 °C).

    Parameters
    ----------
    parameter : float or ndarray
        Hollomon–Jaffe parameter with C = 20 (:func:`Hollomon_Jaffe_1945_parameter`), [K]

    Returns
    -------
    drop : float or ndarray
        Loss of hardness, [HRC]

    Notes
    -----
    **Common practice, from memory**, not a published curve: 2 h at 150–180 °C takes 2–4 HRC off a
    carburized case, 2 h at 200 °C 4–6 HRC. Valid to about 250 °C (:data:`TEMPER_PARAMETER_MAX`); above
    it retained austenite decomposes and carbides coarsen, which a straight line does not follow. The
    tempering formula of Maynier et al. (1978) does not serve here: it is fitted to tempering near
    500–650 °C and gives over 1200 HV for a case tempered at 170 °C. Grange, Hribal & Porter (1977) start
    at 204 °C.

    Examples
    --------
    >>> round(case_temper_softening_hrc(Hollomon_Jaffe_1945_parameter(443.15, 7200.0)), 2)
    3.29

    References
    ----------
    .. [1] Hollomon and Jaffe (1945), as for :func:`Hollomon_Jaffe_1945_parameter`.
    .. [2] Grange, R. A., C. R. Hribal, and L. F. Porter. "Hardness of tempered martensite in carbon and
       low-alloy steels." Metallurgical Transactions A 8 (1977): 1775–1785.
    """
    p = _array(parameter, "temper_parameter", 0.0, TEMPER_PARAMETER_MAX, "K")
    return _as_output(np.maximum(_TEMPER_SLOPE * (p - _TEMPER_ONSET), 0.0))


# -- the profile ---------------------------------------------------------------------------------------------
def hardness_profile(composition, carbon, cooling_rate_700, quench_temperature, temper_temperature=None,
                     temper_time=None, *, ms_method: str = "van-bohemen",
                     austenitizing_parameter: float = DEFAULT_AUSTENITIZING_PARAMETER) -> dict[str, np.ndarray]:
    r"""Hardness and structure at each depth of a quenched (and tempered) case.

    .. math::
        HV = f_M\,HV_M' + f_B\,HV_B + f_{FP}\,HV_{FP} + A_R\,HV_A, \qquad
        f_M = m\,(1 - A_R^{KM}),\quad A_R = m\,A_R^{KM}

    with m, :math:`f_B`, :math:`f_{FP}` the shares of :func:`Maynier_1978_constituent_fractions`,
    :math:`A_R^{KM}` the retained austenite of :func:`retained_austenite`, :math:`HV_M'` the martensite
    hardness :func:`Maynier_1978_martensite_hv` capped at :data:`MARTENSITE_PLATEAU_HV` and lowered by
    :func:`case_temper_softening_hrc` when tempered, and :math:`HV_A` = :data:`AUSTENITE_HV`.

    Parameters
    ----------
    composition : dict
        The steel's alloy contents by element symbol, missing ones zero; its carbon is not used, [wt %]
    carbon : float or ndarray
        Local carbon at each depth, [wt %]
    cooling_rate_700 : float or ndarray
        Cooling rate at 700 °C at each depth, [K/s]
    quench_temperature : float
        Lowest temperature reached before tempering (see :func:`retained_austenite`), [K]
    temper_temperature : float, optional
        Tempering temperature, 20–250 °C; None for as quenched, [K]
    temper_time : float, optional
        Tempering time; None for as quenched, [s]
    ms_method : str, optional
        Key of :data:`MARTENSITE_START_METHODS`
    austenitizing_parameter : float, optional
        :math:`P_A` of :func:`Maynier_1978_critical_cooling_rates`, [K]

    Returns
    -------
    profile : dict of ndarray
        ``hv`` hardness [HV]; ``martensite``, ``bainite``, ``ferrite_pearlite``, ``retained_austenite``
        volume fractions summing to one [-]; ``ms`` martensite start temperature [K]. Each has the
        broadcast shape of ``carbon`` and ``cooling_rate_700`` (0-d for two scalars).

    Notes
    -----
    Martensite is rated by Maynier et al.'s formula rather than Just (1968) because it carries the alloy
    and the cooling rate (self-tempering) and belongs with the bainite and ferrite–pearlite formulas; the
    two agree within 1.5 HRC from 0.2 to 0.6 % C (tested). Where the sources stop, and what is done
    instead:

    * carbon above 0.5 %: Maynier et al.'s bainite, ferrite–pearlite and critical-rate regressions are
      evaluated at 0.5 % C (not extrapolated). This understates the hardenability of a high-carbon case,
      which hardens through in oil in all but heavy sections anyway;
    * martensite above about 0.6 % C: Maynier's formula keeps rising (about 1020 HV at 0.8 % C); it is capped at
      the plateau of Just (1968) at 0.6 % C, 66.5 HRC, in line with the Hodge & Orehoski and Krauss data
      (from memory). What lowers a rich case is then retained austenite, counted at
      :data:`AUSTENITE_HV` by a rule of mixtures (from memory: a rule of mixtures probably overstates the
      loss a little, as austenite between martensite plates is stiffened by its neighbours);
    * bainite formed in a continuous cool is taken as unchanged by a temper at up to 250 °C, and so is
      retained austenite (it starts to decompose from about 200 °C; not modelled);
    * the constituents are kept in their physical order: bainite no softer than ferrite–pearlite (the
      bainite regression, extrapolated to rates where little bainite forms, falls below it for 4620 under
      0.02 K/s), tempered martensite no softer than bainite (a temper at up to 250 °C cannot take
      martensite below a product formed at 350–550 °C; matters only for nearly carbon-free martensite);
    * as the carbon nears the point where Ms meets the quench temperature, a fast-cooled case is mostly
      austenite and may be softer than one cooled slowly enough to form bainite — physically so.

    Speed: about 0.3 ms for 100 depths, tempered (measured on the development machine).

    Examples
    --------
    >>> steel = {"Mn": 0.8, "Si": 0.25, "Ni": 0.55, "Cr": 0.5, "Mo": 0.2}  # 8620
    >>> p = hardness_profile(steel, [0.8, 0.4, 0.2], [60.0, 40.0, 15.0], 333.15, 443.15, 7200.0)
    >>> [round(float(v)) for v in p["hv"]]
    [657, 562, 297]
    >>> [round(float(v), 2) for v in p["retained_austenite"]]
    [0.22, 0.05, 0.0]

    References
    ----------
    .. [1] Maynier, Jungmann and Dollet (1978), as for :func:`Maynier_1978_martensite_hv`.
    .. [2] Koistinen and Marburger (1959), as for :func:`Koistinen_Marburger_1959_martensite_fraction`.
    .. [3] Just, E. "Formeln der Härtbarkeit." Härterei-Technische Mitteilungen 23 (1968): 85–100.
    .. [4] Hollomon and Jaffe (1945), as for :func:`Hollomon_Jaffe_1945_parameter`.
    .. [5] Hodge, J. M., and M. A. Orehoski. "Relationship between hardenability and percentage of
       martensite in some low-alloy steels." Trans. AIME 167 (1946): 627–642.
    .. [6] Krauss, G. "Martensite in steel: strength and structure." Materials Science and Engineering A
       273–275 (1999): 40–57 (from memory).
    """
    a = _alloy(composition, MAYNIER_ALLOY_LIMITS)
    method = _ms_method(ms_method)
    p_a = _austenitizing_parameter(austenitizing_parameter)
    c = _array(carbon, "carbon", CARBON_RANGE[0], CARBON_RANGE[1], "wt %")
    log_v = _cooling_rate_log(cooling_rate_700)
    c, log_v = np.broadcast_arrays(c, log_v)
    t_q = float(_array(quench_temperature, "quench_temperature", *QUENCH_TEMPERATURE_RANGE, "K"))
    if (temper_temperature is None) != (temper_time is None):
        raise InputError("temper_time" if temper_time is None else "temper_temperature",
                         "give both the tempering temperature and time, or neither (as quenched)")

    c_fit = np.minimum(c, MAYNIER_CARBON_RANGE[1])
    martensite_share, bainite = _shares(_log_critical_rates(a, c_fit, p_a), log_v)
    ferrite_pearlite = 1.0 - martensite_share - bainite

    ms = np.asarray(method.function(a, c), dtype=float)
    kept = 1.0 - np.asarray(Koistinen_Marburger_1959_martensite_fraction(ms, t_q))
    austenite = martensite_share * kept
    martensite = martensite_share - austenite

    hv_m = np.minimum(_martensite_hv(a, c, log_v), MARTENSITE_PLATEAU_HV)
    hv_fp = _ferrite_pearlite_hv(a, c_fit, log_v)
    # extrapolated to rates where little bainite forms, the bainite regression can fall below ferrite–pearlite
    hv_b = np.maximum(_bainite_hv(a, c_fit, log_v), hv_fp)

    if temper_temperature is not None:
        t_t = float(_array(temper_temperature, "temper_temperature", *TEMPER_TEMPERATURE_RANGE, "K"))
        p = Hollomon_Jaffe_1945_parameter(t_t, temper_time)
        if p > TEMPER_PARAMETER_MAX:
            raise InputError("temper_time", f"{temper_time / _HOUR:g} h at {formats.typed(t_t - ZERO_CELSIUS, '°C')} "
                             f"tempers beyond 2 h at 250 °C (Hollomon–Jaffe P ≤ {TEMPER_PARAMETER_MAX:.0f}), "
                             "where the model stops")
        drop = case_temper_softening_hrc(p)
        on_scale = hv_m >= HV_RANGE[0]  # martensite below 20 HRC (almost carbon-free) is left as it is
        hrc = ASTM_E140_hv_to_hrc(np.clip(hv_m, *HV_RANGE))
        # a temper at up to 250 °C does not make martensite softer than bainite formed at 350–550 °C
        hv_m = np.maximum(np.where(on_scale, ASTM_E140_hrc_to_hv(np.clip(hrc - drop, *HRC_RANGE)), hv_m), hv_b)

    hv = martensite * hv_m + bainite * hv_b + ferrite_pearlite * hv_fp + austenite * AUSTENITE_HV
    out = {"hv": hv, "martensite": martensite, "bainite": bainite, "ferrite_pearlite": ferrite_pearlite,
           "retained_austenite": austenite, "ms": ms}
    return {key: np.asarray(value, dtype=float) for key, value in out.items()}


__all__ = [
    "AUSTENITE_HV", "CRITICAL_RATE_LABELS", "MARTENSITE_PLATEAU_HV", "MARTENSITE_START_METHODS", "MAYNIER_ALLOY_LIMITS",
    "MAYNIER_CARBON_RANGE", "TEMPER_ANCHORS", "Andrews_1965_martensite_start", "Hollomon_Jaffe_1945_parameter",
    "Koistinen_Marburger_1959_martensite_fraction", "Maynier_1978_bainite_hv", "Maynier_1978_constituent_fractions",
    "Maynier_1978_critical_cooling_rates", "Maynier_1978_ferrite_pearlite_hv", "Maynier_1978_martensite_hv",
    "MartensiteStartMethod", "Steven_Haynes_1956_martensite_start", "case_temper_softening_hrc", "hardness_profile",
    "retained_austenite", "van_Bohemen_2012_martensite_start",
]
