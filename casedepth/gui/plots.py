"""Carbon and hardness profiles, drawn with matplotlib inside the window.

The artists are made once and only their data change on a new result: rebuilding axes, ticks and
titles costs far more than solving, and a planner expects the plot to follow an edit at once.
"""

from __future__ import annotations

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg, NavigationToolbar2QT
from matplotlib.figure import Figure
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (QHeaderView, QLabel, QSplitter, QTableWidget, QTableWidgetItem, QTabWidget, QVBoxLayout,
                               QWidget)

from ..hardness import HARDNESS_RELATIONS, ASTM_E140_hrc_to_hv, ASTM_E140_hv_to_hrc
from ..errors import InputError
from ..recipe import temperature_tradeoff
from ..units import ZERO_CELSIUS
from ..units import DisplayUnits, format_duration

INK = "#1d3557"
EARLIER = "#8fa9c4"
THRESHOLD = "#d1495b"
WINDOW = "#7fb685"
CORE = "#6c757d"
LIMIT = "#b5651d"


def _hv_to_hrc(hv):
    return ASTM_E140_hv_to_hrc(np.clip(hv, 238.0, 940.0))


def _hrc_to_hv(hrc):
    return ASTM_E140_hrc_to_hv(np.clip(hrc, 20.0, 68.0))


class _PlotPage(QWidget):
    """One figure with its toolbar, the drawing window band, the aim line and a caption."""

    def __init__(self, ylabel: str, parent=None):
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
        ax.set_ylabel(ylabel)
        self.band = ax.axvspan(0, 0, color=WINDOW, alpha=0.22, lw=0, label="drawing window")
        self.aim = ax.axvline(0, color=WINDOW, lw=1.2, label="aim")
        self.caption = ax.text(0.01, 0.985, "", transform=ax.transAxes, va="top", ha="left", fontsize=9,
                               bbox={"boxstyle": "round,pad=0.3", "fc": "white", "ec": "#cccccc", "alpha": 0.9})
        self._legend_key = None

    def frame(self, outcome, units: DisplayUnits, reach: float) -> None:
        low, aim, high = (units.length(depth) for depth in outcome.targets)
        self.band.set_x(low)
        self.band.set_width(high - low)
        self.aim.set_xdata([aim, aim])
        self.aim.set_label(f"aim {aim:.{units.length_decimals}f} {units.length_unit}")
        self.axes.set_xlim(0, units.length(reach))
        self.axes.set_xlabel(f"depth below the surface [{units.length_unit}]")

    def _handles(self):
        patches = [self.band] + ([self.compound_band] if getattr(self, "compound_band", None) is not None else [])
        return [h for h in self.axes.get_lines() + patches if h.get_visible() and not h.get_label().startswith("_")]

    def legend(self) -> None:
        """Show the key under the plot (re-made only when its entries change)."""
        handles = self._handles()
        key = tuple((h.get_label(), _swatch(h)) for h in handles)
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


def _swatch(handle) -> str:
    """A short coloured sample of a line or a band, as HTML."""
    from matplotlib.colors import to_hex

    colour = to_hex(handle.get_color() if hasattr(handle, "get_linestyle") and hasattr(handle, "get_xdata")
                    else handle.get_facecolor(), keep_alpha=False)
    if not hasattr(handle, "get_xdata"):
        return f"<span style='color:{colour}'>■</span>"
    style = {"--": "╍╍", ":": "┈┈", "-.": "━·"}.get(handle.get_linestyle(), "━━")
    return f"<span style='color:{colour}; font-weight:bold'>{style}</span>"


class _CyclePage(QSplitter):
    """Temperature and carbon potential through the whole cycle, and the quote under it."""

    def __init__(self, parent=None):
        super().__init__(Qt.Vertical, parent)
        self.figure = Figure(figsize=(6, 3))
        self.figure.subplots_adjust(left=0.085, right=0.90, top=0.93, bottom=0.16)
        self.canvas = FigureCanvasQTAgg(self.figure)
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

    def show_outcome(self, outcome, units: DisplayUnits) -> None:
        times, temps, pots, labels = outcome.timeline()
        ax, pax = self.axes, self.potential_axes
        ax.clear()
        pax.clear()
        hours = times / 3600.0
        ax.plot(hours, [units.temperature(t) for t in temps], color=INK, lw=2.0, label="temperature")
        pax.plot(hours, pots, color=THRESHOLD, lw=1.6, ls="--", label=outcome.potential_name)
        for i, (start, end, label) in enumerate(labels):
            if i % 2 == 0:
                ax.axvspan(start / 3600.0, end / 3600.0, color="#eef2f6", lw=0, zorder=0)
            if end - start > 0.04 * max(times[-1], 1.0):
                ax.text((start + end) / 7200.0, 0.02, label.split(" ")[0], transform=ax.get_xaxis_transform(),
                        ha="center", va="bottom", fontsize=7, color="#555", rotation=90)
        ax.set_xlabel("time in the cycle [h]")
        ax.set_ylabel(f"temperature [{units.temperature_unit}]")
        pax.yaxis.set_label_position("right")
        pax.yaxis.tick_right()
        pax.set_ylabel(outcome.potential_name, color=THRESHOLD)
        pax.set_ylim(0, max(1.6 if outcome.process != "nitriding" else 1.0, np.nanmax(pots) * 1.15)
                     if np.isfinite(pots).any() else 1.6)
        ax.set_xlim(0, max(hours[-1], 0.1))
        ax.grid(True, color="#dddddd", lw=0.6)
        ax.set_title(f"The cycle: temperature (solid) and {outcome.potential_name.split(' [')[0]} (dashed)", fontsize=10)
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
    """Soak time for the same case at other temperatures: furnace time against grain growth and distortion."""

    TEMPERATURES_C = (880.0, 900.0, 925.0, 950.0, 980.0, 1000.0)

    def __init__(self, parent=None):
        super().__init__(Qt.Vertical, parent)
        self.figure = Figure(figsize=(6, 3))
        self.figure.subplots_adjust(left=0.09, right=0.97, top=0.9, bottom=0.16)
        self.canvas = FigureCanvasQTAgg(self.figure)
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

    def show_outcome(self, outcome, units: DisplayUnits) -> None:
        setup = outcome.setup
        temperatures = sorted({*(t + ZERO_CELSIUS for t in self.TEMPERATURES_C), setup.temperature})
        self.pairs = []
        for T in temperatures:
            try:
                self.pairs += temperature_tradeoff(setup, outcome.targets[1], [T])
            except InputError:
                continue  # below this steel's Ac3, or out of reach: left out of the comparison
        ax = self.axes
        ax.clear()
        if self.pairs:
            ax.plot([units.temperature(T) for T, _ in self.pairs], [t / 3600 for _, t in self.pairs], "o-", color=INK)
            ax.plot([units.temperature(setup.temperature)], [dict(self.pairs)[setup.temperature] / 3600], "o",
                    color=THRESHOLD, ms=9, label="this plan's temperature")
            ax.legend(fontsize=8)
        ax.set_xlabel(f"temperature [{units.temperature_unit}]")
        ax.set_ylabel("soak [h]")
        ax.grid(True, color="#dddddd", lw=0.6)
        ax.set_title(f"One soak at {setup.carbon_potential:.2f} %C to {units.format_length(outcome.targets[1])} "
                     f"at {setup.threshold}", fontsize=10)
        self.canvas.draw_idle()
        self.table.setRowCount(len(self.pairs))
        for r, (T, t) in enumerate(self.pairs):
            self.table.setItem(r, 0, QTableWidgetItem(units.format_temperature(T)))
            self.table.setItem(r, 1, QTableWidgetItem(f"{format_duration(t)}  ({t / 3600:.2f} h)"))
        self.note.setText("Hotter is faster but coarsens grain (above about 980 °C for most carburizing grades) and "
                          "distorts more; the furnace, fixtures and the steel's grain-size control set the limit.")


class ProfilePlots(QTabWidget):
    """Two pages: carbon against depth and estimated hardness against depth."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.carbon_page = _PlotPage("carbon [wt %]")
        self.hardness_page = _PlotPage("hardness [HV]")
        self.cycle_page = _CyclePage()
        self.addTab(self.carbon_page, "Carbon profile")
        self.addTab(self.hardness_page, "Hardness profile")
        self.addTab(self.cycle_page, "Cycle and quote")
        self.tradeoff_page = _TradeoffPage()
        self.addTab(self.tradeoff_page, "Temperatures")
        ax = self.carbon_page.axes
        self.c_end, = ax.plot([], [], color=EARLIER, lw=1.2, ls="--", label="at the end of the soak")
        self.c_line, = ax.plot([], [], color=INK, lw=2.2, label="carbon")
        self.c_threshold = ax.axhline(0, color=THRESHOLD, lw=1.2, ls="--")
        self.c_core = ax.axhline(0, color=CORE, lw=1.0, ls=":")
        self.c_saturation = ax.axhline(0, color=LIMIT, lw=1.0, ls="-.")
        ax = self.hardness_page.axes
        self.h_end, = ax.plot([], [], color=EARLIER, lw=1.2, ls="--", label="at the end of the soak")
        self.h_line, = ax.plot([], [], color=INK, lw=2.2)
        self.h_threshold = ax.axhline(0, color=THRESHOLD, lw=1.2, ls="--")
        right = ax.secondary_yaxis("right", functions=(_hv_to_hrc, _hrc_to_hv))
        right.set_ylabel("[HRC]")
        self.outcome = None
        self.units = DisplayUnits()
        self.time = None
        self._stale = {0: False, 1: False, 2: False, 3: False}
        self.currentChanged.connect(self._page_shown)

    def save_current(self, path: str, dpi: int = 200) -> None:
        page = (self.carbon_page, self.hardness_page, self.cycle_page, self.tradeoff_page)[self.currentIndex()]
        if isinstance(page, _PlotPage):
            page.save(path, dpi)
        else:
            page.figure.savefig(path, dpi=dpi)

    def show_outcome(self, outcome, units: DisplayUnits, time: float | None = None) -> None:
        self.outcome, self.units, self.time = outcome, units, time
        self.redraw()

    def set_time(self, time: float | None) -> None:
        self.time = time
        self.redraw()

    def redraw(self) -> None:
        """Draw the page on show now; the other when it is shown (drawing costs more than solving)."""
        if self.outcome is None:
            return
        nitriding = self.outcome.process == "nitriding"
        self.setTabText(0, "Nitrogen profile" if nitriding else "Carbon profile")
        self.setTabVisible(3, not nitriding)
        if nitriding and self.currentIndex() > 2:
            self.setCurrentIndex(0)
        self._stale = {0: True, 1: True, 2: True, 3: True}
        self._page_shown(self.currentIndex())

    def draw_all(self) -> None:
        """Draw every page now (before exporting or printing)."""
        for index in (0, 1, 2, 3):
            self._draw_page(index)
        for page in (self.carbon_page, self.hardness_page, self.cycle_page, self.tradeoff_page):
            page.canvas.draw()

    def _page_shown(self, index: int) -> None:
        if self.outcome is not None and self._stale.get(index):
            self._draw_page(index)

    def _draw_page(self, index: int) -> None:
        if index in (2, 3):  # drawn only when looked at: the comparison solves again
            (self.cycle_page if index == 2 else self.tradeoff_page).show_outcome(self.outcome, self.units)
            self._stale[index] = False
            return
        (self._draw_carbon if index == 0 else self._draw_hardness)()
        page = self.carbon_page if index == 0 else self.hardness_page
        page.legend()
        page.canvas.draw_idle()
        self._stale[index] = False

    # -- content ---------------------------------------------------------------------------------------
    def _reach(self, outcome) -> float:
        half = outcome.setup.geometry.half_section
        reach = max(outcome.targets[2] * 2.2, outcome.case_depth * 2.0)
        return min(reach, half) if np.isfinite(half) else reach

    def _profiles(self):
        final = self.outcome
        scrubbing = self.time is not None and self.time < final.duration
        return final, (final.profile_at(self.time) if scrubbing else final.profile), scrubbing

    def _caption(self, final, shown, scrubbing, extra: str = "") -> str:
        whole = "soak" if final.cycle is None else "cycle"
        when = (f"after {format_duration(shown.time)} of {format_duration(final.duration)}" if scrubbing
                else f"after the full {whole}, {format_duration(final.duration)}")
        return when + extra

    def _nitriding_profile(self):
        final = self.outcome
        scrubbing = self.time is not None and self.time < final.duration
        return final, (final.at(self.time) if scrubbing else final.aim), scrubbing

    def _draw_nitrogen(self):
        page, u = self.carbon_page, self.units
        final, shown, scrubbing = self._nitriding_profile()
        page.frame(final, u, max(final.targets[2] * 1.8, final.aim.nitrided_depth * 1.5))
        self.c_line.set_data(u.length(shown.depth), shown.nitrogen)
        self.c_line.set_label("nitrogen in the diffusion zone (dissolved and in nitrides)")
        self.c_end.set_data(u.length(final.aim.depth), final.aim.nitrogen)
        self.c_end.set_visible(scrubbing)
        self.c_threshold.set_visible(False)
        self.c_core.set_visible(False)
        self.c_saturation.set_ydata([final.setup.capacity] * 2)
        self.c_saturation.set_label(f"nitrogen the nitride formers bind, {final.setup.capacity:.2f} %")
        self._show_compound(page, shown.layer)
        page.axes.set_ylim(0, max(float(final.aim.nitrogen.max()), final.setup.capacity, 0.05) * 1.25)
        page.axes.set_ylabel("nitrogen [wt %]")
        page.caption.set_text(("after " + format_duration(shown.time) + " of " + format_duration(final.duration))
                              if scrubbing else f"after {format_duration(final.duration)} of nitriding")

    def _show_compound(self, page, layer) -> None:
        """Shade the compound layer (a :class:`~casedepth.compound_layer.CompoundLayer`, or None to hide it)."""
        band = getattr(page, "compound_band", None)
        if band is None:
            band = page.compound_band = page.axes.axvspan(0, 0, color="#c9c9c9", alpha=0.8, lw=0)
        thickness = 0.0 if layer is None else layer.thickness
        band.set_x(0.0)
        band.set_width(self.units.length(thickness))
        band.set_label("compound layer " + ("" if layer is None else layer.describe()))
        band.set_visible(thickness > 0)

    def _draw_nitrided_hardness(self):
        page, u = self.hardness_page, self.units
        final, shown, scrubbing = self._nitriding_profile()
        setup = final.setup
        page.frame(final, u, max(final.targets[2] * 1.8, final.aim.nitrided_depth * 1.5))
        self.h_line.set_data(u.length(shown.depth), shown.hardness)
        self.h_line.set_label("estimated (sharp nitriding front)")
        self.h_end.set_data(u.length(final.aim.depth), final.aim.hardness)
        self.h_end.set_visible(scrubbing)
        self.h_threshold.set_ydata([setup.core + 50.0] * 2)
        self.h_threshold.set_label(f"core + 50 HV = {setup.core + 50:.0f} HV")
        self._show_compound(page, shown.layer)
        page.axes.set_ylim(setup.core - 80, setup.surface + 80)
        page.caption.set_text("Hardness " + ("after " + format_duration(shown.time) if scrubbing
                                             else f"after {format_duration(final.duration)}")
                              + " (sharp-front model; measured profiles are smoother)")

    def _draw_carbon(self):
        if self.outcome.process == "nitriding":
            return self._draw_nitrogen()
        self.c_threshold.set_visible(True)
        self.c_core.set_visible(True)
        self.carbon_page.axes.set_ylabel("carbon [wt %]")
        self._show_compound(self.carbon_page, None)
        page, u = self.carbon_page, self.units
        final, shown, scrubbing = self._profiles()
        setup = final.setup
        page.frame(self.outcome, u, self._reach(final))
        self.c_line.set_data(u.length(shown.depth), shown.carbon)
        self.c_end.set_data(u.length(final.profile.depth), final.profile.carbon)
        self.c_end.set_visible(scrubbing)
        self.c_threshold.set_ydata([setup.threshold_carbon] * 2)
        self.c_threshold.set_label(f"threshold {setup.threshold_carbon:.2f} %C"
                                   + ("" if setup.threshold.kind == "carbon" else f" ({setup.threshold})"))
        self.c_core.set_ydata([setup.steel.carbon] * 2)
        self.c_core.set_label(f"core {setup.steel.carbon:.2f} %C")
        self.c_saturation.set_ydata([setup.saturation_carbon] * 2)
        self.c_saturation.set_label(f"saturation (Acm) {setup.saturation_carbon:.2f} %C")
        top = max(setup.saturation_carbon, setup.equilibrium_carbon, float(final.profile.carbon.max())) * 1.08
        page.axes.set_ylim(0, top)
        page.caption.set_text("Carbon " + self._caption(final, shown, scrubbing))

    def _draw_hardness(self):
        if self.outcome.process == "nitriding":
            return self._draw_nitrided_hardness()
        self._show_compound(self.hardness_page, None)
        page, u = self.hardness_page, self.units
        final, shown, scrubbing = self._profiles()
        setup = final.setup
        relation = HARDNESS_RELATIONS[setup.hardness_relation]
        page.frame(self.outcome, u, self._reach(final))
        hv = relation.hv(shown.carbon)
        end_hv = relation.hv(final.profile.carbon)
        self.h_line.set_data(u.length(shown.depth), hv)
        self.h_line.set_label(f"estimated: {relation.display}")
        self.h_end.set_data(u.length(final.profile.depth), end_hv)
        self.h_end.set_visible(scrubbing)
        threshold_hv = float(relation.hv(setup.threshold_carbon))
        self.h_threshold.set_ydata([threshold_hv] * 2)
        self.h_threshold.set_label(f"threshold ≈ {threshold_hv:.0f} HV ({ASTM_E140_hv_to_hrc(threshold_hv):.1f} HRC)")
        page.axes.set_ylim(min(float(end_hv.min()), threshold_hv) - 60, max(float(end_hv.max()), threshold_hv) + 60)
        page.caption.set_text("Hardness " + self._caption(final, shown, scrubbing, "; assumes a fully martensitic case"))
