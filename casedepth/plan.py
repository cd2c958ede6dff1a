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
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Callable

from . import safety, steels
from .carburizing import CarburizingResult, CarburizingSetup, soak_times_for_case_depths
from .diffusivity import Diffusivity
from .errors import InputError
from .geometry import Geometry
from .safety import Caution
from .steels import Steel
from .surface import DEFAULT_BETA
from .units import ZERO_CELSIUS, Threshold

SCHEMA_VERSION = 1
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
}

# library error fields -> plan fields, so the window can mark the right widget
_ERROR_FIELDS = {
    "temperature": "temperature", "carbon potential": "carbon_potential", "threshold": "threshold_value",
    "hardness": "threshold_value", "beta": "beta", "diameter": "size", "thickness": "size", "geometry": "shape",
    "steel": "composition", "composition": "composition", "diffusivity multiplier": "d_multiplier",
    "D0": "d0", "Q": "q", "hardness relation": "hardness_relation", "diffusivity": "diffusivity",
}


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
            raise InputError("case_max", f"the maximum case depth must not be below the minimum ({low * 1e3:g} mm)")
        if not (0.0 <= aim <= 1.0):
            raise InputError("aim", f"{aim * 100:g} % of the window is outside 0–100 %")
        return low, low + aim * (high - low), high

    def setup(self) -> CarburizingSetup:
        """The validated carburizing setup; an :class:`InputError` names the plan field at fault."""
        v = self._values
        try:
            diffusivity = Diffusivity(v["diffusivity"], float(v["d_multiplier"]), float(v["d0"]), float(v["q"]))
            return CarburizingSetup(
                steel=self.steel_object(),
                temperature=float(v["temperature"]),
                carbon_potential=float(v["carbon_potential"]),
                threshold=Threshold(float(v["threshold_value"]), v["threshold_kind"]),
                diffusivity=diffusivity,
                beta=math.inf if v["beta_held"] else float(v["beta"]),
                alloy_factor_on=bool(v["alloy_factor"]),
                geometry=Geometry(v["shape"], v["size"]),
                hardness_relation=v["hardness_relation"],
            )
        except InputError as error:
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
        plan = cls(**values)
        return plan

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
    # schema 1 is the first; later versions add their step here, e.g. ``if version == 1: …; version = 2``
    return data


@dataclass
class PlanOutcome:
    """What a plan gives: soaks for the drawing's minimum, aim and maximum case depth, and the cautions."""

    setup: CarburizingSetup
    low: CarburizingResult
    aim: CarburizingResult
    high: CarburizingResult
    cautions: list[Caution]

    @property
    def warnings(self) -> list[str]:
        return self.aim.warnings


def evaluate(values: dict[str, Any]) -> PlanOutcome:
    """Solve a plan given as a snapshot of its values (safe to run off the window's thread).

    Raises :class:`InputError` naming the plan field at fault, or :class:`NotReachableError`.
    """
    plan = Plan(**values)
    setup = plan.setup()
    low, aim, high = plan.targets()
    try:
        results = soak_times_for_case_depths(setup, [low, aim, high], size_for=aim)
    except InputError as error:
        field = {"target": "case_max"}.get(error.field, _ERROR_FIELDS.get(error.field, error.field))
        raise type(error)(field, error.message) from None
    caution_list = safety.cautions(setup.temperature, setup.equilibrium_carbon, setup.saturation_carbon)
    return PlanOutcome(setup, results[0], results[1], results[2], caution_list)
