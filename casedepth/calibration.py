"""Calibration on the shop's own sections: the diffusivity multiplier that reproduces a measured depth.

Every model here is an estimate; a shop that cuts and measures a section knows better. Given the
soak a load actually had and the depth measured on it (effective case depth at the plan's
threshold, or nitrided hardness depth at core + 50 HV), this finds the multiplier on the carbon (or
nitrogen) diffusivity with which the plan's own model gives that depth — counting the shop's
heat-up and drop exactly as the plan counts them. Case depth grows about as √(D t), so the
multiplier is roughly (measured / predicted)²; it is found exactly by a root search.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from .diffusivity import Diffusivity
from .errors import InputError, NotReachableError
from .plan import NitridingOutcome, Plan, evaluate
from .roots import illinois
from .units import both_lengths

MULTIPLIER_RANGE = (0.1, 10.0)


@dataclass
class Calibration:
    """The multiplier found, the plan field it belongs in, and the depths [m] before and after."""

    multiplier: float
    field: str  # "d_multiplier" (carburizing) or "n_multiplier" (nitriding)
    predicted: float  # depth the plan's present multiplier gives for that soak
    measured: float
    soak_time: float  # s

    def describe(self) -> str:
        return (f"The model gave {both_lengths(self.predicted)} for this soak; {both_lengths(self.measured)} was "
                f"measured. Multiplier {self.multiplier:.3f} reproduces it.")


def _depth_function(plan: Plan, soak_time: float):
    """depth(multiplier) [m] after ``soak_time`` [s] with the plan's models, and the plan field it belongs in."""
    outcome = evaluate(plan.values())
    base = outcome.setup
    if isinstance(outcome, NitridingOutcome):
        return (lambda m: outcome.depth_after(soak_time, replace(base, diffusivity_multiplier=m))), "n_multiplier"
    d = base.diffusivity
    return (lambda m: outcome.depth_after(soak_time, replace(base, diffusivity=Diffusivity(d.method, m, d.D0, d.Q))),
            "d_multiplier")


def calibrate_plan(plan: Plan, soak_time: float, measured_depth: float) -> Calibration:
    """The diffusivity multiplier with which ``plan`` gives ``measured_depth`` [m] after ``soak_time`` [s].

    For carburizing the plan must be a one-soak plan (the soak is the time at temperature; the
    shop's heat-up and drop are counted as the plan counts them); for nitriding, one stage.
    Raises :class:`InputError` naming ``soak`` or ``measured`` when the inputs are out of range,
    and :class:`NotReachableError` when no multiplier in 0.1–10 reproduces the measurement.
    """
    if plan.treatment != "nitriding" and plan.process != "single":
        raise InputError("plan", "calibrate with a one-soak plan (the soak a load had and the depth it gave)")
    if not (math.isfinite(soak_time) and 60.0 <= soak_time <= 200 * 3600.0):
        raise InputError("soak", f"{soak_time / 3600:g} h is outside 1 min–200 h")
    if not (math.isfinite(measured_depth) and 0.01e-3 <= measured_depth <= 10e-3):
        raise InputError("measured", f"{both_lengths(measured_depth)} is outside 0.01–10 mm")
    depth, field = _depth_function(plan, soak_time)
    present = float(plan.n_multiplier if field == "n_multiplier" else plan.d_multiplier)
    predicted = depth(present)
    lo, hi = MULTIPLIER_RANGE

    def miss(log_m: float) -> float:
        return depth(min(max(math.exp(log_m), lo), hi)) / measured_depth - 1.0

    f_lo, f_hi = miss(math.log(lo)), miss(math.log(hi))
    if not (f_lo <= 0.0 <= f_hi):
        raise NotReachableError("measured", f"{both_lengths(measured_depth)} after this soak needs a diffusivity "
                                f"multiplier outside {lo:g}–{hi:g}; check the soak, the threshold and the measurement")
    log_m = illinois(miss, math.log(lo), f_lo, math.log(hi), f_hi, 1e-9, 1e-6)
    return Calibration(min(max(math.exp(log_m), lo), hi), field, predicted, measured_depth, soak_time)
