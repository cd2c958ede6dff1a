"""Start-up costs what the job needs: commands that only print import no SciPy and no Matplotlib, a solve
imports no Matplotlib and none of SciPy's interpolation or optimization (benchmarks/bench_startup.py
measures the times; this checks the imports, which is what decides them)."""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest

from casedepth.models import austenite

PROBE = """
import contextlib, io, json, sys
from casedepth.cli import main
with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
    try:
        main({argv!r})
    except SystemExit:
        pass
print(json.dumps(sorted(m for m in sys.modules if m.split(".")[0] in ("scipy", "matplotlib", "PySide6")
                        or m.startswith(("casedepth.lpc", "casedepth.nitriding", "casedepth.shop.capability",
                                         "casedepth.shop.record", "sqlite3")))))
"""


def imported_by(argv: list[str]) -> set[str]:
    out = subprocess.run([sys.executable, "-c", PROBE.format(argv=argv)], capture_output=True, text=True,
                         check=True).stdout
    return set(json.loads(out.strip().splitlines()[-1]))


@pytest.mark.parametrize("argv", [["--help"], ["steels"], ["probe", "--temperature", "925C", "--mv", "1150"]],
                         ids=["help", "steels", "probe"])
def test_printing_commands_import_no_scipy_or_matplotlib(argv):
    assert imported_by(argv) == set()


def test_a_solve_imports_no_matplotlib_and_no_interpolation_or_optimization():
    modules = imported_by(["carburize", "--steel", "8620", "--temperature", "925C", "--potential", "1.0",
                           "--target", "1.0mm"])
    assert "scipy.linalg" in modules  # the solver's LAPACK
    assert not any(m.startswith(("matplotlib", "PySide6", "scipy.interpolate", "scipy.optimize")) for m in modules)
    # nor the other treatments' modules, nor the load spread's (a plan keeping their choices' defaults), nor the furnace
    # record's database (a plan not calibrated from it)
    assert not any(m.startswith(("casedepth.lpc", "casedepth.nitriding", "casedepth.shop.capability",
                                 "casedepth.shop.record", "sqlite3")) for m in modules)


def test_import_casedepth_loads_nothing_heavy():
    code = ("import sys, casedepth; casedepth.__version__; "
            "print(sorted(m for m in sys.modules if m.startswith(('scipy', 'matplotlib', 'casedepth.'))))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "[]"


def test_acm_line_is_scipy_pchip():
    """The hand-written PCHIP of the Acm line equals SciPy's PchipInterpolator (Fritsch & Butland 1984 slopes,
    Moler 2004 ends) to round-off, so saturation carbon is what it was before it was written out."""
    from scipy.interpolate import PchipInterpolator

    reference = PchipInterpolator(austenite._ACM_KELVIN, austenite._ACM_POINTS_WT)
    temperatures = np.linspace(*austenite.ACM_RANGE, 997)
    ours = np.array([austenite.saturation_carbon(float(t)) for t in temperatures])
    assert np.max(np.abs(ours - reference(temperatures))) < 1e-12
