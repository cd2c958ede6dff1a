"""Diffusivity of carbon in austenite.

Three published descriptions, each a pure function of carbon content [wt %] and
temperature [K] returning m²/s, plus a method table (:data:`METHODS`) that the command
line and the window both read. :class:`Diffusivity` bundles a chosen method with its
parameters and a calibration multiplier.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from ..constants import GAS_CONSTANT, GAS_CONSTANT_CAL, MOLAR_MASS
from ..errors import InputError

ARRHENIUS_D0 = 2.3e-5  # m²/s
ARRHENIUS_Q = 148e3  # J/mol


def Tibbetts_1980(carbon, T):
    r"""Carbon diffusivity in austenite after Tibbetts (1980).

    .. math::
        D = 0.47\,\exp(-1.6\,C)\,\exp\!\left(-\frac{37000 - 6600\,C}{R\,T}\right)\ \mathrm{cm^2/s}

    with :math:`R = 1.987` cal/(mol K).

    Parameters
    ----------
    carbon : float or ndarray
        Carbon content, [wt %]
    T : float
        Temperature, [K]

    Returns
    -------
    D : float or ndarray
        Diffusivity, [m²/s]

    Notes
    -----
    Fitted to carbon diffusion in austenite of plain-carbon and low-alloy steels; valid for
    austenite, about 0–1.5 wt % C and about 800–1100 °C (range from memory). The
    concentration dependence (D rises with C at carburizing temperatures) is what makes
    profiles steeper near the case-core boundary than the erfc solution.

    Examples
    --------
    >>> round(float(Tibbetts_1980(0.4, 1198.15)) * 1e11, 3)
    1.337

    References
    ----------
    .. [1] Tibbetts, G. G. "Diffusivity of carbon in iron and steels at high temperatures."
       Journal of Applied Physics 51, no. 9 (1980): 4813–4816. doi:10.1063/1.328314
    """
    carbon = np.asarray(carbon, dtype=float) if not np.isscalar(carbon) else float(carbon)
    return 0.47e-4 * np.exp(-1.6 * carbon) * np.exp(-(37000.0 - 6600.0 * carbon) / (GAS_CONSTANT_CAL * T))


def Agren_1986(carbon, T):
    r"""Carbon diffusivity in binary Fe–C austenite after Ågren (1986).

    .. math::
        D = 4.53\times10^{-7}\left[1 + y(1-y)\frac{8339.9}{T}\right]
            \exp\!\left[-\left(\frac{1}{T} - 2.221\times10^{-4}\right)(17767 - 26436\,y)\right]
            \ \mathrm{m^2/s}

    where :math:`y = x_C/(1 - x_C)` is the carbon site fraction (C atoms per Fe atom).

    Parameters
    ----------
    carbon : float or ndarray
        Carbon content, [wt %]; converted to mole fraction for binary Fe–C
    T : float
        Temperature, [K]

    Returns
    -------
    D : float or ndarray
        Diffusivity, [m²/s]

    Notes
    -----
    An assessment of measured diffusivities in binary Fe–C austenite; alloy effects on the
    mobility are ignored. Valid for austenite up to saturation, roughly 800–1400 °C (range
    from memory).

    Examples
    --------
    >>> round(float(Agren_1986(0.4, 1198.15)) * 1e11, 3)
    1.298

    References
    ----------
    .. [1] Ågren, J. "A revised expression for the diffusivity of carbon in binary Fe–C
       austenite." Scripta Metallurgica 20, no. 11 (1986): 1507–1510.
       doi:10.1016/0036-9748(86)90384-4
    """
    carbon = np.asarray(carbon, dtype=float) if not np.isscalar(carbon) else float(carbon)
    y = (carbon / MOLAR_MASS["C"]) / ((100.0 - carbon) / MOLAR_MASS["Fe"])
    return 4.53e-7 * (1.0 + y * (1.0 - y) * 8339.9 / T) * np.exp(-(1.0 / T - 2.221e-4) * (17767.0 - 26436.0 * y))


def Arrhenius(carbon, T, D0: float = ARRHENIUS_D0, Q: float = ARRHENIUS_Q):
    r"""Constant (carbon-independent) Arrhenius diffusivity.

    .. math::
        D = D_0 \exp\!\left(-\frac{Q}{R T}\right)

    Parameters
    ----------
    carbon : float or ndarray
        Carbon content, [wt %]; only sets the shape of the result
    T : float
        Temperature, [K]
    D0 : float
        Pre-exponential factor, [m²/s]; default 2.3e-5 m²/s
    Q : float
        Activation energy, [J/mol]; default 148 kJ/mol

    Returns
    -------
    D : float or ndarray
        Diffusivity, [m²/s]

    Notes
    -----
    The defaults are the values for carbon in γ-iron as commonly tabulated in textbooks
    (e.g. Callister & Rethwisch, Table 5.2; from memory). Other books give 0.15 cm²/s and
    135 kJ/mol; the data sets differ by about 2× at 925 °C, so always name the one used.
    With no carbon dependence, this is the model of the textbook erfc solutions.

    Examples
    --------
    >>> round(float(Arrhenius(0.4, 1198.15)) * 1e12, 3)
    8.121

    References
    ----------
    .. [1] Callister, W. D., and D. G. Rethwisch. Materials Science and Engineering:
       An Introduction. Wiley (any edition since 2007), Table 5.2 "A tabulation of diffusion data".
    """
    return D0 * np.exp(-Q / (GAS_CONSTANT * T)) * np.ones_like(carbon, dtype=float)


@dataclass(frozen=True)
class Method:
    """One row of the method table: how to call a model and where it holds."""

    key: str
    display: str
    function: Callable
    validity: str
    reference: str
    parameters: tuple[str, ...] = ()


METHODS: dict[str, Method] = {
    "tibbetts": Method(
        "tibbetts", "Tibbetts (1980), carbon-dependent", Tibbetts_1980,
        "austenite, about 0–1.5 wt % C, 800–1100 °C",
        "Tibbetts, J. Appl. Phys. 51 (1980) 4813",
    ),
    "agren": Method(
        "agren", "Ågren (1986), carbon-dependent, binary Fe–C", Agren_1986,
        "binary Fe–C austenite up to saturation, 800–1400 °C",
        "Ågren, Scripta Metall. 20 (1986) 1507",
    ),
    "arrhenius": Method(
        "arrhenius", "Constant Arrhenius (D0, Q)", Arrhenius,
        "any austenite temperature; ignores the carbon dependence",
        "textbook tables, e.g. Callister & Rethwisch, Table 5.2",
        ("D0", "Q"),
    ),
}


@dataclass(frozen=True)
class Diffusivity:
    """A diffusivity method with its settings, callable as ``D(carbon, T)`` in m²/s.

    Parameters
    ----------
    method : str
        A key of :data:`METHODS`.
    multiplier : float
        Calibration factor applied to D (1 = the published model).
    D0, Q : float
        Arrhenius parameters [m²/s, J/mol]; used only by the ``arrhenius`` method.
    """

    method: str = "tibbetts"
    multiplier: float = 1.0
    D0: float = ARRHENIUS_D0
    Q: float = ARRHENIUS_Q
    _function: Callable = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        if self.method not in METHODS:
            raise InputError("diffusivity", f"unknown model {self.method!r}; choose one of {', '.join(METHODS)}")
        if not (math.isfinite(self.multiplier) and 0.1 <= self.multiplier <= 10.0):
            raise InputError("d_multiplier", f"{self.multiplier} is outside 0.1–10")
        if not (math.isfinite(self.D0) and 1e-9 <= self.D0 <= 1e-2):
            raise InputError("d0", f"{self.D0} m²/s is outside 1e-9–1e-2 m²/s")
        if not (math.isfinite(self.Q) and 50e3 <= self.Q <= 400e3):
            raise InputError("q", f"{self.Q / 1e3:g} kJ/mol is outside 50–400 kJ/mol")
        function = METHODS[self.method].function
        if self.method == "arrhenius":
            D0, Q = self.D0, self.Q
            object.__setattr__(self, "_function", lambda c, T: Arrhenius(c, T, D0, Q))
        else:
            object.__setattr__(self, "_function", function)

    def __call__(self, carbon, T):
        """Diffusivity [m²/s] at carbon [wt %] and temperature [K]."""
        if self.method == "tibbetts" and isinstance(carbon, np.ndarray):  # the solver's hot path: one exponential
            return (self.multiplier * 0.47e-4) * np.exp((-1.6 + 6600.0 / (GAS_CONSTANT_CAL * T)) * carbon - 37000.0 / (GAS_CONSTANT_CAL * T))
        return self.multiplier * self._function(carbon, T)

    def exponential_form(self, T: float) -> tuple[float, float] | None:
        """``(A, s)`` with D = A·exp(s·C) [m²/s, per wt %] at temperature ``T`` [K] where the model has that
        form (Tibbetts 1980; a constant Arrhenius D with s = 0), else None. The solver's lean path
        evaluates D and dD/dC = s·D from it with one exponential."""
        if self.method == "tibbetts":
            return (self.multiplier * 0.47e-4 * math.exp(-37000.0 / (GAS_CONSTANT_CAL * T)),
                    -1.6 + 6600.0 / (GAS_CONSTANT_CAL * T))
        if self.method == "arrhenius":
            return float(self.multiplier * self._function(0.0, T)), 0.0
        return None

    def with_derivative(self, carbon: np.ndarray, T: float, step: float = 1e-5):
        """D and dD/dC [m²/s per wt %] (used for Newton's Jacobian only).

        Exact for the Arrhenius and Tibbetts forms, a central difference otherwise.
        """
        if self.method == "tibbetts":  # Tibbetts_1980 in one exponential; d ln D / dC = -1.6 + 6600 / (R T)
            slope = -1.6 + 6600.0 / (GAS_CONSTANT_CAL * T)
            D = (self.multiplier * 0.47e-4) * np.exp(slope * carbon - 37000.0 / (GAS_CONSTANT_CAL * T))
            return D, D * slope
        D = self(carbon, T)
        if self.method == "arrhenius":
            return D, np.zeros_like(D)
        dD = (self(carbon + step, T) - self(carbon - step, T)) / (2.0 * step)
        return D, dD

    @property
    def display(self) -> str:
        return METHODS[self.method].display


class ExponentialForms:
    """The exponential forms (A, s) of many diffusivities at once, for a batch of solvers
    (:class:`casedepth.numerics.batch.BatchMarch`): row k is ``diffusivities[k].exponential_form(T[k])``,
    the same formulas evaluated on arrays. Every diffusivity must have the form (:attr:`Diffusivity.exponential_form`
    not None: Tibbetts 1980, or a constant Arrhenius D).
    """

    def __init__(self, diffusivities: list[Diffusivity]):
        if any(d.method not in ("tibbetts", "arrhenius") for d in diffusivities):
            raise ValueError("only the Tibbetts and Arrhenius diffusivities have the exponential form")
        self.tibbetts = np.array([d.method == "tibbetts" for d in diffusivities])
        self.multiplier = np.array([d.multiplier for d in diffusivities], dtype=float)
        self.D0 = np.array([d.D0 for d in diffusivities], dtype=float)
        self.Q = np.array([d.Q for d in diffusivities], dtype=float)

    def at(self, rows: np.ndarray, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(A [m²/s], s [per wt %]) of the diffusivities ``rows`` at temperatures ``T`` [K] (arrays alike)."""
        tibbetts = self.tibbetts[rows]
        A = np.where(tibbetts, self.multiplier[rows] * 0.47e-4 * np.exp(-37000.0 / (GAS_CONSTANT_CAL * T)),
                     self.multiplier[rows] * (self.D0[rows] * np.exp(-self.Q[rows] / (GAS_CONSTANT * T))))
        s = np.where(tibbetts, -1.6 + 6600.0 / (GAS_CONSTANT_CAL * T), 0.0)
        return A, s
