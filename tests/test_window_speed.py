"""The window does only the work the user waits for (issue: fast where the user waits): an edit draws the page on
show and leaves the hidden pages until they are shown; it changes the data of the artists already drawn, and a
change that moves only the curves redraws only them over the rest as last drawn; the comparison at other
temperatures is worked out on the worker thread, and only when its page is shown.

How fast is measured by ``benchmarks/bench_window.py``, not here (pytest-qt, offscreen).
"""

import threading

import numpy as np
import pytest

pytest.importorskip("PySide6")


def _draws(canvas) -> list:
    """Every whole draw of ``canvas`` from now on (a redraw of its moving artists alone is none)."""
    drawn = []
    canvas.mpl_connect("draw_event", lambda event: drawn.append(event))
    return drawn


def test_an_edit_draws_the_page_on_show_and_not_the_hidden_ones(window, qtbot):
    plots = window.plots
    for page in plots.pages:  # each page drawn once, as a user who looked at every tab
        plots.setCurrentIndex(plots.pages.index(page))
        qtbot.waitUntil(lambda: not plots.waiting, timeout=20000)
    plots.setCurrentIndex(0)
    qtbot.wait(50)  # what the last page asked to draw is drawn
    hidden = plots.pages[1:]
    before = {page: [line.get_ydata().copy() for line in page.axes.get_lines()] for page in hidden}
    draws = {page: _draws(page.canvas) for page in hidden}
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("temperature", window.plan.temperature + 10.0)
    qtbot.wait(50)
    for page in hidden:
        assert draws[page] == [], plots.tabText(plots.pages.index(page))
        assert all(np.array_equal(line.get_ydata(), old, equal_nan=True)
                   for line, old in zip(page.axes.get_lines(), before[page])), plots.tabText(plots.pages.index(page))
    cycle = plots.cycle_page
    plots.setCurrentIndex(plots.pages.index(cycle))  # shown: drawn with the new result
    assert not np.array_equal(cycle.temperature.get_ydata(), before[cycle][0])


def test_an_edit_changes_the_artists_drawn_not_the_axes(window, qtbot):
    page = window.plots.carbon_page
    axes, line, lines = page.axes, page.line, len(page.axes.get_lines())
    shown = line.get_ydata().copy()
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("temperature", window.plan.temperature + 10.0)
    with qtbot.waitSignal(page.canvas.painted, timeout=5000):
        pass
    assert page.axes is axes and page.line is line and len(axes.get_lines()) == lines
    assert not np.array_equal(line.get_ydata(), shown)


def test_moving_the_time_redraws_only_the_curves(window, qtbot):
    """The profile at another moment of the cycle changes the curves and the caption, not the axes: the figure is
    not drawn whole again, only the curves over it."""
    page = window.plots.carbon_page
    with qtbot.waitSignal(page.canvas.painted, timeout=5000):
        window.time_slider.setValue(300)  # (the key gains the end's curve: the canvas may be laid out anew)
    qtbot.wait(50)
    draws = _draws(page.canvas)
    shown = page.line.get_ydata().copy()
    with qtbot.waitSignal(page.canvas.painted, timeout=5000):
        window.time_slider.setValue(500)
    assert draws == []
    assert not np.array_equal(page.line.get_ydata(), shown)
    assert page.caption.text().startswith("Carbon after")


def test_the_temperatures_page_is_worked_out_on_the_worker_when_shown(window, qtbot, threads_of):
    threads = threads_of("compare_temperatures")
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("temperature", window.plan.temperature + 10.0)
    assert threads == []  # its page is not on show
    plots = window.plots
    plots.setCurrentIndex(plots.pages.index(plots.tradeoff_page))
    assert plots.waiting
    qtbot.waitUntil(lambda: not plots.waiting, timeout=20000)
    assert threads and threading.main_thread() not in threads
    assert dict(plots.tradeoff_page.pairs)[window.plan.temperature] == window.outcome.soak_time
