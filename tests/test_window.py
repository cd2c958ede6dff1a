"""The planning window through its public behaviour (pytest-qt, offscreen)."""

import subprocess
import sys
from pathlib import Path

import pytest

pytest.importorskip("PySide6")

from PySide6.QtCore import QSettings, Qt  # noqa: E402
from PySide6.QtWidgets import QMessageBox  # noqa: E402

from casedepth.gui.window import MainWindow  # noqa: E402

PLANS = Path(__file__).parent / "data" / "plans"


@pytest.fixture
def window(qtbot, tmp_path, monkeypatch):
    for name in ("warning", "information", "about"):
        monkeypatch.setattr(QMessageBox, name, lambda *a, **k: QMessageBox.Ok)
    settings = QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)
    win = MainWindow(settings=settings)
    # closing at teardown must not stop at the "unsaved changes" question
    qtbot.addWidget(win, before_close_func=lambda w: setattr(w.plan, "modified", False))
    win.show()
    qtbot.waitUntil(lambda: win.outcome is not None, timeout=10000)
    yield win
    win.plan.modified = False
    win.calculator.wait()


def type_into(qtbot, spin, text):
    spin.selectAll()
    qtbot.keyClicks(spin, text)
    qtbot.keyClick(spin, Qt.Key_Return)


def test_first_result_and_cautions_are_shown(window):
    assert window.results.headline.text().startswith("Soak ")
    assert "h" in window.results.headline.text()
    assert "Flammable and toxic" in window.cautions.summary.text()
    assert "licensed practice" in window.cautions.summary.text()


def test_typing_a_target_changes_the_soak_time(window, qtbot):
    before = window.outcome.aim.soak_time
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        type_into(qtbot, window.form.case_max, "1.6")
    assert window.plan.case_max == pytest.approx(1.6e-3)
    assert window.outcome.aim.soak_time > before
    assert window.results.headline.text() != ""


def test_plan_to_widget_and_widget_to_plan(window, qtbot):
    window.plan.set("temperature", 950 + 273.15)
    assert window.form.temperature.value() == pytest.approx(950)
    window.form.carbon_potential.setValue(1.1)
    assert window.plan.carbon_potential == pytest.approx(1.1)
    window.form.model_toggle.setChecked(True)
    window.form.diffusivity.setCurrentIndex(window.form.diffusivity.findData("agren"))
    window.form.diffusivity.activated.emit(window.form.diffusivity.currentIndex())
    assert window.plan.diffusivity == "agren"
    window.plan.set("beta_held", True)
    assert window.form.beta_held.isChecked() and not window.form.beta.isEnabled()


def test_undo_and_redo_from_the_menu(window):
    window.form.carbon_potential.setValue(1.2)
    window.undo_action.trigger()
    assert window.plan.carbon_potential == pytest.approx(1.0)
    assert window.form.carbon_potential.value() == pytest.approx(1.0)
    window.redo_action.trigger()
    assert window.form.carbon_potential.value() == pytest.approx(1.2)


def test_bad_input_marks_the_field_and_keeps_the_last_result(window, qtbot):
    headline = window.results.headline.text()
    with qtbot.waitSignal(window.calculator.failed, timeout=10000):
        type_into(qtbot, window.form.temperature, "700")
    assert window.results.stale
    assert "Ac3" in window.results.status.text() and "allowed" in window.results.status.text()
    assert "border" in window.form.temperature.styleSheet()
    assert window.results.headline.text() == headline
    assert window.cautions.pressing()[0].key == "below-admission"
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        type_into(qtbot, window.form.temperature, "925")
    assert not window.results.stale
    assert window.form.temperature.styleSheet() == ""


def test_unreadable_composition_is_marked_not_taken(window, qtbot):
    window.form.composition.setText("C=0.2 Qq=1")
    window.form.composition.editingFinished.emit()
    assert "unknown element" in window.form.composition.toolTip()
    assert window.plan.composition["C"] == 0.205


def test_steel_library_pick_sets_composition(window):
    index = window.form.steel.findData("16MnCr5")
    window.form.steel.setCurrentIndex(index)
    window.form.steel.activated.emit(index)
    assert window.plan.steel == "16MnCr5"
    assert "Cr=0.95" in window.form.composition.text()


def test_units_switch_changes_the_display_not_the_plan(window):
    values = window.plan.values()
    window.set_units("imperial")
    assert window.form.temperature.suffix().strip() == "°F"
    assert window.form.temperature.value() == pytest.approx(1697, abs=0.6)
    assert window.form.case_min.value() == pytest.approx(0.8 / 25.4, abs=1e-4)
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
    assert window.form.aim.value() == 25
    assert str(path) in window._recent()


def test_an_older_schema_file_opens(window, qtbot):
    for path in sorted(PLANS.glob("*.json")):
        with qtbot.waitSignal(window.result_shown, timeout=10000):
            assert window.open_plan(path)
        assert window.plan.title in window.windowTitle()
        assert not window.results.stale


def test_unsaved_changes_prompt(window, monkeypatch):
    window.plan.set("carbon_potential", 1.1)
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.Cancel)
    window.new_plan()
    assert window.plan.carbon_potential == pytest.approx(1.1)  # cancelled: nothing lost
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.Discard)
    window.new_plan()
    assert window.plan.carbon_potential == pytest.approx(1.0)


def test_time_control_scrubs_through_the_soak(window):
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


def test_about_lists_every_model_with_its_source(window):
    text = window.models_text()
    for words in ("Tibbetts", "Ågren", "Gunnarson", "Andrews", "ASTM E140", "Just", "NFPA 86", "Verwer", "Lehrer",
                  "Bohnenkamp", "Wagner"):
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


def test_custom_composition_and_plan_name(window, qtbot):
    index = window.form.steel.findData("custom")
    window.form.steel.setCurrentIndex(index)
    window.form.steel.activated.emit(index)
    window.form.composition.setText("C=0.18 Mn=0.9 Cr=1.0")
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        window.form.composition.editingFinished.emit()
    assert window.plan.steel == "custom"
    assert window.outcome.setup.steel.composition == {"C": 0.18, "Mn": 0.9, "Cr": 1.0}
    window.form.title.setText("Idler gear IG-5")
    window.form.title.editingFinished.emit()
    assert window.plan.title == "Idler gear IG-5"
    assert "Idler gear IG-5" in window.windowTitle()


def test_boost_diffuse_plan_in_the_window(window, qtbot):
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.process.setCurrentIndex(window.form.process.findData("boost-diffuse"))
        window.form.process.activated.emit(window.form.process.currentIndex())
    assert window.plan.process == "boost-diffuse"
    assert window.form.boost_box.isVisible() and not window.form.carbon_potential.isEnabled()
    assert window.results.headline.text().startswith("Boost ")
    outcome = window.outcome
    assert outcome.boost_time > 0 and outcome.diffuse_time >= 0
    low, _, high = outcome.targets
    assert low <= outcome.case_depth <= high
    assert window.plan.surface_min <= outcome.surface_carbon <= window.plan.surface_max
    window.plots.setCurrentIndex(2)
    table = window.plots.cycle_page.table
    assert [table.item(r, 0).text() for r in range(table.rowCount())][2:4] == ["Boost", "Diffuse"]
    assert "per part" in window.plots.cycle_page.total.text()


def test_own_stages_table_edits_the_plan(window, qtbot):
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.update(process="stages", stages=[
            {"kind": "soak", "duration_h": 4.0, "temperature_c": 925.0, "carbon_potential_pct": 1.0}])
    before = window.outcome.case_depth
    window.form.stage_table.setCurrentCell(0, 1)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.stage_table.item(0, 1).setText("6")
    assert window.plan.stages[0]["duration_h"] == 6.0
    assert window.outcome.case_depth > before
    window.form.stage_buttons["add"].click()
    assert len(window.plan.stages) == 2
    window.undo_action.trigger()
    assert len(window.plan.stages) == 1


def test_shop_times_and_rates(window, qtbot):
    from casedepth.gui.window import ShopDialog
    from casedepth.quote import ShopDefaults

    dialog = ShopDialog(ShopDefaults(), window)
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


def test_temperature_tradeoff_tab(window):
    window.plots.setCurrentIndex(3)
    pairs = window.plots.tradeoff_page.pairs
    assert len(pairs) >= 5
    assert all(a[1] > b[1] for a, b in zip(pairs, pairs[1:]))  # hotter is faster
    assert window.plots.tradeoff_page.table.rowCount() == len(pairs)


def test_gas_nitriding_in_the_window(window, qtbot):
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.treatment.setCurrentIndex(window.form.treatment.findData("nitriding"))
        window.form.treatment.activated.emit(window.form.treatment.currentIndex())
    assert window.plan.treatment == "nitriding" and window.plan.steel == "4140"
    assert window.form.temperature.value() == pytest.approx(520)
    assert window.results.headline.text().startswith("Nitride ")
    assert window.plots.tabText(0) == "Nitrogen profile" and not window.plots.isTabVisible(3)
    window.plots.setCurrentIndex(2)  # the cycle: heat-up, nitriding, cool-down, with K_N; and its quote
    assert window.plots.cycle_page.table.rowCount() == len(window.outcome.quote.lines)
    assert "K_N" in window.plots.cycle_page.potential_axes.get_ylabel()
    assert window.cautions.items[0].key == "ammonia-toxic"
    low, _, high = window.outcome.targets
    assert low <= window.outcome.aim.nitrided_depth <= high
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.dissociation.setValue(30.0)
    assert window.plan.kn == pytest.approx(6.56, abs=0.01)
    assert window.outcome.setup.phase == "epsilon"
    assert "nitrogen_pct" in window.profile_csv()
    window.undo_action.trigger()
    assert window.plan.kn == pytest.approx(3.0)
    assert "ε" in window.results.facts["surface"].text() and "γ′" in window.results.facts["surface"].text()


def test_nitriding_plan_saves_reopens_and_matches_the_command_line(window, qtbot, tmp_path):
    """The issue's acceptance path: 4140, 520 °C, K_N, target depth and compound window; save, reopen, and the
    command line gives the same numbers from the saved file."""
    import json

    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.treatment.setCurrentIndex(window.form.treatment.findData("nitriding"))
        window.form.treatment.activated.emit(window.form.treatment.currentIndex())
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.kn.setValue(2.5)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.compound_max.setValue(8.0)
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
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.treatment.setCurrentIndex(window.form.treatment.findData("nitriding"))
        window.form.treatment.activated.emit(window.form.treatment.currentIndex())
    assert not window.form.kn_second.isVisibleTo(window)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.kn.setValue(8.0)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.two_stage.setChecked(True)
    assert window.plan.two_stage and window.form.kn_second.isVisibleTo(window)
    assert window.outcome.schedule is not None
    assert "two stages" in window.results.subline.text()
    low, high = window.plan.compound_min, window.plan.compound_max
    assert low <= window.outcome.aim.compound_layer <= high
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.kn_second.setValue(0.5)
    assert window.plan.kn_second == pytest.approx(0.5)
    assert window.outcome.schedule.second_kn == pytest.approx(0.5)


def test_print_documents_through_qt(window, tmp_path):
    from casedepth.gui.printing import print_to_pdf

    for kind in ("sheet", "chart"):
        document = window.document(kind)
        print_to_pdf(document, str(tmp_path / f"{kind}.pdf"), window.paper)
        assert (tmp_path / f"{kind}.pdf").stat().st_size > 10000


def test_plan_a_load_from_saved_plans(window, tmp_path):
    from casedepth.plan import Plan

    first = Plan.load(Path(__file__).resolve().parent.parent / "resources" / "examples" / "pinion-shaft.cdplan.json")
    first.save(tmp_path / "a.cdplan.json")
    first.update(title="Idler pin IP-4 (demo)", case_min=0.9e-3, case_max=1.3e-3)
    first.save(tmp_path / "b.cdplan.json")
    text = window.show_load([str(tmp_path / "a.cdplan.json"), str(tmp_path / "b.cdplan.json")])
    assert text.startswith("Load soak") and "Idler pin" in text and "OUTSIDE" not in text
    hot = Plan(temperature=950 + 273.15)
    hot.save(tmp_path / "c.cdplan.json")
    assert "cannot share a load" in window.show_load([str(tmp_path / "a.cdplan.json"), str(tmp_path / "c.cdplan.json")])
    window.load_view.close()


def test_calibrate_from_a_measured_section(window, qtbot):
    soak = 6 * 3600.0
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        message = window.calibrate(soak, 0.95e-3)
    assert "Multiplier" in message and window.plan.d_multiplier < 1.0
    assert window.form.d_multiplier.value() == pytest.approx(window.plan.d_multiplier)
    window.undo_action.trigger()
    assert window.plan.d_multiplier == pytest.approx(1.0)
    assert "outside" in window.calibrate(soak, 9e-3)


def test_total_case_threshold_from_the_window(window, qtbot):
    """SAE J423 total case: the threshold list offers carbon above the core; picking it sets 0.04 %C."""
    index = window.form.threshold_kind.findText("%C above core (total case)")
    assert index >= 0
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.form.threshold_kind.setCurrentIndex(index)
        window.form.threshold_kind.activated.emit(index)
    assert window.plan.threshold_kind == "above core" and window.plan.threshold_value == pytest.approx(0.04)
    assert window.outcome.setup.threshold_carbon == pytest.approx(window.outcome.setup.steel.carbon + 0.04)
    assert "total case depth" in window.results.subline.text()
