"""Calibration on the shop's own sections: the diffusivity multiplier that reproduces a measured depth.

Every model here is an estimate; a shop that cuts and measures a section knows better. Given the
soak a load actually had and the depth measured on it (effective case depth at the plan's
threshold, or nitrided hardness depth at core + 50 HV), this finds the multiplier on the
diffusivity (the treatment table's ``calibration_key``) with which the plan's own model gives that
depth — counting the shop's heat-up and drop exactly as the plan counts them. Case depth grows about
as √(D t), so the multiplier is roughly (measured / predicted)²; it is found exactly by a root search.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError, NotReachableError
from ..numerics.roots import illinois
from ..parameters import PARAMETERS
from ..plan import Plan, evaluate
from ..treatments import treatment_of
from ..units import both_lengths

MULTIPLIER_RANGE = PARAMETERS["d_multiplier"].range
SOAK_RANGE = (60.0, 200 * 3600.0)  # s
MEASURED_RANGE = (0.01e-3, 10e-3)  # m


@dataclass
class Calibration:
    """The multiplier found, the parameter it belongs in, and the depths [m] before and after."""

    multiplier: float
    field: str  # the parameter key (the treatment table's calibration_key)
    predicted: float  # depth the plan's present multiplier gives for that soak
    measured: float
    soak_time: float  # s

    def describe(self) -> str:
        return (f"The model gave {both_lengths(self.predicted)} for this soak; {both_lengths(self.measured)} was "
                f"measured. Multiplier {self.multiplier:.3f} reproduces it.")


def calibrate_plan(plan: Plan, soak_time: float, measured_depth: float) -> Calibration:
    """The diffusivity multiplier with which ``plan`` gives ``measured_depth`` [m] after ``soak_time`` [s].

    The plan must have a single soak (one soak at temperature, or one nitriding stage); the shop's
    heat-up and drop are counted as the plan counts them. Raises :class:`InputError` naming ``soak`` or
    ``measured`` when the inputs are out of range, and :class:`NotReachableError` when no multiplier in
    0.1–10 reproduces the measurement.
    """
    values = plan.values()
    treatment = treatment_of(values)
    treatment.single_soak(values)
    if not (math.isfinite(soak_time) and SOAK_RANGE[0] <= soak_time <= SOAK_RANGE[1]):
        raise InputError("soak", f"{soak_time / 3600:g} h is outside {SOAK_RANGE[0] / 60:g} min–{SOAK_RANGE[1] / 3600:g} h")
    if not (math.isfinite(measured_depth) and MEASURED_RANGE[0] <= measured_depth <= MEASURED_RANGE[1]):
        raise InputError("measured", f"{both_lengths(measured_depth)} is outside 0.01–10 mm")
    outcome = evaluate(values)
    key = treatment.calibration_key
    predicted = outcome.depth_after(soak_time, values[key])
    lo, hi = MULTIPLIER_RANGE

    def miss(log_m: float) -> float:
        return outcome.depth_after(soak_time, min(max(math.exp(log_m), lo), hi)) / measured_depth - 1.0

    f_lo, f_hi = miss(math.log(lo)), miss(math.log(hi))
    if not (f_lo <= 0.0 <= f_hi):
        raise NotReachableError("measured", f"{both_lengths(measured_depth)} after this soak needs a diffusivity "
                                f"multiplier outside {lo:g}–{hi:g}; check the soak, the threshold and the measurement")
    log_m = illinois(miss, math.log(lo), f_lo, math.log(hi), f_hi, 1e-9, 1e-6)
    return Calibration(min(max(math.exp(log_m), lo), hi), key, predicted, measured_depth, soak_time)
