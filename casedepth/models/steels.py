"""The steel library (``resources/steels.json``) and custom compositions.

A :class:`Steel` is a name and a composition in wt %. Grades from the library carry their
standard designation; their compositions are nominal (the middle of the standard's range),
so a heat's certificate should be entered as a custom composition when it matters.
"""

from __future__ import annotations

import json
import math
import re
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path

from typing import TYPE_CHECKING

from ..errors import InputError

if TYPE_CHECKING:
    from .nitrides import NitridingConstants

# Elements the models use, with the largest content accepted [wt %].
ELEMENT_LIMITS = {
    "C": 0.8, "Mn": 3.0, "Si": 3.0, "Ni": 6.0, "Cr": 6.0, "Mo": 2.0, "V": 1.5, "W": 3.0,
    "Cu": 2.0, "Al": 2.0, "Ti": 0.5, "P": 0.1, "As": 0.1, "S": 0.5, "B": 0.01, "Nb": 0.5, "N": 0.1,
}


@dataclass(frozen=True)
class Steel:
    """A steel: its name, the standard it comes from and its composition in wt %."""

    name: str
    composition: dict[str, float]
    standard: str = "custom composition"
    note: str = ""
    also: tuple[str, ...] = field(default=(), compare=False)
    process: str = "carburizing"  # the treatment the grade is listed for: carburizing or nitriding
    core_hardness_hv: float | None = None  # typical after quench and temper (nitriding grades), [HV]
    nitrided_surface_hv: float | None = None  # typical after gas nitriding (nitriding grades), [HV]
    nitriding: "NitridingConstants | None" = field(default=None, compare=False)  # the precipitation model's constants
    grain_size: float = 7.0  # austenite grain size, ASTM E112 number (library grades: typical; 7 when not known)
    #: the standard's range of each element, wt % (library grades where the file gives it; from memory there)
    composition_range: dict[str, tuple[float, float]] = field(default_factory=dict, compare=False)

    @property
    def carbon(self) -> float:
        """Core (base) carbon content, [wt %]."""
        return float(self.composition.get("C", 0.0))

    def composition_text(self) -> str:
        """``"C=0.20 Mn=0.80 …"`` — the form the command line reads."""
        return " ".join(f"{el}={val:g}" for el, val in self.composition.items())


def _data_file() -> Path:
    from ..files import resource_path

    return resource_path("steels.json")


@lru_cache(maxsize=1)
def _all_grades() -> tuple[Steel, ...]:
    data = json.loads(_data_file().read_text(encoding="utf-8"))
    return tuple(
        Steel(entry["name"], validate_composition(entry["composition"], f"steel library entry {entry['name']}"),
              entry["standard"], entry.get("note", ""), tuple(entry.get("also", ())),
              entry.get("process", "carburizing"), entry.get("core_hardness_hv"), entry.get("nitrided_surface_hv"),
              _constants(entry), float(entry.get("grain_size_astm", 7.0)),
              {el: (float(lo), float(hi)) for el, (lo, hi) in entry.get("composition_range", {}).items()})
        for entry in data["steels"]
    )


def _constants(entry: dict) -> "NitridingConstants | None":
    from .nitrides import NitridingConstants

    row = entry.get("nitriding")
    if row is None:
        return None
    return NitridingConstants(float(row["excess_nitrogen"]), float(row["strength_hv_per_pct_n"]),
                              f"the library's constants for {entry['name']}")


def nitriding_constants(steel: Steel) -> "NitridingConstants":
    """The precipitation model's constants for ``steel``: its own, or those of the library grade with the
    nearest nitride formers (:func:`casedepth.models.nitrides.nearest_constants`)."""
    if steel.nitriding is not None:
        return steel.nitriding
    from .nitrides import nearest_constants

    return nearest_constants(steel.composition, library("nitriding"))


def library(process: str = "carburizing") -> tuple[Steel, ...]:
    """The grades listed for ``process`` (``carburizing`` or ``nitriding``; ``all`` for every one), in file order."""
    return tuple(s for s in _all_grades() if process == "all" or s.process == process)


def _key(text: str) -> str:
    return re.sub(r"[\s\-_]", "", text).lower()


def find(name: str, process: str = "all") -> Steel:
    """A library grade by its name or any designation (``8620``, ``SAE 8620``, ``1.6523``)."""
    wanted = _key(name)
    for steel in library(process):
        if wanted in {_key(steel.name), *(_key(a) for a in steel.also)}:
            return steel
    names = ", ".join(s.name for s in library(process))
    raise InputError("steel", f"no grade {name!r} in the library; choose one of {names}, or give a composition like \"C=0.20 Mn=0.80 Cr=0.50\"")


def validate_composition(composition: dict[str, float], field_name: str = "composition") -> dict[str, float]:
    """Check element symbols and contents; returns a clean dict (known symbols, floats)."""
    known = {el.lower(): el for el in ELEMENT_LIMITS}
    clean: dict[str, float] = {}
    for element, value in composition.items():
        symbol = known.get(str(element).strip().lower())
        if symbol is None:
            raise InputError(field_name, f"unknown element {element!r}; known: {', '.join(ELEMENT_LIMITS)}")
        try:
            amount = float(value)
        except (TypeError, ValueError, OverflowError):
            raise InputError(field_name, f"{symbol}={value!r} is not a number") from None
        if isinstance(value, bool) or not math.isfinite(amount):
            raise InputError(field_name, f"{symbol}={value!r} is not a finite number")
        limit = ELEMENT_LIMITS[symbol]
        if not (0.0 <= amount <= limit):
            raise InputError(field_name, f"{symbol}={amount:g} wt % is outside 0–{limit:g} wt %")
        clean[symbol] = amount
    if "C" not in clean:
        raise InputError(field_name, "the carbon content C= is required (0–0.8 wt %)")
    return clean


def parse_composition(text: str, field_name: str = "steel") -> dict[str, float]:
    """Read ``"C=0.20 Mn=0.80 Cr=0.50"`` (spaces or commas between, wt %)."""
    pairs = re.findall(r"([A-Za-z]{1,2})\s*=\s*([^\s,;]+)", text)
    leftover = re.sub(r"([A-Za-z]{1,2})\s*=\s*([^\s,;]+)|[\s,;]", "", text)
    if not pairs or leftover:
        raise InputError(field_name, f"cannot read composition {text!r}; write it like \"C=0.20 Mn=0.80 Cr=0.50\" (wt %)")
    return validate_composition({el: val for el, val in pairs}, field_name)


def steel_from_text(text: str, field_name: str = "steel") -> Steel:
    """A library grade by name, or a custom steel when the text holds ``Element=value`` pairs."""
    if "=" in text:
        return Steel("custom", parse_composition(text, field_name))
    return find(text)


def steel_for(name: str, composition: dict[str, float], field_name: str = "composition") -> Steel:
    """The steel a plan names, with the composition it holds: the library grade if the composition is the
    grade's, the grade marked as edited if not, or a custom steel for a name not in the library."""
    composition = validate_composition(composition, field_name)
    try:
        grade = find(name)
    except InputError:
        return Steel("custom", composition)
    if composition == grade.composition:
        return grade
    return Steel(f"{grade.name} (edited)", composition, grade.standard + ", composition edited", process=grade.process)

