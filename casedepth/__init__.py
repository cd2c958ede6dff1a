"""casedepth: turn a drawing's case-depth callout into a furnace cycle.

The library has no Qt in it; the window lives in :mod:`casedepth.gui`. The short API:

>>> import casedepth
>>> setup = casedepth.setup(steel="8620", temperature="925C", potential=1.0)
>>> result = casedepth.soak_time_for_case_depth(setup, casedepth.parse_length("1.0mm"))
>>> round(result.soak_time / 3600, 1)
6.8
"""

__version__ = "0.1.0"

from .api import setup  # noqa: E402
from .carburizing import (CarburizingResult, CarburizingSetup, carburize, soak_time_for_case_depth,  # noqa: E402
                          soak_times_for_case_depths)
from .errors import InputError, NotReachableError, SolverError  # noqa: E402
from .units import parse_length, parse_temperature, parse_threshold, parse_time  # noqa: E402

__all__ = [
    "setup", "CarburizingSetup", "CarburizingResult", "carburize", "soak_time_for_case_depth", "soak_times_for_case_depths",
    "InputError", "NotReachableError", "SolverError", "parse_length", "parse_temperature", "parse_threshold", "parse_time",
]
