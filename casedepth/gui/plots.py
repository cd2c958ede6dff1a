"""Carbon and hardness profiles, drawn with matplotlib inside the window."""

from __future__ import annotations

import numpy as np
from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg, NavigationToolbar2QT
from matplotlib.figure import Figure
from PySide6.QtWidgets import QTabWidget, QVBoxLayout, QWidget

from ..hardness import HARDNESS_RELATIONS, ASTM_E140_hrc_to_hv, ASTM_E140_hv_to_hrc
from ..units import DisplayUnits, format_duration

INK = "#1d3557"
EARLIER = "#8fa9c4"
THRESHOLD = "#d1495b"
WINDOW = "#7fb685"
CORE = "#6c757d"
LIMIT = "#b5651d"


class _PlotPage(QWidget):
    def __init__(self, parent=None):
        super().__init__(parent)
        self.figure = Figure(figsize=(6, 4), layout="constrained")
        self.canvas = FigureCanvasQTAgg(self.figure)
        self.toolbar = NavigationToolbar2QT(self.canvas, self)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.toolbar)
        layout.addWidget(self.canvas)
        self.axes = self.figure.add_subplot()


class ProfilePlots(QTabWidget):
    """Two pages: carbon against depth and estimated hardness against depth."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.carbon_page = _PlotPage()
        self.hardness_page = _PlotPage()
        self.addTab(self.carbon_page, "Carbon profile")
        self.addTab(self.hardness_page, "Hardness profile")
        self.outcome = None
        self.units = DisplayUnits()
        self.time = None

    def current_figure(self) -> Figure:
        return (self.carbon_page if self.currentIndex() == 0 else self.hardness_page).figure

    def show_outcome(self, outcome, units: DisplayUnits, time: float | None = None) -> None:
        self.outcome, self.units, self.time = outcome, units, time
        self.redraw()

    def set_time(self, time: float | None) -> None:
        self.time = time
        self.redraw()

    def redraw(self) -> None:
        if self.outcome is None:
            return
        self._draw_carbon()
        self._draw_hardness()
        self.carbon_page.canvas.draw_idle()
        self.hardness_page.canvas.draw_idle()

    def _depth_axis(self, result):
        half = result.setup.geometry.half_section
        low, high = self.outcome.low.target_depth, self.outcome.high.target_depth
        reach = max(high * 2.2, result.case_depth * 2.0)
        reach = min(reach, half) if np.isfinite(half) else reach
        return reach

    def _profiles(self):
        final = self.outcome.aim
        shown = final.profile if self.time is None or self.time >= final.soak_time else final.profile_at(self.time)
        return final, shown

    def _decorate(self, ax, final, reach):
        u = self.units
        low, aim, high = (u.length(r.target_depth) for r in (self.outcome.low, self.outcome.aim, self.outcome.high))
        ax.axvspan(low, high, color=WINDOW, alpha=0.22, lw=0, label="drawing window")
        ax.axvline(aim, color=WINDOW, lw=1.2, ls="-", label=f"aim {aim:.{u.length_decimals}f} {u.length_unit}")
        ax.set_xlim(0, u.length(reach))
        ax.set_xlabel(f"depth below the surface [{u.length_unit}]")
        ax.grid(True, color="#dddddd", lw=0.6)

    def _title(self, final, shown) -> str:
        if shown is final.profile:
            return f"after the full soak, {format_duration(final.soak_time)}"
        return f"after {format_duration(shown.time)} of {format_duration(final.soak_time)}"

    def _draw_carbon(self):
        ax = self.carbon_page.axes
        ax.clear()
        final, shown = self._profiles()
        setup = final.setup
        reach = self._depth_axis(final)
        u = self.units
        x = u.length(shown.depth)
        self._decorate(ax, final, reach)
        if shown is not final.profile:
            ax.plot(u.length(final.profile.depth), final.profile.carbon, color=EARLIER, lw=1.2, ls="--",
                    label="at the end of the soak")
        ax.plot(x, shown.carbon, color=INK, lw=2.2, label="carbon")
        ax.axhline(setup.threshold_carbon, color=THRESHOLD, lw=1.2, ls="--",
                   label=f"threshold {setup.threshold_carbon:.2f} %C" + ("" if setup.threshold.kind == "carbon"
                                                                          else f" ({setup.threshold})"))
        ax.axhline(setup.steel.carbon, color=CORE, lw=1.0, ls=":", label=f"core {setup.steel.carbon:.2f} %C")
        ax.axhline(setup.saturation_carbon, color=LIMIT, lw=1.0, ls="-.",
                   label=f"saturation (Acm) {setup.saturation_carbon:.2f} %C")
        top = max(setup.saturation_carbon, setup.equilibrium_carbon, float(shown.carbon.max())) * 1.08
        ax.set_ylim(0, top)
        ax.set_ylabel("carbon [wt %]")
        ax.set_title(f"Carbon {self._title(final, shown)}", fontsize=10)
        ax.legend(fontsize=8, loc="upper right", framealpha=0.9)

    def _draw_hardness(self):
        ax = self.hardness_page.axes
        ax.clear()
        final, shown = self._profiles()
        setup = final.setup
        relation = HARDNESS_RELATIONS[setup.hardness_relation]
        reach = self._depth_axis(final)
        u = self.units
        self._decorate(ax, final, reach)
        hv = relation.hv(shown.carbon)
        ax.plot(u.length(shown.depth), hv, color=INK, lw=2.2, label=f"estimated: {relation.display}")
        threshold_hv = float(relation.hv(setup.threshold_carbon))
        ax.axhline(threshold_hv, color=THRESHOLD, lw=1.2, ls="--",
                   label=f"threshold ≈ {threshold_hv:.0f} HV ({ASTM_E140_hv_to_hrc(threshold_hv):.1f} HRC)")
        ax.set_ylabel("hardness [HV]")
        ax.set_ylim(min(float(hv.min()), threshold_hv) - 60, max(float(hv.max()), threshold_hv) + 60)
        right = ax.secondary_yaxis("right", functions=(_hv_to_hrc, _hrc_to_hv))
        right.set_ylabel("[HRC]")
        ax.set_title(f"Hardness {self._title(final, shown)} — assumes a fully martensitic case", fontsize=10)
        ax.legend(fontsize=8, loc="upper right", framealpha=0.9)


def _hv_to_hrc(hv):
    return ASTM_E140_hv_to_hrc(np.clip(hv, 238.0, 940.0))


def _hrc_to_hv(hrc):
    return ASTM_E140_hrc_to_hv(np.clip(hrc, 20.0, 68.0))
