"""The plots of the window, drawn with matplotlib from what the outcome says to show.

The profile pages draw the :class:`~casedepth.outcome.Panel` of the outcome's
:meth:`~casedepth.outcome.Outcome.view` (carbon or nitrogen, and hardness); the cycle page its
:meth:`~casedepth.outcome.Outcome.timeline` and quote; the temperatures page the plan evaluated at
other temperatures (:func:`casedepth.plan.compare_temperatures`) and the load spread page the depths of a load's
parts (:func:`casedepth.shop.capability.capability`), both worked out on the window's worker. No page asks which
treatment it shows.

A planner expects the plot to follow an edit at once, and drawing costs more than solving, so:

* a page makes its figure when it is first drawn, and the page on show once the window is on screen
  (matplotlib takes longer to import than the rest of the window);
* only the page on show is drawn; the others are drawn when they are shown;
* artists are made once and only their data, texts and ranges change on a new result;
* on the profile pages only the curves are drawn again over the rest as last drawn (blitting, the canvas of
  :func:`_matplotlib`) while the frame holds still: its ranges are rounded out to round numbers, so an edit
  that moves the curves a little leaves the axes, ticks and labels as they are; the key and the caption, which
  change with nearly every result, are Qt labels (a text drawn by matplotlib costs more than the curves);
* a whole figure is drawn when Qt is next idle (``draw_idle``), so a burst of changes draws once.
"""

from __future__ import annotations

import functools
import html
import math
import warnings
from types import SimpleNamespace

import numpy as np
from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtWidgets import (QHeaderView, QLabel, QScrollArea, QSplitter, QTableWidget, QTableWidgetItem, QTabWidget,
                               QVBoxLayout, QWidget)

from .. import formats
from ..errors import CasedepthError, InputError
from ..outcome import Outcome, Panel, ProfileView
from ..shop.capability import SPREAD_INPUTS, Capability, Spread, capability
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
GRID = {"color": "#dddddd", "lw": 0.6}


@functools.cache
def _matplotlib() -> SimpleNamespace:
    """Matplotlib's figure, the canvas of the pages (:class:`Canvas`) and the toolbar, imported when the first
    figure is made."""
    from matplotlib.backends import backend_qtagg
    from matplotlib.figure import Figure

    class Canvas(backend_qtagg.FigureCanvasQTAgg):
        """A page's canvas: says when it has been painted (:attr:`painted`), and redraws only its moving artists
        while nothing else changes.

        ``moving`` are the artists a new result or another moment of the cycle changes (curves, levels, bands).
        A whole draw renders the rest, keeps it as the background and draws the moving artists
        over it; :meth:`refresh` puts the background back and draws only them, as long as the frame (the
        canvas's size, each axes' place, ranges and labels) is as it was drawn, else draws the whole figure
        when Qt is next idle. Saved pictures always draw everything.
        """

        painted = Signal()

        def __init__(self, figure):
            super().__init__(figure)
            self.moving: list = []
            self._background = None
            self._frame = None

        def frame(self) -> tuple:
            """What the background depends on besides the moving artists."""
            return (self.get_width_height(physical=True),
                    tuple((ax.get_position().bounds, ax.get_xlim(), ax.get_ylim(), ax.get_xlabel(), ax.get_ylabel(),
                           ax.axison) for ax in self.figure.axes))

        def draw(self) -> None:
            for artist in self.moving:
                artist.set_animated(True)  # left out of the whole draw
            try:
                super().draw()
            finally:
                for artist in self.moving:
                    artist.set_animated(False)
            self._background = self.copy_from_bbox(self.figure.bbox)
            self._frame = self.frame()
            self._draw_moving()

        def refresh(self) -> None:
            """Show the moving artists as they are now: over the background when the frame is as drawn, else
            with the whole figure drawn anew."""
            if self._background is None or self.frame() != self._frame:
                self.draw_idle()
                self.update()  # (a saved picture leaves a whole draw pending that only a paint does)
                return
            self.restore_region(self._background)
            self._draw_moving()
            self.update()

        def _draw_moving(self) -> None:
            for artist in self.moving:
                self.figure.draw_artist(artist)

        def paintEvent(self, event) -> None:
            super().paintEvent(event)
            if hasattr(self, "renderer"):
                self.painted.emit()

    return SimpleNamespace(Figure=Figure, Canvas=Canvas, Toolbar=backend_qtagg.NavigationToolbar2QT)


def round_out(axis, low: float, high: float) -> tuple[float, float]:
    """The range ``low``–``high`` widened to the ticks ``axis`` draws round it: a small change of the curves then
    leaves the axes as they are."""
    if not (math.isfinite(low) and math.isfinite(high)) or high <= low:
        return low, high
    ticks = axis.get_major_locator().tick_values(low, high)
    return float(ticks[0]), float(ticks[-1])


def _swatch(handle) -> str:
    """A short coloured sample of a line or a band, as HTML."""
    from matplotlib.colors import to_hex

    line = hasattr(handle, "get_xdata")
    outline = not line and not handle.get_fill()  # an unfilled band or histogram: its edge's colour, as an outline
    colour = to_hex(handle.get_color() if line else handle.get_edgecolor() if outline else handle.get_facecolor(),
                    keep_alpha=False)
    if not line:
        return f"<span style='color:{colour}'>{'□' if outline else '■'}</span>"
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


def save_with_legend(figure, axes, handles, path: str, dpi: int = 200, caption: str = "") -> None:
    """Save the figure with its key drawn in as a legend and its caption as the title (an exported picture stands
    alone); the margins are fitted to the title while it is saved."""
    legend = axes.legend(handles=handles, fontsize=8, loc="best", framealpha=0.9) if handles else None
    if caption:
        axes.set_title(caption, loc="left", fontsize=9)
        fit_margins(figure)
    try:
        figure.savefig(path, dpi=dpi)
    finally:
        if legend is not None:
            legend.remove()
        if caption:
            axes.set_title("", loc="left")
            fit_margins(figure)


class _Page(QWidget):
    """A page of the plots. Its Qt widgets are made with it, its figure when it is first drawn (:meth:`build`)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.figure = self.canvas = self.axes = None
        self._fitted = None  # what the margins were last fitted to

    def build(self) -> None:
        """Make the figure, if it is not made yet."""
        if self.canvas is None:
            self._build(_matplotlib())

    def _build(self, mpl: SimpleNamespace) -> None:
        raise NotImplementedError

    def fit(self, *texts_and_ranges) -> None:
        """Fit the margins again (:func:`fit_margins`) if what they depend on changed since they were last fitted:
        the texts round the axes and their ranges."""
        if texts_and_ranges != self._fitted:
            fit_margins(self.figure)
            self._fitted = texts_and_ranges


class _PlotPage(_Page):
    """One profile plot with its toolbar, the drawing window band, the aim line, lines, a caption over it and the
    key under it."""

    def __init__(self, hrc_axis: bool, parent=None):
        super().__init__(parent)
        self.hrc_axis = hrc_axis
        self.levels: list = []
        self.caption = QLabel()
        self.caption.setObjectName("plot_caption")
        self.caption.setWordWrap(True)
        self.key = _Key()
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.caption)
        layout.addWidget(self.key)

    def _build(self, mpl: SimpleNamespace) -> None:
        self.figure = mpl.Figure(figsize=(6, 4))
        self.canvas = mpl.Canvas(self.figure)
        self.toolbar = mpl.Toolbar(self.canvas, self)
        self.layout().insertWidget(0, self.toolbar)
        self.layout().insertWidget(2, self.canvas, 1)  # under the caption
        ax = self.axes = self.figure.add_subplot()
        ax.grid(True, **GRID)
        self.band = ax.axvspan(0, 0, color=WINDOW, alpha=0.22, lw=0, label="drawing window")
        self.aim = ax.axvline(0, color=WINDOW, lw=1.2, label="aim")
        self.layer = ax.axvspan(0, 0, color=LAYER, alpha=0.8, lw=0)
        self.final, = ax.plot([], [], color=EARLIER, lw=1.2, ls="--")
        self.line, = ax.plot([], [], color=INK, lw=2.2)
        self.spread = None  # the load's 5–95 % band around the profile, while the Load spread page has it
        self.canvas.moving = [self.layer, self.band, self.aim, self.final, self.line]
        if self.hrc_axis:
            from ..report.plot_marks import hrc_scale

            ax.set_ylim(250.0, 900.0)  # HV the HRC scale spans, until a result sets the range (fitting measures it)
            hrc_scale(ax)
        keep_fitted(self.canvas, self.figure)

    def draw_panel(self, panel: Panel, view: ProfileView, units: DisplayUnits, spread=None) -> None:
        """Draw ``panel``; with ``spread`` (depths [m], low and high values: the load's 5th and 95th percentiles at
        the end, :attr:`casedepth.shop.capability.Capability.profile_band`) the band around the profile too."""
        ax = self.axes
        if self.spread is not None:
            self.spread.remove()
            self.canvas.moving.remove(self.spread)
            self.spread = None
        if spread is not None:
            depth, low_values, high_values = spread
            self.spread = ax.fill_between(units.length(depth), low_values, high_values, color=INK, alpha=0.18, lw=0,
                                          label="the load's parts, 5–95 % (Load spread)", zorder=1.5)
            self.canvas.moving.insert(0, self.spread)
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
            self.canvas.moving.append(self.levels[-1])
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
        ax.set_ylim(*round_out(ax.yaxis, *panel.limits))
        self.caption.setText(panel.caption)
        self.legend()
        self.fit(ax.get_xlabel(), ax.get_ylabel(), ax.get_xlim(), ax.get_ylim())  # not the time scrubbed
        self.canvas.refresh()

    def _handles(self):
        patches = ([self.band] + ([self.layer] if self.layer.get_visible() else [])
                   + ([self.spread] if self.spread is not None else []))
        return [h for h in self.axes.get_lines() + patches if h.get_visible() and not h.get_label().startswith("_")]

    def legend(self) -> None:
        """Show the key under the plot."""
        self.key.show_handles(self._handles())

    def save(self, path: str, dpi: int = 200) -> None:
        """Save the figure with the key drawn into it as a legend and the caption as its title (an exported picture
        stands alone)."""
        save_with_legend(self.figure, self.axes, self._handles(), path, dpi, self.caption.text())


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


class _CyclePage(_Page):
    """Temperature and potential through the whole cycle, with its stages and moments (purges, the atmosphere going
    in), and the quote beside it."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.plot = QWidget()
        plot_layout = QVBoxLayout(self.plot)
        plot_layout.setContentsMargins(0, 0, 0, 0)
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
        self.split = _Beside(self.plot, quote, self.table)
        page_layout = QVBoxLayout(self)
        page_layout.setContentsMargins(0, 0, 0, 0)
        page_layout.addWidget(self.split)

    def _build(self, mpl: SimpleNamespace) -> None:
        self.figure = mpl.Figure(figsize=(6, 3))
        self.canvas = mpl.Canvas(self.figure)
        self.plot.layout().addWidget(mpl.Toolbar(self.canvas, self.plot))
        self.plot.layout().addWidget(self.canvas, 1)
        ax = self.axes = self.figure.add_subplot()
        pax = self.potential_axes = ax.twinx()
        self.temperature, = ax.plot([], [], color=INK, lw=2.0, label="temperature")
        self.potential, = pax.plot([], [], color=THRESHOLD, lw=1.6, ls="--")
        self.limit = pax.axhline(0.0, color=LIMIT, lw=1.2, ls=":", visible=False)
        ax.set_xlabel("time in the cycle [h]")
        ax.grid(True, **GRID)
        pax.yaxis.set_label_position("right")
        pax.yaxis.tick_right()
        self.title = ax.set_title("", fontsize=10)
        keep_fitted(self.canvas, self.figure, then=self._place_texts)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> None:
        from ..report.plot_marks import draw_cycle_words

        line = outcome.timeline()
        ax, pax = self.axes, self.potential_axes
        hours = line.times / 3600.0
        shown = np.array([units.temperature(t) for t in line.temperatures])
        self.temperature.set_data(hours, shown)
        self.potential.set_data(hours, line.potentials)
        self.potential.set_label(line.potential_name)
        self.limit.set_visible(line.limit is not None)
        self.limit.set_label("_" if line.limit is None else line.limit[1])
        if line.limit is not None:
            self.limit.set_ydata([line.limit[0], line.limit[0]])
        # the stages' shading and names and the moments' lines and words are the cycle's own: made anew
        for artist in [*ax.patches, *ax.texts, *(curve for curve in ax.get_lines() if curve is not self.temperature)]:
            artist.remove()
        self.stage_texts, self.marker_texts = draw_cycle_words(ax, line, MARKER)
        ax.set_ylabel(f"temperature [{units.temperature_unit}]")
        pax.set_ylabel(line.potential_name, color=THRESHOLD)
        # headroom over both curves: the top of the plot is where the moments are named
        ax.set_ylim(min(0.0, float(np.nanmin(shown))), float(np.nanmax(shown)) * 1.25)
        finite = np.isfinite(line.potentials)
        pax.set_ylim(0, max(line.potential_floor, float(np.nanmax(line.potentials)) * 1.3) if finite.any()
                     else line.potential_floor)
        ax.set_xlim(0, max(hours[-1], 0.1))
        self.title.set_text(f"Temperature (solid) and {line.potential_name.split(' [')[0]} (dashed)"
                            + ("\nits limit dotted" if line.limit is not None else ""))
        self.fit(ax.get_ylabel(), pax.get_ylabel(), ax.get_xlim(), ax.get_ylim(), pax.get_ylim())
        self._place_texts()
        self.canvas.draw_idle()
        quote = outcome.quote
        self.table.setRowCount(len(quote.lines))
        for r, (label, h) in enumerate(quote.lines):
            for c, text in enumerate((label, formats.hours(h * 3600),
                                      formats.percent(100 * h / quote.total_h) if quote.total_h else "")):
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
        the plot as large as it is now (:func:`~casedepth.report.plot_marks.place_cycle_words`)."""
        from ..report.plot_marks import place_cycle_words

        place_cycle_words(self.axes, self.stage_texts, self.marker_texts,
                          [*self.axes.get_lines(), *self.potential_axes.get_lines()])


class _KeyedPlot(QWidget):
    """A figure with its key under it (in Qt, see :class:`_Key`), and a message written across it when there is
    nothing to plot; the figure is made by :meth:`build`."""

    def __init__(self, parent=None):
        super().__init__(parent)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.key = _Key()
        layout.addWidget(self.key)
        self.figure = self.canvas = self.axes = self.message = None

    def build(self, mpl: SimpleNamespace) -> None:
        self.figure = mpl.Figure(figsize=(6, 3))
        self.canvas = mpl.Canvas(self.figure)
        self.layout().insertWidget(0, self.canvas, 1)
        self.axes = self.figure.add_subplot()
        self.axes.grid(True, **GRID)
        self.message = self.axes.text(0.5, 0.5, "", transform=self.axes.transAxes, ha="center", va="center",
                                      wrap=True, fontsize=10, color="#555", visible=False)
        keep_fitted(self.canvas, self.figure)

    def say(self, message: str | None) -> None:
        """Write ``message`` across the figure instead of the axes, or (None) show the axes."""
        self.message.set_visible(message is not None)
        self.message.set_text(message or "")
        if message is None:
            self.axes.set_axis_on()
        else:
            self.axes.set_axis_off()

    def handles(self):
        return [h for h in self.axes.get_lines() + self.axes.patches
                if h.get_visible() and not h.get_label().startswith("_")]

    def finish(self, fit) -> None:
        """After new data: the key, the margins (``fit``: the page's :meth:`_Page.fit`), the canvas."""
        ax = self.axes
        self.key.show_handles(self.handles())
        self.key.setVisible(bool(self.key.shown))
        fit(ax.get_xlabel(), ax.get_ylabel(), ax.get_xlim(), ax.get_ylim(), ax.axison, bool(ax.get_title()))
        self.canvas.draw_idle()

    def save(self, path: str, dpi: int = 200) -> None:
        save_with_legend(self.figure, self.axes, self.handles(), path, dpi)


def _why(error: Exception) -> str:
    """What a refusal or an unforeseen failure says, for the page that shows it instead of its plot."""
    return error.message if isinstance(error, InputError) else f"{type(error).__name__}: {error}"


class _TradeoffPage(_Page):
    """The plan's soak at other temperatures (the plan otherwise unchanged, its own policy on the shop's stages):
    furnace time against grain growth and distortion; the plot, the table beside it and a note under both.

    The comparison is worked out on the window's worker: :meth:`show_outcome` draws it when it has the answer
    for the outcome (:meth:`take`), else says it is being worked out and returns False."""

    def __init__(self, parent=None):
        super().__init__(parent)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.plot = _KeyedPlot()
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
        self.waiting = False  # for the worker's answer
        self._answer: tuple[dict, list, Exception | None] | None = None  # (values, pairs, error) from the worker

    def _build(self, mpl: SimpleNamespace) -> None:
        self.plot.build(mpl)
        self.figure, self.canvas, self.axes = self.plot.figure, self.plot.canvas, self.plot.axes
        ax = self.axes
        self.soaks, = ax.plot([], [], "o-", color=INK, label="soak for the aim depth")
        self.own, = ax.plot([], [], "o", color=THRESHOLD, ms=9, label="this plan's temperature")
        ax.set_ylabel("soak [h]")
        self.title = ax.set_title("", fontsize=10)

    @staticmethod
    def temperatures(outcome: Outcome) -> list[float]:
        """The temperatures [K] the plan of ``outcome`` is compared at: its treatment's and its own."""
        return sorted({*TREATMENTS[outcome.treatment].comparison_temperatures, outcome.values["temperature"]})

    def has(self, outcome: Outcome) -> bool:
        """Whether the page has the comparison for ``outcome``'s plan."""
        return self._answer is not None and self._answer[0] is outcome.values

    def take(self, values: dict, pairs: list | None, error: Exception | None) -> None:
        """The comparison of the plan ``values`` at other temperatures, or (``error``) why there is none."""
        self._answer = (values, pairs if error is None else [], error)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> bool:
        """Draw the comparison for ``outcome``; False (the last one left on show, greyed) while it is not known."""
        self.waiting = not self.has(outcome)
        self.table.setEnabled(not self.waiting)
        if self.waiting:
            self.note.setText("<i>Working out this plan at other temperatures…</i>")
            return False
        _, self.pairs, error = self._answer
        if error is None:
            note = ("This plan as it is (every other value, and how it counts its stages) at other temperatures. "
                    + TREATMENTS[outcome.treatment].comparison_note)
            shown = {T for T, _ in self.pairs}
            left = [T for T in self.temperatures(outcome) if T not in shown]
            if left:  # below the steel's Ac3, outside the treatment's range, or no plan lands there
                note += (" Left out: " + ", ".join(formats.temperature(T, units) for T in left)
                         + " (the plan cannot run there as it is).")
        else:
            note = _why(error)
        values, ax = outcome.values, self.axes
        self.plot.say(None if self.pairs else note)
        self.soaks.set_visible(bool(self.pairs))
        self.soaks.set_data([units.temperature(T) for T, _ in self.pairs], [t / 3600 for _, t in self.pairs])
        own = dict(self.pairs).get(values["temperature"])
        self.own.set_visible(own is not None)
        if own is None:
            self.own.set_data([], [])
        else:
            self.own.set_data([units.temperature(values["temperature"])], [own / 3600])
        ax.relim()
        ax.autoscale_view()
        ax.set_xlabel(f"temperature [{units.temperature_unit}]")
        aim = formats.length(outcome.targets[1], units)
        self.title.set_text(f"This plan at other temperatures: the soak for {aim}")
        self.plot.finish(self.fit)
        self.table.setRowCount(len(self.pairs))
        for r, (T, t) in enumerate(self.pairs):
            self.table.setItem(r, 0, QTableWidgetItem(formats.temperature(T, units)))
            self.table.setItem(r, 1, QTableWidgetItem(f"{format_duration(t)}  ({formats.hours(t)})"))
        self.split.fit_table()
        self.note.setText(note)
        return True

    def save(self, path: str, dpi: int = 200) -> None:
        self.plot.save(path, dpi)


class _SpreadPage(_Page):
    """Where the case depths of a load's parts fall (:func:`casedepth.shop.capability.capability`): a histogram of
    the parts' depths over the drawing's window beside the figures in the library's words, and what the spread
    rests on under both. A plan with no single soak gets the refusal instead of the plot.

    The load is worked out on the window's worker, as the temperatures page's comparison: :meth:`show_outcome`
    draws it when it has the answer for the outcome (:meth:`take`), else says it is being worked out and returns
    False."""

    #: the plan's own Load spread settings (the form's group of that name), as on the command line
    SPREAD = Spread()

    def __init__(self, parent=None):
        super().__init__(parent)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.plot = _KeyedPlot()
        self.figures = QLabel()
        self.figures.setObjectName("spread_figures")
        self.figures.setWordWrap(True)
        self.figures.setAlignment(Qt.AlignTop | Qt.AlignLeft)
        self.figures.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.figures.setContentsMargins(6, 4, 6, 4)
        self.side = QScrollArea()  # a long warning scrolls rather than being cut off
        self.side.setWidget(self.figures)
        self.side.setWidgetResizable(True)
        self.side.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self.side.setFrameShape(QScrollArea.NoFrame)
        self.split = QSplitter(Qt.Horizontal)
        self.split.addWidget(self.plot)
        self.split.addWidget(self.side)
        self.split.setSizes([550, 450])  # kept in proportion as the page is resized
        layout.addWidget(self.split, 1)
        self.note = QLabel()
        self.note.setObjectName("spread_note")
        self.note.setWordWrap(True)
        layout.addWidget(self.note)
        self.capability: Capability | None = None
        self.waiting = False  # for the worker's answer
        self._answer: tuple[dict, Capability | None, Exception | None] | None = None  # (values, answer, error)

    def _build(self, mpl: SimpleNamespace) -> None:
        from matplotlib.ticker import MaxNLocator

        self.plot.build(mpl)
        self.figure, self.canvas, self.axes = self.plot.figure, self.plot.canvas, self.plot.axes
        ax = self.axes
        ax.set_axisbelow(True)  # the grid behind the bars
        self.band = ax.axvspan(0, 0, color=WINDOW, alpha=0.22, lw=0)
        self.parts = ax.stairs([0], [0, 1], fill=True, color=INK, alpha=0.75, label="parts of the load")
        self.centred = ax.stairs([0], [0, 1], fill=False, edgecolor=LIMIT, facecolor="none", lw=1.6)  # at the centred time
        self.aim = ax.axvline(0, color=THRESHOLD, lw=1.4, ls="--")
        ax.yaxis.set_major_locator(MaxNLocator(integer=True))
        self.title = ax.set_title("", fontsize=10)

    def has(self, outcome: Outcome) -> bool:
        """Whether the page has the load's spread for ``outcome``'s plan."""
        return self._answer is not None and self._answer[0] is outcome.values

    def take(self, values: dict, answer: Capability | None, error: Exception | None) -> None:
        """The spread of a load of the plan ``values``, or (``error``) why there is none."""
        self._answer = (values, answer if error is None else None, error)

    def work_out(self, outcome: Outcome) -> None:
        """Work the spread out here and now (before exporting or printing, when the worker has not)."""
        try:
            self.take(outcome.values, capability(outcome.values, self.SPREAD, optimize=None, outcome=outcome), None)
        except CasedepthError as error:
            self.take(outcome.values, None, error)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> bool:
        """Draw the load's spread for ``outcome``; False (the last one left on show, greyed) while it is not
        known."""
        self.waiting = not self.has(outcome)
        self.figures.setEnabled(not self.waiting)
        bands = _bands_note(self.SPREAD.resolved(outcome.values))
        if self.waiting:
            self.note.setText(f"<i>Working out how the case depths of a load's parts spread…</i> {bands}")
            self.note.show()
            return False
        self.note.setText(bands)
        _, self.capability, error = self._answer
        found = self.capability
        self.plot.say(None if found is not None else _why(error))
        for artist in (self.parts, self.band, self.aim, self.centred):
            artist.set_visible(found is not None)
        self.side.setVisible(found is not None)  # a refusal is written across the whole page
        self.note.setVisible(found is not None and bool(bands))
        if found is None:  # no labels either: the axes are off, and the message has the whole canvas
            self.title.set_text("")
            self.axes.set_xlabel("")
            self.axes.set_ylabel("")
            self.figures.setText("")
            self.plot.finish(self.fit)
            return True
        ax = self.axes
        depths = units.length(found.depths)
        low, high = (units.length(end) for end in found.window)
        counts, edges = np.histogram(depths, bins="sturges")
        self.parts.set_data(counts, edges)
        top, left, right = float(counts.max()), float(edges[0]), float(edges[-1])  # what the axes must hold
        centred = found.centred
        shown = centred is not None and abs(centred.soak - found.soak) > 0.5 * 60.0  # a minute apart or more
        self.centred.set_visible(shown)
        self.centred.set_label("_")
        if shown:  # the same bins, stretched to hold the parts there too
            step = edges[1] - edges[0]
            there = units.length(centred.depths)
            low_edge = edges[0] - step * math.ceil(max(edges[0] - there.min(), 0.0) / step)
            high_edge = edges[-1] + step * math.ceil(max(there.max() - edges[-1], 0.0) / step)
            grid = np.arange(low_edge, high_edge + 0.5 * step, step)
            moved, _ = np.histogram(there, bins=grid)
            self.centred.set_data(moved, grid)
            self.centred.set_label(f"at the centred {found.held_words(centred.soak, short=True)}: "
                                   f"{formats.percent(100 * centred.share)} inside")
            top, left, right = max(top, float(moved.max())), min(left, float(grid[0])), max(right, float(grid[-1]))
        self.band.set_x(low)
        self.band.set_width(high - low)
        self.band.set_label(f"drawing window {formats.length_range(*found.window, units)}")
        nominal = units.length(found.nominal)
        self.aim.set_xdata([nominal, nominal])
        self.aim.set_label(f"the plan's aim {formats.length(found.nominal, units)}")
        reach = max(high, right) - min(low, left)
        ax.set_xlim(*round_out(ax.xaxis, min(low, left) - 0.05 * reach, max(high, right) + 0.05 * reach))
        ax.set_ylim(*round_out(ax.yaxis, 0.0, top * 1.1))
        ax.set_xlabel(f"{TREATMENTS[outcome.treatment].depth_name} [{units.length_unit}]")
        ax.set_ylabel("parts")
        after = (f"the soak of {format_duration(found.soak)}" if [name for name, _ in found.held] == ["soak"] else
                 found.held_words(found.soak, short=True))
        self.title.set_text(f"The load's parts after {after}")
        self.plot.finish(self.fit)
        self.figures.setText(_figures_html(found.text(units)))
        return True

    def save(self, path: str, dpi: int = 200) -> None:
        self.plot.save(path, dpi)


def _bands_note(bands: dict[str, float]) -> str:
    """Where the bands of a load's spread come from (``bands``: :meth:`Spread.resolved`, by input)."""
    shop = [SPREAD_INPUTS[key].label for key in bands if key != "size" and not SPREAD_INPUTS[key].factor]
    if not shop:
        return ""
    note = f"Each part has its {' and '.join(shop)} anywhere in the shop's tolerances (Edit → Shop times and rates)"
    for key in bands:
        if SPREAD_INPUTS[key].factor:
            note += f", its {SPREAD_INPUTS[key].label} {SPREAD_INPUTS[key].describe(bands[key], None)}"
    if "size" in bands:
        note += ", its section within the plan's tolerance"
    return note + "; how they are drawn is the plan's (Load spread in the form)."


def _figures_html(text: str) -> str:
    """The library's text of a load's spread (:meth:`Capability.text`) as a table of its lines: the first line
    over it, each figure's name beside what it says (a list's items, "p5 0.90 mm", each kept on one line), the
    warnings under it in red."""
    lines = text.splitlines()
    rows, warned = [], []
    for line in lines[1:]:
        if line.startswith("Warning: "):
            warned.append(f"<p style='color:{THRESHOLD}'><b>{html.escape(line)}</b></p>")
            continue
        name, _, said = line.strip().partition("  ")
        items = html.escape(said.strip()).split(" · ")
        shown = " · ".join(_unbroken(item) for item in items) if len(items) > 1 else items[0]
        rows.append(f"<tr><td style='padding-right:8px'><b>{html.escape(name)}</b></td><td>{shown}</td></tr>")
    return f"<p>{html.escape(lines[0])}</p><table>{''.join(rows)}</table>{''.join(warned)}"


def _unbroken(item: str) -> str:
    """A list item ("p5 0.90 mm") kept on one line; a note after it in brackets may still wrap."""
    figure, bracket, note = item.partition(" (")
    return figure.replace(" ", "&nbsp;") + bracket + note


class _HardenabilityPage(_Page):
    """The steel's hardenability: its Jominy curve (and the case's, at the surface carbon), the ideal critical
    diameter, and what the estimate rests on."""

    def __init__(self, parent=None):
        super().__init__(parent)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        self.plot = _KeyedPlot()
        layout.addWidget(self.plot, 1)
        self.note = QLabel()
        self.note.setObjectName("hardenability_note")
        self.note.setWordWrap(True)
        layout.addWidget(self.note)

    def _build(self, mpl: SimpleNamespace) -> None:
        self.plot.build(mpl)
        self.figure, self.canvas, self.axes = self.plot.figure, self.plot.canvas, self.plot.axes
        ax = self.axes
        self.core, = ax.plot([], [], color=INK, lw=2)
        self.case, = ax.plot([], [], color=THRESHOLD, lw=2, ls="--")
        ax.set_xlabel("distance from the quenched end [1/16 in]")
        ax.set_ylabel("hardness [HRC]")
        ax.set_xlim(0, 32)
        self.title = ax.set_title("", fontsize=10)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> None:
        facts = outcome.hardenability()
        steel = outcome.setup.steel
        error = facts.get("error")
        self.plot.say(error)
        self.core.set_visible(error is None)
        self.case.set_visible(error is None and facts["case_curve_hrc"] is not None)
        if error is not None:
            self.title.set_text("")
            self.note.setText("")
            self.plot.finish(self.fit)
            return
        distance = facts["curve_distances"] / 0.0254 * 16.0  # sixteenths of an inch, as Jominy curves are read
        self.core.set_data(distance, facts["curve_hrc"])
        self.core.set_label(f"core, {formats.carbon(steel.carbon)}")
        if facts["case_curve_hrc"] is not None:
            self.case.set_data(distance, facts["case_curve_hrc"])
            self.case.set_label(f"case at the surface carbon, {formats.carbon(facts['case_carbon'])}")
        else:
            self.case.set_data([], [])
        self.axes.relim()
        self.axes.autoscale_view(scalex=False)
        ideal = facts["ideal_diameter"]
        self.title.set_text(f"Jominy end-quench curve of {steel.name}, estimated (D_I {formats.ideal_diameter(ideal)})")
        self.plot.finish(self.fit)
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
    """Six pages: the main profile (carbon or nitrogen), hardness, the cycle and quote, other temperatures, the
    spread of a load, and the steel's hardenability.

    Only the page on show is drawn; another is drawn when it is shown. The Temperatures page asks for its
    comparison with :attr:`comparison_wanted` and the Load spread page for its load with
    :attr:`capability_wanted` (the window hands both to its worker); they draw the answers given to
    :meth:`show_comparison` and :meth:`show_capability`."""

    comparison_wanted = Signal(object, object)  # the plan's values, the temperatures [K] to compare it at
    capability_wanted = Signal(object, object)  # the plan's values, the Spread to draw its load's parts from

    def __init__(self, parent=None):
        super().__init__(parent)
        self.carbon_page = _PlotPage(hrc_axis=False)
        self.hardness_page = _PlotPage(hrc_axis=True)
        self.cycle_page = _CyclePage()
        self.tradeoff_page = _TradeoffPage()
        self.spread_page = _SpreadPage()
        self.hardenability_page = _HardenabilityPage()
        self.pages = (self.carbon_page, self.hardness_page, self.cycle_page, self.tradeoff_page, self.spread_page,
                      self.hardenability_page)
        for page, name in zip(self.pages, ("Carbon profile", "Hardness profile", "Cycle and quote", "Temperatures",
                                           "Load spread", "Hardenability")):
            self.addTab(page, name)
        self.outcome: Outcome | None = None
        self.units = DisplayUnits()
        self.time = None
        self._stale: set[int] = set()  # pages to draw anew when they are shown
        self._painted = False
        self.currentChanged.connect(self._page_shown)

    @property
    def waiting(self) -> bool:
        """Whether the page on show waits for the worker (the comparison at other temperatures, a load's spread)."""
        page = self.currentWidget()
        return page in (self.tradeoff_page, self.spread_page) and page.waiting

    def paintEvent(self, event) -> None:
        super().paintEvent(event)
        if not self._painted:  # the window is on screen: now the page on show makes its figure
            self._painted = True
            QTimer.singleShot(0, self, self._build_current)

    def _build_current(self) -> None:
        self.currentWidget().build()

    def save_current(self, path: str, dpi: int = 200) -> None:
        self.pages[self.currentIndex()].save(path, dpi)

    def show_outcome(self, outcome: Outcome, units: DisplayUnits, time: float | None = None) -> None:
        self.outcome, self.units, self.time = outcome, units, time
        self.redraw()

    def set_time(self, time: float | None) -> None:
        """Show the profiles at ``time`` [s] of the cycle (None: at its end); the other pages do not change."""
        self.time = time
        self._stale |= {self.pages.index(self.carbon_page), self.pages.index(self.hardness_page)}
        self._page_shown(self.currentIndex())

    def redraw(self) -> None:
        """Draw the page on show now; the others when they are shown (drawing costs more than solving)."""
        if self.outcome is None:
            return
        self.setTabText(0, self.outcome.profile_name)
        self._stale = set(range(len(self.pages)))
        self._page_shown(self.currentIndex())

    def show_comparison(self, values: dict, pairs: list | None, error: Exception | None) -> None:
        """The worker's comparison of the plan ``values`` at other temperatures: kept if it is of the result on
        show, and drawn if its page is on show."""
        self._answered(self.tradeoff_page, values, pairs, error)

    def show_capability(self, values: dict, capability: Capability | None, error: Exception | None) -> None:
        """The worker's spread of a load of the plan ``values``: kept if it is of the result on show, and drawn if
        its page is on show."""
        self._answered(self.spread_page, values, capability, error)
        if self.outcome is not None and values is self.outcome.values:  # the carbon profile gets the load's band
            self._stale.add(self.pages.index(self.carbon_page))

    def _answered(self, page: _Page, values: dict, answer, error: Exception | None) -> None:
        if self.outcome is None or values is not self.outcome.values:
            return
        page.take(values, answer, error)
        self._stale.add(self.pages.index(page))
        self._page_shown(self.currentIndex())

    def draw_all(self, only: int | None = None) -> None:
        """Draw every page now (or page ``only``: before exporting it): a page already drawn for this result is not
        made again, only rendered; the comparison at other temperatures and a load's spread are worked out here if
        the worker has not, for their own pages."""
        from ..plan import compare_temperatures

        wanted = range(len(self.pages)) if only is None else [only]
        page = self.tradeoff_page
        if self.outcome is not None and not page.has(self.outcome) and self.pages.index(page) in wanted:
            values = self.outcome.values
            try:
                page.take(values, compare_temperatures(values, page.temperatures(self.outcome)), None)
            except CasedepthError as error:
                page.take(values, None, error)
            self._stale.add(self.pages.index(page))
        page = self.spread_page
        if self.outcome is not None and not page.has(self.outcome) and self.pages.index(page) in wanted:
            page.work_out(self.outcome)
            self._stale.add(self.pages.index(page))
        for index in wanted:
            page = self.pages[index]
            page.build()
            if self.outcome is not None and index in self._stale:
                self._draw_page(index)
            page.canvas.draw()

    def _page_shown(self, index: int) -> None:
        if self.outcome is not None and index in self._stale:
            self._draw_page(index)

    def _draw_page(self, index: int) -> None:
        page = self.pages[index]
        page.build()
        self._stale.discard(index)
        if isinstance(page, _PlotPage):
            view = self.outcome.view(self.time)
            found = self.spread_page.capability if self.spread_page.has(self.outcome) else None
            band = found.profile_band if found is not None and index == 0 and self.time is None else None
            page.draw_panel(view.main if index == 0 else view.hardness, view, self.units, band)
        elif page is self.tradeoff_page:
            if not page.show_outcome(self.outcome, self.units):
                self.comparison_wanted.emit(self.outcome.values, page.temperatures(self.outcome))
        elif page is self.spread_page:
            if not page.show_outcome(self.outcome, self.units):
                self.capability_wanted.emit(self.outcome.values, page.SPREAD)
        else:
            page.show_outcome(self.outcome, self.units)
