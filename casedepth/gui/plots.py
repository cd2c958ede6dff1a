"""The plots of the window, drawn with matplotlib from what the outcome says to show.

The profile pages draw the :class:`~casedepth.outcome.Panel` of the outcome's
:meth:`~casedepth.outcome.Outcome.view` (carbon or nitrogen, and hardness); the cycle page its
:meth:`~casedepth.outcome.Outcome.timeline` and quote; the temperatures page the plan evaluated at
other temperatures (:func:`casedepth.plan.compare_temperatures`). No page asks which treatment it
shows. Artists are made once and only their data change on a new result: rebuilding axes, ticks and
titles costs far more than solving, and a planner expects the plot to follow an edit at once.
"""

from __future__ import annotations

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg, NavigationToolbar2QT
from matplotlib.figure import Figure
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QHeaderView, QLabel, QSplitter, QTableWidget, QTableWidgetItem, QTabWidget, QVBoxLayout, QWidget

from ..errors import InputError
from ..models.hardness import ASTM_E140_hrc_to_hv, ASTM_E140_hv_to_hrc
from ..outcome import Outcome, Panel, ProfileView
from ..plan import compare_temperatures
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


def _hv_to_hrc(hv):
    return ASTM_E140_hv_to_hrc(np.clip(hv, 238.0, 940.0))


def _hrc_to_hv(hrc):
    return ASTM_E140_hrc_to_hv(np.clip(hrc, 20.0, 68.0))


def _swatch(handle) -> str:
    """A short coloured sample of a line or a band, as HTML."""
    from matplotlib.colors import to_hex

    line = hasattr(handle, "get_xdata")
    colour = to_hex(handle.get_color() if line else handle.get_facecolor(), keep_alpha=False)
    if not line:
        return f"<span style='color:{colour}'>■</span>"
    style = {"--": "╍╍", ":": "┈┈", "-.": "━·"}.get(handle.get_linestyle(), "━━")
    return f"<span style='color:{colour}; font-weight:bold'>{style}</span>"


def keep_margins(canvas, figure, left: float, right: float, bottom: float, top: float) -> None:
    """Hold the figure's margins at these many pixels (not fractions) as the canvas resizes, so axis labels and
    titles keep their room however small the window; fixed margins also spare a layout engine on every redraw."""
    def fit(_event=None) -> None:
        width, height = canvas.get_width_height()
        if width > 0 and height > 0:
            figure.subplots_adjust(left=min(0.3, left / width), right=1.0 - min(0.3, right / width),
                                   bottom=min(0.4, bottom / height), top=1.0 - min(0.3, top / height))

    canvas.mpl_connect("resize_event", fit)


class _PlotPage(QWidget):
    """One profile plot with its toolbar, the drawing window band, the aim line, lines and a caption."""

    def __init__(self, hrc_axis: bool, parent=None):
        super().__init__(parent)
        self.figure = Figure(figsize=(6, 4))
        # fixed margins: a layout engine would re-measure every text on every redraw
        self.figure.subplots_adjust(left=0.085, right=0.92, top=0.95, bottom=0.11)
        self.canvas = FigureCanvasQTAgg(self.figure)
        self.toolbar = NavigationToolbar2QT(self.canvas, self)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.toolbar)
        layout.addWidget(self.canvas, 1)
        # the key lives in Qt, not in the figure: drawing a legend costs a third of every redraw
        self.key = QLabel()
        self.key.setObjectName("plot_key")
        self.key.setWordWrap(True)
        layout.addWidget(self.key)
        ax = self.axes = self.figure.add_subplot()
        ax.grid(True, color="#dddddd", lw=0.6)
        self.band = ax.axvspan(0, 0, color=WINDOW, alpha=0.22, lw=0, label="drawing window")
        self.aim = ax.axvline(0, color=WINDOW, lw=1.2, label="aim")
        self.layer = ax.axvspan(0, 0, color=LAYER, alpha=0.8, lw=0)
        self.final, = ax.plot([], [], color=EARLIER, lw=1.2, ls="--")
        self.line, = ax.plot([], [], color=INK, lw=2.2)
        self.levels: list = []
        self.caption = ax.text(0.01, 0.985, "", transform=ax.transAxes, va="top", ha="left", fontsize=9,
                               bbox={"boxstyle": "round,pad=0.3", "fc": "white", "ec": "#cccccc", "alpha": 0.9})
        if hrc_axis:
            ax.secondary_yaxis("right", functions=(_hv_to_hrc, _hrc_to_hv)).set_ylabel("[HRC]")
        self._legend_key = None
        keep_margins(self.canvas, self.figure, 62, 52, 46, 12)

    def draw_panel(self, panel: Panel, view: ProfileView, units: DisplayUnits) -> None:
        ax = self.axes
        low, aim, high = (units.length(depth) for depth in view.targets)
        self.band.set_x(low)
        self.band.set_width(high - low)
        self.aim.set_xdata([aim, aim])
        self.aim.set_label(f"aim {aim:.{units.length_decimals}f} {units.length_unit}")
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
        self.canvas.draw_idle()

    def _handles(self):
        patches = [self.band] + ([self.layer] if self.layer.get_visible() else [])
        return [h for h in self.axes.get_lines() + patches if h.get_visible() and not h.get_label().startswith("_")]

    def legend(self) -> None:
        """Show the key under the plot (re-made only when its entries change)."""
        key = tuple((h.get_label(), _swatch(h)) for h in self._handles())
        if key != self._legend_key:
            self.key.setText("&nbsp;&nbsp;&nbsp;".join(f"{swatch}&nbsp;{label}" for label, swatch in key))
            self._legend_key = key

    def save(self, path: str, dpi: int = 200) -> None:
        """Save the figure with the key drawn into it as a legend (an exported picture stands alone)."""
        legend = self.axes.legend(handles=self._handles(), fontsize=8, loc="upper right", framealpha=0.9)
        try:
            self.figure.savefig(path, dpi=dpi)
        finally:
            legend.remove()


class _CyclePage(QSplitter):
    """Temperature and potential through the whole cycle, and the quote under it."""

    def __init__(self, parent=None):
        super().__init__(Qt.Vertical, parent)
        self.figure = Figure(figsize=(6, 3))
        self.figure.subplots_adjust(left=0.085, right=0.90, top=0.93, bottom=0.16)
        self.canvas = FigureCanvasQTAgg(self.figure)
        keep_margins(self.canvas, self.figure, 62, 62, 46, 28)
        top = QWidget()
        layout = QVBoxLayout(top)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(NavigationToolbar2QT(self.canvas, top))
        layout.addWidget(self.canvas)
        self.addWidget(top)
        self.axes = self.figure.add_subplot()
        self.potential_axes = self.axes.twinx()
        bottom = QWidget()
        table_layout = QVBoxLayout(bottom)
        table_layout.setContentsMargins(0, 0, 0, 0)
        self.table = QTableWidget(0, 3)
        self.table.setObjectName("quote_table")
        self.table.setHorizontalHeaderLabels(["Stage", "Hours", "Share"])
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QTableWidget.NoEditTriggers)
        table_layout.addWidget(self.table)
        self.total = QLabel()
        self.total.setObjectName("quote_total")
        table_layout.addWidget(self.total)
        self.addWidget(bottom)
        self.setSizes([320, 220])

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> None:
        line = outcome.timeline()
        ax, pax = self.axes, self.potential_axes
        ax.clear()
        pax.clear()
        hours = line.times / 3600.0
        ax.plot(hours, [units.temperature(t) for t in line.temperatures], color=INK, lw=2.0, label="temperature")
        pax.plot(hours, line.potentials, color=THRESHOLD, lw=1.6, ls="--", label=line.potential_name)
        for i, (start, end, label) in enumerate(line.labels):
            if i % 2 == 0:
                ax.axvspan(start / 3600.0, end / 3600.0, color="#eef2f6", lw=0, zorder=0)
            if end - start > 0.04 * max(line.times[-1], 1.0):
                ax.text((start + end) / 7200.0, 0.02, label.split(" ")[0], transform=ax.get_xaxis_transform(),
                        ha="center", va="bottom", fontsize=7, color="#555", rotation=90)
        ax.set_xlabel("time in the cycle [h]")
        ax.set_ylabel(f"temperature [{units.temperature_unit}]")
        pax.yaxis.set_label_position("right")
        pax.yaxis.tick_right()
        pax.set_ylabel(line.potential_name, color=THRESHOLD)
        finite = np.isfinite(line.potentials)
        pax.set_ylim(0, max(line.potential_floor, float(np.nanmax(line.potentials)) * 1.15) if finite.any()
                     else line.potential_floor)
        ax.set_xlim(0, max(hours[-1], 0.1))
        ax.grid(True, color="#dddddd", lw=0.6)
        ax.set_title(f"The cycle: temperature (solid) and {line.potential_name.split(' [')[0]} (dashed)", fontsize=10)
        self.canvas.draw_idle()
        quote = outcome.quote
        self.table.setRowCount(len(quote.lines))
        for r, (label, h) in enumerate(quote.lines):
            for c, text in enumerate((label, f"{h:.2f}", f"{100 * h / quote.total_h:.0f} %" if quote.total_h else "")):
                item = QTableWidgetItem(text)
                if c:
                    item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                self.table.setItem(r, c, item)
        money = f" {quote.currency}" if quote.currency else ""
        self.total.setText(f"<b>Whole cycle {quote.total_h:.2f} h</b> · {quote.cost_per_load:.2f}{money} per load · "
                           f"{quote.cost_per_part:.3f}{money} per part")


class _TradeoffPage(QSplitter):
    """The plan's soak at other temperatures (the plan otherwise unchanged, its own policy on the shop's stages):
    furnace time against grain growth and distortion."""

    def __init__(self, parent=None):
        super().__init__(Qt.Vertical, parent)
        self.figure = Figure(figsize=(6, 3))
        self.figure.subplots_adjust(left=0.09, right=0.97, top=0.9, bottom=0.16)
        self.canvas = FigureCanvasQTAgg(self.figure)
        keep_margins(self.canvas, self.figure, 62, 20, 46, 28)
        self.addWidget(self.canvas)
        self.axes = self.figure.add_subplot()
        self.table = QTableWidget(0, 2)
        self.table.setObjectName("tradeoff_table")
        self.table.setHorizontalHeaderLabels(["Temperature", "Soak for the aim depth"])
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QTableWidget.NoEditTriggers)
        self.addWidget(self.table)
        self.note = QLabel()
        self.note.setWordWrap(True)
        self.note.setMinimumHeight(44)
        self.addWidget(self.note)
        self.setSizes([300, 200, 44])
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
            ax.plot([units.temperature(T) for T, _ in self.pairs], [t / 3600 for _, t in self.pairs], "o-", color=INK)
            own = dict(self.pairs).get(values["temperature"])
            if own is not None:
                ax.plot([units.temperature(values["temperature"])], [own / 3600], "o", color=THRESHOLD, ms=9,
                        label="this plan's temperature")
                ax.legend(fontsize=8)
        ax.set_xlabel(f"temperature [{units.temperature_unit}]")
        ax.set_ylabel("soak [h]")
        ax.grid(True, color="#dddddd", lw=0.6)
        ax.set_title(f"This plan at other temperatures: the soak for {units.format_length(outcome.targets[1])}",
                     fontsize=10)
        self.canvas.draw_idle()
        self.table.setRowCount(len(self.pairs))
        for r, (T, t) in enumerate(self.pairs):
            self.table.setItem(r, 0, QTableWidgetItem(units.format_temperature(T)))
            self.table.setItem(r, 1, QTableWidgetItem(f"{format_duration(t)}  ({t / 3600:.2f} h)"))
        self.note.setText(note)


def _diameter(metres: float) -> str:
    """An ideal critical diameter as the trade quotes it: ``48 mm (1.90 in)``."""
    return f"{metres * 1e3:.0f} mm ({metres / 0.0254:.2f} in)"


class _HardenabilityPage(QSplitter):
    """The steel's hardenability: its Jominy curve (and the case's, at the surface carbon), the ideal critical
    diameter, and what the estimate rests on."""

    def __init__(self, parent=None):
        super().__init__(Qt.Vertical, parent)
        self.figure = Figure(figsize=(6, 3))
        self.figure.subplots_adjust(left=0.09, right=0.97, top=0.9, bottom=0.16)
        self.canvas = FigureCanvasQTAgg(self.figure)
        keep_margins(self.canvas, self.figure, 62, 20, 46, 28)
        self.addWidget(self.canvas)
        self.axes = self.figure.add_subplot()
        self.note = QLabel()
        self.note.setObjectName("hardenability_note")
        self.note.setWordWrap(True)
        self.note.setMinimumHeight(44)
        self.addWidget(self.note)
        self.setSizes([400, 80])

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
            self.canvas.draw_idle()
            return
        ax.set_axis_on()
        distance = facts["curve_distances"] / 0.0254 * 16.0  # sixteenths of an inch, as Jominy curves are read
        ax.plot(distance, facts["curve_hrc"], color=INK, lw=2, label=f"core, {steel.carbon:.2f} %C")
        if facts["case_curve_hrc"] is not None:
            ax.plot(distance, facts["case_curve_hrc"], color=THRESHOLD, lw=2, ls="--",
                    label=f"case at the surface carbon, {facts['case_carbon']:.2f} %C")
        ax.set_xlabel("distance from the quenched end [1/16 in]")
        ax.set_ylabel("hardness [HRC]")
        ax.set_xlim(0, 32)
        ax.grid(True, color="#dddddd", lw=0.6)
        ax.legend(fontsize=8, loc="upper right")
        ideal = facts["ideal_diameter"]
        ax.set_title(f"Jominy end-quench curve of {steel.name}, estimated (D_I {_diameter(ideal)})", fontsize=10)
        self.canvas.draw_idle()
        case = ("" if facts["case_ideal_diameter"] is None else
                f"; the case at {facts['case_carbon']:.2f} %C: D_I {_diameter(facts['case_ideal_diameter'])}")
        methods = facts["methods"]
        self.note.setText(f"Ideal critical diameter of the core {_diameter(ideal)} (grain size ASTM "
                          f"{facts['grain_size']:g}){case}. {methods[:1].upper() + methods[1:]}. "
                          + " ".join(facts["warnings"]))


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
        page = self.pages[self.currentIndex()]
        if isinstance(page, _PlotPage):
            page.save(path, dpi)
        else:
            page.figure.savefig(path, dpi=dpi)

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
        """Draw every page now (before exporting or printing)."""
        for index, page in enumerate(self.pages):
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
