"""One evaluation path for every surface: a plan's values to its treatment's outcome.

The window, ``casedepth carburize``/``nitride``/``run``/``sheet``/``load``/``calibrate`` and the Python
API all build a plan (:class:`~casedepth.plan.Plan`, from the window's edits, a file, or
command-line options read through the parameter table by :func:`plan_from_options`) and call
:func:`evaluate`; the same values give the same numbers everywhere.
"""

from __future__ import annotations

from typing import Any, Mapping

from ..errors import InputError
from ..outcome import Outcome
from ..parameters import PARAMETERS, check_ranges, read_options
from ..treatments import TREATMENTS, treatment_of
from .state import Plan


def _values(plan: Plan | Mapping[str, Any]) -> dict[str, Any]:
    if isinstance(plan, Plan):
        return plan.values()
    values = dict(plan)
    treatment = values.pop("treatment", "carburizing")
    return Plan(treatment, **values).values()  # typed as the table says (a snapshot is already)


def evaluate(plan: Plan | Mapping[str, Any]) -> Outcome:
    """Solve a plan (or a snapshot of its values: safe to run off the window's thread).

    Raises :class:`InputError` naming the parameter at fault (or :class:`NotReachableError`).
    """
    values = _values(plan)
    check_ranges(values)
    return treatment_of(values).evaluate(values)


def forward(plan: Plan | Mapping[str, Any], soak: float, probe_depth: float | None = None,
            shares: tuple[float, ...] | None = None):
    """What a soak of ``soak`` [s] gives for this plan, its stages counted as the plan counts them; with ``shares``
    (its outcome's :attr:`~casedepth.outcome.Outcome.held_shares`), the plan's own cycle with its held stages
    (boost and diffuse, its own soaks, two nitriding stages) in that split of ``soak``."""
    values = _values(plan)
    check_ranges({**values, "case_min": 1e-3, "case_max": 1e-3})  # the drawing's window plays no part here
    if shares is None:
        return treatment_of(values).forward(values, soak, probe_depth)
    return treatment_of(values).forward(values, soak, probe_depth, shares=shares)


def forward_many(plans: list[Plan | Mapping[str, Any]], soaks: list[float],
                 shares: tuple[float, ...] | None = None) -> list:
    """:func:`forward` of each plan (all of one treatment, all split by ``shares``) after its soak [s]: the same
    numbers, the cases marched together where the treatment can (:meth:`casedepth.treatments.Treatment.forward_each`)."""
    values = [_values(plan) for plan in plans]
    for v in values:
        check_ranges({**v, "case_min": 1e-3, "case_max": 1e-3})
    if not values:
        return []
    if len({v["treatment"] for v in values}) != 1:
        raise InputError("treatment", "plans run together must be of one treatment")
    return treatment_of(values[0]).forward_each(values, soaks, shares)


def compare_temperatures(plan: Plan | Mapping[str, Any], temperatures: list[float]) -> list[tuple[float, float]]:
    """The soak [s] for the plan's aim at each of ``temperatures`` [K], the plan otherwise unchanged (its
    cycle and its policy on the shop's stages too): ``(temperature, soak)`` pairs, temperatures the plan
    cannot run at left out. The same soaks as :func:`evaluate` at each temperature, worked out together where the
    treatment can (:meth:`~casedepth.treatments.Treatment.soaks_for_aims`); a carburizing plan's soak is worked out
    for the aim alone, so a temperature where the aim is reached but the drawing's deepest end is not (in 200 h) is
    kept, where :func:`evaluate` would refuse the plan."""
    values = _values(plan)
    if not PARAMETERS["temperature"].used_by(values):
        raise InputError("temperature", f"no comparison: the furnace temperature plays a part only in "
                                        f"{PARAMETERS['temperature'].when}")
    rows = []
    for T in temperatures:
        try:
            at = _values({**values, "temperature": T})
            check_ranges(at)
        except InputError:
            continue  # outside the treatment's temperatures: left out of the comparison
        rows.append((T, at))
    soaks = treatment_of(values).soaks_for_aims([at for _, at in rows])
    # a plan that cannot run at a temperature (below this steel's Ac3, or out of reach) is left out
    return [(T, soak) for (T, _), soak in zip(rows, soaks) if not isinstance(soak, InputError)]


def plan_from_options(treatment: str, options: Mapping[str, str], **values) -> tuple[Plan, dict[str, str]]:
    """A plan of ``treatment`` from command-line options given as text (``{"steel": "8620", "temperature":
    "925C", "target": "0.9-1.3mm", "at": "50HRC"}``, the options' names without dashes), on top of the
    treatment's defaults and any ``values``; and, per parameter key, the option that set it."""
    if treatment not in TREATMENTS:
        raise InputError("treatment", f"{treatment!r} is not one of {', '.join(TREATMENTS)}")
    start = Plan(treatment, **values).values()
    set_by = read_options(treatment, {k: v for k, v in options.items() if v is not None}, start)
    start.pop("treatment")
    return Plan(treatment, **start), set_by
