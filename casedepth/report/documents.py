"""Printed output: the case-depth chart and the process sheet, as matplotlib pages (no Qt).

Each builder returns a :class:`Document`: pages (matplotlib Figures sized for A4 or US Letter) and
the numbers printed on them, so tests and callers can check the paper against the solver.
:func:`save` writes PDF (all pages in one file), SVG or PNG (one file per page).
"""

from __future__ import annotations

import datetime as _dt
import math
import os
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from .. import __version__, safety
from ..carburizing.setup import CarburizingSetup
from ..carburizing.soak import carburize, soak_times_for_case_depths
from ..errors import InputError, NotReachableError
from ..files import atomic_write
from ..models.hardness import HARDNESS_RELATIONS
from ..nitriding.nitride import nitride, nitriding_time
from ..nitriding.setup import NitridingSetup, dissociation_for_potential
from ..outcome import Outcome
from ..treatments import TREATMENTS
from ..units import DisplayUnits, format_clock, format_duration

PAPER = {"a4": (8.27, 11.69), "letter": (8.5, 11.0)}  # inches, portrait
METRIC_DEPTHS = (0.3, 0.5, 0.8, 1.0, 1.2, 1.5, 2.0, 2.5)  # mm
IMPERIAL_DEPTHS = (0.010, 0.020, 0.030, 0.040, 0.050, 0.060, 0.080, 0.100)  # in
NITRIDED_METRIC_DEPTHS = (0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.8)  # mm
NITRIDED_IMPERIAL_DEPTHS = (0.004, 0.008, 0.012, 0.016, 0.020, 0.024, 0.030)  # in
INK = "#1d3557"
COLOURS = ("#1d3557", "#d1495b", "#2a9d8f", "#e9a03b", "#6c4f9c", "#6c757d")
STAGES_PER_PAGE = 22


@dataclass
class Document:
    """Pages ready to print, with the figures printed on them."""

    pages: list[Figure]
    title: str
    table: list[list[str]] = field(default_factory=list)  # the chart's soak-time table as printed
    values: dict = field(default_factory=dict)  # numbers behind the table, SI


def _chart_heading(fig: Figure, title: str, lines: list[str], date: _dt.date | None, shop: str = "",
                   customer: str = "", logo: str | None = None) -> float:
    """A chart's title, who it is from and for (and the shop's logo), and its lines of settings and models with
    the date printed; returns the height [figure fraction] below which the plot may start."""
    right = 0.83 if _logo(fig, logo, [0.85, 0.925, 0.10, 0.06]) else 0.95
    who = " — ".join(part for part in (shop.strip(), f"for {customer.strip()}" if customer.strip() else "") if part)
    if who:
        _fitted(fig, 0.1, 0.972, who, right - 0.1, fontsize=9, color="#555")
    _fitted(fig, 0.1, 0.945, title, right - 0.1, fontsize=15, weight="bold", color=INK)
    y = 0.918
    for line in [*lines, f"Printed {(date or _dt.date.today()).isoformat()} by casedepth {__version__}."]:
        y = _wrapped(fig, 0.1, y, line, 7.5, 118) - 0.016
    return y


def _chart_table(fig: Figure, box: list[float], title: str, header: list[str], rows: list[list[str]],
                 beyond_hours: float | None) -> None:
    """A chart's table in ``box`` (figure fraction) under its title; a note if some times lie beyond the axis."""
    _table(fig.add_axes(box), rows, header, size=7.5 if len(header) > 4 else 8)
    fig.text(0.1, box[1] + box[3] + 0.015, title, fontsize=10, weight="bold", color=INK)
    if beyond_hours is not None:
        fig.text(0.1, box[1] - 0.02, f"† beyond the {beyond_hours:g} h of the plot", fontsize=7.5, color="#555")


def _axis_hours(hours: float | None, times: list[list[float]], choices: tuple[float, ...]) -> float:
    """The time axis [h]: as given, or the shortest of ``choices`` that shows every finite time [s]."""
    if hours is not None:
        return hours
    longest = max((t for row in times for t in row if math.isfinite(t)), default=0.0) / 3600.0
    return next((h for h in choices if h >= longest), choices[-1])


def _page(paper: str) -> Figure:
    if paper not in PAPER:
        raise InputError("paper", f"unknown paper {paper!r}; use a4 or letter")
    return Figure(figsize=PAPER[paper])


def _fitted(fig: Figure, x: float, y: float, text: str, width: float, **style):
    """Put ``text`` at (x, y) (figure fractions) within ``width`` of the page: what the user typed is printed
    as typed (no "$…$" read as mathematics), and a text too long for its place is cut with an ellipsis, measured
    in the font it is printed in, so it never runs into its neighbours or off the page."""
    artist = fig.text(x, y, text, parse_math=False, **style)
    if not isinstance(fig.canvas, FigureCanvasAgg):
        FigureCanvasAgg(fig)
    renderer = fig.canvas.get_renderer()
    limit = width * fig.bbox.width

    def fits(candidate: str) -> bool:
        artist.set_text(candidate)
        return artist.get_window_extent(renderer).width <= limit

    if fits(text):
        return artist
    low, high = 0, len(text)  # the longest start of the text that fits with its ellipsis
    while low < high:
        middle = (low + high + 1) // 2
        if fits(text[:middle].rstrip() + "…"):
            low = middle
        else:
            high = middle - 1
    artist.set_text(text[:low].rstrip() + "…")
    return artist


def _footer(fig: Figure, text: str, number: int, total: int) -> None:
    _fitted(fig, 0.06, 0.025, text, 0.76, fontsize=6.5, color="#555")
    fig.text(0.94, 0.025, f"page {number} of {total}", fontsize=6.5, color="#555", ha="right")


def _table(ax, rows: list[list[str]], header: list[str], widths: list[float] | None = None, size: float = 8,
           fill: bool = False):
    """A table in ``ax``: from its upper left, or (``fill``) filling the axes exactly, each row an equal share."""
    ax.axis("off")
    placement = {"bbox": [0.0, 0.0, 1.0, 1.0]} if fill else {"loc": "upper left"}
    table = ax.table(cellText=rows, colLabels=header, cellLoc="left", colLoc="left", colWidths=widths, **placement)
    table.auto_set_font_size(False)
    table.set_fontsize(size)
    if not fill:
        table.scale(1.0, 1.25)
    for (r, _), cell in table.get_celld().items():
        cell.set_edgecolor("#bbbbbb")
        if r == 0:
            cell.set_facecolor("#e8eef4")
            cell.set_text_props(weight="bold")
    return table


# -- case-depth chart ---------------------------------------------------------------------------------
def case_depth_chart(setup: CarburizingSetup, temperatures: list[float] | None = None,
                     potentials: list[float] | None = None, paper: str = "a4", units: str = "metric",
                     hours: float | None = None, date: _dt.date | None = None, shop: str = "", customer: str = "",
                     logo: str | None = None) -> Document:
    """Effective case depth against time for several temperatures [K] (or potentials [wt %]), with a
    table of soak times for the standard depths of ``units``; one page. The time axis runs ``hours``
    [h], by default the shortest of 12, 24, 48 or 96 h that shows every tabulated soak (times beyond
    the axis are marked in the table)."""
    if bool(temperatures) == bool(potentials):
        raise InputError("temperatures", "give several temperatures or several potentials (not both)")
    u = DisplayUnits(units)
    variants = ([replace(setup, temperature=T) for T in temperatures] if temperatures
                else [replace(setup, carbon_potential=p) for p in potentials])
    labels = ([u.format_temperature(T) for T in temperatures] if temperatures
              else [f"{p:.2f} %C" for p in potentials])
    depths = [d * 1e-3 for d in METRIC_DEPTHS] if not u.imperial else [d * 0.0254 for d in IMPERIAL_DEPTHS]
    values: dict = {"depths": depths, "labels": labels, "soak_times": []}
    for variant in variants:
        times = []
        for depth in depths:
            try:
                times.append(soak_times_for_case_depths(variant, [depth])[0].soak_time)
            except (InputError, NotReachableError):
                times.append(math.nan)
        values["soak_times"].append(times)
    hours = _axis_hours(hours, values["soak_times"], (6.0, 8.0, 12.0, 16.0, 20.0, 24.0, 30.0, 36.0, 48.0, 60.0, 72.0, 96.0))
    values["hours"] = hours
    fig = _page(paper)
    fig.subplots_adjust(left=0.1, right=0.95)
    top = _chart_heading(fig, f"Case-depth chart — {setup.steel.name}", _case_chart_lines(setup, temperatures, u),
                         date, shop, customer, logo) - 0.025
    ax = fig.add_axes([0.1, 0.50, 0.85, top - 0.50])
    rows = [[u.format_length(d)] for d in depths]
    beyond = False
    for k, (variant, label) in enumerate(zip(variants, labels)):
        curve = carburize(variant, hours * 3600.0)
        ax.plot(curve.history.times / 3600.0, u.length(curve.history.threshold_depths(variant.threshold_carbon)),
                color=COLOURS[k % len(COLOURS)], lw=2, label=label)
        for t, row in zip(values["soak_times"][k], rows):
            mark = " †" if t > hours * 3600.0 else ""
            beyond = beyond or bool(mark)
            row.append("—" if math.isnan(t) else f"{format_duration(t)}  ({t / 3600:.2f} h){mark}")
    ax.set_xlim(0, hours)
    ax.set_ylim(0, None)
    ax.set_xlabel("time at temperature [h]")
    ax.set_ylabel(f"{setup.threshold.depth_name} [{u.length_unit}] at {setup.threshold}")
    ax.grid(True, color="#dddddd", lw=0.6)
    ax.legend(title="temperature" if temperatures else "carbon potential", fontsize=8, title_fontsize=8)
    steel = setup.steel
    header = [f"case depth ({u.length_unit})"] + [f"soak at {label}" for label in labels]
    _chart_table(fig, [0.1, 0.07, 0.83, 0.355], "Soak times for standard depths", header, rows, hours if beyond else None)
    _footer(fig, "Estimates from published diffusion models; confirm on the shop's own sections. "
                 "Local codes and licensed practice govern.", 1, 1)
    return Document([fig], f"Case-depth chart {steel.name}", [header] + rows, values)


def _case_chart_lines(setup: CarburizingSetup, temperatures, u: DisplayUnits) -> list[str]:
    """The case-depth chart's lines of settings and models."""
    steel = setup.steel
    what = (f"carbon potential {setup.carbon_potential:.2f} %C" if temperatures
            else f"temperature {u.format_temperature(setup.temperature)}")
    beta = "surface held at equilibrium" if math.isinf(setup.beta) else f"β = {setup.beta * 100:.3g} cm/s"
    relation = HARDNESS_RELATIONS[setup.hardness_relation]
    return [
        f"{steel.standard}; core {steel.carbon:.3f} %C; {what}; threshold {setup.threshold}"
        + ("" if setup.threshold.kind == "carbon" else f" (= {setup.threshold_carbon:.3f} %C"
           + ((f", read from the quench: {setup.hardening.describe(u)}, at {u.format_length(setup.hardness_depth)})"
               if relation.structure else f", {relation.display})") if setup.threshold.is_hardness else ")")),
        f"Models: D {setup.diffusivity.display}; {beta}; alloy factor "
        + (f"{setup.alloy_factor:.3f} (Gunnarson)" if setup.alloy_factor_on else "off")
        + f"; {setup.geometry.describe()}. Time at temperature only: heat-up and drop are not included.",
    ]


# -- nitriding chart --------------------------------------------------------------------------------------
def nitriding_chart(setup: NitridingSetup, temperatures: list[float] | None = None,
                    potentials: list[float] | None = None, paper: str = "a4", units: str = "metric",
                    hours: float | None = None, date: _dt.date | None = None, shop: str = "", customer: str = "",
                    logo: str | None = None) -> Document:
    """Nitrided hardness depth (core + 50 HV) and compound layer against time for several temperatures
    [K] (at the setup's K_N) or several nitriding potentials [atm^-1/2] (at its temperature), with a
    table of nitriding times and the compound layer for standard depths; one page. The time axis runs
    ``hours`` [h], by default the shortest of 24, 48, 96 or 200 h that shows every tabulated time."""
    if bool(temperatures) == bool(potentials):
        raise InputError("temperatures", "give several temperatures or several nitriding potentials (not both)")
    if hours is not None and not (1.0 <= hours <= 500.0):
        raise InputError("hours", f"{hours:g} h is outside 1–500 h")
    u = DisplayUnits(units)
    variants = ([replace(setup, temperature=T) for T in temperatures] if temperatures
                else [replace(setup, nitriding_potential=k) for k in potentials])
    labels = ([u.format_temperature(T) for T in temperatures] if temperatures
              else [f"K_N {k:.2f}" for k in potentials])
    depths = ([d * 1e-3 for d in NITRIDED_METRIC_DEPTHS] if not u.imperial
              else [d * 0.0254 for d in NITRIDED_IMPERIAL_DEPTHS])
    values: dict = {"depths": depths, "labels": labels, "times": [], "compound_layers": []}
    for variant in variants:
        times, layers = [], []
        for depth in depths:
            try:
                result = nitriding_time(variant, depth)
                times.append(result.time)
                layers.append(result.compound_layer)
            except (InputError, NotReachableError):
                times.append(math.nan)
                layers.append(math.nan)
        values["times"].append(times)
        values["compound_layers"].append(layers)
    hours = _axis_hours(hours, values["times"], (12.0, 24.0, 36.0, 48.0, 60.0, 72.0, 96.0, 120.0, 150.0, 200.0))
    values["hours"] = hours
    fig = _page(paper)
    top = _chart_heading(fig, f"Nitriding chart — {setup.steel.name}", _nitriding_chart_lines(setup, temperatures, u),
                         date, shop, customer, logo) - 0.025
    ax = fig.add_axes([0.1, 0.555, 0.85, top - 0.555])
    layer_ax = fig.add_axes([0.1, 0.425, 0.85, 0.10], sharex=ax)
    rows = [[u.format_length(d)] for d in depths]
    beyond = False
    clock = np.linspace(0.0, hours, 121)[1:] * 3600.0
    for k, (variant, label) in enumerate(zip(variants, labels)):
        colour = COLOURS[k % len(COLOURS)]
        runs = [nitride(variant, t) for t in clock]
        ax.plot(clock / 3600.0, u.length(np.array([r.nitrided_depth for r in runs])), color=colour, lw=2, label=label)
        layer_ax.plot(clock / 3600.0, [r.compound_layer * 1e6 for r in runs], color=colour, lw=1.5)
        for t, layer, row in zip(values["times"][k], values["compound_layers"][k], rows):
            mark = " †" if t > hours * 3600.0 else ""
            beyond = beyond or bool(mark)
            row.append("—" if math.isnan(t) else f"{format_duration(t)}  ({layer * 1e6:.0f} µm){mark}")
    ax.set_xlim(0, hours)
    ax.set_ylim(0, None)
    ax.set_ylabel(f"nitrided hardness depth [{u.length_unit}]")
    ax.tick_params(labelbottom=False)
    ax.grid(True, color="#dddddd", lw=0.6)
    ax.legend(title="temperature" if temperatures else "nitriding potential", fontsize=8, title_fontsize=8)
    layer_ax.set_ylim(0, None)
    layer_ax.set_ylabel("compound\nlayer [µm]", fontsize=8)
    layer_ax.set_xlabel("time at temperature [h]")
    layer_ax.grid(True, color="#dddddd", lw=0.6)
    steel = setup.steel
    header = [f"nitrided depth ({u.length_unit})"] + [f"at {label}" for label in labels]
    _chart_table(fig, [0.1, 0.065, 0.83, 0.265], "Nitriding time for standard depths (and the compound layer it leaves)",
                 header, rows, hours if beyond else None)
    _footer(fig, "Estimates from published models; confirm on the shop's own sections. Ammonia is toxic and "
                 "flammable; local codes govern.", 1, 1)
    return Document([fig], f"Nitriding chart {steel.name}", [header] + rows, values)


def _nitriding_chart_lines(setup: NitridingSetup, temperatures, u: DisplayUnits) -> list[str]:
    """The nitriding chart's lines of settings and models."""
    steel = setup.steel
    what = (f"K_N {setup.nitriding_potential:.2f} atm^-1/2 "
            f"({100 * dissociation_for_potential(setup.nitriding_potential):.0f} % dissociation)" if temperatures
            else f"temperature {u.format_temperature(setup.temperature)}")
    calibrated = "" if setup.diffusivity_multiplier == 1.0 else f"; D_N × {setup.diffusivity_multiplier:g} (shop calibration)"
    return [
        f"{steel.standard}; {what}; nitrided hardness depth at {setup.limit_text} (under the layer "
        f"{setup.surface:.0f} HV at {u.format_temperature(setup.temperature)}); nitride formers bind "
        f"{setup.capacity:.2f} wt % N",
        f"Models: {setup.models_text()}{calibrated}. Uncertainty: {setup.uncertainty}; compound layer ±50 %. "
        f"Time at temperature only: heat-up, purge and cool-down are not included.",
    ]


# -- process sheet (for the floor) and quote sheet (for the office) ----------------------------------------
def process_sheet(plan, outcome: Outcome, paper: str = "a4", units: str = "metric", shop: str = "",
                  logo: str | None = None, revision: str = "A", date: _dt.date | None = None) -> Document:
    """The process sheet of a plan and its outcome (from :func:`casedepth.plan.evaluate`), for the floor: the
    job, the drawing's callout, the result, the profiles, warnings and cautions on the first page; the cycle,
    every setpoint with its tolerance and a column for the operator's readings, the inspection and the
    signatures on the next. Times in h:min; no money (that is the quote sheet's)."""
    u = DisplayUnits(units)
    content = outcome.sheet(u)
    pages: list[Figure] = []
    first = _page(paper)
    pages.append(first)
    _title_block(first, plan, shop, logo, revision, date or _dt.date.today())
    y = _job_line(first, plan, outcome, 0.835)
    if content.callout:
        first.text(0.06, y, "Drawing callout", fontsize=10, weight="bold", color=INK)
        y -= 0.02
        for line in content.callout:
            y = _wrapped(first, 0.06, y, line, 8.5, 120) - 0.016
        y -= 0.008
    steel = outcome.setup.steel
    composition = "  ".join(f"{el} {val:g}" for el, val in steel.composition.items())
    first.text(0.06, y, "Steel", fontsize=10, weight="bold", color=INK)
    _fitted(first, 0.06, y - 0.02, f"{steel.name} — {steel.standard}; composition, wt %: {composition}", 0.88,
            fontsize=8)
    y -= 0.055
    first.text(0.06, y, "Result", fontsize=10, weight="bold", color=INK)
    y -= 0.02
    for line in content.lines:
        y = _wrapped(first, 0.06, y, line, 8, 118) - 0.017
    quote = outcome.quote
    if quote is not None:
        y = _wrapped(first, 0.06, y, f"Whole cycle {format_clock(quote.total_h * 3600)} h:min (stages on the next "
                                     f"page)", 8, 128) - 0.017
    # the profiles fill what the lines above leave over the warnings (which start at 0.32)
    height = min(0.22, max(0.13, y - 0.035 - 0.38))
    top = min(0.60, y - 0.035)
    profile_ax = first.add_axes([0.10, top - height, 0.38, height])
    hardness_ax = first.add_axes([0.58, top - height, 0.36, height])
    _profiles(profile_ax, hardness_ax, outcome, u)
    warnings = list(outcome.warnings)
    y = 0.32
    if warnings:
        first.text(0.06, y, "Warnings", fontsize=10, weight="bold", color="#8a5a00")
        for w in warnings:
            y -= 0.018
            y = _wrapped(first, 0.06, y, f"• {w}", 8, 120)
        y -= 0.02
    first.text(0.06, y, "Safety", fontsize=10, weight="bold", color="#b00020")
    for c in outcome.cautions:
        y -= 0.018
        y = _wrapped(first, 0.06, y, f"• {c.title}. {c.text}", 7.5, 125)
    y -= 0.02
    _wrapped(first, 0.06, y, safety.DEFERENCE, 7.5, 125, style="italic")
    header = [*content.setpoint_header, "actual", "initials"] if content.setpoints else content.header
    rows = [[*row, "", ""] for row in content.setpoints] if content.setpoints else content.rows
    widths = ([0.25, 0.07, 0.12, 0.18, 0.14, 0.09, 0.10] if content.setpoints else [0.34, 0.12, 0.20, 0.17, 0.17])
    chunks = [rows[i:i + STAGES_PER_PAGE] for i in range(0, len(rows), STAGES_PER_PAGE)] or [[]]
    for index, chunk in enumerate(chunks):
        page = _page(paper)
        pages.append(page)
        continued = f" (continued, {index + 1} of {len(chunks)})" if len(chunks) > 1 else ""
        _fitted(page, 0.06, 0.95, f"{plan.title} — cycle and setpoints{continued}", 0.88, fontsize=12, weight="bold",
                color=INK)
        last = index == len(chunks) - 1
        if index == 0:
            ax = page.add_axes([0.10, 0.70, 0.78, 0.20])
            _timeline(ax, outcome, u)
        table_top = 0.62 if index == 0 else 0.90
        table_height = min(0.022 * (len(chunk) + 1), table_top - 0.30)
        table_ax = page.add_axes([0.06, table_top - table_height, 0.88, table_height])
        _table(table_ax, chunk, header, widths, size=7.5, fill=True)
        page.text(0.06, table_top + 0.012, "Setpoints: hold each within its band (the shop's tolerances); write the "
                                           "readings as the load runs", fontsize=8.5, weight="bold", color=INK)
        if last:
            y = table_top - table_height - 0.025
            if content.setpoint_notes:
                for note in content.setpoint_notes:
                    y = _wrapped(page, 0.06, y, note, 7.5, 125) - 0.015
            y -= 0.02
            if content.inspection:
                page.text(0.06, y, "Inspection", fontsize=10, weight="bold", color=INK)
                y -= 0.02
                for line in content.inspection:
                    y = _wrapped(page, 0.06, y, f"• {line}", 8, 120) - 0.016
            _signatures(page, max(y - 0.03, 0.07))
    footer = f"{plan.title} — revision {revision} — casedepth {__version__} — estimates; local codes and licensed practice govern"
    for number, page in enumerate(pages, 1):
        _footer(page, footer, number, len(pages))
    return Document(pages, plan.title)


def quote_sheet(plan, outcome: Outcome, paper: str = "a4", units: str = "metric", shop: str = "",
                logo: str | None = None, revision: str = "A", date: _dt.date | None = None) -> Document:
    """The quote for the office: every stage's time, the whole cycle, the furnace rate, the cost per load and per
    part (with the shop's currency), on one page."""
    quote = outcome.quote
    page = _page(paper)
    _title_block(page, plan, shop or "Quote", logo, revision, date or _dt.date.today())
    money = f" {quote.currency}" if quote.currency else ""
    shop_values = outcome.values.get("shop", {})
    rate = shop_values.get("furnace_rate_per_h")
    parts = plan.values().get("quantity") or shop_values.get("parts_per_load")
    from ..shop.quote import ShopDefaults

    defaults = ShopDefaults.from_dict(shop_values)
    rate = defaults.furnace_rate_per_h if rate is None else rate
    parts = defaults.parts_per_load if parts is None else parts
    rows = [[label, f"{hours:.2f}", format_clock(hours * 3600), f"{hours * rate:.2f}{money}"]
            for label, hours in quote.lines]
    rows.append(["Whole cycle", f"{quote.total_h:.2f}", format_clock(quote.total_h * 3600),
                 f"{quote.cost_per_load:.2f}{money}"])
    page.text(0.06, 0.82, "Cycle and cost", fontsize=10, weight="bold", color=INK)
    height = min(0.024 * (len(rows) + 1), 0.55)
    _table(page.add_axes([0.06, 0.80 - height, 0.88, height]), rows, ["stage", "hours", "h:min", "cost"],
           [0.46, 0.16, 0.16, 0.22], size=8, fill=True)
    y = 0.80 - height - 0.04
    for line in (f"Furnace rate {rate:.2f}{money} per hour; {parts:.0f} parts per load.",
                 f"Cost per load {quote.cost_per_load:.2f}{money}; per part {quote.cost_per_part:.3f}{money}.",
                 f"Treatment: {outcome.summary(DisplayUnits(units)).headline.lower()} "
                 f"{outcome.summary(DisplayUnits(units)).subline}."):
        y = _wrapped(page, 0.06, y, line, 9, 110) - 0.02
    _footer(page, f"{plan.title} — quote — casedepth {__version__} — estimates from the shop's standard times and rate",
            1, 1)
    return Document([page], f"Quote {plan.title}")


def _job_line(fig: Figure, plan, outcome: Outcome, y: float) -> float:
    """The job on the floor under the title block: furnace, load number, quantity, fixture (blanks to fill in
    where the plan has none); returns where the next block starts."""
    values = plan.values()
    shop_values = outcome.values.get("shop", {})
    quantity = values.get("quantity") or shop_values.get("parts_per_load")
    if quantity is None:
        from ..shop.quote import ShopDefaults

        quantity = ShopDefaults().parts_per_load
    blank = "________"
    items = [("Furnace", values.get("furnace") or blank), ("Load no.", values.get("load_number") or blank),
             ("Quantity", f"{quantity:.0f}"), ("Fixture", values.get("fixture") or blank)]
    x = 0.06
    for (label, text), width in zip(items, (0.20, 0.16, 0.12, 0.40)):
        _fitted(fig, x, y, f"{label}: {text}", width - 0.01, fontsize=8.5)
        x += width
    return y - 0.04


def _signatures(fig: Figure, y: float) -> None:
    """Boxes for who prepared and who approved the sheet, with dates, and the operator who ran the load."""
    for i, label in enumerate(("Prepared", "Approved", "Load run by (operator)")):
        x = 0.06 + i * 0.30
        fig.patches.append(Rectangle((x, y - 0.045), 0.27, 0.05, transform=fig.transFigure, fill=False,
                                     edgecolor="#888888", lw=0.8))
        fig.text(x + 0.005, y - 0.008, label, fontsize=7.5, color="#555")
        fig.text(x + 0.005, y - 0.04, "name, date", fontsize=6.5, color="#999")


def _quote_line(quote) -> list[str]:
    if quote is None:
        return []
    money = f" {quote.currency}" if quote.currency else ""
    parts = ", ".join(f"{label} {hours:.2f} h" for label, hours in quote.lines)
    return [f"Whole cycle {quote.total_h:.2f} h ({format_duration(quote.total_h * 3600)}): {parts}; cost "
            f"{quote.cost_per_load:.2f}{money} per load, {quote.cost_per_part:.3f}{money} per part"]


def _logo(fig: Figure, logo: str | None, box: list[float]) -> bool:
    """Draw the shop's logo image in ``box`` (figure fractions); False (nothing drawn) without one or if it
    cannot be read."""
    if not logo:
        return False
    try:
        import matplotlib.image as mpimg

        image = mpimg.imread(logo)
    except (OSError, ValueError, SyntaxError):
        return False
    ax = fig.add_axes(box)
    ax.imshow(image)
    ax.axis("off")
    return True


def _title_block(fig: Figure, plan, shop: str, logo: str | None, revision: str, date: _dt.date) -> None:
    fig.patches.append(Rectangle((0.05, 0.86), 0.90, 0.11, transform=fig.transFigure, fill=False, edgecolor=INK, lw=1.2))
    left = 0.17 if _logo(fig, logo, [0.065, 0.87, 0.09, 0.09]) else 0.07
    # what people type is printed as typed, each in its own place: the left column up to the right one's
    words = 0.72 - left
    _fitted(fig, left, 0.945, shop or "Process sheet", words, fontsize=9, color="#555")
    _fitted(fig, left, 0.915, plan.title, words, fontsize=14, weight="bold", color=INK)
    _fitted(fig, left, 0.89, f"Part: {plan.part or '—'}", words, fontsize=9)
    _fitted(fig, 0.93, 0.945, f"Revision {revision}", 0.19, fontsize=9, ha="right")
    fig.text(0.93, 0.925, f"Date {date.isoformat()}", fontsize=9, ha="right")
    fig.text(0.93, 0.905, TREATMENTS[plan.treatment].label, fontsize=9, ha="right")
    if plan.notes.strip():
        _fitted(fig, left, 0.868, plan.notes.strip().splitlines()[0], 0.93 - left, fontsize=7.5, style="italic",
                color="#333")


def _profiles(ax, hax, outcome: Outcome, u: DisplayUnits) -> None:
    """The two profile plots of the process sheet: what the window shows at the end of the cycle."""
    view = outcome.view()
    low, aim, high = view.targets
    for axis, panel in ((ax, view.main), (hax, view.hardness)):
        axis.axvspan(u.length(low), u.length(high), color="#7fb685", alpha=0.25, lw=0)
        axis.axvline(u.length(aim), color="#7fb685", lw=1)
        axis.grid(True, color="#dddddd", lw=0.5)
        axis.tick_params(labelsize=7)
        axis.set_xlabel(f"depth [{u.length_unit}]", fontsize=8)
        axis.plot(u.length(panel.curve.depth), panel.curve.values, color=INK, lw=1.6)
        for level in panel.levels:
            if level.style == "threshold":
                axis.axhline(level.value, color="#d1495b", ls="--", lw=1)
        if panel.band is not None:
            axis.axvspan(0.0, u.length(panel.band[0]), color="#c9c9c9", alpha=0.8, lw=0)
        axis.set_ylabel(panel.quantity, fontsize=8)
        axis.set_xlim(0, u.length(view.reach))
    ax.set_title("Profile at the end", fontsize=9)
    hax.set_title("Estimated hardness", fontsize=9)


def _timeline(ax, outcome: Outcome, u: DisplayUnits) -> None:
    line = outcome.timeline()
    times, temps, pots = line.times, line.temperatures, line.potentials
    ax.plot(times / 3600, [u.temperature(t) for t in temps], color=INK, lw=1.8)
    ax.set_ylabel(f"temperature [{u.temperature_unit}]", fontsize=8)
    ax.set_xlabel("time in the cycle [h]", fontsize=8)
    ax.grid(True, color="#dddddd", lw=0.5)
    ax.tick_params(labelsize=7)
    pax = ax.twinx()
    pax.plot(times / 3600, pots, color="#d1495b", ls="--", lw=1.4)
    pax.set_ylabel(line.potential_name, fontsize=8, color="#d1495b")
    pax.tick_params(labelsize=7)
    if np.isfinite(pots).any():
        pax.set_ylim(0, max(line.potential_floor, np.nanmax(pots) * 1.15))
    for time, text in getattr(line, "markers", ()):  # where the purge ends and the atmosphere goes in
        ax.axvline(time / 3600, color="#888888", ls=":", lw=0.9)
        ax.text(time / 3600, 0.97, f" {text}", transform=ax.get_xaxis_transform(), fontsize=6.5, color="#555",
                va="top", ha="left")
    ax.set_title(f"Temperature (solid) and {line.potential_name.split(' [')[0]} (dashed)", fontsize=9)


def _wrapped(fig: Figure, x: float, y: float, text: str, size: float, width: int, style: str = "normal") -> float:
    import textwrap

    lines = textwrap.wrap(text, width)
    for i, line in enumerate(lines):
        fig.text(x, y - i * size * 0.0019, line, fontsize=size, style=style, parse_math=False)
    return y - (len(lines) - 1) * size * 0.0019


# -- writing ----------------------------------------------------------------------------------------------
def save(document: Document, path: str | os.PathLike, fmt: str | None = None, dpi: int = 200) -> list[Path]:
    """Write the document: PDF with every page in one file; SVG or PNG one file per page (name-2.png …).

    Each file is written through :func:`casedepth.files.atomic_write`, so a failed write leaves no half file.
    """
    path = Path(path)
    fmt = (fmt or path.suffix.lstrip(".")).lower()
    if fmt not in ("pdf", "svg", "png"):
        raise InputError("output", f"unknown format {fmt!r}; use pdf, svg or png")
    if fmt == "pdf":
        def write_pdf(name):
            with PdfPages(name, metadata={"Title": document.title, "Creator": f"casedepth {__version__}"}) as pdf:
                for page in document.pages:
                    pdf.savefig(page)

        return [atomic_write(path, write_pdf)]
    written = []
    for number, page in enumerate(document.pages, 1):
        target = path if len(document.pages) == 1 else path.with_name(f"{path.stem}-{number}{path.suffix}")
        written.append(atomic_write(target, lambda name, p=page: p.savefig(name, format=fmt, dpi=dpi)))
    return written
