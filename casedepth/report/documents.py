"""Printed output: the case-depth chart and the process sheet, as matplotlib pages (no Qt).

Each builder returns a :class:`Document`: pages (matplotlib Figures sized for A4 or US Letter) and
the numbers printed on them, so tests and callers can check the paper against the solver.
:func:`save` writes PDF (all pages in one file), SVG or PNG (one file per page).
"""

from __future__ import annotations

import datetime as _dt
import functools
import math
import re
import os
from dataclasses import astuple, dataclass, field, replace
from pathlib import Path

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.figure import Figure
from matplotlib.font_manager import FontProperties
from matplotlib.lines import Line2D
from matplotlib.patches import Rectangle

from .. import __version__, formats, safety
from ..carburizing.setup import CarburizingSetup
from ..carburizing.soak import carburize, depth_histories_many, soak_times_many
from ..errors import InputError, NotReachableError
from ..files import atomic_write
from ..models.hardness import HARDNESS_RELATIONS
from ..nitriding.nitride import nitride, nitriding_time
from ..nitriding.setup import NitridingSetup, dissociation_for_potential
from ..outcome import Outcome
from ..treatments import TREATMENTS
from ..units import DisplayUnits, format_clock, format_duration
from .plot_marks import draw_cycle_words, hrc_scale, place_cycle_words

PAPER = {"a4": (8.27, 11.69), "letter": (8.5, 11.0)}  # inches, portrait
METRIC_DEPTHS = (0.3, 0.5, 0.8, 1.0, 1.2, 1.5, 2.0, 2.5)  # mm
IMPERIAL_DEPTHS = (0.010, 0.020, 0.030, 0.040, 0.050, 0.060, 0.080, 0.100)  # in
NITRIDED_METRIC_DEPTHS = (0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.8)  # mm
NITRIDED_IMPERIAL_DEPTHS = (0.004, 0.008, 0.012, 0.016, 0.020, 0.024, 0.030)  # in
INK = "#1d3557"
COLOURS = ("#1d3557", "#d1495b", "#2a9d8f", "#e9a03b", "#6c4f9c", "#6c757d")
SMALLEST = 7.0  # pt: no text on the printed papers is smaller, so each reads on paper
MEASURE_DPI = 2400  # texts are measured at this resolution, where they are as wide as in the PDF to 0.5 %
SPARE = 0.95  # the share of its place a text may fill: a raster (PNG, a print at 200 dpi) hints it up to 5 % wider


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
        fig.text(0.1, box[1] - 0.02, f"† beyond the {formats.hours(beyond_hours * 3600)} of the plot", fontsize=7.5,
                 color="#555")


def _axis_hours(hours: float | None, times: list[list[float]], choices: tuple[float, ...]) -> float:
    """The time axis [h]: as given, or the shortest of ``choices`` that shows every finite time [s]."""
    if hours is not None:
        return hours
    longest = max((t for row in times for t in row if math.isfinite(t)), default=0.0) / 3600.0
    return next((h for h in choices if h >= longest), choices[-1])


def _paper_size(paper: str) -> tuple[float, float]:
    """Width and height of ``paper`` [in], portrait."""
    if paper not in PAPER:
        raise InputError("paper", f"unknown paper {paper!r}; use a4 or letter")
    return PAPER[paper]


def _page(paper: str) -> Figure:
    return Figure(figsize=_paper_size(paper))


def _fitted(fig: Figure, x: float, y: float, text: str, width: float, **style):
    """Put ``text`` at (x, y) (figure fractions) within ``width`` of the page: what the user typed is printed
    as typed (no "$…$" read as mathematics), and a text too long for its place is cut with an ellipsis, measured
    in the font it is printed in, so it never runs into its neighbours or off the page."""
    artist = fig.text(x, y, text, parse_math=False, **style)
    font = artist.get_fontproperties()
    limit = SPARE * width * fig.get_figwidth()

    def fits(candidate: str) -> bool:
        return _width(candidate, font.get_size_in_points(), font.get_style(), font.get_weight()) <= limit

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
    """The line at the foot of a page, with the page's number of how many (``page 1/2``)."""
    _fitted(fig, 0.06, 0.025, text, 0.8, fontsize=SMALLEST, color="#555")
    fig.text(0.94, 0.025, f"page {number}/{total}", fontsize=SMALLEST, color="#555", ha="right")


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
                     logo: str | None = None, load: list[CarburizingSetup] | None = None) -> Document:
    """Effective case depth against time for several temperatures [K] (or potentials [wt %]), with a
    table of soak times for the standard depths of ``units``; one page. The time axis runs ``hours``
    [h], by default the shortest of 12, 24, 48 or 96 h that shows every tabulated soak (times beyond
    the axis are marked in the table). With ``load`` (the setups of a load's parts,
    :func:`casedepth.shop.capability.draw_parts`), the band their depths fill (5th to 95th percentile at each
    time) is drawn around the curve of ``setup``'s own temperature and potential."""
    if bool(temperatures) == bool(potentials):
        raise InputError("temperatures", "give several temperatures or several potentials (not both)")
    u = DisplayUnits(units)
    variants = ([setup.at_temperature(T) for T in temperatures] if temperatures
                else [replace(setup, carbon_potential=p) for p in potentials])
    labels = ([formats.temperature(T, u) for T in temperatures] if temperatures
              else [formats.carbon(p) for p in potentials])
    depths = [d * 1e-3 for d in METRIC_DEPTHS] if not u.imperial else [d * 0.0254 for d in IMPERIAL_DEPTHS]
    values: dict = {"depths": depths, "labels": labels, "soak_times": []}
    # every variant's soak for every tabulated depth, marched together (the same soaks as one by one)
    found = soak_times_many([v for v in variants for _ in depths], [d for _ in variants for d in depths], errors="return")
    for k in range(len(variants)):
        row = found[k * len(depths):(k + 1) * len(depths)]
        values["soak_times"].append([math.nan if isinstance(r, Exception) else r.soak_time for r in row])
    hours = _axis_hours(hours, values["soak_times"], (6.0, 8.0, 12.0, 16.0, 20.0, 24.0, 30.0, 36.0, 48.0, 60.0, 72.0, 96.0))
    values["hours"] = hours
    fig = _page(paper)
    fig.subplots_adjust(left=0.1, right=0.95)
    top = _chart_heading(fig, f"Case-depth chart — {setup.steel.name}", _case_chart_lines(setup, temperatures, u),
                         date, shop, customer, logo) - 0.025
    ax = fig.add_axes([0.1, 0.50, 0.85, top - 0.50])
    rows = [[formats.length(d, u)] for d in depths]
    beyond = False
    for k, (variant, label) in enumerate(zip(variants, labels)):
        curve = carburize(variant, hours * 3600.0)
        ax.plot(curve.history.times / 3600.0, u.length(curve.history.threshold_depths(variant.threshold_carbon)),
                color=COLOURS[k % len(COLOURS)], lw=2, label=label)
        for t, row in zip(values["soak_times"][k], rows):
            mark = " †" if t > hours * 3600.0 else ""
            beyond = beyond or bool(mark)
            row.append("—" if math.isnan(t) else f"{format_duration(t)}  ({formats.hours(t)}){mark}")
    if load:
        _load_band(ax, setup, variants, load, hours, u)
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
    what = (f"carbon potential {formats.carbon(setup.carbon_potential)}" if temperatures
            else f"temperature {formats.temperature(setup.temperature, u)}")
    beta = "surface held at equilibrium" if math.isinf(setup.beta) else f"β = {setup.beta * 100:.3g} cm/s"
    relation = HARDNESS_RELATIONS[setup.hardness_relation]
    return [
        f"{steel.standard}; core {formats.carbon(steel.carbon)}; {what}; threshold {setup.threshold}"
        + ("" if setup.threshold.kind == "carbon" else f" (= {formats.carbon(setup.threshold_carbon)}"
           + ((f", read from the quench: {setup.hardening.describe(u)}, at {formats.length(setup.hardness_depth, u)})"
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
        raise InputError("hours", f"{formats.typed(hours, 'h')} is outside 1–500 h")
    u = DisplayUnits(units)
    variants = ([replace(setup, temperature=T) for T in temperatures] if temperatures
                else [replace(setup, nitriding_potential=k) for k in potentials])
    labels = ([formats.temperature(T, u) for T in temperatures] if temperatures
              else [f"K_N {formats.kn(k)}" for k in potentials])
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
    rows = [[formats.length(d, u)] for d in depths]
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
            row.append("—" if math.isnan(t) else f"{format_duration(t)}  ({formats.thin_length(layer)}){mark}")
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
    what = (f"K_N {formats.kn(setup.nitriding_potential)} "
            f"({formats.percent(100 * dissociation_for_potential(setup.nitriding_potential))} dissociation)"
            if temperatures
            else f"temperature {formats.temperature(setup.temperature, u)}")
    calibrated = "" if setup.diffusivity_multiplier == 1.0 else f"; D_N × {setup.diffusivity_multiplier:g} (shop calibration)"
    return [
        (f"{steel.standard}; {what}; nitrided hardness depth at {setup.limit_text} (under the layer "
         f"{formats.hv(setup.surface)} at {formats.temperature(setup.temperature, u)}); nitride formers bind "
         f"{formats.nitrogen(setup.capacity)}"),
        (f"Models: {setup.models_text()}{calibrated}. Uncertainty: {setup.uncertainty}; compound layer ±50 %. "
         f"Time at temperature only: heat-up, purge and cool-down are not included."),
    ]


# -- process sheet (for the floor) and quote sheet (for the office) ----------------------------------------
SHEET_MARGIN = 0.5  # in, left and right of every block
SHEET_TOP = 0.3  # in, above the title block
SHEET_FOOT = 0.5  # in, under the last block: the footer is in it
HEADING = 9.5  # pt
PITCH = 1.2  # line spacing, in font sizes


@dataclass(frozen=True)
class _Spacing:
    """How roomy a process sheet is laid out [in]: between :data:`TIGHT` and :data:`ROOMY`, the roomiest that puts
    the whole sheet on one page (see :func:`_one_page`); :data:`ROOMY` on a sheet of several pages."""

    gap: float  # between blocks
    plots: float  # the row of plots, titles and axis labels included
    row: float  # a setpoint row: room to write a reading by hand

    def towards(self, other: _Spacing, share: float) -> _Spacing:
        """``share`` of the way from this spacing to ``other``."""
        return _Spacing(*(a + (b - a) * share for a, b in zip(astuple(self), astuple(other))))


TIGHT = _Spacing(0.07, 1.6, 0.19)
ROOMY = _Spacing(0.14, 2.0, 0.23)


@functools.cache
def _measure():
    """A renderer to measure text with, fine enough that the glyphs are measured as the PDF draws them (at a
    screen's resolution, hinting makes them up to a tenth wider or narrower)."""
    return FigureCanvasAgg(Figure(dpi=MEASURE_DPI)).get_renderer()


@functools.lru_cache(maxsize=8192)
def _width(text: str, size: float, style: str = "normal", weight: str | int = "normal") -> float:
    """How wide ``text`` prints at ``size`` points [in]."""
    font = FontProperties(size=size, style=style, weight=weight)
    return _measure().get_text_width_height_descent(text, font, ismath=False)[0] / MEASURE_DPI


@functools.lru_cache(maxsize=1024)
def _wrap(text: str, size: float, width: float, indent: float = 0.0, style: str = "normal") -> tuple[str, ...]:
    """``text`` in lines that print no wider than ``width`` [in] (the second and later ``indent`` narrower),
    measured in the font they are printed in (a word at a time, with :data:`SPARE` to spare); a word longer than a
    line is cut where the line ends. A no-break space (U+00A0: a number's thousands, a figure and its name) joins
    what it stands between into one word."""
    space = _width(" ", size, style)
    lines: list[str] = []
    line, used = "", 0.0
    for word in re.split(r"[ \t\n]+", text.strip(" \t\n")):
        if not word:
            continue
        room = SPARE * (width - (indent if lines else 0.0))
        wide = _width(word, size, style)
        if line and used + space + wide <= room:
            line, used = f"{line} {word}", used + space + wide
            continue
        if line:
            lines.append(line)
            room = SPARE * (width - indent)
        while wide > room:  # no space to break at: cut where the line ends
            low, high = 1, len(word)  # the longest start of the word that fits (at least a letter)
            while low < high:
                middle = (low + high + 1) // 2
                low, high = (middle, high) if _width(word[:middle], size, style) <= room else (low, middle - 1)
            lines.append(word[:low])
            word = word[low:]
            wide = _width(word, size, style)
        line, used = word, wide
    return tuple(lines + [line] if line else lines)


class _Paper:
    """A page of a sheet, measured in inches from its top left corner."""

    def __init__(self, fig: Figure):
        self.fig = fig
        self.width, self.height = fig.get_size_inches()

    def box(self, x: float, top: float, width: float, height: float) -> list[float]:
        """A box on the page as figure fractions (left, bottom, width, height)."""
        return [x / self.width, 1.0 - (top + height) / self.height, width / self.width, height / self.height]

    def text(self, x: float, top: float, text: str, size: float, **style):
        """``text`` with its top at ``top``, printed as typed (no "$…$" read as mathematics)."""
        style = {"va": "top", **style}
        return self.fig.text(x / self.width, 1.0 - top / self.height, text, fontsize=size, parse_math=False, **style)

    def fitted(self, x: float, top: float, text: str, width: float, size: float, **style):
        """``text`` cut with an ellipsis where ``width`` [in] ends (see :func:`_fitted`)."""
        style = {"va": "top", **style}
        return _fitted(self.fig, x / self.width, 1.0 - top / self.height, text, width / self.width, fontsize=size,
                       **style)

    def frame(self, x: float, top: float, width: float, height: float, **style) -> None:
        left, bottom, w, h = self.box(x, top, width, height)
        self.fig.patches.append(Rectangle((left, bottom), w, h, transform=self.fig.transFigure, fill=False, **style))

    def axes(self, x: float, top: float, width: float, height: float):
        return self.fig.add_axes(self.box(x, top, width, height))


@dataclass
class _Text:
    """A heading and its paragraphs, each wrapped to the width it is printed in, its later lines indented (a
    bullet's under its first word); the ``closing`` paragraphs in italic. Kept together on a page."""

    heading: str
    paragraphs: list[str]
    size: float = 8.0
    colour: str = INK
    closing: tuple[str, ...] = ()

    def _lines(self, width: float) -> list[tuple[float, float, str, str]]:
        """(x offset [in], y offset [in], text, style) of every line, under the heading if there is one."""
        rows, y = [], HEADING * PITCH / 72.0 if self.heading else 0.0
        pitch, space = self.size * PITCH / 72.0, self.size * 0.15 / 72.0
        for paragraph, style in [(p, "normal") for p in self.paragraphs] + [(p, "italic") for p in self.closing]:
            indent = _width("• " if paragraph.startswith("• ") else "    ", self.size)
            for i, line in enumerate(_wrap(paragraph, self.size, width, indent, style)):
                rows.append((indent if i else 0.0, y, line, style))
                y += pitch
            y += space
        return rows

    def height(self, width: float, spacing: _Spacing) -> float:
        rows = self._lines(width)
        return (rows[-1][1] if rows else 0.0) + self.size * PITCH / 72.0

    def draw(self, paper: _Paper, x: float, top: float, width: float, spacing: _Spacing) -> None:
        if self.heading:
            paper.fitted(x, top, self.heading, width, HEADING, weight="bold", color=self.colour)
        for dx, dy, line, style in self._lines(width):
            paper.text(x + dx, top + dy, line, self.size, style=style)


@dataclass
class _Columns:
    """Blocks side by side, each its ``shares`` of the width."""

    blocks: list
    shares: tuple[float, ...]
    between: float = 0.25  # in

    def _widths(self, width: float) -> list[float]:
        return [(width - self.between * (len(self.blocks) - 1)) * share for share in self.shares]

    def height(self, width: float, spacing: _Spacing) -> float:
        return max(block.height(w, spacing) for block, w in zip(self.blocks, self._widths(width)))

    def draw(self, paper: _Paper, x: float, top: float, width: float, spacing: _Spacing) -> None:
        for block, w in zip(self.blocks, self._widths(width)):
            block.draw(paper, x, top, w, spacing)
            x += w + self.between


@dataclass
class _Job:
    """The job on the floor: furnace, load number, quantity, fixture (blanks to fill in where the plan has none),
    each in at most ``most`` lines (what is longer is cut with an ellipsis)."""

    items: list[tuple[str, str]]
    size: float = 8.0
    most: int = 2

    def _lines(self, width: float) -> list[tuple[float, str]]:
        """(x offset [in], text) of each line."""
        rows = []
        indent = _width("    ", self.size)
        for label, text in self.items:
            lines = _wrap(f"{label}: {text}", self.size, width, indent)
            if len(lines) > self.most:
                lines = (*lines[:self.most - 1], " ".join(lines[self.most - 1:]))
            rows += [(indent if i else 0.0, line) for i, line in enumerate(lines)]
        return rows

    def height(self, width: float, spacing: _Spacing) -> float:
        return (HEADING + self.size * len(self._lines(width))) * PITCH / 72.0

    def draw(self, paper: _Paper, x: float, top: float, width: float, spacing: _Spacing) -> None:
        paper.text(x, top, "Job", HEADING, weight="bold", color=INK)
        for i, (dx, line) in enumerate(self._lines(width)):
            paper.fitted(x + dx, top + (HEADING + i * self.size) * PITCH / 72.0, line, width - dx, self.size)


@dataclass
class _Plots:
    """The row of plots: the profile and the hardness at the end of the cycle, and the cycle."""

    outcome: Outcome
    units: DisplayUnits

    def height(self, width: float, spacing: _Spacing) -> float:
        return spacing.plots

    def draw(self, paper: _Paper, x: float, top: float, width: float, spacing: _Spacing) -> None:
        above, below, side = 0.22, 0.40, 0.50  # in: title; tick labels and axis label; tick labels and axis label
        plot = spacing.plots - above - below
        slots = (0.26 * width, 0.26 * width, 0.48 * width)
        profile = paper.axes(x + side, top + above, slots[0] - side - 0.12, plot)
        # the hardness plot leaves room on its right for its Rockwell C scale (hrc_scale)
        hardness = paper.axes(x + slots[0] + side, top + above, slots[1] - side - 0.42, plot)
        cycle = paper.axes(x + slots[0] + slots[1] + side, top + above, slots[2] - 2 * side, plot)
        _profiles(profile, hardness, self.outcome, self.units, plot)
        _timeline(cycle, self.outcome, self.units, plot)


@dataclass
class _Setpoints:
    """The setpoints (a row per stage, with the shop's bands and columns for the operator's readings) under their
    heading, and the table's notes; rows that do not fit on a page go on to the next, under the header again."""

    header: list[str]
    rows: list[list[str]]
    notes: list[str]
    continued: bool = False
    size: float = 7.5

    def _notes(self) -> _Text:
        return _Text("", self.notes, 7.5)

    def height(self, width: float, spacing: _Spacing) -> float:
        notes = self._notes().height(width, spacing) + 0.06 if self.notes else 0.0
        return HEADING * PITCH / 72.0 + spacing.row * (len(self.rows) + 1) + notes

    def split(self, room: float, width: float, spacing: _Spacing):
        """The rows that fit in ``room`` [in] (at least two, or none) and the rest (at least one, with the notes)."""
        fits = min(int((room - HEADING * PITCH / 72.0) / spacing.row + 1e-6) - 1, len(self.rows) - 1)
        if fits < 2:
            return None, self
        return (_Setpoints(self.header, self.rows[:fits], [], self.continued, self.size),
                _Setpoints(self.header, self.rows[fits:], self.notes, True, self.size))

    def _widths(self, width: float) -> list[float]:
        """Each column's share of ``width`` [in]: as wide as its widest cell (a cell's text starts a tenth of the
        column in); the columns left blank for the operator share equally what the others leave."""
        cells = [[_width(head, self.size, weight="bold")] + [_width(row[c], self.size) for row in self.rows]
                 for c, head in enumerate(self.header)]
        need = [max(column) / SPARE / 0.9 + 0.03 for column in cells]
        blank = [c for c in range(len(self.header)) if not any(row[c] for row in self.rows)]
        spare = width - sum(need)
        if blank and spare > 0:
            each = (sum(need[c] for c in blank) + spare) / len(blank)
            need = [each if c in blank else w for c, w in enumerate(need)]
        return [w / sum(need) for w in need]

    def draw(self, paper: _Paper, x: float, top: float, width: float, spacing: _Spacing) -> None:
        heading = ("Setpoints (continued)" if self.continued else
                   "Setpoints: hold each within its band (the shop's); write the readings as the load runs")
        paper.fitted(x, top, heading, width, HEADING, weight="bold", color=INK)
        top += HEADING * PITCH / 72.0
        height = spacing.row * (len(self.rows) + 1)
        _table(paper.axes(x, top, width, height), self.rows, self.header, self._widths(width), size=self.size,
               fill=True)
        if self.notes:
            self._notes().draw(paper, x, top + height + 0.06, width, spacing)


class _Signatures:
    """Boxes for who prepared and who approved the sheet, with dates, and the operator who ran the load."""

    tall = 0.46  # in: room for a signature

    def height(self, width: float, spacing: _Spacing) -> float:
        return self.tall

    def draw(self, paper: _Paper, x: float, top: float, width: float, spacing: _Spacing) -> None:
        box = (width - 2 * 0.2) / 3
        for i, label in enumerate(("Prepared", "Approved", "Load run by (operator)")):
            left = x + i * (box + 0.2)
            paper.frame(left, top, box, self.tall, edgecolor="#888888", lw=0.8)
            paper.text(left + 0.05, top + 0.04, label, 7.5, color="#555")
            paper.text(left + 0.05, top + self.tall - 0.04, "name, date", SMALLEST, color="#999", va="bottom")


def _one_page(blocks: list, width: float, room: float) -> _Spacing | None:
    """The roomiest spacing between :data:`TIGHT` and :data:`ROOMY` that puts ``blocks`` in ``room`` [in], or
    None if even the tightest does not (the height of the blocks grows in proportion from one to the other)."""
    def height(spacing: _Spacing) -> float:
        return sum(block.height(width, spacing) for block in blocks) + spacing.gap * (len(blocks) - 1)

    tight, roomy = height(TIGHT), height(ROOMY)
    if tight > room:
        return None
    return TIGHT.towards(ROOMY, min(1.0, (room - tight) / max(roomy - tight, 1e-9)))


def _flow(blocks: list, width: float, room: tuple[float, float], spacing: _Spacing) -> list[list[tuple]]:
    """Blocks on pages, top to bottom: (block, offset under the page's heading [in]) for each page; ``room`` is
    the height under the heading of the first page and of the later ones. A block that does not fit in what is
    left of a page starts the next, a table its rows that do not fit."""
    pages: list[list[tuple]] = [[]]
    used, waiting = 0.0, list(blocks)
    while waiting:
        block = waiting.pop(0)
        left = room[len(pages) > 1] - used
        need = block.height(width, spacing)
        first, rest = None, block
        if need > left + 1e-6 and hasattr(block, "split"):  # (a layout that fills the page exactly fits)
            first, rest = block.split(left, width, spacing)
        if need <= left + 1e-6 or first is None and not pages[-1]:
            pages[-1].append((block, used))  # it fits, or it is taller than a page and has one of its own
            used += need + spacing.gap
            continue
        if first is not None:
            pages[-1].append((first, used))
        pages.append([])
        used = 0.0
        waiting.insert(0, rest)
    return pages


def process_sheet(plan, outcome: Outcome, paper: str = "a4", units: str = "metric", shop: str = "",
                  logo: str | None = None, revision: str = "A", date: _dt.date | None = None) -> Document:
    """The process sheet of a plan and its outcome (from :func:`casedepth.plan.evaluate`), for the floor, on one
    page where it fits: the job, the drawing's callout, the steel, the result, the profiles and the cycle, every
    setpoint with its tolerance and columns for the operator's readings, the inspection, warnings, cautions and the
    signatures. A cycle of many stages flows onto further pages, each headed with the job and numbered. Times in
    h:min; no money (that is the quote sheet's)."""
    u = DisplayUnits(units)
    date = date or _dt.date.today()
    blocks = _sheet_blocks(plan, outcome, u)
    size = _paper_size(paper)
    width = size[0] - 2 * SHEET_MARGIN
    room = (size[1] - SHEET_TOP - _TITLE_HEIGHT - 0.12 - SHEET_FOOT, size[1] - SHEET_TOP - _CONTINUED - SHEET_FOOT)
    spacing = _one_page(blocks, width, room[0]) or ROOMY
    pages = _flow(blocks, width, room, spacing)
    figures = []
    for number, placed in enumerate(pages, 1):
        page = _Paper(_page(paper))
        figures.append(page.fig)
        if number == 1:
            top = _title_block(page, plan, shop, logo, revision, date) + 0.12
        else:
            top = _continued_heading(page, plan, revision, date)
        for block, offset in placed:
            block.draw(page, SHEET_MARGIN, top + offset, width, spacing)
    footer = f"{plan.title}, revision {revision} — estimates; local codes and licensed practice govern"
    for number, fig in enumerate(figures, 1):
        _footer(fig, footer, number, len(figures))
    return Document(figures, plan.title)


def _load_band(ax, setup: CarburizingSetup, variants: list, load: list, hours: float, u: DisplayUnits) -> None:
    """The 5–95 % band of a load's parts' depths against time, around the curve of the plan's own step (in its
    colour; none if no curve is the plan's)."""
    own = [k for k, v in enumerate(variants) if v.temperature == setup.temperature
           and v.carbon_potential == setup.carbon_potential]
    if not own:
        return
    t = np.linspace(0.0, hours * 3600.0, 241)
    depths = np.array([np.interp(t, times, d) for times, d in depth_histories_many(load, hours * 3600.0)])
    low, high = np.percentile(depths, 5, axis=0), np.percentile(depths, 95, axis=0)
    ax.fill_between(t / 3600.0, u.length(low), u.length(high), color=COLOURS[own[0] % len(COLOURS)], alpha=0.18,
                    lw=0, label=f"a load's {len(load)} parts, 5–95 %")


def _load_spread(outcome: Outcome):
    """The spread of a load of a one-soak plan (:func:`casedepth.shop.capability.capability` with the plan's Load
    spread settings), or None for a plan with no single soak."""
    from ..shop.capability import capability

    try:
        return capability(outcome.values, outcome=outcome)
    except InputError:  # no single soak (boost and diffuse, stages of one's own, two-stage nitriding)
        return None


def _sheet_blocks(plan, outcome: Outcome, u: DisplayUnits) -> list:
    """What a process sheet carries, in the order it is printed."""
    content = outcome.sheet(u)
    steel = outcome.setup.steel
    composition = "  ".join(f"{el} {val:g}" for el, val in steel.composition.items())
    lines = list(content.lines)
    spread = _load_spread(outcome)
    if outcome.quote is not None:
        whole = f"Whole cycle {format_clock(outcome.quote.total_h * 3600)} h:min"
        lines.append(f"{whole}; {spread.sheet_line(u)}" if spread is not None else
                     f"{whole} (every stage in the setpoints)")
    elif spread is not None:
        lines.append(spread.sheet_line(u)[0].upper() + spread.sheet_line(u)[1:])
    calibration = outcome.values.get("calibration")
    if calibration:  # which of the furnace record's fits the multipliers came from, and its date
        lines.append(f"Calibrated on the furnace record: {calibration}")
    if content.setpoints:
        header, rows = [*content.setpoint_header, "actual", "initials"], [[*r, "", ""] for r in content.setpoints]
    else:
        header, rows = content.header, content.rows
    top = [_Text("Steel", [f"{steel.name} — {steel.standard}", f"composition, wt %: {composition}"]),
           _Job(_job_items(plan, outcome))]
    if content.callout:
        top.insert(0, _Text("Drawing callout", content.callout, 8.5))
    blocks = [_Columns(top, (0.40, 0.30, 0.30) if content.callout else (0.55, 0.45)),
              _Text("Result", lines),
              _Plots(outcome, u),
              _Setpoints(header, rows, list(content.setpoint_notes))]
    if content.inspection:
        blocks.append(_Text("Inspection", [f"• {line}" for line in content.inspection]))
    if outcome.warnings:
        blocks.append(_Text("Warnings", [f"• {w}" for w in outcome.warnings], colour="#8a5a00"))
    blocks += [_Text("Safety", [f"• {c.title}. {c.text}" for c in outcome.cautions], 7.5, "#b00020",
                     (safety.DEFERENCE,)),
               _Signatures()]
    return blocks


def quote_sheet(plan, outcome: Outcome, paper: str = "a4", units: str = "metric", shop: str = "",
                logo: str | None = None, revision: str = "A", date: _dt.date | None = None) -> Document:
    """The quote for the office: every stage's time, the whole cycle, the furnace rate, the cost per load and per
    part (with the shop's currency), on one page."""
    quote = outcome.quote
    sheet = _Paper(_page(paper))
    _title_block(sheet, plan, shop or "Quote", logo, revision, date or _dt.date.today())
    page = sheet.fig
    currency = quote.currency
    shop_values = outcome.values.get("shop", {})
    rate = shop_values.get("furnace_rate_per_h")
    parts = plan.values().get("quantity") or shop_values.get("parts_per_load")
    from ..shop.quote import ShopDefaults

    defaults = ShopDefaults.from_dict(shop_values)
    rate = defaults.furnace_rate_per_h if rate is None else rate
    parts = defaults.parts_per_load if parts is None else parts
    rows = [[label, formats.hours(hours * 3600), format_clock(hours * 3600), formats.money(hours * rate, currency)]
            for label, hours in quote.lines]
    rows.append(["Whole cycle", formats.hours(quote.total_h * 3600), format_clock(quote.total_h * 3600),
                 formats.money(quote.cost_per_load, currency)])
    page.text(0.06, 0.82, "Cycle and cost", fontsize=10, weight="bold", color=INK)
    height = min(0.024 * (len(rows) + 1), 0.55)
    _table(page.add_axes([0.06, 0.80 - height, 0.88, height]), rows, ["stage", "hours", "h:min", "cost"],
           [0.46, 0.16, 0.16, 0.22], size=8, fill=True)
    y = 0.80 - height - 0.04
    summary = outcome.summary(DisplayUnits(units))
    for line in (f"Furnace rate {formats.money(rate, currency)} per hour; {parts:.0f} parts per load.",
                 (f"Cost per load {formats.money(quote.cost_per_load, currency)}; per part "
                  f"{formats.piece_price(quote.cost_per_part, currency)}."),
                 f"Treatment: {summary.headline.lower()} {summary.subline}."):
        y = _wrapped(page, 0.06, y, line, 9, 110) - 0.02
    _footer(page, f"{plan.title} — quote — casedepth {__version__} — estimates from the shop's standard times and rate",
            1, 1)
    return Document([page], f"Quote {plan.title}")


def _job_items(plan, outcome: Outcome) -> list[tuple[str, str]]:
    """Furnace, load number, quantity and fixture of the job (a blank to fill in where the plan has none)."""
    values = plan.values()
    quantity = values.get("quantity") or outcome.values.get("shop", {}).get("parts_per_load")
    if quantity is None:
        from ..shop.quote import ShopDefaults

        quantity = ShopDefaults().parts_per_load
    blank = "________"
    return [("Furnace", values.get("furnace") or blank), ("Load no.", values.get("load_number") or blank),
            ("Quantity", f"{quantity:.0f}"), ("Fixture", values.get("fixture") or blank)]


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


_TITLE_HEIGHT = 0.9  # in: the title block of a sheet's first page
_CONTINUED = 0.62  # in: the heading of a later page, and the gap under it


def _title_block(page: _Paper, plan, shop: str, logo: str | None, revision: str, date: _dt.date) -> float:
    """The title block of a sheet's first page (shop, title, part, notes; revision, date, treatment); returns where
    it ends [in from the top]."""
    top, right = SHEET_TOP, page.width - SHEET_MARGIN
    page.frame(SHEET_MARGIN - 0.1, top, page.width - 2 * SHEET_MARGIN + 0.2, _TITLE_HEIGHT, edgecolor=INK, lw=1.2)
    drawn = _logo(page.fig, logo, page.box(SHEET_MARGIN, top + 0.1, 0.8, 0.8))
    left = SHEET_MARGIN + (0.95 if drawn else 0.05)
    # what people type is printed as typed, each in its own place: the left column up to the right one's
    words = right - 1.3 - left
    page.fitted(left, top + 0.12, shop or "Process sheet", words, 9, color="#555")
    page.fitted(left, top + 0.32, plan.title, words, 14, weight="bold", color=INK)
    page.fitted(left, top + 0.54, f"Part: {plan.part or '—'}", words, 9)
    page.fitted(right - 0.05, top + 0.12, f"Revision {revision}", 1.2, 9, ha="right")
    page.text(right - 0.05, top + 0.32, f"Date {date.isoformat()}", 9, ha="right")
    page.text(right - 0.05, top + 0.52, TREATMENTS[plan.treatment].label, 9, ha="right")
    page.text(right - 0.05, top + 0.72, f"casedepth {__version__}", 7.5, ha="right", color="#555")
    if plan.notes.strip():
        page.fitted(left, top + 0.72, plan.notes.strip().splitlines()[0], words, 7.5, style="italic", color="#333")
    return top + _TITLE_HEIGHT


def _continued_heading(page: _Paper, plan, revision: str, date: _dt.date) -> float:
    """The heading of a later page: the job again (title, part, load, furnace, revision, date), so a page that
    comes loose still says which load it belongs to; returns where the page's blocks start [in from the top]."""
    width = page.width - 2 * SHEET_MARGIN
    values = plan.values()
    page.fitted(SHEET_MARGIN, SHEET_TOP, f"{plan.title} (continued)", width, 12, weight="bold", color=INK)
    job = [f"Part: {plan.part or '—'}", f"Load no.: {values.get('load_number') or '________'}",
           f"Furnace: {values.get('furnace') or '________'}", f"Revision {revision}", f"Date {date.isoformat()}"]
    page.fitted(SHEET_MARGIN, SHEET_TOP + 0.26, "   ·   ".join(job), width, 8.5)
    line = page.box(SHEET_MARGIN, SHEET_TOP + 0.47, width, 0.0)
    page.fig.add_artist(Line2D([line[0], line[0] + line[2]], [line[1], line[1]], transform=page.fig.transFigure,
                               color=INK, lw=0.8))
    return SHEET_TOP + _CONTINUED


def _profiles(ax, hax, outcome: Outcome, u: DisplayUnits, height: float) -> None:
    """The two profile plots of the process sheet (``height`` [in] of the plots): what the window shows at the end
    of the cycle."""
    view = outcome.view()
    low, aim, high = view.targets
    for axis, panel in ((ax, view.main), (hax, view.hardness)):
        axis.axvspan(u.length(low), u.length(high), color="#7fb685", alpha=0.25, lw=0)
        axis.axvline(u.length(aim), color="#7fb685", lw=1)
        axis.grid(True, color="#dddddd", lw=0.5)
        axis.tick_params(labelsize=SMALLEST)
        axis.set_xlabel(f"depth [{u.length_unit}]", fontsize=7.5)
        axis.plot(u.length(panel.curve.depth), panel.curve.values, color=INK, lw=1.4)
        for level in panel.levels:
            if level.style == "threshold":
                axis.axhline(level.value, color="#d1495b", ls="--", lw=1)
        if panel.band is not None:
            axis.axvspan(0.0, u.length(panel.band[0]), color="#c9c9c9", alpha=0.8, lw=0)
        axis.set_ylabel(_axis_label(panel.quantity, 7.5, height), fontsize=7.5)
        axis.set_xlim(0, u.length(view.reach))
    if "HV" in view.hardness.quantity:
        hrc_scale(hax, 7.5, SMALLEST)
    ax.set_title("Profile at the end", fontsize=8)
    hax.set_title("Estimated hardness", fontsize=8)


def _axis_label(text: str, size: float, room: float) -> str:
    """An axis label in lines that fit beside an axis ``room`` [in] long."""
    return "\n".join(_wrap(text, size, room))


def _timeline(ax, outcome: Outcome, u: DisplayUnits, height: float) -> None:
    """The cycle on the sheet (``height`` [in] of the plot): temperature and potential, the stages and moments
    named as the window names them (:func:`~casedepth.report.plot_marks.draw_cycle_words`)."""
    line = outcome.timeline()
    hours = line.times / 3600
    shown = np.array([u.temperature(t) for t in line.temperatures])
    ax.plot(hours, shown, color=INK, lw=1.4)
    ax.set_ylabel(_axis_label(f"temperature [{u.temperature_unit}]", 7.5, height), fontsize=7.5)
    ax.set_xlabel("time in the cycle [h]", fontsize=7.5)
    ax.grid(True, color="#dddddd", lw=0.5)
    ax.tick_params(labelsize=SMALLEST)
    # headroom over the curves: the top of the plot is where the moments are named
    ax.set_ylim(min(0.0, float(np.nanmin(shown))), float(np.nanmax(shown)) * 1.3)
    pax = ax.twinx()
    pax.plot(hours, line.potentials, color="#d1495b", ls="--", lw=1.2)
    if line.limit is not None:
        pax.axhline(line.limit[0], color="#b5651d", ls=":", lw=1.0)
    ax.set_xlim(0, max(hours[-1], 0.1))
    pax.set_ylabel(_axis_label(line.potential_name, 7.5, height), fontsize=7.5, color="#d1495b")
    pax.tick_params(labelsize=SMALLEST)
    finite = np.isfinite(line.potentials)
    pax.set_ylim(0, max(line.potential_floor, float(np.nanmax(line.potentials)) * 1.3) if finite.any()
                 else line.potential_floor)
    ax.set_title("The cycle: temperature solid, potential dashed" if line.limit is None else
                 f"The cycle: temperature, {line.potential_name.split(' [')[0]}, limit", fontsize=8)
    stages, moments = draw_cycle_words(ax, line, colour="#555", size=SMALLEST)
    FigureCanvasAgg(ax.figure)  # the words are placed as the page will draw them
    place_cycle_words(ax, stages, moments, [*ax.get_lines(), *pax.get_lines()])


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
