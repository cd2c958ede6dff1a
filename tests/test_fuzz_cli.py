"""Seeded fuzzing of the command line (issue 11, item 7): random command lines for every subcommand.

What it checks, for every line it makes: ``casedepth.cli.main(argv)`` returns 0, 1 or 2 and raises nothing
(a raised exception is a traceback the user would see; SystemExit too, since ``main`` returns its code);
neither output holds a traceback; standard output shows no NaN or infinity as a number, and ``--json``
output is strict JSON (no NaN, Infinity or 1e999); exit code 2 comes with exactly one line on standard error,
``casedepth: error: …``, and exit code 1 with a line ``casedepth: …``; every file a command made or changed
is whole (a PDF ends with %%EOF, a PNG with its IEND chunk, an SVG with </svg>, a plan file loads) and no
temporary ``.NAME.*.tmp*`` is left; the files it names as written exist; and no line runs longer than
:data:`HANG_AFTER` seconds (a timer interrupts it).

How the lines are made: the options come from the real parser (``casedepth.cli._build_parser()``, walking its
subparsers), so a new option or subcommand is fuzzed without touching this file. Each option draws from
pools: values that work (the README's examples, the ``--help`` texts and the parameter table's ranges), edge
values (0, -1, 1e308, 1e-308, nan, inf, '', '--', '=', unicode, a 10,000-character string, wrong units,
broken lists), paths (a missing folder, a folder, a 300-character name, a file and a folder even root
cannot write: ``chattr +i``), and options left out, repeated, given as ``--flag=value`` or unknown. A line
starts from a README example or from the parser's required options, and gets zero to three such changes.
Each line runs in a fresh folder of fixture files (the working directory), with standard output encoded
strictly as in a UTF-8 terminal and standard error with backslash escapes, as Python's own streams are.

Run it bigger:    CASEDEPTH_FUZZ_SCALE=50 pytest tests/test_fuzz_cli.py     (50 times the lines, same seed)
Other lines:      CASEDEPTH_FUZZ_SEED=7 pytest tests/test_fuzz_cli.py
Replay one line:  python tests/test_fuzz_cli.py '["run", "missing.cdplan.json", "--json"]'
                  (a failure prints each line as JSON; this makes the same fixture folder in a temporary
                  directory, runs ``main`` there as the test does, shows its output and what the checks say)
"""

from __future__ import annotations

import argparse
import hashlib
import io
import json
import math
import os
import random
import re
import shutil
import signal
import subprocess
import sys
import tempfile
import traceback
import warnings
from collections import Counter
from contextlib import redirect_stderr, redirect_stdout
from dataclasses import dataclass, field
from pathlib import Path

import pytest

from casedepth import cli
from casedepth.parameters import Quantity, options_for
from casedepth.plan import Plan, load, to_dict
from casedepth.treatments import TREATMENTS

ROOT = Path(__file__).resolve().parent.parent
SCALE = float(os.environ.get("CASEDEPTH_FUZZ_SCALE", "1"))
SEED = os.environ.get("CASEDEPTH_FUZZ_SEED", "0")
HANG_AFTER = 20.0  # s: no command line may take longer (the slowest valid one takes about 2 s)

#: lines per subcommand at scale 1 (chart and sheet draw documents, ~0.5 s each, so fewer of them)
LINES = {"carburize": 60, "nitride": 45, "chart": 20, "sheet": 14, "run": 30, "calibrate": 30, "load": 24,
         "probe": 40, "steels": 8}
LINES_OF_A_NEW_COMMAND = 30
SKIP_COMMANDS = {"gui"}  # opens the window; tests/test_window.py covers it


# -- the fixture folder every line runs in ------------------------------------------------------------------------
EXAMPLES = ROOT / "resources" / "examples"
OLD_PLANS = ROOT / "tests" / "data" / "plans"

COPIED_PLANS = {
    "pinion.cdplan.json": EXAMPLES / "pinion-shaft.cdplan.json",
    "ring.cdplan.json": EXAMPLES / "ring-gear-boost-diffuse.cdplan.json",
    "piston.cdplan.json": EXAMPLES / "piston-rod-nitrided.cdplan.json",
    **{path.name: path for path in sorted(OLD_PLANS.glob("schema-*.cdplan.json"))},
}
STALE_TEMPORARY = ".existing.pdf.killed.tmp.pdf"  # what a killed save of existing.pdf left an hour ago


def _png(width: int, height: int, whole: bool = True) -> bytes:
    """A PNG of one grey colour (``whole=False``: its header only, claiming the size)."""
    import struct
    import zlib

    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)

    head = b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", width, height, 8, 0, 0, 0, 0))
    if not whole:
        return head + chunk(b"IDAT", zlib.compress(b"\x00" * 64)) + chunk(b"IEND", b"")
    raw = b"".join(b"\x00" + b"\x80" * width for _ in range(height))
    return head + chunk(b"IDAT", zlib.compress(raw)) + chunk(b"IEND", b"")


def _generated_plans() -> dict[str, str]:
    """Plans of the current schema the examples do not cover: stages of one's own (a long recipe, so the sheet
    runs onto further pages), and a second one-soak plan at the pinion's step (for ``load``)."""
    stages = [{"kind": "boost" if i % 2 == 0 else "diffuse", "duration_h": 0.5, "temperature_c": 925.0,
               "carbon_potential_pct": 1.1 if i % 2 == 0 else 0.8} for i in range(30)]
    long_recipe = Plan(title="Stages of one's own (fuzz fixture)", process="stages", stages=stages)
    twin = load(EXAMPLES / "pinion-shaft.cdplan.json")
    twin.update(title="Twin of the pinion (fuzz fixture)", case_min=0.7e-3, case_max=1.1e-3)
    return {name: json.dumps(to_dict(plan), indent=2) for name, plan in
            (("stages.cdplan.json", long_recipe), ("twin.cdplan.json", twin))}


_FIXTURE_BYTES: dict[str, bytes] = {}


def _fixture_bytes() -> dict[str, bytes]:
    if not _FIXTURE_BYTES:
        _FIXTURE_BYTES.update({name: path.read_bytes() for name, path in COPIED_PLANS.items()})
        _FIXTURE_BYTES.update({name: text.encode() for name, text in _generated_plans().items()})
        _FIXTURE_BYTES.update({
            "garbage.cdplan.json": b"\xff\xfe\x00{\x80 not a plan",
            "empty.cdplan.json": b"",
            "list.cdplan.json": b"[1, 2, 3]",
            "logo.png": _png(8, 8),
            "notapng.png": b"this is text, not an image\n",
            "bomb.png": _png(40000, 40000, whole=False),  # claims 1.6 gigapixels
            "afile": b"a plain file: no folder can be under it\n",
            "existing.pdf": b"the previous contents\n",
        })
    return _FIXTURE_BYTES


def _lock(path: Path, on: bool) -> None:
    subprocess.run(["chattr", "+i" if on else "-i", str(path)], check=True, capture_output=True)


def _can_lock() -> bool:
    """Whether ``chattr +i`` works here and blocks writing (as root, read-only permission bits do not)."""
    folder = Path(tempfile.mkdtemp(prefix="casedepth-fuzz-"))
    probe = folder / "probe"
    probe.write_text("x")
    try:
        _lock(probe, True)
    except (OSError, subprocess.CalledProcessError):
        shutil.rmtree(folder, ignore_errors=True)
        return False
    try:
        with open(probe, "a"):
            blocked = False
    except PermissionError:
        blocked = True
    _lock(probe, False)
    shutil.rmtree(folder, ignore_errors=True)
    return blocked


LOCKING = _can_lock() or os.geteuid() != 0  # not root: read-only permission bits block writing
LOCKED_NAMES = ("locked.pdf", "locked.cdplan.json", "lockeddir")


def make_folder(folder: Path, argv: list[str]) -> list[Path]:
    """The fixture files a line runs among; returns what was locked (to unlock after the line)."""
    folder.mkdir(parents=True)
    for name, data in _fixture_bytes().items():
        (folder / name).write_bytes(data)
    (folder / "folder").mkdir()
    (folder / "loop.pdf").symlink_to("loop.pdf")
    (folder / "dangling.pdf").symlink_to("nope/dangling.pdf")
    stale = folder / STALE_TEMPORARY
    stale.write_bytes(b"half a PDF")
    os.utime(stale, (os.path.getmtime(stale) - 3600,) * 2)
    locked = []
    if LOCKING and any("locked" in token for token in argv):
        (folder / "locked.pdf").write_bytes(b"may not be replaced\n")
        (folder / "locked.cdplan.json").write_bytes(_fixture_bytes()["pinion.cdplan.json"])
        (folder / "lockeddir").mkdir()
        for name in LOCKED_NAMES:
            if os.geteuid() == 0:
                _lock(folder / name, True)
            else:
                os.chmod(folder / name, 0o555 if name == "lockeddir" else 0o444)
            locked.append(folder / name)
    return locked


def unlock(locked: list[Path]) -> None:
    for path in locked:
        if os.geteuid() == 0:
            _lock(path, False)
        else:
            os.chmod(path, 0o755 if path.is_dir() else 0o644)


# -- value pools --------------------------------------------------------------------------------------------------
PLAN_FILES = [*COPIED_PLANS, "stages.cdplan.json", "twin.cdplan.json"]
PLANS_BAD = ["missing.cdplan.json", "folder", "", "-", "p" * 300 + ".cdplan.json", "garbage.cdplan.json",
             "empty.cdplan.json", "list.cdplan.json", "logo.png", "/dev/null", "loop.pdf", "dangling.pdf",
             "\udcff.cdplan.json", "afile/x.cdplan.json", "locked.cdplan.json", "nope/x.cdplan.json"]
OUTPUTS_OK = ["out.pdf", "out.svg", "out.png", "out", "existing.pdf", "spaced name.pdf", "folder/out.pdf",
              "new.cdplan.json"]
OUTPUTS_BAD = ["nope/out.pdf", "folder", ".", "afile/out.pdf", "locked.pdf", "lockeddir/out.pdf", "loop.pdf",
               "dangling.pdf", "o" * 300 + ".pdf", "\udcff.pdf", "", "-", "ring.cdplan.json", "locked.cdplan.json",
               "out.docx", "/dev/null"]
LOGOS = ["logo.png", "notapng.png", "bomb.png", "missing.png", "folder", "", "l" * 300 + ".png",
         "garbage.cdplan.json", "/dev/null"]
if not LOCKING:  # as root without chattr nothing blocks writing: those names would only be ordinary files
    PLANS_BAD = [p for p in PLANS_BAD if "locked" not in p]
    OUTPUTS_BAD = [p for p in OUTPUTS_BAD if "locked" not in p]

#: values that work, by option (from the README and ``--help``); a command's own list first
VALID = {
    "--steel": ["8620", "4140", "16MnCr5", "20MnCr5", "31CrMoV9", "C=0.20 Mn=0.80 Cr=0.50 Ni=0.55 Mo=0.20"],
    "--temperature": ["925C", "1700F", "1198K", "940C", "900"],
    "nitride --temperature": ["520C", "500C", "968F", "540"],
    "chart --temperature": ["925C", "520C"],
    "probe --temperature": ["925C", "850C", "1700F"],
    "--potential": ["1.00", "0.8", "1.15", "1.0"],
    "probe --potential": ["1.0", "0.8", "1.2"],
    "--target": ["1.0mm", "0.040in", "0.9-1.3mm", "0.8-1.2mm", "1.2mm"],
    "nitride --target": ["0.4mm", "0.3-0.5mm", "0.015in"],
    "--time": ["6h", "90min", "5h30min"],
    "nitride --time": ["20h", "11h"],
    "--carbon-at": ["0.5mm", "0.02in"],
    "--at": ["0.40%C", "550HV", "50HRC", "total", "core+0.04%C"],
    "--aim": ["50%", "0.4"],
    "--shop-stages": ["on", "off"],
    "--beta": ["1.5e-5cm/s", "inf", "2e-5"],
    "--d0": ["2.3e-5"],
    "--q": ["148"],
    "--d-multiplier": ["1.0", "0.9", "1.2"],
    "--diameter": ["40mm", "30mm"],
    "--thickness": ["10mm", "4mm"],
    "--title": ["Demo plan", "Ring gear (demo)"],
    "--part": ["P-1 demo part"],
    "--compare-temperatures": ["900C,950C", "900C,925C,950C,980C"],
    "nitride --compare-temperatures": ["500C,540C"],
    "--surface-target": ["0.80", "0.75-0.85"],
    "--boost-potential": ["1.15", "1.1"],
    "--diffuse-potential": ["0.80", "0.7"],
    "--kn": ["3", "1", "6"],
    "--dissociation": ["30", "44%"],
    "--exhaust": ["NH3=40,H2=45"],
    "--compound": ["5-10um", "2-5um"],
    "--two-stage": ["on", "off"],
    "--second-kn": ["0.4", "0.3"],
    "--core-hardness": ["300"],
    "--surface-hardness": ["700"],
    "--temperatures": ["900,925,950", "1650F,1700F"],
    "chart --potentials": ["0.9,1.0,1.1", "1,3,6"],
    "--hours": ["24", "48"],
    "--shop": ["Demo shop"],
    "--revision": ["B"],
    "--soak": ["6h", "6h30min", "390min"],
    "--measured": ["0.95mm", "0.037in", "0.4mm"],
    "--carrier-co": ["20", "20%", "25"],
    "--mv": ["1150", "1100"],
}

EDGE = ["0", "-1", "1e308", "-1e308", "1e-308", "4.9e-324", "1e309", "inf", "-inf", "nan", "NaN", "Infinity", "",
        "--", "=", "-", " ", "\t", "a\nb", ",", ".", "1_000", "0x10", "1e", "%", "mm", "+1", "-0",
        "９２５Ｃ", "925 °C", "925°C", "\u202e925C", "😀", "\udcff", "Ⅻ", "x" * 10000, "9" * 10000, "1" * 400 + "mm",
        "5kg", "925mm", "1.0C", "6mm", "1h", "0.4%C", "1,,2", "900,nan", ",,,", "900;925",
        "900,925,950,975,1000,1025,1050", "1e6", "1e7", "1e15", "1e16", "-273.15C", "-274C", "0K", "1100C",
        "1100.001C", "2000F", "0mm", "-1mm", "10.001mm", "1e-9mm", "0h", "200h", "201h", "1e9h", "-6h",
        "C=nan", "C=0.2 C=0.3", "C=1e308", "C=0.20 Xx=1", "NH3=0,H2=0", "NH3=100,H2=100", "H2=45",
        ",".join(["900C"] * 1000)]  # a list of 1,000: each entry may cost a solve
TEXT_EDGE = ["", "x" * 10000, "a\nb", "$\\frac{1}{0}$", "%s %d {0}", "nan", "inf", "😀" * 50, "\udcff", "\x1b[31mred"]

TEXT_DESTS = {"title", "part", "shop", "revision"}
OUTPUT_DESTS = {"pdf", "svg", "png", "save"}
IMAGE_DESTS = {"logo"}


def _is_output(action) -> bool:
    return bool(action.option_strings) and (action.dest in OUTPUT_DESTS or action.metavar in ("FILE", "PLAN"))


def _is_plan_input(action) -> bool:
    return not action.option_strings and "plan" in action.dest


def _range_values(command: str, flag: str) -> list[str]:
    """The ends of the parameter table's range of the row an option sets, and just beyond them, as typed."""
    treatment = next((t.key for t in TREATMENTS.values() if t.command == command), None)
    if treatment is None:
        return []
    units = {"°C": "C", "µm": "um", "mm": "mm", "cm/s": "cm/s", "kJ/mol": "", "": ""}
    out = []
    for row, option in options_for(treatment):
        if option.flag != flag or not isinstance(row.kind, Quantity) or not isinstance(row.range, tuple):
            continue
        unit = row.kind.unit
        for si in (row.range[0], row.range[1], row.range[0] * (1 - 1e-6), row.range[1] * (1 + 1e-6)):
            out.append(f"{si * unit.scale + unit.offset:.9g}{units.get(unit.file_unit, '')}")
    return out


def _help_examples(action) -> list[str]:
    """Values the help text shows (``e.g. 3``, ``default 1``, ``: 40mm``): a new option's first valid values."""
    return re.findall(r"(?:e\.g\.|default|:)\s*([0-9][\w.%/+,-]*\w)", action.help or "")


def valid_values(command: str, action) -> list[str]:
    flag = action.option_strings[0] if action.option_strings else action.dest
    if _is_plan_input(action):
        return PLAN_FILES
    if _is_output(action):
        return OUTPUTS_OK
    if action.dest in IMAGE_DESTS:
        return ["logo.png"]
    if action.choices:
        return list(action.choices)
    return VALID.get(f"{command} {flag}") or VALID.get(flag) or _help_examples(action) or ["1"]


def edge_values(command: str, action) -> list[str]:
    if _is_plan_input(action):
        return PLANS_BAD
    if _is_output(action):
        return OUTPUTS_BAD
    if action.dest in IMAGE_DESTS:
        return LOGOS
    if action.dest in TEXT_DESTS:
        return TEXT_EDGE
    flag = action.option_strings[0] if action.option_strings else action.dest
    return EDGE + _range_values(command, flag)


def cross_values() -> list[str]:
    """Every option's valid values: given to another option, they are wrong units or wrong kinds."""
    return sorted({value for values in VALID.values() for value in values})


# -- making command lines -----------------------------------------------------------------------------------------
#: the README's examples (the starting point of most lines); a command without one starts from the parser
BASES = {
    "carburize": [["--steel", "8620", "--temperature", "925C", "--potential", "1.00", "--target", "0.8-1.2mm"],
                  ["--steel", "8620", "--temperature", "925C", "--target", "1.2mm", "--surface-target", "0.75-0.85",
                   "--boost-potential", "1.15", "--diffuse-potential", "0.80"],
                  ["--steel", "8620", "--temperature", "925C", "--potential", "1.0", "--target", "1.0mm",
                   "--compare-temperatures", "900C,925C,950C,980C"],
                  ["--steel", "8620", "--temperature", "925C", "--potential", "1.00", "--time", "6h",
                   "--carbon-at", "0.5mm"]],
    "nitride": [["--steel", "4140", "--temperature", "520C", "--kn", "3", "--target", "0.4mm", "--compound", "5-10um"],
                ["--steel", "4140", "--temperature", "520C", "--dissociation", "30", "--time", "20h"]],
    "chart": [["--steel", "8620", "--temperatures", "900,925,950", "--potential", "1.0", "--at", "0.40%C",
               "--pdf", "chart.pdf"],
              ["--treatment", "nitriding", "--steel", "4140", "--temperatures", "500,520,540", "--kn", "3",
               "--pdf", "nitriding.pdf"]],
    "sheet": [["ring.cdplan.json", "--pdf", "sheet.pdf", "--shop", "Demo shop"]],
    "run": [["ring.cdplan.json"], ["piston.cdplan.json", "--json"]],
    "calibrate": [["pinion.cdplan.json", "--soak", "6h", "--measured", "0.95mm"]],
    "load": [["pinion.cdplan.json", "twin.cdplan.json"]],
    "probe": [["--temperature", "925C", "--potential", "1.0"], ["--temperature", "925C", "--mv", "1150"]],
    "steels": [[]],
}


@dataclass
class Item:
    """One option (or positional) of a line: its action, the flag as written and its values."""

    action: argparse.Action | None
    flag: str | None
    values: list[str] = field(default_factory=list)
    joined: bool = False  # written --flag=value

    def tokens(self) -> list[str]:
        if self.flag is None:
            return list(self.values)
        if self.joined and len(self.values) == 1:
            return [f"{self.flag}={self.values[0]}"]
        return [self.flag, *self.values]


def _actions(sub) -> list[argparse.Action]:
    return [a for a in sub._actions if not isinstance(a, argparse._HelpAction)]


def _takes(action) -> int:
    """How many values an action takes here (nargs '+': one to four)."""
    if action.nargs == 0:
        return 0
    return 1 if action.nargs in (None, 1, "?") else -1


def _item(rng: random.Random, command: str, action, valid: bool) -> Item:
    flag = action.option_strings[0] if action.option_strings else None
    takes = _takes(action)
    if takes == 0:
        return Item(action, flag)
    count = 1 if takes == 1 else rng.choice([1, 2, 2, 3, 4])
    return Item(action, flag, [_value(rng, command, action, valid) for _ in range(count)], joined=rng.random() < 0.1)


def _value(rng: random.Random, command: str, action, valid: bool) -> str:
    if valid:
        return rng.choice(valid_values(command, action))
    if rng.random() < 0.2 and action.option_strings and not _is_output(action):
        return rng.choice(cross_values())
    return rng.choice(edge_values(command, action))


def _items(sub, tokens: list[str]) -> list[Item]:
    """A README example as items."""
    items: list[Item] = []
    positional = [a for a in sub._actions if not a.option_strings]
    index = 0
    while index < len(tokens):
        token = tokens[index]
        action = sub._option_string_actions.get(token)
        if action is not None:
            takes = _takes(action)
            items.append(Item(action, token, tokens[index + 1:index + 1 + takes] if takes else []))
            index += 1 + max(takes, 0)
        else:
            target = positional[0] if positional else None
            if items and items[-1].flag is None and items[-1].action is target and _takes(target) < 0:
                items[-1].values.append(token)
            else:
                items.append(Item(target, None, [token]))
            index += 1
    return items


def make_line(rng: random.Random, command: str, sub) -> list[str]:
    actions = _actions(sub)
    if command in BASES and rng.random() < 0.65:
        items = _items(sub, rng.choice(BASES[command]))
        for _ in range(rng.choice([0, 0, 1, 2])):
            if actions:
                items.append(_item(rng, command, rng.choice(actions), valid=True))
    else:
        items = [_item(rng, command, a, valid=rng.random() < 0.85) for a in actions
                 if a.required or rng.random() < 0.25]
        for group in sub._mutually_exclusive_groups:
            if group.required and not any(item.action in group._group_actions for item in items):
                items.append(_item(rng, command, rng.choice(group._group_actions), valid=True))
    for _ in range(rng.choice([0, 1, 1, 1, 1, 2, 2, 3])):  # mostly one change: it gets past the first check
        _mutate(rng, command, actions, items)
    rng.shuffle(items)  # argparse takes options in any order
    return [command, *(token for item in items for token in item.tokens())]


def _mutate(rng: random.Random, command: str, actions, items: list[Item]) -> None:
    what = rng.choices(["edge", "drop", "repeat", "add", "unknown", "join", "help"], [8, 3, 2, 3, 1, 1, 0.15])[0]
    with_values = [item for item in items if item.values and item.action is not None]
    if what == "edge" and with_values:
        item = rng.choice(with_values)
        item.values[rng.randrange(len(item.values))] = _value(rng, command, item.action, valid=False)
    elif what == "drop" and items:
        items.pop(rng.randrange(len(items)))
    elif what == "repeat" and with_values:
        item = rng.choice(with_values)
        items.append(Item(item.action, item.flag, [_value(rng, command, item.action, rng.random() < 0.5)
                                                   for _ in item.values]))
    elif what == "add" and actions:
        items.append(_item(rng, command, rng.choice(actions), valid=rng.random() < 0.5))
    elif what == "unknown":
        items.append(Item(None, None, [rng.choice(["--bogus", "--bogus=1", "extra", "-x", "--", "--steel=", "-"])]))
    elif what == "join" and with_values:
        rng.choice(with_values).joined = True
    elif what == "help":
        items.append(Item(None, None, ["--help"]))


# -- running one line and checking what it did --------------------------------------------------------------------
class Hang(BaseException):
    """A line that ran longer than HANG_AFTER (BaseException, so nothing in casedepth takes it for its own error)."""


def _alarm(signum, frame):
    raise Hang()


NUMBER_NAN = re.compile(r"(?<![\w.])[-+]?(?:nan|inf|infinity)(?!\w)", re.IGNORECASE)
#: where the program says inf on purpose (β = ∞ is a choice, not a result)
INF_ON_PURPOSE = ("β = inf (surface held at equilibrium)",)


def _refuse_constant(name):
    raise ValueError(f"{name} in JSON output")


def _finite_float(text):
    value = float(text)
    if not math.isfinite(value):
        raise ValueError(f"{text} in JSON output")
    return value


def _whole(path: Path) -> str | None:
    """None if the file is whole; else what is wrong with it."""
    try:
        data = path.read_bytes()
    except OSError as error:
        return f"cannot be read back: {error}"
    if not data:
        return "is empty"
    if data.startswith(b"%PDF"):
        return None if b"%%EOF" in data[-64:] else "is a PDF without %%EOF (cut short)"
    if data.startswith(b"\x89PNG"):
        return None if data.endswith(b"IEND\xaeB`\x82") else "is a PNG without its IEND chunk (cut short)"
    if b"<svg" in data[:4000]:
        return None if data.rstrip().endswith(b"</svg>") else "is an SVG without </svg> (cut short)"
    if data.lstrip().startswith(b"{"):
        try:
            load(path)
        except Exception as error:  # noqa: BLE001 - any failure is the finding
            return f"is a plan file that does not load: {type(error).__name__}: {error}"
    return None


def _snapshot(folder: Path) -> dict[str, str]:
    out = {}
    for base, dirs, files in os.walk(folder):
        for name in files:
            path = Path(base) / name
            if path.is_symlink():
                continue
            try:
                out[str(path.relative_to(folder))] = hashlib.sha1(path.read_bytes()).hexdigest()
            except OSError:
                pass
    return out


@dataclass
class Result:
    code: object = None
    out: str = ""
    err: str = ""
    raised: str = ""
    numpy_warnings: list[str] = field(default_factory=list)


def call(argv: list[str]) -> Result:
    """``main(argv)`` with its output captured, under the hang timer."""
    result = Result()
    out_bytes, err_bytes = io.BytesIO(), io.BytesIO()
    out = io.TextIOWrapper(out_bytes, encoding="utf-8", errors="strict", newline="\n")
    err = io.TextIOWrapper(err_bytes, encoding="utf-8", errors="backslashreplace", newline="\n")
    previous = signal.signal(signal.SIGALRM, _alarm)
    signal.setitimer(signal.ITIMER_REAL, HANG_AFTER)
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            with redirect_stdout(out), redirect_stderr(err):
                result.code = cli.main(list(argv))
    except Hang:
        result.raised = f"still running after {HANG_AFTER:g} s (hangs?)"
    except BaseException as error:  # noqa: BLE001 - SystemExit and KeyboardInterrupt are findings too
        if isinstance(error, KeyboardInterrupt) and not isinstance(error, Hang):
            raise
        result.raised = "".join(traceback.format_exception(error)[-4:]).strip()
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)
    for stream in (out, err):
        try:
            stream.flush()
        except ValueError:
            pass
    result.out = out_bytes.getvalue().decode("utf-8", "replace")
    result.err = err_bytes.getvalue().decode("utf-8", "replace")
    result.numpy_warnings = [f"{w.category.__name__}: {w.message} ({Path(w.filename).name}:{w.lineno})"
                             for w in caught if issubclass(w.category, RuntimeWarning)]
    return result


def _echoed(argv: list[str], sub) -> list[str]:
    """What a line typed that the output may print back as typed (names, paths)."""
    values = []
    for index, token in enumerate(argv[:-1]):
        action = sub._option_string_actions.get(token) if sub is not None else None
        if action is not None and (action.dest in TEXT_DESTS | OUTPUT_DESTS | IMAGE_DESTS or _is_output(action)):
            values.append(argv[index + 1])
    for token in argv:
        if "=" in token and token.startswith("--"):
            values.append(token.split("=", 1)[1])
        if not token.startswith("-"):
            values.append(token)  # positionals (plan files)
    return sorted((v for v in values if v), key=len, reverse=True)


def check(argv: list[str], folder: Path, result: Result, before: dict[str, str], sub) -> list[str]:
    """What is wrong with what one line did (empty: nothing)."""
    problems = []
    code = result.code
    if result.raised:
        return [f"raised instead of returning an exit code:\n{result.raised}"]
    if isinstance(code, bool) or not isinstance(code, int) or code not in (0, 1, 2):
        problems.append(f"returned {code!r}, not 0, 1 or 2")
    for name, text in (("stdout", result.out), ("stderr", result.err)):
        if "Traceback" in text:
            problems.append(f"a traceback on {name}:\n{text[-800:]}")
    lines = result.err.splitlines()
    if code == 2 and (len(lines) != 1 or not lines[0].startswith("casedepth: error:")):
        problems.append(f"exit code 2 with stderr {result.err[:600]!r} (want one line 'casedepth: error: …')")
    if code == 1 and not result.err.startswith("casedepth:"):
        problems.append(f"exit code 1 with stderr {result.err[:600]!r} (want 'casedepth: …')")
    helped = any(token in ("-h", "--help") or token.startswith("--he") for token in argv)
    if not helped:
        shown = result.out
        for value in _echoed(argv, sub):
            shown = shown.replace(value, " ")
        for phrase in INF_ON_PURPOSE:
            shown = shown.replace(phrase, " ")
        match = NUMBER_NAN.search(shown)
        if match:
            at = match.start()
            problems.append(f"stdout shows {match.group()!r} as a number: …{shown[max(0, at - 120):at + 60]!r}…")
        if code == 0 and "--json" in argv:
            try:
                data = json.loads(result.out, parse_constant=_refuse_constant, parse_float=_finite_float)
                if not isinstance(data, dict):
                    problems.append(f"--json printed {type(data).__name__}, not one object")
            except ValueError as error:
                problems.append(f"--json output is not strict JSON: {error}: {result.out[:300]!r}")
    if result.numpy_warnings:
        problems.append("arithmetic warnings (a NaN or overflow on the way): " + "; ".join(result.numpy_warnings[:3]))
    # files: whatever is new or changed must be whole; no temporary left; what it says it wrote exists
    after = _snapshot(folder)
    for name, digest in sorted(after.items()):
        base = Path(name).name
        if base.startswith(".") and ".tmp" in base and name != STALE_TEMPORARY:
            problems.append(f"left a temporary file {name}")
        elif before.get(name) != digest and name != STALE_TEMPORARY:
            wrong = _whole(folder / name)
            if wrong:
                problems.append(f"{'made' if name not in before else 'changed'} {name}, which {wrong}")
    for line in result.out.splitlines():
        for prefix in ("wrote ", "Plan written to "):
            if line.startswith(prefix):
                named = folder / line[len(prefix):]
                # a name the system could not decode is printed with replacement characters: match it so
                shown = {os.fsencode(str(p)).decode("utf-8", "replace") for p in folder.rglob("*")}
                if not named.exists() and str(named) not in shown:
                    problems.append(f"says {line!r} but there is no such file")
                elif named.name == "existing.pdf" and (folder / STALE_TEMPORARY).exists():
                    problems.append(f"wrote existing.pdf but left the hour-old temporary {STALE_TEMPORARY}")
    return problems


def run_line(argv: list[str], folder: Path, sub=None) -> list[str]:
    """Make the folder, run the line in it, check it; the folder stays (unlocked) for a look afterwards."""
    return _run(argv, folder, sub)[1]


def _run(argv: list[str], folder: Path, sub=None):
    """The line's result and the problems the checks find."""
    locked = make_folder(folder, argv)
    before = _snapshot(folder)
    here = os.getcwd()
    os.chdir(folder)
    try:
        result = call(argv)
    finally:
        os.chdir(here)
        try:
            problems = check(argv, folder, result, before, sub)
        finally:
            unlock(locked)
    return result, problems


def subparsers() -> dict[str, argparse.ArgumentParser]:
    parser = cli._build_parser()
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            return {name: sub for name, sub in action.choices.items() if name not in SKIP_COMMANDS}
    return {}


def _kind(problem: str) -> str:
    """A problem's last line without the folder it happened in, to count problems of one kind together."""
    return re.sub(r"\S*/(?:variant|line)-\d+/", "", problem.strip().splitlines()[-1])[:160]


def _replay_text(failures) -> str:
    rows = [f"{len(failures)} command line(s) failed; replay one with python tests/test_fuzz_cli.py '<the JSON line>'. "
            f"The problems, by their last line:"]
    kinds = Counter(_kind(problem) for _, problems in failures for problem in problems)
    rows += [f"  {count:5d} × {kind}" for kind, count in kinds.most_common(20)]
    rows.append("The first of them:")
    for argv, problems in failures[:15]:
        shown = json.dumps(argv, ensure_ascii=True)
        if len(shown) > 400:
            shown = shown[:200] + " … " + shown[-150:] + f"  (full line: {len(shown)} characters)"
        rows.append(f"\n{shown}\n    " + "\n    ".join(p.replace("\n", "\n      ") for p in problems))
    return "\n".join(rows)


SUBPARSERS = subparsers()


@pytest.mark.parametrize("command", sorted(SUBPARSERS))
def test_fuzz_command_lines(command, tmp_path):
    """Random lines of one subcommand: exit code 0/1/2, no traceback, no NaN shown, no half-written file."""
    sub = SUBPARSERS[command]
    rng = random.Random(f"{SEED}:{command}")
    count = max(1, round(LINES.get(command, LINES_OF_A_NEW_COMMAND) * SCALE))
    failures = []
    for index in range(count):
        argv = make_line(rng, command, sub)
        folder = tmp_path / f"line-{index:05d}"
        problems = run_line(argv, folder, sub)
        if problems:
            failures.append((argv, problems))
        else:
            shutil.rmtree(folder, ignore_errors=True)
    assert not failures, _replay_text(failures)


TOP_LEVEL = [["--version"], ["--help"], ["-h"], ["bogus"], ["--bogus"], ["--", "run"], ["run"], ["carburize"],
             ["steels", "extra"], ["chart", "--steel"], ["probe", "--temperature=", "--mv="], ["carburize", "--steel=--"],
             ["sheet", "ring.cdplan.json"], ["run", "ring.cdplan.json", "ring.cdplan.json"], ["load"]]
#: lines the fuzzing found, kept so they stay answered: a file name that is not UTF-8 (what Linux hands Python for
#: bytes such as Latin-1 ä: a lone surrogate) printed back; such a name in the title block; '.' for a sheet of
#: several pages
FOUND = [["sheet", "ring.cdplan.json", "--pdf", "\udcff.pdf"],
         ["chart", "--steel", "8620", "--temperatures", "900,925", "--svg", "Zahnrad-\udce4.svg"],
         ["carburize", "--steel", "8620", "--temperature", "925C", "--potential", "1.0", "--target", "1mm", "--save",
          "\udcff.cdplan.json"],
         ["sheet", "ring.cdplan.json", "--shop", "H\udce4rterei", "--pdf", "sheet.pdf"],
         ["sheet", "ring.cdplan.json", "--revision", "\udcff", "--png", "sheet.png"],
         ["sheet", "stages.cdplan.json", "--png", "."]]


@pytest.mark.parametrize("argv", TOP_LEVEL + FOUND, ids=lambda argv: ascii(" ".join(argv))[1:-1] or "empty")
def test_fixed_lines(argv, tmp_path):
    """Lines every version must answer sensibly: no subcommand, unknown ones, a subcommand with nothing after it,
    and the lines the fuzzing found."""
    problems = run_line(argv, tmp_path / "line", SUBPARSERS.get(argv[0]))
    assert not problems, _replay_text([(argv, problems)])


def replay(argv: list[str]) -> int:
    """Run one line as the test does, in a fresh fixture folder, and print what the checks say."""
    folder = Path(tempfile.mkdtemp(prefix="casedepth-replay-")) / "line"
    print(f"folder: {folder}")
    result, problems = _run(argv, folder, SUBPARSERS.get(argv[0]))
    sys.stdout.write(result.out)
    sys.stdout.flush()
    sys.stderr.write(result.err)
    print(f"exit code {result.code!r}")
    print("\n".join(problems) if problems else "checks: nothing wrong")
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(replay(json.loads(sys.argv[1])))
