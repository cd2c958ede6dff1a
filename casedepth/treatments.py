"""The treatment table: one row per heat treatment the program plans.

A row says what the treatment is called, its command on the command line, the parameter values a
new plan of it starts from (the rest come from the parameter table, :mod:`casedepth.parameters`,
whose rows say which treatments use them), the temperatures it runs at, how a plan of it is
evaluated (into an :class:`~casedepth.outcome.Outcome`) and what a soak of given length gives,
which parameter calibration adjusts, what parts must share to go in one load, and how its
case-depth chart is drawn. Dispatch, the command line, the window, the printed documents, loads
and calibration all read this table; nothing else asks which treatment a plan is.

Adding a treatment is one row here plus its own package (setup, models, outcome); see the
contributor guide.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass
from typing import Any, Callable, Mapping

from . import formats, safety
from .constants import ZERO_CELSIUS
from .errors import InputError
from .models.austenite import Andrews_1965_Ac3
from .outcome import Outcome
from .parameters import Option


def _on_first_use(module: str, name: str) -> Callable:
    """``module``'s function ``name``, imported when first called: a command that only prints (``--help``,
    ``steels``) does not load a treatment's solver and the SciPy behind it."""

    def call(*args, **kwargs):
        return getattr(importlib.import_module(module, __package__), name)(*args, **kwargs)

    call.__name__ = call.__qualname__ = name
    call.__doc__ = f"{module.lstrip('.')}.{name}, imported when first called."
    return call


def _carburizing_temperatures(values) -> tuple[float, float]:
    from .carburizing.setup import MAX_TEMPERATURE

    return Andrews_1965_Ac3(values["composition"]), MAX_TEMPERATURE


def _nitriding_temperatures(values) -> tuple[float, float]:
    from .nitriding.setup import TEMPERATURE_RANGE

    return TEMPERATURE_RANGE


def _carburizing_chart(values, load: bool = False, **kwargs):
    """The case-depth chart of a plan's steel; with ``load``, the band of a load's parts (the plan's Load spread
    settings) around the plan's own curve, for a plan with a single soak."""
    from .carburizing.outcome import carburizing_setup
    from .errors import InputError
    from .report.documents import case_depth_chart

    parts = None
    if load:
        from .shop.capability import draw_parts

        try:
            _one_soak_only(values)  # the chart is of one soak: a band only for a plan that has one
            parts = [carburizing_setup({**v, "process": "single"}) for v in draw_parts(values).part_values()]
        except InputError:  # no single soak to spread: the chart without the band
            parts = None
    return case_depth_chart(carburizing_setup({**values, "process": "single"}), load=parts, **kwargs)


def _nitriding_chart(values, load: bool = False, **kwargs):
    """The nitriding chart of a plan's steel (a load's band is drawn on carburizing charts only, so far)."""
    from .nitriding.outcome import nitriding_setup
    from .report.documents import nitriding_chart

    return nitriding_chart(nitriding_setup(values), **kwargs)


def _lpc_temperatures(values) -> tuple[float, float]:
    from .lpc.setup import TEMPERATURE_RANGE

    return max(TEMPERATURE_RANGE[0], Andrews_1965_Ac3(values["composition"])), TEMPERATURE_RANGE[1]


def _lpc_chart(values, load: bool = False, **kwargs):
    raise InputError("treatment", "the case-depth chart is drawn for gas carburizing and nitriding; a low-pressure "
                                  "plan prints its pulse table on the process sheet")


def _pulses_only(values: Mapping[str, Any]) -> None:
    raise InputError("treatment", "a low-pressure pulse table has no single soak: loads and calibration take one-soak "
                                  "plans")


def _furnace_gas(values):
    from .models.atmosphere import FurnaceGas
    return FurnaceGas.of(values)


def _carburizing_steel(steel, units) -> str:
    from .models.surface import Gunnarson_alloy_factor

    return (f"{steel.standard}. Core {formats.carbon(steel.carbon)} · alloy factor "
            f"{Gunnarson_alloy_factor(steel.composition):.3f} · Ac3 ≈ {units.format_temperature(Andrews_1965_Ac3(steel.composition))} (Andrews 1965)"
            + _ideal_diameter(steel))


def _ideal_diameter(steel) -> str:
    """`` · D_I 48 mm (1.90 in) by ASTM A255, …``, or nothing for a steel beyond its factors."""
    from .errors import InputError
    from .models.hardenability import ideal_critical_diameter

    try:
        ideal = float(ideal_critical_diameter(steel.composition, steel.grain_size))
    except InputError:
        return ""
    return f" · D_I {formats.ideal_diameter(ideal)} by ASTM A255, grain size {steel.grain_size:g}"


def _nitriding_steel(steel, units) -> str:
    from .nitriding.setup import nitride_capacity

    typical = (f" · typical core {formats.hv(steel.core_hardness_hv)}, nitrided {formats.hv(steel.nitrided_surface_hv)}"
               if steel.core_hardness_hv and steel.nitrided_surface_hv else "")
    return (f"{steel.standard}. Nitride formers bind {formats.nitrogen(nitride_capacity(steel.composition))}{typical}"
            + _ideal_diameter(steel))


def _one_soak_only(values: Mapping[str, Any]) -> None:
    from .carburizing.outcome import CYCLES

    cycle = CYCLES[values["process"]]
    if not cycle.has_soak:
        raise InputError("process", f"a {cycle.label.lower()} cycle has no single soak: loads and calibration take "
                                    f"one-soak plans")


def _one_stage_only(values: Mapping[str, Any]) -> None:
    if values["two_stage"]:
        raise InputError("two_stage", "a two-stage nitriding plan has no single soak: loads and calibration take "
                                      "one-stage plans")


@dataclass(frozen=True)
class Treatment:
    """One row of the treatment table (see the module notes)."""

    key: str
    label: str
    command: str  # the command-line command that plans it
    description: str  # that command's help
    defaults: Mapping[str, Any]  # what a new plan of it starts from, where the parameter table's defaults differ
    temperature_range: Callable[[Mapping[str, Any]], tuple[float, float]]  # K, for a plan's values
    evaluate: Callable[[Mapping[str, Any]], Outcome]
    forward: Callable[..., Any]  # (values, soak [s], probe depth [m] or None, shares=) -> what the soak gives (to_dict, text)
    calibration_key: str  # the diffusivity multiplier calibration sets
    potential_key: str  # the atmosphere's parameter: what parts in one load share with the temperature
    potential_tolerance: float  # potentials this close count as the same atmosphere
    single_soak: Callable[[Mapping[str, Any]], None]  # refuses a plan with no single soak (loads, calibration)
    chart: Callable[..., Any]  # (values, temperatures=… or potentials=…, paper, units, hours, load) -> Document
    chart_spread: float  # the window's chart: the plan's temperature and this far [K] either side
    comparison_temperatures: tuple[float, ...]  # K, the window's comparison of temperatures
    comparison_note: str  # what limits the temperature, in words
    depth_name: str  # what the depth on the drawing is called
    steel_list: str  # which grades of the steel library are offered
    steel_note: Callable[[Any, Any], str]  # (steel, display units) -> what matters about a steel for it
    cautions: Callable[[Mapping[str, Any]], list] = lambda values: []  # the cautions a plan's values call for
    forward_options: tuple[Option, ...] = ()  # the command line's extra options for what a soak gives
    forward_many: Callable[..., list] | None = None  # (values list, soaks [s], shares) -> forward of each, marched together
    #: whether a load's spread in the window also works out the centred time (twice the runs): off where every part is
    #: a whole run of its own that takes milliseconds (a low-pressure pulse table: 256 parts take seconds already)
    centres_spread: bool = True
    #: (values list) -> each plan's soak_time [s], or the InputError it raises, worked out together where the treatment can
    aim_soaks: Callable[[list[Mapping[str, Any]]], list] | None = None

    def soaks_for_aims(self, values_list: list[Mapping[str, Any]]) -> list:
        """Each plan's time at temperature for the drawing's aim [s] (what :attr:`evaluate` gives as its
        ``soak_time``), or the :class:`InputError` it raises: together where the treatment has a way (the same
        numbers to round-off), else each plan evaluated."""
        if self.aim_soaks is not None:
            return self.aim_soaks(values_list)
        out = []
        for values in values_list:
            try:
                out.append(float(self.evaluate(values).soak_time))
            except InputError as error:
                out.append(error)
        return out

    def forward_each(self, values_list: list[Mapping[str, Any]], soaks: list[float],
                     shares: tuple[float, ...] | None = None) -> list:
        """What each plan's soak [s] gives (its held stages in ``shares`` of it, where given): :attr:`forward` of
        each, in one batch where the treatment has one."""
        if self.forward_many is not None:
            return self.forward_many(values_list, soaks, shares)
        return [self.forward(values, soak, None, shares=shares) for values, soak in zip(values_list, soaks)]

    def chart_temperatures(self, values: Mapping[str, Any]) -> list[float]:
        """Three temperatures [K] for a chart around the plan's, kept within the treatment's range."""
        low, high = self.temperature_range(values)
        T = values["temperature"]
        return sorted({min(max(T + step, low), high) for step in (-self.chart_spread, 0.0, self.chart_spread)})


TREATMENTS: dict[str, Treatment] = {t.key: t for t in (
    Treatment(
        "carburizing", "Carburizing", "carburize",
        "Gas carburizing: the soak at temperature for a target effective case depth (--target, or the drawing's "
        "window), or the case a soak of given length gives (--time); boost and diffuse with --surface-target.",
        {"steel": "8620", "temperature": 925.0 + ZERO_CELSIUS, "case_min": 0.8e-3, "case_max": 1.2e-3},
        _carburizing_temperatures,
        _on_first_use(".carburizing.outcome", "evaluate"), _on_first_use(".carburizing.outcome", "forward"), "d_multiplier", "carbon_potential", 0.005, _one_soak_only,
        _carburizing_chart, 25.0, tuple(t + ZERO_CELSIUS for t in (880.0, 900.0, 925.0, 950.0, 980.0, 1000.0)),
        "Hotter is faster but coarsens grain (above about 980 °C for most carburizing grades) and distorts more; the "
        "furnace, fixtures and the steel's grain-size control set the limit (common practice).",
        "effective case depth", "carburizing", _carburizing_steel,
        lambda values: safety.cautions(values["temperature"], gas=_furnace_gas(values)),
        (Option("--carbon-at", "with --time: also report the carbon at this depth (0.5mm)"),),
        _on_first_use(".carburizing.outcome", "forward_many"),
        aim_soaks=_on_first_use(".carburizing.outcome", "aim_soaks")),
    Treatment(
        "nitriding", "Gas nitriding", "nitride",
        "Gas nitriding: the nitriding time for a nitrided hardness depth (core + 50 HV), the compound layer it "
        "gives and the surface phase; the K_N (or a two-stage schedule) for a compound-layer window.",
        {"steel": "4140", "temperature": 520.0 + ZERO_CELSIUS, "case_min": 0.3e-3, "case_max": 0.5e-3},
        _nitriding_temperatures,
        _on_first_use(".nitriding.outcome", "evaluate"), _on_first_use(".nitriding.outcome", "forward"), "n_multiplier", "kn", 0.01, _one_stage_only,
        _nitriding_chart, 20.0, tuple(t + ZERO_CELSIUS for t in (490.0, 510.0, 520.0, 530.0, 550.0, 570.0)),
        "Hotter is faster but gives a thicker, more porous compound layer and a softer diffusion zone, and must stay "
        "below the steel's tempering temperature so the core keeps its hardness (common practice).",
        "nitrided hardness depth (core + 50 HV)", "nitriding", _nitriding_steel,
        lambda values: safety.cautions(ammonia=True)),
    Treatment(
        "lpc", "Low-pressure carburizing", "lpc",
        "Low-pressure (vacuum) carburizing: the boost and diffuse pulse table for a target effective case depth and a "
        "final surface-carbon window (--surface-target), the surface never above its limit; or what a pulse table "
        "gives (--schedule).",
        {"steel": "8620", "temperature": 950.0 + ZERO_CELSIUS, "case_min": 0.8e-3, "case_max": 1.2e-3,
         "surface_min": 0.70, "surface_max": 0.80, "quench": "gas-n2-10bar", "quench_temperature": 40.0 + ZERO_CELSIUS,
         # a load's parts each run a whole pulse table of their own (about 14 ms): 128 keep its spread within 2 s
         "spread_samples": 128.0},
        _lpc_temperatures,
        _on_first_use(".lpc.outcome", "evaluate"), _on_first_use(".lpc.outcome", "forward"), "d_multiplier",
        "carbon_flux", 0.0, _pulses_only,
        _lpc_chart, 30.0, tuple(t + ZERO_CELSIUS for t in (900.0, 930.0, 950.0, 980.0, 1000.0, 1030.0)),
        "Hotter is faster, and low-pressure furnaces run hotter than atmosphere ones, but above about 980 °C steels "
        "without grain-refining additions coarsen their grain (common practice).",
        "effective case depth", "carburizing", _carburizing_steel,
        lambda values: safety.lpc_cautions(values["temperature"]), centres_spread=False,
        aim_soaks=_on_first_use(".lpc.outcome", "aim_soaks")),
)}


def treatment_of(values: Mapping[str, Any]) -> Treatment:
    """The row of a plan's treatment."""
    key = values.get("treatment")
    if key not in TREATMENTS:
        raise InputError("treatment", f"{key!r} is not one of {', '.join(TREATMENTS)}")
    return TREATMENTS[key]
