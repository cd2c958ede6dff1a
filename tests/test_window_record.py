"""The furnace record in the window (File → Record this load, File → Furnace record): the same record and fit as
``casedepth record`` (casedepth.shop.record, casedepth.shop.furnace_fit)."""

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtWidgets import QDialog  # noqa: E402

from casedepth.shop.furnace_fit import fit_furnace  # noqa: E402
from casedepth.shop.record import Record  # noqa: E402


def test_record_a_load_add_a_coupon_and_fit_the_furnace(window, qtbot, tmp_path, monkeypatch):
    path = tmp_path / "record.sqlite"
    window.settings.setValue("record_path", str(path))
    window.record_load_dialog()
    dialog = window.record_load
    dialog.furnace.setCurrentText("Pit 2")
    dialog.number.setText("2026-118")
    dialog.soak.setValue(dialog.soak.value() + 0.5)  # run half an hour longer than planned
    dialog.accept()
    assert dialog.result() == QDialog.Accepted
    with Record(path) as record:
        (load,) = record.loads("Pit 2")
    assert load.number == "2026-118" and load.soak == pytest.approx(window.outcome.soak_time + 1800, abs=36)
    assert load.plan["title"] == window.plan.title
    # the same number again is refused in the dialog, which stays open
    window.record_load_dialog()
    again = window.record_load
    again.furnace.setCurrentText("Pit 2")
    again.number.setText("2026-118")
    again.accept()
    assert "already in the record" in again.message.text() and again.result() != QDialog.Accepted
    again.reject()

    window.record_dialog()
    view = window.record_view
    assert view.furnace.currentText() == "Pit 2" and view.table.rowCount() == 1
    assert not view.fit_button.isEnabled()  # nothing measured yet
    csv = tmp_path / "coupon.csv"
    csv.write_text("depth_mm,carbon\n0.1,0.80\n0.3,0.74\n0.6,0.58\n0.9,0.44\n1.2,0.33\n1.6,0.24\n")
    view.kind.setCurrentIndex(view.kind.findData("carbon"))
    view.table.selectRow(0)
    assert view.add_coupon(str(csv))
    assert view.table.item(0, 4).text() == "carbon (6)" and view.fit_button.isEnabled()
    view.fit()
    with Record(path) as record:
        expected = fit_furnace(record.loads("Pit 2"), "Pit 2").text()
    assert view.result.toPlainText() == expected
    bad = tmp_path / "bad.csv"
    bad.write_text("depth,C\n0.1,0.9\n0.x,0.8\n0.3,0.7\n")
    from PySide6.QtWidgets import QMessageBox

    import casedepth.gui.record as module
    told = []
    monkeypatch.setattr(QMessageBox, "warning", lambda parent, title, text: told.append(text))
    assert not view.add_coupon(str(bad))
    assert told and "row 3" in told[0]
    assert module.record_path(window.settings) == path
    view.close()


def test_a_furnace_picked_in_the_window_brings_its_saved_fit(window, qtbot, scratch_record):
    """The same rule as the command line's --furnace: the furnace's latest saved fit, one undoable edit with the
    furnace; a furnace without one takes the multipliers back."""
    from casedepth.plan.fileformat import to_dict
    from casedepth.shop.record import Measurement

    with Record(scratch_record) as record:
        record.add_load("Pit 2", "L-1", to_dict(window.plan), "2026-11-01",
                        measurements=[Measurement("carbon", [(1e-4, 0.9), (5e-4, 0.7), (1e-3, 0.4), (1.5e-3, 0.25)])])
        record.save_calibration("Pit 2", "carburizing", {"diffusivity_multiplier": 0.9, "beta_factor": 1.2,
                                                         "beta_model": "gas-2026", "beta_base": 1.0}, "2026-12-01")
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("furnace", "Pit 2")
    plan = window.plan
    assert (plan.d_multiplier, plan.beta_multiplier) == (0.9, pytest.approx(1.2))
    assert plan.calibration == "Pit 2: record fit #1 of 2026-12-01 (D × 0.9, β × 1.2)"
    assert window.outcome.values["d_multiplier"] == 0.9  # the result is of the calibrated plan
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("furnace", "Pit 3")
    assert (plan.d_multiplier, plan.beta_multiplier, plan.calibration) == (1.0, 1.0, "")
    plan.undo()
    assert plan.furnace == "Pit 2" and plan.d_multiplier == 0.9


def test_the_record_view_takes_single_values_keeps_a_fit_and_plots_the_misses(window, qtbot, scratch_record,
                                                                               monkeypatch):
    from casedepth.plan.fileformat import to_dict
    from casedepth.shop.record import Measurement

    import numpy as np

    from casedepth.plan import forward

    # readings as the plan's own model gives them after a soak 10 % longer, a little scattered
    soak = window.outcome.soak_time * 1.1
    profile = forward(window.plan.values(), soak).profile
    depths = [1e-4, 3e-4, 6e-4, 9e-4, 1.2e-3, 1.6e-3]
    with Record(scratch_record) as record:
        for number, (day, shift) in enumerate((("2026-11-01", 0.01), ("2026-11-08", -0.01)), 1):
            carbon = np.interp(depths, profile.depth, profile.carbon) + shift
            record.add_load("Pit 5", f"P-{number}", to_dict(window.plan), day, soak,
                            measurements=[Measurement("carbon", list(zip(depths, carbon)))])
    window.settings.setValue("record_path", str(scratch_record))
    window.record_dialog()
    view = window.record_view
    view.table.selectRow(1)
    view.single_kind.setCurrentIndex(view.single_kind.findData("case_depth"))
    depth = forward(window.plan.values(), soak).case_depth
    view.single_value.setText(f"{depth * 1e3:.3f}mm")
    assert view.add_value()
    assert view.table.item(1, 4).text() == "carbon (6), case_depth (1)"
    from PySide6.QtWidgets import QMessageBox
    told = []
    monkeypatch.setattr(QMessageBox, "warning", lambda parent, title, text: told.append(text))
    view.single_value.setText("95mm")
    assert not view.add_value() and told and "outside" in told[0]
    view.fit()
    trend, misses = view.figure.axes
    assert view.save_fit.isEnabled() and misses.collections and not trend.lines
    # each measured load's depth as planned and as measured (the value added above)
    from casedepth import formats
    assert view.table.item(1, 5).text() == formats.length(depth)
    assert view.table.item(1, 6).text() == formats.length(round(depth, 6))
    view.keep_fit()
    with Record(scratch_record) as record:
        saved = record.calibration("Pit 5", "carburizing")
    assert saved is not None and saved.label() in view.result.toPlainText()
    trend, misses = view.figure.axes  # the kept fit is on the furnace's trend
    assert trend.get_legend_handles_labels()[1] == ["every grade"] and misses.collections
    view.close()


def test_the_record_view_keeps_a_furnaces_details(window, qtbot, scratch_record):
    """The furnace's type, survey class and notes, as ``casedepth record furnace NAME --kind …`` keeps them."""
    from casedepth.plan.fileformat import to_dict

    with Record(scratch_record) as record:
        record.add_load("Pit 6", "Q-1", to_dict(window.plan), "2026-11-01")
    window.settings.setValue("record_path", str(scratch_record))
    window.record_dialog()
    view = window.record_view
    view.oven_kind.setText("pit")
    view.survey.setCurrentIndex(view.survey.findData("3"))
    view.oven_notes.setText("retort replaced")
    assert view.describe_furnace()
    with Record(scratch_record) as record:
        assert record.furnace("Pit 6").text() == "Pit 6: pit, AMS 2750 class 3; retort replaced"
    view.show_loads()
    assert (view.oven_kind.text(), view.survey.currentData()) == ("pit", "3")
    view.close()


def test_the_record_file_the_window_chose_is_the_one_plans_are_calibrated_from(window, qtbot, scratch_record,
                                                                               tmp_path, monkeypatch):
    """Another record file picked in the Furnace record view (its settings) is the one a furnace picked in the form
    takes its fit from, not the default file (CASEDEPTH_RECORD here)."""
    from PySide6.QtWidgets import QFileDialog

    other = tmp_path / "other.sqlite"
    with Record(other) as record:
        record.describe_furnace("Pit 7")
        record.save_calibration("Pit 7", "carburizing", {"diffusivity_multiplier": 0.8,
                                                         "diffusivity_multiplier_ci": [0.7, 0.9]}, "2026-12-02")
    window.record_dialog()
    view = window.record_view
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(other), ""))
    view.choose_file()
    assert view.furnace.currentText() == "Pit 7"
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("furnace", "Pit 7")
    assert window.plan.d_multiplier == 0.8 and window.plan.calibration.startswith("Pit 7: record fit #1")
    view.close()
