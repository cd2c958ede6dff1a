"""Process capability: where the spread of a real load puts the case against the drawing's window.

A planned soak is one number for exact inputs. A load sees a furnace temperature spread (the furnace's
uniformity), a potential the controller holds within a band, a mass-transfer coefficient known to a
factor, and a heat of steel anywhere in its grade's range. :func:`capability` draws the load's parts from
those spreads (a Latin hypercube, McKay, Beckman & Conover 1979), runs the plan's soak on each — the same
soak, the plan's stages counted as the plan counts them, through the one evaluation path
(:func:`casedepth.plan.forward`) — and says where the depths fall: percentiles, the share inside the
drawing's window, Cp and Cpk against it, and which input moves the depth most (each input alone at the
ends of its band).

The inputs and their defaults are rows of :data:`SPREAD_INPUTS`; the command line, the JSON and the tests
read that table.
"""

from __future__ import annotations

import math
import statistics
from dataclasses import dataclass, field, replace
from typing import Any, Callable, Mapping

import numpy as np

from .. import formats
from ..errors import InputError
from ..models.steels import find
from ..parameters import PARAMETERS
from .quote import ShopDefaults
from ..units import DisplayUnits, format_duration

#: AMS 2750 furnace classes and their temperature uniformity, ± K (±5, 10, 15, 20, 25, 50 °F; from memory)
AMS2750_CLASSES = {1: 5 / 1.8, 2: 10 / 1.8, 3: 15 / 1.8, 4: 20 / 1.8, 5: 25 / 1.8, 6: 50 / 1.8}

SAMPLES_RANGE = (16, 4096)
#: how the parts fall within each band (the plan's ``spread_distribution``; the window and ``--distribution`` offer these)
DISTRIBUTIONS = {"uniform": "Uniform within each band", "normal": "Normal, each band ±2σ"}
#: the steel's composition across the load (the plan's ``spread_composition``; ``--composition``)
COMPOSITIONS = {"nominal": "The grade's nominal", "grade-range": "Anywhere in the grade's range"}
#: the mass-transfer coefficient is rarely known better than a factor of 2 either way (common practice)
BETA_FACTOR = 2.0


def survey_class(band: float) -> str:
    """The tightest AMS 2750 class a furnace with uniformity ± ``band`` [K] meets, in words."""
    for number, limit in AMS2750_CLASSES.items():
        if band <= limit + 1e-9:
            return f"AMS 2750 class {number} (±{formats.typed(round(limit * 1.8), '°F')})"
    return "wider than AMS 2750 class 6"


@dataclass(frozen=True)
class SpreadInput:
    """One row of the spread table: an input of the plan that varies from part to part in a load."""

    key: str  # the plan's parameter it moves
    label: str
    default: Callable[[Mapping[str, Any]], float | None]  # the half-width for a plan's values (None: not used)
    apply: Callable[[Mapping[str, Any], float], dict]  # (values, offset in the band's own unit) -> changed values
    describe: Callable[[float, DisplayUnits], str]  # the band in words, in the display units
    note: str  # where the default comes from
    factor: bool = False  # the band is a factor (the input from x/f to x·f, drawn on a log scale), not a ± offset


def _shop(values: Mapping[str, Any]) -> ShopDefaults:
    """The plan's shop (its tolerance bands are the load's default spread)."""
    return ShopDefaults.from_dict(values["shop"]) if "shop" in values else ShopDefaults()


def _used(key: str, values: Mapping[str, Any]) -> bool:
    """Whether the plan's parameter ``key`` plays a part in the plan (the parameter table says)."""
    return key in values and PARAMETERS[key].used_by(values)


def _beta_applies(values) -> bool:
    """Whether the plan has a finite β to spread (one value, or from the gas)."""
    return _used("beta", values) and math.isfinite(values["beta"]) or _used("beta_multiplier", values)


def shift_beta(values, factor: float) -> dict:
    """β times ``factor``: the one value, or the calibration factor on the gas's β."""
    if _used("beta_multiplier", values):
        return {"beta_multiplier": values["beta_multiplier"] * factor}
    return {"beta": values["beta"] * factor}


#: the plan's carbon potentials a controller's band moves alike (those the plan's cycle uses)
_POTENTIAL_KEYS = ("carbon_potential", "boost_potential", "diffuse_potential")


def _own_stages(values) -> list[dict]:
    """The plan's own stages (file form), where its cycle is stages of its own."""
    return list(values["stages"]) if _used("stages", values) else []


def _moves_temperature(values) -> bool:
    return _used("temperature", values) or any("temperature_c" in row for row in _own_stages(values))


def _moves_potential(values) -> bool:
    return (any(_used(key, values) for key in _POTENTIAL_KEYS)
            or any("carbon_potential_pct" in row for row in _own_stages(values)))


def _shop_potential_shift(values, x: float) -> dict:
    """The plan's shop with its potential at hardening temperature moved by ``x`` [wt %], where the shop's drop and
    equalize are stages of the plan's cycle (one soak, or boost and diffuse); else nothing."""
    if "shop" not in values or not _used("count_shop_stages", values):
        return {}
    return {"shop": {**values["shop"], "hardening_potential": _shop(values).hardening_potential + x}}


#: the stages whose temperature is the carburizing setpoint a furnace's uniformity spreads
_CARBURIZING_KINDS = ("heat-up", "soak", "boost", "diffuse")


def _shift_temperature(values, x: float) -> dict:
    """A part ``x`` [K] hotter than the carburizing setpoint (heat-up, soak, boost, diffuse; the furnace temperature,
    or those of a plan's own stages). The hardening temperature (drop, equalize, the quench from it) stays at its
    setpoint: ±8 K there moves the pinion shaft's depth by 0.003 mm and its core by 0.1 HV (measured), and one
    quench then serves every part of a composition and section."""
    if _used("temperature", values):
        return {"temperature": values["temperature"] + x}
    return {"stages": [{**row, "temperature_c": row["temperature_c"] + x}
                       if "temperature_c" in row and row.get("kind") in _CARBURIZING_KINDS else row
                       for row in _own_stages(values)]}


def _shift_potential(values, x: float) -> dict:
    """A carbon potential ``x`` [wt %] off its setpoint at every stage (one probe and controller hold them all, so a
    bias moves every setpoint alike): the potentials the plan's cycle uses and the shop's potential at hardening
    temperature, or each of its own stages'."""
    out = {key: values[key] + x for key in _POTENTIAL_KEYS if _used(key, values)}
    out.update(_shop_potential_shift(values, x))
    if _own_stages(values):
        out["stages"] = [{**row, **{k: row[k] + x for k in ("carbon_potential_pct", "start_potential_pct") if k in row}}
                         for row in _own_stages(values)]
    return out


def _shift_kn(values, x: float) -> dict:
    """A nitriding potential ``x`` off its setpoint; a two-stage plan's set second K_N moves by the same factor."""
    out = {"kn": values["kn"] + x}
    if values.get("two_stage") and values.get("kn_second") is not None:
        out["kn_second"] = values["kn_second"] * (values["kn"] + x) / values["kn"]
    return out


#: the inputs a load spreads, each with its default band (half-widths; a normal distribution reads them as 2σ)
SPREAD_INPUTS: dict[str, SpreadInput] = {row.key: row for row in (
    SpreadInput("temperature", "furnace temperature",
                lambda v: _shop(v).temperature_tolerance_c if _moves_temperature(v) else None,
                _shift_temperature,
                lambda b, u: f"±{formats.typed(round(b * (1.8 if u.imperial else 1.0), 1), u.temperature_unit)}, "
                             f"{survey_class(b)}",
                "the shop's temperature tolerance (Edit → Shop; the band the process sheet prints)"),
    SpreadInput("carbon_potential", "carbon potential",
                lambda v: _shop(v).potential_tolerance_pct if _moves_potential(v) else None,
                _shift_potential,
                lambda b, u: f"±{formats.carbon(b)}",
                "the shop's carbon-potential tolerance (the band the process sheet prints)"),
    SpreadInput("kn", "nitriding potential",
                lambda v: _shop(v).kn_tolerance_pct / 100.0 * v["kn"] if _used("kn", v) else None,
                _shift_kn,
                lambda b, u: f"±{formats.kn(b)}",
                "the shop's K_N tolerance (the band the process sheet prints)"),
    SpreadInput("size", "section",
                lambda v: float(v["spread_section"]) if _used("spread_section", v) and v["spread_section"] > 0 else None,
                lambda v, x: {"size": v["size"] + x},
                lambda b, u: f"±{formats.length(b, u)}",
                "the plan's section tolerance (Load spread; none unless set)"),
    SpreadInput("beta", "mass-transfer coefficient",
                lambda v: float(v.get("spread_beta_factor", BETA_FACTOR)) if _beta_applies(v) else None,
                shift_beta,
                lambda b, u: f"from β/{formats.trimmed(b, 2)} to β×{formats.trimmed(b, 2)}",
                "the plan's factor (Load spread; 2 by default: β is rarely known better, common practice)", True),
    *(SpreadInput(key, label, (lambda v, key=key: float(v["spread_d_factor"])
                               if _used(key, v) and _used("spread_d_factor", v) and v["spread_d_factor"] > 1.0 else None),
                  (lambda v, x, key=key: {key: v[key] * x}),
                  (lambda b, u, name=name: f"from {name}/{formats.trimmed(b, 2)} to {name}×{formats.trimmed(b, 2)}"),
                  "the plan's factor (Load spread; a furnace fit sets its 95 % interval; 1, no spread, unless set)", True)
      for key, label, name in (("d_multiplier", "carbon diffusivity", "D"),
                               ("n_multiplier", "nitrogen diffusivity", "D_N"))),
)}


@dataclass(frozen=True)
class Spread:
    """What spreads in the load: the half-width of each input's band (``bands``, by :data:`SPREAD_INPUTS` key;
    a factor for β, whose band is β/f … β·f), whether the composition ranges over its grade's standard,
    the distribution (``uniform`` within the band, or ``normal`` with the band as 2σ), how many parts are
    drawn and the seed that makes the draw repeatable."""

    bands: Mapping[str, float] = field(default_factory=dict)
    beta_range: tuple[float, float] | None = None  # m/s: the parts' β anywhere in it (log scale), not about the plan's
    composition: str | None = None  # None: the plan's (spread_composition)
    distribution: str | None = None  # None: the plan's (spread_distribution)
    samples: int | None = None  # None: the plan's (spread_samples)
    seed: int = 20261203

    #: the plan's parameter each of the fields above stands in for when it is None
    PLAN_KEYS = {"composition": "spread_composition", "distribution": "spread_distribution", "samples": "spread_samples"}

    def __post_init__(self):
        if self.composition is not None and self.composition not in COMPOSITIONS:
            raise InputError("composition", f"{self.composition!r} is not one of {', '.join(COMPOSITIONS)}")
        if self.distribution is not None and self.distribution not in DISTRIBUTIONS:
            raise InputError("distribution", f"{self.distribution!r} is not one of {', '.join(DISTRIBUTIONS)}")
        if self.samples is not None and not (isinstance(self.samples, int)
                                             and SAMPLES_RANGE[0] <= self.samples <= SAMPLES_RANGE[1]):
            raise InputError("samples", f"{self.samples!r} is not a whole number in {SAMPLES_RANGE[0]}–{SAMPLES_RANGE[1]}")
        if self.beta_range is not None:
            low, high = self.beta_range
            if not (math.isfinite(low) and math.isfinite(high) and 0.0 < low <= high):
                raise InputError("beta_range", f"{self.beta_range!r} must be two finite β with 0 < low ≤ high")
        for key, band in self.bands.items():
            if key not in SPREAD_INPUTS:
                raise InputError(key, f"no spread of {key!r}; choose among {', '.join(SPREAD_INPUTS)}")
            factor = SPREAD_INPUTS[key].factor
            if not (math.isfinite(band) and band >= (1.0 if factor else 0.0)):
                raise InputError(key, f"the band {band!r} must be {'a factor ≥ 1' if factor else '≥ 0'}")

    def resolved(self, values: Mapping[str, Any]) -> dict[str, float]:
        """The band of every input the plan uses: given, or the table's default."""
        out = {}
        for key, row in SPREAD_INPUTS.items():
            default = row.default(values)
            if default is None:
                continue
            out[key] = float(self.bands.get(key, default))
        return out

    def for_plan(self, values: Mapping[str, Any]) -> Spread:
        """This spread with what it leaves open (None) taken from the plan's Load spread settings, or their
        defaults for values that have none."""
        chosen = {}
        for name, key in self.PLAN_KEYS.items():
            if getattr(self, name) is None:
                value = values.get(key, PARAMETERS[key].default)
                if name == "samples":
                    if not float(value).is_integer():
                        raise InputError(key, f"{formats.typed(value, 'parts')} is not a whole number of parts")
                    value = int(value)
                chosen[name] = value
        return replace(self, **chosen)


@dataclass
class Capability:
    """Where the load's depths fall: ``depths`` [m] of the drawn parts, the plan's ``soak`` [s] and its nominal
    depth [m], the drawing's window [m], the bands used and, per input, the depth at the low and high ends of
    its band with everything else nominal (the sensitivity)."""

    values: dict
    soak: float
    nominal: float
    depths: np.ndarray
    window: tuple[float, float]
    bands: dict[str, float]
    spread: Spread
    sensitivity: dict[str, tuple[float, float]]
    composition_range: dict[str, tuple[float, float]]
    centred: "Centred | None" = None
    figures: dict[str, np.ndarray] = field(default_factory=dict)  # the parts' other figures (FIGURES), by key
    #: the parts' carbon profiles at the end: depths [m] (the nominal part's nodes) and the 5th and 95th
    #: percentiles of the carbon there [wt %]; None where the results have no carbon profile (nitriding)
    profile_band: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None
    #: how sure the treatment's model is of the depth, in words, where it says (nitriding, until calibrated): the
    #: load's spread is on top of it, so it is printed beside the spread
    model_uncertainty: str | None = None
    #: the stages held at temperature whose lengths make ``soak``, and each one's share of it (the plan's split: boost
    #: and diffuse, its own soaks, two nitriding stages), ``(name, share)``
    held: tuple[tuple[str, float], ...] = (("soak", 1.0),)
    #: the plan's surface-carbon window [wt %] (boost and diffuse), which a part must meet too to count as inside
    surface_window: tuple[float, float] | None = None
    #: per input, the surface carbon [wt %] at the low and high ends of its band (with a surface window)
    surface_sensitivity: dict[str, tuple[float, float]] = field(default_factory=dict)

    #: a load is capable when at least this share of its parts lands inside the window (common practice: 95 %)
    WANTED_SHARE = 0.95

    PERCENTILES = (1, 5, 50, 95, 99)

    @property
    def percentiles(self) -> dict[str, float]:
        """p1, p5, p50, p95 and p99 of the depth [m]."""
        return {f"p{p}": float(np.percentile(self.depths, p)) for p in self.PERCENTILES}

    @property
    def surface(self) -> np.ndarray | None:
        """The parts' surface carbon [wt %], where the plan has a surface-carbon window."""
        return None if self.surface_window is None else self.figures["surface_carbon_pct"]

    @property
    def share_in_window(self) -> float:
        """The share of parts inside the drawing's window (and inside the surface-carbon window, where the plan has
        one)."""
        return _inside(self.depths, self.window, self.surface, self.surface_window)[2]

    @property
    def share_in_depth_window(self) -> float:
        return _inside(self.depths, self.window, self.surface, self.surface_window)[0]

    @property
    def share_in_surface_window(self) -> float | None:
        return None if self.surface_window is None else _inside(self.depths, self.window, self.surface,
                                                                 self.surface_window)[1]

    def held_words(self, soak: float, short: bool = False) -> str:
        """The held stages for a time at temperature of ``soak`` [s], in words (``short``: without the total)."""
        if len(self.held) == 1:  # "soak 5 h 59 min"; a counted name apart: "6 pulses, 2 h 26 min"
            name = self.held[0][0]
            return f"{name}{',' if any(c.isdigit() for c in name) else ''} {format_duration(soak)}"
        parts = " + ".join(f"{name} {format_duration(share * soak)}" for name, share in self.held)
        return parts if short else f"{parts}, the plan's split of {format_duration(soak)} at temperature"

    def held_to_dict(self, soak: float) -> list[dict]:
        return [{"stage": name, "time_h": share * soak / 3600.0} for name, share in self.held]

    @property
    def cp(self) -> float:
        """Cp = (USL − LSL) / 6σ (ISO 22514-2; from memory)."""
        sigma = float(np.std(self.depths, ddof=1))
        return math.inf if sigma == 0.0 else (self.window[1] - self.window[0]) / (6.0 * sigma)

    @property
    def cpk(self) -> float:
        """Cpk = min(USL − μ, μ − LSL) / 3σ (ISO 22514-2; from memory)."""
        sigma = float(np.std(self.depths, ddof=1))
        mean = float(np.mean(self.depths))
        room = min(self.window[1] - mean, mean - self.window[0])
        return math.inf if sigma == 0.0 else room / (3.0 * sigma)

    def figure_percentiles(self, name: str) -> dict[str, float]:
        """p1 … p99 of one of the parts' other figures, in its own unit (the key's suffix)."""
        return {f"p{p}": float(np.percentile(self.figures[name], p)) for p in self.PERCENTILES}

    def ranked(self, sensitivity: Mapping[str, tuple[float, float]] | None = None) -> list[tuple[str, float]]:
        """Inputs by how far their band alone moves the depth (or what ``sensitivity`` gives, e.g. the surface
        carbon: half the low-to-high change), largest first."""
        table = self.sensitivity if sensitivity is None else sensitivity
        moves = {key: abs(high - low) / 2.0 for key, (low, high) in table.items()}
        return sorted(moves.items(), key=lambda item: -item[1])

    def to_dict(self) -> dict:
        return {
            "soak_time_h": self.soak / 3600.0, "nominal_depth_mm": self.nominal * 1e3,
            "case_depth_percentiles_mm": {k: v * 1e3 for k, v in self.percentiles.items()},
            "share_in_window": self.share_in_window, "cp": _finite(self.cp), "cpk": _finite(self.cpk),
            "window_mm": [self.window[0] * 1e3, self.window[1] * 1e3],
            **{_percentiles_key(name): self.figure_percentiles(name) for name in self.figures},
            **({"hardness_uncertainty_hrc": FIGURE_UNCERTAINTY["surface_hardness_hrc"]}
               if any(name in FIGURE_UNCERTAINTY for name in self.figures) else {}),
            "sensitivity": {key: {"low_mm": low * 1e3, "high_mm": high * 1e3}
                            for key, (low, high) in self.sensitivity.items()},
            **({} if self.centred is None else {
                "centred_soak_time_h": self.centred.soak / 3600.0, "share_in_window_at_centred": self.centred.share,
                "centred_held_stages": self.held_to_dict(self.centred.soak)}),
            "held_stages": self.held_to_dict(self.soak),
            **({} if self.surface_window is None else {
                "surface_window_pct": list(self.surface_window), "share_in_depth_window": self.share_in_depth_window,
                "share_in_surface_window": self.share_in_surface_window,
                "surface_sensitivity": {key: {"low_pct": low, "high_pct": high}
                                        for key, (low, high) in self.surface_sensitivity.items()}}),
            "warnings": self.warnings(),
            **({"model_uncertainty": self.model_uncertainty} if self.model_uncertainty else {}),
            "spread": {"bands": dict(self.bands), "composition": self.spread.composition,
                       "composition_range_pct": {el: list(r) for el, r in self.composition_range.items()},
                       "distribution": self.spread.distribution, "samples": self.spread.samples,
                       "seed": self.spread.seed},
        }

    def sheet_line(self, units: DisplayUnits) -> str:
        """The load's spread in a few words, for the process sheet's result."""
        pct = self.percentiles
        return (f"load spread ({self.spread.samples} parts, shop's tolerances): "
                f"{formats.length_range(pct['p5'], pct['p95'], units)} for 90 % of parts, "
                f"{formats.percent(100 * self.share_in_window)} inside"
                f"{' both windows' if self.surface_window is not None else ''}, Cpk\u00a0{_index(self.cpk)}")

    def text(self, units: DisplayUnits) -> str:
        pct = self.percentiles
        low, high = self.window
        lines = [f"Capability: {self.held_words(self.soak)} (the plan's aim, {units.format_length(self.nominal)}), "
                 f"{self.spread.samples} parts drawn (Latin hypercube), {self.spread.distribution} bands"]
        bands = [f"{SPREAD_INPUTS[k].label} {SPREAD_INPUTS[k].describe(b, units)}" for k, b in self.bands.items()]
        bands.append("composition " + ("nominal" if not self.composition_range else "over the grade's range"))
        lines.append("  spread            " + "; ".join(bands))
        lines.append("  depth             " + " · ".join(f"{k} {units.format_length(v)}" for k, v in pct.items()))
        if self.model_uncertainty:
            lines.append(f"  the model's own   {self.model_uncertainty} (on top of the load's spread)")
        for name in self.figures:
            label, shown = FIGURES[name]
            sure = (f" (each ±{formats.trimmed(FIGURE_UNCERTAINTY[name], 1)} HRC: the model's own uncertainty)"
                    if name in FIGURE_UNCERTAINTY else "")
            lines.append(f"  {label:17s} " + " · ".join(f"{k} {shown(v)}" for k, v in self.figure_percentiles(name).items())
                         + sure)
        lines.append(f"  drawing window    {formats.length_range(low, high, units)}: "
                     f"{formats.percent(100 * self.share_in_depth_window)} inside; Cp {_index(self.cp)}, Cpk {_index(self.cpk)}")
        if self.surface_window is not None:
            lines.append(f"  surface window    {formats.carbon_range(*self.surface_window)}: "
                         f"{formats.percent(100 * self.share_in_surface_window)} inside; both windows "
                         f"{formats.percent(100 * self.share_in_window)}")
        moves = [f"{_label(k)} {formats.length_effect(m, units)}" for k, m in self.ranked()]
        lines.append("  moves it most     " + ", ".join(moves))
        if self.surface_sensitivity:
            moves = [f"{_label(k)} {formats.carbon_effect(m)}" for k, m in self.ranked(self.surface_sensitivity)]
            lines.append("  moves surface C   " + ", ".join(moves))
        if self.centred is not None:
            lines.append(f"  centred           {self.held_words(self.centred.soak)}: "
                         f"{formats.percent(100 * self.centred.share)} inside (the plan's aim: "
                         f"{formats.percent(100 * self.share_in_window)})")
        lines += [f"Warning: {w}" for w in self.warnings(units)]
        return "\n".join(lines)

    def warnings(self, units: DisplayUnits = DisplayUnits()) -> list[str]:
        """A load that is not capable, and what to tighten first (lengths in ``units``): the input that moves the
        depth most, or the surface carbon where that window is the one missed."""
        shares = _inside(self.depths, self.window, self.surface, self.surface_window)
        if self.centred is not None and self.centred.share > shares[2]:
            shares = _inside(self.centred.depths, self.window, self.centred.surface, self.surface_window)
        best = shares[2]
        if best >= self.WANTED_SHARE or not self.sensitivity:
            return []
        where = "at the plan's time at temperature" if self.centred is None else "at any time at temperature"
        missed = formats.length_range(*self.window, units)
        if self.surface_window is not None:
            missed += f" and {formats.carbon_range(*self.surface_window)} at the surface"
        depth_short = shares[0] < self.WANTED_SHARE or not self.surface_sensitivity
        first = self.ranked()[0][0] if depth_short else self.ranked(self.surface_sensitivity)[0][0]
        return [f"Fewer than {formats.percent(100 * self.WANTED_SHARE)} of the parts land inside {missed} {where} "
                f"(best {formats.percent(100 * best)}): tighten the {_label(first)} first; it moves the "
                f"{'depth' if depth_short else 'surface carbon'} most."]


#: the figures besides the depth a load's spread is reported for: key (unit as its suffix) -> (label, format)
FIGURES: dict[str, tuple[str, Callable[[float], str]]] = {
    "surface_carbon_pct": ("surface carbon", formats.carbon),
    "surface_hardness_hrc": ("surface hardness", formats.hrc),
    "core_hardness_hrc": ("core hardness", formats.hrc),
    "compound_layer_um": ("compound layer", lambda um: formats.thin_length(um * 1e-6)),
}
#: what the model itself is sure of, where a figure carries more than the load's spread: the hardness read from the
#: quench (coefficients from memory, the quench's constant h an average; the plan's outcome prints the same ±3 HRC)
FIGURE_UNCERTAINTY = {"surface_hardness_hrc": 3.0, "core_hardness_hrc": 3.0}


def _percentiles_key(name: str) -> str:
    """``surface_carbon_pct`` -> ``surface_carbon_percentiles_pct`` (as ``case_depth_percentiles_mm``)."""
    base, unit = name.rsplit("_", 1)
    return f"{base}_percentiles_{unit}"


def _label(key: str) -> str:
    return SPREAD_INPUTS[key].label if key in SPREAD_INPUTS else key


def _inside(depths: np.ndarray, window: tuple[float, float], surface: np.ndarray | None,
            surface_window: tuple[float, float] | None) -> tuple[float, float | None, float]:
    """The shares of parts inside the depth window, inside the surface-carbon window (None without one) and inside
    both."""
    deep = (depths >= window[0]) & (depths <= window[1])
    if surface_window is None:
        return float(np.mean(deep)), None, float(np.mean(deep))
    rich = (surface >= surface_window[0]) & (surface <= surface_window[1])
    return float(np.mean(deep)), float(np.mean(rich)), float(np.mean(deep & rich))


def _finite(value: float) -> float | None:
    return value if math.isfinite(value) else None


def _index(value: float) -> str:
    return "∞ (no spread)" if not math.isfinite(value) else f"{value:.2f}"


def _unit_samples(count: int, dimensions: int, rng: np.random.Generator) -> np.ndarray:
    """A Latin hypercube in (0, 1)^d: each dimension's ``count`` strata hit once, in random order, at a random
    point of the stratum (McKay, Beckman & Conover 1979, Technometrics 21: 239–245)."""
    strata = np.array([rng.permutation(count) for _ in range(dimensions)]).T
    return (strata + rng.random((count, dimensions))) / count


def _offset(u: np.ndarray, band: float, distribution: str, log: bool = False) -> np.ndarray:
    """Offsets [band's unit] for uniform numbers ``u``: uniform within ±band, or normal with 2σ = band (a factor
    ``band`` for β: log-uniform or log-normal between 1/band and band)."""
    scale = math.log(band) if log else band
    if distribution == "uniform":
        x = (2.0 * u - 1.0) * scale
    else:
        normal = statistics.NormalDist()
        x = np.array([normal.inv_cdf(float(v)) for v in u]) * (scale / 2.0)
    return np.exp(x) if log else x


def _composition_range(values: Mapping[str, Any], spread: Spread) -> dict[str, tuple[float, float]]:
    if spread.composition == "nominal":
        return {}
    try:
        steel = find(values["steel"])
    except InputError:
        raise InputError("composition", "a custom composition has no grade range: give a library grade, or "
                                        "--composition nominal") from None
    if not steel.composition_range:
        raise InputError("composition", f"the library gives no composition range for {steel.name}")
    return dict(steel.composition_range)


@dataclass(frozen=True)
class Draw:
    """The parts of a load drawn from a spread: the spread with the plan's settings filled in, the plan as the parts
    are spread about (``base``: β moved to the middle of a given β range), each input's band, the composition
    ranges, and each part's offsets (by input key, or element for the composition)."""

    spread: Spread
    base: dict
    bands: dict[str, float]
    ranges: dict[str, tuple[float, float]]
    parts: list[dict[str, float]]

    def moved(self, changes: Mapping[str, float]) -> dict:
        """The plan's values with ``changes`` applied (offsets by input key; an element's content [wt %])."""
        out = dict(self.base)
        composition = dict(self.base["composition"])
        for key, x in changes.items():
            if key in SPREAD_INPUTS:  # in turn: two inputs may move one table (a plan's own stages)
                out.update(SPREAD_INPUTS[key].apply(out, x))
            else:
                composition[key] = x
        out["composition"] = composition
        return out

    def part_values(self) -> list[dict]:
        """Each part's plan values."""
        return [self.moved(changes) for changes in self.parts]


def draw_parts(values: Mapping[str, Any], spread: Spread = Spread()) -> Draw:
    """The parts of a load of the plan ``values``, drawn with ``spread`` (what it leaves open from the plan's Load
    spread settings) by a Latin hypercube (McKay, Beckman & Conover 1979)."""
    values = dict(values)
    spread = spread.for_plan(values)
    base = dict(values)
    bands = spread.resolved(values)
    if spread.beta_range is not None:
        if not _beta_applies(values):
            raise InputError("beta_range", "the plan has no finite mass-transfer coefficient to spread")
        low, high = spread.beta_range  # β itself, at every temperature: one value about which the parts spread
        base["beta"], bands["beta"] = math.sqrt(low * high), math.sqrt(high / low)
        base["beta_model"] = "constant"
    ranges = _composition_range(values, spread)
    keys = list(bands)
    rng = np.random.default_rng(spread.seed)
    u = _unit_samples(spread.samples, len(keys) + len(ranges), rng)
    columns = {key: _offset(u[:, i], bands[key], spread.distribution, log=SPREAD_INPUTS[key].factor)
               for i, key in enumerate(keys)}
    for j, element in enumerate(ranges):
        low, high = ranges[element]
        column = u[:, len(keys) + j]
        if spread.distribution == "normal":  # the range as ±2σ about its middle, held inside it
            column = np.clip(0.5 + _offset(column, 0.5, "normal"), 0.0, 1.0)
        columns[element] = low + column * (high - low)
    parts = [{key: float(col[i]) for key, col in columns.items()} for i in range(spread.samples)]
    return Draw(spread, base, bands, ranges, parts)


def capability(values: Mapping[str, Any], spread: Spread = Spread(), soak: float | None = None,
               optimize: bool | None = False, outcome=None) -> Capability:
    """Where the depths of a load planned by ``values`` fall with ``spread``, after the plan's aim time at temperature
    (or ``soak`` [s]); what ``spread`` leaves open comes from the plan's Load spread settings (:meth:`Spread.for_plan`).

    Each part (:func:`draw_parts`) is the plan with its inputs moved within their bands, run through
    :func:`casedepth.plan.forward_many` with the plan's own cycle: one soak, or its held stages (boost and diffuse,
    its own soaks, two nitriding stages) in the plan's split of the time at temperature
    (:attr:`~casedepth.outcome.Outcome.held_shares`: the load runs the recipe planned for the nominal part). With
    ``optimize``, also the time at temperature, in the same split, that puts most parts inside the drawing's window
    (and the surface-carbon window, where the plan has one; each part run at a second time, :func:`_best_soak`);
    ``optimize`` None: as the treatment's row says for the window (:attr:`~casedepth.treatments.Treatment.centres_spread`);
    ``outcome``: the plan's evaluation, where the caller has it (else it is evaluated here)."""
    from ..plan.evaluate import evaluate, forward_many
    from ..treatments import treatment_of

    if optimize is None:
        optimize = treatment_of(values).centres_spread

    if outcome is None or outcome.values != dict(values):
        outcome = evaluate(values)
    values = outcome.frozen_values()  # the cycle planned for the nominal part is what every part of the load runs
    drawn = draw_parts(values, spread)
    spread, bands, ranges, parts, moved = drawn.spread, drawn.bands, drawn.ranges, drawn.parts, drawn.moved
    keys = list(bands)
    held = tuple(name for name, _ in outcome.held_stages)
    shares = outcome.held_shares
    if soak is None:
        soak = outcome.soak_time
    surface_window = (values["surface_min"], values["surface_max"]) if _used("surface_min", values) else None

    # every case this study runs — the nominal part, the load's parts (at a second soak too, to optimize), each
    # input at the ends of its band — in one batch (casedepth.plan.forward_many): the same numbers as one by one
    cases: list[tuple[dict, float]] = [({}, soak), *((changes, soak) for changes in parts)]
    later = soak * (1.0 + OPTIMIZE_STEP)
    if optimize:
        cases += [(changes, later) for changes in parts]
    ends = {}
    for key in keys:
        if bands[key] not in (0.0, 1.0):
            ends[key] = (1.0 / bands[key], bands[key]) if SPREAD_INPUTS[key].factor else (-bands[key], bands[key])
            cases += [({key: ends[key][0]}, soak), ({key: ends[key][1]}, soak)]
    if ranges:
        # the grade's whole range at once, each element at the end that deepens the case and the end that does not
        cases += [({el: lo for el, (lo, hi) in ranges.items()}, soak), ({el: hi for el, (lo, hi) in ranges.items()}, soak)]
    results = iter(forward_many([moved(changes) for changes, _ in cases], [at for _, at in cases], shares))
    nominal_result = next(results)
    nominal = nominal_result.window_depth
    done = [next(results) for _ in parts]
    band = _profile_band(nominal_result, done)
    depths = np.array([r.window_depth for r in done])
    figures_of = getattr(type(done[0]), "figures_of", None)  # a treatment's results may work them out together
    figures = (figures_of(done) if figures_of is not None else
               {name: np.array([r.spread_figures[name] for r in done]) for name in done[0].spread_figures})
    window = (values["case_min"], values["case_max"])
    centred = None
    if optimize:
        later_done = [next(results) for _ in parts]
        surface = None if surface_window is None else (
            figures["surface_carbon_pct"], np.array([r.surface_carbon for r in later_done]), surface_window)
        centred = _best_soak(soak, depths, later, np.array([r.window_depth for r in later_done]), window, surface)
    sensitivity, surface_sensitivity = {}, {}
    for key in [*keys, *(["composition"] if ranges else [])]:
        if key in ends or key == "composition":
            low, high = next(results), next(results)
            sensitivity[key] = (low.window_depth, high.window_depth)
            if surface_window is not None:
                surface_sensitivity[key] = (low.surface_carbon, high.surface_carbon)
        else:  # a band of nothing: the nominal
            sensitivity[key] = (nominal, nominal)
            if surface_window is not None:
                surface_sensitivity[key] = (nominal_result.surface_carbon,) * 2
    model_uncertainty = getattr(nominal_result, "uncertainty", None)
    if model_uncertainty is not None and getattr(nominal_result.setup, "calibrated_within", None) is not None \
            and bands.get("n_multiplier", 1.0) > 1.0:
        # a furnace fit's D_N interval is the model's uncertainty, and the parts already spread over it
        model_uncertainty = None
    return Capability(values, soak, nominal, depths, window, bands, spread, sensitivity, ranges, centred, figures, band,
                      model_uncertainty, tuple(zip(held, shares)), surface_window, surface_sensitivity)


def _profile_band(nominal, parts) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    """The 5th and 95th percentiles of the parts' carbon at the nominal part's nodes (each part's own profile read
    there, linearly between its nodes), or None where the results carry no carbon profile."""
    profile = getattr(nominal, "profile", None)
    if profile is None or not hasattr(profile, "carbon"):
        return None
    depth = profile.depth
    carbon = np.array([np.interp(depth, p.profile.depth, p.profile.carbon) for p in parts])
    return depth, np.percentile(carbon, 5, axis=0), np.percentile(carbon, 95, axis=0)


#: the second soak each part is run at to find its rate, over the first: 20 % longer
OPTIMIZE_STEP = 0.2


@dataclass(frozen=True)
class Centred:
    """The time at temperature [s] that puts most parts inside the drawing's window (the middle of the times that
    do), the share it puts there, and the parts' depths [m] (and surface carbon [wt %], with a surface window)
    there (from each part's lines)."""

    soak: float
    share: float
    depths: np.ndarray
    surface: np.ndarray | None = None


def _best_soak(soak: float, depths: np.ndarray, later: float, later_depths: np.ndarray,
               window: tuple[float, float],
               surface: tuple[np.ndarray, np.ndarray, tuple[float, float]] | None = None) -> Centred:
    """Each part's depth² is a straight line in the soak (a case grows as √t, and the stages after the soak add
    depth nearly in quadrature: the planners' rule, final² ≈ stop² + c), fixed by its depths at ``soak`` and
    ``later``; with ``surface`` (each part's surface carbon [wt %] at the two times and the window), its surface
    carbon a straight line too (at a fixed split of boost and diffuse the profile is nearly self-similar in
    x/√t, Crank 1975 §2.3, so the surface carbon moves little with the total). The share inside the windows is
    then constant between the times where a part crosses an end of one, so the best times form intervals found
    exactly, and the middle of the best (nearest the plan's soak) is returned."""
    slope = (later_depths**2 - depths**2) / (later - soak)
    low, high = window

    def at(t: float) -> np.ndarray:
        return np.sqrt(np.maximum(depths**2 + slope * (t - soak), 0.0))

    def surface_at(t: float) -> np.ndarray | None:
        return None if surface is None else surface[0] + (surface[1] - surface[0]) * (t - soak) / (later - soak)

    def share(t: float) -> float:
        return _inside(at(t), window, surface_at(t), None if surface is None else surface[2])[2]

    with np.errstate(divide="ignore", invalid="ignore"):
        crossings = [(low**2 - depths**2) / slope, (high**2 - depths**2) / slope]
        if surface is not None:
            rate = (surface[1] - surface[0]) / (later - soak)
            crossings += [(end - surface[0]) / rate for end in surface[2]]
        crossings = np.concatenate(crossings) + soak
    points = np.unique(np.concatenate(([soak * 0.2, soak * 5.0], crossings[np.isfinite(crossings)])))
    points = points[(points > 60.0) & (points < soak * 5.0 + 1.0)]
    if len(points) < 2:
        return Centred(soak, share(soak), depths, surface_at(soak))
    middles = 0.5 * (points[1:] + points[:-1])
    shares = np.array([share(t) for t in middles])
    best = shares.max()
    # the longest run of neighbouring intervals at the best share, nearest the plan's soak: its middle
    runs, start = [], None
    for i, share in enumerate(shares):
        if share == best and start is None:
            start = i
        if start is not None and (share != best or i == len(shares) - 1):
            end = i if share == best else i - 1
            runs.append((points[start], points[end + 1]))
            start = None
    first, last = min(runs, key=lambda r: (abs(0.5 * (r[0] + r[1]) - soak), -(r[1] - r[0])))
    t = 0.5 * (first + last)
    return Centred(float(t), float(best), at(t), surface_at(t))
