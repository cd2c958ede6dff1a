"""The planning window through its public behaviour (pytest-qt, offscreen)."""

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("PySide6")

from PySide6.QtCore import QSettings, Qt  # noqa: E402
from PySide6.QtWidgets import QMessageBox  # noqa: E402

from casedepth.parameters import PARAMETERS  # noqa: E402
from casedepth.plan import Plan, evaluate, load, save  # noqa: E402

PLANS = Path(__file__).parent / "data" / "plans"
EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"


def type_into(qtbot, spin, text):
    spin.selectAll()
    qtbot.keyClicks(spin, text)
    qtbot.keyClick(spin, Qt.Key_Return)


def pick(qtbot, window, key, data, timeout=20000):
    """Choose ``data`` in the combo box of ``key`` as a person would, and wait for the result."""
    box = window.form.widget(key)
    with qtbot.waitSignal(window.result_shown, timeout=timeout):
        box.setCurrentIndex(box.findData(data))
        box.activated.emit(box.currentIndex())


def test_first_result_and_cautions_are_shown(window):
    assert window.results.headline.text().startswith("Soak ")
    assert "h" in window.results.headline.text()
    assert "Flammable and toxic" in window.cautions.summary.text()
    assert "licensed practice" in window.cautions.summary.text()


def test_every_parameter_of_the_form_has_its_widget_and_label(window):
    """The form is built from the parameter table: every row with a place in the window has a widget, found by key."""
    for key, row in PARAMETERS.items():
        if row.group is not None:
            assert window.form.widget(key) is not None, key
            assert row.label


def test_typing_a_target_changes_the_soak_time(window, qtbot):
    before = window.outcome.soak_time
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        type_into(qtbot, window.form.widget("case_max"), "1.6")
    assert window.plan.case_max == pytest.approx(1.6e-3)
    assert window.outcome.soak_window[2] > before
    assert window.results.headline.text() != ""


def test_any_unit_the_command_line_takes(window, qtbot):
    """A temperature typed as 1700F in a metric view is 1700 °F (shown as 927 °C); a length as 0.04in is 1.016 mm."""
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        type_into(qtbot, window.form.widget("temperature"), "1700F")
    assert window.plan.temperature == pytest.approx((1700 - 32) / 1.8 + 273.15, abs=0.01)
    assert window.form.widget("temperature").value() == pytest.approx(926.7, abs=0.5)
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        type_into(qtbot, window.form.widget("case_max"), "0.06in")
    assert window.plan.case_max == pytest.approx(0.06 * 25.4e-3, rel=1e-3)


def test_plan_to_widget_and_widget_to_plan(window, qtbot):
    window.plan.set("temperature", 950 + 273.15)
    assert window.form.widget("temperature").value() == pytest.approx(950)
    window.form.widget("carbon_potential").setValue(1.1)
    assert window.plan.carbon_potential == pytest.approx(1.1)
    window.form.model_toggle.setChecked(True)
    pick(qtbot, window, "diffusivity", "agren")
    assert window.plan.diffusivity == "agren"
    window.plan.set("beta_held", True)
    assert window.form.widget("beta_held").isChecked() and not window.form.widget("beta").isVisibleTo(window)


def test_undo_and_redo_from_the_menu(window):
    spin = window.form.widget("carbon_potential")
    spin.setValue(1.2)
    window.undo_action.trigger()
    assert window.plan.carbon_potential == pytest.approx(1.0)
    assert spin.value() == pytest.approx(1.0)
    window.redo_action.trigger()
    assert spin.value() == pytest.approx(1.2)


def test_naming_a_plan_does_not_solve_it_again(window, qtbot):
    """Per-field notices: the title, part, revision and notes label the plan; changing them starts no calculation."""
    asked = []
    window.calculator.busy.connect(lambda: asked.append(1))
    for key, text in (("title", "Cam CF-3"), ("part", "CF-3"), ("revision", "B")):
        window.form.widget(key).setText(text)
        window.form.widget(key).editingFinished.emit()
    window.form.widget("notes").setPlainText("deburr before loading")
    qtbot.wait(100)
    assert (window.plan.title, window.plan.part, window.plan.revision) == ("Cam CF-3", "CF-3", "B")
    assert window.plan.notes == "deburr before loading" and not asked


def test_a_value_typed_outside_its_range_is_refused_with_the_range(window, qtbot):
    """The widgets hold the parameter table's ranges: 700 °C typed for 8620 (Ac3 798 °C, Andrews 1965) is refused
    where it is typed, with the range; the plan keeps its value."""
    spin = window.form.widget("temperature")
    type_into(qtbot, spin, "700")
    assert window.plan.temperature == pytest.approx(1198.15)
    assert "border" in spin.styleSheet() and "798–1100 °C" in spin.toolTip()
    assert "Temperature" in window.results.status.text() and "700 °C" in window.results.status.text()
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        type_into(qtbot, spin, "930")
    assert spin.styleSheet() == "" and not window.results.stale


@pytest.mark.parametrize("text,words", [("abc", "cannot read 'abc'"), ("1e308", "beyond any value"),
                                        ("5kg", "unknown temperature unit 'kg'")])
def test_text_typed_that_is_no_value_is_refused_with_the_reason(window, qtbot, text, words):
    """Not a silent return to the old value: the field is marked and the reason shown; the plan keeps its value."""
    spin = window.form.widget("temperature")
    type_into(qtbot, spin, text)
    assert window.plan.temperature == pytest.approx(1198.15)
    assert "border" in spin.styleSheet() and words in window.results.status.text()


def test_bad_input_marks_the_field_and_keeps_the_last_result(window, qtbot):
    headline = window.results.headline.text()
    spin = window.form.widget("temperature")
    with qtbot.waitSignal(window.calculator.failed, timeout=10000):
        window.plan.set("temperature", 700 + 273.15)  # as an opened plan may hold it
    assert window.results.stale
    assert "798–1100 °C" in window.results.status.text() and "Temperature" in window.results.status.text()
    assert "border" in spin.styleSheet() and spin.value() == pytest.approx(700)
    assert window.results.headline.text() == headline
    assert window.cautions.pressing()[0].key == "below-admission"
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        type_into(qtbot, spin, "925")
    assert not window.results.stale
    assert spin.styleSheet() == ""


def test_runaway_values_are_refused_not_solved(window, qtbot):
    """A threshold of 1000 %C is outside the table's range: the widget does not take it, and a plan that holds it
    is refused at once with the range, nothing solved; the range follows the threshold's kind."""
    spin = window.form.widget("threshold_value")
    assert (spin.minimum(), spin.maximum()) == (0.05, 1.5)
    type_into(qtbot, spin, "1000")
    assert window.plan.threshold_value == pytest.approx(0.40) and "0.05–1.5" in spin.toolTip()
    with qtbot.waitSignal(window.calculator.failed, timeout=10000):
        window.plan.set("threshold_value", 1000.0)
    assert "0.05–1.5" in window.results.status.text()
    assert "border" in spin.styleSheet()
    pick(qtbot, window, "threshold_kind", "HV")
    assert (spin.minimum(), spin.maximum()) == (100.0, 1000.0) and window.plan.threshold_value == 550.0


def test_a_bad_second_stage_potential_is_named_and_marked(window, qtbot):
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("treatment", "nitriding")
    with qtbot.waitSignal(window.calculator.failed, timeout=20000):
        window.plan.update(two_stage=True, kn_second=10.0)
    assert "Second-stage K_N:" in window.results.status.text()
    assert "border" in window.form.widget("kn_second").styleSheet()


def test_unreadable_composition_is_marked_not_taken(window, qtbot):
    window.form.widget("composition").setText("C=0.2 Qq=1")
    window.form.widget("composition").editingFinished.emit()
    assert "unknown element" in window.form.widget("composition").toolTip()
    assert window.plan.composition["C"] == 0.205


def test_steel_library_pick_sets_composition(window, qtbot):
    pick(qtbot, window, "steel", "16MnCr5")
    assert window.plan.steel == "16MnCr5"
    assert "Cr=0.95" in window.form.widget("composition").text()


def test_units_switch_changes_the_display_not_the_plan(window):
    values = window.plan.values()
    window.set_units("imperial")
    assert window.form.widget("temperature").suffix().strip() == "°F"
    assert window.form.widget("temperature").value() == pytest.approx(1697, abs=0.6)
    assert window.form.widget("case_min").value() == pytest.approx(0.8 / 25.4, abs=1e-4)
    assert window.plan.values() == values
    assert window.settings.value("units") == "imperial"
    window.set_units("metric")
    assert window.plan.values() == values


def test_save_and_open_round_trip(window, qtbot, tmp_path):
    window.plan.update(title="Cam follower CF-3", carbon_potential=0.95, aim=0.25)
    path = tmp_path / "cam.cdplan.json"
    assert window.save_plan(path)
    assert not window.plan.modified and not window.isWindowModified()
    window.plan.set("carbon_potential", 1.05)
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        assert window.open_plan(path)
    assert window.plan.title == "Cam follower CF-3"
    assert window.plan.carbon_potential == pytest.approx(0.95)
    assert window.form.field("aim").slider.value() == 25
    assert str(path) in window._recent()


def test_old_files_open_with_their_own_numbers_and_the_newer_choice_offered(window, qtbot):
    """Every past schema opens; the window gives each the numbers its file gave when written (recorded beside it)
    and offers, never applies, the newer policy or model; taking the offer is one undoable edit."""
    for path in sorted(PLANS.glob("*.cdplan.json")):
        with qtbot.waitSignal(window.result_shown, timeout=20000):
            assert window.open_plan(path)
        assert window.plan.title in window.windowTitle()
        assert not window.results.stale
        expected = json.loads(path.with_name(path.name.replace(".cdplan.json", ".expected.json")).read_text())
        assert window.outcome.soak_time / 3600 == pytest.approx(expected["numbers"]["soak_time_h"], rel=1e-3)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.open_plan(PLANS / "schema-1.cdplan.json")
    assert window.offers.isVisibleTo(window) and "schema 4" in window.offers.text.text()
    old = window.outcome.soak_time
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.offers.take.click()
    assert window.plan.count_shop_stages and window.outcome.soak_time < old
    # the next newer choice: β from the gas (schema 9)
    assert window.offers.isVisibleTo(window) and "β from the carrier gas" in window.offers.text.text()
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.undo_action.trigger()
    assert window.outcome.soak_time == old and "schema 4" in window.offers.text.text()
    window.offers.keep.click()
    assert not window.plan.count_shop_stages and "schema 4" not in window.offers.text.text()


def test_unsaved_changes_prompt(window, monkeypatch):
    window.plan.set("carbon_potential", 1.1)
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.Cancel)
    window.new_plan()
    assert window.plan.carbon_potential == pytest.approx(1.1)  # cancelled: nothing lost
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.Discard)
    window.new_plan()
    assert window.plan.carbon_potential == pytest.approx(1.0)


def test_time_control_scrubs_through_the_cycle(window):
    window.time_slider.setValue(300)
    assert "of" in window.time_label.text()
    assert window.plots.time == pytest.approx(0.3 * window.outcome.duration)
    window.time_slider.setValue(1000)
    assert window.plots.time is None


def test_exports(window, tmp_path):
    window.export_csv(tmp_path / "profile.csv")
    lines = (tmp_path / "profile.csv").read_text().splitlines()
    assert lines[1] == "depth_mm,depth_in,carbon_pct,hardness_hv,hardness_hrc"
    assert len(lines) > 50
    for suffix in (".png", ".svg", ".pdf"):
        window.export_plot(tmp_path / f"plot{suffix}")
        assert (tmp_path / f"plot{suffix}").stat().st_size > 1000
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith(".")) == []  # no temporary files left


def test_about_lists_every_model_with_its_source(window):
    text = window.models_text()
    for words in ("Tibbetts", "Ågren", "Gunnarson", "Andrews", "ASTM E140", "Just", "NFPA 86", "Verwer", "Lehrer",
                  "Bohnenkamp", "Wagner", "Somers", "superseded"):
        assert words in text


def test_window_layout_is_remembered(window, tmp_path):
    window.close()
    settings = QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)
    assert settings.value("window/geometry") is not None


def test_screenshot_command(tmp_path):
    out = tmp_path / "shot.png"
    done = subprocess.run([sys.executable, "-m", "casedepth", "gui", "--screenshot", str(out)],
                          capture_output=True, text=True, timeout=120, cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    assert out.stat().st_size > 20000


@pytest.mark.parametrize("target,reason", [("", "give the file"), ("shot", "PNG"), ("shot.pdf", "PNG"),
                                           ("no folder/shot.png", "no folder"), ("folder.png", "folder")])
def test_screenshot_refuses_a_path_it_cannot_write_as_png(tmp_path, capsys, target, reason):
    """Refused before the window opens (exit 2, one line), never a silent exit 0 or a wait for a person."""
    from casedepth.gui.app import main as window_main

    (tmp_path / "folder.png").mkdir()
    assert window_main(["--screenshot", str(tmp_path / target) if target else ""]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "--screenshot" in err and reason in err


def test_custom_composition_and_plan_name(window, qtbot):
    pick(qtbot, window, "steel", "custom")
    window.form.widget("composition").setText("C=0.18 Mn=0.9 Cr=1.0")
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        window.form.widget("composition").editingFinished.emit()
    assert window.plan.steel == "custom"
    assert window.outcome.setup.steel.composition == {"C": 0.18, "Mn": 0.9, "Cr": 1.0}
    window.form.widget("title").setText("Idler gear IG-5")
    window.form.widget("title").editingFinished.emit()
    assert window.plan.title == "Idler gear IG-5"
    assert "Idler gear IG-5" in window.windowTitle()


def test_boost_diffuse_plan_in_the_window(window, qtbot):
    pick(qtbot, window, "process", "boost-diffuse")
    assert window.plan.process == "boost-diffuse"
    assert window.form.widget("boost_potential").isVisibleTo(window)
    assert not window.form.widget("carbon_potential").isVisibleTo(window)
    assert window.results.headline.text().startswith("Boost ")
    outcome = window.outcome
    assert outcome.boost_time > 0 and outcome.diffuse_time >= 0
    low, _, high = outcome.targets
    assert low <= outcome.depth <= high
    assert window.plan.surface_min <= outcome.surface_carbon <= window.plan.surface_max
    window.plots.setCurrentIndex(2)
    table = window.plots.cycle_page.table
    assert [table.item(r, 0).text() for r in range(table.rowCount())][2:4] == ["Boost", "Diffuse"]
    assert "per part" in window.plots.cycle_page.total.text()


def test_own_stages_table_edits_the_plan(window, qtbot):
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.update(process="stages", stages=[
            {"kind": "soak", "duration_h": 4.0, "temperature_c": 925.0, "carbon_potential_pct": 1.0}])
    assert not window.form.widget("temperature").isVisibleTo(window)  # the stages set their own temperatures
    before = window.outcome.depth
    table = window.form.widget("stages")
    table.setCurrentCell(0, 1)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        table.item(0, 1).setText("6")
    assert window.plan.stages[0]["duration_h"] == 6.0
    assert window.outcome.depth > before
    window.form.field("stages").buttons["add"].click()
    assert len(window.plan.stages) == 2
    window.undo_action.trigger()
    assert len(window.plan.stages) == 1


def test_stages_of_my_own_start_from_the_result_s_cycle(window, qtbot):
    """Choosing "Stages of my own" on a plan with no stages yet fills the table with the cycle the result ran (one
    undoable edit), which runs as it is: the same whole cycle, nothing marked."""
    before = window.outcome
    pick(qtbot, window, "process", "stages")
    assert window.plan.process == "stages" and window.plan.stages == before.stage_rows()
    assert not window.results.stale and "border" not in window.form.widget("stages").styleSheet()
    assert window.form.widget("stages").rowCount() == len(before.stage_rows())
    assert window.outcome.quote.total_h == pytest.approx(before.quote.total_h)
    window.undo_action.trigger()
    assert window.plan.process == "single" and window.plan.stages == []


def test_the_cycle_plot_draws_the_atmosphere_only_where_it_may_be_admitted(window):
    """Below the safe temperature for a flammable atmosphere (760 °C, NFPA 86 practice, from casedepth.safety) the
    carbon potential is not drawn; the heat-up is split where it passes it, and the purge is marked there."""
    from casedepth.safety import SAFE_ADMISSION_TEMPERATURE

    line = window.outcome.timeline()
    below = line.temperatures < SAFE_ADMISSION_TEMPERATURE - 1e-9
    assert below.any() and np.isnan(line.potentials[below]).all()
    crossing = np.flatnonzero(np.isclose(line.temperatures, SAFE_ADMISSION_TEMPERATURE))
    assert len(crossing) == 2  # the ramp's point there, without and with the atmosphere
    assert np.isnan(line.potentials[crossing[0]]) and line.potentials[crossing[1]] == pytest.approx(1.0)
    heat_up = next((start, end) for start, end, label in line.labels if label == "Heat-up")
    assert heat_up[0] < line.times[crossing[0]] < heat_up[1]
    hot = ~below
    hot[crossing[0]] = False
    assert np.isfinite(line.potentials[hot]).all()  # heat-up above it, soak, drop and equalize
    assert [(time, what) for time, what in line.markers] == [(line.times[crossing[0]], "purge, then atmosphere in")]
    page = window.plots.cycle_page
    window.plots.setCurrentIndex(window.plots.pages.index(page))
    drawn = page.potential_axes.get_lines()[0].get_ydata()
    assert np.array_equal(np.isnan(drawn), np.isnan(line.potentials))
    assert [text.get_text().strip() for text in page.marker_texts] == ["purge, then atmosphere in"]


def test_the_nitriding_cycle_marks_its_purges(window, qtbot):
    """K_N is drawn only while nitriding; each purge with nitrogen is marked where it starts, and ammonia going in."""
    pick(qtbot, window, "treatment", "nitriding")
    line = window.outcome.timeline()
    purges = [start for start, end, label in line.labels if label.startswith("Purge")]
    nitriding = next(start for start, end, label in line.labels if label.startswith("Nitride"))
    assert len(purges) == 2
    assert sorted(line.markers) == sorted([(purges[0], "nitrogen purge"), (nitriding, "ammonia in"),
                                           (purges[1], "nitrogen purge")])
    assert np.isnan(line.potentials[line.times < nitriding]).all()
    page = window.plots.cycle_page
    window.plots.setCurrentIndex(window.plots.pages.index(page))
    assert sorted(text.get_text().strip() for text in page.marker_texts) == ["ammonia in", "nitrogen purge",
                                                                              "nitrogen purge"]


def test_shop_times_and_rates(window, qtbot):
    from casedepth.gui.window import ShopDialog
    from casedepth.shop.quote import ShopDefaults

    dialog = ShopDialog(ShopDefaults(), window)
    assert dialog.spins["drop_temperature_c"].text() == "845 °C"  # whole degrees, as a furnace is set
    dialog.spins["furnace_rate_per_h"].setValue(200.0)
    dialog.spins["parts_per_load"].setValue(50)
    dialog.currency.setText("EUR")
    shop = dialog.values()
    assert (shop.furnace_rate_per_h, shop.parts_per_load, shop.currency) == (200.0, 50, "EUR")
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.apply_shop(shop, keep=True)
    assert window.plan.shop["furnace_rate_per_h"] == 200.0
    quote = window.outcome.quote
    assert quote.cost_per_part == pytest.approx(quote.total_h * 200.0 / 50)
    assert window.outcome.quote.currency == "EUR"
    window.plan.modified = False
    window.new_plan()
    assert window.plan.shop["furnace_rate_per_h"] == 200.0  # kept for new plans


def test_the_shop_dialog_picks_a_logo_file(window, monkeypatch, tmp_path):
    from PySide6.QtWidgets import QFileDialog

    from casedepth.gui.window import ShopDialog
    from casedepth.shop.quote import ShopDefaults

    asked = []
    logo = str(tmp_path / "logo.png")
    monkeypatch.setattr(QFileDialog, "getOpenFileName",
                        lambda parent, title, start, filters: asked.append(filters) or (logo, filters))
    dialog = ShopDialog(ShopDefaults(), window)
    dialog.logo_button.click()
    assert dialog.logo.text() == logo and "*.png" in asked[0] and "*.jpg" in asked[0]


def test_the_shop_menu_opens_the_plan_s_shop_and_applies_it(window, qtbot, monkeypatch):
    """Edit → Shop times and rates: the dialog starts from the plan's shop; OK applies it (one undoable edit) and keeps
    the name and logo in the settings."""
    from casedepth.gui.window import ShopDialog

    def answer(dialog):
        assert dialog.spins["furnace_rate_per_h"].value() == window.plan.shop.get("furnace_rate_per_h", 95.0)
        dialog.spins["parts_per_load"].setValue(60)
        dialog.name.setText("Example Heat Treat")
        return ShopDialog.Accepted

    monkeypatch.setattr(ShopDialog, "exec", answer)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.edit_shop()
    assert window.plan.shop["parts_per_load"] == 60 and window.settings.value("shop_name") == "Example Heat Treat"
    window.undo_action.trigger()
    assert window.plan.shop.get("parts_per_load", 120) == 120


def test_the_shop_dialog_takes_only_what_the_shop_accepts(window, monkeypatch):
    """Its spin boxes have the ranges of the shop's own entries (hardening temperature 700–1000 °C), and OK on a
    value the shop refuses says which entry and keeps the dialog open; retired entries (the carrier's CO is the
    plan's since schema 9) are not shown."""
    from casedepth.gui.window import ShopDialog
    from casedepth.shop.quote import ShopDefaults

    dialog = ShopDialog(ShopDefaults(), window)
    spin = dialog.spins["drop_temperature_c"]
    assert (spin.minimum(), spin.maximum()) == (700.0, 1000.0) and "carrier_co_pct" not in dialog.spins
    told = []
    monkeypatch.setattr(QMessageBox, "warning", lambda parent, title, text: told.append(text))
    monkeypatch.setattr(ShopDialog, "values", lambda self: ShopDefaults(drop_temperature_c=1200.0))
    dialog.accept()
    assert told and "drop_temperature_c" in told[0] and "700–1000" in told[0]
    assert dialog.result() != ShopDialog.Accepted


def test_temperatures_tab_uses_the_plan_s_own_policy(window, qtbot):
    """The comparison evaluates the plan itself at other temperatures: at its own temperature it gives the headline's
    soak (the shop's heat-up and drop counted as the plan counts them; the temperatures are marched together, so to
    round-off)."""
    window.plots.setCurrentIndex(3)
    qtbot.waitUntil(lambda: not window.plots.waiting, timeout=20000)  # worked out on the worker
    pairs = window.plots.tradeoff_page.pairs
    assert len(pairs) >= 5
    assert all(a[1] > b[1] for a, b in zip(pairs, pairs[1:]))  # hotter is faster
    assert dict(pairs)[window.plan.temperature] == pytest.approx(window.outcome.soak_time, rel=1e-12)
    assert window.plots.tradeoff_page.table.rowCount() == len(pairs)


def test_gas_nitriding_in_the_window(window, qtbot):
    pick(qtbot, window, "treatment", "nitriding")
    assert window.plan.treatment == "nitriding" and window.plan.steel == "4140"
    assert window.form.widget("temperature").value() == pytest.approx(520)
    assert window.results.headline.text().startswith("Nitride ")
    assert window.plots.tabText(0) == "Nitrogen profile"
    window.plots.setCurrentIndex(2)  # the cycle: heat-up, nitriding, cool-down, with K_N; and its quote
    assert window.plots.cycle_page.table.rowCount() == len(window.outcome.quote.lines)
    assert "K_N" in window.plots.cycle_page.potential_axes.get_ylabel()
    assert window.cautions.items[0].key == "ammonia-toxic"
    low, _, high = window.outcome.targets
    assert low <= window.outcome.depth <= high
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.field("kn").dissociation.setValue(30.0)
    assert window.plan.kn == pytest.approx(6.56, abs=0.01)
    assert window.outcome.setup.phase == "epsilon"
    assert "nitrogen_pct" in window.profile_csv()
    window.undo_action.trigger()
    assert window.plan.kn == pytest.approx(3.0)
    assert "ε" in window.results.facts["surface"].text() and "γ′" in window.results.facts["surface"].text()


def test_nitriding_plan_saves_reopens_and_matches_the_command_line(window, qtbot, tmp_path):
    """4140, 520 °C, K_N, target depth and compound window; save, reopen, and the command line gives the same
    numbers from the saved file (1e-9)."""
    pick(qtbot, window, "treatment", "nitriding")
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.widget("kn").setValue(2.5)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.widget("compound_max").setValue(8.0)
    shown = window.outcome
    path = tmp_path / "nitrided.cdplan.json"
    assert window.save_plan(path)
    window.new_plan()
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        assert window.open_plan(path)
    assert window.plan.treatment == "nitriding" and window.plan.kn == pytest.approx(2.5)
    assert window.plan.compound_max == pytest.approx(8e-6)
    assert window.outcome.aim.time == pytest.approx(shown.aim.time, rel=1e-12)
    out = subprocess.run([sys.executable, "-m", "casedepth", "run", str(path), "--json"], capture_output=True,
                         text=True, cwd=tmp_path, check=True).stdout
    data = json.loads(out)
    assert data["soak_time_h"] == pytest.approx(shown.aim.time / 3600, rel=1e-9)
    assert data["compound_layer_um"] == pytest.approx(shown.aim.compound_layer * 1e6, rel=1e-9)
    assert data["compound_window_um"] == pytest.approx([5.0, 8.0])
    chart = window.document("chart")
    assert chart.title.startswith("Nitriding chart") and len(chart.values["labels"]) == 3


def test_two_stage_nitriding_from_the_window(window, qtbot):
    pick(qtbot, window, "treatment", "nitriding")
    assert not window.form.widget("kn_second").isVisibleTo(window)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.widget("kn").setValue(8.0)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.widget("two_stage").setChecked(True)
    assert window.plan.two_stage and window.form.widget("kn_second").isVisibleTo(window)
    assert window.outcome.schedule is not None
    assert "two stages" in window.results.subline.text()
    low, high = window.plan.compound_min, window.plan.compound_max
    assert low <= window.outcome.aim.compound_layer <= high
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.widget("kn_second").setValue(0.5)
    assert window.plan.kn_second == pytest.approx(0.5)
    assert window.outcome.schedule.second_kn == pytest.approx(0.5)


@pytest.mark.parametrize("older", [True, False], ids=["as the first release wrote it", "the example now"])
def test_two_stages_on_the_piston_rod_example(window, qtbot, older):
    """Ticking Two stages on the piston-rod example plans a schedule whose layer lies in the window (aimed at the
    middle of the part of the window the two stages can reach), and marks no field: the example as the first
    release wrote it (schema 3, its own layer and zone models) and as it is now."""
    old = Path(__file__).resolve().parent / "data" / "piston-rod-schema-3.cdplan.json"
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.open_plan(old if older else EXAMPLES / "piston-rod-nitrided.cdplan.json")
    if older:
        assert [offer.key for offer in window.plan.offers()] == ["layer_model", "zone_model"]
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.widget("two_stage").setChecked(True)
    assert not window.results.stale
    assert window.outcome.schedule is not None
    assert window.plan.compound_min <= window.outcome.aim.compound_layer <= window.plan.compound_max
    assert all("border" not in (window.form.widget(key).styleSheet() or "") for key in window.form.fields)


def test_print_documents_through_qt(window, tmp_path):
    from casedepth.gui.printing import print_to_pdf

    for kind in ("sheet", "chart"):
        document = window.document(kind)
        print_to_pdf(document, str(tmp_path / f"{kind}.pdf"), window.paper)
        assert (tmp_path / f"{kind}.pdf").stat().st_size > 10000


def test_plan_a_load_from_saved_plans(window, tmp_path):
    first = load(EXAMPLES / "pinion-shaft.cdplan.json")
    save(first, tmp_path / "a.cdplan.json")
    first.update(title="Idler pin IP-4 (demo)", case_min=0.9e-3, case_max=1.3e-3)
    save(first, tmp_path / "b.cdplan.json")
    text = window.show_load([str(tmp_path / "a.cdplan.json"), str(tmp_path / "b.cdplan.json")])
    assert text.startswith("Load soak") and "Idler pin" in text and "OUTSIDE" not in text
    save(Plan(temperature=950 + 273.15), tmp_path / "c.cdplan.json")
    assert "cannot share a load" in window.show_load([str(tmp_path / "a.cdplan.json"), str(tmp_path / "c.cdplan.json")])
    window.load_view.close()


def test_calibrate_from_a_measured_section(window, qtbot):
    soak = 6 * 3600.0
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        message = window.calibrate(soak, 0.95e-3)
    assert "Multiplier" in message and window.plan.d_multiplier < 1.0
    assert window.form.widget("d_multiplier").value() == pytest.approx(window.plan.d_multiplier)
    window.undo_action.trigger()
    assert window.plan.d_multiplier == pytest.approx(1.0)
    assert "outside" in window.calibrate(soak, 9e-3)


@pytest.mark.parametrize("plan", [Plan(), Plan("nitriding")], ids=["carburizing", "nitriding"])
def test_calibration_offers_the_soak_not_the_cycle(window, qtbot, plan):
    """The dialog starts from the plan's soak at temperature for the aim depth (not the whole cycle); accepting it
    as it is gives back the plan's own multiplier (1.000)."""
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window._attach(plan)
        window.calculate()
    soak, depth = window.calibration_defaults()
    assert soak == window.outcome.soak_time < window.outcome.quote.total_h * 3600
    assert depth == window.outcome.targets[1]
    assert "Multiplier 1.000" in window.calibrate(soak, depth)
    key = "d_multiplier" if plan.treatment == "carburizing" else "n_multiplier"
    assert window.plan.values()[key] == pytest.approx(1.000, abs=5e-4)


def test_total_case_threshold_from_the_window(window, qtbot):
    """SAE J423 total case: the threshold list offers carbon above the core; picking it sets 0.04 %C."""
    pick(qtbot, window, "threshold_kind", "above core")
    assert window.plan.threshold_kind == "above core" and window.plan.threshold_value == pytest.approx(0.04)
    assert window.outcome.setup.threshold_carbon == pytest.approx(window.outcome.setup.steel.carbon + 0.04)
    assert "total case depth" in window.results.subline.text()


def test_the_window_the_command_line_and_python_give_the_same_numbers(window, qtbot, tmp_path):
    """One evaluation path: 8620, 925 °C, potential 1.00, 1.0 mm at 0.40 %C on a 32 mm shaft, the shop's stages
    counted (the default everywhere) — the window's headline, its Temperatures tab at the plan's temperature, the
    command line, the plan it saves run again, and the Python API agree to 1e-9."""
    from casedepth import api
    from casedepth.cli import main

    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.update(shape="cylinder", size=32e-3, case_min=1.0e-3, case_max=1.0e-3)
    shown = window.outcome.soak_time
    window.plots.setCurrentIndex(3)
    qtbot.waitUntil(lambda: not window.plots.waiting, timeout=20000)
    assert dict(window.plots.tradeoff_page.pairs)[window.plan.temperature] == pytest.approx(shown, rel=1e-9)
    path = tmp_path / "shaft.cdplan.json"
    args = ["carburize", "--steel", "8620", "--temperature", "925C", "--potential", "1.00", "--target", "1.0mm",
            "--geometry", "cylinder", "--diameter", "32mm", "--json"]
    assert main([*args, "--save", str(path)]) == 0
    assert main(["run", str(path), "--json"]) == 0
    python = evaluate(api.plan(steel="8620", temperature="925C", potential=1.0, target="1.0mm", geometry="cylinder",
                               diameter="32mm")).soak_time
    assert python / 3600 == pytest.approx(shown / 3600, rel=1e-9)
    assert evaluate(load(path)).soak_time == pytest.approx(shown, rel=1e-9)
