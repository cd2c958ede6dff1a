r"""Cooling through the part during the quench: quench media and transient conduction with a convective surface.

A quench is described by its Grossmann severity :math:`H = h / 2k` [1/in] (the trade's number) or by the
heat-transfer coefficient :math:`h` [W/m²K] it stands for. The part cools by conduction with constant
properties of austenite and a constant :math:`h` at its surface; for each depth below the surface the module
gives the cooling rate at 700 °C (the rate the hardness system of Maynier, Jungmann & Dollet (1978) reads)
and the time :math:`t_{8/5}` from 800 to 500 °C.

The temperatures are the analytic solutions of Carslaw & Jaeger (1959) for a plate quenched on both faces
(§3.11), a solid cylinder (§7.7) and a solid sphere (§9.6), as series of the Biot number's eigenvalues, and
for a thick section the convective-surface solution of the semi-infinite solid (§2.7). At early times, where
a series would need hundreds of terms, a short-time form takes over (see :func:`short_time_quench`).

================  ==================================================  =====================
shape             what is quenched                                    size
================  ==================================================  =====================
``plate``         both faces of a plate; or one face of a thick       thickness, or
                  section (semi-infinite)                             ``None``
``cylinder``      the outside of a solid round                        diameter
``sphere``        the outside of a ball                               diameter
``bore``          refused: how the inside of a hole cools depends on  —
                  the part's outside, which the geometry does not
                  give; quench the wall as a plate of its thickness
================  ==================================================  =====================

Constant properties and a constant :math:`h` are assumed. A real liquid quench passes through a vapour
blanket, nucleate boiling and convection, each with its own :math:`h`, and the latent heat of the
transformations is left out; the cooling rates are indicative, good for comparing sections and media.
Temperatures in K, lengths in m, times in s.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, field

import numpy as np

from ..constants import ZERO_CELSIUS
from ..errors import InputError, SolverError
from ..numerics.geometry import MAX_SIZE, Geometry
from ..numerics.special import bessel_j, bessel_zeros, erfc, erfcx
from ..units import both_temperatures, length_range, temperature_range

INCH = 0.0254  # m

#: thermal conductivity of austenite near 700–800 °C, [W/(m K)]: AISI 304 (austenitic) is about 25 at 1000 K and
#: 28 at 1200 K in Incropera & DeWitt's property table, from memory; low-alloy steel undercooled below A1 is
#: austenite too, and the same within a few per cent (from memory)
CONDUCTIVITY = 26.0
#: thermal diffusivity of austenite near 700–800 °C, [m²/s]: k / (ρ c_p) with ρ ≈ 7700 kg/m³ and c_p ≈ 625 J/(kg K)
#: (from memory; AISI 304 at 1000 K gives 5.3e-6 from the same table)
DIFFUSIVITY = 5.4e-6

#: accepted ranges of the inputs the user sets (SI)
H_RANGE = (10.0, 1.0e6)  # W/(m² K): still air is about 10; 1e6 holds the surface at the bath temperature
START_RANGE = (720.0 + ZERO_CELSIUS, 1200.0 + ZERO_CELSIUS)  # K, austenitizing and direct-quench temperatures
MEDIUM_RANGE = (0.0 + ZERO_CELSIUS, 400.0 + ZERO_CELSIUS)  # K, water at 0 °C to hot salt for martempering
CONDUCTIVITY_RANGE = (10.0, 60.0)  # W/(m K)
DIFFUSIVITY_RANGE = (2.0e-6, 2.0e-5)  # m²/s

#: the temperatures the outputs are read at, [K]: t8/5 runs from 800 to 500 °C; the hardness system reads the
#: cooling rate at 700 °C
T_800 = 800.0 + ZERO_CELSIUS
T_700 = 700.0 + ZERO_CELSIUS
T_500 = 500.0 + ZERO_CELSIUS

QUENCH_SHAPES = ("plate", "cylinder", "sphere")
_WEIGHT = {"plate": 0, "cylinder": 1, "sphere": 2}  # m in the Laplacian's (m/r) ∂/∂r term
#: below this Fourier number the short-time form is used, above it the series. The plate's short-time form is
#: exact until the wave from the far face arrives (its share is below 1e-6 of the drop at 0.02); the sphere's too,
#: but its factor R/r magnifies that share near the centre, so it hands over early; the cylinder's is exact to
#: first order in √Fo and off by about 0.09·Fo in 1 − θ (measured against a 3000-term series)
_SHORT_TIME_FO = {"plate": 0.02, "cylinder": 1.0e-3, "sphere": 1.0e-3}
_TAIL = 40.0  # series terms are kept while λ² Fo ≤ 40 at the hand-over (first dropped term below e^-40)


def Grossmann_heat_transfer_coefficient(H: float, k: float = CONDUCTIVITY) -> float:
    r"""Heat-transfer coefficient of a quench of Grossmann severity H (Grossmann's definition H = h/2k).

    .. math:: h = 2 k H

    Parameters
    ----------
    H : float
        Grossmann quench severity, [1/in]
    k : float
        Thermal conductivity of the steel (austenite), [W/(m K)]

    Returns
    -------
    h : float
        Surface heat-transfer coefficient, [W/(m² K)]

    Notes
    -----
    A definition, valid for any H; the Biot number of a round of radius R is hR/k = 2HR (R in
    inches), so the conduction results depend on H alone and k only sets which h is quoted. H is
    kept in 1/in, the unit of every published severity table.

    Examples
    --------
    >>> round(Grossmann_heat_transfer_coefficient(1.0))
    2047

    References
    ----------
    .. [1] Grossmann, M. A., M. Asimow, and S. F. Urban. "Hardenability, its relation to quenching, and
       some quantitative data." In Hardenability of Alloy Steels, 124–190. Cleveland: American Society
       for Metals, 1939 (from memory).
    """
    return 2.0 * k * H / INCH


def Grossmann_severity(h: float, k: float = CONDUCTIVITY) -> float:
    """Grossmann quench severity [1/in] of a heat-transfer coefficient h [W/(m² K)], H = h/2k; the inverse of
    :func:`Grossmann_heat_transfer_coefficient`.

    Examples
    --------
    >>> round(Grossmann_severity(2047.2), 3)
    1.0
    """
    return h * INCH / (2.0 * k)


@dataclass(frozen=True)
class QuenchMedium:
    """One row of the quench-media table: a medium, its Grossmann severity and the h it stands for.

    Parameters
    ----------
    key : str
        Key in :data:`QUENCH_MEDIA` (files, command line).
    label : str
        Name shown to people.
    H : float
        Grossmann quench severity, [1/in]
    bath_temperature : float
        Usual temperature of the bath or of the gas, [K]
    source : str
        Where H comes from and how sure it is.
    h : float
        Heat-transfer coefficient 2kH with k = :data:`CONDUCTIVITY`, [W/(m² K)] (derived, not an argument).
    """

    key: str
    label: str
    H: float
    bath_temperature: float
    source: str
    h: float = field(init=False)

    def __post_init__(self):
        object.__setattr__(self, "h", Grossmann_heat_transfer_coefficient(self.H))


_GROSSMANN = "Grossmann H, handbook quench-severity table (ASM Handbook Vol. 4 tradition)"

#: Named quench media: the one table the command line, the window and plan files read (key → row). Liquid
#: values: the handbook table of Grossmann H by medium and agitation (Grossmann & Bain, Principles of Heat
#: Treatment, 5th ed., ASM 1964; ASM Handbook Vol. 4, Heat Treating, ASM International 1991, "Quenching of
#: Steel"), as commonly reproduced and recalled from memory; one value is picked inside the tabulated range.
#: Gas values are trade figures for h (common practice) turned into H. Bath temperatures: common practice.
QUENCH_MEDIA: dict[str, QuenchMedium] = {m.key: m for m in (
    QuenchMedium("still-oil", "Oil, still", 0.27, 60.0 + ZERO_CELSIUS,
                 f"{_GROSSMANN}: 0.25–0.30 for still oil; from memory"),
    QuenchMedium("oil", "Oil, moderately agitated", 0.37, 60.0 + ZERO_CELSIUS,
                 f"{_GROSSMANN}: 0.35–0.40 for moderate agitation; from memory"),
    QuenchMedium("agitated-oil", "Oil, strongly agitated", 0.65, 60.0 + ZERO_CELSIUS,
                 f"{_GROSSMANN}: 0.5–0.8 for good to strong agitation; from memory"),
    QuenchMedium("polymer", "Polymer (PAG, 10–20 %), agitated", 0.8, 35.0 + ZERO_CELSIUS,
                 "between oil and water, about 0.5–1.2 with concentration, temperature and agitation; "
                 "common practice, from memory"),
    QuenchMedium("still-water", "Water, still", 1.0, 25.0 + ZERO_CELSIUS,
                 f"{_GROSSMANN}: 0.9–1.0 for still water; from memory"),
    QuenchMedium("agitated-water", "Water, agitated", 1.5, 25.0 + ZERO_CELSIUS,
                 f"{_GROSSMANN}: 1.2–2.0 for moderate to strong agitation; from memory"),
    QuenchMedium("brine", "Brine (5–10 % NaCl), still", 2.0, 25.0 + ZERO_CELSIUS,
                 f"{_GROSSMANN}: about 2 for still brine; from memory"),
    QuenchMedium("gas-n2-10bar", "Gas, nitrogen at 10 bar", 0.2, 40.0 + ZERO_CELSIUS,
                 "h about 300–500 W/m²K (H ≈ 0.2, slower than still oil); common practice, from memory"),
    QuenchMedium("gas-he-20bar", "Gas, helium at 20 bar", 0.45, 40.0 + ZERO_CELSIUS,
                 "h about 800–1200 W/m²K (H ≈ 0.45, near agitated oil); common practice, from memory"),
)}
DEFAULT_MEDIUM = "oil"


def _check_range(field_name: str, value, low: float, high: float, describe) -> float:
    try:
        number = float(value)
    except (TypeError, ValueError, OverflowError):
        raise InputError(field_name, f"{str(value)[:40]!r} is not a number; allowed {describe(low, high)}") from None
    if not (math.isfinite(number) and low <= number <= high):
        raise InputError(field_name, f"{str(value)[:40]} is outside {describe(low, high)}")
    return number


def _si(unit):
    return lambda low, high: f"{low:g}–{high:g} {unit}"


def heat_transfer_coefficient(severity_or_h) -> float:
    """The h [W/(m² K)] a quench stands for: a key of :data:`QUENCH_MEDIA`, a :class:`QuenchMedium`, or h itself.

    Examples
    --------
    >>> round(heat_transfer_coefficient("oil"))
    757
    >>> heat_transfer_coefficient(1500.0)
    1500.0
    """
    if isinstance(severity_or_h, QuenchMedium):
        return severity_or_h.h
    if isinstance(severity_or_h, str):
        if severity_or_h not in QUENCH_MEDIA:
            raise InputError("severity_or_h", f"unknown quench medium {severity_or_h!r}; choose one of "
                             f"{', '.join(QUENCH_MEDIA)} or give h in W/m²K ({H_RANGE[0]:g}–{H_RANGE[1]:g})")
        return QUENCH_MEDIA[severity_or_h].h
    if isinstance(severity_or_h, bool):
        raise InputError("severity_or_h", f"a quench medium or h in W/m²K ({H_RANGE[0]:g}–{H_RANGE[1]:g}), not {severity_or_h}")
    return _check_range("severity_or_h", severity_or_h, *H_RANGE, _si("W/m²K"))


# -- the solutions in dimensionless form: θ = (T − T_medium)/(T_start − T_medium), Fo = a t / L², Bi = h L / k --
def Carslaw_Jaeger_eigenvalues(shape: str, Bi: float, terms: int) -> np.ndarray:
    r"""The first eigenvalues λ_n of a plate, cylinder or sphere cooled through a convective surface.

    .. math::
        \lambda \tan\lambda = Bi \ (\text{plate}), \qquad
        \lambda J_1(\lambda) = Bi\, J_0(\lambda) \ (\text{cylinder}), \qquad
        1 - \lambda\cot\lambda = Bi \ (\text{sphere})

    Parameters
    ----------
    shape : str
        ``"plate"``, ``"cylinder"`` or ``"sphere"``.
    Bi : float
        Biot number hL/k with L the half-thickness or the radius, [-]
    terms : int
        How many eigenvalues, [-]

    Returns
    -------
    lam : ndarray
        Positive roots in increasing order, one in each interval between the roots of the limits
        Bi = 0 and Bi = ∞, [-]

    Notes
    -----
    Any Bi > 0. Found by Newton steps kept inside each root's bracket, to about 1e-14.

    Examples
    --------
    >>> [round(float(v), 4) for v in Carslaw_Jaeger_eigenvalues("cylinder", 1.0, 2)]
    [1.2558, 4.0795]

    References
    ----------
    .. [1] Carslaw, H. S., and J. C. Jaeger. Conduction of Heat in Solids. 2nd ed. Oxford: Clarendon
       Press, 1959, §3.11 (slab), §7.7 (cylinder), §9.6 (sphere) (section numbers from memory).
    """
    n = np.arange(terms, dtype=float)
    if shape == "plate":
        lo, hi = n * math.pi, (n + 0.5) * math.pi

        def f(lam):
            s, c = np.sin(lam), np.cos(lam)
            return lam * s - Bi * c, s + lam * c + Bi * s
    elif shape == "sphere":
        lo, hi = n * math.pi, (n + 1.0) * math.pi

        def f(lam):
            s, c = np.sin(lam), np.cos(lam)
            return (1.0 - Bi) * s - lam * c, lam * s - Bi * c
    elif shape == "cylinder":
        lo, hi = _bessel_zeros(terms)

        def f(lam):
            a, b = bessel_j(0, lam), bessel_j(1, lam)
            return lam * b - Bi * a, lam * a + Bi * b
    else:
        raise InputError("shape", f"no eigenvalues for {shape!r}; choose one of {', '.join(QUENCH_SHAPES)}")
    lo = np.maximum(lo, 1e-300)
    sign_lo = np.sign(f(lo)[0])
    lam = 0.5 * (lo + hi)
    for _ in range(60):
        value, slope = f(lam)
        below = np.sign(value) == sign_lo
        lo, hi = np.where(below, lam, lo), np.where(below, hi, lam)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = lam - value / slope
        inside = (step >= lo) & (step <= hi)
        new = np.where(inside, step, 0.5 * (lo + hi))
        if np.all(np.abs(new - lam) <= 1e-14 * new):
            return new
        lam = new
    return lam


_ZEROS: dict[int, tuple[np.ndarray, np.ndarray]] = {}


def _bessel_zeros(terms: int) -> tuple[np.ndarray, np.ndarray]:
    """Brackets of the cylinder's roots: (0, j0,1), (j1,1, j0,2), … (zeros of J1 and J0 interlace)."""
    if terms not in _ZEROS:
        _ZEROS[terms] = (np.concatenate(([0.0], bessel_zeros(1, terms - 1))), bessel_zeros(0, terms))
    return _ZEROS[terms]


def _coefficients(shape: str, lam: np.ndarray, Bi: float) -> np.ndarray:
    """Series coefficients C_n of a uniform initial temperature (Carslaw & Jaeger, as cited above)."""
    if shape == "plate":
        return 2.0 * np.sin(lam) / (lam + np.sin(lam) * np.cos(lam))
    if shape == "sphere":
        return 2.0 * (np.sin(lam) - lam * np.cos(lam)) / (lam - np.sin(lam) * np.cos(lam))
    a, b = bessel_j(0, lam), bessel_j(1, lam)
    return 2.0 * b / (lam * (a * a + b * b))


def _modes(shape: str, lam: np.ndarray, rho: np.ndarray) -> np.ndarray:
    """Eigenfunctions X(λ ρ) at ρ = r/L (1 at the surface, 0 at the centre); depth × term."""
    arg = np.multiply.outer(rho, lam)
    if shape == "plate":
        return np.cos(arg)
    if shape == "sphere":
        return np.sinc(arg / math.pi)
    return bessel_j(0, arg)


def short_time_quench(x, Fo, Bi: float, weight: int):
    r"""Temperature θ and its rate dθ/dFo near the surface at early times, after Carslaw & Jaeger §2.7 with the
    curvature of the surface taken to first order.

    .. math::
        1 - \theta = \left(\frac{1}{1 - x}\right)^{m/2} \frac{Bi}{Bi'}
            \left[\operatorname{erfc} u - e^{-u^2}\operatorname{erfcx}(u + Bi'\sqrt{Fo})\right],
        \qquad u = \frac{x}{2\sqrt{Fo}},\quad Bi' = Bi - \frac{m}{2}

    Parameters
    ----------
    x : ndarray
        Depth below the surface over the half-section L (ℓ = k/h for a semi-infinite body), [-]
    Fo : ndarray
        Fourier number a t / L², [-]
    Bi : float
        Biot number h L / k (1 for a semi-infinite body), [-]
    weight : int
        m = 0 (plate), 1 (cylinder), 2 (sphere)

    Returns
    -------
    theta, dtheta_dFo : ndarray
        (T − T_medium)/(T_start − T_medium) and its rate, broadcast over x and Fo, [-]

    Notes
    -----
    For m = 0 this is the semi-infinite solid with a convective surface (exact). For the sphere,
    r θ obeys the slab equation with the surface coefficient Bi − 1, so the form is exact until the
    wave from the far side arrives (Fo ≳ 0.02; the factor R/r magnifies that wave near the centre,
    so the series takes over at Fo = 1e-3). For the cylinder it follows from the Laplace
    transform with I0 and I1 replaced by the first two terms of their asymptotic series
    (Abramowitz & Stegun 9.7.1), derived for this module: 1 − θ is about 0.09·Fo too low
    (relative) against the full series, 1e-4 at Fo = 1e-3.

    Examples
    --------
    >>> theta, rate = short_time_quench(0.0, 1.0, 1.0, 0)  # the surface at τ = 1: erfcx(1)
    >>> round(float(theta), 6)
    0.427584

    References
    ----------
    .. [1] Carslaw, H. S., and J. C. Jaeger. Conduction of Heat in Solids. 2nd ed. Oxford: Clarendon
       Press, 1959, §2.7 (semi-infinite solid, radiation at the surface; from memory).
    .. [2] Abramowitz, M., and I. A. Stegun. Handbook of Mathematical Functions. NBS Applied Mathematics
       Series 55. Washington: US Government Printing Office, 1964, eq. 9.7.1.
    """

    x, Fo = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(Fo, dtype=float))
    root = np.sqrt(Fo)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        u = x / (2.0 * root)
        bi = Bi - 0.5 * weight
        b = bi * root
        gauss = np.exp(-u * u)
        scaled = erfcx(u + b)
        # (Bi/Bi')·[erfc u − e^{−u²} erfcx(u + b)] loses digits as b → 0 (Bi' → 0): there its limit
        # Bi √Fo · 2 ierfc(u) and the next term in b
        cooled = Bi / bi * (erfc(u) - gauss * scaled) if bi != 0.0 else np.zeros_like(u)
        small = np.abs(b) < 1e-6
        if np.any(small):
            us, bs, gs = u[small], b[small], gauss[small]
            ierfc = gs / math.sqrt(math.pi) - us * erfc(us)
            cooled[small] = Bi * root[small] * (2.0 * ierfc - 0.5 * bs * gs * ((2.0 + 4.0 * us * us) * erfcx(us)
                                                                            - 4.0 * us / math.sqrt(math.pi)))
        rate = -Bi * gauss * (1.0 / np.sqrt(math.pi * Fo) - bi * scaled)
        if weight:
            factor = (1.0 / np.maximum(1.0 - x, 1e-12)) ** (0.5 * weight)
            cooled, rate = cooled * factor, rate * factor
    theta = np.where(Fo > 0.0, 1.0 - cooled, 1.0)
    return theta, np.where(Fo > 0.0, rate, 0.0)


@functools.lru_cache(maxsize=64)
def _series(shape: str, Bi: float, terms: int) -> tuple[np.ndarray, np.ndarray]:
    """Eigenvalues and coefficients of a body's series, kept for the next evaluation of the same quench (a
    window's edits mostly leave the quench alone); read-only, as they are shared."""
    lam = Carslaw_Jaeger_eigenvalues(shape, Bi, terms)
    coef = _coefficients(shape, lam, Bi)
    lam.flags.writeable = coef.flags.writeable = False
    return lam, coef


class _Conduction:
    """A body in dimensionless form: the series (finite bodies) and the short-time form, with the hand-over.

    ``scale`` [m] is L: the half-section, or k/h for a semi-infinite body (whose Bi is then 1).
    """

    def __init__(self, shape: str, Bi: float, scale: float, finite: bool):
        self.shape, self.Bi, self.scale, self.finite = shape, Bi, scale, finite
        self.switch = _SHORT_TIME_FO[shape] if finite else math.inf
        if finite:
            terms = int(math.ceil(math.sqrt(_TAIL / self.switch) / math.pi)) + 2
            self.lam, self.coef = _series(shape, Bi, terms)
            self.lam2 = self.lam ** 2

    def amplitudes(self, x: np.ndarray) -> np.ndarray:
        """C_n X_n(x), depth × term."""
        return self.coef * _modes(self.shape, self.lam, 1.0 - x)

    def evaluate(self, x, Fo, early, amplitudes=None):
        """θ and dθ/dFo at matching depths x and times Fo (1-D, same length), by the short-time form where
        ``early`` and the series elsewhere (series amplitudes per depth)."""
        if np.all(early):
            return short_time_quench(x, Fo, self.Bi, _WEIGHT[self.shape])
        decay = np.exp(-np.multiply.outer(Fo, self.lam2)) * amplitudes
        theta, rate = decay.sum(axis=1), -(decay @ self.lam2)
        if np.any(early):
            theta[early], rate[early] = short_time_quench(x[early], Fo[early], self.Bi, _WEIGHT[self.shape])
        return theta, rate

    def grid(self, x, Fo, amplitudes=None):
        """θ at every depth x and every time of the grid Fo (depth × time)."""
        out = np.empty((x.size, Fo.size))
        early = Fo < self.switch
        if np.any(early):
            out[:, early] = short_time_quench(x[:, None], Fo[None, early], self.Bi, _WEIGHT[self.shape])[0]
        if np.any(~early):
            out[:, ~early] = amplitudes @ np.exp(-np.multiply.outer(self.lam2, Fo[~early]))
        return out


def _body(shape, size, h, k) -> tuple[_Conduction, float]:
    """The body and its half-section [m] (inf for a semi-infinite plate); refuses the bore."""
    geometry = Geometry(shape, size)
    if geometry.shape not in QUENCH_SHAPES:
        raise InputError("shape", f"the quench of a {geometry.shape} cannot be computed: its cooling depends on the "
                         f"part's outside, which the geometry does not give; choose one of {', '.join(QUENCH_SHAPES)} "
                         f"(a bore's wall as a plate of its thickness)")
    half = geometry.half_section
    if math.isfinite(half):
        return _Conduction(geometry.shape, h * half / k, half, True), half
    return _Conduction("plate", 1.0, k / h, False), half


def _depths(depths, half: float) -> np.ndarray:
    try:
        x = np.asarray(depths, dtype=float)
    except (TypeError, ValueError):
        raise InputError("depths", "depths must be numbers, [m]") from None
    deepest = half if math.isfinite(half) else MAX_SIZE
    if not np.all(np.isfinite(x)) or np.any((x < 0.0) | (x > deepest)):
        raise InputError("depths", f"depths must lie from the surface to the centre, {length_range(0.0, deepest)}")
    return x


def _properties(conductivity, diffusivity):
    k = _check_range("conductivity", conductivity, *CONDUCTIVITY_RANGE, _si("W/(m K)"))
    a = _check_range("diffusivity", diffusivity, *DIFFUSIVITY_RANGE, _si("m²/s"))
    return k, a


def _temperatures(T_start, T_medium, severity_or_h):
    T0 = _check_range("T_start", T_start, *START_RANGE, temperature_range)
    if T_medium is None:
        if isinstance(severity_or_h, QuenchMedium):
            return T0, severity_or_h.bath_temperature
        if isinstance(severity_or_h, str) and severity_or_h in QUENCH_MEDIA:
            return T0, QUENCH_MEDIA[severity_or_h].bath_temperature
        raise InputError("T_medium", f"give the bath temperature with a heat-transfer coefficient "
                         f"({temperature_range(*MEDIUM_RANGE)})")
    return T0, _check_range("T_medium", T_medium, *MEDIUM_RANGE, temperature_range)


def quench_temperature(shape: str, size, depths, times, severity_or_h=DEFAULT_MEDIUM, T_start: float = 850.0 + ZERO_CELSIUS,
                       T_medium=None, *, conductivity: float = CONDUCTIVITY, diffusivity: float = DIFFUSIVITY) -> np.ndarray:
    r"""Temperature at depths below the surface and times into the quench (Carslaw & Jaeger 1959 series).

    .. math::
        \frac{T - T_m}{T_0 - T_m} = \sum_n C_n X_n(\lambda_n r/L)\, e^{-\lambda_n^2 a t / L^2}

    with X = cos, J0 or sin(z)/z for a plate, cylinder or sphere; the short-time form of
    :func:`short_time_quench` at early times and for a semi-infinite plate.

    Parameters
    ----------
    shape : str
        ``"plate"``, ``"cylinder"`` or ``"sphere"`` (``"bore"`` is refused).
    size : float or None
        Plate thickness (``None``: semi-infinite), or diameter, [m]
    depths : array_like
        Depths below the quenched surface, from 0 to the centre, [m]
    times : array_like
        Times from the start of the quench, ≥ 0, [s]
    severity_or_h : str, QuenchMedium or float
        A key of :data:`QUENCH_MEDIA`, a row of it, or the heat-transfer coefficient h, [W/(m² K)]
    T_start : float
        Uniform temperature when the quench starts, [K]
    T_medium : float or None
        Bath temperature (``None``: the medium's usual one), [K]
    conductivity : float
        Thermal conductivity k of the steel, [W/(m K)]
    diffusivity : float
        Thermal diffusivity a of the steel, [m²/s]

    Returns
    -------
    T : ndarray
        Temperatures, depth × time, [K]

    Notes
    -----
    Constant properties and constant h; see the module notes. Accurate to about 1e-4 of
    T_start − T_medium (the series' tail is below e^-40; the cylinder's short-time form is off by
    about 0.09·Fo relative in 1 − θ up to Fo = 1e-3).

    Examples
    --------
    >>> T = quench_temperature("cylinder", 0.025, [0.0, 0.0125], [10.0], "oil", 850 + 273.15, 60 + 273.15)
    >>> [round(float(v) - 273.15) for v in T[:, 0]]  # surface and centre of a 25 mm bar after 10 s, °C
    [633, 741]

    References
    ----------
    .. [1] Carslaw, H. S., and J. C. Jaeger. Conduction of Heat in Solids. 2nd ed. Oxford: Clarendon
       Press, 1959, §2.7, §3.11, §7.7, §9.6 (section numbers from memory).
    """
    h = heat_transfer_coefficient(severity_or_h)
    T0, Tm = _temperatures(T_start, T_medium, severity_or_h)
    k, a = _properties(conductivity, diffusivity)
    body, half = _body(shape, size, h, k)
    x = _depths(depths, half).ravel() / body.scale
    t = np.asarray(times, dtype=float).ravel()
    if not np.all(np.isfinite(t)) or np.any(t < 0.0):
        raise InputError("times", "times must be finite and ≥ 0, [s]")
    Fo = a * t / body.scale ** 2
    amplitudes = body.amplitudes(x) if body.finite else None
    return Tm + (T0 - Tm) * body.grid(x, Fo, amplitudes)


@dataclass(frozen=True)
class QuenchCooling:
    """How each depth cools in a quench: the cooling rate at 700 °C and t8/5, with the times they come from.

    All arrays have the shape of the depths given. ``NaN`` where a temperature is never passed (t8/5 and
    ``time_800`` when the quench starts at or below 800 °C).

    Parameters
    ----------
    depth : ndarray
        Depth below the quenched surface, [m]
    cooling_rate_700 : ndarray
        −dT/dt when the depth passes 700 °C, [K/s] (× 3600 for the °C/h of Maynier et al.)
    t8_5 : ndarray
        Time from 800 to 500 °C, [s]
    time_800, time_700, time_500 : ndarray
        Time from the start of the quench to each temperature, [s]
    h : float
        Surface heat-transfer coefficient, [W/(m² K)]
    biot : float
        h L / k on the half-section (``inf`` for a semi-infinite body), [-]
    """

    depth: np.ndarray
    cooling_rate_700: np.ndarray
    t8_5: np.ndarray
    time_800: np.ndarray
    time_700: np.ndarray
    time_500: np.ndarray
    h: float
    biot: float


def cooling_at_depths(shape: str, size, depths, severity_or_h=DEFAULT_MEDIUM, T_start: float = 850.0 + ZERO_CELSIUS,
                      T_medium=None, *, conductivity: float = CONDUCTIVITY,
                      diffusivity: float = DIFFUSIVITY) -> QuenchCooling:
    r"""Cooling rate at 700 °C and t8/5 at depths below the quenched surface (Carslaw & Jaeger 1959 solutions).

    .. math::
        \dot T_{700} = -\left.\frac{\partial T}{\partial t}\right|_{T = 700\,°C}, \qquad
        t_{8/5} = t(500\,°C) - t(800\,°C)

    with T(x, t) from :func:`quench_temperature`.

    Parameters
    ----------
    shape : str
        ``"plate"``, ``"cylinder"`` or ``"sphere"`` (``"bore"`` is refused: see the module notes).
    size : float or None
        Plate thickness (``None``: semi-infinite), or diameter, [m]
    depths : array_like
        Depths below the quenched surface, from 0 to the centre, [m]
    severity_or_h : str, QuenchMedium or float
        A key of :data:`QUENCH_MEDIA` (default ``"oil"``), a row of it, or h, [W/(m² K)]
    T_start : float
        Uniform temperature when the quench starts, 720–1200 °C, [K]
    T_medium : float or None
        Bath temperature, 0–400 °C (``None``: the medium's usual one), [K]
    conductivity : float
        Thermal conductivity k of the steel, [W/(m K)]
    diffusivity : float
        Thermal diffusivity a of the steel, [m²/s]

    Returns
    -------
    cooling : QuenchCooling
        Rates [K/s] and times [s] per depth.

    Notes
    -----
    Each temperature is passed once at each depth (cooling from a uniform temperature is monotonic);
    the times are found by Newton steps in log t kept inside a bracket from a grid, to 1e-12. Cooling
    rates are those of constant properties and constant h: indicative, as the module notes say.

    Examples
    --------
    A 25 mm bar from 850 °C into brine, at its surface and its centre: cooling rate at 700 °C [K/s], t8/5 [s]

    >>> c = cooling_at_depths("cylinder", 0.025, [0.0, 0.0125], "brine", 850 + 273.15)
    >>> [round(float(v)) for v in c.cooling_rate_700], [round(float(v), 1) for v in c.t8_5]
    ([275, 52], [1.9, 6.3])

    References
    ----------
    .. [1] Carslaw, H. S., and J. C. Jaeger. Conduction of Heat in Solids. 2nd ed. Oxford: Clarendon
       Press, 1959, §2.7, §3.11, §7.7, §9.6 (section numbers from memory).
    .. [2] Maynier, P., B. Jungmann, and J. Dollet. "Creusot-Loire system for the prediction of the
       mechanical properties of low alloy steels." In Hardenability Concepts with Applications to
       Steel, edited by D. V. Doane and J. S. Kirkaldy, 518–545. Warrendale: TMS-AIME, 1978 (pages
       from memory).
    """
    h = heat_transfer_coefficient(severity_or_h)
    T0, Tm = _temperatures(T_start, T_medium, severity_or_h)
    k, a = _properties(conductivity, diffusivity)
    body, half = _body(shape, size, h, k)
    given = _depths(depths, half)
    x = given.ravel() / body.scale
    levels = np.array([T_800, T_700, T_500])
    passed = levels < T0
    targets = (levels[passed] - Tm) / (T0 - Tm)
    times = np.full((3, x.size), np.nan)
    slopes = np.full((3, x.size), np.nan)
    if x.size:
        Fo, dtheta = _crossings(body, x, targets)
        times[passed] = Fo * body.scale ** 2 / a
        slopes[passed] = dtheta * a / body.scale ** 2
    shape_out = given.shape
    return QuenchCooling(
        depth=given,
        cooling_rate_700=(-(T0 - Tm) * slopes[1]).reshape(shape_out),
        t8_5=(times[2] - times[0]).reshape(shape_out),
        time_800=times[0].reshape(shape_out), time_700=times[1].reshape(shape_out),
        time_500=times[2].reshape(shape_out),
        h=h, biot=body.Bi if body.finite else math.inf,
    )


def _crossings(body: _Conduction, x: np.ndarray, targets: np.ndarray):
    """Fourier numbers where θ(x) falls to each target, and dθ/dFo there (target × depth)."""
    # bracket: at Fo_lo the surface has lost less than a tenth of the first target's drop
    # (1 − θ_surface ≤ (2/√π) Bi √Fo to first order); at Fo_hi every depth is below the last target
    first = 1.0 - targets.max()
    low = (0.1 * first * math.sqrt(math.pi) / (2.0 * max(body.Bi, 1.0))) ** 2
    if body.finite:
        high = max(1.0, 1.2 * math.log(4.0 / targets.min()) / body.lam[0] ** 2)
    else:
        high = 4.0 * ((x.max() + 1.0) / targets.min()) ** 2 / math.pi
    grid = np.exp(np.linspace(math.log(low), math.log(high), int(4 * math.log10(high / low)) + 2))
    amplitudes = body.amplitudes(x) if body.finite else None
    theta = body.grid(x, grid, amplitudes)  # depth × grid, falling along the grid
    # index of the first grid time below each target, per (target, depth)
    below = theta[None, :, :] <= targets[:, None, None]
    if below[:, :, 0].any() or not below[:, :, -1].all():
        raise SolverError("the quench's times could not be bracketed (a crossing before or after the time grid)")
    upper = np.argmax(below, axis=2)
    pairs_x = np.broadcast_to(np.arange(x.size), upper.shape).ravel()
    upper = upper.ravel()
    target = np.repeat(targets, x.size)
    last = grid.size - 1
    xs = x[pairs_x]
    amp = amplitudes[pairs_x] if amplitudes is not None else None
    # start from linear interpolation in log Fo between the grid times around the crossing
    th_lo, th_hi = theta[pairs_x, np.maximum(upper - 1, 0)], theta[pairs_x, upper]
    s_lo, s_hi = np.log(grid[np.maximum(upper - 1, 0)]), np.log(grid[upper])
    with np.errstate(divide="ignore", invalid="ignore"):
        w = np.clip(np.nan_to_num((th_lo - target) / (th_lo - th_hi)), 0.0, 1.0)
    s = s_lo + w * (s_hi - s_lo)
    # each crossing keeps the form (short-time or series) of its starting point, so that Newton sees one smooth
    # function and not the 1e-4 step where the two meet; the bracket is widened by a grid step for the same reason
    early = s < math.log(body.switch)
    s_lo, s_hi = np.log(grid[np.maximum(upper - 2, 0)]), np.log(grid[np.minimum(upper + 1, last)])
    for _ in range(50):
        value, rate = body.evaluate(xs, np.exp(s), early, amp)
        f = value - target
        above = f > 0.0
        s_lo, s_hi = np.where(above, s, s_lo), np.where(above, s_hi, s)
        with np.errstate(divide="ignore", invalid="ignore"):
            correction = f / (rate * np.exp(s))
        # converged: the step is below 1e-10 (relative in t), or θ is within 1e-13 of the target (near θ = 1,
        # where a start just above 800 °C puts the first target, θ itself carries rounding of a few 1e-16)
        if np.all((np.abs(correction) <= 1e-10) | (np.abs(f) <= 1e-13)):
            s = s - np.where(np.isfinite(correction), correction, 0.0)
            break
        step = s - correction
        inside = np.isfinite(step) & (step >= s_lo) & (step <= s_hi)
        s = np.where(inside, step, 0.5 * (s_lo + s_hi))
    Fo = np.exp(s)
    _, rate = body.evaluate(xs, Fo, early, amp)
    return Fo.reshape(targets.size, x.size), rate.reshape(targets.size, x.size)


def describe_media() -> list[str]:
    """One line per medium for lists and help: key, label, H, h, usual bath temperature.

    Examples
    --------
    >>> describe_media()[1]
    'oil: Oil, moderately agitated — H = 0.37 /in, h ≈ 757 W/m²K, bath 60 °C (140 °F)'
    """
    return [f"{m.key}: {m.label} — H = {m.H:g} /in, h ≈ {m.h:.0f} W/m²K, bath {both_temperatures(m.bath_temperature)}"
            for m in QUENCH_MEDIA.values()]


__all__ = [
    "QUENCH_MEDIA", "QuenchMedium", "DEFAULT_MEDIUM", "QuenchCooling", "Grossmann_heat_transfer_coefficient",
    "Grossmann_severity", "Carslaw_Jaeger_eigenvalues", "short_time_quench", "heat_transfer_coefficient",
    "quench_temperature", "cooling_at_depths", "describe_media", "CONDUCTIVITY", "DIFFUSIVITY",
]
