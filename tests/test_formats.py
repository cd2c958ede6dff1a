"""One format per quantity (casedepth.formats), and nothing in the package writing its own.

The precisions are the trade's common practice (see casedepth/formats.py); the static check keeps every
surface on them: an f-string that formats a number with a format spec and writes a unit right after it
(%C, %N, HV, HRC, mm, µm, in, °C, °F, atm, %) is only allowed in casedepth/formats.py and casedepth/units.py.
"""

from __future__ import annotations

import ast
import math
import pathlib
import re

import pytest

from casedepth import formats
from casedepth.units import DisplayUnits

PACKAGE = pathlib.Path(__file__).resolve().parents[1] / "casedepth"
ALLOWED = {"formats.py", "units.py"}
#: a unit right after a formatted number: the display units, and a bare per cent sign (not "% CO", "wt %")
UNIT_AFTER = re.compile(r"^\s?(%C|%N|HV|HRC|mm|µm|um|°C|°F|atm|in\)|in$|%(?![ ]?[A-Za-z]))")


def _offences(path: pathlib.Path) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    found = []
    for node in ast.walk(tree):
        if not isinstance(node, ast.JoinedStr):
            continue
        parts = node.values
        for value, after in zip(parts, parts[1:]):
            if (isinstance(value, ast.FormattedValue) and value.format_spec is not None
                    and isinstance(after, ast.Constant) and isinstance(after.value, str)
                    and UNIT_AFTER.match(after.value)):
                found.append(f"{path.relative_to(PACKAGE.parent)}:{node.lineno}: "
                             f"{ast.unparse(value)[:60]}{after.value[:8]!r}")
    return found


def test_no_number_is_formatted_next_to_a_unit_outside_formats():
    offences = [o for path in sorted(PACKAGE.rglob("*.py")) if path.name not in ALLOWED
                for o in _offences(path)]
    assert not offences, "use casedepth.formats:\n" + "\n".join(offences)


@pytest.mark.parametrize("value, text", [
    (0.4, "0.40 %C"), (0.8, "0.80 %C"), (1.2, "1.20 %C"), (0.404999, "0.40 %C"),
])
def test_carbon_two_decimals(value, text):
    # common practice: carbon contents and carbon potentials to 0.01 %C
    assert formats.carbon(value) == text


@pytest.mark.parametrize("value, scale, text", [
    (550.4, "HV", "550 HV"), (58.0, "HRC", "58 HRC"), (58.46, "HRC", "58.5 HRC"), (61.96, "HRC", "62 HRC"),
])
def test_hardness(value, scale, text):
    # ISO 6507-1: Vickers reported in whole numbers above 100 HV; HRC to at most 0.5 (ASTM E18, analog dials)
    assert formats.hardness(value, scale) == text


def test_lengths_one_precision_per_system():
    metric, imperial = DisplayUnits("metric"), DisplayUnits("imperial")
    assert formats.length(1.37584e-3) == "1.38 mm"
    assert formats.length(1e-3) == "1.00 mm"
    assert formats.length(1.016e-3, imperial) == "0.040 in"
    assert formats.length_range(0.9e-3, 1.3e-3, metric) == "0.90–1.30 mm"
    assert formats.thin_length(7.5e-6) == "7.5 µm" and formats.thin_length(10e-6) == "10 µm"


def test_kn_unicode_unit_and_money():
    assert formats.kn(2.5) == "2.50 atm⁻½"
    assert formats.money(1234.5, "EUR") == "1\u00a0234.50 EUR"
    assert formats.money(12.345) == "12.35" or formats.money(12.345) == "12.34"  # binary rounding of .345
    assert formats.money(math.nan, "EUR") == "–"


def test_typed_echo_keeps_what_was_typed():
    # a refused value is echoed as given, not rounded into the limit it broke
    assert formats.typed(1.6001, "%C") == "1.6001 %C"
