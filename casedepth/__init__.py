"""casedepth: turn a drawing's case-depth callout into a furnace cycle.

The library has no Qt in it; the window lives in :mod:`casedepth.gui`. The short API builds a plan
from what a person would type, and evaluates it the way the window and the command line do:

>>> import casedepth
>>> plan = casedepth.plan(steel="8620", temperature="925C", potential=1.0, target="0.8-1.2mm")
>>> outcome = casedepth.evaluate(plan)
>>> [round(t / 3600, 2) for t in outcome.soak_window]
[3.97, 6.18, 8.8]
"""

__version__ = "0.1.0"

from .api import plan, setup  # noqa: E402
from .carburizing.setup import CarburizingSetup  # noqa: E402
from .carburizing.soak import CarburizingResult, carburize, soak_time_for_case_depth, soak_times_for_case_depths  # noqa: E402
from .errors import CasedepthError, InputError, NotReachableError, SolverError  # noqa: E402
from .plan import Plan, evaluate, load, save  # noqa: E402
from .units import parse_length, parse_temperature, parse_threshold, parse_time  # noqa: E402

__all__ = [
    "plan", "setup", "Plan", "evaluate", "load", "save", "CarburizingSetup", "CarburizingResult", "carburize",
    "soak_time_for_case_depth", "soak_times_for_case_depths", "CasedepthError", "InputError", "NotReachableError",
    "SolverError", "parse_length", "parse_temperature", "parse_threshold", "parse_time",
]
