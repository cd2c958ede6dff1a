"""The parameter table: one row per value a planner can set, read by every surface.

A row says what the value is called (its key, the label people see), what kind of value it is
(how it is typed, read from text with any unit the command line takes, stored in a plan file and
in which unit), its default, the range the models accept, which treatments use it and when it
applies, the command-line options that set it, and where the window shows it. The plan state
(:mod:`casedepth.plan`), the plan file, the command line, the window's form and the messages of
:class:`~casedepth.errors.InputError` (which carry the key) all read this table; none of them
lists the parameters again.

Values are SI inside (K, m, s, m/s, J/mol); carbon and alloy contents in wt %, hardness in HV.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping

from .constants import ZERO_CELSIUS
from .errors import InputError
from .formats import KN_UNIT
from .models import steels
from .models.diffusivity import ARRHENIUS_D0, ARRHENIUS_Q, METHODS
from .models.hardness import HARDNESS_RELATIONS
from .models.surface import DEFAULT_BETA
from .numerics.geometry import MAX_SIZE, MIN_SIZE, SHAPES
from .units import (TOTAL_CASE_EXCESS, parse_time, check_text, finite_number, both_lengths, length_range, parse_length, parse_number, parse_temperature,
                    parse_threshold, parse_velocity, temperature_range, parse_area, parse_mass_flux)


# -- kinds of value ------------------------------------------------------------------------------------------
class Kind:
    """How a parameter's value is typed, read from text, written to a plan file and read back.

    ``check`` returns the value in its proper type or raises :class:`InputError` naming ``key``;
    ``parse`` reads what a person types; ``to_file`` / ``from_file`` convert to and from the plan
    file's unit. Subclasses override what differs.
    """

    file_unit = ""

    def check(self, key: str, value: Any) -> Any:
        return value

    def parse(self, key: str, text: str) -> Any:
        return self.check(key, text)

    def to_file(self, value: Any) -> Any:
        return value

    def from_file(self, key: str, value: Any) -> Any:
        return self.check(key, value)

    def describe(self) -> str:
        """What the file holds, for messages about files."""
        return "a value"


class Text(Kind):
    """Words: a line (up to 200 characters) or, with ``lines`` > 1, notes (up to 20,000)."""

    def __init__(self, lines: int = 1):
        self.lines = lines
        self.longest = 200 if lines == 1 else 20000

    def check(self, key, value):
        if not isinstance(value, str):
            raise InputError(key, f"{value!r} is not text")
        if len(value) > self.longest:
            raise InputError(key, f"{len(value)} characters is more than the {self.longest} it may hold")
        check_text(key, value, lines=self.lines > 1)
        return value

    def describe(self):
        return f"text of up to {self.longest} characters"


class Flag(Kind):
    WORDS = {"on": True, "yes": True, "true": True, "1": True, "off": False, "no": False, "false": False, "0": False}

    def check(self, key, value):
        if not isinstance(value, bool):
            raise InputError(key, f"{value!r} is not true or false")
        return value

    def parse(self, key, text):
        word = str(text).strip().lower()
        if word not in self.WORDS:
            raise InputError(key, f"{text!r}: write on or off")
        return self.WORDS[word]

    def describe(self):
        return "true or false"


class Choice(Kind):
    """One of a table's keys. ``options`` maps each key to its label (a callable for tables that load late)."""

    def __init__(self, options: Mapping[str, str] | Callable[[], Mapping[str, str]],
                 superseded: Callable[[str], str | None] | None = None, notes: Callable[[str], str] | None = None):
        self._options = options
        self.superseded = superseded or (lambda key: None)  # the key offered instead of a superseded one
        self.notes = notes  # a sentence on what each choice does, for the window

    @property
    def options(self) -> Mapping[str, str]:
        return self._options() if callable(self._options) else self._options

    def check(self, key, value):
        if not isinstance(value, str) or value not in self.options:
            raise InputError(key, f"{value!r} is not one of {', '.join(self.options)}")
        return value

    def describe(self):
        return "one of " + ", ".join(self.options)


@dataclass(frozen=True)
class Unit:
    """A physical quantity's units: what people may type (any unit the command line takes), the plan
    file's unit (``file = SI × scale + offset``) and how it is shown."""

    name: str
    file_unit: str
    parse: Callable[[Any, str], float]  # (text or number, key) -> SI
    scale: float = 1.0
    offset: float = 0.0


UNITS = {
    "temperature": Unit("temperature", "°C", lambda text, key: parse_temperature(text, key), 1.0, -ZERO_CELSIUS),
    "length": Unit("length", "mm", lambda text, key: parse_length(text, key), 1e3),
    "thin length": Unit("thin length", "µm", lambda text, key: parse_length(text, key, default_unit="um"), 1e6),
    "velocity": Unit("velocity", "cm/s", lambda text, key: parse_velocity(text, key), 1e2),
    "energy": Unit("energy", "kJ/mol", lambda text, key: parse_number(str(text).lower().removesuffix("kj/mol"), key) * 1e3,
                   1e-3),
    "time": Unit("time", "h", lambda text, key: parse_time(text, key), 1.0 / 3600.0),
    "mass flux": Unit("mass flux", "g/(m²·h)", lambda text, key: parse_mass_flux(text, key), 3600e3),
    "area": Unit("area", "m²", lambda text, key: parse_area(text, key)),
    "number": Unit("number", "", lambda text, key: parse_number(str(text).strip().rstrip("%").strip()
                                                                  if isinstance(text, str) else text, key)),
}


#: the largest number (in a quantity's file unit: mm, °C, %, …) a plan may hold at all; ranges are checked later,
#: this keeps absurd magnitudes (1e308 mm) from reaching any arithmetic
MAGNITUDE = 1e6


class Quantity(Kind):
    """A number with a unit (SI inside); ``optional`` allows None, meaning ``unset`` (a model's default)."""

    def __init__(self, unit: str, optional: bool = False, unset: str = "not set"):
        self.unit = UNITS[unit]
        self.optional = optional
        self.unset = unset

    @property
    def file_unit(self):
        return self.unit.file_unit

    def check(self, key, value):
        if value is None and self.optional:
            return None
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise InputError(key, f"{value!r} is not a number")
        if not finite_number(value):
            raise InputError(key, f"{value!r} is not a finite number")
        value = float(value)
        shown = value * self.unit.scale + self.unit.offset
        if abs(shown) > MAGNITUDE:
            raise InputError(key, f"{shown:g}{' ' + self.unit.file_unit if self.unit.file_unit else ''} is beyond any "
                                  f"value the models could use")
        return value

    def parse(self, key, text):
        if self.optional and isinstance(text, str) and text.strip().lower() in ("", "none", "default", "typical"):
            return None
        return self.check(key, self.unit.parse(text, key))

    def to_file(self, value):
        if value is None:
            return None
        return float(f"{value * self.unit.scale + self.unit.offset:.12g}")  # no 925.0000000000001 in files

    def from_file(self, key, value):
        if value is None and self.optional:
            return None
        if not finite_number(value):
            raise InputError(key, f"{value!r} is not a number")
        return (float(value) - self.unit.offset) / self.unit.scale

    def describe(self):
        unit = f" in {self.unit.file_unit}" if self.unit.file_unit else ""
        return "a number" + unit + (" or null" if self.optional else "")


class Composition(Kind):
    """Element symbol → wt %, as on a mill certificate."""

    def check(self, key, value):
        if not isinstance(value, dict):
            raise InputError(key, f"{value!r} is not a table of elements and wt %")
        return steels.validate_composition(value, key)

    def parse(self, key, text):
        return steels.parse_composition(text, key)

    def to_file(self, value):
        return dict(value)

    def describe(self):
        return "a table of element symbols and wt %"


class Table(Kind):
    """A structured value (the stages of a cycle, the shop's times) checked by ``validate``."""

    def __init__(self, python_type: type, validate: Callable[[str, Any], Any], what: str):
        self.python_type, self.validate, self.what = python_type, validate, what

    def check(self, key, value):
        if not isinstance(value, self.python_type):
            raise InputError(key, f"{value!r} is not {self.what}")
        self.validate(key, value)
        return value

    def describe(self):
        return self.what


# -- the rows --------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Option:
    """A command-line option that sets one or more parameters: ``read(text, values)`` gives the updates."""

    flag: str
    help: str
    read: Callable[[str, dict], dict] | None = None  # None: the row's kind parses the text into the row's key
    metavar: str | None = None
    choices: Callable[[], list[str]] | None = None

    @property
    def dest(self) -> str:
        return self.flag.lstrip("-").replace("-", "_")


@dataclass(frozen=True)
class Parameter:
    """One row of the parameter table.

    ``range`` is the allowed range in SI (``(low, high)``, or a function of the plan's values for
    ranges that depend on another choice); ``applies(values)`` says whether the value matters for a
    plan with these values (the window hides it, evaluation does not check it, otherwise);
    ``affects_result`` is False for values that only label a plan (a change does not re-solve).
    """

    key: str
    label: str
    kind: Kind
    default: Any
    file_key: str
    treatments: tuple[str, ...] | None = None  # the treatments that use it (None: every one)
    group: str | None = None  # where the window shows it (None: not in the form)
    unit_label: str = ""  # shown after the value (for quantities without a unit system of their own)
    range: tuple[float, float] | Callable[[Mapping[str, Any]], tuple[float, float]] | None = None
    applies: Callable[[Mapping[str, Any]], bool] = field(default=lambda values: True)
    when: str = ""  # when it applies, in words (for messages about a value given where it plays no part)
    options: tuple[Option, ...] = ()
    help: str = ""
    affects_result: bool = True
    decimals: int | Callable[[Mapping[str, Any]], int] = 2  # shown in the window
    since: int = 1  # the plan-file schema from which every file holds it (see casedepth.plan.fileformat)
    #: what the value is called for these values, where that depends on another choice (a thickness or a diameter)
    named: Callable[[Mapping[str, Any]], str] | None = None
    #: values that change with this one when a person picks it (``(values, new value) -> {key: value}``):
    #: a grade brings its composition, a threshold kind its usual value
    companions: Callable[[Mapping[str, Any], Any], dict] | None = None

    def label_in(self, values: Mapping[str, Any]) -> str:
        """The label for a plan with these values."""
        return self.named(values) if self.named is not None else self.label

    def for_treatment(self, treatment: str) -> bool:
        return self.treatments is None or treatment in self.treatments

    def used_by(self, values: Mapping[str, Any]) -> bool:
        """True if the value matters for a plan with these values."""
        return self.for_treatment(values.get("treatment")) and self.applies(values)

    def allowed(self, values: Mapping[str, Any]) -> tuple[float, float] | None:
        return self.range(values) if callable(self.range) else self.range

    def check_range(self, values: Mapping[str, Any]) -> None:
        """Refuse a value outside the allowed range, naming the row's label and the range."""
        span = self.allowed(values)
        value = values.get(self.key)
        if span is None or value is None:
            return
        low, high = span
        if not (low <= value <= high):
            raise InputError(self.key, f"{self.describe(value)} is outside {self.describe_range(span)}")

    def describe(self, value: float) -> str:
        """A value for messages, in the units people use (both systems for temperatures and lengths)."""
        if isinstance(self.kind, Quantity):
            unit = self.kind.unit
            if unit.name == "temperature":
                from .units import both_temperatures
                return both_temperatures(value)
            if unit.name == "length":
                return both_lengths(value)
            if unit.file_unit:
                return f"{value * unit.scale + unit.offset:g} {unit.file_unit}"
        return f"{value:g}{' ' + self.unit_label if self.unit_label else ''}"

    def describe_range(self, span: tuple[float, float]) -> str:
        low, high = span
        if isinstance(self.kind, Quantity):
            unit = self.kind.unit
            if unit.name == "temperature":
                return temperature_range(low, high)
            if unit.name == "length":
                return length_range(low, high)
            if unit.file_unit:
                return f"{low * unit.scale + unit.offset:g}–{high * unit.scale + unit.offset:g} {unit.file_unit}"
        return f"{low:g}–{high:g}{' ' + self.unit_label if self.unit_label else ''}"


# -- reading the command line's composite options ---------------------------------------------------------------
def _read_steel(text: str, values: dict) -> dict:
    steel = steels.steel_from_text(text)  # any grade of the library, as the window takes a grade typed in
    return {"steel": steel.name, "composition": dict(steel.composition)}


def _read_window(text: str, keys: tuple[str, str], parse: Callable[[str, str], float], field_name: str) -> dict:
    """``1.0mm`` (both ends) or ``0.9-1.3mm`` / ``0.9mm-1.3mm`` (a window; the unit may follow the second end)."""
    compact = str(text).strip().replace("–", "-")
    match = re.fullmatch(r"\s*([0-9.eE+]+)\s*([^\d\s-]*)\s*-\s*([0-9.eE+]+)\s*([^\d\s]*)\s*", compact)
    if match:
        unit = match.group(4) or match.group(2)
        low = parse(f"{match.group(1)}{match.group(2) or unit}", field_name)
        high = parse(f"{match.group(3)}{unit}", field_name)
        if high < low:
            raise InputError(field_name, f"{text!r}: the window's end is below its start")
        return {keys[0]: low, keys[1]: high}
    value = parse(compact, field_name)
    return {keys[0]: value, keys[1]: value}


def _parse_hrc(text: str, key: str) -> float:
    """``60``, ``60HRC`` or ``700HV`` (turned into HRC through ASTM E140)."""
    from .models.hardness import ASTM_E140_hv_to_hrc

    compact = str(text).strip().upper().replace(" ", "")
    if compact.endswith("HV"):
        try:
            return float(ASTM_E140_hv_to_hrc(parse_number(compact[:-2], key)))
        except InputError as error:
            raise error.renamed(key) from None
    return parse_number(compact.removesuffix("HRC"), key)


def _read_hardness_window(keys: tuple[str, str]) -> Callable[[str, dict], dict]:
    """``58-62HRC`` (a window), ``58HRC`` (a minimum only); HV is turned into HRC."""
    def read(text: str, values: dict) -> dict:
        compact = str(text).strip()
        if "-" in compact.replace("–", "-"):
            return _read_window(compact, keys, _parse_hrc, keys[0])
        return {keys[0]: _parse_hrc(compact, keys[0]), keys[1]: None}
    return read


def _read_temper(text: str, values: dict) -> dict:
    """``180C/2h`` (temperature and time), ``180C`` (two hours) or ``none`` (as quenched)."""
    compact = str(text).strip()
    if compact.lower() in ("none", "no", "as-quenched", "as quenched"):
        return {"temper_temperature": None}
    temperature, _, time = compact.partition("/")
    out = {"temper_temperature": parse_temperature(temperature, "temper_temperature")}
    if time:
        out["temper_time"] = parse_time(time, "temper_time")
    return out


def _quench_media() -> dict[str, str]:
    from .models.quench import QUENCH_MEDIA
    return {key: m.label for key, m in QUENCH_MEDIA.items()}


def _with_quench(values, key) -> dict:
    # a medium comes with its usual bath temperature (water 25 °C, oil 60 °C, …)
    from .models.quench import QUENCH_MEDIA
    return {"quench_temperature": QUENCH_MEDIA[key].bath_temperature} if key in QUENCH_MEDIA else {}


def _relation_superseded(key: str) -> str | None:
    return HARDNESS_RELATIONS[key].superseded_by if key in HARDNESS_RELATIONS else None


def _read_target(text: str, values: dict) -> dict:
    return _read_window(text, ("case_min", "case_max"), parse_length, "case_min")


def _read_compound(text: str, values: dict) -> dict:
    return _read_window(text, ("compound_min", "compound_max"),
                        lambda t, key: parse_length(t, key, default_unit="um"), "compound_min")


def _read_surface_target(text: str, values: dict) -> dict:
    from .carburizing.planners import surface_window

    window = _read_window(text, ("surface_min", "surface_max"), lambda t, key: parse_number(t.rstrip("%Cc"), key),
                          "surface_min")
    if window["surface_min"] == window["surface_max"]:
        low, high = surface_window(window["surface_min"])
        window = {"surface_min": low, "surface_max": high}
    return {**window, "process": "boost-diffuse"}


def _read_threshold(text: str, values: dict) -> dict:
    threshold = parse_threshold(text, "threshold_value")
    return {"threshold_kind": threshold.kind, "threshold_value": threshold.value}


def _read_beta(text: str, values: dict) -> dict:
    if str(text).strip().lower() == "gas":
        return {"beta_model": "gas-2026", "beta_held": False}
    beta = parse_velocity(text, "beta")
    return {"beta_held": True} if math.isinf(beta) else {"beta": beta, "beta_held": False, "beta_model": "constant"}


def _read_size(name: str) -> Callable[[str, dict], dict]:
    def read(text: str, values: dict) -> dict:
        plate = values.get("shape", "plate") == "plate"
        if plate != (name == "thickness"):
            shape = values.get("shape", "plate")
            raise InputError("size", f"a {shape} has a {'thickness' if plate else 'diameter'}, not a {name}")
        return {"size": parse_length(text, "size")}
    return read


def _read_dissociation(text: str, values: dict) -> dict:
    from .nitriding.setup import nitriding_potential_from_dissociation

    return {"kn": nitriding_potential_from_dissociation(parse_number(str(text).rstrip("%"), "dissociation") / 100.0)}


def _read_exhaust(text: str, values: dict) -> dict:
    """K_N from measured exhaust fractions written as ``NH3=40,H2=45`` (volume %, 1 atm total)."""
    from .nitriding.setup import nitriding_potential

    fractions = {}
    for part in str(text).replace(";", ",").split(","):
        name, sep, value = part.partition("=")
        name = name.strip().upper()
        if not sep or name not in ("NH3", "H2"):
            raise InputError("exhaust", f"{text!r} is not of the form NH3=40,H2=45 (volume %)")
        fractions[name] = parse_number(value.strip().rstrip("%"), "exhaust") / 100.0
    if set(fractions) != {"NH3", "H2"} or not (0 < fractions["NH3"] + fractions["H2"] <= 1.0 + 1e-9):
        raise InputError("exhaust", f"{text!r}: give both NH3 and H2, each above 0 and together at most 100 %")
    return {"kn": nitriding_potential(fractions["NH3"], fractions["H2"])}


def _read_aim(text: str, values: dict) -> dict:
    number = parse_number(str(text).strip().rstrip("%"), "aim")
    return {"aim": number / 100.0 if str(text).strip().endswith("%") or number > 1.0 else number}


# -- values that change with another ------------------------------------------------------------------------------
def _with_treatment(values, treatment) -> dict:
    """Switching treatment: the values the new treatment's table row sets for a new plan (a steel listed for
    the new treatment is kept)."""
    from .treatments import TREATMENTS

    fresh = defaults(treatment)
    changes = {key: fresh[key] for key in TREATMENTS[treatment].defaults}
    if values.get("steel") in {grade.name for grade in steels.library(TREATMENTS[treatment].steel_list)}:
        changes.pop("steel", None)
    else:
        changes["composition"] = fresh["composition"]
    return changes


def _with_steel(values, name) -> dict:
    try:
        return {"composition": dict(steels.find(name).composition)}
    except InputError:  # "custom", or a name not in the library: the composition stays as it is
        return {}


def _with_shape(values, shape) -> dict:
    if shape == "plate":
        return {"size": None}  # a flat surface on a thick section, unless a thickness is given
    return {"size": SHAPE_SIZE} if values.get("size") is None else {}


def _with_threshold_kind(values, kind) -> dict:
    return {"threshold_value": THRESHOLD_KINDS[kind].usual}


#: the size a shaft, bore or ball starts from when it is picked, m (a demo value, to be edited)
SHAPE_SIZE = 30e-3


# -- validators of structured values ---------------------------------------------------------------------------
def _check_stages(key: str, rows: list) -> None:
    from .carburizing.cycle import MAX_STAGES, stage_from_dict

    if len(rows) > MAX_STAGES:
        raise InputError(key, f"{len(rows)} stages are more than the {MAX_STAGES} a cycle may have")
    for number, row in enumerate(rows, 1):
        if not isinstance(row, dict):
            raise InputError(key, f"stage {number}: {row!r} is not a table")
        stage_from_dict(row, number)


def _check_shop(key: str, data: dict) -> None:
    from .shop.quote import ShopDefaults

    ShopDefaults.from_dict(data)


# -- the table ---------------------------------------------------------------------------------------------------
def _hydrocarbons() -> dict[str, str]:
    from .lpc.setup import HYDROCARBONS
    return {key: f"{h.label} ({h.formula})" for key, h in HYDROCARBONS.items()}


def _surface_window_applies(values) -> bool:
    # a final surface-carbon window: boost and diffuse plans, and every low-pressure plan (its pulses end in it)
    return values.get("process") == "boost-diffuse" or values.get("treatment") == "lpc"


def _read_carbon_flux(text: str, values: dict) -> dict:
    flux = parse_mass_flux(text, "carbon_flux")
    return {"carbon_flux": None if math.isinf(flux) else flux}


def _read_max_hold(text: str, values: dict) -> dict:
    return {"max_hold": parse_time(text, "max_hold", default_unit="s")}


def _read_schedule(text: str, values: dict) -> dict:
    from .lpc.schedule import parse_schedule

    parse_schedule(text, "schedule")  # refused here, naming the option, if it cannot be read
    return {"schedule": text.strip()}


def _treatments() -> dict[str, str]:
    from .treatments import TREATMENTS
    return {key: t.label for key, t in TREATMENTS.items()}


def _cycles() -> dict[str, str]:
    from .carburizing.outcome import CYCLES
    return {key: c.label for key, c in CYCLES.items()}


def _cycle_note(key: str) -> str:
    from .carburizing.outcome import CYCLES
    return CYCLES[key].note if key in CYCLES else ""


def _spread_distributions() -> dict[str, str]:
    from .shop.capability import DISTRIBUTIONS

    return DISTRIBUTIONS


def _spread_compositions() -> dict[str, str]:
    from .shop.capability import COMPOSITIONS

    return COMPOSITIONS


def _layer_models() -> dict[str, str]:
    from .nitriding.layer import LAYER_MODELS
    return {key: m.display for key, m in LAYER_MODELS.items()}


def _with_furnace(values, name) -> dict:
    """A furnace picked brings its saved fit from the furnace record (or, without one, takes back another's)."""
    from .shop.furnace_fit import calibration_changes
    return calibration_changes(values, name)


def _carriers() -> dict[str, str]:
    from .models.atmosphere import CARRIERS
    return {key: c.label for key, c in CARRIERS.items()}


def _with_carrier(values, key) -> dict:
    """A carrier brings its nominal CO and H2 (an own mix keeps what is typed)."""
    from .models.atmosphere import CARRIERS
    if key == "own":
        return {}
    return {"carrier_co": CARRIERS[key].co * 100.0, "carrier_h2": CARRIERS[key].h2 * 100.0}


def _read_carrier(text: str, values: dict) -> dict:
    from .models.atmosphere import carrier_from_text
    key, co, h2 = carrier_from_text(text, "carrier")
    return {"carrier": key, "carrier_co": co * 100.0, "carrier_h2": h2 * 100.0}


def _read_potential_reading(text: str, values: dict) -> dict:
    """``--potential-as 1150mV``: the potential the reading means at the plan's temperature in its carrier (the
    options before it in the table — temperature, carrier — already read)."""
    from .models.atmosphere import FurnaceGas, potential_from_reading, reading_from_text
    kind, value = reading_from_text(text)
    potential = potential_from_reading(kind, value, FurnaceGas.of(values).at(values["temperature"]))
    out = {"carbon_potential": potential}
    if kind != "carbon_potential":
        out["control_reading"] = kind
    return out


def _gas_data() -> dict[str, str]:
    from .models.atmosphere import GAS_DATA
    return {key: d.display for key, d in GAS_DATA.items()}


def _gas_data_superseded(key: str) -> str | None:
    from .models.atmosphere import GAS_DATA
    return GAS_DATA[key].superseded_by if key in GAS_DATA else None


#: the readings a furnace is controlled on (keys of casedepth.models.atmosphere.READINGS)
CONTROL_READINGS = {"mv": "Oxygen probe (mV)", "dew_point": "Dew point", "co2": "CO2 (infrared analyser)"}

#: how β is had: from the gas (temperature, CO and H2), or one value typed (the ``beta`` row)
BETA_MODELS = {"gas-2026": "From the gas (CO, H2, temperature)", "constant": "One value (typed below)"}


def _layer_superseded(key: str) -> str | None:
    from .nitriding.layer import LAYER_MODELS
    return LAYER_MODELS[key].superseded_by if key in LAYER_MODELS else None


def _zone_models() -> dict[str, str]:
    from .nitriding.zone import ZONE_MODELS
    return {key: m.display for key, m in ZONE_MODELS.items()}


def _zone_superseded(key: str) -> str | None:
    from .nitriding.zone import ZONE_MODELS
    return ZONE_MODELS[key].superseded_by if key in ZONE_MODELS else None


def _with_zone_model(values, key) -> dict:
    # the precipitation model's grade constants were set with the default nitrogen diffusivity
    from .models.iron_nitrogen import DEFAULT_NITROGEN_DIFFUSIVITY
    return {"n_diffusivity": DEFAULT_NITROGEN_DIFFUSIVITY} if key == "precipitation-2026" else {}


def _n_diffusivities() -> dict[str, str]:
    from .models.iron_nitrogen import NITROGEN_DIFFUSIVITIES
    return {key: m.display for key, m in NITROGEN_DIFFUSIVITIES.items()}


def _n_diffusivity_note(key: str) -> str:
    from .models.iron_nitrogen import NITROGEN_DIFFUSIVITIES
    return NITROGEN_DIFFUSIVITIES[key].note if key in NITROGEN_DIFFUSIVITIES else ""


def _temperature_range(values) -> tuple[float, float]:
    from .treatments import TREATMENTS
    return TREATMENTS[values.get("treatment", "carburizing")].temperature_range(values)


def _threshold_range(values) -> tuple[float, float]:
    return THRESHOLD_KINDS[values.get("threshold_kind", "carbon")].range


@dataclass(frozen=True)
class ThresholdKind:
    """One way a drawing states what "effective" means: the label, the usual value and the range."""

    label: str
    usual: float
    range: tuple[float, float]
    decimals: int


#: threshold kinds: ISO 18203 550 HV; SAE J423 50 HRC, and total case at 0.04 %C above the core
THRESHOLD_KINDS: dict[str, ThresholdKind] = {
    "carbon": ThresholdKind("%C", 0.40, (0.05, 1.5), 2),
    "HV": ThresholdKind("HV", 550.0, (100.0, 1000.0), 0),
    "HRC": ThresholdKind("HRC", 50.0, (10.0, 70.0), 1),
    "above core": ThresholdKind("%C above core (total case)", TOTAL_CASE_EXCESS, (0.005, 0.5), 2),
}

CARBURIZING = ("carburizing",)
NITRIDING = ("nitriding",)
LPC = ("lpc",)
#: what both kinds of carburizing read: the threshold, the quench and temper, the hardness windows, the carbon models
CARBURIZED = ("carburizing", "lpc")
POTENTIAL = (0.05, 2.0)  # wt % C, the carbon potentials the models cover
MULTIPLIER = (0.1, 10.0)

PARAMETERS: dict[str, Parameter] = {p.key: p for p in (
    # the plan's own name and words (they label the plan; a change does not re-solve)
    Parameter("title", "Name", Text(), "Untitled plan", "title", group="Plan", affects_result=False,
              options=(Option("--title", "a name for the plan (with --save)"),)),
    Parameter("part", "Part", Text(), "", "part", group="Plan", affects_result=False,
              help="part number or description", options=(Option("--part", "part number or description (with --save)"),)),
    Parameter("revision", "Revision", Text(), "A", "revision", group="Plan", affects_result=False,
              help="revision printed on the process sheet", since=4),
    Parameter("treatment", "Treatment", Choice(_treatments), "carburizing", "treatment", group="Plan",
              companions=_with_treatment, since=3),
    # the job on the floor (printed on the process sheet; no part in the numbers)
    Parameter("furnace", "Furnace", Text(), "", "furnace", group="Plan", affects_result=False, companions=_with_furnace,
              help="the furnace the load runs in (printed on the process sheet)",
              options=(Option("--furnace", "furnace the load runs in (printed on the sheet)"),), since=6),
    Parameter("load_number", "Load number", Text(), "", "load_number", group="Plan", affects_result=False,
              help="the load or lot number (printed on the process sheet)",
              options=(Option("--load-number", "load or lot number (printed on the sheet)"),), since=6),
    Parameter("quantity", "Quantity", Quantity("number", optional=True, unset="shop's parts per load"), None,
              "quantity", group="Plan", affects_result=False, range=(1.0, 1e6), decimals=0,
              help="parts in the load (not set: the shop's parts per load)",
              options=(Option("--quantity", "parts in the load (default: the shop's parts per load)"),), since=6),
    Parameter("fixture", "Fixture", Text(), "", "fixture", group="Plan", affects_result=False,
              help="how the parts are loaded: fixture, basket, spacing (printed on the process sheet)",
              options=(Option("--fixture", "fixture or basket and loading (printed on the sheet)"),), since=6),
    # the steel
    Parameter("steel", "Steel", Text(), "8620", "steel", group="Steel", companions=_with_steel,
              help="type to filter the steel library (name or standard number)",
              options=(Option("--steel", 'grade from the library (8620, 16MnCr5, 4140 …) or "C=0.20 Mn=0.80 Cr=0.50" (wt %%)',
                              _read_steel),)),
    Parameter("composition", "Composition", Composition(), None, "composition_pct", group="Steel",
              help="composition in wt %, e.g. C=0.20 Mn=0.80 Cr=0.50 — edit to match the heat's certificate"),
    # the part
    Parameter("shape", "Surface", Choice({"plate": "Flat surface or plate", "cylinder": "Shaft or pin (solid round)",
                                          "bore": "Bore (hole in a thick body)", "sphere": "Ball (sphere)"}),
              "plate", "shape", group="Part", companions=_with_shape,
              options=(Option("--geometry", "plate (default), cylinder, bore or sphere", choices=lambda: list(SHAPES)),)),
    Parameter("size", "Size", Quantity("length", optional=True, unset="thick section"), None, "size_mm", group="Part",
              named=lambda v: "Thickness" if v.get("shape") == "plate" else "Diameter",
              range=(MIN_SIZE, MAX_SIZE), help="plate thickness (both faces carburized) or diameter; none for a thick section",
              options=(Option("--diameter", "cylinder, sphere or bore diameter: 40mm", _read_size("diameter")),
                       Option("--thickness", "plate thickness, treated from both faces: 10mm (default: thick section)",
                              _read_size("thickness")))),
    # the furnace step
    Parameter("temperature", "Temperature", Quantity("temperature"), 925.0 + ZERO_CELSIUS, "temperature_c",
              group="Furnace step", range=_temperature_range, decimals=0,
              applies=lambda v: v.get("process") != "stages" or v.get("treatment") != "carburizing",
              when="cycles other than stages of one's own, which set their own temperatures",
              options=(Option("--temperature", "furnace temperature: 925C, 1700F or 1198K"),)),
    Parameter("carbon_potential", "Carbon potential", Quantity("number"), 1.00, "carbon_potential_pct", CARBURIZING,
              group="Furnace step", unit_label="%C", range=POTENTIAL,
              applies=lambda v: v.get("process") == "single", when="one soak (boost and diffuse have their own potentials)",
              help="carbon potential of the atmosphere (carbon of plain carbon steel in equilibrium with it)",
              options=(Option("--potential", "carbon potential of the atmosphere, wt %% C (e.g. 1.00)"),)),
    Parameter("carrier", "Carrier gas", Choice(_carriers), "natural-gas-endo", "carrier_gas", CARBURIZING,
              group="Furnace step", companions=_with_carrier,
              help="the gas the furnace runs on: it sets how a probe, dew point or CO2 reading reads and β",
              options=(Option("--carrier", 'carrier gas: natural-gas-endo (default), propane-endo, nitrogen-methanol, '
                                           'or an own mix "CO=20 H2=40" (vol %%)', _read_carrier),), since=9),
    Parameter("carrier_co", "CO in the carrier", Quantity("number"), 20.0, "carrier_co_pct", CARBURIZING,
              group="Furnace step", unit_label="%", range=(5.0, 50.0), decimals=1,
              help="CO of the carrier gas, vol % (the carrier's nominal; type the shop's analysis)", since=9),
    Parameter("carrier_h2", "H2 in the carrier", Quantity("number"), 40.0, "carrier_h2_pct", CARBURIZING,
              group="Furnace step", unit_label="%", range=(0.0, 80.0), decimals=1,
              help="H2 of the carrier gas, vol % (the carrier's nominal; type the shop's analysis)", since=9),
    Parameter("control_reading", "Controlled on", Choice(CONTROL_READINGS), "mv", "controlled_on", CARBURIZING,
              group="Furnace step", help="the reading the furnace holds the potential by: the floor sheet gives the "
                                         "setpoints in it",
              options=(Option("--controlled-on", "the reading the floor sheet's setpoints are in: mv (oxygen probe, "
                                                 "default), dew_point or co2", choices=lambda: list(CONTROL_READINGS)),
                       Option("--potential-as", 'one soak\'s carbon potential as the furnace reads it, at its temperature '
                                                'and carrier: 1150mV, "dew point 20F" or "CO2 0.15%%" (also sets '
                                                '--controlled-on)', _read_potential_reading)),
              since=9),
    Parameter("kn", "Nitriding potential K_N", Quantity("number"), 3.0, "nitriding_potential", NITRIDING,
              group="Furnace step", unit_label=KN_UNIT, range=(0.05, 30.0),
              help="K_N = p(NH3)/p(H2)^1.5",
              options=(Option("--kn", f"nitriding potential K_N, {KN_UNIT} (e.g. 3)"),
                       Option("--dissociation", "ammonia dissociation of the exhaust, %% (e.g. 30)", _read_dissociation),
                       Option("--exhaust", "measured exhaust gas, volume %%: NH3=40,H2=45", _read_exhaust)), since=3),
    Parameter("compound_min", "Compound layer from", Quantity("thin length"), 5e-6, "compound_layer_min_um", NITRIDING,
              group="Furnace step", range=(0.0, 100e-6), decimals=1,
              options=(Option("--compound", "compound-layer window, e.g. 5-10um", _read_compound),), since=3),
    Parameter("compound_max", "Compound layer to", Quantity("thin length"), 10e-6, "compound_layer_max_um", NITRIDING,
              group="Furnace step", range=(0.0, 100e-6), decimals=1, since=3),
    Parameter("two_stage", "Two stages (second K_N thins the layer)", Flag(), False, "two_stage_nitriding", NITRIDING,
              group="Furnace step", help="nitride at K_N first, then at the second K_N: the layer thins (ε turns to γ′) "
                                         "while the diffusion zone keeps growing",
              options=(Option("--two-stage", "on: a second, low-K_N stage brings the compound layer into its window"),), since=4),
    Parameter("kn_second", "Second-stage K_N", Quantity("number", optional=True, unset="just above α/γ′"), None,
              "second_nitriding_potential",
              NITRIDING, group="Furnace step", unit_label=KN_UNIT, range=(0.05, 30.0),
              applies=lambda v: bool(v.get("two_stage")), when="two stages (--two-stage on)",
              help="K_N of the second stage; at or above the α/γ′ boundary so the ferrite stays saturated "
                   "(not set: just above it)",
              options=(Option("--second-kn", "K_N of the second stage (default: just above the α/γ′ boundary)"),), since=4),
    Parameter("core_hardness", "Core hardness", Quantity("number", optional=True, unset="grade's typical"), None,
              "core_hardness_hv", NITRIDING,
              group="Furnace step", unit_label="HV", range=(100.0, 1400.0), decimals=0,
              help="after quench and temper (not set: the grade's typical value)",
              options=(Option("--core-hardness", "core hardness after quench and temper, HV (default: the grade's)"),), since=3),
    Parameter("surface_hardness", "Nitrided surface hardness", Quantity("number", optional=True, unset="grade's typical"),
              None,
              "nitrided_surface_hardness_hv", NITRIDING, group="Furnace step", unit_label="HV", range=(100.0, 1400.0),
              decimals=0, help="not set: the grade's typical value",
              options=(Option("--surface-hardness", "nitrided surface hardness, HV (default: the grade's)"),), since=3),
    Parameter("nitrided_limit", "Hardness limit", Quantity("number", optional=True, unset="core + 50 HV"), None,
              "nitrided_hardness_limit_hv", NITRIDING, group="Drawing callout", unit_label="HV", range=(100.0, 1400.0),
              decimals=0, help="the hardness the nitrided depth is read at (not set: core + 50 HV, DIN 50190-3 / "
                               "ISO 18203; some drawings state e.g. 400 HV)",
              options=(Option("--nitrided-limit", "hardness the nitrided depth is read at, HV (default: core + 50 HV)"),),
              since=6),
    Parameter("n_multiplier", "D_N multiplier", Quantity("number"), 1.0, "nitrogen_diffusivity_multiplier", NITRIDING,
              group="Furnace step", unit_label="×", range=MULTIPLIER, decimals=3,
              help="calibration factor on the nitrogen diffusivity: fit it to the shop's own sections",
              options=(Option("--d-multiplier", "calibration factor on the nitrogen diffusivity (default 1)"),), since=4),
    Parameter("strength_multiplier", "Nitrides' hardness multiplier", Quantity("number"), 1.0,
              "nitriding_strength_multiplier", NITRIDING, group="Furnace step", unit_label="×", range=MULTIPLIER,
              decimals=3, help="calibration factor on the hardness the nitrides add over the core (the zone's "
                               "strength): fit it with the D_N multiplier to the shop's own traverses",
              options=(Option("--strength-multiplier", "calibration factor on the hardness the nitrides add over the "
                                                       "core (default 1)"),), since=11),
    # the cycle (carburizing)
    Parameter("process", "Cycle", Choice(_cycles, notes=_cycle_note), "single", "process", CARBURIZING, group="Cycle", since=2),
    Parameter("boost_potential", "Boost potential", Quantity("number"), 1.15, "boost_potential_pct", CARBURIZING,
              group="Cycle", unit_label="%C", range=POTENTIAL, applies=lambda v: v.get("process") == "boost-diffuse",
              when="boost and diffuse (--surface-target)",
              options=(Option("--boost-potential", "with --surface-target: carbon potential of the boost, wt %% C"),), since=2),
    Parameter("diffuse_potential", "Diffuse potential", Quantity("number"), 0.80, "diffuse_potential_pct", CARBURIZING,
              group="Cycle", unit_label="%C", range=POTENTIAL, applies=lambda v: v.get("process") == "boost-diffuse",
              when="boost and diffuse (--surface-target)",
              options=(Option("--diffuse-potential", "with --surface-target: carbon potential of the diffuse, wt %% C"),), since=2),
    Parameter("surface_min", "Surface carbon from", Quantity("number"), 0.75, "surface_carbon_min_pct", CARBURIZED,
              group="Cycle", unit_label="%C", range=(0.05, 2.0), applies=_surface_window_applies,
              when="boost and diffuse (--surface-target), or low-pressure carburizing",
              options=(Option("--surface-target", "plan boost and diffuse for a final surface carbon: 0.80 (±0.05) or "
                                                  "0.75-0.85", _read_surface_target),), since=2),
    Parameter("surface_max", "Surface carbon to", Quantity("number"), 0.85, "surface_carbon_max_pct", CARBURIZED,
              group="Cycle", unit_label="%C", range=(0.05, 2.0), applies=_surface_window_applies, since=2),
    Parameter("stages", "Stages", Table(list, _check_stages, "a list of stages"), [], "stages", CARBURIZING,
              group="Cycle", applies=lambda v: v.get("process") == "stages", when="stages of one's own", since=2),
    Parameter("count_shop_stages", "Count the carbon of the shop's heat-up and drop", Flag(), True,
              "shop_stages_counted", CARBURIZING, group="Cycle",
              applies=lambda v: v.get("process") in ("single", "boost-diffuse"), when="one soak, or boost and diffuse",
              help="the case at the end of the whole cycle: carbon moved in the shop's heat-up (above Ac3), drop "
                   "and equalize counted (Edit → Shop times and rates); off: the soak at temperature alone",
              options=(Option("--shop-stages", "on (default): count the carbon the shop's heat-up, drop and equalize "
                                               "move in the case; off: the soak at temperature alone"),), since=5),
    # the pulses of low-pressure carburizing
    Parameter("hydrocarbon", "Hydrocarbon", Choice(_hydrocarbons), "acetylene", "hydrocarbon", LPC, group="Pulses",
              help="the gas dosed in the boosts",
              options=(Option("--gas", "hydrocarbon dosed in the boosts (default acetylene)",
                              choices=lambda: list(_hydrocarbons())),), since=8),
    Parameter("carbon_flux", "Carbon flux of a boost", Quantity("mass flux", optional=True,
                                                                 unset="unlimited (at the limit at once)"),
              150e-3 / 3600.0, "carbon_flux_g_per_m2_h", LPC, group="Pulses", range=(5e-3 / 3600.0, 5.0 / 3600.0),
              decimals=0, help="carbon the gas delivers to the surface until it saturates (150 g/(m²·h): from memory; "
                               "calibrate on the shop's sections); not set: the surface at the limit at once",
              options=(Option("--carbon-flux", "carbon the gas delivers, e.g. 150g/m2h, or inf (the surface at its "
                                               "limit from the start of every boost)", _read_carbon_flux),), since=8),
    Parameter("surface_limit", "Surface limit in boosts", Quantity("number", optional=True,
                                                                   unset="the steel's saturation"),
              None, "surface_limit_pct", LPC, group="Pulses", unit_label="%C", range=(0.1, 2.0),
              help="the surface carbon a boost holds once reached (not set: the saturation of this steel's austenite "
                   "at the temperature; a lower limit keeps further from carbides)",
              options=(Option("--surface-limit", "surface carbon the boosts hold, %%C (default: the steel's "
                                                 "saturation)"),), since=8),
    Parameter("pulse_count", "Pulses", Quantity("number", optional=True, unset="fewest that fit"), None, "pulses",
              LPC, group="Pulses", range=(1.0, 40.0), decimals=0,
              help="boost and diffuse pulses (not set: the fewest whose boosts hold the limit no longer than allowed)",
              options=(Option("--pulses", "number of boost and diffuse pulses (default: the fewest that fit)"),), since=8),
    Parameter("max_hold", "Longest hold at the limit", Quantity("number"), 180.0, "max_hold_at_limit_s", LPC,
              group="Pulses", unit_label="s", range=(5.0, 3600.0), decimals=0,
              help="the longest a boost holds the surface at the limit (180 s: common practice, from memory)",
              options=(Option("--max-hold", "longest a boost holds the surface at its limit: 3min (default)",
                              _read_max_hold),), since=8),
    Parameter("hardening_temperature", "Hardening temperature", Quantity("temperature", optional=True,
                                                                         unset="the shop's"),
              None, "hardening_temperature_c", LPC, group="Pulses", decimals=0,
              help="quenched from here after a drop in nitrogen (the carburizing temperature: no drop; not set: the "
                   "shop's hardening temperature)",
              options=(Option("--hardening-temperature", "quench from this temperature: 860C (default: the shop's; the "
                                                         "carburizing temperature means no drop)"),), since=8),
    Parameter("load_area", "Load surface area", Quantity("area"), 2.5, "load_area_m2", LPC, group="Pulses",
              range=(1e-4, 1e3), decimals=2, help="the carburized surface of the whole load (for the gas it takes)",
              options=(Option("--area", "carburized surface of the load, e.g. 2.5m2 (for the gas)"),), since=8),
    Parameter("schedule", "Pulse table", Text(lines=2), "", "pulse_schedule", LPC, group="Pulses",
              help='a table to run as it stands: "boost 2min, diffuse 8min, boost 1.5min, …" (empty: plan one)',
              options=(Option("--schedule", 'run this pulse table: "boost 2min, diffuse 8min, boost 1.5min, …"',
                              _read_schedule),), since=8),
    # the quench and temper (carburizing)
    Parameter("quench", "Quench", Choice(_quench_media), "oil", "quench_medium", CARBURIZED, group="Quench and temper",
              companions=_with_quench,
              help="the medium the part is quenched in from the hardening temperature (Edit → Shop times and rates)",
              options=(Option("--quench", "quench medium (default oil: moderately agitated quench oil)",
                              choices=lambda: list(_quench_media())),), since=6),
    Parameter("quench_temperature", "Quench temperature", Quantity("temperature"), 60.0 + ZERO_CELSIUS,
              "quench_temperature_c", CARBURIZED, group="Quench and temper", range=(0.0 + ZERO_CELSIUS, 300.0 + ZERO_CELSIUS),
              decimals=0, help="the bath (oil) temperature: the lowest the case reaches before tempering",
              options=(Option("--quench-temperature", "quench (bath) temperature, e.g. 60C (default 60 °C)"),), since=6),
    Parameter("temper_temperature", "Temper", Quantity("temperature", optional=True, unset="as quenched"),
              180.0 + ZERO_CELSIUS, "temper_temperature_c", CARBURIZED, group="Quench and temper",
              range=(100.0 + ZERO_CELSIUS, 250.0 + ZERO_CELSIUS), decimals=0,
              help="tempering temperature (not set: as quenched)",
              options=(Option("--temper", "temper: 180C/2h, 180C (2 h), or none (as quenched)", _read_temper),), since=6),
    Parameter("temper_time", "Temper time", Quantity("time"), 2 * 3600.0, "temper_time_h", CARBURIZED,
              group="Quench and temper", range=(0.25 * 3600.0, 24 * 3600.0), decimals=2, unit_label="h",
              applies=lambda v: v.get("temper_temperature") is not None, when="a temper", since=6),
    # the drawing's callout
    Parameter("case_min", "Minimum case depth", Quantity("length"), 0.8e-3, "case_depth_min_mm", group="Drawing callout",
              range=(0.01e-3, 10e-3), decimals=3,
              options=(Option("--target", "the depth wanted: 1.0mm, 0.040in, or the drawing's window 0.9-1.3mm",
                              _read_target),)),
    Parameter("case_max", "Maximum case depth", Quantity("length"), 1.2e-3, "case_depth_max_mm", group="Drawing callout",
              range=(0.01e-3, 10e-3), decimals=3),
    Parameter("aim", "Aim", Quantity("number"), 0.5, "aim_fraction_of_window", group="Drawing callout",
              range=(0.0, 1.0), help="where in the drawing's window to aim: 0.5 is the middle",
              options=(Option("--aim", "where in the window to aim: 50%% (default) or 0.4", _read_aim),)),
    Parameter("threshold_value", "Threshold", Quantity("number"), 0.40, "threshold_value", CARBURIZED,
              group="Drawing callout", range=_threshold_range, decimals=lambda v: THRESHOLD_KINDS[v["threshold_kind"]].decimals,
              options=(Option("--at", "threshold: 0.40%%C, 550HV, 50HRC, or total (core + 0.04 %%C, SAE J423) "
                                      "(default 0.40%%C)", _read_threshold),)),
    Parameter("threshold_kind", "Threshold kind", Choice({k: t.label for k, t in THRESHOLD_KINDS.items()}), "carbon",
              "threshold_kind", CARBURIZED, group="Drawing callout", companions=_with_threshold_kind),
    Parameter("surface_hrc_min", "Surface hardness from", Quantity("number", optional=True, unset="not checked"), None,
              "surface_hardness_min_hrc", CARBURIZED, group="Drawing callout", unit_label="HRC", range=(20.0, 68.0),
              decimals=1, help="the drawing's surface-hardness window (not set: not checked)",
              options=(Option("--surface-hardness", "the drawing's surface hardness: 58-62HRC (or HV), or 58HRC "
                                                    "for a minimum", _read_hardness_window(("surface_hrc_min",
                                                                                          "surface_hrc_max"))),),
              since=6),
    Parameter("surface_hrc_max", "Surface hardness to", Quantity("number", optional=True, unset="not checked"), None,
              "surface_hardness_max_hrc", CARBURIZED, group="Drawing callout", unit_label="HRC", range=(20.0, 68.0),
              decimals=1, since=6),
    Parameter("core_hrc_min", "Core hardness from", Quantity("number", optional=True, unset="not checked"), None,
              "core_hardness_min_hrc", CARBURIZED, group="Drawing callout", unit_label="HRC", range=(10.0, 68.0),
              decimals=1, help="the drawing's core-hardness window (not set: not checked)",
              options=(Option("--core-hardness", "the drawing's core hardness: 30-40HRC (or HV), or 30HRC for a "
                                                 "minimum", _read_hardness_window(("core_hrc_min", "core_hrc_max"))),),
              since=6),
    Parameter("core_hrc_max", "Core hardness to", Quantity("number", optional=True, unset="not checked"), None,
              "core_hardness_max_hrc", CARBURIZED, group="Drawing callout", unit_label="HRC", range=(10.0, 68.0),
              decimals=1, since=6),
    # model settings (carburizing)
    Parameter("calibration", "Calibration", Text(), "", "calibration", group="Model settings", affects_result=False,
              help="the furnace record's fit the multipliers came from (casedepth record fit --save; set when a new "
                   "plan names a furnace that has one)", since=10),
    Parameter("diffusivity", "Carbon diffusivity", Choice({k: m.display for k, m in METHODS.items()}), "tibbetts",
              "diffusivity_model", CARBURIZED, group="Model settings",
              options=(Option("--diffusivity", "carbon diffusivity model", choices=lambda: list(METHODS)),)),
    Parameter("d_multiplier", "D multiplier", Quantity("number"), 1.0, "diffusivity_multiplier", CARBURIZED,
              group="Model settings", unit_label="×", range=MULTIPLIER, decimals=3,
              help="calibration factor on D (1 = the published model)",
              options=(Option("--d-multiplier", "calibration factor on D (default 1)"),)),
    Parameter("d0", "D0", Quantity("number"), ARRHENIUS_D0, "arrhenius_d0_m2_per_s", CARBURIZED, group="Model settings",
              unit_label="m²/s", range=(1e-9, 1e-2), applies=lambda v: v.get("diffusivity") == "arrhenius",
              when="the arrhenius diffusivity",
              help="Arrhenius pre-exponential factor",
              options=(Option("--d0", "arrhenius only: D0 in m2/s (default 2.3e-5)"),)),
    Parameter("q", "Activation energy Q", Quantity("energy"), ARRHENIUS_Q, "arrhenius_q_kj_per_mol", CARBURIZED,
              group="Model settings", range=(50e3, 400e3), decimals=1, applies=lambda v: v.get("diffusivity") == "arrhenius",
              when="the arrhenius diffusivity",
              options=(Option("--q", "arrhenius only: activation energy in kJ/mol (default 148)"),)),
    Parameter("beta_model", "Mass transfer β", Choice(BETA_MODELS), "gas-2026", "mass_transfer_model", CARBURIZING,
              group="Model settings", applies=lambda v: not v.get("beta_held"), when="a surface not held at equilibrium",
              help="β from the carrier gas and the temperature (Grabke's CO·H2 law; 1.5e-5 cm/s at 925 °C in "
                   "endothermic gas), or one value typed below", since=9),
    Parameter("beta_multiplier", "β multiplier", Quantity("number"), 1.0, "beta_multiplier", CARBURIZING,
              group="Model settings", unit_label="×", range=MULTIPLIER, decimals=3,
              applies=lambda v: not v.get("beta_held") and v.get("beta_model") == "gas-2026",
              when="β from the gas", help="calibration factor on the β of the gas (1 = the relation as published)",
              options=(Option("--beta-multiplier", "calibration factor on the β of the gas (default 1)"),), since=9),
    Parameter("beta", "β", Quantity("velocity"), DEFAULT_BETA, "beta_cm_per_s", CARBURIZING, group="Model settings",
              range=(1e-9, 1e-4), applies=lambda v: not v.get("beta_held") and v.get("beta_model") == "constant",
              when="one β at every temperature (not held, not from the gas)",
              help="mass-transfer coefficient of the atmosphere (about 1–3e-5 cm/s in endothermic gas)",
              options=(Option("--beta", "mass-transfer coefficient: gas (default: from the carrier gas and the "
                                        "temperature), a value such as 1.5e-5cm/s, or inf for a surface held at "
                                        "equilibrium", _read_beta),)),
    Parameter("beta_held", "Surface held at equilibrium (β = ∞)", Flag(), False, "surface_held_at_equilibrium",
              CARBURIZING, group="Model settings"),
    Parameter("gas_data", "Gas thermochemistry", Choice(_gas_data, _gas_data_superseded), "nasa-glenn-2002",
              "gas_thermochemistry", CARBURIZING, group="Model settings",
              help="the standard Gibbs energies the probe, dew-point and CO2 readings are worked out with",
              options=(Option("--gas-data", "Gibbs energies for the readings (default nasa-glenn-2002)",
                              choices=lambda: list(_gas_data())),), since=9),
    Parameter("alloy_factor", "Alloy factor (Gunnarson)", Flag(), True, "alloy_factor", CARBURIZING, group="Model settings",
              options=(Option("--alloy-factor", "apply the Gunnarson alloy factor (default on)",
                              choices=lambda: ["on", "off"]),)),
    Parameter("hardness_relation", "Carbon → hardness",
              Choice({k: r.display for k, r in HARDNESS_RELATIONS.items()}, _relation_superseded),
              "structure-2026", "hardness_relation", CARBURIZED, group="Model settings",
              help="turns carbon into the hardness plotted, and HV or HRC thresholds into carbon",
              options=(Option("--hardness-relation", "carbon-to-hardness relation for HV/HRC thresholds (default "
                                                     "structure-2026: from the quench and temper)",
                              choices=lambda: list(HARDNESS_RELATIONS)),)),
    # model settings (nitriding)
    Parameter("layer_model", "Compound-layer model", Choice(_layer_models, _layer_superseded), "somers-mittemeijer-1995",
              "compound_layer_model", NITRIDING, group="Model settings",
              options=(Option("--layer-model", "compound-layer growth model", choices=lambda: list(_layer_models())),), since=5),
    Parameter("zone_model", "Diffusion-zone model", Choice(_zone_models, _zone_superseded), "precipitation-2026",
              "diffusion_zone_model", NITRIDING, group="Model settings", companions=_with_zone_model,
              help="how nitrogen and hardness spread below the compound layer",
              options=(Option("--zone-model", "diffusion-zone model", choices=lambda: list(_zone_models())),), since=6),
    Parameter("n_diffusivity", "Nitrogen diffusivity", Choice(_n_diffusivities, notes=_n_diffusivity_note),
              "da-silva-mclellan-1976", "nitrogen_diffusivity_model", NITRIDING, group="Model settings",
              options=(Option("--n-diffusivity", "diffusivity of nitrogen in ferrite",
                              choices=lambda: list(_n_diffusivities())),), since=6),
    # how a load's parts spread (casedepth.shop.capability: the Load spread page, ``casedepth capability``); the
    # furnace's temperature and potential bands are the shop's tolerances (Edit → Shop times and rates)
    Parameter("spread_distribution", "Parts within each band", Choice(_spread_distributions), "uniform",
              "spread_distribution", group="Load spread",
              help="how the parts of a load fall within the shop's tolerance bands and β's factor", since=7),
    Parameter("spread_composition", "Steel composition", Choice(_spread_compositions), "nominal", "spread_composition",
              group="Load spread", help="the nominal composition, or a heat anywhere in the grade's range", since=7),
    Parameter("spread_beta_factor", "β known within a factor of", Quantity("number"), 2.0, "spread_beta_factor",
              CARBURIZING, group="Load spread", unit_label="×", range=(1.0, 10.0),
              applies=lambda v: not v.get("beta_held"), when="a finite mass-transfer coefficient",
              help="the parts' β anywhere from β ÷ factor to β × factor (2: common practice)", since=7),
    Parameter("spread_d_factor", "Diffusivity known within a factor of", Quantity("number"), 1.0, "spread_d_factor",
              group="Load spread", unit_label="×", range=(1.0, 10.0), decimals=3,
              help="the parts' diffusivity anywhere from D ÷ factor to D × factor (1: the model's D for every part; a "
                   "furnace fit sets its 95 % interval)", since=11),
    Parameter("spread_section", "Section varies by ±", Quantity("length"), 0.0, "spread_section_mm", group="Load spread",
              range=lambda v: (0.0, 0.25 * (v.get("size") or 0.0)), decimals=3,
              applies=lambda v: isinstance(v.get("size"), float) and v["size"] > 0,
              when="a part with a size (a plate's thickness or a diameter)",
              help="part-to-part spread of the section (its tolerance as machined); it changes how the core cools and "
                   "how a thin section carburizes (0: every part at the plan's size)", since=7),
    Parameter("spread_samples", "Parts drawn", Quantity("number"), 256, "spread_parts", group="Load spread",
              range=(16.0, 4096.0), decimals=0, help="parts drawn for the load (a Latin hypercube)", since=7),
    # the shop's times and rates (a dialog of their own) and the notes
    Parameter("shop", "Shop times and rates", Table(dict, _check_shop, "a table of the shop's times and rates"), {},
              "shop", help="the shop's standard times and rates (Edit → Shop times and rates)", since=2),
    Parameter("notes", "Notes", Text(lines=3), "", "notes", group="Notes", affects_result=False,
              help="anything the floor or the customer should know"),
)}


def label(key: str) -> str:
    """What the window and messages call ``key`` (the key itself if it is not a parameter)."""
    row = PARAMETERS.get(key)
    return row.label if row is not None else key.replace("_", " ").capitalize()


def defaults(treatment: str = "carburizing") -> dict[str, Any]:
    """Every parameter's default for a new plan of ``treatment`` (the treatment's own defaults applied)."""
    from .treatments import TREATMENTS

    if treatment not in TREATMENTS:
        raise InputError("treatment", f"{treatment!r} is not one of {', '.join(TREATMENTS)}")
    values = {key: _copy(row.default) for key, row in PARAMETERS.items()}
    values.update({key: _copy(value) for key, value in TREATMENTS[treatment].defaults.items()})
    values["treatment"] = treatment
    values["composition"] = dict(steels.find(values["steel"]).composition)
    return values


def _copy(value):
    return value.copy() if isinstance(value, (dict, list)) else value


def check(key: str, value: Any) -> Any:
    """``value`` in the proper type for ``key``; :class:`InputError` naming the key otherwise."""
    if key not in PARAMETERS:
        raise InputError(key, f"a plan has no parameter {key!r}")
    row = PARAMETERS[key]
    if isinstance(row.kind, Choice) and isinstance(value, str) and value == row.default:
        # the table's own default is one of its choices (tests/test_plan.py checks every row's): a plan that keeps
        # it does not load the module whose table lists the choices (a carburizing plan, the nitriding models)
        return value
    return row.kind.check(key, value)


def check_ranges(values: Mapping[str, Any]) -> None:
    """Refuse the first value that matters for this plan and lies outside its allowed range."""
    for row in PARAMETERS.values():
        if row.used_by(values):
            row.check_range(values)


def options_for(treatment: str) -> list[tuple[Parameter, Option]]:
    """The command-line options of a treatment's command, in table order."""
    return [(row, option) for row in PARAMETERS.values() if row.for_treatment(treatment) for option in row.options]


def read_options(treatment: str, given: Mapping[str, str], values: dict[str, Any]) -> dict[str, str]:
    """Apply the text of the options given (``dest -> text``) to ``values``, in table order; returns, per
    parameter key, the option (its ``dest``) that set it, so a later error can name what the user typed. An
    error reading an option, or an option that plays no part in the plan it makes, is raised against that
    option (:class:`OptionError`)."""
    set_by: dict[str, str] = {}
    read: list[tuple[Parameter, Option, dict]] = []
    for row, option in options_for(treatment):
        text = given.get(option.dest)
        if text is None:
            continue
        try:
            updates = option.read(text, values) if option.read is not None else {row.key: row.kind.parse(row.key, text)}
        except InputError as error:
            raise OptionError(option.dest, error.message) from None
        for key, value in updates.items():
            values[key] = check(key, value)
            set_by[key] = option.dest
        read.append((row, option, updates))
    for row, option, updates in read:  # an option given where it plays no part is a mistake worth saying
        if not any(PARAMETERS[key].used_by(values) for key in updates):
            raise OptionError(option.dest, f"only used with {row.when or 'other settings'}")
    return set_by


def option_for(treatment: str, key: str, set_by: Mapping[str, str]) -> str | None:
    """The option (``dest``) an error against parameter ``key`` should name: the one the user gave for it, or the
    first that sets it; None if no option of the treatment sets it."""
    if key in set_by:
        return set_by[key]
    return next((option.dest for row, option in options_for(treatment) if row.key == key), None)


class OptionError(InputError):
    """An option's text that cannot be read, or that plays no part; ``field`` is the option's name (``dest``)."""


def drawing_window(values: Mapping[str, Any]) -> tuple[float, float, float]:
    """(minimum, aim, maximum) depth [m] from the drawing's window and where in it to aim."""
    for key in ("case_min", "case_max", "aim"):
        PARAMETERS[key].check_range(values)
    low, high, aim = values["case_min"], values["case_max"], values["aim"]
    if high < low:
        raise InputError("case_max", f"the maximum case depth must not be below the minimum ({both_lengths(low)})")
    return low, low + aim * (high - low), high
