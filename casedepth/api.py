"""The short Python API: what a person would type on the command line, as keyword arguments.

Every argument accepts the same text as the command line's options (``"925C"``, ``"1.5e-5cm/s"``,
``"50HRC"``, ``"0.9-1.3mm"``) and is read through the same rows of the parameter table, so the same
inputs give the same numbers here, on the command line and in the window.

>>> import casedepth
>>> plan = casedepth.plan(steel="8620", temperature="925C", potential=1.0, target="1.0mm", shop_stages="off")
>>> round(casedepth.evaluate(plan).soak_time / 3600, 1)
6.8
"""

from __future__ import annotations

from .carburizing.outcome import carburizing_setup
from .carburizing.setup import CarburizingSetup
from .errors import InputError
from .parameters import PARAMETERS, OptionError, option_for
from .plan import Plan, plan_from_options


def _text(value):
    if isinstance(value, bool):
        return "on" if value else "off"
    return value if value is None or isinstance(value, str) else repr(value) if isinstance(value, float) else str(value)


def plan(treatment: str = "carburizing", **options) -> Plan:
    """A plan of ``treatment`` from command-line options given as keywords: the option's name without its
    dashes (``steel``, ``temperature``, ``potential``, ``target``, ``at``, ``geometry``, ``diameter``,
    ``kn``, ``compound``, ``shop_stages`` …). Evaluate it with :func:`casedepth.evaluate`."""
    return plan_from_options(treatment, {key: _text(value) for key, value in options.items()})[0]


def setup(steel: str, temperature: str | float, potential: str | float, **options) -> CarburizingSetup:
    """A validated carburizing setup (the furnace step alone, for the library's lower-level functions
    :func:`casedepth.carburize` and :func:`casedepth.soak_time_for_case_depth`), read as :func:`plan` reads
    its options; a number for ``temperature`` is °C, for a length mm. An :class:`InputError` names the
    keyword at fault."""
    given = {"steel": steel, "temperature": temperature, "potential": potential, **options}
    built, set_by = plan_from_options("carburizing", {key: _text(value) for key, value in given.items()})
    try:
        return carburizing_setup(built.values())
    except InputError as error:
        if isinstance(error, OptionError) or error.field not in PARAMETERS:
            raise
        raise error.renamed(option_for("carburizing", error.field, set_by) or error.field) from None
