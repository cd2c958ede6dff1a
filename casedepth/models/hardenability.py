"""Hardenability: how large a section hardens, for the core and for any carbon in the case.

* the ideal critical diameter :math:`D_I` by the multiplying-factor method of ASTM A255 (after
  Grossmann): a base diameter from carbon (and the austenite grain size) times one factor per
  alloying element, times a boron factor — :func:`ideal_critical_diameter`, with the factors as
  small functions and the table :data:`MULTIPLYING_FACTORS` (element → factor, ranges);
* the Jominy end-quench curve from the composition after Just (1969) — :func:`jominy_curve`;
* the critical diameter of a round bar for a quench of Grossmann severity H, recomputed from the
  transient conduction in a long cylinder with Grossmann's half-temperature criterion —
  :func:`critical_diameter`, :func:`hardens_through`;
* :func:`hardenability_facts`, the few numbers a sheet or a window shows for a steel.

Inputs outside what a model can evaluate (a content beyond ASTM A255's factor table, a grain size
or a distance outside the accepted range) raise :class:`~casedepth.errors.InputError`; inputs the
model evaluates but beyond the range it was established for give notes from
:func:`hardenability_warnings`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cache
from typing import Callable

import numpy as np

from .. import formats
from ..errors import InputError
from ..numerics.roots import illinois
from ..numerics.special import bessel_j, bessel_zeros
from ..units import length_range
from .hardness import JUST_PLATEAU_CARBON, Just_1968_martensite_hrc
from .steels import validate_composition

INCH = 0.0254  # m
SIXTEENTH_INCH = INCH / 16.0  # m; Jominy distances are counted in sixteenths of an inch

# ASTM A255's carbon factor table, from memory (see ASTM_A255_carbon_factor)
CARBON_TABLE_RANGE = (0.01, 0.90)  # wt %; the factor is defined here
CARBON_CALCULATION_RANGE = (0.10, 0.70)  # wt %; the calculation method is stated for this range
HIGHEST_CARBON = 2.11  # wt %; a carbon content given for the case is refused above the steel limit

# ASTM A255 (from memory): where each alloy factor is defined (refused beyond) and the range the standard
# states for its calculation method (a note beyond), [wt %]
FACTOR_TABLE_RANGES = {"Mn": (0.0, 1.95), "Si": (0.0, 2.00), "Ni": (0.0, 3.50), "Cr": (0.0, 2.50), "Mo": (0.0, 0.55),
                       "Cu": (0.0, 0.55), "V": (0.0, 0.20)}
CALCULATION_RANGES = {"Mn": (0.50, 1.65), "Si": (0.15, 0.60), "Ni": (0.0, 1.50), "Cr": (0.0, 1.35), "Mo": (0.0, 0.55),
                      "Cu": (0.0, 0.35), "V": (0.0, 0.20)}

GRAIN_SIZE_RANGE = (3.0, 10.0)  # ASTM No.; accepted
GRAIN_SIZE_CHART_RANGE = (4.0, 8.0)  # ASTM No.; covered by Grossmann's base-hardenability chart
GRAIN_SIZE_RATIO = 1.083  # base D_I ratio per ASTM grain-size number (see grain_size_factor)

JOMINY_LONGEST = 2.0 * INCH  # m; J32, the end of the usual Jominy chart
ROCKWELL_C_FLOOR = 20.0  # HRC; below this the C scale does not read
JUST_STATED_LIMITS = {"Cr": 1.55, "Mo": 0.52, "V": 0.2}  # wt %; the ranges the article states

EFFECTIVE_BORON = 0.0005  # wt %; less than this is taken to have no hardenability effect (common practice)
BORON_CARBON_LIMIT = 0.9  # wt %; the boron factor is 1 at and above this carbon content


def _as_float(value, field: str) -> float:
    try:
        number = float(value)
    except (TypeError, ValueError, OverflowError):
        raise InputError(field, f"{value!r} is not a number") from None
    if isinstance(value, bool) or math.isnan(number):
        raise InputError(field, f"{value!r} is not a number")
    return number


def _in_range(value, low: float, high: float, field: str, what: str, unit: str = "wt %") -> float:
    number = _as_float(value, field)
    if not (low <= number <= high):
        raise InputError(field, f"{what}{number:g} {unit} is outside {low:g}–{high:g} {unit}")
    return number


def _scalar_or_array(out):
    return float(out) if np.ndim(out) == 0 else out


# --------------------------------------------------------------------------------------------
# ASTM A255 multiplying factors
# --------------------------------------------------------------------------------------------

def ASTM_A255_carbon_factor(carbon):
    r"""Base ideal critical diameter for carbon, ASTM A255 (after Grossmann), grain size ASTM 7.

    .. math::
        f_C = \begin{cases}
            0.54\,C & C \le 0.39 \\
            0.171 + 0.001\,C + 0.265\,C^2 & 0.39 < C \le 0.55 \\
            0.115 + 0.268\,C - 0.038\,C^2 & 0.55 < C \le 0.65 \\
            0.143 + 0.2\,C & 0.65 < C \le 0.75 \\
            0.062 + 0.409\,C - 0.135\,C^2 & 0.75 < C \le 0.90
        \end{cases}

    Parameters
    ----------
    carbon : float or ndarray
        Carbon content, [wt %]

    Returns
    -------
    factor : float or ndarray
        Base ideal critical diameter, [in] (the standard's unit; :func:`ideal_critical_diameter`
        returns metres)

    Notes
    -----
    The standard's table runs 0.01–0.90 % C; its calculation method is stated for 0.10–0.70 % C.
    The pieces meet to within 0.6 % (a step up at 0.39 % C and small steps down at 0.55, 0.65 and
    0.75 % C, as between the table's rows).
    Equations from memory of ASTM A255 (they agree with third-party restatements of the standard);
    check against the standard before relying on them.

    Examples
    --------
    >>> round(ASTM_A255_carbon_factor(0.22), 4)
    0.1188

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), Standard Test Methods for Determining Hardenability of
       Steel, ASTM International: calculation of hardenability from composition, multiplying factors
       for carbon at grain size 7 (from memory).
    .. [2] Grossmann, M. A. "Hardenability calculated from chemical composition." Transactions
       AIME 150 (1942): 227–259.
    """
    c = np.asarray(carbon, dtype=float)
    if np.any(np.isnan(c)) or np.any((c < CARBON_TABLE_RANGE[0]) | (c > CARBON_TABLE_RANGE[1])):
        raise InputError("carbon", f"{carbon} wt % is outside ASTM A255's carbon factors, "
                         f"{CARBON_TABLE_RANGE[0]:g}–{CARBON_TABLE_RANGE[1]:g} wt %")
    out = np.select(
        [c <= 0.39, c <= 0.55, c <= 0.65, c <= 0.75],
        [0.54 * c, 0.171 + 0.001 * c + 0.265 * c**2, 0.115 + 0.268 * c - 0.038 * c**2, 0.143 + 0.2 * c],
        0.062 + 0.409 * c - 0.135 * c**2,
    )
    return _scalar_or_array(out)


def ASTM_A255_manganese_factor(manganese: float) -> float:
    r"""Multiplying factor for manganese, ASTM A255.

    .. math::
        f_{Mn} = 1 + 3.3333\,Mn \quad (Mn \le 1.20), \qquad 5.1\,Mn - 1.12 \quad (1.20 < Mn \le 1.95)

    Parameters
    ----------
    manganese : float
        Manganese content, [wt %]

    Returns
    -------
    factor : float
        Multiplying factor, [-]

    Notes
    -----
    Table range 0–1.95 % Mn; the calculation method is stated for 0.50–1.65 %. From memory of the
    standard (agrees with third-party restatements).

    Examples
    --------
    >>> round(ASTM_A255_manganese_factor(0.80), 3)
    3.667

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), multiplying factors (from memory).
    """
    mn = _in_range(manganese, *FACTOR_TABLE_RANGES["Mn"], "manganese", "Mn=")
    return 1.0 + 3.3333 * mn if mn <= 1.20 else 5.1 * mn - 1.12


def ASTM_A255_silicon_factor(silicon: float) -> float:
    r"""Multiplying factor for silicon, ASTM A255: :math:`f_{Si} = 1 + 0.7\,Si`.

    Parameters
    ----------
    silicon : float
        Silicon content, [wt %]

    Returns
    -------
    factor : float
        Multiplying factor, [-]

    Notes
    -----
    Table range 0–2.00 % Si; the calculation method is stated for 0.15–0.60 %. From memory.

    Examples
    --------
    >>> round(ASTM_A255_silicon_factor(0.18), 3)
    1.126

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), multiplying factors (from memory).
    """
    return 1.0 + 0.7 * _in_range(silicon, *FACTOR_TABLE_RANGES["Si"], "silicon", "Si=")


def ASTM_A255_nickel_factor(nickel: float) -> float:
    r"""Multiplying factor for nickel, ASTM A255.

    .. math::
        f_{Ni} = 1 + 0.363\,Ni \quad (Ni \le 1.50), \qquad
        0.3211 + 1.4501\,Ni - 0.6119\,Ni^2 + 0.1253\,Ni^3 \quad (1.50 < Ni \le 3.50)

    Parameters
    ----------
    nickel : float
        Nickel content, [wt %]

    Returns
    -------
    factor : float
        Multiplying factor, [-]

    Notes
    -----
    Table range 0–3.50 % Ni; the calculation method is stated for up to 1.50 %. The linear piece
    is from memory (quoted also as 1 + 0.3633 Ni; the difference is under 0.05 %); the cubic
    above 1.5 % was not in memory and is taken from third-party restatements of the standard's
    extended table — less sure. The two pieces meet at 1.5 % to 0.2 %; the cubic rises faster
    than the linear form (3.27 against 2.27 at 3.5 % Ni), which is what ranks the 3.5 % Ni grades
    (4820, 9310) above 8620, as practice knows them.

    Examples
    --------
    >>> round(ASTM_A255_nickel_factor(0.55), 3)
    1.2

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), multiplying factors (linear piece from memory; cubic as
       restated by third parties).
    """
    ni = _in_range(nickel, *FACTOR_TABLE_RANGES["Ni"], "nickel", "Ni=")
    if ni <= 1.50:
        return 1.0 + 0.363 * ni
    return 0.3211 + 1.4501 * ni - 0.6119 * ni**2 + 0.1253 * ni**3


def ASTM_A255_chromium_factor(chromium: float) -> float:
    r"""Multiplying factor for chromium, ASTM A255: :math:`f_{Cr} = 1 + 2.16\,Cr`.

    Parameters
    ----------
    chromium : float
        Chromium content, [wt %]

    Returns
    -------
    factor : float
        Multiplying factor, [-]

    Notes
    -----
    Table range 0–2.50 % Cr; the calculation method is stated for up to 1.35 %. From memory.

    Examples
    --------
    >>> round(ASTM_A255_chromium_factor(0.43), 3)
    1.929

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), multiplying factors (from memory).
    """
    return 1.0 + 2.16 * _in_range(chromium, *FACTOR_TABLE_RANGES["Cr"], "chromium", "Cr=")


def ASTM_A255_molybdenum_factor(molybdenum: float) -> float:
    r"""Multiplying factor for molybdenum, ASTM A255: :math:`f_{Mo} = 1 + 3\,Mo`.

    Parameters
    ----------
    molybdenum : float
        Molybdenum content, [wt %]

    Returns
    -------
    factor : float
        Multiplying factor, [-]

    Notes
    -----
    Table range and calculation range 0–0.55 % Mo. From memory.

    Examples
    --------
    >>> ASTM_A255_molybdenum_factor(0.25)
    1.75

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), multiplying factors (from memory).
    """
    return 1.0 + 3.0 * _in_range(molybdenum, *FACTOR_TABLE_RANGES["Mo"], "molybdenum", "Mo=")


def ASTM_A255_copper_factor(copper: float) -> float:
    r"""Multiplying factor for copper, ASTM A255: :math:`f_{Cu} = 1 + 0.365\,Cu`.

    Parameters
    ----------
    copper : float
        Copper content, [wt %]

    Returns
    -------
    factor : float
        Multiplying factor, [-]

    Notes
    -----
    Table range 0–0.55 % Cu; the calculation method is stated for up to 0.35 %. From memory.

    Examples
    --------
    >>> round(ASTM_A255_copper_factor(0.10), 4)
    1.0365

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), multiplying factors (from memory).
    """
    return 1.0 + 0.365 * _in_range(copper, *FACTOR_TABLE_RANGES["Cu"], "copper", "Cu=")


def ASTM_A255_vanadium_factor(vanadium: float) -> float:
    r"""Multiplying factor for vanadium, ASTM A255: :math:`f_V = 1 + 1.73\,V`.

    Parameters
    ----------
    vanadium : float
        Vanadium content, [wt %]

    Returns
    -------
    factor : float
        Multiplying factor, [-]

    Notes
    -----
    Table range and calculation range 0–0.20 % V (vanadium counts only when dissolved at the
    austenitizing temperature). From memory.

    Examples
    --------
    >>> round(ASTM_A255_vanadium_factor(0.05), 3)
    1.087

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), multiplying factors (from memory).
    """
    return 1.0 + 1.73 * _in_range(vanadium, *FACTOR_TABLE_RANGES["V"], "vanadium", "V=")


def boron_factor(carbon):
    r"""Multiplying factor for effective boron, falling with carbon (a commonly quoted relation).

    .. math::
        BF = 1 + 1.5\,(0.9 - C) \quad (C < 0.9), \qquad 1 \quad (C \ge 0.9)

    Parameters
    ----------
    carbon : float or ndarray
        Carbon content, [wt %]

    Returns
    -------
    factor : float or ndarray
        Multiplying factor for a steel with effective (protected, dissolved) boron, [-]

    Notes
    -----
    Boron raises hardenability most in low-carbon steels and hardly at all near the eutectoid:
    the factor is about 2 at 0.2 % C and 1.75 at 0.4 % C. The relation is from memory and I cannot
    place its original source with confidence, so the function is not named after one. ASTM A255
    gives the boron factor as a table against carbon *and* the alloy factor (boron does less in a
    richly alloyed steel); that table is not recalled well enough to reproduce, so the alloy factor
    is not used here, and for richly alloyed boron steels the factor may be too high. Of the
    carbon-only forms in memory this is the lower (1 + 2.7 (0.85 − C) gives 2.8 at 0.2 % C), the
    safe side for a check that a section hardens. It applies to boron of about 0.0005–0.003 %
    protected from nitrogen by titanium or aluminium (common practice).

    Examples
    --------
    >>> round(boron_factor(0.20), 3)
    2.05

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), boron factors against carbon and alloy factor (not
       reproduced here).
    """
    c = np.asarray(carbon, dtype=float)
    out = 1.0 + 1.5 * np.maximum(BORON_CARBON_LIMIT - c, 0.0)
    return _scalar_or_array(out)


def grain_size_factor(grain_size: float) -> float:
    r"""Change of the base ideal diameter with austenite grain size, relative to ASTM No. 7.

    .. math::
        f_G = 1.083^{\,7 - G}

    Parameters
    ----------
    grain_size : float
        Austenite grain size, [ASTM No.]

    Returns
    -------
    factor : float
        Multiplier on the base ideal diameter of :func:`ASTM_A255_carbon_factor`, [-]

    Notes
    -----
    ASTM A255 takes grain size 7 throughout (most hardenability-controlled steels are made to
    fine-grain practice). Grossmann's base-hardenability chart gives one curve per grain size,
    4 to 8, about 8 % apart per ASTM number: coarser grain, deeper hardening. This geometric form
    is this module's fit to that spacing as the chart is commonly read (1.27, 1.17, 1.08 at grain
    sizes 4, 5, 6; from memory and third-party readings of the chart), not a formula of the source.
    Accepted for 3–10; outside 4–8 it extrapolates (a note says so).

    Examples
    --------
    >>> round(grain_size_factor(5), 3)
    1.173

    References
    ----------
    .. [1] Grossmann, M. A. "Hardenability calculated from chemical composition." Transactions
       AIME 150 (1942): 227–259 (base hardenability against carbon and grain size).
    """
    g = _in_range(grain_size, *GRAIN_SIZE_RANGE, "grain_size", "grain size ", "ASTM No.")
    return GRAIN_SIZE_RATIO ** (7.0 - g)


@dataclass(frozen=True)
class MultiplyingFactor:
    """One row of the alloy table: the element's factor and the ranges that bound it, [wt %]."""

    element: str
    factor: Callable[[float], float]
    calculation_range: tuple[float, float]  # ASTM A255's stated range of the calculation method
    table_range: tuple[float, float]  # where the factor is defined; refused beyond


#: ASTM A255 alloy factors, one row per element (ranges from memory of the standard)
MULTIPLYING_FACTORS: dict[str, MultiplyingFactor] = {
    element: MultiplyingFactor(element, factor, CALCULATION_RANGES[element], FACTOR_TABLE_RANGES[element])
    for element, factor in [
        ("Mn", ASTM_A255_manganese_factor), ("Si", ASTM_A255_silicon_factor), ("Ni", ASTM_A255_nickel_factor),
        ("Cr", ASTM_A255_chromium_factor), ("Mo", ASTM_A255_molybdenum_factor), ("Cu", ASTM_A255_copper_factor),
        ("V", ASTM_A255_vanadium_factor),
    ]
}

# Elements that raise hardenability but have no factor here; phosphorus and sulphur are left out
# as in ASTM A255 (their effects are taken to offset each other), nitrogen and arsenic too.
_NOT_COUNTED = ("Al", "W", "Ti", "Nb")


def _composition(composition) -> dict[str, float]:
    return validate_composition(dict(composition), "composition")


def _carbon(carbon) -> np.ndarray:
    try:
        c = np.asarray(carbon, dtype=float)
    except (TypeError, ValueError):
        raise InputError("carbon", f"{carbon!r} is not a carbon content in wt %") from None
    if c.size == 0 or np.any(np.isnan(c)) or np.any((c < CARBON_TABLE_RANGE[0]) | (c > HIGHEST_CARBON)):
        raise InputError("carbon", f"carbon content {carbon} wt % is outside "
                         f"{CARBON_TABLE_RANGE[0]:g}–{HIGHEST_CARBON:g} wt %")
    return c


def alloy_factor(composition: dict[str, float]) -> float:
    """Product of the ASTM A255 alloy factors: every element of :data:`MULTIPLYING_FACTORS`, not carbon,
    grain size or boron.

    Parameters
    ----------
    composition : dict
        Element symbol → content, [wt %]

    Returns
    -------
    factor : float
        Alloy factor, [-]; a content beyond a factor's table is refused naming the element.

    Examples
    --------
    >>> round(alloy_factor({"C": 0.205, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}), 2)
    17.2
    """
    clean = _composition(composition)
    product = 1.0
    for element, row in MULTIPLYING_FACTORS.items():
        amount = clean.get(element, 0.0)
        low, high = row.table_range
        if not (low <= amount <= high):
            raise InputError("composition", f"{element}={amount:g} wt % is outside ASTM A255's multiplying factors, "
                             f"{low:g}–{high:g} wt %; the hardenability of this steel cannot be estimated here")
        product *= row.factor(amount)
    return product


def ideal_critical_diameter(composition: dict[str, float], grain_size: float = 7.0, carbon=None):
    r"""Ideal critical diameter by the multiplying-factor method of ASTM A255 (Grossmann).

    .. math::
        D_I = f_C(C)\, f_G(G)\, f_{Mn} f_{Si} f_{Ni} f_{Cr} f_{Mo} f_{Cu} f_V \cdot BF(C)

    with :math:`BF = 1` without effective boron (B < 0.0005 %).

    Parameters
    ----------
    composition : dict
        Element symbol → content, [wt %]; C is required, missing elements count as zero.
    grain_size : float, optional
        Austenite grain size, 3–10, [ASTM No.]; 7 is ASTM A255's basis.
    carbon : float or ndarray, optional
        Carbon content to use instead of the composition's, e.g. a layer of a carburized case
        (same alloy factors), 0.01–2.11, [wt %]

    Returns
    -------
    D_I : float or ndarray
        Diameter of the round bar that is 50 % martensite at its centre after an ideal quench, [m]

    Notes
    -----
    ASTM A255 states the method for C 0.10–0.70, Mn 0.50–1.65, Si 0.15–0.60, Ni ≤ 1.50,
    Cr ≤ 1.35, Mo ≤ 0.55, Cu ≤ 0.35, V ≤ 0.20 % and gives factors beyond that (C ≤ 0.90,
    Mn ≤ 1.95, Si ≤ 2.0, Ni ≤ 3.5, Cr ≤ 2.5, Cu ≤ 0.55 %) for melt control. A content beyond the
    factors is refused (:class:`~casedepth.errors.InputError`); one between the two ranges is
    evaluated and noted by :func:`hardenability_warnings`. Carbon above 0.90 % (a rich case) is
    held at 0.90 %, where the factor table ends (this module's choice: carbon beyond what the
    austenite dissolves at the hardening temperature stays in carbides). The grain-size factor
    (:func:`grain_size_factor`) and the boron factor (:func:`boron_factor`) are not A255's; the
    composition limits are from memory of the standard.

    Examples
    --------
    The "4118 modified" heat of ASTM A255's worked example (as recalled), whose factors multiply
    to 1.95 in when each is rounded to three figures:

    >>> heat = {"C": 0.22, "Mn": 0.80, "Si": 0.18, "Ni": 0.10, "Cr": 0.43, "Mo": 0.25, "Cu": 0.10, "V": 0.05}
    >>> round(ideal_critical_diameter(heat) / INCH, 2)
    1.93

    References
    ----------
    .. [1] ASTM A255-10 (reapproved 2014), Standard Test Methods for Determining Hardenability of
       Steel, ASTM International (calculation of D_I from composition; from memory).
    .. [2] Grossmann, M. A. "Hardenability calculated from chemical composition." Transactions
       AIME 150 (1942): 227–259.
    """
    clean = _composition(composition)
    if carbon is None and clean["C"] < CARBON_TABLE_RANGE[0]:
        raise InputError("composition", f"C={clean['C']:g} wt % is below ASTM A255's carbon factors, "
                         f"{CARBON_TABLE_RANGE[0]:g}–{CARBON_TABLE_RANGE[1]:g} wt %")
    c = _carbon(clean["C"] if carbon is None else carbon)
    held = np.minimum(c, CARBON_TABLE_RANGE[1])
    base = np.asarray(ASTM_A255_carbon_factor(held)) * grain_size_factor(grain_size)
    boron = boron_factor(held) if clean.get("B", 0.0) >= EFFECTIVE_BORON else 1.0
    return _scalar_or_array(base * alloy_factor(clean) * boron * INCH)


def hardenability_warnings(composition: dict[str, float], grain_size: float = 7.0, carbon=None) -> list[str]:
    """Notes on an estimate that is made but outside the range its sources were established for: ASTM A255's
    stated composition range, Grossmann's grain sizes, Just's alloy ranges, elements without a factor, boron.

    Parameters
    ----------
    composition : dict
        Element symbol → content, [wt %]
    grain_size : float, optional
        Austenite grain size, [ASTM No.]
    carbon : float or ndarray, optional
        Carbon content used instead of the composition's, [wt %]

    Returns
    -------
    notes : list of str
        One sentence per concern; empty when the steel lies inside every stated range.

    Examples
    --------
    >>> hardenability_warnings({"C": 0.205, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20})
    []
    >>> hardenability_warnings({"C": 0.205, "Mn": 0.45, "Si": 0.25})  # doctest: +NORMALIZE_WHITESPACE
    ['Mn=0.45 wt % is outside the range ASTM A255 states for its calculation, 0.5–1.65 wt %:
      the estimate is less certain']
    """
    clean = _composition(composition)
    notes = []
    for element, row in MULTIPLYING_FACTORS.items():
        amount = clean.get(element, 0.0)
        low, high = row.calculation_range
        if not (low <= amount <= high):
            notes.append(f"{element}={amount:g} wt % is outside the range ASTM A255 states for its calculation, "
                         f"{low:g}–{high:g} wt %: the estimate is less certain")
    c = _carbon(clean["C"] if carbon is None else carbon)
    shown = f"C={float(c):g} wt %" if c.ndim == 0 else f"carbon {float(c.min()):g}–{float(c.max()):g} wt %"
    low, high = CARBON_CALCULATION_RANGE
    if np.any(c > CARBON_TABLE_RANGE[1]):
        notes.append(f"{shown}: carbon above {CARBON_TABLE_RANGE[1]:g} wt % is taken as "
                     f"{CARBON_TABLE_RANGE[1]:g} wt %, the end of ASTM A255's carbon factors")
    if np.any((c < low) | (c > high)):
        notes.append(f"{shown} is outside the range ASTM A255 states for its calculation, {low:g}–{high:g} wt %: "
                     "the estimate is less certain")
    for element, limit in JUST_STATED_LIMITS.items():
        if clean.get(element, 0.0) > limit:
            notes.append(f"{element}={clean[element]:g} wt % is above the {limit:g} wt % Just's Jominy formula was "
                         "fitted to: the Jominy curve is less certain")
    g = _in_range(grain_size, *GRAIN_SIZE_RANGE, "grain_size", "grain size ", "ASTM No.")
    if not (GRAIN_SIZE_CHART_RANGE[0] <= g <= GRAIN_SIZE_CHART_RANGE[1]):
        notes.append(f"grain size {g:g} is outside Grossmann's chart, ASTM {GRAIN_SIZE_CHART_RANGE[0]:g}–"
                     f"{GRAIN_SIZE_CHART_RANGE[1]:g}: its factor is extrapolated")
    missing = [el for el in _NOT_COUNTED if clean.get(el, 0.0) > 0.0]
    if missing:
        notes.append(f"no ASTM A255 factor for {', '.join(missing)}: not counted")
    boron = clean.get("B", 0.0)
    if boron >= EFFECTIVE_BORON:
        notes.append("the boron factor assumes boron protected from nitrogen (by Ti or Al) and does not fall with "
                     "the alloy factor as ASTM A255's table does: for a richly alloyed boron steel it may be high")
    elif boron > 0.0:
        notes.append(f"B={boron:g} wt % is below {EFFECTIVE_BORON:g} wt % and is taken to have no effect")
    return notes


# --------------------------------------------------------------------------------------------
# Jominy curve
# --------------------------------------------------------------------------------------------

def Just_1969_jominy_hrc(composition: dict[str, float], distance):
    r"""Jominy end-quench hardness from the composition, Just (1969), in sixteenths of an inch.

    .. math::
        J_E = 98\sqrt{C} - 0.025\,E^2\sqrt{C} + 20\,Cr + 6.4\,Ni + 19\,Mn + 34\,Mo + 28\,V
              - 24\sqrt{E} + 2.86\,E - 7

    with E the distance from the quenched end in sixteenths of an inch.

    Parameters
    ----------
    composition : dict
        Element symbol → content, [wt %]; C is required.
    distance : float or ndarray
        Distance from the quenched end, 0–50.8 mm, [m]

    Returns
    -------
    hrc : float or ndarray
        Hardness, [HRC]; the bare formula, without the limits :func:`jominy_curve` applies.

    Notes
    -----
    A regression on the average compositions and Jominy band hardnesses of H-steels; stated for
    E ≥ 4/16 in (nearer the quenched end the coefficients do not hold) and for about 0–1.55 % Cr,
    0–0.52 % Mo and 0–0.2 % V. Silicon and grain size are not terms of it (the H-steels are made
    to fine-grain practice). Coefficients from memory, checked against a partly legible scan of the
    article; the constant term (−7) and the carbon range could not be confirmed there. Beyond
    about 24–32/16 in the quadratic turns upward for low carbon: :func:`jominy_curve` holds the
    curve at its minimum. Against SAE H-band midpoints recalled for 8620H, 4320H, 4820H and 4140H
    it agrees within about 3–4 HRC (from memory).

    Examples
    --------
    >>> round(Just_1969_jominy_hrc({"C": 0.405, "Mn": 0.875, "Cr": 0.95, "Mo": 0.20}, 8 * SIXTEENTH_INCH), 1)
    51.8

    References
    ----------
    .. [1] Just, E. "New formulas for calculating hardenability curves." Metal Progress 96, no. 5
       (November 1969): 87–88.
    """
    clean = _composition(composition)
    e = _distances(distance) / SIXTEENTH_INCH
    root_c = math.sqrt(clean["C"])
    alloys = (20.0 * clean.get("Cr", 0.0) + 6.4 * clean.get("Ni", 0.0) + 19.0 * clean.get("Mn", 0.0)
              + 34.0 * clean.get("Mo", 0.0) + 28.0 * clean.get("V", 0.0))
    out = 98.0 * root_c - 0.025 * e**2 * root_c + alloys - 24.0 * np.sqrt(e) + 2.86 * e - 7.0
    return _scalar_or_array(out)


def _distances(distances) -> np.ndarray:
    try:
        d = np.asarray(distances, dtype=float)
    except (TypeError, ValueError):
        raise InputError("distances", f"{distances!r} is not a distance or a list of distances in metres") from None
    if d.size == 0 or np.any(np.isnan(d)) or np.any((d < 0.0) | (d > JOMINY_LONGEST)):
        raise InputError("distances", f"Jominy distances must lie within {length_range(0.0, JOMINY_LONGEST)} of the "
                         f"quenched end")
    return d


def _just_minimum_sixteenths(carbon: float) -> float:
    """Distance [1/16 in] where Just's formula stops falling, or J32 if it falls all the way."""
    root_c = math.sqrt(carbon)

    def slope(e):
        return -0.05 * e * root_c - 12.0 / math.sqrt(e) + 2.86

    low, high = 0.01, JOMINY_LONGEST / SIXTEENTH_INCH
    if slope(high) <= 0.0:
        return high
    for _ in range(60):  # the slope rises through zero once on (0, 32] when it ends positive
        mid = 0.5 * (low + high)
        low, high = (mid, high) if slope(mid) < 0.0 else (low, mid)
    return 0.5 * (low + high)


def jominy_curve(composition: dict[str, float], distances, carbon=None):
    r"""Estimated Jominy end-quench curve: Just (1969), capped by the hardness of martensite.

    .. math::
        HRC(E) = \min\left(60\sqrt{C} + 20,\; J_{\min(E, E^*)}\right)

    with :math:`J_E` of :func:`Just_1969_jominy_hrc` and :math:`E^*` where that formula stops
    falling (at most 2 in).

    Parameters
    ----------
    composition : dict
        Element symbol → content, [wt %]; C is required.
    distances : float or array_like
        Distances from the quenched end, 0–50.8 mm, [m]
    carbon : float, optional
        Carbon content to use instead of the composition's (a case layer), 0.01–2.11, [wt %];
        taken as 0.6 % above 0.6 %.

    Returns
    -------
    hrc : float or ndarray
        Hardness, [HRC]; NaN where the estimate falls below 20 HRC, the bottom of the C scale.

    Notes
    -----
    The cap is the as-quenched hardness of martensite after Just (1968), the same author's
    rule (:func:`~casedepth.models.hardness.Just_1968_martensite_hrc`): it sets the quenched
    end, and the lesser of the two is taken nearer the end than 4/16 in, where the formula is
    not stated. Carbon is held at 0.6 % above 0.6 %, the top of both relations. No grain-size
    term: the formula was fitted to fine-grained H-steels. This is an estimate for a nominal
    composition; a heat's H-band is several HRC wide.

    Examples
    --------
    >>> steel = {"C": 0.205, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> [round(float(h), 1) for h in jominy_curve(steel, [0.0, 6 * SIXTEENTH_INCH, 10 * SIXTEENTH_INCH])]
    [47.2, 30.9, 24.5]

    References
    ----------
    .. [1] Just, E. "New formulas for calculating hardenability curves." Metal Progress 96, no. 5
       (November 1969): 87–88.
    .. [2] Just, E. "Formeln der Härtbarkeit." Härterei-Technische Mitteilungen 23 (1968): 85–100
       (maximum hardness; from memory).
    """
    clean = _composition(composition)
    c = float(_carbon(clean["C"] if carbon is None else _as_float(carbon, "carbon")))
    held = dict(clean, C=min(c, JUST_PLATEAU_CARBON))
    e = _distances(distances)
    turn = _just_minimum_sixteenths(held["C"]) * SIXTEENTH_INCH
    hrc = np.minimum(Just_1968_martensite_hrc(held["C"]), Just_1969_jominy_hrc(held, np.minimum(e, turn)))
    return _scalar_or_array(np.where(hrc < ROCKWELL_C_FLOOR, np.nan, hrc))


# --------------------------------------------------------------------------------------------
# Quench severity: ideal and actual critical diameter
# --------------------------------------------------------------------------------------------

_TERMS = 10  # series terms; at the half-temperature time (Fourier number ≥ 0.2) the 10th is < 1e-100


def _root(f, a: float, b: float, xtol: float) -> float:
    """A root of ``f`` bracketed by ``a`` and ``b`` to ``xtol`` (regula falsi, Illinois: numerics.roots)."""
    return illinois(f, a, f(a), b, f(b), xtol, 0.0)


def _cylinder_eigenvalues(biot: float) -> np.ndarray:
    """Roots of λ J1(λ) = Bi J0(λ), one in each interval (n-th zero of J1, n-th zero of J0)."""
    upper = bessel_zeros(0, _TERMS)
    if math.isinf(biot):
        return upper
    low = np.concatenate(([0.0], bessel_zeros(1, _TERMS - 1)))
    high = upper.copy()
    sign_low = np.sign(low * bessel_j(1, low) - biot * bessel_j(0, low))
    for _ in range(60):
        mid = 0.5 * (low + high)
        same = np.sign(mid * bessel_j(1, mid) - biot * bessel_j(0, mid)) == sign_low
        low, high = np.where(same, mid, low), np.where(same, high, mid)
    return 0.5 * (low + high)


def _centre_half_time_fourier(biot: float) -> float:
    """Fourier number α t / R² at which the centre of a long cylinder has cooled half way."""
    lam = _cylinder_eigenvalues(biot)
    j0, j1 = bessel_j(0, lam), bessel_j(1, lam)
    if math.isinf(biot):
        coef = 2.0 / (lam * j1)
    else:
        coef = 2.0 * j1 / (lam * (j0**2 + j1**2))

    def excess(fourier):
        return float(np.sum(coef * np.exp(-lam**2 * fourier))) - 0.5

    high = 0.25 + 1.0 / biot
    while excess(high) > 0.0:
        high *= 2.0
    return _root(excess, 0.1, high, 1e-14)


@cache
def _ideal_half_time_fourier() -> float:
    return _centre_half_time_fourier(math.inf)


SEVERITY_RANGE_PER_INCH = (0.01, 100.0)  # 1/in; and math.inf for the ideal quench
IDEAL_DIAMETER_RANGE = (1e-4, 1.0)  # m


def Grossmann_Asimow_Urban_1939_ideal_diameter(diameter: float, severity: float) -> float:
    r"""Ideal diameter of a steel whose bar of the given diameter is just 50 % martensite at its
    centre after a quench of severity H: Grossmann's H–D relation, recomputed.

    .. math::
        D_I = D \sqrt{\frac{Fo_{1/2}(Bi)}{Fo_{1/2}(\infty)}}, \qquad Bi = \frac{h R}{k} = H D

    where :math:`Fo_{1/2}(Bi)` is the Fourier number :math:`\alpha t / R^2` at which the centre of
    a long cylinder has cooled half way from the austenitizing to the quenchant temperature, from
    the series solution with a surface heat-transfer coefficient :math:`h`, and
    :math:`H = h / 2k` is Grossmann's severity of quench.

    Parameters
    ----------
    diameter : float
        Bar diameter, [m]
    severity : float
        Grossmann quench severity H = h/(2k), [1/m] (math.inf for the ideal quench)

    Returns
    -------
    D_I : float
        Ideal critical diameter, [m]

    Notes
    -----
    Grossmann, Asimow and Urban built their chart on the criterion that two bars harden alike at
    the centre when their centres take the same time to cool half way (the half-temperature time);
    that criterion is what is computed here, with constant thermal properties, so the diffusivity
    cancels. I am fairly sure this is how the classic chart was made, and the values it gives look
    like the chart as I remember it (D_I = 2 in in H = 0.35 oil → D ≈ 0.7 in), but I have not
    compared them with the chart: treat it as a reconstruction, not a reproduction. It holds for
    long bars (length several diameters); the limits are exact: :math:`D = D_I` as
    :math:`H \to \infty`, :math:`D_I^2 = D^2 \ln 2 / (2\,Fo_{1/2}(\infty)\,H D)` for a slow quench.

    Examples
    --------
    >>> round(Grossmann_Asimow_Urban_1939_ideal_diameter(0.704 * INCH, 0.35 / INCH) / INCH, 2)
    2.0

    References
    ----------
    .. [1] Grossmann, M. A., M. Asimow, and S. F. Urban. "Hardenability, its relation to quenching,
       and some quantitative data." In Hardenability of Alloy Steels, 124–190. Cleveland: American
       Society for Metals, 1939 (from memory; pages uncertain).
    .. [2] Carslaw, H. S., and J. C. Jaeger. Conduction of Heat in Solids, 2nd ed., §7.7. Oxford:
       Clarendon Press, 1959 (cooling of a long cylinder with a surface heat-transfer coefficient).
    """
    d = _as_float(diameter, "diameter")
    if not (0.0 < d <= IDEAL_DIAMETER_RANGE[1]):
        raise InputError("diameter", f"{d:g} m is outside 0–{IDEAL_DIAMETER_RANGE[1]:g} m")
    h = _severity(_as_float(severity, "severity") * INCH) / INCH
    return d * math.sqrt(_centre_half_time_fourier(h * d) / _ideal_half_time_fourier())


def _severity(severity_per_inch) -> float:
    h = _as_float(severity_per_inch, "severity")
    if not (math.isinf(h) and h > 0) and not (SEVERITY_RANGE_PER_INCH[0] <= h <= SEVERITY_RANGE_PER_INCH[1]):
        raise InputError("severity", f"quench severity H={h:g} /in is outside {SEVERITY_RANGE_PER_INCH[0]:g}–"
                         f"{SEVERITY_RANGE_PER_INCH[1]:g} /in (or inf for an ideal quench)")
    return h


def critical_diameter(ideal_diameter: float, severity_per_inch: float) -> float:
    r"""Largest round bar that is 50 % martensite at its centre after a quench of severity H.

    Inverts :func:`Grossmann_Asimow_Urban_1939_ideal_diameter` for the bar diameter D.

    Parameters
    ----------
    ideal_diameter : float
        Ideal critical diameter of the steel, 0.1 mm–1 m, [m]
    severity_per_inch : float
        Grossmann quench severity H, 0.01–100 or inf, [1/in] (the trade's unit: still oil about
        0.25–0.3, agitated oil 0.4–0.8, still water about 1, agitated brine 2–5; common practice)

    Returns
    -------
    D : float
        Critical diameter, [m]

    Notes
    -----
    A reconstruction of Grossmann's H–D chart from the half-temperature criterion (see
    :func:`Grossmann_Asimow_Urban_1939_ideal_diameter` for how sure that is). Long bars only.

    Examples
    --------
    >>> round(critical_diameter(2.0 * INCH, 0.35) / INCH, 2)
    0.7
    >>> round(critical_diameter(2.0 * INCH, math.inf) / INCH, 2)
    2.0

    References
    ----------
    .. [1] Grossmann, M. A., M. Asimow, and S. F. Urban. "Hardenability, its relation to quenching,
       and some quantitative data." In Hardenability of Alloy Steels. Cleveland: American Society
       for Metals, 1939 (from memory).
    """
    di = _as_float(ideal_diameter, "ideal_diameter")
    if not (IDEAL_DIAMETER_RANGE[0] <= di <= IDEAL_DIAMETER_RANGE[1]):
        raise InputError("ideal_diameter", f"{formats.typed(di * 1e3, 'mm')} is outside "
                         f"{length_range(*IDEAL_DIAMETER_RANGE)}")
    h = _severity(severity_per_inch) / INCH
    if math.isinf(h):
        return di
    fo_ideal = _ideal_half_time_fourier()

    def excess(d):
        return d * math.sqrt(_centre_half_time_fourier(h * d) / fo_ideal) - di

    return _root(excess, di * 1e-9, di, di * 1e-12)


def hardens_through(diameter: float, ideal_diameter: float, severity_per_inch: float) -> bool:
    """Whether a round bar is at least 50 % martensite at its centre after a quench (:func:`critical_diameter`).

    Parameters
    ----------
    diameter : float
        Bar diameter, [m]
    ideal_diameter : float
        Ideal critical diameter of the steel, [m]
    severity_per_inch : float
        Grossmann quench severity H, [1/in]

    Returns
    -------
    hardens : bool
        True when the bar is no larger than the critical diameter.

    Examples
    --------
    >>> hardens_through(0.5 * INCH, 2.0 * INCH, 0.35), hardens_through(1.0 * INCH, 2.0 * INCH, 0.35)
    (True, False)
    """
    d = _as_float(diameter, "diameter")
    if not (0.0 < d <= IDEAL_DIAMETER_RANGE[1]):
        raise InputError("diameter", f"{formats.typed(d * 1e3, 'mm')} is outside "
                         f"{length_range(0.0, IDEAL_DIAMETER_RANGE[1])}")
    return d <= critical_diameter(ideal_diameter, severity_per_inch)


# --------------------------------------------------------------------------------------------
# For the sheet and the window
# --------------------------------------------------------------------------------------------

#: Jominy distances a sheet shows, [1/16 in]
FACTS_SIXTEENTHS = (1, 2, 4, 6, 8, 12, 16, 24, 32)

def _unique(notes: list[str]) -> list[str]:
    return list(dict.fromkeys(notes))


METHODS_TEXT = ("ideal critical diameter: ASTM A255 multiplying factors (Grossmann), grain-size factor from "
                "Grossmann's chart, carbon-only boron factor; Jominy curve: Just (1969), capped by the hardness "
                "of martensite (Just 1968)")


def hardenability_facts(steel_composition: dict[str, float], grain_size: float = 7.0,
                        case_carbon: float | None = None) -> dict:
    """The hardenability figures a sheet or window shows for a steel: D_I of the core (and of a case
    carbon), the martensite hardness and a few Jominy points.

    Parameters
    ----------
    steel_composition : dict
        Element symbol → content, [wt %]
    grain_size : float, optional
        Austenite grain size, [ASTM No.]
    case_carbon : float, optional
        A carbon content of the case to give the D_I for as well, [wt %]

    Returns
    -------
    facts : dict
        ``ideal_diameter`` [m], ``case_carbon`` [wt %] and ``case_ideal_diameter`` [m] (None without a
        case carbon), ``martensite_hrc`` [HRC], ``jominy_distances`` [m] and ``jominy_hrc`` [HRC] (None
        below 20 HRC), ``grain_size`` [ASTM No.], ``methods`` (text) and ``warnings`` (list of str).
        Raises :class:`~casedepth.errors.InputError` for a steel beyond ASTM A255's factors (tool steels).

    Examples
    --------
    >>> facts = hardenability_facts({"C": 0.205, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20},
    ...                             case_carbon=0.8)
    >>> round(facts["ideal_diameter"] / INCH, 2), round(facts["case_ideal_diameter"] / INCH, 2)
    (1.9, 5.21)
    >>> facts["jominy_hrc"][:3]
    (47.2, 44.6, 36.2)
    """
    clean = _composition(steel_composition)
    distances = np.array(FACTS_SIXTEENTHS, dtype=float) * SIXTEENTH_INCH
    hrc = jominy_curve(clean, distances)
    case = None if case_carbon is None else float(_carbon(_as_float(case_carbon, "case_carbon")))
    return {
        "ideal_diameter": ideal_critical_diameter(clean, grain_size),
        "case_carbon": case,
        "case_ideal_diameter": None if case is None else ideal_critical_diameter(clean, grain_size, carbon=case),
        "martensite_hrc": round(float(Just_1968_martensite_hrc(clean["C"])), 1),
        "jominy_distances": tuple(float(d) for d in distances),
        "jominy_hrc": tuple(None if math.isnan(h) else round(float(h), 1) for h in hrc),
        "grain_size": float(grain_size),
        "methods": METHODS_TEXT,
        "warnings": _unique([*hardenability_warnings(clean, grain_size),
                             *([] if case is None else hardenability_warnings(clean, grain_size, case))]),
    }


__all__ = [
    "ASTM_A255_carbon_factor", "ASTM_A255_manganese_factor", "ASTM_A255_silicon_factor", "ASTM_A255_nickel_factor",
    "ASTM_A255_chromium_factor", "ASTM_A255_molybdenum_factor", "ASTM_A255_copper_factor",
    "ASTM_A255_vanadium_factor", "boron_factor", "grain_size_factor", "MULTIPLYING_FACTORS", "MultiplyingFactor",
    "alloy_factor", "ideal_critical_diameter", "hardenability_warnings", "Just_1969_jominy_hrc", "jominy_curve",
    "Grossmann_Asimow_Urban_1939_ideal_diameter", "critical_diameter", "hardens_through", "hardenability_facts",
]
