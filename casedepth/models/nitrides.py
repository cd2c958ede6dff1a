"""Alloy nitrides in nitrided ferrite: which elements form them, how much nitrogen they bind, the
dissolved nitrogen they need before they form (an effective solubility product), the excess nitrogen
the nitrided zone takes up beyond them, and the hardness they give.

* Formers and stoichiometry: CrN, AlN, VN, TiN and Mo2N (Mittemeijer & Somers 2015, ch. 4).
* A former precipitates where the dissolved nitrogen c and the free former x satisfy x·c = K, its
  solubility product; with K → 0 every former is a perfect sink and the internal-nitriding front of
  Wagner (1959) is sharp. Finite products make the zone graded, as in the diffusion–precipitation
  model of Sun & Bell (Mater. Sci. Eng. A 224 (1997) 33), where the products are also fitted to
  measured profiles rather than taken from thermodynamic tables (which give values orders of
  magnitude smaller: precipitation in hardened-and-tempered steels is held back by nucleation and by
  the alloy carbides the nitrides form from).
* Excess nitrogen: fine nitrides hold nitrogen beyond their stoichiometry at their faces and strain
  the ferrite around them (Schacherl, Graat & Mittemeijer, Metall. Mater. Trans. A 35 (2004) 3387);
  hardened-and-tempered steels take up more again in their carbides. Counted as a ratio to the
  nitrogen in nitrides, per grade.
* Hardness: the rise over the core taken proportional to the nitrogen bound in nitrides (the
  relation Sun & Bell 1997 use between hardness and nitride content), with a strength constant per
  grade.

Contents in wt %; a former's content is also expressed as the nitrogen its nitride holds (wt % N).
Source status: the stoichiometry is exact; the solubility products, their temperature dependence,
the excess ratios and the strength constants are fitted for this project so that the typical depths
and hardnesses of the library's nitriding grades come out (common practice, from memory) — see
:data:`FORMERS` and ``resources/steels.json``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Mapping

from ..constants import GAS_CONSTANT as R, MOLAR_MASS, ZERO_CELSIUS

#: temperature the solubility products are given at, K (520 °C, the middle of gas nitriding)
REFERENCE_TEMPERATURE = 520.0 + ZERO_CELSIUS
#: apparent enthalpy of the solubility products, J/mol: assumed, so that 4140's nitrided surface
#: hardness falls by about 10–15 % from 520 to 570 °C (common practice, from memory)
SOLUBILITY_ENTHALPY = 60.0e3


@dataclass(frozen=True)
class Former:
    """A nitride-forming element: nitrogen atoms per metal atom in its nitride, and its effective
    solubility product at :data:`REFERENCE_TEMPERATURE` [wt % former × wt % N]."""

    nitride: str
    atoms: float
    product: float


#: the formers; products fitted for this project (see the module notes): Cr and Al with products that
#: leave part of them in solution in a lean steel (graded profiles in 4140, as measured), V, Mo and Ti
#: readier (Ti near a perfect sink)
FORMERS: dict[str, Former] = {
    "Cr": Former("CrN", 1.0, 0.030),
    "Al": Former("AlN", 1.0, 0.023),
    "V": Former("VN", 1.0, 0.0073),
    "Mo": Former("Mo2N", 0.5, 0.0137),
    "Ti": Former("TiN", 1.0, 3.4e-5),
}


def capacity_of(element: str, content: float) -> float:
    """Nitrogen [wt %] the nitride of ``content`` wt % of ``element`` holds (stoichiometric)."""
    former = FORMERS[element]
    return content / MOLAR_MASS[element] * former.atoms * MOLAR_MASS["N"]


def capacities(composition: Mapping[str, float]) -> dict[str, float]:
    """Nitrogen [wt %] each former of a steel can bind, for the formers it holds."""
    return {el: capacity_of(el, float(composition[el])) for el in FORMERS if float(composition.get(el, 0.0)) > 0.0}


def solubility_product(element: str, T: float) -> float:
    r"""Effective solubility product of ``element``'s nitride in ferrite, in the units of the
    precipitation model: wt % N the free former could bind × wt % N dissolved.

    .. math:: K(T) = K_{ref}\,\frac{14.007\,a}{A_M}\,
              \exp\!\left[-\frac{\Delta H}{R}\left(\frac1T - \frac1{T_{ref}}\right)\right]

    Parameters
    ----------
    element : str
        ``Cr``, ``Al``, ``V``, ``Mo`` or ``Ti``
    T : float
        Temperature, [K]; used for 480–590 °C

    Returns
    -------
    K : float
        [(wt % N)²]

    Notes
    -----
    :data:`FORMERS` gives K_ref in [wt % M × wt % N] at 520 °C; a is nitrogen atoms per metal atom
    and A_M the former's molar mass. Fitted for this project (see the module notes), not thermodynamic
    values; ΔH = 60 kJ/mol is assumed.

    Examples
    --------
    >>> round(solubility_product("Cr", 793.15) * 1e3, 3)
    8.082
    """
    former = FORMERS[element]
    scale = former.atoms * MOLAR_MASS["N"] / MOLAR_MASS[element]
    return former.product * scale * math.exp(-SOLUBILITY_ENTHALPY / R * (1.0 / T - 1.0 / REFERENCE_TEMPERATURE))


@dataclass(frozen=True)
class NitridingConstants:
    """A grade's constants for the precipitation model: excess nitrogen per nitrogen in nitrides [-] and
    the hardness each wt % of nitrogen in nitrides adds [HV/wt %], with where they came from."""

    excess: float
    strength: float
    source: str


#: for a steel without constants of its own: the library grade whose formers are nearest (see steels.py)
def nearest_constants(composition: Mapping[str, float], grades) -> NitridingConstants | None:
    """The constants of the grade in ``grades`` (Steel objects with ``nitriding`` constants) whose
    nitride-former capacities are nearest to ``composition``'s (Euclidean in wt % N), or None."""
    own = capacities(composition)
    best, best_distance = None, math.inf
    for grade in grades:
        if grade.nitriding is None:
            continue
        theirs = capacities(grade.composition)
        distance = math.sqrt(sum((own.get(el, 0.0) - theirs.get(el, 0.0)) ** 2 for el in FORMERS))
        if distance < best_distance:
            best, best_distance = grade, distance
    if best is None:
        return None
    c = best.nitriding
    return NitridingConstants(c.excess, c.strength, f"those of {best.name}, the library grade with the nearest "
                                                    f"nitride formers")
