"""Calibration of one furnace from its whole record: the multipliers that make the plan's model reproduce every
recorded traverse of that furnace at once, with their confidence intervals.

For each recorded load the model is the load's own plan as run (:func:`casedepth.plan.forward`, the same path as
every other surface): the recipe the plan gave for its nominal values — its soak, or its held stages in the plan's
split — run for the soak actually recorded, with the fitted multipliers in place. The readings of its coupons
(carbon by turned layers or spectrometer, or a hardness traverse) are compared with the model's profile
interpolated at their depths.

Fitted (in log space, bounded to 0.1–10):

* carburizing: the diffusivity multiplier ``d_multiplier`` and a factor on β (on the plan's one β, or its gas β's
  ``beta_multiplier``); a plan with its surface held at equilibrium fits the diffusivity alone;
* nitriding: the nitrogen-diffusivity multiplier ``n_multiplier`` and, where there are hardness readings (a
  traverse or the surface hardness), the nitrides' hardness multiplier ``strength_multiplier`` (the zone's strength:
  the traverse's level fixes it, its depth fixes D_N).

A fit is of one furnace, or of one furnace and one steel grade (``grade``, where a shop has enough loads of it: heats
of one grade stray together); a plan takes the fit of its own grade where one is saved, else the furnace's.

Method: nonlinear least squares (``scipy.optimize.least_squares``, trust-region reflective) on the readings
weighted by the usual scatter of their method — 0.03 %C for carbon, 25 HV for a hardness traverse (common practice,
from memory) — and the covariance s²(JᵀJ)⁻¹ at the optimum with s² the weighted residual variance (Bates & Watts,
Nonlinear Regression Analysis and Its Applications, 1988, ch. 2), giving 95 % intervals exp(θ ± 1.96 σ_θ). A coupon
whose readings miss by more than 2.5 robust scatters on average (root mean square; the robust scatter is 1.4826 ×
the median absolute weighted miss, at least the readings' usual) is flagged as an outlier, and so is a reading that
misses by more than 3.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Mapping

import numpy as np

from .. import formats
from ..errors import InputError, NotReachableError
from .capability import shift_beta
from .record import KINDS, Load, grade_of, same_grade

#: the usual scatter of a reading, by kind (common practice, from memory): weights of the least squares; a measured
#: depth is compared with the model's depth of the drawing's kind (effective case depth, nitrided hardness depth)
SCATTER = {"carbon": 0.03, "hardness": 25.0, "case_depth": 0.05e-3, "nitrided_depth": 0.03e-3,
           "surface_hardness": 25.0}
#: the kinds a treatment's fit reads (the others — core hardness, compound layer, a carburized surface hardness that
#: the quench sets more than the furnace — are kept, not fitted)
FITTED = {"carburizing": ("carbon", "hardness", "case_depth"),
          "nitriding": ("hardness", "nitrided_depth", "surface_hardness")}
#: the fitted multipliers: plan key -> (the fit's JSON name, its name in words)
NAMES = {"d_multiplier": ("diffusivity_multiplier", "D multiplier"),
         "n_multiplier": ("nitrogen_diffusivity_multiplier", "D_N multiplier"),
         "strength_multiplier": ("strength_multiplier", "Nitrides' HV ×"),
         "beta": ("beta_factor", "β factor")}
_HARDNESS = ("hardness", "surface_hardness")  # the kinds read against the model's hardness
OUTLIER_LOAD = 2.5  # a load's rms weighted residual over s beyond this is flagged
OUTLIER_READING = 3.0
BOUNDS = (math.log(0.1), math.log(10.0))
Z95 = 1.959963984540054  # two-sided 95 % normal quantile
UNDETERMINED = 100.0  # an interval wider than this factor says the readings do not determine the multiplier


@dataclass
class LoadFit:
    """How one measured coupon of a load sits against the fitted model: mean and rms miss in its readings' unit (%C or
    HV), and whether it or some of its readings are outliers."""

    number: str
    date: str
    kind: str
    mean_miss: float
    rms_miss: float
    outlier: bool
    outlying_readings: list[float] = field(default_factory=list)  # depths [m]

    def to_dict(self) -> dict:
        return {"load": self.number, "date": self.date, "kind": self.kind, "mean_miss": self.mean_miss,
                "rms_miss": self.rms_miss, "outlier": self.outlier,
                "outlying_depths_mm": [d * 1e3 for d in self.outlying_readings]}


@dataclass
class FurnaceFit:
    """The fitted multipliers of a furnace, their 95 % intervals, and each load's misfit."""

    furnace: str
    treatment: str
    multipliers: dict[str, float]  # parameter key -> fitted value (d_multiplier, beta factor, n_multiplier)
    intervals: dict[str, tuple[float, float]]
    scatter: float  # s: the weighted residual standard deviation (1 = the readings' usual scatter)
    readings: int
    loads: list[LoadFit]
    beta: float | None = None  # m/s: β of the first load at its temperature, fitted factor applied
    beta_interval: tuple[float, float] | None = None
    #: how the loads took β (the first load's model and its β multiplier or β), for plans that take this fit
    beta_model: str | None = None
    beta_base: float | None = None
    grade: str | None = None  # the steel grade the fit is of (None: every grade the furnace ran)
    grades: dict[str, int] = field(default_factory=dict)  # grade -> loads fitted

    def to_dict(self) -> dict:
        out: dict[str, Any] = {"furnace": self.furnace, "treatment": self.treatment, "readings": self.readings,
                               "scatter": self.scatter, "grade": self.grade, "grades": dict(self.grades),
                               "loads": [load.to_dict() for load in self.loads]}
        for key, value in self.multipliers.items():
            name = NAMES[key][0]
            out[name] = value
            out[f"{name}_ci"] = list(self.intervals[key])
        if self.beta is not None:
            out["beta_cm_per_s"] = self.beta * 100.0
            out["beta_ci"] = [b * 100.0 for b in self.beta_interval]
            out["beta_model"], out["beta_base"] = self.beta_model, self.beta_base
        return out

    def text(self) -> str:
        loads = len({(load.number, load.date) for load in self.loads})
        which = f"Furnace {self.furnace}" + ("" if self.grade is None else f", grade {self.grade}")
        lines = [f"{which}: {loads} loads, {len(self.loads)} coupons, {self.readings} readings fitted at "
                 f"once (scatter {self.scatter:.2f} × the readings' usual)"]
        if self.grade is None and len(self.grades) > 1:
            lines.append("  grades: " + ", ".join(f"{g} ({n} load{'s' * (n != 1)})" for g, n in self.grades.items())
                         + "; a grade's own fit: --grade")
        for key, value in self.multipliers.items():
            low, high = self.intervals[key]
            name = NAMES[key][1]
            if high / low > UNDETERMINED:
                lines.append(f"  {name:<15} {value:.3f}  (not determined by these readings: its 95 % interval "
                             f"spans more than a factor of {UNDETERMINED:g}; "
                             + ("record readings near the surface)" if key == "beta" else "record more traverses)"))
                continue
            lines.append(f"  {name:<15} {value:.3f}  (95 % interval {low:.3f}–{high:.3f})")
        if self.beta is not None and self.intervals["beta"][1] / self.intervals["beta"][0] <= UNDETERMINED:
            low, high = self.beta_interval
            lines.append(f"  β                {self.beta * 100:.3g} cm/s at the first load's temperature "
                         f"({low * 100:.3g}–{high * 100:.3g})")
        for load in self.loads:
            show = {"carbon": formats.carbon, "hardness": formats.hv}.get(load.kind, formats.length)
            flag = "  OUTLIER" if load.outlier else ""
            sign = "" if show(abs(load.mean_miss)) == show(0.0) else "+" if load.mean_miss > 0 else "−"
            lines.append(f"  load {load.number} ({load.date}), {KINDS[load.kind].label}: misses by "
                         f"{sign}{show(abs(load.mean_miss))} on "
                         f"average, rms {show(load.rms_miss)}{flag}")
        return "\n".join(lines)


class _Model:
    """The recorded loads of one furnace as a function of the fitted parameters (log multipliers)."""

    def __init__(self, loads: list[Load]):
        self.loads, self.plans, self.soaks, self.shares = [], [], [], []
        for load in loads:
            kinds = FITTED.get(str(load.plan.get("treatment", "carburizing")), ())
            load = Load(load.furnace, load.number, load.date, load.plan, load.soak, load.parts, load.notes,
                        [m for m in load.measurements if m.kind in kinds], load.id)
            if not load.measurements:
                continue
            values, soak, shares = as_run(load)
            self.loads.append(load)
            self.plans.append(values)
            self.soaks.append(soak)
            self.shares.append(shares)
        if not self.loads:
            raise InputError("furnace", "no load of this furnace has measurements to fit")
        treatments = {v["treatment"] for v in self.plans}
        if len(treatments) > 1:
            raise InputError("furnace", f"the furnace's loads are of several treatments ({', '.join(sorted(treatments))})"
                                        f": fit each on its own")
        self.treatment = treatments.pop()
        if self.treatment == "carburizing":
            self.keys = ["d_multiplier"] + (["beta"] if all(not v["beta_held"] for v in self.plans) else [])
        elif self.treatment == "nitriding":
            levels = any(m.kind in ("hardness", "surface_hardness") for load in self.loads for m in load.measurements)
            self.keys = ["n_multiplier"] + (["strength_multiplier"] if levels else [])
        else:
            raise InputError("furnace", f"the furnace fit takes carburizing and nitriding loads, not {self.treatment}")

    def values_at(self, values: Mapping[str, Any], theta: np.ndarray) -> dict:
        out = dict(values)
        for key, x in zip(self.keys, theta):
            if key == "beta":
                out.update(shift_beta(out, math.exp(x)))
            else:
                out[key] = math.exp(x)
        return out

    def predictions(self, theta: np.ndarray) -> list[list[np.ndarray]]:
        """The model's value at every reading, load by load and measurement by measurement; the loads that split
        their time alike are run together (:func:`casedepth.plan.evaluate.forward_many`: the same numbers as one
        by one)."""
        from ..plan.evaluate import forward_many

        results: list = [None] * len(self.loads)
        groups: dict = {}
        for k, shares in enumerate(self.shares):
            groups.setdefault(shares, []).append(k)
        for shares, rows in groups.items():
            for k, result in zip(rows, forward_many([self.values_at(self.plans[k], theta) for k in rows],
                                                    [self.soaks[k] for k in rows], shares)):
                results[k] = result
        out = []
        for load, result in zip(self.loads, results):
            depth, carbon, hardness = _profiles(result, any(m.kind in _HARDNESS for m in load.measurements))
            out.append([np.array([result.window_depth]) if m.kind in ("case_depth", "nitrided_depth") else
                        hardness[:1] if m.kind == "surface_hardness" else
                        np.interp([d for d, _ in m.points], depth, carbon if m.kind == "carbon" else hardness)
                        for m in load.measurements])
        return out

    def residuals(self, theta: np.ndarray) -> np.ndarray:
        parts = []
        for load, predicted in zip(self.loads, self.predictions(theta)):
            for m, p in zip(load.measurements, predicted):
                parts.append((p - np.array([v for _, v in m.points])) / SCATTER[m.kind])
        return np.concatenate(parts)


def as_run(load: Load) -> tuple[dict, float, tuple[float, ...] | None]:
    """A recorded load as it ran: its plan's values, the soak [s] (as recorded, else the plan's) and the split of its
    held stages the plan gave (None for one soak): the recipe the plan gave for its nominal values, held fixed."""
    from ..plan import evaluate
    from ..plan.fileformat import from_dict

    try:
        values = from_dict(load.plan).values()
    except InputError as error:
        raise InputError("record", f"load {load.number}: its plan cannot be read ({error.message})") from None
    outcome = evaluate(values)
    held = outcome.held_shares
    return values, (load.soak if load.soak is not None else outcome.soak_time), (held if len(held) > 1 else None)


@dataclass
class DepthCheck:
    """A recorded load's depth as its plan predicted it (the plan's model, as calibrated when it was planned, run for
    the soak recorded) and as measured: a measured depth, or where a coupon's traverse reads what the model reads at
    its depth (a carbon profile or hardness traverse crossing the drawing's threshold); None where nothing says."""

    number: str
    date: str
    predicted: float  # m
    measured: float | None  # m
    how: str  # which coupon gave the measured depth

    @property
    def miss(self) -> float | None:
        return None if self.measured is None else self.predicted - self.measured

    def to_dict(self) -> dict:
        return {"load": self.number, "date": self.date, "predicted_mm": self.predicted * 1e3,
                "measured_mm": None if self.measured is None else self.measured * 1e3, "measured_from": self.how}


def _crossing(points: list[tuple[float, float]], level: float) -> float | None:
    """The first depth [m] where readings falling inward pass below ``level`` (linear between readings)."""
    for (d0, v0), (d1, v1) in zip(points, points[1:]):
        if v0 >= level > v1:
            return d0 + (v0 - level) / (v0 - v1) * (d1 - d0)
    return None


def depth_check(load: Load) -> DepthCheck:
    """:class:`DepthCheck` of one recorded load (``InputError`` naming ``record`` for a plan that cannot be read)."""
    from ..plan import forward

    values, soak, shares = as_run(load)
    result = forward(values, soak, shares=shares)
    predicted = result.window_depth
    depth, carbon, hardness = _profiles(result, any(m.kind == "hardness" for m in load.measurements))
    found, how = None, ""
    for m in load.measurements:
        if m.kind in ("case_depth", "nitrided_depth"):
            return DepthCheck(load.number, load.date, predicted, m.points[0][1], KINDS[m.kind].label)
        if found is None and m.kind in ("carbon", "hardness") and len(m.points) > 1:
            curve = carbon if m.kind == "carbon" else hardness
            if curve is not None:
                found = _crossing(sorted(m.points), float(np.interp(predicted, depth, curve)))
                how = f"{KINDS[m.kind].label} at the threshold"
    return DepthCheck(load.number, load.date, predicted, found, how if found is not None else "")


def _profiles(result, hardness: bool = True) -> tuple[np.ndarray, np.ndarray | None, np.ndarray | None]:
    """(depth [m], carbon [wt %] or None, hardness [HV]) along a forward result's profile; a carburized profile's
    hardness (the quench's cooling at every depth: the costly part) only with ``hardness``."""
    if hasattr(result, "profile"):  # carburizing
        from ..carburizing.outcome import hardness_along
        return (result.profile.depth, result.profile.carbon,
                hardness_along(result.setup, result.profile) if hardness else None)
    return np.asarray(result.depth), None, np.asarray(result.hardness)


def fit_furnace(loads: list[Load], furnace: str = "", grade: str | None = None) -> FurnaceFit:
    """The multipliers that fit all of ``loads`` (one furnace's; with ``grade``, those of that steel grade) at once;
    see the module notes.

    :class:`InputError` naming ``furnace`` or ``record`` for loads that cannot be fitted together (no
    measurements, several treatments, too few readings for the parameters); :class:`NotReachableError` naming
    ``furnace`` when a multiplier ends at the edge of 0.1–10 (the model cannot reproduce the readings)."""
    from scipy.optimize import least_squares  # imported on first use: it is slow to import

    if grade is not None:
        grade = " ".join(str(grade).split())
        ran = sorted({grade_of(load) for load in loads})
        loads = [load for load in loads if same_grade(grade_of(load), grade)]
        if not loads:
            raise InputError("grade", f"no load of {furnace or 'these'} is of {grade}; its loads are of "
                                      f"{', '.join(ran) or 'no grade'}")
    model = _Model(loads)
    grades: dict[str, int] = {}
    for load in model.loads:
        grades[grade_of(load)] = grades.get(grade_of(load), 0) + 1
    p = len(model.keys)
    start = np.zeros(p)
    n = len(model.residuals(start))
    if n <= p + 1:
        raise InputError("furnace", f"{n} readings cannot fit {p} multipliers with an uncertainty: record more")
    found = least_squares(model.residuals, start, bounds=([BOUNDS[0]] * p, [BOUNDS[1]] * p), diff_step=1e-3,
                          x_scale=1.0, method="trf")
    theta = found.x
    for key, x in zip(model.keys, theta):
        if x - BOUNDS[0] < 1e-3 or BOUNDS[1] - x < 1e-3:
            raise NotReachableError("furnace", f"the {key.replace('_', ' ')} that fits the record is at the edge of "
                                               f"0.1–10: the plan's model cannot reproduce these readings; check the "
                                               f"loads' soaks and the readings' depths")
    r = found.fun
    s2 = float(r @ r) / (n - p)
    J = found.jac
    try:
        covariance = s2 * np.linalg.inv(J.T @ J)
    except np.linalg.LinAlgError:
        raise InputError("furnace", "the readings cannot tell the multipliers apart (add traverses that reach "
                                    "the core and points near the surface)") from None
    sigma = np.sqrt(np.maximum(np.diag(covariance), 0.0))
    multipliers = {key: math.exp(x) for key, x in zip(model.keys, theta)}
    intervals = {key: (math.exp(x - Z95 * s), math.exp(x + Z95 * s)) for key, x, s in zip(model.keys, theta, sigma)}
    s = math.sqrt(s2)
    # outliers are judged against a robust scatter (1.4826 × the median absolute weighted miss, which a few bad
    # coupons do not inflate as they inflate s), never below the readings' usual scatter
    robust = max(1.4826 * float(np.median(np.abs(r))), 1.0)
    fits = []  # one per measured coupon: a carbon profile and a hardness traverse of a load are judged apart
    for load, values in zip(model.loads, model.predictions(theta)):
        for m, p_values in zip(load.measurements, values):
            miss = p_values - np.array([v for _, v in m.points])
            w = miss / SCATTER[m.kind]
            outlying = [d for (d, _), x in zip(m.points, w) if abs(x) > OUTLIER_READING * robust]
            fits.append(LoadFit(load.number, load.date, m.kind, float(np.mean(miss)), float(np.sqrt(np.mean(miss ** 2))),
                                float(np.sqrt(np.mean(w ** 2))) > OUTLIER_LOAD * robust, outlying))
    beta = beta_interval = None
    if "beta" in multipliers:
        from ..carburizing.outcome import carburizing_setup

        first = model.values_at(model.plans[0], theta)
        beta = carburizing_setup(first).beta
        low, high = intervals["beta"]
        beta_interval = (beta * low / multipliers["beta"], beta * high / multipliers["beta"])
        plan = model.plans[0]
        base = (plan["beta_model"], plan["beta_multiplier"] if plan["beta_model"] == "gas-2026" else plan["beta"])
    else:
        base = (None, None)
    return FurnaceFit(furnace, model.treatment, multipliers, intervals, s, n, fits, beta, beta_interval, *base,
                      grade=grade, grades=grades)


def apply_calibration(values: Mapping[str, Any], saved, keep: tuple[str, ...] = ()) -> dict:
    """A plan's values taking a furnace's saved fit (:class:`casedepth.shop.record.SavedCalibration`): its diffusivity
    multiplier, and its β where the plan takes β as the fitted loads did (from the gas, or one value) with the load
    spread's β band set to the fit's 95 % interval, each unless its key is in ``keep`` (values a person gave); the
    plan's ``calibration`` names the fit and what was taken (empty if nothing was). A fit of another treatment is
    refused."""
    values = dict(values)
    fit = saved.fit
    if saved.treatment != values["treatment"]:
        raise InputError("calibration", f"{saved.label()} is a fit of {saved.treatment} loads, not {values['treatment']}")
    taken = []
    for fit_key, key, name in (("diffusivity_multiplier", "d_multiplier", "D"),
                               ("nitrogen_diffusivity_multiplier", "n_multiplier", "D_N"),
                               ("strength_multiplier", "strength_multiplier", "nitrides' HV")):
        if fit_key in fit and key not in keep:
            values[key] = fit[fit_key]
            taken.append(f"{name} × {fit[fit_key]:.3g}")
            low, high = fit.get(f"{fit_key}_ci", (None, None))
            if key != "strength_multiplier" and low and high and "spread_d_factor" not in keep:
                # the load spread's diffusivity band becomes the fit's 95 % interval: D is known as well as the
                # furnace's record says
                values["spread_d_factor"] = min(max(math.sqrt(high / low), 1.0), 10.0)
    if "beta_factor" in fit and not values.get("beta_held") and fit.get("beta_model") == values.get("beta_model"):
        key = "beta_multiplier" if fit["beta_model"] == "gas-2026" else "beta"
        if key not in keep:
            values[key] = fit["beta_base"] * fit["beta_factor"]
            taken.append(f"β × {fit['beta_factor']:.3g}")
            low, high = fit.get("beta_factor_ci", (None, None))
            if low and high and "spread_beta_factor" not in keep:
                # the load spread's β band becomes the fit's 95 % interval (its half-width as a factor, 1–10):
                # β is known as well as the furnace's record says
                values["spread_beta_factor"] = min(max(math.sqrt(high / low), 1.0), 10.0)
    values["calibration"] = saved.label(taken) if taken else ""
    return values


#: what a furnace's fit may set in a plan, and what a plan goes back to when its furnace has no fit
_CALIBRATED_BACK = {"d_multiplier": 1.0, "n_multiplier": 1.0, "strength_multiplier": 1.0, "beta_multiplier": 1.0,
                    "spread_beta_factor": 2.0, "spread_d_factor": 1.0}


def calibration_changes(values: Mapping[str, Any], furnace: str, keep: tuple[str, ...] = ()) -> dict:
    """The changes a plan takes when it names ``furnace``: that furnace's latest saved fit from the record (the file
    of :func:`casedepth.shop.record.default_database`) applied by :func:`apply_calibration`, except the keys in
    ``keep``; or, if the furnace has none and the plan's multipliers came from another furnace's fit, the multipliers
    back to 1 and no calibration. What the window (the furnace field's companion) and the command line both use."""
    from .record import Record, default_database

    values = dict(values)
    saved = None
    furnace = " ".join(str(furnace).split())
    if furnace and default_database().exists():
        try:
            with Record(default_database()) as record:
                saved = record.calibration(furnace, values["treatment"], values.get("steel"))
        except InputError:
            saved = None  # a file that is no record: plans are not calibrated from it
    if saved is None:
        if not values.get("calibration"):
            return {}
        back = {key: value for key, value in _CALIBRATED_BACK.items() if key not in keep}
        return {**back, "calibration": ""}
    applied = apply_calibration(values, saved, keep)
    return {key: value for key, value in applied.items() if value != values.get(key)}
