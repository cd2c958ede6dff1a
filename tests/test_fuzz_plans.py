"""Seeded fuzzing of plan files (issue 11, item 7): corrupted copies of the example and old-schema plans.

The variants come from every plan in ``resources/examples`` and ``tests/data/plans`` (schemas 1 to 4) and from
three plans of the current schema made here (stages of one's own, two-stage nitriding, a carburizing plan with
every choice away from its default), in families: cut short at random bytes; every key (recursively: inside
``shop``, the stages and the composition too) given each wrong value (text, number, list, table, null, true,
NaN, Infinity, -Infinity, 1e308, -1e308, 1e-320, 1e400, integers of 400 and 5,000 digits, a 100,000-character
text, a lone surrogate, lists nested 600 and 10,000 deep, written as JSON text); every key removed, one at a
time; unknown keys added; stage lists with unknown kinds, no stages, 100, 101 and 10,000 stages; the file as a
JSON list, number, text or nothing; a 10 MB file and a 4.9 MB one; invalid UTF-8, a byte-order mark, UTF-16;
and numbers of the right type at the ends of their ranges and just beyond (every number of the parameter table,
the shop and the composition).

What it checks, for each variant: ``casedepth.plan.load`` returns a Plan or raises PlanFileError, nothing else;
a key of the current schema that is missing, or a value of the wrong type, is refused naming the key (or,
where the file's schema did not hold it yet, filled); unknown keys are refused naming them. If the plan
loads: ``evaluate(plan.values())`` returns or raises a CasedepthError, and its numbers (``to_dict``, the
profile columns, the soaks) hold no NaN or infinity, nor does its text; saving it and loading it again gives
the same values; ``casedepth run FILE --json`` exits 0, 1 or 2 as the library's answer says (0 if it
evaluated, 2 for bad input, 1 if the solver stopped), with strict JSON and without a traceback; and, on a
few of them, ``casedepth sheet FILE --pdf OUT`` writes a whole PDF or refuses in one line. Every step runs
under a timer (a hang is a failure).

Run it bigger:   CASEDEPTH_FUZZ_SCALE=50 pytest tests/test_fuzz_plans.py    (50 times the variants; at 70
                 every family runs whole: every key of every base given every wrong value, about 12,000 files)
Other variants:  CASEDEPTH_FUZZ_SEED=7 pytest tests/test_fuzz_plans.py
Replay:          a failure names the variant and keeps its file; python tests/test_fuzz_plans.py FILE runs
                 the same checks on that file
"""

from __future__ import annotations

import copy
import json
import math
import os
import random
import re
import shutil
import signal
import sys
import traceback
from collections import Counter
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Callable

import numpy as np
import pytest

from casedepth.errors import CasedepthError, InputError, SolverError
from casedepth.parameters import PARAMETERS
from casedepth.plan import Plan, PlanFileError, evaluate, load, save, to_dict
from casedepth.plan.fileformat import HEADER_KEYS, LARGEST_FILE
from casedepth.units import DisplayUnits

sys.path.insert(0, str(Path(__file__).resolve().parent))
from test_fuzz_cli import NUMBER_NAN, SCALE, SEED, Hang, call, check as check_line, _snapshot as snapshot  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
HANG_AFTER = 20.0  # s, for each step (load, evaluate, save, run, sheet)

#: variants per family at scale 1 (a family with fewer variants runs them all)
COUNTS = {"truncated": 30, "wrong_type": 150, "removed": 40, "removed_top_level": 10_000, "unknown_key": 60,
          "stages": 30, "whole_file": 100, "size": 10, "encoding": 30, "extreme": 40}
SHEETS = 1  # variants per family that also print a process sheet at scale 1 (about 0.5 s each)

BY_FILE_KEY = {row.file_key: row for row in PARAMETERS.values()}


# -- the plans the variants come from -----------------------------------------------------------------------------
def _generated() -> dict[str, dict]:
    stages = [{"kind": "heat-up", "duration_h": 1.0, "temperature_c": 930.0, "carbon_potential_pct": 1.0},
              {"kind": "boost", "duration_h": 3.0, "temperature_c": 930.0, "carbon_potential_pct": 1.15},
              {"kind": "diffuse", "duration_h": 1.5, "temperature_c": 930.0, "carbon_potential_pct": 0.8,
               "start_potential_pct": 1.0},
              {"kind": "drop", "duration_h": 0.5, "temperature_c": 850.0, "carbon_potential_pct": 0.8},
              {"kind": "quench", "duration_h": 0.25}]
    shop = {"load_h": 0.5, "furnace_rate_per_h": 120.0, "parts_per_load": 40, "currency": "EUR", "carrier_co_pct": 21.0}
    recipe = Plan(title="Stages of one's own (fuzz base)", process="stages", stages=stages, shop=shop)
    nitrided = Plan("nitriding", title="Two-stage nitriding (fuzz base)", two_stage=True, kn_second=0.4,
                    core_hardness=300.0, surface_hardness=700.0, shape="cylinder", size=25e-3)
    carburized = Plan(title="Every choice changed (fuzz base)", steel="20MnCr5", shape="sphere", size=20e-3,
                      diffusivity="arrhenius", d0=2.0e-5, q=140e3, beta_held=True, threshold_kind="HRC",
                      threshold_value=52.0, hardness_relation="as-quenched", alloy_factor=False, aim=0.3,
                      count_shop_stages=False, notes="two lines\nof notes")
    return {f"current-{name}": to_dict(plan) for name, plan in
            (("stages", recipe), ("nitriding", nitrided), ("carburizing", carburized))}


def _bases() -> dict[str, tuple[bytes, dict]]:
    out = {}
    for path in [*sorted((ROOT / "resources" / "examples").glob("*.cdplan.json")),
                 *sorted((ROOT / "tests" / "data" / "plans").glob("schema-*.cdplan.json"))]:
        raw = path.read_bytes()
        out[path.name] = (raw, json.loads(raw))
    for name, data in _generated().items():
        out[name] = (json.dumps(data, indent=2, ensure_ascii=False).encode(), data)
    return out


BASES = _bases()


# -- variants ----------------------------------------------------------------------------------------------------
@dataclass
class Variant:
    base: str
    family: str
    detail: str
    make: Callable[[], bytes]
    #: what this family demands beyond the general checks: (parsed JSON or None, plan or None, error or None)
    #: -> a problem or None
    expect: Callable[[Any, Plan | None, PlanFileError | None], str | None] | None = None

    def describe(self) -> str:
        return f"{self.family}: {self.base}: {self.detail}"


MARK = "@@casedepth-fuzz-value@@"

WRONG = {
    "text": '"fuzz"', "empty text": '""', "number": "42", "zero": "0", "minus one": "-1", "list": "[1, 2]",
    "empty list": "[]", "table": '{"a": 1}', "empty table": "{}", "null": "null", "true": "true", "false": "false",
    "NaN": "NaN", "Infinity": "Infinity", "-Infinity": "-Infinity", "1e308": "1e308", "-1e308": "-1e308",
    "1e-320": "1e-320", "1e400": "1e400", "a 400-digit integer": "1" + "0" * 400, "a 5000-digit integer": "7" * 5000,
    "a 100,000-character text": '"' + "x" * 100_000 + '"', "a lone surrogate": '"\\ud800"',
    "text with a NUL": '"a\\u0000b"', "lists nested 600 deep": "[" * 600 + "]" * 600,
    "lists nested 10,000 deep": "[" * 10_000 + "]" * 10_000, "tables nested 600 deep": '{"a": ' * 600 + "1" + "}" * 600,
}


def _path_text(path: tuple) -> str:
    return "".join(f"[{p}]" if isinstance(p, int) else (f".{p}" if i else str(p)) for i, p in enumerate(path))


def _paths(data, prefix: tuple = ()):
    """Every key and list index, depth first (the path to it)."""
    items = data.items() if isinstance(data, dict) else enumerate(data) if isinstance(data, list) else ()
    for key, value in items:
        yield prefix + (key,)
        yield from _paths(value, prefix + (key,))


def _set(data, path: tuple, value, delete: bool = False):
    data = copy.deepcopy(data)
    holder = data
    for key in path[:-1]:
        holder = holder[key]
    if delete:
        del holder[path[-1]]
    else:
        holder[path[-1]] = value
    return data


def _text(data) -> str:
    return json.dumps(data, indent=2, ensure_ascii=False)


def _raw(data, path: tuple, raw: str) -> bytes:
    """``data`` with the value at ``path`` written as the raw JSON text ``raw``."""
    return _text(_set(data, path, MARK)).replace(json.dumps(MARK), raw, 1).encode("utf-8", "surrogatepass")


def _parses(parsed) -> bool:
    return parsed is not _UNPARSED


_UNPARSED = object()


def _names(key: str) -> Callable:
    """A refusal of a file that is valid JSON must name ``key``."""
    def expect(parsed, plan, error):
        if error is not None and _parses(parsed) and key not in str(error):
            return f"refused without naming {key!r}: {error}"
        return None
    return expect


def _refused(words: str | None = None) -> Callable:
    def expect(parsed, plan, error):
        if error is None:
            return "loaded; it must be refused"
        if words is not None and words not in str(error):
            return f"refused without naming {words!r}: {error}"
        return None
    return expect


def truncated(rng: random.Random) -> list[Variant]:
    out = []
    for name, (raw, _) in BASES.items():
        for cut in sorted(rng.sample(range(len(raw)), 12)):
            out.append(Variant(name, "truncated", f"the first {cut} of {len(raw)} bytes", lambda raw=raw, cut=cut: raw[:cut]))
    return out


def wrong_type(rng: random.Random) -> list[Variant]:
    out = []
    for name, (_, data) in BASES.items():
        for path in _paths(data):
            for what, raw in WRONG.items():
                expect = None if path[0] in HEADER_KEYS else _names(path[0])
                out.append(Variant(name, "wrong_type", f"{_path_text(path)} = {what}",
                                   lambda data=data, path=path, raw=raw: _raw(data, path, raw), expect))
    return out


def _removed_expect(version: int, key: str) -> Callable:
    row = BY_FILE_KEY.get(key)

    def expect(parsed, plan, error):
        if key in HEADER_KEYS or (row is not None and row.since <= version):
            if error is None:
                return f"loaded without {key!r}, which every file of schema {version} holds: it must be refused"
            if key != "kind" and key not in str(error):
                return f"refused without naming {key!r}: {error}"
        elif error is None and row is not None and row.used_by(plan.values()) and not any(key in note for note in plan.file_notes):
            return f"{key!r} was filled but plan.file_notes do not say so: {plan.file_notes}"
        return None
    return expect


def removed_top_level(rng: random.Random) -> list[Variant]:
    """Every top-level key of every base removed: refused naming it (if the file's schema holds it) or filled."""
    out = []
    for name, (_, data) in BASES.items():
        for key in data:
            out.append(Variant(name, "removed_top_level", f"without {key}",
                               lambda data=data, key=key: _text(_set(data, (key,), None, delete=True)).encode(),
                               _removed_expect(data["schema_version"], key)))
    return out


def removed(rng: random.Random) -> list[Variant]:
    """Every key below the top level (shop entries, stage entries, stages, elements) removed."""
    out = []
    for name, (_, data) in BASES.items():
        for path in _paths(data):
            if len(path) > 1:
                out.append(Variant(name, "removed", f"without {_path_text(path)}",
                                   lambda data=data, path=path: _text(_set(data, path, None, delete=True)).encode(),
                                   _names(path[0])))
    return out


def unknown_key(rng: random.Random) -> list[Variant]:
    out = []
    keys = ["fuzz_unknown", "", "Title", "title ", "kind\u0000", "k" * 10_000, "__proto__", "schema_version2"]
    for name, (_, data) in BASES.items():
        tables = [()] + [path for path in _paths(data) if isinstance(_get(data, path), dict)]
        for path in tables:
            for key in keys:
                def make(data=data, path=path, key=key):
                    changed = copy.deepcopy(data)
                    _get(changed, path)[key] = 1.0
                    return _text(changed).encode()
                where = _path_text(path) or "the top level"
                expect = _refused(key[:40] if not path else path[0])
                if path == ("composition_pct",):
                    expect = _refused("composition_pct")
                out.append(Variant(name, "unknown_key", f"{key[:40]!r}{'…' if len(key) > 40 else ''} added at {where}",
                                   make, expect))
    return out


def _get(data, path: tuple):
    for key in path:
        data = data[key]
    return data


def stages(rng: random.Random) -> list[Variant]:
    soak = {"kind": "soak", "duration_h": 0.5, "temperature_c": 925.0, "carbon_potential_pct": 1.0}
    lists = {
        "an unknown kind": ([{**soak, "kind": "bake"}], None),
        "a kind in capitals": ([{**soak, "kind": "SOAK"}], None),
        "a kind of null": ([{**soak, "kind": None}], None),
        "an empty stage": ([{}], None),
        "stages that are not tables": ([1, "soak", None, []], _refused("stages")),
        "no stages": ([], None),
        "100 stages": ([soak] * 100, None),
        "101 stages": ([soak] * 101, _refused("stages")),
        "10,000 stages": ([soak] * 10_000, _refused("stages")),
        "a stage of 200 h": ([{**soak, "duration_h": 200.0}], None),
        "a stage of 1e308 h": ([{**soak, "duration_h": 1e308}], None),
        "a stage of -1 h": ([{**soak, "duration_h": -1.0}], None),
        "a stage of 0 h": ([{**soak, "duration_h": 0.0}], None),
        "a stage at 1e308 °C": ([{**soak, "temperature_c": 1e308}], None),
        "a stage at -300 °C": ([{**soak, "temperature_c": -300.0}], None),
        "a stage at potential -1": ([{**soak, "carbon_potential_pct": -1.0}], None),
        "a drop above the soak": ([soak, {**soak, "kind": "drop", "temperature_c": 950.0}], None),
        "only stages that move no carbon": ([{"kind": "quench", "duration_h": 1.0}, {"kind": "wash", "duration_h": 1.0}],
                                            None),
        "a temper with a potential": ([soak, {"kind": "temper", "duration_h": 2.0, "temperature_c": 180.0,
                                              "carbon_potential_pct": 1.0}], None),
    }
    out = []
    for name, (_, data) in BASES.items():
        if data["schema_version"] < 2:
            continue
        for what, (value, expect) in lists.items():
            for process in ("stages", data.get("process", "single")):
                changed = {**data, "stages": value, "process": process}
                out.append(Variant(name, "stages", f"{what}, process {process}",
                                   lambda changed=changed: _text(changed).encode(), expect))
    return out


def whole_file(rng: random.Random) -> list[Variant]:
    refused = _refused()
    texts = {"a JSON list": "[1, 2, 3]", "an empty list": "[]", "a number": "42", "text": '"casedepth plan"',
             "null": "null", "true": "true", "NaN": "NaN", "an empty table": "{}", "nothing": "",
             "whitespace": " \n\t ", "the kind alone": '{"kind": "casedepth plan"}',
             "kind and schema 5 alone": '{"kind": "casedepth plan", "schema_version": 5}',
             "kind and schema 1 alone": '{"kind": "casedepth plan", "schema_version": 1}',
             "schema 0": '{"kind": "casedepth plan", "schema_version": 0}',
             "schema 99": '{"kind": "casedepth plan", "schema_version": 99}',
             "schema 1.5": '{"kind": "casedepth plan", "schema_version": 1.5}',
             "schema true": '{"kind": "casedepth plan", "schema_version": true}',
             "schema 1e400": '{"kind": "casedepth plan", "schema_version": 1e400}',
             "schema with 5000 digits": '{"kind": "casedepth plan", "schema_version": ' + "9" * 5000 + "}",
             "lists nested 10,000 deep": "[" * 10_000 + "]" * 10_000,
             "tables nested 100,000 deep": '{"a":' * 100_000 + "1" + "}" * 100_000,
             "lists opened 1,000,000 deep, never closed": "[" * 1_000_000}
    out = [Variant("(none)", "whole_file", what, lambda text=text: text.encode(), refused) for what, text in texts.items()]
    for name, (raw, data) in BASES.items():
        out.append(Variant(name, "whole_file", "written twice", lambda raw=raw: raw + raw, refused))
        out.append(Variant(name, "whole_file", "inside a list", lambda raw=raw: b"[" + raw + b"]", refused))
        out.append(Variant(name, "whole_file", "every key twice (the second value wins)",
                           lambda data=data: ("{" + ",".join(f"{json.dumps(k)}: {json.dumps(v)}" for k, v in
                                                            [*data.items(), *data.items()]) + "}").encode()))
    return out


def size(rng: random.Random) -> list[Variant]:
    name = "pinion-shaft.cdplan.json"
    raw, data = BASES[name]
    room = LARGEST_FILE - len(raw) - 1000
    return [
        Variant(name, "size", "10 MB of spaces before the end", lambda: raw.rstrip()[:-1] + b" " * 10_000_000 + b"}",
                _refused()),
        Variant(name, "size", "10 MB notes", lambda: _text({**data, "notes": "n" * 10_000_000}).encode(), _refused()),
        Variant(name, "size", f"{room / 1e6:.1f} MB of spaces (under the limit)",
                lambda: raw.rstrip()[:-1] + b" " * room + b"}"),
        Variant(name, "size", f"{room / 1e6:.1f} MB of notes (under the file limit)",
                lambda: _text({**data, "notes": "n" * room}).encode(), _refused("notes")),
        Variant(name, "size", "20,000 characters of notes (the most they may hold)",
                lambda: _text({**data, "notes": "n" * 20_000}).encode()),
        Variant(name, "size", "a 200-character title (the most it may hold)",
                lambda: _text({**data, "title": "t" * 200}).encode()),
        Variant(name, "size", "a 201-character title", lambda: _text({**data, "title": "t" * 201}).encode(),
                _refused("title")),
    ]


def encoding(rng: random.Random) -> list[Variant]:
    out = []
    for name, (raw, data) in BASES.items():
        for _ in range(2):
            at = rng.randrange(len(raw))
            byte = rng.choice([b"\xff", b"\xc3", b"\x80", b"\xed\xa0\x80", b"\x00"])
            out.append(Variant(name, "encoding", f"{byte!r} inserted at byte {at}",
                               lambda raw=raw, at=at, byte=byte: raw[:at] + byte + raw[at:]))
        out.append(Variant(name, "encoding", "a UTF-8 byte-order mark", lambda raw=raw: b"\xef\xbb\xbf" + raw))
        out.append(Variant(name, "encoding", "UTF-16 with its byte-order mark",
                           lambda raw=raw: raw.decode("utf-8").encode("utf-16")))
        out.append(Variant(name, "encoding", "notes in Latin-1 (Härterei)",
                           lambda data=data: _text({**data, "notes": "Härterei"}).encode("latin-1", "replace")))
        out.append(Variant(name, "encoding", "Windows line ends", lambda raw=raw: raw.replace(b"\n", b"\r\n")))
        out.append(Variant(name, "encoding", "a title with control characters and a right-to-left mark",
                           lambda data=data: _text({**data, "title": "a\tb\rc\x1b[31m\u202ed"}).encode()))
    return out


def extreme(rng: random.Random) -> list[Variant]:
    """Numbers of the right type at the ends of what they may be: each range's ends and just beyond, the largest
    magnitude a plan may hold and beyond, for every number of the table, the shop and the composition. The
    evaluation must answer each (a result or a refusal), never NaN."""
    from casedepth.models.steels import ELEMENT_LIMITS
    from casedepth.parameters import MAGNITUDE, Quantity
    from casedepth.shop.quote import ShopDefaults
    import dataclasses

    def ends(low: float, high: float) -> list[tuple[str, float]]:
        return [("the lowest allowed", low), ("the highest allowed", high), ("just below the lowest", low - 1e-9 *
                max(1.0, abs(low))), ("just above the highest", high + 1e-9 * max(1.0, abs(high)))]

    out = []
    for name, (_, data) in BASES.items():
        try:
            values = load_bytes(BASES[name][0]).values()
        except PlanFileError:
            continue
        choices = []
        for file_key in data:
            row = BY_FILE_KEY.get(file_key)
            if row is None or not isinstance(row.kind, Quantity):
                continue
            unit = row.kind.unit
            span = row.allowed(values)
            if span is not None:
                choices += [((file_key,), what, low_high * unit.scale + unit.offset)
                            for what, low_high in ends(*span)]
            choices += [((file_key,), "the largest magnitude a plan holds", MAGNITUDE),
                        ((file_key,), "beyond it", MAGNITUDE * (1 + 1e-9)), ((file_key,), "minus it", -MAGNITUDE)]
        for entry in dataclasses.fields(ShopDefaults):
            if entry.metadata.get("range") is not None and isinstance(data.get("shop"), dict):
                choices += [(("shop", entry.name), what, number) for what, number in ends(*entry.metadata["range"])]
        for element in data.get("composition_pct", {}):
            choices += [(("composition_pct", element), what, number)
                        for what, number in ends(0.0, ELEMENT_LIMITS.get(element, 1.0))]
        for path, what, number in choices:
            out.append(Variant(name, "extreme", f"{_path_text(path)} = {number!r} ({what})",
                               lambda data=data, path=path, number=number: _text(_set(data, path, number)).encode(),
                               _names(path[0])))
    return out


def load_bytes(raw: bytes) -> Plan:
    from casedepth.plan import from_dict

    return from_dict(json.loads(raw))


FAMILIES = {f.__name__: f for f in (truncated, wrong_type, removed_top_level, removed, unknown_key, stages,
                                   whole_file, size, encoding, extreme)}


# -- checking one variant -----------------------------------------------------------------------------------------
class _Timer:
    def __enter__(self):
        self.previous = signal.signal(signal.SIGALRM, _alarm)
        signal.setitimer(signal.ITIMER_REAL, HANG_AFTER)

    def __exit__(self, *exc):
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, self.previous)
        return False


def _alarm(signum, frame):
    raise Hang()


def _tail(error: BaseException) -> str:
    if isinstance(error, Hang):
        return f"still running after {HANG_AFTER:g} s (hangs?)"
    return "".join(traceback.format_exception(error)[-4:]).strip()


def _non_finite(value, where: str = "") -> str | None:
    """Where a NaN or infinity hides in a result (dicts, lists, arrays, numbers); None if nowhere."""
    if isinstance(value, bool) or value is None or isinstance(value, str):
        return None
    if isinstance(value, (int, float, np.floating, np.integer)):
        return None if math.isfinite(float(value)) else f"{where} = {value!r}"
    if isinstance(value, np.ndarray):
        if value.dtype.kind in "fc" and not np.isfinite(value).all():
            return f"{where} holds {int((~np.isfinite(value)).sum())} non-finite of {value.size}"
        return None
    if isinstance(value, dict):
        return next((found for k, v in value.items() if (found := _non_finite(v, f"{where}.{k}"))), None)
    if isinstance(value, (list, tuple)):
        return next((found for i, v in enumerate(value) if (found := _non_finite(v, f"{where}[{i}]"))), None)
    return None


def _same(a, b, where: str = "") -> str | None:
    if isinstance(a, float) and isinstance(b, float):
        return None if math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-300) else f"{where}: {a!r} became {b!r}"
    if isinstance(a, dict) and isinstance(b, dict):
        if set(a) != set(b):
            return f"{where}: keys {sorted(set(a) ^ set(b))} differ"
        return next((found for k in a if (found := _same(a[k], b[k], f"{where}.{k}"))), None)
    if isinstance(a, list) and isinstance(b, list):
        if len(a) != len(b):
            return f"{where}: {len(a)} entries became {len(b)}"
        return next((found for i, (x, y) in enumerate(zip(a, b)) if (found := _same(x, y, f"{where}[{i}]"))), None)
    return None if (a == b and type(a) is type(b)) else f"{where}: {a!r} became {b!r}"


def _scrubbed(text: str, plan: Plan) -> str:
    """The text without what the plan's own words put in it (a title 'NaN' is not a number)."""
    values = plan.values()
    words = [values.get(key) for key in ("title", "part", "notes", "revision", "steel")]
    words.append(values.get("shop", {}).get("currency"))
    for word in sorted((w for w in words if isinstance(w, str) and w), key=len, reverse=True):
        text = text.replace(word, " ")
    return text.replace("β = inf (surface held at equilibrium)", " ")


def exercise(path: Path, variant: Variant | None = None, sheet: bool = False, as_json: bool = True) -> list[str]:
    """Every check on one plan file; the problems found (empty: none). ``casedepth run`` prints JSON or, with
    ``as_json`` False, text."""
    problems: list[str] = []
    data = path.read_bytes()
    try:
        parsed = json.loads(data)
    except (ValueError, RecursionError):
        parsed = _UNPARSED
    plan = error = None
    try:
        with _Timer():
            plan = load(path)
    except PlanFileError as refused:
        error = refused
    except BaseException as other:  # noqa: BLE001 - anything but PlanFileError is the finding
        if isinstance(other, KeyboardInterrupt) and not isinstance(other, Hang):
            raise
        return [f"load raised {type(other).__name__}, not PlanFileError:\n{_tail(other)}"]
    if error is not None and ("\n" in str(error) or len(str(error)) > 20_000):
        problems.append(f"the refusal is not one short line ({len(str(error))} characters): {str(error)[:300]!r}")
    if variant is not None and variant.expect is not None:
        wrong = variant.expect(parsed, plan, error)
        if wrong:
            problems.append(wrong)

    outcome = evaluated = None
    if plan is not None:
        try:
            with _Timer():
                plan.offers()
                outcome = evaluate(plan.values())
            evaluated = 0
        except InputError as refused:
            evaluated = 2
            if "\n" in refused.message:
                problems.append(f"evaluate's refusal is not one line: {refused.message[:300]!r}")
        except SolverError:
            evaluated = 1
        except CasedepthError:
            evaluated = 2
        except BaseException as other:  # noqa: BLE001
            if isinstance(other, KeyboardInterrupt) and not isinstance(other, Hang):
                raise
            problems.append(f"evaluate raised {type(other).__name__}, not a CasedepthError:\n{_tail(other)}")
        if outcome is not None:
            problems += _check_outcome(outcome, plan)
        problems += _round_trip(plan, path)

    # the command line on the same file: what the library said, as an exit code
    want = 2 if error is not None else evaluated
    lines = [["run", path.name, "--json"] if as_json else ["run", path.name]]
    if sheet:
        lines.append(["sheet", path.name, "--pdf", "sheet.pdf"])
    here = os.getcwd()
    os.chdir(path.parent)
    try:
        for argv in lines:
            before = snapshot(path.parent)
            result = call(argv)
            found = check_line(argv, path.parent, result, before, None)
            if result.code != want and want is not None and not result.raised:
                found.append(f"exit code {result.code} where the library says {want} (stderr {result.err[:300]!r})")
            problems += [f"casedepth {' '.join(argv)}: {p}" for p in found]
    finally:
        os.chdir(here)
    return problems


def _check_outcome(outcome, plan: Plan) -> list[str]:
    problems = []
    try:
        with _Timer():
            numbers = outcome.to_dict()
            found = _non_finite(numbers, "to_dict()")
            if found:
                problems.append(f"a non-finite number in the result: {found}")
            try:
                json.dumps(numbers, allow_nan=False)
            except ValueError as error:
                problems.append(f"to_dict() is not strict JSON: {error}")
            for name in ("soak_time", "depth", "duration"):
                found = _non_finite(getattr(outcome, name), name)
                if found:
                    problems.append(f"a non-finite number in the result: {found}")
            found = _non_finite(list(outcome.soak_window), "soak_window")
            if found:
                problems.append(f"a non-finite number in the result: {found}")
            _, columns = outcome.profile_columns()
            found = _non_finite({name: column for name, column in columns}, "profile_columns()")
            if found:
                problems.append(f"a non-finite number in the result: {found}")
            for system in ("metric", "imperial"):
                units = DisplayUnits(system)
                summary = outcome.summary(units)
                text = "\n".join([outcome.text(units), summary.headline, summary.subline,
                                  *(f"{fact.label} {fact.text}" for fact in summary.facts)])
                match = NUMBER_NAN.search(_scrubbed(text, plan))
                if match:
                    at = match.start()
                    problems.append(f"the {system} text shows {match.group()!r}: …{text[max(0, at - 100):at + 40]!r}…")
    except BaseException as other:  # noqa: BLE001
        if isinstance(other, KeyboardInterrupt) and not isinstance(other, Hang):
            raise
        problems.append(f"reading the outcome raised {type(other).__name__}:\n{_tail(other)}")
    return problems


def _round_trip(plan: Plan, path: Path) -> list[str]:
    again = path.with_name("saved-" + path.name)
    try:
        with _Timer():
            save(plan, again)
            reloaded = load(again)
    except BaseException as other:  # noqa: BLE001
        if isinstance(other, KeyboardInterrupt) and not isinstance(other, Hang):
            raise
        return [f"saving the loaded plan and loading it again raised {type(other).__name__}:\n{_tail(other)}"]
    problems = []
    different = _same(plan.values(), reloaded.values(), "values")
    if different:
        problems.append(f"saved and loaded again, the plan differs: {different}")
    if to_dict(plan) != to_dict(reloaded):
        problems.append("saved and loaded again, the file differs: " + str(_same(to_dict(plan), to_dict(reloaded))))
    return problems


# -- the tests ----------------------------------------------------------------------------------------------------
def _sample(family: str) -> list[Variant]:
    rng = random.Random(f"{SEED}:{family}")
    variants = FAMILIES[family](rng)
    rng.shuffle(variants)
    return variants[:max(1, round(COUNTS[family] * SCALE))]


def _kind(problem: str) -> str:
    """A problem's last line without the folder it happened in, to count problems of one kind together."""
    return re.sub(r"\S*/(?:variant|line)-\d+/", "", problem.strip().splitlines()[-1])[:160]


def _report(family: str, failures: list[tuple[Variant, Path, list[str]]], total: int) -> str:
    rows = [f"{len(failures)} of {total} {family} variants failed; each file is kept (python tests/test_fuzz_plans.py "
            f"FILE runs the checks on it). The problems, by their last line:"]
    kinds = Counter(_kind(problem) for _, _, problems in failures for problem in problems)
    rows += [f"  {count:5d} × {kind}" for kind, count in kinds.most_common(20)]
    rows.append("The first of them:")
    for variant, path, problems in failures[:15]:
        rows.append(f"\n{variant.describe()}\n  file: {path}\n    " +
                    "\n    ".join(p.replace("\n", "\n      ") for p in problems))
    return "\n".join(rows)


@pytest.mark.parametrize("family", list(FAMILIES))
def test_fuzz_plan_files(family, tmp_path):
    """Corrupted plan files of one family: refused as PlanFileError, or loaded, evaluated, saved and run cleanly."""
    variants = _sample(family)
    sheets = max(1, round(SHEETS * SCALE))
    failures = []
    for index, variant in enumerate(variants):
        folder = tmp_path / f"variant-{index:05d}"
        folder.mkdir()
        path = folder / "fuzz.cdplan.json"
        path.write_bytes(variant.make())
        problems = exercise(path, variant, sheet=index < sheets, as_json=index % 2 == 0)
        if problems:
            failures.append((variant, path, problems))
        else:
            shutil.rmtree(folder)
    assert not failures, _report(family, failures, len(variants))


#: variants the fuzzing found, kept so they stay answered: (base, path, raw JSON text, or None to remove the key)
FOUND = [("pinion-shaft.cdplan.json", ("temperature_c",), "1" + "0" * 400),
         ("ring-gear-boost-diffuse.cdplan.json", ("shop", "furnace_rate_per_h"), "1" + "0" * 400),
         ("schema-1.cdplan.json", ("composition_pct", "C"), "1" + "0" * 400),
         ("current-stages", ("stages", 1, "duration_h"), "1" + "0" * 400),
         ("current-stages", ("stages", 4, "kind"), "{}"),
         ("current-stages", ("stages", 4, "kind"), "[]"),
         ("current-stages", ("stages", 1, "temperature_c"), None),
         ("current-stages", ("stages", 1, "carbon_potential_pct"), None),
         ("schema-3.cdplan.json", ("title",), '"\\ud800"'),
         ("pinion-shaft.cdplan.json", ("notes",), '"\\udcff"')]


@pytest.mark.parametrize("base,path,raw", FOUND, ids=lambda value: ascii(value)[:40] if isinstance(value, str) else
                         _path_text(value) if isinstance(value, tuple) else None)
def test_found_plan_files(base, path, raw, tmp_path):
    """The plan files the fuzzing found: each refused as PlanFileError, or loaded, evaluated, saved and run cleanly
    (``casedepth run`` as JSON and as text)."""
    data = BASES[base][1]
    made = _text(_set(data, path, None, delete=True)).encode() if raw is None else _raw(data, path, raw)
    target = tmp_path / "found.cdplan.json"
    target.write_bytes(made)
    variant = Variant(base, "found", f"{_path_text(path)} {'removed' if raw is None else '= ' + raw[:40]}",
                      lambda: made, _names(path[0]))
    problems = exercise(target, variant, as_json=True) + exercise(target, None, as_json=False)
    assert not problems, _report("found", [(variant, target, problems)], 1)


if __name__ == "__main__":
    target = Path(sys.argv[1]).resolve()
    found = exercise(target, sheet=True) + exercise(target, as_json=False)
    print("\n".join(found) if found else "checks: nothing wrong")
    sys.exit(1 if found else 0)
