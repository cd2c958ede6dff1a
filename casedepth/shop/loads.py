"""Furnace loads: several parts, each with its own drawing window, in one cycle.

Parts share a load when they share the furnace step: the treatment, the temperature and the
atmosphere (the treatment table's ``potential_key``: carbon potential or nitriding potential). Each part's plan gives the soak that puts its case at
the minimum and at the maximum of its drawing; the load can run any soak inside every part's range.
The load's soak is the middle of the common range in √t (case depth grows about as √t, so this
keeps the parts near the middle of what the range allows), and every part's case is then
re-computed at that soak, with the same models and shop stages as its own plan.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from .. import formats
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from ..parameters import label
from ..plan import Plan, evaluate
from ..plan.evaluate import forward_many
from ..treatments import treatment_of
from ..units import both_lengths, format_duration

#: furnace temperatures this close count as the same [K] (the atmospheres' tolerance is in the treatment table)
SAME_TEMPERATURE = 1.0


@dataclass
class LoadPart:
    """One part of a load: its plan, its own soak range [s] and its case [m] at the load's soak."""

    plan: Plan
    soak_range: tuple[float, float]
    targets: tuple[float, float, float]
    case_depth: float | None = None

    @property
    def inside(self) -> bool:
        return self.case_depth is not None and self.targets[0] * (1 - 1e-6) <= self.case_depth <= self.targets[2] * (1 + 1e-6)


@dataclass
class LoadPlan:
    """The parts, the soak range they share [s] (None if they share none) and the load's soak [s]."""

    parts: list[LoadPart]
    common: tuple[float, float] | None
    soak: float | None
    treatment: str
    warnings: list[str] = field(default_factory=list)

    def text(self, units) -> str:
        """The load in plain lines (``units`` a :class:`~casedepth.units.DisplayUnits`)."""
        lines = []
        if self.soak is None:
            lines.append("No common soak: the parts' windows do not overlap.")
        else:
            lines.append(f"Load soak {format_duration(self.soak)} (any of {format_duration(self.common[0])} to "
                         f"{format_duration(self.common[1])} suits every part)")
        width = max(len(part.plan.title) for part in self.parts)
        for part in self.parts:
            low, _, high = part.targets
            depth = "" if part.case_depth is None else (f"-> {units.format_length(part.case_depth)} "
                                                        + ("in window" if part.inside else "OUTSIDE its window"))
            lines.append(f"  {part.plan.title:<{width}}  window {units.format_length(low)}–{units.format_length(high)}: "
                         f"soak {format_duration(part.soak_range[0])} to {format_duration(part.soak_range[1])}  {depth}")
        lines += [f"Warning: {warning}" for warning in self.warnings]
        return "\n".join(lines)

    def to_dict(self) -> dict:
        return {
            "treatment": self.treatment,
            "common_soak_h": None if self.common is None else [t / 3600.0 for t in self.common],
            "soak_time_h": None if self.soak is None else self.soak / 3600.0,
            "parts": [{"plan": p.plan.title, "part": p.plan.part, "soak_range_h": [t / 3600.0 for t in p.soak_range],
                       "target_depth_mm": [d * 1e3 for d in p.targets],
                       "depth_mm": None if p.case_depth is None else p.case_depth * 1e3, "inside": p.inside}
                      for p in self.parts],
            "warnings": list(self.warnings),
        }


def _step(plan: Plan) -> tuple:
    """(treatment, temperature [K], the atmosphere's potential) of a plan with a single soak."""
    values = plan.values()
    treatment = treatment_of(values)
    try:
        treatment.single_soak(values)
    except InputError as error:
        raise InputError("plan", f"{plan.title!r}: {error.message}") from None
    return treatment.key, plan.temperature, values[treatment.potential_key]


def plan_load(plans: list[Plan]) -> LoadPlan:
    """The soak a load of these parts can share, and each part's case at it.

    Raises :class:`InputError` (field ``plan``) if the plans do not share a furnace step.
    """
    if len(plans) < 1:
        raise InputError("plan", "give at least one plan")
    first = _step(plans[0])
    for plan in plans[1:]:
        step = _step(plan)
        if step[0] != first[0]:
            raise InputError("plan", f"{plan.title!r} is {step[0]}, the first plan {first[0]}: one load, one treatment")
        if abs(step[1] - first[1]) > SAME_TEMPERATURE:
            raise InputError("plan", f"{plan.title!r} runs at {formats.typed(step[1] - ZERO_CELSIUS, '°C')}, the first "
                             f"plan at {formats.typed(first[1] - ZERO_CELSIUS, '°C')}: one load, one temperature")
        treatment = treatment_of(plan.values())
        if abs(step[2] - first[2]) > treatment.potential_tolerance:
            raise InputError("plan", f"{plan.title!r} asks for a {label(treatment.potential_key).lower()} of "
                             f"{step[2]:g}, the first plan {first[2]:g}: one load, one atmosphere")
    warnings = []
    if any(plan.shop != plans[0].shop for plan in plans[1:]):
        warnings.append("The plans hold different shop times; each part's case is computed with its own.")
    parts = []
    for plan in plans:
        try:
            outcome = evaluate(plan)
        except InputError as error:
            raise type(error)("plan", f"{plan.title!r}: {label(error.field)}: {error.message}") from None
        low, _, high = outcome.soak_window
        soak_range = (low, high)
        parts.append(LoadPart(plan, soak_range, outcome.targets))
    lo = max(p.soak_range[0] for p in parts)
    hi = min(p.soak_range[1] for p in parts)
    common = (lo, hi) if lo <= hi else None
    # the middle of the common range in √t, in which case depth grows about linearly
    soak = None if common is None else (0.5 * (math.sqrt(lo) + math.sqrt(hi))) ** 2
    if common is None:
        tight = min(parts, key=lambda p: p.soak_range[1])
        late = max(parts, key=lambda p: p.soak_range[0])
        warnings.append(f"No soak suits every part: {tight.plan.title!r} is done by {format_duration(tight.soak_range[1])}, "
                        f"{late.plan.title!r} needs {format_duration(late.soak_range[0])}; split the load.")
    else:
        # every part's case at the load's soak, its stages counted as its plan counts them, marched together
        for part, run in zip(parts, forward_many([part.plan for part in parts], [soak] * len(parts))):
            part.case_depth = run.window_depth
            if not part.inside:
                warnings.append(f"{part.plan.title!r} ends at {both_lengths(part.case_depth)}, outside its window.")
    return LoadPlan(parts, common, soak, first[0], warnings)
