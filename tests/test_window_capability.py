"""The Load spread page: how the case depths of a load's parts spread about the plan
(:func:`casedepth.shop.capability.capability`), worked out on the window's worker only while the page is shown,
and the library's refusal for a plan with no single soak (pytest-qt, offscreen)."""

import threading
from pathlib import Path

import pytest

pytest.importorskip("PySide6")

EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"


def _show_spread(window, qtbot):
    plots = window.plots
    plots.setCurrentIndex(plots.pages.index(plots.spread_page))
    qtbot.waitUntil(lambda: not plots.waiting, timeout=20000)
    return plots.spread_page


def test_a_one_soak_plan_shows_its_load_once_the_page_is_shown(window, qtbot):
    plots = window.plots
    plots.setCurrentIndex(plots.pages.index(plots.spread_page))
    assert plots.waiting and not plots.spread_page.figures.isEnabled()  # greyed while it is worked out
    page = _show_spread(window, qtbot)
    found = page.capability
    assert found is not None and page.has(window.outcome)
    assert len(found.depths) == window.plan.values()["spread_samples"] == 256  # the plan's setting, as on the command line
    counts = page.parts.get_data().values
    assert counts.sum() == len(found.depths)  # every part in the histogram
    low, high = (window.units.length(end) for end in found.window)
    assert page.band.get_x() == pytest.approx(low) and page.band.get_width() == pytest.approx(high - low)
    text = page.figures.text()
    assert page.figures.isEnabled() and "256 parts drawn" in text and "Cpk" in text and "moves it most" in text
    assert "Edit → Shop" in page.note.text() and "β" in page.note.text()


def test_the_load_is_worked_out_on_the_worker_only_while_its_page_is_shown(window, qtbot, threads_of):
    threads = threads_of("capability")
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("temperature", window.plan.temperature + 10.0)
    qtbot.wait(50)
    assert threads == []  # its page is not on show
    page = _show_spread(window, qtbot)
    assert threads and threading.main_thread() not in threads
    assert page.has(window.outcome)


def test_an_edit_stops_the_load_and_the_new_result_gets_its_own(window, qtbot):
    plots = window.plots
    plots.setCurrentIndex(plots.pages.index(plots.spread_page))
    qtbot.waitUntil(lambda: not window.calculator.idle(), timeout=5000)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("temperature", window.plan.temperature + 10.0)
    page = _show_spread(window, qtbot)
    assert page.has(window.outcome) and page.capability.values["temperature"] == window.plan.temperature


def test_a_boost_and_diffuse_plan_spreads_in_its_own_split(window, qtbot):
    """Issue 16 item 3: a boost and diffuse plan's load runs its boost and diffuse in the plan's split, and its
    surface-carbon window counts; the page says so (as `casedepth capability` on the saved plan does)."""
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        assert window.open_plan(EXAMPLES / "ring-gear-boost-diffuse.cdplan.json")
    page = _show_spread(window, qtbot)
    found = page.capability
    assert found is not None and [name for name, _ in found.held] == ["boost", "diffuse"]
    assert "boost" in page.title.get_text() and "diffuse" in page.title.get_text()
    assert "surface window" in page.figures.text() and page.parts.get_visible()
    # the time at temperature that centres the load, in the same split, beside the plan's (issue 16 item 3)
    assert found.centred is not None and "centred" in page.figures.text()


def test_a_plan_with_nothing_held_shows_the_refusal(window, qtbot):
    stages = [{"kind": "heat-up", "duration_h": 1.0, "temperature_c": 925.0, "carbon_potential_pct": 1.0},
              {"kind": "drop", "duration_h": 0.5, "temperature_c": 845.0, "carbon_potential_pct": 0.8}]
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("process", "stages")
        window.plan.set("stages", stages)
    page = _show_spread(window, qtbot)
    assert page.capability is None
    assert page.plot.message.get_visible() and "no time at temperature" in page.plot.message.get_text()
    assert not page.parts.get_visible() and not page.axes.axison


def test_the_plans_load_spread_settings_are_what_the_page_draws(window, qtbot):
    """The form's Load spread group is the plan's: fewer parts and a normal spread there are what the page (and
    `casedepth capability` on the saved plan) use."""
    window.plan.set("spread_samples", 32.0)
    window.plan.set("spread_distribution", "normal")
    qtbot.waitUntil(lambda: window.outcome is not None and window.outcome.values["spread_samples"] == 32.0,
                    timeout=10000)
    page = _show_spread(window, qtbot)
    qtbot.waitUntil(lambda: page.capability is not None and len(page.capability.depths) == 32, timeout=20000)
    assert page.capability.spread.distribution == "normal"
    assert "32 parts drawn" in page.figures.text() and "normal bands" in page.figures.text()


def test_the_carbon_profile_gets_the_loads_band_once_it_is_known(window, qtbot):
    plots = window.plots
    assert plots.carbon_page.spread is None  # not worked out yet: no band
    _show_spread(window, qtbot)
    plots.setCurrentIndex(0)
    qtbot.waitUntil(lambda: plots.carbon_page.spread is not None, timeout=10000)
    assert "5–95 %" in plots.carbon_page.spread.get_label()
    assert plots.carbon_page.spread in plots.carbon_page._handles()  # in the key under the plot


def test_a_planned_pulse_table_can_be_taken_into_the_plan(window, qtbot):
    """Issue 17: the window's "Use the planned table" puts the planned pulse table into the plan, which then runs it
    as it stands (the forward mode) and gives the numbers it was planned with."""
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        assert window.open_plan(EXAMPLES / "pinion-lpc.cdplan.json")
    planned = window.outcome
    field = window.form.fields["schedule"]
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        field.use.click()
    assert window.plan.schedule.startswith("boost ") and window.outcome.plan is None
    assert len(window.outcome.run.pulses) == len(planned.run.pulses)
    assert abs(window.outcome.depth / planned.depth - 1) < 2e-3


def test_the_temperatures_page_names_what_it_left_out(window, qtbot):
    """A plan that cannot run at some of the compared temperatures (the low-pressure example's 6 pulses put in too
    much carbon for its depth at 1000 °C and up) says which it left out, not only shows fewer rows."""
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        assert window.open_plan(EXAMPLES / "pinion-lpc.cdplan.json")
    plots = window.plots
    page = plots.tradeoff_page
    plots.setCurrentIndex(plots.pages.index(page))
    qtbot.waitUntil(lambda: page.has(window.outcome) and not plots.waiting, timeout=30000)
    shown = {T for T, _ in page.pairs}
    left = [T for T in page.temperatures(window.outcome) if T not in shown]
    assert left and "Left out:" in page.note.text()
