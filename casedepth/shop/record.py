"""The shop's furnace record: every load's plan and its measured coupons in one SQLite database.

One file (standard library :mod:`sqlite3`), in WAL mode so the window and the command line can read while one of
them writes; every write is one transaction, so a program killed in the middle of it leaves the database as it was
before that write (``tests/test_record.py`` kills writers at random moments). The schema has a version
(:data:`SCHEMA_VERSION`, the ``schema_version`` table); an older database is brought up to date by
:data:`MIGRATIONS`, one step per version, when it is opened.

Tables (SI inside: depths in m, soak in s; carbon in wt %, hardness in HV):

``furnaces``      name (unique), kind (pit, integral quench, vacuum, …), survey class, notes
``loads``         furnace, load number (unique per furnace), date, the plan as run (the whole plan file), the soak
                  actually run where it differed from the plan's (NULL: the plan's), parts, notes
``measurements``  per load and coupon: kind (``carbon`` profile by spectrometer or turned layers, ``hardness``
                  traverse; from schema 3 also one value: ``case_depth``, ``nitrided_depth``, ``compound_layer``,
                  ``surface_hardness``, ``core_hardness``, :data:`KINDS`), the hardness method and load (HV0.5, HV1,
                  HRC, …), who measured, when
``points``        depth and value of each reading of a measurement
``calibrations``  (schema 2) each fit of a furnace saved: when, the treatment, the fit (multipliers, intervals, the
                  β model of its loads, the grade it is of if one); new plans for that furnace take the latest of
                  their grade, else the latest of every grade (:meth:`Record.calibration`); all of them are the
                  furnace's trend (:meth:`Record.calibrations`)

CSV files as labs export them (:func:`read_csv`): a header row, then depth in mm and the value per row; commas,
semicolons (with decimal commas) or tabs; a bad row is refused with its row number.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
import sqlite3
import sys
from dataclasses import dataclass, field
from datetime import date as _date
from pathlib import Path
from typing import Iterable

from .. import formats
from ..errors import InputError
from ..models.hardness import SCALES, ASTM_E140_hrc_to_hv

SCHEMA_VERSION = 3


@dataclass(frozen=True)
class Kind:
    """A kind of measurement: a traverse (depth, value readings) or one value (its depth 0), the value's unit as
    shown and stored (SI for lengths: m), the range it may take (stored units) and the CLI option that gives it."""

    key: str
    label: str
    traverse: bool
    unit: str  # shown
    scale: float  # shown value = stored × scale
    low: float
    high: float


#: the kinds of measurement a record holds (schema 3 added the single values)
KINDS: dict[str, Kind] = {k.key: k for k in (
    Kind("carbon", "carbon profile", True, "%C", 1.0, 0.0, 2.5),
    Kind("hardness", "hardness traverse", True, "HV", 1.0, 50.0, 1500.0),
    Kind("case_depth", "effective case depth", False, "mm", 1e3, 0.01e-3, 10e-3),
    Kind("nitrided_depth", "nitrided hardness depth", False, "mm", 1e3, 0.01e-3, 2e-3),
    Kind("compound_layer", "compound layer", False, "µm", 1e6, 0.0, 100e-6),
    Kind("surface_hardness", "surface hardness", False, "HV", 1.0, 100.0, 1500.0),
    Kind("core_hardness", "core hardness", False, "HV", 1.0, 100.0, 1000.0),
)}
DEPTH_RANGE = (0.0, 20e-3)  # m from the surface

SCHEMA_1 = """
CREATE TABLE schema_version (version INTEGER NOT NULL);
CREATE TABLE furnaces (
    id INTEGER PRIMARY KEY,
    name TEXT NOT NULL UNIQUE,
    kind TEXT NOT NULL DEFAULT '',
    survey_class TEXT NOT NULL DEFAULT '',
    notes TEXT NOT NULL DEFAULT ''
);
CREATE TABLE loads (
    id INTEGER PRIMARY KEY,
    furnace_id INTEGER NOT NULL REFERENCES furnaces(id),
    number TEXT NOT NULL,
    date TEXT NOT NULL,
    plan_json TEXT NOT NULL,
    soak_s REAL,
    parts INTEGER,
    notes TEXT NOT NULL DEFAULT '',
    UNIQUE (furnace_id, number)
);
CREATE TABLE measurements (
    id INTEGER PRIMARY KEY,
    load_id INTEGER NOT NULL REFERENCES loads(id) ON DELETE CASCADE,
    coupon TEXT NOT NULL DEFAULT '',
    kind TEXT NOT NULL CHECK (kind IN ('carbon', 'hardness')),
    scale TEXT NOT NULL DEFAULT '',
    measured_by TEXT NOT NULL DEFAULT '',
    taken TEXT NOT NULL DEFAULT ''
);
CREATE TABLE points (
    measurement_id INTEGER NOT NULL REFERENCES measurements(id) ON DELETE CASCADE,
    depth_m REAL NOT NULL,
    value REAL NOT NULL
);
CREATE INDEX points_of_measurement ON points (measurement_id);
INSERT INTO schema_version (version) VALUES (1);
"""

#: version -> the step that brings a database of that version to the next (run in one transaction with the
#: version's update)
MIGRATIONS: dict[int, str] = {
    # schema 2 keeps each furnace's fits (what new plans for that furnace take): when, of which treatment, the fit
    1: """
CREATE TABLE calibrations (
    id INTEGER PRIMARY KEY,
    furnace_id INTEGER NOT NULL REFERENCES furnaces(id),
    made TEXT NOT NULL,
    treatment TEXT NOT NULL,
    fit_json TEXT NOT NULL
);
""",
    # schema 3 takes single values as well as traverses (a case depth, a compound layer, surface and core hardness):
    # the kinds' CHECK is widened by rebuilding the table (SQLite cannot alter a CHECK), its rows kept as they are
    2: """
CREATE TABLE measurements_3 (
    id INTEGER PRIMARY KEY,
    load_id INTEGER NOT NULL REFERENCES loads(id) ON DELETE CASCADE,
    coupon TEXT NOT NULL DEFAULT '',
    kind TEXT NOT NULL CHECK (kind IN ('carbon', 'hardness', 'case_depth', 'nitrided_depth', 'compound_layer',
                                       'surface_hardness', 'core_hardness')),
    scale TEXT NOT NULL DEFAULT '',
    measured_by TEXT NOT NULL DEFAULT '',
    taken TEXT NOT NULL DEFAULT ''
);
INSERT INTO measurements_3 SELECT id, load_id, coupon, kind, scale, measured_by, taken FROM measurements;
DROP TABLE measurements;
ALTER TABLE measurements_3 RENAME TO measurements;
""",
}


#: the record a window's settings chose for this process (:func:`use_database`), or None
_chosen: Path | None = None


def use_database(path: str | os.PathLike | None) -> None:
    """Make ``path`` the record of this process: the one new plans that name a furnace are calibrated from and the
    window's record views open (the window calls it with its settings' choice); None goes back to
    ``CASEDEPTH_RECORD`` or the platform's folder."""
    global _chosen
    _chosen = None if path is None else Path(path)


def default_database() -> Path:
    """Where the record lives: the one this process chose (:func:`use_database`, a window's settings), else
    ``CASEDEPTH_RECORD`` if set, else the platform's application data folder (the same folder Qt's
    ``QStandardPaths.AppDataLocation`` names)."""
    if _chosen is not None:
        return _chosen
    if os.environ.get("CASEDEPTH_RECORD"):
        return Path(os.environ["CASEDEPTH_RECORD"])
    if sys.platform.startswith("win"):
        base = Path(os.environ.get("APPDATA", Path.home() / "AppData" / "Roaming"))
    elif sys.platform == "darwin":
        base = Path.home() / "Library" / "Application Support"
    else:
        base = Path(os.environ.get("XDG_DATA_HOME") or Path.home() / ".local" / "share")
    return base / "casedepth" / "record.sqlite"


# -- the records ------------------------------------------------------------------------------------------------------
@dataclass
class Measurement:
    """One measured coupon: its kind, method, who, and the readings (depth [m], value)."""

    kind: str
    points: list[tuple[float, float]]
    coupon: str = ""
    scale: str = ""
    measured_by: str = ""
    taken: str = ""
    id: int | None = None

    def to_dict(self) -> dict:
        k = KINDS[self.kind]
        return {"kind": self.kind, "coupon": self.coupon, "scale": self.scale, "measured_by": self.measured_by,
                "taken": self.taken, "unit": k.unit,
                "points": [{"depth_mm": d * 1e3, "value": v * k.scale} for d, v in self.points]}


@dataclass
class Load:
    """A load as recorded: its furnace, number, date, the plan as run, the soak run (None: the plan's), measurements."""

    furnace: str
    number: str
    date: str
    plan: dict
    soak: float | None = None
    parts: int | None = None
    notes: str = ""
    measurements: list[Measurement] = field(default_factory=list)
    id: int | None = None

    def to_dict(self) -> dict:
        return {"furnace": self.furnace, "load": self.number, "date": self.date, "plan_title": self.plan.get("title", ""),
                "soak_h": None if self.soak is None else self.soak / 3600.0, "parts": self.parts, "notes": self.notes,
                "measurements": [m.to_dict() for m in self.measurements]}


def check_points(kind: str, points: Iterable[tuple[float, float]], field: str = "points") -> list[tuple[float, float]]:
    """Readings as stored: a traverse has at least three, depths increasing from the surface within 0–20 mm; a single
    value is one reading at depth 0; values in the kind's range; :class:`InputError` naming ``field`` otherwise."""
    if kind not in KINDS:
        raise InputError("kind", f"{kind!r} is not one of {', '.join(KINDS)}")
    k = KINDS[kind]
    out = []
    for number, (depth, value) in enumerate(points, 1):
        if not (math.isfinite(depth) and DEPTH_RANGE[0] <= depth <= DEPTH_RANGE[1]):
            raise InputError(field, f"reading {number}: depth {formats.typed(depth * 1e3, 'mm')} is outside 0–20 mm")
        if not (math.isfinite(value) and k.low <= value <= k.high):
            where = f"reading {number}: " if k.traverse else f"a {k.label} of "
            raise InputError(field, f"{where}{formats.typed(value * k.scale, k.unit)} is outside "
                                    f"{formats.typed_range(k.low * k.scale, k.high * k.scale, k.unit)}")
        if out and depth <= out[-1][0]:
            raise InputError(field, f"reading {number}: depths must increase from the surface "
                                    f"({formats.typed(depth * 1e3, 'mm')} after {formats.typed(out[-1][0] * 1e3, 'mm')})")
        out.append((float(depth), float(value)))
    if k.traverse and len(out) < 3:
        raise InputError(field, f"{len(out)} readings: a traverse needs at least 3")
    if not k.traverse and len(out) != 1:
        raise InputError(field, f"a {k.label} is one value, not {len(out)}")
    return out


def parse_measured(kind: str, text: str) -> float:
    """A single measured value as typed, in the stored units: a depth (0.95mm, 0.037in) [m], a layer (8um) [m] or a
    hardness (60HRC by ASTM E140, or 720HV) [HV]; :class:`InputError` naming ``kind``."""
    from ..units import parse_length, parse_number

    if kind in ("case_depth", "nitrided_depth"):
        return parse_length(text, kind)
    if kind == "compound_layer":
        return parse_length(text, kind, default_unit="um")
    words = str(text).strip().upper().replace(" ", "")
    if words.endswith("HRC"):
        hrc = parse_number(words[:-3], kind)
        if not 20.0 <= hrc <= 68.0:
            raise InputError(kind, f"{formats.typed(hrc, 'HRC')} is outside 20–68 HRC")
        return float(ASTM_E140_hrc_to_hv(hrc))
    return parse_number(words.removesuffix("HV"), kind)


def read_csv(text: str, kind: str, scale: str = "", field: str = "csv") -> list[tuple[float, float]]:
    """Readings from a lab's CSV: a header row, then depth [mm] and value per row (carbon wt %, or hardness in
    ``scale``: HV, or HRC turned into HV by ASTM E140). Commas, semicolons (decimal commas allowed) or tabs.
    A bad row is refused naming its row number (the header is row 1)."""
    lines = [line for line in text.splitlines()]
    if not lines or not lines[0].strip():
        raise InputError(field, "the file is empty: a header row, then depth in mm and the value per row")
    try:
        dialect = csv.Sniffer().sniff(lines[0] + "\n" + "\n".join(lines[1:3]), delimiters=",;\t")
        delimiter = dialect.delimiter
    except csv.Error:
        delimiter = ";" if ";" in lines[0] else ("\t" if "\t" in lines[0] else ",")
    rows = list(csv.reader(io.StringIO(text), delimiter=delimiter))
    points = []
    for number, row in enumerate(rows[1:], 2):
        cells = [c.strip() for c in row]
        if not any(cells):
            continue
        if len([c for c in cells if c]) != 2:
            raise InputError(field, f"row {number}: {len([c for c in cells if c])} values, expected 2 (depth in mm, "
                                    f"{'carbon in wt %' if kind == 'carbon' else 'hardness'})")
        depth_text, value_text = (c for c in cells if c)
        try:
            depth = float(depth_text.replace(",", ".") if delimiter != "," else depth_text) * 1e-3
        except ValueError:
            raise InputError(field, f"row {number}: depth {depth_text!r} is not a number (mm)") from None
        try:
            value = float(value_text.replace(",", ".") if delimiter != "," else value_text)
        except ValueError:
            raise InputError(field, f"row {number}: value {value_text!r} is not a number") from None
        if kind == "hardness" and scale == "HRC":
            if not 20.0 <= value <= 68.0:
                raise InputError(field, f"row {number}: {formats.typed(value, 'HRC')} is outside 20–68 HRC")
            value = float(ASTM_E140_hrc_to_hv(value))
        points.append((depth, value))
    try:
        return check_points(kind, points, field)
    except InputError as error:  # name the file's row, not the reading's number
        message = error.message
        if message.startswith("reading "):
            n = int(message.split()[1].rstrip(":"))
            message = f"row {n + 1}:" + message.split(":", 1)[1]
        raise InputError(field, message) from None


# -- the database -----------------------------------------------------------------------------------------------------
class Record:
    """An open furnace record. Use as a context manager, or call :meth:`close`."""

    def __init__(self, path: str | os.PathLike | None = None):
        self.path = Path(path) if path is not None else default_database()
        self.path.parent.mkdir(parents=True, exist_ok=True)
        try:
            self.db = sqlite3.connect(self.path, timeout=10.0)
            self.db.execute("PRAGMA foreign_keys = ON")
            self.db.execute("PRAGMA journal_mode = WAL")
            self.db.execute("PRAGMA synchronous = FULL")
            self._migrate()
        except sqlite3.DatabaseError as error:
            raise InputError("db", f"{self.path}: not a furnace record ({error})") from None

    def __enter__(self) -> Record:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def close(self) -> None:
        self.db.close()

    @property
    def version(self) -> int:
        return int(self.db.execute("SELECT version FROM schema_version").fetchone()[0])

    def _migrate(self) -> None:
        tables = {row[0] for row in self.db.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
        if not tables:  # a new record: the first schema, then every step (as an old record would take them)
            self.db.executescript("BEGIN;" + SCHEMA_1 + "COMMIT;")
            tables = {"schema_version"}
        if "schema_version" not in tables:
            raise InputError("db", f"{self.path}: an SQLite database, but not a furnace record")
        version = self.version
        if version > SCHEMA_VERSION:
            raise InputError("db", f"{self.path}: made by a newer casedepth (record schema {version}; this one reads "
                                   f"up to {SCHEMA_VERSION})")
        while version < SCHEMA_VERSION:  # one step per version, each in its own transaction, foreign keys off while a
            # step rebuilds a table (dropping it would otherwise cascade into the rows that refer to it)
            self.db.execute("PRAGMA foreign_keys = OFF")
            self.db.executescript(f"BEGIN;{MIGRATIONS[version]}UPDATE schema_version SET version = {version + 1};COMMIT;")
            self.db.execute("PRAGMA foreign_keys = ON")
            version += 1
        if self.db.execute("PRAGMA foreign_key_check").fetchall():
            raise InputError("db", f"{self.path}: its rows refer to rows that are not there")

    # -- writing (each call one transaction) --------------------------------------------------------------------
    def furnace_id(self, name: str, create: bool = False, kind: str = "") -> int:
        name = " ".join(str(name).split())
        if not name:
            raise InputError("furnace", "give the furnace's name")
        row = self.db.execute("SELECT id FROM furnaces WHERE name = ?", (name,)).fetchone()
        if row is not None:
            return int(row[0])
        if not create:
            known = [r[0] for r in self.db.execute("SELECT name FROM furnaces ORDER BY name")]
            raise InputError("furnace", f"no furnace {name!r} in the record; known: {', '.join(known) or 'none yet'}")
        return int(self.db.execute("INSERT INTO furnaces (name, kind) VALUES (?, ?)", (name, kind)).lastrowid)

    def describe_furnace(self, name: str, kind: str | None = None, survey_class: str | None = None,
                         notes: str | None = None) -> "Furnace":
        """Set a furnace's type (pit, integral quench, vacuum …), its AMS 2750 survey class (1–6, or empty) and notes,
        creating it if it is new; what is None is left as it was. One transaction."""
        if survey_class is not None:
            survey_class = str(survey_class).strip().lower().removeprefix("class").strip()
            if survey_class not in ("", "1", "2", "3", "4", "5", "6"):
                raise InputError("survey_class", f"{survey_class!r} is not an AMS 2750 furnace class (1–6)")
        for field_name, text, limit in (("kind", kind, 100), ("notes", notes, 2000)):
            if text is not None and len(str(text)) > limit:
                raise InputError(field_name, f"{len(str(text))} characters; at most {limit}")
        with self.db:
            furnace_id = self.furnace_id(name, create=True)
            for column, value in (("kind", kind), ("survey_class", survey_class), ("notes", notes)):
                if value is not None:
                    self.db.execute(f"UPDATE furnaces SET {column} = ? WHERE id = ?", (str(value).strip(), furnace_id))
        return self.furnace(name)

    def furnace(self, name: str) -> "Furnace":
        """A furnace of the record (refused, naming the known ones, if there is none of that name)."""
        furnace_id = self.furnace_id(name)
        row = self.db.execute("SELECT name, kind, survey_class, notes FROM furnaces WHERE id = ?", (furnace_id,)).fetchone()
        return Furnace(*row)

    def add_load(self, furnace: str, number: str, plan: dict, day: str | None = None, soak: float | None = None,
                 parts: int | None = None, notes: str = "", measurements: Iterable[Measurement] = ()) -> int:
        """Record a load (and any measurements of it) in one transaction; returns its id."""
        number = str(number).strip()
        if not number:
            raise InputError("load", "give the load's number")
        day = day or _date.today().isoformat()
        try:
            _date.fromisoformat(day)
        except ValueError:
            raise InputError("date", f"{day!r} is not a date (YYYY-MM-DD)") from None
        if soak is not None and not (math.isfinite(soak) and 60.0 <= soak <= 500 * 3600.0):
            raise InputError("soak", f"{soak / 3600:g} h is outside 1 min–500 h")
        with self.db:
            furnace_id = self.furnace_id(furnace, create=True)
            try:
                load_id = int(self.db.execute(
                    "INSERT INTO loads (furnace_id, number, date, plan_json, soak_s, parts, notes) VALUES (?, ?, ?, ?, ?, ?, ?)",
                    (furnace_id, number, day, json.dumps(plan), soak, parts, notes)).lastrowid)
            except sqlite3.IntegrityError:
                raise InputError("load", f"load {number!r} of {furnace!r} is already in the record") from None
            for measurement in measurements:
                self._insert_measurement(load_id, measurement)
        return load_id

    def add_measurement(self, load_number: str, measurement: Measurement, furnace: str | None = None) -> int:
        """Record a measured coupon of a recorded load (one transaction); returns its id."""
        load_id = self._load_id(load_number, furnace)
        with self.db:
            return self._insert_measurement(load_id, measurement)

    def _insert_measurement(self, load_id: int, m: Measurement) -> int:
        points = check_points(m.kind, m.points, "points" if m.kind not in KINDS or KINDS[m.kind].traverse else m.kind)
        if m.kind == "hardness" and m.scale and m.scale not in SCALES:
            raise InputError("scale", f"{m.scale!r} is not one of {', '.join(SCALES)}")
        measurement_id = int(self.db.execute(
            "INSERT INTO measurements (load_id, coupon, kind, scale, measured_by, taken) VALUES (?, ?, ?, ?, ?, ?)",
            (load_id, m.coupon, m.kind, m.scale, m.measured_by, m.taken)).lastrowid)
        self.db.executemany("INSERT INTO points (measurement_id, depth_m, value) VALUES (?, ?, ?)",
                            [(measurement_id, d, v) for d, v in points])
        return measurement_id

    def _load_id(self, number: str, furnace: str | None) -> int:
        query = "SELECT loads.id, furnaces.name FROM loads JOIN furnaces ON furnaces.id = loads.furnace_id WHERE number = ?"
        rows = self.db.execute(query + ("" if furnace is None else " AND furnaces.name = ?"),
                               (number,) if furnace is None else (number, " ".join(furnace.split()))).fetchall()
        if not rows:
            raise InputError("load", f"no load {number!r} in the record" + ("" if furnace is None else f" for {furnace!r}"))
        if len(rows) > 1:
            raise InputError("load", f"load {number!r} is in the record of {', '.join(r[1] for r in rows)}: name the "
                                     f"furnace")
        return int(rows[0][0])

    def save_calibration(self, furnace: str, treatment: str, fit: dict, made: str | None = None) -> int:
        """Keep a furnace's fit (:meth:`casedepth.shop.furnace_fit.FurnaceFit.to_dict` and the β model of its loads)
        as the one new plans for the furnace take; one transaction."""
        made = made or _date.today().isoformat()
        with self.db:
            furnace_id = self.furnace_id(furnace)
            return int(self.db.execute("INSERT INTO calibrations (furnace_id, made, treatment, fit_json) VALUES "
                                       "(?, ?, ?, ?)", (furnace_id, made, treatment, json.dumps(fit))).lastrowid)

    def calibration(self, furnace: str, treatment: str, grade: str | None = None) -> "SavedCalibration | None":
        """The fit new plans of ``treatment`` for ``furnace`` take: the latest saved fit of the plan's steel ``grade``
        where there is one, else the latest of the furnace's every grade (None if neither, or no such furnace)."""
        fits = self.calibrations(furnace, treatment)[::-1]
        return (next((saved for saved in fits if same_grade(saved.grade, grade)), None)
                or next((saved for saved in fits if saved.grade is None), None))

    def calibrations(self, furnace: str, treatment: str | None = None) -> "list[SavedCalibration]":
        """Every saved fit of ``furnace`` (of ``treatment``), oldest first: the furnace's trend."""
        name = " ".join(str(furnace).split())
        query = ("SELECT calibrations.id, made, fit_json, treatment FROM calibrations JOIN furnaces ON "
                 "furnaces.id = furnace_id WHERE furnaces.name = ?")
        args: tuple = (name,)
        if treatment is not None:
            query += " AND treatment = ?"
            args += (treatment,)
        return [SavedCalibration(name, row[3], row[1], json.loads(row[2]), int(row[0]))
                for row in self.db.execute(query + " ORDER BY made, calibrations.id", args).fetchall()]

    # -- reading ---------------------------------------------------------------------------------------------------
    def furnaces(self) -> list[str]:
        return [r[0] for r in self.db.execute("SELECT name FROM furnaces ORDER BY name")]

    def loads(self, furnace: str | None = None) -> list[Load]:
        """The recorded loads (of one furnace), oldest first, with their measurements."""
        query = ("SELECT loads.id, furnaces.name, number, date, plan_json, soak_s, parts, loads.notes FROM loads "
                 "JOIN furnaces ON furnaces.id = loads.furnace_id")
        args: tuple = ()
        if furnace is not None:
            self.furnace_id(furnace)  # refuses an unknown furnace, naming the known ones
            query += " WHERE furnaces.name = ?"
            args = (" ".join(furnace.split()),)
        out = []
        for load_id, name, number, day, plan, soak, parts, notes in self.db.execute(query + " ORDER BY date, loads.id",
                                                                                      args).fetchall():
            load = Load(name, number, day, json.loads(plan), soak, parts, notes, id=load_id)
            for m_id, coupon, kind, scale, by, taken in self.db.execute(
                    "SELECT id, coupon, kind, scale, measured_by, taken FROM measurements WHERE load_id = ? ORDER BY id",
                    (load_id,)).fetchall():
                points = [(d, v) for d, v in self.db.execute(
                    "SELECT depth_m, value FROM points WHERE measurement_id = ? ORDER BY depth_m", (m_id,))]
                load.measurements.append(Measurement(kind, points, coupon, scale, by, taken, id=m_id))
            out.append(load)
        return out


def grade_of(load: Load) -> str:
    """The steel grade a load's plan names (as typed in the plan: a library grade or a composition)."""
    return " ".join(str(load.plan.get("steel", "")).split())


def same_grade(a: str | None, b: str | None) -> bool:
    """Whether two grade names are the same grade (spacing and case aside); None is no grade."""
    return a is not None and b is not None and " ".join(a.split()).casefold() == " ".join(b.split()).casefold()


@dataclass(frozen=True)
class Furnace:
    """A furnace of the record: its name, type, AMS 2750 survey class (1–6, empty if not said) and notes."""

    name: str
    kind: str = ""
    survey_class: str = ""
    notes: str = ""

    def text(self) -> str:
        parts = [self.kind or "type not said",
                 f"AMS 2750 class {self.survey_class}" if self.survey_class else "survey class not said"]
        return f"{self.name}: {', '.join(parts)}" + (f"; {self.notes}" if self.notes else "")

    def to_dict(self) -> dict:
        return {"furnace": self.name, "kind": self.kind, "survey_class": self.survey_class, "notes": self.notes}


@dataclass(frozen=True)
class SavedCalibration:
    """A furnace's saved fit: when it was made, of which treatment, and the fit's JSON."""

    furnace: str
    treatment: str
    made: str
    fit: dict
    id: int

    @property
    def grade(self) -> str | None:
        """The steel grade the fit is of (None: every grade the furnace ran)."""
        return self.fit.get("grade")

    def label(self, taken: list[str] | None = None) -> str:
        """What a plan records of it: ``Pit 2: record fit #3 of 2026-12-04 (D × 0.951, β × 1.18)``, with ``, grade
        8620`` after the furnace for a grade's fit; ``taken``: the parts a plan took (default: every multiplier)."""
        if taken is None:
            taken = [f"{name} × {self.fit[key]:.3g}" for key, name in (("diffusivity_multiplier", "D"),
                                                                       ("beta_factor", "β"),
                                                                       ("nitrogen_diffusivity_multiplier", "D_N"),
                                                                       ("strength_multiplier", "nitrides' HV"))
                     if key in self.fit]
        which = self.furnace if self.grade is None else f"{self.furnace}, grade {self.grade}"
        return f"{which}: record fit #{self.id} of {self.made} ({', '.join(taken)})"
