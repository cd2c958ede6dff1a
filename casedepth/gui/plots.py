"""The plots of the window, drawn with matplotlib from what the outcome says to show.

The profile pages draw the :class:`~casedepth.outcome.Panel` of the outcome's
:meth:`~casedepth.outcome.Outcome.view` (carbon or nitrogen, and hardness); the cycle page its
:meth:`~casedepth.outcome.Outcome.timeline` and quote; the temperatures page the plan evaluated at
other temperatures (:func:`casedepth.plan.compare_temperatures`). No page asks which treatment it
shows. Artists are made once and only their data change on a new result: rebuilding axes, ticks and
titles costs far more than solving, and a planner expects the plot to follow an edit at once.
"""

from __future__ import annotations

import html
import warnings

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg, NavigationToolbar2QT
from matplotlib.figure import Figure
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (QHeaderView, QLabel, QSplitter, QTableWidget, QTableWidgetItem, QTabWidget, QVBoxLayout,
                               QWidget)

from .. import formats
from ..errors import InputError
from ..outcome import Outcome, Panel, ProfileView
from ..plan import compare_temperatures
from ..report.documents import draw_cycle_words, hrc_scale, place_cycle_words
from ..treatments import TREATMENTS
from ..units import DisplayUnits, format_duration

INK = "#1d3557"
EARLIER = "#8fa9c4"
THRESHOLD = "#d1495b"
WINDOW = "#7fb685"
CORE = "#6c757d"
LIMIT = "#b5651d"
LAYER = "#c9c9c9"
LEVEL_STYLES = {"threshold": (THRESHOLD, "--", 1.2), "core": (CORE, ":", 1.0), "limit": (LIMIT, "-.", 1.0)}
MARKER = "#2a7f62"  # the moments of a cycle: purges, the atmosphere going in


def _swatch(handle) -> str:
    """A short coloured sample of a line or a band, as HTML."""
    from matplotlib.colors import to_hex

    line = hasattr(handle, "get_xdata")
    colour = to_hex(handle.get_color() if line else handle.get_facecolor(), keep_alpha=False)
    if not line:
        return f"<span style='color:{colour}'>■</span>"
    if handle.get_linestyle() in ("None", "", " ") and handle.get_marker() not in ("None", "", " ", None):
        return f"<span style='color:{colour}'>●</span>"
    style = {"--": "╍╍", ":": "┈┈", "-.": "━·"}.get(handle.get_linestyle(), "━━")
    return f"<span style='color:{colour}; font-weight:bold'>{style}</span>"


def fit_margins(figure) -> None:
    """Margins that hold every title, axis label and tick label inside the canvas as it is now (matplotlib's tight
    layout, measured in pixels). Called when the canvas is resized and when texts or ranges change, not on every
    redraw: measuring every text costs half a redraw."""
    width, height = figure.canvas.get_width_height()
    if width > 80 and height > 60:
        with warnings.catch_warnings():  # a canvas too small for its texts keeps the margins it had
            warnings.simplefilter("ignore")
            figure.tight_layout(pad=0.5)


def keep_fitted(canvas, figure, then=None) -> None:
    """Fit the figure's margins (:func:`fit_margins`) whenever the canvas is resized; ``then`` is called after (to
    place what depends on the size of the axes)."""
    def fit(_event=None) -> None:
        fit_margins(figure)
        if then is not None:
            then()

    canvas.mpl_connect("resize_event", fit)


class _Key(QLabel):
    """The key of a plot, in Qt under it: drawing a legend in the figure costs a third of every redraw, and inside
    the axes it covers the curves. Exported pictures draw it as a legend (:func:`save_with_legend`)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("plot_key")
        self.setWordWrap(True)
        self.shown = None

    def show_handles(self, handles) -> None:
        """Show the labelled lines and bands (re-made only when its entries change)."""
        key = tuple((h.get_label(), _swatch(h)) for h in handles)
        if key != self.shown:
            # an entry stays on one line; the key wraps between entries
            self.setText(" &nbsp; ".join(f"{swatch}&nbsp;{html.escape(label).replace(' ', '&nbsp;')}"
                                         for label, swatch in key))
            self.shown = key


def save_with_legend(figure, axes, handles, path: str, dpi: int = 200) -> None:
    """Save the figure with its key drawn in as a legend (an exported picture stands alone)."""
    legend = axes.legend(handles=handles, fontsize=8, loc="best", framealpha=0.9) if handles else None
    try:
        figure.savefig(path, dpi=dpi)
    finally:
        if legend is not None:
            legend.remove()


class _PlotPage(QWidget):
    """One profile plot with its toolbar, the drawing window band, the aim line, lines, and a caption over it."""

    def __init__(self, hrc_axis: bool, parent=None):
        super().__init__(parent)
        self.figure = Figure(figsize=(6, 4))
        self.canvas = FigureCanvasQTAgg(self.figure)
        self.toolbar = NavigationToolbar2QT(self.canvas, self)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.toolbar)
        layout.addWidget(self.canvas, 1)
        self.key = _Key()
        layout.addWidget(self.key)
        ax = self.axes = self.figure.add_subplot()
        ax.grid(True, color="#dddddd", lw=0.6)
        self.band = ax.axvspan(0, 0, color=WINDOW, alpha=0.22, lw=0, label="drawing window")
        self.aim = ax.axvline(0, color=WINDOW, lw=1.2, label="aim")
        self.layer = ax.axvspan(0, 0, color=LAYER, alpha=0.8, lw=0)
        self.final, = ax.plot([], [], color=EARLIER, lw=1.2, ls="--")
        self.line, = ax.plot([], [], color=INK, lw=2.2)
        self.levels: list = []
        # the caption is the plot's title, over the axes rather than over the curves
        self.caption = ax.set_title("", loc="left", fontsize=9)
        if hrc_axis:
            ax.set_ylim(250.0, 900.0)  # HV the HRC scale spans, until a result sets the range (fitting measures it)
            hrc_scale(ax)
        self._fitted = None  # the texts and ranges the margins were fitted to
        keep_fitted(self.canvas, self.figure)

    def draw_panel(self, panel: Panel, view: ProfileView, units: DisplayUnits) -> None:
        ax = self.axes
        low, aim, high = (units.length(depth) for depth in view.targets)
        self.band.set_x(low)
        self.band.set_width(high - low)
        self.aim.set_xdata([aim, aim])
        self.aim.set_label(f"aim {formats.length(view.targets[1], units)}")
        ax.set_xlim(0, units.length(view.reach))
        ax.set_xlabel(f"depth below the surface [{units.length_unit}]")
        ax.set_ylabel(panel.quantity)
        self.line.set_data(units.length(panel.curve.depth), panel.curve.values)
        self.line.set_label(panel.curve.label)
        self.final.set_visible(panel.final is not None)
        if panel.final is not None:
            self.final.set_data(units.length(panel.final.depth), panel.final.values)
            self.final.set_label(panel.final.label)
        while len(self.levels) < len(panel.levels):
            self.levels.append(ax.axhline(0, lw=1.0))
        for artist, level in zip(self.levels, panel.levels):
            colour, style, width = LEVEL_STYLES[level.style]
            artist.set(ydata=[level.value] * 2, color=colour, linestyle=style, linewidth=width, label=level.label,
                       visible=True)
        for artist in self.levels[len(panel.levels):]:
            artist.set_visible(False)
        self.layer.set_visible(panel.band is not None)
        if panel.band is not None:
            self.layer.set_x(0.0)
            self.layer.set_width(units.length(panel.band[0]))
            self.layer.set_label(panel.band[1])
        ax.set_ylim(*panel.limits)
        self.caption.set_text(panel.caption)
        self.legend()
        # margins follow the texts and ranges, not the time scrubbed (the caption's length only roughly)
        fitted = (ax.get_xlabel(), ax.get_ylabel(), ax.get_xlim(), ax.get_ylim(), len(panel.caption) // 12)
        if fitted != self._fitted:
            fit_margins(self.figure)
            self._fitted = fitted
        self.canvas.draw_idle()

    def _handles(self):
        patches = [self.band] + ([self.layer] if self.layer.get_visible() else [])
        return [h for h in self.axes.get_lines() + patches if h.get_visible() and not h.get_label().startswith("_")]

    def legend(self) -> None:
        """Show the key under the plot."""
        self.key.show_handles(self._handles())

    def save(self, path: str, dpi: int = 200) -> None:
        """Save the figure with the key drawn into it as a legend (an exported picture stands alone)."""
        save_with_legend(self.figure, self.axes, self._handles(), path, dpi)


def _compact(table: QTableWidget) -> None:
    """Rows as high as their text, so a usual cycle's stages show without scrolling."""
    table.verticalHeader().setDefaultSectionSize(table.fontMetrics().height() + 6)
    table.verticalHeader().setVisible(False)
    table.setEditTriggers(QTableWidget.NoEditTriggers)


class _Beside(QSplitter):
    """A plot with a table beside it (``side``: the table, or a widget holding it), as wide as the table's contents
    until the user moves the divider."""

    def __init__(self, plot: QWidget, side: QWidget, table: QTableWidget, parent=None):
        super().__init__(Qt.Horizontal, parent)
        self.table = table
        self.addWidget(plot)
        self.addWidget(side)
        self.setStretchFactor(0, 1)
        self.setStretchFactor(1, 0)
        self.setSizes([620, 300])
        self.moved_by_hand = False
        self.splitterMoved.connect(lambda *_: setattr(self, "moved_by_hand", True))

    def fit_table(self) -> None:
        if self.moved_by_hand:
            return
        table = self.table
        columns = sum(max(table.sizeHintForColumn(c), table.horizontalHeader().sectionSizeHint(c))
                      for c in range(table.columnCount()))
        width = columns + 2 * table.frameWidth() + table.verticalScrollBar().sizeHint().width() + 4
        total = sum(self.sizes()) or self.width()
        self.setSizes([max(total - width, 0), width])


class _CyclePage(QWidget):
    """Temperature and potential through the whole cycle, with its stages and moments (purges, the atmosphere going
    in), and the quote beside it."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.figure = Figure(figsize=(6, 3))
        self.canvas = FigureCanvasQTAgg(self.figure)
        plot = QWidget()
        layout = QVBoxLayout(plot)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(NavigationToolbar2QT(self.canvas, plot))
        layout.addWidget(self.canvas, 1)
        self.axes = self.figure.add_subplot()
        self.potential_axes = self.axes.twinx()
        self.stage_texts: list = []  # (text, span start [h], span end [h]) of each stage's name in the plot
        self.marker_texts: list = []  # the moments' words, along the top of the plot
        quote = QWidget()
        quote_layout = QVBoxLayout(quote)
        quote_layout.setContentsMargins(0, 0, 0, 0)
        self.table = QTableWidget(0, 3)
        self.table.setObjectName("quote_table")
        self.table.setHorizontalHeaderLabels(["Stage", "Hours", "Share"])
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeToContents)
        header.setSectionResizeMode(0, QHeaderView.Stretch)
        _compact(self.table)
        quote_layout.addWidget(self.table, 1)
        self.total = QLabel()
        self.total.setObjectName("quote_total")
        self.total.setWordWrap(True)
        quote_layout.addWidget(self.total)
        self.split = _Beside(plot, quote, self.table)
        page_layout = QVBoxLayout(self)
        page_layout.setContentsMargins(0, 0, 0, 0)
        page_layout.addWidget(self.split)
        keep_fitted(self.canvas, self.figure, then=self._place_texts)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> None:
        line = outcome.timeline()
        ax, pax = self.axes, self.potential_axes
        ax.clear()
        pax.clear()
        hours = line.times / 3600.0
        shown = np.array([units.temperature(t) for t in line.temperatures])
        ax.plot(hours, shown, color=INK, lw=2.0, label="temperature")
        pax.plot(hours, line.potentials, color=THRESHOLD, lw=1.6, ls="--", label=line.potential_name)
        self.stage_texts, self.marker_texts = draw_cycle_words(ax, line, MARKER)
        ax.set_xlabel("time in the cycle [h]")
        ax.set_ylabel(f"temperature [{units.temperature_unit}]")
        pax.yaxis.set_label_position("right")
        pax.yaxis.tick_right()
        pax.set_ylabel(line.potential_name, color=THRESHOLD)
        # headroom over both curves: the top of the plot is where the moments are named
        ax.set_ylim(min(0.0, float(np.nanmin(shown))), float(np.nanmax(shown)) * 1.25)
        finite = np.isfinite(line.potentials)
        pax.set_ylim(0, max(line.potential_floor, float(np.nanmax(line.potentials)) * 1.3) if finite.any()
                     else line.potential_floor)
        ax.set_xlim(0, max(hours[-1], 0.1))
        ax.grid(True, color="#dddddd", lw=0.6)
        ax.set_title(f"Temperature (solid) and {line.potential_name.split(' [')[0]} (dashed)", fontsize=10)
        fit_margins(self.figure)
        self._place_texts()
        self.canvas.draw_idle()
        quote = outcome.quote
        self.table.setRowCount(len(quote.lines))
        for r, (label, h) in enumerate(quote.lines):
            for c, text in enumerate((label, f"{h:.2f}", formats.percent(100 * h / quote.total_h) if quote.total_h
                                      else "")):
                item = QTableWidgetItem(text)
                if c:
                    item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                self.table.setItem(r, c, item)
        self.total.setText(f"<b>Whole cycle {format_duration(quote.total_h * 3600)}</b> · "
                           f"{formats.money(quote.cost_per_load, quote.currency)} per load · "
                           f"{formats.piece_price(quote.cost_per_part, quote.currency)} per part")
        self.split.fit_table()

    def save(self, path: str, dpi: int = 200) -> None:
        self.figure.savefig(path, dpi=dpi)

    def _place_texts(self) -> None:
        """Set the stages' names and the moments' words where they are clear of the curves and of each other, on
        the plot as large as it is now (:func:`~casedepth.report.documents.place_cycle_words`)."""
        place_cycle_words(self.axes, self.stage_texts, self.marker_texts,
                          [*self.axes.get_lines(), *self.potential_axes.get_lines()])


class _KeyedPlot(QWidget):
    """A figure with its key under it (in Qt, see :class:`_Key`)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.figure = Figure(figsize=(6, 3))
        self.canvas = FigureCanvasQTAgg(self.figure)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.canvas, 1)
        self.key = _Key()
        layout.addWidget(self.key)
        self.axes = self.figure.add_subplot()
        keep_fitted(self.canvas, self.figure)

    def handles(self):
        return [h for h in self.axes.get_lines() if not h.get_label().startswith("_")]

    def finish(self) -> None:
        """After drawing anew: the key, the margins, the canvas."""
        self.key.show_handles(self.handles())
        self.key.setVisible(bool(self.key.shown))
        fit_margins(self.figure)
        self.canvas.draw_idle()

    def save(self, path: str, dpi: int = 200) -> None:
        save_with_legend(self.figure, self.axes, self.handles(), path, dpi)


class _TradeoffPage(QWidget):
    """The plan's soak at other temperatures (the plan otherwise unchanged, its own policy on the shop's stages):
    furnace time against grain growth and distortion; the plot, the table beside it and a note under both."""

    def __init__(self, parent=None):
        super().__init__(parent)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.plot = _KeyedPlot()
        self.figure, self.canvas, self.axes = self.plot.figure, self.plot.canvas, self.plot.axes
        self.table = QTableWidget(0, 2)
        self.table.setObjectName("tradeoff_table")
        self.table.setHorizontalHeaderLabels(["Temperature", "Soak for the aim depth"])
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.table.horizontalHeader().setStretchLastSection(True)
        _compact(self.table)
        self.split = _Beside(self.plot, self.table, self.table)
        layout.addWidget(self.split, 1)
        self.note = QLabel()
        self.note.setWordWrap(True)
        layout.addWidget(self.note)
        self.pairs: list[tuple[float, float]] = []

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> None:
        values = outcome.values
        temperatures = sorted({*TREATMENTS[outcome.treatment].comparison_temperatures, values["temperature"]})
        ax = self.axes
        ax.clear()
        try:
            self.pairs = compare_temperatures(values, temperatures)
            note = ("This plan as it is (every other value, and how it counts its stages) at other temperatures. "
                    + TREATMENTS[outcome.treatment].comparison_note)
        except InputError as error:
            self.pairs, note = [], error.message
        if not self.pairs:
            ax.set_axis_off()
            ax.text(0.5, 0.5, note, transform=ax.transAxes, ha="center", va="center", wrap=True, fontsize=10, color="#555")
        else:
            ax.set_axis_on()
            ax.plot([units.temperature(T) for T, _ in self.pairs], [t / 3600 for _, t in self.pairs], "o-", color=INK,
                    label="soak for the aim depth")
            own = dict(self.pairs).get(values["temperature"])
            if own is not None:
                ax.plot([units.temperature(values["temperature"])], [own / 3600], "o", color=THRESHOLD, ms=9,
                        label="this plan's temperature")
        ax.set_xlabel(f"temperature [{units.temperature_unit}]")
        ax.set_ylabel("soak [h]")
        ax.grid(True, color="#dddddd", lw=0.6)
        ax.set_title(f"This plan at other temperatures: the soak for {formats.length(outcome.targets[1], units)}",
                     fontsize=10)
        self.plot.finish()
        self.table.setRowCount(len(self.pairs))
        for r, (T, t) in enumerate(self.pairs):
            self.table.setItem(r, 0, QTableWidgetItem(formats.temperature(T, units)))
            self.table.setItem(r, 1, QTableWidgetItem(f"{format_duration(t)}  ({t / 3600:.2f} h)"))
        self.split.fit_table()
        self.note.setText(note)

    def save(self, path: str, dpi: int = 200) -> None:
        self.plot.save(path, dpi)


class _HardenabilityPage(QWidget):
    """The steel's hardenability: its Jominy curve (and the case's, at the surface carbon), the ideal critical
    diameter, and what the estimate rests on."""

    def __init__(self, parent=None):
        super().__init__(parent)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.plot = _KeyedPlot()
        self.figure, self.canvas, self.axes = self.plot.figure, self.plot.canvas, self.plot.axes
        layout.addWidget(self.plot, 1)
        self.note = QLabel()
        self.note.setObjectName("hardenability_note")
        self.note.setWordWrap(True)
        layout.addWidget(self.note)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> None:
        facts = outcome.hardenability()
        ax = self.axes
        ax.clear()
        steel = outcome.setup.steel
        if "error" in facts:
            ax.set_axis_off()
            ax.text(0.5, 0.5, facts["error"], transform=ax.transAxes, ha="center", va="center", wrap=True, fontsize=10,
                    color="#555")
            self.note.setText("")
            self.plot.finish()
            return
        ax.set_axis_on()
        distance = facts["curve_distances"] / 0.0254 * 16.0  # sixteenths of an inch, as Jominy curves are read
        ax.plot(distance, facts["curve_hrc"], color=INK, lw=2, label=f"core, {formats.carbon(steel.carbon)}")
        if facts["case_curve_hrc"] is not None:
            ax.plot(distance, facts["case_curve_hrc"], color=THRESHOLD, lw=2, ls="--",
                    label=f"case at the surface carbon, {formats.carbon(facts['case_carbon'])}")
        ax.set_xlabel("distance from the quenched end [1/16 in]")
        ax.set_ylabel("hardness [HRC]")
        ax.set_xlim(0, 32)
        ax.grid(True, color="#dddddd", lw=0.6)
        ideal = facts["ideal_diameter"]
        ax.set_title(f"Jominy end-quench curve of {steel.name}, estimated (D_I {formats.ideal_diameter(ideal)})",
                     fontsize=10)
        self.plot.finish()
        case = ("" if facts["case_ideal_diameter"] is None else
                f"; the case at {formats.carbon(facts['case_carbon'])}: D_I "
                f"{formats.ideal_diameter(facts['case_ideal_diameter'])}")
        methods = facts["methods"]
        self.note.setText(f"Ideal critical diameter of the core {formats.ideal_diameter(ideal)} (grain size ASTM "
                          f"{facts['grain_size']:g}){case}. {methods[:1].upper() + methods[1:]}. "
                          + " ".join(w if w.endswith(".") else f"{w}." for w in facts["warnings"]))

    def save(self, path: str, dpi: int = 200) -> None:
        self.plot.save(path, dpi)


class ProfilePlots(QTabWidget):
    """Five pages: the main profile (carbon or nitrogen), hardness, the cycle and quote, other temperatures, and
    the steel's hardenability."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.carbon_page = _PlotPage(hrc_axis=False)
        self.hardness_page = _PlotPage(hrc_axis=True)
        self.cycle_page = _CyclePage()
        self.tradeoff_page = _TradeoffPage()
        self.hardenability_page = _HardenabilityPage()
        self.pages = (self.carbon_page, self.hardness_page, self.cycle_page, self.tradeoff_page, self.hardenability_page)
        for page, name in zip(self.pages, ("Carbon profile", "Hardness profile", "Cycle and quote", "Temperatures",
                                           "Hardenability")):
            self.addTab(page, name)
        self.outcome: Outcome | None = None
        self.units = DisplayUnits()
        self.time = None
        self._stale = {index: False for index in range(len(self.pages))}
        self.currentChanged.connect(self._page_shown)

    def save_current(self, path: str, dpi: int = 200) -> None:
        self.pages[self.currentIndex()].save(path, dpi)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits, time: float | None = None) -> None:
        self.outcome, self.units, self.time = outcome, units, time
        self.redraw()

    def set_time(self, time: float | None) -> None:
        self.time = time
        self.redraw()

    def redraw(self) -> None:
        """Draw the page on show now; the others when they are shown (drawing costs more than solving)."""
        if self.outcome is None:
            return
        self.setTabText(0, self.outcome.profile_name)
        self._stale = {index: True for index in self._stale}
        self._page_shown(self.currentIndex())

    def draw_all(self) -> None:
        """Draw every page now (before exporting or printing); a page already drawn for this result is not made
        again, only rendered."""
        for index, page in enumerate(self.pages):
            if self.outcome is not None and self._stale.get(index):
                self._draw_page(index)
            page.canvas.draw()

    def _page_shown(self, index: int) -> None:
        if self.outcome is not None and self._stale.get(index):
            self._draw_page(index)

    def _draw_page(self, index: int) -> None:
        page = self.pages[index]
        if isinstance(page, _PlotPage):
            view = self.outcome.view(self.time)
            page.draw_panel(view.main if index == 0 else view.hardness, view, self.units)
        else:
            page.show_outcome(self.outcome, self.units)
        self._stale[index] = False
