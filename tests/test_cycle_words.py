"""The words on the cycle plots (issue 14): a stage's name never touches or crosses the temperature line, the
potential line, a moment's dotted line or another word, and a moment's words (a purge, the atmosphere going in, on
a white ground that covers the dotted lines) cross neither the temperature nor the potential line; on the floor's
sheet, on plain figures from narrow to wide, and on the window's cycle page at the usual screen sizes.

The check is independent of how the words are placed: each curve is followed in steps of half a pixel in display
coordinates, and no point of it may lie in a word's window extent widened by half the curve's width.
"""

import itertools
from pathlib import Path

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from casedepth.plan import evaluate, load
from casedepth.report import documents, plot_marks

EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"
PLANS = ["pinion-shaft", "piston-rod-nitrided", "ring-gear-boost-diffuse"]


def _points(curve) -> np.ndarray:
    """The curve as drawn, in display pixels, every half pixel along each segment (no segment across a NaN)."""
    xy = curve.get_transform().transform(curve.get_xydata())
    pieces = []
    for (x0, y0), (x1, y1) in itertools.pairwise(xy):
        if np.isfinite([x0, y0, x1, y1]).all():
            steps = int(max(abs(x1 - x0), abs(y1 - y0)) / 0.5) + 2
            pieces.append(np.column_stack([np.linspace(x0, x1, steps), np.linspace(y0, y1, steps)]))
    return np.concatenate(pieces) if pieces else np.empty((0, 2))


def _dotted_line(curve) -> bool:
    """A moment's line: at one time all the way up."""
    return np.ptp(np.asarray(curve.get_xdata(), dtype=float)) == 0


def word_problems(ax, stages, moments, curves) -> list[str]:
    """What of the cycle's words touches a curve or another word, or lies outside the plot."""
    renderer = ax.figure.canvas.get_renderer()
    frame = ax.get_window_extent(renderer)
    shown = [(text, text.get_window_extent(renderer)) for text in [t for t, *_ in stages] + list(moments)
             if text.get_visible()]
    problems = []
    for curve in curves:
        points = _points(curve)
        half = renderer.points_to_pixels(curve.get_linewidth()) / 2 + 0.5
        for text, box in shown:
            if text in moments and _dotted_line(curve):
                continue
            if box.padded(half).count_contains(points):
                problems.append(f"{text.get_text().strip()!r} touches the line {curve.get_label()!r}")
    for (a, box_a), (b, box_b) in itertools.combinations(shown, 2):
        if box_a.overlaps(box_b):
            problems.append(f"{a.get_text().strip()!r} overlaps {b.get_text().strip()!r}")
    for text, box in shown:
        if box.x0 < frame.x0 or box.x1 > frame.x1 or box.y0 < frame.y0 or box.y1 > frame.y1:
            problems.append(f"{text.get_text().strip()!r} is cut by the plot's edge")
    return problems


def _longest_named(stages) -> bool:
    text, *_ = max(stages, key=lambda stage: stage[2] - stage[1])
    return text.get_visible()


@pytest.fixture(scope="module", params=PLANS)
def example(request):
    plan = load(EXAMPLES / f"{request.param}.cdplan.json")
    return plan, evaluate(plan.values())


@pytest.fixture
def qt_window(request):
    pytest.importorskip("PySide6")
    return request.getfixturevalue("window")


@pytest.mark.parametrize("size", [(4.0, 2.6), (6.0, 3.0), (8.0, 4.5), (14.0, 6.0)])
def test_words_are_clear_on_plots_from_narrow_to_wide(example, size):
    line = example[1].timeline()
    fig = Figure(figsize=size)
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    hours = line.times / 3600
    ax.plot(hours, line.temperatures - 273.15, lw=2.0, label="temperature")
    potential = ax.twinx()
    potential.plot(hours, line.potentials, lw=1.6, ls="--", label="potential")
    ax.set_ylim(0, np.nanmax(line.temperatures - 273.15) * 1.25)
    potential.set_ylim(0, np.nanmax(line.potentials) * 1.3)
    ax.set_xlim(0, hours[-1])
    stages, moments = plot_marks.draw_cycle_words(ax, line)
    fig.tight_layout()
    curves = [*ax.get_lines(), *potential.get_lines()]
    plot_marks.place_cycle_words(ax, stages, moments, curves)
    fig.canvas.draw()
    assert word_problems(ax, stages, moments, curves) == []
    assert _longest_named(stages)


@pytest.mark.parametrize("paper, units", [("a4", "metric"), ("letter", "imperial")])
def test_words_are_clear_on_the_sheet(example, paper, units):
    plan, outcome = example
    page = documents.process_sheet(plan, outcome, paper=paper, units=units).pages[0]
    FigureCanvasAgg(page).draw()
    cycle = next(ax for ax in page.axes if ax.get_title().startswith("The cycle"))
    twin = next(ax for ax in page.axes if ax is not cycle and ax.get_position().bounds == cycle.get_position().bounds)
    labels = outcome.timeline().labels
    # the stages' names are written first, in the order of the stages, then the moments' words
    stages = [(text, start / 3600, end / 3600) for text, (start, end, _) in zip(cycle.texts, labels)]
    moments = cycle.texts[len(labels):]
    assert len(moments) == len(outcome.timeline().markers)
    assert word_problems(cycle, stages, moments, [*cycle.get_lines(), *twin.get_lines()]) == []
    assert _longest_named(stages)


@pytest.mark.parametrize("name", PLANS)
def test_words_are_clear_on_the_window_cycle_page(qt_window, qtbot, name):
    window = qt_window
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        assert window.open_plan(EXAMPLES / f"{name}.cdplan.json")
    page = window.plots.cycle_page
    window.plots.setCurrentIndex(window.plots.pages.index(page))
    for size in [(1280, 800), (1920, 1080)]:
        window.resize(*size)
        qtbot.waitUntil(lambda size=size: (window.width(), window.height()) == size, timeout=2000)
        qtbot.wait(20)
        page.canvas.draw()
        curves = [*page.axes.get_lines(), *page.potential_axes.get_lines()]
        assert word_problems(page.axes, page.stage_texts, page.marker_texts, curves) == [], size
        assert _longest_named(page.stage_texts), size
