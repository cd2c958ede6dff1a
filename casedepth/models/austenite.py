"""Limits of the austenite field that bound a carburizing step.

* :func:`saturation_carbon` — carbon saturation of austenite against cementite (the Acm line):
  above it the surface grows carbides and the atmosphere tends to soot.
* :func:`Andrews_1965_Ac3` — the temperature above which a steel is fully austenitic;
  carburizing below it is refused.
"""

from __future__ import annotations

import math

import numpy as np

from .. import formats
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from ..units import temperature_range

# (°C, wt % C) on the austenite/cementite boundary of plain Fe–C. End points: eutectoid
# 727 °C / 0.77 % and eutectic 1148 °C / 2.11 % of the Fe–C diagram. Points between were
# computed with pycalphad 0.11.2 for this project (austenite after Gustafson 1985,
# cementite after Hallstedt et al. 2010).
_ACM_POINTS_C = np.array([727.0, 800.0, 850.0, 900.0, 925.0, 950.0, 1000.0, 1050.0, 1100.0, 1148.0])
_ACM_POINTS_WT = np.array([0.77, 0.948, 1.084, 1.227, 1.301, 1.377, 1.535, 1.701, 1.876, 2.11])


def _pchip_slopes(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Node slopes of the shape-preserving piecewise cubic Hermite interpolant (PCHIP): the weighted
    harmonic mean of the neighbouring secants inside (Fritsch & Butland 1984), zero where the data turn,
    and the three-point one-sided formula kept monotone at the ends (Moler 2004, *Numerical Computing
    with MATLAB*, §3.4) — the rules of SciPy's ``PchipInterpolator``, written out so that a 10-point
    curve does not import ``scipy.interpolate`` (a fifth of a second at every start)."""
    h = np.diff(x)
    delta = np.diff(y) / h
    d = np.zeros_like(y)
    w1, w2 = 2.0 * h[1:] + h[:-1], h[1:] + 2.0 * h[:-1]
    same = delta[:-1] * delta[1:] > 0
    d[1:-1][same] = (w1 + w2)[same] / (w1[same] / delta[:-1][same] + w2[same] / delta[1:][same])
    for end, (h0, h1, d0, d1) in ((0, (h[0], h[1], delta[0], delta[1])), (-1, (h[-1], h[-2], delta[-1], delta[-2]))):
        slope = ((2.0 * h0 + h1) * d0 - h0 * d1) / (h0 + h1)
        if np.sign(slope) != np.sign(d0):
            slope = 0.0
        elif np.sign(d0) != np.sign(d1) and abs(slope) > abs(3.0 * d0):
            slope = 3.0 * d0
        d[end] = slope
    return d


_ACM_KELVIN = _ACM_POINTS_C + ZERO_CELSIUS
_ACM_SLOPES = _pchip_slopes(_ACM_KELVIN, _ACM_POINTS_WT)


def _acm(T: float) -> float:
    """The Acm line's PCHIP at ``T`` [K] (cubic Hermite between the tabulated points)."""
    x, y, d = _ACM_KELVIN, _ACM_POINTS_WT, _ACM_SLOPES
    i = min(max(int(np.searchsorted(x, T)) - 1, 0), len(x) - 2)
    h = float(x[i + 1] - x[i])
    t = (T - float(x[i])) / h
    h00, h10, h01, h11 = (1 + 2 * t) * (1 - t) ** 2, t * (1 - t) ** 2, t * t * (3 - 2 * t), t * t * (t - 1)
    return h00 * float(y[i]) + h10 * h * float(d[i]) + h01 * float(y[i + 1]) + h11 * h * float(d[i + 1])


ACM_RANGE = (_ACM_POINTS_C[0] + ZERO_CELSIUS, _ACM_POINTS_C[-1] + ZERO_CELSIUS)


def saturation_carbon(T: float) -> float:
    r"""Carbon saturation of plain Fe–C austenite against cementite (Acm line).

    Monotone cubic (PCHIP) interpolation of tabulated points of the Fe–C phase diagram.

    Parameters
    ----------
    T : float
        Temperature, [K]

    Returns
    -------
    carbon : float
        Saturation carbon content, [wt %]

    Notes
    -----
    Valid 727–1148 °C (eutectoid to eutectic). Plain Fe–C only: alloying shifts the line;
    :func:`casedepth.surface.steel_saturation_carbon` scales it by the alloy factor.

    Examples
    --------
    >>> round(saturation_carbon(925 + 273.15), 3)
    1.301

    References
    ----------
    .. [1] Gustafson, P. "A thermodynamic evaluation of the Fe–C system."
       Scandinavian Journal of Metallurgy 14 (1985): 259–267.
    .. [2] Hallstedt, B., D. Djurovic, J. von Appen, R. Dronskowski, A. Dick, F. Körmann,
       T. Hickel, J. Neugebauer. "Thermodynamic properties of cementite (Fe3C)."
       Calphad 34 (2010): 129–133.
    """
    if not (ACM_RANGE[0] <= T <= ACM_RANGE[1]):
        raise InputError("temperature", f"{formats.temperature(T)} is outside {temperature_range(*ACM_RANGE)}, where the "
                         f"Acm line is tabulated")
    return _acm(T)


def Andrews_1965_Ac3(composition: dict[str, float]) -> float:
    r"""Ac3 temperature (end of ferrite-to-austenite transformation on heating) after Andrews (1965).

    .. math::
        A_{c3}\,[°C] = 910 - 203\sqrt{C} - 15.2\,Ni + 44.7\,Si + 104\,V + 31.5\,Mo + 13.1\,W
                       - 30\,Mn - 11\,Cr - 20\,Cu + 700\,P + 400\,Al + 120\,As + 400\,Ti

    Parameters
    ----------
    composition : dict
        Element symbol → content, [wt %]; missing elements count as zero.

    Returns
    -------
    Ac3 : float
        Temperature, [K]

    Notes
    -----
    Linear regression on low-alloy steels with C ≤ 0.6 wt %; accurate to roughly ±20 K
    (from memory). Carburizing grades (0.1–0.25 % C) are well inside its range.

    Examples
    --------
    >>> round(Andrews_1965_Ac3({"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}) - 273.15, 1)
    798.8

    References
    ----------
    .. [1] Andrews, K. W. "Empirical formulae for the calculation of some transformation
       temperatures." Journal of the Iron and Steel Institute 203 (1965): 721–727.
    """
    c = {k: float(composition.get(k, 0.0)) for k in ("C", "Ni", "Si", "V", "Mo", "W", "Mn", "Cr", "Cu", "P", "Al", "As", "Ti")}
    celsius = (910.0 - 203.0 * math.sqrt(max(c["C"], 0.0)) - 15.2 * c["Ni"] + 44.7 * c["Si"] + 104.0 * c["V"]
               + 31.5 * c["Mo"] + 13.1 * c["W"] - 30.0 * c["Mn"] - 11.0 * c["Cr"] - 20.0 * c["Cu"]
               + 700.0 * c["P"] + 400.0 * c["Al"] + 120.0 * c["As"] + 400.0 * c["Ti"])
    return celsius + ZERO_CELSIUS
