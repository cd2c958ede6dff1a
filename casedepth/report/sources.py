"""The models the program uses and where each comes from, for the About box and the contributor guide:
the method tables' rows (diffusivity, carbon → hardness, compound layer, diffusion zone, nitrogen diffusivity)
and the fixed models."""

from __future__ import annotations

from ..models.diffusivity import METHODS
from ..models.hardness import HARDNESS_RELATIONS
from ..models.iron_nitrogen import NITROGEN_DIFFUSIVITIES
from ..nitriding.layer import LAYER_MODELS
from ..nitriding.zone import ZONE_MODELS

FIXED = (
    ("Surface mass transfer", "J = β (C_eq − C_s) — EN 10052 definition; β from the gas by default: 1.5e-5 cm/s at "
                              "925 °C in endothermic gas (mid-range of Ruck, Monceau & Grabke 1996 and Karabelchtchikova "
                              "2007), ∝ p_CO·p_H2 (Grabke's kinetics), 110 kJ/mol in temperature (from memory); "
                              "uncertain about ×/÷1.5"),
    ("Alloy factor", "Gunnarson (1967), as quoted in ASM Handbook Vol. 4 (1991), from memory"),
    ("Carbon saturation (Acm)", "Fe–C diagram; CALPHAD points after Gustafson (1985) and Hallstedt et al. (2010)"),
    ("Ac3", "Andrews, J. Iron Steel Inst. 203 (1965) 721"),
    ("HV ↔ HRC", "ASTM E140, Table 1"),
    ("Time stepping", "ROS2 Rosenbrock method, Verwer et al., SIAM J. Sci. Comput. 20 (1999) 1456"),
    ("Furnace readings", "probe (Nernst, air reference; C + ½O2 = CO), dew point (C + H2O = CO + H2; Buck 1981 "
                         "vapour pressure), CO2 (C + CO2 = 2CO): Gibbs energies fitted to the NASA Glenn polynomials "
                         "(McBride, Zehe & Gordon 2002); carbon activity in austenite from a handbook relation (from "
                         "memory); ideal equilibria, trim as the shop does"),
    ("Nitriding potential", "K_N = p(NH3)/p(H2)^1.5 — Lehrer, Z. Elektrochem. 36 (1930) 383; surface phase from the "
                            "Lehrer-diagram boundaries (read from the diagram, from memory, ±30 %)"),
    ("Nitrogen in ferrite", "saturation against γ′ fitted to the Fe–N diagram of Wriedt, Gokcen & Nafziger (1987)"),
    ("Nitrided hardness depth", "where the hardness falls to core + 50 HV (DIN 50190-3 / ISO 18203) or a set limit"),
    ("Safety cautions", "common practice under NFPA 86; local codes govern"),
)


def model_sources() -> list[tuple[str, str]]:
    """``(model, source and status)`` of every model the program uses, the tables' rows first."""
    rows = [(m.display, f"{m.reference}; valid {m.validity}") for m in METHODS.values()]
    rows += [(r.display, f"{r.reference}; assumes {r.assumptions}") for r in HARDNESS_RELATIONS.values()]
    rows += [(m.display, m.reference + ("" if m.superseded_by is None else "; superseded, kept for the plans made "
                                        "with it")) for m in (*LAYER_MODELS.values(), *ZONE_MODELS.values())]
    rows += [(f"Nitrogen diffusivity in ferrite, {m.display}", m.note) for m in NITROGEN_DIFFUSIVITIES.values()]
    return rows + list(FIXED)
