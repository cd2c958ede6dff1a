"""Calibration on the shop's own sections: the diffusivity multiplier that reproduces a measured depth.

Every model here is an estimate; a shop that cuts and measures a section knows better. Given the
soak a load actually had and the depth measured on it (effective case depth at the plan's
threshold, or nitrided hardness depth at core + 50 HV), this finds the multiplier on the
diffusivity (the treatment table's ``calibration_key``) with which the plan's own model gives that
depth — counting the shop's heat-up and drop exactly as the plan counts them. Case depth grows about
as √(D t), so the multiplier is roughly (measured / predicted)²; it is found exactly by a root search.

A nitriding plan can also be calibrated on a whole hardness traverse (:func:`calibrate_traverse`): the D_N
multiplier whose model profile (the graded diffusion zone, :mod:`casedepth.nitriding.zone`) is nearest the
readings in the least-squares sense, found by a scan of log m and a bounded one-dimensional minimisation.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field as _field, replace
from typing import Sequence

from .. import formats
from ..errors import InputError, NotReachableError
from ..numerics.roots import illinois
from ..parameters import PARAMETERS
from ..plan import Plan, evaluate
from ..treatments import treatment_of
from ..units import DisplayUnits, both_lengths, parse_length, parse_number

MULTIPLIER_RANGE = PARAMETERS["d_multiplier"].range
SOAK_RANGE = (60.0, 200 * 3600.0)  # s
MEASURED_RANGE = (0.01e-3, 10e-3)  # m
TRAVERSE_DEPTH_RANGE = (0.0, 10e-3)  # m, from the surface; 0 itself excluded
TRAVERSE_HARDNESS_RANGE = (50.0, 1500.0)  # HV
TRAVERSE_MIN_READINGS = 3
#: the model's own hardness uncertainty at a depth (the precipitation zone model's row); a larger misfit is flagged
HARDNESS_UNCERTAINTY_HV = 60.0
#: points of the scan of log m over the multiplier range before the bounded minimisation
_SCAN_POINTS = 41
#: a best ln m this close to an end of the range counts as at the edge
_EDGE = 1e-3


def _depth(metres: float) -> str:
    """A computed depth for sentences, in both systems: ``0.41 mm (0.016 in)``."""
    return f"{formats.length(metres)} ({formats.length(metres, DisplayUnits('imperial'))})"


@dataclass
class Calibration:
    """The multiplier found, the parameter it belongs in, and the depths [m] before and after."""

    multiplier: float
    field: str  # the parameter key (the treatment table's calibration_key)
    predicted: float  # depth the plan's present multiplier gives for that soak
    measured: float
    soak_time: float  # s

    def describe(self) -> str:
        return (f"The model gave {_depth(self.predicted)} for this soak; {both_lengths(self.measured)} was "
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


# -- a hardness traverse (nitriding) --------------------------------------------------------------------------------
@dataclass
class TraverseCalibration:
    """The D_N multiplier that fits a measured hardness traverse best, and how well it fits.

    Depths in m from the surface, hardness in HV, the soak in s. ``traverse_depth`` is the nitrided depth read
    off the readings (linear interpolation where they fall through the plan's hardness limit; None where they
    do not); ``model_depth`` the model's nitrided depth with the fitted multiplier, ``predicted_depth`` with the
    plan's present one.
    """

    multiplier: float
    field: str  # the parameter key (the treatment table's calibration_key)
    rms_before: float  # HV, with the plan's present multiplier
    rms_after: float  # HV, with the fitted multiplier
    traverse_depth: float | None
    model_depth: float
    predicted_depth: float
    soak_time: float
    present: float  # the plan's present multiplier
    hardness_limit: float  # HV, the limit the nitrided depth is read at
    readings: list[tuple[float, float]] = _field(default_factory=list)

    def describe(self) -> str:
        text = (f"Multiplier {self.multiplier:.3f} fits the hardness traverse ({len(self.readings)} readings after "
                f"{self.soak_time / 3600:g} h): RMS misfit {formats.hv(self.rms_after)}, against "
                f"{formats.hv(self.rms_before)} with the present multiplier {self.present:.3f}. ")
        if self.traverse_depth is None:
            text += (f"The readings do not fall through {formats.hv(self.hardness_limit)}, so they give no nitrided "
                     f"depth of their own; ")
        else:
            text += (f"Nitrided depth read off the traverse at {formats.hv(self.hardness_limit)}: "
                     f"{_depth(self.traverse_depth)}; ")
        text += f"the model now gives {_depth(self.model_depth)} (it gave {_depth(self.predicted_depth)})."
        if self.rms_after > HARDNESS_UNCERTAINTY_HV:
            text += (f" The misfit is above the model's ±{formats.hv(HARDNESS_UNCERTAINTY_HV)}: check the plan's core "
                     f"and surface hardness, the soak and the readings' depths.")
        return text

    def to_dict(self) -> dict:
        """The JSON of ``casedepth calibrate --traverse`` (without ``written``)."""
        return {"multiplier": self.multiplier, "field": self.field, "rms_before_hv": self.rms_before,
                "rms_after_hv": self.rms_after,
                "traverse_depth_mm": None if self.traverse_depth is None else self.traverse_depth * 1e3,
                "model_depth_mm": self.model_depth * 1e3, "soak_time_h": self.soak_time / 3600.0}


def parse_traverse(text: str, default_unit: str = "mm") -> list[tuple[float, float]]:
    """Readings written ``depth=HV`` and separated by commas, semicolons or new lines, e.g.
    ``"0.05mm=590, 0.1mm=560, 0.2 mm = 480 HV"``; a bare depth is in ``default_unit``. Returns (depth [m], HV)
    pairs, unchecked (:func:`calibrate_traverse` checks them); :class:`InputError` naming ``traverse``."""
    if not isinstance(text, str):
        raise InputError("traverse", "give the readings as depth=HV, e.g. 0.1mm=560, 0.2mm=480, 0.3mm=400")
    items = [item.strip() for item in re.split(r"[,;\n]", text) if item.strip()]
    if not items:
        raise InputError("traverse", "no readings; give depth=HV pairs, e.g. 0.1mm=560, 0.2mm=480, 0.3mm=400")
    readings = []
    for number, item in enumerate(items, 1):
        parts = item.split("=")
        if len(parts) != 2 or not parts[0].strip() or not parts[1].strip():
            raise InputError("traverse", f"reading {number} {item[:40]!r} is not depth=HV (e.g. 0.1mm=560)")
        hardness = re.sub(r"\s*hv\s*$", "", parts[1].strip(), flags=re.IGNORECASE)
        try:
            depth = parse_length(parts[0].strip(), "traverse", default_unit)
            value = parse_number(hardness, "traverse")
        except InputError as error:
            raise InputError("traverse", f"reading {number} {item[:40]!r}: {error.message}") from None
        readings.append((depth, value))
    return readings


def check_traverse(traverse) -> tuple[list[float], list[float]]:
    """The readings' depths [m] and hardnesses [HV], or an :class:`InputError` naming ``traverse``."""
    try:
        pairs = [tuple(reading) for reading in traverse]
    except TypeError:
        raise InputError("traverse", "give a list of (depth [m], hardness [HV]) readings") from None
    if len(pairs) < TRAVERSE_MIN_READINGS:
        raise InputError("traverse", f"{len(pairs)} reading{'' if len(pairs) == 1 else 's'} given; a traverse needs "
                         f"at least {TRAVERSE_MIN_READINGS}")
    depths, hardness = [], []
    for number, pair in enumerate(pairs, 1):
        if len(pair) != 2:
            raise InputError("traverse", f"reading {number} is not a (depth, hardness) pair")
        try:
            depth, value = float(pair[0]), float(pair[1])
        except (TypeError, ValueError):
            raise InputError("traverse", f"reading {number} is not a pair of numbers") from None
        if not (math.isfinite(depth) and TRAVERSE_DEPTH_RANGE[0] < depth <= TRAVERSE_DEPTH_RANGE[1]):
            shown = f"{both_lengths(depth)}" if math.isfinite(depth) else repr(pair[0])
            raise InputError("traverse", f"reading {number}: depth {shown} is outside 0–10 mm (0–0.394 in) from the "
                             f"surface (0 excluded)")
        if not (math.isfinite(value) and TRAVERSE_HARDNESS_RANGE[0] <= value <= TRAVERSE_HARDNESS_RANGE[1]):
            raise InputError("traverse", f"reading {number}: {formats.typed(value, 'HV')} is outside "
                             f"{formats.typed_range(*TRAVERSE_HARDNESS_RANGE, 'HV')}")
        if depths and depth <= depths[-1]:
            raise InputError("traverse", f"reading {number}: depth {both_lengths(depth)} is not deeper than reading "
                             f"{number - 1} ({both_lengths(depths[-1])}); depths must increase strictly, from the "
                             f"surface inwards")
        depths.append(depth)
        hardness.append(value)
    return depths, hardness


def traverse_depth(depths: Sequence[float], hardness: Sequence[float], limit: float) -> float | None:
    """Where the readings first fall from at or above ``limit`` [HV] to below it, by linear interpolation [m];
    None if they never do (all below, or all at or above)."""
    for i in range(len(depths) - 1):
        h0, h1 = hardness[i], hardness[i + 1]
        if h0 >= limit > h1:
            return depths[i] + (h0 - limit) / (h0 - h1) * (depths[i + 1] - depths[i])
    return None


def calibrate_traverse(plan: Plan, soak_time: float, traverse) -> TraverseCalibration:
    """The D_N multiplier with which a nitriding ``plan``'s hardness profile after ``soak_time`` [s] fits the
    measured ``traverse`` best: (depth [m] from the surface, hardness [HV]) readings of a sectioned part.

    Least squares on hardness: the model profile (``nitride`` with the multiplier replaced, as the plan's
    outcome gives it) interpolated linearly at the readings' depths. Raises :class:`InputError` naming
    ``traverse`` (too few readings, depths not strictly increasing or outside 0–10 mm, hardness outside
    50–1500 HV, a carburizing plan, the sharp-front zone model whose hardness is a step) or ``soak``; and
    :class:`NotReachableError` naming ``traverse`` when the best multiplier is at an end of 0.1–10.
    """
    import numpy as np
    from scipy.optimize import minimize_scalar  # imported on first use: it is slow to import

    from ..nitriding.nitride import nitride
    from ..nitriding.zone import ZONE_MODELS

    values = plan.values()
    treatment = treatment_of(values)
    if treatment.key != "nitriding":
        raise InputError("traverse", "a hardness traverse calibrates nitriding plans only; for carburizing give the "
                                     "measured case depth (--measured)")
    treatment.single_soak(values)
    if not (math.isfinite(soak_time) and SOAK_RANGE[0] <= soak_time <= SOAK_RANGE[1]):
        raise InputError("soak", f"{soak_time / 3600:g} h is outside {SOAK_RANGE[0] / 60:g} min–{SOAK_RANGE[1] / 3600:g} h")
    depths, hardness = check_traverse(traverse)
    setup = evaluate(values).setup
    if ZONE_MODELS[setup.zone_model].key == "sharp-front-2026":
        raise InputError("traverse", "the plan's sharp-front zone model makes the hardness a step, which a traverse "
                                     "cannot be fitted to; choose the precipitation zone model (Diffusion-zone model) "
                                     "or calibrate on the measured nitrided depth instead")
    key = treatment.calibration_key
    x, h = np.asarray(depths), np.asarray(hardness)
    lo, hi = MULTIPLIER_RANGE

    def at(multiplier: float):
        return nitride(replace(setup, diffusivity_multiplier=min(max(multiplier, lo), hi)), soak_time)

    def squares(log_m: float) -> float:
        result = at(math.exp(log_m))
        return float(np.sum((np.interp(x, result.depth, result.hardness) - h) ** 2))

    grid = np.linspace(math.log(lo), math.log(hi), _SCAN_POINTS)
    scan = [squares(v) for v in grid]
    best = int(np.argmin(scan))
    left, right = grid[max(best - 1, 0)], grid[min(best + 1, len(grid) - 1)]
    found = minimize_scalar(squares, bounds=(left, right), method="bounded", options={"xatol": 1e-7})
    log_m, least = (float(found.x), float(found.fun)) if found.fun <= scan[best] else (float(grid[best]), scan[best])
    if log_m - math.log(lo) < _EDGE or math.log(hi) - log_m < _EDGE:
        end = "lower" if log_m - math.log(lo) < _EDGE else "upper"
        raise NotReachableError("traverse", f"the readings are fitted best at the {end} end of the D_N multiplier's "
                                f"range {lo:g}–{hi:g}: the model cannot reproduce them after this soak; check the "
                                f"soak, the readings' depths (from the surface) and the plan's core and surface "
                                f"hardness")
    multiplier = min(max(math.exp(log_m), lo), hi)
    present = setup.diffusivity_multiplier
    before = nitride(setup, soak_time)
    rms_before = math.sqrt(float(np.mean((np.interp(x, before.depth, before.hardness) - h) ** 2)))
    limit = setup.hardness_limit
    return TraverseCalibration(multiplier, key, rms_before, math.sqrt(least / len(depths)),
                               traverse_depth(depths, hardness, limit), at(multiplier).nitrided_depth,
                               before.nitrided_depth, soak_time, present, limit, list(zip(depths, hardness)))
