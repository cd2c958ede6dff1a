"""The window's layout at the usual screen sizes: nothing a planner reads is cut off (pytest-qt, offscreen).

For each demo plan (carburizing, nitriding, boost and diffuse) at 1280×800 and 1920×1080, every plot page is
shown and drawn, and for every matplotlib axes its tight bounding box (ticks, tick labels, axis labels, title)
lies inside the canvas, every visible text inside the canvas (and a text clipped to the axes inside the axes),
and no legend covers an axis label; the cycle page shows a usual cycle's stages without scrolling beside a
plot that keeps its room; the form's lines are wide enough for what they hold; and the result keeps each
number on one line with its unit.
"""

import re
from pathlib import Path

import pytest

pytest.importorskip("PySide6")

from matplotlib.text import Text  # noqa: E402
from PySide6.QtWidgets import QComboBox, QLabel, QLineEdit  # noqa: E402

from casedepth.gui.fields import WIDEST_LINE  # noqa: E402

EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"
PLANS = ["pinion-shaft", "piston-rod-nitrided", "ring-gear-boost-diffuse", "pinion-lpc"]
SIZES = [(1280, 800), (1920, 1080)]
TOLERANCE = 2.0  # pixels


def _pixels(box) -> tuple:
    return tuple(round(float(v)) for v in box.bounds)


def _inside(box, outer, tolerance=TOLERANCE) -> bool:
    return (box.x0 >= outer.x0 - tolerance and box.y0 >= outer.y0 - tolerance
            and box.x1 <= outer.x1 + tolerance and box.y1 <= outer.y1 + tolerance)


def _texts(ax):
    """The visible, non-empty texts of an axes and of its child axes (a secondary axis): titles, axis labels, texts
    placed in the plot."""
    for axes in [ax, *ax.child_axes]:
        texts = [c for c in axes.get_children() if isinstance(c, Text)] + [axes.xaxis.label, axes.yaxis.label]
        for text in texts:
            if text.get_visible() and text.get_text().strip():
                yield text


def layout_problems(figure) -> list[str]:
    """What of a drawn figure lies outside its canvas, or covers an axis label."""
    renderer = figure.canvas.get_renderer()
    canvas = figure.bbox
    problems = []
    for number, ax in enumerate(figure.axes):
        if not ax.get_visible():
            continue
        where = f"axes {number} ({ax.get_title() or ax.get_title(loc='left') or ax.get_ylabel()!r})"
        tight = ax.get_tightbbox(renderer)
        if tight is not None and not _inside(tight, canvas):
            problems.append(f"{where}: tight box {_pixels(tight)} outside the canvas {_pixels(canvas)}")
        frame = ax.get_window_extent(renderer)
        for text in _texts(ax):
            extent = text.get_window_extent(renderer)
            if text in ax.texts and text.get_clip_on() and not _inside(extent, frame):
                problems.append(f"{where}: {text.get_text()!r} is cut by the axes")
            if not _inside(extent, canvas):
                problems.append(f"{where}: {text.get_text()!r} {_pixels(extent)} outside the canvas {_pixels(canvas)}")
        legend = ax.get_legend()
        if legend is not None and legend.get_visible():
            box = legend.get_window_extent(renderer)
            for label in (ax.xaxis.label, ax.yaxis.label):
                if label.get_text() and box.overlaps(label.get_window_extent(renderer)):
                    problems.append(f"{where}: the legend covers {label.get_text()!r}")
    return problems


@pytest.fixture
def opened(window, qtbot, request):
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        assert window.open_plan(EXAMPLES / f"{request.param}.cdplan.json")
    return window


def _settle(qtbot, window, size) -> None:
    window.resize(*size)
    qtbot.waitUntil(lambda: (window.width(), window.height()) == size, timeout=2000)
    qtbot.wait(20)


@pytest.mark.parametrize("opened", PLANS, indirect=True)
def test_nothing_is_cut_off_at_the_usual_sizes(opened, qtbot):
    window, plots = opened, opened.plots
    problems = []
    for size in SIZES:
        _settle(qtbot, window, size)
        for index, page in enumerate(plots.pages):
            plots.setCurrentIndex(index)
            qtbot.waitUntil(lambda: not plots.waiting, timeout=20000)  # the comparison comes from the worker
            qtbot.wait(10)
            page.canvas.draw()
            problems += [f"{size} {plots.tabText(index)}: {p}" for p in layout_problems(page.figure)]
        plots.draw_all()  # what exports and prints draw: the same pages, fitted as they are shown
        cycle = plots.cycle_page
        plots.setCurrentIndex(plots.pages.index(cycle))
        qtbot.wait(10)
        if cycle.table.verticalScrollBar().maximum() > 0:
            problems.append(f"{size}: the cycle's {cycle.table.rowCount()} stages need scrolling")
        if cycle.canvas.height() < 0.8 * cycle.height() or cycle.canvas.width() < 0.5 * cycle.width():
            problems.append(f"{size}: the cycle plot is squeezed to {cycle.canvas.width()}×{cycle.canvas.height()}")
        problems += [f"{size}: {p}" for p in _cut_lines(window)]
    assert not problems, "\n".join(problems)


def _cut_lines(window) -> list[str]:
    """Lines of the form that do not show their whole text (up to the longest a line is made to show), and facts
    that break a number from its unit."""
    problems = []
    for key in ("title", "part", "fixture", "steel", "composition", "furnace"):
        widget = window.form.widget(key)
        if widget is None or not widget.isVisibleTo(window):
            continue
        edit = widget.lineEdit() if isinstance(widget, QComboBox) else widget
        assert isinstance(edit, QLineEdit)
        metrics = edit.fontMetrics()
        text = edit.text()
        need = min(metrics.horizontalAdvance(text), WIDEST_LINE * metrics.averageCharWidth())
        room = edit.contentsRect().width() - edit.textMargins().left() - edit.textMargins().right() - 4
        if need > room:
            problems.append(f"the {key} line shows {room} of the {need} pixels of {text!r}")
    for label in window.results.findChildren(QLabel):
        if label.objectName().startswith("fact_") and re.search(r"\d [^\s\d(]", label.text()):
            problems.append(f"{label.objectName()} may break a number from its unit: {label.text()!r}")
    return problems
