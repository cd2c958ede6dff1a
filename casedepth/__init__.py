"""casedepth: turn a drawing's case-depth callout into a furnace cycle.

The library has no Qt in it; the window lives in :mod:`casedepth.gui`. The short API builds a plan
from what a person would type, and evaluates it the way the window and the command line do:

>>> import casedepth
>>> plan = casedepth.plan(steel="8620", temperature="925C", potential=1.0, target="0.8-1.2mm")
>>> outcome = casedepth.evaluate(plan)
>>> [round(t / 3600, 2) for t in outcome.soak_window]
[4.0, 6.21, 8.83]
"""

__version__ = "0.1.0"

import importlib
import sys
import types

#: where each public name lives; loaded when first used (PEP 562), so that ``import casedepth`` — and the
#: command line's ``--help`` — does not pay for the solver's SciPy
_EXPORTS = {
    "plan": ".api", "setup": ".api",
    "CarburizingSetup": ".carburizing.setup",
    "CarburizingResult": ".carburizing.soak", "carburize": ".carburizing.soak",
    "soak_time_for_case_depth": ".carburizing.soak", "soak_times_for_case_depths": ".carburizing.soak",
    "CasedepthError": ".errors", "InputError": ".errors", "NotReachableError": ".errors", "SolverError": ".errors",
    "Plan": ".plan", "evaluate": ".plan", "load": ".plan", "save": ".plan",
    "Record": ".shop.record", "Measurement": ".shop.record", "read_csv": ".shop.record",
    "fit_furnace": ".shop.furnace_fit", "apply_calibration": ".shop.furnace_fit", "depth_check": ".shop.furnace_fit",
    "parse_length": ".units", "parse_temperature": ".units", "parse_threshold": ".units", "parse_time": ".units",
}
__all__ = list(_EXPORTS)


class _Package(types.ModuleType):
    """The package's module: the subpackage ``casedepth.plan`` (reached by its full name) must not take the
    place of the function :func:`casedepth.plan` when it is first imported, as the import system would
    by setting the package's attribute."""

    def __setattr__(self, name, value):
        if name in _EXPORTS and isinstance(value, types.ModuleType):
            return
        super().__setattr__(name, value)


sys.modules[__name__].__class__ = _Package


def __getattr__(name: str):
    if name in _EXPORTS:
        value = getattr(importlib.import_module(_EXPORTS[name], __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def __dir__():
    return sorted([*globals(), *_EXPORTS])
