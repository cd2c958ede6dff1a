"""The plan: everything a planner edits, as one plain state object (no Qt).

The window binds its widgets to a :class:`Plan`; the command line and tests build the same object.
Values are SI inside (K, m, m/s) and carbon in wt %. A plan notifies listeners of every change,
keeps an undo/redo stack of changes, and saves to a JSON file with a schema version (units in
the key names), written to a temporary file first and renamed so a failed save never loses the
previous file.
"""

from __future__ import annotations

import copy
import json
import math
import os
import tempfile
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable

import numpy as np

from . import safety, steels
from .carburizing import (CarburizingResult, CarburizingSetup, carburize, case_warnings,
                          soak_times_for_case_depths)
from .diffusivity import Diffusivity
from .errors import InputError
from .geometry import Geometry
from .quote import ROOM, Quote, ShopDefaults, make_quote, nitriding_cycle, nitriding_quote
from .nitriding import (NitridingResult, NitridingSetup, TwoStageSchedule, compound_layer_advice, nitride,
                        nitriding_time, staged_layer_at, two_stage_for_depth)
from .atmosphere import probe_setpoints
from .recipe import CycleResult, Stage, plan_boost_diffuse, plan_single_soak, run_recipe, timeline
from .safety import Caution
from .steels import Steel
from .surface import DEFAULT_BETA
from .units import ZERO_CELSIUS, Threshold, both_lengths

SCHEMA_VERSION = 4
FILE_KIND = "casedepth plan"


@dataclass(frozen=True)
class Field:
    """One editable value: its default and how it is written to a plan file."""

    default: Any
    key: str  # key in the JSON file
    scale: float | None = None  # SI value * scale = file value (None: stored as is)
    offset: float = 0.0  # file value = SI * scale + offset (temperatures in °C)


FIELDS: dict[str, Field] = {
    "title": Field("Untitled plan", "title"),
    "part": Field("", "part"),
    "revision": Field("A", "revision"),
    "notes": Field("", "notes"),
    "steel": Field("8620", "steel"),
    "composition": Field(None, "composition_pct"),
    "shape": Field("plate", "shape"),
    "size": Field(None, "size_mm", 1e3),
    "temperature": Field(925.0 + ZERO_CELSIUS, "temperature_c", 1.0, -ZERO_CELSIUS),
    "carbon_potential": Field(1.00, "carbon_potential_pct"),
    "case_min": Field(0.8e-3, "case_depth_min_mm", 1e3),
    "case_max": Field(1.2e-3, "case_depth_max_mm", 1e3),
    "aim": Field(0.5, "aim_fraction_of_window"),
    "threshold_kind": Field("carbon", "threshold_kind"),
    "threshold_value": Field(0.40, "threshold_value"),
    "diffusivity": Field("tibbetts", "diffusivity_model"),
    "d_multiplier": Field(1.0, "diffusivity_multiplier"),
    "d0": Field(2.3e-5, "arrhenius_d0_m2_per_s"),
    "q": Field(148e3, "arrhenius_q_kj_per_mol", 1e-3),
    "beta": Field(DEFAULT_BETA, "beta_cm_per_s", 1e2),
    "beta_held": Field(False, "surface_held_at_equilibrium"),
    "alloy_factor": Field(True, "alloy_factor"),
    "hardness_relation": Field("tempered", "hardness_relation"),
    # schema 2: whole cycles
    "process": Field("single", "process"),  # single soak | boost-diffuse | stages (a recipe of one's own)
    "surface_min": Field(0.75, "surface_carbon_min_pct"),
    "surface_max": Field(0.85, "surface_carbon_max_pct"),
    "boost_potential": Field(1.15, "boost_potential_pct"),
    "diffuse_potential": Field(0.80, "diffuse_potential_pct"),
    "stages": Field([], "stages"),  # list of {"kind", "duration_h", "temperature_c", "carbon_potential_pct", ...}
    "shop": Field({}, "shop"),  # ShopDefaults as a dict; missing keys take the defaults
    # schema 3: gas nitriding
    "treatment": Field("carburizing", "treatment"),  # carburizing | nitriding
    "kn": Field(3.0, "nitriding_potential"),
    "compound_min": Field(5e-6, "compound_layer_min_um", 1e6),
    "compound_max": Field(10e-6, "compound_layer_max_um", 1e6),
    "core_hardness": Field(None, "core_hardness_hv"),  # None: the grade's typical value
    "surface_hardness": Field(None, "nitrided_surface_hardness_hv"),
    "n_multiplier": Field(1.0, "nitrogen_diffusivity_multiplier"),  # calibration of the nitriding depth
    # schema 4: two-stage nitriding
    "two_stage": Field(False, "two_stage_nitriding"),  # a second, low-K_N stage brings the layer into its window
    "kn_second": Field(None, "second_nitriding_potential"),  # None: just above the α/γ′ boundary
}
TREATMENTS = ("carburizing", "nitriding")
PROCESSES = ("single", "boost-diffuse", "stages")

# library error fields -> plan fields, so the window can mark the right widget
_ERROR_FIELDS = {
    "temperature": "temperature", "carbon potential": "carbon_potential", "threshold": "threshold_value",
    "hardness": "threshold_value", "beta": "beta", "diameter": "size", "thickness": "size", "geometry": "shape",
    "steel": "composition", "composition": "composition", "diffusivity multiplier": "d_multiplier",
    "D0": "d0", "Q": "q", "hardness relation": "hardness_relation", "diffusivity": "diffusivity",
}


def stage_to_dict(stage: Stage) -> dict:
    """A stage as stored in a plan file (hours, °C, wt %)."""
    out = {"kind": stage.kind, "duration_h": float(f"{stage.duration / 3600.0:.12g}")}
    if stage.temperature is not None:
        out["temperature_c"] = float(f"{stage.temperature - ZERO_CELSIUS:.12g}")
    if stage.carbon_potential is not None:
        out["carbon_potential_pct"] = stage.carbon_potential
    if stage.start_potential is not None:
        out["start_potential_pct"] = stage.start_potential
    return out


def stage_from_dict(data: dict, number: int = 0) -> Stage:
    where = f"stage {number}" if number else "stage"
    try:
        temperature = data.get("temperature_c")
        return Stage(str(data["kind"]), float(data["duration_h"]) * 3600.0,
                     None if temperature is None else float(temperature) + ZERO_CELSIUS,
                     None if data.get("carbon_potential_pct") is None else float(data["carbon_potential_pct"]),
                     None if data.get("start_potential_pct") is None else float(data["start_potential_pct"]))
    except (KeyError, TypeError, ValueError) as error:
        raise InputError(where, f"cannot read {data!r}: {error}") from None


class PlanFileError(InputError):
    """A plan file that cannot be read."""


class Plan:
    """Editable, observable, undoable state of one carburizing plan.

    Read values as attributes (``plan.temperature``); change them with :meth:`set` or
    :meth:`update` so listeners hear of it and the change can be undone.
    """

    def __init__(self, **values):
        self._values: dict[str, Any] = {name: copy.deepcopy(f.default) for name, f in FIELDS.items()}
        self._values["composition"] = dict(steels.find(self._values["steel"]).composition)
        self._listeners: list[Callable[[str, Any], None]] = []
        self._undo: list[dict[str, tuple[Any, Any]]] = []
        self._redo: list[dict[str, tuple[Any, Any]]] = []
        self.modified = False
        if values:
            self._apply({k: v for k, v in values.items()}, record=False)
            self.modified = False

    # -- access ------------------------------------------------------------------------------
    def __getattr__(self, name: str):
        values = self.__dict__.get("_values")
        if values is not None and name in values:
            return copy.deepcopy(values[name]) if isinstance(values[name], dict) else values[name]
        raise AttributeError(name)

    def values(self) -> dict[str, Any]:
        return copy.deepcopy(self._values)

    def subscribe(self, listener: Callable[[str, Any], None]) -> None:
        """Call ``listener(name, value)`` after every change of a field."""
        self._listeners.append(listener)

    # -- changes -----------------------------------------------------------------------------
    def set(self, name: str, value: Any, coalesce: bool = False) -> None:
        """Change one field. With ``coalesce``, a change of the same field as the last edit joins that
        edit in the undo stack (typing 9, 92, 925 is one edit, not three)."""
        if coalesce and self._undo and list(self._undo[-1]) == [name] and not self._redo:
            old = self._undo[-1][name][0]
            self._apply({name: value}, record=False)
            if self._values[name] == old:
                self._undo.pop()
            else:
                self._undo[-1] = {name: (old, copy.deepcopy(self._values[name]))}
            return
        self.update(**{name: value})

    def update(self, **values) -> None:
        """Change several fields as one undoable edit."""
        self._apply(values, record=True)

    def _apply(self, values: dict[str, Any], record: bool) -> None:
        change = {}
        for name, value in values.items():
            if name not in FIELDS:
                raise KeyError(f"a plan has no field {name!r}")
            old = self._values[name]
            if old == value:
                continue
            change[name] = (copy.deepcopy(old), copy.deepcopy(value))
            self._values[name] = copy.deepcopy(value)
        if not change:
            return
        if record:
            self._undo.append(change)
            self._redo.clear()
        self.modified = True
        self._notify(change, 1)

    def _notify(self, change: dict[str, tuple[Any, Any]], which: int) -> None:
        for name, pair in change.items():
            for listener in list(self._listeners):
                listener(name, copy.deepcopy(pair[which]))

    @property
    def can_undo(self) -> bool:
        return bool(self._undo)

    @property
    def can_redo(self) -> bool:
        return bool(self._redo)

    def undo(self) -> None:
        self._replay(self._undo, self._redo, 0)

    def redo(self) -> None:
        self._replay(self._redo, self._undo, 1)

    def _replay(self, source: list, target: list, which: int) -> None:
        """Move the last edit from ``source`` to ``target``, restoring side ``which`` (0 old, 1 new)."""
        if not source:
            return
        change = source.pop()
        for name, pair in change.items():
            self._values[name] = copy.deepcopy(pair[which])
        target.append(change)
        self.modified = True
        self._notify(change, which)

    def choose_steel(self, name: str) -> None:
        """Pick a library grade: its name and its nominal composition, as one edit."""
        steel = steels.find(name)
        self.update(steel=steel.name, composition=dict(steel.composition))

    # -- meaning ---------------------------------------------------------------------------------
    def steel_object(self) -> Steel:
        """The steel with the plan's (possibly edited) composition."""
        composition = steels.validate_composition(self._values["composition"], "composition")
        try:
            grade = steels.find(self._values["steel"])
        except InputError:
            return Steel("custom", composition)
        if composition == grade.composition:
            return grade
        return Steel(f"{grade.name} (edited)", composition, grade.standard + ", composition edited")

    def targets(self) -> tuple[float, float, float]:
        """(minimum, aim, maximum) effective case depth [m] from the drawing's window."""
        low, high, aim = self._values["case_min"], self._values["case_max"], self._values["aim"]
        if not (isinstance(low, (int, float)) and math.isfinite(low) and low > 0):
            raise InputError("case_min", "the minimum case depth must be a positive length")
        if not (isinstance(high, (int, float)) and math.isfinite(high) and high >= low):
            raise InputError("case_max", f"the maximum case depth must not be below the minimum ({both_lengths(low)})")
        if not (0.0 <= aim <= 1.0):
            raise InputError("aim", f"{aim * 100:g} % of the window is outside 0–100 %")
        return low, low + aim * (high - low), high

    def shop_defaults(self) -> ShopDefaults:
        return ShopDefaults.from_dict(self._values["shop"])

    def stage_list(self) -> list[Stage]:
        return [stage_from_dict(d, n) for n, d in enumerate(self._values["stages"], 1)]

    def _working_potential(self) -> tuple[float, str]:
        """The carbon potential the setup stands for, and its plan field: the furnace step's for one soak,
        the boost's for boost and diffuse, the richest stage's for stages of one's own (the atmosphere
        the cautions must judge; the furnace step's own value is not used in those modes)."""
        v = self._values
        if v["process"] == "boost-diffuse":
            return float(v["boost_potential"]), "boost_potential"
        if v["process"] == "stages":
            try:
                rich = [st.carbon_potential for st in self.stage_list() if st.moves_carbon]
            except InputError:
                rich = []
            if rich:
                return float(max(rich)), "stages"
        return float(v["carbon_potential"]), "carbon_potential"

    def setup(self) -> CarburizingSetup:
        """The validated carburizing setup; an :class:`InputError` names the plan field at fault."""
        v = self._values
        potential, potential_field = self._working_potential()
        try:
            diffusivity = Diffusivity(v["diffusivity"], float(v["d_multiplier"]), float(v["d0"]), float(v["q"]))
            return CarburizingSetup(
                steel=self.steel_object(),
                temperature=float(v["temperature"]),
                carbon_potential=potential,
                threshold=Threshold(float(v["threshold_value"]), v["threshold_kind"]),
                diffusivity=diffusivity,
                beta=math.inf if v["beta_held"] else float(v["beta"]),
                alloy_factor_on=bool(v["alloy_factor"]),
                geometry=Geometry(v["shape"], v["size"]),
                hardness_relation=v["hardness_relation"],
            )
        except InputError as error:
            if error.field == "carbon potential":
                raise InputError(potential_field, error.message) from None
            raise InputError(_ERROR_FIELDS.get(error.field, error.field), error.message) from None

    # -- files ---------------------------------------------------------------------------------
    def to_dict(self) -> dict:
        out: dict[str, Any] = {"kind": FILE_KIND, "schema_version": SCHEMA_VERSION}
        for name, f in FIELDS.items():
            value = self._values[name]
            if f.scale is not None and value is not None:
                value = float(f"{value * f.scale + f.offset:.12g}")  # no 925.0000000000001 in files
            out[f.key] = value
        return out

    @classmethod
    def from_dict(cls, data: dict) -> "Plan":
        if not isinstance(data, dict) or data.get("kind") != FILE_KIND:
            raise PlanFileError("plan file", "this is not a casedepth plan file")
        version = data.get("schema_version")
        if not isinstance(version, int) or version < 1:
            raise PlanFileError("plan file", f"unknown schema version {version!r}")
        if version > SCHEMA_VERSION:
            raise PlanFileError("plan file", f"written by a newer casedepth (schema {version}; this one reads "
                                f"up to {SCHEMA_VERSION}); update casedepth to open it")
        data = migrate(data)
        values = {}
        for name, f in FIELDS.items():
            if f.key not in data:
                continue
            value = data[f.key]
            if f.scale is not None and value is not None:
                if not isinstance(value, (int, float)):
                    raise PlanFileError("plan file", f"{f.key} should be a number, not {value!r}")
                value = (value - f.offset) / f.scale
            values[name] = value
        if not isinstance(values.get("stages", []), list) or not isinstance(values.get("shop", {}), dict):
            raise PlanFileError("plan file", "stages must be a list and shop a table of values")
        for number, stage in enumerate(values.get("stages", []), 1):
            try:
                stage_from_dict(stage, number)
            except InputError as error:
                raise PlanFileError("plan file", f"{error.field}: {error.message}") from None
        return cls(**values)

    def save(self, path: str | os.PathLike) -> None:
        """Write the plan as JSON: to a temporary file beside ``path``, then rename over it."""
        path = Path(path)
        text = json.dumps(self.to_dict(), indent=2, ensure_ascii=False) + "\n"
        handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
        try:
            with os.fdopen(handle, "w", encoding="utf-8") as stream:
                stream.write(text)
                stream.flush()
                os.fsync(stream.fileno())
            os.replace(temporary, path)
        except BaseException:
            if os.path.exists(temporary):
                os.unlink(temporary)
            raise
        self.modified = False

    @classmethod
    def load(cls, path: str | os.PathLike) -> "Plan":
        try:
            data = json.loads(Path(path).read_text(encoding="utf-8"))
        except (OSError, UnicodeDecodeError) as error:
            raise PlanFileError("plan file", f"cannot read {path}: {error}") from None
        except json.JSONDecodeError as error:
            raise PlanFileError("plan file", f"{path} is not valid JSON (line {error.lineno}): {error.msg}") from None
        return cls.from_dict(data)


def migrate(data: dict) -> dict:
    """Bring a plan file's contents up to :data:`SCHEMA_VERSION` (one step per past version)."""
    data = dict(data)
    if data["schema_version"] == 1:
        # schema 1 planned one isothermal soak; schema 2 adds whole cycles, whose defaults keep that meaning
        data.update(process="single", stages=[], shop={}, schema_version=2)
    if data["schema_version"] == 2:
        # schema 3 adds gas nitriding; every earlier plan is a carburizing plan
        data.update(treatment="carburizing", schema_version=3)
    if data["schema_version"] == 3:
        # schema 4 adds two-stage nitriding; earlier nitriding plans ran one stage
        data.update(two_stage_nitriding=False, second_nitriding_potential=None, schema_version=4)
    return data


@dataclass
class PlanOutcome:
    """What a plan gives.

    For a single soak: when the shop's heat-up or drop move carbon, the soaks for the drawing's
    minimum, aim and maximum with them counted (``soak_times``, see :attr:`soak_window`) and the
    aim's whole ``cycle``; the soaks at temperature alone (``low``, ``aim``, ``high``) are solved
    on first use then, and up front otherwise. For boost-diffuse and own stages: the whole ``cycle``
    (and the boost and diffuse times). Always the quote of the whole cycle and the cautions.
    """

    setup: CarburizingSetup
    process: str
    quote: Quote
    cautions: list[Caution]
    stages: list[Stage]
    isothermal: list[CarburizingResult] | None = None  # one soak alone: min, aim, max (see ``low``, ``aim``, ``high``)
    cycle: CycleResult | None = None
    boost_time: float | None = None
    diffuse_time: float | None = None
    warnings: list[str] = field(default_factory=list)
    # single soak with the shop's heat-up and drop counted: soaks for min, aim, max (``cycle`` is the aim's)
    soak_times: tuple[float, float, float] | None = None
    # ideal oxygen-probe voltage [mV] of each held carburizing stage, and the carrier gas's CO fraction
    probe: list[tuple[str, float]] = field(default_factory=list)
    carrier_co: float = 0.20

    targets: tuple[float, float, float] = (0.0, 0.0, 0.0)  # the drawing's min, aim, max case depth [m]

    @property
    def case_depth(self) -> float:
        return self.aim.case_depth if self.cycle is None else self.cycle.case_depth

    def _alone(self, index: int) -> CarburizingResult | None:
        """One soak at temperature alone for the drawing's min, aim or max (solved on first use)."""
        if self.process != "single":
            return None
        if self.isothermal is None:
            self.isothermal = soak_times_for_case_depths(self.setup, list(self.targets), size_for=self.targets[1])
        return self.isothermal[index]

    @property
    def low(self) -> CarburizingResult | None:
        return self._alone(0)

    @property
    def aim(self) -> CarburizingResult | None:
        return self._alone(1)

    @property
    def high(self) -> CarburizingResult | None:
        return self._alone(2)

    potential_name = "carbon potential [%C]"

    def timeline(self):
        """Temperature [K] and carbon potential against time [s] through the cycle (:func:`casedepth.recipe.timeline`)."""
        return timeline(self.stages)

    @property
    def soak_window(self) -> tuple[float, float, float]:
        """Single soak: soak times [s] at temperature for the drawing's minimum, aim and maximum case
        depth — with the shop's heat-up and drop counted where the shop has them."""
        if self.soak_times is not None:
            return self.soak_times
        return self.low.soak_time, self.aim.soak_time, self.high.soak_time

    @property
    def counts_shop_stages(self) -> bool:
        return self.soak_times is not None

    def depth_after(self, soak: float, setup: CarburizingSetup | None = None) -> float:
        """One soak: the case [m] after a soak of ``soak`` [s], with the shop's stages counted as this
        plan counts them (optionally with another ``setup``, e.g. another diffusivity)."""
        if self.process != "single":
            raise InputError("plan", f"a {self.process} cycle has no single soak to vary")
        setup = setup or self.setup
        if self.counts_shop_stages:
            stages = [s if s.kind != "soak" else Stage("soak", soak, s.temperature, s.carbon_potential) for s in self.stages]
            return run_recipe(setup, stages).case_depth
        return carburize(setup, soak).case_depth

    @property
    def duration(self) -> float:
        """Time [s] the profile history covers: the soak, or the whole cycle."""
        return self.aim.soak_time if self.cycle is None else float(self.cycle.history_time[-1])

    def profile_at(self, time: float):
        return (self.aim if self.cycle is None else self.cycle).profile_at(time)

    @property
    def surface_carbon(self) -> float:
        return self.aim.surface_carbon if self.cycle is None else self.cycle.surface_carbon

    @property
    def profile(self):
        return self.aim.profile if self.cycle is None else self.cycle.profile


def _with_field(error: InputError, names: dict[str, str]) -> InputError:
    return type(error)(names.get(error.field, _ERROR_FIELDS.get(error.field, error.field)), error.message)


@dataclass
class NitridingOutcome:
    """What a nitriding plan gives: soaks for the drawing's minimum, aim and maximum nitrided depth."""

    setup: NitridingSetup
    low: NitridingResult
    aim: NitridingResult
    high: NitridingResult
    compound_window: tuple[float, float]
    kn_for_window: float | None
    cautions: list[Caution]
    targets: tuple[float, float, float]
    warnings: list[str] = field(default_factory=list)
    process: str = "nitriding"
    schedule: TwoStageSchedule | None = None  # two-stage nitriding: the stages of the aim's soak
    quote: Quote | None = None  # the whole cycle: load, purges, heat-up, nitriding, cool-down
    segments: list = field(default_factory=list)  # (label, hours, end temperature [K], K_N or None)
    potential_name: str = "nitriding potential K_N [atm^-½]"

    def timeline(self):
        """Temperature [K] and K_N against time [s] through the whole cycle, for plots (as
        :func:`casedepth.recipe.timeline`): (times, temperatures, potentials, labels)."""
        times, temps, pots, labels = [0.0], [ROOM], [math.nan], []
        now, t_now = 0.0, ROOM
        for label, hours, t_end, kn in self.segments:
            labels.append((now, now + hours * 3600.0, label))
            times += [now, now + hours * 3600.0]
            temps += [t_now, t_end]
            pots += [math.nan if kn is None else kn] * 2
            now, t_now = now + hours * 3600.0, t_end
        return np.array(times), np.array(temps), np.array(pots, dtype=float), labels

    @property
    def duration(self) -> float:
        return self.aim.time

    def depth_after(self, soak: float, setup: NitridingSetup | None = None) -> float:
        """One stage: the nitrided hardness depth [m] after ``soak`` [s] (optionally with another ``setup``)."""
        return nitride(setup or self.setup, soak).nitrided_depth

    def at(self, time: float) -> NitridingResult:
        time = max(time, 60.0)
        if self.schedule is None:
            return nitride(self.setup, time)
        return nitride(self.setup, time, layer=staged_layer_at(self.setup, self.schedule, time))


def nitriding_setup(plan: "Plan") -> NitridingSetup:
    try:
        return NitridingSetup(plan.steel_object(), float(plan.temperature), float(plan.kn),
                              plan.core_hardness, plan.surface_hardness, float(plan.n_multiplier))
    except InputError as error:
        field_name = {"nitriding potential": "kn", "core hardness": "core_hardness",
                      "nitrided surface hardness": "surface_hardness", "diffusivity multiplier": "n_multiplier"}.get(error.field, _ERROR_FIELDS.get(error.field, error.field))
        raise InputError(field_name, error.message) from None


def _curvature_warnings(plan: "Plan", depth: float) -> list[str]:
    """The nitriding models are for a flat surface: say so where the part's curvature matters."""
    try:
        geometry = Geometry(plan.shape, plan.size)
    except InputError:
        return []
    if geometry.shape == "plate":
        if geometry.finite and depth > 0.25 * geometry.half_section:
            return [f"The nitrided depth ({both_lengths(depth)}) is over a quarter of the half-thickness: the "
                    f"flat-surface model ignores the cases from the two faces meeting."]
        return []
    radius = geometry.size / 2.0
    if depth <= 0.1 * radius:
        return []
    sooner = "sooner" if geometry.shape in ("cylinder", "sphere") else "later"
    return [f"The nitrided depth ({both_lengths(depth)}) is over a tenth of the radius ({both_lengths(radius)}): the "
            f"nitriding models are for a flat surface, and on this {geometry.shape} the depth is reached {sooner} "
            f"than shown."]


def evaluate_nitriding(plan: "Plan") -> NitridingOutcome:
    setup = nitriding_setup(plan)
    low, aim, high = plan.targets()
    try:
        results = [nitriding_time(setup, depth) for depth in (low, aim, high)]
    except InputError as error:
        raise InputError({"target": "case_max"}.get(error.field, error.field), error.message) from None
    window = (plan.compound_min, plan.compound_max)
    warnings = list(results[1].warnings)
    warnings += _curvature_warnings(plan, high)
    try:
        # with two stages ticked, the plan's own schedule replaces the advice's
        advice = compound_layer_advice(setup, results[1], window, plan.kn_second, with_schedule=not plan.two_stage)
        kn_window = advice.kn_for_window
    except InputError as error:
        advice, kn_window = None, None
        warnings.append(f"Compound-layer window: {error.message}")
    schedule = None
    if plan.two_stage:
        try:
            schedule, staged = two_stage_for_depth(setup, aim, window, plan.kn_second)
        except InputError as error:
            field_name = {"second stage K_N": "kn_second", "compound layer": "compound_max"}.get(error.field, "case_max")
            raise InputError(field_name, error.message) from None
        results[1] = staged
        warnings.append(f"Two stages: {schedule.first_time / 3600:.1f} h at K_N {schedule.first_kn:.2f}, then "
                        f"{schedule.second_time / 3600:.1f} h at K_N {schedule.second_kn:.2f}; the drawing window's "
                        f"end times are for one stage at K_N {setup.nitriding_potential:.2f}.")
    elif advice is not None and advice.message:
        warnings.append(advice.message)
    soaks = ([(results[1].time, setup.nitriding_potential)] if schedule is None else
             [(schedule.first_time, schedule.first_kn), (schedule.second_time, schedule.second_kn)])
    try:
        shop = plan.shop_defaults()
    except InputError as error:
        raise InputError("shop", f"{error.field}: {error.message}") from None
    segments = nitriding_cycle(soaks, setup.temperature, shop)
    return NitridingOutcome(setup, *results, window, kn_window, safety.cautions(ammonia=True), (low, aim, high),
                            warnings, schedule=schedule, quote=nitriding_quote(segments, shop), segments=segments)


def evaluate(values: dict[str, Any]):
    """Solve a plan given as a snapshot of its values (safe to run off the window's thread).

    Returns a :class:`PlanOutcome` (carburizing) or a :class:`NitridingOutcome`. Raises
    :class:`InputError` naming the plan field at fault, or :class:`NotReachableError`.
    """
    plan = Plan(**values)
    if plan.treatment not in TREATMENTS:
        raise InputError("treatment", f"unknown treatment {plan.treatment!r}; choose one of {', '.join(TREATMENTS)}")
    if plan.treatment == "nitriding":
        return evaluate_nitriding(plan)
    if plan.process not in PROCESSES:
        raise InputError("process", f"unknown process {plan.process!r}; choose one of {', '.join(PROCESSES)}")
    setup = plan.setup()
    try:
        shop = plan.shop_defaults()
    except InputError as error:
        raise InputError("shop", f"{error.field}: {error.message}") from None
    low, aim, high = plan.targets()
    T = setup.temperature
    names = {"target": "case_max", "surface target": "surface_min", "boost potential": "boost_potential",
             "diffuse potential": "diffuse_potential"}
    try:
        if plan.process == "single":
            before, after = tuple(shop.before(T, setup.carbon_potential)), tuple(shop.after(T))
            if any(s.moves_carbon and s.duration > 0 for s in (*before, *after)):
                counted = plan_single_soak(setup, [low, aim, high], before, after)
                soak_times, cycle, isothermal = tuple(counted.soak_times), counted.cycle, None
                # the case that counts is the one at the end of the cycle, after the drop
                warnings = case_warnings(setup, cycle.case_depth, cycle.surface_carbon)
                warnings += [w for w in cycle.warnings if w not in warnings]
                soak = soak_times[1]
            else:
                isothermal = soak_times_for_case_depths(setup, [low, aim, high], size_for=aim)
                soak_times, cycle, warnings = None, None, list(isothermal[1].warnings)
                soak = isothermal[1].soak_time
            stages = [*before, Stage("soak", soak, T, setup.carbon_potential), *after]
            outcome = PlanOutcome(setup, plan.process, make_quote(stages, shop), [], stages, isothermal, cycle=cycle,
                                  soak_times=soak_times, warnings=warnings)
        elif plan.process == "boost-diffuse":
            planned = plan_boost_diffuse(setup, aim, (plan.surface_min, plan.surface_max), plan.boost_potential,
                                         plan.diffuse_potential, before=tuple(shop.before(T, plan.boost_potential)),
                                         after=tuple(shop.after(T)))
            stages = planned.cycle.stages
            outcome = PlanOutcome(setup, plan.process, make_quote(stages, shop), [], stages, cycle=planned.cycle,
                                  boost_time=planned.boost_time, diffuse_time=planned.diffuse_time,
                                  warnings=list(planned.cycle.warnings))
        else:
            stages = plan.stage_list()
            cycle = run_recipe(setup, stages)
            outcome = PlanOutcome(setup, plan.process, make_quote(stages, shop), [], stages, cycle=cycle,
                                  warnings=list(cycle.warnings))
    except InputError as error:
        raise _with_field(error, names) from None
    outcome.cautions = safety.cautions(setup.temperature, setup.equilibrium_carbon, setup.saturation_carbon)
    outcome.targets = (low, aim, high)
    outcome.carrier_co = shop.carrier_co_pct / 100.0
    try:
        outcome.probe = probe_setpoints(outcome.stages, outcome.carrier_co)
    except InputError:  # a stage outside the probe relation's range: no setpoint rather than no plan
        outcome.probe = []
    return outcome
